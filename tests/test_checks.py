"""Checking hand results: proofs, numeric consistency, mismatches with their diagnosis, truncated series."""
import time

import mpmath
import pytest
import sympy

import clusterexp
from clusterexp.products.checks import (CONSISTENT, MISMATCH, PROVEN, TIE, bounded, check_claim, check_decimal_claim,
                               decimal_places, truncate)
from clusterexp.errors import InputError, Span
from clusterexp.model import Parameter

SPAN = Span("<test>", 1, 1)
G = sympy.Symbol("g")  # a claim as a user would type it: no assumptions; matched to the parameter by name


def parameter(name, lower=None, upper=None, lower_open=False, upper_open=False, **assumptions):
    flags = {"real": True, **assumptions}
    return Parameter(name, sympy.Symbol(name, **flags), SPAN,
                     None if lower is None else sympy.sympify(lower),
                     None if upper is None else sympy.sympify(upper), lower_open, upper_open, tuple(sorted(flags)))


def lll_equation_of_state_virial(n, g):
    # Exclusion statistics g on one level, i.e. lowest-Landau-level anyons with exchange g:
    # beta P / rho_L = ln(1 + nu / (1 - g nu)) = ln(1 + (1 - g) nu) - ln(1 - g nu)
    # (Wu, PRL 73 (1994) 922; Dasnieres de Veigy & Ouvry, PRL 72 (1994) 600; from memory), hence
    # a_n = [(-1)^(n+1) (1 - g)^n + g^n] / n.
    return ((-1) ** (n + 1) * (1 - g) ** n + g ** n) / n


@pytest.fixture(scope="module")
def landau():
    return clusterexp.derive("dimension 2 parameter g in [0, 1] species A exchange g clusters landau "
                             "derive virial up to 5")


def test_published_lowest_landau_level_virials_are_proven(landau):
    for n in range(1, 6):
        result = check_claim(lll_equation_of_state_virial(n, G), landau.value("virial", (n,)),
                             landau.system.parameters, label=f"a[{n}]")
        assert result.status == PROVEN and result.ok, result.render()
        assert result.render().startswith(f"proven: a[{n}]")


def test_a_sign_slip_is_a_mismatch_with_its_leading_term_and_a_witness(landau):
    # the hand slip: + g^3 written as - g^3 in a_3; claimed - derived = -2 g^3 / 3 (by hand)
    claim = ((1 - G) ** 3 - G ** 3) / 3
    result = check_claim(claim, landau.value("virial", (3,)), landau.system.parameters, label="a[3]")
    assert result.status == MISMATCH and not result.ok
    g = landau.system.parameters[0].symbol
    assert sympy.expand(result.difference + sympy.Rational(2, 3) * g ** 3) == 0
    assert result.expansion_point == (("g", 0),)
    assert sympy.expand(result.leading_term + sympy.Rational(2, 3) * g ** 3) == 0
    (name, at), = result.witness
    assert name == "g" and 0 <= at <= 1
    # both values at the witness, recomputed from the two formulas by hand
    assert sympy.Rational(result.claimed_value) == ((1 - at) ** 3 - at ** 3) / 3
    assert sympy.Rational(result.derived_value) == ((1 - at) ** 3 + at ** 3) / 3
    text = result.render()
    assert "mismatch: a[3]" in text and "-2*g**3/3" in text and "about g = 0" in text


def test_leading_term_is_taken_about_the_lower_end_when_zero_is_outside_the_range():
    t, m = parameter("t", 0, 1), parameter("m", 1, 2)
    T, M = sympy.symbols("t m")
    result = check_claim(T ** 2 + T * (M - 1) ** 2, t.symbol ** 2, [t, m])
    assert result.status == MISMATCH
    assert dict(result.expansion_point) == {"m": 1, "t": 0}
    assert sympy.expand(result.leading_term - t.symbol * (m.symbol - 1) ** 2) == 0


