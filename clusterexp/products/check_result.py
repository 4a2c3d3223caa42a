"""The outcome of a check of a hand result (`checks.check_claim`, `checks.check_decimal_claim`): its
status, how it was decided, and its text and LaTeX display.

Statuses: "proven", "numerically consistent, not proven", "rounding tie, undecided" (a decimal claim
exactly halfway between two roundings; not a failure), "undecided" (the claim holds exactly when unknown
many-body pieces satisfy stated equations; not a failure) and "mismatch" (the only failed check).
"""
from __future__ import annotations

from dataclasses import dataclass, field

import sympy

PROVEN = "proven"
CONSISTENT = "numerically consistent, not proven"
MISMATCH = "mismatch"
# a decimal claim with the derived value exactly halfway between two roundings (1/8 against 0.12 or 0.13):
# both roundings are in use (half up, half to even), so the written digits neither confirm nor refute
TIE = "rounding tie, undecided"
# a claim whose difference from the derived value involves named many-body pieces (unknown functions):
# it holds exactly when the pieces satisfy the stated equations; not a failure
UNDECIDED = "undecided"
# a claim on a coefficient with Monte Carlo parts, within the stated number of standard errors at every
# sampled point (products/sampled_use.py): statistics, never a proof; not a failure
SAMPLED = "consistent within the sampling errors, not proven"
STATUSES = (PROVEN, CONSISTENT, TIE, UNDECIDED, MISMATCH, SAMPLED)



