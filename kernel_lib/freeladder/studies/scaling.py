"""Finite-size scaling: power-law fits with leading corrections, gap exponents, energy densities.

Three public functions:

* :func:`power_law_fit` fits ``value = A size^e`` with one leading correction, by least squares
  (``scipy.optimize.curve_fit``), and states an error bar that adds the covariance error to the
  spread between variants of the fit (see its Notes);
* :func:`gap_scaling` builds a model per size, finds its smallest quasi-energy and fits the
  dynamical exponent ``z`` of ``|eta_1| ~ size^-z``, per residue class of the number of terms
  modulo ``p + 1`` for reach-p exclusion chains;
* :func:`energy_density` extrapolates the ground-state energy per site to infinite size.

References
----------
F. C. Alcaraz and R. A. Pimenta, Phys. Rev. B 102, 121101(R) (2020), arXiv:2005.14622
(``z = (p + 1) / N`` at the uniform point of the reach-p Z(N) chains);
P. Fendley, J. Phys. A 52, 335002 (2019), arXiv:1901.08078 (``z = 3/2`` for p = 2, N = 2);
P. Pfeuty, Ann. Phys. 57, 79 (1970) (Ising chain: ``z = 1``, ``E_0 / L -> -4/pi``).
"""

from __future__ import annotations

import math
import time
import warnings
from collections.abc import Callable, Mapping, Sequence
from dataclasses import dataclass, field
from types import MappingProxyType
from typing import TYPE_CHECKING, Any

import numpy as np

from ..algebra.model import Model
from ..base.frozen import readonly_array, readonly_mapping
from ..base.jsonready import json_ready
from ..graphs.graph import chain_structure
from ..roots.real import chain_real_roots
from ..roots.result import RootTable

if TYPE_CHECKING:
    import pandas as pd
from ..spectra.spectrum import free_spectrum

__all__ = [
    "EnergyDensity",
    "GapScaling",
    "MixedResidueWarning",
    "PowerLawFit",
    "energy_density",
    "gap_scaling",
    "chain_log_quasi_energy",
    "chain_quasi_energy",
    "power_law_fit",
    "smallest_quasi_energy",
]

_CORRECTIONS = ("inverse", "offset", "none")
_PHASE_TOL = 4 * float(np.finfo(float).eps)


class MixedResidueWarning(UserWarning):
    """Sizes from different residue classes (terms mod ``p + 1``) enter one analysis.

    For reach-p exclusion chains the low spectrum depends strongly on the number of terms
    modulo ``p + 1`` (observed numerically, no source), so a fit that pools the classes is
    biased: for uniform reach-2 chains pooled sizes gave ``z = 1.69`` where each class gives
    1.50.
    """


@dataclass(frozen=True)
class PowerLawFit:
    """A power law ``value = A size^exponent`` with one leading correction, and its error.

    Attributes
    ----------
    exponent : float
        The fitted exponent ``e`` (negative for a closing gap: ``z = -e``).
    error : float
        ``sqrt(statistical^2 + systematic^2)``; ``inf`` when too few sizes to estimate it.
    statistical : float
        From the covariance of the fit (see :func:`power_law_fit`).
    systematic : float
        Largest difference between ``exponent`` and the variants in ``variants``.
    amplitude : float
        ``A``.
    correction : float
        ``b`` of the correction term (0 for ``form="none"``).
    form : str
        The model fitted, in words.
    sizes : ndarray
        The sizes used.
    residuals : ndarray
        ``log(value) - log(fit)`` for ``"inverse"`` and ``"none"``, ``value - fit`` for
        ``"offset"``, one per size.
    reduced_chi2 : float
        Residual sum of squares per degree of freedom (weighted when errors were given);
        ``nan`` without spare degrees of freedom.
    variants : mapping, read-only
        Exponent of each variant fit, by name (``"without the smallest size"``,
        ``"no correction, largest half"``).

    Notes
    -----
    Frozen: the arrays are read-only and ``variants`` is a read-only mapping.
    """

    exponent: float
    error: float
    statistical: float
    systematic: float
    amplitude: float
    correction: float
    form: str
    sizes: np.ndarray
    residuals: np.ndarray
    reduced_chi2: float
    variants: Mapping[str, float] = field(default_factory=dict)

    def __post_init__(self) -> None:
        object.__setattr__(self, "sizes", readonly_array(self.sizes))
        object.__setattr__(self, "residuals", readonly_array(self.residuals))
        object.__setattr__(self, "variants", readonly_mapping(self.variants))

    def to_dict(self) -> dict[str, Any]:
        """JSON-ready fields (:func:`freeladder.base.jsonready.json_ready`)."""
        return json_ready(  # type: ignore[no-any-return]
            {
                "exponent": self.exponent,
                "error": self.error,
                "statistical": self.statistical,
                "systematic": self.systematic,
                "amplitude": self.amplitude,
                "correction": self.correction,
                "form": self.form,
                "sizes": self.sizes,
                "residuals": self.residuals,
                "reduced_chi2": self.reduced_chi2,
                "variants": self.variants,
            }
        )