def test_an_identity_simplify_cannot_prove_is_numerically_consistent_and_reproducible():
    # atan(x) + atan(1/x) = pi/2 for x > 0 (elementary; common practice)
    x = parameter("x", 0, None, lower_open=True, positive=True)
    X = sympy.Symbol("x")
    claim = sympy.atan(X) + sympy.atan(1 / X)
    first = check_claim(claim, sympy.pi / 2, [x])
    assert first.status == CONSISTENT and first.ok
    assert first.points == 20 and first.digits == 30
    assert "20 rational points" in first.render() and "not proven" in first.render()
    assert check_claim(claim, sympy.pi / 2, [x]) == first
    assert "default for a positive parameter" in first.intervals[0][1] or "(0, 3]" in first.intervals[0][1]


def test_a_tiny_difference_is_caught_numerically():
    x = parameter("x", 1, 2)
    X = sympy.Symbol("x")
    result = check_claim(sympy.atan(X) + sympy.atan(1 / X), sympy.pi / 2 + X ** 3 / 10 ** 12, [x])
    assert result.status == MISMATCH
    (name, at), = result.witness
    with mpmath.workdps(40):
        expected = -mpmath.mpf(at.p) ** 3 / mpmath.mpf(at.q) ** 3 / 10 ** 12
        shown = mpmath.mpf(result.claimed_value) - mpmath.mpf(result.derived_value)
        assert abs(shown - expected) < 1e-18


def test_dilogarithm_reflection_formula_is_consistent_on_the_open_unit_interval():
    # Li2(x) + Li2(1 - x) = pi^2/6 - ln(x) ln(1 - x), 0 < x < 1 (Euler; Lewin, Polylogarithms and
    # associated functions, 1981, from memory)
    x = parameter("x", 0, 1, lower_open=True, upper_open=True)
    X = sympy.Symbol("x")
    claim = sympy.polylog(2, X) + sympy.polylog(2, 1 - X)
    result = check_claim(claim, sympy.pi ** 2 / 6 - sympy.log(X) * sympy.log(1 - X), [x], digits=25)
    assert result.status == CONSISTENT and result.skipped == 0
    wrong = check_claim(claim, sympy.pi ** 2 / 6 + sympy.log(X) * sympy.log(1 - X), [x], digits=25)
    assert wrong.status == MISMATCH


def test_closed_ends_are_sampled_and_singular_points_skipped():
    X = sympy.Symbol("x")
    closed = check_claim(1 / X, 1 / X, [parameter("x", 0, 1)], symbolic=False)
    assert closed.status == CONSISTENT and closed.points == 20 and closed.skipped == 1
    half_open = check_claim(1 / X, 1 / X, [parameter("x", 0, 1, lower_open=True, positive=True)], symbolic=False)
    assert half_open.points == 20 and half_open.skipped == 0
    assert "singular point skipped" in closed.render()


def test_integer_parameters_with_few_values_are_checked_exhaustively():
    n = parameter("n", 0, 3, integer=True)
    N = sympy.Symbol("n")
    # n(n-1)(n-2)(n-3) vanishes at n = 0, 1, 2, 3 (and nowhere else on the integers)
    result = check_claim(N * (N - 1) * (N - 2) * (N - 3), sympy.Integer(0), [n])
    assert result.status == CONSISTENT and result.points == 4
    assert "all the (integer) points" in result.render()
    assert check_claim(N * (N - 1) * (N - 2), sympy.Integer(0), [n]).status == MISMATCH


def test_numbers_are_proven_through_their_minimal_polynomial_or_refuted():
    # sqrt(5 + 2 sqrt 6) = sqrt 2 + sqrt 3 (square both sides)
    assert check_claim(sympy.sqrt(2) + sympy.sqrt(3), sympy.sqrt(5 + 2 * sympy.sqrt(6))).status == PROVEN
    close = check_claim(sympy.pi, sympy.Rational(355, 113))  # |pi - 355/113| ~ 2.7e-7
    assert close.status == MISMATCH and close.claimed_value.startswith("3.14159265358979323")


