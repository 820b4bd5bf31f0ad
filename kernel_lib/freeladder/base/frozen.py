"""Read-only views for the fields of result objects, so that a result cannot be changed.

Result classes are frozen dataclasses (or classes that refuse ``__setattr__``); their array
fields go through :func:`readonly_array` and their dict fields through
:func:`readonly_mapping` in ``__post_init__``, so that ``result.values[0] = 1`` and
``result.coefficients[key] = 1`` raise as well.

Examples
--------
>>> a = readonly_array([1.0, 2.0])
>>> a.flags.writeable
False
>>> readonly_mapping({"a": 1})["a"]
1
"""

from __future__ import annotations

from collections.abc import Mapping
from types import MappingProxyType
from typing import Any

import numpy as np
import scipy.sparse as sps

__all__ = ["readonly_array", "readonly_mapping", "readonly_sparse"]


def readonly_array(values: Any, dtype: Any = None) -> np.ndarray:
    """A read-only numpy array with the given values (a copy unless already read-only)."""
    arr = np.asarray(values, dtype=dtype)
    if arr.flags.writeable or arr.base is not None:
        arr = arr.copy()
    arr.setflags(write=False)
    return arr


def readonly_mapping(values: Mapping[Any, Any]) -> MappingProxyType[Any, Any]:
    """A read-only view of a copy of ``values``."""
    if isinstance(values, MappingProxyType):
        return values
    return MappingProxyType(dict(values))


def readonly_sparse(matrix: Any) -> sps.csr_array:
    """A CSR copy in canonical form (sorted, no duplicates) whose arrays are read-only.

    Canonical form first, so that scipy never needs to sort the read-only arrays in place.
    """
    out = sps.csr_array(matrix, copy=True)
    out.sum_duplicates()
    out.sort_indices()
    for arr in (out.data, out.indices, out.indptr):
        arr.setflags(write=False)
    return out
