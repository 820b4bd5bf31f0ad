"""The edge autocorrelation with an independent check: the summary the report and export carry.

:func:`check_autocorrelation` computes :func:`freeladder.autocorrelation` at a few times and
checks it against something that does not use the modes: exact evolution of the dense
Hamiltonian (its eigendecomposition, full trace) up to :data:`DENSE_DYNAMICS_LIMIT`; above it,
the weight sum rule ``w_0 + sum W_k = 1`` and the value 1 at t = 0 (both identities of the
expansion, so this weaker check says so in ``method``).  Where the couplings are exact and
the polynomial small, the certified weights (:class:`freeladder.WeightBalls`) are checked too.

References
----------
P. Fendley, J. Phys. A 52, 335002 (2019) (the edge operator and the modes); J. Kemp, N. Y.
Yao, C. R. Laumann and P. Fendley, J. Stat. Mech. (2017) 063105 (the edge-spin plateau).
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass
from typing import Any

import numpy as np

from ..algebra.model import Model
from ..algebra.syntax import parse_model
from ..base.display import dimension_text
from ..base.jsonready import json_ready
from ..spectra.dynamics import Autocorrelation, autocorrelation

__all__ = ["DENSE_DYNAMICS_LIMIT", "DYNAMICS_TIMES", "DynamicsCheck", "check_autocorrelation"]

DYNAMICS_TIMES = (0.0, 0.5, 1.0, 2.0, 5.0)
"""The times :func:`check_autocorrelation` uses by default (the report and the export)."""

DENSE_DYNAMICS_LIMIT = 2**10
"""Largest dimension checked against dense exact evolution."""

_IDENTITY_TOL = 1e-9  # sum rule and t = 0 value
_USABLE = 1e-6  # a dense value is compared where its rounding bound is below this, relative


@dataclass(frozen=True)
class DynamicsCheck:
    """The edge autocorrelation at a few times and how it was checked.

    Attributes
    ----------
    autocorrelation : Autocorrelation
        Values, plateau and the expansion (weights, frequencies).
    method : str
        What the values were checked against.
    deviation : float
        The largest difference from that reference (or the largest identity residual).
    tolerance : float
        The largest allowed difference (the stated errors plus the reference's rounding).
    passed : bool
        Every value within its tolerance (and the certified weights, if any, verified).
    hermitian : bool
        Whether the dense Hamiltonian is Hermitian (False when it was not built).
    compared : tuple of bool
        Which times were compared with dense evolution (all False above the dense limit).
    tolerances : tuple of float
        The tolerance at each compared time (NaN elsewhere).
    """

    autocorrelation: Autocorrelation
    method: str
    deviation: float
    tolerance: float
    passed: bool
    hermitian: bool = False
    compared: tuple[bool, ...] = ()
    tolerances: tuple[float, ...] = ()

    def to_dict(self) -> dict[str, Any]:
        """JSON-ready: ``operator``, ``times``, ``values``, ``errors``, ``plateau``,
        ``weights``, ``weight_errors``, ``quasi_energies``, ``frequencies``, ``sum_rules``,
        ``weight_balls`` (or None) and ``verified`` (method, deviation, tolerance, passed)."""
        a = self.autocorrelation
        e = a.expansion
        return json_ready(  # type: ignore[no-any-return]
            {
                "operator": a.operator,
                "times": a.times,
                "values": a.values,
                "errors": a.errors,
                "plateau": a.plateau,
                "weights": e.weights,
                "weight_errors": e.weight_errors,
                "quasi_energies": e.quasi_energies,
                "frequencies": e.frequencies,
                "sum_rules": e.sum_rules,
                "weight_balls": e.weight_balls,
                "verified": {
                    "method": self.method,
                    "deviation": self.deviation,
                    "tolerance": self.tolerance,
                    "passed": self.passed,
                },
            }
        )

    def __repr__(self) -> str:
        verdict = "passed" if self.passed else "FAILED"
        return (
            f"DynamicsCheck({self.autocorrelation!r}; {self.method}: deviation "
            f"{self.deviation:.2g} within {self.tolerance:.2g}: {verdict})"
        )


def dense_autocorrelation(
    m: Model, operator: str, times: np.ndarray
) -> tuple[np.ndarray, np.ndarray, bool]:
    """``Tr[chi^dagger chi(t)] / dim`` by exact evolution of the dense Hamiltonian, a bound on
    its rounding, and whether ``H`` is Hermitian.

    Hermitian ``H``: ``sum_ab |<a|chi|b>|^2 exp(i (E_a - E_b) t)`` from ``numpy.linalg.eigh``;
    otherwise ``e^{-iHt} = V e^{-iDt} V^-1`` from ``numpy.linalg.eig`` (common practice).  The
    rounding allowance is ``64 eps dim`` times the sizes of the factors: ``1 + |t| max|E|``
    (phases) for Hermitian ``H``, ``cond(V)^2 max|e^{-iDt}| max|e^{iDt}|`` otherwise (growing
    terms cancel in the trace, so its rounding grows with them).
    """
    h = m.to_sparse().toarray()
    x = parse_model(operator, states=m.states, sites=m.sites).to_sparse().toarray()
    dim = h.shape[0]
    eps = float(np.finfo(float).eps)
    if np.allclose(h, h.conj().T, atol=1e-14):
        energies, vecs = np.linalg.eigh(h)
        xe = vecs.conj().T @ x @ vecs
        weight = np.abs(xe) ** 2
        gaps = energies[:, None] - energies[None, :]
        values = np.array([np.sum(weight * np.exp(1j * gaps * t)) for t in times]) / dim
        scale = 1 + np.abs(times) * float(np.max(np.abs(energies)))
        return values, 64 * eps * dim * scale, True
    d, v = np.linalg.eig(h)
    vinv = np.linalg.inv(v)
    cond = float(np.linalg.norm(v, 2) * np.linalg.norm(vinv, 2))
    out, bound = [], []
    for t in times:
        forward, backward = np.exp(-1j * d * t), np.exp(1j * d * t)
        out.append(np.trace(x.conj().T @ ((v * backward) @ vinv) @ x @ ((v * forward) @ vinv)))
        bound.append(64 * eps * dim * cond**2 * np.abs(forward).max() * np.abs(backward).max())
    return np.array(out) / dim, np.array(bound), False


def check_autocorrelation(
    m: Model, times: Sequence[float] | np.ndarray = DYNAMICS_TIMES
) -> DynamicsCheck:
    """:func:`freeladder.autocorrelation` of the edge operator, checked independently.

    Parameters
    ----------
    m : Model
        A model :func:`freeladder.edge_expansion` covers.
    times : array_like of float
        Should hold t = 0 (the check above the dense limit uses it).

    Returns
    -------
    DynamicsCheck

    Raises
    ------
    NotExpandableError
        When the edge expansion does not apply (the message says why).

    References
    ----------
    P. Fendley, J. Phys. A 52, 335002 (2019); J. Kemp, N. Y. Yao, C. R. Laumann and P.
    Fendley, J. Stat. Mech. (2017) 063105.

    Examples
    --------
    >>> import freeladder as fl
    >>> c = fl.check_autocorrelation(fl.ising_chain(4, field=0.5))
    >>> c.passed, c.method.split(" (")[0]
    (True, 'dense exact evolution')
    """
    a = autocorrelation(m, times)
    e = a.expansion
    t = np.asarray(a.times)
    balls = e.weight_balls
    balls_ok = balls is None or balls.verified
    note = "" if balls is None else "; certified weights " + ("agree" if balls_ok else "DISAGREE")
    if m.dimension <= DENSE_DYNAMICS_LIMIT:
        ref, rounding, hermitian = dense_autocorrelation(m, a.operator, t)
        # times where growing terms leave the dense reference too little accuracy are named,
        # not compared (a check there could not fail)
        usable = rounding <= _USABLE * np.maximum(1.0, np.abs(ref))
        diff = np.abs(np.asarray(a.values) - ref)[usable]
        tol = (np.asarray(a.errors) + rounding)[usable]
        skipped = ", ".join(f"{v:g}" for v in t[~usable])
        method = (
            f"dense exact evolution (eigendecomposition of H, full trace, dimension "
            f"{dimension_text(m.dimension)}) at {int(usable.sum())} times"
            + (f"; not at t = {skipped} (growing terms: reference too inexact)" if skipped else "")
            + note
        )
        passed = bool(usable.any() and np.all(diff <= tol)) and balls_ok
        per_time = np.where(usable, np.asarray(a.errors) + rounding, np.nan)
        return DynamicsCheck(
            a,
            method,
            float(diff.max(initial=0.0)),
            float(tol.max(initial=0.0)),
            passed,
            hermitian,
            tuple(bool(u) for u in usable),
            tuple(float(v) for v in per_time),
        )
    residual = abs(complex(e.zero_weight) + complex(np.sum(e.weights)) - 1)
    at_zero = np.nonzero(t == 0)[0]
    if at_zero.size:
        residual = max(residual, abs(complex(a.values[at_zero[0]]) - 1))
    tol = _IDENTITY_TOL + float(np.sum(e.weight_errors))
    method = (
        "sum rule w_0 + sum W_k = 1" + (" and C(0) = 1" if at_zero.size else "") + " (identities "
        f"of the expansion; dimension {dimension_text(m.dimension)} is above the dense limit){note}"
    )
    return DynamicsCheck(
        a,
        method,
        float(residual),
        tol,
        residual <= tol and balls_ok,
        compared=(False,) * t.size,
        tolerances=(float("nan"),) * t.size,
    )
