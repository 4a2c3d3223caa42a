"""The engine of `routes.two_loop_quadrature` with its integrands vectorised (numerical evaluation, numpy):
the same pieces, the same terms, the same equal-time line integrals, evaluated on whole arrays of points.

Every integrand is a function of covariances of functionals: linear combinations of loop points (or their
time derivatives) with coefficients and times linear in the integration variables (x, y) in [0, 1]^2.
Each covariance is compiled once into rows (a quadratic polynomial in x, y times a kernel of the time
difference h = h0 + hx x + hy y of a loop of period T and diffusion D): -(D/2) gamma_T(h) between points,
-(D/2) gamma_T'(h) with a derivative on one side (sign by side), -D/T with derivatives on both sides (the
regular part; the delta parts are the equal-time line integrals), gamma_T(h) = h (T - h)/T with h mod T
and gamma_T'(0) = 0 (the stationary loop: E[X'(s) X(s)] = 0). Rows with a constant time difference are
summed at compile time.

Quadrature: the kinks (h = 0 mod T) of every integrand lie on the lines x - y = -1, 0, 1 (unit segments,
integer offsets) and its integrable log singularities on those lines and on the corners, where two pieces
share an end point (a chord and the polygon's edge over the same two points run opposite ways and are
compared with the second one reversed, so that they meet on x = y). So the square is mapped to
(u, t): x - y = u in [-1, 0] and [0, 1], y running over its segment at fraction t, and both directions get
a composite Gauss-Legendre rule graded geometrically toward the ends (ratio SIGMA, `levels` panels per
end, `nodes` points per panel): exponential convergence for the piecewise analytic integrands with log
end singularities. The error is bounded from two rules (benchmarks/two_loop_table.py).
"""
from __future__ import annotations

import itertools
import math

import numpy as np

from . import two_loop_quadrature
from .two_loop_quadrature import chord_closed_single

SIGMA = 0.15
MAX_VALUES = 2.5e8          # slot values evaluated in one pass (8 bytes each): fine rules run in passes
RULES = {1e-6: (8, 8), 1e-7: (10, 12), 1e-8: (12, 16)}     # tolerance name -> (levels, nodes)


def graded_unit(levels: int, nodes: int, middle: int = 0):
    """Nodes and weights on [0, 1], composite Gauss-Legendre graded geometrically toward both ends, and with
    middle > 0 toward 1/2 as well (`middle` more panels on each side of it, ratio SIGMA)."""
    g, w = np.polynomial.legendre.leggauss(nodes)
    cuts = [0.5 * SIGMA ** k for k in range(levels, 0, -1)]
    top = cuts[-1] if cuts else 0.0
    edges = [0.0] + cuts + [0.5 - (0.5 - top) * SIGMA ** k for k in range(1, middle + 1)] + [0.5]
    xs, ws = [], []
    for a, b in itertools.pairwise(edges):
        xs.append(a + (b - a) * (g + 1) / 2)
        ws.append((b - a) / 2 * w)
    x, wt = np.concatenate(xs), np.concatenate(ws)
    return np.concatenate([x, 1 - x[::-1]]), np.concatenate([wt, wt[::-1]])


def square_rule(levels: int, nodes: int, middle: int = 0):
    """(u, y, weight) on [0, 1]^2 (x = u + y) through (u, t): u = x - y graded toward -1, 0, 1, y over its
    segment at fraction t graded toward 0, 1 and, with middle > 0, toward t = 1/2 as well: there x + y = 1,
    where two chords run over the same two points of one loop in opposite directions coincide in that
    loop's part (docs/perturbative.md 4j: at far mass ratios the other, heavy loop's part is small there)."""
    r, wr = graded_unit(levels, nodes)
    rt, wrt = graded_unit(levels, nodes, middle)
    xs, ys, ws = [], [], []
    for sign in (1, -1):
        u, t = np.meshgrid(sign * r, rt, indexing="ij")
        wu, wt = np.meshgrid(wr, wrt, indexing="ij")
        span = 1 - np.abs(u)
        y = np.where(u >= 0, 0.0, -u) + t * span
        xs.append(u.ravel()); ys.append(y.ravel()); ws.append((wu * wt * span).ravel())
    return np.concatenate(xs), np.concatenate(ys), np.concatenate(ws)


