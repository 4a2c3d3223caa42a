"""The two-loop clusters of one species at second order in the exchange parameter (docs/perturbative.md,
section 4f): a p-cycle and a q-cycle with their offset integrated. A helper of the tests, and the code
behind the b_4 figures of section 4f (not used by the package: those values are not closed).

The link curves R(s) = X(s + a) - Y(s + b) (one per orbit of (a, b) -> (a + 1, b + 1)) are cut into
segments, each closed by the chord between its ends (single terms exact through the Aharonov-Bohm kernel
with Schlaefli's remainder), plus the polygon of the chords; two closed pieces meet through their contact
(Lambda) and -(2 pi)^2 times their mutual winding area, -(1/2 pi) oint oint ln|g1 - g2| dg1.dg2, by
Gaussian calculus with the equal-time terms of shared strands. The self pairs of each loop meet the link
through their contact (the Hartree-Fock ring) and E[theta_u Area(link curves)]. Covariances per component
of a loop of period T and diffusion D: -(D/2) gamma_T(t - t'), gamma_T(h) = h (T - h)/T.
"""
# ruff: noqa: B023  (the nested integrands close over loop variables and are integrated at once)
import itertools
import math
import warnings

import numpy as np
from scipy import integrate
from test_three_cycle import _laplace_x_k0


def chord_closed_single(order, d_rel, v_gap):
    """The alpha^order part (1 or 2) of int d^2c E[e^{2 pi i alpha w} - 1] for one segment of a relative
    curve closed by its chord (docs/perturbative.md, 4e (i)): d_rel the relative diffusion times the
    segment's duration, v_gap the per-component variance of the segment's gap. With the chord's phase only
    Schlaefli's remainder of the Aharonov-Bohm kernel survives; the radial integrals are _laplace_x_k0."""
    a = 1 / (2 * v_gap)

    def f(t, phi):
        b = (np.cosh(t) + np.cos(phi)) / d_rel - np.cos(phi) / v_gap
        h = -1.0 if order == 1 else -(phi * np.sin(phi) - t * np.sinh(t)) / (np.cosh(t) + np.cos(phi))
        return _laplace_x_k0(b / a) / a ** 2 * h
    return 2 * integrate.dblquad(f, 0, np.pi, 0, 50, epsabs=1e-11, epsrel=1e-10)[0] / v_gap


def two_loop_parts(p, q, DX=1.0, DY=1.0, link_only=False, nsub=1, TOL=1e-8):
    with warnings.catch_warnings():
        # corners and lines where two pieces meet are integrable log singularities; quad reports its
        # subdivision limit there, and the tests bound the error by comparing with exact values
        warnings.simplefilter('ignore', integrate.IntegrationWarning)
        return _parts(p, q, DX, DY, link_only, nsub, TOL)


