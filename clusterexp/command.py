"""The command line: argument parsing, calling the public API, exit codes. Nothing else.

Exit codes: 0 ok, 1 a claim failed, 2 the input or the command line cannot be carried out (a bad
input, an unreadable input file, an output that may not or could not be written), 130 interrupted
(Ctrl-C), 143 terminated (SIGTERM), 141 standard output closed by its reader (a pipe into `head`).
Every one of them ends with a message, never a traceback; an interrupted or failed run leaves no
file behind (`files.Batch`), and no file is written unless the whole input derived: the tables,
figures and `-o` file are made first and written together, then the result is printed.
"""
from __future__ import annotations

import argparse
import os
import signal
import sys
import threading
from contextlib import contextmanager
from pathlib import Path

from .products.check_result import TIE, UNDECIDED
from .errors import (EXIT_BROKEN_PIPE, EXIT_CHECK_FAILED, EXIT_INPUT_ERROR, EXIT_INTERRUPTED, EXIT_OK,
                     EXIT_TERMINATED, InputError, NotSupportedYet, visible)

DEMO = Path(__file__).resolve().parent / "demo.gas"
STANDARD_STREAM = "-"


def _size_limit(text: str) -> int:
    try:
        value = int(text)
    except ValueError:
        raise argparse.ArgumentTypeError(f"expected a whole number of terms, not {text!r}") from None
    if value < 1:
        raise argparse.ArgumentTypeError(f"the size limit must be at least 1, not {value}")
    return value


def _parser() -> argparse.ArgumentParser:
    parser = argparse.ArgumentParser(
        prog="clusterexp",
        description="Exact cluster and virial expansions of gases with statistical pair phases.")
    commands = parser.add_subparsers(dest="command", required=True)
    run = commands.add_parser("run", help="derive what an input file (.gas) asks for")
    source = run.add_mutually_exclusive_group(required=True)
    source.add_argument("file", nargs="?",
                        help="input file; `-` reads standard input, `demo` runs the bundled demo")
    source.add_argument("-e", "--expression", dest="text", metavar="TEXT",
                        help="the input given on the command line instead of a file")
    run.add_argument("--format", choices=("text", "latex", "json"), default=None,
                     help="output format (default: the file's `output format`, else text)")
    run.add_argument("--document", action="store_true",
                     help="with --format latex: a standalone document instead of a snippet")
    run.add_argument("-o", "--output", metavar="PATH",
                     help="write to PATH instead of standard output (`-`: standard output); PATH must be a "
                          "regular file or a new name, symbolic links are followed")
    run.add_argument("--overwrite", action="store_true",
                     help="allow -o and the input's tables and figures to replace existing files")
    run.add_argument("--size-limit", type=_size_limit, metavar="TERMS", default=None,
                     help="refuse derivations estimated above TERMS terms (default 200000; "
                          "the input may also say `size limit N`)")
    run.add_argument("--files-into", metavar="FOLDER", default=None,
                     help="folder for the tables and figures the input asks for (default: the current one; "
                          "created when missing)")
    run.add_argument("--no-files", action="store_true", help="do not write the input's tables and figures")
    run.add_argument("--sample-cluster", metavar="ADDRESS", default=None,
                     help="run the `sample` statements' loop batches on the dask cluster whose scheduler is at "
                          "ADDRESS (e.g. tcp://head:8786; default: $CLUSTEREXP_SAMPLE_CLUSTER, else this machine)")
    return parser


def _text_arguments(argv: list[str]) -> list[str]:
    """`-e TEXT` with TEXT taken whole even when it starts with '-' (argparse would read it as an
    option and refuse the input without pointing into it)."""
    out, i = [], 0
    while i < len(argv):
        if argv[i] in ("-e", "--expression") and i + 1 < len(argv):
            out.append("--expression=" + argv[i + 1])
            i += 2
        else:
            out.append(argv[i])
            i += 1
    return out


class _Terminated(BaseException):
    """SIGTERM, raised where the program is (like KeyboardInterrupt for SIGINT) so that the same
    clean-up runs: temporary files removed, one line on stderr."""


