"""The text syntax (freeladder.algebra.syntax)
and printing back into it (freeladder.algebra.printing).

Operator matrices are checked against dense Pauli / shift-clock matrices built here with
np.kron (common practice); everything else is round trips and error reporting of our own
grammar, so the reference is the grammar documented in freeladder/syntax.py.
"""

from __future__ import annotations

from fractions import Fraction

import numpy as np
import pytest
import sympy

import freeladder as fl
from freeladder import ModelSyntaxError, parse_model

X2 = np.array([[0, 1], [1, 0]], dtype=complex)
Y2 = np.array([[0, -1j], [1j, 0]])
Z2 = np.diag([1, -1]).astype(complex)


def _kron(*mats: np.ndarray) -> np.ndarray:
    out = np.eye(1, dtype=complex)
    for a in mats:
        out = np.kron(out, a)
    return out


def _same(a: fl.Model, b: fl.Model) -> None:
    assert a.states == b.states
    assert a.sites == b.sites
    assert [g.factors for g in a.strings] == [g.factors for g in b.strings]
    assert [g.phase for g in a.strings] == [g.phase for g in b.strings]
    assert a.couplings == b.couplings
    assert a.constant == b.constant


def test_example_parses_to_the_right_matrix() -> None:
    # Reference: Pauli matrices and np.kron (common practice), sites 0..3, site 0 most significant.
    m = parse_model("0.7 X0 Z1 Z2 + g X1 Z2 Z3 - 0.4 Y0 Y3")
    g = sympy.Symbol("g")
    assert m.couplings == (0.7, g, -0.4)
    one = np.eye(2)
    ref = (
        0.7 * _kron(X2, Z2, Z2, one) + 0.25 * _kron(one, X2, Z2, Z2) - 0.4 * _kron(Y2, one, one, Y2)
    )
    np.testing.assert_allclose(m.subs({"g": 0.25}).to_sparse().toarray(), ref, atol=1e-14)


def test_coefficient_kinds() -> None:
    g, j2 = sympy.Symbol("g"), sympy.Symbol("J_2")
    m = parse_model("3 X0 + 0.25 X1 + 3/4 X2 + (1+2j) X3 + 2*g X4 - J_2 X5 + 2.5j X6")
    assert m.couplings == (3, 0.25, Fraction(3, 4), 1 + 2j, 2 * g, -j2, 2.5j)
    assert isinstance(m.couplings[0], int) and isinstance(m.couplings[2], Fraction)
    m = parse_model("(g+h)^2/2 X0 + 2^-2 Z0 + (g - 1/2) Z1 + 1e-3 X1 Z2")
    h = sympy.Symbol("h")
    assert m.couplings[0] == sympy.expand((g + h) ** 2 / 2)
    assert m.couplings[1] == Fraction(1, 4)
    assert m.couplings[2] == g - sympy.Rational(1, 2)
    assert m.couplings[3] == 1e-3


def test_constants_comments_newlines_and_sites() -> None:
    text = """
    # a comment line
    2.5                 # a bare number is a constant
    + X0 Z1             # trailing comment
    - 1/2 Z2^1
    """
    m = parse_model(text, sites=[2, 1, 0, 7])
    assert m.constant == 2.5
    assert m.couplings == (1, Fraction(-1, 2))
    assert m.sites == (2, 1, 0, 7)
    assert parse_model("X(1,0) Z(0,0)").sites == ((0, 0), (1, 0))
    assert parse_model("X0 X0 + 3").constant == 4
    assert len(parse_model("X0 X0^2", states=3)) == 0


