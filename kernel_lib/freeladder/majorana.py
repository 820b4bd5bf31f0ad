"""The generalised Jordan-Wigner route: Majorana modes, cycle and parity sectors, spectra.

When the frustration graph of a Pauli model is the line graph of a root graph R, every term is
a Majorana bilinear ``g_j -> u_j i gamma_a gamma_b`` on the two ends ``(a, b)`` of its edge of R
(A. Chapman and S. T. Flammia, Quantum 4, 278 (2020)).  The signs ``u_j = +-1`` are not all
free: on a spanning forest of R they can be gauged to +1 (flipping ``gamma_v -> -gamma_v`` flips
every edge at v), and each remaining edge closes one independent cycle C of R, whose ordered
product of terms is a conserved string ``W_C`` (it commutes with every term).  In the sector
``W_C = w_C`` the sign of the closing edge is fixed by comparing the product of the Pauli
strings with the product of the Majorana bilinears around C, both computed exactly here.

A connected component of R with an even number V of vertices has one more conserved quantity,
the Majorana parity ``Gamma = gamma_1 ... gamma_V``; it is the product of the terms on a
T-join of the component (every vertex odd), a string ``P`` that may be a non-trivial symmetry
or a multiple of the identity.  Products of these conserved strings that are multiples of the
identity (relations among the model's strings) constrain the sector labels; this module finds
every such relation by linear algebra over GF(2) and keeps only consistent sectors, each of
dimension ``2^(L - rank)``.

In a sector, ``H = (i/2) sum_ab h_ab gamma_a gamma_b`` with the real antisymmetric matrix
``h_ab = c_j u_j = -h_ba``; its real Schur form ``h = Q (+) [[0, e_k], [-e_k, 0]] Q^T`` gives
``H = sum_k e_k s_k`` with ``s_k = +-1`` and, per even component, the constraint
``prod_k s_k = kappa i^(V/2) det Q`` when its parity is fixed.

References
----------
E. Lieb, T. Schultz and D. Mattis, Ann. Phys. 16, 407 (1961) (free fermions from spins);
A. Kitaev, Ann. Phys. 321, 2 (2006) (Majorana modes and conserved plaquettes);
A. Chapman and S. T. Flammia, Quantum 4, 278 (2020), arXiv:2003.05465 (root graphs).
"""

from __future__ import annotations

import bisect
import itertools
from collections.abc import Mapping, Sequence
from dataclasses import dataclass, field
from typing import Any

import networkx as nx
import numpy as np
import scipy.linalg

from .frozen import readonly_array, readonly_mapping
from .jsonready import json_ready
from .model import Model
from .strings import WeylString, make_string
from .verdict import classify

__all__ = ["SectorSpectrum", "SectorStructure", "jordan_wigner_spectrum", "sectors"]

MAX_SECTOR_GENERATORS = 16
"""Sectors are enumerated (``sector="all"`` or ``"ground"``) up to ``2**16`` labels."""

_EPS = float(np.finfo(float).eps)


# -- exact Majorana monomials ----------------------------------------------------------------------
def _monomial_product(
    left: tuple[complex, list[int]], right: Sequence[int]
) -> tuple[complex, list[int]]:
    """``(phase, sorted modes) * gamma_{right[0]} gamma_{right[1]} ...`` with gamma^2 = 1."""
    phase, modes = left[0], list(left[1])
    for v in right:
        pos = bisect.bisect_left(modes, v)
        # move gamma_v from the right end past every larger mode: one sign each
        if (len(modes) - pos - (1 if pos < len(modes) and modes[pos] == v else 0)) % 2:
            phase = -phase
        if pos < len(modes) and modes[pos] == v:
            del modes[pos]
        else:
            modes.insert(pos, v)
    return phase, modes


@dataclass(frozen=True)
class _Component:
    modes: tuple[int, ...]  # global Majorana indices, ascending
    terms: tuple[int, ...]
    parity: int | None  # index of its parity generator (even V), else None


