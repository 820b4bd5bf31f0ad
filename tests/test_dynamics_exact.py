"""Certified edge weights (exact couplings) and the speed of the float weights.

References: P. Fendley, J. Phys. A 52, 335002 (2019) (the edge operator and the modes; the
reach-2 chain); J. Kemp, N. Y. Yao, C. R. Laumann and P. Fendley, J. Stat. Mech. (2017)
063105 (the edge-spin plateau of the Ising chain).  Outside references: dense numpy / scipy
eigendecomposition of the Hamiltonian built here from the strings (tests/helpers.py), with
the spectral weights of ``Tr[chi chi(t)] / dim`` read off the eigenvectors (common practice);
the Majorana null vector of the Ising chain (common practice); sympy's exact rationals.
"""

from __future__ import annotations

from fractions import Fraction

import numpy as np
import pytest
import scipy.linalg as sla
from helpers import dense_string

import freeladder as fl


def spectral_weights(m: fl.Model, chi: str) -> tuple[np.ndarray, np.ndarray]:
    """Gaps ``E_a - E_b`` and weights ``|<a|chi|b>|^2 / dim`` of a Hermitian model (dense)."""
    sites = list(m.sites)
    h = sum(complex(c) * dense_string(g, sites) for c, g in m.terms)
    h = np.asarray(h)
    if np.abs(h.imag).max() < 1e-14:  # a real symmetric matrix: the faster real solver
        h = h.real
    energies, vecs = sla.eigh(h)
    p = fl.parse_model(chi, states=m.states, sites=m.sites)
    x = vecs.conj().T @ dense_string(p.strings[0], sites) @ vecs
    gaps = energies[:, None] - energies[None, :]
    return gaps.ravel(), (np.abs(x) ** 2).ravel() / h.shape[0]


def weight_near(gaps: np.ndarray, weights: np.ndarray, f: float, tol: float = 1e-7) -> float:
    return float(weights[np.abs(gaps - f) < tol].sum())


def test_certified_weights_reach2_against_dense_eigenvectors() -> None:
    """Reach-2 chain (Fendley 2019) with rational couplings, 8 sites: every ball holds the
    spectral weight of exact diagonalization at its frequency 2 eta_k (dense eigh)."""
    c = [Fraction(k % 4 + 2, 3) for k in range(6)]
    m = fl.exclusion_chain(6, reach=2, couplings=c)
    b = fl.certified_edge_weights(m)
    e = fl.edge_expansion(m)
    assert b.sum_is_one and b.verified and b.agreement is not None and b.agreement <= 1
    assert e.weight_balls is not None and e.weight_balls.verified  # attached on its own
    gaps, w = spectral_weights(m, e.operator)
    eta = np.sqrt(1 / b.roots.real)  # eta^2 = 1 / y
    for k in range(b.weights.size):
        ref = weight_near(gaps, w, 2 * eta[k]) + weight_near(gaps, w, -2 * eta[k])
        assert abs(ref - b.weights[k]) < 1e-10 + b.radii[k], (k, ref, b.weights[k])
    assert weight_near(gaps, w, 0.0) == pytest.approx(float(b.zero_weight), abs=1e-10)
    assert np.all(b.radii < 1e-15)


def test_certified_zero_weight_is_the_exact_null_vector_weight() -> None:
    """Ising chain ending with a bond, h/J = 1/2: the exact zero-mode weight is
    1 / sum_{j<L} r^(2j) (Majorana null vector, common practice), here as a Fraction; it
    tends to the plateau 1 - r^2 (Kemp et al. 2017, from memory)."""
    r = Fraction(1, 2)
    for sites in (4, 12):
        terms = [(r, f"X{i}") for i in range(sites - 1)]
        text = " + ".join(f"1/2 X{i} + Z{i} Z{i + 1}" for i in range(sites - 1))
        m = fl.parse_model(text)
        b = fl.certified_edge_weights(m)
        exact = 1 / sum(r ** (2 * j) for j in range(sites))
        assert b.zero_weight == exact, (b.zero_weight, exact, terms)
        assert b.sum_is_one
    assert abs(float(b.zero_weight) - float(1 - r**2)) < 1e-6


