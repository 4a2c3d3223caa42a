"""The tube pieces through second order about zero flux (routes/tube_perturbative.py; docs/tubes.md,
"Small fluxes from an infinitely heavy species"): the mixtures of the perturbative route with one species
made infinitely heavy, annealed average turned quenched.

Outside references: the exact one-tube shift of one loop, -s(1 - s)/2, s = flux mod 1 (Aharonov-Bohm;
Comtet, Georgelin, Ouvry, J. Phys. A 22 (1989) 3917, attributed from memory in physics.md), which gives
the anyon piece exactly at the bose and fermi points (+-F/2, docs/tubes.md (ii)); the exact anyon b_2 =
1/4 - |alpha| + alpha^2/2 (Arovas, Schrieffer, Wilczek, Zee, Nucl. Phys. B 251 (1985) 117) through the
contact law of docs/tubes.md (ii), derived there from the loops, not from this route; the small-flux
T2 = |g1||g2|/4 - g1 g2/12 of docs/tubes.md (i), derived from the loops' winding areas (k^2 S_k -> const,
Werner 1994, from memory) and Levy's area law; and the sampled loops of `loops.tube_estimates`, which
know nothing of the perturbative route.
"""
import json

import pytest
import sympy

from clusterexp.loops.tube_estimates import flux_parts, limit_at_zero
from clusterexp.routes.tube_perturbative import EXCHANGE as e
from clusterexp.routes.tube_perturbative import FLUX as f
from clusterexp.routes.tube_perturbative import MUTUAL as d
from clusterexp.routes.tube_perturbative import tube_coefficients


def _one_tube_shift_from_above():
    """F = -s(1 - s)/2 with s = f > 0 small: the exact Aharonov-Bohm shift of one loop."""
    return sympy.expand(-f * (1 - f) / 2)


def test_two_tubes_is_the_loops_small_flux_law():
    """T2(f, f) = |f||f|/4 - f f/12 = f^2/6 (docs/tubes.md (i): the contact of each tube times the other,
    minus the variance of the loop's Levy area 4 pi^2/(48 pi^2)); independent of the mobile mass (the
    piece is defined per loop of duration beta)."""
    assert tube_coefficients("two_tubes") == {f ** 2: sympy.Rational(1, 4) - sympy.Rational(1, 12)}
    assert tube_coefficients("two_tubes", masses=(sympy.Rational(7, 3), 1)) == {f ** 2: sympy.Rational(1, 6)}
    assert tube_coefficients("two_tubes", order=1) == {}


@pytest.mark.parametrize("about, sign", [("boson", 1), ("fermion", -1)])
def test_anyon_piece_at_the_bose_and_fermi_points_is_the_exact_one_tube_law(about, sign):
    """At e = 0 the anyon piece is +-F/2 for every flux (docs/tubes.md (ii): the 2-cycle's one-tube
    shift), so its |f| and f^2 coefficients are -+1/4 and +-1/4. The f^2 one checks the quenched
    correction: the heavy species' mixture alone (annealed) gives 3/8 about bosons, not 1/4."""
    terms = tube_coefficients("anyon", about)
    at_point = {m: v for m, v in terms.items() if not m.has(e)}
    exact = sympy.expand(sign * _one_tube_shift_from_above() / 2)
    assert sum(v * m.subs(sympy.Abs(f), f) for m, v in at_point.items()) == exact
    assert terms[f ** 2] == sign * sympy.Rational(1, 4)


@pytest.mark.parametrize("masses", [(1, 1), (sympy.Rational(5, 2), 1), (3, 7)])
def test_anyon_piece_does_not_depend_on_the_mass(masses):
    """docs/tubes.md (ii): one tube area integral cancels one thermal area; the coefficients of the
    mixture limit are the same for every mass of the anyons."""
    assert tube_coefficients("anyon", "boson", masses) == tube_coefficients("anyon", "boson")
    assert tube_coefficients("anyon", "fermion", masses) == tube_coefficients("anyon", "fermion")


