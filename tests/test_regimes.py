"""Exactly solvable regimes: ideal gases, exclusion statistics, the lowest Landau level, declared
spectra. Each check names its outside source or the independent route it uses."""
from fractions import Fraction

import pytest
import sympy

import clusterexp
from clusterexp.errors import InputError
from conftest import wu_iteration


def values(text, kind="cluster"):
    d = clusterexp.derive(text)
    return {c.index: c.value for c in d if c.kind == kind}


def same(x, y):
    return sympy.simplify(sympy.expand(x - y)) == 0


G = sympy.Symbol("g", real=True)


# -- exclusion statistics -------------------------------------------------------------------------------
def test_one_level_exclusion_matches_the_published_product():
    """b_n = (1/n) prod_{k=1}^{n-1} (1 - n g/k) [published: Desbois, Heinemann, Ouvry, cond-mat/9407059;
    Wu, Phys. Rev. Lett. 73 (1994) 922]."""
    b = values("dimension 2 parameter g species A exchange g clusters exclusion level derive cluster up to 14")
    g = next(iter(b[(2,)].free_symbols))
    for n in range(1, 15):
        published = sympy.Rational(1, n) * sympy.prod([1 - n * g / k for k in range(1, n)])
        assert same(b[(n,)], published), n


def test_one_level_two_species_mixed_coefficient_and_a_non_symmetric_matrix():
    """b_11 = -(g_12 + g_21) on one level [derived in physics notes]; the whole non-symmetric case against
    an independent route written here: iterate Wu's equations u_i = z_i (1+u_i) prod_j (1+u_j)^(-g_ji)
    with sympy expressions and the binomial series, truncated by total degree."""
    text = ("dimension 2 species A species B statistics matrix [[1/2, 1/3], [1/5, 2/3]] clusters exclusion level "
            "derive cluster up to 4")
    b = values(text)
    assert b[(1, 1)] == -(sympy.Rational(1, 3) + sympy.Rational(1, 5))
    g = [[sympy.Rational(1, 2), sympy.Rational(1, 3)], [sympy.Rational(1, 5), sympy.Rational(2, 3)]]
    expected = wu_iteration(g, 4)
    for n, coefficient in expected.items():
        assert b[n] == coefficient, n
    assert all(b[n] == 0 for n in b if n not in expected)


def test_2d_continuum_exclusion_virial_coefficients():
    """a_2 = (2g - 1)/4 and a_n = B_{n-1}/n! independent of g for n >= 3 in the 2D continuum gas
    [derived; the g-independence of a_n, n >= 3, is a known property of the 2D exclusion gas]."""
    a = values("dimension 2 parameter g species A exchange g clusters exclusion derive virial up to 9", "virial")
    g = next(iter(a[(2,)].free_symbols))
    assert same(a[(2,)], (2 * g - 1) / 4)
    for n in range(3, 10):
        assert a[(n,)] == sympy.bernoulli(n - 1) / sympy.factorial(n) * (1 if n != 2 else -1), n


@pytest.mark.parametrize("d, expected", [(1, lambda g: (2 * g - 1) / (2 * sympy.sqrt(2))),
                                         (3, lambda g: (2 * g - 1) / 2 ** sympy.Rational(5, 2))])
def test_1d_and_3d_exclusion_second_virial(d, expected):
    """a_2 = (2g-1)/(2 sqrt 2) in 1D and (2g-1)/2^(5/2) in 3D [derived, physics notes]."""
    a = values(f"dimension {d} parameter g species A exchange g clusters exclusion derive virial up to 3", "virial")
    g = next(iter(a[(2,)].free_symbols))
    assert same(a[(2,)], expected(g))


@pytest.mark.parametrize("d", [1, 2, 3])
@pytest.mark.parametrize("word, g", [("bose", 0), ("fermi", 1)])
def test_exclusion_at_g_0_and_1_is_the_ideal_gas(d, word, g):
    """Independent route: the exclusion continuum at g = 0 / 1 against the ideal-gas route R1."""
    order = 6
    ideal = values(f"dimension {d} species A {word} clusters ideal derive cluster up to {order}")
    excl = values(f"dimension {d} species A exchange {g} clusters exclusion derive cluster up to {order}")
    for n in ideal:
        assert same(ideal[n], excl[n]), n


