"""Edge dynamics through the hidden modes, checked against exact evolution built here.

References: P. Fendley, J. Phys. A 52, 335002 (2019), arXiv:1901.08078 (edge operator, the
reach-2 chain, the modes); P. Fendley, J. Phys. A 47, 075001 (2014) (free parafermions);
J. Kemp, N. Y. Yao, C. R. Laumann and P. Fendley, J. Stat. Mech. (2017) 063105 (edge-spin
plateau of the Ising chain, 1 - (h/J)^2, quoted from memory and checked here against exact
evolution and the Majorana null vector).  Exact evolution: dense scipy.linalg.expm / eigh with
the full trace (up to 10 sites), sparse scipy.sparse.linalg.expm_multiply with random vectors
(typicality, at 12-14 sites); every matrix is built here from the strings (tests/helpers.py),
not by freeladder.
"""

from __future__ import annotations

import numpy as np
import pytest
import scipy.linalg as sla
import scipy.sparse as sps
import scipy.sparse.linalg as spla
from helpers import dense_string

import freeladder as fl
from freeladder.base.errors import NotExpandableError


def dense_model(m: fl.Model) -> np.ndarray:
    sites = list(m.sites)
    out = sum(complex(c) * dense_string(g, sites) for c, g in m.terms)
    return np.asarray(out)


def sparse_string(g: fl.WeylString, sites: list[int]) -> sps.csr_array:
    """A string as a sparse Kronecker product (site 0 most significant), N = 2 or 3."""
    n = g.states
    shift = sps.csr_array(np.roll(np.eye(n), 1, axis=0))
    clock = sps.csr_array(np.diag(np.exp(2j * np.pi * np.arange(n) / n)))
    ex = g.exponents()
    mat = sps.csr_array(np.array([[1.0 + 0j]]))
    for s in sites:
        a, b = ex.get(s, (0, 0))
        site = sps.identity(n, format="csr", dtype=complex)
        for _ in range(a):
            site = site @ shift
        for _ in range(b):
            site = site @ clock
        mat = sps.csr_array(sps.kron(mat, site, format="csr"))
    return np.exp(1j * np.pi * g.phase / n) * mat


def exact_trace(m: fl.Model, a: str, b: str, times: np.ndarray) -> np.ndarray:
    """``Tr[a^dagger e^{iHt} b e^{-iHt}] / dim`` with dense scipy.linalg.expm (full trace)."""
    h = dense_model(m)
    sites = list(m.sites)
    pa = fl.parse_model(a, states=m.states, sites=m.sites)
    pb = fl.parse_model(b, states=m.states, sites=m.sites)
    ma = complex(pa.coupling_array()[0]) * dense_string(pa.strings[0], sites)
    mb = complex(pb.coupling_array()[0]) * dense_string(pb.strings[0], sites)
    out = []
    hermitian = np.allclose(h, h.conj().T)
    for t in times:
        u = sla.expm(-1j * t * h)
        uinv = u.conj().T if hermitian else sla.expm(1j * t * h)
        out.append(np.trace(ma.conj().T @ uinv @ mb @ u) / h.shape[0])
    return np.array(out)


def exact_hermitian(m: fl.Model, chi: str, times: np.ndarray) -> np.ndarray:
    """The same for a Hermitian H and many times, through scipy.linalg.eigh (full trace)."""
    h = dense_model(m)
    energies, vecs = sla.eigh(h)
    p = fl.parse_model(chi, states=m.states, sites=m.sites)
    x = vecs.conj().T @ dense_string(p.strings[0], list(m.sites)) @ vecs
    weight = np.abs(x) ** 2
    gaps = energies[:, None] - energies[None, :]
    return np.array([np.sum(weight * np.cos(gaps * t)) for t in times]) / h.shape[0]


# -- against dense exact evolution (full trace) --------------------------------------------------
CASES = [
    # Transverse-field Ising chain, field first (Pfeuty 1970; Kemp et al. 2017), 8 sites
    ("ising", fl.ising_chain(8, field=0.6, bond=1.0)),
    # reach-2 chain of Fendley 2019, random couplings, 9 sites
    ("reach2", fl.exclusion_chain(7, reach=2, couplings=[0.7, 1.3, 0.4, 1.1, 0.9, 1.6, 0.5])),
    # variable reach, ends j + p_j non-decreasing (Mann-Elman-Wood-Chapman 2024), 9 sites
    (
        "variable",
        fl.exclusion_chain(
            7, reach=[2, 2, 3, 2, 2, 1, 1], couplings=[0.8, 1.2, 0.5, 1.4, 1, 0.6, 1.1]
        ),
    ),
]


