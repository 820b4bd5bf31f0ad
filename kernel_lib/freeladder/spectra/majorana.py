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
``h_ab = c_j u_j = -h_ba``; its normal form ``h = Q (+) [[0, e_k], [-e_k, 0]] Q^T`` gives
``H = sum_k e_k s_k`` with ``s_k = +-1`` and, per even component, the constraint
``prod_k s_k = kappa i^(V/2) det Q`` when its parity is fixed, where
``det Q = sign Pf(h)`` (``Pf(h) = det Q prod_k e_k``).  Neither ``Q`` nor a Schur form is
computed: the energies are singular values of the off-diagonal block when the pattern of ``h``
is bipartite (the sign from an LU determinant), else eigenvalues of its Householder
tridiagonal form (the sign from the same reduction).  Complex couplings give a
complex antisymmetric ``h``: its eigenvalue pairs ``+-e_k`` and ``det Q = Pf(h) / prod e_k``
play the same roles.  :func:`freeladder.free_spectrum` with ``sector=`` returns one set of
cycle values as a :class:`~freeladder.FreeSpectrum` (through :func:`flux_sector`).

References
----------
E. Lieb, T. Schultz and D. Mattis, Ann. Phys. 16, 407 (1961) (free fermions from spins);
A. Kitaev, Ann. Phys. 321, 2 (2006) (Majorana modes and conserved plaquettes);
A. Chapman and S. T. Flammia, Quantum 4, 278 (2020), arXiv:2003.05465 (root graphs);
E. H. Lieb, Phys. Rev. Lett. 73, 2158 (1994) (flux of the ground state).
"""

from __future__ import annotations

import bisect
import itertools
from collections.abc import Mapping, Sequence
from dataclasses import dataclass, field
from typing import TYPE_CHECKING, Any

import numpy as np
import scipy.sparse

from ..algebra.model import Model
from ..algebra.strings import WeylString, make_string
from ..base.cache import part
from ..base.errors import TooLargeError
from ..base.frozen import readonly_array, readonly_mapping
from ..base.jsonready import json_ready
from ..base.references import KITAEV_2006, LIEB_1994
from ..graphs.verdict import classify

if TYPE_CHECKING:
    import flint
    import mpmath
    import networkx as nx
    import scipy.sparse.csgraph as csgraph
else:
    from ..base.lazy import csgraph, flint, mpmath
    from ..base.lazy import networkx as nx


__all__ = [
    "FluxSector",
    "SectorSpectrum",
    "SectorStructure",
    "flux_sector",
    "flux_theorem_values",
    "jordan_wigner_spectrum",
    "sectors",
]

MAX_SECTOR_GENERATORS = 16
"""Sectors are enumerated (``sector="all"`` or ``"ground"``) up to ``2**16`` labels."""

_EPS = float(np.finfo(float).eps)

FLUX_RULE = f"Lieb's flux theorem ({LIEB_1994}) as {KITAEV_2006} applies it: flux-free hexagons"
FLUX_CAVEAT = (
    "the theorem is proved for reflection-symmetric lattices; on small tori it can fail (it "
    "does on the 2 x 2 and 3 x 3 tori, by exact diagonalization), so this sector is the ground "
    "one by that argument, not by a search"
)


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

    def select(
        self, sector: Sequence[int] | Mapping[WeylString, int]
    ) -> tuple[tuple[int, ...], ...]:
        """The consistent labels a sector choice selects, or a refusal listing the valid ones.

        Parameters
        ----------
        sector : sequence of int or mapping
            A label as :attr:`sectors` lists it (cycle values, then parity values: that sector
            alone); the cycle values only (every consistent parity kept); or a mapping of
            conserved strings (:class:`WeylString`) to their values.  Every value is the
            integer +1 or -1 (Python or numpy integers; not bools, not floats); a sequence is a
            tuple, a list or a 1-d numpy integer array.

        Raises
        ------
        TypeError
            For any other kind of choice or value (a string, a set, a float, a bool, ...).
        ValueError
            For a label of the wrong length, or values the relations do not allow; the message
            lists the valid labels.
        """
        n_cycles, n_gens = len(self.cycle_operators), len(self.generators)
        if isinstance(sector, Mapping):
            values = {}
            for key, value in sector.items():
                if not isinstance(key, WeylString):
                    raise TypeError(
                        f"a sector mapping's keys are conserved strings (WeylString), not "
                        f"{key!r}; {self._valid_text()}"
                    )
                values[key] = _label_sign(value, f"the value of {key}", self)
            return self.labels_where(values)
        if isinstance(sector, np.ndarray):
            if sector.ndim != 1 or sector.dtype.kind not in "iu":
                raise TypeError(
                    f"a sector label array must be 1-d of integers, got shape {sector.shape} and "
                    f"dtype {sector.dtype}; {self._valid_text()}"
                )
            sector = sector.tolist()
        if not isinstance(sector, (tuple, list)):
            raise TypeError(
                f"a sector is a tuple of +-1 or a mapping of conserved strings to +-1, not "
                f"{type(sector).__name__} {sector!r}; {self._valid_text()}"
            )
        want = [
            _label_sign(v, f"entry {k} of the sector label", self) for k, v in enumerate(sector)
        ]
        if len(want) not in (n_cycles, n_gens):
            raise ValueError(
                f"a sector label has {n_gens} values (the {n_cycles} cycle values, then the "
                f"{n_gens - n_cycles} parity values) or only the {n_cycles} cycle values, not "
                f"{len(want)}; {self._valid_text()}"
            )
        # one equation per generator by position: equal generators (e.g. two cycle strings
        # that are both the identity) keep their own values and must agree with the relations
        equations = [(_mask(members), sign) for members, sign in self.relations]
        equations += [(1 << k, v) for k, v in enumerate(want)]
        try:
            return _solve_signs(equations, n_gens)
        except ValueError as err:
            if "contradict" not in str(err):
                raise
            raise ValueError(
                f"the sector label {tuple(want)} is not consistent with the relations among the "
                f"conserved strings; {self._valid_text()}"
            ) from None

    def _valid_text(self) -> str:
        """The valid labels, for error messages."""
        n_cycles = len(self.cycle_operators)
        if self.rank > 6:
            return (
                f"the valid labels are {self.count} tuples of {len(self.generators)} values +-1 "
                f"(the first {n_cycles} are cycle values; see sectors(m).sectors)"
            )
        listed = ", ".join(str(label) for label in self.sectors)
        return f"the valid labels (cycle values, then parity values) are {listed}"

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


def _label_sign(value: Any, what: str, struct: SectorStructure) -> int:
    """``value`` as +1 or -1 when it is exactly that integer; else a refusal."""
    if isinstance(value, (bool, np.bool_)) or not isinstance(value, (int, np.integer)):
        raise TypeError(
            f"{what} must be the integer +1 or -1, not {type(value).__name__} {value!r}; "
            f"{struct._valid_text()}"
        )
    if int(value) not in (1, -1):
        raise ValueError(f"{what} must be +1 or -1, not {value!r}; {struct._valid_text()}")
    return int(value)


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
    _check_model(m)
    return SECTORS(m, tuple(m.sites))  # depends on the strings only: shared across couplings


@part("sector structure", "strings")
def SECTORS(m: Model, sites: tuple[Any, ...]) -> SectorStructure:
    """The part behind :func:`sectors` (per list of sites)."""
    return _build_sectors(m, _check_model(m))


def _build_sectors(m: Model, pairs: dict[int, tuple[int, int]]) -> SectorStructure:
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


# -- Lieb's flux theorem on the honeycomb torus ---------------------------------------------------
def _bond_kind(g: WeylString) -> tuple[int, int] | None:
    """The Pauli letter of a two-site string with the same letter on both sites, else None."""
    if len(g.factors) != 2:
        return None
    (_, a1, b1), (_, a2, b2) = g.factors
    return (a1, b1) if (a1, b1) == (a2, b2) else None


@part("honeycomb faces", "strings")
def FACES(m: Model) -> tuple[list[tuple[tuple[int, ...], tuple[int, ...]]] | None, str]:
    """The hexagonal faces ``(modes, terms)`` of a root graph that tiles a torus, or why not."""
    pairs = _check_model(m)
    kinds = {}
    for t, g in enumerate(m.strings):
        kind = _bond_kind(g)
        if kind is None:
            return None, f"term {t} ({g}) is not a bond X X, Y Y or Z Z"
        kinds[t] = kind
    root = nx.Graph()
    for t, (a, b) in pairs.items():
        root.add_edge(a, b, term=t)
    if root.number_of_edges() != len(pairs) or not nx.is_connected(root):
        return None, "the root graph is not one simple connected graph"
    for v in root:
        if sorted(kinds[root.edges[v, w]["term"]] for w in root[v]) != sorted(set(kinds.values())):
            return None, "not every Majorana mode has one bond of each of three kinds"
    if len(set(kinds.values())) != 3 or not nx.is_bipartite(root):
        return None, "the root graph is not a bipartite lattice with three bond kinds"
    adj = {v: [(w, root.edges[v, w]["term"]) for w in root[v]] for v in root}
    found: dict[frozenset[int], tuple[tuple[int, ...], tuple[int, ...]]] = {}
    for v in root:
        ends: dict[int, list[tuple[tuple[int, ...], tuple[int, ...]]]] = {}
        for a, t1 in adj[v]:
            for b, t2 in adj[a]:
                if b == v:
                    continue
                for c, t3 in adj[b]:
                    if c not in (v, a):
                        ends.setdefault(c, []).append(((v, a, b, c), (t1, t2, t3)))
        for paths in ends.values():
            for (p1, s1), (p2, s2) in itertools.combinations(paths, 2):
                if {p1[1], p1[2]} & {p2[1], p2[2]}:
                    continue
                terms = s1 + s2[::-1]
                if any(kinds[terms[k]] != kinds[terms[k + 3]] for k in range(3)):
                    continue  # a face has its opposite bonds of one kind
                if len({kinds[t] for t in terms}) == 3:
                    found.setdefault(frozenset(terms), (p1 + (p2[2], p2[1]), terms))
    faces = list(found.values())
    count = {t: 0 for t in pairs}
    for _, terms in faces:
        for t in terms:
            count[t] += 1
    if len(faces) != root.number_of_nodes() // 2 or any(c != 2 for c in count.values()):
        return None, (
            f"the {len(faces)} hexagons found do not tile a closed surface (each bond in two, "
            f"{root.number_of_nodes() // 2} of them)"
        )
    if not _orientable(faces):
        return None, "the hexagons tile a non-orientable surface"
    return faces, ""


def _orientable(faces: Sequence[tuple[tuple[int, ...], tuple[int, ...]]]) -> bool:
    """Whether the faces can be oriented so that each shared bond is run both ways."""
    runs: dict[frozenset[int], list[tuple[int, tuple[int, int]]]] = {}
    for f, (modes, _) in enumerate(faces):
        for k in range(len(modes)):
            a, b = modes[k], modes[(k + 1) % len(modes)]
            runs.setdefault(frozenset((a, b)), []).append((f, (a, b)))
    sign = {0: 1}
    todo = [0]
    while todo:
        f = todo.pop()
        modes = faces[f][0]
        for k in range(len(modes)):
            a, b = modes[k], modes[(k + 1) % len(modes)]
            for g, (x, _) in runs[frozenset((a, b))]:
                if g == f:
                    continue
                want = -sign[f] if x == a else sign[f]  # g must run the bond the other way
                if g not in sign:
                    sign[g] = want
                    todo.append(g)
                elif sign[g] != want:
                    return False
    return len(sign) == len(faces)


def flux_theorem_values(m: Model) -> tuple[dict[WeylString, int] | None, str]:
    """The hexagon strings' eigenvalues that Lieb's flux theorem assigns to the ground state.

    Applies to the Kitaev honeycomb on a torus, recognised from the model itself: every term
    is a bond ``X X``, ``Y Y`` or ``Z Z``; the root graph (the Majorana modes) is connected,
    bipartite, with one bond of each kind at every mode; its hexagons (6-cycles whose opposite
    bonds are of one kind, all three kinds present) tile a closed orientable surface (each bond
    in exactly two hexagons, half as many hexagons as modes); couplings are real and their
    magnitude is the same on all bonds of a kind (translation invariance).  The rule is
    Lieb's: the ground state has flux 0 through faces of length 2 mod 4 (the hexagons), which
    in Majorana form says that the product of ``h_ab`` around every hexagon is negative.
    Lieb proved it for reflection-symmetric lattices; Kitaev applies it to the translation-
    invariant honeycomb with any ``J_x, J_y, J_z`` (the vortex-free ground state).  The two
    loop strings of the torus and the Majorana parity are not fixed by it.  It is not a proof
    for every finite torus: exact diagonalization finds the ground state in these hexagon
    values on the 2 x 3 and 3 x 2 tori, and outside them on the 2 x 2 and 3 x 3 tori
    (``tests/test_majorana.py``).

    Returns
    -------
    values : dict or None
        Hexagon string -> eigenvalue +-1; None when the hypotheses fail.
    reason : str
        Why the theorem does not apply ('' when it does).

    References
    ----------
    E. H. Lieb, Phys. Rev. Lett. 73, 2158 (1994); A. Kitaev, Ann. Phys. 321, 2 (2006).
    """
    pairs = _check_model(m)
    if len(m) == 0:
        return None, "the model has no terms"
    couplings = m.coupling_array()
    if np.iscomplexobj(couplings):
        return None, "complex couplings"
    faces, why = FACES(m)
    if faces is None:
        return None, why
    by_kind: dict[tuple[int, int], list[float]] = {}
    for t, g in enumerate(m.strings):
        kind = _bond_kind(g)
        assert kind is not None
        by_kind.setdefault(kind, []).append(abs(float(couplings[t])))
    for values in by_kind.values():
        if max(values) - min(values) > 1e-12 * max(1.0, max(values)):
            return None, "the coupling magnitudes differ between bonds of one kind"
    strings = m.strings
    out: dict[WeylString, int] = {}
    for modes, terms in faces:
        g, lam = _ordered_product([strings[t] for t in terms])
        mu, rest = _majorana_phase([pairs[t] for t in terms])
        if rest:
            raise AssertionError("a hexagon's bilinears did not multiply to a scalar")
        orient = 1.0
        for k, t in enumerate(terms):
            orient *= 1.0 if pairs[t] == (modes[k], modes[(k + 1) % 6]) else -1.0
        prod_c = float(np.prod([couplings[t] for t in terms]))
        # product of h around the face = prod(c) * prod(u) * orient < 0 (Lieb), and
        # prod(u) * mu = lam * w (sectors): w = prod(u) * mu / lam
        w = -np.sign(prod_c * orient) * mu / lam
        if abs(w.imag) > 1e-12 or abs(abs(w.real) - 1) > 1e-12:
            raise AssertionError("a hexagon's flux came out not +-1")
        out[g] = 1 if w.real > 0 else -1
    return out, ""


# -- spectra --------------------------------------------------------------------------------------
@dataclass(frozen=True)
class _SectorLevels:
    label: tuple[int, ...]
    energies: tuple[np.ndarray, ...]  # per component: e_k (Re e_k >= 0), ascending by |e|
    parity: tuple[int | None, ...]  # per component: required prod s_k, or None
    multiplicity: int
    ground_energy: complex | float

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
        single-particle energies ``e_k`` (``Re e_k >= 0``; real and >= 0 for real couplings),
        the parity constraint ``prod s_k`` (None when free) and the multiplicity of each of
        its levels.
    constant : complex or float
        The model's constant term, in every level.
    error_bound : float
        Estimate of the absolute error of every single-particle energy: ``2 V eps sum_j |c_j|``
        (``sum_j |c_j| >= ||h||_2``; backward stability of the singular value decomposition or
        Householder reduction, a modest factor ``2 V`` for their growth constants, with Weyl's
        inequality), plus,
        for complex couplings, the largest mismatch ``|lambda + lambda'|`` of the eigenvalue
        pairs of the non-normal matrix; an estimate, not a proof.
    selection : str
        How the sectors were chosen (all, given, or how the ground sector was found).
    """

    structure: SectorStructure
    sectors: tuple[_SectorLevels, ...]
    constant: complex | float
    error_bound: float
    selection: str = ""

    @property
    def ground_energy(self) -> complex | float:
        """The lowest level (by real part) over the sectors computed."""
        return _real_if(min((s.ground_energy for s in self.sectors), key=_re) + self.constant)

    @property
    def ground_sector(self) -> tuple[int, ...]:
        """The label of a sector that holds the lowest level."""
        return min(self.sectors, key=lambda s: _re(s.ground_energy)).label

    def quasi_energies(self, sector: int = 0) -> np.ndarray:
        """Single-particle energies of one computed sector (all components), ascending by |e|."""
        parts = self.sectors[sector].energies
        if not parts:
            return np.zeros(0)
        e = np.concatenate(parts)
        return e[np.argsort(np.abs(e), kind="stable")]

    def levels(self, max_modes: int = 22) -> tuple[np.ndarray, np.ndarray]:
        """Every many-body level over the computed sectors: (energies, multiplicities).

        Raises
        ------
        ValueError
            When a sector has more than ``max_modes`` single-particle energies (2^modes levels).
        """
        energies, mult = [], []
        for sec in self.sectors:
            values: np.ndarray = np.zeros(1)
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
                        "quasi_energies": self.quasi_energies(i),
                        "multiplicity": s.multiplicity,
                        "ground_energy": s.ground_energy + self.constant,
                    }
                    for i, s in enumerate(self.sectors)
                ],
                "ground_energy": self.ground_energy,
                "error_bound": self.error_bound,
                "bounds": "estimate (backward-stable decomposition), not a proof",
                "selection": self.selection,
            }
        )


