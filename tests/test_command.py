"""The command line: formats, exit codes, messages without tracebacks, files written safely."""
import json
import os

import pytest
import sympy

from conftest import ROOT


def test_run_expression_text(cli):
    result = cli("run", "-e", "dimension 2 species A bose clusters generic derive virial up to 3")
    assert result.returncode == 0, result.stderr
    assert "a[3] = -2*b_3 + 4*b_2**2" in result.stdout or "a[3] = 4*b_2**2 - 2*b_3" in result.stdout


def test_json_lists_kind_index_species_and_parsable_value(cli):
    result = cli("run", "-e", "dimension 2 species A species B clusters generic derive virial a[1,1]"
                 " derive cluster b[1,0]", "--format", "json")
    assert result.returncode == 0, result.stderr
    data = json.loads(result.stdout)
    kinds = [(c["kind"], c["index"], c["species"]) for c in data["coefficients"]]
    assert kinds == [("cluster", [1, 0], {"A": 1, "B": 0}), ("virial", [1, 1], {"A": 1, "B": 1})]
    assert sympy.sympify(data["coefficients"][1]["value"]) == -sympy.Symbol("b_1_1")


def test_latex_snippet_uses_species_subscripts_and_align(cli):
    result = cli("run", "-e", "dimension 2 species A species B clusters generic derive virial a[2,1]",
                 "--format", "latex")
    assert result.returncode == 0, result.stderr
    assert result.stdout.startswith("\\begin{align}")
    assert "a_{A^{2} B} &=" in result.stdout
    assert "b_{A B}" in result.stdout


def test_syntax_error_exit_two_with_caret_and_no_traceback(cli):
    result = cli("run", "-e", "dimension 2 species A bose derive virial up to")
    assert result.returncode == 2
    assert "Traceback" not in result.stderr
    assert "<command line>:1:" in result.stderr
    assert "^" in result.stderr


def test_semantic_error_points_at_the_line(cli, tmp_path):
    path = tmp_path / "bad.gas"
    path.write_text("dimension 2\nspecies A\nmutual A A = 1/2\n")
    result = cli("run", str(path))
    assert result.returncode == 2
    assert f"{path}:3:" in result.stderr
    assert "Traceback" not in result.stderr


def test_not_supported_regime_is_an_input_error(cli):
    result = cli("run", "-e", "dimension 2 species A boltzmann species B clusters pairphase derive virial up to 2")
    assert result.returncode == 2
    assert "not supported yet" in result.stderr
    assert "Traceback" not in result.stderr


def test_missing_file(cli):
    result = cli("run", "no/such/file.gas")
    assert result.returncode == 2 and "no such input file" in result.stderr


def test_output_file_written_and_not_overwritten(cli, tmp_path):
    target = tmp_path / "out.tex"
    args = ("run", "-e", "dimension 2 species A derive virial up to 2", "--format", "latex", "-o", str(target))
    assert cli(*args).returncode == 0
    first = target.read_text()
    assert "\\begin{align}" in first
    target.write_text("my notes")
    refused = cli(*args)
    assert refused.returncode == 2 and "exists" in refused.stderr
    assert target.read_text() == "my notes"
    assert cli(*args, "--overwrite").returncode == 0
    assert target.read_text() == first
    assert not [p for p in os.listdir(tmp_path) if p.endswith(".part")]


def test_demo_runs(cli):
    result = cli("run", "demo")
    assert result.returncode == 0, result.stderr
    assert "virial coefficients" in result.stdout and "nu" in result.stdout


def test_output_is_identical_across_hash_seeds(cli):
    args = ("run", str(ROOT / "worked" / "film_mixture" / "input.gas"), "--format", "json")
    outputs = {cli(*args, env_extra={"PYTHONHASHSEED": seed}).stdout for seed in ("1", "2", "12345")}
    assert len(outputs) == 1


def test_expression_text_starting_with_a_dash_is_read_as_input(cli):
    # found by the long fuzz run: argparse took '-dimension' for an option and refused without a caret
    for args in (["-e", "-dimension 2"], ["--expression", "- 2"]):
        result = cli("run", *args)
        assert result.returncode == 2
        assert result.stderr.startswith("<command line>:1:1: error:") and "^" in result.stderr
        assert "Traceback" not in result.stderr
    assert cli("run", "-e", "dimension 2 species A bose derive virial up to 2", "--format", "json").returncode == 0


# -- issue 14: hostile command lines and output targets ------------------------------------------------

SMALL = "dimension 2 species A bose derive virial up to 3"


