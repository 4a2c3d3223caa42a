"""Statistics parameters modulo their periods (clusterexp/periods.py) and what the pair-phase route knows
exactly because of them: ideal species at exchange parameters that are bosonic or fermionic modulo 2, and
species that do not braid (integer mutual parameters, period 1) have vanishing mixed coefficients."""
import pytest
import sympy

import clusterexp
from clusterexp import InputError, build_system
from clusterexp.exact.periods import braids, coupled_groups, exchange_statistics, residue
from conftest import virial_by_iteration

R = sympy.Rational


def values(text, kind):
    return {c.index: c.value for c in clusterexp.derive(text) if c.kind == kind}


def coefficient_lines(stdout):
    """The printed coefficients (the header names the declared exchange parameter and differs)."""
    return [line for line in stdout.splitlines() if not line.startswith("#")]


@pytest.mark.parametrize("value, expected", [(0, "bose"), (2, "bose"), (4, "bose"), (-2, "bose"), (1, "fermi"),
                                             (3, "fermi"), (-1, "fermi"), (R(1, 2), None), (R(5, 2), None)])
def test_exchange_statistics_modulo_two(value, expected):
    assert exchange_statistics(sympy.Integer(value) if isinstance(value, int) else value) == expected


def test_symbolic_values_count_only_when_exactly_determined():
    k = sympy.Symbol("k", integer=True)
    alpha = sympy.Symbol("alpha", real=True)
    assert exchange_statistics(2 * k) == "bose" and exchange_statistics(2 * k + 1) == "fermi"
    assert exchange_statistics(k) is None and exchange_statistics(alpha) is None
    assert braids(k) is False and braids(alpha) is None and braids(R(1, 3)) is True and braids(sympy.Integer(-1)) is False
    assert residue(R(7, 3), 2) == R(1, 3)
    # a declared range that holds one integer pins an integer parameter
    system = build_system("dimension 2 parameter k in [1/2, 3/2] integer species A exchange k clusters pairphase")
    params = {p.symbol: p for p in system.parameters}
    assert exchange_statistics(system.species[0].exchange, params) == "fermi"


def test_coupled_groups():
    edges = {(0, 1), (1, 2)}
    coupled = lambda i, j: (min(i, j), max(i, j)) in edges
    assert len(coupled_groups([0, 1, 2], coupled)) == 1
    assert sorted(map(sorted, coupled_groups([0, 2], coupled))) == [[0], [2]]   # no B: A and C separate


# -- ideal species modulo the exchange period -----------------------------------------------------------

@pytest.mark.parametrize("exchange, word", [(2, "bose"), (4, "bose"), (-2, "bose"), (3, "fermi"), (-1, "fermi")])
def test_exchange_modulo_two_is_the_ideal_gas_through_the_whole_output(cli, exchange, word):
    """Independent code path: `clusters ideal` (route R1, clusterexp/routes/ideal.py) for a `bose`/`fermi`
    species against `clusters pairphase` with the exchange parameter shifted by a multiple of the period
    2 (clusterexp/routes/pairphase.py), every printed coefficient of every kind."""
    tail = "derive cluster up to 6 derive virial up to 6 derive density up to 4 derive fugacity up to 4"
    anyons = cli("run", "-e", f"dimension 2 species A exchange {exchange} clusters pairphase {tail}")
    ideal = cli("run", "-e", f"dimension 2 species A {word} clusters ideal {tail}")
    assert anyons.returncode == ideal.returncode == 0
    assert coefficient_lines(anyons.stdout) == coefficient_lines(ideal.stdout)


@pytest.mark.parametrize("exchange, sign", [(2, 1), (3, -1), (-1, -1)])
def test_ideal_cluster_and_virial_coefficients_in_the_plane(exchange, sign):
    """b_l = (+-1)^(l+1) l^(-2) and a_n = B_(n-1)/n! (a_2 = -+1/4, a_3 = 1/36, a_4 = 0, a_5 = -1/3600):
    all 2D Bose and Fermi virial coefficients agree except the second [published: Viefers, Ravndal,
    Haugset, Am. J. Phys. 63 (1995) 369]."""
    text = f"dimension 2 species A exchange {exchange} clusters pairphase derive cluster up to 5 derive virial up to 5"
    b, a = values(text, "cluster"), values(text, "virial")
    assert all(b[(l,)] == sign ** (l + 1) * R(1, l ** 2) for l in range(1, 6))
    assert [a[(n,)] for n in range(2, 6)] == [-sign * R(1, 4), R(1, 36), 0, R(-1, 3600)]


def test_true_claims_about_ideal_species_pass(cli):
    result = cli("run", "-e", "dimension 2 species A exchange 3 clusters pairphase derive virial up to 3 "
                              "claim b[3] = 1/9 claim a[3] = 1/36", "--no-files")
    assert result.returncode == 0, result.stdout + result.stderr
    assert result.stdout.count("proven:") == 2


