"""Printers: deterministic, parsable, compilable."""
import json

import pytest
import sympy

import clusterexp
from clusterexp.exact.series import available_backends
from clusterexp.export import latex_document, latex_snippet, to_json, to_text
from clusterexp.exact.terms import TermSum

TEXT = """dimension 2 parameter nu in [0, 1] species A species B mass 2 mutual A B = nu
clusters given { b[1,1] = -nu*(1 - nu) } derive virial up to 3 derive fugacity up to 2"""


def test_json_values_parse_back_to_the_same_sympy_values():
    import json
    d = clusterexp.derive(TEXT)
    data = json.loads(to_json(d))
    nu = sympy.Symbol("nu", real=True, nonnegative=True)
    for entry, c in zip(data["coefficients"], d):
        parsed = sympy.sympify(entry["value"], locals={"nu": nu})
        assert sympy.simplify(parsed - c.value) == 0


FAST_CASES = [
    TEXT,
    # generic b's with a symbolic mass in 3D: rational powers of the mass through b_{e_i}
    "dimension 3 parameter mu positive species A species B mass mu clusters generic derive virial up to 4 "
    "derive fugacity up to 3 derive density up to 3",
    # atoms that are not plain symbols (sqrt(2), sin) must fall back to sympy's printer
    "dimension 2 parameter g species A clusters given { b[2] = sqrt(2)/4  b[3] = sin(g)^2 } derive virial up to 4",
]


@pytest.mark.parametrize("text", FAST_CASES)
def test_printing_straight_from_the_ring_agrees_with_sympy(text):
    """The printers read large values straight off the ring (terms.TermSum) instead of building sympy
    expressions; the text must parse back to the value sympy's own conversion gives, and the LaTeX
    must be what sympy's printer writes for the same value."""
    from clusterexp.export.latex import _symbol_names
    d = clusterexp.derive(text)
    names = _symbol_names(d)
    used_fast = 0
    for c in d:
        symbols = {s.name: s for s in c.value.free_symbols}
        parsed = sympy.sympify(c.text, locals=symbols)
        assert sympy.expand(parsed - c.value) == 0, c.label
        if c.terms is not None and TermSum.from_expr(c.value) is not None:  # sympy's value is flat too
            used_fast += 1
            # sympy brackets a subscripted base under a power except inside a fraction; ours always
            plain = lambda t: t.replace(r"\left(", "").replace(r"\right)", "")
            expected = sympy.latex(c.value, order="lex", symbol_names=names)
            assert plain(c.latex(names)) == plain(expected), c.label
    assert used_fast > 0 or "sin" in text


def test_text_lists_every_coefficient_once():
    d = clusterexp.derive(TEXT)
    text = to_text(d)
    assert text.count(" = ") >= len(d)
    assert "# conventions:" in text


def test_latex_without_alignment():
    d = clusterexp.derive(TEXT + " output align off")
    assert "&=" not in latex_snippet(d)


@pytest.mark.parametrize("backend", available_backends())
def test_one_pass_split_of_a_part_matches_the_coefficient_by_coefficient_reading(backend):
    """TermSum.split_ring_part reads all coefficients of a homogeneous part at once; it must give the
    same terms in the same order as splitting the part and reading each coefficient (TermSum.from_ring),
    and both must agree with sympy's own conversion of the same polynomial."""
    from clusterexp.exact.series import PolynomialRing
    a, b, mu = sympy.symbols("a b mu")
    ring = PolynomialRing(2, [a, b, mu], backend=backend)
    x, y = ring.var(0), ring.var(1)
    part = (ring.from_expr(a ** 3 * mu / 7 - b + 2) * x ** 2 * y + ring.from_expr(mu ** 2 - a * b ** 4) * x * y ** 2
            + ring.from_expr(-sympy.Rational(5, 3) * b * mu) * y ** 3)
    split = TermSum.split_ring_part(ring, part)
    pieces = ring.split_by_variables(part)
    assert set(split) == set(pieces) == {(2, 1), (1, 2), (0, 3)}
    for index, element in pieces.items():
        slow = TermSum.from_ring(ring, element)
        assert split[index].terms == slow.terms
        assert sympy.sympify(split[index].text()) == ring.to_expr(element)
    odd = PolynomialRing(1, [sympy.sqrt(2)], backend=backend)
    assert TermSum.split_ring_part(odd, odd.var(0)) is None   # sqrt(2) is left to sympy


