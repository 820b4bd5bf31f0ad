"""Checks that a model's free spectrum is what the theorems promise, each with how and how well.

:func:`verify` runs, where they apply:

* **commutation** -- ``[H, Q^(s)] = 0`` and ``[Q^(r), Q^(s)] = 0`` for every order, either all
  at once by an exact sweep over the terms (:mod:`freeladder.sweep`; ``[H, Q^(s)]`` is its
  r = 1 row) or pair by pair in the exact string algebra
  (:class:`~freeladder.StringSum`, no matrices), whichever is estimated cheaper;
* **inversion relation** -- ``T(u) T(-u) = P(u^2)`` (N = 2) and
  ``T(u) T(omega u) ... T(omega^{N-1} u) = P(u^N)`` (clock chains), for every u, by the
  sweep; symbolic couplings fall back to the string algebra at one u;
* **ladder relations** -- ``[H, Psi_{+-k}] = +-2 eta_k Psi_{+-k}`` for small N = 2 systems, one
  edge mode per connected component of the frustration graph;
* **sum rules** -- ``sum eta^N = sum c^N`` and ``sum eta^{2N} = (sum c^N)^2 - 2 C_2`` (they test
  the roots against the polynomial, so they are not decisive on their own);
* **exact diagonalization** -- the whole spectrum with multiplicities against the free levels
  (:func:`freeladder.match_levels`).

A check that cannot apply raises :class:`~freeladder.base.errors.CheckNotApplicable` and is listed
as "not run" with the reason; any other exception is a failure of that check, its traceback kept.
For a model no theorem covers, the spectral checks test the unproven numbers as a probe and the
report says so.  :attr:`Report.ok` and :attr:`Report.problems` say what "ok" requires.

References
----------
S. J. Elman, A. Chapman and S. T. Flammia, Commun. Math. Phys. 388, 969 (2021),
arXiv:2012.07857 (commuting charges, inversion relation, N = 2);
P. Fendley, J. Phys. A 52, 335002 (2019), arXiv:1901.08078 (transfer matrix, ladder operators);
F. C. Alcaraz and R. A. Pimenta, Phys. Rev. B 102, 121101(R) (2020), arXiv:2005.14622 (clock
chains, general p and N).
"""

from __future__ import annotations

import math
import time
import traceback
from collections.abc import Callable, Sequence
from dataclasses import dataclass, field, replace
from fractions import Fraction
from typing import Any

import numpy as np
import scipy.sparse as sps

from ..algebra.model import Model
from ..algebra.operators import StringSum
from ..algebra.printing import format_terms
from ..algebra.strings import StringArray
from ..analysis import Analysis, analyze, sector_route
from ..base import display
from ..base.errors import CheckNotApplicable, TooLargeError
from ..base.interrupt import poll, polled
from ..base.jsonready import json_ready
from ..base.references import (
    ALCARAZ_PIMENTA_2020,
    CHAPMAN_FLAMMIA_2020,
    ELMAN_CHAPMAN_FLAMMIA_2021,
    FENDLEY_2019,
)
from ..graphs.graph import chain_structure
from ..roots.polynomial import exclusion_polynomial, sum_rules
from ..roots.real import chain_back, chain_root_count
from ..spectra.charges import charge
from ..spectra.ed import (
    DENSE_LIMIT,
    SECTOR_DENSE_LIMIT,
    SPARSE_CHECK_LIMIT,
    ExactSpectrum,
    exact_spectrum,
    sector_dimension,
    sector_exact_spectrum,
    sparse_memory,
)
from ..spectra.edge import _live_terms, components, ladder_operators
from ..spectra.majorana import jordan_wigner_spectrum, sectors
from ..spectra.matching import match_levels
from ..spectra.spectrum import FreeSpectrum, _ordering
from . import charge_sweep
from .charge_sweep import SweepResult, commutator_sweep, inversion_sweep
from .hypotheses import independent_along, ordering_hypotheses
from .power_sums import MOMENTS, compare_moments

__all__ = [
    "ED_AUTO_DIMENSION",
    "FLOAT_RTOL",
    "LADDER_DIMENSION",
    "MAX_PAIRS",
    "ROUTES_TERMS",
    "Check",
    "Report",
    "charge_pairs_check",
    "exact_diagonalization_check",
    "hamiltonian_check",
    "hypotheses_check",
    "inversion_check",
    "linear_seconds",
    "ladder_check",
    "lowest_levels_check",
    "pairwise_check",
    "power_sum_check",
    "same_sector_check",
    "sector_lowest_check",
    "sum_rule_check",
    "transfer_from_charges",
    "verify",
    "window_check",
]

ED_AUTO_DIMENSION = DENSE_LIMIT
"""``exact_diagonalization="auto"`` compares with exact diagonalization up to this dimension."""

LADDER_DIMENSION = 1024
"""Ladder relations are checked with sparse matrices up to this dimension."""

ROUTES_TERMS = 2000
"""The two routes are compared up to this many terms (the Majorana route is a dense solve:
327 s for 10^4 terms, measured here)."""

MAX_PAIRS = 2_000_000
"""Largest ``len(A) * len(B)`` for which an exact product or commutator of two sums is formed."""

FLOAT_RTOL = 1e-9
"""Relative tolerance of floating-point checks (string algebra and spectra)."""

SWEEP_COORDINATE_SECONDS = 2.5e-6
"""Cost of a sweep per evaluation point and squared rational coordinate of each step (see
``charge_sweep._commutator_work``): 1.6e-6 s on reach-2 chains (18 coordinates per step) and
2.6e-6 s on line graphs of random trees of 24 terms (up to 512 coordinates: 66 points, 135 s),
measured here (2-core machine, loaded)."""

CHECK_BUDGET_SECONDS = 20.0
"""A commutation route estimated to take longer is not started; the check is "not run" with
both estimates (so that verify's time grows with the model's frontier, not in jumps)."""

PRODUCT_SECONDS = 3e-7
"""Cost of one product of two strings in the string algebra: 1.05 s for the 3.8 x 10^6 products
of [H, Q(s)] on a 30-term reach-2 chain, measured here."""

LIST_SECONDS = 2e-5
"""Cost of listing one independent set as a product: 2.6 s for the 1.25 x 10^5 sets of a 30-term
reach-2 chain, measured here."""

_ECF = ELMAN_CHAPMAN_FLAMMIA_2021
_FENDLEY = FENDLEY_2019
_AP = ALCARAZ_PIMENTA_2020

H_CHARGES = "[H, Q(s)] = 0"
PAIRS = "[Q(r), Q(s)] = 0"
LADDER = "[H, Psi(+-k)] = +-2 eta_k Psi(+-k)"
SUM_RULES = "sum rules for eta^N and eta^2N"
EXACT = "spectrum = exact diagonalization"
SECTORS = "sector spectra = exact diagonalization"
CONSERVED = "cycle and parity strings commute with H"
ROUTES = "polynomial and Jordan-Wigner routes agree"
HYPOTHESES = "theorem hypotheses on the ordering"
POWER_SUMS = "roots = power sums of P"
WINDOWS = "[H, Q(s)] = 0 on windows, low orders"
LOWEST = "lowest levels = sparse exact diagonalization"

SPARSE_AUTO_DIMENSION = 2**16
"""``exact_diagonalization="auto"`` compares the lowest levels sparsely up to this dimension
(True: up to :data:`freeladder.spectra.ed.SPARSE_CHECK_LIMIT`, 2^22)."""

SPARSE_LEVELS = 8
"""How many lowest eigenvalues (with multiplicity) the sparse comparison takes."""

WINDOW_ORDERS = 3
"""Highest order s of the window check (Q(3) is the lowest order a claw breaks)."""

MAX_WINDOW_KINDS = 400
"""Largest number of distinct windows the window check computes."""

MOMENT_SECONDS = 4e-7
"""Cost of one (term, moment) step of :func:`power_sum_check`: 0.64 s for 10^5 terms and 8
positive plus 8 negative moments (reach-2 chain), measured here."""

WINDOW_SECONDS = 5e-5
"""Cost per term of the window check's keys: 4.8 s for 10^5 terms (reach 2), measured here."""

_tamper: Callable[[FreeSpectrum], FreeSpectrum] | None = None
"""Test hook: when set, verify checks ``_tamper(spectrum)`` instead of the spectrum (tests use
it to show that a perturbed quasi-energy fails)."""


@dataclass(frozen=True)
class Check:
    """One verification step.

    Attributes
    ----------
    name : str
        What is checked.
    method : str
        How: exact string algebra, floating point, sparse matrices, exact diagonalization.
    tolerance : float
        0.0 for exact checks; otherwise the threshold ``value`` is compared with.
    value : float
        The measured discrepancy (largest coefficient left over, relative deviation ...).
    passed : bool or None
        None when the check could not run (see ``detail``).
    detail : str
        Sizes, what was skipped and why.
    reference : str
        The published statement that is being checked.
    seconds : float
        Time taken.
    traceback : str
        When the check crashed (a failure): the traceback of the exception.
    decisive : bool
        True when the check can fail for a model whose spectrum is not free (the sum rules only
        test the root finder against the polynomial's coefficients: not decisive).
    required : bool
        The caller asked for this check: when it does not run, the report is not ok.
    claimed : bool
        False when the theorem that covers the model does not claim this identity (the
        single-polynomial identities of a model that is free only sector by sector): when it
        does not hold, the report says so, but it is not a failure.
    """

    name: str
    method: str
    tolerance: float
    value: float
    passed: bool | None
    detail: str
    reference: str = ""
    seconds: float = 0.0
    traceback: str = ""
    decisive: bool = True
    required: bool = False
    claimed: bool = True

    @property
    def status(self) -> str:
        """``"passed"``, ``"FAILED"``, ``"not run"``, or ``"does not hold"`` (not claimed)."""
        if self.passed is False and not self.claimed:
            return "does not hold"
        return {True: "passed", False: "FAILED", None: "not run"}[self.passed]

    def to_dict(self) -> dict[str, Any]:
        """The fields (and ``status``) as JSON-ready values."""
        out = {k: getattr(self, k) for k in self.__dataclass_fields__}
        out["status"] = self.status
        return json_ready(out)  # type: ignore[no-any-return]


