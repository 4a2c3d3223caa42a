"""The equation of state through the input language: `evaluate`, `tabulate`, `plot` of the pressure,
fugacities, chemical potentials and compressibility at densities, and `equation of state`. Each physics
check names its outside source (textbook formula with mpmath's polylog, the published closed form, a
direct mpmath solution of Wu's equations, or the tool's own virial series as an independent route)."""
import csv
import json
from fractions import Fraction

import mpmath
import pytest
import sympy

from clusterexp import InputError
from clusterexp.derivation import derive_system
from clusterexp.language.build import build_system
from clusterexp.products.states import virial_polynomial
from clusterexp.routes import REGIMES

from conftest import ROOT, run_cli

FILM = ROOT / "worked" / "film_equation_of_state" / "input.gas"
BILAYER = ROOT / "worked" / "quantum_hall_bilayer_pressure" / "input.gas"
LLL2 = "dimension 2 species A exchange 1/3 species B exchange 1/5 mutual A B = 1/4 clusters landau"


def json_of(path_or_text, *extra):
    args = ["run", "-e", path_or_text] if isinstance(path_or_text, str) else ["run", str(path_or_text)]
    result = run_cli(*args, "--format", "json", "--no-files", *extra)
    assert result.returncode == 0, result.stderr
    return json.loads(result.stdout)["equation_of_state"]


def mp(text):
    return mpmath.mpf(text)


def wu_solution(g, z):
    """Wu's equations u_i = z_i (1 + u_i) prod_j (1 + u_j)^(-g_ji) in the tool's index convention,
    solved with mpmath's root finder (independent of the closed form); returns the pressure
    sum_i ln(1 + u_i) as a function of the fugacities, to be differentiated numerically."""
    K = len(z)

    def pressure(*zs):
        def equations(*u):
            return [u[i] - zs[i] * (1 + u[i]) * mpmath.fprod((1 + u[j]) ** (-g[j][i]) for j in range(K))
                    for i in range(K)]
        u = mpmath.findroot(equations, [zi for zi in zs])
        u = u if K > 1 else [u]
        return mpmath.fsum(mpmath.log(1 + ui) for ui in u)
    return pressure


# -- the worked examples against outside sources -------------------------------------------------------
def test_film_numbers_against_the_polylogarithm():
    """2D ideal gases: rho lambda^2 = -ln(1 - z), beta P lambda^2 = Li_2(z) (Bose); rho lambda^2 = ln(1 + z),
    beta P lambda^2 = -Li_2(-z) (Fermi) [textbook, e.g. Pathria & Beale 3rd ed. ch. 7-8 (from memory);
    mpmath's polylog is the independent route]."""
    records = json_of(FILM)
    values = next(r for r in records if r["statement"] == "evaluate")["values"]
    with mpmath.workdps(40):
        zA, zB = 1 - mpmath.exp(-1), mpmath.exp(mpmath.mpf(1) / 2) - 1

        def pressure(t):   # along the composition (2/3, 1/3): rho_A = 2t/3, rho_B = t/3
            a, b = 1 - mpmath.exp(-2 * t / 3), mpmath.exp(t / 3) - 1
            return mpmath.polylog(2, a) - mpmath.polylog(2, -b)
        expected = {"beta P lambda^2": mpmath.polylog(2, zA) - mpmath.polylog(2, -zB), "z_A": zA, "z_B": zB,
                    "beta mu_A": mpmath.log(zA), "beta mu_B": mpmath.log(zB),
                    "rho k_B T kappa_T": 1 / mpmath.diff(pressure, mpmath.mpf(3) / 2)}
        for label, value in expected.items():
            assert abs(mp(values[label]) - value) < mpmath.mpf(10) ** -23 * max(1, abs(value)), label


def test_film_table_against_the_polylogarithm(tmp_path):
    # same textbook relations as above, row by row of the CSV written through the CLI
    result = run_cli("run", str(FILM), "--files-into", str(tmp_path))
    assert result.returncode == 0, result.stderr
    rows = list(csv.reader((tmp_path / "film.csv").read_text().splitlines()))
    assert rows[0] == ["rho_A lambda^2", "rho_B lambda^2", "beta P lambda^2", "z_A"]
    assert len(rows) == 8
    for rho, rho_b, p, z in rows[1:]:
        assert rho_b == "0"
        zA = 1 - mpmath.exp(-mp(rho))
        assert abs(mp(z) - zA) < 1e-14 and abs(mp(p) - mpmath.polylog(2, zA)) < 1e-14
    assert (tmp_path / "film.png").read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"


