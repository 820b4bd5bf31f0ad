"""Charges Q^(s), the charge series and the transfer matrix, checked with dense numpy matrices.

References are named beside each check; "brute force" is networkx enumeration of independent
sets (cliques of the complement graph).
"""

from __future__ import annotations

import itertools
import math
from fractions import Fraction

import networkx as nx
import numpy as np
import pytest
import sympy
from helpers import random_pauli_model

import freeladder as fl


def _brute_sets(graph: nx.Graph) -> dict[int, list[tuple[int, ...]]]:
    out: dict[int, list[tuple[int, ...]]] = {0: [()]}
    for clique in nx.enumerate_all_cliques(nx.complement(graph)):
        out.setdefault(len(clique), []).append(tuple(sorted(clique)))
    return out


def _random_pauli_model(rng: np.random.Generator, n_terms: int, n_sites: int) -> fl.Model:
    """Random Pauli model with float couplings in [0.5, 1.5)."""
    return random_pauli_model(rng, n_terms, n_sites, lambda r: float(r.uniform(0.5, 1.5)))


def test_path_counts_are_binomials_summing_to_fibonacci() -> None:
    # Common practice: a path of M vertices has C(M - s + 1, s) independent sets of size s,
    # F(M + 2) in all (Fibonacci, F(1) = F(2) = 1).
    fib = [0, 1]
    for _ in range(40):
        fib.append(fib[-1] + fib[-2])
    for size in range(1, 31):
        counts = [step.count for step in fl.charge_series(fl.ising_chain((size + 1) // 2))]
        n_terms = len(fl.ising_chain((size + 1) // 2))
        assert counts == [math.comb(n_terms - s + 1, s) for s in range(len(counts))]
        assert sum(counts) == fib[n_terms + 2]


def test_square_of_path_totals() -> None:
    # Common practice: independent sets of the square of a path, a(M) = a(M-1) + a(M-3),
    # 1, 2, 3, 4, 6, 9, 13, ... for M = 0, 1, 2, ...
    a = [1, 2, 3]
    for _ in range(30):
        a.append(a[-1] + a[-3])
    for size in range(1, 30):
        total = sum(step.count for step in fl.charge_series(fl.exclusion_chain(size, reach=2)))
        assert total == a[size]


def test_counts_and_sets_match_brute_force_on_random_models() -> None:
    # Reference: networkx enumeration on the frustration graph of random Pauli models.
    rng = np.random.default_rng(7)
    for _ in range(25):
        m = _random_pauli_model(rng, int(rng.integers(2, 13)), 4)
        brute = _brute_sets(fl.frustration_graph(m))
        steps = list(fl.charge_series(m))
        assert [st.count for st in steps] == [len(brute[s]) for s in range(len(brute))]
        for st in steps:
            listed = list(st.sets())
            assert len(listed) == len(set(listed)) == st.count
            assert sorted(listed) == sorted(brute[st.order])


def _variable_chain(size: int, rng: np.random.Generator, states: int = 3) -> fl.Model:
    """A chain whose reach changes along it (random reaches 1-3), terms relabelled at random."""
    ends = np.maximum.accumulate(np.arange(size) + rng.integers(1, 4, size))
    chain = fl.exclusion_chain(size, reach=list(ends - np.arange(size)), states=states)
    order = rng.permutation(size)
    return fl.Model(chain.strings.take(order), [chain.couplings[int(j)] for j in order])


def test_counts_on_variable_reach_chains_match_brute_force() -> None:
    # Reference: networkx enumeration of independent sets (cliques of the complement graph) on
    # chains whose reach varies along the chain (counted by the transfer recurrence along the
    # indifference ordering, not by the general recursion).
    rng = np.random.default_rng(11)
    for size in (1, 2, 5, 9, 14, 18):
        for states in (2, 3):
            m = _variable_chain(size, rng, states)
            graph = fl.frustration_graph(m)
            graph = graph.to_undirected() if graph.is_directed() else graph
            brute = _brute_sets(graph)
            assert fl.charge_counts(m) == tuple(len(brute[s]) for s in range(len(brute)))


def test_counts_of_chain_orderings_against_networkx_on_unit_interval_graphs() -> None:
    # Reference: networkx enumeration on unit interval graphs drawn at random (points on a line,
    # an edge when two lie closer than 1: common practice for indifference graphs).
    from freeladder.spectra.charges import _ordered_counts

    rng = np.random.default_rng(5)
    for _ in range(30):
        n = int(rng.integers(1, 16))
        points = np.sort(rng.uniform(0, n / 2, n))
        graph = nx.Graph()
        graph.add_nodes_from(range(n))
        graph.add_edges_from(
            (a, b) for a in range(n) for b in range(a + 1, n) if points[b] - points[a] < 1
        )
        first = [min([k, *graph.neighbors(k)]) for k in range(n)]
        brute = _brute_sets(graph)
        assert _ordered_counts(first) == tuple(len(brute[s]) for s in range(len(brute)))


def test_long_chain_counts_are_exact_binomials() -> None:
    # Common practice: the p-th power of a path on M vertices has C(M - p(s-1), s) independent
    # sets of size s; here checked against math.comb at 3000 terms (the counts have up to about
    # 2000 digits), and the variable-reach recurrence against the same binomials when every
    # reach is equal (its ordering given directly).
    from freeladder.spectra.charges import _chain_counts, _ordered_counts

    for reach in (1, 2, 3):
        expected = tuple(
            math.comb(3000 - reach * (s - 1), s) for s in range((3000 + reach) // (reach + 1) + 1)
        )
        expected = tuple(c for c in expected if c)
        assert _chain_counts(3000, reach) == expected
        first = [max(0, k - reach) for k in range(3000)]
        assert _ordered_counts(first) == expected


def _dense(g: fl.WeylString, sites: tuple) -> np.ndarray:
    return g.to_sparse(sites).toarray()


def test_charge_matrix_matches_dense_products() -> None:
    # Reference: numpy products of the dense term matrices c_j g_j over the independent sets.
    rng = np.random.default_rng(1)
    m = _random_pauli_model(rng, 9, 4)
    sites = m.sites
    mats = [c * _dense(g, sites) for c, g in m.terms]
    brute = _brute_sets(fl.frustration_graph(m))
    for s in range(len(brute)):
        expected = np.zeros((m.dimension, m.dimension), dtype=complex)
        for subset in brute[s]:
            prod = np.eye(m.dimension, dtype=complex)
            for j in subset:
                prod = prod @ mats[j]
            expected += prod
        got = fl.charge(m, s).to_sparse().toarray()
        assert np.allclose(got, expected, atol=1e-12)
    assert fl.charge(m, len(brute)).to_sparse().nnz == 0


def test_clock_charge_phases_match_dense_products() -> None:
    # Reference: numpy products for N = 3, where the product phases are nontrivial.
    m = fl.clock_chain(3, field=[1, 2, 3], bond=[Fraction(1, 2), 2], states=3)
    sites = m.sites
    mats = [complex(c) * _dense(g, sites) for c, g in m.terms]
    brute = _brute_sets(nx.Graph(fl.frustration_graph(m).to_undirected()))
    for s in range(1, len(brute)):
        expected = sum(
            np.linalg.multi_dot([np.eye(m.dimension), *[mats[j] for j in sub]]) for sub in brute[s]
        )
        assert np.allclose(fl.charge(m, s).to_sparse().toarray(), expected, atol=1e-12)


@pytest.mark.parametrize("reach", [1, 2])
def test_inversion_relation_fermions(reach: int) -> None:
    # T(u) T(-u) = P(u^2) 1 (P. Fendley, J. Phys. A 52, 335002 (2019)); dense numpy products.
    m = fl.exclusion_chain(7, reach=reach, couplings=fl.random_couplings(7, seed=reach))
    poly = fl.exclusion_polynomial(m)
    for u in (0.37, 1.3):
        t_plus = fl.transfer_matrix(m, u).to_sparse().toarray()
        t_minus = fl.transfer_matrix(m, -u).to_sparse().toarray()
        assert np.allclose(t_plus @ t_minus, poly(u**2) * np.eye(m.dimension), atol=1e-10)


def test_inversion_relation_parafermions() -> None:
    # T(u) T(omega u) T(omega^2 u) = P(u^3) 1 for the N = 3 chain (Alcaraz-Pimenta 2020).
    m = fl.exclusion_chain(5, reach=1, states=3, couplings=[1, 2, Fraction(1, 2), 3, 1])
    poly = fl.exclusion_polynomial(m)
    omega = np.exp(2j * np.pi / 3)
    u = 0.41
    mats = [fl.transfer_matrix(m, u * omega**k).to_sparse().toarray() for k in range(3)]
    lhs = mats[0] @ mats[1] @ mats[2]
    assert np.allclose(lhs, poly(u**3) * np.eye(m.dimension), atol=1e-9)


@pytest.mark.parametrize(("reach", "states"), [(1, 2), (2, 2), (3, 2), (1, 3), (2, 3)])
def test_charges_commute_with_hamiltonian(reach: int, states: int) -> None:
    # [H, Q^(s)] = 0 for exclusion chains (Fendley 2019; Alcaraz-Pimenta 2020); dense numpy.
    n_terms = 6 if states == 2 else 4
    m = fl.exclusion_chain(
        n_terms, reach=reach, states=states, couplings=fl.random_couplings(n_terms, seed=9)
    )
    ham = m.to_sparse().toarray()
    steps = list(fl.charge_series(m))
    for st in steps[1:]:
        q = fl.charge(m, st.order).to_sparse().toarray()
        assert np.abs(ham @ q - q @ ham).max() < 1e-12
    # Single products of one independent set do not commute with H in general (BACKGROUND
    # sec. 4): only the whole sum does.
    products = [t.string.to_sparse(m.sites).toarray() for st in steps[1:] for t in st.terms]
    assert max(np.abs(ham @ g - g @ ham).max() for g in products) > 1e-3


def test_huge_order_is_counted_not_listed() -> None:
    m = fl.exclusion_chain(2000, reach=1)
    step = list(fl.charge_series(m))[600]
    assert step.count == math.comb(2000 - 600 + 1, 600)  # common practice, as above
    with pytest.raises(ValueError, match=str(step.count)):
        _ = step.terms
    head = step.head(3)
    assert [t.indices for t in head] == list(itertools.islice(step.sets(), 3))
    for t in head:
        assert len(t.indices) == 600 and len(set(t.indices)) == 600
        # Independent: consecutive chain terms excluded (reach 1).
        assert min(np.diff(t.indices)) >= 2
        # The product string equals the WeylString product of its factors.
        expected = m.strings[t.indices[0]]
        for j in t.indices[1:50]:
            expected = expected * m.strings[j]
        assert set(expected.support) <= set(t.string.support)
    assert "more products" in step.text(2)
    with pytest.raises(ValueError, match="limit=10"):
        fl.charge(fl.exclusion_chain(10), 3, limit=10)


def test_symbolic_charges_and_transfer_matrix() -> None:
    # By hand: Q^(2) of a 4-term path has the products of sets {0,2}, {0,3}, {1,3}.
    c = sympy.symbols("c_0:4")
    m = fl.exclusion_chain(4, reach=1, couplings=list(c))
    q2 = fl.charge(m, 2)
    assert sorted(str(v) for v in q2.coefficients) == ["c_0*c_2", "c_0*c_3", "c_1*c_3"]
    step = list(fl.charge_series(m))[2]
    assert step.coefficient == sympy.expand(
        c[0] ** 2 * c[2] ** 2 + c[0] ** 2 * c[3] ** 2 + c[1] ** 2 * c[3] ** 2
    )
    assert "c_{0} c_{2}" in step._repr_latex_()
    u = sympy.Symbol("u")
    t_sym = fl.transfer_matrix(m, u)
    values = {u: Fraction(1, 3), **{ci: k + 1 for k, ci in enumerate(c)}}
    numeric = fl.transfer_matrix(m.subs({ci: k + 1 for k, ci in enumerate(c)}), Fraction(1, 3))
    assert np.allclose(t_sym.subs(values).to_sparse().toarray(), numeric.to_sparse().toarray())
