"""Benchmark: the census of N = 2 chains, support 3, up to 3 types, in-process and on dask.

Enumerates the symmetry orbits (sets of up to 3 Pauli term types on at most 3 sites, reduced
by reflection and the six permutations of X, Y, Z), then classifies each orbit's chain at two
lengths, once in this process and once through a ``distributed.Client`` on a LocalCluster of 2
worker processes (1 thread each) on 127.0.0.1 (the time includes starting the workers).  It
prints rows, orbits, verdict counts, the seconds and the ratio in-process / dask (above 1: dask
is faster), and checks that both tables are identical.  Goal: under 10 minutes in-process.

Run with ``bash tools/bench.sh tests/benchmarks/bench_census.py``; pass ``SUPPORT TYPES`` to
change the size, e.g. ``python tests/benchmarks/bench_census.py 2 2``.
"""

from __future__ import annotations

import os
import sys
import time

import freeladder as fl
from freeladder.studies.census import census_orbits


def main() -> None:
    import distributed

    support, types = (int(x) for x in sys.argv[1:3]) if len(sys.argv) > 2 else (3, 3)
    print(f"N = 2, support {support}, up to {types} types, {os.cpu_count()} cores")
    start = time.perf_counter()
    orbits = census_orbits(2, support, types)
    t_orbits = time.perf_counter() - start
    sets = sum(size for _, size in orbits)
    print(f"orbits: {len(orbits)} of {sets} type sets, enumerated in {t_orbits:.1f} s")
    start = time.perf_counter()
    local = fl.census(2, support, types, progress=False)
    t_local = time.perf_counter() - start
    start = time.perf_counter()
    with (
        distributed.LocalCluster(
            n_workers=2, threads_per_worker=1, processes=True, host="127.0.0.1"
        ) as cluster,
        distributed.Client(cluster) as client,
    ):
        remote = fl.census(2, support, types, executor=client, progress=False)
    t_dask = time.perf_counter() - start
    cols = ["types", "verdict", "theorem", "spectrum", "model", "orbit_size"]
    assert remote[cols].equals(local[cols]), "dask and in-process tables differ"
    print(f"rows: {len(local)}; verdicts: {local['verdict'].value_counts().to_dict()}")
    print(f"spectra: {local['spectrum'].value_counts().to_dict()}")
    print(f"in-process: {t_local:.1f} s (goal: under 600 s)")
    print(f"dask, 2 workers: {t_dask:.1f} s; ratio in-process / dask = {t_local / t_dask:.2f}")


if __name__ == "__main__":
    main()
