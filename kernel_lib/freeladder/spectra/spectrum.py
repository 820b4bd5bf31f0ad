"""The free spectrum of a model: quasi-energies, many-body levels, ground energy, gap.

Every level of a free model is ``E = constant + sum_k omega^{s_k} eta_k`` with the choices
``s_k in {0, ..., N-1}`` made independently, ``omega = exp(2 pi i / N)`` and ``eta_k^N = 1/y_k``
for the roots ``y_k`` of the exclusion polynomial ``P``.  :func:`free_spectrum` finds the
roots by the cheapest route that fits the model and records how, and how accurately, in
``FreeSpectrum.provenance`` (a :class:`SpectrumProvenance`).  It refuses with
:class:`freeladder.NoTheoremError` when no theorem guarantees that the one polynomial
gives the spectrum (the :class:`freeladder.Guarantee` on the verdict); with
``unproven=True`` it returns the numbers marked NOT GUARANTEED.

References
----------
P. Fendley, J. Phys. A 52, 335002 (2019), arXiv:1901.08078 (free fermions in disguise);
F. C. Alcaraz and R. A. Pimenta, Phys. Rev. B 102, 121101(R) (2020), arXiv:2005.14622
(reach-p exclusion chains, any N); S. J. Elman, A. Chapman and S. T. Flammia,
Commun. Math. Phys. 388, 969 (2021), arXiv:2012.07857 (claw-free frustration graphs);
R. J. Baxter, Phys. Lett. A 140, 155 (1989); P. Fendley, J. Phys. A 47, 075001 (2014)
(free parafermions).
"""

from __future__ import annotations

import dataclasses
import heapq
import math
import time
from collections.abc import Iterator, Mapping, Sequence
from dataclasses import dataclass, field
from types import MappingProxyType
from typing import Any, overload

import numpy as np

from ..algebra.model import Model
from ..base import display
from ..base.errors import NoTheoremError
from ..base.frozen import readonly_array
from ..base.jsonready import json_ready
from ..base.references import CHAPMAN_FLAMMIA_2020
from ..graphs.graph import ChainStructure, chain_structure
from ..graphs.indifference import indifference_order
from ..graphs.verdict import Guarantee, classify, guarantee
from ..roots import methods as root_methods
from ..roots.polynomial import exclusion_polynomial, sum_rules
from ..roots.real import chain_inverse_power_sums
from ..roots.result import BeyondFloatError, RootTable
from .ed import DENSE_LIMIT
from .majorana import flux_sector, jordan_wigner_spectrum, sectors

__all__ = [
    "LEVEL_LIMIT",
    "DensityOfStates",
    "FreeSpectrum",
    "Level",
    "LevelTable",
    "SpectrumProvenance",
    "free_spectrum",
]

LEVEL_LIMIT = 2**22
"""Largest number ``N^S`` of choices that :meth:`FreeSpectrum.levels` lists in full."""

_EXACT_DOS_LIMIT = 2**20


@dataclass(frozen=True)
class Level:
    """One many-body level ``E = constant + sum_k omega^{occupation[k]} eta_k``.

    Attributes
    ----------
    energy : complex or float
        Real for N = 2 with real quasi-energies.
    multiplicity : int or None
        The model's degeneracy (:attr:`FreeSpectrum.degeneracy`); None when the model does not
        guarantee one.  Distinct choices that happen to give the same energy are listed as
        separate levels, each with this multiplicity.
    occupation : tuple of int
        ``s_k`` per quasi-energy, in the order of :attr:`FreeSpectrum.quasi_energies`.
        For N = 2, ``s_k = 1`` means ``-eta_k`` (the mode is "filled").
    """

    energy: complex | float
    multiplicity: int | None
    occupation: tuple[int, ...]

    def to_dict(self) -> dict[str, Any]:
        """JSON-ready fields: energy (complex as ``[re, im]``), multiplicity, occupation."""
        return json_ready(
            {
                "energy": self.energy,
                "multiplicity": self.multiplicity,
                "occupation": self.occupation,
            }
        )


class LevelTable(Sequence[Level]):
    """Levels in increasing order of their real part, stored as arrays.

    Attributes
    ----------
    energies : ndarray
        One energy per listed choice.
    occupations : ndarray of int8, shape (count, S)
        The choices ``s_k``.
    multiplicity : int or None
        The model's degeneracy, shared by every level (see :class:`Level`).

    Notes
    -----
    A table is frozen: its attributes cannot be set or deleted and its arrays are read-only.
    """

    __slots__ = ("energies", "occupations", "multiplicity")
    energies: np.ndarray
    occupations: np.ndarray
    multiplicity: int | None

    def __init__(self, energies: np.ndarray, occupations: np.ndarray, multiplicity: int | None):
        energies = readonly_array(energies)
        occupations = readonly_array(occupations)
        object.__setattr__(self, "energies", energies)
        object.__setattr__(self, "occupations", occupations)
        object.__setattr__(self, "multiplicity", multiplicity)

    def __setattr__(self, name: str, value: Any) -> None:
        raise AttributeError(f"LevelTable is immutable (cannot set {name!r})")

    def __delattr__(self, name: str) -> None:
        raise AttributeError(f"LevelTable is immutable (cannot delete {name!r})")

    def to_dict(self) -> dict[str, Any]:
        """JSON-ready fields: energies (complex as ``[re, im]``), occupations (one list of
        ``s_k`` per level), multiplicity."""
        return json_ready(
            {
                "energies": self.energies,
                "occupations": self.occupations,
                "multiplicity": self.multiplicity,
            }
        )

    def __len__(self) -> int:
        return int(self.energies.shape[0])

    @overload
    def __getitem__(self, i: int) -> Level: ...

    @overload
    def __getitem__(self, i: slice) -> LevelTable: ...

    def __getitem__(self, i: int | slice) -> Level | LevelTable:
        if isinstance(i, slice):
            return LevelTable(
                self.energies[i].copy(), self.occupations[i].copy(), self.multiplicity
            )
        e = self.energies[i]
        return Level(e.item(), self.multiplicity, tuple(int(v) for v in self.occupations[i]))

    def __iter__(self) -> Iterator[Level]:
        return (self[i] for i in range(len(self)))

    def __repr__(self) -> str:
        return display.level_table_repr(self)


