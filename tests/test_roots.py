"""Real roots of exclusion-chain polynomials (freeladder.roots.real) against outside references."""

from __future__ import annotations

import dataclasses
import json
import threading
import time
from fractions import Fraction

import mpmath
import numpy as np
import pytest
import scipy.linalg

import freeladder as fl
from freeladder.roots import real
from freeladder.roots.certify import certified_roots, certify_chain_roots
from freeladder.roots.methods import ROOT_METHODS, choose_method, solve_chain, solve_general
from freeladder.roots.real import (
    chain_back,
    chain_count_below,
    chain_inverse_power_sums,
    chain_real_roots,
    chain_root_count,
    fixed_reach,
)
from freeladder.roots.result import RootTable


def exact_coefficients(weights: np.ndarray, reach: int) -> list[Fraction]:
    """Coefficients of P_M (constant first) from the recurrence, exactly, for small chains."""
    hist = [[Fraction(1)] for _ in range(reach + 1)]  # P_{k-p-1} ... P_{k-1}
    for wk in weights:
        a, b = hist[-1], hist[0]
        new = a + [Fraction(0)] * (len(b) + 1 - len(a))
        for i, coef in enumerate(b):
            new[i + 1] -= Fraction(float(wk)) * coef
        hist = hist[1:] + [new]
    coeffs = hist[-1]
    while coeffs[-1] == 0:
        coeffs.pop()
    return coeffs


