"""verify at every size: decisive checks for chains of 10^3 and 10^4 terms, and what fails them.

Outside references: the closed form ``eta_k = 2 cos(pi k / (M + 2))`` of the uniform reach-1
chain (the free-fermion Ising / XY chain with open ends; P. Fendley, J. Phys. A 52, 335002
(2019); from memory), numpy, and sympy's exact polynomial arithmetic for Newton's identities.
"""

from __future__ import annotations

import numpy as np
import pytest
import sympy

import freeladder as fl
from freeladder.checks import verification
from freeladder.checks.power_sums import compare_moments
from freeladder.roots.real import chain_back
from freeladder.spectra.spectrum import FreeSpectrum


def test_verify_of_a_1000_term_reach_2_chain_does_not_overflow() -> None:
    # the cost estimate multiplied a float by counts of 10^200: OverflowError before
    m = fl.exclusion_chain(1000, reach=2)
    parts = verification._Parts(fl.analyze(m))
    assert parts.pairwise_seconds() == float("inf")
    report = fl.verify(m)
    assert report.ok, report.problems
    text = fl.worked_calculation(fl.exclusion_chain(2000, reach=2)).to_script()
    assert "verif" in text.lower()


@pytest.mark.parametrize("terms", [1000, 10_000])
@pytest.mark.parametrize("reach", [1, 2, 3])
def test_large_chains_are_ok_with_a_decisive_check(terms: int, reach: int) -> None:
    rng = np.random.default_rng(terms + reach)
    couplings = rng.uniform(0.5, 1.5, terms).tolist()
    report = fl.verify(fl.exclusion_chain(terms, reach=reach, couplings=couplings))
    assert report.ok, report.problems
    hypotheses = report[verification.HYPOTHESES]
    assert hypotheses.passed and hypotheses.decisive and hypotheses.tolerance == 0.0
    moments = report[verification.POWER_SUMS]
    assert moments.passed and "-1..-8" in moments.detail
    assert report[verification.WINDOWS].passed


def _perturbed(index: int) -> object:
    """A tamper hook: quasi-energy ``index`` times (1 + 1e-8), everything else unchanged."""

    def tamper(sp: FreeSpectrum) -> FreeSpectrum:
        eta = np.array(sp.quasi_energies, copy=True)
        eta[index] *= 1 + 1e-8
        return FreeSpectrum(
            np.array(sp.roots),
            eta,
            np.array(sp.error_bounds),
            sp.constant,
            sp.states,
            sp.sites,
            sp.degeneracy,
            sp.degeneracy_reason,
            sp.complete,
            sp.provenance,
        )

    return tamper


@pytest.mark.parametrize("reach", [1, 2])
@pytest.mark.parametrize("where", ["smallest", "middle", "largest"])
def test_one_quasi_energy_off_by_1e_8_is_not_ok(
    reach: int, where: str, monkeypatch: pytest.MonkeyPatch
) -> None:
    m = fl.exclusion_chain(10_000, reach=reach)
    count = len(fl.free_spectrum(m).quasi_energies)
    index = {"smallest": 0, "middle": count // 2, "largest": count - 1}[where]
    monkeypatch.setattr(verification, "_tamper", _perturbed(index))
    report = fl.verify(m)
    assert not report.ok
    assert report[verification.POWER_SUMS].status == "FAILED"
    assert f"{verification.POWER_SUMS} FAILED" in report.problems
    monkeypatch.setattr(verification, "_tamper", None)
    assert fl.verify(m).ok


def test_moments_against_the_closed_form_of_the_uniform_chain() -> None:
    # eta_k = 2 cos(pi k / (M + 2)), k = 1 .. ceil(M / 2): the uniform reach-1 chain
    terms = 3001
    k = np.arange(1, (terms + 1) // 2 + 1)
    # written as 2 sin(pi (M + 2 - 2k) / (2 (M + 2))): full relative accuracy near zero
    eta = np.sort(2 * np.sin(np.pi * (terms + 2 - 2 * k) / (2 * (terms + 2))))
    bounds = 4e-16 * eta
    back = chain_back(1, terms)
    good = compare_moments([1.0] * terms, back, eta, bounds, 2)
    assert good.overlap and good.orders == (*range(1, 9), *range(-1, -9, -1))
    for index in (0, len(eta) // 3, len(eta) - 1):
        moved = eta.copy()
        moved[index] *= 1 + 1e-8
        assert not compare_moments([1.0] * terms, back, moved, bounds, 2).overlap


def test_newton_moments_match_sympy_on_a_small_disordered_chain() -> None:
    # sympy: the exact polynomial of a 9-term reach-2 chain with rational couplings, its roots
    # to 50 digits, and the power sums of x = 1 / y
    c = [sympy.Rational(p, 7) for p in (3, 5, 8, 4, 9, 6, 2, 10, 7)]
    y = sympy.Symbol("y")
    prefix = [sympy.Integer(1)] * 3  # P_{k-1}, P_{k-2}, P_{k-3}
    for ck in c:
        prefix = [sympy.expand(prefix[0] - y * ck**2 * prefix[2]), prefix[0], prefix[1]]
    roots = [complex(r) for r in sympy.Poly(prefix[0], y).nroots(n=50)]
    eta = np.sort(1 / np.sqrt(np.real(roots)))
    res = compare_moments([float(v) for v in c], chain_back(2, 9), eta, 1e-15 * eta, 2, 4)
    assert res.overlap and res.deviation < 1e-13
    assert not compare_moments(
        [float(v) for v in c], chain_back(2, 9), eta * (1 + 1e-9), 1e-15 * eta, 2, 4
    ).overlap


def test_the_hypotheses_fail_for_a_wrong_ordering_and_windows_see_a_claw() -> None:
    m = fl.exclusion_chain(40, reach=2)
    order = np.asarray(fl.chain_structure(m).order)
    ok = verification.ordering_hypotheses(m, order, chain_back(2, 40))
    assert ok.holds
    wrong = verification.ordering_hypotheses(m, order, chain_back(1, 40))
    assert not wrong.holds and "not the block" in wrong.detail
    # a claw: Z0 anticommutes with X0 X1, X0 X2, X0 X3, which commute with one another
    claw = fl.parse_model("Z0 + X0 Y1 + X0 Y2 + X0 Y3")
    forced = (np.arange(4), np.array([0, 1, 1, 1]))
    assert not verification.ordering_hypotheses(claw, *forced).holds
    check = verification.window_check(claw, ordering=forced)
    assert check.passed is False and "non-zero" in check.detail


def test_verify_time_grows_smoothly_and_shows_no_sweep_work() -> None:
    # the three charge identities are judged from alpha alone beyond the sweep's limit
    report = fl.verify(fl.exclusion_chain(3000, reach=2))
    for name in (verification.H_CHARGES, verification.PAIRS, "T(u) T(-u) = P(u^2)"):
        assert report[name].status == "not run" and report[name].seconds < 0.5
    assert report.ok