@contextmanager
def _termination_as_exception():
    if threading.current_thread() is not threading.main_thread() or not hasattr(signal, "SIGTERM"):
        yield
        return

    def terminate(signum, frame):
        raise _Terminated

    previous = signal.signal(signal.SIGTERM, terminate)
    try:
        yield
    finally:
        signal.signal(signal.SIGTERM, previous)


def _say(text: str) -> None:
    """One message on stderr; a closed or full stderr loses it but never fails the run."""
    stream = sys.stderr
    if stream is None:
        return
    try:
        stream.write(visible(text) + "\n")
        stream.flush()
    except (OSError, ValueError):
        pass


def _refuse(message: str) -> int:
    _say(f"clusterexp: error: {message}")
    return EXIT_INPUT_ERROR


def main(argv: list[str] | None = None) -> int:
    args = _parser().parse_args(_text_arguments(sys.argv[1:] if argv is None else list(argv)))
    sys.set_int_max_str_digits(0)  # printing exact results; input literals are bounded in expressions.py
    from .progress import Progress
    progress = Progress()  # on stderr, and only when it is a terminal
    try:
        with _termination_as_exception():
            return _run(args, progress)
    except KeyboardInterrupt:
        progress.done()
        _say("clusterexp: interrupted")
        return EXIT_INTERRUPTED
    except _Terminated:
        progress.done()
        _say("clusterexp: terminated")
        return EXIT_TERMINATED


def _run(args, progress) -> int:
    to_stdout = args.output in (None, STANDARD_STREAM)
    if args.sample_cluster:   # read where the loop batches are submitted (loops/distributed.py)
        os.environ["CLUSTEREXP_SAMPLE_CLUSTER"] = args.sample_cluster
    if args.document and args.format not in (None, "latex"):
        return _refuse(f"--document makes a standalone LaTeX document: it needs --format latex, not {args.format}")
    if args.no_files and args.files_into is not None:
        return _refuse("--no-files and --files-into contradict each other; give one of them")
    if to_stdout and sys.stdout is None:
        return _refuse("standard output is closed; write to a file with -o FILE")
    try:
        derivation, protected = _derive(args, progress)
        if derivation is None:
            return EXIT_INPUT_ERROR
        for message, span in derivation.system.warnings:
            _say(f"{span}: warning: {message}" if span else f"warning: {message}")
        fmt = args.format or derivation.system.output.format
        if args.document and fmt != "latex":
            return _refuse(f"--document makes a standalone LaTeX document: it needs --format latex "
                           f"(this input's output format is {fmt})")
        batch = _check_outputs(args, derivation.system, protected)  # before any long computation
        derivation.compute_all(progress)
        # everything is made before anything is written: a run that fails (exit 2) writes no file
        if not args.no_files:
            derivation.stage_files(batch, _files_folder(args), args.overwrite)
        if not to_stdout:   # the document's figure paths are relative to its own folder
            derivation.__dict__["_document_folder"] = Path(args.output).parent
        text = _formatted(derivation, fmt, args.document)
        if not to_stdout:
            batch.add(Path(args.output), text.encode("utf-8"), args.overwrite)
        batch.commit()
        if to_stdout:
            status = _print_output(text)
            if status != EXIT_OK:
                return status
    except (InputError, NotSupportedYet) as error:
        progress.done()
        rendered = error.render()
        _say(rendered if getattr(error, "span", None) else "clusterexp: " + rendered)
        return EXIT_INPUT_ERROR
    failed = [(claim, result) for claim, result in zip(derivation.system.claims, derivation.checks) if not result.ok]
    for claim, result in failed:
        _say(f"{claim.span}: check failed: {result.label} differs from the derived value")
    for claim, result in zip(derivation.system.claims, derivation.checks):
        if result.status == TIE:   # not a failure (exit 0), but never silent
            _say(f"{claim.span}: check undecided: {result.label} is a rounding tie; write one more digit")
        elif result.status == UNDECIDED and result.conditions:
            _say(f"{claim.span}: check undecided: {result.label} holds only if unknown many-body pieces take "
                 "the stated values")
        elif result.status == UNDECIDED:
            _say(f"{claim.span}: check undecided: {result.label}: {result.method}")
    return EXIT_CHECK_FAILED if failed else EXIT_OK