@dataclass(frozen=True)
class SectorStructure:
    """The conserved strings of a Jordan-Wigner model and its consistent sectors.

    Attributes
    ----------
    pairs : mapping, read-only
        Term -> its two Majorana modes ``(a, b)`` (global numbering).
    cycle_operators : tuple of WeylString
        One conserved string per independent cycle of the root graph (normalised: Hermitian,
        squares to one); its eigenvalue labels the sector.
    parity_operators : tuple of WeylString
        One per root-graph component with an even number of modes: the Majorana parity as a
        product of terms (the empty string when it is a multiple of the identity).
    relations : tuple of (tuple of int, int)
        Products of generators (cycle operators first, then parities, by index) that equal
        ``+-1`` times the identity, with that sign: they constrain the labels.
    rank : int
        The number of independent generators over GF(2).
    site_labels : tuple
        The model's sites (the order of the tensor product).
    """

    pairs: Mapping[int, tuple[int, int]]
    cycle_operators: tuple[WeylString, ...]
    parity_operators: tuple[WeylString, ...]
    relations: tuple[tuple[tuple[int, ...], int], ...]
    rank: int
    site_labels: tuple[Any, ...]
    _closing: tuple[tuple[int, complex], ...] = field(repr=False)
    _parity_phase: tuple[complex, ...] = field(repr=False)
    _components: tuple[_Component, ...] = field(repr=False)

    def __post_init__(self) -> None:
        pairs = {int(t): (int(a), int(b)) for t, (a, b) in self.pairs.items()}
        object.__setattr__(self, "pairs", readonly_mapping(pairs))

    @property
    def generators(self) -> tuple[WeylString, ...]:
        """The cycle operators, then the parity operators: a label gives each an eigenvalue."""
        return (*self.cycle_operators, *self.parity_operators)

    @property
    def count(self) -> int:
        """Number of consistent sectors, ``2^rank``."""
        return int(2**self.rank)

    @property
    def sectors(self) -> tuple[tuple[int, ...], ...]:
        """Every consistent label: eigenvalues ``+-1`` of the generators, each a joint
        eigenspace of dimension ``2^(L - rank)``.

        Raises
        ------
        ValueError
            When there are more than ``2^16`` of them.
        """
        return self.labels_where({})

    def labels_where(self, values: Mapping[WeylString, int]) -> tuple[tuple[int, ...], ...]:
        """Every consistent label in which each given conserved string has the given value.

        Parameters
        ----------
        values : mapping
            Conserved strings (any products of the generators, e.g. plaquette operators) to
            their eigenvalues +-1.

        Raises
        ------
        ValueError
            For a string that is not a product of the generators, values that contradict each
            other or the relations, or more than ``2^16`` labels.
        """
        gens = self.generators
        col = {s: j for j, s in enumerate(self.site_labels)}
        equations = [(_mask(members), sign) for members, sign in self.relations]
        basis = _gf2_basis(gens, col) if values else {}
        for string, value in values.items():
            if value not in (1, -1):
                raise ValueError(f"the value of {string} must be +1 or -1, not {value!r}")
            members, zeta = _express(string, gens, col, basis)
            equations.append((_mask(members), value * zeta))
        return _solve_signs(equations, len(gens))

    def sector_of(self, vector: Any, atol: float = 1e-8) -> tuple[int, ...]:
        """Eigenvalues of the generators on a state (an exact eigenvector or a basis state).

        Raises
        ------
        ValueError
            When the state is not an eigenvector of some generator (it mixes sectors).
        """
        v = np.asarray(vector, dtype=complex).ravel()
        n_sites = len(self.site_labels)
        if v.shape != (2**n_sites,):
            raise ValueError(f"the state must have 2^{n_sites} entries, got {v.shape}")
        norm = float(np.vdot(v, v).real)
        if norm == 0:
            raise ValueError("the zero vector has no sector")
        out = []
        sites = self.site_labels
        for k, g in enumerate((*self.cycle_operators, *self.parity_operators)):
            if not g.factors:
                out.append(1)
                continue
            value = complex(np.vdot(v, g.to_sparse(sites) @ v)) / norm
            if abs(abs(value) - 1) > atol or abs(value.imag) > atol:
                raise ValueError(
                    f"the state is not an eigenvector of generator {k} ({g}): "
                    f"<W> = {value.real:.6g}; it mixes sectors"
                )
            out.append(1 if value.real > 0 else -1)
        return tuple(out)

    def to_dict(self) -> dict[str, Any]:
        """JSON-ready summary: operators as text, relations, sector count, rank."""
        return json_ready(
            {
                "cycle_operators": [str(g) for g in self.cycle_operators],
                "parity_operators": [str(g) or "1" for g in self.parity_operators],
                "relations": [{"generators": k, "sign": s} for k, s in self.relations],
                "sectors": self.count,
                "rank": self.rank,
            }
        )


