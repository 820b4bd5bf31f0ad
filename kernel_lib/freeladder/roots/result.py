"""One frozen result type for every root finder of the exclusion polynomial.

Every finder (real chain roots by counting, Aberth-Ehrlich complex roots on the recurrence,
certified sign-change enclosures, certified roots of the exact polynomial) returns a
:class:`RootTable`.  ``rigorous`` is True only when ``error_bounds`` are proofs; otherwise
they are estimates and every printed form says so with the word "estimate".

Scale
-----
Root finders scale out the largest coupling magnitude (a power of two, so the scaling is
exact) before they work, so that accuracy does not depend on the overall scale.  ``values``
and ``error_bounds`` are then those of the scaled problem, and ``weight_log2`` records the
scale: the weights ``w_j = c_j^N`` were divided by ``2**weight_log2``, so the true roots are
``y = values * 2**-weight_log2`` (variable "y") or ``x = values * 2**weight_log2``
(variable "x").  :meth:`RootTable.quasi_energies` applies it without overflow.

Roots beyond float64.  Real chain roots may lie far outside float64's range (disordered
chains have exponentially small quasi-energies).  Then ``values`` hold mantissas and
``exponents`` a power of two per value (the value of the scaled problem is
``values[i] * 2**exponents[i]``, its bound ``error_bounds[i] * 2**exponents[i]``).
:meth:`RootTable.log_quasi_energies` gives ``ln |eta|`` exactly to rounding for any root;
:meth:`RootTable.quasi_energies` refuses (``ArithmeticError``) a quasi-energy that float64
cannot hold, unless asked to round it.
"""

from __future__ import annotations

import dataclasses
import warnings
from collections.abc import Mapping
from dataclasses import dataclass, field
from types import MappingProxyType
from typing import Any, Literal

import numpy as np

from ..base.frozen import readonly_array
from ..base.jsonready import json_ready

__all__ = ["BeyondFloatError", "RootTable"]


class BeyondFloatError(ArithmeticError, ValueError):
    """A number that float64 cannot hold was asked for as a float (use its logarithm).

    Both an ``ArithmeticError`` and a ``ValueError``, so that callers that treat "not
    available" as ``ValueError`` show the message instead of failing.
    """


def _frozen(values: Any, dtype: Any = None) -> np.ndarray:
    return readonly_array(values, dtype=dtype)  # setflags cannot reopen it


