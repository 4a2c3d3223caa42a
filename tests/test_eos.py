"""The exact equation of state at finite density (clusterexp.eos). Each check names its outside
source: a published value, a textbook table, an independent route written here with mpmath, or the
tool's own virial series (the series machinery, an independent route to the same pressure)."""
from fractions import Fraction

import mpmath
import pytest
import sympy

import clusterexp
from clusterexp.language.build import build_system
from clusterexp.eos import equation_of_state
from clusterexp.errors import InputError, NotSupportedYet

MATRIX_3 = "[[1/2, 1/3, 0], [1/5, 2/3, 1/7], [1/4, 0, 1/3]]"  # non-symmetric on purpose
MATRIX_2 = "[[1/2, 1/3], [1/5, 2/3]]"


def eos_of(text):
    return equation_of_state(build_system(text))


def value(eos, quantity, densities, digits=20, **kw):
    out = eos.evaluate(quantity, densities, digits, **kw)
    return out if len(out) > 1 else next(iter(out.values()))


def close(x, y, digits):
    return abs(x - y) <= mpmath.mpf(10) ** (-digits) * max(1, abs(y))


# -- ideal gases -----------------------------------------------------------------------------------------
@pytest.mark.parametrize("rho", ["1/10", "1", "7/2"])
def test_2d_ideal_bose_and_fermi_against_the_polylogarithm(rho):
    """2D Bose rho lambda^2 = -ln(1 - z), beta P lambda^2 = Li_2(z); Fermi rho lambda^2 = ln(1 + z),
    beta P lambda^2 = -Li_2(-z) [textbook; mpmath's polylog as the independent route]."""
    with mpmath.workdps(30):
        r = mpmath.mpf(Fraction(rho).numerator) / Fraction(rho).denominator
        bose, fermi = eos_of("dimension 2 species A bose clusters ideal"), eos_of("dimension 2 species A fermi clusters ideal")
        z = value(bose, "fugacity", {"A": rho}, 25)
        assert close(-mpmath.log(1 - z), r, 24)
        assert close(value(bose, "pressure", {"A": rho}, 25), mpmath.polylog(2, z), 24)
        z = value(fermi, "fugacity", {"A": rho}, 25)
        assert close(mpmath.log(1 + z), r, 24)
        assert close(value(fermi, "pressure", {"A": rho}, 25), -mpmath.polylog(2, -z), 24)
        assert close(value(fermi, "chemical_potential", {"A": rho}, 25), mpmath.log(z), 24)


def _virial_fit(eos, digits=60, points=12, h=Fraction(1, 10000)):
    """a_1..a_points from the exact pressure at small densities k h (a polynomial through the points)."""
    with mpmath.workdps(digits + 20):
        xs = [mpmath.mpf(k * h.numerator) / h.denominator for k in range(1, points + 1)]
        ps = [value(eos, "pressure", {"A": k * h}, digits) for k in range(1, points + 1)]
        matrix = mpmath.matrix([[x ** n for n in range(1, points + 1)] for x in xs])
        return list(mpmath.lu_solve(matrix, mpmath.matrix(ps)))


@pytest.mark.parametrize("word, sign", [("bose", 1), ("fermi", -1)])
def test_3d_ideal_virial_coefficients_from_the_exact_eos_match_the_textbook_table(word, sign):
    """3D Bose a_2..a_5 = -0.17678, -0.0033001, -0.00011129, -0.0000035405, Fermi a_n = (-1)^(n+1) a_n(Bose)
    [published: Pathria & Beale, Statistical Mechanics, 3rd ed., sections 7.1 and 8.1], read off the exact
    equation of state by a polynomial through its values at small density."""
    a = _virial_fit(eos_of(f"dimension 3 species A {word} clusters ideal"))
    assert abs(a[0] - 1) < 1e-20
    table = [-0.17678, -0.0033001, -0.00011129, -0.0000035405]
    for n, expected in zip(range(2, 6), table):
        assert abs(a[n - 1] - sign ** (n + 1) * expected) < 6e-5 * abs(expected), n


