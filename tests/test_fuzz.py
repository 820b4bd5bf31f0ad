"""Fuzzing the parser and every public constructor with random and hand-made malformed input.

The only contract checked here is the one for bad input (common practice for a library's
input validation): a call either succeeds or raises ValueError or TypeError (ModelSyntaxError is
a ValueError) with a non-empty message -- never another exception type, never a hang (each case
runs under a limit of CPU time, measured with the process's profiling interval timer, so that
a loaded machine does not turn a slow case into a false hang).
"""

from __future__ import annotations

import math
import signal
import string
from collections.abc import Callable, Iterator
from contextlib import contextmanager
from decimal import Decimal
from fractions import Fraction
from typing import Any

import numpy as np
import pytest
import sympy
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

import freeladder as fl

CASE_SECONDS = 2.0
FUZZ = settings(
    deadline=None,
    database=None,
    derandomize=True,
    suppress_health_check=[HealthCheck.too_slow, HealthCheck.filter_too_much],
)


class _Hang(BaseException):
    """Raised by the timer; a BaseException so that no `except Exception` swallows it."""


@contextmanager
def _time_limit(seconds: float) -> Iterator[None]:
    def on_alarm(signum: int, frame: Any) -> None:
        raise _Hang(f"no answer within {seconds} s of CPU time")

    previous = signal.signal(signal.SIGPROF, on_alarm)
    signal.setitimer(signal.ITIMER_PROF, seconds)
    try:
        yield
    finally:
        signal.setitimer(signal.ITIMER_PROF, 0)
        signal.signal(signal.SIGPROF, previous)


def _clean(call: Callable[[], Any], what: str) -> None:
    """Run ``call``: success, or ValueError / TypeError with a message; anything else fails."""
    try:
        with _time_limit(CASE_SECONDS):
            call()
    except (ValueError, TypeError) as err:
        assert str(err).strip(), f"{what}: {type(err).__name__} without a message"
    except _Hang:
        pytest.fail(f"{what}: no answer within {CASE_SECONDS} s of CPU time")
    except Exception as err:  # noqa: BLE001 - the point of the test
        pytest.fail(f"{what}: {type(err).__name__}: {err}")


# -- values a user might pass where a number is expected --------------------------------------
WILD_VALUES: list[Any] = [
    0,
    1,
    -3,
    10**400,
    -(10**4000),
    2**63,
    0.5,
    1e-200,
    1e308,
    float("nan"),
    float("inf"),
    -float("inf"),
    1j,
    complex(float("nan"), 1),
    complex(1, float("inf")),
    Fraction(1, 3),
    Fraction(10**500, 3),
    Decimal("0.1"),
    Decimal("NaN"),
    Decimal("sNaN"),
    Decimal("-Infinity"),
    Decimal("1e999999"),
    Decimal("1e-999999"),
    np.float64(0.25),
    np.float32(np.nan),
    np.int64(-2),
    np.complex128(1 - 1j),
    np.bool_(True),
    np.array(1.5),
    np.array([1.0, 2.0]),
    True,
    None,
    "1",
    "g",
    "__import__('os').getcwd()",
    b"1",
    [1],
    (1, 2),
    {1: 2},
    {1},
    object(),
    sympy.Symbol("g"),
    sympy.Symbol("h") ** 2 + 1,
    sympy.Rational(3, 7),
    sympy.sqrt(2),
    sympy.I,
    sympy.nan,
    sympy.zoo,
    sympy.oo,
    sympy.exp(1000),
    sympy.Integer(10) ** 400,
    (sympy.Symbol("a") + sympy.Symbol("b") + 1) ** 500,
    sympy.Pow(2, 10**6, evaluate=False),
    sympy.Matrix([1, 2]),
    sympy.Eq(sympy.Symbol("g"), 1),
    sympy.true,
]
wild = st.sampled_from(WILD_VALUES)
SIZES: list[Any] = [-5, -1, 0, 1, 2, 3, 4, 7, 10**12, 2**63, 2.5, 3.0, "3", None, True, np.int64(3)]
sizes = st.sampled_from(SIZES)
STATES: list[Any] = [-1, 0, 1, 2, 3, 4, 5, 64, 65, 10**6, 2.0, "3", None, False, np.int64(3)]
states = st.sampled_from(STATES)
SITES: list[Any] = [0, 1, 5, -2, 10**30, (0, 1), (1,), (), "a", 1.5, None, [0], True, np.int64(2)]
site = st.sampled_from(SITES)


