"""Rigorous root enclosures: interval sign tests on the chain recurrence, certified isolation.

API
---
``certify_chain_roots(weights, reach, roots, errors=None, *, weight_bounds=None) -> RootResult``
    Proves that each interval ``[lower_k, upper_k]`` around ``roots[k]`` holds exactly one root
    of the chain polynomial ``P_M``, by certified sign changes of ``P_M`` plus the known root
    count ``S``.  ``variable="y"``, method ``"chain-certified"``; ``rigorous`` is True only
    when every interval is proved; ``details`` holds ``lower``, ``upper``, ``sign_change``.
``certified_roots(coefficients) -> RootResult``
    All complex roots of an exact coefficient list (int / Fraction / fmpq; constant term
    first), as isolating balls (python-flint ``acb_poly.roots`` on each squarefree factor, at
    bounded precision); method ``"exact-certified"``, ``details["multiplicities"]``.

The chain certificate
---------------------
``P_M`` has degree exactly ``S`` for positive weights (its top coefficient is a sum of
positive products).  If ``S`` pairwise disjoint intervals each show a certified sign change of
``P_M`` at their two ends, each holds an odd number of roots, hence exactly one.  The sign of
``P_M(y) = prod_k r_k`` comes from the ratios ``r_k = P_k / P_{k-1}``,

    r_k = 1 - y w_k / (r_{k-1} r_{k-2} ... r_{k-p}),      r_k = 1 for k <= 0,

evaluated in interval arithmetic at FIXED working precision: float64 with every result
rounded outward by one unit in the last place (round-to-nearest is off by at most half a
unit, so each interval provably holds the exact value), in compiled code (numba), over all
end points at once, O(M) per end point.  For reach 1 each step is a monotone function of one
interval, so the enclosure is tight and stays at rounding level along any chain (the
ratios contract): this certifies 10^5-term chains.  For reach p >= 2 the p previous ratios
are enclosed by a box that forgets their correlation (the wrapping effect), and the width
was measured to grow by about 1.26 per step on random reach-2 chains, so most end points of
long chains stay undecided there.  Undecided end points go to the linear recurrence
``P_k = P_{k-1} - y w_k P_{k-p-1}`` in python-flint arb balls, doubling the precision from 64
bits up to ``max_precision`` (the precision needed grows with M: this part does not scale);
if still undecided the interval is widened (by 4, never past 0.45 of the distance to a
neighbour) and tested again; an interval that never shows a sign change is reported, never
passed.  Nothing here uses the root-count property of ``roots.chain_count_below``.
The weights may be given as intervals (``weight_bounds``), so that the rounding of
``w = c^N`` from the couplings is covered too.

References
----------
R. E. Moore, R. B. Kearfott and M. J. Cloud, Introduction to Interval Analysis, SIAM (2009)
(outward-rounded interval arithmetic).  F. Johansson, "Arb: efficient arbitrary-precision
midpoint-radius interval arithmetic", IEEE Trans. Comput. 66, 1281 (2017).
"""

from __future__ import annotations

from fractions import Fraction
from typing import Any

import flint
import numpy as np
from numba import njit, prange

from .root_result import RootResult
from .roots import chain_root_count, check_chain_weights

__all__ = ["certified_roots", "certify_chain_roots"]

_EPS = float(np.finfo(np.float64).eps)
_ARB_STEPS = 2e6  # reach 1: ball steps per precision round at most (about 10 s in Python)


@njit(cache=True, inline="always")
def _dn(v: float) -> float:  # pragma: no cover - compiled
    """A float below the exact value that ``v`` rounds (to nearest).

    ``|exact - v| <= 2**-53 |v|`` (no underflow), and ``RN(v - 2**-51 |v|)`` lies below
    ``v - 2**-53 |v|`` (its own rounding error is at most ``2**-53 |v|``).  Tiny values are
    sent to -inf/+inf so that the interval counts as undecided.
    """
    return v - abs(v) * 2.0**-51 if abs(v) > 2.0**-960 else -np.inf


@njit(cache=True, inline="always")
def _up(v: float) -> float:  # pragma: no cover - compiled
    """A float above the exact value that ``v`` rounds (see :func:`_dn`)."""
    return v + abs(v) * 2.0**-51 if abs(v) > 2.0**-960 else np.inf