@dataclass(frozen=True)
class SpectrumProvenance:
    """How a :class:`FreeSpectrum` was obtained, how accurate it is, and what backs it.

    Attributes
    ----------
    method : str
        ``"fast"`` or ``"certified"``.
    path : str
        The route taken (which polynomial, which root finder).
    bounds : str
        What the error bounds mean (rigorous enclosures or estimates).
    guaranteed : bool
        True when a theorem proves that the single polynomial gives the spectrum.
    guarantee : str
        The guarantee in words (``"proven: ..."`` or ``"NOT GUARANTEED: ..."``), from the
        verdict (:class:`freeladder.Guarantee`).
    theorem, reference : str
        The theorem that applies and where it is published (empty when none applies).
    reach : int or None
        The reach p of an exclusion chain, else None (also for a chain of variable reach
        along an indifference ordering: ``path`` then says so).
    count : int
        Number of quasi-energies of the model (S), also when only the lowest were kept.
    max_error_bound : float
        The largest of the per-quasi-energy error bounds.
    sum_rules : mapping or None
        Relative residuals of ``sum eta^N = sum c^N`` and ``sum eta^{2N} = (sum c^N)^2 -
        2 C_2`` (None when only the lowest quasi-energies were kept).
    seconds : float
        Wall-clock time of :func:`free_spectrum`.
    finder : mapping
        Details reported by the root finder (sweeps, evaluations, convergence, ...).
    sector : mapping or None
        On the Jordan-Wigner route (``free_spectrum(m, sector=...)``): the cycle strings, their
        values in this sector, the labels merged, the parity constraints and how the sector was
        chosen; None on the polynomial route.
    """

    method: str
    path: str
    bounds: str
    guaranteed: bool
    guarantee: str
    theorem: str
    reference: str
    reach: int | None
    count: int
    max_error_bound: float
    sum_rules: Mapping[str, float] | None
    seconds: float
    finder: Mapping[str, Any] = field(default_factory=dict)
    sector: Mapping[str, Any] | None = None

    def __post_init__(self) -> None:
        object.__setattr__(self, "finder", MappingProxyType(dict(self.finder)))
        if self.sector is not None:
            object.__setattr__(self, "sector", MappingProxyType(dict(self.sector)))
        if self.sum_rules is not None:
            object.__setattr__(self, "sum_rules", MappingProxyType(dict(self.sum_rules)))

    def to_dict(self) -> dict[str, Any]:
        """JSON-ready fields."""
        return json_ready(
            {
                "method": self.method,
                "path": self.path,
                "bounds": self.bounds,
                "guaranteed": self.guaranteed,
                "guarantee": self.guarantee,
                "theorem": self.theorem,
                "reference": self.reference,
                "reach": self.reach,
                "count": self.count,
                "max_error_bound": self.max_error_bound,
                "sum_rules": dict(self.sum_rules) if self.sum_rules is not None else None,
                "seconds": self.seconds,
                "finder": dict(self.finder),
                "sector": dict(self.sector) if self.sector is not None else None,
            }
        )


@dataclass(frozen=True)
class DensityOfStates:
    """Histogram of the many-body levels (real parts) over given energy bins.

    Attributes
    ----------
    edges : ndarray
        Bin edges as given.
    fraction : ndarray
        Fraction of all ``N^S`` choices whose energy falls in each bin (half-open bins
        ``[edges[i], edges[i+1])``, the last one closed).
    counts : ndarray of float
        ``fraction * N^S * degeneracy`` (``inf`` when that overflows; degeneracy 1 when unknown).
        Exact integers (as floats) for the enumeration.
    max_shift : float
        Largest possible distance between a level and the position at which it was counted:
        0 for the exact enumeration, ``sum_k |eta_k - h m_k|`` for the grid convolution.
    method : str
    """

    edges: np.ndarray
    fraction: np.ndarray
    counts: np.ndarray
    max_shift: float
    method: str

    def __post_init__(self) -> None:
        for name in ("edges", "fraction", "counts"):
            object.__setattr__(self, name, readonly_array(getattr(self, name)))

    def to_dict(self) -> dict[str, Any]:
        """JSON-ready fields (a count too large for a float becomes None)."""
        return json_ready(
            {
                "edges": self.edges,
                "fraction": self.fraction,
                "counts": self.counts,
                "max_shift": self.max_shift,
                "method": self.method,
            }
        )


