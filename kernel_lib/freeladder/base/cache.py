"""Where derived values live, so that each is computed once.

Two stores, both invisible to users:

* :func:`structure_store` -- values that depend only on the operator strings (commutation
  exponents, the frustration graph's adjacency, the chain structure, independent-set counts,
  the verdict's graph theory).  The store belongs to the model's :class:`StringArray`, which a
  coupling change (:meth:`Model.with_couplings`, :meth:`Model.subs`) passes on unchanged, so a
  slider that moves a coupling never recomputes them.
* :func:`model_store` -- values that depend on the couplings too (the polynomial, spectra).

Both hold values only for as long as their owner lives (the structure store is a weak-key
dictionary keyed by the string array's identity).
"""

from __future__ import annotations

import threading
import weakref
from collections.abc import Callable, MutableMapping
from typing import Any, TypeVar

__all__ = ["cached", "model_store", "structure_store"]

T = TypeVar("T")

_STRUCTURE: weakref.WeakKeyDictionary[Any, dict[str, Any]] = weakref.WeakKeyDictionary()
_LOCK = threading.Lock()
_MODEL_SLOT = "_freeladder_cache"


def structure_store(strings: Any) -> MutableMapping[str, Any]:
    """The store of values that depend only on ``strings`` (a StringArray)."""
    with _LOCK:
        store = _STRUCTURE.get(strings)
        if store is None:
            store = {}
            _STRUCTURE[strings] = store
        return store


def model_store(model: Any) -> MutableMapping[str, Any]:
    """The store of values that depend on a model's couplings as well as its strings."""
    slots = model.__dict__
    store = slots.get(_MODEL_SLOT)
    if store is None:
        store = slots.setdefault(_MODEL_SLOT, {})
    return store  # type: ignore[no-any-return]


def cached(store: MutableMapping[str, Any], key: str, build: Callable[[], T]) -> T:
    """``store[key]``, computed by ``build()`` the first time it is asked for."""
    if key in store:
        return store[key]  # type: ignore[no-any-return]
    value = build()
    store[key] = value
    return value
