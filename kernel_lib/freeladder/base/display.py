"""One display for every number freeladder shows: text, HTML and LaTeX.

Every ``__str__``, ``_repr_html_`` and ``_repr_latex_`` of the library, the command line, the
worked calculation and the notebook panels format numbers here, so one value reads the same
everywhere.  The conventions:

* **Digits.** Floats show :data:`DIGITS` significant digits, so rounding noise disappears
  (``0.6 * 3`` shows ``1.8``, not ``1.7999999999999998``); error bounds show two.
* **Imaginary unit.** ``i`` in every format: ``1.5-2i`` (text), ``1.5 - 2i`` (LaTeX),
  ``1.5−2i`` (HTML).  Python's ``j`` appears only where text must read back as a number: in
  code meant to be run, and in the model text syntax (``str(m)``, which writes a complex
  coupling as a power of ``w`` where it can: ``1.2*w``, ``0.3j*w^2``).
* **Tiny parts.** A real or imaginary part smaller than ``10**-DIGITS`` times the modulus is
  below the shown precision and is not shown (``1+1e-17i`` shows ``1``); a part that is
  exactly zero is never shown.
* **Exact values stay exact.** Integers and fractions print exactly (``3/4``,
  ``\\frac{3}{4}``); exact roots of unity print as such (``exp(2 pi i/3)``, ``e^{2\\pi i/3}``),
  and a root of unity that is ``±1`` or ``±i`` folds into the sign (an N = 2 phase ``w^2``
  turns ``0.28`` into ``-0.28``).  An exact integer or fraction too long to read (more than
  :data:`LONG_BITS` bits) shows its leading digits, marked ``~`` in text.

The renderings of whole results (spectra, levels, exact spectra, verification reports) are here
too.  They read only the results' attributes, so this module imports nothing from the rest of
freeladder and every result's ``__str__`` / ``_repr_html_`` delegates to it.
"""

from __future__ import annotations

import html
import math
import re
from fractions import Fraction
from typing import TYPE_CHECKING, Any

if TYPE_CHECKING:
    import sympy
else:
    from .lazy import sympy

__all__ = [
    "DIGITS",
    "LONG_BITS",
    "REPORT_COLUMNS",
    "aligned_sum",
    "bound_text",
    "check_cells",
    "digits_for",
    "dimension_text",
    "exact_spectrum_html",
    "exact_spectrum_repr",
    "level_table_repr",
    "log_text",
    "match_text",
    "number_html",
    "number_latex",
    "number_text",
    "phase_fold",
    "phase_latex",
    "phase_text",
    "polynomial_latex",
    "polynomial_text",
    "report_head",
    "report_html",
    "report_text",
    "spectrum_html",
    "spectrum_repr",
    "spectrum_text",
    "spectrum_warning",
    "tex_escape",
    "text_table",
    "verdict_html",
    "verdict_markdown",
    "verdict_text",
]

DIGITS = 12
"""Significant digits of every float shown (error bounds show two)."""

LONG_BITS = 130
"""Exact integers and fractions longer than this (numerator plus denominator bits) are shown by
their leading digits."""

_MINUS = "\u2212"


def _printer() -> Any:
    """sympy's text printer with ``i`` for the imaginary unit and rounded floats (built on
    first use, so that importing freeladder does not import sympy)."""
    global _PRINTER
    if _PRINTER is None:
        from sympy.printing.str import StrPrinter

        class Printer(StrPrinter):  # type: ignore[misc]
            def _print_ImaginaryUnit(self, expr: Any) -> str:  # noqa: N802 (sympy's naming)
                return "i"

            def _print_Float(self, expr: Any) -> str:  # noqa: N802
                return _real(float(expr), DIGITS)

        _PRINTER = Printer({"full_prec": False})
    return _PRINTER


_PRINTER: Any = None


def _real(x: float, digits: int) -> str:
    """A real float with ``digits`` significant digits: ``1.8``, ``2.5e-7``, ``inf``."""
    if x == 0:
        return "0"
    if not math.isfinite(x):
        return str(x)
    text = f"{x:.{digits}g}"
    if "e" in text:
        mant, _, e10 = text.partition("e")
        text = f"{mant}e{int(e10)}"
    return text


