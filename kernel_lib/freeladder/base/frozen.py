"""Immutable arrays and views for the fields of result objects, so that a result cannot be
changed (not even by ``setflags(write=True)``).

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

import dataclasses
from collections.abc import Mapping
from types import MappingProxyType
from typing import Any, ClassVar, cast

import numpy as np
import scipy.sparse as sps

from .jsonready import json_ready

__all__ = ["ArrayRecord", "readonly_array", "readonly_mapping", "readonly_sparse"]


def readonly_array(values: Any, dtype: Any = None) -> np.ndarray:
    """A numpy array with the given values that no one can change (a copy unless it already is).

    The values live in an immutable ``bytes`` buffer, so ``setflags(write=True)`` raises on the
    array, on its views and on its base alike (a read-only array that owns its data can be
    reopened; these cannot).  Object arrays (exact or symbolic entries) cannot live in a
    buffer: they are copied and marked read-only.
    """
    arr = np.asarray(values, dtype=dtype)
    if arr.dtype.hasobject:
        arr = arr.copy()
        arr.setflags(write=False)
        return arr
    if _is_immutable(arr):
        return arr
    frozen = np.frombuffer(np.ascontiguousarray(arr).tobytes(), dtype=arr.dtype)
    return frozen.reshape(arr.shape)


def _is_immutable(arr: np.ndarray) -> bool:
    """True when ``arr`` is read-only and its memory belongs to an immutable bytes object."""
    if arr.flags.writeable:
        return False
    base: Any = arr
    while isinstance(base, np.ndarray):
        base = base.base
    return isinstance(base, bytes)


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
    out.data = readonly_array(out.data)
    out.indices = readonly_array(out.indices)
    out.indptr = readonly_array(out.indptr)
    return out


class ArrayRecord:
    """Base of frozen dataclass results with array fields.

    The fields named in ``ARRAYS`` are stored through :func:`readonly_array` and those in
    ``MAPPINGS`` through :func:`readonly_mapping` (in ``__post_init__``); :meth:`fields` gives
    every field by name and :meth:`to_dict` every field JSON-ready (complex numbers as
    ``[re, im]``).
    """

    ARRAYS: ClassVar[tuple[str, ...]] = ()
    MAPPINGS: ClassVar[tuple[str, ...]] = ()

    def __post_init__(self) -> None:
        for name in self.ARRAYS:
            object.__setattr__(self, name, readonly_array(getattr(self, name)))
        for name in self.MAPPINGS:
            object.__setattr__(self, name, readonly_mapping(getattr(self, name)))

    def fields(self) -> dict[str, Any]:
        """Every dataclass field by name."""
        return {f.name: getattr(self, f.name) for f in dataclasses.fields(cast(Any, self))}

    def to_dict(self) -> dict[str, Any]:
        """JSON-ready fields (complex numbers as ``[re, im]``)."""
        return json_ready(self.fields())  # type: ignore[no-any-return]
