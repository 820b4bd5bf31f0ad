"""The Jordan-Wigner route: Majorana sectors and spectra against exact diagonalization.

References: E. Lieb, T. Schultz and D. Mattis, Ann. Phys. 16, 407 (1961) (XX chain);
P. Pfeuty, Ann. Phys. 57, 79 (1970) (open transverse-field Ising chain); A. Kitaev, Ann. Phys.
321, 2 (2006) (honeycomb); A. Chapman and S. T. Flammia, Quantum 4, 278 (2020) (root graphs).
"""

from __future__ import annotations

import itertools
import json

import numpy as np
import pytest
import scipy.linalg
from scipy.optimize import brentq, linear_sum_assignment
from scipy.sparse.linalg import eigsh

import freeladder as fl
from freeladder.base.errors import TooLargeError
from freeladder.spectra import majorana


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
    with pytest.raises(ValueError, match="only the 2 cycle values, not 1"):
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


# -- free_spectrum(m, sector=...): one sector as a FreeSpectrum ---------------------------------
def _matched_distance(free: np.ndarray, exact: np.ndarray) -> float:
    """Largest distance of the best one-to-one matching of two multisets of complex numbers
    (scipy's assignment solver)."""
    cost = np.abs(free[:, None] - exact[None, :])
    rows, cols = linear_sum_assignment(cost)
    return float(cost[rows, cols].max())


@pytest.mark.parametrize(
    "build",
    [
        lambda: ladder(3, np.random.default_rng(21)),
        lambda: ladder(4, np.random.default_rng(22)),
        lambda: fl.kitaev_honeycomb(2, 4, 0.9, 1.1, 0.7),
        lambda: fl.kitaev_torus(2, 2, 1.0, 0.8, 0.6),  # parity fixed by the relations
    ],
    ids=["ladder3", "ladder4", "kitaev2x4", "torus2x2"],
)
def test_sector_spectra_are_free_spectra_whose_union_is_the_whole_spectrum(build):
    # every set of cycle values gives one FreeSpectrum (levels with multiplicities); their
    # union is numpy's dense spectrum (Chapman-Flammia 2020: free sector by sector)
    m = build()
    exact = dense_levels(m)
    n_cycles = len(fl.sectors(m).cycle_operators)
    union = []
    for values in itertools.product((1, -1), repeat=n_cycles):
        try:
            sp = fl.free_spectrum(m, sector=values)
        except ValueError as err:
            assert "contradict" in str(err)  # a set of values the relations exclude
            continue
        assert isinstance(sp, fl.FreeSpectrum) and sp.guaranteed
        assert sp.provenance.sector["cycle_values"] == values
        table = sp.levels(None)
        union.append(np.repeat(table.energies, table.multiplicity))
    free = np.sort(np.concatenate(union))
    assert len(free) == m.dimension
    np.testing.assert_allclose(free, exact, atol=1e-10 * max(1.0, np.abs(exact).max()))


@pytest.mark.parametrize(
    "build",
    [
        lambda: ladder(3, np.random.default_rng(31)),
        lambda: fl.kitaev_honeycomb(2, 4, 1.2, 0.5, 0.9),
        lambda: fl.kitaev_torus(3, 2, 0.7, 1.0, 0.9),
    ],
    ids=["ladder3", "kitaev2x4", "torus3x2"],
)
def test_ground_sector_holds_the_exact_ground_state(build):
    # the sector free_spectrum(m, sector="ground") picks holds numpy's ground states: each
    # joint eigenvector of the generators in the ground eigenspace, labelled with
    # fl.sectors(m).sector_of, has the chosen cycle values.  Dense numpy diagonalization
    # (dimension <= 4096): the ground spaces are degenerate (8-fold for the open 2 x 4 patch),
    # and Lanczos need not return every copy of a degenerate eigenvalue.
    m = build()
    assert m.dimension <= 4096
    values, vectors = np.linalg.eigh(m.to_sparse().toarray())
    sp = fl.free_spectrum(m, sector="ground")
    assert sp.ground_energy == pytest.approx(values[0], abs=1e-10)
    s = fl.sectors(m)
    space = vectors[:, np.abs(values - values[0]) < 1e-8]
    # a random combination of the commuting generators, diagonalised in the ground space,
    # gives joint eigenvectors (numpy)
    rng = np.random.default_rng(0)
    mix = sum(rng.normal() * g.to_sparse(m.sites).toarray() for g in s.generators)
    _, inner = np.linalg.eigh(space.conj().T @ mix @ space)
    for k in range(space.shape[1]):
        label = s.sector_of(space @ inner[:, k])
        assert label[: len(s.cycle_operators)] == sp.provenance.sector["cycle_values"]
        assert label in sp.provenance.sector["labels"]
    json.dumps(sp.to_dict(), allow_nan=False)


