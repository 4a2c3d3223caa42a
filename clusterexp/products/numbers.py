"""Explicit numeric evaluation of derived coefficients: single values, grid tables and CSV files.

Derivations stay exact; this is the one place (with `plots`) where numbers with a finite number of
digits appear. A value is substituted exactly (integers, fractions such as "1/3", decimal strings such
as "0.25" all become exact rationals) and only the final number is evaluated, by sympy's adaptive
`evalf` at the requested number of significant digits, converted to mpmath inside a local precision
context (`mpmath.workdps`), so the global `mpmath.mp.dps` is never changed.

Also here: the default sampling interval of a declared parameter (`parameter_interval`), shared by
`checks` and `plots`.
"""
from __future__ import annotations

import csv
import decimal
import io
import itertools
from dataclasses import dataclass
from fractions import Fraction
from pathlib import Path
from typing import Iterable, Mapping, Sequence

import mpmath
import sympy

from ..errors import InputError

# Half-open default widths for parameters declared without (one of) their range ends.
DEFAULT_WIDTH = sympy.Integer(3)


class EvaluationError(InputError, ValueError):
    """Bad values for a numeric evaluation: unknown names, missing values, unusable numbers.
    Both an `InputError` (the CLI prints it and exits 2) and a `ValueError` (for Python callers)."""


# ---------------------------------------------------------------------------------------------
# values


def exact_number(value, name: str = "value") -> sympy.Expr:
    """An exact real number from an int, Fraction, sympy number or string ("1/3", "0.25", "-2e-3",
    "sqrt(2)"); a Python float is taken by its shortest decimal form (0.1 -> 1/10)."""
    if isinstance(value, bool):
        raise EvaluationError(f"{name}: {value!r} is not a number")
    if isinstance(value, sympy.Basic):
        number = value
    elif isinstance(value, int):
        number = sympy.Integer(value)
    elif isinstance(value, Fraction):
        number = sympy.Rational(value.numerator, value.denominator)
    elif isinstance(value, float):
        if value != value or value in (float("inf"), float("-inf")):
            raise EvaluationError(f"{name}: {value!r} is not a finite number")
        number = sympy.Rational(repr(value))
    elif isinstance(value, (mpmath.mpf,)):
        if not mpmath.isfinite(value):
            raise EvaluationError(f"{name}: {value!r} is not a finite number")
        man, exp = value.man_exp
        number = sympy.Integer(man) * sympy.Integer(2) ** exp if man else sympy.Integer(0)
    elif isinstance(value, str):
        number = _parse_number_text(value.strip(), name)
    else:
        raise EvaluationError(f"{name}: cannot use {value!r} ({type(value).__name__}) as a number")
    if number.free_symbols or not number.is_number:
        raise EvaluationError(f"{name}: {value!r} is not a number")
    if number.is_real is False or number.has(sympy.zoo, sympy.oo, -sympy.oo, sympy.nan):
        raise EvaluationError(f"{name}: {value!r} is not a finite real number")
    return number


def _parse_number_text(text: str, name: str) -> sympy.Expr:
    if not text or len(text) > 200:
        raise EvaluationError(f"{name}: {text!r} is not a number (write e.g. 1/3 or 0.25)")
    try:
        return sympy.Rational(text)  # "1/3", "0.25", "-2e-3": exact
    except (TypeError, ValueError):
        pass
    allowed = set("0123456789+-*/^(). eE") | set("sqrtpi")
    if not set(text) <= allowed:
        raise EvaluationError(f"{name}: {text!r} is not a number (write e.g. 1/3, 0.25 or sqrt(2))")
    try:
        return sympy.sympify(text.replace("^", "**"), locals={"sqrt": sympy.sqrt, "pi": sympy.pi},
                             rational=True)
    except (sympy.SympifyError, TypeError, SyntaxError, ValueError):
        raise EvaluationError(f"{name}: {text!r} is not a number (write e.g. 1/3 or 0.25)") from None


def _names(symbols: Iterable[sympy.Symbol]) -> list[str]:
    return sorted({s.name for s in symbols})


def _depends_text(names: Sequence[str]) -> str:
    return ", ".join(names) if names else "no parameters (it is a number)"


def _substitution(expr: sympy.Expr, values: Mapping, what: str, allowed: Iterable[str] = ()) -> dict:
    """Map the free symbols of `expr` (matched by name) to exact numbers; errors list what `expr`
    depends on."""
    by_name = {}
    for key, value in values.items():
        key_name = key.name if isinstance(key, sympy.Symbol) else str(key)
        if key_name in by_name:
            raise EvaluationError(f"a value for {key_name} is given twice")
        by_name[key_name] = value
    depends = _names(expr.free_symbols)
    unknown = sorted(set(by_name) - set(depends) - set(allowed))
    if unknown:
        raise EvaluationError(f"{what} does not depend on {', '.join(unknown)}; it depends on "
                              f"{_depends_text(depends)}")
    missing = [n for n in depends if n not in by_name]
    if missing:
        raise EvaluationError(f"{what}: no value for {', '.join(missing)}; it depends on {_depends_text(depends)}")
    return {s: exact_number(by_name[s.name], s.name) for s in expr.free_symbols}


