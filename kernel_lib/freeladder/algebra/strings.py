"""Operator strings: Pauli strings (N = 2) and clock strings (any N >= 2) with exact phases.

A one-site operator is ``X^a Z^b`` with the shift ``X|s> = |s+1 mod N>`` and the clock
``Z|s> = omega^s |s>``, ``omega = exp(2 pi i / N)``, so that ``Z X = omega X Z``.  A string is

    g = w^phase * prod_sites X_j^{a_j} Z_j^{b_j},      w = exp(i pi / N)  (so w^2 = omega),

with the integer ``phase`` taken modulo 2N.  For N = 2, w = i, so the phases are exactly
1, i, -1, -i and ``Y = i X Z``.  Everything here is exact integer arithmetic.

Two representations are provided:

* :class:`WeylString` -- one immutable string keyed by site labels, for parsing, printing and
  small searches;
* :class:`StringArray` -- many strings on a common list of sites, stored as two sparse integer
  matrices (the X and Z exponents) and a phase vector, so that products and commutation tests
  of 10^5 strings are vectorised sparse-matrix work.

References
----------
The symplectic (exponent) representation of Pauli and clock operators is common practice; see
for example D. Gottesman, "Fault-tolerant quantum computation with higher-dimensional systems",
Chaos Solitons Fractals 10, 1749 (1999), arXiv:quant-ph/9802007.
"""

from __future__ import annotations

import cmath
import math
from collections.abc import Callable, Hashable, Iterable, Sequence
from dataclasses import dataclass
from typing import Any

import numpy as np
import scipy.sparse as sps

from ..base.jsonready import json_ready

__all__ = [
    "MAX_STATES",
    "BlockFill",
    "SiteLabel",
    "StringArray",
    "WeylString",
    "canonical_site_phase",
    "check_site",
    "check_sites",
    "check_states",
    "make_string",
    "pauli",
    "unit_phase",
]

MAX_STATES = 64
"""Largest number of states per site N accepted (the exact phase algebra has ``phi(2N)``
coordinates per coefficient)."""

SiteLabel = Hashable
"""A site label: an int, or a tuple of ints for lattices.  Labels of one model must sort."""


def check_states(states: Any, where: str = "states") -> int:
    """N as an int, checked: an integer with ``2 <= N <= MAX_STATES``.

    Raises
    ------
    TypeError
        For a value that is not an integer (text, floats, booleans ...).
    ValueError
        For N < 2 or N > :data:`MAX_STATES`.
    """
    if isinstance(states, (bool, np.bool_)) or not isinstance(states, (int, np.integer)):
        raise TypeError(
            f"{where}: the number of states per site must be an integer >= 2, got {states!r:.60}"
        )
    n = int(states)
    if not 2 <= n <= MAX_STATES:
        raise ValueError(
            f"{where}: the number of states per site must be an integer >= 2 "
            f"(at most {MAX_STATES}), got {n}"
        )
    return n


def check_site(label: Any, where: str = "site") -> int | tuple[int, ...]:
    """A site label, checked: an int or a non-empty tuple of ints (numpy ints become ints).

    Raises
    ------
    TypeError
        For any other label (text, floats, booleans, lists ...).
    """
    if isinstance(label, (int, np.integer)) and not isinstance(label, (bool, np.bool_)):
        return int(label)
    if isinstance(label, tuple) and label:
        parts = []
        for v in label:
            if isinstance(v, (bool, np.bool_)) or not isinstance(v, (int, np.integer)):
                break
            parts.append(int(v))
        else:
            return tuple(parts)
    raise TypeError(
        f"{where}: site label {label!r:.60} is not an integer or a tuple of integers "
        "(as in 3 or (0, 1))"
    )


