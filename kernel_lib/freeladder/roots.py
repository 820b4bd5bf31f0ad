"""Real roots of exclusion-chain polynomials, computed on the recurrence itself.

API (plain functions on numpy arrays; no Model needed)
-----------------------------------------------------
``chain_real_roots(weights, reach, lowest=None, *, rtol=..., progress=None) -> RootResult``
    All roots (or, with ``lowest=k``, the k LARGEST roots y, i.e. the k smallest
    quasi-energies eta = y**(-1/N)) of ``P_M(y)``, where
    ``P_k = P_{k-1} - y w_k P_{k-p-1}``, ``P_k = 1`` for ``k <= 0``, for real positive
    weights ``w_k`` (N = 2 real couplings: ``w = c**2``), as a
    :class:`~freeladder.root_result.RootResult` (``variable="y"``, ascending, method
    ``"chain-count"``, ``rigorous=False``: the error bounds are estimates, not proofs;
    ``certify.certify_chain_roots`` turns them into proofs).  Raises ``ValueError`` naming the
    first offending index for weights that are not finite and > 0.
``check_chain_weights(weights, reach) -> (float64 array, int)``
    The validation every real-chain function applies.
``chain_count_below(weights, reach, y) -> int64 array``
    Number of negative ratios ``P_k(y) / P_{k-1}(y)`` along the recurrence, for each y
    (the number of roots below y, see Notes).
``chain_root_count(n_terms, reach) -> int``
    ``S = floor((M + p) / (p + 1))``.
``chain_inverse_power_sums(weights, reach) -> (float, float)``
    ``sum_k 1/y_k = C_1`` and ``sum_k 1/y_k**2 = C_1**2 - 2 C_2`` in O(M) (sum-rule checks:
    for N = 2 these are ``sum eta**2`` and ``sum eta**4``).

Method
------
Everything runs on the recurrence, never on expanded coefficients.  With the ratios
``r_k = P_k(y) / P_{k-1}(y)``,

    r_k = 1 - y w_k / (r_{k-1} r_{k-2} ... r_{k-p}),      r_k = 1 for k <= 0,

and the logarithmic derivative ``L_k = P_k'(y) / P_k(y)`` obeys

    L_k = (L_{k-1} - s_k (1/y + L_{k-p-1})) / r_k,       s_k = 1 - r_k,

so one O(M) sweep gives the root count below y (the number of negative ``r_k``) and the
Laguerre step (with ``P''/P``, below), with nothing that can overflow.  A ratio that is
exactly zero (y is a root of ``P_k``) is replaced by ``-2**-300``, the device LAPACK's
bisection (``dstebz``) uses for a zero pivot; it perturbs ``r_k`` by far less than its own
rounding error.

Roots are found by bisection on the count (geometric midpoints while a bracket spans more
than a factor 2) combined with Laguerre's iteration, which for a real-rooted polynomial moves
monotonically and cubically from any point to the neighbouring root on the chosen side, so a
point whose count shows it is next to root j (count j below it, j + 1 above it) is all it
needs.  Every point evaluated in a sweep tightens the brackets of all roots and serves as a
Laguerre start for its two neighbouring roots.  ``P''/P`` comes from the recurrence
differentiated once more.  A sweep evaluates all distinct points at once in a compiled loop
(numba), vectorised over points and split over the cores, in calls short enough that
KeyboardInterrupt stops a long run promptly.  Measured (tests/benchmarks/bench_roots.py):
about 5 point evaluations of O(M) per root.

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
* Reach p >= 2: the count equals the number of roots below y whenever every ``P_{k-1}``
  interlaces ``P_k`` with the smallest root belonging to ``P_k``.  That interlacing is not
  proved here; it is tested (tests/test_roots.py) against certified roots for p = 2, 3.  The
  roots returned are nevertheless checked independently of this property by
  ``certify.certify_chain_roots``, whose proof uses only sign changes and the degree S.
* Real positive roots for positive weights: the frustration graph of a chain is claw-free
  (M. Chudnovsky and P. Seymour, J. Combin. Theory Ser. B 97, 350 (2007)).  Positivity is
  immediate: every term of ``P(y)`` is positive for ``y <= 0``.
* The error bounds are estimates (the last Laguerre step, or half the final bracket), not
  proofs: on long chains they were exceeded by factors up to 30 at the smallest quasi-energy.

References
----------
W. Barth, R. S. Martin and J. H. Wilkinson, "Calculation of the eigenvalues of a symmetric
tridiagonal matrix by the method of bisection", Numer. Math. 9, 386 (1967).
P. Fendley, J. Phys. A 52, 335002 (2019), arXiv:1901.08078 (the reach-2 chain polynomial).
F. C. Alcaraz and R. A. Pimenta, Phys. Rev. B 102, 121101(R) (2020), arXiv:2005.14622.
"""

