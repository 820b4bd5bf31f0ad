"""Section 6 of the Workbench: the ``verify`` report as a table, run on demand.

Each row shows the check's own status in words (passed, FAILED, not run, does not hold: an
identity the theorem covering the model does not claim); the headline is the report's
``ok``, never a count of rows.
"""

from __future__ import annotations

from typing import Any

import ipywidgets as widgets

from .adapter import Report, View
from .panel import Host, Section
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


class ChecksPanel(Section):
    """A button that runs every check that applies, and the table of their results.

    Parameters
    ----------
    host : Host
        Its ``run_checks`` runs the report in the Workbench's worker and calls :meth:`show`.
    """

    TITLE = "Checks"
    HINT = "on demand"
    WIDTH = "58%"

    @classmethod
    def attach(cls, host: Host) -> ChecksPanel:
        """The section for ``host``."""
        return cls(host)

    def __init__(self, host: Host) -> None:
        self.button = widgets.Button(
            description="Run the checks",
            tooltip="verify the current model: every check that applies, with its method",
            icon="check-square",
            layout=widgets.Layout(width="180px"),
        )
        self.button.on_click(lambda _: host.run_checks())
        self.table = widgets.HTML(
            "<i>Not run yet for this model. The checks compare the free spectrum with exact "
            "identities and, for small models, exact diagonalization.</i>"
        )
        self.report: Report | None = None
        self._model: Any = None  # the numeric model the report is for
        super().__init__([self.button, self.table])

    def update(self, view: View) -> None:
        """A new model or new couplings: the old report no longer applies."""
        if view.analysis.model is not self._model:
            self._model = view.analysis.model
            self.report = None
            self.table.value = "<i>Not run yet for this model.</i>"

    def show(self, report: Report) -> None:
        """Show ``report`` as a table."""
        self.report = report
        self.table.value = report_html(report)


def report_html(report: Report) -> str:
    """The report as an HTML table; the result column is the check's status in words and
    symbols, the headline the report's ``ok`` (with its problems when not ok)."""
    head = "".join(f"<th style='text-align:left; padding:2px 8px'>{h}</th>" for h in _HEAD)
    rows = []
    for c in report.checks:
        colour = WARN if c.status == "FAILED" else INK
        cells = (
            escape(c.name),
            escape(c.method),
            f"{c.tolerance:.3g}",
            f"{c.value:.3g}",
            f"<b style='color:{colour}'>{status_words(c.status)}</b>",
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
    statuses = [c.status for c in report.checks]
    counts = ", ".join(
        f"{statuses.count(word)} {word}"
        for word in ("passed", "FAILED", "does not hold", "not run")
        if word in statuses
    )
    if report.ok:
        verdict = f"&#10003; verified: every check that ran passed ({counts})"
        colour = INK
    else:
        problems = "; ".join(report.problems)
        verdict = f"&#10007; not verified: {escape(problems)} ({counts})"
        colour = WARN
    notes = "".join(f"<div>{escape(n)}</div>" for n in report.notes)
    return (
        f"<div class='freeladder-checks-headline' style='font-weight:600; margin:4px 0;"
        f" color:{colour}'>{verdict}</div>"
        "<table style='border-collapse:collapse; font-size:12.5px; width:100%'>"
        f"<tr>{head}</tr>{''.join(rows)}</table>"
        f"<div style='font-size:12px; margin-top:4px'>{notes}</div>"
    )


def _traceback(c: Any) -> str:
    """A crashed check's traceback, folded (a crash counts as a failure)."""
    text = c.traceback
    if not text:
        return ""
    return (
        "<details><summary>traceback of the crash</summary>"
        f"<pre style='font-size:11px; white-space:pre-wrap'>{escape(text)}</pre></details>"
    )