def test_bilayer_one_layer_slice_is_the_published_closed_form():
    """One species in the LLL: beta P / rho_L = ln[1 + nu/(1 - g nu)] (Dasnieres de Veigy & Ouvry, Phys.
    Rev. Lett. 72 (1994) 600); at nu = 2, g = 1/3 this is ln 7."""
    records = [r for r in json_of(BILAYER) if r["statement"] == "evaluate"]
    assert abs(mp(records[1]["values"]["beta P / rho_L"]) - mpmath.log(7)) < mpmath.mpf(10) ** -28


def test_bilayer_two_layers_against_a_direct_solution_of_wus_equations():
    """Several LLL species have the exclusion-statistics equation of state with the exchange matrix
    (Isakov, Mashkevich, Ouvry, Nucl. Phys. B 448 (1995) 457); independent route: Wu's equations
    solved with mpmath's root finder at the printed fugacities, the densities z_i dP/dz_i by numerical
    differentiation. They must return the fillings asked for and the printed pressure."""
    values = next(r for r in json_of(BILAYER) if r["statement"] == "evaluate")["values"]
    with mpmath.workdps(40):
        g = [[mpmath.mpf(1) / 3, mpmath.mpf(1) / 4], [mpmath.mpf(1) / 4, mpmath.mpf(1) / 5]]
        z = [mp(values["z_A"]), mp(values["z_B"])]
        pressure = wu_solution(g, z)
        assert abs(pressure(*z) - mp(values["beta P / rho_L"])) < mpmath.mpf(10) ** -27
        nA = z[0] * mpmath.diff(lambda x: pressure(x, z[1]), z[0])
        nB = z[1] * mpmath.diff(lambda x: pressure(z[0], x), z[1])
        assert abs(nA - mpmath.mpf(1) / 2) < mpmath.mpf(10) ** -25 and abs(nB - mpmath.mpf(1) / 3) < mpmath.mpf(10) ** -25


def test_bilayer_boundary_and_radius():
    """Along nu = t (1/2, 1/2) the pressure is a sum of ln(1 - c t) (docs/equation_of_state.md; one
    species: the published c_n = [g^n - (g - 1)^n]/n of Dasnieres de Veigy & Ouvry 1994 have radius
    min(1/g, 1/|g - 1|)). Worked out by hand here: (g x) = (7/24, 9/40) gives close packing at
    24/7; ((g - 1) x) = (-5/24, -11/40) gives singularities at -24/5 and -40/11: the radius is 24/7."""
    record = next(r for r in json_of(BILAYER) if r["statement"] == "equation of state")
    radius = record["radius"]
    assert radius["exact_radius"] == "24/7" and radius["boundary_at"] == "24/7"
    assert radius["boundary_kind"] == "close packing" and "estimate" in radius["note"]
    assert "ESTIMATED" in radius["text"]
    eos = record["equation_of_state"]
    nA, nB = sympy.symbols("nu_A nu_B", nonnegative=True)
    written = sympy.log(1 + nA / (1 - nA / 3 - nB / 4)) + sympy.log(1 + nB / (1 - nA / 4 - nB / 5))
    assert sympy.simplify(sympy.sympify(eos["pressure"], locals={"nu_A": nA, "nu_B": nB}) - written) == 0
    assert sorted(eos["boundary"]["relations"]) == ["nu_A/3 + nu_B/4 < 1", "nu_A/4 + nu_B/5 < 1"]


def test_bilayer_figure_and_table_are_written(tmp_path):
    result = run_cli("run", str(BILAYER), "--files-into", str(tmp_path))
    assert result.returncode == 0, result.stderr
    assert (tmp_path / "bilayer.pdf").read_bytes()[:5] == b"%PDF-"
    rows = list(csv.reader((tmp_path / "bilayer.csv").read_text().splitlines()))
    assert rows[0] == ["nu_A", "nu_B", "beta P / rho_L", "rho k_B T kappa_T"] and len(rows) == 10
    # nu_A = 0 row: one species with g = 1/5 (Dasnieres de Veigy & Ouvry 1994) and its inverse slope
    # [d/dnu ln(1 + nu/(1 - g nu))]^(-1) = (1 - g nu)(1 + (1 - g) nu), from the published closed form
    assert abs(float(rows[1][2]) - float(mpmath.log(1 + 0.5 / 0.9))) < 1e-14
    assert abs(float(rows[1][3]) - 0.9 * 1.4) < 1e-14


