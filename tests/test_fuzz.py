"""Fuzzing the input language: inputs generated from the grammar file itself and mutations of the
worked examples. Every input must either derive or be refused with an `InputError` /
`NotSupportedYet` that points at a line and column; any other exception, or a hang, is a bug.

The default run is quick. `python benchmarks/fuzz_long.py` runs the same properties on >= 10,000
inputs (it sets CLUSTEREXP_FUZZ_EXAMPLES).
"""
from __future__ import annotations

import contextlib
import io
import os
import random
import re
import tempfile
import signal
import sys
from functools import cache
from pathlib import Path

import lark
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from clusterexp import InputError, NotSupportedYet, build_system, derive_system
from clusterexp.export import FORMATTERS
from clusterexp.limits import estimate
from clusterexp.language.parse import parse, source_lines
from clusterexp.language.resources import grammar_text

from conftest import ROOT, run_cli

EXAMPLES = int(os.environ.get("CLUSTEREXP_FUZZ_EXAMPLES", "0")) or None
FUZZ_SIZE = 3_000         # estimated terms above which a fuzz case only builds (keeps each case fast)
FUZZ_SAMPLING_SECONDS = 5  # likewise for the Monte Carlo runs of `sample` statements (estimated seconds)
HANG_SECONDS = 20         # one input taking longer than this is reported as a hang
FUZZ = settings(max_examples=EXAMPLES or 120, deadline=None, derandomize=EXAMPLES is None,
                suppress_health_check=[HealthCheck.too_slow, HealthCheck.data_too_large,
                                       HealthCheck.filter_too_much])

SEEDS = sorted((ROOT / "worked").glob("*/input.gas")) + [ROOT / "clusterexp" / "demo.gas"]
EXTRA_SEEDS = [
    "dimension 2 species A species B mutual A B = 1/3 clusters given { b[A,B] = -1/9 } derive virial up to 3",
    "dimension 3 parameter g in (0, 1] species A mass 2 fermi species B mass g\nderive density up to 3\n"
    "derive fugacity up to 2 output format latex",
    "dimension 1 species A exchange 1/2 virials given { a[2] = 1/4 } derive cluster b[3], b[2]",
    "dimension 2 parameter nu species A species B mutual A B = nu derive virial a[A:2, B] output format json",
]


class Hang(Exception):
    """An input ran longer than HANG_SECONDS."""


@contextlib.contextmanager
def time_guard(seconds: float = HANG_SECONDS):
    """Turn a hang into a failure (POSIX main thread; elsewhere no guard)."""
    if not hasattr(signal, "setitimer") or sys.platform == "win32":
        yield
        return

    def ring(signum, frame):
        raise Hang(f"no answer within {seconds} s")

    previous = signal.signal(signal.SIGALRM, ring)
    signal.setitimer(signal.ITIMER_REAL, seconds)
    try:
        yield
    finally:
        signal.setitimer(signal.ITIMER_REAL, 0)
        signal.signal(signal.SIGALRM, previous)


def check_refusal(error, text: str, filename: str) -> None:
    """A refusal must carry a place inside the file it names, and render as file:line:col: error."""
    assert error.span is not None, f"refusal without a place: {error.render()}"
    span = error.span
    assert span.line >= 1 and span.column >= 1, error.render()
    if span.file == filename:
        lines = source_lines(text) or [""]   # lines as the parser counts them (line feeds only)
        assert span.line <= len(lines), error.render()
        assert span.column <= len(lines[span.line - 1]) + 1, error.render()
        assert span.line_text == lines[span.line - 1], error.render()
    first = error.render().splitlines()[0]
    assert first.startswith(f"{span.file}:{span.line}:{span.column}: error: "), first


def derive_or_refuse(text: str, base_dir: Path | None = None, filename: str = "fuzz.gas") -> str:
    """The fuzz property. Returns "derived", "large" (built, too large to derive in a test) or
    "refused"; raises on anything else."""
    with time_guard():
        try:
            system = build_system(text, filename, base_dir or ROOT)
            if too_large(system):
                return "large"
            derivation = derive_system(system)
            FORMATTERS["text"](derivation)  # values are lazy: printing forces every one
            return "derived"
        except (InputError, NotSupportedYet) as error:
            check_refusal(error, text, filename)
            return "refused"


# -- inputs generated from the grammar ------------------------------------------------------------------

