"""The Workbench's one way of running work off the kernel's main thread.

Every request names a *lane* (what kind of work it is: "model", "order", "checks", "export",
"typing" ...).  A newer request on a lane supersedes the older one: the older one's
:class:`Job` is cancelled, and its result, if it still arrives, is dropped.

Cancellation reaches into the library: while a job computes, its thread carries the library's
stop hook (``freeladder.stop_when``) asking whether the job was cancelled, and the library's
long loops poll it, so a superseded computation raises ``freeladder.Interrupted`` within a
fraction of a second even in the middle of one library call (the roots of a long chain, the
checks), and the worker drops it quietly.  :func:`checkpoint` polls the same hook between the
parts of an analysis.  An interrupted part is not kept in the model's store: asking for it again
computes it in full.  ``apply`` runs without the hook (it only sets widget state), so a view is
never half drawn.

A request may wait before it starts (``delay``): typing uses that to parse only after a pause,
and the export uses it for the time it waits for the notebook's answer.  A newer request on the
lane cancels a waiting one at once.

With ``synchronous=True`` every request runs at once in the caller's thread and delays are
skipped (tests and benchmarks use this: no waiting, no sleeps).  Exceptions go to the caller's
``on_error`` with their traceback text.
"""

from __future__ import annotations

import threading
import time
import traceback
from collections.abc import Callable
from typing import Any

from .adapter import Interrupted, checkpoint, stop_when

__all__ = ["Job", "Worker", "checkpoint"]


class Job:
    """One request: its lane, what it does, and whether it was cancelled."""

    def __init__(self, lane: str, what: str) -> None:
        self.lane = lane
        self.what = what
        self._cancelled = threading.Event()

    @property
    def cancelled(self) -> bool:
        """True once a newer request on the lane (or Cancel) took over."""
        return self._cancelled.is_set()

    def cancel(self) -> None:
        """Ask the work to stop (at the library's next poll, or its next :func:`checkpoint`)."""
        self._cancelled.set()

    def sleep(self, seconds: float) -> bool:
        """Wait ``seconds`` unless cancelled first; True when the wait ran to its end."""
        return not self._cancelled.wait(seconds)


class Worker:
    """Runs requests in background threads, newest request per lane wins.

    Parameters
    ----------
    on_busy : callable(dict)
        Called with ``{lane: what}`` for every lane at work whenever that changes (an empty
        dict when everything is idle).  Lanes started with ``quiet=True`` are not listed.
    on_error : callable(str, str)
        Called with ``(message, traceback_text)`` when a request raised.
    synchronous : bool
        Run requests in the calling thread, skipping delays.
    """

    def __init__(
        self,
        on_busy: Callable[[dict[str, str]], Any],
        on_error: Callable[[str, str], Any],
        synchronous: bool = False,
    ) -> None:
        self._on_busy = on_busy
        self._on_error = on_error
        self.synchronous = synchronous
        self._lock = threading.Lock()
        self._jobs: dict[str, Job] = {}  # the current job of each lane
        self._busy: dict[str, str] = {}
        self._busy_lock = threading.RLock()
        self._threads: list[threading.Thread] = []
        self._apply_lock = threading.RLock()  # one apply at a time (a synchronous apply may nest)

    def submit(
        self,
        lane: str,
        what: str,
        compute: Callable[[], Any],
        apply: Callable[[Any], Any],
        delay: float = 0.0,
        quiet: bool = False,
    ) -> Job:
        """Run ``compute()`` (after ``delay`` seconds); if still current, ``apply(result)``.

        A newer request on the same lane cancels this one.  ``apply`` runs in the worker
        thread too, after ``compute``; it only sets widget state.  ``quiet`` keeps the request
        off the busy line (waiting for an answer is not work).
        """
        job = Job(lane, what)
        with self._lock:
            old = self._jobs.get(lane)
            if old is not None:
                old.cancel()
            self._jobs[lane] = job
            self._threads = [t for t in self._threads if t.is_alive()]
        if not quiet:
            self._set_busy(lane, what)
        if self.synchronous:
            self._run(job, compute, apply, 0.0)
            return job
        thread = threading.Thread(target=self._run, args=(job, compute, apply, delay), daemon=True)
        with self._lock:
            self._threads.append(thread)
        thread.start()
        return job

    def cancel(self, lane: str | None = None) -> None:
        """Cancel the job of ``lane`` (every lane when None); the views keep what they show."""
        with self._lock:
            lanes = list(self._jobs) if lane is None else [lane]
            for name in lanes:
                job = self._jobs.pop(name, None)
                if job is not None:
                    job.cancel()
        for name in lanes:
            self._set_busy(name, None)

    def wait(self, timeout: float | None = None) -> None:
        """Block until every background request has finished, including those they started
        (for scripts and tests)."""
        deadline = None if timeout is None else time.monotonic() + timeout
        while True:
            with self._lock:
                threads = [t for t in self._threads if t.is_alive()]
            if not threads:
                return
            left = None if deadline is None else deadline - time.monotonic()
            if left is not None and left <= 0:
                return
            threads[0].join(left)

    def _current(self, job: Job) -> bool:
        with self._lock:
            return self._jobs.get(job.lane) is job and not job.cancelled

    def _set_busy(self, lane: str, what: str | None) -> None:
        # one lock around the change and the report, so that reports from two threads cannot
        # arrive in the other order (the busy line would keep a finished lane)
        with self._busy_lock:
            if what is None:
                self._busy.pop(lane, None)
            else:
                self._busy[lane] = what
            self._on_busy(dict(self._busy))

    def _run(
        self, job: Job, compute: Callable[[], Any], apply: Callable[[Any], Any], delay: float
    ) -> None:
        try:
            if delay > 0 and not job.sleep(delay):
                return
            with stop_when(job._cancelled.is_set):  # the library's loops poll it
                checkpoint()
                result = compute()
            with self._apply_lock:
                if self._current(job):
                    apply(result)
        except Interrupted:  # cancelled: nothing to show, nothing kept
            pass
        except Exception as exc:  # shown in the widget with its traceback, never swallowed
            if self._current(job):
                self._on_error(f"{type(exc).__name__}: {exc}", traceback.format_exc())
        finally:
            with self._lock:
                finished = self._jobs.get(job.lane) is job
                if finished:
                    del self._jobs[job.lane]
            if finished:
                self._set_busy(job.lane, None)
