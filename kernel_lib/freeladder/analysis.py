"""One model seen through every step of the calculation, each step computed once.

:func:`analyze` wraps a :class:`~freeladder.Model` in an immutable :class:`Analysis`, the one
owner of every derived result.  Each part (frustration graph, verdict, relations, indifference
order, polynomial, roots, spectrum per sector, the answer "spectrum or why not", exact levels,
report, worked calculation) is a plain function declared as a
:class:`~freeladder.base.cache.Part` with what it depends on: the strings only, or the strings
and the couplings.  The results live in the model's one store
(:func:`~freeladder.base.cache.store_of`), so every ``fl.analyze(m)`` of the same model shares
them, two threads asking for one part compute it once, and the parts that ignore the couplings
are shared with :meth:`Analysis.with_couplings` (and any other model with the same strings): a
coupling change recomputes only the polynomial, its roots and what depends on them.

:meth:`Analysis.answer` is the only place where "the spectrum, or why there is none" is
decided; the Workbench, the worked calculation, the command line and :meth:`Analysis.to_dict`
all read it.

References
----------
A. Chapman and S. T. Flammia, Quantum 4, 278 (2020) (the sector route);
S. J. Elman, A. Chapman and S. T. Flammia, Commun. Math. Phys. 388, 969 (2021).
"""

from __future__ import annotations

from collections.abc import Hashable, Iterator, Mapping, Sequence
from typing import TYPE_CHECKING, Any

from .algebra.model import Coupling, Model
from .base.cache import part, store_of
from .base.errors import TooLargeError
from .base.jsonready import json_ready
from .graphs.graph import ChainStructure, chain_structure, frustration_graph
from .graphs.indifference import IndifferenceOrder, indifference_order
from .graphs.relations import Relations, find_relations
from .graphs.verdict import Verdict, classify
from .roots.polynomial import ExclusionPolynomial, exclusion_polynomial
from .roots.result import RootTable
from .spectra.answer import SectorRow, SpectrumAnswer
from .spectra.charges import ChargeStep, charge_counts, charge_series
from .spectra.ed import DENSE_LIMIT, ExactSpectrum, exact_spectrum, sector_exact_spectrum
from .spectra.majorana import jordan_wigner_spectrum, sectors
from .spectra.spectrum import FreeSpectrum, free_spectrum, refusal_text

if TYPE_CHECKING:
    import networkx as nx
else:
    from .base.lazy import networkx as nx


if TYPE_CHECKING:
    from .checks.edge_dynamics import DynamicsCheck
    from .checks.verification import Report
    from .output.worked import WorkedCalculation

__all__ = ["Analysis", "analyze"]

SectorChoice = str | Sequence[int] | Mapping[Any, int] | None

DYNAMICS_TERMS = 10_000
"""Most terms for which :meth:`Analysis.dynamics` (the report's and the export's edge dynamics)
runs: its cost grows as the square of the terms (about 2 s at 10^4 terms, minutes at 10^5);
:func:`freeladder.autocorrelation` has no such limit."""


# -- the parts that depend on the couplings (those of the strings live with their modules) -------
@part("frustration graph", "couplings")
def _graph(m: Model) -> nx.Graph | nx.DiGraph:
    return frustration_graph(m)  # its nodes carry the couplings


@part("verdict", "couplings")
def _verdict(m: Model) -> Verdict:
    return classify(m)  # the graph theory is shared with the strings; the witness text is not


@part("relations", "strings")
def _relations(m: Model) -> Relations:
    return find_relations(m)


@part("roots", "couplings")
def _roots(m: Model) -> RootTable:
    return exclusion_polynomial(m).roots()


@part("spectrum", "couplings")
def _spectrum(
    m: Model, method: str, lowest: int | None, unproven: bool, sector: Hashable
) -> FreeSpectrum:
    kwargs: dict[str, Any] = {"method": method, "lowest": lowest}
    if unproven:
        kwargs["unproven"] = True
    if sector is not None:
        kwargs["sector"] = _sector_value(sector)
    return free_spectrum(m, **kwargs)


@part("exact spectrum", "couplings")
def _exact(m: Model) -> ExactSpectrum:
    return exact_spectrum(m)


@part("sector exact levels", "couplings")
def _sector_exact(m: Model, values: tuple[int, ...], k: int) -> ExactSpectrum:
    gens = sectors(m).cycle_operators if values else ()
    fixed = [(g, int(v)) for g, v in zip(gens, values, strict=True) if g.support]
    return sector_exact_spectrum(m, k, fixed)


