"""The series kernel against sympy's own `series` (an independent library), on both backends."""
from fractions import Fraction

import pytest
import sympy
from hypothesis import given, settings, strategies as st

from clusterexp.errors import SeriesError
from clusterexp.exact.series import PolynomialRing, Series, available_backends, collect_atoms, revert

x, y = sympy.symbols("x y")
g = sympy.Symbol("g")
BACKENDS = available_backends()


def univariate(expr, order):
    return sympy.series(expr, x, 0, order + 1).removeO()


def make(ring, order, expr, variables=(x,)):
    poly = sympy.Poly(sympy.expand(expr), *variables)
    return Series.from_coefficients(ring, order, {m: c for m, c in poly.terms()})


@pytest.mark.parametrize("backend", BACKENDS)
def test_log_exp_power_inverse_against_sympy_series(backend):
    atoms = collect_atoms([g, sympy.sqrt(2)])
    ring = PolynomialRing(1, atoms, backend=backend)
    N = 5
    base = 1 + g * x - sympy.sqrt(2) * x**2 / 3
    s = make(ring, N, base)
    checks = {
        "log": (s.log(), sympy.log(base)),
        "exp": (make(ring, N, base - 1).exp(), sympy.exp(base - 1)),
        "power": (s.power(sympy.Rational(-3, 2)), base ** sympy.Rational(-3, 2)),
        "symbolic power": (s.power(g), None),
        "inverse": (s.inverse(), 1 / base),
    }
    for name, (got, expected) in checks.items():
        if expected is None:  # (1 + u)^g = sum_k binomial(g, k) u^k (Newton's binomial series)
            u = base - 1
            full = sympy.expand(sum(sympy.expand_func(sympy.binomial(g, k)) * u**k for k in range(N + 1)))
            expected_series = sum(full.coeff(x, k) * x**k for k in range(N + 1))
        else:
            expected_series = univariate(expected, N)
        assert sympy.expand(got.to_expr([x]) - expected_series) == 0, name


@pytest.mark.parametrize("backend", BACKENDS)
def test_compose_and_revert_two_variables(backend):
    ring = PolynomialRing(2, [g], backend=backend)
    N = 5
    f1 = make(ring, N, x + g * x * y + 3 * x**2, (x, y))
    f2 = make(ring, N, y - 2 * x * y + y**3, (x, y))
    w, (product,) = revert([f1, f2], also=[f1 * f2])
    composed = [f.compose(w) for f in (f1, f2)]
    assert composed[0].to_expr([x, y]) == x and composed[1].to_expr([x, y]) == y
    assert sympy.expand(product.to_expr([x, y]) - x * y) == 0


def test_order_bookkeeping():
    ring = PolynomialRing(1, [])
    a, b = make(ring, 5, 1 + x), make(ring, 3, 1 - x)
    assert (a * b).order == 3 and (a + b).order == 3
    with pytest.raises(SeriesError):
        (a * b).coefficient((4,))
    with pytest.raises(SeriesError):
        make(ring, 3, 2 + x).log()
    with pytest.raises(SeriesError):
        make(ring, 3, 1 + x).exp()


def test_backends_agree():
    if len(BACKENDS) < 2:
        pytest.skip("python-flint absent: only the sympy backend exists")
    results = []
    for backend in BACKENDS:
        ring = PolynomialRing(1, [g], backend=backend)
        (w,), _ = revert([make(ring, 8, x + g * x**2 - x**3 / 5)])
        results.append(w.to_expr([x]))
    assert sympy.expand(results[0] - results[1]) == 0


@settings(max_examples=30, deadline=None)
@given(st.lists(st.fractions(min_value=-3, max_value=3, max_denominator=7), min_size=4, max_size=4),
       st.sampled_from(BACKENDS))
def test_revert_then_compose_is_identity(coefficients, backend):
    ring = PolynomialRing(1, [], backend=backend)
    f = Series.from_coefficients(ring, 5, {(1,): 1, **{(k + 2,): c for k, c in enumerate(coefficients)}})
    (w,), _ = revert([f])
    assert f.compose([w]).to_expr([x]) == x


