"""Frustration graph and exclusion-chain recognition.

Reference checks: every edge and exponent is recomputed pair by pair with
:meth:`WeylString.commutation_exponent` (the symplectic form, common practice; D. Gottesman,
arXiv:quant-ph/9802007), and chain answers are checked against the defining relations of the
exclusion algebra (F. C. Alcaraz and R. A. Pimenta, Phys. Rev. B 102, 121101(R) (2020),
arXiv:2005.14622) directly, never against the recogniser's own intermediate results.
"""

from __future__ import annotations

import time

import networkx as nx
import numpy as np
import pytest

import freeladder as fl
from freeladder.algebra.model import Model
from freeladder.algebra.strings import StringArray, make_string
from freeladder.graphs.graph import chain_structure, frustration_adjacency, frustration_graph


def shuffled(m: Model, seed: int) -> tuple[Model, np.ndarray]:
    perm = np.random.default_rng(seed).permutation(len(m))
    return Model(m.strings.take(perm), [m.couplings[i] for i in perm]), perm


def random_local_model(n_terms: int, n_sites: int, states: int, width: int, seed: int) -> Model:
    rng = np.random.default_rng(seed)
    terms = []
    for _ in range(n_terms):
        start = int(rng.integers(0, n_sites - width + 1))
        factors = [
            (s, int(rng.integers(0, states)), int(rng.integers(0, states)))
            for s in range(start, start + width)
        ]
        terms.append((1.0, make_string(states, factors)))
    return Model.from_terms(terms, states=states, sites=range(n_sites))


def pairwise_exponents(m: Model) -> dict[tuple[int, int], int]:
    """All non-zero exponents m_ab by a plain double loop over WeylString objects."""
    strings = [t.string for t in m.terms]
    out = {}
    for a, ga in enumerate(strings):
        for b, gb in enumerate(strings):
            e = ga.commutation_exponent(gb)
            if e:
                out[(a, b)] = e
    return out


def assert_is_chain(m: Model, c: fl.ChainStructure) -> None:
    """Check the defining relations of the exclusion algebra for the reported order."""
    strings = [t.string for t in m.terms]
    order = [int(v) for v in c.order]
    assert sorted(order) == list(range(len(m)))
    n = m.states
    for q, a in enumerate(order):
        for r, b in enumerate(order):
            e = strings[a].commutation_exponent(strings[b])
            if q < r <= q + c.reach:
                assert e == c.orientation % n, (q, r, e)
            elif r < q <= r + c.reach:
                assert e == (-c.orientation) % n, (q, r, e)
            else:
                assert e == 0, (q, r, e)


# -- the frustration graph ----------------------------------------------------------------------


@pytest.mark.parametrize("states", [2, 3, 4])
def test_graph_edges_match_pairwise_exponents(states: int) -> None:
    m = random_local_model(40, 12, states, 3, seed=states)
    expected = pairwise_exponents(m)
    g = frustration_graph(m)
    assert g.number_of_nodes() == len(m)
    for j in range(len(m)):
        assert g.nodes[j]["string"] == m.terms[j].string
    if states == 2:
        assert not g.is_directed()
        got = {(a, b) for a, b in g.edges} | {(b, a) for a, b in g.edges}
        assert got == set(expected)
    else:
        assert g.is_directed()
        got = {(a, b): d["exponent"] for a, b, d in g.edges(data=True)}
        assert got == expected
    adj = frustration_adjacency(m)
    assert adj.dtype == bool
    assert {(int(a), int(b)) for a, b in zip(*adj.nonzero(), strict=True)} == set(expected)


def test_graph_of_ising_chain_is_a_path() -> None:
    # Interleaved X_i, Z_i Z_{i+1}: the open chain's frustration graph is a path (common practice).
    g = frustration_graph(fl.ising_chain(6))
    assert nx.is_isomorphic(g, nx.path_graph(11))


def test_graph_of_ten_thousand_local_terms_is_fast() -> None:
    m = fl.kitaev_honeycomb(80, 80)
    assert len(m) > 9000
    t0 = time.perf_counter()
    g = frustration_graph(m)
    elapsed = time.perf_counter() - t0
    # Every bond of a honeycomb patch meets at most four others (two per end site).
    assert max(d for _, d in g.degree) <= 4
    assert elapsed < 5.0


def test_not_a_model_is_rejected() -> None:
    with pytest.raises(TypeError, match="Model"):
        frustration_graph("X0 Z1")  # type: ignore[arg-type]


# -- exclusion chains -----------------------------------------------------------------------------


@pytest.mark.parametrize("reach", [1, 2, 3])
@pytest.mark.parametrize("states", [2, 3, 4])
def test_chain_recognised_under_shuffling(reach: int, states: int) -> None:
    for n_terms in (1, 2, reach + 1, reach + 2, 2 * reach + 3, 13):
        m, _ = shuffled(fl.exclusion_chain(n_terms, reach=reach, states=states), seed=n_terms)
        c = chain_structure(m)
        assert c is not None, (n_terms, reach, states)
        assert_is_chain(m, c)
        if n_terms >= reach + 2:
            assert c.reach == reach
        else:
            # all pairs fail to commute: reported as the smallest reach that fits
            assert c.reach == max(n_terms - 1, 1)
        if states == 2:
            assert c.orientation == 1