@cache
def grammar_rules():
    """{nonterminal: [expansion, ...]} and {terminal: pattern} of the grammar file as lark reads it."""
    compiled = lark.Lark(grammar_text(), parser="lalr")
    rules: dict[str, list[list[tuple[str, bool]]]] = {}
    for rule in compiled.rules:
        rules.setdefault(rule.origin.name, []).append([(s.name, s.is_term) for s in rule.expansion])
    terminals = {t.name: t.pattern for t in compiled.terminals}
    return rules, terminals


@cache
def heights() -> dict[str, int]:
    """Fewest nested expansions to reach only terminals, per nonterminal (to close off deep trees)."""
    rules, _ = grammar_rules()
    height = {name: 10 ** 6 for name in rules}
    changed = True
    while changed:
        changed = False
        for name, expansions in rules.items():
            best = min(1 + max([height[s] for s, term in e if not term] or [0]) for e in expansions)
            if best < height[name]:
                height[name], changed = best, True
    return height


# Words that mean something in some NAME position; kept only if the grammar's NAME accepts them.
NAME_POOL = ["A", "B", "C", "nu", "mu", "x", "a", "b", "generic", "ideal", "cluster", "virial", "density",
             "fugacity", "text", "latex", "json", "sqrt", "exp", "pi", "binomial", "given", "order", "b_2"]
INT_POOL = ["0", "1", "2", "3", "4", "5", "6", "2", "3"]
NUMBER_POOL = ["0", "1", "2", "3", "1.5", "0.25", "2e3", "1e-2", "10"]
STRING_POOL = ['"fragment.gas"', '"missing.gas"', '""', '"cycle.gas"', '"."']
SPACES = [" ", " ", " ", "\n", "  ", "\t", " # note\n", "\r\n"]


def test_open_upper_range_parses():
    # found by the grammar fuzzer: `)` closing a range once collided with the `)` of parentheses
    system = build_system("dimension 2 parameter x in [0, 1) species A")
    assert system.parameters[0].upper_open and not system.parameters[0].lower_open


@cache
def include_with_nul_crashes() -> bool:
    """Known build.py issue: `include "<NUL>"` raises ValueError (embedded null byte). While it lasts,
    the generator leaves NUL out of file names (see test_include_name_with_nul_is_refused)."""
    try:
        build_system('dimension 2 species A include "\x00"')
    except ValueError:
        return True
    except InputError:
        return False
    return False


def test_include_name_with_nul_is_refused():
    assert not include_with_nul_crashes()
    with pytest.raises(InputError) as caught:
        build_system('dimension 2 species A include "a\x00b"', "main.gas")
    assert caught.value.span.column == 31


@cache
def terminal_strategy(name: str):
    _, terminals = grammar_rules()
    pattern = terminals[name]
    if pattern.type == "str":
        return st.just(pattern.value)
    full = re.compile(pattern.to_regexp())
    if name == "STRING" and include_with_nul_crashes():
        free = st.from_regex(pattern.to_regexp(), fullmatch=True, alphabet=st.characters(codec="ascii", exclude_characters="\x00"))
        return st.one_of(st.sampled_from(STRING_POOL), free.filter(lambda s: len(s) < 12))
    pools = {"NAME": NAME_POOL, "INT": INT_POOL, "NUMBER": NUMBER_POOL, "STRING": STRING_POOL}
    pool = [w for w in pools.get(name, []) if full.fullmatch(w)]
    # hypothesis cannot draw from look-ahead regexes: draw from the look-ahead-free part, then filter
    loose = re.sub(r"\(\?[!=].*?\)\\b\)", "", pattern.to_regexp()) if "(?!" in pattern.to_regexp() else pattern.to_regexp()
    free = st.from_regex(loose, fullmatch=True, alphabet=st.characters(codec="ascii")).filter(
        lambda s: full.fullmatch(s) is not None and len(s) < 12)
    return st.one_of(st.sampled_from(pool), free) if pool else free


@st.composite
def sentences(draw, symbol: str = "start", depth: int = 0, budget: int = 10):
    rules, _ = grammar_rules()
    expansions = rules[symbol]
    if depth >= budget:  # close off: only expansions of least height
        low = min(1 + max([heights()[s] for s, t in e if not t] or [0]) for e in expansions)
        expansions = [e for e in expansions if 1 + max([heights()[s] for s, t in e if not t] or [0]) == low]
    expansion = expansions[draw(st.integers(0, len(expansions) - 1))]
    pieces = []
    for name, is_terminal in expansion:
        if is_terminal:
            pieces.append(draw(terminal_strategy(name)))
        else:
            pieces.append(draw(sentences(name, depth + 1, budget)))
        pieces.append(draw(st.sampled_from(SPACES)))
    return "".join(pieces)