def test_3d_bose_condensation_keeps_the_pressure_at_zeta_5_2():
    """Beyond rho lambda^3 = zeta(3/2) the fugacity stays 1 and beta P lambda^3 = zeta(5/2) [textbook: Pathria &
    Beale, Statistical Mechanics, 3rd ed., section 7.1]; mpmath's zeta as the independent route."""
    eos = eos_of("dimension 3 species A bose clusters ideal")
    assert eos.boundary.kind == "condensation"
    with mpmath.workdps(25):
        assert close(value(eos, "pressure", {"A": 3}, 20), mpmath.zeta(2.5), 19)
        assert value(eos, "fugacity", {"A": 3}, 20) == 1
        below = value(eos, "fugacity", {"A": "2.6"}, 20)
        assert close(mpmath.polylog(1.5, below), mpmath.mpf("2.6"), 19)
    with pytest.raises(InputError, match="infinite beyond Bose-Einstein condensation"):
        eos.evaluate("compressibility", {"A": 3})
    assert sympy.N(eos.ray_boundary([1]).at - sympy.zeta(sympy.Rational(3, 2))) == 0


def test_ideal_mixture_with_masses_and_d_1():
    """rho_i lambda^d = (m_i/m_ref)^(d/2) g_(d/2)(z_i) per species, a Boltzmann species z = density / b_1
    [textbook ideal gases]; mpmath's polylog as the independent route."""
    eos = eos_of("dimension 1 species A bose species B mass 4 fermi species C mass 9 boltzmann clusters ideal")
    z = value(eos, "fugacity", {"A": "1/3", "B": 5, "C": "3/2"}, 20)
    with mpmath.workdps(30):
        assert close(mpmath.polylog(0.5, z["z_A"]), mpmath.mpf(1) / 3, 19)
        assert close(-2 * mpmath.re(mpmath.polylog(0.5, -z["z_B"])), 5, 19)
        assert close(z["z_C"], mpmath.mpf("0.5"), 19)
        pressure = value(eos, "pressure", {"A": "1/3", "B": 5, "C": "3/2"}, 20)
        expected = mpmath.polylog(1.5, z["z_A"]) - 2 * mpmath.re(mpmath.polylog(1.5, -z["z_B"])) + mpmath.mpf(1.5)
        assert close(pressure, expected, 19)


def _compressibility_by_differences(eos, densities, digits=20):
    """1 / (d beta P / d t) along densities t x (sum x = 1), by mpmath's numerical derivative (independent route)."""
    total = sum(densities)
    x = [d / total for d in densities]
    with mpmath.workdps(digits + 10):
        slope = mpmath.diff(lambda t: value(eos, "pressure", [t * xi for xi in x], digits + 25), total)
        return 1 / slope


@pytest.mark.parametrize("text, densities", [
    ("dimension 3 species A bose species B fermi mass 2 clusters ideal", [Fraction(1, 2), Fraction(3)]),
    (f"dimension 2 species A species B species C statistics matrix {MATRIX_3} clusters exclusion level",
     [Fraction(1, 5), Fraction(1, 4), Fraction(1, 3)]),
])
def test_compressibility_is_the_inverse_slope_of_the_pressure(text, densities):
    """rho k_B T kappa_T = [d(beta P)/d rho]^(-1) at fixed composition [definition]; the slope by numerical
    differentiation of the pressure (mpmath.diff) as the independent route."""
    eos = eos_of(text)
    mp_densities = [mpmath.mpf(d.numerator) / d.denominator for d in densities]
    assert close(value(eos, "compressibility", densities), _compressibility_by_differences(eos, mp_densities, 12), 10)


# -- one level and the lowest Landau level ------------------------------------------------------------------
@pytest.mark.parametrize("g", ["0", "3/10", "7/10", "1"])
def test_one_species_lll_closed_form_and_divergence(g):
    """beta P / rho_L = ln[1 + nu/(1 - g nu)], diverging at nu = 1/g [published: Dasnieres de Veigy & Ouvry,
    Phys. Rev. Lett. 72 (1994) 600]; evaluated here with mpmath directly."""
    eos = eos_of(f"dimension 2 species A exchange {g} clusters landau")
    gv = Fraction(g)
    with mpmath.workdps(30):
        for nu in (Fraction(1, 10), Fraction(1, 2), Fraction(9, 10)):
            if gv * nu >= 1:
                continue
            num, gm = mpmath.mpf(nu.numerator) / nu.denominator, mpmath.mpf(gv.numerator) / gv.denominator
            expected = mpmath.log(1 + num / (1 - gm * num))
            assert close(value(eos, "pressure", {"A": nu}, 25), expected, 24)
        if gv:
            near = 1 / gv - Fraction(1, 10 ** 12)
            assert value(eos, "pressure", {"A": near}, 25) > 20  # diverges like ln(1/(1 - g nu))
            with pytest.raises(InputError, match=f"close packing is at total density {1 / gv}"):
                eos.evaluate("pressure", {"A": 1 / gv})
            assert eos.ray_boundary([1]).at == sympy.Rational(gv.denominator, gv.numerator)
        else:
            assert eos.ray_boundary([1]).at is None


