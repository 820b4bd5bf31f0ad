"""Line-graph recognition with the root graph: the generalised Jordan-Wigner map.

A frustration graph G is the line graph of a root graph R exactly when the terms can be written
as Majorana bilinears ``i gamma_a gamma_b``, one per edge ``(a, b)`` of R (A. Chapman and
S. T. Flammia, Quantum 4, 278 (2020)).  :func:`line_graph_root` finds R for one connected
graph by adding vertices one at a time in breadth-first order, in the spirit of the incremental
algorithm of D. G. Degiorgi and K. Simon (1995): each new vertex must become an edge whose two
ends carry exactly its earlier neighbours.  While the partial root graph has at most four
vertices it can be ambiguous (Whitney's exceptions K3 / K_{1,3} and their small relatives), so
every possible root is kept; from five root vertices on, Whitney's theorem makes the root unique
and at most one extension survives.

References
----------
H. Whitney, Amer. J. Math. 54, 150 (1932) (uniqueness of the root graph);
D. G. Degiorgi and K. Simon, "A dynamic algorithm for line graph recognition", WG 1995,
LNCS 1017, 37 (1995);
A. Chapman and S. T. Flammia, Quantum 4, 278 (2020), arXiv:2003.05465.
"""

from __future__ import annotations

from collections import deque
from collections.abc import Mapping, Sequence
from dataclasses import dataclass
from typing import TYPE_CHECKING, Any, cast

import numpy as np
import scipy.sparse as sps

from ..base.frozen import readonly_mapping
from ..base.interrupt import poll
from ..base.jsonready import json_ready

if TYPE_CHECKING:
    import networkx as nx
    import scipy.sparse.csgraph as csgraph
else:
    from ..base.lazy import csgraph
    from ..base.lazy import networkx as nx


__all__ = ["LineGraphRoot", "NotALineGraph", "component_root", "line_graph_root"]

_WHITNEY_SIZE = 5
"""Root graphs with at least this many vertices are unique (Whitney 1932)."""


@dataclass(frozen=True)
class LineGraphRoot:
    """A root graph R with ``L(R) = G`` for one connected graph G.

    Attributes
    ----------
    pairs : mapping, read-only
        Vertex of G (a term index) -> the two root vertices (Majorana modes) ``(a, b)``, a < b.
        Root vertices are numbered 0, 1, 2, ... within the component.
    n_modes : int
        Number of root vertices (Majorana modes).
    """

    pairs: Mapping[int, tuple[int, int]]
    n_modes: int

    def __post_init__(self) -> None:
        pairs = {int(t): (int(a), int(b)) for t, (a, b) in self.pairs.items()}
        object.__setattr__(self, "pairs", readonly_mapping(pairs))

    def to_dict(self) -> dict[str, Any]:
        """JSON-ready fields: ``pairs`` (term index as text -> ``[a, b]``), ``n_modes`` and the
        independent ``cycles`` (lists of terms)."""
        return json_ready({"pairs": self.pairs, "n_modes": self.n_modes, "cycles": self.cycles()})

    def graph(self) -> nx.Graph:
        """The root graph: nodes are modes, each edge carries ``term`` (the vertex of G)."""
        root = nx.Graph()
        root.add_nodes_from(range(self.n_modes))
        for term, (a, b) in self.pairs.items():
            root.add_edge(a, b, term=term)
        return root

    def cycles(self) -> list[list[int]]:
        """A basis of independent cycles of R, each as the list of terms along the cycle.

        The product of the terms around a cycle of R commutes with every term (Chapman and
        Flammia 2020): these are the conserved cycle operators.  The basis has
        ``|E| - |V| + c`` members (c connected components), the cycles ``networkx.cycle_basis``
        gives for the root graph.
        """
        if not self.pairs:
            return []
        terms = np.fromiter(self.pairs.keys(), dtype=np.int64, count=len(self.pairs))
        ends = np.array(list(self.pairs.values()), dtype=np.int64).reshape(-1, 2)
        return _cycle_basis(self.n_modes, ends[:, 0], ends[:, 1], terms)


