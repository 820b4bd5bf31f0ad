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

evaluated in interval arithmetic at FIXED working precision: float64, each ``1 / r_k`` kept
as a sign and a magnitude interval, every bound rounded outward by ``2**-51`` relative
(round-to-nearest is off by at most ``2**-53``, so each interval provably holds the exact
value; magnitudes below ``2**-960`` count as undecided, away from underflow), in compiled
code (numba) over 64 end points per pass, O(M) per end point.  For reach 1 each step is a
monotone function of one interval, so the enclosure stays at rounding level wherever the
exact ratio map contracts; an end point too close to the root (closer than the rounding
error amplified along the chain) stays undecided, and widening the interval decides it.
For reach p >= 2 the p previous ratios are enclosed by a box that forgets their correlation
(the wrapping effect): the width was measured to grow by about 1.26 per step on random
reach-2 chains, so most end points of long chains stay undecided in float64.  Those go to
the linear recurrence ``P_k = P_{k-1} - y w_k P_{k-p-1}`` in python-flint arb balls,
doubling the precision from 64 bits up to ``max_precision`` (the precision needed grows with
M: this part does not scale).  Still undecided (for reach 1 at once), an interval is widened
(by 4, never past 0.45 of the distance to a neighbour) and tested again; an interval that
never shows a sign change is reported, never passed.  Nothing here uses the root-count
property of ``roots.chain_count_below``.
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

from ..base.lazy import njit, prange
from .real import chain_root_count, check_chain_weights
from .result import RootResult

__all__ = ["certified_roots", "certify_chain_roots"]

_EPS = float(np.finfo(np.float64).eps)


_DOWN = 1.0 - 2.0**-51  # v * _DOWN rounds below the exact value that v approximates
_UP = 1.0 + 2.0**-51
_SMALL = 2.0**-960  # magnitudes below this count as undecided (far from underflow)
_LANES = 64  # points that share one pass over the chain


@njit(cache=True, boundscheck=False, error_model="numpy")
def _interval_block(
    wlo: np.ndarray, whi: np.ndarray, p: int, ys: np.ndarray, start: int, out: np.ndarray
) -> None:  # pragma: no cover - compiled
    """Signs of ``P_M`` at ``ys[start:start + _LANES]`` for every weight vector in the box.

    Each ratio ``r_k`` is an interval that excludes 0 (else the point is undecided), so each
    ``1 / r_k`` is kept as a sign and a magnitude interval ``[lo, hi]``, ``lo > 0``.  For a
    positive float v that approximates x to within ``2**-53`` relative (one rounding to
    nearest), ``RN(v (1 - 2**-51)) < x < RN(v (1 + 2**-51))``; all bounds are rounded that way.
    """
    n = min(_LANES, ys.size - start)
    y = np.empty(_LANES)
    for j in range(_LANES):
        y[j] = ys[start + min(j, n - 1)]
    sgn = np.ones((p, _LANES))
    mlo = np.ones((p, _LANES))
    mhi = np.ones((p, _LANES))
    negative = np.zeros(_LANES)
    bad = np.zeros(_LANES)
    for k in range(wlo.size):
        a_lo, a_hi = wlo[k], whi[k]
        slot = k % p
        for j in range(_LANES):
            # |s| = y w / |r_{k-1} ... r_{k-p}|; a result below _SMALL may be subnormal (only
            # absolutely accurate): clamp the lower bound to 0 and the upper bound to _SMALL.
            s_sign = 1.0
            s_lo = y[j] * a_lo * _DOWN
            s_hi = max(y[j] * a_hi * _UP, _SMALL)
            for i in range(p):
                s_sign *= sgn[i, j]
                s_lo = s_lo * mlo[i, j] * _DOWN if s_lo >= _SMALL else 0.0
                s_hi = max(s_hi * mhi[i, j] * _UP, _SMALL)
            s_lo = s_lo if s_lo >= _SMALL else 0.0
            if s_sign > 0.0:
                r_lo, r_hi = 1.0 - s_hi, 1.0 - s_lo
            else:
                r_lo, r_hi = 1.0 + s_lo, 1.0 + s_hi
            # outward rounding of the difference / sum (sign-aware)
            r_lo = r_lo * _DOWN if r_lo > 0.0 else r_lo * _UP
            r_hi = r_hi * _UP if r_hi > 0.0 else r_hi * _DOWN
            small = min(abs(r_lo), abs(r_hi))
            large = max(abs(r_lo), abs(r_hi))
            ok = (r_lo > 0.0 or r_hi < 0.0) and small > _SMALL and large < 1.0 / _SMALL
            if not ok:
                bad[j] = 1.0
                small, large = 1.0, 1.0
            negative[j] += 1.0 if r_hi < 0.0 else 0.0
            sgn[slot, j] = 1.0 if r_lo > 0.0 else -1.0
            mlo[slot, j] = (1.0 / large) * _DOWN
            mhi[slot, j] = (1.0 / small) * _UP
    for j in range(n):
        if bad[j] != 0.0:
            out[start + j] = 0
        else:
            out[start + j] = -1 if int(negative[j]) % 2 else 1