def _single_fit(
    x: np.ndarray, y: np.ndarray, sigma: np.ndarray | None, correction: str
) -> tuple[np.ndarray, np.ndarray, np.ndarray, float]:
    """Parameters, covariance, residuals and reduced chi^2 of one least-squares fit.

    Parameters are ``(log A, e)``, ``(log A, e, b)`` or ``(A, e, B)`` for ``"none"``,
    ``"inverse"`` and ``"offset"``.  With ``sigma`` the covariance is the absolute one scaled up
    (never down) by the reduced chi^2; without, all points weigh the same and the covariance is
    scaled by the residual variance.
    """
    lx = np.log(x)
    slope, intercept = np.polyfit(lx, np.log(np.abs(y)), 1)
    if correction == "offset":

        def model(t: np.ndarray, a: float, e: float, c: float) -> np.ndarray:
            return np.asarray(a * np.exp(e * np.log(t)) + c)

        target, s = y, sigma
        p0 = [math.exp(intercept), slope, 0.0]
    else:
        target = np.log(y)
        s = None if sigma is None else sigma / np.abs(y)
        if correction == "inverse":

            def model(t: np.ndarray, la: float, e: float, b: float) -> np.ndarray:  # type: ignore[misc]
                return np.asarray(la + e * np.log(t) + np.log1p(b / t))

            p0 = [intercept, slope, 0.0]
        else:

            def model(t: np.ndarray, la: float, e: float) -> np.ndarray:  # type: ignore[misc]
                return np.asarray(la + e * np.log(t))

            p0 = [intercept, slope]
    n_par = len(p0)
    dof = x.size - n_par
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")  # OptimizeWarning when the covariance is undefined
        from scipy.optimize import curve_fit  # on use: slow to import

        params, cov = curve_fit(
            model, x, target, p0=p0, sigma=s, absolute_sigma=s is not None, maxfev=20000
        )
    resid = target - model(x, *params)
    weighted = resid if s is None else resid / s
    chi2 = float(np.sum(weighted**2) / dof) if dof > 0 else float("nan")
    if dof <= 0:
        cov = np.full((n_par, n_par), np.inf)
    elif s is not None and chi2 > 1:
        cov = cov * chi2
    return np.asarray(params), np.asarray(cov), np.asarray(resid), chi2


