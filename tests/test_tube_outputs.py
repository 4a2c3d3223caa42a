"""`tabulate`, `plot`, `evaluate` and `claim ... within k errors` of coefficients among static flux tubes
(products/sampled_use.py; docs/tubes.md "In the input language").

At each point a tube piece is exact where known (integer flux, bose/fermi points), the `sample` estimate
where a statement estimated it, else the statement is refused.  Every expected number is composed here
from outside formulas: the anyon b_2 = 1/4 - s + s^2/2, s = alpha mod 2 (Arovas, Schrieffer, Wilczek,
Zee, Nucl. Phys. B 251 (1985) 117); the one-tube shift F = -s(1 - s)/2, s = flux mod 1 (Comtet,
Georgelin, Ouvry, J. Phys. A 22 (1989) 3917, attributed from memory in physics.md); the virial relation
a_2 = -b_2/b_1^2 (physics.md section 1) expanded by hand in the coverage; the sampled piece itself is
read from the `sample` statement's own printed numbers, never from the code under test's composition.
"""
from __future__ import annotations

import csv

import pytest
import sympy

import clusterexp

from conftest import run_cli

ANYONS = ("dimension 2\nparameter g\nspecies A exchange 1/2\ntubes flux g coverage 1/10\nclusters pairphase\n"
          "derive virial up to 2\n")
BOSONS = "dimension 2\nparameter n nonnegative\nspecies A bose\ntubes flux 1/2 coverage n\nclusters pairphase\n" \
         "derive virial up to 2\n"
B2_HALF = 1 / 4 - 1 / 2 + 1 / 8          # b_2(1/2) = -1/8 (Arovas et al. 1985)
F_HALF = -(1 / 2) * (1 / 2) / 2           # F(1/2) = -1/8 (Comtet, Georgelin, Ouvry 1989)


def _piece(derivation, name, statement=0):
    """(value, error) of a tube piece as the `sample` statement printed it (its only point)."""
    (point,) = derivation.sampled.statements[statement].points
    (value,) = [(v.value, v.error) for v in point.values if v.label == name]
    return value


def _anyon_a2(piece, n=0.1):
    """a_2 = -b_2/b_1^2 with b_1 = 1 + n F, b_2 = b_2(alpha) + n B, to first order in n, by hand."""
    return -B2_HALF - n * (piece - 2 * F_HALF * B2_HALF)


def test_table_takes_exact_points_and_the_sampled_point():
    d = clusterexp.derive(ANYONS + "sample b[2] at g = 1/2 seed 5 with 8000 loops\n"
                          "tabulate a[2] over g in [0, 1/2, 1, 3/2] into \"t.csv\"\n")
    (_, rows), = d.tables
    assert rows[0] == ["g", "a[2] (truncated series, O(rho_tubes**2) left out, rho_tubes = 1/10)", "a[2] error"]
    piece, error = _piece(d, "B_anyon_tube_A")
    by_g = {row[0]: (float(row[1]), float(row[2])) for row in rows[1:]}
    # integer flux: no Aharonov-Bohm phase, so a_2 is the free anyons' -b_2(1/2) = 1/8, with no error
    assert by_g["0"] == (0.125, 0.0) and by_g["1"] == (0.125, 0.0)
    # flux 1/2 and 3/2 (period 1): the sampled piece, its error times the coverage
    for g in ("0.5", "1.5"):
        assert by_g[g][0] == pytest.approx(_anyon_a2(piece), rel=1e-12)
        assert by_g[g][1] == pytest.approx(0.1 * error, rel=1e-9)


def test_table_of_exact_points_only_needs_no_sample_and_has_no_error_column():
    d = clusterexp.derive(ANYONS + "tabulate a[2] over g in [0, 1, 2] into \"t.csv\"\n")
    (_, rows), = d.tables
    assert rows[0] == ["g", "a[2] (truncated series, O(rho_tubes**2) left out, rho_tubes = 1/10)"]
    assert [row[1] for row in rows[1:]] == ["0.125"] * 3


