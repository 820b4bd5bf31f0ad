"""Builders (freeladder.algebra.builders)
against matrices built here from explicit one-site matrices."""

from __future__ import annotations

from fractions import Fraction
from typing import Any

import numpy as np
import pytest
import scipy.sparse as sps

import freeladder as fl


def shift(n: int) -> np.ndarray:
    x = np.zeros((n, n), dtype=complex)
    for s in range(n):
        x[(s + 1) % n, s] = 1  # X|s> = |s+1 mod N>
    return x


def clock(n: int) -> np.ndarray:
    return np.diag(np.exp(2j * np.pi * np.arange(n) / n))  # Z|s> = omega^s |s>


X2, Z2 = shift(2), clock(2)
Y2 = np.array([[0, -1j], [1j, 0]])


def kron_word(n: int, ops: dict[Any, np.ndarray], sites: list[Any]) -> sps.csr_array:
    out = sps.csr_array(np.eye(1, dtype=complex))
    for s in sites:
        out = sps.csr_array(sps.kron(out, sps.csr_array(ops.get(s, np.eye(n))), format="csr"))
    return out


def close(a: Any, b: Any, atol: float = 1e-12) -> bool:
    d = abs(sps.csr_array(a) - sps.csr_array(b))
    return d.nnz == 0 or float(d.max()) <= atol


@pytest.mark.parametrize("reach", [1, 2, 3])
@pytest.mark.parametrize("states", [2, 3, 4])
def test_exclusion_chain_obeys_the_exclusion_algebra(reach: int, states: int) -> None:
    # Exclusion algebra (BACKGROUND section 3; F. C. Alcaraz and R. A. Pimenta, Phys. Rev. B
    # 102, 121101(R) (2020)): g_j^N = 1, g_j g_k = omega g_k g_j for j < k <= j + p, commuting
    # beyond.  g_j = X_j Z_{j+1} ... Z_{j+p} is built here with kron and compared to the model.
    n, p = states, reach
    m_terms = p + 2  # so that pairs beyond the reach exist
    sites = list(range(m_terms + p))
    couplings = [0.5 + 0.25 * j for j in range(m_terms)]
    model = fl.exclusion_chain(m_terms, reach=p, states=n, couplings=couplings)
    assert model.sites == tuple(sites)
    omega = np.exp(2j * np.pi / n)
    gs = []
    for j in range(m_terms):
        ops = {j: shift(n), **{j + d: clock(n) for d in range(1, p + 1)}}
        g = kron_word(n, ops, sites)
        gs.append(g)
        term = model.strings.take([j]).to_sparse([1.0])
        assert close(term, g), f"term {j} is not X_j Z_(j+1) ... Z_(j+p)"
        assert model.couplings[j] == couplings[j]
    eye = sps.identity(n ** len(sites), format="csr")
    for j, g in enumerate(gs):
        power = eye
        for _ in range(n):
            power = power @ g
        assert close(power, eye)
        for k in range(j + 1, m_terms):
            factor = omega if k <= j + p else 1.0
            assert close(g @ gs[k], factor * (gs[k] @ g)), (j, k)
    assert close(model.to_sparse(), sum(c * g for c, g in zip(couplings, gs, strict=True)))


def test_ising_chain_open_and_periodic() -> None:
    # H = -sum h_i X_i - sum J_i Z_i Z_{i+1} (P. Pfeuty, Ann. Phys. 57, 79 (1970)).
    size = 4
    h = [0.5, 1.0, 1.5, 2.0]
    jj = [0.3, 0.6, 0.9, 1.2]
    sites = list(range(size))
    ref = sum(-h[i] * kron_word(2, {i: X2}, sites) for i in range(size))
    ref += sum(-jj[i] * kron_word(2, {i: Z2, i + 1: Z2}, sites) for i in range(size - 1))
    assert close(fl.ising_chain(size, field=h, bond=jj[:3]).to_sparse(), ref)
    periodic = ref - jj[3] * kron_word(2, {3: Z2, 0: Z2}, sites)
    assert close(fl.ising_chain(size, field=h, bond=jj, boundary="periodic").to_sparse(), periodic)
    # interleaved term order X_0, Z_0 Z_1, X_1, ...
    assert str(fl.ising_chain(2)) == "-X0 - Z0 Z1 - X1"


def test_kitaev_honeycomb_bonds() -> None:
    # A. Kitaev, Ann. Phys. 321, 2 (2006): H = sum J_x XX + J_y YY + J_z ZZ over the links of the
    # brick-wall patch described in the docstring (x: c even, y: c odd, z: vertical if r+c even).
    rows, cols = 2, 3
    jx, jy, jz = 0.7, 1.1, 1.3
    sites = [(r, c) for r in range(rows) for c in range(cols)]
    ref: Any = 0
    for r in range(rows):
        for c in range(cols - 1):
            mat, coup = (X2, jx) if c % 2 == 0 else (Y2, jy)
            ref = ref + coup * kron_word(2, {(r, c): mat, (r, c + 1): mat}, sites)
    for r in range(rows - 1):
        for c in range(cols):
            if (r + c) % 2 == 0:
                ref = ref + jz * kron_word(2, {(r, c): Z2, (r + 1, c): Z2}, sites)
    m = fl.kitaev_honeycomb(rows, cols, jx=jx, jy=jy, jz=jz)
    assert m.sites == tuple(sites)
    assert len(m) == 4 + 2
    assert close(m.to_sparse(), ref)


