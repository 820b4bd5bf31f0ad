"""One answer to "the spectrum, or why not": every view of a model carries the same one.

Two Jordan-Wigner models with cycles (the single polynomial is not guaranteed there, but each
sector of the conserved cycle strings is free: A. Chapman and S. T. Flammia, Quantum 4, 278
(2020)): the Workbench, ``fl.worked_calculation``, ``freeladder report --json`` and
``Analysis.to_dict`` must all carry the ground sector's quasi-energies, and those must give the
levels of the Hamiltonian restricted to that sector, found here by numpy dense diagonalization
with the sector projector built in this file from the cycle strings (common practice).
"""

from __future__ import annotations

import functools
import json
import subprocess
import sys

import numpy as np
import pytest

import freeladder as fl
from freeladder_lab import Workbench
from freeladder_lab.adapter import spectrum_outcome

PLAQUETTE = "X0 X1 + Y1 Y2 + Z2 Z3 + X3 X0 + Z1 Z3"
# a two-leg ladder with Kitaev-type bonds: X X and Y Y alternating along the legs, Z Z rungs
KITAEV_LADDER = (
    "X0 X1 + Y1 Y2 + X2 X3 + Y4 Y5 + X5 X6 + Y6 Y7 + 0.8 Z0 Z4 + 0.9 Z1 Z5 + 1.1 Z2 Z6 + 0.7 Z3 Z7"
)
LADDERS = [PLAQUETTE, KITAEV_LADDER]

_PAULI = {
    "I": np.eye(2),
    "X": np.array([[0, 1], [1, 0]], complex),
    "Y": np.array([[0, -1j], [1j, 0]]),
    "Z": np.diag([1.0, -1.0]).astype(complex),
}


def _pauli_string(text: str, sites: int) -> np.ndarray:
    """The dense matrix of a Pauli string such as ``"-Y0 Y1 X4"`` (site 0 leftmost)."""
    sign = 1.0
    text = text.strip()
    if text.startswith("-"):
        sign, text = -1.0, text[1:]
    factors = [np.eye(2, dtype=complex)] * sites
    for token in text.split():
        factors[int(token[1:])] = _PAULI[token[0]]
    return sign * functools.reduce(np.kron, factors)


def _dense(text: str, sites: int) -> np.ndarray:
    """The Hamiltonian of ``"c P P + P P + ..."`` built with numpy alone."""
    h = np.zeros((2**sites, 2**sites), complex)
    for term in text.split("+"):
        words = term.split()
        coupling = 1.0
        if words[0][0].isdigit():
            coupling = float(words.pop(0))
        h += coupling * _pauli_string(" ".join(words), sites)
    return h


def _sector_levels(text: str, cycles: tuple[str, ...], values: tuple[int, ...]) -> np.ndarray:
    """Eigenvalues of H restricted to the joint eigenspace W_i = v_i of the cycle strings."""
    sites = 1 + max(int(tok[1:]) for tok in text.replace("+", " ").split() if tok[0] in "XYZ")
    h = _dense(text, sites)
    projector = np.eye(2**sites, dtype=complex)
    for cycle, value in zip(cycles, values, strict=True):
        w = _pauli_string(cycle, sites)
        assert np.allclose(w @ h, h @ w)  # conserved
        projector = projector @ (np.eye(2**sites) + value * w) / 2
    weights, vectors = np.linalg.eigh(projector)
    basis = vectors[:, weights > 0.5]
    return np.linalg.eigvalsh(basis.conj().T @ h @ basis)


def _free_levels(sp: fl.FreeSpectrum) -> np.ndarray:
    table = sp.levels(None)
    energies = np.real(np.asarray(table.energies))
    return np.sort(np.repeat(energies, table.multiplicity))


