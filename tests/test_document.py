"""The standalone document (`--document`) of every worked example compiles with pdflatex, has no line
wider than the page by more than 5 pt, no undefined reference, and a first page that is not blank
(rendered with pdftoppm). One test per worked example, each in its own temporary folder; the figures
the input asks for are written there and included."""
import os
import re
import shutil
import subprocess

import pytest

import clusterexp
from clusterexp.export import latex_document
from conftest import ROOT, run_cli

WORKED = sorted(p for p in (ROOT / "worked").iterdir() if (p / "input.gas").is_file())
OVERFULL = re.compile(r"Overfull \\hbox \(([0-9.]+)pt too wide\)")
needs_pdflatex = pytest.mark.skipif(shutil.which("pdflatex") is None and not os.environ.get("CI"),
                                    reason="pdflatex not installed (CI installs texlive-latex-base/recommended)")


def compile_twice(folder, name="doc"):
    """pdflatex twice (references settle in the second pass); returns the log of the second."""
    for _ in range(2):
        result = subprocess.run(["pdflatex", "-interaction=nonstopmode", "-halt-on-error", f"{name}.tex"],
                                cwd=folder, capture_output=True, text=True, timeout=180)
        assert result.returncode == 0, result.stdout[-3000:]
    return (folder / f"{name}.log").read_text(errors="replace")


def layout_problems(log: str) -> list[str]:
    """Overfull lines wider than 5 pt and undefined references or citations, as the log states them."""
    wide = [f"overfull by {m.group(1)} pt" for m in OVERFULL.finditer(log) if float(m.group(1)) > 5.0]
    undefined = [line for line in log.splitlines() if "undefined" in line.lower() and "Warning" in line]
    return wide + undefined


def first_page_is_not_blank(pdf) -> None:
    if shutil.which("pdftoppm") is None and not os.environ.get("CI"):
        pytest.skip("pdftoppm (poppler-utils) not installed; CI installs it")
    subprocess.run(["pdftoppm", "-r", "50", "-png", "-f", "1", "-l", "1", str(pdf), str(pdf.with_suffix(""))],
                   check=True, timeout=60)
    (png,) = pdf.parent.glob(pdf.stem + "-*1.png")
    from PIL import Image   # (matplotlib's dependency)
    image = Image.open(png).convert("L")
    dark = sum(image.histogram()[:128])   # pixels darker than mid-grey
    assert image.size[0] > 100 and dark > 200, (image.size, dark)


@needs_pdflatex
@pytest.mark.parametrize("folder", WORKED, ids=[p.name for p in WORKED])
def test_worked_example_document_compiles_without_overfull_lines(folder, tmp_path):
    result = run_cli("run", str(folder / "input.gas"), "--format", "latex", "--document", "--files-into",
                     str(tmp_path), "-o", str(tmp_path / "doc.tex"))
    assert result.returncode == 0, result.stderr
    source = (tmp_path / "doc.tex").read_text()
    system = clusterexp.build_system_from_file(folder / "input.gas")
    for figure in system.figures:   # the figures the input asks for are included, with their caption
        stem = figure.path.rsplit(".", 1)[0]
        assert rf"\includegraphics[width=0.8\textwidth]{{{stem}.pdf}}" in source
        assert (tmp_path / f"{stem}.caption.tex").read_text().rstrip("\n") in source
    log = compile_twice(tmp_path)
    assert layout_problems(log) == []
    first_page_is_not_blank(tmp_path / "doc.pdf")


LONG = ("dimension 2 parameter alpha in [0, 1] parameter nu in [0, 1) parameter r positive "
        "species A exchange alpha species B mass r exchange alpha mutual A B = nu clusters pairphase "
        "derive virial up to 3 expand alpha about 0 to 3 from above expand nu about 1/2 to 3 "
        "claim a[2,1] = 1 + nu + O(alpha^2)\n")


@needs_pdflatex
@pytest.mark.parametrize("form", ["values expanded", "values factored", "values collected in pieces",
                                  "values mass_prefactor"])
def test_long_values_and_series_are_broken_to_the_page(form, tmp_path):
    # series lines of mixed third-order coefficients once ran 669 pt over the margin
    (tmp_path / "doc.tex").write_text(latex_document(clusterexp.derive(LONG + form)))
    assert layout_problems(compile_twice(tmp_path)) == []


