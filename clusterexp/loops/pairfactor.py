"""Exact Aharonov-Bohm factor of one time slice of a planar Brownian bridge.

For a relative vector u(t) of two particles that moves as a planar Brownian bridge from u0 to u1
(Gaussian per-component variance `v` of the increment over the slice), the angle Theta swept around
the origin has a conditional distribution that is known exactly.  The factor

    R(alpha; x, phi) = E[exp(i alpha Theta) | u0, u1],   x = |u0| |u1| / v,   phi = arg(u1 / u0),

follows from the winding decomposition of the free heat kernel (the Aharonov-Bohm propagator over the
free one):  R = sum_m e^{-i m phi} I_{|m+alpha|}(x) / e^{x cos phi}.  The Bessel sum loses all precision
near phi = pi at large x, so we evaluate the equivalent form (0 < a < 1, 0 <= phi <= pi, psi = pi - phi)

    R = e^{i a phi} - (sin(pi a)/pi) * J,
    J = integral over real t of exp(-x (cosh t - cos psi) - a t) / (1 - exp(-t + i psi)),

which follows from the integral representation of I_mu (Schlaefli) summed over m.  J is computed with
the trapezoidal rule on a half-shifted grid plus the exact correction of the pole at t = i psi
(2 pi i e^{-i a psi} q/(1+q), q = exp(-2 pi psi / step)); the rule is then exponentially accurate for
every psi, including psi -> 0, where the pole touches the real axis.

Given the positions at the slice times, the slices of one pair are independent (Markov property), so
the product of R over slices is the exact conditional phase of that pair.  Only slices whose chord
passes close to the origin differ from the minimal-angle value e^{i alpha phi}; all others are
replaced by it (the difference is below exp(-cut), see `classify_segments`).
"""
from __future__ import annotations

import threading

import numpy as np

# 2 d^2 / v below this marks a slice "near": its chord passes within d of the origin.  The probability
# that a bridge strays a distance d sideways is exp(-2 d^2 / v), so far slices err by < exp(-18) (in fact far less: the path must also wind).
NEAR_CUT = 18.0

# Accuracy of the quadrature: the trapezoidal error is ~exp(-step shift) and the cut-off tails are
# below exp(-reach) (see `_reduced_factor`).  PRECISE: |error| < 1e-11 (tested against the Bessel sum);
# SAMPLING, used by the sampler: |error| < 1e-7 per slice (measured against PRECISE on 6e5 random
# slices: at most 2e-8), so the phase of a sample with ~50 near slices is off by < 1e-6, a bias
# below 1e-7 in b_3 -- three orders under the best error bars -- for 30% fewer quadrature points.
PRECISE = (25.0, 30.0)
SAMPLING = (16.0, 20.0)

# Half-widths (in steps) of the quadrature grids; an entry uses the smallest bucket that covers it.
_BUCKETS = (4, 5, 6, 7, 8, 10, 12, 14, 16, 19, 23, 27, 32, 38, 45, 54, 64, 76, 91, 108, 128, 152, 181, 215, 256)
_CHUNK = 40000

# Per thread: whether half-integer alpha uses the closed form (closed_half, True; the benchmark of the
# variance reduction switches it off for the "before" configuration through runner.Reduction), and
# whether the hot path runs compiled (compiled, True; False: the numpy reference, for the benchmarks).
SETTINGS = threading.local()


def classify_segments(u: np.ndarray, v: float, cut: float = NEAR_CUT):
    """Split the slices of relative paths into far and near ones.

    u: complex array (paths, points).  Returns (far_sum, rows, x, phi): far_sum[path] is the sum of
    minimal angles over far slices; rows/x/phi list the near slices (path index, x, phi), in row order.
    A slice is near when its chord passes within d of the origin, 2 d^2 / v < cut.  Compiled
    (`kernels.classify`); `classify_segments_numpy` is the same with numpy arrays, the reference.
    """
    if not getattr(SETTINGS, "compiled", True):
        return classify_segments_numpy(u, v, cut)
    from .kernels import classify
    return classify(u, v, cut)


def classify_segments_numpy(u: np.ndarray, v: float, cut: float = NEAR_CUT):
    """`classify_segments` with whole numpy arrays (the reference of the compiled form)."""
    u0 = u[:, :-1]
    z = u[:, 1:] * np.conj(u0)
    phi = np.angle(z)                             # minimal angle from u0 to u1
    r2 = u.real * u.real + u.imag * u.imag
    r0, r1 = r2[:, :-1], r2[:, 1:]
    dot = z.real                                  # u0 . u1
    num = r0 - dot                                # -(u0 . w), w = u1 - u0
    ww = num + (r1 - dot)                         # |w|^2
    with np.errstate(invalid="ignore", divide="ignore"):
        s = np.where(ww > 0, num / ww, 0.0)
    np.clip(s, 0.0, 1.0, out=s)
    d2 = r0 + s * (s * ww - 2.0 * num)            # |u0 + s w|^2, the chord's closest point
    near = d2 < (0.5 * cut) * v
    far_sum = np.where(near, 0.0, phi).sum(axis=1)
    rows = np.nonzero(near)[0]
    x = np.sqrt(r0[near] * r1[near]) / v
    return far_sum, rows, x, phi[near]