def test_repeated_site_multiplies_in_written_order() -> None:
    # Z X = omega X Z (BACKGROUND section 2); for N = 2: Z0 X0 = i Y0, X0 Z0 = -i Y0.
    assert parse_model("Z0 X0").couplings == (1j,)
    assert parse_model("X0 Z0").couplings == (-1j,)
    assert len(parse_model("X0 X0 + Z1")) == 1 and parse_model("X0 X0 + Z1").constant == 1
    # N = 3: Z0 X0 = omega X0 Z0 with omega = exp(2 pi i / 3)
    m = parse_model("Z0 X0", states=3)
    assert m.couplings[0] == pytest.approx(np.exp(2j * np.pi / 3))
    x3 = np.roll(np.eye(3), 1, axis=0)
    z3 = np.diag(np.exp(2j * np.pi * np.arange(3) / 3))
    np.testing.assert_allclose(m.to_sparse().toarray(), z3 @ x3, atol=1e-14)


def test_clock_powers_and_phase_w() -> None:
    # Reference: shift and clock matrices, X|s> = |s+1>, Z|s> = omega^s |s> (BACKGROUND 2).
    n = 4
    x = np.roll(np.eye(n), 1, axis=0)
    z = np.diag(np.exp(2j * np.pi * np.arange(n) / n))
    m = parse_model("X0^3 Z1^2 + 0.5*w X0 Z0", states=n)
    w = np.exp(1j * np.pi / n)
    ref = _kron(np.linalg.matrix_power(x, 3), np.linalg.matrix_power(z, 2)) + 0.5 * w * _kron(
        x @ z, np.eye(n)
    )
    np.testing.assert_allclose(m.to_sparse().toarray(), ref, atol=1e-14)
    assert m.couplings == (1, 0.5)  # w X0 Z0 is exactly the normalised string


def _round_trip(m: fl.Model) -> None:
    text = str(m)
    back = parse_model(text, states=m.states, sites=m.sites)
    _same(m, back)
    assert str(back) == text


ROUND_TRIP_TEXTS = [
    (2, "0.7 X0 Z1 Z2 + g X1 Z2 Z3 - 0.4 Y0 Y3"),
    (2, "3/4 X0 - 5/2 Z1 + 7 Y2 - 1e-05 X3"),
    (2, "(1.5-2.0j) X0 Y1 + 2.5j Z0 + (0.0+1.0j) X1"),
    (2, "2*g X0 + (g+h) Z1 - g^2/3 Y0 Y1 + 1j*h X1 + (2+1j)*g Z0"),
    (2, "-X(0,0) + g Z(0,0) Z(0,1) - 0.5 Y(1,0) X(0,1)"),
    (3, "X0 + 0.5 Z0 Z1^2 - g X1^2 + (1/2-3j) Z1"),
    (4, "w X0 Z0 + g*w^3 X1^3 Z1 + 3/4 Z0^2 Z1^3 - 1.25 X1^2"),
    (3, "2 + g Z0 X0 + h X1"),
    (5, "X(-1) Z(-3) + 2*a_1 X(7)^4"),
    (3, "X(5,) Z(6,) + 2*a_1 X(5,)^2"),
]


@pytest.mark.parametrize(("states", "text"), ROUND_TRIP_TEXTS)
def test_text_model_text_round_trip(states: int, text: str) -> None:
    m = parse_model(text, states=states)
    _round_trip(m)
    # parsing the printed text gives the same text again (a fixed point after one step)
    assert str(parse_model(str(m), states=states)) == str(m)


def test_printing_of_the_example_is_verbatim() -> None:
    text = "0.7 X0 Z1 Z2 + g X1 Z2 Z3 - 0.4 Y0 Y3"
    assert str(parse_model(text)) == text


@pytest.mark.parametrize(
    "m",
    [
        fl.exclusion_chain(5, reach=2, couplings=[0.5, Fraction(2, 3), 1, -2, 1.25]),
        fl.exclusion_chain(4, reach=1, states=3, couplings="symbols"),
        fl.exclusion_chain(4, reach=2, states=4, couplings=[1j, 2 - 1j, 0.5, Fraction(1, 3)]),
        fl.ising_chain(4, field=0.9, bond="symbols"),
        fl.ising_lattice(2, 2, field=0.5, bond=1.5),
        fl.kitaev_honeycomb(2, 3, jx=0.25, jy=sympy.Symbol("K"), jz=Fraction(3, 2)),
        fl.clock_chain(3, field=[1, 2, 3], bond=[0.5, Fraction(1, 4)], states=3),
        fl.clock_chain(3, field="symbols", bond=1.5, states=4),
    ],
    ids=[
        "fraction",
        "symbols-N3",
        "complex-N4",
        "ising-sym",
        "lattice",
        "kitaev",
        "clock3",
        "clock4",
    ],
)
def test_model_text_model_round_trip(m: fl.Model) -> None:
    _round_trip(m)


