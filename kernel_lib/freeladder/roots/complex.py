"""Complex roots of chain polynomials: Aberth-Ehrlich iteration on the ratio recurrence.

For complex couplings (any N), or N > 2 with complex ``w_j = c_j^N``, the roots of the chain
polynomial leave the real axis.  Expanded coefficients are useless in floating point beyond a
few dozen terms, so everything here evaluates the polynomial through its recurrence along an
ordering of the terms in which the earlier neighbours of position k are exactly the positions
``k - back[k] .. k - 1`` (an indifference ordering; a chain of fixed reach p has
``back[k] = min(p, k)``):

    P_k(y) = P_{k-1}(y) - y w_k P_{k - back[k] - 1}(y),      P_j = 1 for j < 0.

The roots are returned as ``x_k = 1 / y_k = eta_k^N``, the roots of the monic reversed
polynomial ``Q(x) = x^n P(1/x)`` (``n = deg P``, the independence number of the ordering).

Evaluation
----------
With the ratios ``r_k = P_k / P_{k-1}`` and ``L_k = P_k' / P_k``,

    r_k = 1 - s_k,   s_k = y w_k / (r_{k-1} ... r_{k-back[k]}),
    L_k = (L_{k-1} - s_k (1/y + L_{k-back[k]-1})) / r_k,

so one O(M) pass gives ``Q'/Q = n y - y^2 L`` (the Newton correction), ``log|P|`` and the
phase of ``P`` (running product of the ratios, renormalised), and ``log(P~/|P|)`` where
``P~(|y|)`` is the same recurrence with ``+|y| |w_k|``: the sum of the moduli of all the
monomials (its ratio to ``|P|`` measures the cancellation).  A running estimate of the
relative rounding error of ``P`` rides along: local errors with pseudo-random unit phases,
propagated by the linearised recurrence (times 4; an estimate, not a bound).  Nothing
overflows.  A zero ratio (a root of an intermediate ``P_k``, frequent at the roots of the
pieces below) is replaced by ``-2**-300`` as in :mod:`freeladder.roots.real`.  The pass is
compiled (numba): 16 points on one piece share the loop over the terms, blocks are split
over the cores, in calls of bounded length so that KeyboardInterrupt is seen.

Iteration
---------
All roots: divide and conquer along the ordering.  Cutting the ordering at a position c
(dropping the edges across the cut) leaves two pieces whose polynomials multiply to an
approximation of the whole; when their degrees add up, the roots of the pieces are a start for
the whole.  Physically the modes of a disordered chain are localised, so most roots of the
pieces are already roots of the whole to many digits and only the modes near the cut move.
Pieces are cut down to degree 1, whose root ``sum w`` is exact (``Q = x - sum w``); a piece
that no cut splits starts from a circle.  Every level is one batched Aberth-Ehrlich iteration
over all its pieces (pairwise sums only within a piece).  A root stops being updated once its
correction is below ``4 u |x|``, or once ``|P|`` is below its estimated rounding error and
the correction no longer shrinks; its position still enters the corrections of the others.
Measured (tests/benchmarks/bench_complex.py): the whole costs 2.3 to 4.4 sweeps over all
roots on random Z3 chains of 10^3 and 10^4 terms.  When it ends with roots not converged or
discs not isolated, the iteration is run once more from Aberth's classic start (all roots on
one circle about the centroid): the divide and conquer can stall where pieces hand it equal
starts on points at which the recurrence has zero ratios (the Ising chain at field i, whose
partial weight sums cancel: up to 300 sites the restart converges, at 1000 it does not).
Repeated roots (exceptional points) stall both; :func:`freeladder.roots.solve_chain` then
solves the exact polynomial.

Lowest roots: ``lowest=k`` wants the k smallest ``|x|`` (the k smallest ``|eta|``).  A circle
``|x| = rho`` holding j roots, k <= j <= 2k + 4 or so, is found by counting roots with the
argument principle on the recurrence (the winding of ``Q`` along the circle, sampled
adaptively), stepping the radius by factors 8 and then bisecting.  Approximations start in
the annuli between the counted circles, as many in each as the counts differ, and are refined
by the Aberth iteration restricted to them (implicit deflation by each other); when fewer than
j of them end inside the circle, more start inside, deflated by those found.  The result is
accepted when j lie inside the circle with pairwise disjoint Newton discs
``|x - z| <= n |Q(z) / Q'(z)|`` (each holds at least one root: rigorous in exact arithmetic)
and no disc meets the circle.  Then each disc holds exactly one root and these are all the
roots inside the circle, so the k smallest found are the k smallest roots.  The count is
computed in floating point from sampled phases (refined until neighbouring samples differ by
less than pi/4): an estimate, not a proof; so is every error bound here (``rigorous=False``).
When the check fails, every root is computed instead.

References
----------
O. Aberth, Math. Comp. 27, 339 (1973); L. W. Ehrlich, Commun. ACM 10, 107 (1967)
(the simultaneous iteration).  D. A. Bini, Numer. Algorithms 13, 179 (1996) and D. A. Bini and
L. Robol, J. Comput. Appl. Math. 272, 276 (2014) (per-root stopping when the value drops
below its rounding-error bound; inclusion discs).  D. Braess and K. P. Hadeler,
Numer. Math. 21, 161 (1973) and C. Carstensen, Linear Algebra Appl. 151, 215 (1991)
(the Weierstrass/Gerschgorin inclusion: every root lies in the union of the discs
``|x - z_i| <= n |W_i|``, and a connected component of k discs holds exactly k roots).
P. Henrici, Applied and Computational Complex Analysis, vol. 1, Wiley (1974), sections 4.6
and 6.4 (the Newton inclusion disc ``n |Q / Q'|``; the argument principle).  J. J. M. Cuppen,
Numer. Math. 36, 177 (1981) (divide and conquer by cutting a chain, for tridiagonal
eigenproblems).  R. L. Mann, S. J. Elman, D. R. Wood and A. Chapman, arXiv:2408.09684 (2024)
(the recurrence along an oriented indifference ordering).
"""

from __future__ import annotations

from collections.abc import Callable, Sequence
from fractions import Fraction
from typing import Any, NamedTuple

import numpy as np

from ..base.lazy import njit, prange
from .certify import certified_roots
from .real import chain_back, chain_root_count
from .result import RootTable

__all__ = [
    "ChainValues",
    "aberth_chain_roots",
    "certified_complex_roots",
    "evaluate_chain",
    "inclusion_radii",
]

