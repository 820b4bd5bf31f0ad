"""Dipath orientations and switching: the independent-set charges of clock models.

References: R. L. Mann, S. J. Elman, D. R. Wood and A. Chapman, arXiv:2408.09684 (2024) (abstract:
a frustration graph that can be dipath oriented via switching gives commuting independent-set
charges; its body could not be read here, see
freeladder.graphs.switching); S. J. Elman, A. Chapman and
S. T. Flammia, Commun. Math. Phys. 388, 969 (2021) (N = 2: claw-free graphs give commuting
charges).  The outside references are brute force over all vertex subsets and independent sets
(networkx) and dense matrices built from the definitions (numpy, tests/helpers.py).
"""

from __future__ import annotations

import itertools
import json

import networkx as nx
import numpy as np
import pytest
import scipy.sparse as sps
from helpers import dense_string, random_pauli_model

import freeladder as fl
from freeladder.checks.charge_sweep import commutator_sweep, inversion_sweep
from freeladder.graphs.indifference import indifference_order
from freeladder.graphs.switching import dipath_from_exponents, dipath_switching

# -- graph theory against brute force ------------------------------------------------------------


def random_exponents(rng: np.random.Generator, n: int, states: int) -> np.ndarray:
    """A random graph with a random exponent m_ab (and m_ba = -m_ab) on each edge."""
    ex = np.zeros((n, n), dtype=np.int64)
    density = float(rng.uniform(0.25, 0.75))
    for a, b in itertools.combinations(range(n), 2):
        if rng.random() < density:
            # few distinct values, so that consistent paths are common
            e = int(rng.choice([1, states - 1] if rng.random() < 0.8 else range(1, states)))
            ex[a, b], ex[b, a] = e, (-e) % states
    return ex


def charges_commute_brute(ex: np.ndarray, states: int) -> bool:
    """The exact criterion of the proof: for every v and independent I in N(v), |I| >= 2, the
    exponents m_vu (u in I) sum to zero mod N."""
    n = ex.shape[0]
    for v in range(n):
        nbrs = [u for u in range(n) if ex[v, u]]
        for k in range(2, len(nbrs) + 1):
            for group in itertools.combinations(nbrs, k):
                if any(ex[a, b] for a, b in itertools.combinations(group, 2)):
                    continue
                if sum(int(ex[v, u]) for u in group) % states:
                    return False
    return True


def switched(ex: np.ndarray, flip: set[int], states: int) -> np.ndarray:
    out = ex.copy()
    for a, b in zip(*np.nonzero(ex), strict=True):
        if (a in flip) != (b in flip):
            out[a, b] = (-ex[a, b]) % states
    return out


@pytest.mark.parametrize("states", [2, 3, 4, 5, 6])
def test_decision_agrees_with_brute_force(states: int) -> None:
    rng = np.random.default_rng(100 + states)
    seen = {"as written": 0, "switchable only": 0, "blocked": 0}
    for _ in range(150):
        n = int(rng.integers(3, 8))
        ex = random_exponents(rng, n, states)
        d = dipath_from_exponents(sps.csr_array(ex), states)
        assert d.as_written == charges_commute_brute(ex, states)
        truth = any(
            charges_commute_brute(switched(ex, set(flip), states), states)
            for k in range(n + 1)
            for flip in itertools.combinations(range(n), k)
        )
        assert d.switchable == truth
        if d.as_written:
            seen["as written"] += 1
            assert d.switched == () and d.obstruction == () and d.kind == ""
        elif d.switchable:
            seen["switchable only"] += 1
            # the reported switching works, and the reported path is bent as written
            assert charges_commute_brute(switched(ex, set(d.switched), states), states)
            centre, a, b = d.obstruction
            assert ex[centre, a] and ex[centre, b] and not ex[a, b]
            assert (ex[centre, a] + ex[centre, b]) % states
        else:
            seen["blocked"] += 1
            # the witness subgraph alone cannot be switched to a dipath orientation
            sub = ex[np.ix_(d.obstruction, d.obstruction)]
            assert not dipath_from_exponents(sps.csr_array(sub), states).switchable
            if d.kind == "claw":
                centre, *leaves = d.obstruction
                assert all(ex[centre, u] for u in leaves)
                assert not any(ex[a, b] for a, b in itertools.combinations(leaves, 2))
    assert seen["as written"] > 5 and seen["blocked"] > 5
    if states > 2:  # for N = 2 switching changes nothing
        assert seen["switchable only"] > 5