def _parts(z: complex, digits: int) -> tuple[float, float]:
    """Real and imaginary part, each dropped when it is below the shown precision."""
    size = abs(z)
    if not math.isfinite(size):
        return z.real, z.imag
    cut = size * 10.0 ** (-digits)
    re_, im = z.real, z.imag
    if abs(im) < cut:
        im = 0.0
    if abs(re_) < cut:
        re_ = 0.0
    return re_, im


def _plain(value: Any) -> Any:
    """int, Fraction, float, complex, or a sympy expression with symbols (kept)."""
    if isinstance(value, bool):
        return int(value)
    if hasattr(value, "item") and not isinstance(value, (int, float, complex, sympy.Basic)):
        value = value.item()  # numpy scalars
    if isinstance(value, sympy.Basic):
        if value.free_symbols or not value.is_number:
            return value
        if value.is_Integer:
            return int(value)
        if value.is_Rational:
            return Fraction(int(value.p), int(value.q))  # type: ignore[attr-defined]
        return value  # an exact irrational number: the callers look for roots of unity
    return value


def _unity(value: sympy.Basic) -> tuple[Fraction, Fraction] | None:
    """``(r, q)`` when ``value = r exp(i pi q)`` with rationals r and q (0 <= q < 2), else None."""
    coeff, rest = value.as_coeff_Mul()
    if not coeff.is_Rational:
        return None
    if rest is sympy.I:
        q = sympy.Rational(1, 2)
    elif isinstance(rest, sympy.exp):
        q = sympy.simplify(rest.args[0] / (sympy.I * sympy.pi))
        if not q.is_Rational:
            return None
    else:
        return None
    qf = Fraction(int(q.p), int(q.q)) % 2
    return Fraction(int(coeff.p), int(coeff.q)), qf


def phase_fold(q: Fraction) -> int | None:
    """``exp(i pi q)`` as a power of ``i`` (0, 1, 2, 3) when it is one, else None."""
    q = q % 2
    return int(q * 2) if (q * 2).denominator == 1 else None


def phase_text(q: Fraction) -> str:
    """``exp(i pi q)`` in text: ``1``, ``i``, ``-1``, ``-i`` or ``exp(2 pi i/3)``."""
    q = q % 2
    power = phase_fold(q)
    if power is not None:
        return ("1", "i", "-1", "-i")[power]
    num = "" if q.numerator == 1 else f"{q.numerator} "
    return f"exp({num}pi i/{q.denominator})"


def phase_latex(q: Fraction) -> str:
    """``exp(i pi q)`` in LaTeX: ``1``, ``i``, ``-1``, ``-i`` or ``e^{2\\pi i/3}``."""
    q = q % 2
    power = phase_fold(q)
    if power is not None:
        return ("1", "i", "-1", "-i")[power]
    num = "" if q.numerator == 1 else str(q.numerator)
    return f"e^{{{num}\\pi i/{q.denominator}}}"


def _long(value: Fraction) -> bool:
    return value.numerator.bit_length() + value.denominator.bit_length() > LONG_BITS


def _leading(value: Fraction, digits: int) -> tuple[str, int]:
    """Mantissa text and power of ten of a long exact number (never through a float)."""
    sign = "-" if value < 0 else ""
    value = abs(value)
    e10 = len(str(value.numerator)) - len(str(value.denominator))
    if value < Fraction(10) ** e10:
        e10 -= 1
    scaled = value / Fraction(10) ** e10  # in [1, 10)
    mant = round(scaled * 10 ** (digits - 1))
    if mant >= 10**digits:
        mant //= 10
        e10 += 1
    text = str(mant)
    text = (text[0] + "." + text[1:]).rstrip("0").rstrip(".")
    return sign + text, e10