class FreeSpectrum:
    """Quasi-energies of a free model and what follows from them (immutable).

    Attributes
    ----------
    roots : ndarray of complex
        Roots ``y_k`` of the exclusion polynomial, in the order of ``quasi_energies``.
    quasi_energies : ndarray
        ``eta_k`` with ``eta_k^N = 1 / y_k``, sorted by ``|eta|``.  For N = 2 and real positive
        roots, ``eta_k = y_k^{-1/2} > 0`` (float array).  Otherwise the principal N-th root of
        ``1 / y_k`` (complex array): the set of levels ``{sum_k omega^{s_k} eta_k}`` does not
        depend on which N-th root is taken, since the choices ``s_k`` run over all of them.
        A quasi-energy below float64's normal range (about 2.2e-308; disordered chains reach
        1e-1000) is stored rounded (0.0 or a subnormal): its value is in
        ``log_quasi_energies``, and :attr:`gap` refuses rather than return a rounded gap.
    log_quasi_energies : ndarray of float
        ``ln |eta_k|``, exact to rounding for every quasi-energy (also beyond float64).
    error_bounds : ndarray of float
        Per quasi-energy: bound (or estimate, see ``provenance.bounds``) on the distance to
        the nearest N-th root of the exact ``1 / y_k``.
    constant : complex or float
        The model's constant term, included in every level.
    states : int
        N.
    sites : int
        Number of sites of the model (thermodynamic quantities are per site).
    dimension : int
        Hilbert-space dimension ``N^sites``.
    degeneracy : int or None
        Multiplicity ``N^(L - S)`` of every level when a theorem guarantees the spectrum (see
        :func:`free_spectrum`, Notes), else None; the reason is ``degeneracy_reason``.
    complete : bool
        False when only the ``lowest`` quasi-energies were computed; then quantities that need
        all of them (ground energy, levels, thermodynamics) raise ``ValueError``.
    provenance : SpectrumProvenance
        How the result was obtained, how accurate it is, and whether a theorem guarantees it
        (``provenance.guaranteed``).  A spectrum that is not guaranteed (returned only with
        ``free_spectrum(..., unproven=True)``) says NOT GUARANTEED wherever it prints.
    root_multiplicities : ndarray of int64
        Per quasi-energy, the multiplicity of its root in the polynomial that was solved (one
        component's on the chain paths, the whole model's on the certified route, where equal
        components also repeat roots).  All 1 unless roots coincide, as at an exceptional
        point of complex couplings; such an ``eta`` is listed as often as it counts.
        :attr:`exceptional` and :attr:`exceptional_note` say what follows.
    parity_constraints : tuple of (tuple of int, int)
        Jordan-Wigner sectors with a fixed Majorana parity (N = 2): positions in
        ``quasi_energies`` and the product ``prod_k (-1)^{s_k}`` every level has over them;
        choices that break one are not levels.  Empty on the polynomial route.
    """

    def __init__(
        self,
        roots_y: np.ndarray,
        quasi_energies: np.ndarray,
        error_bounds: np.ndarray,
        constant: complex | float,
        states: int,
        sites: int,
        degeneracy: int | None,
        degeneracy_reason: str,
        complete: bool,
        provenance: SpectrumProvenance,
        *,
        parity_constraints: Sequence[tuple[Sequence[int], int]] = (),
        log_quasi_energies: np.ndarray | None = None,
        root_multiplicities: np.ndarray | None = None,
    ) -> None:
        if log_quasi_energies is None:
            with np.errstate(divide="ignore"):
                log_quasi_energies = np.log(np.abs(quasi_energies))
        roots_y, quasi_energies, error_bounds, log_quasi_energies = (
            readonly_array(a) for a in (roots_y, quasi_energies, error_bounds, log_quasi_energies)
        )
        mult = (
            np.ones(len(quasi_energies), dtype=np.int64)
            if root_multiplicities is None
            else np.asarray(root_multiplicities, dtype=np.int64)
        )
        if mult.shape != quasi_energies.shape[:1] or (mult.size and mult.min() < 1):
            raise ValueError("root_multiplicities must be integers >= 1, one per quasi-energy")
        constraints = tuple((tuple(int(k) for k in ks), int(p)) for ks, p in parity_constraints)
        if constraints and int(states) != 2:
            raise ValueError("parity constraints are for N = 2 (Majorana sectors)")
        self.__dict__.update(
            roots=roots_y,
            quasi_energies=quasi_energies,
            log_quasi_energies=log_quasi_energies,
            error_bounds=error_bounds,
            constant=constant,
            states=int(states),
            sites=int(sites),
            dimension=int(states) ** int(sites),
            degeneracy=degeneracy,
            degeneracy_reason=degeneracy_reason,
            complete=bool(complete),
            provenance=provenance,
            parity_constraints=constraints,
            root_multiplicities=readonly_array(mult),
        )

    roots: np.ndarray
    quasi_energies: np.ndarray
    log_quasi_energies: np.ndarray
    error_bounds: np.ndarray
    constant: complex | float
    states: int
    sites: int
    dimension: int
    degeneracy: int | None
    degeneracy_reason: str
    complete: bool
    provenance: SpectrumProvenance
    parity_constraints: tuple[tuple[tuple[int, ...], int], ...]
    root_multiplicities: np.ndarray

    @property
    def exceptional(self) -> bool:
        """True when ``P`` has a repeated root (an exceptional point of the couplings)."""
        return bool(np.any(self.root_multiplicities > 1))

    @property
    def exceptional_note(self) -> str:
        """What a repeated root means for the levels ('' when every root is simple).

        At an exceptional point the levels are still the sums ``constant + sum_k omega^{s_k}
        eta_k`` over the quasi-energies counted with multiplicity: the eigenvalues of ``H``
        (with algebraic multiplicity) depend continuously on the couplings, the level formula
        (Fendley 2019) is continuous in the roots, and it holds on the dense set of nearby
        couplings where every root is simple, so it holds at the limit point too.  What fails
        there is the eigenbasis: ``H`` is generally not diagonalizable (for reach 1 with
        N = 2 a repeated root is a Jordan block of the Majorana matrix, which is an unreduced
        tridiagonal matrix and so has one eigenvector per eigenvalue).

        References
        ----------
        P. Fendley, J. Phys. A 52, 335002 (2019), arXiv:1901.08078 (the level formula);
        T. Kato, Perturbation Theory for Linear Operators, Springer (1966), chapter II
        (continuity of eigenvalues; exceptional points).
        """
        if not self.exceptional:
            return ""
        shown: list[int] = []
        for k in np.nonzero(self.root_multiplicities > 1)[0].tolist():
            near = 2 * self.error_bounds[k] + 1e-12 * max(1.0, abs(self.quasi_energies[k]))
            if all(abs(self.quasi_energies[k] - self.quasi_energies[j]) > near for j in shown):
                shown.append(k)
        roots = ", ".join(
            f"{display.number_text(self.quasi_energies[k])} (x{int(self.root_multiplicities[k])})"
            for k in shown
        )
        return (
            f"exceptional point: the exclusion polynomial has repeated roots, eta = {roots}; "
            "the levels are the eigenvalues of H counted with multiplicity (the level formula "
            "is continuous in the roots), but H need not be diagonalizable there (generally "
            "it is not when the repeated root lies within one connected piece of the chain): "
            "the eigenbasis may not exist, and floating-point eigenvalues of H are then only "
            "accurate to about eps^(1/m) for a Jordan block of size m"
        )

    @property
    def guaranteed(self) -> bool:
        """True when a theorem proves that the single polynomial gives the spectrum."""
        return self.provenance.guaranteed

    def __setattr__(self, name: str, value: Any) -> None:
        raise AttributeError(f"FreeSpectrum is immutable (cannot set {name!r})")

    def __delattr__(self, name: str) -> None:
        raise AttributeError(f"FreeSpectrum is immutable (cannot delete {name!r})")

    def __len__(self) -> int:
        return int(self.quasi_energies.shape[0])

    # -- per-mode choices ----------------------------------------------------------------------
    def _mode_table(self) -> tuple[np.ndarray, np.ndarray]:
        """``values[k, r]`` = ``omega^{s} eta_k`` for the r-th best choice ``s = rank[k, r]``."""
        n = self.states
        omega = np.exp(2j * np.pi * np.arange(n) / n)
        if n == 2:
            omega = np.array([1.0, -1.0])
        vals = self.quasi_energies[:, None] * omega[None, :]
        rank = np.argsort(vals.real, axis=1, kind="stable")
        return np.take_along_axis(vals, rank, axis=1), rank

    def _need_complete(self, what: str) -> None:
        if not self.complete:
            raise ValueError(
                f"{what} needs all {self.provenance.count} quasi-energies; this "
                f"spectrum holds only the lowest {len(self)} (free_spectrum(..., lowest=None))"
            )

    @property
    def ground_energy(self) -> complex | float:
        """The level with the lowest real part: ``constant + sum_k min_s Re(omega^s eta_k)``.

        For ``H = -sum b_j g_j`` with ``b_j > 0`` this is ``constant - sum_k eta_k``
        (BACKGROUND: P. Fendley 2019; F. C. Alcaraz and R. A. Pimenta 2020).  Each mode is
        minimised independently.
        """
        self._need_complete("the ground energy")
        if self.parity_constraints:
            return _scalar(self.levels(1).energies[0])
        vals, _ = self._mode_table()
        return _scalar(self.constant + vals[:, 0].sum())

    @property
    def gap(self) -> float:
        """Lowest excitation above the ground level: ``min_k min_{s != s_0(k)} Re(omega^s eta_k
        - omega^{s_0(k)} eta_k)``, the real part of the energy needed to change one mode.

        For N = 2 this is ``2 min_k eta_k``, including an exponentially small edge mode when
        there is one (the bulk gap is then ``2 eta`` of the next mode).  Levels are counted by
        choice, so the gap is zero when a quasi-energy vanishes; the degeneracy
        :attr:`degeneracy` is not a gap.  Needs only the lowest quasi-energies for N = 2.

        Raises
        ------
        freeladder.roots.result.BeyondFloatError
            (an ``ArithmeticError`` and a ``ValueError``) When the gap lies below float64's
            normal range (about 2.2e-308, as in long
            disordered chains): :attr:`log_gap` gives it, exactly to rounding.  A rounded gap
            (0.0 or a subnormal) is never returned.
        """
        if self.parity_constraints:  # the lowest choice that keeps every parity
            low = self.levels(2).energies
            return float(np.real(low[1] - low[0])) if len(low) > 1 else float("nan")
        if self.states == 2 and np.isrealobj(self.quasi_energies):
            if len(self) == 0:
                return float("nan")
            gap = float(2.0 * np.min(self.quasi_energies))
            if gap < np.finfo(np.float64).tiny and math.isfinite(self.log_gap):
                raise BeyondFloatError(
                    f"the gap 2 eta_1 = {display.log_text(self.log_gap)} lies below float64's "
                    f"range; FreeSpectrum.log_gap = {self.log_gap:.10g} gives its natural logarithm"
                )
            return gap
        vals, _ = self._mode_table()
        if len(self) == 0:
            return float("nan")
        return float(np.min(vals[:, 1].real - vals[:, 0].real))

    @property
    def log_gap(self) -> float:
        """Natural logarithm of :attr:`gap`, exact to rounding also where the gap itself lies
        below float64 (N = 2: ``ln 2 + min_k ln eta_k``)."""
        if len(self) == 0:
            return float("nan")
        if self.states == 2 and np.isrealobj(self.quasi_energies) and not self.parity_constraints:
            return float(math.log(2.0) + np.min(self.log_quasi_energies))
        with np.errstate(divide="ignore"):
            return float(np.log(self.gap))

    def levels(self, k: int | None = 10) -> LevelTable:
        """The ``k`` lowest many-body levels in increasing order of their real part.

        Best-first search over the choices with a heap: modes are sorted by their cheapest
        excitation, and each popped choice spawns at most three successors (raise the last
        changed mode to its next choice, change the next mode too, or move the change to the
        next mode), so ``k`` levels cost ``O(k (S + log k))`` without listing ``N^S`` of them.

        Parameters
        ----------
        k : int or None
            How many levels; None lists all ``N^S`` (refused above :data:`LEVEL_LIMIT`).

        Raises
        ------
        ValueError
            If ``k < 1``, if all levels are asked for and ``N^S > LEVEL_LIMIT``, or if the
            spectrum is incomplete.

        Notes
        -----
        Each choice is reported separately, with the model's degeneracy as its multiplicity;
        choices that coincide in energy (for example at special couplings) are not merged.
        """
        self._need_complete("levels()")
        if k is None:
            self._check_all_levels()
            return self._all_levels()
        k = int(k)
        if k < 1:
            raise ValueError(f"levels(k) needs k >= 1, got {k}")
        if self.parity_constraints:
            return self._constrained_levels(k)
        return self._lowest_levels(k)

    def _lowest_levels(self, k: int) -> LevelTable:
        count = int(min(k, float(self.states) ** len(self)))
        vals, rank = self._mode_table()
        inc = vals.real - vals[:, :1].real  # increments, ascending per mode, inc[:, 0] = 0
        order, costs, changes = _lowest_choices(inc, count)
        occ = np.tile(rank[:, 0].astype(np.int8), (len(costs), 1))
        energies = np.empty(len(costs), dtype=vals.dtype)
        for row, picked in enumerate(changes):
            for i, r in picked:
                occ[row, order[i]] = rank[order[i], r]
            chosen = vals[np.arange(len(self)), _rank_index(rank, occ[row])]
            energies[row] = self.constant + chosen.sum()
        return LevelTable(_maybe_real(energies), occ, self.degeneracy)

    def _keeps_parity(self, occupations: np.ndarray) -> np.ndarray:
        """Which choices (rows of occupations) obey every parity constraint."""
        keep = np.ones(occupations.shape[0], dtype=bool)
        for modes, product in self.parity_constraints:
            odd = occupations[:, list(modes)].sum(axis=1) % 2
            keep &= odd == (0 if product == 1 else 1)
        return keep

    def _constrained_levels(self, k: int) -> LevelTable:
        """The k lowest choices that keep every parity: best-first, filtered; the whole list
        (filtered) when the filter would skip too many."""
        total = 2.0 ** len(self)
        ask = 2 * k
        while True:
            table = self._lowest_levels(ask)
            keep = self._keeps_parity(table.occupations)
            if keep.sum() >= k or ask >= total:
                break
            if ask >= 64 * k + 1024:
                if total > LEVEL_LIMIT:
                    raise ValueError(
                        f"the parity constraints skip more than {ask - int(keep.sum())} of the "
                        f"lowest choices and all 2^{len(self)} are too many to list"
                    )
                table = self._all_levels()
                keep = np.ones(len(table), dtype=bool)  # _all_levels filters already
                break
            ask *= 4
        rows = np.flatnonzero(keep)[:k]
        return LevelTable(
            table.energies[rows].copy(), table.occupations[rows].copy(), self.degeneracy
        )

    def _check_all_levels(self) -> None:
        total = float(self.states) ** len(self)
        if total > LEVEL_LIMIT:
            raise ValueError(
                f"all levels means {self.states}^{len(self)} = {total:.3g} choices, more than "
                f"the limit {LEVEL_LIMIT}; ask for levels(k) with a number k"
            )

    def _all_levels(self) -> LevelTable:
        n, n_modes = self.states, len(self)
        omega = np.array([1.0, -1.0]) if n == 2 else np.exp(2j * np.pi * np.arange(n) / n)
        energies = np.full(1, self.constant, dtype=complex)
        for eta in self.quasi_energies:
            energies = (energies[:, None] + eta * omega[None, :]).ravel()
        occ = np.indices((n,) * n_modes, dtype=np.int8).reshape(n_modes, -1).T
        sort = np.argsort(energies.real, kind="stable")
        if self.parity_constraints:
            sort = sort[self._keeps_parity(occ[sort])]
        return LevelTable(
            _maybe_real(energies[sort]), np.ascontiguousarray(occ[sort]), self.degeneracy
        )

    def density_of_states(self, bins: Sequence[float] | np.ndarray) -> DensityOfStates:
        """Histogram of all ``2^S`` levels over ``bins`` (N = 2, real quasi-energies).

        Up to ``2^20`` choices the levels are enumerated exactly.  Beyond, the distribution is
        the convolution of the per-mode two-point distributions ``(delta(E - eta_k) +
        delta(E + eta_k)) / 2`` on a uniform grid of spacing ``h`` (a sixteenth of the narrowest
        bin, coarsened if the grid would exceed ``2^22`` points); each ``eta_k`` is rounded to
        ``h m_k`` and ``max_shift`` reports how far a level can have moved, so only levels
        that close to a bin edge can be counted in the neighbouring bin.

        With parity constraints (a Jordan-Wigner sector) only the exact enumeration is done:
        ``fraction`` is then of the choices that keep the parities.

        Raises
        ------
        ValueError
            For N > 2, complex quasi-energies, an incomplete spectrum or bad bins, or parity
            constraints with more than ``2^20`` choices.
        """
        self._need_complete("density_of_states()")
        if self.states != 2 or not np.isrealobj(self.quasi_energies):
            raise ValueError("density_of_states() is for N = 2 with real quasi-energies")
        edges = np.asarray(bins, dtype=float)
        if edges.ndim != 1 or edges.shape[0] < 2 or np.any(np.diff(edges) <= 0):
            raise ValueError("bins must be an increasing 1-d array of at least two edges")
        eta = self.quasi_energies
        c = float(np.real(self.constant))
        log_mult = math.log(self.degeneracy or 1)
        if self.parity_constraints:
            if 2.0 ** len(eta) > _EXACT_DOS_LIMIT:
                raise ValueError(
                    f"density_of_states() with parity constraints enumerates the levels: "
                    f"2^{len(eta)} choices exceed the limit 2^20"
                )
            energies = np.real(self._all_levels().energies)
            counts, _ = np.histogram(energies, bins=edges)
            frac = counts / energies.shape[0]
            return DensityOfStates(
                edges, frac, counts * math.exp(log_mult), 0.0, "exact enumeration (parity kept)"
            )
        if 2.0 ** len(eta) <= _EXACT_DOS_LIMIT:
            energies = np.full(1, c)
            for e in eta:
                energies = (energies[:, None] + np.array([e, -e])[None, :]).ravel()
            counts, _ = np.histogram(energies, bins=edges)
            frac = counts / energies.shape[0]
            counts_exact = counts * math.exp(log_mult)
            return DensityOfStates(edges, frac, counts_exact, 0.0, "exact enumeration")
        span = 2.0 * float(eta.sum())
        width = float(np.min(np.diff(edges)))
        # spacing: each rounding moves a level by <= h / 2, so S h / 2 <= width / 4 if possible;
        # the grid is capped so that the S passes over it stay below ~2e8 operations.
        h = max(width / max(16, 2 * len(eta)), span / min(2**22, 2e8 / len(eta)))
        steps = np.rint(eta / h).astype(np.int64)
        half = int(steps.sum())
        dist = np.zeros(2 * half + 1)
        dist[half] = 1.0
        reach = 0
        for m in steps:
            new = np.zeros_like(dist)
            lo, hi = half - reach, half + reach + 1
            new[lo - m : hi - m] += 0.5 * dist[lo:hi]
            new[lo + m : hi + m] += 0.5 * dist[lo:hi]
            dist = new
            reach += int(m)
        grid = c + h * np.arange(-half, half + 1)
        frac, _ = np.histogram(grid, bins=edges, weights=dist)
        with np.errstate(over="ignore"):
            counts = frac * np.exp(len(eta) * math.log(2.0) + log_mult)
        shift = float(np.abs(eta - h * steps).sum())
        return DensityOfStates(edges, frac, counts, shift, f"grid convolution, spacing {h:.3g}")

    # -- display (freeladder.base.display) ----------------------------------------------------
    def __repr__(self) -> str:
        return display.spectrum_repr(self)

    def __str__(self) -> str:
        return display.spectrum_text(self)

    def _repr_html_(self) -> str:
        return display.spectrum_html(self)

    def to_dict(self) -> dict[str, Any]:
        """JSON-ready fields: quasi-energies, error bounds, roots, ground energy, gap (when
        defined), degeneracy, guaranteed (with the NOT GUARANTEED warning when not), provenance.
        """
        log_gap = self.log_gap
        small = math.isfinite(log_gap) and log_gap < math.log(np.finfo(np.float64).tiny)
        gap = self.gap if len(self) and not small else None
        return json_ready(
            {
                "guaranteed": self.guaranteed,
                "warning": display.spectrum_warning(self) or None,
                "states": self.states,
                "sites": self.sites,
                "quasi_energies": self.quasi_energies,
                "log_quasi_energies": self.log_quasi_energies,
                "error_bounds": self.error_bounds,
                "roots": self.roots,
                "constant": self.constant,
                "complete": self.complete,
                "ground_energy": self.ground_energy if self.complete else None,
                "gap": gap,
                "log_gap": log_gap if len(self) else None,
                "degeneracy": self.degeneracy,
                "degeneracy_reason": self.degeneracy_reason,
                "parity_constraints": [
                    {"modes": ks, "product": p} for ks, p in self.parity_constraints
                ],
                "provenance": self.provenance,
            }
        )


