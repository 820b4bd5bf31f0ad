"""Rigorous enclosures (freeladder.roots.certify) against mpmath 60-digit roots and python-flint."""

from __future__ import annotations

from fractions import Fraction

import flint
import mpmath
import numpy as np
import pytest
from test_roots import exact_coefficients, mpmath_roots, random_weights

import freeladder as fl
from freeladder.roots.certify import certified_roots, certify_chain_roots
from freeladder.roots.methods import solve_chain
from freeladder.roots.real import chain_real_roots


@pytest.mark.parametrize(("reach", "m", "seed"), [(1, 21, 1), (2, 25, 2), (3, 30, 3)])
def test_enclosures_contain_mpmath_roots(reach, m, seed):
    w = random_weights(m, seed)
    ref = mpmath_roots(w, reach)
    r = chain_real_roots(w, reach)
    enc = certify_chain_roots(w, reach, r.values, r.error_bounds)
    assert enc.rigorous, enc.message
    lower, upper = enc.details["lower"], enc.details["upper"]
    with mpmath.workdps(60):
        for lo, hi, root, mid, rad in zip(
            lower, upper, ref, enc.values, enc.error_bounds, strict=True
        ):
            assert mpmath.mpf(float(lo)) <= root <= mpmath.mpf(float(hi))
            assert abs(mpmath.mpf(float(mid)) - root) <= mpmath.mpf(float(rad))
    assert np.all(enc.error_bounds <= 1e-13 * r.values)


def test_wrong_roots_are_not_certified():
    w = random_weights(40, 4)
    r = chain_real_roots(w, 2)
    shifted = r.values.copy()
    shifted[3] = 0.5 * (r.values[3] + r.values[4])  # between two roots: no sign change nearby
    enc = certify_chain_roots(w, 2, shifted, np.full(shifted.size, 1e-14), widenings=1)
    assert not enc.rigorous and "NOT certified" in enc.message
    assert not enc.details["sign_change"][3] and enc.details["sign_change"][0]


def test_partial_set_is_not_a_full_certificate():
    w = random_weights(60, 5)
    top = chain_real_roots(w, 2, lowest=3)
    enc = certify_chain_roots(w, 2, top.values, top.error_bounds)
    assert np.all(enc.details["sign_change"]) and not enc.rigorous
    assert "odd number" in enc.message


def test_certified_roots_against_mpmath():
    # (y - 1/3)(y - 2)(y^2 + 1): real and complex roots from exact Fraction coefficients.
    coeffs = [Fraction(2, 3), Fraction(-7, 3), Fraction(4, 3), Fraction(-7, 3), Fraction(1)]
    got = certified_roots(coeffs)
    with mpmath.workdps(60):
        ref = mpmath.polyroots([mpmath.mpf(c.numerator) / c.denominator for c in reversed(coeffs)])
    for z in ref:
        dist = np.abs(got.values - complex(z))
        assert np.min(dist) <= got.error_bounds[np.argmin(dist)] + 1e-300
    assert np.all(got.error_bounds < 1e-15)
    assert list(got.multiplicities) == [1, 1, 1, 1]


def test_certified_roots_of_a_chain_match_the_fast_roots():
    w = random_weights(60, 6)
    balls = certified_roots(exact_coefficients(w, 2))
    r = chain_real_roots(w, 2)
    np.testing.assert_allclose(np.sort(balls.values.real), r.values, rtol=1e-14)


def test_multiplicity_reported():
    got = certified_roots([1, -2, 1])  # (1 - y)^2: one distinct root that counts twice
    assert list(got.multiplicities) == [2] and got.count == 2
    assert np.all(np.abs(got.values - 1) <= got.error_bounds)
    every = got.repeated()
    assert list(every.multiplicities) == [1, 1]
    assert np.all(np.abs(every.values - 1) <= every.error_bounds)


def test_errors():
    with pytest.raises(ValueError, match="exact"):
        certified_roots([1.5, 1])
    with pytest.raises(ValueError, match="constant"):
        certified_roots([3])
    with pytest.raises(ValueError, match="ascending"):
        certify_chain_roots([1.0, 1.0, 1.0, 1.0], 1, [2.0, 1.0])
    with pytest.raises(ValueError, match="only 2"):
        certify_chain_roots([1.0, 1.0, 1.0], 1, [0.1, 0.2, 0.3])
    with pytest.raises(ValueError, match="complex-root path"):
        certify_chain_roots([1.0, -1.0], 1, [0.5])


