"""The input language: the grammar (`resources`), parsing with spans (`parse`), the build of a validated
`model.System` (`build`; each regime validates its own part through `routes`), the statements that use
results (`statements`: claim, evaluate, tabulate, plot, typeset), expressions and close-match hints."""
