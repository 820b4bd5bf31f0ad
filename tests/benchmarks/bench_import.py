"""Benchmark: ``import freeladder`` in a fresh interpreter, beside ``import numpy, scipy.sparse``.

Baseline, measured in the same run: a fresh interpreter importing numpy and scipy.sparse (what
the library needs at import); the script prints the ratio and the difference.  sympy, numba,
pandas, networkx, python-flint, mpmath, tqdm and scipy's csgraph, sparse.linalg and linalg load
on first use (tests/test_import.py checks which modules load, and when).  Goal: under 0.5 s.
The two imports alternate, each time is the best of several fresh interpreters minus an empty
one, and the load average is printed with them.  freeladder's bytecode is compiled first (an
installed package has it; with PYTHONDONTWRITEBYTECODE every import would recompile it).

``--before PATH`` times the ``kernel_lib`` of another checkout in the same run as well (for
example a worktree of main), so a change shows side by side.

Run with ``bash tools/bench.sh tests/benchmarks/bench_import.py``.
"""

from __future__ import annotations

import argparse
import compileall
import os
import subprocess
import sys
import time
from pathlib import Path

REPEATS = 7


def once(code: str, path: str | None = None) -> float:
    """Wall-clock seconds of a fresh interpreter running ``code`` (``path`` first on sys.path)."""
    env = dict(os.environ)
    if path is not None:
        env["PYTHONPATH"] = os.pathsep.join([path, env.get("PYTHONPATH", "")])
    start = time.perf_counter()
    subprocess.run([sys.executable, "-c", code], check=True, env=env)
    return time.perf_counter() - start


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--before", type=Path, help="another checkout to time side by side")
    args = parser.parse_args()
    import freeladder

    here = str(Path(freeladder.__file__).resolve().parents[1])
    cases = {
        "empty interpreter": ("pass", None),
        "numpy, scipy.sparse (base)": ("import numpy, scipy.sparse", None),
        "import freeladder": ("import freeladder", here),
    }
    if args.before is not None:
        before = str((args.before / "kernel_lib").resolve())
        cases["import freeladder (--before)"] = ("import freeladder", before)
        compileall.compile_dir(before, quiet=1)
    compileall.compile_dir(here, quiet=1)
    cases["first use: sympy, numba, pandas, networkx"] = (
        "import sympy, numba, pandas, networkx",
        None,
    )
    loads = [os.getloadavg()[0]]
    best = dict.fromkeys(cases, float("inf"))
    for _ in range(REPEATS):  # alternate, so a change of load hits every case alike
        for name, (code, path) in cases.items():
            best[name] = min(best[name], once(code, path))
    loads.append(os.getloadavg()[0])
    empty = best.pop("empty interpreter")
    seconds = {name: t - empty for name, t in best.items()}
    base = seconds["numpy, scipy.sparse (base)"]
    print(f"load average {loads[0]:.2f} before, {loads[1]:.2f} after")
    head = "what (fresh interpreter, minus an empty one)"
    print(f"{head:<44} {'seconds':>8} {'ratio':>6} {'minus base':>11}")
    for name, t in seconds.items():
        print(f"{name:<44} {t:>8.3f} {t / base:>6.2f} {t - base:>+11.3f}")
    mine = seconds["import freeladder"]
    print(f"import freeladder / 0.5 s goal: {mine / 0.5:.2f}")


if __name__ == "__main__":
    main()
