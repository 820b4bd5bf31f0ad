"""Powers of a primitive root of unity in the integral basis of its cyclotomic field.

``zeta = exp(2 pi i / L)`` has the cyclotomic polynomial ``Phi_L`` (degree ``d = phi(L)``,
Euler's totient) as minimal polynomial over the rationals, so ``1, zeta, ..., zeta^{d-1}`` is a
basis of ``Q(zeta)`` and every power ``zeta^k`` has integer coordinates in it.  Exact phases of
operator strings (``omega = exp(2 pi i / N)`` and ``w = exp(i pi / N)``) are multiplied in this
basis.

References
----------
S. Lang, *Algebra*, 3rd ed. (Springer, 2002), chapter VI, section 3.
"""

from __future__ import annotations

import cmath
import functools
import math
from fractions import Fraction
from typing import TYPE_CHECKING, Any

import numpy as np

from ..base.frozen import readonly_array
from ..base.scalars import exact_value

if TYPE_CHECKING:
    import sympy
else:
    from ..base.lazy import sympy

__all__ = ["CyclotomicField", "Element", "power_table"]


@functools.lru_cache(maxsize=32)
def power_table(order: int, count: int) -> np.ndarray:
    """Integer coordinates of ``zeta^k``, ``k = 0 .. count - 1``, ``zeta = exp(2 pi i / order)``.

    Parameters
    ----------
    order : int
        L >= 1.
    count : int
        Number of powers.

    Returns
    -------
    numpy.ndarray of int64, shape ``(count, phi(order))``
        Row k holds the coefficients of ``x^k mod Phi_L(x)`` in ascending powers.  The array is
        cached and read-only.

    Examples
    --------
    >>> power_table(4, 4).tolist()  # i^0, i^1, i^2, i^3 in the basis 1, i
    [[1, 0], [0, 1], [-1, 0], [0, -1]]
    """
    x = sympy.Symbol("x")
    phi = [int(c) for c in reversed(sympy.Poly(sympy.cyclotomic_poly(order, x), x).all_coeffs())]
    d = len(phi) - 1
    low = np.array(phi[:d], dtype=np.int64)
    table = np.zeros((count, d), dtype=np.int64)
    cur = np.zeros(d, dtype=np.int64)
    cur[0] = 1
    for k in range(count):
        table[k] = cur
        carry = cur[-1]
        cur = np.concatenate([[0], cur[:-1]]) - carry * low
    return readonly_array(table)  # kept by lru_cache: no one may change it


Element = tuple[Fraction, ...]
"""An element of ``Q(zeta)``: rational coordinates in the basis ``1, zeta, ..., zeta^{d-1}``."""


class CyclotomicField:
    """Exact arithmetic in ``Q(zeta_L)``, ``zeta = exp(2 pi i / L)``; elements are Fraction tuples.

    Parameters
    ----------
    order : int
        L.  ``i`` is in the field when 4 divides L; ``omega = exp(2 pi i / N)`` when N divides L.
    """

    def __init__(self, order: int) -> None:
        table = power_table(order, 2 * order)
        self.order = int(order)
        self.d = int(table.shape[1])
        self._powers = [tuple(Fraction(int(v)) for v in row) for row in table]
        self.zero: Element = tuple(Fraction(0) for _ in range(self.d))
        self.one: Element = self._powers[0]

    def root(self, k: int) -> Element:
        """``zeta^k``."""
        return self._powers[k % self.order]

    def rational(self, q: Fraction | int) -> Element:
        """The rational number q."""
        return (Fraction(q),) + self.zero[1:]

    def add(self, a: Element, b: Element) -> Element:
        """``a + b``."""
        return tuple(x + y for x, y in zip(a, b, strict=True))

    def scale(self, a: Element, q: Fraction | int) -> Element:
        """``q a`` for a rational q."""
        return tuple(x * q for x in a)

    def mul(self, a: Element, b: Element) -> Element:
        """``a b``."""
        if self.d == 1:
            return (a[0] * b[0],)
        out = [Fraction(0)] * self.d
        for i, x in enumerate(a):
            for j, y in enumerate(b):
                if x and y:
                    for k, r in enumerate(self._powers[i + j]):
                        if r:
                            out[k] += x * y * r
        return tuple(out)

    def matrix(self, a: Element) -> list[Element]:
        """Rows ``zeta^k a`` (k < d): multiplication by ``a`` acting on row vectors."""
        return [self.mul(self.root(k), a) for k in range(self.d)]

    def from_number(self, c: Any) -> Element:
        """An int, Fraction, float, complex or rational sympy number, exactly.

        Floats are taken as the binary fractions they are.

        Raises
        ------
        TypeError
            For a value that is not a number or a sympy expression.
        ValueError
            For symbols, irrational or non-finite numbers, or a complex number when 4 does not
            divide the order (no i in the field).
        """
        value = exact_value(c)
        if isinstance(value, sympy.Basic):
            if value.free_symbols:
                raise ValueError(f"{c} has symbols")
            re, im = value.as_real_imag()
            if not (re.is_Rational and im.is_Rational):
                raise ValueError(f"{c} is not a (Gaussian) rational number")
            parts = (Fraction(int(re.p), int(re.q)), Fraction(int(im.p), int(im.q)))
        elif isinstance(value, tuple):
            parts = value
        else:
            parts = (Fraction(value), Fraction(0))
        out = self.rational(parts[0])
        if parts[1]:
            if self.order % 4:
                raise ValueError(f"{c!r} is complex and Q(zeta_{self.order}) holds no i")
            out = self.add(out, self.scale(self.root(self.order // 4), parts[1]))
        return out

    def to_complex(self, a: Element) -> complex:
        """The complex value (rounded)."""
        return complex(
            sum(float(x) * cmath.exp(2j * math.pi * k / self.order) for k, x in enumerate(a))
        )

    def is_zero(self, a: Element) -> bool:
        """True for 0 (exact)."""
        return not any(a)
