"""The exact sweep: [T(u), T(v)] = 0 and the inversion relation decided for all u, v at once.

References: S. J. Elman, A. Chapman and S. T. Flammia, Commun. Math. Phys. 388, 969 (2021),
arXiv:2012.07857 -- for N = 2 the charges commute when the frustration graph is claw-free, and
T(u) T(-u) = P(u^2) when it is also even-hole-free; F. C. Alcaraz and R. A. Pimenta,
Phys. Rev. B 102, 121101(R) (2020), arXiv:2005.14622 -- exclusion chains of any reach p and N.

The reference for small models is independent of the library: the charges are summed as
dense numpy matrices over independent sets found by brute force (pairs of dense matrices that
commute), and commutators and traces are taken with numpy.
"""

from __future__ import annotations

from fractions import Fraction
from itertools import combinations

import numpy as np
import pytest
from helpers import dense_string, random_pauli_model

import freeladder as fl
from freeladder.checks.charge_sweep import commutator_sweep, inversion_sweep


def dense_terms(m: fl.Model) -> list[np.ndarray]:
    sites = list(m.sites)
    return [
        complex(c) * dense_string(g, sites) for c, g in zip(m.couplings, m.strings, strict=True)
    ]


def dense_charges(m: fl.Model) -> list[np.ndarray]:
    """Q^(0), Q^(1), ... as dense matrices, by brute-force search for independent sets."""
    mats = dense_terms(m)
    unit = [dense_string(g, list(m.sites)) for g in m.strings]
    n = len(mats)
    commute = [
        [np.allclose(unit[a] @ unit[b], unit[b] @ unit[a]) for b in range(n)] for a in range(n)
    ]
    dim = mats[0].shape[0]
    out = [np.eye(dim, dtype=complex)]
    for s in range(1, n + 1):
        total = np.zeros((dim, dim), dtype=complex)
        found = False
        for subset in combinations(range(n), s):
            if all(commute[a][b] for a, b in combinations(subset, 2)):
                found = True
                prod = np.eye(dim, dtype=complex)
                for j in subset:
                    prod = prod @ mats[j]
                total += prod
        if not found:
            break
        out.append(total)
    return out


def random_clock_model(rng: np.random.Generator, n_terms: int, n_sites: int, n: int) -> fl.Model:
    terms, seen = [], set()
    while len(terms) < n_terms:
        exps = tuple((int(rng.integers(n)), int(rng.integers(n))) for _ in range(n_sites))
        if all(e == (0, 0) for e in exps) or exps in seen:
            continue
        seen.add(exps)
        g = fl.make_string(n, [(s, a, b) for s, (a, b) in enumerate(exps) if (a, b) != (0, 0)])
        terms.append((Fraction(int(rng.integers(1, 5)), int(rng.integers(1, 4))), g))
    return fl.Model.from_terms(terms, states=n, sites=range(n_sites))


def check_against_dense(m: fl.Model) -> str:
    """Compare the sweep's verdict and witness with dense commutators; return the verdict."""
    qs = dense_charges(m)
    comm = {
        (r, s): qs[r] @ qs[s] - qs[s] @ qs[r]
        for r in range(1, len(qs))
        for s in range(r + 1, len(qs))
    }
    all_zero = all(np.allclose(c, 0, atol=1e-9) for c in comm.values())
    res = commutator_sweep(m)
    if res.vanishes:
        assert all_zero, "sweep says the charges commute; dense matrices disagree"
        return "commute"
    assert not all_zero, "sweep found a non-zero word, but every dense commutator vanishes"
    w = res.witness
    assert w is not None
    if res.vanishes is False:
        # the witness string's coefficient in [Q(r), Q(s)] is Tr(g^dagger C) / dim
        g = dense_string(w.string, list(m.sites))
        dim = g.shape[0]
        for pair, c in comm.items():
            coef = np.trace(g.conj().T @ c) / dim
            assert abs(coef - w.coefficients.get(pair, 0)) < 1e-9, (pair, coef, w.coefficients)
        return "fail"
    assert not w.independent
    return "undecided"