@dataclass(frozen=True, repr=False)
class CheckResult:
    """The outcome of one check. `difference` is claimed - derived (simplified; 0 when proven,
    None when not known); `leading_term` its leading term about `expansion_point`; `witness` a
    point where the sides differ, with `claimed_value` and `derived_value` there. `latex_name` (the
    coefficient's LaTeX) and `latex_symbols` ((symbol, LaTeX) pairs: generated names and `typeset`
    choices) serve the notebook display; a check made outside a derivation has neither.

    A status of `TIE` (a decimal claim exactly on a rounding boundary) is not a failed check (`ok`):
    the claim is one of the two correct roundings, but the written digits cannot say which."""

    status: str
    claimed: sympy.Expr
    derived: sympy.Expr
    method: str
    label: str | None = None
    difference: sympy.Expr | None = None
    leading_term: sympy.Expr | None = None
    expansion_point: tuple[tuple[str, sympy.Expr], ...] = ()
    witness: tuple[tuple[str, sympy.Expr], ...] = ()
    claimed_value: str | None = None
    derived_value: str | None = None
    points: int = 0
    skipped: int = 0
    digits: int = 0
    intervals: tuple[tuple[str, str], ...] = ()
    truncation: tuple[int, tuple[str, ...]] | None = None
    notes: tuple[str, ...] = field(default=())
    rounding: str | None = None
    latex_name: str | None = None
    latex_symbols: tuple = ()
    conditions: tuple = ()  # UNDECIDED: the equations on named pieces under which the claim holds

    @property
    def condition(self):
        """The conditions as one expression (a tuple of equations), or None."""
        return sympy.Tuple(*self.conditions) if self.conditions else None

    @property
    def ok(self) -> bool:
        return self.status != MISMATCH

    def _subject(self) -> str:
        what = self.label or "the claim"
        if self.truncation:
            order, names = self.truncation
            what += f" through total order {order} in {', '.join(names)}"
        return what

    def render(self) -> str:
        """A short human-readable report (a few lines)."""
        where = "; ".join(f"{n} in {i}" for n, i in self.intervals)
        if self.status == PROVEN:
            lines = [f"proven: {self._subject()} equals the derived value ({self.method})"]
        elif self.status == TIE:
            lines = [f"rounding tie, neither consistent nor refuted: {self._subject()}: {self.method}"]
        elif self.status == UNDECIDED and not self.conditions:
            lines = [f"undecided: {self._subject()}: {self.method}"]
            if self.difference is not None:
                lines.append(f"  claimed - derived = {_text(self.difference)}")
        elif self.status == UNDECIDED:
            lines = [f"undecided: {self._subject()} holds if and only if the named many-body pieces satisfy "
                     f"({self.method}):"] + [f"  {_text(e.lhs)} = {_text(e.rhs)}" for e in self.conditions]
        elif self.status == SAMPLED:
            lines = [f"{self.status}: {self._subject()}: {self.method}"]
        elif self.status == CONSISTENT and self.rounding:
            lines = [f"numerically consistent, not proven: {self._subject()}: {self.method}"]
        elif self.status == CONSISTENT and not self.intervals:
            lines = [f"numerically consistent, not proven: {self._subject()} and the derived value agree to "
                     f"{self.digits} significant digits; {self.method}"]
        elif self.status == CONSISTENT:
            lines = [f"numerically consistent, not proven: {self._subject()} agrees with the derived value at "
                     f"{self.points} rational point{'s' if self.points != 1 else ''}"
                     + (f" ({where})" if where else "") + f" to {self.digits} significant digits; "
                     + self.method]
        else:
            lines = [f"mismatch: {self._subject()} differs from the derived value ({self.method})"]
            if self.difference is not None:
                lines.append(f"  claimed - derived = {_text(self.difference)}")
            if self.leading_term is not None:
                about = ", ".join(f"{n} = {v}" for n, v in self.expansion_point)
                lines.append(f"  leading term" + (f" about {about}" if about else "") + f": {_text(self.leading_term)}")
            if self.witness:
                at = ", ".join(f"{n} = {v}" for n, v in self.witness)
                lines.append(f"  at {at}: claimed = {self.claimed_value}, derived = {self.derived_value}")
            elif self.claimed_value is not None:
                lines.append(f"  claimed = {self.claimed_value}, derived = {self.derived_value}")
        if self.skipped:
            lines.append(f"  ({self.skipped} singular point{'s' if self.skipped != 1 else ''} skipped)")
        lines += [f"  note: {n}" for n in self.notes]
        return "\n".join(lines)

    def __str__(self) -> str:
        return self.render()

    def __repr__(self) -> str:
        return f"<CheckResult {self.render().splitlines()[0]}>"

    def latex(self) -> str:
        """One line of LaTeX: the status, the coefficient's name and the claimed value (claimed and
        derived for a mismatch), in the names the derivation typesets."""
        names = dict(self.latex_symbols)

        def tex(expr) -> str:
            return sympy.latex(expr, symbol_names=names)
        head = r"\text{" + self.status + r"}:\;"
        name = self.latex_name or r"\text{" + (self.label or "claim").replace("_", r"\_") + "}"
        claimed = self.rounding if self.rounding else tex(self.claimed)
        if self.status == MISMATCH:
            body = rf"{name}:\ {claimed}\neq {tex(self.derived)}"
            if self.difference is not None:
                body += r",\quad \Delta = " + tex(self.difference)
        elif self.status == TIE:
            body = rf"{name} = {tex(self.derived)}:\ \text{{the claimed }}{claimed}\text{{ is a rounding tie}}"
        elif self.status == UNDECIDED:
            body = rf"{name} = {claimed}\ \text{{if and only if }}" + r",\ ".join(
                f"{tex(e.lhs)} = {tex(e.rhs)}" for e in self.conditions)
        else:
            relation = r"\approx" if self.status in (CONSISTENT, SAMPLED) else "="
            body = rf"{name} = {claimed}" if (self.rounding is None and self.status != SAMPLED) or \
                self.status == PROVEN else \
                rf"{name} {relation} {claimed}"
        return f"{head} {body}"

    def _repr_latex_(self) -> str:
        return f"$${self.latex()}$$"


class CheckList(list):
    """The checks of a derivation (a list of `CheckResult`), readable as text and in a notebook."""

    def __repr__(self) -> str:
        return "\n".join(c.render() for c in self) if self else "[]"

    def _repr_latex_(self) -> str:
        return r"$$\begin{gathered}" + r" \\ ".join(c.latex() for c in self) + r"\end{gathered}$$"


def _text(expr) -> str:
    return sympy.sstr(expr, order="lex")