@dataclass(frozen=True)
class RootTable:
    """Roots of an exclusion polynomial with per-root error bounds and how they were found.

    Attributes
    ----------
    values : numpy.ndarray
        Roots (read-only), of the scaled problem (see ``weight_log2``).  Real chains:
        ascending; complex roots: sorted by modulus.
    error_bounds : numpy.ndarray
        Per value, absolute, in the same variable and scale as ``values`` (read-only).
        Proofs when ``rigorous`` is True, estimates otherwise.
    variable : "y" or "x"
        ``"y"``: roots of ``P``; ``"x"``: reciprocal roots ``x = 1 / y = eta^N``.
    rigorous : bool
        True only when every bound is proved (each interval or ball holds exactly the root).
    converged : bool
        Every requested root met its stopping rule.
    message : str
    method : str
        The key of the method table (:data:`freeladder.ROOT_METHODS`).
    evaluations : int
        Point evaluations of the polynomial (each O(M) for the chain methods).
    count : int
        Number of roots of the whole problem (``values`` may hold fewer, with ``lowest=``).
    sweeps : int
        Sweeps over the chain (or rounds of the certificate) done.
    indices : numpy.ndarray of int64
        0-based position of each value among all ``count`` roots (ascending ``y`` for real
        chains; by modulus otherwise).
    weight_log2 : int
        The weights were divided by ``2**weight_log2`` before root finding.
    multiplicities : numpy.ndarray of int64
        Per value, how many roots it stands for (all 1 unless an exact polynomial has a
        repeated root: then ``values`` lists each distinct root once, and
        :meth:`repeated` lists it as often as it counts, storing per listed value the
        multiplicity of its root in ``details["multiplicity"]``; :meth:`repeated_roots`
        counts them either way).
    exponents : numpy.ndarray of int64
        Per value, a power of two: the root of the scaled problem is
        ``values[i] * 2**exponents[i]`` and its bound ``error_bounds[i] * 2**exponents[i]``
        (all zero unless a root lies beyond float64's normal range).
    details : mapping
        Method-specific extras (read-only), e.g. ``isolated`` discs, ``precision`` bits,
        ``multiplicities``, ``lower`` / ``upper`` interval ends.
    """

    values: np.ndarray
    error_bounds: np.ndarray
    variable: Literal["y", "x"]
    rigorous: bool
    converged: bool
    message: str
    method: str
    evaluations: int
    count: int
    sweeps: int = 0
    indices: np.ndarray = field(default_factory=lambda: np.zeros(0, dtype=np.int64))
    weight_log2: int = 0
    details: Mapping[str, Any] = field(default_factory=dict)
    exponents: np.ndarray = field(default_factory=lambda: np.zeros(0, dtype=np.int64))
    multiplicities: np.ndarray = field(default_factory=lambda: np.zeros(0, dtype=np.int64))

    def __post_init__(self) -> None:
        values = _frozen(self.values)
        bounds = _frozen(self.error_bounds, dtype=np.float64)
        if values.ndim != 1 or bounds.shape != values.shape:
            raise ValueError(
                f"values and error_bounds must be 1-d of one length, got shapes {values.shape} "
                f"and {bounds.shape}"
            )
        if self.variable not in ("y", "x"):
            raise ValueError(f"variable must be 'y' or 'x', got {self.variable!r}")
        indices = self.indices
        if len(indices) == 0 and values.size:
            indices = np.arange(values.size, dtype=np.int64)
        details = {
            k: (_frozen(v) if isinstance(v, np.ndarray) else v) for k, v in self.details.items()
        }
        exponents = np.asarray(self.exponents)
        if exponents.size == 0:
            exponents = np.zeros(values.size, dtype=np.int64)
        if exponents.shape != values.shape or (exponents.size and exponents.dtype.kind not in "iu"):
            raise ValueError(
                f"exponents must be integers shaped like values, got {exponents.shape}"
            )
        if np.any(exponents != 0) and np.iscomplexobj(values):
            raise ValueError("exponents are for real roots only")
        mult = np.asarray(self.multiplicities)
        if mult.size == 0:
            mult = np.ones(values.size, dtype=np.int64)
        bad_kind = mult.size > 0 and (mult.dtype.kind not in "iu" or mult.min() < 1)
        if mult.shape != values.shape or bad_kind:
            raise ValueError(
                f"multiplicities must be integers >= 1 shaped like values, got {mult!r}"
            )
        set_ = object.__setattr__
        set_(self, "multiplicities", _frozen(mult, dtype=np.int64))
        set_(self, "exponents", _frozen(exponents, dtype=np.int64))
        set_(self, "values", values)
        set_(self, "error_bounds", bounds)
        set_(self, "indices", _frozen(indices, dtype=np.int64))
        set_(self, "details", MappingProxyType(details))
        for name in ("rigorous", "converged"):
            set_(self, name, bool(getattr(self, name)))
        for name in ("evaluations", "count", "sweeps", "weight_log2"):
            set_(self, name, int(getattr(self, name)))

    def repeated(self) -> RootTable:
        """The same roots with each value listed as often as it counts (multiplicities all 1).

        ``details["multiplicity"]`` then gives, per listed value, the multiplicity of its root
        (so a double root is listed twice, each time with 2).
        """
        k = self.multiplicities
        if np.all(k == 1):
            return dataclasses.replace(
                self, details=dict(self.details, multiplicity=np.ones(k.size, dtype=np.int64))
            )
        return RootTable(
            values=np.repeat(self.values, k),
            error_bounds=np.repeat(self.error_bounds, k),
            variable=self.variable,
            rigorous=self.rigorous,
            converged=self.converged,
            message=self.message,
            method=self.method,
            evaluations=self.evaluations,
            count=self.count,
            sweeps=self.sweeps,
            weight_log2=self.weight_log2,
            details=dict(self.details, multiplicity=np.repeat(k, k)),
            exponents=np.repeat(self.exponents, k),
        )

    @property
    def iterations(self) -> int:
        """Deprecated name of :attr:`sweeps` (one release)."""
        warnings.warn(
            "RootTable.iterations is deprecated: use RootTable.sweeps",
            DeprecationWarning,
            stacklevel=2,
        )
        return self.sweeps

    @property
    def bound_kind(self) -> str:
        """``"proved bound"`` or ``"estimate (not a proof)"``: what ``error_bounds`` are."""
        return "proved bound" if self.rigorous else "estimate (not a proof)"

    def _powers(self) -> np.ndarray:
        """Per value, the power of two that turns ``values`` into true roots."""
        sign = -1 if self.variable == "y" else 1
        return self.exponents + sign * self.weight_log2

    def true_values(self) -> tuple[np.ndarray, np.ndarray]:
        """``values`` and ``error_bounds`` scaled back (may over- or underflow in float64)."""
        e = np.clip(self._powers(), -5000, 5000).astype(np.int32)
        with np.errstate(over="ignore", under="ignore"):
            if np.iscomplexobj(self.values):
                v = np.ldexp(self.values.real, e) + 1j * np.ldexp(self.values.imag, e)
            else:
                v = np.ldexp(self.values, e)
            return v, np.ldexp(self.error_bounds, e)

    def _relative_x(self) -> tuple[np.ndarray, np.ndarray]:
        """``x = 1 / y`` (or ``x``) of the mantissas, and the relative bound on x."""
        v, r = self.values, self.error_bounds
        av = np.abs(v)
        with np.errstate(divide="ignore", invalid="ignore"):
            if self.variable == "y":
                x = 1.0 / v
                ratio = np.where(av > 0, r / av, np.inf)
                # |1/y - 1/y'| <= r / (|y| (|y| - r)): relative r / (|y| - r) in x
                rel_x = np.where(ratio < 0.5, ratio / (1.0 - ratio), np.inf)
            else:
                x = v
                rel_x = np.where(av > 0, r / av, np.inf)
        return x, rel_x

    def log_quasi_energies(self, states: int) -> tuple[np.ndarray, np.ndarray]:
        """``ln |eta|`` with ``|eta|^N = |x|``, and a bound of the same kind on its error.

        Exact to rounding for roots anywhere in range (``ln |eta| = -(ln |y|) / N``, the power
        of two added as an integer times ``ln 2``), also where ``eta`` itself is far below
        float64 (``eta = 1e-400`` gives ``-921.03...``).  The bound on
        ``|ln |eta| - ln |eta_exact||`` is ``-ln(1 - r) / N`` for a relative bound ``r < 1`` on
        ``x`` (``inf`` otherwise).
        """
        n = int(states)
        x, rel_x = self._relative_x()
        with np.errstate(divide="ignore", invalid="ignore"):
            log_x = np.log(np.abs(x)) - self._powers() * np.log(2.0) * (
                1 if self.variable == "y" else -1
            )
            err = np.where(rel_x < 1.0, -np.log1p(-np.minimum(rel_x, 1.0)) / n, np.inf)
        return log_x / n, err

    def quasi_energies(
        self, states: int, *, beyond_float: str = "raise"
    ) -> tuple[np.ndarray, np.ndarray]:
        """``eta`` with ``eta^N = x`` (principal root) and a bound of the same kind on each.

        Real and positive for real positive roots.  The bound on ``|eta - eta_exact|`` follows
        from the bound on the root: for ``|x - x'| <= r < |x|``,
        ``|x^(1/N) - x'^(1/N)| <= |x|^(1/N) (1 - (1 - r/|x|)^(1/N))`` on the branch nearest
        to ``x^(1/N)``; larger relative errors give ``inf`` (for ``y``) or the modulus bound.
        Computed on the scaled values and multiplied by the power of two afterwards (an
        integer power, plus ``2**(j/N)`` for its remainder), so it neither overflows nor
        underflows where the quasi-energies themselves are floats.

        Parameters
        ----------
        states : int
            N.
        beyond_float : "raise" or "round"
            A quasi-energy outside float64's normal range (below about 2.2e-308 or above
            1.8e308) raises :class:`BeyondFloatError` (an ``ArithmeticError``; use
            :meth:`log_quasi_energies`), or with ``"round"`` is returned rounded (0.0, a
            subnormal or inf: not a value to divide by or take the logarithm of).
        """
        if beyond_float not in ("raise", "round"):
            raise ValueError(f"beyond_float must be 'raise' or 'round', got {beyond_float!r}")
        n = int(states)
        x, rel_x = self._relative_x()
        with np.errstate(divide="ignore", invalid="ignore", over="ignore", under="ignore"):
            if np.isrealobj(x) and np.all(x > 0):
                eta = x ** (1.0 / n)
            else:
                eta = np.power(np.asarray(x, dtype=complex), 1.0 / n)
            ax = np.abs(x)
            eta_err = np.where(
                rel_x < 1.0,
                -(ax ** (1.0 / n)) * np.expm1(np.log1p(-np.minimum(rel_x, 1.0)) / n),
                np.inf if self.variable == "y" else np.abs(eta) + (ax * (1 + rel_x)) ** (1 / n),
            )
            # eta of the true root = eta * 2**(-powers / N) for y, 2**(powers / N) for x
            q = -self._powers() if self.variable == "y" else self._powers()
            whole = np.floor_divide(q, n)
            frac = 2.0 ** ((q - n * whole) / n)
            e = np.clip(whole, -5000, 5000).astype(np.int32)
            if np.iscomplexobj(eta):
                eta = np.ldexp(eta.real * frac, e) + 1j * np.ldexp(eta.imag * frac, e)
            else:
                eta = np.ldexp(eta * frac, e)
            eta_err = np.ldexp(eta_err * frac, e)
        tiny = np.finfo(np.float64).tiny
        mod = np.abs(eta)
        outside = ~np.isfinite(mod) | ((mod < tiny) & (np.abs(x) > 0) & np.isfinite(x))
        if beyond_float == "raise" and np.any(outside & np.isfinite(rel_x)):
            logs = self.log_quasi_energies(n)[0][outside] / np.log(10.0)
            raise BeyondFloatError(
                f"{int(outside.sum())} quasi-energies lie beyond float64's range (e.g. "
                f"eta = 10^{float(logs[0]):.2f}); log_quasi_energies() gives them as logarithms"
            )
        # a bound that underflowed into the subnormals is rounded up, never down
        small = (eta_err < tiny) & (eta_err > 0)
        eta_err = np.where(small, np.nextafter(eta_err, np.inf), eta_err)
        return eta, eta_err

    def repeated_roots(self) -> dict[int, int]:
        """Multiplicity -> number of distinct roots with it, for multiplicities above 1.

        Read from ``multiplicities`` (each distinct root once) or, for a table that lists a
        root as often as it counts, from ``details["multiplicity"]``.  Empty when every root
        is simple (or nothing says otherwise).
        """
        listed = self.details.get("multiplicity")
        if listed is not None and np.all(self.multiplicities == 1):
            k = np.asarray(listed, dtype=np.int64)
            weights = 1.0 / k  # a root of multiplicity m is listed m times
        else:
            k = self.multiplicities
            weights = np.ones(k.size)
        out: dict[int, int] = {}
        for m in np.unique(k[k > 1]).tolist():
            out[int(m)] = int(round(float(weights[k == m].sum())))
        return out

    def summary(self) -> str:
        """One line: how many roots, method, convergence, and the largest relative bound."""
        with np.errstate(divide="ignore", invalid="ignore"):
            rel = self.error_bounds / np.abs(self.values)
        worst = float(np.max(rel)) if rel.size else 0.0
        state = "converged" if self.converged else "NOT converged"
        wide = ""
        repeated = self.repeated_roots()
        if repeated:
            wide += "; repeated roots (multiplicity: count) " + ", ".join(
                f"{k}: {c}" for k, c in sorted(repeated.items())
            )
        if np.any(self.exponents != 0):
            wide = "; values are mantissas times 2**exponents (roots beyond float64)"
        return (
            f"{self.values.size} of {self.count} roots ({self.variable}) by {self.method}, "
            f"{state}; largest relative error {self.bound_kind}: {worst:.2g}; {self.message}"
            f"{wide}"
        )

    def __repr__(self) -> str:
        return f"RootTable({self.summary()})"

    def to_dict(self) -> dict[str, Any]:
        """JSON-ready fields (see :func:`freeladder.base.jsonready.json_ready`)."""
        return json_ready(
            {
                "values": self.values,
                "error_bounds": self.error_bounds,
                "bound_kind": self.bound_kind,
                "variable": self.variable,
                "rigorous": self.rigorous,
                "converged": self.converged,
                "message": self.message,
                "method": self.method,
                "evaluations": self.evaluations,
                "count": self.count,
                "sweeps": self.sweeps,
                "indices": self.indices,
                "weight_log2": self.weight_log2,
                "exponents": self.exponents,
                "multiplicities": self.multiplicities,
                "details": dict(self.details),
            }
        )


def __getattr__(name: str) -> Any:
    """``RootResult``: the former name of :class:`RootTable`, deprecated (one release)."""
    if name == "RootResult":
        warnings.warn(
            "RootResult is deprecated: the root result type is now called RootTable",
            DeprecationWarning,
            stacklevel=2,
        )
        return RootTable
    raise AttributeError(f"module {__name__!r} has no attribute {name!r}")
