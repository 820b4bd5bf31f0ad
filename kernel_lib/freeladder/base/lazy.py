"""Heavy dependencies loaded when first used, so that ``import freeladder`` stays quick.

* :data:`sympy` stands for the sympy module.  Any attribute loads sympy, except the classes
  that the library only tests against (``isinstance(x, sympy.Basic)``): while sympy has not been
  imported by anyone, no sympy object can exist, so those names give a stand-in class of which
  nothing is an instance (calling it loads sympy and calls the real class).
* :data:`networkx`, :data:`flint` (python-flint), :data:`mpmath` and :data:`csgraph`
  (``scipy.sparse.csgraph``, which brings ``scipy.sparse.linalg`` and ``scipy.linalg``) stand for
  their modules, each imported on first attribute access; modules write
  ``from ..base.lazy import networkx as nx`` (or ``flint``, ...) under ``if not TYPE_CHECKING``
  and the real import under ``if TYPE_CHECKING``.  An ``isinstance`` test against one of their
  classes imports the module, so such tests stay on paths that use the module anyway.  Set
  attributes on what a stand-in hands out (``flint.ctx.prec = 128``), never on the stand-in
  itself; numba-compiled code cannot reach these stand-ins.
* :func:`njit` marks a function for numba: the first call of any marked function of a module
  imports numba, compiles every marked function of that module and puts the compiled versions
  in the module's namespace (so compiled code calling compiled code finds them), with
  :data:`prange` there replaced by ``numba.prange``.  Before that, :data:`prange` is ``range``.
"""

from __future__ import annotations

import importlib
import sys
import threading
from collections.abc import Callable
from typing import Any

__all__: list[str] = []  # internal: modules reach these through freeladder.base.lazy

_CLASSES = frozenset(
    {
        "Basic",
        "Expr",
        "Symbol",
        "Number",
        "Integer",
        "Rational",
        "Float",
        "Add",
        "Mul",
        "Pow",
        "MatrixBase",
        "Poly",
    }
)


def _real_sympy() -> Any:
    return importlib.import_module("sympy")


class _LazySympy:
    """The sympy module, imported on first real use."""

    def __getattr__(self, name: str) -> Any:
        loaded = sys.modules.get("sympy")
        if loaded is None and name in _CLASSES:
            return _stand_in(name)
        value = getattr(loaded if loaded is not None else _real_sympy(), name)
        setattr(self, name, value)  # sympy is loaded for good: later lookups skip this method
        return value


_STAND_INS: dict[str, type] = {}


def _stand_in(name: str) -> type:
    """A class of which nothing is an instance; calling it calls ``sympy.<name>``."""
    cls = _STAND_INS.get(name)
    if cls is None:

        def new(_cls: type, *args: Any, **kwargs: Any) -> Any:
            return getattr(_real_sympy(), name)(*args, **kwargs)

        cls = type(name, (), {"__new__": new, "__slots__": ()})
        _STAND_INS[name] = cls
    return cls


sympy: Any = _LazySympy()


class _LazyModule:
    """A module imported on first attribute access (then kept as an attribute here)."""

    def __init__(self, name: str) -> None:
        self._name = name

    def __getattr__(self, attr: str) -> Any:
        value = getattr(importlib.import_module(self._name), attr)
        setattr(self, attr, value)
        return value


networkx: Any = _LazyModule("networkx")
flint: Any = _LazyModule("flint")
mpmath: Any = _LazyModule("mpmath")
csgraph: Any = _LazyModule("scipy.sparse.csgraph")

prange = range

_LOCK = threading.RLock()


class _Pending:
    """A function waiting to be compiled by numba on first call."""

    def __init__(self, fn: Callable[..., Any], options: dict[str, Any]) -> None:
        self.fn = fn
        self.options = options
        self.__doc__ = fn.__doc__
        self.__name__ = fn.__name__
        self.__wrapped__ = fn

    def __call__(self, *args: Any, **kwargs: Any) -> Any:
        return _compile_module(self.fn.__globals__)[self.fn.__name__](*args, **kwargs)


def _compile_module(namespace: dict[str, Any]) -> dict[str, Any]:
    with _LOCK:
        pending = {k: v for k, v in namespace.items() if isinstance(v, _Pending)}
        if pending:
            numba = importlib.import_module("numba")
            namespace["prange"] = numba.prange
            for key, item in pending.items():
                if item.fn.__globals__ is not namespace:  # imported from another module
                    _compile_module(item.fn.__globals__)
                namespace[key] = numba.njit(**item.options)(item.fn)
    return namespace


def njit(**options: Any) -> Callable[[Callable[..., Any]], Any]:
    """``numba.njit(**options)``, applied when a marked function of the module is first called."""

    def mark(fn: Callable[..., Any]) -> Any:
        return _Pending(fn, options)

    return mark
