"""Thermodynamics from quasi-energies against exact diagonalization (numpy)."""

from __future__ import annotations

import json

import numpy as np
import pytest
from scipy.special import logsumexp

import freeladder as fl
from freeladder.spectra.spectrum import free_spectrum
from freeladder.spectra.thermo import log_partition_function, thermodynamics


def _ed_free_energy(ev: np.ndarray, t: np.ndarray, sites: int) -> np.ndarray:
    """F / L = -T log sum_i exp(-E_i / T) / L from exact eigenvalues (numpy)."""
    return np.array([-ti * logsumexp(-ev / ti) for ti in t]) / sites


def test_specific_heat_equals_finite_difference_of_exact_free_energy() -> None:
    # Reference: dense eigenvalues (numpy.linalg.eigvalsh); C = -T d^2F/dT^2 by central
    # differences (common practice), step 1e-3, truncation error O(h^2).
    m = fl.exclusion_chain(8, reach=2, couplings=fl.random_couplings(8, seed=3))
    sp = free_spectrum(m)
    ev = np.linalg.eigvalsh(m.to_sparse().toarray())
    t = np.array([0.2, 0.5, 1.0, 2.5])
    h = 1e-3
    f = [_ed_free_energy(ev, t + d, sp.sites) for d in (-h, 0.0, h)]
    c_fd = -t * (f[2] - 2 * f[1] + f[0]) / h**2
    th = thermodynamics(sp, t)
    assert np.allclose(th.specific_heat, c_fd, rtol=1e-4, atol=1e-6)
    assert np.allclose(th.free_energy, f[1], rtol=1e-12, atol=1e-12)
    # energy and entropy from the same exact spectrum
    w = np.exp(-(ev[None, :] - ev.min()) / t[:, None])
    e_ed = (w * ev).sum(axis=1) / w.sum(axis=1) / sp.sites
    assert np.allclose(th.energy, e_ed, rtol=1e-12, atol=1e-12)
    assert np.allclose(th.entropy, (th.energy - th.free_energy) / t, rtol=1e-12)


def test_ising_chain_low_and_high_temperature_limits() -> None:
    # S -> log 2 per site at high T (all 2^L states equally likely; common practice) and the
    # free energy -> ground energy at low T; no overflow at T = 1e-3 or 1e6.
    sp = free_spectrum(fl.ising_chain(500, bond=1.3))
    th = thermodynamics(sp, np.array([1e-3, 1e6]))
    assert np.all(np.isfinite(th.free_energy)) and np.all(np.isfinite(th.specific_heat))
    assert th.free_energy[0] == pytest.approx(sp.ground_energy / sp.sites, abs=1e-3)
    assert th.entropy[1] == pytest.approx(np.log(2.0), rel=1e-6)


def test_clock_chain_partition_function_against_exact_diagonalization() -> None:
    # Z = sum_i exp(-E_i / T) over the complex eigenvalues of a non-Hermitian Z3 chain
    # (numpy.linalg.eigvals) versus the product formula over quasi-energies.
    m = fl.exclusion_chain(5, reach=1, states=3, couplings=fl.complex_couplings(5, seed=2))
    sp = free_spectrum(m)
    ev = np.linalg.eigvals(m.to_sparse().toarray())
    t = np.array([0.3, 1.0, 4.0])
    log_z = log_partition_function(sp, t)
    z_ed = np.array([np.exp(-ev / ti).sum() for ti in t])
    assert np.allclose(np.exp(log_z), z_ed, rtol=1e-9)


def test_thermodynamics_refuses_what_it_cannot_do() -> None:
    sp3 = free_spectrum(fl.exclusion_chain(5, states=3, couplings=fl.complex_couplings(5, seed=1)))
    with pytest.raises(ValueError, match="log_partition_function"):
        thermodynamics(sp3, 1.0)
    sp = free_spectrum(fl.ising_chain(20), lowest=2)
    with pytest.raises(ValueError, match="all quasi-energies"):
        thermodynamics(sp, 1.0)
    with pytest.raises(ValueError, match="> 0"):
        thermodynamics(free_spectrum(fl.ising_chain(4)), [1.0, -2.0])


def test_thermodynamics_is_frozen_and_exports_the_same_numbers() -> None:
    # Reference for the numbers: dense eigenvalues (numpy), as in the tests above.
    m = fl.exclusion_chain(6, reach=1, couplings=fl.random_couplings(6, seed=5))
    sp = free_spectrum(m)
    t = np.array([0.3, 1.0, 4.0])
    th = thermodynamics(sp, t)
    ev = np.linalg.eigvalsh(m.to_sparse().toarray())
    d = json.loads(json.dumps(th.to_dict(), allow_nan=False))
    assert np.allclose(d["free_energy"], _ed_free_energy(ev, t, sp.sites), rtol=1e-12)
    assert d["temperature"] == t.tolist() and d["sites"] == sp.sites
    with pytest.raises(ValueError, match="read-only"):
        th.energy[0] = 0.0
    with pytest.raises(AttributeError):
        th.sites = 3  # type: ignore[misc]
    t[0] = 99.0  # the caller's array is copied, not shared
    assert th.temperature[0] == 0.3
