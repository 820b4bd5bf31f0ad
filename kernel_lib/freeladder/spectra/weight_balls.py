"""Certified edge weights: the weights of the edge expansion as balls, for exact couplings.

Where every coupling of the edge term's component is exact (int, Fraction, or a sympy
rational or Gaussian rational), the chain polynomials ``P = P_M`` and ``P_a = P_{M-1}`` (the
chain without the edge term, which comes last) are built exactly (python-flint ``fmpq_poly``;
pairs of them for Gaussian rationals) by the recurrence ``P_k = P_{k-1} - y w_k P_{k-b-1}``,
``w = c^N``.  The roots of ``P`` are isolated in certified balls (the library's one isolation,
:func:`freeladder.roots.certify.certified_roots`, here keeping its arb balls), and

    W_k = -P_a(y_k) / (y_k P'(y_k))

is evaluated in acb ball arithmetic at those balls: each ball is proved to hold its weight.
``w_0`` is exact: the ratio of the top coefficients when ``P_a`` and ``P`` have one degree,
else 0.  ``w_0 + sum W_k = 1`` is an identity (the residues of ``P_a(y) / (y P(y))`` at 0, at
the roots and at infinity sum to zero); the ball of the sum is checked to contain 1.

References
----------
P. Fendley, J. Phys. A 52, 335002 (2019) (the edge operator and the modes); F. Johansson,
"Arb: efficient arbitrary-precision midpoint-radius interval arithmetic", IEEE Trans.
Comput. 66, 1281 (2017).
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass
from fractions import Fraction
from typing import TYPE_CHECKING, Any

import numpy as np

from ..base.frozen import ArrayRecord
from ..base.jsonready import json_ready
from ..base.scalars import is_exact_scalar, to_fmpq
from ..roots import certify

if TYPE_CHECKING:
    import flint
    import sympy
else:
    from ..base.lazy import flint, sympy

__all__ = ["WeightBalls"]

AUTO_DEGREE = 24  # edge_expansion certifies on its own up to this degree of P

_Exact = Fraction | tuple[Fraction, Fraction]


@dataclass(frozen=True)
class WeightBalls(ArrayRecord):
    """The edge weights ``W_k`` in proved balls (see the module docstring).

    Attributes
    ----------
    roots : numpy.ndarray of complex
        ``y_k`` (ball midpoints rounded to float64), by decreasing ``|y|`` (the order of
        :attr:`EdgeExpansion.weights`), then angle.
    root_radii : numpy.ndarray
        Proved bounds on ``|y_k - roots[k]|``.
    weights : numpy.ndarray
        ``W_k`` (ball midpoints; float when every ``w = c^N`` is rational).
    radii : numpy.ndarray
        Proved bounds on ``|W_k - weights[k]|``.
    zero_weight : Fraction or (Fraction, Fraction)
        ``w_0``, exact (a Gaussian rational as its real and imaginary parts).
    total : float or complex
        Midpoint of the ball of ``w_0 + sum W_k``.
    total_radius : float
        Its radius (a proved bound).
    sum_is_one : bool
        Whether 1 lies in that ball (the identity ``w_0 + sum W_k = 1`` holds to within it).
    precision : int
        Bits of the ball arithmetic.
    agreement : float or None
        Set by :func:`freeladder.edge_expansion`: the largest ``|W_float - W_ball|`` over the
        float64 weight's error estimate plus the ball's radius (at most 1: every float weight
        lies within its stated error of its ball); None when not compared.
    """

    roots: np.ndarray
    root_radii: np.ndarray
    weights: np.ndarray
    radii: np.ndarray
    zero_weight: _Exact
    total: float | complex
    total_radius: float
    sum_is_one: bool
    precision: int
    agreement: float | None = None

    ARRAYS = ("roots", "root_radii", "weights", "radii")

    @property
    def verified(self) -> bool:
        """The sum contains 1 and (when compared) every float weight agrees with its ball."""
        return self.sum_is_one and (self.agreement is None or self.agreement <= 1.0)

    def to_dict(self) -> dict[str, Any]:
        """JSON-ready fields (complex numbers as ``[re, im]``; the exact ``w_0`` also as text)."""
        out = self.fields()
        out["zero_weight_exact"] = _exact_text(self.zero_weight)
        out["verified"] = self.verified
        return json_ready(out)  # type: ignore[no-any-return]

    def __repr__(self) -> str:
        worst = float(np.max(self.radii)) if self.radii.size else 0.0
        agree = "" if self.agreement is None else f", float weights within {self.agreement:.2g}"
        return (
            f"WeightBalls({self.weights.size} weights, radii <= {worst:.2g}, exact zero weight "
            f"{_exact_text(self.zero_weight)}, sum contains 1: {self.sum_is_one}{agree})"
        )


def _exact_text(v: _Exact) -> str:
    if isinstance(v, tuple):
        return f"{v[0]} + {v[1]} i"
    return str(v)


def _exact_coupling(c: Any, floats: bool) -> Fraction | tuple[Fraction, Fraction] | None:
    """int, Fraction, or a sympy rational / Gaussian rational as exact parts (with ``floats``,
    a float or complex as the binary fractions it is); else None."""
    if floats and isinstance(c, (float, complex, np.floating, np.complexfloating)):
        z = complex(c)
        return (Fraction(z.real), Fraction(z.imag)) if z.imag != 0 else Fraction(z.real)
    if isinstance(c, bool) or not is_exact_scalar(c):
        return None
    if isinstance(c, sympy.Basic):
        if c.free_symbols:
            return None
        re, im = c.as_real_imag()
        if not (re.is_Rational and im.is_Rational):
            return None
        fr = Fraction(int(re.p), int(re.q))
        fi = Fraction(int(im.p), int(im.q))
        return (fr, fi) if fi != 0 else fr
    return Fraction(int(c)) if isinstance(c, (int, np.integer)) else Fraction(c)


def exact_chain_weights(
    couplings: Sequence[Any], states: int, floats: bool = False
) -> list[_Exact] | None:
    """``w_j = c_j^N`` exactly, or None when some coupling is not an exact (Gaussian) rational
    (with ``floats``: floats and complex floats count, as the binary fractions they are)."""
    out: list[_Exact] = []
    for c in couplings:
        v = _exact_coupling(c, floats)
        if v is None:
            return None
        re, im = v if isinstance(v, tuple) else (v, Fraction(0))
        pr, pi = Fraction(1), Fraction(0)
        for _ in range(int(states)):
            pr, pi = pr * re - pi * im, pr * im + pi * re
        out.append((pr, pi) if pi != 0 else pr)
    return out


def _chain_polys(w: Sequence[_Exact], back: np.ndarray) -> tuple[Any, Any, Any, Any, bool]:
    """Real and imaginary parts of ``P_{M-1}`` and ``P_M`` (fmpq_poly), and whether complex."""
    gauss = any(isinstance(v, tuple) for v in w)
    y = flint.fmpq_poly([0, 1])
    zero, one = flint.fmpq_poly([0]), flint.fmpq_poly([1])
    re, im = [one], [zero]  # index k + 1 holds P_k; index 0 is P_{-1} = 1
    for k, v in enumerate(w):
        a, b = v if isinstance(v, tuple) else (v, Fraction(0))
        fa, fb = to_fmpq(a), to_fmpq(b)
        j = k - int(back[k])
        re.append(re[k] - y * (fa * re[j] - fb * im[j]))
        im.append(im[k] - y * (fa * im[j] + fb * re[j]))
    m = len(w)
    return re[m - 1], im[m - 1], re[m], im[m], gauss


def _acb_poly(re: Any, im: Any) -> Any:
    n = max(re.degree(), im.degree()) + 1
    return flint.acb_poly(
        [flint.acb(flint.arb(re[i]), flint.arb(im[i])) for i in range(n)]  # at ctx.prec
    )


def _exact_ratio(a: tuple[Any, Any], b: tuple[Any, Any]) -> _Exact:
    """``a / b`` for Gaussian rationals given as fmpq pairs."""
    ar, ai = (Fraction(int(x.p), int(x.q)) for x in a)
    br, bi = (Fraction(int(x.p), int(x.q)) for x in b)
    d = br * br + bi * bi
    re, im = (ar * br + ai * bi) / d, (ai * br - ar * bi) / d
    return (re, im) if im != 0 else re


def weight_balls(
    weights: Sequence[_Exact],
    back: Sequence[int] | np.ndarray,
    *,
    max_degree: int = 160,
    precision: int = 128,
    max_precision: int = 1 << 14,
) -> WeightBalls:
    """Certified weights ``W_k`` of the chain with exact weights ``w = c^N`` (edge term last).

    Parameters
    ----------
    weights : sequence of Fraction or (Fraction, Fraction)
        ``w_j`` in chain order, the edge term last (:func:`exact_chain_weights`).
    back : array_like of int
        The back-reach of each term in that order.
    max_degree : int
        Refuse polynomials of higher degree (the isolation costs about a second at degree
        60 and grows like the cube of the degree).
    precision, max_precision : int
        Starting and largest bits of the ball arithmetic (doubled until every weight's radius
        is below ``2**-60`` times the largest weight, or the limit is reached: the balls are
        proved at any precision, only wider).  The reported radii also cover the rounding
        of the midpoints to float64.

    Returns
    -------
    WeightBalls

    Raises
    ------
    ValueError
        A polynomial of degree above ``max_degree``, a repeated root (the formula needs simple
        roots), or roots that cannot be isolated within ``max_precision`` bits.

    References
    ----------
    P. Fendley, J. Phys. A 52, 335002 (2019); F. Johansson, IEEE Trans. Comput. 66, 1281
    (2017).

    Examples
    --------
    >>> from fractions import Fraction
    >>> b = weight_balls([Fraction(1), Fraction(1, 4)], [0, 1])  # 0.5 X0 + Z0 Z1, chi = Z0
    >>> b.zero_weight, round(float(b.weights[0]), 12), b.sum_is_one
    (Fraction(4, 5), 0.2, True)
    """
    back = np.asarray(back, dtype=np.int64)
    if len(weights) != back.size or not len(weights):
        raise ValueError("weights and back must be non-empty and of one length")
    a_re, a_im, p_re, p_im, gauss = _chain_polys(weights, back)
    degree = max(p_re.degree(), p_im.degree())
    if degree > max_degree:
        raise ValueError(
            f"the exclusion polynomial has degree {degree} > max_degree = {max_degree}: "
            "certified weights are computed up to that degree"
        )
    if degree < 1:
        raise ValueError("the exclusion polynomial is constant: there are no modes")
    if not gauss and p_re.gcd(p_re.derivative()).degree() > 0:
        raise ValueError(
            "the exclusion polynomial has a repeated root: the weight formula "
            "-P_a(y) / (y P'(y)) needs simple roots"
        )
    piece: Any = p_re if not gauss else [(p_re[i], p_im[i]) for i in range(degree + 1)]
    deg_a = max(a_re.degree(), a_im.degree())
    if deg_a == degree:
        zero = _exact_ratio((a_re[degree], a_im[degree]), (p_re[degree], p_im[degree]))
    else:
        zero = Fraction(0)
    saved = flint.ctx.prec
    bits = max(int(precision), 64)
    try:
        while True:
            tol = 2.0 ** -(bits // 2)
            balls, used = certify._isolate(piece, bits, int(max_precision), tol, "y")
            flint.ctx.prec = used
            pa = _acb_poly(a_re, a_im)
            p = _acb_poly(p_re, p_im)
            dp = p.derivative()
            w_balls = [-pa(z) / (z * dp(z)) for z in balls]
            mids = np.array([complex(float(b.real.mid()), float(b.imag.mid())) for b in w_balls])
            radii = np.array(
                [certify._distance_bound(b, mid) for b, mid in zip(w_balls, mids, strict=True)]
            )
            top = float(np.max(np.abs(mids))) if mids.size else 1.0
            widest = max((float(b.rad().upper()) for b in w_balls), default=0.0)
            if widest <= 2.0**-60 * max(top, 2.0**-60) or 2 * used > max_precision:
                break
            bits = 2 * used
        zr, zi = zero if isinstance(zero, tuple) else (zero, Fraction(0))
        total = flint.acb(flint.arb(to_fmpq(zr)), flint.arb(to_fmpq(zi)))
        for b in w_balls:
            total += b
        total_mid = complex(float(total.real.mid()), float(total.imag.mid()))
        total_rad = certify._distance_bound(total, total_mid)
        sum_is_one = bool(total.contains(1))
        roots = np.array([complex(float(b.real.mid()), float(b.imag.mid())) for b in balls])
        root_radii = np.array(
            [certify._distance_bound(b, r) for b, r in zip(balls, roots, strict=True)]
        )
    finally:
        flint.ctx.prec = saved
    order = np.lexsort((np.angle(roots), -np.abs(roots)))
    real = not gauss and bool(np.all(np.abs(mids.imag) <= radii))
    shown = mids.real if real else mids
    return WeightBalls(
        roots=roots[order],
        root_radii=root_radii[order],
        weights=shown[order],
        radii=radii[order],
        zero_weight=zero,
        total=total_mid.real if real else total_mid,
        total_radius=total_rad,
        sum_is_one=sum_is_one,
        precision=int(used),
    )


def compare_weights(
    balls: WeightBalls, y_float: np.ndarray, weights: np.ndarray, errors: np.ndarray
) -> float:
    """The largest ``|W_float - W_ball| / (error + radius)`` over the modes, each float root
    matched to the nearest ball root (relative distance); ``inf`` when the matching is not
    one to one."""
    y = np.asarray(y_float, dtype=complex)
    if y.size != balls.roots.size:
        return float("inf")
    rel = np.abs(y[:, None] - balls.roots[None, :]) / np.abs(balls.roots)[None, :]
    match = np.argmin(rel, axis=1)
    if np.unique(match).size != y.size:
        return float("inf")
    diff = np.abs(np.asarray(weights) - balls.weights[match])
    scale = np.asarray(errors) + balls.radii[match] + 1e-300
    return float(np.max(diff / scale)) if diff.size else 0.0