PRELUDES = ["", "dimension 2 species A bose\n", "dimension 2 species A species B\n",
            "dimension 3 parameter nu in [0, 1] species A mass 2 species B fermi mutual A B = nu\n"]


@st.composite
def grammar_inputs(draw):
    return draw(st.sampled_from(PRELUDES)) + draw(sentences())


@pytest.fixture(scope="module")
def include_dir(tmp_path_factory):
    folder = tmp_path_factory.mktemp("fuzz-includes")
    (folder / "fragment.gas").write_text("parameter g in [0, 1]\nspecies G mass 2\n")
    (folder / "cycle.gas").write_text('include "cycle.gas"\n')
    return folder


@FUZZ
@given(text=grammar_inputs())
def test_grammar_inputs_parse_and_derive_or_are_refused(text, include_dir):
    parse(text, "fuzz.gas")  # the generator follows the grammar: its output always parses
    derive_or_refuse(text, include_dir)


def test_grammar_generator_reaches_every_statement():
    """The generator reads the grammar file: every alternative of `statement` is reachable, so a
    statement added to the grammar is fuzzed without touching this file."""
    compiled = lark.Lark(grammar_text(), parser="lalr")
    kinds = {str(rule.alias) for rule in compiled.rules if rule.origin.name == "statement"}
    assert len(kinds) >= 12
    seen = set()
    for seed in range(600):
        tree = parse(_plain_sentence(random.Random(seed), "statement"))
        seen.update(statement.data for statement in tree.children)
    assert kinds <= seen, kinds - seen


def _plain_sentence(rng: random.Random, symbol: str, depth: int = 0) -> str:
    """The same walk without hypothesis (for coverage counting and the CLI cases)."""
    rules, terminals = grammar_rules()
    expansions = rules[symbol]
    if depth >= 6:
        low = min(1 + max([heights()[s] for s, t in e if not t] or [0]) for e in expansions)
        expansions = [e for e in expansions if 1 + max([heights()[s] for s, t in e if not t] or [0]) == low]
    out = []
    for name, is_terminal in rng.choice(expansions):
        if not is_terminal:
            out.append(_plain_sentence(rng, name, depth + 1))
            continue
        pattern = terminals[name]
        if pattern.type == "str":
            out.append(pattern.value)
        else:
            full = re.compile(pattern.to_regexp())
            pool = {"NAME": NAME_POOL, "INT": INT_POOL, "NUMBER": NUMBER_POOL, "STRING": STRING_POOL}.get(name)
            choices = [w for w in pool or [] if full.fullmatch(w)]
            if not choices:  # a terminal added to the grammar later: try a few short words
                choices = [w for w in ("on", "off", "real", "positive", "[", "]", "(", ")", "x", "1")
                           if full.fullmatch(w)]
            assert choices, f"add sample words for the new terminal {name} ({pattern.to_regexp()})"
            out.append(rng.choice(choices))
    return " ".join(out)


# -- mutations of the worked examples --------------------------------------------------------------------

ODD_CHARACTERS = ["{", "}", "[", "]", "(", ")", "=", ",", ":", "^", "*", "/", "-", "+", "#", '"', "0", "9",
                  "\n", " ", "\u0430", "\uff12", "\u200b", "\u00a0", "\t", ";", "\\", "e"]


def mutate(text: str, rng: random.Random, steps: int) -> str:
    """Delete, duplicate or swap characters, tokens or lines; insert odd characters."""
    for _ in range(steps):
        kind = rng.randrange(8)
        if kind < 3:
            units = list(text) if kind == 0 else re.findall(r"\s+|[^\s]+", text) if kind == 1 else text.split("\n")
            join = "\n" if kind == 2 else ""
            if not units:
                continue
            i, j = rng.randrange(len(units)), rng.randrange(len(units))
            action = rng.randrange(3)
            if action == 0:
                del units[i]
            elif action == 1:
                units.insert(i, units[j])
            else:
                units[i], units[j] = units[j], units[i]
            text = join.join(units)
        elif kind < 5:
            i = rng.randrange(len(text) + 1)
            text = text[:i] + rng.choice(ODD_CHARACTERS) + text[i:]
        elif kind == 5:  # change a number
            numbers = list(re.finditer(r"\d+", text))
            if numbers:
                m = rng.choice(numbers)
                text = text[:m.start()] + rng.choice(["0", "1", "7", "15", "250", "99999"]) + text[m.end():]
        elif kind == 6:  # truncate
            text = text[:rng.randrange(len(text) + 1)]
        else:  # splice a line of another seed
            other = rng.choice(seed_texts()).split("\n")
            lines = text.split("\n")
            lines.insert(rng.randrange(len(lines) + 1), rng.choice(other))
            text = "\n".join(lines)
    return text


