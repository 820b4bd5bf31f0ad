"""Complex chain roots (Aberth-Ehrlich on the recurrence) against mpmath, numpy and python-flint.

Outside references: mpmath.polyroots at 60 digits on coefficients expanded in 80-digit
arithmetic; numpy.linalg.eigvals of a dense tridiagonal matrix whose characteristic polynomial
is the reach-1 chain polynomial (common practice: the three-term recurrence of its leading
minors); numpy.linalg.eigvals of the dense Hamiltonian of small clock models (exact
diagonalization); python-flint certified roots.
"""

from __future__ import annotations

import json
from fractions import Fraction

import mpmath
import numpy as np
import pytest
from scipy.optimize import linear_sum_assignment

import freeladder as fl
from freeladder.roots.complex import (
    aberth_chain_roots,
    certified_complex_roots,
    evaluate_chain,
)
from freeladder.roots.real import chain_back, chain_root_count
from freeladder.roots.result import RootTable


def _mp_chain_coefficients(w: np.ndarray, back: np.ndarray) -> list:
    """Descending coefficients of Q(x) = x^n P(1/x), built in 80-digit mpmath from the
    recurrence P_k = P_{k-1} - y w_k P_{k-back[k]-1} (the floats taken as given)."""
    with mpmath.workdps(80):
        polys = [[mpmath.mpc(1)]]  # polys[k + 1] = ascending coefficients of P_k
        for k, wk in enumerate(w):
            a, b = polys[-1], polys[k - int(back[k])]
            shifted = [mpmath.mpc(0)] + [-mpmath.mpc(wk) * c for c in b]
            new = [
                (a[i] if i < len(a) else 0) + (shifted[i] if i < len(shifted) else 0)
                for i in range(max(len(a), len(shifted)))
            ]
            polys.append(new)
        return list(polys[-1])  # ascending in y = descending in x


def _mp_roots(w: np.ndarray, reach) -> np.ndarray:
    """Reciprocal roots x = 1 / y by mpmath.polyroots at 60 digits (reference library)."""
    coeffs = _mp_chain_coefficients(w, chain_back(reach, len(w)))
    with mpmath.workdps(60):
        found = mpmath.polyroots(coeffs, maxsteps=400, extraprec=400)
        return np.array([complex(r) for r in found])


def _match(a: np.ndarray, b: np.ndarray) -> np.ndarray:
    """Distance from each a to its partner in b (optimal one-to-one assignment)."""
    cost = np.abs(a[:, None] - b[None, :])
    rows, cols = linear_sum_assignment(cost)
    out = np.empty(a.size)
    out[rows] = cost[rows, cols]
    return out


def _random_back(size: int, rng: np.random.Generator, top: int = 3) -> np.ndarray:
    """Back-reaches of a random indifference order: first neighbours non-decreasing."""
    first = np.maximum.accumulate(np.maximum(0, np.arange(size) - rng.integers(0, top + 1, size)))
    return np.arange(size) - first


@pytest.mark.parametrize(
    ("n_terms", "reach", "states", "seed"),
    [
        (30, 1, 3, 1),
        (31, 2, 3, 2),
        (24, 1, 4, 3),
        (40, 3, 2, 4),
        (36, None, 3, 5),
        (45, None, 5, 6),
    ],
)
def test_complex_chain_against_mpmath(n_terms, reach, states, seed) -> None:
    # Reference: mpmath.polyroots at 60 digits on coefficients built in 80-digit arithmetic.
    rng = np.random.default_rng(seed)
    c = rng.uniform(0.5, 1.5, n_terms) * np.exp(2j * np.pi * rng.uniform(size=n_terms))
    w = c**states
    if reach is None:  # variable reach
        reach = _random_back(n_terms, rng)
    found = aberth_chain_roots(w, reach, order=states)
    ref = _mp_roots(w, reach)
    assert len(found.values) == chain_root_count(n_terms, reach) == len(ref) == found.count
    assert isinstance(found, RootTable) and found.variable == "x" and not found.rigorous
    assert found.method == "chain-aberth" and "estimate" in found.summary()
    err = _match(found.values, ref)
    assert np.all(err <= 1e-12 * np.abs(found.values) + 1e-14)
    assert found.converged
    # the inclusion radii (estimates) contain the true error here
    assert np.all(err <= found.error_bounds)
    assert np.all(err <= found.details["newton_radius"])
    assert found.details["max_residual"] < 1e-13
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


