"""Oriented indifference orderings: the frustration graphs of free parafermions (and fermions).

An *indifference ordering* of a graph lists its vertices so that every closed neighbourhood is
a contiguous block of the list (equivalently: for ``u < v < w``, an edge ``uw`` forces the edges
``uv`` and ``vw``).  The graphs that have one are the indifference (unit interval, proper
interval) graphs.  For clock strings the frustration graph also carries, on each edge, the
exponent m of ``g_a g_b = omega^m g_b g_a``; the ordering is *oriented* when every edge points
forward with one and the same exponent.  R. L. Mann, S. J. Elman, D. R. Wood and A. Chapman,
arXiv:2408.09684 (2024), show that a model whose frustration graph is an oriented indifference
graph has a free-parafermion spectrum given by its independence polynomial; the exclusion
chains of fixed reach (Alcaraz-Pimenta 2020) and the chains whose reach changes along the chain
are examples.

Along such an ordering the independence polynomial obeys the recurrence

    P_k = P_{k-1} - y w_k P_{l(k) - 1},

where ``l(k)`` is the first position adjacent to position k (or k itself), because the vertices
before k that do not touch it are exactly positions ``1 .. l(k) - 1``.

Recognition uses three sweeps of lexicographic breadth-first search, each sweep breaking ties
by the previous one (D. G. Corneil, Discrete Appl. Math. 138, 371 (2004), cited from memory);
the candidate is then checked against every edge, so a positive answer is always exact.

References
----------
R. L. Mann, S. J. Elman, D. R. Wood and A. Chapman, arXiv:2408.09684 (2024);
D. G. Corneil, Discrete Appl. Math. 138, 371 (2004);
F. S. Roberts, in *Proof Techniques in Graph Theory* (Academic Press, 1969) (indifference graphs).
"""

from __future__ import annotations

import math
from collections import OrderedDict
from collections.abc import Sequence
from dataclasses import dataclass
from typing import TYPE_CHECKING, Any

import numpy as np
import scipy.sparse as sps

from ..algebra.model import Model
from ..base.cache import part
from ..base.jsonready import json_ready
from .graph import EXPONENTS

if TYPE_CHECKING:
    import scipy.sparse.csgraph as csgraph
else:
    from ..base.lazy import csgraph

__all__ = [
    "IndifferenceOrder",
    "indifference_order",
    "level_order",
    "order_from_exponents",
    "umbrella_order",
]


@dataclass(frozen=True)
class IndifferenceOrder:
    """An oriented indifference ordering of a model's terms.

    Attributes
    ----------
    order : tuple of int
        Term indices, position by position (components one after another).
    first_neighbour : tuple of int
        For each position k, the first position adjacent to it, or k itself: the recurrence
        of the polynomial reads ``P_k = P_{k-1} - y w_k P_{first_neighbour[k] - 1}``.
    exponent : int
        The exponent m with ``g_a g_b = omega^m g_b g_a`` for every edge, a before b (N > 2);
        1 for N = 2.
    states : int
    """

    order: tuple[int, ...]
    first_neighbour: tuple[int, ...]
    exponent: int
    states: int

    @property
    def reaches(self) -> tuple[int, ...]:
        """How far each position reaches forward: ``last neighbour - position``."""
        last = list(range(len(self.order)))
        for k, first in enumerate(self.first_neighbour):
            for j in range(first, k):
                last[j] = max(last[j], k)
        return tuple(last[k] - k for k in range(len(self.order)))

    def to_dict(self) -> dict[str, Any]:
        """JSON-ready: the order, the first neighbours, the exponent."""
        return json_ready(
            {
                "order": self.order,
                "first_neighbour": self.first_neighbour,
                "exponent": self.exponent,
                "states": self.states,
            }
        )


