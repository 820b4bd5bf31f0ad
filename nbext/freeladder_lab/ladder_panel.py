"""Section 5 of the Workbench: the lowest many-body levels as a ladder, beside exact levels.

References
----------
P. Fendley, J. Phys. A 52, 335002 (2019); F. C. Alcaraz and R. A. Pimenta, Phys. Rev. B 102,
121101(R) (2020) (levels as sums of quasi-energies).
"""

from __future__ import annotations

from typing import Any

import bqplot as bq
import ipywidgets as widgets
import numpy as np

from .adapter import ExactOverlay, Outcome, View, multiplicity_text
from .panel import Host, Section
from .style import ACCENT, INK, SECOND, TICKS, complex_plane, escape, number_text, origin_guides

__all__ = ["LABEL_PIXELS", "RUNGS", "LadderPanel", "label_groups", "spread_labels"]

#: How many of the lowest levels the ladder shows.
RUNGS = 12
#: Height of the ladder's plotting area in pixels (figure height minus margins).
_PLOT_PIXELS = 360 - 36 - 12
#: Least vertical distance between two multiplicity labels, in pixels (11 px text).
LABEL_PIXELS = 15


def label_groups(
    y: np.ndarray, mult: list[str], lo: float, hi: float, pixels: float = _PLOT_PIXELS
) -> tuple[np.ndarray, list[str]]:
    """One label per group of levels closer than a label's height (sorted ``y``).

    A group of one level keeps its multiplicity text (``x2``); a group of several says how
    many levels it holds (``3 levels x2``, or ``3 levels`` when their multiplicities differ).
    The labels sit at each group's lowest level, moved apart by :func:`spread_labels`.
    """
    step = (hi - lo) * LABEL_PIXELS / pixels
    starts: list[int] = []
    for i in range(len(y)):
        if i == 0 or y[i] - y[i - 1] >= step:
            starts.append(i)
    ends = [*starts[1:], len(y)] if starts else []
    texts = []
    for a, b in zip(starts, ends, strict=True):
        group = mult[a:b]
        if len(group) == 1:
            texts.append(group[0])
        elif len(set(group)) == 1:
            texts.append(f"{len(group)} levels {group[0]}")
        else:
            texts.append(f"{len(group)} levels")
    at = spread_labels(np.asarray(y, float)[starts], lo, hi, pixels)
    return at, texts


def spread_labels(y: np.ndarray, lo: float, hi: float, pixels: float = _PLOT_PIXELS) -> np.ndarray:
    """Label heights near ``y`` (sorted ascending) at least :data:`LABEL_PIXELS` apart on an
    axis from ``lo`` to ``hi`` drawn ``pixels`` tall: labels of near-degenerate levels are moved
    apart, upwards, instead of printed over each other."""
    step = (hi - lo) * LABEL_PIXELS / pixels
    out = np.asarray(y, float).copy()
    for i in range(1, len(out)):
        out[i] = max(out[i], out[i - 1] + step)
    return out


