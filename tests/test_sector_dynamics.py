"""Majorana-bilinear dynamics in Jordan-Wigner sectors, checked against exact evolution.

Reference: the Hamiltonian and the operators as dense matrices built here from the strings
(tests/helpers.py), projected onto the sector (the joint eigenspace of the cycle and parity
strings, an orthonormal basis from the columns of the product of projectors), and evolved
with scipy.linalg.expm; the full trace with expm of the whole Hamiltonian.  Common practice;
the Majorana form of the terms is A. Chapman and S. T. Flammia, Quantum 4, 278 (2020), and
the Kitaev-type two-leg ladder follows A. Kitaev, Ann. Phys. 321, 2 (2006).
"""

from __future__ import annotations

import functools

import numpy as np
import pytest
import scipy.linalg as sla
import scipy.sparse as sps
from helpers import dense_string

import freeladder as fl
from freeladder.base.errors import NotExpandableError

TIMES = np.array([0.0, 0.37, 1.1, 2.6, 5.3])

README_LADDER = "1.3 Z0 Z1 + 0.9 Z2 Z3 + 1.1 Z4 Z5 + 0.8 X0 X2 + 1.2 Y2 Y4 + 0.7 Y1 Y3 + X3 X5"


def kitaev_ladder(rungs: int, seed: int, complex_part: float = 0.0) -> fl.Model:
    """ZZ rungs, legs alternating XX / YY (one leg shifted by one), random couplings."""
    rng = np.random.default_rng(seed)
    terms = [f"{rng.uniform(0.5, 1.5):.4f} Z{2 * i} Z{2 * i + 1}" for i in range(rungs)]
    for i in range(rungs - 1):
        a, b = ("X", "Y") if i % 2 == 0 else ("Y", "X")
        terms.append(f"{rng.uniform(0.5, 1.5):.4f} {a}{2 * i} {a}{2 * i + 2}")
        terms.append(f"{rng.uniform(0.5, 1.5):.4f} {b}{2 * i + 1} {b}{2 * i + 3}")
    m = fl.parse_model(" + ".join(terms))
    if complex_part:
        c = m.coupling_array().astype(complex)
        c += 1j * complex_part * rng.uniform(-1, 1, c.size)
        m = m.with_couplings(list(c))
    return m


def sparse_pauli(g: fl.WeylString, sites: list[int]) -> sps.csr_array:
    """A Pauli string as a sparse Kronecker product, X|s> = |s+1>, Z|s> = (-1)^s |s>, site 0
    most significant (the same definitions as helpers.dense_string; common practice)."""
    x = sps.csr_array(np.array([[0.0, 1.0], [1.0, 0.0]], dtype=complex))
    z = sps.csr_array(np.diag([1.0, -1.0]).astype(complex))
    ex = g.exponents()
    mat = sps.csr_array(np.array([[1.0 + 0j]]))
    for site in sites:
        a, b = ex.get(site, (0, 0))
        one = sps.identity(2, dtype=complex, format="csr")
        one = one @ x if a else one
        one = one @ z if b else one
        mat = sps.csr_array(sps.kron(mat, one, format="csr"))
    return np.exp(1j * np.pi * g.phase / 2) * mat


def dense(m: fl.Model, text: str | None = None) -> np.ndarray:
    sites = list(m.sites)
    if text is None:
        return np.asarray(sum(complex(c) * dense_string(g, sites) for c, g in m.terms))
    p = fl.parse_model(text, sites=m.sites)
    return complex(p.coupling_array()[0]) * dense_string(p.strings[0], sites)


@functools.lru_cache(maxsize=64)
def sector_basis(text: str, label: tuple[int, ...]) -> np.ndarray:
    """Orthonormal basis of the joint eigenspace of the generators with values ``label``.

    The projector ``prod_k (1 + v_k G_k) / 2`` is a sum of Pauli strings (signed permutation
    matrices), so its columns ``P e_i`` have disjoint supports or are proportional: one
    normalised non-zero column per orbit of basis states is an orthonormal basis.
    """
    m = fl.parse_model(text)
    st = fl.sectors(m)
    d = 2 ** len(m.sites)
    proj = sps.identity(d, dtype=complex, format="csr")
    for g, v in zip(st.generators, label, strict=True):
        gen = sparse_pauli(g, list(m.sites))
        proj = proj @ ((sps.identity(d, format="csr") + v * gen) / 2)
    proj = sps.csc_array(proj)
    covered = np.zeros(d, dtype=bool)
    cols = []
    for i in range(d):
        if covered[i]:
            continue
        col = proj[:, [i]].toarray().ravel()
        support = np.abs(col) > 1e-12
        covered |= support
        if support.any():
            cols.append(col / np.linalg.norm(col))
    return np.array(cols).T


