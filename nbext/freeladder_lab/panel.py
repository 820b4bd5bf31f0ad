"""The shape every Workbench section has: one file, one class, one ``update(view)``.

A section is a widget class with a title, a one-line hint, a width ("full", or a share of the
row such as "42%": consecutive sections that are not full width share a row), an
``attach(host)`` class method that builds it for a Workbench, and ``update(view)``, called
with the :class:`~freeladder_lab.adapter.View` of every model the Workbench shows.  The
Workbench lists its sections in one tuple (``workbench.SECTIONS``): a new section is a new
file and one line there.

The :class:`Host` is what a section may ask of the Workbench: run work in its one worker,
recompute the view, hand over a new model, run the checks, and read the model on screen.
"""

from __future__ import annotations

from collections.abc import Callable
from typing import Any, ClassVar, Protocol

import ipywidgets as widgets

from .adapter import Model, View

__all__ = ["Host", "Section"]


class Host(Protocol):
    """What the Workbench offers its sections."""

    synchronous: bool

    def submit(
        self,
        lane: str,
        what: str,
        compute: Callable[[], Any],
        apply: Callable[[Any], Any],
        delay: float = 0.0,
        quiet: bool = False,
    ) -> Any:
        """Run ``compute`` in the worker (newest per lane wins), then ``apply`` its result."""

    def recompute(self) -> None:
        """Derive the view again (a slider or an option changed, the model did not)."""

    def take_model(self, model: Model) -> None:
        """A new model from the input section."""

    def run_checks(self) -> None:
        """Run ``verify`` on the model on screen and show the report."""

    def shown(self) -> View | None:
        """The view on screen (None before the first model)."""


class Section(widgets.VBox):
    """Base class of the Workbench's sections (see the module docstring)."""

    TITLE: ClassVar[str] = ""
    HINT: ClassVar[str] = ""
    WIDTH: ClassVar[str] = "full"

    @classmethod
    def attach(cls, host: Host) -> Section:
        """Build the section for ``host``."""
        raise NotImplementedError

    def update(self, view: View) -> None:
        """Show ``view``: the model on screen changed, or its couplings, or the options."""
        raise NotImplementedError
