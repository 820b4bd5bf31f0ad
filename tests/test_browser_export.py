"""End to end: the export panel inserts the worked cells below itself; they run; one undo.

The path a person takes, in JupyterLab and in Notebook 7 (one server, this interpreter's, on
127.0.0.1 with a token and a temporary root): open a notebook that shows an ExportPanel, run it,
press "insert cells below", find the worked calculation's cells directly below the panel's cell
(the cells around it untouched), run everything and see every cell pass, then undo once in
command mode and find the notebook as it was.  Screenshots go to tests/artifacts/.

The expected cells come from ``fl.worked_calculation`` in this process (the same function the
kernel calls); that the cells really check is tested in test_worked.py.
"""

from __future__ import annotations

import json
import os
import secrets
import shutil
import socket
import subprocess
import sys
import sysconfig
import time
import urllib.request
import uuid
from collections.abc import Iterator
from pathlib import Path

import nbformat
import pytest

import freeladder as fl

CHROMIUM = Path("/usr/bin/chromium")
CHROMIUM_ARGS = [
    "--headless",
    "--no-sandbox",
    "--disable-gpu",
    "--disable-background-networking",
    "--disable-component-update",
    "--disable-sync",
    "--no-first-run",
]
IN_CI = os.environ.get("CI", "").lower() in ("1", "true", "yes")

if not CHROMIUM.exists():
    if IN_CI:
        pytest.fail(f"{CHROMIUM} is missing under CI: .ci/run must install chromium", pytrace=False)
    message = (
        f"SKIPPING the export browser test: {CHROMIUM} is not installed (apt-get install chromium)"
    )
    print(f"\n*** {message} ***\n", file=sys.stderr)
    pytest.skip(message, allow_module_level=True)

sync_api = pytest.importorskip("playwright.sync_api")

MODEL_SOURCE = "fl.ising_chain(3, field=0.75)"
PANEL_CELL = f"""import freeladder as fl
from freeladder_lab.export import ExportPanel

model = {MODEL_SOURCE}
ExportPanel(lambda: model)"""
AFTER_CELL = 'print("the cell after the panel")'


def _labextension_dir() -> Path:
    return Path(sysconfig.get_path("data")) / "share/jupyter/labextensions/freeladder-cells"


def _free_port() -> int:
    with socket.socket(socket.AF_INET, socket.SOCK_STREAM) as s:
        s.bind(("127.0.0.1", 0))
        return int(s.getsockname()[1])


def _wait_for_server(url: str, token: str, proc: subprocess.Popen, log: Path) -> None:
    deadline = time.monotonic() + 90
    request = urllib.request.Request(
        url + "api/status", headers={"Authorization": f"token {token}"}
    )
    while time.monotonic() < deadline:
        if proc.poll() is not None:
            raise RuntimeError(f"jupyter lab exited early ({proc.returncode}):\n{log.read_text()}")
        try:
            with urllib.request.urlopen(request, timeout=2) as reply:
                if reply.status == 200:
                    return
        except OSError:
            time.sleep(0.3)
    raise RuntimeError(f"jupyter lab did not answer within 90 s:\n{log.read_text()}")


