"""Benchmark: ``verify`` on random Jordan-Wigner models whose root graph is a tree, 12 to 40 terms.

Goal (issue 21, item 10): the time grows with the frontier of the term order, without jumps --
the exact sweeps (and pair-by-pair listing) start only when their cost estimate is within
``CHECK_BUDGET_SECONDS``.  Prints, per size and seed, the total time, the two estimates, the
status of ``[Q(r), Q(s)] = 0`` and the ratio to the previous size's largest time; then the
largest time.
Run:  bash tools/bench.sh tests/benchmarks/bench_verify_trees.py
"""

from __future__ import annotations

import sys
import time

import numpy as np

import freeladder as fl
from freeladder.checks import verification


def tree_model(n_terms: int, seed: int) -> fl.Model:
    """Majorana bilinears ``i gamma_a gamma_b`` on the edges of a random recursive tree, written
    with the Jordan-Wigner modes ``gamma_2s = Z..Z X_s`` and ``gamma_2s+1 = Z..Z Y_s``."""
    rng = np.random.default_rng(seed)
    terms = []
    for k in range(1, n_terms + 1):
        a, b = sorted((int(rng.integers(0, k)), k))
        sa, sb = a // 2, b // 2
        if sa == sb:
            letters = {sa: "Z"}
        else:
            letters = {sa: "Y" if a % 2 == 0 else "X"}
            letters.update({s: "Z" for s in range(sa + 1, sb)})
            letters[sb] = "X" if b % 2 == 0 else "Y"
        c = round(float(rng.uniform(0.3, 1.5)), 3)
        terms.append(f"{c} " + " ".join(f"{p}{s}" for s, p in sorted(letters.items())))
    return fl.parse_model(" + ".join(terms))


def main(sizes: list[int]) -> None:
    fl.verify(tree_model(8, 0))  # warm-up: imports and caches
    print(f"{'terms':>5} {'seed':>4} {'seconds':>8} {'sweep est':>10} {'pairs est':>10}  status")
    worst, previous = 0.0, None
    for size in sizes:
        top = 0.0
        for seed in range(2):
            m = tree_model(size, seed)
            parts = verification._Parts(fl.analyze(m))
            t0 = time.perf_counter()
            report = fl.verify(m, exact_diagonalization=False)
            seconds = time.perf_counter() - t0
            top = max(top, seconds)
            print(
                f"{size:>5} {seed:>4} {seconds:>8.2f} {parts.sweep_seconds():>10.3g} "
                f"{parts.pairwise_seconds():>10.3g}  {report['[Q(r), Q(s)] = 0'].status}",
                flush=True,
            )
        if previous:
            print(f"      ratio of the largest times to the previous size: {top / previous:.2f}")
        previous, worst = top, max(worst, top)
    print(f"largest time: {worst:.2f} s")


if __name__ == "__main__":
    args = [int(a) for a in sys.argv[1:]]
    main(args if args else list(range(12, 42, 4)))
