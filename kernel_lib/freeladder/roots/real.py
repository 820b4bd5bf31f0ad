"""Real roots of exclusion-chain polynomials, computed on the recurrence itself.

API (plain functions on numpy arrays; no Model needed)
-----------------------------------------------------
``reach`` is everywhere either an int p >= 1 (the reach-p exclusion chain) or a 1-d int array
``back`` of per-position back-reach (see :func:`chain_back`): position k's earlier neighbours
are exactly positions ``k - back[k] .. k - 1``, so that

    P_k = P_{k-1} - y w_k P_{k-back[k]-1},     P_{-1} = 1

(``back[k] = 0``: no earlier neighbour, a new component starts or an isolated term).  Fixed
reach p is ``back[k] = min(p, k)``; an indifference ordering
(:class:`freeladder.IndifferenceOrder`) gives ``back[k] = k - first_neighbour[k]``.

``chain_real_roots(weights, reach, lowest=None, *, rtol=..., progress=None) -> RootTable``
    All roots (or, with ``lowest=k``, the k LARGEST roots y, i.e. the k smallest
    quasi-energies eta = y**(-1/N)) of ``P_M(y)`` for real positive weights ``w_k`` (N = 2 real
    couplings: ``w = c**2``), as a :class:`~freeladder.RootTable`
    (``variable="y"``, ascending, method ``"chain-count"``, ``rigorous=False``: the error
    bounds are estimates, not proofs; ``certify.certify_chain_roots`` turns them into proofs).
    Roots anywhere in about ``[2**-13000, 2**13000]`` converge as well as inside float64's
    range (to the accuracy of the float64 evaluation, see below): a root outside float64's
    normal range is returned as a mantissa with a power of two (``RootTable.exponents``).
``chain_back(reach, n_terms) -> int64 array``
    The back-reach array of an int reach, or a validated copy of a given array.
``check_chain_weights(weights, reach) -> (float64 array, int)``
    The validation every real-chain function applies (int reach).
``chain_count_below(weights, reach, y) -> int64 array``
    Number of negative ratios ``P_k(y) / P_{k-1}(y)`` along the recurrence, for each y
    (the number of roots below y, see Notes).
``chain_root_count(n_terms, reach) -> int``
    The degree S: ``floor((M + p) / (p + 1))`` for reach p; the independence number (greedy
    count, see :func:`chain_root_count`) for a back array.
``chain_inverse_power_sums(weights, reach) -> (float, float)``
    ``sum_k 1/y_k = C_1`` and ``sum_k 1/y_k**2 = C_1**2 - 2 C_2`` in O(M) (sum-rule checks:
    for N = 2 these are ``sum eta**2`` and ``sum eta**4``).

Method
------
Everything runs on the recurrence, never on expanded coefficients.  With the ratios
``r_k = P_k(y) / P_{k-1}(y)`` (b = back[k]),

    r_k = 1 - y w_k / (r_{k-1} r_{k-2} ... r_{k-b}),

and the scaled logarithmic derivatives ``Lt_k = y P_k' / P_k`` and ``Qt_k = y**2 P_k'' / P_k``
obey

    Lt_k = (Lt_{k-1} - s_k (1 + Lt_{k-b-1})) / r_k,
    Qt_k = (Qt_{k-1} - s_k (2 Lt_{k-b-1} + Qt_{k-b-1})) / r_k,       s_k = 1 - r_k,

so one O(M) sweep gives the root count below y (the number of negative ``r_k``) and the
Laguerre step as a relative step (``y -> y (1 - delta)``), dimensionless.  A ratio that is
exactly zero (y is a root of ``P_k``) is replaced by ``-2**-256``, the device LAPACK's
bisection (``dstebz``) uses for a zero pivot; it perturbs ``r_k`` by far less than its own
rounding error.

Extended range.  Disordered chains have exponentially small quasi-energies, so the largest
roots y can lie far beyond 1e308.  Evaluation points are kept as a float64 mantissa and an
int64 power of two, and so are the brackets; midpoints of wide brackets are geometric (exact
in the exponent), Laguerre steps relative.  A point is evaluated by the plain float64 ratio
loop when it and everything in that loop stay provably inside the float64 range.  An
overflow makes some ``s_k`` infinite, ``1 / r_k = -0`` and from there on ``Lt`` NaN, so a
finite ``Gt`` and ``Ht`` at the end show that nothing overflowed; and with ``|1 / r_k| <=
2**256`` (the zero-ratio device) a product that underflowed, times at most 3 further
factors, stood for an ``s_k`` below ``2**-254``, which leaves ``r_k = 1 - s_k`` exact to
rounding.  For back-reach B > 3 (and for counts without derivatives) the loop records per
point the largest ``|s_k|`` and ``|1 / r_k|`` instead, and requires ``max |s| < 2**1000``
and ``max |1/r|**B < 2**962`` (then an underflowed product stood for ``s_k < 2**-60``).
Any other point (and every point beyond
``2**990``) is evaluated again on the linear recurrence for ``P_k`` itself in block floating
point: each ``P_k`` as a mantissa in ``[2**-128, 2**128)`` times ``2**(256 e)``, so a sum of two
terms whose block exponents differ by 2 or more is the larger one to within ``2**-256``.

Roots are found by bisection on the count (geometric midpoints while a bracket spans more
than a factor 2) combined with Laguerre's iteration, which for a real-rooted polynomial moves
monotonically and cubically from any point to the neighbouring root on the chosen side, so a
point whose count shows it is next to root j (count j below it, j + 1 above it) is all it
needs.  Every point evaluated in a sweep tightens the brackets of all roots and serves as a
Laguerre start for its two neighbouring roots.  A sweep evaluates all distinct points at once
in a compiled loop (numba), vectorised over points and split over the cores, in calls short
enough that KeyboardInterrupt stops a long run promptly.  From a ladder of points alone this
takes about 5 point evaluations of O(M) per root, so all roots cost O(M^2) with that factor.

Window seeds (all roots of chains of ``_SEED_TERMS`` terms or more).  The chain is cut into
windows of ``L = max(_SEED_WINDOW, M / 32)`` terms twice, the second cutting shifted by
``L / 2``, and the roots of every window are found on their own (the same way, seeded again
when the window is long): O(M L) in all.  Their union (values of the two cuttings within
``2**-36`` relative taken once) is evaluated once on the whole chain right after the
ladder: each point tightens every bracket and is a Laguerre start for its two neighbouring
roots.  In random chains the ratios forget their start within a localisation length
(Anderson localisation), so a root lying a quarter window from the cuts of one cutting is a
root of that window to about float64 accuracy, and most roots finish after this one
evaluation.  The seeds are only start points: every root is still bracketed by counts and
converged by Laguerre on the whole chain to the same tolerance, with the same estimates:
the seeds change the number of evaluations, not what the result states (values agree with
the unseeded run to rounding, about 3e-15 relative).  Measured
(tests/benchmarks/bench_roots.py, random weights): 1.08, 1.24, 1.47 evaluations of O(M) per
root for reach 1 to 3 at 10^5 terms (the longer the localisation, the more).  A uniform
chain, whose windows say little about its roots, needs about as many as without seeds (4.6
against 4.4 per root at 2 x 10^4 terms) and pays for the windows on top (1.5 times slower).
Progress: a ``tqdm`` bar counting evaluated points when the work is large.

What is proved and what is tested
---------------------------------
* Reach 1: ``q_k(lambda) = lambda^(k+1) P_k(lambda^-2)`` obeys
  ``q_k = lambda q_{k-1} - w_k q_{k-2}`` (``q_{-1} = 1``, ``q_0 = lambda``): it is the
  characteristic polynomial of the leading (k+1) x (k+1) block of the zero-diagonal symmetric
  tridiagonal matrix with off-diagonals ``sqrt(w_1) ... sqrt(w_M)``.  Its LDL^T pivots at
  ``lambda = y^(-1/2) > 0`` are ``-lambda`` and ``-lambda r_k``, so by Sylvester's law of
  inertia (common practice; B. N. Parlett, The Symmetric Eigenvalue Problem, SIAM 1998,
  section 3.3) the negative ``r_k`` count the eigenvalues ``eta >= lambda``, i.e. the roots
  ``y_k <= y``.  Proved.
* Reach p >= 2, and variable back-reach: the count equals the number of roots below y
  whenever every ``P_{k-1}`` interlaces ``P_k`` with the smallest root belonging to ``P_k``.
  That interlacing is not proved here; it is TESTED, NOT PROVED (tests/test_roots.py: against
  certified roots of the exact polynomial for p = 2, 3 and for random variable-reach chains).
  The roots returned are nevertheless checked independently of this property by
  ``certify.certify_chain_roots`` (fixed reach), whose proof uses only sign changes and the
  degree S.
* Real positive roots for positive weights: the frustration graph of a chain, and any graph
  with an indifference ordering, is claw-free (M. Chudnovsky and P. Seymour, J. Combin.
  Theory Ser. B 97, 350 (2007)).  Positivity is immediate: every term of ``P(y)`` is positive
  for ``y <= 0``.
* The error bounds are estimates, not proofs: the last Laguerre step, or half the final
  bracket, but at least ``sqrt(M) eps`` relative.  That floor is the rounding accumulated
  along the chain (each step perturbs the problem by about eps; for long chains it dominates):
  against 256-bit mpmath brackets the smallest quasi-energy of random reach-1 chains was off
  by 1e-14 to 1e-13 relative at 10^5 terms (estimate 7e-14), and LAPACK's bisection differed
  from it by 5.5e-15; chains of 40 terms agree with mpmath to 4e-15 anywhere in range
  (tests/benchmarks/bench_gaps.py, tests/test_roots.py).  The iteration itself converges to
  ``rtol``; the result cannot be more accurate than the float64 evaluation of the chain.

References
----------
W. Barth, R. S. Martin and J. H. Wilkinson, "Calculation of the eigenvalues of a symmetric
tridiagonal matrix by the method of bisection", Numer. Math. 9, 386 (1967).
P. W. Anderson, "Absence of diffusion in certain random lattices", Phys. Rev. 109, 1492
(1958) (localisation: why window roots are good seeds for random chains).
P. Fendley, J. Phys. A 52, 335002 (2019), arXiv:1901.08078 (the reach-2 chain polynomial).
F. C. Alcaraz and R. A. Pimenta, Phys. Rev. B 102, 121101(R) (2020), arXiv:2005.14622.
R. L. Mann, S. J. Elman, D. R. Wood and A. Chapman, arXiv:2408.09684 (2024) (indifference
orderings).
"""