# -- the overlay: the tool's virial series against the exact equation of state ---------------------------
@pytest.mark.parametrize("text,fixed,axis", [
    (LLL2, {"B": Fraction(1, 200)}, "A"),
    (LLL2 + " spectrum", {"B": Fraction(1, 200)}, "A"),   # the harmonic-regulator route: the same gas
    ("dimension 3 species A bose species B fermi mass 2 clusters ideal", {"B": Fraction(1, 100)}, "A"),
    ("dimension 2 species A species B species C statistics matrix [[1/2, 1/3, 0], [1/5, 2/3, 1/7], [1/4, 0, 1/3]] "
     "clusters exclusion level", {"B": Fraction(1, 100), "C": Fraction(1, 300)}, "A"),
])
def test_virial_overlay_agrees_with_the_exact_pressure_at_low_density(text, fixed, axis):
    """Independent routes: the truncated virial series from the cluster -> virial machinery and the exact
    equation of state differ by O(density^(N+1)) at low density (units consistent in every regime)."""
    order = 5
    system = build_system(text + f" derive virial up to {order}")
    derivation = derive_system(system)
    eos = REGIMES[system.source.kind].equation_of_state(system)
    from clusterexp.eos.requests import DensityAxis, DensityValue, StateRequest
    request = StateRequest("plot", system.source.span, densities=tuple(
        DensityValue(eos.density_word, n, sympy.Rational(v.numerator, v.denominator), None) for n, v in fixed.items()),
        axes=(DensityAxis(eos.density_word, axis, None),))
    t = sympy.Symbol("t")
    polynomial = virial_polynomial(derivation, eos, request, order, t)
    for x in (Fraction(1, 100), Fraction(1, 50)):
        point = {**fixed, axis: x}
        exact = next(iter(eos.evaluate("pressure", point, 30).values()))
        series = polynomial.subs(t, sympy.Rational(x.numerator, x.denominator))
        total = float(x + sum(fixed.values()))
        assert abs(float(exact) - float(series)) < 50 * total ** (order + 1)


def test_one_level_bose_and_fermi_through_the_statement():
    """g = 0 and g = 1 on one level: bosons Xi = 1/(1 - z), fermions Xi = 1 + z, so beta P = ln(1 + n)
    and -ln(1 - n) [textbook single-level grand partition functions]."""
    for word, expected in (("bose", mpmath.log(1.5)), ("fermi", -mpmath.log(0.5))):
        values = json_of(f"dimension 2 species A {word} clusters exclusion level\n"
                         "evaluate pressure, fugacity at filling = 1/2")[0]["values"]
        assert abs(mp(values["beta P / (states)"]) - expected) < 1e-14
        assert abs(mp(values["z_A"]) - (mpmath.mpf(1) / 3 if word == "bose" else 1)) < 1e-14


# -- every regime answers for its equation of state -----------------------------------------------------
@pytest.mark.parametrize("text,has", [
    ("dimension 2 species A bose clusters ideal", True),
    ("dimension 2 species A exchange 1/2 clusters landau", True),
    ("dimension 2 species A exchange 1/2 clusters landau spectrum", True),
    ("dimension 2 species A exchange 1/2 clusters exclusion level", True),
    ("dimension 1 species A exchange 1/2 clusters exclusion", True),
    ("dimension 2 parameter alpha in [0, 1] species A exchange alpha clusters pairphase", False),
    ("dimension 2 species A clusters generic", False),
    ("dimension 2 species A clusters given { b[2] = 1/4 }", False),
    ("dimension 2 species A clusters spectrum { levels A = 1/(1 - x) area count }", False),
])
def test_each_regime_owns_its_equation_of_state(text, has):
    system = build_system(text)
    regime = REGIMES[system.source.kind]
    if has:
        assert regime.equation_of_state(system).pressure_unit
    else:
        with pytest.raises(InputError, match="no exact equation of state.*virial series"):
            regime.equation_of_state(system)