@cache
def seed_texts() -> list[str]:
    return [p.read_text(encoding="utf-8") for p in SEEDS] + EXTRA_SEEDS


@st.composite
def mutated_inputs(draw):
    seed = draw(st.sampled_from(seed_texts()))
    return mutate(seed, random.Random(draw(st.integers(0, 2 ** 32 - 1))), draw(st.integers(1, 4)))


def test_seeds_derive_unmutated():
    # the property is only interesting if the unmutated seeds get all the way through
    assert all(derive_or_refuse(text) == "derived" for text in seed_texts())


@FUZZ
@given(text=mutated_inputs())
def test_mutated_examples_derive_or_are_refused(text):
    derive_or_refuse(text)


# -- the same through the command line --------------------------------------------------------------------

def run_main(argv: list[str]) -> tuple[int, str, str]:
    """`clusterexp` in this process: exit code, stdout, stderr; exceptions propagate (= bugs)."""
    from clusterexp.command import main
    out, err = io.StringIO(), io.StringIO()
    with contextlib.redirect_stdout(out), contextlib.redirect_stderr(err), time_guard():
        code = main(argv)
    return code, out.getvalue(), err.getvalue()


REFUSAL = re.compile(r"^<command line>:\d+:\d+: error: ")


def too_large(system) -> bool:
    """Too big or too long for a fuzz case: only built, not derived."""
    if system.samplings:
        from clusterexp.loops.request import expected_seconds
        if expected_seconds(system) > FUZZ_SAMPLING_SECONDS:
            return True
    if system.states:   # equation-of-state statements: the continuum's points are numerical integrals
        from clusterexp.language.state_statements import expected_seconds as state_seconds
        if state_seconds(system) > FUZZ_SAMPLING_SECONDS:
            return True
    return estimate(system).size > FUZZ_SIZE


def small_enough(text: str) -> bool:
    try:
        return not too_large(build_system(text, "fuzz.gas", ROOT))
    except (InputError, NotSupportedYet):
        return True