@pytest.mark.parametrize(("name", "m"), CASES, ids=[c[0] for c in CASES])
def test_autocorrelation_against_dense_expm(name: str, m: fl.Model) -> None:
    times = np.array([0.0, 0.7, 2.5, 9.0])
    a = fl.autocorrelation(m, times)
    exact = exact_trace(m, a.operator, a.operator, times)
    tol = 1e-11 + a.errors
    assert np.all(np.abs(a.values - exact) <= tol), (a.values, exact)
    assert a.values[0] == pytest.approx(1.0, abs=1e-12)


@pytest.mark.parametrize(("name", "m"), CASES, ids=[c[0] for c in CASES])
def test_many_times_against_eigh(name: str, m: fl.Model) -> None:
    times = np.linspace(0.0, 60.0, 241)
    a = fl.autocorrelation(m, times)
    exact = exact_hermitian(m, a.operator, times)
    assert np.max(np.abs(a.values - exact)) < 1e-10


def test_z3_chains_against_dense_expm() -> None:
    """Non-Hermitian Z3 clock chains (Baxter 1989; Fendley 2014): complex frequencies, shown."""
    times = np.array([0.0, 0.4, 1.1, 2.0])
    for m in (
        fl.clock_chain(4, field=0.6, bond=1.0, states=3),
        fl.exclusion_chain(4, reach=1, states=3, couplings=list(fl.complex_couplings(4, seed=5))),
        fl.exclusion_chain(4, reach=2, states=3, couplings=[0.9, 0.5, 1.3, 0.7]),
    ):
        a = fl.autocorrelation(m, times)
        exact = exact_trace(m, a.operator, a.operator, times)
        scale = np.maximum(1.0, np.abs(exact))
        assert np.all(np.abs(a.values - exact) <= 1e-8 * scale + a.errors), (a.values, exact)
        assert a.max_growth_rate > 0  # growing terms are reported, not dropped


def test_edge_at_the_far_end_and_other_exponents() -> None:
    """chi next to the last term, with X and X^2 for N = 3 (exponents 1 and 2)."""
    times = np.array([0.3, 1.2])
    m = fl.exclusion_chain(4, reach=2, states=3, couplings=[0.9, 0.5, 1.3, 0.7])
    last = len(m.sites) - 1
    for text in (f"X{last}", f"X{last}^2"):
        a = fl.autocorrelation(m, times, operator=text)
        exact = exact_trace(m, text, text, times)
        assert np.all(np.abs(a.values - exact) <= 1e-8 * np.abs(exact) + a.errors)


# -- against sparse exact evolution (random vectors) --------------------------------------------
def test_reach2_against_expm_multiply_14_sites() -> None:
    """Typicality: R random complex Gaussian vectors estimate Tr[A]/dim of the unitary
    A = chi^dagger chi(t) with standard deviation below 1/sqrt(R dim) (common practice); the
    tolerance is 6 of those."""
    m = fl.exclusion_chain(12, reach=2, couplings=list(fl.random_couplings(12, 0.4, 1.6, seed=3)))
    times = np.linspace(0.0, 6.0, 7)
    a = fl.autocorrelation(m, times)
    h = sum(complex(c) * sparse_string(g, list(m.sites)) for c, g in m.terms)
    chi = sparse_string(fl.parse_model(a.operator, sites=m.sites).strings[0], list(m.sites))
    dim, reps = h.shape[0], 3
    rng = np.random.default_rng(7)
    est = np.zeros(times.size, dtype=complex)
    for _ in range(reps):
        v = rng.normal(size=dim) + 1j * rng.normal(size=dim)
        v /= np.linalg.norm(v)
        kw = dict(start=0.0, stop=times[-1], num=times.size, endpoint=True)
        phi = spla.expm_multiply(-1j * h, v, **kw)
        psi = spla.expm_multiply(-1j * h, chi @ v, **kw)
        est += np.einsum("ti,ti->t", psi.conj(), (chi @ phi.T).T)
    est /= reps
    assert np.max(np.abs(est - a.values)) < 6.0 / np.sqrt(reps * dim)


