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
from freeladder.base.errors import NoTheoremError
from freeladder.spectra.edge import components, edge_mode, ladder_operators


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
    # chi fails to commute with one end generator only (Fendley 2019): a simplicial vertex
    assert e.clique == (e.term,) and e.term in (0, len(m) - 1)
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


def test_one_site_edge_mode_is_a_simplicial_clique() -> None:
    # X, Y, Z on one site: every one-site string anticommutes with two of them or with none, so
    # no string fails to commute with one term only; X anticommutes with the pair {Y, Z}, a
    # simplicial clique of the triangle (Elman-Chapman-Flammia 2021), and the ladder relations
    # hold for it, checked with dense numpy matrices.
    m = fl.Model.from_terms([(1, fl.pauli("X")), (2, fl.pauli("Y")), (3, fl.pauli("Z"))])
    e = edge_mode(m)
    assert e.found and e.string is not None and len(e.clique) == 2
    h = sum(dense_terms(m))
    chi = dense_string(e.string, list(m.sites))
    eta = np.sqrt(1 + 4 + 9)  # the single quasi-energy of a spin in a field (common practice)
    t = {u: np.eye(2) - u * h for u in (1 / eta, -1 / eta)}
    psi = t[-1 / eta] @ chi @ t[1 / eta]
    assert np.linalg.norm(psi) > 1e-6
    assert np.allclose(h @ psi - psi @ h, 2 * eta * psi)


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
    from freeladder.spectra.edge import ladder_operators

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


def dense_ladder_residual(m: fl.Model, terms: list[int], chi: np.ndarray) -> float:
    """Largest relative residual of [H, Psi] = +-2 eta Psi for the modes of ``terms``.

    T(u), P and the quasi-energies are built here from dense matrices of those terms alone
    (Fendley 2019); H is the whole model.
    """
    mats = dense_terms(m)
    h = sum(mats)
    sub = [mats[j] for j in terms]
    sets = independent_sets(sub)
    prods = set_products(sub, sets)
    part = fl.Model(m.strings.take(terms), [m.couplings[j] for j in terms])
    worst = 0.0
    for e in quasi_energies(part, sets):
        tp, tm = dense_transfer(prods, 1 / e), dense_transfer(prods, -1 / e)
        for sign, psi in ((1, tm @ chi @ tp), (-1, tp @ chi @ tm)):
            if np.linalg.norm(psi) < 1e-9:
                return float("inf")  # a vanishing mode operator is a failure too
            resid = h @ psi - psi @ h - sign * 2 * e * psi
            worst = max(worst, np.linalg.norm(resid) / (np.linalg.norm(psi) * np.linalg.norm(h)))
    return worst


def test_two_decoupled_chains_have_one_edge_mode_each() -> None:
    # two Ising chains on separate sites: each component has its own chi, T and modes
    m = fl.parse_model("X0 + 0.5 Z0 Z1 + X1 + X5 + 0.7 Z5 Z6 + X6")
    comps = [list(c) for c in components(m)]
    assert comps == [[0, 1, 2], [3, 4, 5]]
    lad = ladder_operators(m)
    assert len(lad.edges) == 2 and sorted(lad.component.tolist()) == [0, 0, 1, 1]
    for c, e in enumerate(lad.edges):
        assert e.found and e.string is not None and set(e.clique) <= set(comps[c])
        chi = dense_string(e.string, list(m.sites))
        assert dense_ladder_residual(m, comps[c], chi) < 1e-10
    h = sum(dense_terms(m))
    for e, plus, minus in zip(lad.quasi_energies, lad.raising, lad.lowering, strict=True):
        for sign, psi in ((1, plus.toarray()), (-1, minus.toarray())):
            assert np.linalg.norm(psi) > 1e-6
            assert np.allclose(h @ psi - psi @ h, sign * 2 * e * psi, atol=1e-9)
    # the whole model's T(u) would carry P of the other chain, zero at its roots: Psi = 0
    mats = dense_terms(m)
    prods = set_products(mats, independent_sets(mats))
    chi0 = dense_string(lad.edges[0].string, list(m.sites))  # type: ignore[arg-type]
    other = lad.quasi_energies[lad.component == 1][0]
    whole = dense_transfer(prods, -1 / other) @ chi0 @ dense_transfer(prods, 1 / other)
    assert np.linalg.norm(whole) < 1e-9