def power_law_fit(
    sizes: Sequence[float] | np.ndarray,
    values: Sequence[float] | np.ndarray,
    errors: Sequence[float] | np.ndarray | None = None,
    correction: str = "inverse",
) -> PowerLawFit:
    """Fit ``value = A size^e`` with a leading finite-size correction; exponent and error bar.

    Parameters
    ----------
    sizes : array_like
        Positive sizes, at least 2 distinct.
    values : array_like
        Positive values for ``"inverse"`` and ``"none"``; any real values for ``"offset"``.
    errors : array_like, optional
        One standard error per value (statistical data, such as disorder averages).  Without
        them every size weighs the same (deterministic data, whose misfit comes from
        higher-order corrections rather than noise).
    correction : "inverse", "offset" or "none"
        ``"inverse"``: ``value = A size^e (1 + b / size)``, fitted as ``log(value)``.
        ``"offset"``: ``value = A size^e + B``, fitted as ``value``.
        ``"none"``: ``value = A size^e``, fitted as ``log(value)``.

    Returns
    -------
    PowerLawFit

    Raises
    ------
    ValueError
        Non-finite or non-positive sizes, non-positive values (logarithmic forms), mismatched
        lengths, an unknown correction, or fewer than 2 distinct sizes.

    Notes
    -----
    The fit is ``scipy.optimize.curve_fit`` (least squares; weighted by ``1 / errors^2`` when
    errors are given).  The statistical error is the square root of the covariance entry of
    the exponent: with errors given, the absolute covariance, multiplied by the reduced chi^2
    when that exceeds 1; without errors, the covariance scaled by the residual variance.  The
    systematic error is the largest change of the exponent between the fit and two variants
    that probe the finite-size corrections: the same form without the smallest size (when at
    least as many sizes as parameters remain), and the plain power law on the largest half of the
    sizes (at least 2; only when a correction was asked for).  The reported ``error`` is
    ``sqrt(statistical^2 + systematic^2)``; it is ``inf`` when there are no spare degrees of
    freedom for the covariance.  With fewer sizes than parameters plus one the correction is
    dropped (``form`` says so).

    References
    ----------
    Common practice in finite-size scaling; the corrections ``1 / L`` for open boundaries and
    an additive constant for logarithms of gaps are the usual leading ones (cited from memory).

    Examples
    --------
    >>> fit = power_law_fit([10, 20, 40, 80, 160], [3.0 / L * (1 + 0.5 / L) for L in
    ...                                              [10, 20, 40, 80, 160]])
    >>> round(fit.exponent, 9), round(fit.correction, 6)
    (-1.0, 0.5)
    >>> fit.error > 0.001  # the plain power law on the largest half differs by that much
    True
    """
    if correction not in _CORRECTIONS:
        raise ValueError(f"correction must be one of {_CORRECTIONS}, not {correction!r}")
    x = np.asarray(sizes, dtype=float)
    y = np.asarray(values, dtype=float)
    sig = None if errors is None else np.asarray(errors, dtype=float)
    if x.ndim != 1 or x.shape != y.shape or (sig is not None and sig.shape != x.shape):
        raise ValueError("sizes, values (and errors) must be 1-d arrays of one length")
    if not (np.all(np.isfinite(x)) and np.all(x > 0)):
        raise ValueError("sizes must be finite and > 0")
    if not np.all(np.isfinite(y)):
        raise ValueError(f"values must be finite; got {y[~np.isfinite(y)][:3]}")
    if correction != "offset" and np.any(y <= 0):
        raise ValueError("a logarithmic fit needs values > 0; use correction='offset'")
    if sig is not None and not (np.all(np.isfinite(sig)) and np.all(sig > 0)):
        raise ValueError("errors must be finite and > 0")
    order = np.argsort(x, kind="stable")
    x, y = x[order], y[order]
    sig = None if sig is None else sig[order]
    if np.unique(x).size < 2:
        raise ValueError("a power law needs at least 2 distinct sizes")
    form = correction
    n_par = 2 if form == "none" else 3
    if x.size < n_par + 1 and form != "none":
        form = "none"
        n_par = 2
    params, cov, resid, chi2 = _single_fit(x, y, sig, form)
    exponent = float(params[1])
    statistical = float(math.sqrt(cov[1, 1])) if np.isfinite(cov[1, 1]) else math.inf
    variants: dict[str, float] = {}
    if x.size - 1 >= n_par:
        sub = _single_fit(x[1:], y[1:], None if sig is None else sig[1:], form)[0]
        variants["without the smallest size"] = float(sub[1])
    if form != "none" and (y > 0).all():
        half = x.size // 2
        if x.size - half >= 2:
            plain = _single_fit(x[half:], y[half:], None if sig is None else sig[half:], "none")[0]
            variants["no correction, largest half"] = float(plain[1])
    systematic = max((abs(v - exponent) for v in variants.values()), default=0.0)
    if form == "offset":
        amplitude, corr = float(params[0]), float(params[2])
    else:
        amplitude = float(math.exp(params[0]))
        corr = float(params[2]) if form == "inverse" else 0.0
    words = {
        "inverse": "value = A size^e (1 + b / size), least squares in log(value)",
        "offset": "value = A size^e + b, least squares in value",
        "none": "value = A size^e, least squares in log(value)",
    }[form]
    if form != correction:
        words += f" (the {correction!r} correction needs at least {n_par + 2} sizes)"
    return PowerLawFit(
        exponent=exponent,
        error=float(math.hypot(statistical, systematic)),
        statistical=statistical,
        systematic=float(systematic),
        amplitude=amplitude,
        correction=corr,
        form=words,
        sizes=x,
        residuals=resid,
        reduced_chi2=chi2,
        variants=variants,
    )


# -- the smallest quasi-energy ---------------------------------------------------------------------
def _residue(m: Model) -> tuple[int | None, int | None]:
    """``(reach, terms mod (reach + 1))`` for an exclusion chain, ``(None, None)`` otherwise."""
    chain = chain_structure(m)
    if chain is None:
        return None, None
    return chain.reach, len(m) % (chain.reach + 1)


