"""The Workbench widget, headless: what its plots hold against the library and outside references.

Every Workbench here is synchronous (all work done in the caller's thread), so no test waits.
Mark data are compared with direct ``freeladder`` calls (the widget must show the library's
numbers, not its own), and the library's numbers in turn with numpy exact diagonalization and
networkx, which are outside the project.
"""

from __future__ import annotations

import html
import itertools
import re
import threading
import time

import networkx as nx
import numpy as np
import pytest

import freeladder as fl
from freeladder_lab import Workbench, verdict_panel
from freeladder_lab import workbench as workbench_module
from freeladder_lab.input_panel import CUSTOM
from freeladder_lab.presets import FAMILIES
from freeladder_lab.worker import Worker


def _xy(mark) -> np.ndarray:
    """A scatter mark's points as complex numbers x + i y."""
    return np.asarray(mark.x, float) + 1j * np.asarray(mark.y, float)


def _by_value(z: np.ndarray) -> np.ndarray:
    z = np.asarray(z, complex)
    return z[np.lexsort((np.round(z.imag, 9), np.round(z.real, 9)))]


def _assert_roots_shown(wb: Workbench, sp: fl.FreeSpectrum) -> None:
    np.testing.assert_allclose(_xy(wb.roots.roots), np.asarray(sp.roots, complex), rtol=0, atol=0)
    np.testing.assert_allclose(
        _xy(wb.roots.eta), np.asarray(sp.quasi_energies, complex), rtol=0, atol=0
    )


def _dense_eigenvalues(m: fl.Model) -> np.ndarray:
    """numpy's eigenvalues of the model's matrix (the outside reference)."""
    h = m.to_sparse().toarray()
    if np.allclose(h, h.conj().T, atol=1e-12):
        return np.linalg.eigvalsh(h).astype(complex)
    return np.linalg.eigvals(h)


def _independent_set_counts(graph: nx.Graph) -> list[int]:
    """Independent sets of each size by brute force over subsets (small graphs only)."""
    und = graph.to_undirected() if graph.is_directed() else graph
    nodes = list(und.nodes())
    counts = [1]
    for size in range(1, len(nodes) + 1):
        n = sum(
            1
            for sub in itertools.combinations(nodes, size)
            if not any(und.has_edge(a, b) for a, b in itertools.combinations(sub, 2))
        )
        if n == 0:
            break
        counts.append(n)
    return counts


def test_reach_two_chain_marks_hold_the_library_numbers_and_match_exact_levels() -> None:
    m = fl.exclusion_chain(8, reach=2, couplings=fl.random_couplings(8, seed=11))
    wb = Workbench(m, synchronous=True)
    assert wb.error.value == ""
    sp = fl.free_spectrum(m)
    _assert_roots_shown(wb, sp)
    # Chudnovsky-Seymour 2007 (claw-free, positive weights): real roots, so the axis is marked
    assert max(wb.roots.real_axis.x) > 0
    # the ladder's rungs are the library's lowest levels, and these are numpy's eigenvalues
    rungs = np.asarray(wb.ladder.rungs.y)[:, 0]
    np.testing.assert_allclose(rungs, [lv.energy for lv in sp.levels(len(rungs))], atol=0)
    exact = np.unique(np.round(_dense_eigenvalues(m).real, 9))
    np.testing.assert_allclose(np.unique(np.round(rungs, 9))[:5], exact[:5], atol=1e-8)
    # the degeneracy written beside each rung: dim / 2^S (Fendley 2019), from numpy's count
    ground = _dense_eigenvalues(m).real
    multiplicity = int(np.sum(np.abs(ground - ground.min()) < 1e-8))
    # (levels closer than a label's height share one label: "3 levels x4")
    assert re.fullmatch(rf"(\d+ levels )?x{multiplicity}", wb.ladder.degeneracy.text[0])
    np.testing.assert_allclose(np.asarray(wb.ladder.exact_rungs.y)[:5, 0], exact[:5], atol=1e-8)


def test_ising_chain_marks_and_ground_energy_against_numpy() -> None:
    m = fl.ising_chain(6, field=0.7, bond=1.1)
    wb = Workbench(m, synchronous=True)
    sp = fl.free_spectrum(m)
    _assert_roots_shown(wb, sp)
    assert wb.verdict.summary.value.count("jordan-wigner") >= 1
    ground = float(np.asarray(wb.ladder.rungs.y)[0, 0])
    # Pfeuty 1970: the open transverse-field chain is free; numpy ED is the outside reference
    assert ground == pytest.approx(float(_dense_eigenvalues(m).real.min()), abs=1e-9)


def test_clock_chain_with_complex_couplings_star_and_levels() -> None:
    field = fl.complex_couplings(3, seed=5)
    m = fl.clock_chain(3, field=field, bond=0.8, states=3)
    wb = Workbench(m, synchronous=True)
    sp = fl.free_spectrum(m)
    _assert_roots_shown(wb, sp)
    # the 3-fold star: omega^s eta_k for s = 1, 2 (Baxter 1989; Fendley 2014)
    omega = np.exp(2j * np.pi / 3)
    eta = np.asarray(sp.quasi_energies, complex)
    np.testing.assert_allclose(
        _by_value(_xy(wb.roots.star)), _by_value(np.concatenate([omega * eta, omega**2 * eta]))
    )
    # N > 2: levels drawn in the complex plane, each one an eigenvalue numpy finds
    assert wb.ladder.children[1] is wb.ladder.plane
    shown = _xy(wb.ladder.levels)
    assert len(shown) > 0
    eig = _dense_eigenvalues(m)
    for e in shown:
        assert np.min(np.abs(eig - e)) < 1e-8
    np.testing.assert_allclose(shown, [lv.energy for lv in sp.levels(len(shown))], atol=1e-12)


