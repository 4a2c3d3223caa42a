"""Text -> lark tree, with lark's errors turned into `InputError`s that point at the user's text."""
from __future__ import annotations

import hashlib
import os
import re
import stat
import sys
import tempfile
import unicodedata
from functools import cache
from pathlib import Path

import lark
from lark.exceptions import UnexpectedCharacters, UnexpectedEOF, UnexpectedInput, UnexpectedToken

from ..errors import InputError, Span
from .hints import did_you_mean
from ..model import FORMATS, QUANTITIES
from .resources import grammar_text
from .state_hints import mixed_state_statement

MAX_LINE_LENGTH = 100_000    # characters; longer lines are refused before parsing (parse time grows with them)
MAX_INPUT_LENGTH = 2_000_000  # characters in one file
MAX_WHOLE_DIGITS = 30         # digits of a whole-number literal (orders, seeds, loop budgets, ...)
STATEMENTS = ("dimension, order, parameter, species, mutual, reference, clusters, virials, derive, output, include, "
              "claim, evaluate, tabulate, plot, typeset, sample, expand, tubes, statistics, size limit, equation of state")


OPTIONS = dict(parser="lalr", propagate_positions=True, maybe_placeholders=False)
CACHE_FORMAT = 1   # raise when what is cached changes in a way the grammar text does not show


@cache
def parser() -> lark.Lark:
    """The LALR parser. Building its tables takes about 0.2 s, a tenth of a typical run, so they are
    kept in a per-user cache file named by the hash of the grammar and the options (lark restores
    the options from the file); a damaged file is rebuilt and replaced."""
    text = grammar_text()
    where = _cache_file(text)
    if where is not None and _private(where):
        try:
            with open(where, "rb") as stream:
                return lark.Lark.load(stream)
        except Exception:  # noqa: BLE001 - a damaged cache is only a slower start: rebuilt below
            pass
    built = lark.Lark(text, **OPTIONS)
    if where is not None:
        _save(built, where)
    return built


def _cache_file(text: str) -> Path | None:
    """$XDG_CACHE_HOME/clusterexp (absolute paths only, as the XDG rules say) or ~/.cache/clusterexp,
    a folder of the current user's that nobody else may write to; else no cache.
    CLUSTEREXP_NO_CACHE=1 turns the cache off."""
    if os.environ.get("CLUSTEREXP_NO_CACHE", "").strip().lower() in ("1", "true", "yes", "on"):
        return None
    if not hasattr(os, "getuid"):
        return None
    base = os.environ.get("XDG_CACHE_HOME", "")
    if not os.path.isabs(base):
        base = os.path.join(os.path.expanduser("~"), ".cache")
    folder = Path(base) / "clusterexp"
    try:
        folder.mkdir(parents=True, exist_ok=True, mode=0o700)
    except OSError:
        return None
    if not _private(folder):
        return None
    key = "\n".join([text, repr(sorted(OPTIONS.items())), str(CACHE_FORMAT)])
    digest = hashlib.sha256(key.encode()).hexdigest()[:16]
    version = "%d.%d" % sys.version_info[:2]
    return folder / f"grammar-{digest}-lark{lark.__version__}-py{version}.pickle"


def _private(path: Path) -> bool:
    """Owned by the current user and writable by nobody else (the file is a pickle: loading it runs
    whatever its writer put there)."""
    try:
        info = path.stat()
    except OSError:
        return False
    return info.st_uid == os.getuid() and not info.st_mode & (stat.S_IWGRP | stat.S_IWOTH)


def _save(built: lark.Lark, where: Path) -> None:
    """Write through a private temporary file in the same folder, then rename (atomic: a concurrent
    run reads the old file or the new one); nothing is left behind on failure."""
    partial = None
    try:
        handle, partial = tempfile.mkstemp(dir=where.parent, prefix=".grammar-", suffix=".part")
        with os.fdopen(handle, "wb") as stream:
            built.save(stream)
        os.replace(partial, where)
        partial = None
    except OSError:
        pass
    finally:
        if partial is not None:
            try:
                os.unlink(partial)
            except OSError:
                pass


def source_lines(text: str) -> list[str]:
    """The lines as the parser counts them: split at line feeds only (`str.splitlines` also splits at
    form feeds, U+001C-U+001E, U+0085, U+2028 and U+2029, which would shift every later line against
    the parser's line numbers), without the carriage return of a CRLF ending."""
    lines = text.split("\n")
    if lines and lines[-1] == "":
        lines.pop()
    return [line[:-1] if line.endswith("\r") else line for line in lines]


