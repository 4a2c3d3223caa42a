"""From a validated `System` to exact coefficients: the derivation stage.

The physics route only has to supply cluster coefficients b_n (or, for `virials given`, virial
coefficients a_n); the cluster <-> virial machinery in `virial.py` never knows where they came from.
"""
from __future__ import annotations

from functools import cached_property
from typing import Mapping

import sympy

from .errors import InputError
from .model import Index, Request, System
from .results import Coefficient, Derivation
from .exact.series import indices_up_to
from .exact.terms import TermSum
from .exact.virial import CoefficientTable, VirialResult, cluster_to_virial, density_expansion, reduced_to_virial

KIND_ORDER = ("cluster", "density", "fugacity", "virial")


def single_particle_factors(system: System) -> list[sympy.Expr]:
    """b_{e_i} = (m_i / m_ref)^{d/2} for every species (physics.md, section 1)."""
    m_ref = system.reference_mass
    half_d = sympy.Rational(system.dimension, 2)
    return [sympy.powsimp(sympy.powdenest((s.mass / m_ref) ** half_d, force=False)) for s in system.species]


class _Plan:
    """The tables a system needs, each built once on first use. The regime (`routes.regime_of`)
    supplies the cluster coefficients (and the virial ones where the input gives them); everything else
    is the cluster <-> virial machinery."""

    def __init__(self, system: System, progress=None):
        from .routes import regime_of
        self.system = system
        self.regime = regime_of(system)
        self.progress = progress
        self.K = len(system.species)
        self.linear = single_particle_factors(system)
        self.order = max([system.order] + [_request_order(r) for r in system.requests])
        self._memo: dict = {}

    def memo(self, key: str, compute):
        """A regime's own table, built once per derivation."""
        if key not in self._memo:
            self._memo[key] = compute()
        return self._memo[key]

    @cached_property
    def given(self) -> dict[Index, sympy.Expr]:
        return {v.index: v.value for v in self.system.source.values}

    @cached_property
    def given_exact(self) -> dict[Index, sympy.Expr]:
        """The given values without their O terms."""
        from .expansions import split_truncation
        return {v.index: split_truncation(v.value)[0] for v in self.system.source.values}

    @cached_property
    def given_kind(self) -> str:
        kinds = {v.kind for v in self.system.source.values}
        return kinds.pop() if kinds else "cluster"

    @cached_property
    def clusters(self):
        """The regime's `routes.Clusters`."""
        return self.regime.clusters(self)

    @cached_property
    def truncation(self) -> dict:
        """{symbol: first unknown power} over every truncated series the user gave (pair phases)."""
        return self.truncation_for(None)

    def truncation_for(self, index: Index | None) -> dict:
        """{symbol: first unknown power} over the truncated inputs coefficient `index` depends on: given
        values whose multi-index fits inside it (a_n and z(rho) at n involve b_m for m <= n only, and
        conversely), and what the regime carries everywhere (the tube coverage). None: all."""
        from .expansions import split_truncation
        limits: dict = {}
        if index is not None and self.regime.known_zero(self.system, index):
            return limits   # exactly zero (species that do not braid with each other)
        for v in self.system.source.values:
            if index is not None and not all(a <= b for a, b in zip(v.index, index)):
                continue
            for symbol, k in split_truncation(v.value)[1].items():
                limits[symbol] = min(k, limits.get(symbol, k))
        for symbol, k in self.shared_truncation.items():
            limits[symbol] = min(k, limits.get(symbol, k))
        return limits

    @cached_property
    def cluster(self) -> Mapping[Index, sympy.Expr]:
        return self.clusters.values

    def _on_order(self, m: int) -> None:
        if self.progress is not None:
            self.progress.step("virial reversion of rho(z)", order=m, total=self.order)

    @cached_property
    def reversion(self) -> VirialResult:
        clusters = self.clusters
        if clusters.ring is not None:
            return reduced_to_virial(clusters.ring, clusters.elements, self.order, [sympy.Integer(1)] * self.K,
                                     self._on_order)
        return cluster_to_virial(self.cluster, self.order, self.K, on_order=self._on_order,
                                 truncation=self.shared_truncation)

    @cached_property
    def shared_truncation(self) -> dict:
        """Truncation orders every coefficient is subject to, so that the kernel may apply them (the tube
        coverage, known to first order; a given series may cut some coefficients lower still: the
        per-coefficient truncation does that)."""
        return self.regime.truncation(self.system)

    @cached_property
    def virial(self) -> Mapping[Index, sympy.Expr]:
        given = self.regime.virials(self)
        return given if given is not None else self.reversion.virial

    @cached_property
    def density(self) -> list[CoefficientTable]:
        return density_expansion(self.cluster, self.order, self.K)

    def fugacity(self, i: int) -> CoefficientTable:
        return self.reversion.fugacity(i)


