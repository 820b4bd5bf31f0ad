"""The frustration graph of a model, and recognition of the exclusion-chain structure.

The frustration graph has one vertex per term and an edge where two terms fail to commute
(BACKGROUND of the project, section 2).  Here it is available three ways:

* :func:`commutation_exponents` -- the sparse matrix of exponents m_ab (mod N) with
  ``g_a g_b = omega^{m_ab} g_b g_a``;
* :func:`frustration_adjacency` -- the plain undirected adjacency as a boolean CSR array, for
  work at scale without networkx;
* :func:`frustration_graph` -- a networkx graph with the terms as node attributes (directed,
  with the exponent on each edge, when N > 2).

:func:`chain_structure` decides in linear time whether the frustration structure is exactly
the exclusion algebra of reach p (``g_j g_k = omega g_k g_j`` for ``j < k <= j + p``, commuting
otherwise) under some relabelling of the terms.

References
----------
P. Fendley, J. Phys. A 52, 335002 (2019), arXiv:1901.08078;
F. C. Alcaraz and R. A. Pimenta, Phys. Rev. B 102, 121101(R) (2020), arXiv:2005.14622.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import TYPE_CHECKING, Any

import numpy as np
import scipy.sparse as sps

from ..algebra.model import Model
from ..base.cache import part
from ..base.frozen import readonly_array, readonly_sparse
from ..base.jsonready import json_ready

if TYPE_CHECKING:
    import networkx as nx
    import scipy.sparse.csgraph as csgraph
else:
    from ..base.lazy import csgraph
    from ..base.lazy import networkx as nx


__all__ = [
    "ChainStructure",
    "chain_from_exponents",
    "chain_structure",
    "commutation_exponents",
    "frustration_adjacency",
    "frustration_graph",
]


def _check_model(m: Any) -> Model:
    if not isinstance(m, Model):
        raise TypeError(f"expected a freeladder Model, got {type(m).__name__}")
    return m


@part("commutation exponents", "strings")
def EXPONENTS(m: Model) -> sps.csr_array:
    """The part behind :func:`commutation_exponents` (read-only arrays, shared: never hand it
    out)."""
    return readonly_sparse(m.strings.commutation_matrix())


@part("frustration adjacency", "strings")
def ADJACENCY(m: Model) -> sps.csr_array:
    """The part behind :func:`frustration_adjacency` (read-only arrays, shared)."""
    ex = EXPONENTS(m)
    return readonly_sparse(
        sps.csr_array((np.ones(ex.nnz, dtype=bool), ex.indices, ex.indptr), shape=ex.shape)
    )


def commutation_exponents(m: Model) -> sps.csr_array:
    """Sparse ``(M, M)`` matrix of exponents ``m_ab`` in ``[1, N)``, ``g_a g_b = omega^m g_b g_a``.

    Only pairs that fail to commute are stored; the matrix satisfies ``m_ba = -m_ab (mod N)``.
    Computed once per list of strings; each call returns a fresh copy, the caller's to change.

    Parameters
    ----------
    m : Model

    Returns
    -------
    scipy.sparse.csr_array of int64, indices sorted.
    """
    return sps.csr_array(EXPONENTS(_check_model(m)), copy=True)


def frustration_adjacency(m: Model) -> sps.csr_array:
    """The undirected frustration graph as a symmetric boolean CSR array (no diagonal).

    Entry ``(a, b)`` is True when terms ``a`` and ``b`` fail to commute.  Computed once per list
    of strings; each call returns a fresh copy, the caller's to change.

    Examples
    --------
    >>> from freeladder import exclusion_chain
    >>> frustration_adjacency(exclusion_chain(4, reach=2)).toarray().astype(int)
    array([[0, 1, 1, 0],
           [1, 0, 1, 1],
           [1, 1, 0, 1],
           [0, 1, 1, 0]])
    """
    return sps.csr_array(ADJACENCY(_check_model(m)), copy=True)


def frustration_graph(m: Model) -> nx.Graph | nx.DiGraph:
    """The frustration graph of ``m`` as a networkx graph.

    One node per term, labelled by the term index, with attributes ``index``, ``string`` (the
    :class:`~freeladder.WeylString`) and ``coupling``.  For N = 2 an undirected :class:`nx.Graph`
    with an edge between anticommuting terms.  For N > 2 a :class:`nx.DiGraph` with an edge
    ``a -> b`` carrying ``exponent=m`` (``g_a g_b = omega^m g_b g_a``) for every ordered pair that
    fails to commute, so both ``a -> b`` (m) and ``b -> a`` (N - m) are present.

    The edges come from one sparse product (:meth:`StringArray.commutation_matrix`), so a
    local model with 10^4 terms takes well under a second.

    Parameters
    ----------
    m : Model

    Returns
    -------
    networkx.Graph or networkx.DiGraph

    References
    ----------
    A. Chapman and S. T. Flammia, Quantum 4, 278 (2020), arXiv:2003.05465 (frustration graph).
    """
    m = _check_model(m)
    ex = EXPONENTS(m)
    n = len(m)
    rows = np.repeat(np.arange(n), np.diff(ex.indptr))
    graph: nx.Graph | nx.DiGraph
    if m.states == 2:
        graph = nx.Graph()
        keep = rows < ex.indices
        edges: Any = zip(rows[keep].tolist(), ex.indices[keep].tolist(), strict=True)
    else:
        graph = nx.DiGraph()
        edges = (
            (a, b, {"exponent": e})
            for a, b, e in zip(rows.tolist(), ex.indices.tolist(), ex.data.tolist(), strict=True)
        )
    strings = m.strings
    graph.add_nodes_from(
        (j, {"index": j, "string": strings[j], "coupling": m.couplings[j]}) for j in range(n)
    )
    graph.add_edges_from(edges)
    graph.graph["states"] = m.states
    return graph


@dataclass(frozen=True, eq=False)
class ChainStructure:
    """The terms of a model, ordered so that they form an exclusion chain of reach ``p``.

    Attributes
    ----------
    order : numpy.ndarray of int64, read-only
        Term indices in chain order: ``j = order[q]`` is the q-th generator of the chain.
    reach : int
        p >= 1.  Terms ``order[q]`` and ``order[r]`` fail to commute exactly when
        ``0 < |q - r| <= p``.  When every pair fails to commute (a complete graph on M terms) the
        reach is ambiguous; the smallest, ``max(M - 1, 1)``, is reported.
    orientation : int
        +1 when ``g_order[q] g_order[r] = omega g_order[r] g_order[q]`` for ``q < r <= q + p``,
        -1 when the exponent is ``omega^-1``; always +1 for N = 2.  Reversing ``order`` flips it.
    states : int
        N.
    """

    order: np.ndarray
    reach: int
    orientation: int
    states: int

    def __post_init__(self) -> None:
        object.__setattr__(self, "order", readonly_array(self.order, dtype=np.int64))

    def to_dict(self) -> dict[str, Any]:
        """JSON-ready fields: ``order`` (term indices in chain order), reach, orientation, N."""
        return json_ready(
            {
                "order": self.order,
                "reach": self.reach,
                "orientation": self.orientation,
                "states": self.states,
            }
        )

    def __len__(self) -> int:
        return int(self.order.shape[0])

    def __eq__(self, other: object) -> bool:
        if not isinstance(other, ChainStructure):
            return NotImplemented
        return (self.reach, self.orientation, self.states) == (
            other.reach,
            other.orientation,
            other.states,
        ) and bool(np.array_equal(self.order, other.order))

    def __hash__(self) -> int:
        return hash((self.reach, self.orientation, self.states, self.order.tobytes()))

    def __repr__(self) -> str:
        head = ", ".join(str(int(v)) for v in self.order[:8])
        more = ", ..." if len(self) > 8 else ""
        return (
            f"ChainStructure(M={len(self)}, reach={self.reach}, orientation={self.orientation:+d}, "
            f"N={self.states}, order=[{head}{more}])"
        )


def chain_structure(m: Model) -> ChainStructure | None:
    """Recognise the exclusion algebra of reach p, up to relabelling of the terms.

    Decides whether an ordering ``order`` of the M terms and a reach p exist such that
    ``g_order[q] g_order[r] = omega^s g_order[r] g_order[q]`` for ``q < r <= q + p`` (one sign
    ``s = +-1`` throughout) and all other pairs commute.  For N = 2 this is the statement that
    the frustration graph is the p-th power of a path.

    Parameters
    ----------
    m : Model

    Returns
    -------
    ChainStructure or None
        None when the structure is not a single exclusion chain.  That includes models whose
        frustration graph is disconnected (even a disjoint union of chains) and the empty model:
        callers that want components should split the model first.  A single term is a chain of
        reach 1.

    Notes
    -----
    Linear time in the number of non-commuting pairs, all numpy/scipy work.  For a path power
    ``P_M^p`` with ``M >= p + 2`` the two ends are the only vertices of minimum degree p.  One
    breadth-first search from an end (for N > 2, from the end that precedes all its neighbours
    in the chosen orientation) puts the terms in layers of p consecutive chain positions; within
    a layer, the number of neighbours in the next layer minus the number in the previous layer
    increases strictly along the chain, except among vertices adjacent to everything, which
    are then ordered by the orientation (in-neighbours minus out-neighbours).  The candidate
    order is finally checked against every stored exponent, so a positive answer is always
    exact.  Computed once per list of strings.

    References
    ----------
    F. C. Alcaraz and R. A. Pimenta, Phys. Rev. B 102, 121101(R) (2020), arXiv:2005.14622
    (the exclusion algebra of reach p, any N).

    Examples
    --------
    >>> from freeladder import exclusion_chain
    >>> chain_structure(exclusion_chain(5, reach=2, states=3))
    ChainStructure(M=5, reach=2, orientation=+1, N=3, order=[0, 1, 2, 3, 4])
    """
    return CHAIN(_check_model(m))


@part("chain structure", "strings")
def CHAIN(m: Model) -> ChainStructure | None:
    """The part behind :func:`chain_structure`."""
    return chain_from_exponents(EXPONENTS(m), m.states)


def chain_from_exponents(ex: sps.csr_array, states: int) -> ChainStructure | None:
    """:func:`chain_structure` for a matrix of commutation exponents (e.g. of one component).

    Parameters
    ----------
    ex : scipy.sparse.csr_array, shape (M, M)
        Exponents ``m_ab`` in ``[1, N)`` of the non-commuting pairs, canonical (sorted, no
        duplicates, no stored zeros), with ``m_ba = -m_ab (mod N)``.
    states : int
        N.

    Returns
    -------
    ChainStructure or None
        With ``order`` in the row numbering of ``ex``.
    """
    n_terms = int(ex.shape[0])
    if n_terms == 0:
        return None
    if n_terms == 1:
        return _make_chain(np.zeros(1, dtype=np.int64), 1, 1, states)
    degree = np.diff(ex.indptr)
    if degree.min() == 0:
        return None
    complete = ex.nnz == n_terms * (n_terms - 1)
    reach = n_terms - 1 if complete else int(degree.min())
    n_pairs = reach * n_terms - reach * (reach + 1) // 2
    if ex.nnz != 2 * n_pairs:
        return None
    rows = np.repeat(np.arange(n_terms, dtype=np.int64), degree)
    cols = ex.indices.astype(np.int64)
    signs = (1,) if states == 2 else (1, -1)
    for sign in signs:
        if states == 2:
            tie_break = np.zeros(n_terms, dtype=np.int64)
            start = int(np.argmin(degree))
        else:
            later = np.bincount(rows, weights=ex.data == sign % states, minlength=n_terms)
            earlier = np.bincount(rows, weights=ex.data == (-sign) % states, minlength=n_terms)
            tie_break = (earlier - later).astype(np.int64)
            start = int(np.argmin(tie_break))
        order = _order_from(ex, rows, cols, start, tie_break)
        if order is not None and _is_chain(ex, rows, cols, order, reach, sign, states):
            return _make_chain(order, reach, sign, states)
    return None


def _order_from(
    ex: sps.csr_array, rows: np.ndarray, cols: np.ndarray, start: int, tie_break: np.ndarray
) -> np.ndarray | None:
    """Candidate chain order: BFS layers from ``start``, refined inside each layer."""
    n_terms = ex.shape[0]
    dist = csgraph.shortest_path(ex, unweighted=True, directed=False, indices=start)
    if not np.all(np.isfinite(dist)):
        return None
    level = dist.astype(np.int64)
    step = level[cols] - level[rows]
    ahead = np.bincount(rows, weights=step == 1, minlength=n_terms)
    behind = np.bincount(rows, weights=step == -1, minlength=n_terms)
    within = (ahead - behind).astype(np.int64)
    return np.lexsort((tie_break, within, level)).astype(np.int64)


def _is_chain(
    ex: sps.csr_array,
    rows: np.ndarray,
    cols: np.ndarray,
    order: np.ndarray,
    reach: int,
    sign: int,
    states: int,
) -> bool:
    """Exact check of every stored exponent against the reach-p pattern for ``order``."""
    position = np.empty_like(order)
    position[order] = np.arange(order.shape[0])
    gap = position[cols] - position[rows]
    if np.any(np.abs(gap) > reach):
        return False
    expected = np.where(gap > 0, sign, -sign) % states
    return bool(np.all(ex.data == expected))


def _make_chain(order: np.ndarray, reach: int, orientation: int, states: int) -> ChainStructure:
    return ChainStructure(order, int(reach), int(orientation), int(states))
