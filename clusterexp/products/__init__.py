"""What an input asks of its derived coefficients: checks of hand results (`checks`, `check_symbolic`,
`check_points`, `check_result`), numbers at points (`numbers`), CSV tables and figures (`plots`), their
running against a derivation (`run`) and the writing of files (`files`)."""