@pytest.mark.parametrize("seed", range(24))
def test_random_pauli_models_against_dense(seed: int) -> None:
    rng = np.random.default_rng(seed)
    n_terms = int(rng.integers(4, 8))

    def draw(r: np.random.Generator) -> Fraction:
        return Fraction(int(r.integers(1, 7)), int(r.integers(1, 4)))

    m = random_pauli_model(rng, n_terms, 4, draw)
    check_against_dense(m)


def test_random_models_reach_every_verdict() -> None:
    # The comparison above must see both outcomes, or it proves little.
    seen = set()
    for seed in range(60):
        rng = np.random.default_rng(1000 + seed)
        m = random_pauli_model(rng, int(rng.integers(4, 7)), 4, lambda r: int(r.integers(1, 4)))
        seen.add(check_against_dense(m))
        if {"commute", "fail"} <= seen:
            break
    assert {"commute", "fail"} <= seen, seen


def test_random_clock_models_against_dense() -> None:
    # N = 3 and 4: both verdicts occur, and every witness coefficient is checked.
    verdicts = set()
    for seed in range(8):
        rng = np.random.default_rng(100 + seed)
        n = 3 if seed < 5 else 4
        m = random_clock_model(rng, int(rng.integers(3, 6)), 2 if n == 4 else 3, n)
        verdicts.add((n, check_against_dense(m)))
    assert {(3, "commute"), (3, "fail"), (4, "commute"), (4, "fail")} <= verdicts


def test_claw_gives_a_witness() -> None:
    # One term anticommuting with three mutually commuting terms (a claw), independent strings:
    # the charges cannot commute (Elman-Chapman-Flammia 2021), and the sweep must name a string.
    m = fl.parse_model("X0 + 2 Z0 Z1 + 3 Z0 Z2 + 5 Z0 Z3")
    assert check_against_dense(m) == "fail"


@pytest.mark.parametrize(
    ("reach", "states", "size"),
    [(1, 2, 40), (2, 2, 30), (3, 2, 28), (1, 3, 24), (2, 3, 18), (1, 4, 14)],
)
def test_exclusion_chains_commute_and_invert(reach: int, states: int, size: int) -> None:
    # Alcaraz-Pimenta 2020: every exclusion chain has commuting charges and the inversion
    # relation; far beyond listing the products (for reach 2, 30 terms: 6 x 10^9 pairs of sets).
    rng = np.random.default_rng(reach * 10 + states)
    couplings = [Fraction(int(a), int(b)) for a, b in rng.integers(1, 9, size=(size, 2))]
    m = fl.exclusion_chain(size, reach=reach, states=states, couplings=couplings)
    comm = commutator_sweep(m)
    assert comm.vanishes is True
    assert comm.points == len(
        list(combinations(range(1, fl.exclusion_polynomial(m).degree + 1), 2))
    )
    inv = inversion_sweep(m)
    assert inv.vanishes is True and inv.points == states * fl.exclusion_polynomial(m).degree


def test_float_and_complex_couplings_are_exact() -> None:
    # Floats are exact binary fractions and complex numbers Gaussian rationals, so the
    # polynomial identities hold exactly for them too.
    floats = fl.exclusion_chain(16, reach=2, couplings=fl.random_couplings(16, seed=3))
    assert commutator_sweep(floats).vanishes and inversion_sweep(floats).vanishes
    cplx = fl.exclusion_chain(10, reach=1, states=3, couplings=fl.complex_couplings(10, seed=4))
    assert commutator_sweep(cplx).vanishes and inversion_sweep(cplx).vanishes


