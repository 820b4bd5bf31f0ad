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

import cmath
import math
from collections.abc import Sequence
from fractions import Fraction
from typing import TYPE_CHECKING, Any

from ..base.display import number_latex, number_text, phase_fold, phase_latex, phase_text
from ..base.interrupt import polled
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

    ``states`` is needed only to print phases ``exp(i pi k / N)`` as powers of ``w``; a
    complex coupling that is a decimal times a power of ``w`` prints as ``1.2*w`` when that
    text reads back as exactly the same number.
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
        phased = _phase_multiple(c, states) if states else None
        if phased is not None:
            return phased
        return "(" + repr(c.real) + ("+" if c.imag >= 0 else "-") + repr(abs(c.imag)) + "j)"
    if isinstance(c, sympy.Basic):
        return _expr(c, states)[0]
    return str(c)


def _phase_multiple(c: complex, states: int, extra: int = 0) -> str | None:
    """``r*w^(k + extra)`` (shortest decimal r) when the parser reads it back as exactly ``c``
    on a string whose letters carry ``w^extra``.

    The parser turns ``1.2*w X0`` into the complex coupling ``1.2 exp(i pi / N)``; printing it
    back as ``1.2*w`` rather than ``(0.6000000000000001+1.0392304845413263j)`` keeps the text
    readable, and a candidate is accepted only when it gives the same float bits.
    """
    from .model import times_phase  # model imports this module
    from .strings import unit_phase

    for k in range(2 * states):
        r = c * unit_phase(k, states).conjugate()
        imaginary = abs(r.real) < 1e-12 * abs(c)
        if abs(r.imag) > 1e-12 * abs(c) and not imaginary:
            continue
        part = r.imag if imaginary else r.real
        for digits in range(1, 18):
            text = f"{part:.{digits}g}"
            if "e" in text or "inf" in text or "nan" in text:
                break
            value: complex | int | float = int(text) if text.lstrip("-").isdigit() else float(text)
            if imaginary:
                value, text = complex(0, value), text + "j"
            if times_phase(value, k, states) == c:
                total = (k + extra) % (2 * states)
                if total == 0:
                    return text
                w = "w" if total == 1 else f"w^{total}"
                return w if text == "1" else ("-" + w if text == "-1" else f"{text}*{w}")
    return None


def _split_phase(c: Any, states: int) -> tuple[Any, int]:
    """``(r, k)`` with ``c = r w^k`` to rounding and r real, for display; else ``(c, 0)``."""
    if not isinstance(c, complex) or c.imag == 0:
        return c, 0
    k = cmath.phase(c) * states / math.pi
    near = round(k)
    if abs(k - near) > 1e-12 * states:
        return c, 0
    return abs(c), near % (2 * states)


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


def format_terms(
    terms: Sequence[tuple[Any, WeylString]],
    constant: Any = 0,
    *,
    display: bool = False,
    keep_types: bool = False,
) -> str:
    """The terms ``c_j g_j`` (and a constant) as one line of text.

    By default in the text syntax, every digit kept so that it reads back exactly; with
    ``keep_types=True`` a float coupling 1.0 is written ``1.0`` (not left out), so that the
    text also reads back as the same Python types.  With ``display=True`` the text is for
    reading: numbers as :func:`freeladder.base.display.number_text` shows them (``1.8`` for
    ``1.7999999999999998``, ``i`` for the imaginary unit).
    """
    pieces: list[tuple[bool, str]] = []
    states = terms[0][1].states if terms else None
    if constant != 0:
        pieces.append(_signed(constant, 0, "", states, display, keep_types))
    for c, g in polled(terms):
        text, _, extra = letters_and_factor(g)
        pieces.append(_signed(c, extra, text, g.states, display, keep_types))
    if not pieces:
        return "0"
    head = ("-" if pieces[0][0] else "") + pieces[0][1]
    return head + "".join((" - " if neg else " + ") + body for neg, body in pieces[1:])


