"""Exact scalar kinds and their conversions, in one place.

Couplings and coefficients are ``int``, :class:`fractions.Fraction`, ``float``, ``complex`` or
sympy expressions.  Everything a user passes in goes through :func:`check_scalar` first, which
accepts numbers (``int``, ``float``, ``complex``, ``Fraction``, finite ``Decimal``, numpy
scalars and other :mod:`numbers` types) and sympy expressions only.  Text is never turned into
a value here: nothing in this module calls ``sympify``, ``parse_expr`` or ``eval``, and every
sympy value is built explicitly from numbers (``sympy.Integer``, ``sympy.Rational``,
``sympy.Float``), so a string can never run as code.

Exact kinds, as the modules that compute exactly use them:

* ``int`` and ``Fraction``: exact rationals;
* a pair ``(Fraction, Fraction)``: an exact Gaussian rational ``re + i im`` (floats are taken as
  the binary fractions they are);
* a sympy expression: symbolic, or an exact algebraic number.
"""

from __future__ import annotations

import cmath
import math
import numbers
from collections.abc import Iterable, Mapping
from decimal import Decimal
from fractions import Fraction
from typing import TYPE_CHECKING, Any

import numpy as np

if TYPE_CHECKING:
    import sympy
else:
    from .lazy import sympy

__all__ = [
    "MAX_EXPANDED_TERMS",
    "Scalar",
    "as_complex",
    "check_scalar",
    "exact_to_sympy",
    "exact_value",
    "expand_exact",
    "expanded_terms_bound",
    "is_exact_scalar",
    "is_symbolic",
    "substitute",
    "substitution_map",
    "to_fmpq",
    "to_python_number",
    "to_sympy",
]

Scalar = Any
"""int, Fraction, float, complex or a sympy expression."""

MAX_EXPANDED_TERMS = 1000
"""Largest number of terms a symbolic coupling may expand to (estimated before expanding)."""


def _not_finite() -> tuple[Any, ...]:
    """sympy's non-finite values (sympy is loaded when a sympy value is checked)."""
    return (sympy.nan, sympy.zoo, sympy.oo, -sympy.oo)


_HOW = (
    "pass a number (int, float, complex, fractions.Fraction) or a sympy expression "
    "such as sympy.Symbol('g')"
)


def _describe(value: Any) -> str:
    text = repr(value)
    return text if len(text) <= 60 else text[:57] + "..."


def check_scalar(value: Any, where: str, what: str = "coupling") -> Scalar:
    """Validate a value a user passed as a coupling or coefficient, and normalise its kind.

    Parameters
    ----------
    value : number or sympy expression
    where : str
        Where the value was given, for the message (``"term 3"``, ``"field"``).
    what : str
        What the value is, for the message.

    Returns
    -------
    int, Fraction, float, complex or sympy expression
        numpy scalars become Python numbers, a finite ``Decimal`` becomes the exact
        ``Fraction`` it is, symbol-free sympy numbers become Python numbers.

    Raises
    ------
    TypeError
        For strings (text is never parsed as a value), booleans, None, containers and any other
        non-number.
    ValueError
        For NaN, infinite values, and sympy numbers that overflow a float.

    Examples
    --------
    >>> check_scalar(Decimal("0.25"), "term 0")
    Fraction(1, 4)
    >>> check_scalar("2*g", "term 0")
    Traceback (most recent call last):
    ...
    TypeError: term 0: coupling '2*g' is text; pass a number ...
    """
    kind = type(value)
    if kind is int or kind is Fraction or (kind is float and math.isfinite(value)):
        return value  # the common cases, first
    if isinstance(value, (str, bytes)):
        raise TypeError(
            f"{where}: {what} {_describe(value)} is text; {_HOW} "
            "(text is never read as a value; write whole models with parse_model)"
        )
    if isinstance(value, (bool, np.bool_)):
        raise TypeError(f"{where}: {what} {value!r} is a boolean; {_HOW}")
    if isinstance(value, sympy.Basic):
        return _check_sympy(value, where, what)
    if isinstance(value, np.generic):
        value = value.item()
        if isinstance(value, (bool, str, bytes)):
            raise TypeError(f"{where}: {what} {value!r} is not a number; {_HOW}")
    if isinstance(value, Decimal):
        if not value.is_finite():
            raise ValueError(f"{where}: {what} {value!r} is not finite")
        return _exact_decimal(value, where, what)
    if not isinstance(value, numbers.Number):
        raise TypeError(
            f"{where}: {what} {_describe(value)} ({type(value).__name__}) is not a number; {_HOW}"
        )
    if isinstance(value, (int, Fraction)):
        return value
    if isinstance(value, numbers.Integral):
        return int(value)
    if isinstance(value, numbers.Rational):
        return Fraction(int(value.numerator), int(value.denominator))
    if isinstance(value, numbers.Real):
        value = float(value)
    elif isinstance(value, numbers.Complex):
        value = complex(value)
    if not cmath.isfinite(value):
        raise ValueError(f"{where}: {what} {value!r} is not finite")
    return value