@dataclass(frozen=True)
class Report:
    """The checks run by :func:`verify`.

    Attributes
    ----------
    checks : tuple of Check
    model_text : str
    notes : tuple of str
    verdict : str
        Which theorem covers the model, and whether the spectral checks tested guaranteed or
        unproven numbers.
    complete : bool
        False when the run was interrupted (KeyboardInterrupt): the checks listed are those that
        finished.
    guaranteed : bool or None
        Whether a theorem guarantees the free spectrum that the spectral checks tested (None:
        no spectrum was computed, e.g. symbolic couplings).
    """

    checks: tuple[Check, ...]
    model_text: str = ""
    notes: tuple[str, ...] = field(default=())
    verdict: str = ""
    complete: bool = True
    guaranteed: bool | None = None

    @property
    def ok(self) -> bool:
        """True when the run is complete, no check failed, every check the caller asked for ran,
        and at least one decisive check (one that can fail for a model that is not free) passed;
        for a spectrum no theorem guarantees, the comparison with exact diagonalization must be
        among them (the identities of the charges do not prove the spectrum without a theorem).
        Checks that cannot apply ("not run") do not count either way."""
        return not self.problems

    @property
    def problems(self) -> tuple[str, ...]:
        """Why the report is not ok (empty when it is)."""
        out = []
        if not self.complete:
            out.append("the run was interrupted: the report is incomplete")
        out.extend(f"{c.name} FAILED" for c in self.failed)
        out.extend(
            f"{c.name} was asked for but did not run"
            for c in self.checks
            if c.required and c.passed is None
        )
        if not any(c.passed is not None and c.decisive for c in self.checks):
            out.append("no decisive check ran (none that could fail for a model that is not free)")
        confirmed = any(c.passed and c.name in (EXACT, SECTORS, LOWEST) for c in self.checks)
        if self.guaranteed is False and not confirmed:
            out.append(
                "no theorem guarantees the free spectrum and exact diagonalization did not "
                "confirm it"
            )
        return tuple(out)

    @property
    def failed(self) -> tuple[Check, ...]:
        """The checks that failed (an identity the theorem does not claim is not a failure)."""
        return tuple(c for c in self.checks if c.passed is False and c.claimed)

    def __getitem__(self, name: str) -> Check:
        for c in self.checks:
            if c.name == name:
                return c
        raise KeyError(f"no check named {name!r}; checks: {[c.name for c in self.checks]}")

    def to_dict(self) -> dict[str, Any]:
        """Every field, ``ok`` and ``problems`` as JSON-ready values."""
        return json_ready(  # type: ignore[no-any-return]
            {
                "ok": self.ok,
                "problems": self.problems,
                "complete": self.complete,
                "model": self.model_text,
                "verdict": self.verdict,
                "guaranteed": self.guaranteed,
                "checks": [c.to_dict() for c in self.checks],
                "notes": self.notes,
            }
        )

    def __str__(self) -> str:
        return display.report_text(self)

    def __repr__(self) -> str:
        return (
            f"Report(ok={self.ok}, checks={len(self.checks)}, failed={len(self.failed)}, "
            f"complete={self.complete})"
        )

    def _repr_html_(self) -> str:
        return display.report_html(self)


def _run(name: str, fn: Callable[..., Check], *args: Any, required: bool = False) -> Check:
    """Run one check, timed.  Only CheckNotApplicable makes it "not run"; any other exception
    is a failure with its traceback (KeyboardInterrupt passes through)."""
    poll()
    start = time.perf_counter()
    try:
        check = fn(*args)
    except CheckNotApplicable as err:
        check = Check(name, "", 0.0, float("nan"), None, f"not applicable: {err}")
    except Exception as err:  # a crash inside a check is a failure of that check
        check = Check(
            name,
            "",
            0.0,
            float("nan"),
            False,
            f"the check crashed with {type(err).__name__}: {err}",
            traceback=traceback.format_exc(),
        )
    return replace(check, seconds=time.perf_counter() - start, required=required)


def _bar(**options: Any) -> Any:
    """``tqdm.auto.tqdm(**options)``, imported on first use (tqdm.auto brings asyncio)."""
    from tqdm.auto import tqdm

    return tqdm(**options)


class _Progress:
    """A ``progress(done, total)`` callback that shows a ``tqdm.auto`` bar after 2 seconds."""

    def __init__(self, label: str) -> None:
        self.label = label
        self.bar: Any = None

    def __call__(self, done: int, total: int) -> None:
        poll()  # every loop that reports progress can be stopped (freeladder.stop_when)
        if self.bar is None:
            self.bar = _bar(total=total, desc=self.label, delay=2.0, leave=False)
        self.bar.update(done - self.bar.n)

    def close(self) -> None:
        if self.bar is not None:
            self.bar.close()


def _seconds(work: Fraction) -> float:
    """A cost estimate as a float, ``inf`` beyond the float range (counts are exact ints)."""
    try:
        return float(work)
    except OverflowError:
        return float("inf")


class _Parts:
    """What several checks share, from one :class:`~freeladder.analysis.Analysis` (each part
    computed once, and kept there for later calls), plus the listed charges."""

    def __init__(self, analysis: Analysis) -> None:
        self.analysis = analysis
        self.model = analysis.model
        self._spectrum: tuple[FreeSpectrum, str] | None = None
        self._charges: list[StringSum] | None = None
        self._sweep_seconds: float | None = None

    @property
    def counts(self) -> list[int]:
        """Number of independent sets of each order 0..alpha (counted, not listed)."""
        return list(self.analysis.charge_counts)

    def spectrum(self) -> tuple[FreeSpectrum, str]:
        """The single polynomial's spectrum and, when no theorem guarantees it, why (empty when
        one does): :meth:`Analysis.answer` with ``unproven=True``, so the checks probe it."""
        if self._spectrum is None:
            answer = self.analysis.answer(sector="polynomial", unproven=True)
            if answer.spectrum is None:
                raise ValueError(answer.message)
            self._spectrum = (answer.spectrum, "" if answer.guaranteed else answer.reason)
        return self._spectrum

    def charges(self) -> list[StringSum]:
        """Q^(1) .. Q^(alpha), listed (call only after checking the cost)."""
        if self._charges is None:
            self._charges = [charge(self.model, s) for s in range(1, len(self.counts))]
        return self._charges

    def pairwise_seconds(self) -> float:
        """Estimated time of [H, Q(s)] and [Q(r), Q(s)] pair by pair (listing included)."""
        c = self.counts[1:]  # exact ints, beyond float range for large chains
        total = sum(c)
        rest = c[1:]
        pairs = (sum(rest) ** 2 - sum(x * x for x in rest)) // 2  # sum_{i<j} c_i c_j
        products = len(self.model) * total + pairs
        return _seconds(Fraction(LIST_SECONDS) * total + Fraction(PRODUCT_SECONDS) * products)

    def sweep_seconds(self) -> float:
        """Estimated time of the commutator sweep (``inf`` when it cannot run)."""
        if self._sweep_seconds is None:
            self._sweep_seconds = SWEEP_COORDINATE_SECONDS * charge_sweep._commutator_work(
                self.model
            )
        return self._sweep_seconds


def _residual(op: StringSum) -> tuple[bool, float]:
    """(is zero, largest leftover coefficient) with the tolerance rule of StringSum.is_zero."""
    zero = op.is_zero(None if op.is_exact else FLOAT_RTOL)
    if len(op) == 0:
        return True, 0.0
    if op.is_symbolic:
        return zero, float("nan")
    return zero, op.max_abs()


def _method(ops: Sequence[StringSum]) -> tuple[str, float]:
    if all(o.is_exact for o in ops):
        return "exact string algebra (no matrices)", 0.0
    return (
        f"string algebra in floating point; zero when every coefficient <= {FLOAT_RTOL:g} x scale",
        FLOAT_RTOL,
    )


# -- commutation --------------------------------------------------------------------------------
def hamiltonian_check(
    h: StringSum,
    charges: Sequence[StringSum],
    progress: Callable[[int, int], Any] | None = None,
) -> Check:
    """``[H, Q^(s)] = 0`` for every s, pair by pair in the string algebra.

    Parameters
    ----------
    h : StringSum
        The Hamiltonian.
    charges : sequence of StringSum
        ``Q^(1), Q^(2), ...``.
    progress : callable, optional
        Called as ``progress(orders_done, orders_total)``.

    Returns
    -------
    Check
    """
    method, tol = _method([h, *charges])
    worst, bad = 0.0, []
    for s, q in enumerate(charges, start=1):
        zero, val = _residual(h.commutator(q))
        worst = max(worst, val) if val == val else worst
        if not zero:
            bad.append(s)
        if progress is not None:
            progress(s, len(charges))
    detail = f"orders 1..{len(charges)}, {sum(len(q) for q in charges)} strings in all"
    if bad:
        detail += f"; non-zero for s = {bad}"
    return Check(H_CHARGES, method, tol, worst, not bad, detail, _ECF)


_SWEEP = "exact sweep over the terms (word automaton, rational arithmetic; no matrices)"


