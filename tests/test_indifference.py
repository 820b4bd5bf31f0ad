"""Indifference orderings: recognition against brute force, and free parafermions on them.

References: R. L. Mann, S. J. Elman, D. R. Wood and A. Chapman, arXiv:2408.09684 (2024) (an
oriented indifference frustration graph gives a free-parafermion spectrum from the independence
polynomial); F. C. Alcaraz and R. A. Pimenta, Phys. Rev. B 102, 121101(R) (2020) (exclusion
chains); F. S. Roberts (1969) (indifference graphs).
"""

from __future__ import annotations

import itertools

import networkx as nx
import numpy as np
import pytest
import scipy.sparse as sps
from scipy.optimize import linear_sum_assignment

import freeladder as fl
from freeladder.graphs.clawfree import check_order
from freeladder.graphs.indifference import indifference_order, level_order, umbrella_order


def brute_force_has_umbrella(g: nx.Graph) -> bool:
    nodes = list(g.nodes)
    for perm in itertools.permutations(nodes):
        pos = {v: i for i, v in enumerate(perm)}
        if all(
            max(pos[w] for w in [v, *g[v]]) - min(pos[w] for w in [v, *g[v]]) == g.degree(v)
            for v in nodes
        ):
            return True
    return False


def test_recognition_agrees_with_brute_force_on_small_graphs():
    rng = np.random.default_rng(5)
    seen = {True: 0, False: 0}
    for _ in range(250):
        n = int(rng.integers(2, 8))
        g = nx.gnp_random_graph(n, float(rng.uniform(0.2, 0.8)), seed=int(rng.integers(1 << 30)))
        adj = nx.to_scipy_sparse_array(g, nodelist=range(n))
        found = umbrella_order(adj)
        truth = brute_force_has_umbrella(g)
        assert (found is not None) == truth
        seen[truth] += 1
        if found is not None:
            assert sorted(found) == list(range(n))
    assert seen[True] > 20 and seen[False] > 20


def _brute_oriented(ex: np.ndarray, states: int) -> bool:
    """Whether some ordering is an indifference ordering with every edge forward, one exponent."""
    n = len(ex)
    units = [1] if states == 2 else [m for m in range(1, states) if np.gcd(m, states) == 1]
    for perm in itertools.permutations(range(n)):
        pos = np.empty(n, dtype=int)
        pos[list(perm)] = np.arange(n)
        if any(
            max(pos[[v, *np.flatnonzero(ex[v])]]) - min(pos[[v, *np.flatnonzero(ex[v])]])
            != np.count_nonzero(ex[v])
            for v in range(n)
        ):
            continue
        forward = {
            int(ex[a, b]) % states
            for a in range(n)
            for b in range(n)
            if ex[a, b] and pos[a] < pos[b]
        }
        if states == 2 or not forward or (len(forward) == 1 and forward <= set(units)):
            return True
    return False


def test_oriented_recognition_agrees_with_brute_force():
    # Reference: every ordering tried (brute force) on small random graphs with random
    # exponents, including isolated terms and cliques of twins; a found ordering is checked
    # edge by edge.
    from freeladder.graphs.indifference import order_from_exponents

    rng = np.random.default_rng(21)
    seen = {True: 0, False: 0}
    for trial in range(300):
        n = int(rng.integers(1, 7))
        states = int(rng.choice([2, 3, 5]))
        if trial % 2:
            x = np.sort(rng.uniform(0, n / 2, n))
            upper = np.triu(np.abs(x[:, None] - x[None, :]) < 1, 1)
        else:
            upper = np.triu(rng.random((n, n)) < 0.5, 1)
        expo = rng.integers(1, states, (n, n)) if rng.random() < 0.5 else np.ones((n, n), int)
        upper = np.where(upper, expo, 0)
        perm = rng.permutation(n)
        upper = upper[perm][:, perm]
        ex = upper + np.where(upper.T > 0, (states - upper.T) % states, 0)
        ex = np.where(upper + upper.T > 0, np.where(ex == 0, states, ex), 0)
        if states == 2:
            ex = (ex > 0).astype(int)
        found = order_from_exponents(sps.csr_array(ex), states)
        truth = _brute_oriented(ex, states)
        assert (found is not None) == truth, (trial, ex)
        seen[truth] += 1
        if found is not None:
            pos = np.empty(n, dtype=int)
            pos[list(found.order)] = np.arange(n)
            for a, b in zip(*np.nonzero(ex), strict=True):
                if pos[a] < pos[b]:
                    assert ex[a, b] % states == found.exponent % states
                    assert found.first_neighbour[pos[b]] <= pos[a]
    assert seen[True] > 30 and seen[False] > 30


