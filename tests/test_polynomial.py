"""The exclusion polynomial: exact coefficients, the general-graph algorithm, evaluation.

References are named beside each check.  "Brute force" means an independent enumeration of
independent sets with networkx (cliques of the complement graph).
"""

from __future__ import annotations

import concurrent.futures
import copy
import itertools
import json
import math
import time
from fractions import Fraction

import networkx as nx
import numpy as np
import pytest
import sympy
from helpers import random_pauli_model

import freeladder as fl
from freeladder.base.errors import TooLargeError
from freeladder.graphs.independent import IndependenceGraph
from freeladder.roots.polynomial import (
    MAX_ROOT_DEGREE,
    _graph_sums,
    _Ring,
    power_sum_targets,
    sum_rules,
)


def _random_fractions(rng: np.random.Generator, n: int) -> list[Fraction]:
    num = rng.integers(1, 10, n) * rng.choice([-1, 1], n)
    return [Fraction(int(a), int(b)) for a, b in zip(num, rng.integers(1, 8, n), strict=True)]


def _brute_sums(graph: nx.Graph, weights: list) -> list:
    """C_s = sum over independent sets of size s of prod w, by enumerating them (networkx)."""
    sums: dict[int, object] = {0: 1}
    for clique in nx.enumerate_all_cliques(nx.complement(graph)):
        sums[len(clique)] = sums.get(len(clique), 0) + math.prod(weights[v] for v in clique)
    return [sums[s] for s in range(max(sums) + 1)]


def _recurrence(weights: list, reach: int) -> list:
    """Coefficients of P by the chain recurrence P_k = P_{k-1} - y w_k P_{k-p-1}, P_k = 1 (k <= 0)
    (F. C. Alcaraz and R. A. Pimenta, Phys. Rev. B 102, 121101(R) (2020)), as plain lists."""
    window = [[1]] * (reach + 1)
    for w in weights:
        prev, old = window[0], window[reach]
        new = list(prev) + [0] * (len(old) + 1 - len(prev))
        for s, c in enumerate(old):
            new[s + 1] -= w * c
        while len(new) > 1 and new[-1] == 0:
            new.pop()
        window = [new, *window[:reach]]
    return window[0]


@pytest.mark.parametrize("reach", [1, 2, 3])
@pytest.mark.parametrize("states", [2, 3])
def test_chain_coefficients_match_recurrence(reach: int, states: int) -> None:
    # Reference: the chain recurrence (Alcaraz-Pimenta 2020), re-implemented here on lists.
    rng = np.random.default_rng(10 * reach + states)
    cs = _random_fractions(rng, 17)
    m = fl.exclusion_chain(17, reach=reach, states=states, couplings=cs)
    poly = fl.exclusion_polynomial(m)
    assert poly.chain is not None and poly.chain.reach == reach
    expected = _recurrence([c**states for c in cs], reach)
    assert list(poly.coefficients) == expected
    assert poly.degree == (17 + reach) // (reach + 1) == len(expected) - 1
    assert all(isinstance(c, (int, Fraction)) for c in poly.coefficients)
    # The same numbers by brute force over the frustration graph (networkx).
    graph = nx.Graph(fl.frustration_graph(m).to_undirected())
    brute = _brute_sums(graph, [c**states for c in cs])
    assert list(poly.weight_sums) == brute


def test_general_algorithm_matches_brute_force_on_random_graphs() -> None:
    # Reference: networkx enumeration of independent sets (cliques of the complement).
    rng = np.random.default_rng(3)
    for trial in range(60):
        n = int(rng.integers(1, 14))
        graph = nx.gnp_random_graph(n, float(rng.uniform(0.1, 0.8)), seed=trial)
        weights = _random_fractions(rng, n)
        g = IndependenceGraph(nx.to_scipy_sparse_array(graph, nodelist=range(n)))
        got = _graph_sums(_Ring("rational"), g, weights)
        brute = _brute_sums(graph, weights)
        while len(brute) > 1 and brute[-1] == 0:
            brute.pop()
        assert got == brute, trial


def _random_pauli_model(rng: np.random.Generator, n_terms: int, n_sites: int) -> fl.Model:
    """Random Pauli model with positive fraction couplings a / b, 1 <= a <= 8, 1 <= b <= 4."""
    return random_pauli_model(
        rng, n_terms, n_sites, lambda r: Fraction(int(r.integers(1, 9)), int(r.integers(1, 5)))
    )


