"""Two routes that must give what the theorems promise without being asked twice.

* The open XY chain in a transverse field, ``-0.7 X_i X_{i+1} - 0.3 Y_i Y_{i+1} - 0.6 Z_i``
  (E. Lieb, T. Schultz and D. Mattis, Ann. Phys. 16, 407 (1961)): the relations fix every
  cycle value, so the single sector is the model; checked against numpy dense exact
  diagonalization and against LSM's construction (single-particle energies = singular values
  of the matrix N of ``H = -i sum_jk a_j N_jk b_k``, numpy SVD).
* A Hermitian claw-free, even-hole-free model with real couplings has real quasi-energies
  (M. Chudnovsky and P. Seymour, J. Combin. Theory B 97, 350 (2007): claw-free graphs have
  real-rooted independence polynomials); checked against numpy dense exact diagonalization.
"""

from __future__ import annotations

import numpy as np
import pytest

import freeladder as fl


def _xy_chain(sites: int) -> fl.Model:
    bonds = [f"- 0.7 X{i} X{i + 1} - 0.3 Y{i} Y{i + 1}" for i in range(sites - 1)]
    return fl.parse_model(" ".join(bonds + [f"- 0.6 Z{i}" for i in range(sites)]))


def test_xy_chain_in_a_field_is_solved_without_a_sector_against_dense_ed() -> None:
    m = _xy_chain(8)
    sp = fl.free_spectrum(m)  # NoTheoremError ("7 independent cycles") before
    assert sp.guaranteed and sp.quasi_energies.dtype == np.float64
    table = sp.levels(None)
    levels = np.sort(np.repeat(np.asarray(table.energies), table.multiplicity))
    dense = np.linalg.eigvalsh(m.to_sparse().toarray())
    assert np.allclose(levels, dense, atol=1e-12)
    assert fl.verify(m).ok


def test_xy_chain_in_a_field_against_the_lsm_construction() -> None:
    sites = 40
    sp = fl.free_spectrum(_xy_chain(sites))
    n = (
        np.diag(np.full(sites, -0.6))
        + np.diag(np.full(sites - 1, 0.7), -1)
        + np.diag(np.full(sites - 1, 0.3), 1)
    )
    lsm = np.sort(np.linalg.svd(n, compute_uv=False))
    assert np.allclose(sp.quasi_energies[1:], lsm[1:], rtol=1e-12)
    # the edge mode: numpy's SVD resolves it only to about eps ||N|| (absolute)
    assert sp.quasi_energies[0] == pytest.approx(lsm[0], abs=1e-14)
    # the ground energy is minus the sum of the single-particle energies
    assert sp.ground_energy == pytest.approx(-lsm.sum(), rel=1e-12)


def test_a_ring_with_free_cycle_values_is_still_refused() -> None:
    sites = 6
    bonds = [f"0.6 X{i} X{(i + 1) % sites} + 0.9 Y{i} Y{(i + 1) % sites}" for i in range(sites)]
    ring = fl.parse_model(" + ".join(bonds + [f"0.3 Z{i}" for i in range(sites)]))
    with pytest.raises(fl.NoTheoremError):
        fl.free_spectrum(ring)


def test_real_couplings_on_the_claw_free_route_give_float_quasi_energies() -> None:
    m = fl.parse_model("X0 Z2 + X0 X1 X2 + Z0 X1 X2 + X0 Z1 Z2 + X2 + Y0 X1")
    sp = fl.free_spectrum(m)  # complex128 with imaginary parts 0 or 1e-170 before
    assert sp.quasi_energies.dtype == np.float64 and np.all(sp.quasi_energies > 0)
    thermo = fl.thermodynamics(sp, [0.5, 1.0, 2.0])  # refused complex values before
    assert np.all(np.isfinite(thermo.free_energy))
    table = sp.levels(None)
    levels = np.sort(np.repeat(np.asarray(table.energies), table.multiplicity))
    assert np.allclose(levels, np.linalg.eigvalsh(m.to_sparse().toarray()), atol=1e-12)