def check_sites(labels: Any, where: str = "sites") -> tuple[Any, ...]:
    """A site list, checked: labels as :func:`check_site`, all of one kind, no repeats.

    Raises
    ------
    TypeError
        For a bad label or a list that is not a sequence.
    ValueError
        For repeated labels or labels that mix integers and tuples.
    """
    if isinstance(labels, (str, bytes)) or not isinstance(labels, Iterable):
        raise TypeError(f"{where}: expected a sequence of site labels, got {labels!r:.60}")
    out = tuple(check_site(v, f"{where}[{j}]") for j, v in enumerate(labels))
    if len({isinstance(v, tuple) for v in out}) > 1:
        raise ValueError(f"{where}: site labels mix integers and tuples; label all sites one way")
    if len(set(out)) != len(out):
        seen: set[Any] = set()
        twice = next(v for v in out if v in seen or seen.add(v))  # type: ignore[func-returns-value]
        raise ValueError(f"{where}: the site list has the label {twice!r} more than once")
    return out


def _check_exponent(value: Any, where: str) -> int:
    if isinstance(value, (bool, np.bool_)) or not isinstance(value, (int, np.integer)):
        raise TypeError(f"{where}: exponent {value!r:.60} is not an integer")
    return int(value)


def unit_phase(exponent: int, states: int) -> complex:
    """Return ``w**exponent`` with ``w = exp(i pi / states)`` as an accurate complex number.

    Multiples of a quarter turn are returned exactly (``1, 1j, -1, -1j``).
    """
    k = exponent % (2 * states)
    quarter, rest = divmod(4 * k, 2 * states)
    if rest == 0:
        return (1, 1j, -1, -1j)[quarter % 4]  # type: ignore[return-value]
    return cmath.exp(1j * math.pi * k / states)


def canonical_site_phase(a: int, b: int, states: int) -> int:
    """Phase exponent ``c`` (units of ``w``) that makes ``w^c X^a Z^b`` of order ``states``.

    ``(X^a Z^b)^N = omega^{a b N (N-1) / 2}``, so the parity of ``c`` must be that of
    ``a b (N - 1)``; the canonical choice is that parity itself (0 or 1).  For N = 2 and
    ``a = b = 1`` this gives ``i X Z = Y``.
    """
    return (a * b * (states - 1)) % 2


