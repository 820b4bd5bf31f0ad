"""The exclusion polynomial P(y) of a model, with exact (or symbolic) coefficients.

    P(y) = sum over independent sets S of the frustration graph of (-y)^|S| prod_{j in S} c_j^N
         = sum_s (-y)^s C_s

For an exclusion chain of reach p (terms in chain order, weights ``w_k = c_k^N``)

    P_k(y) = P_{k-1}(y) - y w_k P_{k-p-1}(y),     P_k = 1 for k <= 0,

which is how chains are computed and evaluated here; any other frustration graph goes through
the exact deletion / simplicial-clique recursion of :mod:`freeladder.independent`.

Arithmetic is exact and chosen from the weights: integers, rationals (a float coupling stands
for its exact binary value), Gaussian rationals (complex couplings; reported as rounded complex
numbers) or sympy expressions (symbolic couplings).

References
----------
P. Fendley, J. Phys. A 52, 335002 (2019), arXiv:1901.08078 (N = 2, reach 2);
F. C. Alcaraz and R. A. Pimenta, Phys. Rev. B 102, 121101(R) (2020), arXiv:2005.14622 (the
chain recurrence, any reach and N);
S. J. Elman, A. Chapman and S. T. Flammia, Commun. Math. Phys. 388, 969 (2021),
arXiv:2012.07857 (P for claw-free frustration graphs).
"""

from __future__ import annotations

import math
from collections.abc import Callable, Sequence
from fractions import Fraction
from typing import Any, NamedTuple

import flint
import numpy as np
import sympy

from .cache import model_store, structure_store
from .graph import chain_structure, frustration_adjacency
from .independent import Algebra, IndependenceGraph
from .model import Model
from .scalars import exact_to_sympy, exact_value, to_fmpq, to_python_number, to_sympy

_CACHE_KEY = "_freeladder_polynomial"
_BIG = 2.0**256
_SMALL = 2.0**-256


# -- exact coefficient rings -----------------------------------------------------------------------
class _GaussPoly:
    """A polynomial with Gaussian-rational coefficients, as two flint rational polynomials."""

    __slots__ = ("re", "im")

    def __init__(self, re: flint.fmpq_poly, im: flint.fmpq_poly) -> None:
        self.re = re
        self.im = im

    def __add__(self, other: _GaussPoly) -> _GaussPoly:
        return _GaussPoly(self.re + other.re, self.im + other.im)

    def __mul__(self, other: _GaussPoly) -> _GaussPoly:
        return _GaussPoly(
            self.re * other.re - self.im * other.im, self.re * other.im + self.im * other.re
        )


class _SymPoly:
    """A polynomial with sympy coefficients (ascending), kept expanded."""

    __slots__ = ("c",)

    def __init__(self, c: Sequence[sympy.Expr]) -> None:
        self.c = tuple(c)

    def __add__(self, other: _SymPoly) -> _SymPoly:
        a, b = self.c, other.c
        if len(a) < len(b):
            a, b = b, a
        return _SymPoly([a[i] + b[i] if i < len(b) else a[i] for i in range(len(a))])

    def __mul__(self, other: _SymPoly) -> _SymPoly:
        out = [sympy.Integer(0)] * (len(self.c) + len(other.c) - 1)
        for i, ai in enumerate(self.c):
            if ai == 0:
                continue
            for j, bj in enumerate(other.c):
                out[i + j] += ai * bj
        return _SymPoly([sympy.expand(v) for v in out])


def _power(c: Any, n: int) -> Any:
    """``c**n`` exactly, for the exact values of :func:`~freeladder.scalars.exact_value`."""
    if isinstance(c, tuple):
        re, im = Fraction(1), Fraction(0)
        for _ in range(n):
            re, im = re * c[0] - im * c[1], re * c[1] + im * c[0]
        return (re, im) if im != 0 else re
    if isinstance(c, sympy.Basic):
        return sympy.expand(c**n)
    return c**n