@njit(cache=True, inline="always")
def _imul(alo: float, ahi: float, blo: float, bhi: float) -> tuple[float, float]:
    """Outward-rounded product of the intervals [alo, ahi] and [blo, bhi]."""  # noqa: D401
    p1, p2, p3, p4 = alo * blo, alo * bhi, ahi * blo, ahi * bhi
    return _dn(min(min(p1, p2), min(p3, p4))), _up(max(max(p1, p2), max(p3, p4)))


@njit(cache=True, boundscheck=False)
def _interval_sign(
    wlo: np.ndarray, whi: np.ndarray, p: int, y: float
) -> int:  # pragma: no cover - compiled
    """Sign of ``P_M(y)`` for every weight vector in the box, or 0 when undecided."""
    inv_lo = np.ones(p)
    inv_hi = np.ones(p)
    negative = 0
    for k in range(wlo.size):
        slo, shi = _dn(y * wlo[k]), _up(y * whi[k])
        for i in range(p):
            slo, shi = _imul(slo, shi, inv_lo[i], inv_hi[i])
        rlo, rhi = _dn(1.0 - shi), _up(1.0 - slo)
        if not (rlo <= rhi) or (rlo <= 0.0 <= rhi) or not (abs(rlo) < np.inf > abs(rhi)):
            return 0
        if rhi < 0.0:
            negative += 1
        slot = k % p
        inv_lo[slot], inv_hi[slot] = _dn(1.0 / rhi), _up(1.0 / rlo)
    return -1 if negative % 2 else 1


@njit(cache=True, parallel=True)
def _interval_signs(
    wlo: np.ndarray, whi: np.ndarray, p: int, ys: np.ndarray
) -> np.ndarray:  # pragma: no cover - compiled
    out = np.zeros(ys.size, dtype=np.int64)
    for i in prange(ys.size):
        out[i] = _interval_sign(wlo, whi, p, ys[i])
    return out


def _arb_signs(wlo: np.ndarray, whi: np.ndarray, p: int, ys: np.ndarray, prec: int) -> np.ndarray:
    """Signs of ``P_M`` at ``ys`` from the linear recurrence in arb balls at ``prec`` bits."""
    saved = flint.ctx.prec
    flint.ctx.prec = prec
    try:
        wa = [
            flint.arb(float(lo)) if lo == hi else flint.arb(float(lo)).union(flint.arb(float(hi)))
            for lo, hi in zip(wlo, whi, strict=True)
        ]
        out = np.zeros(ys.size, dtype=np.int64)
        for i, y in enumerate(ys):
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


def _signs(
    wlo: np.ndarray, whi: np.ndarray, p: int, ys: np.ndarray, max_precision: int
) -> tuple[np.ndarray, int]:
    """Certified signs of ``P_M`` at ``ys``: float64 intervals on the ratios, then arb.

    Returns the signs (0 where still undecided) and the largest precision used (bits).
    """
    signs = _interval_signs(wlo, whi, p, np.ascontiguousarray(ys, dtype=np.float64))
    precision = 53
    prec = 64
    while prec <= max_precision:
        todo = np.nonzero(signs == 0)[0]
        if todo.size == 0 or (p == 1 and todo.size * wlo.size > _ARB_STEPS):
            break  # reach 1: widening decides them faster than the Python loop
        precision = prec
        signs[todo] = _arb_signs(wlo, whi, p, ys[todo], prec)
        prec *= 2
    return signs, precision


def _weight_box(
    w: np.ndarray, weight_bounds: tuple[Any, Any] | None
) -> tuple[np.ndarray, np.ndarray]:
    if weight_bounds is None:
        return w, w
    lo = np.ascontiguousarray(weight_bounds[0], dtype=np.float64)
    hi = np.ascontiguousarray(weight_bounds[1], dtype=np.float64)
    if lo.shape != w.shape or hi.shape != w.shape:
        raise ValueError("weight_bounds must be two arrays shaped like the weights")
    if not (np.all(lo > 0) and np.all(lo <= w) and np.all(w <= hi) and np.all(np.isfinite(hi))):
        raise ValueError("weight_bounds must be finite, positive and hold the weights")
    return lo, hi


