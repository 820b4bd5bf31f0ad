"""Section 2 of the Workbench: which theorem applies and why, beside the frustration graph."""

from __future__ import annotations

from typing import Any

import bqplot as bq
import ipywidgets as widgets
import numpy as np

from .adapter import View, term_labels
from .graph_layout import SMALL_GRAPH, graph_layout
from .panel import Host, Section
from .style import ACCENT, INK, SECOND, escape

__all__ = ["BAND_WINDOW", "KIND_WORDS", "VerdictPanel"]

#: A graph drawn as a band shows this many positions of its order at first (the reader pans
#: and zooms to the rest).
BAND_WINDOW = 80

#: The verdict kinds in words (the library's kind names stay visible beside them).
KIND_WORDS = {
    "jordan-wigner": "free fermions: a Jordan-Wigner-type map exists",
    "hidden-free": "free spectrum from the exclusion-rule charges",
    "integrable": "commuting charges, but no theorem gives a free spectrum",
    "unsolved": "no theorem applies",
}
_KIND_MARK = {
    "jordan-wigner": "&#9670;",
    "hidden-free": "&#9670;",
    "integrable": "&#9671;",
    "unsolved": "&#9675;",
}


class VerdictPanel(Section):
    """The verdict in words with its reasons and papers, and the graph with the witness marked.

    A long chain (or any graph above :data:`~freeladder_lab.graph_layout.SMALL_GRAPH` terms) is
    drawn as its band: the terms in chain order along the horizontal axis, which the reader
    can zoom and pan.
    """

    TITLE = "Verdict"
    HINT = "which theorem applies, and why"

    @classmethod
    def attach(cls, host: Host) -> VerdictPanel:
        """The section for ``host``."""
        return cls()

    def __init__(self) -> None:
        self.summary = widgets.HTML(layout=widgets.Layout(width="42%", padding="0 12px 0 0"))
        sx, sy = bq.LinearScale(), bq.LinearScale()
        self._scales = (sx, sy)
        self.edges = bq.Lines(
            x=np.zeros((0, 2)),
            y=np.zeros((0, 2)),
            scales={"x": sx, "y": sy},
            colors=[INK],
            stroke_width=1,
            opacities=[0.55],
        )
        self.vertices = bq.Scatter(
            x=[],
            y=[],
            scales={"x": sx, "y": sy},
            colors=[ACCENT],
            default_size=48,
            stroke="white",
            names=[],
            display_names=False,
            tooltip=bq.Tooltip(fields=["name"], labels=["term"]),
        )
        self.witness = bq.Scatter(
            x=[],
            y=[],
            scales={"x": sx, "y": sy},
            colors=[SECOND],
            marker="square",
            default_size=150,
            stroke=INK,
            fill=False,
            stroke_width=2,
        )
        self.clique = bq.Scatter(
            x=[],
            y=[],
            scales={"x": sx, "y": sy},
            colors=[SECOND],
            marker="diamond",
            default_size=170,
            stroke=INK,
            fill=False,
            stroke_width=2,
        )
        self.labels = bq.Label(
            x=[],
            y=[],
            text=[],
            scales={"x": sx, "y": sy},
            colors=[INK],
            default_size=11,
            x_offset=7,
            y_offset=-7,
        )
        # The title is a label above the figure, not the figure's own title: bqplot draws its
        # toolbar (pan and zoom, reset, save) over the top strip of the figure.
        self.title = widgets.HTML(
            _title_html(
                "frustration graph: one vertex per term, an edge where two terms do not commute"
            ),
            layout=widgets.Layout(margin="0 0 0 8px"),
        )
        self.title.add_class("freeladder-graph-title")
        self.order_axis = bq.Axis(
            scale=sx, label="position in the order", tick_format="d", visible=False
        )
        self.figure = bq.Figure(
            marks=[self.edges, self.clique, self.witness, self.vertices, self.labels],
            axes=[self.order_axis],
            fig_margin={"top": 34, "bottom": 8, "left": 8, "right": 8},
            layout=widgets.Layout(width="100%", height="320px"),
            interaction=bq.PanZoom(scales={"x": [sx]}),
        )
        self._drawn_for: Any = None  # the strings whose graph is on screen
        graph_box = widgets.VBox([self.title, self.figure], layout=widgets.Layout(width="58%"))
        super().__init__([widgets.HBox([self.summary, graph_box])])

    def update(self, view: View) -> None:
        """Show the verdict and draw the graph (laid out only when the strings changed)."""
        a = view.analysis
        v = a.verdict
        self.summary.value = _summary_html(v, len(a.model))
        if a.model.strings is self._drawn_for:
            return  # same strings, same graph: keep the layout
        graph = a.graph
        chain = a.chain
        pos = graph_layout(
            graph, None if chain is None else list(chain.order), 1 if chain is None else chain.reach
        )
        names = term_labels(a.model)
        und = graph.to_undirected(as_view=True) if graph.is_directed() else graph
        pairs = np.array(list(und.edges()), dtype=int).reshape(-1, 2)
        witness = list(v.witness)
        cliques = v.simplicial_cliques
        clique = list(cliques[0]) if cliques else []
        small = len(names) <= SMALL_GRAPH
        band = not small  # drawn as a band: the order along the horizontal axis
        with self.figure.hold_sync():
            self.order_axis.visible = band
            self.figure.fig_margin = {
                "top": 34,
                "bottom": 40 if band else 8,
                "left": 8,
                "right": 8,
            }
            self.edges.x = pos[pairs, 0] if len(pairs) else np.zeros((0, 2))
            self.edges.y = pos[pairs, 1] if len(pairs) else np.zeros((0, 2))
            self.vertices.x, self.vertices.y = pos[:, 0], pos[:, 1]
            _frame(self._scales, pos, labelled=small)
            if band and len(names) > BAND_WINDOW:  # the first terms; pan or zoom for the rest
                self._scales[0].min, self._scales[0].max = -1.0, float(BAND_WINDOW)
            self.vertices.names = [f"{j}: {t}" for j, t in enumerate(names)]
            windowed = band and len(names) > BAND_WINDOW
            self.vertices.default_size = 48 if small else (24 if windowed else 14)
            self.witness.x, self.witness.y = pos[witness, 0], pos[witness, 1]
            self.clique.x, self.clique.y = pos[clique, 0], pos[clique, 1]
            shown = names if small else []
            self.labels.x = pos[: len(shown), 0]
            self.labels.y = pos[: len(shown), 1]
            self.labels.text = shown
            window = (
                f"; terms 0-{BAND_WINDOW - 1} in order shown, drag to pan, scroll to zoom"
                if band and len(names) > BAND_WINDOW
                else ""
            )
            layout_name = (
                "chain order, in a band"
                if chain is not None
                else ("force-directed" if small else "bandwidth-reducing order, in a band")
            ) + window
            self.title.value = _title_html(
                f"frustration graph: {len(names)} terms, {len(pairs)} non-commuting pairs "
                f"({layout_name})"
            )
        self._drawn_for = a.model.strings


