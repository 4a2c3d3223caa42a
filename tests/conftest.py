import os
import subprocess
import sys
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parent.parent


def run_cli(*args, cwd=None, input_text=None, env_extra=None):
    """Run `python -m clusterexp ...` from the checkout; returns the CompletedProcess."""
    env = dict(os.environ)
    env["PYTHONPATH"] = str(ROOT) + os.pathsep + env.get("PYTHONPATH", "")
    env.update(env_extra or {})
    return subprocess.run([sys.executable, "-m", "clusterexp", *args], cwd=cwd or ROOT, env=env,
                          capture_output=True, text=True, input=input_text, timeout=300)


@pytest.fixture
def cli():
    return run_cli


def wu_iteration(g, N):
    """Independent route for exclusion statistics on one level, written with plain sympy: iterate
    Wu's equations u_i = z_i (1 + u_i) prod_j (1 + u_j)^(-g_ji) with the binomial series, truncated by
    total degree N, and return {multi-index: coefficient of sum_i ln(1 + u_i)}."""
    import sympy
    K = len(g)
    z = sympy.symbols(f"z0:{K}")
    s = sympy.Symbol("s")

    def truncate(expr):
        expr = sympy.expand(expr.subs({v: s * v for v in z}, simultaneous=True))
        return sum(expr.coeff(s, k) for k in range(N + 1))

    def binomial_series(u, a):
        return truncate(sum(sympy.binomial(a, k) * u ** k for k in range(N + 1)))

    u = [sympy.Integer(0)] * K
    for _ in range(N):
        u = [truncate(z[i] * (1 + u[i]) * sympy.Mul(*(binomial_series(u[j], -g[j][i]) for j in range(K))))
             for i in range(K)]
    log = lambda x: truncate(sum((-1) ** (k + 1) * x ** k / k for k in range(1, N + 1)))
    pressure = sympy.Poly(truncate(sum(log(ui) for ui in u)), *z)
    return dict(zip(pressure.monoms(), pressure.coeffs()))


def virial_by_iteration(b, N):
    """Independent cluster -> virial route written with plain sympy (no project code): solve
    rho_i = z_i d/dz_i sum_n b_n z^n for z(rho) by the fixed-point iteration
    z_i = (rho_i - sum_{|m|>=2} m_i b_m z^m) / b_{e_i} (one order gained per pass, N passes, truncated by
    total degree N), substitute into beta P lambda^d = sum_n b_n z^n and return {multi-index: a_n}.
    `b` maps every multi-index up to total order N (single particles included) to a polynomial in
    any symbols; sympy's sparse polynomial ring in (s, rho) does the arithmetic, its coefficients
    polynomials (or, when some b_{e_i} is not a number, rational functions) in those symbols."""
    import sympy
    K = len(next(iter(b)))
    rho = sympy.symbols(f"r0:{K}")
    s = sympy.Symbol("s")
    others = sorted(set().union(*(sympy.sympify(v).free_symbols for v in b.values())), key=str)
    unit = [tuple(int(j == i) for j in range(K)) for i in range(K)]
    # coefficients: polynomials in the other symbols, or rational functions when a b_{e_i} depends on them
    if not others:
        domain = sympy.QQ
    elif all(sympy.sympify(b[u]).is_number for u in unit):
        domain = sympy.QQ.poly_ring(*others)
    else:
        domain = sympy.QQ.frac_field(*others)
    R, s_, *rho_ = sympy.ring([s, *rho], domain)
    values = {n: R.from_expr(sympy.sympify(v)) for n, v in b.items()}

    def truncate(p):
        return R.from_dict({m: c for m, c in p.items() if m[0] <= N})

    def monomial(zs, n):
        product = R.one
        for v, k in zip(zs, n):
            for _ in range(k):
                product = truncate(product * v)
        return product

    inverse = [R.domain.convert(1) / R.domain.from_sympy(sympy.sympify(b[u])) for u in unit]
    guess = [s_ * rho_[i] * inverse[i] for i in range(K)]
    for _ in range(N):
        powers = {n: monomial(guess, n) for n in b if sum(n) >= 2}
        guess = [(s_ * rho_[i] - sum((n[i] * values[n] * powers[n] for n in powers), R.zero)) * inverse[i]
                 for i in range(K)]
    pressure = sum((values[n] * monomial(guess, n) for n in b), R.zero)
    out = {}
    for m, c in truncate(pressure).items():
        if sum(m[1:]) == m[0]:
            out[m[1:]] = sympy.expand(R.domain.to_sympy(c))
    return out
