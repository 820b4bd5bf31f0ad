"""The Workbench's drawing of the frustration graph hides no edge behind a vertex.

Geometry (common practice): a vertex hides an edge when it lies on the segment between the
edge's ends; the edges are the frustration graph's, as networkx holds them.
"""

from __future__ import annotations

import numpy as np
import pytest

import freeladder as fl
from freeladder_lab.graph_layout import graph_layout


def _vertices_on_edges(pos: np.ndarray, edges: list[tuple[int, int]]) -> list[tuple[int, int, int]]:
    found = []
    for a, b in edges:
        p, q = pos[a], pos[b]
        for c in range(len(pos)):
            if c in (a, b):
                continue
            r = pos[c]
            cross = (q[0] - p[0]) * (r[1] - p[1]) - (q[1] - p[1]) * (r[0] - p[0])
            inside = np.all(r >= np.minimum(p, q) - 1e-9) and np.all(r <= np.maximum(p, q) + 1e-9)
            if abs(cross) < 1e-9 and inside:
                found.append((a, b, c))
    return found


@pytest.mark.parametrize("reach", [1, 2, 3, 4, 5])
def test_chain_layout_hides_no_edge(reach: int) -> None:
    # 130 terms: the band wraps into three rows (60 per row)
    m = fl.exclusion_chain(130, reach=reach)
    a = fl.analyze(m)
    pos = graph_layout(a.graph, list(a.chain.order), a.chain.reach)
    edges = list(a.graph.edges())
    assert len(edges) == sum(min(reach, 129 - j) for j in range(130))  # the reach-p band
    assert _vertices_on_edges(pos, edges) == []
    assert len({tuple(p) for p in pos}) == len(pos)  # no two vertices on one spot