def test_evaluate_chain_value_and_derivative() -> None:
    # Reference: mpmath polynomial evaluation of the exact coefficients.
    rng = np.random.default_rng(11)
    w = rng.normal(size=25) + 1j * rng.normal(size=25)
    back = _random_back(25, rng)
    x = np.array([0.3 + 0.2j, -1.1 + 2.0j, 5.0 - 0.5j])
    for reach in (2, back):
        vals = evaluate_chain(x, w, reach, order=2)
        coeffs = _mp_chain_coefficients(w, chain_back(reach, 25))
        with mpmath.workdps(40):
            for i, xi in enumerate(x):
                val = complex(mpmath.polyval(coeffs, mpmath.mpc(xi)))
                der = complex(
                    mpmath.polyval(
                        [c * (len(coeffs) - 1 - j) for j, c in enumerate(coeffs[:-1])],
                        mpmath.mpc(xi),
                    )
                )
                got = np.exp(vals.log_abs[i]) * vals.phase[i]
                assert abs(val - got) <= 1e-12 * abs(val)
                assert abs(der / val - vals.dlog[i]) <= 1e-11 * abs(der / val)
                assert vals.rel_err[i] < 1e-10
                # P~ / |P| >= 1 always (sum of moduli of the monomials)
                assert vals.log_cond[i] >= -1e-12


def test_reach_one_against_dense_tridiagonal_eigenvalues() -> None:
    # Reference: numpy.linalg.eigvals of the (M+1) x (M+1) complex symmetric tridiagonal
    # matrix with zero diagonal and off-diagonals sqrt(w_k): its leading minors obey
    # q_k = lam q_{k-1} - w_k q_{k-2}, q_k(lam) = lam^{k+1} P_k(lam^-2) (common practice), so
    # its non-zero eigenvalues come in pairs +-sqrt(x).
    rng = np.random.default_rng(3)
    m = 400
    c = rng.uniform(0.5, 1.5, m) * np.exp(2j * np.pi * rng.uniform(size=m))
    w = c**3
    found = aberth_chain_roots(w, 1, order=3)
    off = np.sqrt(w)
    mat = np.diag(off, 1) + np.diag(off, -1)
    lam = np.linalg.eigvals(mat)
    lam = lam[np.argsort(-np.abs(lam))][: 2 * found.count]
    x = lam**2
    x = x[np.argsort(np.abs(x))][::2]  # one of each pair
    err = _match(found.values, x)
    assert found.converged
    assert np.max(err / np.abs(found.values)) < 1e-9


def test_large_chain_sum_rule_and_given_start() -> None:
    # 1500 terms: the expanded coefficients span hundreds of orders of magnitude.  Reference:
    # the sum rule sum x_k = sum w_j (coefficient of x^{n-1} of the monic Q; common practice,
    # Vieta), and an independent iteration (plain Aberth from starts on the moduli, no divide
    # and conquer) that must reach the same roots.
    rng = np.random.default_rng(5)
    c = rng.uniform(0.5, 1.5, 1500) * np.exp(0.2j * rng.normal(size=1500))
    w = c**3
    found = aberth_chain_roots(w, reach=1, order=3)
    assert found.converged
    assert abs(found.values.sum() - w.sum()) < 1e-10 * np.abs(found.values).sum()
    start = np.abs(found.values) * np.exp(1j * np.angle(w).mean())
    other = aberth_chain_roots(w, reach=1, order=3, start=start)
    assert other.converged and other.details["start"] == "given"
    assert np.max(_match(found.values, other.values) / np.abs(found.values)) < 1e-11