def _lexbfs(indptr: np.ndarray, indices: np.ndarray, priority: Sequence[int]) -> list[int]:
    """One lexicographic BFS; ties go to the vertex with the highest ``priority``.

    Partition refinement with ordered classes (O(n + m log d) with the neighbour sort).
    """
    n = len(priority)
    start = sorted(range(n), key=lambda v: -priority[v])
    # classes as a doubly linked list of ordered sets
    members: list[OrderedDict[int, None]] = [OrderedDict((v, None) for v in start)]
    prev_cls: list[int] = [-1]
    next_cls: list[int] = [-1]
    head = 0
    cls_of = [0] * n
    visited = [False] * n
    out: list[int] = []

    def unlink(c: int) -> None:
        nonlocal head
        before, after = prev_cls[c], next_cls[c]
        if before >= 0:
            next_cls[before] = after
        else:
            head = after
        if after >= 0:
            prev_cls[after] = before

    for _ in range(n):
        v, _none = members[head].popitem(last=False)
        if not members[head]:
            unlink(head)
        visited[v] = True
        out.append(v)
        nbrs = [int(w) for w in indices[indptr[v] : indptr[v + 1]] if not visited[w]]
        nbrs.sort(key=lambda w: -priority[w])
        split: dict[int, int] = {}
        for w in nbrs:
            old = cls_of[w]
            new = split.get(old)
            if new is None:
                new = len(members)
                members.append(OrderedDict())
                prev_cls.append(prev_cls[old])
                next_cls.append(old)
                if prev_cls[old] >= 0:
                    next_cls[prev_cls[old]] = new
                else:
                    head = new
                prev_cls[old] = new
                split[old] = new
            del members[old][w]
            members[new][w] = None
            cls_of[w] = new
            if not members[old]:
                unlink(old)
    return out


def _is_umbrella(indptr: np.ndarray, indices: np.ndarray, order: Sequence[int]) -> bool:
    """Every closed neighbourhood is a contiguous block of ``order``."""
    pos = np.empty(len(order), dtype=np.int64)
    pos[np.asarray(order, dtype=np.int64)] = np.arange(len(order))
    for v in range(len(order)):
        nb = pos[indices[indptr[v] : indptr[v + 1]]]
        lo = min(int(nb.min()), int(pos[v])) if len(nb) else int(pos[v])
        hi = max(int(nb.max()), int(pos[v])) if len(nb) else int(pos[v])
        if hi - lo != len(nb):
            return False
    return True


def umbrella_order(adjacency: Any) -> list[int] | None:
    """An indifference ordering of an undirected graph, or None when it has none.

    Parameters
    ----------
    adjacency : scipy.sparse array or numpy array, shape (n, n)
        Symmetric; non-zero off-diagonal entries are edges.

    Returns
    -------
    list of int or None
        Components one after another.  A returned ordering is verified; None relies on the
        three-sweep theorem (Corneil 2004).

    Examples
    --------
    >>> import numpy as np
    >>> path = np.eye(4, k=1) + np.eye(4, k=-1)
    >>> umbrella_order(path) in ([0, 1, 2, 3], [3, 2, 1, 0])
    True
    >>> claw = np.zeros((4, 4)); claw[0, 1:] = claw[1:, 0] = 1
    >>> umbrella_order(claw) is None
    True
    """
    adj = sps.csr_array(adjacency, dtype=bool)
    adj = sps.csr_array(adj + adj.T, dtype=bool)
    adj.setdiag(False)
    adj.eliminate_zeros()
    adj.sort_indices()
    n = adj.shape[0]
    n_comp, labels = csgraph.connected_components(adj, directed=False)
    out: list[int] = []
    for c in range(n_comp):
        verts = np.flatnonzero(labels == c)
        sub = sps.csr_array(adj[verts][:, verts])
        order = list(range(len(verts)))
        for _sweep in range(3):
            priority = [0] * len(verts)
            for p, v in enumerate(order):
                priority[v] = p
            if _sweep == 0:
                priority = [len(verts) - v for v in range(len(verts))]
            order = _lexbfs(sub.indptr, sub.indices, priority)
        if not _is_umbrella(sub.indptr, sub.indices, order):
            return None
        out.extend(int(verts[v]) for v in order)
    assert len(out) == n
    return out


def indifference_order(m: Model) -> IndifferenceOrder | None:
    """An oriented indifference ordering of the terms of ``m``, or None.

    For N = 2 any indifference ordering of the frustration graph qualifies.  For N > 2 every
    edge must also point forward with one exponent m, a unit modulo N: within each group of
    terms with the same closed neighbourhood (which an indifference ordering may permute) the
    terms are sorted by the orientation, and each component is tried in both directions.
    The result is kept with the model's strings.

    Parameters
    ----------
    m : Model

    Returns
    -------
    IndifferenceOrder or None

    References
    ----------
    R. L. Mann, S. J. Elman, D. R. Wood and A. Chapman, arXiv:2408.09684 (2024).

    Examples
    --------
    >>> import freeladder as fl
    >>> indifference_order(fl.exclusion_chain(5, reach=2, states=3)).first_neighbour
    (0, 0, 0, 1, 2)
    """
    if not isinstance(m, Model):
        raise TypeError(f"expected a freeladder Model, got {type(m).__name__}")
    return ORDER(m)