@dataclass(frozen=True)
class NotALineGraph:
    """Why the recognition failed: ``term`` could not be placed given ``partners``.

    Attributes
    ----------
    term : int
        The vertex of G that admits no pair of Majorana modes.
    partners : tuple of int
        Its neighbours among the vertices placed before it.
    """

    term: int
    partners: tuple[int, ...]

    def to_dict(self) -> dict[str, Any]:
        """JSON-ready fields."""
        return json_ready({"term": self.term, "partners": self.partners})


class _Root:
    """A partial root graph: ends of each placed vertex, and the vertices at each mode."""

    __slots__ = ("ends", "at")

    def __init__(self, ends: dict[int, tuple[int, int]], at: list[set[int]]) -> None:
        self.ends = ends
        self.at = at

    def extended(self, v: int, a: int, b: int) -> _Root:
        ends = dict(self.ends)
        at = [set(s) for s in self.at]
        if b == len(at):
            at.append(set())
        ends[v] = (a, b)
        at[a].add(v)
        at[b].add(v)
        return _Root(ends, at)

    def extend_in_place(self, v: int, a: int, b: int) -> None:
        if b == len(self.at):
            self.at.append(set())
        self.ends[v] = (a, b)
        self.at[a].add(v)
        self.at[b].add(v)

    def placements(self, earlier: set[int]) -> list[tuple[int, int]]:
        """All mode pairs ``(a, b)`` whose incident vertices are exactly ``earlier``.

        ``b == len(self.at)`` stands for a new mode.  At most two pairs exist: one end must be
        an end of any one earlier neighbour.
        """
        u = next(iter(earlier))
        found = []
        for a in self.ends[u]:
            if not self.at[a] <= earlier:
                continue
            rest = earlier - self.at[a]
            if not rest:
                found.append((a, len(self.at)))
                continue
            r = next(iter(rest))
            for b in self.ends[r]:
                if rest <= self.at[b] and self.at[b] <= earlier and not (self.at[a] & self.at[b]):
                    found.append((a, b))
        return found


def line_graph_root(
    adjacency: Sequence[set[int]], vertices: Sequence[int]
) -> LineGraphRoot | NotALineGraph:
    """Find a root graph R with ``L(R) = G[vertices]``, for a connected induced subgraph.

    Parameters
    ----------
    adjacency : sequence of sets
        ``adjacency[v]`` is the set of neighbours of vertex ``v`` in the whole graph.
    vertices : sequence of int
        The vertices of one connected component (every neighbour of a vertex in it is in it).

    Returns
    -------
    LineGraphRoot or NotALineGraph
        The root with the Majorana pair of every vertex, or the vertex where no pair exists.

    Notes
    -----
    Each vertex costs O(deg) set work once the root has five or more modes; before that, the
    (few) possible roots are all carried along.  The total is O(n + m) for bounded degree.
    A single vertex is the line graph of one edge.

    Examples
    --------
    >>> adj = [{1}, {0, 2}, {1}]          # a path of three vertices = L(path of four)
    >>> line_graph_root(adj, [0, 1, 2]).n_modes
    4
    """
    if not vertices:
        return LineGraphRoot({}, 0)
    start = int(min(vertices))
    order = _bfs_order(adjacency, start)
    if len(order) != len(vertices):
        raise ValueError("line_graph_root needs the vertices of one connected component")
    return _root_along(adjacency, order)


def _root_along(
    adjacency: Sequence[set[int]], order: Sequence[int]
) -> LineGraphRoot | NotALineGraph:
    """:func:`line_graph_root` given its breadth-first order (from the least vertex, each
    vertex's new neighbours in ascending order)."""
    grown = _grow(adjacency, order, whitney_stop=False)
    if isinstance(grown, NotALineGraph):
        return grown
    final = grown[0]
    pairs = {t: (min(a, b), max(a, b)) for t, (a, b) in final.ends.items()}
    return LineGraphRoot(pairs, len(final.at))


