"""Section 1 of the Workbench: the model, typed in our text syntax or built from a family."""

from __future__ import annotations

import ipywidgets as widgets

from .adapter import Model, ModelSyntaxError, View, chain_reach, parse_text, term_text
from .panel import Host, Section
from .presets import FAMILIES, CouplingPattern, build, factors_of, pattern_values, scaled
from .style import WARN, escape

__all__ = ["CUSTOM", "DEBOUNCE_SECONDS", "TABLE_LIMIT", "InputPanel", "SLIDER_LIMIT"]

DEBOUNCE_SECONDS = 0.4
#: Largest number of terms for which the per-term table is offered.
TABLE_LIMIT = 48
#: Largest number of symbols that get a slider each.
SLIDER_LIMIT = 12
_TEXT_SHOWN = 400  # longest model (terms) whose text is written into the text area
#: The family selector's entry for a model the family controls did not build (typed text or a
#: model passed in): the size, reach and coupling controls are hidden until a family is picked.
CUSTOM = "(custom: the model text)"
_CUSTOM_NOTE = (
    "<i>The model is the text on the left, not one the family controls build. Pick a family"
    " to build one instead (it replaces the text).</i>"
)


def _labelled(widget: widgets.Widget, label: str) -> widgets.Widget:
    widget.description = label
    widget.style = {"description_width": "initial"}
    return widget