def test_two_dimensional_pauli_model() -> None:
    # an open honeycomb patch whose frustration graph is the line graph of a tree (Kitaev 2006;
    # Chapman and Flammia 2020): Jordan-Wigner solvable
    m = fl.kitaev_honeycomb(3, 2, jx=1.0, jy=0.6, jz=0.8)
    wb = Workbench(m, synchronous=True)
    sp = fl.free_spectrum(m)
    _assert_roots_shown(wb, sp)
    assert "jordan-wigner" in wb.verdict.summary.value
    # every vertex labelled with its term's text, as the parser reads it back
    labels = list(wb.verdict.labels.text)
    assert len(labels) == len(m)
    for label, term in zip(labels, m.terms, strict=True):
        assert fl.parse_model(label).terms[0].string == term.string
    eig = _dense_eigenvalues(m).real
    assert float(np.asarray(wb.ladder.rungs.y)[0, 0]) == pytest.approx(eig.min(), abs=1e-9)


def test_unsolved_model_is_refused_until_unproven_is_asked_for() -> None:
    m = fl.ising_lattice(2, 3)
    wb = Workbench(m, synchronous=True)
    assert "unsolved" in wb.verdict.summary.value
    # the witness (a claw) is highlighted on the graph at its vertices' positions
    witness = fl.classify(m).witness
    assert len(witness) == 4
    pos = _xy(wb.verdict.vertices)
    np.testing.assert_allclose(_xy(wb.verdict.witness), pos[list(witness)])
    assert "No free spectrum is claimed" in wb.roots.refusal.value
    assert len(wb.roots.roots.x) == 0 and len(wb.roots.eta.x) == 0
    wb.roots.unproven.value = True
    assert "UNPROVEN" in wb.roots.refusal.value
    assert "UNPROVEN" in wb.roots.root_figure.title
    with pytest.raises(fl.NoTheoremError):
        fl.free_spectrum(m)
    _assert_roots_shown(wb, fl.free_spectrum(m, unproven=True))


def test_size_couplings_and_text_update_the_marks(monkeypatch: pytest.MonkeyPatch) -> None:
    layouts = []
    real_layout = verdict_panel.graph_layout
    monkeypatch.setattr(
        verdict_panel, "graph_layout", lambda *args: layouts.append(1) or real_layout(*args)
    )
    wb = Workbench(synchronous=True)  # the family controls' default: a reach-2 chain
    wb.input.size.value = 9
    m = wb.model
    assert len(m) == 9
    _assert_roots_shown(wb, fl.free_spectrum(fl.exclusion_chain(9, reach=2)))
    drawn = len(layouts)
    wb.input.pattern.value = "staggered"
    wb.input.a.value, wb.input.b.value = 1.3, 0.4
    expected = fl.exclusion_chain(9, reach=2, couplings=fl.staggered(9, 1.3, 0.4))
    _assert_roots_shown(wb, fl.free_spectrum(expected))
    assert len(layouts) == drawn  # a coupling change keeps the graph's layout
    wb.input.pattern.value = "random"
    wb.input.seed.value = 4
    values = fl.random_couplings(9, 0.5, 1.5, seed=4)
    _assert_roots_shown(wb, fl.free_spectrum(fl.exclusion_chain(9, reach=2, couplings=values)))
    text = "0.9 X0 Z1 + 1.2 X1 Z2 + 0.3 X2 Z3 + 0.7 X3 Z4"
    wb.set_text(text)
    _assert_roots_shown(wb, fl.free_spectrum(fl.parse_model(text)))


def test_states_control_reads_the_typed_text_again() -> None:
    text = "X0 Z1 + 0.5 X1 Z2 + 0.8 X2 Z3"  # a reach-1 chain for every N (Alcaraz-Pimenta 2020)
    wb = Workbench(text, states=3, synchronous=True)
    assert wb.model.states == 3
    _assert_roots_shown(wb, fl.free_spectrum(fl.parse_model(text, states=3)))
    wb.input.states.value = 4
    assert wb.model.states == 4
    _assert_roots_shown(wb, fl.free_spectrum(fl.parse_model(text, states=4)))


def test_per_term_table_and_symbol_sliders() -> None:
    wb = Workbench(synchronous=True)
    wb.input.size.value = 5
    wb.input.pattern.value = "table"
    cells = wb.input.table.children
    assert len(cells) == 5
    cells[2].value = "0.25"
    expected = fl.exclusion_chain(5, reach=2, couplings=[1, 1, 0.25, 1, 1])
    _assert_roots_shown(wb, fl.free_spectrum(expected))
    wb.set_text("g X0 Z1 Z2 + h X1 Z2 Z3 + X2 Z3 Z4 + g X3 Z4 Z5")
    sliders = {s.description: s for s in wb.input.sliders.children[1:]}
    assert sorted(sliders) == ["g", "h"]
    sliders["g"].value = 0.4
    sliders["h"].value = -1.7
    numeric = wb.model.subs({"g": 0.4, "h": -1.7})
    _assert_roots_shown(wb, fl.free_spectrum(numeric))


