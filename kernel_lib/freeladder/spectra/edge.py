"""The edge mode and the ladder operators of the hidden free fermions.

An *edge mode* is a string ``chi`` that fails to commute with exactly one term ``g_a`` of the
Hamiltonian, whose neighbours in the frustration graph are pairwise adjacent (a simplicial
vertex), and commutes with every other term; for N = 2 the set of terms it fails to commute
with may also be a whole simplicial clique.  Every connected component of the frustration
graph has its own edge mode and its own modes.  For N = 2, with
``T(u) = sum_s (-u)^s Q^(s)`` and ``u_k = 1 / eta_k``,

    Psi_{+k} = T(-u_k) chi T(u_k),     Psi_{-k} = T(u_k) chi T(-u_k),
    [H, Psi_{+-k}] = +-2 eta_k Psi_{+-k},

so the ``Psi`` raise and lower the energy by ``2 eta_k``: they are the (non-local) fermion
modes.

References
----------
P. Fendley, "Free fermions in disguise", J. Phys. A 52, 335002 (2019), arXiv:1901.08078;
S. J. Elman, A. Chapman and S. T. Flammia, Commun. Math. Phys. 388, 969 (2021),
arXiv:2012.07857 (simplicial cliques and the edge mode on general claw-free graphs).
"""

from __future__ import annotations

import html
import itertools
from collections.abc import Iterable, Sequence
from dataclasses import dataclass, field
from typing import TYPE_CHECKING, Any

import numpy as np
import scipy.sparse as sps

from ..algebra.model import Model
from ..algebra.strings import StringArray, WeylString
from ..base import display
from ..base.errors import NoTheoremError
from ..base.frozen import readonly_array, readonly_sparse
from ..base.jsonready import json_ready
from ..graphs.clawfree import find_simplicial_clique
from ..graphs.graph import ADJACENCY, chain_structure
from .charges import transfer_matrix
from .spectrum import free_spectrum

if TYPE_CHECKING:
    import scipy.sparse.csgraph as csgraph
else:
    from ..base.lazy import csgraph

__all__ = [
    "EdgeMode",
    "LadderOperators",
    "components",
    "component_model",
    "edge_mode",
    "ladder_operators",
    "simplicial_cliques",
]

MAX_CANDIDATES = 1 << 13
"""Largest number of candidate strings tested at once by :func:`edge_mode`."""

LADDER_MAX_DIMENSION = 4096
"""Largest Hilbert-space dimension for which :func:`ladder_operators` builds matrices."""


@dataclass(frozen=True)
class EdgeMode:
    """Result of :func:`edge_mode`.

    Attributes
    ----------
    found : bool
        True when a string was found.
    string : WeylString or None
        ``chi``, normalised (``chi^N = 1``).
    term : int or None
        A term ``g_a`` that ``chi`` fails to commute with (the only one when ``clique`` has
        one element).
    clique : tuple of int
        Every term ``chi`` fails to commute with: a simplicial vertex or a simplicial clique
        (or the last target tried when nothing was found).
    exponent : int or None
        m with ``chi g_a = omega^m g_a chi``.
    reason : str
        How it was found, or why nothing was found.
    tried : int
        Number of candidate strings tested.
    """

    found: bool
    string: WeylString | None
    term: int | None
    clique: tuple[int, ...]
    exponent: int | None
    reason: str
    tried: int = 0
    sites_searched: tuple[Any, ...] = field(default=())

    def __str__(self) -> str:
        if not self.found:
            return f"no edge mode: {self.reason}"
        which = f"term {self.term}" if len(self.clique) == 1 else f"terms {list(self.clique)}"
        return f"edge mode chi = {self.string} (fails to commute with {which} only)"

    def __repr__(self) -> str:
        return f"EdgeMode(found={self.found}, string={self.string}, term={self.term})"

    def _repr_html_(self) -> str:
        return f"<p>{html.escape(str(self))}</p><p><small>{html.escape(self.reason)}</small></p>"

    def to_dict(self) -> dict[str, Any]:
        """JSON-ready fields (the string as text)."""
        return json_ready(  # type: ignore[no-any-return]
            {
                "found": self.found,
                "string": None if self.string is None else str(self.string),
                "term": self.term,
                "clique": self.clique,
                "exponent": self.exponent,
                "reason": self.reason,
                "tried": self.tried,
                "sites_searched": self.sites_searched,
            }
        )