@dataclass(frozen=True)
class WeylString:
    """One operator string ``w^phase prod_j X_j^{a_j} Z_j^{b_j}`` keyed by site labels.

    Parameters
    ----------
    states : int
        Number of states per site, N >= 2.
    factors : tuple of (site, a, b)
        Sorted by site, one entry per site in the support, with ``0 <= a, b < N`` and
        ``(a, b) != (0, 0)``.  Use :func:`make_string` to build one from factors in any order.
    phase : int
        Exponent of ``w = exp(i pi / N)``, reduced modulo ``2 N``.

    Examples
    --------
    >>> g = make_string(2, [(0, 1, 0), (1, 0, 1)])   # X0 Z1
    >>> g.commutation_exponent(make_string(2, [(1, 1, 0)]))   # with X1: they anticommute
    1
    """

    states: int
    factors: tuple[tuple[Any, int, int], ...]
    phase: int = 0

    # -- basic structure -------------------------------------------------------------------
    @property
    def support(self) -> tuple[Any, ...]:
        """Site labels on which the string acts non-trivially, sorted."""
        return tuple(f[0] for f in self.factors)

    @property
    def is_identity_up_to_phase(self) -> bool:
        """True when the string has empty support (it is ``w^phase`` times the identity)."""
        return not self.factors

    def exponents(self) -> dict[Any, tuple[int, int]]:
        """Map site -> (a, b)."""
        return {s: (a, b) for s, a, b in self.factors}

    # -- algebra ---------------------------------------------------------------------------
    def __mul__(self, other: WeylString) -> WeylString:
        """Exact operator product ``self @ other`` (``*`` and ``@`` mean the same here)."""
        _check_same_states(self, other)
        n = self.states
        mine = self.exponents()
        theirs = other.exponents()
        phase = self.phase + other.phase
        out: dict[Any, tuple[int, int]] = dict(mine)
        for s, (a2, b2) in theirs.items():
            a1, b1 = mine.get(s, (0, 0))
            # Z^{b1} X^{a2} = omega^{b1 a2} X^{a2} Z^{b1}; omega = w^2.
            phase += 2 * b1 * a2
            out[s] = ((a1 + a2) % n, (b1 + b2) % n)
        return _from_dict(n, out, phase)

    __matmul__ = __mul__

    def commutation_exponent(self, other: WeylString) -> int:
        """The integer m (mod N) with ``self other = omega^m other self``."""
        _check_same_states(self, other)
        theirs = other.exponents()
        m = 0
        for s, a1, b1 in self.factors:
            if s in theirs:
                a2, b2 = theirs[s]
                m += b1 * a2 - b2 * a1
        return m % self.states

    def commutes_with(self, other: WeylString) -> bool:
        """True when the two strings commute."""
        return self.commutation_exponent(other) == 0

    def adjoint(self) -> WeylString:
        """Hermitian adjoint: ``(X^a Z^b)^dagger = Z^-b X^-a = omega^{ab} X^-a Z^-b``."""
        n = self.states
        phase = -self.phase
        out = {}
        for s, a, b in self.factors:
            phase += 2 * a * b
            out[s] = ((-a) % n, (-b) % n)
        return _from_dict(n, out, phase)

    def __pow__(self, k: int) -> WeylString:
        """Integer power; negative powers use the adjoint (strings are unitary)."""
        base = self if k >= 0 else self.adjoint()
        result = make_string(self.states, [])
        for _ in range(abs(int(k))):
            result = result * base
        return result

    def order_phase(self) -> int:
        """The exponent q (mod 2N) with ``self**N = w^q * identity``."""
        n = self.states
        q = n * self.phase
        for _, a, b in self.factors:
            q += a * b * n * (n - 1)
        return q % (2 * n)

    def canonical_phase(self) -> int:
        """The phase exponent that the normalised string (``g^N = 1``) carries."""
        return sum(canonical_site_phase(a, b, self.states) for _, a, b in self.factors) % (
            2 * self.states
        )

    def normalized(self) -> tuple[WeylString, int]:
        """Split ``self = w^e * g`` with ``g^N = 1`` in canonical form.

        Returns
        -------
        g : WeylString
            The normalised string; for N = 2 it is exactly the product of its Pauli letters.
        e : int
            The leftover phase exponent (units of ``w``), to be moved into the coupling.
        """
        c = self.canonical_phase()
        g = WeylString(self.states, self.factors, c)
        return g, (self.phase - c) % (2 * self.states)

    # -- matrices ----------------------------------------------------------------------------
    def to_sparse(self, sites: Sequence[Any] | None = None) -> sps.csr_array:
        """The string as a sparse matrix on ``sites`` (site 0 is the most significant digit)."""
        sites = tuple(sites) if sites is not None else self.support
        return StringArray.from_strings([self], sites).to_sparse([1.0])

    def to_dict(self) -> dict[str, Any]:
        """JSON-ready fields: ``text`` (the string in the model syntax), ``states``,
        ``factors`` (``[site, a, b]`` each) and ``phase`` (exponent of ``w = exp(i pi / N)``)."""
        return json_ready(
            {
                "text": str(self),
                "states": self.states,
                "factors": self.factors,
                "phase": self.phase,
            }
        )

    def __str__(self) -> str:
        letters = []
        for s, a, b in self.factors:
            letters.append(_site_text(s, a, b, self.states))
        body = " ".join(letters) if letters else "1"
        extra = (self.phase - self._letter_phase()) % (2 * self.states)
        if extra == 0:
            return body
        return f"w^{extra} {body}"

    def _letter_phase(self) -> int:
        """Phase exponent carried implicitly by the printed letters (each Y is ``i X Z``)."""
        if self.states != 2:
            return 0
        return sum(1 for _, a, b in self.factors if a == 1 and b == 1)


def _site_text(site: Any, a: int, b: int, states: int) -> str:
    label = _label_text(site)
    if states == 2 and a == 1 and b == 1:
        return f"Y{label}"
    parts = []
    if a:
        parts.append(f"X{label}" + (f"^{a}" if a != 1 else ""))
    if b:
        parts.append(f"Z{label}" + (f"^{b}" if b != 1 else ""))
    return " ".join(parts)


def _label_text(site: Any) -> str:
    if isinstance(site, tuple):
        return "(" + ",".join(str(int(v)) for v in site) + ")"
    return str(site)


