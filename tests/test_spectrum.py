"""free_spectrum / FreeSpectrum against published results and exact diagonalization."""

from __future__ import annotations

import mpmath
import numpy as np
import pytest
from scipy.optimize import linear_sum_assignment

import freeladder as fl
from freeladder.spectra.spectrum import LEVEL_LIMIT, FreeSpectrum, free_spectrum


def _assign(a: np.ndarray, b: np.ndarray) -> float:
    """Largest distance of the best one-to-one matching of two multisets of complex numbers."""
    d = np.abs(np.asarray(a, dtype=complex)[:, None] - np.asarray(b, dtype=complex)[None, :])
    r, c = linear_sum_assignment(d)
    return float(d[r, c].max())


@pytest.mark.parametrize("n_terms", [1, 2, 7, 40, 301])
def test_uniform_ising_closed_form(n_terms: int) -> None:
    # eta_k = 2 cos(pi k / (M + 2)): eigenvalues of the uniform tridiagonal Toeplitz matrix,
    # i.e. Chebyshev zeros of the uniform chain recurrence (common practice).
    sp = free_spectrum(fl.exclusion_chain(n_terms))
    k = np.arange(1, (n_terms + 1) // 2 + 1)
    ref = np.sort(2.0 * np.cos(np.pi * k / (n_terms + 2)))
    assert np.allclose(sp.quasi_energies, ref, rtol=1e-13, atol=0)
    assert np.all(np.abs(sp.quasi_energies - ref) <= sp.error_bounds + 1e-15)
    assert sp.provenance.guaranteed
    assert sp.degeneracy == 2 ** (n_terms + 1 - len(k))


def _pfeuty(n_sites: int, lam: float) -> list[mpmath.mpf]:
    """Quasi-energies of H = -sum X_i - lam sum Z_i Z_{i+1} (open, L sites), at 50 digits.

    P. Pfeuty, Ann. Phys. 57, 79 (1970): eta = sqrt(1 + lam^2 + 2 lam cos k) with
    sin(k (L + 1)) + lam sin(k L) = 0, k in (0, pi); for lam > 1 + 1/L one solution is
    k = pi + i v with sinh(v (L + 1)) = lam sinh(v L) (the edge mode),
    eta^2 = 1 + lam^2 - 2 lam cosh v.
    """
    out = []
    with mpmath.workdps(50):
        lam_m = mpmath.mpf(lam)

        def f(k: mpmath.mpf) -> mpmath.mpf:
            return mpmath.sin(k * (n_sites + 1)) + lam_m * mpmath.sin(k * n_sites)

        grid = [mpmath.pi * j / (40 * n_sites) for j in range(1, 40 * n_sites)]
        for a, b in zip(grid[:-1], grid[1:], strict=True):
            if f(a) * f(b) < 0:
                k = mpmath.findroot(f, (a, b), solver="anderson")
                out.append(mpmath.sqrt(1 + lam_m**2 + 2 * lam_m * mpmath.cos(k)))
        if lam > 1 + 1 / n_sites:

            def g(v: mpmath.mpf) -> mpmath.mpf:
                return mpmath.sinh(v * (n_sites + 1)) - lam_m * mpmath.sinh(v * n_sites)

            v = mpmath.findroot(g, mpmath.log(lam_m))
            out.append(mpmath.sqrt(1 + lam_m**2 - 2 * lam_m * mpmath.cosh(v)))
    return sorted(out)


@pytest.mark.parametrize(("n_sites", "lam"), [(12, 0.6), (12, 1.0), (10, 1.5), (20, 2.0)])
def test_pfeuty_open_ising_chain(n_sites: int, lam: float) -> None:
    # Reference: P. Pfeuty, Ann. Phys. 57, 79 (1970), including the edge mode of the ordered side.
    ref = _pfeuty(n_sites, lam)
    assert len(ref) == n_sites  # the real-k search alone misses the edge mode for lam > 1 + 1/L
    sp = free_spectrum(fl.ising_chain(n_sites, field=1.0, bond=lam))
    got = sp.quasi_energies
    assert len(got) == n_sites
    for e, r, b in zip(got, ref, sp.error_bounds, strict=True):
        assert abs(e - float(r)) <= max(1e-12 * float(r), 1e-15)
        assert abs(e - float(r)) <= b + 1e-15
    if lam > 1 + 1 / n_sites:
        assert got[0] < 0.05 * got[1]  # the exponentially small edge mode, to relative accuracy


def _majorana_model(n_modes: int, edges: list[tuple[int, int]], seed: int) -> fl.Model:
    """H = sum_e c_e i gamma_a gamma_b with Jordan-Wigner Majoranas on n_modes/2 qubits.

    Its frustration graph is the line graph of the root graph ``edges``, hence claw-free
    (A. Chapman and S. T. Flammia, Quantum 4, 278 (2020)).
    """
    n_qubits = (n_modes + 1) // 2

    def gamma(a: int) -> fl.WeylString:
        j = a // 2
        letters = "Z" * j + ("X" if a % 2 == 0 else "Y")
        return fl.pauli(letters, list(range(j + 1)))

    rng = np.random.default_rng(seed)
    terms = []
    for a, b in edges:
        prod = gamma(a) * gamma(b)
        terms.append((1j * rng.uniform(0.4, 1.6), prod))
    return fl.Model.from_terms(terms, states=2, sites=range(n_qubits))


@pytest.mark.parametrize("seed", [0, 1, 2])
def test_claw_free_models_are_real_rooted(seed: int) -> None:
    # M. Chudnovsky and P. Seymour, J. Combin. Theory Ser. B 97, 350 (2007): the independence
    # polynomial of a claw-free graph has only real roots, so with positive weights all y_k > 0.
    rng = np.random.default_rng(seed)
    n_modes = 10
    edges = {
        (int(a), int(b))
        for a, b in (sorted(rng.choice(n_modes, 2, replace=False)) for _ in range(14))
    }
    m = _majorana_model(n_modes, sorted(edges), seed)
    if fl.chain_structure(m) is not None:
        pytest.skip("random root graph happened to give a chain")
    # About the polynomial's roots, whatever the guarantee: the numbers are asked for.
    sp = free_spectrum(m, unproven=True)
    assert sp.provenance.method == "certified"
    assert np.all(np.abs(sp.roots.imag) <= 1e-12 * np.abs(sp.roots))
    assert np.all(sp.roots.real > 0)


def _check_against_ed(m: fl.Model) -> FreeSpectrum:
    # Reference: numpy.linalg.eigvals of the dense Hamiltonian (LAPACK geev).
    sp = free_spectrum(m)
    ev = np.linalg.eigvals(m.to_sparse().toarray())
    assert sp.degeneracy is not None and sp.degeneracy * len(sp.levels(None)) == len(ev)
    everything = np.repeat(sp.levels(None).energies, sp.degeneracy)
    assert _assign(everything, ev) < 1e-9
    # k lowest by real part, with the model degeneracy
    k = 6
    low = sp.levels(k)
    ref = np.sort(ev.real)[: k * sp.degeneracy : sp.degeneracy]
    assert np.allclose(np.real(low.energies), ref, atol=1e-9)
    assert abs(np.real(sp.ground_energy) - ev.real.min()) < 1e-9
    assert low[0].multiplicity == sp.degeneracy
    return sp


@pytest.mark.parametrize(
    "model",
    [
        fl.exclusion_chain(7, reach=1, couplings=fl.random_couplings(7, seed=1)),
        fl.exclusion_chain(7, reach=2, couplings=fl.random_couplings(7, seed=2)),
        fl.exclusion_chain(6, reach=3, couplings=fl.random_couplings(6, seed=3)),
        fl.ising_chain(
            6, field=fl.random_couplings(6, seed=4), bond=fl.random_couplings(5, seed=5)
        ),
        fl.exclusion_chain(6, reach=1, couplings=fl.complex_couplings(6, seed=6)),
        fl.exclusion_chain(5, reach=1, states=3, couplings=fl.complex_couplings(5, seed=7)),
        fl.exclusion_chain(4, reach=2, states=3, couplings=fl.complex_couplings(4, seed=8)),
        fl.exclusion_chain(4, reach=1, states=4, couplings=fl.complex_couplings(4, seed=9)),
        fl.clock_chain(
            3, field=fl.complex_couplings(3, seed=10), bond=fl.complex_couplings(2, seed=11)
        ),
    ],
    ids=["N2p1", "N2p2", "N2p3", "ising", "N2complex", "Z3p1", "Z3p2", "Z4p1", "clock3"],
)
def test_levels_and_degeneracy_against_exact_diagonalization(model: fl.Model) -> None:
    sp = _check_against_ed(model)
    assert sp.provenance.guaranteed


def test_levels_heap_agrees_with_full_enumeration() -> None:
    # Internal consistency of the best-first search against sorting all N^S choices (numpy).
    for m in (
        fl.exclusion_chain(23, reach=1, couplings=fl.random_couplings(23, seed=3)),
        fl.exclusion_chain(14, reach=1, states=3, couplings=fl.complex_couplings(14, seed=4)),
    ):
        sp = free_spectrum(m)
        full = sp.levels(None)
        some = sp.levels(500)
        assert np.allclose(np.real(some.energies), np.real(full.energies[:500]), atol=1e-12)
        assert np.all(np.diff(np.real(some.energies)) >= -1e-12)
        # occupations reproduce the energies
        omega = np.exp(2j * np.pi * np.arange(m.states) / m.states)
        occ = some.occupations
        rebuilt = (sp.quasi_energies[None, :] * omega[occ]).sum(axis=1)
        assert np.allclose(rebuilt, some.energies, atol=1e-12)


def test_gap_and_ground_energy_uniform_critical_ising() -> None:
    # P. Pfeuty, Ann. Phys. 57, 79 (1970): E_0 / L -> -4 / pi for H = -sum (X_i + Z_i Z_{i+1});
    # open-chain surface corrections are O(1/L).
    n = 2000
    sp = free_spectrum(fl.ising_chain(n))
    assert abs(sp.ground_energy / n + 4 / np.pi) < 1.0 / n
    assert sp.gap == pytest.approx(2 * sp.quasi_energies[0])
    low = free_spectrum(fl.ising_chain(n), lowest=3)
    assert np.allclose(low.quasi_energies, sp.quasi_energies[:3], rtol=1e-12)
    assert low.gap == pytest.approx(sp.gap, rel=1e-12)
    with pytest.raises(ValueError, match="lowest"):
        _ = low.ground_energy


def test_sum_rules_at_1e5_terms() -> None:
    # sum eta^2 = sum c^2 and sum eta^4 = (sum c^2)^2 - 2 C_2: Newton's identities on the
    # coefficients of P (common practice).
    m = fl.exclusion_chain(
        100_000, reach=2, couplings=fl.random_couplings(100_000, 0.3, 1.7, seed=1)
    )
    sp = free_spectrum(m)
    rules = sp.provenance.sum_rules
    assert rules["sum eta^N"] < 1e-10
    assert rules["sum eta^2N"] < 1e-10
    assert len(sp) == (100_000 + 2) // 3


def test_density_of_states_counts() -> None:
    # Exact enumeration against numpy.histogram of all levels; grid convolution within its
    # stated shift (levels close to an edge excepted), total weight one.
    m = fl.exclusion_chain(21, reach=1, couplings=fl.random_couplings(21, seed=5))
    sp = free_spectrum(m)
    bins = np.linspace(-12, 12, 25)
    dos = sp.density_of_states(bins)
    ref, _ = np.histogram(sp.levels(None).energies, bins=bins)
    assert np.array_equal(dos.counts, ref * sp.degeneracy)
    big = free_spectrum(fl.exclusion_chain(61, reach=1, couplings=fl.random_couplings(61, seed=5)))
    top = float(big.quasi_energies.sum()) + 1.0
    dos2 = big.density_of_states(np.linspace(-top, top, 41))
    assert dos2.fraction.sum() == pytest.approx(1.0, abs=1e-12)
    assert dos2.max_shift <= 0.25 * (2 * top / 40)


def test_bad_requests() -> None:
    m = fl.exclusion_chain(60, reach=1)
    sp = free_spectrum(m)
    with pytest.raises(ValueError, match="limit"):
        sp.levels(None)
    assert 2**30 > LEVEL_LIMIT
    with pytest.raises(ValueError, match="method"):
        free_spectrum(m, method="quick")
    with pytest.raises(ValueError, match="exclusion chain"):
        free_spectrum(fl.ising_lattice(2, 2), method="fast")
    with pytest.raises(ValueError, match="symbolic"):
        free_spectrum(fl.exclusion_chain(3, couplings="symbols"))
    with pytest.raises(AttributeError):
        sp.gap = 1.0  # type: ignore[misc]
    assert "Free spectrum" in sp._repr_html_()


def test_not_guaranteed_is_recorded() -> None:
    # The 2D transverse-field Ising model has claws: no theorem (Chapman-Flammia 2020 /
    # Elman-Chapman-Flammia 2021); compared with exact diagonalization it is indeed not free.
    m = fl.ising_lattice(2, 3)
    with pytest.raises(fl.NoTheoremError, match="claw"):
        free_spectrum(m)
    sp = free_spectrum(m, unproven=True)
    assert not sp.provenance.guaranteed
    assert "NOT GUARANTEED" in repr(sp)
    assert sp.degeneracy is None
    ev = np.linalg.eigvalsh(m.to_sparse().toarray())
    assert abs(np.real(sp.ground_energy) - ev.min()) > 1e-3


def test_certified_methods_agree_with_fast() -> None:
    for m in (
        fl.exclusion_chain(9, reach=2, couplings=fl.random_couplings(9, seed=1)),
        fl.exclusion_chain(9, reach=1, states=3, couplings=fl.complex_couplings(9, seed=2)),
    ):
        fast = free_spectrum(m)
        cert = free_spectrum(m, method="certified")
        assert cert.provenance.method == "certified"
        assert _assign(fast.quasi_energies**m.states, cert.quasi_energies**m.states) < 1e-12


def test_zero_coupling_and_huge_couplings_in_a_chain() -> None:
    # A zero coupling splits the chain (common practice); reference numpy.linalg.eigvals.
    _check_against_ed(fl.exclusion_chain(5, couplings=[1.0, 0.0, 1.3, 0.7, 1.1]))
    big = free_spectrum(
        fl.exclusion_chain(9, reach=2, states=3, couplings=1e80 * fl.complex_couplings(9, seed=3))
    )
    small = free_spectrum(
        fl.exclusion_chain(9, reach=2, states=3, couplings=fl.complex_couplings(9, seed=3))
    )
    assert np.allclose(big.quasi_energies / 1e80, small.quasi_energies, rtol=1e-12)


def test_cycle_symmetry_is_flagged_not_guaranteed() -> None:
    # A brick-wall honeycomb patch with a plaquette: the root graph has a cycle, so the model
    # is free only sector by sector (A. Chapman and S. T. Flammia, Quantum 4, 278 (2020)); one
    # polynomial does not give its spectrum, as exact diagonalization (numpy) confirms.
    m = fl.kitaev_honeycomb(2, 3)
    with pytest.raises(fl.NoTheoremError, match="cycle"):
        free_spectrum(m)
    sp = free_spectrum(m, unproven=True)
    assert not sp.provenance.guaranteed
    ev = np.linalg.eigvalsh(m.to_sparse().toarray())
    assert abs(sp.ground_energy - ev.min()) > 1e-3
    # a patch without plaquettes is a chain and is guaranteed
    assert free_spectrum(fl.kitaev_honeycomb(1, 4)).provenance.guaranteed