def mpmath_roots(weights: np.ndarray, reach: int, dps: int = 60) -> list[mpmath.mpf]:
    """All roots at ``dps`` digits with mpmath.polyroots (general-purpose reference)."""
    coeffs = exact_coefficients(weights, reach)
    with mpmath.workdps(dps):
        mp = [mpmath.mpf(c.numerator) / c.denominator for c in reversed(coeffs)]
        found = mpmath.polyroots(mp, maxsteps=400, extraprec=4 * dps)
        assert max(abs(mpmath.im(z)) for z in found) < mpmath.mpf(10) ** (-dps // 2)
        return sorted(mpmath.re(z) for z in found)


def random_weights(m: int, seed: int) -> np.ndarray:
    return np.random.default_rng(seed).uniform(0.3, 1.7, m) ** 2


@pytest.mark.parametrize("m", [1, 2, 3, 4, 7, 50, 301])
def test_uniform_ising_closed_form(m):
    # eta_k = 2 cos(pi k / (M + 2)): the open chain's tridiagonal spectrum (common practice;
    # derived from the recurrence, which is the Chebyshev recurrence for uniform weights).
    r = chain_real_roots(np.ones(m), 1)
    k = np.arange(1, chain_root_count(m, 1) + 1)
    expected = np.sort(2 * np.cos(np.pi * k / (m + 2)))
    assert r.converged and r.values.size == k.size
    np.testing.assert_allclose(np.sort(r.values**-0.5), expected, rtol=0, atol=2e-15)


@pytest.mark.parametrize(("reach", "m", "seed"), [(1, 21, 1), (2, 25, 2), (3, 30, 3), (2, 7, 4)])
def test_roots_against_mpmath_60_digits(reach, m, seed):
    w = random_weights(m, seed)
    ref = np.array([float(v) for v in mpmath_roots(w, reach)])
    r = chain_real_roots(w, reach)
    assert r.count == ref.size == chain_root_count(m, reach)
    np.testing.assert_allclose(r.values, ref, rtol=1e-14)
    assert np.all(r.error_bounds < 1e-13 * r.values)
    np.testing.assert_array_equal(r.indices, np.arange(ref.size))


def test_reach_one_against_scipy_tridiagonal():
    # Zero-diagonal symmetric tridiagonal matrix with off-diagonals = the couplings in order:
    # its positive eigenvalues are the eta_k (characteristic polynomial lambda^(M+1) P(1/lambda^2)).
    c = np.random.default_rng(5).uniform(0.3, 1.7, 400)
    ev = scipy.linalg.eigvalsh_tridiagonal(np.zeros(c.size + 1), c)
    r = chain_real_roots(c**2, 1)
    eta = np.sort(r.values**-0.5)
    np.testing.assert_allclose(eta, np.sort(ev)[-r.count :], rtol=0, atol=1e-13 * ev.max())


def test_window_seeded_roots_against_scipy_tridiagonal(monkeypatch):
    # Windows of 1024 terms (4096 by default), so that 8000 terms take the seeded path (and
    # the test stays short).  Reference: the
    # eigenvalues 1 / y_k = eta_k**2 of C^T C, where the zero-diagonal (M + 1) tridiagonal with
    # off-diagonals sqrt(w) reads [[0, C], [C^T, 0]] in even / odd order with C bidiagonal
    # (common practice).  Squaring costs LAPACK relative accuracy on the smallest eta, so
    # the comparison is absolute in eta**2.
    monkeypatch.setattr(real, "_SEED_WINDOW", 1024)
    monkeypatch.setattr(real, "_SEED_TERMS", 4096)
    m = 8000
    w = random_weights(m, 25)
    r = chain_real_roots(w, 1)
    ev = scipy.linalg.eigvalsh_tridiagonal(w[0::2] + w[1::2], np.sqrt(w[1:-1:2] * w[2::2]))
    assert r.converged and r.count == ev.size == m // 2
    np.testing.assert_allclose(np.sort(1 / r.values), np.sort(ev), rtol=0, atol=1e-13 * ev.max())
    # the seeds leave about one whole-chain evaluation per root (about 5 from the ladder alone)
    assert r.evaluations < 1.5 * r.count


@pytest.mark.parametrize(("reach", "m"), [(2, 64), (3, 76)])
def test_window_seeded_roots_against_mpmath(monkeypatch, reach, m):
    # Windows of 12 terms, so that a short chain (mpmath can expand it) takes the seeded path.
    monkeypatch.setattr(real, "_SEED_WINDOW", 12)
    monkeypatch.setattr(real, "_SEED_TERMS", 48)
    w = random_weights(m, 40 + reach)
    ref = np.array([float(v) for v in mpmath_roots(w, reach)])
    r = chain_real_roots(w, reach)
    assert r.converged and r.count == ref.size
    np.testing.assert_allclose(r.values, ref, rtol=1e-14)
    assert np.all(r.error_bounds < 1e-13 * r.values)


@pytest.mark.parametrize("reach", [2, 3])
def test_nested_window_seeds_certified(monkeypatch, reach):
    # Windows of 4 terms and seeded windows from 16 terms: a 900-term chain is seeded from
    # windows of 28 terms, themselves seeded from windows of 4.  Checked by the certified
    # enclosures (sign changes in ball arithmetic, python-flint) of every root.
    monkeypatch.setattr(real, "_SEED_WINDOW", 4)
    monkeypatch.setattr(real, "_SEED_TERMS", 16)
    w = random_weights(900, 50 + reach)
    r = chain_real_roots(w, reach)
    assert r.converged and r.count == chain_root_count(900, reach)
    enc = certify_chain_roots(w, reach, r.values, r.error_bounds)
    assert enc.rigorous, enc.message
    assert np.all(np.abs(r.values - enc.values) <= enc.error_bounds + r.error_bounds)
    # widened intervals (the float64 interval test needs a margin near localised roots)
    assert np.all(enc.error_bounds <= 1e-10 * r.values)


@pytest.mark.parametrize("reach", [1, 2, 3])
def test_count_against_certified_roots(reach):
    # Certified isolating balls (python-flint) from the exact coefficients; the count at y must
    # equal the number of balls entirely below y.  For reach >= 2 this is the tested (not proved)
    # root-count property of the negative ratios.
    for seed in range(3):
        w = random_weights(24 + seed, 10 * reach + seed)
        balls = certified_roots(exact_coefficients(w, reach))
        assert balls.rigorous
        assert np.all(np.abs(balls.values.imag) <= balls.error_bounds)
        lo = balls.values.real - balls.error_bounds
        hi = balls.values.real + balls.error_bounds
        rng = np.random.default_rng(seed)
        y = np.concatenate([hi * (1 + 1e-9), lo * (1 - 1e-9), rng.uniform(0, 1.2 * hi.max(), 50)])
        inside = np.any((y[:, None] >= lo) & (y[:, None] <= hi), axis=1)
        y = y[~inside]
        expected = np.sum(hi[None, :] < y[:, None], axis=1)
        np.testing.assert_array_equal(chain_count_below(w, reach, y), expected)


@pytest.mark.parametrize("reach", [2, 3])
def test_consecutive_polynomials_interlace(reach):
    # The count property rests on P_{k-1} interlacing P_k (P_k holding the smallest root).
    # Checked here on certified roots of every prefix of a random chain.
    w = random_weights(16, 7 + reach)
    prev = np.array([])
    for k in range(1, w.size + 1):
        balls = certified_roots(exact_coefficients(w[:k], reach))
        cur = np.sort(balls.values.real)
        assert np.all(balls.error_bounds < 1e-20 + 1e-12 * np.abs(balls.values))
        for i, root in enumerate(cur):
            assert i >= prev.size or root < prev[i]
            assert i == 0 or prev[i - 1] < root
        prev = cur


@pytest.mark.parametrize(("reach", "m"), [(1, 300), (2, 400), (3, 500)])
def test_lowest_matches_full(reach, m):
    w = random_weights(m, 20 + reach)
    full = chain_real_roots(w, reach)
    top = chain_real_roots(w, reach, lowest=5)
    np.testing.assert_array_equal(top.indices, np.arange(full.count - 5, full.count))
    np.testing.assert_allclose(top.values, full.values[-5:], rtol=1e-14)
    # lowest beyond S returns everything
    assert chain_real_roots(w, reach, lowest=10 * m).values.size == full.count


def test_sum_rules_against_exact_coefficients():
    # sum 1/y = C_1 and sum 1/y^2 = C_1^2 - 2 C_2 (Newton's identities, common practice).
    for reach in (1, 2, 3):
        w = random_weights(40, reach)
        coeffs = exact_coefficients(w, reach)
        c1, c2 = -coeffs[1], coeffs[2]
        s1, s2 = chain_inverse_power_sums(w, reach)
        assert s1 == pytest.approx(float(c1), rel=1e-14)
        assert s2 == pytest.approx(float(c1 * c1 - 2 * c2), rel=1e-14)
        r = chain_real_roots(w, reach)
        assert np.sum(1 / r.values) == pytest.approx(s1, rel=1e-13)
        assert np.sum(r.values**-2.0) == pytest.approx(s2, rel=1e-13)


def test_huge_dynamic_range_is_certified():
    # Random Ising couplings give exponentially small eta (largest roots ~1e13 here).
    w = random_weights(2000, 0)[:600]
    r = chain_real_roots(w, 1)
    assert r.values.max() / r.values.min() > 1e6
    enc = certify_chain_roots(w, 1, r.values, r.error_bounds)
    assert enc.rigorous, enc.message
    # widened intervals (the float64 interval test needs a margin near localised roots)
    assert np.all(enc.error_bounds <= 1e-10 * r.values)


@pytest.mark.parametrize(
    "bad", [[1.0, -0.5, 1.0], [1.0, 0.0], [1.0, np.nan], [1.0, np.inf], [1 + 1j, 1.0]]
)
def test_non_positive_weights_point_to_complex_path(bad):
    with pytest.raises(ValueError, match="complex-root path"):
        chain_real_roots(bad, 2)
    with pytest.raises(ValueError, match="complex-root path"):
        chain_count_below(bad, 2, [1.0])


def test_bad_arguments():
    with pytest.raises(ValueError, match="reach"):
        chain_real_roots([1.0], 0)
    with pytest.raises(ValueError, match="lowest"):
        chain_real_roots([1.0, 1.0], 1, lowest=0)
    with pytest.raises(ValueError, match="non-empty"):
        chain_real_roots([], 1)
    with pytest.raises(ValueError, match="real numbers"):
        chain_real_roots(["a"], 1)


def test_progress_and_interrupt_leave_nothing_broken():
    w = random_weights(3000, 9)
    seen: list[tuple[int, int, int]] = []
    r = chain_real_roots(w, 2, progress=lambda *a: seen.append(a))
    assert seen and seen[-1][1] == seen[-1][2] == r.count

    def stop(sweep, done, wanted):
        if sweep >= 3:
            raise KeyboardInterrupt

    with pytest.raises(KeyboardInterrupt):
        chain_real_roots(w, 2, progress=stop)
    again = chain_real_roots(w, 2)
    np.testing.assert_array_equal(again.values, r.values)


# -- one result protocol, scale invariance, no hang ---------------------------------------------


def test_root_result_is_frozen_and_json_ready():
    r = chain_real_roots(random_weights(40, 11), 2)
    assert isinstance(r, RootTable) and r.variable == "y" and r.method == "chain-count"
    assert not r.rigorous and "estimate" in r.summary() and "estimate" in repr(r)
    assert r.count == chain_root_count(40, 2) == r.values.size
    with pytest.raises(dataclasses.FrozenInstanceError):
        r.values = np.zeros(3)  # type: ignore[misc]
    with pytest.raises(ValueError):
        r.values[0] = 1.0
    with pytest.raises(TypeError):
        r.details["x"] = 1  # type: ignore[index]
    text = json.dumps(r.to_dict(), allow_nan=False)
    assert '"bound_kind": "estimate (not a proof)"' in text


def test_method_table_routes_and_labels():
    # Every entry returns a RootTable carrying its own key; only rigorous entries say so.
    c = np.random.default_rng(3).uniform(0.3, 1.7, 24)
    for key in ("chain-count", "chain-certified"):
        found = solve_chain(c, 2, 2, key)
        assert found.method == key and found.rigorous == ROOT_METHODS[key].rigorous
    found = solve_chain(c * np.exp(0.3j), 2, 3, "auto")
    assert found.method == "chain-aberth" and not found.rigorous and found.variable == "x"
    general = solve_general(fl.exclusion_chain(6, 2, couplings=list(c[:6])))
    assert general.method == "exact-certified" and general.rigorous
    with pytest.raises(ValueError, match="does not apply"):
        solve_chain(c * np.exp(0.3j), 2, 3, "chain-count")
    with pytest.raises(ValueError, match="does not apply"):
        choose_method("real chain", "no-such-method")


def _mpmath_eta(c: np.ndarray, reach: int) -> np.ndarray:
    """Quasi-energies y^(-1/2) from mpmath.polyroots at 60 digits on the exact weights c**2."""
    coeffs = exact_coefficients_from_couplings(c, reach)
    with mpmath.workdps(60):
        mp = [mpmath.mpf(v.numerator) / v.denominator for v in reversed(coeffs)]
        found = mpmath.polyroots(mp, maxsteps=400, extraprec=240)
        return np.array(sorted(float(mpmath.re(z) ** -0.5) for z in found))


def exact_coefficients_from_couplings(c: np.ndarray, reach: int) -> list[Fraction]:
    """Exact coefficients of P_M for weights c_j**2 (squares taken exactly)."""
    hist = [[Fraction(1)] for _ in range(reach + 1)]
    for cj in c:
        wk = Fraction(float(cj)) ** 2
        a, b = hist[-1], hist[0]
        new = a + [Fraction(0)] * (len(b) + 1 - len(a))
        for i, coef in enumerate(b):
            new[i + 1] -= wk * coef
        hist = hist[1:] + [new]
    return hist[-1]


@pytest.mark.parametrize("reach", [1, 2])
def test_spectrum_is_scale_invariant(reach):
    # Couplings c, 1e75 c and 1e-200 c: the quasi-energies scale exactly (eta is homogeneous of
    # degree 1 in the couplings); reference: mpmath.polyroots at 60 digits on the exact
    # polynomial of c (the scaled floats differ from c times the scale by one rounding each).
    c = np.random.default_rng(40 + reach).uniform(0.3, 1.7, 30)
    ref = _mpmath_eta(c, reach)
    for scale in (1.0, 1e75, 1e-200):
        for method in ("fast", "certified"):
            sp = fl.free_spectrum(fl.exclusion_chain(30, reach, couplings=list(c * scale)), method)
            eta = np.asarray(sp.quasi_energies) / scale
            np.testing.assert_allclose(eta, ref, rtol=1e-12)
            assert np.all(np.isfinite(sp.error_bounds))
            assert np.all(sp.error_bounds / sp.quasi_energies < 1e-9)
            found = sp.provenance.finder["roots"]
            assert isinstance(found, RootTable) and found.converged
            if method == "fast":
                assert "estimate" in sp.provenance.bounds and not found.rigorous
            else:
                assert found.rigorous
                # the proved bounds hold against the 60-digit reference, up to the one
                # rounding of c * scale (relative 2**-53 per coupling)
                err = np.abs(eta - ref) - 1e-14 * ref
                assert np.all(err <= np.asarray(sp.error_bounds) / scale)


def test_tiny_bonds_do_not_hang():
    # Previously free_spectrum never returned on this model (certified isolation without a
    # precision limit).  Now a bounded search ends with a clear error within seconds.
    start = time.perf_counter()
    with pytest.raises(ValueError, match="could not be isolated|not guaranteed|theorem"):
        fl.free_spectrum(fl.ising_lattice(2, 2, bond=1e-200))
    assert time.perf_counter() - start < 60


def test_couplings_beyond_the_weight_range_are_refused():
    # c**2 of 1e-200 next to 1 is below float64 range: a clear message, not wrong numbers.
    with pytest.raises(ValueError, match="coupling 1 .*smaller than the largest"):
        solve_chain(np.array([1.0, 1e-200, 1.0]), 1, 2)


def test_free_spectrum_text_says_estimate_or_proved():
    m = fl.exclusion_chain(12, 2, couplings=list(np.random.default_rng(4).uniform(0.3, 1.7, 12)))
    fast = fl.free_spectrum(m)
    assert "estimate" in repr(fast) and "estimate" in fast._repr_html_()
    assert not fast.provenance.finder["rigorous"]
    cert = fl.free_spectrum(m, method="certified")
    assert "proved bound" in repr(cert) and cert.provenance.finder["rigorous"]


def test_unconverged_roots_raise_by_default(monkeypatch):
    # One sweep cannot converge 500 roots: solve_chain (the route of free_spectrum) raises
    # instead of returning quasi-energies with unbounded errors; on request it returns them
    # marked converged=False.
    import functools

    import freeladder.roots.methods as rm

    monkeypatch.setattr(rm, "chain_real_roots", functools.partial(chain_real_roots, max_sweeps=1))
    c = np.random.default_rng(2).uniform(0.3, 1.7, 1000)
    with pytest.raises(ArithmeticError, match="did not converge"):
        solve_chain(c, 1, 2)
    found = solve_chain(c, 1, 2, allow_unconverged=True)
    assert not found.converged and "not converged" in found.message


# -- roots beyond float64 ------------------------------------------------------------------------


def _mp_count(w: np.ndarray, back: np.ndarray, y: mpmath.mpf) -> int:
    """Sign changes along P_k (the linear recurrence) at ``y``, in mpmath (unbounded exponent)."""
    hist = [mpmath.mpf(1)]  # hist[i] = P_{i-1}
    changes = 0
    for k, wk in enumerate(w):
        new = hist[-1] - y * mpmath.mpf(float(wk)) * hist[k - int(back[k])]
        changes += int((new < 0) != (hist[-1] < 0) or new == 0)
        hist.append(new)
    return changes


def _mp_value(w: np.ndarray, back: np.ndarray, y: mpmath.mpf) -> mpmath.mpf:
    hist = [mpmath.mpf(1)]
    for k, wk in enumerate(w):
        hist.append(hist[-1] - y * mpmath.mpf(float(wk)) * hist[k - int(back[k])])
    return hist[-1]


def mpmath_chain_roots(w: np.ndarray, back: np.ndarray, bits: int = 160) -> list[mpmath.mpf]:
    """Every root by bisection in mpmath at ``bits`` bits, independent of freeladder.roots.real.

    Brackets come from mpmath counts alone (powers of 2 from below 1 / sum w until the count
    is the degree), then geometric and arithmetic bisection to 2**-120 relative.  Each final
    bracket is checked to hold a sign change of P_M (so it holds a root whatever the count
    means); the count gives the root's index (proved for reach 1, the tested property of the
    module otherwise).
    """
    with mpmath.workprec(bits):
        total = _mp_count(w, back, mpmath.mpf(2) ** 100000)
        lows = [mpmath.mpf(1) / (2 * mpmath.mpf(float(np.sum(w))))]
        counts = [_mp_count(w, back, lows[0])]
        assert counts[0] == 0
        while counts[-1] < total:
            lows.append(lows[-1] * 2**64)
            counts.append(_mp_count(w, back, lows[-1]))
        roots = []
        for j in range(total):
            i = next(i for i, c in enumerate(counts) if c > j)
            lo, hi = lows[i - 1], lows[i]
            while hi - lo > hi * mpmath.mpf(2) ** -120:
                mid = mpmath.sqrt(lo * hi) if hi > 2 * lo else (lo + hi) / 2
                if _mp_count(w, back, mid) > j:
                    hi = mid
                else:
                    lo = mid
            assert _mp_value(w, back, lo) * _mp_value(w, back, hi) < 0
            roots.append((lo + hi) / 2)
        return roots


def weak_field_chain(m: int, reach: int, weak: float, seed: int) -> np.ndarray:
    """Couplings with every (reach + 1)-th term scaled by ``weak``: an edge mode whose
    quasi-energy is about ``weak ** (m / (reach + 1))`` (common practice for localised modes)."""
    rng = np.random.default_rng(seed)
    c = rng.uniform(0.5, 2.0, m)
    c[:: reach + 1] *= weak
    return c


@pytest.mark.parametrize(("reach", "m", "weak"), [(1, 41, 1e-50), (2, 40, 1e-75)])
def test_roots_beyond_float_against_mpmath_bisection(reach, m, weak):
    # The smallest quasi-energy is about 1e-1000 (the largest root y about 1e2000): the
    # roots carry a separate power of two and still converge to full relative accuracy.
    # Reference: mpmath bisection at 160 bits on the linear recurrence (mpmath.mpf has an
    # unbounded exponent), with a certified sign change in every final bracket.
    w = weak_field_chain(m, reach, weak, 100 + reach) ** 2
    r = chain_real_roots(w, reach)
    assert r.converged and np.any(r.exponents != 0) and "mantissas" in r.summary()
    ref = mpmath_chain_roots(w, chain_back(reach, m))
    assert r.count == len(ref) == chain_root_count(m, reach)
    with mpmath.workprec(160):
        got = [
            mpmath.mpf(float(v)) * mpmath.mpf(2) ** int(e)
            for v, e in zip(r.values, r.exponents, strict=True)
        ]
        rel = [abs(g / x - 1) for g, x in zip(got, ref, strict=True)]
        assert max(rel) < 4e-15, max(rel)
        log_eta = [-mpmath.log(x) / 2 for x in ref]
    assert float(mpmath.log10(ref[-1])) > 1800  # beyond float64 indeed
    le, le_err = r.log_quasi_energies(2)
    np.testing.assert_allclose(le, [float(v) for v in log_eta], rtol=1e-15, atol=4e-15)
    assert np.all(le_err < 1e-14)
    with pytest.raises(ArithmeticError, match="log_quasi_energies"):
        r.quasi_energies(2)
    rounded, _ = r.quasi_energies(2, beyond_float="round")
    assert rounded[-1] == 0.0 and np.all(rounded[:-1] > 0)
    json.dumps(r.to_dict(), allow_nan=False)


def test_tiny_gap_against_lapack_bisection():
    # Reach 1 with weak fields: eta ~ 1e-200, still a float64.  LAPACK's bisection (dstebz via
    # scipy.linalg.eigvalsh_tridiagonal, select="i") on the zero-diagonal tridiagonal matrix
    # with off-diagonals c resolves it with the absolute tolerance 2 * tiny (the LAPACK
    # documentation's advice for small eigenvalues); the default tolerance returns ~1e-16.
    rng = np.random.default_rng(3)
    m = 601
    c = np.where(np.arange(m) % 2 == 0, rng.uniform(0.1, 0.5, m), rng.uniform(0.8, 1.7, m))
    r = chain_real_roots(c**2, 1, lowest=3)
    eta = np.sort(np.exp(r.log_quasi_energies(2)[0]))
    n = m + 1
    ev = scipy.linalg.eigvalsh_tridiagonal(
        np.zeros(n), c, select="i", select_range=(n // 2, n // 2 + 2), tol=2 * np.finfo(float).tiny
    )
    assert eta[0] < 1e-150
    np.testing.assert_allclose(eta, np.sort(ev), rtol=5e-14)
    sp = fl.free_spectrum(fl.exclusion_chain(m, 1, couplings=list(c)), lowest=3)
    np.testing.assert_allclose(sp.quasi_energies, np.sort(ev), rtol=5e-14)
    assert sp.gap == pytest.approx(2 * ev.min(), rel=5e-14)


def test_free_spectrum_gap_beyond_float_is_a_logarithm_never_zero():
    c = weak_field_chain(41, 1, 1e-50, 101)
    ref = mpmath_chain_roots(c**2, chain_back(1, 41))
    with mpmath.workprec(160):
        log_gap = float(mpmath.log(2) - mpmath.log(ref[-1]) / 2)
    sp = fl.free_spectrum(fl.exclusion_chain(41, 1, couplings=list(c)))
    assert sp.log_gap == pytest.approx(log_gap, rel=1e-15)
    with pytest.raises(ArithmeticError, match="log_gap"):
        sp.gap  # noqa: B018
    with pytest.raises(ValueError, match="below float64"):  # also a ValueError: "not available"
        sp.gap  # noqa: B018
    assert sp.quasi_energies[0] == 0.0 and np.isfinite(sp.log_quasi_energies[0])
    assert "e-1049" in str(sp) or "e-1048" in str(sp)
    data = json.loads(json.dumps(sp.to_dict(), allow_nan=False))
    assert data["gap"] is None and data["log_gap"] == pytest.approx(log_gap, rel=1e-15)
    low = fl.free_spectrum(fl.exclusion_chain(41, 1, couplings=list(c)), lowest=1)
    assert low.log_gap == pytest.approx(log_gap, rel=1e-15)
    with pytest.raises(ValueError, match="beyond float64"):
        fl.free_spectrum(fl.exclusion_chain(41, 1, couplings=list(c)), method="certified")


# -- variable reach (back-reach arrays) ----------------------------------------------------------


def random_back(m: int, max_back: int, rng: np.random.Generator) -> np.ndarray:
    """A random back-reach array: first neighbours non-decreasing, back <= max_back, with
    occasional new components (back 0)."""
    start = [0]
    for k in range(1, m):
        if rng.random() < 0.08:
            start.append(k)
        else:
            start.append(int(rng.integers(max(start[-1], k - max_back), k + 1)))
    return np.arange(m) - np.array(start)


def exact_coefficients_back(weights: np.ndarray, back: np.ndarray) -> list[Fraction]:
    hist = [[Fraction(1)]]  # hist[i] = P_{i-1}
    for k, wk in enumerate(weights):
        a, b = hist[-1], hist[k - int(back[k])]
        new = a + [Fraction(0)] * (len(b) + 1 - len(a))
        for i, coef in enumerate(b):
            new[i + 1] -= Fraction(float(wk)) * coef
        hist.append(new)
    coeffs = hist[-1]
    while coeffs[-1] == 0:
        coeffs.pop()
    return coeffs


def test_variable_reach_count_and_roots_against_certified_exact_roots():
    # The count property for non-constant reach is TESTED, NOT PROVED: certified isolating
    # balls of the exact polynomial (python-flint) on random variable-reach chains; the count
    # at points outside the balls equals the balls below, the degree equals the greedy
    # independence number, and the roots agree.
    rng = np.random.default_rng(77)
    for _ in range(12):
        m = int(rng.integers(8, 24))
        back = random_back(m, int(rng.integers(1, 5)), rng)
        w = rng.uniform(0.3, 1.7, m) ** 2
        balls = certified_roots(exact_coefficients_back(w, back))
        assert balls.rigorous
        assert chain_root_count(m, back) == balls.count
        lo = balls.values.real - balls.error_bounds
        hi = balls.values.real + balls.error_bounds
        y = np.concatenate([hi * (1 + 1e-9), lo * (1 - 1e-9), rng.uniform(0, 1.2 * hi.max(), 60)])
        y = y[~np.any((y[:, None] >= lo) & (y[:, None] <= hi), axis=1)]
        expected = np.sum(hi[None, :] < y[:, None], axis=1)
        np.testing.assert_array_equal(chain_count_below(w, back, y), expected, err_msg=str(back))
        r = chain_real_roots(w, back)
        np.testing.assert_allclose(r.values, np.sort(balls.values.real), rtol=1e-13)
        s1, s2 = chain_inverse_power_sums(w, back)
        coeffs = exact_coefficients_back(w, back)
        assert s1 == pytest.approx(float(-coeffs[1]), rel=1e-14)
        assert s2 == pytest.approx(float(coeffs[1] ** 2 - 2 * coeffs[2]), rel=1e-13)


def test_back_reach_validation_and_fixed_reach_equivalence():
    w = random_weights(30, 5)
    for p in (1, 2, 3):
        a, b = chain_real_roots(w, p), chain_real_roots(w, chain_back(p, 30))
        np.testing.assert_array_equal(a.values, b.values)
        assert fixed_reach(chain_back(p, 30)) == p
    assert fixed_reach(np.array([0, 1, 1, 2])) is None
    with pytest.raises(ValueError, match="non-decreasing.*position 3"):
        chain_back([0, 1, 1, 3], 4)
    with pytest.raises(ValueError, match=r"back-reach 2 is 3"):
        chain_back([0, 1, 3], 3)
    with pytest.raises(ValueError, match="1-d array of 3"):
        chain_back([0, 1], 3)
    with pytest.raises(ValueError, match="not an integer"):
        chain_back([0, 1.5, 1], 3)
    with pytest.raises(ValueError, match="integers"):
        chain_back(np.array([False, True]), 2)
    assert chain_root_count(5, [0, 0, 0, 0, 0]) == 5  # five isolated terms
    assert chain_root_count(5, [0, 1, 2, 3, 4]) == 1  # one clique


def variable_range_model(reaches, couplings, rng):
    """g_j = X_j Z_{j+1} ... Z_{j + p_j} with non-decreasing ends; terms and sites shuffled."""
    size = len(reaches)
    sites = list(rng.permutation(size + max(reaches)))
    terms = []
    for j, p in enumerate(reaches):
        factors = [(sites[j], 1, 0)] + [(sites[j + d], 0, 1) for d in range(1, p + 1)]
        terms.append((couplings[j], fl.make_string(2, factors)))
    shuffled = [terms[k] for k in rng.permutation(size)]
    return fl.Model.from_terms(shuffled, states=2)


def random_reaches(m: int, rng: np.random.Generator) -> list[int]:
    out, end = [], 0
    for j in range(m):
        low = max(1, end - j)
        p = int(rng.integers(low, 4)) if low <= 3 else low
        out.append(p)
        end = j + p
    return out


def test_variable_reach_spectrum_matches_exact_diagonalization():
    # Random variable-range N = 2 chains with real couplings of both signs and random
    # relabelling of terms and sites: the free levels (real chain path along the indifference
    # ordering) equal dense exact diagonalization (numpy eigvalsh via fl.exact_spectrum) with
    # multiplicities (fl.match_levels).
    rng = np.random.default_rng(15)
    seen_variable = 0
    for _ in range(8):
        m = int(rng.integers(5, 9))
        reaches = random_reaches(m, rng)
        if m + max(reaches) > 11:
            continue
        c = rng.uniform(0.3, 1.7, m) * rng.choice([-1.0, 1.0], m)
        model = variable_range_model(reaches, c, rng)
        sp = fl.free_spectrum(model)
        if len(set(reaches)) > 1 and fl.graphs.graph.chain_structure(model) is None:
            seen_variable += 1
            assert "indifference ordering" in sp.provenance.path
            assert sp.provenance.reach is None
            assert sp.provenance.finder["root_method"] == "chain-count"
        match = fl.match_levels(sp.levels(None), fl.exact_spectrum(model))
        assert match.ok, match
    assert seen_variable >= 3


def test_variable_reach_certified_goes_through_the_exact_polynomial():
    rng = np.random.default_rng(4)
    reaches = [2, 1, 3, 2, 1, 2, 2]
    model = variable_range_model(reaches, list(rng.uniform(0.3, 1.7, 7)), rng)
    fast = fl.free_spectrum(model, method="fast")
    cert = fl.free_spectrum(model, method="certified")
    assert cert.provenance.finder["root_method"] == "exact-certified"
    assert cert.provenance.finder["rigorous"]
    np.testing.assert_allclose(fast.quasi_energies, cert.quasi_energies, rtol=1e-13)
    assert np.all(np.abs(fast.quasi_energies - cert.quasi_energies) <= cert.error_bounds + 1e-15)
    back = np.array([0, 1, 1, 2, 2])
    with pytest.raises(ValueError, match="exact polynomial"):
        solve_chain(rng.uniform(0.3, 1.7, 5), back, 2, "certified")
    found = solve_chain(rng.uniform(0.3, 1.7, 5), back, 2)
    assert found.count == chain_root_count(5, back)


def test_stop_hook_stops_the_window_seeds(monkeypatch):
    # The seed windows run in worker threads: a stop hook of the calling thread must stop
    # them too (freeladder.stop_when), and the windows must not run on after the call.
    monkeypatch.setattr(real, "_SEED_WINDOW", 512)
    monkeypatch.setattr(real, "_SEED_TERMS", 2048)
    w = random_weights(6000, 61)
    polls = []

    def hook() -> bool:
        polls.append(threading.current_thread().name)
        return len(polls) > 1

    before = threading.active_count()
    with pytest.raises(fl.Interrupted), fl.stop_when(hook):
        chain_real_roots(w, 2)
    assert threading.active_count() == before
    assert set(polls) == {threading.current_thread().name}  # asked in the calling thread only
    full = chain_real_roots(w, 2)
    assert full.converged and full.count == chain_root_count(6000, 2)
