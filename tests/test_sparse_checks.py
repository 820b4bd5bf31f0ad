"""Sparse exact diagonalization in the checks, and exponentially small modes on the sector route.

References: scipy's ARPACK Lanczos (sparse eigenvalues); numpy dense diagonalization;
python-flint ball arithmetic at 170 bits (about 50 digits) for the smallest singular value of
the single-particle matrix of the open XY chain in a transverse field (E. Lieb, T. Schultz and
D. Mattis, Ann. Phys. 16, 407 (1961): the single-particle energies are the singular values of
that matrix).  The 20-site ring (sector dimension 2^19) is timed in
tests/benchmarks/bench_verify.py --sparse; here a 14-site ring takes the same sparse path.
"""

from __future__ import annotations

import itertools

import numpy as np
import pytest
from flint import arb, arb_mat, ctx

import freeladder as fl
from freeladder.checks import verification
from freeladder.spectra.ed import SPARSE_CHECK_LIMIT, sector_exact_spectrum


def _xy_ring(sites: int) -> fl.Model:
    bonds = [
        f"{0.6 + 0.05 * (i % 3)} X{i} X{(i + 1) % sites} + 0.9 Y{i} Y{(i + 1) % sites}"
        for i in range(sites)
    ]
    return fl.parse_model(" + ".join(bonds + [f"0.3 Z{i}" for i in range(sites)]))


def _xy_chain(sites: int) -> fl.Model:
    # -0.7 X_i X_{i+1} - 0.3 Y_i Y_{i+1} - 0.6 Z_i, open ends
    bonds = [f"- 0.7 X{i} X{i + 1} - 0.3 Y{i} Y{i + 1}" for i in range(sites - 1)]
    return fl.parse_model(" ".join(bonds + [f"- 0.6 Z{i}" for i in range(sites)]))


def test_ground_sector_ladder_of_a_14_site_ring_matches_sparse_ed_in_that_sector() -> None:
    m = _xy_ring(14)
    check = verification.sector_lowest_check(m)
    assert check.passed, check.detail
    assert "ground sector" in check.detail and "8192" in check.detail  # parity halves 2^14
    assert "sparse" in check.detail  # beyond the dense limit: Lanczos in the sector
    # the same sector by hand: the ground level is the lowest eigenvalue overall here, and
    # the free ladder's second level is not the whole space's second (another sector's)
    sp = fl.free_spectrum(m, sector="ground")
    whole = fl.exact_spectrum(m, k=4)
    assert sp.levels(1).energies[0] == pytest.approx(whole.eigenvalues[0], abs=1e-9)


def test_sector_exact_spectrum_against_numpy_dense() -> None:
    m = _xy_ring(8)
    parity = fl.sectors(m).parity_operators[0]
    dense = np.linalg.eigvalsh(m.to_sparse().toarray())
    mat = parity.to_sparse(m.sites).toarray()
    for value in (1, -1):
        keep = np.flatnonzero(np.isclose(np.diag(mat).real, value))
        block = m.to_sparse().toarray()[np.ix_(keep, keep)]
        want = np.linalg.eigvalsh(block)[:6]
        got = sector_exact_spectrum(m, 6, [(parity, value)]).eigenvalues
        assert np.allclose(got, want, atol=1e-10)
        with pytest.raises(ValueError):  # results are stored: no caller may reopen them
            got.setflags(write=True)
        assert set(np.round(want, 8)) <= set(np.round(dense, 8))


def test_sparse_check_refuses_beyond_2_to_the_22_with_a_memory_estimate() -> None:
    m = fl.exclusion_chain(30, reach=1)  # 2^31
    spectrum = (fl.free_spectrum(m), "")
    with pytest.raises(verification.CheckNotApplicable, match="2\\^22.*GiB"):
        verification.lowest_levels_check(m, spectrum)
    assert m.dimension > SPARSE_CHECK_LIMIT