def test_symbols_stay_symbolic() -> None:
    m = fl.exclusion_chain(3, couplings="symbols")
    back = parse_model(str(m))
    assert all(isinstance(c, sympy.Symbol) for c in back.couplings)
    assert back.symbols == m.symbols


def test_symbolic_phase_round_trip() -> None:
    # g Z0 X0 with N = 3 stores g * exp(2 pi i / 3); it prints as g*w^2 and reads back exactly.
    m = parse_model("g Z0 X0 + (g + h*w) X1", states=3)
    g, h = sympy.symbols("g h")
    assert m.couplings[0] == g * sympy.exp(2 * sympy.I * sympy.pi / 3)
    assert m.couplings[1] == g + h * sympy.exp(sympy.I * sympy.pi / 3)
    _round_trip(m)


# -- errors ---------------------------------------------------------------------------------------

ERRORS = [
    # (text, states, words in the message, column)
    ("0.7 W0 Z1", 2, "unknown operator letter 'W'", 5),
    ("g X Z1", 2, "missing site", 3),
    ("X0 Z1 +", 2, "dangling '+'", 7),
    ("2*", 2, "dangling '*'", 2),
    ("X0 - ", 2, "dangling '-'", 4),
    ("X0 + + Z1", 2, "expected a term", 6),
    ("Z4^2", 2, "power 2 of Z4 is out of range: powers must be 1..1", 4),
    ("X0^0", 3, "out of range: powers must be 1..2", 4),
    ("X0^3", 3, "out of range", 4),
    ("Z0^-1", 4, "out of range", 4),
    ("nan X0", 2, "'nan' is not a finite number", 1),
    ("inf X0", 2, "'inf' is not a finite number", 1),
    ("2*Infinity X0", 2, "not a finite number", 3),
    ("1e400 X0", 2, "not finite", 1),
    ("1e200^2 X0", 2, "not finite", 1),
    ("Y0 X1", 3, "Y is defined only for N = 2", 1),
    ("", 2, "empty model", 1),
    ("  # only a comment\n", 2, "empty model", 1),
    ("(g+h X0", 2, "unbalanced parentheses", 1),
    ("(g+h)) X0", 2, "unbalanced parentheses", 6),
    ("X0 )", 2, "unbalanced parentheses", 4),
    ("1/0 X0", 2, "division by zero", 2),
    ("g/(h-h) X0", 2, "division by zero", 2),
    ("0^-2 X0", 2, "division by zero", 2),
    ("2 g X0", 2, "expected '*'", 3),
    ("X0 2", 2, "after the operators", 4),
    ("X0Z1", 2, "runs into 'Z'", 3),
    ("2X0", 2, "runs into 'X'", 2),
    ("X(0,1 Z2", 2, "malformed site label", 7),
    ("X(a)", 2, "malformed site label", 3),
    ("J2 X0", 2, "unknown operator letter 'J'", 1),
    ("0.5 + x0 z1", 2, "lower-case operator", 7),
    ("pi X0", 2, "reserved name", 1),
    ("I*g X0", 2, "reserved name", 1),
    ("g^ X0", 2, "expected an integer", 4),
    ("g^2^3 X0", 2, "repeated '^'", 4),
    ("g X0 $ Z1", 2, "unexpected character '$'", 6),
    ("2 * * X0", 2, "after '*'", 5),
    ("X0 * 2", 2, "'*' after an operator", 4),
    ("0.5 X0*Z1", 2, "'*' after an operator", 7),
    ("(0.5+0j)*X0*Z1", 2, "'*' before the operator X0", 9),
    ("g*X0", 2, "'*' before the operator X0", 2),
    ("X٣", 2, "ARABIC-INDIC DIGIT THREE", 2),
    ("X²", 2, "SUPERSCRIPT TWO", 2),
    ("0.5 X0²", 2, "digits must be ASCII", 7),
    ("(((2^1000)^1000)^1000)^1000 X0", 2, "the power is too large", 11),
    ("((g+h)^40)^40 X0", 2, "more than 1000 terms", 11),
    ("(" * 200 + "1" + ")" * 200 + " X0", 2, "nested more than 64 deep", 65),
    ("9" * 1001 + " X0", 2, "more than 1000 digits", 1),
    ("X5 + Z0", 2, "site 5 is not in the given site list", 1),
    ("X0 + Z(0,1)", 2, "mix integers and tuples", 6),
    ("X0 Z(0,1)", 2, "mix integers and tuples", 4),
    ("X(0,0) Z1", 2, "mix integers and tuples", 8),
]


