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

import threading
from dataclasses import dataclass
from typing import Any

import ipywidgets as widgets
import traitlets

import freeladder as fl

from .adapter import (
    analyze,
    exact_overlay,
    real_roots_reason,
    sector_choices,
    spectrum_outcome,
)
from .checks_panel import ChecksPanel
from .export import ExportPanel
from .input_panel import InputPanel
from .ladder_panel import LadderPanel
from .roots_panel import RootsPanel
from .series_panel import SeriesPanel
from .style import ACCENT, INK, ROOT_CLASS, WARN, escape, section, text_style
from .verdict_panel import VerdictPanel
from .worker import Worker

__all__ = ["Workbench"]


@dataclass(frozen=True)
class _Derived:
    """Everything the panels draw for one model, gathered in the worker."""

    analysis: fl.Analysis
    answer: fl.SpectrumAnswer
    exact: fl.ExactSpectrum | None
    real_reason: str | None
    choices: list[tuple[str, Any]] | None
    choice: Any


def _derive(a: fl.Analysis, unproven: bool, choice: Any) -> _Derived:
    a.verdict, a.chain, a.charge_counts  # noqa: B018 -- computed here, off the UI (the graph
    # panel asks for the graph itself, only when the strings change)
    choices = sector_choices(a)
    if choices is None:
        choice = None
    elif choice not in [value for _, value in choices]:
        choice = "ground"  # a Jordan-Wigner model with cycles: its ground sector first
    answer = spectrum_outcome(a, choice, unproven)
    return _Derived(a, answer, exact_overlay(a), real_roots_reason(a), choices, choice)


