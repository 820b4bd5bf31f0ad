"""Power sums of the quasi-energies against the exclusion polynomial, in ball arithmetic.

With ``x_k = eta_k^N = 1 / y_k`` the exclusion polynomial factors as
``P(y) = sum_s (-y)^s C_s = prod_k (1 - y x_k)``, so ``C_s`` is the s-th elementary symmetric
function of the ``x_k`` and Newton's identities give the power sums ``p_j = sum_k x_k^j`` from
``C_1 .. C_j`` (positive moments, ruled by the largest quasi-energies) and the power sums
``sum_k x_k^-j`` from ``C_S, C_{S-1} .. C_{S-j}`` (negative moments, ruled by the smallest).

For an ordering of the terms with per-position back-reach ``b_k`` (exclusion chains and
indifference orders) the coefficients follow ``I_k(x) = I_{k-1}(x) + x w_k I_{k-b_k-1}(x)``
(``I(x) = P(-x)``), and only the lowest and the highest ``moments + 1`` coefficients of each
``I_k`` are carried: O(M * moments) ball operations, whatever the degree.  Every number is a
ball (python-flint ``arb``/``acb``) that contains the exact value, so two sides whose balls do
not overlap prove a discrepancy, and a quasi-energy moved by more than its error bound moves
its side by more than the radius: the comparison is decisive for the roots.

References
----------
I. G. Macdonald, Symmetric Functions and Hall Polynomials, 2nd ed. (Oxford, 1995), ch. I.2
(Newton's identities); F. Johansson, IEEE Trans. Comput. 66, 1281 (2017) (Arb: ball
arithmetic); the recurrence: P. Fendley, J. Phys. A 52, 335002 (2019) and F. C. Alcaraz and
R. A. Pimenta, Phys. Rev. B 102, 121101(R) (2020).
"""

from __future__ import annotations

import math
from collections.abc import Callable, Sequence
from dataclasses import dataclass
from typing import TYPE_CHECKING, Any

import numpy as np

if TYPE_CHECKING:
    import flint
else:
    from ..base.lazy import flint

__all__ = ["MOMENTS", "MomentComparison", "compare_moments"]

MOMENTS = 8
"""Number of positive and of negative moments compared."""

_STEP = 2048  # positions between progress reports


@dataclass(frozen=True)
class MomentComparison:
    """Moments of the roots against the polynomial's.

    Attributes
    ----------
    orders : tuple of int
        ``j`` for ``sum x^j`` (negative for the negative moments).
    deviation : float
        Largest ``|roots - polynomial| / |polynomial|`` over the orders (ball midpoints).
    radius : float
        Largest combined radius relative to ``|polynomial|`` (what rounding and the roots'
        error bounds allow).
    overlap : bool
        Every pair of balls overlaps (no proven discrepancy).
    worst : int
        The order with the largest ``deviation / radius``.
    skipped : str
        Why the negative moments were left out (empty when they ran).
    precision : int
        Bits of the ball arithmetic.
    """

    orders: tuple[int, ...]
    deviation: float
    radius: float
    overlap: bool
    worst: int
    skipped: str
    precision: int


def _ball(v: Any, complex_: bool) -> Any:
    """The exact value of a float / complex / Fraction / int as a ball."""
    if isinstance(v, complex):
        return flint.acb(flint.arb(v.real), flint.arb(v.imag))
    if hasattr(v, "numerator") and not isinstance(v, float):
        num, den = int(v.numerator), int(v.denominator)
        out = flint.arb(num) / den if den != 1 else flint.arb(num)
    else:
        out = flint.arb(float(v))
    return flint.acb(out) if complex_ else out


def _newton(e: Sequence[Any], count: int) -> list[Any]:
    """Power sums ``p_1 .. p_count`` from elementary symmetric functions ``e[1..count]``."""
    p: list[Any] = []
    for k in range(1, count + 1):
        total = e[k] * k * (1 if k % 2 else -1)
        for i in range(1, k):
            term = e[i] * p[k - i - 1]
            total = total + term if i % 2 else total - term
        p.append(total)
    return p


def _windows(
    weights: Sequence[Any],
    back: np.ndarray,
    moments: int,
    progress: Callable[[int, int], Any] | None,
) -> tuple[list[Any], list[Any], int]:
    """Lowest and highest ``moments + 1`` coefficients of ``I_M`` and its degree S."""
    size = len(weights)
    keep = moments + 1
    span = int(back.max()) + 2 if size else 2
    zero = weights[0] * 0 if size else flint.arb(0)
    one = zero + 1
    # ring buffers of the prefixes I_{k}, k = -1 .. M-1 (index k + 1 modulo span)
    low: list[list[Any]] = [[zero] * keep for _ in range(span)]
    high: list[list[Any]] = [[zero] * keep for _ in range(span)]
    deg = [0] * span
    low[0][0] = one
    high[0][0] = one
    for k in range(size):
        prev, far = k % span, (k - int(back[k])) % span  # I_{k-1}, I_{k-b-1}
        w = weights[k]
        a, b = low[prev], low[far]
        new_low = [a[0]] + [a[i] + w * b[i - 1] for i in range(1, keep)]
        d_prev, d_far = deg[prev], deg[far] + 1
        d = max(d_prev, d_far)
        sa, sb = d - d_prev, d - d_far  # shifts of the two top windows
        ha, hb = high[prev], high[far]
        new_high = []
        for i in range(keep):
            v = zero
            if i - sa >= 0:
                v = ha[i - sa]
            if i - sb >= 0:
                v = v + w * hb[i - sb]
            new_high.append(v)
        slot = (k + 1) % span
        low[slot], high[slot], deg[slot] = new_low, new_high, d
        if progress is not None and (k % _STEP == 0 or k == size - 1):
            progress(k + 1, 2 * size)
    last = size % span
    return low[last], high[last], deg[last]


