"""Benchmark: the edge autocorrelation through the modes against sparse exact evolution.

``fl.autocorrelation`` of random reach-2 chains (couplings uniform in [0.5, 1.5]) at 10^3, 10^4
and 10^5 terms, 10^3 time points each: wall and CPU seconds, and the largest weight error and
sum-rule residual.  Beside it, the same trace by sparse exact evolution
(``scipy.sparse.linalg.expm_multiply``, random-vector typicality with 2 vectors) of the largest
chain that fits here (14 sites, dimension 16384), timed over 10^3 time points, with the
difference between the two and the typicality error ``1 / sqrt(2 dim)``.  Printed ratios: exact
evolution at 14 sites over the modes at each size (above 1: the modes are faster).
Goal: 10^4 terms and 10^3 times under 10 s.  The load average is printed before and after
(the machine is shared: wall time under load is several times the CPU time).  A warm-up on
3000 terms loads every compiled path first (the root finder's parallel sweep is used only
above a size), so the timings hold no compilation.

Run with ``bash tools/bench.sh tests/benchmarks/bench_dynamics.py``; pass the sizes to run,
e.g. ``python tests/benchmarks/bench_dynamics.py 1000 10000``.
"""

from __future__ import annotations

import os
import sys
import time

import numpy as np
import scipy.sparse.linalg as spla

import freeladder as fl


def timed(fn):  # type: ignore[no-untyped-def]
    wall, cpu = time.perf_counter(), time.process_time()
    out = fn()
    return out, time.perf_counter() - wall, time.process_time() - cpu


def exact_run(m: fl.Model, chi: str, times: np.ndarray, reps: int) -> np.ndarray:
    h = m.to_sparse().tocsr()
    x = fl.parse_model(chi, sites=m.sites).to_sparse().tocsr()
    rng = np.random.default_rng(1)
    out = np.zeros(times.size, dtype=complex)
    kw = dict(start=float(times[0]), stop=float(times[-1]), num=times.size, endpoint=True)
    for _ in range(reps):
        v = rng.normal(size=h.shape[0]) + 1j * rng.normal(size=h.shape[0])
        v /= np.linalg.norm(v)
        phi = spla.expm_multiply(-1j * h, v, **kw)
        psi = spla.expm_multiply(-1j * h, x @ v, **kw)
        out += np.einsum("ti,ti->t", psi.conj(), (x @ phi.T).T)
    return out / reps


def main() -> None:
    sizes = [int(a) for a in sys.argv[1:]] or [1000, 10_000, 100_000]
    times = np.linspace(0.0, 100.0, 1000)
    print(f"load average {os.getloadavg()[0]:.2f} (1 min) at the start")
    warm = fl.random_couplings(3000, 0.5, 1.5, 3)
    fl.autocorrelation(fl.exclusion_chain(3000, reach=2, couplings=list(warm)), times)
    small = fl.exclusion_chain(12, reach=2, couplings=list(fl.random_couplings(12, 0.5, 1.5, 2)))
    reps = 2
    modes = fl.autocorrelation(small, times)
    exact, t_exact, c_exact = timed(lambda: exact_run(small, modes.operator, times, reps))
    dim = 2 ** len(small.sites)
    diff = float(np.max(np.abs(exact - modes.values)))
    print(
        f"sparse exact evolution, 14 sites (dim {dim}), {reps} vectors, {times.size} times: "
        f"{t_exact:.1f} s wall, {c_exact:.1f} s CPU; |modes - exact| = {diff:.2g} "
        f"(typicality error ~ {1 / np.sqrt(reps * dim):.2g})"
    )
    for size in sizes:
        c = fl.random_couplings(size, 0.5, 1.5, 1)
        m = fl.exclusion_chain(size, reach=2, couplings=list(c))
        a, wall, cpu = timed(lambda m=m: fl.autocorrelation(m, times))
        e = a.expansion
        print(
            f"{size:>7} terms, {len(e.weights)} modes, {times.size} times: {wall:.2f} s wall, "
            f"{cpu:.2f} s CPU; largest weight error {float(e.weight_errors.max()):.1g}, "
            f"sum rules {max(e.sum_rules.values()):.1g}; exact(14 sites) / modes: "
            f"{t_exact / wall:.2f} (wall), {c_exact / cpu:.2f} (CPU)"
        )
    print(f"load average {os.getloadavg()[0]:.2f} (1 min) at the end")


if __name__ == "__main__":
    main()
