"""Disordered and patterned couplings, and statistics of log-gaps over disorder realisations.

* :func:`disorder_couplings` draws seeded random couplings from the usual distributions;
* :func:`periodic_couplings` repeats a pattern such as ``(a, 1, 1)`` along a chain;
* :func:`interleave` puts Ising fields and bonds into the term order of a reach-1 chain;
* :func:`disordered_chain_gap` is one realisation: the smallest quasi-energy of a random
  exclusion chain, ready for :func:`freeladder.sweep`;
* :func:`log_gap_statistics` summarises ``ln(gap)`` per size (mean, width, histogram) and fits
  how the mean grows with size.

References
----------
D. S. Fisher, Phys. Rev. B 51, 6411 (1995) (random transverse-field Ising chain: infinite
randomness, ``-ln(gap) ~ L^(1/2)`` at criticality); F. Igloi and C. Monthus, Phys. Rep. 412,
277 (2005) (the power-law distribution ``c = u^delta``; cited from memory).
"""

from __future__ import annotations

import math
from collections.abc import Mapping, Sequence
from dataclasses import dataclass
from typing import TYPE_CHECKING, Any

import numpy as np

from ..algebra.builders import exclusion_chain
from ..algebra.model import Coupling
from ..base.frozen import readonly_array, readonly_mapping
from ..base.jsonready import json_ready

if TYPE_CHECKING:
    import pandas as pd
from .scaling import PowerLawFit, chain_log_quasi_energy, power_law_fit, smallest_quasi_energy

__all__ = [
    "LogGapStatistics",
    "disorder_couplings",
    "disordered_chain_gap",
    "interleave",
    "log_gap_statistics",
    "periodic_couplings",
]

_DISTRIBUTIONS = ("box", "power", "log-box", "gaussian")

RandomSource = int | np.random.SeedSequence | np.random.Generator | None


def disorder_couplings(
    n: int,
    distribution: str = "box",
    *,
    low: float = 0.0,
    high: float = 1.0,
    delta: float = 1.0,
    mean: float = 1.0,
    width: float = 0.5,
    rng: RandomSource = None,
) -> np.ndarray:
    """``n`` random couplings, reproducible from ``rng``.

    Parameters
    ----------
    n : int
        How many.
    distribution : "box", "power", "log-box" or "gaussian"
        ``"box"``: uniform in ``(low, high]`` (open at ``low``, so ``low = 0`` never gives a
        zero coupling).  ``"power"``: ``c = high * u^delta`` with ``u`` uniform in ``(0, 1]``,
        density ``~ c^(1/delta - 1)``; ``ln c`` has standard deviation ``delta`` (``delta = 1``
        is the box ``(0, high]``; large ``delta`` is strong, "infinite-randomness" disorder).
        ``"log-box"``: ``ln c`` uniform in ``[ln low, ln high]`` (needs ``low > 0``).
        ``"gaussian"``: ``mean + width * normal``.
    low, high, delta, mean, width : float
        The parameters of the chosen distribution (the others are ignored).
    rng : int, SeedSequence, Generator or None
        Anything ``numpy.random.default_rng`` accepts; pass the ``rng`` that
        :func:`freeladder.sweep` gives for independent, reproducible realisations.

    Returns
    -------
    ndarray of float

    Raises
    ------
    ValueError
        For an unknown distribution or parameters outside its domain.

    References
    ----------
    F. Igloi and C. Monthus, Phys. Rep. 412, 277 (2005) (the power-law distribution; cited from
    memory).

    Examples
    --------
    >>> c = disorder_couplings(5, "box", rng=7)
    >>> bool(np.all((c > 0) & (c <= 1))), np.array_equal(c, disorder_couplings(5, rng=7))
    (True, True)
    """
    count = int(n)
    if count < 0:
        raise ValueError(f"n must be >= 0, got {n}")
    if distribution not in _DISTRIBUTIONS:
        raise ValueError(f"distribution must be one of {_DISTRIBUTIONS}, not {distribution!r}")
    for name, v in (("low", low), ("high", high), ("delta", delta), ("mean", mean)):
        if not np.isfinite(v):
            raise ValueError(f"{name} must be finite, got {v}")
    gen = np.random.default_rng(rng)
    u = 1.0 - gen.random(count)  # uniform in (0, 1]
    if distribution == "box":
        if not high > low:
            raise ValueError(f"box: need low < high, got {low}, {high}")
        return np.asarray(low + (high - low) * u)
    if distribution == "power":
        if not (delta > 0 and high > 0):
            raise ValueError(f"power: need delta > 0 and high > 0, got {delta}, {high}")
        return np.asarray(high * u**delta)
    if distribution == "log-box":
        if not 0 < low < high:
            raise ValueError(f"log-box: need 0 < low < high, got {low}, {high}")
        return np.asarray(np.exp(np.log(low) + (np.log(high) - np.log(low)) * u))
    if not (np.isfinite(width) and width >= 0):
        raise ValueError(f"gaussian: width must be finite and >= 0, got {width}")
    return np.asarray(mean + width * gen.standard_normal(count))