def test_models_with_general_graphs_match_brute_force() -> None:
    # Random Pauli-string models give arbitrary frustration graphs; reference: networkx.
    rng = np.random.default_rng(5)
    for _ in range(15):
        m = _random_pauli_model(rng, int(rng.integers(3, 12)), 4)
        poly = fl.exclusion_polynomial(m)
        weights = [c**2 for c in m.couplings]
        assert list(poly.weight_sums) == _brute_sums(fl.frustration_graph(m), weights)


def test_complex_couplings_give_rounded_exact_coefficients() -> None:
    # Reference: networkx brute force in complex floating point (agreement to rounding).
    cs = list(fl.complex_couplings(9, seed=4))
    m = fl.exclusion_chain(9, reach=2, couplings=cs)
    poly = fl.exclusion_polynomial(m)
    assert poly.kind == "gaussian"
    graph = nx.Graph(fl.frustration_graph(m))
    brute = _brute_sums(graph, [complex(c) ** 2 for c in cs])
    assert np.allclose(poly.weight_sums, brute, rtol=1e-13, atol=0)
    re, im = poly.exact_parts()
    assert all(isinstance(v, Fraction) for v in re + im)
    # Evaluation through the complex recurrence against the brute-force coefficients.
    for yv in (0.3, 0.2 - 0.5j):
        ref = sum(c * (-yv) ** s for s, c in enumerate(brute))
        assert poly(yv) == pytest.approx(ref, rel=1e-12)


def test_symbolic_chain_of_four_terms_by_hand() -> None:
    # Hand expansion (common practice): a path of 4 vertices has independent sets
    # {}, {j}, {0,2}, {0,3}, {1,3}.
    c = sympy.symbols("c_0:4")
    y = sympy.Symbol("y")
    m = fl.exclusion_chain(4, reach=1, couplings=list(c))
    poly = fl.exclusion_polynomial(m)
    w = [v**2 for v in c]
    hand = 1 - y * sum(w) + y**2 * (w[0] * w[2] + w[0] * w[3] + w[1] * w[3])
    assert sympy.expand(poly.sympy(y).as_expr() - hand) == 0
    assert poly.kind == "symbolic" and poly.degree == 2
    latex = poly._repr_latex_()
    assert latex.startswith("$P(y) = 1") and "c_{0}^{2}" in latex
    assert sympy.expand(poly(sympy.Rational(1, 3)) - hand.subs(y, sympy.Rational(1, 3))) == 0


def test_float_evaluation_uses_the_recurrence_and_matches_exact_values() -> None:
    # Reference: exact rational evaluation (Python Fractions) of the same coefficients.
    cs = fl.random_couplings(40, 0.3, 1.7, seed=2)
    m = fl.exclusion_chain(40, reach=2, couplings=cs)
    poly = fl.exclusion_polynomial(m)
    ys = np.array([0.01, 0.2, 0.7, 1.3, -0.4])
    got = poly(ys)
    exact_coefficients = poly.exact_parts()[0]
    # Float couplings in, float coefficients shown; the exact values stay available.
    assert all(isinstance(c, float) for c in poly.coefficients)
    assert [float(c) for c in exact_coefficients] == list(poly.coefficients)
    for yv, value in zip(ys, got, strict=True):
        exact = sum(c * Fraction(float(yv)) ** s for s, c in enumerate(exact_coefficients))
        assert value == pytest.approx(float(exact), rel=1e-12, abs=1e-300)
    assert isinstance(poly(0.2), float)
    assert poly(Fraction(1, 5)) == sum(
        c * Fraction(1, 5) ** s for s, c in enumerate(exact_coefficients)
    )


def test_uniform_ising_roots_give_sign_changes_without_overflow() -> None:
    # Closed form (derived from the recurrence, BACKGROUND section 5; common practice):
    # uniform N = 2, p = 1 chain of M terms has roots y_k = 1 / (4 cos^2(pi k / (M + 2))).
    size = 3000
    poly = fl.exclusion_polynomial(fl.exclusion_chain(size, reach=1))
    k = np.arange(1, 40)
    roots = 1 / (4 * np.cos(np.pi * k / (size + 2)) ** 2)
    below, e_below = poly.evaluate_scaled(roots * (1 - 1e-9))
    above, e_above = poly.evaluate_scaled(roots * (1 + 1e-9))
    assert np.all(np.sign(below) != np.sign(above))
    assert np.all(np.abs(below) >= 0.5) and np.all(np.abs(below) < 1)
    # Exact check of the scale at one point: P(1/2) with integer recurrence (Fractions).
    mant, expo = poly.evaluate_scaled(np.array([0.5]))
    exact = poly(Fraction(1, 2))
    assert float(mant[0]) * 2.0 ** float(expo[0]) == pytest.approx(float(exact), rel=1e-10)