@pytest.mark.parametrize(("reach", "seed"), [(1, 1), (2, 2), (None, 3), (None, 4)])
def test_lowest_against_all_roots(reach, seed) -> None:
    # Reference: the all-roots result (itself checked against mpmath and numpy above) and, on
    # the 60-term case, mpmath.polyroots.
    rng = np.random.default_rng(seed)
    for size in (60, 3000):
        c = rng.uniform(0.5, 1.5, size) * np.exp(2j * np.pi * rng.uniform(size=size))
        back = _random_back(size, rng) if reach is None else reach
        every = aberth_chain_roots(c**3, back, order=3)
        for k in (1, 5):
            few = aberth_chain_roots(c**3, back, order=3, lowest=k)
            assert few.converged and few.count == every.count and few.values.size == k
            assert "smallest" in few.message and "estimate" in few.message
            assert "failed its check" not in few.message
            err = np.abs(few.values - every.values[:k])
            assert np.all(err <= 1e-12 * np.abs(every.values[:k]))
            assert np.all(err <= few.error_bounds + every.error_bounds[:k])
            assert json.dumps(few.to_dict(), allow_nan=False)
        if size == 60:
            ref = _mp_roots(c**3, back)
            ref = ref[np.argsort(np.abs(ref))]
            assert np.allclose(few.values, ref[:5], rtol=1e-12, atol=0)


def test_zero_weights_drop_out() -> None:
    # A zero weight removes its term: the roots equal those of the chain without it, with the
    # back-reaches recounted (reference: mpmath on the reduced chain).
    rng = np.random.default_rng(9)
    w = rng.normal(size=20) + 1j * rng.normal(size=20)
    w[[0, 7, 8]] = 0.0
    back = chain_back(2, 20)
    found = aberth_chain_roots(w, back)
    keep = w != 0
    kept_before = np.concatenate([[0], np.cumsum(keep)])
    k = np.arange(20)
    reduced = (kept_before[k] - kept_before[k - back])[keep]
    ref = _mp_roots(w[keep], reduced)
    assert found.count == len(ref)
    assert np.max(_match(found.values, ref) / np.abs(found.values)) < 1e-12


def test_bad_input_is_refused() -> None:
    with pytest.raises(ValueError, match="weight 2 is"):
        aberth_chain_roots([1.0, 2.0, np.nan])
    with pytest.raises(ValueError, match="non-empty"):
        aberth_chain_roots([])
    with pytest.raises(ValueError, match="starting points"):
        aberth_chain_roots([1.0, 1.0, 1.0], start=np.ones(3))
    with pytest.raises(ValueError, match="back-reach 2 is 3"):
        aberth_chain_roots([1.0, 1.0, 1.0], np.array([0, 1, 3]))
    with pytest.raises(ValueError, match="1-d array of 3 entries"):
        aberth_chain_roots([1.0, 1.0, 1.0], np.array([0, 1]))
    with pytest.raises(ValueError, match="reach must be"):
        aberth_chain_roots([1.0, 1.0, 1.0], 0)
    with pytest.raises(ValueError, match="lowest must be"):
        aberth_chain_roots([1.0, 1.0, 1.0], lowest=0)
    with pytest.raises(ValueError, match="every weight is zero"):
        aberth_chain_roots([0.0, 0.0, 0.0])


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
    # (y - i)^2 = -1 - 2i y + y^2: a repeated root with non-real coefficients is split off
    # over Q(i) (sympy's sqf_list agrees: (y - i) with multiplicity 2) ...
    gauss = certified_complex_roots([Fraction(-1), Fraction(0), Fraction(1)], [0, Fraction(-2), 0])
    assert list(gauss.multiplicities) == [2] and gauss.count == 2
    assert abs(gauss.values[0] - 1j) <= gauss.error_bounds[0]
    # ... and real coefficients likewise: (1 - y)^2 counts twice.
    double = certified_complex_roots([Fraction(1), Fraction(-2), Fraction(1)], [Fraction(0)] * 3)
    assert list(double.multiplicities) == [2] and double.count == 2
    assert abs(double.values[0] - 1) <= double.error_bounds[0]