def _shell(command: str, cwd, **kwargs):
    """A shell command line (for redirections the CLI cannot express) with the checkout importable."""
    import subprocess
    import sys
    env = dict(os.environ, PYTHONPATH=str(ROOT) + os.pathsep + os.environ.get("PYTHONPATH", ""))
    return subprocess.run(["sh", "-c", command.replace("CLUSTEREXP", f"'{sys.executable}' -m clusterexp")],
                          cwd=cwd, env=env, capture_output=True, text=True, timeout=120, **kwargs)


def test_closed_standard_output_is_an_error_not_a_traceback(tmp_path):
    # issue 14: `clusterexp run ok.gas >&-` was an AttributeError traceback with exit 1
    result = _shell(f"CLUSTEREXP run -e '{SMALL}' >&-", tmp_path)
    assert result.returncode == 2 and "Traceback" not in result.stderr
    assert result.stderr == "clusterexp: error: standard output is closed; write to a file with -o FILE\n"
    # with -o the closed standard output does not matter
    result = _shell(f"CLUSTEREXP run -e '{SMALL}' -o out.txt >&-", tmp_path)
    assert result.returncode == 0 and (tmp_path / "out.txt").read_text().startswith("# clusterexp")


@pytest.mark.skipif(not os.path.exists("/dev/full"), reason="needs /dev/full")
def test_full_standard_output_is_an_error_not_a_traceback(tmp_path):
    # issue 14: `> /dev/full` was an OSError (ENOSPC) traceback with exit 1
    result = _shell(f"CLUSTEREXP run -e '{SMALL}' > /dev/full", tmp_path)
    assert result.returncode == 2, result.stderr
    assert result.stderr == "clusterexp: error: cannot write to standard output: No space left on device\n"


def test_closed_standard_error_does_not_move_messages_onto_standard_output(tmp_path):
    # sibling: with stderr closed, print(file=sys.stderr) would have written the error onto stdout
    result = _shell("CLUSTEREXP run -e 'dimension 2 spcies A' 2>&-", tmp_path)
    assert result.returncode == 2 and result.stdout == ""


def test_reader_that_goes_away_ends_the_run_quietly(tmp_path):
    # the reader closes its end before anything is written: EPIPE, status 141 (128 + SIGPIPE), silent
    result = _shell(f"(CLUSTEREXP run -e '{SMALL}' 2>err.txt; echo $? > status.txt) | (exec 0<&-; sleep 3)",
                    tmp_path)
    assert result.returncode == 0, result.stderr
    assert (tmp_path / "status.txt").read_text() == "141\n" and (tmp_path / "err.txt").read_text() == ""


def test_interrupt_and_termination_end_with_one_line_and_no_file(tmp_path):
    # issue 14: Ctrl-C printed a KeyboardInterrupt traceback. The whole process group gets the signal,
    # as from a terminal, workers of the Monte Carlo included.
    import signal
    import subprocess
    import sys
    import time
    text = ("dimension 2 parameter alpha in (0, 1) species A exchange alpha clusters pairphase "
            "sample a[3] at alpha = 1/2 seed 1 within 60 seconds table \"s.csv\"")
    env = dict(os.environ, PYTHONPATH=str(ROOT) + os.pathsep + os.environ.get("PYTHONPATH", ""))
    for sig, code, word in ((signal.SIGINT, 130, "interrupted"), (signal.SIGTERM, 143, "terminated")):
        process = subprocess.Popen([sys.executable, "-m", "clusterexp", "run", "-e", text, "-o", "out.txt",
                                    "--files-into", "tables"], cwd=tmp_path, env=env, stdout=subprocess.PIPE,
                                   stderr=subprocess.PIPE, text=True, start_new_session=True,
                                   # a suite started in the background (`cmd &` in a script) runs with
                                   # SIGINT ignored, which the child would inherit: give it a terminal's
                                   preexec_fn=lambda: signal.signal(signal.SIGINT, signal.SIG_DFL))
        time.sleep(4)
        os.killpg(process.pid, sig)
        out, err = process.communicate(timeout=60)
        assert process.returncode == code, err
        assert err == f"clusterexp: {word}\n" and out == ""
        assert sorted(os.listdir(tmp_path)) == []


def test_size_limit_must_be_positive(cli):
    # issue 14: `--size-limit -5` was accepted
    # (it refused every derivation as "too large", a limit of -5 terms, instead of the option)
    for value, reason in (("-5", "the size limit must be at least 1, not -5"), ("0", "the size limit must be at least 1, not 0"),
                          ("many", "expected a whole number of terms, not 'many'")):
        result = cli("run", "--size-limit", value, "-e", SMALL)
        assert result.returncode == 2 and "Traceback" not in result.stderr
        assert f"argument --size-limit: {reason}" in result.stderr and "too large" not in result.stderr