@pytest.mark.parametrize("backend", available_backends())
def test_one_pass_split_merges_powers_of_one_symbol(backend):
    """Atoms mu, 1/mu and sqrt(mu) are powers of one symbol: their exponents are added (mu * (1/mu) is
    1), as sympy's own conversion does."""
    from clusterexp.exact.series import PolynomialRing
    a, mu = sympy.symbols("a mu", positive=True)
    ring = PolynomialRing(2, [a, mu, 1 / mu, sympy.sqrt(mu)], backend=backend)
    x, y = ring.var(0), ring.var(1)
    inv, root = ring.from_expr(1 / mu), ring.from_expr(sympy.sqrt(mu))
    part = (ring.from_expr(mu) * inv * 3 + ring.from_expr(a * mu ** 2) * inv * root) * x * y \
        + (inv * inv - ring.from_expr(a)) * y ** 2
    split = TermSum.split_ring_part(ring, part)
    for index, element in ring.split_by_variables(part).items():
        assert split[index].terms == TermSum.from_ring(ring, element).terms
        assert split[index].terms == TermSum(dict(split[index].terms)).terms   # the dense-key order
        assert sympy.simplify(sympy.sympify(split[index].text(), locals={"a": a, "mu": mu})
                              - ring.to_expr(element)) == 0
    from fractions import Fraction
    # by hand: 3 mu (1/mu) = 3 and a mu^2 (1/mu) sqrt(mu) = a mu^(3/2)
    assert split[(1, 1)].terms == [(((a, 1), (mu, Fraction(3, 2))), Fraction(1)), ((), Fraction(3))]


def test_sparse_term_order_is_the_dense_descending_order():
    """TermSum's order is descending lex on dense exponent vectors (zeros for absent symbols); the
    sparse key of the one-pass reader must give the same order, negative exponents (1/mu) included.
    Reference: sorting the dense vectors with Python's own tuple comparison."""
    import random
    from clusterexp.exact.terms import _ENDED, _descending
    rnd = random.Random(5)
    vectors = {tuple(rnd.choice((-2, -1, 0, 0, 0, 1, 2)) for _ in range(4)) for _ in range(300)}
    sparse = {v: [(r, None, e) for r, e in enumerate(v) if e] for v in vectors}
    by_key = sorted(vectors, key=lambda v: _descending(sparse[v]))
    assert by_key == sorted(vectors, reverse=True)
    assert _descending([]) == _ENDED


@pytest.mark.parametrize("backend", available_backends())
def test_one_pass_split_with_negative_powers_in_the_distinct_path(backend):
    """Atoms z and 1/mu (one atom per symbol: the reader's fast path) with the exponent of mu
    negative: the order must still be the dense descending one, also when the ranks are re-sorted."""
    from clusterexp.exact.series import PolynomialRing
    from clusterexp.exact.terms import _AtomReader
    z, mu = sympy.symbols("z mu", positive=True)
    ring = PolynomialRing(1, [z, 1 / mu], backend=backend)
    reader = _AtomReader.of(ring)
    assert reader.distinct
    inv, zz = ring.atom(1 / mu), ring.atom(z)
    part = (inv * zz * 3 + zz ** 2 - inv ** 2 + 5 + zz * inv ** 3) * ring.var(0) ** 2
    split = TermSum.split_ring_part(ring, part)[(2,)]
    assert split.terms == TermSum(dict(split.terms)).terms
    reader.monotone = False     # the re-sorting path (atoms whose expression order differs from the symbols')
    rows = [(powers[1:], num, den) for powers, num, den in ring.sparse_terms(part)]
    assert reader.term_sum(rows).terms == split.terms
    assert sympy.expand(sympy.sympify(split.text(), locals={"z": z, "mu": mu}) -
                        (3 * z / mu + z ** 2 - mu ** -2 + 5 + z / mu ** 3)) == 0


def test_numbers_beyond_python_digit_limit_print_through_the_api():
    """Python refuses int() of decimal strings over 4300 digits; a coefficient with such numbers must
    still be read off the ring (the printed flint form is read through flint). Reference: the same
    coefficient converted by sympy from the ring's own term dictionary."""
    from fractions import Fraction
    d = clusterexp.derive("dimension 2 parameter g species A clusters given { b[2] = 3^2000*g } derive virial up to 6")
    d.compute_all()
    a6 = next(c for c in d if c.kind == "virial" and c.index == (6,))
    g = sympy.Symbol("g")
    from_terms = {dict(m).get(g, 0): c for m, c in a6.terms.terms if all(s.name in ("g", "b_3", "b_4", "b_5", "b_6")
                                                                            for s, _ in m) and len(m) <= 1}
    assert max(abs(c.numerator) for c in from_terms.values()) > 10 ** 4300
    top = sympy.Poly(a6.value, g).as_dict()
    for (k,), c in top.items():
        if c.is_Rational:
            assert from_terms[k] == Fraction(int(c.p), int(c.q))


