"""Which theorem guarantees a free spectrum, with reasons, or the terms that block it.

:func:`classify` looks at the frustration graph one connected component at a time and reports
the weakest answer over the components, weakest first:

* ``"unsolved"`` -- N = 2: a claw (no theorem applies); N > 2: the exponents do not form a
  dipath orientation of a claw-free graph, so the independent-set charges do not commute with
  H (:mod:`freeladder.graphs.switching`);
* ``"integrable"`` -- claw-free but without a simplicial clique: the charges commute
  (Elman-Chapman-Flammia 2021), a free spectrum is not guaranteed; N > 2: a dipath
  orientation (every induced path directed with one exponent) that is not an oriented
  indifference graph;
* ``"hidden-free"`` -- claw-free with a simplicial clique (Chapman-Elman-Mann 2023; with no
  even hole, Elman-Chapman-Flammia 2021), or for N > 2 the exclusion algebra of reach p or an
  oriented indifference graph (Mann-Elman-Wood-Chapman 2024);
* ``"jordan-wigner"`` -- a line graph (Chapman-Flammia 2020): Majorana bilinears.

Each component, and the whole verdict, carries a :class:`Guarantee`: whether a theorem proves
that the single exclusion polynomial gives the spectrum (exclusion chains; line graphs of
forests; claw-free, even-hole-free graphs, line graphs whose root cycles are odd and
edge-disjoint included), and never when the strings obey a relation that the frustration
graph does not show (:mod:`freeladder.graphs.relations`).  :func:`freeladder.free_spectrum` only
reads it; :func:`guarantee` decides a single exclusion chain without the full classification.

References
----------
A. Chapman and S. T. Flammia, Quantum 4, 278 (2020), arXiv:2003.05465;
S. J. Elman, A. Chapman and S. T. Flammia, Commun. Math. Phys. 388, 969 (2021), arXiv:2012.07857;
A. Chapman, S. J. Elman and R. L. Mann, arXiv:2305.15625 (2023);
F. C. Alcaraz and R. A. Pimenta, Phys. Rev. B 102, 121101(R) (2020), arXiv:2005.14622.
"""

from __future__ import annotations

from collections import deque
from collections.abc import Mapping, Sequence
from dataclasses import dataclass, field, replace
from types import MappingProxyType
from typing import TYPE_CHECKING, Any, Literal

import numpy as np
import scipy.sparse as sps

from ..algebra.model import Model
from ..algebra.printing import format_terms
from ..algebra.strings import WeylString
from ..base import display
from ..base import references as ref
from ..base.cache import part
from ..base.frozen import readonly_array, readonly_mapping
from ..base.interrupt import polled
from ..base.jsonready import json_ready
from .clawfree import (
    HoleSearch,
    OrderCheck,
    check_order,
    find_claw,
    find_even_hole,
    find_simplicial_clique,
)
from .graph import (
    ADJACENCY,
    EXPONENTS,
    ChainStructure,
    chain_from_exponents,
    chain_structure,
)
from .indifference import IndifferenceOrder, level_order, order_from_exponents
from .linegraph import LineGraphRoot, component_root
from .relations import Relation, Relations, find_relations
from .switching import DipathSwitching, dipath_from_exponents

if TYPE_CHECKING:
    import networkx as nx
    import scipy.sparse.csgraph as csgraph
else:
    from ..base.lazy import csgraph
    from ..base.lazy import networkx as nx


__all__ = [
    "KINDS",
    "ComponentVerdict",
    "Guarantee",
    "Verdict",
    "VerdictKind",
    "classify",
    "guarantee",
]

VerdictKind = Literal["unsolved", "integrable", "hidden-free", "jordan-wigner"]
"""The verdict kinds."""

KINDS: tuple[VerdictKind, ...] = ("unsolved", "integrable", "hidden-free", "jordan-wigner")
"""The verdict kinds, weakest first."""

_CLOCK = f"{ref.BAXTER_1989}; {ref.FENDLEY_2014}; {ref.ALCARAZ_PIMENTA_2020}"
_FERMION_CHAIN = f"{ref.FENDLEY_2019}; {ref.ALCARAZ_PIMENTA_2020}"
_PROBE = (
    "No theorem gives the spectrum; fl.verify probes the model exactly (commuting charges, "
    "inversion relation) and reports a witness when an identity fails."
)
_SHOWN_COMPONENTS = 4
_SHOWN_WITNESS = 12


@dataclass(frozen=True)
class Guarantee:
    """Whether a theorem proves that the single exclusion polynomial gives the spectrum.

    When ``proven`` is True, every many-body level is ``constant + sum_k omega^{s_k} eta_k`` with
    independent choices ``s_k`` and ``eta_k^N = 1 / y_k`` over the roots ``y_k`` of the one
    polynomial P, each level with the multiplicity ``dim / N^S`` (see
    :func:`freeladder.free_spectrum`).

    Attributes
    ----------
    proven : bool
    theorem : str
        The theorem that applies (empty when none does).
    reference : str
        Where it is published (from :mod:`freeladder.base.references`); for a refusal, the paper
        that explains what would be needed.
    reason : str
        One or two sentences: what is proven, or why nothing is.
    witness : tuple of int
        Terms that block the theorem (a claw, an even hole, a root-graph cycle, the terms of a
        relation); empty when proven.
    witness_text : str
        The witness terms in the model's text syntax (``"[j] term; ..."``).
    """

    proven: bool
    theorem: str
    reference: str
    reason: str
    witness: tuple[int, ...] = ()
    witness_text: str = ""

    def __str__(self) -> str:
        head = "proven" if self.proven else "NOT GUARANTEED"
        text = f"{head}: {self.reason}"
        if self.witness_text:
            text += f" Witness terms: {self.witness_text}"
        return text

    def to_dict(self) -> dict[str, Any]:
        """JSON-ready fields."""
        return json_ready(
            {
                "proven": self.proven,
                "theorem": self.theorem,
                "reference": self.reference,
                "reason": self.reason,
                "witness": self.witness,
                "witness_text": self.witness_text,
            }
        )


_PENDING = Guarantee(False, "", "", "not examined yet")