def test_qubit_criterion_is_claw_free() -> None:
    # N = 2: exponents are all 1 = -1, and the criterion must reduce to claw-freeness
    # (Elman-Chapman-Flammia 2021); claws found by brute force over networkx neighbourhoods.
    rng = np.random.default_rng(3)
    both = {True: 0, False: 0}
    for _ in range(60):
        m = random_pauli_model(rng, int(rng.integers(3, 9)), 3, lambda r: float(r.uniform(0.5, 2)))
        g = fl.frustration_graph(m)
        claw = any(
            not any(g.has_edge(a, b) for a, b in itertools.combinations(leaves, 2))
            for v in g
            for leaves in itertools.combinations(g[v], 3)
        )
        assert dipath_switching(m).as_written == (not claw)
        both[not claw] += 1
    assert both[True] > 5 and both[False] > 5


# -- physics against dense matrices --------------------------------------------------------------


def random_weyl_model(
    rng: np.random.Generator, states: int, n_terms: int, n_sites: int, complex_c: bool = True
) -> fl.Model:
    """Distinct random Weyl strings with random couplings (complex when ``complex_c``)."""
    terms, seen = [], set()
    while len(terms) < n_terms:
        powers = rng.integers(states, size=(n_sites, 2))
        factors = [(s, int(a), int(b)) for s, (a, b) in enumerate(powers) if a or b]
        if not factors or tuple(factors) in seen:
            continue
        seen.add(tuple(factors))
        re = float(rng.uniform(0.5, 1.5))
        c = complex(re, float(rng.uniform(-0.5, 0.5))) if complex_c else re
        terms.append((c, fl.make_string(states, factors)))
    return fl.Model.from_terms(terms, states=states, sites=range(n_sites))


def clock_ring(size: int, reach: int, states: int, rng: np.random.Generator) -> fl.Model:
    """g_j = X_j Z_{j+1} ... Z_{j+reach}, sites mod ``size``: the exclusion chain closed into a
    ring (a scenario of our own); its frustration graph is a cyclically oriented cycle power."""
    terms = []
    for j in range(size):
        factors = [(j, 1, 0)] + [((j + d) % size, 0, 1) for d in range(1, reach + 1)]
        c = complex(rng.uniform(0.5, 1.5), rng.uniform(-0.5, 0.5))
        terms.append((c, fl.make_string(states, factors)))
    return fl.Model.from_terms(terms, states=states, sites=range(size))


def dense_charges(m: fl.Model) -> tuple[np.ndarray, dict[int, np.ndarray]]:
    """H and every Q^(s), from dense matrices alone: exponents from g_a g_b vs g_b g_a,
    independent sets by brute force."""
    mats = [dense_string(t.string, m.sites) for t in m.terms]
    n, omega = len(mats), np.exp(2j * np.pi / m.states)
    g = nx.Graph()
    g.add_nodes_from(range(n))
    for a, b in itertools.combinations(range(n), 2):
        if not np.allclose(mats[a] @ mats[b], mats[b] @ mats[a]):
            g.add_edge(a, b)
            ab = mats[a] @ mats[b]
            assert any(np.allclose(ab, omega**k * mats[b] @ mats[a]) for k in range(m.states))
    dim = mats[0].shape[0]
    charges: dict[int, np.ndarray] = {}
    for k in range(1, n + 1):
        for group in itertools.combinations(range(n), k):
            if any(g.has_edge(a, b) for a, b in itertools.combinations(group, 2)):
                continue
            prod = np.eye(dim, dtype=complex)
            for j in group:
                prod = prod @ (m.couplings[j] * mats[j])
            charges[k] = charges.get(k, np.zeros((dim, dim), complex)) + prod
    return charges[1], charges


def commutator_norm(a: np.ndarray, b: np.ndarray) -> float:
    return float(np.abs(a @ b - b @ a).max())


