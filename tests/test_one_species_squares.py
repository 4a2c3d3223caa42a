"""Second-order Taylor coefficients of b_n of one species, n >= 4, about the boson and fermion points:
exact (the chains, the two-loop clusters in closed form, docs/perturbative.md 4k, and the n-cycle alone,
summed exactly, 4l); the quadrature table of the clusters (clusterexp/routes/two_loop_table.py) is the
independent route for the clusters, the quadrature of the pairs (routes/cycle_alone.py) for the n-cycle
(tests/test_cycle_square.py).

The bookkeeping (chains of three loops, exact, plus the two-loop clusters beyond them, with the sign
(-1)^n about fermions) is checked at n = 3 against the published a_3; the table's n = 4 entries against
the sampled-loop route (tests/test_two_loop_monte_carlo.py) and against the engine that produced them."""
import json
import subprocess
import sys

import pytest
import sympy

from clusterexp.routes import two_loop_table
from clusterexp.routes.perturbative import Species, chain_part, taylor_coefficients

E = sympy.Symbol("e", real=True)
ROOT3 = sympy.sqrt(3) / 144 * sympy.log(2 + sympy.sqrt(3))
A4 = sympy.Rational(1, 16) + sympy.sqrt(3) / 48 * sympy.log(2 + sympy.sqrt(3))   # a_4^(2) about bosons


def _b_square(n, about, beyond):
    """The e^2 coefficient of b_n of one species of unit mass: the chains plus the two-loop clusters."""
    chains = chain_part([Species(E)], {}, (n,), about)[E ** 2]
    return float(chains) + (1 if about == "boson" else (-1) ** n) * beyond


def test_the_bookkeeping_gives_the_published_third_virial_coefficient():
    """At n = 3 the only two-loop cluster is {2-cycle, loop}, whose part beyond the chains is 1/2
    (section 4e, and the engine at n = 3). The same formula as for n >= 4 must then give b_3^(2) = 59/24
    about bosons and -13/24 about fermions, i.e. a_3 = 1/36 + alpha^2/12 and 1/36 + (1 - alpha)^2/12
    with the exact b_2 (Myrheim & Olaussen, Phys. Lett. B 299 (1993) 267; Arovas, Schrieffer, Wilczek &
    Zee 1985): this checks the chains and the sign (-1)^n of a two-loop cluster about fermions."""
    # b_2 = 1/4 - |e| + e^2/2 about bosons, -1/4 + e^2/2 about fermions (e = alpha - 1)
    for about, b2, b2_first in (("boson", 0.25, -1.0), ("fermion", -0.25, 0.0)):
        b3 = _b_square(3, about, 0.5)
        # a_3 = 4 b_2^2 - 2 b_3: its e^2 coefficient
        a3_square = 4 * (b2_first ** 2 + 2 * b2 * 0.5) - 2 * b3
        assert abs(a3_square - 1 / 12) < 1e-12, (about, b3, a3_square)


@pytest.mark.parametrize("about", ["boson", "fermion"])
def test_b4_square_in_closed_form_against_the_table(about):
    """b_4's e^2 coefficient of one species is 35/8 - (sqrt 3/144) ln(2 + sqrt 3) about bosons, 13/24 -
    (sqrt 3/144) ln(2 + sqrt 3) about fermions (docs 4k, 4l), times the mass. Checked against the
    quadrature table (the engine of 4f, another route for the clusters: 4.359161 and 0.525828) within its
    bound, the 4-cycle alone there at its ring part (its quadrature, docs 4h). The outside checks of the
    bookkeeping are the n = 3 test above and the sampled loops of tests/test_two_loop_monte_carlo.py."""
    beyond, bound = two_loop_table.beyond_the_chains(4)
    table = _b_square(4, about, beyond)
    closed = (sympy.Rational(35, 8) if about == "boson" else sympy.Rational(13, 24)) - ROOT3
    for mass in (1, 3):
        derived = taylor_coefficients([Species(E, mass)], {}, (4,), about)[E ** 2]
        assert sympy.simplify(derived - mass * closed) == 0, derived
        assert abs(float(derived) - mass * table) < mass * bound + 1e-12
    assert abs(table - (4.359161 if about == "boson" else 0.525828)) < 2e-5


