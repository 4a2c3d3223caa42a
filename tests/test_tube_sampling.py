"""`sample` with static flux tubes in the input language (loops/tube_sampling.py; docs/tubes.md).

The numbers come from the seeded estimators of `loops/tube_estimates.py` through the statement; each
test compares them with something outside that code: a periodicity or symmetry of the Aharonov-Bohm
phase, the exact bose/fermi first order of the tool's independent exact route (harmonic-regulator channel
sum), the small-flux law of the perturbative route, or a hand composition of the virial relation.
Loop counts are small (each test a few seconds); tolerances are in standard errors (4) of the run.
"""
from __future__ import annotations

import csv
import importlib.util
import json
import math

import pytest
import sympy

import clusterexp
from clusterexp import InputError, NotSupportedYet
from clusterexp.export import FORMATTERS

from conftest import run_cli

SIGMAS = 4.0
BOSE_AMONG_TUBES = "dimension 2\nparameter n\nparameter g\nspecies A bose\ntubes flux g coverage n\nclusters pairphase\n"
ANYONS_AMONG_TUBES = ("dimension 2\nparameter n\nparameter alpha in [0, 1]\nspecies A exchange alpha\n"
                      "tubes flux 1/2 coverage n\nclusters pairphase\n")


def _values(derivation, statement: int = 0) -> list[dict]:
    """[{label: (value, error, remainder)}] per point of one `sample` statement."""
    return [{v.label: (v.value, v.error, v.remainder) for v in p.values} for p in derivation.sampled.statements[statement].points]


def _flux_term(flux) -> float:
    """The one-tube shift Z(gamma) - Z(0) = -s(1 - s)/2, s = gamma mod 1 (Comtet, Georgelin, Ouvry,
    J. Phys. A 22 (1989) 3917; attribution from memory, physics.md)."""
    s = flux - math.floor(flux)
    return -s * (1 - s) / 2


def test_integer_flux_has_no_effect_and_the_flux_has_period_one():
    # Outside check: an Aharonov-Bohm phase e^{2 pi i gamma w} of an integer winding w is 1 for integer gamma
    # and the same for gamma and gamma + 1 (period 1: a fact of the trade, physics.md section 2).
    d = clusterexp.derive(BOSE_AMONG_TUBES + "derive virial up to 2\n"
                          "sample a[2] over g = [1, 1/2, 3/2, 2] seed 11 with 4000 loops\n")
    at_one, half, three_halves, at_two = _values(d)
    for integer in (at_one, at_two):
        value, error, _ = integer["T_two_tubes"]
        assert abs(value) < 1e-12 and error < 1e-12
        assert abs(integer["a[2] [n^2]"][0]) < 1e-12       # the n^2 term vanishes with the tubes
    assert half["T_two_tubes"][0] == pytest.approx(three_halves["T_two_tubes"][0], rel=1e-9, abs=1e-15)
    assert half["T_two_tubes"][0] > SIGMAS * half["T_two_tubes"][1]   # and it is resolved away from integers


def test_mirror_fluxes_give_the_same_two_tube_piece():
    # Outside check: reflecting every loop conjugates every winding phase, so T2(gamma, gamma) = T2(-gamma, -gamma)
    # sample by sample (docs/tubes.md; parity of the Aharonov-Bohm problem, common practice); -1/4 = 3/4 mod 1.
    d = clusterexp.derive(BOSE_AMONG_TUBES + "derive virial up to 2\n"
                          "sample b[1] over g = [1/4, -1/4, 3/4] seed 12 with 4000 loops\n")
    plus, minus, three_quarters = (p["T_two_tubes"][0] for p in _values(d))
    assert plus == pytest.approx(minus, rel=1e-9) and minus == pytest.approx(three_quarters, rel=1e-9)


def test_small_flux_law_of_the_perturbative_route():
    # Outside check: T2(g, g) = |g|^2/4 - g^2/12 + O(|g|^3) = g^2/6: the product of two contact terms and the
    # uniform mean field, as the perturbative route's b_{1,1,1} of two infinitely heavy species gives
    # (docs/tubes.md "Small fluxes"; the -1/12 also from Levy's area law, from memory).  The allowance of
    # 10 % of g^2/6 covers the slowly approached mean-field term measured there (a relative O(|g|)).
    d = clusterexp.derive(BOSE_AMONG_TUBES + "derive virial up to 2\n"
                          "sample b[1] at g = 1/50 seed 13 with 40000 loops\n")
    (point,) = _values(d)
    value, error, _ = point["T_two_tubes"]
    law = (1 / 50) ** 2 / 6
    assert abs(value - law) < SIGMAS * error + 0.1 * law
    # b[1] gains (n^2/2) T2 (docs/tubes.md): its n^2 term is half the piece, with half the error
    assert point["b[1] [n^2]"][:2] == pytest.approx((value / 2, error / 2), rel=1e-12)
    assert point["b[1] [n^2]"][2] == "O(n^3)"


