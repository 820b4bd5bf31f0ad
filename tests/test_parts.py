"""The Analysis owns every derived result: one store per model, each part computed once, and
nothing a caller receives aliases what the store keeps."""

from __future__ import annotations

import threading
import time

import numpy as np
import pytest
import scipy.sparse as sps

import freeladder as fl
import freeladder.analysis as analysis_module
import freeladder.checks.verification as verification_module

CLAW = "X0 X1 X2 + Z0 + Z1 + Z2"


def test_two_threads_compute_one_spectrum_once(monkeypatch: pytest.MonkeyPatch) -> None:
    calls: list[int] = []
    real = analysis_module.free_spectrum

    def counting(*args, **kwargs):
        calls.append(1)
        time.sleep(0.3)  # long enough for the second thread to ask while the first computes
        return real(*args, **kwargs)

    monkeypatch.setattr(analysis_module, "free_spectrum", counting)
    m = fl.exclusion_chain(9, reach=2, couplings=fl.staggered(9, 1.0, 0.7))
    got: list[fl.FreeSpectrum] = []
    threads = [threading.Thread(target=lambda: got.append(fl.analyze(m).spectrum())) for _ in "ab"]
    for t in threads:
        t.start()
    for t in threads:
        t.join()
    assert len(calls) == 1
    assert got[0] is got[1]
    # and it is right: numpy dense diagonalization (common practice)
    assert got[0].ground_energy == pytest.approx(
        np.linalg.eigvalsh(m.to_sparse().toarray())[0], abs=1e-9
    )


def test_worked_calculation_after_report_runs_no_check_again(
    monkeypatch: pytest.MonkeyPatch,
) -> None:
    runs: list[str] = []
    real = verification_module._run

    def counting(name, *args, **kwargs):
        runs.append(name)
        return real(name, *args, **kwargs)

    monkeypatch.setattr(verification_module, "_run", counting)
    a = fl.analyze(fl.parse_model("X0 + 0.5 Z0 Z1 + X1 + 0.5 Z1 Z2 + X2"))
    report = a.report()
    assert runs, "the report ran its checks"
    before = len(runs)
    wc = fl.worked_calculation(a)
    assert len(runs) == before
    assert fl.worked_calculation(a.model) is wc  # a Model is analysed on entry: same store
    assert any(c.passed for c in report.checks)


def test_coupling_change_shares_only_the_structure() -> None:
    m = fl.exclusion_chain(8, reach=2)
    a = fl.analyze(m)
    b = a.with_couplings(fl.staggered(8, 1.0, 0.3))
    assert b.chain is a.chain and b.charge_counts is a.charge_counts
    assert b.polynomial is not a.polynomial
    assert b.spectrum().ground_energy == pytest.approx(
        np.linalg.eigvalsh(b.model.to_sparse().toarray())[0], abs=1e-9
    )


# -- nothing handed out aliases a stored part ----------------------------------------------------
def test_editing_the_adjacency_cannot_poison_the_verdict() -> None:
    # a claw: no free-fermion theorem (Elman-Chapman-Flammia 2021), so the spectrum is refused
    m = fl.parse_model(CLAW)
    adjacency = fl.frustration_adjacency(m)
    adjacency[0, 1] = 0
    adjacency[1, 0] = 0
    adjacency.eliminate_zeros()
    with pytest.raises(fl.NoTheoremError):
        fl.free_spectrum(m)
    assert fl.classify(m).kind == "unsolved"
    assert fl.classify(m.with_couplings([1, 2, 3, 4])).kind == "unsolved"
    assert fl.frustration_adjacency(m)[0, 1]


def test_editing_the_exponents_cannot_poison_the_verdict() -> None:
    m = fl.parse_model(CLAW)
    exponents = fl.commutation_exponents(m)
    exponents[0, 1] = 0
    exponents[1, 0] = 0
    exponents.eliminate_zeros()
    exponents.data[:] = 0
    with pytest.raises(fl.NoTheoremError):
        fl.free_spectrum(m)
    assert fl.classify(m).kind == "unsolved"
    assert fl.commutation_exponents(m).nnz == 6  # X0 X1 X2 anticommutes with each Z


def test_editing_the_graph_cannot_poison_the_analysis() -> None:
    m = fl.parse_model(CLAW)
    a = fl.analyze(m)
    g = a.graph
    g.remove_edge(0, 1)
    g.nodes[0]["coupling"] = 99
    fresh = fl.analyze(m).graph
    assert fresh.has_edge(0, 1) and fresh.nodes[0]["coupling"] == 1
    assert a.verdict.kind == "unsolved"


def _cannot_reopen(arr: np.ndarray) -> None:
    for target in (arr, arr.base, arr.view()):
        if isinstance(target, np.ndarray):
            with pytest.raises(ValueError):
                target.setflags(write=True)


def test_result_arrays_cannot_be_reopened() -> None:
    m = fl.exclusion_chain(6, reach=1, couplings=fl.staggered(6, 1.0, 0.5))
    a = fl.analyze(m)
    sp = a.spectrum()
    for arr in (sp.quasi_energies, sp.error_bounds, sp.roots, sp.log_quasi_energies):
        _cannot_reopen(arr)
    found = sp.provenance.finder["roots"]  # the root finder's own result, kept with the spectrum
    for arr in (found.values, found.error_bounds):
        _cannot_reopen(arr)
    _cannot_reopen(a.chain.order)
    _cannot_reopen(a.exact.levels)
    _cannot_reopen(fl.algebra.power_table(5, 6))
    stored = np.array(fl.free_spectrum(m).quasi_energies)
    # still the spectrum of the model: numpy dense diagonalization (common practice)
    assert a.spectrum().ground_energy == pytest.approx(
        np.linalg.eigvalsh(m.to_sparse().toarray())[0], abs=1e-9
    )
    np.testing.assert_array_equal(a.spectrum().quasi_energies, stored)


def test_sector_labels_cannot_be_edited() -> None:
    answer = fl.analyze(fl.parse_model("X0 X1 + Y1 Y2 + Z2 Z3 + X3 X0 + Z1 Z3")).answer()
    stored = answer.spectrum.provenance.sector["cycle_operators"]
    with pytest.raises(AttributeError):
        stored.append("Z0")
    assert tuple(stored) == answer.cycle_strings


def test_handed_out_matrices_are_the_callers() -> None:
    m = fl.exclusion_chain(5)
    first, second = fl.frustration_adjacency(m), fl.frustration_adjacency(m)
    assert first is not second and isinstance(first, sps.csr_array)
    first.data[:] = False  # the caller's copy is writable, and only theirs
    assert fl.frustration_adjacency(m).nnz == 8 and fl.frustration_adjacency(m).data.all()