# b_n^(2) about bosons as a former on-demand quadrature route printed it before n = 9, 10 were tabled
# (2026-12-04): the quadrature's own angle-area parts at the tolerance rules (1e-6, 1e-7), each +- 1e-5
ON_DEMAND = {9: 11.631019, 10: 12.769130}


@pytest.mark.parametrize("n", [7, 8, 9, 10])
def test_b7_to_b10_square_in_closed_form_against_the_table(n):
    """b_n's e^2 coefficient at n = 7 .. 10 (chains and the clusters in closed form, section 4k, the n-cycle
    alone, 4l) against the chains plus every cluster {p, n - p} of the quadrature table (the vectorised
    engine's entries, section 4h), sign (-1)^n about fermions: two routes for the clusters. The outside
    checks of the engine are tests/test_two_loop_fast.py (exact
    {2-cycle, loop} values, equal and unequal masses, and the scalar engine's n = 4 entry), of the
    n-cycle alone its Fock-squared ring part (routes/cycle_alone.py, docs 4h), and of the table the
    observed sum rule (test_two_loop_fast.py). n = 9, 10 also against the on-demand route's earlier run
    (another path through the same engine: its quadrature angle-area parts, coarser rules; reproducibility,
    not an outside value)."""
    beyond, bound = two_loop_table.beyond_the_chains(n)
    for about in ("boson", "fermion"):
        known = taylor_coefficients([Species(E)], {}, (n,), about)[E ** 2]
        assert abs(float(known) - _b_square(n, about, beyond)) < bound + 1e-12
        if about == "boson" and n in ON_DEMAND:
            assert abs(float(known) - ON_DEMAND[n]) < 1e-5 + bound, (n, known)


def test_expand_prints_closed_forms_through_the_eighth_virial_coefficient():
    """`virial up to 8` with `expand alpha about 0 to 2`: every a[n] gets its series in closed form, nothing
    named (every b_n through alpha^2 is derived, docs 4k, 4l); a[4]'s coefficient is the table's 0.11002162477
    of section 4h (the quadrature engine of 4f: another route for the clusters)."""
    out = _run(ONE_SPECIES.replace("virial up to 4", "virial up to 8") + "expand alpha about 0 to 2")
    assert out.returncode == 0, out.stderr
    assert "unknown Taylor coefficients" not in out.stdout and "_rest" not in out.stdout
    lines = out.stdout.splitlines()
    for n in range(3, 9):
        at = next(i for i, x in enumerate(lines) if x.strip().startswith(f"a[{n}] ="))
        series = lines[at + 1].split("): ", 1)[1]
        assert series.endswith("+ O(alpha**3)") and "b_" not in series, series
    assert float(A4) == pytest.approx(0.11002162477, abs=1e-10)


def test_two_equal_cycles_count_twice_and_carry_their_bounds():
    """n_i = n_j: the two-species cluster of two 2-cycles has twice the first order of the one-species
    {2-cycle, 2-cycle} (-|d|/4 against -1/8), so twice its link squared: the closed form (section 4k)
    agrees with the chains plus twice the quadrature table's link squared (an independent route) within
    twice its bound. The exact e d (section 4i) agrees with twice the quadrature's angle-area part (an
    independent route: the engine's Gaussian-calculus quadrature) within its bound."""
    e1, e2, d = sympy.symbols("e1 e2 d", real=True)
    species = [Species(e1), Species(e2)]
    derived = taylor_coefficients(species, {(0, 1): d}, (2, 2), "boson")
    link, (angle, angle_error), _ = two_loop_table.two_species_cluster(2, 2)
    chains = chain_part(species, {(0, 1): d}, (2, 2), "boson")
    assert abs(float(derived[d ** 2]) - (float(chains[d ** 2]) + 2 * link[0])) <= 2 * link[1]
    exact = derived[d * e1]
    assert exact.is_Rational and abs(float(exact - chains[d * e1]) - 2 * angle) <= 2 * angle_error


