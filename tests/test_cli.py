"""The command line: ``freeladder report`` on good and malformed input (run as a subprocess)."""

from __future__ import annotations

import json
import subprocess
import sys

import numpy as np

import freeladder as fl

ISING = "X0 + 0.5 Z0 Z1 + X1 + 0.5 Z1 Z2 + X2"


def run(*args: str) -> subprocess.CompletedProcess[str]:
    return subprocess.run(
        [sys.executable, "-m", "freeladder", *args],
        capture_output=True,
        text=True,
        timeout=300,
        check=False,
    )


def test_report_json_matches_exact_diagonalization():
    done = run("report", ISING, "--json")
    assert done.returncode == 0, done.stderr
    data = json.loads(done.stdout)
    for key in ("verdict", "spectrum", "report"):
        assert key in data
    sp = data["spectrum"]
    assert sp["status"] == "proven" and sp["route"] == "polynomial"
    # reference: numpy dense diagonalization of the same Hamiltonian (common practice)
    h = fl.parse_model(ISING).to_sparse().toarray()
    levels = np.linalg.eigvalsh(h)
    assert abs(sp["ground_energy"] - levels[0]) < 1e-10
    assert abs(sp["gap"] - (levels[1] - levels[0])) < 1e-10
    report = data["report"]
    assert report["ok"] is True
    assert all(c["status"] in ("passed", "not run") for c in report["checks"])
    assert any(c["status"] == "passed" for c in report["checks"])


def test_report_text_and_model_file(tmp_path):
    path = tmp_path / "chain.txt"
    path.write_text(ISING + "\n", encoding="utf-8")
    done = run("report", str(path), "--no-checks")
    assert done.returncode == 0, done.stderr
    assert "verdict: jordan-wigner" in done.stdout
    assert "ground energy:" in done.stdout
    # each quasi-energy with its bound in two significant digits; the quasi-energies are half
    # the single-particle gaps of numpy's dense spectrum (Pfeuty 1970: E_0 = -sum eta_k)
    rows = [line.split() for line in done.stdout.splitlines() if "+-" in line]
    etas = sorted(float(r[0]) for r in rows)
    assert len(etas) == 3
    levels = np.linalg.eigvalsh(fl.parse_model(ISING).to_sparse().toarray())
    assert abs(-sum(etas) - levels[0]) < 1e-9
    assert all(len(r[2].split("e")[0].replace(".", "").lstrip("0")) <= 2 for r in rows), rows


def test_clock_model_gives_complex_numbers_as_pairs():
    text = "X0 Z1 + X1 Z2 + X2 Z3"
    done = run("report", text, "--states", "3", "--json", "--no-checks")
    assert done.returncode == 0, done.stderr
    data = json.loads(done.stdout)
    assert data["report"] is None
    eta = data["spectrum"]["quasi_energies"]
    assert eta and all(isinstance(e, list) and len(e) == 2 for e in eta)
    # reference: every free level is an eigenvalue of the dense matrix (numpy); the ground
    # energy of a Z3 chain with unit couplings is -sum eta (BACKGROUND section 8)
    h = fl.parse_model(text, states=3).to_sparse().toarray()
    exact = np.linalg.eigvals(h)
    e0 = data["spectrum"]["ground_energy"]
    e0 = complex(*e0) if isinstance(e0, list) else e0
    assert np.min(np.abs(exact - e0)) < 1e-9


def test_malformed_text_exits_2_with_caret_and_no_traceback():
    done = run("report", "0.5 X0 Q1 + Z2")
    assert done.returncode == 2
    assert "Traceback" not in done.stderr
    assert "^" in done.stderr and "column" in done.stderr
    assert done.stdout == ""


def test_bad_options_exit_2():
    done = run("report", "X0", "--states", "one")
    assert done.returncode == 2
    assert "Traceback" not in done.stderr


def test_export_writes_runs_and_never_overwrites(tmp_path):
    target = tmp_path / "worked.py"
    done = run("export", ISING, str(target))
    assert done.returncode == 0, done.stderr
    # the exported script recomputes and asserts every step (it runs clean with this Python)
    ran = subprocess.run(
        [sys.executable, str(target)], capture_output=True, text=True, timeout=300, check=False
    )
    assert ran.returncode == 0, ran.stderr[-2000:]
    before = target.read_text()
    again = run("export", "X0 + Z0 Z1 + X1", str(target))
    assert again.returncode == 2 and "--force" in again.stderr
    assert target.read_text() == before  # the user's file is untouched
    tex = tmp_path / "worked.tex"
    forced = run("export", "X0 + Z0 Z1 + X1", str(tex))
    assert forced.returncode == 0 and "\\section" in tex.read_text()
    assert "LaTeX section" in forced.stdout


def test_export_takes_the_format_from_the_suffix(tmp_path, capsys):
    from freeladder.output.cli import main  # in-process: the same code as the command

    notebook = tmp_path / "worked.ipynb"
    assert main(["export", "X0 + Z0 Z1 + X1", str(notebook)]) == 0
    assert json.loads(notebook.read_text())["nbformat"] == 4  # nbformat's JSON, readable as such
    odd = tmp_path / "worked.txt"
    assert main(["export", ISING, str(odd)]) == 2
    err = capsys.readouterr().err
    assert ".ipynb" in err and ".py" in err and ".tex" in err and "Traceback" not in err
    assert not odd.exists()
    assert main(["export", ISING, "--to", "script", str(tmp_path / "x.py")]) == 2  # gone