def _lowest_choices(
    inc: np.ndarray, count: int
) -> tuple[np.ndarray, list[float], list[tuple[tuple[int, int], ...]]]:
    """The ``count`` cheapest choices by best-first search over per-mode increments.

    ``inc[k, r]`` is the cost of putting mode k on its r-th best choice (``inc[:, 0] = 0``,
    ascending along r).  Modes are sorted by their cheapest excitation (``order``); a choice
    is the tuple of ``(sorted mode, rank)`` changes from the ground choice, and each popped
    choice spawns at most three successors: raise the last changed mode to its next rank,
    change the next mode too, or move a single-rank change on to the next mode.  Every choice
    is reached exactly once, in increasing cost.  Returns ``order``, the costs and the changes.
    """
    n_modes, n = inc.shape
    order = np.argsort(inc[:, 1], kind="stable") if n_modes and n > 1 else np.arange(n_modes)
    inc_sorted = inc[order]
    costs: list[float] = [0.0]
    changes: list[tuple[tuple[int, int], ...]] = [()]
    heap: list[tuple[float, int, int, int, tuple[tuple[int, int], ...]]] = []
    counter = 0
    if n_modes and n > 1:
        heap.append((float(inc_sorted[0, 1]), counter, 0, 1, ((0, 1),)))
    while len(costs) < count and heap:
        cost, _, i, r, picked = heapq.heappop(heap)
        costs.append(cost)
        changes.append(picked)
        succ = []
        if r + 1 < n:
            raised = cost - inc_sorted[i, r] + inc_sorted[i, r + 1]
            succ.append((raised, i, r + 1, picked[:-1] + ((i, r + 1),)))
        if i + 1 < n_modes:
            succ.append((cost + inc_sorted[i + 1, 1], i + 1, 1, picked + ((i + 1, 1),)))
            if r == 1:
                moved = cost - inc_sorted[i, 1] + inc_sorted[i + 1, 1]
                succ.append((moved, i + 1, 1, picked[:-1] + ((i + 1, 1),)))
        for c, ii, rr, ch in succ:
            counter += 1
            heapq.heappush(heap, (float(c), counter, ii, rr, ch))
    return order, costs, changes