def _largest_root(
    couplings: Sequence[complex] | np.ndarray, reach: int, states: int
) -> RootTable | None:
    """The largest real root of the chain with weights ``|c_j^N|`` when they share one phase.

    Returns the :class:`~freeladder.RootTable` of
    :func:`freeladder.chain_real_roots` (``lowest=1``), or None for weights of several phases.
    Raises ``ArithmeticError`` when the root did not converge.
    """
    n = int(states)
    w = np.asarray(couplings, dtype=complex) ** n
    modulus = np.abs(w)
    if not (np.all(modulus > 0) and np.all(np.isfinite(modulus))):
        return None
    phase = w / modulus
    if not np.all(np.abs(phase - phase[0]) <= _PHASE_TOL):
        return None
    found = chain_real_roots(modulus, int(reach), lowest=1)
    if not found.converged:
        raise ArithmeticError(
            f"the largest root of a chain of {w.size} terms did not converge: {found.message}"
        )
    return found


_ROUTE = "largest real root of the chain recurrence"


def chain_quasi_energy(
    couplings: Sequence[complex] | np.ndarray, reach: int, states: int = 2
) -> tuple[float, float, str] | None:
    """``(|eta_1|, error bound, route)`` of the exclusion chain with these couplings, in order.

    When the weights ``w_j = c_j^N`` share one phase ``e^{i theta}`` (real couplings for
    N = 2, uniform couplings for any N) the chain polynomial is ``P(y) = P_|w|(e^{i theta} y)``:
    its roots are those of the real chain with weights ``|w_j|`` turned by ``e^{-i theta}``, so
    ``|eta_1| = y_max^{-1/N}`` with ``y_max`` the largest real root, found alone by
    :func:`freeladder.chain_real_roots` (``lowest=1``).  Returns None for weights of several
    phases (then use :func:`freeladder.free_spectrum`).

    Raises
    ------
    freeladder.roots.result.BeyondFloatError
        When ``|eta_1|`` lies below float64 (long disordered chains):
        :func:`chain_log_quasi_energy` gives its logarithm.
    ArithmeticError
        When the largest root did not converge.

    References
    ----------
    F. C. Alcaraz and R. A. Pimenta, Phys. Rev. B 102, 121101(R) (2020), arXiv:2005.14622
    (the chain polynomial depends on the couplings only through ``c_j^N``).
    """
    found = _largest_root(couplings, reach, states)
    if found is None:
        return None
    eta, bound = found.quasi_energies(int(states))  # raises beyond float64
    k = int(np.argmin(np.abs(eta)))
    return float(abs(eta[k])), float(bound[k]), _ROUTE


def chain_log_quasi_energy(
    couplings: Sequence[complex] | np.ndarray, reach: int, states: int = 2
) -> tuple[float, float, str] | None:
    """``(ln |eta_1|, error bound on it, route)``: :func:`chain_quasi_energy` in logarithms.

    Exact to rounding for any size of ``eta_1``, also far below float64 (roots ``y`` up to
    about ``2**13000``, see :mod:`freeladder.roots.real`).  None for weights of several phases.

    Examples
    --------
    >>> log_eta, bound, _ = chain_log_quasi_energy([1.0, 1.0, 1.0], 1)  # 2 cos(2 pi / 5)
    >>> round(float(np.exp(log_eta)), 12)
    0.61803398875
    """
    found = _largest_root(couplings, reach, states)
    if found is None:
        return None
    log_eta, bound = found.log_quasi_energies(int(states))
    k = int(np.argmin(log_eta))
    return float(log_eta[k]), float(bound[k]), _ROUTE


def smallest_quasi_energy(m: Model) -> tuple[float, float, str]:
    """``(|eta_1|, error bound, route)``: the smallest quasi-energy modulus of a model.

    Exclusion chains whose weights ``c_j^N`` share one phase go through
    :func:`chain_quasi_energy` (the largest real root alone); any other model through
    :func:`freeladder.free_spectrum` with ``lowest=1``.

    Raises
    ------
    ArithmeticError
        When no converged value is found (for chains, see :func:`chain_quasi_energy`, which
        also raises when ``|eta_1|`` lies below float64).
    """
    chain = chain_structure(m)
    if chain is not None:
        got = chain_quasi_energy(m.coupling_array()[chain.order], chain.reach, m.states)
        if got is not None:
            return got
    sp = free_spectrum(m, lowest=1)
    bound = float(sp.error_bounds[0])
    finder = sp.provenance.finder
    if not finder.get("converged", True) or not math.isfinite(bound):
        raise ArithmeticError(
            f"the smallest quasi-energy of a model of {len(m)} terms did not converge "
            f"({finder.get('message', 'no message')})"
        )
    return float(abs(sp.quasi_energies[0])), bound, f"free_spectrum: {sp.provenance.path}"