def _kind_of(weights: Sequence[Any]) -> str:
    if any(isinstance(w, sympy.Basic) for w in weights):
        return "symbolic"
    if any(isinstance(w, tuple) for w in weights):
        return "gaussian"
    if any(isinstance(w, Fraction) and w.denominator != 1 for w in weights):
        return "rational"
    return "integer"


class _Ring:
    """Polynomials in x with coefficients of one exact kind, and conversion back to Python."""

    def __init__(self, kind: str) -> None:
        self.kind = kind

    def constant(self, w: Any) -> Any:
        k = self.kind
        if k == "integer":
            return flint.fmpz_poly([int(w)])
        if k == "rational":
            return flint.fmpq_poly([to_fmpq(w)])
        if k == "gaussian":
            re, im = w if isinstance(w, tuple) else (w, 0)
            return _GaussPoly(flint.fmpq_poly([to_fmpq(re)]), flint.fmpq_poly([to_fmpq(im)]))
        return _SymPoly([exact_to_sympy(w)])

    def monomial(self, w: Any) -> Any:
        """The polynomial ``w x``."""
        k = self.kind
        if k == "integer":
            return flint.fmpz_poly([0, int(w)])
        if k == "rational":
            return flint.fmpq_poly([0, to_fmpq(w)])
        if k == "gaussian":
            re, im = w if isinstance(w, tuple) else (w, 0)
            return _GaussPoly(flint.fmpq_poly([0, to_fmpq(re)]), flint.fmpq_poly([0, to_fmpq(im)]))
        return _SymPoly([sympy.Integer(0), exact_to_sympy(w)])

    def exact_coefficients(self, poly: Any) -> list[Any]:
        """Ascending coefficients as int, Fraction, (Fraction, Fraction) or sympy values."""
        k = self.kind
        if k == "integer":
            return [int(c) for c in poly.coeffs()]
        if k == "rational":
            return [Fraction(int(c.p), int(c.q)) for c in poly.coeffs()]
        if k == "gaussian":
            re = [Fraction(int(c.p), int(c.q)) for c in poly.re.coeffs()]
            im = [Fraction(int(c.p), int(c.q)) for c in poly.im.coeffs()]
            size = max(len(re), len(im))
            re += [Fraction(0)] * (size - len(re))
            im += [Fraction(0)] * (size - len(im))
            return list(zip(re, im, strict=True))
        out = list(poly.c)
        while len(out) > 1 and out[-1] == 0:
            out.pop()
        return out


def _public(value: Any, rounded: bool = False) -> Any:
    """An exact value as the user sees it: int, Fraction, float, complex or sympy.

    ``rounded`` (the model had float couplings): rationals are shown as their nearest float.
    """
    if rounded and isinstance(value, Fraction):
        return float(value)
    if isinstance(value, tuple):
        re, im = value
        try:
            return complex(float(re), float(im))
        except OverflowError:
            raise OverflowError(
                "a complex coefficient exceeds the floating-point range; use "
                "ExclusionPolynomial.exact_parts() for its exact real and imaginary parts"
            ) from None
    return value


class ChainData(NamedTuple):
    """What the chain recurrence ``P_k = P_{k-1} - y w_k P_{k-p-1}`` (``P_k = 1``, k <= 0) needs."""

    weights: tuple[Any, ...]
    """``w_k = c^N`` of the terms in chain order (exact values, as in ``coefficients``)."""
    reach: int
    """p."""
    order: tuple[int, ...]
    """Term indices in chain order."""