def test_contact_law_of_the_even_part():
    """docs/tubes.md (ii), small flux: the part even in the flux is -|f| b_2(alpha) + O(f^2), b_2 the exact
    two-body coefficient (Arovas et al. 1985): -|f|/4 + |alpha||f| about bosons, +|f|/4 about fermions
    (b_2 = -1/4 + e^2/2 there, no |e|); the braid piece's is -|f| b_11 = |d||f| for equal masses."""
    bose, fermi, braid = (tube_coefficients("anyon", "boson"), tube_coefficients("anyon", "fermion"),
                          tube_coefficients("braid"))
    assert bose[sympy.Abs(f)] == -sympy.Rational(1, 4) and bose[sympy.Abs(e) * sympy.Abs(f)] == 1
    assert fermi[sympy.Abs(f)] == sympy.Rational(1, 4) and sympy.Abs(e) * sympy.Abs(f) not in fermi
    assert braid[sympy.Abs(d) * sympy.Abs(f)] == 1


def test_braid_piece_depends_on_the_mass_ratio_alone_and_has_no_flux_square():
    """The braid piece is a function of m_A/m_B only (docs/tubes.md (ii)); its |d||f| coefficient is
    (m_A + m_B)^2/(4 m_A m_B) (the two rings through the pair's contact); f^2 would need the chain A - tube
    - B, which is exactly the annealed-only term s_A s_B: zero after the quenched correction (a
    consistency check of the correction, not an outside value)."""
    two, four = tube_coefficients("braid", masses=(2, 1)), tube_coefficients("braid", masses=(4, 2))
    assert two == four
    assert two[sympy.Abs(d) * sympy.Abs(f)] == sympy.Rational(9, 8)
    assert f ** 2 not in tube_coefficients("braid")


@pytest.mark.parametrize("cycle, about, masses", [((2, 1), "boson", (1, 1)), ((1, 2), "fermion", (1, 1)),
                                                  ((3, 2), ("boson", "fermion"), (1, 1)), ((2, 2), "fermion", (1, 1)),
                                                  ((2, 1), "boson", (2, 1)), ((3, 1), ("fermion", "boson"), (sympy.Rational(1, 3), 5))])
def test_mixed_coverage_parts_follow_the_contact_law(cycle, about, masses):
    """The coverage part of b_{a e_A + b e_B} of two braiding species through second order (the braid kind
    with cycle (a, b)).  Two outside laws fix all but its d f term:
    (1) species that do not braid have no mixed b at fixed tubes (ln Xi is the sum of the two species'
        own), so at d = 0 the part vanishes for every flux: no |f|, f or f^2 term.  The f^2 term of the
        annealed limit is the chain A - tube - B, which the quenched correction s_a s_b (the exact one-tube
        law, Comtet, Georgelin, Ouvry 1989, from memory) must cancel for every (a, b) and both points;
    (2) the contact law of docs/tubes.md (ii) (from the loops' winding areas: a loop of duration l of mass
        ratio r gains -|f| l/(2 r) at leading order, a shift of the chemical potentials) times the
        first-order b_{a,b} = -sigma |d| (m_A + m_B)/(2 a b) (no first-order term in the mixed virial
        coefficients, docs/perturbative.md section 3) gives the |d||f| coefficient
        sigma (a/m_A + b/m_B)(m_A + m_B)/(4 a b), sigma the fermions' (-1)^(a+1), (-1)^(b+1)."""
    a, b = cycle
    points = (about, about) if isinstance(about, str) else about
    sigma = 1
    for point, k in zip(points, cycle):
        sigma *= (-1) ** (k + 1) if point == "fermion" else 1
    mA, mB = (sympy.Rational(m) for m in masses)
    terms = tube_coefficients("braid", about, masses, cycle=cycle)
    assert set(terms) <= {sympy.Abs(d) * sympy.Abs(f), d * f}, terms
    assert terms[sympy.Abs(d) * sympy.Abs(f)] == sigma * (a / mA + b / mB) * (mA + mB) / (4 * a * b)
    assert terms[d * f] != 0


@pytest.mark.parametrize("a, about, sign", [(1, "boson", 1), (2, "boson", 1), (3, "boson", 1), (2, "fermion", -1)])
def test_mixed_coverage_part_with_a_static_partner_is_the_two_tube_law(a, about, sign):
    """With B infinitely heavy, B is a second static flux d for A's a-cycle: per particle of B
    (b_{e_B} = m_B/m_ref) the coverage part of b_{a,1} tends to the connected integral of one loop and two
    distinct tubes, the small-flux law T2(d, f) = |d||f|/4 - d f/12 of docs/tubes.md (i) (the loops' winding
    areas and Levy's area law, not this route), the same for every cycle length (the a-cycle's weight 1/a^2
    times its areas squared a^2), signed (-1)^(a+1) for fermions.  This checks the d f coefficient, which
    the contact law does not reach.  The approach is exact in 1/m_B; at m_B = 10^4 the ratio is within 1e-4."""
    big = 10 ** 4
    terms = tube_coefficients("braid", (about, "boson"), (1, big), cycle=(a, 1))
    assert abs(float(terms[d * f]) / big + sign / 12) < 1e-4
    assert abs(float(terms[sympy.Abs(d) * sympy.Abs(f)]) / big - sign / 4) < 1e-4


