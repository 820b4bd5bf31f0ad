"""The Jordan-Wigner route: Majorana sectors and spectra against exact diagonalization.

References: E. Lieb, T. Schultz and D. Mattis, Ann. Phys. 16, 407 (1961) (XX chain);
P. Pfeuty, Ann. Phys. 57, 79 (1970) (open transverse-field Ising chain); A. Kitaev, Ann. Phys.
321, 2 (2006) (honeycomb); A. Chapman and S. T. Flammia, Quantum 4, 278 (2020) (root graphs).
"""

from __future__ import annotations

import itertools

import numpy as np
import pytest
from scipy.optimize import brentq

import freeladder as fl


def ladder(rungs: int, rng: np.random.Generator) -> fl.Model:
    """Two legs, ZZ rungs, leg bonds alternating XX / YY so every site has one bond of each."""
    terms = [f"{rng.uniform(0.5, 1.5):.4f} Z{2 * r} Z{2 * r + 1}" for r in range(rungs)]
    for r in range(rungs - 1):
        for leg in (0, 1):
            p = "X" if (r + leg) % 2 == 0 else "Y"
            a, b = 2 * r + leg, 2 * r + 2 + leg
            terms.append(f"{rng.uniform(0.5, 1.5):.4f} {p}{a} {p}{b}")
    return fl.parse_model(" + ".join(terms))


def all_levels(m: fl.Model) -> np.ndarray:
    energies, mult = fl.jordan_wigner_spectrum(m).levels()
    return np.sort(np.repeat(energies, mult))


def dense_levels(m: fl.Model) -> np.ndarray:
    return np.linalg.eigvalsh(m.to_sparse().toarray())  # numpy reference (common practice)


@pytest.mark.parametrize(
    "build",
    [
        lambda rng: ladder(3, rng),
        lambda rng: ladder(4, rng),
        lambda rng: fl.kitaev_honeycomb(2, 4, *rng.uniform(0.4, 1.4, 3)),
        lambda rng: fl.kitaev_honeycomb(3, 4, *rng.uniform(0.4, 1.4, 3)),
        lambda rng: fl.parse_model(
            " + ".join(f"{rng.uniform(0.5, 1.5):.4f} Z{i} Z{(i + 1) % 7}" for i in range(7))
        ),
        lambda rng: fl.parse_model("X0 + Z0 + Y0 X1 + Z0 Z1"),
        lambda rng: fl.parse_model("Z0 Z1 + X1 + Z1 Z2 + X2 + Z0 Z2"),
    ],
    ids=["ladder3", "ladder4", "kitaev2x4", "kitaev3x4", "zz-ring7", "odd-modes", "relation"],
)
def test_union_over_sectors_is_the_whole_spectrum(build):
    rng = np.random.default_rng(11)
    m = build(rng)
    free, exact = all_levels(m), dense_levels(m)
    assert len(free) == len(exact) == m.dimension
    np.testing.assert_allclose(free, exact, atol=1e-10 * max(1.0, np.abs(exact).max()))


def test_the_three_rung_ladder_needs_its_sectors():
    # with two plaquettes a single set of quasi-energies cannot give every level
    m = ladder(3, np.random.default_rng(3))
    s = fl.sectors(m)
    assert len(s.cycle_operators) == 2
    assert s.count == 2**s.rank
    for g in s.cycle_operators:  # each commutes with every term (Chapman-Flammia 2020)
        assert all(g.commutes_with(t) for t in m.strings)


def test_odd_ring_of_commuting_terms_respects_the_relation():
    # 13 terms Z_i Z_{i+1} around an odd ring multiply to the identity: the free answer -13 is
    # impossible; brute force over all 2^13 spin configurations gives -11
    text = " + ".join(f"Z{i} Z{(i + 1) % 13}" for i in range(13))
    sp = fl.jordan_wigner_spectrum(fl.parse_model(text), sector="ground")
    brute = min(
        sum(z[i] * z[(i + 1) % 13] for i in range(13))
        for z in itertools.product((1, -1), repeat=13)
    )
    assert brute == -11
    assert sp.ground_energy == pytest.approx(brute, abs=1e-12)


