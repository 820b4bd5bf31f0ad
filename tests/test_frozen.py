"""Every result object of the library is frozen and has a strict-JSON ``to_dict()``.

For each result type: setting any public field (or a new attribute) raises AttributeError;
array fields are read-only, mapping fields are read-only views, no field is a list, dict or set;
and ``json.dumps(obj.to_dict(), allow_nan=False)`` works.
"""

from __future__ import annotations

import dataclasses
import json
from collections.abc import Callable, Mapping
from types import MappingProxyType
from typing import Any

import numpy as np
import pandas as pd
import pytest
import scipy.sparse as sps

import freeladder as fl
from freeladder.checks.charge_sweep import commutator_sweep
from freeladder.graphs.clawfree import find_even_hole
from freeladder.graphs.indifference import indifference_order
from freeladder.graphs.linegraph import line_graph_root
from freeladder.graphs.relations import find_relations
from freeladder.roots import certify
from freeladder.roots import complex as roots_complex
from freeladder.roots import real as roots
from freeladder.roots.polynomial import sum_rules
from freeladder.spectra.charges import charge_series
from freeladder.spectra.edge import edge_mode, ladder_operators
from freeladder.spectra.thermo import thermodynamics


def _chain() -> fl.Model:
    return fl.exclusion_chain(7, reach=2, couplings=[1.0, 0.5, 1.5, 0.7, 1.2, 0.9, 1.1])


def _ising() -> fl.Model:
    return fl.parse_model("X0 + 0.5 Z0 Z1 + X1 + 0.7 Z1 Z2 + X2")


def _claw() -> fl.Model:
    return fl.parse_model("X0 + 2 Z0 Z1 + 3 Z0 Z2 + 5 Z0 Z3")


def _ladder() -> fl.Model:
    # two legs of three sites, ZZ rungs, leg bonds alternating XX / YY: a line graph with two
    # independent cycles (a Jordan-Wigner model that needs its sectors)
    return fl.parse_model(
        "Z0 Z1 + 0.8 Z2 Z3 + 1.2 Z4 Z5 + 0.9 X0 X2 + 1.1 Y1 Y3 + 0.7 Y2 Y4 + 1.3 X3 X5"
    )


def _dependent() -> fl.Model:
    # the three ZZ terms multiply to the identity: one relation among the strings
    return fl.parse_model("Z0 Z1 + X1 + Z1 Z2 + X2 + Z0 Z2")


def _path_adjacency(n: int) -> list[set[int]]:
    return [{v for v in (u - 1, u + 1) if 0 <= v < n} for u in range(n)]


def _claw_adjacency() -> list[set[int]]:
    return [{1, 2, 3}, {0}, {0}, {0}]


_SIZES = np.array([8.0, 16.0, 32.0, 64.0])


def _cycle_adjacency(n: int) -> list[set[int]]:
    return [{(u - 1) % n, (u + 1) % n} for u in range(n)]


