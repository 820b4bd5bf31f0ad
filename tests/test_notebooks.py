"""The worked examples run: every notebook in example_notebooks/ and the README's code.

Common practice for documentation: execute notebooks headlessly with nbclient and fail on any
raised exception or error output; run the README's ``python`` blocks in order, in one namespace.

The notebooks are read as git stores them (the index), when this is a git checkout: a reader who
ran the tour in JupyterLab and let it save its outputs does not fail the tests.
"""

from __future__ import annotations

import re
import subprocess
from pathlib import Path
from typing import Any

import nbformat
import pytest
from helpers import run_notebook
from ipykernel.kernelspec import get_kernel_dict
from jupyter_client.kernelspec import KernelSpecManager
from jupyter_client.manager import KernelManager

REPO = Path(__file__).resolve().parent.parent


def tracked_notebooks() -> list[Path]:
    """The example notebooks git tracks (every one outside a git checkout): a notebook a user
    saves beside them, an exported worked calculation say, is theirs, not the project's."""
    folder = REPO / "example_notebooks"
    try:
        done = subprocess.run(
            ["git", "-C", str(REPO), "ls-files", "--cached", "-z", "--", "example_notebooks"],
            capture_output=True,
            text=True,
            check=False,
        )
    except OSError:
        return sorted(folder.glob("*.ipynb"))
    if done.returncode != 0:
        return sorted(folder.glob("*.ipynb"))
    names = [REPO / n for n in done.stdout.split("\0") if n.endswith(".ipynb")]
    return sorted(p for p in names if p.parent == folder)


NOTEBOOKS = tracked_notebooks()


def stored_text(path: Path) -> str:
    """The notebook as git's index holds it; the file itself outside a git checkout."""
    rel = path.relative_to(REPO).as_posix()
    try:
        done = subprocess.run(
            ["git", "-C", str(REPO), "show", f":{rel}"],
            capture_output=True,
            text=True,
            encoding="utf-8",
            check=False,
        )
    except OSError:
        return path.read_text(encoding="utf-8")
    return done.stdout if done.returncode == 0 else path.read_text(encoding="utf-8")


def test_there_are_notebooks(notebook_dir: Path) -> None:
    assert NOTEBOOKS and set(NOTEBOOKS) <= set(notebook_dir.glob("*.ipynb"))
    assert any(p.name == "tour.ipynb" for p in NOTEBOOKS), NOTEBOOKS


@pytest.mark.parametrize("path", NOTEBOOKS, ids=[p.stem for p in NOTEBOOKS])
def test_notebook_runs(path: Path, kernel_dirs: Path, tmp_path: Path) -> None:
    nb = nbformat.reads(stored_text(path), as_version=4)
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


@pytest.fixture(scope="module")
def language_info(kernel_dirs: Path) -> dict[str, Any]:
    """``language_info`` from a real ipykernel's ``kernel_info_reply`` (this interpreter)."""
    ksm = KernelSpecManager(kernel_dirs=[str(kernel_dirs)], ensure_native_kernel=False)
    km = KernelManager(kernel_name="python3", kernel_spec_manager=ksm)
    km.start_kernel()
    kc = km.client()
    kc.start_channels()
    try:
        kc.wait_for_ready(timeout=60)
        reply = kc.kernel_info(reply=True, timeout=60)
    finally:
        kc.stop_channels()
        km.shutdown_kernel(now=True)
    return dict(reply["content"]["language_info"])


@pytest.mark.parametrize("path", NOTEBOOKS, ids=[p.stem for p in NOTEBOOKS])
def test_notebook_stored_as_jupyterlab_writes_it(path: Path, language_info: dict) -> None:
    """Opening a stored notebook in JupyterLab changes nothing, so its tab shows no unsaved mark.

    When a kernel starts, JupyterLab sets ``metadata.kernelspec`` to the kernel's name, display
    name and language and ``metadata.language_info`` to the kernel's ``kernel_info_reply``
    (observed with JupyterLab 4.6: a notebook with ``language_info = {"name": "python"}`` came
    back from a save with the full reply written in); its server saves through nbformat's
    writer.  ``tools/notebook_metadata.py`` writes them so.
    """
    text = stored_text(path)
    nb = nbformat.reads(text, as_version=4)
    nbformat.validate(nb)
    assert nbformat.writes(nb) + "\n" == text, (
        f"{path.name} is not stored as nbformat writes it: run tools/notebook_metadata.py"
    )
    spec = get_kernel_dict()
    assert dict(nb.metadata.kernelspec) == {
        "display_name": spec["display_name"],
        "language": spec["language"],
        "name": "python3",
    }, f"{path.name}: kernelspec differs from ipykernel's: run tools/notebook_metadata.py"
    # The Python version is the reader's own: JupyterLab writes it in whatever is stored, so
    # only the rest of the reply can match for every reader (the browser test checks the mark
    # where the versions agree).
    stored = {k: v for k, v in nb.metadata.language_info.items() if k != "version"}
    reported = {k: v for k, v in language_info.items() if k != "version"}
    assert stored == reported, f"{path.name}: language_info differs: run tools/notebook_metadata.py"
    assert "version" in nb.metadata.language_info


def test_readme_code_runs(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    text = (REPO / "README.md").read_text()
    blocks = re.findall(r"^```python\n(.*?)^```", text, flags=re.DOTALL | re.MULTILINE)
    assert blocks, "the README has no python blocks"
    monkeypatch.chdir(tmp_path)
    namespace: dict[str, object] = {"__name__": "readme"}
    for index, block in enumerate(blocks):
        exec(compile(block, f"README.md block {index}", "exec"), namespace)


def test_readme_lists_the_public_functions() -> None:
    """The README's table of public functions names only what ``freeladder`` exports, and every
    exported function appears somewhere in the README."""
    import freeladder as fl

    text = (REPO / "README.md").read_text()
    section = text.split("## The public functions", 1)[1].split("\n## ", 1)[0]
    listed = set()
    for row in section.splitlines():
        if not row.startswith("| ") or row.startswith("| step") or row.startswith("| ---"):
            continue
        cells = row.split("|")[2]
        while re.search(r"\([^()]*\)", cells):  # attribute lists in parentheses
            cells = re.sub(r"\([^()]*\)", "", cells)
        listed.update(re.findall(r"`([A-Za-z_][\w.]*)`", cells))
    assert listed, "no names found in the README's table of public functions"
    for name in sorted(listed):
        owner, _, attr = name.partition(".")
        assert owner in fl.__all__, f"README lists {name}, which freeladder does not export"
        if attr:
            assert hasattr(getattr(fl, owner), attr), f"README lists {name}, which does not exist"
    functions = [n for n in fl.__all__ if n[0].islower() and callable(getattr(fl, n))]
    missing = [n for n in functions if not re.search(rf"(`|fl\.){n}\b", text)]
    assert not missing, f"exported but not in the README: {missing}"
