"""The Workbench: type or build a Hamiltonian and watch its derivation follow, section by section.

The widget holds a :class:`freeladder.Model` (``Workbench.model``) and the analysis of its
numeric version (``Workbench.analysis``) in traitlets; every panel draws what the analysis
holds.  Nothing here computes physics: every number comes from ``freeladder`` through
:mod:`freeladder_lab.adapter`.

References
----------
P. Fendley, J. Phys. A 52, 335002 (2019); S. J. Elman, A. Chapman and S. T. Flammia, Commun.
Math. Phys. 388, 969 (2021); F. C. Alcaraz and R. A. Pimenta, Phys. Rev. B 102, 121101(R)
(2020).
"""

from __future__ import annotations

from collections.abc import Callable
from typing import Any

import ipywidgets as widgets
import traitlets

from .adapter import Analysis, Model, View, derive, numeric_model
from .checks_panel import ChecksPanel
from .dynamics_panel import DynamicsPanel
from .export import ExportPanel
from .input_panel import InputPanel
from .ladder_panel import LadderPanel
from .panel import Section
from .roots_panel import RootsPanel
from .series_panel import SeriesPanel
from .style import ACCENT, INK, ROOT_CLASS, WARN, escape, section, text_style
from .verdict_panel import VerdictPanel
from .worker import Job, Worker

__all__ = ["SECTIONS", "Workbench"]

#: The Workbench's sections, in order: one line each.  Each is a
#: :class:`~freeladder_lab.panel.Section` (``attach(host)``, ``update(view)``); consecutive
#: sections that are not full width share a row.
SECTIONS: tuple[tuple[str, type[Section]], ...] = (
    ("input", InputPanel),
    ("verdict", VerdictPanel),
    ("series", SeriesPanel),
    ("roots", RootsPanel),
    ("ladder", LadderPanel),
    ("checks", ChecksPanel),
    ("dynamics", DynamicsPanel),
    ("export", ExportPanel),
)

#: Lanes whose work is about the model on screen: a new model (or new options) cancels them, so
#: they do not keep a core busy while the new view is derived.
_OF_THE_SHOWN_MODEL = ("order", "checks", "dynamics")


