"""freeladder's text syntax for models: a hand-written tokenizer and recursive-descent parser.

The text is a sum of terms; each term is an optional coefficient followed by one-site operator
factors, e.g. ``"0.7 X0 Z1 Z2 + g X1 Z2 Z3 - 0.4 Y0 Y3"``.  Grammar (``{}`` = repeat, ``[]`` =
optional)::

    model     := [sign] term {sign term}
    sign      := "+" | "-"
    term      := coefficient factor {factor}  |  factor {factor}  |  coefficient
    factor    := OPERATOR ["^" integer]             X3, Z4^2, Y0, X(0,1)
    coefficient := power {("*" | "/") power}       2*g, 3/4, g*w^2
    power     := atom ["^" exponent]
    atom      := NUMBER | NAME | "(" sum ")"
    sum       := [sign] product {sign product}       only inside parentheses
    product   := unary {("*" | "/") unary}
    unary     := sign unary | power
    exponent  := integer | "-" integer | "(" ["-"] integer ["/" integer] ")"

How the tokens are told apart:

* An OPERATOR is one capital letter immediately followed (no space) by a site label: digits
  (``X12``) or a parenthesised list of integers (``X(0,1)``, ``Z(-1)`` for the integer site -1,
  ``Z(5,)`` for the 1-tuple).  All labels of one model are integers or all are tuples.
  Only X, Y and Z are operators; any other capital letter followed by
  a site label is an error (so a coupling called ``J2`` must be written ``J_2`` or ``j2``).
  X, Y or Z alone, not followed by a site label, is an error (missing site), and so are
  lower-case look-alikes such as ``x0`` (write ``x_0`` for a coupling of that name).
* A NAME is any other identifier (``g``, ``J_2``, ``hx``); it becomes a :class:`sympy.Symbol`.
  A name made only of the letters X, Y, Z, I, ``_`` and digits that holds X, Y or Z (``X_0``,
  ``XZI``, ``ZZ``) is an error: it would read operators written another way as a coupling.
  The names ``w`` (the phase ``exp(i pi / N)``) and ``I``, ``E``, ``pi``, ``j``, ``nan``,
  ``inf``, ``infinity``, ``oo``, ``zoo`` are reserved.  Symbols are created without assumptions.
* A NUMBER is an integer, a decimal (``0.25``, ``1e-3``) or an imaginary literal (``2j``,
  ``0.5j``); ``(1+2j)`` is an ordinary parenthesised sum.  Integers and fractions stay exact
  (``3/4`` is ``Fraction(3, 4)``); ``2j`` is exactly ``2 i``.
* Juxtaposed coefficients are not multiplied (``2 g X0`` is an error: write ``2*g X0``).
* ``*`` multiplies coefficients only.  The operators of a term stand side by side, separated by
  white space, and the coefficient is separated from them by white space too: ``0.5 X0 Z1``.
  ``0.5*X0*Z1``, ``0.5 X0*Z1`` and ``0.5*X0`` are errors whose message shows that form.  (A
  ``*`` before or between operators would let text printed by other programs' operator classes
  pass unread; our syntax does not take that form.)
* Only ASCII characters are read: digits are ``0-9`` (``X٣`` and ``X²`` are errors; powers are
  written ``X0^2``).
* Limits, each reported with the line and column: parentheses and signs nest at most 64 deep
  in one coefficient, number literals have at most 1000 digits, exponents are at most 1000 in
  absolute value (also for a power built by repeated products, ``g*g*...``), an exact number
  in a coefficient has at most 3321 bits (under 1000 digits, so that the printed model reads
  back), a
  coefficient holds at most 1000 numbers and names and may not expand to more than 1000 terms,
  and a number or coefficient too small for double precision is refused rather than read as 0.
* ``w`` is the phase ``exp(i pi / N)`` (``w^2 = omega``).  As a factor of the whole coefficient
  (``g*w^3 X0 Z0``) it is kept as an exact phase of the operator string; inside parentheses it is
  the exact sympy number ``exp(i pi / N)``.  Printing uses it for strings whose normalisation
  (``g^N = 1``) needs an odd power of ``w`` (N even, ``X Z`` on one site).

A term without operators is a constant (a multiple of the identity); a model must have at
least one term with operators.  Factors on a repeated site
are multiplied exactly in the written order (``Z0 X0 = omega X0 Z0``).  ``#`` starts a comment
that runs to the end of the line; newlines are ordinary white space.
"""

