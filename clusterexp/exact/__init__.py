"""The exact machinery: the series kernel (`series`: polynomial rings over flint or sympy, truncated
series, reversion), the cluster <-> virial machinery (`virial`), printed sums of terms (`terms`),
truncation orders of given values (`orders`) and statistics parameters modulo their periods (`periods`).
It knows nothing of the input language or of any regime."""