def test_g_0_and_1_are_bosons_and_fermions_on_one_level():
    """One level: bosons Xi = 1/(1 - z), so n = z/(1 - z), beta P = ln(1 + n); fermions Xi = 1 + z, so
    n = z/(1 + z), beta P = -ln(1 - n) [derived from the one-level grand partition functions]."""
    bose = eos_of("dimension 2 species A bose clusters exclusion level")
    fermi = eos_of("dimension 2 species A fermi clusters exclusion level")
    with mpmath.workdps(30):
        for n in (Fraction(1, 7), Fraction(2, 3), Fraction(5)):
            nm = mpmath.mpf(n.numerator) / n.denominator
            assert close(value(bose, "pressure", {"A": n}, 25), mpmath.log(1 + nm), 24)
            assert close(value(bose, "fugacity", {"A": n}, 25), nm / (1 + nm), 24)
            if n < 1:
                assert close(value(fermi, "pressure", {"A": n}, 25), -mpmath.log(1 - nm), 24)
                assert close(value(fermi, "fugacity", {"A": n}, 25), nm / (1 - nm), 24)
    with pytest.raises(InputError, match="beyond close packing"):
        fermi.evaluate("pressure", {"A": 5})


def _taylor(formula, symbols, order):
    s = sympy.Symbol("s")
    series = sympy.series(formula.xreplace({x: s * x for x in symbols}), s, 0, order + 1).removeO()
    poly = sympy.Poly(sympy.expand(series.subs(s, 1)), *symbols)
    return {m: c for m, c in zip(poly.monoms(), poly.coeffs())}


@pytest.mark.parametrize("text", [
    f"dimension 2 species A species B statistics matrix {MATRIX_2} clusters exclusion level",
    "dimension 2 species A exchange 1/3 species B exchange 3/4 mutual A B = 2/5 clusters landau",
    "dimension 2 species A exchange 1/3 species B exchange 3/4 mutual A B = 2/5 clusters landau spectrum",
])
def test_several_species_closed_form_against_the_virial_series_exactly(text):
    """The closed form's Taylor coefficients are the tool's virial coefficients (independent route: the
    cluster -> virial series machinery on Wu's cluster coefficients) [several species: Isakov, Mashkevich,
    Ouvry, Nucl. Phys. B 448 (1995) 457]; the non-symmetric matrix tests the index convention; `landau
    spectrum` reaches the same coefficients through the harmonic regulator on the LLL spectrum (route R4)."""
    order = 6
    eos = eos_of(text)
    taylor = _taylor(eos.pressure_formula, eos.density_symbols, order)
    virial = {c.index: c.value for c in clusterexp.derive(text + f" derive virial up to {order}").of_kind("virial")}
    for index, a in virial.items():
        assert sympy.nsimplify(taylor.get(index, 0) - a) == 0, index
    assert all(index in virial or c == 0 for index, c in taylor.items())


def test_three_species_closed_form_against_the_virial_series_numerically():
    """3 x 3 non-symmetric matrix: the exact pressure at small densities against the tool's truncated virial
    series (independent route); the difference is the first omitted order."""
    text = f"dimension 2 species A species B species C statistics matrix {MATRIX_3} clusters exclusion level"
    eos = eos_of(text)
    virial = {c.index: c.value for c in clusterexp.derive(text + " derive virial up to 9").of_kind("virial")}
    densities = [Fraction(1, 100), Fraction(3, 200), Fraction(1, 50)]
    series = sum(a * sympy.prod([sympy.Rational(d.numerator, d.denominator) ** k for d, k in zip(densities, n)])
                 for n, a in virial.items())
    exact = value(eos, "pressure", densities, 30)
    assert abs(exact - mpmath.mpf(sympy.N(series, 40)._mpf_)) < 1e-14  # (0.045)^10 ~ 3e-14 * O(1)