def number_text(value: Any, digits: int = DIGITS) -> str:
    """A number for reading, as text: ``1.8``, ``3/4``, ``1.5-2i``, ``-i``, ``exp(pi i/3)``.

    Parameters
    ----------
    value : int, Fraction, float, complex, numpy or sympy number
        Symbol-free sympy values print exactly when rational or a rational times a root of
        unity, else as the float they equal; expressions with symbols print in sympy's
        notation with ``i`` and rounded floats.
    digits : int
        Significant digits of floats.

    Returns
    -------
    str
        The text; it is for reading (the model text syntax keeps every digit instead).

    Examples
    --------
    >>> number_text(0.6 * 3), number_text(1.5 - 2j), number_text(Fraction(3, 4))
    ('1.8', '1.5-2i', '3/4')
    >>> number_text(complex(0.5, 1e-17)), number_text(2.5e-7)
    ('0.5', '2.5e-7')
    """
    value = _plain(value)
    if isinstance(value, int):
        return str(value) if value.bit_length() <= LONG_BITS else _long_text(Fraction(value))
    if isinstance(value, Fraction):
        if _long(value):
            return _long_text(value)
        return str(value.numerator) if value.denominator == 1 else str(value)
    if isinstance(value, sympy.Basic):
        if value.free_symbols or not value.is_number:
            return str(_printer().doprint(value))
        unit = _unity(value)
        if unit is not None:
            r, q = unit
            return _scaled_phase(number_text(r, digits), q, phase_text)
        value = complex(value.evalf(digits + 3))
    re_, im = _parts(complex(value), digits)
    if im == 0:
        return _real(re_, digits)
    imag = _real(abs(im), digits)
    imag = "i" if imag == "1" else imag + "i"
    sign = "-" if im < 0 else "+"
    if re_ == 0:
        return imag if sign == "+" else "-" + imag
    return _real(re_, digits) + sign + imag


def _long_text(value: Fraction) -> str:
    mant, e10 = _leading(value, 7)
    return f"~{mant}e{e10}"


def _scaled_phase(r_text: str, q: Fraction, phase: Any) -> str:
    """``r`` times ``exp(i pi q)``, with ±1 and ±i folded into the sign."""
    power = phase_fold(q)
    neg = r_text.startswith("-")
    mag = r_text.lstrip("-")
    if power is not None:
        if power >= 2:
            neg = not neg
        if power % 2 == 0:
            return ("-" if neg else "") + mag
        if mag == "1":
            body = "i"
        elif "/" in mag:  # text: (3/4)i, never 3/4i
            body = f"({mag})i"
        else:
            body = mag + "i"
        return ("-" if neg else "") + body
    body = phase(q) if mag == "1" else f"{mag} {phase(q)}"
    return ("-" if neg else "") + body


def number_latex(value: Any, digits: int = DIGITS) -> str:
    """A number in LaTeX math: ``\\frac{3}{4}``, ``1.5 - 2i``, ``2.5 \\times 10^{-7}``.

    Same rules as :func:`number_text`; the imaginary unit is ``i``, never ``j``, and no
    ``\\approx`` appears inside a number (a long exact number shows its leading digits).

    Examples
    --------
    >>> number_latex(Fraction(-3, 4)), number_latex(1.5 - 2j), number_latex(2.5e-7)
    ('-\\\\frac{3}{4}', '1.5 - 2i', '2.5 \\\\times 10^{-7}')
    """
    value = _plain(value)
    if isinstance(value, int) and value.bit_length() <= LONG_BITS:
        return str(value)
    if isinstance(value, (int, Fraction)):
        value = Fraction(value)
        if _long(value):
            mant, e10 = _leading(value, 7)
            return rf"{mant} \times 10^{{{e10}}}"
        if value.denominator == 1:
            return str(value.numerator)
        sign = "-" if value < 0 else ""
        return rf"{sign}\frac{{{abs(value.numerator)}}}{{{value.denominator}}}"
    if isinstance(value, sympy.Basic):
        if value.free_symbols or not value.is_number:
            return str(sympy.latex(value, full_prec=False))
        unit = _unity(value)
        if unit is not None:
            r, q = unit
            return _scaled_phase(number_latex(r, digits), q, phase_latex)
        value = complex(value.evalf(digits + 3))
    re_, im = _parts(complex(value), digits)
    if im == 0:
        return _real_latex(re_, digits)
    imag = _real_latex(abs(im), digits)
    imag = "i" if imag == "1" else imag + "i"
    if "times" in imag:
        imag = "(" + imag[:-1] + ")i"
    if re_ == 0:
        return imag if im > 0 else "-" + imag
    return _real_latex(re_, digits) + (" - " if im < 0 else " + ") + imag


def _real_latex(x: float, digits: int) -> str:
    text = _real(x, digits)
    if "e" in text and "inf" not in text:
        mant, _, e10 = text.partition("e")
        return rf"{mant} \times 10^{{{e10}}}"
    return text.replace("inf", r"\infty")


