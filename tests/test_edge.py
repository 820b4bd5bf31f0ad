"""Edge mode and ladder operators, checked with dense numpy matrices built independently here.

Reference: P. Fendley, "Free fermions in disguise", J. Phys. A 52, 335002 (2019),
arXiv:1901.08078 -- the edge operator chi (anticommuting with the end generator only), the
transfer matrix T(u) = sum_s (-u)^s Q^(s), the polynomial P(u^2) = T(u) T(-u) and the raising /
lowering operators Psi_{+-k} = T(-+u_k) chi T(+-u_k) with [H, Psi_{+-k}] = +-2 eta_k Psi_{+-k}.
"""

from __future__ import annotations

import itertools

import numpy as np
import pytest
from helpers import dense_string

import freeladder as fl
from freeladder.edge import edge_mode


def dense_terms(m: fl.Model) -> list[np.ndarray]:
    return [complex(c) * dense_string(g, list(m.sites)) for c, g in m.terms]


def independent_sets(mats: list[np.ndarray]) -> list[tuple[int, ...]]:
    """All independent sets of the frustration graph, from commutators of dense matrices."""
    n = len(mats)
    comm = [
        [a != b and not np.allclose(mats[a] @ mats[b], mats[b] @ mats[a]) for b in range(n)]
        for a in range(n)
    ]
    out = []
    for size in range(1, n + 1):
        found = False
        for subset in itertools.combinations(range(n), size):
            if all(not comm[a][b] for a, b in itertools.combinations(subset, 2)):
                out.append(subset)
                found = True
        if not found:
            break
    return out


def set_products(mats: list[np.ndarray], sets: list) -> dict[tuple[int, ...], np.ndarray]:
    """prod_{j in S} c_j g_j for every independent set S, built from shorter sets."""
    out: dict[tuple[int, ...], np.ndarray] = {}
    for subset in sets:
        out[subset] = mats[subset[0]] if len(subset) == 1 else out[subset[:-1]] @ mats[subset[-1]]
    return out


def dense_transfer(prods: dict, u: float) -> np.ndarray:
    """T(u) = sum_s (-u)^s Q^(s)."""
    dim = next(iter(prods.values())).shape[0]
    t = np.eye(dim, dtype=complex)
    for subset, prod in prods.items():
        t += (-u) ** len(subset) * prod
    return t


def quasi_energies(m: fl.Model, sets: list) -> np.ndarray:
    """eta_k = y_k^(-1/2) from numpy roots of P(y) = sum_S (-y)^|S| prod c_j^2 (N = 2)."""
    c = np.array([complex(v) for v in m.couplings])
    coeffs = np.zeros(max(len(s) for s in sets) + 1, dtype=complex)
    coeffs[0] = 1
    for subset in sets:
        coeffs[len(subset)] += (-1) ** len(subset) * np.prod(c[list(subset)] ** 2)
    roots = np.roots(coeffs[::-1])
    return np.sort(1 / np.sqrt(roots.real))


@pytest.mark.parametrize("reach", [1, 2, 3])
def test_edge_mode_of_exclusion_chains(reach: int) -> None:
    m = fl.exclusion_chain(6, reach=reach, couplings=fl.random_couplings(6, seed=reach))
    e = edge_mode(m)
    assert e.found and e.string is not None and e.term is not None
    # the end of the chain is the simplicial clique {0, ..., p}
    assert set(e.clique) in ({0, 1, 2, 3}, {2, 3, 4, 5}) if reach == 3 else True
    chi = dense_string(e.string, list(m.sites))
    for j, g in enumerate(dense_terms(m)):
        anti = np.allclose(chi @ g, -g @ chi)
        comm = np.allclose(chi @ g, g @ chi)
        assert (anti and j == e.term) or (comm and j != e.term)
    assert np.allclose(chi @ chi, np.eye(chi.shape[0]))


def test_edge_mode_clock_chain() -> None:
    m = fl.clock_chain(3, states=3)
    e = edge_mode(m)
    assert e.found and e.string is not None and e.exponent is not None
    chi = dense_string(e.string, list(m.sites))
    omega = np.exp(2j * np.pi / 3)
    for j, g in enumerate(dense_terms(m)):
        if j == e.term:
            assert np.allclose(chi @ g, omega**e.exponent * g @ chi)
        else:
            assert np.allclose(chi @ g, g @ chi)


def test_no_edge_mode_on_one_site() -> None:
    # X, Y, Z on one site: every one-site string anticommutes with two of them or with none
    m = fl.Model.from_terms([(1, fl.pauli("X")), (2, fl.pauli("Y")), (3, fl.pauli("Z"))])
    e = edge_mode(m)
    assert not e.found and e.string is None
    assert "no string" in e.reason and e.tried == 9  # 3 letters x 3 terms


@pytest.mark.parametrize("reach", [1, 2, 3])
def test_ladder_relations_dense(reach: int) -> None:
    """Psi built from the library's edge mode and an independent dense T(u)."""
    size = 7 - reach // 2
    m = fl.exclusion_chain(size, reach=reach, couplings=fl.random_couplings(size, seed=10 + reach))
    mats = dense_terms(m)
    h = sum(mats)
    sets = independent_sets(mats)
    prods = set_products(mats, sets)
    eta = quasi_energies(m, sets)
    chi = dense_string(edge_mode(m).string, list(m.sites))  # type: ignore[arg-type]
    for e in eta:
        u = 1 / e
        tp, tm = dense_transfer(prods, u), dense_transfer(prods, -u)
        # inversion relation T(u) T(-u) = P(u^2): a multiple of the identity
        prod = tp @ tm
        assert np.allclose(prod, prod[0, 0] * np.eye(len(prod)), atol=1e-9)
        for sign, psi in ((1, tm @ chi @ tp), (-1, tp @ chi @ tm)):
            assert np.linalg.norm(psi) > 1e-6
            resid = h @ psi - psi @ h - sign * 2 * e * psi
            assert np.linalg.norm(resid) <= 1e-8 * np.linalg.norm(psi) * np.linalg.norm(h)


def test_ladder_operators_library() -> None:
    from freeladder.edge import ladder_operators

    m = fl.exclusion_chain(6, reach=2, couplings=fl.random_couplings(6, seed=4))
    lad = ladder_operators(m)
    h = m.to_sparse().toarray()
    mats = dense_terms(m)
    np.testing.assert_allclose(
        np.sort(lad.quasi_energies), quasi_energies(m, independent_sets(mats)), rtol=1e-9
    )
    for e, plus, minus in zip(lad.quasi_energies, lad.raising, lad.lowering, strict=True):
        for sign, psi in ((1, plus.toarray()), (-1, minus.toarray())):
            assert np.linalg.norm(psi) > 1e-6
            resid = h @ psi - psi @ h - sign * 2 * e * psi
            assert np.linalg.norm(resid) <= 1e-8 * np.linalg.norm(psi) * np.linalg.norm(h)
    with pytest.raises(ValueError, match="N = 2"):
        ladder_operators(fl.clock_chain(3, states=3))
