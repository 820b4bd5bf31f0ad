"""Benchmark: building a sparse Hamiltonian with Model.to_sparse versus term-by-term kron sums.

The model: 20 qubits, 60 seeded random Pauli terms, each acting on 2 or 3 neighbouring sites
(an invented test model).  The baseline is the textbook construction (common practice): for
each term, the Kronecker product of 2x2 one-site matrices and identities as scipy.sparse
matrices, summed term by term.  Both are timed in this run, the matrices are checked equal, and
the ratios of wall-clock and of CPU time are printed (CPU time is the steadier one on a
shared machine).  Target: Model.to_sparse at least 10x faster.

Run:  bash tools/bench.sh tests/benchmarks/bench_sparse_build.py
"""

from __future__ import annotations

import time
from collections.abc import Callable
from typing import Any

import numpy as np
import scipy.sparse as sps

from freeladder import Model, pauli

N_SITES = 20
N_TERMS = 60
SEED = 2026

_ONE_SITE = {
    "I": sps.identity(2, format="csr", dtype=complex),
    "X": sps.csr_array(np.array([[0, 1], [1, 0]], dtype=complex)),
    "Y": sps.csr_array(np.array([[0, -1j], [1j, 0]], dtype=complex)),
    "Z": sps.csr_array(np.array([[1, 0], [0, -1]], dtype=complex)),
}


def random_terms(rng: np.random.Generator) -> list[tuple[float, str, int]]:
    """(coupling, letters, first site) for 2- and 3-site local Pauli terms."""
    terms = []
    for _ in range(N_TERMS):
        width = int(rng.integers(2, 4))
        start = int(rng.integers(0, N_SITES - width + 1))
        letters = "".join(rng.choice(list("XYZ"), size=width))
        terms.append((float(rng.uniform(-1, 1)), letters, start))
    return terms


def kron_baseline(terms: list[tuple[float, str, int]]) -> sps.csr_array:
    """Sum of Kronecker products, one term at a time (site 0 most significant)."""
    dim = 2**N_SITES
    total = sps.csr_array((dim, dim), dtype=complex)
    for c, letters, start in terms:
        word = ["I"] * N_SITES
        for offset, ch in enumerate(letters):
            word[start + offset] = ch
        op: sps.csr_array = sps.csr_array(_ONE_SITE[word[0]])
        for ch in word[1:]:
            op = sps.kron(op, _ONE_SITE[ch], format="csr")
        total = total + c * op
    return sps.csr_array(total)


def _timed(build: Callable[[], Any]) -> tuple[Any, float, float]:
    t0, c0 = time.perf_counter(), time.process_time()
    out = build()
    return out, time.perf_counter() - t0, time.process_time() - c0


def main() -> None:
    rng = np.random.default_rng(SEED)
    terms = random_terms(rng)
    model = Model.from_terms(
        [(c, pauli(letters, range(start, start + len(letters)))) for c, letters, start in terms],
        sites=range(N_SITES),
    )
    print(f"model: {N_SITES} sites, {len(model)} distinct terms, dimension {2**N_SITES}")
    # Each builder runs twice: the first ("cold") run also pays the first touch of fresh memory,
    # which on virtual machines can cost as much as the computation; the second run is "warm".
    for run in ("cold", "warm"):
        ours, t_ours, c_ours = _timed(model.to_sparse)
        ref, t_ref, c_ref = _timed(lambda: kron_baseline(terms))
        diff = abs(sps.csr_array(ours) - ref)
        max_diff = float(diff.max()) if diff.nnz else 0.0
        print(
            f"[{run}] non-zeros: ours {ours.nnz}, kron sum {ref.nnz}; max |diff| = {max_diff:.3g}"
        )
        print(f"[{run}] Model.to_sparse  : {t_ours:8.3f} s wall, {c_ours:8.3f} s CPU")
        print(f"[{run}] kron term by term: {t_ref:8.3f} s wall, {c_ref:8.3f} s CPU")
        print(
            f"[{run}] ratio (kron / ours): {t_ref / t_ours:.1f}x wall, {c_ref / c_ours:.1f}x CPU "
            "(target >= 10x)"
        )
        if max_diff > 1e-12:
            raise SystemExit("the two matrices differ")
        del ours, ref, diff


if __name__ == "__main__":
    main()
