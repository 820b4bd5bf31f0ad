"""Benchmark: ``import freeladder`` in a fresh interpreter, beside the imports it cannot avoid.

Baseline, measured in the same run: a fresh interpreter importing numpy, scipy.sparse,
scipy.sparse.csgraph and flint (what the library needs at import).  sympy, numba, pandas and
networkx load on first use (tests/test_import.py checks which modules load).  Goal: under 0.5 s.
Each time is the best of five fresh interpreters; the load average is printed with them.

Run with ``bash tools/bench.sh tests/benchmarks/bench_import.py``.
"""

from __future__ import annotations

import os
import subprocess
import sys
import time

REPEATS = 5


def fresh(code: str) -> float:
    """Best wall-clock time of a fresh interpreter running ``code``, minus an empty one."""
    best = float("inf")
    for _ in range(REPEATS):
        start = time.perf_counter()
        subprocess.run([sys.executable, "-c", code], check=True)
        best = min(best, time.perf_counter() - start)
    return best


def main() -> None:
    print(f"load average {os.getloadavg()[0]:.2f}")
    empty = fresh("pass")
    base = fresh("import numpy, scipy.sparse, scipy.sparse.csgraph, flint") - empty
    mine = fresh("import freeladder") - empty
    heavy = fresh("import sympy, numba, pandas, networkx") - empty
    print(f"{'what':<48} {'seconds':>8} {'ratio':>7}")
    print(f"{'numpy, scipy.sparse, csgraph, flint (base)':<48} {base:>8.3f} {1:>7.2f}")
    print(f"{'import freeladder':<48} {mine:>8.3f} {mine / base:>7.2f}")
    print(f"{'sympy, numba, pandas, networkx (first use)':<48} {heavy:>8.3f} {heavy / base:>7.2f}")
    print(f"import freeladder / 0.5 s goal: {mine / 0.5:.2f}")
    print(f"load average {os.getloadavg()[0]:.2f}")


if __name__ == "__main__":
    main()
