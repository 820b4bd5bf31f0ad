"""The examples in the docstrings of kernel_lib/freeladder run with the tests (doctest).

One test per module, so a stale example names its module; ``python -m pytest`` runs them all.
"""

from __future__ import annotations

import doctest
import importlib
import pkgutil

import pytest

import freeladder

# __main__ runs the command line when imported; its code lives in cli (tested there)
MODULES = sorted(
    info.name.removeprefix("freeladder.")
    for info in pkgutil.walk_packages(freeladder.__path__, prefix="freeladder.")
    if not info.ispkg and info.name != "freeladder.__main__"
)
FLAGS = doctest.ELLIPSIS | doctest.NORMALIZE_WHITESPACE


@pytest.mark.parametrize("name", MODULES)
def test_docstring_examples(name: str) -> None:
    module = importlib.import_module(f"freeladder.{name}")
    result = doctest.testmod(module, optionflags=FLAGS, report=True)
    assert result.failed == 0, f"{result.failed} of {result.attempted} examples failed in {name}"


def test_the_package_has_examples() -> None:
    # Guards against a collection that silently finds nothing (e.g. docstrings stripped by -OO).
    total = 0
    for name in MODULES:
        module = importlib.import_module(f"freeladder.{name}")
        finder = doctest.DocTestFinder()
        total += sum(len(t.examples) for t in finder.find(module))
    assert total >= 40
