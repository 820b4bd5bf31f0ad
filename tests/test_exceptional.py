"""Exceptional points: repeated roots of the exclusion polynomial inside one component.

References outside the project: sympy (exact polynomials over Q(i): ``sqf_list``,
``discriminant``), mpmath (eigenvalues at 50 digits), numpy (dense Hamiltonians built from the
definitions in ``helpers.dense_string``, ranks by singular values).

Tolerances.  A level of ``H`` inside a Jordan block of size m is moved by about
``(eps |H|)^(1/m)`` by the rounding of a backward-stable eigensolver, so numpy's eigenvalues
of these defective matrices are only good to about 1e-8 (common practice; Lidskii's
perturbation theory).  The tests therefore never compare numpy eigenvalues of a defective
``H`` tightly: they compare mpmath's at 50 digits (spread about 1e-25 for m = 2) within 1e-20,
or count multiplicities exactly as the dimensions of ``ker (H - E)`` and ``ker (H - E)^4``
from singular values of these exact small-integer (or omega-valued) matrices, whose non-zero
singular values are all above 0.1 here, against a threshold of 1e-9.
"""

from __future__ import annotations

import itertools

import mpmath
import numpy as np
import pytest
import sympy
from helpers import dense_string
from scipy.optimize import linear_sum_assignment

import freeladder as fl
from freeladder.roots import certified_roots, solve_chain

# Designed collisions (weights w = c^N; reach 1 with M = 3 and reach 2 with M = 4 give degree 2
# and P = 1 - y sum w + y^2 w_first w_last, a square exactly when (sum w)^2 = 4 w_first w_last):
#   reach 1, N = 2, c = (1, 2i, 1):            w = (1, -4, 1),        P = (1 + y)^2
#   reach 1, N = 2, c = (1, 1, 1 + i):          w = (1, 1, 2i),        P = (1 - (1 + i) y)^2
#   reach 2, N = 2, c = (1, 1, i, 1):           w = (1, 1, -1, 1),     P = (1 - y)^2
#   reach 1, N = 3, c = (1 + i, 1, -1, 1 + i):  w = (-2 + 2i, 1, -1, -2 + 2i), and for M = 4
#                                                P = 1 - y sum w + y^2 (w1 w3 + w1 w4 + w2 w4)
#                                                  = (1 - (-2 + 2i) y)^2
#   Ising chain of 2 sites at field i/2:        w = (-1/4, 1, -1/4),   P = (1 - y / 2)^2
CASES = {
    "reach1": (fl.exclusion_chain(3, couplings=[1, 2j, 1]), 1, 2),
    "reach1-gaussian": (fl.exclusion_chain(3, couplings=[1, 1, 1 + 1j]), 1, 2),
    "reach2": (fl.exclusion_chain(4, reach=2, couplings=[1, 1, 1j, 1]), 2, 2),
    "z3-complex": (fl.exclusion_chain(4, states=3, couplings=[1 + 1j, 1, -1, 1 + 1j]), 1, 3),
    "ising2": (fl.ising_chain(2, field=0.5j), 1, 2),
}


def _sympy_polynomial(m: fl.Model, reach: int, states: int) -> sympy.Poly:
    """P(y) = sum over sets of terms pairwise more than ``reach`` apart of prod(-y c^N), from
    the definition (the exclusion rule of the chain), in exact Gaussian rationals."""
    y = sympy.Symbol("y")
    c = [sympy.nsimplify(complex(v).real) + sympy.I * sympy.nsimplify(complex(v).imag)
         for v in m.coupling_array()]  # fmt: skip
    order = fl.chain_structure(m).order
    w = [sympy.expand(c[j] ** states) for j in order]
    total = sympy.Integer(0)
    for size in range(len(w) + 1):
        for picks in itertools.combinations(range(len(w)), size):
            if all(b - a > reach for a, b in itertools.pairwise(picks)):
                total += sympy.prod([-y * w[j] for j in picks])
    return sympy.Poly(sympy.expand(total), y, domain=sympy.QQ_I)


def _dense(m: fl.Model) -> np.ndarray:
    """Dense H; for N = 2 the entries are multiples of 1/2 (couplings 1, 2i, 1 + i, i/2 times
    +-1, +-i), rounded there to remove the 1e-16 left by exp(i pi) in the clock matrix."""
    h = sum(complex(c) * dense_string(g, m.sites) for c, g in m.terms)
    return np.round(2 * h) / 2 if m.states == 2 else h


