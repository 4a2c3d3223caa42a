"""Second-order Taylor coefficients of b_n of one species, n >= 4, about the boson and fermion points:
exact (the chains and the two-loop clusters in closed form, docs/perturbative.md 4k) but for one named
rest, the n-cycle alone beyond its ring part, computed (section 4h; clusterexp/routes/two_loop_demand.py);
the quadrature table of the clusters (clusterexp/routes/two_loop_table.py) is the independent route.

The bookkeeping (chains of three loops, exact, plus the two-loop clusters beyond them, with the sign
(-1)^n about fermions) is checked at n = 3 against the published a_3; the table's n = 4 entries against
the sampled-loop route (tests/test_two_loop_monte_carlo.py) and against the engine that produced them;
the outputs keep the rest's name and show its number beside it."""
import json
import subprocess
import sys

import pytest
import sympy

from clusterexp.routes import two_loop_demand, two_loop_table
from clusterexp.routes.perturbative import REST, Species, chain_part, numerical_coefficients, taylor_coefficients

E = sympy.Symbol("e", real=True)


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


def _known(value):
    """(the exact part, the named rest) of a coefficient that is known but for a rest."""
    (rest,) = [x for x in value.free_symbols if x.name.endswith(REST)]
    return value - rest, rest


@pytest.mark.parametrize("about", ["boson", "fermion"])
def test_b4_square_in_closed_form_against_the_table(about):
    """b_4's e^2 coefficient of one species is exact but for a named rest, the 4-cycle alone beyond its
    ring part: 35/8 - (sqrt 3/144) ln(2 + sqrt 3) about bosons, 13/24 - (sqrt 3/144) ln(2 + sqrt 3) about
    fermions (docs 4k), times the mass. Checked against the quadrature table (the engine of 4f, another
    route for the clusters: 4.359161 and 0.525828) within its bound; the rest's number is zero within
    two_loop_demand.CHECKED_BOUND (measured, docs 4h). The outside checks of the bookkeeping are the n = 3
    test above and the sampled loops of tests/test_two_loop_monte_carlo.py."""
    beyond, bound = two_loop_table.beyond_the_chains(4)
    table = _b_square(4, about, beyond)
    closed = (sympy.Rational(35, 8) if about == "boson" else sympy.Rational(13, 24)) - \
        sympy.sqrt(3) / 144 * sympy.log(2 + sympy.sqrt(3))
    for mass in (1, 3):
        known, _ = _known(taylor_coefficients([Species(E, mass)], {}, (4,), about, unknown="name")[E ** 2])
        assert sympy.simplify(known - mass * closed) == 0, known
        assert abs(float(known) - mass * table) < mass * bound + 1e-12
        rest, error = numerical_coefficients([Species(E, mass)], {}, (4,), about)[E ** 2]
        assert rest == 0 and error == mass * two_loop_demand.CHECKED_BOUND
    assert abs(table - (4.359161 if about == "boson" else 0.525828)) < 2e-5


# b_n^(2) about bosons as the on-demand route printed it before n = 9, 10 were tabled (benchmarks/
# two_loop_demand-last-run.txt, 2026-12-04): the quadrature's own angle-area parts at the tolerance rules
# (1e-6, 1e-7), each +- 1e-5
ON_DEMAND = {9: 11.631019, 10: 12.769130}


@pytest.mark.parametrize("n", [7, 8, 9, 10])
def test_b7_to_b10_square_in_closed_form_against_the_table(n):
    """The exact part of b_n's e^2 coefficient at n = 7 .. 10 (chains and the clusters in closed form,
    section 4k) against the chains plus every cluster {p, n - p} of the quadrature table (the vectorised
    engine's entries, section 4h), sign (-1)^n about fermions: two routes for the clusters. The outside
    checks of the engine are tests/test_two_loop_fast.py (exact
    {2-cycle, loop} values, equal and unequal masses, and the scalar engine's n = 4 entry), of the
    n-cycle alone its Fock-squared ring part (routes/cycle_alone.py, docs 4h), and of the table the
    observed sum rule (test_two_loop_fast.py). n = 9, 10 also against the on-demand route's earlier run
    (another path through the same engine: its quadrature angle-area parts, coarser rules; reproducibility,
    not an outside value)."""
    beyond, bound = two_loop_table.beyond_the_chains(n)
    for about in ("boson", "fermion"):
        known, _ = _known(taylor_coefficients([Species(E)], {}, (n,), about, unknown="name")[E ** 2])
        assert abs(float(known) - _b_square(n, about, beyond)) < bound + 1e-12
        if about == "boson" and n in ON_DEMAND:
            assert abs(float(known) - ON_DEMAND[n]) < 1e-5 + bound, (n, known)