def test_ideal_mixture_has_no_mixed_coefficients_and_mass_factors():
    """b_(l e_i) = (m_i/m_ref)^(d/2) (+-1)^(l+1) l^(-1-d/2), no mixed b [textbook ideal gases, e.g.
    Pathria & Beale, Statistical Mechanics, 3rd ed., ch. 7-8]."""
    b = values("dimension 3 parameter mu positive species A bose species B mass mu fermi species C boltzmann "
               "clusters ideal derive cluster up to 4")
    mu = next(s for s in b[(0, 2, 0)].free_symbols)
    assert same(b[(0, 2, 0)], -mu ** sympy.Rational(3, 2) * 2 ** sympy.Rational(-5, 2))
    assert same(b[(3, 0, 0)], 3 ** sympy.Rational(-5, 2))
    assert b[(0, 0, 2)] == 0 and b[(0, 0, 1)] == 1
    assert all(v == 0 for n, v in b.items() if sum(1 for k in n if k) > 1)


def test_3d_ideal_bose_through_the_regime_against_textbook_decimals():
    """3D Bose a_2..a_5 = -0.17678, -0.0033001, -0.00011129, -0.0000035405 [published: Pathria & Beale,
    Statistical Mechanics, 3rd ed., sections 7.1 and 8.1]; Fermi a_n = (-1)^(n+1) a_n(Bose)."""
    table = [-0.17678, -0.0033001, -0.00011129, -0.0000035405]
    bose = values("dimension 3 species A bose clusters ideal derive virial up to 5", "virial")
    fermi = values("dimension 3 species A fermi clusters ideal derive virial up to 5", "virial")
    for n, expected in zip(range(2, 6), table):
        assert abs(float(bose[(n,)]) - expected) < 5e-5 * abs(expected) + 1e-10
        assert abs(float(fermi[(n,)]) - (-1) ** (n + 1) * expected) < 5e-5 * abs(expected) + 1e-10


def test_exclusion_mixed_coefficients_vanish_without_mutual_statistics():
    """Mixed coefficients vanish when the off-diagonal statistics are zero [derived: the gas factorises]."""
    b = values("dimension 2 parameter g1, g2 species A exchange g1 species B exchange g2 clusters exclusion "
               "derive cluster up to 6")
    assert all(v == 0 for n, v in b.items() if n[0] and n[1])


def test_exclusion_continuum_mass_factor_follows_the_convention():
    """b_(e_i) = (m_i/m_ref)^(d/2) (physics notes, section 1), from the shared-momentum-cell continuum."""
    b = values("dimension 3 species A species B mass 4 clusters exclusion derive cluster up to 2")
    assert b[(0, 1)] == 8
    assert same(b[(0, 2)], 8 * 2 ** sympy.Rational(-5, 2))  # = m_B^(3/2) x the Bose b_2 (g = 0)


# -- lowest Landau level ----------------------------------------------------------------------------------
def test_lll_virial_coefficients_and_divergence():
    """c_n = [g^n - (g-1)^n]/n, beta P/rho_L = ln[1 + nu/(1 - g nu)], diverging at nu = 1/g [published:
    Dasnieres de Veigy & Ouvry, Phys. Rev. Lett. 72 (1994) 600, who count alpha from fermions in [-1, 0];
    closed form derived]. The closed form is expanded with sympy's `series` as the independent library."""
    a = values("dimension 2 parameter g in [0, 1] species A exchange g clusters landau derive virial up to 10",
               "virial")
    g = next(iter(a[(2,)].free_symbols))
    for n in range(1, 11):
        assert same(a[(n,)], (g ** n - (g - 1) ** n) / n), n
    nu = sympy.Symbol("nu")
    closed = sympy.series(sympy.log(1 + nu / (1 - g * nu)), nu, 0, 8).removeO()
    for n in range(1, 8):
        assert same(closed.coeff(nu, n), a[(n,)]), n
    # radius of convergence in nu is 1/g for g > 1/2: n c_n / ((n-1) c_(n-1)) tends to g
    a40 = values("dimension 2 species A exchange 7/10 clusters landau derive virial up to 40", "virial")
    ratio = 40 * a40[(40,)] / (39 * a40[(39,)])
    assert abs(float(ratio) - 0.7) < 1e-6


