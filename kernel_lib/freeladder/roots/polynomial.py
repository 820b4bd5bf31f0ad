"""The exclusion polynomial P(y) of a model, with exact (or symbolic) coefficients.

    P(y) = sum over independent sets S of the frustration graph of (-y)^|S| prod_{j in S} c_j^N
         = sum_s (-y)^s C_s

For an exclusion chain of reach p (terms in chain order, weights ``w_k = c_k^N``)

    P_k(y) = P_{k-1}(y) - y w_k P_{k-p-1}(y),     P_k = 1 for k <= 0,

which is how chains are computed and evaluated here; any other frustration graph goes through
the exact deletion / simplicial-clique recursion of :mod:`freeladder.graphs.independent`.

Also here: the partial polynomials ``P_s(y) = sum_{r <= s} (-y)^r C_r`` and their certified
roots (:meth:`ExclusionPolynomial.truncated`, :meth:`ExclusionPolynomial.roots`), and the sum
rules ``sum eta^N = C_1``, ``sum eta^{2N} = C_1^2 - 2 C_2`` (:func:`power_sum_targets`,
:func:`sum_rules`), the one place every check of them calls.

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
import numbers
import threading
import warnings
from collections.abc import Callable, Sequence
from dataclasses import dataclass
from fractions import Fraction
from typing import TYPE_CHECKING, Any, NamedTuple

import numpy as np

from ..algebra.model import Model
from ..base import display
from ..base.cache import part
from ..base.errors import TooLargeError
from ..base.interrupt import poll, polled
from ..base.jsonready import json_ready
from ..base.scalars import exact_to_sympy, exact_value, to_fmpq, to_python_number, to_sympy
from ..graphs.graph import ADJACENCY, chain_structure
from ..graphs.independent import Algebra, IndependenceGraph
from .certify import certified_roots
from .result import RootTable

if TYPE_CHECKING:
    import flint
    import sympy
else:
    from ..base.lazy import flint, sympy

__all__ = [
    "MAX_ROOT_DEGREE",
    "ChainData",
    "ExclusionPolynomial",
    "SumRules",
    "exclusion_polynomial",
    "independence_graph",
    "independent_set_counts",
    "power_sum_targets",
    "sum_rules",
]

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
    """``c**n`` exactly, for the exact values of :func:`~freeladder.base.scalars.exact_value`."""
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
        return _as_float(value)  # +-inf beyond the float range; exact_parts() keeps it
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

    def to_dict(self) -> dict[str, Any]:
        """JSON-ready fields: weights (numbers), reach, order."""
        return json_ready(  # type: ignore[no-any-return]
            {"weights": self.weights, "reach": self.reach, "order": self.order}
        )


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
    truncated_at : int or None
        s for the partial polynomial ``P_s`` of :meth:`truncated`; None for ``P`` itself.

    Notes
    -----
    Frozen: setting or deleting any attribute raises AttributeError (the object is cached on
    its model and shared by every later call); the lazily computed coefficients are stored
    once, under a lock, as a tuple.  :meth:`to_dict` gives the JSON-ready fields,
    :meth:`truncated` the partial polynomials and :meth:`roots` their certified roots.
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

    _rounded: bool
    _sums_source: Callable[[], Sequence[Any]]
    _sums: tuple[Any, ...] | None
    _lock: threading.Lock
    _exact_weights: tuple[Any, ...]
    _states: int
    _kind: str
    _chain: tuple[tuple[Any, ...], int, tuple[int, ...]] | None
    _degree: int | None
    _truncated_at: int | None
    _targets: tuple[Any, Any, int] | None

    def __init__(
        self,
        sums: Callable[[], Sequence[Any]],
        weights: Sequence[Any],
        states: int,
        kind: str,
        chain: tuple[tuple[Any, ...], int, tuple[int, ...]] | None,
        degree: int | None = None,
        rounded: bool = False,
        truncated_at: int | None = None,
    ) -> None:
        put = object.__setattr__
        put(self, "_rounded", bool(rounded))
        put(self, "_sums_source", sums)
        put(self, "_sums", None)
        put(self, "_lock", threading.Lock())
        put(self, "_exact_weights", tuple(weights))
        put(self, "_states", int(states))
        put(self, "_kind", str(kind))
        put(self, "_chain", chain)
        put(self, "_degree", degree)
        put(self, "_truncated_at", truncated_at)
        put(self, "_targets", None)

    def __setattr__(self, name: str, value: Any) -> None:
        raise AttributeError(
            f"ExclusionPolynomial is immutable (cannot set {name!r}); build a new model instead"
        )

    def __delattr__(self, name: str) -> None:
        raise AttributeError(f"ExclusionPolynomial is immutable (cannot delete {name!r})")

    def __copy__(self) -> ExclusionPolynomial:
        return self  # immutable: a copy is the object itself

    def __deepcopy__(self, memo: dict[int, Any]) -> ExclusionPolynomial:
        return self

    @property
    def states(self) -> int:
        """N."""
        return self._states

    @property
    def kind(self) -> str:
        """The exact arithmetic used: "integer", "rational", "gaussian" or "symbolic"."""
        return self._kind

    @property
    def truncated_at(self) -> int | None:
        """s for a partial polynomial made by :meth:`truncated`, None for the full ``P``."""
        return self._truncated_at

    @property
    def _exact_sums(self) -> tuple[Any, ...]:
        # Computed on first use (a chain is evaluated through its recurrence without them),
        # once, under a lock, and stored as a tuple: nothing outside can change it.
        if self._sums is None:
            with self._lock:
                if self._sums is None:
                    object.__setattr__(self, "_sums", tuple(self._sums_source()))
        assert self._sums is not None
        return self._sums

    @property
    def _sum_rule_targets(self) -> tuple[Any, Any, int]:
        # C_1, C_1^2 - 2 C_2 (exact) and e ~ log2 of the largest weight: kept once computed
        # (the spectrum's residuals and verify's sum rules both read them).  Computed outside
        # the lock, which _exact_sums takes; two threads at worst both compute the same values.
        targets = self._targets
        if targets is None:
            t1, t2 = _exact_targets(self)
            e = max(
                (
                    v.numerator.bit_length() - v.denominator.bit_length()
                    for w in self._exact_weights
                    for v in (w if isinstance(w, tuple) else (w,))
                    if v != 0
                ),
                default=0,
            )
            targets = (t1, t2, e)
            object.__setattr__(self, "_targets", targets)
        return targets

    @property
    def degree(self) -> int:
        """Degree of P: the independence number of the frustration graph when no weight is 0."""
        degree = self._degree
        if degree is None:
            degree = len(self._exact_sums) - 1
            object.__setattr__(self, "_degree", degree)
        return degree

    # -- exact data ------------------------------------------------------------------------------
    @property
    def weight_sums(self) -> tuple[Any, ...]:
        """``C_s``, s = 0 .. degree (exact; see the class docstring for the types).  When the
        top sums cancel exactly (``c = (1, 1j)``: ``C_1 = 1 - 1``) they are listed as 0 up to
        the degree, the independence number."""
        sums = self._exact_sums
        padding = (0,) * max(0, self.degree + 1 - len(sums))
        return tuple(_public(c, self._rounded) for c in sums + padding)

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

    def to_dict(self) -> dict[str, Any]:
        """JSON-ready fields: degree, coefficients (numbers and exact text), kind, states ...

        ``coefficients`` are numbers (``[re, im]`` for complex, ``None`` beyond the float
        range), ``exact_coefficients`` the exact values as text (``"3/4"``, ``"1/2 + 3*I"``,
        sympy text for symbolic ones), both in ascending powers of y, signs included.
        """
        exact = [c if s % 2 == 0 else _negate(c) for s, c in enumerate(self._exact_sums)]
        chain = self._chain
        return json_ready(  # type: ignore[no-any-return]
            {
                "degree": self.degree,
                "kind": self.kind,
                "states": self.states,
                "coefficients": [_as_number(c) for c in exact],
                "exact_coefficients": [sympy.sstr(exact_to_sympy(c)) for c in exact],
                "truncated_at": self.truncated_at,
                "chain_reach": None if chain is None else chain[1],
            }
        )

    # -- partial polynomials and their roots ------------------------------------------------------
    def truncated(self, order: int) -> ExclusionPolynomial:
        """The partial polynomial ``P_s(y) = sum_{r <= s} (-y)^r C_r``, s = ``order``.

        Adding the orders one by one shows how the roots of ``P_s`` approach those of ``P``;
        for ``order >= degree`` the partial polynomial is ``P`` itself (this object).

        Parameters
        ----------
        order : int
            s >= 0.

        Returns
        -------
        ExclusionPolynomial
            Frozen, with the same weights, N and kind; ``truncated_at == order``; no chain data
            (the recurrence gives only the full polynomial).

        Raises
        ------
        TypeError, ValueError
            For a non-integer or negative order.

        Examples
        --------
        >>> import freeladder as fl
        >>> P = fl.exclusion_polynomial(fl.exclusion_chain(5, reach=1))
        >>> P.coefficients, P.truncated(1).coefficients
        ((1, -5, 6, -1), (1, -5))
        >>> P.truncated(7) is P
        True
        """
        if isinstance(order, bool) or not isinstance(order, numbers.Integral):
            raise TypeError(f"the order of a partial polynomial is an integer, got {order!r}")
        s = int(order)
        if s < 0:
            raise ValueError(f"the order of a partial polynomial must be >= 0, got {s}")
        if s >= self.degree:
            return self
        chain = self._chain
        if self._sums is None and chain is not None and s <= _SHORT_HEAD:
            # the first orders of a long chain, without expanding the whole polynomial
            head = _chain_head(_Ring(self.kind), chain[0], chain[1], s)
        else:
            head = self._exact_sums[: s + 1]
        while len(head) > 1 and head[-1] == 0:
            head = head[:-1]
        return ExclusionPolynomial(
            lambda: head,
            self._exact_weights,
            self.states,
            self.kind,
            None,
            rounded=self._rounded,
            truncated_at=s,
        )

    def roots(self, tolerance: float = 1e-12) -> RootTable:
        """All complex roots of this polynomial, certified (balls of python-flint / Arb).

        Meant for polynomials of moderate degree, such as the partial polynomials of
        :meth:`truncated` shown order by order.  Spectra of long chains come from
        :func:`freeladder.free_spectrum`, which never expands the coefficients.

        Parameters
        ----------
        tolerance : float
            Requested absolute radius of each root's ball.

        Returns
        -------
        RootTable
            The distinct roots (ordered by modulus, then argument), proved radii
            (``error_bounds``), ``multiplicities``; ``count`` is the degree.

        Raises
        ------
        TypeError
            For symbolic coefficients (substitute numbers first).
        TooLargeError
            Above :data:`MAX_ROOT_DEGREE`.
        ValueError
            When the Gaussian-rational root isolation fails (multiple roots).

        Notes
        -----
        Expanded coefficients are useless in floating point beyond a few dozen terms (numpy's
        companion-matrix roots of a 90-term chain polynomial are off by 8e-2); here the exact
        coefficients enter ball arithmetic, so each root comes with a proven radius: the one
        certified isolation of :func:`freeladder.certified_roots`
        (squarefree factors of rational coefficients, so multiplicities are found; Gaussian
        rationals must have simple roots).

        References
        ----------
        F. Johansson, IEEE Trans. Comput. 66, 1281 (2017) (Arb ball arithmetic).

        Examples
        --------
        >>> import freeladder as fl
        >>> r = fl.exclusion_polynomial(fl.exclusion_chain(3, reach=1)).roots()  # 1 - 3y + y^2
        >>> [round(float(v.real), 11) for v in r.values], r.multiplicities.tolist()
        ([0.38196601125, 2.61803398875], [1, 1])
        """
        return _certified_roots(self, float(tolerance))

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

    # -- display (freeladder.base.display) ----------------------------------------------------
    def __repr__(self) -> str:
        return display.polynomial_text(self)

    def _repr_latex_(self) -> str:
        return "$" + display.polynomial_latex(self) + "$"


def _to_exact_number(w: Any) -> Any:
    if isinstance(w, tuple):
        return complex(float(w[0]), float(w[1]))
    return w


def _negate(c: Any) -> Any:
    """``-c`` for the exact values of :func:`_exact` (Gaussian rationals are pairs)."""
    if isinstance(c, tuple):
        return (-c[0], -c[1])
    return -c


def _as_number(c: Any) -> Any:
    """An exact value as a float or complex (inf beyond the float range); sympy stays."""
    if isinstance(c, sympy.Basic):
        return c
    if isinstance(c, tuple):
        return complex(_as_float(c[0]), _as_float(c[1]))
    return c if isinstance(c, int) and abs(c) < 2**53 else _as_float(c)


def _as_float(c: Any) -> float:
    try:
        return float(c)
    except OverflowError:
        return math.inf if c > 0 else -math.inf


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


# -- roots of moderate degree ----------------------------------------------------------------------
MAX_ROOT_DEGREE = 120
"""Largest degree :meth:`ExclusionPolynomial.roots` accepts (about 0.5 s at degree 100)."""


def _certified_roots(poly: ExclusionPolynomial, tolerance: float) -> RootTable:
    if poly.kind == "symbolic":
        raise TypeError(
            "the roots of a symbolic polynomial need numbers: substitute the couplings first "
            "(Model.subs)"
        )
    if poly.degree > MAX_ROOT_DEGREE:
        raise TooLargeError(
            f"degree {poly.degree} exceeds MAX_ROOT_DEGREE = {MAX_ROOT_DEGREE} for expanded "
            "coefficients; use truncated(s) with a smaller s, or freeladder.free_spectrum, "
            "which evaluates the chain recurrence instead"
        )
    if poly.degree == 0:
        empty = np.zeros(0)
        return RootTable(
            values=empty.astype(complex),
            error_bounds=empty,
            variable="y",
            rigorous=True,
            converged=True,
            message="a constant polynomial: no roots",
            method="exact-certified",
            evaluations=0,
            count=0,
        )
    re, im = poly.exact_parts()
    return certified_roots(re, im, tolerance=tolerance)


# -- sum rules -----------------------------------------------------------------------------------
@dataclass(frozen=True)
class SumRules:
    """The sum rules ``sum eta^N = C_1`` and ``sum eta^{2N} = C_1^2 - 2 C_2`` for given values.

    Attributes
    ----------
    targets : tuple of two sympy numbers (or expressions)
        The exact right-hand sides ``C_1`` and ``C_1^2 - 2 C_2``.
    sums : tuple of two complex
        ``sum eta_k^N`` and ``sum eta_k^{2N}`` over the given quasi-energies (floating point).
    residuals : tuple of two float
        ``|sum - target| / max(sum |eta_k|^{jN}, |target|)`` for j = 1, 2 (relative; computed
        with every quantity divided by a common power of two, so nothing overflows).
    count : int
        Number of quasi-energies given.
    """

    targets: tuple[Any, Any]
    sums: tuple[complex, complex]
    residuals: tuple[float, float]
    count: int

    def to_dict(self) -> dict[str, Any]:
        """JSON-ready fields; the exact targets also as text."""
        return json_ready(  # type: ignore[no-any-return]
            {
                "targets": self.targets,
                "exact_targets": [sympy.sstr(t) for t in self.targets],
                "sums": self.sums,
                "residuals": self.residuals,
                "count": self.count,
            }
        )


def _exact_targets(poly: ExclusionPolynomial) -> tuple[Any, Any]:
    """``C_1`` and ``C_1^2 - 2 C_2`` exactly, in the internal exact form.

    For a full chain polynomial, from the weights in O(p M): ``C_1^2 - 2 C_2 = sum w^2 +
    2 sum_{0<d<=p} sum_k w_k w_{k+d}`` (the pairs that are not independent); otherwise from
    the coefficients ``C_1, C_2``.
    """
    if poly._chain is not None and poly.truncated_at is None:
        w, p, _ = poly._chain
        if poly.kind != "symbolic":
            fast = _integer_chain_targets(w, p)
            if fast is not None:
                return fast
        c1: Any = 0
        for v in w:
            c1 = _plus(c1, v)
        second: Any = 0
        for k, v in enumerate(w):
            second = _plus(second, _times(v, v))
            for d in range(1, p + 1):
                if k + d < len(w):
                    second = _plus(second, _times(2, _times(v, w[k + d])))
        return c1, second
    sums = poly._exact_sums
    c1 = sums[1] if len(sums) > 1 else 0
    c2 = sums[2] if len(sums) > 2 else 0
    return c1, _plus(_times(c1, c1), _times(-2, c2))


def _integer_chain_targets(w: Sequence[Any], p: int) -> tuple[Any, Any] | None:
    """The chain targets over a common denominator, in Python integers (fast for 10^5 terms).

    Float couplings give dyadic weights, whose common denominator is the largest one.  None
    when the common denominator would exceed 4096 bits (then exact Fractions are used).
    """
    # ints and Fractions both have .numerator and .denominator; no re-wrapping (it dominates).
    re = [v[0] if isinstance(v, tuple) else v for v in w]
    im = [v[1] if isinstance(v, tuple) else 0 for v in w]
    den = 1
    for x in {x.denominator for x in (*re, *im)}:
        den = math.lcm(den, x)
        if den.bit_length() > 4096:
            return None
    a = [x.numerator * (den // x.denominator) for x in re]
    b = [x.numerator * (den // x.denominator) for x in im]
    s1 = (sum(a), sum(b))
    sr = sum(x * x for x in a) - sum(x * x for x in b)
    si = 2 * sum(x * y for x, y in zip(a, b, strict=True))
    for d in range(1, p + 1):  # pairs (k, k + d): zip stops at the shorter, on purpose

        def dot(u: list[int], v: list[int], shift: int = d) -> int:
            return sum(x * y for x, y in zip(u, v[shift:], strict=False))

        sr += 2 * (dot(a, a) - dot(b, b))
        si += 2 * (dot(a, b) + dot(b, a))

    def value(re_num: int, im_num: int, scale: int) -> Any:
        r, i = Fraction(re_num, scale), Fraction(im_num, scale)
        if i != 0:
            return (r, i)
        return r.numerator if r.denominator == 1 else r

    return value(*s1, den), value(sr, si, den * den)


def _plus(a: Any, b: Any) -> Any:
    """Exact sum of two values of :func:`_exact`."""
    if isinstance(a, tuple) or isinstance(b, tuple):
        ar, ai = a if isinstance(a, tuple) else (a, 0)
        br, bi = b if isinstance(b, tuple) else (b, 0)
        return (Fraction(ar + br), Fraction(ai + bi)) if ai + bi != 0 else Fraction(ar + br)
    total = a + b
    return sympy.expand(total) if isinstance(total, sympy.Basic) else total


def power_sum_targets(poly: ExclusionPolynomial) -> tuple[Any, Any]:
    """The exact sums ``sum_k 1/y_k = C_1`` and ``sum_k 1/y_k^2 = C_1^2 - 2 C_2``.

    With ``eta_k^N = 1 / y_k`` these are the sum rules ``sum eta^N`` and ``sum eta^{2N}``
    that the quasi-energies of a free spectrum obey (Newton's identities applied to
    ``P(y) = prod_k (1 - y / y_k)``; common practice).

    Parameters
    ----------
    poly : ExclusionPolynomial
        Full or partial; any kind (symbolic targets are sympy expressions).

    Returns
    -------
    tuple of two sympy values
        Exact.  For chains computed from the weights in O(p M), without the coefficients.

    Examples
    --------
    >>> import freeladder as fl
    >>> power_sum_targets(fl.exclusion_polynomial(fl.exclusion_chain(4, reach=1)))
    (4, 10)
    """
    if not isinstance(poly, ExclusionPolynomial):
        raise TypeError(f"expected an ExclusionPolynomial, got {type(poly).__name__}")
    t1, t2, _ = poly._sum_rule_targets
    return exact_to_sympy(t1), exact_to_sympy(t2)


def sum_rules(poly: ExclusionPolynomial, quasi_energies: Any) -> SumRules:
    """Check given quasi-energies against the sum rules of ``poly``.

    Parameters
    ----------
    poly : ExclusionPolynomial
        Numeric couplings.
    quasi_energies : array_like of complex
        All eta_k (``eta_k^N = 1 / y_k``), e.g. ``free_spectrum(m).quasi_energies``.

    Returns
    -------
    SumRules
        Exact targets, the floating-point sums and their relative residuals.

    Raises
    ------
    TypeError
        For symbolic couplings.

    Notes
    -----
    ``sum eta^N = C_1`` and ``sum eta^{2N} = C_1^2 - 2 C_2`` are Newton's identities for the
    reciprocal roots of ``P`` (common practice).  Both sides are divided by ``2^{je}``
    (``2^e`` about the largest weight) before rounding, so couplings near the float range
    neither overflow nor underflow.

    Examples
    --------
    >>> import numpy as np, freeladder as fl
    >>> P = fl.exclusion_polynomial(fl.exclusion_chain(3, reach=1))   # 1 - 3y + y^2
    >>> eta = 1 / np.sqrt(np.array([(3 - 5**0.5) / 2, (3 + 5**0.5) / 2]))
    >>> r = sum_rules(P, eta)
    >>> r.targets, max(r.residuals) < 1e-15
    ((3, 7), True)
    """
    if not isinstance(poly, ExclusionPolynomial):
        raise TypeError(f"expected an ExclusionPolynomial, got {type(poly).__name__}")
    if poly.kind == "symbolic":
        raise TypeError("sum rules are checked numerically; substitute the couplings first")
    eta = np.asarray(quasi_energies, dtype=complex).ravel()
    # e ~ log2 of the largest weight (within 1: only a common scale is needed).
    t1, t2, e = poly._sum_rule_targets
    n = poly.states
    with np.errstate(over="ignore", under="ignore"):
        x = (eta * np.exp2(-e / n)) ** n  # eta^N / 2^e
    sums, residuals = [], []
    for j, target in ((1, t1), (2, t2)):
        want = complex(_as_number(_times(target, Fraction(1, 2) ** (j * e))))
        got = complex((x**j).sum())
        size = max(float((np.abs(x) ** j).sum()), abs(want), 1e-300)
        residuals.append(float(abs(got - want) / size))
        with np.errstate(over="ignore"):
            factor = float(np.exp2(float(j * e)))  # inf beyond the float range
        sums.append(complex(got.real and got.real * factor, got.imag and got.imag * factor))
    return SumRules(
        (exact_to_sympy(t1), exact_to_sympy(t2)),
        (sums[0], sums[1]),
        (residuals[0], residuals[1]),
        int(eta.size),
    )


# -- construction --------------------------------------------------------------------------------
def _chain_sums(
    ring: _Ring, weights: Sequence[Any], reach: int, top: int | None = None
) -> list[Any]:
    """C_s of a chain from the recurrence ``I_k = I_{k-1} + x w_k I_{k-p-1}`` (``I = P(-x)``).

    Equal weights use the number of independent sets of size s of a path power,
    ``C(M - p(s-1), s)``, times ``w^s`` (only up to s = ``top`` when given).
    """
    size = len(weights)
    if size and all(w == weights[0] for w in weights):
        out: list[Any] = [1]
        power: Any = 1
        last = (size + reach) // (reach + 1)
        for s in range(1, (last if top is None else min(last, top)) + 1):
            poll()
            power = _times(power, weights[0])
            out.append(_times(power, math.comb(size - reach * (s - 1), s)))
        while len(out) > 1 and out[-1] == 0:
            out.pop()
        return out
    one = ring.constant(1)
    window = [one] * (reach + 1)  # I_{k-1}, ..., I_{k-p-1}
    for wk in weights:
        poll()
        new = window[0] + ring.monomial(wk) * window[reach]
        window = [new, *window[:reach]]
    return ring.exact_coefficients(window[0])


_SHORT_HEAD = 16
"""Partial polynomials up to this order of a chain run a truncated recurrence."""


def _chain_head(ring: _Ring, weights: Sequence[Any], reach: int, order: int) -> list[Any]:
    """``C_0 .. C_order`` of a chain: the recurrence of :func:`_chain_sums` modulo x^(order+1).

    O(M order) exact operations instead of O(M S) for the whole polynomial.
    """
    if weights and all(w == weights[0] for w in weights):
        return _chain_sums(ring, weights, reach, order)
    one = ring.constant(1)
    window = [one] * (reach + 1)
    for wk in weights:
        poll()
        new = _cut(window[0] + ring.monomial(wk) * window[reach], order)
        window = [new, *window[:reach]]
    return ring.exact_coefficients(window[0])


def _cut(poly: Any, order: int) -> Any:
    """``poly`` without its terms above x^order (any of the ring's polynomial types)."""
    if isinstance(poly, _GaussPoly):
        return _GaussPoly(_cut(poly.re, order), _cut(poly.im, order))
    if isinstance(poly, _SymPoly):
        return _SymPoly(poly.c[: order + 1])
    if poly.degree() > order:
        return type(poly)(poly.coeffs()[: order + 1])
    return poly


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


def independent_set_counts(graph: IndependenceGraph) -> tuple[int, ...]:
    """Number of independent sets of each size 0 .. alpha (the unit-weight polynomial).

    Examples
    --------
    >>> import numpy as np
    >>> independent_set_counts(IndependenceGraph(np.eye(4, k=1) + np.eye(4, k=-1)))  # path
    (1, 4, 3)
    """
    counts = _graph_sums(_Ring("integer"), graph, [1] * graph.size) if graph.size else [1]
    return tuple(int(c) for c in counts)


def independence_graph(m: Model) -> IndependenceGraph:
    """The frustration graph of ``m`` prepared for independent-set work (cached on the model).

    Chains use their chain order (every subproblem is then a suffix of the chain); other
    graphs the reverse Cuthill-McKee order.
    """
    return _INDEPENDENCE(m)


@part("independence graph", "strings")
def _INDEPENDENCE(m: Model) -> IndependenceGraph:
    chain = chain_structure(m) if len(m) else None
    order = None if chain is None else chain.order
    return IndependenceGraph(ADJACENCY(m), order)


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
    (:class:`freeladder.graphs.independent.IndependenceGraph`); strips of bounded width cost time
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
    return POLYNOMIAL(m)


@part("polynomial", "couplings")
def POLYNOMIAL(m: Model) -> ExclusionPolynomial:
    """The part behind :func:`exclusion_polynomial`."""
    n = m.states
    weights: list[Any] = []
    for j, c in polled(enumerate(m.couplings)):
        if type(c) is float and math.isfinite(c):  # fast path: long chains of float couplings
            num, den = c.as_integer_ratio()
            weights.append(Fraction(num**n, den**n))
            continue
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


def __getattr__(name: str) -> Any:
    """``PolynomialRoots``: deprecated alias of the one root result type (one release)."""
    if name == "PolynomialRoots":
        warnings.warn(
            "PolynomialRoots is deprecated: ExclusionPolynomial.roots() returns the one root "
            "result type, RootTable",
            DeprecationWarning,
            stacklevel=2,
        )
        return RootTable
    raise AttributeError(f"module {__name__!r} has no attribute {name!r}")
