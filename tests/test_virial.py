"""Cluster <-> virial machinery against published values, textbook formulas and independent routes."""
import random

import pytest
import sympy
from hypothesis import given, settings, strategies as st

from clusterexp.exact.series import available_backends, indices_up_to
from clusterexp.exact.virial import (cluster_to_partition, cluster_to_virial, density_expansion,
                               partition_to_cluster, virial_to_cluster)


def _bernoulli_minus(k):
    return sympy.Rational(-1, 2) if k == 1 else sympy.bernoulli(k)  # B_1 = -1/2 convention


@pytest.mark.parametrize("backend", available_backends())
def test_2d_bose_and_fermi_to_order_9(backend):
    # a_n = B_{n-1}/n! for the 2D Bose gas; Fermi identical except a_2 = +1/4
    # (Viefers, Ravndal, Haugset, Am. J. Phys. 63 (1995) 369). Bernoulli numbers from sympy.
    bose = cluster_to_virial({(l,): sympy.Rational(1, l * l) for l in range(1, 10)}, 9, backend=backend)
    fermi = cluster_to_virial({(l,): sympy.Rational((-1) ** (l + 1), l * l) for l in range(1, 10)}, 9,
                              backend=backend)
    for n in range(1, 10):
        expected = _bernoulli_minus(n - 1) / sympy.factorial(n)
        assert bose.virial[(n,)] == expected
        assert fermi.virial[(n,)] == (-expected if n == 2 else expected)


def test_3d_bose_and_fermi_against_textbook_decimals():
    # Pathria & Beale, Statistical Mechanics, 3rd ed., sections 7.1 and 8.1 (equation numbers from
    # memory): a_2..a_5 = -0.17678, -0.0033001, -0.00011129, -0.0000035405; Fermi (-1)^(n+1) times.
    half = sympy.Rational(5, 2)
    bose = cluster_to_virial({(l,): sympy.Integer(l) ** -half for l in range(1, 6)}, 5).virial
    fermi = cluster_to_virial({(l,): (-1) ** (l + 1) * sympy.Integer(l) ** -half for l in range(1, 6)}, 5).virial
    table = {2: (-0.17678, 5e-6), 3: (-0.0033001, 5e-8), 4: (-0.00011129, 5e-9), 5: (-0.0000035405, 5e-11)}
    for n, (value, tolerance) in table.items():
        assert abs(float(bose[(n,)]) - value) <= tolerance
        assert abs(float(fermi[(n,)]) - (-1) ** (n + 1) * value) <= tolerance
    assert sympy.simplify(bose[(2,)] + 2 ** -half) == 0
    assert sympy.simplify(bose[(3,)] - (sympy.Rational(1, 8) - 2 / (9 * sympy.sqrt(3)))) == 0


def test_single_species_a5_against_plain_sympy_reversion():
    b = {(1,): 1, **{(k,): sympy.Symbol(f"b{k}") for k in range(2, 6)}}
    got = cluster_to_virial(b, 5).virial[(5,)]
    z, r = sympy.symbols("z r")
    P = sum(v * z**n[0] for n, v in b.items())
    rho = sympy.expand(z * sympy.diff(P, z))
    c = sympy.symbols("c2:6")
    ansatz = r + sum(ci * r**k for ci, k in zip(c, range(2, 6)))
    e = sympy.expand(rho.subs(z, ansatz))
    solution = sympy.solve([e.coeff(r, k) for k in range(2, 6)], c, dict=True)[0]
    pressure = sympy.expand(P.subs(z, ansatz.subs(solution)))
    assert sympy.expand(got - pressure.coeff(r, 5)) == 0


def _symbolic(K, N, mass=None):
    b = {n: sympy.Symbol("b_" + "_".join(map(str, n))) for n in indices_up_to(K, N, start=2)}
    for i in range(K):
        b[tuple(1 if j == i else 0 for j in range(K))] = 1 if (mass is None or i == 0) else mass
    return b


@pytest.mark.parametrize("K, N", [(1, 6), (2, 5), (3, 4)])
def test_symbolic_round_trips(K, N):
    mu = sympy.Symbol("mu", positive=True)
    b = _symbolic(K, N, mass=mu if K == 2 else None)
    a = cluster_to_virial(b, N).virial
    linear = [b[tuple(1 if j == i else 0 for j in range(K))] for i in range(K)]
    back = virial_to_cluster(dict(a), N, linear=linear)
    for n, v in b.items():
        assert sympy.simplify(back[n] - v) == 0
    again = cluster_to_virial(dict(back), N).virial
    for n in a:
        assert sympy.simplify(again[n] - a[n]) == 0


@settings(max_examples=25, deadline=None)
@given(st.integers(1, 3), st.integers(2, 4), st.randoms(use_true_random=False))
def test_random_rational_round_trips(K, N, rnd):
    b = {n: (1 if sum(n) == 1 else sympy.Rational(rnd.randint(-9, 9), rnd.randint(1, 9)))
         for n in indices_up_to(K, N)}
    back = virial_to_cluster(dict(cluster_to_virial(b, N).virial), N)
    assert all(back[n] == v for n, v in b.items())


def test_legendre_self_check_equals_direct_route():
    # independent route for the pressure (Gibbs-Duhem / Legendre transform)
    for b in (_symbolic(2, 5), {n: sympy.Rational(random.Random(3).randint(-5, 5), 7) if sum(n) > 1 else 1
                                for n in indices_up_to(3, 5)}):
        result = cluster_to_virial(b, 5)
        assert result.legendre_pressure().parts == result.pressure_series.parts


def test_two_species_mixed_second_virial():
    # a_11 = -b_11/(b_10 b_01) (physics.md, section 1)
    m = sympy.Symbol("m", positive=True)
    a = cluster_to_virial({(1, 0): 1, (0, 1): m, (1, 1): sympy.Symbol("b11")}, 2).virial
    assert sympy.simplify(a[(1, 1)] + sympy.Symbol("b11") / m) == 0


def test_density_expansion_is_euler_derivative():
    b = _symbolic(2, 3)
    rho = density_expansion(b, 3)
    for n, v in b.items():
        for i in range(2):
            assert rho[i][n] == n[i] * v


def test_partition_functions_of_single_levels():
    # one bosonic level: Xi = 1/(1 - z), Z_n = 1 -> ln Xi has 1/n; one fermionic level Xi = 1 + z
    bose = partition_to_cluster({(n,): 1 for n in range(1, 8)}, 7)
    fermi = partition_to_cluster({(1,): 1}, 7)
    for n in range(1, 8):
        assert bose[(n,)] == sympy.Rational(1, n)
        assert fermi[(n,)] == sympy.Rational((-1) ** (n + 1), n)


def test_partition_two_species_against_sympy_log_and_back():
    u, v, t = sympy.symbols("u v t")
    Z = {(1, 0): 2, (0, 1): sympy.Rational(1, 3), (1, 1): 5, (2, 0): 1, (0, 2): -1}
    xi = 1 + sum(c * u**i * v**j for (i, j), c in Z.items())
    expected = sympy.expand(sympy.series(sympy.log(xi.subs({u: t * u, v: t * v})), t, 0, 5).removeO())
    b = partition_to_cluster(Z, 4)
    for (i, j) in indices_up_to(2, 4):
        assert b[(i, j)] == expected.coeff(t, i + j).coeff(u, i).coeff(v, j)
    Z_back = cluster_to_partition(dict(b), 4)
    for n, c in Z.items():
        assert Z_back[n] == c