def _rank_index(rank: np.ndarray, occ: np.ndarray) -> np.ndarray:
    """Column of ``vals`` (sorted choices) that holds choice ``occ[k]`` for each mode."""
    return np.argmax(rank == occ[:, None], axis=1)


def _maybe_real(values: np.ndarray) -> np.ndarray:
    if np.iscomplexobj(values) and np.all(values.imag == 0):
        return values.real.copy()
    return values


def _scalar(v: Any) -> complex | float:
    v = complex(v)
    return v.real if v.imag == 0 else v


# -- computing the spectrum ----------------------------------------------------------------------
def free_spectrum(
    m: Model,
    method: str = "auto",
    lowest: int | None = None,
    *,
    unproven: bool = False,
    sector: str | Sequence[int] | Mapping[Any, int] | None = None,
) -> FreeSpectrum:
    """Quasi-energies of ``H = constant + sum_j c_j g_j`` from the roots of its polynomial P,
    or, for Jordan-Wigner models, in one sector of their conserved cycle and parity strings.

    Parameters
    ----------
    m : Model
        Numeric couplings (substitute symbols first with ``m.subs``).
    method : "auto", "fast" or "certified"
        ``"auto"``: exclusion chains go through the recurrence (real roots by counting and
        bisection for N = 2 with real couplings, :mod:`freeladder.roots.real`; Aberth-Ehrlich in
        the complex plane otherwise, :mod:`freeladder.roots.complex`), and so do oriented
        indifference orders (variable range) with N > 2 or complex couplings; any other
        frustration graph goes through the exact polynomial and certified roots.  ``"fast"``: the
        recurrence only (chains).  ``"certified"``: rigorous enclosures -- sign changes in
        ball arithmetic for real chains (:mod:`freeladder.roots.certify`), certified isolation of
        the roots of the exact polynomial otherwise (python-flint).
    lowest : int, optional
        Keep only the ``lowest`` smallest quasi-energies (``|eta|``).  The chain paths
        (real and complex) then compute only those; the others compute all roots and drop
        the rest.
    unproven : bool, default False
        Return the numbers even when no theorem guarantees that the single polynomial gives
        the spectrum; the result then says NOT GUARANTEED wherever it prints.
    sector : "ground", "all", a sequence of +-1 or a mapping, optional
        Pauli models whose frustration graph is a line graph only: solve the Majorana
        quadratic form of one sector (:func:`freeladder.jordan_wigner_spectrum`), guaranteed
        sector by sector (Chapman-Flammia 2020).  "ground": the sector holding the lowest
        level (exhaustive search up to ``2^16`` sectors, else Lieb's flux theorem where
        :func:`freeladder.flux_theorem_values` applies, else refused).  A sequence: a label
        as ``fl.sectors(m).sectors`` lists it (cycle values then parity values: that sector
        alone), or the eigenvalues of :attr:`SectorStructure.cycle_operators` only.  A
        mapping: conserved strings to their values, which must leave one set of cycle values.
        "all": only when there is one (no cycles).  Values are the integers +1 and -1; any
        other label is refused with the list of valid ones
        (:meth:`SectorStructure.select`).  Unless a full label fixes them, the parity strings
        are not fixed by the choice: every consistent value is included, and a parity the
        relations fix becomes
        :attr:`FreeSpectrum.parity_constraints`.  Real or complex couplings; ``method``
        "auto" or "fast".

    Returns
    -------
    FreeSpectrum

    Raises
    ------
    NoTheoremError
        When no theorem guarantees that the single polynomial gives the spectrum (see
        :class:`freeladder.Guarantee`), ``unproven`` is False and no ``sector`` is
        given.  The message names the reason, the witness terms and what to do instead (for
        line graphs with cycles: ``sector="ground"``).
    TooLargeError
        For ``sector="ground"`` when neither the search nor the flux theorem can decide.
    ValueError
        For symbolic couplings, an unknown method, ``method="fast"`` on a model that is not an
        exclusion chain, ``lowest < 1``, or a model with no terms.

    Notes
    -----
    The guarantee is :func:`freeladder.guarantee` (the one on the verdict): exclusion
    chains (any N; Alcaraz-Pimenta 2020), line graphs of forests (Chapman-Flammia 2020) and,
    for N = 2, claw-free, even-hole-free frustration graphs (Elman-Chapman-Flammia 2021), in
    each case with no product of terms equal to a multiple of the identity
    (:func:`freeladder.find_relations`).  Refused: unsolved and integrable verdicts,
    line graphs with cycles, even holes or an undecided even-hole search, and relations among
    the strings.

    Guaranteed spectra carry the multiplicity ``N^(L - S)`` of every level (L sites, S
    quasi-energies): with independent strings, every product of terms that is not a multiple
    of the identity is traceless, so each symmetry sector appears equally often.  This was
    checked against dense exact diagonalization on hundreds of random models
    (``tests/test_guarantee.py``).

    References
    ----------
    F. C. Alcaraz and R. A. Pimenta, Phys. Rev. B 102, 121101(R) (2020), arXiv:2005.14622;
    A. Chapman and S. T. Flammia, Quantum 4, 278 (2020);
    S. J. Elman, A. Chapman and S. T. Flammia, Commun. Math. Phys. 388, 969 (2021).

    Examples
    --------
    >>> import freeladder as fl
    >>> sp = fl.free_spectrum(fl.exclusion_chain(4))    # uniform Ising: 2 cos(pi k / 6)
    >>> [round(float(e), 12) for e in sp.quasi_energies]
    [1.0, 1.732050807569]
    """
    couplings = _checked_request(m, method, lowest)
    start_time = time.perf_counter()
    if sector is not None:
        return _sector_spectrum(m, sector, method, lowest, start_time)
    n = m.states
    chain = chain_structure(m)
    ordering = None if chain is not None else _ordering(m, couplings)
    if chain is None and method == "fast" and ordering is None:
        raise ValueError(
            "method='fast' evaluates the exclusion-chain recurrence, and this model's terms do "
            "not form an exclusion chain (nor, for N = 2 with real couplings, an indifference "
            "ordering); use method='auto' or 'certified'"
        )
    promise = guarantee(m)
    if not promise.proven and not unproven:
        if method != "certified" and _one_cycle_sector(m):
            # the relations fix every cycle value: that single sector is the whole model
            return _sector_spectrum(m, "all", method, lowest, start_time)
        raise NoTheoremError(_refusal_message(m, promise))
    found = _find_roots(m, couplings, chain, ordering, method, lowest)
    prov = root_methods.provenance(found)
    if found.details.get("ordering"):
        prov["path"] += f" along {found.details['ordering']}"
    # scaled back without overflow; beyond float64 rounded here, exact in the logarithms
    eta, eta_err = found.quasi_energies(n, beyond_float="round")
    log_eta = found.log_quasi_energies(n)[0]
    true = found.true_values()[0]
    with np.errstate(divide="ignore", over="ignore", under="ignore", invalid="ignore"):
        y_vals = np.asarray(true if found.variable == "y" else 1.0 / true, dtype=complex)
    if n == 2 and promise.proven and np.isrealobj(couplings) and np.iscomplexobj(eta):
        eta = _real_rooted(eta, eta_err)
    listed = found.details.get("multiplicity")
    mult = np.ones(len(eta), dtype=np.int64) if listed is None else np.asarray(listed)
    sort = np.argsort(log_eta, kind="stable")
    eta, eta_err, y_vals, log_eta = eta[sort], eta_err[sort], y_vals[sort], log_eta[sort]
    mult = mult[sort]
    count = int(prov.pop("count", len(eta)))
    if lowest is not None:
        keep = int(lowest)
        eta, eta_err, y_vals, log_eta = eta[:keep], eta_err[:keep], y_vals[:keep], log_eta[:keep]
        mult = mult[:keep]
    complete = len(eta) == count
    degeneracy, reason = _degeneracy(m, promise.proven, count)
    provenance = SpectrumProvenance(
        method=str(prov.pop("method")),
        path=str(prov.pop("path")),
        bounds=str(prov.pop("bounds")),
        guaranteed=promise.proven,
        guarantee=str(promise),
        theorem=promise.theorem,
        reference=promise.reference,
        reach=None if chain is None else int(chain.reach),
        count=count,
        max_error_bound=float(np.max(eta_err)) if len(eta_err) else 0.0,
        sum_rules=_residuals(m, eta, couplings, ordering) if complete else None,
        seconds=time.perf_counter() - start_time,
        finder=prov,
    )
    constant = _scalar(m.constant) if m.constant != 0 else 0.0
    return FreeSpectrum(
        y_vals,
        eta,
        eta_err,
        constant,
        n,
        len(m.sites),
        degeneracy,
        reason,
        complete,
        provenance,
        log_quasi_energies=log_eta,
        root_multiplicities=mult,
    )


