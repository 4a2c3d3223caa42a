"""How a sampled number is quoted in every printer and file: value +- error, the error to two
significant digits, a zero-variance value settled at its rounding."""
from __future__ import annotations

import math

METHOD = "Brownian-loop Monte Carlo, docs/loops.md"
PLUS_MINUS_LATEX = r" \pm "
EXACT_BELOW = 1e-12


def settled(value: float, error: float) -> tuple[float, float]:
    """(value, error) as every printer and file shows them: with zero variance (the phases are trivial
    at this point, e.g. an integer mutual parameter) what is left of the value below 1e-12 is rounding
    of the phases, not statistics, so the value is rounded there and the error is 0."""
    if not math.isfinite(error) or error < EXACT_BELOW:
        return round(value, 12) + 0.0, 0.0
    return value, error


def plus_minus(value: float, error: float, separator: str = " +- ") -> str:
    """value and error, the error to two significant digits and the value to the same place."""
    if not math.isfinite(error) or error < EXACT_BELOW:
        return f"{settled(value, error)[0]:.7g}{separator}0"
    place = math.floor(math.log10(error)) - 1
    decimals = max(0, -place)
    if place > 0:
        step = 10 ** place
        return f"{round(value / step) * step:.0f}{separator}{round(error / step) * step:.0f}"
    return f"{value:.{decimals}f}{separator}{error:.{decimals}f}"


def slice_text(bound: float | None) -> str:
    """What the loops' time slicing may still leave in a number, beside its statistical error bar
    (`ThirdOrderResult.slice_bound`): empty when not assessed or zero."""
    bound = settled_bound(bound)
    if not bound:
        return ""
    return f"slicing bias below {bound:.2g}"


def settled_bound(bound: float | None) -> float | None:
    """The slicing bias bound as printers and files show it: rounded up to two significant digits (a
    bound must not shrink in print), 0 below the rounding of the phases, None when not assessed."""
    if bound is None:
        return None
    if not math.isfinite(bound) or bound < EXACT_BELOW:
        return 0.0 if math.isfinite(bound) else bound
    step = 10.0 ** (math.floor(math.log10(bound)) - 1)
    return float(f"{math.ceil(bound / step - 1e-9) * step:.2g}")