def number_html(value: Any, digits: int = DIGITS) -> str:
    """A number as HTML (escaped): the text form with a true minus sign and powers of ten
    written ``2.5×10<sup>−7</sup>``.

    Examples
    --------
    >>> number_html(2.5e-7), number_html(1 - 1j)
    ('2.5×10<sup>−7</sup>', '1−i')
    """
    text = number_text(value, digits)
    if re.fullmatch(r"~?[-+]?[\d.]+e-?\d+i?", text):
        tilde = "~" if text.startswith("~") else ""
        mant, _, e10 = text.lstrip("~").partition("e")
        unit = "i" if e10.endswith("i") else ""
        text = f"{tilde}{mant}\u00d710<sup>{e10.rstrip('i')}</sup>{unit}"
        return text.replace("-", _MINUS)
    return html.escape(text).replace("-", _MINUS)


def digits_for(value: Any, bound: float) -> int:
    """Significant digits that show ``value`` down to its error ``bound`` (2 to 15; DIGITS
    when the bound is zero, unknown or not finite)."""
    size = abs(complex(value))
    if not (math.isfinite(bound) and bound > 0 and size > 0 and math.isfinite(size)):
        return DIGITS
    digits = math.floor(math.log10(size)) - math.floor(math.log10(bound)) + 1
    return max(2, min(15, digits))


def dimension_text(dim: int) -> str:
    """A Hilbert-space dimension in a few characters: ``1024`` up to a million, then ``2^40``
    (or ``3^30``) for a power of a small base, else ``about 10^k``.

    Never converts a huge integer to decimal (Python refuses past 4300 digits, and a chain of
    10^4 sites has dimension 2^10000).

    Examples
    --------
    >>> dimension_text(4096), dimension_text(2**20001), dimension_text(3**30)
    ('4096', '2^20001', '3^30')
    """
    if dim < 10**6:
        return str(dim)
    for base in range(2, 11):
        exponent = round((dim.bit_length() - 1) / math.log2(base))
        for e in (exponent - 1, exponent, exponent + 1):
            if e > 0 and base**e == dim:
                return f"{base}^{e}"
    return f"about 10^{int((dim.bit_length() - 1) * math.log10(2))}"


def bound_text(bound: float) -> str:
    """An error bound or tolerance: two significant digits, ``none`` when not finite."""
    if not math.isfinite(bound):
        return "none"
    return _real(bound, 2)


_TEX_SPECIAL = {
    "\\": r"\textbackslash{}",
    "&": r"\&",
    "%": r"\%",
    "$": r"\$",
    "#": r"\#",
    "_": r"\_",
    "{": r"\{",
    "}": r"\}",
    "~": r"\textasciitilde{}",
    "^": r"\textasciicircum{}",
    "<": r"\textless{}",
    ">": r"\textgreater{}",
    "[": "{[}",
    "]": "{]}",
}


def tex_escape(text: str) -> str:
    """Plain text for a LaTeX text-mode paragraph or table cell (special characters escaped)."""
    return "".join(_TEX_SPECIAL.get(ch, ch) for ch in text)


def text_table(
    rows: list[tuple[str, ...]], clip: int = 48, whole_last: bool = True, indent: str = "  "
) -> list[str]:
    """Rows as aligned text lines (first row the header).

    Cells longer than ``clip`` characters are cut with ``...``; the last column is printed
    whole when ``whole_last``.
    """
    if not rows:
        return []
    width = len(rows[0])
    clipped = [
        tuple(
            t if len(t) <= clip or (whole_last and k == width - 1) else t[: clip - 3] + "..."
            for k, t in enumerate(r)
        )
        for r in rows
    ]
    widths = [max(len(r[k]) for r in clipped) for k in range(width)]
    return [
        (indent + "  ".join(t.ljust(w) for t, w in zip(r, widths, strict=True))).rstrip()
        for r in clipped
    ]


def log_text(log_value: float, digits: int = 6) -> str:
    """``exp(log_value)`` as decimal text, also far outside float64 (``1.234e-400``)."""
    if not math.isfinite(log_value):
        return "0" if log_value < 0 else "inf"
    ten = log_value / math.log(10.0)
    exponent = math.floor(ten)
    mantissa = 10.0 ** (ten - exponent)
    if mantissa >= 10.0 - 0.5 * 10.0 ** (1 - digits):
        mantissa, exponent = mantissa / 10.0, exponent + 1
    return f"{mantissa:.{digits}g}e{exponent}"


