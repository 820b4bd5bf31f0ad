"""The edge mode and the ladder operators of the hidden free fermions.

An *edge mode* is a string ``chi`` that fails to commute with exactly one term ``g_a`` of the
Hamiltonian, where ``g_a`` lies in a simplicial clique of the frustration graph, and commutes
with every other term.  For N = 2, with ``T(u) = sum_s (-u)^s Q^(s)`` and ``u_k = 1 / eta_k``,

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
from collections.abc import Sequence
from dataclasses import dataclass, field
from typing import Any

import numpy as np
import scipy.sparse as sps
import scipy.sparse.csgraph as csgraph

from .charges import transfer_matrix
from .clawfree import find_simplicial_clique
from .frozen import readonly_array, readonly_sparse
from .graph import chain_structure, frustration_adjacency
from .jsonready import json_ready
from .model import Model
from .spectrum import free_spectrum
from .strings import StringArray, WeylString

__all__ = [
    "LADDER_MAX_DIMENSION",
    "MAX_CANDIDATES",
    "EdgeMode",
    "LadderOperators",
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
        The one term ``g_a`` that ``chi`` fails to commute with.
    clique : tuple of int
        The simplicial clique that contains ``term`` (or the last one tried).
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
        return f"edge mode chi = {self.string} (fails to commute with term {self.term} only)"

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


def simplicial_cliques(m: Model) -> list[tuple[int, ...]]:
    """Simplicial cliques to try for the edge mode, ends of chains first.

    For an exclusion chain of reach p both ends ``order[:p+1]`` and ``order[-p-1:]`` are
    simplicial cliques; otherwise one simplicial clique per connected component is searched for
    with :func:`freeladder.clawfree.find_simplicial_clique`.
    """
    chain = chain_structure(m)
    if chain is not None:
        order = [int(v) for v in chain.order]
        p = chain.reach
        ends = [tuple(order[: p + 1]), tuple(reversed(order[-(p + 1) :]))]
        return ends if set(ends[0]) != set(ends[1]) else ends[:1]
    adj = frustration_adjacency(m)
    neighbours = [
        set(adj.indices[adj.indptr[v] : adj.indptr[v + 1]].tolist()) for v in range(len(m))
    ]
    n_comp, labels = csgraph.connected_components(adj, directed=False)
    out = []
    for c in range(n_comp):
        verts = [int(v) for v in np.nonzero(labels == c)[0]]
        clique = find_simplicial_clique(neighbours, verts)
        if clique is not None:
            out.append(tuple(clique))
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


def edge_mode(m: Model, max_sites: int | None = None) -> EdgeMode:
    """Find a string that fails to commute with exactly one term of a simplicial clique.

    For each term ``g_a`` of each simplicial clique (chain ends first), every string on a window
    of sites around ``g_a`` -- its support, then sites of neighbouring terms, up to
    ``max_sites`` sites -- is tested at once against all terms (one sparse product,
    :meth:`StringArray.commutation_with`); the string of smallest support that fails to commute
    with ``g_a`` alone is returned.

    Parameters
    ----------
    m : Model
    max_sites : int, optional
        Window size; default 6 sites for N = 2, 4 for N = 3, fewer for larger N (at most
        :data:`MAX_CANDIDATES` candidates, ``N^(2 * sites)``).

    Returns
    -------
    EdgeMode
        ``found=False`` with a reason when the graph has no simplicial clique or no string on
        the windows works.

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
    n = m.states
    cap = max(1, int(np.log(MAX_CANDIDATES) / np.log(n * n)))
    width = cap if max_sites is None else min(int(max_sites), cap)
    cliques = simplicial_cliques(m)
    if not cliques:
        return EdgeMode(
            False, None, None, (), None, "the frustration graph has no simplicial clique"
        )
    tried = 0
    searched: list[Any] = []
    for clique in cliques:
        for a in clique:
            cols = _window(m, a, width)
            searched.extend(m.sites[c] for c in cols if m.sites[c] not in searched)
            x, z, _ = _candidates(cols, len(m.sites), n)
            cand = StringArray(x, z, np.zeros(x.shape[0], np.int64), n, m.sites)
            tried += len(cand)
            cm = cand.commutation_with(m.strings)
            counts = np.diff(cm.indptr)
            ok = np.nonzero(counts == 1)[0]
            ok = ok[cm.indices[cm.indptr[ok]] == a]
            if len(ok):
                r = int(ok[0])
                chi, _ = cand[r].normalized()
                expo = int(cm.data[cm.indptr[r]])
                reason = (
                    f"smallest-support string on the {len(cols)} sites around term {a} of the "
                    f"simplicial clique {list(clique)}; {tried} candidates tested"
                )
                return EdgeMode(True, chi, a, clique, expo, reason, tried, tuple(searched))
    reason = (
        f"no string on windows of up to {width} sites around the terms of the simplicial cliques "
        f"{[list(c) for c in cliques]} fails to commute with exactly one term "
        f"({tried} candidates tested); try a larger max_sites"
    )
    return EdgeMode(False, None, None, cliques[-1], None, reason, tried, tuple(searched))