def test_closed_form_against_a_direct_solution_of_wus_equations():
    """Independent route: at given fugacities solve Wu's equations u_i = z_i (1 + u_i) prod_j (1 + u_j)^(-g_ji)
    with mpmath's findroot (non-symmetric 3 x 3 matrix), differentiate beta P = sum ln(1 + u_i) numerically
    for the densities n_i = z_i dP/dz_i, then the closed form at those densities must give back P and z."""
    g = [[Fraction(1, 2), Fraction(1, 3), 0], [Fraction(1, 5), Fraction(2, 3), Fraction(1, 7)],
         [Fraction(1, 4), 0, Fraction(1, 3)]]
    eos = eos_of(f"dimension 2 species A species B species C statistics matrix {MATRIX_3} clusters exclusion level")
    with mpmath.workdps(40):
        gm = [[mpmath.mpf(x.numerator) / x.denominator if x else mpmath.mpf(0) for x in row] for row in g]
        z = [mpmath.mpf("0.8"), mpmath.mpf("1.7"), mpmath.mpf("0.3")]

        def pressure(*zs):
            def equations(*u):
                return [u[i] - zs[i] * (1 + u[i]) * mpmath.fprod((1 + u[j]) ** (-gm[j][i]) for j in range(3))
                        for i in range(3)]
            u = mpmath.findroot(equations, list(zs))
            return mpmath.fsum(mpmath.log(1 + ui) for ui in u)
        P = pressure(*z)
        n = [z[i] * mpmath.diff(lambda t: pressure(*[t if j == i else z[j] for j in range(3)]), z[i]) for i in range(3)]
        got = value(eos, "pressure", n, 30)
        assert close(got, P, 25)
        back = value(eos, "fugacity", n, 30)
        for i, name in enumerate("ABC"):
            assert close(back[f"z_{name}"], z[i], 25)


def test_lll_and_one_level_give_the_same_numbers_with_the_exchange_matrix():
    """R4/R5: lowest-Landau-level anyons have the exclusion equation of state with g_ii = alpha_i, g_ij =
    alpha_ij [published: Isakov, Mashkevich, Ouvry, Nucl. Phys. B 448 (1995) 457]."""
    lll = eos_of("dimension 2 species A exchange 1/3 species B exchange 3/4 mutual A B = 2/5 clusters landau")
    level = eos_of("dimension 2 species A species B statistics matrix [[1/3, 2/5], [2/5, 3/4]] clusters exclusion level")
    for quantity in ("pressure", "chemical_potential", "compressibility"):
        one = lll.evaluate(quantity, ["1/4", "1/2"], 20)
        two = level.evaluate(quantity, ["1/4", "1/2"], 20)
        assert [str(v) for v in one.values()] == [str(v) for v in two.values()]


def test_symbolic_matrix_needs_values_and_checks_the_declared_range():
    eos = eos_of("dimension 2 parameter g in [0, 1] species A exchange g clusters exclusion level")
    assert set(eos.free_parameters()) == {"g"}
    with pytest.raises(InputError, match="no value for g"):
        eos.evaluate("pressure", {"A": "1/2"})
    with pytest.raises(InputError, match="outside its declared range"):
        eos.evaluate("pressure", {"A": "1/2"}, parameters={"g": 2})
    with mpmath.workdps(25):
        expected = mpmath.log(1 + mpmath.mpf("0.5") / (1 - mpmath.mpf("0.25")))
        assert close(value(eos, "pressure", {"A": "1/2"}, 20, parameters={"g": "1/2"}), expected, 19)