def line_rule(nodes: int = 12):
    g, w = np.polynomial.legendre.leggauss(nodes)
    return (g + 1) / 2, w / 2


# a term: (loop, derivative 0/1, coefficient (c0, cx, cy), time (t0, tx, ty))
def _mul(a, b):
    """(a0 + ax x + ay y)(b0 + bx x + by y) as coefficients of 1, x, y, x^2, x y, y^2."""
    return np.array([a[0] * b[0], a[0] * b[1] + a[1] * b[0], a[0] * b[2] + a[2] * b[0],
                     a[1] * b[1], a[1] * b[2] + a[2] * b[1], a[2] * b[2]])


def _gamma(h, T):
    h = h % T
    return h * (T - h) / T


def _dgamma(h, T):
    h = h % T
    return np.where(h == 0, 0.0, (T - 2 * h) / T)


class Forms:
    """Covariances compiled into rows, evaluated per slot on arrays of points."""

    def __init__(self, loops: dict):
        self.loops = loops                       # loop name -> (diffusion D, period T)
        self.nslots = 0
        self.rows = {}                           # (slot, kind, T, h0, hx, hy) -> polynomial (6)
        self.const = {}                          # slot -> polynomial (6)

    def slot(self) -> int:
        self.nslots += 1
        return self.nslots - 1

    def add(self, F, G, slot: int, factor: float = 1.0) -> None:
        for z1, d1, c1, t1 in F:
            for z2, d2, c2, t2 in G:
                if z1 != z2:
                    continue
                D, T = self.loops[z1]
                poly = factor * _mul(c1, c2)
                h0, hx, hy = t1[0] - t2[0], t1[1] - t2[1], t1[2] - t2[2]
                if d1 and d2:
                    self.const[slot] = self.const.get(slot, 0) + poly * (-D / T)
                    continue
                kind = 1 if (d1 or d2) else 0
                scale = -D / 2 * (-1 if d2 and not d1 else 1)
                if hx == 0 and hy == 0:
                    k = float(_dgamma(np.array(h0), T) if kind else _gamma(h0, T))
                    self.const[slot] = self.const.get(slot, 0) + poly * scale * k
                    continue
                key = (slot, kind, T, h0 % T, hx, hy)
                self.rows[key] = self.rows.get(key, 0) + poly * scale

    def compile(self) -> None:
        """Rows to arrays, in the variables (u, y), u = x - y: the polynomials and the time differences
        stay accurate where the two pieces meet (u near 0)."""
        to_uy = np.array([[1, 0, 0, 0, 0, 0], [0, 1, 1, 0, 0, 0], [0, 0, 1, 0, 0, 0],
                          [0, 0, 0, 1, 2, 1], [0, 0, 0, 0, 1, 1], [0, 0, 0, 0, 0, 1]], float)
        keys = sorted(self.rows)
        self.r_slot = np.array([k[0] for k in keys], dtype=int)
        self.r_kind = np.array([k[1] for k in keys], dtype=bool)
        self.r_T = np.array([k[2] for k in keys], float)[:, None]
        self.r_h = np.array([(k[3], k[4], k[4] + k[5]) for k in keys], float).reshape(-1, 3)
        self.r_poly = np.array([self.rows[k] for k in keys]).reshape(-1, 6) @ to_uy
        cs = sorted(self.const)
        self.c_slot = np.array(cs, dtype=int)
        c_poly = np.array([self.const[s] for s in cs]).reshape(-1, 6) @ to_uy
        # coefficients that cancel in exact arithmetic leave a few ulps in floating point; where the
        # variance of two chords over the same two points is u^2 V, such a residue would stand for u^2 V
        # below |u| ~ 1e-8 and cost seven digits of the log integral: those are set to zero
        scale = np.abs(c_poly).max(axis=1, keepdims=True) if len(cs) else 0.0
        self.c_poly = np.where(np.abs(c_poly) < 1e-13 * scale, 0.0, c_poly)

    def evaluate(self, u, y, chunk_rows: float = 4e6):
        """(nslots, len(u)) values of every slot at the points x = u + y, y."""
        out = np.zeros((self.nslots, len(u)))
        step = max(1, int(chunk_rows // max(1, len(self.r_slot) + len(self.c_slot))))
        for lo in range(0, len(u), step):
            xs, ys = u[lo:lo + step], y[lo:lo + step]
            mono = np.stack([np.ones_like(xs), xs, ys, xs * xs, xs * ys, ys * ys])
            if len(self.c_slot):
                np.add.at(out[:, lo:lo + step], self.c_slot, self.c_poly @ mono)
            if len(self.r_slot):
                h = self.r_h[:, :1] + self.r_h[:, 1:2] * xs + self.r_h[:, 2:3] * ys
                h = h % self.r_T
                ker = np.where(self.r_kind[:, None], np.where(h == 0, 0.0, (self.r_T - 2 * h) / self.r_T),
                               h * (self.r_T - h) / self.r_T)
                val = (self.r_poly @ mono) * ker
                starts = np.flatnonzero(np.r_[True, self.r_slot[1:] != self.r_slot[:-1]])
                out[self.r_slot[starts], lo:lo + step] += np.add.reduceat(val, starts, axis=0)
        return out


def _bridge_point(orb, j, var, rev=False):
    """R(orb, s) = X(s + a) - Y(s + b) at s = j + v (or j + 1 - v reversed), v the variable x or y."""
    a, b = orb
    s0, sv = (j + 1, -1) if rev else (j, 1)
    tv = (0, sv, 0) if var == "x" else (0, 0, sv)
    return [("X", 0, (1, 0, 0), (s0 + a, tv[1], tv[2])), ("Y", 0, (-1, 0, 0), (s0 + b, tv[1], tv[2]))]


def _bridge_element(orb, j, var, rev=False):
    return [(z, 1, c, t) for z, _, c, t in _bridge_point(orb, j, var, rev)]


def _fixed_point(orb, j, coef):
    a, b = orb
    return [("X", 0, coef, (j + a, 0, 0)), ("Y", 0, tuple(-c for c in coef), (j + b, 0, 0))]


def _line_point(orb, j0, j1, var, lo=0.0, hi=1.0):
    """The chord from R(orb, j0) to R(orb, j1) at fraction lo + (hi - lo) v."""
    span = hi - lo
    one_minus, v = ((1 - lo, -span, 0), (lo, span, 0)) if var == "x" else ((1 - lo, 0, -span), (lo, 0, span))
    return _fixed_point(orb, j0, one_minus) + _fixed_point(orb, j1, v)


def _line_element(orb, j0, j1, span=1.0):
    return _fixed_point(orb, j1, (span, 0, 0)) + _fixed_point(orb, j0, (-span, 0, 0))


def _neg(F):
    return [(z, d, tuple(-c for c in co), t) for z, d, co, t in F]


def _piece(pc, var, rev=False):
    """(point, element) functionals of a piece ('bridge', orb, j) or ('line', orb, j0, j1)."""
    if pc[0] == "bridge":
        return _bridge_point(pc[1], pc[2], var, rev), _bridge_element(pc[1], pc[2], var, rev)
    orb, j0, j1 = pc[1:4]
    lo, hi = pc[4] if len(pc) > 4 else (0.0, 1.0)
    element = _line_element(orb, j0, j1, hi - lo)   # reversed, the integrand keeps the element of its point
    if rev:
        return _line_point(orb, j1, j0, var, 1 - hi, 1 - lo), element
    return _line_point(orb, j0, j1, var, lo, hi), element


def _crossing(a, b, loops):
    """For two chords: the fractions (x, y) strictly inside where they are the same point (the variance of
    their difference, a quadratic in x and y, vanishes), else None."""
    forms = Forms(loops)
    s = forms.slot()
    U = _piece(a, "x")[0] + _neg(_piece(b, "y")[0])
    forms.add(U, U, s)
    c0, cx, cy, cxx, cxy, cyy = forms.const.get(s, np.zeros(6))
    det = 4 * cxx * cyy - cxy * cxy
    if abs(det) < 1e-12:
        return None
    x, y = np.linalg.solve([[2 * cxx, cxy], [cxy, 2 * cyy]], [-cx, -cy])
    value = c0 + cx * x + cy * y + cxx * x * x + cxy * x * y + cyy * y * y
    if value > 1e-10 or not (1e-9 < x < 1 - 1e-9 and 1e-9 < y < 1 - 1e-9):
        return None
    return x, y


def _same_edge_reversed(a, b, L: int) -> bool:
    """Two whole chords over the same two points of one link curve, run opposite ways."""
    return (a[0] == b[0] == "line" and len(a) == len(b) == 4 and a[1] == b[1] and a[2] % L != a[3] % L
            and a[2] % L == b[3] % L and a[3] % L == b[2] % L)


def _ends(pc, L: int):
    """The end points (orbit, index mod L) of a whole piece at v = 0 and v = 1."""
    if pc[0] == "bridge":
        return (pc[1], pc[2] % L), (pc[1], (pc[2] + 1) % L)
    return (pc[1], pc[2] % L), (pc[1], pc[3] % L)


def _shared_end_first(a, b, L: int):
    """For two pieces, one of them a chord, with one end point in common, or two halves of two chords cut
    where they cross: which of the two to run reversed so that the common point sits at x = y = 0. There
    the variance of their difference is small, and the compiled polynomials (in u = x - y and y) keep it
    accurate; at y = 1 it is the difference of numbers of order one, and near a common end of two chords
    (where it is quadratic in the distance) eight digits were lost (docs/perturbative.md 4f). Reversing
    a piece maps its variable v to 1 - v and leaves the integral as it is; two bridges are left as they
    are (their variance is linear in the distance, and their equal-time line must stay at x = y)."""
    if "line" not in (a[0], b[0]) or a == b:
        return False, False
    if len(a) == len(b) == 5:                    # halves of two crossing chords: they meet at the cut
        return a[4][0] == 0.0, b[4][0] == 0.0
    if len(a) == 5 or len(b) == 5:
        return False, False
    ea, eb = _ends(a, L), _ends(b, L)
    shared = set(ea) & set(eb)
    if len(shared) != 1:
        return False, False
    (s,) = shared
    return ea[1] == s and ea[0] != s, eb[1] == s and eb[0] != s


def _split(pc, cut):
    return [pc + ((0.0, cut),), pc + ((cut, 1.0),)]


def orbits_of(p: int, q: int):
    L = p * q // math.gcd(p, q)
    orbits, seen = [], set()
    for a in range(p):
        for b in range(q):
            if (a, b) not in seen:
                orbits.append((a, b))
                seen.update(((a + j) % p, (b + j) % q) for j in range(L))
    return L, orbits


def link_squared(p, q, DX, DY, levels, nodes, middle=0, record=None):
    """The link^2 part of `two_loop_quadrature._parts` (nsub = 1): (segments, G1, link2); `middle` grades
    the rule toward x + y = 1 as well (`square_rule`)."""
    L, orbits = orbits_of(p, q)
    v = DX * (p - 1) / p + DY * (q - 1) / q        # the gap's variance: gamma_T(1) per loop
    G1, G2 = chord_closed_single(1, DX + DY, v), chord_closed_single(2, DX + DY, v)
    assert abs(G1 + math.pi * (DX + DY)) < 1e-7, G1
    nseg = L * len(orbits)
    closed = [[("bridge", orb, j), ("line", orb, j + 1, j)] for orb in orbits for j in range(L)]
    polygons = [[("line", orb, j, j + 1) for j in range(L)] for orb in orbits] if L >= 3 else []
    pairs = {}                                   # (piece, piece) -> [weight of the double, weight of lam]

    def add(a, b, w, wl=0.0):
        key = (a, b) if (a, b) in pairs or (b, a) not in pairs else (b, a)
        entry = pairs.setdefault(key, [0.0, 0.0])
        entry[0] += w; entry[1] += wl
    for i1, i2 in itertools.combinations(range(len(closed)), 2):
        for a in closed[i1]:
            for b in closed[i2]:
                add(a, b, 2 * math.pi, 1.0 if a[0] == b[0] == "bridge" else 0.0)
    for pg in polygons:
        for a in pg:
            for b in pg:
                add(a, b, math.pi)
        for cl in closed:
            for a in cl:
                for b in pg:
                    add(a, b, 2 * math.pi)
    for p1, p2 in itertools.combinations(polygons, 2):
        for a in p1:
            for b in p2:
                add(a, b, 2 * math.pi)
    forms = Forms({"X": (DX, p), "Y": (DY, q)})
    line_forms = Forms({"X": (DX, p), "Y": (DY, q)})
    plan = []
    for (a, b) in [k for k in pairs if k[0][0] == k[1][0] == "line" and k[0] != k[1]]:
        cross = _crossing(a, b, forms.loops)
        if cross is not None:                  # two chords through one point: cut both there
            w, wl = pairs.pop((a, b))
            for a2 in _split(a, cross[0]):
                for b2 in _split(b, cross[1]):
                    pairs[(a2, b2)] = [w, wl]
    for (a, b), (w, wl) in pairs.items():
        rev = _same_edge_reversed(a, b, L)
        rev_a, rev_b = (False, True) if rev else _shared_end_first(a, b, L)
        Pa, Ea = _piece(a, "x", rev_a)
        Pb, Eb = _piece(b, "y", rev_b)
        U = Pa + _neg(Pb)
        s = [forms.slot() for _ in range(4)]
        forms.add(U, U, s[0]); forms.add(Ea, Eb, s[1]); forms.add(Ea, U, s[2]); forms.add(Eb, U, s[3])
        delta = 0.0
        if a[0] == b[0] == "bridge":
            (a0, b0), j = a[1], a[2]
            (a1, b1), k = b[1], b[2]
            for dZ, T, o0, o1 in ((DX, p, a0, a1), (DY, q, b0, b1)):
                if (o1 - o0 - (j - k)) % T == 0:       # equal times on the loop: x - y = 0
                    delta += dZ
        ls = None
        if delta:
            ls = line_forms.slot()
            line_forms.add(U, U, ls)
        plan.append((s, w, wl * (math.pi * (DX + DY)) ** 2 / (2 * math.pi), w * delta, ls, (a, b)))
    forms.compile(); line_forms.compile()
    u, y, wt = square_rule(levels, nodes, middle)
    parts = np.zeros(len(plan))
    step = max(1000, int(MAX_VALUES // max(1, forms.nslots)))    # the points of one pass (memory)
    for lo in range(0, len(u), step):
        vals = forms.evaluate(u[lo:lo + step], y[lo:lo + step])
        for k, (s, w, wl, _, _, _) in enumerate(plan):
            vu, kxy, cxu, cyu = vals[s[0]], vals[s[1]], vals[s[2]], vals[s[3]]
            ok = vu > 1e-300
            safe = np.where(ok, vu, 1.0)
            f = np.where(ok, w * (np.log(safe) * kxy + cxu * cyu / safe) + wl / safe, 0.0)
            parts[k] += f @ wt[lo:lo + step]
    xl, wlin = line_rule()
    lvals = line_forms.evaluate(0 * xl, xl) if line_forms.nslots else None
    total = nseg * G2
    for k, (s, w, wl, wd, ls, pair) in enumerate(plan):
        part = parts[k]
        if ls is not None:
            part += wd * (np.log(lvals[ls]) @ wlin)
        total += part
        if record is not None:                  # the contribution of each pair of pieces (diagnostics)
            record.append((pair, part))
    return nseg, G1, total


def angle_area(p, q, levels, nodes):
    """The self pairs x link part of `two_loop_quadrature._parts` (one species, DX = DY = 1):
    (contact, {'X': ..., 'Y': ...})."""
    L, orbits = orbits_of(p, q)
    nseg = L * len(orbits)
    forms = Forms({"X": (1.0, p), "Y": (1.0, q)})
    line_forms = Forms({"X": (1.0, p), "Y": (1.0, q)})
    contact, plan, lplan = 0.0, [], []
    for Z, T in (("X", p), ("Y", q)):
        for u1, u2 in itertools.combinations(range(T), 2):
            vA = 1.0 * abs(u1 - u2) * (T - abs(u1 - u2)) / T          # cov(A, A): -(1/2)(-2 gamma) per side
            contact += nseg * 2 * math.pi / vA
            A = [(Z, 0, (1, 0, 0), (u1, 0, 1)), (Z, 0, (-1, 0, 0), (u2, 0, 1))]      # A(t), t = y
            dA = [(z, 1, c, t) for z, _, c, t in A]
            for orb in orbits:
                a0, b0 = orb
                for i in range(L):                                   # s = i + x
                    Rs = _bridge_point(orb, i, "x")
                    B = Rs + _neg(_fixed_point(orb, 0, (1, 0, 0)))
                    dB = _bridge_element(orb, i, "x")
                    s = [forms.slot() for _ in range(5)]
                    forms.add(B, B, s[0]); forms.add(A, B, s[1]); forms.add(dA, B, s[2])
                    forms.add(A, dB, s[3]); forms.add(dB, B, s[4])
                    plan.append((Z, vA, s))
                base = a0 if Z == "X" else b0
                sgnZ = 1 if Z == "X" else -1
                for uu, sg in ((u1, 1), (u2, -1)):
                    for jj in range(-2 * L, 2 * L):
                        off = uu - base + jj * T                     # s = t + off
                        if 0 <= off < L:
                            B = _bridge_point(orb, off, "x") + _neg(_fixed_point(orb, 0, (1, 0, 0)))
                            ls = line_forms.slot()
                            line_forms.add(A, B, ls)
                            lplan.append((Z, 0.5 * sg * sgnZ / vA, ls))
    forms.compile(); line_forms.compile()
    u, y, wt = square_rule(levels, nodes)
    vals = forms.evaluate(u, y)
    xl, wlin = line_rule()
    lvals = line_forms.evaluate(0 * xl, xl)
    area = {"X": 0.0, "Y": 0.0}
    for Z, vA, s in plan:
        vB, c, ct, cs, w = (vals[k] for k in s)
        D = vA * vB - c * c
        ok = D > 1e-300
        D = np.where(ok, D, 1.0)
        a1, a2 = -c * ct / D, vA * ct / D
        b1 = (vB * cs - c * w) / D
        kap = -(a1 * cs + a2 * w)
        f = np.where(ok, 0.5 * (-a2 * b1 * (vB - c * c / vA) + kap * c / vA), 0.0)
        area[Z] += f @ wt
    for Z, factor, ls in lplan:
        area[Z] += factor * (lvals[ls] @ wlin)
    return contact, area


def two_loop_parts(p, q, DX=1.0, DY=1.0, link_only=False, tol=1e-7):
    """Drop-in for `two_loop_quadrature.two_loop_parts` (nsub = 1): (segments, G1, link2, contact,
    angle_area); the rule for `tol` from RULES (the nearest name at or below it)."""
    levels, nodes = RULES[min(RULES, key=lambda t: abs(math.log(t / tol)))]
    nseg, G1, link2 = link_squared(p, q, DX, DY, levels, nodes)
    if link_only:
        return nseg, G1, link2, None, None
    if DX != DY:
        raise NotImplementedError("the angle-area part for unequal masses is not supported yet")
    contact, area = angle_area(p, q, levels, nodes)
    return nseg, G1, link2, contact, area


def second_order(p: int, q: int, tol: float = 1e-7) -> dict:
    """`two_loop_quadrature.second_order` with this engine: the parts normalised by the first order."""
    return two_loop_quadrature.second_order(p, q, tol, parts=lambda p, q, tol: two_loop_parts(p, q, tol=tol))
