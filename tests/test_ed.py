"""Exact diagonalization (freeladder.spectra.ed) against published closed forms and numpy/scipy."""

from __future__ import annotations

import itertools

import numpy as np
import pytest
from scipy.optimize import brentq, linear_sum_assignment

import freeladder as fl
from freeladder.base.errors import TooLargeError
from freeladder.spectra.matching import match_levels

_PAULI = {
    "I": np.eye(2),
    "X": np.array([[0, 1], [1, 0]], dtype=complex),
    "Y": np.array([[0, -1j], [1j, 0]]),
    "Z": np.diag([1.0, -1.0]).astype(complex),
}


def _kron_all(mats: list[np.ndarray]) -> np.ndarray:
    out = np.array([[1.0 + 0j]])
    for a in mats:
        out = np.kron(out, a)
    return out


def _pauli_dense(word: str) -> np.ndarray:
    return _kron_all([_PAULI[ch] for ch in word])


def pfeuty_quasi_energies(lam: float, n_sites: int) -> np.ndarray:
    """eta_k of the open chain H = -sum X_i - lam sum Z_i Z_{i+1}.

    P. Pfeuty, Ann. Phys. 57, 79 (1970): eta = sqrt(1 + lam^2 + 2 lam cos k) with
    sin(k (L + 1)) + lam sin(k L) = 0, k in (0, pi).  For lam > 1 + 1/L one root is
    k = pi + i v; then the equation becomes lam sinh(v L) = sinh(v (L + 1)) and
    eta = sqrt(1 + lam^2 - 2 lam cosh v) (analytic continuation of the same formula).
    """

    def f(k: float) -> float:
        return float(np.sin(k * (n_sites + 1)) + lam * np.sin(k * n_sites))

    grid = np.linspace(1e-9, np.pi - 1e-9, 40001)
    vals = np.array([f(k) for k in grid])
    roots = [
        brentq(f, grid[i], grid[i + 1], xtol=1e-15)
        for i in np.nonzero(np.sign(vals[:-1]) != np.sign(vals[1:]))[0]
    ]
    etas = [np.sqrt(1 + lam**2 + 2 * lam * np.cos(k)) for k in roots]
    if lam > 1 + 1 / n_sites:

        def g(v: float) -> float:
            return float(lam * np.sinh(v * n_sites) - np.sinh(v * (n_sites + 1)))

        v = brentq(g, 1e-6, np.log(lam), xtol=1e-15)
        etas.append(np.sqrt(max(0.0, 1 + lam**2 - 2 * lam * np.cosh(v))))
    assert len(etas) == n_sites, "the quantisation condition must give L modes"
    return np.sort(np.array(etas))


def all_sums(etas: np.ndarray) -> np.ndarray:
    """Every sum_k +-eta_k (BACKGROUND section 1, N = 2), sorted."""
    signs = np.array(list(itertools.product((-1.0, 1.0), repeat=len(etas))))
    return np.sort(signs @ etas)


@pytest.mark.parametrize("lam", [0.3, 0.8, 1.6, 3.0])
@pytest.mark.parametrize("n_sites", [5, 6, 7, 8])
def test_open_ising_chain_matches_pfeuty(lam: float, n_sites: int) -> None:
    # Reference: P. Pfeuty, Ann. Phys. 57, 79 (1970), the open transverse-field Ising chain.
    m = fl.ising_chain(n_sites, field=1.0, bond=lam)
    ed = fl.exact_spectrum(m)
    assert ed.method == "dense-hermitian"
    assert ed.complete and len(ed.eigenvalues) == 2**n_sites
    expected = all_sums(pfeuty_quasi_energies(lam, n_sites))
    np.testing.assert_allclose(ed.eigenvalues, expected, atol=1e-9)
    assert ed.error_estimate < 1e-9


def test_pfeuty_edge_mode_is_exponentially_small() -> None:
    # Pfeuty (1970): in the ordered phase the complex root gives an edge mode ~ lam^-L.
    etas = pfeuty_quasi_energies(3.0, 8)
    assert 0 < etas[0] < 3.0**-6