from __future__ import annotations

import cmath
import unicodedata
from collections.abc import Sequence
from dataclasses import dataclass
from typing import TYPE_CHECKING, Any

from ..base.scalars import MAX_EXPANDED_TERMS, expanded_terms_bound, to_python_number
from .model import Model
from .printing import NOT_FINITE_NAMES, OPERATOR_LOOKALIKE
from .strings import WeylString, check_sites, check_states, make_string

if TYPE_CHECKING:
    import sympy
else:
    from ..base.lazy import sympy

__all__ = ["ModelSyntaxError", "parse_model"]

_RESERVED = {
    "I": "the imaginary unit is written 1j",
    "j": "the imaginary unit is written 1j",
    "E": "write the number itself",
    "pi": "write the number itself",
}
_MAX_EXPONENT = 1000
_SHOWN_WIDTH = 120
"""Longest part of a line an error message shows (a window around the column)."""
_MAX_DEPTH = 64
"""Deepest nesting of parentheses and signs inside one coefficient."""
_MAX_DIGITS = 1000
"""Longest number literal, in characters."""
_MAX_BITS = 3321
"""Largest exact number a coefficient may hold, in bits: 2^3321 < 10^1000, so that the printed
model reads back (number literals have at most ``_MAX_DIGITS`` digits), far within Python's
limit of 4300 digits for turning an integer into text."""
_MAX_FACTORS = 1000
"""Most numbers and names in one coefficient."""
_MAX_TERMS = MAX_EXPANDED_TERMS
_DIGITS = frozenset("0123456789")
_ACCEPTED_FORM = "0.5 X0 Z1"


def _is_digit(ch: str) -> bool:
    return ch in _DIGITS


def _all_digits(text: str) -> bool:
    return bool(text) and all(ch in _DIGITS for ch in text)