def _as_sizes(sizes: Sequence[int] | np.ndarray) -> list[int]:
    out = [int(s) for s in sizes]
    if len(out) < 2:
        raise ValueError(f"need at least 2 sizes, got {out}")
    if len(set(out)) != len(out):
        raise ValueError(f"sizes repeat: {out}")
    if min(out) < 1:
        raise ValueError(f"sizes must be >= 1, got {out}")
    return sorted(out)


def _build(build: Callable[[int], Model], size: int) -> Model:
    m = build(size)
    if not isinstance(m, Model):
        raise TypeError(f"build({size}) returned {type(m).__name__}, not a freeladder Model")
    return m


# -- gap scaling -----------------------------------------------------------------------------------
@dataclass(frozen=True)
class GapScaling:
    """The dynamical exponent ``z`` of ``|eta_1| ~ size^-z`` with its error bar.

    Attributes
    ----------
    z, z_error : float
        Headline exponent and error (see :func:`gap_scaling`, Notes).
    amplitude : float
        ``A`` of ``|eta_1| = A size^-z (1 + b / size)``; ``nan`` when several residue classes
        were fitted (each class has its own amplitude, in ``classes``).
    correction : float
        ``b``; ``nan`` with several classes.
    columns : mapping, read-only
        One read-only array per column, one entry per size: ``size``, ``terms``, ``states``,
        ``reach``, ``residue``, ``gap`` (``|eta_1|``), ``gap_error`` (its error bound),
        ``route``, ``seconds``, ``residual`` (``log`` of data over fit, within its class).
        Built from a pandas.DataFrame; :attr:`data` gives them as a new DataFrame.
    classes : mapping, read-only
        ``{residue: PowerLawFit}`` (``-exponent`` is that class's ``z``); key ``None`` for
        models that are not chains, or for a pooled fit.
    residue : str or int
        What was asked for.
    quantity : str
        What was fitted, in words.
    """

    z: float
    z_error: float
    amplitude: float
    correction: float
    columns: Mapping[str, np.ndarray]
    classes: Mapping[int | None, PowerLawFit]
    residue: str | int
    quantity: str

    def __post_init__(self) -> None:
        object.__setattr__(self, "columns", _frozen_columns(self.columns))
        object.__setattr__(self, "classes", readonly_mapping(self.classes))

    @property
    def data(self) -> pd.DataFrame:
        """The table of :attr:`columns` as a new DataFrame (changing it changes no result)."""
        import pandas as pd  # on use: importing pandas takes about a second

        return pd.DataFrame({name: values.copy() for name, values in self.columns.items()})

    @property
    def residuals(self) -> np.ndarray:
        """``log(gap) - log(fit)`` per size, in the order of ``data``."""
        return np.asarray(self.columns["residual"], dtype=float)

    def to_dict(self) -> dict[str, Any]:
        """JSON-ready fields (:func:`freeladder.base.jsonready.json_ready`)."""
        return json_ready(  # type: ignore[no-any-return]
            {
                "z": self.z,
                "z_error": self.z_error,
                "amplitude": self.amplitude,
                "correction": self.correction,
                "data": self.columns,
                "classes": {str(k): v for k, v in self.classes.items()},
                "residue": self.residue,
                "quantity": self.quantity,
            }
        )

    def __repr__(self) -> str:
        per = ", ".join(
            f"class {k}: z = {-f.exponent:.4f} +- {f.error:.2g}" for k, f in self.classes.items()
        )
        return f"GapScaling(z = {self.z:.4f} +- {self.z_error:.2g}; {per})"


_QUANTITY = (
    "|eta_1|, the smallest quasi-energy modulus (N = 2: half the many-body gap 2 eta_1 of "
    "E = sum +-eta_k; N > 2: the many-body gap is a fixed multiple of it at uniform real "
    "couplings); the factor does not change z"
)