def component_root(adjacency: sps.csr_array, vertices: np.ndarray) -> LineGraphRoot | NotALineGraph:
    """:func:`line_graph_root` of one connected component, from the sparse adjacency.

    The same answer (the same numbering of the modes included) in time linear in the size of
    the component.  In a line graph whose root has no triangle, the neighbours of a term split
    into two cliques with no edge between them, one per end; the ends of all terms are the
    connected components of these halves, joined along every edge.  The root so found is
    checked exactly (its line graph must be the component), and Whitney's theorem makes it the
    one root up to the names of the modes; the names are then those the incremental algorithm
    gives: the first terms in breadth-first order are placed by it, and every later mode is
    numbered by its first appearance.  When the check fails (a triangle in the root, or no
    line graph at all), the incremental algorithm decides.

    Parameters
    ----------
    adjacency : scipy.sparse.csr_array
        The symmetric adjacency of the whole graph, column indices sorted within each row.
    vertices : numpy.ndarray of int
        The vertices of one connected component, ascending.

    Returns
    -------
    LineGraphRoot or NotALineGraph

    References
    ----------
    H. Whitney, Amer. J. Math. 54, 150 (1932); D. G. Degiorgi and K. Simon, WG 1995.
    """
    vertices = np.asarray(vertices, dtype=np.int64)
    # read one vertex at a time (the algorithm only indexes it): no set per vertex up front
    sets = cast(Sequence[set[int]], _CsrNeighbours(adjacency))
    if len(vertices) < _FAST_SIZE:
        return line_graph_root(sets, vertices.tolist())
    whole = len(vertices) == adjacency.shape[0]
    sub = adjacency if whole else sps.csr_array(adjacency[vertices][:, vertices])
    if not sub.has_sorted_indices:
        sub = sps.csr_array(sub, copy=True)
        sub.sort_indices()
    local = csgraph.breadth_first_order(sub, 0, directed=True, return_predecessors=False)
    if len(local) != len(vertices):
        raise ValueError("component_root needs the vertices of one connected component")
    # scipy's breadth-first order from the least vertex, neighbours in ascending (sorted CSR)
    # order, is the one line_graph_root takes: the incremental algorithm can run along it
    order = vertices[local]
    ends = _root_ends(sub)
    if ends is None:
        return _root_along(sets, order.tolist())
    early = _grow(sets, order.tolist(), whitney_stop=True)
    if isinstance(early, NotALineGraph):
        return _root_along(sets, order.tolist())
    names = _mode_names(ends, local, early, vertices)
    if names is None:
        return _root_along(sets, order.tolist())
    named = names[ends[local]]
    lo, hi = np.minimum(named[:, 0], named[:, 1]), np.maximum(named[:, 0], named[:, 1])
    pairs = dict(zip(order.tolist(), zip(lo.tolist(), hi.tolist(), strict=True), strict=True))
    return LineGraphRoot(pairs, int(names.max()) + 1)


_FAST_SIZE = 32
"""Components with fewer terms are left to the incremental algorithm alone."""


class _CsrNeighbours:
    """``adjacency[v]`` as a set, read from a CSR matrix when asked."""

    def __init__(self, adjacency: sps.csr_array) -> None:
        self.indptr = adjacency.indptr
        self.indices = adjacency.indices

    def __getitem__(self, v: int) -> set[int]:
        return set(self.indices[self.indptr[v] : self.indptr[v + 1]].tolist())

    def __len__(self) -> int:
        return len(self.indptr) - 1


