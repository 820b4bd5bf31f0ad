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
    assert wb.ladder.degeneracy.text[0] == f"x{multiplicity}"
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
    assert wb.ladder.children[0] is wb.ladder.plane
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

    def broken(a, choice, unproven):
        raise RuntimeError("deliberately broken for the test")

    monkeypatch.setattr(workbench_module, "spectrum_outcome", broken)
    wb.set_text("X0 Z1 + X1 Z2 + X2 Z3")
    assert "deliberately broken" in wb.error.value
    assert "RuntimeError" in wb.traceback.value and "Traceback" in wb.traceback.value
    np.testing.assert_array_equal(_xy(wb.roots.roots), roots)  # last result kept


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
    worker = Worker(lambda flag, what: busy.append(flag), lambda m, t: applied.append(m))
    release = threading.Event()
    started = threading.Event()
    old_thread: list[threading.Thread] = []

    def slow() -> str:
        old_thread.append(threading.current_thread())
        started.set()
        release.wait(10)
        return "old"

    worker.submit("old", slow, applied.append)
    assert started.wait(10)
    worker.submit("new", lambda: "new", applied.append)
    worker.wait(10)
    release.set()
    old_thread[0].join(10)
    assert applied == ["new"]  # the older result arrived last and was dropped
    assert busy[-1] is False


def test_worker_cancel_drops_the_running_result() -> None:
    applied: list[str] = []
    worker = Worker(lambda flag, what: None, lambda m, t: applied.append(m))
    release = threading.Event()
    worker.submit("slow", lambda: release.wait(10) and "late", applied.append)
    worker.cancel()
    release.set()
    worker.wait(10)
    assert applied == []


def test_the_export_panel_exports_the_current_model() -> None:
    # the Workbench's export section works on whatever model it shows now
    from freeladder_lab import Workbench

    wb = Workbench(fl.exclusion_chain(5, reach=2), synchronous=True)
    wb.set_text("X0 + 0.5 Z0 Z1 + X1")
    exported = wb.export._get_model()
    assert str(exported) == str(wb.model) == str(fl.parse_model("X0 + 0.5 Z0 Z1 + X1"))
    cells = fl.worked_calculation(exported)
    assert any("0.5" in c.source for c in cells if c.kind == "code")


def test_family_controls_follow_a_chain_passed_in() -> None:
    # a chain given to the Workbench sets the size, reach and N controls, so moving the reach
    # control rebuilds this chain's size (not a default one)
    from freeladder_lab import Workbench

    wb = Workbench(fl.exclusion_chain(8, reach=2, states=3), synchronous=True)
    assert (wb.input.size.value, wb.input.reach.value, wb.input.states.value) == (8, 2, 3)
    wb.input.reach.value = 1
    assert len(wb.model) == 8 and fl.chain_structure(wb.model).reach == 1


def test_family_selector_says_custom_for_a_model_the_controls_do_not_build() -> None:
    # the tour's chain: couplings 1, 0.4, 1, 0.4, ...; no family pattern as it stands builds
    # it, so the selector must not claim "uniform, a = 1"
    given = fl.exclusion_chain(8, reach=2, couplings=fl.staggered(8, 1.0, 0.4))
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