# -- continuum exclusion statistics ---------------------------------------------------------------------------
@pytest.mark.parametrize("d, g, word", [(2, 0, "bose"), (2, 1, "fermi"), (1, 1, "fermi"), (3, 0, "bose")])
def test_continuum_exclusion_at_g_0_and_1_is_the_ideal_gas(d, g, word):
    """The momentum-cell integral at g = 0 / 1 against mpmath's polylogarithm (independent route: textbook
    ideal Bose / Fermi gas, rho lambda^d = g_(d/2)(z), beta P lambda^d = g_(d/2+1)(z))."""
    eos = eos_of(f"dimension {d} species A exchange {g} clusters exclusion")
    rho = "3/2" if d != 3 else "1"
    z = value(eos, "fugacity", {"A": rho}, 12)
    sign = 1 if word == "bose" else -1
    with mpmath.workdps(25):
        def gs(s):
            return sign * mpmath.re(mpmath.polylog(s, sign * z))
        assert close(gs(mpmath.mpf(d) / 2), mpmath.mpf(Fraction(rho).numerator) / Fraction(rho).denominator, 11)
        assert close(value(eos, "pressure", {"A": rho}, 12), gs(mpmath.mpf(d) / 2 + 1), 11)


def test_continuum_2d_one_species_closed_form():
    """2D, one species: z = (e^rho - 1) e^((g-1) rho) and beta P lambda^2 = -Li_2(1 - e^rho) + (g-1) rho^2/2
    [derived in docs/equation_of_state.md; its virial coefficients are the published/derived a_2 = (2g-1)/4,
    a_n = B_(n-1)/n!], evaluated with mpmath, against the numerical momentum-cell integral."""
    eos = eos_of("dimension 2 species A exchange 1/3 clusters exclusion")
    with mpmath.workdps(25):
        r, g = mpmath.mpf(2), mpmath.mpf(1) / 3
        assert close(value(eos, "fugacity", {"A": 2}, 12), mpmath.expm1(r) * mpmath.exp((g - 1) * r), 11)
        expected = -mpmath.polylog(2, 1 - mpmath.exp(r)) + (g - 1) * r ** 2 / 2
        assert close(value(eos, "pressure", {"A": 2}, 12), expected, 11)
        with mpmath.workdps(30):
            formula = eos.pressure_formula.subs(eos.density_symbols[0], 2)
            assert close(mpmath.mpf(sympy.N(formula, 30)._mpf_), expected, 25)
        slope = mpmath.diff(lambda t: -mpmath.polylog(2, 1 - mpmath.exp(t)) + (g - 1) * t ** 2 / 2, r)
        assert close(value(eos, "compressibility", {"A": 2}, 12), 1 / slope, 10)


def test_continuum_mixture_with_masses_against_the_virial_series():
    """Two species, non-symmetric matrix, unequal masses, d = 3: the numerical integral at small density
    against the tool's virial series to fourth order (independent route: Lagrange inversion plus the
    cluster -> virial machinery); the difference is fifth order."""
    text = f"dimension 3 species A species B mass 2 statistics matrix {MATRIX_2} clusters exclusion"
    eos = eos_of(text)
    virial = {c.index: c.value for c in clusterexp.derive(text + " derive virial up to 4").of_kind("virial")}
    densities = [Fraction(1, 100), Fraction(1, 50)]
    series = sum(a * sympy.prod([sympy.Rational(d.numerator, d.denominator) ** k for d, k in zip(densities, n)])
                 for n, a in virial.items())
    exact = value(eos, "pressure", densities, 12)
    assert abs(exact - mpmath.mpf(sympy.N(series, 30)._mpf_)) < 1e-9  # (0.03)^5 = 2.4e-8 times small a_5
    assert abs(exact - sum(densities)) > 1e-6  # the statistics do show at this density
    t, x = sum(densities), [d / sum(densities) for d in densities]
    slope = sum(a * sympy.prod([sympy.Rational(xi.numerator, xi.denominator) ** k for xi, k in zip(x, n)])
                * sum(n) * sympy.Rational(t.numerator, t.denominator) ** (sum(n) - 1) for n, a in virial.items())
    assert abs(value(eos, "compressibility", densities, 12) - 1 / mpmath.mpf(sympy.N(slope, 30)._mpf_)) < 1e-6


def test_continuum_cell_hessian_against_finite_differences():
    """The per-cell d n_i / d ln xi_k (closed form in docs/equation_of_state.md) against mpmath.diff of the
    cell densities (independent numerical route), non-symmetric matrix."""
    from clusterexp.eos.continuum import Cells
    ctx = mpmath.MPContext()
    ctx.dps = 30
    g = [[ctx.mpf(1) / 2, ctx.mpf(1) / 3], [ctx.mpf(1) / 5, ctx.mpf(2) / 3]]
    log_z = [ctx.mpf("0.4"), ctx.mpf("-0.3")]
    cells = Cells(ctx, g, [ctx.one, ctx.one], 2)
    _, _, h = cells.cell(ctx.zero, log_z)
    for k in range(2):
        for i in range(2):
            def n_i(t):
                shifted = [t if j == k else log_z[j] for j in range(2)]
                return Cells(ctx, g, [ctx.one, ctx.one], 2).cell(ctx.zero, shifted)[1][i]
            assert abs(ctx.diff(n_i, log_z[k]) - h[i][k]) < ctx.mpf(10) ** -20


