"""A one-line progress report for long derivations, shown only on a terminal.

    progress = Progress(total=8)
    progress.step("virial a[2,1]", order=3)   # deriving virial coefficients: order 3/8 (a[2,1])
    progress.done()

On a terminal the line is rewritten in place (carriage return, padded to erase the previous text,
cut to the terminal width so it never wraps); on anything else (a pipe, a file, a StringIO) nothing
is written unless `enabled=True` forces it. Writing never raises: a closed or broken stream only
turns the report off.
"""
from __future__ import annotations

import shutil
import sys
import time

KIND_WORDS = {
    "cluster": "cluster coefficients",
    "virial": "virial coefficients",
    "density": "density expansion",
    "fugacity": "fugacity expansion",
    "quadrature": "by quadrature",
}


class Progress:
    """Reports "deriving <kind>: order k/N (<label>)" on one updating terminal line.

    `enabled=None`: on exactly when `stream.isatty()` is true. `total`: the highest order (may
    also be given per step). `min_interval`: seconds between redraws within one order (a new order
    is always drawn).
    """

    def __init__(self, stream=None, enabled: bool | None = None, total: int | None = None,
                 min_interval: float = 0.1):
        self.stream = sys.stderr if stream is None else stream
        if enabled is None:
            enabled = _isatty(self.stream)
        self.enabled = bool(enabled)
        self.total = total
        self.min_interval = min_interval
        self._width = 0          # length of the line on screen
        self._order = None
        self._last = float("-inf")

    def message(self, what: str, order: int | None = None, total: int | None = None) -> str:
        """The text of one report (no control characters)."""
        kind, _, label = what.strip().partition(" ")
        head = "checking the claim" if kind == "check" else "deriving " + KIND_WORDS.get(kind, kind)
        total = total if total is not None else self.total
        text = head
        if order is not None:
            text += f": order {order}" + (f"/{total}" if total is not None else "")
        if label:
            text += f" ({label})" if order is not None else f": {label}"
        return text

    def step(self, what: str, order: int | None = None, total: int | None = None) -> None:
        """Report that `what` ("virial a[2,1]": kind, then the coefficient) is being derived at `order`."""
        if total is not None:
            self.total = total
        if not self.enabled:
            return
        now = time.monotonic()
        # within one order of a derivation many labels pass quickly: redraw at most every min_interval; a
        # stage without an order (a quadrature rule, a cluster) is long and always drawn, or the line
        # would keep showing the stage before while the next one runs
        if order is not None and order == self._order and now - self._last < self.min_interval:
            return
        self._order, self._last = order, now
        text = self.message(what, order)
        columns = _columns(self.stream)
        if len(text) > columns:
            text = text[:max(1, columns - 3)] + "..."
        self._write("\r" + text + " " * max(0, self._width - len(text)))
        self._width = len(text)

    def done(self) -> None:
        """Erase the line (the terminal is left as it was before the first step)."""
        if self.enabled and self._width:
            self._write("\r" + " " * self._width + "\r")
        self._width = 0
        self._order = None

    def __enter__(self) -> "Progress":
        return self

    def __exit__(self, *exc) -> None:
        self.done()

    def _write(self, text: str) -> None:
        try:
            self.stream.write(text)
            self.stream.flush()
        except (OSError, ValueError):  # closed or broken stream: stop reporting, never fail the run
            self.enabled = False


def _isatty(stream) -> bool:
    try:
        return bool(stream.isatty())
    except (AttributeError, OSError, ValueError):
        return False


def _columns(stream) -> int:
    """Usable width: the terminal's columns minus one (writing the last column may wrap)."""
    try:
        columns = shutil.get_terminal_size((80, 24)).columns
    except (OSError, ValueError):
        columns = 80
    return max(20, columns - 1)
