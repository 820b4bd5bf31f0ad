"""The worked examples run: every notebook in example_notebooks/ and the README's code.

Common practice for documentation: execute notebooks headlessly with nbclient and fail on any
raised exception or error output; run the README's ``python`` blocks in order, in one namespace.
"""

from __future__ import annotations

import re
from pathlib import Path

import nbformat
import pytest
from helpers import run_notebook

REPO = Path(__file__).resolve().parent.parent
NOTEBOOKS = sorted((REPO / "example_notebooks").glob("*.ipynb"))


def test_there_are_notebooks(notebook_dir: Path) -> None:
    assert NOTEBOOKS == sorted(notebook_dir.glob("*.ipynb"))
    assert any(p.name == "tour.ipynb" for p in NOTEBOOKS), NOTEBOOKS


@pytest.mark.parametrize("path", NOTEBOOKS, ids=[p.stem for p in NOTEBOOKS])
def test_notebook_runs(path: Path, kernel_dirs: Path, tmp_path: Path) -> None:
    nb = nbformat.read(path, as_version=4)
    assert nb.metadata.get("kernelspec", {}).get("name") == "python3", "set metadata.kernelspec"
    for cell in nb.cells:
        if cell.cell_type == "code":
            assert not cell.outputs, f"{path.name}: commit notebooks with empty outputs"

    run_notebook(nb, kernel_dirs, tmp_path)

    errors = []
    for index, cell in enumerate(nb.cells):
        for out in cell.get("outputs", []):
            if out.output_type == "error":
                errors.append(f"cell {index}: {out.ename}: {out.evalue}")
            elif out.output_type == "stream" and out.name == "stderr":
                if "Traceback" in out.text or "Error" in out.text:
                    errors.append(f"cell {index} (stderr): {out.text[:500]}")
    assert not errors, "\n".join(errors)
    code_cells = [c for c in nb.cells if c.cell_type == "code"]
    assert all(c.execution_count for c in code_cells), "some code cells did not run"
    assert any(c.outputs for c in code_cells), "the notebook printed nothing"


def test_readme_code_runs(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    text = (REPO / "README.md").read_text()
    blocks = re.findall(r"^```python\n(.*?)^```", text, flags=re.DOTALL | re.MULTILINE)
    assert blocks, "the README has no python blocks"
    monkeypatch.chdir(tmp_path)
    namespace: dict[str, object] = {"__name__": "readme"}
    for index, block in enumerate(blocks):
        exec(compile(block, f"README.md block {index}", "exec"), namespace)
