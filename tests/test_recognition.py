"""Recognition at scale: line-graph roots, cycle bases, relations and indifference orderings.

The linear-time routes (roots from the sparse adjacency, relations of paired columns by
connected components, breadth-first levels by pointer jumping) are checked against networkx
and python-flint on shuffled models large enough to take them.

References: H. Whitney, Amer. J. Math. 54, 150 (1932) (a connected graph other than K3 / K_{1,3}
is determined by its line graph); A. Chapman and S. T. Flammia, Quantum 4, 278 (2020) (Majorana
bilinears fail to commute exactly when their pairs share one mode; the frustration graph is the
line graph of the root); common practice: the relations among Pauli strings are the null space
of their bit vectors over GF(2).
"""

from __future__ import annotations

import itertools

import flint
import networkx as nx
import numpy as np
import scipy.sparse as sps

import freeladder as fl
from freeladder.algebra.model import Model
from freeladder.algebra.strings import WeylString, make_string
from freeladder.graphs.graph import ADJACENCY
from freeladder.graphs.indifference import _bfs_levels
from freeladder.graphs.linegraph import LineGraphRoot, component_root, line_graph_root
from freeladder.graphs.relations import _dependencies_gf2, _dependencies_paired


def majorana(k: int) -> WeylString:
    """gamma_k by the Jordan-Wigner map on sites 0 .. k // 2 (common practice)."""
    site = k // 2
    ops = [(j, 0, 1) for j in range(site)]
    ops.append((site, 1, 0) if k % 2 == 0 else (site, 1, 1))
    return make_string(2, ops)


def bilinear_model(root: nx.Graph, rng: np.random.Generator) -> tuple[Model, list[tuple]]:
    """One term i gamma_a gamma_b per edge of ``root``, in a random order; the edges in order."""
    edges = [tuple(sorted(e)) for e in root.edges]
    edges = [edges[int(j)] for j in rng.permutation(len(edges))]
    sites = max(max(e) for e in edges) // 2 + 1
    terms = [(1.0, (majorana(a) * majorana(b)).normalized()[0]) for a, b in edges]
    return Model.from_terms(terms, states=2, sites=range(sites)), edges


def labelled_line_graph(edges: list[tuple]) -> set[tuple[int, int]]:
    """Edges of networkx's line graph of the root, written with term indices."""
    term = {e: j for j, e in enumerate(edges)}
    line = nx.line_graph(nx.Graph(edges))
    return {tuple(sorted((term[tuple(sorted(u))], term[tuple(sorted(v))]))) for u, v in line.edges}


def frustration_edges(m: Model) -> set[tuple[int, int]]:
    adj = sps.coo_array(fl.frustration_adjacency(m))
    return {(int(a), int(b)) for a, b in zip(adj.row, adj.col, strict=True) if a < b}


def root_in_pairs_order(pairs: dict) -> nx.Graph:
    """The root graph: the modes in ascending order, then the edges in the order of the pairs."""
    root = nx.Graph()
    root.add_nodes_from(sorted({mode for pair in pairs.values() for mode in pair}))
    for term, (a, b) in pairs.items():
        root.add_edge(a, b, term=term)
    return root


def is_cycle(g: nx.Graph, size: int) -> bool:
    """A connected graph with every degree two is a cycle (common practice)."""
    return len(g) == size and nx.is_connected(g) and all(d == 2 for _v, d in g.degree)


def sets_of(m: Model) -> list[set[int]]:
    adj = ADJACENCY(m)
    return [set(adj.indices[adj.indptr[v] : adj.indptr[v + 1]].tolist()) for v in range(len(m))]


