"""Benchmark: the gap of long random chains, far below float64 when it must be.

Run: .venv/bin/python tests/benchmarks/bench_gaps.py            (10^5 and 10^6 terms)
     .venv/bin/python tests/benchmarks/bench_gaps.py --huge     (also 10^7: minutes)
     (or FREELADDER_BENCH_HUGE=1)

For random couplings c_j uniform in [0.3, 1.7] (reach 1 and reach 2, fixed seeds) it finds the
smallest quasi-energy eta_1 = y_max**(-1/2) with ``chain_real_roots(c**2, p, lowest=1)`` and
prints, per case, the time, ``log10 eta_1`` and two independent checks:

(a) mpmath (``mpf`` has an unbounded exponent): the linear recurrence
    ``P_k = P_{k-1} - y w_k P_{k-p-1}`` at 256 bits, at the points ``y (1 -+ d)`` for
    ``d`` in 4e-15, 1e-14, 1e-13, 1e-12, all in one pass over the chain.  The smallest ``d``
    at which ``P_M`` changes sign between the two points, with the sign-change counts
    S - 1 and S there, bounds the relative error of y (a root lies in the bracket, and it
    is the largest: the count is proved for reach 1, the tested property of
    :mod:`freeladder.roots.real` for reach 2).  A full mpmath bisection would need about 200
    such passes, hours at 10^6 terms in pure Python; this bracket test needs one.
(b) reach 1 only: LAPACK's bisection ``dstebz`` through
    ``scipy.linalg.eigvalsh_tridiagonal(zeros(M + 1), c, select="i", tol=2 * tiny)`` on the
    zero-diagonal tridiagonal matrix with off-diagonals c (its positive eigenvalues are the
    eta_k; M odd, so no zero eigenvalue).  It cannot represent eta below about 1e-308, so
    the comparison is skipped there (said in the output).  With its default tolerance
    (about eps * |T|) it returns ~1e-16 instead of a tiny eigenvalue: shown once.
Times are wall-clock on a shared machine: compare ratios within one run.
"""

from __future__ import annotations

import math
import os
import sys
import time

import mpmath
import numpy as np
import scipy.linalg

from freeladder.roots.real import chain_real_roots


def mpmath_bracket(w: np.ndarray, reach: int, mant: float, exp2: int) -> float | None:
    """Smallest d with a certified-at-256-bits sign change of P_M over y (1 -+ d), or None."""
    deltas = [4e-15, 1e-14, 1e-13, 1e-12]
    with mpmath.workprec(256):
        y = mpmath.mpf(mant) * mpmath.mpf(2) ** exp2
        points = [y * (1 - mpmath.mpf(d)) for d in deltas] + [
            y * (1 + mpmath.mpf(d)) for d in deltas
        ]
        n = len(points)
        hist = [[mpmath.mpf(1)] * n for _ in range(reach + 1)]  # P_{k-p-1} ... P_{k-1}
        changes = [0] * n
        for wk in w:
            wm = mpmath.mpf(float(wk))
            new = [hist[-1][i] - points[i] * wm * hist[0][i] for i in range(n)]
            for i in range(n):
                changes[i] += (new[i] < 0) != (hist[-1][i] < 0) or new[i] == 0
            hist = hist[1:] + [new]
        last = hist[-1]
    total = (w.size + reach) // (reach + 1)
    half = len(deltas)
    for i, d in enumerate(deltas):
        lo, hi = i, i + half
        if last[lo] * last[hi] < 0 and changes[lo] == total - 1 and changes[hi] == total:
            return d
    return None


def lapack_gap(c: np.ndarray, tol: float) -> tuple[float, float]:
    n = c.size + 1
    start = time.perf_counter()
    ev = scipy.linalg.eigvalsh_tridiagonal(
        np.zeros(n), c, select="i", select_range=(n // 2, n // 2), tol=tol
    )
    return float(ev[0]), time.perf_counter() - start


def main(huge: bool) -> None:
    sizes = [10**5 + 1, 10**6 + 1] + ([10**7 + 1] if huge else [])
    tiny = float(np.finfo(np.float64).tiny)
    chain_real_roots(np.ones(300), 1, lowest=1)  # load the compiled code
    chain_real_roots(np.ones(300), 2, lowest=1)
    if not huge:
        print("(10^7 terms skipped: pass --huge or set FREELADDER_BENCH_HUGE=1; minutes)")
    shown_default = False
    for reach in (1, 2):
        for m in sizes:
            c = np.random.default_rng(1000 + reach).uniform(0.3, 1.7, m)
            start = time.perf_counter()
            r = chain_real_roots(c**2, reach, lowest=1)
            ours = time.perf_counter() - start
            log_eta = float(r.log_quasi_energies(2)[0][0])
            log10 = log_eta / math.log(10.0)
            line = (
                f"reach {reach}, M = {m:>8}: {ours:7.2f} s, {r.sweeps} sweeps, "
                f"{r.evaluations} evaluations, eta_1 = 10^{log10:.6f} "
                f"(estimated rel. error {r.error_bounds[0] / r.values[0]:.1e})"
            )
            print(line, flush=True)
            if m <= 10**6 + 1:
                start = time.perf_counter()
                d = mpmath_bracket(c**2, reach, float(r.values[0]), int(r.exponents[0]))
                spent = time.perf_counter() - start
                verdict = f"relative error <= {d:.0e}" if d else "NO sign change within 1e-12"
                print(f"    (a) mpmath 256-bit bracket: {verdict} ({spent:.1f} s)", flush=True)
            else:
                print("    (a) mpmath bracket skipped at 10^7 (about an hour in pure Python)")
            if reach != 1:
                continue
            if log10 < math.log10(tiny):
                print("    (b) LAPACK skipped: eta_1 lies below float64's range")
                continue
            ev, spent = lapack_gap(c, 2 * tiny)
            eta = math.exp(log_eta)
            print(
                f"    (b) LAPACK dstebz (tol 2*tiny): {spent:.2f} s, eta_1 = {ev:.15e}, "
                f"relative difference {abs(ev - eta) / eta:.1e}, time ratio ours/LAPACK "
                f"{ours / spent:.2f}",
                flush=True,
            )
            if not shown_default:
                shown_default = True
                ev0, _ = lapack_gap(c, 0.0)
                print(f"    (b') LAPACK with its default tolerance returns {ev0:.3e} (not eta_1)")


if __name__ == "__main__":
    main("--huge" in sys.argv or os.environ.get("FREELADDER_BENCH_HUGE") == "1")