def charge_pairs_check(
    m: Model,
    charges: Sequence[StringSum] | None,
    max_pairs: int = MAX_PAIRS,
    progress: Callable[[int, int], Any] | None = None,
) -> Check:
    """``[Q^(r), Q^(s)] = 0`` for every pair of orders.

    Numeric couplings: decided at once for all pairs by :func:`freeladder.sweep.commutator_sweep`
    (exact, polynomial in the number of terms).  When the sweep cannot decide (symbolic
    couplings, a frontier too wide, or a non-zero word of dependent strings) the charges are
    multiplied pair by pair in the string algebra, for pairs of orders 2 <= r < s with at most
    ``max_pairs`` pairs of strings (order 1 is H, see :func:`hamiltonian_check`).

    Parameters
    ----------
    m : Model
    charges : sequence of StringSum or None
        ``Q^(1), Q^(2), ...`` for the pairwise route; None when they are too many to list.
    max_pairs : int
        Work limit of the pairwise route.
    progress : callable, optional
        Called as ``progress(done, total)`` by the sweep.

    Returns
    -------
    Check

    Raises
    ------
    CheckNotApplicable
        When neither route can decide.
    """
    decided, reason = _try_sweep(m, commutator_sweep, PAIRS, "pairs (r, s)", _ECF, progress)
    if decided is not None:
        return decided
    if charges is None:
        raise CheckNotApplicable(
            f"the sweep cannot decide ({reason}) and the charges are not listed"
        )
    return pairwise_check(charges, max_pairs, f"sweep: {reason}")


def _hamiltonian_from_pairs(pairs: Check) -> Check:
    """``[H, Q(s)] = 0`` read off a sweep of all pairs (H is ``Q^(1)`` plus a constant)."""
    detail = (
        "read off the exact sweep of [Q(r), Q(s)], which covers r = 1 (H is Q(1) plus a "
        f"constant): {pairs.detail}"
    )
    return replace(pairs, name=H_CHARGES, detail=detail, seconds=0.0)


def pairwise_check(
    charges: Sequence[StringSum],
    max_pairs: int = MAX_PAIRS,
    why: str = "",
    progress: Callable[[int, int], Any] | None = None,
) -> Check:
    """``[Q^(r), Q^(s)] = 0`` for 2 <= r < s, pair by pair in the string algebra.

    Raises
    ------
    CheckNotApplicable
        When pairs beyond ``max_pairs`` string pairs had to be skipped and none failed (an
        incomplete check can fail, never pass).
    """
    method, tol = _method(charges)
    worst, done = 0.0, 0
    bad_pairs: list[tuple[int, int]] = []
    skipped: list[tuple[int, int]] = []
    todo = [(r, s) for r in range(2, len(charges) + 1) for s in range(r + 1, len(charges) + 1)]
    for k, (r, s) in enumerate(todo, start=1):
        qr, qs = charges[r - 1], charges[s - 1]
        if len(qr) * len(qs) > max_pairs:
            skipped.append((r, s))
            continue
        zero, val = _residual(qr.commutator(qs))
        done += 1
        worst = max(worst, val) if val == val else worst
        if not zero:
            bad_pairs.append((r, s))
        if progress is not None:
            progress(k, len(todo))
    detail = f"{done} pairs of orders checked pair by pair" + (f" ({why})" if why else "")
    if skipped:
        detail += (
            f"; {len(skipped)} pairs skipped (more than {max_pairs} string pairs): "
            + ", ".join(f"({r},{s})" for r, s in skipped[:8])
            + (" ..." if len(skipped) > 8 else "")
        )
    if bad_pairs:
        return Check(
            PAIRS,
            method,
            tol,
            worst,
            False,
            f"{detail}; non-zero for (r, s) = {bad_pairs[:8]}",
            _ECF,
        )
    if skipped:
        raise CheckNotApplicable(detail)
    if done == 0:
        detail = "fewer than two orders beyond H: nothing to check"
    return Check(PAIRS, method, tol, worst, True, detail, _ECF)


def _try_sweep(
    m: Model,
    sweep: Callable[..., SweepResult],
    name: str,
    keys: str,
    ref: str,
    progress: Callable[[int, int], Any] | None = None,
) -> tuple[Check | None, str]:
    """The sweep's Check when it decides; otherwise None and the reason it did not."""
    if m.is_symbolic:
        return None, "symbolic couplings"
    try:
        res = sweep(m, progress=progress)
    except ValueError as err:  # the sweep's documented refusals: frontier or work too large
        return None, str(err)
    check = _sweep_check(name, res, keys, ref)
    return (check, "") if check.passed is not None else (None, check.detail)


def _sweep_check(name: str, res: SweepResult, keys: str, ref: str) -> Check:
    """A Check from a sweep; ``passed`` is None when the sweep could not decide."""
    size = (
        f"{res.points} evaluation points, at most {res.coordinates} coordinates and a forward "
        f"space of dimension <= {res.rank} per term"
    )
    w = res.witness
    if w is None and res.points == 0:
        return Check(name, _SWEEP, 0.0, 0.0, True, "holds trivially: fewer than two orders", ref)
    if w is None:
        return Check(name, _SWEEP, 0.0, 0.0, True, f"every word vanishes; {size}", ref)
    shown = ", ".join(
        f"{k}: {display.number_text(c)}" for k, c in sorted(w.coefficients.items())[:6]
    )
    found = f"the string {w.string} has coefficients {{{shown}}} ({keys})"
    if res.vanishes is False:
        return Check(
            name,
            _SWEEP,
            0.0,
            max(abs(c) for c in w.coefficients.values()),
            False,
            f"{found}; the terms' strings are independent, so this is not zero; {size}",
            ref,
        )
    return Check(
        name,
        _SWEEP,
        0.0,
        float("nan"),
        None,
        f"{found}, but the terms' strings are dependent: words may cancel",
        ref,
    )


# -- inversion relation -------------------------------------------------------------------------
def transfer_from_charges(charges: Sequence[StringSum], u: Any, rotation: int = 0) -> StringSum:
    """``T(omega^k u) = sum_s (-omega^k u)^s Q^(s)`` built exactly from given charges.

    ``rotation`` is k; ``omega^{ks}`` is applied exactly with :meth:`StringSum.rotated`.
    """
    first = charges[0]
    total = StringSum.identity(first.states, first.sites)
    for s, q in enumerate(charges, start=1):
        total = total + q.rotated(2 * rotation * s).scaled((-u) ** s)
    return total


def _inversion_name(n: int) -> str:
    return "T(u) T(-u) = P(u^2)" if n == 2 else "T(u) T(wu) ... T(w^(N-1) u) = P(u^N)"


def inversion_check(
    m: Model,
    charges: Sequence[StringSum] | None,
    max_pairs: int = MAX_PAIRS,
    progress: Callable[[int, int], Any] | None = None,
) -> Check:
    """``prod_{k < N} T(omega^k u) = P(u^N) * 1`` for every u.

    Numeric couplings: decided exactly for all u by :func:`freeladder.sweep.inversion_sweep`.
    Otherwise (or when the sweep cannot decide) the product is formed in the string algebra at
    u = 3/7 (exact couplings) or a random float u, within ``max_pairs`` pairs of strings.

    Raises
    ------
    CheckNotApplicable
        When neither route can decide within its limits.
    """
    n = m.states
    name = _inversion_name(n)
    ref = _ECF if n == 2 else _AP
    cost = SWEEP_COORDINATE_SECONDS * charge_sweep._inversion_work(m)
    if cost > CHECK_BUDGET_SECONDS:
        reason = (
            f"the exact sweep is estimated at {_seconds_text(cost)}, over the time budget of "
            f"{CHECK_BUDGET_SECONDS:.0f} s"
        )
    else:
        decided, reason = _try_sweep(m, inversion_sweep, name, "powers of u", ref, progress)
        if decided is not None:
            return decided
    if charges is None:
        raise CheckNotApplicable(
            f"the sweep cannot decide ({reason}) and the charges are not listed"
        )
    exact = all(q.is_exact for q in charges)
    u: Any = Fraction(3, 7) if exact else float(np.random.default_rng(7).uniform(0.2, 0.8))
    size = 1 + sum(len(q) for q in charges)
    if size**2 > max_pairs:
        raise CheckNotApplicable(
            f"T(u) has up to {size} strings: the product is beyond {max_pairs} pairs ({reason})"
        )
    factors = [transfer_from_charges(charges, u, k) for k in range(n)]
    prod = factors[0]
    for f in factors[1:]:
        if len(prod) * len(f) > max_pairs:
            raise CheckNotApplicable(
                f"partial product of {len(prod)} strings times {len(f)}: beyond {max_pairs}"
            )
        prod = prod @ f
    p_val = exclusion_polynomial(m)(u**n)
    target = StringSum.identity(n, m.sites, p_val)
    method, tol = _method([prod])
    zero, val = _residual(prod - target)
    detail = f"u = {u}; product has {len(prod)} strings; P(u^N) = {p_val} (sweep: {reason})"
    return Check(name, method, tol, val, zero, detail, ref)


# -- spectral checks ----------------------------------------------------------------------------
def _probe(why: str, method: str, detail: str) -> tuple[str, str]:
    """Method and detail of a spectral check, marked when the numbers are unproven."""
    if not why:
        return method, detail
    return f"{method} (probe)", f"probe on numbers no theorem guarantees ({why}); {detail}"