class ExclusionPolynomial:
    """The exclusion polynomial ``P(y) = sum_s (-y)^s C_s`` of a model (immutable).

    Attributes
    ----------
    coefficients : tuple
        Ascending powers of y, signs included: ``coefficients[s] = (-1)^s C_s``.  Exact: ``int``
        for integer weights, :class:`fractions.Fraction` for rational couplings, ``float`` for
        float couplings (each the rounding of the exact value computed from the couplings'
        exact binary values, see :meth:`exact_parts`), ``complex`` for complex couplings (each the
        rounding of the exact Gaussian-rational value, see :meth:`exact_parts`), sympy
        expressions for symbolic couplings.
    weight_sums : tuple
        ``C_s = sum_{|S| = s} prod_{j in S} c_j^N`` (no signs), s = 0 .. degree.
    degree : int
        The independence number of the frustration graph (the number of quasi-energies), when
        no coupling is zero.
    weights : tuple
        ``c_j^N`` per term, in the model's term order.
    states : int
        N.
    chain : ChainData or None
        For exclusion chains: the weights in chain order and the reach p, so that root finders
        can evaluate ``P`` through the recurrence ``P_k = P_{k-1} - y w_k P_{k-p-1}``.
    kind : str
        "integer", "rational", "gaussian" or "symbolic": the exact arithmetic used.

    Notes
    -----
    For chains the coefficients are computed on first use (O(M S) exact operations on numbers
    that, for float couplings, grow to about 100 S bits); evaluation never needs them.
    Calling ``P(y)`` evaluates: exactly for exact ``y`` (int, Fraction, sympy) and exact
    coefficients; in floating point for floats, complex numbers and numpy arrays.  For chains
    the floating-point value comes from the recurrence with a running power-of-two scale
    (never from the expanded coefficients, which span many orders of magnitude); for other
    graphs ``y`` is converted exactly and the polynomial is evaluated in exact arithmetic, then
    rounded.  :meth:`evaluate_scaled` returns mantissa and exponent to avoid overflow.

    References
    ----------
    F. C. Alcaraz and R. A. Pimenta, Phys. Rev. B 102, 121101(R) (2020), arXiv:2005.14622;
    S. J. Elman, A. Chapman and S. T. Flammia, Commun. Math. Phys. 388, 969 (2021).
    """

    def __init__(
        self,
        sums: Callable[[], Sequence[Any]],
        weights: Sequence[Any],
        states: int,
        kind: str,
        chain: tuple[tuple[Any, ...], int, tuple[int, ...]] | None,
        degree: int | None = None,
        rounded: bool = False,
    ) -> None:
        self._rounded = rounded
        self._sums_source = sums
        self._sums: tuple[Any, ...] | None = None
        self._exact_weights = tuple(weights)
        self.states = int(states)
        self.kind = kind
        self._chain = chain
        self._degree = degree

    @property
    def _exact_sums(self) -> tuple[Any, ...]:
        # Computed on first use: a chain is evaluated through its recurrence without them.
        if self._sums is None:
            self._sums = tuple(self._sums_source())
        return self._sums

    @property
    def degree(self) -> int:
        """Degree of P: the independence number of the frustration graph when no weight is 0."""
        if self._degree is None:
            self._degree = len(self._exact_sums) - 1
        return self._degree

    # -- exact data ------------------------------------------------------------------------------
    @property
    def weight_sums(self) -> tuple[Any, ...]:
        """``C_s``, s = 0 .. degree (exact; see the class docstring for the types)."""
        return tuple(_public(c, self._rounded) for c in self._exact_sums)

    @property
    def coefficients(self) -> tuple[Any, ...]:
        """Ascending coefficients of ``P(y)``, signs included."""
        return tuple(c if s % 2 == 0 else -c for s, c in enumerate(self.weight_sums))

    @property
    def weights(self) -> tuple[Any, ...]:
        """``c_j^N`` in term order."""
        return tuple(_public(w, self._rounded) for w in self._exact_weights)

    @property
    def chain(self) -> ChainData | None:
        """Chain data (weights in chain order, reach, order), or None when not a chain."""
        if self._chain is None:
            return None
        w, p, order = self._chain
        return ChainData(tuple(_public(v, self._rounded) for v in w), p, order)

    def exact_parts(self) -> tuple[tuple[Fraction, ...], tuple[Fraction, ...]]:
        """Real and imaginary parts of the coefficients as exact Fractions (numeric kinds only).

        Raises
        ------
        TypeError
            For symbolic polynomials.
        """
        if self.kind == "symbolic":
            raise TypeError("a symbolic polynomial has no numeric parts; use sympy()")
        re, im = [], []
        for s, c in enumerate(self._exact_sums):
            a, b = c if isinstance(c, tuple) else (Fraction(c), Fraction(0))
            sign = -1 if s % 2 else 1
            re.append(sign * a)
            im.append(sign * b)
        return tuple(re), tuple(im)

    def sympy(self, symbol: sympy.Symbol | None = None) -> sympy.Poly:
        """``P`` as a sympy ``Poly`` in ``symbol`` (default ``y``); complex floats become Floats."""
        y = sympy.Symbol("y") if symbol is None else symbol
        coeffs = [to_sympy(c) for c in self.coefficients]
        return sympy.Poly.from_list(coeffs[::-1], y)

    # -- evaluation ------------------------------------------------------------------------------
    def __call__(self, y: Any) -> Any:
        """Evaluate ``P(y)``; see the class Notes for exact versus floating-point evaluation."""
        if isinstance(y, sympy.Basic) or self.kind == "symbolic":
            if isinstance(y, np.ndarray):
                raise TypeError("a symbolic polynomial is evaluated at scalars only; subs() first")
            return self._exact_value(to_sympy(y))
        if isinstance(y, (int, Fraction)) and not isinstance(y, bool):
            if self.kind in ("integer", "rational"):
                return self._exact_value(y)
        mant, expo = self.evaluate_scaled(y)
        with np.errstate(over="ignore"):
            if np.iscomplexobj(mant):
                value = np.ldexp(mant.real, expo) + 1j * np.ldexp(mant.imag, expo)
            else:
                value = np.ldexp(mant, expo)
        if np.ndim(y) == 0 and not isinstance(y, np.ndarray):
            return value.item()
        return value

    def evaluate_scaled(self, y: Any) -> tuple[np.ndarray, np.ndarray]:
        """``P(y) = mantissa * 2**exponent`` for floating-point ``y`` (scalar or array).

        Returns
        -------
        mantissa : numpy.ndarray (float64 or complex128), shape of ``y``
            ``|mantissa|`` in ``[0.5, 1)`` unless the value is zero.
        exponent : numpy.ndarray of int64
        """
        yarr = np.asarray(y)
        if yarr.dtype == object or yarr.dtype.kind in "USV" or self.kind == "symbolic":
            raise TypeError("evaluate_scaled needs numeric y and numeric couplings")
        complex_out = np.iscomplexobj(yarr) or self.kind == "gaussian"
        flat = yarr.astype(np.complex128 if complex_out else np.float64).ravel()
        if self._chain is not None:
            mant, expo = _chain_scaled(self._chain[0], self._chain[1], flat, complex_out)
        else:
            mant, expo = self._horner_scaled(flat, complex_out)
        return mant.reshape(yarr.shape), expo.reshape(yarr.shape)

    def _exact_value(self, y: Any) -> Any:
        """Exact value at exact ``y`` (recurrence for chains, Horner otherwise)."""
        if self._chain is not None:
            w, p, _ = self._chain
            window = [1] * (p + 1)  # P_{k-1}, ..., P_{k-p-1}
            for wk in w:
                new = window[0] - y * _to_exact_number(wk) * window[p]
                if isinstance(new, sympy.Basic):
                    new = sympy.expand(new)
                window = [new, *window[:p]]
            return window[0]
        value: Any = 0
        for c in reversed(self._exact_sums):
            value = value * (-y) + _to_exact_number(c)
        return sympy.expand(value) if isinstance(value, sympy.Basic) else value

    def _horner_scaled(self, ys: np.ndarray, complex_out: bool) -> tuple[np.ndarray, np.ndarray]:
        """Exact evaluation at the binary values of ``ys``, split into mantissa and exponent."""
        re_c, im_c = self.exact_parts()
        mant = np.zeros(ys.shape, dtype=np.complex128 if complex_out else np.float64)
        expo = np.zeros(ys.shape, dtype=np.int64)
        for i, yv in enumerate(ys.tolist()):
            yr, yi = Fraction(complex(yv).real), Fraction(complex(yv).imag)
            vr, vi = Fraction(0), Fraction(0)
            for a, b in zip(reversed(re_c), reversed(im_c), strict=True):
                vr, vi = vr * yr - vi * yi + a, vr * yi + vi * yr + b
            mant[i], expo[i] = _split(vr, vi, complex_out)
        return mant, expo

    # -- display ---------------------------------------------------------------------------------
    def _shown_orders(self) -> list[int]:
        if self.degree <= 8:
            return list(range(self.degree + 1))
        return [0, 1, 2, 3, -1, self.degree]

    def __repr__(self) -> str:
        pieces = []
        for s in self._shown_orders():
            if s < 0:
                pieces.append("...")
                continue
            text = _short_text(self.coefficients[s])
            if s and (" " in text.lstrip("-") or "+" in text.lstrip("-")):
                text = f"({text})"
            pieces.append(text if s == 0 else f"{text} y^{s}")
        chain = f", chain reach {self._chain[1]}" if self._chain is not None else ""
        return (
            f"ExclusionPolynomial(degree={self.degree}, N={self.states}, {self.kind}{chain}: "
            + _signed_terms(pieces)
            + ")"
        )

    def _repr_latex_(self) -> str:
        pieces = []
        for s in self._shown_orders():
            if s < 0:
                pieces.append(r"\cdots")
                continue
            coef = _latex_number(self.coefficients[s])
            if s and ("+" in coef or " - " in coef or coef.startswith(r"\approx")):
                coef = rf"\left({coef}\right)"
            mono = "" if s == 0 else ("y" if s == 1 else f"y^{{{s}}}")
            pieces.append(f"{coef} {mono}".strip())
        return "$P(y) = " + _signed_terms(pieces) + "$"