def compare_moments(
    couplings: Sequence[Any],
    back: np.ndarray,
    eta: np.ndarray,
    bounds: np.ndarray,
    states: int,
    moments: int = MOMENTS,
    progress: Callable[[int, int], Any] | None = None,
) -> MomentComparison:
    """Power sums of ``x_k = eta_k^N`` against those of the recurrence's polynomial.

    Parameters
    ----------
    couplings : sequence
        The couplings ``c_k`` in the order of the recurrence (int, Fraction, float or
        complex); the weights ``w_k = c_k^N`` are formed in ball arithmetic.
    back : numpy.ndarray of int
        Per-position back-reach of the recurrence.
    eta, bounds : numpy.ndarray
        The quasi-energies and, per quasi-energy, a bound on the distance to an N-th root of
        the exact ``1 / y_k``.
    states : int
        N.
    moments : int
        How many positive (and negative) moments.
    progress : callable, optional
        ``progress(done, total)``.

    Returns
    -------
    MomentComparison
    """
    size = len(couplings)
    complex_ = np.iscomplexobj(eta) or any(isinstance(c, complex) for c in couplings)
    old = flint.ctx.prec
    # Newton's identities cancel about log2(C_i p_{j-i} / p_j) <= j log2(M + 2) bits
    flint.ctx.prec = 96 + 2 * moments * max(1, math.ceil(math.log2(size + 2)))
    try:
        w = [_ball(c, complex_) ** states for c in couplings]
        low, high, degree = _windows(w, np.asarray(back, dtype=np.int64), moments, progress)
        count = min(moments, degree)
        positive = _newton(low, count)
        skipped = ""
        negative: list[Any] = []
        tiny = bool(np.any(np.abs(eta) < np.finfo(float).tiny))
        if len(eta) != degree:
            skipped = f"{len(eta)} quasi-energies for a polynomial of degree {degree}"
        elif tiny:
            skipped = "a quasi-energy below float64's normal range"
        elif high[0].contains(0):
            skipped = "the leading coefficient's ball contains 0"
        else:
            top = [high[0] / high[0]] + [high[i] / high[0] for i in range(1, count + 1)]
            negative = _newton(top, count)
        xs: list[Any] = []
        # a bound below a few units in the last place of the float eta_k is an estimate too
        # tight to hold through the rounding of eta_k itself: widen it to 4 ulp
        floor = 4 * np.finfo(float).eps * np.abs(eta)
        bounds = np.maximum(np.asarray(bounds, float), floor)
        for e, r in zip(eta.tolist(), bounds.tolist(), strict=True):
            if complex_:
                xs.append(
                    flint.acb(flint.arb(complex(e).real, r), flint.arb(complex(e).imag, r))
                    ** states
                )
            else:
                xs.append(flint.arb(float(e), float(r)) ** states)
        sums_pos = [xs[0] * 0 if xs else w[0] * 0 for _ in range(count)]
        sums_neg = list(sums_pos) if negative else []
        half = max(1, len(xs) // 8)
        for n_done, x in enumerate(xs, start=1):
            power = x
            for j in range(count):
                sums_pos[j] += power
                power = power * x
            if negative:
                inv = 1 / x
                power = inv
                for j in range(count):
                    sums_neg[j] += power
                    power = power * inv
            if progress is not None and (n_done % half == 0 or n_done == len(xs)):
                progress(size + (size * n_done) // max(len(xs), 1), 2 * size)
        orders: list[int] = []
        worst_ratio, worst, dev_max, rad_max, overlap = -1.0, 0, 0.0, 0.0, True
        pairs = [(j + 1, sums_pos[j], positive[j]) for j in range(count)]
        pairs += [(-(j + 1), sums_neg[j], negative[j]) for j in range(len(negative))]
        for order, got, want in pairs:
            orders.append(order)
            diff = got - want
            overlap = overlap and bool(diff.contains(0))
            rel = diff / want.mid() if not want.mid().contains(0) else diff
            dev, rad = _mid_abs(rel, complex_), _rad(rel, complex_)
            dev_max, rad_max = max(dev_max, dev), max(rad_max, rad)
            ratio = dev / rad if rad > 0 else (math.inf if dev > 0 else 0.0)
            if ratio > worst_ratio:
                worst_ratio, worst = ratio, order
        return MomentComparison(
            tuple(orders), dev_max, rad_max, overlap, worst, skipped, int(flint.ctx.prec)
        )
    finally:
        flint.ctx.prec = old


def _mid_abs(v: Any, complex_: bool) -> float:
    return float(abs(v.mid())) if complex_ else abs(float(v.mid()))


def _rad(v: Any, complex_: bool) -> float:
    if complex_:
        return float(v.real.rad()) + float(v.imag.rad())
    return float(v.rad())