# (id, builder, public field names (None: the dataclass / named-tuple fields), branch or None)
CASES: list[tuple[str, Callable[[], Any], list[str] | None, str | None]] = [
    # -- this branch ---------------------------------------------------------------------------
    (
        "ExclusionPolynomial",
        lambda: fl.exclusion_polynomial(_chain()),
        ["states", "kind", "degree", "coefficients", "weights", "chain", "truncated_at"],
        None,
    ),
    (
        "partial ExclusionPolynomial",
        lambda: fl.exclusion_polynomial(_chain()).truncated(1),
        ["states", "kind", "degree", "coefficients", "truncated_at"],
        None,
    ),
    ("ChainData", lambda: fl.exclusion_polynomial(_chain()).chain, None, None),
    ("PolynomialRoots", lambda: fl.exclusion_polynomial(_chain()).roots(), None, None),
    (
        "SumRules",
        lambda: sum_rules(
            fl.exclusion_polynomial(_ising()), fl.free_spectrum(_ising()).quasi_energies
        ),
        None,
        None,
    ),
    ("ChargeStep", lambda: list(charge_series(_ising()))[2], None, None),
    ("ChargeTerm", lambda: list(charge_series(_ising()))[2].terms[0], None, None),
    ("SweepResult", lambda: commutator_sweep(_claw()), None, None),
    ("Witness", lambda: commutator_sweep(_claw()).witness, None, None),
    (
        "Thermodynamics",
        lambda: thermodynamics(fl.free_spectrum(_ising()), np.array([0.5, 1.0, 2.0])),
        None,
        None,
    ),
    ("EdgeMode", lambda: edge_mode(_ising()), None, None),
    ("LadderOperators", lambda: ladder_operators(_ising()), None, None),
    ("HoleSearch", lambda: find_even_hole(_cycle_adjacency(6), list(range(6))), None, None),
    # -- other branches ------------------------------------------------------------------------
    ("Model", _ising, ["strings", "couplings", "constant"], "input"),
    ("StringArray", lambda: _ising().strings, ["x", "z", "phase", "states", "sites"], "input"),
    ("WeylString", lambda: _ising().terms[1].string, None, "input"),
    ("StringSum", lambda: fl.charge(_ising(), 1), ["strings", "coefficients"], "input"),
    ("Verdict", lambda: fl.classify(_ising()), None, "trust"),
    ("ComponentVerdict", lambda: fl.classify(_ising()).components[0], None, "trust"),
    (
        "FreeSpectrum",
        lambda: fl.free_spectrum(_ising()),
        [
            "roots",
            "quasi_energies",
            "error_bounds",
            "constant",
            "states",
            "degeneracy",
            "provenance",
        ],
        "trust",
    ),
    (
        "LevelTable",
        lambda: fl.free_spectrum(_ising()).levels(4),
        ["energies", "occupations", "multiplicity"],
        "trust",
    ),
    ("Level", lambda: fl.free_spectrum(_ising()).levels(4)[0], None, "trust"),
    (
        "DensityOfStates",
        lambda: fl.free_spectrum(_ising()).density_of_states(np.linspace(-5, 5, 6)),
        None,
        "trust",
    ),
    ("ExactSpectrum", lambda: fl.exact_spectrum(_ising()), None, "verify"),
    ("Report", lambda: fl.verify(_ising()), None, "verify"),
    ("Check", lambda: fl.verify(_ising()).checks[0], None, "verify"),
    ("ChainStructure", lambda: fl.chain_structure(_chain()), None, "graph.py / linegraph.py owner"),
    ("RootTable-count", lambda: roots.chain_real_roots([1.0, 0.5, 1.5, 0.7], 1), None, None),
    (
        "RootTable-aberth",
        lambda: roots_complex.aberth_chain_roots([1.0, 0.5j + 1, 1.5, 0.7], 1),
        None,
        None,
    ),
    (
        "RootTable-certified",
        lambda: certify.certify_chain_roots(
            [1.0, 0.5, 1.5, 0.7], 1, roots.chain_real_roots([1.0, 0.5, 1.5, 0.7], 1).values
        ),
        None,
        None,
    ),
    ("RootTable-exact", lambda: certify.certified_roots([1, -3, 1]), None, None),
    (
        "LineGraphRoot",
        lambda: line_graph_root(_path_adjacency(4), [0, 1, 2, 3]),
        None,
        "graph.py / linegraph.py owner",
    ),
    ("NotALineGraph", lambda: line_graph_root(_claw_adjacency(), [0, 1, 2, 3]), None, None),
    # -- the analysis and the newer result types ---------------------------------------------------
    ("Analysis", lambda: fl.analyze(_ising()), ["model"], None),
    ("SpectrumProvenance", lambda: fl.free_spectrum(_ising()).provenance, None, None),
    ("Guarantee", lambda: fl.classify(_ising()).guarantee, None, None),
    ("SectorStructure", lambda: fl.sectors(_ladder()), None, None),
    ("SectorSpectrum", lambda: fl.jordan_wigner_spectrum(_ladder()), None, None),
    (
        "IndifferenceOrder",
        lambda: indifference_order(fl.exclusion_chain(6, reach=3, states=4)),
        None,
        None,
    ),
    (
        "PowerLawFit",
        lambda: fl.power_law_fit(_SIZES, 3 / _SIZES),
        None,
        None,
    ),
    ("GapScaling", lambda: fl.gap_scaling(fl.ising_chain, [8, 16, 32, 64]), None, None),
    ("EnergyDensity", lambda: fl.energy_density(fl.ising_chain, [8, 16, 32, 64]), None, None),
    (
        "LevelMatch",
        lambda: fl.match_levels(fl.free_spectrum(_ising()).levels(), fl.exact_spectrum(_ising())),
        None,
        None,
    ),
    ("Relations", lambda: find_relations(_dependent()), None, None),
    ("Relation", lambda: find_relations(_dependent()).relations[0], None, None),
    ("LogGapStatistics", lambda: _log_gap_statistics(), None, "disorder.py owner"),
]