from __future__ import annotations

import os
import threading
from collections.abc import Callable
from concurrent.futures import ThreadPoolExecutor, wait
from typing import Any

import numpy as np

from ..base.interrupt import poll, stop_when
from ..base.lazy import njit, prange
from .result import RootTable

__all__ = [
    "chain_back",
    "chain_count_below",
    "chain_inverse_power_sums",
    "chain_real_roots",
    "chain_root_count",
    "check_chain_weights",
    "fixed_reach",
]

_TINY = 2.0**-256  # a zero ratio becomes -_TINY
_HUGE = 2.0**256  # |1 / r| is clamped here (the same device, for the derivatives)
_BLOCK = 128
_STEPS_PER_CALL = 5e7  # chain steps x points per compiled call: Ctrl-C and stop hooks act
_PARALLEL_STEPS = 2e6  # below this, one core is faster than waking the thread pool
_EPS = float(np.finfo(np.float64).eps)
_SEED_WINDOW = 4096  # terms per window of the seeding cuttings (see _window_seeds)
_SEED_TERMS = 4 * _SEED_WINDOW  # shorter chains start from the ladder alone
_BAR_WORK = 1e10  # chain steps x roots from which a progress bar is shown
_FLOAT_EXP = 990  # points below 2**990 try the float64 loop first
_BASE = 2.0**256  # block floating point: value = mantissa * _BASE**exponent
_INV_BASE = 2.0**-256
_LO = 2.0**-128  # block mantissas lie in [_LO, _HI)
_HI = 2.0**128

ProgressCallback = Callable[[int, int, int], Any]


# -- compiled loops -------------------------------------------------------------------------------
@njit(cache=True, boundscheck=False, error_model="numpy")
def _block(
    w: np.ndarray,
    back: np.ndarray,
    ring: int,
    x: np.ndarray,
    b: int,
    deriv: bool,
    counts: np.ndarray,
    first: np.ndarray,
    second: np.ndarray,
    s_max: np.ndarray,
    inv_max: np.ndarray,
) -> None:  # pragma: no cover - compiled
    """One float64 pass over the chain for the points of block ``b`` of ``x``.

    Writes the count, ``Gt = y P'/P``, ``Ht = Gt**2 - y**2 P''/P`` (zero unless ``deriv``),
    and the largest ``|s_k|`` and ``|1 / r_k|`` (the range check, see the module notes; not
    tracked, left 0, with ``deriv`` and back-reach at most 3).
    """
    n = x.size
    m = w.size
    start = b * _BLOCK
    size = min(_BLOCK, n - start)
    lanes = _BLOCK if size > 16 else (size + 3) // 4 * 4  # few points: narrow lanes
    xs = np.empty(lanes)
    for j in range(lanes):
        xs[j] = x[start + min(j, size - 1)]
    inv_ratio = np.ones((ring, lanes))  # 1 / r_{k-1} ... 1 / r_{k-ring}, as a ring
    logd = np.zeros((ring + 1, lanes))  # Lt_{k-1} ... Lt_{k-ring-1}, as a ring
    curv = np.zeros((ring + 1, lanes))  # the same for Qt
    s = np.empty(lanes)
    tmp_l = np.empty(lanes)
    tmp_q = np.empty(lanes)
    track = ring > 3 or not deriv
    negative = np.zeros(lanes)
    big_s = np.zeros(lanes)
    big_inv = np.zeros(lanes)
    for k in range(m):
        wk = w[k]
        bk = back[k]
        for j in range(lanes):
            s[j] = xs[j] * wk
        for i in range(bk):
            row = inv_ratio[(k - 1 - i + ring) % ring]
            for j in range(lanes):
                s[j] *= row[j]
        out = inv_ratio[k % ring]
        if deriv:
            l_new = logd[k % (ring + 1)]
            l_prev = logd[(k + ring) % (ring + 1)]
            l_old = logd[(k - bk - 1 + ring + 1) % (ring + 1)]
            q_new = curv[k % (ring + 1)]
            q_prev = curv[(k + ring) % (ring + 1)]
            q_old = curv[(k - bk - 1 + ring + 1) % (ring + 1)]
            for j in range(lanes):
                sj = s[j]
                r = 1.0 - sj
                r = r if abs(r) >= _TINY else -_TINY
                negative[j] += 1.0 if r < 0.0 else 0.0
                inv = 1.0 / r
                out[j] = inv
                lo = l_old[j]
                tmp_l[j] = (l_prev[j] - sj * (1.0 + lo)) * inv
                tmp_q[j] = (q_prev[j] - sj * (2.0 * lo + q_old[j])) * inv
            if track:
                for j in range(lanes):
                    a_s, a_inv = abs(s[j]), abs(out[j])
                    big_s[j] = a_s if a_s > big_s[j] else big_s[j]  # inf sticks; NaN follows inf
                    big_inv[j] = a_inv if a_inv > big_inv[j] else big_inv[j]
            for j in range(lanes):
                l_new[j] = tmp_l[j]
                q_new[j] = tmp_q[j]
        else:
            for j in range(lanes):
                sj = s[j]
                r = 1.0 - sj
                r = r if abs(r) >= _TINY else -_TINY
                negative[j] += 1.0 if r < 0.0 else 0.0
                inv = 1.0 / r
                out[j] = inv
                a_s, a_inv = abs(sj), abs(inv)
                big_s[j] = a_s if a_s > big_s[j] else big_s[j]  # inf sticks; NaN follows inf
                big_inv[j] = a_inv if a_inv > big_inv[j] else big_inv[j]
    last = (m - 1) % (ring + 1)
    for j in range(size):
        counts[start + j] = np.int64(negative[j])
        g = logd[last, j]
        first[start + j] = g
        second[start + j] = g * g - curv[last, j]
        s_max[start + j] = big_s[j]
        inv_max[start + j] = big_inv[j]


