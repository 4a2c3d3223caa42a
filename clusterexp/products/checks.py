"""Checking a researcher's hand result against a derived coefficient.

`check_claim(claimed, derived, parameters)` decides, in this order:

1. symbolically, with bounded effort: the difference claimed - derived is expanded; when it is a
   rational function with rational coefficients its normal form (`cancel`) decides exactly, either
   way; otherwise pure numbers go through their minimal polynomial and expressions through
   `simplify`, each only below a size bound and within a time bound (`simplify_seconds`);
2. when that cannot decide, numerically: both sides are evaluated exactly at random rational points
   inside the declared parameter ranges (closed ends are among the candidates, open ends never;
   open-ended ranges are completed as in `numbers.parameter_interval`), the results compared at
   `digits` significant digits (exact comparison when both values are rational). Points where either
   side is singular are skipped and replaced. The points depend only on `seed`.

Status "proven" (equal), "numerically consistent, not proven" (equal at every point, no proof) or
"mismatch" (a point where they differ, or a proof that the difference is not zero); a mismatch
carries the simplified difference, its leading term in the parameters about a stated point (0 when
0 lies in the ranges, else the lower range end) and a point where the two sides differ with both
values.

A claim that is a series truncated at total order k in some parameters is compared through that
order only: `check_claim(..., up_to_order=k, in_parameters=["g"])` truncates the Taylor series of
both sides about 0 in those parameters.

A claim that is one decimal number copied from a table (`-0.0033001`) states its value only to the
digits written: `check_decimal_claim(text, derived)` accepts it when the derived number rounds to it
(within half a unit of the last written digit), as "numerically consistent, not proven" at that
many significant digits, and proves it only when the decimal is the exact value.
"""
from __future__ import annotations

import decimal
from typing import Iterable, Sequence

import sympy

from ..errors import InputError
from .check_result import (CONSISTENT, MISMATCH, PROVEN, STATUSES, TIE, UNDECIDED, CheckList,  # noqa: F401
                           CheckResult, _text)
from .numbers import Interval, evaluate, format_number, parameter_interval

from .check_points import SHOWN_DIGITS, Sampler as _Sampler, agree as _agree, shown_pair as _shown_pair, \
    value_at as _value  # noqa: F401
from .check_symbolic import bounded, decide_zero as _decide_zero, leading_term, truncate  # noqa: F401


# ---------------------------------------------------------------------------------------------
# the entry point