def test_a_point_neither_exact_nor_sampled_is_refused_at_the_statement(tmp_path):
    path = tmp_path / "t.gas"
    path.write_text(ANYONS + "sample b[2] at g = 1/2 seed 5 with 4000 loops\n"
                    "tabulate a[2] over g in [0, 1/2, 1/3] into \"t.csv\"\n")
    done = run_cli("run", str(path), "--files-into", str(tmp_path / "out"))
    assert done.returncode == 2 and "Traceback" not in done.stderr
    assert f"{path}:8:1: error: no value for B_anyon_tube_A at g = 1/3" in done.stderr
    assert "add `sample b[2] at g = 1/3`" in done.stderr
    assert "\n    tabulate a[2] over g in [0, 1/2, 1/3] into \"t.csv\"\n    ^^^" in done.stderr
    assert not (tmp_path / "out" / "t.csv").exists()


def test_evaluate_names_the_sample_statement_to_add():
    with pytest.raises(clusterexp.InputError) as caught:
        clusterexp.derive(ANYONS + "evaluate a[2] at g = 1/4\n").evaluations
    assert "no value for B_anyon_tube_A at g = 1/4" in str(caught.value)
    assert "`sample b[2] at g = 1/4`" in str(caught.value) and str(caught.value.span).endswith("7:1")


def test_bose_table_over_the_coverage_states_its_order():
    # a_2 of a bose gas among tubes: -1/4 - (n^2/4)(T2 - F^2) + O(n^3) (docs/tubes.md); by hand from the
    # sampled T2 and F(1/2) = -1/8
    d = clusterexp.derive(BOSONS + "sample b[1] seed 6 with 4000 loops\n"
                          "tabulate a[2], b[1] over n in [0, 1/10, 1/5] into \"t.csv\"\n")
    (_, rows), = d.tables
    assert rows[0] == ["n", "a[2] (truncated series, O(n**3) left out)", "a[2] error",
                       "b[1] (truncated series, O(n**3) left out)", "b[1] error"]
    t2, error = _piece(d, "T_two_tubes")
    for row in rows[1:]:
        n = float(row[0])
        assert float(row[1]) == pytest.approx(-1 / 4 - n ** 2 / 4 * (t2 - F_HALF ** 2), rel=1e-12)
        assert float(row[2]) == pytest.approx(n ** 2 / 4 * error, rel=1e-9, abs=1e-300)
        # b_1 = 1 + n F + (n^2/2) T2 (docs/tubes.md): the one-tube shift of Comtet, Georgelin, Ouvry
        assert float(row[3]) == pytest.approx(1 + n * F_HALF + n ** 2 / 2 * t2, rel=1e-12)


def test_other_truncated_series_stay_refused():
    # a given series in a statistics parameter would be a polynomial in disguise in a table
    with pytest.raises(clusterexp.InputError) as caught:
        clusterexp.derive("dimension 2\nparameter alpha in [0, 1/2]\nspecies A exchange alpha\nclusters pairphase "
                          "{ a[3] = 1/36 + alpha^2/12 + O(alpha^3) }\nderive virial up to 3\n"
                          "tabulate a[3] over alpha in [0, 1/4] into \"t.csv\"\n").tables
    assert "known only as a series" in str(caught.value)


def test_plots_draw_points_and_curves_and_state_the_order(tmp_path):
    pytest.importorskip("matplotlib")
    path = tmp_path / "p.gas"
    path.write_text(ANYONS + "sample b[2] at g = 1/2 seed 5 with 4000 loops\n"
                    "plot a[2] over g from 0 to 1 into \"g.png\"\n")
    done = run_cli("run", str(path), "--files-into", str(tmp_path))
    assert done.returncode == 0, done.stderr
    assert (tmp_path / "g.png").read_bytes()[:4] == b"\x89PNG"
    caption = (tmp_path / "g.caption.tex").read_text()
    assert r"a[2]: truncated series, O(rho\_tubes**2) left out, rho\_tubes = 1/10" in caption
    assert "carry no error" in caption
    # over the coverage the pieces are constant: a curve with a band
    path.write_text(BOSONS + "sample b[1] seed 6 with 4000 loops\nplot a[2], b[1] over n from 0 to 1/2 into \"n.png\"\n"
                    "tabulate b[1] over n in [1/2] into \"n.csv\"\n")
    done = run_cli("run", str(path), "--files-into", str(tmp_path), "--overwrite")
    assert done.returncode == 0, done.stderr
    assert (tmp_path / "n.png").read_bytes()[:4] == b"\x89PNG"
    assert "O(n**3) left out" in (tmp_path / "n.caption.tex").read_text()
    header, row = list(csv.reader((tmp_path / "n.csv").read_text().splitlines()))
    assert header[1] == "b[1] (truncated series, O(n**3) left out)"


