"""The Workbench's look: colours, section headings, number text and the shared plot scaffolding."""

from __future__ import annotations

import html
from typing import Any

import bqplot as bq
import ipywidgets as widgets
import numpy as np

__all__ = [
    "ACCENT",
    "INK",
    "MUTED",
    "ROOT_CLASS",
    "SECOND",
    "TICKS",
    "WARN",
    "complex_plane",
    "origin_guides",
    "escape",
    "magnitude_plot",
    "nice_ticks",
    "number_text",
    "section",
    "spans_decades",
    "status_words",
    "text_style",
]

INK = "#23313a"  # text and edges
ACCENT = "#1d6e73"  # the main series (roots, rungs)
SECOND = "#b5651d"  # comparisons and highlights (exact diagonalization, witness)
MUTED = "#9aa7ad"  # guides (axes through the origin, earlier orders)
WARN = "#8c2d19"  # refusals and failures (always with words as well)

#: Axis tick format (set explicitly: bqplot's automatic one fails on an empty domain).
TICKS = ".3~g"

_SECTION_CSS = (
    "border-top: 3px solid {c}; padding: 4px 0 2px 0; margin: 10px 0 4px 0;"
    " font-size: 15px; font-weight: 600; color: {ink};"
)


def section(number: int, title: str, hint: str) -> widgets.HTML:
    """A numbered section heading with a one-line hint of what the section shows."""
    style = _SECTION_CSS.format(c=ACCENT, ink=INK)
    return widgets.HTML(
        f'<div style="{style}">{number}&#8195;{escape(title)}'
        f'<span style="font-weight:400; font-size:13px; color:#4f5d64;">'
        f"&#8195;{escape(hint)}</span></div>"
    )


#: CSS class of the Workbench's outer box; :func:`text_style` is scoped to it.
ROOT_CLASS = "freeladder-workbench"


def text_style() -> widgets.HTML:
    """A style rule for the Workbench's text: ipywidgets gives every HTML widget the line
    height of one input row (28 px), which spaces wrapped paragraphs and tables twice apart."""
    return widgets.HTML(
        f"<style>.{ROOT_CLASS} .widget-html-content {{ line-height: 1.4; }}</style>",
        layout=widgets.Layout(height="0px", margin="0"),
    )


def escape(text: Any) -> str:
    """HTML-escape any value's text."""
    return html.escape(str(text))


def number_text(v: Any, digits: int = 6) -> str:
    """A number in at most ``digits`` significant figures, ``a + bi`` when complex."""
    z = complex(v) + 0.0  # adding 0.0 turns a negative zero into zero
    if z.imag == 0 or abs(z.imag) <= 1e-15 * max(1.0, abs(z.real)):
        return f"{z.real:.{digits}g}"
    sign = "-" if z.imag < 0 else "+"
    return f"{z.real:.{digits}g} {sign} {abs(z.imag):.{digits}g}i"


#: A check's status (``Check.status``) in a symbol and words (never colour alone).
STATUS_WORDS = {
    "passed": "&#10003; passed",
    "FAILED": "&#10007; FAILED",
    "not run": "&#8211; not run",
    "does not hold": "&#9675; does not hold (not claimed)",
}


def status_words(status: str) -> str:
    """A check's status (passed, FAILED, not run, does not hold) in a symbol and words."""
    return STATUS_WORDS[status]


def complex_plane(
    title: str, x_label: str, y_label: str, height: str = "300px"
) -> tuple[bq.Figure, bq.LinearScale, bq.LinearScale, bq.Lines]:
    """A figure with real and imaginary axes at its edges and thin guides through the origin.

    Returns the figure, its two scales and the guide mark (update its data with
    :func:`origin_guides` when the data range changes).
    """
    sx, sy = bq.LinearScale(), bq.LinearScale()
    ax = bq.Axis(scale=sx, label=x_label, grid_lines="none", tick_format=TICKS, num_ticks=X_TICKS)
    ay = bq.Axis(
        scale=sy,
        label=y_label,
        side="left",
        grid_lines="none",
        tick_format=TICKS,
        label_offset="50px",
    )
    # the guides start over [-1, 1] so that the scales never see an empty or single-point domain
    guides = bq.Lines(
        x=np.array([[-1.0, 1.0], [0.0, 0.0]]),
        y=np.array([[0.0, 0.0], [-1.0, 1.0]]),
        scales={"x": sx, "y": sy},
        colors=[MUTED],
        stroke_width=1,
        line_style="dashed",
    )
    fig = bq.Figure(
        marks=[guides],
        axes=[ax, ay],
        title=title,
        fig_margin={"top": 36, "bottom": 44, "left": 66, "right": 16},
        layout=widgets.Layout(width="100%", height=height),
        title_style={"font-size": "14px"},
        interaction=bq.PanZoom(scales={"x": [sx], "y": [sy]}),
    )
    return fig, sx, sy, guides