@pytest.mark.parametrize("text, message", [
    ("dimension 2 species A exchange 3 clusters pairphase { b[3] = 1/9 }",
     "b[3] is known exactly here, do not give it: species A has exchange parameter 3, which is fermionic"),
    ("dimension 2 species A exchange -2 clusters pairphase { a[4] = 0 }", "a[4] is known exactly here"),
    ("dimension 2 species A bose clusters pairphase { b[3] = 1/9 }", "ideal Bose gas"),
])
def test_a_given_value_for_an_ideal_species_is_refused(text, message):
    with pytest.raises(InputError) as caught:
        build_system(text)
    assert message in str(caught.value)
    assert caught.value.span is not None and caught.value.span.column > 1


# -- species that do not braid ---------------------------------------------------------------------------

MIXTURE = "dimension 2 species A exchange 1/3 species B bose species C exchange 1/5 {mutual} clusters pairphase "


@pytest.mark.parametrize("mutual", ["mutual A B = 0", "mutual A B = 1", "mutual A B = 2", "mutual A B = -1", "",
                                    "mutual A C = 3 mutual B C = 0"])
def test_every_mixed_coefficient_of_uncoupled_species_vanishes(mutual):
    """No braiding: the Hamiltonian separates, ln Xi is additive and every mixed b and a vanishes (common
    practice: integer mutual parameters mean no statistical coupling, period 1)."""
    text = MIXTURE.format(mutual=mutual) + "derive cluster up to 4 derive virial up to 4"
    b, a = values(text, "cluster"), values(text, "virial")
    for n in b:
        if sum(1 for k in n if k) > 1:
            assert b[n] == 0 and a[n] == 0, n
    # additivity: the pure parts are those of species A alone
    alone = values("dimension 2 species A exchange 1/3 clusters pairphase derive virial up to 4", "virial")
    rename = {sympy.Symbol("b_3"): sympy.Symbol("b_3_0_0"), sympy.Symbol("b_4"): sympy.Symbol("b_4_0_0")}
    for l in range(1, 5):
        assert sympy.expand(a[(l, 0, 0)] - alone[(l,)].subs(rename)) == 0


def test_a_cluster_containing_an_uncoupled_species_factorises_to_zero(cli):
    """A and B braid (1/3), C braids with neither: b_{A B C} and b_{A A C} vanish, b_{A A B} stays a many-body
    piece (common practice, as above)."""
    text = MIXTURE.format(mutual="mutual A B = 1/3") + "derive cluster up to 3"
    b = values(text, "cluster")
    assert b[(1, 1, 1)] == 0 and b[(2, 0, 1)] == 0 and b[(0, 1, 2)] == 0
    assert b[(2, 1, 0)] == sympy.Symbol("b_2_1_0") and b[(1, 1, 0)] == -R(2, 9)
    # a chain A-B, B-C with A-C uncoupled: without B, A and C separate; with B all three are coupled
    chain = values("dimension 2 species A exchange 1/3 species B species C mutual A B = 1/3 mutual B C = 1/4 "
                   "clusters pairphase derive cluster up to 3", "cluster")
    assert chain[(2, 0, 1)] == 0 and chain[(1, 1, 1)] == sympy.Symbol("b_1_1_1")
    result = cli("run", "-e", MIXTURE.format(mutual="mutual A B = 0") + "derive virial up to 3 claim b[2,1,0] = 0 "
                 "claim a[2,1,0] = 0 claim b[1,1,1] = 0", "--no-files")
    assert result.returncode == 0 and result.stdout.count("proven:") == 3


@pytest.mark.parametrize("given", ["b[2,1] = 5", "a[2,1] = 1/7", "b[1,2] = 0"])
def test_a_given_value_for_a_vanishing_mixed_piece_is_refused(cli, given):
    text = f"dimension 2 species A exchange 1/3 species B exchange 1/5 mutual A B = 2 clusters pairphase {{ {given} }}"
    result = cli("run", "-e", text, "--no-files")
    assert result.returncode == 2 and "Traceback" not in result.stderr
    assert "is known exactly here, do not give it" in result.stderr and "do not braid" in result.stderr
    column = text.index(given) + 1
    assert f"<command line>:1:{column}: error" in result.stderr and "^" in result.stderr


def test_given_virial_of_one_anyonic_species_next_to_an_ideal_one():
    """`clusters pairphase { a[3,0] = ... }` with B bosonic: a[3,0] involves A alone. The published
    a_3 = 1/36 + alpha^2/12 + O(alpha^3) near bosons [Myrheim & Olaussen, Phys. Lett. B 299 (1993) 267] gives
    b_3 = 1/9 - alpha + (59/24) alpha^2 (physics.md, derived); the mixed coefficients vanish, B keeps its
    ideal b_l, and an independent cluster -> virial route (tests/conftest.py) reproduces every a."""
    text = ("dimension 2 parameter alpha in [0, 1] species A exchange alpha species B bose clusters pairphase "
            "{ a[3,0] = 1/36 + alpha^2/12 + O(alpha^3) } derive cluster up to 3 derive virial up to 3")
    b, a = values(text, "cluster"), values(text, "virial")
    alpha = next(iter(b[(2, 0)].free_symbols))
    assert b[(3, 0)].removeO() == R(1, 9) - alpha + R(59, 24) * alpha ** 2
    assert b[(3, 0)].getO() == sympy.Order(alpha ** 3)
    assert b[(0, 3)] == R(1, 9) and b[(2, 1)] == 0 and b[(1, 2)] == 0 and a[(2, 1)] == 0
    exact = {n: v.removeO() for n, v in b.items()}
    independent = virial_by_iteration(exact, 3)
    for n, value in a.items():
        difference = sympy.expand(independent.get(n, 0) - value.removeO())
        assert all(sympy.degree(t, alpha) >= 3 for t in sympy.Add.make_args(difference) if t != 0), n


