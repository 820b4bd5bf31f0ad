"""Benchmark: ``verify`` on reach-2 exclusion chains of 20 to 60 terms, every even size.

Goal (issue 14): the time ratio between consecutive sizes stays below 2 (no jump where the
route changes from listing charges to the exact sweep) and 60 terms take under 30 s.  Prints,
per size, the total time, the route taken by ``[Q(r), Q(s)]``, the slowest check and the ratio
to the previous size; then the largest ratio.
Run:  bash tools/bench.sh tests/benchmarks/bench_verify.py
"""

from __future__ import annotations

import sys
import time

import freeladder as fl


def main(sizes: list[int]) -> None:
    fl.verify(fl.exclusion_chain(8, reach=2))  # warm-up: first imports and caches
    previous = None
    worst = 0.0
    print(f"{'terms':>5} {'seconds':>8} {'ratio':>6}  ok     route of [Q(r), Q(s)] / slowest check")
    for size in sizes:
        m = fl.exclusion_chain(size, reach=2, couplings=[1 + j % 3 for j in range(size)])
        t0 = time.perf_counter()
        report = fl.verify(m)
        seconds = time.perf_counter() - t0
        ratio = seconds / previous if previous else float("nan")
        if previous:
            worst = max(worst, ratio)
        previous = seconds
        route = "sweep" if "sweep" in report["[Q(r), Q(s)] = 0"].method else "pairwise"
        slow = max(report.checks, key=lambda c: c.seconds)
        print(
            f"{size:>5} {seconds:>8.2f} {ratio:>6.2f}  {report.ok!s:<6} {route:<9} "
            f"{slow.name} {slow.seconds:.2f} s",
            flush=True,
        )
    print(f"largest ratio between consecutive sizes: {worst:.2f} (goal < 2)")


if __name__ == "__main__":
    args = [int(a) for a in sys.argv[1:]]
    main(args if args else list(range(20, 62, 2)))