class ModelSyntaxError(ValueError):
    """Malformed model text.

    Attributes
    ----------
    text : str
        The whole input.
    line, column : int
        Where the problem is (both counted from 1).
    problem : str
        What is wrong, without the position.
    """

    def __init__(self, problem: str, text: str, offset: int) -> None:
        offset = max(0, min(offset, len(text)))
        line = text.count("\n", 0, offset) + 1
        start = text.rfind("\n", 0, offset) + 1
        end = text.find("\n", offset)
        end = len(text) if end < 0 else end
        column = offset - start + 1
        source = text[start:end]
        before = column - 1
        if len(source) > _SHOWN_WIDTH:  # show a window of a long line around the column
            lo = max(0, before - _SHOWN_WIDTH // 2)
            hi = lo + _SHOWN_WIDTH
            head, tail = ("..." if lo else ""), ("..." if hi < len(source) else "")
            source, before = head + source[lo:hi] + tail, before - lo + len(head)
        caret = "".join("\t" if ch == "\t" else " " for ch in source[:before]) + "^"
        self.text = text
        self.line = line
        self.column = column
        self.problem = problem
        super().__init__(f"{problem} (line {line}, column {column})\n{source}\n{caret}")


@dataclass(frozen=True)
class _Token:
    kind: str  # "number", "name", "operator", one of "+-*/^()" or "end"
    text: str
    offset: int
    site: Any = None  # operator tokens: the site label


def _is_name_char(ch: str) -> bool:
    return ch.isalnum() or ch == "_"


class _Tokenizer:
    def __init__(self, text: str) -> None:
        self.text = text
        self.pos = 0

    def error(self, problem: str, offset: int) -> ModelSyntaxError:
        return ModelSyntaxError(problem, self.text, offset)

    def tokens(self) -> list[_Token]:
        out = []
        text = self.text
        while True:
            self._skip_space()
            if self.pos >= len(text):
                out.append(_Token("end", "", len(text)))
                return out
            ch = text[self.pos]
            nxt = text[self.pos + 1] if self.pos + 1 < len(text) else ""
            if ch.isascii() and ch.isupper() and (_is_digit(nxt) or nxt == "("):
                out.append(self._operator())
            elif _is_digit(ch) or (ch == "." and _is_digit(nxt)):
                out.append(self._number())
            elif ch.isascii() and (ch.isalpha() or ch == "_"):
                out.append(self._name())
            elif ch in "+-*/^()":
                out.append(_Token(ch, ch, self.pos))
                self.pos += 1
            elif ch == "`":
                raise self.error(
                    "a name between backticks: the printer quotes symbol names that this syntax "
                    "cannot read (rename the symbol, e.g. to a lower-case identifier)",
                    self.pos,
                )
            elif ch == ",":
                raise self.error(
                    "unexpected ',' (commas only separate the parts of a site label)", self.pos
                )
            elif not ch.isascii():
                raise self._non_ascii(self.pos)
            else:
                raise self.error(f"unexpected character {ch!r}", self.pos)

    def _non_ascii(self, at: int) -> ModelSyntaxError:
        ch = self.text[at]
        name = unicodedata.name(ch, f"U+{ord(ch):04X}")
        hint = "the text syntax reads ASCII characters only"
        if ch.isdigit() or ch.isnumeric():
            hint = "digits must be ASCII 0-9 (powers are written with '^', as in X0^2 or g^2)"
        return self.error(f"unexpected character {ch!r} ({name}): {hint}", at)

    def _skip_space(self) -> None:
        text = self.text
        while self.pos < len(text):
            ch = text[self.pos]
            if ch == "#":
                end = text.find("\n", self.pos)
                self.pos = len(text) if end < 0 else end
            elif ch.isspace():
                self.pos += 1
            else:
                return

    def _digits(self) -> str:
        start = self.pos
        while self.pos < len(self.text) and _is_digit(self.text[self.pos]):
            self.pos += 1
        if self.pos - start > _MAX_DIGITS:
            raise self.error(f"number with more than {_MAX_DIGITS} digits", start)
        return self.text[start : self.pos]

    def _no_run_on(self, what: str, start: int) -> None:
        """Raise when a token is glued to a following letter, digit or dot."""
        if self.pos < len(self.text) and not self.text[self.pos].isascii():
            raise self._non_ascii(self.pos)
        if self.pos < len(self.text) and (
            _is_name_char(self.text[self.pos]) or self.text[self.pos] == "."
        ):
            raise self.error(
                f"{what} {self.text[start : self.pos]!r} runs into {self.text[self.pos]!r}; "
                "separate factors with a space and multiply coefficients with '*'",
                self.pos,
            )

    def _operator(self) -> _Token:
        start = self.pos
        letter = self.text[start]
        if letter not in "XYZ":
            raise self.error(
                f"unknown operator letter {letter!r}: operators are X, Y and Z "
                "(a coupling name may not be one capital letter followed by a digit)",
                start,
            )
        self.pos += 1
        if self.text[self.pos] == "(":
            site = self._tuple_site(letter)
        else:
            site = int(self._digits())
        self._no_run_on("operator", start)
        return _Token("operator", self.text[start : self.pos], start, site)

    def _tuple_site(self, letter: str) -> Any:
        open_at = self.pos
        self.pos += 1
        parts: list[int] = []
        trailing_comma = False
        while True:
            self._skip_inline_space()
            num_at = self.pos
            sign = 1
            if self.pos < len(self.text) and self.text[self.pos] in "+-":
                sign = -1 if self.text[self.pos] == "-" else 1
                self.pos += 1
            digits = self._digits()
            if not digits:
                if (
                    self.pos < len(self.text)
                    and self.text[self.pos] == ")"
                    and parts
                    and trailing_comma
                ):
                    self.pos += 1
                    return tuple(parts)
                raise self.error(
                    f"malformed site label after {letter}: expected an integer, "
                    f"as in {letter}(0,1)",
                    num_at,
                )
            parts.append(sign * int(digits))
            self._skip_inline_space()
            if self.pos >= len(self.text):
                raise self.error("unbalanced parentheses: this '(' is never closed", open_at)
            ch = self.text[self.pos]
            if ch == ")":
                self.pos += 1
                return parts[0] if len(parts) == 1 and not trailing_comma else tuple(parts)
            if ch != ",":
                raise self.error(
                    f"malformed site label after {letter}: expected ',' or ')', found {ch!r}",
                    self.pos,
                )
            trailing_comma = True
            self.pos += 1

    def _skip_inline_space(self) -> None:
        while self.pos < len(self.text) and self.text[self.pos] in " \t":
            self.pos += 1

    def _number(self) -> _Token:
        start = self.pos
        text = self.text
        self._digits()
        if self.pos < len(text) and text[self.pos] == ".":
            self.pos += 1
            self._digits()
        if self.pos < len(text) and text[self.pos] in "eE":
            mark = self.pos
            self.pos += 1
            if self.pos < len(text) and text[self.pos] in "+-":
                self.pos += 1
            if not self._digits():
                raise self.error("malformed number: digits expected after the exponent 'e'", mark)
        if self.pos < len(text) and text[self.pos] == "j":
            self.pos += 1
        self._no_run_on("number", start)
        return _Token("number", text[start : self.pos], start)

    def _name(self) -> _Token:
        start = self.pos
        while (
            self.pos < len(self.text)
            and _is_name_char(self.text[self.pos])
            and self.text[self.pos].isascii()
        ):
            self.pos += 1
        name = self.text[start : self.pos]
        if self.pos < len(self.text) and not self.text[self.pos].isascii():
            raise self._non_ascii(self.pos)
        if name in ("X", "Y", "Z"):
            raise self.error(
                f"missing site after operator {name}: write the site label right after the letter, "
                f"as in {name}3 or {name}(0,1)",
                start,
            )
        if name[0] in "xyz" and _all_digits(name[1:]):
            raise self.error(
                f"{name!r} looks like a lower-case operator: operators are upper case "
                f"({name[0].upper()}{name[1:]}); name a coupling differently, "
                f"e.g. {name[0]}_{name[1:]}",
                start,
            )
        if name.lower() in NOT_FINITE_NAMES:
            raise self.error(f"{name!r} is not a finite number; couplings must be finite", start)
        if name in _RESERVED:
            raise self.error(f"{name!r} is a reserved name: {_RESERVED[name]}", start)
        if set(name) <= OPERATOR_LOOKALIKE and set(name) & set("XYZ"):
            hint = "X0 Z1"
            if len(name) > 2 and name[0] in "XYZ" and name[1] == "_" and _all_digits(name[2:]):
                hint = f"{name[0]}{name[2:]}"
            raise self.error(
                f"{name!r} would be read as a coupling name, but it looks like operators "
                "written another way: an operator is its letter followed directly by the site, "
                f"as in {hint} (or X(0,1)), with the factors of a term separated by spaces; a "
                "coupling name needs a character other than X, Y, Z, I, '_' and digits",
                start,
            )
        return _Token("name", name, start)


@dataclass
class _Coefficient:
    value: Any  # sympy expression
    phase: int  # exponent of w carried by the term's string


class _Parser:
    def __init__(self, text: str, states: int, sites: set[Any] | None) -> None:
        self.text = text
        self.states = states
        self.sites = sites
        self.site_kinds: dict[bool, int] = {}
        self.tokens = _Tokenizer(text).tokens()
        self.i = 0
        self.depth = 0
        self.factors = 0  # numbers and names read in the current coefficient
        self.operators_seen = False  # some term has an operator factor
        self.w = sympy.exp(sympy.I * sympy.pi / states)

    # -- helpers ---------------------------------------------------------------------------------
    @property
    def tok(self) -> _Token:
        return self.tokens[self.i]

    def advance(self) -> _Token:
        t = self.tokens[self.i]
        self.i += 1
        return t

    def error(self, problem: str, offset: int) -> ModelSyntaxError:
        return ModelSyntaxError(problem, self.text, offset)

    def _describe(self, t: _Token) -> str:
        return "the end of the input" if t.kind == "end" else repr(t.text)

    def _starts_atom(self, t: _Token) -> bool:
        return t.kind in ("number", "name", "(")

    # -- model and terms -----------------------------------------------------------------------
    def parse(self) -> list[tuple[Any, WeylString]]:
        if self.tok.kind == "end":
            raise self.error("empty model: expected at least one term", 0)
        terms = []
        sign = 1
        sign_tok: _Token | None = None
        if self.tok.kind in ("+", "-"):
            sign_tok, sign = self._signs()
        while True:
            terms.append(self._term(sign, sign_tok))
            t = self.tok
            if t.kind == "end":
                if not self.operators_seen:
                    raise self.error(
                        "the model has no operator terms: every term is a constant (operators "
                        "are X, Y or Z followed directly by the site, as in "
                        f"{_ACCEPTED_FORM})",
                        0,
                    )
                return terms
            if t.kind in ("+", "-"):
                sign_tok, sign = self._signs()
                continue
            if t.kind == ")":
                raise self.error("unbalanced parentheses: ')' without a matching '('", t.offset)
            if t.kind in ("number", "name", "("):
                raise self.error(
                    f"unexpected {self._describe(t)} after the operators of a term: a coefficient "
                    "goes before the operators, and terms are joined with '+' or '-'",
                    t.offset,
                )
            raise self.error(f"unexpected {self._describe(t)} after a term", t.offset)

    def _signs(self) -> tuple[_Token, int]:
        """Read the sign joining two terms, and the sign written onto the term after it.

        ``a + -0.7 b`` and ``a - -0.7 b`` read as in mathematics (``a - 0.7 b``, ``a + 0.7 b``),
        as text that joins signed terms with ``" + "`` writes them. The second sign must touch
        what follows it (``-0.7``, ``-Z1``): ``a + + b`` or ``a + - b`` more likely lost a term
        and stays an error, as does a third sign in a row.
        """
        first = self.advance()
        sign = -1 if first.kind == "-" else 1
        nxt = self.tokens[self.i + 1] if self.tok.kind in ("+", "-") else None
        if nxt is not None and nxt.kind != "end" and nxt.offset == self.tok.offset + 1:
            second = self.advance()
            sign *= -1 if second.kind == "-" else 1
            if self.tok.kind in ("+", "-"):
                raise self.error(
                    "three signs in a row: write at most one sign after '+' or '-'",
                    self.tok.offset,
                )
            return second, sign
        return first, sign

    def _term(self, sign: int, sign_tok: _Token | None) -> tuple[Any, WeylString]:
        start = self.tok
        coef = _Coefficient(sympy.Integer(1), 0)
        has_coef = False
        if self._starts_atom(start):
            coef = self._coefficient()
            has_coef = True
        factors: list[tuple[Any, int, int]] = []
        extra_phase = 0
        while True:
            t = self.tok
            if t.kind == "*" and factors:
                raise self.error(
                    "'*' after an operator: the operators of a term are written side by side, "
                    f"separated by spaces, as in {_ACCEPTED_FORM}",
                    t.offset,
                )
            if t.kind != "operator":
                break
            site, a, b, y = self._factor()
            self.site_kinds.setdefault(isinstance(site, tuple), t.offset)
            if len(self.site_kinds) == 2:
                raise self.error(
                    "site labels mix integers and tuples; label all sites one way", t.offset
                )
            if self.sites is not None and site not in self.sites:
                raise self.error(f"site {site!r} is not in the given site list", t.offset)
            factors.append((site, a, b))
            self.operators_seen = True
            extra_phase += y
        if not has_coef and not factors:
            t = self.tok
            if t.kind == "end":
                at = sign_tok.offset if sign_tok is not None else t.offset
                what = f"dangling {sign_tok.text!r}" if sign_tok is not None else "missing term"
                raise self.error(f"{what}: expected a term after it", at)
            if t.kind == ")":
                raise self.error("unbalanced parentheses: ')' without a matching '('", t.offset)
            if t.kind in ("+", "-") and self.tokens[self.i + 1].kind == "end":
                raise self.error(f"dangling {t.text!r}: expected a term after it", t.offset)
            if t.kind in ("+", "-"):
                raise self.error(
                    f"expected a term, found {self._describe(t)}: was a term lost between the "
                    "signs? (a sign on the next coefficient touches it, as in '+ -0.7 Z1')",
                    t.offset,
                )
            raise self.error(f"expected a term, found {self._describe(t)}", t.offset)
        if has_coef and factors == [] and self.tok.kind in ("number", "name", "("):
            t = self.tok
            raise self.error(
                f"expected '*' or an operator before {self._describe(t)} "
                "(coefficients are multiplied with '*')",
                t.offset,
            )
        value = self._finish_value(sign * coef.value, start.offset)
        string = make_string(self.states, factors, coef.phase + extra_phase)
        return value, string

    def _factor(self) -> tuple[Any, int, int, int]:
        t = self.advance()
        letter = t.text[0]
        n = self.states
        power = 1
        if self.tok.kind == "^":
            caret = self.advance()
            power = self._integer_exponent(caret, f"the power of {t.text}")
            if not 1 <= power <= n - 1:
                raise self.error(
                    f"power {power} of {t.text} is out of range: "
                    f"powers must be 1..{n - 1} for N = {n}",
                    caret.offset + 1,
                )
        if letter == "Y":
            if n != 2:
                raise self.error(
                    f"Y is defined only for N = 2 (here N = {n}); write products of X and Z powers",
                    t.offset,
                )
            return t.site, 1, 1, 1  # Y = i X Z, i = w
        if letter == "X":
            return t.site, power, 0, 0
        return t.site, 0, power, 0

    def _integer_exponent(self, caret: _Token, what: str) -> int:
        sign = 1
        if self.tok.kind == "-":
            self.advance()
            sign = -1
        t = self.tok
        if t.kind != "number" or not _all_digits(t.text):
            raise self.error(
                f"expected an integer for {what} after '^', found {self._describe(t)}",
                t.offset if t.kind != "end" else caret.offset,
            )
        self.advance()
        value = sign * int(t.text)
        if abs(value) > _MAX_EXPONENT:
            raise self.error(f"exponent {value} is too large (at most {_MAX_EXPONENT})", t.offset)
        return value

    # -- coefficients --------------------------------------------------------------------------
    def _coefficient(self) -> _Coefficient:
        """``power {("*" | "/") power}``; powers of ``w`` become the string's phase."""
        value: Any = sympy.Integer(1)
        phase = 0
        self.factors = 0
        op = "*"
        op_tok: _Token | None = None
        while True:
            t = self.tok
            if t.kind == "name" and t.text == "w":
                self.advance()
                k = 1
                if self.tok.kind == "^":
                    caret = self.advance()
                    k = self._integer_exponent(caret, "the power of w")
                phase += k if op == "*" else -k
            else:
                factor = self._power()
                if op == "*":
                    value = value * factor
                    self._check_size(value, t.offset)
                else:
                    value = self._divide(value, factor, op_tok)
                    self._check_size(value, t.offset)
            if self.tok.kind in ("*", "/"):
                nxt = self.tokens[self.i + 1]
                if self.tok.kind == "*" and nxt.kind == "operator":
                    raise self.error(
                        f"'*' before the operator {nxt.text}: a coefficient and the operators of "
                        f"a term are separated by a space, not '*', as in {_ACCEPTED_FORM}",
                        self.tok.offset,
                    )
                op_tok = self.advance()
                op = op_tok.kind
                if not self._starts_atom(self.tok):
                    if self.tok.kind == "end":
                        raise self.error(
                            f"dangling {op!r}: expected a factor after it", op_tok.offset
                        )
                    raise self.error(
                        f"expected a number, name or '(' after {op!r}, "
                        f"found {self._describe(self.tok)}",
                        self.tok.offset,
                    )
                continue
            return _Coefficient(value, phase)

    def _divide(self, num: Any, den: Any, op_tok: _Token | None) -> Any:
        if den == 0:
            at = op_tok.offset if op_tok is not None else self.tok.offset
            raise self.error("division by zero", at)
        return num / den

    def _power(self) -> Any:
        base = self._atom()
        if self.tok.kind != "^":
            return base
        caret = self.advance()
        expo = self._exponent(caret)
        if base == 0 and expo < 0:
            raise self.error("division by zero: zero to a negative power", caret.offset)
        self._check_power(base, expo, caret.offset)
        result = base**expo
        self._check_size(result, caret.offset)
        if self.tok.kind == "^":
            raise self.error("repeated '^': use parentheses, as in (a^2)^3", self.tok.offset)
        return result

    def _exponent(self, caret: _Token) -> Any:
        if self.tok.kind != "(":
            return sympy.Integer(self._integer_exponent(caret, "an exponent"))
        open_tok = self.advance()
        num = self._integer_exponent(caret, "an exponent")
        den = 1
        if self.tok.kind == "/":
            slash = self.advance()
            den = self._integer_exponent(slash, "the denominator of an exponent")
            if den == 0:
                raise self.error("division by zero in an exponent", slash.offset)
        if self.tok.kind != ")":
            if self.tok.kind == "end":
                raise self.error(
                    "unbalanced parentheses: this '(' is never closed", open_tok.offset
                )
            raise self.error(
                f"expected ')' to close the exponent, found {self._describe(self.tok)}",
                self.tok.offset,
            )
        self.advance()
        return sympy.Rational(num, den)

    def _atom(self) -> Any:
        t = self.tok
        if t.kind in ("number", "name"):
            self.factors += 1
            if self.factors > _MAX_FACTORS:
                raise self.error(
                    f"more than {_MAX_FACTORS} numbers and names in one coefficient; "
                    "write a power (g^3) or a shorter product",
                    t.offset,
                )
        if t.kind == "number":
            self.advance()
            return self._number_value(t)
        if t.kind == "name":
            self.advance()
            if t.text == "w":  # at the top level, _coefficient has taken it already
                return self.w
            return sympy.Symbol(t.text)
        if t.kind == "(":
            self.advance()
            self._nest(t.offset)
            value = self._sum()
            self.depth -= 1
            if self.tok.kind != ")":
                if self.tok.kind in ("end", "operator"):
                    raise self.error("unbalanced parentheses: this '(' is never closed", t.offset)
                raise self.error(
                    f"expected ')' or an arithmetic operator, found {self._describe(self.tok)}",
                    self.tok.offset,
                )
            self.advance()
            return value
        if t.kind == "end":
            raise self.error("expected a number, name or '(' before the end of the input", t.offset)
        if t.kind == "operator":
            raise self.error(
                f"operator {t.text} inside a coefficient: operators go after the coefficient",
                t.offset,
            )
        if t.kind == ")":
            raise self.error("unbalanced parentheses: ')' without a matching '('", t.offset)
        raise self.error(f"expected a number, name or '(', found {self._describe(t)}", t.offset)

    def _sum(self) -> Any:
        value = self._product()
        while self.tok.kind in ("+", "-"):
            op = self.advance()
            rhs = self._product()
            value = value + rhs if op.kind == "+" else value - rhs
        return value

    def _product(self) -> Any:
        value = self._unary()
        while self.tok.kind in ("*", "/"):
            op = self.advance()
            rhs = self._unary()
            value = value * rhs if op.kind == "*" else self._divide(value, rhs, op)
            self._check_size(value, op.offset)
        return value

    def _unary(self) -> Any:
        if self.tok.kind in ("+", "-"):
            op = self.advance()
            self._nest(op.offset)
            value = self._unary()
            self.depth -= 1
            return -value if op.kind == "-" else value
        return self._power()

    def _nest(self, offset: int) -> None:
        self.depth += 1
        if self.depth > _MAX_DEPTH:
            raise self.error(
                f"parentheses and signs nested more than {_MAX_DEPTH} deep in one coefficient",
                offset,
            )

    def _check_power(self, base: Any, expo: Any, offset: int) -> None:
        """Refuse a power of an exact number whose result would exceed ``_MAX_BITS`` bits."""
        if isinstance(base, sympy.Rational) and base not in (0, 1, -1):
            bits = max(int(base.p).bit_length(), int(base.q).bit_length())
            if bits * abs(float(expo)) > _MAX_BITS:
                raise self.error(
                    f"the power is too large: about 2^{bits * abs(float(expo)):.0f}; exact "
                    f"numbers in a coefficient are limited to {_MAX_BITS} bits",
                    offset,
                )

    def _check_size(self, value: Any, offset: int) -> None:
        """Refuse a coefficient whose expansion would exceed ``_MAX_TERMS`` terms, an exact
        number beyond ``_MAX_BITS`` bits or a power of a name beyond ``_MAX_EXPONENT``
        (checked after every product, so ``g*g*...`` and ``(2^1000)*(2^1000)*...`` stop at
        the factor that crosses the limit)."""
        if expanded_terms_bound(value, _MAX_TERMS) > _MAX_TERMS:
            raise self.error(
                f"the coefficient would expand to more than {_MAX_TERMS} terms; "
                "write a smaller power or product",
                offset,
            )
        numbers = (value,) if value.is_Rational else value.atoms(sympy.Rational)
        for q in numbers:
            bits = max(int(q.p).bit_length(), int(q.q).bit_length())
            if bits > _MAX_BITS:
                raise self.error(
                    f"the coefficient's exact number has about 2^{bits} as numerator or "
                    f"denominator; exact numbers in a coefficient are limited to {_MAX_BITS} bits "
                    f"(the {_MAX_DIGITS} digits a number literal may have; write a decimal, "
                    "as in 1e300, for a large value)",
                    offset,
                )
        for p in () if value.is_Atom else value.atoms(sympy.Pow):
            if p.exp.is_Number and abs(p.exp) > _MAX_EXPONENT:
                raise self.error(
                    f"the coefficient holds the power {p}: exponents are at most "
                    f"{_MAX_EXPONENT} in absolute value",
                    offset,
                )

    def _number_value(self, t: _Token) -> Any:
        body = t.text[:-1] if t.text.endswith("j") else t.text
        if _all_digits(body):
            value: Any = sympy.Integer(int(body))
        else:
            as_float = float(body)
            if not cmath.isfinite(as_float):
                raise self.error(f"number {t.text} is not finite (overflow)", t.offset)
            if as_float == 0 and any(ch in "123456789" for ch in body.split("e")[0].split("E")[0]):
                raise self.error(
                    f"number {t.text} is too small for double precision and would become 0 "
                    "(the smallest is about 5e-324)",
                    t.offset,
                )
            value = sympy.Float(as_float)
        return value * sympy.I if t.text.endswith("j") else value

    def _finish_value(self, value: Any, offset: int) -> Any:
        """A symbol-free value as int, Fraction, float or complex; check it is finite."""
        if value.has(sympy.nan, sympy.zoo, sympy.oo, -sympy.oo):
            raise self.error("the coefficient is not finite", offset)
        try:
            number = to_python_number(value)
        except ValueError:
            raise self.error("the coefficient is not finite (overflow)", offset) from None
        if number == 0 and value != 0:
            raise self.error(
                "the coefficient is too small for double precision and would become 0 "
                "(the smallest is about 5e-324)",
                offset,
            )
        return number


def parse_model(text: str, states: int = 2, sites: Sequence[Any] | None = None) -> Model:
    """Read a model written in freeladder's text syntax (see the module docstring).

    Parameters
    ----------
    text : str
        For example ``"0.7 X0 Z1 Z2 + g X1 Z2 Z3 - 0.4 Y0 Y3"``.
    states : int
        N >= 2, the number of states per site.
    sites : sequence of site labels, optional
        The tensor-product order (first = most significant).  Defaults to the sorted labels
        that occur; when given, every site used must be in it.

    Returns
    -------
    Model
        Strings normalised to ``g^N = 1`` (leftover phases moved exactly into the couplings),
        repeated strings merged, terms without operators added to the constant.

    Raises
    ------
    ModelSyntaxError
        For malformed text; the message names the problem, the line and the column, and shows
        the line with a caret under the column.
    ValueError
        For ``states`` that is not an integer >= 2.

    Examples
    --------
    >>> m = parse_model("0.7 X0 Z1 Z2 + g X1 Z2 Z3 - 0.4 Y0 Y3")
    >>> len(m), m.sites
    (3, (0, 1, 2, 3))
    >>> print(parse_model("g Z0 X0 + 3/4 X1", states=3))
    g*w^2 X0 Z0 + 3/4 X1
    """
    if not isinstance(text, str):
        raise TypeError(f"parse_model needs a str, got {type(text).__name__}")
    n = check_states(states)
    site_list = None if sites is None else list(check_sites(sites))
    parsed = _Parser(text, n, None if site_list is None else set(site_list)).parse()
    return Model.from_terms(parsed, states=n, sites=site_list)
