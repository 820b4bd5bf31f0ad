"""Discrete time: the edge autocorrelation under the transfer-matrix circuit.

For N = 2 and real couplings the transfer matrix

    T(u) = sum_S (-u)^|S| prod_{j in S} c_j h_j      (S over the independent sets of terms)

(:func:`freeladder.transfer_matrix`; P. Fendley, J. Phys. A 52, 335002 (2019)) commutes with H
and obeys ``T(u) T(-u) = P(u^2) = prod_k (1 - u^2 eta_k^2)``; on the joint eigenspace
``H = sum_k s_k eta_k`` (``s_k = +-1``) it is ``prod_k (1 - u s_k eta_k)``.  Every product in
``T`` is Hermitian (commuting Hermitian terms), so ``T(i theta)^dagger = T(-i theta)`` and

    U(theta) = T(i theta) / prod_k sqrt(1 + theta^2 eta_k^2) = exp(-i sum_k s_k phi_k),
    phi_k = arctan(theta eta_k),

is unitary, a Floquet operator diagonal in the hidden modes: one step of it is
``exp(-i theta H)`` to first order in theta, with the single-particle phases ``phi_k`` in place
of ``theta eta_k``.  The modes ``Psi_{+-k}`` flip ``s_k`` alone, so they pick up
``exp(+-2 i phi_k)`` per step, and the edge operator's autocorrelation after n steps is

    C(n) = Tr[chi^dagger U^-n chi U^n] / dim = w_0 + sum_k W_k cos(2 n phi_k)

with the weights of :func:`freeladder.edge_expansion` (the ``Psi_k^dagger Psi_l`` with k != l
change two labels and are traceless).  The derivation is written here from the properties of
``T`` above; those properties are checked on every tested model (unitarity of ``U`` and the
correlation against dense evolution by ``U``, ``tests/test_circuits.py``).

Which circuits keep the structure.  Only Floquet operators that are functions of the commuting
charges (``T(u)`` at any real or imaginary ``u``) are diagonal in the hidden modes.  A product
of exponentials of parts of H, ``exp(-i tau H_A) exp(-i tau H_B)`` (a Trotter or brickwork
step), is not: ``[H_A, H_B] != 0`` and the step's Floquet Hamiltonian has other modes; for the
four-fermion chain many brickwork circuits are not even free (K. Fukai and B. Pozsgay,
arXiv:2402.02984, who build ``T(u)`` of that chain as a symmetric product of local gates).
Such circuits are not computed here.  I. Vona, M. Mestyan and B. Pozsgay, arXiv:2405.20832
(2024), compute two-point functions in discrete time through the hidden fermions; only their
abstract was read for this module, so no formula is taken from them.

N > 2 or complex couplings: ``T(i theta)`` is not proportional to a unitary (the products are
not Hermitian), and :func:`circuit_autocorrelation` refuses.

References
----------
P. Fendley, J. Phys. A 52, 335002 (2019), arXiv:1901.08078 (the transfer matrix, the modes);
F. C. Alcaraz and R. A. Pimenta, Phys. Rev. B 102, 121101(R) (2020), arXiv:2005.14622 (any
reach); K. Fukai and B. Pozsgay, arXiv:2402.02984 (2024) (circuits from the transfer matrix);
I. Vona, M. Mestyan and B. Pozsgay, arXiv:2405.20832 (2024) (discrete-time dynamics).
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass
from typing import Any

import numpy as np

from ..algebra.model import Model
from ..algebra.strings import WeylString
from ..base.errors import NotExpandableError
from ..base.frozen import ArrayRecord
from .dynamics import EdgeExpansion, edge_expansion

__all__ = ["CircuitAutocorrelation", "circuit_autocorrelation"]

_EPS = float(np.finfo(np.float64).eps)


@dataclass(frozen=True)
class CircuitAutocorrelation(ArrayRecord):
    """The edge autocorrelation under ``U(theta) = T(i theta) / |...|`` (result of
    :func:`circuit_autocorrelation`).

    Attributes
    ----------
    operator : str
        ``chi`` as model text.
    angle : float
        theta.
    steps : numpy.ndarray
        The integers n.
    values : numpy.ndarray
        ``Tr[chi^dagger U^-n chi U^n] / dim``.
    errors : numpy.ndarray
        Estimated absolute errors (weight errors, ``2 |n| |W_k| d phi_k`` from the quasi-energy
        errors, and rounding of the sum); estimates, not proofs.
    phases : numpy.ndarray
        ``phi_k = arctan(theta eta_k)``: half the phase a mode picks up per step.
    plateau : float
        ``w_0``, the weight of the exact zero mode (phase 0).
    expansion : EdgeExpansion
        The weights and quasi-energies (the same as in continuous time).
    circuit : str
        The Floquet operator.
    """

    operator: str
    angle: float
    steps: np.ndarray
    values: np.ndarray
    errors: np.ndarray
    phases: np.ndarray
    plateau: float
    expansion: EdgeExpansion
    circuit: str

    ARRAYS = ("steps", "values", "errors", "phases")

    def __repr__(self) -> str:
        worst = f"{float(np.max(self.errors)):.2g}" if self.errors.size else "0"
        return (
            f"CircuitAutocorrelation(chi = {self.operator}, theta = {self.angle:g}, "
            f"{self.steps.size} steps, plateau {self.plateau:.6g}, largest error {worst})"
        )


def _check_steps(steps: Any) -> np.ndarray:
    arr = np.asarray(steps)
    if arr.ndim != 1 or arr.dtype.kind not in "iuf":
        raise ValueError("steps must be a 1-d array of integers (the number of circuit steps)")
    n = arr.astype(np.int64)
    bad = np.nonzero(~np.isfinite(arr.astype(float)) | (n != arr))[0]
    if bad.size:
        raise ValueError(f"steps[{int(bad[0])}] is {arr[bad[0]]!r}: steps must be integers")
    return n


def _check_angle(angle: Any) -> float:
    if isinstance(angle, (bool, np.bool_)) or not isinstance(angle, (int, float, np.number)):
        raise TypeError(f"angle must be a real number, not {type(angle).__name__} {angle!r}")
    if isinstance(angle, (complex, np.complexfloating)) or not math.isfinite(float(angle)):
        raise ValueError(f"angle must be a finite real number, not {angle!r}")
    if float(angle) == 0:
        raise ValueError("angle 0 is the identity circuit; give a non-zero theta")
    return float(angle)


def circuit_autocorrelation(
    m: Model,
    steps: Sequence[int] | np.ndarray,
    angle: float,
    operator: str | WeylString | None = None,
) -> CircuitAutocorrelation:
    """Edge autocorrelation after n steps of the transfer-matrix circuit ``T(i theta)``.

    Parameters
    ----------
    m : Model
        N = 2, real couplings; the edge term's component a chain or an indifference order
        with independent strings (as for :func:`freeladder.edge_expansion`).
    steps : array_like of int
        Numbers of steps n (negative: the inverse circuit).
    angle : float
        theta, non-zero: ``U = T(i theta) / prod_k sqrt(1 + theta^2 eta_k^2)``, close to
        ``exp(-i theta H)`` for small theta.
    operator : str or WeylString, optional
        ``chi``; by default :func:`freeladder.edge_mode`.

    Returns
    -------
    CircuitAutocorrelation
        ``w_0 + sum_k W_k cos(2 n arctan(theta eta_k))``.

    Raises
    ------
    NotExpandableError
        For N > 2 or complex couplings (``T(i theta)`` is then not proportional to a unitary),
        and whenever :func:`freeladder.edge_expansion` refuses.
    ValueError, TypeError
        For steps that are not integers or an angle that is not a non-zero real number.

    Notes
    -----
    ``T`` and ``U`` are those of the edge term's component of the frustration graph (``T``
    factorises over components, and the other components' terms commute with ``chi``, so
    their part of a circuit drops out of the correlation).  Products of exponentials of parts
    of H (Trotter, brickwork) are not diagonal in the hidden modes and are not covered
    (module docstring).

    References
    ----------
    P. Fendley, J. Phys. A 52, 335002 (2019); K. Fukai and B. Pozsgay, arXiv:2402.02984
    (2024); I. Vona, M. Mestyan and B. Pozsgay, arXiv:2405.20832 (2024).

    Examples
    --------
    >>> import freeladder as fl
    >>> c = fl.circuit_autocorrelation(fl.parse_model("0.5 X0 + Z0 Z1"), [0, 1, 2], 0.3)
    >>> c.operator, [round(float(v), 12) for v in c.values][:1], round(c.plateau, 12)
    ('Z0', [1.0], 0.8)
    """
    n = _check_steps(steps)
    theta = _check_angle(angle)
    if not isinstance(m, Model):
        raise TypeError(f"expected a freeladder Model, got {type(m).__name__}")
    if m.states != 2 or np.iscomplexobj(m.coupling_array()):
        raise NotExpandableError(
            "the transfer-matrix circuit needs N = 2 and real couplings: only then are the "
            "products in T(i theta) Hermitian, so that T(i theta) is proportional to a unitary "
            f"(this model has N = {m.states}"
            + (", complex couplings)" if np.iscomplexobj(m.coupling_array()) else ")")
        )
    e = edge_expansion(m, operator)
    if not e.hermitian:
        raise NotExpandableError("the edge expansion of this model is not Hermitian")
    with np.errstate(under="ignore", over="ignore"):
        eta = np.exp(np.asarray(e.log_quasi_energies, dtype=float))
        x = abs(theta) * eta
        phi = np.arctan(x)
        dphi = x / (1 + x * x) * np.asarray(e.log_errors, dtype=float)
    w = np.asarray(e.weights, dtype=float)
    dw = np.asarray(e.weight_errors, dtype=float)
    zero = float(np.real(e.zero_weight))
    values = np.full(n.size, zero)
    rounding = 4 * (w.size + 1) * _EPS * (abs(zero) + float(np.abs(w).sum()))
    errors = np.full(n.size, float(dw.sum()) + rounding)
    rows = max(1, 2_000_000 // max(w.size, 1))  # steps x modes per block
    for a in range(0, n.size, rows):
        nn = n[a : a + rows].astype(float)
        values[a : a + nn.size] += np.cos(2.0 * np.outer(nn, phi)) @ w
        errors[a : a + nn.size] += 2.0 * np.abs(nn) * float(np.abs(w * dphi).sum())
    return CircuitAutocorrelation(
        operator=e.operator,
        angle=theta,
        steps=n,
        values=values,
        errors=errors,
        phases=phi,
        plateau=zero,
        expansion=e,
        circuit=(
            "U = T(i theta) / prod_k sqrt(1 + theta^2 eta_k^2), "
            "T(u) = sum_S (-u)^|S| prod_{j in S} c_j h_j (fl.transfer_matrix)"
        ),
    )