def test_bad_text_keeps_the_model_and_shows_the_caret() -> None:
    good = "X0 Z1 Z2 + 0.5 X1 Z2 Z3"
    wb = Workbench(good, synchronous=True)
    before = wb.model
    roots = _xy(wb.roots.roots)
    bad = "X0 Z1 Z2 + 0.5 X1 Z2 Z3 + 2 g X2"
    with pytest.raises(fl.ModelSyntaxError) as caught:
        fl.parse_model(bad)
    wb.set_text(bad)
    assert wb.model is before
    np.testing.assert_array_equal(_xy(wb.roots.roots), roots)
    message = wb.input.message.value
    assert html.escape(caught.value.problem) in message
    assert f"column {caught.value.column}" in message
    pre = re.search(r"<pre[^>]*>(.*)</pre>", message, re.S)
    assert pre is not None
    source, caret = pre.group(1).split("\n")
    assert caret.index("^") == caught.value.column - 1
    assert wb.input.text.value == bad  # the user's text is kept
    wb.set_text("2.5")  # parses, but a constant alone is no model to analyse
    assert wb.model is before
    assert "no operator terms" in wb.input.message.value
    assert wb.error.value == ""


def test_order_control_counts_and_last_partial_polynomial() -> None:
    m = fl.exclusion_chain(9, reach=2, couplings=fl.random_couplings(9, seed=2))
    wb = Workbench(m, synchronous=True)
    graph = fl.frustration_graph(m)
    # alpha(G) from networkx: the largest clique of the complement graph
    alpha = max(len(c) for c in nx.find_cliques(nx.complement(graph)))
    assert (wb.series.order.min, wb.series.order.max) == (0, alpha)
    assert wb.series.play.max == alpha
    brute = _independent_set_counts(graph)
    library = [step.count for step in fl.charge_series(m)]
    assert library == brute
    for s in range(alpha + 1):
        wb.series.order.value = s
        shown = re.search(r"order (\d+)</b> of (\d+): (\d+) product", wb.series.count.value)
        assert shown is not None
        assert tuple(int(g) for g in shown.groups()) == (s, alpha, library[s])
        assert len(wb.series.roots.x) == s  # P_s has degree s
    # the last partial polynomial is P itself: its roots are the library's roots of P
    wb.series.order.value = alpha
    np.testing.assert_allclose(
        _by_value(_xy(wb.series.roots)), _by_value(fl.free_spectrum(m).roots), rtol=1e-9
    )
    assert "&#10003; passed" in wb.series.commutes.value


def test_checks_table_reports_every_check_in_words() -> None:
    m = fl.exclusion_chain(6, reach=2)
    wb = Workbench(m, synchronous=True)
    assert "Not run yet" in wb.checks.table.value
    wb.run_checks()
    report = fl.verify(m)
    table = wb.checks.table.value
    for check in report.checks:
        assert check.name.replace("<", "&lt;").replace(">", "&gt;") in table
    statuses = [c.status for c in report.checks]
    assert table.count("&#10003; passed") == statuses.count("passed")
    assert table.count("&#10007; FAILED") == statuses.count("FAILED")
    assert table.count("&#8211; not run") == statuses.count("not run")
    assert statuses.count("passed") > 0


def test_an_exception_is_shown_with_its_traceback(monkeypatch: pytest.MonkeyPatch) -> None:
    wb = Workbench(fl.exclusion_chain(5, reach=1), synchronous=True)
    roots = _xy(wb.roots.roots)

    def broken(model, numeric, unproven, choice):
        raise RuntimeError("deliberately broken for the test")

    before = wb.model
    monkeypatch.setattr(workbench_module, "derive", broken)
    wb.set_text("X0 Z1 + X1 Z2 + X2 Z3")
    assert "deliberately broken" in wb.error.value
    assert "RuntimeError" in wb.traceback.value and "Traceback" in wb.traceback.value
    np.testing.assert_array_equal(_xy(wb.roots.roots), roots)  # last result kept
    # the model and the views agree after the crash (issue 21, item 9: wb.model held the new
    # model while the views kept the old one)
    assert wb.model is before and wb.analysis.model is before


def test_background_mode_fills_the_marks_and_clears_the_busy_line() -> None:
    m = fl.exclusion_chain(7, reach=1, couplings=fl.random_couplings(7, seed=9))
    wb = Workbench(m)  # work runs in background threads
    wb.wait(60)
    _assert_roots_shown(wb, fl.free_spectrum(m))
    assert wb.busy.value == ""
    assert wb.cancel.layout.display == "none"
    assert wb.series.roots.x is not None and len(wb.series.roots.x) == wb.series.alpha


def test_worker_newer_request_supersedes_older() -> None:
    applied: list[str] = []
    busy: list[bool] = []
    worker = Worker(lambda lanes: busy.append(bool(lanes)), lambda m, t: applied.append(m))
    release = threading.Event()
    started = threading.Event()
    old_thread: list[threading.Thread] = []

    def slow() -> str:
        old_thread.append(threading.current_thread())
        started.set()
        release.wait(10)
        return "old"

    worker.submit("model", "old", slow, applied.append)
    assert started.wait(10)
    worker.submit("model", "new", lambda: "new", applied.append)
    worker.wait(10)
    release.set()
    old_thread[0].join(10)
    assert applied == ["new"]  # the older result arrived last and was dropped
    assert busy[-1] is False


