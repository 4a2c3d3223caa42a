"""Bad inputs: each gives an InputError with the expected message start at the expected place."""
import pytest

from clusterexp import InputError, build_system

CASES = [
    # (input, message start, line:column)
    ("species A bose", "missing `dimension` statement", "1:1"),
    ("dimension 4 species A", "dimension must be 1, 2 or 3", "1:11"),
    ("dimension 2", "no species declared", "1:1"),
    ("dimension 2 dimension 3 species A", "`dimension` is declared twice", "1:23"),
    ("dimension 2 species A species A", "'A' is already declared as a species", "1:31"),
    ("dimension 2 parameter x parameter x species A", "'x' is already declared as a parameter", "1:35"),
    ("dimension 2 parameter A species A", "'A' is already declared as a parameter", "1:33"),
    ("dimension 2 species b", "'b' is a reserved name", "1:21"),
    ("dimension 2 species b_2", "'b_2' is a reserved name", "1:21"),
    ("dimension 2 parameter sqrt species A", "'sqrt' is a reserved name", "1:23"),
    ("dimension 2 species A mass 1 mass 2", "species A: mass given twice", "1:30"),
    ("dimension 2 species A bose fermi", "species A: exchange/bose/fermi/boltzmann given twice", "1:28"),
    ("dimension 2 species A bose exchange 1/2", "species A: exchange/bose/fermi/boltzmann given twice", "1:28"),
    ("dimension 2 species A mass -1", "mass must be positive", "1:28"),
    ("dimension 2 species A mass 0", "mass must be positive", "1:28"),
    ("dimension 2 parameter m species A mass m", "mass must be positive", "1:40"),
    ("dimension 2 species A mass q", "unknown name 'q'", "1:28"),
    ("dimension 2 species A\nmutual A A = 1/2", "a mutual parameter needs two distinct species", "2:10"),
    ("dimension 2 species A\nmutual A C = 1/2", "unknown species 'C'", "2:10"),
    ("dimension 2 species A species B mutual A B = 1 mutual B A = 0", "mutual parameter of B and A is given twice", "1:55"),
    ("dimension 2 species A reference C", "unknown species 'C'", "1:33"),
    ("dimension 2 species A clusters given { b[1] = 2 }", "b for a single particle is fixed by the masses", "1:40"),
    ("dimension 2 species A virials given { a[1] = 2 }", "a for a single particle is 1", "1:39"),
    ("dimension 2 species A clusters given { b[2] = 1 b[2] = 2 }", "b[2] is given twice", "1:49"),
    ("dimension 2 species A clusters given { a[2] = 1 }", "inside `clusters given` write b[...]", "1:40"),
    ("dimension 2 species A virials given { b[2] = 1 }", "inside `virials given` write a[...]", "1:39"),
    ("dimension 2 species A species B clusters given { b[2] = 1 }", "multi-index has 1 entries but 2 species", "1:50"),
    ("dimension 2 species A species B derive virial a[A, C]", "unknown species 'C'", "1:52"),
    ("dimension 2 species A derive virial a[0]", "a multi-index needs at least one particle", "1:37"),
    ("dimension 2 species A order 3 derive virial up to 5", "request needs total order 5 but `order 3` is declared", "1:31"),
    ("dimension 2 species A derive virial up to 0", "`up to` needs an order between 1 and 200", "1:43"),
    ("dimension 2 species A order 500", "order must be between 1 and 200", "1:29"),
    ("dimension 2 species A derive pressure up to 2", "unknown quantity 'pressure'", "1:30"),
    ("dimension 2 species A derive density b[2]", "explicit indices are for cluster (b[...]) and virial (a[...]) requests", "1:30"),
    ("dimension 2 species A derive virial b[2]", "`derive virial` lists a[...], not b[...]", "1:37"),
    ("dimension 2 species A output format html", "unknown output format 'html'", "1:37"),
    ("dimension 2 species A clusters lattice", "unknown regime 'lattice'", "1:32"),
    ("dimension 2 species A clusters magic", "unknown regime 'magic'", "1:32"),
    ("dimension 2 species A clusters generic clusters generic", "the coefficient source", "1:40"),
    ("dimension 2 species A exchange foo(1)", "unknown function 'foo'", "1:32"),
    ("dimension 2 species A exchange sqrt(1, 2)", "sqrt takes 1 argument, got 2", "1:32"),
    ("dimension 2 species A exchange 1/0", "division by zero", "1:34"),
    ("dimension 2 species A exchange 2^100000", "exponent 100000 is too large", "1:34"),
    ("dimension 2 species A exchange sqrt", "'sqrt' is a function", "1:32"),
    ("dimension 2 species A derive virial up to", "the input ends in the middle of a statement", "1:42"),
    ("dimension 2 species A ; derive virial up to 2", "unexpected character ';'", "1:23"),
    ("dimension 2 species A derive up to 2", "unexpected 'up'", "1:30"),
    ("dimension 2 spcies A", "unexpected 'spcies': expected a statement", "1:13"),
    ("dimension 2 species A include \"no-such-file.gas\"", "cannot read included file no-such-file.gas", "1:31"),
    ("dimension 2 parameter x in [1, 0] species A", "a range needs two real numbers, the lower first", "1:25"),
    ("dimension 2 species Ａ", "unexpected character", "1:21"),
    # types: values that must be real or positive
    ("dimension 2 species A exchange sqrt(-1)", "the exchange parameter must be real", "1:32"),
    ("dimension 2 species A species B mutual A B = 1 + sqrt(-4)", "the mutual parameter must be real", "1:46"),
    ("dimension 2 species A mass log(0)", "mass must be positive", "1:28"),
    ("dimension 2 parameter y in [sqrt(-1), 1] species A", "a range needs two real numbers", "1:25"),
    # regimes
    ("dimension 2 species A species B statistics matrix [[1, 0, 0], [0, 1, 0]] clusters exclusion",
     "the statistics matrix is 2 x 3 but 2 species are declared", "1:33"),
    ("dimension 3 species A clusters landau", "the lowest Landau level lives in the plane", "1:32"),
    ("dimension 2 species A exchange 1/2 clusters ideal", "`clusters ideal` needs bose, fermi or boltzmann", "1:21"),
]


