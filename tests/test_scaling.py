"""Finite-size scaling: dynamical exponents and the energy density against published values.

Each exponent check asserts two things: the published value lies within 0.03 of the fit, and
within three of the fit's own error bars (so the error bar is honest, not just the value), with
an error bar below 0.03 (so the first check is not vacuous).
"""

from __future__ import annotations

import json
import math
import warnings
from collections.abc import Callable

import numpy as np
import pytest
from scipy.linalg import eigvalsh_tridiagonal

import freeladder as fl


def _geometric(low: int, high: int, count: int, period: int) -> list[int]:
    """``count`` sizes from low to high, roughly geometric, all multiples of ``period``."""
    return sorted({int(s) // period * period for s in np.geomspace(low, high, count)})


def _check_exponent(result: fl.GapScaling, expected: float) -> None:
    assert result.z_error < 0.03, result
    assert abs(result.z - expected) < 0.03, result
    assert abs(result.z - expected) <= 3 * result.z_error, result


def test_uniform_ising_z_is_one() -> None:
    # z = 1 for the critical transverse-field Ising chain: P. Pfeuty, Ann. Phys. 57, 79 (1970).
    sizes = [100, 200, 400, 800, 1600, 3200, 6400, 10000]
    r = fl.gap_scaling(lambda n: fl.ising_chain(n), sizes)
    _check_exponent(r, 1.0)
    assert list(r.data["size"]) == sizes
    assert set(r.data["terms"]) == {2 * n - 1 for n in sizes}
    assert len(r.classes) == 1  # 2 L - 1 terms: always odd, one residue class


@pytest.mark.parametrize(
    ("reach", "states", "expected", "source"),
    [
        # P. Fendley, J. Phys. A 52, 335002 (2019): z = 3/2 for the uniform reach-2 chain.
        (2, 2, 1.5, "Fendley 2019"),
        # F. C. Alcaraz and R. A. Pimenta, Phys. Rev. B 102, 121101(R) (2020):
        # z = (p + 1) / N at the uniform point of the reach-p Z(N) chains.
        (1, 3, 2 / 3, "Alcaraz-Pimenta 2020"),
        (2, 3, 1.0, "Alcaraz-Pimenta 2020"),
        (1, 4, 0.5, "Alcaraz-Pimenta 2020"),
        (3, 2, 2.0, "Alcaraz-Pimenta 2020"),
    ],
)
def test_uniform_exclusion_chain_exponents(
    reach: int, states: int, expected: float, source: str
) -> None:
    # Every residue class of M mod (p + 1), each fitted on its own (residue="auto"), sizes
    # from 300 to 10^4 terms.  Measured: every class gives the published z to 0.001 or better
    # (the classes differ in the amplitude only, by factors up to 6).
    base = _geometric(300, 10000 - reach, 7, reach + 1)
    sizes = [b + r for b in base for r in range(reach + 1)]
    assert max(sizes) <= 10000
    with pytest.warns(fl.MixedResidueWarning):
        r = fl.gap_scaling(lambda m: fl.exclusion_chain(m, reach=reach, states=states), sizes)
    assert set(r.classes) == set(range(reach + 1))
    for fit in r.classes.values():
        assert fit.error < 0.03, r
        assert abs(-fit.exponent - expected) < 0.03, r
        assert abs(-fit.exponent - expected) <= 3 * fit.error, r
    _check_exponent(r, expected)


@pytest.mark.parametrize(("reach", "states"), [(1, 3), (2, 4)])
def test_real_root_route_matches_free_spectrum_for_clock_chains(reach: int, states: int) -> None:
    # For N > 2 with uniform couplings the smallest quasi-energy is taken from the largest real
    # root of the chain recurrence; free_spectrum's complex (Aberth) path must agree.
    m = fl.exclusion_chain(150, reach=reach, states=states)
    eta, bound, route = fl.smallest_quasi_energy(m)
    ref = fl.free_spectrum(m, lowest=1)
    assert "real root" in route
    assert eta == pytest.approx(abs(ref.quasi_energies[0]), rel=1e-10)
    assert bound < 1e-10 * eta
    # The clock chain -sum X - sum Z Z^dagger has weights (-1)^N: one common phase as well.
    clock = fl.clock_chain(60, states=3)
    eta_c, _, _ = fl.smallest_quasi_energy(clock)
    assert eta_c == pytest.approx(abs(fl.free_spectrum(clock, lowest=1).quasi_energies[0]), 1e-10)


def test_mixed_residue_classes_are_fitted_apart_and_warned() -> None:
    # Observed numerically (no source): the low spectrum of reach-p chains depends on
    # M mod (p + 1); each class must still give z = 3/2 (Fendley 2019).
    sizes = [int(s) for s in np.geomspace(300, 10000, 30)]
    with pytest.warns(fl.MixedResidueWarning, match="residue classes"):
        r = fl.gap_scaling(lambda m: fl.exclusion_chain(m, reach=2), sizes)
    assert set(r.classes) == {0, 1, 2}
    for fit in r.classes.values():
        assert abs(-fit.exponent - 1.5) < 0.03
    _check_exponent(r, 1.5)
    assert math.isnan(r.amplitude)
    with pytest.warns(fl.MixedResidueWarning, match="biased"):
        pooled = fl.gap_scaling(lambda m: fl.exclusion_chain(m, reach=2), sizes, residue="pooled")
    assert set(pooled.classes) == {None}
    only = fl.gap_scaling(lambda m: fl.exclusion_chain(m, reach=2), sizes, residue=1)
    assert set(only.data["residue"]) == {1}


def _staggered(a: float) -> Callable[[int], fl.Model]:
    """Reach-2 chain of M terms with couplings (a, 1, 1) repeated from the first term."""
    return lambda m: fl.exclusion_chain(m, reach=2, couplings=fl.periodic_couplings(m, (a, 1, 1)))


# Staggered reach-2 chain, period-3 pattern (a, 1, 1).  Observed numerically here, no published
# source: the gap closes like 1/size for a = 0.8 and stays open for a = 1.2.  Per residue class
# of M mod 3 (measured, sizes 300..9600):
#   a = 1.2: all three classes, z = 0.00 (|eta_1| -> 0.08766, the same limit in every class);
#   a = 0.8, M = 3k and M = 3k + 2: z = 1.000 (amplitudes differ by a factor of about 2);
#   a = 0.8, M = 3k + 1: one isolated mode with |eta_1| ~ a^(k+1) M^(-1/2), exponentially
#     small, below one bulk of quasi-energies that closes like 1/M (z = 1).
# Why class 1 differs: the polynomial is P(y) = sum over sets of pairwise independent terms
# (indices at least 3 apart) of (-y)^|set| times their weights c_j^2 (P. Fendley, J. Phys. A 52,
# 335002 (2019)).  For M = 3k + 1 the largest such set has k + 1 terms and is unique, the
# a-terms 0, 3, ..., 3k, so the top coefficient is (-1)^(k+1) a^(2(k+1)) and, with
# P(y) = prod (1 - y / y_j), the product of all quasi-energies eta_j = y_j^(-1/2) is exactly
# a^(k+1).  For M = 3k or 3k + 2 the largest sets are not unique and contain 1-terms.  The
# product of the other k quasi-energies grows only like M^(1/2) (observed), so for a < 1 the
# smallest carries the factor a^(k+1) and vanishes as a -> 0 (whether that mode sits at the
# chain's ends was not checked).
@pytest.mark.parametrize("a", [0.8, 1.2])
def test_staggered_reach2_chain_every_residue_class(a: float) -> None:
    if a > 1:
        sizes = [m + r for m in (300, 600, 1200, 2400, 4800, 9600) for r in (0, 1, 2)]
    else:  # class 1 is tested below: its gap leaves float64 range beyond about 4700 terms
        sizes = [m + r for m in (300, 600, 1200, 2400, 4800, 9600) for r in (0, 2)]
    with pytest.warns(fl.MixedResidueWarning):
        r = fl.gap_scaling(_staggered(a), sizes, residue="auto")
    assert set(r.classes) == ({0, 1, 2} if a > 1 else {0, 2})
    for fit in r.classes.values():
        assert fit.error < 0.03, r
        assert abs(-fit.exponent - (1.0 if a < 1 else 0.0)) < 0.03, r
        assert abs(-fit.exponent - (1.0 if a < 1 else 0.0)) <= 3 * fit.error, r
    _check_exponent(r, 1.0 if a < 1 else 0.0)
    if a > 1:
        gaps = r.data["gap"].to_numpy()
        assert gaps.min() > 0.5 * gaps.max()  # the fit says z = 0; the data agree


def test_staggered_reach2_chain_isolated_mode_of_residue_class_1() -> None:
    a = 0.8
    # The exact product (see above) checked on all roots: sum of ln y_j = -2 (k + 1) ln a.
    for k in (20, 80):
        c = np.array(fl.periodic_couplings(3 * k + 1, (a, 1, 1)), dtype=float)
        roots = fl.chain_real_roots(c**2, 2)
        assert roots.converged
        assert np.sum(np.log(roots.values)) == pytest.approx(-2 * (k + 1) * math.log(a), 1e-12)
    # The smallest quasi-energy: |eta_1| a^-(k+1) ~ M^-1/2 (observed numerically, no source);
    # the second smallest (the bulk) closes like 1/M, as in the other classes.
    sizes = np.array([3 * k + 1 for k in (100, 200, 400, 800, 1280)])
    r = fl.gap_scaling(_staggered(a), sizes, residue=1)
    assert list(r.data["terms"]) == list(sizes)
    scaled = r.data["gap"].to_numpy() / a ** ((sizes - 1) // 3 + 1)
    isolated = fl.power_law_fit(sizes, scaled)
    assert isolated.error < 0.03 and abs(isolated.exponent + 0.5) <= 3 * isolated.error
    second = []
    for m in sizes:
        c = np.array(fl.periodic_couplings(int(m), (a, 1, 1)), dtype=float)
        found = fl.chain_real_roots(c**2, 2, lowest=2)
        assert found.converged
        eta = np.sort(found.values**-0.5)
        assert eta[0] == pytest.approx(r.data["gap"][list(sizes).index(m)], rel=1e-10)
        second.append(eta[1])
    bulk = fl.power_law_fit(sizes, second)
    assert bulk.error < 0.03 and abs(bulk.exponent + 1.0) <= 3 * bulk.error


def test_energy_density_of_critical_ising_chain() -> None:
    # E_0 / L -> -4/pi for H = -sum X_i - sum Z_i Z_{i+1}: P. Pfeuty, Ann. Phys. 57, 79 (1970).
    r = fl.energy_density(lambda n: fl.ising_chain(n), [64, 128, 256, 512, 1024, 2048])
    assert r.error < 1e-6  # measured: 1.5e-7, and e_inf + 4/pi = 7e-9
    assert abs(r.value + 4 / math.pi) <= 3 * r.error, (r, r.variants)
    assert (r.data["sites"] == r.data["size"]).all()
    assert len(r.coefficients) == 3


def test_power_law_fit_recovers_a_known_law() -> None:
    # Worked example: exact values of 3 L^-1.25 (1 + 0.7 / L) give back e = -1.25, b = 0.7.
    sizes = np.array([10, 20, 40, 80, 160, 320], dtype=float)
    fit = fl.power_law_fit(sizes, 3 * sizes**-1.25 * (1 + 0.7 / sizes))
    assert fit.exponent == pytest.approx(-1.25, abs=1e-9)
    assert fit.correction == pytest.approx(0.7, abs=1e-7)
    assert fit.amplitude == pytest.approx(3.0, rel=1e-9)
    # The plain power law cannot fit it: its variant differs, and the error bar says so.
    assert fit.variants["no correction, largest half"] != pytest.approx(-1.25, abs=1e-4)
    assert fit.error >= abs(fit.variants["no correction, largest half"] + 1.25)
    off = fl.power_law_fit(sizes, 2 * sizes**0.5 - 4, correction="offset")
    assert off.exponent == pytest.approx(0.5, abs=1e-7)
    assert off.correction == pytest.approx(-4, abs=1e-5)


def test_results_are_json_ready() -> None:
    r = fl.gap_scaling(lambda n: fl.ising_chain(n), [20, 40, 80, 160, 320])
    e = fl.energy_density(lambda n: fl.ising_chain(n), [20, 40, 80, 160, 320])
    for obj in (r, e, r.classes[1]):
        text = json.dumps(obj.to_dict(), allow_nan=False)
        assert text.startswith("{")
    assert json.loads(json.dumps(r.to_dict()))["data"]["size"] == [20, 40, 80, 160, 320]
    assert r.residuals.shape == (5,)


def test_bad_input_is_refused() -> None:
    with pytest.raises(ValueError, match="at least 2 sizes"):
        fl.gap_scaling(lambda n: fl.ising_chain(n), [10])
    with pytest.raises(ValueError, match="residue"):
        fl.gap_scaling(lambda n: fl.ising_chain(n), [10, 20], residue="mine")
    with pytest.raises(TypeError, match="not a freeladder Model"):
        fl.gap_scaling(lambda n: "X0 Z1", [10, 20])  # type: ignore[arg-type,return-value]
    with pytest.raises(ValueError, match="residue class 0"):
        fl.gap_scaling(lambda n: fl.ising_chain(n), [10, 20], residue=0)
    with pytest.raises(ValueError, match="at least 3 sizes"):
        fl.energy_density(lambda n: fl.ising_chain(n), [10, 20])
    with pytest.raises(ValueError, match="values > 0"):
        fl.power_law_fit([1, 2, 3], [1.0, -1.0, 2.0])
    with pytest.raises(ValueError, match="correction"):
        fl.power_law_fit([1, 2, 3], [1.0, 1.0, 2.0], correction="quadratic")


def test_couplings_of_several_phases_go_through_free_spectrum() -> None:
    # Weights c_j^2 of several phases have complex roots: the real route must not be taken.
    c = np.exp(1j * np.linspace(0.1, 1.3, 9))
    m = fl.exclusion_chain(9, reach=2, couplings=c)
    assert fl.chain_quasi_energy(c, 2, 2) is None
    eta, bound, route = fl.smallest_quasi_energy(m)
    assert route.startswith("free_spectrum")
    assert eta == pytest.approx(abs(fl.free_spectrum(m, lowest=1).quasi_energies[0]), rel=1e-12)
    assert bound < 1e-8


def test_no_warning_for_one_class() -> None:
    with warnings.catch_warnings():
        warnings.simplefilter("error", fl.MixedResidueWarning)
        fl.gap_scaling(lambda m: fl.exclusion_chain(m, reach=2), [30, 60, 90, 120])


def test_once_stalled_largest_root_and_gaps_below_float64() -> None:
    # A random reach-1 chain (the random Ising chain of 4096 sites) whose smallest quasi-energy,
    # about e^-189, once made the root finder's Laguerre iteration stall (y near 1e164, where
    # (P'/P)^2 was subnormal).  Reference: LAPACK's bisection (dstebz through scipy) on the
    # zero-diagonal tridiagonal matrix with off-diagonals c, whose positive eigenvalues are the
    # quasi-energies (P. Pfeuty, Ann. Phys. 57, 79 (1970)); tol = 1e-300 asks for full relative
    # accuracy (J. Demmel and W. Kahan, SIAM J. Sci. Stat. Comput. 11, 873 (1990), from memory).
    rng = np.random.default_rng(np.random.SeedSequence(2, spawn_key=(112,)))
    c = fl.disorder_couplings(8191, "box", low=0.0, high=1.0, rng=rng)
    diagonal = np.zeros(c.size + 1)
    ref = eigvalsh_tridiagonal(diagonal, c, select="i", select_range=(4096, 4096), tol=1e-300)[0]
    assert 1e-83 < ref < 1e-82
    eta, bound, _ = fl.chain_quasi_energy(c, 1)  # type: ignore[misc]
    assert abs(eta - ref) <= bound + 1e-14 * ref and bound < 1e-10 * eta
    log_eta, log_bound, _ = fl.chain_log_quasi_energy(c, 1)  # type: ignore[misc]
    assert abs(log_eta - np.log(ref)) <= log_bound + 1e-13
    # A root y beyond float64: the class-1 staggered chain of 4801 terms (see above), whose
    # smallest quasi-energy is about e^-361, so y = eta^-2 is about e^722 > 1.8e308.
    # Reference: the product of all quasi-energies is exactly a^(k+1) for M = 3k + 1 (Vieta:
    # the top coefficient of the polynomial is the weight of the unique largest set of terms
    # pairwise more than 2 apart, the a-terms), so the sum of all ln eta is (k + 1) ln a.
    far = np.array(fl.periodic_couplings(4801, (0.8, 1, 1)), dtype=float)
    log_eta, log_bound, _ = fl.chain_log_quasi_energy(far, 2)  # type: ignore[misc]
    assert -400 < log_eta < -300 and log_bound < 1e-10
    eta, _, _ = fl.chain_quasi_energy(far, 2)  # type: ignore[misc]
    assert np.log(eta) == pytest.approx(log_eta, abs=1e-12)
    logs, _ = fl.chain_real_roots(far**2, 2).log_quasi_energies(2)
    assert float(np.sum(logs)) == pytest.approx(1601 * np.log(0.8), abs=1e-9)
    assert float(np.min(logs)) == pytest.approx(log_eta, abs=1e-12)


def test_disorder_gap_below_float64_is_a_logarithm() -> None:
    # Strong disorder (c = u^30): the random Ising chain of 2001 sites has ln gap of about
    # -2600.  The row carries NaN for the gap and the exact logarithm.  Reference: for
    # M = 2L - 1 terms the top coefficient of the polynomial is the product of the fields
    # (the unique largest independent set), so the sum of all ln eta is the sum of ln h
    # (Vieta; common practice).
    row = fl.disordered_chain_gap(4001, reach=1, distribution="power", delta=30.0, rng=0)
    assert math.isnan(row["gap"]) and math.isnan(row["gap_error"]) and row["log_gap"] < -1000
    c = fl.disorder_couplings(4001, "power", delta=30.0, rng=0)
    logs, _ = fl.chain_real_roots(c**2, 1).log_quasi_energies(2)
    assert float(np.min(logs)) == pytest.approx(row["log_gap"], abs=1e-10)
    assert float(np.sum(logs)) == pytest.approx(float(np.sum(np.log(c[0::2]))), rel=1e-12)
    with pytest.raises(ValueError, match="log_gap"):
        fl.log_gap_statistics(
            __import__("pandas").DataFrame({"size": [1, 1], "gap": [row["gap"], 0.5]})
        )
