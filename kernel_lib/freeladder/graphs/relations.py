"""Relations among a model's operator strings: products of terms that are a multiple of one.

Write each string ``g_j = w^{phase} prod_s X_s^{x_js} Z_s^{z_js}`` as its exponent vector
``v_j = (x_j1, z_j1, x_j2, z_j2, ...)`` over the integers mod N.  An integer vector ``a`` (mod N)
with ``sum_j a_j v_j = 0 (mod N)`` is a *relation*: the product ``prod_j g_j^{a_j}`` (taken in
increasing term order) is a phase times the identity.  For N = 2 this is linear algebra over
GF(2) on the strings' bit vectors.

The free-fermion and free-parafermion theorems describe the algebra the terms generate through
their commutation pattern alone; a relation that the frustration graph does not show (for
example three commuting ``Z Z`` terms whose product is the identity) fixes a sector of a
symmetry and removes many-body levels that the single exclusion polynomial predicts.  A
relation always lies in the radical of the commutation form (the product commutes with every
term), so it can only occur when that form is degenerate.

:func:`find_relations` finds a basis of the relations by exact sparse Gaussian elimination.

* N prime: elimination over the field GF(N); the basis spans every relation, and the
  relations form a group of ``N^count`` elements.
* N composite: elimination over GF(p) for each prime p dividing N, each basis vector ``b``
  lifted to the relation ``(N / p) b`` mod N.  A non-trivial relation mod N exists exactly when
  one of these is found (if ``a v = 0 mod N`` with ``a != 0 mod N``, take a prime power
  ``p^k || N`` with ``a != 0 mod p^k``, divide ``a`` by the largest power of p dividing it mod
  ``p^k`` and reduce mod p), so detection is exact; the lifted vectors need not generate every
  relation mod N (for N = 4, ``X`` and ``X^3`` obey ``a = (1, 1)``; the basis reports ``(2, 2)``).

References
----------
A. Chapman and S. T. Flammia, Quantum 4, 278 (2020), arXiv:2003.05465 (the algebra of the
terms and its centre); common practice: Gaussian elimination over GF(p).
"""

from __future__ import annotations

import cmath
import heapq
import math
from collections.abc import Iterator
from dataclasses import dataclass
from fractions import Fraction
from typing import TYPE_CHECKING

import numpy as np
import scipy.sparse as sps

from ..algebra.model import Model
from ..algebra.printing import format_terms
from ..algebra.strings import StringArray, make_string
from ..base import display
from ..base.jsonready import json_ready

if TYPE_CHECKING:
    import scipy.sparse.csgraph as csgraph
else:
    from ..base.lazy import csgraph

__all__ = ["Relation", "Relations", "find_relations"]

_PEEL_ROUNDS = 4


@dataclass(frozen=True)
class Relation:
    """One product of terms that is a phase times the identity.

    Attributes
    ----------
    terms : tuple of int
        The term indices involved, ascending.
    exponents : tuple of int
        ``a_j`` in ``[1, N)`` for each of ``terms``.
    prime : int
        The prime p of the elimination that found it (N itself when N is prime).
    """

    terms: tuple[int, ...]
    exponents: tuple[int, ...]
    prime: int

    def phase(self, m: Model) -> complex:
        """The phase c in ``prod_j g_j^{a_j} = c * 1`` (product in increasing term order)."""
        n = m.states
        prod = make_string(n, [])
        for j, a in zip(self.terms, self.exponents, strict=True):
            prod = prod * (m.strings[j] ** a)
        if not prod.is_identity_up_to_phase:
            raise ValueError(f"terms {self.terms} do not multiply to the identity in this model")
        value = cmath.exp(1j * math.pi * prod.phase / n)
        return complex(round(value.real, 15), round(value.imag, 15))

    def text(self, m: Model, limit: int = 12) -> str:
        """The relation in the model's text syntax, e.g. ``(Z0 Z1) (Z1 Z2) (Z0 Z2) = 1``.

        Relations of more than ``limit`` terms are shortened (and their phase not shown).
        """
        parts = []
        for j, a in list(zip(self.terms, self.exponents, strict=True))[:limit]:
            body = format_terms([(1, m.strings[j])])
            parts.append(f"({body})" + (f"^{a}" if a != 1 else ""))
        if len(self.terms) > limit:
            return " ".join(parts) + f" ... ({len(self.terms)} terms) = a phase times 1"
        return " ".join(parts) + f" = {_phase_text(self.phase(m))}"

    def to_dict(self) -> dict[str, object]:
        """JSON-ready fields."""
        return json_ready(
            {
                "terms": self.terms,
                "exponents": self.exponents,
                "prime": self.prime,
            }
        )