def _exact_decimal(value: Decimal, where: str, what: str) -> Fraction | int:
    exponent = value.as_tuple().exponent
    assert isinstance(exponent, int)
    if abs(exponent) > 10_000:
        raise ValueError(f"{where}: {what} {value!r} has an exponent beyond 10^10000")
    q = Fraction(value)
    return q.numerator if q.denominator == 1 else q


def _check_sympy(value: sympy.Basic, where: str, what: str) -> Scalar:
    if not isinstance(value, sympy.Expr) or isinstance(value, sympy.MatrixBase):
        raise TypeError(
            f"{where}: {what} {_describe(value)} is a sympy {type(value).__name__}, "
            f"not a scalar expression; {_HOW}"
        )
    if value.has(*_not_finite()):
        raise ValueError(f"{where}: {what} {value} is not finite")
    if expanded_terms_bound(value, MAX_EXPANDED_TERMS) > MAX_EXPANDED_TERMS:
        raise ValueError(
            f"{where}: {what} {_describe(value)} would expand to more than "
            f"{MAX_EXPANDED_TERMS} terms; pass a smaller expression"
        )
    try:
        return to_python_number(value)
    except (OverflowError, ValueError, TypeError) as err:
        raise ValueError(
            f"{where}: {what} {_describe(value)} has no finite value ({err})"
        ) from None


def expanded_terms_bound(expr: Any, cap: int) -> int:
    """An upper estimate of the number of terms of ``sympy.expand(expr)``, at most ``cap + 1``.

    Sums add, products multiply, an integer power ``(a_1 + ... + a_k)^n`` counts
    ``binomial(n + k - 1, k - 1)`` (the number of its monomials); anything else counts one.
    Cheap: the expression tree is walked once, nothing is expanded.

    Examples
    --------
    >>> g, h = sympy.symbols("g h")
    >>> expanded_terms_bound((g + h) ** 3 * (g + 1), 1000)
    8
    """
    top = cap + 1
    if isinstance(expr, sympy.Add):
        return min(top, sum(expanded_terms_bound(a, cap) for a in expr.args))
    if isinstance(expr, sympy.Mul):
        out = 1
        for a in expr.args:
            out = min(top, out * expanded_terms_bound(a, cap))
        return out
    if isinstance(expr, sympy.Pow) and expr.exp.is_Integer:
        k = expanded_terms_bound(expr.base, cap)
        n = abs(int(expr.exp))
        if k == 1:
            return 1
        if n >= top:
            return top
        return min(top, math.comb(n + k - 1, k - 1))
    return 1


def is_symbolic(value: Any) -> bool:
    """True for a sympy expression that still has free symbols."""
    return isinstance(value, sympy.Basic) and bool(value.free_symbols)


def is_exact_scalar(value: Any) -> bool:
    """True for int, Fraction and sympy values (kept exact by the exact algebra)."""
    return (isinstance(value, (int, Fraction, sympy.Basic)) and not isinstance(value, bool)) or (
        isinstance(value, np.integer)
    )


def to_python_number(value: Scalar) -> Scalar:
    """A symbol-free sympy value as int, Fraction, float or complex; other values unchanged.

    Raises
    ------
    ValueError
        When the sympy value is not finite or overflows a float.
    """
    if not isinstance(value, sympy.Basic) or value.free_symbols:
        return value
    if value.is_Integer:
        return int(value)
    if value.is_Rational:
        return Fraction(int(value.p), int(value.q))  # type: ignore[attr-defined]
    if value.has(*_not_finite()):
        raise ValueError(f"{_describe(value)} is not finite")
    number = complex(value.evalf(30))
    if not cmath.isfinite(number):
        raise ValueError(f"{_describe(value)} overflows a float")
    return number.real if number.imag == 0 else number


def expand_exact(value: Scalar) -> Scalar:
    """Expand a sympy value; a symbol-free rational result becomes int or Fraction."""
    if not isinstance(value, sympy.Basic):
        return value
    out = sympy.expand(value)
    if not out.free_symbols:
        if out.is_Integer:
            return int(out)
        if out.is_Rational:
            return Fraction(int(out.p), int(out.q))  # type: ignore[attr-defined]
    return out