def _random_pauli_model(rng: np.random.Generator, n_sites: int, n_terms: int, complex_c: bool):
    terms, dense = [], np.zeros((2**n_sites, 2**n_sites), dtype=complex)
    for _ in range(n_terms):
        word = "".join(rng.choice(list("IXYZ"), size=n_sites))
        c = rng.normal() + (1j * rng.normal() if complex_c else 0.0)
        terms.append((c, fl.pauli(word)))
        dense += c * _pauli_dense(word)
    return fl.Model.from_terms(terms, sites=range(n_sites)), dense


@pytest.mark.parametrize("seed", range(4))
def test_random_hermitian_pauli_models_against_numpy(seed: int) -> None:
    # Reference: numpy.linalg.eigvalsh on a matrix built here with np.kron (common practice).
    rng = np.random.default_rng(seed)
    m, dense = _random_pauli_model(rng, 4, 7, complex_c=False)
    ed = fl.exact_spectrum(m)
    assert ed.hermitian and ed.method == "dense-hermitian"
    np.testing.assert_allclose(ed.eigenvalues, np.linalg.eigvalsh(dense), atol=1e-10)
    assert ed.multiplicities.sum() == 16


@pytest.mark.parametrize("seed", range(4))
def test_random_non_hermitian_models_against_numpy(seed: int) -> None:
    # Reference: numpy.linalg.eigvals (LAPACK geev) on a matrix built here with np.kron.
    rng = np.random.default_rng(seed)
    m, dense = _random_pauli_model(rng, 4, 6, complex_c=True)
    ed = fl.exact_spectrum(m)
    assert not ed.hermitian and ed.method == "dense-general"
    _assert_same_multiset(ed.eigenvalues, np.linalg.eigvals(dense), 1e-9)


def _clock_dense(n: int, n_sites: int, field: np.ndarray, bond: np.ndarray) -> np.ndarray:
    omega = np.exp(2j * np.pi / n)
    x = np.roll(np.eye(n), 1, axis=0)  # X|s> = |s+1 mod N>
    z = np.diag(omega ** np.arange(n))
    one = np.eye(n)
    h = np.zeros((n**n_sites,) * 2, dtype=complex)
    for i in range(n_sites):
        h -= field[i] * _kron_all([x if j == i else one for j in range(n_sites)])
        if i + 1 < n_sites:
            ops = [z if j == i else z.conj().T if j == i + 1 else one for j in range(n_sites)]
            h -= bond[i] * _kron_all(ops)
    return h


@pytest.mark.parametrize("states", [3, 4])
def test_clock_chain_against_numpy(states: int) -> None:
    # Reference: numpy.linalg.eigvals on the Z_N clock chain built here from shift/clock matrices.
    rng = np.random.default_rng(states)
    n_sites = 4 if states == 3 else 3
    f, jj = rng.uniform(0.5, 1.5, n_sites), rng.uniform(0.5, 1.5, n_sites - 1)
    m = fl.clock_chain(n_sites, field=f, bond=jj, states=states)
    ed = fl.exact_spectrum(m)
    ref = np.linalg.eigvals(_clock_dense(states, n_sites, f, jj))
    assert ed.method == "dense-general"
    _assert_same_multiset(ed.eigenvalues, ref, 1e-8)


def _assert_same_multiset(a: np.ndarray, b: np.ndarray, atol: float) -> None:
    """Equal as multisets: an optimal one-to-one matching moves no value more than atol."""
    assert len(a) == len(b)
    cost = np.abs(a[:, None] - b[None, :])
    rows, cols = linear_sum_assignment(cost)
    assert cost[rows, cols].max() < atol


def test_multiplicities_trivial_degeneracy() -> None:
    # Common practice: H = 2 Z0 + 0.5 on three qubits has levels -1.5 and 2.5, each 4-fold.
    m = fl.parse_model("0.5 + 2 Z0", sites=[0, 1, 2])
    ed = fl.exact_spectrum(m)
    np.testing.assert_allclose(ed.levels, [-1.5, 2.5])
    assert ed.multiplicities.tolist() == [4, 4]