def _check_same_states(a: WeylString, b: WeylString) -> None:
    if a.states != b.states:
        raise ValueError(f"cannot combine strings with N = {a.states} and N = {b.states}")


def _from_dict(states: int, exps: dict[Any, tuple[int, int]], phase: int) -> WeylString:
    factors = tuple((s, a, b) for s, (a, b) in sorted(exps.items()) if (a, b) != (0, 0))
    return WeylString(states, factors, phase % (2 * states))


def make_string(states: int, factors: Iterable[tuple[Any, int, int]], phase: int = 0) -> WeylString:
    """Build a string from one-site factors ``X_s^a Z_s^b`` given left to right.

    Repeated sites are multiplied exactly in the order given, so ``[(0, 0, 1), (0, 1, 0)]``
    (``Z0 X0``) becomes ``omega X0 Z0``.

    Parameters
    ----------
    states : int
        N >= 2.
    factors : iterable of (site, a, b)
        Exponents may be any integers; they are reduced modulo N.
    phase : int
        Initial phase exponent in units of ``w = exp(i pi / N)``.

    Raises
    ------
    TypeError
        For a site label, exponent or phase of the wrong type, or factors that are not triples.
    ValueError
        For N outside ``2 .. MAX_STATES`` or site labels that mix integers and tuples.
    """
    states = check_states(states)
    result = WeylString(states, (), _check_exponent(phase, "phase") % (2 * states))
    if isinstance(factors, (str, bytes)) or not isinstance(factors, Iterable):
        raise TypeError(f"factors must be (site, a, b) triples, got {factors!r:.60}")
    kinds: set[bool] = set()
    for j, factor in enumerate(factors):
        if not isinstance(factor, (tuple, list)) or len(factor) != 3:
            raise TypeError(f"factor {j}: expected a (site, a, b) triple, got {factor!r:.60}")
        s, a, b = factor
        s = check_site(s, f"factor {j}")
        kinds.add(isinstance(s, tuple))
        if len(kinds) > 1:
            raise ValueError(f"factor {j}: site labels mix integers and tuples")
        a = _check_exponent(a, f"factor {j}") % states
        b = _check_exponent(b, f"factor {j}") % states
        result = result * WeylString(states, ((s, a, b),))
    return _from_dict(states, result.exponents(), result.phase)


def pauli(letters: str | Sequence[str], sites: Sequence[Any] | None = None) -> WeylString:
    """A Pauli string from letters, e.g. ``pauli("XZZ")`` = X0 Z1 Z2 or ``pauli("XY", [3, 7])``.

    ``I`` letters are skipped.  The result is Hermitian and squares to one.

    Raises
    ------
    TypeError
        For letters that are not text or a sequence of one-letter strings, or bad site labels.
    ValueError
        For an unknown letter, or as many sites as letters not given.
    """
    if not isinstance(letters, (str, Sequence)) or isinstance(letters, bytes):
        raise TypeError(f"pauli needs letters such as 'XZZ', got {type(letters).__name__}")
    letters = list(letters)
    if not all(isinstance(ch, str) for ch in letters):
        raise TypeError("pauli needs letters such as 'XZZ' or ['X', 'Z', 'Z']")
    sites = list(range(len(letters))) if sites is None else list(check_sites(sites))
    if len(sites) != len(letters):
        raise ValueError(f"{len(letters)} letters but {len(sites)} sites")
    table = {"I": (0, 0), "X": (1, 0), "Z": (0, 1), "Y": (1, 1)}
    factors = []
    phase = 0
    for s, ch in zip(sites, letters, strict=True):
        if ch not in table:
            raise ValueError(f"unknown Pauli letter {ch!r}; use I, X, Y or Z")
        a, b = table[ch]
        phase += a * b  # Y = i X Z
        factors.append((s, a, b))
    return make_string(2, factors, phase)