def test_lll_bose_point_gives_b_n_equal_1_over_n():
    """Check stated with route R4: g = 0 gives b_n = 1/n (bosons in one LLL, 1D counting)."""
    b = values("dimension 2 species A bose clusters landau spectrum derive cluster up to 8")
    assert all(b[(n,)] == sympy.Rational(1, n) for n in range(1, 9))


def test_lll_spectral_and_exclusion_routes_agree_identically():
    """Two independent routes (R4 harmonic regulator on the LLL spectrum, R5 exclusion statistics with
    g = exchange matrix [published: Isakov, Mashkevich, Ouvry, Nucl. Phys. B 448 (1995) 457]) must give
    the same cluster and virial coefficients for K = 2 with symbolic parameters to total order 6."""
    head = ("dimension 2 parameter g1, g2, g12 in [0, 1] species A exchange g1 species B exchange g2 "
            "mutual A B = g12 ")
    for kind in ("cluster", "virial"):
        one = values(head + f"clusters landau derive {kind} up to 6", kind)
        two = values(head + f"clusters landau spectrum derive {kind} up to 6", kind)
        assert one.keys() == two.keys()
        for n in one:
            assert sympy.expand(one[n] - two[n]) == 0, (kind, n)


def test_lll_mixed_coefficients_vanish_without_mutual_parameter():
    b = values("dimension 2 parameter g1, g2 in [0, 1] species A exchange g1 species B exchange g2 "
               "clusters landau spectrum derive cluster up to 5")
    assert all(v == 0 for n, v in b.items() if n[0] and n[1])


def test_lll_warns_outside_the_linear_interpolation_range():
    d = clusterexp.derive("dimension 2 species A exchange 3/2 clusters landau derive virial up to 2")
    assert any("outside [0, 1]" in message for message, _ in d.system.warnings)
    d = clusterexp.derive("dimension 2 parameter g in [0, 1] species A exchange g clusters landau")
    assert not d.system.warnings
    d = clusterexp.derive("dimension 2 parameter g species A exchange g clusters landau")
    assert any("declare a range" in message for message, _ in d.system.warnings)


def test_lll_mutual_parameter_one_is_not_the_interpolated_value():
    # Mutual parameters have period 1 (physics.md sec. 2: alpha_12 = 1 is no coupling, every mixed
    # coefficient vanishes), while the interpolated LLL states reach only the left limit at 1: the
    # two-body relative states l + alpha_12 >= 0 gain l = -1 exactly at alpha_12 = 1 [derived].
    # The left limit is the one-level exclusion b_11 = -(g_12 + g_21) = -2 (physics.md, derived).
    d = clusterexp.derive("dimension 2 species A bose species B bose mutual A B = 1 clusters landau "
                          "derive cluster b[1,1]")
    assert d.coefficient("cluster", (1, 1)).value == -2
    assert any("left limit" in message for message, _ in d.system.warnings)
    closed = "dimension 2 parameter nu in [0, 1] species A bose species B bose mutual A B = nu clusters landau"
    assert any("[0, 1)" in message for message, _ in clusterexp.derive(closed).system.warnings)
    assert not clusterexp.derive(closed.replace("[0, 1]", "[0, 1)")).system.warnings
    assert not clusterexp.derive(closed.replace("= nu", "= nu/2").replace("[0, 1]", "[0, 1]")).system.warnings


