"""Certified over fast: proved enclosures of chain roots against the fast (estimated) roots.

Run: PYTHONPATH=kernel_lib .venv/bin/python tests/benchmarks/bench_certify.py [--full]
For each size: time of the fast path (count bisection + Laguerre, error estimates), time of the
certificate (sign changes of the recurrence enclosed in float64, freeladder.roots.certify),
their ratio, the largest and median proved relative bound, and how many fast error estimates
the proved intervals show to be exceeded.  Random couplings in [0.3, 1.7] (weights c**2) for
reach 1, 2 and 3, and the uniform chain; a summary table of the ratios at the end (goal: at
most 10).  The machines are noisy: compare ratios within one run.  ``--full`` adds 10^5 terms
(minutes).
"""

from __future__ import annotations

import sys
import threading
import time

import numpy as np

from freeladder.roots.certify import certify_chain_roots
from freeladder.roots.real import chain_real_roots


def timed(fn, *args, **kwargs):
    start = time.perf_counter()
    out = fn(*args, **kwargs)
    return out, time.perf_counter() - start


def exceeded(fast, enc) -> tuple[int, float]:
    """Fast estimates the proved intervals show to be too small: count and worst factor."""
    proved_min_err = np.maximum(np.abs(fast.values - enc.values) - enc.error_bounds, 0.0)
    bad = proved_min_err > fast.error_bounds
    worst = float(np.max(proved_min_err / fast.error_bounds)) if np.any(bad) else 0.0
    return int(bad.sum()), worst


def run_case(label: str, w: np.ndarray, reach: int, limit: float) -> float | None:
    """Print one case; return the ratio certified / fast (None when stopped waiting)."""
    fast, t_fast = timed(chain_real_roots, w, reach)
    box: dict = {}

    def target() -> None:
        box["enc"], box["t"] = timed(certify_chain_roots, w, reach, fast.values, fast.error_bounds)

    worker = threading.Thread(target=target, daemon=True)
    worker.start()
    worker.join(limit)
    if worker.is_alive():
        print(
            f"{label}: fast {t_fast:.2f} s; certificate still running after {limit:.0f} s "
            f"(ratio > {limit / t_fast:.0f}) -- stopped waiting"
        )
        return None
    enc, t_cert = box["enc"], box["t"]
    n_bad, worst = exceeded(fast, enc)
    print(
        f"{label}: fast {t_fast:.2f} s, certified {t_cert:.2f} s, ratio {t_cert / t_fast:.1f}; "
        f"rigorous={enc.rigorous} ({enc.sweeps} rounds, {enc.details['precision']} bits); "
        f"largest proved relative bound {np.max(enc.error_bounds / enc.values):.1e}, "
        f"median {np.median(enc.error_bounds / enc.values):.1e}; "
        f"fast estimates proved too small: {n_bad} of {fast.count}"
        + (f" (by up to {worst:.1f}x)" if n_bad else ""),
        flush=True,
    )
    return t_cert / t_fast


def main(full: bool) -> None:
    certify_chain_roots([1.0, 1.0, 1.0], 2, [0.5])  # load the compiled code
    certify_chain_roots([1.0, 1.0], 1, [0.5])
    for reach in (1, 2, 3):
        chain_real_roots(np.ones(10), reach)
    sizes = (1000, 10_000, 100_000) if full else (1000, 10_000)
    rng = np.random.default_rng(2026)
    for m in sizes:
        run_case(f"[reach 1, M={m}, uniform]", np.ones(m), 1, limit=120.0)
    ratios: dict[tuple[int, int], float | None] = {}
    for reach in (1, 2, 3):
        for m in sizes:
            w = rng.uniform(0.3, 1.7, m) ** 2
            ratios[reach, m] = run_case(f"[reach {reach}, M={m}, random]", w, reach, limit=600.0)
    print("certified / fast (goal: at most 10), random couplings in [0.3, 1.7]:")
    for reach in (1, 2, 3):
        cells = ", ".join(
            f"M={m}: " + ("stopped" if ratios[reach, m] is None else f"{ratios[reach, m]:.1f}")
            for m in sizes
        )
        print(f"  reach {reach}: {cells}")


if __name__ == "__main__":
    main("--full" in sys.argv)
