"""Hostile input: huge numbers, deep nesting, very long lines, unicode look-alikes, derivations too
large to start, and interrupted or refused output files. Each is refused cleanly (an InputError at the
right place; from the command line exit code 2 and no traceback) and quickly."""
import os
import re
import time
from pathlib import Path

import pytest
import sympy

import clusterexp
from clusterexp import InputError, build_system
from clusterexp.export import FORMATTERS
from clusterexp.limits import DEFAULT_SIZE_LIMIT, check_size, count_multi_indices, estimate, weighted_partitions

from conftest import ROOT, run_cli
from test_fuzz import run_main, time_guard

SPECIES = "dimension 2 species A "


def refusal(text: str, seconds: float = 10) -> InputError:
    start = time.perf_counter()
    with time_guard(seconds), pytest.raises(InputError) as caught:
        clusterexp.derive(text, filename="hostile.gas")
    assert time.perf_counter() - start < seconds
    return caught.value


def place(error: InputError) -> tuple[int, int]:
    return error.span.line, error.span.column


# (name, input, message start, line, column); the column is computed from the text where it is
# easier to read that way.
HOSTILE = [
    ("tower of powers", SPECIES + "exchange 2^2^2^2^2^2", "exponent 65536 is too large", 1, 36),
    ("ten to the 100000", SPECIES + "exchange 10^100000", "exponent 100000 is too large", 1, 35),
    ("power with too many digits", SPECIES + "mass 10^5000", "this power has about 5000 digits", 1, 28),
    ("power of a power", SPECIES + "mass (2^10000)^10000", "this power has about 3010 digits", 1, 29),
    ("huge literal", SPECIES + "mass " + "7" * 5000, "number with too many digits", 1, 28),
    ("huge decimal exponent", SPECIES + "mass 1e999999999999", "number with too many digits", 1, 28),
    ("exponent with a huge denominator", SPECIES + "mass 2^(1/10^900)", "exponent", 1, 31),
    ("long product of big numbers", SPECIES + "mass " + "*".join(["10^999"] * 50), "a number in this expression has about 1998 digits", 1, 35),
    ("huge factorial", SPECIES + "exchange factorial(10^6)", "argument of factorial is too large", 1, 42),
    ("huge binomial", SPECIES + "exchange binomial(10^900, 10^899)", "argument of binomial is too large", 1, 41),
    ("huge gamma", SPECIES + "exchange gamma(10^900)", "argument of gamma is too large", 1, 38),
    ("huge zeta", SPECIES + "exchange zeta(100000)", "argument of zeta is too large", 1, 37),
    ("factorial of a big number", SPECIES + "exchange factorial(1000)", "a number in this expression has about 2567", 1, 32),
    ("1000 nested calls", SPECIES + "mass " + "sqrt(" * 1000 + "2" + ")" * 1000, "expression is nested too deeply", 1,
     28 + 5 * 100),
    ("1000 nested powers", SPECIES + "mass " + "2^(" * 1000 + "1" + ")" * 1000, "expression is nested too deeply", 1,
     None),
    ("power chain", SPECIES + "exchange " + "^".join(["1"] * 1000), "expression is nested too deeply", 1, None),
    ("1 MB line", SPECIES + "exchange 1 # " + "x" * 1_000_000, "line 1 is 1,000,035 characters long", 1, 100_001),
    ("1 MB expression", SPECIES + "exchange " + "+".join(["1"] * 500_000), "line 1 is", 1, 100_001),
    ("3 MB of short lines", SPECIES + "\n" + "# padding\n" * 300_000, "the input is", 1, 1),
    ("Cyrillic a in a species name", SPECIES.replace("A", "G\u0430s"), "unexpected character '\u0430' U+0430 CYRILLIC SMALL LETTER A", 1, 22),
    ("Cyrillic A as a whole name", "dimension 2 species \u0410", "unexpected character '\u0410' U+0410 CYRILLIC CAPITAL", 1, 21),
    ("full-width digit", "dimension \uff12 species A", "unexpected character '\uff12' U+FF12 FULLWIDTH DIGIT TWO", 1, 11),
    ("zero-width space in a name", "dimension 2 species A\u200bB", "unexpected character (invisible) U+200B ZERO WIDTH SPACE", 1, 22),
    ("no-break space between words", "dimension 2\nspecies\u00a0A", "unexpected character (invisible) U+00A0 NO-BREAK SPACE", 2, 8),
    ("Greek omicron in a keyword", "dimension 2 species A derive virial up t\u03bf 2", "unexpected 't'; expected 'to' (it is followed by '\u03bf' U+03BF GREEK SMALL LETTER OMICRON", 1, 40),
    ("NUL byte", "dimension 2 species A\x00", "unexpected character (invisible) U+0000", 1, 22),
]


