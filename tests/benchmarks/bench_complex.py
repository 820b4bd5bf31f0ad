"""Benchmark: complex chain roots (Aberth-Ehrlich on the ratio recurrence) against baselines.

Z3 exclusion chains with random complex couplings (``fl.complex_couplings``), 10^3 and 10^4
terms, reach 1, reach 2 and a variable range (random back-reaches 1..3 with non-decreasing
first neighbours, as an oriented indifference order of a connected chain gives).  For each:
time, sweeps (all levels of the divide and conquer), chain steps per (terms x roots) (the cost
in units of one sweep over all roots), the largest residuals on the recurrence at the roots
(``|P(y)| / P~(|y|)`` and the relative Newton step ``|Q / (x Q')|``), and the
``lowest=5`` path (time, agreement with the all-roots result).

Baselines measured in the same run:
* numpy's dense eigenvalues (10^3 terms) of a matrix whose characteristic polynomial is the
  chain polynomial: for reach 1 the complex symmetric tridiagonal matrix with off-diagonals
  ``sqrt(w_k)`` (eigenvalues ``+-sqrt(x)``), for reach 2 the Hessenberg matrix with ones on
  the superdiagonal and ``w_k`` at ``(k, k - 2)`` (its leading minors obey
  ``D_k = lam D_{k-1} - w_k D_{k-3}``, so eigenvalues ``lam^3 = x``).  No such matrix is used
  for the variable range (the powers of lam would differ from term to term).
* the previous implementation (a copy below: numpy loop over the terms, dense pairwise sums,
  starts from the |w| chain's moduli), its sweeps only, for reach 1 and 2 at 10^3 terms.
  At 10^4 terms it took 174-277 s (issue 15, not re-measured here unless ``--old-large``).
* the certified roots (python-flint) for a 500-term chain, and mpmath.polyroots at 50 digits
  for a 100-term chain, as in the earlier version of this benchmark.

Run: ``bash tools/bench.sh tests/benchmarks/bench_complex.py`` (add ``--old-large`` to time
the previous implementation at 10^4 terms too: minutes).
"""

from __future__ import annotations

import sys
import time

import mpmath
import numpy as np

import freeladder as fl
from freeladder.roots.complex import aberth_chain_roots, certified_complex_roots
from freeladder.roots.polynomial import exclusion_polynomial
from freeladder.roots.real import chain_real_roots

_U = np.finfo(float).eps / 2


# -- the previous implementation (reference copy, sweeps only) ------------------------------------
def _old_evaluate(x: np.ndarray, w: np.ndarray, p: int, order: int) -> tuple:
    width = p + 1
    n = x.shape[0]
    local = (8.0 + order) * _U
    phases = local * np.exp(2j * np.pi * np.random.default_rng(12345).random(w.shape[0]))
    window = np.zeros((3, width, n), dtype=complex)
    window[0] = 1.0
    q, dq, err = window[0], window[1], window[2]
    tiny = np.finfo(float).tiny
    for k in range(1, w.shape[0] + 1):
        prev, cur, wk = (k - 1) % width, k % width, w[k - 1]
        tail = wk * q[cur]
        if (k - 1) % width == 0:
            head = x * q[prev]
            new_dq = q[prev] + x * dq[prev] - wk * dq[cur]
            new_err = x * err[prev] - wk * err[cur]
        else:
            head = q[prev]
            new_dq = dq[prev] - wk * dq[cur]
            new_err = err[prev] - wk * err[cur]
        size = np.abs(head) + np.abs(tail)
        q[cur] = head - tail
        dq[cur] = new_dq
        err[cur] = new_err + phases[k - 1] * size
        size += np.abs(new_dq)
        np.maximum(size, tiny, out=size)
        window *= 1.0 / size
    last = w.shape[0] % width
    return q[last], dq[last], 4.0 * np.abs(err[last])