def gap_scaling(
    build: Callable[[int], Model],
    sizes: Sequence[int] | np.ndarray,
    residue: str | int = "auto",
    progress: bool = False,
) -> GapScaling:
    """Dynamical exponent ``z`` from the smallest quasi-energy over a range of sizes.

    Parameters
    ----------
    build : callable
        ``build(size) -> Model``; ``size`` is whatever the builder takes (sites, terms).
    sizes : sequence of int
        At least 2 distinct sizes; 5 or more per residue class give an error bar.
    residue : "auto", "pooled" or int
        ``"auto"``: for exclusion chains of reach p, fit each class of the number of terms
        ``M mod (p + 1)`` separately and combine (warns with :class:`MixedResidueWarning` when
        the sizes fall into several classes).  ``"pooled"``: one fit over all sizes (warns when
        classes mix).  An int ``r``: keep only the sizes with ``M mod (p + 1) = r``.
    progress : bool
        Show a progress bar (tqdm.auto).

    Returns
    -------
    GapScaling

    Raises
    ------
    ValueError
        Fewer than 2 sizes (per class fitted), a bad ``residue``, or no size in the class asked
        for.
    ArithmeticError
        When the smallest quasi-energy of a size cannot be found (see
        :func:`smallest_quasi_energy`).

    Notes
    -----
    What is fitted: ``|eta_1|``, the smallest modulus of the quasi-energies ``eta_k``
    (``eta_k^N = 1 / y_k``).  For N = 2 the many-body gap in the ``E = sum +-eta_k``
    convention is ``2 eta_1``; for N > 2 at uniform real couplings the lowest excitation changes
    one mode from ``eta_1`` to ``omega eta_1``, a fixed multiple ``(1 - cos(2 pi / N))`` of
    ``eta_1`` in its real part.  Constant factors do not change ``z``.  Alcaraz and Pimenta
    (2020) extract ``z`` from the smallest quasi-energy as well (their ``epsilon_1``; recalled
    from memory).

    The fit model per class is ``|eta_1| = A size^-z (1 + b / size)`` (least squares in
    ``log |eta_1|``, equal weights: the root finder's errors, about ``1e-15`` relative, are far
    below the misfit of higher-order corrections), by :func:`power_law_fit`, whose Notes give
    the error bar: covariance error combined with the spread against the fit without the
    smallest size and the plain power law on the largest half.  With several classes the
    headline ``z`` is their inverse-variance weighted mean and ``z_error`` adds the largest
    distance of a class from that mean to the weighted-mean error (in quadrature).

    The smallest quasi-energy is found alone (:func:`smallest_quasi_energy`): for chains with
    couplings of one phase, by the real root finder, fast at ``10^4`` terms and more.

    References
    ----------
    F. C. Alcaraz and R. A. Pimenta, Phys. Rev. B 102, 121101(R) (2020), arXiv:2005.14622;
    P. Fendley, J. Phys. A 52, 335002 (2019), arXiv:1901.08078.

    Examples
    --------
    >>> import freeladder as fl
    >>> r = fl.gap_scaling(lambda L: fl.ising_chain(L), [100, 200, 400, 800, 1600])
    >>> abs(r.z - 1) < 3 * r.z_error + 1e-6
    True
    """
    if isinstance(residue, bool) or not (
        residue in ("auto", "pooled") or (isinstance(residue, int) and residue >= 0)
    ):
        raise ValueError(f"residue must be 'auto', 'pooled' or an int >= 0, not {residue!r}")
    from tqdm.auto import tqdm

    rows = []
    for size in tqdm(_as_sizes(sizes), disable=not progress, desc="gap scaling"):
        start = time.perf_counter()
        m = _build(build, size)
        reach, res = _residue(m)
        gap, bound, route = smallest_quasi_energy(m)
        rows.append(
            {
                "size": size,
                "terms": len(m),
                "states": m.states,
                "reach": reach,
                "residue": res,
                "gap": gap,
                "gap_error": bound,
                "route": route,
                "seconds": time.perf_counter() - start,
            }
        )
    import pandas as pd  # on use: importing pandas takes about a second

    data = pd.DataFrame(rows)
    found = sorted({r["residue"] for r in rows}, key=lambda v: -1 if v is None else v)
    if isinstance(residue, int) and not isinstance(residue, bool):
        data = data[data["residue"] == residue].reset_index(drop=True)
        if len(data) < 2:
            raise ValueError(
                f"residue class {residue}: {len(data)} sizes (classes present: {found})"
            )
        groups: dict[int | None, pd.DataFrame] = {residue: data}
    elif residue == "pooled" or len(found) == 1:
        if len(found) > 1:
            warnings.warn(
                f"sizes mix residue classes {found} of terms mod (reach + 1) and are fitted "
                "together; such a fit is biased (use residue='auto')",
                MixedResidueWarning,
                stacklevel=2,
            )
        groups = {None if len(found) > 1 else found[0]: data}
    else:
        warnings.warn(
            f"sizes fall into residue classes {found} of terms mod (reach + 1); each class is "
            "fitted on its own and the headline z combines them",
            MixedResidueWarning,
            stacklevel=2,
        )
        groups = {r: data[data["residue"] == r] for r in found}
    classes: dict[int | None, PowerLawFit] = {}
    residual = pd.Series(np.nan, index=data.index)
    for key, part in groups.items():
        if len(part) < 2:
            continue
        fit = power_law_fit(part["size"], part["gap"], correction="inverse")
        classes[key] = fit
        residual[part.sort_values("size", kind="stable").index] = fit.residuals
    if not classes:
        raise ValueError("no residue class has 2 or more sizes; give more sizes")
    data = data.assign(residual=residual)
    if len(classes) == 1:
        (only,) = classes.values()
        z, z_error = -only.exponent, only.error
        amplitude, correction = only.amplitude, only.correction
    else:
        zs = np.array([-f.exponent for f in classes.values()])
        errs = np.array([f.error for f in classes.values()])
        if np.all(np.isfinite(errs)) and np.all(errs > 0):
            wts = 1.0 / errs**2
            z = float(np.sum(wts * zs) / np.sum(wts))
            mean_err = float(1.0 / math.sqrt(np.sum(wts)))
        else:
            z, mean_err = float(np.mean(zs)), math.inf
        z_error = float(math.hypot(mean_err, float(np.max(np.abs(zs - z)))))
        amplitude = correction = float("nan")
    return GapScaling(
        z=float(z),
        z_error=float(z_error),
        amplitude=float(amplitude),
        correction=float(correction),
        columns=data,
        classes=classes,
        residue=residue,
        quantity=_QUANTITY,
    )


