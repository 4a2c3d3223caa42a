"""`evaluate` at points where the sampled flux-tube pieces are exactly known (routes/tube_pieces.py,
`TubePiece.exactly`; products/exact_pieces.py): every piece is 0 at an integer flux, the braid piece 0 at
an integer mutual parameter, the anyon-tube piece +-F/2 at the bose/fermi points. Elsewhere the statement
is refused with the `sample` statement to add. Every expected number is computed here from outside
formulas, never from the tool alone.

Outside references: the exact anyon b_2 = 1/4 - s + s^2/2, s = alpha mod 2 (Arovas, Schrieffer, Wilczek,
Zee, Nucl. Phys. B 251 (1985) 117; times m/m_ref, physics.md R2); the one-tube shift Z(gamma) - Z(0) =
-gamma(1 - gamma)/2 on [0, 1], period 1 (Comtet, Georgelin, Ouvry, J. Phys. A 22 (1989) 3917, attributed
from memory in physics.md), which an ideal species feels once per l-cycle (b_l gains (+-1)^(l+1) n F / l);
the Aharonov-Bohm phase e^{2 pi i gamma w} = 1 at integer flux; no mixed coefficient at an integer
mutual parameter (physics.md section 2).
"""
import json
import re

import mpmath
import pytest
import sympy

DIGITS = 30


def _values(cli, tmp_path, text):
    """{label: number} of every `evaluate` of the input, run through the CLI with JSON output."""
    path = tmp_path / "gas.in"
    path.write_text(text)
    result = cli("run", str(path), "--format", "json", "--no-files")
    assert result.returncode == 0, result.stderr
    assert "Traceback" not in result.stderr
    document = json.loads(result.stdout)
    return document, {label: number for block in document.get("values", []) for label, number in block["values"].items()}


def _refused(cli, tmp_path, text):
    """(input path, stderr) of an input the CLI refuses: exit code 2, no traceback."""
    path = tmp_path / "gas.in"
    path.write_text(text)
    result = cli("run", str(path), "--no-files")
    assert result.returncode == 2, result.stdout
    assert "Traceback" not in result.stderr
    return path, result.stderr


def _one(values, start):
    """The number whose label starts with `start` (the label carries the notes), and its label."""
    found = [(label, number) for label, number in values.items() if label.split(" ")[0] == start]
    assert len(found) == 1, values
    return found[0]


def _close(text, exact):
    assert abs(mpmath.mpf(text) - mpmath.mpf(sympy.N(exact, DIGITS + 5))) < mpmath.mpf(10) ** (2 - DIGITS), (text, exact)


def _aswz_b2(alpha):
    """Arovas, Schrieffer, Wilczek, Zee 1985: b_2 of anyons per lambda^2 of their own mass, period 2."""
    s = sympy.Mod(sympy.Rational(alpha), 2)
    return sympy.Rational(1, 4) - s + s ** 2 / 2


def _one_tube(gamma):
    """Comtet, Georgelin, Ouvry 1989: Z(gamma) - Z(0) for one particle and one tube, period 1."""
    s = sympy.Mod(sympy.Rational(gamma), 1)
    return -s * (1 - s) / 2


@pytest.mark.parametrize("flux", ["0", "1", "2"])
@pytest.mark.parametrize("alpha, mass", [("1/3", "1"), ("3/4", "3")])
def test_every_tube_piece_is_zero_at_an_integer_flux(cli, tmp_path, flux, alpha, mass):
    # A of mass `mass` among tubes, the reference species R (mass 1, bosons) beside it and not braiding:
    # b[0,2] = r b_2(alpha) + n B_anyon_tube_A with B = 0, and b[0,1] = r (no shift at integer flux)
    text = (f"dimension 2\nparameter f in [0, 2]\nparameter n nonnegative\nspecies R bose\n"
            f"species A exchange {alpha} mass {mass}\ntubes flux f coverage n\nclusters pairphase\n"
            f"derive cluster up to 2\nderive virial up to 2\n"
            f"evaluate b[0,2], a[0,2], b[2,0] at f = {flux}, n = 1/10 digits {DIGITS}\n")
    _, values = _values(cli, tmp_path, text)
    r = sympy.Rational(mass)
    b2 = r * _aswz_b2(alpha)
    label, number = _one(values, "b[0,2]")
    _close(number, b2)
    assert "B_anyon_tube_A = 0 exactly: integer flux" in label
    _close(_one(values, "a[0,2]")[1], -b2 / r ** 2)   # a_2 = -b_2 / b_1^2 (physics.md section 1)
    _close(_one(values, "b[2,0]")[1], sympy.Rational(1, 4))   # the bose reference species, O(n^2) here


