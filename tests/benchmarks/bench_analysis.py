"""Benchmark: a coupling change re-analyses only what depends on the couplings.

For reach-2 chains of 24, 200 and 2000 terms, time a first full analysis (verdict, charge
counts, polynomial, free spectrum) and then the same parts after ``with_couplings`` (new random
couplings on the same strings).  The ratio second / first is the share of the work that a
coupling slider still pays; the goal is at most 0.2.  A third column times the same work on a
model built from scratch with the new couplings (nothing shared), the baseline a slider would
pay without the shared structure.

Run with ``bash tools/bench.sh tests/benchmarks/bench_analysis.py``.
"""

from __future__ import annotations

import time

import numpy as np

import freeladder as fl


def _work(a: fl.Analysis) -> None:
    _ = a.verdict.kind, a.charge_counts, a.polynomial.degree, a.spectrum().ground_energy


def _timed(fn) -> float:
    start = time.perf_counter()
    fn()
    return time.perf_counter() - start


def main() -> None:
    rng = np.random.default_rng(7)
    print(
        f"{'terms':>6} {'first s':>9} {'change s':>9} {'change/first':>13} {'scratch/change':>15}"
    )
    for size in (24, 200, 2000):
        first_couplings = rng.uniform(0.3, 1.7, size)
        new_couplings = rng.uniform(0.3, 1.7, size)
        model = fl.exclusion_chain(size, reach=2, couplings=first_couplings)
        a = fl.analyze(model)
        t_first = _timed(lambda a=a: _work(a))
        b = a.with_couplings(new_couplings)
        t_change = _timed(lambda b=b: _work(b))
        # baseline: the same couplings on strings built anew (nothing shared)
        fresh = fl.analyze(fl.exclusion_chain(size, reach=2, couplings=new_couplings))
        t_scratch = _timed(lambda f=fresh: _work(f))
        assert abs(b.spectrum().ground_energy - fresh.spectrum().ground_energy) <= 1e-9 * size
        print(
            f"{size:>6} {t_first:>9.4f} {t_change:>9.4f} {t_change / t_first:>13.3f} "
            f"{t_scratch / t_change:>15.2f}"
        )


if __name__ == "__main__":
    main()