@dataclass(frozen=True)
class FluxSector:
    """The computed sectors of one set of cycle-operator eigenvalues, as one free spectrum.

    All sectors that share the cycle values share the single-particle matrix; they differ
    only in the parity constraints, which are what remains of their labels.

    Attributes
    ----------
    cycle_values : tuple of int
        Eigenvalues of :attr:`SectorStructure.cycle_operators`.
    labels : tuple
        The full labels merged (cycle values, then parity values).
    quasi_energies : ndarray
        Every single-particle energy, sorted by ``|e|``.
    parity_constraints : tuple of (tuple of int, int)
        Positions in ``quasi_energies`` and the product ``prod s_k`` that the levels must have
        over them (levels are ``sum_k s_k e_k``); empty when every choice is a level.
    multiplicity : int
        Multiplicity of every level.
    """

    cycle_values: tuple[int, ...]
    labels: tuple[tuple[int, ...], ...]
    quasi_energies: np.ndarray
    parity_constraints: tuple[tuple[tuple[int, ...], int], ...]
    multiplicity: int

    def __post_init__(self) -> None:
        object.__setattr__(self, "quasi_energies", readonly_array(self.quasi_energies))


def flux_sector(sp: SectorSpectrum) -> FluxSector:
    """Merge computed sectors that share their cycle values into one :class:`FluxSector`.

    Raises
    ------
    ValueError
        When the sectors have different cycle values (different single-particle matrices), or
        their parity values do not form an affine set (not expressible as parity constraints).
    """
    n_cycles = len(sp.structure.cycle_operators)
    patterns = {s.label[:n_cycles] for s in sp.sectors}
    if len(patterns) != 1:
        raise ValueError(
            f"these sectors have {len(patterns)} different sets of cycle values (different "
            "single-particle matrices); one free spectrum holds one of them: give the cycle "
            "values, or use jordan_wigner_spectrum(m, 'all') for the union"
        )
    first = sp.sectors[0]
    if any(s.multiplicity != first.multiplicity for s in sp.sectors):
        raise AssertionError("sectors with one single-particle matrix differ in multiplicity")
    sizes = [len(e) for e in first.energies]
    starts = np.concatenate([[0], np.cumsum(sizes)]).astype(int)
    energies = np.concatenate(first.energies) if sizes else np.zeros(0)
    order = np.argsort(np.abs(energies), kind="stable")
    position = np.empty(len(order), dtype=int)
    position[order] = np.arange(len(order))
    constrained = [c for c, p in enumerate(first.parity) if p is not None]
    allowed = {
        sum(1 << i for i, c in enumerate(constrained) if s.parity[c] == -1) for s in sp.sectors
    }
    constraints = []
    for mask, bit in _affine_equations(allowed, len(constrained)):
        comps = [constrained[i] for i in range(len(constrained)) if mask >> i & 1]
        modes = [int(position[k]) for c in comps for k in range(starts[c], starts[c + 1])]
        constraints.append((tuple(sorted(modes)), -1 if bit else 1))
    return FluxSector(
        next(iter(patterns)),
        tuple(s.label for s in sp.sectors),
        energies[order],
        tuple(constraints),
        first.multiplicity,
    )


