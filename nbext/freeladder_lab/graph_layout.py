"""Where to draw each vertex of a frustration graph: a drawing decision, no physics.

Small graphs get a force-directed layout.  Large ones (or any exclusion chain) are laid out in
a *band*: vertices in a low-bandwidth order (the chain order, or reverse Cuthill-McKee) along
one horizontal line, so that every edge stays short and thousands of terms read as a ribbon
(the order on the horizontal axis) instead of a tangle.

References
----------
E. Cuthill and J. McKee, Proc. 24th ACM National Conference, 157 (1969) (bandwidth-reducing
order).
"""

from __future__ import annotations

from collections.abc import Sequence

import networkx as nx
import numpy as np

__all__ = ["SMALL_GRAPH", "band_layout", "graph_layout"]

#: Graphs with at most this many vertices (and no chain order) get a force-directed layout.
SMALL_GRAPH = 40


def band_layout(order: Sequence[int], width: int, per_row: int | None = None) -> np.ndarray:
    """Positions ``(n, 2)`` for vertices listed in ``order``, in rows of ``per_row`` (default
    one row: the position in the order is the horizontal coordinate).

    Within a row, consecutive vertices step right and cycle through ``width`` heights on a
    convex arc (``k^2 / (width - 1)``, not evenly spaced: evenly spaced heights put every third
    vertex of a reach-2 chain on the edge between its neighbours, hiding that edge), so that
    neighbours within the band neither overlap nor hide an edge; rows go downward, alternating
    direction (a boustrophedon), so that the last vertex of a row sits above the first of the
    next.
    """
    n = len(order)
    per_row = max(1, n if per_row is None else per_row)
    pos = np.zeros((n, 2))
    width = max(1, int(width))
    rank = np.arange(n)
    row, col = np.divmod(rank, per_row)
    col = np.where(row % 2 == 0, col, per_row - 1 - col)
    height = width + 1.5
    pos[np.asarray(order, dtype=int), 0] = col
    pos[np.asarray(order, dtype=int), 1] = -row * height - (rank % width) ** 2 / max(width - 1, 1)
    return pos


def graph_layout(graph: nx.Graph, chain_order: Sequence[int] | None, reach: int) -> np.ndarray:
    """Positions ``(n, 2)`` for the vertices ``0 .. n-1`` of ``graph``.

    Parameters
    ----------
    graph : networkx.Graph or DiGraph
        Vertices are the term indices 0 .. n-1.
    chain_order : sequence of int, optional
        The exclusion-chain order of the terms, when they form a chain.
    reach : int
        The chain's reach (band width), ignored without a chain order.
    """
    n = graph.number_of_nodes()
    if n == 0:
        return np.zeros((0, 2))
    if chain_order is not None:
        return band_layout(chain_order, reach + 1)
    und = graph.to_undirected(as_view=True) if graph.is_directed() else graph
    if n <= SMALL_GRAPH:
        placed = nx.kamada_kawai_layout(und) if n > 1 else {0: (0.0, 0.0)}
        return np.array([placed[j] for j in range(n)], dtype=float)
    order = list(nx.utils.reverse_cuthill_mckee_ordering(und))
    where = {v: r for r, v in enumerate(order)}
    band = max((abs(where[a] - where[b]) for a, b in und.edges()), default=0)
    return band_layout(order, min(band + 1, 6))