@dataclass(frozen=True)
class ComponentVerdict:
    """The verdict on one connected component of the frustration graph.

    Attributes
    ----------
    terms : tuple of int
        The term indices of the component, ascending.
    kind : str
        One of :data:`KINDS`.
    reasons : tuple of str
        Plain sentences naming the theorem and its reference.
    witness : tuple of int
        Terms that block a theorem: a claw ``(centre, leaf, leaf, leaf)``, an even hole in
        cyclic order, or the pair / triple / cycle that breaks the clock-chain pattern.
    majorana_pairs : mapping or None
        Line graphs only: term -> its two Majorana modes ``(a, b)`` (a read-only mapping);
        modes are numbered across the whole model, so components never share a mode.
    cycles : tuple of tuple of int
        Line graphs only: a basis of cycles of the root graph, each as the terms around it.
    simplicial_clique : tuple of int or None
        Hidden-free N = 2 components that are not line graphs.
    even_hole_free : bool or None
        Hidden-free N = 2 components: True, False, or None when the search did not decide.
    even_hole : tuple of int or None
        An even hole, when one was found.
    chain : ChainStructure or None
        For N > 2 chain components (indices of the whole model), and for any single-component
        model that is a chain.
    indifference : IndifferenceOrder or None
        N > 2 components recognised as oriented indifference graphs (not chains).
    dipath : DipathSwitching or None
        N > 2 components that are neither: whether the exponents form a dipath orientation
        (``"integrable"``), or what blocks it and which switching would give one.
    guarantee : Guarantee
        Whether the single polynomial is proven to give this component's spectrum, taking
        into account the relations among the strings that touch the component.
    """

    terms: tuple[int, ...]
    kind: VerdictKind
    reasons: tuple[str, ...]
    witness: tuple[int, ...] = ()
    majorana_pairs: Mapping[int, tuple[int, int]] | None = None
    cycles: tuple[tuple[int, ...], ...] = ()
    simplicial_clique: tuple[int, ...] | None = None
    even_hole_free: bool | None = None
    even_hole: tuple[int, ...] | None = None
    chain: ChainStructure | None = None
    guarantee: Guarantee = _PENDING
    indifference: IndifferenceOrder | None = None
    dipath: DipathSwitching | None = None

    def __post_init__(self) -> None:
        def ints(values: Any) -> tuple[int, ...]:
            if isinstance(values, np.ndarray):
                return tuple(values.astype(np.int64).tolist())
            return tuple(map(int, values))

        fix: dict[str, Any] = {
            "terms": ints(self.terms),
            "reasons": tuple(self.reasons),
            "witness": ints(self.witness),
            "cycles": tuple(ints(c) for c in self.cycles),
        }
        if self.majorana_pairs is not None and not isinstance(
            self.majorana_pairs, MappingProxyType
        ):  # a read-only mapping was normalised when it was made (LineGraphRoot, replace)
            fix["majorana_pairs"] = readonly_mapping(
                {int(t): (int(a), int(b)) for t, (a, b) in self.majorana_pairs.items()}
            )
        for name in ("simplicial_clique", "even_hole"):
            if getattr(self, name) is not None:
                fix[name] = ints(getattr(self, name))
        for name, value in fix.items():
            object.__setattr__(self, name, value)

    def to_dict(self) -> dict[str, Any]:
        """JSON-ready fields (the chain as its order, reach and orientation)."""
        chain = None
        if self.chain is not None:
            chain = {
                "order": self.chain.order,
                "reach": self.chain.reach,
                "orientation": self.chain.orientation,
            }
        return json_ready(
            {
                "terms": self.terms,
                "kind": self.kind,
                "reasons": self.reasons,
                "witness": self.witness,
                "majorana_pairs": self.majorana_pairs,
                "cycles": self.cycles,
                "simplicial_clique": self.simplicial_clique,
                "even_hole_free": self.even_hole_free,
                "even_hole": self.even_hole,
                "chain": chain,
                "guarantee": self.guarantee,
                "indifference": self.indifference,
                "dipath": self.dipath,
            }
        )


@dataclass(frozen=True)
class Verdict:
    """Which theorem (if any) guarantees a free spectrum for a model, and why.

    Attributes
    ----------
    kind : str
        The weakest kind over the components (see :data:`KINDS`).
    reasons : tuple of str
        A summary sentence, then the reasons of the components that decide the kind, then a
        sentence on the relations among the strings when there are any.
    witness : tuple of int
        The witness of the first component of the weakest kind; when that is empty, the terms
        of the first relation among the strings (empty when nothing blocks).
    components : tuple of ComponentVerdict
        One entry per connected component, ordered by smallest term index.
    guarantee : Guarantee
        Whether the single polynomial is proven to give the spectrum of the whole model: only
        when every component is proven.  :func:`freeladder.free_spectrum` reads it.
    relations : Relations
        A basis of the products of terms that are multiples of the identity
        (:func:`freeladder.find_relations`); relations may join several components.
    model : Model
        The model classified (used for printing the witness terms).
    """

    kind: VerdictKind
    reasons: tuple[str, ...]
    witness: tuple[int, ...]
    components: tuple[ComponentVerdict, ...]
    guarantee: Guarantee
    relations: Relations
    model: Model = field(repr=False)

    def to_dict(self) -> dict[str, Any]:
        """JSON-ready fields: kind, reasons, witness, components, guarantee, relations."""
        return json_ready(
            {
                "kind": self.kind,
                "reasons": self.reasons,
                "witness": self.witness,
                "witness_text": self.witness_text(),
                "components": self.components,
                "guarantee": self.guarantee,
                "relations": self.relations,
            }
        )

    # -- structure gathered over components ----------------------------------------------------
    @property
    def majorana_pairs(self) -> dict[int, tuple[int, int]] | None:
        """Term -> Majorana modes, when every component is a line graph; else None."""
        if self.kind != "jordan-wigner":
            return None
        out: dict[int, tuple[int, int]] = {}
        for comp in self.components:
            out.update(comp.majorana_pairs or {})
        return out

    @property
    def root_graph(self) -> nx.Graph | None:
        """The root graph (nodes: Majorana modes; edge attribute ``term``), or None."""
        pairs = self.majorana_pairs
        if pairs is None:
            return None
        root = nx.Graph()
        for term, (a, b) in sorted(pairs.items()):
            root.add_edge(a, b, term=term)
        return root

    @property
    def cycles(self) -> tuple[tuple[int, ...], ...]:
        """All cycles of the root graph (as terms), over the line-graph components."""
        return tuple(c for comp in self.components for c in comp.cycles)

    def cycle_operators(self) -> list[WeylString]:
        """The product of the terms around each root cycle, normalised (squares to one).

        Each commutes with every term of the model (Chapman and Flammia 2020).
        """
        strings = self.model.strings
        out = []
        for cycle in self.cycles:
            prod = strings[cycle[0]]
            for j in cycle[1:]:
                prod = prod * strings[j]
            out.append(prod.normalized()[0])
        return out

    @property
    def simplicial_cliques(self) -> tuple[tuple[int, ...], ...]:
        """The simplicial clique found in each component that has one."""
        return tuple(c.simplicial_clique for c in self.components if c.simplicial_clique)

    @property
    def chain(self) -> ChainStructure | None:
        """The chain structure, when the model is a single exclusion chain."""
        if len(self.components) == 1:
            return self.components[0].chain
        return None

    # -- display ----------------------------------------------------------------------------------
    def for_model(self, m: Model) -> Verdict:
        """The same verdict for a model with the same strings and other couplings.

        The graph theory does not depend on the couplings; only the witness texts, which quote
        the couplings, are written again for ``m``.

        Raises
        ------
        ValueError
            When ``m`` does not share this verdict's strings.
        """
        if m is self.model:
            return self
        if m.strings is not self.model.strings:
            raise ValueError("for_model needs a model with the same strings (with_couplings)")

        def rebound(g: Guarantee) -> Guarantee:
            return replace(g, witness_text=_witness_text(m, g.witness)) if g.witness else g

        components = tuple(replace(c, guarantee=rebound(c.guarantee)) for c in self.components)
        return replace(self, model=m, components=components, guarantee=rebound(self.guarantee))

    def witness_text(self, limit: int = _SHOWN_WITNESS) -> str:
        """The witness terms in the model's text syntax, or an empty string.

        At most ``limit`` terms are written; a longer witness ends with how many it holds.
        """
        if not self.witness:
            return ""
        return _witness_text(self.model, self.witness, limit)

    def __repr__(self) -> str:
        return (
            f"Verdict(kind={self.kind!r}, terms={len(self.model)}, "
            f"components={len(self.components)}, witness={self.witness!r})"
        )

    def witness_terms(self, limit: int | None = None) -> list[tuple[int, str]]:
        """The witness terms as ``(index, text)`` pairs (empty when there is no witness);
        only the first ``limit`` when it is given."""
        return [(j, _term_text(self.model, j)) for j in self.witness[:limit]]

    # -- display (freeladder.base.display) ----------------------------------------------------
    def __str__(self) -> str:
        return display.verdict_text(self)

    def _repr_markdown_(self) -> str:
        return display.verdict_markdown(self)

    def _repr_html_(self) -> str:
        return display.verdict_html(self)


