"""Rigorous root enclosures (python-flint ball arithmetic).

API
---
``certify_chain_roots(weights, reach, roots, errors=None, *, max_precision, widenings)``
    Proves that each interval ``[lower_k, upper_k]`` around ``roots[k]`` holds exactly one root
    of the chain polynomial ``P_M`` (weights taken exactly as the given binary floats), by
    certified sign changes of ``P_M`` evaluated through the recurrence in arb balls plus the
    known root count ``S``; returns ``ChainEnclosures`` with fields ``lower``, ``upper``
    (float64 arrays, outward-rounded), ``radius`` (``(upper - lower) / 2``), ``sign_change``
    (bool per interval), ``certified`` (bool), ``precision`` (bits used), ``message``.
``certified_roots(coefficients, *, precision=106) -> CertifiedRoots``
    All complex roots of an exact coefficient list (int / Fraction / fmpq; constant term
    first), as isolating balls from ``fmpq_poly.complex_roots``; fields ``midpoints``
    (complex128), ``radii`` (float64 upper bounds), ``multiplicities``, ``precision``.

The chain certificate
---------------------
``P_M`` has degree exactly ``S`` for positive weights (its top coefficient is a sum of
positive products).  If ``S`` pairwise disjoint intervals each show a certified sign change of
``P_M`` at their two ends, each holds an odd number of roots, hence exactly one.  The signs are
computed with the recurrence ``P_k = P_{k-1} - y w_k P_{k-p-1}`` in arb ball arithmetic at the
interval ends (exact binary floats), raising the working precision until every sign is decided.
Nothing here uses the root-count property of ``roots.chain_count_below``.  Cost: O(M) ball
operations per interval end, in a Python loop: about a microsecond each, so M = 2000 with
its 667 roots (2.7 million steps) takes seconds; keep it to moderate sizes, or certify a
subset (then each interval is proved to hold an odd number of roots, but without all S
intervals not to hold exactly one).

References
----------
F. Johansson, "Arb: efficient arbitrary-precision midpoint-radius interval arithmetic",
IEEE Trans. Comput. 66, 1281 (2017).
"""

from __future__ import annotations

from dataclasses import dataclass
from fractions import Fraction
from typing import Any

import flint
import numpy as np

from .roots import chain_root_count, check_chain_weights

__all__ = ["CertifiedRoots", "ChainEnclosures", "certified_roots", "certify_chain_roots"]

_EPS = float(np.finfo(np.float64).eps)


@dataclass(frozen=True)
class ChainEnclosures:
    """Proved enclosures of chain-polynomial roots.

    Attributes
    ----------
    lower, upper : numpy.ndarray
        Interval ends (exact binary floats; the interval is closed).
    radius : numpy.ndarray
        ``(upper - lower) / 2`` rounded up: a proved bound on ``|root - (lower + upper) / 2|``.
    sign_change : numpy.ndarray of bool
        Each interval showed a certified sign change (so holds an odd number of roots).
    certified : bool
        ``True`` when every interval holds exactly one root: all S roots were given, every
        sign change was certified and the intervals are disjoint and positive.
    precision : int
        Largest working precision used (bits).
    message : str
    """

    lower: np.ndarray
    upper: np.ndarray
    radius: np.ndarray
    sign_change: np.ndarray
    certified: bool
    precision: int
    message: str


@dataclass(frozen=True)
class CertifiedRoots:
    """Isolating balls for all complex roots of an exact polynomial.

    Attributes
    ----------
    midpoints : numpy.ndarray of complex128
    radii : numpy.ndarray of float64
        Proved bounds on ``|root - midpoint|`` (float rounding of the midpoint included).
    multiplicities : numpy.ndarray of int64
    precision : int
        Working precision (bits).
    """

    midpoints: np.ndarray
    radii: np.ndarray
    multiplicities: np.ndarray
    precision: int


