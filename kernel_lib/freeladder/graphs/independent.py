"""Independent sets of a graph: weighted sums over them, their sizes, and streaming enumeration.

Everything here works on a plain graph given as a boolean adjacency matrix; it knows nothing
about operators.  Vertex sets are Python integers used as bit sets, and every recursion is run
with an explicit stack, so graphs of 10^4 vertices are fine.

The core is the vertex-deletion identity for the independence polynomial
``I(G; x) = sum_S x^|S| prod_{v in S} w_v`` (sum over independent sets S),

    I(G) = I(G - v) + x w_v I(G - N[v]),

its clique form for a simplicial vertex v with closed neighbourhood ``K = N[v]`` (a clique:
every independent set meets K at most once)

    I(G) = I(G - K) + x sum_{u in K} w_u I(G - N[u]),

and ``I(G1 + G2) = I(G1) I(G2)`` over connected components, with memoisation on the vertex set
of each subproblem.  Branching always on the first remaining vertex of a fixed vertex order of
small bandwidth keeps every subproblem a "suffix of the order minus a few vertices near the
front", so the number of distinct subproblems grows linearly with the number of vertices for
strips of bounded width.  The same recursion, read in the (max, +) algebra, gives the
independence number of any subproblem, which makes the enumeration of the independent sets of
one size free of dead ends.

References
----------
I. Gutman and F. Harary, "Generalizations of the matching polynomial", Utilitas Math. 24, 97
(1983) (the independence polynomial and the deletion identity);
C. Hoede and X. Li, "Clique polynomials and independent set polynomials of graphs", Discrete
Math. 125, 219 (1994) (the clique form of the recursion);
E. Cuthill and J. McKee, Proc. 24th ACM National Conference, 157 (1969) (bandwidth-reducing
vertex order).
"""

from __future__ import annotations

from collections.abc import Callable, Iterator, Sequence
from dataclasses import dataclass
from typing import TYPE_CHECKING, Any, Generic, TypeVar

import numpy as np
import scipy.sparse as sps

if TYPE_CHECKING:
    import scipy.sparse.csgraph as csgraph
else:
    from ..base.lazy import csgraph

__all__ = ["Algebra", "IndependenceGraph"]

V = TypeVar("V")


@dataclass(frozen=True)
class Algebra(Generic[V]):
    """How to combine the values of subproblems of the deletion recursion.

    Attributes
    ----------
    one : value of the empty graph.
    add : combines the two (or more) alternatives of a branching step.
    mul : combines disjoint connected components.
    pick : ``pick(v, value)`` is ``x w_v * value`` -- vertex ``v`` taken into the set.

    Examples
    --------
    The independence number: ``Algebra(0, max, operator.add, lambda v, a: a + 1)``.
    """

    one: V
    add: Callable[[V, V], V]
    mul: Callable[[V, V], V]
    pick: Callable[[int, V], V]


def _alpha_pick(_v: int, a: int) -> int:
    return a + 1


def _plus(a: int, b: int) -> int:
    return a + b


ALPHA: Algebra[int] = Algebra(0, max, _plus, _alpha_pick)
"""The (max, +) algebra: evaluating it gives the independence number."""


def _bits(mask: int) -> Iterator[int]:
    """Positions of the set bits of ``mask``, lowest first."""
    while mask:
        low = mask & -mask
        yield low.bit_length() - 1
        mask ^= low