def classify(m: Model) -> Verdict:
    """Decide which published theorem gives ``m`` a free spectrum, or show what blocks it.

    The frustration graph is split into connected components (their terms commute, so the
    spectra add) and each is classified on its own; the overall kind is the weakest.

    For N = 2, per component and in this order: a line graph gives ``"jordan-wigner"`` with the
    root graph, the Majorana pair of each term and the cycle basis; otherwise a claw gives
    ``"unsolved"``; otherwise a simplicial clique gives ``"hidden-free"`` (with the even-hole
    status); otherwise ``"integrable"``.  For N > 2, a component whose terms form the reach-p
    exclusion algebra (any relabelling, either orientation) or an oriented indifference graph
    is ``"hidden-free"``; otherwise one whose exponents form a dipath orientation of a
    claw-free graph is ``"integrable"`` (every charge commutes with H; proof in
    :mod:`freeladder.graphs.switching`), witnessed by the terms that break the chain pattern; any
    other is ``"unsolved"`` with the claw or induced path that blocks, and the switching that
    would give a dipath orientation when one exists.

    Parameters
    ----------
    m : Model

    Returns
    -------
    Verdict

    Notes
    -----
    Costs: line-graph recognition O(n + m) (incremental, see
    :mod:`freeladder.graphs.linegraph`).  A component with an indifference ordering (found by
    breadth-first levels and checked term by term, :func:`freeladder.graphs.clawfree.check_order`)
    is claw-free and chordal with a simplicial clique read off the order, in O(n + m) (Roberts
    1969; Rose, Tarjan and Lueker 1976).  Otherwise: claw search O(n Delta^3); simplicial
    cliques by pruning the maximal cliques; even holes exact for chordal graphs and by a
    budgeted search otherwise (its reason says when it did not decide).

    References
    ----------
    A. Chapman and S. T. Flammia, Quantum 4, 278 (2020);
    S. J. Elman, A. Chapman and S. T. Flammia, Commun. Math. Phys. 388, 969 (2021);
    A. Chapman, S. J. Elman and R. L. Mann, arXiv:2305.15625 (2023);
    R. L. Mann, S. J. Elman, D. R. Wood and A. Chapman, arXiv:2408.09684 (2024);
    F. S. Roberts, in *Proof Techniques in Graph Theory* (Academic Press, 1969);
    D. J. Rose, R. E. Tarjan and G. S. Lueker, SIAM J. Comput. 5, 266 (1976).

    Examples
    --------
    >>> from freeladder import exclusion_chain
    >>> classify(exclusion_chain(6, reach=2)).kind
    'hidden-free'
    """
    if not isinstance(m, Model):
        raise TypeError(f"classify needs a freeladder Model, got {type(m).__name__}")
    # The graph theory depends only on the strings: it is kept with them, so a coupling change
    # (Model.with_couplings) only rewrites the witness texts (Verdict.for_model).
    return VERDICT(m).for_model(m)


@part("verdict", "strings")
def VERDICT(m: Model) -> Verdict:
    """The classification itself (see :func:`classify`), shared by every model with the same
    strings (:meth:`Verdict.for_model` puts in the couplings)."""
    adj = ADJACENCY(m)
    n_terms = len(m)
    if n_terms == 0:
        empty = ("The model has no terms: nothing to solve.",)
        none = Guarantee(
            True, "no terms", "", "The model has no terms: its spectrum is the constant."
        )
        return Verdict("jordan-wigner", empty, (), (), none, find_relations(m), m)
    n_comp, labels = csgraph.connected_components(adj, directed=False)
    order = np.argsort(labels, kind="stable")
    # components in label order, each with its terms ascending
    groups = np.split(order, np.cumsum(np.bincount(labels, minlength=n_comp))[:-1])
    if m.states == 2:
        groups.sort(key=lambda g: int(g[0]))
        neighbours: list[set[int]] = []  # filled only when a component needs the searches
        checked: list[OrderCheck] = []  # filled only when a component is not a line graph
        comps = []
        next_mode = 0
        for g in groups:
            comp, next_mode = _pauli_component(m, adj, neighbours, checked, g, next_mode)
            comps.append(comp)
        whole_chain = chain_structure(m) if n_comp == 1 else None
        if whole_chain is not None:
            comps[0] = _with_chain(comps[0], whole_chain)
    else:
        ex = EXPONENTS(m)
        if n_comp == 1:  # one component: the terms are already in order
            grouped = ex
        else:
            grouped = sps.csr_array(ex[order][:, order])
            grouped.sort_indices()
        comps = []
        start = 0
        for g in groups:
            block = _diagonal_block(grouped, start, start + len(g))
            comps.append(_clock_component(m, g.tolist(), block))
            start += len(g)
        comps.sort(key=lambda c: c.terms[0])
    return _combine(m, comps, find_relations(m))