def test_worker_cancel_drops_the_running_result() -> None:
    applied: list[str] = []
    worker = Worker(lambda lanes: None, lambda m, t: applied.append(m))
    release = threading.Event()
    worker.submit("model", "slow", lambda: release.wait(10) and "late", applied.append)
    worker.cancel()
    release.set()
    worker.wait(10)
    assert applied == []


def test_the_export_panel_exports_the_current_model() -> None:
    # the Workbench's export section works on whatever model it shows now
    from freeladder_lab import Workbench

    wb = Workbench(fl.exclusion_chain(5, reach=2), synchronous=True)
    wb.set_text("X0 + 0.5 Z0 Z1 + X1")
    model, exported = wb.export._source()
    assert str(exported) == str(wb.model) == str(fl.parse_model("X0 + 0.5 Z0 Z1 + X1"))
    text = wb.export.show_text()
    assert text == fl.worked_calculation(exported).to_script()


def test_family_controls_follow_a_chain_passed_in() -> None:
    # a chain given to the Workbench sets the size, reach and N controls, so moving the reach
    # control rebuilds this chain's size (not a default one)
    from freeladder_lab import Workbench

    wb = Workbench(fl.exclusion_chain(8, reach=2, states=3), synchronous=True)
    assert (wb.input.size.value, wb.input.reach.value, wb.input.states.value) == (8, 2, 3)
    wb.input.reach.value = 3
    assert len(wb.model) == 8 and fl.chain_structure(wb.model).reach == 3


def test_family_selector_says_custom_for_a_model_the_controls_do_not_build() -> None:
    # couplings 1, 0.4, 0.7, 1, ...: neither uniform nor staggered, so the selector must not
    # claim a family pattern
    given = fl.exclusion_chain(8, reach=2, couplings=[1, 0.4, 0.7, 1, 0.4, 0.7, 1, 0.4])
    wb = Workbench(given, synchronous=True)
    panel = wb.input
    assert panel.family.value == CUSTOM
    assert "not one the family controls build" in panel.family_note.value
    hidden = (panel.size, panel.reach, panel.pattern, panel.pattern_box)
    assert all(w.layout.display == "none" for w in hidden)
    assert panel.states.layout.display != "none" and not panel.states.disabled  # N re-reads
    assert wb.model is given
    _assert_roots_shown(wb, fl.free_spectrum(given))
    # picking the chain family replaces the model by the family's (size kept from the chain)
    panel.family.value = next(iter(FAMILIES))
    assert panel.family_note.value == ""
    assert all(w.layout.display == "" for w in hidden)
    built = fl.exclusion_chain(8, reach=2)
    assert str(wb.model) == str(built)
    _assert_roots_shown(wb, fl.free_spectrum(built))


def test_typed_text_the_controls_build_keeps_the_family_in_charge() -> None:
    wb = Workbench(synchronous=True)  # the chain family at its default size, uniform
    panel = wb.input
    default = panel.size.value
    wb.set_text(str(fl.exclusion_chain(default, reach=2)))
    assert panel.family.value != CUSTOM and panel.family_note.value == ""
    panel.size.value = default - 2  # still the family's model: the size control rebuilds it
    assert str(wb.model) == str(fl.exclusion_chain(default - 2, reach=2))
    wb.set_text("0.3 X0 Z1 Z2 + X1 Z2 Z3 + X2 Z3 Z4")  # no uniform chain: custom
    assert panel.family.value == CUSTOM
    panel.size.value = 5  # a hidden control moved by code builds nothing
    assert str(wb.model) == str(fl.parse_model("0.3 X0 Z1 Z2 + X1 Z2 Z3 + X2 Z3 Z4"))


def test_choosing_custom_by_hand_keeps_the_model() -> None:
    wb = Workbench(synchronous=True)
    before = wb.model
    wb.input.family.value = CUSTOM
    assert wb.model is before
    assert wb.input.size.layout.display == "none" and "Pick a family" in wb.input.family_note.value


def test_roots_summary_says_what_the_bounds_are_once() -> None:
    # the text of the bounds names each kind of claim once, and the fast and certified routes
    # differ in that claim (proved enclosures only for the certified one)
    m = fl.exclusion_chain(8, reach=2, couplings=fl.staggered(8, 1.0, 0.4))
    wb = Workbench(m, synchronous=True)
    summary = wb.roots.summary.value
    bounds = fl.free_spectrum(m).provenance.bounds
    assert f"bounds: {html.escape(bounds)}" in summary
    assert summary.count("error estimates") == 1 and bounds.count("estimate") == 1
    # the method is said in the path line, not again here
    assert "count bisection" not in bounds and "count bisection" in summary
    proved = fl.free_spectrum(m, method="certified").provenance.bounds
    assert proved.startswith("proved enclosures") and "estimate" not in proved
    # the k / eta_k / bound table sits at its natural height beside the notes
    assert "align-items:flex-start" in summary