def check_claim(claimed, derived, parameters: Sequence = (), *, points: int = 20, digits: int = 30,
                seed: int = 0, up_to_order: int | None = None, in_parameters: Iterable | None = None,
                label: str | None = None, simplify_seconds: float | None = 5.0,
                symbolic: bool = True) -> CheckResult:
    """Compare a claimed expression with a derived one; see the module documentation.

    `parameters`: the declared `model.Parameter`s (their ranges bound the sampling; symbols are
    matched by name, so a claim parsed without assumptions still refers to them). Symbols that are
    neither declared nor in the derived value are refused. `symbolic=False` skips step 1.
    """
    if isinstance(points, bool) or not isinstance(points, int) or points < 1:
        raise InputError(f"points must be a positive integer, not {points!r}")
    if isinstance(digits, bool) or not isinstance(digits, int) or not 5 <= digits <= 1000:
        raise InputError(f"digits must be an integer from 5 to 1000, not {digits!r}")
    claimed, derived = sympy.sympify(claimed), sympy.sympify(derived)
    for side, expr in (("claimed", claimed), ("derived", derived)):
        floats = sorted({str(f) for f in expr.atoms(sympy.Float)})
        if floats:
            raise InputError(f"the {side} value contains the decimal number {floats[0]}; "
                             "write it as an exact fraction")
    declared = {p.name: p for p in parameters}
    claimed, derived = _unify(claimed, declared), _unify(derived, declared)
    stray = sorted(s.name for s in claimed.free_symbols - derived.free_symbols if s.name not in declared)
    if stray:
        raise InputError(f"the claim uses {', '.join(stray)}, which "
                         f"{'is' if len(stray) == 1 else 'are'} neither a declared parameter nor in the "
                         f"derived value; that depends on {_names_text(derived.free_symbols)}")
    truncation = None
    if up_to_order is not None or in_parameters is not None:
        if up_to_order is None or in_parameters is None:
            raise InputError("a truncated claim needs both up_to_order and in_parameters")
        if isinstance(up_to_order, bool) or not isinstance(up_to_order, int) or up_to_order < 0:
            raise InputError(f"up_to_order must be a nonnegative integer, not {up_to_order!r}")
        variables = _series_variables(in_parameters, declared, claimed.free_symbols | derived.free_symbols)
        claimed = truncate(claimed, variables, up_to_order, "claimed value")
        derived = truncate(derived, variables, up_to_order, "derived value")
        truncation = (up_to_order, tuple(v.name for v in variables))
    common = dict(claimed=claimed, derived=derived, label=label, truncation=truncation, digits=digits)
    difference = claimed - derived

    decided, method, simplified = (None, "", difference)
    if symbolic:
        decided, method, simplified = _decide_zero(difference, simplify_seconds)
        if decided is True:
            return CheckResult(PROVEN, method=method, difference=sympy.Integer(0), **common)

    symbols = sorted(difference.free_symbols | claimed.free_symbols | derived.free_symbols, key=lambda s: s.name)
    intervals = {s: _interval(s, declared) for s in symbols}
    shown_intervals = tuple((s.name, _interval_text(intervals[s])) for s in symbols)
    notes = tuple(f"{s.name} is not a declared parameter; sampled in {intervals[s]}"
                  for s in symbols if s.name not in declared)
    sampler = _Sampler(symbols, intervals, seed)
    good = skipped = 0
    attempts = 0
    max_attempts = 20 * points + 50
    for point in sampler.points(points, max_attempts):
        attempts += 1
        left, right = _value(claimed, point, digits), _value(derived, point, digits)
        if left is None or right is None:
            skipped += 1
            continue
        good += 1
        if not _agree(left, right, digits):
            how = ("they differ" if not symbols else "they differ at a sampled point") \
                + (f"; {method}: the difference is not zero" if decided is False else "")
            return _mismatch(common, simplified, intervals, point, left, right, shown_intervals,
                             good, skipped, notes, how)
        if good >= points:
            break
    if good == 0:
        raise InputError(f"cannot check {label or 'the claim'}: every sampled point is singular"
                         + (f" ({'; '.join(f'{n} in {i}' for n, i in shown_intervals)})" if shown_intervals else ""))
    if decided is False:
        # A nonzero rational function that vanishes at every sampled point: possible only on integer
        # (or a handful of) points.
        notes += ("claimed - derived is not zero as a function, but vanishes at every sampled point",)
    exhaustive = sampler.exhaustive and sampler.size <= good
    if not symbols:
        how = "they are not proven equal"
    elif exhaustive:
        how = "these are all the (integer) points of the ranges"
    else:
        how = "symbolic simplification did not decide" if symbolic else "symbolic simplification not tried"
    if good < points and not exhaustive and symbols:
        notes += (f"only {good} non-singular points found in {attempts} tries",)
    return CheckResult(CONSISTENT, method=how, difference=None, points=good, skipped=skipped,
                       intervals=shown_intervals, notes=notes, **common)


def check_with_pieces(claimed, derived, system, *, label: str | None = None,
                      truncation=None) -> CheckResult | None:
    """A claim whose difference from the derived value involves named many-body pieces (unknown
    functions, not free symbols): undecided, with the equations on the pieces under which it holds,
    or a mismatch when some part of it is wrong whatever the pieces are. None: no piece involved."""
    from ..pieces import conditions
    claimed, derived = sympy.sympify(claimed), sympy.sympify(derived)
    equations = conditions(system, claimed - derived)
    if equations is None:
        return None
    common = dict(claimed=claimed, derived=derived, label=label, truncation=truncation)
    if sympy.false in equations:
        return CheckResult(MISMATCH, method="a part of claimed - derived that no unknown piece enters is not "
                           "zero", difference=sympy.expand(claimed - derived), **common)
    return CheckResult(UNDECIDED, method="the derived value contains many-body pieces the tool cannot compute",
                       difference=sympy.expand(claimed - derived), conditions=tuple(equations), **common)


def decimal_places(text: str) -> tuple[int, int]:
    """(significant digits, exponent of the last written digit) of a decimal such as -1.25e-3."""
    body = text.strip().lstrip("+-")
    mantissa, _, exponent = body.lower().partition("e")
    whole, _, decimals = mantissa.partition(".")
    significant = len((whole + decimals).lstrip("0")) or 1
    return significant, int(exponent or 0) - len(decimals)