def guarantee(m: Model) -> Guarantee:
    """Whether a theorem proves that the single exclusion polynomial gives ``m``'s spectrum.

    The same value as ``classify(m).guarantee``; a model that is one exclusion chain is
    decided from its chain structure and the relations among its strings alone, without the
    rest of the classification (linear time).

    Parameters
    ----------
    m : Model

    Returns
    -------
    Guarantee

    References
    ----------
    F. C. Alcaraz and R. A. Pimenta, Phys. Rev. B 102, 121101(R) (2020);
    A. Chapman and S. T. Flammia, Quantum 4, 278 (2020);
    S. J. Elman, A. Chapman and S. T. Flammia, Commun. Math. Phys. 388, 969 (2021).

    Examples
    --------
    >>> from freeladder import parse_model
    >>> guarantee(parse_model("X0 + Z0 Z1 + X1")).proven
    True
    >>> guarantee(parse_model("Z0 Z1 + X1 + Z1 Z2 + X2 + Z0 Z2")).proven
    False
    """
    if not isinstance(m, Model):
        raise TypeError(f"guarantee needs a freeladder Model, got {type(m).__name__}")
    chain = chain_structure(m) if len(m) else None
    if chain is None:
        return classify(m).guarantee
    relations = find_relations(m)
    return _with_relation(m, _chain_guarantee(chain), relations.relations[:1])


# -- guarantees ---------------------------------------------------------------------------


def _chain_guarantee(chain: ChainStructure) -> Guarantee:
    reference = _FERMION_CHAIN if chain.states == 2 else _CLOCK
    return Guarantee(
        True,
        f"exclusion algebra of reach {chain.reach}",
        reference,
        f"The terms form the exclusion algebra of reach {chain.reach}: the roots of the single "
        f"exclusion polynomial give the free spectrum ({reference}).",
    )


def _graph_guarantee(m: Model, comp: ComponentVerdict) -> Guarantee:
    """The theorem that covers one component from its frustration graph alone, or why none."""
    if comp.chain is not None and comp.kind in ("jordan-wigner", "hidden-free"):
        return _chain_guarantee(comp.chain)
    if comp.indifference is not None and comp.kind == "hidden-free":
        return Guarantee(
            True,
            "oriented indifference frustration graph",
            ref.MANN_ELMAN_WOOD_CHAPMAN_2024,
            "The frustration graph is an oriented indifference graph: the roots of the single "
            f"independence polynomial give the free-parafermion spectrum "
            f"({ref.MANN_ELMAN_WOOD_CHAPMAN_2024}).",
        )
    if comp.kind == "jordan-wigner" and not comp.cycles:
        return Guarantee(
            True,
            "line graph of a forest (Jordan-Wigner map)",
            ref.CHAPMAN_FLAMMIA_2020,
            "The frustration graph is the line graph of a forest: the terms are Majorana "
            "bilinears with no cycle symmetry, and the single polynomial gives the spectrum "
            f"({ref.CHAPMAN_FLAMMIA_2020}).",
        )
    if comp.kind == "jordan-wigner":
        even = _even_cycle_block(comp.majorana_pairs or {})
        if not even:
            return Guarantee(
                True,
                "claw-free and even-hole-free frustration graph",
                ref.ELMAN_CHAPMAN_FLAMMIA_2021,
                f"The root graph has {len(comp.cycles)} independent cycle(s), all odd and "
                "edge-disjoint (every block is an edge or an odd cycle), so the line graph is "
                "claw-free and even-hole-free: the single polynomial gives the spectrum "
                f"({ref.ELMAN_CHAPMAN_FLAMMIA_2021}).",
            )
        return _refusal(
            m,
            ref.CHAPMAN_FLAMMIA_2020,
            f"The root graph has {len(comp.cycles)} independent cycle(s), and the witness terms "
            "form a block of it that holds an even cycle (an even hole of the frustration "
            "graph): the products of the terms around the cycles are conserved, and each "
            "sector of these symmetries has its own quadratic form, which one polynomial does "
            f"not capture ({ref.CHAPMAN_FLAMMIA_2020}; {ref.CHAPMAN_ELMAN_MANN_2023}).",
            even,
        )
    if comp.kind == "hidden-free" and comp.even_hole_free:
        return Guarantee(
            True,
            "claw-free and even-hole-free frustration graph",
            ref.ELMAN_CHAPMAN_FLAMMIA_2021,
            "The frustration graph is claw-free and even-hole-free with a simplicial clique: "
            f"the single polynomial gives the spectrum ({ref.ELMAN_CHAPMAN_FLAMMIA_2021}).",
        )
    if comp.kind == "hidden-free" and comp.even_hole is not None:
        return _refusal(
            m,
            ref.CHAPMAN_ELMAN_MANN_2023,
            "The frustration graph is claw-free with a simplicial clique but has an even hole: "
            "the model is free in each symmetry sector, and the sectors may need different "
            f"polynomials ({ref.CHAPMAN_ELMAN_MANN_2023}).",
            comp.even_hole,
        )
    if comp.kind == "hidden-free":
        return _refusal(
            m,
            ref.ELMAN_CHAPMAN_FLAMMIA_2021,
            "The frustration graph is claw-free with a simplicial clique, but whether it has an "
            "even hole was not decided, so the even-hole-free theorem "
            f"({ref.ELMAN_CHAPMAN_FLAMMIA_2021}) cannot be applied.",
            (),
        )
    if comp.kind == "integrable" and comp.dipath is not None:
        return _refusal(
            m,
            ref.MANN_ELMAN_WOOD_CHAPMAN_2024,
            "The exponents form a dipath orientation, so every charge Q^(s) commutes with H "
            "(freeladder.graphs.switching); but the frustration graph is not an oriented "
            "indifference "
            "graph, so no theorem says that one polynomial gives the spectrum "
            f"({ref.MANN_ELMAN_WOOD_CHAPMAN_2024}).",
            comp.witness,
        )
    if comp.kind == "integrable":
        return _refusal(
            m,
            ref.ELMAN_CHAPMAN_FLAMMIA_2021,
            "The frustration graph is claw-free but has no simplicial clique: the charges "
            "commute, but no theorem says that one polynomial gives the spectrum "
            f"({ref.ELMAN_CHAPMAN_FLAMMIA_2021}; {ref.CHAPMAN_ELMAN_MANN_2023}).",
            (),
        )
    if m.states == 2:
        why = (
            "The frustration graph has a claw (one term failing to commute with three mutually "
            "commuting terms): no free-fermion theorem applies "
            f"({ref.ELMAN_CHAPMAN_FLAMMIA_2021}; {ref.CHAPMAN_ELMAN_MANN_2023})."
        )
    else:
        why = (
            "The frustration graph is neither an oriented indifference graph nor a dipath "
            "orientation of a claw-free graph: the independent-set charges do not commute with "
            f"H, and no graph theorem applies ({ref.MANN_ELMAN_WOOD_CHAPMAN_2024})."
        )
    return _refusal(m, "", why, comp.witness)