@njit(cache=True, parallel=True)
def _interval_signs(
    wlo: np.ndarray, whi: np.ndarray, p: int, ys: np.ndarray
) -> np.ndarray:  # pragma: no cover - compiled
    out = np.zeros(ys.size, dtype=np.int64)
    for b in prange((ys.size + _LANES - 1) // _LANES):
        _interval_block(wlo, whi, p, ys, b * _LANES, out)
    return out


def _arb_signs(
    wlo: np.ndarray,
    whi: np.ndarray,
    p: int,
    ys: np.ndarray,
    prec: int,
    power_of: tuple[np.ndarray, int] | None,
) -> np.ndarray:
    """Signs of ``P_M`` at ``ys`` from the linear recurrence in arb balls at ``prec`` bits.

    The weights are the balls ``c_j**N`` when ``power_of = (c, N)`` is given (exact binary
    floats c), else balls holding ``[wlo, whi]``.
    """
    saved = flint.ctx.prec
    flint.ctx.prec = prec
    try:
        if power_of is not None:
            wa = [flint.arb(float(cj)) ** int(power_of[1]) for cj in power_of[0]]
        else:
            wa = [
                flint.arb(float(lo))
                if lo == hi
                else flint.arb(float(lo)).union(flint.arb(float(hi)))
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
    wlo: np.ndarray,
    whi: np.ndarray,
    p: int,
    ys: np.ndarray,
    max_precision: int,
    power_of: tuple[np.ndarray, int] | None,
) -> tuple[np.ndarray, int]:
    """Certified signs of ``P_M`` at ``ys``: float64 intervals on the ratios, then arb.

    Returns the signs (0 where still undecided) and the largest precision used (bits).
    """
    signs = _interval_signs(wlo, whi, p, np.ascontiguousarray(ys, dtype=np.float64))
    precision = 53
    prec = 64
    while prec <= max_precision:
        todo = np.nonzero(signs == 0)[0]
        if todo.size == 0 or p == 1:
            break  # reach 1: widening decides them much faster than the Python loop
        precision = prec
        signs[todo] = _arb_signs(wlo, whi, p, ys[todo], prec, power_of)
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
    power_of: tuple[Any, int] | None = None,
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
    power_of : (array, int), optional
        ``(c, N)``: the exact weights are ``c_j**N`` of these binary floats (``weight_bounds``
        must hold them); the arb stage then uses them exactly instead of the bounds.
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
    if power_of is not None:
        base = np.ascontiguousarray(power_of[0], dtype=np.float64)
        if base.shape != w.shape or not np.all(np.isfinite(base)):
            raise ValueError("power_of must hold one finite coupling per weight")
        power_of = (base, int(power_of[1]))
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
        signs, used = _signs(wlo, whi, p, ends, max_precision, power_of)
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
                return list(flint.acb_poly(factor).roots(tol=2.0**-precision, maxprec=prec)), prec
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