def _to_mpmath(number: sympy.Expr, digits: int):
    """A sympy number as an mpmath number with `digits` significant digits (adaptive evaluation)."""
    if number.has(sympy.zoo, sympy.oo, -sympy.oo, sympy.nan):
        raise ZeroDivisionError
    value = sympy.N(number, digits)
    if value.has(sympy.zoo, sympy.oo, -sympy.oo, sympy.nan):
        raise ZeroDivisionError
    with mpmath.workdps(digits + 5):
        real, imag = value.as_real_imag()
        if not (real.is_number and imag.is_number):
            raise EvaluationError(f"could not evaluate {number} to a number")
        re = mpmath.mpf(sympy.Float(real, digits + 5)._mpf_)
        if imag == 0:
            return re
        return mpmath.mpc(re, mpmath.mpf(sympy.Float(imag, digits + 5)._mpf_))


def evaluate(expr, values: Mapping, digits: int = 15, *, allowed: Iterable[str] = ()):
    """The value of `expr` with the parameters set to `values` ({name or Symbol: number}), as an
    mpmath number (`mpf`, or `mpc` when complex) carrying `digits` significant digits.

    Numbers may be ints, Fractions, sympy numbers or strings ("1/3", "0.25"); they are substituted
    exactly. Every free symbol needs a value; names the expression does not contain are refused
    unless listed in `allowed`. A singular point raises EvaluationError.
    """
    if isinstance(digits, bool) or not isinstance(digits, int) or not 1 <= digits <= 10000:
        raise EvaluationError(f"digits must be an integer from 1 to 10000, not {digits!r}")
    expr = sympy.sympify(expr)
    what = _what(expr)
    point = _substitution(expr, values, what, allowed)
    exact = expr.xreplace(point)
    try:
        return _to_mpmath(exact, digits)
    except ZeroDivisionError:
        raise EvaluationError(f"{what} is singular at {format_point(point)}") from None


def _what(expr) -> str:
    text = sympy.sstr(expr)
    return "the expression " + (text if len(text) <= 60 else text[:57] + "...")


def format_number(value, digits: int) -> str:
    """Deterministic text of a number with `digits` significant digits (mpmath's nstr); complex
    numbers as `re+imj`."""
    if isinstance(value, mpmath.mpc):
        re, im = mpmath.nstr(value.real, digits), mpmath.nstr(abs(value.imag), digits)
        return f"{re}{'-' if value.imag < 0 else '+'}{im}j"
    return mpmath.nstr(value, digits)


def format_point(point: Mapping) -> str:
    return ", ".join(f"{getattr(k, 'name', k)} = {v}" for k, v in sorted(point.items(), key=lambda kv: str(getattr(kv[0], "name", kv[0]))))


# ---------------------------------------------------------------------------------------------
# grid tables


def _coefficient_label(c) -> str:
    return getattr(c, "label", None) or sympy.sstr(c)


def _coefficient_value(c) -> sympy.Expr:
    return c.value if hasattr(c, "value") and hasattr(c, "kind") else sympy.sympify(c)


def grid_table(coefficients: Sequence, grid: Mapping[str, Sequence], digits: int = 15,
               *, fixed: Mapping | None = None) -> list[list[str]]:
    """Values of the coefficients on the Cartesian product of the grid, as rows of text.

    The first row is the header: the grid's parameter names (in the mapping's order, then the
    `fixed` ones) followed by the coefficient labels (`a[2,1]`). The first parameter varies slowest.
    `fixed` holds parameters kept at one value. Every coefficient's parameters need values; a name
    no coefficient depends on is an error.
    """
    if isinstance(digits, bool) or not isinstance(digits, int) or not 1 <= digits <= 1000:
        raise EvaluationError(f"digits must be an integer from 1 to 1000, not {digits!r}")
    coefficients = list(coefficients)
    if not coefficients:
        raise EvaluationError("no coefficients to tabulate")
    fixed = dict(fixed or {})
    names = [getattr(k, "name", str(k)) for k in grid] + [getattr(k, "name", str(k)) for k in fixed]
    if len(set(names)) != len(names):
        raise EvaluationError("a parameter is given twice in the grid")
    values = [_coefficient_value(c) for c in coefficients]
    labels = [_coefficient_label(c) for c in coefficients]
    depends = _names(set().union(*(v.free_symbols for v in values)))
    unknown = sorted(set(names) - set(depends))
    if unknown:
        raise EvaluationError(f"the coefficients do not depend on {', '.join(unknown)}; they depend on "
                              f"{_depends_text(depends)}")
    for label, value in zip(labels, values):
        missing = [n for n in _names(value.free_symbols) if n not in names]
        if missing:
            raise EvaluationError(f"{label}: no values for {', '.join(missing)}; it depends on "
                                  f"{_depends_text(_names(value.free_symbols))}")
    axes = []
    for key, column in grid.items():
        key_name = getattr(key, "name", str(key))
        if isinstance(column, (str, bytes)) or not isinstance(column, Iterable):
            raise EvaluationError(f"grid values of {key_name} must be a list of numbers")
        column = [exact_number(v, key_name) for v in column]
        if not column:
            raise EvaluationError(f"no grid values for {key_name}")
        axes.append(column)
    axes += [[exact_number(v, getattr(k, "name", str(k)))] for k, v in fixed.items()]
    symbols = [{s.name: s for s in v.free_symbols} for v in values]
    rows = [names + labels]
    for combination in itertools.product(*axes):
        point = dict(zip(names, combination))
        row = [grid_text(v, digits) for v in combination]
        for label, value, own in zip(labels, values, symbols):
            exact = value.xreplace({s: point[n] for n, s in own.items()})
            try:
                row.append(format_number(_to_mpmath(exact, digits), digits))
            except ZeroDivisionError:
                row.append("nan")  # a singular point of this coefficient
        rows.append(row)
    return rows


