"""Figures: real PNG and PDF files, labels from symbol names, default intervals, clear errors."""
import sys

import pytest
import sympy

import clusterexp
from clusterexp.errors import InputError
from clusterexp.products.plots import (PlotError, coefficient_latex, conventions_caption, default_interval, plot_line,
                              plot_map, symbol_latex)


@pytest.fixture(scope="module")
def pair():
    return clusterexp.derive("dimension 2 parameter t in [0, 1] parameter g species A exchange g "
                             "species B exchange 1/3 mutual A B = t clusters landau derive virial up to 3")


def virial(derivation, index):
    return next(c for c in derivation.of_kind("virial") if c.index == index)


def test_labels_from_symbol_names(pair):
    assert symbol_latex("alpha") == r"\alpha"
    assert symbol_latex("nu_AB") == r"\nu_{AB}"
    assert symbol_latex("g2") == "g_{2}"
    assert symbol_latex("alpha_top_mid") == r"\alpha_{\mathrm{top},\mathrm{mid}}"
    assert coefficient_latex(virial(pair, (2, 1))) == "a_{A^{2} B}"
    caption = conventions_caption(pair.system)
    assert "alpha = 0 bosons, 1 fermions" in caption and "nu = rho / rho_L" in caption


def test_default_intervals_are_one_period_or_the_declared_range(pair):
    assert str(default_interval("g", pair.system)) == "[0, 2]"  # exchange parameter, undeclared range
    assert str(default_interval("t", pair.system)) == "[0, 1]"  # mutual, declared [0, 1]
    wide = clusterexp.derive("dimension 2 parameter t in [-1, 3] species A bose species B bose mutual A B = t "
                             "clusters landau derive virial up to 2")
    assert str(default_interval("t", wide.system)) == "[0, 1]"  # one period inside the declared range


def _png_is_a_real_picture(path):
    import matplotlib.image
    import numpy
    pixels = matplotlib.image.imread(str(path))
    assert pixels.shape[0] >= 400 and pixels.shape[1] >= 600
    colours = numpy.unique(pixels.reshape(-1, pixels.shape[-1]), axis=0)
    assert len(colours) > 50
    assert pixels[..., :3].var() > 1e-3


def test_line_plot_png_and_pdf(tmp_path, pair):
    pytest.importorskip("matplotlib")
    coefficients = [virial(pair, (2, 0)), virial(pair, (3, 0)), virial(pair, (2, 1))]
    png = plot_line(coefficients, "g", None, tmp_path / "line.png", other_values={"t": "1/3"}, system=pair.system)
    _png_is_a_real_picture(png)
    pdf = plot_line(coefficients, "g", (0, 1), tmp_path / "line.pdf", other_values={"t": "1/3"}, system=pair.system)
    data = pdf.read_bytes()
    assert data.startswith(b"%PDF") and len(data) > 5000
    again = plot_line(coefficients, "g", (0, 1), tmp_path / "again.pdf", other_values={"t": "1/3"}, system=pair.system)
    assert again.read_bytes() == data  # no creation date: same input, same bytes
    # every figure is written as vector PDF and as PNG (figure_style)
    assert sorted(p.name for p in tmp_path.iterdir()) == ["again.pdf", "again.png", "line.pdf", "line.png"]


def test_heat_map_png(tmp_path, pair):
    pytest.importorskip("matplotlib")
    path = plot_map(virial(pair, (2, 1)), "g", ("t", None), tmp_path / "map.png", system=pair.system,
                    resolution=41)
    _png_is_a_real_picture(path)


def test_plotting_against_a_parameter_the_coefficient_lacks_names_those_it_has(tmp_path, pair):
    with pytest.raises(PlotError, match=r"cannot plot against g: a\[1,1\] does not depend on it; it depends on t"):
        plot_line(virial(pair, (1, 1)), "g", None, tmp_path / "x.png", system=pair.system)
    with pytest.raises(InputError, match=r"fix t with `at t = ...`"):
        plot_line(virial(pair, (2, 1)), "g", None, tmp_path / "x.png", system=pair.system)
    with pytest.raises(PlotError, match="values given for nu, which the plotted coefficients do not depend on"):
        plot_line(virial(pair, (2, 0)), "g", None, tmp_path / "x.png", other_values={"nu": 1})
    with pytest.raises(PlotError, match="figure format"):
        plot_line(virial(pair, (2, 0)), "g", None, tmp_path / "x.jpeg")
    with pytest.raises(PlotError, match="two different parameters"):
        plot_map(virial(pair, (2, 1)), "g", "g", tmp_path / "x.png")
    assert not list(tmp_path.iterdir())


def test_without_matplotlib_the_message_says_how_to_install_it(tmp_path, pair, monkeypatch):
    monkeypatch.setitem(sys.modules, "matplotlib", None)  # makes `import matplotlib` fail
    monkeypatch.setitem(sys.modules, "matplotlib.figure", None)
    with pytest.raises(InputError, match=r"plots need matplotlib: pip install 'clusterexp\[plot\]'"):
        plot_line(virial(pair, (2, 0)), "g", None, tmp_path / "x.png")


def test_axis_labels_use_the_typeset_names_mathtext_can_draw():
    pytest.importorskip("matplotlib")
    from clusterexp.language.build import build_system
    from clusterexp.products.plots import axis_latex
    system = build_system('dimension 2 parameter nu in [0, 1] parameter t species A bose '
                          'typeset nu as "\\tilde{\\nu}_{AB}" typeset t as "\\textrm{t}"')
    assert axis_latex("nu", system) == r"\tilde{\nu}_{AB}"
    assert axis_latex("t", system) == "t"  # \textrm compiles in LaTeX but not in mathtext: plain name
    assert axis_latex("nu") == r"\nu"