@pytest.mark.parametrize("cells", [(2, 3), (3, 2)])
def test_flux_rule_predicts_the_exact_ground_sector_on_small_tori(cells):
    # Lieb 1994 as Kitaev 2006 uses it: flux-free hexagons in the ground state.  numpy's
    # ground vector of the torus has every hexagon string at the value the rule assigns
    m = fl.kitaev_torus(*cells, 1.0, 0.8, 0.6)
    values, why = fl.flux_theorem_values(m)
    assert values is not None, why
    assert len(values) == cells[0] * cells[1]
    assert set(values) == set(fl.honeycomb_hexagons(*cells))  # the builder's own hexagons
    energies, vectors = eigsh(m.to_sparse().tocsc(), k=2, which="SA")  # scipy Lanczos
    assert abs(energies[1] - energies[0]) > 1e-6
    ground = vectors[:, np.argmin(energies)]
    for string, value in values.items():
        w = np.vdot(ground, string.to_sparse(m.sites) @ ground).real
        assert w == pytest.approx(value, abs=1e-8)
    s = fl.sectors(m)
    assert s.sector_of(ground) in s.labels_where(values)


@pytest.mark.parametrize("cells", [(2, 2), (3, 3)])
def test_flux_rule_is_not_a_proof_on_every_small_torus(cells):
    # the caveat in the docstring, measured: on these tori the lowest level of the sectors the
    # rule selects lies above numpy's (3 x 3: sparse Lanczos, scipy) ground energy
    m = fl.kitaev_torus(*cells, 1.0, 0.8, 0.6)
    values, _ = fl.flux_theorem_values(m)
    assert values is not None
    rule = fl.jordan_wigner_spectrum(m, sector=values).ground_energy
    exact = float(eigsh(m.to_sparse().tocsc(), k=1, which="SA")[0][0])
    assert rule > exact + 1e-3
    search = fl.free_spectrum(m, sector="ground")  # small: found by the exhaustive search
    assert "exhaustive search" in search.provenance.sector["selection"]
    assert search.ground_energy == pytest.approx(exact, abs=1e-8)


def test_flux_rule_chooses_the_ground_sector_of_a_large_torus():
    # 8 x 8 cells: 2^66 labels, far beyond a search; the rule fixes the hexagons and the loop
    # and parity completions are searched.  Energy per site against the bulk integral
    # (Kitaev 2006, as in test_flux_free_honeycomb_torus_approaches_the_bulk_energy)
    q = np.linspace(0.0, 2 * np.pi, 1201)[:-1]
    q1, q2 = np.meshgrid(q, q)
    bulk = -0.5 * float(np.mean(np.abs(1 + np.exp(1j * q1) + np.exp(1j * q2))))
    m = fl.kitaev_torus(8, 8)
    sp = fl.free_spectrum(m, sector="ground")
    assert "Lieb" in sp.provenance.sector["selection"]
    assert "not by a search" in sp.provenance.guarantee
    assert abs(sp.ground_energy / len(m.sites) - bulk) < 5e-4
    # flipping one hexagon's flux costs energy (a vison pair needs two: the relations)
    hexagons = fl.honeycomb_hexagons(8, 8)
    values, _ = fl.flux_theorem_values(m)
    flipped = dict(values)
    for h in hexagons[:2]:
        flipped[h] = -values[h]
    assert fl.jordan_wigner_spectrum(m, sector=flipped).ground_energy > sp.ground_energy


