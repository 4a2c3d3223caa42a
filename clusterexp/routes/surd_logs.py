"""Exact arithmetic for sums of logarithms of quadratic surds, and their canonical form.

The closed form of the link squared (docs/perturbative.md, section 4k) is a rational number plus rational
multiples of logarithms, where every logarithm's argument and coefficient lie in one quadratic field
Q(sqrt D) per pair of strand lags. `Surd` is an element a + b sqrt(D) of such a field (exact Fractions, D
squarefree); `LogSum` is c_0 + sum_k c_k ln|w_k| with surd coefficients and arguments. `canonical` turns a
real, Galois-invariant LogSum into the sympy expression

    q_0 + sum_p q_p ln p + sum_D sqrt(D) sum_u q_u ln u      (p prime; u > 1 in Q(sqrt D) of norm +-1),

with rational q's: the rational part, the logarithms of primes, and per field the logarithms of its
norm-one elements. The reduction is that of Galois conjugation (sqrt D -> -sqrt D): for c = c_0 + c_1 sqrt D
and w in Q(sqrt D), c ln|w| + conj(c) ln|conj(w)| = c_0 ln|N(w)| + c_1 sqrt(D) ln|w / conj(w)|, and the
conjugation-odd remainder of a real invariant sum vanishes. `canonical` checks that at 60 digits (an
internal error otherwise) instead of assuming it.
"""
from __future__ import annotations

from fractions import Fraction
from math import isqrt

import mpmath


def squarefree(n: int) -> tuple[int, int]:
    """(k, D) with n = k^2 D, D squarefree (n > 0)."""
    k, D, f = 1, 1, 2
    while f * f <= n:
        while n % (f * f) == 0:
            n //= f * f
            k *= f
        if n % f == 0:
            n //= f
            D *= f
        f += 1
    return k, D * n


def _primes(n: int) -> dict:
    """{prime: exponent} of a positive integer."""
    out, f = {}, 2
    while f * f <= n:
        while n % f == 0:
            out[f] = out.get(f, 0) + 1
            n //= f
        f += 1
    if n > 1:
        out[n] = out.get(n, 0) + 1
    return out


