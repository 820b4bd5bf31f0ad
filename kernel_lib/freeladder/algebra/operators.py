"""Exact linear combinations of operator strings: ``sum_r coeff_r * string_r``.

A :class:`StringSum` holds its strings as a :class:`~freeladder.StringArray` whose phases
are all zero (pure products ``prod_j X_j^{a_j} Z_j^{b_j}``) and moves every phase into the
coefficient.  Coefficients live in one of two rings:

* **exact** -- int, :class:`fractions.Fraction` and sympy coefficients.  A coefficient is kept
  as a vector ``(a_0, ..., a_{d-1})`` meaning ``sum_k a_k w^k`` with ``w = exp(i pi / N)`` and
  ``d = phi(2N)`` (Euler's totient): the powers ``1, w, ..., w^{d-1}`` are a basis of the
  cyclotomic field ``Q(w)`` over the rationals, so phases multiply exactly and a rational
  coefficient vector is zero only when the operator coefficient is zero.
* **numeric** -- as soon as a float or complex number enters, coefficients are complex128.

Equal strings are merged and zero coefficients dropped after every operation, so an exact
``StringSum`` is zero exactly when it has no terms.

References
----------
The cyclotomic polynomial ``Phi_{2N}`` is the minimal polynomial of ``w = exp(i pi / N)`` over
the rationals; see S. Lang, *Algebra*, 3rd ed. (Springer, 2002), chapter VI, section 3.
"""

from __future__ import annotations

import functools
import math
from collections.abc import Iterable, Mapping, Sequence
from fractions import Fraction
from typing import TYPE_CHECKING, Any

import numpy as np
import scipy.sparse as sps

from ..base.jsonready import json_ready
from ..base.scalars import (
    Scalar,
    as_complex,
    check_scalar,
    expand_exact,
    is_exact_scalar,
    is_symbolic,
    substitute,
    substitution_map,
    to_sympy,
)
from .cyclotomic import power_table
from .model import Model, coupling_fields
from .printing import format_terms, format_terms_latex
from .strings import StringArray, WeylString, unit_phase

if TYPE_CHECKING:
    import sympy
else:
    from ..base.lazy import sympy

__all__ = [
    "PAIR_CHUNK",
    "Coef",
    "Scalar",
    "StringSum",
    "string_keys",
]


_EPS = float(np.finfo(float).eps)


# -- coefficient rings --------------------------------------------------------------------------
# A coefficient array is a pair (num, den): ``num`` has shape (n, d), ``den`` is a Python int.
# Exact rational sums keep integer numerators over one common denominator (int64 while every
# bound stays below 2**62, Python ints in an object array beyond); symbolic sums keep sympy
# numerators with den = 1; numeric sums keep complex128 with d = 1 and den = 1.
_LIMIT = 1 << 62
Coef = tuple[np.ndarray, int]


def _maxabs(num: np.ndarray) -> int:
    if num.size == 0:
        return 0
    if num.dtype == object:
        return max(abs(int(v)) for v in num.flat)
    return int(np.abs(num).max())


def _widen(num: np.ndarray, bound: int) -> np.ndarray:
    """int64 while ``bound`` fits, else an object array of Python ints."""
    if num.dtype != object and bound >= _LIMIT:
        return num.astype(object)
    return num


def _is_sympy_array(num: np.ndarray) -> bool:
    return num.dtype == object and any(isinstance(v, sympy.Basic) for v in num.flat)