def test_non_chain_evaluation_is_exact_then_rounded() -> None:
    # Reference: exact Fraction evaluation of the exact coefficients.
    m = fl.kitaev_honeycomb(2, 4, jx=1, jy=2, jz=3)
    poly = fl.exclusion_polynomial(m)
    assert poly.chain is None
    value = poly(0.3)
    exact = sum(c * Fraction(0.3) ** s for s, c in enumerate(poly.coefficients))
    assert value == float(exact)
    zc = poly(np.array([0.3 + 0.1j]))
    ref = sum(complex(c) * (0.3 + 0.1j) ** s for s, c in enumerate(poly.coefficients))
    assert zc[0] == pytest.approx(ref, rel=1e-12)


def test_honeycomb_strip_of_hundreds_of_terms_is_fast_and_consistent() -> None:
    # Exact identities from the definition (common practice): C_1 = sum w_j and
    # C_2 = ((sum w)^2 - sum w^2) / 2 - sum over edges w_a w_b.
    m = fl.kitaev_honeycomb(3, 100, jx=1, jy=2, jz=3)
    assert len(m) > 390
    start = time.perf_counter()
    poly = fl.exclusion_polynomial(m)
    sums = poly.weight_sums
    elapsed = time.perf_counter() - start
    assert elapsed < 20, elapsed  # measured 0.5 s on 2 cores
    w = [c**2 for c in m.couplings]
    graph = fl.frustration_graph(m)
    assert sums[1] == sum(w)
    assert sums[2] == (sum(w) ** 2 - sum(v * v for v in w)) // 2 - sum(
        w[a] * w[b] for a, b in graph.edges
    )
    # Degree = independence number; cross-check with networkx on a small strip.
    small = fl.kitaev_honeycomb(2, 5)
    brute = _brute_sums(fl.frustration_graph(small), [1] * len(small))
    assert list(fl.exclusion_polynomial(small).weight_sums) == brute


def test_bad_coupling_is_reported_with_its_term() -> None:
    m = fl.exclusion_chain(3)
    with pytest.raises(ValueError, match="term 1"):  # refused when the model is built
        fl.exclusion_polynomial(fl.Model(m.strings, [1, float("nan"), 1]))
    with pytest.raises(TypeError):
        fl.exclusion_polynomial("X0 Z1")  # type: ignore[arg-type]


def test_uniform_chain_counts_and_large_chain_coefficients() -> None:
    # Number of independent sets of size s of the p-th power of a path: C(M - p(s-1), s)
    # (common practice); uniform weights w give C_s = count * w^s.
    poly = fl.exclusion_polynomial(fl.exclusion_chain(500, reach=3, couplings=2))
    for s in (0, 1, 7, 125):
        assert poly.weight_sums[s] == math.comb(500 - 3 * (s - 1), s) * 4**s if s else 1
    assert poly.degree == 125
    assert "\\cdots" in poly._repr_latex_() and "ExclusionPolynomial(degree=125" in repr(poly)


def test_products_of_small_weights_are_exact() -> None:
    # Every coefficient of a 2-term commuting model is a product of two weights (by hand).
    m = fl.Model.from_terms([(Fraction(1, 3), fl.pauli("X")), (Fraction(2, 5), fl.pauli("IX"))])
    assert fl.exclusion_polynomial(m).coefficients == (
        1,
        -Fraction(1, 9) - Fraction(4, 25),
        Fraction(4, 225),
    )
    assert list(itertools.islice(fl.exclusion_polynomial(m).weights, 2)) == [
        Fraction(1, 9),
        Fraction(4, 25),
    ]