def _root_ends(sub: sps.csr_array) -> np.ndarray | None:
    """The two modes of every vertex (rows of an ``(n, 2)`` array), or None.

    Valid only when checked: the line graph of the root found equals ``sub`` exactly.
    """
    n = int(sub.shape[0])
    indptr = sub.indptr.astype(np.int64)
    cols = sub.indices.astype(np.int64)
    degree = np.diff(indptr)
    if np.any(degree == 0):
        return None
    rows = np.repeat(np.arange(n, dtype=np.int64), degree)
    keys = rows * n + cols  # ascending: rows ascending, columns sorted within a row
    first = cols[indptr[:-1]]  # each vertex's first neighbour opens side 0
    probe = cols * n + first[rows]
    hit = np.searchsorted(keys, probe)
    hit = np.minimum(hit, len(keys) - 1)
    side = np.where((cols == first[rows]) | (keys[hit] == probe), 0, 1)
    mirror = cols * n + rows
    back = np.minimum(np.searchsorted(keys, mirror), len(keys) - 1)  # the edge from its other end
    if np.any(keys[back] != mirror):
        return None
    halves = sps.csr_array(
        (np.ones(len(rows), dtype=np.int8), (2 * rows + side, 2 * cols + side[back])),
        shape=(2 * n, 2 * n),
    )
    _count, labels = csgraph.connected_components(halves, directed=False)
    ends = labels.reshape(n, 2).astype(np.int64)
    if np.any(ends[:, 0] == ends[:, 1]):
        return None
    # check: two vertices are adjacent exactly when they share one mode, never two
    incidence = sps.csr_array(
        (np.ones(2 * n, dtype=np.int32), (np.repeat(np.arange(n), 2), ends.ravel())),
        shape=(n, int(labels.max()) + 1),
    )
    shared = sps.coo_array(incidence @ incidence.T)
    off = shared.row != shared.col
    if np.any(shared.data[off] != 1) or int(off.sum()) != len(keys):
        return None
    found = np.sort(shared.row[off].astype(np.int64) * n + shared.col[off])
    if not np.array_equal(found, keys):
        return None
    return ends


def _mode_names(
    ends: np.ndarray, local: np.ndarray, early: tuple[_Root, int], vertices: np.ndarray
) -> np.ndarray | None:
    """Mode label -> the name the incremental algorithm gives it, or None if they disagree.

    ``early`` is the incremental algorithm's root over the first terms in breadth-first order
    (``local``); every other mode is named by its first appearance along that order.
    """
    root, placed = early
    where = {int(v): k for k, v in enumerate(vertices[local[:placed]].tolist())}
    names = np.full(int(ends.max()) + 1, -1, dtype=np.int64)
    # a mode of two or more placed terms is the one they share; a pendant end comes after
    pending = []
    for name, at in enumerate(root.at):
        members = [int(local[where[t]]) for t in at]
        if len(members) == 1:
            pending.append((name, members[0]))
            continue
        common = set(ends[members[0]].tolist()) & set(ends[members[1]].tolist())
        if len(common) != 1:
            return None
        names[common.pop()] = name
    for name, t in pending:
        a, b = ends[t].tolist()
        if names[a] >= 0 and names[b] < 0:
            names[b] = name
        elif names[b] >= 0 and names[a] < 0:
            names[a] = name
        else:
            return None
    seq = ends[local].ravel()
    _modes, first_at = np.unique(seq, return_index=True)
    fresh = _modes[names[_modes] < 0]
    fresh = fresh[np.argsort(first_at[names[_modes] < 0], kind="stable")]
    names[fresh] = len(root.at) + np.arange(len(fresh))
    # every placed term keeps its pair
    for t, (a, b) in root.ends.items():
        k = int(local[where[t]])
        if {int(names[e]) for e in ends[k].tolist()} != {a, b}:
            return None
    return names