# -- where it ends; radius of the virial series -------------------------------------------------------------
@pytest.mark.parametrize("g, exact", [(Fraction(7, 10), Fraction(10, 7)), (Fraction(3, 10), Fraction(10, 7))])
def test_lll_virial_radius_estimate_and_exact_radius(g, exact):
    """c_n = [g^n - (g-1)^n]/n [published: Dasnieres de Veigy & Ouvry 1994] has radius min(1/g, 1/|g-1|)
    [derived]: for g = 3/10 the series fails at nu = 10/7, well before close packing at 10/3."""
    text = f"dimension 2 species A exchange {g} clusters landau"
    eos = eos_of(text)
    estimate = eos.series_radius(clusterexp.derive(text + " derive virial up to 40"))
    assert estimate.exact == sympy.Rational(exact.numerator, exact.denominator)
    assert estimate.boundary == sympy.Rational(g.denominator, g.numerator)
    for guess in (estimate.ratio, estimate.root):
        assert abs(guess - float(exact)) < 0.1 * float(exact)
    assert "ESTIMATED" in estimate.text


def test_2d_ideal_virial_radius_is_2_pi():
    """2D Bose a_n = B_(n-1)/n! [published: Viefers, Ravndal, Haugset, Am. J. Phys. 63 (1995) 369]: the
    generating function t/(e^t - 1) has poles at +-2 pi i, so the radius is 2 pi [derived]."""
    text = "dimension 2 species A bose clusters ideal"
    estimate = eos_of(text).series_radius(clusterexp.derive(text + " derive virial up to 24"))
    assert estimate.exact == 2 * sympy.pi
    assert abs(estimate.root - 2 * mpmath.pi) < 0.1 * 2 * mpmath.pi
    assert abs(estimate.ratio - 2 * mpmath.pi) < 0.1 * 2 * mpmath.pi


def test_three_species_exact_radius_against_the_series():
    """The exact radius along a ray (the nearest zero of the linear factors of the closed form) against
    the ratio estimate of the tool's virial series (independent route) at high order."""
    text = f"dimension 2 species A species B species C statistics matrix {MATRIX_3} clusters exclusion level"
    eos = eos_of(text)
    estimate = eos.series_radius(clusterexp.derive(text + " derive virial up to 16"), direction=[1, 2, 1])
    assert abs(estimate.ratio - float(estimate.exact)) < 0.15 * float(estimate.exact)
    assert estimate.boundary >= estimate.exact


# -- bad input -------------------------------------------------------------------------------------------------
def test_bad_densities_and_quantities_are_refused_with_a_message():
    eos = eos_of(f"dimension 2 species A species B statistics matrix {MATRIX_2} clusters exclusion level")
    with pytest.raises(InputError, match="density of B is negative"):
        eos.evaluate("pressure", {"A": "1/2", "B": "-1/4"})
    with pytest.raises(InputError, match="beyond close packing.*species B"):
        eos.evaluate("pressure", {"A": "1/2", "B": "3/2"})
    with pytest.raises(InputError, match="does not define 'entropy'"):
        eos.evaluate("entropy", {"A": "1/2", "B": "1/4"})
    with pytest.raises(InputError, match="no density for B"):
        eos.evaluate("pressure", {"A": "1/2"})
    with pytest.raises(InputError, match="unknown species C"):
        eos.evaluate("pressure", {"A": "1/2", "B": 0, "C": 1})


def test_regimes_without_an_exact_eos_point_to_the_virial_series():
    system = build_system("dimension 2 parameter alpha in [0, 1] species A exchange alpha clusters pairphase")
    with pytest.raises(InputError, match="no exact equation of state for two-body pair phases.*virial series") as e:
        equation_of_state(system)
    assert e.value.span is not None and e.value.span.line == 1
    with pytest.raises(InputError, match="virial series"):
        equation_of_state(build_system("dimension 2 species A bose clusters generic"))


