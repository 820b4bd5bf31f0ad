"""Section 4 of the Workbench: the roots y_k of P and the quasi-energies eta_k, with bounds.

References
----------
P. Fendley, J. Phys. A 52, 335002 (2019) (eta_k^N = 1 / y_k for N = 2);
F. C. Alcaraz and R. A. Pimenta, Phys. Rev. B 102, 121101(R) (2020) (general N, the N-fold star).
"""

from __future__ import annotations

from typing import Any

import bqplot as bq
import ipywidgets as widgets
import numpy as np

from .adapter import Outcome, SectorRow, View, star_points
from .panel import Host, Section
from .style import (
    ACCENT,
    INK,
    MUTED,
    SECOND,
    WARN,
    complex_plane,
    escape,
    magnitude_plot,
    number_text,
    origin_guides,
    spans_decades,
)

__all__ = ["RootsPanel"]


class RootsPanel(Section):
    """Two complex planes (roots y_k; quasi-energies eta_k and their N-fold star) and a summary.

    Where the values span decades (long chains: the roots run from about 1 to 10^7), the
    planes give way to plots of |y_k| and |eta_k| against k on logarithmic axes (the axis
    labels say so); every plot zooms (drag to pan, scroll to zoom).
    """

    TITLE = "Roots and quasi-energies"
    HINT = "hover a point for its bound"

    @classmethod
    def attach(cls, host: Host) -> RootsPanel:
        """The section for ``host``."""
        return cls(host)

    def __init__(self, host: Host) -> None:
        self._host = host
        self._quiet = False  # True while update() sets the sector chooser
        self.unproven = widgets.Checkbox(
            False,
            description="show unproven numbers (no theorem backs them; marked as such)",
            style={"description_width": "initial"},
            layout=widgets.Layout(width="auto"),
        )
        self.sector = widgets.Dropdown(
            options=[("-", None)],
            value=None,
            description="sector",
            tooltip="Jordan-Wigner models with cycles: which sector of the conserved cycle "
            "strings to solve",
            layout=widgets.Layout(width="620px", display="none"),
        )
        self.sectors_table = widgets.HTML()
        self.refusal = widgets.HTML()
        self.summary = widgets.HTML()
        self.root_figure, sx, sy, self.root_guides = complex_plane(
            "roots y_k of P(y)", "Re y", "Im y"
        )
        self.real_axis = bq.Lines(
            x=[0.0, 0.0],
            y=[0.0, 0.0],
            scales={"x": sx, "y": sy},
            colors=[ACCENT],
            stroke_width=5,
            opacities=[0.35],
        )
        self.roots = bq.Scatter(
            x=[],
            y=[],
            scales={"x": sx, "y": sy},
            colors=[ACCENT],
            default_size=64,
            names=[],
            display_names=False,
            tooltip=bq.Tooltip(fields=["name"], labels=["root"]),
        )
        self.root_figure.marks = [*self.root_figure.marks, self.real_axis, self.roots]
        self.eta_figure, ex, ey, self.eta_guides = complex_plane(
            "quasi-energies eta_k (filled) and omega^s eta_k (open)", "Re eta", "Im eta"
        )
        self.star = bq.Scatter(
            x=[],
            y=[],
            scales={"x": ex, "y": ey},
            colors=[MUTED],
            fill=False,
            stroke=SECOND,
            default_size=40,
            names=[],
            display_names=False,
            tooltip=bq.Tooltip(fields=["name"], labels=["omega^s eta"]),
        )
        self.eta = bq.Scatter(
            x=[],
            y=[],
            scales={"x": ex, "y": ey},
            colors=[ACCENT],
            default_size=64,
            marker="diamond",
            names=[],
            display_names=False,
            tooltip=bq.Tooltip(fields=["name"], labels=["quasi-energy"]),
        )
        self.eta_figure.marks = [*self.eta_figure.marks, self.star, self.eta]
        self.root_spread, self.root_magnitudes = magnitude_plot(
            "|y_k| of the roots (log scale)", "|y_k| (log scale)"
        )
        self.eta_spread, self.eta_magnitudes = magnitude_plot(
            "|eta_k| of the quasi-energies (log scale)", "|eta_k| (log scale)"
        )
        self.logarithmic = False  # whether the magnitude plots are shown
        for fig in (self.root_figure, self.root_spread):
            fig.add_class("freeladder-roots-figure")
        for fig in (self.root_figure, self.eta_figure, self.root_spread, self.eta_spread):
            fig.layout.width = "50%"
        self.plots = widgets.HBox(
            [self.root_figure, self.eta_figure], layout=widgets.Layout(width="100%")
        )
        super().__init__(
            [self.unproven, self.sector, self.refusal, self.sectors_table, self.plots, self.summary]
        )
        self.unproven.observe(lambda change: host.recompute(), "value")
        self.sector.observe(self._sector_chosen, "value")

    def options(self) -> dict[str, Any]:
        """What the reader chose here: unproven numbers, and the sector."""
        return {"unproven": bool(self.unproven.value), "sector": self.sector.value}

    def _sector_chosen(self, change: dict[str, Any]) -> None:
        if not self._quiet:
            self._host.recompute()

    def update(self, view: View) -> None:
        """Offer the sectors, then show the spectrum's roots and quasi-energies, or the
        library's refusal."""
        self._quiet = True
        try:
            self._show_sector_choices(view.choices, view.choice)
        finally:
            self._quiet = False
        self._show(view.outcome, view.real_reason)

    def _show_sector_choices(self, options: list[tuple[str, Any]] | None, value: Any) -> None:
        """Offer the sectors (hidden for models without cycle strings)."""
        if options is None:
            self.sector.options = [("-", None)]
            self.sector.value = None
            self.sector.layout.display = "none"
            return
        if list(self.sector.options) != options:
            self.sector.options = options
        self.sector.value = value
        self.sector.layout.display = ""

    def _show(self, shown: Outcome, real_reason: str | None) -> None:
        self.sectors_table.value = _sector_rows(shown.sectors) if shown.sectors else ""
        spectrum = shown.spectrum
        if spectrum is None:
            self.refusal.value = (
                f'<div role="alert" style="color:{WARN}; border-left:4px solid {WARN};'
                f' padding-left:8px;"><b>&#9888; No free spectrum is claimed.</b> '
                f"{escape(shown.refusal)}<br>Tick the box above to see the numbers the "
                "single polynomial would give, marked as unproven.</div>"
            )
            self.summary.value = ""
            self._clear()
            return
        guaranteed = shown.guaranteed
        self.refusal.value = (
            ""
            if guaranteed
            else f'<div role="alert" style="color:{WARN}; font-weight:600;">&#9888; UNPROVEN '
            "numbers: no theorem guarantees that this polynomial gives the spectrum; compare "
            "with exact diagonalization in the ladder and checks sections.</div>"
        )
        roots = np.asarray(spectrum.roots, complex)
        eta = np.asarray(spectrum.quasi_energies, complex)
        bounds = np.asarray(spectrum.error_bounds, float)
        star = star_points(spectrum)
        tag = "" if guaranteed else " [UNPROVEN]"
        if shown.sector is not None:  # no polynomial: the Majorana energies, as y_k = 1 / e_k^2
            real_reason = None
            tag = " [one sector, y_k = 1/e_k^2]"
        roots = np.where(np.isfinite(roots), roots, 0)  # zero modes (y infinite) at the origin
        root_names = [
            f"y_{k} = {number_text(y)}; eta_{k} = {number_text(e)} ± {b:.2g}{tag}"
            for k, (y, e, b) in enumerate(zip(roots, eta, bounds, strict=True), start=1)
        ]
        eta_names = [
            f"eta_{k} = {number_text(e)} ± {b:.2g}{tag}"
            for k, (e, b) in enumerate(zip(eta, bounds, strict=True), start=1)
        ]
        self.logarithmic = spans_decades(roots) or spans_decades(eta)
        if self.logarithmic:
            self.plots.children = [self.root_spread, self.eta_spread]
            _magnitudes(self.root_spread, self.root_magnitudes, roots, root_names)
            _magnitudes(self.eta_spread, self.eta_magnitudes, eta, eta_names)
            self.root_spread.title = "|y_k| of the roots (log scale)" + tag
            self.eta_spread.title = "|eta_k| of the quasi-energies (log scale)" + tag
        else:
            self.plots.children = [self.root_figure, self.eta_figure]
        with self.root_figure.hold_sync():
            self.roots.x, self.roots.y = roots.real, roots.imag
            self.roots.names = root_names
            self.roots.marker = "circle" if guaranteed else "triangle-down"
            top = float(np.max(roots.real)) * 1.08 if len(roots) and real_reason else 0.0
            self.real_axis.x, self.real_axis.y = [0.0, top], [0.0, 0.0]
            self.root_figure.title = (
                "roots y_k of P(y)" + (": real and positive (theorem)" if real_reason else "") + tag
            )
            origin_guides(self.root_guides, roots, self.root_figure)
        with self.eta_figure.hold_sync():
            self.eta.x, self.eta.y = eta.real, eta.imag
            self.eta.names = eta_names
            self.eta.marker = "diamond" if guaranteed else "triangle-down"
            self.star.x, self.star.y = star.real, star.imag
            self.star.names = [f"{number_text(z)}" for z in star]
            n = spectrum.states
            short = " [one sector]" if shown.sector is not None else tag
            self.eta_figure.title = f"eta_k (filled), {n}-fold star omega^s eta_k (open)" + short
            origin_guides(self.eta_guides, np.concatenate([eta, star]), self.eta_figure)
        self.summary.value = _summary(spectrum, real_reason, bounds)

    def _clear(self) -> None:
        for mark in (self.roots, self.eta, self.star, self.root_magnitudes, self.eta_magnitudes):
            with mark.hold_sync():
                mark.x, mark.y, mark.names = [], [], []
        self.real_axis.x, self.real_axis.y = [0.0, 0.0], [0.0, 0.0]