# -- long formulas ------------------------------------------------------------------------------
def aligned_sum(pieces: list[str], lhs: str = "", width: int = 60) -> str:
    """Signed LaTeX terms joined into a sum, broken into an ``aligned`` block before a term that
    would take a line past about ``width`` printed characters (MathJax and LaTeX display
    formulas do not break themselves).  ``lhs`` (``H``, say) goes before ``=``.
    """
    lines: list[str] = []
    for piece in pieces:
        signed = f"- {piece[1:]}" if piece.startswith("-") else f"+ {piece}"
        if lines and _printed_width(f"{lines[-1]} {signed}") <= width:
            lines[-1] += f" {signed}"
        else:
            lines.append(signed if lines else piece)
    head = f"{lhs} = " if lhs else ""
    if len(lines) <= 1:
        return head + (lines[0] if lines else "0")
    body = " \\\\ & ".join(lines)
    eq = f"{lhs} = {{}} & " if lhs else "& "
    return rf"\begin{{aligned}} {eq}{body} \end{{aligned}}"


def _printed_width(tex: str) -> int:
    """Roughly how many characters a LaTeX formula prints (commands and braces dropped)."""
    return len(re.sub(r"\\(left|right|frac|times|pi)|[{}_^\\]", "", tex))


# -- polynomials -----------------------------------------------------------------------------
def _shown_orders(degree: int) -> list[int]:
    return list(range(degree + 1)) if degree <= 8 else [0, 1, 2, 3, -1, degree]


def _join_signed(texts: list[str]) -> str:
    """Join ``coefficient monomial`` pieces, turning ``+ -`` into ``-``."""
    out = texts[0]
    for t in texts[1:]:
        out += " - " + t[1:] if t.startswith("-") else " + " + t
    return out


def polynomial_text(poly: Any) -> str:
    """``ExclusionPolynomial(degree=2, N=2, exact, chain reach 2: 1 - 3.48 y + 1.6656 y^2)``."""
    pieces = []
    for s in _shown_orders(poly.degree):
        if s < 0:
            pieces.append("...")
            continue
        text = number_text(poly.coefficients[s])
        if len(text) > 60:
            text = text[:57] + "..."
        if s and (" " in text.lstrip("-") or "+" in text.lstrip("-") or "-" in text[1:]):
            text = f"({text})"
        pieces.append(text if s == 0 else f"{text} y^{s}")
    chain = f", chain reach {poly._chain[1]}" if poly._chain is not None else ""
    return (
        f"ExclusionPolynomial(degree={poly.degree}, N={poly.states}, {poly.kind}{chain}: "
        + _join_signed(pieces)
        + ")"
    )


def polynomial_latex(poly: Any) -> str:
    """``P(y) = 1 - 3.48 y + 1.6656 y^{2}`` (orders past 8 elided with ``\\cdots``)."""
    pieces = []
    for s in _shown_orders(poly.degree):
        if s < 0:
            pieces.append(r"\cdots")
            continue
        coef = number_latex(poly.coefficients[s])
        body = coef.lstrip("-")
        if s and (" + " in body or " - " in body):
            coef = rf"\left({coef}\right)"
        mono = "" if s == 0 else ("y" if s == 1 else f"y^{{{s}}}")
        if s and coef in ("1", "-1"):
            pieces.append(coef[:-1] + mono)
        else:
            pieces.append(f"{coef} {mono}".strip())
    return "P(y) = " + _join_signed(pieces)


# -- spectra ---------------------------------------------------------------------------------------
_TINY = 2.2250738585072014e-308  # smallest normal float64


def _eta_item(sp: Any, k: int, digits: int = DIGITS) -> str:
    """Quasi-energy ``k`` (from its logarithm where it lies below float64)."""
    e, log_e = sp.quasi_energies[k], float(sp.log_quasi_energies[k])
    if abs(e) < _TINY and math.isfinite(log_e):
        return log_text(log_e)
    return number_text(e, digits)