def test_continuum_bosons_beyond_condensation_are_not_supported_yet():
    eos = eos_of("dimension 3 species A exchange 0 clusters exclusion")
    with pytest.raises(NotSupportedYet, match="condenses"):
        eos.evaluate("pressure", {"A": 3})


def test_global_precision_is_left_alone():
    before = mpmath.mp.dps
    eos_of("dimension 2 species A exchange 1/2 clusters landau").evaluate("pressure", {"A": "1/2"}, 50)
    assert mpmath.mp.dps == before


def test_package_docstring_example_runs():
    """The API example in clusterexp.eos (a doctest; ln(1 + (1/2)/(1 - 1/4)) = ln(5/3))."""
    import doctest

    import clusterexp.eos
    assert doctest.testmod(clusterexp.eos).failed == 0
    with mpmath.workdps(20):
        assert abs(mpmath.log(mpmath.mpf(5) / 3) - mpmath.mpf("0.510825623766")) < 1e-12


def test_printed_forms_text_latex_json():
    """The formula is printed in text, LaTeX and JSON (JSON serializable; the LaTeX and text name the
    same closed form; the boundary relations are the close-packing inequalities)."""
    import json
    eos = eos_of("dimension 2 parameter g in [0, 1] species A exchange g clusters landau")
    text = "\n".join(eos.formula_lines())
    line = next(l for l in eos.formula_lines() if l.startswith("beta P / rho_L = "))
    g, nu = sympy.symbols("g nu_A")
    assert sympy.simplify(sympy.sympify(line.split(" = ")[1]) - sympy.log(1 + nu / (1 - g * nu))) == 0
    assert "close packing at nu_A = 1/g (for g > 0)" in text
    assert any(r"\log" in line for line in eos.latex_lines())
    record = json.loads(json.dumps(eos.as_json()))
    assert record["boundary"]["kind"] == "close packing" and record["boundary"]["relations"] == ["g*nu_A < 1"]
    ideal = eos_of("dimension 3 species A fermi clusters ideal")
    assert ideal.pressure_formula is None and any("polylog(3/2, -z_A)" in line for line in ideal.formula_lines())


def test_continuum_mixture_at_finite_density_against_a_direct_integration():
    """Independent route written here: at given fugacities, integrate over momentum cells with mpmath.quad,
    each cell solving Wu's equations (tool's convention, u_i = xi_i (1 + u_i) prod_j (1 + u_j)^(-g_ji)) with
    mpmath's findroot and its densities from n_i = xi_i d/dxi_i sum_j ln(1 + u_j) by mpmath.diff; the
    equation of state at the resulting densities must return those fugacities and that pressure.
    d = 2, non-symmetric matrix, m_B = 2 m_A (beta eps_B = x/2 in units of the reference)."""
    g = [[mpmath.mpf(1) / 2, mpmath.mpf(1) / 3], [mpmath.mpf(1) / 5, mpmath.mpf(2) / 3]]
    ratios = [1, mpmath.mpf(1) / 2]
    with mpmath.workdps(20):
        z = [mpmath.mpf("0.7"), mpmath.mpf("1.3")]

        def cell_pressure(xi):
            def equations(*u):
                return [u[i] - xi[i] * (1 + u[i]) * mpmath.fprod((1 + u[j]) ** (-g[j][i]) for j in range(2))
                        for i in range(2)]
            u = mpmath.findroot(equations, list(xi))
            return mpmath.fsum(mpmath.log(1 + ui) for ui in u)

        def xi_at(x):
            return [z[i] * mpmath.exp(-ratios[i] * x) for i in range(2)]

        def n_at(x, i):
            xi = xi_at(x)
            return xi[i] * mpmath.diff(lambda t: cell_pressure([t if j == i else xi[j] for j in range(2)]), xi[i])
        # d = 2: d^2k lambda^2/(2 pi)^2 = dx
        pressure = mpmath.quad(lambda x: cell_pressure(xi_at(x)), [0, 2, mpmath.inf])
        rho = [mpmath.quad(lambda x, i=i: n_at(x, i), [0, 2, mpmath.inf]) for i in range(2)]
    eos = eos_of(f"dimension 2 species A species B mass 2 statistics matrix {MATRIX_2} clusters exclusion")
    back = value(eos, "fugacity", rho, 12)
    assert close(back["z_A"], z[0], 11) and close(back["z_B"], z[1], 11)
    assert close(value(eos, "pressure", rho, 12), pressure, 11)