def _check_model(m: Model) -> dict[int, tuple[int, int]]:
    if not isinstance(m, Model):
        raise TypeError(f"expected a freeladder Model, got {type(m).__name__}")
    if m.states != 2:
        raise ValueError("the Jordan-Wigner route needs a Pauli model (N = 2)")
    verdict = classify(m)
    pairs = verdict.majorana_pairs
    if pairs is None:
        raise ValueError(
            f"the frustration graph is not a line graph (verdict {verdict.kind!r}): no "
            "Majorana bilinear form exists (Chapman-Flammia 2020)"
        )
    return dict(pairs)


def _ordered_product(strings: Sequence[WeylString]) -> tuple[WeylString, complex]:
    """``prod strings = phase * g`` with g normalised (Hermitian, squares to one)."""
    prod = make_string(2, [])
    for g in strings:
        prod = prod * g
    g, e = prod.normalized()
    return g, 1j ** (e % 4)


def _majorana_phase(edges: Sequence[tuple[int, int]]) -> tuple[complex, list[int]]:
    """``prod_j (i gamma_a gamma_b)`` over ``edges`` in order, as (phase, sorted modes)."""
    acc: tuple[complex, list[int]] = (1 + 0j, [])
    for a, b in edges:
        acc = _monomial_product((acc[0] * 1j, acc[1]), (a, b))
    return acc


def _gf2_vector(g: WeylString, col: dict[Any, int]) -> int:
    bits = 0
    for s, a, b in g.factors:
        j = col[s]
        bits |= (a & 1) << (2 * j)
        bits |= (b & 1) << (2 * j + 1)
    return bits


def _relations(
    gens: Sequence[WeylString], col: dict[Any, int]
) -> tuple[list[tuple[tuple[int, ...], int]], int]:
    """Kernel of the generators over GF(2): subsets whose product is ``+-1``, and the rank."""
    basis: dict[int, tuple[int, int]] = {}  # pivot bit -> (vector, combination mask)
    relations = []
    for k, g in enumerate(gens):
        vec, combo = _gf2_vector(g, col), 1 << k
        while vec:
            pivot = vec.bit_length() - 1
            if pivot not in basis:
                basis[pivot] = (vec, combo)
                break
            bvec, bcombo = basis[pivot]
            vec, combo = vec ^ bvec, combo ^ bcombo
        if vec == 0:
            members = tuple(i for i in range(len(gens)) if combo >> i & 1)
            prod, phase = _ordered_product([gens[i] for i in members])
            if prod.factors or abs(phase.imag) > 0:
                raise AssertionError("commuting Hermitian strings multiplied to a non-real phase")
            relations.append((members, 1 if phase.real > 0 else -1))
    return relations, len(basis)


def _mask(members: Sequence[int]) -> int:
    out = 0
    for k in members:
        out |= 1 << k
    return out


def _gf2_basis(gens: Sequence[WeylString], col: dict[Any, int]) -> dict[int, tuple[int, int]]:
    """Echelon basis of the generators over GF(2): pivot bit -> (vector, combination mask)."""
    basis: dict[int, tuple[int, int]] = {}
    for k, gen in enumerate(gens):
        vec, combo = _gf2_vector(gen, col), 1 << k
        while vec:
            pivot = vec.bit_length() - 1
            if pivot not in basis:
                basis[pivot] = (vec, combo)
                break
            vec, combo = vec ^ basis[pivot][0], combo ^ basis[pivot][1]
    return basis