class StringArray:
    """Many operator strings on one list of sites, stored as sparse exponent matrices.

    Row ``r`` is ``w^{phase[r]} prod_j X_j^{x[r, j]} Z_j^{z[r, j]}`` with column ``j`` standing for
    ``sites[j]``.  Instances are treated as immutable.

    Parameters
    ----------
    x, z : scipy.sparse array, shape (n, L)
        Exponents in ``[0, N)``; explicit zeros are removed.
    phase : array of int, shape (n,)
        Phase exponents in units of ``w = exp(i pi / N)``, reduced modulo ``2 N``.
    states : int
        N >= 2.
    sites : sequence of site labels, length L

    Notes
    -----
    Instances are frozen: attributes cannot be set, and the exponent and phase arrays are
    read-only (``flags.writeable`` is False; for the sparse matrices on ``data``, ``indices``
    and ``indptr``).
    """

    # __weakref__: values derived from the strings alone are kept in a weak-key store
    # (freeladder.base.cache) for as long as the array lives
    __slots__ = ("states", "sites", "x", "z", "phase", "__weakref__")
    states: int
    sites: tuple[Any, ...]
    x: sps.csr_array
    z: sps.csr_array
    phase: np.ndarray

    def __init__(
        self,
        x: Any,
        z: Any,
        phase: Any,
        states: int,
        sites: Sequence[Any],
    ) -> None:
        n = check_states(states)
        sites = check_sites(sites)
        xc, zc = _clean(x, n), _clean(z, n)
        ph = np.array(phase, dtype=np.int64).reshape(-1) % (2 * n)
        if xc.shape != zc.shape or xc.shape[0] != ph.shape[0]:
            raise ValueError("x, z and phase must describe the same number of strings")
        if xc.shape[1] != len(sites):
            raise ValueError(f"{xc.shape[1]} exponent columns but {len(sites)} sites")
        xc, zc = _freeze(xc), _freeze(zc)
        ph.flags.writeable = False
        for name, value in (("states", n), ("sites", sites), ("x", xc), ("z", zc), ("phase", ph)):
            object.__setattr__(self, name, value)

    def __setattr__(self, name: str, value: Any) -> None:
        raise AttributeError(
            f"StringArray is immutable (cannot set {name!r}); build a new one instead"
        )

    def __delattr__(self, name: str) -> None:
        raise AttributeError(f"StringArray is immutable (cannot delete {name!r})")

    # -- construction ------------------------------------------------------------------------
    @classmethod
    def from_strings(
        cls,
        strings: Sequence[WeylString],
        sites: Sequence[Any] | None = None,
        states: int | None = None,
    ) -> StringArray:
        """Pack :class:`WeylString` objects; ``sites`` defaults to the sorted union of supports."""
        if states is None:
            if not strings:
                raise ValueError("states must be given for an empty list of strings")
            states = strings[0].states
        states = check_states(states)
        if sites is None:
            try:
                sites = sorted({s for g in strings for s in g.support})
            except TypeError:
                raise ValueError(
                    "site labels mix integers and tuples; label all sites one way"
                ) from None
        sites = check_sites(sites)
        col = {s: j for j, s in enumerate(sites)}
        rows, cols, xs, zs, phases = [], [], [], [], []
        for r, g in enumerate(strings):
            if g.states != states:
                raise ValueError(f"string {r} has N = {g.states}, expected {states}")
            phases.append(g.phase)
            for s, a, b in g.factors:
                if s not in col:
                    raise ValueError(
                        f"string {r} acts on site {s!r}, which is not in the site list"
                    )
                rows.append(r)
                cols.append(col[s])
                xs.append(a)
                zs.append(b)
        shape = (len(strings), len(sites))
        x = sps.csr_array((np.array(xs, dtype=np.int64), (rows, cols)), shape=shape)
        z = sps.csr_array((np.array(zs, dtype=np.int64), (rows, cols)), shape=shape)
        return cls(x, z, np.array(phases, dtype=np.int64), states, sites)

    def __len__(self) -> int:
        return int(self.x.shape[0])

    def __getitem__(self, r: int) -> WeylString:
        r = int(r)
        if r < 0:
            r += len(self)
        exps: dict[Any, list[int]] = {}
        for mat, slot in ((self.x, 0), (self.z, 1)):
            lo, hi = mat.indptr[r], mat.indptr[r + 1]
            for j, v in zip(mat.indices[lo:hi], mat.data[lo:hi], strict=True):
                exps.setdefault(self.sites[j], [0, 0])[slot] = int(v)
        factors = tuple((s, a, b) for s, (a, b) in sorted(exps.items()))
        return WeylString(self.states, factors, int(self.phase[r]))

    def __iter__(self) -> Any:
        return (self[r] for r in range(len(self)))

    def to_dict(self) -> dict[str, Any]:
        """JSON-ready fields: ``states``, ``sites`` and the ``strings`` as text (a phase other
        than the letters' own prints as a power of ``w``)."""
        return json_ready(
            {"states": self.states, "sites": self.sites, "strings": [str(g) for g in self]}
        )

    def take(self, rows: Any) -> StringArray:
        """A new array with the given rows (indices or a boolean mask)."""
        rows = np.asarray(rows)
        return StringArray(self.x[rows], self.z[rows], self.phase[rows], self.states, self.sites)

    def support_sizes(self) -> np.ndarray:
        """Number of sites each string acts on."""
        occupied = (self.x != 0).astype(np.int8) + (self.z != 0).astype(np.int8)
        return np.asarray((occupied != 0).sum(axis=1)).ravel()

    # -- algebra, vectorised -------------------------------------------------------------------
    def commutation_matrix(self) -> sps.csr_array:
        """Sparse ``(n, n)`` matrix of m_ab (mod N) with ``g_a g_b = omega^{m_ab} g_b g_a``.

        Only pairs that fail to commute are stored.  Cost: one sparse product, O(nnz) for
        local models.
        """
        return self.commutation_with(self)

    def commutation_with(self, other: StringArray) -> sps.csr_array:
        """Sparse ``(n, k)`` exponents m with ``self[a] other[b] = omega^m other[b] self[a]``."""
        self._check_compatible(other)
        a = self.z @ other.x.T
        b = self.x @ other.z.T
        return _clean(sps.csr_array(a - b), self.states)

    def products(self, left: Any, right: Any, other: StringArray | None = None) -> StringArray:
        """Row-wise products ``self[left[k]] @ other[right[k]]`` for equal-length index arrays."""
        other = self if other is None else other
        self._check_compatible(other)
        left = np.asarray(left, dtype=np.int64)
        right = np.asarray(right, dtype=np.int64)
        xl, zl = self.x[left], self.z[left]
        xr, zr = other.x[right], other.z[right]
        cross = np.asarray(zl.multiply(xr).sum(axis=1)).ravel()
        phase = self.phase[left] + other.phase[right] + 2 * cross
        return StringArray(xl + xr, zl + zr, phase, self.states, self.sites)

    def adjoint(self) -> StringArray:
        """Row-wise Hermitian adjoints."""
        n = self.states
        ab = np.asarray(self.x.multiply(self.z).sum(axis=1)).ravel()
        return StringArray(
            _negate(self.x, n), _negate(self.z, n), -self.phase + 2 * ab, n, self.sites
        )

    def order_phases(self) -> np.ndarray:
        """Exponents q (mod 2N) with ``g_r^N = w^{q_r}``."""
        n = self.states
        ab = np.asarray(self.x.multiply(self.z).sum(axis=1)).ravel()
        return (n * self.phase + ab * n * (n - 1)) % (2 * n)

    def normalized(self) -> tuple[StringArray, np.ndarray]:
        """Split each row as ``w^{e_r} g_r`` with ``g_r^N = 1`` in canonical form; see
        :meth:`WeylString.normalized`."""
        n = self.states
        prod = self.x.multiply(self.z)
        canon = np.asarray(
            sps.csr_array(
                ((prod.data * (n - 1)) % 2, prod.indices, prod.indptr), shape=prod.shape
            ).sum(axis=1)
        ).ravel() % (2 * n)
        g = StringArray(self.x, self.z, canon, n, self.sites)
        return g, (self.phase - canon) % (2 * n)

    def _check_compatible(self, other: StringArray) -> None:
        if self.states != other.states:
            raise ValueError(f"N = {self.states} and N = {other.states} strings cannot be combined")
        if self.sites != other.sites:
            raise ValueError("string arrays live on different site lists")

    # -- matrices ------------------------------------------------------------------------------
    def to_sparse(
        self, coefficients: Sequence[complex] | np.ndarray, sites: Sequence[Any] | None = None
    ) -> sps.csr_array:
        """The sum ``sum_r coefficients[r] * g_r`` as a sparse matrix on ``sites``.

        The basis is the product basis with ``sites[0]`` the most significant digit (the order
        of ``kron``).  Terms sharing an X pattern share rows, so the work is one vectorised pass
        per distinct X pattern rather than one Kronecker product per term.

        Returns a real matrix when every entry is real.
        """
        return _sum_to_sparse(self, np.asarray(coefficients, dtype=complex), sites)