def test_given_virial_at_fourth_order_with_a_fermionic_neighbour():
    """Unknown pieces stay named as a symbols; the triangular solve is checked by the independent route."""
    text = ("dimension 2 species A exchange 1/2 species B exchange 3 mutual A B = 1/4 clusters pairphase "
            "{ a[3,0] = 1/25 } derive cluster up to 4 derive virial up to 4")
    b, a = values(text, "cluster"), values(text, "virial")
    assert a[(3, 0)] == R(1, 25) and a[(2, 1)] == sympy.Symbol("a_2_1") and b[(0, 3)] == R(1, 9)
    assert b[(0, 4)] == -R(1, 16)
    independent = virial_by_iteration(b, 4)
    assert all(sympy.expand(independent.get(n, 0) - a[n]) == 0 for n in a)


# -- the other places that decide "ideal" or "uncoupled" -----------------------------------------------

def test_tubes_among_species_that_do_not_braid():
    """Tubes are supported for ideal mobile species; a mutual parameter 1 is no coupling, so the mixed
    b vanish and each species feels the tubes as alone."""
    b = values("dimension 2 species A bose species B exchange 3 mutual A B = 1 tubes flux 1/3 coverage 1/10 "
               "clusters pairphase derive cluster up to 3", "cluster")
    alone = values("dimension 2 species B fermi tubes flux 1/3 coverage 1/10 clusters pairphase derive cluster up to 3",
                   "cluster")
    assert b[(1, 1)] == 0 and b[(2, 1)] == 0
    assert [b[(0, l)] for l in (1, 2, 3)] == [alone[(l,)] for l in (1, 2, 3)]


def test_ideal_regime_and_declared_spectrum_read_the_exchange_modulo_two():
    shifted = values("dimension 3 species A exchange 2 species B exchange -1 clusters ideal derive virial up to 4",
                     "virial")
    words = values("dimension 3 species A bose species B fermi clusters ideal derive virial up to 4", "virial")
    assert shifted == words
    assert values("dimension 2 species A exchange 3 clusters spectrum { } derive cluster up to 3", "cluster") == \
        values("dimension 2 species A fermi clusters spectrum { } derive cluster up to 3", "cluster")
    with pytest.raises(InputError, match="neither bosonic nor fermionic modulo the period 2"):
        build_system("dimension 2 species A exchange 5/2 clusters ideal")


@pytest.mark.parametrize("text, message", [
    ("dimension 2 species A exchange 2 clusters pairphase sample b[3] seed 1", "nothing to sample"),
    ("dimension 2 species A exchange 1/2 species B mutual A B = -1 clusters pairphase sample b[2,1] seed 1",
     "exactly 0 here"),
])
def test_sampling_refuses_what_is_exact_modulo_the_period(text, message):
    with pytest.raises(InputError, match=message):
        build_system(text)


def test_exclusion_warns_when_an_exchange_outside_the_unit_interval_becomes_g():
    """g is not periodic; the anyon's exchange parameter is (period 2)."""
    outside = build_system("dimension 2 species A exchange 3/2 clusters exclusion")
    assert any("not periodic" in w for w, _ in outside.warnings)
    for text in ("dimension 2 species A exchange 1/2 clusters exclusion",
                 "dimension 2 species A exchange 3/2 clusters exclusion statistics A A = 3/2"):
        assert not any("not periodic" in w for w, _ in build_system(text).warnings)


def test_a_series_in_one_parameter_keeps_the_others_periodic_part():
    """`expand f` with the exchange parameter symbolic and unbounded: b_2's Mod(alpha, 2) (Arovas et al.
    1985, period 2 in alpha) stays as it prints, not rewritten into floor terms."""
    from clusterexp.exact.periods import frozen_at
    alpha, fx = sympy.symbols("alpha f", real=True)
    expr = sympy.Rational(1, 4) - sympy.Mod(alpha, 2) + sympy.Mod(alpha, 2) ** 2 / 2 - fx * sympy.Mod(fx, 1)
    frozen, undecided = frozen_at(expr, {fx: sympy.Rational(1, 10 ** 9)})
    assert undecided is None
    assert not frozen.atoms(sympy.floor), frozen
    assert sympy.expand(frozen - (sympy.Rational(1, 4) - sympy.Mod(alpha, 2) + sympy.Mod(alpha, 2) ** 2 / 2 - fx ** 2)) == 0