def test_verdict_matches_dense_commutators_of_random_clock_models() -> None:
    # The theorem of freeladder.graphs.switching: [H, Q^(s)] = 0 for all s exactly when the
    # exponents
    # form a dipath orientation of a claw-free graph.  Mutual commutation [Q^(r), Q^(s)] = 0 is
    # the paper's claim for its class (Mann-Elman-Wood-Chapman 2024, abstract); it is checked
    # here on every model called integrable.
    rng = np.random.default_rng(11)
    kinds: dict[str, int] = {}
    for _ in range(160):
        states = int(rng.choice([3, 4, 5]))
        n_sites = 2 if states > 3 else int(rng.choice([2, 3]))
        m = random_weyl_model(rng, states, int(rng.integers(3, 7)), n_sites)
        h, q = dense_charges(m)
        with_h = max(commutator_norm(h, qs) for qs in q.values())
        pairs = itertools.combinations(q.values(), 2)
        mutual = max((commutator_norm(a, b) for a, b in pairs), default=0.0)
        v = fl.classify(m)
        kinds[v.kind] = kinds.get(v.kind, 0) + 1
        assert dipath_switching(m).as_written == (with_h < 1e-9)
        if v.kind in ("integrable", "hidden-free"):
            assert with_h < 1e-9 and mutual < 1e-9
        else:
            assert v.kind == "unsolved" and with_h > 1e-6
            # the witness (a claw, or a bent induced path) lies in one component
            assert len(v.witness) >= 3
            assert any(set(v.witness) <= set(c.terms) for c in v.components)
    assert kinds.get("integrable", 0) > 10 and kinds.get("unsolved", 0) > 10


@pytest.mark.parametrize(("size", "reach", "states"), [(4, 1, 3), (5, 1, 3), (5, 1, 4), (7, 2, 3)])
def test_clock_rings_are_integrable_with_the_cycle_as_witness(size, reach, states) -> None:
    m = clock_ring(size, reach, states, np.random.default_rng(size))
    v = fl.classify(m)
    assert v.kind == "integrable" and not v.guarantee.proven
    comp = v.components[0]
    assert comp.dipath is not None and comp.dipath.as_written and comp.dipath.switched == ()
    # the orientation: every edge j -> j + d (mod size), d <= reach, with g_a g_b = omega g_b g_a
    # (hand-derived: Z X = omega X Z on site j + d)
    expected = {(j, (j + d) % size) for j in range(size) for d in range(1, reach + 1)}
    assert {(a, b) for a, b, _ in comp.dipath.arcs} == expected
    assert all(e == 1 for _, _, e in comp.dipath.arcs)
    # a directed cycle of the orientation is the witness that no ordering exists
    assert len(v.witness) >= 3 and set(v.witness) <= set(range(size))
    if states**size <= 256:  # dense check of the charges (numpy)
        h, q = dense_charges(m)
        assert max(commutator_norm(a, b) for a, b in itertools.combinations(q.values(), 2)) < 1e-9


# -- exact probes (the sweeps) never contradict the verdict -----------------------------------


def test_sweeps_find_a_witness_whenever_the_verdict_is_not_free() -> None:
    # Random Weyl models (N = 3, 4) that are not oriented indifference graphs and whose strings
    # are independent (so a non-zero word is a non-zero operator).  Unsolved: the commutator
    # sweep fails with a witness.  Integrable: it holds; then the inversion relation is probed.
    rng = np.random.default_rng(21)
    found = {"unsolved": 0, "integrable": 0}
    inversion_failed = 0
    tried = 0
    while min(found.values()) < 6 and tried < 400:
        tried += 1
        states = int(rng.choice([3, 4]))
        m = random_weyl_model(rng, states, int(rng.integers(3, 6)), 3, complex_c=False)
        if indifference_order(m) is not None or fl.find_relations(m).count:
            continue
        v = fl.classify(m)
        if v.kind == "hidden-free":  # a chain per component with different exponents
            continue
        try:
            comm = commutator_sweep(m)
            inv = inversion_sweep(m)
        except ValueError:  # the sweep's documented refusal (frontier too wide)
            continue
        found[v.kind] += 1
        if v.kind == "unsolved":
            assert comm.vanishes is False and comm.witness is not None
        else:
            assert comm.vanishes is True
            assert inv.vanishes is not None
            if inv.vanishes is False:
                inversion_failed += 1
                assert inv.witness is not None and str(inv.witness.string)
    assert min(found.values()) >= 6
    assert inversion_failed >= 1


