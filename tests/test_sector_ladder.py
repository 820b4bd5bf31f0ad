"""The ladder and the export compare the free levels with exact levels of the SAME sector.

A two-leg ladder with Kitaev-type bonds (rungs X X, legs alternating Y Y and Z Z) is free
sector by sector of its conserved plaquette strings (A. Chapman and S. T. Flammia, Quantum 4,
278 (2020)).  The reference levels of its ground sector are computed here without freeladder:
the Hamiltonian from Kronecker products of 2 x 2 Pauli matrices (scipy.sparse.kron), restricted
to the sector by its projector -- the diagonal plaquette strings select basis states, the others
enter as ``P = prod (1 + v W) / 2``, whose columns (one per orbit of basis states) span the
sector -- and scipy's Lanczos (``eigsh``) on ``B^T H B`` in that basis (common practice).
"""

from __future__ import annotations

import re
import subprocess
import sys
from pathlib import Path

import numpy as np
import scipy.sparse as sps
from scipy.sparse.linalg import eigsh

import freeladder as fl
from freeladder_lab import Workbench

# real 2 x 2 factors: Y Y = (i X Z)(i X Z) = -(X Z)(X Z), so every term here is real
_FACTORS = {
    "I": np.eye(2),
    "X": np.array([[0.0, 1.0], [1.0, 0.0]]),
    "XZ": np.array([[0.0, -1.0], [1.0, 0.0]]),
    "Z": np.array([[1.0, 0.0], [0.0, -1.0]]),
}


def _ladder(rungs: int) -> tuple[str, list[tuple[float, dict[int, str]]]]:
    """The model text and its terms as (coupling, {site: letter}); sites 0..L-1 on the top
    leg, L..2L-1 below; rungs X X, legs Y Y on even bonds and Z Z on odd ones."""
    terms: list[tuple[float, dict[int, str]]] = []
    for i in range(rungs):
        terms.append((0.7 + 0.04 * i, {i: "X", rungs + i: "X"}))
    for i in range(rungs - 1):
        letter = "Y" if i % 2 == 0 else "Z"
        terms.append((1.0 + 0.05 * i, {i: letter, i + 1: letter}))
        terms.append((0.9 + 0.03 * i, {rungs + i: letter, rungs + i + 1: letter}))
    text = " + ".join(
        f"{c:.2f} " + " ".join(f"{p}{s}" for s, p in sorted(word.items())) for c, word in terms
    )
    return text, terms


def _string_matrix(word: dict[int, str], sites: int, keep: np.ndarray) -> sps.csr_array:
    """A Pauli string (letters X, Y, Z) as a real sparse matrix on the states ``keep``.

    Each factor has one non-zero per row, so the Kronecker product has one too: its values
    are ``np.kron`` of the factors' values and its column the matching Kronecker sum of the
    factors' columns (the ordinary Kronecker product, one row at a time).
    """
    sign = 1.0 + 0j
    values, columns = np.ones(1), np.zeros(1, dtype=np.int64)
    for s in range(sites):
        letter = word.get(s, "I")
        if letter == "Y":
            sign *= 1j
            letter = "XZ"
        factor = _FACTORS[letter]
        col = np.argmax(np.abs(factor), axis=1)
        values = np.kron(values, factor[np.arange(2), col])
        columns = np.add.outer(2 * columns, col).ravel()
    assert sign.imag == 0
    position = np.full(2**sites, -1)
    position[keep] = np.arange(len(keep))
    cols = position[columns[keep]]
    assert np.all(cols >= 0)  # the string keeps the selected states among themselves
    return sps.csr_array(
        (sign.real * values[keep], (np.arange(len(keep)), cols)), shape=(len(keep), len(keep))
    )