def _magnitudes(fig: bq.Figure, mark: bq.Scatter, values: np.ndarray, names: list[str]) -> None:
    """|values| against k = 1, 2, ... (zeros left out: a log axis has no place for them)."""
    size = np.abs(values)
    keep = size > 0
    with fig.hold_sync():
        mark.x = np.arange(1, len(values) + 1)[keep]
        mark.y = size[keep]
        mark.names = [n for n, k in zip(names, keep, strict=True) if k]


def _summary(spectrum: Any, real_reason: str | None, bounds: np.ndarray) -> str:
    prov = spectrum.provenance
    sector = (
        f"<div>sector: {escape(prov.sector.get('summary', ''))}</div>"
        if prov.sector is not None
        else ""
    )
    rows = "".join(
        f"<tr><td style='text-align:right; padding-right:10px'>{k}</td>"
        f"<td style='text-align:left; padding-right:10px'>{escape(number_text(e, 10))}</td>"
        f"<td style='text-align:left'>&#177; {b:.2g}</td></tr>"
        for k, (e, b) in enumerate(
            zip(spectrum.quasi_energies[:8], bounds[:8], strict=False), start=1
        )
    )
    more = len(spectrum.quasi_energies) - 8
    tail = f"<tr><td></td><td>&hellip; {more} more</td><td></td></tr>" if more > 0 else ""
    real = f"<div>&#10003; {escape(real_reason)}</div>" if real_reason else ""
    return (
        f'<div style="display:flex; align-items:flex-start; gap:28px; font-size:12.5px;'
        f' color:{INK};">'
        "<table class='freeladder-eta-table' style='border-collapse:collapse; flex:none'>"
        "<tr><th>k</th><th style='text-align:left'>"
        f"eta_k</th><th style='text-align:left'>bound</th></tr>{rows}{tail}</table>"
        "<div class='freeladder-roots-notes' style='flex:1 1 0; min-width:0;"
        " overflow-wrap:anywhere; white-space:normal'>"
        f"<div><b>{len(spectrum.quasi_energies)}</b> quasi-energies "
        f"by <code>{escape(prov.method)}</code>: {escape(prov.path)}</div>"
        f"<div>bounds: {escape(prov.bounds)}</div>"
        f"<div>theorem: {escape(prov.guarantee)}</div>{sector}{real}</div></div>"
    )


def _sector_rows(rows: tuple[SectorRow, ...]) -> str:
    """Every sector's lowest level, as a small table."""
    body = "".join(
        f"<tr><td style='padding-right:10px'>({escape(r.label)})</td>"
        f"<td style='padding-right:10px'>{escape(number_text(r.lowest, 10))}</td>"
        f"<td style='padding-right:10px'>{r.modes}</td><td>x{r.multiplicity}</td></tr>"
        for r in rows
    )
    return (
        f'<div style="font-size:12.5px; color:{INK};"><b>{len(rows)} sectors</b> '
        "(eigenvalues of the cycle strings, then the parity strings); the plots show the "
        f"ground sector<table style='border-collapse:collapse'><tr><th>label</th>"
        "<th>lowest level</th><th>modes</th><th>multiplicity</th></tr>"
        f"{body}</table></div>"
    )