def certify_chain_roots(
    weights: Any,
    reach: int,
    roots: Any,
    errors: Any = None,
    *,
    weight_bounds: tuple[Any, Any] | None = None,
    indices: Any = None,
    widenings: int = 10,
    max_precision: int = 4096,
) -> RootResult:
    """Prove that an interval around each given root holds exactly one root of ``P_M``.

    Parameters
    ----------
    weights : array_like of float
        ``w_k > 0`` in chain order; the proof is about these binary floats exactly, or about
        every weight vector in ``weight_bounds``.
    reach : int
        p >= 1.
    roots : array_like of float
        Approximate roots, ascending (all S of them for a full certificate).
    errors : array_like of float, optional
        Error estimates; the first intervals have half-width ``max(8 * error, 64 eps y)``.
    weight_bounds : (array, array), optional
        Lower and upper ends of an interval holding each exact weight (e.g. ``c**2`` rounded).
    indices : array_like of int, optional
        Position of each given root among all S (ascending); by default the largest ones.
    widenings : int
        Times an interval without a sign change is widened (by 4, never past 0.45 of the
        distance to a neighbour) before it is reported as failed.
    max_precision : int
        Largest arb precision (bits) tried for a sign the float64 intervals leave undecided.

    Returns
    -------
    RootResult
        ``values`` the interval midpoints, ``error_bounds`` their half-widths (rounded up),
        ``rigorous`` True only when all S roots were given and every interval is proved to
        hold exactly one root.  ``details``: ``lower``, ``upper``, ``sign_change`` (bool per
        interval: it holds an odd number of roots), ``precision`` (largest bits used).

    Raises
    ------
    ValueError
        Weights not finite and > 0, roots not finite, positive and strictly ascending.

    References
    ----------
    R. E. Moore, R. B. Kearfott and M. J. Cloud, Introduction to Interval Analysis, SIAM
    (2009); F. Johansson, IEEE Trans. Comput. 66, 1281 (2017) (arb ball arithmetic).

    Examples
    --------
    >>> enc = certify_chain_roots([1.0, 1.0], 1, [0.5])  # P_2 = 1 - 2y
    >>> enc.rigorous, bool(abs(enc.values[0] - 0.5) <= enc.error_bounds[0])
    (True, True)
    """
    w, p = check_chain_weights(weights, reach)
    wlo, whi = _weight_box(w, weight_bounds)
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
    precision, evaluations, rounds = 53, 0, 0
    todo = np.arange(y.size)
    for attempt in range(widenings + 1):
        lower[todo], upper[todo] = y[todo] - half[todo], y[todo] + half[todo]
        ends = np.concatenate([lower[todo], upper[todo]])
        signs, used = _signs(wlo, whi, p, ends, max_precision)
        precision, evaluations, rounds = (
            max(precision, used),
            evaluations + 2 * todo.size,
            rounds + 1,
        )
        change[todo] = (signs[: todo.size] * signs[todo.size :]) < 0
        todo = todo[~change[todo]]
        if todo.size == 0 or attempt == widenings:
            break
        half[todo] = np.minimum(4.0 * half[todo], room[todo])
    disjoint = bool(lower[0] > 0 and np.all(upper[:-1] < lower[1:]))
    certified = bool(np.all(change)) and disjoint and y.size == total
    if certified:
        message = f"all {total} roots isolated: {total} disjoint sign changes, degree {total}"
    elif not np.all(change):
        message = (
            f"NOT certified: {int((~change).sum())} of {y.size} intervals show no certified "
            "sign change"
        )
    else:
        message = (
            f"NOT a full certificate: {y.size} of {total} roots given; each interval holds an "
            "odd number of roots"
            if disjoint
            else "NOT certified: intervals overlap"
        )
    mid = 0.5 * lower + 0.5 * upper
    radius = np.maximum(upper - mid, mid - lower) * (1.0 + 4 * _EPS)
    return RootResult(
        values=mid,
        error_bounds=radius,
        variable="y",
        rigorous=certified,
        converged=bool(np.all(change)),
        message=message,
        method="chain-certified",
        evaluations=evaluations,
        count=total,
        iterations=rounds,
        indices=np.arange(total - y.size, total) if indices is None else indices,
        details={"lower": lower, "upper": upper, "sign_change": change, "precision": precision},
    )


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