def _reference_levels(m: fl.Model, terms: list, k: int) -> tuple[np.ndarray, tuple[int, ...]]:
    """The k lowest eigenvalues of H in its ground sector (the values freeladder's answer
    names), by scipy alone; and those values."""
    answer = fl.analyze(m).answer()
    strings = fl.sectors(m).cycle_operators
    sites = len(m.sites)
    index = {site: j for j, site in enumerate(m.sites)}
    keep = np.ones(2**sites, dtype=bool)
    off_diagonal = []
    states = np.arange(2**sites)
    for w, v in zip(strings, answer.cycle_values, strict=True):
        letters = {index[s]: "IZXY"[2 * (a % 2) + (b % 2)] for s, a, b in w.factors}
        phase = (w.phase - list(letters.values()).count("Y")) % 4
        assert phase in (0, 2)  # a Hermitian string: +-1 times its letters
        sign = 1 - phase
        if set(letters.values()) <= {"Z"}:  # diagonal: select the basis states
            bits = sum(1 << (sites - 1 - j) for j in letters)
            parity = np.bitwise_count(states & bits) % 2
            keep &= sign * (1 - 2 * parity) == v
        else:
            off_diagonal.append((sign * v, letters))
    assert off_diagonal and not keep.all()  # both kinds of restriction are exercised
    rows = np.flatnonzero(keep)
    pieces = [sps.coo_array(c * _string_matrix(word, sites, rows)) for c, word in terms]
    h = sps.csr_array(
        (
            np.concatenate([q.data for q in pieces]),
            (np.concatenate([q.row for q in pieces]), np.concatenate([q.col for q in pieces])),
        ),
        shape=(len(rows), len(rows)),
    )
    # the projector onto the sector within the selected states: P = prod (1 + v W) / 2; its
    # columns for one orbit of basis states are one vector (up to sign): keep the column of
    # each orbit's smallest state, normalised, as the sector's basis B, and diagonalise B^T H B
    p: sps.csr_array = sps.csr_array(sps.identity(len(rows), format="csr"))
    for v, word in off_diagonal:
        p = sps.csr_array(p @ (sps.identity(len(rows)) + v * _string_matrix(word, sites, rows)) / 2)
    p = sps.csc_array(p)
    p.eliminate_zeros()
    lowest_row = np.minimum.reduceat(p.indices, p.indptr[:-1])
    reps = np.flatnonzero((np.diff(p.indptr) > 0) & (lowest_row == np.arange(len(rows))))
    b = sps.csc_array(p[:, reps])
    b = sps.csc_array(b @ sps.diags_array(1 / np.sqrt(np.asarray((b.multiply(b)).sum(axis=0)))))
    assert abs(abs(b.T @ b) - sps.identity(len(reps))).max() < 1e-12  # orthonormal
    sector_h = sps.csr_array(b.T @ h @ b)
    start = np.random.default_rng(3).standard_normal(sector_h.shape[0])
    vals = eigsh((sector_h + sector_h.T) / 2, k=k, which="SA", v0=start, return_eigenvectors=False)
    return np.sort(vals), tuple(answer.cycle_values)


def _distinct(values: np.ndarray, tol: float = 1e-8) -> np.ndarray:
    out: list[float] = []
    for v in np.sort(values):
        if not out or v - out[-1] > tol:
            out.append(float(v))
    return np.array(out)


