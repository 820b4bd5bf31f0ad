"""Benchmark of freeladder.roots.real / freeladder.roots.certify
against baselines run in the same process.

Run: bash tools/bench.sh tests/benchmarks/bench_roots.py
(or, quicker: .venv/bin/python tests/benchmarks/bench_roots.py --quick)
Prints times and their ratios; the machines are noisy, so compare only within one run.

``--large`` times all roots of random chains of reach 1, 2 and 3 at 10^4 and 10^5 terms
(``--huge``: also 10^6), each in a fresh process (peak resident memory), beside LAPACK's
eigenvalue-only routine dsterf on the equivalent tridiagonal of the reach-1 chain and beside
the ladder-only start (no window seeds, the method before seeding) at 10^5; ``--large-only``
skips the rest.
"""

from __future__ import annotations

import json
import os
import subprocess
import sys
import tempfile
import time
from fractions import Fraction

import mpmath
import numba
import numpy as np
import scipy.linalg

from freeladder.roots.certify import certify_chain_roots
from freeladder.roots.real import chain_inverse_power_sums, chain_real_roots


def timed(fn, *args, **kwargs):
    start = time.perf_counter()
    out = fn(*args, **kwargs)
    return out, time.perf_counter() - start


def couplings(m: int, seed: int) -> np.ndarray:
    return np.random.default_rng(seed).uniform(0.3, 1.7, m)


def expanded_coefficients(w: np.ndarray, reach: int) -> np.ndarray:
    """Float coefficients of P_M (constant first): the representation the recurrence avoids."""
    hist = [np.ones(1) for _ in range(reach + 1)]
    for wk in w:
        a, b = hist[-1], hist[0]
        new = np.zeros(max(a.size, b.size + 1))
        new[: a.size] += a
        new[1 : b.size + 1] -= wk * b
        hist = hist[1:] + [new]
    return hist[-1]


def exact_coefficients(w: np.ndarray, reach: int) -> list[Fraction]:
    """The same coefficients in exact rational arithmetic (the float weights are exact)."""
    hist = [[Fraction(1)] for _ in range(reach + 1)]
    for wk in w:
        a, b = hist[-1], hist[0]
        new = a + [Fraction(0)] * (len(b) + 1 - len(a))
        for i, coef in enumerate(b):
            new[i + 1] -= Fraction(float(wk)) * coef
        hist = hist[1:] + [new]
    return hist[-1]


def compile_time() -> float:
    """First call in a fresh process with an empty numba cache (compile included)."""
    code = (
        "import time, numpy as np; t = time.perf_counter();"
        "from freeladder.roots.real import chain_real_roots; chain_real_roots(np.ones(5), 2);"
        "print(time.perf_counter() - t)"
    )
    with tempfile.TemporaryDirectory() as cache:
        env = dict(os.environ, NUMBA_CACHE_DIR=cache)
        out = subprocess.run([sys.executable, "-c", code], env=env, capture_output=True, text=True)
    return float(out.stdout.strip())