def test_certified_weights_reach1_are_squared_eigenvector_components() -> None:
    """Reach 1: W_k = 2 v_k(0)^2 for the zero-diagonal tridiagonal matrix with off-diagonals
    c_j (common practice), from scipy.linalg.eigh_tridiagonal."""
    c = [Fraction(k % 5 + 1, 4) for k in range(30)]
    m = fl.exclusion_chain(30, reach=1, couplings=c)
    b = fl.certified_edge_weights(m)
    vals, vecs = sla.eigh_tridiagonal(np.zeros(31), np.array([float(v) for v in c]))
    pos = vals > 1e-9
    ref = (2 * vecs[0, pos] ** 2)[np.argsort(vals[pos])]  # by increasing eta: decreasing y
    assert np.allclose(b.weights, ref, atol=1e-12)
    assert b.sum_is_one and b.agreement is not None and b.agreement <= 1


def test_certified_weights_z3_gaussian_rationals() -> None:
    """Z3 chain with complex couplings (a model keeps them as complex floats, taken here as
    the binary fractions they are): the balls agree with the float weights of the complex
    root path, the sum holds 1, and the autocorrelation built from the balls matches dense
    exact evolution (scipy.linalg.expm, full trace) at t = 0.7."""
    c = [1 + 1j, Fraction(1, 2), 2 - 0.25j, 1j]
    m = fl.exclusion_chain(4, reach=1, states=3, couplings=c)
    with pytest.raises(ValueError, match="floats=True"):
        fl.certified_edge_weights(m)
    b = fl.certified_edge_weights(m, floats=True)
    assert isinstance(b.weights[0], complex | np.complexfloating)
    assert b.sum_is_one and b.agreement is not None and b.agreement <= 1
    e = fl.edge_expansion(m)
    sites = list(m.sites)
    h = sum(complex(cc) * dense_string(g, sites) for cc, g in m.terms)
    chi = dense_string(fl.parse_model(e.operator, states=3, sites=m.sites).strings[0], sites)
    t = 0.7
    ref = np.trace(chi.conj().T @ sla.expm(1j * t * h) @ chi @ sla.expm(-1j * t * h)) / len(h)
    # the frequencies of the expansion with the certified weights in place of the float ones
    order = [int(np.argmin(np.abs(b.roots - 1 / eta**3))) for eta in e.quasi_energies]
    w = b.weights[order]
    got = complex(e.zero_weight) + np.sum(w[:, None] / 3 * np.exp(1j * t * e.frequencies))
    assert abs(got - ref) < 1e-10


def test_certified_weights_refuse_with_reasons() -> None:
    with pytest.raises(ValueError, match="exact couplings"):
        fl.certified_edge_weights(fl.ising_chain(4, field=0.5))
    with pytest.raises(ValueError, match="max_degree"):
        fl.certified_edge_weights(fl.exclusion_chain(40), max_degree=10)
    big = fl.edge_expansion(fl.exclusion_chain(200))
    assert big.weight_balls is None  # above the automatic degree: the float weights alone
    assert fl.edge_expansion(fl.ising_chain(4, field=0.5)).weight_balls is None
    d = fl.edge_expansion(fl.exclusion_chain(6)).to_dict()
    assert d["weight_balls"]["verified"] is True
    # 6 unit couplings, 7 Majoranas: null vector (1, 0, -1, 0, 1, 0, -1) / 2 (common practice)
    assert d["weight_balls"]["zero_weight_exact"] == "1/4"


def test_weights_many_decades_against_squared_components() -> None:
    """The blocked weight evaluation: couplings spanning 10^-12 .. 1 (quasi-energies over many
    decades) still match the tridiagonal eigenvectors (eigh_tridiagonal, common practice)."""
    rng = np.random.default_rng(5)
    c = 10.0 ** rng.uniform(-12, 0, 401)
    m = fl.exclusion_chain(c.size, reach=1, couplings=list(c))
    e = fl.edge_expansion(m)
    vals, vecs = sla.eigh_tridiagonal(np.zeros(c.size + 1), c)
    pos = vals > 0
    ref = (2 * vecs[0, pos] ** 2)[np.argsort(vals[pos])]
    big = ref > 1e-6
    assert np.allclose(e.weights[big], ref[big], rtol=1e-6)
    assert abs(e.zero_weight + e.weights.sum() - 1) < 1e-10