def _title_html(text: str) -> str:
    return f'<div style="font-size:13px; color:{INK};">{escape(text)}</div>'


def _summary_html(v: Any, n_terms: int) -> str:
    words = KIND_WORDS.get(v.kind, v.kind)
    mark = _KIND_MARK.get(v.kind, "")
    reasons = "".join(f"<li>{escape(r)}</li>" for r in v.reasons)
    legend = []
    if v.witness:
        legend.append(f"&#9633; open squares mark the witness: terms {escape(v.witness_text())}")
    if v.simplicial_cliques:
        legend.append(
            "&#9671; open diamonds mark a simplicial clique: terms "
            f"{escape(', '.join(str(j) for j in v.simplicial_cliques[0]))}"
        )
    more = "".join(f"<div style='font-size:12px'>{item}</div>" for item in legend)
    return (
        f'<div style="font-size:17px; font-weight:600; color:{INK};">{mark} {escape(words)}</div>'
        f'<div style="font-size:12px; color:#4f5d64;">verdict <code>{escape(v.kind)}</code>'
        f" for {n_terms} terms</div>"
        f'<ul style="margin:4px 0 4px 16px; padding:0; font-size:12.5px; line-height:1.35;">'
        f"{reasons}</ul>{more}"
    )


def _frame(scales: tuple[bq.LinearScale, bq.LinearScale], pos: np.ndarray, labelled: bool) -> None:
    """Fix the scales around the vertices, with room on the right for the term labels."""
    lo, hi = pos.min(axis=0), pos.max(axis=0)
    span = np.maximum(hi - lo, 1e-9)
    right = 0.22 if labelled else 0.04
    scales[0].min, scales[0].max = float(lo[0] - 0.04 * span[0]), float(hi[0] + right * span[0])
    scales[1].min, scales[1].max = float(lo[1] - 0.08 * span[1]), float(hi[1] + 0.1 * span[1])
