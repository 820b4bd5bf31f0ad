"""Benchmark: exact commutation check of the charges in the string algebra vs sparse matrices.

Reach-2 exclusion chain with integer couplings (N = 2).  For each size the script times

* exact: ``[H, Q^(s)]`` for every s and ``[Q^(r), Q^(s)]`` for every pair, in the string
  algebra (freeladder.verify.commutation_checks, no pair budget below the stated one);
* sparse: the same commutators with scipy.sparse matrices of dimension 2^(M+2),

and prints the ratio at the largest size both can do, then the exact check alone on 30 terms.
Run:  /work/venv/bin/python tests/benchmarks/bench_commutation.py
"""

from __future__ import annotations

import time

import freeladder as fl
from freeladder import OpSum
from freeladder.verify import commutation_checks


def charges(m: fl.Model) -> list[OpSum]:
    """Q^(1..alpha): from fl.charge when the library has it, else by enumeration here."""
    try:
        from freeladder.charges import charge
    except ImportError:
        charge = None
    if charge is not None:
        alpha = fl.exclusion_polynomial(m).degree
        return [charge(m, s) for s in range(1, alpha + 1)]
    cm = m.strings.commutation_matrix()
    n = len(m)
    adj = [set(cm.indices[cm.indptr[j] : cm.indptr[j + 1]].tolist()) for j in range(n)]
    coeffs = list(m.couplings)
    sets, strings, values, out = [(j,) for j in range(n)], m.strings, coeffs, []
    while sets:
        out.append(OpSum(strings, values))
        left, right, new_sets, new_values = [], [], [], []
        for i, subset in enumerate(sets):
            for j in range(subset[-1] + 1, n):
                if not adj[j].intersection(subset):
                    left.append(i)
                    right.append(j)
                    new_sets.append((*subset, j))
                    new_values.append(values[i] * coeffs[j])
        if not new_sets:
            break
        strings = strings.products(left, right, m.strings)
        sets, values = new_sets, new_values
    return out


def exact_check(m: fl.Model, qs: list[OpSum], max_pairs: int) -> tuple[float, bool, str]:
    t0 = time.perf_counter()
    first, second = commutation_checks(OpSum.from_model(m), qs, max_pairs=max_pairs)
    ok = bool(first.passed) and second.passed is not False
    return time.perf_counter() - t0, ok, second.detail


def sparse_check(m: fl.Model, qs: list[OpSum]) -> tuple[float, bool]:
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


def main() -> None:
    print("reach-2 chain, N = 2, integer couplings; all orders of [H, Q] and [Q, Q]")
    print(f"{'M':>3} {'sites':>5} {'strings':>8} {'exact s':>9} {'sparse s':>9} {'ratio':>7}")
    last = None
    for size in (6, 8, 10, 12, 14):
        m = fl.exclusion_chain(size, reach=2, couplings=[1 + j % 3 for j in range(size)])
        qs = charges(m)
        te, ok_e, _ = exact_check(m, qs, max_pairs=10**12)
        ts, ok_s = sparse_check(m, qs)
        assert ok_e and ok_s
        n_str = sum(len(q) for q in qs)
        print(f"{size:>3} {size + 2:>5} {n_str:>8} {te:>9.3f} {ts:>9.3f} {ts / te:>7.1f}")
        last = (size, te, ts)
    assert last is not None
    print(
        f"largest size done both ways: M = {last[0]}; sparse / exact time = {last[2] / last[1]:.1f}"
    )
    m = fl.exclusion_chain(30, reach=2, couplings=[1 + j % 3 for j in range(30)])
    t0 = time.perf_counter()
    qs = charges(m)
    tb = time.perf_counter() - t0
    for budget in (2_000_000, 20_000_000):
        te, ok, detail = exact_check(m, qs, max_pairs=budget)
        print(
            f"M = 30 (32 sites, {sum(len(q) for q in qs)} strings; charges built in {tb:.1f} s): "
            f"exact check {te:.1f} s with pair budget {budget:.0e}, passed={ok}; {detail}"
        )
    print("sparse matrices at M = 30 would need dimension 2^32: not attempted")


if __name__ == "__main__":
    main()
