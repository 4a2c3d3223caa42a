"""The records of sampled numbers (`sample` statements): what `clusterexp.loops.sampled` and
`clusterexp.loops.tube_sampling` compute and the printers (`loops/report.py`) and the statements that
use results (`products/sampled_use.py`) read.  Plain frozen dataclasses, no computation."""
from __future__ import annotations

import re
from dataclasses import dataclass

import sympy

from ..model import Sampling
from ..naming import bracket_label


@dataclass(frozen=True)
class SampledRun:
    """One estimator run: the b it estimates, its budget as used, and where to reproduce it."""

    index: tuple[int, ...]
    label: str            # "b[2,1]"
    kind: str             # estimator kind: "identical" or "pair_plus_one"
    seed: int             # the statement's seed
    run_seed: int         # the estimator seed derived from (seed, index)
    samples: int
    rounds: int
    seconds: float
    slices: int


@dataclass(frozen=True)
class SampledValue:
    label: str            # "a[3]"
    kind: str
    index: tuple[int, ...]
    value: float
    error: float
    remainder: str = ""   # the terms the number leaves out ("O(n^3)": tube coverage), printed after it
    slice_bound: float | None = None   # the bound on the loops' slice discretisation error (None: not assessed)


@dataclass(frozen=True)
class SampledPoint:
    point: tuple[tuple[str, sympy.Expr], ...]     # parameter name -> exact value
    values: tuple[SampledValue, ...]


@dataclass(frozen=True)
class SampledCluster:
    """The estimate of one sampled b at one point of a statement (reference species' units)."""

    index: tuple[int, ...]
    point: tuple[tuple[sympy.Symbol, sympy.Expr], ...]    # every parameter of the statement's point
    value: float
    error: float
    piece: sympy.Symbol | None = None   # a named tube piece (T_two_tubes, ...) in place of the b of `index`
    slice_bound: float | None = None    # ThirdOrderResult.slice_bound in these units; None: not assessed (tubes)


@dataclass(frozen=True)
class SampledStatement:
    sampling: Sampling
    runs: tuple[SampledRun, ...]
    points: tuple[SampledPoint, ...]
    clusters: tuple[SampledCluster, ...] = ()    # what claims, values, tables and figures reuse
    notes: tuple[tuple[str, str], ...] = ()      # coefficient label -> what its numbers leave out (tube coverage)

    @property
    def labels(self) -> list[str]:
        return _labels(self.sampling)

    @property
    def columns(self) -> list[SampledValue]:
        """The coefficients' numbers a point may hold, once each, in the order of the statement and (among
        tubes, with a free coverage) of the powers of the coverage; the tube pieces are not among them.  A
        term absent at a point is exactly 0 there (`cell`)."""
        order = {name: k for k, name in enumerate(self.labels)}
        found = {}
        for point in self.points:
            for v in point.values:
                if v.kind != "piece":
                    found.setdefault(v.label, v)
        return sorted(found.values(), key=lambda v: (order.get(label(v.kind, v.index), len(order)),
                                                     (coverage_term(v.label) or ("", -1))[1]))

    def cell(self, k: int, column: str) -> tuple[float, float]:
        """(value, error) of one column at point k; (0.0, 0.0) where the term is exactly 0 there."""
        return next(((v.value, v.error) for v in self.points[k].values if v.label == column), (0.0, 0.0))

    def note(self, column: SampledValue) -> str | None:
        return dict(self.notes).get(label(column.kind, column.index))

    @property
    def parameter_names(self) -> list[str]:
        return [name for name, _ in self.points[0].point] if self.points else []


@dataclass(frozen=True)
class SampledNumbers:
    """The numbers of every `sample` statement of a derivation, in statement order."""

    statements: tuple[SampledStatement, ...]

    def __iter__(self):
        return iter(self.statements)


def label(kind: str, index) -> str:
    return f"{'b' if kind == 'cluster' else 'a'}{bracket_label(index)}"


def coverage_term(column: str) -> tuple[str, int] | None:
    """(coverage, power) of a term's label ("a[2] [n^1]" -> ("n", 1)); None for a whole coefficient."""
    match = re.search(r" \[(\w+)\^(\d+)\]$", column)
    return (match.group(1), int(match.group(2))) if match else None


def _labels(sampling: Sampling) -> list[str]:
    return [label(k, n) for k, n, _ in sampling.coefficients]