@part("answer", "couplings")
def _answer(m: Model, choice: Hashable, unproven: bool) -> SpectrumAnswer:
    """The spectrum, or the refusal: decided here and nowhere else."""
    if len(m) == 0:
        return SpectrumAnswer("refused", None, "", "the model has no terms", (), "add terms")
    if m.is_symbolic:
        names = ", ".join(sorted(str(s) for s in m.symbols))
        return SpectrumAnswer(
            "refused",
            None,
            "",
            f"symbolic couplings ({names}): a spectrum needs numbers",
            (),
            "substitute numbers with m.subs({...}) (fl.analyze(m).subs({...}))",
        )
    promise = _verdict(m).guarantee
    if choice is None:  # the best the theorems allow
        choice = "ground" if sector_route(m) else "polynomial"
    if choice != "polynomial":
        return _sector_answer(m, choice)
    if promise.proven:
        sp = _spectrum(m, "auto", None, False, None)
        reason = sp.provenance.guarantee
        if sp.exceptional:
            reason += f" Note, {sp.exceptional_note}."
        return SpectrumAnswer("proven", sp, "polynomial", reason)
    reason, instead = refusal_text(m, promise)
    if not unproven:
        return SpectrumAnswer("refused", None, "", reason, promise.witness, instead)
    sp = _spectrum(m, "auto", None, True, None)
    return SpectrumAnswer("unproven", sp, "polynomial", reason, promise.witness, instead)


def sector_route(m: Model) -> bool:
    """True for Pauli line-graph models whose single polynomial is not guaranteed: they are
    free sector by sector of their conserved cycle strings (Chapman-Flammia 2020).  The
    answer and the checks (:func:`freeladder.verify`) both follow it."""
    if m.states != 2 or m.is_symbolic or len(m) == 0:
        return False
    verdict = _verdict(m)
    return verdict.kind == "jordan-wigner" and not verdict.guarantee.proven


def _sector_answer(m: Model, choice: Hashable) -> SpectrumAnswer:
    table: tuple[SectorRow, ...] | None = None
    try:
        if choice == "all":
            every = jordan_wigner_spectrum(m, "all")
            table = tuple(
                SectorRow(
                    tuple(int(v) for v in sec.label),
                    sec.ground_energy + every.constant,
                    len(every.quasi_energies(i)),
                    int(sec.multiplicity),
                )
                for i, sec in enumerate(every.sectors)
            )
            choice = "ground"
        sp = _spectrum(m, "auto", None, False, choice)
    except ValueError as err:  # too many sectors to search, or a label that is not consistent
        structure = sectors(m) if m.states == 2 and _verdict(m).kind == "jordan-wigner" else None
        cycles = "" if structure is None else ", ".join(str(g) for g in structure.cycle_operators)
        instead = (
            "choose a sector by the values (+1 or -1) of its cycle strings "
            f"({cycles}): fl.analyze(m).answer(sector=(+1, -1, ...))"
            if cycles
            else "fl.verify(m) probes the model numerically"
        )
        return SpectrumAnswer("refused", None, "", str(err), (), instead)
    info = sp.provenance.sector or {}
    return SpectrumAnswer(
        "proven",
        sp,
        "sector",
        sp.provenance.guarantee,
        selection=str(info.get("selection", "")),
        cycle_strings=tuple(str(g) for g in info.get("cycle_operators", ())),
        cycle_values=tuple(int(v) for v in info.get("cycle_values", ())),
        sectors=table,
    )


@part("report", "couplings")
def _report(m: Model, options: tuple[tuple[str, Any], ...]) -> Report:
    from .checks.verification import verify  # the checks build on the parts above

    return verify(Analysis(m), **dict(options))


@part("edge dynamics", "couplings")
def _dynamics(m: Model) -> DynamicsCheck:
    from .checks.edge_dynamics import check_autocorrelation  # a check: above the parts

    if len(m) > DYNAMICS_TERMS:
        raise TooLargeError(
            f"not computed for {len(m)} terms: the report and the export compute the edge "
            f"dynamics up to {DYNAMICS_TERMS} terms (the cost grows as the square of the terms); "
            "fl.autocorrelation(m, times) computes it at any size"
        )
    return check_autocorrelation(m)


@part("worked calculation", "couplings")
def _worked(m: Model, steps: str | tuple[str, ...]) -> WorkedCalculation:
    from .output.worked import build_worked  # the export builds on the parts above

    return build_worked(Analysis(m), steps)


