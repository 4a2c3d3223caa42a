"""Statistics parameters modulo their periods: which species are ideal and which pairs do not braid.

Conventions (README): the exchange parameter alpha has period 2 (alpha = 0 bosons, alpha = 1 fermions,
so 2, 4, -2 ... are bosons and -1, 3, 5 ... fermions); a mutual parameter alpha_ij has period 1, and
every integer means no statistical coupling. A decision is made only when the value is exactly
determined modulo its period for every allowed value of the declared parameters (a number, an integer
multiple of the period by sympy's assumptions, or an integer parameter whose declared range holds one
integer); anything else is undecided (None), and the caller keeps the general (anyonic) treatment.

>>> import sympy
>>> exchange_statistics(sympy.Integer(3), {})
'fermi'
>>> braids(sympy.Integer(-1), {})
False
"""
from __future__ import annotations

import sympy

EXCHANGE_PERIOD = 2
MUTUAL_PERIOD = 1


def residue(value, period: int, parameters: dict | None = None) -> sympy.Expr | None:
    """value mod period when it is the same for every allowed value of the parameters, else None.
    `parameters` maps symbols to `model.Parameter` (ranges pin integer parameters)."""
    value = sympy.sympify(value)
    value = value.subs(_pinned(value, parameters or {}))
    if value.is_number:
        if value.is_real is not True:
            return None
        return sympy.Mod(value, period)
    for candidate in range(period):
        if ((value - candidate) / period).is_integer is True:
            return sympy.Integer(candidate)
    return None


def _pinned(value, parameters: dict) -> dict:
    """{symbol: n} for integer parameters whose declared range contains the one integer n."""
    out = {}
    for symbol in value.free_symbols:
        p = parameters.get(symbol)
        if p is None or "integer" not in p.assumptions or p.lower is None or p.upper is None:
            continue
        low = int(sympy.ceiling(p.lower)) + (1 if p.lower_open and p.lower.is_integer else 0)
        high = int(sympy.floor(p.upper)) - (1 if p.upper_open and p.upper.is_integer else 0)
        if low == high:
            out[symbol] = sympy.Integer(low)
    return out


def exchange_statistics(alpha, parameters: dict | None = None) -> str | None:
    """"bose" or "fermi" when the exchange parameter is exactly bosonic or fermionic modulo 2, else None."""
    r = residue(alpha, EXCHANGE_PERIOD, parameters)
    if r is None:
        return None
    return {0: "bose", 1: "fermi"}.get(r) if r.is_Integer else None


def braids(alpha_ij, parameters: dict | None = None) -> bool | None:
    """False when the mutual parameter is exactly an integer (no statistical coupling, period 1), True
    when it is a number that is not, None when undecided (kept as braiding by the callers)."""
    r = residue(alpha_ij, MUTUAL_PERIOD, parameters)
    if r is None:
        return None
    return r != 0


def species_statistics(species, parameters: dict | None = None) -> str | None:
    """"bose", "fermi" or "boltzmann" for a species declared by word or with an exchange parameter that
    is bosonic or fermionic modulo 2; None for anyons."""
    if species.statistics:
        return species.statistics
    return exchange_statistics(species.exchange, parameters)


def coupled_groups(occupied, coupled) -> list[set]:
    """The connected groups of the species `occupied` under the relation `coupled(i, j)` (braiding
    possibly nonzero). ln Xi of species that fall in different groups is additive."""
    groups: list[set] = []
    for i in occupied:
        joined = [g for g in groups if any(coupled(i, j) for j in g)]
        merged = {i}.union(*joined)
        groups = [g for g in groups if g not in joined] + [merged]
    return groups


# --- periodic closed forms ------------------------------------------------------------------------

class PeriodicPart(sympy.Function):
    """x mod p as a function sympy can evaluate, differentiate (slope 1 away from the jumps, where the
    two-body coefficients are continuous anyway) and print: `Mod(x, p)` in text, (x mod p) in LaTeX."""

    nargs = 2

    @classmethod
    def eval(cls, x, p):
        if x.is_number and p.is_number:
            return sympy.Mod(x, p)
        return None

    def fdiff(self, argindex=1):
        if argindex == 1:
            return sympy.Integer(1)
        raise sympy.ArgumentIndexError(self, argindex)

    def _eval_evalf(self, prec):
        x, p = self.args
        value = sympy.Mod(x, p)
        return None if value.has(PeriodicPart) else value.evalf(prec)

    def _sympystr(self, printer):
        return f"Mod({printer._print(self.args[0])}, {printer._print(self.args[1])})"

    def _latex(self, printer, exp=None):
        body = rf"\left({printer._print(self.args[0])} \bmod {printer._print(self.args[1])}\right)"
        return body if exp is None else rf"{body}^{{{exp}}}"

    def floor_form(self) -> sympy.Expr:
        x, p = self.args
        return x - p * sympy.floor(x / p)


def reduced(value: sympy.Expr, period: int, parameters: dict) -> sympy.Expr:
    """value mod period, written without floor when the declared range keeps it in one branch."""
    value = sympy.sympify(value)
    if value.is_number:
        return PeriodicPart(value, period)
    low, high = _range_of(value, parameters)
    if low is not None and high is not None:
        k = sympy.floor(low / period)
        if bool(high <= (k + 1) * period) or (bool(sympy.Eq(high, (k + 1) * period)) and _open_top(value, parameters)):
            return sympy.expand(value - k * period)
    return PeriodicPart(value, period)


def _range_of(value, parameters):
    """A range for a linear expression c*p + d in one declared parameter p, else (None, None)."""
    symbols = list(value.free_symbols)
    if len(symbols) != 1 or symbols[0] not in parameters:
        return None, None
    p = parameters[symbols[0]]
    if p.lower is None or p.upper is None:
        return None, None
    poly = sympy.Poly(value, symbols[0]) if value.is_polynomial(symbols[0]) else None
    if poly is None or poly.degree() > 1:
        return None, None
    ends = sorted([value.subs(symbols[0], p.lower), value.subs(symbols[0], p.upper)])
    return ends[0], ends[1]


def _open_top(value, parameters) -> bool:
    return False


def frozen_at(expr: sympy.Expr, probes: dict) -> tuple[sympy.Expr, sympy.Expr | None]:
    """expr with every periodic part (floor, Mod) that involves the probed variables frozen at its value
    at the probe point (just off the expansion point on each variable's side), and the first such part
    whose value there is not a number (it depends on other parameters too), or None."""
    # only the parts that involve a probed variable: the others stay as they print (Mod(alpha, 2), not floors)
    expr = expr.replace(lambda e: isinstance(e, PeriodicPart) and bool(e.free_symbols & set(probes)),
                        lambda e: e.floor_form())
    undecided = None
    floors = {}
    for f in expr.atoms(sympy.floor):
        if f.free_symbols & set(probes):
            at = f.args[0].subs(probes)
            undecided = undecided if at.is_number else undecided or f
            floors[f] = sympy.floor(at)
    expr = expr.subs(floors)
    mods = {}
    for m in expr.atoms(sympy.Mod):
        if m.free_symbols & set(probes):
            at = (m.args[0] / m.args[1]).subs(probes)
            undecided = undecided if at.is_number else undecided or m
            mods[m] = m.args[0] - m.args[1] * sympy.floor(at)
    return expr.subs(mods), undecided