# -- the parser --------------------------------------------------------------------------------
FRAGMENTS = [
    *"XYZxyzgwhJIjE",
    *"0123456789",
    *"+-*/^(),.#_ \n\t",
    "X0",
    "Z1",
    "Y2",
    "X(0,1)",
    "Z(-1)",
    "Z(5,)",
    "X12",
    "g",
    "J_2",
    "X_0",
    "0.5",
    "1e-3",
    "1e400",
    "2j",
    "3/4",
    "w^3",
    "^2",
    "^-1",
    "^(1/2)",
    "nan",
    "inf",
    "pi",
    "`a`",
    "²",
    "٣",
    "é",
    "\u200b",
    "(0.5+0j)*",
    "*X1",
    "$",
]


@settings(FUZZ, max_examples=1500)
@given(st.lists(st.sampled_from(FRAGMENTS), max_size=40), st.sampled_from([2, 3, 4]))
def test_parser_on_random_fragments(pieces: list[str], n: int) -> None:
    text = "".join(pieces)
    _clean(lambda: fl.parse_model(text, states=n), repr(text))


@settings(FUZZ, max_examples=500)
@given(st.text(max_size=60), states)
def test_parser_on_random_text_and_states(text: str, n: Any) -> None:
    _clean(lambda: fl.parse_model(text, states=n), repr(text))


HAND_MADE = [
    "(" * 200 + "1" + ")" * 200 + " X0",
    "(" * 100000 + " X0",
    ")" * 1000,
    "-" * 10000 + "1 X0",
    "+-" * 5000 + " X0",
    "(((2^1000)^1000)^1000)^1000 X0",
    "((2^1000)^1000)^(1/2) X0",
    "2^1000^1000 X0",
    "((1+2j)^1000)^1000 X0",
    "(g+h+k+l)^1000 X0",
    "(g+1)^999*(h+1)^999 X0",
    "9" * 5000 + " X0",
    "0." + "9" * 5000 + " X0",
    "1e" + "9" * 50 + " X0",
    "X" + "9" * 5000,
    "X(" + "1," * 10000 + ")",
    "X٣",
    "X²",
    "X0 Z1²",
    "X_0 Z_1",
    "(0.5+0j)*X0*Z1",
    "0.5*X0",
    "X0*Z1",
    "X0^1000000",
    "w^1000000 X0",
    "g^(1/0) X0",
    "0^0 X0",
    "0^(-1/2) X0",
    "(-1)^(1/2) X0",
    "1/(g-g) X0",
    "X0 " * 20000,
    " + ".join(f"X{j}" for j in range(3000)),
    "X" + "0" * 5000,
    "\x00X0",
    "X0\r\nZ1",
    "X0 # " + "é" * 100,
    "",
    "#",
    "+",
]


@pytest.mark.parametrize("text", HAND_MADE, ids=range(len(HAND_MADE)))
def test_parser_on_hand_made_malformed_text(text: str) -> None:
    for n in (2, 3):
        _clean(lambda n=n: fl.parse_model(text, states=n), repr(text[:60]))


@settings(FUZZ, max_examples=150)
@given(st.sampled_from(["X0 + Z0 Z1", "g X0"]), states, st.one_of(st.none(), st.lists(site)))
def test_parser_states_and_sites(text: str, n: Any, sites: Any) -> None:
    _clean(lambda: fl.parse_model(text, states=n, sites=sites), f"{text} {n} {sites}")


# -- strings -----------------------------------------------------------------------------------
factor = st.tuples(site, st.sampled_from([0, 1, 2, -1, 10**20, 1.5, "1", None]), st.integers(-3, 3))


@settings(FUZZ, max_examples=500)
@given(
    states,
    st.one_of(
        st.lists(factor, max_size=5), st.sampled_from([None, "X0", 3, [(0, 1)], [[0, 1, 0]]])
    ),
    st.sampled_from([0, 1, -7, 10**30, 1.5, None]),
)
def test_make_string(n: Any, factors: Any, phase: Any) -> None:
    _clean(lambda: fl.make_string(n, factors, phase), f"{n} {factors} {phase}")


@settings(FUZZ, max_examples=400)
@given(
    st.one_of(st.text(alphabet="IXYZxq ²", max_size=6), st.sampled_from([None, 3, ["X", 1], b"X"])),
    st.one_of(st.none(), st.lists(site, max_size=6), st.sampled_from(["01", 3])),
)
def test_pauli(letters: Any, sites: Any) -> None:
    _clean(lambda: fl.pauli(letters, sites), f"{letters!r} {sites!r}")


