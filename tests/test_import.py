"""``import freeladder`` leaves its heavy dependencies (sympy, numba, pandas, networkx) for first
use.

Checked in a fresh interpreter with Python's own import log (``python -X importtime``, common
practice); no timing is asserted (the machine's load decides that), only which modules load.
"""

from __future__ import annotations

import os
import subprocess
import sys
from pathlib import Path

import freeladder

HEAVY = ("sympy", "numba", "pandas", "networkx")


def _imported(code: str) -> set[str]:
    env = dict(os.environ)
    root = str(Path(freeladder.__file__).resolve().parents[1])
    env["PYTHONPATH"] = os.pathsep.join([root, env.get("PYTHONPATH", "")])
    done = subprocess.run(
        [sys.executable, "-X", "importtime", "-c", code],
        capture_output=True,
        text=True,
        env=env,
        check=True,
        timeout=300,
    )
    names = set()
    for line in done.stderr.splitlines():
        if line.startswith("import time:") and "|" in line:
            names.add(line.rsplit("|", 1)[1].strip())
    assert "freeladder" in names or "import freeladder" not in code
    return names


def test_import_loads_no_heavy_dependency() -> None:
    names = _imported("import freeladder")
    assert "freeladder.analysis" in names  # the log is read correctly
    loaded = sorted(n for n in names if n.split(".")[0] in HEAVY)
    assert loaded == [], loaded


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
