"""Turn result values into JSON-ready Python values, one convention for every ``to_dict``.

The convention (used by the widgets, the export and the command line):

* ``int`` and ``bool`` stay as they are; real numbers (float, numpy scalars, Fraction, real
  sympy numbers) become ``float``; a non-finite float becomes ``None`` (strict JSON has no NaN);
* complex numbers become ``[re, im]`` (each a float or None); a complex value whose imaginary
  part is exactly zero stays complex-shaped when it came as complex, so a list of values keeps
  one shape;
* numpy arrays, tuples, lists and sets become lists (sets sorted by their text);
* dict keys become strings;
* objects with a ``to_dict()`` method are converted through it;
* sympy expressions with free symbols, and anything else, become their text ``str(value)``.
"""

from __future__ import annotations

import math
import numbers
from collections.abc import Mapping
from fractions import Fraction
from typing import TYPE_CHECKING, Any

import numpy as np

if TYPE_CHECKING:
    import sympy
else:
    from .lazy import sympy

__all__ = ["json_ready"]


def _real(x: float) -> float | None:
    return x if math.isfinite(x) else None


def json_ready(value: Any) -> Any:
    """A JSON-ready copy of ``value`` (see the module docstring for the convention).

    Examples
    --------
    >>> json_ready({"eta": np.array([1.0, 2.0]), "E0": -1 + 0.5j, "count": np.int64(3)})
    {'eta': [1.0, 2.0], 'E0': [-1.0, 0.5], 'count': 3}
    >>> json_ready([float("nan"), Fraction(1, 4)])
    [None, 0.25]
    """
    if value is None or isinstance(value, (bool, str)):
        return value
    if hasattr(value, "to_dict") and callable(value.to_dict):
        return json_ready(value.to_dict())
    if isinstance(value, np.ndarray):
        return [json_ready(v) for v in value.tolist()]
    if isinstance(value, np.generic):
        return json_ready(value.item())
    if isinstance(value, int):
        return int(value)
    if isinstance(value, float):
        return _real(value)
    if isinstance(value, Fraction):
        return _real(float(value))
    if isinstance(value, complex):
        return [_real(value.real), _real(value.imag)]
    if isinstance(value, sympy.Basic):
        if value.free_symbols:
            return str(value)
        z = complex(value.evalf(17))
        return _real(z.real) if z.imag == 0 else [_real(z.real), _real(z.imag)]
    if isinstance(value, numbers.Number):
        z = complex(value)  # type: ignore[call-overload]
        return _real(z.real) if z.imag == 0 else [_real(z.real), _real(z.imag)]
    if isinstance(value, Mapping):
        return {str(k): json_ready(v) for k, v in value.items()}
    if isinstance(value, (set, frozenset)):
        return sorted((json_ready(v) for v in value), key=str)
    if isinstance(value, (list, tuple)):
        return [json_ready(v) for v in value]
    return str(value)