@part("indifference order", "strings")
def ORDER(m: Model) -> IndifferenceOrder | None:
    """The part behind :func:`indifference_order`."""
    if len(m) == 0:
        return None
    return order_from_exponents(EXPONENTS(m), m.states)


def order_from_exponents(ex: Any, states: int) -> IndifferenceOrder | None:
    """:func:`indifference_order` from the sparse matrix of commutation exponents.

    ``ex[a, b] = m`` (mod ``states``) with ``g_a g_b = omega^m g_b g_a``, stored for every pair
    that fails to commute; terms are numbered by row.
    """
    adj = sps.csr_array(ex)
    adj.sort_indices()
    n = int(adj.shape[0])
    quick = _quick_order(adj, states)
    if quick is not None:
        return quick
    if _has_hole_component(adj):
        return None
    order = umbrella_order(adj)
    if order is None:
        return None
    n_comp, labels = csgraph.connected_components(adj.astype(bool), directed=False)
    final: list[int] = []
    exponent: int | None = None
    start = 0
    for _ in range(n_comp):
        comp_label = labels[order[start]]
        stop = start
        while stop < n and labels[order[stop]] == comp_label:
            stop += 1
        block = order[start:stop]
        start = stop
        if states == 2:
            final.extend(block)
            continue
        found = None
        for candidate in (block, block[::-1]):
            oriented = _orient_twins(adj, candidate, states)
            m_exp = _common_exponent(adj, oriented, states)
            if m_exp is not None and (exponent is None or m_exp == exponent):
                found = (oriented, m_exp)
                break
        if found is None:
            return None
        final.extend(found[0])
        exponent = found[1]
    pos = np.empty(n, dtype=np.int64)
    pos[np.asarray(final)] = np.arange(n)
    first = []
    for k, v in enumerate(final):
        nb = pos[adj.indices[adj.indptr[v] : adj.indptr[v + 1]]]
        first.append(int(min(k, nb.min())) if len(nb) else k)
    exponent_out = 1 if states == 2 else int(exponent or 1)
    return IndifferenceOrder(tuple(final), tuple(first), exponent_out, states)


def _bfs_levels(adj: sps.csr_array, sources: np.ndarray) -> np.ndarray:
    """Distance of every vertex from the nearest of ``sources`` (one per component).

    One breadth-first search from an extra vertex joined to every source; each vertex's depth
    in the search tree then follows by pointer jumping (log of the depth rounds of array work).
    """
    n = int(adj.shape[0])
    indptr = np.r_[adj.indptr, adj.indptr[-1] + len(sources)]
    indices = np.r_[adj.indices, np.asarray(sources, dtype=adj.indices.dtype)]
    grown = sps.csr_array(
        (np.ones(len(indices), dtype=np.int8), indices, indptr), shape=(n + 1, n + 1)
    )
    _order, pred = csgraph.breadth_first_order(grown, n, directed=True)
    up = np.where(pred >= 0, pred, n).astype(np.int64)
    up[n] = n
    depth = (up != np.arange(n + 1)).astype(np.int64)
    while True:
        higher = up[up]
        if np.array_equal(higher, up):
            break
        depth += depth[up]
        up = higher
    return depth[:n] - 1


def _pattern(adj: sps.csr_array) -> sps.csr_array:
    """The boolean pattern of the stored non-zero entries off the diagonal (the same
    ``adj.astype(bool)`` with the diagonal set to False and zeros removed gives)."""
    n = int(adj.shape[0])
    rows = np.repeat(np.arange(n), np.diff(adj.indptr))
    keep = (rows != adj.indices) & (adj.data != 0)
    indptr = np.r_[0, np.cumsum(np.bincount(rows[keep], minlength=n))]
    out = sps.csr_array(
        (np.ones(int(keep.sum()), dtype=bool), adj.indices[keep], indptr), shape=adj.shape
    )
    out.sum_duplicates()
    return out


def _has_hole_component(adj: sps.csr_array) -> bool:
    """Whether some component is a chordless cycle of four or more vertices (every degree 2).

    Indifference graphs are chordal, so such a graph has no indifference ordering (common
    practice); rings of terms are told apart at once instead of by three LexBFS sweeps.
    """
    sym = _pattern(adj)
    n_comp, labels = csgraph.connected_components(sym, directed=False)
    degree = np.diff(sym.indptr)
    size = np.bincount(labels, minlength=n_comp)
    off = np.bincount(labels[degree != 2], minlength=n_comp)
    return bool(np.any((off == 0) & (size >= 4)))