@pytest.fixture(scope="module")
def anyon_ends():
    return clusterexp.derive(ANYONS_AMONG_TUBES + "derive virial up to 2\n"
                             "sample b[2], a[2] over alpha = [0, 1] seed 14 with 24000 loops\n")


@pytest.mark.parametrize("point, word", [(0, "bose"), (1, "fermi")])
def test_anyon_tube_piece_at_the_bose_and_fermi_points(anyon_ends, point, word):
    # Outside check: the exact first order of a bose (fermi) species among tubes, from the tool's exact route
    # (harmonic-regulator channel sum for one particle and one tube, R3 of physics.md): the n coefficient of
    # b[2], which is +-F/2 with F = -s(1 - s)/2 (Comtet, Georgelin, Ouvry 1989, from memory).
    exact = clusterexp.derive(f"dimension 2 parameter n species A {word} tubes flux 1/2 coverage n clusters pairphase "
                              "derive cluster up to 2")
    b2 = sympy.sympify(exact.value("cluster", (2,))).removeO()
    (n,) = (s for s in b2.free_symbols if s.name == "n")
    first_order = float(b2.coeff(n, 1))
    assert first_order == pytest.approx((1 if word == "bose" else -1) * _flux_term(0.5) / 2)
    values = _values(anyon_ends)[point]
    value, error, _ = values["B_anyon_tube_A"]
    assert error > 0 and abs(value - first_order) < SIGMAS * error
    assert values["b[2] [n^1]"][:2] == (value, error)
    # the free a_2 at first order for bose/fermi (docs/tubes.md): the composed n term of a[2] is 0 within errors
    term, term_error, remainder = values["a[2] [n^1]"]
    assert abs(term) < SIGMAS * term_error and remainder == "O(n^2)"


def test_evaluate_composes_the_sampled_piece_as_the_virial_relation_does_by_hand():
    # Outside check: a_2 = -b_2/b_1^2 (textbook virial relation, e.g. Pathria & Beale, from memory) with
    # b_1 = 1 + n F, b_2 = b_2(alpha) + n B, b_2(1/2) = -1/8 (Arovas, Schrieffer, Wilczek, Zee, Nucl. Phys. B
    # 251 (1985) 117), expanded by hand to first order in n: a_2 = -b_2(alpha) - n (B - 2 F b_2(alpha)).
    d = clusterexp.derive(ANYONS_AMONG_TUBES + "derive virial up to 2\n"
                          "sample a[2] at alpha = 1/2 seed 15 with 8000 loops\n"
                          "evaluate a[2] at alpha = 1/2, n = 1/10\n")
    (point,) = _values(d)
    piece, error, _ = point["B_anyon_tube_A"]
    n, f, b2 = 0.1, _flux_term(0.5), -1 / 8
    by_hand = -b2 - n * (piece - 2 * f * b2)
    assert point["a[2] [n^0]"][0] == pytest.approx(-b2)
    assert point["a[2] [n^1]"][:2] == pytest.approx((-(piece - 2 * f * b2), error))
    ((label, text),) = d.evaluations[0][1]
    assert "O(n**2) left out" in label and text.endswith("(Monte Carlo)")
    shown, shown_error = (float(x) for x in text.split(" (")[0].split(" +- "))
    assert shown == pytest.approx(by_hand, abs=2 * n * error) and shown_error == pytest.approx(n * error, rel=0.05)


def test_a_given_coverage_gives_one_number_with_its_remainder():
    # a[3] of a bose gas among tubes: 1/36 - (n^2/6)(T2 - F^2) + O(n^3) (docs/tubes.md, checked there against an
    # independent series inversion); here the composition at n = 1/10 against that formula by hand.
    d = clusterexp.derive(BOSE_AMONG_TUBES + "derive virial up to 3\n"
                          "sample a[3] at g = 1/2, n = 1/10 seed 16 with 4000 loops\n")
    (point,) = _values(d)
    piece, error, _ = point["T_two_tubes"]
    value, value_error, remainder = point["a[3]"]
    assert value == pytest.approx(1 / 36 - 0.01 / 6 * (piece - _flux_term(0.5) ** 2), rel=1e-12)
    assert value_error == pytest.approx(0.01 / 6 * error, rel=1e-9)
    assert remainder == "O(n^3) at n = 1/10"


