"""Rigorous root enclosures: interval sign tests on the chain recurrence, certified isolation.

API
---
``certify_chain_roots(weights, reach, roots, errors=None, *, weight_bounds=None) -> RootTable``
    Proves that each interval ``[lower_k, upper_k]`` around ``roots[k]`` holds exactly one root
    of the chain polynomial ``P_M``, by certified sign changes of ``P_M`` plus the known root
    count ``S``.  ``variable="y"``, method ``"chain-certified"``; ``rigorous`` is True only
    when every interval is proved; ``details`` holds ``lower``, ``upper``, ``sign_change``.
``certified_roots(coefficients, imag=None) -> RootTable``
    The one certified isolation of exact polynomials: all complex roots of an exact
    coefficient list (int / Fraction / fmpq, real and optional imaginary parts; constant term
    first), as isolating balls (python-flint ``acb_poly.roots`` on each squarefree factor, at
    a precision doubled until it succeeds); method ``"exact-certified"``, distinct values
    with ``multiplicities``.  ``ExclusionPolynomial.roots`` and
    ``roots.complex.certified_complex_roots`` are entry points to it.

The chain certificate
---------------------
``P_M`` has degree exactly ``S`` for positive weights (its top coefficient is a sum of
positive products).  If ``S`` pairwise disjoint intervals each show a certified sign change of
``P_M`` at their two ends, each holds an odd number of roots, hence exactly one.  The sign of
``P_M(y)`` comes from the linear recurrence

    P_k = P_{k-1} - y w_k P_{k-p-1},      P_k = 1 for k <= 0,

run in float64 with every rounding error bounded (and every weight an interval, so that the
rounding of ``w = c^N`` is covered too), in compiled code (numba) over all end points at once,
O(M) per end point.  Plain interval arithmetic on this recurrence, or on the ratios
``P_k / P_{k-1}``, forgets how the p + 1 values of the state are correlated (the wrapping
effect): the boxes were measured to widen about 1.26 times per step on random reach-2
chains, so that long chains could be decided only in arb at a precision growing with M.
Here the state is enclosed in a frame that turns with the recurrence (Lohner's method): the
state is ``c + A e + delta``, a float64 centre, a basis ``A`` carried along by the
recurrence, a box of coefficients ``e`` and a box ``delta`` collecting the bounded rounding
errors; every 6 steps ``A`` is re-orthogonalised (Gram-Schmidt) and the boxes are moved into
the new basis through a proved bound on the inverse of the computed orthogonal factor.  The
enclosure then grows like the recurrence itself, and the end points at the first distance
(eight error estimates, at least 64 ulps) are decided for most roots at 10^4 terms.  The
state is balanced first by exact powers of two (``Q_k = P_k / 2**(e k)``, so that the
coefficients are near 1 when ``y w`` is large), and where ``y w`` is large the frame is
orthonormal relative to each component's size (the recurrence then splits into p + 1
interleaved sequences of very different sizes).  For reach 1 the ratios
``r_k = P_k / P_{k-1} = 1 - y w_k / r_{k-1}`` are tried first as outward-rounded float64
intervals: each step is a monotone function of one interval, so they stay at rounding level
wherever the ratio map contracts, tighter than the frame for the largest roots.  An
undecided end point (too close to the root for the rounding errors accumulated along the
chain) makes its interval widen (by 4, never past 0.45 of the distance to a neighbour) and be
tested again; intervals still undecided go to the linear recurrence in python-flint arb balls
at doubling precision (bounded work); an interval that never shows a sign change is reported,
never passed.  Nothing here uses the root-count property of ``roots.chain_count_below``.

References
----------
R. E. Moore, R. B. Kearfott and M. J. Cloud, Introduction to Interval Analysis, SIAM (2009)
(outward-rounded interval arithmetic).  R. J. Lohner, "Enclosing the solutions of ordinary
initial and boundary value problems", in Computer Arithmetic, Teubner (1987), 255-286 (the
moving orthogonal frame against the wrapping effect).  F. Johansson, "Arb: efficient
arbitrary-precision midpoint-radius interval arithmetic", IEEE Trans. Comput. 66, 1281 (2017).
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from fractions import Fraction
from typing import TYPE_CHECKING, Any

import numpy as np

from ..base.lazy import njit, prange
from .real import chain_root_count, check_chain_weights
from .result import RootTable

if TYPE_CHECKING:
    import flint
    import sympy
else:
    from ..base.lazy import flint, sympy

__all__ = ["certified_roots", "certify_chain_roots"]

_EPS = float(np.finfo(np.float64).eps)


_DOWN = 1.0 - 2.0**-51  # v * _DOWN rounds below the exact value that v approximates
_UP = 1.0 + 2.0**-51
_SMALL = 2.0**-960  # ratio magnitudes below this count as undecided (far from underflow)
_LANES = 64  # points that share one compiled task
_ARB_WORK = 2e8  # largest (points x terms x bits) the arb fallback may take


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


_FOLD = 6  # steps between two re-orthogonalisations of the enclosure's basis
_SLACK = 1.0 + 64.0 * _EPS  # covers the rounding of the operations of each error bound
_FLOOR = 2.0**-1000  # absolute floor on every error bound (values stay near 1 by rescaling)
_SUB = 2.0**-1060  # above the absolute rounding error of a result in the subnormal range
_RESCALE = 2.0**300
_ROWSPAN = 2.0**-30  # largest ratio of two row scales (large y w only)


@njit(cache=True, boundscheck=False, error_model="numpy")
def _frame_block(
    wlo: np.ndarray,
    whi: np.ndarray,
    p: int,
    log2_w: float,
    ys: np.ndarray,
    start: int,
    out: np.ndarray,
) -> None:  # pragma: no cover - compiled
    """Signs of ``P_M`` at ``ys[start:start + _LANES]``: the linear recurrence enclosed in a
    moving orthonormal frame (Lohner's method), for every weight vector in the box.

    The state ``v = (P_k, ..., P_{k-p})`` is enclosed as ``c + A e + delta`` with ``e`` in the
    box ``|e_i| <= rho_i`` and ``|delta_i| <= d_i``.  A step ``v' = T v`` (one new row,
    ``P_k = P_{k-1} - a_k P_{k-p-1}``, ``a_k = y w_k`` an interval) keeps ``c`` and ``A``
    in float64 and adds every rounding error, bounded, to ``d``.  Every ``_FOLD`` steps the
    frame is re-orthogonalised relative to the size of each component: with ``S`` the
    diagonal of powers of two that bring ``c`` near 1 (exact), ``S A = Q R`` (Gram-Schmidt in
    float64), ``G = Q^T`` and
    ``F = G Q - I`` with ``||F||_inf <= f < 1/4`` bounded, so that
    ``Q^{-1} = (I + F)^{-1} G``; the new basis is ``S^{-1} Q`` and
    ``e' = Q^{-1} S (A e + delta)`` lies in the box ``x + f / (1 - f) max(x)`` with
    ``x = |G S A| rho + |G| S d``.  The box then turns with the
    recurrence instead of wrapping it coordinate by coordinate, so it grows like the
    recurrence itself.  Rows of ``A``, ``c`` and ``d`` are kept in a ring (the row of
    ``P_{k-p-1}`` becomes the row of ``P_k``); ``c``, ``rho`` and ``d`` are rescaled by exact
    powers of two.  A point whose box reaches 0 at the end, or whose frame check fails, is
    undecided (0).
    """
    n = p + 1
    nl = _LANES
    n_pts = min(nl, ys.size - start)
    y = np.empty(nl)
    mu = np.empty(nl)
    shrink = np.empty(nl)
    span = np.empty(nl)
    c = np.empty((n, nl))
    a_mat = np.zeros((n, n, nl))
    rho = np.zeros((n, nl))
    d = np.zeros((n, nl))
    q = np.empty((n, n, nl))
    scl = np.empty((n, nl))
    x = np.empty((n, nl))
    f = np.empty(nl)
    acc = np.empty(nl)
    dab = np.empty(nl)
    top = np.empty(nl)
    am = np.empty(nl)
    ar = np.empty(nl)
    failed = np.zeros(nl)
    for j in range(nl):
        y[j] = ys[start + min(j, n_pts - 1)]
        if not y[j] > 0.0:
            failed[j] = 1.0  # the outward rounding of a_k below assumes y > 0
            y[j] = 1.0
        # balance: Q_k = P_k / 2**(e k) obeys Q_k = 2**-e Q_{k-1} - a_k 2**(-e (p+1)) Q_{k-p-1},
        # with coefficients near 1 when y w is large (exact scalings; the sign is that of P)
        e = max(0, int(np.round((np.log2(y[j]) + log2_w) / n)))
        mu[j] = 2.0**-e
        shrink[j] = 2.0 ** (-e * n)
        # rows scaled apart only where the balanced recurrence splits into p + 1 interleaved
        # sequences of very different sizes (large y w); elsewhere one scale measured better
        span[j] = _ROWSPAN if e >= 2 else 1.0
        for i in range(n):  # Q_{-i} = 2**(e i): slot (-i) % n holds Q_{-i}, slot 0 is Q_0
            c[(n - i) % n, j] = 2.0 ** (e * i)
            a_mat[i, i, j] = 1.0
    head = 0  # ring slot of P_{k-1}; slot (head + 1) % n holds P_{k-p-1}
    for k in range(wlo.size):
        old = (head + 1) % n
        for j in range(nl):
            a_lo = y[j] * wlo[k] * shrink[j] * _DOWN  # y > 0 and w > 0 (checked)
            a_hi = y[j] * whi[k] * shrink[j] * _UP
            am[j] = 0.5 * (a_lo + a_hi)
            ar[j] = max(a_hi - am[j], am[j] - a_lo) * _UP + _FLOOR
            t = am[j] * c[old, j]
            cn = mu[j] * c[head, j] - t
            acc[j] = (abs(cn) + abs(t)) * _EPS + ar[j] * abs(c[old, j])  # rounding errors
            dab[j] = cn
        for col in range(n):
            for j in range(nl):
                tj = am[j] * a_mat[old, col, j]
                mj = mu[j] * a_mat[head, col, j] - tj
                bound = (abs(mj) + abs(tj)) * _EPS + ar[j] * abs(a_mat[old, col, j]) + _SUB
                acc[j] += bound * rho[col, j]
                a_mat[old, col, j] = mj
        for j in range(nl):
            d[old, j] = (mu[j] * d[head, j] + (am[j] + ar[j]) * d[old, j] + acc[j] * _SLACK) * (
                _SLACK
            ) + _FLOOR
            c[old, j] = dab[j]
        head = old
        if (k + 1) % _FOLD != 0 and k + 1 != wlo.size:
            continue
        # rescale c, rho, d by an exact power of two (exact unless a component underflows:
        # _FLOOR covers that), then fold the boxes into a new frame
        for j in range(nl):
            big = 0.0
            for i in range(n):
                big = max(big, abs(c[i, j]))
            g = 1.0
            if big > _RESCALE:
                g = 1.0 / _RESCALE
            elif big < 1.0 / _RESCALE:
                g = _RESCALE
            top[j] = big * g
            for i in range(n):
                c[i, j] *= g
                rho[i, j] = rho[i, j] * g + _FLOOR
                d[i, j] = d[i, j] * g + _FLOOR
        # row scales: powers of two that bring every component of c near 1 (exact)
        for i in range(n):
            for j in range(nl):
                mag = max(abs(c[i, j]), top[j] * span[j])
                scl[i, j] = 2.0 ** -int(np.floor(np.log2(mag))) if mag > 0.0 else 1.0
                d[i, j] = d[i, j] * scl[i, j] + _FLOOR
                for col in range(n):
                    a_mat[i, col, j] *= scl[i, j]
        # Q from modified Gram-Schmidt on the columns of S A
        for col in range(n):
            for i in range(n):
                for j in range(nl):
                    q[i, col, j] = a_mat[i, col, j]
            for prev in range(col):
                acc[:] = 0.0
                for i in range(n):
                    for j in range(nl):
                        acc[j] += q[i, prev, j] * q[i, col, j]
                for i in range(n):
                    for j in range(nl):
                        q[i, col, j] -= acc[j] * q[i, prev, j]
            acc[:] = 0.0
            for i in range(n):
                for j in range(nl):
                    acc[j] += q[i, col, j] * q[i, col, j]
            for j in range(nl):
                acc[j] = 1.0 / np.sqrt(acc[j])
            for i in range(n):
                for j in range(nl):
                    q[i, col, j] *= acc[j]
        # f >= ||Q^T Q - I||_inf, rounding of the products included
        x[:, :] = 0.0  # row sums of |Q^T Q - I| (symmetric: each pair once)
        for r in range(n):
            for col in range(r, n):
                acc[:] = 0.0
                dab[:] = 0.0
                for i in range(n):
                    for j in range(nl):
                        acc[j] += q[i, r, j] * q[i, col, j]
                        dab[j] += abs(q[i, r, j] * q[i, col, j])
                for j in range(nl):
                    dot = acc[j] - 1.0 if r == col else acc[j]
                    bound = abs(dot) + (n + 1) * _EPS * dab[j] + n * _SUB
                    x[r, j] += bound
                    if col != r:
                        x[col, j] += bound
        f[:] = 0.0
        for r in range(n):
            for j in range(nl):
                f[j] = max(f[j], x[r, j])
        for j in range(nl):
            f[j] *= _SLACK
            if not f[j] < 0.25:
                failed[j] = 1.0
                f[j] = 0.0  # keep the arithmetic finite; the point is reported undecided
        # x = |Q^T S A| rho + |Q^T| S d, rounding of the products included
        for r in range(n):
            x[r, :] = 0.0
            for col in range(n):
                acc[:] = 0.0
                dab[:] = 0.0
                for i in range(n):
                    for j in range(nl):
                        acc[j] += q[i, r, j] * a_mat[i, col, j]
                        dab[j] += abs(q[i, r, j] * a_mat[i, col, j])
                for j in range(nl):
                    x[r, j] += (abs(acc[j]) + (n + 1) * _EPS * dab[j] + n * _SUB) * rho[col, j]
            for i in range(n):
                for j in range(nl):
                    x[r, j] += (abs(q[i, r, j]) * d[i, j] + _SUB) * (1.0 + (n + 1) * _EPS)
        for j in range(nl):
            big = 0.0
            for r in range(n):
                x[r, j] *= _SLACK
                big = max(big, x[r, j])
            top[j] = big * (f[j] / (1.0 - f[j])) * _SLACK
        for r in range(n):
            for j in range(nl):
                rho[r, j] = (x[r, j] + top[j]) * _SLACK + _FLOOR
                for col in range(n):
                    a_mat[r, col, j] = q[r, col, j] / scl[r, j]
        for j in range(nl):  # S^-1 Q is exact unless an entry falls below 2**-1022
            acc[j] = 0.0
            for col in range(n):
                acc[j] += rho[col, j]
            for r in range(n):
                d[r, j] = acc[j] * _SUB * _SLACK + _FLOOR
    for j in range(n_pts):
        # P_M in c[head] + (A e)[head] + delta[head]
        rad = 0.0
        for col in range(n):
            rad += abs(a_mat[head, col, j]) * rho[col, j]
        rad = (rad * (1.0 + (n + 1) * _EPS) + d[head, j]) * _SLACK + _FLOOR
        value = c[head, j]
        if failed[j] != 0.0 or not (np.isfinite(rad) and np.isfinite(value)) or abs(value) <= rad:
            out[start + j] = 0
        else:
            out[start + j] = 1 if value > 0.0 else -1


@njit(cache=True, parallel=True)
def _frame_signs(
    wlo: np.ndarray, whi: np.ndarray, p: int, ys: np.ndarray
) -> np.ndarray:  # pragma: no cover - compiled
    out = np.zeros(ys.size, dtype=np.int64)
    log2_w = np.mean(np.log2(wlo))
    for b in prange((ys.size + _LANES - 1) // _LANES):
        _frame_block(wlo, whi, p, log2_w, ys, b * _LANES, out)
    return out


def _float_signs(wlo: np.ndarray, whi: np.ndarray, p: int, ys: np.ndarray) -> np.ndarray:
    """Certified signs of ``P_M`` at ``ys`` in float64 (0 where undecided).

    Reach 1: the ratio intervals first (each step monotone in one interval: tight), the frame
    for what they leave; reach p >= 2: the frame (ratio boxes wrap).
    """
    ys = np.ascontiguousarray(ys, dtype=np.float64)
    if p > 1:
        return _frame_signs(wlo, whi, p, ys)
    signs = _interval_signs(wlo, whi, p, ys)
    todo = np.nonzero(signs == 0)[0]
    if todo.size:
        signs[todo] = _frame_signs(wlo, whi, p, ys[todo])
    return signs


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
) -> RootTable:
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
        distance to a neighbour) before the arb fallback, then the report as failed.
    max_precision : int
        Largest arb precision (bits) of the fallback for intervals the float64 enclosures
        leave undecided after all widenings.

    Returns
    -------
    RootTable
        ``values`` the interval midpoints, ``error_bounds`` their half-widths (rounded up),
        ``rigorous`` True only when all S roots were given and every interval is proved to
        hold exactly one root.  ``details``: ``lower``, ``upper``, ``sign_change`` (bool per
        interval: it holds an odd number of roots), ``precision`` (largest bits used: 53
        unless the arb fallback ran).

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
        signs = _float_signs(wlo, whi, p, np.concatenate([lower[todo], upper[todo]]))
        evaluations, rounds = evaluations + 2 * todo.size, rounds + 1
        change[todo] = (signs[: todo.size] * signs[todo.size :]) < 0
        todo = todo[~change[todo]]
        if todo.size == 0 or attempt == widenings:
            break
        half[todo] = np.minimum(4.0 * half[todo], room[todo])
    # Last resort for the few intervals left (e.g. roots too close to widen): the linear
    # recurrence in arb balls at doubling precision; bounded work, else they stay reported.
    prec = 64
    while todo.size and prec <= max_precision and todo.size * w.size * prec <= _ARB_WORK:
        ends = np.concatenate([lower[todo], upper[todo]])
        signs = _arb_signs(wlo, whi, p, ends, prec, power_of)
        precision, evaluations, rounds = prec, evaluations + 2 * todo.size, rounds + 1
        change[todo] = (signs[: todo.size] * signs[todo.size :]) < 0
        todo = todo[~change[todo]]
        prec *= 2
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
    return RootTable(
        values=mid,
        error_bounds=radius,
        variable="y",
        rigorous=certified,
        converged=bool(np.all(change)),
        message=message,
        method="chain-certified",
        evaluations=evaluations,
        count=total,
        sweeps=rounds,
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
    coefficients: Sequence[Any],
    imag: Sequence[Any] | None = None,
    *,
    tolerance: float | None = None,
    precision: int = 106,
    max_precision: int = 8192,
    variable: str = "y",
) -> RootTable:
    """Isolating balls for every complex root of a polynomial with exact coefficients.

    The one certified isolation of the library: :meth:`freeladder.ExclusionPolynomial.roots`,
    :func:`freeladder.roots.certified_complex_roots` and the ``"exact-certified"`` root
    method all come here.

    Parameters
    ----------
    coefficients : sequence of int, Fraction, fmpq
        Constant term first (the real parts when ``imag`` is given).  The polynomial must not
        be constant.
    imag : sequence of int, Fraction, fmpq, optional
        Imaginary parts of the coefficients (Gaussian rationals); None for real ones.
    tolerance : float, optional
        Absolute radius the balls are refined to (at most ``2**-precision`` in any case).
    precision : int
        Starting working precision in bits (at least twice the coefficients' bit size plus
        64 is used).
    max_precision : int
        Largest precision tried (doubling from the start) before giving up.
    variable : str
        The name of the variable, for messages.

    Returns
    -------
    RootTable
        ``variable="y"``, method ``"exact-certified"``, ``rigorous=True``; ``values`` the
        distinct roots (ball midpoints rounded to float64, ordered by modulus, then argument),
        ``multiplicities`` how often each counts (:meth:`RootTable.repeated` lists each root
        as often), ``error_bounds`` proved bounds on the distance from each value to its
        root, ``count`` the degree, ``details["precision"]`` the bits used.

    Raises
    ------
    ValueError
        A coefficient that is not exact, the zero or a constant polynomial, or roots that
        cannot be isolated within
        ``max_precision`` bits (roots closer than about ``2**-max_precision`` relative); the
        message says which.

    Notes
    -----
    Rational coefficients are split into squarefree factors exactly (python-flint
    ``fmpq_poly.factor_squarefree``), so multiplicities are found.  Gaussian-rational
    coefficients are first tested for squarefreeness modulo primes ``p = 1 mod 4`` (where
    ``i`` is an integer mod p): a polynomial that keeps its degree and is squarefree mod p is
    squarefree over Q(i) (a repeated factor would survive the reduction), which settles the
    usual case in O(n^2) word operations; otherwise sympy splits it over Q(i) (``sqf_list``
    on the Gaussian integers; seconds from degree about 40 with large coefficients).  Each
    squarefree factor goes to ``acb_poly.roots``, which
    returns balls proved to be disjoint and to hold one root each, at a precision doubled
    until it succeeds.  The error bound of a value is an upper bound, computed in ball
    arithmetic, on the distance from the float64 value to any point of its ball.  Practical up
    to a few hundred degrees.

    References
    ----------
    F. Johansson, "Arb: efficient arbitrary-precision midpoint-radius interval arithmetic",
    IEEE Trans. Comput. 66, 1281 (2017).

    Examples
    --------
    >>> r = certified_roots([1, -3, 1])  # 1 - 3y + y**2, roots (3 -+ sqrt 5) / 2
    >>> np.allclose(r.values.real, [(3 - 5**0.5) / 2, (3 + 5**0.5) / 2])
    True
    >>> certified_roots([1, -2, 1]).multiplicities  # (1 - y)**2
    array([2])
    >>> certified_roots([1, -2, 0], [0, -2, 2]).multiplicities  # (1 - (1 + i) y)**2
    array([2])
    """
    re_q = [_to_fmpq(c, j) for j, c in enumerate(coefficients)]
    im_q = (
        [flint.fmpq(0)] * len(re_q)
        if imag is None
        else [_to_fmpq(c, j) for j, c in enumerate(imag)]
    )
    if len(im_q) != len(re_q):
        raise ValueError("the real and imaginary coefficient lists differ in length")
    while re_q and re_q[-1] == 0 and im_q[-1] == 0:
        re_q.pop()
        im_q.pop()
    if not re_q:
        raise ValueError(f"the zero polynomial in {variable} has no isolated roots")
    if len(re_q) == 1:
        raise ValueError(f"the polynomial in {variable} is constant: it has no roots to isolate")
    bits = max(max(int(c.p).bit_length(), int(c.q).bit_length()) for c in (*re_q, *im_q))
    start = max(int(precision), 2 * bits + 64)
    tol = 2.0 ** -int(precision)  # balls at least this tight, rounded to float64 afterwards
    if tolerance is not None:
        tol = min(tol, float(tolerance))
    pieces: list[tuple[Any, int]]  # (acb_poly-ready coefficients, multiplicity)
    if all(c == 0 for c in im_q):
        pieces = [
            (factor, int(exponent))
            for factor, exponent in flint.fmpq_poly(re_q).factor_squarefree()[1]
        ]
    else:
        pieces = _gaussian_squarefree(re_q, im_q)
    mids: list[complex] = []
    radii: list[float] = []
    mult: list[int] = []
    used = start
    for piece, exponent in pieces:
        balls, bits_used = _isolate(piece, start, int(max_precision), tol, variable)
        used = max(used, bits_used)
        for ball in balls:
            mid = complex(float(ball.real.mid()), float(ball.imag.mid()))
            mids.append(mid)
            radii.append(_distance_bound(ball, mid))
            mult.append(exponent)
    values = np.asarray(mids, dtype=np.complex128)
    order = np.lexsort((np.angle(values), np.abs(values)))
    degree = int(sum(mult))
    return RootTable(
        values=values[order],
        error_bounds=np.asarray(radii)[order],
        multiplicities=np.asarray(mult, dtype=np.int64)[order],
        variable="y",
        rigorous=True,
        converged=True,
        message=(
            f"{degree} roots ({len(mids)} distinct) isolated in certified balls ({used} bits)"
        ),
        method="exact-certified",
        evaluations=0,
        count=degree,
        indices=(np.cumsum(mult) - np.asarray(mult))[order],
        details={"precision": used},
    )


# primes p = 1 mod 4 with a square root of -1 mod p, for the modular squarefree test
_MODULAR = tuple(
    (p, next(r for g in range(2, 64) if (r := pow(g, (p - 1) // 4, p)) * r % p == p - 1))
    for p in (1_000_000_009, 998_244_353)
)


def _squarefree_mod(re_q: list[Any], im_q: list[Any], p: int, s: int) -> bool:
    """True when ``sum (re + i im) y^k`` keeps its degree and is squarefree modulo ``p``, with
    ``i = s`` (``s^2 = -1 mod p``): then it is squarefree over Q(i).  False proves nothing."""
    coeffs = []
    for a, b in zip(re_q, im_q, strict=True):
        den = int(a.q) * int(b.q)
        if den % p == 0:
            return False
        num = int(a.p) * int(b.q) + s * int(b.p) * int(a.q)
        coeffs.append(num * pow(den, -1, p) % p)
    if coeffs[-1] == 0:
        return False
    f = flint.nmod_poly(coeffs, p)
    return bool(f.gcd(f.derivative()).degree() == 0)


def _gaussian_squarefree(re_q: list[Any], im_q: list[Any]) -> list[tuple[Any, int]]:
    """Squarefree factors over Q(i), each as ``[(re, im), ...]`` ascending, with multiplicity.

    The modular test (:func:`_squarefree_mod`) answers "squarefree" in almost every case;
    when two primes both fail it, sympy's ``sqf_list`` over the Gaussian integers splits the
    polynomial exactly (denominators cleared first).
    """
    if any(_squarefree_mod(re_q, im_q, p, s) for p, s in _MODULAR):
        return [(list(zip(re_q, im_q, strict=True)), 1)]
    scale = 1
    for c in (*re_q, *im_q):
        scale = scale * int(c.q) // math.gcd(scale, int(c.q))
    zz = sympy.ZZ_I
    coeffs = [
        zz(int(a.p) * (scale // int(a.q)), int(b.p) * (scale // int(b.q)))
        for a, b in zip(re_q, im_q, strict=True)
    ]
    y = sympy.Symbol("y")
    _, factors = sympy.Poly(coeffs[::-1], y, domain=zz).sqf_list()
    out: list[tuple[Any, int]] = []
    for factor, k in factors:
        if factor.degree() < 1:
            continue
        asc = factor.rep.to_list()[::-1]
        out.append(([(flint.fmpq(int(c.x)), flint.fmpq(int(c.y))) for c in asc], int(k)))
    return out


def _distance_bound(ball: Any, mid: complex) -> float:
    """Upper bound (float, rounded up) on ``|z - mid|`` over the ball ``z``."""
    dist = abs(ball - flint.acb(mid.real, mid.imag)).upper()
    return float(np.nextafter(float(dist), np.inf)) * (1.0 + 2.0 * _EPS)


def _isolate(
    piece: Any, precision: int, max_precision: int, tol: float, variable: str
) -> tuple[list[Any], int]:
    """``acb_poly.roots`` of one squarefree piece, doubling the precision up to the limit."""
    saved = flint.ctx.prec
    prec = precision
    degree = piece.degree() if isinstance(piece, flint.fmpq_poly) else len(piece) - 1
    try:
        while True:
            flint.ctx.prec = prec
            poly = (
                flint.acb_poly(piece)
                if isinstance(piece, flint.fmpq_poly)
                else flint.acb_poly([flint.acb(flint.arb(a), flint.arb(b)) for a, b in piece])
            )
            try:
                return list(poly.roots(tol=tol, maxprec=prec)), prec
            except ValueError as exc:
                if 2 * prec > max_precision:
                    raise ValueError(
                        f"the {degree} roots of the polynomial in {variable} (or of a "
                        f"squarefree factor) could not be isolated within {max_precision} bits: "
                        "a repeated root of a polynomial with complex coefficients, or roots "
                        f"closer than about 2**-{max_precision} relative (e.g. couplings of "
                        f"very different magnitudes): {exc}"
                    ) from exc
                prec *= 2
    finally:
        flint.ctx.prec = saved