class Surd:
    """a + b sqrt(D), a and b Fractions, D a squarefree integer >= 1 (D = 1: b = 0, a rational)."""

    __slots__ = ("a", "b", "D")

    def __init__(self, a, b=0, D: int = 1):
        a, b = Fraction(a), Fraction(b)
        if D == 1 or b == 0:
            a, b, D = a + b, Fraction(0), 1   # (sqrt 1 = 1)
        self.a, self.b, self.D = a, b, D

    @classmethod
    def sqrt(cls, x) -> "Surd":
        """sqrt(x) of a non-negative rational x."""
        if isinstance(x, Surd):
            if x.D != 1:
                raise ValueError(f"square root of an irrational surd {x}")
            x = x.a
        x = Fraction(x)
        if x < 0:
            raise ValueError(f"square root of a negative number {x}")
        k_num, d_num = squarefree(x.numerator * x.denominator) if x else (0, 1)
        return cls(0, Fraction(k_num, x.denominator), d_num) if d_num > 1 else cls(Fraction(k_num, x.denominator))

    def _field(self, other: "Surd") -> int:
        if self.D == 1 or other.D == 1 or self.D == other.D:
            return max(self.D, other.D)
        raise ArithmeticError(f"sqrt({self.D}) and sqrt({other.D}) in one product: not a quadratic field")

    def __add__(self, other):
        if isinstance(other, LogSum):
            return other + self
        other = _surd(other)
        return Surd(self.a + other.a, self.b + other.b, self._field(other))

    __radd__ = __add__

    def __neg__(self):
        return Surd(-self.a, -self.b, self.D)

    def __sub__(self, other):
        return self + (-other if isinstance(other, LogSum) else -_surd(other))

    def __rsub__(self, other):
        return _surd(other) - self

    def __mul__(self, other):
        if isinstance(other, LogSum):
            return other * self
        other = _surd(other)
        D = self._field(other)
        return Surd(self.a * other.a + self.b * other.b * D, self.a * other.b + self.b * other.a, D)

    __rmul__ = __mul__

    def conjugate(self) -> "Surd":
        return Surd(self.a, -self.b, self.D)

    def norm(self) -> Fraction:
        return self.a * self.a - self.b * self.b * self.D

    def __truediv__(self, other):
        other = _surd(other)
        if other.norm() == 0:
            raise ZeroDivisionError("division by zero")
        return self * other.conjugate() * Surd(1 / other.norm())

    def __rtruediv__(self, other):
        return _surd(other) / self

    def sign(self) -> int:
        """The sign of the real number a + b sqrt(D), exactly."""
        sa, sb = (self.a > 0) - (self.a < 0), (self.b > 0) - (self.b < 0)
        if sa == sb or sb == 0:
            return sa
        if sa == 0:
            return sb
        return sa if self.a * self.a > self.b * self.b * self.D else sb

    def __abs__(self):
        return -self if self.sign() < 0 else self

    def __eq__(self, other):
        if isinstance(other, (int, Fraction, Surd)):
            other = _surd(other)
            return (self.a, self.b, self.D) == (other.a, other.b, other.D)
        return NotImplemented

    def __hash__(self):
        return hash((self.a, self.b, self.D))

    def __lt__(self, other):
        return (self - other).sign() < 0

    def __ge__(self, other):
        return (self - other).sign() >= 0

    def __gt__(self, other):
        return (self - other).sign() > 0

    def mp(self) -> mpmath.mpf:
        return mpmath.mpf(self.a.numerator) / self.a.denominator + \
            mpmath.mpf(self.b.numerator) / self.b.denominator * mpmath.sqrt(self.D)

    def sympy(self):
        import sympy
        return sympy.Rational(self.a.numerator, self.a.denominator) + \
            sympy.Rational(self.b.numerator, self.b.denominator) * sympy.sqrt(self.D)

    def __repr__(self):
        return f"Surd({self.a}, {self.b}, {self.D})"


def _surd(x) -> Surd:
    if isinstance(x, Surd):
        return x
    if isinstance(x, (int, Fraction)) and not isinstance(x, bool):
        return Surd(x)
    raise TypeError(f"not an exact number: {x!r}")


class LogSum:
    """c_0 + sum_k c_k ln|w_k|: `constant` {D: Surd in Q(sqrt D)}, `terms` [(c_k, w_k)] with surd c_k, w_k
    (w_k != 0)."""

    __slots__ = ("constant", "terms")

    def __init__(self, constant=None, terms=()):
        self.constant = dict(constant or {})
        self.terms = list(terms)

    @classmethod
    def log(cls, w) -> "LogSum":
        w = _surd(w)
        if w == 0:
            raise ValueError("logarithm of zero")
        return cls({}, [(Surd(1), w)])

    def __add__(self, other):
        if not isinstance(other, LogSum):
            other = _surd(other)
            other = LogSum({other.D: other})
        constant = dict(self.constant)
        for D, c in other.constant.items():
            constant[D] = constant.get(D, Surd(0)) + c
        return LogSum(constant, self.terms + other.terms)

    __radd__ = __add__

    def __neg__(self):
        return self * Surd(-1)

    def __sub__(self, other):
        return self + (-other)

    def __rsub__(self, other):
        return (-self) + other

    def __mul__(self, other):
        if isinstance(other, LogSum):
            raise ArithmeticError("a product of two logarithms is not a sum of logarithms")
        other = _surd(other)
        constant = {}
        for c in self.constant.values():
            c = c * other
            constant[c.D] = constant.get(c.D, Surd(0)) + c
        return LogSum(constant, [(c * other, w) for c, w in self.terms])

    __rmul__ = __mul__

    def __truediv__(self, other):
        return self * (Surd(1) / _surd(other))

    def mp(self) -> mpmath.mpf:
        return sum((c.mp() for c in self.constant.values()), mpmath.mpf(0)) + \
            sum((c.mp() * mpmath.log(abs(w.mp())) for c, w in self.terms), mpmath.mpf(0))


