"""Property tests of WeylString / StringArray algebra against dense matrices built here.

Reference (common practice): the one-site shift X|s> = |s+1 mod N> and clock
Z|s> = omega^s |s>, omega = exp(2 pi i / N), so that Z X = omega X Z; strings are
w^phase * kron over sites of X^a Z^b with w = exp(i pi / N) and sites[0] the most significant
factor (D. Gottesman, Chaos Solitons Fractals 10, 1749 (1999), arXiv:quant-ph/9802007).
Every matrix below is built with explicit N x N arrays and np.kron, not with freeladder.
"""

from __future__ import annotations

from typing import Any

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from freeladder import StringArray, WeylString, make_string

N_SITES = 3
SETTINGS = settings(max_examples=40, deadline=None)


def shift(n: int) -> np.ndarray:
    x = np.zeros((n, n), dtype=complex)
    for s in range(n):
        x[(s + 1) % n, s] = 1
    return x


def clock(n: int) -> np.ndarray:
    return np.diag(np.exp(2j * np.pi * np.arange(n) / n))


def one_site(n: int, a: int, b: int) -> np.ndarray:
    return np.linalg.matrix_power(shift(n), a % n) @ np.linalg.matrix_power(clock(n), b % n)


def embed(n: int, site: Any, op: np.ndarray, sites: list[Any]) -> np.ndarray:
    out = np.eye(1, dtype=complex)
    for s in sites:
        out = np.kron(out, op if s == site else np.eye(n))
    return out


def dense(g: WeylString, sites: list[Any]) -> np.ndarray:
    """Matrix of a string from its exponents."""
    n = g.states
    out = np.exp(1j * np.pi * g.phase / n) * np.eye(n ** len(sites), dtype=complex)
    for s, a, b in g.factors:
        out = out @ embed(n, s, one_site(n, a, b), sites)
    return out


def dense_written(
    n: int, factors: list[tuple[Any, int, int]], phase: int, sites: list
) -> np.ndarray:
    """Matrix of w^phase times the factors multiplied left to right, as written."""
    out = np.exp(1j * np.pi * phase / n) * np.eye(n ** len(sites), dtype=complex)
    for s, a, b in factors:
        out = out @ embed(n, s, one_site(n, a, b), sites)
    return out


factor_lists = st.lists(
    st.tuples(st.integers(0, N_SITES - 1), st.integers(-6, 6), st.integers(-6, 6)), max_size=5
)


@st.composite
def string_with_source(draw: Any, n: int) -> tuple[WeylString, list, int]:
    factors = draw(factor_lists)
    phase = draw(st.integers(-12, 12))
    return make_string(n, factors, phase), factors, phase


@st.composite
def pairs(draw: Any) -> tuple[int, WeylString, WeylString]:
    n = draw(st.integers(2, 5))
    g, _, _ = draw(string_with_source(n))
    h, _, _ = draw(string_with_source(n))
    return n, g, h


SITES = list(range(N_SITES))


@SETTINGS
@given(st.integers(2, 5).flatmap(lambda n: st.tuples(st.just(n), string_with_source(n))))
def test_make_string_multiplies_in_written_order(arg: Any) -> None:
    n, (g, factors, phase) = arg
    np.testing.assert_allclose(dense(g, SITES), dense_written(n, factors, phase, SITES), atol=1e-12)


@SETTINGS
@given(pairs())
def test_product(arg: Any) -> None:
    n, g, h = arg
    np.testing.assert_allclose(dense(g * h, SITES), dense(g, SITES) @ dense(h, SITES), atol=1e-12)
    np.testing.assert_allclose(dense(g @ h, SITES), dense(g * h, SITES), atol=0)


@SETTINGS
@given(pairs())
def test_commutation_exponent(arg: Any) -> None:
    n, g, h = arg
    m = g.commutation_exponent(h)
    assert 0 <= m < n
    omega = np.exp(2j * np.pi / n)
    gm, hm = dense(g, SITES), dense(h, SITES)
    np.testing.assert_allclose(gm @ hm, omega**m * (hm @ gm), atol=1e-12)
    assert g.commutes_with(h) == (m == 0)