# -- through fl.free_spectrum: variable-range clock chains ---------------------------------------
def _variable_range_chain(reaches, couplings, states, rng, offset=0, sites=None):
    """g_j = X_j Z_{j+1} ... Z_{j + p_j} (ends j + p_j non-decreasing: an oriented indifference
    frustration graph, F. C. Alcaraz, arXiv:2512.08011 (2025)); terms on shuffled sites."""
    if sites is None:
        sites = list(rng.permutation(len(reaches) + max(reaches)))
    terms = []
    for j, p in enumerate(reaches):
        factors = [(sites[j], 1, 0)] + [(sites[j + d], 0, 1) for d in range(1, p + 1)]
        terms.append((couplings[j], fl.make_string(states, factors)))
    return terms


def _random_reaches(size: int, rng: np.random.Generator) -> list[int]:
    while True:
        reaches = [int(v) for v in rng.integers(1, 3, size)]
        ends = [j + p for j, p in enumerate(reaches)]
        if ends == sorted(ends) and len(set(reaches)) > 1:
            return reaches


def _levels_vs_exact(m: fl.Model, sp) -> float:
    # Reference: numpy.linalg.eigvals of the dense Hamiltonian (exact diagonalization); the
    # non-Hermitian levels are matched as multisets by an optimal assignment.
    table = sp.levels(None)
    free = np.repeat(np.asarray(table.energies), table.multiplicity)
    exact = np.linalg.eigvals(m.to_sparse().toarray())
    assert free.size == exact.size
    return float(np.max(_match(free, exact)))


@pytest.mark.parametrize(("states", "n_sites"), [(3, 6), (4, 5), (5, 4)])
def test_random_variable_range_clock_chains_against_exact_diagonalization(states, n_sites):
    # Free-parafermion spectrum of an oriented indifference graph: R. L. Mann, S. J. Elman,
    # D. R. Wood and A. Chapman, arXiv:2408.09684 (2024).
    rng = np.random.default_rng(100 + states)
    for _ in range(3):
        reaches = _random_reaches(n_sites - 2, rng)
        size = len(reaches)
        sites = list(rng.permutation(size + max(reaches)))[:n_sites]
        couplings = rng.uniform(0.5, 1.5, size) * np.exp(2j * np.pi * rng.uniform(size=size))
        terms = _variable_range_chain(reaches, couplings, states, rng, sites=sites)
        terms = [terms[k] for k in rng.permutation(size)]  # random relabelling of the terms
        m = fl.Model.from_terms(terms, states=states)
        verdict = fl.classify(m)
        assert verdict.kind == "hidden-free" and verdict.guarantee.proven
        sp = fl.free_spectrum(m)
        assert sp.provenance.finder["root_method"] == "chain-aberth"
        assert _levels_vs_exact(m, sp) < 1e-8
        low = fl.free_spectrum(m, lowest=1)
        assert np.allclose(low.quasi_energies, sp.quasi_energies[:1], rtol=1e-12)
        assert json.dumps(sp.to_dict(), allow_nan=False)


def test_two_components_concatenated_against_exact_diagonalization():
    # Two variable-range chains on disjoint sites: the recurrence starts afresh (back 0) at the
    # second component.  Reference: numpy dense eigenvalues.
    rng = np.random.default_rng(77)
    sites = list(rng.permutation(6))
    a = _variable_range_chain([2, 1], rng.uniform(0.5, 1.5, 2) * np.exp(1j), 3, rng, sites=sites)
    b = _variable_range_chain(
        [1, 1], rng.uniform(0.5, 1.5, 2) * np.exp(2j), 3, rng, sites=sites[3:]
    )
    m = fl.Model.from_terms(a + b, states=3)
    assert fl.chain_structure(m) is None and len(fl.classify(m).components) == 2
    sp = fl.free_spectrum(m)
    assert sp.provenance.finder["root_method"] == "chain-aberth"
    assert _levels_vs_exact(m, sp) < 1e-8