def main(quick: bool) -> None:
    print(f"numba {numba.__version__}, threads {numba.get_num_threads()}")
    print(f"compile + first call, fresh cache: {compile_time():.1f} s")
    chain_real_roots(np.ones(10), 2)  # load the cached compiled code

    # 1. Ising (reach 1), 20000 random couplings, against LAPACK on the tridiagonal matrix.
    m = 5000 if quick else 20000
    c = couplings(m, 1)
    r, t_ours = timed(chain_real_roots, c**2, 1)
    ev, t_lapack = timed(scipy.linalg.eigvalsh_tridiagonal, np.zeros(m + 1), c)
    eta, ref = np.sort(r.values**-0.5), np.sort(ev)[-r.count :]
    err = np.max(np.abs(eta - ref)) / ref.max()
    print(
        f"[reach 1, M={m}] ours {t_ours:.2f} s, eigvalsh_tridiagonal {t_lapack:.2f} s, "
        f"ratio lapack/ours {t_lapack / t_ours:.1f}; max |eta - eta_lapack| / eta_max = {err:.1e}"
        f" ({r.sweeps} sweeps, {r.evaluations / r.count:.1f} evaluations per root)"
    )

    # 2. Threads: the same run on one core.
    numba.set_num_threads(1)
    _, t_one = timed(chain_real_roots, c**2, 1)
    numba.set_num_threads(numba.config.NUMBA_NUM_THREADS)
    print(
        f"[reach 1, M={m}] one thread {t_one:.2f} s: two threads are {t_one / t_ours:.2f}x faster"
    )

    # 3. Reach 2, 10^5 random couplings: all roots, sum rules.
    m = 20000 if quick else 100000
    w = couplings(m, 2) ** 2
    r, t = timed(chain_real_roots, w, 2)
    s1, s2 = chain_inverse_power_sums(w, 2)
    e1 = abs(np.sum(1 / r.values) - s1) / s1
    e2 = abs(np.sum(r.values**-2.0) - s2) / s2
    print(
        f"[reach 2, M={m}] all {r.count} roots in {t:.1f} s ({r.sweeps} sweeps, "
        f"{r.evaluations / r.count:.1f} evaluations per root); sum rules: sum eta^2 rel. "
        f"residual {e1:.1e}, sum eta^4 {e2:.1e}"
    )

    # 3b. The same chains of 10^5 terms for reach 1, 2 and 3, beside LAPACK's eigenvalue-only
    # routine dsterf on the equivalent tridiagonal (zero diagonal, M / 2 random off-diagonals:
    # the Ising problem with as many fermions); goal: ratio at most 1.
    n_tri = m // 2
    off = couplings(n_tri - 1, 5)
    _, t_sterf = timed(scipy.linalg.lapack.dsterf, np.zeros(n_tri), off)
    for reach in (1, 2, 3):
        w = couplings(m, 10 + reach) ** 2
        r, t = timed(chain_real_roots, w, reach)
        print(
            f"[reach {reach}, M={m}] all {r.count} roots {t:.1f} s; dsterf on {n_tri} x {n_tri} "
            f"{t_sterf:.1f} s; ratio ours/dsterf {t / t_sterf:.2f}"
        )

    # 4. Gap of a uniform reach-2 chain with 10^6 terms.
    m = 10**6
    g, t = timed(chain_real_roots, np.ones(m), 2, lowest=1)
    print(
        f"[reach 2, M={m}, uniform] gap eta_min = {g.values[0] ** -0.5:.6e} in {t:.2f} s "
        f"({g.sweeps} sweeps)"
    )

    # 5. Accuracy against certified enclosures, reach 2, 2000 random couplings.
    m = 600 if quick else 2000
    w = couplings(m, 3) ** 2
    r, t_ours = timed(chain_real_roots, w, 2)
    enc, t_cert = timed(certify_chain_roots, w, 2, r.values, r.error_bounds)
    mid = enc.values
    rel = np.max((np.abs(r.values - mid) + enc.error_bounds) / r.values)
    est = np.max(r.error_bounds / r.values)
    print(
        f"[reach 2, M={m}] certified={enc.rigorous} ({enc.message}; "
        f"{enc.details['precision']} bits) in "
        f"{t_cert:.1f} s vs {t_ours:.3f} s to find them; proved max relative error {rel:.1e}"
        f", estimated {est:.1e}"
    )

    # 6. Baselines on the expanded coefficients.
    for m in (30, 60, 90, 150):
        w = couplings(m, 4) ** 2
        ours = chain_real_roots(w, 2).values
        coeffs = expanded_coefficients(w, 2)
        z, t_np = timed(np.roots, coeffs[::-1])
        z = np.sort_complex(z)
        err = np.max(np.abs(np.sort(z.real) - ours) / ours)
        print(
            f"[reach 2, M={m}] numpy.roots {t_np * 1e3:.1f} ms, max rel. error {err:.1e}, "
            f"max |imag| {np.max(np.abs(z.imag)):.1e}"
        )
    for m in (30, 60) if quick else (30, 60, 90):
        w = couplings(m, 4) ** 2
        ours, t_ours = timed(chain_real_roots, w, 2)
        with mpmath.workdps(50):
            coeffs = exact_coefficients(w, 2)
            mp = [mpmath.mpf(v.numerator) / v.denominator for v in reversed(coeffs)]
            z, t_mp = timed(mpmath.polyroots, mp, maxsteps=300, extraprec=200)
            err = max(
                abs(float(mpmath.re(a)) - b) / b
                for a, b in zip(sorted(z, key=mpmath.re), ours.values, strict=True)
            )
        print(
            f"[reach 2, M={m}] mpmath.polyroots 50 digits {t_mp:.2f} s vs ours {t_ours * 1e3:.1f}"
            f" ms (ratio {t_mp / t_ours:.0f}); agreement {err:.1e}"
        )