def _express(
    string: WeylString,
    gens: Sequence[WeylString],
    col: dict[Any, int],
    basis: dict[int, tuple[int, int]],
) -> tuple[tuple[int, ...], int]:
    """Generators whose product is ``zeta * string`` (zeta = +-1), by elimination over GF(2)."""
    if not isinstance(string, WeylString) or string.states != 2:
        raise TypeError(f"expected a Pauli string (WeylString with N = 2), got {string!r}")
    g, _ = string.normalized()
    try:
        target = _gf2_vector(g, col)
    except KeyError as err:
        raise ValueError(f"{string} acts on site {err.args[0]!r}, not in the model") from None
    combo = 0
    while target:
        pivot = target.bit_length() - 1
        if pivot not in basis:
            raise ValueError(f"{string} is not a product of the conserved cycle/parity strings")
        target, combo = target ^ basis[pivot][0], combo ^ basis[pivot][1]
    members = tuple(k for k in range(len(gens)) if combo >> k & 1)
    prod, phase = _ordered_product([gens[k] for k in members])
    if prod.factors != g.factors or abs(phase.imag) > 1e-12:
        raise AssertionError("a product of commuting Hermitian strings has a non-real phase")
    return members, 1 if phase.real > 0 else -1


def _solve_signs(equations: Sequence[tuple[int, int]], n: int) -> tuple[tuple[int, ...], ...]:
    """All ``a in {+-1}^n`` with ``prod_{k in mask} a_k = sign`` for every (mask, sign)."""
    pivots: dict[int, tuple[int, int]] = {}  # pivot bit -> (mask, parity bit)
    for mask, sign in equations:
        bit = 0 if sign == 1 else 1
        while mask:
            p = mask.bit_length() - 1
            if p not in pivots:
                pivots[p] = (mask, bit)
                break
            mask, bit = mask ^ pivots[p][0], bit ^ pivots[p][1]
        if mask == 0 and bit:
            raise ValueError("the requested values contradict each other or the relations")
    free = [k for k in range(n) if k not in pivots]
    if len(free) > MAX_SECTOR_GENERATORS:
        raise ValueError(
            f"2^{len(free)} labels are consistent: more than 2^{MAX_SECTOR_GENERATORS} to list; "
            "fix more conserved strings (labels_where) to narrow them down"
        )
    out = []
    for choice in itertools.product((0, 1), repeat=len(free)):
        x = dict(zip(free, choice, strict=True))
        for p in sorted(pivots):  # lower pivots first: each row's other bits are below it
            mask, bit = pivots[p]
            rest = mask & ~(1 << p)
            val = bit
            k = 0
            while rest:
                if rest & 1:
                    val ^= x[k]
                rest >>= 1
                k += 1
            x[p] = val
        out.append(tuple(-1 if x[k] else 1 for k in range(n)))
    return tuple(sorted(out, reverse=True))


def sectors(m: Model) -> SectorStructure:
    """The conserved cycle and parity strings of a Jordan-Wigner model, and its sectors.

    Parameters
    ----------
    m : Model
        A Pauli model whose frustration graph is a line graph (verdict "jordan-wigner").

    Returns
    -------
    SectorStructure

    Raises
    ------
    ValueError
        For N > 2 or a frustration graph that is not a line graph.

    References
    ----------
    A. Chapman and S. T. Flammia, Quantum 4, 278 (2020); A. Kitaev, Ann. Phys. 321, 2 (2006).

    Examples
    --------
    >>> import freeladder as fl
    >>> ring = fl.parse_model(" + ".join(f"Z{i} Z{(i + 1) % 5}" for i in range(5)))
    >>> s = fl.sectors(ring)          # five commuting terms whose product is the identity
    >>> s.relations, s.count
    ((((0, 1, 2, 3, 4), 1),), 16)
    """
    pairs = _check_model(m)
    strings = m.strings
    root = nx.Graph()
    for term, (a, b) in pairs.items():
        root.add_edge(a, b, term=term)
    cycle_ops: list[WeylString] = []
    closing: list[tuple[int, complex]] = []
    parity_ops: list[WeylString] = []
    parity_phase: list[complex] = []
    comps: list[_Component] = []
    for nodes in sorted(nx.connected_components(root), key=min):
        sub = root.subgraph(nodes)
        parent = dict(nx.bfs_predecessors(sub, min(nodes)))  # short fundamental cycles
        tree = nx.Graph([(v, u) for v, u in parent.items()])
        tree.add_nodes_from(nodes)
        depth = {min(nodes): 0}
        for v in nx.bfs_tree(tree, min(nodes)):
            if v in parent:
                depth[v] = depth[parent[v]] + 1
        for a, b, data in sorted(sub.edges(data=True), key=lambda e: e[2]["term"]):
            if tree.has_edge(a, b):
                continue
            path = _tree_path(parent, depth, b, a)  # b -> ... -> a along the tree
            terms = [data["term"]] + [root.edges[x, y]["term"] for x, y in itertools.pairwise(path)]
            g, lam = _ordered_product([strings[t] for t in terms])
            mu, rest = _majorana_phase([pairs[t] for t in terms])
            if rest:
                raise AssertionError("a root cycle's bilinears did not multiply to a scalar")
            cycle_ops.append(g)
            # sector W = w: lam * w = u_e * mu  (tree signs +1)  =>  u_e = w * lam / mu
            closing.append((data["term"], lam / mu))
        parity = None
        if len(nodes) % 2 == 0:
            join = _t_join(tree, parent, depth, nodes)
            terms = sorted(root.edges[x, y]["term"] for x, y in join)
            g, lam = _ordered_product([strings[t] for t in terms])
            mu, modes = _majorana_phase([pairs[t] for t in terms])
            if modes != sorted(nodes):
                raise AssertionError("the T-join does not cover every mode once")
            parity = len(parity_ops)
            parity_ops.append(g)
            # P = p: lam * p = mu * Gamma  =>  Gamma = p * lam / mu
            parity_phase.append(lam / mu)
        comps.append(
            _Component(
                tuple(sorted(nodes)),
                tuple(sorted(d["term"] for *_, d in sub.edges(data=True))),
                parity,
            )
        )
    gens = [*cycle_ops, *parity_ops]
    col = {s: j for j, s in enumerate(m.sites)}
    relations, rank = _relations(gens, col)
    return SectorStructure(
        pairs,
        tuple(cycle_ops),
        tuple(parity_ops),
        tuple(relations),
        rank,
        tuple(m.sites),
        tuple(closing),
        tuple(parity_phase),
        tuple(comps),
    )


