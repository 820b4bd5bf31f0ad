"""Rigorous enclosures (freeladder.roots.certify) against mpmath 60-digit roots and python-flint."""

from __future__ import annotations

from fractions import Fraction

import flint
import mpmath
import numpy as np
import pytest
from test_roots import exact_coefficients, mpmath_roots, random_weights

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