def _affine_equations(points: set[int], n: int) -> list[tuple[int, int]]:
    """Equations ``mask . x = bit`` (over GF(2)) whose solutions are exactly ``points``."""
    base = min(points)
    pivots: dict[int, int] = {}  # pivot bit -> reduced difference vector
    for p in points:
        d = p ^ base
        for bit in sorted(pivots, reverse=True):
            if d >> bit & 1:
                d ^= pivots[bit]
        if d:
            top = d.bit_length() - 1
            for bit in list(pivots):  # keep the rows fully reduced
                if pivots[bit] >> top & 1:
                    pivots[bit] ^= d
            pivots[top] = d
    if len(points) != 2 ** len(pivots):
        raise ValueError("the parity values of these sectors are not an affine set")
    equations = []
    for free in range(n):
        if free in pivots:
            continue
        mask = 1 << free
        for bit, row in pivots.items():
            if row >> free & 1:
                mask |= 1 << bit
        equations.append((mask, bin(mask & base).count("1") % 2))
    return equations


def _re(v: complex | float) -> float:
    return float(np.real(v))


def _real_if(v: complex | float) -> complex | float:
    v = complex(v)
    return v.real if v.imag == 0 else v


def _component_levels(e: np.ndarray, parity: int | None) -> np.ndarray:
    """``sum_k s_k e_k`` over sign choices, restricted to ``prod s_k = parity`` when given."""
    signs = np.array(list(itertools.product((-1, 1), repeat=len(e))), dtype=float).reshape(
        -1, len(e)
    )
    if parity is not None:
        signs = signs[np.prod(signs, axis=1) == parity]
    return signs @ e if len(e) else np.zeros(len(signs))