def span_at(text: str, filename: str, line: int, column: int, end_column: int | None = None) -> Span:
    lines = source_lines(text)
    line_text = lines[line - 1] if 0 < line <= len(lines) else ""
    return Span(filename, line, column, line, end_column, line_text)


def decode_source(data: bytes, filename: str) -> str:
    """The text of an input file (UTF-8, an initial byte order mark dropped). Bytes that are not
    UTF-8 are refused at their line and column, with the line shown and a caret under them."""
    if data.startswith(b"\xef\xbb\xbf"):
        data = data[3:]
    try:
        return data.decode("utf-8")
    except UnicodeDecodeError as error:
        start = error.start
        line = data.count(b"\n", 0, start) + 1
        line_start = data.rfind(b"\n", 0, start) + 1
        line_end = data.find(b"\n", start)
        line_bytes = data[line_start:line_end if line_end >= 0 else len(data)].rstrip(b"\r")
        column = len(data[line_start:start].decode("utf-8", errors="replace")) + 1
        text = line_bytes.decode("utf-8", errors="replace")
        bad = data[start:error.end]
        raise InputError(f"the input is not UTF-8 text: byte{'s' if len(bad) > 1 else ''} "
                         f"{' '.join(f'0x{b:02X}' for b in bad)} ({error.reason}); save the file as UTF-8",
                         Span(filename, line, column, line, column + 1, text)) from None


def read_source(path: Path, limit: int, what: str = "input file") -> str:
    """Read and decode an input file: a regular file, or a pipe or device (`<(...)`, /dev/stdin);
    at most `limit` bytes. Every failure is an `InputError` that says what the path is."""
    shown = str(path)
    try:
        if path.is_dir():
            raise InputError(f"{shown} is a folder, not an {what}")
        with open(path, "rb") as stream:
            data = stream.read(limit + 1)
    except FileNotFoundError:
        raise InputError(f"no such {what}: {shown}") from None
    except (OSError, ValueError) as error:   # ValueError: a NUL in the name
        reason = getattr(error, "strerror", None) or "not a file name"
        raise InputError(f"cannot read {shown}: {reason}") from None
    if len(data) > limit:
        raise InputError(f"{shown} is longer than {limit:,} bytes, the most an input file may have")
    return decode_source(data, shown)


def parse(text: str, filename: str = "<input>") -> lark.Tree:
    """Parse one file's text; syntax errors become InputError with a caret."""
    _check_length(text, filename)
    try:
        tree = parser().parse(text)
    except UnexpectedInput as error:
        raise _friendly(error, text, filename) from None
    _check_whole_numbers(tree, text, filename)
    return tree


def _check_whole_numbers(tree: lark.Tree, text: str, filename: str) -> None:
    """Whole numbers (orders, counts, seeds, loop budgets, limits, digits) have at most
    MAX_WHOLE_DIGITS digits: anything longer is beyond every limit, and its conversion would be slow
    (and refused by Python above 4300 digits)."""
    stack = [tree]   # iterative: expressions may nest deeply (they are refused later, at their place)
    while stack:
        token = stack.pop()
        if isinstance(token, lark.Tree):
            stack.extend(token.children)
            continue
        if not (isinstance(token, lark.Token) and token.type == "INT"):
            continue
        digits = len(token.lstrip("0"))
        if digits > MAX_WHOLE_DIGITS:
            raise InputError(f"a whole number with {digits:,} digits (at most {MAX_WHOLE_DIGITS})",
                             span_at(text, filename, token.line, token.column, token.column + len(token)))


def _check_length(text: str, filename: str) -> None:
    if len(text) <= MAX_LINE_LENGTH and "\n" not in text:
        return
    for number, line in enumerate(source_lines(text), start=1):
        if len(line) > MAX_LINE_LENGTH:
            raise InputError(f"line {number} is {len(line):,} characters long (at most {MAX_LINE_LENGTH:,})",
                             span_at(text, filename, number, MAX_LINE_LENGTH + 1))
    if len(text) > MAX_INPUT_LENGTH:
        raise InputError(f"the input is {len(text):,} characters long (at most {MAX_INPUT_LENGTH:,})",
                         span_at(text, filename, 1, 1))


def _describe_character(char: str) -> str:
    """A character as the user can recognise it even when it is invisible or a look-alike."""
    if char.isascii() and char.isprintable():
        return repr(char)
    name = unicodedata.name(char, "") or ("control character" if unicodedata.category(char) == "Cc"
                                           else "unnamed character")
    shown = repr(char) if char.isprintable() and not char.isspace() else "(invisible)"
    return f"{shown} U+{ord(char):04X} {name}; only ASCII letters, digits and symbols are read"


