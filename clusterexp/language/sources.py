"""Input files as the builder sees them: the text of each file with its lines for spans (`SourceFile`),
and the statements of a file with its includes resolved in order (`collect`), with the limits on
included files (regular files, size, no cycles, UTF-8 checked at its place)."""
from __future__ import annotations

from pathlib import Path

import lark

from ..errors import InputError, Span
from .parse import decode_source, parse, source_lines

MAX_INCLUDE_BYTES = 4_000_000


class SourceFile:
    """One source file: its name and text, for spans."""

    def __init__(self, name: str, text: str):
        self.name, self.lines = name, source_lines(text)

    def span(self, item) -> Span:
        if isinstance(item, lark.Token):
            line, column = item.line or 1, item.column or 1
            end = item.end_column if item.end_line == item.line else None
        else:
            meta = item.meta
            if getattr(meta, "empty", True):
                return Span(self.name, 1, 1, line_text=self.lines[0] if self.lines else "")
            line, column = meta.line, meta.column
            end = meta.end_column if meta.end_line == meta.line else None
        text = self.lines[line - 1] if 0 < line <= len(self.lines) else ""
        return Span(self.name, line, column, line, end, text)


def collect(text: str, filename: str, base_dir: Path, stack: list[str]) -> list[tuple[lark.Tree, SourceFile]]:
    source = SourceFile(filename, text)
    out = []
    for statement in parse(text, filename).children:
        if statement.data == "include":
            token = statement.children[0]
            name = str(token)[1:-1]
            try:
                target = (base_dir / name).resolve()
                regular = target.is_file()  # not a folder, device or FIFO
                size = target.stat().st_size if regular else 0
            except (OSError, ValueError):   # ValueError: a NUL in the name
                raise InputError(f"cannot read included file {name!r}", source.span(token)) from None
            if not regular:
                raise InputError(f"cannot read included file {name}: not a regular file", source.span(token))
            if size > MAX_INCLUDE_BYTES:
                raise InputError(f"included file {name} is {size:,} bytes (at most {MAX_INCLUDE_BYTES:,})",
                                 source.span(token))
            if str(target) in stack:
                raise InputError(f"include cycle: {target.name} includes itself", source.span(token))
            try:
                included = decode_source(target.read_bytes(), str(target))  # not UTF-8: refused at its place
            except OSError:
                raise InputError(f"cannot read included file {str(token)[1:-1]}", source.span(token)) from None
            out += collect(included, str(target), target.parent, stack + [str(target)])
        else:
            out.append((statement, source))
    return out