def test_the_first_mixed_coverage_part_is_the_braid_piece():
    """cycle (1, 1) is B_braid_tube itself (checked against sampled loops below); the points of single
    particles do not matter."""
    assert tube_coefficients("braid", "fermion", cycle=(1, 1)) == tube_coefficients("braid")
    assert tube_coefficients("braid", ("boson", "fermion"), (3, 2), cycle=(1, 1)) == tube_coefficients("braid", masses=(3, 2))
    with pytest.raises(ValueError):
        tube_coefficients("braid", cycle=(0, 1))
    with pytest.raises(ValueError):
        tube_coefficients("two_tubes", cycle=2)


MIXED_GAS = """dimension 2
parameter f real
parameter nu real
parameter n nonnegative
species A {stat}
species B bose
mutual A B = nu
tubes flux f coverage n
clusters pairphase
derive cluster up to 3
expand nu, f about 0, 0 to 2 from above
"""


@pytest.mark.parametrize("stat, sign", [("bose", 1), ("fermi", -1)])
def test_expand_among_tubes_derives_the_mixed_coverage_parts(cli, tmp_path, stat, sign):
    """b[2,1] of two species among tubes about (nu, f) = (0, 0+): the coverage part +-(3/4 - 1/8) nu f (the
    contact law's 3/4 above, the chain's -1/8), with no coefficient left named; its zero-coverage part is
    the tube-free b_21 = -+nu/2 + ... (test_joint_series.py)."""
    path = tmp_path / "gas.in"
    path.write_text(MIXED_GAS.format(stat=stat))
    result = cli("run", str(path), "--format", "json", "--no-files")
    assert result.returncode == 0, result.stderr
    document = json.loads(result.stdout)
    (b21,) = [c for c in document["coefficients"] if c["kind"] == "cluster" and tuple(c["index"]) == (2, 1)]
    text = b21["series"][0]["value"]
    nu, fx, n = sympy.symbols("nu f n", real=True)
    poly = sympy.expand(sympy.sympify(text.split(" + O(")[0], locals={"nu": nu, "f": fx, "n": n}))
    assert poly.coeff(n, 1) == sign * sympy.Rational(5, 8) * nu * fx, text
    assert "b_2_1_n_1_" not in json.dumps(document), "a mixed coverage coefficient left named"


@pytest.mark.parametrize("kind, about, base", [("anyon", "boson", 0.0), ("anyon", "fermion", 1.0),
                                               ("braid", "boson", 0.0)])
def test_sampled_loops_confirm_the_second_order(kind, about, base):
    """Independent route: sampled loops (loops.tube_estimates, 16 slices) at parameter base + h, flux +-h,
    h = 0.2, 0.1, 0.05 (`flux_parts`: both signs on the same loops, bars from the per-batch parts). The
    part odd in the flux is c h^2 + O(h^3), the even part c1 h + c2 h^2 + O(h^3) with c1 the contact law's
    -+1/4 (0 for the braid piece); X = (part - c1 h)/h^2 is extrapolated to h = 0 through the three steps
    (`limit_at_zero`: the remainders a h + b h^2 removed; with two steps and a h alone the bosons' odd
    parts came out 0.02 off, 5 bars at 400/800 batches, benchmarks/tube_small_flux-last-run.txt). The
    route's odd coefficients: -1/3 (anyons about bosons: the Landau chain -1/12 and the angle-area part
    -1/4 of the 2-cycle around the tube), +1/6 (about fermions), -1/6 (braid); the even ones 5/4, -1/4,
    1. The odd part's bar is small (the two signs share their loops), the even part's is not."""
    terms = tube_coefficients(kind, about)
    x = e if kind == "anyon" else d
    odd_c = terms.get(x * f, 0)
    first = terms.get(sympy.Abs(f), 0)
    even_c = terms.get(sympy.Abs(x) * sympy.Abs(f), 0) + terms.get(f ** 2, 0)
    sampler = "identical" if kind == "anyon" else "distinct"
    steps = ((0.2, 40), (0.1, 80), (0.05, 160))
    parts = {h: flux_parts(sampler, base, h, rounds, seed=23) for h, rounds in steps}
    hs = [h for h, _ in steps]
    for which, c1, expected, sharp in ((0, 0, odd_c, 0.04), (1, first, even_c, 0.25)):
        X = [(parts[h][which].value - float(c1) * h) / h ** 2 for h in hs]
        bars = [parts[h][which].error / h ** 2 for h in hs]
        limit = limit_at_zero(hs, X, bars)
        assert abs(limit.value - float(expected)) < 3 * limit.error, (which, limit, expected)
        assert limit.error < sharp, limit   # sharp enough to tell the route's coefficient from 0 and its neighbours