class Workbench(widgets.VBox):
    """One notebook tool: model, verdict and graph, charge series, roots, ladder, checks.

    Parameters
    ----------
    model : Model or str, optional
        A model, or model text in freeladder's syntax.  Without one, the family controls
        build a reach-2 exclusion chain.  A model those controls would not build (as they
        stand, or for a chain with its size, reach and N) sets the family selector to
        "(custom: the model text)" and disables them until a family is picked.
    states : int
        N used to parse text (the states control can change it later).
    synchronous : bool
        Do every computation at once in the caller's thread (scripts, tests, benchmarks);
        by default work runs in a background thread with a busy line and a cancel button.

    Attributes
    ----------
    model : Model
        The model as given (its couplings may be symbols; sliders set their values).
    analysis : freeladder.Analysis
        The analysis of the numeric model on screen.

    Examples
    --------
    >>> import freeladder as fl
    >>> wb = Workbench(fl.exclusion_chain(8, reach=2), synchronous=True)
    >>> wb.series.alpha
    3
    """

    model = traitlets.Instance(fl.Model, allow_none=True)
    analysis = traitlets.Instance(fl.Analysis, allow_none=True)

    def __init__(
        self, model: fl.Model | str | None = None, *, states: int = 2, synchronous: bool = False
    ) -> None:
        self._busy: dict[str, str] = {}  # lane -> what it is doing
        self._busy_lock = threading.Lock()
        self.busy = widgets.HTML()
        self.cancel = widgets.Button(
            description="Cancel",
            icon="stop",
            tooltip="drop the computation in progress",
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
        self._lanes = {
            name: Worker(self._on_busy_for(name), self._on_error, synchronous)
            for name in ("model", "order", "checks")
        }
        self.cancel.on_click(lambda _: self._cancel())

        self.input = InputPanel(self._model_from_input, self._recompute, synchronous, states)
        self.verdict = VerdictPanel()
        self.series = SeriesPanel(self._lanes["order"].submit)
        self.roots = RootsPanel()
        self.ladder = LadderPanel()
        self.checks = ChecksPanel(self.run_checks)
        self.export = ExportPanel(lambda: self.model)
        self.roots.unproven.observe(lambda change: self._recompute(), "value")
        self._showing_sectors = False  # True while _show sets the sector chooser
        self.roots.sector.observe(self._sector_chosen, "value")

        header = widgets.HTML(
            f'<div style="font-size:19px; font-weight:700; color:{INK};">freeladder workbench'
            f'<span style="font-weight:400; font-size:13px; color:{ACCENT};">&#8195;from a sum '
            "of operator strings to its free spectrum, step by step</span></div>"
        )
        lower = widgets.HBox(
            [
                widgets.VBox(
                    [section(5, "Ladder", "lowest many-body levels"), self.ladder],
                    layout=widgets.Layout(width="42%", padding="0 12px 0 0"),
                ),
                widgets.VBox(
                    [section(6, "Checks", "on demand"), self.checks],
                    layout=widgets.Layout(width="58%"),
                ),
            ]
        )
        super().__init__(
            [
                header,
                widgets.HBox([self.busy, self.cancel]),
                self.error,
                self.traceback_box,
                section(1, "Model", "type it, or build it from a family"),
                self.input,
                section(2, "Verdict", "which theorem applies, and why"),
                self.verdict,
                section(3, "Charges and transfer matrix", "order by order"),
                self.series,
                section(4, "Roots and quasi-energies", "hover a point for its bound"),
                self.roots,
                lower,
                section(7, "Export", "the worked, self-verifying calculation as notebook cells"),
                self.export,
            ],
            layout=widgets.Layout(width="100%", max_width="1280px"),
        )
        self.add_class(ROOT_CLASS)
        self.children = (text_style(), *self.children)
        if isinstance(model, str):
            self.set_text(model)
        elif model is not None:
            self.input.show_model_text(model)
            self.input.reflect(model)
            self.model = model
        else:
            self.input.build_family()

    # -- public ------------------------------------------------------------------------------
    def set_text(self, text: str) -> None:
        """Put ``text`` in the model box and parse it, exactly as typing would."""
        self.input.set_text(text)

    def run_checks(self) -> None:
        """Run ``verify`` on the model on screen (in the worker) and show the table."""
        a = self.analysis
        if a is None:
            return
        self._lanes["checks"].submit("running the checks", a.report, self._show_report(a))

    def wait(self, timeout: float | None = None) -> None:
        """Block until background work has finished (for scripts; tests use synchronous)."""
        for lane in self._lanes.values():
            lane.wait(timeout)

    # -- model flow --------------------------------------------------------------------------
    def _model_from_input(self, model: fl.Model, same_strings: bool) -> None:
        if model is self.model:
            self._recompute()
        self.model = model

    @traitlets.observe("model")
    def _model_changed(self, change: dict[str, Any]) -> None:
        new = change["new"]
        if new is None:
            return
        self.input.show_symbols(new)
        self.checks.clear()
        self._recompute()

    def _numeric(self) -> fl.Model:
        m = self.model
        assert m is not None
        return m.subs(self.input.symbol_values(m)) if m.is_symbolic else m

    def _recompute(self) -> None:
        if self.model is None:
            return
        numeric = self._numeric()
        unproven = bool(self.roots.unproven.value)
        choice = self.roots.sector.value

        def compute() -> _Derived:
            # same strings as before: the library reuses graph, verdict and counts
            return _derive(analyze(numeric), unproven, choice)

        self._lanes["model"].submit("analysing the model", compute, self._show)

    def _show(self, d: _Derived) -> None:
        self.error.value = ""
        self.traceback_box.layout.display = "none"
        self.analysis = d.analysis
        self.verdict.show(d.analysis)
        self._showing_sectors = True
        try:
            self.roots.show_sector_choices(d.choices, d.choice)
        finally:
            self._showing_sectors = False
        self.roots.show(d.answer, d.real_reason)
        self.ladder.show(d.answer, d.exact, d.analysis.model.states)
        self.series.show(d.analysis)

    def _sector_chosen(self, change: dict[str, Any]) -> None:
        if not self._showing_sectors:
            self._recompute()

    def _show_report(self, a: fl.Analysis) -> Any:
        def apply(report: fl.Report) -> None:
            if a is self.analysis:
                self.checks.show(report)

        return apply

    # -- busy, cancel, errors ------------------------------------------------------------------
    def _on_busy_for(self, lane: str) -> Any:
        def on_busy(flag: bool, what: str) -> None:
            with self._busy_lock:
                if flag:
                    self._busy[lane] = what
                else:
                    self._busy.pop(lane, None)
                shown = [self._busy[k] for k in sorted(self._busy)]
            self.busy.value = (
                f'<span role="status" style="color:{ACCENT};">&#8987; working: '
                f"{escape(', '.join(shown))}&hellip;</span>"
                if shown
                else ""
            )
            self.cancel.layout.display = "" if shown else "none"

        return on_busy

    def _cancel(self) -> None:
        for lane in self._lanes.values():
            lane.cancel()
        self.busy.value = (
            f'<span role="status" style="color:{WARN};">cancelled: the views keep the last '
            "finished result</span>"
        )

    def _on_error(self, message: str, trace: str) -> None:
        self.error.value = (
            f'<div role="alert" style="color:{WARN}; border-left:4px solid {WARN};'
            f' padding-left:8px;"><b>&#9888; The computation failed:</b> {escape(message)}'
            "<br>The views keep the last finished result; the traceback is below.</div>"
        )
        self.traceback.value = trace
        self.traceback_box.layout.display = ""