@SETTINGS
@given(st.integers(2, 5).flatmap(lambda n: string_with_source(n)), st.integers(-4, 6))
def test_adjoint_and_power(arg: Any, k: int) -> None:
    g = arg[0]
    gm = dense(g, SITES)
    np.testing.assert_allclose(dense(g.adjoint(), SITES), gm.conj().T, atol=1e-12)
    ref = np.linalg.matrix_power(gm, k) if k >= 0 else np.linalg.matrix_power(gm.conj().T, -k)
    np.testing.assert_allclose(dense(g**k, SITES), ref, atol=1e-11)


@SETTINGS
@given(st.integers(2, 5).flatmap(lambda n: string_with_source(n)))
def test_order_phase_and_normalisation(arg: Any) -> None:
    g = arg[0]
    n = g.states
    w = np.exp(1j * np.pi / n)
    gm = dense(g, SITES)
    eye = np.eye(n**N_SITES)
    np.testing.assert_allclose(
        np.linalg.matrix_power(gm, n), w ** g.order_phase() * eye, atol=1e-10
    )
    g0, e = g.normalized()
    g0m = dense(g0, SITES)
    np.testing.assert_allclose(np.linalg.matrix_power(g0m, n), eye, atol=1e-10)  # g^N = 1
    np.testing.assert_allclose(gm, w**e * g0m, atol=1e-12)  # original = w^e g
    assert g0.factors == g.factors


@st.composite
def arrays(draw: Any) -> tuple[int, list[WeylString]]:
    n = draw(st.integers(2, 5))
    count = draw(st.integers(1, 6))
    return n, [draw(string_with_source(n))[0] for _ in range(count)]


@SETTINGS
@given(arrays(), st.data())
def test_string_array_agrees_with_opstring(arg: Any, data: Any) -> None:
    n, strings = arg
    arr = StringArray.from_strings(strings, SITES, n)
    assert [g for g in arr] == strings
    k = len(strings)
    left = data.draw(st.lists(st.integers(0, k - 1), min_size=1, max_size=6))
    right = data.draw(st.lists(st.integers(0, k - 1), min_size=len(left), max_size=len(left)))
    prods = arr.products(left, right)
    assert list(prods) == [strings[i] * strings[j] for i, j in zip(left, right, strict=True)]
    cm = arr.commutation_matrix().toarray()
    for i in range(k):
        for j in range(k):
            assert cm[i, j] == strings[i].commutation_exponent(strings[j])
    assert list(arr.adjoint()) == [g.adjoint() for g in strings]
    norm, extra = arr.normalized()
    for r, g in enumerate(strings):
        g0, e = g.normalized()
        assert norm[r] == g0 and extra[r] == e
    assert list(arr.order_phases()) == [g.order_phase() for g in strings]


@SETTINGS
@given(arrays(), st.data())
def test_to_sparse_against_kron_sums(arg: Any, data: Any) -> None:
    n, strings = arg
    coeffs = np.array(
        data.draw(
            st.lists(
                st.complex_numbers(max_magnitude=3, allow_nan=False, allow_infinity=False),
                min_size=len(strings),
                max_size=len(strings),
            )
        )
    )
    arr = StringArray.from_strings(strings, SITES, n)
    order = data.draw(st.permutations(SITES))
    for sites in (SITES, list(order)):
        ref = sum(c * dense(g, sites) for c, g in zip(coeffs, strings, strict=True))
        got = arr.to_sparse(coeffs, sites if sites != SITES else None).toarray()
        np.testing.assert_allclose(got, ref, atol=1e-12)


def test_to_sparse_tuple_sites_and_reordering() -> None:
    # A 2 x 2 lattice with tuple labels, N = 3, and a site list in a different order.
    n = 3
    labels = [(0, 0), (0, 1), (1, 0), (1, 1)]
    strings = [
        make_string(n, [((0, 0), 1, 0), ((1, 1), 0, 2)]),
        make_string(n, [((0, 1), 2, 1)], phase=1),
        make_string(n, [((1, 0), 0, 1), ((0, 1), 1, 0)]),
    ]
    coeffs = np.array([0.5, -1.25 + 0.5j, 2.0])
    arr = StringArray.from_strings(strings, labels, n)
    for sites in (labels, [(1, 1), (0, 0), (1, 0), (0, 1)]):
        ref = sum(c * dense(g, sites) for c, g in zip(coeffs, strings, strict=True))
        np.testing.assert_allclose(arr.to_sparse(coeffs, sites).toarray(), ref, atol=1e-12)
    # a real sum gives a real matrix, in canonical CSR form
    real = StringArray.from_strings([make_string(2, [(0, 1, 0)]), make_string(2, [(1, 0, 1)])])
    mat = real.to_sparse([1.0, 2.0])
    assert mat.dtype == np.float64 and mat.has_sorted_indices