from __future__ import annotations

from collections.abc import Callable
from typing import Any

import numpy as np
from numba import njit, prange

from .root_result import RootResult

__all__ = [
    "chain_count_below",
    "chain_inverse_power_sums",
    "chain_real_roots",
    "chain_root_count",
    "check_chain_weights",
]

_TINY = 2.0**-300
_BLOCK = 128
_STEPS_PER_CALL = 2e8  # chain steps x points per compiled call: keeps Ctrl-C responsive
_PARALLEL_STEPS = 2e6  # below this, one core is faster than waking the thread pool
_EPS = float(np.finfo(np.float64).eps)

ProgressCallback = Callable[[int, int, int], Any]


@njit(cache=True, boundscheck=False, error_model="numpy")
def _block(
    w: np.ndarray,
    p: int,
    x: np.ndarray,
    b: int,
    deriv: bool,
    counts: np.ndarray,
    first: np.ndarray,
    second: np.ndarray,
) -> None:  # pragma: no cover - compiled
    """One pass over the chain for the points of block ``b`` of ``x`` (see the module notes).

    Writes the count, ``G = P'/P`` and ``H = G**2 - P''/P`` (zero unless ``deriv``).  The
    points of a block share the loop over the chain, so the loop over them vectorises.
    """
    n = x.size
    m = w.size
    start = b * _BLOCK
    size = min(_BLOCK, n - start)
    xs = np.empty(_BLOCK)
    invx = np.empty(_BLOCK)
    for j in range(_BLOCK):
        xs[j] = x[start + min(j, size - 1)]
        invx[j] = 1.0 / xs[j]
    inv_ratio = np.ones((p, _BLOCK))  # 1 / r_{k-1} ... 1 / r_{k-p}, as a ring
    logd = np.zeros((p + 1, _BLOCK))  # L_{k-1} ... L_{k-p-1} (P'/P), as a ring
    curv = np.zeros((p + 1, _BLOCK))  # the same for P''/P
    s = np.empty(_BLOCK)
    negative = np.zeros(_BLOCK)
    for k in range(m):
        wk = w[k]
        for j in range(_BLOCK):
            s[j] = xs[j] * wk
        for i in range(p):
            row = inv_ratio[i]
            for j in range(_BLOCK):
                s[j] *= row[j]
        out = inv_ratio[k % p]
        if deriv:
            l_new = logd[k % (p + 1)]  # holds L_{k-p-1} until overwritten by L_k
            l_prev = logd[(k + p) % (p + 1)]
            q_new = curv[k % (p + 1)]
            q_prev = curv[(k + p) % (p + 1)]
            for j in range(_BLOCK):
                r = 1.0 - s[j]
                r = r if abs(r) >= _TINY else -_TINY
                negative[j] += 1.0 if r < 0.0 else 0.0
                inv = 1.0 / r
                out[j] = inv
                l_old = l_new[j]
                l_new[j] = (l_prev[j] - s[j] * (invx[j] + l_old)) * inv
                q_new[j] = (q_prev[j] - s[j] * (2.0 * l_old * invx[j] + q_new[j])) * inv
        else:
            for j in range(_BLOCK):
                r = 1.0 - s[j]
                r = r if abs(r) >= _TINY else -_TINY
                negative[j] += 1.0 if r < 0.0 else 0.0
                out[j] = 1.0 / r
    last = (m - 1) % (p + 1)
    for j in range(size):
        counts[start + j] = np.int64(negative[j])
        g = logd[last, j]
        first[start + j] = g
        second[start + j] = g * g - curv[last, j]