GAS = """dimension 2
parameter f real
parameter alpha real
parameter n nonnegative
species T exchange alpha
tubes flux f coverage n
clusters pairphase
derive cluster up to 3
expand alpha, f about 0, 0 to 2 from above
"""


def test_expand_among_tubes_uses_the_derived_coefficients(cli, tmp_path):
    """The joint series about (alpha, f) = (0, 0+) of anyons among tubes: b[2] = the exact b_2 (Arovas et
    al. 1985) plus n times the anyon piece, whose coefficients here are summed by hand from the pieces'
    table (|alpha||f| and alpha f both alpha f from above: 1 - 1/3); and b[3] at zero coverage is the
    tube-free b_3 = 1/9 - alpha + 59/24 alpha^2 (Myrheim & Olaussen, Phys. Lett. B 299 (1993) 267, via
    a_3 = 1/36 + alpha^2/12), with no flux-dependent unknown named for it; its coverage part is derived
    too, and at alpha = 0 it is the bose law F/3 (Comtet, Georgelin, Ouvry 1989, from memory)."""
    path = tmp_path / "gas.in"
    path.write_text(GAS)
    result = cli("run", str(path), "--format", "json", "--no-files")
    assert result.returncode == 0, result.stderr
    document = json.loads(result.stdout)
    series = {tuple(c["index"]): c["series"][0]["value"] for c in document["coefficients"] if c["kind"] == "cluster"}
    alpha, fx, n = sympy.symbols("alpha f n", real=True)

    def polynomial(text):
        return sympy.expand(sympy.sympify(text.split(" + O(")[0], locals={"alpha": alpha, "f": fx, "n": n}))
    b2 = sympy.Rational(1, 4) - alpha + alpha ** 2 / 2 + n * (-fx / 4 + fx ** 2 / 4 + sympy.Rational(2, 3) * alpha * fx)
    assert polynomial(series[(2,)]) == sympy.expand(b2)
    b3 = polynomial(series[(3,)])
    at_zero = b3.subs(n, 0)
    assert at_zero == sympy.Rational(1, 9) - alpha + sympy.Rational(59, 24) * alpha ** 2
    assert b3.coeff(n, 1).subs(alpha, 0) == sympy.expand(-fx * (1 - fx) / 2 / 3)   # bosons: F/3 per tube
    names = set(document["unknowns"])
    assert not any(name.startswith(("b_3_n_0_", "b_3_n_1_")) for name in names), names


@pytest.mark.parametrize("cycle", [2, 3, 4, 5, 6])
@pytest.mark.parametrize("about, sign", [("boson", 1), ("fermion", -1)])
def test_coverage_part_of_b_l_at_the_bose_and_fermi_points(cycle, about, sign):
    """An ideal species among tubes: b_l gains (+-1)^(l+1) n F/l, F = -|f|(1 - |f|)/2, for every flux
    (each l-cycle is one loop around each tube; Comtet, Georgelin, Ouvry 1989 for F, from memory in
    physics.md). The e = 0 part of the coverage part of b_l of the anyons must be its expansion: the
    static limit of the l-cycle with the heavy loop, the chains anyon-cycle - tube - anyon-cycle and the
    quenched correction (1/2) sum s_a s_b, which cancel, must leave exactly that. l = 2 is the piece
    B_anyon_tube itself. The anyons' mass does not enter."""
    terms = tube_coefficients("anyon", about, cycle=cycle)
    at_point = sum(v * m.subs(sympy.Abs(f), f) for m, v in terms.items() if not m.has(e))
    exact = sympy.expand(sign ** (cycle + 1) * _one_tube_shift_from_above() / cycle)
    assert sympy.expand(at_point) == exact
    assert tube_coefficients("anyon", about, (sympy.Rational(3, 2), 1), cycle=cycle) == terms