@pytest.mark.parametrize("name", list(CASES))
def test_designed_collision_on_every_path(name: str) -> None:
    m, reach, states = CASES[name]
    poly = _sympy_polynomial(m, reach, states)
    _, factors = poly.sqf_list()
    assert [k for _, k in factors] == [2] and factors[0][0].degree() == 1  # a double root
    y0 = complex(sympy.N(sympy.solve(factors[0][0].as_expr())[0], 30))
    # eta^N = 1 / y0 (Fendley 2019): the N-th powers of the quasi-energies are 1 / y0, twice
    for method in ("auto", "fast", "certified"):
        sp = fl.free_spectrum(m, method=method)
        assert sp.exceptional and list(sp.root_multiplicities) == [2, 2]
        np.testing.assert_allclose(sp.quasi_energies**states, [1 / y0] * 2, rtol=1e-13)
        assert "exceptional point" in str(sp) and "(x2)" in sp.exceptional_note
    answer = fl.analyze(m).answer()
    assert answer.status == "proven" and "need not be diagonalizable" in answer.reason
    report = fl.verify(m)
    assert report.ok and not report.failed


@pytest.mark.parametrize("name", ["reach1", "reach1-gaussian", "reach2", "ising2"])
def test_levels_are_the_eigenvalues_with_algebraic_multiplicity(name: str) -> None:
    """Each free level E with count d: dim ker (H - E)^4 = d (algebraic multiplicity, numpy
    singular values of an exact matrix), and H is defective there: dim ker (H - E) < d for
    the level 0 made of +eta -eta, the sum of the two colliding modes' opposite choices."""
    m, _, _ = CASES[name]
    sp = fl.free_spectrum(m)
    table = sp.levels(None)
    h = _dense(m)
    dim = h.shape[0]
    values = np.asarray(table.energies, dtype=complex)
    distinct: list[complex] = []
    for e in values:
        if all(abs(e - v) > 1e-9 for v in distinct):
            distinct.append(complex(e))
    defective = 0
    for e in distinct:
        count = int(np.sum(np.abs(values - e) < 1e-9)) * int(table.multiplicity)
        a = h - e * np.eye(dim)
        geo = np.linalg.svd(a, compute_uv=False)
        alg = np.linalg.svd(np.linalg.matrix_power(a, 4), compute_uv=False)
        assert np.all((geo < 1e-9) | (geo > 0.1)) and np.all((alg < 1e-9) | (alg > 0.1))
        assert int(np.sum(alg < 1e-9)) == count
        defective += int(np.sum(geo < 1e-9)) < count
    assert sum(int(np.sum(np.abs(values - e) < 1e-9)) for e in distinct) == len(values)
    assert defective >= 1  # no eigenbasis: what the exceptional note says


@pytest.mark.parametrize("name", ["reach1", "reach1-gaussian", "ising2"])
def test_levels_against_mpmath_eigenvalues(name: str) -> None:
    """mpmath at 50 digits: the defective levels split by about 1e-25, compared within 1e-20."""
    m, _, _ = CASES[name]
    table = fl.free_spectrum(m).levels(None)
    free = np.repeat(np.asarray(table.energies, dtype=complex), table.multiplicity)
    mpmath.mp.dps = 50
    try:
        ev = mpmath.eig(mpmath.matrix(_dense(m).tolist()), left=False, right=False)
        exact = np.array([complex(v) for v in ev])
    finally:
        mpmath.mp.dps = 15
    key = lambda v: (round(v.real, 6), round(v.imag, 6))  # noqa: E731
    f, e = sorted(free, key=key), sorted(exact, key=key)
    assert np.max(np.abs(np.array(f) - np.array(e))) < 1e-12  # the float free side: 1e-12
    # mpmath itself: each group of equal levels is split by far less than 1e-20
    order = sorted(range(len(ev)), key=lambda i: key(complex(ev[i])))
    for a, b in itertools.pairwise(order):
        if key(complex(ev[a])) == key(complex(ev[b])):
            assert abs(ev[a] - ev[b]) < 1e-20


