"""Ordinary inputs that used to crash or be misread (issue 21): each case is checked against an
outside reference -- numpy dense exact diagonalization (common practice) -- or against the
refusal the documentation promises.
"""

from __future__ import annotations

import subprocess
import sys
import time
from collections.abc import Sequence
from pathlib import Path

import numpy as np
import pytest
from helpers import dense_string

import freeladder as fl


def _dense(m: fl.Model) -> np.ndarray:
    """Dense H from the definitions (tests/helpers.py), independent of the library's matrices."""
    sites = list(m.sites)
    h = complex(m.constant) * np.eye(m.dimension, dtype=complex)
    for c, g in m.terms:
        h = h + complex(c) * dense_string(g, sites)
    return h


def _matched(free: np.ndarray, exact: np.ndarray, tol: float) -> bool:
    """Every exact eigenvalue paired one to one with a free level within ``tol``."""
    left = list(np.asarray(free, dtype=complex))
    for e in np.asarray(exact, dtype=complex):
        j = int(np.argmin(np.abs(np.asarray(left) - e)))
        if abs(left[j] - e) > tol:
            return False
        left.pop(j)
    return not left


def _all_levels(sp: fl.FreeSpectrum) -> np.ndarray:
    table = sp.levels(None)
    return np.repeat(np.asarray(table.energies, dtype=complex), int(table.multiplicity or 1))


# -- item 2: cancelling partial sums, zero couplings, no terms ------------------------------------
CHAINS: list[Sequence[complex]] = [
    [2, 2j, 1, 1],  # partial sums of the weights c^2 cancel: a leaf root at x = 0
    [1, 1j],  # P = 1: the quasi-energy is exactly 0 (H nilpotent)
    [1, 1, 0, 1, 1],  # a zero coupling splits the chain into two equal pieces: a double root
    [1, 0.5j, 0, 1j, 1],
    [0, 1, 2],
    [1, 1, 0, 1, 1, 0, 1, 1],
]


@pytest.mark.parametrize("couplings", CHAINS, ids=str)
@pytest.mark.parametrize("method", ["auto", "fast"])
def test_chain_with_cancelling_or_zero_couplings_matches_dense_ed(
    couplings: Sequence[complex], method: str
) -> None:
    m = fl.exclusion_chain(len(couplings), couplings=couplings)
    sp = fl.free_spectrum(m, method=method)
    exact = np.linalg.eigvals(_dense(m))
    # a nilpotent H is defective: its dense eigenvalues scatter by about sqrt(eps)
    tol = 1e-6 if np.any(np.abs(sp.quasi_energies) < 1e-12) else 1e-9
    assert _matched(_all_levels(sp), exact, tol)


def test_nilpotent_chain_has_quasi_energy_zero() -> None:
    # (X0 Z1 + i X1 Z2)^2 = 1 - 1 = 0: the anticommuting terms square to +1 and -1
    m = fl.exclusion_chain(2, couplings=[1, 1j])
    h = _dense(m)
    assert np.allclose(h @ h, 0)
    assert np.allclose(fl.free_spectrum(m).quasi_energies, 0)


def test_zero_coupling_certified_route() -> None:
    m = fl.exclusion_chain(5, couplings=[1, 1, 0, 1, 1])
    sp = fl.free_spectrum(m, method="certified")
    assert sp.provenance.finder["rigorous"]
    assert _matched(_all_levels(sp), np.linalg.eigvalsh(_dense(m)), 1e-9)


def test_lost_degree_certified_refuses_with_reason() -> None:
    with pytest.raises(ValueError, match="exactly 0"):
        fl.free_spectrum(fl.exclusion_chain(2, couplings=[1, 1j]), method="certified")


@pytest.mark.parametrize("couplings", [[2, 2j, 1, 1], [1, 1, 0, 1, 1], [1, 1j]], ids=str)
def test_verify_reports_instead_of_raising(couplings: Sequence[complex]) -> None:
    report = fl.verify(fl.exclusion_chain(len(couplings), couplings=couplings))
    exact = [c for c in report.checks if c.name == "spectrum = exact diagonalization"]
    assert exact and exact[0].passed is not None


def test_zero_coupling_chain_verifies() -> None:
    # the ladder operators of each piece (the zero term links nothing)
    assert fl.verify(fl.exclusion_chain(5, couplings=[1, 1, 0, 1, 1])).ok