def _row_extent(
    indptr: np.ndarray, values: np.ndarray, own: np.ndarray
) -> tuple[np.ndarray, np.ndarray]:
    """Per row, the least and greatest of its ``values`` and its ``own`` value."""
    lo, hi = own.copy(), own.copy()
    filled = np.flatnonzero(np.diff(indptr) > 0)
    if len(filled):
        starts = indptr[filled]
        lo[filled] = np.minimum(lo[filled], np.minimum.reduceat(values, starts))
        hi[filled] = np.maximum(hi[filled], np.maximum.reduceat(values, starts))
    return lo, hi


def _quick_order(adj: sps.csr_array, states: int) -> IndifferenceOrder | None:
    """An oriented indifference ordering found in linear time by breadth-first levels, or None.

    The candidate (:func:`level_order`) is checked exactly (every closed neighbourhood a
    contiguous block, every edge forward with one exponent); None means only that this quick
    route did not find one (the LexBFS route then decides).
    """
    n = int(adj.shape[0])
    if n == 0:
        return None
    sym = _pattern(adj)
    order, labels = level_order(sym)
    degree = np.diff(sym.indptr)
    cols = sym.indices
    pos = np.empty(n, dtype=np.int64)
    pos[order] = np.arange(n)
    # every closed neighbourhood a contiguous block: [lo, hi] holds exactly degree + 1 vertices
    lo, hi = _row_extent(sym.indptr, pos[cols], pos)
    if np.any(hi - lo != degree):
        return None
    if states == 2:
        first = lo[order]
        return IndifferenceOrder(tuple(order.tolist()), tuple(first.tolist()), 1, states)
    return _quick_orientation(adj, states, order, pos, lo, hi, labels)


def level_order(sym: sps.csr_array) -> tuple[np.ndarray, np.ndarray]:
    """A candidate indifference ordering by breadth-first levels, in linear time, unchecked.

    In a connected indifference graph, distances from an end of the ordering grow along it,
    and within one level the vertices are ordered by how far back and how far forward their
    neighbourhoods reach (common practice).  An end is sought as the farthest vertex of two
    breadth-first searches.  Components follow one another (by label); a component that is
    not an indifference graph still gets a (wrong) place in the list, so the caller must
    check the answer, e.g. that every closed neighbourhood is a contiguous block.

    Parameters
    ----------
    sym : scipy.sparse.csr_array
        Symmetric boolean adjacency without diagonal (as :func:`_pattern` gives).

    Returns
    -------
    order : numpy.ndarray of int64
        The vertices in candidate order.
    labels : numpy.ndarray
        The connected-component label of every vertex.
    """
    n = int(sym.shape[0])
    n_comp, labels = csgraph.connected_components(sym, directed=False)
    degree = np.diff(sym.indptr)
    # one start per component, then twice: the farthest vertex, of least degree
    start = np.zeros(n_comp, dtype=np.int64)
    start[labels[::-1]] = np.arange(n)[::-1]
    for _ in range(2):
        dist = _bfs_levels(sym, start)
        pick = np.lexsort((degree, -dist, labels))
        first_of = np.flatnonzero(np.r_[True, labels[pick][1:] != labels[pick][:-1]])
        start = pick[first_of]
    dist = _bfs_levels(sym, start)
    rows = np.repeat(np.arange(n), degree)
    cols = sym.indices
    step = dist[cols] - dist[rows]
    back = np.bincount(rows[step < 0], minlength=n)
    ahead = np.bincount(rows[step > 0], minlength=n)
    return np.lexsort((ahead, -back, dist, labels)).astype(np.int64), labels