@pytest.mark.parametrize(("text", "states", "words", "column"), ERRORS)
def test_errors_say_what_and_where(text: str, states: int, words: str, column: int) -> None:
    sites = [0, 1] if "given site list" in words else None
    with pytest.raises(ModelSyntaxError) as info:
        parse_model(text, states=states, sites=sites)
    err = info.value
    assert issubclass(ModelSyntaxError, ValueError)
    assert words in str(err)
    assert err.text == text
    assert err.column == column, str(err)
    assert f"column {column}" in str(err)
    lines = str(err).split("\n")
    # message, then the offending line, then a caret under the column
    source_line = text.split("\n")[err.line - 1]
    if len(source_line) <= 120:
        assert lines[-2] == source_line
        assert lines[-1] == " " * (column - 1) + "^"
    else:  # a long line is shown as a window around the column
        assert len(lines[-2]) <= 126 and lines[-2].startswith(("...", source_line[:10]))
        assert lines[-2][len(lines[-1]) - 1] == source_line[column - 1]


def test_error_on_a_later_line() -> None:
    text = "X0 + Z1\n  + 0.5 Q3 Z1\n"
    with pytest.raises(ModelSyntaxError) as info:
        parse_model(text)
    err = info.value
    assert (err.line, err.column) == (2, 9)
    assert str(err).endswith("  + 0.5 Q3 Z1\n        ^")


def test_star_form_is_refused_and_shows_the_accepted_form() -> None:
    # Issue 14: '*' joins coefficients only; the message shows the accepted form of a term.
    for text in ["(0.5+0j)*X0*Z1", "0.5*X0 Z1", "0.5 X0*Z1", "X0 * Z1", "1j*Y0"]:
        with pytest.raises(ModelSyntaxError, match="0.5 X0 Z1"):
            parse_model(text)
    assert parse_model("0.5 X0 Z1").couplings == (0.5,)
    assert parse_model("2*g*w X0 Z0", states=3).couplings[0] != 0


def test_underscore_names_are_said_to_be_couplings() -> None:
    # Issue 13: X_0 reads as a coupling name; the message says so and shows X0 Z1.
    with pytest.raises(ModelSyntaxError) as info:
        parse_model("X_0 Z_1")
    assert "'X_0' would be read as a coupling name" in str(info.value)
    assert "as in X0 " in str(info.value)
    with pytest.raises(ModelSyntaxError, match="'Z_1' would be read as a coupling name"):
        parse_model("X0 Z_1")


def test_limits_are_fast() -> None:
    # Issue 14: each of these used to recurse too deep or run for minutes.
    import time

    for text in [
        "(" * 5000 + "1" + ")" * 5000 + " X0",
        "-(" * 3000 + "1" + ")" * 3000 + " X0",
        "(((2^1000)^1000)^1000)^1000 X0",
        "((1+2j)^1000)^1000 X0",
        "(a+b+c+d+e+f)^1000 X0",
        "(a+b)^30*(c+d)^30*(e+f)^30 X0",
    ]:
        start = time.perf_counter()
        with pytest.raises(ModelSyntaxError):
            parse_model(text)
        assert time.perf_counter() - start < 1.0, text


