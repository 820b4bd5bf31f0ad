"""Which theorem guarantees a free spectrum, with reasons, or the terms that block it.

:func:`classify` looks at the frustration graph one connected component at a time and reports
the weakest answer over the components, weakest first:

* ``"unsolved"`` -- N = 2: a claw (no theorem applies); N > 2: not an exclusion chain (no graph
  theorem is known for clock models);
* ``"integrable"`` -- claw-free but without a simplicial clique: the charges commute
  (Elman-Chapman-Flammia 2021), a free spectrum is not guaranteed;
* ``"hidden-free"`` -- claw-free with a simplicial clique (Chapman-Elman-Mann 2023; with no
  even hole, Elman-Chapman-Flammia 2021), or for N > 2 the exclusion algebra of reach p;
* ``"jordan-wigner"`` -- a line graph (Chapman-Flammia 2020): Majorana bilinears.

References
----------
A. Chapman and S. T. Flammia, Quantum 4, 278 (2020), arXiv:2003.05465;
S. J. Elman, A. Chapman and S. T. Flammia, Commun. Math. Phys. 388, 969 (2021), arXiv:2012.07857;
A. Chapman, S. J. Elman and R. L. Mann, arXiv:2305.15625 (2023);
F. C. Alcaraz and R. A. Pimenta, Phys. Rev. B 102, 121101(R) (2020), arXiv:2005.14622.
"""

from __future__ import annotations

import html
from collections.abc import Sequence
from dataclasses import dataclass, field
from typing import Any

import networkx as nx
import numpy as np
import scipy.sparse as sps
import scipy.sparse.csgraph as csgraph

from .clawfree import find_claw, find_even_hole, find_simplicial_clique
from .graph import (
    ChainStructure,
    chain_from_exponents,
    chain_structure,
    commutation_exponents,
    frustration_adjacency,
)
from .linegraph import LineGraphRoot, line_graph_root
from .model import Model
from .printing import format_terms
from .strings import WeylString

__all__ = ["KINDS", "ComponentVerdict", "Verdict", "classify"]

KINDS = ("unsolved", "integrable", "hidden-free", "jordan-wigner")
"""The verdict kinds, weakest first."""