def _to_exact_number(w: Any) -> Any:
    if isinstance(w, tuple):
        return complex(float(w[0]), float(w[1]))
    return w


def _short_text(c: Any) -> str:
    """A coefficient for display: exact when short, about 6 digits (marked ``~``) when long."""
    if isinstance(c, sympy.Basic):
        text = sympy.sstr(c)
        return text if len(text) <= 60 else text[:57] + "..."
    if isinstance(c, (int, Fraction)):
        value = Fraction(c)
        if value.numerator.bit_length() + value.denominator.bit_length() > 130:
            return _approx(value)
        return str(c) if value.denominator != 1 else str(value.numerator)
    text = str(c)
    return text if len(text) <= 40 else _approx(c)


def _approx(c: Any) -> str:
    """About 6 significant digits of a long exact number, written as approximate."""
    if isinstance(c, complex):
        return f"~{c:.6g}"
    value = Fraction(c)
    if value == 0:
        return "0"
    e10 = math.floor(math.log10(abs(value.numerator)) - math.log10(value.denominator))
    mant = float(value / Fraction(10) ** e10)
    return f"~{mant:.6f}e{e10:+d}"


def _signed_terms(texts: Sequence[str]) -> str:
    """Join ``coefficient monomial`` pieces, turning ``+ -`` into ``-``."""
    out = texts[0]
    for t in texts[1:]:
        out += " - " + t[1:] if t.startswith("-") else " + " + t
    return out