def test_multiplicities_of_reach_two_chain() -> None:
    # Reach-2 chain, M = 4 terms on 6 sites: S = floor((M + p) / (p + 1)) = 2 quasi-energies,
    # so 4 levels sum(+-eta), each of multiplicity 64 / 2^2 = 16 (P. Fendley, J. Phys. A 52,
    # 335002 (2019)).  Independent check: numpy eigvalsh and counting by hand.
    c = [0.7, 1.3, 0.9, 1.1]
    m = fl.exclusion_chain(4, reach=2, couplings=c)
    ed = fl.exact_spectrum(m)
    assert ed.multiplicities.tolist() == [16, 16, 16, 16]
    dense = m.to_sparse().toarray()
    ref = np.linalg.eigvalsh(dense)
    np.testing.assert_allclose(np.repeat(ed.levels, 16), ref, atol=1e-10)


def test_thirteen_site_chain_sparse_lowest_levels() -> None:
    # 2^13 = 8192 > DENSE_LIMIT: the sparse (eigsh) path.  Reference for the 6 lowest levels:
    # Pfeuty's closed form (Ann. Phys. 57, 79 (1970)) -- a dense 8192 solve is too slow for CI.
    lam = 0.8
    m = fl.ising_chain(13, field=1.0, bond=lam)
    ed = fl.exact_spectrum(m, k=6)
    assert ed.method == "sparse-eigsh" and not ed.complete
    expected = all_sums(pfeuty_quasi_energies(lam, 13))[:6]
    np.testing.assert_allclose(ed.eigenvalues, expected, atol=1e-9)
    assert ed.error_estimate < 1e-8


@pytest.mark.parametrize("states", [2, 3])
def test_forced_sparse_agrees_with_dense(states: int) -> None:
    # Reference: numpy.linalg (through the dense path, itself checked above) on the same model.
    rng = np.random.default_rng(7)
    n_sites = 9 if states == 2 else 6
    f, jj = rng.uniform(0.5, 1.5, n_sites), rng.uniform(0.5, 1.5, n_sites - 1)
    if states == 2:
        m = fl.ising_chain(n_sites, field=f, bond=jj)
    else:
        m = fl.clock_chain(n_sites, field=f, bond=jj, states=3)
    sparse = fl.exact_spectrum(m, k=5, solver="sparse")
    dense = fl.exact_spectrum(m)
    assert sparse.method == ("sparse-eigsh" if states == 2 else "sparse-eigs")
    # the k lowest by real part; complex pairs may be split by the cut, so compare real parts
    np.testing.assert_allclose(
        np.sort(sparse.eigenvalues.real), np.sort(dense.eigenvalues.real)[:5], atol=1e-8
    )


def test_refuses_symbolic_models() -> None:
    m = fl.parse_model("g X0 + Z0 Z1")
    with pytest.raises(ValueError, match=r"symbolic.*m\.subs"):
        fl.exact_spectrum(m)
    ed = fl.exact_spectrum(m.subs({"g": 0.5}))
    assert ed.dimension == 4


def test_refuses_dense_solve_when_too_large() -> None:
    m = fl.ising_chain(13)
    with pytest.raises(TooLargeError, match=r"dimension 8192 .*pass k=1\.\.") as info:
        fl.exact_spectrum(m)
    # the suggestion must succeed: the largest k it names, and a small one
    top = int(str(info.value).split("k=1..")[1].split()[0])
    assert top >= 5
    assert fl.exact_spectrum(m, k=5).eigenvalues.shape == (5,)


def test_refuses_when_memory_is_short() -> None:
    m = fl.ising_chain(40)
    with pytest.raises(TooLargeError, match=r"dimension 1099511627776 .*too large") as info:
        fl.exact_spectrum(m, k=2)
    assert "pass k" not in str(info.value)
    # without k: refused as well, and k is not suggested, since it would be refused too
    with pytest.raises(TooLargeError) as info:
        fl.exact_spectrum(m)
    assert "pass k" not in str(info.value) and "too large for exact diagonalization" in str(
        info.value
    )


def test_bad_arguments() -> None:
    m = fl.ising_chain(3)
    for bad in (0, 9, 2.5, True):
        with pytest.raises(ValueError, match="k must be"):
            fl.exact_spectrum(m, k=bad)  # type: ignore[arg-type]
    with pytest.raises(ValueError, match="tol"):
        fl.exact_spectrum(m, tol=float("nan"))
    with pytest.raises(ValueError, match="solver"):
        fl.exact_spectrum(m, solver="fast")
    with pytest.raises(ValueError, match="needs k"):
        fl.exact_spectrum(m, solver="sparse")


