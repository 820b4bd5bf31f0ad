"""Benchmark: exact check that the charges commute, against sparse matrices.

Reach-2 exclusion chain with integer couplings (N = 2).  For each size the script times, for
every order s and every pair of orders (r, s):

* exact: ``[H, Q^(s)]`` in the string algebra (freeladder.checks.verification.hamiltonian_check) and
  ``[Q^(r), Q^(s)]`` for all pairs at once by the sweep (freeladder.commutator_sweep);
* pairwise: ``[Q^(r), Q^(s)]`` pair of orders by pair of orders in the string algebra;
* sparse: the same commutators with scipy.sparse matrices of dimension 2^(M+2);

and prints the ratios at each size both can do, then the exact check alone where neither
baseline can go (at 30 terms the pairs of independent sets number 6 x 10^9).
Run:  bash tools/bench.sh tests/benchmarks/bench_commutation.py
"""

from __future__ import annotations

import time

import freeladder as fl
from freeladder import StringSum
from freeladder.checks.verification import hamiltonian_check
from freeladder.checks.verification import pairwise_check as pairs_by_string_algebra


def charges(m: fl.Model) -> list[StringSum]:
    alpha = fl.exclusion_polynomial(m).degree
    return [fl.charge(m, s) for s in range(1, alpha + 1)]


def exact_check(m: fl.Model, qs: list[StringSum]) -> tuple[float, bool]:
    t0 = time.perf_counter()
    first = hamiltonian_check(StringSum.from_model(m), qs)
    second = fl.commutator_sweep(m)
    return time.perf_counter() - t0, bool(first.passed) and second.vanishes is True


def pairwise_check(m: fl.Model, qs: list[StringSum]) -> tuple[float, bool]:
    t0 = time.perf_counter()
    first = hamiltonian_check(StringSum.from_model(m), qs)
    second = pairs_by_string_algebra(qs, max_pairs=10**12)
    return time.perf_counter() - t0, bool(first.passed) and second.passed is not False


def sparse_check(m: fl.Model, qs: list[StringSum]) -> tuple[float, bool]:
    t0 = time.perf_counter()
    h = m.to_sparse()
    mats = [q.to_sparse() for q in qs]
    worst = 0.0
    for a in range(len(mats)):
        for b in range(a, len(mats)):
            left = h if a == b else mats[a]
            comm = left @ mats[b] - mats[b] @ left
            if comm.nnz:
                worst = max(worst, float(abs(comm).max()))
    return time.perf_counter() - t0, worst < 1e-9


def chain(size: int) -> fl.Model:
    return fl.exclusion_chain(size, reach=2, couplings=[1 + j % 3 for j in range(size)])


def main() -> None:
    print(
        "reach-2 chain, N = 2, integer couplings; [H, Q(s)] for all s, [Q(r), Q(s)] for all pairs"
    )
    print(
        f"{'M':>3} {'sites':>5} {'strings':>8} {'exact s':>8} {'pairwise s':>10} {'sparse s':>9}"
        f" {'sparse/exact':>12} {'pairwise/exact':>14}"
    )
    for size in (6, 8, 10, 12, 14):
        m = chain(size)
        qs = charges(m)
        te, ok_e = exact_check(m, qs)
        tp, ok_p = pairwise_check(m, qs)
        ts, ok_s = sparse_check(m, qs)
        assert ok_e and ok_p and ok_s
        n_str = sum(len(q) for q in qs)
        print(
            f"{size:>3} {size + 2:>5} {n_str:>8} {te:>8.3f} {tp:>10.3f} {ts:>9.3f}"
            f" {ts / te:>12.1f} {tp / te:>14.1f}"
        )
    print("largest size all three ran: M = 14 (sparse matrices of dimension 2^16)")
    for size in (20, 24):
        m = chain(size)
        qs = charges(m)
        te, ok_e = exact_check(m, qs)
        tp, ok_p = pairwise_check(m, qs)
        assert ok_e and ok_p
        print(
            f"M = {size} ({size + 2} sites, {sum(len(q) for q in qs)} strings): exact {te:.2f} s, "
            f"pairwise {tp:.2f} s, pairwise/exact = {tp / te:.1f} (sparse: dimension 2^{size + 2})"
        )
    for size in (30, 45, 60, 90):
        m = chain(size)
        t0 = time.perf_counter()
        qs = charges(m) if size <= 30 else None
        tb = time.perf_counter() - t0
        t0 = time.perf_counter()
        first = hamiltonian_check(StringSum.from_model(m), qs) if qs is not None else None
        th = time.perf_counter() - t0
        t0 = time.perf_counter()
        res = fl.commutator_sweep(m, max_work=10**6)
        tw = time.perf_counter() - t0
        hq = (
            f"[H, Q(s)] {th:.1f} s (charges built in {tb:.1f} s, passed={first.passed})"
            if first is not None
            else "[H, Q(s)] not listed (charges too many to build here)"
        )
        print(
            f"M = {size} ({size + 2} sites): sweep over all pairs {tw:.2f} s, "
            f"vanishes={res.vanishes}, {res.points} points, {res.coordinates} coordinates; {hq}"
        )
    print("pairwise and sparse baselines at M = 30: 6 x 10^9 set pairs / dimension 2^32, not run")


if __name__ == "__main__":
    main()
