"""Benchmark of the Workbench: time until every mark holds new data, beside the bare library work.

Run: bash tools/bench.sh tests/benchmarks/bench_workbench.py
(or: PYTHONPATH=kernel_lib:nbext .venv/bin/python tests/benchmarks/bench_workbench.py)

For reach-2 chains of 24, 200, 2000 and 10^4 terms it times, in a synchronous Workbench (every
computation and every mark update done before the assignment returns):

* assigning a new model (fresh strings: graph, verdict, counts, spectrum, levels, order view);
* moving the couplings (same strings: the analysis reuses graph and verdict);

and beside each, the same library calls made directly through the adapter without any widget
(``_derive`` + ``order_view``).  The ratio is the widget's overhead (goal: under 1.5x; the
10^4-term coupling change under 1 s: the last column is the widget time over that 1 s).
Each time is the best of a few repeats; compare only within one run.
"""

from __future__ import annotations

import time
from collections.abc import Callable
from typing import Any

import freeladder as fl
from freeladder_lab import Workbench
from freeladder_lab.adapter import PARTIAL_DEGREE_LIMIT, analyze
from freeladder_lab.series_panel import AUTO_LIST_TERMS, order_view
from freeladder_lab.workbench import _derive

REPEATS = 3


def best(fn: Callable[[], object], setup: Callable[[], object]) -> float:
    """Best time of ``fn`` over REPEATS runs, ``setup`` (untimed) before each."""
    times = []
    for _ in range(REPEATS):
        setup()
        start = time.perf_counter()
        fn()
        times.append(time.perf_counter() - start)
    return min(times)


def chain(m: int, seed: int) -> fl.Model:
    """A fresh model object (nothing cached on it)."""
    return fl.exclusion_chain(m, reach=2, couplings=fl.random_couplings(m, seed=seed))


def library_work(a: Any) -> None:
    """What the Workbench asks of the library for one model, without widgets."""
    d = _derive(a, unproven=False, choice=None)
    alpha = len(d.analysis.charge_counts) - 1
    start = alpha if alpha <= PARTIAL_DEGREE_LIMIT else min(1, alpha)
    order_view(d.analysis, start, 0, listed=len(a.model) <= AUTO_LIST_TERMS)


def measure(size: int) -> list[tuple[str, float, float]]:
    """(what, widget seconds, library seconds) for a new model and a coupling change."""
    wb = Workbench(chain(size, 0), synchronous=True)
    fresh: dict[str, fl.Model] = {}

    def new_model() -> None:
        fresh["m"] = chain(size, 2)

    def assign() -> None:
        wb.model = fresh["m"]

    widget_new = best(assign, new_model)
    library_new = best(lambda: library_work(analyze(fresh["m"])), new_model)

    base = wb.model
    assert base is not None
    seeds = iter(range(100, 200))

    def new_couplings() -> None:
        fresh["m"] = base.with_couplings(list(fl.random_couplings(size, seed=next(seeds))))

    widget_move = best(assign, new_couplings)
    prev = analyze(base)
    library_work(prev)
    library_move = best(lambda: library_work(analyze(fresh["m"])), new_couplings)
    return [
        ("new model", widget_new, library_new),
        ("coupling change", widget_move, library_move),
    ]


def main() -> None:
    warm = Workbench(chain(12, 0), synchronous=True)  # compile the numba kernels once
    warm.model = chain(12, 1)
    print(f"{'terms':>6} {'what':<16} {'widget s':>10} {'library s':>10} {'ratio':>7} {'/ 1 s':>7}")
    for size in (24, 200, 2000, 10_000):
        for what, w, lib in measure(size):
            print(f"{size:>6} {what:<16} {w:>10.4f} {lib:>10.4f} {w / lib:>7.2f} {w:>7.2f}")


if __name__ == "__main__":
    main()