def _old_roots(weights: np.ndarray, p: int, order: int = 3, max_iter: int = 500) -> tuple:
    w = np.asarray(weights, dtype=complex)
    top = float(np.abs(w).max())
    w = w / top
    n = (w.shape[0] + p) // (p + 1)
    phases = np.exp(1j * np.angle(w))
    mean = phases.mean()
    sigma = float(np.clip(np.sqrt(-2.0 * np.log(max(abs(mean), 1e-300))), 1e-3, np.pi))
    rad = np.sort(1.0 / np.asarray(chain_real_roots(np.abs(w), p).values))
    u = 2.0 * ((np.arange(n) * 0.6180339887498949 + 0.5 / n) % 1.0) - 1.0
    z = rad * np.exp(1j * (np.angle(mean) + sigma * u))
    active = np.ones(n, dtype=bool)
    sweeps = 0
    while sweeps < max_iter and np.any(active):
        sweeps += 1
        idx = np.nonzero(active)[0]
        q, dq, err = _old_evaluate(z[idx], w, p, order)
        newton = q / dq
        step = max(1, 2_000_000 // n)
        inv_sum = np.empty(idx.size, dtype=complex)
        for lo in range(0, idx.size, step):
            rows = idx[lo : lo + step]
            diff = z[rows, None] - z[None, :]
            diff[np.arange(rows.size), rows] = 1.0
            inv = 1.0 / diff
            inv[np.arange(rows.size), rows] = 0.0
            inv_sum[lo : lo + step] = inv.sum(axis=1)
        corr = newton / (1.0 - newton * inv_sum)
        corr[~np.isfinite(corr)] = 0.0
        done = (np.abs(q) <= err) | (np.abs(corr) <= 4.0 * _U * np.abs(z[idx]))
        z[idx[~done]] -= corr[~done]
        active[idx[done]] = False
    return top * z, sweeps


# -- helpers ---------------------------------------------------------------------------------------
def _variable_back(size: int, seed: int) -> np.ndarray:
    rng = np.random.default_rng(seed)
    first = np.maximum.accumulate(np.maximum(0, np.arange(size) - rng.integers(1, 4, size)))
    return np.arange(size) - first


def _nearest(a: np.ndarray, b: np.ndarray) -> np.ndarray:
    out = np.empty(a.size)
    for lo in range(0, a.size, 500):
        out[lo : lo + 500] = np.abs(a[lo : lo + 500, None] - b[None, :]).min(axis=1)
    return out


def _dense_x(w: np.ndarray, p: int, n: int) -> np.ndarray:
    """x from numpy's dense eigenvalues (see the module notes); the n of largest modulus."""
    m = w.size
    if p == 1:
        off = np.sqrt(w)
        lam = np.linalg.eigvals(np.diag(off, 1) + np.diag(off, -1))
    else:
        mat = np.diag(np.ones(m - 1, dtype=complex), 1)
        for k in range(p, m):
            mat[k, k - p] = w[k]
        lam = np.linalg.eigvals(mat)
    x = lam ** (p + 1)
    x = x[np.argsort(-np.abs(x))][: (p + 1) * n]
    return x


def run_scale(sizes: tuple[int, ...] = (1000, 10_000), old_large: bool = False) -> None:
    print("Z3 chains, random complex couplings (moduli 0.5..1.5, uniform phases)")
    for m in sizes:
        c = fl.complex_couplings(m, seed=1)
        w = np.asarray(c, dtype=complex) ** 3
        for label, reach in (("reach 1", 1), ("reach 2", 2), ("variable", _variable_back(m, 2))):
            t0 = time.perf_counter()
            found = aberth_chain_roots(w, reach, order=3)
            t_all = time.perf_counter() - t0
            n = found.count
            steps = found.details["chain_steps"] / (found.count * m)
            print(
                f"  M={m:>6} {label:>8}: {n} roots in {t_all:7.2f} s, {found.sweeps} sweeps "
                f"over {len(found.details['sweeps_per_level'])} levels, cost {steps:.2f} full "
                f"sweeps, max residual: |P|/P~ {found.details['max_residual']:.1e}, relative "
                f"Newton step {found.details['max_newton_step']:.1e}; converged+isolated "
                f"{found.converged}"
            )
            t0 = time.perf_counter()
            few = aberth_chain_roots(w, reach, order=3, lowest=5)
            t_few = time.perf_counter() - t0
            diff = np.max(np.abs(few.values - found.values[:5]) / np.abs(found.values[:5]))
            verified = "failed its check" not in few.message
            print(
                f"      lowest=5: {t_few:.3f} s, verified by the count: {verified}, max relative "
                f"difference from all-roots {diff:.1e}"
            )
            if isinstance(reach, int) and (m <= 1000 or old_large):
                t0 = time.perf_counter()
                z_old, sweeps_old = _old_roots(w, reach)
                t_old = time.perf_counter() - t0
                rel = np.max(_nearest(found.values, z_old) / np.abs(found.values))
                print(
                    f"      previous implementation: {t_old:.2f} s, {sweeps_old} sweeps "
                    f"(ratio {t_old / t_all:.1f}x); max relative difference {rel:.1e}"
                )
            if isinstance(reach, int) and m <= 1000:
                t0 = time.perf_counter()
                x = _dense_x(w, reach, n)
                t_np = time.perf_counter() - t0
                rel = _nearest(found.values, x) / np.abs(found.values)
                off = rel > 1e-8
                where = ""
                if np.any(off):
                    edge = float(np.abs(found.values[off]).max())
                    among = int(np.sum(np.abs(found.values) <= edge))
                    where = f", all among the {among} smallest |x| (|x| <= {edge:.1e})"
                print(
                    f"      numpy dense eigenvalues ({m}x{m}): {t_np:.2f} s (ratio "
                    f"{t_np / t_all:.1f}x); relative difference median {np.median(rel):.1e}, "
                    f"{int(np.sum(off))} roots above 1e-8{where}"
                )


def run_small(n_terms: int = 500, small: int = 100, seed: int = 1) -> None:
    c = fl.complex_couplings(n_terms, seed=seed)
    m = fl.exclusion_chain(n_terms, reach=1, states=3, couplings=c)
    w = np.asarray(c, dtype=complex) ** 3
    t0 = time.perf_counter()
    found = aberth_chain_roots(w, reach=1, order=3)
    t_aberth = time.perf_counter() - t0
    t0 = time.perf_counter()
    re, im = exclusion_polynomial(m).exact_parts()
    cert = certified_complex_roots(re, im)
    t_flint = time.perf_counter() - t0
    err = _nearest(found.values, 1.0 / cert.values)
    rel = err / np.abs(found.values)
    print(f"Z3 chain, {n_terms} complex couplings, {len(found.values)} roots")
    print(
        f"  Aberth on the recurrence: {t_aberth:.3f} s; certified (exact polynomial + flint): "
        f"{t_flint:.3f} s (ratio {t_flint / t_aberth:.0f}x); max relative difference "
        f"{rel.max():.1e} ({'OK' if rel.max() < 1e-10 else 'FAIL'} at 1e-10); inclusion radii "
        f"hold the certified roots: {bool(np.all(err <= found.error_bounds))}"
    )
    cs = fl.complex_couplings(small, seed=seed + 1)
    ms = fl.exclusion_chain(small, reach=1, states=3, couplings=cs)
    ws = np.asarray(cs, dtype=complex) ** 3
    t0 = time.perf_counter()
    small_found = aberth_chain_roots(ws, reach=1, order=3)
    t_small = time.perf_counter() - t0
    re_s, im_s = exclusion_polynomial(ms).exact_parts()
    t0 = time.perf_counter()
    with mpmath.workdps(50):
        mp_coeffs = [
            mpmath.mpc(
                mpmath.mpf(a.numerator) / a.denominator, mpmath.mpf(b.numerator) / b.denominator
            )
            for a, b in zip(re_s[::-1], im_s[::-1], strict=True)
        ]
        mp_roots = mpmath.polyroots(mp_coeffs, maxsteps=500, extraprec=500)
    t_mp = time.perf_counter() - t0
    x_mp = 1.0 / np.array([complex(r) for r in mp_roots])
    rel_s = _nearest(small_found.values, x_mp) / np.abs(small_found.values)
    print(
        f"Z3 chain, {small} couplings: Aberth {t_small:.3f} s; mpmath.polyroots 50 digits "
        f"{t_mp:.2f} s (ratio {t_mp / t_small:.0f}x); max relative difference {rel_s.max():.1e}"
    )


if __name__ == "__main__":
    aberth_chain_roots(np.ones(8, dtype=complex) * 1j, 1)  # compile (cached) before timing
    run_scale(old_large="--old-large" in sys.argv)
    run_small()
