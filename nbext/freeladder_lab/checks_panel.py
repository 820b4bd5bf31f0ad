"""Section 6 of the Workbench: the ``verify`` report as a table, run on demand."""

from __future__ import annotations

from collections.abc import Callable
from typing import Any

import ipywidgets as widgets

import freeladder as fl

from .style import INK, WARN, escape, status_words

__all__ = ["ChecksPanel", "report_html"]

_HEAD = ("check", "method", "tolerance", "value", "result", "time")
# short columns stay on one line; the method wraps in a smaller font.  The reference goes in the
# detail line below each check, so that the table fits the half-width column it shares.
_WRAP = (
    "",
    " font-size:11.5px;",
    " white-space:nowrap;",
    " white-space:nowrap;",
    " white-space:nowrap;",
    " white-space:nowrap;",
)


class ChecksPanel(widgets.VBox):
    """A button that runs every check that applies, and the table of their results.

    Parameters
    ----------
    run : callable()
        Asks the Workbench to run the report in its worker and call :meth:`show` with it.
    """

    def __init__(self, run: Callable[[], Any]) -> None:
        self.button = widgets.Button(
            description="Run the checks",
            tooltip="verify the current model: every check that applies, with its method",
            icon="check-square",
            layout=widgets.Layout(width="180px"),
        )
        self.button.on_click(lambda _: run())
        self.table = widgets.HTML(
            "<i>Not run yet for this model. The checks compare the free spectrum with exact "
            "identities and, for small models, exact diagonalization.</i>"
        )
        self.report: fl.Report | None = None
        super().__init__([self.button, self.table])

    def clear(self) -> None:
        """A new model: the old report no longer applies."""
        self.report = None
        self.table.value = "<i>Not run yet for this model.</i>"

    def show(self, report: fl.Report) -> None:
        """Show ``report`` as a table."""
        self.report = report
        self.table.value = report_html(report)


def report_html(report: fl.Report) -> str:
    """The report as an HTML table; the result column is in words and symbols."""
    head = "".join(f"<th style='text-align:left; padding:2px 8px'>{h}</th>" for h in _HEAD)
    rows = []
    for c in report.checks:
        colour = WARN if c.passed is False else INK
        cells = (
            escape(c.name),
            escape(c.method),
            f"{c.tolerance:.3g}",
            f"{c.value:.3g}",
            f"<b style='color:{colour}'>{status_words(c.passed)}</b>",
            f"{c.seconds:.2f} s",
        )
        rows.append(
            "<tr style='border-top:1px solid #d6dde0'>"
            + "".join(
                f"<td style='padding:2px 8px; vertical-align:top;{_WRAP[k]}'>{x}</td>"
                for k, x in enumerate(cells)
            )
            + "</tr>"
            + f"<tr><td></td><td colspan='5' style='padding:0 8px 4px 8px; font-size:11.5px;"
            f" color:#4f5d64'>{escape(c.detail)}<br>reference: {escape(c.reference)}"
            f"{_traceback(c)}</td></tr>"
        )
    ran = [c for c in report.checks if c.passed is not None]
    failed = [c for c in ran if not c.passed]
    verdict = (
        "&#10007; some checks FAILED"
        if failed
        else ("&#10003; every check that ran passed" if ran else "&#8211; no check could run")
    )
    notes = "".join(f"<div>{escape(n)}</div>" for n in report.notes)
    return (
        f"<div style='font-weight:600; margin:4px 0'>{verdict} "
        f"({len(ran)} ran, {len(report.checks) - len(ran)} not run)</div>"
        "<table style='border-collapse:collapse; font-size:12.5px; width:100%'>"
        f"<tr>{head}</tr>{''.join(rows)}</table>"
        f"<div style='font-size:12px; margin-top:4px'>{notes}</div>"
    )


def _traceback(c: fl.Check) -> str:
    """A crashed check's traceback, folded (a crash counts as a failure)."""
    text = c.traceback
    if not text:
        return ""
    return (
        "<details><summary>traceback of the crash</summary>"
        f"<pre style='font-size:11px; white-space:pre-wrap'>{escape(text)}</pre></details>"
    )