def _signed(
    c: Any,
    phase: int,
    letters: str,
    states: int | None,
    display: bool = False,
    keep_types: bool = False,
) -> tuple[bool, str]:
    """Sign and magnitude text of ``c * w^phase * letters``."""
    if display and states:
        c, k = _split_phase(c, states)
        phase = (phase + k) % (2 * states)
        power = phase_fold(Fraction(phase, states))
        if power is not None:
            c, phase = _times_unit(c, power), 0
    neg = _is_negative(c)
    mag = -c if neg else c
    if display:
        coef = number_text(mag)
        body = coef.lstrip("-")
        if "+" in body or "-" in body.replace("e-", "") or " " in body:
            coef = f"({coef})"
    else:
        phased = None
        if isinstance(mag, complex) and mag.imag and states:
            phased = _phase_multiple(mag, states, phase)
        if phased is not None:
            coef, phase = phased, 0  # the string's own phase is part of the text
        else:
            coef = coefficient_text(mag, states)
        if coef.startswith("-"):
            neg, coef = not neg, coef[1:]
    if isinstance(mag, sympy.Basic) and mag.is_Add:
        coef = f"({coef})"
    if phase:
        w = "w" if phase == 1 else f"w^{phase}"
        if display:
            w = phase_text(Fraction(phase, states or 1))
        coef = w if coef == "1" else f"{coef}{' ' if display else '*'}{w}"
    if letters and (coef == "1" or (coef == "1.0" and not keep_types)):
        return neg, letters
    return neg, f"{coef} {letters}".strip()


format_number = number_text
"""The display's number format (:func:`freeladder.base.display.number_text`), kept under the
name this module gave it first."""


def format_terms_latex(terms: Sequence[tuple[Any, WeylString]], constant: Any = 0) -> str:
    """The terms as a LaTeX expression (without surrounding dollars).

    Numbers follow :func:`freeladder.base.display.number_latex` (``i`` for the imaginary unit,
    exact fractions and phases, no float noise).  A phase ``w^k`` that the letters do not carry
    is folded into the coefficient when it is ``±1`` or ``±i`` (an N = 2 string with ``w^2``
    prints ``-0.28``, not a power of ``e``) and written ``e^{k\\pi i/N}`` otherwise.
    """
    pieces = []
    if constant != 0:
        pieces.append(number_latex(constant))
    for c, g in terms:
        _, tex, extra = letters_and_factor(g)
        c, k = _split_phase(c, g.states)
        q = Fraction(extra + k, g.states)
        power = phase_fold(q)
        if power is not None:
            c = _times_unit(c, power)
        coef = number_latex(c)
        if coef == "1":
            coef = ""
        elif coef == "-1":
            coef = "-"
        elif _is_sum(coef):
            coef = rf"\left({coef}\right)"
        if power is None:
            coef = f"{coef} {phase_latex(q)}".strip() if coef != "-" else f"-{phase_latex(q)}"
        pieces.append(f"-{tex}" if coef == "-" else (f"{coef} {tex}".strip() or "1"))
    return " + ".join(pieces).replace("+ -", "- ") if pieces else "0"


def _times_unit(c: Any, power: int) -> Any:
    """``c i^power`` (exactly for exact couplings)."""
    if power % 2 == 0:
        return c if power == 0 else -c
    unit = sympy.I if power == 1 else -sympy.I
    if isinstance(c, (int, Fraction)):
        return sympy.Rational(c.numerator, c.denominator) * unit
    if isinstance(c, sympy.Basic):
        return c * unit
    return complex(c) * (1j if power == 1 else -1j)


def _is_sum(tex: str) -> bool:
    """True when a LaTeX number has a sum in it (``1 - 2i``, ``a + b``): parenthesise it."""
    body = tex.lstrip("-")
    return " + " in body or " - " in body or (tex.startswith("-") and "+" in body)
