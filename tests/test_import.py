"""``import freeladder`` leaves its heavy dependencies (sympy, numba, pandas, networkx,
python-flint, mpmath, tqdm and scipy's csgraph, sparse.linalg and linalg) for first use.

Checked in a fresh interpreter with Python's own import log (``python -X importtime``, common
practice) and ``sys.modules``; no timing is asserted (the machine's load decides that), only
which modules load, and when.
"""

from __future__ import annotations

import json
import os
import subprocess
import sys
from pathlib import Path

import freeladder

HEAVY = (
    "sympy",
    "numba",
    "pandas",
    "networkx",
    "flint",
    "mpmath",
    "tqdm",
    "scipy.sparse.csgraph",
    "scipy.sparse.linalg",
    "scipy.linalg",
)


def _heavy(names: set[str] | list[str]) -> set[str]:
    """The entries of HEAVY that ``names`` (module names) load."""
    return {h for h in HEAVY for n in names if n == h or n.startswith(h + ".")}


def _run(code: str, *options: str) -> subprocess.CompletedProcess[str]:
    env = dict(os.environ)
    root = str(Path(freeladder.__file__).resolve().parents[1])
    env["PYTHONPATH"] = os.pathsep.join([root, env.get("PYTHONPATH", "")])
    return subprocess.run(
        [sys.executable, *options, "-c", code],
        capture_output=True,
        text=True,
        env=env,
        check=True,
        timeout=300,
    )


def _imported(code: str) -> set[str]:
    done = _run(code, "-X", "importtime")
    names = set()
    for line in done.stderr.splitlines():
        if line.startswith("import time:") and "|" in line:
            names.add(line.rsplit("|", 1)[1].strip())
    assert "freeladder" in names or "import freeladder" not in code
    return names


def _loaded_by_step(steps: dict[str, str]) -> dict[str, set[str]]:
    """The heavy modules each statement loads, run in order after ``import freeladder as fl``."""
    code = ["import json, sys", "import freeladder as fl", "seen, out = set(sys.modules), {}"]
    for label, statement in steps.items():
        code += [
            statement,
            f"out[{label!r}] = sorted(set(sys.modules) - seen)",
            "seen = set(sys.modules)",
        ]
    code.append("print(json.dumps(out))")
    out = json.loads(_run("\n".join(code)).stdout)
    return {label: _heavy(names) for label, names in out.items()}


def test_import_loads_no_heavy_dependency() -> None:
    names = _imported("import freeladder")
    assert "freeladder.analysis" in names  # the log is read correctly
    assert "numpy" in names and "scipy.sparse" in names  # ... and the prefix match too
    assert _heavy(names) == set(), sorted(_heavy(names))


def test_heavy_dependencies_load_on_use() -> None:
    # A symbolic coupling brings sympy, a chain's roots bring numba: first use, not import.
    names = _imported(
        "import freeladder as fl; m = fl.parse_model('g X0 + Z0 Z1 + X1');"
        "fl.free_spectrum(fl.exclusion_chain(40, reach=2))"
    )
    packages = {n.split(".")[0] for n in names}
    assert "sympy" in packages and "numba" in packages
    graph = _imported("import freeladder as fl; fl.frustration_graph(fl.ising_chain(3))")
    assert "networkx" in {n.split(".")[0] for n in graph}


def test_each_dependency_loads_with_the_first_function_that_needs_it() -> None:
    # A transverse-field Ising chain deep in its ordered phase (field 0.1, bond 1, 30 sites)
    # has an edge mode of energy about 0.1^30 (Pfeuty 1970; Kitaev 2001): below the float
    # resolution, so the Jordan-Wigner route refines it in ball arithmetic (flint, mpmath).
    tiny_mode = (
        "fl.Model.from_terms([(-0.1, fl.pauli('X', [i])) for i in range(30)]"
        " + [(-1.0, fl.pauli('ZZ', [i, i + 1])) for i in range(29)])"
    )
    loaded = _loaded_by_step(
        {
            "chain": "m = fl.ising_chain(4)",
            "classify": "fl.classify(m)",
            "certified roots": "fl.certified_roots([1, 3, 1])",
            "tiny mode": f"fl.jordan_wigner_spectrum({tiny_mode})",
        }
    )
    assert loaded["chain"] == set()
    # the graph algorithms (scipy.sparse.csgraph brings scipy.sparse.linalg and scipy.linalg)
    assert loaded["classify"] == {"scipy.sparse.csgraph", "scipy.sparse.linalg", "scipy.linalg"}
    assert loaded["certified roots"] == {"flint"}  # exact squarefree factors, isolating balls
    # the refinement of the tiny mode (mpmath) and the progress bar over the sectors (tqdm)
    assert {"mpmath", "tqdm"} <= loaded["tiny mode"], loaded["tiny mode"]
    assert "sympy" not in loaded["tiny mode"] | loaded["certified roots"]
