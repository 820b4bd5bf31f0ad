"""Benchmark: recognising variable-range chains (oriented indifference orderings).

For Z3 chains of 10^3, 10^4 and 10^5 terms whose reach varies along the chain (random reaches
1-3 with non-decreasing ends), with the terms relabelled at random, time
:func:`freeladder.indifference_order` (breadth-first levels, LexBFS when they do not decide,
then an exact check of every edge) beside the linear-time recognition of a fixed-reach
exclusion chain of the same size
(:func:`freeladder.chain_structure`), the baseline; and the whole verdict
(:func:`freeladder.classify`, from nothing stored; goal under 1 s at 10^5 terms) beside
scipy's connected components of the same frustration graph (a linear-time floor).  A second
table does the same for Pauli (N = 2) models: the shuffled variable-reach chain and the plain
exclusion chains of reach 2 and 3, whose verdicts read claw-freeness, chordality and a
simplicial clique off a checked indifference ordering.  The
growth columns show how the times grow per tenfold size (10 means linear); the load average
is printed with the times.

Run with ``bash tools/bench.sh tests/benchmarks/bench_indifference.py``.
"""

from __future__ import annotations

import os
import time

import numpy as np
import scipy.sparse.csgraph as csgraph

import freeladder as fl
from freeladder.graphs.indifference import indifference_order


def variable_chain(size: int, rng: np.random.Generator, states: int = 3) -> fl.Model:
    ends = np.maximum.accumulate(np.arange(size) + rng.integers(1, 4, size))
    chain = fl.exclusion_chain(size, reach=list(ends - np.arange(size)), states=states)
    order = rng.permutation(size)
    return fl.Model(chain.strings.take(order), [chain.couplings[int(j)] for j in order])


def main() -> None:
    rng = np.random.default_rng(3)
    print(f"load average {os.getloadavg()[0]:.2f}")
    print(
        f"{'terms':>7} {'indifference s':>15} {'fixed-reach s':>14} {'ratio':>7} {'growth':>7}"
        f" {'classify s':>11} {'components s':>13} {'ratio':>7} {'growth':>7}"
    )
    last = last_v = None
    for size in (1_000, 10_000, 100_000):
        m = variable_chain(size, rng)
        start = time.perf_counter()
        found = indifference_order(m)
        t_ind = time.perf_counter() - start
        assert found is not None and found.exponent in (1, 2)
        fixed = fl.exclusion_chain(size, reach=2, states=3)
        start = time.perf_counter()
        assert fl.chain_structure(fixed) is not None
        t_fixed = time.perf_counter() - start
        fresh = fl.Model(m.strings.take(np.arange(size)), m.couplings)  # nothing stored yet
        start = time.perf_counter()
        verdict = fl.classify(fresh)
        t_v = time.perf_counter() - start
        assert verdict.kind == "hidden-free"
        adj = fl.frustration_adjacency(m)
        start = time.perf_counter()
        csgraph.connected_components(adj, directed=False)
        t_cc = time.perf_counter() - start
        growth = "" if last is None else f"{t_ind / last:7.1f}"
        growth_v = "" if last_v is None else f"{t_v / last_v:7.1f}"
        print(
            f"{size:>7} {t_ind:>15.3f} {t_fixed:>14.3f} {t_ind / t_fixed:>7.1f} {growth:>7}"
            f" {t_v:>11.3f} {t_cc:>13.4f} {t_v / t_cc:>7.0f} {growth_v:>7}"
        )
        last, last_v = t_ind, t_v
    print(f"load average {os.getloadavg()[0]:.2f}")
    pauli_verdicts(rng)


def pauli_verdicts(rng: np.random.Generator) -> None:
    """N = 2: classify from nothing stored beside scipy's connected components."""
    print(f"{'N = 2 model':<24} {'terms':>7} {'classify s':>11} {'components s':>13} {'ratio':>7}")
    for size in (1_000, 10_000, 100_000):
        for name, m in (
            ("variable reach, shuffled", variable_chain(size, rng, states=2)),
            ("reach-2 chain", fl.exclusion_chain(size, reach=2)),
            ("reach-3 chain", fl.exclusion_chain(size, reach=3)),
        ):
            fresh = fl.Model(m.strings.take(np.arange(size)), m.couplings)
            start = time.perf_counter()
            verdict = fl.classify(fresh)
            t_v = time.perf_counter() - start
            assert verdict.kind == "hidden-free" and verdict.guarantee.proven
            adj = fl.frustration_adjacency(m)
            start = time.perf_counter()
            csgraph.connected_components(adj, directed=False)
            t_cc = time.perf_counter() - start
            print(f"{name:<24} {size:>7} {t_v:>11.3f} {t_cc:>13.4f} {t_v / t_cc:>7.0f}")
    print(f"load average {os.getloadavg()[0]:.2f}")


if __name__ == "__main__":
    main()