class IndependenceGraph:
    """A graph prepared for independent-set work: bit-set neighbourhoods in a fixed vertex order.

    Immutable once built (it is cached on models); only its private memo tables grow.

    Parameters
    ----------
    adjacency : scipy.sparse array or numpy array, shape (M, M)
        Symmetric; nonzero off-diagonal entries are edges.  The diagonal is ignored.
    order : sequence of int, optional
        Vertex order used for branching (position -> vertex).  Defaults to the reverse
        Cuthill-McKee order, which has small bandwidth on strips and chains.

    Notes
    -----
    Internally vertex ``order[q]`` is bit ``q``; results are always reported with the
    original vertex labels.  Memo tables are kept per algebra for the life of the object.

    Examples
    --------
    >>> import numpy as np
    >>> path = np.eye(4, k=1) + np.eye(4, k=-1)            # the path 0-1-2-3
    >>> g = IndependenceGraph(path)
    >>> g.independence_number()
    2
    >>> sorted(g.iter_sets(2))
    [(0, 2), (0, 3), (1, 3)]
    """

    order: tuple[int, ...]
    size: int
    full: int
    _open: tuple[int, ...]
    _closed: tuple[int, ...]
    _memo: dict[int, tuple[Algebra[Any], dict[int, Any]]]
    _plans: dict[int, tuple[str, Any, tuple[int, ...]]]

    def __init__(self, adjacency: Any, order: Sequence[int] | np.ndarray | None = None) -> None:
        adj = sps.csr_array(adjacency, dtype=bool)
        adj = sps.csr_array(adj + adj.T, dtype=bool)
        adj.setdiag(False)
        adj.eliminate_zeros()
        n = int(adj.shape[0])
        if adj.shape != (n, n):
            raise ValueError(f"adjacency must be square, got shape {adj.shape}")
        if order is None:
            perm = csgraph.reverse_cuthill_mckee(adj, symmetric_mode=True)
        else:
            perm = np.asarray(order, dtype=np.int64)
            if perm.shape != (n,) or not np.array_equal(np.sort(perm), np.arange(n)):
                raise ValueError(f"order must be a permutation of range({n})")
        put = object.__setattr__  # the graph is frozen; only its memo tables grow
        put(self, "order", tuple(int(v) for v in perm))
        permuted = sps.csr_array(adj[perm][:, perm])
        opened: list[int] = []
        for q in range(n):
            nb = 0
            for r in permuted.indices[permuted.indptr[q] : permuted.indptr[q + 1]]:
                nb |= 1 << int(r)
            opened.append(nb)
        put(self, "_open", tuple(opened))
        put(self, "_closed", tuple(nb | (1 << q) for q, nb in enumerate(opened)))
        put(self, "size", n)
        put(self, "full", (1 << n) - 1)
        put(self, "_memo", {})
        put(self, "_plans", {})

    def __setattr__(self, name: str, value: Any) -> None:
        raise AttributeError(f"IndependenceGraph is immutable (cannot set {name!r})")

    # -- the recursion ----------------------------------------------------------------------------
    def _component(self, start: int, mask: int) -> int:
        comp = 1 << start
        frontier = comp
        while frontier:
            reach = 0
            for u in _bits(frontier):
                reach |= self._open[u]
            frontier = reach & mask & ~comp
            comp |= frontier
        return comp

    def _plan(self, mask: int) -> tuple[str, Any, tuple[int, ...]]:
        """How subproblem ``mask`` splits: (kind, data, child masks)."""
        plan = self._plans.get(mask)
        if plan is not None:
            return plan
        v = (mask & -mask).bit_length() - 1
        comp = self._component(v, mask)
        if comp != mask:
            parts = [comp]
            rest = mask & ~comp
            while rest:
                piece = self._component((rest & -rest).bit_length() - 1, rest)
                parts.append(piece)
                rest &= ~piece
            plan = ("product", None, tuple(parts))
        else:
            nb = self._open[v] & mask
            simplicial = all((self._open[u] | (1 << u)) & nb == nb for u in _bits(nb))
            if simplicial:
                clique = nb | (1 << v)
                members = tuple(_bits(clique))
                children = (mask & ~clique, *(mask & ~self._closed[u] for u in members))
                plan = ("clique", members, children)
            else:
                plan = ("branch", v, (mask & ~(1 << v), mask & ~self._closed[v]))
        self._plans[mask] = plan
        return plan

    def evaluate(self, algebra: Algebra[V], mask: int | None = None) -> V:
        """Value of the recursion on the subgraph induced by ``mask`` (bit q = ``order[q]``).

        ``algebra.pick`` receives internal positions; :meth:`position_weights` helps build it.
        """
        # Keyed by identity; the algebra is stored too so that its id cannot be reused.
        memo = self._memo.setdefault(id(algebra), (algebra, {}))[1]
        root = self.full if mask is None else mask
        memo.setdefault(0, algebra.one)
        stack = [root]
        while stack:
            top = stack[-1]
            if top in memo:
                stack.pop()
                continue
            kind, data, children = self._plan(top)
            missing = [c for c in children if c not in memo]
            if missing:
                stack.extend(missing)
                continue
            stack.pop()
            if kind == "product":
                value = memo[children[0]]
                for c in children[1:]:
                    value = algebra.mul(value, memo[c])
            elif kind == "clique":
                value = memo[children[0]]
                for u, c in zip(data, children[1:], strict=True):
                    value = algebra.add(value, algebra.pick(u, memo[c]))
            else:
                value = algebra.add(memo[children[0]], algebra.pick(data, memo[children[1]]))
            memo[top] = value
        return memo[root]  # type: ignore[no-any-return]

    def independence_number(self, mask: int | None = None) -> int:
        """Size of the largest independent set (of the subgraph ``mask``)."""
        return self.evaluate(ALPHA, mask)

    # -- enumeration ------------------------------------------------------------------------------
    def iter_sets(self, size: int) -> Iterator[tuple[int, ...]]:
        """Stream the independent sets with ``size`` vertices, each a sorted tuple of vertices.

        Depth-first over the branching order: the first remaining vertex is taken or left out,
        and a branch is entered only if the independence number of what remains allows the
        missing vertices, so every branch ends in a set.  Memory is O(M) besides the memo of
        independence numbers; nothing is materialised.
        """
        size = int(size)
        if size < 0:
            return
        if size == 0:
            yield ()
            return
        if self.independence_number() < size:
            return
        label = self.order
        stack: list[tuple[int, int, tuple[int, ...]]] = [(self.full, size, ())]
        while stack:
            mask, need, chosen = stack.pop()
            if need == 0:
                yield tuple(sorted(label[q] for q in chosen))
                continue
            v = (mask & -mask).bit_length() - 1
            rest = mask & ~(1 << v)
            if rest and self.independence_number(rest) >= need:
                stack.append((rest, need, chosen))
            take = mask & ~self._closed[v]
            if need == 1 or (take and self.independence_number(take) >= need - 1):
                stack.append((take, need - 1, (*chosen, v)))

    def position_weights(self, weights: Sequence[Any]) -> list[Any]:
        """Reorder per-vertex ``weights`` (indexed by vertex) to internal positions."""
        return [weights[v] for v in self.order]