@pytest.mark.parametrize("name, text, message, line, column", HOSTILE, ids=[h[0] for h in HOSTILE])
def test_hostile_input_is_refused_at_the_right_place(name, text, message, line, column):
    error = refusal(text)
    assert error.message.startswith(message), error.message[:300]
    assert error.span.line == line, error.message[:200]
    if column is not None:
        assert error.span.column == column, (error.span.column, error.message[:200])
    lines = text.splitlines()
    assert error.span.line_text == lines[line - 1]
    assert error.render().startswith(f"hostile.gas:{line}:{error.span.column}: error: ")


@pytest.mark.parametrize("name, text, message, line, column",
                         [h for h in HOSTILE if h[0] in ("tower of powers", "1 MB line", "1000 nested calls",
                                                         "Cyrillic a in a species name", "zero-width space in a name",
                                                         "huge binomial")],
                         ids=lambda v: v if isinstance(v, str) and len(v) < 40 else "")
def test_hostile_input_from_the_command_line(name, text, message, line, column, tmp_path):
    path = tmp_path / "hostile.gas"
    path.write_text(text, encoding="utf-8")
    result = run_cli("run", str(path))
    assert result.returncode == 2, result.stderr[:500]
    assert "Traceback" not in result.stderr
    first = result.stderr.splitlines()[0]
    assert first.startswith(f"{path}:{line}:") and message in first, first[:300]
    assert "^" in result.stderr


def test_nesting_is_counted_on_true_nesting_only():
    # 1000 parentheses around a value add no nesting; neither do long chains of + - * / or of signs
    wrapped = clusterexp.derive(SPECIES + "mass " + "(" * 1000 + "3" + ")" * 1000 + " species B derive virial up to 2")
    plain = clusterexp.derive(SPECIES + "mass 3 species B derive virial up to 2")
    assert [c.value for c in wrapped] == [c.value for c in plain]
    system = build_system(SPECIES + "exchange " + "+".join(["1/7"] * 20_000) + " - " + "-" * 500 + "1")
    assert system.species[0].exchange == sympy.Rational(20_000, 7) - 1
    system = build_system(SPECIES + "mass " + "*".join(["2"] * 2000) + "/" + "/".join(["2"] * 1999))
    assert system.species[0].mass == 2
    nested = SPECIES + "mass " + "sqrt(" * 99 + "2" + ")" * 99
    assert build_system(nested).species[0].mass == 2 ** sympy.Rational(1, 2 ** 99)


def test_numbers_at_the_limit_are_read_exactly():
    assert build_system(SPECIES + "mass 10^999").species[0].mass == 10 ** 999
    assert build_system(SPECIES + "mass 1e999").species[0].mass == 10 ** 999
    assert build_system(SPECIES + "mass 1e-999").species[0].mass == sympy.Rational(1, 10 ** 999)
    assert build_system(SPECIES + "exchange 0e99999999").species[0].exchange == 0
    assert build_system(SPECIES + "exchange 0.000e-99999999").species[0].exchange == 0
    assert build_system(SPECIES + "mass 0.5e3").species[0].mass == 500