def _derive(args, progress):
    """(Derivation, {identity: description} of the input files no output may replace)."""
    from . import derive
    from .language.build import MAX_INCLUDE_BYTES
    from .products.files import file_identity
    from .language.parse import decode_source, read_source
    options = dict(size_limit=args.size_limit, progress=progress)
    inputs = []
    if args.text is not None:
        derivation = derive(args.text, filename="<command line>", base_dir=Path.cwd(), **options)
    elif args.file == STANDARD_STREAM:
        stream = sys.stdin
        if stream is None:
            _refuse("standard input is closed; give an input file")
            return None, {}
        try:
            data = stream.buffer.read(MAX_INCLUDE_BYTES + 1) if hasattr(stream, "buffer") else \
                stream.read(MAX_INCLUDE_BYTES + 1).encode("utf-8")
        except (OSError, ValueError) as error:
            _refuse(f"cannot read standard input: {getattr(error, 'strerror', None) or error}")
            return None, {}
        try:
            inputs.append(stream.fileno())   # `run - < input.gas`: that file is the input too
        except (OSError, ValueError, AttributeError):
            pass
        if len(data) > MAX_INCLUDE_BYTES:
            raise InputError(f"standard input is longer than {MAX_INCLUDE_BYTES:,} bytes, the most an input may have")
        derivation = derive(decode_source(data, "<stdin>"), filename="<stdin>", base_dir=Path.cwd(), **options)
    else:
        path = DEMO if args.file == "demo" else Path(args.file)
        text = read_source(path, MAX_INCLUDE_BYTES)
        base = path.resolve().parent if path.is_file() else Path.cwd()  # a pipe (`<(...)`) has no folder
        derivation = derive(text, filename=str(path), base_dir=base, **options)
    from .products.files import protected_files
    protected = protected_files(derivation.system)
    for handle in inputs:
        identity = file_identity(handle)
        if identity is not None:
            protected.setdefault(identity, "the input file (standard input)")
    return derivation, protected


def _files_folder(args) -> Path:
    return Path(args.files_into if args.files_into is not None else ".")


def _check_outputs(args, system, protected):
    """Every file the run will write, checked before anything is computed; returns the `files.Batch`
    they will be written through."""
    from .products.files import Batch, claimed, resolve
    from .products.run import check_files
    seen: dict = {}
    if args.output not in (None, STANDARD_STREAM):
        claimed(seen, resolve(Path(args.output), args.overwrite, protected), args.output, None)
    if not args.no_files:
        check_files(system, _files_folder(args), args.overwrite, protected, seen)
    return Batch(protected)


def _formatted(derivation, fmt: str, document: bool) -> str:
    from .export import FORMATTERS, latex_document
    if fmt == "latex" and document:
        return latex_document(derivation)
    return FORMATTERS[fmt](derivation)


def _print_output(text: str) -> int:
    """Write the result on standard output. A reader that went away (a pipe into `head`) ends the
    run quietly; any other failure (a full disk, a closed descriptor) is an error."""
    stream = sys.stdout
    try:
        stream.write(text)
        stream.flush()
    except BrokenPipeError:
        _detach_stdout()
        return EXIT_BROKEN_PIPE
    except (OSError, ValueError) as error:
        _detach_stdout()
        return _refuse(f"cannot write to standard output: {getattr(error, 'strerror', None) or error}")
    return EXIT_OK


def _detach_stdout() -> None:
    """Point file descriptor 1 at /dev/null so that the interpreter's final flush of the text left in
    the buffer does not fail a second time (Python's documented remedy)."""
    try:
        devnull = os.open(os.devnull, os.O_WRONLY)
        os.dup2(devnull, sys.stdout.fileno())
        os.close(devnull)
    except (OSError, ValueError, AttributeError):   # not a real file (tests use StringIO)
        pass