_CF = "A. Chapman and S. T. Flammia, Quantum 4, 278 (2020)"
_ECF = "S. J. Elman, A. Chapman and S. T. Flammia, Commun. Math. Phys. 388, 969 (2021)"
_CEM = "A. Chapman, S. J. Elman and R. L. Mann, arXiv:2305.15625 (2023)"
_AP = "F. C. Alcaraz and R. A. Pimenta, Phys. Rev. B 102, 121101(R) (2020)"
_CLOCK = (
    f"R. J. Baxter, Phys. Lett. A 140, 155 (1989); P. Fendley, J. Phys. A 47, 075001 (2014); {_AP}"
)
_FERMION_CHAIN = f"P. Fendley, J. Phys. A 52, 335002 (2019); {_AP}"
_NO_CLOCK_THEOREM = (
    "Beyond the exclusion algebra, no graph theorem is known for clock models; "
    "use fl.verify to probe numerically."
)
_SHOWN_COMPONENTS = 4


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
    majorana_pairs : dict or None
        Line graphs only: term -> its two Majorana modes ``(a, b)``; modes are numbered across
        the whole model, so components never share a mode.
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
    """

    terms: tuple[int, ...]
    kind: str
    reasons: tuple[str, ...]
    witness: tuple[int, ...] = ()
    majorana_pairs: dict[int, tuple[int, int]] | None = None
    cycles: tuple[tuple[int, ...], ...] = ()
    simplicial_clique: tuple[int, ...] | None = None
    even_hole_free: bool | None = None
    even_hole: tuple[int, ...] | None = None
    chain: ChainStructure | None = None


@dataclass(frozen=True)
class Verdict:
    """Which theorem (if any) guarantees a free spectrum for a model, and why.

    Attributes
    ----------
    kind : str
        The weakest kind over the components (see :data:`KINDS`).
    reasons : tuple of str
        A summary sentence, then the reasons of the components that decide the kind.
    witness : tuple of int
        The witness of the first component of the weakest kind (empty when nothing blocks).
    components : tuple of ComponentVerdict
        One entry per connected component, ordered by smallest term index.
    model : Model
        The model classified (used for printing the witness terms).
    """

    kind: str
    reasons: tuple[str, ...]
    witness: tuple[int, ...]
    components: tuple[ComponentVerdict, ...]
    model: Model = field(repr=False)

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
    def witness_text(self) -> str:
        """The witness terms in the model's text syntax, or an empty string."""
        if not self.witness:
            return ""
        return "; ".join(f"[{j}] {_term_text(self.model, j)}" for j in self.witness)

    def __repr__(self) -> str:
        return (
            f"Verdict(kind={self.kind!r}, terms={len(self.model)}, "
            f"components={len(self.components)}, witness={self.witness!r})"
        )

    def __str__(self) -> str:
        lines = [f"Verdict: {self.kind}"]
        lines += [f"  - {r}" for r in self.reasons]
        if self.witness:
            lines.append(f"  witness: {self.witness_text()}")
        return "\n".join(lines)

    def _repr_markdown_(self) -> str:
        lines = [f"**Verdict: `{self.kind}`** ({len(self.model)} terms, "]
        lines[0] += f"{len(self.components)} component{'s' if len(self.components) != 1 else ''})"
        lines.append("")
        lines += [f"* {r}" for r in self.reasons]
        if self.witness:
            lines.append("")
            lines.append("Witness terms:")
            lines.append("")
            lines += [f"* `[{j}]` `{_term_text(self.model, j)}`" for j in self.witness]
        return "\n".join(lines)

    def _repr_html_(self) -> str:
        esc = html.escape
        n_comp = len(self.components)
        parts = [
            f"<div><b>Verdict: <code>{esc(self.kind)}</code></b> "
            f"({len(self.model)} terms, {n_comp} component{'s' if n_comp != 1 else ''})",
            "<ul>" + "".join(f"<li>{esc(r)}</li>" for r in self.reasons) + "</ul>",
        ]
        if self.witness:
            rows = "".join(
                f"<tr><td>{j}</td><td><code>{esc(_term_text(self.model, j))}</code></td></tr>"
                for j in self.witness
            )
            parts.append(f"<table><tr><th>term</th><th>witness</th></tr>{rows}</table>")
        parts.append("</div>")
        return "".join(parts)


