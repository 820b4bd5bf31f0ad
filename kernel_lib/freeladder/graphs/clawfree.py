"""Searches on frustration graphs: claws, simplicial cliques, even holes.

All functions take ``adjacency`` (a sequence of neighbour sets over the whole graph) and the
vertices of one connected component, and return vertex lists that a caller can check by hand.

* A *claw* is a vertex with three pairwise non-adjacent neighbours: the obstruction to the
  free-fermion theorems (S. J. Elman, A. Chapman, S. T. Flammia, Commun. Math. Phys. 388, 969
  (2021), arXiv:2012.07857).
* A *simplicial clique* is a clique K such that ``N(v) \\ K`` is a clique for every v in K
  (A. Chapman, S. J. Elman, R. L. Mann, arXiv:2305.15625 (2023)).
* An *even hole* is an induced cycle of even length >= 4.

When the graph has an indifference ordering (every closed neighbourhood a contiguous block of
the order), :func:`check_order` settles all three in linear time from the order alone; the
searches are for the other graphs.

References
----------
S. J. Elman, A. Chapman and S. T. Flammia, Commun. Math. Phys. 388, 969 (2021);
A. Chapman, S. J. Elman and R. L. Mann, arXiv:2305.15625 (2023);
F. S. Roberts, in *Proof Techniques in Graph Theory* (Academic Press, 1969);
D. J. Rose, R. E. Tarjan and G. S. Lueker, SIAM J. Comput. 5, 266 (1976).
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass
from typing import TYPE_CHECKING, Any

import numpy as np
import scipy.sparse as sps

from ..base.interrupt import poll, polled
from ..base.jsonready import json_ready

if TYPE_CHECKING:
    import networkx as nx
else:
    from ..base.lazy import networkx as nx


__all__ = [
    "EXACT_HOLE_BUDGET",
    "EXACT_HOLE_LIMIT",
    "HOLE_SEARCH_BUDGET",
    "HoleSearch",
    "OrderCheck",
    "check_order",
    "find_claw",
    "find_even_hole",
    "find_simplicial_clique",
    "is_chordal",
    "is_clique",
]

_SMALL_NEIGHBOURHOOD = 12
"""Neighbourhoods up to this size are searched for a claw triple by triple (no matrices)."""

EXACT_HOLE_LIMIT = 400
"""Components up to this many vertices get the large even-hole search budget."""

EXACT_HOLE_BUDGET = 10_000_000
"""Extension steps allowed to the even-hole search on components up to EXACT_HOLE_LIMIT."""

HOLE_SEARCH_BUDGET = 1_000_000
"""Extension steps allowed beyond EXACT_HOLE_LIMIT vertices."""


@dataclass(frozen=True)
class OrderCheck:
    """An ordering of a graph's vertices, checked vertex by vertex (see :func:`check_order`).

    Attributes
    ----------
    order : numpy.ndarray of int64
        The vertices, position by position.
    position : numpy.ndarray of int64
        The position of every vertex.
    last : numpy.ndarray of int64
        The last position of every vertex's closed neighbourhood.
    good : numpy.ndarray of bool
        Whether the vertex passed both tests: its closed neighbourhood is the contiguous block
        of positions up to ``last``, and ``last`` does not exceed that of the next position
        (the perfect-elimination test of Rose, Tarjan and Lueker on such blocks).
    """

    order: np.ndarray
    position: np.ndarray
    last: np.ndarray
    good: np.ndarray

    def simplicial_clique(self, vertices: np.ndarray) -> tuple[int, ...] | None:
        """The simplicial clique the order certifies for one component, or None.

        None unless ``vertices`` (one connected component) fill a contiguous block of the order
        and every one of them passed; the clique is then the first vertex of the block with
        all its neighbours (see :func:`check_order`).
        """
        verts = np.asarray(vertices, dtype=np.int64)
        if not len(verts) or not bool(np.all(self.good[verts])):
            return None
        start = int(self.position[verts].min())
        if int(self.position[verts].max()) - start != len(verts) - 1:
            return None
        first = int(self.order[start])
        return tuple(sorted(self.order[start : int(self.last[first]) + 1].tolist()))


def check_order(adjacency: sps.csr_array, order: np.ndarray) -> OrderCheck:
    """Check, in linear time, which vertices an ordering certifies as an indifference graph.

    With ``p`` the position in ``order``, every vertex v is tested for (1) its closed
    neighbourhood is a contiguous block ``[first(v), last(v)]`` of positions (it holds
    ``degree + 1`` positions from the least to the greatest), and (2) when v has later
    neighbours, the first of them, u at ``p(v) + 1``, has ``last(u) >= last(v)``: u is adjacent
    to every other later neighbour of v, the perfect-elimination test of Rose, Tarjan and
    Lueker (1976).  On a connected component where every vertex passes:

    * ``last`` never decreases along the order (by (2), and ``last(v) = p(v)`` otherwise), so
      a block ``[a, b]`` with ``last(a) >= b`` is a clique;
    * the later neighbours of v, ``(p(v), last(v)]``, form a clique: the order is a perfect
      elimination ordering, so the component is chordal (Fulkerson and Gross 1965) and has no
      hole, even or odd;
    * the earlier neighbours, ``[first(v), p(v))``, form a clique (``last(first(v)) >= p(v)``,
      as the two are adjacent), so N(v) is covered by two cliques and holds no three pairwise
      non-adjacent vertices: the component is claw-free (indifference graphs are the
      claw-free interval graphs, Roberts 1969);
    * K, the first vertex w of the component with its neighbours ``[p(w), last(w)]``, is a
      simplicial clique: for v in K, ``N(v) \\ K`` lies among the later neighbours of v, a
      clique.

    The ordering itself may come from anywhere (:func:`freeladder.graphs.indifference.level_order`
    proposes one); nothing about it is trusted.

    Parameters
    ----------
    adjacency : scipy.sparse.csr_array
        Symmetric, without diagonal entries or repeated column indices.
    order : numpy.ndarray of int
        Every vertex once.

    Returns
    -------
    OrderCheck

    References
    ----------
    D. J. Rose, R. E. Tarjan and G. S. Lueker, SIAM J. Comput. 5, 266 (1976);
    D. R. Fulkerson and O. A. Gross, Pacific J. Math. 15, 835 (1965);
    F. S. Roberts, in *Proof Techniques in Graph Theory* (Academic Press, 1969).
    (Journal details cited from memory.)

    Examples
    --------
    >>> import numpy as np, scipy.sparse as sps
    >>> path = sps.csr_array(np.eye(4, k=1) + np.eye(4, k=-1))
    >>> check_order(path, np.array([0, 1, 2, 3])).simplicial_clique(np.arange(4))
    (0, 1)
    >>> print(check_order(path, np.array([0, 2, 1, 3])).simplicial_clique(np.arange(4)))
    None
    """
    n = int(adjacency.shape[0])
    order = np.asarray(order, dtype=np.int64)
    position = np.empty(n, dtype=np.int64)
    position[order] = np.arange(n)
    degree = np.diff(adjacency.indptr).astype(np.int64)
    first, last = position.copy(), position.copy()
    filled = np.flatnonzero(degree > 0)
    if len(filled):
        at = position[adjacency.indices]
        starts = adjacency.indptr[filled]
        first[filled] = np.minimum(first[filled], np.minimum.reduceat(at, starts))
        last[filled] = np.maximum(last[filled], np.maximum.reduceat(at, starts))
    good = last - first == degree
    in_order = last[order]
    has_later = in_order[:-1] > np.arange(n - 1)
    eliminates = np.ones(n, dtype=bool)
    eliminates[:-1] = ~has_later | (in_order[1:] >= in_order[:-1])
    good[order] &= eliminates
    return OrderCheck(order, position, last, good)


def find_claw(adjacency: Sequence[set[int]], vertices: Sequence[int]) -> tuple[int, ...] | None:
    """A claw ``(centre, leaf, leaf, leaf)`` among ``vertices``, or None when claw-free.

    For each centre the neighbourhood's non-adjacency matrix ``B`` is formed and a triangle of
    ``B`` (three pairwise non-adjacent neighbours) is read off ``B @ B * B``: O(n Delta^3).
    Neighbourhoods of at most 12 vertices are searched triple by triple instead (the same first
    triple, without the matrices' fixed cost).

    Examples
    --------
    >>> find_claw([{1, 2, 3}, {0}, {0}, {0}], [0, 1, 2, 3])
    (0, 1, 2, 3)
    """
    for v in vertices:
        poll()
        nbrs = sorted(adjacency[v])
        k = len(nbrs)
        if k < 3:
            continue
        if k <= _SMALL_NEIGHBOURHOOD:
            leaves3 = _first_independent_triple(adjacency, nbrs)
            if leaves3 is not None:
                return (int(v), *leaves3)
            continue
        index = {u: i for i, u in enumerate(nbrs)}
        apart = np.ones((k, k), dtype=np.int64)
        np.fill_diagonal(apart, 0)
        for i, u in enumerate(nbrs):
            for w in adjacency[u]:
                j = index.get(w)
                if j is not None:
                    apart[i, j] = 0
        two_step = (apart @ apart) * apart
        hits = np.argwhere(two_step > 0)
        if hits.size:
            i, j = (int(t) for t in hits[0])
            c = int(np.nonzero(apart[i] * apart[j])[0][0])
            leaves = sorted((nbrs[i], nbrs[j], nbrs[c]))
            return (int(v), *leaves)
    return None


def _first_independent_triple(
    adjacency: Sequence[set[int]], nbrs: list[int]
) -> tuple[int, int, int] | None:
    """The first (lexicographic in ``nbrs``) three pairwise non-adjacent vertices, or None."""
    k = len(nbrs)
    for i in range(k - 2):
        near_i = adjacency[nbrs[i]]
        for j in range(i + 1, k - 1):
            if nbrs[j] in near_i:
                continue
            near_j = adjacency[nbrs[j]]
            for c in range(j + 1, k):
                if nbrs[c] not in near_i and nbrs[c] not in near_j:
                    return (int(nbrs[i]), int(nbrs[j]), int(nbrs[c]))
    return None


def is_clique(adjacency: Sequence[set[int]], vertices: set[int] | Sequence[int]) -> bool:
    """True when every two of ``vertices`` are adjacent."""
    vs = list(vertices)
    return all(vs[j] in adjacency[vs[i]] for i in range(len(vs)) for j in range(i + 1, len(vs)))


def find_simplicial_clique(
    adjacency: Sequence[set[int]], vertices: Sequence[int]
) -> tuple[int, ...] | None:
    """A simplicial clique among ``vertices``, or None when there is none.

    Every clique lies in a maximal clique, and every maximal clique through v is v plus a maximal
    clique of ``N(v)``, so only maximal cliques K0 are enumerated (Bron-Kerbosch with pivoting,
    networkx.find_cliques).  Each K0 is then pruned: remove every v with ``N(v) \\ K0`` not a
    clique, and repeat.  A simplicial clique K inside K0 is never removed (``N(v) \\ K0`` is a
    subset of the clique ``N(v) \\ K``), so the pruning ends at a non-empty simplicial clique
    exactly when K0 contains one.  The search is therefore complete.

    Examples
    --------
    >>> find_simplicial_clique([{1}, {0, 2}, {1}], [0, 1, 2])   # a path: {0, 1} works
    (0, 1)
    """
    sub = nx.Graph()
    sub.add_nodes_from(vertices)
    for u in polled(vertices):
        sub.add_edges_from((u, w) for w in adjacency[u] if u < w)
    seen: set[frozenset[int]] = set()
    for clique in nx.find_cliques(sub):
        poll()
        key = frozenset(clique)
        if key in seen:
            continue
        seen.add(key)
        kept = _prune_to_simplicial(adjacency, set(clique))
        if kept:
            return tuple(sorted(kept))
    return None


def _prune_to_simplicial(adjacency: Sequence[set[int]], clique: set[int]) -> set[int]:
    while clique:
        bad = {v for v in clique if not is_clique(adjacency, adjacency[v] - clique)}
        if not bad:
            return clique
        clique = clique - bad
    return clique


def is_chordal(adjacency: Sequence[set[int]], vertices: Sequence[int]) -> bool:
    """True when the component has no hole (induced cycle of length >= 4).

    Maximum cardinality search followed by the perfect-elimination test, O(n + m): with
    visit order v_1, v_2, ..., the graph is chordal exactly when, for every v, the earlier
    neighbours of v other than the latest one, f, are all adjacent to f.

    References
    ----------
    R. E. Tarjan and M. Yannakakis, SIAM J. Comput. 13, 566 (1984).

    Examples
    --------
    >>> is_chordal([{1, 3}, {0, 2}, {1, 3}, {0, 2}], [0, 1, 2, 3])
    False
    """
    weight = dict.fromkeys(vertices, 0)
    buckets: list[set[int]] = [set(vertices)]
    visit: dict[int, int] = {}
    top = 0
    for step in polled(range(len(weight))):
        while not buckets[top]:
            top -= 1
        v = buckets[top].pop()
        visit[v] = step
        for w in adjacency[v]:
            if w in visit:
                continue
            buckets[weight[w]].discard(w)
            weight[w] += 1
            if weight[w] == len(buckets):
                buckets.append(set())
            buckets[weight[w]].add(w)
            top = max(top, weight[w])
    for v, t in polled(visit.items()):
        earlier = [w for w in adjacency[v] if visit[w] < t]
        if len(earlier) < 2:
            continue
        latest = max(earlier, key=visit.__getitem__)
        near = adjacency[latest]
        if any(w != latest and w not in near for w in earlier):
            return False
    return True


@dataclass(frozen=True)
class HoleSearch:
    """Outcome of an even-hole search on one component.

    Attributes
    ----------
    decided : bool
        False when the search gave up (see ``reason``).
    hole : tuple of int or None
        An even hole in cyclic order, when one was found.
    reason : str
        How the answer was reached.
    """

    decided: bool
    hole: tuple[int, ...] | None
    reason: str

    def to_dict(self) -> dict[str, Any]:
        """JSON-ready fields."""
        return json_ready(  # type: ignore[no-any-return]
            {"decided": self.decided, "hole": self.hole, "reason": self.reason}
        )


def find_even_hole(
    adjacency: Sequence[set[int]],
    vertices: Sequence[int],
    budget: int | None = None,
) -> HoleSearch:
    """Look for an even hole (an induced cycle of even length >= 4) among ``vertices``.

    Chordal components (checked in linear time) have no holes at all.  Otherwise a depth-first
    search over induced paths ``s = p0, p1, ...`` whose first vertex is the smallest of the cycle
    runs until it finds an even hole, exhausts all such paths (then the component is
    even-hole-free: the answer is exact), or spends ``budget`` extension steps (then the answer
    is "not decided").  The default budget is EXACT_HOLE_BUDGET for components of at most
    EXACT_HOLE_LIMIT vertices and HOLE_SEARCH_BUDGET beyond.

    Returns
    -------
    HoleSearch

    Examples
    --------
    >>> find_even_hole([{1, 3}, {0, 2}, {1, 3}, {0, 2}], [0, 1, 2, 3]).hole   # a 4-cycle
    (0, 1, 2, 3)
    """
    if is_chordal(adjacency, vertices):
        return HoleSearch(True, None, "the graph is chordal, so it has no holes at all")
    if budget is None:
        budget = EXACT_HOLE_BUDGET if len(vertices) <= EXACT_HOLE_LIMIT else HOLE_SEARCH_BUDGET
    steps = 0
    for s in sorted(vertices):
        path = [s]
        on_path = {s}
        seen_by_interior: dict[int, int] = {}  # vertex -> how many of p1 .. p_{k-1} it touches
        stack = [iter(sorted(w for w in adjacency[s] if w > s))]
        while stack:
            steps += 1
            if steps % 1024 == 0:
                poll()
            if steps > budget:
                return HoleSearch(
                    False,
                    None,
                    f"not decided: the even-hole search stopped after {budget} steps "
                    f"on {len(vertices)} terms without finding one",
                )
            x = next(stack[-1], None)
            if x is None:
                stack.pop()
                on_path.discard(path.pop())
                if len(path) >= 2:
                    for w in adjacency[path[-1]]:
                        seen_by_interior[w] -= 1
                continue
            if x in on_path or seen_by_interior.get(x, 0) > 0:
                continue
            if len(path) >= 2 and s in adjacency[x]:
                if len(path) % 2 == 1 and len(path) >= 3:
                    return HoleSearch(
                        True, (*path, x), f"an even hole of length {len(path) + 1} was found"
                    )
                continue
            if len(path) >= 2:
                for w in adjacency[path[-1]]:
                    seen_by_interior[w] = seen_by_interior.get(w, 0) + 1
            path.append(x)
            on_path.add(x)
            stack.append(iter(sorted(w for w in adjacency[x] if w > s)))
    return HoleSearch(True, None, "an exhaustive search over induced paths found no even hole")