@pytest.mark.parametrize("states", [3, 4])
def test_chain_with_inverse_orientation(states: int) -> None:
    # g_j = X_j^{-1} Z_{j+1} Z_{j+2}: negating the X exponents negates the symplectic form,
    # so g_j g_k = omega^{-1} g_k g_j for j < k <= j + 2.
    base = fl.exclusion_chain(9, reach=2, states=states).strings
    flipped = StringArray(base.x * (states - 1), base.z, base.phase, states, base.sites)
    m = Model(flipped.normalized()[0], [1] * 9)
    assert pairwise_exponents(m)[(0, 1)] == states - 1
    c = chain_structure(m)
    assert c is not None
    assert_is_chain(m, c)
    # The same order as the original reads omega^{-1}; the recogniser may report either end first.
    forward = [int(v) for v in c.order] == list(range(9))
    assert c.orientation == (-1 if forward else 1)


def test_clock_chain_is_reach_one() -> None:
    # Baxter's clock chain has the reach-1 exclusion algebra (R. J. Baxter, Phys. Lett. A 140,
    # 155 (1989); P. Fendley, J. Phys. A 47, 075001 (2014)).
    m = fl.clock_chain(5, states=3)
    c = chain_structure(m)
    assert c is not None and c.reach == 1
    assert_is_chain(m, c)


def test_chain_structure_is_cached() -> None:
    m = fl.exclusion_chain(7, reach=2)
    assert chain_structure(m) is chain_structure(m)
    assert not chain_structure(m).order.flags.writeable


def test_not_chains() -> None:
    # A cycle (periodic Ising chain), a disjoint union of two chains, a 2D lattice (claws).
    assert chain_structure(fl.ising_chain(5, boundary="periodic")) is None
    two = Model.from_terms(
        [
            (1, fl.pauli("X", [0])),
            (1, fl.pauli("Z", [0])),
            (1, fl.pauli("X", [5])),
            (1, fl.pauli("Z", [5])),
        ]
    )
    assert chain_structure(two) is None
    assert chain_structure(fl.ising_lattice(2, 3)) is None
    commuting = Model.from_terms([(1, fl.pauli("X", [0])), (1, fl.pauli("X", [1]))])
    assert chain_structure(commuting) is None


def test_empty_and_single_term() -> None:
    empty = Model.from_terms([], states=3)
    assert chain_structure(empty) is None
    one = chain_structure(Model.from_terms([(2.0, fl.pauli("XZ"))]))
    assert one is not None and one.reach == 1 and list(one.order) == [0]


def test_clock_triangle_with_cyclic_orientation_is_not_a_chain() -> None:
    # On one Z_3 site, X, Z and X^2 Z^2 pairwise fail to commute with a cyclic orientation
    # (m(X, Z) = m(Z, X^2 Z^2) = m(X^2 Z^2, X) = -1): no ordering gives a transitive pattern.
    m = Model.from_terms(
        [
            (1, make_string(3, [(0, 1, 0)])),
            (1, make_string(3, [(0, 0, 1)])),
            (1, make_string(3, [(0, 2, 2)])),
        ]
    )
    exps = pairwise_exponents(m)
    assert exps[(0, 1)] == exps[(1, 2)] == exps[(2, 0)] == 2
    assert chain_structure(m) is None


def test_clock_chain_with_one_flipped_end_is_not_a_chain() -> None:
    base = fl.exclusion_chain(5, reach=1, states=3)
    strings = [t.string for t in base.terms]
    strings[0] = strings[0].adjoint()
    m = Model.from_terms([(1, g) for g in strings])
    assert chain_structure(m) is None


def test_clock_exponent_two_is_not_a_chain() -> None:
    # N = 4 with g_j = X_j Z_{j+1}^2: a path of non-commuting pairs, but with omega^2, not omega.
    m = Model.from_terms([(1, make_string(4, [(j, 1, 0), (j + 1, 0, 2)])) for j in range(5)])
    assert nx.is_connected(frustration_graph(m).to_undirected())
    assert chain_structure(m) is None


def test_path_power_lookalike_is_not_a_chain() -> None:
    # The square of a path on 7 vertices with one edge moved: same edge count, not a path power.
    base = nx.power(nx.path_graph(7), 2)
    moved = base.copy()
    moved.remove_edge(0, 2)
    moved.add_edge(0, 3)
    assert moved.number_of_edges() == base.number_of_edges()
    m = model_from_graph(moved)
    assert chain_structure(m) is None
    assert chain_structure(model_from_graph(base)) is not None


def model_from_graph(g: nx.Graph) -> Model:
    """A Pauli model whose frustration graph is ``g``: one qubit per edge, X on the smaller end,
    Z on the larger end (common practice for realising a graph by anticommutation)."""
    factors: dict[int, list[tuple[int, int, int]]] = {v: [] for v in g.nodes}
    for k, (a, b) in enumerate(sorted(tuple(sorted(e)) for e in g.edges)):
        factors[a].append((k, 1, 0))
        factors[b].append((k, 0, 1))
    terms = [(1, make_string(2, factors[v])) for v in sorted(g.nodes)]
    return Model.from_terms(terms, states=2)


def test_large_chain_is_linear_time() -> None:
    m = fl.exclusion_chain(200_000, reach=2)
    t0 = time.perf_counter()
    c = chain_structure(m)
    elapsed = time.perf_counter() - t0
    assert c is not None and c.reach == 2
    assert list(c.order[:3]) in ([0, 1, 2], [199_999, 199_998, 199_997])
    assert elapsed < 5.0
