"""Exclusion-rule charges Q^(s), streamed order by order, and the transfer matrix T(u).

    Q^(0) = 1,   Q^(s) = sum over independent sets S of the frustration graph with |S| = s
                          of prod_{j in S} c_j g_j,
    T(u)  = sum_s (-u)^s Q^(s).

The factors of one product commute, so the product is unambiguous; it is formed exactly,
phase included, with :meth:`StringArray.products`.  The number of sets of each size is known
before any set is listed (unit-weight independence polynomial; binomials for chains), so a huge
order can be counted and summarised without being materialised.

References
----------
P. Fendley, J. Phys. A 52, 335002 (2019), arXiv:1901.08078 (charges and transfer matrix of the
reach-2 chain);
F. C. Alcaraz and R. A. Pimenta, Phys. Rev. B 102, 121101(R) (2020), arXiv:2005.14622 (any
reach and N);
S. J. Elman, A. Chapman and S. T. Flammia, Commun. Math. Phys. 388, 969 (2021),
arXiv:2012.07857 (claw-free frustration graphs).
"""

from __future__ import annotations

import math
from collections.abc import Iterator, Sequence
from dataclasses import dataclass, field
from fractions import Fraction
from itertools import islice
from typing import TYPE_CHECKING, Any, NamedTuple

import numpy as np
import scipy.sparse as sps

from ..algebra.model import Model
from ..algebra.operators import StringSum
from ..algebra.printing import format_terms, format_terms_latex
from ..algebra.strings import StringArray, WeylString
from ..base.cache import part
from ..base.interrupt import polled
from ..base.jsonready import json_ready
from ..graphs.graph import chain_structure
from ..graphs.indifference import indifference_order
from ..roots.polynomial import exclusion_polynomial, independence_graph, independent_set_counts

if TYPE_CHECKING:
    import flint
    import sympy
else:
    from ..base.lazy import flint, sympy

__all__ = [
    "DEFAULT_LIMIT",
    "ChargeStep",
    "ChargeTerm",
    "charge",
    "charge_series",
    "transfer_matrix",
]

DEFAULT_LIMIT = 10**6
"""Largest number of products an order may have before listing it raises an error."""


class ChargeTerm(NamedTuple):
    """One product ``prod_{j in S} c_j g_j`` of a charge."""

    indices: tuple[int, ...]
    """The independent set S (term indices, ascending)."""
    coupling: Any
    """``prod_{j in S} c_j`` (exact when the couplings are)."""
    string: WeylString
    """``prod_{j in S} g_j`` with its exact phase."""

    def text(self) -> str:
        """The product in the model's text syntax."""
        return format_terms([(self.coupling, self.string)])

    def latex(self) -> str:
        """The product in LaTeX (no dollars)."""
        return format_terms_latex([(self.coupling, self.string)])

    def to_dict(self) -> dict[str, Any]:
        """JSON-ready fields: indices, coupling (number, or text when symbolic), string, text."""
        return json_ready(  # type: ignore[no-any-return]
            {
                "indices": self.indices,
                "coupling": self.coupling,
                "string": str(self.string),
                "text": self.text(),
            }
        )


def _check_model(m: Any) -> Model:
    if not isinstance(m, Model):
        raise TypeError(f"expected a freeladder Model, got {type(m).__name__}")
    return m


def charge_counts(m: Model) -> tuple[int, ...]:
    """Number of independent sets of each size ``0 .. alpha(G)``: the products in each charge.

    Counted, never listed: binomials for exclusion chains (each from the previous one), a
    transfer-matrix product along the ordering for chains whose reach varies (oriented
    indifference orderings), the independence polynomial with unit weights otherwise.  Kept
    with the model's strings, so a coupling change reuses it.

    Examples
    --------
    >>> import freeladder as fl
    >>> charge_counts(fl.exclusion_chain(5))  # a path: 1 + 5 + 6 + 1 = 13 = Fibonacci F(7)
    (1, 5, 6, 1)
    """
    return COUNTS(m)


@part("charge counts", "strings")
def COUNTS(m: Model) -> tuple[int, ...]:
    """The part behind :func:`charge_counts`."""
    return _counts(m)


def _counts(m: Model) -> tuple[int, ...]:
    if not len(m):
        return (1,)
    chain = chain_structure(m)
    if chain is not None:
        return _chain_counts(len(m), chain.reach)
    ordering = indifference_order(m)
    if ordering is not None:
        return _ordered_counts(ordering.first_neighbour)
    return tuple(int(c) for c in independent_set_counts(independence_graph(m)))


