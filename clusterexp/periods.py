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
