"""Helpers shared by several test files: dense reference matrices, random Pauli models, and
running a notebook in a kernel of this interpreter.

``dense_string`` is built here from the definitions alone (common practice: X|s> = |s+1 mod N>,
Z|s> = omega^s |s>, Kronecker products with site 0 most significant), independently of the
library's own sparse construction, so that tests can compare against it.
"""

from __future__ import annotations

from collections.abc import Callable, Sequence
from pathlib import Path

import nbformat
import numpy as np
from jupyter_client.kernelspec import KernelSpecManager
from jupyter_client.manager import KernelManager
from nbclient import NotebookClient

import freeladder as fl
from freeladder.algebra.model import Coupling


def dense_string(g: fl.WeylString, sites: Sequence[int]) -> np.ndarray:
    """Dense matrix of a string: X|s> = |s+1>, Z|s> = omega^s |s>, site 0 most significant."""
    n = g.states
    shift = np.roll(np.eye(n), 1, axis=0)
    clock = np.diag(np.exp(2j * np.pi * np.arange(n) / n))
    ex = g.exponents()
    mat = np.array([[1.0 + 0j]])
    for s in sites:
        a, b = ex.get(s, (0, 0))
        mat = np.kron(mat, np.linalg.matrix_power(shift, a) @ np.linalg.matrix_power(clock, b))
    return np.exp(1j * np.pi * g.phase / n) * mat


def random_pauli_model(
    rng: np.random.Generator,
    n_terms: int,
    n_sites: int,
    coupling: Callable[[np.random.Generator], Coupling],
) -> fl.Model:
    """A qubit model of ``n_terms`` distinct, non-identity random Pauli strings on ``n_sites``.

    Each string's coupling is ``coupling(rng)``, drawn right after the string is accepted.
    Such models have arbitrary frustration graphs.
    """
    terms, seen = [], set()
    while len(terms) < n_terms:
        letters = "".join(rng.choice(list("IXYZ"), n_sites))
        if set(letters) == {"I"} or letters in seen:
            continue
        seen.add(letters)
        terms.append((coupling(rng), fl.pauli(letters)))
    return fl.Model.from_terms(terms, states=2, sites=range(n_sites))


def run_notebook(
    nb: nbformat.NotebookNode, kernel_dirs: Path, cwd: Path, allow_errors: bool = False
) -> nbformat.NotebookNode:
    """Execute ``nb`` in place with nbclient, in the ``python3`` kernel found in ``kernel_dirs``
    (the conftest fixture's kernelspec that starts this interpreter), working in ``cwd``."""
    ksm = KernelSpecManager(kernel_dirs=[str(kernel_dirs)], ensure_native_kernel=False)
    km = KernelManager(kernel_name="python3", kernel_spec_manager=ksm)
    client = NotebookClient(
        nb,
        km=km,
        timeout=120,
        allow_errors=allow_errors,
        resources={"metadata": {"path": str(cwd)}},
    )
    client.execute()
    return nb