def _reduced_factor(a: float, x: np.ndarray, phi: np.ndarray, accuracy=PRECISE) -> np.ndarray:
    """R for 0 < a < 1 and 0 <= phi <= pi (1-d arrays of equal shape, x > 0).

    Step: the trapezoidal error is ~exp(-2 pi c / step) times the growth exp(x (cos psi - cos c)) of
    the integrand on the shifted contour; step = pi^2 / (x + 25) keeps it below ~exp(-25) for c near
    pi/2 at every x.  Reach: the integrand is below exp(-30) once x (cosh t - 1) > 30.
    """
    step_shift, tail = accuracy
    psi = np.pi - phi
    step = np.minimum(0.45, np.pi ** 2 / (x + step_shift))
    with np.errstate(over="ignore", divide="ignore"):
        reach = np.arccosh(1.0 + tail / np.maximum(x, 1e-300))
    reach = np.minimum(reach, 16.0)
    half = np.ceil(reach / step)
    which = np.searchsorted(np.array(_BUCKETS, dtype=float), half)
    which = np.minimum(which, len(_BUCKETS) - 1)
    out = np.empty(x.shape, dtype=complex)
    cos_psi, sin_psi = np.cos(psi), np.sin(psi)
    for b in np.unique(which):
        bucket = _BUCKETS[b]
        grid = np.arange(-bucket, bucket) + 0.5
        idx_all = np.nonzero(which == b)[0]
        for lo in range(0, idx_all.size, _CHUNK):
            idx = idx_all[lo:lo + _CHUNK]
            hs = step[idx]
            t = hs[:, None] * grid[None, :]
            e = np.exp(-t)
            cp, sp = cos_psi[idx], sin_psi[idx]
            xs = x[idx][:, None]
            # exponent -x (cosh t - cos psi) - a t, built in place (the arrays are the cost here)
            arg = 1.0 / e
            arg += e
            arg *= -0.5 * xs
            arg += xs * cp[:, None]
            arg -= a * t
            with np.errstate(under="ignore", over="ignore"):
                w = np.exp(arg, out=arg)
            # 1 / (1 - e^{-t} e^{i psi}) = conj(D) / |D|^2, D = (1 - e cos psi) - i e sin psi, |D|^2 =
            # 1 + e (e - 2 cos psi): with w = h / |D|^2 only sum(w) and sum(w e) are needed
            w /= 1.0 + e * (e - 2.0 * cp[:, None])
            s0 = w.sum(axis=1)
            s1 = np.einsum("ij,ij->i", w, e)
            total_r = hs * (s0 - cp * s1)
            total_i = hs * sp * s1
            ps = psi[idx]
            q = np.exp(-2.0 * np.pi * ps / hs)
            pole = 2j * np.pi * np.exp(-1j * a * ps) * q / (1.0 + q)
            total = total_r + 1j * total_i + pole
            out[idx] = np.exp(1j * a * (np.pi - ps)) - (np.sin(np.pi * a) / np.pi) * total
    return out


def pair_factor(alpha: float, x: np.ndarray, phi: np.ndarray, accuracy=PRECISE) -> np.ndarray:
    """E[exp(i alpha Theta) | slice endpoints] for any real alpha; x > 0, phi in (-pi, pi].
    `accuracy`: PRECISE (default) or SAMPLING (see above)."""
    x = np.asarray(x, dtype=float)
    phi = np.asarray(phi, dtype=float)
    k = np.floor(alpha)
    a = float(alpha - k)
    base = np.exp(1j * k * phi)
    if a == 0.0 or x.size == 0:
        return base.astype(complex)
    if a == 0.5 and getattr(SETTINGS, "closed_half", True):
        # half-integer orders: I_{|m+1/2|} are elementary and the Bessel sum closes into the error
        # function, R(1/2; x, phi) = e^{i phi/2} erf(sqrt(2x) cos(phi/2)) (exact; the test compares it
        # with the Bessel sum); about ten times cheaper than the quadrature
        from scipy.special import erf     # here: importing scipy is slow and most runs never need it
        return base * np.exp(0.5j * phi) * erf(np.sqrt(2.0 * x) * np.cos(0.5 * phi))
    neg = phi < 0
    r = _reduced_factor(a, x, np.abs(phi), accuracy)
    r = np.where(neg, np.conj(r), r)
    return base * r
