"""Printing models back to freeladder's text syntax and to LaTeX.

Printing lives apart from the mathematics: nothing here changes a model.  The text form is the
one :func:`freeladder.parse_model` reads, so ``parse_model(str(m), states=m.states)`` gives ``m``
back (same strings, equal couplings) whenever the couplings are numbers or sympy expressions
built from symbols, numbers, ``I``, ``+ - * /``, integer powers, rational powers of numbers and
phases ``exp(i pi k / N)``, and symbols are named as the syntax allows (see
:func:`is_plain_name`).  Other sympy functions are printed in sympy's own notation and other
symbol names between backticks; the parser rejects both with a clear error rather than
misreading them.

The phase of a string that its letters do not carry (N even, ``X Z`` on one site: the
normalised string is ``w X Z``) is printed as a power of ``w = exp(i pi / N)``, so the round trip
stays exact.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from fractions import Fraction
from typing import TYPE_CHECKING, Any

from .strings import WeylString

if TYPE_CHECKING:
    import sympy
else:
    from ..base.lazy import sympy

__all__ = [
    "NOT_FINITE_NAMES",
    "RESERVED_NAMES",
    "coefficient_text",
    "format_number",
    "format_terms",
    "format_terms_latex",
    "is_plain_name",
    "letters_and_factor",
    "site_text",
]

_ATOM, _POWER, _PRODUCT, _SUM = 3, 2, 1, 0

RESERVED_NAMES = frozenset({"w", "I", "E", "pi", "j"})
"""Names the text syntax keeps for itself (``w`` is the phase ``exp(i pi / N)``)."""
NOT_FINITE_NAMES = frozenset({"nan", "inf", "infinity", "oo", "zoo"})

OPERATOR_LOOKALIKE = frozenset("XYZI_0123456789")
"""A name made only of these characters that holds X, Y or Z (``X_0``, ``XZI``) is refused by
the parser: it looks like operators written another way."""
"""Names (in any letter case) rejected as non-finite numbers."""


def is_plain_name(name: str) -> bool:
    """True when ``name`` reads back as a coupling name in the text syntax.

    A name is an ASCII identifier that is not reserved, not a non-finite number's name, and
    not one capital letter followed by a digit (that is an operator, like ``X3``), and not made
    only of X, Y, Z, I, ``_`` and digits (``X_0``, ``XZI``: operators written another way).
    """
    if not name or not (name.isascii() and name.isidentifier()):
        return False
    if name in RESERVED_NAMES or name.lower() in NOT_FINITE_NAMES or name in ("X", "Y", "Z"):
        return False
    if name[0] in "xyz" and name[1:].isdigit():
        return False  # looks like a lower-case operator
    if set(name) <= OPERATOR_LOOKALIKE and set(name) & set("XYZ"):
        return False  # operators written another way (X_0, XZI)
    return not (name[0].isupper() and len(name) > 1 and name[1].isdigit())


def letters_and_factor(g: WeylString) -> tuple[str, str, int]:
    """The letters of ``g`` (text, LaTeX) and the phase exponent they do not carry themselves."""
    n = g.states
    text, latex = [], []
    implicit = 0
    for site, a, b in g.factors:
        label = site_text(site)
        tex_label = _tex_label(site)
        if n == 2 and a == 1 and b == 1:
            text.append(f"Y{label}")
            latex.append(f"Y_{{{tex_label}}}")
            implicit += 1
            continue
        if a:
            text.append(f"X{label}" + (f"^{a}" if a != 1 else ""))
            latex.append(f"X_{{{tex_label}}}" + (f"^{{{a}}}" if a != 1 else ""))
        if b:
            text.append(f"Z{label}" + (f"^{b}" if b != 1 else ""))
            latex.append(f"Z_{{{tex_label}}}" + (f"^{{{b}}}" if b != 1 else ""))
    return " ".join(text), " ".join(latex), (g.phase - implicit) % (2 * n)


def site_text(site: Any) -> str:
    """A site label as the parser reads it: ``3``, ``(0,1)``, ``(-1)``, ``(5,)``."""
    if isinstance(site, tuple):
        inner = ",".join(str(int(v)) for v in site)
        return f"({inner},)" if len(site) == 1 else f"({inner})"
    value = int(site)
    return str(value) if value >= 0 else f"({value})"


def _tex_label(site: Any) -> str:
    if isinstance(site, tuple):
        return ",".join(str(v) for v in site)
    return str(site)


def _is_negative(c: Any) -> bool:
    if isinstance(c, sympy.Basic):
        return bool(c.could_extract_minus_sign())
    if isinstance(c, complex):
        return c.imag == 0 and c.real < 0
    return bool(c < 0)


def coefficient_text(c: Any, states: int | None = None) -> str:
    """A coefficient in the text syntax: ``3``, ``0.25``, ``3/4``, ``(1.0+2.0j)``, ``2*g``.

    ``states`` is needed only to print phases ``exp(i pi k / N)`` of sympy expressions as
    powers of ``w``.
    """
    if isinstance(c, bool):
        raise TypeError("booleans are not couplings")
    if isinstance(c, int):
        return str(c)
    if isinstance(c, Fraction):
        return f"{c.numerator}/{c.denominator}" if c.denominator != 1 else str(c.numerator)
    if isinstance(c, float):
        return repr(c)
    if isinstance(c, complex):
        if c.imag == 0:
            return repr(c.real)
        return "(" + repr(c.real) + ("+" if c.imag >= 0 else "-") + repr(abs(c.imag)) + "j)"
    if isinstance(c, sympy.Basic):
        return _expr(c, states)[0]
    return str(c)


def _wrap(part: tuple[str, int], level: int) -> str:
    """The text of ``part``, parenthesised when it binds more loosely than ``level``."""
    text, prec = part
    return f"({text})" if prec < level else text


def _expr(e: Any, states: int | None) -> tuple[str, int]:
    """Text and precedence of a sympy expression in the coefficient grammar."""
    if e.is_Symbol:
        name = str(e)
        # a name the parser cannot read is quoted with backticks, which it rejects clearly
        return (name if is_plain_name(name) else f"`{name}`"), _ATOM
    if e.is_Integer:
        return str(int(e)), (_ATOM if e >= 0 else _SUM)
    if e.is_Rational:
        return f"{int(e.p)}/{int(e.q)}", (_PRODUCT if e > 0 else _SUM)
    if e.is_Float:
        return repr(float(e)), (_ATOM if e >= 0 else _SUM)
    if e is sympy.I:
        return "1j", _ATOM
    phase = _phase_power(e, states)
    if phase is not None:
        return ("w" if phase == 1 else f"w^{phase}"), _POWER
    if e.is_Add:
        return _sum_text(e, states), _SUM
    if e.is_Mul:
        return _product_text(e, states)
    if e.is_Pow:
        return _power_text(e, states)
    return sympy.sstr(e).replace(" ", "").replace("**", "^"), _ATOM


def _phase_power(e: Any, states: int | None) -> int | None:
    """k when ``e = exp(i pi k / N)`` with integer k, else None."""
    if states is None or not isinstance(e, sympy.exp):
        return None
    q = sympy.simplify(e.args[0] / (sympy.I * sympy.pi))
    if not q.is_Rational:
        return None
    k = q * states
    return int(k) if k.is_Integer else None


def _sum_text(e: Any, states: int | None) -> str:
    out = ""
    for j, term in enumerate(sympy.Add.make_args(e)):
        if term.could_extract_minus_sign():
            body = _wrap(_expr(-term, states), _PRODUCT)
            out += "-" + body
        else:
            body = _wrap(_expr(term, states), _PRODUCT)
            out += ("" if j == 0 else "+") + body
    return out


def _product_text(e: Any, states: int | None) -> tuple[str, int]:
    if e.could_extract_minus_sign():
        return "-" + _wrap(_expr(-e, states), _PRODUCT), _SUM
    coeff, rest = e.as_coeff_Mul()
    if rest is sympy.I and (coeff.is_Integer or coeff.is_Float):
        return _expr(coeff, states)[0] + "j", _ATOM
    num: list[str] = []
    den: list[str] = []
    if coeff != 1:
        if coeff.is_Rational and not coeff.is_Integer:
            if coeff.p != 1:
                num.append(str(int(coeff.p)))
            den.append(str(int(coeff.q)))
        else:
            num.append(_wrap(_expr(coeff, states), _PRODUCT))
    for f in sympy.Mul.make_args(rest):
        if f.is_Pow and f.exp.is_Rational and f.exp < 0:
            den.append(_wrap(_expr(f.base ** (-f.exp), states), _POWER))
        else:
            num.append(_wrap(_expr(f, states), _PRODUCT))
    text = "*".join(num) if num else "1"
    for d in den:
        text += "/" + d
    return text, _PRODUCT


def _power_text(e: Any, states: int | None) -> tuple[str, int]:
    base, expo = e.base, e.exp
    if expo.is_Integer and expo < 0:
        return "1/" + _wrap(_expr(base ** (-expo), states), _POWER), _PRODUCT
    base_text = _wrap(_expr(base, states), _ATOM)
    if expo.is_Integer:
        return f"{base_text}^{int(expo)}", _POWER
    if expo.is_Rational:
        return f"{base_text}^({int(expo.p)}/{int(expo.q)})", _POWER
    return f"{base_text}^({sympy.sstr(expo).replace(' ', '').replace('**', '^')})", _POWER


def format_terms(terms: Sequence[tuple[Any, WeylString]], constant: Any = 0) -> str:
    """The terms ``c_j g_j`` (and a constant) as one line of text syntax."""
    pieces: list[tuple[bool, str]] = []
    states = terms[0][1].states if terms else None
    if constant != 0:
        pieces.append(_signed(constant, 0, "", states))
    for c, g in terms:
        text, _, extra = letters_and_factor(g)
        pieces.append(_signed(c, extra, text, g.states))
    if not pieces:
        return "0"
    out = ("-" if pieces[0][0] else "") + pieces[0][1]
    for neg, body in pieces[1:]:
        out += (" - " if neg else " + ") + body
    return out


def _signed(c: Any, phase: int, letters: str, states: int | None) -> tuple[bool, str]:
    """Sign and magnitude text of ``c * w^phase * letters``."""
    neg = _is_negative(c)
    mag = -c if neg else c
    coef = coefficient_text(mag, states)
    if isinstance(mag, sympy.Basic) and mag.is_Add:
        coef = f"({coef})"
    if phase:
        w = "w" if phase == 1 else f"w^{phase}"
        coef = w if coef == "1" else f"{coef}*{w}"
    if letters and coef in ("1", "1.0"):
        return neg, letters
    return neg, f"{coef} {letters}".strip()


def _real_text(x: float, digits: int) -> str:
    if x == 0:
        return "0"
    if not math.isfinite(x):
        return str(x)
    text = f"{x:.{digits}g}"
    return text.replace("e+", "e")


def format_number(value: Any, digits: int = 12) -> str:
    """One number format for display: reals to ``digits`` significant digits, complex ``a+bi``.

    Integers and fractions print exactly; floats print with at most ``digits`` significant
    digits, so rounding noise disappears (``0.16`` for ``0.16000000000000003``); a complex
    number prints as ``a+bi`` (``1.5-2i``, ``2i``, ``-i``), its real form when the imaginary
    part is zero.  Symbol-free sympy numbers print as the Python number they equal; expressions
    with symbols print in sympy's notation with floats rounded the same way.  This is the format
    for reading; the text syntax (:func:`format_terms`) keeps every digit so that it reads back
    exactly.

    Examples
    --------
    >>> format_number(0.1 + 0.06)
    '0.16'
    >>> format_number(1.5 - 2j), format_number(1j), format_number(Fraction(3, 4))
    ('1.5-2i', 'i', '3/4')
    """
    if isinstance(value, bool):
        return str(value)
    if isinstance(value, sympy.Basic):
        if value.free_symbols or not value.is_number:
            return sympy.sstr(value, full_prec=False)
        if value.is_Integer:
            return str(int(value))
        if value.is_Rational:
            value = Fraction(int(value.p), int(value.q))  # type: ignore[attr-defined]
        else:
            value = complex(value.evalf(digits + 3))
    if isinstance(value, int):
        return str(value)
    if isinstance(value, Fraction):
        return str(value.numerator) if value.denominator == 1 else str(value)
    if hasattr(value, "item") and not isinstance(value, (float, complex)):
        value = value.item()  # numpy scalars
    z = complex(value)
    if z.imag == 0:
        return _real_text(z.real, digits)
    imag = _real_text(abs(z.imag), digits)
    imag = "i" if imag == "1" else imag + "i"
    sign = "-" if z.imag < 0 else "+"
    if z.real == 0:
        return imag if sign == "+" else "-" + imag
    return _real_text(z.real, digits) + sign + imag


def format_terms_latex(terms: Sequence[tuple[Any, WeylString]], constant: Any = 0) -> str:
    """The terms as a LaTeX expression (without surrounding dollars)."""
    pieces = []
    if constant != 0:
        pieces.append(_latex_number(constant))
    for c, g in terms:
        _, tex, extra = letters_and_factor(g)
        coef = _latex_number(c)
        if coef in ("1", "1.0"):
            coef = ""
        elif coef in ("-1", "-1.0"):
            coef = "-"
        elif (isinstance(c, sympy.Basic) and c.is_Add) or _is_complex_sum(c):
            coef = rf"\left({coef}\right)"
        if extra:
            coef += rf" e^{{{extra} i \pi / {g.states}}}"
        pieces.append(f"-{tex}" if coef == "-" else f"{coef} {tex}".strip())
    return " + ".join(pieces).replace("+ -", "- ") if pieces else "0"


def _is_complex_sum(c: Any) -> bool:
    return isinstance(c, complex) and c.real != 0 and c.imag != 0


def _latex_number(c: Any) -> str:
    if isinstance(c, sympy.Basic):
        return sympy.latex(c, full_prec=False)
    if isinstance(c, Fraction):
        return sympy.latex(sympy.Rational(c.numerator, c.denominator))
    text = format_number(c)
    if "e" in text:
        mant, _, e10 = text.partition("e")
        return rf"{mant} \times 10^{{{int(e10)}}}"
    return text