# -- models ------------------------------------------------------------------------------------
GOOD = [
    fl.pauli("X"),
    fl.pauli("ZZ"),
    fl.make_string(3, [(0, 1, 2)]),
    fl.pauli("XY", [(0, 1), (1, 1)]),
]
term = st.one_of(
    st.tuples(wild, st.sampled_from(GOOD)),
    st.sampled_from([(1,), (1, 2, 3), "X0", None, (1, "X0"), [1, GOOD[0]]]),
)


@settings(FUZZ, max_examples=600)
@given(st.lists(term, max_size=4), st.sampled_from([None, 2, 3, 1, "2"]), wild)
def test_model_from_terms(terms: list[Any], n: Any, constant: Any) -> None:
    _clean(
        lambda: fl.Model.from_terms(terms, states=n, constant=constant), f"{terms} {n} {constant}"
    )


BASE = fl.parse_model("g X0 + 0.5 Z0 Z1 + h X1")


@settings(FUZZ, max_examples=600)
@given(st.one_of(st.lists(wild, min_size=3, max_size=3), st.lists(wild, max_size=5), wild), wild)
def test_with_couplings(couplings: Any, constant: Any) -> None:
    _clean(lambda: BASE.with_couplings(couplings, constant), f"{couplings} {constant}")


@settings(FUZZ, max_examples=600)
@given(
    st.one_of(
        st.dictionaries(
            st.sampled_from(["g", "h", "k", sympy.Symbol("g"), sympy.Symbol("h") + 1, 1, None]),
            wild,
            max_size=3,
        ),
        wild,
    )
)
def test_model_and_sum_subs(values: Any) -> None:
    _clean(lambda: BASE.subs(values), f"Model.subs({values})")
    _clean(lambda: fl.StringSum.from_model(BASE).subs(values), f"StringSum.subs({values})")


@settings(FUZZ, max_examples=400)
@given(st.lists(wild, max_size=3), wild)
def test_string_sum_constructors(coefficients: list[Any], scalar: Any) -> None:
    arr = fl.StringArray.from_strings([fl.pauli("X"), fl.pauli("Z"), fl.pauli("Y")], [0])
    _clean(lambda: fl.StringSum(arr, coefficients), f"StringSum({coefficients})")
    pairs = list(zip(coefficients, [fl.pauli("X"), fl.pauli("Z"), fl.pauli("Y")], strict=False))
    _clean(lambda: fl.StringSum.from_strings(pairs, [0], 2), f"from_strings({pairs})")
    one = fl.StringSum(arr, [1, 2, 3])
    _clean(lambda: one.scaled(scalar), f"scaled({scalar!r})")
    _clean(lambda: fl.StringSum.identity(2, [0], scalar), f"identity({scalar!r})")


# -- builders ----------------------------------------------------------------------------------
coupling_arg = st.one_of(
    wild,
    st.sampled_from(["uniform", "symbols", "random", ""]),
    st.lists(wild, max_size=4),
)


@settings(FUZZ, max_examples=400)
@given(sizes, sizes, states, coupling_arg)
def test_exclusion_chain(n_terms: Any, reach: Any, n: Any, couplings: Any) -> None:
    _clean(
        lambda: fl.exclusion_chain(n_terms, reach=reach, states=n, couplings=couplings),
        f"exclusion_chain({n_terms}, {reach}, {n}, {couplings})",
    )


@settings(FUZZ, max_examples=400)
@given(sizes, coupling_arg, coupling_arg, st.sampled_from(["open", "periodic", "closed", None]))
def test_ising_chain(n_sites: Any, field: Any, bond: Any, boundary: Any) -> None:
    _clean(
        lambda: fl.ising_chain(n_sites, field=field, bond=bond, boundary=boundary),
        f"ising_chain({n_sites}, {field}, {bond}, {boundary})",
    )


@settings(FUZZ, max_examples=400)
@given(sizes, sizes, wild, wild, states)
def test_lattices_and_clock_chain(rows: Any, cols: Any, a: Any, b: Any, n: Any) -> None:
    _clean(lambda: fl.ising_lattice(rows, cols, field=a, bond=b), f"ising_lattice({rows}, {cols})")
    _clean(lambda: fl.kitaev_honeycomb(rows, cols, a, b, 1), f"kitaev_honeycomb({rows}, {cols})")
    _clean(lambda: fl.clock_chain(rows, field=a, bond=b, states=n), f"clock_chain({rows}, {n})")