def test_xx_chain_closed_form():
    # H = J sum (X X + Y Y), open, L sites: quasi-energies 2 J |cos(pi k / (L + 1))|, k = 1..L
    # (Lieb-Schultz-Mattis 1961; E = sum +-eta convention)
    n, coupling = 8, 0.8  # even L: no zero mode
    text = " + ".join(f"{coupling} X{i} X{i + 1} + {coupling} Y{i} Y{i + 1}" for i in range(n - 1))
    sp = fl.jordan_wigner_spectrum(fl.parse_model(text))
    k = np.arange(1, n + 1)
    expected = np.sort(2 * coupling * np.abs(np.cos(np.pi * k / (n + 1))))
    for index in range(len(sp.sectors)):
        np.testing.assert_allclose(np.sort(sp.quasi_energies(index)), expected, atol=1e-12)


@pytest.mark.parametrize("lam", [0.4, 1.0])
def test_transverse_field_ising_closed_form(lam):
    # H = -sum X_i - lam sum Z_i Z_{i+1}, L sites: eta = sqrt(1 + lam^2 + 2 lam cos k), k in
    # (0, pi) with sin(k (L + 1)) + lam sin(k L) = 0 (Pfeuty 1970)
    n = 8
    fields = [(-1.0, fl.pauli("X", [i])) for i in range(n)]
    bonds = [(-lam, fl.pauli("ZZ", [i, i + 1])) for i in range(n - 1)]
    sp = fl.jordan_wigner_spectrum(fl.Model.from_terms(fields + bonds))

    def f(k: float) -> float:
        return np.sin(k * (n + 1)) + lam * np.sin(k * n)

    grid = np.linspace(1e-9, np.pi - 1e-9, 20001)
    vals = f(grid)
    pairs = zip(grid, grid[1:], vals, vals[1:], strict=False)
    ks = [brentq(f, a, b) for a, b, fa, fb in pairs if fa * fb < 0]
    assert len(ks) == n
    expected = np.sort(np.sqrt(1 + lam**2 + 2 * lam * np.cos(ks)))
    np.testing.assert_allclose(np.sort(sp.quasi_energies(0)), expected, atol=1e-11)


@pytest.mark.parametrize(
    "build",
    [lambda: ladder(3, np.random.default_rng(5)), lambda: fl.kitaev_honeycomb(2, 3, 0.9, 1.2, 0.7)],
    ids=["ladder3", "kitaev2x3"],
)
def test_each_sector_is_the_matching_joint_eigenspace(build):
    # project H onto the joint eigenspace of the generators named by each label (dense numpy)
    m = build()
    s = fl.sectors(m)
    h = m.to_sparse().toarray()
    gens = [g.to_sparse(m.sites).toarray() for g in (*s.cycle_operators, *s.parity_operators)]
    sp = fl.jordan_wigner_spectrum(m)
    for sec in sp.sectors:
        proj = np.eye(m.dimension)
        for value, g in zip(sec.label, gens, strict=True):
            proj = proj @ (np.eye(m.dimension) + value * g) / 2
        basis = np.linalg.svd(proj)[0][:, : round(np.trace(proj).real)]
        exact = np.linalg.eigvalsh(basis.conj().T @ h @ basis)
        one = fl.SectorSpectrum(s, (sec,), sp.constant, sp.error_bound)
        energies, mult = one.levels()
        np.testing.assert_allclose(np.sort(np.repeat(energies, mult)), exact, atol=1e-10)
        # a state of the sector is labelled by it
        assert s.sector_of(basis[:, 0]) == sec.label
    ground = fl.jordan_wigner_spectrum(m, sector="ground")
    assert ground.ground_energy == pytest.approx(np.linalg.eigvalsh(h)[0], abs=1e-10)