class LadderPanel(Section):
    """Rungs for real spectra (N = 2), a complex plane for N > 2; exact levels beside them.

    Levels closer than a label's height share one label (``3 levels x2``).  When the levels
    differ by less than a hundredth of their size (long chains: E near -1000
    and gaps near 0.1), the rungs are drawn as ``E - E_0`` and the axis says so.  The exact
    column holds the lowest levels of the same sector as the free ones (the whole space for a
    model without sectors), and the title says which; the summary gives their largest
    difference from the free levels, or why the exact check did not run.
    """

    TITLE = "Ladder"
    HINT = "lowest many-body levels"
    WIDTH = "42%"

    @classmethod
    def attach(cls, host: Host) -> LadderPanel:
        """The section for ``host``."""
        return cls()

    def __init__(self) -> None:
        sx = bq.LinearScale(min=0.0, max=3.2)
        sy = bq.LinearScale()
        self._y_scale = sy
        self.offset = 0.0  # subtracted from every energy drawn (E_0 when the axis is relative)
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
            y_offset=4,
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
            y_offset=4,
            align="start",
        )
        self.y_axis = bq.Axis(
            scale=sy,
            side="left",
            label="energy E",
            grid_lines="none",
            tick_format=TICKS,
            label_offset="56px",
        )
        # The title is an HTML line above the figure, which wraps (a figure title is clipped).
        self.title = widgets.HTML()
        self.title.add_class("freeladder-ladder-title")
        self.rung_figure = bq.Figure(
            marks=[self.rungs, self.exact_rungs, self.degeneracy, self.exact_labels],
            axes=[self.y_axis],
            fig_margin={"top": 36, "bottom": 12, "left": 74, "right": 8},
            layout=widgets.Layout(width="100%", height="360px"),
            interaction=bq.PanZoom(scales={"y": [sy]}),
        )
        self.rung_figure.add_class("freeladder-ladder-figure")
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
        super().__init__([self.title, self.rung_figure, self.summary])

    def update(self, view: View) -> None:
        """Draw the lowest levels of the outcome (none when refused) and the exact ones."""
        shown = view.outcome
        overlay = view.exact
        exact = overlay.exact
        states = view.analysis.model.states
        free: list[Any] = []
        if shown.spectrum is not None:
            free = list(shown.spectrum.levels(RUNGS))
        energies = np.array([lv.energy for lv in free], complex)
        mult = [lv.multiplicity for lv in free]
        ex_e = np.zeros(0, complex)
        ex_m: list[int] = []
        if exact is not None:
            ex_e = np.asarray(exact.levels[:RUNGS], complex)
            ex_m = [int(v) for v in exact.multiplicities[:RUNGS]]
        self.title.value = _title(shown, overlay)
        planar = states > 2 or bool(np.any(np.abs(energies.imag) > 1e-12))
        self.children = [self.title, self.plane if planar else self.rung_figure, self.summary]
        if planar:
            with self.plane.hold_sync():
                self.levels.x, self.levels.y = energies.real, energies.imag
                self.levels.names = [
                    f"E = {number_text(e)}, multiplicity {multiplicity_text(m, states)}"
                    for e, m in zip(energies, mult, strict=True)
                ]
                self.exact_points.x, self.exact_points.y = ex_e.real, ex_e.imag
                origin_guides(self.plane_guides, np.concatenate([energies, ex_e]), self.plane)
            self.rungs.x = self.rungs.y = np.zeros((0, 2))
        else:
            resolved = exact is not None and exact.method.startswith("dense")
            self._draw_rungs(energies.real, mult, ex_e.real, ex_m, states, resolved)
            self.levels.x = self.levels.y = []
        self.summary.value = _summary(shown, overlay, states)

    def _draw_rungs(
        self,
        e: np.ndarray,
        mult: list[Any],
        x: np.ndarray,
        ex_m: list[int],
        states: int,
        resolved: bool = True,
    ) -> None:
        both = np.concatenate([e, x])
        offset = 0.0
        if len(both):
            spread = float(both.max() - both.min())
            size = float(np.abs(both).max())
            if size > 0 and spread < 0.01 * size:  # ticks would all read the same number
                offset = float(both.min())
        self.offset = offset
        e, x = e - offset, x - offset
        lo, hi = (float(both.min() - offset), float(both.max() - offset)) if len(both) else (0, 1)
        pad = max(hi - lo, 1e-9) * 0.06
        lo, hi = lo - pad, hi + pad
        # labels of near-degenerate levels are moved apart; the axis grows to hold them (the
        # spacing depends on the axis range, so grow it until the labels fit)
        e_text = [multiplicity_text(m, states) for m in mult]
        # Lanczos does not resolve multiplicities: its levels go unlabelled
        x_text = [multiplicity_text(m, states) if resolved else "" for m in ex_m]
        top = hi
        for _ in range(60):
            e_at, e_labels = label_groups(e, e_text, lo, top)
            x_at, x_labels = label_groups(x, x_text, lo, top)
            need = max([hi, *e_at, *x_at]) + (top - lo) * LABEL_PIXELS / _PLOT_PIXELS
            if need <= top:
                break
            top = need
        with self.rung_figure.hold_sync():
            self._y_scale.min, self._y_scale.max = lo, float(top)
            self.y_axis.label = f"E - E0 (E0 = {number_text(offset, 10)})" if offset else "energy E"
            self.rungs.x = np.tile([0.1, 1.1], (len(e), 1))
            self.rungs.y = np.column_stack([e, e])
            self.degeneracy.x, self.degeneracy.y = np.full(len(e_at), 1.12), e_at
            self.degeneracy.text = e_labels
            self.exact_rungs.x = np.tile([1.75, 2.75], (len(x), 1))
            self.exact_rungs.y = np.column_stack([x, x])
            self.exact_labels.x, self.exact_labels.y = np.full(len(x_at), 2.77), x_at
            self.exact_labels.text = x_labels


def _title(shown: Outcome, overlay: ExactOverlay) -> str:
    free = escape(shown.label) if shown.spectrum is not None else "free spectrum: refused"
    if overlay.exact is None:
        exact = "exact diagonalization: not run"
    else:
        exact = f"exact diag. of {escape(overlay.where)} (dashed, right)"
    return (
        f'<div style="font-size:13px; color:{INK}; line-height:1.35;">'
        f"<span style='color:{ACCENT}'>&#9644;</span> {free} (solid, left) &#8195;"
        f"<span style='color:{SECOND}'>&#9476;</span> {exact}</div>"
    )


def _summary(shown: Outcome, overlay: ExactOverlay, states: int) -> str:
    parts = []
    spectrum = shown.spectrum
    if spectrum is None:
        parts.append("free-spectrum levels: refused (no theorem; see the roots section)")
    else:
        try:
            ground = number_text(spectrum.ground_energy)
            gap = f"{spectrum.gap:.6g}"
        except ValueError as exc:
            ground = gap = f"not available ({exc})"
        deg = spectrum.degeneracy
        each = multiplicity_text(deg, states) if deg is not None else "multiplicity unknown"
        parts.append(
            f"{escape(shown.label)}: ground energy <b>{escape(ground)}</b>, gap "
            f"<b>{escape(gap)}</b>; each level {escape(each)}"
            f" ({escape(spectrum.degeneracy_reason)})"
        )
    exact, check = overlay.exact, overlay.check
    if exact is None or check is None:
        parts.append(f"<span class='freeladder-exact-agreement'>{escape(overlay.note)}</span>")
    else:
        resolved = (
            "every multiplicity resolved"
            if exact.method.startswith("dense")
            else "Lanczos: distinct levels, multiplicities not resolved"
        )
        parts.append(
            f"exact diagonalization of {escape(overlay.where)}: {escape(exact.method)}, "
            f"dimension {exact.dimension}, {resolved}, accuracy about "
            f"{exact.error_estimate:.2g}"
        )
        status = "agree" if check.passed else "not compared" if check.passed is None else "DISAGREE"
        parts.append(
            f"<span class='freeladder-exact-agreement'>exact check: {status}, largest "
            f"difference {check.value:.2g} (tolerance {check.tolerance:.2g})</span>"
        )
    return "".join(
        f"<div style='font-size:12.5px; overflow-wrap:anywhere'>{p}</div>" for p in parts
    )