def _friendly(error: UnexpectedInput, text: str, filename: str) -> InputError:
    if isinstance(error, UnexpectedEOF) or (isinstance(error, UnexpectedToken) and error.token.type == "$END"):
        lines = source_lines(text) or [""]
        line = len(lines)
        return InputError("the input ends in the middle of a statement",
                          span_at(text, filename, line, len(lines[-1]) + 1))
    line, column = error.line, error.column
    if isinstance(error, UnexpectedCharacters):
        char = text[error.pos_in_stream] if error.pos_in_stream < len(text) else "?"
        if char == '"':
            return _bad_string(text, error.pos_in_stream, filename, line, column)
        return InputError(f"unexpected character {_describe_character(char)}", span_at(text, filename, line, column))
    token = error.token
    expected = set(getattr(error, "expected", ()) or ())
    word = str(token)
    if expected >= {"MASS", "EXCHANGE", "BOSE"}:   # right after `species X ...`
        message = (f"unexpected {word!r}: expected a species property (mass, exchange, bose, fermi, boltzmann) "
                   f"or a statement ({STATEMENTS})")
    elif expected & {"DIMENSION", "SPECIES", "DERIVE"} or "$END" in expected:
        message = f"unexpected {word!r}: expected a statement ({STATEMENTS})"
    elif token.type == "NAME" and word in ("given",):
        message = f"unexpected {word!r}"
    elif mixed_state_statement(token, expected, _previous_word(text, token)):
        message = mixed_state_statement(token, expected, _previous_word(text, token))
    else:
        message = f"unexpected {word!r}" + _expected_words(expected)
    after = getattr(token, "end_pos", None)
    if after is not None and after < len(text) and not text[after].isascii():
        message += f" (it is followed by {_describe_character(text[after])})"
    return InputError(message, span_at(text, filename, line, column, column + max(1, len(word))),
                      did_you_mean(word, _keywords(expected) + list(_CHOICES_AFTER.get(_previous_word(text, token), ()))))


# words a NAME stands for after these keywords (checked again when the statement is built)
_CHOICES_AFTER = {"derive": QUANTITIES, "format": FORMATS}


def _keywords(expected: set[str]) -> list[str]:
    """The literal keywords among the terminals lark expected (e.g. BOSE -> 'bose')."""
    out = []
    for name in expected:
        try:
            pattern = parser().get_terminal(name).pattern
        except KeyError:
            continue
        if pattern.type == "str" and pattern.value.isalpha():
            out.append(pattern.value)
    return out


def _previous_word(text: str, token) -> str:
    start = getattr(token, "start_pos", None)
    words = re.findall(r"[A-Za-z_]+", text[:start]) if start is not None else []
    return words[-1] if words else ""


_CONTROL_NAMES = {"\t": "a tab", "\r": "a carriage return", "\x0b": "a vertical tab", "\x0c": "a form feed",
                  "\x00": "a NUL byte", "\x7f": "a delete character (U+007F)"}


def _bad_string(text: str, position: int, filename: str, line: int, column: int) -> InputError:
    """A quote the lexer could not read as a string: a control character inside (a tab, say), or no
    closing quote on the line. The caret runs from the opening quote to the culprit."""
    rest = text[position + 1:]
    newline = rest.find("\n")
    inner = rest if newline < 0 else rest[:newline]
    closing = inner.find('"')
    if closing >= 0:
        inner = inner[:closing]
    bad = next((i for i, c in enumerate(inner) if ord(c) < 0x20 or c == "\x7f"), None)
    if bad is not None:
        char = inner[bad]
        what = _CONTROL_NAMES.get(char, f"the control character U+{ord(char):04X}")
        return InputError(f"a quoted name cannot contain {what}; write it without",
                          span_at(text, filename, line, column, column + bad + 2))
    return InputError('this quoted name is not closed on its line (a closing " is missing)',
                      span_at(text, filename, line, column, column + 1 + len(inner)))


_WORDS = {"NUMBER": "a number", "INT": "a whole number", "NAME": "a name", "LPAR": "'('", "RPAR": "')'",
          "EQUAL": "'='", "LSQB": "'['", "RSQB": "']'", "COMMA": "','", "LBRACE": "'{'", "RBRACE": "'}'",
          "STRING": "a quoted file name", "SWITCH": "on or off", "UP": "'up to'", "TO": "'to'",
          "GIVEN": "'given'", "IN": "'in'", "ASSUME": "an assumption"}


def _expected_words(expected: set[str]) -> str:
    words = sorted({_WORDS.get(e, e.lower().strip("_")) for e in expected if not e.startswith("__")})
    if not words or len(words) > 8:
        return ""
    return "; expected " + " or ".join(words)