def test_coverage_part_contact_term_follows_the_first_order_of_b_l():
    """The |e||f| coefficient of the coverage part of b_l about bosons is H_{l-1} (1, 3/2, 11/6, 25/12),
    i.e. -(l/2) times the |alpha| coefficient -(2/l) H_{l-1} of b_l (first order, Dasnieres de Veigy &
    Ouvry, Nucl. Phys. B 388 (1992) 715): at l = 2 the contact law -|f| b_2 of docs/tubes.md (ii), derived
    from the loops; for l >= 3 a consistency pattern of the route (the ring through the tube's contact and
    the anyons' contact), not an outside value."""
    for cycle in range(2, 7):
        harmonic = sum(sympy.Rational(1, k) for k in range(1, cycle))
        assert tube_coefficients("anyon", "boson", cycle=cycle)[sympy.Abs(e) * sympy.Abs(f)] == harmonic


EVALUATIONS = """evaluate b[3] at alpha = 1/100, f = 0, n = 1/10
evaluate b[3] at alpha = 1/100, f = 1/50, n = 0
evaluate b[3] at alpha = 1/100, f = 1/50, n = 1/10
evaluate b[2] at alpha = 1/100, f = 1/50, n = 1/20
"""


def _values(cli, tmp_path, text):
    path = tmp_path / "gas.in"
    path.write_text(text)
    result = cli("run", str(path), "--format", "json", "--no-files")
    assert result.returncode == 0, result.stderr
    return json.loads(result.stdout)


def test_evaluate_near_the_joint_point_uses_the_series(cli, tmp_path):
    """Near (alpha, f) = (0, 0+) the value comes from the truncated joint series, labelled so.  Without
    tubes (n = 0) or at zero flux, b_3 = 1/9 - alpha + 59/24 alpha^2 through second order (Myrheim &
    Olaussen, Phys. Lett. B 299 (1993) 267, via a_3 = 1/36 + alpha^2/12); with both, the series adds n
    times the coverage part -f/6 + f^2/6 + (3/2)|alpha||f| - (11/24) alpha f (docs/tubes.md (iii); its
    alpha = 0 part is the bose law F/3, F = -f(1 - f)/2, tested in test_tube_perturbative.py)."""
    document = _values(cli, tmp_path, GAS + EVALUATIONS)
    f, n, a = sympy.Rational(1, 50), sympy.Rational(1, 10), sympy.Rational(1, 100)
    free = sympy.Rational(1, 9) - a + sympy.Rational(59, 24) * a ** 2
    coverage = -f / 6 + f ** 2 / 6 + sympy.Rational(3, 2) * a * f - sympy.Rational(11, 24) * a * f
    # b[2] holds the tube piece B_anyon_tube itself (no `sample` for it): the series, not a refusal.
    # Exact b_2 (Arovas et al. 1985) plus n times -|f|/4 + f^2/4 + |alpha||f| - alpha f/3 (the table above)
    b2 = (sympy.Rational(1, 4) - a + a ** 2 / 2
          + n / 2 * (-f / 4 + f ** 2 / 4 + a * f - a * f / 3))
    for block, exact in zip(document["values"], [free, free, free + n * coverage, b2]):
        (label, number), = block["values"].items()
        assert "truncated joint series about (alpha, f) = (0, 0)" in label, label
        assert "terms of total degree 3 left out" in label, label
        assert abs(float(number) - float(exact)) < 1e-13, (label, number, float(exact))
    assert len(document["values"]) == 4


def test_a_point_on_the_wrong_side_is_not_taken_from_the_series(cli, tmp_path):
    """The series is one-sided in f (from above): at f < 0 it says nothing, and the named pieces have no
    value there, so `evaluate` refuses at the user's line."""
    path = tmp_path / "gas.in"
    path.write_text((GAS + EVALUATIONS).replace("f = 1/50, n = 1/10", "f = -1/50, n = 1/10"))
    result = cli("run", str(path), "--no-files")
    assert result.returncode == 2, result.stdout
    assert "gas.in:12:1" in result.stderr and "no value for b_3_n_0" in result.stderr, result.stderr
    assert "Traceback" not in result.stderr
