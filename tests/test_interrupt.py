"""Stopping superseded work: the library's stop hook (fl.stop_when, fl.Interrupted) and the
Workbench's use of it (issue 21, item 9).

The numbers computed after an interruption are checked against outside references: LAPACK's
tridiagonal eigenvalues through scipy (reach-1 chains) and numpy's dense eigenvalues.
"""

from __future__ import annotations

import sys
import threading
import time

import numpy as np
import pytest
from scipy.linalg import eigvalsh_tridiagonal

import freeladder as fl
from freeladder.base import interrupt
from freeladder.base.cache import store_of
from freeladder_lab import Workbench


def _majorana_energies(c: np.ndarray) -> np.ndarray:
    """Positive eigenvalues of the zero-diagonal tridiagonal matrix with off-diagonals ``c``:
    the quasi-energies of the reach-1 chain with couplings c (P. Pfeuty, Ann. Phys. 57, 79
    (1970); E. Lieb, T. Schultz and D. Mattis, Ann. Phys. 16, 407 (1961))."""
    ev = eigvalsh_tridiagonal(np.zeros(c.size + 1), c)
    return np.sort(ev[ev > 1e-12])


def _polling_module() -> str:
    """The library module whose loop polled (called from inside a stop hook)."""
    frame = sys._getframe(1)
    while frame.f_globals["__name__"] in (interrupt.__name__, __name__):  # poll, the hooks
        frame = frame.f_back
    return str(frame.f_globals["__name__"])


def _counting(stop_at: int | None = None) -> tuple[list[str], object]:
    """A stop hook that records the module of every poll, and says stop from its
    ``stop_at``-th call."""
    where: list[str] = []

    def hook() -> bool:
        where.append(_polling_module())
        return stop_at is not None and len(where) >= stop_at

    return where, hook


def test_without_a_hook_poll_does_nothing_and_the_hook_is_per_thread() -> None:
    interrupt.poll()
    seen: list[str] = []

    def other() -> None:
        try:
            interrupt.poll()  # the main thread's hook does not reach this thread
            seen.append("ran")
        except fl.Interrupted:
            seen.append("stopped")

    with fl.stop_when(lambda: True):
        with pytest.raises(fl.Interrupted):
            interrupt.poll()
        t = threading.Thread(target=other)
        t.start()
        t.join(10)
        with fl.stop_when(lambda: False):  # an inner hook replaces the outer one ...
            interrupt.poll()
        with pytest.raises(fl.Interrupted):  # ... and the outer one is back after it
            interrupt.poll()
    interrupt.poll()
    assert seen == ["ran"]
    # not an Exception: `except Exception` on the way out (a check's failure, a part's kept
    # error) cannot turn it into a result; Ctrl-C's KeyboardInterrupt is a sibling
    assert not issubclass(fl.Interrupted, Exception)


def test_the_hook_stops_free_spectrum_inside_the_root_finder_and_nothing_is_kept() -> None:
    size = 3000
    c = np.asarray(fl.random_couplings(size, seed=21), float)
    reference = _majorana_energies(c)
    # a full run with a hook that never stops: how often the library polls, and where
    where, hook = _counting()
    with fl.stop_when(hook):
        full = fl.free_spectrum(fl.exclusion_chain(size, reach=1, couplings=c))
    np.testing.assert_allclose(np.sort(full.quasi_energies), reference, rtol=1e-9, atol=1e-13)
    sweeps = [k for k, module in enumerate(where, start=1) if module == "freeladder.roots.real"]
    assert len(sweeps) > 3
    # the same model built again (nothing shared with the first): stop at the root finder's
    # last poll, after the frustration graph, the verdict and most sweeps
    m = fl.exclusion_chain(size, reach=1, couplings=c)
    where, hook = _counting(stop_at=sweeps[-1])
    with pytest.raises(fl.Interrupted), fl.stop_when(hook):
        fl.free_spectrum(m)
    assert len(where) == sweeps[-1] and where[-1] == "freeladder.roots.real"
    # asked again, without a hook: the full, correct answer
    again = fl.free_spectrum(m)
    np.testing.assert_allclose(np.sort(again.quasi_energies), reference, rtol=1e-9, atol=1e-13)
    assert again.provenance.guaranteed


def test_an_interrupted_part_is_not_kept_and_is_computed_in_full_when_asked_again() -> None:
    # the model's store (base/cache.py keeps a part's ValueError as its answer) must keep
    # neither the interruption nor anything half computed
    size = 3000
    c = np.asarray(fl.random_couplings(size, seed=22), float)
    m = fl.exclusion_chain(size, reach=1, couplings=c)
    where, hook = _counting()
    with fl.stop_when(hook):
        fl.analyze(fl.exclusion_chain(size, reach=1, couplings=c)).answer()
    polls = len(where)
    where, hook = _counting(stop_at=polls - 2)
    with pytest.raises(fl.Interrupted), fl.stop_when(hook):
        fl.analyze(m).answer()
    kept = store_of(m).computed()
    assert "verdict" in kept  # the parts finished before the stop stay
    assert not {"answer", "roots"} & set(kept) and not any(k.startswith("spectrum") for k in kept)
    answer = fl.analyze(m).answer()
    assert answer.status == "proven"
    np.testing.assert_allclose(
        np.sort(answer.spectrum.quasi_energies), _majorana_energies(c), rtol=1e-9, atol=1e-13
    )


