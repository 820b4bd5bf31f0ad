"""Benchmark: complex chain roots (Aberth-Ehrlich on the recurrence) against baselines.

Z3 exclusion chain (reach 1) with 500 random complex couplings: the 250 roots are compared with
certified roots (python-flint ``acb_poly.roots`` on the exact Gaussian-rational polynomial);
baselines measured in the same run: ``numpy.roots`` on the rounded coefficients, and
``mpmath.polyroots`` at 50 digits (at a smaller size, since it is far slower).

Run: ``bash tools/bench.sh tests/benchmarks/bench_complex.py``
"""

from __future__ import annotations

import time

import mpmath
import numpy as np

import freeladder as fl
from freeladder.polynomial import exclusion_polynomial
from freeladder.roots_complex import aberth_chain_roots, certified_complex_roots


def _nearest(a: np.ndarray, b: np.ndarray) -> np.ndarray:
    return np.abs(a[:, None] - b[None, :]).min(axis=1)


def run(n_terms: int = 500, small: int = 100, seed: int = 1) -> None:
    c = fl.complex_couplings(n_terms, seed=seed)
    m = fl.exclusion_chain(n_terms, reach=1, states=3, couplings=c)
    w = np.asarray(c, dtype=complex) ** 3

    t0 = time.perf_counter()
    found = aberth_chain_roots(w, reach=1, order=3)
    t_aberth = time.perf_counter() - t0

    t0 = time.perf_counter()
    poly = exclusion_polynomial(m)
    re, im = poly.exact_parts()
    cert = certified_complex_roots(re, im)
    y_ref, y_rad = cert.values, cert.error_bounds
    t_flint = time.perf_counter() - t0
    x_ref = 1.0 / y_ref

    err = _nearest(found.values, x_ref)
    rel = err / np.abs(found.values)
    print(f"Z3 chain, {n_terms} complex couplings, {len(found.values)} roots")
    print(
        f"  Aberth on the recurrence: {t_aberth:.3f} s, {found.iterations} sweeps, "
        f"{found.evaluations} point evaluations, all converged/isolated: {found.converged}"
    )
    print(
        f"  certified (exact polynomial + flint acb_poly.roots): {t_flint:.3f} s, "
        f"largest ball radius in y {y_rad.max():.2e}"
    )
    print(
        f"  agreement: max |x - x_cert| = {err.max():.2e}, max relative {rel.max():.2e} "
        f"(target 1e-10): {'OK' if rel.max() < 1e-10 else 'FAIL'}"
    )
    print(
        f"  inclusion radii hold the certified roots: {bool(np.all(err <= found.error_bounds))}; "
        f"median radius / true error {np.median(found.error_bounds / np.maximum(err, 1e-300)):.3g}"
    )
    print(f"  time ratio certified / Aberth: {t_flint / t_aberth:.2f}")

    # numpy.roots on the coefficients rounded to complex128
    coeffs = np.array([complex(v) for v in poly.coefficients])
    t0 = time.perf_counter()
    with np.errstate(all="ignore"):
        y_np = np.roots(coeffs[::-1])
    t_np = time.perf_counter() - t0
    if len(y_np) and np.all(np.isfinite(y_np)):
        rel_np = _nearest(y_ref, y_np) / np.abs(y_ref)
        print(
            f"  numpy.roots on the coefficients: {t_np:.3f} s, max relative error "
            f"{rel_np.max():.2e} ({len(y_np)} roots)"
        )
    else:
        print(
            f"  numpy.roots on the coefficients: {t_np:.3f} s, failed "
            f"({len(y_np)} roots, non-finite values present)"
        )

    # mpmath.polyroots at 50 digits, smaller chain (it does not reach degree 250 in minutes)
    cs = fl.complex_couplings(small, seed=seed + 1)
    ms = fl.exclusion_chain(small, reach=1, states=3, couplings=cs)
    ws = np.asarray(cs, dtype=complex) ** 3
    t0 = time.perf_counter()
    small_found = aberth_chain_roots(ws, reach=1, order=3)
    t_small = time.perf_counter() - t0
    ps = exclusion_polynomial(ms)
    re_s, im_s = ps.exact_parts()
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
    print(f"Z3 chain, {small} complex couplings, {len(x_mp)} roots")
    print(
        f"  Aberth: {t_small:.3f} s; mpmath.polyroots 50 digits: {t_mp:.2f} s "
        f"(ratio {t_mp / t_small:.0f}); max relative difference {rel_s.max():.2e}"
    )


if __name__ == "__main__":
    run()
