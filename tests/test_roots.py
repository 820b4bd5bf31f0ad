"""Real roots of exclusion-chain polynomials (freeladder.roots) against outside references."""

from __future__ import annotations

import dataclasses
import json
import time
from fractions import Fraction

import mpmath
import numpy as np
import pytest
import scipy.linalg

import freeladder as fl
from freeladder.certify import certified_roots, certify_chain_roots
from freeladder.root_methods import ROOT_METHODS, choose_method, solve_chain, solve_general
from freeladder.root_result import RootResult
from freeladder.roots import (
    chain_count_below,
    chain_inverse_power_sums,
    chain_real_roots,
    chain_root_count,
)


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
    assert isinstance(r, RootResult) and r.variable == "y" and r.method == "chain-count"
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
    # Every entry returns a RootResult carrying its own key; only rigorous entries say so.
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
            assert isinstance(found, RootResult) and found.converged
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

    import freeladder.root_methods as rm

    monkeypatch.setattr(rm, "chain_real_roots", functools.partial(chain_real_roots, max_sweeps=1))
    c = np.random.default_rng(2).uniform(0.3, 1.7, 1000)
    with pytest.raises(ArithmeticError, match="did not converge"):
        solve_chain(c, 1, 2)
    found = solve_chain(c, 1, 2, allow_unconverged=True)
    assert not found.converged and "not converged" in found.message