@njit(cache=True, boundscheck=False, error_model="numpy")
def _block_wide(
    wm: np.ndarray,
    we: np.ndarray,
    back: np.ndarray,
    ring: int,
    xm: np.ndarray,
    xe: np.ndarray,
    b: int,
    deriv: bool,
    counts: np.ndarray,
    first: np.ndarray,
    second: np.ndarray,
) -> None:  # pragma: no cover - compiled
    """The same outputs as :func:`_block` from ``P_k`` in block floating point (any range).

    ``P_k = pm * _BASE**pe`` with ``|pm|`` in ``[_LO, _HI)``; weights and points likewise
    (``wm``, ``we``, ``xm``, ``xe``; exponents held as floats, exact integers).
    """
    n = xm.size
    m = wm.size
    start = b * _BLOCK
    size = min(_BLOCK, n - start)
    lanes = _BLOCK if size > 16 else (size + 3) // 4 * 4  # few points: narrow lanes
    ym = np.empty(lanes)
    ye = np.empty(lanes)
    for j in range(lanes):
        ym[j] = xm[start + min(j, size - 1)]
        ye[j] = xe[start + min(j, size - 1)]
    slots = ring + 1
    pm = np.ones((slots, lanes))  # P_{k-1} ... P_{k-ring-1}, as a ring (P_{-1} = 1)
    pe = np.zeros((slots, lanes))
    logd = np.zeros((slots, lanes))
    curv = np.zeros((slots, lanes))
    negative = np.zeros(lanes)
    for k in range(m):
        bk = back[k]
        new = k % slots
        prev = (k + ring) % slots
        old = (k - bk - 1 + slots) % slots
        wmk = wm[k]
        wek = we[k]
        for j in range(lanes):
            am = pm[prev, j]
            ae = pe[prev, j]
            bm = ym[j] * wmk * pm[old, j]
            be = ye[j] + wek + pe[old, j]
            ab = abs(bm)
            if ab >= _HI:
                bm *= _INV_BASE
                be += 1.0
            elif ab < _LO:
                bm *= _BASE
                be -= 1.0
            e = max(ae, be)
            fa = 1.0 if ae == e else (_INV_BASE if ae == e - 1.0 else 0.0)
            fb = 1.0 if be == e else (_INV_BASE if be == e - 1.0 else 0.0)
            cm = am * fa - bm * fb
            ac = abs(cm)
            if cm == 0.0:  # P_k = 0: replaced by -2**-256 P_{k-1}
                cm = -am
                e = ae - 1.0
            elif ac >= _HI:
                cm *= _INV_BASE
                e += 1.0
            elif ac < _LO:
                cm *= _BASE
                e -= 1.0
            negative[j] += 1.0 if (cm < 0.0) != (am < 0.0) else 0.0
            if deriv:
                d = ae - e  # <= 1
                scale = (
                    _BASE if d == 1.0 else (1.0 if d == 0.0 else _INV_BASE if d == -1.0 else 0.0)
                )
                inv = am / cm * scale
                inv = max(min(inv, _HUGE), -_HUGE)
                lo = logd[old, j]
                qo = curv[old, j]
                lp = logd[prev, j]
                qp = curv[prev, j]
                logd[new, j] = lp * inv - (inv - 1.0) * (1.0 + lo)
                curv[new, j] = qp * inv - (inv - 1.0) * (2.0 * lo + qo)
            pm[new, j] = cm
            pe[new, j] = e
    last = (m - 1) % slots
    for j in range(size):
        counts[start + j] = np.int64(negative[j])
        g = logd[last, j]
        first[start + j] = g
        second[start + j] = g * g - curv[last, j]