def test_document_needs_latex(cli):
    # issue 14: `--document` with `--format text` was silently ignored
    result = cli("run", "-e", SMALL, "--document", "--format", "text")
    assert result.returncode == 2 and "--document" in result.stderr and "--format latex" in result.stderr
    result = cli("run", "-e", SMALL + " output format json", "--document")
    assert result.returncode == 2 and "this input's output format is json" in result.stderr
    result = cli("run", "-e", SMALL, "--document", "--format", "latex")
    assert result.returncode == 0 and "\\begin{document}" in result.stdout


def test_contradicting_file_options_are_refused(cli, tmp_path):
    result = cli("run", "-e", SMALL, "--no-files", "--files-into", str(tmp_path))
    assert result.returncode == 2 and "contradict" in result.stderr


def test_dash_reads_standard_input(cli, tmp_path):
    # issue 14: `-` did not read standard input
    result = cli("run", "-", input_text=SMALL)
    assert result.returncode == 0, result.stderr
    assert "a[3] = -2*b_3 + 4*b_2**2" in result.stdout or "a[3] = 4*b_2**2 - 2*b_3" in result.stdout
    bad = cli("run", "-", input_text="dimension 2\nspcies A\n")
    assert bad.returncode == 2 and bad.stderr.startswith("<stdin>:2:1: error:")
    # `-o -` is standard output too
    assert cli("run", "-e", SMALL, "-o", "-").stdout == result.stdout


def test_directory_as_input_is_named_a_folder(cli, tmp_path):
    # issue 14: a folder was reported as "no such input file"
    result = cli("run", str(tmp_path))
    assert result.returncode == 2
    assert result.stderr == f"clusterexp: error: {tmp_path} is a folder, not an input file\n"


def test_input_from_a_pipe(tmp_path):
    # a FIFO or `<(...)` is an input like any file (only outputs must be regular files)
    writer = f"(timeout 20 sh -c \"printf '{SMALL}' > in.gas\" >/dev/null 2>&1 &)"
    result = _shell(f"mkfifo in.gas && {writer} && CLUSTEREXP run in.gas", tmp_path)
    assert result.returncode == 0 and "a[3] =" in result.stdout, result.stderr


def test_invalid_utf8_points_at_the_byte(cli, tmp_path):
    # issue 14: a raw codec message with a byte offset
    path = tmp_path / "latin1.gas"
    path.write_bytes("dimension 2\nspecies A bose # café\nderive virial up to 2\n".encode("latin-1"))
    result = cli("run", str(path))
    assert result.returncode == 2 and "Traceback" not in result.stderr
    lines = result.stderr.splitlines()
    assert lines[0] == f"{path}:2:21: error: the input is not UTF-8 text: byte 0xE9 (invalid continuation byte); " \
                       "save the file as UTF-8"
    assert lines[1] == "    species A bose # caf\ufffd" and lines[2] == "    " + " " * 20 + "^"
    # the same in an included file points into that file
    (tmp_path / "main.gas").write_text('dimension 2\ninclude "latin1.gas"\n')
    result = cli("run", str(tmp_path / "main.gas"))
    assert result.returncode == 2 and result.stderr.startswith(f"{path}:2:21: error: the input is not UTF-8")


def test_nul_and_escape_characters_are_not_echoed_raw(cli, tmp_path):
    # issue 14: a NUL byte was copied onto stderr; an escape sequence would drive the terminal
    path = tmp_path / "nul.gas"
    path.write_bytes(b"dimension 2 species A\x00 bose\x1b[2J")
    result = cli("run", str(path))
    assert result.returncode == 2
    assert "\x00" not in result.stderr and "\x1b" not in result.stderr
    assert result.stderr.splitlines()[1] == "    dimension 2 species A? bose?[2J"


def test_tab_inside_a_quoted_name_is_named(cli, tmp_path):
    # issue 14: reported as "unexpected character '\"'"
    result = cli("run", "-e", "dimension 2\nspecies A bose\ntypeset wavelength as \"\\Lambda\t_T\"")
    assert result.returncode == 2
    lines = result.stderr.splitlines()
    assert lines[0] == "<command line>:3:23: error: a quoted name cannot contain a tab; write it without"
    assert lines[2] == "    " + " " * 22 + "^" * 9
    result = cli("run", "-e", "dimension 2\nspecies A bose\ntypeset wavelength as \"\\Lambda")
    assert "this quoted name is not closed on its line" in result.stderr


# -- the rule for output targets (README, "Output files") ------------------------------------------------