def grid_text(number: sympy.Expr, digits: int) -> str:
    """A grid value as a decimal, never a fraction (spreadsheets read 1/8 as the 8th of January):
    exact when it terminates (1/8 -> 0.125), else to `digits` significant digits."""
    if number.is_Integer:
        return str(number)
    if number.is_Rational:
        q = int(number.q)
        for prime in (2, 5):
            while q % prime == 0:
                q //= prime
        if q == 1:
            with decimal.localcontext() as context:
                context.prec = len(str(abs(int(number.p)))) + len(str(int(number.q))) + 2
                text = format(decimal.Decimal(int(number.p)) / decimal.Decimal(int(number.q)), "f")
            return text
    return format_number(_to_mpmath(number, digits), digits)


def write_csv(rows: Sequence[Sequence[str]], path) -> Path:
    """Write the rows (header first, as from `grid_table`) as CSV: a temporary file in the target's
    folder, then an atomic rename (`files.write_atomically`). Returns the path."""
    path = Path(path)
    if path.is_dir():
        raise EvaluationError(f"{path} is a folder; give a file name")
    atomic_write_bytes(path, csv_bytes(rows))
    return path


def csv_bytes(rows: Sequence[Sequence[str]]) -> bytes:
    """The rows as CSV text (UTF-8, one line per row)."""
    buffer = io.StringIO()
    writer = csv.writer(buffer, lineterminator="\n")
    for row in rows:
        writer.writerow([str(cell) for cell in row])
    return buffer.getvalue().encode("utf-8")


def atomic_write_bytes(path: Path, data: bytes) -> None:
    """Replace or create `path` atomically by the project's rule for output files (`files`): a new
    file gets the permissions of an ordinary new file, a replaced one keeps its own."""
    from .files import write_atomically
    write_atomically(path, data, overwrite=True)


# ---------------------------------------------------------------------------------------------
# intervals of declared parameters


@dataclass(frozen=True)
class Interval:
    """A real interval with exact ends; `origin` says where it came from (for messages)."""

    lower: sympy.Expr
    upper: sympy.Expr
    lower_open: bool = False
    upper_open: bool = False
    origin: str = "declared range"

    def __str__(self) -> str:
        return (("(" if self.lower_open else "[") + f"{self.lower}, {self.upper}"
                + (")" if self.upper_open else "]"))

    def contains(self, x) -> bool:
        above = x > self.lower if self.lower_open else x >= self.lower
        below = x < self.upper if self.upper_open else x <= self.upper
        return bool(above) and bool(below)


def parameter_interval(parameter) -> Interval:
    """Where to sample a declared parameter: its range, completed where open-ended by a default
    width of 3 (positive ones (0, 3], nonnegative ones [0, 3], unbounded ones [-3, 3]). `parameter`
    is a `model.Parameter` or a bare sympy Symbol (treated by its assumptions)."""
    symbol = getattr(parameter, "symbol", parameter)
    lower = getattr(parameter, "lower", None)
    upper = getattr(parameter, "upper", None)
    lower_open = bool(getattr(parameter, "lower_open", False))
    upper_open = bool(getattr(parameter, "upper_open", False))
    if lower is not None and upper is not None:
        return Interval(sympy.sympify(lower), sympy.sympify(upper), lower_open, upper_open)
    if lower is None and upper is None:
        if symbol.is_positive:
            return Interval(sympy.Integer(0), DEFAULT_WIDTH, True, False, "default for a positive parameter")
        if symbol.is_nonnegative:
            return Interval(sympy.Integer(0), DEFAULT_WIDTH, False, False, "default for a nonnegative parameter")
        return Interval(-DEFAULT_WIDTH, DEFAULT_WIDTH, False, False, "default for an unbounded parameter")
    if lower is not None:
        lower = sympy.sympify(lower)
        return Interval(lower, lower + DEFAULT_WIDTH, lower_open, False, "declared lower end, default width 3")
    upper = sympy.sympify(upper)
    low, low_open = upper - DEFAULT_WIDTH, False
    if symbol.is_positive and low <= 0:
        low, low_open = sympy.Integer(0), True
    elif symbol.is_nonnegative and low < 0:
        low = sympy.Integer(0)
    return Interval(low, upper, low_open, upper_open, "declared upper end, default width 3")