def _log_gap_statistics() -> Any:
    # smallest quasi-energies of two chains per size, with two coupling patterns each
    rows = []
    for n in (8, 16):
        for couplings in ([1.0, 0.6] * n, [0.7, 1.0] * n):
            m = fl.exclusion_chain(2 * n - 1, reach=1, couplings=couplings[: 2 * n - 1])
            rows.append({"size": n, "gap": fl.smallest_quasi_energy(m)[0]})
    return fl.log_gap_statistics(pd.DataFrame(rows), bins=3)


def _params() -> list[Any]:
    out = []
    for name, build, fields, _owner in CASES:
        out.append(pytest.param(build, fields, id=name))
    return out


def _field_names(obj: Any, fields: list[str] | None) -> list[str]:
    if fields is not None:
        return fields
    if dataclasses.is_dataclass(obj):
        return [f.name for f in dataclasses.fields(obj)]
    if isinstance(obj, tuple) and hasattr(obj, "_fields"):
        return list(obj._fields)
    raise AssertionError(f"name the public fields of {type(obj).__name__} in CASES")


def _assert_read_only(value: Any, where: str, depth: int = 0) -> None:
    """No writable array, no plain list / dict / set anywhere in a field's value."""
    if depth > 3:
        return
    if isinstance(value, np.ndarray):
        assert not value.flags.writeable, f"{where}: writable array"
        if value.size:
            with pytest.raises(ValueError):
                value.reshape(-1)[0] = value.reshape(-1)[0]
    elif sps.issparse(value):
        for part in ("data", "indices", "indptr"):
            arr = getattr(value, part, None)
            if arr is not None:
                assert not arr.flags.writeable, f"{where}.{part}: writable sparse array"
    elif isinstance(value, (pd.DataFrame, pd.Series)):
        raise AssertionError(f"{where}: a pandas {type(value).__name__} can be changed in place")
    elif isinstance(value, (list, set, dict, bytearray)):
        raise AssertionError(f"{where}: mutable {type(value).__name__}")
    elif isinstance(value, Mapping):
        assert isinstance(value, MappingProxyType) or not hasattr(value, "__setitem__"), where
        with pytest.raises(TypeError):
            value["__probe__"] = 0  # type: ignore[index]
        for k, v in value.items():
            _assert_read_only(v, f"{where}[{k!r}]", depth + 1)
    elif isinstance(value, tuple):
        for i, v in enumerate(value[:20]):
            _assert_read_only(v, f"{where}[{i}]", depth + 1)
    elif dataclasses.is_dataclass(value) and not isinstance(value, type):
        # records held inside a result (per-sector levels, per-component verdicts) too
        assert type(value).__dataclass_params__.frozen, f"{where}: not a frozen dataclass"  # type: ignore[attr-defined]
        for f in dataclasses.fields(value):
            _assert_read_only(getattr(value, f.name), f"{where}.{f.name}", depth + 1)