def test_edge_mode_needs_a_simplicial_vertex() -> None:
    # X0, Z0, Y0 X1, Z0 Z1: Z0 Z1 anticommutes with X0 alone, but the neighbours Z0 and Z0 Z1
    # of X0 commute, so adding Z0 Z1 makes a claw and the ladder relations fail (checked
    # densely below); Z1 anticommutes with Y0 X1 alone, whose neighbours X0, Z0 are adjacent.
    m = fl.parse_model("X0 + Z0 + Y0 X1 + Z0 Z1")
    terms = list(range(len(m)))
    bad = dense_string(fl.pauli("ZZ"), [0, 1])
    good = dense_string(fl.pauli("IZ"), [0, 1])
    assert dense_ladder_residual(m, terms, bad) > 1e-3
    assert dense_ladder_residual(m, terms, good) < 1e-10
    e = edge_mode(m)
    assert e.found and e.string is not None
    assert dense_ladder_residual(m, terms, dense_string(e.string, list(m.sites))) < 1e-10
    assert fl.verify(m).ok


def random_free_model(rng: np.random.Generator) -> fl.Model | None:
    """Two or three random Pauli blocks on disjoint sites; None unless free spectrum guaranteed.

    Kept: strings independent over GF(2) (no product of terms is a phase), every component
    covered by a theorem (free_spectrum does not refuse and marks the result guaranteed).
    """
    blocks, start = [], 0
    for _ in range(int(rng.integers(2, 4))):
        width = int(rng.integers(1, 3))
        seen: set[str] = set()
        for _ in range(int(rng.integers(2, 2 * width + 2))):
            letters = "".join(rng.choice(list("IXYZ"), width))
            if set(letters) == {"I"} or letters in seen:
                continue
            seen.add(letters)
            sites = list(range(start, start + width))
            blocks.append((float(rng.uniform(0.4, 1.6)), fl.pauli(letters, sites)))
        start += width
    m = fl.Model.from_terms(blocks, states=2, sites=range(start))
    bits = np.hstack([m.strings.x.toarray(), m.strings.z.toarray()]) % 2
    if gf2_rank(bits) < len(m):
        return None
    try:
        sp = fl.free_spectrum(m)
    except NoTheoremError:
        return None
    if not sp.provenance.guaranteed:
        return None
    return m


def gf2_rank(mat: np.ndarray) -> int:
    a = mat.astype(np.int64) % 2
    rank = 0
    for c in range(a.shape[1]):
        pivot = next((r for r in range(rank, a.shape[0]) if a[r, c]), None)
        if pivot is None:
            continue
        a[[rank, pivot]] = a[[pivot, rank]]
        others = np.nonzero(a[:, c])[0]
        others = others[others != rank]
        a[others] ^= a[rank]
        rank += 1
    return rank


def test_random_decoupled_free_models_verify_and_match_numpy() -> None:
    rng = np.random.default_rng(2026)
    seen = 0
    multi = 0
    while seen < 60:
        m = random_free_model(rng)
        if m is None:
            continue
        seen += 1
        multi += len(components(m)) > 1
        report = fl.verify(m)
        assert report.ok, str(report)
        # the free levels with multiplicity against numpy's eigenvalues of the dense H
        table = fl.free_spectrum(m).levels(None)
        deg = table.multiplicity or 2 ** len(m.sites) // len(table)
        free = np.sort(np.repeat(np.asarray(table.energies).real, deg))
        exact = np.linalg.eigvalsh(sum(dense_terms(m)))
        np.testing.assert_allclose(free, exact, atol=1e-9)
    assert multi >= 30