def test_continuum_digits_are_honoured():
    """25 digits of the 2D one-species gas against its closed form (docs/equation_of_state.md, derived),
    evaluated with mpmath: the quadrature and the inversion reach the requested precision."""
    eos = eos_of("dimension 2 species A exchange 2/5 clusters exclusion")
    with mpmath.workdps(40):
        r, g = mpmath.mpf(3) / 4, mpmath.mpf(2) / 5
        assert close(value(eos, "pressure", {"A": "3/4"}, 25),
                     -mpmath.polylog(2, 1 - mpmath.exp(r)) + (g - 1) * r ** 2 / 2, 25)


def test_continuum_2d_virial_radius_is_2_pi():
    """2D one-species exclusion gas: a_2 = (2g-1)/4, a_n = B_(n-1)/n! (n >= 3) [derived, physics notes], so
    the radius is the 2D Bose gas's 2 pi; the ratio and root estimates from the tool's coefficients."""
    text = "dimension 2 species A exchange 1/3 clusters exclusion"
    estimate = eos_of(text).series_radius(clusterexp.derive(text + " derive virial up to 24"))
    assert estimate.exact == 2 * sympy.pi and estimate.boundary is None
    assert abs(estimate.root - 2 * mpmath.pi) < 0.1 * 2 * mpmath.pi


def test_fugacity_formula_against_the_series_machinery_and_the_numbers():
    """The printed z_i(n) of a non-symmetric two-species level gas: its Taylor coefficients are the tool's
    fugacity expansion z_i(rho) (independent route: series reversion of Wu's cluster coefficients), and
    the printed formulas evaluate to the numbers `evaluate` gives (formula and numeric path agree)."""
    text = f"dimension 2 species A species B statistics matrix {MATRIX_2} clusters exclusion level"
    eos = eos_of(text)
    series = clusterexp.derive(text + " derive fugacity up to 5").of_kind("fugacity")
    for i, name in enumerate(eos.names):
        taylor = _taylor(eos.fugacity_formulas[i], eos.density_symbols, 5)
        mine = {c.index: c.value for c in series if c.component == name}
        assert mine and all(sympy.nsimplify(taylor.get(n, 0) - a) == 0 for n, a in mine.items()), name
    point = {eos.density_symbols[0]: sympy.Rational(1, 3), eos.density_symbols[1]: sympy.Rational(1, 4)}
    numbers = value(eos, "fugacity", ["1/3", "1/4"], 25)
    with mpmath.workdps(30):
        for i, name in enumerate(eos.names):
            expected = mpmath.mpf(sympy.N(eos.fugacity_formulas[i].xreplace(point), 30)._mpf_)
            assert close(numbers[f"z_{name}"], expected, 24)
        assert close(value(eos, "compressibility", ["1/3", "1/4"], 25),
                     mpmath.mpf(sympy.N(eos.compressibility_formula.xreplace(point), 30)._mpf_), 24)


def test_check_densities_points_at_the_users_line():
    """A density beyond close packing, checked from the System, renders at the statement's place with a
    caret (file, line, column), as every input error does; a regime without an exact EOS does too."""
    from clusterexp.eos import check_densities
    from clusterexp.errors import Span
    span = Span("film.gas", 4, 10, line_text="evaluate pressure at nu_A = 2")
    system = build_system("dimension 2 species A exchange 7/10 clusters landau")
    assert check_densities(system, {"A": "1/2"}, span).densities == (sympy.Rational(1, 2),)
    with pytest.raises(InputError) as error:
        check_densities(system, {"A": 2}, span)
    rendered = error.value.render()
    assert rendered.startswith("film.gas:4:10: error: densities beyond close packing") and "10/7" in rendered
    assert rendered.splitlines()[-1] == "    " + " " * 9 + "^"
    pairs = build_system("dimension 2 species A exchange 1/2 clusters pairphase")
    with pytest.raises(InputError, match="virial series") as error:
        check_densities(pairs, {"A": 1}, span)
    assert error.value.span == span