def test_expand_prints_numbers_through_the_eighth_virial_coefficient():
    """`virial up to 8` with `expand alpha about 0 to 2`: a[8] gets its series in closed form but for the
    named rests of b_4 .. b_8 (the k-cycles alone beyond their ring parts), and with the computed numbers;
    b_8's rest is listed with its value."""
    out = _run(ONE_SPECIES.replace("virial up to 4", "virial up to 8") + "expand alpha about 0 to 2")
    assert out.returncode == 0, out.stderr
    lines = out.stdout.splitlines()
    at = next(i for i, x in enumerate(lines) if x.strip().startswith("a[8] ="))
    assert "with the computed coefficients" in lines[at + 2]
    assert "b_8_alpha_2_above_rest = part of the coefficient of alpha^2 in b[8] about alpha = 0 from above not " \
        "in closed form: the 8-cycle alone beyond its ring part; computed: 0.000000000 +- 0.000000002" in out.stdout


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


def test_nothing_computed_where_the_table_does_not_reach():
    """b_3 is exact (no number), b_n of one species beyond the on-demand reach (n > two_loop_demand.MAX_N;
    the gap says why) and b_{2,1} (derived exactly, section 4e): no estimate is offered there. A mixture's
    d^2 is derived at every |n| and mass ratio (the link squared in closed form, section 4k), so it is
    never offered as a number; its exact value is the chains plus `link_integrals.coefficient`, the
    closed form at 60 digits (bookkeeping; the closed form's outside checks are in
    tests/test_link_integrals.py)."""
    from clusterexp.routes import link_integrals, two_loop_demand
    assert numerical_coefficients([Species(E)], {}, (3,), "boson") == {}
    gaps = []
    beyond = two_loop_demand.MAX_N + 1
    assert numerical_coefficients([Species(E)], {}, (beyond,), "boson", gaps) == {}
    assert len(gaps) == 1 and f"up to n = {two_loop_demand.MAX_N}" in gaps[0], gaps
    d = sympy.Symbol("d", real=True)
    assert numerical_coefficients([Species(E, 1), Species(None, 2)], {(0, 1): d}, (2, 1), "boson") == {}
    for masses, n in (((1, 2), (beyond - 1, 1)), ((1, 10 ** 6 + 1), (3, 1)), ((1, 1), (beyond, 3))):
        species = [Species(E, masses[0]), Species(None, masses[1])]
        assert numerical_coefficients(species, {(0, 1): d}, n, "boson") == {}
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


def test_expand_shows_the_closed_form_and_the_rest():
    """The series of a_4 about bosons is [1/16 + (sqrt 3/48) ln(2 + sqrt 3) - 3 R] alpha^2 with R the named
    rest of b_4 (docs 4k), and with the computed numbers 0.110021625 alpha^2, the table's a_4 of section 4h
    (0.11002162477, the quadrature engine of 4f for the clusters: another route)."""
    out = _run(ONE_SPECIES + "expand alpha about 0 to 2")
    assert out.returncode == 0, out.stderr
    assert "alpha**2*(-3*b_4_alpha_2_above_rest + sqrt(3)*log(sqrt(3) + 2)/48 + 1/16) + O(alpha**3)" in out.stdout
    line = next(x for x in out.stdout.splitlines() if "with the computed coefficients" in x)
    value, bound = (float(x) for x in line.split("(")[-2].split(")")[0].split("+-"))
    assert abs(value - 0.11002162477) < 1e-10 + bound and bound < 1e-8
    assert "b_4_alpha_2_above_rest = part of the coefficient of alpha^2 in b[4] about alpha = 0 from above not in " \
        "closed form: the 4-cycle alone beyond its ring part; computed: 0.000000000 +- 0.000000002" in out.stdout


def test_latex_shows_the_computed_series_and_the_value_beside_the_name():
    out = _run(ONE_SPECIES + "expand alpha about 0 to 2", "--format", "latex")
    assert out.returncode == 0, out.stderr
    row = next(x for x in out.stdout.splitlines() if r"\approx" in x and "computed coefficients" in x)
    value = float(row.split("(")[1].split(r"\pm")[0])
    assert abs(value - (211 / 16 - 3 * 4.359161)) < 2e-4