def test_a_14_site_chain_is_checked_sparsely_when_asked() -> None:
    m = fl.parse_model(
        " + ".join(
            [f"{0.5 + 0.1 * j} X{j} X{j + 1}" for j in range(13)]
            + [f"{0.8 - 0.03 * j} Z{j}" for j in range(14)]
        )
    )
    report = fl.verify(m, exact_diagonalization=True)
    lowest = report[verification.LOWEST]
    assert report.ok and lowest.passed and "16384" in lowest.detail


def _smallest_singular_value_flint(sites: int) -> arb:
    """LSM's single-particle matrix N (H = -i sum a_j N_jk b_k) and its smallest singular
    value by inverse iteration in 170-bit ball arithmetic (python-flint arb_mat)."""
    old, ctx.prec = ctx.prec, 170
    try:
        n = arb_mat(sites, sites)
        for j in range(sites):
            n[j, j] = -arb(3) / 5
        for j in range(sites - 1):
            n[j + 1, j] = arb(7) / 10
            n[j, j + 1] = arb(3) / 10
        inv = n.inv()
        x = arb_mat([[1]] * sites)

        def norm(v: arb_mat) -> arb:
            return sum((v[i, 0] ** 2 for i in range(v.nrows())), arb(0)).sqrt()

        for _ in range(4):
            x = inv * (inv.transpose() * x)
            x = x * (1 / norm(x))
        return norm(n * x)
    finally:
        ctx.prec = old


def test_exponentially_small_edge_mode_is_resolved_on_the_sector_route() -> None:
    m = _xy_chain(100)
    sp = fl.free_spectrum(m, sector="ground")
    ball = _smallest_singular_value_flint(100)
    want = float(ball.mid())  # 1.90e-19 (the value)
    assert float(ball.rad()) < 1e-12 * want
    assert want == pytest.approx(1.903e-19, rel=1e-3)
    assert sp.quasi_energies[0] == pytest.approx(want, rel=1e-12)
    assert sp.gap == pytest.approx(2 * want, rel=1e-12) and sp.gap > 0
    # the bulk of the ladder against numpy's singular values of the same matrix
    n = np.diag(np.full(100, -0.6)) + np.diag(np.full(99, 0.7), -1) + np.diag(np.full(99, 0.3), 1)
    bulk = np.sort(np.linalg.svd(n, compute_uv=False))[1:]
    assert np.allclose(sp.quasi_energies[1:], bulk, atol=1e-13)


@pytest.mark.parametrize(
    "text",
    [
        "X0 X1 + Y1 Y2 + Z2 Z3 + X3 X0 + Z1 Z3",
        "0.9 X0 X1 + 1.2 Y1 Y2 + 0.7 X3 X4 + 1.1 Y4 Y5 + 0.8 Z0 Z3 + 1.3 Z1 Z4 + 0.6 Z2 Z5 + 0.3",
    ],
)
def test_sector_basis_against_the_projected_hamiltonian(text: str) -> None:
    # every consistent set of cycle and parity values: the sector's levels are numpy's
    # eigenvalues of H on the range of the projector prod (1 + v W) / 2 (common practice)
    m = fl.parse_model(text)
    strings = [*fl.sectors(m).cycle_operators, *fl.sectors(m).parity_operators]
    h = m.to_sparse().toarray()
    seen = 0
    for values in itertools.product((1, -1), repeat=len(strings)):
        fixed = [(g, v) for g, v in zip(strings, values, strict=True)]
        projector = np.eye(m.dimension, dtype=complex)
        for g, v in fixed:
            projector = projector @ (np.eye(m.dimension) + v * g.to_sparse(m.sites).toarray()) / 2
        weights, vectors = np.linalg.eigh(projector)
        basis = vectors[:, weights > 0.5]
        assert fl.sector_dimension(m, fixed) == basis.shape[1]
        if basis.shape[1] == 0:
            with pytest.raises(ValueError, match="empty"):
                sector_exact_spectrum(m, 1, fixed)
            continue
        want = np.linalg.eigvalsh(basis.conj().T @ h @ basis)
        got = sector_exact_spectrum(m, len(want), fixed).eigenvalues
        np.testing.assert_allclose(got, want, atol=1e-10)
        seen += 1
    assert seen >= 2