def test_every_square_is_derived_beyond_the_former_reach():
    """b_17 of one species (beyond the reach of the former quadrature of the 17-cycle alone) is exact: its
    e^2 coefficient is a closed form, the chains plus the clusters of section 4k and the 17-cycle of 4l. A
    mixture's d^2 is derived at every |n| and mass ratio (the link squared in closed form, section 4k); its
    exact value is the chains plus `link_integrals.coefficient`, the closed form at 60 digits
    (bookkeeping; the closed form's outside checks are in tests/test_link_integrals.py)."""
    from clusterexp.routes import link_integrals
    value = taylor_coefficients([Species(E)], {}, (17,), "boson")[E ** 2]
    assert not value.free_symbols and not value.is_Rational
    d = sympy.Symbol("d", real=True)
    for masses, n in (((1, 2), (16, 1)), ((1, 10 ** 6 + 1), (3, 1)), ((1, 1), (17, 3))):
        species = [Species(E, masses[0]), Species(None, masses[1])]
        value = taylor_coefficients(species, {(0, 1): d}, n, "boson")[d ** 2]
        chains = chain_part(species, {(0, 1): d}, n, "boson")[d ** 2]
        link, link_bound = link_integrals.coefficient(*n, *masses)
        assert not value.is_Rational and abs(float(value - chains) - link) <= link_bound, (masses, n, value)


def test_the_engine_reproduces_the_table_entry_of_two_two_cycles():
    """Reproducibility of the table (code against the code that wrote it, not an outside check; the
    outside check is the sampled-loop route): the quadrature engine at a loose tolerance gives the
    {2-cycle, 2-cycle} entry to 1e-5, its contact part 1/2 and its angle-area part -1/8 (rational,
    section 4f)."""
    from clusterexp.routes.two_loop_quadrature import second_order
    parts = second_order(2, 2, tol=1e-5)
    assert abs(parts["beyond"] - two_loop_table.BEYOND[(2, 2)][0]) < 1e-5
    assert abs(parts["contact"] - 0.5) < 1e-9
    assert abs(parts["angle_area"] + 0.125) < 1e-5


def _run(text, *extra):
    return subprocess.run([sys.executable, "-m", "clusterexp", "run", "-e", text, *extra], capture_output=True,
                          text=True, timeout=300)


ONE_SPECIES = "dimension 2 parameter alpha in [0, 1] species A exchange alpha clusters pairphase derive virial up to 4 "


def test_expand_shows_the_closed_form():
    """The series of a_4 about bosons is [1/16 + (sqrt 3/48) ln(2 + sqrt 3)] alpha^2 (docs 4k, 4l), the table's
    0.11002162477 of section 4h (the quadrature engine of 4f for the clusters: another route)."""
    out = _run(ONE_SPECIES + "expand alpha about 0 to 2")
    assert out.returncode == 0, out.stderr
    assert "alpha**2*(sqrt(3)*log(sqrt(3) + 2)/48 + 1/16) + O(alpha**3)" in out.stdout
    assert "unknown Taylor coefficients" not in out.stdout


def test_latex_shows_the_closed_form():
    out = _run(ONE_SPECIES + "expand alpha about 0 to 2", "--format", "latex")
    assert out.returncode == 0, out.stderr
    assert r"\log{\left(\sqrt{3} + 2 \right)}" in out.stdout and "Unknown Taylor coefficients" not in out.stdout


def test_fermion_side_and_json():
    """About fermions a_4 is [-1/16 + (sqrt 3/48) ln(2 + sqrt 3)] (alpha - 1)^2 (docs 4k, 4l), -0.01497837523
    in the table of section 4h (the quadrature engine for the clusters); JSON names nothing."""
    out = _run(ONE_SPECIES.replace("[0, 1]", "[1, 2]") + "expand alpha about 1 to 2", "--format", "json")
    assert out.returncode == 0, out.stderr
    document = json.loads(out.stdout)
    assert "unknowns" not in document
    (a4,) = [c for c in document["coefficients"] if c["kind"] == "virial" and c["index"] == [4]]
    series = a4["series"][0]
    assert "unknowns" not in series
    alpha = sympy.Symbol("alpha")
    polynomial = sympy.sympify(series["value"].replace("+ O((alpha - 1)**3)", ""), locals={"alpha": alpha})
    square = sympy.expand(polynomial.subs(alpha, alpha + 1)).coeff(alpha, 2)
    assert sympy.simplify(square - (A4 - sympy.Rational(1, 8))) == 0
    assert abs(float(square) + 0.01497837523) < 1e-10


