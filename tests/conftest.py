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