def check_decimal_claim(text: str, derived, *, label: str | None = None,
                        simplify_seconds: float | None = 5.0) -> CheckResult:
    """Check a claim written as one decimal number against a derived number: consistent when the
    derived value is real and lies within half a unit of the last written digit (a rounded table
    value; a value exactly on the boundary counts), proven when the decimal is the exact value, a
    mismatch otherwise. The comparison with the boundary is exact (sympy's adaptive evaluation to the
    precision that decides it)."""
    claimed = sympy.Rational(text.strip().replace(" ", ""))
    derived = sympy.sympify(derived)
    if derived.free_symbols:
        raise ValueError("check_decimal_claim compares numbers; the derived value has symbols")
    if derived.has(sympy.zoo, sympy.oo, -sympy.oo, sympy.nan):
        raise InputError(f"cannot check {label or 'the claim'}: the derived value is {_text(derived)}")
    significant, last = decimal_places(text)
    unit = f"1e{last}" if last else "1"
    common = dict(claimed=claimed, derived=derived, label=label, digits=significant, rounding=text)
    decided, how, _ = _decide_zero(claimed - derived, simplify_seconds)
    if decided is True:
        return CheckResult(PROVEN, method=f"the decimal {text} is the exact value ({how})",
                           difference=sympy.Integer(0), **common)
    half_unit = sympy.Rational(1, 2) * sympy.Rational(10) ** last
    shown = format_number(evaluate(derived, {}, significant + 6), significant + 6)
    imaginary = sympy.im(derived)
    if _sign(imaginary) != 0:
        reason = "is not real"
    elif (above := _sign(derived - (claimed - half_unit))) >= 0 and (below := _sign(claimed + half_unit - derived)) >= 0:
        if above and below:
            return CheckResult(CONSISTENT, method=f"the derived value {shown} rounds to the claimed decimal {text} "
                               f"at its last written digit ({unit})", difference=None, **common)
        step = decimal.Decimal(f"1e{last}") * (1 if below == 0 else -1)
        other = str(decimal.Decimal(text.strip().replace(" ", "")) + step)
        pair = sorted([text.strip(), other], key=decimal.Decimal)
        return CheckResult(TIE, method=f"the derived value {_text(derived)} lies exactly halfway between {pair[0]} and "
                           f"{pair[1]}, where rounding conventions differ (half up, half down, half to even), so the written "
                           "digits neither confirm nor refute the claim; write one more digit to decide",
                           difference=claimed - derived, **common)
    else:
        reason = "does not round to it"
    digits = f"{significant} significant digit{'s' if significant != 1 else ''}"
    return CheckResult(MISMATCH, method=f"the claim is the decimal {text} ({digits}); the derived value "
                       f"{shown} {reason}", difference=claimed - derived, claimed_value=text,
                       derived_value=shown, **common)


def _sign(value) -> int:
    """The sign of a real number given exactly: -1, 0 or 1, at whatever precision decides it (an
    expression that stays below 10^-4000 after cancellation counts as 0)."""
    value = sympy.sympify(value)
    if value.is_Rational:
        return int(bool(value > 0)) - int(bool(value < 0))
    if value.is_zero:
        return 0
    try:
        number = value.evalf(30, strict=True, maxn=13300)   # maxn in bits: about 4000 digits
    except sympy.core.evalf.PrecisionExhausted:
        return 0
    re = sympy.re(number)
    return int(bool(re > 0)) - int(bool(re < 0))


def _mismatch(common, simplified, intervals, point, left, right, shown_intervals, good, skipped, notes,
              method) -> CheckResult:
    lead, about, lead_note = leading_term(simplified, intervals)
    if lead_note:
        notes = notes + (lead_note,)
    shown = _shown_pair(left, right)
    return CheckResult(MISMATCH, method=method, difference=simplified, leading_term=lead,
                       expansion_point=about,
                       witness=tuple((s.name, v) for s, v in sorted(point.items(), key=lambda kv: kv[0].name)),
                       claimed_value=shown[0], derived_value=shown[1], points=good, skipped=skipped,
                       intervals=shown_intervals, notes=notes, **common)


def _names_text(symbols) -> str:
    names = sorted(s.name for s in symbols)
    return ", ".join(names) if names else "no symbols (it is a number)"


def _unify(expr: sympy.Expr, declared: dict) -> sympy.Expr:
    """Replace symbols by the declared parameter symbols of the same name."""
    swap = {s: declared[s.name].symbol for s in expr.free_symbols
            if s.name in declared and s != declared[s.name].symbol}
    return expr.xreplace(swap) if swap else expr


def _series_variables(names, declared, present) -> list[sympy.Symbol]:
    by_name = {s.name: s for s in present}
    by_name.update({n: p.symbol for n, p in declared.items()})
    out = []
    for item in names:
        name = getattr(item, "name", None) or str(item)
        if name not in by_name:
            raise InputError(f"cannot expand in {name}: it is not a declared parameter; "
                             f"the values depend on {_names_text(present)}")
        if by_name[name] not in out:
            out.append(by_name[name])
    if not out:
        raise InputError("a truncated claim needs at least one parameter to expand in")
    return sorted(out, key=lambda s: s.name)


def _interval(symbol, declared) -> Interval:
    return parameter_interval(declared.get(symbol.name, symbol))


def _interval_text(interval: Interval) -> str:
    return str(interval) + ("" if interval.origin == "declared range" else f" ({interval.origin})")