@pytest.mark.parametrize("regime", ["pairphase", "landau", "exclusion"])
def test_boltzmann_species_are_refused_where_no_route_describes_them(regime):
    # a Boltzmann species has b_l = 0 for l >= 2 (physics.md R1); these routes would have treated it
    # as a boson (a_2 = -1/4 printed for a gas whose a_2 is 0)
    text = "dimension 2\nspecies A boltzmann\nspecies B bose\nclusters " + regime + "\nderive virial up to 2"
    with pytest.raises(clusterexp.errors.ClusterexpError, match="boltzmann") as error:
        clusterexp.derive(text)
    assert error.value.span.line == 2
    assert clusterexp.derive(text.replace(regime, "ideal")).coefficient("virial", (2, 0)).value == 0


# -- declared spectra: the harmonic regulator ---------------------------------------------------------------
@pytest.mark.parametrize("d", [1, 2, 3])
@pytest.mark.parametrize("word", ["bose", "fermi"])
def test_harmonic_regulator_reproduces_the_ideal_gas(d, word):
    """The rule b_n = (M_n/m_ref)^(d/2) lim c_n/Z_1 applied to the trapped ideal gas must give
    b_l = (+-1)^(l+1) l^(-1-d/2) [textbook ideal gases; the regulator: Comtet, Georgelin, Ouvry,
    J. Phys. A 22 (1989) 3917]: an independent check of the rule itself, for d = 1, 2, 3."""
    b = values(f"dimension {d} species A {word} clusters spectrum {{ }} derive cluster up to 6")
    for l in range(1, 7):
        sign = 1 if word == "bose" or l % 2 else -1
        assert same(b[(l,)], sign * sympy.Integer(l) ** (-1 - sympy.Rational(d, 2))), l


def test_harmonic_regulator_mass_weight_for_a_mixture():
    """An ideal mixture with mass ratio 2 in the trap: b_(l e_B) = (m_B/m_A)^(d/2) l^(-1-d/2) and no mixed
    coefficients, as route R1 says (independent route)."""
    b = values("dimension 2 species A bose species B mass 2 fermi clusters spectrum { } derive cluster up to 4")
    ideal = values("dimension 2 species A bose species B mass 2 fermi clusters ideal derive cluster up to 4")
    for n in b:
        assert same(b[n], ideal.get(n, 0)), n


def test_spectrum_with_explicit_levels_shift_and_trapped_override():
    """A one-species LLL written out by hand (levels 1/(1-x), shift g N(N-1)/2, weight |n|) equals the
    ready-made regime; overriding Z_1 by the same function changes nothing."""
    hand = values("dimension 2 parameter g in [0, 1] species A clusters spectrum { levels A = 1/(1 - x) "
                  "shift = g*A*(A - 1)/2 area count trapped Z[1] = 1/(1 - x) } derive cluster up to 6")
    ready = values("dimension 2 parameter g in [0, 1] species A exchange g clusters landau derive cluster up to 6")
    for n in ready:
        assert same(hand[n], ready[n]), n


CALOGERO = ("dimension 1 parameter g in [0, 1] species A bose clusters spectrum { shift = g*A*(A - 1)/2 AREA } "
            "derive virial up to 6")


def test_calogero_spectrum_in_a_trap_is_the_one_dimensional_exclusion_gas():
    """Bosonic oscillator levels shifted by g N(N-1)/2 (the Calogero-Sutherland model in a harmonic
    trap), through the harmonic regulator, give Wu's exclusion-statistics gas in d = 1 with statistics
    g [published equivalence: Murthy & Shankar, Phys. Rev. Lett. 73 (1994) 3331, cond-mat/9404096]:
    two independent routes (R2 on a declared spectrum, R5 by Lagrange inversion), and a_2 =
    (2g-1)/(2 sqrt 2) (physics.md, derived)."""
    trap = values(CALOGERO.replace("AREA", ""), "virial")
    wu = values("dimension 1 parameter g in [0, 1] species A bose clusters exclusion statistics A A = g "
                "derive virial up to 6", "virial")
    for n in wu:
        assert same(trap[n], wu[n]), n
    g = next(iter(trap[(2,)].free_symbols))
    assert same(trap[(2,)], (2 * g - 1) / (2 * sympy.sqrt(2)))
    assert trap[(3,)].has(g)  # the homogeneous 1D gas: a_3 does depend on g