def components(m: Model) -> list[tuple[int, ...]]:
    """The connected components of the frustration graph (term indices, ascending)."""
    adj = ADJACENCY(m)
    n_comp, labels = csgraph.connected_components(adj, directed=False)
    return [tuple(int(v) for v in np.nonzero(labels == c)[0]) for c in range(n_comp)]


def _neighbours(m: Model) -> list[set[int]]:
    adj = ADJACENCY(m)
    return [set(adj.indices[adj.indptr[v] : adj.indptr[v + 1]].tolist()) for v in range(len(m))]


def _is_clique(neighbours: Sequence[set[int]], verts: Iterable[int]) -> bool:
    verts = list(verts)
    return all(b in neighbours[a] for i, a in enumerate(verts) for b in verts[i + 1 :])


def simplicial_cliques(m: Model) -> list[tuple[int, ...]]:
    """Simplicial cliques to try for the edge mode, ends of chains first.

    For an exclusion chain of reach p both ends ``order[:p+1]`` and ``order[-p-1:]`` are
    simplicial cliques; otherwise one simplicial clique per connected component is searched for
    with :func:`freeladder.graphs.clawfree.find_simplicial_clique`.
    """
    chain = chain_structure(m)
    if chain is not None:
        order = [int(v) for v in chain.order]
        p = chain.reach
        ends = [tuple(order[: p + 1]), tuple(reversed(order[-(p + 1) :]))]
        return ends if set(ends[0]) != set(ends[1]) else ends[:1]
    neighbours = _neighbours(m)
    out = []
    for verts in components(m):
        clique = find_simplicial_clique(neighbours, list(verts))
        if clique is not None:
            out.append(tuple(clique))
    return out


def _is_simplicial(neighbours: Sequence[set[int]], verts: frozenset[int]) -> bool:
    """A clique K with ``N(v) \\ K`` a clique for every v in K (Elman-Chapman-Flammia 2021)."""
    return _is_clique(neighbours, verts) and all(
        _is_clique(neighbours, neighbours[v] - verts) for v in verts
    )


def _targets(
    m: Model, neighbours: Sequence[set[int]], component: Sequence[int]
) -> list[tuple[int, bool]]:
    """Where to look for the edge mode of ``component``: (term, whether only that term).

    A string chi joins the frustration graph as a new vertex adjacent to the terms it fails to
    commute with.  The construction needs that set to be a simplicial clique K (every
    ``N(v) \\ K``, v in K, a clique), so that the enlarged graph stays claw-free: a single term
    whose neighbourhood is a clique (a simplicial vertex, as the end generator of Fendley's chain)
    comes first; for N = 2 a larger simplicial clique (Elman-Chapman-Flammia) follows, searched
    around the terms of the component's simplicial cliques.  A term that merely *lies in* a
    simplicial clique is not enough: chi next to a term with two non-adjacent neighbours makes a
    claw.
    """
    comp = set(component)
    out = [(v, True) for v in component if _is_clique(neighbours, neighbours[v])]
    if m.states == 2:
        for clique in simplicial_cliques(m):
            out.extend((v, False) for v in clique if v in comp and (v, False) not in out)
    return out


def _window(m: Model, term: int, max_sites: int) -> list[int]:
    """Site columns near ``term``: its support first, then sites of neighbouring terms."""
    strings = m.strings
    occ = ((strings.x != 0).astype(np.int8) + (strings.z != 0).astype(np.int8)).tocsr()
    occ.data[:] = 1
    cols = list(occ.indices[occ.indptr[term] : occ.indptr[term + 1]])
    site_adj = (occ.T @ occ).tocsr()
    frontier = list(cols)
    while frontier and len(cols) < max_sites:
        nxt = []
        for c in frontier:
            for d in site_adj.indices[site_adj.indptr[c] : site_adj.indptr[c + 1]]:
                if d not in cols and d not in nxt:
                    nxt.append(int(d))
        nxt.sort(key=lambda d: min(abs(d - c0) for c0 in cols))
        for d in nxt:
            if len(cols) < max_sites:
                cols.append(d)
        frontier = nxt
    return [int(c) for c in cols]


