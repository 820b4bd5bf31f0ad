"""Section 5 of the Workbench: the lowest many-body levels as a ladder, beside exact levels.

References
----------
P. Fendley, J. Phys. A 52, 335002 (2019); F. C. Alcaraz and R. A. Pimenta, Phys. Rev. B 102,
121101(R) (2020) (levels as sums of quasi-energies).
"""

from __future__ import annotations

import bqplot as bq
import ipywidgets as widgets
import numpy as np

import freeladder as fl

from .style import ACCENT, INK, SECOND, TICKS, complex_plane, escape, number_text, origin_guides

__all__ = ["RUNGS", "LadderPanel"]

#: How many of the lowest levels the ladder shows.
RUNGS = 12


class LadderPanel(widgets.VBox):
    """Rungs for real spectra (N = 2), a complex plane for N > 2; exact levels beside them."""

    def __init__(self) -> None:
        sx = bq.LinearScale(min=0.0, max=3.2)
        sy = bq.LinearScale()
        self.rungs = bq.Lines(
            x=np.zeros((0, 2)),
            y=np.zeros((0, 2)),
            scales={"x": sx, "y": sy},
            colors=[ACCENT],
            stroke_width=3,
        )
        self.exact_rungs = bq.Lines(
            x=np.zeros((0, 2)),
            y=np.zeros((0, 2)),
            scales={"x": sx, "y": sy},
            colors=[SECOND],
            stroke_width=2,
            line_style="dashed",
        )
        self.degeneracy = bq.Label(
            x=[],
            y=[],
            text=[],
            scales={"x": sx, "y": sy},
            colors=[INK],
            default_size=11,
            x_offset=4,
            align="start",
        )
        self.exact_labels = bq.Label(
            x=[],
            y=[],
            text=[],
            scales={"x": sx, "y": sy},
            colors=[INK],
            default_size=11,
            x_offset=4,
            align="start",
        )
        ay = bq.Axis(scale=sy, side="left", label="energy E", grid_lines="none", tick_format=TICKS)
        self.rung_figure = bq.Figure(
            marks=[self.rungs, self.exact_rungs, self.degeneracy, self.exact_labels],
            axes=[ay],
            title="free spectrum (solid, left) | exact diag. (dashed)",
            fig_margin={"top": 36, "bottom": 12, "left": 58, "right": 8},
            layout=widgets.Layout(width="100%", height="360px"),
            title_style={"font-size": "13px"},
        )
        self.plane, px, py, self.plane_guides = complex_plane(
            "lowest levels in the complex plane", "Re E", "Im E", height="360px"
        )
        self.levels = bq.Scatter(
            x=[],
            y=[],
            scales={"x": px, "y": py},
            colors=[ACCENT],
            default_size=60,
            names=[],
            display_names=False,
            tooltip=bq.Tooltip(fields=["name"], labels=["level"]),
        )
        self.exact_points = bq.Scatter(
            x=[],
            y=[],
            scales={"x": px, "y": py},
            colors=[SECOND],
            fill=False,
            stroke=SECOND,
            marker="square",
            default_size=110,
            stroke_width=1.5,
        )
        self.plane.marks = [*self.plane.marks, self.levels, self.exact_points]
        self.summary = widgets.HTML()
        super().__init__([self.rung_figure, self.summary])

    def show(self, answer: fl.SpectrumAnswer, exact: fl.ExactSpectrum | None, states: int) -> None:
        """Draw the lowest levels of the answer's spectrum (none when refused) and of ``exact``."""
        free: list[fl.Level] = []
        if answer.spectrum is not None:
            free = list(answer.spectrum.levels(RUNGS))
        energies = np.array([lv.energy for lv in free], complex)
        mult = [lv.multiplicity for lv in free]
        ex_e = np.zeros(0, complex)
        ex_m: list[int] = []
        if exact is not None:
            ex_e = np.asarray(exact.levels[:RUNGS], complex)
            ex_m = [int(v) for v in exact.multiplicities[:RUNGS]]
        planar = states > 2 or bool(np.any(np.abs(energies.imag) > 1e-12))
        self.children = [self.plane if planar else self.rung_figure, self.summary]
        if planar:
            with self.plane.hold_sync():
                self.levels.x, self.levels.y = energies.real, energies.imag
                self.levels.names = [
                    f"E = {number_text(e)}, multiplicity {m if m is not None else 'unknown'}"
                    for e, m in zip(energies, mult, strict=True)
                ]
                self.exact_points.x, self.exact_points.y = ex_e.real, ex_e.imag
                origin_guides(self.plane_guides, np.concatenate([energies, ex_e]))
            self.rungs.x = self.rungs.y = np.zeros((0, 2))
        else:
            e = energies.real
            with self.rung_figure.hold_sync():
                self.rungs.x = np.tile([0.1, 1.1], (len(e), 1))
                self.rungs.y = np.column_stack([e, e])
                self.degeneracy.x, self.degeneracy.y = np.full(len(e), 1.12), e
                self.degeneracy.text = [f"x{m}" if m is not None else "x?" for m in mult]
                x = ex_e.real
                self.exact_rungs.x = np.tile([1.75, 2.75], (len(x), 1))
                self.exact_rungs.y = np.column_stack([x, x])
                self.exact_labels.x, self.exact_labels.y = np.full(len(x), 2.77), x
                self.exact_labels.text = [f"x{m}" for m in ex_m]
            self.levels.x = self.levels.y = []
        self.summary.value = _summary(answer, exact)


def _summary(answer: fl.SpectrumAnswer, exact: fl.ExactSpectrum | None) -> str:
    parts = []
    spectrum = answer.spectrum
    if spectrum is None:
        parts.append("free-spectrum levels: refused (no theorem; see the roots section)")
    else:
        try:
            ground = number_text(spectrum.ground_energy)
            gap = f"{spectrum.gap:.6g}"
        except ValueError as exc:
            ground = gap = f"not available ({exc})"
        deg = spectrum.degeneracy
        parts.append(
            f"free spectrum: ground energy <b>{escape(ground)}</b>, gap <b>{escape(gap)}</b>; "
            f"each level {'x' + str(deg) if deg is not None else 'multiplicity unknown'}"
            f" ({escape(spectrum.degeneracy_reason)})"
        )
    if exact is None:
        parts.append("exact diagonalization: not shown (dimension above the overlay limit)")
    else:
        parts.append(
            f"exact diagonalization: {escape(exact.method)}, dimension {exact.dimension}, "
            f"accuracy about {exact.error_estimate:.2g}"
        )
    return "".join(f"<div style='font-size:12.5px'>{p}</div>" for p in parts)