def test_fermion_side_and_json():
    """About fermions a_4 is [-1/16 + (sqrt 3/48) ln(2 + sqrt 3)] (alpha - 1)^2 but for the rest of b_4
    (docs 4k), -0.01497837523 in the table of section 4h (the quadrature engine for the clusters); JSON
    carries the rest's number apart from the names."""
    out = _run(ONE_SPECIES.replace("[0, 1]", "[1, 2]") + "expand alpha about 1 to 2", "--format", "json")
    assert out.returncode == 0, out.stderr
    document = json.loads(out.stdout)
    values = document["computed_unknowns"]["values"]
    (name, number), = values.items()
    assert name.startswith("b_4_alpha_2_about_1") and name.endswith("_rest")
    assert number["value"] == 0 and number["error"] == two_loop_demand.CHECKED_BOUND
    text = json.dumps(document)
    assert "sqrt(3)*log(sqrt(3) + 2)/48" in text and "-3*" + name in text
    assert abs(-1 / 16 + 3 ** 0.5 / 48 * sympy.log(2 + sympy.sqrt(3)).evalf() + 0.01497837523) < 1e-10


def test_claims_are_decided_within_the_error_bounds():
    """The conjectured closure of section 4b (iv) gives a_4 = alpha^2/16 + O(alpha^3) about bosons:
    refuted by the computed coefficient (the sampled loops of section 4g exclude it as well), and so is
    0.11 alpha^2, which is 2e-5 off while the bound is 6e-11; the computed value to eleven digits
    (0.11002162477 = 211/16 - 3 b_4^(2), b_4^(2) = 4.35915945841 from the table, section 4h) is consistent
    and not proven; exit code 1 for the refuted ones."""
    for refuted in ("alpha^2/16", "0.11*alpha^2"):
        out = _run(ONE_SPECIES + f"claim a[4] = {refuted} + O(alpha^3)")
        assert out.returncode == 1
        assert "mismatch: a[4] up to O(alpha^3)" in out.stdout and "error bounds away" in out.stdout
    out = _run(ONE_SPECIES + "claim a[4] = 0.11002162477*alpha^2 + O(alpha^3)")
    assert out.returncode == 0, out.stdout
    assert "consistent with the computed coefficients, not proven: a[4] up to O(alpha^3)" in out.stdout


def test_evaluate_near_the_point_goes_through_the_series():
    """Near the expansion point `evaluate` of a coefficient with named pieces uses the input's `expand`
    series, says so, and leaves the remainder out: a_3 at alpha = 1/100 is 1/36 + alpha^2/12 there
    (Myrheim & Olaussen 1993); a_4 carries the computed coefficient's bound. Without a series the value
    is refused as before."""
    out = _run(ONE_SPECIES + "expand alpha about 0 to 2 evaluate a[3], a[4] at alpha = 1/100")
    assert out.returncode == 0, out.stderr
    lines = {x.split(" (truncated")[0].strip(): x for x in out.stdout.splitlines()
             if "(truncated series about alpha = 0" in x}
    a3 = float(lines["a[3]"].split("= ")[-1])
    assert abs(a3 - (1 / 36 + 1e-4 / 12)) < 1e-13
    assert "O(alpha^3) left out, alpha^3 = 1.0e-6 here" in lines["a[3]"]
    value, bound = (float(x) for x in lines["a[4]"].split("= ")[-1].split("+-"))
    assert abs(value - 1e-4 * (211 / 16 - 3 * 4.359161)) < 1e-8 and 0 < bound < 1e-8
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


