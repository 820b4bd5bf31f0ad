"""One model seen through every step of the calculation, each step computed once.

:func:`analyze` wraps a :class:`~freeladder.Model` in an immutable :class:`Analysis`.  Each
part (frustration graph, verdict, polynomial, spectrum, charge counts, exact spectrum, report)
is computed the first time it is asked for and kept.  The parts that ignore the couplings
(commutation exponents, the graph's adjacency, the chain structure, the independent-set counts
per order, the verdict) are kept with the model's strings, so :meth:`Analysis.with_couplings`
and any other model with the same strings find them ready: a coupling change recomputes only
the polynomial, its roots and what depends on them.

The functions of the library (:func:`~freeladder.classify`, :func:`~freeladder.free_spectrum`,
:func:`~freeladder.verify`, ...) remain the public interface; an Analysis only composes them,
so that many views of one model (the notebook widgets, the export, ``verify``) share one
computation of each part.
"""

from __future__ import annotations

import threading
from collections.abc import Iterator, Mapping, MutableMapping, Sequence
from typing import Any

import networkx as nx

from .algebra.model import Coupling, Model
from .base.cache import cached, model_store
from .base.jsonready import json_ready
from .graphs.graph import ChainStructure, chain_structure, frustration_graph
from .graphs.verdict import Verdict, classify
from .roots.polynomial import ExclusionPolynomial, exclusion_polynomial
from .spectra.charges import ChargeStep, charge_counts, charge_series
from .spectra.ed import DENSE_LIMIT, ExactSpectrum, exact_spectrum
from .spectra.spectrum import FreeSpectrum, free_spectrum

__all__ = ["Analysis", "analyze"]


class _Failure:
    """A part whose computation raised: the exception is raised again on every request."""

    __slots__ = ("error",)

    def __init__(self, error: Exception) -> None:
        self.error = error