# -- weights: sums, t = 0, reference eigenvectors ------------------------------------------------
def test_reach1_weights_are_squared_first_eigenvector_components() -> None:
    """Reach 1: W_k = 2 v_k(0)^2 for the zero-diagonal tridiagonal matrix with off-diagonals
    c_j (the Majorana chain; common practice), from scipy.linalg.eigh_tridiagonal."""
    c = fl.random_couplings(1500, 0.3, 1.7, seed=11)
    m = fl.exclusion_chain(c.size, reach=1, couplings=list(c))
    e = fl.edge_expansion(m)
    vals, vecs = sla.eigh_tridiagonal(np.zeros(c.size + 1), c)
    zero = np.argmin(np.abs(vals))  # M even: an odd number of Majoranas, one exact zero mode
    pos = vals > abs(vals[zero])
    ref = 2 * vecs[0, pos] ** 2
    order = np.argsort(vals[pos])
    assert e.weights.size == ref.size
    # LAPACK's eigenvalues are accurate to eps ||T|| absolutely (common practice)
    assert np.allclose(e.quasi_energies, vals[pos][order], rtol=1e-11, atol=1e-14)
    assert np.allclose(e.weights, ref[order], atol=1e-12)
    assert np.all(e.weight_errors < 1e-10)
    assert e.zero_weight == pytest.approx(vecs[0, zero] ** 2, abs=1e-12)


def test_sum_rules_and_value_one() -> None:
    for m in (
        fl.exclusion_chain(300, reach=3, couplings=list(fl.random_couplings(300, 0.2, 2, seed=1))),
        fl.exclusion_chain(60, reach=1, states=3, couplings=list(fl.complex_couplings(60, seed=2))),
    ):
        e = fl.edge_expansion(m)
        assert all(v < 1e-10 for v in e.sum_rules.values()), e.sum_rules
        assert abs(e.zero_weight + np.sum(e.weights) - 1) < 1e-10
        a = fl.autocorrelation(m, [0.0])
        assert abs(a.values[0] - 1) < 1e-10


# -- the Ising edge plateau -----------------------------------------------------------------------
def test_ising_plateau_exact_zero_mode() -> None:
    """Chain ending with a bond: an exact zero mode.  Its weight is the first component of the
    Majorana null vector, 1 / sum_j r^(2j) (r = h/J; common practice), which tends to
    1 - r^2 (Kemp et al. 2017, from memory); checked against exact evolution at 6 sites."""
    r = 0.5
    for sites in (6, 40, 400):
        terms = " + ".join(f"{r} X{i} + Z{i} Z{i + 1}" for i in range(sites - 1))
        m = fl.parse_model(terms)
        a = fl.autocorrelation(m, np.linspace(0, 200, 5))
        assert a.plateau == pytest.approx(1 / np.sum(r ** (2 * np.arange(sites))), rel=1e-12)
        if sites == 6:  # the long-time mean of exact evolution
            times = np.linspace(0, 4000, 8001)
            assert np.mean(exact_hermitian(m, "Z0", times)) == pytest.approx(a.plateau, abs=3e-3)
    assert a.plateau == pytest.approx(1 - r**2, abs=1e-12)


def test_ising_slow_edge_mode_many_decades() -> None:
    """Field at both ends (fl.ising_chain): no exact zero mode, an edge mode eta ~ r^L far below
    float64 at L = 3000; its weight is the plateau 1 - r^2 (Kemp et al. 2017, from memory),
    and the trace stays on it for times far shorter than 1 / eta."""
    r = 0.5
    a = fl.autocorrelation(fl.ising_chain(3000, field=r, bond=1.0), np.linspace(50, 1000, 20))
    log_eta, w = a.slowest
    assert log_eta < -2000 * np.log(2)  # eta below 2**-2000: beyond float64
    err = a.expansion.weight_errors[0]
    assert err < 1e-9
    assert abs(w - (1 - r**2)) <= err + 1e-14
    assert a.plateau == 0.0
    assert abs(a.expansion.weight_below(1e-100) - (1 - r**2)) <= err + 1e-14
    assert np.all(np.abs(a.values - (1 - r**2)) < 0.02)  # bulk terms have dephased


