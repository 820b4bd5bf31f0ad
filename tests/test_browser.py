"""End to end: JupyterLab in headless Chromium opens the tour, runs every cell, shows no error.

A person's path through the product: start ``jupyter lab`` (this interpreter's), open the tour
notebook, choose Run > Run All Cells from the menu, wait until the kernel is idle, and read the
outputs.  A screenshot goes to tests/artifacts/ for a person to look at.
"""

from __future__ import annotations

import json
import os
import shutil
import socket
import subprocess
import sys
import time
import urllib.request
import uuid
from collections.abc import Iterator
from pathlib import Path

import nbformat
import pytest
from ipykernel.kernelspec import get_kernel_dict

CHROMIUM = Path("/usr/bin/chromium")
REPO = Path(__file__).resolve().parent.parent
CHROMIUM_ARGS = [
    "--headless",
    "--no-sandbox",
    "--disable-gpu",
    "--disable-background-networking",
    "--disable-component-update",
    "--disable-sync",
    "--no-first-run",
]
# Text the tour prints: the reach-2 chain of 6 terms (as in the exclusion_chain docstring), the
# parsed candidate agreeing with the builder, the exclusion algebra recognised in the graph,
# and the closing verification report.
EXPECTED_TEXT = [
    "X0 Z1 Z2 + X1 Z2 Z3 + X2 Z3 Z4 + X3 Z4 Z5 + X4 Z5 Z6 + X5 Z6 Z7",
    "same model as the builder's: True",
    "ChainStructure(M=6, reach=2",
    "all checks passed: True",
    "all checks passed: True | dimension 4294967296",
    "charges commute: False",
]

if not CHROMIUM.exists():
    if os.environ.get("CI", "").lower() in ("1", "true", "yes"):
        pytest.fail(f"{CHROMIUM} is missing under CI: .ci/run must install chromium", pytrace=False)
    pytest.skip(
        f"SKIPPING the tour browser test: {CHROMIUM} is not installed (apt-get install chromium)",
        allow_module_level=True,
    )

sync_api = pytest.importorskip("playwright.sync_api")


def _free_port() -> int:
    with socket.socket(socket.AF_INET, socket.SOCK_STREAM) as s:
        s.bind(("127.0.0.1", 0))
        return int(s.getsockname()[1])


def _wait_for_server(url: str, proc: subprocess.Popen, log: Path, limit: float = 90.0) -> None:
    deadline = time.monotonic() + limit
    while time.monotonic() < deadline:
        if proc.poll() is not None:
            raise RuntimeError(f"jupyter lab exited early ({proc.returncode}):\n{log.read_text()}")
        try:
            with urllib.request.urlopen(url + "api/status", timeout=2) as reply:
                if reply.status == 200:
                    return
        except OSError:
            time.sleep(0.3)
    raise RuntimeError(f"jupyter lab did not answer within {limit} s:\n{log.read_text()}")