def _sector_spectrum(
    m: Model,
    sector: str | Sequence[int] | Mapping[Any, int],
    method: str,
    lowest: int | None,
    start_time: float,
) -> FreeSpectrum:
    """The Jordan-Wigner route of :func:`free_spectrum`: one sector as a FreeSpectrum."""
    if m.states != 2 or classify(m).kind != "jordan-wigner":
        raise ValueError(
            "sector= selects a sector of the conserved cycle strings of a Jordan-Wigner model "
            f"(Pauli terms, line-graph frustration graph); this model's verdict is "
            f"{classify(m).kind!r} (N = {m.states})"
        )
    if method == "certified":
        raise ValueError(
            "the sector route diagonalises the single-particle matrix in floating point "
            "(error estimates, not enclosures): use method='auto'"
        )
    if isinstance(sector, str) and sector == "ground":
        jw = jordan_wigner_spectrum(m, "ground")
        selection = f"the ground sector, by {jw.selection}"
    else:
        jw = jordan_wigner_spectrum(m, sector)
        selection = jw.selection
    merged = flux_sector(jw)
    eta = np.asarray(merged.quasi_energies)
    if not np.iscomplexobj(eta) or not np.any(eta.imag):
        eta = np.real(eta).astype(float)
    with np.errstate(divide="ignore", invalid="ignore"):
        y_vals = np.asarray(1.0 / np.asarray(eta, dtype=complex) ** 2)
    bounds = np.full(len(eta), jw.error_bound)
    count = len(eta)
    complete = lowest is None or int(lowest) >= count
    c2 = m.coupling_array().astype(complex) ** 2
    residual = abs(complex(np.sum(eta.astype(complex) ** 2)) - complex(c2.sum()))
    residual /= max(float(np.abs(c2).sum()), 1e-300)
    summary = f"cycle values {merged.cycle_values}: {selection}"
    if merged.parity_constraints:
        summary += f"; {len(merged.parity_constraints)} Majorana parity constraint(s)"
    struct = jw.structure
    provenance = SpectrumProvenance(
        method="jordan-wigner",
        path=(
            "Majorana bilinears on the root graph; "
            + (
                "eigenvalue pairs and Pfaffian"
                if np.iscomplexobj(m.coupling_array())
                else "singular values (bipartite) or Householder tridiagonal form, and the "
                "Pfaffian's sign"
            )
            + f" of the single-particle matrix of the sector ({count} mode pairs)"
        ),
        bounds="estimate (backward-stable decomposition), not a proof",
        guaranteed=True,
        guarantee=(
            "proven: the terms are Majorana bilinears (line-graph frustration graph), so in "
            f"each sector of the conserved cycle and parity strings the spectrum is free "
            f"({CHAPMAN_FLAMMIA_2020}); sector: {selection}"
        ),
        theorem="generalised Jordan-Wigner transformation, sector by sector",
        reference=CHAPMAN_FLAMMIA_2020,
        reach=None,
        count=count,
        max_error_bound=float(jw.error_bound),
        sum_rules={"sum eta^N": float(residual)},
        seconds=time.perf_counter() - start_time,
        finder={"sectors merged": len(jw.sectors)},
        sector={
            "summary": summary,
            "selection": selection,
            "cycle_operators": tuple(str(g) for g in struct.cycle_operators),
            "cycle_values": merged.cycle_values,
            "labels": merged.labels,
            "parity_constraints": len(merged.parity_constraints),
        },
    )
    keep = count if complete else int(lowest or count)
    reason = (
        f"every level of this sector has multiplicity {merged.multiplicity} (sector dimension "
        "over the Majorana representation)"
    )
    constant = _scalar(m.constant) if m.constant != 0 else 0.0
    return FreeSpectrum(
        y_vals[:keep],
        eta[:keep],
        bounds[:keep],
        constant,
        2,
        len(m.sites),
        merged.multiplicity,
        reason,
        complete,
        provenance,
        parity_constraints=merged.parity_constraints if complete else (),
    )