def test_a_plot_with_no_known_point_is_refused_with_the_statement_to_add(tmp_path):
    path = tmp_path / "p.gas"
    path.write_text(ANYONS + "plot a[2] over g from 1/4 to 3/4 into \"g.png\"\n")
    done = run_cli("run", str(path), "--files-into", str(tmp_path))
    assert done.returncode == 2 and "Traceback" not in done.stderr
    assert f"{path}:7:1: error: a[2] has no point on g in [1/4, 3/4] where its tube pieces are known" in done.stderr
    assert "add `sample b[2] at g = 1/2`" in done.stderr and "^" in done.stderr


MIXED = ("dimension 2\nparameter n\nparameter e in [0, 1]\nparameter nu in [0, 1]\nspecies A exchange e\nspecies B bose\n"
         "mutual A B = nu\ntubes flux 1/2 coverage n\nclusters pairphase { b[2,1] = 1/100 }\nderive virial up to 3\n"
         "sample b[1,1] at nu = 1/2 seed 8 with 4000 loops\nsample b[2,0] at e = 0 seed 9 with 4000 loops\n")


def test_a_mixed_point_puts_the_exact_piece_in_and_propagates_the_sampled_error_only():
    # a[2,1] holds both B_anyon_tube_A and B_braid_tube_A_B. At e = 0 (A a boson) the anyon piece is exactly F/2
    # (the l = 2 cycle of the ideal gas, F = -1/8 at flux 1/2: Comtet, Georgelin, Ouvry 1989), even though a
    # `sample` statement estimated it there too; the braid piece at nu = 1/2 is only sampled.
    d = clusterexp.derive(MIXED + "evaluate a[2,1] at e = 0, nu = 1/2, n = 1/10\n"
                          "tabulate a[2,1] over nu in [1/2, 1] at e = 0, n = 1/10 into \"t.csv\"\n")
    braid, braid_error = _piece(d, "B_braid_tube_A_B", 0)
    anyon, anyon_error = _piece(d, "B_anyon_tube_A", 1)
    assert anyon_error > 0 and braid_error > 0
    derived = d.value("virial", (2, 1)).removeO()
    symbols = {s.name: s for s in derived.free_symbols}
    at = {symbols["e"]: 0, symbols["nu"]: sympy.Rational(1, 2), symbols["n"]: sympy.Rational(1, 10)}
    expr = derived.xreplace(at)
    pieces = {symbols["B_anyon_tube_A"]: sympy.Rational(F_HALF) / 2, symbols["B_braid_tube_A_B"]: braid}
    value = float(expr.xreplace(pieces))
    slope_braid = float(sympy.diff(expr, symbols["B_braid_tube_A_B"]))
    slope_anyon = float(sympy.diff(expr, symbols["B_anyon_tube_A"]))
    assert slope_anyon != 0 and slope_braid != 0   # both pieces matter at this point
    ((label, text),) = d.evaluations[0][1]
    shown, shown_error = (float(x) for x in text.split(" (")[0].split(" +- "))
    assert shown == pytest.approx(value, abs=abs(slope_braid) * braid_error / 10)
    assert shown_error == pytest.approx(abs(slope_braid) * braid_error, rel=0.05)
    (_, rows), = d.tables
    assert rows[0][-1] == "a[2,1] error"
    half, one = rows[1:]
    assert float(half[-2]) == pytest.approx(value, rel=1e-12)
    assert float(half[-1]) == pytest.approx(abs(slope_braid) * braid_error, rel=1e-12)   # not the anyon's error
    # nu = 1: A and B do not braid, so the braid piece is 0 exactly too, and no error is left
    assert float(one[-1]) == 0.0


ANYONS_FREE = ("dimension 2\nparameter n\nparameter alpha in [0, 1]\nspecies A exchange alpha\ntubes flux 1/2 coverage n\n"
               "clusters pairphase\nderive virial up to 2\nsample b[2] at alpha = 1/2 seed 7 with 8000 loops\n")


def _hand_slope(piece):
    """The n term of a_2 at alpha = 1/2, flux 1/2: -(B - 2 F b_2) by hand (docs/tubes.md, the virial relation)."""
    return -(piece - 2 * F_HALF * B2_HALF)


