"""Syntax errors that come from mixing the two kinds of `evaluate` / `tabulate` / `plot` statements:
coefficients (a[2], b[1,1]) as functions of parameters, and the equation of state (pressure,
fugacity A, ...) as a function of densities. The parser stops at the first word that does not fit;
this says why, in the user's terms."""
from __future__ import annotations

DENSITY_WORDS = ("density", "filling")
STATE_QUANTITIES = "pressure, fugacity A, chemical potential A, compressibility"


def mixed_state_statement(token, expected: set, previous: str) -> str | None:
    """The message for a coefficient statement given densities, or an equation-of-state statement
    given a coefficient; None for any other syntax error."""
    if previous in DENSITY_WORDS and token.type == "NAME" and not expected & {"NAME"}:
        return (f"`{previous} {token}` is a density of the equation of state: it goes with {STATE_QUANTITIES} "
                f"(`evaluate pressure at {previous} {token} = ...`); coefficients b[..], a[..] are functions of the "
                "parameters (`at g = 1/3`, `over g from ...`): use two statements")
    if token.type == "LSQB" and "NAME" in expected and expected & {"AT", "OVER"}:
        return (f"a coefficient {previous}[..] cannot join the quantities of the equation of state ({STATE_QUANTITIES}): "
                "coefficients are functions of the parameters, the equation of state of the densities; use two "
                "statements")
    return None
