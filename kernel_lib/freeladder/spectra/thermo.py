"""Thermodynamics of a free spectrum: partition function, free energy, entropy, specific heat.

For N = 2 with real quasi-energies every level ``E = c + sum_k +-eta_k`` carries the
multiplicity ``d``, so in closed form

    Z = d exp(-beta c) prod_k 2 cosh(beta eta_k),
    F = c - T log d - T sum_k log(2 cosh(beta eta_k)),
    E = c - sum_k eta_k tanh(beta eta_k),
    C = sum_k (beta eta_k)^2 / cosh^2(beta eta_k),     S = (E - F) / T,

all divided by the number of sites.  ``log(2 cosh t) = |t| + log1p(exp(-2 |t|))`` (through
``numpy.logaddexp``) keeps every term finite at any temperature.

For N > 2 the partition function follows from the same product structure,

    Z = d exp(-beta c) prod_k sum_{s=0}^{N-1} exp(-beta omega^s eta_k),

complex in general (the Hamiltonians are not Hermitian); :func:`log_partition_function`
returns ``log Z`` with each factor's largest real exponent taken out, so it neither
overflows nor underflows.

References
----------
P. Pfeuty, Ann. Phys. 57, 79 (1970) (free-fermion thermodynamics of the Ising chain);
F. C. Alcaraz, M. T. Batchelor and Z.-Z. Liu, arXiv:1612.02617 (2017) (free parafermions).
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any

import numpy as np

from ..base.frozen import readonly_array
from ..base.jsonready import json_ready
from .spectrum import FreeSpectrum

__all__ = ["Thermodynamics", "log_partition_function", "thermodynamics"]


@dataclass(frozen=True)
class Thermodynamics:
    """Per-site thermodynamic functions on a grid of temperatures (units with k_B = 1; frozen).

    Attributes
    ----------
    temperature : ndarray (read-only)
    free_energy, energy, entropy, specific_heat : ndarray (read-only)
        Per site, same shape as ``temperature``.
    sites : int
        The number of sites divided by.
    """

    temperature: np.ndarray
    free_energy: np.ndarray
    energy: np.ndarray
    entropy: np.ndarray
    specific_heat: np.ndarray
    sites: int

    def __post_init__(self) -> None:
        for name in ("temperature", "free_energy", "energy", "entropy", "specific_heat"):
            object.__setattr__(self, name, readonly_array(getattr(self, name), dtype=float))
        object.__setattr__(self, "sites", int(self.sites))

    def to_dict(self) -> dict[str, Any]:
        """JSON-ready fields (lists of floats, one per temperature)."""
        return json_ready(  # type: ignore[no-any-return]
            {
                "temperature": self.temperature,
                "free_energy": self.free_energy,
                "energy": self.energy,
                "entropy": self.entropy,
                "specific_heat": self.specific_heat,
                "sites": self.sites,
            }
        )


def _temperatures(temperature: float | np.ndarray) -> np.ndarray:
    t = np.atleast_1d(np.asarray(temperature, dtype=float))
    if t.ndim != 1 or not np.all(np.isfinite(t)) or np.any(t <= 0):
        raise ValueError("temperatures must be finite and > 0")
    return t


def _check(sp: FreeSpectrum, what: str) -> None:
    if not isinstance(sp, FreeSpectrum):
        raise TypeError(f"{what} needs a FreeSpectrum, got {type(sp).__name__}")
    if not sp.complete:
        raise ValueError(f"{what} needs all quasi-energies; compute the spectrum with lowest=None")
    if sp.parity_constraints:
        raise ValueError(
            f"{what} uses the product formula over all 2^S choices; this Jordan-Wigner sector "
            "keeps only the choices of one Majorana parity (FreeSpectrum.parity_constraints)"
        )


def thermodynamics(sp: FreeSpectrum, temperature: float | np.ndarray) -> Thermodynamics:
    """Free energy, energy, entropy and specific heat per site for N = 2 (closed form).

    Parameters
    ----------
    sp : FreeSpectrum
        N = 2 with real quasi-energies (Hermitian free-fermion models), complete.
    temperature : float or array
        T > 0.

    Returns
    -------
    Thermodynamics

    Raises
    ------
    ValueError
        For N > 2, complex quasi-energies or a complex constant (use
        :func:`log_partition_function`), an incomplete spectrum, or T <= 0.

    References
    ----------
    P. Pfeuty, Ann. Phys. 57, 79 (1970).
    """
    _check(sp, "thermodynamics()")
    if sp.states != 2 or not np.isrealobj(sp.quasi_energies) or complex(sp.constant).imag != 0:
        raise ValueError(
            "thermodynamics() is for N = 2 with real quasi-energies; use log_partition_function()"
        )
    t = _temperatures(temperature)
    beta = 1.0 / t
    eta = np.abs(np.asarray(sp.quasi_energies, dtype=float))
    c = float(complex(sp.constant).real)
    log_d = math.log(sp.degeneracy or 1)
    arg = beta[:, None] * eta[None, :]
    log_2cosh = np.logaddexp(arg, -arg).sum(axis=1)
    free = c - t * log_d - t * log_2cosh
    energy = c - (eta[None, :] * np.tanh(arg)).sum(axis=1)
    heat = ((arg / np.cosh(np.minimum(arg, 350.0))) ** 2).sum(axis=1)
    entropy = (energy - free) / t
    n = sp.sites
    return Thermodynamics(t, free / n, energy / n, entropy / n, heat / n, n)


def log_partition_function(sp: FreeSpectrum, temperature: float | np.ndarray) -> np.ndarray:
    """``log Z`` from the product formula, any N (complex for complex quasi-energies).

    ``Z = d exp(-beta c) prod_k sum_s exp(-beta omega^s eta_k)``; the imaginary part of the
    result is defined modulo ``2 pi``.

    Parameters
    ----------
    sp : FreeSpectrum
        Complete.
    temperature : float or array
        T > 0.

    Returns
    -------
    ndarray of complex, one value per temperature.

    References
    ----------
    F. C. Alcaraz, M. T. Batchelor and Z.-Z. Liu, arXiv:1612.02617 (2017).
    """
    _check(sp, "log_partition_function()")
    t = _temperatures(temperature)
    beta = 1.0 / t
    n = sp.states
    omega = np.exp(2j * np.pi * np.arange(n) / n)
    if n == 2:
        omega = np.array([1.0, -1.0], dtype=complex)
    vals = np.asarray(sp.quasi_energies, dtype=complex)[:, None] * omega[None, :]  # (S, N)
    expo = -beta[:, None, None] * vals[None, :, :]  # (T, S, N)
    top = expo.real.max(axis=2, keepdims=True)
    per_mode = top[..., 0] + np.log(np.exp(expo - top).sum(axis=2))
    return math.log(sp.degeneracy or 1) - beta * complex(sp.constant) + per_mode.sum(axis=1)