# --- every printer states the quantity its regime computes, and what the input assumed -----------------

LANDAU_INPUT = ("dimension 2 parameter t in [0, 1) species A exchange t species B exchange 1/3 mutual A B = t "
                "clusters landau derive virial up to 2 derive density up to 2 derive fugacity up to 2")


def test_lowest_landau_level_output_speaks_of_rho_L_not_lambda():
    from clusterexp.export import latex_document, latex_snippet, to_json, to_text
    d = clusterexp.derive(LANDAU_INPUT)
    text = to_text(d)
    assert "lambda" not in text and "beta P / rho_L = sum_n b_n z^n = sum_n a_n nu^n" in text
    assert "density expansion nu_i in the fugacities z" in text
    assert "fugacity expansion z_i in the densities nu" in text
    snippet = latex_snippet(d)
    assert r"\left[\nu_{A}\right]_{z_{A} z_{B}}" in snippet and r"\left[z_{B}\right]_{\nu_{A} \nu_{B}}" in snippet
    assert r"\lambda" not in snippet
    document = latex_document(d)
    assert r"\beta P/\rho_L=\sum_n b_n z^n=\sum_n a_n\nu^n" in document
    record = json.loads(to_json(d))
    assert record["regime"]["kind"] == "landau" and record["regime"]["measured_per"] == "rho_L"
    assert record["conventions"].startswith("beta P / rho_L")
    assert any(line.startswith("equation of state: u_A = z_A") for line in record["regime"]["statement"])


def test_one_level_exclusion_output_speaks_per_state():
    from clusterexp.export import to_json, to_text
    d = clusterexp.derive("dimension 1 species R species S statistics matrix [[1/2, 1], [1/4, 1/3]] clusters exclusion level "
                          "derive virial up to 2 derive density up to 2")
    text = to_text(d)
    assert "lambda" not in text and "density expansion N_i / (states) in the fugacities z" in text
    assert json.loads(to_json(d))["regime"]["measured_per"] == "states"


def test_ranges_and_given_pieces_are_echoed_in_every_format():
    from clusterexp.export import latex_document, to_json, to_text
    d = clusterexp.derive("dimension 2 parameter alpha in [0, 1) species A exchange alpha clusters pairphase "
                          "{ b[3] = 1/9 - alpha + O(alpha^2) } derive virial up to 3")
    text = to_text(d)
    assert "# parameters: alpha in [0, 1)" in text
    assert "# given: b[3] = 1/9 - alpha + O(alpha**2)" in text
    record = json.loads(to_json(d))
    (alpha,) = record["parameters"]
    assert alpha["name"] == "alpha" and alpha["range"] == "[0, 1)"
    assert record["given"] == [{"coefficient": "b[3]", "value": "1/9 - alpha + O(alpha**2)"}]
    document = latex_document(d)
    assert r"$\alpha$ & $[0,1)$ & nonnegative, real \\" in document           # the parameters' table
    assert "Given as input" in document and r"  b_{3} &= \frac{1}{9} - \alpha + O\left(\alpha^{2}\right)" in document

def test_exclusion_species_are_listed_by_their_g_not_by_an_exchange_parameter():
    """In the exclusion regime the statistics matrix decides the statistics: an undeclared species is listed
    with its g_ii (text, LaTeX document, JSON), not as "exchange 0"."""
    import json
    d = clusterexp.derive("dimension 2 species A species B fermi statistics A A = 1/3 clusters exclusion "
                          "derive virial up to 2")
    assert "A (mass 1, g_AA = 1/3), B (mass 1, g_BB = 1)" in to_text(d)
    assert "exchange 0" not in to_text(d)
    assert r"$A$ & $1$ & exclusion & $g_{A A}=\frac{1}{3}$ \\" in latex_document(d)   # the species table
    assert json.loads(to_json(d))["species"][0] == {"name": "A", "mass": "1", "g": "1/3"}