def test_ising8_field_i_has_simple_roots_and_is_solved() -> None:
    """``ising_chain(8, field=1j)`` is not at an exceptional point (sympy: discriminant
    78335713, gcd(P, P') = 1); its fast path stalled where partial sums of the weights
    cancel (now restarted from one circle).  Quasi-energies against mpmath's roots of the
    exact polynomial (50 digits); verify compares the levels with numpy's dense eigenvalues
    (simple roots, so the ordinary tolerance)."""
    m = fl.ising_chain(8, field=1j)
    poly = _sympy_polynomial(m, 1, 2)
    assert sympy.discriminant(poly) != 0
    assert sympy.gcd(poly, poly.diff()).degree() == 0
    mpmath.mp.dps = 50
    try:
        coeffs = [complex(c) for c in poly.all_coeffs()]
        roots = [complex(r) for r in mpmath.polyroots(coeffs, maxsteps=200, extraprec=200)]
    finally:
        mpmath.mp.dps = 15
    want = np.array([1 / r for r in roots])
    for method in ("auto", "certified"):
        sp = fl.free_spectrum(m, method=method)
        assert not sp.exceptional and sp.provenance.finder["converged"]
        cost = np.abs((sp.quasi_energies**2)[:, None] - want[None, :])
        rows, cols = linear_sum_assignment(cost)  # matched one to one
        assert cost[rows, cols].max() < 1e-12 * np.abs(want).max()
    density = fl.energy_density(lambda size: fl.ising_chain(size, field=1j), [4, 6, 8])
    assert np.isfinite(density.value)
    assert fl.analyze(m).answer().status == "proven"
    assert fl.verify(m).ok


def test_certified_roots_split_gaussian_repeated_factors() -> None:
    """sympy's sqf_list over Q(i) as the reference: (1 - (1+i) y)^2 (1 + i y)^3 (1 - 2y)."""
    y = sympy.Symbol("y")
    expr = sympy.expand((1 - (1 + sympy.I) * y) ** 2 * (1 + sympy.I * y) ** 3 * (1 - 2 * y))
    poly = sympy.Poly(expr, y, domain=sympy.QQ_I)
    asc = poly.all_coeffs()[::-1]
    re = [int(sympy.re(c)) for c in asc]
    im = [int(sympy.im(c)) for c in asc]
    found = certified_roots(re, im)
    assert found.rigorous and found.count == 6
    pairs = zip(found.values.tolist(), found.multiplicities.tolist(), strict=True)
    got = sorted(pairs, key=lambda t: t[1])
    want = {1: 0.5, 2: (1 - 1j) / 2, 3: 1j}  # multiplicity -> root
    assert [k for _, k in got] == [1, 2, 3]
    for value, k in got:
        assert abs(value - want[k]) < 1e-15
    assert sorted(k for _, k in poly.sqf_list()[1]) == [1, 2, 3]
    assert found.repeated_roots() == {2: 1, 3: 1}
    listed = found.repeated()
    assert listed.values.size == 6 and listed.repeated_roots() == {2: 1, 3: 1}
    assert "repeated roots" in listed.summary()


def test_fast_chain_roots_report_multiplicities() -> None:
    """The chain solver alone (weights (1, -4, 1): P = (1 + y)^2, x = -1 twice)."""
    found = solve_chain(np.array([1, 2j, 1]), 1, 2)
    assert found.rigorous and found.variable == "x"
    np.testing.assert_allclose(found.values, [-1, -1], atol=1e-15)
    assert list(found.details["multiplicity"]) == [2, 2]
    assert "repeated roots (multiplicity: count) 2: 1" in found.summary()


def test_ising_field_i_beyond_the_exact_limit() -> None:
    """200 sites (degree 200, above MAX_ROOT_DEGREE = 120): the iteration itself must converge
    (restarted from one circle).  Reference: the quasi-energies of a reach-1 chain with
    couplings c_j are the eigenvalues +-eta of the tridiagonal matrix with off-diagonal c_j
    (the continuant D_k = lam D_(k-1) - c_k^2 D_(k-2); common practice), here from numpy
    eigvals, whose eigenvalues are simple (error about 1e-14 measured)."""
    m = fl.ising_chain(200, field=1j)
    sp = fl.free_spectrum(m)
    assert sp.provenance.finder["root_method"] == "chain-aberth" and not sp.exceptional
    c = m.coupling_array()[fl.chain_structure(m).order]
    lam = np.linalg.eigvals(np.diag(c, 1) + np.diag(c, -1))
    cost = np.abs((sp.quasi_energies**2)[:, None] - (lam**2)[None, :])
    rows, cols = linear_sum_assignment(cost)
    assert cost[rows, cols].max() < 1e-10
