"""Single labelled equations: the `snippet a[1,1], a[2,1]` output (one `align` environment per
coefficient, broken to the page width, numbered once) and the equation labels the document uses.

A label is derived from the coefficient's name, species names with their counts: a[2,1] of species L
and H is `a:L2-H`, the density coefficient rho_A[1,1] `rho-A:A-B`, so that `\\eqref{a:L2-H}` can be
written before the equation exists.
"""
from __future__ import annotations

from typing import TYPE_CHECKING

if TYPE_CHECKING:  # the results import the printers for their notebook display, not the other way
    from ..results import Coefficient, Derivation

from .latex_width import fitting_rows

LETTERS = {"cluster": "b", "virial": "a", "density": "rho", "fugacity": "z"}


def equation_label(c: Coefficient, species: tuple[str, ...]) -> str:
    """`a:L2-H` for a[2,1] of species (L, H); `rho-A:...` and `z-A:...` name the component."""
    letter = LETTERS[c.kind] + (f"-{c.component}" if c.component else "")
    parts = [name + (str(n) if n > 1 else "") for name, n in zip(species, c.index) if n]
    return f"{letter}:{'-'.join(parts)}"


def note_comment(derivation: Derivation, c: Coefficient) -> list[str]:
    """A LaTeX comment line saying why a value is not in the form asked for (none when it is)."""
    note = derivation.shaped(c).note
    return [f"% {c.label}: {note}"] if note else []


def labelled_equations(derivation: Derivation, printed: list) -> str:
    """Each coefficient its own numbered and labelled equation; `printed` holds (coefficient, its
    LaTeX name, the LaTeX terms of its value)."""
    blocks = []
    for c, lhs, terms in printed:
        rows = fitting_rows(lhs, terms, equation_label(c, derivation.system.species_names))
        blocks += note_comment(derivation, c) + [r"\begin{align}", rows, r"\end{align}"]
    return "\n".join(blocks) + "\n"