def ladder_check(m: Model, spectrum: tuple[FreeSpectrum, str] | None = None) -> Check:
    """``[H, Psi_{+-k}] = +-2 eta_k Psi_{+-k}`` with sparse matrices (N = 2, small systems).

    Each connected component of the frustration graph has its own edge mode, transfer matrix
    and quasi-energies (:func:`freeladder.ladder_operators`).

    Raises
    ------
    CheckNotApplicable
        For N > 2, symbolic couplings, or a dimension above :data:`LADDER_DIMENSION`.
    """
    if m.states != 2:
        raise CheckNotApplicable(
            f"ladder operators are built for N = 2; this model has N = {m.states}"
        )
    if m.is_symbolic:
        raise CheckNotApplicable("symbolic couplings")
    if m.dimension > LADDER_DIMENSION:
        raise CheckNotApplicable(f"dimension {_dim(m)} > {LADDER_DIMENSION}")
    why = spectrum[1] if spectrum is not None else ""
    etas = None
    if spectrum is not None and len(components(_live_terms(m))) == 1:
        etas = spectrum[0].quasi_energies  # one component: the model's own spectrum
    try:
        lad = ladder_operators(m, etas)
    except ValueError as err:  # no edge mode found: the relations cannot be formed
        raise CheckNotApplicable(f"no ladder operators: {err}") from err
    h = sps.csr_array(m.to_sparse())
    hnorm = float(abs(h).sum(axis=0).max()) or 1.0
    worst, vanished = 0.0, 0
    for eta, plus, minus in zip(lad.quasi_energies, lad.raising, lad.lowering, strict=True):
        for sign, psi in ((1, plus), (-1, minus)):
            pnorm = float(abs(psi).sum(axis=0).max()) if psi.nnz else 0.0
            if pnorm == 0.0:
                vanished += 1
                continue
            resid = h @ psi - psi @ h - sign * 2 * eta * psi
            rel = float(abs(resid).sum(axis=0).max()) / (pnorm * hnorm) if resid.nnz else 0.0
            worst = max(worst, rel)
    tol = FLOAT_RTOL * max(1, len(m))
    edges = "; ".join(f"{e.string} (terms {list(e.clique)})" for e in lad.edges)
    detail = (
        f"{len(lad.quasi_energies)} modes in {len(lad.edges)} component(s), edge modes {edges}; "
        "residual 1-norm relative to ||Psi|| ||H||"
    )
    if vanished:
        detail += f"; {vanished} operator(s) vanished identically"
    passed = worst <= tol and vanished == 0
    method, detail = _probe(why, "sparse matrices, floating point", detail)
    return Check(LADDER, method, tol, worst, passed, detail, _FENDLEY)


def sum_rule_check(m: Model, spectrum: tuple[FreeSpectrum, str] | None = None) -> Check:
    """``sum eta^N = C_1`` and ``sum eta^{2N} = C_1^2 - 2 C_2`` (from the coefficients of P).

    Not decisive: it tests the roots against the polynomial, not that the polynomial gives the
    spectrum.
    """
    if m.is_symbolic:
        raise CheckNotApplicable("symbolic couplings")
    sp, why = spectrum if spectrum is not None else _Parts(analyze(m)).spectrum()
    eta = np.asarray(sp.quasi_energies, dtype=complex)
    rules = sum_rules(exclusion_polynomial(m), eta)  # exact targets in O(p M) for chains
    (lhs1, lhs2), (rhs1, rhs2) = rules.sums, rules.targets
    dev = max(rules.residuals)
    tol = FLOAT_RTOL
    detail = _sum_rule_detail(len(eta), (lhs1, rhs1), (lhs2, rhs2))
    method, detail = _probe(why, "floating point vs exact coefficients", detail)
    ref = "coefficients of P: Newton's identities (common practice)"
    return Check(SUM_RULES, method, tol, dev, dev <= tol, detail, ref, decisive=False)


def _sum_rule_detail(count: int, first: tuple[Any, Any], second: tuple[Any, Any]) -> str:
    num = display.number_text
    return (
        f"{count} quasi-energies; sum eta^N = {num(first[0])} vs {num(first[1])}, "
        f"sum eta^2N = {num(second[0])} vs {num(second[1])} (relative deviation)"
    )


def exact_diagonalization_check(
    m: Model,
    spectrum: tuple[FreeSpectrum, str] | None = None,
    exact: ExactSpectrum | None = None,
) -> Check:
    """Every eigenvalue, with multiplicity, against ``constant + sum_k omega^{s_k} eta_k``.

    Uses :func:`freeladder.match_levels`.

    Raises
    ------
    CheckNotApplicable
        For symbolic couplings, or when exact diagonalization refuses the size
        (:class:`freeladder.base.errors.TooLargeError`; the reason is kept).
    """
    if m.is_symbolic:
        raise CheckNotApplicable("symbolic couplings")
    if m.dimension > ED_AUTO_DIMENSION:
        raise CheckNotApplicable(
            f"the whole spectrum is compared, and dimension {_dim(m)} is above "
            f"{ED_AUTO_DIMENSION}, the largest diagonalised densely"
        )
    try:
        ed = exact if exact is not None else exact_spectrum(m)
    except TooLargeError as err:
        raise CheckNotApplicable(str(err)) from err
    sp, why = spectrum if spectrum is not None else _Parts(analyze(m)).spectrum()
    table = sp.levels(None)
    free = np.asarray(table.energies)
    deg = table.multiplicity
    ref = "numpy/scipy exact diagonalization (common practice)"
    if deg is None:
        if ed.dimension % max(len(free), 1):
            method, detail = _probe(
                why,
                "exact diagonalization",
                f"{len(free)} free levels do not divide the dimension {ed.dimension}",
            )
            return Check(EXACT, method, 0.0, float("nan"), False, detail, ref)
        deg = ed.dimension // len(free)
    bounds = float(np.sum(np.asarray(sp.error_bounds, dtype=float))) if len(free) else 0.0
    scale = max(1.0, float(np.max(np.abs(ed.eigenvalues))))
    tol = max(FLOAT_RTOL * scale, float(ed.error_estimate) + bounds)
    cluster = _defect_radius(sp, scale, ed.dimension, tol)
    match = match_levels((free, deg), ed, tol=tol, cluster=cluster)
    detail = (
        f"dimension {ed.dimension} ({ed.method}); {len(free)} free choices x multiplicity {deg}; "
        f"{match}"
    )
    if cluster is not None:
        detail += (
            f"; exceptional point (repeated roots): H may be defective, so eigenvalues within "
            f"{display.bound_text(cluster)} (about (dimension eps)^(1/m) for Jordan blocks of "
            f"size m <= {_block_bound(sp)}) are grouped and each group is compared by its count "
            "and mean"
        )
    method, detail = _probe(why, "exact diagonalization", detail)
    unmatched = match.unmatched_free or match.unmatched_exact
    value = float("inf") if unmatched else match.distance
    return Check(EXACT, method, tol, value, match.ok, detail, ref)


def _block_bound(sp: FreeSpectrum) -> int:
    """An upper estimate of the largest Jordan block of ``H`` at an exceptional point.

    A root of multiplicity m gives single-mode blocks of size at most m; the many-body ``H``
    is a sum over the modes, and the Jordan blocks of a sum of commuting pieces add their
    nilpotent orders, each mode contributing at most ``(N - 1)(m - 1)`` (its N choices):
    ``1 + (N - 1) sum (m_j - 1)`` over the distinct repeated roots.
    """
    mult = np.asarray(sp.root_multiplicities, dtype=float)
    excess = float(np.sum((mult - 1) / mult))  # each distinct root is listed m times
    return 1 + (sp.states - 1) * int(round(excess))


def _defect_radius(sp: FreeSpectrum, scale: float, dimension: int, tol: float) -> float | None:
    """How far a backward-stable eigensolver may spread a defective level (None if none).

    ``4 scale (dimension eps)^(1/m)`` with m from :func:`_block_bound`: a perturbation of
    relative size ``dimension eps`` moves an eigenvalue of a Jordan block of size m by about
    its m-th root (Lidskii; common practice, an estimate).
    """
    if not sp.exceptional:
        return None
    m = _block_bound(sp)
    rel = max(dimension * float(np.finfo(float).eps), 1e-300)
    return max(tol, 4.0 * scale * rel ** (1.0 / m))


# -- the whole report ---------------------------------------------------------------------------
def _verdict_text(analysis: Analysis, why: str | None, sector_route: bool = False) -> str:
    """The verdict line of the report: the kind, and whether the spectrum is guaranteed."""
    kind = analysis.verdict.kind
    if sector_route and why == "":
        return (
            f"{kind}: free sector by sector of the conserved cycle and parity strings "
            f"({CHAPMAN_FLAMMIA_2020}); the checks test the sector spectra"
        )
    if why is None:
        return f"{kind} (no spectrum computed)"
    if why:
        return (
            f"{kind}: no theorem guarantees the free spectrum ({why}); the spectral checks "
            "ran as probes on unproven numbers"
        )
    return f"{kind}: a theorem guarantees the free spectrum; the checks test it"