def test_the_same_seed_gives_the_same_numbers():
    text = ANYONS_AMONG_TUBES + "derive virial up to 2\nsample a[2] at alpha = 1/3 seed {} with 4000 loops\n"
    first, again, other = (_values(clusterexp.derive(text.format(seed))) for seed in (21, 21, 22))
    assert first == again
    assert first[0]["B_anyon_tube_A"] != other[0]["B_anyon_tube_A"]


@pytest.mark.parametrize("text, error, needle, where", [
    # more than two mobile particles with a tube: b[3] of anyons with one tube is not sampled
    (ANYONS_AMONG_TUBES + "sample a[3] at alpha = 1/2 with 4000 loops", NotSupportedYet,
     "more than two mobile particles with a tube", "7:8"),
    # coefficients that contain no tube piece
    (ANYONS_AMONG_TUBES + "sample b[1] at alpha = 1/2", InputError, "b[1] contains no tube piece", "7:8"),
    (BOSE_AMONG_TUBES + "sample a[1] at g = 1/2", InputError, "a[1] = 1 contains no tube piece", "7:8"),
    ("dimension 2 parameter n species A bose species B fermi tubes flux 1/2 coverage n clusters pairphase\n"
     "sample b[1,1]", InputError, "contains no tube piece: species that do not braid", "2:8"),
    ("dimension 2 parameter n species A bose tubes flux 2 coverage n clusters pairphase\nsample a[2]", InputError,
     "the flux 2 is an integer", "2:8"),
    # the flux is a parameter: it needs a value
    (BOSE_AMONG_TUBES + "sample a[2] seed 1", InputError, "give g a value with `at g = ...`", "7:8"),
    # a map needs two scanned parameters, among tubes as elsewhere
    (BOSE_AMONG_TUBES + 'sample a[2] over g = [1/4, 1/2] map "m.png"', InputError, "a map needs two scanned", "7:33"),
    (BOSE_AMONG_TUBES + 'sample b[1], b[2], a[2], a[3], b[3] over g = [1/4, 1/2], n = [0, 1] map "m.png"', InputError,
     "a map draws at most 4 coefficients", "7:69"),
])
def test_requests_outside_the_tube_problems_are_refused_at_their_line(text, error, needle, where):
    with pytest.raises(error) as caught:
        clusterexp.derive(text)
    assert needle in str(caught.value)
    assert str(caught.value.span).endswith(where)


def test_three_tubes_are_refused_at_the_second_tubes_line():
    # One tube species; more `tubes` lines (three tubes of different fluxes) are refused where they start.
    with pytest.raises(InputError) as caught:
        clusterexp.derive("dimension 2 parameter n species A bose clusters pairphase\ntubes flux 1/2 coverage n\n"
                          "tubes flux 1/3 coverage n\ntubes flux 1/4 coverage n\nsample a[2]")
    assert "`tubes` is declared twice" in str(caught.value) and str(caught.value.span).endswith("3:1")


def test_cli_refusal_has_caret_and_exit_code_2(cli):
    result = cli("run", "--no-files", "-e", BOSE_AMONG_TUBES + "sample a[1] at g = 1/2")
    assert result.returncode == 2
    assert "contains no tube piece" in result.stderr and "^" in result.stderr and "Traceback" not in result.stderr


# ---------------------------------------------------------------------------- `table` and `map` files

FILES = ANYONS_AMONG_TUBES.replace("tubes flux 1/2", "parameter g\ntubes flux g") + "derive virial up to 2\n"


def _printed(derivation) -> list[dict]:
    """{coefficient or term: [value, error]} per point, as the JSON printer gives the statement's numbers."""
    (statement,) = json.loads(FORMATTERS["json"](derivation))["sampled"]
    return [{v["coefficient"]: [v["value"], v["error"]] for v in p["values"]} for p in statement["points"]]


def test_table_file_rows_are_the_printed_numbers_with_the_truncation_in_the_head(tmp_path):
    sample = "sample b[2], a[2] over alpha = [0, 1/2], g = [1/2, 1] seed 17 with 4000 loops"
    path = tmp_path / "t.gas"
    path.write_text(FILES + sample + ' table "t.csv"\n')
    done = run_cli("run", str(path), "--files-into", str(tmp_path))
    assert done.returncode == 0, done.stderr
    header, *rows = list(csv.reader((tmp_path / "t.csv").read_text().splitlines()))
    # the O(n^2) the numbers leave out, in the words of `tabulate` and `evaluate`
    left_out = "(truncated series, O(n**2) left out)"
    assert header == ["alpha", "g"] + [x for c in ("b[2]", "a[2]") for p in (0, 1)
                                       for x in (f"{c} [n^{p}] {left_out}", f"{c} [n^{p}] error")]
    assert [r[:2] for r in rows] == [["0", "0.5"], ["0", "1"], ["0.5", "0.5"], ["0.5", "1"]]
    # each row holds the numbers the statement prints (JSON printer, same seed and budget)
    printed = _printed(clusterexp.derive(FILES + sample + "\n"))
    for row, numbers in zip(rows, printed):
        columns = [c.split(" (")[0] for c in header[2::2]]
        assert [float(x) for x in row[2:]] == [x for c in columns for x in numbers[c]]
    by_point = {tuple(r[:2]): [float(x) for x in r[2:]] for r in rows}
    # b_2 of bosons is 1/4 (physics.md R1) and of anyons at 1/2 it is -1/8 (Arovas, Schrieffer, Wilczek, Zee
    # 1985), exact, no error; at an integer flux the tubes have no effect (period 1): the n terms vanish exactly
    assert by_point[("0", "1")] == [0.25, 0.0, 0.0, 0.0, -0.25, 0.0, 0.0, 0.0]
    assert by_point[("0.5", "0.5")][:2] == [-0.125, 0.0] and by_point[("0.5", "0.5")][3] > 0