@pytest.mark.parametrize("text, message, place", CASES, ids=[c[1][:40] for c in CASES])
def test_bad_input(text, message, place):
    with pytest.raises(InputError) as caught:
        build_system(text, "bad.gas")
    error = caught.value
    assert error.message.startswith(message), error.render()
    assert f"{error.span.line}:{error.span.column}" == place, error.render()
    rendered = error.render().splitlines()
    assert rendered[0].startswith(f"bad.gas:{place}: error: ")
    assert rendered[2].strip().startswith("^")


def test_include_cycle(tmp_path):
    (tmp_path / "a.gas").write_text('include "b.gas"\n')
    (tmp_path / "b.gas").write_text('include "a.gas"\n')
    with pytest.raises(InputError, match="include cycle"):
        build_system('dimension 2 species A include "a.gas"', "main.gas", tmp_path)


def test_include_splices_statements(tmp_path):
    (tmp_path / "common.gas").write_text("parameter nu in [0, 1]\nspecies A\nspecies B\n")
    system = build_system('dimension 2 include "common.gas" mutual A B = nu', "main.gas", tmp_path)
    assert system.species_names == ("A", "B")
    assert system.files[1].endswith("common.gas")
    assert system.species[0].span.file.endswith("common.gas")


def test_control_characters_inside_quoted_names_are_refused_at_their_place():
    # a lone carriage return or other control character inside a string would shift line numbers
    # between the parser and the caret display; such strings are refused where they start
    import pytest
    from clusterexp.language.build import build_system
    from clusterexp.errors import InputError
    with pytest.raises(InputError) as error:
        build_system('dimension 2\nspecies A bose\ntypeset wavelength as "\x1e"', "c.gas")
    span = error.value.span
    assert (span.line, span.column) == (3, 23)
    assert "^" in error.value.render()


@pytest.mark.parametrize("text, hint", [
    ("dimension 2 species A clusters pairphse", "did you mean 'pairphase'?"),
    ("dimension 2 parameter alpha species A exchange alph clusters pairphase", "did you mean 'alpha'?"),
    ("dimension 2 species A boson", "did you mean 'bose'?"),
    ("dimension 2 species A bose derive virials up to 3", "did you mean 'virial'?"),
    ("dimension 2 species A bose derive virail up to 3", "did you mean 'virial'?"),
    ("dimension 2 species A bose dimensoin 2", "did you mean 'dimension'?"),
    ("dimension 2 species Bee species C mutual Be C = 1/2", "did you mean 'Bee'?"),
    ("dimension 2 species Bee clusters ideal claim a[Be:2] = 1", "did you mean 'Bee'?"),
    ("dimension 2 parameter alpha species A exchange alpha expand alhpa about 0 to 2", "did you mean 'alpha'?"),
    ("dimension 2 species A output formt json", "did you mean 'format'?"),
    ("dimension 2 species A claim a[2] = sqr(2)", "did you mean 'sqrt'?"),
])
def test_misspelled_words_get_a_close_match_hint(text, hint):
    with pytest.raises(InputError) as caught:
        build_system(text)
    assert caught.value.hint == hint
    assert f"hint: {hint}" in caught.value.render()


def test_a_misspelled_species_property_is_named_as_such():
    with pytest.raises(InputError) as caught:
        build_system("dimension 2 species A mass 2 boson")
    assert caught.value.message.startswith("unexpected 'boson': expected a species property (mass, exchange, bose")
    assert caught.value.hint == "did you mean 'bose'?"


def test_no_hint_when_nothing_is_close():
    with pytest.raises(InputError) as caught:
        build_system("dimension 2 parameter alpha species A exchange zzz")
    assert caught.value.hint is None


def test_the_unknown_regime_message_lists_every_regime():
    with pytest.raises(InputError) as caught:
        build_system("dimension 2 species A clusters anyons")
    for word in ("generic", "ideal", "exclusion", "landau", "pairphase", "spectrum", "given"):
        assert word in caught.value.message
