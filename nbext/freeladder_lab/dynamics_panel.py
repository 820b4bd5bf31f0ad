"""Section 7 of the Workbench: the edge operator in time, exact through the hidden modes.

The infinite-temperature autocorrelation ``Tr[chi(t)^dagger chi(0)] / dim`` of the edge
operator, summed over the modes by :func:`freeladder.autocorrelation`, drawn against time on a
logarithmic axis (a slow edge mode shows as a plateau, drawn as a dashed line at its weight),
beside the spectral weights of the modes against their frequencies.  It is computed on demand:
the button runs it in the Workbench's worker for the model on screen.

References
----------
P. Fendley, J. Phys. A 52, 335002 (2019) (the edge operator and the modes); J. Kemp, N. Y. Yao,
C. R. Laumann and P. Fendley, J. Stat. Mech. (2017) 063105 (the edge-spin plateau).
"""

from __future__ import annotations

from typing import Any

import bqplot as bq
import ipywidgets as widgets
import numpy as np

from .adapter import View, edge_dynamics
from .panel import Host, Section
from .style import ACCENT, MUTED, SECOND, WARN, escape, nice_ticks, number_text

__all__ = ["DynamicsPanel"]


class DynamicsPanel(Section):
    """A button, the autocorrelation against log time with its plateau, and the weights."""

    TITLE = "Dynamics"
    HINT = "the edge operator in time, through the modes (on demand)"
    WIDTH = "full"

    @classmethod
    def attach(cls, host: Host) -> DynamicsPanel:
        """The section for ``host``."""
        return cls(host)

    def __init__(self, host: Host) -> None:
        self._host = host
        self.button = widgets.Button(
            description="Evolve the edge",
            tooltip="the edge operator's autocorrelation at infinite temperature, from the modes",
            icon="line-chart",
            layout=widgets.Layout(width="180px"),
        )
        self.button.on_click(lambda _: self.run())
        sx, sy = bq.LogScale(), bq.LinearScale()
        self.curve = bq.Lines(x=[], y=[], scales={"x": sx, "y": sy}, colors=[ACCENT])
        self.plateau = bq.Lines(
            x=[], y=[], scales={"x": sx, "y": sy}, colors=[SECOND], line_style="dashed"
        )
        self.trace = bq.Figure(
            marks=[self.curve, self.plateau],
            axes=[
                bq.Axis(scale=sx, label="time t (log scale)", tick_format=".0e"),
                bq.Axis(scale=sy, label="Re C(t)", orientation="vertical", tick_format=".2~f"),
            ],
            title="edge autocorrelation C(t) (dashed: plateau)",
            title_style={"font-size": "14px"},
            fig_margin={"top": 36, "bottom": 44, "left": 60, "right": 16},
            layout=widgets.Layout(width="58%", height="300px"),
            interaction=bq.PanZoom(scales={"x": [sx], "y": [sy]}),
        )
        # The weights and frequencies span many decades on long chains: their logarithms are
        # drawn on linear axes (clean ticks at every range; the axis labels say log10).
        wx, wy = bq.LinearScale(), bq.LinearScale()
        self._weight_x = bq.Axis(scale=wx, label="log10 |eta_k|", tick_format=".3~g")
        self._weight_y = bq.Axis(
            scale=wy,
            label="log10 weight",
            orientation="vertical",
            tick_format=".3~g",
            label_offset="46px",
        )
        self.weights = bq.Scatter(
            x=[],
            y=[],
            scales={"x": wx, "y": wy},
            colors=[ACCENT],
            default_size=24,
            names=[],
            display_names=False,
            tooltip=bq.Tooltip(fields=["name"], labels=["mode"]),
        )
        self.spectral = bq.Figure(
            marks=[self.weights],
            axes=[self._weight_x, self._weight_y],
            title="spectral weights of the modes",
            title_style={"font-size": "14px"},
            fig_margin={"top": 36, "bottom": 44, "left": 60, "right": 16},
            layout=widgets.Layout(width="42%", height="300px"),
            interaction=bq.PanZoom(scales={"x": [wx], "y": [wy]}),
        )
        self.trace.add_class("freeladder-dynamics-trace")
        self.summary = widgets.HTML("<i>Not run yet for this model.</i>")
        self.figures = widgets.HBox([self.trace, self.spectral])
        self.figures.layout.display = "none"
        super().__init__([self.button, self.figures, self.summary])

    def update(self, view: View) -> None:
        """A new model or new couplings: the last curve no longer applies."""
        self.figures.layout.display = "none"
        self.summary.value = "<i>Not run yet for this model.</i>"

    def run(self) -> None:
        """Compute the autocorrelation of the model on screen in the worker, then draw it."""
        view = self._host.shown()
        if view is None:
            return
        self.summary.value = "<i>evolving the edge operator ...</i>"
        self._host.submit(
            "dynamics", "evolving the edge", lambda: edge_dynamics(view.analysis), self.show
        )

    def show(self, result: Any) -> None:
        """Draw an :class:`~freeladder.Autocorrelation`, or say why there is none."""
        if isinstance(result, str):
            self.figures.layout.display = "none"
            self.summary.value = (
                f"<span style='color:{WARN}'>No expansion of the edge operator in the modes: "
                f"{escape(result)}</span>"
            )
            return
        t = np.asarray(result.times, float)[1:]
        values = np.asarray(result.values, complex)[1:]
        e = result.expansion
        eta = np.abs(np.asarray(e.quasi_energies, complex))
        w = np.abs(np.asarray(e.weights, complex))
        keep = (eta > 0) & (w > 0) & np.isfinite(eta) & np.isfinite(w)
        plateau = complex(result.plateau)
        with self.trace.hold_sync():
            self.curve.x, self.curve.y = t, values.real
            self.plateau.x, self.plateau.y = [t[0], t[-1]], [plateau.real, plateau.real]
        with self.spectral.hold_sync():
            lx, ly = np.log10(eta[keep]), np.log10(w[keep])
            self.weights.x, self.weights.y = lx, ly
            for axis, values in ((self._weight_x, lx), (self._weight_y, ly)):
                if len(values):  # round ticks (bqplot's own split the range into odd values)
                    lo, hi = float(values.min()), float(values.max())
                    pad = max(0.05 * (hi - lo), 0.05)
                    axis.scale.min, axis.scale.max = lo - pad, hi + pad
                    axis.tick_values = nice_ticks(lo - pad, hi + pad, 5)
            self.weights.names = [
                f"k = {k + 1}: |eta| = {number_text(a)}, weight {number_text(b)}"
                for k, (a, b) in enumerate(zip(eta, w, strict=True))
                if keep[k]
            ]
        self.figures.layout.display = ""
        growth = float(result.max_growth_rate)
        lines = [
            f"operator <code>{escape(result.operator)}</code>; plateau (zero-mode weight) "
            f"{escape(number_text(plateau))}",
            f"slowest mode: |eta| = {escape(number_text(eta.min() if len(eta) else 0.0))}; "
            f"largest weight error {escape(number_text(float(np.max(result.errors))))}",
        ]
        if growth > 0:
            lines.append(
                f"<span style='color:{WARN}'>non-Hermitian: terms grow as exp({number_text(growth)}"
                " t); the curve shows them</span>"
            )
        if np.any(np.abs(values.imag) > 1e-9 * max(1.0, float(np.max(np.abs(values))))):
            lines.append(
                f"<span style='color:{MUTED}'>C(t) is complex; its real part is drawn</span>"
            )
        self.summary.value = "<br>".join(lines)