def test_bad_states_and_types() -> None:
    with pytest.raises(ValueError, match="integer >= 2"):
        parse_model("X0", states=1)
    with pytest.raises(TypeError):
        parse_model(b"X0")  # type: ignore[arg-type]


def test_no_eval_of_python_or_sympy_text() -> None:
    # Text that eval / sympify would run must be rejected by the grammar.
    for text in ["__import__('os') X0", "sin(g) X0", "exp(1) X0", "g.real X0", "g[0] X0"]:
        with pytest.raises(ModelSyntaxError):
            parse_model(text)


@pytest.mark.parametrize("name", ["w", "J2", "pi", "nan", "two words", "z3"])
def test_unreadable_symbol_names_are_quoted_not_misread(name: str) -> None:
    # A symbol the syntax cannot name (w is the phase, J2 looks like an operator ...) prints
    # between backticks, and reading that back fails clearly instead of misreading it.
    m = fl.Model.from_terms([(sympy.Symbol(name), fl.pauli("X"))])
    text = str(m)
    assert text == f"`{name}` X0"
    with pytest.raises(ModelSyntaxError, match="backticks"):
        parse_model(text)


def test_one_number_format_for_display() -> None:
    # Issue 14 / 13: float noise is not shown, complex numbers print as a+bi everywhere.
    from freeladder.algebra.printing import format_number

    assert format_number(0.1 + 0.06) == "0.16"  # 0.16000000000000003 in binary
    assert format_number(1.5 - 2j) == "1.5-2i"
    assert format_number(2.5j) == "2.5i" and format_number(-1j) == "-i"
    assert format_number(complex(3, 0)) == "3"
    assert format_number(Fraction(3, 4)) == "3/4" and format_number(10**30) == str(10**30)
    assert format_number(np.float64(1e-20)) == "1e-20"
    assert format_number(sympy.Rational(1, 3)) == "1/3"
    assert format_number(sympy.sqrt(2)) == "1.41421356237"
    # the digits shown agree with the value to the stated precision (common practice)
    for x in (np.pi, -np.e * 1e-7, 6.02214076e23):
        assert float(format_number(x)) == pytest.approx(x, rel=1e-11)
    latex = parse_model("0.16000000000000003 X0 + (1-2j) Z0 Z1 - X1")._repr_latex_()
    assert "0.16 X_{0}" in latex and r"\left(1 - 2i\right) Z_{0} Z_{1}" in latex
    assert "0.16000000000000003" not in latex and latex.endswith("- X_{1}$")
    # the text syntax keeps every digit, so that it reads back exactly
    assert "0.16000000000000003" in str(parse_model("0.16000000000000003 X0"))


def test_a_signed_coefficient_after_plus_or_minus() -> None:
    # Text that joins signed terms with " + " (as a loop printing each term's coupling writes it)
    # reads as in mathematics: a + -b = a - b and a - -b = a + b (common practice).
    m = parse_model("X0 X1 + -0.7 Z0 - -0.3 Z1 + +2 Z2")
    _same(m, parse_model("X0 X1 - 0.7 Z0 + 0.3 Z1 + 2 Z2"))
    assert parse_model("-+2 X0").couplings == (-2,)
    assert parse_model("X0 + -Z1").couplings == (1, -1)
    with pytest.raises(ModelSyntaxError, match="three signs in a row") as err:
        parse_model("X0 + --Z1")
    assert "column 7" in str(err.value)
    # A sign standing apart more likely marks a lost term: still an error.
    for text in ("X0 + - Z1", "X0 + + Z1", "X0 + - 0.7 Z1"):
        with pytest.raises(ModelSyntaxError, match="expected a term"):
            parse_model(text)
    with pytest.raises(ModelSyntaxError, match="dangling '-'"):
        parse_model("X0 + -")