def _candidates(cols: Sequence[int], n_sites: int, states: int) -> tuple[Any, Any, np.ndarray]:
    """All strings on ``cols`` (every letter on every site), ordered by support size."""
    w = len(cols)
    letters = np.array(list(itertools.product(range(states), repeat=2)), dtype=np.int64)
    idx = np.array(list(itertools.product(range(states * states), repeat=w)), dtype=np.int64)
    xa, za = letters[idx, 0], letters[idx, 1]
    support = ((xa != 0) | (za != 0)).sum(axis=1)
    order = np.lexsort((np.arange(len(idx)), support))
    order = order[support[order] > 0]
    xa, za = xa[order], za[order]
    rows = np.repeat(np.arange(len(order)), w)
    colv = np.tile(np.asarray(cols, dtype=np.int64), len(order))
    shape = (len(order), n_sites)
    x = sps.csr_array((xa.ravel(), (rows, colv)), shape=shape)
    z = sps.csr_array((za.ravel(), (rows, colv)), shape=shape)
    return x, z, support[order]


def edge_mode(m: Model, max_sites: int | None = None, component: int = 0) -> EdgeMode:
    """Find a string chi whose non-commuting terms form a simplicial clique of one component.

    chi must commute with every term outside that clique, in every component.  The targets are
    tried as listed by the construction's condition (see Notes): for each target set K, every
    string on a window of sites around its terms -- their support, then sites of neighbouring
    terms, up to ``max_sites`` sites -- is tested at once against all terms (one sparse product,
    :meth:`StringArray.commutation_with`); the string of smallest support whose non-commuting
    terms are exactly K is returned.

    Parameters
    ----------
    m : Model
    max_sites : int, optional
        Window size; default 6 sites for N = 2, 4 for N = 3, fewer for larger N (at most
        :data:`MAX_CANDIDATES` candidates, ``N^(2 * sites)``).
    component : int
        Which connected component of the frustration graph (in the order of
        :func:`components`, by smallest term index).

    Returns
    -------
    EdgeMode
        ``found=False`` with a reason when no string on the windows works.

    Notes
    -----
    Added to the frustration graph, chi is a vertex adjacent to exactly the terms it fails to
    commute with.  For a single term ``g_a`` (Fendley's edge operator) the graph stays claw-free
    only when the neighbours of ``g_a`` are pairwise adjacent, i.e. ``g_a`` is a simplicial
    vertex; in ``X0 + Z0 + Y0 X1 + Z0 Z1`` the string ``Z0 Z1`` anticommutes with ``X0`` only, but
    the neighbours ``Z0`` and ``Z0 Z1`` of ``X0`` commute, so ``Z0 Z1`` with them is a claw and the
    ladder relations fail; ``Z1`` (next to the simplicial vertex ``Y0 X1``) works.

    References
    ----------
    P. Fendley, J. Phys. A 52, 335002 (2019); S. J. Elman, A. Chapman and S. T. Flammia,
    Commun. Math. Phys. 388, 969 (2021).

    Examples
    --------
    >>> from freeladder import exclusion_chain
    >>> e = edge_mode(exclusion_chain(5, reach=2))
    >>> print(e.string, e.term)      # X1 anticommutes with X0 Z1 Z2 only
    X1 0
    """
    if not isinstance(m, Model):
        raise TypeError(f"edge_mode needs a Model, got {type(m).__name__}")
    if len(m) == 0:
        return EdgeMode(False, None, None, (), None, "the model has no terms")
    comps = components(m)
    if not 0 <= component < len(comps):
        raise ValueError(f"component must be in 0..{len(comps) - 1}, got {component!r}")
    n = m.states
    cap = max(1, int(np.log(MAX_CANDIDATES) / np.log(n * n)))
    width = cap if max_sites is None else min(int(max_sites), cap)
    neighbours = _neighbours(m)
    targets = _targets(m, neighbours, comps[component])
    if not targets:
        return EdgeMode(
            False, None, None, (), None, "this component has no simplicial vertex or clique"
        )
    tried = 0
    searched: list[Any] = []
    for a, single in targets:
        cols = _window(m, a, width)
        searched.extend(m.sites[c] for c in cols if m.sites[c] not in searched)
        x, z, _ = _candidates(cols, len(m.sites), n)
        cand = StringArray(x, z, np.zeros(x.shape[0], np.int64), n, m.sites)
        tried += len(cand)
        cm = cand.commutation_with(m.strings)
        counts = np.diff(cm.indptr)
        rows = np.nonzero(counts == 1)[0] if single else np.nonzero(counts > 1)[0]
        for r in rows.tolist():
            hit = frozenset(cm.indices[cm.indptr[r] : cm.indptr[r + 1]].tolist())
            if a not in hit or not (single or _is_simplicial(neighbours, hit)):
                continue
            chi, _ = cand[r].normalized()
            expo = int(cm.data[cm.indptr[r]])
            what = "simplicial vertex" if single else "simplicial clique"
            reason = (
                f"smallest-support string on the {len(cols)} sites around term {a}, failing "
                f"to commute with the {what} {sorted(hit)} only; {tried} candidates tested"
            )
            return EdgeMode(True, chi, a, tuple(sorted(hit)), expo, reason, tried, tuple(searched))
    where = sorted({a for a, _ in targets})
    reason = (
        f"no string on windows of up to {width} sites around the terms {where} fails to commute "
        f"with a simplicial vertex or clique only ({tried} candidates tested); try a larger "
        "max_sites"
    )
    return EdgeMode(False, None, None, (), None, reason, tried, tuple(searched))