def _eta_list(sp: Any, count: int) -> str:
    parts = [_eta_item(sp, k) for k in range(min(count, len(sp)))]
    return ", ".join(parts) + (", ..." if len(sp) > count else "")


def spectrum_warning(sp: Any) -> str:
    """The loud mark of an unguaranteed spectrum ('' when a theorem guarantees it)."""
    if sp.provenance.guaranteed:
        return ""
    reason = sp.provenance.guarantee.removeprefix("NOT GUARANTEED: ")
    return f"NOT GUARANTEED (these numbers need not be the spectrum): {reason}"


def _spectrum_rows(sp: Any) -> list[tuple[str, str]]:
    prov = sp.provenance
    rows = []
    if sp.complete:
        rows.append(("ground energy", number_text(sp.ground_energy)))
    log_gap = sp.log_gap
    small = math.isfinite(log_gap) and log_gap < math.log(_TINY)
    rows.append(("gap", log_text(log_gap) if small else number_text(sp.gap)))
    rows.append(
        (
            "degeneracy",
            str(sp.degeneracy) if sp.degeneracy else f"unknown ({sp.degeneracy_reason})",
        )
    )
    rows.append(("method", f"{prov.method}: {prov.path}"))
    if prov.sector is not None:
        rows.append(("sector", str(prov.sector.get("summary", ""))))
    rows.append(("guarantee", prov.guarantee if prov.guaranteed else "NOT GUARANTEED (above)"))
    rows.append(("largest error bound", f"{bound_text(prov.max_error_bound)} ({prov.bounds})"))
    note = getattr(sp, "exceptional_note", "")
    if note:
        rows.append(("exceptional point", note.removeprefix("exceptional point: ")))
    if prov.sum_rules:
        rows.append(
            (
                "sum rules (relative residuals)",
                ", ".join(f"{k}: {bound_text(v)}" for k, v in prov.sum_rules.items()),
            )
        )
    return rows


def spectrum_repr(sp: Any) -> str:
    """One line: ``FreeSpectrum(N=2, 3 quasi-energies [...], method=..., max error ...)``."""
    mark = "" if sp.guaranteed else "NOT GUARANTEED, "
    prov = sp.provenance
    kind = "proved bound" if prov.finder.get("rigorous") else "estimate"
    return (
        f"FreeSpectrum({mark}N={sp.states}, {len(sp)} quasi-energies [{_eta_list(sp, 6)}], "
        f"method={prov.method}, max error {bound_text(prov.max_error_bound)} ({kind}))"
    )


def spectrum_text(sp: Any) -> str:
    """The spectrum as text: the quasi-energies, then one line per summary field."""
    lines = []
    if not sp.guaranteed:
        lines.append(spectrum_warning(sp))
    lines.append(
        f"Free spectrum: N = {sp.states}, {len(sp)} quasi-energies"
        f"{'' if sp.complete else ' (lowest only)'}: eta = {_eta_list(sp, 12)}"
    )
    lines += [f"  {a}: {b}" for a, b in _spectrum_rows(sp)]
    return "\n".join(lines)


def spectrum_html(sp: Any) -> str:
    """The spectrum as HTML: a table of quasi-energies with bounds, then the summary."""
    from .htmltable import field_table, grid_table, is_number_text

    shown = min(len(sp), 12)
    eta = grid_table(
        ("k", "eta_k", "bound"),
        [
            (str(k + 1), _eta_item(sp, k), f"\u00b1 {bound_text(sp.error_bounds[k])}")
            for k in range(shown)
        ],
        numeric=(0, 1, 2),
    )
    more = f"<p><small>... and {len(sp) - shown} more</small></p>" if len(sp) > shown else ""
    rows = _spectrum_rows(sp)
    numbers = field_table([(a, b) for a, b in rows if is_number_text(b)])
    notes = field_table([(a, b) for a, b in rows if not is_number_text(b)])
    warning = ""
    if not sp.guaranteed:
        warning = (
            f"<p style='color:#b00020;font-weight:bold'>{html.escape(spectrum_warning(sp))}</p>"
        )
    return (
        f"<div>{warning}<b>Free spectrum</b>: N = {sp.states}, {len(sp)} quasi-energies"
        f"{'' if sp.complete else ' (lowest only)'}{eta}{more}{numbers}{notes}</div>"
    )