_U = float(np.finfo(float).eps) / 2
_TINY = 2.0**-300  # a ratio that is exactly zero is replaced by this (as in roots.py)
_XZERO = 2.0**-200  # a point x = 0 is evaluated here (the weights are scaled to |w| <= 1)
_START_OFF_ZERO = 2.0**-20  # where an iteration starts instead of x = 0 (scaled units)
_HUGE = 2.0**200  # renormalisation thresholds of the running products
_LANES = 16  # points per block of the compiled pass
_STEPS_PER_CALL = 2e7  # chain steps x points per compiled call: keeps Ctrl-C responsive
_PARALLEL_STEPS = 3e5  # below this, one core is faster than waking the thread pool
_PAIRS_PER_CALL = 5e7
_SAFETY = 4.0  # factor on the statistical rounding-error estimate

ProgressCallback = Callable[[int, int, int], Any]


# -- compiled kernels ----------------------------------------------------------------------------
@njit(cache=True, boundscheck=False, error_model="numpy")
def _block(
    w, aw, back, width, lo, hi, deg, x, first, size, noise, g, log_abs, phase, log_cond, rel
):  # type: ignore[no-untyped-def]  # pragma: no cover - compiled
    """One pass over terms ``lo .. hi - 1`` for the points ``x[first : first + size]``.

    Writes ``Q'/Q``, ``log|P|``, ``P/|P|``, ``log(P~/|P|)`` and ``|e|``, the running estimate
    of the relative rounding error of ``P``: the local errors ``noise[k]`` (pseudo-random
    unit phases times the unit roundoff) propagated by the linearised recurrence
    ``e_k = (e_{k-1} - s_k e_{k-back-1}) / r_k + noise_k (1 + |s_k|) / |r_k|``.  The
    ``_LANES`` points of a block share the loop over the terms (independent work for the
    processor to overlap); a ratio of modulus below ``2**-300`` (a zero of an intermediate
    ``P_k``, frequent at the roots of the pieces) is replaced by ``-2**-300``, as in
    :mod:`freeladder.roots.real`.  Real arithmetic throughout (real and imaginary parts apart).
    """
    xr = np.empty(_LANES)
    xi = np.empty(_LANES)
    yr = np.empty(_LANES)
    yi = np.empty(_LANES)
    ay = np.empty(_LANES)
    for j in range(_LANES):
        v = x[first + min(j, size - 1)]
        if v.real == 0.0 and v.imag == 0.0:  # x = 0 (eta = 0: P lost degree), y = 1/x finite
            v = complex(_XZERO, 0.0)
        xr[j] = v.real
        xi[j] = v.imag
        y = 1.0 / v
        yr[j] = y.real
        yi[j] = y.imag
        ay[j] = abs(y)
    irr = np.ones((width, _LANES))
    iri = np.zeros((width, _LANES))
    irt = np.ones((width, _LANES))
    lr = np.zeros((width, _LANES))
    li = np.zeros((width, _LANES))
    er = np.zeros((width, _LANES))
    ei = np.zeros((width, _LANES))
    phr = np.ones(_LANES)
    phi = np.zeros(_LANES)
    la = np.zeros(_LANES)
    acc = np.ones(_LANES)
    lt = np.zeros(_LANES)
    pr = np.empty(_LANES)
    pi = np.empty(_LANES)
    pt = np.empty(_LANES)
    cur = width - 1
    for k in range(lo, hi):
        t = k - lo
        b = min(back[k], t)
        prev = cur
        cur = cur + 1 if cur + 1 < width else 0
        for j in range(_LANES):
            pr[j] = 1.0
            pi[j] = 0.0
            pt[j] = 1.0
        slot = prev
        for _ in range(b):
            for j in range(_LANES):
                a_r = pr[j] * irr[slot, j] - pi[j] * iri[slot, j]
                pi[j] = pr[j] * iri[slot, j] + pi[j] * irr[slot, j]
                pr[j] = a_r
                pt[j] *= irt[slot, j]
            slot = slot - 1 if slot > 0 else width - 1
        far = slot
        wr = w[k].real
        wi = w[k].imag
        awk = aw[k]
        nk = noise[k]
        nr = nk.real
        ni = nk.imag
        for j in range(_LANES):
            ywr = yr[j] * wr - yi[j] * wi
            ywi = yr[j] * wi + yi[j] * wr
            sr = ywr * pr[j] - ywi * pi[j]
            si = ywr * pi[j] + ywi * pr[j]
            rr = 1.0 - sr
            ri = -si
            d2 = rr * rr + ri * ri
            if d2 < _TINY * _TINY:  # P_k = 0 here (often exactly, at a root of a piece)
                rr = -_TINY
                ri = 0.0
                d2 = _TINY * _TINY
            ir_r = rr / d2
            ir_i = -ri / d2
            rt = 1.0 + ay[j] * awk * pt[j]
            # L
            ar = xr[j] + lr[far, j]
            ai = xi[j] + li[far, j]
            tr = lr[prev, j] - (sr * ar - si * ai)
            ti = li[prev, j] - (sr * ai + si * ar)
            lr[cur, j] = tr * ir_r - ti * ir_i
            li[cur, j] = tr * ir_i + ti * ir_r
            # error
            sz = (1.0 + abs(sr) + abs(si)) * (abs(ir_r) + abs(ir_i))
            tr = er[prev, j] - (sr * er[far, j] - si * ei[far, j])
            ti = ei[prev, j] - (sr * ei[far, j] + si * er[far, j])
            er[cur, j] = tr * ir_r - ti * ir_i + nr * sz
            ei[cur, j] = tr * ir_i + ti * ir_r + ni * sz
            irr[cur, j] = ir_r
            iri[cur, j] = ir_i
            irt[cur, j] = 1.0 / rt
            a_r = phr[j] * rr - phi[j] * ri
            phi[j] = phr[j] * ri + phi[j] * rr
            phr[j] = a_r
            acc[j] *= rt
        for j in range(_LANES):
            m1 = abs(phr[j]) + abs(phi[j])
            if m1 > _HUGE or m1 < 1.0 / _HUGE:
                m = np.hypot(phr[j], phi[j])
                la[j] += np.log(m)
                phr[j] /= m
                phi[j] /= m
            if acc[j] > _HUGE:
                lt[j] += np.log(acc[j])
                acc[j] = 1.0
    for j in range(size):
        m = np.hypot(phr[j], phi[j])
        lab = la[j] + np.log(m)
        yv = complex(yr[j], yi[j])
        gl = complex(lr[cur, j], li[cur, j])
        g[first + j] = deg * yv - yv * yv * gl
        log_abs[first + j] = lab
        phase[first + j] = complex(phr[j] / m, phi[j] / m)
        log_cond[first + j] = lt[j] + np.log(acc[j]) - lab
        rel[first + j] = np.hypot(er[cur, j], ei[cur, j])


