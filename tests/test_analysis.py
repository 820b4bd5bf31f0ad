"""fl.analyze: one computation per part, coupling-independent parts shared across couplings."""

from __future__ import annotations

import networkx as nx
import numpy as np
import pytest

import freeladder as fl
from freeladder.base.cache import store_of


def test_parts_agree_with_the_library_functions():
    m = fl.exclusion_chain(9, reach=2, couplings=fl.staggered(9, 1.0, 0.6))
    a = fl.analyze(m)
    assert a.verdict.kind == fl.classify(m).kind
    assert a.polynomial.coefficients == fl.exclusion_polynomial(m).coefficients
    np.testing.assert_allclose(a.spectrum().quasi_energies, fl.free_spectrum(m).quasi_energies)
    assert a.charge_counts == tuple(step.count for step in fl.charge_series(m))
    assert a.independence_number == len(a.charge_counts) - 1
    assert nx.is_isomorphic(a.graph, fl.frustration_graph(m))
    # the exact reference: numpy dense diagonalization through fl.exact_spectrum
    assert a.exact is not None
    assert abs(a.exact.levels[0] - a.spectrum().ground_energy) < 1e-9


def test_each_part_is_computed_once(monkeypatch):
    m = fl.exclusion_chain(7, reach=1)
    a = fl.analyze(m)
    first = a.spectrum()
    assert a.spectrum() is first
    assert fl.analyze(m).spectrum() is first  # a second analysis of the same model shares it
    assert a.verdict is a.verdict


def test_coupling_change_reuses_structure_and_recomputes_values():
    m = fl.exclusion_chain(8, reach=2)
    a = fl.analyze(m)
    _ = a.verdict, a.charge_counts, a.spectrum()
    shared = dict(store_of(m).strings.values)
    assert shared, "structure parts are kept with the strings"
    b = a.with_couplings(fl.staggered(8, 1.0, 0.3))
    assert b.model.strings is m.strings
    assert b.verdict.model is b.model  # the witness text prints the new couplings
    assert b.verdict.kind == a.verdict.kind
    assert store_of(b.model).strings is store_of(m).strings
    for key, value in shared.items():
        assert store_of(b.model).strings.values[key] is value
    assert store_of(b.model).couplings is not store_of(m).couplings
    # values that depend on the couplings are new, and right (numpy dense reference)
    h = b.model.to_sparse().toarray()
    assert abs(np.linalg.eigvalsh(h)[0] - b.spectrum().ground_energy) < 1e-9
    assert b.spectrum().ground_energy != pytest.approx(a.spectrum().ground_energy)


def test_failures_are_raised_again_not_hidden():
    m = fl.parse_model("g X0 + Z0 Z1 + X1")
    a = fl.analyze(m)
    with pytest.raises(ValueError, match="symbolic"):
        a.spectrum()
    with pytest.raises(ValueError, match="symbolic"):
        a.spectrum()
    assert a.exact is None  # symbolic couplings: no numbers to diagonalize
    d = a.to_dict()
    assert d["spectrum"]["status"] == "refused" and d["spectrum"]["quasi_energies"] is None
    assert "symbolic" in d["spectrum"]["refusal"]["reason"]
    assert "subs" in d["spectrum"]["refusal"]["instead"]


def test_analysis_is_immutable_and_json_ready():
    import json

    a = fl.analyze(fl.exclusion_chain(5))
    with pytest.raises(AttributeError):
        a.model = fl.exclusion_chain(4)  # type: ignore[misc]
    text = json.dumps(a.to_dict(), allow_nan=False)
    assert '"terms": 5' in text
    assert fl.analyze(a) is a


def test_shared_verdict_quotes_the_new_couplings():
    # the verdict's graph theory is shared across couplings, but its witness text quotes the
    # couplings of the model it describes (a ladder with plaquettes: Chapman-Flammia 2020)
    m = fl.parse_model(
        "1.3 Z0 Z1 + 0.9 Z2 Z3 + 1.1 Z4 Z5 + 0.8 X0 X2 + 1.2 Y2 Y4 + 0.7 Y1 Y3 + X3 X5"
    )
    a = fl.analyze(m)
    assert "0.9 Z2 Z3" in a.verdict.guarantee.witness_text
    b = a.with_couplings([5, 5, 5, 5, 5, 5, 5])
    assert b.verdict.guarantee.witness_text == fl.classify(b.model).guarantee.witness_text
    assert "5 Z2 Z3" in b.verdict.guarantee.witness_text
    assert b.verdict.kind == a.verdict.kind and b.verdict.witness == a.verdict.witness


def test_spectrum_of_a_sector_is_the_free_spectrum_of_that_sector() -> None:
    # A ladder with one plaquette: the Analysis asks free_spectrum for the sector and keeps the
    # answer; the ground sector's ground energy is numpy's lowest eigenvalue (dense ED).
    m = fl.parse_model("X0 X1 + 0.7 Y1 Y2 + 1.3 Z2 Z3 + 0.9 X3 X0 + 1.1 Z1 Z3")
    a = fl.analyze(m)
    ground = a.spectrum(sector="ground")
    assert a.spectrum(sector="ground") is ground
    exact = np.linalg.eigvalsh(m.to_sparse().toarray())
    assert ground.ground_energy == pytest.approx(exact[0], abs=1e-10)
    values = ground.provenance.sector["cycle_values"]
    same = a.spectrum(sector=tuple(values))
    assert same is not ground and same.ground_energy == pytest.approx(exact[0], abs=1e-10)
    with pytest.raises(fl.NoTheoremError):
        a.spectrum()