def _even_cycle_block(pairs: Mapping[int, tuple[int, int]]) -> tuple[int, ...]:
    """Terms of a block of the root graph that holds an even cycle, or ``()`` when none does.

    A graph has no even cycle exactly when each block (biconnected component) is an edge or
    an odd cycle (common practice); an even cycle of the root graph is an even hole of its
    line graph.
    """
    quick = _cycles_of_core(pairs)
    if quick is not None:
        return quick
    root = nx.Graph()
    for term, (a, b) in pairs.items():
        root.add_edge(a, b, term=term)
    for block in nx.biconnected_component_edges(root):
        nodes = {v for edge in block for v in edge}
        if len(block) == 1 or (len(block) == len(nodes) and len(block) % 2 == 1):
            continue
        even = [c for c in nx.cycle_basis(root.edge_subgraph(block)) if len(c) % 2 == 0]
        if even:
            edges = list(zip(even[0], even[0][1:] + even[0][:1], strict=True))
        else:  # odd basis cycles sharing a path: the block holds an even cycle
            edges = list(block)
        return tuple(sorted(int(root.edges[a, b]["term"]) for a, b in edges))
    return ()


def _cycles_of_core(pairs: Mapping[int, tuple[int, int]]) -> tuple[int, ...] | None:
    """:func:`_even_cycle_block` in linear time when the root graph's cycles are disjoint rings.

    Pruning vertices of degree one leaves the 2-core; when every vertex of the core has degree
    two, its components are the cycles and the blocks of the root graph (common practice).
    The answer is then ``()`` when all are odd, and the terms of the one even cycle when there
    is exactly one; None leaves every other case to the general search (so the witness chosen
    among several even blocks stays the same).
    """
    if not pairs:
        return ()
    terms = np.fromiter(pairs.keys(), dtype=np.int64, count=len(pairs))
    ends = np.array(list(pairs.values()), dtype=np.int64).reshape(-1, 2)
    modes, flat = np.unique(ends, return_inverse=True)
    ends = flat.reshape(-1, 2)
    n = len(modes)
    if len(np.unique(ends[:, 0] * n + ends[:, 1])) < len(ends):
        return None  # parallel edges: networkx's simple graph keeps one of them
    degree = np.bincount(ends.ravel(), minlength=n)
    alive = np.ones(len(ends), dtype=bool)
    if np.any(degree == 1):  # prune trees hanging off the cycles, one leaf at a time
        incident: list[list[int]] = [[] for _ in range(n)]
        for e, (a, b) in enumerate(ends.tolist()):
            incident[a].append(e)
            incident[b].append(e)
        left = degree.tolist()
        queue = deque(v for v in range(n) if left[v] == 1)
        while queue:
            v = queue.popleft()
            for e in incident[v]:
                if alive[e]:
                    alive[e] = False
                    for w in ends[e].tolist():
                        left[w] -= 1
                        if left[w] == 1:
                            queue.append(w)
        degree = np.array(left)
    core = np.flatnonzero(alive)
    if not len(core):
        return ()
    if np.any((degree != 0) & (degree != 2)):
        return None
    n_comp, labels = csgraph.connected_components(
        sps.csr_array((np.ones(len(core)), (ends[core, 0], ends[core, 1])), shape=(n, n)),
        directed=False,
    )
    sizes = np.bincount(labels[ends[core, 0]], minlength=n_comp)
    even = np.flatnonzero((sizes > 0) & (sizes % 2 == 0))
    if len(even) == 0:
        return ()
    if len(even) > 1:
        return None
    ring = core[labels[ends[core, 0]] == even[0]]
    return tuple(np.sort(terms[ring]).tolist())


def _refusal(m: Model, reference: str, reason: str, witness: Sequence[int]) -> Guarantee:
    terms = tuple(map(int, witness))
    return Guarantee(False, "", reference, reason, terms, _witness_text(m, terms))


def _with_relation(m: Model, base: Guarantee, touching: Sequence[Relation]) -> Guarantee:
    """``base``, unless a relation among the strings touches the component."""
    if not base.proven or not touching:
        return base
    rel = touching[0]
    return _refusal(
        m,
        base.reference,
        f"The terms {_list(rel.terms)} multiply to a multiple of the identity, "
        f"{rel.text(m)}: a relation the frustration graph does not show. The theorem "
        f"({base.theorem}) assumes none; the relation fixes a symmetry sector and removes "
        "levels the single polynomial predicts, so the free spectrum is not guaranteed.",
        rel.terms,
    )


def _witness_text(m: Model, terms: tuple[int, ...], limit: int = _SHOWN_WITNESS) -> str:
    text = "; ".join(f"[{j}] {_term_text(m, j)}" for j in terms[:limit])
    return text + (f"; ... ({len(terms)} terms in all)" if len(terms) > limit else "")


def _with_guarantees(
    m: Model, comps: Sequence[ComponentVerdict], relations: Relations
) -> list[ComponentVerdict]:
    """Each component with its guarantee; a relation counts for every component it touches."""
    where = np.empty(len(m), dtype=np.int64)
    for i, comp in enumerate(comps):
        where[list(comp.terms)] = i
    touching: dict[int, list[Relation]] = {}
    for rel in relations:
        for i in sorted(set(where[list(rel.terms)].tolist())):
            touching.setdefault(i, []).append(rel)
    return [
        replace(c, guarantee=_with_relation(m, _graph_guarantee(m, c), touching.get(i, [])))
        for i, c in enumerate(comps)
    ]