def test_truncated_claims_compare_only_through_the_order():
    g = parameter("g", 0, 1)
    derived = 1 / (1 - g.symbol)  # geometric series 1 + g + g^2 + ...
    assert check_claim(1 + G + G ** 2, derived, [g], up_to_order=2, in_parameters=["g"]).status == PROVEN
    assert check_claim(1 + G + G ** 2 + 5 * G ** 3, derived, [g], up_to_order=2, in_parameters=["g"]).status == PROVEN
    wrong = check_claim(1 + G + 2 * G ** 2, derived, [g], up_to_order=2, in_parameters=["g"])
    assert wrong.status == MISMATCH
    assert sympy.expand(wrong.difference - g.symbol ** 2) == 0
    assert "through total order 2 in g" in wrong.render()
    # without truncation the same claim is wrong
    assert check_claim(1 + G + G ** 2, derived, [g]).status == MISMATCH


def test_truncation_by_total_order_in_two_parameters():
    g, h = parameter("g", 0, 1), parameter("h", 0, 1)
    exact = sympy.exp(g.symbol + h.symbol) * (1 + sympy.Symbol("c"))
    # exp(g + h) = 1 + (g + h) + (g + h)^2/2 + ...
    series = truncate(sympy.exp(g.symbol + h.symbol), [g.symbol, h.symbol], 2)
    assert sympy.expand(series - (1 + g.symbol + h.symbol + (g.symbol + h.symbol) ** 2 / 2)) == 0
    H = sympy.Symbol("h")
    claim = 1 + G + H + G * H
    result = check_claim(claim, sympy.exp(g.symbol + h.symbol), [g, h], up_to_order=1, in_parameters=["g", "h"])
    assert result.status == PROVEN
    assert check_claim(claim, sympy.exp(g.symbol + h.symbol), [g, h], up_to_order=2,
                       in_parameters=["g", "h"]).status == MISMATCH
    assert exact.free_symbols  # the helper keeps other symbols as they are


def test_a_value_that_is_not_a_power_series_is_refused():
    g = parameter("g", 0, 1, nonnegative=True)
    with pytest.raises(InputError, match="not a power series"):
        check_claim(G, sympy.sqrt(g.symbol), [g], up_to_order=2, in_parameters=["g"])
    with pytest.raises(InputError, match="pole"):
        check_claim(G, 1 / g.symbol, [g], up_to_order=2, in_parameters=["g"])


def test_bad_claims_are_refused_with_what_they_depend_on():
    g = parameter("g", 0, 1)
    with pytest.raises(InputError, match=r"the claim uses gg, .*depends on g"):
        check_claim(sympy.Symbol("gg"), g.symbol, [g])
    with pytest.raises(InputError, match="exact fraction"):
        check_claim(sympy.Float("0.5") * G, g.symbol / 2, [g])
    with pytest.raises(InputError, match="cannot expand in nu"):
        check_claim(G, g.symbol, [g], up_to_order=1, in_parameters=["nu"])
    with pytest.raises(InputError, match="both up_to_order and in_parameters"):
        check_claim(G, g.symbol, [g], up_to_order=1)


def test_undeclared_symbols_are_sampled_in_a_default_interval_and_said_so():
    b2 = sympy.Symbol("b_2")
    result = check_claim(sympy.sqrt(b2 ** 2 + 1) ** 2, b2 ** 2 + 1, [], symbolic=False)
    assert result.status == CONSISTENT
    assert "b_2 is not a declared parameter; sampled in [-3, 3]" in result.render()


def test_bounded_effort_gives_up_in_time():
    start = time.monotonic()
    assert bounded(lambda: time.sleep(5) or "finished", 0.2) is None
    assert time.monotonic() - start < 2
    assert bounded(lambda: "finished", 1.0) == "finished"


def test_latex_display_of_a_result(landau):
    result = check_claim(lll_equation_of_state_virial(2, G), landau.value("virial", (2,)), landau.system.parameters)
    assert result._repr_latex_().startswith("$$\\text{proven}")


def test_decimal_places_of_written_numbers():
    # (significant digits, exponent of the last written digit), by the usual reading of a decimal
    assert decimal_places("-0.0033001") == (5, -7)
    assert decimal_places("-3.3001e-3") == (5, -7)
    assert decimal_places("1E+2") == (1, 2)
    assert decimal_places("120.") == (3, 0)
    assert decimal_places("0.250") == (3, -3)


