"""Complex chain roots (Aberth-Ehrlich on the recurrence) against mpmath and python-flint."""

from __future__ import annotations

import json
from fractions import Fraction

import mpmath
import numpy as np
import pytest

from freeladder.root_result import RootResult
from freeladder.roots_complex import (
    aberth_chain_roots,
    certified_complex_roots,
    chain_degree,
    evaluate_chain,
)


def _mp_chain_coefficients(w: np.ndarray, reach: int) -> list:
    """Descending coefficients of Q(x) = x^n P(1/x), built exactly enough in 80-digit mpmath
    from the chain recurrence P_k = P_{k-1} - y w_k P_{k-p-1} (the floats taken as given)."""
    with mpmath.workdps(80):
        prev = [[mpmath.mpc(1)] for _ in range(reach + 1)]  # ascending coefficients of P_k
        for wk in w:
            a, b = prev[-1], prev[0]
            shifted = [mpmath.mpc(0)] + [-mpmath.mpc(wk) * c for c in b]
            new = [
                (a[i] if i < len(a) else 0) + (shifted[i] if i < len(shifted) else 0)
                for i in range(max(len(a), len(shifted)))
            ]
            prev = prev[1:] + [new]
        return list(prev[-1])  # ascending in y = descending in x


def _mp_roots(w: np.ndarray, reach: int) -> np.ndarray:
    """Reciprocal roots x = 1 / y by mpmath.polyroots at 60 digits (reference library)."""
    coeffs = _mp_chain_coefficients(w, reach)
    with mpmath.workdps(60):
        found = mpmath.polyroots(coeffs, maxsteps=400, extraprec=400)
        return np.array([complex(r) for r in found])


def _match(a: np.ndarray, b: np.ndarray) -> np.ndarray:
    """Distance from each a to its nearest b."""
    return np.abs(a[:, None] - b[None, :]).min(axis=1)


@pytest.mark.parametrize(
    ("n_terms", "reach", "states", "seed"),
    [(30, 1, 3, 1), (31, 2, 3, 2), (24, 1, 4, 3), (40, 3, 2, 4)],
)
def test_complex_chain_against_mpmath(n_terms: int, reach: int, states: int, seed: int) -> None:
    # Reference: mpmath.polyroots at 60 digits on coefficients built in 80-digit arithmetic.
    rng = np.random.default_rng(seed)
    c = rng.uniform(0.5, 1.5, n_terms) * np.exp(2j * np.pi * rng.uniform(size=n_terms))
    w = c**states
    found = aberth_chain_roots(w, reach, order=states)
    ref = _mp_roots(w, reach)
    assert len(found.values) == chain_degree(n_terms, reach) == len(ref) == found.count
    assert isinstance(found, RootResult) and found.variable == "x" and not found.rigorous
    assert found.method == "chain-aberth" and "estimate" in found.summary()
    err = _match(found.values, ref)
    assert np.all(err <= 1e-12 * np.abs(found.values) + 1e-14)
    assert found.converged
    # the inclusion radii (estimates) contain the true error here
    assert np.all(err <= found.error_bounds)
    assert np.all(err <= found.details["newton_radius"])
    assert json.dumps(found.to_dict(), allow_nan=False)


def test_common_phase_rotates_the_roots() -> None:
    # Exact identity of the recurrence (derived: Q(e^{i t} x; e^{i t} w) = e^{i t n} Q(x; |w|)),
    # checked against the mpmath reference of the real chain.
    rng = np.random.default_rng(7)
    aw = rng.uniform(0.3, 1.7, 41)
    phase = np.exp(0.7j)
    found = aberth_chain_roots(aw * phase, reach=2)
    ref = _mp_roots(aw, 2) * phase
    assert np.max(_match(found.values, ref) / np.abs(found.values)) < 1e-13
    assert "+- 0.001" in found.details["start"]


def test_evaluate_chain_scaled_value_and_derivative() -> None:
    # Reference: mpmath polynomial evaluation of the exact coefficients.
    rng = np.random.default_rng(11)
    w = rng.normal(size=25) + 1j * rng.normal(size=25)
    x = np.array([0.3 + 0.2j, -1.1 + 2.0j, 5.0 - 0.5j])
    q, dq, err, log_scale = evaluate_chain(x, w, 2, order=2)
    coeffs = _mp_chain_coefficients(w, 2)
    with mpmath.workdps(40):
        for i, xi in enumerate(x):
            val = mpmath.polyval(coeffs, mpmath.mpc(xi))
            der = mpmath.polyval(
                [c * (len(coeffs) - 1 - j) for j, c in enumerate(coeffs[:-1])], mpmath.mpc(xi)
            )
            got = q[i] * np.exp(log_scale[i])
            assert abs(complex(val) - got) <= 1e-12 * abs(complex(val))
            assert abs(complex(der) - dq[i] * np.exp(log_scale[i])) <= 1e-11 * abs(complex(der))
            assert err[i] < 1e-10 * abs(q[i])


def test_large_chain_does_not_overflow() -> None:
    # 1500 terms: the expanded coefficients span hundreds of orders of magnitude; the scaled
    # recurrence must still give finite Newton corrections.  Reference: the sum rule
    # sum x_k = sum w_j (coefficient of x^{n-1} of the monic Q; common practice, Vieta).
    rng = np.random.default_rng(5)
    c = rng.uniform(0.5, 1.5, 1500) * np.exp(0.2j * rng.normal(size=1500))
    w = c**3
    found = aberth_chain_roots(w, reach=1, order=3)
    assert found.converged
    assert abs(found.values.sum() - w.sum()) < 1e-10 * np.abs(found.values).sum()


def test_bad_weights_are_refused() -> None:
    with pytest.raises(ValueError, match="weight 2 is"):
        aberth_chain_roots([1.0, 2.0, np.nan])
    with pytest.raises(ValueError, match="non-empty"):
        aberth_chain_roots([])
    with pytest.raises(ValueError, match="starting points"):
        aberth_chain_roots([1.0, 1.0, 1.0], start=np.ones(3))


def test_certified_complex_roots_against_mpmath() -> None:
    # Reference: mpmath.polyroots, 60 digits, on the same exact Gaussian-rational coefficients.
    re = [Fraction(1), Fraction(-3, 7), Fraction(2, 5), Fraction(1, 9)]
    im = [Fraction(0), Fraction(1, 3), Fraction(-1, 4), Fraction(2, 11)]
    found = certified_complex_roots(re, im)
    assert found.rigorous and found.method == "exact-certified" and found.variable == "y"
    roots, radii = found.values, found.error_bounds
    with mpmath.workdps(60):
        ref = mpmath.polyroots(
            [
                mpmath.mpc(
                    mpmath.mpf(a.numerator) / a.denominator, mpmath.mpf(b.numerator) / b.denominator
                )
                for a, b in zip(re[::-1], im[::-1], strict=True)
            ],
            maxsteps=200,
        )
        ref_c = np.array([complex(r) for r in ref])
    err = _match(roots, ref_c)
    assert np.all(err <= radii + 1e-16)
    assert np.all(radii < 1e-15)
    with pytest.raises(ValueError, match="repeated root"):
        certified_complex_roots([Fraction(1), Fraction(-2), Fraction(1)], [Fraction(0)] * 3)


def test_all_zero_weights_are_refused() -> None:
    with pytest.raises(ValueError, match="every weight is zero"):
        aberth_chain_roots([0.0, 0.0, 0.0])