def test_claim_within_errors_compares_each_power_of_the_coverage():
    probe = clusterexp.derive(ANYONS_FREE)
    piece, error = _piece(probe, "B_anyon_tube_A")
    slope, slope_error = _hand_slope(piece), error       # d(n term)/dB = -1
    near = f"{slope + 0.5 * slope_error:.8f}"             # half a standard error off: consistent
    far = f"{slope + 8 * slope_error:.8f}"                # eight standard errors off: a mismatch
    d = clusterexp.derive(ANYONS_FREE + f"claim a[2] = 1/8 + {near}*n within 3 errors\n"
                          f"claim a[2] = 1/8 + {far}*n within 3 errors\n"
                          f"claim a[2] = 1/4 + {near}*n + O(n^2) within 3 errors\n")
    consistent, mismatch, wrong_free_term = d.checks
    # -b_2(1/2) = 1/8 is the free term (Arovas et al. 1985); the n term is the sampled one
    assert consistent.status == "consistent within the sampling errors, not proven" and consistent.ok
    assert "not proven" in consistent.method and "O(n^2) are unknown and left out" in consistent.method
    assert mismatch.status == "mismatch" and not mismatch.ok
    assert "in the n^1 term" in mismatch.method and f"claimed {float(far):.10g}" in mismatch.method
    assert float(mismatch.derived_value.split(" +- ")[0]) == pytest.approx(slope, abs=slope_error / 2)   # quoted
    assert dict(mismatch.witness) == {"alpha": sympy.Rational(1, 2)}
    assert wrong_free_term.status == "mismatch" and "from the exact value" in wrong_free_term.method
    assert "in the n^0 term: claimed 0.25, derived 0.125" in wrong_free_term.method


def test_claim_within_errors_with_a_numeric_coverage_is_never_a_mismatch():
    # with the coverage a number the terms left out (O(rho_tubes^2)) are numbers too: far is undecided
    d = clusterexp.derive(ANYONS + "sample b[2] at g = 1/2 seed 5 with 8000 loops\n")
    piece, error = _piece(d, "B_anyon_tube_A")
    value = _anyon_a2(piece)
    d = clusterexp.derive(ANYONS + "sample b[2] at g = 1/2 seed 5 with 8000 loops\n"
                          f"claim a[2] = {value:.10f} within 2 errors\nclaim a[2] = {value + 20 * 0.1 * error:.10f} "
                          "within 2 errors\n")
    near, far = d.checks
    assert near.status == "consistent within the sampling errors, not proven"
    assert far.status == "undecided" and far.ok
    assert "the coverage is a number here and the difference may lie in the terms left out" in far.method
    assert "+-" in far.method and "O(rho_tubes^2) at rho_tubes = 1/10" in far.method


def test_cli_mismatch_exit_code_and_refusals(tmp_path):
    path = tmp_path / "c.gas"
    path.write_text(ANYONS_FREE + "claim a[2] = 1/8 + n within 3 errors\n")
    done = run_cli("run", str(path), "--no-files")
    assert done.returncode == 1, done.stderr
    assert "standard errors away from the Monte Carlo number at alpha = 1/2 in the n^1 term" in done.stdout
    # no `sample` statement: refused at the claim with the statement to add
    path.write_text(ANYONS_FREE.replace("sample b[2] at alpha = 1/2 seed 7 with 8000 loops\n", "")
                    + "claim a[2] = 1/8 within 3 errors\n")
    done = run_cli("run", str(path), "--no-files")
    assert done.returncode == 2 and "Traceback" not in done.stderr
    assert f"{path}:8:1: error: `within 3 errors` compares the claim with the numbers" in done.stderr
    assert "none estimates B_anyon_tube_A of a[2]; add one, e.g. `sample b[2] at ...`" in done.stderr
    # a claim truncated in another parameter stays term by term
    path.write_text(ANYONS_FREE + "claim a[2] = 1/8 + O(alpha^2) within 3 errors\n")
    done = run_cli("run", str(path), "--no-files")
    assert done.returncode == 2 and "a claim truncated in alpha is compared term by term" in done.stderr