def test_verify_report_names_the_failing_word() -> None:
    # An induced path 0 - 1 - 2 bent at 1 (exponents 2 and 2 at X0, N = 3).
    m = fl.parse_model("Z0 + 0.7 X0 + 1.3 Z0 Z1", states=3)
    v = fl.classify(m)
    assert v.kind == "unsolved" and v.witness == (1, 0, 2)
    assert "Replacing term 2" in " ".join(v.reasons)
    comm = commutator_sweep(m)
    assert comm.vanishes is False and comm.witness is not None
    report = str(fl.verify(m))
    assert str(comm.witness.string) in report
    assert "[1] 0.7 X0; [0] Z0; [2] 1.3 Z0 Z1" in report


# -- the directed frustration graph display ----------------------------------------------------


def test_directed_graph_against_networkx_and_hand_exponents() -> None:
    # Hand-computed (common practice, Z X = omega X Z): Z0 X0 = omega X0 Z0, so 0 -> 1; Z0 Z1 X0
    # = omega X0 Z0 Z1, so 2 -> 1; Z0 and Z0 Z1 commute.
    m = fl.parse_model("Z0 + X0 + Z0 Z1", states=3)
    d = fl.directed_frustration_graph(m)
    assert d.edges == ((0, 1, 1), (2, 1, 1))
    assert d.lines() == ["0 -> 1  (omega)   Z0 -> X0", "2 -> 1  (omega)   Z0 Z1 -> X0"]
    # N = 5: Z0^2 X0 = omega^2 X0 Z0^2 (b -> a with exponent 2)
    d5 = fl.directed_frustration_graph(fl.parse_model("X0 + Z0^2", states=5))
    assert d5.edges == ((1, 0, 2),) and "1 -> 0  (omega^2)" in str(d5)
    # N = 4: Z0^2 X0 = omega^2 X0 Z0^2 = -X0 Z0^2: no direction
    d4 = fl.directed_frustration_graph(fl.parse_model("X0 + Z0^2", states=4))
    assert d4.edges == ((0, 1, 2),) and "0 -- 1  (omega^2 = -1)" in str(d4)
    assert set(d4.to_networkx().edges) == {(0, 1), (1, 0)}
    rng = np.random.default_rng(5)
    for _ in range(20):
        states = int(rng.choice([3, 4, 5, 6]))
        m = random_weyl_model(rng, states, int(rng.integers(2, 8)), 3)
        d = fl.directed_frustration_graph(m)
        g = d.to_networkx()
        full = fl.frustration_graph(m)  # both ordered pairs, exponent on each
        assert set(g.nodes) == set(full.nodes)
        for a, b, data in g.edges(data=True):
            assert full.edges[a, b]["exponent"] == data["exponent"]
            assert 0 < 2 * data["exponent"] <= states
        undirected = {frozenset(e) for e in full.edges}
        assert {frozenset(e) for e in g.edges} == undirected
        assert len(d.edges) == len(undirected)
        tex = d._repr_latex_()
        assert tex.startswith("$$\\begin{array}") and tex.count("\\\\") == len(d.edges) + 1
        assert json.loads(json.dumps(d.to_dict(), allow_nan=False))["states"] == states


def test_results_are_json_ready() -> None:
    m = clock_ring(5, 1, 3, np.random.default_rng(0))
    d = json.loads(json.dumps(fl.dipath_switching(m).to_dict(), allow_nan=False))
    assert d["as_written"] is True and len(d["arcs"]) == 5
    v = json.loads(json.dumps(fl.classify(m).to_dict(), allow_nan=False))
    assert v["components"][0]["dipath"]["as_written"] is True
    bent = fl.dipath_switching(fl.parse_model("Z0 + X0 + Z0 Z1", states=3))
    assert "switching terms [2] would give one" in str(bent)