def _latex_number(c: Any) -> str:
    text = _short_text(c)
    if text.startswith("~"):
        mant, _, e10 = text[1:].partition("e")
        if not e10:
            return r"\approx " + mant
        return rf"\approx {mant} \times 10^{{{int(e10)}}}"
    return sympy.latex(to_sympy(c))


def _split(vr: Fraction, vi: Fraction, complex_out: bool) -> tuple[complex | float, int]:
    """An exact value as (mantissa, binary exponent) without overflow."""
    big = max(abs(vr), abs(vi))
    if big == 0:
        return 0.0, 0
    e = big.numerator.bit_length() - big.denominator.bit_length()
    scale = Fraction(2) ** e
    mr, mi = float(vr / scale), float(vi / scale)
    m = complex(mr, mi) if complex_out else mr
    ex = math.frexp(abs(m))[1]
    return m / 2.0**ex, e + ex


def _chain_scaled(
    weights: Sequence[Any], reach: int, ys: np.ndarray, complex_out: bool
) -> tuple[np.ndarray, np.ndarray]:
    """The chain recurrence in floating point with a per-point power-of-two scale.

    ``window[i]`` holds ``P_{k-1-i} / 2^expo``; rescaling happens only when a value leaves
    ``[2^-256, 2^256]``, so the cost is a handful of numpy operations per term.
    """
    dtype = np.complex128 if complex_out else np.float64
    w = np.array([_to_exact_number(v) for v in weights], dtype=dtype)
    n_pts = ys.shape[0]
    window = np.ones((reach + 1, n_pts), dtype=dtype)
    expo = np.zeros(n_pts, dtype=np.int64)
    head = 0  # row of P_{k-1}; row (head + reach) % (reach + 1) is P_{k-p-1}
    for wk in w:
        oldest = (head + reach) % (reach + 1)
        new = window[head] - (ys * wk) * window[oldest]
        window[oldest] = new
        head = oldest
        mag = np.abs(new)
        bad = (mag > _BIG) | ((mag < _SMALL) & (mag > 0))
        if bad.any():
            idx = np.nonzero(bad)[0]
            peak = np.abs(window[:, idx]).max(axis=0)
            shift = np.frexp(peak)[1].astype(np.int64)
            shift[peak == 0] = 0
            if complex_out:
                window[:, idx] = window[:, idx] * np.ldexp(1.0, -shift)
            else:
                window[:, idx] = np.ldexp(window[:, idx], -shift)
            expo[idx] += shift
    value = window[head]
    frac_exp = np.frexp(np.abs(value))[1].astype(np.int64)
    frac_exp[value == 0] = 0
    return value * np.ldexp(1.0, -frac_exp), expo + frac_exp