def test_graph_title_is_a_label_above_the_figure() -> None:
    # bqplot draws its toolbar over the figure's top strip, so the title lives outside it
    m = fl.exclusion_chain(8, reach=2)
    wb = Workbench(m, synchronous=True)
    assert wb.verdict.figure.title == ""
    # reach-2 exclusion algebra: term j fails to commute with j +- 1 and j +- 2 only
    # (Fendley 2019), so M - 1 + M - 2 = 13 pairs; networkx counts the graph's edges
    pairs = 8 - 1 + 8 - 2
    assert nx.Graph(wb.analysis.graph.to_undirected()).number_of_edges() == pairs
    assert f"frustration graph: 8 terms, {pairs} non-commuting pairs" in wb.verdict.title.value


def _ladder_text() -> str:
    """A two-leg ladder with two plaquettes (Chapman-Flammia 2020: free sector by sector)."""
    return "0.9 X0 X1 + 1.2 Y1 Y2 + 0.7 X3 X4 + 1.1 Y4 Y5 + 0.8 Z0 Z3 + 1.3 Z1 Z4 + 0.6 Z2 Z5"


def test_sector_chooser_for_a_ladder_with_cycles() -> None:
    m = fl.parse_model(_ladder_text())
    wb = Workbench(m, synchronous=True)
    chooser = wb.roots.sector
    assert chooser.layout.display == ""
    values = [v for _, v in chooser.options]
    assert values[:3] == ["ground", "all", "polynomial"]
    n_cycles = len(fl.sectors(m).cycle_operators)
    assert all(isinstance(v, tuple) and len(v) == n_cycles for v in values[3:])
    # the default: the ground sector, whose lowest rung is numpy's ground energy
    assert chooser.value == "ground"
    assert wb.roots.refusal.value == ""
    exact = _dense_eigenvalues(m).real
    rungs = np.asarray(wb.ladder.rungs.y)[:, 0]
    assert rungs[0] == pytest.approx(exact.min(), abs=1e-10)
    sp = fl.free_spectrum(m, sector="ground")
    np.testing.assert_allclose(_xy(wb.roots.eta), np.asarray(sp.quasi_energies, complex))
    assert "sector" in wb.roots.summary.value
    # each individual sector: the rungs are that sector's levels, each one an eigenvalue
    # numpy finds (the sector's spectrum is part of the whole)
    for values_ in values[3:]:
        chooser.value = values_
        shown = np.asarray(wb.ladder.rungs.y)[:, 0]
        expected = fl.free_spectrum(m, sector=values_).levels(len(shown)).energies
        np.testing.assert_allclose(shown, expected, atol=0)
        for e in shown:
            assert np.min(np.abs(exact - e)) < 1e-9
    # all sectors: one row per label, their lowest levels include numpy's ground energy
    chooser.value = "all"
    table = wb.roots.sectors_table.value
    every = fl.jordan_wigner_spectrum(m, "all")
    assert f"{len(every.sectors)} sectors" in table
    assert table.count("<tr>") == len(every.sectors) + 1
    # the single polynomial: the library's refusal, with the way out it names
    chooser.value = "polynomial"
    assert "No free spectrum is claimed" in wb.roots.refusal.value
    assert "sector=&quot;ground&quot;" in wb.roots.refusal.value
    assert len(wb.roots.eta.x) == 0


def test_sector_chooser_hidden_and_kept_across_coupling_changes() -> None:
    wb = Workbench(fl.exclusion_chain(6, reach=2), synchronous=True)
    assert wb.roots.sector.layout.display == "none"
    wb.set_text(_ladder_text())
    assert wb.roots.sector.layout.display == ""
    first = [v for _, v in wb.roots.sector.options][3]
    wb.roots.sector.value = first
    changed = _ladder_text().replace("0.9 X0 X1", "0.5 X0 X1")
    wb.set_text(changed)  # same strings: the chosen sector stays
    assert wb.roots.sector.value == first
    sp = fl.free_spectrum(fl.parse_model(changed), sector=first)
    np.testing.assert_allclose(_xy(wb.roots.eta), np.asarray(sp.quasi_energies, complex))
    wb.set_text("X0 Z1 + 0.5 X1 Z2 + 0.8 X2 Z3")  # a chain: no cycles, no chooser
    assert wb.roots.sector.layout.display == "none"
    assert wb.roots.sectors_table.value == ""


# -- one panel protocol, one worker, one door into the library ----------------------------------


def test_only_the_adapter_imports_freeladder() -> None:
    # the adapter is the one door into the library: no other module of freeladder_lab imports
    # freeladder (issue 19, item 5: input_panel, presets and export did)
    import ast
    import pathlib

    import freeladder_lab

    folder = pathlib.Path(freeladder_lab.__file__).parent
    offenders = []
    for path in sorted(folder.glob("*.py")):
        if path.name == "adapter.py":
            continue
        for node in ast.walk(ast.parse(path.read_text())):
            names = []
            if isinstance(node, ast.Import):
                names = [a.name for a in node.names]
            elif isinstance(node, ast.ImportFrom) and node.level == 0:
                names = [node.module or ""]
            offenders += [f"{path.name}: {n}" for n in names if n.split(".")[0] == "freeladder"]
    assert offenders == []


def test_every_section_has_one_shape_and_one_registration_line() -> None:
    from freeladder_lab.panel import Section
    from freeladder_lab.workbench import SECTIONS

    wb = Workbench(fl.exclusion_chain(5, reach=2), synchronous=True)
    assert [name for name, _ in SECTIONS] == list(wb.sections)
    for name, kind in SECTIONS:
        assert issubclass(kind, Section) and kind.update is not Section.update, name
        assert getattr(wb, name) is wb.sections[name]
        assert kind.TITLE and kind.HINT