def test_output_through_a_symbolic_link_writes_its_target(cli, tmp_path):
    # issue 14: the link was replaced by a regular file
    target, link = tmp_path / "real.txt", tmp_path / "link.txt"
    target.write_text("old")
    link.symlink_to("real.txt")
    refused = cli("run", "-e", SMALL, "-o", str(link))
    assert refused.returncode == 2 and "exists; pass --overwrite" in refused.stderr
    assert cli("run", "-e", SMALL, "-o", str(link), "--overwrite").returncode == 0
    assert link.is_symlink() and os.readlink(link) == "real.txt"
    assert target.read_text().startswith("# clusterexp")
    dangling = tmp_path / "dangling.txt"
    dangling.symlink_to("created.txt")
    assert cli("run", "-e", SMALL, "-o", str(dangling)).returncode == 0
    assert dangling.is_symlink() and (tmp_path / "created.txt").read_text().startswith("# clusterexp")
    assert sorted(os.listdir(tmp_path)) == ["created.txt", "dangling.txt", "link.txt", "real.txt"]


def test_output_to_a_fifo_or_a_device_is_refused(cli, tmp_path):
    # issue 14: a FIFO was replaced by a regular file (its reader got nothing); as root, so was /dev/full
    fifo = tmp_path / "fifo"
    os.mkfifo(fifo)
    for target, kind in ((fifo, "a FIFO"), ("/dev/null", "a character device")):
        result = cli("run", "-e", SMALL, "-o", str(target), "--overwrite")
        assert result.returncode == 2 and "Traceback" not in result.stderr
        assert f"cannot write {target}: it is {kind}" in result.stderr and "-o -" in result.stderr
    import stat
    assert stat.S_ISFIFO(os.lstat(fifo).st_mode) and stat.S_ISCHR(os.stat("/dev/null").st_mode)
    assert os.listdir(tmp_path) == ["fifo"]
    # a link to a device is refused the same way
    (tmp_path / "null").symlink_to("/dev/null")
    assert "it is a character device" in cli("run", "-e", SMALL, "-o", str(tmp_path / "null"), "--overwrite").stderr


def test_output_file_respects_the_umask(tmp_path):
    # issue 14: -o files were created 0600 whatever the umask (tables got 0644)
    for umask in (0o022, 0o027):
        target = tmp_path / f"out{umask:o}.txt"
        result = _shell(f"umask {umask:03o} && CLUSTEREXP run -e '{SMALL}' -o {target.name}", tmp_path)
        assert result.returncode == 0, result.stderr
        assert target.stat().st_mode & 0o777 == 0o666 & ~umask
    # a replaced file keeps its permissions
    target.chmod(0o640)
    assert _shell(f"CLUSTEREXP run -e '{SMALL}' -o {target.name} --overwrite", tmp_path).returncode == 0
    assert target.stat().st_mode & 0o777 == 0o640


def test_output_onto_the_input_is_refused(cli, tmp_path):
    # issue 14: `-o FILE --overwrite` with FILE the input destroyed the input
    path = tmp_path / "in.gas"
    path.write_text(SMALL)
    (tmp_path / "alias.gas").symlink_to("in.gas")
    for output in (path, tmp_path / "alias.gas", tmp_path / "." / "in.gas"):
        result = cli("run", str(path), "-o", str(output), "--overwrite")
        assert result.returncode == 2 and "it is the input file" in result.stderr
    # an included file, and the input read from standard input, likewise
    (tmp_path / "main.gas").write_text('include "in.gas"\n')
    result = cli("run", str(tmp_path / "main.gas"), "-o", str(path), "--overwrite")
    assert result.returncode == 2 and "it is a file the input includes" in result.stderr
    result = _shell("CLUSTEREXP run - -o in.gas --overwrite < in.gas", tmp_path)
    assert result.returncode == 2 and "it is the input file (standard input)" in result.stderr
    # nor may a table of the input overwrite it
    (tmp_path / "t.gas").write_text("dimension 2 parameter g in [0, 1] species A exchange g clusters landau "
                                    'derive virial up to 2 tabulate a[2] over g in [0, 1] into "t.gas"')
    result = cli("run", str(tmp_path / "t.gas"), "--files-into", str(tmp_path), "--overwrite")
    assert result.returncode == 2 and "it is the input file" in result.stderr
    assert path.read_text() == SMALL and (tmp_path / "t.gas").read_text().startswith("dimension 2")


def test_one_run_never_writes_two_results_into_one_file(cli, tmp_path):
    # sibling: a `tabulate` and `-o` (or a `sample` table) naming the same file silently overwrote each other
    text = ("dimension 2 parameter g in [0, 1] species A exchange g clusters landau derive virial up to 2 "
            'tabulate a[2] over g in [0, 1] into "t.csv"')
    result = cli("run", "-e", text, "--files-into", str(tmp_path), "-o", str(tmp_path / "t.csv"))
    assert result.returncode == 2 and "is written twice by this run" in result.stderr
    assert os.listdir(tmp_path) == []