def test_ground_search_refused_beyond_its_limit():
    m = ladder(20, np.random.default_rng(4))  # 19 plaquettes and a parity: 2^19 labels
    with pytest.raises(TooLargeError, match="flux theorem does not apply"):
        fl.free_spectrum(m, sector="ground")


@pytest.mark.parametrize("rungs", [3, 4])
def test_complex_couplings_against_dense_eigenvalues(rungs):
    # non-Hermitian ladders: the single-particle matrix is complex antisymmetric, its
    # eigenvalues come in pairs +-e, and the levels (sums of +-e) are numpy's eigenvalues as
    # a multiset (matched one to one by scipy's assignment solver)
    rng = np.random.default_rng(40 + rungs)
    m = ladder(rungs, rng)
    m = m.with_couplings(list(rng.normal(size=len(m)) + 1j * rng.normal(size=len(m))))
    exact = np.linalg.eigvals(m.to_sparse().toarray())
    jw = fl.jordan_wigner_spectrum(m)
    energies, mult = jw.levels()
    assert _matched_distance(np.repeat(energies, mult), exact) < 1e-9
    sp = fl.free_spectrum(m, sector="ground")
    assert np.iscomplexobj(sp.quasi_energies)
    lowest = exact[np.argmin(exact.real)]
    assert abs(sp.ground_energy - lowest) < 1e-9
    assert sp.provenance.sum_rules["sum eta^N"] < 1e-12


def test_complex_couplings_on_a_torus_with_a_fixed_parity():
    rng = np.random.default_rng(7)
    m = fl.kitaev_torus(2, 2)
    m = m.with_couplings(
        list(rng.uniform(0.5, 1.5, len(m)) * np.exp(0.4j * rng.normal(size=len(m))))
    )
    exact = np.linalg.eigvals(m.to_sparse().toarray())
    energies, mult = fl.jordan_wigner_spectrum(m).levels()
    assert _matched_distance(np.repeat(energies, mult), exact) < 1e-9


def _lsm_reference(sub: np.ndarray, sup: np.ndarray, diag: np.ndarray) -> np.ndarray:
    """Lieb-Schultz-Mattis 1961: for a chain quadratic in fermions, the single-particle
    energies are the singular values of A - B (here a tridiagonal matrix), halved in the
    E = sum +-eta convention."""
    n = len(diag)
    a = np.diag(diag) + np.diag(sub, -1) + np.diag(sup, 1)
    return np.sort(np.linalg.svd(a, compute_uv=False)) if n else np.zeros(0)


def test_random_xy_chain_against_lieb_schultz_mattis():
    # H = sum_i (Jx_i X_i X_{i+1} + Jy_i Y_i Y_{i+1}), open: A - B has 2 Jx_i below and 2 Jy_i
    # above the diagonal (LSM 1961), so eta = singular values of [Jx below, Jy above]
    rng = np.random.default_rng(12)
    n = 10  # even: no zero mode
    jx, jy = rng.uniform(0.2, 1.5, n - 1), rng.uniform(-1.2, 1.2, n - 1)
    terms = [(jx[i], fl.pauli("XX", [i, i + 1])) for i in range(n - 1)]
    terms += [(jy[i], fl.pauli("YY", [i, i + 1])) for i in range(n - 1)]
    m = fl.Model.from_terms(terms)
    expected = _lsm_reference(jx, jy, np.zeros(n))
    for index in range(len(fl.jordan_wigner_spectrum(m).sectors)):
        got = np.sort(fl.jordan_wigner_spectrum(m).quasi_energies(index))
        np.testing.assert_allclose(got, expected, atol=1e-12)