def test_a_superseded_analysis_stops_at_its_next_part(monkeypatch: pytest.MonkeyPatch) -> None:
    # cooperative cancellation: an older model's analysis stops between parts once a newer
    # edit took over, instead of computing every remaining part (issue 21, item 9)
    from freeladder_lab import adapter

    entered = threading.Event()
    release = threading.Event()
    later_parts: list[str] = []
    real_choices = adapter.sector_choices

    def slow_choices(a):  # the part after the structure parts
        if len(a.model) == 30:  # the old, superseded model
            entered.set()
            release.wait(30)
        return real_choices(a)

    real_outcome = adapter.outcome

    def counting_outcome(a, choice=None, unproven=False):
        later_parts.append(str(len(a.model)))
        return real_outcome(a, choice, unproven)

    monkeypatch.setattr(adapter, "sector_choices", slow_choices)
    monkeypatch.setattr(adapter, "outcome", counting_outcome)
    wb = Workbench(fl.exclusion_chain(6, reach=1))
    wb.wait(60)
    wb.take_model(fl.exclusion_chain(30, reach=1))
    assert entered.wait(30)
    newer = fl.exclusion_chain(7, reach=1)
    wb.take_model(newer)
    wb.wait(60)  # the newer model is shown while the old one still waits
    assert wb.model is newer
    release.set()
    wb.wait(60)
    assert "30" not in later_parts  # the old analysis stopped before its spectrum
    assert wb.model is newer
    _assert_roots_shown(wb, fl.free_spectrum(newer))


# -- statuses (issue 20, item 3) -------------------------------------------------------------


def test_checks_panel_shows_does_not_hold_and_takes_the_headline_from_ok() -> None:
    # a ladder free sector by sector (Chapman and Flammia 2020): the single-polynomial identity
    # T(u) T(-u) = P(u^2) is not claimed, so it "does not hold" without being a failure
    text = "X0 X1 + Y1 Y2 + Z2 Z3 + X3 X0 + Z1 Z3"
    wb = Workbench(text, synchronous=True)
    wb.run_checks()
    report = fl.verify(fl.parse_model(text))
    assert report.ok
    table = wb.checks.table.value
    statuses = [c.status for c in report.checks]
    assert "does not hold" in statuses
    row = table.split("T(u) T(-u) = P(u^2)")[1].split("</tr>")[0]
    assert "does not hold" in row and "FAILED" not in row
    assert "FAILED" not in table
    assert "verified: every check that ran passed" in table
    assert table.count("does not hold (not claimed)") == statuses.count("does not hold")


# -- large models (issue 24, items 1, 2, 12) -------------------------------------------------


def test_a_long_chain_reads_at_two_thousand_terms() -> None:
    m = fl.exclusion_chain(2000, reach=2)
    wb = Workbench(m, synchronous=True)
    sp = fl.free_spectrum(m)
    # multiplicity dim / 2^S (Fendley 2019): written as a power, never as 400 digits
    dim, modes = 2 ** len(m.sites), len(sp.quasi_energies)
    assert sp.degeneracy == dim // 2**modes
    k = len(m.sites) - modes
    assert all(re.fullmatch(rf"(\d+ levels )?x 2\^{k}", t) for t in wb.ladder.degeneracy.text)
    assert (
        f"x 2^{k}" in wb.ladder.summary.value and str(sp.degeneracy) not in wb.ladder.summary.value
    )
    # the levels differ by far less than their size: drawn as E - E0, and the axis says so
    e0 = float(sp.ground_energy)
    assert wb.ladder.offset == pytest.approx(e0)
    assert "E - E0" in wb.ladder.y_axis.label
    rungs = np.asarray(wb.ladder.rungs.y)[:, 0] + wb.ladder.offset
    np.testing.assert_allclose(rungs, [lv.energy for lv in sp.levels(len(rungs))], atol=1e-9)
    # label heights at least one label apart (in data units of the drawn axis)
    labels = np.asarray(wb.ladder.degeneracy.y, float)
    scale = wb.ladder._y_scale
    from freeladder_lab.ladder_panel import _PLOT_PIXELS, LABEL_PIXELS

    step = (scale.max - scale.min) * LABEL_PIXELS / _PLOT_PIXELS
    assert np.all(np.diff(labels) >= step * (1 - 1e-9))
    assert labels.max() <= scale.max
    # the roots span decades: plotted as magnitudes on a log axis that says so
    assert wb.roots.logarithmic
    assert wb.roots.plots.children == (wb.roots.root_spread, wb.roots.eta_spread)
    assert "log scale" in wb.roots.root_spread.axes[1].label
    np.testing.assert_allclose(
        np.sort(np.asarray(wb.roots.root_magnitudes.y)), np.sort(np.abs(sp.roots)), rtol=1e-12
    )
    # the graph is drawn as its band: the chain order along the horizontal axis
    x = _xy(wb.verdict.vertices).real
    order = list(fl.chain_structure(m).order)
    assert np.all(np.diff(x[order]) > 0)
    assert wb.verdict.order_axis.visible