# -- frozen polynomial, partial polynomials, roots, sum rules ---------------------------------
def test_polynomial_is_frozen_and_the_cached_object_stays_intact() -> None:
    # Regression (issue 14, item 6): P.states = 7 used to change the object every later call saw.
    m = fl.exclusion_chain(6, reach=1, couplings=[1, 2, 3, 4, 5, 6])
    poly = fl.exclusion_polynomial(m)
    for name, value in (("states", 7), ("kind", "integer"), ("degree", 1), ("new", 0)):
        with pytest.raises(AttributeError, match="immutable"):
            setattr(poly, name, value)
    with pytest.raises(AttributeError, match="immutable"):
        del poly.states
    with pytest.raises(AttributeError):
        poly._sums = (1,)  # type: ignore[misc]
    assert fl.exclusion_polynomial(m) is poly and poly.states == 2
    assert isinstance(poly.coefficients, tuple) and isinstance(poly.weights, tuple)
    assert copy.deepcopy(poly) is poly


def test_lazy_coefficients_are_computed_once_under_threads() -> None:
    # The chain coefficients are computed on first use; concurrent first uses share one result.
    m = fl.exclusion_chain(300, reach=2, couplings=fl.random_couplings(300, 0.3, 1.7, seed=8))
    poly = fl.exclusion_polynomial(m)
    with concurrent.futures.ThreadPoolExecutor(4) as pool:
        results = list(pool.map(lambda _: poly.weight_sums, range(8)))
    assert all(r == results[0] for r in results) and len(results[0]) == poly.degree + 1
    # Reference: the brute-force recurrence on lists (Alcaraz-Pimenta 2020), re-implemented above.
    assert list(poly.coefficients[:4]) == [
        float(c) for c in _recurrence([Fraction(c) ** 2 for c in m.couplings], 2)[:4]
    ]


def test_polynomial_to_dict_is_strict_json_with_exact_text() -> None:
    cs = [Fraction(1, 3), Fraction(2, 5), Fraction(3, 7), Fraction(1, 2)]
    poly = fl.exclusion_polynomial(fl.exclusion_chain(4, reach=1, couplings=cs))
    d = json.loads(json.dumps(poly.to_dict(), allow_nan=False))
    assert d["degree"] == poly.degree == 2 and d["kind"] == "rational" and d["states"] == 2
    # The exact text parses back (with Fraction, not with any evaluator) to the coefficients.
    assert [Fraction(t) for t in d["exact_coefficients"]] == list(poly.coefficients)
    assert d["coefficients"] == pytest.approx([float(c) for c in poly.coefficients], rel=1e-15)
    gauss = fl.exclusion_polynomial(
        fl.exclusion_chain(5, reach=1, couplings=[1, 1 + 1j, 2, 0.5 - 1j, 3])
    )
    dg = json.loads(json.dumps(gauss.to_dict(), allow_nan=False))
    assert dg["kind"] == "gaussian"
    assert dg["coefficients"] == [[c.real, c.imag] for c in map(complex, gauss.coefficients)]
    # Symbolic coefficients: text in both lists (sympy's printer), still strict JSON.
    a, b, c = sympy.symbols("a b c")
    sym = fl.exclusion_polynomial(fl.exclusion_chain(3, reach=1, couplings=[a, b, c]))
    ds = json.loads(json.dumps(sym.to_dict(), allow_nan=False))
    assert ds["kind"] == "symbolic" and ds["exact_coefficients"][2] == "a**2*c**2"
    assert sympy.expand(sym.weight_sums[1] - (a**2 + b**2 + c**2)) == 0
    # Beyond the float range: numbers become null, the exact text stays.
    huge = fl.exclusion_polynomial(fl.exclusion_chain(6, reach=1, couplings=[1e200] * 6))
    dh = json.loads(json.dumps(huge.to_dict(), allow_nan=False))
    assert dh["coefficients"][2] is None and len(dh["exact_coefficients"][2]) > 700