def _canonical(h: np.ndarray) -> tuple[np.ndarray, float]:
    """Energies ``e_k >= 0`` of the real antisymmetric ``h`` and the sign of ``Pf(h) / prod e_k``.

    That sign is ``det Q`` of the normal form ``h = Q (+)[[0, e_k], [-e_k, 0]] Q^T``, since
    ``Pf(Q B Q^T) = det Q Pf(B)``.  Energies below ``10 V eps max|h|`` are set to zero (a zero
    mode: the sign is then irrelevant, both constraints give the same levels).  A matrix whose
    non-zero pattern is bipartite goes through :func:`_canonical_bipartite` (half the size),
    any other through :func:`_canonical_hessenberg`; neither needs a Schur form.
    """
    n = h.shape[0]
    if n == 0:
        return np.zeros(0), 1.0
    tol = 10 * n * _EPS * max(1.0, float(np.abs(h).max()))
    sides = _two_colouring(h)
    if sides is not None:
        e, sign = _canonical_bipartite(h, sides)
        block = h[np.ix_(np.flatnonzero(sides == 0), np.flatnonzero(sides == 1))]
    else:
        e, sign = _canonical_hessenberg(h)
        block = h
    e = np.sort(e)
    tiny = int(np.count_nonzero(e <= tol))
    if tiny and block.shape[0] == block.shape[1]:
        # rounding noise below tol: resolve those modes in extended precision (the matrix is
        # exact); h itself has each e_k twice as a singular value
        per = 2 if sides is None else 1
        refined = _refine_tiny(np.asarray(block, dtype=float), per * tiny)
        if refined is not None:
            e[:tiny] = refined[::per][:tiny]
            return np.sort(e), sign
    e = np.where(e > tol, e, 0.0)
    return e, sign