def _flint_chain_poly(c: np.ndarray, reach: int) -> flint.fmpq_poly:
    """P_M with exact weights c_j**2, built by the recurrence in python-flint rationals."""
    y = flint.fmpq_poly([0, 1])
    hist = [flint.fmpq_poly([1])] * (reach + 1)
    for cj in c:
        f = Fraction(float(cj))
        wk = flint.fmpq(f.numerator, f.denominator) ** 2
        hist = hist[1:] + [hist[-1] - y * wk * hist[0]]
    return hist[-1]


@pytest.mark.parametrize(("reach", "m", "seed"), [(1, 200, 1), (2, 300, 2), (3, 400, 3)])
def test_certified_bounds_hold_against_flint(reach, m, seed):
    # Reference: python-flint's own certified isolation (fmpq_poly.complex_roots) of the exact
    # polynomial; every flint ball must lie inside the proved interval of the same root.
    # 100 roots per case, 300 in all; the couplings' weights c**2 are covered exactly through
    # weight intervals (route: free_spectrum's certified chain method).
    c = np.random.default_rng(seed).uniform(0.3, 1.7, m)
    found = solve_chain(c, reach, 2, "certified")
    assert found.rigorous and found.method == "chain-certified", found.message
    y, bound = found.true_values()
    saved = flint.ctx.prec
    flint.ctx.prec = 200
    try:
        balls = sorted(
            (b.real for b, _ in _flint_chain_poly(c, reach).complex_roots()),
            key=lambda b: float(b.mid()),
        )
    finally:
        flint.ctx.prec = saved
    assert len(balls) == y.size == found.count
    for ball, mid, rad in zip(balls, y, bound, strict=True):
        assert flint.arb(float(mid)) - flint.arb(float(rad)) <= ball
        assert ball <= flint.arb(float(mid)) + flint.arb(float(rad))


def test_uniform_ising_closed_form_at_ten_thousand_terms():
    # y_k = 1 / (4 cos^2(pi k / (M + 2))) (common practice: Chebyshev zeros of the uniform
    # recurrence), evaluated in mpmath at 40 digits; every proved interval must hold its y_k.
    m = 10_000
    found = solve_chain(np.ones(m), 1, 2, "certified")
    assert found.rigorous and found.count == m // 2 + m % 2, found.message
    with mpmath.workdps(40):
        ref = sorted(
            1 / (4 * mpmath.cos(mpmath.pi * k / (m + 2)) ** 2) for k in range(1, found.count + 1)
        )
        for y, r, exact in zip(found.values, found.error_bounds, ref, strict=True):
            assert abs(mpmath.mpf(float(y)) - exact) <= mpmath.mpf(float(r))
    assert np.max(found.error_bounds / found.values) < 1e-10


def test_fast_bounds_print_as_estimates():
    r = chain_real_roots(random_weights(50, 8), 1)
    assert not r.rigorous
    assert "estimate" in r.summary() and "estimate" in r.to_dict()["bound_kind"]
    enc = certify_chain_roots(random_weights(50, 8), 1, r.values, r.error_bounds)
    assert enc.rigorous and "proved bound" in enc.summary()


def test_failed_certificate_is_an_error_not_a_pass(monkeypatch):
    # Force every interval to fail (no widening, intervals far too narrow by a wrong estimate
    # of zero): the certified route must raise, never return the fast numbers as proved.
    import freeladder.roots.methods as rm

    real = rm.certify_chain_roots

    def narrow(*args, **kwargs):
        kwargs["widenings"] = 0
        args = (*args[:2], args[2] * (1 + 1e-6), *args[3:])  # shifted roots: no sign change
        return real(*args, **kwargs)

    monkeypatch.setattr(rm, "certify_chain_roots", narrow)
    with pytest.raises(ValueError, match="could not be certified"):
        solve_chain(np.random.default_rng(1).uniform(0.3, 1.7, 30), 1, 2, "certified")


def test_back_reach_arrays_are_refused_with_the_route_to_take():
    # The chain certificate is written for fixed reach; a variable-reach chain (a back-reach
    # array) is certified through the exact polynomial instead (root_methods, spectrum).
    with pytest.raises(ValueError, match="back-reach array.*exact polynomial"):
        certify_chain_roots([1.0, 1.0, 1.0], np.array([0, 1, 1]), [0.5])


