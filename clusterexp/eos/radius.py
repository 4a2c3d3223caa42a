"""How far a truncated virial series can be trusted: its radius of convergence along a ray of density
ratios, ESTIMATED from the tool's own virial coefficients, and compared with the exact radius and the
boundary of the exact equation of state where they are known.

Along densities = t x (x the composition, sum x_i = 1) the virial series is sum_k A_k t^k with
A_k = sum_{|n| = k} a_n x^n. Two textbook estimates from the last coefficients:

- ratio test: |A_j / A_k|^(1/(k - j)) for the last two nonzero A_j, A_k (skipping zeros, as in the
  2D Bose series whose odd coefficients past a_3 vanish);
- root test: |A_k|^(-1/k) for the last nonzero A_k.

Both are estimates (finite-order values of limits); the text says so. The exact radius can be smaller
than the physical boundary (a complex or negative-density singularity nearer the origin), e.g. one
species on one level with g < 1/2: radius 1/(1 - g) < close packing 1/g.
"""
from __future__ import annotations

from dataclasses import dataclass
from typing import Mapping

import sympy

from ..errors import InputError
from ..products.numbers import format_number
from .precision import substitute, to_mpf, working_context


@dataclass(frozen=True)
class RadiusEstimate:
    """Estimates of the radius (in total density along the ray) and what is known exactly."""

    composition: tuple
    along: tuple  # (k, A_k as an mpmath number) for k = 1..order
    ratio: object | None
    root: object | None
    exact: sympy.Expr | None
    boundary: sympy.Expr | None
    boundary_kind: str
    text: str


def _virial_table(virials) -> dict:
    if hasattr(virials, "of_kind"):
        return {c.index: c.value for c in virials.of_kind("virial")}
    return dict(virials)


def estimate_radius(eos, virials, x: tuple, parameters: Mapping, digits: int = 15) -> RadiusEstimate:
    table = _virial_table(virials)
    if not table:
        raise InputError("no virial coefficients to estimate the radius of convergence from")
    K = len(x)
    if any(len(n) != K for n in table):
        raise InputError(f"virial coefficients of {len(next(iter(table)))} species for an equation of state of {K}")
    ctx = working_context(digits)
    order = max(sum(n) for n in table)
    along = []
    for k in range(1, order + 1):
        total = sympy.Integer(0)
        for n, a in table.items():
            if sum(n) == k:
                total += substitute(a, parameters) * sympy.Mul(*(xi ** ni for xi, ni in zip(x, n)))
        if total.free_symbols:
            names = ", ".join(sorted(s.name for s in total.free_symbols))
            raise InputError(f"the virial coefficients depend on {names}: give their values")
        along.append((k, to_mpf(ctx, total)))
    nonzero = [(k, A) for k, A in along if k >= 2 and A != 0]
    ratio = root = None
    if len(nonzero) >= 2:
        (j, Aj), (k, Ak) = nonzero[-2], nonzero[-1]
        ratio = ctx.power(abs(Aj / Ak), ctx.one / (k - j))
    if nonzero:
        k, Ak = nonzero[-1]
        root = ctx.power(abs(Ak), -ctx.one / k)
    exact = eos.exact_radius(x, parameters)
    ray = eos.ray_boundary(x, parameters)
    unit = eos.density_unit.split(" (")[0]
    words = [f"radius of convergence of the virial series along the composition "
             f"({', '.join(f'{n}: {sympy.sstr(v)}' for n, v in zip(eos.names, x))}), in total density ({unit}), "
             f"ESTIMATED from a_1..a_{order}"]
    words.append("ratio test ~ " + (format_number(ratio, 6) if ratio is not None else "n/a (fewer than two nonzero "
                                    "coefficients past the first)"))
    words.append("root test ~ " + (format_number(root, 6) if root is not None else "n/a"))
    if exact is not None:
        words.append("exact radius " + ("infinite (the series ends)" if exact == sympy.oo else
                                        f"{sympy.sstr(exact)} = {sympy.N(exact, 8)}"))
    if ray.at is not None:
        words.append(f"{ray.kind} at total density {sympy.sstr(ray.at)} = {sympy.N(ray.at, 8)}")
    return RadiusEstimate(x, tuple(along), ratio, root, exact, ray.at, ray.kind, "; ".join(words))