@pytest.mark.parametrize("states", [3, 4])
def test_clock_chain(states: int) -> None:
    # H = -sum f_i X_i - sum J_i Z_i Z_{i+1}^dagger (R. J. Baxter, Phys. Lett. A 140, 155 (1989);
    # P. Fendley, J. Phys. A 47, 075001 (2014)).
    n, size = states, 3
    f, jj = [0.5, 1.0, 1.5], [0.75, 1.25]
    sites = list(range(size))
    z = clock(n)
    ref = sum(-f[i] * kron_word(n, {i: shift(n)}, sites) for i in range(size))
    ref += sum(-jj[i] * kron_word(n, {i: z, i + 1: z.conj().T}, sites) for i in range(size - 1))
    m = fl.clock_chain(size, field=f, bond=jj, states=n)
    assert close(m.to_sparse(), ref)


def test_ising_lattice() -> None:
    # Transverse-field Ising model on a 2 x 2 open square lattice (common practice).
    sites = [(0, 0), (0, 1), (1, 0), (1, 1)]
    bonds = [((0, 0), (0, 1)), ((0, 0), (1, 0)), ((0, 1), (1, 1)), ((1, 0), (1, 1))]
    ref = sum(-0.5 * kron_word(2, {s: X2}, sites) for s in sites)
    ref += sum(-1.5 * kron_word(2, {a: Z2, b: Z2}, sites) for a, b in bonds)
    assert close(fl.ising_lattice(2, 2, field=0.5, bond=1.5).to_sparse(), ref)


def test_coupling_patterns_and_errors() -> None:
    assert fl.staggered(5, 1, 2) == [1, 2, 1, 2, 1]
    a = fl.random_couplings(6, 0.3, 1.7, seed=3)
    assert np.array_equal(a, fl.random_couplings(6, 0.3, 1.7, seed=3))
    assert np.all((a >= 0.3) & (a < 1.7))
    z = fl.complex_couplings(5, (0.5, 1.5), seed=1)
    assert np.all((np.abs(z) >= 0.5) & (np.abs(z) < 1.5))
    m = fl.exclusion_chain(3, couplings="symbols")
    assert [str(c) for c in m.couplings] == ["c_0", "c_1", "c_2"]
    with pytest.raises(ValueError, match="not finite"):
        fl.exclusion_chain(3, couplings=np.array([1.0, np.nan, 1.0]))
    with pytest.raises(ValueError, match="3 needed"):
        fl.exclusion_chain(3, couplings=[1, 2])
    with pytest.raises(ValueError):
        fl.exclusion_chain(0)


def test_sizes_and_values_are_checked_at_the_door() -> None:
    # Issue 14, item 14: each of these used to be accepted and then fail later with another
    # exception type (MemoryError, OverflowError) or a hang.
    from decimal import Decimal

    with pytest.raises(ValueError, match="n_terms must be between 1 and"):
        fl.exclusion_chain(10**12)
    with pytest.raises(TypeError, match="n_terms must be an integer"):
        fl.exclusion_chain(4.0)  # type: ignore[arg-type]
    with pytest.raises(ValueError, match="states per site"):
        fl.exclusion_chain(4, states=1)
    with pytest.raises(ValueError, match="not finite"):
        fl.exclusion_chain(3, couplings=[1, Decimal("NaN"), 1])
    with pytest.raises(TypeError, match="is text"):
        fl.exclusion_chain(3, couplings=["1", "2", "3"])
    with pytest.raises(ValueError, match="rows must be between"):
        fl.ising_lattice(0, 3)
    with pytest.raises(ValueError, match="cols"):
        fl.ising_lattice(10**6, 10**6)
    with pytest.raises(TypeError, match="is text"):
        fl.ising_lattice(2, 2, bond="1e-200")  # type: ignore[arg-type]
    with pytest.raises(ValueError, match="cols"):
        fl.kitaev_honeycomb(2, 1)
    with pytest.raises(ValueError, match="n_sites"):
        fl.clock_chain(0)
    with pytest.raises(ValueError, match="low <= high"):
        fl.random_couplings(3, 2.0, 1.0)
    with pytest.raises(ValueError, match="finite"):
        fl.random_couplings(3, 0.0, float("inf"))
    with pytest.raises(ValueError, match="0 <= low <= high"):
        fl.complex_couplings(3, (-1.0, 1.0))
    with pytest.raises(TypeError, match="seed"):
        fl.random_couplings(3, seed=1.5)  # type: ignore[arg-type]
    # Exact values are kept exact: a finite Decimal is the fraction it writes, a huge integer
    # stays an int (the exact polynomial takes it; floating-point numerics refuse it by name).
    m = fl.exclusion_chain(3, couplings=[1, Decimal("0.1"), 10**400])
    assert m.couplings[1] == Fraction(1, 10) and m.couplings[2] == 10**400
    # P(y) = 1 - y sum_j c_j^2 + ... for N = 2 (Alcaraz-Pimenta 2020, weights c_j^N)
    assert fl.exclusion_polynomial(m).coefficients[1] == -(1 + Fraction(1, 100) + 10**800)
    with pytest.raises(ValueError, match="term 2: .* too large for floating-point"):
        m.coupling_array()
    # A tiny bond is a valid coupling: construction succeeds and keeps it.
    assert -1e-200 in fl.ising_lattice(2, 2, bond=1e-200).couplings