# -- the checked summary in the report and the JSON ---------------------------------------------
def test_report_json_carries_the_checked_dynamics() -> None:
    """``report --json`` (Analysis.to_dict(checks=True)) holds the weights, frequencies,
    plateau and values; the values equal exact evolution computed here (scipy.linalg.expm,
    full trace) and the weights sum to 1 with the plateau (Fendley 2019)."""
    from freeladder.output.cli import report_data

    m = fl.parse_model("0.5 X0 + Z0 Z1 + 0.7 X1 + 1.3 Z1 Z2")
    d = report_data(m)["dynamics"]
    assert d["operator"] == "Z0" and d["verified"]["passed"] is True
    assert d["verified"]["method"].startswith("dense exact evolution")
    assert abs(d["plateau"] + sum(d["weights"]) - 1) < 1e-12
    assert len(d["frequencies"]) == len(d["weights"])
    sites = list(m.sites)
    h = np.asarray(sum(complex(c) * dense_string(g, sites) for c, g in m.terms))
    z0 = dense_string(fl.parse_model("Z0", sites=m.sites).strings[0], sites)
    for t, v in zip(d["times"], d["values"], strict=True):
        ref = np.trace(z0 @ sla.expm(1j * t * h) @ z0 @ sla.expm(-1j * t * h)).real / len(h)
        assert abs(v - ref) < 1e-10
    assert fl.analyze(m).to_dict()["dynamics"] is None  # only with the checks
    # no edge operator for a model whose only string is the identity's multiple: a reason
    bad = fl.analyze(fl.parse_model("X0 X1 + Z0 Z1 + Y0 Y1")).to_dict(checks=True)["dynamics"]
    assert bad["error"] == "NotExpandableError" and bad["message"]


def test_dense_reference_of_the_check_matches_scipy_expm_and_can_fail() -> None:
    """The check's dense reference (numpy eig, non-Hermitian Z3 chain) against
    scipy.linalg.expm, and a wrong value is caught: the tolerance is far below it."""
    from freeladder.checks.edge_dynamics import dense_autocorrelation

    m = fl.clock_chain(3, states=3)
    t = np.array([0.0, 0.3, 0.8])
    got, rounding, hermitian = dense_autocorrelation(m, "Z0", t)
    assert not hermitian
    sites = list(m.sites)
    h = np.asarray(sum(complex(c) * dense_string(g, sites) for c, g in m.terms))
    z0 = dense_string(fl.parse_model("Z0", states=3, sites=m.sites).strings[0], sites)
    ref = [
        np.trace(z0.conj().T @ sla.expm(1j * s * h) @ z0 @ sla.expm(-1j * s * h)) / len(h)
        for s in t
    ]
    assert np.all(np.abs(got - np.array(ref)) < 1e-10)
    c = fl.check_autocorrelation(m, t)
    assert c.passed and all(c.compared) and c.tolerance < 1e-6
    assert not c.hermitian


def test_report_dynamics_refuses_past_its_size_with_the_reason_and_dimensions_stay_short() -> None:
    # The report's dynamics stops at DYNAMICS_TERMS (its cost grows as the square of the terms);
    # the refusal comes before any work.  Dimensions are written as powers: a chain of 2*10^4
    # sites has 6021 decimal digits, past Python's 4300-digit limit for int -> str, which made
    # the check crash (fact of the language; common practice).
    from freeladder.analysis import DYNAMICS_TERMS
    from freeladder.base.display import dimension_text
    from freeladder.base.errors import TooLargeError

    m = fl.exclusion_chain(DYNAMICS_TERMS + 1, reach=2)
    with pytest.raises(TooLargeError, match="fl.autocorrelation"):
        fl.analyze(m).dynamics()
    assert dimension_text(2**20001) == "2^20001"
    assert dimension_text(3**5000) == "3^5000"
    assert dimension_text(1024) == "1024"
    assert dimension_text(6**20 * 5 + 1) == "about 10^16"