@njit(cache=True, parallel=True)
def _blocks_parallel(
    w, aw, back, width, lo, hi, deg, x, starts, sizes, noise, g, log_abs, phase, log_cond, rel
):  # type: ignore[no-untyped-def]  # pragma: no cover - compiled
    """:func:`_block` for every block of points, split over the cores."""
    for q in prange(starts.size):
        f = starts[q]
        _block(
            w,
            aw,
            back,
            width,
            lo[f],
            hi[f],
            deg[f],
            x,
            f,
            sizes[q],
            noise,
            g,
            log_abs,
            phase,
            log_cond,
            rel,
        )


@njit(cache=True)
def _blocks_serial(
    w, aw, back, width, lo, hi, deg, x, starts, sizes, noise, g, log_abs, phase, log_cond, rel
):  # type: ignore[no-untyped-def]  # pragma: no cover - compiled
    """:func:`_block` for every block on one core (small jobs: no thread start-up).

    A copy of :func:`_blocks_parallel` on purpose: numba's on-disk cache is keyed by the
    Python function and not by the ``parallel`` flag.
    """
    for q in range(starts.size):
        f = starts[q]
        _block(
            w,
            aw,
            back,
            width,
            lo[f],
            hi[f],
            deg[f],
            x,
            f,
            sizes[q],
            noise,
            g,
            log_abs,
            phase,
            log_cond,
            rel,
        )


@njit(cache=True, boundscheck=False, error_model="numpy")
def _pair_row(
    z: np.ndarray, i: int, a: int, b: int, logs: bool
) -> complex:  # pragma: no cover - compiled
    """``sum_{a <= j < b, j != i} 1 / (z_i - z_j)``, or ``sum log|z_i - z_j|`` when ``logs``."""
    zr, zi = z[i].real, z[i].imag
    sr = 0.0
    si = 0.0
    for j in range(a, b):
        dr = zr - z[j].real
        di = zi - z[j].imag
        d2 = dr * dr + di * di
        if j == i:
            continue
        if logs:
            sr += 0.5 * np.log(d2)
        else:
            sr += dr / d2
            si -= di / d2
    return complex(sr, si)


@njit(cache=True, parallel=True)
def _pairs_parallel(z, seg_lo, seg_hi, rows, logs, out):  # type: ignore[no-untyped-def]  # pragma: no cover - compiled
    """:func:`_pair_row` for every row, split over the cores."""
    for t in prange(rows.size):
        i = rows[t]
        out[t] = _pair_row(z, i, seg_lo[i], seg_hi[i], logs)


@njit(cache=True)
def _pairs_serial(z, seg_lo, seg_hi, rows, logs, out):  # type: ignore[no-untyped-def]  # pragma: no cover - compiled
    """:func:`_pair_row` for every row on one core (twin of :func:`_pairs_parallel`)."""
    for t in range(rows.size):
        i = rows[t]
        out[t] = _pair_row(z, i, seg_lo[i], seg_hi[i], logs)


@njit(cache=True)
def _overlaps_sorted(
    z: np.ndarray, radius: np.ndarray, piece: np.ndarray, order: np.ndarray
) -> np.ndarray:  # pragma: no cover - compiled
    """True where the disc ``|x - z_i| <= r_i`` meets another disc of its piece.

    ``order`` sorts by piece, then by real part: the scan for partners of a disc stops at the
    first disc further right than its radius plus the largest radius.
    """
    out = np.zeros(z.size, dtype=np.bool_)
    top = radius.max() if radius.size else 0.0
    for a in range(order.size):
        i = order[a]
        for b in range(a + 1, order.size):
            j = order[b]
            if piece[j] != piece[i] or z[j].real - z[i].real > radius[i] + top:
                break
            if abs(z[i] - z[j]) <= radius[i] + radius[j]:
                out[i] = True
                out[j] = True
    return out


def _overlaps(z: np.ndarray, radius: np.ndarray, seg_lo: np.ndarray) -> np.ndarray:
    """True where a disc meets another disc of its piece (pieces by their first index)."""
    order = np.lexsort((z.real, seg_lo))
    return _overlaps_sorted(z, radius, np.ascontiguousarray(seg_lo), order)


@njit(cache=True)
def _degrees(back: np.ndarray, lo: int, hi: int) -> np.ndarray:  # pragma: no cover - compiled
    """``deg P`` of the terms ``lo .. k`` for k = lo .. hi - 1 (independence numbers).

    ``deg P_k = max(deg P_{k-1}, deg P_{k - back[k] - 1} + 1)``: generic weights (for complex
    weights the leading coefficients can cancel only on a set of measure zero).
    """
    out = np.zeros(hi - lo + 1, dtype=np.int64)  # out[t + 1] = degree of lo .. lo + t
    for k in range(lo, hi):
        t = k - lo
        b = min(back[k], t)
        out[t + 1] = max(out[t], out[t - b] + 1)
    return out[1:]


# -- the chain -----------------------------------------------------------------------------------
class ChainValues(NamedTuple):
    """Values of the reversed chain polynomial ``Q(x) = x^n P(1/x)`` at points ``x``.

    Attributes
    ----------
    dlog : ndarray of complex
        ``Q'(x) / Q(x)`` (the Newton correction is its reciprocal).
    log_abs : ndarray of float
        ``log |Q(x)|``.
    phase : ndarray of complex
        ``Q(x) / |Q(x)|``.
    log_cond : ndarray of float
        ``log(P~(|y|) / |P(y)|)``, ``y = 1 / x``: the sum of the moduli of the monomials of
        ``P`` over ``|P|`` (its reciprocal is the backward error of a root: the residual on
        the recurrence).
    rel_err : ndarray of float
        Estimated relative rounding error of the computed ``Q`` (local errors with
        pseudo-random phases propagated through the recurrence, times 4; an estimate, not a
        bound).
    """

    dlog: np.ndarray
    log_abs: np.ndarray
    phase: np.ndarray
    log_cond: np.ndarray
    rel_err: np.ndarray