class _ExactRing:
    """Elements ``sum_k a_k w^k`` (k < d) with ``w = exp(i pi / N)``, reduced mod ``Phi_{2N}``."""

    exact = True

    def __init__(self, states: int) -> None:
        n = states
        # Row k: w^k as an integer vector of length d (w = exp(i pi / N), a 2N-th root of 1).
        d = len(power_table(2 * n, 1)[0])
        red = power_table(2 * n, 2 * n + 2 * d)
        self.states = n
        self.d = d
        self._red = red
        self._redmax = int(np.abs(red[: 2 * d - 1]).sum(axis=0).max())
        # Multiplication by w^k (k mod 2N) as d x d integer matrices acting on row vectors.
        self._shift = np.stack([red[k : k + d] for k in range(2 * n)])
        self._shiftmax = int(np.abs(self._shift).sum(axis=1).max())
        self._wpow = np.array([unit_phase(k, n) for k in range(d)], dtype=complex)

    # construction
    def lift(self, values: Sequence[Scalar]) -> Coef:
        n = len(values)
        if any(isinstance(v, sympy.Basic) for v in values):
            num = np.zeros((n, self.d), dtype=object)
            num[:] = 0
            num[:, 0] = [to_sympy(v) if isinstance(v, Fraction) else v for v in values]
            return num, 1
        den = 1
        for v in values:
            if isinstance(v, Fraction):
                den = den * v.denominator // math.gcd(den, v.denominator)
        nums = [int(v * den) for v in values]
        col = np.array(nums, dtype=object)
        num = np.zeros((n, self.d), dtype=object)
        num[:] = 0
        num[:, 0] = col
        if _maxabs(num) < _LIMIT:
            num = num.astype(np.int64)
        return num, den

    # arithmetic
    def mul(self, a: Coef, b: Coef) -> Coef:
        (na, da), (nb, db) = a, b
        d = self.d
        if na.dtype != object and nb.dtype != object:
            bound = _maxabs(na) * _maxabs(nb) * d * self._redmax
            na, nb = _widen(na, bound), _widen(nb, bound)
        if na.dtype == object or nb.dtype == object:
            na, nb = na.astype(object), nb.astype(object)
        conv = np.zeros((na.shape[0], 2 * d - 1), dtype=na.dtype)
        if conv.dtype == object:
            conv[:] = 0
        for i in range(d):
            ai = na[:, i]
            for j in range(d):
                conv[:, i + j] = conv[:, i + j] + ai * nb[:, j]
        out = conv if d == 1 else conv @ self._red[: 2 * d - 1]
        return out, da * db

    def add(self, a: Coef, b: Coef) -> Coef:
        (na, da), (nb, db) = a, b
        if _is_sympy_array(na) or _is_sympy_array(nb):
            return np.concatenate([na.astype(object) / da, nb.astype(object) / db]), 1
        den = da * db // math.gcd(da, db)
        fa, fb = den // da, den // db
        bound = max(_maxabs(na) * fa, _maxabs(nb) * fb)
        na, nb = _widen(na, bound), _widen(nb, bound)
        if na.dtype == object or nb.dtype == object:
            na, nb = na.astype(object), nb.astype(object)
        return np.concatenate([na * fa, nb * fb]), den

    def scale(self, a: Coef, s: Scalar) -> Coef:
        num, den = a
        if isinstance(s, sympy.Basic) or _is_sympy_array(num):
            return num.astype(object) * (to_sympy(s) / den), 1
        s = Fraction(s)
        if num.dtype != object:
            num = _widen(num, _maxabs(num) * abs(s.numerator))
        return num * s.numerator, den * s.denominator

    def sub(self, a: Coef, b: Coef) -> Coef:
        """Row-wise ``a - b`` for arrays of equal length."""
        both = self.add(a, (-b[0], b[1]) if b[0].dtype != object else (b[0] * -1, b[1]))
        n = a[0].shape[0]
        return both[0][:n] + both[0][n:], both[1]

    def phase(self, a: Coef, k: np.ndarray) -> Coef:
        num, den = a
        k = np.asarray(k, dtype=np.int64) % (2 * self.states)
        if num.dtype != object:
            num = _widen(num, _maxabs(num) * self._shiftmax)
        out = num.copy()
        for kk in np.unique(k):
            if kk == 0:
                continue
            rows = k == kk
            out[rows] = num[rows] @ self._shift[kk]
        return out, den

    def merge(self, a: Coef, order: np.ndarray, starts: np.ndarray) -> Coef:
        num, den = a
        if num.dtype != object and len(order):
            sizes = np.diff(np.append(starts, len(order)))
            num = _widen(num, _maxabs(num) * int(sizes.max()))
        return np.add.reduceat(num[order], starts, axis=0), den

    def nonzero(self, a: Coef) -> np.ndarray:
        num, _ = a
        if _is_sympy_array(num):
            num[:] = np.vectorize(expand_exact, otypes=[object])(num)
            mask = np.asarray(np.asarray(num != 0, dtype=bool).reshape(num.shape).any(axis=1))
            # A symbolic coefficient may hold i or roots of unity itself; combine and recheck.
            for r in np.nonzero(mask)[0]:
                row = num[r]
                if any(isinstance(v, sympy.Basic) and v.has(sympy.I) for v in row):
                    if sympy.simplify(self.to_sympy(row, 1)) == 0:
                        mask[r] = False
            return mask
        return np.asarray(np.asarray(num != 0, dtype=bool).reshape(num.shape).any(axis=1))

    def take(self, a: Coef, rows: np.ndarray) -> Coef:
        num, den = a
        num = num[rows]
        if num.dtype == object and not _is_sympy_array(num):
            g = 0
            for v in num.flat:
                g = math.gcd(g, int(v))
            g = math.gcd(g, den) if g else den
            num = np.array([[int(v) // g for v in row] for row in num], dtype=object).reshape(
                num.shape
            )
            den //= g
            if _maxabs(num) < _LIMIT:
                num = num.astype(np.int64)
        elif num.dtype != object and num.size:
            g = math.gcd(int(np.gcd.reduce(num.ravel())), den)
            if g > 1:
                num, den = num // g, den // g
        elif num.size == 0:
            den = 1
        return num, den

    # reading out
    def values(self, a: Coef) -> np.ndarray:
        num, den = a
        if num.size and num.dtype == object and any(is_symbolic(v) for v in num.flat):
            raise ValueError("the operator sum has symbolic coefficients; substitute values first")
        if num.dtype == object:
            flt = np.array([[_to_complex(v, den) for v in row] for row in num], dtype=complex)
            flt = flt.reshape(num.shape)
        else:
            flt = num.astype(float) / den
        return flt @ self._wpow

    def component(self, v: Any, den: int) -> Scalar:
        if isinstance(v, sympy.Basic):
            return v
        q = Fraction(int(v), den)
        return q.numerator if q.denominator == 1 else q

    def to_sympy(self, row: np.ndarray, den: int) -> Any:
        n = self.states
        return sympy.expand(
            sum(
                to_sympy(self.component(v, den))
                * sympy.exp(sympy.I * sympy.pi * sympy.Rational(k, n))
                for k, v in enumerate(row)
                if v != 0
            ),
            complex=True,
        )

    def display(self, row: np.ndarray, den: int) -> Scalar:
        if all(v == 0 for v in row[1:]):
            return self.component(row[0], den)
        return self.to_sympy(row, den)


def _to_complex(v: Any, den: int) -> complex:
    if isinstance(v, sympy.Basic):
        return as_complex(v, "coefficient") / den
    return as_complex(Fraction(int(v), den), "coefficient")


class _NumericRing:
    """complex128 coefficients, one per term (phases folded in numerically)."""

    exact = False

    def __init__(self, states: int) -> None:
        self.states = states
        self.d = 1
        self._table = np.array([unit_phase(k, states) for k in range(2 * states)], dtype=complex)

    def lift(self, values: Sequence[Scalar]) -> Coef:
        out = [as_complex(v, f"coefficient {r}") for r, v in enumerate(values)]
        return np.array(out, dtype=complex).reshape(-1, 1), 1

    def mul(self, a: Coef, b: Coef) -> Coef:
        return a[0] * b[0], 1

    def add(self, a: Coef, b: Coef) -> Coef:
        return np.concatenate([a[0], b[0]]), 1

    def sub(self, a: Coef, b: Coef) -> Coef:
        return a[0] - b[0], 1

    def scale(self, a: Coef, s: Scalar) -> Coef:
        return a[0] * as_complex(s, "scalar"), 1

    def phase(self, a: Coef, k: np.ndarray) -> Coef:
        k = np.asarray(k, dtype=np.int64) % (2 * self.states)
        return a[0] * self._table[k][:, None], 1

    def merge(self, a: Coef, order: np.ndarray, starts: np.ndarray) -> Coef:
        return np.add.reduceat(a[0][order], starts, axis=0), 1

    def nonzero(self, a: Coef) -> np.ndarray:
        return a[0][:, 0] != 0

    def take(self, a: Coef, rows: np.ndarray) -> Coef:
        return a[0][rows], 1

    def values(self, a: Coef) -> np.ndarray:
        return a[0][:, 0].copy()

    def display(self, row: np.ndarray, den: int) -> Scalar:
        v = complex(row[0])
        return v.real if v.imag == 0 else v


@functools.lru_cache(maxsize=16)
def _exact_ring(states: int) -> _ExactRing:
    return _ExactRing(states)


@functools.lru_cache(maxsize=16)
def _numeric_ring(states: int) -> _NumericRing:
    return _NumericRing(states)


# -- merging equal strings ----------------------------------------------------------------------
def string_keys(strings: StringArray) -> np.ndarray:
    """Integer keys, one row per string, equal exactly when the exponent rows are equal.

    The X and Z exponents are packed ``b = bit_length(N - 1)`` bits per site into int64 words
    (63 usable bits each); for N = 2 and at most 63 sites a key is two words.  Phases are ignored.
    """
    n, n_sites = len(strings), len(strings.sites)
    bits = max(1, (strings.states - 1).bit_length())
    per_word = 63 // bits
    words = max(1, -(-n_sites // per_word))
    cols = np.arange(n_sites)
    pack = sps.csr_array(
        (
            np.left_shift(np.int64(1), (bits * (cols % per_word)).astype(np.int64)),
            (cols, cols // per_word),
        ),
        shape=(n_sites, words),
    )
    if n == 0:
        return np.zeros((0, 2 * words), dtype=np.int64)
    kx = (strings.x @ pack).toarray()
    kz = (strings.z @ pack).toarray()
    return np.ascontiguousarray(np.hstack([kx, kz]).astype(np.int64))


def _group(keys: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Sort order of the key rows and the start of each run of equal rows in that order."""
    if len(keys) == 0:
        return np.zeros(0, np.int64), np.zeros(0, np.int64)
    order = np.lexsort(keys.T[::-1])
    sk = keys[order]
    change = np.any(sk[1:] != sk[:-1], axis=1)
    starts = np.concatenate([[0], np.nonzero(change)[0] + 1])
    return order, starts


def _zero_phase(strings: StringArray) -> StringArray:
    return StringArray(
        strings.x, strings.z, np.zeros(len(strings), np.int64), strings.states, strings.sites
    )


PAIR_CHUNK = 1 << 21
"""Pairs of strings handled per vectorised block in products and commutators."""


class _SparseStore:
    """Strings of any N as a :class:`StringArray` (phases zero once canonical)."""

    def __init__(self, arr: StringArray) -> None:
        self.arr = arr
        self.states = arr.states
        self.sites = arr.sites

    def __len__(self) -> int:
        return len(self.arr)

    def phases(self) -> np.ndarray:
        return self.arr.phase

    def keys(self) -> np.ndarray:
        return string_keys(self.arr)

    def take(self, rows: np.ndarray) -> _SparseStore:
        return _SparseStore(_zero_phase(self.arr.take(rows)))

    def concat(self, other: Any) -> _SparseStore:
        return _SparseStore(_stack([self.arr, other.arr]))

    def products(self, other: Any, left: np.ndarray, right: np.ndarray) -> _SparseStore:
        return _SparseStore(self.arr.products(left, right, other.arr))

    def noncommuting(self, other: Any) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
        cm = self.arr.commutation_with(other.arr).tocoo()
        return (
            np.asarray(cm.row, dtype=np.int64),
            np.asarray(cm.col, dtype=np.int64),
            np.asarray(cm.data, dtype=np.int64),
        )

    def to_array(self) -> StringArray:
        return self.arr


class _PackedStore:
    """Pauli strings (N = 2) as bit masks: 64 sites per uint64 word, one word array for the
    X exponents and one for the Z exponents.  Products are XORs, the commutation exponent is
    the parity of ``popcount(z_a & x_b) + popcount(x_a & z_b)``."""

    states = 2

    def __init__(self, px: np.ndarray, pz: np.ndarray, phase: np.ndarray, sites: Sequence[Any]):
        self.px, self.pz = px, pz
        self.phase = phase
        self.sites = tuple(sites)

    @classmethod
    def from_array(cls, arr: StringArray) -> _PackedStore:
        return cls(_pack(arr.x), _pack(arr.z), arr.phase, arr.sites)

    def __len__(self) -> int:
        return int(self.px.shape[0])

    def phases(self) -> np.ndarray:
        return self.phase

    def keys(self) -> np.ndarray:
        return np.hstack([self.px, self.pz])

    def take(self, rows: np.ndarray) -> _PackedStore:
        return _PackedStore(self.px[rows], self.pz[rows], np.zeros(len(rows), np.int64), self.sites)

    def concat(self, other: Any) -> _PackedStore:
        return _PackedStore(
            np.concatenate([self.px, other.px]),
            np.concatenate([self.pz, other.pz]),
            np.concatenate([self.phase, other.phase]),
            self.sites,
        )

    def products(self, other: Any, left: np.ndarray, right: np.ndarray) -> _PackedStore:
        xl, zl = self.px[left], self.pz[left]
        xr, zr = other.px[right], other.pz[right]
        cross = np.bitwise_count(zl & xr).sum(axis=1, dtype=np.int64)
        phase = self.phase[left] + other.phase[right] + 2 * cross
        return _PackedStore(xl ^ xr, zl ^ zr, phase, self.sites)

    def noncommuting(self, other: Any) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
        nb = len(other)
        rows = max(1, PAIR_CHUNK // max(nb, 1))
        lefts, rights = [], []
        for lo in range(0, len(self), rows):
            xa, za = self.px[lo : lo + rows, None, :], self.pz[lo : lo + rows, None, :]
            bits = (za & other.px[None, :, :]) ^ (xa & other.pz[None, :, :])
            odd = np.bitwise_count(bits).sum(axis=2, dtype=np.int64) & 1
            li, ri = np.nonzero(odd)
            lefts.append(li + lo)
            rights.append(ri)
        left = np.concatenate(lefts) if lefts else np.zeros(0, np.int64)
        right = np.concatenate(rights) if rights else np.zeros(0, np.int64)
        return left.astype(np.int64), right.astype(np.int64), np.ones(len(left), np.int64)

    def to_array(self) -> StringArray:
        n_sites = len(self.sites)
        return StringArray(
            _unpack(self.px, n_sites), _unpack(self.pz, n_sites), self.phase, 2, self.sites
        )


def _pack(mat: Any) -> np.ndarray:
    """Rows of a 0/1 sparse matrix as little-endian bit masks, shape (n, words) uint64."""
    n, n_sites = mat.shape
    words = max(1, -(-n_sites // 64))
    dense = np.zeros((n, words * 64), dtype=np.uint8)
    dense[:, :n_sites] = sps.csr_array(mat).toarray() != 0
    packed = np.packbits(dense, axis=1, bitorder="little")
    return np.ascontiguousarray(packed).view("<u8").astype(np.uint64)


def _unpack(words: np.ndarray, n_sites: int) -> sps.csr_array:
    bits = np.unpackbits(
        np.ascontiguousarray(words.astype("<u8")).view(np.uint8), axis=1, bitorder="little"
    )
    return sps.csr_array(bits[:, :n_sites].astype(np.int64))


def _store(arr: StringArray) -> Any:
    return _PackedStore.from_array(arr) if arr.states == 2 else _SparseStore(arr)


# -- the operator sum ---------------------------------------------------------------------------
class StringSum:
    """An immutable exact linear combination ``sum_r c_r g_r`` of operator strings.

    Parameters
    ----------
    strings : StringArray
        The strings (with their phases; the phases are moved into the coefficients).
    coefficients : sequence
        One coefficient per string: int, Fraction, float, complex or sympy.

    Notes
    -----
    The sum is canonical after construction: equal strings are merged and zero coefficients
    dropped.  With int, Fraction or sympy coefficients all arithmetic is exact (phases are
    roots of unity handled in the cyclotomic field, see the module docstring; rationals are
    integers over a common denominator, int64 while they fit and Python integers beyond), so
    :meth:`is_zero` is an exact test.  With float or complex coefficients merging sums floats;
    the sum then carries a *scale* -- the sum of the absolute values of all products that
    entered it before merging -- and :meth:`is_zero` compares the largest coefficient with
    ``rtol * scale``, which bounds the rounding error of every merged coefficient.

    Operations: ``a + b``, ``a - b``, ``-a``, ``s * a`` (scalar), ``a @ b`` or ``a * b``
    (operator product, all pairs), :meth:`commutator`.  Both operands must live on the same
    site list with the same N.

    Examples
    --------
    >>> from freeladder import pauli, StringArray
    >>> xz = StringArray.from_strings([pauli("X"), pauli("Z")], [0])
    >>> a = StringSum(xz, [1, 1])
    >>> print(a @ a)          # (X + Z)^2 = 2
    2
    >>> a.commutator(a).is_zero()
    True
    """

    __slots__ = ("_store", "_coef", "_ring", "_scale", "_array")

    _store: Any
    _array: StringArray | None
    _coef: Coef
    _ring: _ExactRing | _NumericRing
    _scale: float

    def __init__(self, strings: StringArray, coefficients: Sequence[Scalar]) -> None:
        if not isinstance(strings, StringArray):
            raise TypeError(f"StringSum needs a StringArray, got {type(strings).__name__}")
        if isinstance(coefficients, (str, bytes)) or np.ndim(coefficients) != 1:
            raise TypeError(
                f"StringSum needs a sequence of {len(strings)} coefficients, "
                f"got {type(coefficients).__name__}"
            )
        values = [
            check_scalar(c, f"coefficient {r}", "coefficient") for r, c in enumerate(coefficients)
        ]
        if len(values) != len(strings):
            raise ValueError(f"{len(values)} coefficients for {len(strings)} strings")
        values = [int(v) if isinstance(v, np.integer) else v for v in values]
        ring: _ExactRing | _NumericRing
        if all(is_exact_scalar(v) for v in values):
            ring = _exact_ring(strings.states)
            self._set(*_canonicalise(_store(strings), ring.lift(values), ring), ring, 0.0)
        else:
            ring = _numeric_ring(strings.states)
            coef = ring.lift(values)
            with np.errstate(over="ignore"):
                scale = float(np.abs(coef[0]).sum())
            if not np.isfinite(scale):
                raise ValueError(
                    "the coefficients' absolute values add up beyond the float range; "
                    "scale them down (or give them as exact numbers)"
                )
            self._set(*_canonicalise(_store(strings), coef, ring), ring, scale)

    def _set(self, store: Any, coef: Coef, ring: Any, scale: float) -> None:
        object.__setattr__(self, "_store", store)
        object.__setattr__(self, "_array", None)
        object.__setattr__(self, "_coef", coef)
        object.__setattr__(self, "_ring", ring)
        object.__setattr__(self, "_scale", scale)

    def __setattr__(self, name: str, value: Any) -> None:
        raise AttributeError(f"StringSum is immutable (cannot set {name!r})")

    def __delattr__(self, name: str) -> None:
        raise AttributeError(f"StringSum is immutable (cannot delete {name!r})")

    @classmethod
    def _raw(cls, store: Any, coef: Coef, ring: Any, scale: float) -> StringSum:
        """Canonicalise ring coefficients without re-checking them."""
        out = cls.__new__(cls)
        out._set(*_canonicalise(store, coef, ring), ring, scale)
        return out

    # -- construction ----------------------------------------------------------------------------
    @classmethod
    def from_model(cls, model: Model) -> StringSum:
        """The Hamiltonian ``constant + sum_j c_j g_j`` of a model."""
        strings = model.strings
        coefs = list(model.couplings)
        if model.constant != 0:
            strings = _stack([strings, _identity_strings(model.states, model.sites)])
            coefs.append(model.constant)
        return cls(strings, coefs)

    @classmethod
    def identity(cls, states: int, sites: Sequence[Any], coefficient: Scalar = 1) -> StringSum:
        """``coefficient * 1`` on the given sites."""
        return cls(_identity_strings(states, sites), [coefficient])

    @classmethod
    def zero(cls, states: int, sites: Sequence[Any]) -> StringSum:
        """The empty sum on the given sites."""
        empty = sps.csr_array((0, len(tuple(sites))), dtype=np.int64)
        return cls(StringArray(empty, empty, np.zeros(0, np.int64), states, sites), [])

    @classmethod
    def from_strings(
        cls, pairs: Iterable[tuple[Scalar, WeylString]], sites: Sequence[Any], states: int
    ) -> StringSum:
        """From ``(coefficient, WeylString)`` pairs on the given sites."""
        if isinstance(pairs, (str, bytes)) or not isinstance(pairs, Iterable):
            raise TypeError("from_strings needs (coefficient, WeylString) pairs")
        pairs = list(pairs)
        for j, pair in enumerate(pairs):
            if not isinstance(pair, (tuple, list)) or len(pair) != 2:
                raise TypeError(f"pair {j}: expected (coefficient, WeylString), got {pair!r:.60}")
            if not isinstance(pair[1], WeylString):
                raise TypeError(f"pair {j}: {type(pair[1]).__name__} is not a WeylString")
        arr = StringArray.from_strings([g for _, g in pairs], sites, states)
        return cls(arr, [c for c, _ in pairs])

    # -- structure -------------------------------------------------------------------------------
    @property
    def strings(self) -> StringArray:
        """The strings, phase-free (``prod_j X_j^{a_j} Z_j^{b_j}``), one per coefficient."""
        if self._array is None:
            object.__setattr__(self, "_array", self._store.to_array())
        assert self._array is not None
        return self._array

    @property
    def states(self) -> int:
        """N."""
        return int(self._store.states)

    @property
    def sites(self) -> tuple[Any, ...]:
        """The site list."""
        return tuple(self._store.sites)

    @property
    def is_exact(self) -> bool:
        """True when the coefficients are exact (int, Fraction, sympy)."""
        return self._ring.exact

    @property
    def is_symbolic(self) -> bool:
        """True when some coefficient has free sympy symbols."""
        num = self._coef[0]
        return num.dtype == object and any(is_symbolic(v) for v in num.flat)

    @property
    def scale(self) -> float:
        """For float coefficients, the sum of absolute values of everything merged into the sum
        (0.0 for exact sums).  Each coefficient's rounding error is below about
        ``(number of merged products) * eps * scale``."""
        return self._scale

    def __len__(self) -> int:
        return len(self._store)

    @property
    def terms(self) -> tuple[tuple[Scalar, WeylString], ...]:
        """``(coefficient, string)`` pairs, each string in normalised form (``g^N = 1``; Pauli
        strings are products of the letters X, Y, Z) and the coefficients exact when the sum is."""
        g_norm, _ = self.strings.normalized()
        num, den = self._ring.phase(self._coef, -g_norm.phase)
        return tuple((self._ring.display(num[r], den), g_norm[r]) for r in range(len(self)))

    @property
    def coefficients(self) -> tuple[Scalar, ...]:
        """The coefficients of :attr:`terms`."""
        return tuple(c for c, _ in self.terms)

    def values(self) -> np.ndarray:
        """Complex coefficients of the phase-free strings in :attr:`strings`.

        Raises
        ------
        ValueError
            If a coefficient has free symbols.
        """
        return self._ring.values(self._coef)

    def max_abs(self) -> float:
        """Largest absolute value of a coefficient (0.0 for the empty sum)."""
        if len(self) == 0:
            return 0.0
        return float(np.max(np.abs(self.values())))

    def is_zero(self, rtol: float | None = None) -> bool:
        """True when the sum vanishes.

        Parameters
        ----------
        rtol : float, optional
            Only for float coefficients: the sum counts as zero when every coefficient is at
            most ``rtol * scale`` in absolute value (see :attr:`scale`).  The default
            ``rtol = 64 eps`` allows for rounding in sums of up to a few dozen products per
            merged string; pass a larger value after long chains of operations.  Exact sums
            ignore ``rtol``: they are zero exactly when no term is left.
        """
        if len(self) == 0:
            return True
        if self.is_exact:
            return False
        tol = (64 * _EPS if rtol is None else float(rtol)) * self._scale
        return bool(np.max(np.abs(self._coef[0][:, 0])) <= tol)

    # -- algebra ---------------------------------------------------------------------------------
    def _common(self, other: StringSum) -> tuple[Any, Coef, Coef]:
        if not isinstance(other, StringSum):
            raise TypeError(f"cannot combine a StringSum with {type(other).__name__}")
        if self.states != other.states:
            raise ValueError(f"N = {self.states} and N = {other.states} sums cannot be combined")
        if self.sites != other.sites:
            raise ValueError("operator sums live on different site lists")
        if self.is_exact and other.is_exact:
            return self._ring, self._coef, other._coef
        return _numeric_ring(self.states), _as_numeric(self), _as_numeric(other)

    def __add__(self, other: StringSum) -> StringSum:
        ring, a, b = self._common(other)
        store = self._store.concat(other._store)
        scale = 0.0 if ring.exact else _numeric_scale(self) + _numeric_scale(other)
        return StringSum._raw(store, ring.add(a, b), ring, scale)

    def __neg__(self) -> StringSum:
        return self.scaled(-1)

    def __sub__(self, other: StringSum) -> StringSum:
        return self + (-other)

    def scaled(self, s: Scalar) -> StringSum:
        """``s * self`` for a scalar ``s``."""
        s = check_scalar(s, "scalar", "scalar")
        if isinstance(s, np.integer):
            s = int(s)
        if self.is_exact and is_exact_scalar(s):
            return StringSum._raw(self._store, self._ring.scale(self._coef, s), self._ring, 0.0)
        ring = _numeric_ring(self.states)
        with np.errstate(over="ignore", invalid="ignore"):
            coef = ring.scale(_as_numeric(self), s)
        if not np.all(np.isfinite(coef[0])):
            raise ValueError(f"scaling by {s!r:.40} overflows the floating-point coefficients")
        return StringSum._raw(
            self._store, coef, ring, _numeric_scale(self) * abs(as_complex(s, "scalar"))
        )

    def rotated(self, k: int) -> StringSum:
        """``w^k * self`` exactly, ``w = exp(i pi / N)`` (so ``rotated(2)`` multiplies by omega)."""
        k = int(k)
        if self.is_exact:
            coef = self._ring.phase(self._coef, np.full(len(self), k, dtype=np.int64))
            return StringSum._raw(self._store, coef, self._ring, 0.0)
        ring = _numeric_ring(self.states)
        coef = ring.phase(self._coef, np.full(len(self), k, dtype=np.int64))
        return StringSum._raw(self._store, coef, ring, self._scale)

    def __mul__(self, other: Any) -> StringSum:
        if isinstance(other, StringSum):
            return self @ other
        return self.scaled(other)

    def __rmul__(self, other: Any) -> StringSum:
        return self.scaled(other)

    def __matmul__(self, other: StringSum) -> StringSum:
        """Operator product over all pairs of terms, merged."""
        ring, a, b = self._common(other)
        left = np.repeat(np.arange(len(self)), len(other))
        right = np.tile(np.arange(len(other)), len(self))
        return _pair_products(self, other, a, b, left, right, ring)

    def commutator(self, other: StringSum) -> StringSum:
        """``[self, other] = self other - other self``, from the non-commuting pairs only.

        A pair of strings with ``g_a g_b = omega^m g_b g_a`` contributes
        ``(1 - omega^{-m}) c_a c_b g_a g_b``; commuting pairs are never formed.
        """
        ring, a, b = self._common(other)
        left, right, m = self._store.noncommuting(other._store)
        return _pair_products(self, other, a, b, left, right, ring, m)

    def subs(self, values: Mapping[Any, Any]) -> StringSum:
        """Substitute numbers or sympy expressions for symbols.

        Keys are sympy symbols or their names; values are numbers or sympy expressions (text is
        rejected: it is never parsed).

        Raises
        ------
        TypeError
            For a value that is not a number or a sympy expression.
        ValueError
            For a name that is not one of the sum's symbols, or a value (or a resulting
            coefficient) that is not finite.
        """
        terms = self.terms
        symbols: set[Any] = set()
        for c, _ in terms:
            if isinstance(c, sympy.Basic):
                symbols |= c.free_symbols
        mapping = substitution_map(values, symbols)
        pairs = [(substitute(c, mapping), g) for c, g in terms]
        return StringSum.from_strings(pairs, self.sites, self.states)

    # -- matrices and printing -------------------------------------------------------------------
    def to_sparse(self) -> sps.csr_array:
        """The sum as a scipy.sparse matrix on :attr:`sites` (numeric coefficients only)."""
        if len(self) == 0:
            dim = self.states ** len(self.sites)
            return sps.csr_array((dim, dim), dtype=float)
        return self.strings.to_sparse(self.values())

    def to_dict(self) -> dict[str, Any]:
        """JSON-ready fields: ``text`` in the model syntax, ``states``, ``sites``, the
        normalised ``strings`` as text, the ``coefficients`` as numbers (complex as
        ``[re, im]``, symbolic as text), ``exact_coefficients`` (the text of each exact value,
        None for floats), ``exact`` (whether the arithmetic is exact) and ``scale``."""
        terms = self.terms
        coefficients = coupling_fields([c for c, _ in terms], self.states)
        return json_ready(
            {
                "text": format_terms(terms),
                "states": self.states,
                "sites": self.sites,
                "strings": [str(g) for _, g in terms],
                "coefficients": coefficients["values"],
                "exact_coefficients": coefficients["exact"],
                "exact": self.is_exact,
                "scale": self.scale,
            }
        )

    def __str__(self) -> str:
        return format_terms(self.terms, display=True)

    def __repr__(self) -> str:
        text = str(self)
        if len(text) > 400:
            text = text[:400] + " ..."
        kind = "exact" if self.is_exact else "float"
        return f"StringSum(N={self.states}, terms={len(self)}, {kind}: {text})"

    def _repr_latex_(self) -> str:
        return "$" + format_terms_latex(self.terms) + "$"


def _identity_strings(states: int, sites: Sequence[Any]) -> StringArray:
    empty = sps.csr_array((1, len(tuple(sites))), dtype=np.int64)
    return StringArray(empty, empty, np.zeros(1, np.int64), states, sites)


def _as_numeric(s: StringSum) -> Coef:
    if not s.is_exact:
        return s._coef
    return s.values().reshape(-1, 1), 1


def _numeric_scale(s: StringSum) -> float:
    """The scale of ``s`` for float work (the 1-norm of its coefficients when it is exact)."""
    if not s.is_exact:
        return s._scale
    return float(np.abs(s.values()).sum()) if len(s) else 0.0


def _stack(parts: Sequence[StringArray]) -> StringArray:
    first = parts[0]
    return StringArray(
        sps.vstack([p.x for p in parts], format="csr"),
        sps.vstack([p.z for p in parts], format="csr"),
        np.concatenate([p.phase for p in parts]),
        first.states,
        first.sites,
    )


def _canonicalise(store: Any, coef: Coef, ring: Any) -> tuple[Any, Coef]:
    """Fold phases into coefficients, merge equal strings, drop zero coefficients."""
    phases = store.phases()
    if np.any(phases != 0):
        coef = ring.phase(coef, phases)
    order, starts = _group(store.keys())
    if len(order) == 0:
        return store.take(np.zeros(0, np.int64)), ring.take(coef, np.zeros(0, np.int64))
    merged = ring.merge(coef, order, starts)
    keep = np.nonzero(ring.nonzero(merged))[0]
    rows = order[starts][keep]
    return store.take(rows), ring.take(merged, keep)


def _pair_products(
    opa: StringSum,
    opb: StringSum,
    a: Coef,
    b: Coef,
    left: np.ndarray,
    right: np.ndarray,
    ring: Any,
    m: np.ndarray | None = None,
    chunk: int = 1 << 19,
) -> StringSum:
    """``sum_k a[left_k] b[right_k] g_left g_right`` (times ``1 - omega^{-m_k}`` if m is given)."""
    out: StringSum | None = None
    for lo in range(0, max(len(left), 1), chunk):
        li, ri = left[lo : lo + chunk], right[lo : lo + chunk]
        prod = opa._store.products(opb._store, li, ri)
        coef = ring.mul((a[0][li], a[1]), (b[0][ri], b[1]))
        if m is not None:
            coef = ring.sub(coef, ring.phase(coef, -2 * m[lo : lo + chunk]))
        piece = StringSum._raw(prod, coef, ring, 0.0)
        out = piece if out is None else out + piece
    assert out is not None
    if not ring.exact:
        scale = _numeric_scale(opa) * _numeric_scale(opb) * (1.0 if m is None else 2.0)
        object.__setattr__(out, "_scale", scale)
    return out
