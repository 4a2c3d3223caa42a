"""The command line: argument parsing, calling the public API, exit codes. Nothing else."""
from __future__ import annotations

import argparse
import sys
from pathlib import Path

from .check_result import TIE, UNDECIDED
from .errors import EXIT_CHECK_FAILED, EXIT_INPUT_ERROR, EXIT_OK, InputError, NotSupportedYet

DEMO = Path(__file__).resolve().parent / "demo.gas"


def _parser() -> argparse.ArgumentParser:
    parser = argparse.ArgumentParser(
        prog="clusterexp",
        description="Exact cluster and virial expansions of gases with statistical pair phases.")
    commands = parser.add_subparsers(dest="command", required=True)
    run = commands.add_parser("run", help="derive what an input file (.gas) asks for")
    source = run.add_mutually_exclusive_group(required=True)
    source.add_argument("file", nargs="?", help="input file; `demo` runs the bundled demo")
    source.add_argument("-e", "--expression", dest="text", metavar="TEXT",
                        help="the input given on the command line instead of a file")
    run.add_argument("--format", choices=("text", "latex", "json"), default=None,
                     help="output format (default: the file's `output format`, else text)")
    run.add_argument("--document", action="store_true",
                     help="with --format latex: a standalone document instead of a snippet")
    run.add_argument("-o", "--output", metavar="PATH", help="write to PATH instead of standard output")
    run.add_argument("--overwrite", action="store_true",
                     help="allow -o and the input's tables and figures to replace existing files")
    run.add_argument("--size-limit", type=int, metavar="TERMS", default=None,
                     help="refuse derivations estimated above TERMS terms (default 200000; "
                          "the input may also say `size limit N`)")
    run.add_argument("--files-into", metavar="FOLDER", default=".",
                     help="folder for the tables and figures the input asks for (default: the current one)")
    run.add_argument("--no-files", action="store_true", help="do not write the input's tables and figures")
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


def main(argv: list[str] | None = None) -> int:
    args = _parser().parse_args(_text_arguments(sys.argv[1:] if argv is None else list(argv)))
    sys.set_int_max_str_digits(0)  # printing exact results; input literals are bounded in expressions.py
    from . import derive, derive_file
    from .export import FORMATTERS, latex_document
    from .progress import Progress
    progress = Progress()  # on stderr, and only when it is a terminal
    try:
        if args.text is not None:
            derivation = derive(args.text, filename="<command line>", base_dir=Path.cwd(),
                                size_limit=args.size_limit, progress=progress)
        else:
            path = DEMO if args.file == "demo" else Path(args.file)
            if not path.is_file():
                print(f"clusterexp: error: no such input file: {path}", file=sys.stderr)
                return EXIT_INPUT_ERROR
            derivation = derive_file(path, size_limit=args.size_limit, progress=progress)
        for message, span in derivation.system.warnings:
            print(f"{span}: warning: {message}" if span else f"warning: {message}", file=sys.stderr)
        folder = Path(args.files_into)
        if not args.no_files:
            if not folder.is_dir():
                print(f"clusterexp: error: no such folder: {folder}", file=sys.stderr)
                return EXIT_INPUT_ERROR
            from .products import check_files
            check_files(derivation.system, folder, args.overwrite)  # before any long computation
        derivation.compute_all(progress)
        if not args.no_files:
            derivation.write_files(folder, args.overwrite)
        fmt = args.format or derivation.system.output.format
        if fmt == "latex" and args.document:
            text = latex_document(derivation)
        else:
            text = FORMATTERS[fmt](derivation)
    except (InputError, NotSupportedYet) as error:
        progress.done()
        print(error.render(), file=sys.stderr)
        return EXIT_INPUT_ERROR
    if args.output:
        status = _write(Path(args.output), text, args.overwrite)
        if status != EXIT_OK:
            return status
    else:
        sys.stdout.write(text)
    failed = [(claim, result) for claim, result in zip(derivation.system.claims, derivation.checks) if not result.ok]
    for claim, result in failed:
        print(f"{claim.span}: check failed: {result.label} differs from the derived value", file=sys.stderr)
    for claim, result in zip(derivation.system.claims, derivation.checks):
        if result.status == TIE:   # not a failure (exit 0), but never silent
            print(f"{claim.span}: check undecided: {result.label} is a rounding tie; write one more digit",
                  file=sys.stderr)
        elif result.status == UNDECIDED:
            print(f"{claim.span}: check undecided: {result.label} holds only if unknown many-body pieces take "
                  "the stated values", file=sys.stderr)
    return EXIT_CHECK_FAILED if failed else EXIT_OK


def _write(path: Path, text: str, overwrite: bool) -> int:
    """Write atomically (temporary file, then rename); never replace a file unless asked."""
    import os
    import tempfile
    if path.exists() and not overwrite:
        print(f"clusterexp: error: {path} exists; pass --overwrite to replace it", file=sys.stderr)
        return EXIT_INPUT_ERROR
    if path.is_dir():
        print(f"clusterexp: error: {path} is a folder; give a file name", file=sys.stderr)
        return EXIT_INPUT_ERROR
    try:
        handle, temporary = tempfile.mkstemp(dir=path.parent or ".", prefix=f".{path.name}.", suffix=".part")
    except OSError as error:
        print(f"clusterexp: error: cannot write {path}: {error.strerror}", file=sys.stderr)
        return EXIT_INPUT_ERROR
    try:
        with os.fdopen(handle, "w", encoding="utf-8") as stream:
            stream.write(text)
        if overwrite:
            os.replace(temporary, path)
        else:
            try:
                os.link(temporary, path)  # fails if the file appeared meanwhile
            except FileExistsError:
                Path(temporary).unlink(missing_ok=True)
                print(f"clusterexp: error: {path} exists; pass --overwrite to replace it", file=sys.stderr)
                return EXIT_INPUT_ERROR
            except OSError:  # no hard links on this file system
                os.replace(temporary, path)
            Path(temporary).unlink(missing_ok=True)
    except BaseException:
        Path(temporary).unlink(missing_ok=True)
        raise
    return EXIT_OK