def test_multiplicity_text_writes_powers() -> None:
    from freeladder_lab.adapter import multiplicity_text

    assert multiplicity_text(4, 2) == "x4"
    assert multiplicity_text(2**1000, 2) == "x 2^1000"
    assert multiplicity_text(3**20, 3) == "x 3^20"
    assert multiplicity_text(10**500 + 7, 2) == "x 1.0e500"


def test_near_degenerate_labels_are_moved_apart() -> None:
    from freeladder_lab.ladder_panel import LABEL_PIXELS, label_groups, spread_labels

    y = np.array([0.0, 1e-6, 2e-6, 0.5, 1.0])
    out = spread_labels(y, 0.0, 1.0, pixels=300)
    assert np.all(np.diff(out) >= LABEL_PIXELS / 300 - 1e-12)
    assert out[0] == 0.0 and out[3] == 0.5
    # levels closer than a label share one label that says how many they are
    at, texts = label_groups(y, ["x2", "x2", "x2", "x4", "x2"], 0.0, 1.0, pixels=300)
    assert texts == ["3 levels x2", "x4", "x2"]
    np.testing.assert_allclose(at, [0.0, 0.5, 1.0])


# -- words on screen (issue 24, items 3-5, 8, 10, 11) ---------------------------------------


def test_products_have_no_float_noise_and_k_counts_from_one() -> None:
    from freeladder_lab.adapter import product_text

    m = fl.parse_model("0.6 X0 Z1 + X1 Z2 + 3 X2 Z3")
    step = list(fl.charge_series(m))[2]
    assert any(str(t.coupling) == "1.7999999999999998" for t in step.terms)  # the raw product
    texts = [product_text(t) for t in step.terms]
    assert any(t.startswith("1.8 ") for t in texts), texts  # 0.6 * 3, not 1.7999999999999998
    assert not any("99999" in t for t in texts)
    wb = Workbench(m, synchronous=True)
    wb.series.order.value = 2
    assert "1.8 X_{0}" in wb.series.products.value
    assert "99999" not in wb.series.products.value
    rows = re.findall(
        r"<tr><td style='text-align:right; padding-right:10px'>(\d+)</td>", wb.roots.summary.value
    )
    assert rows[0] == "1"
    assert wb.roots.roots.names[0].startswith("y_1 = ")


def test_sector_chooser_names_the_cycle_strings() -> None:
    m = fl.parse_model(_ladder_text())
    wb = Workbench(m, synchronous=True)
    names = [str(w) for w in fl.sectors(m).cycle_operators]
    for text, value in wb.roots.sector.options[3:]:
        for name, v in zip(names, value, strict=True):
            assert f"{name} = {'+1' if v > 0 else '-1'}" in text
    # the ladder's exact column holds the same sector as the free levels, and says so
    assert "exact diag. of the sector" in wb.ladder.title.value
    assert "whole space" not in wb.ladder.title.value
    assert names[0] in wb.ladder.title.value


def test_the_tours_staggered_chain_is_the_chain_family() -> None:
    given = fl.exclusion_chain(8, reach=2, couplings=fl.staggered(8, 1.0, 0.4))
    wb = Workbench(given, synchronous=True)
    panel = wb.input
    assert panel.family.value == next(iter(FAMILIES))
    assert panel.pattern.value == "staggered"
    assert (panel.a.value, panel.b.value) == (1.0, 0.4)
    panel.size.value = 10  # the family controls are in charge: they rebuild this pattern
    assert str(wb.model) == str(
        fl.exclusion_chain(10, reach=2, couplings=fl.staggered(10, 1.0, 0.4))
    )


def test_export_after_a_typo_says_no_model_parsed() -> None:
    wb = Workbench("X0 Z1 + 0.5 X1 Z2 + Q7", synchronous=True)
    assert wb.model is None
    assert "No model has parsed yet" in wb.input.message.value
    assert "last model that parsed" not in wb.input.message.value
    assert wb.input.family.value == CUSTOM  # no family model is claimed either
    assert wb.export.show_text() is None
    assert "no model has parsed" in wb.export.status.value
    assert "TypeError" not in wb.export.status.value
    wb.set_text("X0 Z1 + 0.5 X1 Z2")  # fixed: the stale message goes, export works
    assert wb.export.status.value == ""
    assert wb.export.show_text() == fl.worked_calculation(wb.model).to_script()


# -- symbols and escaping (issue 21, item 9) ---------------------------------------------------


def test_symbolic_model_exports_the_numbers_the_views_show() -> None:
    wb = Workbench("g X0 + Z0 Z1 + X1", synchronous=True)
    slider = wb.input.sliders.children[1]
    slider.value = 0.7
    numeric = fl.parse_model("0.7 X0 + Z0 Z1 + X1")
    _assert_roots_shown(wb, fl.free_spectrum(numeric))
    text = wb.export.show_text()
    assert text is not None, wb.export.status.value
    assert "# g = 0.7" in text
    expected = fl.worked_calculation(numeric).to_script()
    shown = text.replace(
        "# The Workbench's model 'g X0 + Z0 Z1 + X1' with its symbols set by "
        "the sliders:\n# g = 0.7\n",
        "",
    )

    def untimed(s: str) -> str:  # the checks' wall-clock times differ between two runs
        return re.sub(r"took [0-9.e+-]+ s", "took (time) s", s)

    assert untimed(shown) == untimed(expected)