def test_no_recursion_error_escapes_an_expression():
    # mixing every operator keeps the nesting honest; whatever the depth, the answer is an InputError
    for depth in (50, 99, 100, 150, 3000):
        text = SPECIES + "exchange " + "-(2*(1+" * depth + "1" + "))" * depth
        try:
            build_system(text)
        except InputError as error:
            assert error.message.startswith("expression is nested too deeply"), error.message
            assert depth >= 50


# -- derivations too large to start ---------------------------------------------------------------------

def test_multi_index_count_is_the_binomial():
    from clusterexp.exact.series import indices_up_to
    for K in (1, 2, 3, 4):
        for N in (1, 3, 6):
            assert count_multi_indices(K, N) == len(indices_up_to(K, N))


def test_one_species_terms_are_the_partitions_of_n_minus_one():
    # a_n in generic b has one term per partition of n - 1 (common practice: each monomial
    # b_{m_1}...b_{m_k} has sum (m_j - 1) = n - 1); compared with sympy's partition numbers
    from sympy.functions.combinatorial.numbers import partition
    for N in range(2, 30):
        system = build_system(f"dimension 2 species A derive virial up to {N}")
        assert estimate(system).largest_terms == partition(N - 1)
    assert weighted_partitions({1: 2}, 3) == 4  # two kinds of weight-1 part, three of them: 4 multisets


@pytest.mark.parametrize("K, N", [(1, 9), (2, 6), (2, 8), (3, 5), (4, 5)])
def test_estimate_is_within_a_factor_three_of_the_real_size(K, N):
    species = " ".join(f"species S{i}" for i in range(K))
    d = clusterexp.derive(f"dimension 2 {species} clusters generic derive virial up to {N}")
    sizes = [len(c.terms) for c in d if c.order == N]
    found = estimate(d.system)
    assert max(sizes) / 3 <= found.largest_terms <= 3 * max(sizes), (found, max(sizes))
    assert sum(sizes) / 3 <= found.layer_terms <= 3 * sum(sizes), (found, sum(sizes))


@pytest.mark.parametrize("N", [6, 8])
def test_pair_phase_estimate_counts_the_named_many_body_pieces(N):
    """Pair phases: exact two-body parts plus named many-body symbols. The estimate must be within a
    factor three of the real size (it once took the regime for a fully computed one and let an
    order-16 derivation start that ran for minutes)."""
    d = clusterexp.derive("dimension 2 parameter nu in [0, 1) species L exchange 1/3 species H mass 5/2 "
                          f"exchange 1/3 mutual L H = nu clusters pairphase derive virial up to {N}")
    sizes = [len(c.terms) for c in d if c.order == N]
    found = estimate(d.system)
    assert found.unknown_symbols > 0
    assert max(sizes) / 3 <= found.largest_terms <= 3 * max(sizes), (found, max(sizes))
    assert sum(sizes) / 3 <= found.layer_terms <= 3 * sum(sizes), (found, sum(sizes))


def test_stated_numbers_shrink_the_estimate():
    generic = estimate(build_system("dimension 2 species A derive virial up to 30"))
    given = estimate(build_system("dimension 2 species A clusters given { "
                                  + " ".join(f"b[{n}] = 1/{n}" for n in range(2, 31)) + " } derive virial up to 30"))
    assert given.layer_terms == 1 and given.unknown_symbols == 0 and generic.unknown_symbols == 29
    half = estimate(build_system("dimension 2 parameter g species A clusters given { b[2] = g } derive virial up to 30"))
    assert half.layer_terms == generic.layer_terms  # a symbol for a symbol: same count


def test_too_large_a_derivation_is_refused_at_the_derive_line_before_it_starts():
    text = "dimension 2\nspecies A\nspecies B\nspecies C\nderive cluster up to 2\nderive virial up to 200\n"
    system = build_system(text, "big.gas")
    start = time.perf_counter()
    with pytest.raises(InputError) as caught:
        check_size(system)
    assert time.perf_counter() - start < 2
    error = caught.value
    assert place(error) == (6, 1), error.render()
    assert "1,373,700 multi-indices" in error.message and f"{DEFAULT_SIZE_LIMIT:,}" in error.message
    assert "far beyond" in error.hint
    assert error.render().splitlines()[0].startswith("big.gas:6:1: error: this derivation is too large")


