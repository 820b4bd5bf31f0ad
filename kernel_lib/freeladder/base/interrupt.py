"""Stopping a long computation from outside its thread: a per-thread hook that long loops poll.

Code that may want to stop work running in some thread (a notebook tool whose user typed a
newer model while the older one is still being analysed) installs a *stop hook* for that
thread with :func:`stop_when`; the library's long loops call :func:`poll` every so often (between
compiled chunks of a root sweep, per step of a recurrence, per check; :func:`polled` wraps a
loop's items), and :func:`poll` raises
:class:`Interrupted` once the hook answers True.  Without a hook :func:`poll` costs one
attribute lookup.

:class:`Interrupted` derives from ``BaseException``, as ``KeyboardInterrupt`` does, so that no
``except Exception`` on its way out turns it into a result: a check of :func:`freeladder.verify`
does not report it as a failure, and a part (:mod:`freeladder.base.cache`) does not keep it as
its error.  An interrupted part is simply not stored; asking for it again computes it in full.
Ctrl-C is untouched: it raises ``KeyboardInterrupt`` in the main thread as before.

Compiled (numba) kernels cannot poll; the library calls them in chunks of bounded length (see
:mod:`freeladder.roots.real`), so the delay is one chunk.
"""

from __future__ import annotations

import threading
from collections.abc import Callable, Iterable, Iterator
from contextlib import contextmanager
from typing import TypeVar

__all__ = ["Interrupted", "poll", "polled", "stop_when"]

T = TypeVar("T")

_local = threading.local()


class Interrupted(BaseException):
    """A computation stopped because the stop hook of its thread (:func:`stop_when`) said so.

    Derives from ``BaseException`` (like ``KeyboardInterrupt``), so ``except Exception`` does
    not catch it: nothing half-computed is stored or reported as a result.
    """


def poll() -> None:
    """Raise :class:`Interrupted` when this thread's stop hook answers True; else do nothing.

    Long loops of the library call it every so often.  Cheap: one attribute lookup without a
    hook, one call of the hook with one.

    Examples
    --------
    >>> poll()  # no hook installed in this thread: nothing happens
    """
    stop = getattr(_local, "stop", None)
    if stop is not None and stop():
        raise Interrupted("stopped: the stop hook of this thread answered True")


def polled(items: Iterable[T], every: int = 1024) -> Iterator[T]:
    """The items of ``items``, with a :func:`poll` before the first and after every ``every``.

    For tight loops: ``for k in polled(range(n)):`` costs one counter per item.

    Examples
    --------
    >>> list(polled(range(3)))
    [0, 1, 2]
    """
    for k, item in enumerate(items):
        if k % every == 0:
            poll()
        yield item


@contextmanager
def stop_when(stop: Callable[[], bool]) -> Iterator[None]:
    """Within the ``with`` block, library calls in this thread stop once ``stop()`` is True.

    They raise :class:`Interrupted` at their next :func:`poll` (typically within a fraction of a
    second).  The hook applies to the calling thread only; on leaving the block the hook that
    was installed before (if any) is back.  Nothing computed before the stop is lost: finished
    parts of an analysis stay stored, the interrupted one is computed again when next asked for.

    Parameters
    ----------
    stop : callable() -> bool
        Asked at every poll; cheap to call (for example ``threading.Event().is_set``).

    Examples
    --------
    >>> import threading
    >>> import freeladder as fl
    >>> cancel = threading.Event()
    >>> m = fl.exclusion_chain(6, reach=1)
    >>> with fl.stop_when(cancel.is_set):  # not set: the call runs to its end
    ...     len(fl.free_spectrum(m).quasi_energies)
    3
    >>> cancel.set()
    >>> try:
    ...     with fl.stop_when(cancel.is_set):
    ...         fl.verify(m)
    ... except fl.Interrupted:
    ...     print("stopped")
    stopped
    """
    outer = getattr(_local, "stop", None)
    _local.stop = stop
    try:
        yield
    finally:
        _local.stop = outer