def level_table_repr(levels: Any) -> str:
    """``LevelTable(10 levels, multiplicity 2: -3.2, -1.2, ...)``."""
    shown = ", ".join(number_text(e) for e in levels.energies[:6])
    more = ", ..." if len(levels) > 6 else ""
    return f"LevelTable({len(levels)} levels, multiplicity {levels.multiplicity}: {shown}{more})"


def exact_spectrum_repr(ed: Any) -> str:
    """One line for an exact-diagonalization result: its levels with multiplicities."""
    shown = ", ".join(
        f"{number_text(v)} (x{int(d)})"
        for v, d in zip(ed.levels[:8], ed.multiplicities[:8], strict=True)
    )
    more = f", ... {len(ed.levels) - 8} more" if len(ed.levels) > 8 else ""
    part = "all" if ed.complete else f"lowest {len(ed.eigenvalues)}"
    return (
        f"ExactSpectrum(dimension={ed.dimension}, {part} eigenvalues, {ed.method}, "
        f"levels: {shown}{more}; clustering tolerance {bound_text(ed.tolerance)}, "
        f"error estimate {bound_text(ed.error_estimate)})"
    )


def exact_spectrum_html(ed: Any) -> str:
    """An exact-diagonalization result as HTML: a table of levels and multiplicities."""
    from .htmltable import grid_table

    table = grid_table(
        ("level", "multiplicity"),
        [
            (number_text(v), str(int(d)))
            for v, d in zip(ed.levels[:30], ed.multiplicities[:30], strict=True)
        ],
        numeric=(0, 1),
    )
    more = (
        f"<p><small>... and {len(ed.levels) - 30} more levels</small></p>"
        if len(ed.levels) > 30
        else ""
    )
    part = "all" if ed.complete else f"the lowest {len(ed.eigenvalues)}"
    return (
        f"<div><b>Exact spectrum</b>: {part} of {ed.dimension} eigenvalues "
        f"({html.escape(ed.method)}); levels clustered within {bound_text(ed.tolerance)}; "
        f"error estimate {bound_text(ed.error_estimate)}{table}{more}</div>"
    )


def match_text(match: Any) -> str:
    """A comparison of free and exact levels in one paragraph."""
    head = "levels match" if match.ok else "levels DO NOT match"
    text = (
        f"{head}: {match.matched} eigenvalues matched, largest distance "
        f"{bound_text(match.distance)} (tolerance {bound_text(match.tolerance)}); {match.compared}"
    )
    for side, rows in (("free", match.unmatched_free), ("exact", match.unmatched_exact)):
        if rows:
            shown = ", ".join(f"{number_text(v)} (x{c})" for v, c in rows[:6])
            more = f", ... {len(rows) - 6} more" if len(rows) > 6 else ""
            text += f"; unmatched {side}: {shown}{more}"
    return text


# -- verdicts ----------------------------------------------------------------------------------
def _components(v: Any) -> str:
    n = len(v.components)
    return f"{len(v.model)} terms, {n} component{'s' if n != 1 else ''}"


_WITNESS_SHOWN = 12
"""How many witness terms a verdict's display writes out (a longer witness is counted)."""


def verdict_text(v: Any) -> str:
    """A verdict as text: the kind, its reasons, the witness and the guarantee."""
    lines = [f"Verdict: {v.kind}"]
    lines += [f"  - {r}" for r in v.reasons]
    if v.witness:
        lines.append(f"  witness: {v.witness_text()}")
    lines.append(f"  single polynomial gives the spectrum: {v.guarantee}")
    return "\n".join(lines)


def verdict_markdown(v: Any) -> str:
    """A verdict as markdown: the kind in bold, the reasons and witness terms as lists."""
    lines = [f"**Verdict: `{v.kind}`** ({_components(v)})", ""]
    lines += [f"* {r}" for r in v.reasons]
    if v.witness:
        lines += ["", "Witness terms:", ""]
        lines += [f"* `[{j}]` `{text}`" for j, text in v.witness_terms(_WITNESS_SHOWN)]
        if len(v.witness) > _WITNESS_SHOWN:
            lines.append(f"* ... ({len(v.witness)} terms in all)")
    lines += ["", f"Single polynomial gives the spectrum: {v.guarantee}"]
    return "\n".join(lines)


