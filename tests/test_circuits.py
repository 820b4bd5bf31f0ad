"""The edge autocorrelation under the transfer-matrix circuit, against dense evolution.

Reference: the transfer matrix ``T(u) = sum_S (-u)^|S| prod_{j in S} c_j h_j`` built here by
brute force (every subset of terms whose dense matrices commute pairwise, products of dense
matrices from tests/helpers.py), ``U = T(i theta)`` normalised by ``Tr[T T^dagger] / dim``,
checked unitary, and ``Tr[chi U^-n chi U^n] / dim`` by repeated dense products (numpy).  The
transfer matrix and its properties are P. Fendley, J. Phys. A 52, 335002 (2019) (reach 2) and
F. C. Alcaraz and R. A. Pimenta, Phys. Rev. B 102, 121101(R) (2020) (any reach); the
Ising chain's edge spin Z0 is common practice.
"""

from __future__ import annotations

import functools
import itertools

import numpy as np
import pytest
from helpers import dense_string

import freeladder as fl
from freeladder.base.errors import NotExpandableError

STEPS = [0, 1, 2, 5, 12]


@functools.lru_cache(maxsize=8)
def dense_charges(text: str) -> tuple[np.ndarray, ...]:
    """``Q^(r) = sum_{|S| = r} prod_{j in S} c_j h_j`` over pairwise commuting subsets S."""
    m = fl.parse_model(text)
    sites = list(m.sites)
    mats = [complex(c) * dense_string(g, sites) for c, g in m.terms]
    # Pauli strings commute iff their symplectic product is even (common practice)
    ex = [g.exponents() for g in m.strings]
    comm = [
        [
            sum(a1 * b2 + a2 * b1 for s_, (a1, b1) in x.items() for a2, b2 in [y.get(s_, (0, 0))])
            % 2
            == 0
            for y in ex
        ]
        for x in ex
    ]
    d = mats[0].shape[0]
    out = []
    for r in range(len(mats) + 1):
        q = np.zeros((d, d), dtype=complex)
        for subset in itertools.combinations(range(len(mats)), r):
            if all(comm[i][j] for i, j in itertools.combinations(subset, 2)):
                prod = np.eye(d, dtype=complex)
                for j in subset:
                    prod = prod @ mats[j]
                q += prod
        out.append(q)
    return tuple(out)


def dense_transfer(m: fl.Model, u: complex) -> np.ndarray:
    """``T(u) = sum_r (-u)^r Q^(r)``."""
    return sum((-u) ** r * q for r, q in enumerate(dense_charges(str(m))))


def exact_circuit(m: fl.Model, chi: str, steps: list[int], theta: float) -> np.ndarray:
    t = dense_transfer(m, 1j * theta)
    u = t / np.sqrt(np.real(np.trace(t @ t.conj().T)) / len(t))
    assert np.max(np.abs(u @ u.conj().T - np.eye(len(u)))) < 1e-12  # T(i theta) ~ unitary
    x = dense_string(fl.parse_model(chi, sites=m.sites).strings[0], list(m.sites))
    out, un = {}, np.eye(len(u), dtype=complex)
    for n in range(max(steps) + 1):
        if n in steps:  # Tr[x^dagger U^-n x U^n] = sum of (x^dagger U^dagger)^T * (x U) entries
            out[n] = np.vdot(un @ x, x @ un).real / len(u)
        un = u @ un
    return np.array([out[n] for n in steps])


MODELS = {
    "ising": lambda: fl.ising_chain(5, field=0.6),
    "reach 2": lambda: fl.exclusion_chain(6, reach=2, couplings=[1.0, 0.7, 1.3, 0.9, 1.1, 0.8]),
    "variable reach": lambda: fl.exclusion_chain(
        6, reach=[1, 2, 1, 2, 1, 1], couplings=[0.8, 1.2, 0.6, 1.0, 1.4, 0.9]
    ),
}


@pytest.mark.parametrize("name", sorted(MODELS))
@pytest.mark.parametrize("theta", [0.25, -1.7])
def test_transfer_matrix_circuit_matches_dense_evolution(name: str, theta: float) -> None:
    m = MODELS[name]()
    got = fl.circuit_autocorrelation(m, STEPS, theta)
    want = exact_circuit(m, got.operator, STEPS, theta)
    assert np.max(np.abs(got.values - want)) < 1e-12
    assert np.all(got.errors < 1e-12)
    assert got.values[0] == pytest.approx(1.0, abs=1e-13)


def test_small_angle_approaches_continuous_time() -> None:
    # one step of U(theta) is exp(-i theta H) to first order: n steps ~ time n theta
    m = fl.ising_chain(6, field=0.7)
    theta, n = 1e-3, np.arange(0, 2001, 250)
    disc = fl.circuit_autocorrelation(m, n, theta).values
    cont = fl.autocorrelation(m, n * theta).values
    assert np.max(np.abs(disc - cont)) < 1e-4
    assert np.max(np.abs(disc - cont)) > 1e-9  # the phases are arctan(theta eta), not theta eta


def test_exact_zero_mode_is_the_plateau() -> None:
    m = fl.parse_model("0.5 X0 + Z0 Z1")  # chi = Z0: zero weight 0.8 (three Majoranas)
    c = fl.circuit_autocorrelation(m, [0, 1, 2, 3], 0.9)
    want = exact_circuit(m, "Z0", [0, 1, 2, 3], 0.9)
    assert c.plateau == pytest.approx(0.8, abs=1e-12)
    assert np.max(np.abs(c.values - want)) < 1e-12


def test_refusals() -> None:
    with pytest.raises(NotExpandableError, match="N = 2 and real couplings"):
        fl.circuit_autocorrelation(fl.clock_chain(4, states=3), [1], 0.3)
    cx = fl.ising_chain(3).with_couplings([1.0, 0.5 + 0.2j, 1.0, 0.5, 1.0])
    with pytest.raises(NotExpandableError, match="complex couplings"):
        fl.circuit_autocorrelation(cx, [1], 0.3)
    with pytest.raises(ValueError, match="integers"):
        fl.circuit_autocorrelation(fl.ising_chain(3), [0, 1.5], 0.3)
    with pytest.raises(ValueError, match="non-zero"):
        fl.circuit_autocorrelation(fl.ising_chain(3), [1], 0.0)
    with pytest.raises(TypeError, match="real number"):
        fl.circuit_autocorrelation(fl.ising_chain(3), [1], "0.3")  # type: ignore[arg-type]
