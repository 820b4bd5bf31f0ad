"""The directed frustration graph of a clock model, one arrow per non-commuting pair.

For clock strings (N > 2) two terms that fail to commute satisfy ``g_a g_b = omega^m g_b g_a``
with ``m`` in ``1 .. N-1``, and ``g_b g_a = omega^{N-m} g_a g_b``: the pair carries an exponent
and a direction.  Here each pair is drawn once, as ``a -> b`` with the exponent ``m`` read in
that direction, choosing the direction in which ``0 < 2 m < N`` (for N = 3: ``a -> b`` when
``g_a g_b = omega g_b g_a``).  When N is even and ``m = N / 2`` (``omega^m = -1``) the pair has
no direction and is drawn ``a -- b`` with ``a < b``; every pair of a qubit model (N = 2) is such
a pair.  :func:`freeladder.frustration_graph` keeps both ordered pairs instead.

References
----------
A. Chapman and S. T. Flammia, Quantum 4, 278 (2020) (frustration graph);
R. L. Mann, S. J. Elman, D. R. Wood and A. Chapman, arXiv:2408.09684 (2024) (its orientation
for Weyl operators).
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import TYPE_CHECKING, Any

import numpy as np

from ..algebra.model import Model
from ..algebra.printing import format_terms, format_terms_latex
from ..base.jsonready import json_ready
from .graph import EXPONENTS

if TYPE_CHECKING:
    import networkx as nx
else:
    from ..base.lazy import networkx as nx


__all__ = ["DirectedFrustrationGraph", "directed_frustration_graph", "omega_power_text"]

_SHOWN_EDGES = 200


def omega_power_text(m: int, states: int, latex: bool = False) -> str:
    """``omega``, ``omega^2``, ... for the exponent ``m`` (with ``= -1`` when ``2 m = N``)."""
    base = r"\omega" if latex else "omega"
    text = base if m == 1 else (f"{base}^{{{m}}}" if latex else f"{base}^{m}")
    if 2 * m == states:
        text += " = -1"
    return text


@dataclass(frozen=True)
class DirectedFrustrationGraph:
    """The frustration graph with one oriented, labelled edge per non-commuting pair.

    Attributes
    ----------
    states : int
        N.
    labels : tuple of str
        Each term's string in the text syntax (coupling left out).
    latex_labels : tuple of str
        The same in LaTeX.
    edges : tuple of (int, int, int)
        ``(a, b, m)`` with ``g_a g_b = omega^m g_b g_a`` and ``0 < 2 m <= N``; when ``2 m = N``
        the edge has no direction and ``a < b``.  Sorted.
    """

    states: int
    labels: tuple[str, ...]
    latex_labels: tuple[str, ...]
    edges: tuple[tuple[int, int, int], ...]

    def is_directed(self, m: int) -> bool:
        """Whether an edge with exponent ``m`` has a direction (``2 m != N``)."""
        return 2 * m != self.states

    def to_networkx(self) -> nx.DiGraph:
        """A networkx DiGraph: an arc ``a -> b`` per edge with attributes ``exponent`` (m) and
        ``directed``; an edge without direction becomes the two arcs, each with ``m = N / 2``.
        Nodes carry ``label``."""
        g = nx.DiGraph()
        g.add_nodes_from((j, {"label": text}) for j, text in enumerate(self.labels))
        for a, b, m in self.edges:
            directed = self.is_directed(m)
            g.add_edge(a, b, exponent=m, directed=directed)
            if not directed:
                g.add_edge(b, a, exponent=m, directed=False)
        g.graph["states"] = self.states
        return g

    def lines(self) -> list[str]:
        """One line per edge: ``3 -> 7  (omega^2)   Z1 -> X1 Z2``."""
        out = []
        for a, b, m in self.edges:
            arrow = "->" if self.is_directed(m) else "--"
            phase = omega_power_text(m, self.states)
            out.append(f"{a} {arrow} {b}  ({phase})   {self.labels[a]} {arrow} {self.labels[b]}")
        return out

    def __str__(self) -> str:
        head = (
            f"Directed frustration graph, N = {self.states}: {len(self.labels)} terms, "
            f"{len(self.edges)} edges\n(a -> b  (omega^m) means g_a g_b = omega^m g_b g_a)"
        )
        body = self.lines()
        if len(body) > _SHOWN_EDGES:
            body = body[:_SHOWN_EDGES] + [f"... {len(self.edges) - _SHOWN_EDGES} more edges"]
        return "\n".join([head, *body])

    def latex(self) -> str:
        """The edge list as a LaTeX ``array`` (one row per edge, all edges)."""
        rows = [
            r"\text{term } a & & \text{term } b & g_a g_b = \omega^{m} g_b g_a \\ \hline",
        ]
        for a, b, m in self.edges:
            arrow = r"\rightarrow" if self.is_directed(m) else r"-"
            rows.append(
                f"{a}\\;({self.latex_labels[a]}) & {arrow} & {b}\\;({self.latex_labels[b]}) & "
                f"{omega_power_text(m, self.states, latex=True)} \\\\"
            )
        return "\\begin{array}{rcll}\n" + "\n".join(rows) + "\n\\end{array}"

    def _repr_latex_(self) -> str:
        return "$$" + self.latex() + "$$"

    def to_dict(self) -> dict[str, Any]:
        """JSON-ready fields: states, labels, edges as ``[a, b, m, directed]``."""
        return json_ready(
            {
                "states": self.states,
                "labels": self.labels,
                "edges": [[a, b, m, self.is_directed(m)] for a, b, m in self.edges],
            }
        )


def directed_frustration_graph(m: Model) -> DirectedFrustrationGraph:
    """The frustration graph of ``m`` with each edge oriented and labelled by its exponent.

    Parameters
    ----------
    m : Model

    Returns
    -------
    DirectedFrustrationGraph
        Printable as text (``str``), LaTeX (``_repr_latex_``), networkx (``to_networkx``) and
        JSON-ready values (``to_dict``).

    References
    ----------
    R. L. Mann, S. J. Elman, D. R. Wood and A. Chapman, arXiv:2408.09684 (2024).

    Examples
    --------
    >>> import freeladder as fl
    >>> print(directed_frustration_graph(fl.exclusion_chain(3, reach=1, states=3)))
    Directed frustration graph, N = 3: 3 terms, 2 edges
    (a -> b  (omega^m) means g_a g_b = omega^m g_b g_a)
    0 -> 1  (omega)   X0 Z1 -> X1 Z2
    1 -> 2  (omega)   X1 Z2 -> X2 Z3
    """
    if not isinstance(m, Model):
        raise TypeError(f"expected a freeladder Model, got {type(m).__name__}")
    ex = EXPONENTS(m)
    n = m.states
    rows = np.repeat(np.arange(len(m)), np.diff(ex.indptr))
    edges = []
    for a, b, e in zip(rows.tolist(), ex.indices.tolist(), ex.data.tolist(), strict=True):
        e = int(e) % n
        if 0 < 2 * e < n or (2 * e == n and a < b):
            edges.append((int(a), int(b), e))
    strings = m.strings
    labels = tuple(format_terms([(1, strings[j])]) for j in range(len(m)))
    latex_labels = tuple(format_terms_latex([(1, strings[j])]) for j in range(len(m)))
    return DirectedFrustrationGraph(n, labels, latex_labels, tuple(sorted(edges)))
