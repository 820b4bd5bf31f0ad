"""Where derived results live: one store per model, one declared part per kind of result.

A :class:`Part` is a plain function of a model (and optionally a few hashable arguments)
declared with what it depends on:

* ``"strings"`` -- the operator strings only (commutation exponents, the frustration graph,
  the chain structure, independent-set counts, the verdict's graph theory).  These are kept
  with the model's :class:`~freeladder.algebra.strings.StringArray`, which a coupling change
  (:meth:`Model.with_couplings`, :meth:`Model.subs`) passes on unchanged, so a slider that moves
  a coupling never recomputes them.
* ``"couplings"`` -- the couplings too (the polynomial, roots, spectra, reports).

The part object is the typed key: ``PART(m)`` returns the part's value type.  Each model has
one :class:`Store` (shared by every analysis of that model object); it holds the values and a
lock per part and arguments, so two threads asking for one part compute it once.  A part that
raised a ``ValueError``, ``TypeError`` or ``ArithmeticError`` keeps the error and raises it
again on every request; any other exception (``KeyboardInterrupt``,
:class:`~freeladder.base.interrupt.Interrupted`) leaves nothing behind, so the part is
computed in full when next asked for.

Values are the library's own frozen results, shared by every caller inside the library;
public functions that hand out mutable containers (sparse matrices, graphs) copy them.
"""

from __future__ import annotations

import threading
import weakref
from collections.abc import Callable, Hashable
from typing import Any, Generic, Literal, TypeVar, cast

__all__ = ["Part", "Store", "part", "store_of"]

T = TypeVar("T")
Scope = Literal["strings", "couplings"]

_STRINGS: weakref.WeakKeyDictionary[Any, _Shelf] = weakref.WeakKeyDictionary()
_LOCK = threading.Lock()
_MODEL_SLOT = "_freeladder_store"


class Part(Generic[T]):
    """One kind of derived result: ``build(model, *args)``, kept per model and arguments.

    Parameters
    ----------
    name : str
        What the part is (shown by ``repr(fl.analyze(m))``).
    scope : "strings" or "couplings"
        What the result depends on besides the arguments.
    build : callable
        ``build(model, *args) -> T``.
    """

    __slots__ = ("build", "name", "scope")

    def __init__(self, name: str, scope: Scope, build: Callable[..., T]) -> None:
        if scope not in ("strings", "couplings"):
            raise ValueError(f"scope must be 'strings' or 'couplings', not {scope!r}")
        self.name = name
        self.scope = scope
        self.build = build

    def __call__(self, model: Any, *args: Hashable) -> T:
        """The value for ``model`` (and ``args``), computed once."""
        return store_of(model).get(self, model, args)

    def __repr__(self) -> str:
        return f"Part({self.name!r}, depends on the {self.scope})"


def part(name: str, scope: Scope) -> Callable[[Callable[..., T]], Part[T]]:
    """Declare a function as a :class:`Part` (decorator)."""

    def declare(build: Callable[..., T]) -> Part[T]:
        return Part(name, scope, build)

    return declare


class _Failure:
    """A part whose computation raised: the error is raised again on every request."""

    __slots__ = ("error",)

    def __init__(self, error: Exception) -> None:
        self.error = error


class _Shelf:
    """Values and per-key locks."""

    __slots__ = ("__weakref__", "_guard", "_locks", "values")

    def __init__(self) -> None:
        self.values: dict[tuple[Part[Any], tuple[Hashable, ...]], Any] = {}
        self._locks: dict[tuple[Part[Any], tuple[Hashable, ...]], threading.RLock] = {}
        self._guard = threading.Lock()

    def get(self, key: tuple[Part[T], tuple[Hashable, ...]], model: Any) -> T:
        try:
            value = self.values[key]
        except KeyError:
            with self._guard:
                lock = self._locks.setdefault(key, threading.RLock())
            with lock:  # one builder per key; the others wait for its value
                if key not in self.values:
                    self.values[key] = _capture(key[0], model, key[1])
                value = self.values[key]
        if isinstance(value, _Failure):
            raise value.error
        return cast(T, value)


def _capture(p: Part[Any], model: Any, args: tuple[Hashable, ...]) -> Any:
    try:
        return p.build(model, *args)
    except (ValueError, TypeError, ArithmeticError) as err:
        return _Failure(err)


class Store:
    """The derived results of one model: its coupling parts, and its strings' parts (shared
    with every model holding the same :class:`StringArray`)."""

    __slots__ = ("couplings", "strings")

    def __init__(self, strings: _Shelf) -> None:
        self.strings = strings
        self.couplings = _Shelf()

    def get(self, p: Part[T], model: Any, args: tuple[Hashable, ...] = ()) -> T:
        """``p(model, *args)``, computed once."""
        shelf = self.strings if p.scope == "strings" else self.couplings
        return shelf.get((p, args), model)

    def forget(self, p: Part[Any], args: tuple[Hashable, ...] = ()) -> None:
        """Drop the kept value of ``p(model, *args)``: the next request computes it again (a
        result that stands for an interrupted run, such as a report stopped by Ctrl-C, is
        handed out once and not kept)."""
        shelf = self.strings if p.scope == "strings" else self.couplings
        shelf.values.pop((p, args), None)

    def __reduce__(self) -> tuple[Any, tuple[()]]:
        """A pickled or deep-copied model leaves its store behind (locks do not travel); the
        copy computes its parts again on first use."""
        return _no_store, ()

    def computed(self) -> list[str]:
        """Names of the parts computed so far (with their arguments when there are any)."""
        names = set()
        for shelf in (self.strings, self.couplings):
            for p, args in list(shelf.values):
                names.add(p.name + (f"{list(args)}" if args else ""))
        return sorted(names)


def _no_store() -> None:
    return None


def store_of(model: Any) -> Store:
    """The one store of ``model`` (created on first use)."""
    slots = model.__dict__
    store = slots.get(_MODEL_SLOT)
    if store is None:
        with _LOCK:
            store = slots.get(_MODEL_SLOT)
            if store is None:
                shelf = _STRINGS.get(model.strings)
                if shelf is None:
                    shelf = _Shelf()
                    _STRINGS[model.strings] = shelf
                store = Store(shelf)
                slots[_MODEL_SLOT] = store
    return cast(Store, store)