def test_errors_say_what_is_wrong():
    with pytest.raises(ValueError, match="not a line graph"):
        fl.sectors(fl.parse_model("Z0 Z1 Z2 + X0 + X1 + X2"))  # a claw centred on Z0 Z1 Z2
    with pytest.raises(ValueError, match="N = 2"):
        fl.sectors(fl.clock_chain(3))
    m = ladder(3, np.random.default_rng(1))
    with pytest.raises(ValueError, match="one per cycle operator"):
        fl.jordan_wigner_spectrum(m, sector=(1,))
    with pytest.raises(ValueError, match="sector must be"):
        fl.jordan_wigner_spectrum(m, sector="lowest")


def test_flux_free_honeycomb_torus_approaches_the_bulk_energy():
    # Kitaev 2006: in the flux-free sector the Majorana band is +-|f(q)|, f = 2 (1 + e^{iq1} +
    # e^{iq2}) at unit couplings, so the energy per site is -(1/2) <|1 + e^{iq1} + e^{iq2}|>
    # over the Brillouin zone (about -0.787, from memory); the integral below is the reference.
    q = np.linspace(0.0, 2 * np.pi, 1201)[:-1]
    q1, q2 = np.meshgrid(q, q)
    bulk = -0.5 * float(np.mean(np.abs(1 + np.exp(1j * q1) + np.exp(1j * q2))))
    assert bulk == pytest.approx(-0.787, abs=1e-3)
    deviations = []
    for cells in (4, 8):
        m, hexagons = fl.kitaev_torus(cells, cells), fl.honeycomb_hexagons(cells, cells)
        best = np.inf
        # the two translation-invariant flux patterns; the flux-free one is the lower
        # (E. H. Lieb, Phys. Rev. Lett. 73, 2158 (1994))
        for value in (1, -1):
            sp = fl.jordan_wigner_spectrum(m, sector={h: value for h in hexagons})
            best = min(best, sp.ground_energy / len(m.sites))
        deviations.append(abs(best - bulk))
    # measured here: 2.0e-3 at 4 x 4 cells and 4.4e-5 at 8 x 8
    assert deviations[1] < deviations[0]
    assert deviations[1] < 5e-4


@pytest.mark.parametrize(
    "text",
    [
        "0.7 X0 + 1.3 Z0 Z1 + 0.4 X1 + 0.9 Z1 Z2 + 1.1 X2 + 0.6 Z2 Z3 + 0.8 X3",
        "X0 + 0.6 Z0 + 1.2 Y0 X1 + 0.5 Z0 Z1",
        "0.8 X0 X1 + 1.1 Y1 Y2 + 0.7 X2 X3 + 1.3 Y3 Y4 + 0.9 X4 X5",
    ],
)
def test_tree_root_graphs_agree_with_the_polynomial_route(text):
    # a line graph of a tree is claw-free and even-hole-free, so the exclusion polynomial
    # gives the same quasi-energies (Chapman-Flammia 2020; Elman-Chapman-Flammia 2021)
    m = fl.parse_model(text)
    assert not fl.sectors(m).cycle_operators
    jw = fl.jordan_wigner_spectrum(m)
    poly = np.sort(np.abs(fl.free_spectrum(m).quasi_energies))
    for index in range(len(jw.sectors)):
        nonzero = np.sort(jw.quasi_energies(index))
        np.testing.assert_allclose(nonzero[-len(poly) :], poly, atol=1e-10)
        assert np.all(nonzero[: len(nonzero) - len(poly)] < 1e-10)


def test_free_spectrum_refusal_points_to_the_sector_route():
    m = ladder(3, np.random.default_rng(2))
    with pytest.raises(fl.NoTheoremError, match="jordan_wigner_spectrum"):
        fl.free_spectrum(m)