class Workbench(widgets.VBox):
    """One notebook tool: model, verdict and graph, charge series, roots, ladder, checks.

    Parameters
    ----------
    model : Model or str, optional
        A model, or model text in freeladder's syntax.  Without one, the family controls
        build a reach-2 exclusion chain.  A model those controls would not build (as they
        stand, or for a chain with its size, reach and N, uniform or staggered couplings) sets
        the family selector to "(custom: the model text)" and hides them until a family is
        picked.
    states : int
        N used to parse text (the states control can change it later).
    synchronous : bool
        Do every computation at once in the caller's thread (scripts, tests, benchmarks);
        by default work runs in a background thread with a busy line and a cancel button.

    Attributes
    ----------
    model : Model
        The model the views show (its couplings may be symbols; sliders set their values).
        It changes only when the views do: after a failed computation it is still the model
        on screen.
    analysis : freeladder.Analysis
        The analysis of the numeric model on screen.
    sections : dict
        The sections by name (see :data:`SECTIONS`); each is also an attribute of that name.

    Examples
    --------
    >>> import freeladder as fl
    >>> wb = Workbench(fl.exclusion_chain(8, reach=2), synchronous=True)
    >>> wb.series.alpha
    3
    """

    model = traitlets.Instance(Model, allow_none=True)
    analysis = traitlets.Instance(Analysis, allow_none=True)

    def __init__(
        self, model: Model | str | None = None, *, states: int = 2, synchronous: bool = False
    ) -> None:
        self.synchronous = synchronous
        self.states = states
        self._view: View | None = None
        self._pending: Model | None = None  # the model being computed, before it is shown
        self._applying = False  # True while _show sets the model trait
        self.busy = widgets.HTML()
        self.cancel = widgets.Button(
            description="Cancel",
            icon="stop",
            tooltip="stop the computation in progress",
            layout=widgets.Layout(width="100px", display="none"),
        )
        self.error = widgets.HTML()
        self.traceback = widgets.Textarea(
            layout=widgets.Layout(width="100%", height="160px"), disabled=True
        )
        self.traceback_box = widgets.Accordion(
            children=[self.traceback],
            titles=("traceback",),
            layout=widgets.Layout(display="none"),
        )
        self.worker = Worker(self._on_busy, self._on_error, synchronous)
        self.cancel.on_click(lambda _: self._cancel())
        self.sections: dict[str, Section] = {}
        for name, kind in SECTIONS:
            self.sections[name] = kind.attach(self)
        header = widgets.HTML(
            f'<div style="font-size:19px; font-weight:700; color:{INK};">freeladder workbench'
            f'<span style="font-weight:400; font-size:13px; color:{ACCENT};">&#8195;from a sum '
            "of operator strings to its free spectrum, step by step</span></div>"
        )
        super().__init__(
            [
                text_style(),
                header,
                widgets.HBox([self.busy, self.cancel]),
                self.error,
                self.traceback_box,
                *_layout(self.sections),
            ],
            layout=widgets.Layout(width="100%", max_width="1280px"),
        )
        self.add_class(ROOT_CLASS)
        if isinstance(model, str):
            self.set_text(model)
        elif model is not None:
            self.input.show_model_text(model)
            self.input.reflect(model)
            self.take_model(model)
        else:
            self.input.build_family()

    def __getattr__(self, name: str) -> Any:
        sections = self.__dict__.get("sections", {})
        if name in sections:
            return sections[name]
        raise AttributeError(name)

    # -- public ------------------------------------------------------------------------------
    def set_text(self, text: str) -> None:
        """Put ``text`` in the model box and parse it, exactly as typing would."""
        self.input.set_text(text)

    def run_checks(self) -> None:
        """Run ``verify`` on the model on screen (in the worker) and show the table."""
        view = self._view
        if view is None:
            return
        a = view.analysis

        def apply(report: Any) -> None:
            if self._view is not None and self._view.analysis is a:
                self.checks.show(report)

        self.worker.submit("checks", "running the checks", a.report, apply)

    def wait(self, timeout: float | None = None) -> None:
        """Block until background work has finished (for scripts; tests use synchronous)."""
        self.worker.wait(timeout)

    # -- the host of the sections --------------------------------------------------------------
    def submit(
        self,
        lane: str,
        what: str,
        compute: Callable[[], Any],
        apply: Callable[[Any], Any],
        delay: float = 0.0,
        quiet: bool = False,
    ) -> Job:
        """Run ``compute`` in the Workbench's worker (newest request per lane wins)."""
        return self.worker.submit(lane, what, compute, apply, delay=delay, quiet=quiet)

    def shown(self) -> View | None:
        """The view on screen (None before the first model)."""
        return self._view

    def take_model(self, model: Model) -> None:
        """A new model: compute its view; the views and :attr:`model` change together."""
        self._pending = model
        self.recompute()

    def recompute(self) -> None:
        """Derive the view of the current model again with the current options."""
        model = self._pending if self._pending is not None else self.model
        if model is None:
            return
        numeric = numeric_model(model, self.input.symbol_values())
        options = self.roots.options()

        def compute() -> View:
            return derive(model, numeric, options["unproven"], options["sector"])

        for lane in _OF_THE_SHOWN_MODEL:  # their results would be dropped once the new view shows
            self.worker.cancel(lane)
        self.submit("model", "analysing the model", compute, self._show)

    # -- model flow --------------------------------------------------------------------------
    @traitlets.observe("model")
    def _model_set(self, change: dict[str, Any]) -> None:
        """``wb.model = m`` from outside works like typing ``m``."""
        if not self._applying and change["new"] is not None:
            self.take_model(change["new"])

    def _show(self, view: View) -> None:
        self.error.value = ""
        self.traceback_box.layout.display = "none"
        self._view = view
        self._pending = None
        self._applying = True
        try:
            self.model = view.model
            self.analysis = view.analysis
        finally:
            self._applying = False
        for section_ in self.sections.values():
            section_.update(view)

    # -- busy, cancel, errors ------------------------------------------------------------------
    def _on_busy(self, busy: dict[str, str]) -> None:
        shown = [busy[k] for k in sorted(busy)]
        self.busy.value = (
            f'<span role="status" style="color:{ACCENT};">&#8987; working: '
            f"{escape(', '.join(shown))}&hellip;</span>"
            if shown
            else ""
        )
        self.cancel.layout.display = "" if shown else "none"

    def _cancel(self) -> None:
        self.worker.cancel()
        self._pending = None
        self.busy.value = (
            f'<span role="status" style="color:{WARN};">cancelled: the views keep the last '
            "finished result</span>"
        )

    def _on_error(self, message: str, trace: str) -> None:
        self._pending = None
        self.error.value = (
            f'<div role="alert" style="color:{WARN}; border-left:4px solid {WARN};'
            f' padding-left:8px;"><b>&#9888; The computation failed:</b> {escape(message)}'
            "<br>The views keep the last finished result (and <code>.model</code> the model "
            "they show); the traceback is below.</div>"
        )
        self.traceback.value = trace
        self.traceback_box.layout.display = ""


def _layout(sections: dict[str, Section]) -> list[widgets.Widget]:
    """Each section under its numbered heading; consecutive ones that are not full width share
    a row."""
    out: list[widgets.Widget] = []
    row: list[widgets.Widget] = []
    for number, part in enumerate(sections.values(), start=1):
        block = widgets.VBox([section(number, part.TITLE, part.HINT), part])
        if part.WIDTH != "full":
            block.layout = widgets.Layout(width=part.WIDTH, padding="0 12px 0 0")
            row.append(block)
            continue
        if row:
            out.append(widgets.HBox(row))
            row = []
        out.append(block)
    if row:
        out.append(widgets.HBox(row))
    return out
