"""Close-match hints for misspelled words in an input ("did you mean 'pairphase'?").

>>> did_you_mean("pairphse", ["generic", "ideal", "pairphase"])
"did you mean 'pairphase'?"
"""
from __future__ import annotations

import difflib
from typing import Iterable


def did_you_mean(word: str, candidates: Iterable[str]) -> str | None:
    """A hint naming the closest candidate (difflib's ratio at least 0.6, case ignored), else None."""
    choices = sorted({str(c) for c in candidates if c and str(c) != word})
    lowered = {c.lower(): c for c in choices}
    matches = difflib.get_close_matches(word.lower(), list(lowered), n=1, cutoff=0.6)
    return f"did you mean '{lowered[matches[0]]}'?" if matches else None