def test_ising_8_sites_slow_mode_against_exact_evolution() -> None:
    """NOTES-numerics measured 0.7145 (8 sites, h/J = 0.5, field first) as a long-time mean of
    dense evolution; here the slow mode's weight predicts the mean over 1/bulk << t << 1/eta."""
    m = fl.ising_chain(8, field=0.5, bond=1.0)
    a = fl.autocorrelation(m, [0.0])
    log_eta, w = a.slowest
    window = np.linspace(0, 0.05 / np.exp(log_eta), 4001)  # 2 eta t < 0.1: cos > 0.995
    exact = exact_hermitian(m, "Z0", window)
    assert np.mean(exact[window > 2]) == pytest.approx(w, abs=1e-2)


def test_no_zero_mode_decays() -> None:
    """Disordered phase h > J (Pfeuty 1970): no edge mode, the trace decays (common practice)."""
    a = fl.autocorrelation(fl.ising_chain(400, field=2.0, bond=1.0), np.linspace(0, 60, 121))
    assert a.plateau == 0.0
    assert a.expansion.weight_below(1e-3) == 0.0
    assert np.max(np.abs(a.values[a.times > 30])) < 0.01
    assert a.values[0] == pytest.approx(1.0)


# -- two-point functions ------------------------------------------------------------------------
def test_two_point_partner_against_dense_expm() -> None:
    m = fl.ising_chain(6, field=0.7, bond=1.0)  # chi = Z0, partner g_a chi = X0 Z0 ~ Y0
    times = np.array([0.0, 0.5, 1.7, 4.0])
    for a, b in (("Y0", "Y0"), ("Z0", "Y0"), ("Y0", "Z0"), ("2 Z0", "-3 Y0")):
        got = fl.two_point(m, a, b, times)
        exact = exact_trace(m, a, b, times)
        assert np.max(np.abs(got.values - exact)) < 1e-11 + got.errors.max(), (a, b)
    m3 = fl.clock_chain(3, field=0.6, bond=1.0, states=3)
    got = fl.two_point(m3, "Z0", "X0 Z0", times)
    exact = exact_trace(m3, "Z0", "X0 Z0", times)
    assert np.all(np.abs(got.values - exact) <= 1e-8 * np.maximum(1, np.abs(exact)) + got.errors)


def test_two_point_edge_term_reach1_against_dense_expm() -> None:
    """The boundary term g_a = i gamma_0 gamma_1 on reach-1 chains through Wick's theorem at
    infinite temperature (common practice for free Majoranas), against dense expm."""
    times = np.array([0.0, 0.5, 1.7, 4.0])
    m = fl.ising_chain(6, field=0.7, bond=1.0)
    chain = fl.exclusion_chain(7, reach=1, couplings=[0.7, 1.3, 0.4, 1.1, 0.9, 1.6, 0.5])
    for model, a, b in ((m, "X0", "X0"), (m, "2 X0", "-X0"), (chain, "X0 Z1", "X0 Z1")):
        got = fl.two_point(model, a, b, times)
        exact = exact_trace(model, a, b, times)
        assert np.max(np.abs(got.values - exact)) < 1e-11 + got.errors.max(), (a, b)
    with pytest.raises(NotExpandableError, match="reach-1"):
        fl.two_point(fl.exclusion_chain(6, reach=2), "X0 Z1 Z2", "X0 Z1 Z2", times)


def test_refusals_say_why() -> None:
    m = fl.ising_chain(6, field=0.7, bond=1.0)
    with pytest.raises(NotExpandableError, match="not expandable"):
        fl.two_point(m, "X1", "Z0", [0.0])
    with pytest.raises(NotExpandableError, match="Hermitian"):
        fl.two_point(fl.clock_chain(3, states=3), "X0 Z0", "Z0", [0.0])
    with pytest.raises(NotExpandableError, match="exactly one term"):
        fl.autocorrelation(m, [0.0], operator="Y1")  # X1, Z0 Z1 and Z1 Z2
    with pytest.raises(NotExpandableError, match="end"):
        fl.autocorrelation(m, [0.0], operator="Z1")  # X1 only: a middle term
    with pytest.raises(ValueError, match="finite"):
        fl.autocorrelation(m, [0.0, np.nan])


def test_result_is_frozen_and_serialisable() -> None:
    a = fl.autocorrelation(fl.ising_chain(5, field=0.5), [0.0, 1.0])
    with pytest.raises((AttributeError, TypeError)):
        a.values = np.zeros(2)  # type: ignore[misc]
    with pytest.raises(ValueError):
        a.values[0] = 2.0
    d = a.to_dict()
    assert d["operator"] == "Z0" and d["values"][0] == pytest.approx(1.0)
    assert "GROWING" not in repr(a)