@pytest.mark.parametrize("flux", ["0", "1", "2"])
@pytest.mark.parametrize("statistics, a2", [("bose", "-1/4"), ("fermi", "1/4")])
def test_integer_flux_gives_the_free_gas(cli, tmp_path, flux, statistics, a2):
    # an ideal species among tubes carries T_two_tubes at n^2 (O(n^3)); at an integer flux the tubes are
    # invisible and every a_l is the free 2D gas's: a_2 = -+1/4, a_3 = 1/36 (Viefers, Ravndal, Haugset,
    # Am. J. Phys. 63 (1995) 369; physics.md section 4)
    text = (f"dimension 2\nparameter f in [0, 2]\nparameter n nonnegative\nspecies A {statistics}\n"
            f"tubes flux f coverage n\nclusters pairphase\nderive virial up to 3\n"
            f"evaluate a[2], a[3] at f = {flux}, n = 1/10 digits {DIGITS}\n")
    _, values = _values(cli, tmp_path, text)
    label, number = _one(values, "a[2]")
    _close(number, sympy.Rational(a2))
    assert "T_two_tubes = 0 exactly: integer flux" in label
    _close(_one(values, "a[3]")[1], sympy.Rational(1, 36))


def _bose_route_value(cli, tmp_path, statistics, coefficient, flux, coverage):
    """The same coefficient from `species A bose` (or fermi) with the same tubes, an independent route
    inside the tool (the ideal-gas l-cycles with the one-tube shift): its exact symbolic value from the
    JSON output, cut to the first order in the coverage (the anyonic result is O(n^2)) and evaluated."""
    text = (f"dimension 2\nparameter f in [0, 1]\nparameter n nonnegative\nspecies R bose\n"
            f"species A {statistics} mass 3\ntubes flux f coverage n\nclusters pairphase\n"
            f"derive cluster up to 2\nderive virial up to 2\n")
    document, _ = _values(cli, tmp_path, text)
    kind, index = coefficient
    value = [c["value"] for c in document["coefficients"] if (c["kind"], c["index"]) == (kind, index)]
    assert len(value) == 1, document["coefficients"]
    f, n = sympy.symbols("f n")
    expr = sympy.sympify(value[0], locals={"f": f, "n": n, "O": sympy.O}).removeO()
    first = sympy.expand(expr).coeff(n, 0) + n * sympy.expand(expr).coeff(n, 1)
    return first.subs({f: sympy.Rational(flux), n: sympy.Rational(coverage)})


@pytest.mark.parametrize("alpha, statistics, sign", [("0", "bose", 1), ("1", "fermi", -1), ("2", "bose", 1)])
@pytest.mark.parametrize("flux", ["1/2", "1/3"])
def test_anyon_tube_piece_at_the_bose_and_fermi_points(cli, tmp_path, alpha, statistics, sign, flux):
    # the exchange over two periods' worth of points: 2 is a boson point too (period 2)
    text = (f"dimension 2\nparameter f in [0, 1]\nparameter n nonnegative\nparameter e in [0, 2]\nspecies R bose\n"
            f"species A exchange e mass 3\ntubes flux f coverage n\nclusters pairphase\n"
            f"derive cluster up to 2\nderive virial up to 2\n"
            f"evaluate b[0,2], a[0,2] at e = {alpha}, f = {flux}, n = 1/10 digits {DIGITS}\n")
    _, values = _values(cli, tmp_path, text)
    r, n, F = sympy.Integer(3), sympy.Rational(1, 10), _one_tube(flux)
    label, b02 = _one(values, "b[0,2]")
    assert f"B_anyon_tube_A = {sympy.sstr(sign * F / 2)} exactly" in label
    assert ("boson" if sign == 1 else "fermion") in label
    # outside: the l = 2 cycle of the ideal gas, (+-1)[r/4 + n F/2] (Comtet, Georgelin, Ouvry's F)
    _close(b02, sign * (r / 4 + n * F / 2))
    # inside, independent route: `species A bose` / `fermi` with the same tubes
    _close(b02, _bose_route_value(cli, tmp_path, statistics, ("cluster", [0, 2]), flux, n))
    _close(_one(values, "a[0,2]")[1], _bose_route_value(cli, tmp_path, statistics, ("virial", [0, 2]), flux, n))
    # and a_2 = -b_2/b_1^2 to first order in n, b_1 = r + n F: the tube terms cancel for an ideal species
    a = sympy.Symbol("a")
    exact = sympy.series(-(sign * (r / 4 + a * F / 2)) / (r + a * F) ** 2, a, 0, 2).removeO().subs(a, n)
    _close(_one(values, "a[0,2]")[1], exact)