def _frozen_columns(table: Any) -> MappingProxyType[str, np.ndarray]:
    """A DataFrame (or a mapping of columns) as a read-only mapping of read-only arrays."""
    if isinstance(table, MappingProxyType):
        return table
    import pandas as pd  # on use: importing pandas takes about a second

    frame = pd.DataFrame(table)
    return readonly_mapping(
        {str(name): readonly_array(frame[name].to_numpy()) for name in frame.columns}
    )


# -- energy density --------------------------------------------------------------------------------
@dataclass(frozen=True)
class EnergyDensity:
    """Ground-state energy per site extrapolated to infinite size.

    Attributes
    ----------
    value, error : float
        ``e_inf`` and its error bar (see :func:`energy_density`, Notes).
    statistical, systematic : float
        The two parts of ``error``.
    coefficients : tuple of float
        ``(e_inf, a, b)`` of ``e(L) = e_inf + a / L + b / L^2``.
    variants : mapping, read-only
        ``e_inf`` of the variant fits, by name.
    columns : mapping, read-only
        One read-only array per column, one entry per size: ``size``, ``sites``, ``terms``,
        ``residue``, ``energy`` (real part of the ground energy), ``energy_imag``,
        ``per_site``, ``residual``, ``seconds``.  :attr:`data` gives them as a new DataFrame.
    form : str
        The fit model, in words.
    """

    value: float
    error: float
    statistical: float
    systematic: float
    coefficients: tuple[float, ...]
    variants: Mapping[str, float]
    columns: Mapping[str, np.ndarray]
    form: str

    def __post_init__(self) -> None:
        object.__setattr__(self, "coefficients", tuple(float(c) for c in self.coefficients))
        object.__setattr__(self, "variants", readonly_mapping(self.variants))
        object.__setattr__(self, "columns", _frozen_columns(self.columns))

    @property
    def data(self) -> pd.DataFrame:
        """The table of :attr:`columns` as a new DataFrame (changing it changes no result)."""
        import pandas as pd  # on use: importing pandas takes about a second

        return pd.DataFrame({name: values.copy() for name, values in self.columns.items()})

    def to_dict(self) -> dict[str, Any]:
        """JSON-ready fields (:func:`freeladder.base.jsonready.json_ready`)."""
        return json_ready(  # type: ignore[no-any-return]
            {
                "value": self.value,
                "error": self.error,
                "statistical": self.statistical,
                "systematic": self.systematic,
                "coefficients": self.coefficients,
                "variants": self.variants,
                "data": self.columns,
                "form": self.form,
            }
        )

    def __repr__(self) -> str:
        return f"EnergyDensity({self.value:.10g} +- {self.error:.2g})"


def _polynomial_in_inverse(
    x: np.ndarray, e: np.ndarray, order: int
) -> tuple[np.ndarray, float, np.ndarray]:
    """Least squares ``e = sum_{i <= order} c_i x^-i``; coefficients, error of c_0, residuals."""
    design = np.vander(1.0 / x, order + 1, increasing=True)
    coef, *_ = np.linalg.lstsq(design, e, rcond=None)
    resid = e - design @ coef
    dof = x.size - (order + 1)
    if dof <= 0:
        return coef, math.inf, resid
    s2 = float(resid @ resid) / dof
    cov = s2 * np.linalg.inv(design.T @ design)
    return coef, float(math.sqrt(max(cov[0, 0], 0.0))), resid