def verify(
    m: Model | Analysis,
    exact_diagonalization: bool | str = "auto",
    max_pairs: int = MAX_PAIRS,
) -> Report:
    """Run every check that applies to ``m`` and report each with its method and tolerance.

    Parameters
    ----------
    m : Model or Analysis
        With an :class:`~freeladder.analysis.Analysis` (:func:`freeladder.analyze`) the verdict,
        the spectrum, the charge counts and the exact spectrum are taken from it, computed once
        and kept there; a Model is analysed first.
    exact_diagonalization : "auto", True or False
        "auto" compares with exact diagonalization when the dimension is at most
        :data:`ED_AUTO_DIMENSION`; True asks for it (the report is not ok when it cannot run);
        False leaves it out.
    max_pairs : int
        Work limit of the pairwise string-algebra products (see :func:`pairwise_check`),
        used where the sweep cannot decide.

    Returns
    -------
    Report
        ``report.ok`` is True when the run completed, no check failed, every check asked for
        ran, and at least one decisive check passed (``report.problems`` says why not).  A
        check that cannot apply is "not run" with its reason; a check that crashed is a failure
        with its traceback.  For a model no theorem covers, the spectral checks test the
        unproven numbers as a probe and say so; ``report.verdict`` states which.

    Notes
    -----
    ``[H, Q(s)]`` and ``[Q(r), Q(s)]`` are decided either by the exact sweep (read both off it,
    nothing listed) or pair by pair in the string algebra, whichever the cost estimate
    (:data:`SWEEP_COORDINATE_SECONDS`, :data:`PRODUCT_SECONDS`, :data:`LIST_SECONDS`) says is
    cheaper; when the sweep cannot decide, the pairs are tried within ``max_pairs``.  When both
    routes are estimated above :data:`CHECK_BUDGET_SECONDS`, neither starts and the two checks
    are "not run" with the estimates.  Checks longer than
    about 2 s show a ``tqdm`` progress bar; KeyboardInterrupt stops the run and returns the
    checks finished so far, with ``complete=False`` (not ok).

    References
    ----------
    S. J. Elman, A. Chapman and S. T. Flammia, Commun. Math. Phys. 388, 969 (2021);
    P. Fendley, J. Phys. A 52, 335002 (2019);
    F. C. Alcaraz and R. A. Pimenta, Phys. Rev. B 102, 121101(R) (2020).

    Examples
    --------
    >>> from freeladder import exclusion_chain
    >>> verify(exclusion_chain(6, reach=2)).ok
    True
    """
    if not isinstance(m, (Model, Analysis)):
        raise TypeError(f"verify needs a Model or an Analysis, got {type(m).__name__}")
    if exact_diagonalization not in ("auto", True, False):
        raise ValueError(
            f"exact_diagonalization must be 'auto', True or False, not {exact_diagonalization!r}"
        )
    analysis = analyze(m)
    m = analysis.model
    parts = _Parts(analysis)
    checks: list[Check] = []
    notes: list[str] = []
    complete = True
    sector_path = sector_route(m)
    try:
        _commutation(parts, max_pairs, checks, claim_inversion=not sector_path)
        if m.is_symbolic:
            notes.append("symbolic couplings: spectral checks need numbers (use m.subs first)")
        elif sector_path:
            _sector_checks(parts, exact_diagonalization, checks)
            notes.append(
                "the model is free sector by sector (Jordan-Wigner with cycle or parity "
                "symmetries): the spectral checks test fl.jordan_wigner_spectrum, and the "
                "single-polynomial identities are reported but not claimed"
            )
        else:
            _spectral(parts, exact_diagonalization, checks, notes)
            if _both_routes(analysis) and len(m) <= ROUTES_TERMS:
                checks.append(_run(ROUTES, routes_check, parts))
            elif _both_routes(analysis):
                checks.append(
                    Check(
                        ROUTES,
                        "",
                        0.0,
                        float("nan"),
                        None,
                        f"not applicable: {len(m)} "
                        f"terms > {ROUTES_TERMS} (the Majorana route's dense solve is cubic)",
                    )
                )
    except KeyboardInterrupt:
        complete = False
        notes.append(
            "interrupted (KeyboardInterrupt): the checks after the last one listed did not run"
        )
    why = parts._spectrum[1] if parts._spectrum is not None else None
    if sector_path and not m.is_symbolic:
        why = ""
    verdict = _verdict_text(analysis, why, sector_path)
    guaranteed = None if why is None else not why
    return Report(tuple(checks), _short(m), tuple(notes), verdict, complete, guaranteed)


def _commutation(
    parts: _Parts, max_pairs: int, checks: list[Check], claim_inversion: bool = True
) -> None:
    """[H, Q(s)], [Q(r), Q(s)] and the inversion relation, by the cheaper route."""
    m = parts.model
    if _beyond_listing_and_sweeps(parts, checks, claim_inversion):
        return
    sweep_cost = math.inf if m.is_symbolic else parts.sweep_seconds()
    pair_cost = parts.pairwise_seconds()
    sweep_first = sweep_cost <= pair_cost
    listable = sum(parts.counts) <= 10**6 and pair_cost <= CHECK_BUDGET_SECONDS
    charges: list[StringSum] | None = None
    h = StringSum.from_model(m)
    if min(sweep_cost, pair_cost) > CHECK_BUDGET_SECONDS:
        why = (
            f"over the time budget of {CHECK_BUDGET_SECONDS:.0f} s: the exact sweep is "
            f"estimated at {_seconds_text(sweep_cost)} and pair by pair at "
            f"{_seconds_text(pair_cost)}"
        )
        pairs = Check(PAIRS, "", 0.0, float("nan"), None, f"not applicable: {why}")
        h_check = replace(pairs, name=H_CHARGES)
    elif sweep_first:
        pairs = _shown(PAIRS, _sweep_pairs, m)
        if pairs.passed is None and listable:  # the sweep could not decide: pair by pair
            charges = parts.charges()
            h_check = _shown(H_CHARGES, hamiltonian_check, h, charges)
            pairs = _shown(PAIRS, pairwise_check, charges, max_pairs, pairs.detail)
        elif pairs.passed is None:
            h_check = replace(pairs, name=H_CHARGES)
        else:
            h_check = _hamiltonian_from_pairs(pairs)
    else:
        charges = parts.charges() if listable else None
        if charges is None:
            h_check = _run(H_CHARGES, _not_listed, parts)
        else:
            h_check = _shown(H_CHARGES, hamiltonian_check, h, charges)
        pairs = _shown(PAIRS, charge_pairs_check, m, charges, max_pairs)
    checks.extend([h_check, pairs])
    name = _inversion_name(m.states)
    inversion = _shown(name, inversion_check, m, charges, max_pairs)
    checks.append(inversion if claim_inversion else replace(inversion, claimed=False))


LISTING_ORDER = 20
"""Above this independence number alpha the charges are never listed: every subset of a
largest independent set is independent, so they hold at least ``2^alpha`` products."""


ORDERED_SWEEP_WORK = 4000
"""Largest sweep (evaluation points x terms) run for a chain or indifference order whose
charges are too many to list: beyond it the hypotheses, power-sum and window checks decide in
O(terms), and the time of verify grows smoothly (10^4 steps took 21 s at 100 terms here)."""


def _independence_number(m: Model) -> int | None:
    """alpha from the chain ordering in O(M) (None without one: then counted as usual)."""
    found = _recurrence(m)
    if found is None:
        return None
    return int(chain_root_count(len(m), found[1]))


def _beyond_listing_and_sweeps(parts: _Parts, checks: list[Check], claim_inversion: bool) -> bool:
    """For large chains: the sweeps' work and the listing are judged from alpha alone (the
    charge counts are numbers of thousands of digits there), and the three identities are
    reported "not run" with the reason, without calling the sweeps.  True when it did so."""
    m = parts.model
    alpha = _independence_number(m)
    if alpha is None or alpha <= LISTING_ORDER:
        return False
    pair_steps = alpha * (alpha - 1) // 2 * len(m)
    inversion_steps = m.states * alpha * len(m)
    if min(pair_steps, inversion_steps) <= ORDERED_SWEEP_WORK:
        return False
    why = (
        f"alpha = {alpha}: the charges hold at least 2^{alpha} products (too many to list), "
        f"and the exact sweep would take {{}} (evaluation point, term) steps, more than "
        f"{ORDERED_SWEEP_WORK}; the theorem's hypotheses and the low-order window check cover it"
    )
    for name, steps in (
        (H_CHARGES, pair_steps),
        (PAIRS, pair_steps),
        (_inversion_name(m.states), inversion_steps),
    ):
        check = Check(name, "", 0.0, float("nan"), None, "not applicable: " + why.format(steps))
        if name != H_CHARGES and name != PAIRS and not claim_inversion:
            check = replace(check, claimed=False)
        checks.append(check)
    return True


def _seconds_text(seconds: float) -> str:
    return "no bound (too wide to run)" if math.isinf(seconds) else f"about {seconds:.3g} s"


def _shown(name: str, fn: Callable[..., Check], *args: Any) -> Check:
    """:func:`_run` with a progress bar (shown after 2 s) passed as the last argument."""
    bar = _Progress(name)
    try:
        return _run(name, fn, *args, bar)
    finally:
        bar.close()


def _sweep_pairs(m: Model, progress: Callable[[int, int], Any]) -> Check:
    decided, reason = _try_sweep(m, commutator_sweep, PAIRS, "pairs (r, s)", _ECF, progress)
    if decided is None:
        raise CheckNotApplicable(f"the sweep cannot decide: {reason}")
    return decided


def _not_listed(parts: _Parts) -> Check:
    raise CheckNotApplicable(
        f"{sum(parts.counts)} independent sets are too many to list, and the sweep cannot run"
    )


def _recurrence(m: Model) -> tuple[np.ndarray, np.ndarray] | None:
    """``(term order, back-reach)`` of the chain recurrence, or None (no ordering)."""
    if m.is_symbolic or len(m) == 0:
        return None
    chain = chain_structure(m)
    if chain is not None:
        order = np.asarray(chain.order, dtype=np.int64)
        return order, chain_back(int(chain.reach), len(order))
    return _ordering(m, m.coupling_array())