def test_claims_are_decided_exactly():
    """The conjectured closure of section 4b (iv) gives a_4 = alpha^2/16 + O(alpha^3) about bosons: refuted
    (the sampled loops of section 4g exclude it as well); the closed form is proven; exit code 1 for the
    refuted one."""
    out = _run(ONE_SPECIES + "claim a[4] = alpha^2/16 + O(alpha^3)")
    assert out.returncode == 1
    assert "mismatch: a[4] up to O(alpha^3)" in out.stdout
    out = _run(ONE_SPECIES + "claim a[4] = (1/16 + sqrt(3)/48*log(2 + sqrt(3)))*alpha^2 + O(alpha^3)")
    assert out.returncode == 0, out.stdout
    assert "proven: a[4] up to O(alpha^3)" in out.stdout


def test_evaluate_near_the_point_goes_through_the_series():
    """Near the expansion point `evaluate` of a coefficient with named pieces uses the input's `expand`
    series, says so, and leaves the remainder out: a_3 at alpha = 1/100 is 1/36 + alpha^2/12 there
    (Myrheim & Olaussen 1993); a_4 is its closed form there (docs 4k, 4l). Without a series the value is
    refused as before."""
    out = _run(ONE_SPECIES + "expand alpha about 0 to 2 evaluate a[3], a[4] at alpha = 1/100")
    assert out.returncode == 0, out.stderr
    lines = {x.split(" (truncated")[0].strip(): x for x in out.stdout.splitlines()
             if "(truncated series about alpha = 0" in x}
    a3 = float(lines["a[3]"].split("= ")[-1])
    assert abs(a3 - (1 / 36 + 1e-4 / 12)) < 1e-13
    assert "O(alpha^3) left out, alpha^3 = 1.0e-6 here" in lines["a[3]"]
    assert abs(float(lines["a[4]"].split("= ")[-1]) - 1e-4 * float(A4)) < 1e-18
    assert abs(float(A4) - (211 / 16 - 3 * 4.359161)) < 1e-4   # the table's b_4^(2), section 4h
    out = _run(ONE_SPECIES + "evaluate a[3] at alpha = 1/100")
    assert out.returncode == 2 and "no value for b_3" in out.stderr


def test_evaluate_takes_the_nearest_series_and_not_a_far_one():
    """Two series (about bosons and about fermions): at alpha = 19/20 the one about 1 is used, 1/36 +
    (1 - alpha)^2/12 there (Myrheim & Olaussen 1993 with Sen's symmetry); at alpha = 1/2 neither is
    near enough (1/4 at most) and the value is refused as without a series."""
    both = ONE_SPECIES + "expand alpha about 0 to 2 expand alpha about 1 to 2 "
    out = _run(both + "evaluate a[3] at alpha = 19/20")
    assert out.returncode == 0, out.stderr
    line = next(x for x in out.stdout.splitlines() if "a[3] (truncated series about alpha = 1 from below" in x)
    assert abs(float(line.split("= ")[-1]) - (1 / 36 + 0.05 ** 2 / 12)) < 1e-13
    out = _run(both + "evaluate a[3] at alpha = 1/2")
    assert out.returncode == 2 and "no value for b_3" in out.stderr


def test_the_slope_of_the_exchange_scales_the_square():
    """Exchange 1 + alpha and 1 + 2 alpha (about fermions, slope 1 and 2): a_4's coefficient of alpha^2 is
    A4 - 1/8 times the slope squared; each claim is proven in its own gas."""
    import clusterexp
    for slope in (1, 2):
        claimed = f"({slope ** 2})*(1/16 + sqrt(3)/48*log(2 + sqrt(3)) - 1/8)*alpha^2 + O(alpha^3)"
        d = clusterexp.derive(f"dimension 2 parameter alpha in [0, 1/8] species A exchange 1 + {slope}*alpha "
                              f"clusters pairphase derive virial up to 4 expand alpha about 0 to 2 claim a[4] = {claimed}")
        (check,) = d.checks
        assert check.status == "proven" and not d.unknowns(), check.render()