def to_sympy(value: Scalar) -> sympy.Expr:
    """A number as a sympy value, built explicitly (never by parsing text).

    Raises
    ------
    TypeError
        For anything that is not a number or a sympy expression (strings included).
    """
    if isinstance(value, sympy.Basic):
        return value  # type: ignore[return-value]
    if isinstance(value, np.generic):
        value = value.item()
    if isinstance(value, bool) or not isinstance(value, numbers.Number):
        raise TypeError(f"{_describe(value)} is not a number or a sympy expression")
    if isinstance(value, Decimal):
        value = Fraction(value)
    if isinstance(value, numbers.Integral):
        return sympy.Integer(int(value))
    if isinstance(value, Fraction):
        return sympy.Rational(value.numerator, value.denominator)
    if isinstance(value, float):
        return sympy.Float(value)
    z = complex(value)  # type: ignore[arg-type]
    if z.imag == 0:
        return sympy.Float(z.real)
    return sympy.Float(z.real) + sympy.I * sympy.Float(z.imag)  # type: ignore[no-any-return]


def exact_value(value: Scalar) -> Any:
    """A coupling as an exact value: int, Fraction, ``(Fraction, Fraction)`` or sympy expression.

    Floats and complex floats are taken as the binary fractions they are.

    Raises
    ------
    TypeError, ValueError
        As :func:`check_scalar`.
    """
    value = check_scalar(value, "value")
    if isinstance(value, sympy.Basic):
        return value
    if isinstance(value, complex):
        if value.imag != 0:
            return (Fraction(value.real), Fraction(value.imag))
        value = value.real
    if isinstance(value, float):
        return Fraction(value)
    return value


def exact_to_sympy(value: Any) -> sympy.Expr:
    """An exact value of :func:`exact_value` as a sympy number (or the expression itself)."""
    if isinstance(value, tuple):
        re, im = to_sympy(value[0]), to_sympy(value[1])
        return re + sympy.I * im  # type: ignore[no-any-return]
    return to_sympy(value)


def to_fmpq(value: Any) -> Any:
    """An int, Fraction or flint rational as a ``flint.fmpq``."""
    import flint

    if isinstance(value, (flint.fmpq, flint.fmpz)):
        return flint.fmpq(value)
    if hasattr(value, "denominator"):
        return flint.fmpq(int(value.numerator), int(value.denominator))
    return flint.fmpq(int(value))


def as_complex(value: Scalar, where: str) -> complex:
    """A symbol-free value as a complex float.

    Raises
    ------
    ValueError
        When the value has symbols or does not fit a float (an exact integer such as ``10**400``
        is fine for exact work but cannot be used by the floating-point numerics).
    """
    if is_symbolic(value):
        raise ValueError(f"{where}: {value} has free symbols; substitute values first")
    try:
        z = complex(to_python_number(value))
    except OverflowError:
        raise ValueError(
            f"{where}: {_describe(value)} is too large for floating-point numerics "
            "(exact computations such as the exclusion polynomial accept it)"
        ) from None
    if not cmath.isfinite(z):
        raise ValueError(f"{where}: {_describe(value)} is not finite")
    return z


def substitution_map(values: Mapping[Any, Any], symbols: Iterable[sympy.Symbol]) -> dict:
    """Check a substitution: keys are symbols (or their names), values checked numbers.

    Keys given as text are looked up among ``symbols`` by name (never parsed); values go through
    :func:`check_scalar`, so text is rejected.

    Raises
    ------
    TypeError
        For a non-mapping, a key that is neither a sympy symbol nor a name, or a value that is
        not a number or a sympy expression.
    ValueError
        For a name that is not among ``symbols``.
    """
    if not isinstance(values, Mapping):
        raise TypeError(
            f"substitution values must be a mapping {{symbol or name: number}}, "
            f"got {type(values).__name__}"
        )
    by_name = {str(s): s for s in symbols}
    out: dict[sympy.Symbol, Any] = {}
    for key, val in values.items():
        if isinstance(key, str):
            if key not in by_name:
                raise ValueError(
                    f"there is no symbol named {key!r}; the symbols are {sorted(by_name)}"
                )
            sym = by_name[key]
        elif isinstance(key, sympy.Symbol):
            sym = key
        else:
            raise TypeError(
                f"substitution key {_describe(key)} is not a sympy Symbol or a symbol name"
            )
        checked = check_scalar(val, f"value for {sym}", "substituted value")
        out[sym] = to_sympy(checked)
    return out


def substitute(value: Scalar, mapping: Mapping[sympy.Symbol, sympy.Expr]) -> Scalar:
    """Substitute a checked mapping (see :func:`substitution_map`) into one value.

    The result is expanded; a symbol-free result becomes int, Fraction, float or complex.

    Raises
    ------
    ValueError
        When the result is not finite (for example a division by zero).
    """
    if not isinstance(value, sympy.Basic):
        return value
    out = sympy.expand(value.xreplace(mapping))
    if out.has(*_not_finite()):
        raise ValueError(f"substituting gives a value that is not finite: {_describe(out)}")
    return to_python_number(out)