def dense_inversion_holds(m: fl.Model, u: float) -> bool:
    """prod_k T(omega^k u) == P(u^N) 1 with dense matrices (P from the library's C_s)."""
    n = m.states
    qs = dense_charges(m)
    omega = np.exp(2j * np.pi / n)
    prod = np.eye(len(qs[0]), dtype=complex)
    for k in range(n):
        prod = prod @ sum((-u * omega**k) ** s * q for s, q in enumerate(qs))
    sums = fl.exclusion_polynomial(m).weight_sums
    p = sum((-(u**n)) ** s * complex(c) for s, c in enumerate(sums))
    return bool(np.allclose(prod, p * np.eye(len(prod)), atol=1e-10))


def test_inversion_against_dense() -> None:
    # Dense matrices at a random u agree with the sweep: the relation holds on exclusion chains
    # (Alcaraz-Pimenta 2020), fails on a hexagon of the Kitaev honeycomb (an even hole leaves a
    # cycle operator, Elman-Chapman-Flammia 2021) and on most random clock models.
    cases = [
        fl.exclusion_chain(6, reach=2, couplings=[1, 2, 3, 2, 1, 3]),
        fl.kitaev_honeycomb(2, 4, jx=1, jy=2, jz=Fraction(1, 3)),
        fl.exclusion_chain(5, reach=1, states=3, couplings=[1, 2, Fraction(1, 2), 3, 1]),
    ]
    cases += [random_clock_model(np.random.default_rng(200 + k), 4, 3, 3) for k in range(4)]
    verdicts = []
    for m in cases:
        res = inversion_sweep(m)
        holds = dense_inversion_holds(m, 0.37)
        if res.vanishes is None:
            assert res.witness is not None and not res.witness.independent
        else:
            assert res.vanishes is holds, str(m)
        verdicts.append(res.vanishes)
    assert verdicts[:3] == [True, False, True]
    assert False in verdicts[3:]


def test_large_claw_model_fails_with_checkable_witness() -> None:
    # A 30-term reach-2 chain plus Z10 Z13 Z16, which anticommutes with exactly the three mutually
    # commuting chain terms X10 Z11 Z12, X13 Z14 Z15 and X16 Z17 Z18: a claw.
    m = fl.exclusion_chain(30, reach=2, couplings=[1 + j % 3 for j in range(30)])
    claw_term = (1, fl.pauli("ZZZ", [10, 13, 16]))
    extra = fl.Model.from_terms([*m.terms, claw_term], states=2, sites=m.sites)
    res = commutator_sweep(extra)
    assert res.vanishes is False and res.witness is not None
    # Check the lowest reported pair in the string algebra (H with Q(s) is cheap here).
    (r, s), coef = min(res.witness.coefficients.items())
    assert r == 1
    comm = fl.StringSum.from_model(extra).commutator(fl.charge(extra, s))
    found = {str(g): complex(c) for c, g in comm.terms}
    assert abs(found[str(res.witness.string)] - coef) < 1e-9


def test_errors_are_clear() -> None:
    with pytest.raises(ValueError, match="symbols"):
        commutator_sweep(fl.exclusion_chain(4, reach=1, couplings="symbols"))
    with pytest.raises(ValueError, match="max_work"):
        commutator_sweep(fl.exclusion_chain(30, reach=2), max_work=100)
    wide = fl.ising_lattice(4, 4, field=1, bond=1)
    with pytest.raises(ValueError, match="frontier is too wide"):
        inversion_sweep(wide)


def test_progress_is_reported_per_point() -> None:
    seen: list[tuple[int, int]] = []
    res = commutator_sweep(
        fl.exclusion_chain(12, reach=2), progress=lambda a, b: seen.append((a, b))
    )
    assert seen == [(k, res.points) for k in range(1, res.points + 1)] and res.points == 6


def test_results_print_briefly() -> None:
    res = commutator_sweep(fl.parse_model("X0 + 2 Z0 Z1 + 3 Z0 Z2 + 5 Z0 Z3"))
    text = repr(res)
    assert text.startswith("SweepResult(vanishes=False") and "independent strings" in text
    assert str(res.witness.string) in text