def classify(m: Model) -> Verdict:
    """Decide which published theorem gives ``m`` a free spectrum, or show what blocks it.

    The frustration graph is split into connected components (their terms commute, so the
    spectra add) and each is classified on its own; the overall kind is the weakest.

    For N = 2, per component and in this order: a line graph gives ``"jordan-wigner"`` with the
    root graph, the Majorana pair of each term and the cycle basis; otherwise a claw gives
    ``"unsolved"``; otherwise a simplicial clique gives ``"hidden-free"`` (with the even-hole
    status); otherwise ``"integrable"``.  For N > 2, a component whose terms form the reach-p
    exclusion algebra (any relabelling, either orientation) is ``"hidden-free"``; any other is
    ``"unsolved"`` with the terms that break the pattern.

    Parameters
    ----------
    m : Model

    Returns
    -------
    Verdict

    Notes
    -----
    Costs: line-graph recognition O(n + m) (incremental, see :mod:`freeladder.linegraph`); claw
    search O(n Delta^3); simplicial cliques by pruning the maximal cliques; even holes exact for
    chordal graphs and by a budgeted search otherwise (its reason says when it did not decide).

    References
    ----------
    A. Chapman and S. T. Flammia, Quantum 4, 278 (2020);
    S. J. Elman, A. Chapman and S. T. Flammia, Commun. Math. Phys. 388, 969 (2021);
    A. Chapman, S. J. Elman and R. L. Mann, arXiv:2305.15625 (2023).

    Examples
    --------
    >>> from freeladder import exclusion_chain
    >>> classify(exclusion_chain(6, reach=2)).kind
    'hidden-free'
    """
    if not isinstance(m, Model):
        raise TypeError(f"classify needs a freeladder Model, got {type(m).__name__}")
    adj = frustration_adjacency(m)
    n_terms = len(m)
    if n_terms == 0:
        empty = ("The model has no terms: nothing to solve.",)
        return Verdict("jordan-wigner", empty, (), (), m)
    n_comp, labels = csgraph.connected_components(adj, directed=False)
    order = np.argsort(labels, kind="stable")
    # components in label order, each with its terms ascending
    groups = np.split(order, np.cumsum(np.bincount(labels, minlength=n_comp))[:-1])
    if m.states == 2:
        groups.sort(key=lambda g: int(g[0]))
        neighbours = [
            set(adj.indices[adj.indptr[v] : adj.indptr[v + 1]].tolist()) for v in range(n_terms)
        ]
        comps = []
        next_mode = 0
        for g in groups:
            comp, next_mode = _pauli_component(m, neighbours, [int(v) for v in g], next_mode)
            comps.append(comp)
        whole_chain = chain_structure(m) if n_comp == 1 else None
        if whole_chain is not None:
            comps[0] = _with_chain(comps[0], whole_chain)
    else:
        ex = commutation_exponents(m)
        grouped = sps.csr_array(ex[order][:, order])
        grouped.sort_indices()
        comps = []
        start = 0
        for g in groups:
            block = _diagonal_block(grouped, start, start + len(g))
            comps.append(_clock_component(m, [int(v) for v in g], block))
            start += len(g)
        comps.sort(key=lambda c: c.terms[0])
    return _combine(m, comps)


# -- N = 2 --------------------------------------------------------------


def _pauli_component(
    m: Model, adjacency: list[set[int]], terms: list[int], first_mode: int
) -> tuple[ComponentVerdict, int]:
    key = tuple(terms)
    root = line_graph_root(adjacency, terms)
    if isinstance(root, LineGraphRoot):
        return _jordan_wigner(key, root, first_mode), first_mode + root.n_modes
    not_line = (
        f"It is not a line graph: term {root.term} ({_string_text(m, root.term)}) and its "
        f"non-commuting partners among the terms placed before it ({_list(root.partners)}) "
        "admit no pair of Majorana modes, so no Jordan-Wigner-type map exists "
        f"({_CF})."
    )
    claw = find_claw(adjacency, terms)
    if claw is not None:
        centre, *leaves = claw
        text = (
            f"Term {centre} ({_string_text(m, centre)}) fails to commute with terms "
            f"{_list(leaves)} ({'; '.join(_string_text(m, j) for j in leaves)}), which commute "
            "with each other: a claw. The frustration graph is not claw-free, so neither "
            f"free-fermion theorem applies ({_ECF}; {_CEM})."
        )
        return ComponentVerdict(key, "unsolved", (not_line, text), tuple(claw)), first_mode
    clique = find_simplicial_clique(adjacency, terms)
    if clique is None:
        text = (
            "The frustration graph is claw-free, so the charges Q^(s) commute with each other and "
            f"with H ({_ECF}); but it has no simplicial clique (every maximal clique was pruned "
            f"to nothing), so a free spectrum is not guaranteed ({_CEM})."
        )
        return ComponentVerdict(key, "integrable", (not_line, text)), first_mode
    reasons = [
        not_line,
        f"It is claw-free and has the simplicial clique {{{_list(clique)}}} (for each of these "
        "terms, its other non-commuting partners all fail to commute with each other), so the "
        f"model is free in each symmetry sector ({_CEM}).",
    ]
    holes = find_even_hole(adjacency, terms)
    witness: tuple[int, ...] = ()
    if holes.hole is not None:
        witness = holes.hole
        reasons.append(
            f"It has the even hole {_list(holes.hole)} ({holes.reason}), so the even-hole-free "
            f"theorem ({_ECF}) does not apply directly: symmetry sectors may be needed."
        )
        free = False
    elif holes.decided:
        reasons.append(
            f"It is also even-hole-free ({holes.reason}), so no symmetry sectors are needed "
            f"({_ECF})."
        )
        free = True
    else:
        reasons.append(f"Whether it has an even hole was {holes.reason}.")
        free = None
    comp = ComponentVerdict(
        key,
        "hidden-free",
        tuple(reasons),
        witness,
        simplicial_clique=clique,
        even_hole_free=free,
        even_hole=holes.hole,
    )
    return comp, first_mode