def test_verify_of_a_model_without_terms_reports_failure() -> None:
    m = fl.Model(fl.parse_model("X0").strings.take(np.zeros(0, dtype=np.int64)), [], 3)
    report = fl.verify(m)
    assert not report.ok
    assert any("no terms" in c.detail for c in report.failed)


@pytest.mark.parametrize("n_sites", [3, 4, 5, 6])
def test_ising_chain_with_imaginary_field(n_sites: int) -> None:
    # partial sums of the weights cancel (field^2 = -1 against bond^2 = 1)
    m = fl.ising_chain(n_sites, field=1j)
    sp = fl.free_spectrum(m)
    assert _matched(_all_levels(sp), np.linalg.eigvals(_dense(m)), 1e-8)


# -- item 3: sector labels are exactly the ones the structure lists -------------------------------
SECTOR_MODELS = [
    "Z0 + X0 X1 + Y0 Y1 + Z1 + X0 Y1",  # two cycle strings equal to the identity
    "Z0 Z1 + Z1 Z2 + Z2 Z0 + 0.5 X0 + 0.3 X1",
    "X0 X1 + Y1 Y2 + X2 X3 + Y3 Y0 + 0.6 Z0 Z2",
    "X0 X1 + Y0 Y1 + Z0 + 0.3 Z1 + 0.7 X1 X2 + 0.4 Y1 Y2 + 0.2 Z2 + 0.9 X2 X0 + 1.1 Y2 Y0",
    "X0 X1 + Y1 Y2 + Z2 Z3 + X3 X4 + Y4 Y5 + Z5 Z0 + 0.3 Z1 Z4",
]


@pytest.mark.parametrize("text", SECTOR_MODELS)
def test_every_listed_sector_label_is_accepted_and_the_union_is_dense_ed(text: str) -> None:
    m = fl.parse_model(text)
    assert fl.classify(m).kind == "jordan-wigner"
    levels: list[complex] = []
    for label in fl.sectors(m).sectors:
        levels.extend(_all_levels(fl.free_spectrum(m, sector=label)))
    assert _matched(np.asarray(levels), np.linalg.eigvalsh(_dense(m)), 1e-9)


@pytest.mark.parametrize(
    "bad",
    [
        [-1, 1],  # both cycle strings are the identity: -1 is not a consistent value
        [1, 1.9],
        [1.0, 1.0],
        "11",
        "+1",
        [True, True],
        {1, -1},
        frozenset({1}),
        np.array([1, -1]),
        np.array([1.0, 1.0]),
        np.array([[1, 1]]),
        (1, 1, 1, 1),
        (),
        [2, 1],
        {"Z0": 1},
        3,
        None.__class__,
    ],
    ids=repr,
)
def test_sector_labels_not_listed_are_refused_with_the_list(bad: object) -> None:
    m = fl.parse_model(SECTOR_MODELS[0])
    with pytest.raises((TypeError, ValueError)) as err:
        fl.free_spectrum(m, sector=bad)  # type: ignore[arg-type]
    assert "(1, 1, 1), (1, 1, -1)" in str(err.value)
    with pytest.raises((TypeError, ValueError)):
        fl.jordan_wigner_spectrum(m, bad)  # type: ignore[arg-type]


def test_sector_label_numpy_integers_are_accepted() -> None:
    m = fl.parse_model(SECTOR_MODELS[0])
    a = fl.free_spectrum(m, sector=np.array([1, 1, -1]))
    b = fl.free_spectrum(m, sector=(1, 1, -1))
    assert np.allclose(a.quasi_energies, b.quasi_energies)


def test_mapping_values_must_be_integers() -> None:
    m = fl.parse_model(SECTOR_MODELS[1])
    struct = fl.sectors(m)
    key = struct.generators[-1]
    for bad in (True, 1.0, 0.5, "1"):
        with pytest.raises(TypeError):
            struct.select({key: bad})


# -- item 5: the parser's limits hold while reading, in linear time ------------------------------
def _parse_seconds(text: str) -> float:
    best = float("inf")
    for _ in range(2):
        start = time.perf_counter()
        fl.parse_model(text)
        best = min(best, time.perf_counter() - start)
    return best


