"""Benchmark: frustration graph, chain recognition and verdicts, as ratios to baselines.

Run with ``python tests/benchmarks/bench_classify.py``.  Every timing is printed next to a
baseline measured in the same run on the same model:

* ``commutation_matrix`` -- the one sparse product everything starts from;
* a pairwise Python loop over WeylString objects (for the frustration graph);
* ``networkx.inverse_line_graph`` (for line-graph recognition);
* for whole verdicts, built from nothing stored: ``commutation_matrix`` and scipy's
  ``connected_components`` of the frustration graph (a linear-time floor).
"""

from __future__ import annotations

import os
import time
from collections.abc import Callable
from typing import Any

import networkx as nx
import numpy as np
import scipy.sparse.csgraph as csgraph

import freeladder as fl
from freeladder.algebra.model import Model
from freeladder.algebra.strings import make_string
from freeladder.graphs.graph import chain_structure, frustration_adjacency, frustration_graph
from freeladder.graphs.linegraph import line_graph_root


def timed(fn: Callable[[], Any], repeat: int = 3) -> tuple[float, Any]:
    """Best of ``repeat`` wall-clock times, and the last result."""
    best = float("inf")
    for _ in range(repeat):
        t0 = time.perf_counter()
        out = fn()
        best = min(best, time.perf_counter() - t0)
    return best, out


def fresh(m: Model) -> Model:
    """The same model without cached derived data (new strings, so no part is stored yet)."""
    return Model(m.strings.take(np.arange(len(m))), m.couplings, m.constant)


def cold(
    make: Callable[[], Model], fn: Callable[[Model], Any], repeat: int = 3
) -> tuple[float, Any]:
    """Best of ``repeat`` times of ``fn`` on a model built afresh (outside the timing)."""
    best, out = float("inf"), None
    for _ in range(repeat):
        m = make()
        t0 = time.perf_counter()
        out = fn(m)
        best = min(best, time.perf_counter() - t0)
    return best, out


def row(name: str, seconds: float, base_name: str, base: float) -> None:
    ratio = seconds / base
    print(f"{name:<48s} {seconds:9.3f} s   {base_name:<24s} {base:9.3f} s   ratio {ratio:8.2f}")


def pairwise_graph(m: Model) -> nx.Graph:
    strings = [t.string for t in m.terms]
    g = nx.Graph()
    for a in range(len(strings)):
        for b in range(a + 1, len(strings)):
            if not strings[a].commutes_with(strings[b]):
                g.add_edge(a, b)
    return g


def shuffled(m: Model) -> Model:
    """The same terms in a random order."""
    order = np.random.default_rng(5).permutation(len(m))
    return Model(m.strings.take(order), [m.couplings[int(j)] for j in order], m.constant)


def clock_ring(n_sites: int, states: int) -> Model:
    """Periodic Z_N clock chain: X_i and Z_i Z_{i+1}^dagger around a ring of sites."""
    terms = []
    for i in range(n_sites):
        terms.append((1.0, make_string(states, [(i, 1, 0)])))
        terms.append((1.0, make_string(states, [(i, 0, 1), ((i + 1) % n_sites, 0, states - 1)])))
    return Model.from_terms(terms, states=states, sites=range(n_sites))


def main() -> None:
    # frustration graph against a pairwise loop (small size for the loop), then at scale
    small = fl.kitaev_honeycomb(12, 12)
    t_fast, _ = cold(lambda: fresh(small), frustration_graph)
    t_loop, _ = timed(lambda: pairwise_graph(small))
    row(f"frustration_graph, Kitaev patch, {len(small)} terms", t_fast, "pairwise loop", t_loop)
    big = fl.kitaev_honeycomb(80, 80)
    t_comm, _ = timed(lambda: big.strings.commutation_matrix())
    t_graph, _ = cold(lambda: fresh(big), frustration_graph)
    row(f"frustration_graph, Kitaev patch, {len(big)} terms", t_graph, "commutation_matrix", t_comm)
    t_adj, _ = cold(lambda: fresh(big), frustration_adjacency)
    row(f"frustration_adjacency, {len(big)} terms", t_adj, "commutation_matrix", t_comm)

    # chain recognition at 10^6 terms
    chain = fl.exclusion_chain(10**6, reach=2)
    t_comm, _ = timed(lambda: chain.strings.commutation_matrix(), repeat=1)
    t_chain, found = cold(lambda: fresh(chain), chain_structure, repeat=1)
    assert found is not None and found.reach == 2
    row("chain_structure, reach-2 chain, 10^6 terms", t_chain, "commutation_matrix", t_comm)

    # line-graph recognition against networkx
    m = fl.kitaev_honeycomb(30, 30)
    adj = frustration_adjacency(m)
    neighbours = [
        set(adj.indices[adj.indptr[v] : adj.indptr[v + 1]].tolist()) for v in range(len(m))
    ]
    g = nx.Graph(pairwise_graph(m)) if len(m) < 400 else frustration_graph(m)
    t_mine, _ = timed(lambda: line_graph_root(neighbours, list(range(len(m)))))
    t_ref, _ = timed(lambda: nx.inverse_line_graph(g), repeat=1)
    row(f"line_graph_root, Kitaev patch, {len(m)} terms", t_mine, "nx.inverse_line_graph", t_ref)

    # whole verdicts, from nothing stored (rings: goal under 0.2 s at 20 000 terms); the
    # baselines are the commutation matrix every verdict starts from and scipy's connected
    # components of the frustration graph (a linear-time floor)
    print(f"load average {os.getloadavg()[0]:.2f}")
    for name, model in (
        ("classify, Ising ring, 20000 terms", fl.ising_chain(10_000, boundary="periodic")),
        (
            "classify, Ising ring shuffled, 20000 terms",
            shuffled(fl.ising_chain(10_000, boundary="periodic")),
        ),
        ("classify, Z_3 clock ring, 20000 terms", clock_ring(10_000, 3)),
        ("classify, reach-2 chain, 3000 terms", fl.exclusion_chain(3000, reach=2)),
        ("classify, Z_3 reach-3 chain, 3000 terms", fl.exclusion_chain(3000, reach=3, states=3)),
        ("classify, Kitaev patch", fl.kitaev_honeycomb(60, 60)),
        ("classify, 2D Ising 40 x 40 (claw)", fl.ising_lattice(40, 40)),
    ):
        t_comm, _ = cold(lambda model=model: fresh(model), lambda m: m.strings.commutation_matrix())
        adj = frustration_adjacency(model)
        t_cc, _ = timed(lambda adj=adj: csgraph.connected_components(adj, directed=False))
        t_v, v = cold(lambda model=model: fresh(model), fl.classify)
        row(f"{name} -> {v.kind}", t_v, "commutation_matrix", t_comm)
        row("   (same)", t_v, "connected_components", t_cc)
    print(f"load average {os.getloadavg()[0]:.2f}")


if __name__ == "__main__":
    main()