class _FrozenCSR(sps.csr_array):
    """A CSR array that, once locked, refuses item assignment and new ``data``, ``indices``,
    ``indptr`` or shape; its buffers are read-only.  Arrays scipy derives from it are new,
    unlocked objects."""

    _locked = False

    def __setattr__(self, name: str, value: Any) -> None:
        if self._locked and name in _LOCKED_FIELDS:
            raise AttributeError(
                f"the exponents of a StringArray are read-only (cannot set {name!r})"
            )
        super().__setattr__(name, value)

    def __setitem__(self, key: Any, value: Any) -> None:
        if self._locked:
            raise TypeError("the exponents of a StringArray are read-only")
        super().__setitem__(key, value)


_LOCKED_FIELDS = frozenset({"data", "indices", "indptr", "shape", "_shape", "_locked"})


def _freeze(mat: sps.csr_array) -> _FrozenCSR:
    out = _FrozenCSR((mat.data, mat.indices, mat.indptr), shape=mat.shape, copy=False)
    out.has_sorted_indices = True
    for arr in (out.data, out.indices, out.indptr):
        arr.flags.writeable = False
    out._locked = True
    return out


def _clean(mat: Any, n: int) -> sps.csr_array:
    m = sps.csr_array(mat, dtype=np.int64, copy=True)
    m.data %= n
    m.eliminate_zeros()
    m.sort_indices()
    return m