def _one_cycle_sector(m: Model) -> bool:
    """True for a Jordan-Wigner model with cycles whose consistent sectors all share one set of
    cycle values (the relations among the cycle and parity strings fix every cycle value).
    Models without cycles that are refused for a relation keep their refusal."""
    if m.states != 2 or classify(m).kind != "jordan-wigner":
        return False
    try:
        structure = sectors(m)
        labels = structure.sectors
    except ValueError:  # too many sectors to list
        return False
    cycles = len(structure.cycle_operators)
    return cycles > 0 and len({label[:cycles] for label in labels}) == 1


def _real_rooted(eta: np.ndarray, bounds: np.ndarray) -> np.ndarray:
    """Real quasi-energies of a real-rooted theorem, from a complex root finder's output.

    For N = 2 with real couplings the weights ``c^2`` are positive and every theorem that
    guarantees the spectrum makes ``P`` real-rooted with positive roots (the independence
    polynomial of a claw-free graph has only real roots: M. Chudnovsky and P. Seymour,
    J. Combin. Theory B 97, 350 (2007); line graphs and chains are claw-free), so each exact
    ``eta`` is real and positive.  The real parts are returned when every imaginary part lies
    within its error bound (the bound covers the distance to the exact, real, value); the
    complex array is kept otherwise.
    """
    within = np.abs(eta.imag) <= bounds + 4 * np.finfo(float).eps * np.abs(eta)
    if not np.all(within & (eta.real > 0)):
        return eta
    return np.ascontiguousarray(eta.real, dtype=float)