@pytest.mark.parametrize("text", LADDERS)
def test_every_view_carries_the_ground_sector(text: str) -> None:
    m = fl.parse_model(text)
    a = fl.analyze(m)
    answer = a.answer()
    assert answer.status == "proven" and answer.route == "sector"
    assert a.answer(sector="polynomial").status == "refused"  # the single polynomial is not
    eta = np.asarray(answer.spectrum.quasi_energies)

    # outside reference: dense diagonalization restricted to the chosen sector
    exact = _sector_levels(text, answer.cycle_strings, answer.cycle_values)
    np.testing.assert_allclose(_free_levels(answer.spectrum), exact, atol=1e-9)
    whole = np.linalg.eigvalsh(_dense(text, len(m.sites)))
    assert exact[0] == pytest.approx(whole[0], abs=1e-9)  # it is the ground sector

    # the widgets' door and what the Workbench draws
    assert spectrum_outcome(a) is answer
    wb = Workbench(m, synchronous=True)
    shown = np.sort(np.asarray(wb.roots.eta.x, float))
    np.testing.assert_allclose(shown, np.sort(eta), atol=1e-12)

    # Analysis.to_dict and the command line: one schema, the same numbers
    data = a.to_dict()["spectrum"]
    np.testing.assert_allclose(data["quasi_energies"], eta, atol=1e-12)
    assert data["sector"]["cycle_values"] == list(answer.cycle_values)
    assert data["sector"]["cycle_strings"] == list(answer.cycle_strings)
    done = subprocess.run(
        [sys.executable, "-m", "freeladder", "report", text, "--json"],
        capture_output=True,
        text=True,
        timeout=300,
        check=False,
    )
    assert done.returncode == 0, done.stderr
    cli = json.loads(done.stdout)
    assert cli["spectrum"] == data
    assert cli["report"]["ok"] is True

    # the worked calculation asserts them, and its cells run clean
    wc = fl.worked_calculation(a)
    assert wc.guaranteed
    source = next(c.source for c in wc if "expected_eta = np.array(" in c.source)
    assert 'sector="ground"' in source
    ns: dict = {}
    exec(compile(wc.to_script(), "worked.py", "exec"), ns)  # raises if any assertion fails
    np.testing.assert_allclose(ns["expected_eta"], eta, atol=1e-12)


def test_command_line_text_shows_the_sector_not_a_refusal() -> None:
    done = subprocess.run(
        [sys.executable, "-m", "freeladder", "report", PLAQUETTE],
        capture_output=True,
        text=True,
        timeout=300,
        check=False,
    )
    assert done.returncode == 0, done.stderr
    assert "no free spectrum" not in done.stdout
    assert "sector: the ground sector" in done.stdout
    assert "verified: yes" in done.stdout


def test_exported_cells_fail_when_the_sector_spectrum_moves() -> None:
    a = fl.analyze(fl.parse_model(PLAQUETTE))
    script = fl.worked_calculation(a).to_script()
    # a changed coupling in the exported model moves the quasi-energies: the cells say so
    tampered = script.replace('parse_model("X0 X1 +', 'parse_model("1.25 X0 X1 +', 1)
    assert tampered != script
    with pytest.raises(AssertionError):
        exec(compile(tampered, "worked.py", "exec"), {})


def test_a_refusal_carries_reason_witness_and_what_to_do() -> None:
    # a claw (E. Chapman, Elman, Flammia 2021: no free-fermion theorem for claws)
    a = fl.analyze(fl.parse_model("X0 X1 X2 + Z0 + Z1 + Z2"))
    answer = a.answer()
    assert answer.refused and answer.status == "refused" and answer.spectrum is None
    assert answer.witness == (0, 1, 2, 3)
    assert "claw" in answer.reason and "exact_spectrum" in answer.instead
    with pytest.raises(fl.NoTheoremError, match="Instead"):
        answer.require()
    probe = a.answer(unproven=True)
    assert probe.status == "unproven" and probe.spectrum is not None
    assert not probe.spectrum.provenance.guaranteed
    data = a.to_dict()["spectrum"]
    assert data["quasi_energies"] is None and data["refusal"]["witness"] == [0, 1, 2, 3]


def test_all_sectors_table_matches_dense_diagonalization() -> None:
    a = fl.analyze(fl.parse_model(PLAQUETTE))
    answer = a.answer(sector="all")
    assert answer.sectors is not None and len(answer.sectors) == 2
    cycles = answer.cycle_strings
    for row in answer.sectors:
        exact = _sector_levels(PLAQUETTE, cycles, row.label[: len(cycles)])
        # the row's parity label splits the cycle sector; its lowest level is a level there
        assert np.min(np.abs(exact - np.real(row.lowest))) < 1e-9