@dataclass(frozen=True)
class Relations:
    """A basis of the relations among the strings of a model (see the module docstring).

    Attributes
    ----------
    relations : tuple of Relation
        The basis, in the order the elimination found them.
    states : int
        N.
    primes : tuple of int
        The primes the elimination ran over (the prime factors of N).
    """

    relations: tuple[Relation, ...]
    states: int
    primes: tuple[int, ...]

    @property
    def count(self) -> int:
        """Number of basis relations (for prime N, the relations form a group of N^count)."""
        return len(self.relations)

    @property
    def terms(self) -> tuple[int, ...]:
        """Every term that takes part in some basis relation, ascending."""
        return tuple(sorted({j for r in self.relations for j in r.terms}))

    def __len__(self) -> int:
        return len(self.relations)

    def __iter__(self) -> Iterator[Relation]:
        return iter(self.relations)

    def to_dict(self) -> dict[str, object]:
        """JSON-ready fields."""
        return json_ready(
            {
                "count": self.count,
                "states": self.states,
                "primes": self.primes,
                "relations": self.relations,
            }
        )


def find_relations(m: Model) -> Relations:
    """A basis of the products of terms of ``m`` that are multiples of the identity.

    Parameters
    ----------
    m : Model

    Returns
    -------
    Relations
        Empty when the strings are independent.

    Notes
    -----
    For each prime p dividing N: strings with a private exponent (a column mod p that no other
    remaining string touches) cannot take part in a relation and are set aside, a few rounds,
    vectorised; if the leading columns of the remaining strings are all different, they are
    in echelon form and independent.  Otherwise sparse Gaussian elimination over GF(p) runs on
    the remaining strings, ordered by leading column; each row carries the combination of
    terms that produced it, so a row that reduces to zero is a relation.  Chains and most
    local models are decided by the vectorised steps in time linear in the number of terms.
    For composite N see the module docstring.

    References
    ----------
    A. Chapman and S. T. Flammia, Quantum 4, 278 (2020).

    Examples
    --------
    >>> from freeladder import parse_model
    >>> rel = find_relations(parse_model("Z0 Z1 + X1 + Z1 Z2 + X2 + Z0 Z2"))
    >>> rel.count, rel.relations[0].terms, rel.relations[0].exponents
    (1, (0, 2, 4), (1, 1, 1))
    """
    if not isinstance(m, Model):
        raise TypeError(f"find_relations needs a freeladder Model, got {type(m).__name__}")
    n = m.states
    primes = _prime_factors(n)
    found: list[Relation] = []
    for p in primes:
        lift = n // p
        for combo in _dependencies(*_entries(m.strings, p), len(m), p):
            terms = tuple(sorted(combo))
            values = set(combo.values())
            if len(values) == 1:  # one coefficient throughout (always so for N = 2)
                exps = ((values.pop() * lift) % n,) * len(terms)
            else:
                exps = tuple((combo[j] * lift) % n for j in terms)
            found.append(Relation(terms, exps, p))
    return Relations(tuple(found), n, tuple(primes))