def test_distinct_coupling_names_parse_in_linear_time() -> None:
    # n distinct names on two strings, then 4n: linear time gives a ratio near 4, the old
    # term-by-term sympy sum about 16 (a generous bound against a loaded machine)
    def text(n: int) -> str:
        return " + ".join(f"a{k} X{k % 2}" for k in range(n))

    _parse_seconds(text(50))  # warm sympy's caches
    ratio = _parse_seconds(text(800)) / _parse_seconds(text(200))
    assert ratio < 9, ratio


def test_too_many_terms_on_one_coupling_refused() -> None:
    with pytest.raises(ValueError, match="at most 1000 terms"):
        fl.parse_model(" + ".join(f"a{k}" for k in range(1200)) + " + X0")


@pytest.mark.parametrize(
    ("text", "message"),
    [
        ("*".join(["(2^1000)"] * 50) + " X0", "3321 bits"),
        ("(2^1000)*(2^1000)*(2^1000)*(2^1000) X0", "3321 bits"),
        ("(2^1000)/(3^1000)/(5^1000) X0", "3321 bits"),
        ("*".join(["g"] * 100_000) + " X0", "more than 1000 numbers and names"),
        ("g^1000*g^1000 X0", "exponents are at most 1000"),
        ("g^600*g^600 X0 + X1", "exponents are at most 1000"),
        ("1e-400 X0", "too small for double precision"),
        ("0.5 X0 + 1e-400j X1", "too small for double precision"),
        ("1e-200*1e-200 X0", "too small for double precision"),
    ],
)
def test_parser_limits_refuse_with_position(text: str, message: str) -> None:
    with pytest.raises(fl.ModelSyntaxError, match=message) as err:
        fl.parse_model(text)
    assert "^" in str(err.value).splitlines()[-1]  # the caret line


def test_largest_exact_coupling_still_prints_and_verifies() -> None:
    # 3 factors of 2^1000 and one of 2^300: 3300 bits, 994 digits: the printed text reads back
    c = "*".join(["(2^1000)"] * 3) + "*2^300"
    m = fl.parse_model(f"{c} X0 Z1 + {c} X1 Z2")
    again = fl.parse_model(str(m))
    assert again.couplings == m.couplings == (2**3300, 2**3300)
    assert str(again) == str(m)
    assert str(fl.verify(m))  # reports (the couplings exceed float64) instead of raising


def test_zero_literal_is_still_zero() -> None:
    assert fl.parse_model("0e-400 X0 + X1").couplings[0] == 0


# -- item 6: a grid key named like the injected random stream ------------------------------------
def _seeded(seed: object, size: int) -> dict[str, object]:
    return {"got": seed, "draw": float(np.random.default_rng(seed).random())}  # type: ignore[arg-type]


def _rng_user(rng: object, seed: object) -> dict[str, object]:
    return {"got_rng": type(rng).__name__, "got_seed": type(seed).__name__}


def test_sweep_grid_seed_wins_over_the_injected_stream() -> None:
    first = fl.sweep(_seeded, {"seed": [3, 4], "size": [1]}, progress=False)
    again = fl.sweep(_seeded, {"seed": [3, 4], "size": [1]}, progress=False)
    assert first["got"].tolist() == [3, 4]
    # numpy's own generator seeded with the grid values (the outside reference)
    assert first["draw"].tolist() == [np.random.default_rng(s).random() for s in (3, 4)]
    assert first["draw"].tolist() == again["draw"].tolist()


def test_sweep_grid_rng_wins_and_seed_still_gets_a_stream() -> None:
    df = fl.sweep(_rng_user, {"rng": ["given"]}, progress=False, seed=1)
    assert df["got_rng"].tolist() == ["str"]
    assert df["got_seed"].tolist() == ["SeedSequence"]


# -- item 7: text that means something else is refused, with a caret -----------------------------
@pytest.mark.parametrize(
    ("text", "message", "column"),
    [
        ("X_0 Z1 + 0.8 Z1 Z2 + X1", "'X_0' would be read as a coupling name", 1),
        ("0.5 * XZI + 0.3 * IIY", "'XZI' would be read as a coupling name", 7),
        ("2*ZZ X0", "'ZZ' would be read as a coupling name", 3),
        ("3", "no operator term", 1),
        ("g + 2", "no operator term", 1),
        ("XYZ", "'XYZ' would be read as a coupling name", 1),
    ],
)
def test_text_that_means_something_else_is_refused(text: str, message: str, column: int) -> None:
    with pytest.raises(fl.ModelSyntaxError, match=message) as err:
        fl.parse_model(text)
    assert err.value.column == column
    assert str(err.value).splitlines()[-1] == " " * (column - 1) + "^"