def evolution(h: np.ndarray, times: np.ndarray) -> list[np.ndarray]:
    """``e^{-iHt}`` at each time: numpy eigh for Hermitian H, scipy.linalg.expm otherwise."""
    if np.allclose(h, h.conj().T):
        e, v = np.linalg.eigh(h)
        return [(v * np.exp(-1j * e * t)) @ v.conj().T for t in times]
    return [sla.expm(-1j * h * t) for t in times]


def correlation(h: np.ndarray, a: np.ndarray, b: np.ndarray, times: np.ndarray) -> np.ndarray:
    """``Tr[a^dagger e^{iHt} b e^{-iHt}] / dim``."""
    out = []
    for t, u in zip(times, evolution(h, times), strict=True):
        back = u.conj().T if np.allclose(h, h.conj().T) else sla.expm(1j * h * t)
        out.append(np.trace(a.conj().T @ back @ b @ u) / len(h))
    return np.array(out)


@functools.lru_cache(maxsize=16)
def dense_hamiltonian(text: str) -> np.ndarray:
    return dense(fl.parse_model(text))


def exact_sector(
    m: fl.Model, a: str, b: str, times: np.ndarray, label: tuple[int, ...]
) -> np.ndarray:
    """``Tr_S[a^dagger e^{iHt} b e^{-iHt}] / dim_S`` with H, a, b projected on the sector."""
    q = sector_basis(str(m), label)
    sites = list(m.sites)
    ham = sum(complex(c) * sparse_pauli(g, sites) for c, g in m.terms)
    hs = q.conj().T @ (ham @ q)

    def projected(text: str) -> np.ndarray:
        p = fl.parse_model(text, sites=m.sites)
        return complex(p.coupling_array()[0]) * (
            q.conj().T @ (sparse_pauli(p.strings[0], sites) @ q)
        )

    return correlation(hs, projected(a), projected(b), times)


def exact_full(m: fl.Model, a: str, b: str, times: np.ndarray) -> np.ndarray:
    """``Tr[a^dagger e^{iHt} b e^{-iHt}] / dim`` evolved with the whole Hamiltonian."""
    return correlation(dense_hamiltonian(str(m)), dense(m, a), dense(m, b), times)


@pytest.mark.parametrize(
    ("a", "b"),
    [
        ("Z0 Z1", "Z0 Z1"),  # the boundary rung
        ("X3 X5", "X3 X5"),  # a boundary leg term
        ("Y0 Z1 X2", "Y0 Z1 X2"),  # Z0 Z1 times X0 X2: a path of two terms
        ("Z2 Z3", "1.3 Z0 Z1"),  # two different terms, a coefficient
        ("Y0 Z1 X2", "0.8 X0 X2"),
        ("Z0 Z1 Z4 Z5", "Z2 Z3"),  # two rungs: a bilinear times the Majorana parity
    ],
)
def test_every_sector_of_the_readme_ladder_matches_projected_expm(a: str, b: str) -> None:
    m = fl.parse_model(README_LADDER)
    for label in fl.sectors(m).sectors[::3]:  # three of the eight sectors
        got = fl.sector_two_point(m, a, b, TIMES, sector=label)
        want = exact_sector(m, a, b, TIMES, label)
        assert got.labels == (label,)
        assert np.max(np.abs(got.values - want)) < 1e-10
        assert np.all(got.errors >= 0) and np.max(got.errors) < 1e-9


def test_kitaev_ladder_of_ten_qubits_one_sector() -> None:
    m = kitaev_ladder(5, seed=7)  # 10 qubits, 2^5 sectors of dimension 32
    st = fl.sectors(m)
    label = st.sectors[5]
    for op in ("Z0 Z1", "Z8 Z9", "X0 X2"):
        got = fl.sector_autocorrelation(m, op, TIMES, sector=label)
        assert got.dimension == 32 == 2**10 // st.count
        assert np.max(np.abs(got.values - exact_sector(m, op, op, TIMES, label))) < 1e-10
        assert got.values[0] == pytest.approx(1.0, abs=1e-12)