def test_a_stop_from_another_thread_ends_a_long_call_promptly() -> None:
    # verify of a reach-1 chain of 2 * 10^4 terms polls about 70 times over a few seconds; the
    # stop is asked for from this thread once the call has polled 10 times, so it arrives while
    # the call runs however fast the machine is (a small chain first, so that numba's
    # compilation, which cannot be stopped, is behind us)
    fl.verify(fl.exclusion_chain(40, reach=1, couplings=fl.random_couplings(40, seed=4)))
    m = fl.exclusion_chain(20_000, reach=1, couplings=fl.random_couplings(20_000, seed=4))
    stop = threading.Event()
    polls = [0]
    outcome: list[str] = []
    ended: list[float] = []

    def hook() -> bool:
        polls[0] += 1
        return stop.is_set()

    def run() -> None:
        try:
            with fl.stop_when(hook):
                fl.verify(m)
            outcome.append("finished")
        except fl.Interrupted:
            outcome.append("interrupted")
        ended.append(time.perf_counter())

    t = threading.Thread(target=run)
    t.start()
    while polls[0] < 10 and t.is_alive():
        time.sleep(0.001)
    asked = time.perf_counter()
    stop.set()
    t.join(60)
    assert outcome == ["interrupted"], f"{polls[0]} polls"
    latency = ended[0] - asked
    print(f"stopped {latency:.3f} s after the stop was asked for")
    assert latency < 5.0  # well under 0.5 s on an idle machine; generous for a loaded one


def test_keyboard_interrupt_still_passes_through_a_part() -> None:
    # Ctrl-C in a notebook cell behaves as before: KeyboardInterrupt leaves the library and the
    # part is not kept (the next call computes it)
    m = fl.exclusion_chain(6, reach=2, couplings=fl.random_couplings(6, seed=2))

    def hook() -> bool:
        raise KeyboardInterrupt

    with pytest.raises(KeyboardInterrupt), fl.stop_when(hook):
        fl.free_spectrum(m)
    energies = np.linalg.eigvalsh(m.to_sparse().toarray())
    levels = fl.free_spectrum(m).levels(1)
    assert levels[0].energy == pytest.approx(energies[0], abs=1e-9)


def test_a_report_cut_short_by_ctrl_c_is_returned_but_not_kept() -> None:
    # verify answers Ctrl-C with the checks finished so far (complete=False); the analysis
    # hands that report out once and runs the checks again on the next call
    m = fl.exclusion_chain(6, reach=2, couplings=fl.random_couplings(6, seed=3))
    a = fl.analyze(m)
    a.answer()
    where: list[str] = []

    def hook() -> bool:
        where.append(_polling_module())
        if where[-1] == "freeladder.checks.verification" and where.count(where[-1]) == 3:
            raise KeyboardInterrupt  # once, as Ctrl-C would, early in the checks
        return False

    with fl.stop_when(hook):
        cut = a.report()
    assert not cut.complete
    full = a.report()
    assert full.complete and full.ok and len(full.checks) > len(cut.checks)
    assert a.report() is full  # a complete report is kept
    # the checks' spectrum is numpy's: the ground level against dense diagonalization
    ground = np.linalg.eigvalsh(m.to_sparse().toarray())[0]
    assert a.answer().spectrum.levels(1)[0].energy == pytest.approx(ground, abs=1e-9)


def test_a_superseded_workbench_model_stops_inside_the_library() -> None:
    # a reach-2 chain of 10^5 terms takes minutes to analyse; a newer, small model supersedes
    # it while a library call runs, and the older thread ends within a bound
    wb = Workbench(fl.exclusion_chain(5, reach=1))
    wb.wait(60)
    big = fl.exclusion_chain(100_000, reach=2)
    wb.take_model(big)
    deadline = time.monotonic() + 30
    while not wb.worker._threads and time.monotonic() < deadline:
        time.sleep(0.01)
    old = [t for t in wb.worker._threads if t.is_alive()]
    assert len(old) == 1
    time.sleep(1.5)  # inside the analysis of the large model
    assert old[0].is_alive()
    small = fl.exclusion_chain(6, reach=2, couplings=fl.random_couplings(6, seed=17))
    clock = time.pthread_getcpuclockid(old[0].ident)  # the old thread's CPU time
    cpu_before = time.clock_gettime(clock)
    asked = time.perf_counter()
    wb.take_model(small)
    cpu_after = 0.0
    while old[0].is_alive() and time.perf_counter() - asked < 30:
        try:
            cpu_after = time.clock_gettime(clock) - cpu_before
        except OSError:  # the thread ended between the two calls
            break
        time.sleep(0.002)
    old[0].join(30)
    latency = time.perf_counter() - asked
    assert not old[0].is_alive()
    print(f"the superseded analysis stopped {latency:.3f} s after the newer model, having used")
    print(f"{cpu_after:.3f} s of CPU since")
    # the wall time includes waiting for a core and the GIL on a loaded machine; the CPU time
    # the old thread spent after the newer request is what the polls bound
    assert cpu_after < 0.5
    assert latency < 10.0  # well under 0.5 s on an idle machine; generous for a loaded one
    wb.wait(60)
    assert wb.error.value == ""
    assert wb.model is small
    # the small model's numbers: the ladder's lowest rungs are numpy's lowest eigenvalues
    exact = np.unique(np.round(np.linalg.eigvalsh(small.to_sparse().toarray()), 9))
    rungs = np.unique(np.round(np.asarray(wb.ladder.rungs.y)[:, 0], 9))
    np.testing.assert_allclose(rungs[:5], exact[:5], atol=1e-8)
