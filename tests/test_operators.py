"""StringSum algebra against dense numpy matrices built independently here (common practice:
X|s> = |s+1 mod N>, Z|s> = omega^s |s>, Kronecker products with site 0 most significant)."""

from __future__ import annotations

from fractions import Fraction
from typing import Any

import numpy as np
import pytest
import sympy
from helpers import dense_string

import freeladder as fl
from freeladder import StringArray, StringSum, make_string


def dense_sum(pairs: list, sites: list[int]) -> np.ndarray:
    dim = pairs[0][1].states ** len(sites)
    out = np.zeros((dim, dim), dtype=complex)
    for c, g in pairs:
        out += complex(c) * dense_string(g, sites)
    return out


def random_pairs(rng: np.random.Generator, n: int, states: int, kind: str, sites: list[int]):
    pairs = []
    for _ in range(n):
        factors = [(s, int(rng.integers(states)), int(rng.integers(states))) for s in sites]
        g = make_string(states, factors, int(rng.integers(2 * states)))
        if kind == "fraction":
            c = Fraction(int(rng.integers(-5, 6)), int(rng.integers(1, 4)))
        elif kind == "int":
            c = int(rng.integers(-3, 4))
        else:
            c = complex(rng.normal(), rng.normal())
        pairs.append((c, g))
    return pairs


@pytest.mark.parametrize("states", [2, 3, 4])
@pytest.mark.parametrize("kind", ["fraction", "int", "complex"])
def test_algebra_matches_dense(states: int, kind: str) -> None:
    rng = np.random.default_rng(17 + states)
    sites = [0, 1] if states > 2 else [0, 1, 2]
    for _ in range(4):
        pa = random_pairs(rng, 6, states, kind, sites)
        pb = random_pairs(rng, 5, states, kind, sites)
        a = StringSum.from_strings(pa, sites, states)
        b = StringSum.from_strings(pb, sites, states)
        da, db = dense_sum(pa, sites), dense_sum(pb, sites)
        assert a.is_exact == (kind != "complex")
        np.testing.assert_allclose(a.to_sparse().toarray(), da, atol=1e-12)
        np.testing.assert_allclose((a + b).to_sparse().toarray(), da + db, atol=1e-12)
        np.testing.assert_allclose((a - b).to_sparse().toarray(), da - db, atol=1e-12)
        np.testing.assert_allclose((a @ b).to_sparse().toarray(), da @ db, atol=1e-11)
        np.testing.assert_allclose(
            a.commutator(b).to_sparse().toarray(), da @ db - db @ da, atol=1e-11
        )
        np.testing.assert_allclose(
            (Fraction(2, 3) * a).to_sparse().toarray(), 2 / 3 * da, atol=1e-12
        )
        # terms read back as (coefficient, normalised string) reproduce the operator
        np.testing.assert_allclose(dense_sum(list(a.terms), sites), da, atol=1e-12)
        # canonical form: every string once, no zero coefficient
        keys = {g.factors for _, g in a.terms}
        assert len(keys) == len(a)
        assert all(complex(c) != 0 for c in a.coefficients)


def test_exact_cancellation_and_merging() -> None:
    x, y, z = fl.pauli("X"), fl.pauli("Y"), fl.pauli("Z")
    ops = StringSum.from_strings([(1, x), (Fraction(1, 2), y), (1, z)], [0], 2)
    # [X, Y] = 2i Z exactly: coefficient (sympy) 2*I/2 ... check value and exactness
    comm = StringSum.from_strings([(1, x)], [0], 2).commutator(
        StringSum.from_strings([(1, y)], [0], 2)
    )
    assert comm.is_exact and len(comm) == 1
    ((c, g),) = comm.terms
    assert g == z and sympy.simplify(c - 2 * sympy.I) == 0
    # (X + Y/2 + Z)^2 = (1 + 1/4 + 1) exactly (anticommuting Paulis)
    sq = ops @ ops
    assert len(sq) == 1 and sq.coefficients[0] == Fraction(9, 4)
    # repeated strings merge, opposite ones cancel to the empty sum
    same = StringSum.from_strings([(1, x), (Fraction(1, 3), x), (Fraction(-4, 3), x)], [0], 2)
    assert same.is_zero() and len(same) == 0


def test_clock_phases_exact() -> None:
    # N = 3: Z X = omega X Z, so Z X - omega X Z = 0 exactly in the cyclotomic field
    zx = make_string(3, [(0, 0, 1), (0, 1, 0)])
    xz = make_string(3, [(0, 1, 0), (0, 0, 1)])
    a = StringSum.from_strings([(1, zx)], [0], 3)
    b = StringSum.from_strings([(1, xz)], [0], 3)
    omega = StringSum.from_strings([(1, make_string(3, [], 2))], [0], 3)  # w^2 = omega
    assert (a - omega @ b).is_zero()
    assert not (a - b).is_zero()
    # X^3 = 1 exactly
    xs = StringSum.from_strings([(1, make_string(3, [(0, 1, 0)]))], [0], 3)
    cube = xs @ xs @ xs
    assert len(cube) == 1 and cube.coefficients[0] == 1