class InputPanel(Section):
    """Text area with inline errors, family presets, coupling patterns and symbol sliders.

    Parameters
    ----------
    host : Host
        The Workbench: it takes each new model (``take_model``), recomputes when a symbol
        slider moves, and runs the pause after typing in its worker.
    states : int
        The initial N (for typed text and the families that take it).
    """

    TITLE = "Model"
    HINT = "type it, or build it from a family"

    @classmethod
    def attach(cls, host: Host) -> InputPanel:
        """The section for ``host`` (N starts at the host's ``states``)."""
        return cls(host, int(getattr(host, "states", 2)))

    def __init__(self, host: Host, states: int = 2) -> None:
        self._host = host
        self._quiet = False  # True while the panel writes the text area itself
        self._base: Model | None = None  # the family's model before the coupling pattern

        self.text = widgets.Textarea(
            placeholder="e.g.  0.9 X0 Z1 Z2 + g X1 Z2 Z3 - 0.4 X2 Z3 Z4",
            layout=widgets.Layout(width="100%", height="92px"),
            continuous_update=True,
        )
        self.text_label = widgets.HTML(
            "<b>Model text</b> &mdash; a sum of operator strings; parsed as you type"
        )
        self.message = widgets.HTML("")
        self.family = _labelled(
            widgets.Dropdown(
                options=[CUSTOM, *FAMILIES],
                value=next(iter(FAMILIES)),
                layout=widgets.Layout(width="auto"),
            ),
            "family",
        )
        self.family_note = widgets.HTML("")
        lo, hi, default = FAMILIES[self.family.value].size_range
        self.size = _labelled(widgets.IntSlider(default, min=lo, max=hi), "terms M")
        self.reach = _labelled(widgets.IntSlider(2, min=1, max=6), "reach p")
        self.states = _labelled(widgets.IntSlider(states, min=2, max=8), "states N")
        self.pattern = _labelled(
            widgets.Dropdown(
                options=[
                    ("uniform", "uniform"),
                    ("staggered a, b, a, b ...", "staggered"),
                    ("seeded random", "random"),
                    ("per-term table", "table"),
                    ("symbols a, b with sliders", "symbols"),
                ]
            ),
            "couplings",
        )
        self.a = _labelled(widgets.FloatText(1.0, layout=widgets.Layout(width="150px")), "a")
        self.b = _labelled(widgets.FloatText(0.5, layout=widgets.Layout(width="150px")), "b")
        self.low = _labelled(widgets.FloatText(0.5, layout=widgets.Layout(width="150px")), "low")
        self.high = _labelled(widgets.FloatText(1.5, layout=widgets.Layout(width="150px")), "high")
        self.seed = _labelled(widgets.IntText(7, layout=widgets.Layout(width="150px")), "seed")
        self.complex_phase = widgets.Checkbox(False, description="random phases (complex)")
        self.table = widgets.GridBox(
            layout=widgets.Layout(grid_template_columns="repeat(4, 1fr)", width="100%")
        )
        self.sliders = widgets.VBox()
        self._sliders: dict[str, widgets.FloatSlider] = {}  # by symbol name
        self.pattern_box = widgets.HBox(layout=widgets.Layout(flex_flow="row wrap"))

        left = widgets.VBox(
            [self.text_label, self.text, self.message, self.sliders],
            layout=widgets.Layout(width="56%", padding="0 12px 0 0"),
        )
        right = widgets.VBox(
            [
                widgets.HTML("<b>Or build from a family</b> (replaces the model)"),
                self.family,
                self.family_note,
                self.size,
                self.reach,
                self.states,
                self.pattern,
                self.pattern_box,
                self.table,
            ],
            layout=widgets.Layout(width="44%"),
        )
        super().__init__([widgets.HBox([left, right])])
        self.parsed_once = False  # whether any model reached the views

        self.text.observe(self._typed, "value")
        self.family.observe(self._family_changed, "value")
        for w in (self.size, self.reach):
            w.observe(self._structure_changed, "value")
        self.states.observe(self._states_changed, "value")
        self.pattern.observe(self._pattern_changed, "value")
        for w in (self.a, self.b, self.low, self.high, self.seed, self.complex_phase):
            w.observe(self._couplings_changed, "value")
        self._show_pattern_controls()

    # -- text --------------------------------------------------------------------------------
    def set_text(self, text: str) -> None:
        """Write ``text`` into the text area and parse it at once (what typing does)."""
        self._quiet = True
        try:
            self.text.value = text
        finally:
            self._quiet = False
        self.parse_now()

    def update(self, view: View) -> None:
        """A model reached the views: one slider per symbol it has."""
        self.parsed_once = True
        self.show_symbols(view.model)

    def _typed(self, change: dict) -> None:
        if self._quiet:
            return
        # parse after a pause in typing: a newer keystroke supersedes the waiting parse
        self._host.submit(
            "typing",
            "reading the text",
            lambda: None,
            lambda _: self.parse_now(),
            delay=DEBOUNCE_SECONDS,
            quiet=True,
        )

    def _kept(self) -> str:
        """What the views show while the text does not parse."""
        if self.parsed_once:
            return "The views below still show the last model that parsed."
        return "No model has parsed yet: the views below are empty until one does."

    def parse_now(self) -> None:
        """Parse the text area; show the error inline and keep the last good model on failure."""
        text = self.text.value
        try:
            model = parse_text(text, self.states.value)
        except ModelSyntaxError as exc:
            self._not_parsed()
            self.show_syntax_error(exc)
            return
        except ValueError as exc:
            self._not_parsed()
            self.show_problem(str(exc))
            return
        if len(model) == 0:
            self._not_parsed()
            self.show_problem("the text has no operator terms (a constant alone has no spectrum)")
            return
        self.message.value = ""
        self.reflect(model)
        self._host.take_model(model)

    def _not_parsed(self) -> None:
        """Typed text that never parsed: the family controls do not claim a model."""
        if not self.parsed_once:
            self._base = None
            self._show_custom()

    def show_syntax_error(self, exc: ModelSyntaxError) -> None:
        """The parser's message with the offending line and a caret under the column."""
        lines = exc.text.split("\n")
        source = lines[exc.line - 1] if exc.line - 1 < len(lines) else ""
        caret = " " * (exc.column - 1) + "^"
        self.message.value = (
            f'<div role="alert" style="color:{WARN}; border-left: 4px solid {WARN};'
            f' padding-left: 8px;"><b>&#9888; Not parsed</b> (line {exc.line}, column'
            f" {exc.column}): {escape(exc.problem)}"
            f'<pre style="margin:2px 0; color:inherit;">{escape(source)}\n{escape(caret)}</pre>'
            f"{self._kept()}</div>"
        )

    def show_problem(self, text: str) -> None:
        """A model-level problem (not a syntax error), shown the same way."""
        self.message.value = (
            f'<div role="alert" style="color:{WARN}; border-left: 4px solid {WARN};'
            f' padding-left: 8px;"><b>&#9888; Not used:</b> {escape(text)}<br>'
            f"{self._kept()}</div>"
        )

    def show_model_text(self, model: Model) -> None:
        """Write a model built elsewhere into the text area without re-parsing it."""
        self._quiet = True
        try:
            if len(model) <= _TEXT_SHOWN:
                self.text.value = str(model)
            else:
                self.text.value = (
                    f"# {len(model)} terms (text not shown);\n# type a model here to replace it"
                )
            self.message.value = ""
        finally:
            self._quiet = False

    def reflect(self, model: Model) -> None:
        """Make the family controls say whether they build ``model`` (typed or passed in).

        When the model is an exclusion chain and the family shown is the chain family, the
        size, reach and states controls are first set to match it.  If the controls, as set,
        build exactly this model (same strings and couplings), they stay in charge: moving one
        of them changes this model.  Otherwise the family selector shows :data:`CUSTOM` and
        the size, reach and coupling controls are hidden until a family is picked.
        """
        self._base = None
        if self.family.value == CUSTOM:
            return
        self._quiet = True
        try:
            self._match_controls(model)
            base = build(self.family.value, self.size.value, self.reach.value, self.states.value)
            self._match_pattern(model, base)
            built = scaled(base, pattern_values(self._pattern(), len(base)))
        except ValueError:
            built = None
        finally:
            self._quiet = False
        if built is not None and built.states == model.states and str(built) == str(model):
            self._base = base
        else:
            self._show_custom()

    def _show_custom(self) -> None:
        """The selector on :data:`CUSTOM`, the build controls hidden, a note saying why.

        The states control stays: N still applies, it reads the text again.
        """
        self._quiet = True
        try:
            self.family.value = CUSTOM
        finally:
            self._quiet = False
        for w in self._build_controls():
            w.layout.display = "none"
        self.states.disabled = False
        self.table.layout.display = "none"
        self.family_note.value = _CUSTOM_NOTE

    def _build_controls(self) -> list[widgets.Widget]:
        return [self.size, self.reach, self.pattern, self.pattern_box]

    def _match_controls(self, model: Model) -> None:
        """Set the chain family's controls to an exclusion chain's size, reach and N (quietly)."""
        if not FAMILIES[self.family.value].has_reach:
            return
        reach = chain_reach(model)
        if reach is None:
            return
        for control, value in (
            (self.size, len(model)),
            (self.reach, reach),
            (self.states, model.states),
        ):
            if control.min <= value <= control.max:
                control.value = value

    def _match_pattern(self, model: Model, base: Model) -> None:
        """Set a uniform or staggered pattern (a, b) that turns ``base`` into ``model`` (quietly);
        leave the pattern alone when neither does."""
        factors = factors_of(model, base)
        if not factors or any(f.imag != 0 for f in factors):
            return
        real = [f.real for f in factors]
        a, b = real[0], real[1] if len(real) > 1 else real[0]
        if all(f == a for f in real):
            self.pattern.value, self.a.value = "uniform", a
        elif all(f == (a if j % 2 == 0 else b) for j, f in enumerate(real)):
            self.pattern.value, self.a.value, self.b.value = "staggered", a, b

    # -- families and couplings ----------------------------------------------------------------
    def _family_changed(self, change: dict) -> None:
        if self._quiet:
            return
        if change["new"] == CUSTOM:  # keep the model; the text is in charge from now on
            self._base = None
            self._show_custom()
            return
        fam = FAMILIES[self.family.value]
        lo, hi, default = fam.size_range
        self._quiet = True
        try:
            current = self.size.value
            keep = change["old"] == CUSTOM and lo <= current <= hi
            self.size.min, self.size.max = lo, hi
            self.size.value = current if keep else default
            if fam.label == "clock":
                self.states.value = max(self.states.value, 3)
        finally:
            self._quiet = False
        for w in self._build_controls():
            w.layout.display = ""
        self.family_note.value = ""
        self.size.description = fam.size_label
        self.reach.disabled = not fam.has_reach
        self.states.disabled = not fam.has_states
        self.build_family()

    def _structure_changed(self, change: dict) -> None:
        if not self._quiet:
            self.build_family()

    def _states_changed(self, change: dict) -> None:
        """N changed: read the typed text again with the new N, or rebuild the family."""
        if self._quiet:
            return
        if self._base is None and self.text.value.strip():
            self.parse_now()
        else:
            self.build_family()

    def _pattern_changed(self, change: dict) -> None:
        self._show_pattern_controls()
        self._couplings_changed(change)

    def _show_pattern_controls(self) -> None:
        kind = self.pattern.value
        controls = {
            "uniform": [self.a],
            "staggered": [self.a, self.b],
            "random": [self.low, self.high, self.seed, self.complex_phase],
            "table": [],
            "symbols": [],
        }[kind]
        self.pattern_box.children = controls

    def _couplings_changed(self, change: dict) -> None:
        if self._quiet:
            return
        if self._base is None:
            self.build_family()
        else:
            self._apply_pattern()

    def build_family(self) -> None:
        """Build the chosen family at the chosen size and apply the coupling pattern."""
        if self.family.value == CUSTOM:
            return  # the text is in charge until a family is picked
        try:
            self._base = build(
                self.family.value, self.size.value, self.reach.value, self.states.value
            )
        except ValueError as exc:
            self.show_problem(str(exc))
            return
        self._fill_table()
        self._apply_pattern()

    def _fill_table(self) -> None:
        base = self._base
        if base is None or len(base) > TABLE_LIMIT:
            self.table.children = []
            return
        cells = []
        for j, term in enumerate(base.terms):
            cell = widgets.Text(
                "1",
                description=f"{j}: {term_text(term.string)}",
                style={"description_width": "initial"},
                layout=widgets.Layout(width="auto"),
                continuous_update=False,
            )
            cell.observe(self._couplings_changed, "value")
            cells.append(cell)
        self.table.children = cells

    def _pattern(self) -> CouplingPattern:
        values: tuple[complex, ...] = ()
        if self.pattern.value == "table":
            if self._base is not None and len(self._base) > TABLE_LIMIT:
                raise ValueError(
                    f"the per-term table is offered up to {TABLE_LIMIT} terms; this model has "
                    f"{len(self._base)} (type the couplings in the text instead)"
                )
            parsed = []
            for j, cell in enumerate(self.table.children):
                try:
                    parsed.append(complex(cell.value.replace(" ", "")))
                except ValueError:
                    raise ValueError(
                        f"table entry {j} is {cell.value!r}, not a number (write 0.5 or 0.3+0.2j)"
                    ) from None
            values = tuple(v.real if v.imag == 0 else v for v in parsed)
        return CouplingPattern(
            kind=self.pattern.value,
            a=self.a.value,
            b=self.b.value,
            low=self.low.value,
            high=self.high.value,
            seed=self.seed.value,
            complex_phase=self.complex_phase.value,
            values=values,
        )

    def _apply_pattern(self) -> None:
        base = self._base
        if base is None:
            return
        self.table.layout.display = "" if self.pattern.value == "table" else "none"
        try:
            model = scaled(base, pattern_values(self._pattern(), len(base)))
        except ValueError as exc:
            self.show_problem(str(exc))
            return
        self.show_model_text(model)
        self._host.take_model(model)

    # -- symbols -----------------------------------------------------------------------------
    def show_symbols(self, model: Model) -> None:
        """One slider per symbol of ``model`` (kept at their values when the names stay)."""
        names = sorted(str(s) for s in model.symbols)
        old = self._sliders
        if len(names) > SLIDER_LIMIT:
            self._sliders = {}
            self.sliders.children = [
                widgets.HTML(
                    f"{len(names)} symbols: sliders are offered for up to {SLIDER_LIMIT}; "
                    "every symbol is set to 1."
                )
            ]
            return
        if sorted(old) == names:
            return
        sliders = []
        for name in names:
            slider = old.get(name) or widgets.FloatSlider(
                1.0,
                min=-3.0,
                max=3.0,
                step=0.01,
                description=name,
                continuous_update=True,
                style={"description_width": "initial"},
                layout=widgets.Layout(width="95%"),
            )
            if name not in old:
                slider.observe(lambda change: self._host.recompute(), "value")
            sliders.append(slider)
        head = [widgets.HTML("<b>Symbol values</b>")] if sliders else []
        self._sliders = dict(zip(names, sliders, strict=True))
        self.sliders.children = head + sliders

    def symbol_values(self) -> dict[str, float]:
        """The value each slider sets, by symbol name (a symbol without one is 1)."""
        return {name: float(s.value) for name, s in self._sliders.items()}