@pytest.mark.parametrize("trial", range(6))
def test_partial_polynomials_against_sympy(trial: int) -> None:
    # Reference: sympy truncation of the full polynomial, and sympy's nroots (50 digits).
    rng = np.random.default_rng(100 + trial)
    if trial % 2:
        m = _random_pauli_model(rng, int(rng.integers(5, 10)), 4)
    else:
        m = fl.exclusion_chain(11, reach=trial % 3 + 1, couplings=_random_fractions(rng, 11))
    poly = fl.exclusion_polynomial(m)
    y = sympy.Symbol("y")
    full = poly.sympy(y).as_expr()
    partials = [poly.truncated(s) for s in range(poly.degree + 1)]
    assert partials[-1] is poly  # the last partial polynomial is P itself
    for s, part in enumerate(partials):
        want = sum(full.coeff(y, r) * y**r for r in range(s + 1))
        assert sympy.expand(part.sympy(y).as_expr() - want) == 0
        assert part.truncated_at == (None if s == poly.degree else s)
        if s == 0:
            assert len(part.roots().values) == 0
            continue
        roots = part.roots()
        ref = sympy.Poly(want, y).nroots(n=50, maxsteps=200)
        want_roots = [complex(r) for r in ref]
        assert sum(roots.multiplicities) == len(want_roots) == part.degree
        for v, k in zip(roots.values, roots.multiplicities, strict=True):
            near = [b for b in want_roots if abs(complex(v) - b) <= 1e-9 * max(1.0, abs(v))]
            assert len(near) == k  # multiplicity = number of reference roots at this value
        # The certified radii hold against the 50-digit roots.
        for v, r in zip(roots.values, roots.error_bounds, strict=True):
            assert min(abs(complex(v) - b) for b in want_roots) <= r + 1e-300
        json.dumps(roots.to_dict(), allow_nan=False)
    with pytest.raises(ValueError, match=">= 0"):
        poly.truncated(-1)
    with pytest.raises(TypeError):
        poly.truncated(1.5)  # type: ignore[arg-type]


def test_roots_of_gaussian_partial_polynomials_against_numpy_and_sympy() -> None:
    # Reference: sympy nroots at 40 digits of the exact Gaussian-rational coefficients.
    m = fl.exclusion_chain(9, reach=1, couplings=list(fl.complex_couplings(9, seed=3)))
    poly = fl.exclusion_polynomial(m)
    y = sympy.Symbol("y")
    re, im = poly.exact_parts()
    for s in (2, 3, poly.degree):
        expr = sum(
            (
                sympy.Rational(a.numerator, a.denominator)
                + sympy.I * sympy.Rational(b.numerator, b.denominator)
            )
            * y**r
            for r, (a, b) in enumerate(zip(re[: s + 1], im[: s + 1], strict=True))
        )
        ref = [complex(r) for r in sympy.Poly(expr, y).nroots(n=40, maxsteps=200)]
        got = poly.truncated(s).roots()
        assert got.rigorous and len(got.values) == s
        for v, r in zip(got.values, got.error_bounds, strict=True):
            assert min(abs(complex(v) - b) for b in ref) <= max(r, 1e-14 * abs(v))


def test_roots_refuse_symbolic_and_too_large_degree() -> None:
    sym = fl.exclusion_polynomial(fl.exclusion_chain(3, reach=1, couplings=sympy.symbols("a:3")))
    with pytest.raises(TypeError, match="substitute"):
        sym.roots()
    big = fl.exclusion_polynomial(fl.exclusion_chain(2 * MAX_ROOT_DEGREE + 4, reach=1))
    with pytest.raises(TooLargeError, match="MAX_ROOT_DEGREE"):
        big.roots()
    assert big.truncated(5).roots().count == 5


def _sympy_targets(poly: fl.ExclusionPolynomial) -> tuple[sympy.Expr, sympy.Expr]:
    """sum 1/y_k and sum 1/y_k^2 over the roots of P, by sympy's exact root sums (RootSum)."""
    y, x = sympy.symbols("y x")
    p = poly.sympy(y)
    # Reciprocal polynomial: its roots are x_k = 1/y_k.
    rec = sympy.Poly(sympy.expand(x ** p.degree() * p.as_expr().subs(y, 1 / x)), x)
    first = sympy.RootSum(rec, sympy.Lambda(x, x))
    second = sympy.RootSum(rec, sympy.Lambda(x, x**2))
    return sympy.nsimplify(first), sympy.nsimplify(second)