def _whole_guarantee(comps: Sequence[ComponentVerdict]) -> Guarantee:
    blocking = [c for c in comps if not c.guarantee.proven]
    if blocking:
        first = blocking[0].guarantee
        if len(comps) == 1:
            return first
        prefix = f"Component with terms {_list(blocking[0].terms, 8)}: "
        return replace(first, reason=prefix + first.reason)
    theorems = list(dict.fromkeys(c.guarantee.theorem for c in comps))
    references = list(dict.fromkeys(c.guarantee.reference for c in comps))
    if len(comps) == 1:
        return comps[0].guarantee
    return Guarantee(
        True,
        "; ".join(theorems),
        "; ".join(references),
        f"Each of the {len(comps)} commuting components is covered ({'; '.join(theorems)}), "
        "and no product of terms is a multiple of the identity: the single polynomial "
        "(the product of the components' polynomials) gives the spectrum "
        f"({'; '.join(references)}).",
    )


# -- N = 2 --------------------------------------------------------------


def _pauli_component(
    m: Model,
    adj: sps.csr_array,
    adjacency: list[set[int]],
    checked: list[OrderCheck],
    group: np.ndarray,
    first_mode: int,
) -> tuple[ComponentVerdict, int]:
    """Classify one component; ``adjacency`` (neighbour sets) and ``checked`` (a candidate
    indifference ordering of the whole graph, checked vertex by vertex) are filled on first
    need."""
    terms = group.tolist()
    key = tuple(terms)
    root = component_root(adj, group)
    if isinstance(root, LineGraphRoot):
        return _jordan_wigner(key, root, first_mode), first_mode + root.n_modes
    not_line = (
        f"It is not a line graph: term {root.term} ({_string_text(m, root.term)}) and its "
        f"non-commuting partners among the terms placed before it ({_list(root.partners)}) "
        "admit no pair of Majorana modes, so no Jordan-Wigner-type map exists "
        f"({ref.CHAPMAN_FLAMMIA_2020})."
    )
    if not checked:
        checked.append(check_order(adj, level_order(adj)[0]))
    clique = checked[0].simplicial_clique(group)
    if clique is not None:
        start = int(checked[0].position[group].min())
        shown = checked[0].order[start : start + len(terms)]
        found = (
            f"In the order {_list(shown, 12)} each term's non-commuting partners form a "
            "contiguous block around it, and the order is a perfect elimination ordering "
            "(both checked term by term): the frustration graph is an indifference graph, "
            f"hence claw-free ({ref.ROBERTS_1969}) and chordal ({ref.ROSE_TARJAN_LUEKER_1976}; "
            "proofs in freeladder.graphs.clawfree.check_order). Its first "
            f"term with its partners, {{{_list(clique)}}}, is a simplicial clique (for each "
            "of these terms, its other non-commuting partners all fail to commute with each "
            f"other), so the model is free in each symmetry sector ({ref.CHAPMAN_ELMAN_MANN_2023})."
        )
        holes = HoleSearch(
            True, None, "the order is a perfect elimination ordering, so it has no holes at all"
        )
        return _hidden_free(key, (not_line, found), clique, holes), first_mode
    if not adjacency:
        adjacency.extend(
            set(adj.indices[adj.indptr[v] : adj.indptr[v + 1]].tolist())
            for v in polled(range(adj.shape[0]))
        )
    claw = find_claw(adjacency, terms)
    if claw is not None:
        centre, *leaves = claw
        text = (
            f"Term {centre} ({_string_text(m, centre)}) fails to commute with terms "
            f"{_list(leaves)} ({'; '.join(_string_text(m, j) for j in leaves)}), which commute "
            "with each other: a claw. The frustration graph is not claw-free, so neither "
            f"free-fermion theorem applies ({ref.ELMAN_CHAPMAN_FLAMMIA_2021}; "
            f"{ref.CHAPMAN_ELMAN_MANN_2023})."
        )
        return ComponentVerdict(key, "unsolved", (not_line, text), tuple(claw)), first_mode
    clique = find_simplicial_clique(adjacency, terms)
    if clique is None:
        text = (
            "The frustration graph is claw-free, so the charges Q^(s) commute with each other and "
            f"with H ({ref.ELMAN_CHAPMAN_FLAMMIA_2021}); but it has no simplicial clique "
            "(every maximal clique was pruned to nothing), so a free spectrum is not guaranteed "
            f"({ref.CHAPMAN_ELMAN_MANN_2023})."
        )
        return ComponentVerdict(key, "integrable", (not_line, text)), first_mode
    found = (
        f"It is claw-free and has the simplicial clique {{{_list(clique)}}} (for each of these "
        "terms, its other non-commuting partners all fail to commute with each other), so the "
        f"model is free in each symmetry sector ({ref.CHAPMAN_ELMAN_MANN_2023})."
    )
    holes = find_even_hole(adjacency, terms)
    return _hidden_free(key, (not_line, found), clique, holes), first_mode


def _hidden_free(
    key: tuple[int, ...], found: tuple[str, ...], clique: tuple[int, ...], holes: HoleSearch
) -> ComponentVerdict:
    """A claw-free component with a simplicial clique, and what is known of its even holes."""
    reasons = list(found)
    witness: tuple[int, ...] = ()
    if holes.hole is not None:
        witness = holes.hole
        reasons.append(
            f"It has the even hole {_list(holes.hole)} ({holes.reason}), so the even-hole-free "
            f"theorem ({ref.ELMAN_CHAPMAN_FLAMMIA_2021}) does not apply directly: symmetry "
            "sectors may be needed."
        )
        free = False
    elif holes.decided:
        reasons.append(
            f"It is also even-hole-free ({holes.reason}), so no symmetry sectors are needed "
            f"({ref.ELMAN_CHAPMAN_FLAMMIA_2021})."
        )
        free = True
    else:
        reasons.append(f"Whether it has an even hole was {holes.reason}.")
        free = None
    return ComponentVerdict(
        key,
        "hidden-free",
        tuple(reasons),
        witness,
        simplicial_clique=clique,
        even_hole_free=free,
        even_hole=holes.hole,
    )


def _jordan_wigner(key: tuple[int, ...], root: LineGraphRoot, first_mode: int) -> ComponentVerdict:
    pairs = root.pairs
    if first_mode:
        pairs = {t: (a + first_mode, b + first_mode) for t, (a, b) in pairs.items()}
    cycles = tuple(tuple(c) for c in root.cycles())
    reasons = [
        f"The frustration graph is the line graph of a root graph with {root.n_modes} vertices "
        f"and {len(pairs)} edge{'s' if len(pairs) != 1 else ''}: each term is a Majorana "
        f"bilinear i gamma_a gamma_b on the two ends of its edge ({ref.CHAPMAN_FLAMMIA_2020})."
    ]
    if cycles:
        reasons.append(
            f"The root graph has {len(cycles)} independent cycle{'s' if len(cycles) != 1 else ''}; "
            "the product of the terms around each commutes with H, and each sector of these "
            f"symmetries has its own quadratic form ({ref.CHAPMAN_FLAMMIA_2020})."
        )
    return ComponentVerdict(key, "jordan-wigner", tuple(reasons), (), pairs, cycles)