def _tree_path(parent: dict[Any, Any], depth: dict[Any, int], a: Any, b: Any) -> list[Any]:
    """Vertices from a to b along the tree."""
    left, right = [a], [b]
    while depth[left[-1]] > depth[right[-1]]:
        left.append(parent[left[-1]])
    while depth[right[-1]] > depth[left[-1]]:
        right.append(parent[right[-1]])
    while left[-1] != right[-1]:
        left.append(parent[left[-1]])
        right.append(parent[right[-1]])
    return left + right[-2::-1]


def _t_join(tree: nx.Graph, parent: dict[Any, Any], depth: dict[Any, int], nodes: Any) -> list:
    """Tree edges such that every vertex has odd degree (exists for an even vertex count)."""
    needs = {v: True for v in nodes}  # True while v's degree in the join is even
    join = []
    for v in sorted(nodes, key=lambda x: -depth[x]):
        if v in parent and needs[v]:
            join.append((v, parent[v]))
            needs[v] = False
            needs[parent[v]] = not needs[parent[v]]
    return join


# -- spectra --------------------------------------------------------------------------------------
@dataclass(frozen=True)
class _SectorLevels:
    label: tuple[int, ...]
    energies: tuple[np.ndarray, ...]  # per component: e_k >= 0, ascending
    parity: tuple[int | None, ...]  # per component: required prod s_k, or None
    multiplicity: int
    ground_energy: float

    def __post_init__(self) -> None:
        object.__setattr__(self, "energies", tuple(readonly_array(e) for e in self.energies))