@pytest.mark.parametrize("trial", range(8))
def test_sum_rule_targets_against_sympy_root_sums(trial: int) -> None:
    # Reference: sympy.RootSum over the reciprocal polynomial (exact symmetric functions).
    rng = np.random.default_rng(200 + trial)
    if trial % 2:
        m = _random_pauli_model(rng, int(rng.integers(3, 8)), 3)
    else:
        m = fl.exclusion_chain(
            8, reach=trial % 3 + 1, states=2 + trial % 4 // 2, couplings=_random_fractions(rng, 8)
        )
    poly = fl.exclusion_polynomial(m)
    t1, t2 = power_sum_targets(poly)
    r1, r2 = _sympy_targets(poly)
    assert sympy.simplify(t1 - r1) == 0 and sympy.simplify(t2 - r2) == 0
    # The quasi-energies of the 50-digit roots satisfy the rules to rounding.
    y = sympy.Symbol("y")
    roots = [complex(r) for r in poly.sympy(y).nroots(n=50, maxsteps=200)]
    n = poly.states
    eta = [(1 / r) ** (1 / n) for r in roots]
    rules = sum_rules(poly, eta)
    assert rules.count == len(roots) and max(rules.residuals) < 1e-13
    assert rules.targets == (t1, t2)
    json.dumps(rules.to_dict(), allow_nan=False)
    # A wrong quasi-energy is caught.
    bad = sum_rules(poly, [eta[0] * 1.01, *eta[1:]])
    assert max(bad.residuals) > 1e-4


def test_sum_rules_do_not_overflow_for_huge_couplings() -> None:
    # Chain weights 1e300^2 exceed the float range; the rules are scaled by a power of two.
    m = fl.exclusion_chain(5, reach=1, couplings=[1e300, 2e300, 1.5e300, 3e300, 1e300])
    poly = fl.exclusion_polynomial(m)
    unit = fl.exclusion_polynomial(
        fl.exclusion_chain(5, reach=1, couplings=[1.0, 2.0, 1.5, 3.0, 1.0])
    )
    y = sympy.Symbol("y")
    eta = np.array([(1 / complex(r)) ** 0.5 for r in unit.sympy(y).nroots(n=30)]) * 1e300
    rules = sum_rules(poly, eta)
    assert max(rules.residuals) < 1e-13
    assert json.loads(json.dumps(rules.to_dict(), allow_nan=False))["sums"][0] == [None, 0.0]


def test_partial_polynomial_of_a_chain_needs_only_its_orders() -> None:
    # Reference: sums over the independent sets of size <= s listed by networkx (cliques of the
    # complement of the frustration graph), C_r = sum prod c_j^2, on chains whose full
    # polynomial was never expanded (the truncated recurrence), for float, complex and
    # symbolic couplings; the types match the full polynomial's.
    rng = np.random.default_rng(9)
    for reach in (1, 2, 3):
        size = 11
        for couplings in (
            [Fraction(int(a), 7) for a in rng.integers(1, 20, size)],
            [complex(a, b) for a, b in rng.uniform(0.3, 1.7, (size, 2))],
            [sympy.Symbol("g"), *[Fraction(1, 2)] * (size - 1)],
        ):
            m = fl.exclusion_chain(size, reach=reach, couplings=couplings)
            graph = fl.frustration_graph(m)
            sets = [()] + [tuple(c) for c in nx.enumerate_all_cliques(nx.complement(graph))]
            for s in (1, 2, 3):
                part = fl.exclusion_polynomial(m).truncated(s)
                for r in range(s + 1):
                    want = sum(
                        (math.prod(couplings[j] ** 2 for j in c) for c in sets if len(c) == r),
                        start=0,
                    )
                    got = part.weight_sums[r]
                    if isinstance(want, sympy.Basic):
                        assert sympy.expand(want - got) == 0
                    else:
                        assert abs(complex(want) - complex(got)) < 1e-12 * max(
                            1, abs(complex(want))
                        )
                full = fl.exclusion_polynomial(
                    fl.exclusion_chain(size, reach=reach, couplings=couplings)
                )
                full.coefficients  # noqa: B018 -- expand the whole polynomial first
                assert full.truncated(s).coefficients == part.coefficients


def test_partial_polynomials_of_a_uniform_chain_stop_at_their_order() -> None:
    # equal couplings take the binomial route; a partial polynomial computes only its own
    # orders, and they agree with the full polynomial expanded by sympy (C_s counts the
    # independent s-sets of a path power, common practice)
    m = fl.exclusion_chain(11, reach=2, couplings=[sympy.Rational(3, 2)] * 11)
    poly = fl.exclusion_polynomial(m)
    y = sympy.Symbol("y")
    full = sympy.Poly(poly.sympy(y).as_expr(), y)
    for s in range(poly.degree):
        want = [full.as_expr().coeff(y, r) for r in range(s + 1)]
        assert list(poly.truncated(s).coefficients) == want
