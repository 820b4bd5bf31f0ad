"""Printing models back to freeladder's text syntax and to LaTeX.

Printing lives apart from the mathematics: nothing here changes a model.  The text form is the
one :func:`freeladder.parse_model` reads, so ``parse_model(str(m), states=m.states)`` gives ``m``
back.
"""

from __future__ import annotations

from collections.abc import Sequence
from fractions import Fraction
from typing import Any

import sympy

from .strings import OpString, unit_phase


def letters_and_factor(g: OpString) -> tuple[str, str, int]:
    """The letters of ``g`` (text, LaTeX) and the phase exponent they do not carry themselves."""
    n = g.states
    text, latex = [], []
    implicit = 0
    for site, a, b in g.factors:
        label = _label(site)
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


def _label(site: Any) -> str:
    if isinstance(site, tuple):
        return "(" + ",".join(str(v) for v in site) + ")"
    return str(site)


def _tex_label(site: Any) -> str:
    if isinstance(site, tuple):
        return ",".join(str(v) for v in site)
    return str(site)


def _fold(c: Any, exponent: int, n: int) -> Any:
    k = exponent % (2 * n)
    if k == 0:
        return c
    if isinstance(c, sympy.Basic):
        return c * sympy.exp(sympy.I * sympy.pi * k / n)
    return complex(c) * unit_phase(k, n)


def _is_negative(c: Any) -> bool:
    if isinstance(c, sympy.Basic):
        return bool(c.could_extract_minus_sign())
    if isinstance(c, complex):
        return c.imag == 0 and c.real < 0
    return bool(c < 0)


def coefficient_text(c: Any) -> str:
    """A coefficient in the text syntax: ``3``, ``0.25``, ``3/4``, ``(1+2j)``, ``g``, ``2*g``."""
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
        return sympy.sstr(c).replace(" ", "").replace("**", "^")
    return str(c)


def format_terms(terms: Sequence[tuple[Any, OpString]], constant: Any = 0) -> str:
    """The terms ``c_j g_j`` (and a constant) as one line of text syntax."""
    pieces: list[tuple[bool, str]] = []
    if constant != 0:
        pieces.append(_signed(constant, ""))
    for c, g in terms:
        text, _, extra = letters_and_factor(g)
        pieces.append(_signed(_fold(c, extra, g.states), text))
    if not pieces:
        return "0"
    out = ("-" if pieces[0][0] else "") + pieces[0][1]
    for neg, body in pieces[1:]:
        out += (" - " if neg else " + ") + body
    return out


def _signed(c: Any, letters: str) -> tuple[bool, str]:
    neg = _is_negative(c)
    mag = -c if neg else c
    coef = coefficient_text(mag)
    if isinstance(mag, sympy.Basic) and mag.is_Add:
        coef = f"({coef})"
    if letters and coef in ("1", "1.0"):
        return neg, letters
    return neg, f"{coef} {letters}".strip()


def format_terms_latex(terms: Sequence[tuple[Any, OpString]], constant: Any = 0) -> str:
    """The terms as a LaTeX expression (without surrounding dollars)."""
    pieces = []
    if constant != 0:
        pieces.append(sympy.latex(sympy.nsimplify(constant) if not isinstance(constant, float) else constant))
    for c, g in terms:
        _, tex, extra = letters_and_factor(g)
        folded = _fold(c, extra, g.states)
        coef = sympy.latex(folded) if isinstance(folded, sympy.Basic) else coefficient_text(folded)
        if coef in ("1", "1.0"):
            coef = ""
        elif coef in ("-1", "-1.0"):
            coef = "-"
        pieces.append(f"{coef} {tex}".strip())
    return " + ".join(pieces).replace("+ -", "- ") if pieces else "0"