def test_decimal_claims_are_decided_exactly_at_the_rounding_boundary():
    # 0.2 rounds everything in [0.15, 0.25]; 1/4 -+ sqrt(2) 10^-45 lies just inside / just outside,
    # far below any fixed working precision of 30 digits
    quarter, tiny = sympy.Rational(1, 4), sympy.sqrt(2) / sympy.Integer(10) ** 45
    assert check_decimal_claim("0.2", quarter - tiny).status == CONSISTENT
    assert check_decimal_claim("0.2", quarter + tiny).status == MISMATCH
    assert check_decimal_claim("0.3", quarter + tiny).status == CONSISTENT
    # exactly on the boundary: a rounding tie, neither consistent nor refuted (and not a failure)
    for text in ("0.2", "0.3"):
        result = check_decimal_claim(text, quarter)
        assert result.status == TIE and result.ok and "exactly halfway between 0.2 and 0.3" in result.method


def test_decimal_claims_of_non_real_exact_and_singular_values():
    # a complex number is not the rounding of a real decimal, however small its imaginary part
    result = check_decimal_claim("0.25", sympy.Rational(1, 4) + sympy.I / 1000)
    assert result.status == MISMATCH and "is not real" in result.method
    # the exact value in another form is proven ((sqrt 2 + 1)(sqrt 2 - 1) = 1)
    assert check_decimal_claim("0.25", (sympy.sqrt(2) + 1) * (sympy.sqrt(2) - 1) / 4).status == PROVEN
    with pytest.raises(InputError, match="derived value is zoo"):
        check_decimal_claim("0.5", sympy.zoo, label="a[3]")


def test_a_decimal_claim_on_a_rounding_tie_says_so(cli):
    """a_2(1/2) = 1/8 [Arovas, Schrieffer, Wilczek, Zee, Nucl. Phys. B 251 (1985) 117] lies halfway between
    0.12 and 0.13: both claims are reported as a tie (exit 0, a note on stderr), 0.125 is proven and 0.11
    refuted."""
    base = "dimension 2 species A exchange 1/2 clusters pairphase derive virial up to 2 "
    for claim in ("0.12", "0.13"):
        result = cli("run", "-e", base + f"claim a[2] = {claim}", "--no-files")
        assert result.returncode == 0
        assert "rounding tie, neither consistent nor refuted: a[2]" in result.stdout
        assert "halfway between 0.12 and 0.13" in result.stdout
        assert "check undecided: a[2] is a rounding tie" in result.stderr
    assert cli("run", "-e", base + "claim a[2] = 0.125", "--no-files").returncode == 0
    assert cli("run", "-e", base + "claim a[2] = 0.11", "--no-files").returncode == 1


def test_check_display_names_the_coefficient_and_uses_typeset_names():
    d = clusterexp.derive('dimension 2 parameter nu in [0, 1] species A exchange 1/2 species B mutual A B = nu '
                          'clusters pairphase typeset nu as "\\nu_{AB}" typeset A as "\\mathrm{a}" '
                          'claim a[1,1] = nu - nu^2 claim a[1,1] = nu claim a[2,0] = 0.12')
    proven, wrong, tie = d.checks
    assert proven._repr_latex_() == r"$$\text{proven}:\; a_{\mathrm{a} B} = - \nu_{AB}^{2} + \nu_{AB}$$"
    assert r"a_{\mathrm{a} B}:\ \nu_{AB}\neq" in wrong._repr_latex_() and r"\Delta = \nu_{AB}^{2}" in wrong._repr_latex_()
    assert r"a_{\mathrm{a}^{2}} = \frac{1}{8}" in tie._repr_latex_() and "rounding tie" in tie._repr_latex_()
    # a list of checks reads as text and as LaTeX, not as a dataclass repr
    assert repr(d.checks).splitlines()[0] == "proven: a[1,1] equals the derived value (by expansion)"
    assert "CheckResult(" not in repr(d.checks) and repr(proven).startswith("<CheckResult proven: a[1,1]")
    assert d.checks._repr_latex_().count(r"\text{") >= 3 and r"\begin{gathered}" in d.checks._repr_latex_()
