"""Text -> lark tree, with lark's errors turned into `InputError`s that point at the user's text."""
from __future__ import annotations

from functools import cache

import lark
from lark.exceptions import UnexpectedCharacters, UnexpectedEOF, UnexpectedInput, UnexpectedToken

from .errors import InputError, Span
from .resources import grammar_text

STATEMENTS = "dimension, order, parameter, species, mutual, reference, clusters, virials, derive, output, include"


@cache
def parser() -> lark.Lark:
    return lark.Lark(grammar_text(), parser="lalr", propagate_positions=True, maybe_placeholders=False)


def span_at(text: str, filename: str, line: int, column: int, end_column: int | None = None) -> Span:
    lines = text.splitlines()
    line_text = lines[line - 1] if 0 < line <= len(lines) else ""
    return Span(filename, line, column, line, end_column, line_text)


def parse(text: str, filename: str = "<input>") -> lark.Tree:
    """Parse one file's text; syntax errors become InputError with a caret."""
    try:
        return parser().parse(text)
    except UnexpectedInput as error:
        raise _friendly(error, text, filename) from None


def _friendly(error: UnexpectedInput, text: str, filename: str) -> InputError:
    if isinstance(error, UnexpectedEOF) or (isinstance(error, UnexpectedToken) and error.token.type == "$END"):
        lines = text.splitlines() or [""]
        line = len(lines)
        return InputError("the input ends in the middle of a statement",
                          span_at(text, filename, line, len(lines[-1]) + 1))
    line, column = error.line, error.column
    if isinstance(error, UnexpectedCharacters):
        char = text[error.pos_in_stream] if error.pos_in_stream < len(text) else "?"
        return InputError(f"unexpected character {char!r}", span_at(text, filename, line, column))
    token = error.token
    expected = set(getattr(error, "expected", ()) or ())
    word = str(token)
    if expected & {"DIMENSION", "SPECIES", "DERIVE"} or "$END" in expected:
        message = f"unexpected {word!r}: expected a statement ({STATEMENTS})"
    elif token.type == "NAME" and word in ("given",):
        message = f"unexpected {word!r}"
    else:
        message = f"unexpected {word!r}" + _expected_words(expected)
    return InputError(message, span_at(text, filename, line, column, column + max(1, len(word))))


_WORDS = {"NUMBER": "a number", "INT": "a whole number", "NAME": "a name", "LPAR": "'('", "RPAR": "')'",
          "EQUAL": "'='", "LSQB": "'['", "RSQB": "']'", "COMMA": "','", "LBRACE": "'{'", "RBRACE": "'}'",
          "STRING": "a quoted file name", "SWITCH": "on or off", "UP": "'up to'", "TO": "'to'",
          "GIVEN": "'given'", "IN": "'in'", "ASSUME": "an assumption"}


def _expected_words(expected: set[str]) -> str:
    words = sorted({_WORDS.get(e, e.lower().strip("_")) for e in expected if not e.startswith("__")})
    if not words or len(words) > 8:
        return ""
    return "; expected " + " or ".join(words)