def _jordan_wigner(key: tuple[int, ...], root: LineGraphRoot, first_mode: int) -> ComponentVerdict:
    pairs = {t: (a + first_mode, b + first_mode) for t, (a, b) in root.pairs.items()}
    cycles = tuple(tuple(c) for c in root.cycles())
    reasons = [
        f"The frustration graph is the line graph of a root graph with {root.n_modes} vertices "
        f"and {len(pairs)} edge{'s' if len(pairs) != 1 else ''}: each term is a Majorana "
        f"bilinear i gamma_a gamma_b on the two ends of its edge ({_CF})."
    ]
    if cycles:
        reasons.append(
            f"The root graph has {len(cycles)} independent cycle{'s' if len(cycles) != 1 else ''}; "
            "the product of the terms around each commutes with H, and each sector of these "
            f"symmetries has its own quadratic form ({_CF})."
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
    local, why = _clock_obstruction(sub, m.states)
    witness = tuple(int(idx[j]) for j in local)
    text = why.format(*(f"{j} ({_string_text(m, j)})" for j in witness))
    return ComponentVerdict(key, "unsolved", (text, _NO_CLOCK_THEOREM), witness)


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


def _clock_obstruction(ex: sps.csr_array, n: int) -> tuple[tuple[int, ...], str]:
    """Terms of a connected clock model that break the exclusion pattern, and a sentence.

    Checked in turn: a pair whose exponent is not +-1; a triangle with cyclic orientation; a term
    with two partners of the same orientation that commute with each other; a directed cycle.
    ``ex`` holds the exponents of the component's terms (numbered 0 .. M-1), N = ``n``.  The
    sentence has one ``{}`` per witness term.
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
    digraph = nx.DiGraph((a, b) for a in range(size) for b in forward[a])
    try:
        cycle = nx.find_cycle(digraph)
    except nx.NetworkXNoCycle:
        return (), (
            "The exponents are all omega^+-1 with a consistent orientation, but the non-commuting "
            "pairs do not form the p-th power of a path for any reach p."
        )
    terms = tuple(int(u) for u, _ in cycle)
    return terms, (
        "Terms " + ", ".join("{}" for _ in terms) + " form a cycle of omega-orientations "
        "(each fails to commute with the next by omega), so no ordering of the terms exists."
    )


# -- combining and printing --------------------------------------------------------------


def _combine(m: Model, comps: Sequence[ComponentVerdict]) -> Verdict:
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
    return Verdict(kind, tuple(reasons), tuple(witness), tuple(comps), m)


def _frozen(order: np.ndarray) -> np.ndarray:
    out = np.ascontiguousarray(order, dtype=np.int64)
    out.setflags(write=False)
    return out


def _string_text(m: Model, j: int) -> str:
    return format_terms([(1, m.strings[j])])


def _term_text(m: Model, j: int) -> str:
    return format_terms([m.term(j)])


def _list(values: Any, limit: int = 10) -> str:
    vals = [int(v) for v in values]
    text = ", ".join(str(v) for v in vals[:limit])
    return text + (", ..." if len(vals) > limit else "")