def _parts(p, q, DX, DY, link_only, nsub, TOL):
    """Second-order parts of the cluster of a p-cycle (loop X, diffusion DX) and a q-cycle (loop Y, DY),
    offset integrated, in the units of docs/perturbative.md section 4f (multiply by the normalisation P
    that the cluster's first order fixes): returns (number of link segments, the single-segment first
    order G1, the link^2 part, the contact part of self pair x link, E[theta_u Area] summed). The link
    curves are cut into nsub segments per unit time, each closed by its chord, plus the chord polygon
    of each curve; the cross part (nsub = 1 only) is for one species (DX = DY)."""
    ell = 1.0 / nsub
    per = {'X': p, 'Y': q}
    dif = {'X': DX, 'Y': DY}
    def gam(h, T):
        h = h % T
        return h * (T - h) / T
    def cov(F, G):
        tot = 0.0
        for c1, z1, t1 in F:
            for c2, z2, t2 in G:
                if z1 == z2:
                    tot += -0.5 * dif[z1] * c1 * c2 * gam(t1 - t2, per[z1])
        return tot
    L = p * q // math.gcd(p, q)
    orbits = []
    seen = set()
    for a in range(p):
        for b in range(q):
            if (a, b) in seen: continue
            orbits.append((a, b))
            for j in range(L):
                seen.add(((a + j) % p, (b + j) % q))
    def R(orb, s):
        a0, b0 = orb
        return [(1, 'X', s + a0), (-1, 'Y', s + b0)]
    def sub(F, G, g=1.0):
        return F + [(-g * c, z, t) for c, z, t in G]
    def scale(F, g):
        return [(g * c, z, t) for c, z, t in F]
    h = 1e-6
    def dR(orb, s):
        return scale(sub(R(orb, s + h), R(orb, s - h)), 1 / (2 * h))
    # ---------------------------------------------------------------- singles (chord-closed segments)
    v = DX * gam(ell, p) + DY * gam(ell, q)
    Drel = DX + DY
    Dl = Drel * ell
    G1, G2 = chord_closed_single(1, Dl, v), chord_closed_single(2, Dl, v)
    assert abs(G1 + math.pi * Dl) < 1e-7, G1
    nseg = L * nsub * len(orbits)
    # ---------------------------------------------------------------- pieces
    # a piece: ('bridge', orb, j) s in [j, j+1]; ('line', P, Q) from point P to point Q (functionals)
    def point(piece, x):
        if piece[0] == 'bridge':
            return R(piece[1], (piece[2] + x) * ell)
        P, Q = piece[1], piece[2]
        return P + scale(sub(Q, P), x)
    def element(piece, x):
        if piece[0] == 'bridge':
            return scale(dR(piece[1], (piece[2] + x) * ell), ell)
        return sub(piece[2], piece[1])
    def double(pc1, pc2):
        def f(y, x):
            X = element(pc1, x); Y = element(pc2, y)
            U = sub(point(pc1, x), point(pc2, y))
            vu = cov(U, U)
            if vu <= 1e-300:
                return 0.0
            kxy = cov(X, Y)
            if pc1[0] == 'bridge' and pc2[0] == 'bridge':
                kxy = (-DX / p - DY / q) * ell * ell          # regular part; deltas below
            return math.log(vu) * kxy + cov(X, U) * cov(Y, U) / vu
        val = integrate.dblquad(f, 0, 1, 0, 1, epsabs=TOL)[0]
        if pc1[0] == 'bridge' and pc2[0] == 'bridge':
            (a0, b0), j = pc1[1], pc1[2]
            (a1, b1), k = pc2[1], pc2[2]
            for dZ, T, o0, o1 in ((DX, p, a0, a1), (DY, q, b0, b1)):
                # equal points: s + o0 = s' + o1 + n T, s = (j + x) ell, s' = (k + y) ell  ->  x - y = m
                for n in range(-3, 4):
                    m = (o1 - o0 + n * T) / ell - (j - k)
                    if abs(m) < 1 - 1e-12:
                        lo, hi = max(0.0, m), min(1.0, 1 + m)
                        def g(x, m=m):
                            U = sub(R(pc1[1], (j + x) * ell), R(pc2[1], (k + x - m) * ell))
                            return math.log(cov(U, U))
                        val += dZ * ell * integrate.quad(g, lo, hi, epsabs=TOL)[0]
        return val
    def curve_double(c1, c2):
        return sum(double(x, y) for x in c1 for y in c2)
    closed = []          # chord-closed segments
    NS = L * nsub
    for orb in orbits:
        for j in range(NS):
            closed.append([('bridge', orb, j), ('line', R(orb, (j + 1) * ell), R(orb, j * ell))])
    polygons = []
    for orb in orbits:
        if NS >= 3:
            polygons.append([('line', R(orb, j * ell), R(orb, (j + 1) * ell)) for j in range(NS)])
    # contact-contact between segments
    def lam(s1, s2):
        (o1, j), (o2, k) = s1, s2
        def f(y, x):
            U = sub(R(o1, (j + x) * ell), R(o2, (k + y) * ell))
            return (math.pi * Drel) ** 2 * ell * ell / (2 * math.pi * cov(U, U))
        return integrate.dblquad(f, 0, 1, 0, 1, epsabs=TOL)[0]
    segs = [(orb, j) for orb in orbits for j in range(NS)]
    link2 = nseg * G2
    for (i1, s1), (i2, s2) in itertools.combinations(list(enumerate(segs)), 2):
        link2 += lam(s1, s2) + 2 * math.pi * curve_double(closed[i1], closed[i2])
    for pg in polygons:
        link2 += math.pi * curve_double(pg, pg)
        for cl in closed:
            link2 += 2 * math.pi * curve_double(cl, pg)
    for p1, p2 in itertools.combinations(polygons, 2):
        link2 += 2 * math.pi * curve_double(p1, p2)
    if link_only:
        return nseg, G1, link2, None, None
    # ---------------------------------------------------------------- cross: self pairs x link
    contact = 0.0
    angle_area = 0.0
    for Z, T in (('X', p), ('Y', q)):
        for u1, u2 in itertools.combinations(range(T), 2):
            A = lambda t: [(1, Z, t + u1), (-1, Z, t + u2)]
            vA = cov(A(0), A(0))
            contact += nseg * 2 * math.pi / vA
            for orb in orbits:
                B = lambda s: sub(R(orb, s), R(orb, 0))
                def f(s, t):
                    a_t = A(t); b_s = B(s)
                    c = cov(a_t, b_s)
                    ct = (cov(A(t + h), b_s) - cov(A(t - h), b_s)) / (2 * h)
                    cs = (cov(a_t, B(s + h)) - cov(a_t, B(s - h))) / (2 * h)
                    vB = cov(b_s, b_s)
                    w = (cov(B(s + h), B(s + h)) - cov(B(s - h), B(s - h))) / (4 * h)
                    D = vA * vB - c * c
                    a1 = -c * ct / D; a2 = vA * ct / D
                    b1 = (vB * cs - c * w) / D
                    kap = -(a1 * cs + a2 * w)
                    return 0.5 * (-a2 * b1 * (vB - c * c / vA) + kap * c / vA)
                val = integrate.dblquad(f, 0, 1, 0, L, epsabs=TOL)[0]
                # deltas: strand of A at equal physical time with the curve's strand of Z
                a0, b0 = orb
                base = a0 if Z == 'X' else b0
                sgnZ = 1 if Z == 'X' else -1
                for uu, sg in ((u1, 1), (u2, -1)):
                    for jj in range(-2 * L, 2 * L):
                        off = uu - base + jj * T     # s = t + off
                        if -1 < off < L:
                            lo, hi = max(0.0, -off), min(1.0, L - off)
                            if hi > lo:
                                val += 0.5 * sg * sgnZ * integrate.quad(lambda t: cov(A(t), B(t + off)) / vA, lo, hi, epsabs=TOL)[0]
                angle_area += val
    return nseg, G1, link2, contact, angle_area