def test_error_text_is_escaped() -> None:
    import sympy

    from freeladder_lab.export import ExportPanel

    evil = sympy.Symbol("<img src=x onerror=alert(1)>")
    m = fl.exclusion_chain(3, reach=1, couplings=[evil, 1, 1])
    panel = ExportPanel(lambda: m)
    assert panel.show_text() is None
    assert "<img" not in panel.status.value and "&lt;img" in panel.status.value


def _html_values(widget) -> list[str]:
    """Every HTML text shown anywhere inside ``widget``."""
    import ipywidgets as widgets

    out = []
    if isinstance(widget, (widgets.HTML, widgets.HTMLMath)):
        out.append(widget.value)
    for child in getattr(widget, "children", ()):
        out += _html_values(child)
    return out


def test_a_symbol_named_like_markup_is_shown_as_text() -> None:
    import sympy

    evil = sympy.Symbol("<img src=x onerror=alert(1)>")
    m = fl.exclusion_chain(4, reach=1, couplings=[evil, 1, 1, 1])
    wb = Workbench(m, synchronous=True)
    wb.run_checks()
    text = wb.export.show_text()  # exported at the slider value, the symbol in a comment
    assert text is not None and f"# {evil} = 1" in text
    shown = "\n".join(_html_values(wb))
    assert "<img" not in shown
    # the numbers drawn are those of the numeric model (the symbol at its slider value, 1)
    numeric = fl.exclusion_chain(4, reach=1)
    _assert_roots_shown(wb, fl.free_spectrum(numeric))


def test_order_one_formula_is_broken_into_lines() -> None:
    # issue 24, item 4: Q^(1) = H of the tour's chain ran past the right edge (MathJax does not
    # break formulas): each line of the aligned block stays within the column's width
    from freeladder_lab.adapter import _visible
    from freeladder_lab.series_panel import FORMULA_WIDTH

    m = fl.exclusion_chain(8, reach=2, couplings=fl.staggered(8, 1.0, 0.4))
    wb = Workbench(m, synchronous=True)
    wb.series.order.value = 1
    latex = wb.series.products.value
    assert r"\begin{aligned}" in latex
    body = latex.split(r"\begin{aligned}")[1].split(r"\end{aligned}")[0]
    lines = body.split(r"\\")
    assert len(lines) >= 2
    assert all(_visible(line.replace("&", "")) <= FORMULA_WIDTH + 12 for line in lines), lines
    # every term of H is written once
    assert latex.count("X_{") == len(m)


def test_background_export_runs_in_the_worker() -> None:
    # the worked calculation is worked out in the Workbench's worker (lane "export"), not in
    # the button's callback: the call returns at once and the text box fills when it is ready
    m = fl.exclusion_chain(6, reach=1, couplings=fl.random_couplings(6, seed=3))
    wb = Workbench(m)
    wb.wait(60)
    assert wb.export.show_text() is None
    wb.wait(60)
    assert wb.export.text.value == fl.worked_calculation(m).to_script()
    assert "select the text" in wb.export.status.value
    assert wb.busy.value == ""


def test_worker_delay_waits_and_a_newer_request_cancels_the_wait() -> None:
    # the pause after typing: only the last of several quick requests runs
    applied: list[str] = []
    worker = Worker(lambda lanes: None, lambda m, t: applied.append(m))
    for text in ("X0", "X0 Z1", "X0 Z1 + X1"):
        worker.submit("typing", "reading", lambda t=text: t, applied.append, delay=0.3)
    worker.wait(10)
    assert applied == ["X0 Z1 + X1"]
    # a job that was cancelled stops at its next checkpoint
    from freeladder_lab.worker import checkpoint

    reached: list[int] = []
    release = threading.Event()

    def parts() -> str:
        reached.append(1)
        release.wait(10)
        checkpoint()
        reached.append(2)
        return "done"

    worker.submit("model", "parts", parts, applied.append)
    deadline = time.monotonic() + 10
    while not reached and time.monotonic() < deadline:
        time.sleep(0.01)
    worker.cancel("model")
    release.set()
    worker.wait(10)
    assert reached == [1] and applied == ["X0 Z1 + X1"]


def test_dynamics_section_draws_the_library_autocorrelation() -> None:
    # The curve is fl.autocorrelation's (itself checked against dense expm in test_dynamics);
    # the plateau of the Ising chain ending in a bond is 1 - (h/J)^2 on long chains (Kemp, Yao,
    # Laumann and Fendley, J. Stat. Mech. (2017) 063105; from memory, checked in test_dynamics).
    m = fl.parse_model(" + ".join(f"0.5 X{i} + Z{i} Z{i + 1}" for i in range(30)))
    wb = Workbench(m, synchronous=True)
    wb.dynamics.run()
    times = np.concatenate([[0.0], np.asarray(wb.dynamics.curve.x, float)])
    ref = fl.autocorrelation(m, times)
    np.testing.assert_allclose(wb.dynamics.curve.y, np.real(ref.values[1:]), atol=1e-12)
    assert abs(wb.dynamics.plateau.y[0] - 0.75) < 1e-9
    assert "plateau (zero-mode weight) 0.75" in wb.dynamics.summary.value
    claw = Workbench("X0 X1 X2 + Z0 + Z1 + Z2", synchronous=True)
    claw.dynamics.run()
    assert "No expansion of the edge operator" in claw.dynamics.summary.value