def hypotheses_check(m: Model) -> Check:
    """The theorem's hypotheses, re-derived exactly from the strings along the ordering the
    root finder uses (:func:`freeladder.checks.hypotheses.ordering_hypotheses`).

    Decisive: it fails for a model whose frustration graph has a claw, an even hole, no
    simplicial clique along the ordering, or dependent strings.

    Raises
    ------
    CheckNotApplicable
        For symbolic couplings or a model that is neither an exclusion chain nor an
        indifference order.
    """
    found = _recurrence(m)
    if found is None:
        raise CheckNotApplicable(
            "the terms form neither an exclusion chain nor an indifference order (the other "
            "checks cover this model)"
        )
    order, back = found
    res = ordering_hypotheses(m, order, back)
    ref = _ECF if m.states == 2 else _AP
    return Check(
        HYPOTHESES,
        "exact (integer exponents of the strings)",
        0.0,
        float(res.violations),
        res.holds,
        res.detail,
        ref,
    )


def power_sum_check(
    m: Model,
    spectrum: tuple[FreeSpectrum, str] | None = None,
    moments: int = MOMENTS,
    progress: Callable[[int, int], Any] | None = None,
) -> Check:
    """The quasi-energies' power sums against the polynomial's, in ball arithmetic.

    ``sum_k eta_k^{N j}`` for ``j = 1 .. moments`` (from ``C_1 .. C_j``) and ``j = -1 ..
    -moments`` (from the top coefficients), with ``C_s`` carried as balls along the chain
    recurrence in O(M * moments) (:func:`freeladder.checks.power_sums.compare_moments`).  The
    roots enter as balls of their error bounds, so the check fails exactly when some moment
    proves that a quasi-energy lies outside its bound: a 1e-8 relative change of one of 10^5
    quasi-energies is caught.

    Raises
    ------
    CheckNotApplicable
        For symbolic couplings, incomplete spectra, or models without a chain ordering.
    """
    if m.is_symbolic:
        raise CheckNotApplicable("symbolic couplings")
    found = _recurrence(m)
    if found is None:
        raise CheckNotApplicable("no chain or indifference ordering to carry the coefficients")
    sp, why = spectrum if spectrum is not None else _Parts(analyze(m)).spectrum()
    if not sp.complete:
        raise CheckNotApplicable("only the lowest quasi-energies were computed")
    order, back = found
    couplings = m.coupling_array()[order].tolist()
    res = compare_moments(
        couplings,
        back,
        np.asarray(sp.quasi_energies),
        np.asarray(sp.error_bounds, dtype=float),
        m.states,
        moments,
        progress,
    )
    orders = f"j = 1..{moments}" + ("" if res.skipped else f" and -1..-{moments}")
    detail = (
        f"sum eta^(N j) over {len(sp.quasi_energies)} quasi-energies for {orders} against "
        f"Newton's identities from coefficients carried as {res.precision}-bit balls along the "
        f"recurrence; largest relative deviation {res.deviation:.2g} where rounding and the "
        f"error bounds allow {res.radius:.2g} (worst j = {res.worst})"
    )
    if res.skipped:
        detail += f"; negative moments not run: {res.skipped}"
    method, detail = _probe(why, "ball arithmetic (python-flint arb)", detail)
    ref = "Newton's identities (Macdonald 1995, common practice); Arb (Johansson 2017)"
    return Check(
        POWER_SUMS, method, res.radius, res.deviation, res.overlap, detail, ref, decisive=False
    )


def _term_shapes(m: Model) -> tuple[np.ndarray, np.ndarray]:
    """Per term: an integer naming its shape (X and Z exponents by column relative to its
    first column, and its phase; equal shapes get equal numbers), and that first column."""
    x, z = sps.csr_array(m.strings.x), sps.csr_array(m.strings.z)
    x.sort_indices()
    z.sort_indices()
    n = len(m)
    support = sps.csr_array(abs(x) + abs(z))  # exponents are >= 0: the union of the columns
    support.sort_indices()
    rows = np.flatnonzero(np.diff(support.indptr))
    first = np.zeros(n, dtype=np.int64)
    first[rows] = support.indices[support.indptr[rows]]  # sorted: each row's smallest column
    # terms with the same numbers of X and Z factors, side by side: one row of (column - first,
    # exponent) pairs and the phase each, equal rows named once
    cx, cz = np.diff(x.indptr), np.diff(z.indptr)
    group = cx * (int(cz.max(initial=0)) + 1) + cz
    by_group = np.argsort(group, kind="stable")
    cuts = np.flatnonzero(np.diff(group[by_group])) + 1
    shape = np.zeros(n, dtype=np.int64)
    named = 0
    for rows in polled(np.split(by_group, cuts) if n else []):
        parts = [m.strings.phase[rows][:, None].astype(np.int64)]
        for mat, count in ((x, int(cx[rows[0]])), (z, int(cz[rows[0]]))):
            at = mat.indptr[rows][:, None] + np.arange(count)
            parts += [mat.indices[at] - first[rows][:, None], mat.data[at].astype(np.int64)]
        _, ids = np.unique(np.concatenate(parts, axis=1), axis=0, return_inverse=True)
        shape[rows] = ids.ravel() + named
        named += int(ids.max()) + 1
    return shape, first


def window_check(
    m: Model,
    orders: int = WINDOW_ORDERS,
    progress: Callable[[int, int], Any] | None = None,
    ordering: tuple[np.ndarray, np.ndarray] | None = None,
) -> Check:
    """``[H_W, Q_W^(s)] = 0`` for ``s <= orders`` on every window W of consecutive terms.

    The windows run along the chain (or indifference) ordering, ``3 (b + 1) + 1`` terms wide for
    the largest back-reach b, so that each holds three independent terms and a claw among
    them shows in ``Q^(3)``.  Each window's charges are listed and multiplied in the exact
    string algebra.  With independent strings (:func:`freeladder.checks.hypotheses` proves it
    for the ordering) every coefficient of ``[H_W, Q_W^(s)]`` is the product of the couplings of
    one set of terms times a sum of roots of unity that does not depend on them, so one
    computation with unit couplings decides every window with the same strings, and windows
    are computed once per distinct set of strings (sites renumbered).

    ``ordering`` (term order, back-reach) replaces the one the root finder uses (the windows
    only need an order of the terms).

    Raises
    ------
    CheckNotApplicable
        For models without an ordering, or more than :data:`MAX_WINDOW_KINDS` distinct windows.
    """
    found = _recurrence(m) if ordering is None else ordering
    if found is None:
        raise CheckNotApplicable("no chain or indifference ordering to take windows along")
    order, back = found
    width = min(len(m), 3 * (int(back.max()) + 1) + 1)
    unit = independent_along(m, order)
    shape, first = _term_shapes(m)
    # one row per window: its terms' first columns relative to the window's smallest, their
    # shapes (and, unless the strings are independent, their couplings); equal rows: the same
    # strings up to a shift of the columns, the same algebra
    windows = np.lib.stride_tricks.sliding_window_view(np.asarray(order, dtype=np.int64), width)
    offsets = first[windows]
    columns = [offsets - offsets.min(axis=1, keepdims=True), shape[windows]]
    if not unit:
        names: dict[Any, int] = {}
        coupling_id = np.array([names.setdefault(c, len(names)) for c in m.couplings])
        columns.append(coupling_id[windows])
    _, first_start = np.unique(np.concatenate(columns, axis=1), axis=0, return_index=True)
    if len(first_start) > MAX_WINDOW_KINDS:
        raise CheckNotApplicable(f"more than {MAX_WINDOW_KINDS} distinct windows of {width} terms")
    kinds = np.sort(first_start)  # each kind by its first window, in the order of the chain
    bad: list[tuple[int, int]] = []
    worst = 0.0
    poll()
    for done, start in enumerate(polled(kinds.tolist(), every=1), start=1):
        terms = order[start : start + width]
        x, z = m.strings.x[terms], m.strings.z[terms]
        used = np.union1d(sps.csr_array(x).indices, sps.csr_array(z).indices)  # sites renumbered
        strings = StringArray(
            x[:, used], z[:, used], m.strings.phase[terms], m.states, [m.sites[c] for c in used]
        )
        couplings = [1] * width if unit else [m.couplings[int(t)] for t in terms]
        sub = Model(strings, couplings)
        h = StringSum.from_model(sub)
        for s in range(2, orders + 1):
            zero, val = _residual(h.commutator(charge(sub, s)))
            worst = max(worst, val) if val == val else worst
            if not zero:
                bad.append((start, s))
        if progress is not None:
            progress(done, len(kinds))
    how = "unit couplings (independent strings)" if unit else "the model's couplings"
    detail = (
        f"{len(m) - width + 1} windows of {width} consecutive terms along the ordering, "
        f"{len(kinds)} distinct, orders s = 2..{orders}, computed with {how}"
    )
    if bad:
        detail += f"; non-zero for (window start, s) = {bad[:6]}"
    method, tol = (
        _method([StringSum.from_model(m)])
        if not unit
        else ("exact string algebra (no matrices)", 0.0)
    )
    return Check(WINDOWS, method, tol, worst, not bad, detail, _ECF)


def linear_seconds(m: Model) -> float:
    """Estimated seconds of the checks that grow linearly with the number of terms (the
    hypotheses, the windows and the power sums), from :data:`MOMENT_SECONDS` and
    :data:`WINDOW_SECONDS`."""
    return len(m) * (2 * MOMENTS * MOMENT_SECONDS + WINDOW_SECONDS)