def test_harmonically_confined_exclusion_gas_only_a2_carries_the_statistics():
    """Counted per one-body partition function (`area one`), the trapped Calogero gas has a_2 = (2g-1)/4
    and g-independent a_n = B_{n-1}/n! for n >= 3 [published: Murthy & Shankar, Phys. Rev. Lett. 73
    (1994) 3331 (only a_2 carries the statistics); the values are those of the 2D gas, whose density
    of states is the same constant (physics.md); Bernoulli numbers from sympy]."""
    a = values(CALOGERO.replace("AREA", "area one"), "virial")
    g = next(iter(a[(2,)].free_symbols))
    assert same(a[(2,)], (2 * g - 1) / 4)
    for n in range(3, 7):
        assert a[(n,)] == sympy.bernoulli(n - 1) / sympy.factorial(n), n


# -- bad input ----------------------------------------------------------------------------------------------
@pytest.mark.parametrize("text, message", [
    ("dimension 2 species A species B statistics matrix [[1, 0, 0], [0, 1, 0]] clusters exclusion",
     "the statistics matrix is 2 x 3 but 2 species are declared"),
    ("dimension 2 species A species B statistics matrix [[1, 0], [0]] clusters exclusion",
     "the statistics matrix is 2 rows of lengths 2, 1"),
    ("dimension 2 species A statistics A A = 1/2 clusters landau", "a statistics matrix is only used with"),
    ("dimension 2 species A statistics A C = 1 clusters exclusion", "unknown species 'C'"),
    ("dimension 2 species A statistics A A = 1 statistics A A = 0 clusters exclusion", "statistics entry g[A,A] is given twice"),
    ("dimension 3 species A clusters landau", "the lowest Landau level lives in the plane"),
    ("dimension 2 species A exchange 1/2 clusters ideal", "`clusters ideal` needs bose, fermi or boltzmann species"),
    ("dimension 2 species A species B mutual A B = 1/2 clusters ideal", "ideal gases have no pair phases"),
    ("dimension 2 species A clusters exclusion lattice", "`clusters exclusion` takes continuum or level"),
    ("dimension 2 species A clusters spectrum { levels A = 1/(1 - x)  shift = A^3  area count }",
     "no thermodynamic limit for the cluster [3]"),
    ("dimension 2 species A clusters spectrum { levels A = 1 + x }", "the one-body level function must diverge"),
    ("dimension 2 species A clusters spectrum { levels A = 3 }", "this function of x"),
    ("dimension 2 species A clusters spectrum { levels A = sin(x) }", "cannot expand sin(x)"),
    ("dimension 2 species A exchange 1/2 clusters spectrum { }", "say how A fills the levels"),
    ("dimension 2 species A clusters spectrum { area volume }", "`area` is mass, count or one"),
    ("dimension 2 parameter x species A clusters spectrum { }", "`x` stands for exp(-beta hbar omega)"),
    ("dimension 2 species A clusters spectrum { trapped Z[1] = 1/(1 - x)^3 }",
     "the trapped partition function is more singular"),
])
def test_regime_bad_input(text, message):
    with pytest.raises(InputError) as caught:
        d = clusterexp.derive(text)
        [c.value for c in d]
    error = caught.value
    assert error.message.startswith(message), error.message
    assert error.span is not None and error.span.line == 1


def test_regime_bad_input_from_the_command_line(cli):
    result = cli("run", "-e", "dimension 2 species A clusters spectrum { levels A = 1/(1 - x) shift = A^3 area count }")
    assert result.returncode == 2 and "Traceback" not in result.stderr
    assert "no thermodynamic limit" in result.stderr and "^" in result.stderr