@pytest.fixture
def lab_server(tmp_path: Path, notebook_dir: Path, kernel_dirs: Path) -> Iterator[str]:
    """A JupyterLab server on a free localhost port with its own config, data and runtime dirs."""
    root = tmp_path / "notebooks"
    shutil.copytree(notebook_dir, root)
    config, data, runtime = (tmp_path / name for name in ("config", "data", "runtime"))
    shutil.copytree(kernel_dirs, data / "kernels")
    # The display name ipykernel installs, which the stored notebooks carry: JupyterLab writes
    # the running kernel's name into the notebook, and a different one would mark it changed.
    spec_file = data / "kernels" / "python3" / "kernel.json"
    spec = json.loads(spec_file.read_text())
    spec["display_name"] = get_kernel_dict()["display_name"]
    spec_file.write_text(json.dumps(spec, indent=1))
    settings = config / "lab" / "user-settings" / "@jupyterlab" / "apputils-extension"
    settings.mkdir(parents=True)
    (settings / "notification.jupyterlab-settings").write_text(
        json.dumps({"fetchNews": "false", "checkForUpdates": False})
    )
    # Every cell stays in the page (no windowing), so that counting cells and prompts is stable.
    tracker = config / "lab" / "user-settings" / "@jupyterlab" / "notebook-extension"
    tracker.mkdir(parents=True)
    (tracker / "tracker.jupyterlab-settings").write_text(json.dumps({"windowingMode": "none"}))
    env = dict(os.environ)
    env.update(
        JUPYTER_CONFIG_DIR=str(config),
        JUPYTER_DATA_DIR=str(data),
        JUPYTER_PATH=str(data),
        JUPYTER_RUNTIME_DIR=str(runtime),
        JUPYTERLAB_SETTINGS_DIR=str(config / "lab" / "user-settings"),
        JUPYTERLAB_WORKSPACES_DIR=str(config / "lab" / "workspaces"),
        JUPYTER_PLATFORM_DIRS="1",
    )
    port = _free_port()
    log = tmp_path / "lab.log"
    cmd = [
        sys.executable,
        "-m",
        "jupyterlab",
        "--no-browser",
        "--ip=127.0.0.1",
        f"--port={port}",
        "--ServerApp.port_retries=0",
        "--IdentityProvider.token=",
        "--ServerApp.password=",
        "--ServerApp.disable_check_xsrf=True",
        f"--ServerApp.root_dir={root}",
        "--LabApp.news_url=",
        "--LabApp.check_for_updates_class=jupyterlab.NeverCheckForUpdate",
    ]
    if os.geteuid() == 0:
        cmd.append("--allow-root")
    with log.open("w") as out:
        proc = subprocess.Popen(cmd, env=env, stdout=out, stderr=subprocess.STDOUT, cwd=root)
    url = f"http://127.0.0.1:{port}/"
    try:
        _wait_for_server(url, proc, log)
        yield url
    finally:
        proc.terminate()
        try:
            proc.wait(timeout=20)
        except subprocess.TimeoutExpired:
            proc.kill()
            proc.wait(timeout=10)


def test_tour_runs_in_jupyterlab(lab_server: str, artifacts_dir: Path) -> None:
    workspace = f"t{uuid.uuid4().hex[:10]}"
    with sync_api.sync_playwright() as pw:
        browser = pw.chromium.launch(executable_path=str(CHROMIUM), args=CHROMIUM_ARGS)
        try:
            page = browser.new_page(viewport={"width": 1400, "height": 1000})
            page.goto(f"{lab_server}lab/workspaces/{workspace}/tree/tour.ipynb?reset")
            panel = page.locator(".jp-NotebookPanel:visible")
            panel.locator(".jp-Cell").first.wait_for(timeout=60_000)
            _wait_kernel_idle(page)
            _check_not_marked_changed(page)

            _run_all_cells(page)

            code_cells = panel.locator(".jp-CodeCell")
            count = code_cells.count()
            assert count > 0
            # Each cell's prompt reads "[n]:" once it has run ("[*]:" while queued or running).
            page.wait_for_function(
                """(count) => {
                    const panel = [...document.querySelectorAll('.jp-NotebookPanel')]
                        .find(p => p.offsetParent !== null);
                    const prompts = [...panel.querySelectorAll('.jp-CodeCell .jp-InputPrompt')];
                    return prompts.length === count &&
                        prompts.every(p => /\\[\\d+\\]/.test(p.textContent));
                }""",
                arg=count,
                timeout=120_000,
            )
            _wait_kernel_idle(page)

            texts = panel.locator(".jp-OutputArea-output").all_text_contents()
            stderr = panel.locator(
                '.jp-OutputArea-output[data-mime-type="application/vnd.jupyter.stderr"]'
            ).all_text_contents()
            _screenshot_at(page, panel.locator(".jp-Cell").first, artifacts_dir / "tour-top.png")
            # The tour draws the frustration graph with matplotlib: a PNG image output.
            figure = panel.locator(".jp-RenderedImage img")
            assert figure.count() >= 1, "the tour's figure did not appear"
            _screenshot_at(page, figure.first, artifacts_dir / "tour-figure.png")
            _screenshot_at(page, code_cells.last, artifacts_dir / "tour-end.png")
            checks_text = _workbench_checks(page, code_cells.first, artifacts_dir / "workbench.png")
        except Exception:
            page.screenshot(path=str(artifacts_dir / "tour-failure.png"))
            raise
        finally:
            browser.close()

    joined = "\n".join(texts)
    assert not [t for t in stderr if "Traceback" in t or "Error" in t], stderr
    assert "Traceback" not in joined, joined
    for expected in EXPECTED_TEXT:
        assert expected in joined, f"{expected!r} not among the outputs:\n{joined[:3000]}"
    assert "every check that ran passed" in checks_text, checks_text[-2000:]