def test_k_lowest_dense_and_repr() -> None:
    m = fl.ising_chain(4, field=1.0, bond=0.5)
    ed = fl.exact_spectrum(m, k=3)
    full = fl.exact_spectrum(m)
    np.testing.assert_allclose(ed.eigenvalues, full.eigenvalues[:3])
    assert not ed.complete
    assert "ExactSpectrum(dimension=16" in repr(ed)
    assert "<table" in ed._repr_html_()


def test_result_is_immutable() -> None:
    ed = fl.exact_spectrum(fl.ising_chain(2))
    with pytest.raises(ValueError):
        ed.eigenvalues[0] = 0.0
    with pytest.raises(AttributeError):
        ed.method = "x"  # type: ignore[misc]


# -- free levels against exact levels (match_levels) ---------------------------------------------
@pytest.mark.parametrize("lam", [0.5, 1.0, 2.5])
def test_match_levels_ising_against_numpy(lam: float) -> None:
    # free levels of the open Ising chain (Pfeuty 1970) against numpy's dense eigenvalues
    n_sites = 6
    m = fl.ising_chain(n_sites, field=1.0, bond=lam)
    ed = fl.exact_spectrum(m)
    np.testing.assert_allclose(
        ed.eigenvalues, all_sums(pfeuty_quasi_energies(lam, n_sites)), atol=1e-9
    )
    result = match_levels(fl.free_spectrum(m).levels(None), ed)
    assert result.ok and result.matched == 2**n_sites and result.distance < 1e-9
    assert not result.unmatched_free and not result.unmatched_exact
    # the same levels given as values + multiplicities, grouped by hand
    values, counts = np.unique(
        np.round(all_sums(pfeuty_quasi_energies(lam, n_sites)), 9), return_counts=True
    )
    assert match_levels((values, counts), ed, tol=1e-8).ok


def test_match_levels_reports_what_is_missing() -> None:
    m = fl.ising_chain(4, field=1.0, bond=0.7)
    ed = fl.exact_spectrum(m)
    free = np.sort(all_sums(pfeuty_quasi_energies(0.7, 4)))
    # one level moved: one unmatched level on each side, the report names both
    moved = free.copy()
    moved[-1] += 0.25
    r = match_levels((moved, 1), ed, tol=1e-8)
    assert not r.ok and r.matched == 15
    assert len(r.unmatched_free) == 1 and abs(r.unmatched_free[0][0] - moved[-1]) < 1e-12
    assert len(r.unmatched_exact) == 1 and abs(r.unmatched_exact[0][0] - free[-1]) < 1e-8
    # wrong multiplicity: twice each level is 32 against 16
    r2 = match_levels((free, 2), ed, tol=1e-8)
    assert not r2.ok and r2.matched == 16 and sum(c for _, c in r2.unmatched_free) == 16
    import json

    assert json.loads(json.dumps(r.to_dict(), allow_nan=False))["ok"] is False
    with pytest.raises(AttributeError):
        r.ok = True  # type: ignore[misc]


@pytest.mark.parametrize("states", [3, 4])
def test_match_levels_clock_chain_complex(states: int) -> None:
    # complex levels: the free clock chain against numpy.linalg.eigvals of the dense matrix
    rng = np.random.default_rng(10 + states)
    n_sites = 4 if states == 3 else 3
    f, jj = rng.uniform(0.5, 1.5, n_sites), rng.uniform(0.5, 1.5, n_sites - 1)
    m = fl.clock_chain(n_sites, field=f, bond=jj, states=states)
    ed = fl.exact_spectrum(m)
    _assert_same_multiset(
        ed.eigenvalues, np.linalg.eigvals(_clock_dense(states, n_sites, f, jj)), 1e-8
    )
    table = fl.free_spectrum(m).levels(None)
    r = match_levels(table, ed)
    assert r.ok and r.matched == states**n_sites, str(r)
    # a rotated level (omega times one value) is caught
    vals = np.array(table.energies, dtype=complex)
    vals[0] *= np.exp(2j * np.pi / states) if abs(vals[0]) > 0.1 else 2
    assert not match_levels((vals, table.multiplicity), ed).ok