# -- N > 2 --------------------------------------------------------------


def _diagonal_block(mat: sps.csr_array, lo: int, hi: int) -> sps.csr_array:
    """Rows and columns ``lo:hi`` of a block-diagonal CSR matrix (no entries leave the block)."""
    first, last = int(mat.indptr[lo]), int(mat.indptr[hi])
    return sps.csr_array(
        (mat.data[first:last], mat.indices[first:last] - lo, mat.indptr[lo : hi + 1] - first),
        shape=(hi - lo, hi - lo),
    )


def _clock_component(m: Model, terms: list[int], sub: sps.csr_array) -> ComponentVerdict:
    """Classify one component of a clock model; ``sub`` holds its exponents in ``terms`` order."""
    key = tuple(terms)
    idx = np.array(terms, dtype=np.int64)
    found = chain_from_exponents(sub, m.states)
    if found is not None:
        chain = ChainStructure(_frozen(idx[found.order]), found.reach, found.orientation, m.states)
        return _with_chain(ComponentVerdict(key, "hidden-free", ()), chain)
    oriented = order_from_exponents(sub, m.states)
    if oriented is not None:
        order = IndifferenceOrder(
            tuple(idx[np.asarray(oriented.order, dtype=np.int64)].tolist()),
            oriented.first_neighbour,
            oriented.exponent,
            m.states,
        )
        text = (
            f"The frustration graph is an oriented indifference graph: in the order "
            f"{_list(order.order, 12)} every term's neighbours form a contiguous block and every "
            f"edge points forward with g_a g_b = omega^{order.exponent} g_b g_a, so the spectrum "
            f"is that of free parafermions ({ref.MANN_ELMAN_WOOD_CHAPMAN_2024})."
        )
        return ComponentVerdict(key, "hidden-free", (text,), indifference=order)
    dipath = dipath_from_exponents(sub, m.states, terms)
    if dipath.as_written:
        local, why = _clock_obstruction(sub, m.states)
        witness = tuple(idx[np.asarray(local, dtype=np.int64)].tolist())
        named = [f"{j} ({_string_text(m, j)})" for j in witness[:_SHOWN_WITNESS]]
        if why.count("{}") == len(witness):
            not_free = why.format(*named)
        else:  # one place for a list of terms, summarised when long
            more = len(witness) - len(named)
            not_free = why.format(
                ", ".join(named) + (f", ... ({len(witness)} terms in all)" if more else "")
            )
        text = (
            "The frustration graph is claw-free and its exponents form a dipath orientation "
            "(along every induced path a - v - b, g_a g_v = omega^m g_v g_a and g_v g_b = "
            "omega^m g_b g_v with the same m), so every charge Q^(s) commutes with H "
            f"(proof in freeladder.graphs.switching; {ref.MANN_ELMAN_WOOD_CHAPMAN_2024}); "
            "no term needs "
            "switching, and the orientation is the component's dipath.arcs. It is not an "
            "oriented indifference graph, so a free spectrum is not guaranteed."
        )
        return ComponentVerdict(key, "integrable", (text, not_free, _PROBE), witness, dipath=dipath)
    reasons = [_dipath_obstruction(m, dipath), _PROBE]
    return ComponentVerdict(key, "unsolved", tuple(reasons), dipath.obstruction, dipath=dipath)


def _dipath_obstruction(m: Model, d: DipathSwitching) -> str:
    """A sentence naming the terms that keep the charges from commuting with H."""
    t = [f"{j} ({_string_text(m, j)})" for j in d.obstruction]
    if d.kind == "claw":
        return (
            f"Term {t[0]} fails to commute with terms {', '.join(t[1:])}, which commute with "
            "each other: a claw. Whatever the exponents, a pair of the leaves (in Q^(2)) or all "
            "three (in Q^(3)) fail to commute with H, so the independent-set charges are not "
            "conserved."
        )
    if d.kind == "odd cycle":
        return (
            f"Along the terms {', '.join(t)} the induced paths demand an odd number of "
            "reversals around a cycle: no switching of terms gives a dipath orientation, and "
            "as written some induced path is not directed, so [H, Q^(2)] != 0."
        )
    centre, a, b = t
    e_a = m.strings[d.obstruction[0]].commutation_exponent(m.strings[d.obstruction[1]])
    e_b = m.strings[d.obstruction[0]].commutation_exponent(m.strings[d.obstruction[2]])
    text = (
        f"Terms a = {a} and b = {b} commute, and both fail to commute with term v = {centre}: "
        f"g_v g_a = omega^{e_a} g_a g_v and g_v g_b = omega^{e_b} g_b g_v, whose exponents do "
        "not cancel, so the induced path a - v - b is not directed and the product g_a g_b in "
        "Q^(2) does not commute with H."
    )
    if d.kind == "exponents":
        return text + (
            " No switching of terms (g -> g^-1) repairs it: the two exponents differ by more "
            "than a sign."
        )
    return text + (
        f" Replacing {'term' if len(d.switched) == 1 else 'terms'} {_list(d.switched)} by "
        "the inverse (g -> g^-1, switching in graph terms) would give a dipath orientation, and "
        "that other model would have commuting charges; this one does not."
    )


def _with_chain(comp: ComponentVerdict, chain: ChainStructure) -> ComponentVerdict:
    omega = "omega" if chain.orientation == 1 else "omega^-1"
    text = (
        f"The terms form the exclusion algebra of reach {chain.reach} in the order "
        f"{_list(chain.order, 12)}: g_j g_k = {omega} g_k g_j for j < k <= j + {chain.reach} "
        "along that order, all other pairs commute"
    )
    if chain.states == 2:
        text += f" ({_FERMION_CHAIN})."
    else:
        text += f", so the spectrum is that of free parafermions ({_CLOCK})."
    return ComponentVerdict(
        comp.terms,
        comp.kind,
        (*comp.reasons, text),
        comp.witness,
        comp.majorana_pairs,
        comp.cycles,
        comp.simplicial_clique,
        comp.even_hole_free,
        comp.even_hole,
        chain,
    )


