"""Derived: the angle-area part of the cluster of a p-cycle with a q-cycle at second order, any masses.

At order e d (e the exchange parameter of one cycle's species, d the mutual parameter of the two species)
the cluster {p-cycle X of species i, q-cycle Y of species j}, offset integrated, contributes
-2 pi P sum_u sum_R E[theta_u Area(R)]: theta_u the angle swept in one unit of time by a self pair u of X
(two of its strands), R the link curves X(s + a) - Y(s + b), P the normalisation that the cluster's
first order fixes (docs/perturbative.md, section 4i, where every step is written out):

* averaging over Y first leaves the area of X, run q times in all over the gcd(p, q) link curves:
  sum_R E[theta_u Area(R)] = q E[theta_u Area(X)];
* E[theta_u Area(X)] = D_X (the pair's window of one unit of time times the loop's diffusion constant
  D_X = m_ref/m_i), for every lag of the pair and every p: Gaussian integration by parts over the loop's
  Fourier modes, in which each mode carries the same ratio pi n s_n omega_n = D_X (`self_pair_angle_area`,
  done exactly by sympy);
* P = m_i m_j/(2 pi m_ref^2 p^2 q^2), from the first order -(m_i + m_j)/(2 m_ref p q) |d| of section 3
  shared by the p q link segments, each -pi (D_X + D_Y) |d|.

Hence the coefficient of e_i d carried by the p-cycle's self pairs, in b with p particles of species i
and q of species j, about bosons: -(m_j/m_ref) (p - 1)/(2 p q); that of e_j d: -(m_i/m_ref) (q - 1)/(2 p q).
About fermions each cycle brings its sign (-1)^(cycle length - 1), as for the whole cluster.
"""
from __future__ import annotations

from fractions import Fraction
from functools import cache

import sympy

from ..errors import NotSupportedYet

_n, _h = sympy.symbols("n h", integer=True, positive=True)


def _cycle_length(value, name: str) -> int:
    if isinstance(value, bool) or not isinstance(value, int) or value < 1:
        raise ValueError(f"{name} must be a positive integer cycle length, got {value!r}")
    return value


def _exact_mass(value, name: str) -> sympy.Rational:
    if isinstance(value, float):
        raise NotSupportedYet(f"{name} = {value!r} is a float: the angle-area part is exact and needs an "
                              "exact mass (int, Fraction or sympy Rational); floats are not supported yet")
    mass = sympy.Rational(value.numerator, value.denominator) if isinstance(value, Fraction) else sympy.sympify(value)
    if not (mass.is_Rational and mass > 0):
        raise ValueError(f"{name} must be a positive rational mass, got {value!r}")
    return mass


@cache
def _mode_ratio(period: int) -> sympy.Expr:
    """pi n s_n omega_n for the Fourier mode n of a Brownian loop of the given period and unit diffusion,
    s_n = E|c_n|^2 the mode's variance (complex notation X(t) = sum_n c_n e^{i omega_n t}), computed from
    the loop's variogram h (T - h)/T per component: s_n = -(1/T) int_0^T h (T - h)/T cos(omega_n h) dh.
    A pair at lag k weighs the mode by |phi_n|^2 = 2 (1 - cos omega_n k), which the ratio does not see."""
    T = sympy.Integer(period)
    omega = 2 * sympy.pi * _n / T
    s_n = sympy.simplify(-sympy.integrate(_h * (T - _h) / T * sympy.cos(omega * _h), (_h, 0, T)) / T)
    return sympy.simplify(sympy.pi * _n * s_n * omega)


