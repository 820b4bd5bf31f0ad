"""Section 3 of the Workbench: the charges order by order, the transfer matrix and P_s(y).

References
----------
P. Fendley, J. Phys. A 52, 335002 (2019) (charges from the exclusion rule, transfer matrix);
S. J. Elman, A. Chapman and S. T. Flammia, Commun. Math. Phys. 388, 969 (2021).
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

import bqplot as bq
import ipywidgets as widgets
import numpy as np

from .adapter import (
    PARTIAL_DEGREE_LIMIT,
    Analysis,
    View,
    charge_latex,
    charge_step,
    order_commutes,
    partial_coefficients,
    partial_roots,
    product_text,
)
from .panel import Host, Section
from .style import (
    ACCENT,
    INK,
    SECOND,
    complex_plane,
    escape,
    number_text,
    origin_guides,
    status_words,
)

__all__ = [
    "AUTO_LIST_TERMS",
    "LATEX_PRODUCTS",
    "MAX_PAGES",
    "PAGE",
    "OrderView",
    "SeriesPanel",
    "order_view",
]

#: Orders with at most this many products are written out in LaTeX.
LATEX_PRODUCTS = 12
#: Products per page of the text list.
PAGE = 20
#: Pages beyond this are not listed (each page lists the products before it).
MAX_PAGES = 50
#: Models with at most this many terms list the products of an order without being asked.
AUTO_LIST_TERMS = 300


@dataclass(frozen=True)
class OrderView:
    """What the series panel shows for one order s (all numbers from the library)."""

    analysis: Analysis
    order: int
    count: int
    products_html: str
    commutes: Any
    partial: tuple[Any, ...] | None
    roots: np.ndarray | None
    target: np.ndarray | None


def order_view(a: Analysis, s: int, page: int, listed: bool = True) -> OrderView:
    """Collect everything the panel shows for order ``s``.

    The products are written out in LaTeX when there are few; otherwise page ``page`` of the
    text list is shown when ``listed`` (enumerating them can take seconds on long chains).
    """
    counts = a.charge_counts
    step = charge_step(a, s)
    alpha = len(counts) - 1
    if step.count <= LATEX_PRODUCTS or listed:
        products = _products_html(step, page)
    else:
        products = (
            f"<div>The {step.count} products of Q<sup>({s})</sup> are counted, not listed; "
            "press <i>list the products</i> to page through them.</div>"
        )
    return OrderView(
        analysis=a,
        order=s,
        count=counts[s],
        products_html=products,
        commutes=order_commutes(a, s),
        partial=partial_coefficients(a, s),
        roots=partial_roots(a, s),
        target=partial_roots(a, alpha),
    )


#: About how many characters of a charge's formula fit on one line of the half-width column.
FORMULA_WIDTH = 44


def _products_html(step: Any, page: int) -> str:
    s = step.order
    if step.count <= LATEX_PRODUCTS:
        body = charge_latex(step, LATEX_PRODUCTS, FORMULA_WIDTH)
        sign = "" if s % 2 == 0 else "-"
        power = "" if s == 0 else ("u" if s == 1 else f"u^{{{s}}}")
        return f"$${sign}{power}\\,{body}$$" if s else f"$${body}$$"
    start = page * PAGE
    shown = step.head(start + PAGE)[start:]
    lines = "\n".join(f"{start + r:>6}  {product_text(t)}" for r, t in enumerate(shown))
    return (
        f"<div>products {start}..{start + len(shown) - 1} of {step.count} in Q^({s}) "
        f"(each multiplied by (-u)^{s}):</div>"
        f'<pre style="max-height:180px; overflow:auto; font-size:12px; margin:2px 0;">'
        f"{escape(lines)}</pre>"
    )


def _plural(n: int, word: str) -> str:
    return f"{n} {word}" if n == 1 else f"{n} {word}s"


def _transfer_latex(s: int) -> str:
    def term(r: int) -> str:
        if r == 0:
            return "1"
        sign = "-" if r % 2 else "+"
        power = "u" if r == 1 else f"u^{{{r}}}"
        return f"{sign} {power}\\,Q^{{({r})}}"

    orders = list(range(s + 1))
    if len(orders) > 7:
        parts = [term(r) for r in orders[:4]] + ["+ \\cdots"] + [term(r) for r in orders[-2:]]
    else:
        parts = [term(r) for r in orders]
    return f"$$T_{{{s}}}(u) = {' '.join(parts)}$$"


def _polynomial_latex(s: int, coeffs: tuple[Any, ...] | None, degree: int) -> str:
    if coeffs is None:
        return (
            f"<div>P(y) has degree {degree} &gt; {PARTIAL_DEGREE_LIMIT}: the partial "
            "polynomials are not expanded here (their coefficients overflow floating point); "
            "the roots panel shows the roots of P.</div>"
        )
    parts = []
    for r, c in enumerate(coeffs):
        text = number_text(c, 6)
        if r == 0:
            parts.append(text)
            continue
        mono = "y" if r == 1 else f"y^{{{r}}}"
        if " " in text:  # complex: keep it in parentheses
            inner = text.replace("i", r"\,i")
            parts.append(f"+ ({inner})\\,{mono}")
        elif text.startswith("-"):
            parts.append(f"- {text[1:]}\\,{mono}")
        else:
            parts.append(f"+ {text}\\,{mono}")
    if len(parts) > 9:
        parts = parts[:5] + ["+ \\cdots"] + parts[-3:]
    per_line = 2 if any(isinstance(c, complex) and c.imag for c in coeffs) else 4
    lines = [" ".join(parts[i : i + per_line]) for i in range(0, len(parts), per_line)]
    body = " \\\\ &\\quad ".join(lines)
    return f"$$\\begin{{aligned}} P_{{{s}}}(y) &= {body} \\end{{aligned}}$$"


class SeriesPanel(Section):
    """Order control, play button, the products of order s, T_s(u), P_s(y) and its roots.

    Parameters
    ----------
    host : Host
        Runs each order's view in the Workbench's worker (lane "order").
    """

    TITLE = "Charges and transfer matrix"
    HINT = "order by order"

    @classmethod
    def attach(cls, host: Host) -> SeriesPanel:
        """The section for ``host``."""
        return cls(host)

    def __init__(self, host: Host) -> None:
        self._host = host
        self._analysis: Analysis | None = None
        self.order = widgets.IntSlider(
            0,
            min=0,
            max=0,
            description="order s",
            style={"description_width": "initial"},
            continuous_update=False,
            layout=widgets.Layout(width="70%"),
        )
        self.play = widgets.Play(
            0,
            min=0,
            max=0,
            interval=900,
            description="step through the orders",
            tooltip="step through the orders",
        )
        widgets.jslink((self.play, "value"), (self.order, "value"))
        self.page = widgets.BoundedIntText(
            0,
            min=0,
            max=0,
            description="page",
            style={"description_width": "initial"},
            layout=widgets.Layout(width="140px"),
        )
        self.listed = widgets.ToggleButton(
            True,
            description="list the products",
            tooltip="page through the products of this order (slow for long chains)",
            icon="list",
            layout=widgets.Layout(width="170px"),
        )
        self.count = widgets.HTML()
        self.products = widgets.HTMLMath()
        self.products.add_class("freeladder-products")
        self.commutes = widgets.HTML()
        self.transfer = widgets.HTMLMath()
        self.polynomial = widgets.HTMLMath()
        fig, sx, sy, self.guides = complex_plane(
            "roots of P_s(y) as orders are added", "Re y", "Im y", height="330px"
        )
        self.target = bq.Scatter(
            x=[],
            y=[],
            scales={"x": sx, "y": sy},
            colors=[SECOND],
            marker="circle",
            fill=False,
            stroke=SECOND,
            default_size=110,
            stroke_width=1.5,
        )
        self.roots = bq.Scatter(
            x=[],
            y=[],
            scales={"x": sx, "y": sy},
            colors=[ACCENT],
            marker="cross",
            default_size=60,
            names=[],
            display_names=False,
            tooltip=bq.Tooltip(fields=["name"], labels=["root of P_s"]),
        )
        fig.marks = [*fig.marks, self.target, self.roots]
        self.figure = fig
        self.legend = widgets.HTML(
            f'<div style="font-size:12px; color:{INK};">&#10010; roots of P<sub>s</sub> '
            "(certified, python-flint) &#8195; &#9711; roots of the full P</div>"
        )
        left = widgets.VBox(
            [
                widgets.HBox([self.play, self.order]),
                self.count,
                self.commutes,
                self.products,
                widgets.HBox([self.listed, self.page]),
                self.transfer,
                self.polynomial,
            ],
            layout=widgets.Layout(width="52%", padding="0 12px 0 0", overflow="auto"),
        )
        right = widgets.VBox([self.figure, self.legend], layout=widgets.Layout(width="48%"))
        super().__init__([widgets.HBox([left, right])])
        self.order.observe(lambda change: self.show_order(), "value")
        self.page.observe(lambda change: self.show_order(), "value")
        self.listed.observe(lambda change: self.show_order(), "value")

    @property
    def alpha(self) -> int:
        """The highest order alpha(G) of the model on screen."""
        return int(self.order.max)

    def update(self, view: View) -> None:
        """A new model: the order control spans 0..alpha(G).

        It starts at alpha, where P_s = P, when the partial polynomials are drawn; for larger
        models (whose highest orders take long to list) at order 1, Q^(1) = H.
        """
        a = view.analysis
        self._analysis = a
        alpha = len(a.charge_counts) - 1
        start = alpha if alpha <= PARTIAL_DEGREE_LIMIT else min(1, alpha)
        with self.order.hold_trait_notifications():
            self.order.max = alpha
            self.play.max = alpha
            self.order.value = start
            self.page.value = 0
            self.listed.value = len(a.model) <= AUTO_LIST_TERMS
        self.show_order()

    def show_order(self) -> None:
        """Recompute and show the chosen order (in the worker)."""
        a = self._analysis
        if a is None:
            return
        s = min(int(self.order.value), len(a.charge_counts) - 1)
        pages = min(MAX_PAGES, max(0, (a.charge_counts[s] - 1) // PAGE))
        self.page.max = pages
        page = min(int(self.page.value), pages)
        listed = bool(self.listed.value)
        self._host.submit(
            "order", f"order {s}", lambda: order_view(a, s, page, listed), self._apply
        )

    def _apply(self, view: OrderView) -> None:
        if view.analysis is not self._analysis:
            return
        s, count = view.order, view.count
        total = view.analysis.charge_counts
        what = (
            "the identity, Q<sup>(0)</sup> = 1"
            if s == 0
            else "one term each: Q<sup>(1)</sup> is H"
            if s == 1
            else f"{s} mutually commuting terms each"
        )
        self.count.value = (
            f"<b>order {s}</b> of {len(total) - 1}: {_plural(count, 'product')} ({what}; "
            "counted exactly, never listed to count them)"
        )
        few = count <= LATEX_PRODUCTS
        self.page.layout.display = "none" if few or not self.listed.value else ""
        self.listed.layout.display = "none" if few else ""
        self.products.value = view.products_html
        c = view.commutes
        if s == 0:
            self.commutes.value = "[H, Q<sup>(0)</sup>] = 0 trivially (Q<sup>(0)</sup> = 1)"
        elif c is None:
            self.commutes.value = (
                f"[H, Q<sup>({s})</sup>] = 0: not checked here ({count} products); the "
                "checks section decides all orders at once"
            )
        else:
            self.commutes.value = (
                f"[H, Q<sup>({s})</sup>] = 0: <b>{status_words(c.status)}</b> "
                f"({escape(c.method)}; largest residual {c.value:.3g})"
            )
        self.transfer.value = _transfer_latex(s)
        self.polynomial.value = _polynomial_latex(s, view.partial, len(total) - 1)
        roots = np.zeros(0, complex) if view.roots is None else view.roots
        target = np.zeros(0, complex) if view.target is None else view.target
        with self.figure.hold_sync():
            self.roots.x, self.roots.y = roots.real, roots.imag
            self.roots.names = [f"y = {number_text(z)}" for z in roots]
            self.target.x, self.target.y = target.real, target.imag
            origin_guides(self.guides, np.concatenate([roots, target]), self.figure)