def _spectral(
    parts: _Parts, exact_diagonalization: bool | str, checks: list[Check], notes: list[str]
) -> None:
    m = parts.model
    try:
        spectrum = parts.spectrum()
    except (ValueError, ArithmeticError) as err:
        # no spectrum to test (no terms, no convergence, ...): every spectral check fails
        # with the reason, rather than the report being lost
        failure = err

        def spectrum_failed(*_: Any) -> Check:
            raise failure

        names = ((LADDER,) if m.states == 2 else ()) + (SUM_RULES, EXACT)
        checks.extend(_run(name, spectrum_failed) for name in names)
        return
    if _tamper is not None:
        spectrum = (_tamper(spectrum[0]), spectrum[1])
    estimate = linear_seconds(m)
    start = time.perf_counter()
    checks.append(_run(HYPOTHESES, hypotheses_check, m))
    checks.append(_shown(WINDOWS, window_check, m, WINDOW_ORDERS))
    checks.append(_shown(POWER_SUMS, power_sum_check, m, spectrum, MOMENTS))
    notes.append(
        f"the O(terms) checks (hypotheses, windows, power sums) were estimated at "
        f"{estimate:.2g} s up front and took {time.perf_counter() - start:.2g} s"
    )
    if m.states == 2:
        checks.append(_run(LADDER, ladder_check, m, spectrum))
    checks.append(_run(SUM_RULES, sum_rule_check, m, spectrum))
    if exact_diagonalization is not False and (
        m.dimension <= ED_AUTO_DIMENSION or m.dimension > SPARSE_CHECK_LIMIT
    ):
        checks.append(
            _run(EXACT, _exact_check, parts, spectrum, required=exact_diagonalization is True)
        )
    elif _sparse_wanted(m, exact_diagonalization) and (
        exact_diagonalization is True or (spectrum[0].degeneracy or 1) == 1
    ):
        checks.append(
            _run(LOWEST, lowest_levels_check, m, spectrum, required=exact_diagonalization is True)
        )
    elif exact_diagonalization == "auto":
        checks.append(
            Check(
                LOWEST,
                "sparse exact diagonalization",
                0.0,
                float("nan"),
                None,
                f"not applicable: dimension {_dim(m)} > {SPARSE_AUTO_DIMENSION}, the largest "
                f"compared automatically, or every level {spectrum[0].degeneracy} times "
                "degenerate (Lanczos finds one vector per level: slow and partial there); "
                f"exact_diagonalization=True compares up to {SPARSE_CHECK_LIMIT}"
                f"{_memory_text(m)}",
            )
        )


def _sparse_wanted(m: Model, exact_diagonalization: bool | str) -> bool:
    """True when the lowest levels are compared sparsely (the whole spectrum is not)."""
    if m.is_symbolic or m.dimension <= ED_AUTO_DIMENSION:
        return False
    if exact_diagonalization is True:
        return True
    return exact_diagonalization == "auto" and m.dimension <= SPARSE_AUTO_DIMENSION


def _memory_text(m: Model) -> str:
    if m.dimension > 2**40:
        return ""
    need = sparse_memory(m, SPARSE_LEVELS)
    return f"; a sparse solve would need about {need / 2**30:.3g} GiB"


def _compare_lowest(
    name: str,
    sp: FreeSpectrum,
    why: str,
    ed: ExactSpectrum,
    ref: str,
    where: str,
) -> Check:
    """The distinct lowest levels of ``ed`` against the distinct lowest free levels.

    Lanczos from one start vector finds one vector per eigenvalue (copies of a degenerate one
    only through rounding), so the comparison is of distinct levels, not multiplicities.
    """
    exact = np.asarray(ed.levels, dtype=float)
    scale = max(1.0, float(np.max(np.abs(exact))) if len(exact) else 1.0)
    bound = float(np.sum(np.asarray(sp.error_bounds, dtype=float)))
    tol = max(FLOAT_RTOL * scale, float(ed.error_estimate) + bound)
    energies = np.sort(np.asarray(sp.levels(4 * len(ed.eigenvalues)).energies, dtype=float))
    breaks = np.flatnonzero(np.diff(energies) > max(tol, ed.tolerance)) + 1
    free = (
        np.array([part.mean() for part in np.split(energies, breaks)])
        if len(energies)
        else energies
    )
    count = len(exact)
    dev = float(np.max(np.abs(free[:count] - exact))) if len(free) >= count > 0 else float("inf")
    how = (
        f"{len(ed.eigenvalues)} eigenvalues, multiplicities resolved"
        if ed.method.startswith("dense")
        else f"{len(ed.eigenvalues)} Ritz values; Lanczos does not resolve multiplicities"
    )
    detail = (
        f"{where}: the {count} lowest distinct eigenvalues by {ed.method} of dimension "
        f"{ed.dimension} ({how}) against the lowest distinct free levels; largest difference"
    )
    kind = "exact" if ed.method.startswith("dense") else "sparse exact"
    method, detail = _probe(why, f"{kind} diagonalization", detail)
    return Check(name, method, tol, dev, dev <= tol, detail, ref)


def lowest_levels_check(
    m: Model, spectrum: tuple[FreeSpectrum, str] | None = None, k: int = SPARSE_LEVELS
) -> Check:
    """The lowest ``k`` eigenvalues from sparse exact diagonalization (scipy ARPACK) against the
    lowest free levels with their multiplicity, up to dimension 2^22.

    Raises
    ------
    CheckNotApplicable
        Symbolic couplings, complex levels, a dimension above
        :data:`freeladder.spectra.ed.SPARSE_CHECK_LIMIT` (with the memory it would need), or
        too little memory (:class:`freeladder.base.errors.TooLargeError`).
    """
    if m.is_symbolic:
        raise CheckNotApplicable("symbolic couplings")
    if m.dimension > SPARSE_CHECK_LIMIT:
        raise CheckNotApplicable(
            f"dimension {_dim(m)} > {SPARSE_CHECK_LIMIT} = 2^22, the largest diagonalised "
            f"sparsely in the checks{_memory_text(m)}"
        )
    sp, why = spectrum if spectrum is not None else _Parts(analyze(m)).spectrum()
    if np.iscomplexobj(sp.quasi_energies) or sp.states != 2:
        raise CheckNotApplicable("complex levels: the lowest are not ordered on a line")
    try:
        ed = sector_exact_spectrum(m, min(k, m.dimension - 2))
    except TooLargeError as err:
        raise CheckNotApplicable(str(err)) from err
    ref = "scipy ARPACK (Lehoucq, Sorensen and Yang 1998; common practice)"
    return _compare_lowest(LOWEST, sp, why, ed, ref, "whole space")


def sector_lowest_check(m: Model, k: int = SPARSE_LEVELS) -> Check:
    """The ground sector's lowest free levels (``free_spectrum(m, sector="ground")``) against
    sparse exact diagonalization restricted to the same cycle values
    (:func:`same_sector_check` up to :data:`freeladder.spectra.ed.SPARSE_CHECK_LIMIT`).

    Raises
    ------
    CheckNotApplicable
        As :func:`lowest_levels_check`.
    """
    return same_sector_check(analyze(m), "ground", k=k, limit=SPARSE_CHECK_LIMIT)[1]


def same_sector_check(
    a: Analysis,
    sector: Any = None,
    unproven: bool = False,
    k: int = SPARSE_LEVELS,
    limit: int = SPARSE_AUTO_DIMENSION,
) -> tuple[ExactSpectrum, Check]:
    """The ``k`` lowest exact levels of the sector whose free levels
    :meth:`Analysis.answer` gives for ``sector``, and the check that they agree.

    The sector is the one of the answer: for a Jordan-Wigner model with cycles, the conserved
    cycle strings with the answer's values; otherwise the whole space.  The exact levels come
    from :func:`freeladder.sector_exact_spectrum` in a basis of that sector (dense up to
    :data:`freeladder.spectra.ed.SECTOR_DENSE_LIMIT`, every multiplicity exact; Lanczos above,
    distinct levels) and are compared level by level with the lowest distinct free levels.

    Parameters
    ----------
    a : Analysis
    sector, unproven
        As in :meth:`Analysis.answer`.
    k : int
        How many lowest eigenvalues.
    limit : int
        Largest sector dimension diagonalised.

    Returns
    -------
    (ExactSpectrum, Check)
        The exact levels and the check (:data:`LOWEST`); its detail names the sector.

    Raises
    ------
    CheckNotApplicable
        When there is no spectrum (refused), the couplings are symbolic, the levels are complex,
        the sector's dimension is above ``limit`` ("dimension 2^n above 2^m"), a Lanczos solve
        would meet degenerate levels only, or memory is short.

    References
    ----------
    A. Chapman and S. T. Flammia, Quantum 4, 278 (2020) (the sectors); ARPACK Users' Guide
    (1998).
    """
    m = a.model
    if m.is_symbolic:
        raise CheckNotApplicable("symbolic couplings")
    answer = a.answer(sector=sector, unproven=unproven)
    sp = answer.spectrum
    if sp is None:
        raise CheckNotApplicable(f"no free spectrum to compare ({answer.reason})")
    if np.iscomplexobj(sp.quasi_energies) or sp.states != 2:
        raise CheckNotApplicable("complex levels: the lowest are not ordered on a line")
    values = answer.cycle_values if answer.route == "sector" else ()
    gens = sectors(m).cycle_operators if values else ()
    fixed = [(g, int(v)) for g, v in zip(gens, values, strict=True) if g.support]
    dim = sector_dimension(m, fixed)
    if dim > limit:
        raise CheckNotApplicable(
            f"dimension {display.dimension_text(dim)} above {display.dimension_text(limit)}, "
            "the largest "
            f"diagonalised here{_memory_text(m) if not fixed else ''}"
        )
    degeneracy = sp.degeneracy or 1
    dense = dim <= SECTOR_DENSE_LIMIT
    if not dense and degeneracy > 2 and limit < SPARSE_CHECK_LIMIT:
        raise CheckNotApplicable(
            f"every level {degeneracy} times degenerate at dimension {display.dimension_text(dim)} "
            "(Lanczos finds one vector per level: slow and partial there)"
        )
    try:  # a dense solve finds every eigenvalue at the same cost: all multiplicities
        ed = a.sector_exact(values, dim if dense else min(k, dim - 2))
    except TooLargeError as err:
        raise CheckNotApplicable(str(err)) from err
    lowest = ed
    if dense:  # compare the k lowest distinct levels
        count = int(np.sum(ed.multiplicities[:k]))
        lowest = replace(
            ed,
            levels=ed.levels[:k],
            multiplicities=ed.multiplicities[:k],
            eigenvalues=ed.eigenvalues[:count],
        )
    if values:
        pairs = ", ".join(
            f"{g} = {v:+d}" for g, v in zip(answer.cycle_strings, values, strict=True)
        )
        where = f"the sector {pairs} ({answer.selection or 'chosen'})"
        ref = f"{CHAPMAN_FLAMMIA_2020}; scipy/numpy exact diagonalization (common practice)"
    else:
        where = "the whole space"
        ref = "scipy ARPACK (Lehoucq, Sorensen and Yang 1998; common practice)"
    why = "" if answer.guaranteed else answer.reason
    return ed, _compare_lowest(LOWEST, sp, why, lowest, ref, where)