def _negate(mat: sps.csr_array, n: int) -> sps.csr_array:
    out = mat.copy()
    out.data = (-out.data) % n
    return out


def _sum_to_sparse(
    arr: StringArray, coeffs: np.ndarray, sites: Sequence[Any] | None
) -> sps.csr_array:
    """Build ``sum_r coeffs[r] g_r`` directly in CSR form.

    Every distinct X pattern ``a`` contributes exactly one entry to each row ``r``, in column
    ``c(r) = r - a`` (digit-wise mod N; ``r XOR a`` for N = 2), with value
    ``sum_t coeffs[t] w^{phase_t} omega^{b_t . c}`` over the terms ``t`` sharing that pattern.
    Each row therefore holds one entry per pattern: the CSR arrays are filled block of rows by
    block of rows, with no duplicate summation; only the column order inside each row is sorted
    at the end.
    """
    n = arr.states
    if sites is None:
        sites = arr.sites
    sites = tuple(sites)
    if len(coeffs) != len(arr):
        raise ValueError(f"{len(coeffs)} coefficients for {len(arr)} strings")
    col_of = {s: j for j, s in enumerate(sites)}
    used = np.unique(np.concatenate([arr.x.indices, arr.z.indices])).astype(np.int64)
    for j in used:
        if arr.sites[j] not in col_of:
            raise ValueError(
                f"a string acts on site {arr.sites[j]!r}, which is not in the site list"
            )
    n_sites = len(sites)
    dim = n**n_sites
    if dim > 2**31:
        raise ValueError(f"dimension {n}^{n_sites} = {dim} is too large to build a matrix")
    if len(arr) == 0:
        return sps.csr_array((dim, dim), dtype=float)
    # Place value of each used column in the basis index; exponents restricted to used columns.
    pw = np.array([n ** (n_sites - 1 - col_of[arr.sites[j]]) for j in used], dtype=np.int64)
    xd = arr.x[:, used].toarray()
    zd = arr.z[:, used].toarray()
    table = np.array([unit_phase(k, n) for k in range(2 * n)], dtype=complex)
    weights = coeffs * table[arr.phase % (2 * n)]  # coefficient times w^phase, per term
    keys, group = np.unique(xd, axis=0, return_inverse=True)
    group = np.asarray(group).ravel()
    members = [np.nonzero(group == g)[0] for g in range(len(keys))]
    width = len(keys)
    index_type = np.int32 if dim * width < 2**31 else np.int64
    real = n == 2 and bool(np.all(weights.imag == 0))
    indices = np.empty((dim, width), dtype=index_type)
    data = np.empty((dim, width), dtype=float if real else complex)
    block = max(1, min(dim, 2**18 // width))
    cols = np.empty((width, block), dtype=np.int64)
    vals = np.empty((width, block), dtype=data.dtype)
    if n == 2:
        fill = _pauli_block(keys @ pw, zd @ pw, members, weights.real if real else weights)
    else:
        fill = _clock_block(keys, zd, pw, members, weights, n)
    for start in range(0, dim, block):
        rows = np.arange(start, min(dim, start + block), dtype=np.int64)
        size = len(rows)
        fill(rows, cols[:, :size], vals[:, :size])
        indices[start : start + size] = cols[:, :size].T
        data[start : start + size] = vals[:, :size].T
    if not real and np.all(data.imag == 0):
        data = data.real
    indptr = np.arange(0, (dim + 1) * width, width, dtype=index_type)
    mat = sps.csr_array((data.reshape(-1), indices.reshape(-1), indptr), shape=(dim, dim))
    mat.sort_indices()
    mat.eliminate_zeros()
    return mat


def _parity(x: np.ndarray) -> np.ndarray:
    """Parity of the number of set bits of each (non-negative) entry."""
    if hasattr(np, "bitwise_count"):
        return np.bitwise_count(x) & 1
    x = x.copy()
    for s in (32, 16, 8, 4, 2, 1):
        x ^= x >> s
    return x & 1


BlockFill = Callable[[np.ndarray, np.ndarray, np.ndarray], None]


def _pauli_block(
    a_masks: np.ndarray, b_masks: np.ndarray, members: list[np.ndarray], weights: np.ndarray
) -> BlockFill:
    """N = 2: entry ``(r, r ^ a)`` is ``sum_t weight_t (-1)^{popcount(b_t & (r ^ a))}``."""
    # parity(b & (r ^ a)) = parity(b & a) xor parity(b & r): fold parity(b & a) into the weight.
    signed = [
        [
            (int(b_masks[t]), weights[t] * (-1) ** (bin(int(a) & int(b_masks[t])).count("1") % 2))
            for t in group
        ]
        for a, group in zip(a_masks, members, strict=True)
    ]

    def fill(rows: np.ndarray, cols: np.ndarray, vals: np.ndarray) -> None:
        for g, a in enumerate(a_masks):
            np.bitwise_xor(rows, int(a), out=cols[g])
            vals[g] = sum(wt for b, wt in signed[g])
            for b, wt in signed[g]:
                if b:
                    vals[g] -= (2 * wt) * _parity(rows & b)

    return fill


def _clock_block(
    keys: np.ndarray,
    zd: np.ndarray,
    pw: np.ndarray,
    members: list[np.ndarray],
    weights: np.ndarray,
    n: int,
) -> BlockFill:
    """N > 2: entry ``(r, c)`` with digits ``c_k = r_k - a_k`` (mod N) is
    ``sum_t weight_t omega^{b_t . c}``."""
    omega_pow = np.array([unit_phase(2 * k, n) for k in range(n)], dtype=complex)

    def fill(rows: np.ndarray, cols: np.ndarray, vals: np.ndarray) -> None:
        digits = [(rows // pw[k]) % n for k in range(len(pw))]
        for g, a in enumerate(keys):
            col = rows.copy()
            col_digits = list(digits)
            for k in np.nonzero(a)[0]:
                shifted = (digits[k] - int(a[k])) % n
                col += (shifted - digits[k]) * pw[k]
                col_digits[k] = shifted
            cols[g] = col
            vals[g] = 0
            for t in members[g]:
                expo = np.zeros(len(rows), dtype=np.int64)
                for k in np.nonzero(zd[t])[0]:
                    expo += int(zd[t, k]) * col_digits[k]
                vals[g] += weights[t] * omega_pow[expo % n]

    return fill