def _unit_key(u: Surd) -> Surd:
    """u or 1/u, whichever is > 1 (u > 0 of norm +-1 in Q(sqrt D)); the sign of the logarithm changes."""
    return u if u > 1 else Surd(1) / u


def canonical(value: LogSum, digits: int = 60):
    """The sympy expression q_0 + sum_p q_p ln p + sum_D sqrt(D) sum_u q_u ln u of a real LogSum that is
    invariant under every Galois conjugation (see the module's docstring). Raises ArithmeticError when
    the conjugation-odd part does not vanish to `digits` digits (then the sum was not invariant)."""
    import sympy
    rational = Fraction(0)
    primes: dict = {}
    units: dict = {}           # D -> {u: q}
    odd = []                   # (float-able parts) that must cancel
    for D, c in value.constant.items():
        if D == 1:
            rational += c.a
        else:
            odd.append(c.mp())

    def add_rational_log(q: Fraction, x: Fraction):
        x = abs(x)
        for p, e in _primes(x.numerator).items():
            primes[p] = primes.get(p, Fraction(0)) + q * e
        for p, e in _primes(x.denominator).items():
            primes[p] = primes.get(p, Fraction(0)) - q * e
    with mpmath.workdps(digits + 10):
        for c, w in value.terms:
            if w.D == 1:
                if c.D == 1:
                    add_rational_log(c.a, w.a)
                else:   # an irrational multiple of the logarithm of a rational: odd, must cancel
                    add_rational_log(c.a, w.a)
                    odd.append(c.b * mpmath.sqrt(c.D) * mpmath.log(abs(w.a)))
                continue
            # c ln|w| = (c0 L + c1 sqrt(D) M)/2 + (c1 sqrt(D) L + c0 M)/2, L = ln|N w|, M = ln|w / conj w|
            u = abs(w / w.conjugate())
            add_rational_log(c.a / 2, w.norm())
            if c.b and u != 1:   # (u = 1: w is a rational multiple of sqrt D)
                key = _unit_key(u)
                units.setdefault(w.D, {})
                units[w.D][key] = units[w.D].get(key, Fraction(0)) + (c.b / 2 if key == u else -c.b / 2)
            L, M = mpmath.log(abs(w.norm().numerator)) - mpmath.log(w.norm().denominator), mpmath.log(u.mp())
            odd.append(c.b * mpmath.sqrt(w.D) * L / 2 + c.a * M / 2)
        total_odd = sum(odd, mpmath.mpf(0))
        scale = max([abs(value.mp()), mpmath.mpf(1)])
        if abs(total_odd) > mpmath.mpf(10) ** (-digits) * scale:
            raise ArithmeticError(f"the sum of logarithms is not invariant under conjugation (odd part {total_odd})")
    out = sympy.Rational(rational.numerator, rational.denominator)
    for p in sorted(primes):
        if primes[p]:
            out += sympy.Rational(primes[p].numerator, primes[p].denominator) * sympy.log(p)
    for D in sorted(units):
        for u, q in _powers_merged(units[D]).items():
            if q:
                out += sympy.Rational(q.numerator, q.denominator) * sympy.sqrt(D) * sympy.log(u.sympy())
    return out


def _rational_sqrt(x: Fraction) -> Fraction | None:
    if x < 0:
        return None
    n, d = isqrt(x.numerator), isqrt(x.denominator)
    return Fraction(n, d) if n * n == x.numerator and d * d == x.denominator else None


