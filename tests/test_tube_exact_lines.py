"""The coverage parts of the named b pieces among flux tubes (b_3_n_1, b_2_1_n_1, ...) are known exactly
at some points and on some lines, and `expand` must put those values in instead of naming unknowns:

* at an integer flux the Aharonov-Bohm phase is 1 on every loop, the tubes drop out and every power of
  the coverage >= 1 vanishes, for every value of the other parameters;
* at the bose/fermi points of one species its b_l gains (+-1)^(l+1) n F/l, F = -s(1 - s)/2, s = flux
  mod 1 (the one-tube shift of one loop of duration l beta; Comtet, Georgelin, Ouvry, J. Phys. A 22
  (1989) 3917, from memory in physics.md);
* species that do not braid (integer mutual parameter) have no mixed b at all, tubes or not (ln Xi at
  fixed tubes is additive over the species, and so is its average).
"""
import json

import sympy

HEAD = """dimension 2
parameter f in [0, 1/2]
parameter alpha in [0, 1]
parameter n nonnegative
"""


def _run(cli, tmp_path, text):
    path = tmp_path / "gas.gas"
    path.write_text(HEAD + text)
    result = cli("run", str(path), "--format", "json", "--no-files")
    assert result.returncode == 0, result.stderr
    return json.loads(result.stdout)


def _series(document, index):
    (coefficient,) = [c for c in document["coefficients"] if c["kind"] == "cluster" and tuple(c["index"]) == index]
    return coefficient["series"][0]["value"].split(" + O(")[0]


def _symbols(text):
    names = {s: sympy.Symbol(s, real=True) for s in ("alpha", "f", "n", "nu")}
    return sympy.expand(sympy.sympify(text, locals=names)), names


def test_coverage_part_of_b3_at_the_bose_and_fermi_points(cli, tmp_path):
    """expand alpha with the flux free: the alpha^0 term of b[3] is 1/9 + n F/3 at bosons and at
    fermions ((-1)^4 = 1), the one-tube law, not a named `b_3_n_1_alpha_0`."""
    for about in ("0 to 2 from above", "1 to 2 from below"):
        document = _run(cli, tmp_path, "species T exchange alpha\ntubes flux f coverage n\nclusters pairphase\n"
                                       f"derive cluster up to 3\nexpand alpha about {about}\n")
        value, s = _symbols(_series(document, (3,)))
        point = 0 if about.startswith("0") else 1
        at_point = sympy.expand(value.subs(s["alpha"], point).subs(sympy.floor(s["f"]), 0))
        F = -s["f"] * (1 - s["f"]) / 2
        assert at_point == sympy.expand(sympy.Rational(1, 9) + s["n"] * F / 3), (about, value)
        assert not [u for u in document.get("unknowns", {}) if "alpha_0" in u], document.get("unknowns")


def test_coverage_part_vanishes_at_integer_flux(cli, tmp_path):
    """expand f about 0 with anyons of exchange 1/2 (no derived coefficients there): the f^0 term of b[3]
    has no coverage part."""
    document = _run(cli, tmp_path, "species T exchange 1/2\ntubes flux f coverage n\nclusters pairphase\n"
                                   "derive cluster up to 3\nexpand f about 0 to 2 from above\n")
    value, s = _symbols(_series(document, (3,)))
    assert value.subs(s["f"], 0).coeff(s["n"], 1) == 0, value
    assert not [u for u in document.get("unknowns", {}) if u.endswith("_f_0")], document.get("unknowns")