def _check_not_marked_changed(page: sync_api.Page) -> None:
    """The freshly opened tour shows no unsaved-changes mark on its tab.

    Once its kernel runs, JupyterLab writes the kernel's name and ``language_info`` into the
    notebook; the stored notebook carries what ipykernel reports (test_notebooks checks that),
    except the Python version, which is the reader's own, so the mark is checked only when the
    stored version is this interpreter's.
    """
    stored = nbformat.read(REPO / "example_notebooks" / "tour.ipynb", as_version=4)
    if stored.metadata.language_info.get("version") != sys.version.split()[0]:
        return
    page.wait_for_timeout(1000)  # the metadata update follows the kernel's info reply
    tab = page.locator(".lm-TabBar-tab", has_text="tour.ipynb").first
    classes = tab.get_attribute("class") or ""
    assert "jp-mod-dirty" not in classes, "the tour shows unsaved changes before anything ran"


def _workbench_checks(page: sync_api.Page, cell: sync_api.Locator, path: Path) -> str:
    """Press the Workbench's "Run the checks", wait for the verdict line, screenshot it all.

    The screenshot of the whole Workbench is the README's docs/workbench.png (copied by hand).
    """
    output = cell.locator(".jp-OutputArea-output").first
    output.get_by_role("button", name="Run the checks").click()
    page.wait_for_function(
        """(node) => /every check that ran passed|FAILED|no check could run/
            .test(node.textContent)""",
        arg=output.element_handle(),
        timeout=120_000,
    )
    _check_workbench_layout(page, output)
    # The Dynamics section: the edge autocorrelation of the tour's chain, drawn with its summary.
    output.get_by_role("button", name="Evolve the edge").click()
    page.wait_for_function(
        """(node) => /plateau \\(zero-mode weight\\)|No expansion/.test(node.textContent)""",
        arg=output.element_handle(),
        timeout=120_000,
    )
    assert "plateau (zero-mode weight)" in (output.text_content() or "")
    # the time trace is drawn: its line has a path through the 300 time points
    page.wait_for_function(
        """(node) => Array.from(node.querySelectorAll(".freeladder-dynamics-trace path"))
            .some((p) => (p.getAttribute("d") || "").length > 1000)""",
        arg=output.element_handle(),
        timeout=60_000,
    )
    height = int((output.bounding_box() or {"height": 2500})["height"])
    page.set_viewport_size({"width": 1400, "height": height + 400})
    output.scroll_into_view_if_needed()
    page.wait_for_timeout(1500)  # plots settle their layout after the resize
    output.screenshot(path=str(path))
    page.set_viewport_size({"width": 1400, "height": 1000})
    return output.text_content() or ""