def test_document_table_has_a_head_for_every_column_and_states_the_order(cli, tmp_path):
    # the LaTeX document's table: one column head per CSV column (the error column included, which it
    # lacked), and the truncation said under the heading
    path = tmp_path / "d.gas"
    path.write_text(ANYONS + "sample b[2] at g = 1/2 seed 5 with 4000 loops\n"
                    "tabulate a[2] over g in [0, 1/2] into \"t.csv\"\n")
    done = cli("run", str(path), "--format", "latex", "--document", "--no-files")
    assert done.returncode == 0, done.stderr
    table = done.stdout.split(r"\subsection*{Table (t.csv)}")[1].split(r"\end{tabular}")[0]
    assert r"\begin{tabular}{rrr}" in table and r"$g$ & $a_{2}$ & error of $a_{2}$ \\" in table
    assert r"$a_{2}$: truncated series, O(rho\_tubes**2) left out, rho\_tubes = 1/10" in table
    assert all(line.count("&") == 2 for line in table.splitlines() if line.startswith("$"))


MAPPED = ("dimension 2\nparameter n nonnegative\nparameter alpha in [0, 1]\nparameter g\nspecies A exchange alpha\n"
          "tubes flux g coverage n\nclusters pairphase\nderive virial up to 2\n")
OVER_ALPHA_AND_G = "plot a[2] over alpha from 0 to 1, g from 0 to 1 at n = 1/10 into \"m.png\"\n"


def _b2(alpha):
    """b_2 of anyons, 1/4 - alpha + alpha^2/2 on [0, 1] (Arovas, Schrieffer, Wilczek, Zee 1985)."""
    return 1 / 4 - alpha + alpha ** 2 / 2


def test_a_heat_map_takes_the_exact_and_the_sampled_points_with_their_errors():
    from types import SimpleNamespace

    from clusterexp.products.sampled_use import tube_grid
    d = clusterexp.derive(MAPPED + "sample b[2] over alpha = [1/4, 1/2] at g = 1/2 seed 5 with 4000 loops\n"
                          + OVER_ALPHA_AND_G + "plot a[2] over alpha from 0 to 1, g from 3/4 to 2 at n = 1/10 into "
                          "\"exact.png\"\n")
    item = SimpleNamespace(label="a[2]", value=d.value("virial", (2,)).removeO())
    x, y, z, errors = tube_grid(d, item, d.system.figures[0])
    # alpha: the bose and fermi points and the sampled values; g: the integers (no effect) and the sampled flux
    assert list(x) == [0, 0.25, 0.5, 1] and list(y) == [0, 0.5, 1]
    pieces = {}
    for k, alpha in enumerate((0.25, 0.5)):
        point = d.sampled.statements[0].points[k]
        (pieces[alpha],) = [(v.value, v.error) for v in point.values if v.label == "B_anyon_tube_A"]
    n = 0.1
    for i, alpha in enumerate(x):
        for j, g in enumerate(y):
            if g != 0.5:            # an integer flux has no effect (period 1): the free anyons' a_2 = -b_2
                expected, error = -_b2(alpha), 0.0
            elif alpha in (0, 1):   # bose, fermi: a_2 = -+1/4 through the first order in n (the one-tube F cancels)
                expected, error = (-0.25 if alpha == 0 else 0.25), 0.0
            else:                   # a_2 = -b_2 - n (B - 2 F b_2) by hand, B as the sample statement printed it
                piece, piece_error = pieces[alpha]
                expected, error = -_b2(alpha) - n * (piece - 2 * F_HALF * _b2(alpha)), n * piece_error
            assert z[j, i] == pytest.approx(expected, rel=1e-12, abs=1e-15)
            assert errors[j, i] == pytest.approx(error, rel=1e-9, abs=1e-300)
    # a grid of exact points only (integer fluxes) has no error panel
    _, y, z, none = tube_grid(d, item, d.system.figures[1])
    assert list(y) == [1, 2] and none is None and z[1] == pytest.approx([-_b2(a) for a in x], rel=1e-12)


def test_a_heat_map_is_written_as_pdf_and_png_with_its_caption(tmp_path):
    pytest.importorskip("matplotlib")
    import matplotlib.image
    path = tmp_path / "m.gas"
    path.write_text(MAPPED + "sample b[2] over alpha = [1/4, 1/2] at g = 1/2 seed 5 with 4000 loops\n" + OVER_ALPHA_AND_G
                    + "plot a[2] over n from 0 to 1/2, g from 0 to 1 at alpha = 1/2 into \"n.png\"\n")
    done = run_cli("run", str(path), "--files-into", str(tmp_path))
    assert done.returncode == 0, done.stderr
    for name in ("m", "n"):
        assert (tmp_path / f"{name}.pdf").read_bytes()[:4] == b"%PDF"
        height, width = matplotlib.image.imread(str(tmp_path / f"{name}.png")).shape[:2]
        assert width > 2 * height * 0.9        # the value panel and the error panel side by side
        caption = (tmp_path / f"{name}.caption.tex").read_text()
        assert "a[2]: truncated series, O(n**2) left out." in caption
        assert r"else Brownian-loop Monte Carlo (\texttt{sample}); right: one standard error." in caption


