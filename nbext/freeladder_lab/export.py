"""Export a worked calculation into the notebook: the comm to our JupyterLab plugin, and a panel.

The kernel opens a comm on :data:`COMM_TARGET` carrying the cells and a marker (the model id of
the widget that asked).  The browser half (``nbext/src/index.ts``, the ``freeladder-cells``
JupyterLab extension) inserts the cells directly below the notebook cell that shows that widget,
in one undoable edit, and answers on the comm with what it inserted.  When nothing answers
within a short time (VS Code, other front ends, a plain kernel, or a server that was not
restarted after installing), :class:`ExportPanel` says so and offers the fallbacks: save the
cells as a new notebook next to the current one, or show their text to copy.
"""

from __future__ import annotations

import os
from collections.abc import Callable, Sequence
from dataclasses import dataclass
from pathlib import Path
from typing import Any

import ipywidgets as widgets

from .adapter import Model, View, export_calculation
from .panel import Host, Section
from .style import escape
from .worker import Worker

__all__ = [
    "COMM_TARGET",
    "MARKER_CLASS",
    "PATH_TIMEOUT",
    "REPLY_TIMEOUT",
    "ExportPanel",
    "InsertReply",
    "ask_notebook_path",
    "fresh_notebook_path",
    "send_cells",
]

COMM_TARGET = "freeladder.cells.v1"
"""The comm target the browser half registers on every notebook kernel."""

MARKER_CLASS = "freeladder-export-"
"""CSS class prefix (plus the widget's model id) by which the plugin finds a nested panel."""

REPLY_TIMEOUT = 5.0
"""Seconds to wait for the plugin's answer before offering the fallbacks."""

PATH_TIMEOUT = 2.0
"""Seconds to wait for the notebook's current path before saving under the kernel's name."""

NO_EXTENSION = (
    "No notebook extension answered, so nothing was inserted. This front end may not load "
    "freeladder's JupyterLab extension (VS Code, other front ends, a plain kernel), or the "
    "Jupyter server was started before freeladder was installed: after <code>%pip install "
    "freeladder</code> the server must be restarted to load the browser half. Use "
    "<b>save as notebook</b> or <b>copy text</b> instead."
)


@dataclass(frozen=True)
class InsertReply:
    """What the browser half answered (or that it did not).

    Attributes
    ----------
    status : str
        "inserted", "refused" (the plugin rejected the message; see ``reason``) or
        "no answer" (timed out, or the front end closed the comm without a handler).
    count : int
        Cells inserted.
    index : int
        Position of the first inserted cell in the notebook (-1 when none).
    anchor : str
        "widget" (below the cell showing the widget) or "active cell" (the widget was not
        found in any output), empty when nothing was inserted.
    path : str
        The notebook's path as the server knows it.
    reason : str
        Why nothing was inserted.
    """

    status: str
    count: int = 0
    index: int = -1
    anchor: str = ""
    path: str = ""
    reason: str = ""

    @classmethod
    def from_data(cls, data: Any) -> InsertReply:
        """Read the plugin's answer; a malformed answer becomes a "refused" reply."""
        if not isinstance(data, dict) or data.get("status") not in ("inserted", "refused"):
            return cls("refused", reason=f"unexpected answer from the front end: {data!r}")
        return cls(
            str(data["status"]),
            int(data.get("count", 0)),
            int(data.get("index", -1)),
            str(data.get("anchor", "")),
            str(data.get("path", "")),
            str(data.get("reason", "")),
        )


