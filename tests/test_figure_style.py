"""Figures for a journal (products/figure_style.py): PDF and PNG, no footer unless asked, the caption
beside the figure, the conventions in the metadata, typeset names in labels and legends."""
import shutil
import subprocess

import pytest

import clusterexp
from clusterexp import InputError
from clusterexp.products.plots import coefficient_latex

pytest.importorskip("matplotlib")
BILAYER = ("dimension 2 parameter theta in [0, 1] species X mass 2 bose species T mass 3 fermi "
           "mutual X T = theta typeset theta as \"\\vartheta\" typeset T as \"\\mathcal{T}\" "
           "clusters pairphase derive virial up to 2 plot a[1,1], b[1,1] over theta into \"f.png\"\n")


def _png_size(data: bytes) -> tuple[int, int]:
    return int.from_bytes(data[16:20], "big"), int.from_bytes(data[20:24], "big")


def test_a_figure_is_pdf_png_and_caption_with_conventions_in_the_metadata(tmp_path):
    clusterexp.derive(BILAYER).write_files(tmp_path)
    assert sorted(p.name for p in tmp_path.iterdir()) == ["f.caption.tex", "f.pdf", "f.png"]
    png, pdf = (tmp_path / "f.png").read_bytes(), (tmp_path / "f.pdf").read_bytes()
    assert b"Description" in png and b"mutual alpha_ij period 1" in png          # a PNG tEXt chunk
    assert b"/Subject (exchange alpha = 0 bosons, 1 fermions " in pdf  # the PDF info dictionary
    caption = (tmp_path / "f.caption.tex").read_text()
    assert caption.startswith(r"$a_{X \mathcal{T}}$, $b_{X \mathcal{T}}$ against $\vartheta\in[0,1]$")
    assert r"\beta P{\lambda}^d=\sum_n b_n z^n" in caption


def test_no_footer_unless_asked(tmp_path):
    clusterexp.derive(BILAYER).write_files(tmp_path / "plain")
    clusterexp.derive(BILAYER + "figures footer").write_files(tmp_path / "footer")
    plain = _png_size((tmp_path / "plain" / "f.png").read_bytes())
    footer = _png_size((tmp_path / "footer" / "f.png").read_bytes())
    assert plain == (1920, 1440)               # 6.4 x 4.8 inches at 300 dpi: nothing added below
    assert footer[0] == 1920 and footer[1] > plain[1]


def test_pdf_fonts_are_computer_modern(tmp_path):
    if shutil.which("pdffonts") is None:
        pytest.skip("pdffonts (poppler-utils) is not installed")
    clusterexp.derive(BILAYER).write_files(tmp_path)
    fonts = subprocess.run(["pdffonts", str(tmp_path / "f.pdf")], capture_output=True, text=True).stdout
    assert "Cmr10" in fonts and "Cmmi10" in fonts and "DejaVu" not in fonts


def test_legends_and_labels_use_the_typeset_names():
    d = clusterexp.derive(BILAYER)
    assert coefficient_latex(d.coefficient("virial", (1, 1)), d.system) == r"a_{X \mathcal{T}}"
    assert coefficient_latex(d.coefficient("virial", (1, 1))) == "a_{X T}"


def test_the_latex_engine_is_an_option(tmp_path):
    d = clusterexp.derive(BILAYER + "figures latex_engine")
    if shutil.which("latex") and shutil.which("dvipng"):
        d.write_files(tmp_path)
        assert (tmp_path / "f.png").read_bytes().startswith(b"\x89PNG")
    else:
        with pytest.raises(InputError, match="`figures latex_engine` needs"):
            d.write_files(tmp_path)
        assert list(tmp_path.iterdir()) == []