def periodic_couplings(n: int, pattern: Sequence[Coupling]) -> list[Coupling]:
    """``pattern`` repeated along ``n`` terms: ``periodic_couplings(5, (a, 1, 1))`` is
    ``[a, 1, 1, a, 1]`` (``freeladder.staggered`` is the period-2 case).

    Raises
    ------
    ValueError
        For an empty pattern or ``n < 0``.
    """
    values = list(pattern)
    if not values:
        raise ValueError("the pattern is empty")
    if int(n) < 0:
        raise ValueError(f"n must be >= 0, got {n}")
    return [values[j % len(values)] for j in range(int(n))]


def interleave(fields: Sequence[float] | np.ndarray, bonds: Sequence[float] | np.ndarray) -> Any:
    """``[h_0, J_0, h_1, J_1, ..., h_{L-1}]``: Ising fields and bonds in chain order.

    The open transverse-field Ising chain ``-sum h_i X_i - sum J_i Z_i Z_{i+1}`` has the
    frustration graph of a path in this order, so (up to a basis change and signs, which do not
    change the spectrum) it is the reach-1 exclusion chain with these couplings
    (``freeladder.exclusion_chain(2 L - 1, reach=1, couplings=interleave(h, J))``), which is
    cheaper to build than :func:`freeladder.ising_chain` for long chains.

    Raises
    ------
    ValueError
        Unless ``len(bonds) == len(fields) - 1``.
    """
    h = np.asarray(fields)
    j = np.asarray(bonds)
    if h.ndim != 1 or j.ndim != 1 or j.size != h.size - 1 or h.size < 1:
        raise ValueError(f"need L fields and L - 1 bonds, got {h.size} and {j.size}")
    out = np.empty(2 * h.size - 1, dtype=np.result_type(h, j))
    out[0::2] = h
    out[1::2] = j
    return out


def disordered_chain_gap(
    n_terms: int,
    reach: int = 1,
    states: int = 2,
    distribution: str = "box",
    *,
    low: float = 0.0,
    high: float = 1.0,
    delta: float = 1.0,
    mean: float = 1.0,
    width: float = 0.5,
    rng: RandomSource = None,
) -> dict[str, float]:
    """One disorder realisation: the smallest quasi-energy of a random exclusion chain.

    The couplings come from :func:`disorder_couplings` (same parameters); the value from
    :func:`freeladder.chain_log_quasi_energy` on the couplings in chain order (the chain polynomial
    needs no Model), or from :func:`freeladder.free_spectrum` of the built chain when the
    weights ``c_j^N`` have several phases.  With ``reach=1, states=2`` and
    ``n_terms = 2 L - 1`` this is the random transverse-field Ising chain of ``L`` sites with
    fields and bonds from one distribution (see :func:`interleave`).

    Returns
    -------
    dict
        ``gap`` (``|eta_1|``), ``log_gap`` (``ln |eta_1|``) and ``gap_error`` (error bound).
        Below float64 (about 2.2e-308, long disordered chains) ``gap`` and ``gap_error`` are
        NaN and ``log_gap`` alone holds the value, exact to rounding.

    Raises
    ------
    ArithmeticError
        When the smallest quasi-energy did not converge: never a silent unreliable number.

    Examples
    --------
    >>> r = disordered_chain_gap(41, reach=2, low=0.3, high=1.7, rng=1)
    >>> sorted(r), r["gap"] > 0
    (['gap', 'gap_error', 'log_gap'], True)
    """
    c = disorder_couplings(
        n_terms,
        distribution,
        low=low,
        high=high,
        delta=delta,
        mean=mean,
        width=width,
        rng=rng,
    )
    got = chain_log_quasi_energy(c, reach, states)
    if got is not None:
        log_gap, log_bound, _ = got
        gap = math.exp(log_gap)
        if gap < np.finfo(np.float64).tiny:  # below float64: only the logarithm is exact
            return {"gap": math.nan, "log_gap": log_gap, "gap_error": math.nan}
        return {"gap": gap, "log_gap": log_gap, "gap_error": gap * math.expm1(log_bound)}
    m = exclusion_chain(n_terms, reach=reach, states=states, couplings=c)
    gap, bound, _ = smallest_quasi_energy(m)
    return {"gap": gap, "log_gap": float(np.log(gap)), "gap_error": bound}