def send_cells(
    cells: Sequence[Any],
    marker: str,
    on_reply: Callable[[InsertReply], None],
    timeout: float = REPLY_TIMEOUT,
    worker: Worker | None = None,
) -> None:
    """Send cells to the notebook's browser half; ``on_reply`` gets its answer or a timeout.

    Parameters
    ----------
    cells : WorkedCalculation or sequence of Cell
        What to insert, in order.
    marker : str
        The model id of the widget that asks: the cells go below the notebook cell showing it.
    on_reply : callable
        Called with an :class:`InsertReply`: the plugin's answer, or status "no answer" when
        the front end closes the comm unanswered or after ``timeout`` seconds.  An answer that
        arrives after the timeout is still passed on (a second call), so that a slow front end
        that did insert the cells is not reported as missing.
    timeout : float
        Seconds to wait.
    worker : Worker, optional
        Whose lane "reply" waits out the timeout (a worker of its own when not given).

    Notes
    -----
    The wait does not block: the plugin's answer reaches the kernel as a message on the shell
    channel, which the kernel handles only after the running widget callback or cell returns,
    so a blocking wait would always time out.  The timeout is a delayed request on the worker
    (in a background thread) instead.
    """
    from comm import create_comm

    answered = False
    timed_out = False

    def answer(reply: InsertReply) -> None:
        nonlocal answered
        if not answered:
            answered = True
            on_reply(reply)

    def give_up() -> None:
        nonlocal timed_out
        if not answered:
            timed_out = True
            on_reply(InsertReply("no answer", reason=f"no answer within {timeout:g} s"))

    payload = {
        "cells": [{"kind": c.kind, "source": c.source} for c in cells],
        "marker": str(marker),
    }
    channel = create_comm(target_name=COMM_TARGET, data=payload)
    channel.on_msg(lambda msg: answer(InsertReply.from_data(msg["content"]["data"])))
    channel.on_close(
        lambda msg: (
            None
            if timed_out
            else answer(
                InsertReply("no answer", reason="the front end has no handler for the cells")
            )
        )
    )
    waiter = worker if worker is not None and not worker.synchronous else _background()
    waiter.submit(
        "reply",
        "waiting for the notebook",
        lambda: None,
        lambda _: give_up(),
        delay=timeout,
        quiet=True,
    )


def ask_notebook_path(
    marker: str,
    on_answer: Callable[[str | None], Any],
    timeout: float = PATH_TIMEOUT,
    worker: Worker | None = None,
) -> None:
    """Ask the browser half for the current path of the notebook showing widget ``marker``.

    ``on_answer`` gets the server-relative path (it follows renames), or None when nothing
    answered within ``timeout`` seconds; it is called once.
    """
    from comm import create_comm

    answered = False

    def answer(path: str | None) -> None:
        nonlocal answered
        if not answered:
            answered = True
            on_answer(path)

    def read(msg: dict[str, Any]) -> None:
        data = msg["content"]["data"]
        path = data.get("path") if isinstance(data, dict) else None
        answer(path if isinstance(path, str) and path else None)

    channel = create_comm(target_name=COMM_TARGET, data={"ask": "path", "marker": str(marker)})
    channel.on_msg(read)
    channel.on_close(lambda msg: answer(None))
    waiter = worker if worker is not None and not worker.synchronous else _background()
    waiter.submit(
        "path",
        "waiting for the notebook",
        lambda: None,
        lambda _: answer(None),
        delay=timeout,
        quiet=True,
    )


def _in_kernel() -> bool:
    """True inside a running Jupyter kernel (a front end may answer comms)."""
    try:
        from IPython import get_ipython
    except ImportError:
        return False
    shell = get_ipython()
    return shell is not None and getattr(shell, "kernel", None) is not None


def _background() -> Worker:
    """A worker of its own for waits (never synchronous: a timeout must really wait)."""
    return Worker(lambda busy: None, lambda message, trace: None)


def fresh_notebook_path(folder: str | Path | None = None, stem: str | None = None) -> Path:
    """A notebook path that does not exist yet: ``<stem>-worked.ipynb``, then ``-2``, ``-3`` ...

    ``folder`` defaults to the folder of the current notebook: the parent of the server's
    ``JPY_SESSION_NAME`` when that is an existing absolute path, else the kernel's working
    folder (Jupyter servers start kernels in the notebook's folder).  ``stem`` defaults to the
    current notebook's name, or "calculation".
    """
    session = os.environ.get("JPY_SESSION_NAME", "")
    session_path = Path(session) if session else None
    if folder is None:
        if session_path is not None and session_path.is_absolute() and session_path.exists():
            folder = session_path.parent
        else:
            folder = Path.cwd()
    if stem is None:
        stem = session_path.stem if session_path is not None and session_path.stem else None
        stem = stem or "calculation"
    base = Path(folder)
    candidate = base / f"{stem}-worked.ipynb"
    k = 2
    while candidate.exists():
        candidate = base / f"{stem}-worked-{k}.ipynb"
        k += 1
    return candidate