def certified_roots(
    coefficients: Any, *, precision: int = 106, max_precision: int = 8192
) -> RootResult:
    """Isolating balls for every complex root of a polynomial with exact coefficients.

    Parameters
    ----------
    coefficients : sequence of int, Fraction, fmpq
        Constant term first.  The polynomial must not be constant.
    precision : int
        Starting working precision in bits; the balls are refined at least to it.
    max_precision : int
        Largest working precision tried (doubling from ``precision``): a bounded search.

    Returns
    -------
    RootResult
        ``variable="y"``, method ``"exact-certified"``, ``rigorous=True``; ``values`` the ball
        midpoints (complex, each root repeated by its multiplicity), ``error_bounds`` proved
        bounds on ``|root - midpoint|`` (the float rounding of the midpoint included);
        ``details["multiplicities"]`` per value, ``details["precision"]`` bits.

    Raises
    ------
    ValueError
        A coefficient that is not exact, a constant polynomial, or roots that cannot be
        isolated within ``max_precision`` bits (roots closer than about ``2**-max_precision``
        relative); the message says which.

    Notes
    -----
    Squarefree factorisation over the rationals (python-flint ``fmpq_poly.factor_squarefree``,
    exact), then ``acb_poly.roots`` on each factor, which returns balls proved to be disjoint
    and to hold one root each.  Practical up to a few hundred degrees.

    References
    ----------
    F. Johansson, IEEE Trans. Comput. 66, 1281 (2017).

    Examples
    --------
    >>> r = certified_roots([1, -3, 1])  # 1 - 3y + y**2, roots (3 -+ sqrt 5) / 2
    >>> np.allclose(sorted(r.values.real), [(3 - 5**0.5) / 2, (3 + 5**0.5) / 2])
    True
    """
    coeffs = [_to_fmpq(c, j) for j, c in enumerate(coefficients)]
    poly = flint.fmpq_poly(coeffs)
    if poly.degree() < 1:
        raise ValueError("the polynomial is constant: it has no roots to isolate")
    mids: list[complex] = []
    radii: list[float] = []
    mult: list[int] = []
    used = int(precision)
    for factor, exponent in poly.factor_squarefree()[1]:
        balls, bits = _isolate(factor, int(precision), int(max_precision))
        used = max(used, bits)
        for ball in balls:
            re, im = float(ball.real.mid()), float(ball.imag.mid())
            rad = float(abs(flint.acb(ball.real.rad(), ball.imag.rad())).upper())
            # outward: the ball's own radius, the float rounding of both midpoint parts
            radius = rad * (1 + 4 * _EPS) + (abs(re) + abs(im)) * _EPS
            for _ in range(int(exponent)):
                mids.append(complex(re, im))
                radii.append(radius)
                mult.append(int(exponent))
    order = np.argsort(np.abs(np.asarray(mids)), kind="stable")
    return RootResult(
        values=np.asarray(mids, dtype=np.complex128)[order],
        error_bounds=np.asarray(radii)[order],
        variable="y",
        rigorous=True,
        converged=True,
        message=f"{len(mids)} roots isolated in certified balls ({used} bits)",
        method="exact-certified",
        evaluations=0,
        count=len(mids),
        details={"multiplicities": np.asarray(mult, dtype=np.int64)[order], "precision": used},
    )


def _isolate(factor: Any, precision: int, max_precision: int) -> tuple[list[Any], int]:
    """``acb_poly.roots`` of one squarefree factor, doubling the precision up to the limit."""
    saved = flint.ctx.prec
    prec = precision
    try:
        while True:
            flint.ctx.prec = prec
            try:
                return list(flint.acb_poly(factor).roots(maxprec=prec)), prec
            except ValueError as exc:
                if 2 * prec > max_precision:
                    raise ValueError(
                        f"the {factor.degree()} roots of a factor of the exact polynomial could "
                        f"not be isolated within {max_precision} bits (roots closer than about "
                        f"2**-{max_precision} relative, e.g. couplings of very different "
                        f"magnitudes): {exc}"
                    ) from exc
                prec *= 2
    finally:
        flint.ctx.prec = saved