class _Chain:
    """Weights (non-zero, scaled), back-reaches and the model order N, ready for the kernels."""

    def __init__(self, w: np.ndarray, back: np.ndarray, order: int):
        keep = w != 0
        if not np.all(keep):
            # a term with weight 0 drops out: re-count each kept term's earlier kept neighbours
            kept_before = np.concatenate([[0], np.cumsum(keep)])
            k = np.arange(w.size)
            back = (kept_before[k] - kept_before[k - back])[keep]
            w = w[keep]
        self.w = np.ascontiguousarray(w, dtype=np.complex128)
        self.aw = np.abs(self.w)
        self.back = np.ascontiguousarray(back, dtype=np.int64)
        self.width = int(self.back.max(initial=0)) + 2
        self.order = int(order)
        self.m = self.w.size
        self.steps = 0  # chain steps x points evaluated so far
        # Local rounding errors enter with pseudo-random unit phases and are propagated by the
        # linearised recurrence, so |e| estimates sqrt(sum_j |G_j e_j|^2) for the true
        # propagation (Green's function G_j); moduli throughout would overestimate
        # exponentially (N. J. Higham, Accuracy and Stability of Numerical Algorithms, 2nd ed.,
        # SIAM (2002), section 5.1, running error bounds; the phases make it an estimate).
        rng = np.random.default_rng(12345)
        local = (8.0 + self.order) * _U  # complex multiply-adds and the N-th power in w_j
        self.noise_phases = local * np.exp(2j * np.pi * rng.random(self.m))

    def degrees(self, lo: int, hi: int) -> np.ndarray:
        return _degrees(self.back, lo, hi)

    def evaluate(
        self, x: np.ndarray, lo: np.ndarray, hi: np.ndarray, deg: np.ndarray
    ) -> tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray, np.ndarray]:
        """``Q'/Q``, ``log|P|``, ``P/|P|``, ``log(P~/|P|)`` and the estimated relative
        rounding error of ``P`` (safety factor included) at each x on its piece ``lo:hi``."""
        x = np.ascontiguousarray(x, dtype=np.complex128)
        lo = np.ascontiguousarray(lo, dtype=np.int64)
        hi = np.ascontiguousarray(hi, dtype=np.int64)
        deg = np.ascontiguousarray(deg, dtype=np.int64)
        n = x.size
        g = np.empty(n, dtype=np.complex128)
        log_abs = np.empty(n)
        phase = np.empty(n, dtype=np.complex128)
        log_cond = np.empty(n)
        rel = np.empty(n)
        self.steps += int(np.sum(hi - lo))
        if n == 0:
            return g, log_abs, phase, log_cond, rel
        # blocks of at most _LANES consecutive points on one piece
        change = np.nonzero((lo[1:] != lo[:-1]) | (hi[1:] != hi[:-1]) | (deg[1:] != deg[:-1]))[0]
        run_lo = np.concatenate([[0], change + 1])
        run_hi = np.concatenate([change + 1, [n]])
        count = (run_hi - run_lo + _LANES - 1) // _LANES
        first = np.cumsum(count) - count
        block = np.arange(int(count.sum()))
        starts = np.repeat(run_lo, count) + _LANES * (block - np.repeat(first, count))
        sizes = np.minimum(_LANES, np.repeat(run_hi, count) - starts)
        cum = np.concatenate([[0], np.cumsum(_LANES * (hi - lo)[starts])])
        a = 0
        while a < starts.size:
            b = int(np.searchsorted(cum, cum[a] + _STEPS_PER_CALL, side="right")) - 1
            b = min(starts.size, max(b, a + 1))
            parallel = b - a > 1 and cum[b] - cum[a] > _PARALLEL_STEPS
            kernel = _blocks_parallel if parallel else _blocks_serial
            kernel(
                self.w, self.aw, self.back, self.width, lo, hi, deg, x, starts[a:b],
                sizes[a:b], self.noise_phases, g, log_abs, phase, log_cond, rel,
            )  # fmt: skip
            a = b
        return g, log_abs, phase, log_cond, _SAFETY * rel


def _pair_sums(
    z: np.ndarray, seg_lo: np.ndarray, seg_hi: np.ndarray, rows: np.ndarray, logs: bool
) -> np.ndarray:
    """Per row i: ``sum 1 / (z_i - z_j)`` (complex) or ``sum log|z_i - z_j|`` (real part) over
    the other roots j of its piece, in compiled calls of bounded length."""
    out = np.empty(rows.size, dtype=np.complex128)
    if rows.size == 0:
        return out
    width = seg_hi[rows] - seg_lo[rows]
    cum = np.concatenate([[0], np.cumsum(width)])
    a = 0
    while a < rows.size:
        b = int(np.searchsorted(cum, cum[a] + _PAIRS_PER_CALL, side="right")) - 1
        b = min(rows.size, max(b, a + 1))
        kernel = _pairs_parallel if cum[b] - cum[a] > _PARALLEL_STEPS else _pairs_serial
        kernel(z, seg_lo, seg_hi, np.ascontiguousarray(rows[a:b]), logs, out[a:b])
        a = b
    return out


class _Pieces(NamedTuple):
    """Per root: its piece in the root array (``seg_lo:seg_hi``) and in the chain (``lo:hi``)."""

    seg_lo: np.ndarray
    seg_hi: np.ndarray
    lo: np.ndarray
    hi: np.ndarray
    deg: np.ndarray


def _pieces(ch: _Chain, bounds: Sequence[tuple[int, int, int]]) -> _Pieces:
    """Per-root arrays for pieces ``(lo, hi, degree)`` laid out one after another."""
    degs = np.array([d for _, _, d in bounds], dtype=np.int64)
    starts = np.concatenate([[0], np.cumsum(degs)])
    rep = np.repeat(np.arange(len(bounds)), degs)
    lo = np.array([a for a, _, _ in bounds], dtype=np.int64)
    hi = np.array([b for _, b, _ in bounds], dtype=np.int64)
    return _Pieces(starts[:-1][rep], starts[1:][rep], lo[rep], hi[rep], degs[rep])


class _Values:
    """The last evaluation at each root (``valid`` while the root has not moved since)."""

    def __init__(self, size: int):
        self.g = np.zeros(size, dtype=np.complex128)
        self.log_abs = np.zeros(size)
        self.log_cond = np.zeros(size)
        self.rel = np.zeros(size)
        self.valid = np.zeros(size, dtype=bool)

    def store(self, idx: np.ndarray, values: tuple[np.ndarray, ...]) -> None:
        self.g[idx], self.log_abs[idx], _, self.log_cond[idx], self.rel[idx] = values
        self.valid[idx] = True

    def refresh(self, ch: _Chain, z: np.ndarray, pc: _Pieces) -> None:
        """Evaluate where the stored values are stale."""
        idx = np.nonzero(~self.valid)[0]
        if idx.size:
            self.store(idx, ch.evaluate(z[idx], pc.lo[idx], pc.hi[idx], pc.deg[idx]))