class ExportPanel(Section):
    """Buttons that put a model's worked calculation into the notebook, with fallbacks.

    Parameters
    ----------
    get_model : callable
        Returns the model to export at the moment a button is pressed (None when there is
        none yet).  In the Workbench: the numeric model the views show (symbols set by the
        sliders, named in a comment).
    folder : str or Path, optional
        Where "save as notebook" writes (default: next to the current notebook).
    timeout : float
        Seconds to wait for the browser half's answer.
    worker : Worker, optional
        Works out the calculation (lane "export") and waits for the answers.  By default a
        synchronous worker of its own: the calculation is worked out in the button's callback
        and the methods return their results.  In the Workbench its worker (in a background
        thread in a notebook: the methods then return None and the status line reports).

    Examples
    --------
    In a notebook cell::

        from freeladder_lab.export import ExportPanel
        ExportPanel(lambda: model)
    """

    TITLE = "Export"
    HINT = "the worked, self-verifying calculation as notebook cells"

    @classmethod
    def attach(cls, host: Host) -> ExportPanel:
        """The section for ``host``: it exports the model its views show."""

        def shown() -> tuple[Model | None, Model | None]:
            view = host.shown()
            return (None, None) if view is None else (view.model, view.analysis.model)

        panel = cls(worker=getattr(host, "worker", None))
        panel._source = shown
        return panel

    def __init__(
        self,
        get_model: Callable[[], Model | None] | None = None,
        folder: str | Path | None = None,
        timeout: float = REPLY_TIMEOUT,
        worker: Worker | None = None,
    ) -> None:
        self._source: Callable[[], tuple[Model | None, Model | None]] = (
            (lambda: (None, None)) if get_model is None else (lambda: (get_model(), get_model()))
        )
        self._folder = folder
        self._timeout = float(timeout)
        self._worker = worker or Worker(lambda busy: None, self._failed, synchronous=True)
        self._cache: tuple[Any, Any] | None = None
        self.insert_button = widgets.Button(
            description="insert cells below",
            icon="plus",
            tooltip="insert the worked cells",
            layout=widgets.Layout(width="auto"),
        )
        self.save_button = widgets.Button(
            description="save as notebook",
            icon="save",
            tooltip="write a new notebook file",
            layout=widgets.Layout(width="auto"),
        )
        self.text_button = widgets.Button(
            description="copy text",
            icon="file-text",
            tooltip="show the cells' text to copy",
            layout=widgets.Layout(width="auto"),
        )
        self.status = widgets.HTML("")
        self.text = widgets.Textarea(
            value="", layout=widgets.Layout(width="100%", height="16em", display="none")
        )
        self.text.observe(self._keep_text, names="value")
        self._shown_text = ""
        self.insert_button.on_click(lambda _: self.insert())
        self.save_button.on_click(lambda _: self.save())
        self.text_button.on_click(lambda _: self.show_text())
        buttons = widgets.HBox([self.insert_button, self.save_button, self.text_button])
        super().__init__([buttons, self.status, self.text])
        self.add_class("freeladder-export")
        self.add_class(MARKER_CLASS + self.model_id)

    def update(self, view: View) -> None:
        """A new view: a message about an earlier model no longer applies."""
        self.status.value = ""

    # -- the cells -----------------------------------------------------------------------------
    def _calculation(self) -> Any:
        """The current model's worked calculation (cached per model), or None after an error."""
        try:
            model, numeric = self._source()
            if model is None or numeric is None:
                self._say(
                    "nothing to export yet: no model has parsed (fix the model text first)",
                    error=True,
                )
                return None
            if self._cache is not None and self._cache[0] is numeric:
                return self._cache[1]
            self._say("working out the calculation ...")
            wc = export_calculation(model, numeric)
        except Exception as err:  # shown to the user; the model and the notebook stay intact
            self._say(f"could not export: {escape(type(err).__name__)}: {escape(err)}", error=True)
            return None
        self._cache = (numeric, wc)
        return wc

    def _say(self, html: str, error: bool = False) -> None:
        color = "#b00020" if error else "inherit"
        self.status.value = f'<span style="color: {color}">{html}</span>'

    def _failed(self, message: str, trace: str) -> None:
        self._say(f"could not export: {escape(message)}", error=True)

    def _prepared(self, then: Callable[[Any], Any]) -> Any:
        """Call ``then(calculation)`` once the worked calculation is ready (in the worker).

        Returns what ``then`` returned when the worker ran it at once (synchronous), else None.
        """
        done: list[Any] = []

        def apply(wc: Any) -> None:
            if wc is not None:
                done.append(then(wc))

        self._worker.submit("export", "working out the calculation", self._calculation, apply)
        return done[0] if done and self._worker.synchronous else None

    # -- actions ---------------------------------------------------------------------------------
    def insert(self) -> None:
        """Send the cells to the browser half; the status line shows its answer."""
        self._prepared(self._insert_now)

    def _insert_now(self, wc: Any) -> None:
        self._say(f"sending {len(wc)} cells to the notebook ...")
        send_cells(wc, self.model_id, self._on_reply, timeout=self._timeout, worker=self._worker)

    def _on_reply(self, reply: InsertReply) -> None:
        if reply.status == "inserted":
            where = "below this widget" if reply.anchor == "widget" else "below the active cell"
            self._say(
                f"inserted {reply.count} cells {where} (cell {reply.index + 1} on); one undo "
                "(Z in command mode) removes them all"
            )
        elif reply.status == "refused":
            self._say(f"the notebook refused the cells: {escape(reply.reason)}", error=True)
        else:
            self._say(NO_EXTENSION, error=True)

    def save(self) -> Path | None:
        """Write the cells as a new notebook next to the current one (never overwrites).

        The file is named after the notebook as it is named now (``<name>-worked.ipynb``):
        inside a kernel the browser half is asked for the notebook's current path (it follows
        renames), and the file is written when it answers (or after :data:`PATH_TIMEOUT`
        seconds, under the name the kernel started with); the status line says where, and
        None is returned.  Outside a kernel the file is written at once and its path returned.
        """
        result: Path | None = self._prepared(self._save_now)
        return result

    def _save_now(self, wc: Any) -> Path | None:
        if not _in_kernel():
            return self._write(wc, None)
        self._say("asking the notebook for its current name ...")
        ask_notebook_path(self.model_id, lambda path: self._write(wc, path), worker=self._worker)
        return None

    def _write(self, wc: Any, notebook: str | None) -> Path | None:
        """Write ``wc`` next to the current notebook, named after ``notebook`` when known."""
        stem = Path(notebook).stem if notebook else None
        for _ in range(100):
            path = fresh_notebook_path(self._folder, stem)
            try:
                wc.to_notebook(path)
            except FileExistsError:
                continue  # created meanwhile by someone else: pick the next fresh name
            except OSError as err:
                self._say(f"could not save: {escape(err)}", error=True)
                return None
            self._say(f"saved as <code>{escape(path.name)}</code> in {escape(path.parent)}")
            return path
        self._say("could not find a fresh file name", error=True)
        return None

    def show_text(self) -> str | None:
        """Show the cells as one script in a read-only text box, to copy (returns the text
        when the worker is synchronous)."""
        result: str | None = self._prepared(self._text_now)
        return result

    def _text_now(self, wc: Any) -> str:
        self._shown_text = wc.to_script()
        self.text.value = self._shown_text
        self.text.layout.display = None
        self._say("the cells as a script: select the text and copy it (edits are undone)")
        return self._shown_text

    def _keep_text(self, change: dict[str, Any]) -> None:
        """Undo edits in the text box: it shows the export, it is not an editor."""
        if change["new"] != self._shown_text:
            self.text.value = self._shown_text