def _refine_tiny(mat: np.ndarray, count: int) -> np.ndarray | None:
    """The ``count`` smallest singular values of the square real ``mat``, to full relative
    accuracy, or None when the matrix is singular at every precision tried.

    Floating-point SVD resolves singular values only to about ``eps ||mat||`` (absolute), so
    an exponentially small one comes back as rounding noise.  Here inverse subspace iteration
    ``Y <- mat^-1 mat^-T Y`` runs in ball arithmetic (python-flint ``arb_mat``, midpoints kept)
    at a precision raised until the values agree to 60 bits between two precisions; the
    entries of ``mat`` are exact (the couplings' binary values), so only the working
    precision limits the result.

    References
    ----------
    G. H. Golub and C. F. Van Loan, Matrix Computations, 4th ed. (2013), sec. 8.2 (inverse and
    subspace iteration); F. Johansson, IEEE Trans. Comput. 66, 1281 (2017) (Arb).
    """
    n = mat.shape[0]
    old = flint.ctx.prec
    previous: np.ndarray | None = None
    try:
        for prec in (128, 256, 512, 1024, 2048):
            flint.ctx.prec = prec
            a = flint.arb_mat(mat.tolist())
            at = a.transpose()
            rng = np.random.default_rng(count)
            y = flint.arb_mat(rng.standard_normal((n, count)).tolist())
            values: np.ndarray | None = None
            try:
                for _ in range(8):
                    y = a.solve(at.solve(y)).mid()
                    y = _orthonormal(y)
                    ay = a * y
                    gram = (ay.transpose() * ay).mid()
                    mp = mpmath.mp
                    mp.prec = prec
                    small = mpmath.matrix(
                        [
                            [
                                mpmath.mpf(gram[i, j].mid().str(radius=False, more=True))
                                for j in range(count)
                            ]
                            for i in range(count)
                        ]
                    )
                    eig = mpmath.eigsy(small, eigvals_only=True)
                    new = np.sort([float(mpmath.sqrt(max(v, 0))) for v in eig])
                    if values is not None and np.allclose(new, values, rtol=2**-60, atol=0):
                        break
                    values = new
            except ZeroDivisionError:  # singular at this precision
                continue
            if previous is not None and values is not None:
                if np.allclose(values, previous, rtol=2**-50, atol=0):
                    return values
            previous = values
        return None
    finally:
        flint.ctx.prec = old


def _orthonormal(y: Any) -> Any:
    """Gram-Schmidt on the columns of an ``arb_mat`` (midpoints)."""
    rows, cols = y.nrows(), y.ncols()
    columns = [[y[i, j] for i in range(rows)] for j in range(cols)]
    done: list[list[Any]] = []
    for col in columns:
        for q in done:
            dot = sum((a * b for a, b in zip(q, col, strict=True)), flint.arb(0))
            col = [c - dot * v for c, v in zip(col, q, strict=True)]
        norm = sum((c * c for c in col), flint.arb(0)).sqrt()
        done.append([(c / norm).mid() for c in col])
    return flint.arb_mat([[done[j][i] for j in range(cols)] for i in range(rows)])


def _two_colouring(h: np.ndarray) -> np.ndarray | None:
    """Colour 0/1 per mode such that every non-zero ``h_ab`` joins two colours, or None."""
    n = h.shape[0]
    rows, cols = np.nonzero(h)
    graph = scipy.sparse.csr_matrix(h != 0)
    colour = np.full(n, -1)
    for root in range(n):
        if colour[root] >= 0:
            continue
        order, pred = csgraph.breadth_first_order(
            graph, root, directed=False, return_predecessors=True
        )
        colour[root] = 0
        for v in order[1:]:
            colour[v] = 1 - colour[pred[v]]
    if np.any(colour[rows] == colour[cols]):
        return None
    return colour