def test_the_limit_can_be_raised_and_the_worked_examples_fit():
    system = build_system("dimension 2 species A species B derive virial up to 16", "two.gas")
    with pytest.raises(InputError) as caught:
        check_size(system)
    assert "--size-limit 400000" in caught.value.hint and "`size limit 400000`" in caught.value.hint
    assert check_size(system, limit=10 ** 7).layer_terms > DEFAULT_SIZE_LIMIT
    for example in sorted((ROOT / "worked").glob("*/input.gas")) + [ROOT / "clusterexp" / "demo.gas"]:
        check_size(clusterexp.build_system_from_file(example))
    many = build_system("dimension 2 " + " ".join(f"species S{i}" for i in range(60)) + " derive virial up to 3")
    with pytest.raises(InputError, match="60 species"):
        check_size(many)


# -- output files -----------------------------------------------------------------------------------------

ARGS = ["run", "-e", "dimension 2 species A species B derive virial up to 3", "--format", "latex"]


def leftovers(folder: Path) -> list[str]:
    return [p.name for p in folder.iterdir() if p.name.endswith(".part")]


@pytest.mark.parametrize("moment", ["while writing", "before the rename"])
def test_interrupt_while_writing_leaves_no_half_file(moment, tmp_path, monkeypatch):
    target = tmp_path / "out.tex"
    real_fdopen, real_replace = os.fdopen, os.replace

    class HalfWriter:
        def __init__(self, stream):
            self.stream = stream

        def __enter__(self):
            return self

        def __exit__(self, *exc):
            self.stream.close()

        def write(self, text):
            self.stream.write(text[: len(text) // 2])
            self.stream.flush()
            raise KeyboardInterrupt

    def interrupted_replace(*args):
        raise KeyboardInterrupt

    if moment == "while writing":
        monkeypatch.setattr(os, "fdopen", lambda *a, **k: HalfWriter(real_fdopen(*a, **k)))
    else:
        monkeypatch.setattr(os, "replace", interrupted_replace)
        monkeypatch.setattr(os, "link", interrupted_replace)  # the no-overwrite path links instead
    # the command ends with one line and exit status 130 (issue 14: it was a traceback)
    assert run_main(ARGS + ["-o", str(target)])[::2] == (130, "clusterexp: interrupted\n")
    assert not target.exists()
    assert leftovers(tmp_path) == []
    # and an existing file replaced with --overwrite keeps its old content when interrupted
    target.write_text("the user's notes")
    assert run_main(ARGS + ["-o", str(target), "--overwrite"])[0] == 130
    assert target.read_text() == "the user's notes"
    assert leftovers(tmp_path) == []
    monkeypatch.setattr(os, "fdopen", real_fdopen)
    monkeypatch.setattr(os, "replace", real_replace)
    assert run_main(ARGS + ["-o", str(target), "--overwrite"])[0] == 0
    assert target.read_text().startswith("\\begin{align}")


def test_existing_file_is_never_overwritten_without_the_option(tmp_path):
    target = tmp_path / "result.json"
    target.write_bytes(b"\x00precious\xff")
    code, out, err = run_main(ARGS + ["--format", "json", "-o", str(target)])
    assert code == 2 and "exists" in err and "--overwrite" in err and out == ""
    assert target.read_bytes() == b"\x00precious\xff"
    assert leftovers(tmp_path) == []
    code, _, _ = run_main(ARGS + ["--format", "json", "-o", str(target), "--overwrite"])
    assert code == 0 and target.read_text(encoding="utf-8").lstrip().startswith("{")


def test_output_written_through_the_command_is_complete(tmp_path):
    target = tmp_path / "out.txt"
    code, out, _ = run_main(["run", "-e", "dimension 2 species A species B derive virial up to 3", "-o", str(target)])
    assert code == 0 and out == ""
    _, printed, _ = run_main(["run", "-e", "dimension 2 species A species B derive virial up to 3"])
    assert target.read_text(encoding="utf-8") == printed


# -- known problems outside these modules (patches proposed in .helper-notes-reliability.md) -------------

def test_undecidable_range_is_an_input_error():
    error = refusal("dimension 2 parameter y in [sin(1)^2 + cos(1)^2, 1] species A")
    assert error.span.column == 25


def test_exp_tower_mass_is_an_input_error_or_accepted():
    # whether sympy overflows depends on the hash seed (0, 2 and 7 did on one machine): try several
    for seed in ("0", "1", "2", "7"):
        result = run_cli("run", "-e", SPECIES + "mass exp(exp(exp(exp(exp(2))))) derive virial up to 2",
                         env_extra={"PYTHONHASHSEED": seed})
        assert result.returncode in (0, 2) and "Traceback" not in result.stderr, (seed, result.stderr[-300:])


def test_results_with_very_large_numbers_print():
    d = clusterexp.derive(SPECIES + "species B mass 10^999 derive virial up to 6")
    assert len(FORMATTERS["text"](d)) > 5 * 999


def test_output_into_a_missing_folder_is_a_clear_error(tmp_path):
    result = run_cli(*ARGS, "-o", str(tmp_path / "no" / "such" / "out.tex"))
    assert result.returncode == 2 and "Traceback" not in result.stderr


def test_message_about_a_long_line_stays_short():
    error = refusal(SPECIES + "exchange 1 # " + "x" * 1_000_000)
    assert len(error.render()) < 1000




def test_size_limit_refuses_before_starting_and_can_be_raised(cli):
    """A derivation far beyond reach is refused at the `derive` line before anything is formed; the
    input's `size limit N` and the CLI's --size-limit move the threshold."""
    result = cli("run", "-e", "dimension 2 species A species B species C derive virial up to 200")
    assert result.returncode == 2 and "Traceback" not in result.stderr
    assert "1:43: error: this derivation is too large to start" in result.stderr
    small = "dimension 2 species A species B derive virial up to 4"
    assert cli("run", "--size-limit", "5", "-e", small).returncode == 2
    assert cli("run", "--size-limit", "1000", "-e", small).returncode == 0
    with pytest.raises(InputError, match="too large to start"):
        clusterexp.derive("dimension 2 size limit 10 species A species B derive virial up to 6")
    assert len(clusterexp.derive("dimension 2 size limit 100000 species A species B derive virial up to 6")) > 0


# -- issue 14: many species, high orders, absurd budgets -------------------------------------------------

def many(K: int, statistics: str = "", rest: str = "derive virial up to 2") -> str:
    return "dimension 2 " + " ".join(f"species S{i}{statistics}" for i in range(K)) + " " + rest


def test_a_thousand_species_enumerate_without_recursion():
    # issue 14: RecursionError in series.multi_indices, one frame per species
    from clusterexp.exact.series import indices_up_to, multi_indices
    with time_guard(20):
        d = clusterexp.derive(many(1000, " bose", "derive cluster up to 1"), filename="many.gas")
        assert len(d) == 1000 and d.coefficients[-1].index == (0,) * 999 + (1,)
    assert list(multi_indices(5000, 1))[1][:3] == (0, 1, 0)
    # the order is the one the recursion gave: by total degree, then descending lexicographic
    assert indices_up_to(3, 2) == [(1, 0, 0), (0, 1, 0), (0, 0, 1), (2, 0, 0), (1, 1, 0), (1, 0, 1), (0, 2, 0),
                                   (0, 1, 1), (0, 0, 2)]


def test_many_species_are_refused_for_their_generators():
    # issue 14: 300 species to order 2 ran past a minute (80 species: 13 s, 600 MB): the estimate counted
    # terms only, while each of the 45,450 generators of the exact ring costs memory in every polynomial
    error = refusal(many(300), seconds=5)
    assert error.message.startswith("this derivation is too large to start: 300 species to total order 2")
    assert "45,450 generators" in error.message and "GB of memory" in error.message
    assert "--size-limit 20000000" in error.hint
    assert check_size(build_system(many(60))).size < DEFAULT_SIZE_LIMIT   # about a second: still fine


@pytest.mark.parametrize("text, seconds_at_least", [
    # issue 14: the harmonic regulator's cost was not estimated (two species, two parameters: order 24, 55 s)
    ("dimension 2 parameter g parameter nu species A exchange g species B exchange g mutual A B = nu "
     "clusters landau spectrum derive virial up to 30", 60),
    ("dimension 2 parameter nu in [0, 1] species A bose species B bose clusters spectrum { shift = nu*A*B "
     "area count } derive virial up to 25", 30),
])
def test_harmonic_regulator_cost_is_estimated_before_it_starts(text, seconds_at_least):
    error = refusal(text, seconds=5)
    assert "the harmonic regulator (trapped spectrum) alone would take about" in error.message
    assert estimate(build_system(text)).regulator_seconds > seconds_at_least
    assert "--size-limit" in error.hint


def test_a_cluster_without_limit_is_reported_when_its_order_is_reached():
    # issue 14: the divergence of b[1,1] came only after every order up to 25 was built (order 18: 37 s)
    text = ("dimension 2 parameter nu in [0, 1] species A bose species B bose\n"
            "clusters spectrum { shift = nu*A*B area count }\nderive virial up to 25")
    start = time.perf_counter()
    with time_guard(10), pytest.raises(InputError) as caught:
        clusterexp.derive(text, size_limit=10 ** 12).compute_all()
    assert time.perf_counter() - start < 10
    assert caught.value.message.startswith("no thermodynamic limit for the cluster [1, 1]")


def test_absurd_loop_budgets_are_refused_unless_timed():
    # issue 14: `with 1000000000000000 loops` was accepted, and a loop count removed the default time cap
    semions = "dimension 2\nparameter alpha in [0, 1]\nspecies A exchange alpha\nclusters pairphase\n"
    with pytest.raises(InputError) as caught:
        build_system(semions + "sample a[3] at alpha = 1/2 seed 1 with 1000000000000000 loops", "s.gas")
    error = caught.value
    assert (error.span.line, error.span.column) == (5, 35)
    assert error.message.startswith("1,000,000,000,000,000 loops would take about ")
    assert "years" in error.message and "at most 10 minutes" in error.message
    assert "`within T seconds`" in error.hint and "ask for at most 12,000,000 loops" in error.hint
    # grid points count too: 12 million loops fit for one point, not for forty
    build_system(semions + "sample a[3] at alpha = 1/2 with 12000000 loops")
    with pytest.raises(InputError, match="40 points"):
        build_system(semions + "sample a[3] over alpha = [" + ", ".join(f"1/{k}" for k in range(2, 42))
                     + "] with 12000000 loops")
    # with an explicit time cap the user has said how long the run may take
    (s,) = build_system(semions + "sample a[3] at alpha = 1/2 with 1000000000000000 loops within 60 seconds").samplings
    assert s.loops == 10 ** 15 and s.time_cap == 60


def test_whole_numbers_with_thousands_of_digits_are_input_errors():
    # sibling: int() of a 5000-digit literal raised ValueError (Python's 4300-digit limit) from the library
    big = "9" * 5000
    for text, column in [(f"dimension {big} species A", 11), (SPECIES + f"derive virial up to {big}", 43),
                         (SPECIES + f"derive virial a[{big}]", 39), (f"dimension 2 size limit {big} species A", 24)]:
        error = refusal(text)
        assert error.message == "a whole number with 5,000 digits (at most 30)" and error.span.column == column
        assert len(error.render()) < 1000


def test_form_feeds_do_not_shift_the_line_shown():
    # sibling: str.splitlines also splits at form feeds and U+001C-U+001E, the parser does not
    error = refusal("dimension 2 # page\x0cbreak \x1e\nspecies A\nmutual A C = 1/2\n")
    assert (error.span.line, error.span.line_text) == (3, "mutual A C = 1/2")


def test_bidirectional_and_control_characters_are_shown_as_question_marks():
    error = refusal("dimension 2 species A\u202e bose")
    rendered = error.render()
    assert "\u202e" not in rendered and rendered.splitlines()[1] == "    dimension 2 species A? bose"


# -- issue 21: files are written only when the whole input derived, into folders made on demand ----------

TRUNCATED = ("dimension 2\nparameter alpha in [0, 1]\nspecies A exchange alpha\n"
             "clusters pairphase { a[3] = 1/36 + alpha^2/12 + O(alpha^3) }\nderive virial up to 3\n"
             'tabulate a[2] over alpha in [0, 1/2] into "t.csv"\n')


def test_a_failing_run_writes_no_file(tmp_path):
    # issue 21: the table was written before the figure failed (exit 2), and then blocked the rerun
    pytest.importorskip("matplotlib")
    bad = TRUNCATED + 'plot a[3] over alpha into "f.png"\n'
    code, out, err = run_main(["run", "-e", bad, "--files-into", str(tmp_path), "-o", str(tmp_path / "out.txt")])
    assert code == 2 and "<command line>:7:1: error: a[3] is known only as a series" in err
    assert os.listdir(tmp_path) == []
    fixed = TRUNCATED + 'plot a[2] over alpha into "f.png"\n'
    code, _, err = run_main(["run", "-e", fixed, "--files-into", str(tmp_path), "-o", str(tmp_path / "out.txt")])
    assert code == 0, err
    assert sorted(os.listdir(tmp_path)) == ["f.caption.tex", "f.pdf", "f.png", "out.txt", "t.csv"]
    # from Python too
    with pytest.raises(InputError, match="known only as a series"):
        clusterexp.derive(bad).write_files(tmp_path / "py")
    assert not (tmp_path / "py").exists()


def test_output_folders_are_created(tmp_path, monkeypatch):
    # issue 21: `d.write_files("figures/")` (the README's example) and `--files-into newdir` failed
    monkeypatch.chdir(tmp_path)
    d = clusterexp.derive(TRUNCATED)
    assert d.write_files("figures/") == [Path("figures/t.csv")]
    assert (tmp_path / "figures" / "t.csv").read_text().startswith("alpha,")
    code, out, err = run_main(["run", "-e", TRUNCATED, "--files-into", "new/deeper"])
    assert code == 0, err
    assert (tmp_path / "new" / "deeper" / "t.csv").is_file() and "files written:" in out
    (tmp_path / "plain").write_text("")
    code, _, err = run_main(["run", "-e", TRUNCATED, "--files-into", "plain"])
    assert code == 2 and "it is not a folder" in err


def test_a_table_and_a_sample_table_may_not_share_a_file(tmp_path):
    text = ("dimension 2 parameter alpha in [0, 1) species A exchange alpha clusters pairphase "
            'tabulate a[2] over alpha in [0, 1/2] into "t.csv" '
            'sample a[3] at alpha = 1/2 seed 1 with 20000 loops table "./t.csv"')
    code, _, err = run_main(["run", "-e", text, "--files-into", str(tmp_path)])
    assert code == 2 and "t.csv is written twice by this run" in err
    assert os.listdir(tmp_path) == []


def test_a_species_less_singular_than_the_reference_is_an_input_error():
    # found by the hostile fuzz profile: its b for one particle is 0, and the reversion failed with an
    # internal SeriesError (a traceback) instead of an input error at the spectrum
    with pytest.raises(InputError) as caught:
        clusterexp.derive("dimension 1\nspecies S0 bose\nspecies S1 bose\n"
                          "clusters spectrum { levels S0 = x^(1/2)/(1 - x)^2 }\nderive virial up to 2\n").compute_all()
    error = caught.value
    assert place(error) == (4, 1)
    assert error.message.startswith("the one-body level function of species 2 diverges like (beta hbar omega)^-1")
