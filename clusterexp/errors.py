"""Errors and exit codes of clusterexp.

Input errors carry the place in the user's file (file, line, column) and render as the offending line
with a caret under the column. Internal bugs are ordinary Python exceptions and may show a traceback.
"""
from __future__ import annotations

from dataclasses import dataclass

EXIT_OK = 0
EXIT_CHECK_FAILED = 1
EXIT_INPUT_ERROR = 2        # also: a command line that cannot be carried out (unreadable input, unwritable output)
EXIT_INTERRUPTED = 130      # 128 + SIGINT, as shells report a program the signal ends
EXIT_BROKEN_PIPE = 141      # 128 + SIGPIPE: the reader of standard output went away
EXIT_TERMINATED = 143       # 128 + SIGTERM


def visible(text: str) -> str:
    """`text` safe to print on a terminal: a tab becomes a space and every other character that is not
    printable (control characters such as NUL or ESC, bidirectional and zero-width format characters,
    separators other than the space) a `?`, one character for one so that carets stay aligned;
    line feeds are kept."""
    if text.isprintable():
        return text
    return "".join(c if c.isprintable() or c == "\n" else " " if c == "\t" else "?" for c in text)


@dataclass(frozen=True)
class Span:
    """A place in a source file: 1-based line and column, plus the text of that line."""

    file: str
    line: int
    column: int
    end_line: int | None = None
    end_column: int | None = None
    line_text: str = ""

    def __str__(self) -> str:
        return f"{self.file}:{self.line}:{self.column}"


class ClusterexpError(Exception):
    """Base of every error clusterexp raises on purpose."""


class InputError(ClusterexpError):
    """Something wrong in the user's input; always points at a place when one is known.

    `render()` gives the message the CLI prints:

        file.gas:3:12: error: unknown species 'C'
            mutual A C = nu
                     ^
    """

    def __init__(self, message: str, span: Span | None = None, hint: str | None = None):
        super().__init__(message)
        self.message = message
        self.span = span
        self.hint = hint

    def render(self) -> str:
        where = f"{self.span}: " if self.span else ""
        lines = [f"{where}error: {self.message}"]
        if self.span and self.span.line_text:
            text = self.span.line_text.rstrip("\n").expandtabs(1)
            column = self.span.column
            if len(text) > 120:  # a window around the column of a very long line
                start = max(0, column - 60)
                text = ("..." if start else "") + text[start:start + 100] + ("..." if start + 100 < len(text) else "")
                column = column - start + (3 if start else 0)
            lines.append("    " + text)
            width = 1
            if self.span.end_line == self.span.line and self.span.end_column:
                width = max(1, self.span.end_column - self.span.column)
            lines.append("    " + " " * (column - 1) + "^" * min(width, max(1, len(text) - column + 1)))
        if self.hint:
            lines.append(f"hint: {self.hint}")
        return visible("\n".join(lines))

    def __str__(self) -> str:
        return self.render()


class NotSupportedYet(ClusterexpError):
    """A capability that is planned but not finished. Raised, never silently approximated."""

    def __init__(self, what: str, span: Span | None = None):
        super().__init__(f"not supported yet: {what}")
        self.what = what
        self.span = span

    def render(self) -> str:
        """As `InputError.render`: the place, the message, the line with a caret under the column."""
        return InputError(f"not supported yet: {self.what}", self.span).render()


class SeriesError(ClusterexpError):
    """An operation on truncated series that is mathematically undefined (e.g. log of a series
    without constant term) or would need a coefficient the kernel cannot invert exactly."""