def test_mixed_coverage_part_vanishes_on_the_lines_of_no_braiding_and_integer_flux(cli, tmp_path):
    """Two species braiding with nu among tubes, joint series in (nu, f) about (0, 0): on nu = 0 b[2,1]
    is 0 (no braiding), on f = 0 its coverage part is 0 (no tubes), so of its coverage part through total
    degree 2 only a nu f term remains (derived: the braid kind of the tube route)."""
    document = _run(cli, tmp_path, "parameter nu in [0, 1/2]\nspecies A bose\nspecies B fermi mass 2\n"
                                   "mutual A B = nu\ntubes flux f coverage n\nclusters pairphase\n"
                                   "derive cluster up to 3\nexpand nu, f about 0, 0 to 2 from above\n")
    for index in ((2, 1), (1, 2)):
        value, s = _symbols(_series(document, index))
        part = sympy.expand(value.coeff(s["n"], 1))
        assert part.subs(s["f"], 0) == 0 and part.subs(s["nu"], 0) == 0, part
        assert sympy.expand(part - part.coeff(s["nu"] * s["f"]) * s["nu"] * s["f"]) == 0, part
    # the nu f coefficient itself is derived too (docs/tubes.md (iii), test_tube_perturbative.py): none named
    names = [u for u in document.get("unknowns", {}) if "_n_1_" in u]
    assert names == [], names


def test_third_order_joint_series_keeps_the_bose_line_exact(cli, tmp_path):
    """expand alpha, f about 0, 0 to 3: the route derives through total degree 2, but on the line alpha = 0
    the pieces are known for every flux (B_anyon_tube = F/2, the coverage part of b_3 = F/3, polynomials
    of degree 2 in f > 0): their f^3 coefficients are 0, not named unknowns. What stays unknown is of
    degree 3 with alpha in it."""
    document = _run(cli, tmp_path, "species T exchange alpha\ntubes flux f coverage n\nclusters pairphase\n"
                                   "derive cluster up to 3\nexpand alpha, f about 0, 0 to 3 from above\n")
    for index, cycle in (((2,), 2), ((3,), 3)):
        value, s = _symbols(_series(document, index))
        F = -s["f"] * (1 - s["f"]) / 2
        assert sympy.expand(value.subs(s["alpha"], 0).coeff(s["n"], 1)) == sympy.expand(F / cycle), value
    unknowns = list(document.get("unknowns", {}))
    assert not [u for u in unknowns if "alpha_0_f" in u], unknowns
    assert "b_3_n_0_alpha_3_above" in unknowns   # the alpha^3 term of the tube-free b_3: not derived


def test_evaluate_at_the_bose_and_fermi_points_puts_the_ideal_gas_b_in(cli, tmp_path):
    """`evaluate` of b[3], a[3] of anyons at alpha = 0 (bosons) and alpha = 1 (fermions) among tubes: b_3 =
    1/9 + n F/3 (ideal gas, one-tube law) and a_3 = 1/36 (the ideal a_3, unchanged at first order in n
    since every b_l gains the same n F/l per loop: a_l is the free gas's, docs/tubes.md); without tubes
    b_3 = 1/9 at both points. Before, the named b_3 (b_3_n_0, b_3_n_1) made `evaluate` refuse."""
    text = ("species T exchange alpha\ntubes flux f coverage n\nclusters pairphase\nderive virial up to 3\n"
            "evaluate b[3], a[3] at alpha = 0, f = 1/2, n = 1/10\n"
            "evaluate b[3], a[3] at alpha = 1, f = 1/3, n = 1/10\n")
    document = _run(cli, tmp_path, text)
    for entry, s in zip(document["values"], (sympy.Rational(1, 2), sympy.Rational(1, 3))):
        numbers = [float(v) for v in entry["values"].values()]
        F = -s * (1 - s) / 2
        assert abs(numbers[0] - float(sympy.Rational(1, 9) + F / 30)) < 1e-13, entry
        assert abs(numbers[1] - 1 / 36) < 1e-13, entry
    plain = "species T exchange alpha\nclusters pairphase\nderive virial up to 3\nevaluate b[3] at alpha = 0\n" \
            "evaluate b[3] at alpha = 1\n"
    for entry in _run(cli, tmp_path, plain)["values"]:
        assert [abs(float(v) - 1 / 9) < 1e-14 for v in entry["values"].values()] == [True], entry