def test_the_document_groups_by_kind_and_order_and_lists_zeros_compactly():
    d = clusterexp.derive("dimension 2 parameter nu in [0, 1] species A bose species B fermi mutual A B = nu "
                          "clusters pairphase derive virial up to 2 derive cluster up to 2 title \"Bose--Fermi $\\nu$ film\"")
    source = latex_document(d)
    assert r"\title{Bose--Fermi $\nu$ film}" in source
    assert source.index(r"\section{Cluster coefficients}") < source.index(r"\section{Virial coefficients}")
    assert source.count(r"\subsection{Order 2}") == 2
    assert r"\begin{tabular}{llll}" in source and r"\toprule" in source      # the species table
    assert r"\label{b:A-B}" in source and r"\label{a:A-B}" in source
    # the free Bose and Fermi a_2 = -+1/4 are printed; nothing vanishes at order 2 here
    zero = clusterexp.derive("dimension 2 species A bose species B fermi clusters ideal derive virial up to 2")
    text = latex_document(zero)
    assert r"Vanishing: $a_{A B}$." in text and r"\label{a:A-B}" not in text   # a zero is not numbered


@needs_pdflatex
def test_a_sampled_map_is_a_figure_of_the_document(tmp_path):
    pytest.importorskip("matplotlib")
    text = ("dimension 2 parameter alpha in [0, 1] parameter nu in [0, 1] species A exchange alpha "
            "species B exchange alpha mutual A B = nu typeset nu as \"\\nu_{AB}\" clusters pairphase "
            "derive virial a[2,1] sample a[2,1] over alpha = [0, 1/2], nu = [0, 1/2] seed 9 with 2800 loops "
            "map \"grid.png\" evaluate a[2,1] at alpha = 1/2, nu = 1/2 "
            "tabulate a[2,1] over alpha in [0, 1/2] at nu = 1/2 into \"t.csv\"\n")
    result = run_cli("run", "-e", text, "--format", "latex", "--document", "--files-into", str(tmp_path),
                     "-o", str(tmp_path / "doc.tex"))
    assert result.returncode == 0, result.stderr
    assert sorted(p.name for p in tmp_path.glob("grid*")) == ["grid.caption.tex", "grid.pdf", "grid.png"]
    source = (tmp_path / "doc.tex").read_text()
    caption = (tmp_path / "grid.caption.tex").read_text().rstrip("\n")
    assert r"\includegraphics[width=0.8\textwidth]{grid.pdf}" in source and caption in source
    assert caption.startswith(r"Sampled $a_{A^{2} B}$ over $\alpha$ and $\nu_{AB}$") and r"\pm" in caption
    assert "not drawn: the bound on the loops' slicing bias, at most" in caption
    assert r"\text{(Monte Carlo; slicing bias below " in source      # the evaluated number, in the document
    assert r"slicing bias bound of $a_{A^{2} B}$" in source          # the tabulated bound's column
    assert layout_problems(compile_twice(tmp_path)) == []


@needs_pdflatex
def test_snippet_equations_carry_labels_from_their_names(tmp_path):
    text = ("dimension 2 parameter nu in [0, 1) parameter r positive species L exchange 1/3 species H mass r "
            "exchange 1/3 mutual L H = nu clusters pairphase derive virial up to 3 values collected in pieces "
            "snippet a[1,1], a[2,1]\n")
    result = run_cli("run", "-e", text, "--format", "latex")
    assert result.returncode == 0, result.stderr
    snippet = result.stdout
    assert snippet.count(r"\begin{align}") == 2 and snippet.count(r"\label{") == 2
    assert r"\label{a:L-H}" in snippet and r"\label{a:L2-H}" in snippet and "a_{L^{2}}" not in snippet
    # pasted into a manuscript, the labels resolve and the lines fit the page
    (tmp_path / "paper.tex").write_text("\n".join([
        r"\documentclass[11pt]{article}", r"\usepackage[a4paper,margin=2.5cm]{geometry}", r"\usepackage{amsmath}",
        r"\begin{document}", r"By \eqref{a:L-H} and \eqref{a:L2-H}:", snippet, r"\end{document}"]))
    assert layout_problems(compile_twice(tmp_path, "paper")) == []


def test_values_with_many_digits_may_break():
    d = clusterexp.derive("dimension 3 species F fermi clusters ideal derive virial up to 3 "
                          "evaluate a[3] digits 200")
    source = latex_document(d)
    assert source.count(r"\allowbreak") >= 15


@needs_pdflatex
def test_a_series_coefficient_longer_than_a_line_is_opened_over_several(tmp_path):
    # order 4: the coefficient of (nu - 1/2)^2 in a_{A^2 B^2} alone is about three lines long
    text = LONG.replace("derive virial up to 3", "derive virial up to 4").replace("to 3 from above", "to 2 from above")
    source = latex_document(clusterexp.derive(text.replace("expand nu about 1/2 to 3", "expand nu about 1/2 to 2")))
    assert r"\biggl(" in source and source.count(r"\biggl(") == source.count(r"\biggr)")
    (tmp_path / "doc.tex").write_text(source)
    assert layout_problems(compile_twice(tmp_path)) == []
