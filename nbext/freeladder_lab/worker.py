"""Run the Workbench's computations off the kernel's main thread, newest request first.

Each request gets a generation number.  A newer request supersedes older ones: their results
are dropped when they arrive.  Cancel drops the running request's result the same way (a
library call in progress cannot be stopped from outside; it finishes in the background and is
ignored).  Exceptions are handed to the caller's ``on_error`` with their traceback text.

With ``synchronous=True`` every request runs at once in the caller's thread (tests and
benchmarks use this: no waiting, no sleeps).
"""

from __future__ import annotations

import threading
import traceback
from collections.abc import Callable
from typing import Any

__all__ = ["Worker"]


class Worker:
    """One background lane of work with supersede and cancel.

    Parameters
    ----------
    on_busy : callable(bool, str)
        Called with ``(True, what)`` when a request starts and ``(False, "")`` when the lane
        is idle again.
    on_error : callable(str, str)
        Called with ``(message, traceback_text)`` when a request raised.
    synchronous : bool
        Run requests in the calling thread.
    """

    def __init__(
        self,
        on_busy: Callable[[bool, str], Any],
        on_error: Callable[[str, str], Any],
        synchronous: bool = False,
    ) -> None:
        self._on_busy = on_busy
        self._on_error = on_error
        self.synchronous = synchronous
        self._lock = threading.Lock()
        self._generation = 0
        self._thread: threading.Thread | None = None
        self._apply_lock = threading.Lock()  # one apply at a time, newest wins

    def submit(self, what: str, compute: Callable[[], Any], apply: Callable[[Any], Any]) -> None:
        """Run ``compute()``; if still current when it returns, call ``apply(result)``.

        ``apply`` runs in the worker thread too, after ``compute``; it only sets widget state.
        """
        with self._lock:
            self._generation += 1
            gen = self._generation
        self._on_busy(True, what)
        if self.synchronous:
            self._run(gen, compute, apply)
            return
        thread = threading.Thread(target=self._run, args=(gen, compute, apply), daemon=True)
        self._thread = thread
        thread.start()

    def cancel(self) -> None:
        """Drop the result of whatever is running and report the lane idle."""
        with self._lock:
            self._generation += 1
        self._on_busy(False, "")

    def wait(self, timeout: float | None = None) -> None:
        """Block until the latest background request has finished (for scripts and tests)."""
        thread = self._thread
        if thread is not None:
            thread.join(timeout)

    def _current(self, gen: int) -> bool:
        with self._lock:
            return gen == self._generation

    def _run(self, gen: int, compute: Callable[[], Any], apply: Callable[[Any], Any]) -> None:
        try:
            result = compute()
            with self._apply_lock:
                if self._current(gen):
                    apply(result)
        except Exception as exc:  # shown in the widget with its traceback, never swallowed
            if self._current(gen):
                self._on_error(f"{type(exc).__name__}: {exc}", traceback.format_exc())
        finally:
            if self._current(gen):
                self._on_busy(False, "")
