"""Store the example notebooks as JupyterLab writes them back, so that opening one marks nothing.

As soon as JupyterLab starts a kernel for a notebook it replaces ``metadata.kernelspec`` with
the kernel's name, display name and language, and ``metadata.language_info`` with the
``language_info`` of the kernel's ``kernel_info_reply``.  When the stored values differ, the tab
shows unsaved changes before anything ran.  This script asks a real ipykernel (started from this
interpreter) for both, clears every output, and writes each notebook through nbformat's writer,
the one Jupyter's server uses when it saves.

``language_info.version`` is the kernel's Python version: a reader on another Python still sees
the mark, since JupyterLab then writes that version in.

Usage (from the repository root, in the set-up environment)::

    .venv/bin/python tools/notebook_metadata.py           # rewrite example_notebooks/*.ipynb
    .venv/bin/python tools/notebook_metadata.py --check   # exit 1 and name the files that differ
"""

from __future__ import annotations

import sys
from pathlib import Path
from typing import Any

import nbformat
from ipykernel.kernelspec import get_kernel_dict
from jupyter_client.manager import start_new_kernel

NOTEBOOKS = Path(__file__).resolve().parent.parent / "example_notebooks"


def kernel_metadata() -> dict[str, Any]:
    """``kernelspec`` and ``language_info`` as JupyterLab writes them for ipykernel's python3."""
    spec = get_kernel_dict()
    km, kc = start_new_kernel(kernel_name="python3")
    try:
        reply = kc.kernel_info(reply=True, timeout=60)
    finally:
        kc.stop_channels()
        km.shutdown_kernel(now=True)
    return {
        "kernelspec": {
            "display_name": spec["display_name"],
            "language": spec["language"],
            "name": "python3",
        },
        "language_info": reply["content"]["language_info"],
    }


def normalised(text: str, metadata: dict[str, Any]) -> str:
    """The notebook ``text`` with ``metadata`` set and outputs cleared, as nbformat writes it."""
    nb = nbformat.reads(text, as_version=4)
    nb.metadata.update(metadata)
    for cell in nb.cells:
        if cell.cell_type == "code":
            cell.outputs = []
            cell.execution_count = None
    nbformat.validate(nb)
    return nbformat.writes(nb) + "\n"


def main(argv: list[str]) -> int:
    check = "--check" in argv
    metadata = kernel_metadata()
    differ = []
    for path in sorted(NOTEBOOKS.glob("*.ipynb")):
        text = path.read_text(encoding="utf-8")
        new = normalised(text, metadata)
        if new != text:
            differ.append(path.name)
            if not check:
                path.write_text(new, encoding="utf-8")
    verb = "differ" if check else "rewritten"
    print(f"{len(differ)} notebook(s) {verb}: {', '.join(differ) or 'none'}")
    return 1 if check and differ else 0


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:]))
