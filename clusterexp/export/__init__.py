"""Printers: text, LaTeX and JSON. No computation happens here; output order is deterministic."""
from .json_export import to_json
from .latex import latex_document, latex_snippet
from .text import to_text

FORMATTERS = {"text": to_text, "latex": latex_snippet, "json": to_json}

__all__ = ["FORMATTERS", "latex_document", "latex_snippet", "to_json", "to_text"]