def test_large_line_graphs_give_networkx_roots() -> None:
    # Roots with and without triangles (the latter take the fast route, the former fall back
    # to the incremental algorithm); reference: networkx.line_graph of the root found must be
    # the frustration graph term for term, the root isomorphic to the one the model was built
    # from (Whitney 1932), and its cycle basis networkx.cycle_basis's.
    rng = np.random.default_rng(11)
    roots = [
        nx.cycle_graph(60),
        nx.grid_2d_graph(6, 9),
        nx.random_labeled_tree(70, seed=3),
        nx.gnm_random_graph(40, 70, seed=4),
        nx.gnm_random_graph(30, 90, seed=5),
    ]
    for h in roots:
        h = nx.convert_node_labels_to_integers(h.subgraph(max(nx.connected_components(h), key=len)))
        m, edges = bilinear_model(h, rng)
        assert frustration_edges(m) == labelled_line_graph(edges)  # Chapman-Flammia 2020
        v = fl.classify(m)
        assert v.kind == "jordan-wigner"
        root = v.root_graph
        found = nx.line_graph(root)
        as_terms = {
            tuple(sorted((root.edges[a]["term"], root.edges[b]["term"]))) for a, b in found.edges
        }
        assert as_terms == frustration_edges(m)
        assert nx.is_isomorphic(root, h)
        ordered = root_in_pairs_order(dict(v.components[0].majorana_pairs or {}))
        expected = []
        for cycle in nx.cycle_basis(ordered):
            ring = [*cycle, cycle[0]]
            expected.append(tuple(ordered.edges[a, b]["term"] for a, b in itertools.pairwise(ring)))
        assert list(v.cycles) == expected
        # the linear route names the modes as the incremental algorithm does
        everything = np.arange(len(m))
        fast = component_root(ADJACENCY(m), everything)
        slow = line_graph_root(sets_of(m), everything.tolist())
        assert isinstance(fast, LineGraphRoot) and isinstance(slow, LineGraphRoot)
        assert list(fast.pairs.items()) == list(slow.pairs.items())
        assert fast.n_modes == slow.n_modes


def test_not_a_line_graph_is_refused_on_the_linear_route() -> None:
    # A 2D Ising patch has claws (reference: networkx.inverse_line_graph rejects it too).
    m = fl.ising_lattice(6, 6)
    graph = nx.Graph(sorted(frustration_edges(m)))
    try:
        nx.inverse_line_graph(graph)
        is_line = True
    except nx.NetworkXError:
        is_line = False
    assert not is_line
    found = component_root(ADJACENCY(m), np.arange(len(m)))
    assert found == line_graph_root(sets_of(m), list(range(len(m))))
    assert fl.classify(m).kind == "unsolved"


def gf2_rank(m: Model) -> int:
    """Rank over GF(2) of the strings' bit vectors (x | z), by python-flint."""
    x = m.strings.x.toarray() % 2
    z = m.strings.z.toarray() % 2
    bits = np.concatenate([x, z], axis=1)
    return int(flint.nmod_mat(bits.shape[0], bits.shape[1], bits.ravel().tolist(), 2).rank())


def test_shuffled_ising_ring() -> None:
    # The ring's frustration graph is a cycle of 2n terms, the line graph of a cycle; the only
    # relation is the product of the Z Z bonds around the ring (common practice); the number
    # of relations is checked against the GF(2) rank by python-flint.
    rng = np.random.default_rng(2)
    ring = fl.ising_chain(300, boundary="periodic")
    order = rng.permutation(len(ring))
    m = Model(ring.strings.take(order), [ring.couplings[int(j)] for j in order])
    assert is_cycle(nx.Graph(sorted(frustration_edges(m))), len(m))
    v = fl.classify(m)
    assert v.kind == "jordan-wigner" and len(v.cycles) == 1
    root = root_in_pairs_order(dict(v.components[0].majorana_pairs or {}))
    assert is_cycle(root, len(m))
    as_terms = {
        tuple(sorted((root.edges[a]["term"], root.edges[b]["term"])))
        for a, b in nx.line_graph(root).edges
    }
    assert as_terms == frustration_edges(m)
    (cycle,) = nx.cycle_basis(root)
    ring_terms = [root.edges[a, b]["term"] for a, b in itertools.pairwise([*cycle, cycle[0]])]
    assert list(v.cycles[0]) == ring_terms
    assert v.relations.count == len(m) - gf2_rank(m) == 1
    bonds = sorted(int(j) for j in np.flatnonzero(np.diff(m.strings.z.indptr) == 2))
    assert list(v.relations.relations[0].terms) == bonds
    assert "... (300 terms in all)" in v.witness_text()
    assert len(str(v)) < 5000  # summarised, not one line per term