def self_pair_angle_area(period: int, lag: int, diffusion=1) -> sympy.Expr:
    """E[theta Area(X)] for a Brownian loop X of duration `period` (per-component variogram
    diffusion * h (T - h)/T) and the angle theta swept in one unit of time by X(t) - X(t + lag)
    (docs/perturbative.md, section 4i). Stein's lemma for the circular modes c_n of X,
    E[F |c_n|^2] = s_n E[F] + s_n^2 E[d_n dbar_n F], with Area = pi sum_n n |c_n|^2 and E[theta] = 0, gives
    E[theta Area] = pi sum_n n s_n^2 E[d_n dbar_n theta]; theta is the imaginary part of a holomorphic
    function of the modes except on A = 0, where dbar(1/A) = pi delta^2(A), so
    E[d_n dbar_n theta] = omega_n |phi_n|^2 / V (V = E|A|^2 = sum_n s_n |phi_n|^2; the term with A'
    vanishes since E[A' conj A] = 0). Every mode thus enters with the weight pi n s_n omega_n times its
    share s_n |phi_n|^2 / V of V: when that weight is the same for all n the shares sum to one."""
    period = _cycle_length(period, "period")
    if not 0 < lag < period:
        raise ValueError(f"a self pair's lag is 1..{period - 1}, got {lag!r}")
    ratio = _mode_ratio(period)
    if ratio.free_symbols:
        raise NotSupportedYet(f"the mode weight {ratio} depends on the mode: no closed form")
    return ratio * sympy.sympify(diffusion)


def first_order_normalisation(p: int, q: int, m_i, m_j, m_ref=1) -> sympy.Expr:
    """P of the cluster {p-cycle of species i, q-cycle of species j}, in units hbar = beta = m_ref = 1:
    its first order -(m_i + m_j)/(2 m_ref p q) |d| (section 3) equals P times the p q link segments'
    contacts, -pi (D_X + D_Y) |d| each (section 4e (i))."""
    m_i, m_j, m_ref = (_exact_mass(m, name) for m, name in ((m_i, "m_i"), (m_j, "m_j"), (m_ref, "m_ref")))
    first_order = -(m_i + m_j) / (2 * m_ref * p * q)
    segment = -sympy.pi * (m_ref / m_i + m_ref / m_j)
    return sympy.simplify(first_order / (p * q * segment))


def angle_area_coefficients(p: int, q: int, m_i=1, m_j=1, m_ref=1) -> tuple[sympy.Rational, sympy.Rational]:
    """(coefficient of e_i d, coefficient of e_j d) that the cluster of a p-cycle of species i with a
    q-cycle of species j adds to b_{p e_i + q e_j} through its self angles times its link's area, about
    bosons for both species (about fermions multiply by (-1)^(p - 1) (-1)^(q - 1)), exact for any masses:
    -(m_j/m_ref) (p - 1)/(2 p q) and -(m_i/m_ref) (q - 1)/(2 p q) (docs/perturbative.md, section 4i).
    The chains of three loops (Landau term) are not included."""
    p, q = _cycle_length(p, "p"), _cycle_length(q, "q")
    masses = {name: _exact_mass(m, name) for m, name in ((m_i, "m_i"), (m_j, "m_j"), (m_ref, "m_ref"))}
    norm = first_order_normalisation(p, q, masses["m_i"], masses["m_j"], masses["m_ref"])
    out = []
    for own, other, mass in ((p, q, masses["m_i"]), (q, p, masses["m_j"])):
        diffusion = masses["m_ref"] / mass
        # self pairs (u1, u2), u1 < u2 < own, at lag u2 - u1 = k: own - k of them; the other loop's q
        # (resp. p) passes around the link curves count the own loop's area that many times
        pairs = sum(((own - k) * self_pair_angle_area(own, k, diffusion) for k in range(1, own)), sympy.Integer(0))
        value = sympy.simplify(-2 * sympy.pi * norm * other * pairs)
        if not value.is_Rational:   # (never on an exact Rational: it guesses surds for large ones)
            value = sympy.nsimplify(value)
        if not value.is_Rational:
            raise NotSupportedYet(f"angle-area part {value} of {{{p}, {q}}} is not rational")
        out.append(value)
    return out[0], out[1]


def one_species_units(p: int, q: int) -> tuple[sympy.Rational, sympy.Rational]:
    """The angle-area parts in the units of `two_loop_table.ANGLE` (the one-species cluster {p-cycle,
    q-cycle} in b_{p+q}, unit masses, about bosons): the two-species coefficients divided by 2 when
    p = q (that cluster's first order is -1/(2 p^2) there against -1/p^2 for two species)."""
    first, second = angle_area_coefficients(p, q)
    share = 2 if p == q else 1
    return first / share, second / share