def _chain_counts(size: int, reach: int) -> tuple[int, ...]:
    """``C(M - p(s-1), s)`` for s = 0 .. alpha: independent sets of the p-th power of a path.

    Each binomial follows from the previous one by one multiplication and one exact division
    by machine-size integers, so the whole list costs about as much as writing it down.

    Examples
    --------
    >>> _chain_counts(5, 1)
    (1, 5, 6, 1)
    """
    out = [1]
    value = 1
    for s in polled(range(1, (size + reach) // (reach + 1) + 1), every=64):
        # C(n - p, s) = C(n, s - 1) * prod_{i<=p} (n - s + 1 - i) / (s * prod_{i<p} (n - i)),
        # with n = M - p(s - 2), the top of the previous binomial (common practice).
        n = size - reach * (s - 2)
        if s == 1:
            value = size
        else:
            num = math.prod(n - s + 1 - i for i in range(reach + 1))
            den = s * math.prod(n - i for i in range(reach))
            value = value * num // den
        if value == 0:
            break
        out.append(value)
    return tuple(out)


def _ordered_counts(first_neighbour: Sequence[int]) -> tuple[int, ...]:
    """Independent-set counts of a graph given by an indifference ordering, per size.

    Along the ordering the prefix polynomials obey ``I_{k+1} = I_k + x I_{f(k)}`` with f(k)
    the first position adjacent to k (or k itself).  The steps are (R+1) x (R+1) transfer
    matrices over Z[x] (R the largest ``k - f(k)``), multiplied as a balanced product tree with
    FLINT's polynomial arithmetic: quasi-linear in the size of the answer.

    Examples
    --------
    >>> _ordered_counts([0, 0, 1, 2])  # the path 0-1-2-3
    (1, 4, 3)
    """
    first = [int(f) for f in first_neighbour]
    if not first:
        return (1,)
    width = max(k - f for k, f in enumerate(first)) + 1
    row = _row_product(first, 0, len(first), width)
    # the state before position 0 is I = 1 for every (empty) prefix
    total = sum(row, flint.fmpz_poly(0))
    return tuple(int(c) for c in total.coeffs())


_LEAF = 48


def _leaf(first: list[int], lo: int, hi: int, width: int) -> list[list[Any]]:
    """Transfer matrix of positions lo .. hi-1: column j evolves the unit state e_j."""
    x = flint.fmpz_poly([0, 1])
    zero = flint.fmpz_poly(0)
    columns = []
    for j in range(width):
        state = [zero] * width
        state[j] = flint.fmpz_poly(1)
        for k in range(lo, hi):
            state = [state[0] + x * state[k - first[k]], *state[: width - 1]]
        columns.append(state)
    return [[columns[j][i] for j in range(width)] for i in range(width)]


def _matrix_product(first: list[int], lo: int, hi: int, width: int) -> list[list[Any]]:
    if hi - lo <= _LEAF:
        return _leaf(first, lo, hi, width)
    mid = (lo + hi) // 2
    left = _matrix_product(first, lo, mid, width)
    right = _matrix_product(first, mid, hi, width)
    return [_times_matrix(r, left, width) for r in right]


def _row_product(first: list[int], lo: int, hi: int, width: int) -> list[Any]:
    """Row 0 of the transfer matrix of lo .. hi-1 (all that the final count needs)."""
    if hi - lo <= _LEAF:
        return _leaf(first, lo, hi, width)[0]
    mid = (lo + hi) // 2
    return _times_matrix(
        _row_product(first, mid, hi, width), _matrix_product(first, lo, mid, width), width
    )


def _times_matrix(row: list[Any], matrix: list[list[Any]], width: int) -> list[Any]:
    out = []
    for j in range(width):
        acc = flint.fmpz_poly(0)
        for i in range(width):
            if row[i] and matrix[i][j]:
                acc += row[i] * matrix[i][j]
        out.append(acc)
    return out


@dataclass(frozen=True)
class ChargeStep:
    """One order s of the charge series: counted at once, listed only on request (frozen).

    Attributes
    ----------
    order : int
        s.
    count : int
        Number of independent sets of size s (exact, computed without listing them).
    limit : int
        Largest ``count`` for which :attr:`terms` lists the products.
    """

    order: int
    count: int
    limit: int = DEFAULT_LIMIT
    model: Model = field(repr=False, compare=False, default=None)  # type: ignore[assignment]

    @property
    def coefficient(self) -> Any:
        """``C_s = sum_{|S| = s} prod_{j in S} c_j^N`` (exact or symbolic).

        Read from :func:`freeladder.exclusion_polynomial`, which computes all orders at once
        on first use (for long chains with float couplings that is O(M S) big-number work).
        """
        sums = exclusion_polynomial(self.model).weight_sums
        return sums[self.order] if self.order < len(sums) else 0

    def sets(self) -> Iterator[tuple[int, ...]]:
        """Stream the independent sets of size s as ascending tuples of term indices.

        Nothing is materialised and no limit applies; the order is deterministic.
        """
        return independence_graph(self.model).iter_sets(self.order)

    @property
    def terms(self) -> tuple[ChargeTerm, ...]:
        """All products of this order.

        Raises
        ------
        ValueError
            If :attr:`count` exceeds :attr:`limit` (use :meth:`sets` to stream instead).
        """
        _check_limit(self.count, self.limit, self.order)
        return self.head(self.count)

    def head(self, k: int) -> tuple[ChargeTerm, ...]:
        """The first ``k`` products (cheap for any order)."""
        sets = list(islice(self.sets(), int(k)))
        strings, couplings = _products(self.model, sets, self.order)
        return tuple(
            ChargeTerm(s, c, strings[r])
            for r, (s, c) in enumerate(zip(sets, couplings, strict=True))
        )

    def text(self, max_terms: int = 12) -> str:
        """``Q^(s) = ...`` for reading, the first ``max_terms`` products then a count."""
        shown = self.head(max_terms)
        body = format_terms([(t.coupling, t.string) for t in shown], display=True) if shown else "0"
        more = self.count - len(shown)
        tail = f" + ... ({more} more products)" if more > 0 else ""
        return f"Q^({self.order}) = {body}{tail}"

    def latex(self, max_terms: int = 12, letters_per_line: int | None = None) -> str:
        """The same summary in LaTeX (no dollars).

        With ``letters_per_line``, an ``aligned`` block that starts a new line before a product
        whose operator letters would take the line past that many (MathJax in notebooks does
        not break long formulas itself).
        """
        shown = self.head(max_terms)
        pairs = [(t.coupling, t.string) for t in shown]
        more = self.count - len(shown)
        tail = rf" + \dots \; (\text{{{more} more products}})" if more > 0 else ""
        lines: list[list[tuple[Any, Any]]] = [[]]
        used = 0
        for c, g in pairs:
            size = len(g.factors)
            if letters_per_line and lines[-1] and used + size > letters_per_line:
                lines.append([])
                used = 0
            lines[-1].append((c, g))
            used += size
        if len(lines) == 1:
            body = format_terms_latex(pairs) if pairs else "0"
            return f"Q^{{({self.order})}} = {body}{tail}"
        texts = [format_terms_latex(line) for line in lines]
        body = texts[0] + "".join(
            rf" \\ & - {t[1:]}" if t.startswith("-") else rf" \\ & + {t}" for t in texts[1:]
        )
        return rf"\begin{{aligned}} Q^{{({self.order})}} = {{}} & {body}{tail} \end{{aligned}}"

    def _repr_latex_(self) -> str:
        return "$" + self.latex(letters_per_line=24) + "$"

    def __str__(self) -> str:
        return self.text()

    def to_dict(self) -> dict[str, Any]:
        """JSON-ready fields: order, count, limit and ``C_s`` (number and text).

        ``coefficient`` reads the exclusion polynomial (computed once per model); the products
        themselves are not listed (use :attr:`terms` or :meth:`head`).
        """
        c = self.coefficient
        return json_ready(  # type: ignore[no-any-return]
            {
                "order": self.order,
                "count": self.count,
                "limit": self.limit,
                "coefficient": c,
                "coefficient_text": str(c),
            }
        )


def _check_limit(count: int, limit: int, order: int | None) -> None:
    if count > limit:
        what = f"order {order} has" if order is not None else "the series has"
        raise ValueError(
            f"{what} {count} independent sets, more than limit={limit}; stream them with "
            "ChargeStep.sets() or pass a larger limit"
        )


def charge_series(m: Model, limit: int = DEFAULT_LIMIT) -> Iterator[ChargeStep]:
    """Lazily iterate over the charges ``Q^(s)``, s = 0, 1, ..., alpha(G).

    Parameters
    ----------
    m : Model
        Any frustration graph, any N, numeric or symbolic couplings.
    limit : int
        Largest number of products an order may have for :attr:`ChargeStep.terms`.

    Yields
    ------
    ChargeStep
        ``order``, ``count`` (known before listing), ``coefficient`` (``C_s``), ``sets()`` and
        ``terms``.

    Notes
    -----
    Counts come from the unit-weight independence polynomial (binomials
    ``C(M - p(s-1), s)`` for exclusion chains of reach p); sets are enumerated depth-first with
    exact pruning, so every order streams in O(M) memory.

    References
    ----------
    P. Fendley, J. Phys. A 52, 335002 (2019); S. J. Elman, A. Chapman and S. T. Flammia,
    Commun. Math. Phys. 388, 969 (2021).

    Examples
    --------
    >>> import freeladder as fl
    >>> [step.count for step in fl.charge_series(fl.exclusion_chain(5, reach=1))]
    [1, 5, 6, 1]
    """
    m = _check_model(m)
    for s, count in enumerate(charge_counts(m)):
        yield ChargeStep(s, count, int(limit), m)


def _products(m: Model, sets: Sequence[tuple[int, ...]], size: int) -> tuple[StringArray, list]:
    """Strings ``prod g_j`` (exact phases, vectorised) and couplings ``prod c_j`` of sets."""
    n_sets = len(sets)
    strings = m.strings
    if size == 0 or n_sets == 0:
        empty = sps.csr_array((n_sets, len(m.sites)), dtype=np.int64)
        ident = StringArray(empty, empty, np.zeros(n_sets, np.int64), m.states, m.sites)
        return ident, [1] * n_sets
    idx = np.asarray(sets, dtype=np.int64).reshape(n_sets, size)
    acc = strings.take(idx[:, 0])
    rows = np.arange(n_sets)
    for k in range(1, size):
        acc = acc.products(rows, idx[:, k], other=strings)
    couplings = m.couplings
    if all(isinstance(c, (int, float, complex)) for c in couplings) and any(
        isinstance(c, (float, complex)) for c in couplings
    ):
        values = np.prod(m.coupling_array()[idx], axis=1).tolist()
    else:
        values = [_exact_product(couplings[j] for j in row) for row in idx.tolist()]
    return acc, values


def _exact_product(values: Any) -> Any:
    out: Any = 1
    for v in values:
        out = out * v
    if isinstance(out, sympy.Basic):
        return sympy.expand(out)
    if isinstance(out, Fraction) and out.denominator == 1:
        return out.numerator
    return out


def charge(m: Model, s: int, limit: int = DEFAULT_LIMIT) -> StringSum:
    """The charge ``Q^(s) = sum_{|S| = s} prod_{j in S} c_j g_j`` as an exact operator sum.

    Parameters
    ----------
    m : Model
    s : int
        Order, ``0 <= s``; orders above the independence number give the zero operator.
    limit : int
        Largest number of products allowed.

    Returns
    -------
    StringSum
        Exact for exact couplings, symbolic for symbolic ones; ``.to_sparse()`` gives the
        matrix for small systems.

    Raises
    ------
    ValueError
        If ``s`` is negative or the order has more than ``limit`` products (the message gives
        the count).

    References
    ----------
    P. Fendley, J. Phys. A 52, 335002 (2019); S. J. Elman, A. Chapman and S. T. Flammia,
    Commun. Math. Phys. 388, 969 (2021).
    """
    m = _check_model(m)
    s = int(s)
    if s < 0:
        raise ValueError(f"the order of a charge must be >= 0, got {s}")
    counts = charge_counts(m)
    if s >= len(counts):
        return StringSum.zero(m.states, m.sites)
    _check_limit(counts[s], limit, s)
    sets = list(independence_graph(m).iter_sets(s))
    strings, couplings = _products(m, sets, s)
    return StringSum(strings, couplings)


def transfer_matrix(m: Model, u: Any, limit: int = DEFAULT_LIMIT) -> StringSum:
    """The transfer matrix ``T(u) = sum_s (-u)^s Q^(s)`` as an exact operator sum.

    Parameters
    ----------
    m : Model
    u : number or sympy expression
        The spectral parameter.
    limit : int
        Largest total number of products (all orders together).

    Returns
    -------
    StringSum
        ``T(u) T(-u) = P(u^2)`` for N = 2 and ``prod_k T(omega^k u) = P(u^N)`` for chains.

    Raises
    ------
    ValueError
        If the total number of independent sets exceeds ``limit``, or a float ``u`` meets
        exact couplings too large for a float.

    References
    ----------
    P. Fendley, J. Phys. A 52, 335002 (2019), arXiv:1901.08078;
    F. C. Alcaraz and R. A. Pimenta, Phys. Rev. B 102, 121101(R) (2020), arXiv:2005.14622.
    """
    m = _check_model(m)
    counts = charge_counts(m)
    _check_limit(sum(counts), limit, None)
    graph = independence_graph(m)
    xs, zs, phases = [], [], []
    coefs: list[Any] = []
    for s in range(len(counts)):
        sets = list(graph.iter_sets(s))
        strings, couplings = _products(m, sets, s)
        factor = (-u) ** s if s else 1
        xs.append(strings.x)
        zs.append(strings.z)
        phases.append(strings.phase)
        try:
            coefs.extend(factor * c for c in couplings)
        except OverflowError:
            raise ValueError(
                f"the products of order {s} of the exact couplings are too large for a float "
                f"times u = {u!r}; give u as an exact number (a Fraction or an int)"
            ) from None
    arr = StringArray(sps.vstack(xs), sps.vstack(zs), np.concatenate(phases), m.states, m.sites)
    return StringSum(arr, coefs)