@pytest.mark.parametrize(("build", "fields"), _params())
def test_result_cannot_be_changed(build: Callable[[], Any], fields: list[str] | None) -> None:
    obj = build()
    assert obj is not None
    names = _field_names(obj, fields)
    for name in names:
        value = getattr(obj, name)
        with pytest.raises(AttributeError):
            setattr(obj, name, value)
        _assert_read_only(value, f"{type(obj).__name__}.{name}")
    with pytest.raises(AttributeError):
        obj.freeladder_probe = 1  # a new attribute is refused too
    for name in names:  # no field can be deleted either (a slot without a guard could be)
        with pytest.raises((AttributeError, TypeError)):
            delattr(obj, name)


@pytest.mark.parametrize(("build", "fields"), _params())
def test_result_to_dict_is_strict_json(build: Callable[[], Any], fields: list[str] | None) -> None:
    obj = build()
    d = obj.to_dict()
    assert isinstance(d, dict) and d
    text = json.dumps(d, allow_nan=False)
    assert json.loads(text) == d  # already JSON-ready: nothing changes on a round trip


@pytest.mark.parametrize(
    ("text", "states"),
    [
        ("X0 + 0.5 Z0 Z1 + X1", 2),
        ("2 + 1/3 X0 + (1+2j) Z0 Z1 + g X1", 2),
        ("-X0 - Z0 Z1^2 - X1 - Z1 Z2^2 - X2", 3),
    ],
)
def test_model_to_dict_reads_back(text: str, states: int) -> None:
    # what the export writes must rebuild the same model: the text parses back to equal
    # strings and couplings, and the numbers agree with the exact values given as text
    m = fl.parse_model(text, states=states)
    d = json.loads(json.dumps(m.to_dict(), allow_nan=False))
    back = fl.parse_model(d["text"], states=d["states"])
    assert back.couplings == m.couplings and back.constant == m.constant
    assert [str(g) for g in back.strings] == d["strings"] == [str(g) for g in m.strings]
    assert d["sites"] == list(m.sites) and d["states"] == states
    for c, value, exact in zip(m.couplings, d["couplings"], d["exact_couplings"], strict=True):
        if exact is None:  # a float or complex coupling: the number itself
            assert (complex(*value) if isinstance(value, list) else value) == c
        elif isinstance(value, str):  # symbolic: the number field holds its text as well
            assert value == exact
        else:
            assert value == pytest.approx(float(fl.parse_model(f"{exact} X0").couplings[0]))


def test_exact_and_level_tables_to_dict_against_numpy() -> None:
    # ExactSpectrum.to_dict: levels repeated by their multiplicities are numpy's dense
    # eigenvalues of the Hamiltonian matrix (numpy.linalg.eigvalsh as the reference)
    m = _ising()
    d = fl.exact_spectrum(m).to_dict()
    ref = np.linalg.eigvalsh(m.to_sparse().toarray())
    got = np.repeat(np.array(d["levels"]), d["multiplicities"])
    assert d["eigenvalue_count"] == ref.size and d["complete"]
    assert np.allclose(got, ref, atol=1e-10)
    # LevelTable.to_dict: each energy is constant + sum_k (+-eta_k) with the listed occupation
    # (E = sum_k (-1)^{s_k} eta_k for N = 2, Fendley 2019), and the lowest equals numpy's
    spec = fl.free_spectrum(m)
    table = spec.levels(8).to_dict()
    eta = spec.quasi_energies
    for energy, occ in zip(table["energies"], table["occupations"], strict=True):
        assert energy == pytest.approx(spec.constant + float(np.sum((-1.0) ** np.array(occ) * eta)))
    assert np.allclose(sorted(table["energies"]), ref, atol=1e-9)
    assert table["multiplicity"] == 1
