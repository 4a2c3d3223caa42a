"""Locating the grammar shipped with the package.

In a wheel the repository's `grammar/` folder is installed as `clusterexp/grammar/`; in a source
checkout (editable install or plain PYTHONPATH) it is found beside the package.
"""
from __future__ import annotations

from functools import cache
from importlib import resources
from pathlib import Path

GRAMMAR_FILE = "clusterexp.lark"


@cache
def grammar_text() -> str:
    """The text of the input-language grammar."""
    packaged = resources.files("clusterexp").joinpath("grammar", GRAMMAR_FILE)
    if packaged.is_file():
        return packaged.read_text(encoding="utf-8")
    checkout = Path(__file__).resolve().parent.parent.parent / "grammar" / GRAMMAR_FILE
    if checkout.is_file():
        return checkout.read_text(encoding="utf-8")
    raise RuntimeError(f"grammar file {GRAMMAR_FILE} is missing from this installation of clusterexp")


def grammar_origin() -> str:
    """Where the grammar was found: "package" (installed wheel) or "checkout"."""
    packaged = resources.files("clusterexp").joinpath("grammar", GRAMMAR_FILE)
    return "package" if packaged.is_file() else "checkout"