def test_random_unit_interval_graphs_are_recognised():
    rng = np.random.default_rng(8)
    for _ in range(20):
        n = 300
        x = np.sort(rng.uniform(0, n / 4, n))
        label = rng.permutation(n)
        g = nx.Graph()
        g.add_nodes_from(range(n))
        for i in range(n):
            for j in range(i + 1, n):
                if x[j] - x[i] > 1:
                    break
                g.add_edge(int(label[i]), int(label[j]))
        order = umbrella_order(nx.to_scipy_sparse_array(g, nodelist=range(n)))
        assert order is not None


def variable_range_chain(reaches, couplings, states, rng):
    """g_j = X_j Z_{j+1} ... Z_{j + p_j}, ends j + p_j non-decreasing; shuffled terms and sites."""
    size = len(reaches)
    sites = list(rng.permutation(size + max(reaches)))
    terms = []
    for j, p in enumerate(reaches):
        factors = [(sites[j], 1, 0)] + [(sites[j + d], 0, 1) for d in range(1, p + 1)]
        terms.append((couplings[j], fl.make_string(states, factors)))
    shuffled = [terms[k] for k in rng.permutation(size)]
    return fl.Model.from_terms(shuffled, states=states)


@pytest.mark.parametrize("states", [3, 4, 5])
def test_variable_range_clock_chains_have_the_free_parafermion_spectrum(states):
    rng = np.random.default_rng(states)
    omega = np.exp(2j * np.pi / states)
    for reaches in ([1, 2, 1], [2, 1, 1], [1, 1, 2, 1]):
        ends = [j + p for j, p in enumerate(reaches)]
        if ends != sorted(ends):
            continue
        size = len(reaches)
        sites = size + max(reaches)
        if states**sites > 1100:
            continue
        couplings = rng.uniform(0.5, 1.5, size) * np.exp(1j * rng.uniform(-0.5, 0.5, size))
        m = variable_range_chain(reaches, couplings, states, rng)
        found = indifference_order(m)
        assert found is not None
        # the recurrence P_k = P_{k-1} - y w_k P_{l(k)-1} along the order, evaluated exactly
        # with numpy polynomials, against the independence polynomial from networkx
        w = [complex(m.couplings[j]) ** states for j in found.order]
        polys = [np.array([1.0 + 0j])]
        for k in range(size):
            back = polys[found.first_neighbour[k]]
            step = np.zeros(max(len(polys[-1]), len(back) + 1), dtype=complex)
            step[: len(polys[-1])] += polys[-1]
            step[1 : len(back) + 1] -= w[k] * back
            polys.append(step)
        coeffs = polys[-1]
        g = nx.Graph(fl.frustration_graph(m).to_undirected())
        for s in range(1, len(coeffs)):
            total = sum(
                np.prod([complex(m.couplings[j]) ** states for j in c])
                for c in itertools.combinations(g.nodes, s)
                if not any(g.has_edge(a, b) for a, b in itertools.combinations(c, 2))
            )
            assert abs(coeffs[s] - (-1) ** s * total) < 1e-12
        # free levels sum_k omega^{s_k} eta_k, eta_k^N = 1 / y_k, each dim / N^S times,
        # against numpy's eigenvalues of the dense non-Hermitian matrix
        y = np.roots(coeffs[::-1])
        eta = (1 / y) ** (1 / states)
        levels = [
            sum(omega**sk * e for sk, e in zip(choice, eta, strict=True))
            for choice in itertools.product(range(states), repeat=len(eta))
        ]
        free = np.repeat(levels, m.dimension // states ** len(eta))
        exact = np.linalg.eigvals(m.to_sparse().toarray())
        cost = np.abs(free[:, None] - exact[None, :])
        rows, cols = linear_sum_assignment(cost)
        assert cost[rows, cols].max() < 1e-8


def test_orientation_must_be_consistent():
    # a triangle of Z3 strings whose orientation is cyclic cannot point forward everywhere
    x, z = (1, 0), (0, 1)
    a = fl.make_string(3, [(0, *x), (1, *z)])  # X0 Z1
    b = fl.make_string(3, [(1, *x), (2, *z)])  # X1 Z2
    c = fl.make_string(3, [(2, *x), (0, *z)])  # X2 Z0: closes a ring
    ring = fl.Model.from_terms([(1, a), (1, b), (1, c)], states=3)
    assert indifference_order(ring) is None
    chain = fl.exclusion_chain(6, reach=3, states=4)
    found = indifference_order(chain)
    assert found is not None and found.reaches[:3] == (3, 3, 3)


def test_verdict_and_spectrum_of_a_variable_range_clock_chain():
    # the oriented indifference theorem (Mann-Elman-Wood-Chapman 2024) gives the verdict and a
    # guaranteed spectrum; the levels are checked against numpy's dense eigenvalues
    rng = np.random.default_rng(21)
    couplings = rng.uniform(0.6, 1.4, 4)
    m = variable_range_chain([1, 2, 1, 1], couplings, 3, rng)
    assert fl.chain_structure(m) is None  # not a fixed-reach exclusion chain
    verdict = fl.classify(m)
    assert verdict.kind == "hidden-free"
    assert verdict.guarantee.proven
    sp = fl.free_spectrum(m)
    table = sp.levels(None)
    free = np.repeat(np.asarray(table.energies), table.multiplicity)
    exact = np.linalg.eigvals(m.to_sparse().toarray())
    cost = np.abs(free[:, None] - exact[None, :])
    rows, cols = linear_sum_assignment(cost)
    assert cost[rows, cols].max() < 1e-8


# -- the checks that follow from an indifference ordering (freeladder.graphs.clawfree.check_order)


def _brute_claw_free(g: nx.Graph) -> bool:
    """No vertex with three pairwise non-adjacent neighbours, by trying every triple."""
    return not any(
        not (g.has_edge(a, b) or g.has_edge(a, c) or g.has_edge(b, c))
        for v in g
        for a, b, c in itertools.combinations(g[v], 3)
    )


def _brute_simplicial(g: nx.Graph, clique: tuple[int, ...]) -> bool:
    """A clique K with N(v) minus K a clique for every v in K, by trying every pair."""
    k = set(clique)
    if not all(g.has_edge(a, b) for a, b in itertools.combinations(k, 2)):
        return False
    return all(g.has_edge(a, b) for v in k for a, b in itertools.combinations(set(g[v]) - k, 2))


def test_order_check_agrees_with_networkx_on_small_graphs():
    # a component passes check_order only if it is an indifference graph (brute force over all
    # orderings), networkx finds it chordal, a brute-force search finds no claw and the clique
    # offered is simplicial; when the whole graph is an indifference graph, the verified
    # umbrella_order answer passes on every component
    rng = np.random.default_rng(11)
    passed = failed = 0
    for _ in range(200):
        n = int(rng.integers(2, 8))
        g = nx.gnp_random_graph(n, float(rng.uniform(0.2, 0.8)), seed=int(rng.integers(1 << 30)))
        adj = sps.csr_array(nx.to_scipy_sparse_array(g, nodelist=range(n), dtype=bool))
        adj.sort_indices()
        truth = brute_force_has_umbrella(g)
        umbrella = umbrella_order(adj)
        orders = [level_order(adj)[0], rng.permutation(n)]
        if umbrella is not None:
            orders.append(np.array(umbrella))
        for order in orders:
            checked = check_order(adj, order)
            for comp in nx.connected_components(g):
                verts = np.array(sorted(comp))
                clique = checked.simplicial_clique(verts)
                sub = g.subgraph(comp)
                if clique is None:
                    failed += 1
                    continue
                passed += 1
                assert brute_force_has_umbrella(sub)
                assert nx.is_chordal(sub) and _brute_claw_free(sub)
                assert set(clique) <= comp and _brute_simplicial(g, clique)
        if umbrella is not None:
            checked = check_order(adj, np.array(umbrella))
            assert all(
                checked.simplicial_clique(np.array(sorted(c))) is not None
                for c in nx.connected_components(g)
            )
        else:
            assert not truth
    assert passed > 100 and failed > 100


def _pauli_variable_chain(size: int, rng: np.random.Generator) -> fl.Model:
    """A reach-varying Pauli chain (reaches 1-3, ends non-decreasing), terms shuffled."""
    ends = np.maximum.accumulate(np.arange(size) + rng.integers(1, 4, size))
    chain = fl.exclusion_chain(size, reach=list(ends - np.arange(size)))
    order = rng.permutation(size)
    return fl.Model(chain.strings.take(order), [chain.couplings[int(j)] for j in order])


@pytest.mark.parametrize("kind", ["variable", "reach 3", "ring"])
def test_verdict_of_shuffled_pauli_chains_against_networkx(kind):
    # 1500 shuffled terms: the verdict read off the ordering (claw-free, chordal, simplicial
    # clique) against networkx's chordality test, a brute-force claw search and a brute-force
    # check of the clique; the ring (reach 2, closed) has holes and takes the searches instead,
    # which find no simplicial clique (checked against every clique networkx enumerates)
    rng = np.random.default_rng(17)
    size = 1500
    if kind == "variable":
        m = _pauli_variable_chain(size, rng)
    else:
        reach = 3 if kind == "reach 3" else 2
        chain = fl.exclusion_chain(size, reach=reach)
        if kind == "ring":  # two more terms close the chain into a ring of reach 2
            strings = [chain.strings[j] for j in range(size)]
            n_sites = len(chain.sites)
            extra = [
                fl.pauli("XZ", [n_sites - 2, n_sites - 1]) * fl.pauli("Z", [0]),
                fl.pauli("X", [n_sites - 1]) * fl.pauli("ZZ", [0, 1]),
            ]
            chain = fl.Model.from_terms([(1.0, s) for s in strings + extra])
        order = rng.permutation(len(chain))
        m = fl.Model(chain.strings.take(order), [chain.couplings[int(j)] for j in order])
    g = fl.frustration_graph(m)
    v = fl.classify(m)
    (comp,) = v.components
    chordal = nx.is_chordal(g)
    assert chordal == (kind != "ring")
    assert _brute_claw_free(g)
    if chordal:
        assert comp.kind == "hidden-free"
        assert comp.simplicial_clique is not None
        assert _brute_simplicial(g, comp.simplicial_clique)
        assert comp.even_hole_free is True and v.guarantee.proven
        assert "perfect elimination ordering" in " ".join(comp.reasons)
    else:  # every term's partners i-2, i-1, i+1, i+2 around the ring: no simplicial clique
        assert comp.kind == "integrable" and comp.simplicial_clique is None
        assert not any(_brute_simplicial(g, tuple(k)) for k in nx.enumerate_all_cliques(g))
        assert "perfect elimination ordering" not in " ".join(comp.reasons)