def test_a_mass_that_moves_with_the_variable_is_not_expanded():
    """b_4 of a species B whose mass is 1 + alpha (in units of the reference species A) is (1 + alpha)
    times b_4 of unit mass: the route's expansion at fixed mass does not apply, so its coefficients stay
    named; with B of mass 2 the closed form is twice that of unit mass (b of one species scales with its
    mass in the plane)."""
    import clusterexp
    text = ("dimension 2 parameter alpha in [0, 1] species A bose species B exchange alpha mass MASS "
            "clusters pairphase derive cluster b[0,4] expand alpha about 0 to 2")
    d = clusterexp.derive(text.replace("MASS", "1 + alpha"))
    assert d.unknowns()
    d = clusterexp.derive(text.replace("MASS", "2"))
    assert not d.unknowns()
    (series,) = d.series_of(d.coefficients[0])
    square = sympy.expand(series.polynomial).coeff(series.variable, 2)
    assert sympy.simplify(square - 2 * (sympy.Rational(35, 8) - ROOT3)) == 0


def test_b11_clusters_in_closed_form_against_the_quadrature_engine():
    """The five two-loop clusters of b_11 (their part beyond the chains) by the closed form with the derived
    angle-area parts, against a run of the quadrature engine (fifteenth session, the rule 1e-7:
    0.0918672732 + 0.0837272508 + 0.0624890315 + 0.0094084322 - 0.1769469754, each good to about 1e-8)."""
    from clusterexp.routes.angle_area import one_species_units
    from clusterexp.routes.link_integrals import exact_coefficient
    value = sum(float(exact_coefficient(p, 11 - p)) + float(sum(one_species_units(p, 11 - p))) for p in range(6, 11))
    engine = 0.0918672732 + 0.0837272508 + 0.0624890315 + 0.0094084322 - 0.1769469754
    assert abs(value - engine) < 5e-8, value


def test_one_species_far_beyond_the_tables_is_printed_in_closed_form():
    """b_17 of one species about fermions (beyond the tables and the former quadrature of the 17-cycle
    alone): the (alpha - 1)^2 coefficient in closed form (the clusters of section 4k, the 17-cycle of 4l),
    in the user's parameter, nothing named; its value against the chains plus the clusters by the 60-digit
    evaluation of the closed form and the 17-cycle's ring part (bookkeeping across two code paths)."""
    text = ("dimension 2 parameter alpha in [0, 1] species A exchange alpha clusters pairphase derive cluster b[17] "
            "expand alpha about 1 to 2")
    out = subprocess.run([sys.executable, "-m", "clusterexp", "run", "-e", text, "--no-files"],
                         capture_output=True, text=True, timeout=300)
    assert out.returncode == 0, out.stderr
    line = next(x for x in out.stdout.splitlines() if "series in alpha" in x)
    assert "log(" in line and "b_17_" not in out.stdout and "e_0" not in out.stdout, line
    alpha = sympy.Symbol("alpha")
    series = sympy.sympify(line.split("): ", 1)[1].replace("+ O((alpha - 1)**3)", ""), locals={"alpha": alpha})
    square = sympy.expand(series.subs(alpha, alpha + 1)).coeff(alpha, 2)
    from clusterexp.routes.angle_area import one_species_units
    from clusterexp.routes.link_integrals import coefficient
    clusters = sum(coefficient(p, 17 - p, 1, 1)[0] + float(sum(one_species_units(p, 17 - p))) for p in range(9, 17))
    expected = float(chain_part([Species(E)], {}, (17,), "fermion")[E ** 2]) - clusters     # (-1)^17 about fermions
    assert abs(float(square) - expected) < 1e-9, (square, expected)