def _residuals(
    m: Model,
    eta: np.ndarray,
    couplings: np.ndarray,
    ordering: tuple[np.ndarray, np.ndarray] | None,
) -> dict[str, float]:
    """Relative residuals of the two power-sum rules
    (:func:`freeladder.roots.polynomial.sum_rules`).

    Along an indifference ordering the targets ``C_1`` and ``C_1**2 - 2 C_2`` come in O(M)
    from :func:`freeladder.chain_inverse_power_sums` (the exact polynomial of a large
    non-chain graph is not built), scaled like ``sum_rules`` so that nothing overflows.
    """
    if ordering is not None and m.states == 2 and np.isrealobj(couplings):
        c = couplings[ordering[0]]
        e = int(np.frexp(np.max(np.abs(c)))[1])
        targets = chain_inverse_power_sums(np.ldexp(c, -e) ** 2, ordering[1])
        with np.errstate(over="ignore", under="ignore"):
            x = np.ldexp(np.abs(eta), -e) ** 2  # N = 2, real positive roots: eta**2 = |eta|**2
        out = []
        for j, want in ((1, targets[0]), (2, targets[1])):
            size = max(float(np.sum(np.abs(x) ** j)), abs(want), 1e-300)
            out.append(abs(float(np.sum(x**j)) - want) / size)
        return {"sum eta^N": out[0], "sum eta^2N": out[1]}
    first, second = sum_rules(exclusion_polynomial(m), eta).residuals
    return {"sum eta^N": float(first), "sum eta^2N": float(second)}


def _checked_request(m: Model, method: str, lowest: int | None) -> np.ndarray:
    """Validate the arguments of :func:`free_spectrum`; the numeric couplings."""
    if method not in ("auto", "fast", "certified"):
        raise ValueError(f"method must be 'auto', 'fast' or 'certified', not {method!r}")
    if not isinstance(m, Model):
        raise TypeError(f"free_spectrum needs a Model, got {type(m).__name__}")
    if len(m) == 0:
        raise ValueError("the model has no terms, hence no quasi-energies")
    if lowest is not None and int(lowest) < 1:
        raise ValueError(f"lowest must be >= 1, got {lowest}")
    return m.coupling_array()  # raises for symbolic couplings


def _refusal_message(m: Model, promise: Guarantee) -> str:
    """Why free_spectrum refuses, and what to do instead."""
    reason, instead = refusal_text(m, promise)
    return f"{reason} Instead: {instead}"


def refusal_text(m: Model, promise: Guarantee) -> tuple[str, str]:
    """Why no theorem guarantees the single polynomial's spectrum, and what to do instead."""
    reason = "no theorem guarantees that the single exclusion polynomial gives this spectrum. "
    reason += promise.reason
    if promise.witness_text:
        reason += f" Witness terms: {promise.witness_text}."
    instead = ""
    if m.states == 2 and classify(m).kind == "jordan-wigner":
        instead += (
            'the terms are Majorana bilinears, so free_spectrum(m, sector="ground") solves '
            "the model exactly in the sector holding the ground state (sector=(+1, -1, ...) "
            'for a chosen one; fl.jordan_wigner_spectrum(m, "all") gives every sector); '
        )
    instead += "fl.verify(m) probes the model numerically"
    if m.dimension <= DENSE_LIMIT:
        instead += f"; fl.exact_spectrum(m) gives the exact levels (dimension {m.dimension})"
    instead += "; free_spectrum(m, unproven=True) returns the numbers, marked NOT GUARANTEED."
    return reason, instead


def _find_roots(
    m: Model,
    couplings: np.ndarray,
    chain: ChainStructure | None,
    ordering: tuple[np.ndarray, np.ndarray] | None,
    method: str,
    lowest: int | None,
) -> RootTable:
    """The roots of P by the method the table (:mod:`freeladder.roots.methods`) chooses.

    A model that is not one fixed-reach chain but has an ordering (:func:`_ordering`: an
    indifference ordering for N = 2, chains or oriented indifference orders component by
    component for N > 2) takes the chain recurrence with per-position reach -- the real path
    for N = 2 with real couplings, the complex one otherwise; ``details["ordering"]`` then says
    so.  Certified requests for it take the exact polynomial (the chain certificate handles
    fixed reach only).
    """
    n = m.states
    if method == "certified" and chain is not None and not (n == 2 and np.isrealobj(couplings)):
        found = root_methods.solve_general(m)
    elif chain is not None:
        found = root_methods.solve_chain(couplings[chain.order], chain.reach, n, method, lowest)
    elif ordering is not None and method != "certified":
        order, back = ordering
        found = root_methods.solve_chain(couplings[order], back, n, method, lowest)
        text = "an indifference ordering of the frustration graph (per-position reach)"
        found = dataclasses.replace(found, details=dict(found.details, ordering=text))
    else:
        found = root_methods.solve_general(m)
    return found


def _ordering(m: Model, couplings: np.ndarray) -> tuple[np.ndarray, np.ndarray] | None:
    """``(term order, back-reach)`` of the recurrence when the model is not one fixed chain.

    N = 2: an indifference ordering from :func:`freeladder.indifference_order`
    (cached with the model's strings; for N = 2 the orientation does not matter).  N > 2: every
    component of the verdict must be hidden-free with a chain or an oriented indifference
    order.  Components one after another, back-reach 0 at each component's start; None for
    other models.
    """
    if len(m) == 0:
        return None
    if m.states == 2:
        found = indifference_order(m)
        if found is None:
            return None
        order = np.asarray(found.order, dtype=np.int64)
        back = np.arange(order.size) - np.asarray(found.first_neighbour, dtype=np.int64)
        return order, back
    terms_all: list[int] = []
    backs: list[int] = []
    for comp in classify(m).components:
        if comp.kind != "hidden-free":
            return None
        if comp.chain is not None:
            terms = [int(t) for t in comp.chain.order]
            backs += [min(k, int(comp.chain.reach)) for k in range(len(terms))]
        elif comp.indifference is not None:
            terms = list(comp.indifference.order)
            backs += [k - f for k, f in enumerate(comp.indifference.first_neighbour)]
        else:
            return None
        terms_all += terms
    return np.array(terms_all, dtype=np.int64), np.array(backs, dtype=np.int64)


def _degeneracy(m: Model, proven: bool, count: int) -> tuple[int | None, str]:
    """Multiplicity ``N^(L - S)`` of every level of a guaranteed spectrum (see free_spectrum)."""
    if not proven:
        return None, "no theorem covers the model: degeneracies need not be uniform"
    spare = len(m.sites) - count
    if spare < 0:
        return None, f"{count} quasi-energies but only {len(m.sites)} sites"
    return m.states**spare, (
        f"independent strings under a free-spectrum theorem: every level has multiplicity "
        f"dim / N^S = {m.states}^{spare}"
    )