_ONE_RUN = """
import json, resource, sys, time
import numpy as np
from freeladder.roots import real
m, reach, seeded = int(sys.argv[1]), int(sys.argv[2]), sys.argv[3] == "1"
if not seeded:
    real._SEED_TERMS = 10**12
real.chain_real_roots(np.ones(4000), reach)  # compile or load every kernel the run uses
w = np.random.default_rng(10 + reach).uniform(0.3, 1.7, m) ** 2
start = time.perf_counter()
r = real.chain_real_roots(w, reach)
seconds = time.perf_counter() - start
s1, s2 = real.chain_inverse_power_sums(w, reach)
y = r.true_values()[0]
print(json.dumps(dict(
    seconds=seconds, roots=int(r.count), converged=bool(r.converged), sweeps=int(r.sweeps),
    per_root=r.evaluations / r.count, est=float(np.max(r.error_bounds / r.values)),
    sum1=float(abs(np.sum(1 / y) - s1) / s1),
    rss=resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024,
)))
"""

_STERF_RUN = """
import json, resource, sys, time
import numpy as np, scipy.linalg
m = int(sys.argv[1])
w = np.random.default_rng(11).uniform(0.3, 1.7, m) ** 2
# The S x S tridiagonal C^T C with eigenvalues 1 / y_k of the reach-1 chain (M even, S = M / 2):
# the zero-diagonal (M + 1) tridiagonal with off-diagonals sqrt(w) has eigenvalues +-eta,
# ordered even / odd it is [[0, C], [C^T, 0]] with C bidiagonal (common practice).
d = w[0::2] + w[1::2]
e = np.sqrt(w[1:-1:2] * w[2::2])
start = time.perf_counter()
out = scipy.linalg.lapack.dsterf(d, e)
seconds = time.perf_counter() - start
assert out[-1] == 0
rss = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024
print(json.dumps(dict(seconds=seconds, rss=rss)))
"""


def _child(code: str, *args: object) -> dict:
    out = subprocess.run(
        [sys.executable, "-c", code, *map(str, args)], capture_output=True, text=True, check=False
    )
    if out.returncode:
        raise RuntimeError(out.stderr[-2000:])
    return json.loads(out.stdout.strip().splitlines()[-1])


def large(sizes: tuple[int, ...]) -> None:
    """All roots at 10^4 .. 10^6 terms, one process per run (see the module docstring)."""
    print(f"load average before: {os.getloadavg()}")
    print("reach    terms  seconds  sweeps  evals/root  peak MiB  max est.  sum-rule residual")
    sterf = {}
    for m in sizes:
        if m <= 10**5:
            sterf[m] = _child(_STERF_RUN, m)
        for reach in (1, 2, 3):
            r = _child(_ONE_RUN, m, reach, 1)
            print(
                f"{reach:5d} {m:8d} {r['seconds']:8.1f} {r['sweeps']:7d} {r['per_root']:11.2f} "
                f"{r['rss']:9.0f} {r['est']:9.1e} {r['sum1']:9.1e}   {os.getloadavg()[0]:.1f} load",
                flush=True,
            )
            if m in sterf:
                ratio = r["seconds"] / sterf[m]["seconds"]
                print(
                    f"      dsterf on the {m // 2} x {m // 2} equivalent tridiagonal "
                    f"{sterf[m]['seconds']:.1f} s: ratio ours / dsterf {ratio:.2f}",
                    flush=True,
                )
            if m == 10**5:
                p = _child(_ONE_RUN, m, reach, 0)
                print(
                    f"      ladder-only start (no seeds) {p['seconds']:.1f} s, "
                    f"{p['per_root']:.2f} evals/root: seeded is {p['seconds'] / r['seconds']:.2f}x"
                    " faster",
                    flush=True,
                )
    print(f"load average after: {os.getloadavg()}")


if __name__ == "__main__":
    if "--large" in sys.argv or "--huge" in sys.argv or "--large-only" in sys.argv:
        large((10**4, 10**5, 10**6) if "--huge" in sys.argv else (10**4, 10**5))
    if "--large-only" not in sys.argv:
        main("--quick" in sys.argv)