@settings(max_examples=30, deadline=None)
@given(st.lists(st.fractions(min_value=-3, max_value=3, max_denominator=7), min_size=5, max_size=5))
def test_exp_of_log_is_identity(coefficients):
    ring = PolynomialRing(2, [])
    terms = {(0, 0): 1, (1, 0): coefficients[0], (0, 1): coefficients[1], (1, 1): coefficients[2],
             (2, 0): coefficients[3], (0, 3): coefficients[4]}
    s = Series.from_coefficients(ring, 4, terms)
    assert s.log().exp().to_expr([x, y]) == s.to_expr([x, y])


@pytest.mark.parametrize("backend", BACKENDS)
@pytest.mark.parametrize("split", [0, 1, 2, 3])
def test_horner_composition_against_sympy_expand(backend, split):
    """R(w) part by part, for every split between Horner variables and the power table, against
    sympy's expand of the substituted polynomial truncated by total degree (constant, linear and
    missing coefficients included, one coefficient carrying a symbol)."""
    from clusterexp.exact.series.horner import HornerComposition
    from clusterexp.exact.series.series import indices_up_to
    z = sympy.symbols("z0:3")
    order = 5
    ring = PolynomialRing(3, [g], backend=backend, var_names=[str(v) for v in z])
    w_exprs = [z[0] + z[1] ** 2 / 3 - 2 * z[0] * z[2], z[1] - z[0] ** 2 * z[2] / 5 + g * z[2] ** 3,
               z[2] + sympy.Rational(7, 2) * z[0] * z[1]]
    w = [make(ring, order, e, z).parts for e in w_exprs]
    coefficients = {n: sympy.Rational((3 * sum(n) + n[0] - 2 * n[2]) % 7 - 3, 1 + n[1])
                    for n in indices_up_to(3, order, start=0)}
    coefficients[(1, 1, 0)] = g
    outer = sum(c * sympy.Mul(*(wi ** e for wi, e in zip(w_exprs, n))) for n, c in coefficients.items())
    expected = sympy.Poly(sympy.expand(outer), *z)
    composition = HornerComposition(ring, w, {n: ring.scalar_or_element(c) for n, c in coefficients.items()},
                                    order, split=split)
    for m in range(order + 1):
        part = ring.to_expr(composition.next_part(), z)
        wanted = sum((c * sympy.Mul(*(v ** e for v, e in zip(z, monom)))
                      for monom, c in expected.terms() if sum(monom) == m), sympy.Integer(0))
        assert sympy.expand(part - wanted) == 0, (split, m)


def test_truncated_reciprocal_powers_against_sympy_series():
    """c^(-e) as a polynomial truncated in two symbols, against sympy.series applied one symbol at a
    time (general-purpose library)."""
    from clusterexp.exact.series.truncation import reciprocal_power
    n, g, m = sympy.symbols("n g m", positive=True)
    c = m - n * g * (1 - g) / 2 + 3 * g * n ** 2 + n * g ** 2
    limits = {n: 3, g: 2}
    for e in (1, 2, 5):
        got = reciprocal_power(c, e, limits)
        reference = sympy.series(sympy.series(c ** (-e), n, 0, 3).removeO(), g, 0, 2).removeO()
        assert sympy.expand(got - reference) == 0, e
    assert reciprocal_power(n + g, 1, {n: 2}) is not None        # constant part g, nonzero symbolically
    assert reciprocal_power(n * g, 1, {n: 2}) is None             # no constant part: not a power series
    assert reciprocal_power(sympy.sqrt(1 + n), 1, {n: 2}) is None  # not polynomial in n: divide exactly


@pytest.mark.parametrize("backend", available_backends())
def test_drop_powers_keeps_exactly_the_low_powers(backend):
    n, g = sympy.symbols("n g")
    ring = PolynomialRing(1, [n, g], backend=backend)
    p = ring.from_expr(1 + n + n ** 2 * g + g ** 5 + n ** 3)
    assert ring.to_expr(ring.drop_powers(p, {n: 2})) == 1 + n + g ** 5
    assert ring.to_expr(ring.drop_powers(p, {n: 1, g: 1})) == 1
    assert ring.drop_powers(p, {sympy.Symbol("other"): 1}) is p
