"""Benchmark: independent-set counts per order (``fl.charge_counts``) on long chains.

Baselines measured in the same run:

* fixed-reach chains: the binomials ``C(M - p(s-1), s)`` computed one by one with
  ``math.comb`` (the former method), beside the recurrence that derives each from the previous;
* variable-reach chains (an oriented indifference ordering, terms shuffled): the transfer-matrix
  product tree, beside the same prefix recurrence ``I_{k+1} = I_k + x I_{f(k)}`` run one step at
  a time with FLINT polynomials (quadratically many coefficient operations).

The last column shows how the time grows when the size doubles (4 = quadratic: the counts
themselves have O(M^2) digits in all).  Run with
``bash tools/bench.sh tests/benchmarks/bench_charges.py``.
"""

from __future__ import annotations

import math
import time

import flint
import numpy as np

import freeladder as fl
from freeladder.graphs.indifference import indifference_order
from freeladder.spectra.charges import charge_counts


def variable_chain(size: int, rng: np.random.Generator) -> fl.Model:
    ends = np.maximum.accumulate(np.arange(size) + rng.integers(1, 4, size))
    chain = fl.exclusion_chain(size, reach=list(ends - np.arange(size)), states=3)
    order = rng.permutation(size)
    return fl.Model(chain.strings.take(order), [chain.couplings[int(j)] for j in order])


def comb_one_by_one(size: int, reach: int) -> list[int]:
    return [
        math.comb(size - reach * (s - 1), s) if s else 1
        for s in range((size + reach) // (reach + 1) + 1)
    ]


def step_by_step(first: tuple[int, ...]) -> list[int]:
    x = flint.fmpz_poly([0, 1])
    prefix = [flint.fmpz_poly(1)]
    for k, f in enumerate(first):
        prefix.append(prefix[k] + x * prefix[f])
    return [int(c) for c in prefix[-1].coeffs()]


def main() -> None:
    rng = np.random.default_rng(3)
    print(
        f"{'chain':<22} {'terms':>6} {'counts s':>9} {'baseline s':>11} {'ratio':>7} {'growth':>7}"
    )
    last = None
    for size in (10_000, 20_000, 40_000):
        m = fl.exclusion_chain(size, reach=2)
        start = time.perf_counter()
        counts = charge_counts(m)
        t = time.perf_counter() - start
        if size <= 20_000:
            start = time.perf_counter()
            assert list(counts) == comb_one_by_one(size, 2)
            base = f"{time.perf_counter() - start:>11.3f}"
            ratio = f"{t / float(base):>7.3f}"
        else:
            base, ratio = f"{'(skipped)':>11}", f"{'':>7}"
        growth = "" if last is None else f"{t / last:>7.1f}"
        print(f"{'reach 2':<22} {size:>6} {t:>9.3f} {base} {ratio} {growth}")
        last = t
    last = None
    for size in (5_000, 10_000, 20_000):
        m = variable_chain(size, rng)
        first = indifference_order(m).first_neighbour
        start = time.perf_counter()
        counts = charge_counts(m)
        t = time.perf_counter() - start
        if size <= 5_000:
            start = time.perf_counter()
            assert list(counts) == step_by_step(first)
            base_t = time.perf_counter() - start
            base, ratio = f"{base_t:>11.3f}", f"{t / base_t:>7.3f}"
        else:
            base, ratio = f"{'(skipped)':>11}", f"{'':>7}"
        growth = "" if last is None else f"{t / last:>7.1f}"
        print(f"{'variable reach 1-3':<22} {size:>6} {t:>9.3f} {base} {ratio} {growth}")
        last = t


if __name__ == "__main__":
    main()