def test_ordinary_names_still_read() -> None:
    m = fl.parse_model("J_2 X0 Z1 + hx Z1 + Xa X1 + I_g Z0")
    assert {str(s) for c in m.couplings for s in getattr(c, "free_symbols", ())} == {
        "J_2",
        "hx",
        "Xa",
        "I_g",
    }


# -- item 8: the command line's export and report wording ----------------------------------------
def _cli(*args: str) -> subprocess.CompletedProcess[str]:
    return subprocess.run(
        [sys.executable, "-m", "freeladder", *args],
        capture_output=True,
        text=True,
        timeout=300,
        check=False,
    )


ISING = "X0 + 0.5 Z0 Z1 + X1"


def test_export_into_a_missing_folder_is_bad_input(tmp_path: Path) -> None:
    done = _cli("export", ISING, str(tmp_path / "nodir" / "x.py"))
    assert done.returncode == 2, done.stderr
    assert "Traceback" not in done.stderr
    assert "does not exist" in done.stderr
    assert not (tmp_path / "nodir").exists()


def test_export_refuses_a_dangling_symlink(tmp_path: Path) -> None:
    link = tmp_path / "x.py"
    link.symlink_to(tmp_path / "elsewhere.py")
    for extra in ((), ("--force",)):
        done = _cli("export", ISING, str(link), *extra)
        assert done.returncode == 2, done.stderr
        assert "symbolic link" in done.stderr
        assert not (tmp_path / "elsewhere.py").exists()
    with pytest.raises(FileExistsError):
        fl.worked_calculation(fl.parse_model(ISING)).to_notebook(link)
    assert not (tmp_path / "elsewhere.py").exists()


def test_export_wording(tmp_path: Path) -> None:
    done = _cli("export", ISING, str(tmp_path / "x.tex"))
    assert done.returncode == 0, done.stderr
    assert "as a LaTeX section" in done.stdout
    assert "a latex" not in done.stdout


def test_failed_checks_are_not_called_not_run() -> None:
    # a defective (nilpotent) H: exact diagonalization cannot confirm its zero quasi-energy
    report = fl.verify(fl.exclusion_chain(2, couplings=[1, 1j]))
    assert report.failed
    assert not any("no decisive check ran" in p for p in report.problems)


# -- item 10: verify's time follows the frontier of the term order --------------------------------
def _tree_model(n_terms: int, seed: int) -> fl.Model:
    # Majorana bilinears on the edges of a random recursive tree (a line-graph frustration graph,
    # Chapman-Flammia 2020), as in tests/benchmarks/bench_verify_trees.py
    rng = np.random.default_rng(seed)
    terms = []
    for k in range(1, n_terms + 1):
        a, b = sorted((int(rng.integers(0, k)), k))
        sa, sb = a // 2, b // 2
        letters = {sa: "Z"} if sa == sb else {sa: "Y" if a % 2 == 0 else "X"}
        if sa != sb:
            letters.update({s: "Z" for s in range(sa + 1, sb)})
            letters[sb] = "X" if b % 2 == 0 else "Y"
        terms.append(
            f"{rng.uniform(0.3, 1.5):.3f} "
            + " ".join(f"{p}{s}" for s, p in sorted(letters.items()))
        )
    return fl.parse_model(" + ".join(terms))


def test_wide_frontier_tree_does_not_run_for_minutes() -> None:
    # 24 terms: the exact sweeps used to take about 2.5 minutes here (frontier of 1152
    # rational coordinates); now their cost is estimated first and they are refused
    m = _tree_model(24, 0)
    assert fl.classify(m).kind == "jordan-wigner"
    start = time.perf_counter()
    report = fl.verify(m, exact_diagonalization=False)
    assert time.perf_counter() - start < 30
    pairs = report["[Q(r), Q(s)] = 0"]
    assert pairs.status == "not run" and "time budget" in pairs.detail
    assert not report.failed


def test_sweep_estimate_follows_the_frontier() -> None:
    from freeladder.checks import verification

    chain = verification._Parts(fl.analyze(fl.exclusion_chain(24, reach=2)))
    tree = verification._Parts(fl.analyze(_tree_model(24, 1)))
    # the same number of terms; the tree's frontier is 28 times wider (512 vs 18 coordinates)
    assert tree.sweep_seconds() > 50 * chain.sweep_seconds()
