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
from typing import Any

import networkx as nx

from ..base.frozen import readonly_mapping
from ..base.interrupt import poll
from ..base.jsonready import json_ready

__all__ = ["LineGraphRoot", "NotALineGraph", "line_graph_root"]

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
        ``|E| - |V| + 1`` members for a connected root graph.
        """
        adj: list[dict[int, int]] = [{} for _ in range(self.n_modes)]
        for term, (a, b) in self.pairs.items():
            adj[a][b] = term
            adj[b][a] = term
        out = []
        for cycle in _cycle_basis(adj):
            ring = [*cycle, cycle[0]]
            out.append([int(adj[u][v]) for u, v in zip(ring, ring[1:], strict=False)])
        return out


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
    candidates = [_Root({start: (0, 1)}, [{start}, {start}])]
    placed = {start}
    for v in order[1:]:
        earlier = adjacency[v] & placed
        if len(candidates) == 1 and len(candidates[0].at) >= _WHITNEY_SIZE:
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
    final = candidates[0]
    pairs = {t: (min(a, b), max(a, b)) for t, (a, b) in final.ends.items()}
    return LineGraphRoot(pairs, len(final.at))


def _cycle_basis(adj: Sequence[Mapping[int, int]]) -> list[list[int]]:
    """The cycles ``networkx.cycle_basis`` gives for the simple graph with these neighbours.

    The same spanning-tree walk (components from the last node back, neighbours in insertion
    order), on plain lists instead of a networkx graph.
    """
    remaining = dict.fromkeys(range(len(adj)))
    cycles: list[list[int]] = []
    while remaining:
        root = remaining.popitem()[0]
        stack = [root]
        pred = {root: root}
        used: dict[int, set[int]] = {root: set()}
        while stack:
            z = stack.pop()
            zused = used[z]
            for nbr in adj[z]:
                if nbr not in used:
                    pred[nbr] = z
                    stack.append(nbr)
                    used[nbr] = {z}
                elif nbr not in zused:
                    pn = used[nbr]
                    cycle = [nbr, z]
                    q = pred[z]
                    while q not in pn:
                        cycle.append(q)
                        q = pred[q]
                    cycle.append(q)
                    cycles.append(cycle)
                    used[nbr].add(z)
        for node in pred:
            remaining.pop(node, None)
    return cycles


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