def test_each_gas_keeps_its_own_computed_values():
    """The same coefficient name in two gases of one session: exchange 1 + alpha and 1 + 2 alpha (about
    fermions, slope 1 and 2) give b_4's coefficient of alpha^2 as 0.525826125077 and 4 times that (section 4h),
    and the named rest's bound once and 4 times; each derivation lists, prints and decides claims with its own."""
    import clusterexp
    values = []
    for slope in (1, 2):
        d = clusterexp.derive(f"dimension 2 parameter alpha in [0, 1/8] species A exchange 1 + {slope}*alpha "
                              "clusters pairphase derive virial up to 4 expand alpha about 0 to 2 "
                              f"claim a[4] = {(25 / 16 - 3 * 0.525826125077) * slope ** 2:.11f}*alpha^2 + O(alpha^3)")
        values.append(d)
    for slope, d in zip((1, 2), values):
        (unknown,) = [u for u in d.unknowns() if u.symbol.name.startswith("b_4")]
        assert unknown.estimate == (0.0, slope ** 2 * two_loop_demand.CHECKED_BOUND), (slope, unknown.estimate)
        (check,) = d.checks
        assert check.status == "consistent with the computed coefficients, not proven", check.render()


def test_a_mass_that_moves_with_the_variable_gets_no_number():
    """b_4 of a species B whose mass is 1 + alpha (in units of the reference species A) is (1 + alpha)
    times b_4 of unit mass: the route's expansion at fixed mass does not apply, so no coefficient of it
    is derived or computed there; with B of mass 2 the closed form is twice that of unit mass (b of one
    species scales with its mass in the plane), and so is its rest's bound."""
    import clusterexp
    from clusterexp.pieces import format_estimate
    text = ("dimension 2 parameter alpha in [0, 1] species A bose species B exchange alpha mass MASS "
            "clusters pairphase derive cluster b[0,4] expand alpha about 0 to 2")
    d = clusterexp.derive(text.replace("MASS", "1 + alpha"))
    assert not any(u.estimate for u in d.unknowns())
    d = clusterexp.derive(text.replace("MASS", "2"))
    (unknown,) = d.unknowns()
    assert unknown.estimate == (0.0, 2 * two_loop_demand.CHECKED_BOUND)
    (series,) = d.series_of(d.coefficients[0])
    known = sympy.expand(series.polynomial).coeff(series.variable, 2).subs(unknown.symbol, 0)
    assert abs(float(known) - 2 * 4.359161) < 4e-5
    assert format_estimate(0.1, 1.4e-5) == "0.10000 +- 0.00002"     # a bound is never shown smaller


def test_the_rest_by_quadrature_at_n_4():
    """The on-demand quadrature of the n-cycle alone beyond its ring part (routes/two_loop_demand.py), run at
    n = 4: zero within its bound (section 4d gives the 4-cycle alone at its ring part 1 with the same pair
    decomposition, an observation to 1e-13, docs 4h). Also the ring part against its series:
    (1/2)[z^n] z ln^2(1 - z)/(1 - z), 203/90 and 469/180 for n = 7, 8."""
    from fractions import Fraction
    value, bound = two_loop_demand._computed(4)
    assert abs(value) <= bound < 1e-5
    z = sympy.Symbol("z")
    for n in (4, 7, 8):
        series = sympy.Rational(1, 2) * sympy.series(sympy.log(1 - z) ** 2 * z / (1 - z), z, 0, n + 1).removeO().coeff(z, n)
        assert two_loop_demand.ring_part(n) == Fraction(int(series.p), int(series.q))
    with pytest.raises(ValueError):
        two_loop_demand.beyond_on_demand(4)


def test_b11_clusters_in_closed_form_against_the_quadrature_engine(monkeypatch):
    """The five two-loop clusters of b_11 (their part beyond the chains) by the closed form with the derived
    angle-area parts, against the quadrature engine's run of the fifteenth session (benchmarks/
    two_loop_demand-last-run.txt, the rule 1e-7: 0.0918672732 + 0.0837272508 + 0.0624890315 + 0.0094084322
    - 0.1769469754, each good to about 1e-8). The 11-cycle alone is set to its ring part here (it is
    the quadrature of routes/cycle_alone.py, a minute, and equals its ring part to 1e-10: docs 4h)."""
    from clusterexp.routes import two_loop_demand
    monkeypatch.setattr(two_loop_demand, "k_cycle_orders", lambda n, *rule: (0.0, float(two_loop_demand.ring_part(n))))
    two_loop_demand._computed.cache_clear()
    try:
        value, bound = two_loop_demand.beyond_on_demand(11)
    finally:
        two_loop_demand._computed.cache_clear()
    engine = 0.0918672732 + 0.0837272508 + 0.0624890315 + 0.0094084322 - 0.1769469754
    assert abs(value - engine) < 5e-8, value
    assert two_loop_demand.FLOOR <= bound < 1.01 * two_loop_demand.FLOOR