def _signs(w: np.ndarray, p: int, points: np.ndarray, prec: int) -> np.ndarray:
    """Certified signs of ``P_M`` at ``points`` (+1, -1, or 0 when undecided) at ``prec`` bits."""
    saved = flint.ctx.prec
    flint.ctx.prec = prec
    try:
        wa = [flint.arb(float(v)) for v in w]
        out = np.zeros(points.size, dtype=np.int64)
        for i, y in enumerate(points):
            ya = flint.arb(float(y))
            hist = [flint.arb(1)] * (p + 1)  # P_{k-p-1} ... P_{k-1}
            for wk in wa:
                new = hist[-1] - ya * wk * hist[0]
                del hist[0]
                hist.append(new)
            value = hist[-1]
            out[i] = 1 if value > 0 else (-1 if value < 0 else 0)
        return out
    finally:
        flint.ctx.prec = saved


def _decided_signs(
    w: np.ndarray, p: int, points: np.ndarray, max_precision: int
) -> tuple[np.ndarray, int]:
    """Signs at ``points``, doubling the precision (from 64 bits) for undecided ones."""
    signs = np.zeros(points.size, dtype=np.int64)
    prec, used = 64, 64
    todo = np.arange(points.size)
    while todo.size and prec <= max_precision:
        signs[todo] = _signs(w, p, points[todo], prec)
        used = prec
        todo = todo[signs[todo] == 0]
        prec *= 2
    return signs, used


def certify_chain_roots(
    weights: Any,
    reach: int,
    roots: Any,
    errors: Any = None,
    *,
    max_precision: int = 4096,
    widenings: int = 3,
) -> ChainEnclosures:
    """Prove that an interval around each given root holds exactly one root of ``P_M``.

    Parameters
    ----------
    weights : array_like of float
        ``w_k > 0`` in chain order; the proof is about these binary floats exactly.
    reach : int
        p >= 1.
    roots : array_like of float
        Approximate roots, ascending (all S of them for a full certificate).
    errors : array_like of float, optional
        Error estimates; the first intervals have half-width ``max(8 * error, 64 eps y)``.
    max_precision : int
        Largest arb precision (bits) tried for an undecided sign.
    widenings : int
        Times an interval without a sign change is widened (by 16, never past half the
        distance to a neighbour) before giving up on it.

    Returns
    -------
    ChainEnclosures

    Raises
    ------
    ValueError
        Weights not finite and > 0, roots not finite, positive and strictly ascending.

    References
    ----------
    F. Johansson, IEEE Trans. Comput. 66, 1281 (2017) (arb ball arithmetic).

    Examples
    --------
    >>> enc = certify_chain_roots([1.0, 1.0], 1, [0.5])  # P_2 = 1 - 2y
    >>> enc.certified, bool(enc.lower[0] <= 0.5 <= enc.upper[0])
    (True, True)
    """
    w, p = check_chain_weights(weights, reach)
    y = np.asarray(roots, dtype=np.float64).ravel()
    if y.size == 0 or not np.all(np.isfinite(y)) or np.any(y <= 0):
        raise ValueError("roots must be a non-empty array of finite positive numbers")
    if np.any(np.diff(y) <= 0):
        raise ValueError("roots must be strictly ascending (a repeated root cannot be isolated)")
    total = chain_root_count(w.size, p)
    if y.size > total:
        raise ValueError(f"{y.size} roots given, but the polynomial has only {total}")
    err = np.zeros_like(y) if errors is None else np.abs(np.asarray(errors, dtype=np.float64))
    if err.shape != y.shape or not np.all(np.isfinite(err)):
        raise ValueError("errors must be finite and match roots in shape")
    gaps = np.diff(y)
    room = np.minimum(np.append(gaps, np.inf), np.insert(gaps, 0, y[0])) * 0.45
    half = np.minimum(np.maximum(8.0 * err, 64.0 * _EPS * y), room)
    change = np.zeros(y.size, dtype=bool)
    lower, upper = y - half, y + half
    precision = 64
    todo = np.arange(y.size)
    for attempt in range(widenings + 1):
        lower[todo], upper[todo] = y[todo] - half[todo], y[todo] + half[todo]
        signs, used = _decided_signs(
            w, p, np.concatenate([lower[todo], upper[todo]]), max_precision
        )
        precision = max(precision, used)
        s_lo, s_hi = signs[: todo.size], signs[todo.size :]
        change[todo] = (s_lo * s_hi) < 0
        todo = todo[~change[todo]]
        if todo.size == 0 or attempt == widenings:
            break
        half[todo] = np.minimum(16.0 * half[todo], room[todo])
    disjoint = bool(lower[0] > 0 and np.all(upper[:-1] < lower[1:]))
    certified = bool(np.all(change)) and disjoint and y.size == total
    if certified:
        message = f"all {total} roots isolated: {total} disjoint sign changes, degree {total}"
    elif not np.all(change):
        message = f"{int((~change).sum())} of {y.size} intervals show no certified sign change"
    else:
        message = (
            f"{y.size} of {total} roots given: each interval holds an odd number of roots"
            if disjoint
            else "intervals overlap"
        )
    radius = (upper - lower) * 0.5 * (1.0 + 2 * _EPS)
    return ChainEnclosures(lower, upper, radius, change, certified, precision, message)