def _entries(strings: StringArray, p: int) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Non-zero exponents mod p: rows, columns (``2 s`` for x, ``2 s + 1`` for z), values."""
    parts = []
    for mat, offset in ((strings.x, 0), (strings.z, 1)):
        coo = sps.coo_array(mat)
        parts.append((coo.row, 2 * coo.col + offset, coo.data % p))
    rows, cols, vals = (np.concatenate([q[i] for q in parts]).astype(np.int64) for i in range(3))
    keep = vals != 0
    return rows[keep], cols[keep], vals[keep]


def _candidates(rows: np.ndarray, cols: np.ndarray, n_rows: int) -> np.ndarray:
    """Rows that may take part in a relation: drop rows with a private column, a few rounds."""
    alive = np.ones(n_rows, dtype=bool)
    for _ in range(_PEEL_ROUNDS):
        live = alive[rows]
        counts = np.bincount(cols[live], minlength=int(cols.max(initial=-1)) + 1)
        private = live & (counts[cols] == 1)
        if not private.any():
            break
        alive[rows[private]] = False
    return alive


def _dependencies(
    rows: np.ndarray, cols: np.ndarray, vals: np.ndarray, n_rows: int, p: int
) -> list[dict[int, int]]:
    """Combinations ``{term: coefficient mod p}`` of rows that vanish mod p (a basis).

    Pivots on the lowest column, dictionaries for odd p, integer bitsets for p = 2.
    """
    alive = _candidates(rows, cols, n_rows)
    zero_rows = np.flatnonzero(
        np.bincount(rows, minlength=n_rows) == 0
    )  # strings that are the identity mod p
    out: list[dict[int, int]] = [{int(r): 1} for r in zero_rows]
    keep = alive[rows]
    rows, cols, vals = rows[keep], cols[keep], vals[keep]
    if rows.size == 0:
        return out
    order = np.lexsort((cols, rows))
    rows, cols, vals = rows[order], cols[order], vals[order]
    starts = np.flatnonzero(np.r_[True, rows[1:] != rows[:-1]])
    leading = cols[starts]
    ordered = np.sort(leading)
    if not np.any(ordered[1:] == ordered[:-1]):
        return out  # echelon form: independent
    bounds = np.r_[starts, rows.size]
    by_lead = np.argsort(leading, kind="stable")
    if p == 2:
        paired = _dependencies_paired(rows, cols, n_rows, by_lead, starts)
        if paired is not None:
            return out + paired
        return out + _dependencies_gf2(rows, cols, bounds, by_lead)
    # Each reduced row remembers only which pivots it subtracted; the combination of terms is
    # expanded only for the rows that vanish (carrying every combination along is quadratic on
    # long cycles).
    pivots: dict[int, tuple[dict[int, int], int]] = {}  # column -> (normalised row, node)
    scale: dict[int, int] = {}  # pivot node -> the factor that normalised it
    steps: list[list[tuple[int, int]]] = []  # node -> (pivot node, coefficient) subtracted
    origin: list[int] = []  # node -> its term
    for i in by_lead.tolist():
        lo, hi = int(bounds[i]), int(bounds[i + 1])
        row = dict(zip(cols[lo:hi].tolist(), vals[lo:hi].tolist(), strict=True))
        node = len(origin)
        origin.append(int(rows[lo]))
        taken: list[tuple[int, int]] = []
        steps.append(taken)
        while row:
            col = min(row)
            if col not in pivots:
                inv = pow(row[col], -1, p)
                pivots[col] = ({c: v * inv % p for c, v in row.items()}, node)
                scale[node] = inv
                break
            f = row[col]
            prow, pnode = pivots[col]
            _axpy(row, -f, prow, p)
            taken.append((pnode, f * scale[pnode] % p))
        else:
            out.append(_expand(node, origin, steps, p))
    return out


def _expand(
    node: int, origin: list[int], steps: list[list[tuple[int, int]]], p: int
) -> dict[int, int]:
    """The combination of terms behind ``node``: ``C_n = e_term - sum_k c_k C_(pivot k)``.

    Pivots are older nodes, so the nodes are settled newest first, each once.
    """
    coef = {node: 1}
    pending = [-node]
    out: dict[int, int] = {}
    while pending:
        n = -heapq.heappop(pending)
        c = coef.pop(n) % p
        if not c:
            continue
        out[origin[n]] = c
        for q, g in steps[n]:
            if q not in coef:
                coef[q] = 0
                heapq.heappush(pending, -q)
            coef[q] -= c * g
    return out


def _dependencies_paired(
    rows: np.ndarray, cols: np.ndarray, n_rows: int, by_lead: np.ndarray, starts: np.ndarray
) -> list[dict[int, int]] | None:
    """The GF(2) elimination's answer when no column holds more than two of the rows.

    Join two rows when they share a column.  A set of rows sums to zero over GF(2) exactly when
    it holds, with each row, every row joined to it, and no row with a column of its own: so
    the relations are the connected components with no such column, one relation each (common
    practice: the cycle space of a graph, here with rows as vertices and columns as edges).
    Within a component the rows processed first are independent, so the elimination reaches
    zero at the component's last row in ``by_lead`` order; the relations come in that order,
    as the elimination gives them.  None when some column holds three or more rows.
    """
    counts = np.bincount(cols)
    if counts.max(initial=0) > 2:
        return None
    order = np.argsort(cols, kind="stable")
    c_sorted = cols[order]
    r_sorted = rows[order]
    pair = np.flatnonzero(c_sorted[1:] == c_sorted[:-1])
    join = sps.csr_array(
        (np.ones(len(pair), dtype=np.int8), (r_sorted[pair], r_sorted[pair + 1])),
        shape=(n_rows, n_rows),
    )
    _n, labels = csgraph.connected_components(join, directed=False)
    blocked = np.zeros(int(labels.max(initial=-1)) + 1, dtype=bool)
    blocked[labels[rows[counts[cols] == 1]]] = True
    present = np.zeros(n_rows, dtype=bool)
    present[rows] = True
    # the last row of each component in elimination order, and the order of those rows
    lead_rows = rows[starts][by_lead]
    last_at = np.full(len(blocked), -1, dtype=np.int64)
    np.maximum.at(last_at, labels[lead_rows], np.arange(len(lead_rows)))
    found = np.flatnonzero(~blocked & (last_at >= 0))
    found = found[np.argsort(last_at[found], kind="stable")]
    members = np.flatnonzero(present)
    members = members[np.isin(labels[members], found)]
    groups = members[np.argsort(labels[members], kind="stable")]
    sizes = np.bincount(labels[members], minlength=len(blocked))
    offsets = np.r_[0, np.cumsum(sizes)]
    return [dict.fromkeys(groups[offsets[c] : offsets[c + 1]].tolist(), 1) for c in found.tolist()]


def _dependencies_gf2(
    rows: np.ndarray, cols: np.ndarray, bounds: np.ndarray, by_lead: np.ndarray
) -> list[dict[int, int]]:
    """The same elimination over GF(2), rows and combinations held as Python integer bitsets."""
    pivots: dict[int, tuple[int, int]] = {}
    out = []
    for i in by_lead.tolist():
        lo, hi = int(bounds[i]), int(bounds[i + 1])
        row = 0
        for c in cols[lo:hi].tolist():
            row |= 1 << c
        combo = 1 << int(rows[lo])
        while row:
            col = (row & -row).bit_length() - 1
            pivot = pivots.get(col)
            if pivot is None:
                pivots[col] = (row, combo)
                break
            row ^= pivot[0]
            combo ^= pivot[1]
        else:
            found = {}
            while combo:
                low = combo & -combo
                found[low.bit_length() - 1] = 1
                combo ^= low
            out.append(found)
    return out


def _axpy(target: dict[int, int], f: int, source: dict[int, int], p: int) -> None:
    """``target += f * source`` mod p, dropping zeros."""
    for c, v in source.items():
        new = (target.get(c, 0) + f * v) % p
        if new:
            target[c] = new
        else:
            target.pop(c, None)


def _phase_text(z: complex) -> str:
    q = Fraction(cmath.phase(z) / math.pi).limit_denominator(1000)
    if abs(abs(z) - 1) < 1e-12 and abs(cmath.exp(1j * math.pi * float(q)) - z) < 1e-12:
        return display.phase_text(q)
    return display.number_text(z)


def _prime_factors(n: int) -> list[int]:
    out, k, d = [], n, 2
    while d * d <= k:
        if k % d == 0:
            out.append(d)
            while k % d == 0:
                k //= d
        d += 1
    if k > 1:
        out.append(k)
    return out
