"""Printers: text, LaTeX and JSON. No computation happens here; output order is deterministic."""
import functools
import sys

from .json_export import to_json
from .document import latex_document
from .latex import latex_snippet
from .text import to_text


def _unlimited_digits(printer):
    """Exact results may have integers beyond Python's 4300-digit text conversion limit (a guard
    against parsing untrusted digits, which the expression builder bounds itself): lift it while
    printing."""
    @functools.wraps(printer)
    def wrapped(*args, **kwargs):
        old = sys.get_int_max_str_digits()
        sys.set_int_max_str_digits(0)
        try:
            return printer(*args, **kwargs)
        finally:
            sys.set_int_max_str_digits(old)
    return wrapped


to_json, to_text, latex_snippet, latex_document = map(_unlimited_digits, (to_json, to_text, latex_snippet,
                                                                          latex_document))
FORMATTERS = {"text": to_text, "latex": latex_snippet, "json": to_json}

__all__ = ["FORMATTERS", "latex_document", "latex_snippet", "to_json", "to_text"]
