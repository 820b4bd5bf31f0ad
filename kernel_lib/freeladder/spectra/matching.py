"""Free levels against the exact spectrum, multiplicities included.

:func:`match_levels` groups both sides into levels (values within the tolerance chain into one
level), pairs every free level with the nearest exact level, and compares how many eigenvalues
each side puts there.  What is left over on either side is returned, with the largest distance
between an eigenvalue and its partner.
"""

from __future__ import annotations

import html
from dataclasses import dataclass
from typing import Any

import numpy as np

from ..base import display
from ..base.jsonready import json_ready
from .ed import ExactSpectrum

__all__ = ["LevelMatch", "match_levels"]

DEFAULT_RTOL = 1e-8
"""Default tolerance relative to the spectral scale ``max(1, max |E|)``."""


@dataclass(frozen=True)
class LevelMatch:
    """Result of :func:`match_levels`.

    Attributes
    ----------
    ok : bool
        Every eigenvalue on each side has a partner on the other within ``tolerance``.
    distance : float
        Largest distance between a matched eigenvalue and its partner (0.0 when nothing was
        matched).
    tolerance : float
        The absolute tolerance used.
    matched : int
        Eigenvalues matched, counted with multiplicity.
    unmatched_free, unmatched_exact : tuple of (level, count)
        Levels left over on each side and how many eigenvalues of each are unmatched.
    compared : str
        What was compared (all levels, or the lowest ones when the exact spectrum is partial).
    """

    ok: bool
    distance: float
    tolerance: float
    matched: int
    unmatched_free: tuple[tuple[complex | float, int], ...]
    unmatched_exact: tuple[tuple[complex | float, int], ...]
    compared: str

    def to_dict(self) -> dict[str, Any]:
        """The fields as JSON-ready values (see :func:`freeladder.base.jsonready.json_ready`)."""
        return json_ready(  # type: ignore[no-any-return]
            {
                "ok": self.ok,
                "distance": self.distance,
                "tolerance": self.tolerance,
                "matched": self.matched,
                "unmatched_free": [list(x) for x in self.unmatched_free],
                "unmatched_exact": [list(x) for x in self.unmatched_exact],
                "compared": self.compared,
            }
        )

    def __str__(self) -> str:
        return display.match_text(self)

    def _repr_html_(self) -> str:
        return f"<p>{html.escape(str(self))}</p>"


def _free_eigenvalues(free: Any) -> np.ndarray | None:
    """Free eigenvalues with repetition; None when the multiplicities are unknown."""
    if isinstance(free, tuple) and len(free) == 2:
        values, mult = free
    else:
        values, mult = getattr(free, "energies", None), getattr(free, "multiplicity", None)
        if values is None:
            raise TypeError(
                "free levels must be a LevelTable or a (values, multiplicities) pair, got "
                f"{type(free).__name__}"
            )
    values = np.asarray(values)
    if mult is None:
        return None
    counts = np.broadcast_to(np.asarray(mult, dtype=np.int64), values.shape)
    if np.any(counts < 0):
        raise ValueError("multiplicities must be >= 0")
    return np.repeat(values, counts)


def _levels(vals: np.ndarray, tol: float) -> tuple[np.ndarray, list[np.ndarray]]:
    """Chain values within ``tol`` (real parts, then imaginary parts) into levels."""
    if len(vals) == 0:
        return np.zeros(0, dtype=complex), []
    vals = np.asarray(vals, dtype=complex)
    vals = vals[np.lexsort((vals.imag, vals.real))]
    groups: list[np.ndarray] = []
    for block in np.split(vals, np.nonzero(np.diff(vals.real) > tol)[0] + 1):
        block = block[np.argsort(block.imag, kind="stable")]
        groups.extend(np.split(block, np.nonzero(np.diff(block.imag) > tol)[0] + 1))
    centres = np.array([g.mean() for g in groups], dtype=complex)
    return centres, groups


def _value(v: complex) -> complex | float:
    return float(v.real) if v.imag == 0 else complex(v)