def _exact_check(parts: _Parts, spectrum: tuple[FreeSpectrum, str]) -> Check:
    """The exact-diagonalization check with the analysis's exact spectrum (computed once)."""
    m = parts.model
    if m.dimension > ED_AUTO_DIMENSION:
        return exact_diagonalization_check(m, spectrum)  # refuses with the reason
    try:
        exact = parts.analysis.exact
    except TooLargeError as err:
        raise CheckNotApplicable(str(err)) from err
    return exact_diagonalization_check(m, spectrum, exact)


# -- Jordan-Wigner models that are free sector by sector -----------------------------------------
def _both_routes(analysis: Analysis) -> bool:
    """True for Pauli line-graph models that the single polynomial also covers."""
    m = analysis.model
    if m.states != 2 or m.is_symbolic or len(m) == 0:
        return False
    verdict = analysis.verdict
    return verdict.kind == "jordan-wigner" and verdict.guarantee.proven


def routes_check(parts: _Parts) -> Check:
    """The polynomial's quasi-energies against the Majorana route's, sector by sector.

    Where the frustration graph is a line graph and the single polynomial is guaranteed
    (claw-free, even-hole-free: Elman-Chapman-Flammia 2021), both routes give the spectrum:
    the squares ``eta_k^2`` of the polynomial route must be the non-zero ``e_k^2`` of every
    sector's single-particle matrix (the rest zero modes), matched one to one.
    """
    m = parts.model
    poly, _ = parts.spectrum()
    try:
        jw = jordan_wigner_spectrum(m)
    except ValueError as err:  # too many sectors to list
        raise CheckNotApplicable(str(err)) from err
    target = np.asarray(poly.quasi_energies, dtype=complex) ** 2
    scale = max(1.0, float(np.abs(target).max())) if len(target) else 1.0
    worst = 0.0
    for index in range(len(jw.sectors)):
        squares = np.asarray(jw.quasi_energies(index), dtype=complex) ** 2
        if len(squares) < len(target):
            worst = float("inf")
            break
        order = np.argsort(np.abs(squares), kind="stable")
        n_extra = len(squares) - len(target)
        extra, kept = squares[order[:n_extra]], squares[order[n_extra:]]
        cost = np.abs(kept[:, None] - target[None, :])
        from scipy.optimize import linear_sum_assignment  # on use: slow to import

        rows, cols = linear_sum_assignment(cost)
        worst = max(worst, float(cost[rows, cols].max()) if len(target) else 0.0)
        worst = max(worst, float(np.abs(extra).max()) if len(extra) else 0.0)
    bound = float(np.max(poly.error_bounds)) if len(poly.error_bounds) else 0.0
    tol = FLOAT_RTOL * scale + 4 * np.sqrt(scale) * (bound + jw.error_bound)
    detail = (
        f"{len(jw.sectors)} sector(s), {len(target)} quasi-energies: largest distance between "
        "the squares eta_k^2 of the two routes (matched one to one), extra Majorana modes zero"
    )
    if poly.exceptional:
        # the Majorana matrix is defective at a repeated root: its eigenvalues (by a
        # backward-stable solver) carry errors of about (size eps)^(1/m) relative
        top = int(np.max(poly.root_multiplicities))
        size = 2 * len(m.sites)
        tol = max(tol, 4.0 * scale * (size * float(np.finfo(float).eps)) ** (1.0 / top))
        detail += (
            f"; exceptional point (roots of multiplicity up to {top}): the Majorana matrix is "
            f"defective, so its eigenvalues are compared within about (size eps)^(1/{top})"
        )
    return Check(
        ROUTES,
        "floating point",
        float(tol),
        worst,
        bool(worst <= tol),
        detail,
        f"{CHAPMAN_FLAMMIA_2020}; {_ECF}",
    )


def _sector_checks(parts: _Parts, exact_diagonalization: bool | str, checks: list[Check]) -> None:
    m = parts.model
    checks.append(_run(CONSERVED, conserved_strings_check, m))
    if exact_diagonalization is False:
        return
    if _sparse_wanted(m, exact_diagonalization) or (
        exact_diagonalization == "auto"
        and m.dimension > ED_AUTO_DIMENSION
        and _ground_sector_dimension(parts) <= SPARSE_AUTO_DIMENSION
    ):
        checks.append(_run(LOWEST, sector_lowest_check, m, required=exact_diagonalization is True))
        return
    checks.append(
        _run(SECTORS, sector_spectra_check, parts, required=exact_diagonalization is True)
    )


def _ground_sector_dimension(parts: _Parts) -> int:
    """The ground sector's dimension (:func:`freeladder.sector_dimension`; the whole
    dimension when no ground sector is found)."""
    m = parts.model
    if m.is_symbolic:
        return m.dimension
    answer = parts.analysis.answer(sector="ground")
    if answer.spectrum is None:
        return m.dimension
    gens = sectors(m).cycle_operators
    values = answer.cycle_values
    return sector_dimension(m, [(g, v) for g, v in zip(gens, values, strict=True) if g.support])


def conserved_strings_check(m: Model) -> Check:
    """Every cycle and parity string of :func:`freeladder.sectors` commutes with every term
    (exact string algebra): the sector labels are conserved."""
    structure = sectors(m)
    gens = structure.generators
    bad = [(str(g), j) for g in gens for j, t in enumerate(m.strings) if not g.commutes_with(t)]
    detail = (
        f"{len(structure.cycle_operators)} cycle string(s), {len(structure.parity_operators)} "
        f"parity string(s), {len(structure.relations)} relation(s) among them, "
        f"{structure.count} consistent sectors"
    )
    if bad:
        detail += f"; {bad[0][0]} fails to commute with term {bad[0][1]}"
    return Check(
        CONSERVED,
        "exact string algebra",
        0.0,
        float(len(bad)),
        not bad,
        detail,
        CHAPMAN_FLAMMIA_2020,
        decisive=False,
    )


def sector_spectra_check(parts: _Parts) -> Check:
    """The union of the sector spectra (:func:`freeladder.jordan_wigner_spectrum`), with their
    multiplicities, against exact diagonalization."""
    m = parts.model
    if m.dimension > ED_AUTO_DIMENSION:
        raise CheckNotApplicable(
            f"dimension {_dim(m)} > {ED_AUTO_DIMENSION}, the largest compared here"
        )
    try:
        jw = jordan_wigner_spectrum(m)
        energies, multiplicity = jw.levels()
    except ValueError as err:
        raise CheckNotApplicable(str(err)) from err
    exact = parts.analysis.exact
    if exact is None:
        raise CheckNotApplicable("no exact spectrum for this model")
    if int(np.sum(multiplicity)) != exact.dimension:
        return Check(
            SECTORS,
            "exact diagonalization",
            0.0,
            float("inf"),
            False,
            f"{int(np.sum(multiplicity))} sector levels (with multiplicity) for dimension "
            f"{exact.dimension}",
            CHAPMAN_FLAMMIA_2020,
        )
    scale = max(1.0, float(np.max(np.abs(energies))) if len(energies) else 1.0)
    tol = max(FLOAT_RTOL * scale, 10 * jw.error_bound + float(exact.error_estimate))
    match = match_levels((energies, multiplicity), exact, tol=tol)
    unmatched = match.unmatched_free or match.unmatched_exact
    dev = float("inf") if unmatched else float(match.distance)
    detail = (
        f"{len(jw.sectors)} sectors, dimension {exact.dimension}: largest distance between "
        "sector levels and exact eigenvalues, multiplicities included"
    )
    return Check(SECTORS, "exact diagonalization", tol, dev, match.ok, detail, CHAPMAN_FLAMMIA_2020)


def _dim(m: Model) -> str:
    """The dimension as a number, or as ``N^L`` when it has more than 12 digits."""
    return str(m.dimension) if m.dimension < 10**12 else f"{m.states}^{len(m.sites)}"


def _short(m: Model) -> str:
    """The model's text, cut to 120 characters (only the terms that show are written)."""
    count = 0
    text = format_terms([], m.constant)
    while count < len(m) and len(text) <= 120:
        count = min(len(m), 2 * count + 8)
        text = format_terms([m.term(j) for j in range(count)], m.constant)
    return text if len(text) <= 120 else text[:117] + "..."