@dataclass(frozen=True)
class SectorSpectrum:
    """Free-fermion spectra of a Jordan-Wigner model, one per sector.

    Attributes
    ----------
    structure : SectorStructure
    sectors : tuple
        The sectors computed, each with its label (generator eigenvalues), per-component
        single-particle energies ``e_k >= 0``, the parity constraint ``prod s_k`` (None when
        free) and the multiplicity of each of its levels.
    error_bound : float
        Estimate of the absolute error of every single-particle energy: ``V eps ||h||_2``
        (backward stability of the real Schur decomposition, with Weyl's inequality); an
        estimate, not a proof.
    """

    structure: SectorStructure
    sectors: tuple[_SectorLevels, ...]
    constant: float
    error_bound: float

    @property
    def ground_energy(self) -> float:
        """The lowest level over the sectors computed."""
        return min(s.ground_energy for s in self.sectors) + self.constant

    @property
    def ground_sector(self) -> tuple[int, ...]:
        """The label of a sector that holds the lowest level."""
        return min(self.sectors, key=lambda s: s.ground_energy).label

    def quasi_energies(self, sector: int = 0) -> np.ndarray:
        """Single-particle energies of one computed sector (all components), ascending."""
        parts = self.sectors[sector].energies
        return np.sort(np.concatenate(parts)) if parts else np.zeros(0)

    def levels(self, max_modes: int = 22) -> tuple[np.ndarray, np.ndarray]:
        """Every many-body level over the computed sectors: (energies, multiplicities).

        Raises
        ------
        ValueError
            When a sector has more than ``max_modes`` single-particle energies (2^modes levels).
        """
        energies, mult = [], []
        for sec in self.sectors:
            values = np.zeros(1)
            for e, parity in zip(sec.energies, sec.parity, strict=True):
                if len(e) > max_modes:
                    raise ValueError(
                        f"{len(e)} modes in one component: 2^{len(e)} levels is too many to list"
                    )
                values = (values[:, None] + _component_levels(e, parity)[None, :]).ravel()
            energies.append(values + self.constant)
            mult.append(np.full(len(values), sec.multiplicity))
        return np.concatenate(energies), np.concatenate(mult)

    def to_dict(self) -> dict[str, Any]:
        """JSON-ready: structure, per-sector energies and multiplicities, ground energy."""
        return json_ready(
            {
                "structure": self.structure.to_dict(),
                "sectors": [
                    {
                        "label": s.label,
                        "quasi_energies": np.sort(np.concatenate(s.energies)),
                        "multiplicity": s.multiplicity,
                        "ground_energy": s.ground_energy + self.constant,
                    }
                    for s in self.sectors
                ],
                "ground_energy": self.ground_energy,
                "error_bound": self.error_bound,
                "bounds": "estimate (backward-stable Schur decomposition), not a proof",
            }
        )


def _component_levels(e: np.ndarray, parity: int | None) -> np.ndarray:
    """``sum_k s_k e_k`` over sign choices, restricted to ``prod s_k = parity`` when given."""
    signs = np.array(list(itertools.product((-1, 1), repeat=len(e))), dtype=float).reshape(
        -1, len(e)
    )
    if parity is not None:
        signs = signs[np.prod(signs, axis=1) == parity]
    return signs @ e if len(e) else np.zeros(len(signs))


def _canonical(h: np.ndarray) -> tuple[np.ndarray, float]:
    """Energies ``e_k >= 0`` of the real antisymmetric ``h`` and ``det Q`` of its normal form."""
    n = h.shape[0]
    t, q = scipy.linalg.schur(h, output="real")
    tol = 10 * n * _EPS * max(1.0, float(np.abs(h).max()))
    cols: list[int] = []
    energies: list[float] = []
    zeros: list[int] = []
    i = 0
    while i < n:
        if i + 1 < n and abs(t[i + 1, i]) > tol:
            b = t[i, i + 1]
            cols += [i, i + 1] if b >= 0 else [i + 1, i]
            energies.append(abs(b))
            i += 2
        else:
            zeros.append(i)
            i += 1
    while len(zeros) >= 2:
        cols += [zeros.pop(0), zeros.pop(0)]
        energies.append(0.0)
    cols += zeros  # one unpaired zero mode for odd V (never a parity constraint)
    det = float(np.linalg.det(q[:, cols])) if n else 1.0
    return np.array(energies), (1.0 if det > 0 else -1.0)


