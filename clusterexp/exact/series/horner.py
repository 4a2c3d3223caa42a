"""Degree-by-degree composition R(w) = sum_n c_n w^n by Horner's rule in the leading variables.

A table of every power w^n (what `PowerTable` holds) has ~N^K/K! entries with up to N parts each,
and each part costs up to N products: for K = 4 to order 16 that is ~74,000 polynomial products.
Horner's rule in the first `split` variables needs one truncated product by w_d per node of the
prefix tree instead, and only the remaining variables go through a `PowerTable`, whose pieces are
combined linearly with the c_n; for K = 4, N = 16 that is ~10,000 products.

The prefix tree: a node is a tuple p = (p_1 .. p_d), 1 <= d <= split, standing for
    T_p = sum over n with n_1..n_{d-1} = p_1..p_{d-1} and n_d >= p_d of c_n w_d^(n_d - p_d) w_{d+1..}^(n_{d+1..}),
so T_p = U_p + w_d T_{p + e_d}, where U_p = T_{p + (0,)} below the split and the linear combination
S_p = sum_q c_{(p, q)} [w_tail^q] at it; R = T_{(0,)}. The degree-r part of a node with |p| = t enters
R at degree r + t only, so at step m every node gets its part of degree m - t, and nothing above the
order is formed.
"""
from __future__ import annotations

from typing import Mapping, Sequence

from .ring import PolynomialRing
from .series import Index, PowerTable, _close_under_chain, balanced_sum


class HornerComposition:
    """The homogeneous parts of R(w) = sum_n c_n w^n for series w_i without constant term that may
    still be being solved for: `next_part()` returns parts 0, 1, 2, ... in turn; the call for degree
    m needs the parts of every w_i to degree m - 1 when all |n| >= 2, to degree m otherwise.
    Coefficients are ring elements or backend scalars.
    """

    def __init__(self, ring: PolynomialRing, w: Sequence[list], coefficients: Mapping[Index, object],
                 order: int, split: int | None = None):
        K = ring.nvars
        self.ring, self.w, self.order = ring, w, order
        self.split = s = K // 2 if split is None else split
        self._degree = 0
        tails: dict[Index, list[tuple[Index, int, object]]] = {}
        for n, c in coefficients.items():
            n = tuple(int(e) for e in n)  # indices read off a flint polynomial hold fmpz entries
            if sum(n) <= order:
                q = (0,) * s + n[s:]
                tails.setdefault(n[:s], []).append((q, sum(q), c))
        for entries in tails.values():
            entries.sort(key=lambda entry: entry[1])
        self._tails = tails
        self._closed = _close_under_chain(sorted({q for entries in tails.values() for q, _, _ in entries}))
        self._table = PowerTable(ring, w, order)
        nodes = set()
        for prefix in tails:
            for d in range(1, s + 1):
                nodes.update(prefix[:d - 1] + (j,) for j in range(prefix[d - 1] + 1))
        # deeper nodes with the same |p| first: T_p at degree r needs U_p at degree r (same |p|,
        # one level deeper) and T_{p + e_d} at degree r - 1 (|p| + 1, done earlier in the step)
        self._nodes = sorted(nodes, key=lambda p: (-sum(p), -len(p)))
        self._node_total = {p: sum(p) for p in nodes}
        self._parts: dict[Index, list] = {p: [] for p in nodes}

    def next_part(self):
        """The next homogeneous part of R(w)."""
        m = self._degree
        if m > self.order:
            raise ValueError("HornerComposition: every part up to the order has been formed")
        self._degree += 1
        if m >= 2:
            self._table.extend(m, [q for q in self._closed if sum(q) <= m])
        if self.split == 0:
            return balanced_sum(self.ring, self._tail_terms((), m))
        R = self.ring
        is_zero = R.is_zero
        parts = self._parts
        for node in self._nodes:
            r = m - self._node_total[node]
            if r < 0:
                continue
            d = len(node)
            if d < self.split:
                below = parts.get(node + (0,))
                terms = [below[r]] if below is not None and not is_zero(below[r]) else []
            else:
                terms = self._tail_terms(node, r)  # summed with the products below in one go
            successor = parts.get(node[:-1] + (node[-1] + 1,))
            if successor is not None:
                wd = self.w[d - 1]
                for k in range(1, r + 1):
                    lower = successor[r - k]   # tested first: wd[m] is not known yet when lower = 0
                    if not is_zero(lower) and not is_zero(wd[k]):
                        terms.append(wd[k] * lower)
            parts[node].append(balanced_sum(R, terms))
        root = parts.get((0,))
        return root[m] if root is not None else R.zero

    def _tail_terms(self, prefix: Index, r: int) -> list:
        """The terms of the degree-r part of S_prefix = sum_q c_{(prefix, q)} w_tail^q."""
        R = self.ring
        terms = []
        for q, total, c in self._tails.get(prefix, ()):
            if total > r:
                break
            if total == 0:
                piece = R.one if r == 0 else R.zero
            else:
                piece = self._table.part(q, r, total)
            if not R.is_zero(piece):
                terms.append(piece * c)
        return terms