def _arb_sign(w: np.ndarray, reach: int, y: float, prec: int = 4000) -> int:
    """Sign of P_M(y) from the linear recurrence in python-flint arb balls (independent check)."""
    saved = flint.ctx.prec
    flint.ctx.prec = prec
    try:
        ya = flint.arb(float(y))
        hist = [flint.arb(1)] * (reach + 1)
        for wk in w:
            hist = hist[1:] + [hist[-1] - ya * flint.arb(float(wk)) * hist[0]]
        value = hist[-1]
        assert value > 0 or value < 0, "arb at this precision does not decide the sign"
        return 1 if value > 0 else -1
    finally:
        flint.ctx.prec = saved


@pytest.mark.parametrize(("reach", "seed"), [(2, 11), (3, 12)])
def test_thousand_term_certificate_in_float64_checked_by_arb(reach, seed):
    # The enclosing frame decides every sign in float64 (53 bits: the earlier ratio boxes
    # widened 1.26x per step and needed arb at growing precision here).  Independent check:
    # python-flint arb at 4000 bits on the same recurrence finds a sign change at both ends of
    # 30 sampled intervals.
    w = np.random.default_rng(seed).uniform(0.3, 1.7, 1000) ** 2
    r = chain_real_roots(w, reach)
    enc = certify_chain_roots(w, reach, r.values, r.error_bounds)
    assert enc.rigorous and enc.details["precision"] == 53, enc.message
    assert np.median(enc.error_bounds / enc.values) < 1e-12
    lower, upper = enc.details["lower"], enc.details["upper"]
    picks = np.random.default_rng(seed).choice(r.count, 30, replace=False)
    for k in picks:
        assert _arb_sign(w, reach, lower[k]) * _arb_sign(w, reach, upper[k]) < 0


def test_wrong_root_in_a_long_chain_is_not_certified():
    # One value moved to the middle between two roots of a 1000-term reach-3 chain: its interval
    # can never show a sign change (it stays within 0.45 of the gaps), so the result must not be
    # rigorous, name the failure, and keep the other intervals' sign changes.
    w = np.random.default_rng(13).uniform(0.3, 1.7, 1000) ** 2
    r = chain_real_roots(w, 3)
    wrong = r.values.copy()
    wrong[100] = 0.5 * (r.values[100] + r.values[101])
    enc = certify_chain_roots(w, 3, wrong, r.error_bounds, widenings=3)
    assert not enc.rigorous and "NOT certified" in enc.message
    change = enc.details["sign_change"]
    assert not change[100] and change.sum() == r.count - 1


def _mp(q: Fraction) -> mpmath.mpf:
    return mpmath.mpf(q.numerator) / q.denominator


@pytest.mark.parametrize(("reach", "m", "seed"), [(1, 10, 21), (2, 12, 22)])
def test_complex_clock_chain_roots_contain_mpmath_roots(reach, m, seed):
    # Z_3 exclusion chains with complex couplings: the one certified isolation (through the
    # exact exclusion polynomial) against mpmath.polyroots at 60 digits of the same exact
    # Gaussian-rational coefficients; every reference root lies in its ball.
    c = fl.complex_couplings(m, seed=seed)
    poly = fl.exclusion_polynomial(fl.exclusion_chain(m, reach=reach, states=3, couplings=list(c)))
    re, im = poly.exact_parts()
    found = certified_roots(re, im)
    assert found.rigorous and found.count == poly.degree and np.all(found.multiplicities == 1)
    with mpmath.workdps(60):
        ref = mpmath.polyroots(
            [
                mpmath.mpc(
                    mpmath.mpf(a.numerator) / a.denominator, mpmath.mpf(b.numerator) / b.denominator
                )
                for a, b in zip(re[::-1], im[::-1], strict=True)
            ],
            maxsteps=400,
            extraprec=400,
        )
        for z in ref:
            dist = [abs(mpmath.mpc(v.real, v.imag) - z) for v in found.values]
            k = int(np.argmin([float(x) for x in dist]))
            assert dist[k] <= mpmath.mpf(float(found.error_bounds[k]))
    # the same balls come out of ExclusionPolynomial.roots (one isolation, one result type)
    again = poly.roots()
    assert isinstance(again, fl.RootTable) and again.values.size == found.values.size


def test_deprecated_names_warn_and_still_work():
    with pytest.warns(DeprecationWarning, match="RootTable"):
        old = fl.RootResult
    assert old is fl.RootTable
    import freeladder.roots as roots

    with pytest.warns(DeprecationWarning):
        assert roots.PolynomialRoots is fl.RootTable
    enc = certify_chain_roots([1.0, 1.0], 1, [0.5])
    with pytest.warns(DeprecationWarning, match="sweeps"):
        assert enc.iterations == enc.sweeps