def test_random_transverse_field_ising_chain_against_lieb_schultz_mattis():
    # H = -sum h_i X_i - sum J_i Z_i Z_{i+1}: A - B is lower bidiagonal with 2 h_i on the
    # diagonal and -2 J_i below (LSM 1961; Pfeuty 1970 for the uniform case), so eta are the
    # singular values of the bidiagonal [h_i; J_i]; the polynomial route agrees (a tree)
    rng = np.random.default_rng(13)
    n = 10
    field, bond = rng.uniform(0.3, 1.7, n), rng.uniform(0.3, 1.7, n - 1)
    terms = [(-field[i], fl.pauli("X", [i])) for i in range(n)]
    terms += [(-bond[i], fl.pauli("ZZ", [i, i + 1])) for i in range(n - 1)]
    m = fl.Model.from_terms(terms)
    expected = _lsm_reference(bond, np.zeros(n - 1), field)
    sp = fl.free_spectrum(m, sector="ground")
    np.testing.assert_allclose(np.sort(sp.quasi_energies), expected, atol=1e-12)
    poly = fl.free_spectrum(m)
    np.testing.assert_allclose(np.sort(poly.quasi_energies), expected, atol=1e-10)
    assert sp.ground_energy == pytest.approx(poly.ground_energy, abs=1e-10)


def test_sector_argument_errors_say_what_is_wrong():
    m = ladder(3, np.random.default_rng(1))
    with pytest.raises(ValueError, match="different sets of cycle values"):
        fl.free_spectrum(m, sector="all")
    with pytest.raises(ValueError, match="method='auto'"):
        fl.free_spectrum(m, sector="ground", method="certified")
    with pytest.raises(ValueError, match="Jordan-Wigner model"):
        fl.free_spectrum(fl.exclusion_chain(6, reach=2), sector="ground")
    with pytest.raises(ValueError, match="sector must be"):
        fl.free_spectrum(m, sector="lowest")
    with pytest.raises(fl.NoTheoremError, match='sector="ground"'):
        fl.free_spectrum(m)
    torus = fl.free_spectrum(fl.kitaev_torus(2, 3), sector="ground")
    assert torus.parity_constraints
    with pytest.raises(ValueError, match="Majorana parity"):
        fl.thermodynamics(torus, 1.0)


def test_parity_constrained_levels_lowest_first_and_histogram():
    # the 2 x 2 torus fixes the Majorana parity in each flux sector: the best-first lowest
    # levels keep only choices of that parity, as the full (filtered) list does, and both are
    # eigenvalues of the sector's block of H (projected with numpy, as in
    # test_each_sector_is_the_matching_joint_eigenspace)
    m = fl.kitaev_torus(2, 2, 1.0, 0.7, 0.5)
    sp = fl.free_spectrum(m, sector="ground")
    assert sp.parity_constraints
    every = sp.levels(None)
    assert len(every) == 2 ** (len(sp) - 1)  # one parity: half of the 2^S choices
    lowest = sp.levels(7)
    np.testing.assert_allclose(lowest.energies, every.energies[:7], atol=1e-12)
    s = fl.sectors(m)
    h = m.to_sparse().toarray()
    proj = np.eye(m.dimension)
    for value, g in zip(sp.provenance.sector["cycle_values"], s.cycle_operators, strict=True):
        proj = proj @ (np.eye(m.dimension) + value * g.to_sparse(m.sites).toarray()) / 2
    basis = np.linalg.svd(proj)[0][:, : round(np.trace(proj).real)]
    block = np.linalg.eigvalsh(basis.conj().T @ h @ basis)
    free = np.sort(np.repeat(every.energies, every.multiplicity))
    np.testing.assert_allclose(free, block, atol=1e-10)
    assert sp.gap == pytest.approx(np.unique(np.round(block, 9))[1] - block[0], abs=1e-8)
    dos = sp.density_of_states(np.linspace(block[0] - 1, block[-1] + 1, 9))
    assert dos.counts.sum() == len(block)