def _permutation_sign(perm: np.ndarray) -> int:
    """``det`` of the permutation matrix: ``(-1)^(n - number of cycles)``."""
    seen = np.zeros(len(perm), dtype=bool)
    cycles = 0
    for start in range(len(perm)):
        if seen[start]:
            continue
        cycles += 1
        v = start
        while not seen[v]:
            seen[v] = True
            v = perm[v]
    return -1 if (len(perm) - cycles) % 2 else 1


def _canonical_bipartite(h: np.ndarray, colour: np.ndarray) -> tuple[np.ndarray, float]:
    """Energies and Pfaffian sign of ``h = P^T [[0, M], [-M^T, 0]] P`` (a bipartite pattern).

    The energies are the singular values of ``M`` (zeros for the surplus of the larger side),
    and ``Pf([[0, M], [-M^T, 0]]) = (-1)^(m (m - 1) / 2) det M`` for square ``M`` (m x m),
    ``Pf(h) = det P Pf(P h P^T)``; the sign of ``det M`` comes from an LU factorisation.
    """
    n = h.shape[0]
    a = np.flatnonzero(colour == 0)
    b = np.flatnonzero(colour == 1)
    block = h[np.ix_(a, b)]
    import scipy.linalg  # on use: scipy.linalg is slow to import

    sv = scipy.linalg.svdvals(block) if min(len(a), len(b)) else np.zeros(0)
    e = np.concatenate([sv, np.zeros(n // 2 - len(sv))])
    if len(a) != len(b):
        return e, 1.0  # rectangular M: h is singular, the sign is irrelevant
    sign, _ = np.linalg.slogdet(block)
    if sign == 0:
        return e, 1.0
    m = len(a)
    perm = np.concatenate([a, b])
    total = sign * (-1) ** (m * (m - 1) // 2) * _permutation_sign(perm)
    return e, (1.0 if total > 0 else -1.0)


def _canonical_hessenberg(h: np.ndarray) -> tuple[np.ndarray, float]:
    """Energies and Pfaffian sign of a real antisymmetric ``h`` from its Hessenberg form.

    Householder reduction ``h = Q T Q^T`` (LAPACK ``dgehrd``) makes ``T`` antisymmetric
    tridiagonal with off-diagonal ``b_i``; ``+-e_k`` are the eigenvalues of the symmetric
    tridiagonal matrix with zero diagonal and off-diagonal ``|b_i|`` (a diagonal unitary
    similarity of ``i T``), ``Pf(T) = b_0 b_2 b_4 ...`` and ``det Q = (-1)^r`` for ``r``
    non-trivial reflectors (the scheme of M. Wimmer, ACM Trans. Math. Softw. 38, 30 (2012)).
    """
    n = h.shape[0]
    if n == 1:
        return np.zeros(0), 1.0
    import scipy.linalg.lapack  # on use: scipy.linalg is slow to import

    work, info = scipy.linalg.lapack.dgehrd_lwork(n)
    if info != 0:
        raise AssertionError(f"LAPACK dgehrd workspace query failed (info {info})")
    t, tau, info = scipy.linalg.lapack.dgehrd(  # blocked: needs the queried workspace
        np.array(h, dtype=float, order="F"), lwork=max(n, int(work)), overwrite_a=1
    )
    if info != 0:
        raise AssertionError(f"LAPACK dgehrd failed (info {info})")
    b = (np.diagonal(t, 1) - np.diagonal(t, -1)) / 2
    lam = scipy.linalg.eigvalsh_tridiagonal(np.zeros(n), np.abs(b), lapack_driver="stemr")
    e = np.clip(lam[n - n // 2 :], 0.0, None)
    if n % 2:
        return e, 1.0  # no parity constraint for an odd number of modes
    reflectors = int(np.count_nonzero(tau))
    pf_sign = np.prod(np.sign(b[0::2])) * (-1) ** reflectors
    return e, (1.0 if pf_sign >= 0 else -1.0)


def _pfaffian(a: np.ndarray) -> complex:
    """Pfaffian of a complex antisymmetric matrix by Gaussian elimination with pivoting
    (the Parlett-Reid scheme, M. Wimmer, ACM Trans. Math. Softw. 38, 30 (2012))."""
    a = np.array(a, dtype=complex)
    n = a.shape[0]
    if n % 2:
        return 0j
    value = 1 + 0j
    for k in range(0, n - 1, 2):
        p = k + 1 + int(np.argmax(np.abs(a[k + 1 :, k])))
        if p != k + 1:
            a[[k + 1, p], :] = a[[p, k + 1], :]
            a[:, [k + 1, p]] = a[:, [p, k + 1]]
            value = -value
        if a[k + 1, k] == 0:
            return 0j
        value *= a[k, k + 1]
        if k + 2 < n:
            tau = a[k, k + 2 :] / a[k, k + 1]
            col = a[k + 2 :, k + 1].copy()
            a[k + 2 :, k + 2 :] += np.outer(tau, col) - np.outer(col, tau)
    return complex(value)


def _canonical_complex(h: np.ndarray) -> tuple[np.ndarray, float | None, float]:
    """Energies of a complex antisymmetric ``h`` (one of each pair +-e of eigenvalues of
    ``i h``, ``Re e >= 0``), ``det O`` of ``h = O (+)[[0, e], [-e, 0]] O^T`` (None when a zero
    mode makes the parity constraint void) and the largest pair mismatch."""
    n = h.shape[0]
    lam = np.linalg.eigvals(1j * h) if n else np.zeros(0, complex)
    used = np.zeros(n, dtype=bool)
    energies: list[complex] = []
    mismatch = 0.0
    for i in np.argsort(-np.abs(lam), kind="stable"):
        if used[i]:
            continue
        used[i] = True
        free = np.flatnonzero(~used)
        if not len(free):
            break  # odd V: the unpaired zero mode
        j = free[np.argmin(np.abs(lam[free] + lam[i]))]
        used[j] = True
        mismatch = max(mismatch, float(abs(lam[i] + lam[j])))
        e = complex((lam[i] - lam[j]) / 2)
        energies.append(e if (e.real, e.imag) >= (0.0, 0.0) else -e)
    e_arr = np.array(energies, dtype=complex)
    e_arr = e_arr[np.argsort(np.abs(e_arr), kind="stable")]
    if n % 2:
        return e_arr, None, mismatch
    scale = max(1.0, float(np.abs(h).max())) if n else 1.0
    product = complex(np.prod(e_arr)) if len(e_arr) else 1 + 0j
    ratio = _pfaffian(h) / product if abs(product) > 0 else complex("nan")
    if np.isfinite(ratio) and abs(abs(ratio) - 1) < 1e-6 and abs(ratio.imag) < 1e-6:
        return e_arr, (1.0 if ratio.real > 0 else -1.0), mismatch
    if len(e_arr) and float(np.min(np.abs(e_arr))) <= 1e3 * n * _EPS * scale + mismatch:
        return e_arr, None, mismatch  # a zero mode: both parities give the same levels
    raise ValueError(
        "the parity of a sector could not be resolved: the single-particle matrix is too "
        f"ill-conditioned (Pf(h) / prod e = {ratio:.3g}, expected +-1)"
    )


def _ground_of(e: np.ndarray, parity: int | None) -> complex:
    """The level ``sum_k s_k e_k`` of lowest real part with ``prod s_k = parity`` (if given)."""
    if not len(e):
        return 0j
    s = np.where(e.real >= 0, -1.0, 1.0)
    total = complex((s * e).sum())
    if parity is not None and int(np.prod(s)) != parity:
        k = int(np.argmin(np.abs(e.real)))
        total -= 2 * s[k] * complex(e[k])
    return total


def jordan_wigner_spectrum(
    m: Model, sector: str | Sequence[int] | Mapping[WeylString, int] = "all"
) -> SectorSpectrum:
    """Exact free-fermion spectra of a Jordan-Wigner model, sector by sector.

    Parameters
    ----------
    m : Model
        Numeric couplings (real or complex); the frustration graph must be a line graph.
    sector : "all", "ground", a sequence of +-1, or a mapping
        "all": every consistent sector (their union, with multiplicities, is the whole
        spectrum).  "ground": the sectors with the cycle values of the one holding the lowest
        level (by real part; every parity value kept), see Notes.
        A sequence: a label as :attr:`SectorStructure.sectors` lists it (that sector alone),
        or the eigenvalues of the cycle operators only (:attr:`SectorStructure.cycle_operators`,
        in order; every consistent parity assignment kept).  A mapping: conserved strings
        (e.g. plaquettes) to their values; every consistent completion is kept
        (:meth:`SectorStructure.labels_where`).  Values are the integers +1 and -1
        (:meth:`SectorStructure.select` says exactly what is accepted).

    Returns
    -------
    SectorSpectrum

    Raises
    ------
    ValueError
        For a label of the wrong length or not consistent, or too many sectors to enumerate
        (the message lists the valid labels).
    TypeError
        For a choice that is not a string, a sequence of integers or a mapping.
    TooLargeError
        For ``sector="ground"`` when the flux theorem does not apply and there are more than
        ``2^16`` sectors to search.

    Notes
    -----
    In a sector ``H = constant + (i/2) sum_ab h_ab gamma_a gamma_b``.  For real couplings
    ``h`` is real antisymmetric with energies ``e_k >= 0`` (``+-e_k`` its eigenvalues over
    ``i``; singular values of ``M`` when ``h`` has the bipartite form ``[[0, M], [-M^T, 0]]``
    up to a permutation, as on the honeycomb) and ``sign Pf(h)`` fixes the parity.  For
    complex couplings ``h`` is complex antisymmetric: the eigenvalues of ``i h`` come in pairs
    ``+-e_k``, and where ``h = O B O^T`` with ``O`` complex orthogonal the modes ``O^T gamma``
    still obey the Clifford relations, so every level is ``sum_k s_k e_k`` (a non-Hermitian
    ``H``); the parity constraint uses ``det O = Pf(h) / prod_k e_k``.

    ``sector="ground"``: up to ``2^16`` sectors, every one is solved and the lowest kept (an
    exhaustive search: exact, with a progress bar).  Beyond, where
    :func:`flux_theorem_values` applies (the Kitaev honeycomb on a torus with translation-
    invariant real couplings), the hexagon strings are fixed flux-free by Lieb's theorem as
    Kitaev 2006 applies it and the few sectors left (loop strings, parity) are searched; the
    selection text says so, since on small tori that rule can fail.  Otherwise refused.

    References
    ----------
    E. Lieb, T. Schultz and D. Mattis, Ann. Phys. 16, 407 (1961); A. Kitaev, Ann. Phys. 321,
    2 (2006); A. Chapman and S. T. Flammia, Quantum 4, 278 (2020); E. H. Lieb, Phys. Rev. Lett.
    73, 2158 (1994).

    Examples
    --------
    >>> import freeladder as fl
    >>> sp = fl.jordan_wigner_spectrum(fl.parse_model("Z0 Z1 + Z1 Z2 + Z2 Z0"))
    >>> float(sp.ground_energy)     # the frustrated triangle: -1, not the free -3
    -1.0
    """
    struct = sectors(m)
    couplings = m.coupling_array()
    n_cycles = len(struct.cycle_operators)
    if isinstance(sector, str):
        if sector not in ("all", "ground"):
            raise ValueError(
                f"sector must be 'all', 'ground', a tuple of +-1 or a mapping, not {sector!r}; "
                + struct._valid_text()
            )
        if sector == "ground":
            labels, selection = _ground_candidates(m, struct)
        else:
            labels, selection = struct.sectors, f"all {struct.count} sectors"
    else:
        labels = struct.select(sector)
        if isinstance(sector, Mapping):
            selection = f"given values of {len(sector)} conserved string(s)"
        elif len(sector) == n_cycles:
            selection = f"given cycle values {tuple(int(v) for v in sector)}"
        else:
            selection = f"the sector {tuple(int(v) for v in sector)}"
    dim = 2 ** len(m.sites)
    from tqdm.auto import tqdm  # on use

    bar = tqdm(labels, desc="sectors", disable=len(labels) < 256, leave=False)
    solved, mismatch = [], 0.0
    spectra: dict[tuple[int, ...], tuple[tuple[np.ndarray, float | None, float], ...]] = {}
    for label in bar:
        cycles = label[:n_cycles]
        if cycles not in spectra:  # sectors differing only in parity share the matrix
            spectra[cycles] = _component_spectra(struct, couplings, cycles)
        levels, miss = _solve_sector(struct, spectra[cycles], label, dim)
        solved.append(levels)
        mismatch = max(mismatch, miss)
    bar.close()
    # "ground": the flux sector of the lowest level, with its parity values
    if isinstance(sector, str) and sector == "ground":
        best = min(solved, key=lambda s: _re(s.ground_energy)).label[:n_cycles]
        solved = [s for s in solved if s.label[:n_cycles] == best]
    hnorm = float(np.abs(couplings).sum()) if len(couplings) else 0.0
    n_modes = 1 + max((max(p) for p in struct.pairs.values()), default=0)
    constant = _real_if(complex(m.constant)) if m.constant != 0 else 0.0
    bound = 2 * n_modes * _EPS * hnorm + mismatch
    return SectorSpectrum(struct, tuple(solved), constant, bound, selection)


def _ground_candidates(
    m: Model, struct: SectorStructure
) -> tuple[tuple[tuple[int, ...], ...], str]:
    """Labels among which the ground sector lies, and how they were chosen."""
    if struct.rank <= MAX_SECTOR_GENERATORS:
        return struct.sectors, f"exhaustive search over all {struct.count} sectors (exact)"
    values, why = flux_theorem_values(m)
    if values is not None:
        labels = struct.labels_where(values)
        return labels, (
            f"{FLUX_RULE}: {len(values)} hexagon strings fixed, search over the {len(labels)} "
            "sectors left (loop strings, parity); " + FLUX_CAVEAT
        )
    raise TooLargeError(
        f"the ground sector would be searched among 2^{struct.rank} sectors, more than "
        f"2^{MAX_SECTOR_GENERATORS}, and Lieb's flux theorem does not apply here ({why}); "
        "give the sector: a tuple of cycle values or a mapping of conserved strings to +-1"
    )


def _component_spectra(
    struct: SectorStructure, couplings: np.ndarray, cycle_values: tuple[int, ...]
) -> tuple[tuple[np.ndarray, float | None, float], ...]:
    """Per component: energies, ``det`` of the normal form (None: void) and pair mismatch.

    Depends only on the cycle values (they fix the single-particle matrix), not on the
    parity values, so sectors that differ only in parity share one call.
    """
    signs = np.ones(len(couplings))
    for (term, ratio), w in zip(struct._closing, cycle_values, strict=True):
        u = w * ratio
        if abs(u.imag) > 1e-12 or abs(abs(u.real) - 1) > 1e-12:
            raise AssertionError("a closing sign came out not +-1")
        signs[term] = 1.0 if u.real > 0 else -1.0
    out = []
    for comp in struct._components:
        index = {v: i for i, v in enumerate(comp.modes)}
        h = np.zeros((len(comp.modes), len(comp.modes)), dtype=couplings.dtype)
        for t in comp.terms:
            a, b = struct.pairs[t]
            h[index[a], index[b]] += couplings[t] * signs[t]
            h[index[b], index[a]] -= couplings[t] * signs[t]
        if np.iscomplexobj(couplings):
            out.append(_canonical_complex(h))
        else:
            e, det = _canonical(h)
            out.append((e, det, 0.0))
    return tuple(out)


def _solve_sector(
    struct: SectorStructure,
    spectra: tuple[tuple[np.ndarray, float | None, float], ...],
    label: tuple[int, ...],
    dim: int,
) -> tuple[_SectorLevels, float]:
    n_cycles = len(struct.cycle_operators)
    energies, parities = [], []
    irrep = 1
    ground = 0j
    mismatch = 0.0
    for comp, (e, det, miss) in zip(struct._components, spectra, strict=True):
        mismatch = max(mismatch, miss)
        v = len(comp.modes)
        parity: int | None = None
        if comp.parity is not None:
            irrep *= 2 ** (v // 2 - 1)
            # det None: a zero mode, so either constraint gives the same levels
            kappa = label[n_cycles + comp.parity] * struct._parity_phase[comp.parity]
            need = kappa * (1j ** (v // 2)) * (1.0 if det is None else det)
            if abs(need.imag) > 1e-12 or abs(abs(need.real) - 1) > 1e-12:
                raise AssertionError("a parity constraint came out not +-1")
            parity = 1 if need.real > 0 else -1
        else:
            irrep *= 2 ** ((v - 1) // 2)
        ground += _ground_of(e, parity)
        energies.append(e)
        parities.append(parity)
    per_sector = dim // 2**struct.rank
    if per_sector % irrep:
        raise AssertionError("sector dimension is not a multiple of the Majorana irrep")
    levels = _SectorLevels(
        label, tuple(energies), tuple(parities), per_sector // irrep, _real_if(ground)
    )
    return levels, mismatch