def test_generic_point_refused_with_the_sample_statement_to_add(cli, tmp_path):
    path, stderr = _refused(cli, tmp_path, "dimension 2\nparameter f in [0, 1]\nparameter n nonnegative\n"
                            "parameter e in [0, 1]\nspecies A exchange e\ntubes flux f coverage n\nclusters pairphase\n"
                            "derive virial up to 2\nevaluate a[2] at e = 1/3, f = 1/2, n = 1/10\n")
    assert f"{path}:9:1: error: no value for B_anyon_tube_A at e = 1/3, f = 1/2, n = 1/10" in stderr
    assert "add `sample b[2] at e = 1/3, f = 1/2`" in stderr
    assert "\n    evaluate a[2] at e = 1/3, f = 1/2, n = 1/10\n    ^^^^" in stderr
    assert "exactly:" not in stderr   # no piece was put in


@pytest.mark.parametrize("flux", ["99999999999999999999/100000000000000000000", "0.99999999999999999999", "1/2"])
def test_near_integer_flux_is_not_integer(cli, tmp_path, flux):
    # integrality is decided exactly: a flux a float would round to 1 keeps the piece unknown
    _, stderr = _refused(cli, tmp_path, "dimension 2\nparameter f in [0, 1]\nparameter n nonnegative\nspecies A exchange "
                         f"1/3\ntubes flux f coverage n\nclusters pairphase\nderive virial up to 2\nevaluate a[2] at f = {flux}, "
                         "n = 1/10\n")
    assert "no value for B_anyon_tube_A" in stderr


@pytest.mark.parametrize("mutual, flux", [("1", "1/2"), ("0", "1/3"), ("1/2", "1")])
def test_braid_piece_zero_where_the_pair_does_not_braid(cli, tmp_path, mutual, flux):
    text = ("dimension 2\nparameter g in [0, 1]\nparameter n nonnegative\nparameter nu in [0, 1]\n"
            "species A bose\nspecies B fermi mass 2\nmutual A B = nu\ntubes flux g coverage n\nclusters pairphase\n"
            f"derive cluster up to 2\nderive virial up to 2\nevaluate b[1,1], a[1,1] at nu = {mutual}, g = {flux}, "
            f"n = 1/10 digits {DIGITS}\n")
    _, values = _values(cli, tmp_path, text)
    label, b11 = _one(values, "b[1,1]")
    # b_11 = -((m_A + m_B)/(2 m_ref)) s(1 - s) + n B_braid, s = nu mod 1 (physics.md R3): the pair part
    # vanishes at an integer nu (no statistical coupling), and so must the piece
    s = sympy.Mod(sympy.Rational(mutual), 1)
    _close(b11, -sympy.Rational(3, 2) * s * (1 - s))
    why = "integer flux" if flux == "1" else "A and B do not braid here"
    assert re.search(r"B_braid_tube_A_B = 0 exactly: " + why, label), label
    # a_11 = -b_11 / (b_10 b_01) through n (physics.md section 1), b_10 = 1 + n F, b_01 = 2 + n F
    a, F = sympy.Symbol("a"), _one_tube(flux)
    exact = sympy.series(sympy.Rational(3, 2) * s * (1 - s) / ((1 + a * F) * (2 + a * F)), a, 0, 2).removeO()
    _close(_one(values, "a[1,1]")[1], exact.subs(a, sympy.Rational(1, 10)))


def test_braid_piece_unknown_where_the_pair_braids(cli, tmp_path):
    path, stderr = _refused(cli, tmp_path, "dimension 2\nparameter g in [0, 1]\nparameter n nonnegative\n"
                            "parameter nu in [0, 1]\nspecies A bose\nspecies B fermi\nmutual A B = nu\n"
                            "tubes flux g coverage n\nclusters pairphase\nderive cluster up to 2\n"
                            "evaluate b[1,1] at nu = 1/2, g = 1/2, n = 1/10\n")
    assert "no value for B_braid_tube_A_B" in stderr and f"{path}:11:1: error:" in stderr


def test_latex_document_says_which_pieces_were_put_in(cli, tmp_path):
    path = tmp_path / "gas.in"
    path.write_text("dimension 2\nparameter f in [0, 1]\nparameter n nonnegative\nspecies A exchange 1/3\n"
                    "tubes flux f coverage n\nclusters pairphase\nderive virial up to 2\nevaluate a[2] at f = 1, n = 1/10\n")
    result = cli("run", str(path), "--format", "latex", "--document", "--no-files")
    assert result.returncode == 0, result.stderr
    assert r"$0.0277777777777778$" in result.stdout   # 1/36 = -b_2(1/3) (Arovas et al. 1985)
    assert r"B\_anyon\_tube\_A = 0 exactly: integer flux" in result.stdout