def _grow(
    adjacency: Sequence[set[int]], order: Sequence[int], whitney_stop: bool
) -> tuple[_Root, int] | NotALineGraph:
    """The incremental algorithm along ``order`` (breadth-first from its first vertex).

    Returns the root and the number of vertices placed: all of them, or with ``whitney_stop``
    only those placed before a single root of five or more modes remains (from then on the
    root is unique, Whitney 1932).
    """
    start = order[0]
    candidates = [_Root({start: (0, 1)}, [{start}, {start}])]
    placed = {start}
    for i, v in enumerate(order[1:], 1):
        earlier = adjacency[v] & placed
        if len(candidates) == 1 and len(candidates[0].at) >= _WHITNEY_SIZE:
            if whitney_stop:
                return candidates[0], i
            root = candidates[0]
            options = root.placements(earlier)
            if not options:
                return NotALineGraph(v, tuple(sorted(earlier)))
            root.extend_in_place(v, *options[0])
        else:
            grown = [c.extended(v, a, b) for c in candidates for a, b in c.placements(earlier)]
            if not grown:
                return NotALineGraph(v, tuple(sorted(earlier)))
            if len(grown[0].at) >= _WHITNEY_SIZE:
                grown = grown[:1]
            candidates = grown
        placed.add(v)
    return candidates[0], len(order)


def _cycle_basis(
    n: int, first: np.ndarray, second: np.ndarray, terms: np.ndarray
) -> list[list[int]]:
    """The cycles ``networkx.cycle_basis`` gives for the root graph, as lists of terms.

    The graph has nodes ``0 .. n-1`` and the edges ``(first[k], second[k])`` carrying
    ``terms[k]``, added in this order to a networkx graph (a repeated edge keeps its first
    place among the neighbours and its last term).  A forest has no cycle and is answered at
    once (``|E| - |V| + c = 0``); otherwise the same spanning-tree walk as networkx
    (components from the highest node down, each node's neighbours in insertion order) runs on
    flat lists.
    """
    src = np.stack([first, second], axis=1).ravel()
    dst = np.stack([second, first], axis=1).ravel()
    key = src * n + dst
    uniq, first_at = np.unique(key, return_index=True)
    last_at = len(key) - 1 - np.unique(key[::-1], return_index=True)[1]
    edge_term = np.repeat(terms, 2)[last_at]  # a repeated edge keeps its last term
    n_edges = len(uniq) // 2
    n_comp = csgraph.connected_components(
        sps.csr_array((np.ones(len(uniq), dtype=np.int8), (uniq // n, uniq % n)), shape=(n, n)),
        directed=False,
    )[0]
    if n_edges - n + n_comp == 0:
        return []
    placed = np.lexsort((first_at, uniq // n))  # by node, then by first insertion
    indptr = np.searchsorted(uniq[placed] // n, np.arange(n + 1)).tolist()
    neighbours = (uniq[placed] % n).tolist()
    pred = [-1] * n
    up = [-1] * n  # pred, except -1 at the start of each walk (networkx: used[root] = {})
    extra: dict[int, set[int]] = {}  # used[v] beyond its pred
    cycles: list[list[int]] = []
    for root in range(n - 1, -1, -1):
        if pred[root] >= 0:
            continue
        pred[root] = root
        stack = [root]
        while stack:
            poll()
            z = stack.pop()
            uz = up[z]
            ez = extra.get(z)
            for k in range(indptr[z], indptr[z + 1]):
                nbr = neighbours[k]
                if pred[nbr] < 0:
                    pred[nbr] = z
                    up[nbr] = z
                    stack.append(nbr)
                elif nbr != uz and (ez is None or nbr not in ez):
                    un = up[nbr]
                    en = extra.setdefault(nbr, set())
                    cycle = [nbr, z]
                    q = pred[z]
                    while q != un and q not in en:
                        cycle.append(q)
                        q = pred[q]
                    cycle.append(q)
                    cycles.append(cycle)
                    en.add(z)
    out = []
    for cycle in cycles:
        ring = np.asarray(cycle, dtype=np.int64)
        hops = ring * n + np.roll(ring, -1)
        out.append(edge_term[np.searchsorted(uniq, hops)].tolist())
    return out


def _bfs_order(adjacency: Sequence[set[int]], start: int) -> list[int]:
    seen = {start}
    order = [start]
    queue = deque([start])
    while queue:
        poll()
        u = queue.popleft()
        for w in sorted(adjacency[u] - seen):
            seen.add(w)
            order.append(w)
            queue.append(w)
    return order