def test_full_trace_is_the_average_over_sectors() -> None:
    m = kitaev_ladder(3, seed=3)  # 6 qubits, full trace against the whole H
    got = fl.sector_autocorrelation(m, "Z0 Z1", TIMES)  # sector="all"
    assert len(got.labels) == fl.sectors(m).count and got.dimension == 2**6
    assert np.max(np.abs(got.values - exact_full(m, "Z0 Z1", "Z0 Z1", TIMES))) < 1e-10
    cross = fl.sector_two_point(m, "X0 X2", "Y1 Y3", TIMES)
    assert np.max(np.abs(cross.values - exact_full(m, "X0 X2", "Y1 Y3", TIMES))) < 1e-10
    # the sectors really differ (a single sector would not do for the full trace)
    per = [fl.sector_autocorrelation(m, "Z0 Z1", TIMES, sector=s).values for s in got.labels]
    assert np.ptp(np.array(per)[:, -1]) > 1e-3


def test_cycle_values_only_trace_both_parities() -> None:
    m = fl.parse_model(README_LADDER)
    st = fl.sectors(m)
    got = fl.sector_autocorrelation(m, "Z2 Z3", TIMES, sector=(1, -1))
    assert len(got.labels) == 2
    want = np.mean([exact_sector(m, "Z2 Z3", "Z2 Z3", TIMES, s) for s in st.select((1, -1))], 0)
    assert np.max(np.abs(got.values - want)) < 1e-10


def test_complex_couplings_non_hermitian_sector() -> None:
    m = kitaev_ladder(3, seed=11, complex_part=0.3)
    label = fl.sectors(m).sectors[2]
    for a, b in (("Z0 Z1", "Z0 Z1"), ("X0 X2", "Z2 Z3")):
        got = fl.sector_two_point(m, a, b, TIMES, sector=label)
        want = exact_sector(m, a, b, TIMES, label)
        assert np.iscomplexobj(got.values)
        assert np.max(np.abs(got.values - want)) < 1e-9 * max(1.0, np.max(np.abs(want)))


def test_fixed_parity_of_a_four_mode_component_is_not_wick() -> None:
    # three terms on a path: one component of four Majoranas, parity string X0 X1
    m = fl.parse_model("0.7 X0 + Z0 Z1 + 0.4 X1")
    values = {}
    for label in fl.sectors(m).sectors:
        got = fl.sector_autocorrelation(m, "Z0 Z1", TIMES, sector=label)
        assert np.max(np.abs(got.values - exact_sector(m, "Z0 Z1", "Z0 Z1", TIMES, label))) < 1e-10
        assert "parity" in got.formula
        values[label] = got.values
    # Wick's pairings alone give one answer for both parities; the exact ones differ
    assert np.max(np.abs(values[(1,)] - values[(-1,)])) > 0.1
    both = fl.sector_autocorrelation(m, "Z0 Z1", TIMES)
    assert np.max(np.abs(both.values - exact_full(m, "Z0 Z1", "Z0 Z1", TIMES))) < 1e-10


@pytest.mark.parametrize(
    ("op", "reason"),
    [
        ("Z0", "not the pattern of any Majorana bilinear"),
        ("X0 X1", "not the pattern of any Majorana bilinear"),
        ("Y0 X1 Y2 X3", "commutes with every term"),  # a cycle string
    ],
)
def test_refuses_operators_that_are_not_bilinears(op: str, reason: str) -> None:
    m = fl.parse_model(README_LADDER)
    with pytest.raises(NotExpandableError, match=reason):
        fl.sector_autocorrelation(m, op, TIMES)


def test_refuses_models_off_the_jordan_wigner_route() -> None:
    with pytest.raises(NotExpandableError, match="Pauli model"):
        fl.sector_autocorrelation(fl.parse_model("X0 + Z0 Z1", states=3), "X0", TIMES)
    with pytest.raises(NotExpandableError, match="not a line graph"):
        fl.sector_autocorrelation(fl.exclusion_chain(6, reach=2), "X0 Z1 Z2", TIMES)
    with pytest.raises(ValueError, match="valid labels"):
        fl.sector_autocorrelation(fl.parse_model(README_LADDER), "Z0 Z1", TIMES, sector="ground")