def _check_workbench_layout(page: sync_api.Page, output: sync_api.Locator) -> None:
    """What a newcomer saw wrong once, measured in the page.

    The tour's chain (couplings 1, 0.4, 1, 0.4, ...) is the chain family with staggered
    couplings, so the family selector shows that family (not "(custom)"); the frustration
    graph's title is not under bqplot's toolbar (hovered, so it shows); the k / eta_k / bound
    table's rows keep their natural height beside the longer notes.
    """
    selected = output.locator("select").first.evaluate(
        "(s) => s.options[s.selectedIndex].textContent.replace(/\\u00a0/g, ' ')"
    )
    assert selected.startswith("exclusion chain"), f"the family selector shows {selected!r}"
    pattern = (
        output.locator("select")
        .nth(1)
        .evaluate("(s) => s.options[s.selectedIndex].textContent.replace(/\\u00a0/g, ' ')")
    )
    assert pattern.startswith("staggered"), f"the coupling pattern shows {pattern!r}"
    graph = output.locator(".bqplot").first
    graph.hover()
    page.wait_for_timeout(300)
    overlap = output.evaluate(
        """(node) => {
            const title = node.querySelector('.freeladder-graph-title').getBoundingClientRect();
            const bars = [...node.querySelectorAll('.toolbar_div')]
                .map(b => b.getBoundingClientRect()).filter(r => r.width > 0 && r.height > 0);
            return bars.some(r => r.left < title.right && title.left < r.right &&
                                  r.top < title.bottom && title.top < r.bottom);
        }"""
    )
    assert not overlap, "bqplot's toolbar covers the frustration graph's title"
    rows = output.evaluate(
        """(node) => [...node.querySelectorAll('.freeladder-eta-table tr')].map(tr => {
            const range = document.createRange();
            range.selectNodeContents(tr.cells[1]);
            return [tr.getBoundingClientRect().height, range.getBoundingClientRect().height];
        })"""
    )
    assert rows, "the roots table is missing"
    stretched = [(row, text) for row, text in rows if row > text + 8]
    assert not stretched, f"roots table rows taller than their text (px): {stretched}"


def _run_all_cells(page: sync_api.Page, attempts: int = 3) -> None:
    """Choose Run > Run All Cells; choose it again if no cell started within 15 s.

    Under load the menu entry can be chosen before the notebook enables it, in which case the
    click does nothing; a cell prompt showing ``[*]`` or ``[n]`` proves the command ran.
    """
    started = """() => [...document.querySelectorAll('.jp-NotebookPanel')]
        .filter(p => p.offsetParent !== null)
        .some(p => [...p.querySelectorAll('.jp-CodeCell .jp-InputPrompt')]
            .some(q => /\\[(\\*|\\d+)\\]/.test(q.textContent)))"""
    for _ in range(attempts):
        page.locator(".lm-MenuBar-itemLabel", has_text="Run").first.click()
        entry = page.locator(".lm-Menu-item:not(.lm-mod-disabled) .lm-Menu-itemLabel")
        entry.filter(has_text="Run All Cells").first.click()
        try:
            page.wait_for_function(started, timeout=15_000)
            return
        except sync_api.TimeoutError:
            page.keyboard.press("Escape")
    raise AssertionError(f"Run > Run All Cells started no cell in {attempts} attempts")


def _screenshot_at(page: sync_api.Page, cell: sync_api.Locator, path: Path) -> None:
    """Scroll ``cell`` into view, let the browser paint it, and save a screenshot."""
    cell.scroll_into_view_if_needed()
    # Cells out of view are skipped by the renderer (CSS content-visibility); give it two frames.
    page.evaluate("() => new Promise(r => requestAnimationFrame(() => requestAnimationFrame(r)))")
    page.wait_for_timeout(300)
    page.screenshot(path=str(path))


def _wait_kernel_idle(page: sync_api.Page) -> None:
    """Wait until the notebook has a kernel (its name shows in the toolbar) and it is idle."""
    page.wait_for_function(
        """() => {
            const panel = [...document.querySelectorAll('.jp-NotebookPanel')]
                .find(p => p.offsetParent !== null);
            if (!panel) return false;
            const name = panel.querySelector('.jp-KernelName');
            const busy = panel.querySelector('.jp-Notebook-ExecutionIndicator');
            return name !== null && !/No Kernel/.test(name.textContent) &&
                busy !== null && busy.getAttribute('data-status') === 'idle';
        }""",
        timeout=90_000,
    )