def match_levels(
    free: Any, exact: ExactSpectrum, tol: float | None = None, *, cluster: float | None = None
) -> LevelMatch:
    """Match free levels with exact levels, multiplicities included.

    Parameters
    ----------
    free : LevelTable or (values, multiplicities)
        The free levels: a :class:`~freeladder.LevelTable` (its ``multiplicity``, one number for
        every level, must be known) or a pair of arrays (``multiplicities`` an int or one count
        per value).  Values that coincide within ``tol`` are one level; their counts add.
    exact : ExactSpectrum
        From :func:`freeladder.exact_spectrum`.  When it holds only the lowest eigenvalues
        (``complete=False``), the same number of lowest free eigenvalues (by real part) is
        compared.
    tol : float, optional
        Absolute tolerance; default ``1e-8 * max(1, max |E|) + exact.error_estimate``.
    cluster : float, optional
        For defective (non-diagonalizable) ``H``, at an exceptional point: values within
        ``cluster`` chain into one level on each side, and each matched pair of levels is
        compared by the mean of its eigenvalues (within ``tol``) and by its count.  A level
        whose Jordan blocks have size up to m comes out of a backward-stable eigensolver
        spread over about ``(eps |H|)^(1/m) |H|^(1 - 1/m)``, but the mean of the group is
        as well-conditioned as a simple eigenvalue (the weighted mean of a lambda-group is
        holomorphic in the perturbation: T. Kato, Perturbation Theory for Linear Operators,
        Springer (1966), II.2.2).

    Returns
    -------
    LevelMatch
        Frozen: ``ok``, the largest distance, the unmatched levels of each side, the tolerance.

    Raises
    ------
    TypeError
        If ``free`` or ``exact`` has the wrong type.
    ValueError
        If ``tol`` is negative or not finite, or the free multiplicities are unknown.

    Notes
    -----
    Each side is grouped into levels by chaining values closer than ``tol``; every free level is
    paired with the nearest exact level within ``tol`` (k-d tree on the complex plane), and
    the counts are compared level by level.  ``distance`` is the largest distance from an
    eigenvalue of a matched level to the nearest eigenvalue of its partner level.

    With a partial exact spectrum, count the copies with care: a Lanczos solver can miss copies
    of a highly degenerate level (here ARPACK returned 11 copies of the 256-fold ground level of
    a 14-term Ising chain among its 16 lowest eigenvalues), and they come back as unmatched.

    Examples
    --------
    >>> import numpy as np, freeladder as fl
    >>> m = fl.ising_chain(3)
    >>> r = match_levels(fl.free_spectrum(m).levels(None), fl.exact_spectrum(m))
    >>> r.ok, r.matched
    (True, 8)
    """
    if not isinstance(exact, ExactSpectrum):
        raise TypeError(f"exact must be an ExactSpectrum, got {type(exact).__name__}")
    free_all = _free_eigenvalues(free)
    if free_all is None:
        raise ValueError(
            "the free levels carry no multiplicity; pass (values, multiplicities) explicitly"
        )
    exact_all = np.asarray(exact.eigenvalues)
    scale = max(
        1.0,
        float(np.max(np.abs(exact_all))) if len(exact_all) else 0.0,
        float(np.max(np.abs(free_all))) if len(free_all) else 0.0,
    )
    if tol is None:
        tol = DEFAULT_RTOL * scale + float(exact.error_estimate)
    tol = float(tol)
    if not (np.isfinite(tol) and tol >= 0):
        raise ValueError(f"tol must be a finite number >= 0, got {tol!r}")
    compared = f"all {len(exact_all)} eigenvalues"
    if not exact.complete:
        order = np.argsort(np.real(free_all), kind="stable")
        free_all = free_all[order[: len(exact_all)]]
        compared = f"the lowest {len(exact_all)} eigenvalues (by real part)"
    if cluster is not None:
        cluster = float(cluster)
        if not (np.isfinite(cluster) and cluster >= tol):
            raise ValueError(f"cluster must be finite and >= tol ({tol}), got {cluster!r}")
        compared += f", grouped within {display.bound_text(cluster)} and compared by group means"
    return _match(free_all, exact_all, tol, compared, cluster)


def _match(
    free_all: np.ndarray,
    exact_all: np.ndarray,
    tol: float,
    compared: str,
    cluster: float | None = None,
) -> LevelMatch:
    group = tol if cluster is None else cluster
    f_centres, f_groups = _levels(free_all, group)
    e_centres, e_groups = _levels(exact_all, group)
    left_e = [len(g) for g in e_groups]
    left_f = [len(g) for g in f_groups]
    matched, distance = 0, 0.0
    if len(f_centres) and len(e_centres):
        from scipy.spatial import cKDTree  # on use: scipy.spatial is slow to import

        tree = cKDTree(np.column_stack([e_centres.real, e_centres.imag]))
        dist, nearest = tree.query(
            np.column_stack([f_centres.real, f_centres.imag]), distance_upper_bound=2 * group
        )
        for i, (d, j) in enumerate(zip(dist, nearest, strict=True)):
            if not np.isfinite(d):
                continue
            take = min(left_f[i], left_e[j])
            if take == 0:
                continue
            left_f[i] -= take
            left_e[j] -= take
            matched += take
            if cluster is not None:
                distance = max(distance, float(abs(f_centres[i] - e_centres[j])))
                continue
            gap_f = np.abs(f_groups[i][:, None] - e_groups[j][None, :]).min(axis=1).max()
            gap_e = np.abs(e_groups[j][:, None] - f_groups[i][None, :]).min(axis=1).max()
            distance = max(distance, float(gap_f), float(gap_e))
    un_f = tuple((_value(f_centres[i]), c) for i, c in enumerate(left_f) if c)
    un_e = tuple((_value(e_centres[j]), c) for j, c in enumerate(left_e) if c)
    ok = not un_f and not un_e and distance <= tol
    return LevelMatch(ok, distance, tol, matched, un_f, un_e, compared)