@pytest.fixture(scope="module")
def server(
    tmp_path_factory: pytest.TempPathFactory, kernel_dirs: Path
) -> Iterator[tuple[str, str, Path]]:
    """JupyterLab (which also serves Notebook 7) on a free port with a token and its own dirs."""
    assert (_labextension_dir() / "package.json").exists(), (
        f"the freeladder-cells extension is not installed at {_labextension_dir()}: "
        "pip install the package (its build runs the node build of nbext/)"
    )
    tmp = tmp_path_factory.mktemp("lab-export")
    root = tmp / "notebooks"
    root.mkdir()
    config, data, runtime = (tmp / name for name in ("config", "data", "runtime"))
    shutil.copytree(kernel_dirs, data / "kernels")
    user = config / "lab" / "user-settings" / "@jupyterlab"
    (user / "apputils-extension").mkdir(parents=True)
    (user / "apputils-extension" / "notification.jupyterlab-settings").write_text(
        json.dumps({"fetchNews": "false", "checkForUpdates": False})
    )
    # Every cell stays in the page, so that the test reads all of them.
    (user / "notebook-extension").mkdir(parents=True)
    (user / "notebook-extension" / "tracker.jupyterlab-settings").write_text(
        json.dumps({"windowingMode": "none"})
    )
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
    token = secrets.token_hex(16)
    port = _free_port()
    log = tmp / "lab.log"
    cmd = [
        sys.executable,
        "-m",
        "jupyterlab",
        "--no-browser",
        "--ip=127.0.0.1",
        f"--port={port}",
        "--ServerApp.port_retries=0",
        f"--IdentityProvider.token={token}",
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
        _wait_for_server(url, token, proc, log)
        yield url, token, root
    finally:
        proc.terminate()
        try:
            proc.wait(timeout=20)
        except subprocess.TimeoutExpired:
            proc.kill()
            proc.wait(timeout=10)


def _write_notebook(
    path: Path,
    intro: str = "Export test: a panel, then a cell after it.",
    middle: str = PANEL_CELL,
) -> None:
    nb = nbformat.v4.new_notebook()
    nb.metadata["kernelspec"] = {
        "name": "python3",
        "display_name": "Python 3",
        "language": "python",
    }
    nb.cells = [
        nbformat.v4.new_markdown_cell(intro),
        nbformat.v4.new_code_cell(middle),
        nbformat.v4.new_code_cell(AFTER_CELL),
    ]
    nbformat.write(nb, path)


@pytest.mark.parametrize("app", ["lab", "notebook7"])
def test_export_inserts_runs_and_undoes(
    app: str, server: tuple[str, str, Path], artifacts_dir: Path
) -> None:
    url, token, root = server
    name = f"export-{app}.ipynb"
    _write_notebook(root / name)
    expected = fl.worked_calculation(fl.ising_chain(3, field=0.75))
    if app == "lab":
        address = f"{url}lab/workspaces/t{uuid.uuid4().hex[:10]}/tree/{name}?reset&token={token}"
    else:
        address = f"{url}notebooks/{name}?token={token}"
    with sync_api.sync_playwright() as pw:
        browser = pw.chromium.launch(executable_path=str(CHROMIUM), args=CHROMIUM_ARGS)
        page = browser.new_page(viewport={"width": 1400, "height": 1000})
        try:
            notebook, cells = _open_and_run(page, address, url, token, name, 3)
            insert = notebook.get_by_role("button", name="insert cells below")
            insert.wait_for(timeout=120_000)
            _wait_all_ran(page, 2)
            insert.click()
            panel = notebook.locator(".freeladder-export")
            panel.filter(has_text="inserted").wait_for(timeout=60_000)
            assert "below this widget" in panel.text_content()

            # The worked cells sit directly below the panel's cell; the cells around it are
            # the same, in the same order.
            _wait_cell_count(page, 3 + len(expected))
            _assert_layout(cells, expected.cells)
            _shot(page, cells.nth(2), artifacts_dir / f"export-{app}-inserted.png")

            _run_all(page)
            n_code = 2 + sum(c.kind == "code" for c in expected)
            _wait_all_ran(page, n_code)
            outputs = notebook.locator(".jp-OutputArea-output")
            texts = outputs.all_text_contents()
            stderr = notebook.locator(
                '.jp-OutputArea-output[data-mime-type="application/vnd.jupyter.stderr"]'
            ).all_text_contents()
            assert not stderr, stderr
            joined = "\n".join(texts)
            assert "Traceback" not in joined and "AssertionError" not in joined, joined[:3000]
            assert "all checks passed" in joined, joined[-3000:]
            assert "the cell after the panel" in joined
            _shot(page, cells.nth(3 + len(expected) - 1), artifacts_dir / f"export-{app}-ran.png")

            # One undo in command mode removes every inserted cell.
            cells.first.click()
            page.keyboard.press("Escape")
            page.keyboard.press("z")
            _wait_cell_count(page, 3)
            assert "Export test" in cells.nth(0).text_content()
            assert "ExportPanel(lambda: model)" in cells.nth(1).text_content()
            assert "the cell after the panel" in cells.nth(2).text_content()
            _shot(page, cells.first, artifacts_dir / f"export-{app}-undone.png")
        except Exception:
            page.screenshot(path=str(artifacts_dir / f"export-{app}-failure.png"))
            raise
        finally:
            browser.close()


def _wait_kernel_idle(url: str, token: str, name: str) -> None:
    """Wait until the server has a session for notebook ``name`` whose kernel is idle.

    Running cells before the kernel is up loses executions (or opens a kernel dialog); the
    server's own session list says when the kernel is ready.
    """
    request = urllib.request.Request(
        url + "api/sessions", headers={"Authorization": f"token {token}"}
    )
    deadline = time.monotonic() + 120
    while time.monotonic() < deadline:
        with urllib.request.urlopen(request, timeout=5) as reply:
            sessions = json.load(reply)
        states = [s["kernel"]["execution_state"] for s in sessions if s.get("path") == name]
        if states == ["idle"]:
            return
        time.sleep(0.5)
    raise AssertionError(f"no idle kernel for {name} within 120 s: {sessions}")


def _open_and_run(
    page: sync_api.Page, address: str, url: str, token: str, name: str, count: int
) -> tuple[sync_api.Locator, sync_api.Locator]:
    """Open the notebook, wait for its ``count`` cells and an idle kernel, then Run All.

    Returns the notebook and its cells.
    """
    page.goto(address)
    notebook = page.locator(".jp-Notebook:visible").first
    cells = notebook.locator(".jp-Cell")
    cells.first.wait_for(timeout=90_000)
    _wait_cell_count(page, count)
    _wait_kernel_idle(url, token, name)
    _run_all(page)
    return notebook, cells


def _wait_cell_count(page: sync_api.Page, count: int) -> None:
    page.wait_for_function(
        "(n) => document.querySelectorAll('.jp-Notebook:not(.lm-mod-hidden) .jp-Cell')"
        ".length === n",
        arg=count,
        timeout=60_000,
    )


def _assert_layout(cells: sync_api.Locator, expected: tuple[fl.Cell, ...]) -> None:
    n = cells.count()
    assert n == 3 + len(expected), f"{n} cells, expected {3 + len(expected)}"
    assert "Export test" in cells.nth(0).text_content()
    assert "ExportPanel(lambda: model)" in cells.nth(1).text_content()
    for k, cell in enumerate(expected):
        node = cells.nth(2 + k)
        kind = "jp-CodeCell" if cell.kind == "code" else "jp-MarkdownCell"
        assert kind in (node.get_attribute("class") or ""), (k, cell.kind)
        first = cell.source.splitlines()[0].lstrip("# ").strip()
        assert first in node.text_content(), (k, first, node.text_content()[:300])
    assert "the cell after the panel" in cells.nth(n - 1).text_content()


def _run_all(page: sync_api.Page, attempts: int = 4) -> None:
    """Run > Run All Cells; again if no prompt changed within 15 s (the kernel may still start).

    Waits for the kernel to be idle first (choosing Run All before the kernel is up makes the
    page ask for a kernel in a dialog); should the dialog appear anyway, accepts its default.
    """
    page.wait_for_function(_KERNEL_IDLE, timeout=120_000)
    before = page.evaluate(_PROMPTS)
    for _ in range(attempts):
        select = page.locator(".jp-Dialog button", has_text="Select")
        if select.count():
            select.first.click()
        page.locator(".lm-MenuBar-itemLabel", has_text="Run").first.click()
        entry = page.locator(".lm-Menu-item:not(.lm-mod-disabled) .lm-Menu-itemLabel")
        entry.filter(has_text="Run All Cells").first.click()
        try:
            page.wait_for_function(
                f"(before) => ({_PROMPTS})() !== before", arg=before, timeout=15_000
            )
            return
        except sync_api.TimeoutError:
            page.keyboard.press("Escape")
    raise AssertionError(f"Run > Run All Cells started no cell in {attempts} attempts")


_PROMPTS = """() => [...document.querySelectorAll(
    '.jp-Notebook:not(.lm-mod-hidden) .jp-CodeCell .jp-InputPrompt')]
    .map(p => p.textContent).join('|')"""

# The toolbar's execution indicator (JupyterLab and Notebook 7) reads idle once a kernel is up.
_KERNEL_IDLE = """() => [...document.querySelectorAll('.jp-Notebook-ExecutionIndicator')]
    .some(e => e.offsetParent !== null && e.getAttribute('data-status') === 'idle')"""


def _wait_all_ran(page: sync_api.Page, count: int) -> None:
    """Wait until ``count`` code cells show a prompt ``[n]`` (none queued or running)."""
    page.wait_for_function(
        """(count) => {
            const prompts = [...document.querySelectorAll(
                '.jp-Notebook:not(.lm-mod-hidden) .jp-CodeCell .jp-InputPrompt')];
            return prompts.length === count && prompts.every(p => /\\[\\d+\\]/.test(p.textContent));
        }""",
        arg=count,
        timeout=180_000,
    )


def _shot(page: sync_api.Page, cell: sync_api.Locator, path: Path) -> None:
    cell.scroll_into_view_if_needed()
    page.evaluate("() => new Promise(r => requestAnimationFrame(() => requestAnimationFrame(r)))")
    page.wait_for_timeout(300)
    page.screenshot(path=str(path))


WORKBENCH_CELL = """import freeladder as fl
from freeladder_lab import Workbench

wb = Workbench(fl.exclusion_chain(6, reach=2, couplings=fl.staggered(6, 1.0, 0.4)))
wb"""

_ROOTS_FIGURE = """() => {
    const figures = [...document.querySelectorAll('.jp-Notebook:not(.lm-mod-hidden) .bqplot')];
    const roots = figures.find(f => /roots y_k of P/.test(f.textContent));
    const svg = roots ? roots.querySelector('svg') : null;
    return svg ? svg.innerHTML : null;
}"""


def test_workbench_renders_follows_edits_and_exports(
    server: tuple[str, str, Path], artifacts_dir: Path
) -> None:
    # The Workbench in JupyterLab: its plots render, a new model moves the roots, a malformed
    # text shows the parser's caret inline, and its export section inserts the worked cells
    # directly below the Workbench's cell (one undo step removes them).
    url, token, root = server
    name = "workbench.ipynb"
    _write_notebook(
        root / name, "Workbench test: a workbench, then a cell after it.", WORKBENCH_CELL
    )
    new_text = "X0 Z1 Z2 + 0.7 X1 Z2 Z3 + X2 Z3 Z4 + 0.7 X3 Z4 Z5 + X4 Z5 Z6"
    expected = fl.worked_calculation(fl.parse_model(new_text))
    address = f"{url}lab/workspaces/t{uuid.uuid4().hex[:10]}/tree/{name}?reset&token={token}"
    with sync_api.sync_playwright() as pw:
        browser = pw.chromium.launch(executable_path=str(CHROMIUM), args=CHROMIUM_ARGS)
        page = browser.new_page(viewport={"width": 1400, "height": 1000})
        try:
            notebook, cells = _open_and_run(page, address, url, token, name, 3)
            _wait_all_ran(page, 2)
            # every plot of the Workbench has drawn (bqplot figures inside the output)
            page.wait_for_function(
                "() => document.querySelectorAll("
                "'.jp-Notebook:not(.lm-mod-hidden) .bqplot svg').length >= 4",
                timeout=120_000,
            )
            before = page.evaluate(_ROOTS_FIGURE)
            assert before, "the roots figure did not render"
            _shot(page, cells.nth(1), artifacts_dir / "workbench-lab.png")

            text = notebook.locator(".jp-OutputArea-output textarea:not([disabled]):visible").first
            text.fill(new_text)
            page.wait_for_function(
                f"(before) => {{ const now = ({_ROOTS_FIGURE})(); "
                "return now !== null && now !== before; }",
                arg=before,
                timeout=60_000,
            )
            notebook.locator(".jp-OutputArea-output", has_text="for 5 terms").first.wait_for(
                timeout=60_000
            )
            text.fill(new_text + " + Q7")
            message = notebook.locator(".jp-OutputArea-output pre", has_text="^")
            message.first.wait_for(timeout=60_000)
            assert "column" in notebook.locator(".jp-OutputArea-output").first.text_content()
            _shot(page, cells.nth(1), artifacts_dir / "workbench-lab-error.png")

            # the export section exports the last good model: the one before the typo
            notebook.get_by_role("button", name="insert cells below").click()
            panel = notebook.locator(".freeladder-export")
            panel.filter(has_text="inserted").wait_for(timeout=60_000)
            _wait_cell_count(page, 3 + len(expected))
            for k, cell in enumerate(expected.cells):
                first = cell.source.splitlines()[0].lstrip("# ").strip()
                assert first in cells.nth(2 + k).text_content(), (k, first)
            assert "the cell after the panel" in cells.nth(2 + len(expected)).text_content()
            cells.first.click()
            page.keyboard.press("Escape")
            page.keyboard.press("z")
            _wait_cell_count(page, 3)
        except Exception:
            page.screenshot(path=str(artifacts_dir / "workbench-lab-failure.png"))
            raise
        finally:
            browser.close()


LARGE_CELL = """import freeladder as fl
from freeladder_lab import Workbench

Workbench(fl.exclusion_chain(2000, reach=2))"""
LADDER_CELL = """Workbench(
    "0.9 X0 X1 + 1.2 Y1 Y2 + 0.7 X3 X4 + 1.1 Y4 Y5 + 0.8 Z0 Z3 + 1.3 Z1 Z4 + 0.6 Z2 Z5"
)"""
TYPO_CELL = """Workbench("X0 Z1 + 0.5 X1 Z2 + Q7")"""

# Boxes of the text elements of one figure that overlap another (the label boxes as drawn).
_OVERLAPS = """(node) => {
    const boxes = [...node.querySelectorAll(SELECTOR)]
        .filter(t => (t.textContent || '').trim() !== '')
        .map(t => [t.textContent, t.getBoundingClientRect()])
        .filter(([_, r]) => r.width > 0 && r.height > 0);
    const hits = [];
    for (let i = 0; i < boxes.length; i++) {
        for (let j = i + 1; j < boxes.length; j++) {
            const [a, p] = boxes[i], [b, q] = boxes[j];
            if (p.left < q.right - 0.5 && q.left < p.right - 0.5 &&
                p.top < q.bottom - 0.5 && q.top < p.bottom - 0.5) hits.push([a, b]);
        }
    }
    return [boxes.length, hits];
}"""


def _overlaps(locator: sync_api.Locator, selector: str) -> tuple[int, list]:
    count, hits = locator.evaluate(_OVERLAPS.replace("SELECTOR", repr(selector)))
    return int(count), hits


def _clipped(locator: sync_api.Locator) -> list[str]:
    """Elements wider than their box (text cut off or running past the right edge)."""
    return locator.evaluate(
        """(node) => [node, ...node.querySelectorAll('*')]
            .filter(e => e.clientWidth > 0 && e.scrollWidth > e.clientWidth + 1 &&
                         getComputedStyle(e).overflowX !== 'auto' &&
                         getComputedStyle(e).overflowX !== 'scroll')
            .map(e => e.className + ': ' + (e.textContent || '').slice(0, 80))"""
    )


def _titles_outside(output: sync_api.Locator) -> list[str]:
    """Plot titles that run past their figure's left or right edge (clipped on screen)."""
    return output.evaluate(
        """(node) => [...node.querySelectorAll('.bqplot')].flatMap(fig => {
            const box = fig.getBoundingClientRect();
            return [...fig.querySelectorAll('text.mainheading')]
                .filter(t => (t.textContent || '').trim() !== '')
                .filter(t => { const r = t.getBoundingClientRect();
                               return r.width > 0 && (r.left < box.left - 1 ||
                                                      r.right > box.right + 1); })
                .map(t => t.textContent);
        })"""
    )


def test_workbench_reads_at_scale_and_says_what_it_shows(
    server: tuple[str, str, Path], artifacts_dir: Path
) -> None:
    # Issue 24, items 1-5, 10 and 12, measured in the page: a 2000-term chain (multiplicities as
    # powers, ticks and labels that do not overlap, summary not cut off, log axes), a ladder
    # with cycle strings (the sector chooser names them, the ladder says what its exact column
    # holds) and a typo (the error box says that nothing parsed; export says so too).
    url, token, root = server
    name = "scale.ipynb"
    nb = nbformat.v4.new_notebook()
    nb.metadata["kernelspec"] = {
        "name": "python3",
        "display_name": "Python 3",
        "language": "python",
    }
    nb.cells = [
        nbformat.v4.new_markdown_cell("Workbenches at scale."),
        nbformat.v4.new_code_cell(LARGE_CELL),
        nbformat.v4.new_code_cell(LADDER_CELL),
        nbformat.v4.new_code_cell(TYPO_CELL),
    ]
    nbformat.write(nb, root / name)
    address = f"{url}lab/workspaces/t{uuid.uuid4().hex[:10]}/tree/{name}?reset&token={token}"
    with sync_api.sync_playwright() as pw:
        browser = pw.chromium.launch(executable_path=str(CHROMIUM), args=CHROMIUM_ARGS)
        page = browser.new_page(viewport={"width": 1400, "height": 1000})
        try:
            notebook, cells = _open_and_run(page, address, url, token, name, 4)
            _wait_all_ran(page, 3)
            big = cells.nth(1).locator(".jp-OutputArea-output").first
            ladder = cells.nth(2).locator(".jp-OutputArea-output").first
            typo = cells.nth(3).locator(".jp-OutputArea-output").first
            big.locator(".freeladder-ladder-figure text", has_text="x 2^").first.wait_for(
                timeout=180_000
            )
            # the exact column is the same sector as the free levels, and the title names it
            ladder.locator(
                ".freeladder-ladder-title", has_text="exact diag. of the sector"
            ).wait_for(timeout=120_000)
            page.wait_for_timeout(2000)  # the figures settle their layout

            # 1, 2: multiplicities as powers; labels and ticks never overlap
            labels = big.locator(".freeladder-ladder-figure").first
            texts = labels.locator("text").all_text_contents()
            multiplicities = [t for t in texts if t.startswith("x")]
            assert multiplicities and all(len(t) < 12 for t in multiplicities), texts
            count, hits = _overlaps(labels, "text")
            assert count >= 12 and hits == [], hits
            assert "E - E0" in labels.text_content()
            for fig in big.locator(".bqplot").all():
                for axis in fig.locator("g.axis").all():
                    n, hits = _overlaps(axis, ".tick text")
                    assert hits == [], (fig.text_content()[:80], hits)
            # 12: the roots span decades: a log axis that says so
            roots = big.locator(".freeladder-roots-figure").first
            assert "log scale" in roots.text_content()
            # 1: nothing cut off at the right (the roots summary, the ladder title)
            assert _clipped(big.locator(".freeladder-roots-notes").first) == []
            assert _clipped(big.locator(".freeladder-ladder-title").first) == []
            _shot_whole(page, big, artifacts_dir / "workbench-large.png")

            # 3, 5: the sector chooser names the cycle strings; the ladder title says what the
            # exact column holds; 4: the order-1 formula stays inside its column
            option = ladder.locator("select option", has_text="cycle strings").first
            # (the chooser pads with no-break spaces)
            assert "Y0 Y1 Y3 Y4 = " in option.text_content().replace("\xa0", " ")
            assert _clipped(ladder.locator(".freeladder-ladder-title").first) == []
            ladder.locator(".freeladder-products mjx-container, .freeladder-products .MathJax")
            products = ladder.locator(".freeladder-products").first
            box = products.bounding_box()
            column = products.locator("xpath=..").bounding_box()
            assert box is not None and column is not None
            right = products.evaluate(
                "(n) => Math.max(...[...n.querySelectorAll('*')]"
                ".map(e => e.getBoundingClientRect().right))"
            )
            assert right <= column["x"] + column["width"] + 1, (right, column)
            count, hits = _overlaps(ladder.locator(".freeladder-ladder-figure").first, "text")
            assert hits == [], hits
            assert _titles_outside(ladder) == []
            assert _titles_outside(big) == []
            _shot_whole(page, ladder, artifacts_dir / "workbench-ladder.png")

            # 10: nothing parsed: the box says so, and export does not show a TypeError
            message = typo.text_content()
            assert "No model has parsed yet" in message, message[:500]
            assert "last model that parsed" not in message
            typo.get_by_role("button", name="copy text").click()
            typo.locator(".freeladder-export", has_text="nothing to export yet").wait_for(
                timeout=30_000
            )
            assert "TypeError" not in typo.text_content()
            _shot_whole(page, typo, artifacts_dir / "workbench-typo.png")
        except Exception:
            page.screenshot(path=str(artifacts_dir / "workbench-scale-failure.png"))
            raise
        finally:
            browser.close()


def _shot_whole(page: sync_api.Page, output: sync_api.Locator, path: Path) -> None:
    """A screenshot of one whole output (the viewport grown to hold it)."""
    height = int((output.bounding_box() or {"height": 2500})["height"])
    page.set_viewport_size({"width": 1400, "height": height + 400})
    output.scroll_into_view_if_needed()
    page.wait_for_timeout(1500)
    output.screenshot(path=str(path))
    page.set_viewport_size({"width": 1400, "height": 1000})


def test_save_as_notebook_follows_a_rename(
    server: tuple[str, str, Path], artifacts_dir: Path
) -> None:
    # Issue 24, item 6: "save as notebook" names the file after the notebook as it is named
    # now, not as it was named when the kernel started.
    url, token, root = server
    name = "before-rename.ipynb"
    _write_notebook(root / name)
    address = f"{url}lab/workspaces/t{uuid.uuid4().hex[:10]}/tree/{name}?reset&token={token}"
    with sync_api.sync_playwright() as pw:
        browser = pw.chromium.launch(executable_path=str(CHROMIUM), args=CHROMIUM_ARGS)
        page = browser.new_page(viewport={"width": 1400, "height": 1000})
        try:
            page.goto(address)
            notebook = page.locator(".jp-Notebook:visible").first
            notebook.locator(".jp-Cell").first.wait_for(timeout=90_000)
            _wait_cell_count(page, 3)
            _wait_kernel_idle(url, token, name)
            _run_all(page)
            _wait_all_ran(page, 2)
            notebook.get_by_role("button", name="save as notebook").wait_for(timeout=60_000)
            page.locator(".lm-MenuBar-itemLabel", has_text="File").first.click()
            page.locator(".lm-Menu-itemLabel", has_text="Rename Notebook").first.click()
            field = page.locator(".jp-Dialog input").first
            field.fill("after-rename.ipynb")
            page.locator(".jp-Dialog button", has_text="Rename").first.click()
            page.locator(".lm-TabBar-tab", has_text="after-rename.ipynb").first.wait_for(
                timeout=30_000
            )
            notebook.get_by_role("button", name="save as notebook").click()
            panel = notebook.locator(".freeladder-export")
            panel.filter(has_text="saved as").wait_for(timeout=60_000)
            status = panel.text_content()
            _shot(page, notebook.locator(".jp-Cell").nth(1), artifacts_dir / "export-renamed.png")
        except Exception:
            page.screenshot(path=str(artifacts_dir / "export-rename-failure.png"))
            raise
        finally:
            browser.close()
    assert "after-rename-worked.ipynb" in status, status
    saved = root / "after-rename-worked.ipynb"
    assert saved.exists()
    assert nbformat.read(saved, as_version=4).cells[0].source.startswith("# Worked")
    assert not (root / "before-rename-worked.ipynb").exists()