def test_a_term_exactly_zero_at_a_point_is_a_zero_in_the_table(tmp_path):
    # At nu = 0 the species do not braid, so b_11 has no tube-free term there (a fact of the trade, physics.md
    # section 2): the statement prints no a[1,1] [n^0] at that point, and the table's cell is an exact 0.
    text = ("dimension 2\nparameter n\nparameter nu in [0, 1]\nspecies A bose\nspecies B bose\nmutual A B = nu\n"
            "tubes flux 1/2 coverage n\nclusters pairphase\nderive virial up to 2\n"
            "sample a[1,1] over nu = [0, 1/2] seed 18 with 4000 loops")
    path = tmp_path / "t.gas"
    path.write_text(text + ' table "t.csv"\n')
    done = run_cli("run", str(path), "--files-into", str(tmp_path))
    assert done.returncode == 0, done.stderr
    header, zero, half = list(csv.reader((tmp_path / "t.csv").read_text().splitlines()))
    assert header[1:] == ["a[1,1] [n^0] (truncated series, O(n**2) left out)", "a[1,1] [n^0] error",
                          "a[1,1] [n^1] (truncated series, O(n**2) left out)", "a[1,1] [n^1] error"]
    at_zero, at_half = _printed(clusterexp.derive(text + "\n"))
    assert "a[1,1] [n^0]" not in at_zero and zero[1:3] == ["0.0", "0.0"]
    # a_11 = -b_11 = s(1 - s) = 1/4 at nu = 1/2 for equal masses (physics.md section 4, derived with R3)
    assert float(half[1]) == pytest.approx(0.25, rel=1e-12) and at_half["a[1,1] [n^0]"] == [0.25, 0.0]
    assert [float(x) for x in half[3:]] == at_half["a[1,1] [n^1]"]


def test_map_file_draws_each_sampled_term_with_its_error_and_states_the_truncation(tmp_path):
    pytest.importorskip("matplotlib")
    import matplotlib.image
    from clusterexp.loops.figures import drawn_cells, mapped
    sample = "sample b[2], a[2] over alpha = [0, 1/2], g = [1/2, 1] seed 17 with 4000 loops"
    path = tmp_path / "m.gas"
    path.write_text(FILES + sample + ' map "m.png"\n')
    done = run_cli("run", str(path), "--files-into", str(tmp_path))
    assert done.returncode == 0, done.stderr
    assert sorted(p.name for p in tmp_path.glob("m.*")) == ["m.caption.tex", "m.gas", "m.pdf", "m.png"]
    assert (tmp_path / "m.pdf").read_bytes()[:4] == b"%PDF"
    height, width = matplotlib.image.imread(str(tmp_path / "m.png")).shape[:2]
    assert width > height                  # a value panel and an error panel side by side, per row
    caption = (tmp_path / "m.caption.tex").read_text()
    assert caption.startswith(r"Sampled $b_{2}\,[n^{1}]$, $a_{2}\,[n^{1}]$ over $\alpha$ and $g$")
    assert "right their one-standard-error maps" in caption
    assert "b[2]: truncated series, O(n**2) left out; a[2]: truncated series, O(n**2) left out" in caption
    assert r"exact at every point, not drawn: b[2] [n\^{}0], a[2] [n\^{}0]" in caption
    # the drawn cells are the printed numbers: the n^1 terms, with their errors
    derivation = clusterexp.derive(FILES + sample + "\n")
    (statement,) = derivation.sampled.statements
    drawn, exact = mapped(statement)
    assert [c.label for c in drawn] == ["b[2] [n^1]", "a[2] [n^1]"]
    printed = _printed(derivation)
    for column in drawn:
        assert [list(cell) for cell in drawn_cells(statement, column)] == [p[column.label] for p in printed]