def _aberth(
    ch: _Chain,
    z: np.ndarray,
    pc: _Pieces,
    active: np.ndarray,
    max_iter: int,
    progress: ProgressCallback | None,
    vals: _Values,
) -> tuple[np.ndarray, int, int]:
    """Aberth-Ehrlich sweeps on the active roots (in place); returns (converged, sweeps, evals).

    Every evaluation is kept in ``vals`` (a root that stops is not moved again, so its last
    evaluation is at its final place).

    A root stops when its correction is below ``4 u |z|``, or when ``|P|`` is below its
    estimated rounding error and the correction no longer shrinks (by a factor 4 per
    sweep; the last one is then not applied).  A root whose correction is not finite (it sits on
    another) is nudged by a relative ``1e-7`` and stays active.
    """
    converged = ~active
    active = active.copy()
    last = np.full(z.size, np.inf)
    sweeps = evaluations = 0
    total = int(active.sum())
    rng = np.random.default_rng(2024)
    while sweeps < max_iter and np.any(active):
        sweeps += 1
        idx = np.nonzero(active)[0]
        values = ch.evaluate(z[idx], pc.lo[idx], pc.hi[idx], pc.deg[idx])
        vals.store(idx, values)
        g, rel = values[0], values[4]
        evaluations += idx.size
        inv_sum = _pair_sums(z, pc.seg_lo, pc.seg_hi, idx, False)
        with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
            newton = 1.0 / g
            corr = newton / (1.0 - newton * inv_sum)
        bad = ~np.isfinite(corr)
        size = np.abs(corr)
        stuck = (rel >= 1.0) & (size > 0.25 * last[idx])
        small = size <= 4.0 * _U * np.abs(z[idx])
        done = (stuck | small) & ~bad
        last[idx] = size
        move = ~done & ~bad
        z[idx[move]] -= corr[move]
        vals.valid[idx[move | bad]] = False
        if np.any(bad):
            nb = int(bad.sum())
            z[idx[bad]] *= 1.0 + 1e-7 * np.exp(2j * np.pi * rng.random(nb))
        converged[idx[done]] = True
        active[idx[done]] = False
        if progress is not None:
            progress(sweeps, total - int(active.sum()), total)
    return converged, sweeps, evaluations


def _cut(ch: _Chain, lo: int, hi: int, degs: np.ndarray) -> int | None:
    """A cut position near the middle of ``lo:hi`` at which the degrees of the parts add up.

    ``degs[t]`` is the degree of ``lo .. lo + t``.  Tried in order of distance from the middle,
    at most ``2 width + 8`` positions.
    """
    mid = (lo + hi) // 2
    total = int(degs[-1])
    for off in range(2 * ch.width + 8):
        for c in (mid + off, mid - off - 1):
            if lo < c < hi:
                left = int(degs[c - lo - 1])
                if left >= 1 and left + int(ch.degrees(c, hi)[-1]) == total:
                    return c
    return None


def _levels(ch: _Chain) -> list[list[tuple[int, int, int]]]:
    """Pieces ``(lo, hi, degree)`` level by level, from the whole chain down to pieces of
    degree 1 (or pieces no cut splits with adding degrees)."""
    whole = ch.degrees(0, ch.m)
    levels = [[(0, ch.m, int(whole[-1]))]]
    while True:
        nxt: list[tuple[int, int, int]] = []
        for lo, hi, d in levels[-1]:
            if d >= 2:
                degs = ch.degrees(lo, hi)
                c = _cut(ch, lo, hi, degs)
                if c is not None:
                    left = int(degs[c - lo - 1])
                    nxt += [(lo, c, left), (c, hi, d - left)]
                    continue
            nxt.append((lo, hi, d))
        if len(nxt) == len(levels[-1]):
            return levels
        levels.append(nxt)


def _leaf_start(ch: _Chain, lo: int, hi: int, d: int) -> np.ndarray:
    """Start for a piece that is not cut: ``sum w`` for degree 1 (then the exact root:
    ``Q = x - sum w``), else a circle about the centroid ``sum w / d`` (Vieta) of radius the
    mean ``|w|``, angles offset to break symmetry."""
    centre = ch.w[lo:hi].sum() / d
    if d == 1:
        return np.array([centre])
    radius = float(ch.aw[lo:hi].mean())
    return centre + radius * np.exp(1j * (2 * np.pi * (np.arange(d) + 0.5) / d + 0.4))


def _circle_start(ch: _Chain, n: int) -> np.ndarray:
    """Aberth's classic start: n points on a circle about the centroid ``sum w / n`` of the
    roots of ``Q`` (Vieta), of radius the largest ``|w|`` times the widest neighbourhood
    (at least every ``|x|``: Gershgorin-like bound on the recurrence), angles offset."""
    centre = ch.w.sum() / n
    radius = float(ch.aw.max()) * (ch.width + 1)
    return centre + radius * np.exp(1j * (2 * np.pi * (np.arange(n) + 0.5) / n + 0.4))


def _all_roots(
    ch: _Chain, start: np.ndarray | None, max_iter: int, progress: ProgressCallback | None
) -> tuple[np.ndarray, np.ndarray, _Pieces, list[int], int, _Values]:
    """Every root by divide and conquer (or from ``start``); (z, converged, pieces, sweeps
    per level from the leaves up, evaluations, the last evaluation at each root)."""
    if start is not None:
        levels = [[(0, ch.m, int(start.size))]]
        z = start.copy()
    else:
        levels = _levels(ch)
        z = np.concatenate([_leaf_start(ch, *piece) for piece in levels[-1]])
    sweeps: list[int] = []
    evaluations = 0
    below: set[tuple[int, int, int]] = set()
    converged = np.ones(z.size, dtype=bool)  # roots of degree-1 leaves are exact
    for level in reversed(levels):
        pc = _pieces(ch, level)
        # roots of pieces that were not cut at this level are already converged
        fresh = np.repeat([p not in below for p in level], [d for _, _, d in level])
        if start is None and len(level) == len(levels[-1]):
            fresh = np.array([d > 1 for _, _, d in level]).repeat([d for _, _, d in level])
        # a leaf root x = 0 (its weights cancel) is a poor start: Q'/Q is singular there
        z[fresh & (z == 0)] = _START_OFF_ZERO * np.exp(0.4j)
        vals = _Values(z.size)
        conv, s, e = _aberth(ch, z, pc, fresh, max_iter, progress, vals)
        converged = np.where(fresh, conv, converged)
        sweeps.append(s)
        evaluations += e
        below = set(level)
    return z, converged, pc, sweeps, evaluations, vals