@settings(FUZZ, max_examples=400)
@given(sizes, wild, wild, st.sampled_from([None, 0, 1, -1, 1.5, "1", 2**70]))
def test_coupling_patterns(n: Any, a: Any, b: Any, seed: Any) -> None:
    _clean(lambda: fl.staggered(n, a, b), f"staggered({n}, {a!r}, {b!r})")
    _clean(lambda: fl.random_couplings(n, a, b, seed=seed), f"random_couplings({n}, {a!r}, {b!r})")
    _clean(lambda: fl.complex_couplings(n, (a, b), seed=seed), f"complex_couplings({n})")


def test_fuzz_alphabet_is_not_trivial() -> None:
    # The fragments cover every token kind of the grammar and the known traps (common practice:
    # a fuzzer is only as good as its alphabet).
    joined = "".join(FRAGMENTS)
    assert set("+-*/^()") <= set(joined) and any(not ch.isascii() for ch in joined)
    assert all(ch in joined for ch in string.digits) and math.isnan(WILD_VALUES[9])


# -- issue 21: every public function of a model, on the inputs the audit listed -------------------
ISSUE_MODELS: list[Any] = [
    lambda: fl.exclusion_chain(4, couplings=[2, 2j, 1, 1]),
    lambda: fl.exclusion_chain(2, couplings=[1, 1j]),
    lambda: fl.exclusion_chain(5, couplings=[1, 1, 0, 1, 1]),
    lambda: fl.ising_chain(4, field=1j),
    lambda: fl.ising_chain(8, field=1j),  # an exceptional point: double roots in one piece
    lambda: fl.parse_model("Z0 + X0 X1 + Y0 Y1 + Z1 + X0 Y1"),
    lambda: fl.parse_model("X0 X1 X2 + Z0 + Z1 + Z2"),
    lambda: fl.parse_model("Z0 Z1 + Z1 Z2 + Z2 Z0 + 0.5 X0 + 0.3 X1"),
    lambda: fl.parse_model("g X0 + Z0 Z1 + X1"),
    lambda: fl.parse_model("(2^1000)*(2^1000)*(2^1000) X0 Z1 + X1 Z2"),
    lambda: fl.parse_model("1e-300 X0 Z1 + X1 Z2 + 1e300 X2 Z3"),
    lambda: fl.Model.from_terms([], states=2),
]
# calls beyond the model alone: the arguments the issue's reproductions used
ISSUE_EXTRA: dict[str, list[tuple[Any, ...]]] = {
    "free_spectrum": [(), ("fast",), ("certified",)],
    "charge": [(2,)],
    "transfer_matrix": [(0.5,)],
    "jordan_wigner_spectrum": [("all",), ((-1, 1),), ((1, 1.9),), (np.array([1, -1]),)],
}
DOCUMENTED = (ValueError, TypeError, ArithmeticError)
"""What a model function may raise: ValueError / TypeError subclasses (NoTheoremError,
TooLargeError, ModelSyntaxError, BeyondFloatError) and the plain ArithmeticError that
free_spectrum documents for roots that did not converge -- each with a message; never a
ZeroDivisionError, OverflowError or FloatingPointError from inside."""


def _model_functions() -> list[tuple[str, Callable[..., Any]]]:
    import inspect

    out = []
    for name in fl.__all__:
        f = getattr(fl, name)
        if not inspect.isfunction(f):
            continue
        params = list(inspect.signature(f).parameters.values())
        required = [p for p in params if p.default is p.empty and p.kind != p.VAR_KEYWORD]
        if params and params[0].name == "m" and (len(required) == 1 or name in ISSUE_EXTRA):
            out.append((name, f))
    return out


@pytest.mark.parametrize("build", ISSUE_MODELS, ids=range(len(ISSUE_MODELS)))
def test_issue_21_inputs_through_every_model_function(build: Callable[[], fl.Model]) -> None:
    m = build()
    functions = _model_functions()
    assert len(functions) > 20  # the listing found the model functions
    for name, f in functions:
        for extra in ISSUE_EXTRA.get(name, [()]):
            if name == "verify" and m.dimension > 2**12:
                continue  # one check per model would take long; the spectra are tried
            try:
                with _time_limit(30.0):
                    f(m, *extra)
            except DOCUMENTED as err:
                assert str(err).strip(), f"{name}{extra}: {type(err).__name__} without a message"
                internal = (ZeroDivisionError, OverflowError, FloatingPointError)
                assert not isinstance(err, internal), f"{name}{extra}: {type(err).__name__}: {err}"
            except _Hang:
                pytest.fail(f"{name}{extra}: no answer within 30 s of CPU time")
            except Exception as err:  # noqa: BLE001 - the point of the test
                pytest.fail(f"{name}{extra} on {m!r:.80}: {type(err).__name__}: {err}")