def _quick_orientation(
    adj: sps.csr_array,
    states: int,
    order: np.ndarray,
    pos: np.ndarray,
    lo: np.ndarray,
    hi: np.ndarray,
    labels: np.ndarray,
) -> IndifferenceOrder | None:
    """Turn each component and sort its twins so that every edge points forward with one
    exponent; None when the quick route cannot (the LexBFS route then decides)."""
    n = len(order)
    rows = np.repeat(np.arange(n), np.diff(adj.indptr))
    cols = adj.indices
    expo = np.asarray(adj.data, dtype=np.int64) % states
    keep = rows != cols
    rows, cols, expo = rows[keep], cols[keep], expo[keep]
    # twins (same closed neighbourhood) are the runs of equal (lo, hi) along the ordering
    key_lo, key_hi = lo[order], hi[order]
    new_run = np.r_[True, (key_lo[1:] != key_lo[:-1]) | (key_hi[1:] != key_hi[:-1])]
    run_of = np.empty(n, dtype=np.int64)
    run_of[order] = np.cumsum(new_run) - 1
    forward = pos[cols] > pos[rows]
    across = forward & (run_of[rows] != run_of[cols])
    comp_want = np.full(labels.max() + 1, -1, dtype=np.int64)
    comp_want[labels[rows[across]][::-1]] = expo[across][::-1]
    # components that are one clique of twins: the exponent of their first pair
    inside = forward & (run_of[rows] == run_of[cols])
    lone = comp_want[labels[rows[inside]]] < 0
    first_pair = np.full(labels.max() + 1, -1, dtype=np.int64)
    first_pair[labels[rows[inside][lone]][::-1]] = expo[inside][lone][::-1]
    comp_want = np.where(comp_want < 0, first_pair, comp_want)
    # score: in-run neighbours reached with the wanted exponent; higher first
    want_of = comp_want[labels]
    hit = (run_of[rows] == run_of[cols]) & (expo == want_of[rows])
    score = np.bincount(rows[hit], minlength=n)
    new_order = np.lexsort((-score, run_of))
    new_pos = np.empty(n, dtype=np.int64)
    new_pos[new_order] = np.arange(n)
    ahead = new_pos[cols] > new_pos[rows]
    comp_of_edge = labels[rows[ahead]]
    got = expo[ahead]
    if np.any(got != comp_want[comp_of_edge]):
        return None
    wants = np.unique(comp_want[comp_want >= 0])
    flip = np.zeros(labels.max() + 1, dtype=bool)
    if len(wants) > 1:  # components may be turned around: forward exponent m becomes N - m
        target = int(comp_want[labels[new_order[0]]])
        if target < 0:
            target = int(wants[0])
        flip = (comp_want >= 0) & (comp_want != target)
        if np.any((states - comp_want[flip]) % states != target):
            return None
        common = target
    else:
        common = int(wants[0]) if len(wants) else 1
    if math.gcd(common, states) != 1:
        return None
    if np.any(flip):
        blocks = np.split(new_order, np.flatnonzero(np.diff(labels[new_order])) + 1)
        new_order = np.concatenate([b[::-1] if flip[labels[b[0]]] else b for b in blocks])
        new_pos[new_order] = np.arange(n)
    first, _hi = _row_extent(adj.indptr, new_pos[adj.indices], new_pos)
    return IndifferenceOrder(
        tuple(new_order.tolist()), tuple(first[new_order].tolist()), common, states
    )


def _neighbours(adj: sps.csr_array, v: int) -> list[tuple[int, int]]:
    lo, hi = adj.indptr[v], adj.indptr[v + 1]
    return [(int(w), int(e)) for w, e in zip(adj.indices[lo:hi], adj.data[lo:hi], strict=True)]


def _orient_twins(adj: sps.csr_array, block: list[int], states: int) -> list[int]:
    """Sort each run of twins (same closed neighbourhood) so that its edges point forward.

    The wanted exponent comes from an edge between two non-twins (their order is fixed by
    the ordering); twins are always consecutive in an indifference ordering.
    """
    runs: list[list[int]] = []
    for v in block:
        if runs and _closed(adj, runs[-1][0]) == _closed(adj, v):
            runs[-1].append(v)
        else:
            runs.append([v])
    want: int | None = None
    for left, right in zip(runs, runs[1:], strict=False):
        edge = dict(_neighbours(adj, left[-1])).get(right[0])
        if edge is not None:
            want = edge % states
            break
    if want is None:  # a single clique of twins: either direction
        if len(runs[0]) < 2:
            return list(block)
        want = dict(_neighbours(adj, runs[0][0]))[runs[0][1]] % states
    out: list[int] = []
    for run in runs:
        inside = set(run)
        score = {
            v: sum(1 for w, e in _neighbours(adj, v) if w in inside and e % states == want)
            for v in run
        }
        out.extend(sorted(run, key=lambda v: -score[v]))
    return out


def _closed(adj: sps.csr_array, v: int) -> frozenset[int]:
    return frozenset(int(w) for w in adj.indices[adj.indptr[v] : adj.indptr[v + 1]]) | {v}


def _common_exponent(adj: sps.csr_array, order: list[int], states: int) -> int | None:
    """The exponent every edge carries from its earlier to its later end, or None."""
    pos = {v: k for k, v in enumerate(order)}
    common: int | None = None
    for v in order:
        for w, e in zip(
            adj.indices[adj.indptr[v] : adj.indptr[v + 1]],
            adj.data[adj.indptr[v] : adj.indptr[v + 1]],
            strict=True,
        ):
            if pos[int(w)] > pos[v]:
                if common is None:
                    common = int(e) % states
                    if math.gcd(common, states) != 1:
                        return None
                elif int(e) % states != common:
                    return None
    return common if common is not None else 1