@settings(FUZZ, max_examples=(EXAMPLES or 120) // 3)
@given(text=st.one_of(mutated_inputs(), grammar_inputs()))
def test_command_line_exit_codes_on_fuzz(text):
    if not small_enough(text):
        return
    with tempfile.TemporaryDirectory() as folder:  # tables and figures the input may ask for
        code, out, err = run_main(["run", "-e", text, "--files-into", folder])
    assert code in (0, 1, 2), (code, err)
    if code == 2:
        assert REFUSAL.match(err) and "Traceback" not in err, err
    else:  # success: stderr holds warnings and failed claims only (each `file:line:col: ...`)
        assert out and all(": warning: " in line or ": check failed: " in line for line in err.splitlines()), err
        assert (code == 1) == (": check failed: " in err), err


def cli_cases(count: int) -> list[str]:
    rng = random.Random(20240613)
    cases = []
    while len(cases) < count:
        text = mutate(rng.choice(seed_texts()), rng, rng.randint(1, 3))
        if small_enough(text):
            cases.append(text)
    return cases


@pytest.mark.parametrize("text", ids=["mutated-1", "mutated-2", "mutated-3", "refused"], argvalues=cli_cases(3) + [
    # refused for sure, so the exit-code-2 path of the real process is exercised every run
    "dimension 2 species A\nmutual A A = 1/2 derive virial up to 2",
])
def test_subprocess_exit_codes_on_fuzz(text, tmp_path):
    path = tmp_path / "case.gas"
    path.write_text(text, encoding="utf-8")
    for args in (("run", "-e", text), ("run", str(path))):
        result = run_cli(*args, "--files-into", str(tmp_path))
        assert result.returncode in (0, 1, 2), result.stderr
        assert "Traceback" not in result.stderr, result.stderr
        if result.returncode == 2:
            assert re.match(r"^.+:\d+:\d+: error: ", result.stderr), result.stderr


# -- hostile shapes (issue 14): many species, the harmonic regulator at high order, absurd loop budgets,
# -- special output targets. `benchmarks/fuzz_long.py` runs these at length and prints their counts.

DECISION_SECONDS = 10   # build + size estimate + refusal of any input (about a second when idle)
HOSTILE = settings(FUZZ, max_examples=(EXAMPLES or 90) // 3)


def _species_lines(count: int, statistics: str) -> str:
    return "\n".join(f"species S{i}{statistics}" for i in range(count))


@st.composite
def many_species_inputs(draw):
    K = draw(st.one_of(st.integers(2, 40), st.sampled_from([80, 150, 300, 1000, 2000, 4000])))
    statistics = draw(st.sampled_from(["", " bose", " fermi", " exchange 1/2", " exchange 1/3 mass 2"]))
    regime = draw(st.sampled_from(["", "clusters generic", "clusters ideal", "clusters exclusion",
                                   "clusters exclusion level", "clusters landau", "clusters landau spectrum",
                                   "clusters pairphase", "clusters spectrum { }"]))
    order = draw(st.integers(1, 4))
    quantity = draw(st.sampled_from(["virial", "cluster", "density", "fugacity"]))
    return f"dimension 2\n{_species_lines(K, statistics)}\n{regime}\nderive {quantity} up to {order}\n"


@st.composite
def spectral_inputs(draw):
    parameters = draw(st.integers(0, 3))
    names = ["g", "h", "nu"][:parameters]
    value = lambda: draw(st.sampled_from(names + ["1/2", "1/3", "0", "1"])) if names else \
        draw(st.sampled_from(["1/2", "1/3", "0", "1"]))
    K = draw(st.integers(1, 3))
    order = draw(st.one_of(st.integers(1, 12), st.integers(13, 60)))
    head = "dimension 2\n" + "".join(f"parameter {n} in [0, 1]\n" for n in names)
    if draw(st.booleans()):
        species = "".join(f"species S{i} exchange {value()}\n" for i in range(K))
        mutual = "".join(f"mutual S{i} S{j} = {value()}\n" for i in range(K) for j in range(i + 1, K))
        return head + species + mutual + f"clusters landau spectrum\nderive virial up to {order}\n"
    dimension = draw(st.integers(1, 3))
    species = "".join(f"species S{i} {draw(st.sampled_from(['bose', 'fermi']))}\n" for i in range(K))
    counts = [f"S{i}" for i in range(K)]
    shift = draw(st.sampled_from(["0", "{p}*{a}*{b}", "{p}*{a}*({a} - 1)/2", "{a}*{b}", "{p}*{a}"])).format(
        p=value(), a=draw(st.sampled_from(counts)), b=draw(st.sampled_from(counts)))
    area = draw(st.sampled_from(["", "area mass", "area count", "area one"]))
    levels = draw(st.sampled_from(["", "levels S0 = 1/(1 - x)", "levels S0 = x^(1/2)/(1 - x)^2"]))
    return (head.replace("dimension 2", f"dimension {dimension}") + species
            + f"clusters spectrum {{ shift = {shift} {levels} {area} }}\nderive virial up to {order}\n")


@st.composite
def loop_budget_inputs(draw):
    loops = draw(st.one_of(st.integers(10_000, 10 ** 7), st.integers(10 ** 7, 10 ** 30),
                           st.sampled_from([10 ** 15, 10 ** 29, 12_000_000, 12_000_001])))
    within = draw(st.sampled_from(["", " within 1 seconds", " within 60 seconds", " within 604800 seconds",
                                   " within 1e9 seconds"]))
    points = draw(st.integers(1, 50))
    where = "at alpha = 1/2" if points == 1 else "over alpha = [" + ", ".join(f"1/{k + 2}" for k in range(points)) + "]"
    return ("dimension 2\nparameter alpha in [0, 1]\nspecies A exchange alpha\nclusters pairphase\n"
            f"sample a[3] {where} seed {draw(st.integers(0, 2 ** 64))} with {loops} loops{within}\n")


def decide(text: str):
    """Build and size an input within DECISION_SECONDS: (system or None, the refusal or None)."""
    from clusterexp.limits import check_size
    with time_guard(DECISION_SECONDS):
        try:
            system = build_system(text, "fuzz.gas", ROOT)
            check_size(system)
            return system, None
        except (InputError, NotSupportedYet) as error:
            check_refusal(error, text, "fuzz.gas")
            return None, error


REFUSALS = {"this derivation is too large": "too large to start", "loops would take": "loop budget too long",
            "at most 604800": "time cap too long", "a whole number with": "number too long"}


@HOSTILE
@given(case=st.one_of(many_species_inputs().map(lambda t: ("many species", t)),
                      spectral_inputs().map(lambda t: ("regulator", t)),
                      loop_budget_inputs().map(lambda t: ("loop budget", t))))
def test_hostile_shapes_are_decided_quickly(case):
    """Every such input is refused or accepted within DECISION_SECONDS; an accepted one estimated
    small derives within the hang guard (the estimate is not wildly optimistic); an accepted loop
    budget without `within` fits the untimed cap."""
    from hypothesis import event
    from clusterexp.loops.request import MAX_UNTIMED_SECONDS, expected_seconds
    kind, text = case
    system, refusal = decide(text)
    if refusal is not None:
        reason = next((why for start, why in REFUSALS.items() if start in str(refusal)), "other input error")
        event(f"{kind}: refused, {reason}")
        return
    for sampling in system.samplings:
        assert sampling.time_cap is not None or expected_seconds(system) <= MAX_UNTIMED_SECONDS
    if system.samplings or too_large(system):
        event(f"{kind}: accepted, not run")
        return
    event(f"{kind}: accepted and derived")
    assert derive_or_refuse(text) in ("derived", "refused")


TARGETS = ["new", "existing", "link to existing", "dangling link", "link to a folder", "fifo", "device", "folder",
           "the input", "link to the input", "missing folder", "below a file", "standard output"]


@HOSTILE
@given(target=st.sampled_from(TARGETS), overwrite=st.booleans(), files=st.sampled_from(["none", "here", "new"]),
       table_name=st.sampled_from(["t.csv", "out.txt", "in.gas", "fifo", "sub/t.csv"]))
def test_special_output_targets(target, overwrite, files, table_name):
    """-o and the input's own table aimed at every kind of path: exit 0 or 2 and never a traceback,
    no non-regular file or input replaced, no temporary file left, and with exit 0 the result is in
    the regular file the path leads to."""
    import stat as stat_module
    from hypothesis import event
    with tempfile.TemporaryDirectory() as folder:
        here = Path(folder)
        source = here / "in.gas"
        text = ("dimension 2 parameter g in [0, 1] species A exchange g clusters landau derive virial up to 2 "
                f'tabulate a[2] over g in [0, 1] into "{table_name}"\n')
        source.write_text(text)
        (here / "existing.txt").write_text("old")
        (here / "folder").mkdir()
        os.mkfifo(here / "fifo")
        paths = {"new": "new.txt", "existing": "existing.txt", "link to existing": "l1", "dangling link": "l2",
                 "link to a folder": "l3", "fifo": "fifo", "device": os.devnull, "folder": "folder",
                 "the input": "in.gas", "link to the input": "l4", "missing folder": "no/such/out.txt",
                 "below a file": "existing.txt/out.txt", "standard output": "-"}
        os.symlink("existing.txt", here / "l1")
        os.symlink("created.txt", here / "l2")
        os.symlink("folder", here / "l3")
        os.symlink("in.gas", here / "l4")
        args = ["run", str(source), "-o", str(here / paths[target]) if paths[target] not in ("-", os.devnull)
                else paths[target]]
        args += {"none": ["--no-files"], "here": ["--files-into", folder], "new": ["--files-into", str(here / "new")]}[files]
        code, out, err = run_main(args + (["--overwrite"] if overwrite else []))
        event(f"{target}: exit {code}")
        assert code in (0, 2), err
        assert "Traceback" not in err
        assert source.read_text() == text
        assert stat_module.S_ISFIFO(os.lstat(here / "fifo").st_mode) and (here / "folder").is_dir()
        assert all(os.path.islink(here / name) for name in ("l1", "l2", "l3", "l4"))
        assert not [p for p in here.rglob("*") if p.name.endswith(".part")]
        if code == 0 and paths[target] != "-":
            written = Path(os.path.realpath(here / paths[target]))
            assert written.is_file() and written.read_text().startswith("# clusterexp")
            assert target not in ("fifo", "device", "folder", "the input", "link to the input", "link to a folder")
        if code == 2:
            assert err.startswith("clusterexp: error: ") or re.match(r"^.+:\d+:\d+: error: ", err), err