def jordan_wigner_spectrum(m: Model, sector: str | Sequence[int] = "all") -> SectorSpectrum:
    """Exact free-fermion spectra of a Jordan-Wigner model, sector by sector.

    Parameters
    ----------
    m : Model
        Real couplings; the frustration graph must be a line graph.
    sector : "all", "ground", a sequence of +-1, or a mapping
        "all": every consistent sector (their union, with multiplicities, is the whole
        spectrum).  "ground": every sector is solved and the one holding the lowest level is
        kept (a search; refused beyond 2^16 sectors).  A sequence: eigenvalues of the cycle
        operators (:attr:`SectorStructure.cycle_operators`, in order); every consistent parity
        assignment is kept.  A mapping: conserved strings (e.g. plaquettes) to their values;
        every consistent completion is kept (:meth:`SectorStructure.labels_where`).

    Returns
    -------
    SectorSpectrum

    Raises
    ------
    ValueError
        For complex couplings, a label of the wrong length or not consistent, or too many
        sectors to enumerate.

    References
    ----------
    E. Lieb, T. Schultz and D. Mattis, Ann. Phys. 16, 407 (1961); A. Kitaev, Ann. Phys. 321,
    2 (2006); A. Chapman and S. T. Flammia, Quantum 4, 278 (2020).

    Examples
    --------
    >>> import freeladder as fl
    >>> sp = fl.jordan_wigner_spectrum(fl.parse_model("Z0 Z1 + Z1 Z2 + Z2 Z0"))
    >>> float(sp.ground_energy)     # the frustrated triangle: -1, not the free -3
    -1.0
    """
    struct = sectors(m)
    couplings = m.coupling_array()
    if np.iscomplexobj(couplings):
        raise ValueError("the Jordan-Wigner route here needs real couplings")
    n_cycles = len(struct.cycle_operators)
    if isinstance(sector, str):
        if sector not in ("all", "ground"):
            raise ValueError(f"sector must be 'all', 'ground' or a tuple of +-1, not {sector!r}")
        labels = struct.sectors
    elif isinstance(sector, Mapping):
        labels = struct.labels_where(sector)
    else:
        want = tuple(int(s) for s in sector)
        if len(want) != n_cycles or any(s not in (1, -1) for s in want):
            raise ValueError(f"a sector label is {n_cycles} values +-1 (one per cycle operator)")
        labels = struct.labels_where(dict(zip(struct.cycle_operators, want, strict=True)))
    dim = 2 ** len(m.sites)
    solved = [_solve_sector(struct, couplings, label, dim) for label in labels]
    if sector == "ground":
        solved = [min(solved, key=lambda s: s.ground_energy)]
    hnorm = float(np.abs(couplings).sum()) if len(couplings) else 0.0
    n_modes = 1 + max((max(p) for p in struct.pairs.values()), default=0)
    constant = float(np.real(complex(m.constant))) if m.constant != 0 else 0.0
    return SectorSpectrum(struct, tuple(solved), constant, 2 * n_modes * _EPS * hnorm)


def _solve_sector(
    struct: SectorStructure, couplings: np.ndarray, label: tuple[int, ...], dim: int
) -> _SectorLevels:
    n_cycles = len(struct.cycle_operators)
    signs = np.ones(len(couplings))
    for (term, ratio), w in zip(struct._closing, label[:n_cycles], strict=True):
        u = w * ratio
        if abs(u.imag) > 1e-12 or abs(abs(u.real) - 1) > 1e-12:
            raise AssertionError("a closing sign came out not +-1")
        signs[term] = 1.0 if u.real > 0 else -1.0
    energies, parities = [], []
    irrep = 1
    ground = 0.0
    for comp in struct._components:
        index = {v: i for i, v in enumerate(comp.modes)}
        h = np.zeros((len(comp.modes), len(comp.modes)))
        for t in comp.terms:
            a, b = struct.pairs[t]
            h[index[a], index[b]] += couplings[t] * signs[t]
            h[index[b], index[a]] -= couplings[t] * signs[t]
        e, det = _canonical(h)
        v = len(comp.modes)
        parity: int | None = None
        if comp.parity is not None:
            kappa = label[n_cycles + comp.parity] * struct._parity_phase[comp.parity]
            need = kappa * (1j ** (v // 2)) * det
            if abs(need.imag) > 1e-12 or abs(abs(need.real) - 1) > 1e-12:
                raise AssertionError("a parity constraint came out not +-1")
            parity = 1 if need.real > 0 else -1
            irrep *= 2 ** (v // 2 - 1)
        else:
            irrep *= 2 ** ((v - 1) // 2)
        low = -float(e.sum())
        if parity is not None and len(e) and (-1) ** len(e) != parity:
            low += 2 * float(e.min())
        ground += low
        energies.append(e)
        parities.append(parity)
    per_sector = dim // 2**struct.rank
    if per_sector % irrep:
        raise AssertionError("sector dimension is not a multiple of the Majorana irrep")
    return _SectorLevels(label, tuple(energies), tuple(parities), per_sector // irrep, ground)