# -- construction --------------------------------------------------------------------------------
def _chain_sums(ring: _Ring, weights: Sequence[Any], reach: int) -> list[Any]:
    """C_s of a chain from the recurrence ``I_k = I_{k-1} + x w_k I_{k-p-1}`` (``I = P(-x)``).

    Equal weights use the number of independent sets of size s of a path power,
    ``C(M - p(s-1), s)``, times ``w^s``.
    """
    size = len(weights)
    if size and all(w == weights[0] for w in weights):
        out: list[Any] = [1]
        power: Any = 1
        for s in range(1, (size + reach) // (reach + 1) + 1):
            power = _times(power, weights[0])
            out.append(_times(power, math.comb(size - reach * (s - 1), s)))
        while len(out) > 1 and out[-1] == 0:
            out.pop()
        return out
    one = ring.constant(1)
    window = [one] * (reach + 1)  # I_{k-1}, ..., I_{k-p-1}
    for wk in weights:
        new = window[0] + ring.monomial(wk) * window[reach]
        window = [new, *window[:reach]]
    return ring.exact_coefficients(window[0])


def _times(a: Any, b: Any) -> Any:
    """Exact product of two values of :func:`_exact` (Gaussian rationals are pairs)."""
    if isinstance(a, tuple) or isinstance(b, tuple):
        ar, ai = a if isinstance(a, tuple) else (a, 0)
        br, bi = b if isinstance(b, tuple) else (b, 0)
        re, im = ar * br - ai * bi, ar * bi + ai * br
        return (Fraction(re), Fraction(im)) if im != 0 else Fraction(re)
    product = a * b
    return sympy.expand(product) if isinstance(product, sympy.Basic) else product


def _graph_sums(ring: _Ring, graph: IndependenceGraph, weights: Sequence[Any]) -> list[Any]:
    """C_s of any graph through the deletion / simplicial-clique recursion."""
    mono = [ring.monomial(w) for w in graph.position_weights(list(weights))]
    algebra: Algebra[Any] = Algebra(
        ring.constant(1),
        lambda a, b: a + b,
        lambda a, b: a * b,
        lambda q, a: mono[q] * a,
    )
    return ring.exact_coefficients(graph.evaluate(algebra))


def independence_graph(m: Model) -> IndependenceGraph:
    """The frustration graph of ``m`` prepared for independent-set work (cached on the model).

    Chains use their chain order (every subproblem is then a suffix of the chain); other
    graphs the reverse Cuthill-McKee order.
    """
    store = structure_store(m.strings)
    key = _CACHE_KEY + "_graph"
    if key not in store:
        chain = chain_structure(m) if len(m) else None
        order = None if chain is None else chain.order
        store[key] = IndependenceGraph(frustration_adjacency(m), order)
    return store[key]  # type: ignore[no-any-return]


def exclusion_polynomial(m: Model) -> ExclusionPolynomial:
    """The exclusion polynomial ``P(y) = sum_S (-y)^|S| prod_{j in S} c_j^N`` of a model.

    Parameters
    ----------
    m : Model
        Numeric or symbolic couplings, any N.

    Returns
    -------
    ExclusionPolynomial
        Cached on the model (models are immutable).

    Raises
    ------
    TypeError, ValueError
        For a coupling that is not a finite number or a sympy expression.

    Notes
    -----
    Exclusion chains (recognised by :func:`freeladder.chain_structure`) use the recurrence
    ``P_k = P_{k-1} - y w_k P_{k-p-1}``: O(M) polynomial steps of degree at most S, i.e.
    O(M S) exact operations.  Any other frustration graph is split into connected components
    and reduced by deleting simplicial cliques or branching on a vertex, with memoisation
    (:class:`freeladder.independent.IndependenceGraph`); strips of bounded width cost time
    linear in their length.

    References
    ----------
    F. C. Alcaraz and R. A. Pimenta, Phys. Rev. B 102, 121101(R) (2020), arXiv:2005.14622;
    S. J. Elman, A. Chapman and S. T. Flammia, Commun. Math. Phys. 388, 969 (2021),
    arXiv:2012.07857.

    Examples
    --------
    >>> import freeladder as fl
    >>> fl.exclusion_polynomial(fl.exclusion_chain(4, reach=1)).coefficients
    (1, -4, 3)
    """
    if not isinstance(m, Model):
        raise TypeError(f"expected a freeladder Model, got {type(m).__name__}")
    store = model_store(m)
    if _CACHE_KEY not in store:
        store[_CACHE_KEY] = _build(m)
    return store[_CACHE_KEY]  # type: ignore[no-any-return]


def _build(m: Model) -> ExclusionPolynomial:
    n = m.states
    weights = []
    for j, c in enumerate(m.couplings):
        try:
            weights.append(_power(exact_value(c), n))
        except (TypeError, ValueError) as err:
            raise type(err)(f"term {j}: {err}") from None
    ring = _Ring(_kind_of(weights))
    rounded = any(isinstance(to_python_number(c), float) for c in m.couplings)
    if ring.kind == "integer":
        weights = [int(w) for w in weights]
    chain = chain_structure(m) if len(m) else None
    has_zero = any(w == 0 for w in weights)
    if chain is not None:
        order = tuple(int(v) for v in chain.order)
        ordered = tuple(weights[j] for j in order)
        p = chain.reach
        data: tuple[tuple[Any, ...], int, tuple[int, ...]] | None = (ordered, p, order)
        degree = None if has_zero else (len(order) + p) // (p + 1)
        return ExclusionPolynomial(
            lambda: _chain_sums(ring, ordered, p), weights, n, ring.kind, data, degree, rounded
        )
    sums = _graph_sums(ring, independence_graph(m), weights) if len(m) else [1]
    return ExclusionPolynomial(lambda: sums, weights, n, ring.kind, None, rounded=rounded)
