"""Section 4 of the Workbench: the roots y_k of P and the quasi-energies eta_k, with bounds.

References
----------
P. Fendley, J. Phys. A 52, 335002 (2019) (eta_k^N = 1 / y_k for N = 2);
F. C. Alcaraz and R. A. Pimenta, Phys. Rev. B 102, 121101(R) (2020) (general N, the N-fold star).
"""

from __future__ import annotations

import bqplot as bq
import ipywidgets as widgets
import numpy as np

import freeladder as fl

from .adapter import star_points
from .style import (
    ACCENT,
    INK,
    MUTED,
    SECOND,
    WARN,
    complex_plane,
    escape,
    number_text,
    origin_guides,
)

__all__ = ["RootsPanel"]


class RootsPanel(widgets.VBox):
    """Two complex planes (roots y_k; quasi-energies eta_k and their N-fold star) and a summary."""

    def __init__(self) -> None:
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
            layout=widgets.Layout(width="520px", display="none"),
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
        plots = widgets.HBox(
            [self.root_figure, self.eta_figure], layout=widgets.Layout(width="100%")
        )
        self.root_figure.layout.width = "50%"
        self.eta_figure.layout.width = "50%"
        super().__init__(
            [self.unproven, self.sector, self.refusal, self.sectors_table, plots, self.summary]
        )

    def show_sector_choices(self, options: list[tuple[str, object]] | None, value: object) -> None:
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

    def show(self, answer: fl.SpectrumAnswer, real_reason: str | None) -> None:
        """Show the answer's roots and quasi-energies, or the library's refusal."""
        self.sectors_table.value = "" if answer.sectors is None else _sector_rows(answer.sectors)
        spectrum = answer.spectrum
        if spectrum is None:
            self.refusal.value = (
                f'<div role="alert" style="color:{WARN}; border-left:4px solid {WARN};'
                f' padding-left:8px;"><b>&#9888; No free spectrum is claimed.</b> '
                f"{escape(answer.message)}<br>Tick the box above to see the numbers the "
                "single polynomial would give, marked as unproven.</div>"
            )
            self.summary.value = ""
            self._clear()
            return
        guaranteed = bool(spectrum.provenance.guaranteed)
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
        sector = spectrum.provenance.sector is not None
        if sector:  # no polynomial: the Majorana energies, drawn as y_k = 1 / e_k^2
            real_reason = None
            tag = " [one sector: y_k = 1/e_k^2]"
        roots = np.where(np.isfinite(roots), roots, 0)  # zero modes (y infinite) at the origin
        with self.root_figure.hold_sync():
            self.roots.x, self.roots.y = roots.real, roots.imag
            self.roots.names = [
                f"y_{k} = {number_text(y)}; eta_{k} = {number_text(e)} ± {b:.2g}{tag}"
                for k, (y, e, b) in enumerate(zip(roots, eta, bounds, strict=True))
            ]
            self.roots.marker = "circle" if guaranteed else "triangle-down"
            top = float(np.max(roots.real)) * 1.08 if len(roots) and real_reason else 0.0
            self.real_axis.x, self.real_axis.y = [0.0, top], [0.0, 0.0]
            self.root_figure.title = (
                "roots y_k of P(y)" + (": real and positive (theorem)" if real_reason else "") + tag
            )
            origin_guides(self.root_guides, roots)
        with self.eta_figure.hold_sync():
            self.eta.x, self.eta.y = eta.real, eta.imag
            self.eta.names = [
                f"eta_{k} = {number_text(e)} ± {b:.2g}{tag}"
                for k, (e, b) in enumerate(zip(eta, bounds, strict=True))
            ]
            self.eta.marker = "diamond" if guaranteed else "triangle-down"
            self.star.x, self.star.y = star.real, star.imag
            self.star.names = [f"{number_text(z)}" for z in star]
            n = spectrum.states
            self.eta_figure.title = (
                f"quasi-energies eta_k (filled) and the {n}-fold star omega^s eta_k (open)" + tag
            )
            origin_guides(self.eta_guides, np.concatenate([eta, star]))
        self.summary.value = _summary(spectrum, real_reason, bounds)

    def _clear(self) -> None:
        for mark in (self.roots, self.eta, self.star):
            with mark.hold_sync():
                mark.x, mark.y, mark.names = [], [], []
        self.real_axis.x, self.real_axis.y = [0.0, 0.0], [0.0, 0.0]


def _summary(spectrum: fl.FreeSpectrum, real_reason: str | None, bounds: np.ndarray) -> str:
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
        for k, (e, b) in enumerate(zip(spectrum.quasi_energies[:8], bounds[:8], strict=False))
    )
    more = len(spectrum.quasi_energies) - 8
    tail = f"<tr><td></td><td>&hellip; {more} more</td><td></td></tr>" if more > 0 else ""
    real = f"<div>&#10003; {escape(real_reason)}</div>" if real_reason else ""
    return (
        f'<div style="display:flex; align-items:flex-start; gap:28px; font-size:12.5px;'
        f' color:{INK};">'
        "<table class='freeladder-eta-table' style='border-collapse:collapse'><tr><th>k</th>"
        "<th style='text-align:left'>"
        f"eta_k</th><th style='text-align:left'>bound</th></tr>{rows}{tail}</table>"
        f"<div style='max-width:60%'><div><b>{len(spectrum.quasi_energies)}</b> quasi-energies "
        f"by <code>{escape(prov.method)}</code>: {escape(prov.path)}</div>"
        f"<div>bounds: {escape(prov.bounds)}</div>"
        f"<div>theorem: {escape(prov.guarantee)}</div>{sector}{real}</div></div>"
    )


def _sector_rows(table: tuple[fl.SectorRow, ...]) -> str:
    """Every sector's lowest level, as a small table."""
    rows = "".join(
        f"<tr><td style='padding-right:10px'>"
        f"({escape(', '.join('+1' if v > 0 else '-1' for v in row.label))})</td>"
        f"<td style='padding-right:10px'>{escape(number_text(row.lowest, 10))}</td>"
        f"<td style='padding-right:10px'>{row.modes}</td><td>x{row.multiplicity}</td></tr>"
        for row in table
    )
    return (
        f'<div style="font-size:12.5px; color:{INK};"><b>{len(table)} sectors</b> '
        "(eigenvalues of the cycle strings, then the parity strings); the plots show the "
        f"ground sector<table style='border-collapse:collapse'><tr><th>label</th>"
        "<th>lowest level</th><th>modes</th><th>multiplicity</th></tr>"
        f"{rows}</table></div>"
    )