#: At most this many ticks on a horizontal axis (a half-width plot fits five labels like 1.5e+6).
X_TICKS = 5
#: Values whose magnitudes span more than this ratio are plotted on logarithmic axes.
DECADES = 1e3


def spans_decades(values: np.ndarray) -> bool:
    """True when the nonzero magnitudes of ``values`` span more than :data:`DECADES`."""
    size = np.abs(np.asarray(values, complex))
    size = size[np.isfinite(size) & (size > 0)]
    return bool(len(size) > 1 and size.max() > DECADES * size.min())


def magnitude_plot(title: str, y_label: str, height: str = "300px") -> tuple[bq.Figure, bq.Scatter]:
    """A plot of magnitudes against k = 1, 2, ... on a logarithmic vertical axis, zoomable.

    Returns the figure and its scatter mark (set ``x`` to k, ``y`` to the magnitudes).
    """
    sx, sy = bq.LinearScale(), bq.LogScale()
    ax = bq.Axis(scale=sx, label="k", grid_lines="none", tick_format="d", num_ticks=X_TICKS)
    ay = bq.Axis(
        scale=sy,
        label=y_label,
        side="left",
        grid_lines="solid",
        tick_format=".0e",
        label_offset="50px",
    )
    mark = bq.Scatter(
        x=[],
        y=[],
        scales={"x": sx, "y": sy},
        colors=[ACCENT],
        default_size=20,
        names=[],
        display_names=False,
        tooltip=bq.Tooltip(fields=["name"], labels=["value"]),
    )
    fig = bq.Figure(
        marks=[mark],
        axes=[ax, ay],
        title=title,
        fig_margin={"top": 36, "bottom": 44, "left": 66, "right": 16},
        layout=widgets.Layout(width="100%", height=height),
        title_style={"font-size": "14px"},
        interaction=bq.PanZoom(scales={"x": [sx], "y": [sy]}),
    )
    return fig, mark


def nice_ticks(lo: float, hi: float, most: int = X_TICKS) -> np.ndarray:
    """At most ``most`` round tick values (1, 2 or 5 times a power of ten apart) in [lo, hi]."""
    span = hi - lo
    if not np.isfinite(span) or span <= 0:
        return np.array([lo])
    step = 10.0 ** np.floor(np.log10(span / most))
    for factor in (1.0, 2.0, 5.0, 10.0):
        if span / (factor * step) <= most:
            step *= factor
            break
    ticks = np.arange(np.ceil(lo / step), np.floor(hi / step) + 1) * step
    return np.where(np.abs(ticks) < step * 1e-9, 0.0, ticks)  # an exact zero, not 4e-16


def origin_guides(guides: bq.Lines, points: np.ndarray, figure: bq.Figure | None = None) -> None:
    """Stretch the dashed guides through the origin over the range of ``points``.

    Each axis spans at least a third of the other, so that rounding-level imaginary parts of
    real numbers stay on the real axis instead of being blown up to fill the plot.  With
    ``figure``, its horizontal axis gets at most :data:`X_TICKS` round ticks (labels like
    1.2e+6 would overlap at the default density in a half-width plot).
    """
    z = np.concatenate([np.asarray(points, complex).ravel(), [0j]])
    re_lo, re_hi = float(np.min(z.real)), float(np.max(z.real))
    im_lo, im_hi = float(np.min(z.imag)), float(np.max(z.imag))
    size = max(re_hi - re_lo, im_hi - im_lo) or 1.0
    re_lo, re_hi = _widened(re_lo, re_hi, size / 3)
    im_lo, im_hi = _widened(im_lo, im_hi, size / 3)
    with guides.hold_sync():
        guides.x = np.array([[re_lo, re_hi], [0.0, 0.0]])
        guides.y = np.array([[0.0, 0.0], [im_lo, im_hi]])
    if figure is not None:
        figure.axes[0].tick_values = nice_ticks(re_lo, re_hi)


def _widened(lo: float, hi: float, least: float) -> tuple[float, float]:
    mid, half = (lo + hi) / 2, max(hi - lo, least) / 2
    return mid - 1.1 * half, mid + 1.1 * half