# -- bad input at the user's line ------------------------------------------------------------------------
BAD = [
    (LLL2 + "\nevaluate pressure at filling A = 3, filling B = 1/10", "beyond close packing.*close packing is at", 2, 1),
    (LLL2 + "\nevaluate pressure at filling A = -1/5, filling B = 1/10", "filling of A is negative", 2, 34),
    ("dimension 2 parameter alpha in [0, 1] species A exchange alpha clusters pairphase\n"
     "evaluate pressure at density A = 1/5", "no exact equation of state for two-body pair phases.*virial series", 2, 1),
    ("dimension 2 species A clusters generic\nplot pressure over density into \"p.png\"", "virial series", 2, 1),
    ("dimension 3 species A bose clusters ideal\nevaluate compressibility at density A = 3",
     "compressibility is infinite beyond Bose-Einstein condensation", 2, 1),
    (LLL2 + "\nevaluate pressure, fugacity C at filling A = 1/5, filling B = 1/10", "unknown species 'C'", 2, 29),
    (LLL2 + "\nevaluate pressure at filling A = 1/5, filling C = 1/10", "unknown species 'C'", 2, 47),
    (LLL2 + "\nevaluate entropy at filling A = 1/5, filling B = 0", "unknown quantity 'entropy'", 2, 10),
    (LLL2 + "\nevaluate pressure at density A = 1/5, filling B = 0", "write `filling A` instead of `density A`", 2, 22),
    (LLL2 + "\nevaluate pressure at filling A = 1/5", "give the filling of every species: B has none", 2, 1),
    (LLL2 + "\nevaluate a[2,0] at filling A = 1/5", "`filling A` is a density of the equation of state.*two statements",
     2, 28),
    (LLL2 + "\nevaluate pressure, a[2,0] at filling A = 1/5", "coefficient a.*cannot join.*two statements", 2, 21),
    (LLL2 + "\ntabulate pressure over alpha from 0 to 1 step 1/2 into \"x.csv\"", "runs over a density", 2, 24),
    (LLL2 + "\ntabulate pressure over filling A from 0 to 4 step 1 at filling B = 0 into \"x.csv\"",
     "grid reaches filling B = 0, filling A = 3: densities beyond close packing", 2, 24),
    (LLL2 + "\nplot pressure over filling A from 0 to 4 at filling B = 0 into \"x.png\"",
     "plot range reaches filling A = 4 \\(close packing at filling A = 3\\)", 2, 20),
    (LLL2 + "\nplot compressibility over filling A at filling B = 0 with virial series 2 into \"x.png\"",
     "virial series is the series of the pressure", 2, 54),
    ("dimension 2 parameter g in [0, 1] species A exchange g clusters landau\nevaluate pressure at filling = 1/5",
     "depends on g: give its value", 2, 1),
    ("dimension 2 parameter g in [0, 1] parameter h species A exchange g clusters landau\n"
     "evaluate pressure at filling = 1/5, g = 1/2, h = 1", "does not depend on h", 2, 1),
    ("dimension 2 parameter g in [0, 1] species A exchange g clusters landau\n"
     "evaluate pressure at filling = 1/5, g = 2", "outside its declared range", 2, 41),
    ("dimension 2 species A exchange 1/2 clusters landau order 3\nplot pressure over filling with virial series 5 "
     "into \"x.png\"", "order 5 needs total order 5 but `order 3` is declared", 2, 28),
    ("dimension 2 species A species B clusters landau\nevaluate pressure at filling = 1/5, filling B = 0",
     "say whose filling", 2, 22),
    ("dimension 2 species A exchange 1/3 clusters exclusion\ntabulate pressure over density from 0 to 100 step 1/10 "
     "into \"t.csv\"", "would take about 17 minutes", 2, 1),
    (LLL2 + "\nevaluate pressure, fugacity A, fugacity A at filling A = 0, filling B = 0", "fugacity A is listed twice",
     2, 32),
    ("dimension 3 species A exchange 0 clusters exclusion\nevaluate pressure at density A = 3",
     "not supported yet", 2, 1),
]


@pytest.mark.parametrize("text,message,line,column", BAD, ids=[m[:30] for _, m, _, _ in BAD])
def test_bad_input_is_refused_at_its_place(text, message, line, column, tmp_path):
    (tmp_path / "in.gas").write_text(text + "\n")
    result = run_cli("run", str(tmp_path / "in.gas"), "--no-files")
    assert result.returncode == 2, result.stderr
    assert "Traceback" not in result.stderr
    first = result.stderr.splitlines()[0]
    assert first.startswith(f"{tmp_path / 'in.gas'}:{line}:{column}: error:"), first
    import re
    assert re.search(message, result.stderr), result.stderr
    assert "^" in result.stderr


def test_state_statements_build_without_running():
    system = build_system(LLL2 + "\nequation of state\nplot pressure over filling A at filling B = 0 with virial series 3, 7 "
                          "into \"p.svg\"")
    kinds = [s.kind for s in system.states]
    assert kinds == ["formula", "plot"] and system.order == 7


def test_latex_document_has_the_equation_of_state(tmp_path):
    result = run_cli("run", str(BILAYER), "--format", "latex", "--document", "--no-files")
    assert result.returncode == 0, result.stderr
    assert r"\subsection*{Equation of state}" in result.stdout and r"\beta P / \rho_L =" in result.stdout


def test_default_plot_range_stops_before_close_packing():
    # one LLL species with g = 1/2: close packing at nu = 1/g = 2 (Dasnieres de Veigy & Ouvry 1994);
    # the figure runs to 19/20 of it and marks it
    from clusterexp.eos.axes import plot_interval
    system = build_system("dimension 2 species A exchange 1/2 clusters landau\n"
                          "plot pressure over filling with virial series 3 into \"p.png\"")
    eos = REGIMES["landau"].equation_of_state(system)
    assert plot_interval(eos, system.states[0], {}) == (0, sympy.Rational(19, 10), 2)
    bose = build_system("dimension 3 species A bose clusters ideal\nplot pressure over density into \"p.png\"")
    low, high, edge = plot_interval(REGIMES["ideal"].equation_of_state(bose), bose.states[0], {})
    assert edge == sympy.zeta(sympy.Rational(3, 2)) and high == sympy.Rational(3, 2) * edge   # condensation