def energy_density(
    build: Callable[[int], Model],
    sizes: Sequence[int] | np.ndarray,
    progress: bool = False,
) -> EnergyDensity:
    """Ground-state energy per site, extrapolated: ``e(L) = e_inf + a / L + b / L^2``.

    Parameters
    ----------
    build : callable
        ``build(size) -> Model``; the energy is divided by the model's number of sites, and
        ``L`` in the fit is the ``size`` given.
    sizes : sequence of int
        At least 3 distinct sizes; 5 or more give an error bar.
    progress : bool
        Show a progress bar (tqdm.auto).

    Returns
    -------
    EnergyDensity

    Raises
    ------
    ValueError
        Fewer than 3 sizes.

    Warns
    -----
    MixedResidueWarning
        When the sizes give exclusion chains from several residue classes of terms mod
        ``p + 1``.

    Notes
    -----
    The ground energy is :attr:`freeladder.FreeSpectrum.ground_energy` of the complete free
    spectrum (its real part is fitted; the imaginary parts are kept in ``data``).  The form
    ``e_inf + a / L + b / L^2`` is the usual one for open chains: a boundary energy ``a`` and
    a Casimir-like ``1 / L^2`` term (common practice).  Least squares with equal weights
    (rounding errors are far below the misfit); the statistical error of ``e_inf`` comes from
    the residual variance, the systematic error is the largest change of ``e_inf`` when
    dropping the ``1 / L^2`` term (fit on the largest half of the sizes) or the smallest size;
    ``error = sqrt(statistical^2 + systematic^2)``.  For N > 2 the complete spectrum comes from
    the complex root finder, whose cost grows like the square of the number of terms: keep to a
    few thousand terms there.

    References
    ----------
    P. Pfeuty, Ann. Phys. 57, 79 (1970) (uniform critical Ising chain: ``e_inf = -4 / pi``).

    Examples
    --------
    >>> import freeladder as fl
    >>> r = fl.energy_density(lambda L: fl.ising_chain(L), [16, 32, 64, 128, 256])
    >>> abs(r.value + 4 / 3.141592653589793) < 3 * r.error + 1e-9
    True
    """
    from tqdm.auto import tqdm

    sizes_ = _as_sizes(sizes)
    if len(sizes_) < 3:
        raise ValueError(f"energy_density needs at least 3 sizes, got {sizes_}")
    rows = []
    for size in tqdm(sizes_, disable=not progress, desc="energy density"):
        start = time.perf_counter()
        m = _build(build, size)
        _, res = _residue(m)
        e0 = complex(free_spectrum(m).ground_energy)
        n_sites = len(m.sites)
        rows.append(
            {
                "size": size,
                "sites": n_sites,
                "terms": len(m),
                "residue": res,
                "energy": e0.real,
                "energy_imag": e0.imag,
                "per_site": e0.real / n_sites,
                "seconds": time.perf_counter() - start,
            }
        )
    import pandas as pd  # on use: importing pandas takes about a second

    data = pd.DataFrame(rows)
    present = sorted({r["residue"] for r in rows if r["residue"] is not None})
    if len(present) > 1:
        warnings.warn(
            f"sizes fall into residue classes {present} of terms mod (reach + 1); the energy "
            "extrapolation pools them",
            MixedResidueWarning,
            stacklevel=2,
        )
    x = data["size"].to_numpy(float)
    e = data["per_site"].to_numpy(float)
    coef, stat, resid = _polynomial_in_inverse(x, e, 2)
    variants: dict[str, float] = {}
    if x.size >= 4:
        variants["without the smallest size"] = float(_polynomial_in_inverse(x[1:], e[1:], 2)[0][0])
    half = x.size // 2
    if x.size - half >= 2:
        variants["no 1/L^2 term, largest half"] = float(
            _polynomial_in_inverse(x[half:], e[half:], 1)[0][0]
        )
    systematic = max((abs(v - coef[0]) for v in variants.values()), default=0.0)
    return EnergyDensity(
        value=float(coef[0]),
        error=float(math.hypot(stat, systematic)),
        statistical=float(stat),
        systematic=float(systematic),
        coefficients=tuple(float(c) for c in coef),
        variants=variants,
        columns=data.assign(residual=resid),
        form="e(L) = e_inf + a / L + b / L^2, least squares with equal weights",
    )
