"""Long sums are broken over lines at top-level signs only."""
import sympy

import clusterexp
from clusterexp.export import latex_snippet
from clusterexp.export.latex_lines import aligned_rows, top_level_terms


def test_terms_split_only_at_top_level():
    text = r"- \frac{a - b}{c} + \left(x + y\right)^{2} - 3 \sqrt{2 - z}"
    assert top_level_terms(text) == [r"- \frac{a - b}{c}", r"+ \left(x + y\right)^{2}", r"- 3 \sqrt{2 - z}"]
    assert top_level_terms(r"x_{\{a + b\}} + 1") == [r"x_{\{a + b\}}", "+ 1"]


def test_split_terms_reassemble_to_the_same_expression():
    # the pieces, parsed back by sympy's own LaTeX-independent route: compare with sympy.latex of
    # each term of the expression (general-purpose library as the reference)
    x, y, z = sympy.symbols("x y z")
    expr = x**2 / 3 - (y - z) ** 2 * x + sympy.sqrt(2) * z - 7
    pieces = top_level_terms(sympy.latex(expr))
    assert len(pieces) == len(sympy.Add.make_args(expr))


def test_long_coefficients_keep_one_equation_number():
    d = clusterexp.derive("dimension 2 parameter mu positive species P bose species Q mass mu bose "
                          "derive virial a[2,2]")
    snippet = latex_snippet(d)
    lines = snippet.splitlines()[1:-1]
    assert len(lines) >= 3
    assert all(line.endswith(r"\nonumber \\") for line in lines[:-1])
    assert lines[-1].startswith(r"  &\quad ")
    assert aligned_rows("a", "x + y") == "  a &= x + y"