def test_paired_relations_match_elimination_and_flint() -> None:
    # Z Z bonds on random unions of paths and cycles of sites (each site in at most two bonds,
    # so every column is shared by at most two strings), with a few X fields; reference: the
    # GF(2) rank by python-flint, and the general elimination term for term.
    rng = np.random.default_rng(4)
    for _ in range(30):
        sites = int(rng.integers(6, 40))
        perm = rng.permutation(sites).tolist()
        bonds = []
        start = 0
        while start < sites:
            size = int(rng.integers(2, 9))
            piece = perm[start : start + size]
            bonds += list(itertools.pairwise(piece))
            if len(piece) > 2 and rng.random() < 0.6:
                bonds.append((piece[-1], piece[0]))
            start += size
        terms = [(1.0, make_string(2, [(a, 0, 1), (b, 0, 1)])) for a, b in bonds]
        terms += [(1.0, make_string(2, [(int(s), 1, 0)])) for s in rng.choice(sites, 3)]
        order = rng.permutation(len(terms))
        m = Model.from_terms([terms[int(j)] for j in order], states=2, sites=range(sites))
        rel = fl.find_relations(m)
        assert rel.count == len(m) - gf2_rank(m)
        for r in rel:
            r.phase(m)  # raises unless the product is a multiple of the identity
        x, z = sps.coo_array(m.strings.x), sps.coo_array(m.strings.z)
        rows = np.concatenate([x.row, z.row]).astype(np.int64)
        cols = np.concatenate([2 * x.col, 2 * z.col + 1]).astype(np.int64)
        sort = np.lexsort((cols, rows))
        rows, cols = rows[sort], cols[sort]
        starts = np.flatnonzero(np.r_[True, rows[1:] != rows[:-1]])
        by_lead = np.argsort(cols[starts], kind="stable")
        paired = _dependencies_paired(rows, cols, len(m), by_lead, starts)
        general = _dependencies_gf2(rows, cols, np.r_[starts, len(rows)], by_lead)
        assert paired == general


def test_breadth_first_levels_match_networkx() -> None:
    rng = np.random.default_rng(8)
    for _ in range(20):
        g = nx.gnp_random_graph(int(rng.integers(5, 80)), 0.06, seed=int(rng.integers(1 << 30)))
        n = len(g)
        adj = sps.csr_array(nx.to_scipy_sparse_array(g, nodelist=range(n), format="csr"))
        sources = np.array(sorted(min(c) for c in nx.connected_components(g)))
        expected = nx.multi_source_dijkstra_path_length(g, set(sources.tolist()))
        assert _bfs_levels(adj, sources).tolist() == [expected[v] for v in range(n)]


def test_shuffled_variable_reach_chain() -> None:
    # A Z_3 chain whose reach changes along it, relabelled at random: the order found must be
    # an indifference ordering of the frustration graph (every closed neighbourhood a block,
    # checked with networkx) with one exponent forward (Mann, Elman, Wood and Chapman,
    # arXiv:2408.09684 (2024)); and the unshuffled chain gets the same order, relabelled.
    rng = np.random.default_rng(3)
    size = 3000
    ends = np.maximum.accumulate(np.arange(size) + rng.integers(1, 4, size))
    chain = fl.exclusion_chain(size, reach=list(ends - np.arange(size)), states=3)
    perm = rng.permutation(size)
    m = Model(chain.strings.take(perm), [chain.couplings[int(j)] for j in perm])
    v = fl.classify(m)
    assert v.kind == "hidden-free"
    found = fl.indifference_order(m)
    assert found is not None and v.components[0].indifference == found
    graph = nx.Graph(sorted(frustration_edges(m)))
    graph.add_nodes_from(range(size))
    pos = {t: k for k, t in enumerate(found.order)}
    for t in range(size):
        block = [pos[t], *(pos[u] for u in graph[t])]
        assert max(block) - min(block) == graph.degree(t)
    strings = m.strings
    for a, b in graph.edges:
        first, second = (a, b) if pos[a] < pos[b] else (b, a)
        assert strings[first].commutation_exponent(strings[second]) % 3 == found.exponent
    assert fl.classify(chain).kind == "hidden-free"