@dataclass(frozen=True)
class LadderOperators:
    """Raising and lowering operators ``Psi_{+-k}`` as sparse matrices (N = 2).

    Attributes
    ----------
    quasi_energies : numpy.ndarray
        eta_k > 0 used for ``u_k = 1 / eta_k``, component after component.
    raising, lowering : tuple of scipy.sparse.csr_array
        ``Psi_{+k} = T_c(-u_k) chi_c T_c(u_k)`` and ``Psi_{-k} = T_c(u_k) chi_c T_c(-u_k)``, with
        ``T_c`` and ``chi_c`` of the component c that mode k belongs to.
    edges : tuple of EdgeMode
        One edge mode per connected component of the frustration graph.
    component : numpy.ndarray of int
        The component of each mode (index into ``edges``).
    """

    quasi_energies: np.ndarray
    raising: tuple[sps.csr_array, ...]
    lowering: tuple[sps.csr_array, ...]
    edges: tuple[EdgeMode, ...]
    component: np.ndarray

    @property
    def edge(self) -> EdgeMode:
        """The edge mode of the first component."""
        return self.edges[0]

    def __post_init__(self) -> None:  # frozen: read-only arrays and matrices, tuples
        object.__setattr__(self, "quasi_energies", readonly_array(self.quasi_energies))
        object.__setattr__(self, "component", readonly_array(self.component))
        for name in ("raising", "lowering"):
            object.__setattr__(self, name, tuple(readonly_sparse(a) for a in getattr(self, name)))

    def to_dict(self) -> dict[str, Any]:
        """JSON-ready summary: quasi-energies, edge mode, dimension, non-zeros per operator.

        The matrices themselves are not included (use :attr:`raising`, :attr:`lowering`).
        """
        return json_ready(  # type: ignore[no-any-return]
            {
                "quasi_energies": self.quasi_energies,
                "edges": self.edges,
                "component": self.component,
                "dimension": self.raising[0].shape[0] if self.raising else None,
                "raising_nonzeros": [a.nnz for a in self.raising],
                "lowering_nonzeros": [a.nnz for a in self.lowering],
            }
        )

    def __repr__(self) -> str:
        etas = ", ".join(display.number_text(v) for v in self.quasi_energies[:6])
        more = ", ..." if len(self.quasi_energies) > 6 else ""
        return (
            f"LadderOperators(k = 1..{len(self.quasi_energies)}, eta = [{etas}{more}], "
            f"{len(self.edges)} component(s))"
        )


def _check_ladder_model(m: Model) -> None:
    if m.states != 2:
        raise ValueError(
            f"ladder operators are built for N = 2 only; this model has N = {m.states}"
        )
    if m.dimension > LADDER_MAX_DIMENSION:
        raise ValueError(
            f"dimension {display.dimension_text(m.dimension)} exceeds {LADDER_MAX_DIMENSION}: "
            "ladder operators are dense "
            "in general; use a smaller system"
        )
    m.coupling_array()  # raises a clear error for symbolic couplings