def _request_order(request: Request) -> int:
    if request.up_to is not None:
        return request.up_to
    return max((sum(n) for n in request.indices), default=1)


def _requested_indices(request: Request, K: int) -> list[Index]:
    if request.indices:
        return list(request.indices)
    return indices_up_to(K, request.up_to)


def derive_system(system: System, size_limit: int | None = None, progress=None) -> Derivation:
    """Derive every requested coefficient of a validated system (values computed lazily).
    A derivation estimated beyond the size limit is refused before anything is formed. `progress`
    (a `progress.Progress`) hears of each order of the reversion as it is computed."""
    from .limits import check_size
    check_size(system, size_limit)
    plan = _Plan(system, progress)
    names = system.species_names
    wanted: dict[str, set[Index]] = {}
    for request in system.requests:
        wanted.setdefault(request.quantity, set()).update(_requested_indices(request, plan.K))
    coefficients: list[Coefficient] = []
    order_key = {n: k for k, n in enumerate(indices_up_to(plan.K, plan.order))}
    for kind in KIND_ORDER:
        indices = sorted(wanted.get(kind, ()), key=order_key.__getitem__)
        if kind in ("cluster", "virial"):
            for index in indices:
                value, terms = _lookup(plan, kind, index)
                coefficients.append(Coefficient(kind, index, names, value, compute_terms=terms))
        else:
            for i, component in enumerate(names):
                for index in indices:
                    if index[i]:
                        value, terms = _lookup(plan, kind, index, i)
                        coefficients.append(Coefficient(kind, index, names, value, component=component,
                                                        compute_terms=terms))
    def make(kind: str, index: Index, component: str | None = None) -> Coefficient:
        i = names.index(component) if component is not None else None
        value, terms = _lookup(plan, kind, tuple(index), i)
        return Coefficient(kind, tuple(index), names, value, component=component, compute_terms=terms)

    return Derivation(system, coefficients, make=make,
                      compute_sampled=_sampled(plan) if system.samplings else None,
                      truncated=bool(plan.truncation))


def _sampled(plan: _Plan):
    """The `sample` statements' numbers, computed when first looked at (clusterexp/loops/sampled.py)."""
    def compute():
        from .loops.sampled import run_samplings
        return run_samplings(plan.system, lambda kind, index: _lookup(plan, kind, index)[0]())
    return compute


def _lookup(plan: _Plan, kind: str, index: Index, i: int | None = None):
    """Two deferred computations of one coefficient: its sympy value, and its `TermSum` read
    straight off the exact ring when the table has one (None otherwise)."""
    def table():
        if kind == "cluster":
            return plan.cluster
        if kind == "virial":
            return plan.virial
        if kind == "density":
            return plan.density[i]
        return plan.fugacity(i)

    def compute() -> sympy.Expr:
        t = table()
        value = sympy.sympify(t[index] if isinstance(t, CoefficientTable) else t.get(index, sympy.Integer(0)))
        limits = plan.truncation_for(index) if plan.truncation else {}
        if limits and not (kind == "virial" and sum(index) == 1):
            from .pieces import truncate_pieces
            from .expansions import truncate
            try:
                value = truncate_pieces(plan.system, value, limits)[0]
            except InputError as error:
                raise InputError(error.message, plan.system.source.span) from None
            try:
                value = truncate(value, limits)
            except ValueError as error:
                raise InputError(f"{error}: declare the parameter's range inside one period so that the "
                                 "two-body parts have a single polynomial branch", plan.system.source.span) from None
        tubes = plan.system.tubes
        if tubes is not None and tubes.value is not None and value.has(tubes.coverage):
            known = value.removeO()   # the first-order value at the declared coverage, with its O term kept
            orders = [t for t in sympy.Add.make_args(value) if isinstance(t, sympy.Order)]
            value = sympy.Add(sympy.expand(known.subs(tubes.coverage, tubes.value)), *orders)
        return value

    def compute_terms():
        if plan.truncation:
            return None
        t = table()
        if isinstance(t, CoefficientTable):
            return t.term_sum(index)
        return TermSum.from_expr(sympy.sympify(t.get(index, sympy.Integer(0))))
    return compute, compute_terms