def test_float_tolerance_is_relative() -> None:
    rng = np.random.default_rng(3)
    m = fl.exclusion_chain(6, reach=2, couplings=rng.uniform(0.5, 1.5, 6) * 1e6)
    h = StringSum.from_model(m)
    h2 = h @ h
    # H^2 H - H H^2 cancels only up to rounding; the test is relative to the scale
    resid = (h2 @ h) - (h @ h2)
    assert resid.is_zero()
    assert resid.max_abs() <= 64 * np.finfo(float).eps * resid.scale
    assert not (h2 - h).is_zero()


def test_symbolic_coefficients() -> None:
    m = fl.exclusion_chain(4, reach=1, couplings="symbols")
    h = StringSum.from_model(m)
    assert h.is_symbolic
    assert h.commutator(h @ h).is_zero()
    sq = h @ h
    c0, c1, c2, c3 = sympy.symbols("c_0:4")
    ident = [c for c, g in sq.terms if not g.factors]
    assert sympy.expand(ident[0] - (c0**2 + c1**2 + c2**2 + c3**2)) == 0
    with pytest.raises(ValueError, match="symbolic"):
        h.to_sparse()
    num = sq.subs({c0: 1, c1: 2, c2: 3, c3: Fraction(1, 2)})
    hm = m.subs({"c_0": 1, "c_1": 2, "c_2": 3, "c_3": Fraction(1, 2)}).to_sparse().toarray()
    np.testing.assert_allclose(num.to_sparse().toarray(), hm @ hm, atol=1e-12)


def test_from_model_with_constant_and_errors() -> None:
    m = fl.Model.from_terms([(2, fl.pauli("ZZ")), (Fraction(1, 2), fl.pauli("XI"))], constant=3)
    h = StringSum.from_model(m)
    np.testing.assert_allclose(h.to_sparse().toarray(), m.to_sparse().toarray())
    assert "3" in str(h) and h._repr_latex_().startswith("$")
    with pytest.raises(ValueError, match="not finite"):
        StringSum.from_strings([(float("nan"), fl.pauli("X"))], [0], 2)
    with pytest.raises(TypeError):
        StringSum.from_strings([("1", fl.pauli("X"))], [0], 2)
    other = StringSum.from_strings([(1, fl.pauli("X", [5]))], [5], 2)
    with pytest.raises(ValueError, match="site"):
        _ = h + other


def test_big_integers_stay_exact() -> None:
    # coefficients beyond int64 switch to Python integers without loss
    big = 3**40
    a = StringSum.from_strings([(big, fl.pauli("X")), (Fraction(1, big), fl.pauli("Z"))], [0], 2)
    sq = a @ a
    assert sq.coefficients == (big**2 + Fraction(1, big**2),)
    arr = StringArray.from_strings([fl.pauli("X")], [0])
    assert (StringSum(arr, [big]) - StringSum(arr, [big])).is_zero()


def test_values_are_never_parsed_as_code(tmp_path: Any) -> None:
    # Issue 14, item 12: a string substituted for a symbol reached sympy's parser and ran.
    marker = tmp_path / "ran"
    payload = f"__import__('pathlib').Path({str(marker)!r}).touch()"
    m = fl.parse_model("g X0 + h Z0 Z1")
    g = sympy.Symbol("g")
    h = StringSum.from_model(m)
    attempts = [
        lambda: m.subs({"g": payload}),
        lambda: m.subs({g: payload}),
        lambda: m.subs({payload: 1}),
        lambda: m.with_couplings([payload, 1]),
        lambda: fl.Model.from_terms([(payload, fl.pauli("X"))]),
        lambda: fl.Model.from_terms([(1, fl.pauli("X"))], constant=payload),
        lambda: h.subs({"g": payload}),
        lambda: h.subs({payload: 1}),
        lambda: h.scaled(payload),
        lambda: StringSum.from_strings([(payload, fl.pauli("X"))], [0], 2),
        lambda: fl.exclusion_chain(2, couplings=payload),
        lambda: fl.ising_chain(2, field=payload),
        lambda: fl.staggered(3, payload, 1),
        lambda: fl.exclusion_polynomial(m.subs({"g": 1, "h": 2}))(payload),
    ]
    for j, attempt in enumerate(attempts):
        with pytest.raises((TypeError, ValueError)) as info:
            attempt()
        assert str(info.value), j
        assert not marker.exists(), j
    with pytest.raises(TypeError, match="pass a number"):
        m.subs({"g": "2"})
    with pytest.raises(ValueError, match="no symbol named 'k'"):
        m.subs({"k": 1})
    # Numbers and sympy values work, exactly where they are exact.
    from decimal import Decimal

    done = m.subs({"g": Decimal("0.25"), sympy.Symbol("h"): sympy.Rational(1, 3)})
    assert done.couplings == (Fraction(1, 4), Fraction(1, 3))
    assert sorted(h.subs({"g": np.float64(0.5), "h": 2}).coefficients) == [0.5, 2.0]


def test_string_sums_are_frozen() -> None:
    h = StringSum.from_model(fl.parse_model("X0 + 0.5 Z0 Z1"))
    for name in ("_coef", "_store", "strings", "new"):
        with pytest.raises(AttributeError):
            setattr(h, name, None)
    with pytest.raises(ValueError):
        h.strings.phase[0] = 1