@dataclass(frozen=True)
class LogGapStatistics:
    """Per-size statistics of ``-ln(gap)`` over disorder realisations.

    Attributes
    ----------
    columns : mapping of str to numpy.ndarray
        Read-only columns, one entry per size: ``size``, ``count``, ``mean`` (of ``-ln gap``),
        ``stderr`` (standard error of the mean, ``width / sqrt(count)``), ``width`` (standard
        deviation of ``ln gap``, ``ddof=1``), ``median`` (of ``-ln gap``).  :attr:`table` gives
        them as a new pandas DataFrame.
    histograms : mapping
        ``{size: (edges, counts)}`` of ``-ln gap`` per size (``numpy.histogram``), read-only.
    """

    columns: Mapping[str, np.ndarray]
    histograms: Mapping[int, tuple[np.ndarray, np.ndarray]]

    def __post_init__(self) -> None:  # frozen: read-only arrays in read-only mappings
        cols = {k: readonly_array(np.asarray(v)) for k, v in self.columns.items()}
        hist = {
            int(k): (readonly_array(np.asarray(e)), readonly_array(np.asarray(c)))
            for k, (e, c) in self.histograms.items()
        }
        object.__setattr__(self, "columns", readonly_mapping(cols))
        object.__setattr__(self, "histograms", readonly_mapping(hist))

    @property
    def table(self) -> pd.DataFrame:
        """The columns as a new pandas DataFrame (changing it changes nothing here)."""
        import pandas as pd  # on use: importing pandas takes about a second

        return pd.DataFrame({k: np.array(v) for k, v in self.columns.items()})

    def exponent(self, statistic: str = "mean", correction: str = "offset") -> PowerLawFit:
        """Fit ``statistic ~ A size^psi (+ correction)`` by :func:`freeladder.power_law_fit`.

        ``statistic="mean"`` is weighted by the standard errors; ``"width"`` by the standard
        error of a standard deviation, ``width / sqrt(2 (count - 1))`` (Gaussian estimate,
        common practice).  ``correction="offset"`` allows an additive constant, the leading
        correction for a logarithm (the prefactor of the gap).
        """
        if statistic not in ("mean", "width"):
            raise ValueError(f"statistic must be 'mean' or 'width', not {statistic!r}")
        t = self.table
        if statistic == "mean":
            err = t["stderr"].to_numpy(float)
        else:
            err = t["width"].to_numpy(float) / np.sqrt(2.0 * (t["count"].to_numpy(float) - 1))
        return power_law_fit(t["size"], t[statistic], err, correction=correction)

    def to_dict(self) -> dict[str, Any]:
        """JSON-ready fields (:func:`freeladder.base.jsonready.json_ready`)."""
        return json_ready(  # type: ignore[no-any-return]
            {
                "table": self.table.to_dict(orient="list"),
                "histograms": {
                    str(k): {"edges": e, "counts": c} for k, (e, c) in self.histograms.items()
                },
            }
        )


def log_gap_statistics(
    table: pd.DataFrame,
    size: str = "size",
    column: str = "gap",
    log: bool = False,
    bins: int | Sequence[float] = 30,
) -> LogGapStatistics:
    """Mean, width and histogram of ``-ln(gap)`` per size, from a table of realisations.

    Parameters
    ----------
    table : pandas.DataFrame
        One row per realisation, such as the result of :func:`freeladder.sweep` over a
        ``size`` key and a ``realisation`` key.
    size : str
        The column holding the size.
    column : str
        The column holding the gap (or its natural logarithm, with ``log=True``).
    log : bool
        Whether ``column`` already holds ``ln(gap)``.
    bins : int or sequence
        Passed to ``numpy.histogram``.

    Returns
    -------
    LogGapStatistics

    Raises
    ------
    ValueError
        Missing columns, gaps that are not finite and > 0, or a size with fewer than 2
        realisations.

    References
    ----------
    D. S. Fisher, Phys. Rev. B 51, 6411 (1995) (mean and width of ``ln gap`` both grow like
    ``L^(1/2)`` at the infinite-randomness critical point).
    """
    for name in (size, column):
        if name not in table.columns:
            raise ValueError(f"the table has no column {name!r} (columns: {list(table.columns)})")
    values = table[column].to_numpy(float)
    if log:
        bad = ~np.isfinite(values)
        minus_log = -values
    else:
        bad = ~(np.isfinite(values) & (values > 0))
        with np.errstate(divide="ignore", invalid="ignore"):
            minus_log = -np.log(values)
    if np.any(bad):
        where = list(np.nonzero(bad)[0][:5])
        hint = "" if log else " (gaps below float64 are NaN: use column='log_gap', log=True)"
        raise ValueError(f"{int(bad.sum())} gaps are not finite and > 0 (rows {where} ...){hint}")
    import pandas as pd  # on use: importing pandas takes about a second

    frame = pd.DataFrame({"size": table[size].to_numpy(), "v": minus_log})
    rows = []
    histograms: dict[int, tuple[np.ndarray, np.ndarray]] = {}
    for key, part in frame.groupby("size", sort=True):
        v = part["v"].to_numpy(float)
        if v.size < 2:
            raise ValueError(f"size {key}: {v.size} realisation; need at least 2")
        width = float(np.std(v, ddof=1))
        rows.append(
            {
                "size": key,
                "count": int(v.size),
                "mean": float(v.mean()),
                "stderr": width / float(np.sqrt(v.size)),
                "width": width,
                "median": float(np.median(v)),
            }
        )
        counts, edges = np.histogram(v, bins=bins)  # type: ignore[arg-type]
        histograms[int(key)] = (edges, counts)  # type: ignore[call-overload]
    frame = pd.DataFrame(rows)
    return LogGapStatistics({k: frame[k].to_numpy() for k in frame.columns}, histograms)