@njit(cache=True, parallel=True)
def _sweep_parallel(
    w: np.ndarray,
    p: int,
    x: np.ndarray,
    deriv: bool,
    counts: np.ndarray,
    first: np.ndarray,
    second: np.ndarray,
) -> None:  # pragma: no cover - compiled
    """All blocks of ``x``, split over the cores."""
    for b in prange((x.size + _BLOCK - 1) // _BLOCK):
        _block(w, p, x, b, deriv, counts, first, second)


@njit(cache=True)
def _sweep_serial(
    w: np.ndarray,
    p: int,
    x: np.ndarray,
    deriv: bool,
    counts: np.ndarray,
    first: np.ndarray,
    second: np.ndarray,
) -> None:  # pragma: no cover - compiled
    """All blocks of ``x`` on one core (small jobs: no thread start-up).

    A copy of :func:`_sweep_parallel` on purpose: numba's on-disk cache is keyed by the Python
    function and not by the ``parallel`` flag, so one body compiled twice would load one
    machine code for both.
    """
    for b in range((x.size + _BLOCK - 1) // _BLOCK):
        _block(w, p, x, b, deriv, counts, first, second)


def check_chain_weights(weights: Any, reach: Any) -> tuple[np.ndarray, int]:
    """Validate real positive weights and the reach; return a contiguous float64 copy.

    Raises ``ValueError`` naming the first offending index (the message points to the
    complex-root path for weights that are complex, zero or negative).
    """
    if isinstance(reach, bool) or int(reach) != reach or int(reach) < 1:
        raise ValueError(f"reach must be an integer >= 1, got {reach!r}")
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
    return w, int(reach)


def chain_root_count(n_terms: int, reach: int) -> int:
    """Number of roots ``S = floor((M + p) / (p + 1))`` of a chain with all weights non-zero.

    It is the independence number of the p-th power of a path on M vertices (common practice).
    """
    return (int(n_terms) + int(reach)) // (int(reach) + 1)


def _evaluate(
    w: np.ndarray, p: int, x: np.ndarray, deriv: bool
) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Counts, ``G = P'/P`` and ``H = G**2 - P''/P`` at every point of ``x`` (float64, > 0).

    Runs in compiled calls of bounded length so that KeyboardInterrupt is seen promptly.
    """
    x = np.ascontiguousarray(x, dtype=np.float64)
    counts = np.empty(x.size, dtype=np.int64)
    first = np.empty(x.size)
    second = np.empty(x.size)
    chunk = max(2 * _BLOCK, int(_STEPS_PER_CALL / w.size) // _BLOCK * _BLOCK)
    for a in range(0, x.size, chunk):
        b = min(a + chunk, x.size)
        parallel = b - a > _BLOCK and (b - a) * w.size > _PARALLEL_STEPS
        sweep = _sweep_parallel if parallel else _sweep_serial
        sweep(w, p, x[a:b], deriv, counts[a:b], first[a:b], second[a:b])
    return counts, first, second


def chain_count_below(weights: Any, reach: int, y: Any) -> np.ndarray:
    """Number of negative ratios ``P_k(y) / P_{k-1}(y)``, k = 1..M, for each y.

    This is the number of roots of ``P_M`` below y: proved for reach 1 (Sturm / inertia
    count), tested for reach 2 and 3 (see the module notes).  O(M) per point.

    Parameters
    ----------
    weights : array_like of float
        ``w_k > 0`` in chain order.
    reach : int
        p >= 1.
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
    w, p = check_chain_weights(weights, reach)
    y_arr = np.asarray(y, dtype=np.float64)
    if not np.all(np.isfinite(y_arr)):
        raise ValueError("evaluation points must be finite")
    flat = y_arr.ravel()
    out = np.zeros(flat.size, dtype=np.int64)
    pos = flat > 0
    if np.any(pos):
        out[pos] = _evaluate(w, p, flat[pos], False)[0]
    return out.reshape(y_arr.shape)


def chain_inverse_power_sums(weights: Any, reach: int) -> tuple[float, float]:
    """``sum 1/y_k = C_1`` and ``sum 1/y_k**2 = C_1**2 - 2 C_2`` from the weights, in O(M).

    ``C_1 = sum w_j``; ``C_2`` sums ``w_i w_j`` over pairs with ``j - i > p`` (pairs of
    independent terms).  Both follow from ``P(y) = prod (1 - y / y_k)`` (Newton's identities).
    For N = 2 they are ``sum eta**2`` and ``sum eta**4``.
    """
    w, p = check_chain_weights(weights, reach)
    c1 = float(np.sum(w))
    near = sum(float(np.dot(w[:-d], w[d:])) for d in range(1, min(p, w.size - 1) + 1))
    c2 = 0.5 * (c1 * c1 - float(np.dot(w, w))) - near
    return c1, c1 * c1 - 2.0 * c2


def _midpoints(lo: np.ndarray, hi: np.ndarray) -> np.ndarray:
    """Geometric midpoints of wide brackets, arithmetic ones of narrow brackets (no overflow)."""
    wide = hi > 2.0 * lo
    return np.where(wide, np.sqrt(lo) * np.sqrt(hi), 0.5 * (lo + hi))


def _laguerre(
    e: np.ndarray, c: np.ndarray, g: np.ndarray, h: np.ndarray, j: np.ndarray, degree: int
) -> np.ndarray:
    """Laguerre's step from ``e`` towards root ``j`` (0-based), or NaN if ``e`` is not next to it.

    ``c`` is the count at ``e``; ``g = P'/P`` and ``h = sum 1 / (e - y_i)**2`` there.  For a
    real-rooted polynomial of degree n the two Laguerre iterates
    ``e - n / (g -+ sqrt((n - 1) (n h - g**2)))`` lie between ``e`` and its two neighbouring
    roots, and the iteration converges to them monotonically and cubically (common practice;
    A. M. Ostrowski, Solution of Equations in Euclidean and Banach Spaces, Academic Press 1973,
    ch. 11).  So the upward iterate serves root ``c`` and the downward one root ``c - 1``.
    Returns NaN where ``e`` is not next to root ``j`` or is nearer its other neighbour.
    """
    n = float(degree)
    disc = np.sqrt(np.maximum((n - 1.0) * (n * h - g * g), 0.0))
    with np.errstate(divide="ignore", invalid="ignore"):
        upward = e - n / (g - disc)
        downward = e - n / (g + disc)
    # A point just above root j - 1 has a tiny upward step too (it escapes slowly), so a step
    # is offered only from a point nearer its target: G < 0 below a root, G > 0 above it.
    return np.where((c == j) & (g < 0), upward, np.where((c == j + 1) & (g > 0), downward, np.nan))


class _Brackets:
    """Per wanted root: the bracket ``[lo, hi]`` with its counts and a Laguerre start ``e``.

    ``e`` is an evaluated point next to the root (count ``j`` below it or ``j + 1`` above it)
    with its count ``c``, ``g = P'/P`` and ``h = G**2 - P''/P`` there.
    """

    def __init__(self, lo, c_lo, hi, c_hi, e, c, g, h):  # type: ignore[no-untyped-def]
        self.lo, self.c_lo, self.hi, self.c_hi = lo, c_lo, hi, c_hi
        self.e, self.c, self.g, self.h = e, c, g, h


def _initial_brackets(
    w: np.ndarray, p: int, total: int, want: np.ndarray
) -> tuple[_Brackets, int, int]:
    """Brackets from one sweep over a geometric ladder of points; returns (brackets, evals, sweeps).

    ``sum 1/y_k = C_1`` puts every root above ``1 / C_1``, so the ladder's first point has
    count 0.  The ladder grows by factors ``8**64`` until its last count is ``total``; that
    ends within float64 range or raises ``ArithmeticError`` (a bounded loop).
    """
    ladder = (0.5 / float(np.sum(w))) * 8.0 ** np.arange(0, 64)
    counts, g_lad, h_lad = _evaluate(w, p, ladder, True)
    evaluations, sweeps = ladder.size, 1
    while counts[-1] < total:
        if not np.isfinite(ladder[-1] * 8.0**64):
            raise ArithmeticError("could not bracket the largest root within float64 range")
        more = ladder[-1] * 8.0 ** np.arange(1, 65)
        c_more, g_more, h_more = _evaluate(w, p, more, True)
        ladder = np.concatenate([ladder, more])
        counts = np.concatenate([counts, c_more])
        g_lad, h_lad = np.concatenate([g_lad, g_more]), np.concatenate([h_lad, h_more])
        evaluations, sweeps = evaluations + more.size, sweeps + 1
    above = np.searchsorted(counts, want, side="right")  # first ladder point with count > j
    # Start on the side whose count is next to the root, if any (Laguerre needs no more).
    from_lo = counts[above - 1] == want
    start = np.where(from_lo, above - 1, above)
    br = _Brackets(
        ladder[above - 1],
        counts[above - 1],
        ladder[above],
        counts[above],
        ladder[start],
        counts[start],
        g_lad[start],
        h_lad[start],
    )
    return br, evaluations, sweeps


def _tighten(
    br: _Brackets,
    act: np.ndarray,
    j: np.ndarray,
    total: int,
    pts: np.ndarray,
    cnt: np.ndarray,
    g: np.ndarray,
    h: np.ndarray,
) -> None:
    """Use every point evaluated in a sweep for every active root ``act`` (wanted index ``j``).

    The tightest bracket, and as the next Laguerre start the evaluated point next to root j
    (count j below it, or j + 1 above it) whose step is shorter.
    """
    order = np.argsort(cnt, kind="stable")
    pts, cnt, g, h = pts[order], cnt[order], g[order], h[order]
    first_up = np.searchsorted(cnt, j, side="right")  # first point with count > j
    below = np.maximum(first_up - 1, 0)
    upper = np.minimum(first_up, pts.size - 1)
    has_below = (first_up > 0) & (pts[below] > br.lo[act])
    has_above = (first_up < pts.size) & (pts[upper] < br.hi[act])
    br.lo[act] = np.where(has_below, pts[below], br.lo[act])
    br.c_lo[act] = np.where(has_below, cnt[below], br.c_lo[act])
    br.hi[act] = np.where(has_above, pts[upper], br.hi[act])
    br.c_hi[act] = np.where(has_above, cnt[upper], br.c_hi[act])
    step_b = np.abs(_laguerre(pts[below], cnt[below], g[below], h[below], j, total) - pts[below])
    step_a = np.abs(_laguerre(pts[upper], cnt[upper], g[upper], h[upper], j, total) - pts[upper])
    use_below, use_above = np.isfinite(step_b), np.isfinite(step_a)
    pick = np.where(use_below & use_above, step_b <= step_a, use_below)
    idx = np.where(pick, below, upper)
    br.e, br.c, br.g, br.h = pts[idx], cnt[idx], g[idx], h[idx]


def _step(
    br: _Brackets, act: np.ndarray, j: np.ndarray, total: int, rtol: float
) -> tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray]:
    """One Laguerre step (or bisection) for the active roots.

    Returns ``(finished, value, estimate, next_point)``: a root is finished when its Laguerre
    step stays in the bracket and is at most ``rtol`` relative, or when its bracket is two
    ulps wide; ``estimate`` is the step (at least one ulp) or half the bracket.
    """
    lo, hi = br.lo[act], br.hi[act]
    cand = _laguerre(br.e, br.c, br.g, br.h, j, total)
    inside = (cand > lo) & (cand < hi)
    step = np.abs(cand - br.e)
    step_done = np.isfinite(cand) & (cand >= lo) & (cand <= hi) & (step <= rtol * br.e)
    width = hi - lo
    finished = step_done | (width <= 2 * _EPS * hi)
    value = np.where(step_done, cand, 0.5 * (lo + hi))
    estimate = np.where(step_done, np.maximum(step, _EPS * np.abs(cand)), 0.5 * width)
    return finished, value, estimate, np.where(inside, cand, _midpoints(lo, hi))


def _wanted(total: int, lowest: int | None) -> np.ndarray:
    """0-based indices (ascending y) of the roots asked for: all, or the ``lowest`` largest."""
    if lowest is None:
        return np.arange(total, dtype=np.int64)
    if isinstance(lowest, bool) or int(lowest) != lowest or not 1 <= int(lowest):
        raise ValueError(f"lowest must be a positive integer, got {lowest!r}")
    return np.arange(max(0, total - int(lowest)), total, dtype=np.int64)


def chain_real_roots(
    weights: Any,
    reach: int,
    lowest: int | None = None,
    *,
    rtol: float = 16 * _EPS,
    max_sweeps: int = 400,
    progress: ProgressCallback | None = None,
) -> RootResult:
    """Roots of the chain polynomial ``P_M`` for real positive weights.

    Parameters
    ----------
    weights : array_like of float
        ``w_k > 0`` in chain order (N = 2 real couplings: ``w_k = c_k**2``).
    reach : int
        p >= 1.
    lowest : int, optional
        Return only the ``lowest`` smallest quasi-energies, i.e. the ``lowest`` LARGEST roots y
        (eta = y**(-1/N)).  Each sweep then costs O(M * lowest).
    rtol : float
        Relative size of the last Laguerre step at which a root counts as converged.
    max_sweeps : int
        Give up (``converged=False``, best brackets returned) after this many passes.
    progress : callable, optional
        Called after every sweep as ``progress(sweep, roots_done, roots_wanted)``.

    Returns
    -------
    RootResult
        ``variable="y"``, ascending; ``rigorous=False``: the error bounds are estimates (the
        last Laguerre step, or half the final bracket), method ``"chain-count"``;
        ``iterations`` counts the sweeps.  :func:`freeladder.certify.certify_chain_roots`
        turns them into proofs.

    Raises
    ------
    ValueError
        Weights that are not finite and > 0 (the message points to the complex-root path),
        a bad ``reach`` or ``lowest``.

    Notes
    -----
    See the module docstring for the method and for what is proved and what is tested.  The
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
    w, p = check_chain_weights(weights, reach)
    shift = int(np.frexp(np.max(w))[1])
    w = np.ldexp(w, -shift)  # exact: the roots of the scaled chain are y * 2**shift
    total = chain_root_count(w.size, p)
    want = _wanted(total, lowest)
    n_want = want.size
    br, evaluations, sweeps = _initial_brackets(w, p, total, want)
    roots = np.full(n_want, np.nan)
    errors = np.full(n_want, np.inf)
    done = np.zeros(n_want, dtype=bool)
    act = np.arange(n_want)
    while True:
        finished, value, estimate, nxt = _step(br, act, want[act], total, rtol)
        roots[act], errors[act], done[act] = value, estimate, finished
        if progress is not None:
            progress(sweeps, int(done.sum()), n_want)
        act, nxt = act[~finished], nxt[~finished]
        if act.size == 0 or sweeps >= max_sweeps:
            break
        unique = np.unique(nxt)
        c_u, g_u, h_u = _evaluate(w, p, unique, True)
        evaluations += unique.size
        sweeps += 1
        _tighten(br, act, want[act], total, unique, c_u, g_u, h_u)
    left = ~done
    roots[left] = 0.5 * (br.lo[left] + br.hi[left])
    errors[left] = 0.5 * (br.hi[left] - br.lo[left])
    order = np.argsort(roots, kind="stable")
    converged = not np.any(left)
    message = (
        f"{n_want} of {total} roots, {sweeps} sweeps; error bounds are estimates"
        if converged
        else f"{int(left.sum())} of {n_want} roots not converged after {sweeps} sweeps"
    )
    return RootResult(
        values=np.ldexp(roots[order], -shift),
        error_bounds=np.ldexp(errors[order], -shift),
        variable="y",
        rigorous=False,
        converged=converged,
        message=message,
        method="chain-count",
        evaluations=evaluations,
        count=total,
        iterations=sweeps,
        indices=want[order],
    )