def component_model(m: Model, terms: Sequence[int]) -> Model:
    """The model made of the given terms only, on all of ``m``'s sites (no constant)."""
    idx = np.asarray(terms, dtype=np.int64)
    return Model(m.strings.take(idx), [m.couplings[int(j)] for j in idx])


def _live_terms(m: Model) -> Model:
    """``m`` without its terms of coupling 0, on all of ``m``'s sites (``m`` itself when none).

    A term with coupling 0 is not part of the Hamiltonian: it links no components (a zero
    coupling splits a chain in two) and its string constrains no mode.
    """
    live = [j for j, c in enumerate(m.couplings) if c != 0]
    if len(live) == len(m) or not live:
        return m
    return component_model(m, live)


def _etas(values: Any) -> np.ndarray:
    eta = np.asarray(values, dtype=complex)
    return eta.real if np.allclose(eta.imag, 0) else eta


def ladder_operators(
    m: Model, quasi_energies: Sequence[complex] | np.ndarray | None = None
) -> LadderOperators:
    """``Psi_{+-k} = T(-+u_k) chi T(+-u_k)`` with ``u_k = 1 / eta_k`` as sparse matrices.

    Each connected component c of the frustration graph is a free system of its own: its modes
    use its own edge mode ``chi_c`` (which commutes with every other component's terms), its
    own transfer matrix ``T_c`` and the quasi-energies of its own polynomial.  (With the whole
    ``T = prod_c T_c`` instead, ``Psi`` carries the factor ``P_{c'}(u_k^2)`` of every other
    component and vanishes at their roots.)

    Parameters
    ----------
    m : Model
        N = 2, numeric couplings, dimension at most :data:`LADDER_MAX_DIMENSION`.
    quasi_energies : sequence of float, optional
        eta_k of a model with one component; by default, per component, from
        :func:`freeladder.free_spectrum` (``unproven=True`` for a model no theorem covers: the
        ladder relations then test those numbers).

    Returns
    -------
    LadderOperators

    Raises
    ------
    ValueError
        For N > 2, symbolic couplings, too large a dimension, quasi-energies given for a model
        with several components, or when a component has no edge mode.

    References
    ----------
    P. Fendley, J. Phys. A 52, 335002 (2019), arXiv:1901.08078, section 4.
    """
    _check_ladder_model(m)
    m = _live_terms(m)
    comps = components(m)
    if quasi_energies is not None and len(comps) > 1:
        raise ValueError(
            f"the frustration graph has {len(comps)} components: quasi-energies cannot be "
            "assigned to them; leave quasi_energies out"
        )
    edges, etas, raising, lowering, owner = [], [], [], [], []
    for c, terms in enumerate(comps):
        edge = edge_mode(m, component=c)
        if not edge.found or edge.string is None:
            raise ValueError(f"no edge mode in component {c} (terms {list(terms)}): {edge.reason}")
        edges.append(edge)
        sub = component_model(m, terms)
        if quasi_energies is not None:
            eta = _etas(quasi_energies)
        else:
            eta = _etas(_spectrum_numbers(sub).quasi_energies)
        chi = edge.string.to_sparse(m.sites)
        for e in eta:
            u = 1.0 / e
            t_plus = transfer_matrix(sub, u).to_sparse()
            t_minus = transfer_matrix(sub, -u).to_sparse()
            raising.append(sps.csr_array(t_minus @ chi @ t_plus))
            lowering.append(sps.csr_array(t_plus @ chi @ t_minus))
            etas.append(e)
            owner.append(c)
    return LadderOperators(
        _etas(etas), tuple(raising), tuple(lowering), tuple(edges), np.asarray(owner, np.int64)
    )


def _spectrum_numbers(m: Model) -> Any:
    """free_spectrum, or its unproven numbers when no theorem covers the model."""
    try:
        return free_spectrum(m)
    except NoTheoremError:
        return free_spectrum(m, unproven=True)  # type: ignore[call-arg,unused-ignore]