def test_ground_sector_ladder_of_20_sites_matches_sparse_ed_of_that_sector() -> None:
    text, terms = _ladder(10)
    m = fl.parse_model(text)
    assert len(m.sites) == 20 and fl.classify(m).kind == "jordan-wigner"
    reference, values = _reference_levels(m, terms, k=6)
    want = _distinct(reference)[:-1]  # the last may be missing a copy
    # the library: the ground sector's free levels and sparse exact levels of the same sector
    sp = fl.free_spectrum(m, sector="ground")
    free = _distinct(np.real(sp.levels(24).energies))
    np.testing.assert_allclose(free[: len(want)], want, atol=1e-9)
    exact, check = fl.same_sector_check(fl.analyze(m), "ground", k=8)
    assert check.passed and check.value <= 1e-9, check.detail
    assert (
        exact.dimension
        == 2 ** (20 - len(values))
        == fl.sector_dimension(
            m, [(w, v) for w, v in zip(fl.sectors(m).cycle_operators, values, strict=True)]
        )
    )
    np.testing.assert_allclose(_distinct(exact.eigenvalues)[: len(want)], want, atol=1e-9)

    # the Workbench's ladder, headless: dashed rungs are that sector's levels, the title and
    # the summary name the sector and the agreement
    wb = Workbench(m, synchronous=True)
    dashed = np.asarray(wb.ladder.exact_rungs.y)[:, 0] + wb.ladder.offset
    np.testing.assert_allclose(dashed[: len(want)], want, atol=1e-9)
    names = [str(w) for w in fl.sectors(m).cycle_operators]
    title = wb.ladder.title.value
    assert "whole space" not in title
    for name, v in zip(names, values, strict=True):
        assert f"{name} = {v:+d}" in title
    agreement = re.search(
        r"exact check: (\w+), largest difference ([0-9.e+-]+) \(tolerance ([0-9.e+-]+)\)",
        wb.ladder.summary.value,
    )
    assert agreement is not None, wb.ladder.summary.value
    assert agreement.group(1) == "agree"
    assert float(agreement.group(2)) <= float(agreement.group(3))
    _, ladder_check = fl.same_sector_check(fl.analyze(m), "ground", k=12, limit=2**14)
    assert float(agreement.group(2)) == float(f"{ladder_check.value:.2g}")
    # the checks section: verify compares the same sector and passes
    wb.run_checks()
    row = wb.checks.table.value.split("lowest levels = sparse exact diagonalization")[1]
    assert "passed" in row.split("</tr>")[0] and "the sector" in row


def test_ladder_says_not_run_above_its_bound_never_passed() -> None:
    m = fl.exclusion_chain(15, reach=1)  # 16 sites: the whole space is 2^16
    wb = Workbench(m, synchronous=True)
    summary = wb.ladder.summary.value
    assert "exact check not run: dimension 2^16 above 2^14" in summary
    assert "exact check: agree" not in summary and "passed" not in summary
    assert len(wb.ladder.exact_rungs.y) == 0
    assert "exact diagonalization: not run" in wb.ladder.title.value


def test_export_above_1024_checks_the_same_sector_with_its_own_lanczos(tmp_path: Path) -> None:
    text, _ = _ladder(7)  # 14 sites: dimension 2^14
    m = fl.parse_model(text)
    wc = fl.worked_calculation(m)
    code = [c for c in wc if c.kind == "code"]
    lanczos = [c.source for c in code if "eigsh(" in c.source]
    assert len(lanczos) == 1 and "fl." not in lanczos[0]  # built without freeladder
    assert "import freeladder" not in lanczos[0]
    answer = fl.analyze(m).answer()
    for w, v in zip(fl.sectors(m).cycle_operators, answer.cycle_values, strict=True):
        letters = "".join("IZXY"[2 * (a % 2) + (b % 2)] for a, b in _letters(w, m.sites))
        assert f'({v}, "{letters}")' in lanczos[0]
    script = tmp_path / "sector.py"
    script.write_text(code[0].source + "\n" + lanczos[0] + "\n")
    done = subprocess.run([sys.executable, str(script)], capture_output=True, text=True)
    assert done.returncode == 0, done.stderr[-2000:]
    assert "Lanczos levels:" in done.stdout
    # a changed coupling in the cell's own matrix fails it
    altered = lanczos[0].replace('(0.7, "X', '(0.75, "X', 1)
    assert altered != lanczos[0]
    script.write_text(code[0].source + "\n" + altered + "\n")
    done = subprocess.run([sys.executable, str(script)], capture_output=True, text=True)
    assert done.returncode != 0 and "AssertionError" in done.stderr


def _letters(w: fl.WeylString, sites: tuple) -> list[tuple[int, int]]:
    exps = w.exponents()
    return [exps.get(s, (0, 0)) for s in sites]