def _radii(
    ch: _Chain, z: np.ndarray, pc: _Pieces, vals: _Values
) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Weierstrass radii ``n |W_i|``, Newton radii ``n |Q / Q'|`` (both with the rounding-error
    estimate of ``Q`` added) and isolation of the Weierstrass discs, within each piece."""
    vals.refresh(ch, z, pc)
    g, log_abs_p, rel_err = vals.g, vals.log_abs, vals.rel
    n = pc.deg.astype(float)
    with np.errstate(divide="ignore"):  # a root x = 0 has radius 0
        log_q = n * np.log(np.abs(z)) + log_abs_p + np.log1p(rel_err)
    rows = np.arange(z.size)
    log_prod = _pair_sums(z, pc.seg_lo, pc.seg_hi, rows, True).real
    with np.errstate(divide="ignore", over="ignore"):
        radius = n * np.exp(log_q - log_prod)
        newton = n * (1.0 + rel_err) / np.abs(g)
    newton = np.where(np.isfinite(newton), newton, np.inf)
    radius = np.where(np.isfinite(radius), radius, np.inf)
    isolated = ~_overlaps(z, radius, pc.seg_lo)
    return radius, newton, isolated


def _count_inside(ch: _Chain, n: int, rho: float, limit: int) -> tuple[int | None, int]:
    """Number of roots of ``Q`` in ``|x| < rho`` by the argument principle; (count, evals).

    The phase of ``Q`` is sampled on the circle and refined until neighbouring samples differ
    by less than pi/4; -1 as soon as the phase seen so far turns more than ``limit`` times
    in total (many roots inside or near the circle: expensive to count, and more than
    wanted), or more than ``64 limit + 256`` samples would be needed; None when the circle
    passes through a root (``|P|`` at its rounding-error scale at a sample) or when the total
    is not near a whole number.  An estimate: a pair of roots closer to the circle than the
    sampling can miss.
    """
    theta = 2 * np.pi * np.arange(32) / 32
    phase = np.empty(0, dtype=complex)
    th_done = np.empty(0)
    new = theta
    evaluations = 0
    lo = np.zeros(1, dtype=np.int64)
    while True:
        x = rho * np.exp(1j * new)
        k = new.size
        _, _, ph, _, rel = ch.evaluate(x, np.repeat(lo, k), np.full(k, ch.m), np.full(k, n))
        evaluations += k
        if np.any(rel >= 0.5):
            return None, evaluations
        th_done = np.concatenate([th_done, new])
        phase = np.concatenate([phase, np.exp(1j * n * new) * ph])
        order = np.argsort(th_done, kind="stable")
        th_done, phase = th_done[order], phase[order]
        step = np.angle(np.roll(phase, -1) * np.conj(phase))
        wide = np.abs(step) > np.pi / 4
        if np.abs(step).sum() > 2 * np.pi * limit:
            return -1, evaluations
        if not np.any(wide):
            turns = step.sum() / (2 * np.pi)
            count = round(turns)
            return (count if abs(turns - count) < 0.1 else None), evaluations
        if th_done.size + int(wide.sum()) > 64 * limit + 256:
            return -1, evaluations
        nxt = np.append(th_done[1:], 2 * np.pi)
        new = 0.5 * (th_done + nxt)[wide]


def _lowest_roots(
    ch: _Chain, n: int, k: int, max_iter: int, progress: ProgressCallback | None
) -> tuple[np.ndarray, np.ndarray, str, bool, int, int] | None:
    """The k smallest ``|x|``; (values, radii, message, converged, sweeps, evals) or None when
    the verification fails (the caller then computes every root)."""
    extra = max(4, k)
    evaluations = 0
    # a circle holding between k and k + extra roots: steps by 8 in radius, then geometric
    # bisection (the first guess is the scale of the lowest mode of a uniform chain, 1 / M^2)
    rho = float(ch.aw.max()) / max(ch.m, 1) ** 2
    lo_r, hi_r = 0.0, np.inf
    count = None
    seen: dict[float, int] = {}  # radius -> count: the radial distribution of the moduli
    for _ in range(80):
        count, e = _count_inside(ch, n, rho, k + extra + 4)
        evaluations += e
        if count is None:
            rho *= 1.03
            continue
        if count >= 0:
            seen[rho] = count
        if k <= count <= k + extra:
            break
        if 0 <= count < k:
            lo_r = rho
        else:
            hi_r = rho
        if not np.isfinite(hi_r):
            rho *= 8.0
        elif lo_r == 0:
            rho /= 8.0
        else:
            rho = float(np.sqrt(lo_r * hi_r))
    else:
        return None
    if count is None or count < k:
        return None
    j = int(count)
    # starts: as many in each annulus between counted circles as the counts differ, spread
    # geometrically across it; in the innermost disc spread over decades downwards (the
    # lowest modes of a disordered chain spread over many orders of magnitude)
    # (up to the next counted circle outside, when it holds few more: approximations that
    # converge to roots just outside then keep the others from drifting there)
    outer = [t for t in seen if t > rho and seen[t] <= 3 * count + 8]
    last = min(outer) if outer else rho
    radii: list[float] = []
    inner, below = 0.0, 0
    for r in sorted(t for t in seen if t <= last):
        d = seen[r] - below
        if d > 0:
            if inner > 0:
                radii += list(np.geomspace(r, inner, d + 2)[1:-1])
            else:
                radii += list(0.5 * r * 0.03 ** np.arange(d))
        inner, below = r, seen[r]
    angles = 2 * np.pi * 0.6180339887498949 * np.arange(len(radii)) + 0.4
    z = np.array(radii) * np.exp(1j * angles)
    active = np.ones(z.size, dtype=bool)
    rng = np.random.default_rng(99)
    sweeps = 0
    for attempt in range(8):
        size = z.size
        pc = _Pieces(
            np.zeros(size, dtype=np.int64), np.full(size, size), np.zeros(size, dtype=np.int64),
            np.full(size, ch.m), np.full(size, n),
        )  # fmt: skip
        vals = _Values(size)
        conv, s, e = _aberth(ch, z, pc, active, max_iter, progress, vals)
        sweeps += s
        evaluations += e
        evaluations += int((~vals.valid).sum())
        vals.refresh(ch, z, pc)
        g, rel_err = vals.g, vals.rel
        with np.errstate(divide="ignore", over="ignore"):
            newton = n * (1.0 + rel_err) / np.abs(g)
        inside = np.abs(z) + newton < rho
        outside = np.abs(z) - newton > rho
        disjoint = not np.any(_overlaps(z, newton, pc.seg_lo))
        if not (np.all(conv) and disjoint and np.all(inside | outside)):
            return None
        missing = j - int(inside.sum())
        if missing == 0:
            break
        # a root inside the circle was missed (an approximation went to one outside): new
        # approximations start inside at random angles (at radii that change from attempt to
        # attempt), deflated by the roots found so far
        radius = rho * (0.05, 0.5, 0.9, 0.25)[attempt % 4]
        new = radius * np.exp(2j * np.pi * rng.random(missing + 2))
        z = np.concatenate([z, new])
        active = np.concatenate([np.zeros(size, dtype=bool), np.ones(new.size, dtype=bool)])
    else:
        return None
    found = np.nonzero(inside)[0]
    sort = found[np.lexsort((np.angle(z[found]), np.abs(z[found])))][:k]
    message = (
        f"the {k} smallest |x| of {n} roots, {sweeps} sweeps of the Aberth iteration restricted "
        f"to {z.size} approximations: the argument principle counts {j} roots in "
        f"|x| < {rho:.6g} (sampled phases: an estimate) and {j} found lie inside it in disjoint "
        f"Newton discs (each holds a root), so these are the smallest; error bounds are "
        "estimates"
    )
    return z[sort], newton[sort], message, True, sweeps, evaluations


def aberth_chain_roots(
    weights: Sequence[complex] | np.ndarray,
    reach: int | Sequence[int] | np.ndarray = 1,
    order: int = 2,
    start: np.ndarray | None = None,
    max_iter: int = 500,
    lowest: int | None = None,
    progress: ProgressCallback | None = None,
) -> RootTable:
    """Roots of a chain polynomial by the Aberth-Ehrlich iteration on its recurrence.

    Parameters
    ----------
    weights : sequence of complex, length M
        ``w_j = c_j^N`` in chain order.
    reach : int or 1-d int array
        A fixed reach p >= 1, or per position the back-reach ``back[k]`` (earlier neighbours
        exactly ``k - back[k] .. k - 1``; :func:`freeladder.roots.real.chain_back`).
    order : int
        N of the model (only for the rounding-error estimate).
    start : ndarray of complex, optional
        Starting values for all the ``x_k = 1 / y_k`` (then no divide and conquer).
    max_iter : int
        Maximum number of sweeps per level.
    lowest : int, optional
        Only the ``lowest`` smallest ``|x|`` (smallest ``|eta|``), by the restricted
        iteration and the count described in the module notes.  When that check fails,
        every root is computed and the smallest kept (the message says so; ``converged``
        then requires all the inclusion discs to be isolated).
    progress : callable, optional
        ``progress(sweep, roots_done, roots_active_at_start)`` after every sweep.

    Returns
    -------
    RootTable
        ``variable="x"`` (the reciprocal roots ``x_k = 1 / y_k = eta_k^N``, sorted by modulus),
        method ``"chain-aberth"``, ``rigorous=False``.  All roots: ``error_bounds`` are the
        inclusion radii ``n |W_k|`` (Weierstrass correction ``W_k = Q(x_k) / prod_{j != k}
        (x_k - x_j)`` with a rounding-error estimate of ``Q(x_k)`` added) -- in exact
        arithmetic the discs hold all roots and an isolated disc exactly one (Braess-Hadeler),
        in floating point they are estimates; ``converged`` is True when every root converged
        and every disc is isolated.  ``lowest=k``: the Newton radii ``n |Q / Q'|`` (estimates
        of the same kind), ``count`` is still the number of all roots.  ``sweeps`` is the
        number of sweeps (all levels).  ``details``: ``isolated``, ``root_converged``,
        ``newton_radius`` (all roots), ``sweeps_per_level`` (leaves first), ``chain_steps``
        (points x terms evaluated), ``max_residual`` (largest ``|P(y)| / P~(|y|)`` at the
        returned roots: the backward error relative to the moduli of the monomials, tiny
        where these cancel strongly), ``max_newton_step`` (largest relative Newton
        correction ``|Q / (x Q')|`` at the returned roots: the residual in the root's own
        scale), ``start`` (given, divide and conquer, or one circle after the divide and
        conquer stalled).

    Raises
    ------
    ValueError
        For empty, all-zero or non-finite weights, a bad reach, a wrong number of starting
        points or a bad ``lowest``.

    References
    ----------
    O. Aberth, Math. Comp. 27, 339 (1973); D. A. Bini, Numer. Algorithms 13, 179 (1996);
    D. Braess and K. P. Hadeler, Numer. Math. 21, 161 (1973); P. Henrici, Applied and
    Computational Complex Analysis, vol. 1, Wiley (1974).

    Examples
    --------
    >>> r = aberth_chain_roots([1.0, 1.0, 1.0])  # uniform Ising, 3 terms: x = 4 cos^2(pi k / 5)
    >>> [round(float(v), 12) for v in r.values.real]
    [0.38196601125, 2.61803398875]
    """
    w = np.asarray(weights, dtype=complex)
    if w.ndim != 1 or w.shape[0] == 0:
        raise ValueError("aberth_chain_roots needs a non-empty 1-d array of weights")
    if not np.all(np.isfinite(w)):
        bad = int(np.nonzero(~np.isfinite(w))[0][0])
        raise ValueError(f"weight {bad} is {w[bad]!r}, not finite")
    back = chain_back(reach, w.shape[0])
    top = float(np.abs(w).max())
    if top == 0:
        raise ValueError("every weight is zero: the polynomial is constant, no roots")
    if lowest is not None and (isinstance(lowest, bool) or int(lowest) != lowest or lowest < 1):
        raise ValueError(f"lowest must be a positive integer, got {lowest!r}")
    # Work with w / 2**e (exact; the roots scale with it), so that |x| = O(1).
    shift = int(np.frexp(top)[1])
    ch = _Chain(np.ldexp(w.real, -shift) + 1j * np.ldexp(w.imag, -shift), back, order)
    n = chain_root_count(ch.m, ch.back)
    z0 = None
    if start is not None:
        z0 = np.array(start, dtype=complex).ravel()
        if z0.shape != (n,):
            raise ValueError(f"{z0.size} starting points for {n} roots")
        z0 = np.ldexp(z0.real, -shift) + 1j * np.ldexp(z0.imag, -shift)
    scale = 2.0**shift

    if lowest is not None and int(lowest) < n and start is None:
        found = _lowest_roots(ch, n, int(lowest), max_iter, progress)
        if found is not None:
            z, radius, message, ok, n_sweeps, evaluations = found
            g, _, _, log_cond, _ = ch.evaluate(
                z, np.zeros(z.size, np.int64), np.full(z.size, ch.m), np.full(z.size, n)
            )
            return RootTable(
                values=scale * z,
                error_bounds=scale * radius,
                variable="x",
                rigorous=False,
                converged=ok,
                message=message,
                method="chain-aberth",
                evaluations=evaluations,
                count=n,
                sweeps=n_sweeps,
                indices=np.arange(z.size),
                details={
                    "chain_steps": ch.steps,
                    "max_residual": float(np.exp(-log_cond.min())),
                    "max_newton_step": _max_step(g, z),
                    "start": "circles inside the counted disc",
                },
            )
    z, conv, pc, sweeps, evaluations, vals = _all_roots(ch, z0, max_iter, progress)
    evaluations += int((~vals.valid).sum())
    radius, newton, isolated = _radii(ch, z, pc, vals)
    restarted = False
    if z0 is None and not (np.all(conv) and np.all(isolated)):
        # the divide and conquer can stall where pieces hand it equal starts on points at
        # which the recurrence has zero ratios (partial sums of the weights that cancel, as
        # in the Ising chain at field i); the classic start on one circle does not
        circle = _circle_start(ch, n)
        z2, conv2, pc2, sweeps2, evals2, vals2 = _all_roots(ch, circle, max_iter, progress)
        evaluations += evals2 + int((~vals2.valid).sum())
        radius2, newton2, isolated2 = _radii(ch, z2, pc2, vals2)
        sweeps = sweeps + sweeps2
        if np.all(conv2) and np.all(isolated2):
            z, conv, pc, vals, radius, newton, isolated = (
                z2, conv2, pc2, vals2, radius2, newton2, isolated2
            )  # fmt: skip
            restarted = True
    log_cond = vals.log_cond
    sort = np.lexsort((np.angle(z), np.abs(z)))
    ok = bool(np.all(conv) and np.all(isolated))
    total = int(sum(sweeps))
    message = (
        f"{n} roots, {total} sweeps ({len(sweeps)} levels); error bounds are estimates "
        "(inclusion discs with a rounding-error estimate)"
        if ok
        else f"{int((~conv).sum())} of {n} roots not converged, "
        f"{int((~isolated).sum())} discs not isolated after {total} sweeps"
    )
    keep = slice(None)
    if lowest is not None:
        keep = slice(0, int(lowest))
        if int(lowest) < n:
            message += (
                f"; the restricted search for the {lowest} smallest failed its check, so every "
                "root was computed and the smallest kept"
            )
    idx = sort[keep]
    return RootTable(
        values=scale * z[idx],
        error_bounds=scale * radius[idx],
        variable="x",
        rigorous=False,
        converged=ok,
        message=message,
        method="chain-aberth",
        evaluations=evaluations,
        count=n,
        sweeps=total,
        indices=np.arange(idx.size),
        details={
            "isolated": isolated[idx],
            "root_converged": conv[idx],
            "newton_radius": scale * newton[idx],
            "sweeps_per_level": tuple(sweeps),
            "chain_steps": ch.steps,
            "max_residual": float(np.exp(-log_cond.min())),
            "max_newton_step": _max_step(vals.g, z),
            "start": "given"
            if z0 is not None
            else "one circle (the divide and conquer stalled)"
            if restarted
            else "divide and conquer from single terms",
        },
    )


def _max_step(g: np.ndarray, z: np.ndarray) -> float:
    """Largest relative Newton correction ``|Q / (x Q')|`` over the roots other than x = 0."""
    nonzero = z != 0
    return float(np.max(1.0 / np.abs(g[nonzero] * z[nonzero]), initial=0.0))


def evaluate_chain(
    x: np.ndarray | Sequence[complex],
    weights: np.ndarray | Sequence[complex],
    reach: int | Sequence[int] | np.ndarray = 1,
    order: int = 2,
) -> ChainValues:
    """Evaluate the reversed chain polynomial ``Q(x) = x^n P(1/x)`` at many points.

    Parameters
    ----------
    x : array of complex
        Evaluation points (non-zero).
    weights : array of complex, length M
        ``w_j = c_j^N`` in chain order (not scaled: ``log_abs`` is that of the true ``Q``).
    reach : int or 1-d int array
        Fixed reach or back-reach array (see :func:`freeladder.roots.real.chain_back`).
    order : int
        N (only for the rounding-error scale).

    Returns
    -------
    ChainValues
        ``Q'/Q``, ``log|Q|``, the phase of ``Q`` and ``log(P~/|P|)``.
    """
    w = np.asarray(weights, dtype=complex)
    xs = np.asarray(x, dtype=complex).ravel()
    ch = _Chain(w, chain_back(reach, w.shape[0]), order)
    n = chain_root_count(ch.m, ch.back)
    k = xs.size
    g, log_abs_p, phase_p, log_cond, rel_err = ch.evaluate(
        xs, np.zeros(k, np.int64), np.full(k, ch.m), np.full(k, n)
    )
    return ChainValues(
        g,
        n * np.log(np.abs(xs)) + log_abs_p,
        np.exp(1j * n * np.angle(xs)) * phase_p,
        log_cond,
        rel_err,
    )


def inclusion_radii(
    z: np.ndarray,
    weights: np.ndarray,
    reach: int | Sequence[int] | np.ndarray = 1,
    order: int = 2,
) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Inclusion radii of approximations ``z`` of all the reciprocal roots of a chain.

    Returns ``(radius, newton_radius, isolated)`` as described in :func:`aberth_chain_roots`
    (estimates: the rounding error of ``Q`` is estimated, not bounded).
    """
    zs = np.asarray(z, dtype=complex)
    w = np.asarray(weights, dtype=complex)
    ch = _Chain(w, chain_back(reach, w.shape[0]), order)
    n = chain_root_count(ch.m, ch.back)
    if zs.shape != (n,):
        raise ValueError(f"{zs.size} approximations for {n} roots")
    return _radii(ch, zs, _pieces(ch, [(0, ch.m, n)]), _Values(n))


def certified_complex_roots(
    real: Sequence[Fraction], imag: Sequence[Fraction], tol: float = 1e-18, variable: str = "y"
) -> RootTable:
    """Certified complex roots of a polynomial with exact Gaussian-rational coefficients.

    An entry point to the one certified isolation, :func:`freeladder.certified_roots`.

    Parameters
    ----------
    real, imag : sequences of Fraction
        Real and imaginary parts of the ascending coefficients (exact).
    tol : float
        Balls are refined until their radius is below ``tol`` (absolute).
    variable : str
        Only for error messages.

    Returns
    -------
    RootTable
        ``variable="y"``, method ``"exact-certified"``, ``rigorous=True``: ``values`` the
        midpoints of the isolating balls (rounded to double), ``error_bounds`` upper bounds on
        the distance from each value to the one root its ball contains.

    Raises
    ------
    ValueError
        For the zero polynomial, or when flint cannot isolate the roots (repeated roots are
        split off exactly and counted in ``multiplicities``).

    References
    ----------
    F. Johansson, "Arb: efficient arbitrary-precision midpoint-radius interval arithmetic",
    IEEE Trans. Comput. 66, 1281 (2017) (``acb_poly_find_roots`` with validated isolation).
    """
    return certified_roots(real, imag, tolerance=tol, variable=variable)