class Analysis:
    """The calculation for one model: every part lazy, computed once, kept in the model's store.

    Build it with :func:`analyze`.  Instances are immutable; the parts they return are the
    library's own frozen result objects (the networkx graph is a copy, the caller's to change).

    Attributes
    ----------
    model : Model
        The model analysed.
    """

    __slots__ = ("model",)
    model: Model

    def __init__(self, model: Model) -> None:
        if not isinstance(model, Model):
            raise TypeError(f"analyze needs a freeladder Model, got {type(model).__name__}")
        object.__setattr__(self, "model", model)

    def __setattr__(self, name: str, value: Any) -> None:
        raise AttributeError("Analysis is immutable; use with_couplings() for new couplings")

    def __delattr__(self, name: str) -> None:
        raise AttributeError("Analysis is immutable")

    # -- the parts --------------------------------------------------------------------------------
    @property
    def graph(self) -> nx.Graph | nx.DiGraph:
        """The frustration graph (:func:`freeladder.frustration_graph`), a fresh copy."""
        return _graph(self.model).copy()

    @property
    def verdict(self) -> Verdict:
        """Which theorem applies (:func:`freeladder.classify`); its graph theory is shared by
        every model with the same strings."""
        return _verdict(self.model)

    @property
    def relations(self) -> Relations:
        """Products of terms that are multiples of the identity
        (:func:`freeladder.find_relations`)."""
        return _relations(self.model)

    @property
    def chain(self) -> ChainStructure | None:
        """The exclusion-chain structure, or None (:func:`freeladder.chain_structure`)."""
        return chain_structure(self.model)

    @property
    def order(self) -> IndifferenceOrder | None:
        """The oriented indifference order, or None (:func:`freeladder.indifference_order`)."""
        return indifference_order(self.model)

    @property
    def polynomial(self) -> ExclusionPolynomial:
        """The exclusion polynomial (:func:`freeladder.exclusion_polynomial`)."""
        return exclusion_polynomial(self.model)

    @property
    def roots(self) -> RootTable:
        """Every root of the polynomial, certified (:meth:`ExclusionPolynomial.roots`)."""
        return _roots(self.model)

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
        sector: SectorChoice = None,
    ) -> FreeSpectrum:
        """The free spectrum (:func:`freeladder.free_spectrum`), kept per set of arguments.

        ``sector`` chooses a sector of the conserved cycle strings of a Jordan-Wigner model
        (``"ground"``, cycle values, or a mapping of conserved strings to +-1), as in
        :func:`freeladder.free_spectrum`.  :meth:`answer` says in one object whether there is a
        spectrum and, if not, why.

        Raises
        ------
        NoTheoremError
            When no theorem guarantees the spectrum and ``unproven`` is False.
        """
        return _spectrum(self.model, method, lowest, bool(unproven), _sector_key(sector))

    def answer(self, sector: SectorChoice = None, unproven: bool = False) -> SpectrumAnswer:
        """The spectrum, or the refusal with its reason, witness and what to do instead.

        Parameters
        ----------
        sector : None, "ground", "all", "polynomial", cycle values or a mapping
            None: the best the theorems allow -- the single polynomial when a theorem
            guarantees it, else, for a Jordan-Wigner model with cycles, its ground sector
            (Chapman-Flammia 2020).  "polynomial": the single polynomial only.  "ground", cycle
            values or a mapping: that sector (:func:`freeladder.free_spectrum` with
            ``sector=``).  "all": the ground sector, with a table of every sector
            (:attr:`SpectrumAnswer.sectors`).
        unproven : bool
            On the single polynomial: return its numbers, marked "unproven", when no theorem
            guarantees them (instead of refusing).

        Returns
        -------
        SpectrumAnswer

        Examples
        --------
        >>> import freeladder as fl
        >>> a = fl.analyze(fl.parse_model("X0 X1 + Y1 Y2 + Z2 Z3 + X3 X0 + Z1 Z3"))
        >>> ans = a.answer()
        >>> ans.status, ans.route, ans.cycle_values
        ('proven', 'sector', (-1,))
        >>> a.answer(sector="polynomial").status
        'refused'
        """
        choice = _sector_key(sector)
        return _answer(self.model, choice, bool(unproven))

    @property
    def exact(self) -> ExactSpectrum | None:
        """Every eigenvalue by exact diagonalization, or None above dimension
        :data:`freeladder.spectra.ed.DENSE_LIMIT`
        (ask :func:`freeladder.exact_spectrum` with ``k=`` for
        the lowest levels of larger models)."""
        if self.model.is_symbolic or self.model.dimension > DENSE_LIMIT:
            return None
        return _exact(self.model)

    def sector_exact(self, cycle_values: Sequence[int] = (), k: int = 8) -> ExactSpectrum:
        """The ``k`` lowest eigenvalues of H where the conserved cycle strings
        (``cycle_operators`` of :func:`freeladder.sectors`) have ``cycle_values``; the whole
        space for ``()`` (:func:`freeladder.sector_exact_spectrum`), kept per arguments.

        Raises
        ------
        TooLargeError
            When the solve would need more memory than is available.
        """
        return _sector_exact(self.model, tuple(int(v) for v in cycle_values), int(k))

    def report(self, **options: Any) -> Report:
        """The :func:`freeladder.verify` report, kept per set of options (a report cut short by
        Ctrl-C is returned but not kept: the next call runs the checks again)."""
        key = tuple(sorted(options.items()))
        found = _report(self.model, key)
        if not found.complete:
            store_of(self.model).forget(_report, (key,))
        return found

    def dynamics(self) -> DynamicsCheck:
        """The edge autocorrelation at a few times, checked independently
        (:func:`freeladder.check_autocorrelation`); raises NotExpandableError (a ValueError)
        when the edge expansion does not apply, and TooLargeError (a ValueError) above
        :data:`DYNAMICS_TERMS` terms."""
        return _dynamics(self.model)

    def worked(self, steps: str | Sequence[str] = "all") -> WorkedCalculation:
        """The worked calculation (:func:`freeladder.worked_calculation`), kept per steps."""
        return _worked(self.model, steps if isinstance(steps, str) else tuple(steps))

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
    def to_dict(self, checks: bool = False) -> dict[str, Any]:
        """The one JSON form of an analysis (what ``freeladder report --json`` prints).

        Keys: ``model``, ``states``, ``terms``, ``sites``, ``verdict`` (kind, reasons, witness,
        guarantee, ...), ``charge_counts``, ``polynomial``, ``spectrum``
        (:meth:`SpectrumAnswer.to_dict`: the numbers or the refusal) and ``report`` (the
        :func:`freeladder.verify` report with ``ok``, ``problems`` and ``checks``, when
        ``checks`` is True; else None) and ``dynamics`` (the edge autocorrelation: weights,
        frequencies, plateau, a few time values and how they were verified,
        :meth:`DynamicsCheck.to_dict`, when ``checks`` is True; else None).  Parts that raise
        are reported as ``{"error": type, "message": text}``.
        """
        out: dict[str, Any] = {
            "model": str(self.model),
            "states": self.model.states,
            "terms": len(self.model),
            "sites": len(self.model.sites),
        }
        parts: list[tuple[str, Any]] = [
            ("verdict", lambda: self.verdict),
            ("charge_counts", lambda: self.charge_counts),
            ("polynomial", lambda: self.polynomial),
            ("spectrum", lambda: self.answer()),
            ("report", lambda: self.report() if checks else None),
            ("dynamics", lambda: self.dynamics() if checks else None),
        ]
        for name, get in parts:
            try:
                out[name] = json_ready(get())
            except (ValueError, TypeError, ArithmeticError) as err:
                out[name] = {"error": type(err).__name__, "message": str(err)}
        ready: dict[str, Any] = json_ready(out)
        return ready

    def __repr__(self) -> str:
        done = store_of(self.model).computed()
        return f"Analysis({self.model!r}; computed: {', '.join(done) or 'nothing yet'})"


def analyze(m: Model | Analysis) -> Analysis:
    """The :class:`Analysis` of ``m``: every step of the calculation, lazily, each once.

    Calling it twice on the same model returns analyses that share every part already
    computed (they read the model's one store); a model with the same strings (from
    :meth:`Model.with_couplings` or :meth:`Model.subs`) shares the coupling-independent parts.

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


def _sector_key(sector: SectorChoice) -> Hashable:
    """A hashable form of a sector choice (None, a word, cycle values or a mapping)."""
    if sector is None or isinstance(sector, str):
        return sector
    if isinstance(sector, Mapping):
        return ("mapping", tuple(sector.items()))
    return tuple(sector)


def _sector_value(key: Hashable) -> Any:
    """The sector choice that :func:`_sector_key` made hashable."""
    if isinstance(key, tuple) and len(key) == 2 and key[0] == "mapping":
        return dict(key[1])
    return key