class Analysis:
    """The calculation for one model; every part lazy, computed once, then kept.

    Build it with :func:`analyze`.  Instances are immutable; the parts they return are the
    library's own frozen result objects.

    Attributes
    ----------
    model : Model
        The model analysed.
    """

    __slots__ = ("model", "_parts", "_lock")
    model: Model
    _parts: MutableMapping[str, Any]
    _lock: threading.RLock

    def __init__(self, model: Model) -> None:
        if not isinstance(model, Model):
            raise TypeError(f"analyze needs a freeladder Model, got {type(model).__name__}")
        object.__setattr__(self, "model", model)
        object.__setattr__(self, "_parts", model_store(model))
        object.__setattr__(self, "_lock", threading.RLock())

    def __setattr__(self, name: str, value: Any) -> None:
        raise AttributeError("Analysis is immutable; use with_couplings() for new couplings")

    def __delattr__(self, name: str) -> None:
        raise AttributeError("Analysis is immutable")

    # -- the parts --------------------------------------------------------------------------------
    def _part(self, key: str, build: Any) -> Any:
        with self._lock:
            value = cached(self._parts, "analysis:" + key, lambda: _capture(build))
        if isinstance(value, _Failure):
            raise value.error
        return value

    @property
    def graph(self) -> nx.Graph | nx.DiGraph:
        """The frustration graph (:func:`freeladder.frustration_graph`)."""
        return self._part("graph", lambda: frustration_graph(self.model))  # type: ignore[no-any-return]

    @property
    def verdict(self) -> Verdict:
        """Which theorem applies (:func:`freeladder.classify`); its graph theory is shared by
        every model with the same strings."""
        return self._part("verdict", lambda: classify(self.model))  # type: ignore[no-any-return]

    @property
    def chain(self) -> ChainStructure | None:
        """The exclusion-chain structure, or None (:func:`freeladder.chain_structure`)."""
        return chain_structure(self.model)

    @property
    def polynomial(self) -> ExclusionPolynomial:
        """The exclusion polynomial (:func:`freeladder.exclusion_polynomial`)."""
        return exclusion_polynomial(self.model)

    @property
    def charge_counts(self) -> tuple[int, ...]:
        """Number of independent sets of each size ``0 .. alpha(G)``: the products in each
        ``Q^(s)``, counted, never listed."""
        return charge_counts(self.model)

    @property
    def independence_number(self) -> int:
        """``alpha(G)``, the highest order of the charge series."""
        return len(self.charge_counts) - 1

    def charge_series(self, limit: int | None = None) -> Iterator[ChargeStep]:
        """The charges order by order (:func:`freeladder.charge_series`), streamed."""
        if limit is None:
            return charge_series(self.model)
        return charge_series(self.model, limit=limit)

    def spectrum(
        self,
        method: str = "auto",
        lowest: int | None = None,
        unproven: bool = False,
        sector: str | Sequence[int] | Mapping[Any, int] | None = None,
    ) -> FreeSpectrum:
        """The free spectrum (:func:`freeladder.free_spectrum`), kept per set of arguments.

        ``sector`` chooses a sector of the conserved cycle strings of a Jordan-Wigner model
        (``"ground"``, cycle values, or a mapping of conserved strings to +-1), as in
        :func:`freeladder.free_spectrum`.

        Raises
        ------
        NoTheoremError
            When no theorem guarantees the spectrum and ``unproven`` is False.
        """
        chosen = sector if sector is None or isinstance(sector, str) else _sector_key(sector)
        key = f"spectrum:{method}:{lowest}:{bool(unproven)}:{chosen!r}"
        kwargs: dict[str, Any] = {"method": method, "lowest": lowest}
        if unproven:
            kwargs["unproven"] = True
        if sector is not None:
            kwargs["sector"] = sector
        return self._part(key, lambda: free_spectrum(self.model, **kwargs))  # type: ignore[no-any-return]

    @property
    def exact(self) -> ExactSpectrum | None:
        """Every eigenvalue by exact diagonalization, or None above dimension
        :data:`freeladder.spectra.ed.DENSE_LIMIT`
        (ask :func:`freeladder.exact_spectrum` with ``k=`` for
        the lowest levels of larger models)."""
        if self.model.is_symbolic or self.model.dimension > DENSE_LIMIT:
            return None
        return self._part("exact", lambda: exact_spectrum(self.model))  # type: ignore[no-any-return]

    def report(self, **options: Any) -> Any:
        """The :func:`freeladder.verify` report, kept per set of options."""
        from .checks.verification import verify  # verify builds on the parts above

        key = "report:" + repr(sorted(options.items()))
        return self._part(key, lambda: verify(self, **options))

    # -- new couplings ----------------------------------------------------------------------------
    def with_couplings(
        self, couplings: Sequence[Coupling], constant: Coupling | None = None
    ) -> Analysis:
        """The analysis of the same strings with new couplings; structure parts are reused."""
        return Analysis(self.model.with_couplings(couplings, constant))

    def subs(self, values: Mapping[Any, Any]) -> Analysis:
        """The analysis of the model with values substituted for its symbols."""
        return Analysis(self.model.subs(values))

    # -- display ----------------------------------------------------------------------------------
    def to_dict(self) -> dict[str, Any]:
        """Model text, verdict, polynomial, spectrum (or why there is none), JSON-ready.

        Parts that raise are reported as ``{"error": type, "message": text}``.
        """
        out: dict[str, Any] = {
            "model": str(self.model),
            "states": self.model.states,
            "terms": len(self.model),
            "sites": len(self.model.sites),
        }
        for name, get in (
            ("verdict", lambda: self.verdict),
            ("charge_counts", lambda: self.charge_counts),
            ("polynomial", lambda: self.polynomial),
            ("spectrum", lambda: self.spectrum()),
        ):
            try:
                out[name] = json_ready(get())
            except (ValueError, TypeError) as err:
                out[name] = {"error": type(err).__name__, "message": str(err)}
        return json_ready(out)  # type: ignore[no-any-return]

    def __repr__(self) -> str:
        done = sorted(k.split(":", 1)[1] for k in self._parts if k.startswith("analysis:"))
        return f"Analysis({self.model!r}; computed: {', '.join(done) or 'nothing yet'})"


def _capture(build: Any) -> Any:
    try:
        return build()
    except (ValueError, TypeError, ArithmeticError) as err:
        return _Failure(err)


def analyze(m: Model | Analysis) -> Analysis:
    """The :class:`Analysis` of ``m``: every step of the calculation, lazily, each once.

    Calling it twice on the same model returns analyses that share every part already
    computed; a model with the same strings (from :meth:`Model.with_couplings` or
    :meth:`Model.subs`) shares the coupling-independent parts.

    Parameters
    ----------
    m : Model or Analysis

    Returns
    -------
    Analysis

    Examples
    --------
    >>> import freeladder as fl
    >>> a = fl.analyze(fl.exclusion_chain(6, reach=2))
    >>> a.verdict.kind, a.charge_counts
    ('hidden-free', (1, 6, 6))
    >>> b = a.with_couplings([1, 0.5, 1, 0.5, 1, 0.5])
    >>> b.verdict.kind
    'hidden-free'
    """
    if isinstance(m, Analysis):
        return m
    return Analysis(m)


def _sector_key(sector: Sequence[int] | Mapping[Any, int]) -> tuple[Any, ...]:
    """A stable cache key for a sector given as values or as a mapping of strings to +-1."""
    if isinstance(sector, Mapping):
        return tuple(sorted((str(k), repr(v)) for k, v in sector.items()))
    return tuple(repr(v) for v in sector)