def _square_root(u: Surd) -> Surd | None:
    """g > 1 in Q(sqrt D) with g^2 = u (u > 1 of norm +-1), or None. N(g) = +-1, so the rational part x of
    g has x^2 = (a + N(g))/2 for u = a + b sqrt D."""
    for s in (1, -1):
        x = _rational_sqrt((u.a + s) / 2)
        if x:
            g = Surd(x, u.b / (2 * x), u.D)
            if g * g == u and g > 1:
                return g
    return None


def _power(u: Surd, k: int) -> Surd:
    """u^k for any integer k (u != 0)."""
    base, out = (u if k >= 0 else Surd(1) / u), Surd(1)
    for _ in range(abs(k)):
        out = out * base
    return out


def _height(u: Surd) -> int:
    return max(abs(u.a.numerator), abs(u.b.numerator), u.a.denominator, u.b.denominator)


def _rooted(logs: dict) -> dict:
    """{u: q} with every u that is a square in Q(sqrt D) replaced by its root: q ln(7 + 4 sqrt 3) =
    2 q ln(2 + sqrt 3)."""
    out: dict = {}
    for u, q in logs.items():
        while (g := _square_root(u)) is not None:
            u, q = g, 2 * q
        out[u] = out.get(u, Fraction(0)) + q
    return out


def _powers_merged(logs: dict, largest: int = 60) -> dict:
    """{u: q} (u > 1, norm +-1) with fewer terms, same value: every multiplicative relation prod u^m_u = 1
    with |m_u| <= `largest` that PSLQ finds among the u (verified exactly) removes one u, the one whose
    removal leaves the fewest terms (ties: the largest numbers); squares are replaced by their roots.
    E.g. q ln((11 + 4 sqrt 7)/3) + q ln((4 + sqrt 7)/3) = q ln(8 + 3 sqrt 7)."""
    logs = {u: q for u, q in _rooted(logs).items() if q}
    with mpmath.workdps(50):
        while len(logs) >= 2:
            us = sorted(logs, key=lambda x: x.mp())
            relation = mpmath.pslq([mpmath.log(u.mp()) for u in us], maxcoeff=largest, maxsteps=10 ** 4)
            if relation is None:
                break
            product = Surd(1)
            for u, m in zip(us, relation):
                product = product * _power(u, m)
            if product != 1:
                break          # PSLQ's relation is not exact: keep the terms as they are
            best = None
            for k, m in enumerate(relation):
                if not m:
                    continue   # ln us[k] = -sum_{l != k} (m_l / m_k) ln us[l]
                trial = dict(logs)
                q = trial.pop(us[k])
                for u, ml in zip(us, relation):
                    if u != us[k] and ml:
                        trial[u] = trial[u] - q * Fraction(ml, m)
                trial = {u: c for u, c in trial.items() if c}
                key = (len(trial), -_height(us[k]))
                if best is None or key < best[0]:
                    best = (key, trial)
            logs = _rooted(best[1])
    logs = _equal_coefficients_merged(logs)
    return {u: logs[u] for u in sorted(logs, key=lambda x: x.mp())}


def _equal_coefficients_merged(logs: dict) -> dict:
    """q ln u + q ln v = q ln(u v) (and q ln u - q ln v = q ln(u / v)) wherever the merged element, after
    square roots, is no larger in its numbers than the larger of u and v."""
    merged = True
    while merged:
        merged = False
        us = sorted(logs, key=lambda x: x.mp())
        for k, u in enumerate(us):
            for v in us[k + 1:]:
                if abs(logs[u]) != abs(logs[v]):
                    continue
                w = _unit_key(u * v if logs[u] == logs[v] else v / u)
                q = logs[v]
                if w == 1 or _height(w) > max(_height(u), _height(v)):
                    continue
                rooted = _rooted({w: q})
                del logs[u], logs[v]
                for x, c in rooted.items():
                    logs[x] = logs.get(x, Fraction(0)) + c
                logs = {x: c for x, c in logs.items() if c}
                merged = True
                break
            if merged:
                break
    return logs