@dataclass(frozen=True)
class LadderOperators:
    """Raising and lowering operators ``Psi_{+-k}`` as sparse matrices (N = 2).

    Attributes
    ----------
    quasi_energies : numpy.ndarray
        eta_k > 0 used for ``u_k = 1 / eta_k``.
    raising, lowering : tuple of scipy.sparse.csr_array (read-only arrays)
        ``Psi_{+k} = T(-u_k) chi T(u_k)`` and ``Psi_{-k} = T(u_k) chi T(-u_k)``.
    edge : EdgeMode
        The edge mode ``chi`` they are built from.
    """

    quasi_energies: np.ndarray
    raising: tuple[sps.csr_array, ...]
    lowering: tuple[sps.csr_array, ...]
    edge: EdgeMode

    def __post_init__(self) -> None:  # frozen: read-only arrays and matrices, tuples
        object.__setattr__(self, "quasi_energies", readonly_array(self.quasi_energies))
        for name in ("raising", "lowering"):
            object.__setattr__(self, name, tuple(readonly_sparse(a) for a in getattr(self, name)))

    def to_dict(self) -> dict[str, Any]:
        """JSON-ready summary: quasi-energies, edge mode, dimension, non-zeros per operator.

        The matrices themselves are not included (use :attr:`raising`, :attr:`lowering`).
        """
        return json_ready(  # type: ignore[no-any-return]
            {
                "quasi_energies": self.quasi_energies,
                "edge": self.edge,
                "dimension": self.raising[0].shape[0] if self.raising else None,
                "raising_nonzeros": [a.nnz for a in self.raising],
                "lowering_nonzeros": [a.nnz for a in self.lowering],
            }
        )

    def __repr__(self) -> str:
        etas = ", ".join(f"{v:.6g}" for v in self.quasi_energies[:6])
        more = ", ..." if len(self.quasi_energies) > 6 else ""
        return f"LadderOperators(k = 1..{len(self.quasi_energies)}, eta = [{etas}{more}])"


def ladder_operators(m: Model, quasi_energies: Sequence[float] | None = None) -> LadderOperators:
    """``Psi_{+-k} = T(-+u_k) chi T(+-u_k)`` with ``u_k = 1 / eta_k`` as sparse matrices.

    Parameters
    ----------
    m : Model
        N = 2, numeric couplings, dimension at most :data:`LADDER_MAX_DIMENSION`.
    quasi_energies : sequence of float, optional
        eta_k; by default from :func:`freeladder.free_spectrum`.

    Returns
    -------
    LadderOperators

    Raises
    ------
    ValueError
        For N > 2, symbolic couplings, too large a dimension, or when no edge mode exists.

    References
    ----------
    P. Fendley, J. Phys. A 52, 335002 (2019), arXiv:1901.08078, section 4.
    """
    if m.states != 2:
        raise ValueError(
            f"ladder operators are built for N = 2 only; this model has N = {m.states}"
        )
    if m.dimension > LADDER_MAX_DIMENSION:
        raise ValueError(
            f"dimension {m.dimension} exceeds {LADDER_MAX_DIMENSION}: ladder operators are dense "
            "in general; use a smaller system"
        )
    m.coupling_array()  # raises a clear error for symbolic couplings
    edge = edge_mode(m)
    if not edge.found or edge.string is None:
        raise ValueError(f"no edge mode: {edge.reason}")
    if quasi_energies is None:
        eta = np.asarray(free_spectrum(m).quasi_energies, dtype=complex)
    else:
        eta = np.asarray(quasi_energies, dtype=complex)
    if np.allclose(eta.imag, 0):
        eta = eta.real
    chi = edge.string.to_sparse(m.sites)
    raising, lowering = [], []
    for e in eta:
        u = 1.0 / e
        t_plus = transfer_matrix(m, u).to_sparse()
        t_minus = transfer_matrix(m, -u).to_sparse()
        raising.append(sps.csr_array(t_minus @ chi @ t_plus))
        lowering.append(sps.csr_array(t_plus @ chi @ t_minus))
    return LadderOperators(np.asarray(eta), tuple(raising), tuple(lowering), edge)
