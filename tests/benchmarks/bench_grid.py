"""Benchmark: one disorder sweep in-process, on a local process pool and on a local dask cluster.

``fl.sweep`` runs ``fl.disordered_chain_gap`` (the smallest quasi-energy of a reach-2 chain of
1000 terms with couplings uniform in (0.3, 1.7]) for many realisations, three times: in this
process, with ``executor="processes"`` and through a ``distributed.Client`` on a LocalCluster of
2 worker processes (1 thread each) on 127.0.0.1.  Each time includes starting the workers.  It
prints the seconds and the ratios in-process / executor (above 1: the executor is faster), and
checks that the three tables are identical.

Run with ``bash tools/bench.sh tests/benchmarks/bench_grid.py``; pass a number to change the
count of realisations (default 10^4), e.g. ``python tests/benchmarks/bench_grid.py 2000``.
"""

from __future__ import annotations

import os
import sys
import time
from collections.abc import Callable
from typing import Any

import pandas as pd

import freeladder as fl

GRID = {"n_terms": [1000], "reach": [2], "low": [0.3], "high": [1.7]}


def _timed(run: Callable[[], pd.DataFrame]) -> tuple[float, pd.DataFrame]:
    start = time.perf_counter()
    df = run()
    return time.perf_counter() - start, df


def _sweep(realisations: int, executor: Any) -> pd.DataFrame:
    return fl.sweep(
        fl.disordered_chain_gap,
        GRID,
        executor=executor,
        seed=2026,
        repeat=realisations,
        progress=False,
    )


def main() -> None:
    import distributed

    realisations = int(sys.argv[1]) if len(sys.argv) > 1 else 10_000
    print(f"{realisations} realisations of a 1000-term reach-2 chain, {os.cpu_count()} cores")
    fl.disordered_chain_gap(1000, reach=2, rng=0)  # compile the root finder once
    t_local, ref = _timed(lambda: _sweep(realisations, None))
    t_pool, pool = _timed(lambda: _sweep(realisations, "processes"))
    start = time.perf_counter()
    with (
        distributed.LocalCluster(
            n_workers=2,
            threads_per_worker=1,
            processes=True,
            host="127.0.0.1",
            dashboard_address=":0",
        ) as cluster,
        distributed.Client(cluster) as client,
    ):
        t_start = time.perf_counter() - start
        t_dask, dask_df = _timed(lambda: _sweep(realisations, client))
    pd.testing.assert_frame_equal(pool, ref)
    pd.testing.assert_frame_equal(dask_df, ref)
    print(f"{'executor':<32} {'seconds':>9} {'in-process / executor':>22}")
    print(f"{'in-process':<32} {t_local:9.2f} {1.0:22.2f}")
    print(f"{'processes (local pool)':<32} {t_pool:9.2f} {t_local / t_pool:22.2f}")
    print(f"{'dask, 2 workers (sweep only)':<32} {t_dask:9.2f} {t_local / t_dask:22.2f}")
    total = t_dask + t_start
    print(f"{'dask, incl. cluster start':<32} {total:9.2f} {t_local / total:22.2f}")
    print("the three tables are identical row by row")


if __name__ == "__main__":
    main()