def verdict_html(v: Any) -> str:
    """A verdict as HTML: the kind, the reasons, a table of witness terms, the guarantee."""
    esc = html.escape
    parts = [
        f"<div><b>Verdict: <code>{esc(v.kind)}</code></b> ({_components(v)})",
        "<ul>" + "".join(f"<li>{esc(r)}</li>" for r in v.reasons) + "</ul>",
    ]
    if v.witness:
        rows = "".join(
            f"<tr><td>{j}</td><td><code>{esc(text)}</code></td></tr>"
            for j, text in v.witness_terms(_WITNESS_SHOWN)
        )
        if len(v.witness) > _WITNESS_SHOWN:
            rows += f"<tr><td colspan='2'>... ({len(v.witness)} terms in all)</td></tr>"
        parts.append(f"<table><tr><th>term</th><th>witness</th></tr>{rows}</table>")
    head = "proven" if v.guarantee.proven else "NOT GUARANTEED"
    parts.append(
        f"<p>Single polynomial gives the spectrum: <b>{head}</b>: {esc(v.guarantee.reason)}</p>"
    )
    parts.append("</div>")
    return "".join(parts)


# -- verification reports ----------------------------------------------------------------------
REPORT_COLUMNS = ("check", "method", "tolerance", "value", "status", "time", "reference")
"""The columns of a verification report, in every format."""


def report_head(report: Any) -> str:
    """``ok: every check that ran passed`` or ``NOT ok: ...`` with the problems."""
    if report.ok:
        return "ok: every check that ran passed"
    return "NOT ok: " + "; ".join(report.problems)


def check_cells(check: Any) -> tuple[str, ...]:
    """One check's cells, in the order of :data:`REPORT_COLUMNS`."""
    ran = check.passed is not None and check.value == check.value
    tolerance = ""
    if check.passed is not None:
        tolerance = "exact" if check.tolerance == 0 else bound_text(check.tolerance)
    return (
        check.name,
        check.method,
        tolerance,
        number_text(check.value, 3) if ran else "",
        check.status,
        "<0.01 s" if check.seconds < 0.01 else f"{check.seconds:.2f} s",
        check.reference,
    )


def report_text(report: Any) -> str:
    """A verification report as text: the head line, a table of checks, details and notes."""
    lines = [f"verification of {report.model_text}: {report_head(report)}"]
    if report.verdict:
        lines.append(f"verdict: {report.verdict}")
    lines += text_table([REPORT_COLUMNS] + [check_cells(c) for c in report.checks])
    for c in report.checks:
        lines.append(f"  {c.name} ({c.status}): {c.detail}")
        if c.traceback:
            lines.extend("    " + t for t in c.traceback.rstrip().splitlines())
    lines.extend(f"  note: {n}" for n in report.notes)
    return "\n".join(lines)


def report_html(report: Any) -> str:
    """A verification report as HTML: one row per check, its status coloured."""
    left = "text-align:left;vertical-align:top"
    rows = []
    for c in report.checks:
        colour = {True: "#1a7f37", False: "#cf222e", None: "#6e7781"}[c.passed]
        cells = []
        for k, t in enumerate(check_cells(c)):
            style = left + (";white-space:nowrap" if k in (2, 3, 5) else "")
            if k == 4:
                style += f";color:{colour};font-weight:bold"
            text = f"<small>{html.escape(t)}</small>" if k == 6 else html.escape(t)
            cells.append(f'<td style="{style}">{text}</td>')
        detail = html.escape(c.detail)
        if c.traceback:
            detail += f"<pre>{html.escape(c.traceback)}</pre>"
        cells.append(f'<td style="{left}">{detail}</td>')
        rows.append("<tr>" + "".join(cells) + "</tr>")
    head = "".join(f'<th style="{left}">{h}</th>' for h in (*REPORT_COLUMNS, "detail"))
    notes = "".join(f"<p><small>{html.escape(n)}</small></p>" for n in report.notes)
    verdict = f"<p>Verdict: {html.escape(report.verdict)}</p>" if report.verdict else ""
    return (
        f"<p><b>Verification</b> of <code>{html.escape(report.model_text)}</code>: "
        f"{html.escape(report_head(report))}</p>{verdict}"
        f"<table><thead><tr>{head}</tr></thead><tbody>{''.join(rows)}</tbody></table>{notes}"
    )