@njit(cache=True, parallel=True)
def _sweep_parallel(
    w: np.ndarray,
    back: np.ndarray,
    ring: int,
    x: np.ndarray,
    deriv: bool,
    counts: np.ndarray,
    first: np.ndarray,
    second: np.ndarray,
    s_max: np.ndarray,
    inv_max: np.ndarray,
) -> None:  # pragma: no cover - compiled
    """All blocks of ``x``, split over the cores."""
    for b in prange((x.size + _BLOCK - 1) // _BLOCK):
        _block(w, back, ring, x, b, deriv, counts, first, second, s_max, inv_max)


@njit(cache=True, nogil=True)
def _sweep_serial(
    w: np.ndarray,
    back: np.ndarray,
    ring: int,
    x: np.ndarray,
    deriv: bool,
    counts: np.ndarray,
    first: np.ndarray,
    second: np.ndarray,
    s_max: np.ndarray,
    inv_max: np.ndarray,
) -> None:  # pragma: no cover - compiled
    """All blocks of ``x`` on one core (small jobs: no thread start-up).

    A copy of :func:`_sweep_parallel` on purpose: numba's on-disk cache is keyed by the Python
    function and not by the ``parallel`` flag, so one body compiled twice would load one
    machine code for both.
    """
    for b in range((x.size + _BLOCK - 1) // _BLOCK):
        _block(w, back, ring, x, b, deriv, counts, first, second, s_max, inv_max)


@njit(cache=True, parallel=True)
def _wide_parallel(
    wm: np.ndarray,
    we: np.ndarray,
    back: np.ndarray,
    ring: int,
    xm: np.ndarray,
    xe: np.ndarray,
    deriv: bool,
    counts: np.ndarray,
    first: np.ndarray,
    second: np.ndarray,
) -> None:  # pragma: no cover - compiled
    """All blocks, block floating point, split over the cores."""
    for b in prange((xm.size + _BLOCK - 1) // _BLOCK):
        _block_wide(wm, we, back, ring, xm, xe, b, deriv, counts, first, second)


@njit(cache=True, nogil=True)
def _wide_serial(
    wm: np.ndarray,
    we: np.ndarray,
    back: np.ndarray,
    ring: int,
    xm: np.ndarray,
    xe: np.ndarray,
    deriv: bool,
    counts: np.ndarray,
    first: np.ndarray,
    second: np.ndarray,
) -> None:  # pragma: no cover - compiled
    """All blocks, block floating point, one core (see :func:`_sweep_serial`)."""
    for b in range((xm.size + _BLOCK - 1) // _BLOCK):
        _block_wide(wm, we, back, ring, xm, xe, b, deriv, counts, first, second)


# -- validation ---------------------------------------------------------------------------------
def _check_weights(weights: Any) -> np.ndarray:
    w = np.asarray(weights)
    if w.ndim != 1 or w.size == 0:
        raise ValueError(f"weights must be a non-empty 1-d array, got shape {w.shape}")
    if w.dtype.kind == "c":
        bad = np.nonzero(w.imag != 0)[0]
        if bad.size:
            raise ValueError(
                f"weight {int(bad[0])} is complex ({w[bad[0]]!r}): the real-root path needs "
                "real positive weights; use the complex-root path (spectrum.py) instead"
            )
        w = w.real
    if w.dtype.kind not in "fiu":
        raise ValueError(f"weights must be real numbers, got dtype {w.dtype}")
    w = np.ascontiguousarray(w, dtype=np.float64)
    bad = np.nonzero(~(np.isfinite(w) & (w > 0)))[0]
    if bad.size:
        j = int(bad[0])
        raise ValueError(
            f"weight {j} is {w[j]!r}: the real-root path needs finite weights > 0 "
            "(for N = 2, w = c**2 of real couplings); zero couplings split the chain, and "
            "negative or complex weights need the complex-root path (spectrum.py)"
        )
    return w


def _check_reach(reach: Any) -> int:
    if np.ndim(reach) != 0:
        raise ValueError(
            "reach must be an integer >= 1 here; a back-reach array (variable reach) is taken "
            "by chain_real_roots, chain_count_below, chain_root_count and "
            "chain_inverse_power_sums, and certified through the exact polynomial"
        )
    if isinstance(reach, bool) or int(reach) != reach or int(reach) < 1:
        raise ValueError(f"reach must be an integer >= 1, got {reach!r}")
    return int(reach)


def check_chain_weights(weights: Any, reach: Any) -> tuple[np.ndarray, int]:
    """Validate real positive weights and an int reach; return a contiguous float64 copy.

    Raises ``ValueError`` naming the first offending index (the message points to the
    complex-root path for weights that are complex, zero or negative).
    """
    p = _check_reach(reach)
    return _check_weights(weights), p


def chain_back(reach: Any, n_terms: int) -> np.ndarray:
    """The per-position back-reach array of a chain of ``n_terms`` terms.

    Parameters
    ----------
    reach : int or array_like of int
        An int p >= 1 gives ``back[k] = min(p, k)``.  An array is validated: 1-d, length
        ``n_terms``, integers with ``0 <= back[k] <= k`` and ``k - back[k]`` non-decreasing
        (the first neighbour never moves backwards: an indifference ordering).
    n_terms : int

    Returns
    -------
    numpy.ndarray of int64 (a new array)

    Raises
    ------
    ValueError
        Naming the first offending position.

    Examples
    --------
    >>> chain_back(2, 5).tolist()
    [0, 1, 2, 2, 2]
    >>> chain_back([0, 1, 1, 3], 4)  # doctest: +ELLIPSIS
    Traceback (most recent call last):
    ...
    ValueError: back-reach: k - back[k] must be non-decreasing ... position 3 reaches back to 0 ...
    """
    m = int(n_terms)
    if np.ndim(reach) == 0:
        p = _check_reach(reach)
        return np.minimum(np.arange(m, dtype=np.int64), p)
    raw = np.asarray(reach)
    if raw.ndim != 1 or raw.size != m:
        raise ValueError(f"back-reach must be a 1-d array of {m} entries, got shape {raw.shape}")
    if raw.dtype.kind == "b" or raw.dtype.kind not in "iuf":
        raise ValueError(f"back-reach must hold integers, got dtype {raw.dtype}")
    back = raw.astype(np.int64)
    bad = np.nonzero(back != raw)[0]
    if bad.size:
        raise ValueError(f"back-reach {int(bad[0])} is {raw[bad[0]]!r}, not an integer")
    k = np.arange(m, dtype=np.int64)
    bad = np.nonzero((back < 0) | (back > k))[0]
    if bad.size:
        j = int(bad[0])
        raise ValueError(
            f"back-reach {j} is {int(back[j])}: position {j} can reach back to positions "
            f"0 .. {j - 1} only (0 <= back[k] <= k)"
        )
    start = k - back
    bad = np.nonzero(np.diff(start) < 0)[0]
    if bad.size:
        j = int(bad[0]) + 1
        raise ValueError(
            "back-reach: k - back[k] must be non-decreasing (the first neighbour of each "
            f"position may not move backwards), but position {j} reaches back to "
            f"{int(start[j])} after position {j - 1} reached back to {int(start[j - 1])}"
        )
    return back


def fixed_reach(back: np.ndarray) -> int | None:
    """The reach p when a back-reach array is ``min(p, k)`` for some p >= 1, else None.

    Examples
    --------
    >>> fixed_reach(chain_back(3, 10)), fixed_reach(np.array([0, 1, 1, 2]))
    (3, None)
    """
    if back.size < 2:
        return 1
    p = int(back.max())
    if p < 1:
        return None
    return p if np.array_equal(back, np.minimum(np.arange(back.size), p)) else None


def chain_root_count(n_terms: int, reach: Any) -> int:
    """Number of roots S of a chain with all weights non-zero: the degree of ``P_M``.

    For reach p this is ``floor((M + p) / (p + 1))``, the independence number of the p-th
    power of a path on M vertices (common practice).  For a back-reach array it is the
    independence number found greedily from the left: take position k whenever the last
    taken position lies before ``k - back[k]``.  The greedy set is maximum: if ``i_1 < i_2 <
    ...`` is any independent set and the greedy picks ``g_1 < g_2 < ...``, then ``g_t <= i_t``
    by induction (``i_{t+1}`` is not adjacent to ``i_t >= g_t``, so its earlier neighbours
    start after ``g_t`` and the greedy may take it), so the greedy set is at least as large.
    With positive weights the top coefficient is a sum of positive products, so the degree is
    this number.
    """
    m = int(n_terms)
    if np.ndim(reach) == 0:
        p = _check_reach(reach)
        return (m + p) // (p + 1)
    return int(_greedy(chain_back(reach, m)).size)


@njit(cache=True)
def _greedy_picks(start: np.ndarray) -> np.ndarray:  # pragma: no cover - compiled
    out = np.empty(start.size, dtype=np.int64)
    count, last = 0, -1
    for k in range(start.size):
        if start[k] > last:
            out[count] = k
            count += 1
            last = k
    return out[:count]


def _greedy(back: np.ndarray) -> np.ndarray:
    """Positions of the greedy maximum independent set (see :func:`chain_root_count`)."""
    p = fixed_reach(back)
    if p is not None:
        return np.arange(0, back.size, p + 1, dtype=np.int64)
    return _greedy_picks(np.arange(back.size, dtype=np.int64) - back)


# -- numbers with a separate power of two --------------------------------------------------------
def _normal(m: np.ndarray, e: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """``(m', e')`` with ``m' 2**e' = m 2**e`` and ``m'`` in [0.5, 1) (``np.frexp`` form)."""
    mm, de = np.frexp(m)
    return mm, np.asarray(e, dtype=np.int64) + de


def _less(am: np.ndarray, ae: np.ndarray, bm: np.ndarray, be: np.ndarray) -> np.ndarray:
    """``a < b`` for positive normalised numbers."""
    return (ae < be) | ((ae == be) & (am < bm))


def _to_float(m: np.ndarray, e: np.ndarray) -> np.ndarray:
    with np.errstate(over="ignore", under="ignore"):
        return np.ldexp(m, np.clip(e, -4000, 4000).astype(np.int32))


def _difference(
    hm: np.ndarray, he: np.ndarray, lm: np.ndarray, le: np.ndarray
) -> tuple[np.ndarray, np.ndarray]:
    """``h - l`` for ``h >= l > 0``, normalised (exact to rounding)."""
    shift = np.clip(le - he, -2000, 0).astype(np.int32)
    return _normal(hm - np.ldexp(lm, shift), he)


def _midpoints(
    lm: np.ndarray, le: np.ndarray, hm: np.ndarray, he: np.ndarray
) -> tuple[np.ndarray, np.ndarray]:
    """Geometric midpoints of wide brackets (exact in the exponent), arithmetic ones of
    brackets narrower than a factor 2."""
    wide = ~((he < le + 1) | ((he == le + 1) & (hm <= lm)))
    total = le + he
    odd = total % 2
    gm, ge = _normal(np.sqrt(lm * hm * np.where(odd == 1, 2.0, 1.0)), (total - odd) // 2)
    shift = np.clip(he - le, 0, 2).astype(np.int32)
    am, ae = _normal(0.5 * (lm + np.ldexp(hm, shift)), le)
    return np.where(wide, gm, am), np.where(wide, ge, ae)


def _laguerre(
    c: np.ndarray, g: np.ndarray, h: np.ndarray, j: np.ndarray, degree: int
) -> np.ndarray:
    """Laguerre's relative step ``delta`` (next point ``e (1 - delta)``) towards root ``j``
    (0-based), or NaN if the point is not next to it.

    ``c`` is the count at the point e; ``g = e P'/P`` and ``h = sum e**2 / (e - y_i)**2``
    there.  For a real-rooted polynomial of degree n the two Laguerre iterates
    ``e - n / (G -+ sqrt((n - 1) (n H - G**2)))`` lie between ``e`` and its two neighbouring
    roots, and the iteration converges to them monotonically and cubically (common practice;
    A. M. Ostrowski, Solution of Equations in Euclidean and Banach Spaces, Academic Press 1973,
    ch. 11); scaled by ``e`` the step is ``e n / (g -+ sqrt((n - 1) (n h - g**2)))``.  So the
    upward iterate serves root ``c`` and the downward one root ``c - 1``.
    Returns NaN where ``e`` is not next to root ``j`` or is nearer its other neighbour.
    """
    n = float(degree)
    disc = np.sqrt(np.maximum((n - 1.0) * (n * h - g * g), 0.0))
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        upward = n / (g - disc)
        downward = n / (g + disc)
    # A point just above root j - 1 has a tiny upward step too (it escapes slowly), so a step
    # is offered from a point nearer its target (G < 0 below a root, G > 0 above it), or when
    # it is long (an eighth of the point or more: far from an isolated root, where bisection
    # in the exponent is slow).  Either way it never passes the root.
    up = (c == j) & ((g < 0) | (upward <= -0.125))
    down = (c == j + 1) & ((g > 0) | (downward >= 0.125))
    delta = np.where(up, upward, np.where(down, downward, np.nan))
    return np.where(delta < 1.0, delta, np.nan)


class _Chain:
    """The weights (scaled so that the largest lies in [1/2, 1)), in both layouts, and back."""

    def __init__(self, w: np.ndarray, back: np.ndarray, serial: bool = False) -> None:
        self.shift = int(np.frexp(np.max(w))[1])
        self.w = np.ldexp(w, -self.shift)  # exact: roots of the scaled chain are y * 2**shift
        self.back = np.ascontiguousarray(back, dtype=np.int64)
        self.ring = max(1, int(self.back.max()))
        self.wm, self.we = _blocks(*np.frexp(self.w))
        self.evaluations = 0
        self.bar: Any = None  # a tqdm bar counting evaluated points, or None
        self.serial = serial  # one core per call (the caller runs several chains at once)

    def evaluate(
        self, xm: np.ndarray, xe: np.ndarray, deriv: bool
    ) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
        """Counts, ``Gt`` and ``Ht`` at the points ``xm * 2**xe`` (normalised, > 0).

        Float64 loop where it is provably in range, block floating point elsewhere; in
        compiled calls of bounded length so that KeyboardInterrupt is seen promptly.
        """
        n = xm.size
        self.evaluations += n
        counts = np.empty(n, dtype=np.int64)
        first = np.empty(n)
        second = np.empty(n)
        near = np.nonzero(np.abs(xe) <= _FLOAT_EXP)[0]
        wide = np.nonzero(np.abs(xe) > _FLOAT_EXP)[0]
        if near.size:
            x = np.ldexp(xm[near], xe[near].astype(np.int32))
            c, g, h, s_max, inv_max = self._run_float(x, deriv)
            with np.errstate(divide="ignore", invalid="ignore"):
                risky = ~(np.isfinite(g) & np.isfinite(h) & (s_max < 2.0**1000)) | (
                    np.log2(inv_max) * self.ring >= 962.0
                )
            counts[near], first[near], second[near] = c, g, h
            wide = np.concatenate([wide, near[risky]])
        if wide.size:
            bm, be = _blocks(xm[wide], xe[wide])
            c, g, h = self._run_wide(bm, be, deriv)
            counts[wide], first[wide], second[wide] = c, g, h
        return counts, first, second

    def _chunks(self, n: int) -> list[tuple[int, int, bool]]:
        m = self.w.size
        chunk = max(2 * _BLOCK, int(_STEPS_PER_CALL / m) // _BLOCK * _BLOCK)
        out = []
        for a in range(0, n, chunk):
            b = min(a + chunk, n)
            parallel = not self.serial and b - a > _BLOCK and (b - a) * m > _PARALLEL_STEPS
            out.append((a, b, parallel))
        return out

    def _run_float(self, x: np.ndarray, deriv: bool) -> tuple[np.ndarray, ...]:
        x = np.ascontiguousarray(x)
        n = x.size
        outs = (
            np.empty(n, dtype=np.int64),
            np.empty(n),
            np.empty(n),
            np.empty(n),
            np.empty(n),
        )
        for a, b, parallel in self._chunks(n):
            poll()
            sweep = _sweep_parallel if parallel else _sweep_serial
            sweep(self.w, self.back, self.ring, x[a:b], deriv, *(o[a:b] for o in outs))
            if self.bar is not None:
                self.bar.update(b - a)
        return outs

    def _run_wide(self, xm: np.ndarray, xe: np.ndarray, deriv: bool) -> tuple[np.ndarray, ...]:
        n = xm.size
        outs = (np.empty(n, dtype=np.int64), np.empty(n), np.empty(n))
        for a, b, parallel in self._chunks(n):
            poll()
            sweep = _wide_parallel if parallel else _wide_serial
            sweep(
                self.wm,
                self.we,
                self.back,
                self.ring,
                np.ascontiguousarray(xm[a:b]),
                np.ascontiguousarray(xe[a:b]),
                deriv,
                *(o[a:b] for o in outs),
            )
            if self.bar is not None:
                self.bar.update(b - a)
        return outs


def _blocks(m: np.ndarray, e: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """``m 2**e`` (m in [0.5, 1)) as ``bm * 2**(256 be)`` with ``bm`` in ``[2**-128, 2**128)``."""
    e = np.asarray(e, dtype=np.int64)
    be = (e - 1 + 128) // 256
    bm = np.ldexp(m, (e - 256 * be).astype(np.int32))
    return np.ascontiguousarray(bm), np.ascontiguousarray(be, dtype=np.float64)


def _prepare(weights: Any, reach: Any) -> tuple[np.ndarray, np.ndarray]:
    w = _check_weights(weights)
    return w, chain_back(reach, w.size)


def chain_count_below(weights: Any, reach: Any, y: Any) -> np.ndarray:
    """Number of negative ratios ``P_k(y) / P_{k-1}(y)``, k = 1..M, for each y.

    This is the number of roots of ``P_M`` below y: proved for reach 1 (Sturm / inertia
    count), tested for reach 2 and 3 and for variable back-reach (see the module notes).
    O(M) per point.

    Parameters
    ----------
    weights : array_like of float
        ``w_k > 0`` in chain order.
    reach : int or array_like of int
        p >= 1, or the back-reach array (:func:`chain_back`).
    y : float or array_like of float
        Evaluation points; points ``<= 0`` have count 0.

    Returns
    -------
    numpy.ndarray of int64, the shape of ``y``.

    Examples
    --------
    >>> int(chain_count_below([1.0, 1.0], 1, 1.0))  # P_2 = 1 - 2y, root 1/2
    1
    """
    w, back = _prepare(weights, reach)
    y_arr = np.asarray(y, dtype=np.float64)
    if not np.all(np.isfinite(y_arr)):
        raise ValueError("evaluation points must be finite")
    flat = y_arr.ravel()
    out = np.zeros(flat.size, dtype=np.int64)
    pos = np.nonzero(flat > 0)[0]
    if pos.size:
        chain = _Chain(w, back)
        xm, xe = _normal(flat[pos], np.full(pos.size, chain.shift))
        out[pos] = chain.evaluate(xm, xe, False)[0]
    return out.reshape(y_arr.shape)


def chain_inverse_power_sums(weights: Any, reach: Any) -> tuple[float, float]:
    """``sum 1/y_k = C_1`` and ``sum 1/y_k**2 = C_1**2 - 2 C_2`` from the weights, in O(M).

    ``C_1 = sum w_j``; ``C_2`` sums ``w_i w_j`` over pairs of independent (non-adjacent)
    terms.  Both follow from ``P(y) = prod (1 - y / y_k)`` (Newton's identities).
    For N = 2 they are ``sum eta**2`` and ``sum eta**4``.
    """
    w, back = _prepare(weights, reach)
    c1 = float(np.sum(w))
    prefix = np.concatenate([[0.0], np.cumsum(w)])
    k = np.arange(w.size)
    near = float(np.dot(w, prefix[k] - prefix[k - back]))  # sum over edges w_i w_k, i < k
    c2 = 0.5 * (c1 * c1 - float(np.dot(w, w))) - near
    return c1, c1 * c1 - 2.0 * c2


class _Brackets:
    """Per wanted root: the bracket ``[lo, hi]`` (mantissa, exponent) with its counts, and a
    Laguerre start ``e`` with its count ``c``, ``g = e P'/P`` and ``h = g**2 - e**2 P''/P``.
    """

    def __init__(self, lo, c_lo, hi, c_hi, e, c, g, h):  # type: ignore[no-untyped-def]
        self.lm, self.le = lo
        self.hm, self.he = hi
        self.c_lo, self.c_hi = c_lo, c_hi
        self.em, self.ee = e
        self.c, self.g, self.h = c, g, h


def _log2_root_bound(w: np.ndarray, back: np.ndarray) -> float:
    """An upper bound on ``log2`` of the largest root.

    ``prod y_k = 1 / a_S`` with ``a_S`` (the top coefficient's modulus) at least the weight
    product of the greedy maximum independent set, and every other root exceeds ``1 / C_1``.
    """
    picks = _greedy(back)
    return float(-np.sum(np.log2(w[picks])) + (picks.size - 1) * np.log2(np.sum(w)) + 2.0)


def _initial_brackets(chain: _Chain, total: int, want: np.ndarray) -> tuple[_Brackets, int]:
    """Brackets from sweeps over a geometric ladder of points; returns (brackets, sweeps).

    ``sum 1/y_k = C_1`` puts every root above ``1 / C_1``, so the ladder's first point has
    count 0.  The first 64 points grow by factors 8; each further sweep of 64 points takes
    steps 4 times longer in the exponent, until the last count is ``total``: at most
    logarithmically many sweeps in the bound of :func:`_log2_root_bound`.
    """
    m0, e0 = _normal(np.array([0.5 / float(np.sum(chain.w))]), np.zeros(1, dtype=np.int64))
    exps = e0[0] + 3 * np.arange(64, dtype=np.int64)
    bound = _log2_root_bound(chain.w, chain.back)
    lm, le = np.full(64, m0[0]), exps
    counts, g_lad, h_lad = chain.evaluate(lm, le, True)
    sweeps, step = 1, 3
    while counts[-1] < total:
        if le[-1] > bound + 64:
            raise ArithmeticError(
                f"could not bracket the largest root below 2**{bound:.0f} (its proved bound); "
                "the chain evaluation is inconsistent"
            )
        more_e = le[-1] + step * np.arange(1, 65, dtype=np.int64)
        more_m = np.full(64, m0[0])
        c_more, g_more, h_more = chain.evaluate(more_m, more_e, True)
        lm, le = np.concatenate([lm, more_m]), np.concatenate([le, more_e])
        counts = np.concatenate([counts, c_more])
        g_lad, h_lad = np.concatenate([g_lad, g_more]), np.concatenate([h_lad, h_more])
        sweeps += 1
        step = 3 if sweeps < 4 else step * 4
    above = np.searchsorted(counts, want, side="right")  # first ladder point with count > j
    # Start on the side whose count is next to the root, if any (Laguerre needs no more).
    from_lo = counts[above - 1] == want
    start = np.where(from_lo, above - 1, above)
    br = _Brackets(
        (lm[above - 1], le[above - 1]),
        counts[above - 1],
        (lm[above], le[above]),
        counts[above],
        (lm[start], le[start]),
        counts[start],
        g_lad[start],
        h_lad[start],
    )
    return br, sweeps


def _tighten(
    br: _Brackets,
    act: np.ndarray,
    j: np.ndarray,
    total: int,
    pts: tuple[np.ndarray, np.ndarray],
    cnt: np.ndarray,
    g: np.ndarray,
    h: np.ndarray,
) -> None:
    """Use every point evaluated in a sweep for every active root ``act`` (wanted index ``j``).

    The tightest bracket, and as the next Laguerre start the evaluated point next to root j
    (count j below it, or j + 1 above it) whose step is shorter.
    """
    order = np.argsort(cnt, kind="stable")
    pm, pe = pts[0][order], pts[1][order]
    cnt, g, h = cnt[order], g[order], h[order]
    first_up = np.searchsorted(cnt, j, side="right")  # first point with count > j
    below = np.maximum(first_up - 1, 0)
    upper = np.minimum(first_up, pm.size - 1)
    has_below = (first_up > 0) & _less(br.lm[act], br.le[act], pm[below], pe[below])
    has_above = (first_up < pm.size) & _less(pm[upper], pe[upper], br.hm[act], br.he[act])
    br.lm[act] = np.where(has_below, pm[below], br.lm[act])
    br.le[act] = np.where(has_below, pe[below], br.le[act])
    br.c_lo[act] = np.where(has_below, cnt[below], br.c_lo[act])
    br.hm[act] = np.where(has_above, pm[upper], br.hm[act])
    br.he[act] = np.where(has_above, pe[upper], br.he[act])
    br.c_hi[act] = np.where(has_above, cnt[upper], br.c_hi[act])
    step_b = np.abs(_laguerre(cnt[below], g[below], h[below], j, total))
    step_a = np.abs(_laguerre(cnt[upper], g[upper], h[upper], j, total))
    use_below, use_above = np.isfinite(step_b), np.isfinite(step_a)
    pick = np.where(use_below & use_above, step_b <= step_a, use_below)
    idx = np.where(pick, below, upper)
    br.em, br.ee = pm[idx], pe[idx]
    br.c, br.g, br.h = cnt[idx], g[idx], h[idx]


def _step(br: _Brackets, act: np.ndarray, j: np.ndarray, total: int, rtol: float) -> tuple:
    """One Laguerre step (or bisection) for the active roots.

    Returns ``(finished, value, estimate, next_point)`` (numbers as (mantissa, exponent)): a
    root is finished when its Laguerre step stays in the bracket and is at most ``rtol``
    relative, or when its bracket is at most ``rtol`` (or two ulps) wide relative;
    ``estimate`` is the step (at least one ulp) or half the bracket.
    """
    lm, le, hm, he = br.lm[act], br.le[act], br.hm[act], br.he[act]
    delta = _laguerre(br.c, br.g, br.h, j, total)
    ok = np.isfinite(delta)
    cm, ce = _normal(br.em * np.where(ok, 1.0 - delta, 1.0), br.ee)
    above_lo = _less(lm, le, cm, ce)
    below_hi = _less(cm, ce, hm, he)
    inside = ok & above_lo & below_hi
    on_edge = ok & ~_less(cm, ce, lm, le) & ~_less(hm, he, cm, ce)
    step_done = on_edge & (np.abs(delta) <= rtol)
    wm, we = _difference(hm, he, lm, le)
    narrow = np.ldexp(wm / hm, np.clip(we - he, -2000, 8).astype(np.int32)) <= max(rtol, 2 * _EPS)
    finished = step_done | narrow
    mid_m, mid_e = _midpoints(lm, le, hm, he)
    value = (np.where(step_done, cm, mid_m), np.where(step_done, ce, mid_e))
    est_step = _normal(np.maximum(np.abs(delta), _EPS) * np.abs(br.em), br.ee)
    half = _normal(0.5 * wm, we)
    estimate = (
        np.where(step_done, est_step[0], half[0]),
        np.where(step_done, est_step[1], half[1]),
    )
    nxt = (np.where(inside, cm, mid_m), np.where(inside, ce, mid_e))
    return finished, value, estimate, nxt


def _solve(
    chain: _Chain,
    total: int,
    want: np.ndarray,
    tol: float,
    max_sweeps: int,
    progress: ProgressCallback | None,
    seeds: tuple[np.ndarray, np.ndarray] | None,
) -> tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray, np.ndarray, int]:
    """The roots ``want`` of ``chain`` (scaled units): ``(rm, re, em, ee, left, sweeps)``.

    Values ``rm 2**re`` and estimates ``em 2**ee``, ascending in ``want``; ``left`` marks the
    roots not converged within ``max_sweeps`` (their bracket midpoints).  ``seeds`` are extra
    points (normalised mantissas, exponents) evaluated once after the ladder, before the
    first step: they tighten every bracket and serve as Laguerre starts.
    """
    n_want = want.size
    br, sweeps = _initial_brackets(chain, total, want)
    if seeds is not None and seeds[0].size:
        pm, pe = _unique_points(*seeds)
        c_u, g_u, h_u = chain.evaluate(pm, pe, True)
        sweeps += 1
        _tighten(br, np.arange(n_want), want, total, (pm, pe), c_u, g_u, h_u)
    rm, re_ = np.full(n_want, np.nan), np.zeros(n_want, dtype=np.int64)
    em, ee = np.full(n_want, np.inf), np.zeros(n_want, dtype=np.int64)
    done = np.zeros(n_want, dtype=bool)
    act = np.arange(n_want)
    while True:
        finished, value, estimate, nxt = _step(br, act, want[act], total, tol)
        rm[act], re_[act] = value
        em[act], ee[act] = estimate
        done[act] = finished
        if progress is not None:
            progress(sweeps, int(done.sum()), n_want)
        keep = ~finished
        act = act[keep]
        if act.size == 0 or sweeps >= max_sweeps:
            break
        pm, pe = _unique_points(nxt[0][keep], nxt[1][keep])
        c_u, g_u, h_u = chain.evaluate(pm, pe, True)
        sweeps += 1
        _tighten(br, act, want[act], total, (pm, pe), c_u, g_u, h_u)
    left = ~done
    if np.any(left):
        mid = _midpoints(br.lm[left], br.le[left], br.hm[left], br.he[left])
        rm[left], re_[left] = mid
        wm, we = _difference(br.hm[left], br.he[left], br.lm[left], br.le[left])
        em[left], ee[left] = _normal(0.5 * wm, we)
    return rm, re_, em, ee, left, sweeps


def _windows(m: int, length: int, offset: int) -> list[tuple[int, int]]:
    """Consecutive windows ``[a, b)`` of about ``length`` terms covering ``0 .. m``, the
    first cut at ``offset``; a last piece shorter than half a window joins its neighbour."""
    cuts = [0, *range(offset if offset else length, m, length), m]
    cuts = sorted(set(cuts))
    if len(cuts) > 2 and cuts[-1] - cuts[-2] < length // 2:
        del cuts[-2]
    return list(zip(cuts[:-1], cuts[1:], strict=True))


def _window_seeds(chain: _Chain, rtol: float, bar: Any = None) -> tuple[np.ndarray, np.ndarray]:
    """Start points for all roots: the roots of the chain cut into windows, twice.

    The chain is cut into windows of ``L = max(_SEED_WINDOW, M / 32)`` terms, once from the
    start and once shifted by half a window, and each window's roots are found on its own
    (seeded the same way when the window is long; O(M L) in all), the windows spread over
    the cores.  A root whose ratios settle within a few window lengths (random chains:
    Anderson localisation) is a root of one window of each cutting to high accuracy, and
    one of the two cuttings keeps it a quarter window away from any cut.  Seeds are only
    start points: every root is still found, bracketed and converged on the whole chain,
    so they change how many whole-chain evaluations are needed, never the result's
    guarantees.  Values within ``2**-36`` relative are taken once.
    """
    m = chain.w.size
    length = max(_SEED_WINDOW, m // 32)
    spans = _windows(m, length, 0) + _windows(m, length, length // 2)
    workers = 1 if chain.serial else min(len(spans), os.cpu_count() or 1)
    if workers > 1:
        cancel = threading.Event()  # the windows stop at their next poll once it is set

        def run(a: int, b: int) -> tuple[np.ndarray, np.ndarray]:
            with stop_when(cancel.is_set):
                return _window_roots(chain, a, b, rtol)

        with ThreadPoolExecutor(workers) as pool:
            jobs = [pool.submit(run, a, b) for a, b in spans]
            try:
                for i, job in enumerate(jobs):
                    while not job.done():  # this thread's stop hook and Ctrl-C act meanwhile
                        poll()
                        wait([job], timeout=0.1)
                    if bar is not None:
                        bar.set_postfix_str(f"seeds from window {i + 1} of {len(spans)}")
            except BaseException:
                cancel.set()
                for job in jobs:
                    job.cancel()
                raise
        parts = [job.result() for job in jobs]
    else:
        parts = [_window_roots(chain, a, b, rtol) for a, b in spans]
    pm = np.concatenate([p[0] for p in parts])
    pe = np.concatenate([p[1] for p in parts])
    lg = np.log2(pm) + pe
    order = np.argsort(lg)
    pm, pe, lg = pm[order], pe[order], lg[order]
    keep = np.ones(pm.size, dtype=bool)
    keep[1:] = np.diff(lg) > 2.0**-36
    return pm[keep], pe[keep]


def _window_roots(chain: _Chain, a: int, b: int, rtol: float) -> tuple[np.ndarray, np.ndarray]:
    """All roots of the terms ``a .. b - 1`` alone, in the units of ``chain.w``, on one core."""
    back = np.minimum(chain.back[a:b], np.arange(b - a, dtype=np.int64))
    sub = _Chain(chain.w[a:b], back, serial=True)
    total = chain_root_count(b - a, back)
    tol = max(rtol, float(np.sqrt(b - a)) * _EPS)
    seeds = _window_seeds(sub, rtol) if b - a >= _SEED_TERMS else None
    rm, re_, _, _, _, _ = _solve(sub, total, np.arange(total), tol, 100, None, seeds)
    return rm, re_ - sub.shift  # the roots of sub.w, in the units of chain.w


def _wanted(total: int, lowest: int | None) -> np.ndarray:
    """0-based indices (ascending y) of the roots asked for: all, or the ``lowest`` largest."""
    if lowest is None:
        return np.arange(total, dtype=np.int64)
    if isinstance(lowest, bool) or int(lowest) != lowest or not 1 <= int(lowest):
        raise ValueError(f"lowest must be a positive integer, got {lowest!r}")
    return np.arange(max(0, total - int(lowest)), total, dtype=np.int64)


def _unique_points(pm: np.ndarray, pe: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    order = np.lexsort((pm, pe))
    pm, pe = pm[order], pe[order]
    keep = np.ones(pm.size, dtype=bool)
    keep[1:] = (pm[1:] != pm[:-1]) | (pe[1:] != pe[:-1])
    return pm[keep], pe[keep]


def chain_real_roots(
    weights: Any,
    reach: Any,
    lowest: int | None = None,
    *,
    rtol: float = 16 * _EPS,
    max_sweeps: int = 400,
    progress: ProgressCallback | None = None,
) -> RootTable:
    """Roots of the chain polynomial ``P_M`` for real positive weights.

    Parameters
    ----------
    weights : array_like of float
        ``w_k > 0`` in chain order (N = 2 real couplings: ``w_k = c_k**2``).
    reach : int or array_like of int
        p >= 1, or the back-reach array of an indifference ordering (:func:`chain_back`).
    lowest : int, optional
        Return only the ``lowest`` smallest quasi-energies, i.e. the ``lowest`` LARGEST roots y
        (eta = y**(-1/N)).  Each sweep then costs O(M * lowest).
    rtol : float
        Relative size of the last Laguerre step (or of the bracket) at which a root counts as
        converged; at least ``sqrt(M) eps``, the rounding accumulated along the chain, below
        which steps are noise.
    max_sweeps : int
        Give up (``converged=False``, best brackets returned) after this many passes.
    progress : callable, optional
        Called after every sweep as ``progress(sweep, roots_done, roots_wanted)``.

    Returns
    -------
    RootTable
        ``variable="y"``, ascending; ``rigorous=False``: the error bounds are estimates (the
        last Laguerre step, or half the final bracket), method ``"chain-count"``;
        ``sweeps`` counts the sweeps.  When every root lies in float64's normal range
        ``values`` are the roots; otherwise ``values`` are mantissas in [1/2, 1) and
        ``exponents`` their powers of two (``RootTable.true_values``,
        ``RootTable.log_quasi_energies``).  :func:`freeladder.certify_chain_roots`
        turns the bounds into proofs.

    Raises
    ------
    ValueError
        Weights that are not finite and > 0 (the message points to the complex-root path),
        a bad ``reach`` or ``lowest``.

    Notes
    -----
    See the module docstring for the method and for what is proved and what is tested; all
    roots of a chain of ``_SEED_TERMS`` (16384) terms or more start from window seeds (module
    notes), which changes the work (``evaluations`` counts whole-chain evaluations only), not
    the result.  A ``tqdm`` bar shows progress when M times the roots wanted exceeds 10^10.  The
    weights are first divided by the power of two nearest their largest value (exact), so
    the result does not depend on their overall scale.  Interrupting (KeyboardInterrupt) is
    safe: no state outlives the call.

    References
    ----------
    W. Barth, R. S. Martin and J. H. Wilkinson, Numer. Math. 9, 386 (1967) (bisection on a
    count); M. Chudnovsky and P. Seymour, J. Combin. Theory Ser. B 97, 350 (2007) (real roots).

    Examples
    --------
    >>> r = chain_real_roots([1.0, 1.0, 1.0], 1)  # uniform Ising, M = 3: eta = 2 cos(pi k / 5)
    >>> np.allclose(r.values, 1 / (4 * np.cos(np.pi * np.array([1, 2]) / 5) ** 2))
    True
    """
    w, back = _prepare(weights, reach)
    chain = _Chain(w, back)
    total = chain_root_count(w.size, back)
    want = _wanted(total, lowest)
    n_want = want.size
    # rounding along the chain: about sqrt(M) eps relative (see the module notes); steps
    # below it are noise, so it is also the least tolerance
    floor = max(_EPS, float(np.sqrt(w.size)) * _EPS)
    tol = max(float(rtol), floor)
    from tqdm.auto import tqdm  # on use

    with tqdm(
        desc=f"roots of {w.size} terms: points evaluated",
        unit="pt",
        delay=2.0,
        leave=False,
        disable=w.size * n_want < _BAR_WORK,
    ) as bar:
        seeds = None
        if lowest is None and w.size >= _SEED_TERMS:
            seeds = _window_seeds(chain, float(rtol), bar)
            bar.set_postfix_str("")
        chain.bar = bar
        rm, re_, em, ee, left, sweeps = _solve(chain, total, want, tol, max_sweeps, progress, seeds)
    rel = np.ldexp(em / rm, np.clip(ee - re_, -2000, 2000).astype(np.int32))
    raise_ = ~(rel >= floor)
    em, ee = np.where(raise_, rm * floor, em), np.where(raise_, re_, ee)
    re_ -= chain.shift
    ee -= chain.shift
    order = np.lexsort((rm, re_))
    rm, re_, em, ee = rm[order], re_[order], em[order], ee[order]
    converged = not np.any(left)
    message = (
        f"{n_want} of {total} roots, {sweeps} sweeps; error bounds are estimates"
        if converged
        else f"{int(left.sum())} of {n_want} roots not converged after {sweeps} sweeps"
    )
    fits = bool(
        np.all(re_ >= -1020) and np.all(re_ <= 1020) and np.all(ee >= -1020) and np.all(ee <= 1020)
    )
    if fits:
        values, bounds, exponents = _to_float(rm, re_), _to_float(em, ee), np.zeros_like(re_)
    else:  # mantissas with their powers of two; each bound shares its root's exponent
        values, exponents = rm, re_
        bounds = _to_float(em, ee - re_)
    return RootTable(
        values=values,
        error_bounds=bounds,
        variable="y",
        rigorous=False,
        converged=converged,
        message=message,
        method="chain-count",
        evaluations=chain.evaluations,
        count=total,
        sweeps=sweeps,
        indices=want[order],
        exponents=exponents,
    )