def _first_cycle(edges: Sequence[tuple[int, int]]) -> list[tuple[int, int]] | None:
    """The directed cycle ``networkx.find_cycle(networkx.DiGraph(edges))`` reports, or None.

    The same depth-first search over edges (nodes in order of first appearance, each node's
    out-edges in the order given), on plain lists: linear time without networkx's per-node
    views.
    """
    succ: dict[int, list[int]] = {}
    for a, b in edges:
        succ.setdefault(a, []).append(b)
        succ.setdefault(b, [])
    explored: set[int] = set()
    for start in succ:
        if start in explored:
            continue
        path: list[tuple[int, int]] = []
        seen = {start}
        active = {start}
        previous: int | None = None
        cursor = {start: 0}
        stack = [start]
        while stack:
            node = stack[-1]
            out = succ[node]
            k = cursor.setdefault(node, 0)
            if k == len(out):
                stack.pop()
                continue
            cursor[node] = k + 1
            head = out[k]
            stack.append(head)  # each edge is visited once: it leaves a node once
            if head in explored:
                continue
            if previous is not None and node != previous:  # backtracked
                while True:
                    if not path:
                        active = {node}
                        break
                    active.discard(path.pop()[1])
                    if path and path[-1][1] == node:
                        break
            path.append((node, head))
            if head in active:
                i = next(i for i, (tail, _h) in enumerate(path) if tail == head)
                return path[i:]
            seen.add(head)
            active.add(head)
            previous = head
        explored.update(seen)
    return None


def _clock_obstruction(ex: sps.csr_array, n: int) -> tuple[tuple[int, ...], str]:
    """Terms of a connected clock model that break the exclusion pattern, and a sentence.

    Checked in turn: a pair whose exponent is not +-1; a triangle with cyclic orientation; a term
    with two partners of the same orientation that commute with each other; a directed cycle.
    ``ex`` holds the exponents of the component's terms (numbered 0 .. M-1), N = ``n``.  The
    sentence has one ``{}`` per witness term, or (for a cycle of any length) one ``{}`` for
    the list of them.
    """
    size = int(ex.shape[0])
    rows = np.repeat(np.arange(size), np.diff(ex.indptr))
    cols = ex.indices
    bad = np.nonzero((ex.data != 1) & (ex.data != n - 1))[0]
    if bad.size:
        k = int(bad[0])
        e = int(ex.data[k])
        return (int(rows[k]), int(cols[k])), (
            "Terms {} and {} satisfy g_a g_b = omega^" + str(e) + " g_b g_a; the exclusion "
            "algebra needs omega^1 or omega^-1 for every non-commuting pair."
        )
    forward = [set() for _ in range(size)]  # type: list[set[int]]
    for a, b, e in zip(rows.tolist(), cols.tolist(), ex.data.tolist(), strict=True):
        if e == 1:
            forward[a].add(b)
    for a in range(size):
        for b in forward[a]:
            for c in forward[b]:
                if a in forward[c]:
                    return (a, b, c), (
                        "Terms {}, {} and {} (a, b, c) fail to commute pairwise with a cyclic "
                        "orientation (g_a g_b = omega g_b g_a, g_b g_c = omega g_c g_b, "
                        "g_c g_a = omega g_a g_c): no ordering of them has a single orientation."
                    )
    backward = [set() for _ in range(size)]  # type: list[set[int]]
    for a in range(size):
        for b in forward[a]:
            backward[b].add(a)
    partners = [forward[a] | backward[a] for a in range(size)]
    for a in range(size):
        for side in (forward[a], backward[a]):
            ordered = sorted(side)
            for i, b in enumerate(ordered):
                for c in ordered[i + 1 :]:
                    if c not in partners[b]:
                        return (a, b, c), (
                            "Term {} fails to commute with terms {} and {} with the same "
                            "orientation, but those two commute: in an exclusion chain the "
                            "partners on one side of a term are all within reach of each other."
                        )
    cycle = _first_cycle([(a, b) for a in range(size) for b in forward[a]])
    if cycle is None:
        return (), (
            "The exponents are all omega^+-1 with a consistent orientation, but the non-commuting "
            "pairs do not form the p-th power of a path for any reach p."
        )
    terms = tuple(int(u) for u, _ in cycle)
    return terms, (
        "Terms {} form a cycle of omega-orientations (each fails to commute with the next by "
        "omega), so no ordering of the terms exists."
    )


# -- combining and printing --------------------------------------------------------------


def _combine(m: Model, comps: Sequence[ComponentVerdict], relations: Relations) -> Verdict:
    comps = _with_guarantees(m, comps, relations)
    rank = {k: i for i, k in enumerate(KINDS)}
    kind = min((c.kind for c in comps), key=rank.__getitem__)
    deciding = [c for c in comps if c.kind == kind]
    if len(comps) == 1:
        summary = f"Verdict {kind!r}: the frustration graph of the {len(m)} terms is connected."
    else:
        counts = {k: sum(c.kind == k for c in comps) for k in KINDS}
        listing = ", ".join(f"{v} {k}" for k, v in counts.items() if v)
        summary = (
            f"Verdict {kind!r}, the weakest over {len(comps)} commuting components of the "
            f"frustration graph ({listing})."
        )
    reasons = [summary]
    for c in deciding[:_SHOWN_COMPONENTS]:
        prefix = "" if len(comps) == 1 else f"Component with terms {_list(c.terms, 8)}: "
        reasons += [prefix + r for r in c.reasons]
    if len(deciding) > _SHOWN_COMPONENTS:
        reasons.append(f"... and {len(deciding) - _SHOWN_COMPONENTS} more components of this kind.")
    witness = next((c.witness for c in deciding if c.witness), ())
    if relations.count:
        first = relations.relations[0]
        reasons.append(
            f"The strings obey {relations.count} independent relation"
            f"{'s' if relations.count != 1 else ''} (products of terms that are a multiple of "
            f"the identity), for example {first.text(m)}. The theorems assume none, so a "
            "relation removes the guarantee of every component it touches."
        )
        witness = witness or first.terms
    return Verdict(
        kind, tuple(reasons), tuple(witness), tuple(comps), _whole_guarantee(comps), relations, m
    )


def _frozen(order: np.ndarray) -> np.ndarray:
    return readonly_array(order, dtype=np.int64)


def _string_text(m: Model, j: int) -> str:
    return format_terms([(1, m.strings[j])])


def _term_text(m: Model, j: int) -> str:
    return format_terms([m.term(j)])


def _list(values: Any, limit: int = 10) -> str:
    vals = list(values)
    text = ", ".join(str(int(v)) for v in vals[:limit])
    return text + (", ..." if len(vals) > limit else "")