def test_to_sparse_cancellation_leaves_no_explicit_zeros() -> None:
    # X0 + X0 Z1 vanishes on half the rows: (1 + Z1) X0.
    arr = StringArray.from_strings(
        [make_string(2, [(0, 1, 0)]), make_string(2, [(0, 1, 0), (1, 0, 1)])]
    )
    mat = arr.to_sparse([1.0, 1.0])
    assert mat.nnz == 2 and np.all(mat.data != 0)
    ref = np.kron(shift(2), np.eye(2) + clock(2))
    np.testing.assert_allclose(mat.toarray(), ref, atol=1e-15)


# -- frozen objects and checked input (issue 14, items 14 and 16) --------------------------------
def _mutations(m: Any) -> list[Any]:
    arr = m.strings
    return [
        lambda: setattr(m, "couplings", (5,)),
        lambda: setattr(m, "strings", arr),
        lambda: setattr(m, "constant", 1),
        lambda: delattr(m, "couplings"),
        lambda: setattr(arr, "states", 3),
        lambda: setattr(arr, "sites", (0, 1, 2)),
        lambda: setattr(arr, "phase", arr.phase),
        lambda: delattr(arr, "x"),
        lambda: arr.phase.__setitem__(0, 1),
        lambda: arr.x.data.__setitem__(0, 2),
        lambda: arr.z.indices.__setitem__(0, 0),
        lambda: arr.x.indptr.__setitem__(0, 1),
        lambda: setattr(arr.x, "data", arr.x.data.copy()),
        lambda: setattr(arr.z, "indices", arr.z.indices.copy()),
        lambda: setattr(arr.z, "indptr", arr.z.indptr.copy()),
        lambda: arr.x.__setitem__((0, 1), 1),
        lambda: arr.x.resize((5, 5)),
        lambda: setattr(arr[0], "states", 3),
        lambda: setattr(arr[0], "phase", 1),
    ]


def test_models_and_string_arrays_are_frozen() -> None:
    import freeladder as fl

    m = fl.parse_model("g X0 Z1 + 0.5 Z0 Z1 + X1")
    before = (str(m), m.states, m.strings.phase.tolist(), m.strings.x.toarray().tolist())
    for j, mutate in enumerate(_mutations(m)):
        with pytest.raises((AttributeError, TypeError, ValueError)) as info:
            mutate()
        assert str(info.value), j
    # Nothing changed, and derived arrays are ordinary writable arrays again.
    assert (str(m), m.states, m.strings.phase.tolist(), m.strings.x.toarray().tolist()) == before
    taken = m.strings.x[[0, 1]]
    taken.data[0] = 0  # a new array, not the model's


def test_states_sites_and_exponents_are_checked() -> None:
    for bad in (1, 0, -3, 65, 10**9):
        with pytest.raises(ValueError, match="states per site"):
            make_string(bad, [(0, 1, 0)])
    for bad_type in (2.0, "3", None, True):
        with pytest.raises(TypeError, match="states per site"):
            make_string(bad_type, [(0, 1, 0)])  # type: ignore[arg-type]
    for site in ("a", 1.5, None, (), (1, "x"), [0, 1], True):
        with pytest.raises(TypeError, match="site label"):
            make_string(2, [(site, 1, 0)])
    with pytest.raises(ValueError, match="mix integers and tuples"):
        make_string(2, [(0, 1, 0), ((0, 1), 0, 1)])
    with pytest.raises(TypeError, match="exponent"):
        make_string(3, [(0, 1.5, 0)])
    with pytest.raises(TypeError, match="triple"):
        make_string(2, [(0, 1)])
    with pytest.raises(ValueError, match="more than once"):
        StringArray.from_strings([make_string(2, [(0, 1, 0)])], [0, 1, 0])
    # numpy integers are accepted and become Python ints
    g = make_string(np.int64(3), [(np.int64(4), np.int64(1), 2)])
    assert g.states == 3 and type(g.factors[0][0]) is int