def test_a_heat_map_with_a_grid_point_unknown_is_refused_with_the_statement_to_add(tmp_path):
    path = tmp_path / "m.gas"
    path.write_text(MAPPED + "sample b[2] at alpha = 1/4, g = 1/2 seed 5 with 4000 loops\n"
                    "sample b[2] at alpha = 1/2, g = 1/4 seed 5 with 4000 loops\n" + OVER_ALPHA_AND_G)
    done = run_cli("run", str(path), "--files-into", str(tmp_path))
    assert done.returncode == 2 and "Traceback" not in done.stderr
    assert (f"{path}:11:1: error: a heat map of a[2] needs its tube pieces at every point of its grid (alpha in "
            "{0, 1/4, 1/2, 1}; g in {0, 1/4, 1/2, 1}); no value for B_anyon_tube_A at alpha = 1/4, g = 1/4") in done.stderr
    assert "add `sample b[2] at alpha = 1/4, g = 1/4`" in done.stderr
    assert "\n    plot a[2] over alpha from 0 to 1, g from 0 to 1" in done.stderr and "    ^^^" in done.stderr
    assert not (tmp_path / "m.png").exists()
    # an axis with one known value cannot be a map's axis
    path.write_text(MAPPED + "sample b[2] at alpha = 1/4, g = 1/2 seed 5 with 4000 loops\n"
                    "plot a[2] over alpha from 1/8 to 3/8, g from 0 to 1 at n = 1/10 into \"m.png\"\n")
    done = run_cli("run", str(path), "--files-into", str(tmp_path))
    assert done.returncode == 2 and "Traceback" not in done.stderr
    assert (f"{path}:10:1: error: a heat map of a[2] takes alpha where its tube pieces may be known (the `sample` "
            "points and the integers), and [1/8, 3/8] holds 1: add a `sample b[2] over alpha = [...]`") in done.stderr


def test_within_errors_on_a_tube_coefficient_without_pieces_says_so():
    # b_1 of anyons among tubes is 1 + n F + O(n^2), exact through its order: nothing sampled to compare with
    with pytest.raises(clusterexp.InputError) as caught:
        clusterexp.derive(ANYONS_FREE.replace("derive virial up to 2", "derive cluster up to 2")
                          + "claim b[1] = 1 - n/8 within 3 errors\n").checks
    assert "b[1] holds no tube piece here" in str(caught.value) and str(caught.value.span).endswith("9:1")


def test_a_truncated_coefficient_without_pieces_is_a_curve_whose_caption_states_the_order(tmp_path):
    # b_1 of anyons among tubes is 1 + n F + O(n^2) (the one-tube shift, Comtet, Georgelin, Ouvry 1989): a
    # closed form through its order, drawn as a curve with the order under it
    pytest.importorskip("matplotlib")
    path = tmp_path / "b.gas"
    path.write_text("dimension 2\nparameter g in [0, 1]\nparameter n nonnegative\nspecies A exchange 1/2\n"
                    "tubes flux g coverage n\nclusters pairphase\nderive cluster up to 2\n"
                    "plot b[1] over g from 0 to 1 at n = 1/10 into \"b.png\"\n"
                    "tabulate b[1] over g in [1/2] at n = 1/10 into \"b.csv\"\n")
    done = run_cli("run", str(path), "--files-into", str(tmp_path))
    assert done.returncode == 0, done.stderr
    assert "b[1]: truncated series, O(n**2) left out." in (tmp_path / "b.caption.tex").read_text()
    header, row = list(csv.reader((tmp_path / "b.csv").read_text().splitlines()))
    assert header == ["g", "n", "b[1] (truncated series, O(n**2) left out)"]
    assert float(row[2]) == pytest.approx(1 + 0.1 * F_HALF, rel=1e-14)