def _to_fmpq(c: Any, j: int) -> flint.fmpq:
    """Exact rational from an int, Fraction, fmpq or fmpz coefficient."""
    if isinstance(c, (flint.fmpq, flint.fmpz)):
        return flint.fmpq(c)
    if isinstance(c, bool) or not isinstance(c, (int, Fraction, np.integer)):
        raise ValueError(
            f"coefficient {j} is {c!r} ({type(c).__name__}): certified roots need exact "
            "int or Fraction coefficients"
        )
    f = Fraction(int(c)) if isinstance(c, np.integer) else Fraction(c)
    return flint.fmpq(f.numerator, f.denominator)


def certified_roots(coefficients: Any, *, precision: int = 106) -> CertifiedRoots:
    """Isolating balls for every complex root of a polynomial with exact coefficients.

    Parameters
    ----------
    coefficients : sequence of int, Fraction, fmpq
        Constant term first.  The polynomial must not be constant.
    precision : int
        Working precision in bits for the isolation (the balls are refined at least to it).

    Returns
    -------
    CertifiedRoots

    Raises
    ------
    ValueError
        A coefficient that is not exact, or a constant polynomial.

    Notes
    -----
    Uses ``fmpq_poly.complex_roots`` of python-flint (FLINT/arb), which returns balls that are
    proved to be disjoint and to hold the stated number of roots.  Practical up to a few
    hundred degrees (degree 300 took about 18 s here).

    References
    ----------
    F. Johansson, IEEE Trans. Comput. 66, 1281 (2017).

    Examples
    --------
    >>> r = certified_roots([1, -3, 1])  # 1 - 3y + y**2, roots (3 -+ sqrt 5) / 2
    >>> np.allclose(sorted(r.midpoints.real), [(3 - 5**0.5) / 2, (3 + 5**0.5) / 2])
    True
    """
    coeffs = [_to_fmpq(c, j) for j, c in enumerate(coefficients)]
    poly = flint.fmpq_poly(coeffs)
    if poly.degree() < 1:
        raise ValueError("the polynomial is constant: it has no roots to isolate")
    saved = flint.ctx.prec
    flint.ctx.prec = int(precision)
    try:
        found: list[Any] = list(poly.complex_roots())  # (acb ball, multiplicity) pairs
    finally:
        flint.ctx.prec = saved
    mids = np.empty(len(found), dtype=np.complex128)
    radii = np.empty(len(found))
    mult = np.empty(len(found), dtype=np.int64)
    for i, (ball, m) in enumerate(found):
        re, im = float(ball.real.mid()), float(ball.imag.mid())
        rad = float(abs(flint.acb(ball.real.rad(), ball.imag.rad())).upper())
        # outward: the ball's own radius, the float rounding of both midpoint parts
        radii[i] = rad * (1 + 4 * _EPS) + (abs(re) + abs(im)) * _EPS
        mids[i] = complex(re, im)
        mult[i] = int(m)
    return CertifiedRoots(mids, radii, mult, int(precision))
