"""Shared fixtures: where the repository is, and a Jupyter kernel that runs this interpreter."""

from __future__ import annotations

import json
import sys
from pathlib import Path

import pytest

REPO = Path(__file__).resolve().parent.parent
NOTEBOOK_DIR = REPO / "example_notebooks"
ARTIFACTS = REPO / "tests" / "artifacts"


@pytest.fixture(scope="session")
def notebook_dir() -> Path:
    """The folder of example notebooks."""
    return NOTEBOOK_DIR


@pytest.fixture(scope="session")
def artifacts_dir() -> Path:
    """tests/artifacts/ (git-ignored), for screenshots a person can look at."""
    ARTIFACTS.mkdir(parents=True, exist_ok=True)
    return ARTIFACTS


@pytest.fixture(scope="session")
def kernel_dirs(tmp_path_factory: pytest.TempPathFactory) -> Path:
    """A temporary ``kernels`` folder whose ``python3`` kernelspec starts ``sys.executable``.

    Tests use it so that notebooks run in the interpreter that has freeladder installed, not in
    whatever ``python`` comes first on PATH or in a user-wide kernelspec.
    """
    data_dir = tmp_path_factory.mktemp("jupyter-data")
    spec_dir = data_dir / "kernels" / "python3"
    spec_dir.mkdir(parents=True, exist_ok=True)
    spec = {
        "argv": [sys.executable, "-m", "ipykernel_launcher", "-f", "{connection_file}"],
        "display_name": "Python 3 (freeladder tests)",
        "language": "python",
    }
    (spec_dir / "kernel.json").write_text(json.dumps(spec, indent=1))
    return data_dir / "kernels"