# -- the single-particle solver: energies and Pfaffian sign without a Schur form -----------------
def brute_pfaffian(a: np.ndarray) -> float:
    """Pfaffian by expansion along the first row (definition; common practice)."""
    n = a.shape[0]
    if n == 0:
        return 1.0
    if n % 2:
        return 0.0
    total = 0.0
    for j in range(1, n):
        rest = [k for k in range(1, n) if k != j]
        total += (-1) ** (j - 1) * a[0, j] * brute_pfaffian(a[np.ix_(rest, rest)])
    return total


@pytest.mark.parametrize("m", [1, 2, 3, 4, 5])
def test_pfaffian_of_the_bipartite_block_form(m):
    # Pf([[0, M], [-M^T, 0]]) = (-1)^(m(m-1)/2) det M (common practice), against the
    # brute-force Pfaffian and numpy's determinant
    rng = np.random.default_rng(10 + m)
    for _ in range(5):
        block = rng.normal(size=(m, m))
        h = np.block([[np.zeros((m, m)), block], [-block.T, np.zeros((m, m))]])
        want = (-1) ** (m * (m - 1) // 2) * np.linalg.det(block)
        assert brute_pfaffian(h) == pytest.approx(want, rel=1e-10, abs=1e-12)


def random_antisymmetric(n: int, bipartite: bool, rng: np.random.Generator) -> np.ndarray:
    h = np.triu(rng.normal(size=(n, n)), 1)
    h *= rng.uniform(size=(n, n)) < 0.6  # a sparse pattern, like a root graph
    if bipartite:
        side = rng.permutation(n) % 2  # the two sides interleaved in a random order
        h *= side[:, None] != side[None, :]
    return h - h.T


def schur_reference(h: np.ndarray) -> tuple[np.ndarray, float]:
    """Energies and det Q from scipy's real Schur form (the route this module used before)."""
    t, q = scipy.linalg.schur(h, output="real")
    n, cols, energies, zeros, i = h.shape[0], [], [], [], 0
    while i < n:
        if i + 1 < n and abs(t[i + 1, i]) > 1e-9:
            cols += [i, i + 1] if t[i, i + 1] >= 0 else [i + 1, i]
            energies.append(abs(t[i, i + 1]))
            i += 2
        else:
            zeros.append(i)
            i += 1
    cols += zeros
    energies += [0.0] * (len(zeros) // 2)
    return np.sort(energies), float(np.sign(np.linalg.det(q[:, cols])))


@pytest.mark.parametrize("bipartite", [True, False])
def test_fast_single_particle_solver_against_references(bipartite):
    # energies against numpy's eigenvalues of h (+-i e_k) and scipy's real Schur form;
    # parity sign against the brute-force Pfaffian (small n) and det Q of the Schur form
    rng = np.random.default_rng(7 if bipartite else 8)
    checked = 0
    for n in [2, 3, 4, 5, 6, 7, 8, 9, 10, 40, 41, 120]:
        for _ in range(4):
            h = random_antisymmetric(n, bipartite, rng)
            if bipartite:
                assert majorana._two_colouring(h) is not None
            ref = np.sort(np.abs(np.linalg.eigvals(h).imag))[n % 2 :][::2]  # each pair once
            e_schur, det_schur = schur_reference(h)
            paths = [
                majorana._canonical(h),
                (lambda e, s: (np.sort(e), s))(*majorana._canonical_hessenberg(h)),
            ]
            for e, sign in paths:
                np.testing.assert_allclose(e, ref, atol=1e-9)
                np.testing.assert_allclose(e, e_schur, atol=1e-9)
                if n % 2 or np.min(ref) < 1e-6:
                    continue  # a zero mode: the sign does not matter
                if n <= 10:
                    assert sign == np.sign(brute_pfaffian(h))
                assert sign == det_schur
                checked += 1
    assert checked > 25
