"""Checks that a model's free spectrum is what the theorems promise, each with how and how well.

:func:`verify` runs, where they apply:

* **commutation** -- ``[H, Q^(s)] = 0`` for every order s, exactly in the string algebra
  (:class:`~freeladder.operators.StringSum`, no matrices), and ``[Q^(r), Q^(s)] = 0`` for every pair
  at once by an exact sweep over the terms (:mod:`freeladder.sweep`);
* **inversion relation** -- ``T(u) T(-u) = P(u^2)`` (N = 2) and
  ``T(u) T(omega u) ... T(omega^{N-1} u) = P(u^N)`` (clock chains), for every u, by the same
  sweep; symbolic couplings fall back to the string algebra at one u;
* **ladder relations** -- ``[H, Psi_{+-k}] = +-2 eta_k Psi_{+-k}`` for small N = 2 systems;
* **sum rules** -- ``sum eta^N = sum c^N`` and ``sum eta^{2N} = (sum c^N)^2 - 2 C_2``;
* **exact diagonalization** -- the whole spectrum with multiplicities against the free levels.

For a model outside every theorem the same checks run as a probe: the report says which fail.

References
----------
S. J. Elman, A. Chapman and S. T. Flammia, Commun. Math. Phys. 388, 969 (2021),
arXiv:2012.07857 (commuting charges, inversion relation, N = 2);
P. Fendley, J. Phys. A 52, 335002 (2019), arXiv:1901.08078 (transfer matrix, ladder operators);
F. C. Alcaraz and R. A. Pimenta, Phys. Rev. B 102, 121101(R) (2020), arXiv:2005.14622 (clock
chains, general p and N).
"""

from __future__ import annotations

import html
import time
from collections.abc import Callable, Sequence
from dataclasses import dataclass, field, replace
from fractions import Fraction
from typing import Any

import numpy as np
import scipy.sparse as sps

from .charges import charge
from .ed import exact_spectrum
from .edge import ladder_operators
from .model import Model
from .operators import StringSum
from .polynomial import exclusion_polynomial
from .spectrum import free_spectrum
from .sweep import SweepResult, commutator_sweep, inversion_sweep

ED_AUTO_DIMENSION = 4096
"""``exact_diagonalization="auto"`` compares with exact diagonalization up to this dimension."""

LADDER_DIMENSION = 1024
"""Ladder relations are checked with sparse matrices up to this dimension."""

MAX_PAIRS = 2_000_000
"""Largest ``len(A) * len(B)`` for which an exact product or commutator of two sums is formed."""

FLOAT_RTOL = 1e-9
"""Relative tolerance of floating-point checks (string algebra and spectra)."""

_ECF = "S. J. Elman, A. Chapman, S. T. Flammia, Commun. Math. Phys. 388, 969 (2021)"
_FENDLEY = "P. Fendley, J. Phys. A 52, 335002 (2019)"
_AP = "F. C. Alcaraz, R. A. Pimenta, Phys. Rev. B 102, 121101(R) (2020)"


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
    """

    name: str
    method: str
    tolerance: float
    value: float
    passed: bool | None
    detail: str
    reference: str = ""
    seconds: float = 0.0

    @property
    def status(self) -> str:
        """``"passed"``, ``"FAILED"`` or ``"not run"``."""
        return {True: "passed", False: "FAILED", None: "not run"}[self.passed]


@dataclass(frozen=True)
class Report:
    """The checks run by :func:`verify`.

    Attributes
    ----------
    checks : tuple of Check
    ok : bool
        True when at least one check ran and none failed.
    """

    checks: tuple[Check, ...]
    model_text: str = ""
    notes: tuple[str, ...] = field(default=())

    @property
    def ok(self) -> bool:
        ran = [c for c in self.checks if c.passed is not None]
        return bool(ran) and all(c.passed for c in ran)

    @property
    def failed(self) -> tuple[Check, ...]:
        """The checks that failed."""
        return tuple(c for c in self.checks if c.passed is False)

    def __getitem__(self, name: str) -> Check:
        for c in self.checks:
            if c.name == name:
                return c
        raise KeyError(f"no check named {name!r}; checks: {[c.name for c in self.checks]}")

    def __str__(self) -> str:
        head = (
            "all checks passed"
            if self.ok
            else (f"{len(self.failed)} check(s) FAILED" if self.failed else "no check could run")
        )
        lines = [f"verification of {self.model_text}: {head}"]
        for c in self.checks:
            tol = "exact" if c.tolerance == 0 else f"tol {c.tolerance:.2g}"
            measured = "" if c.passed is None else f"; value {c.value:.3g} ({tol})"
            lines.append(f"  [{c.status}] {c.name}: {c.method}{measured}; {c.detail}")
        lines.extend(f"  note: {n}" for n in self.notes)
        return "\n".join(lines)

    def __repr__(self) -> str:
        return f"Report(ok={self.ok}, checks={len(self.checks)}, failed={len(self.failed)})"

    def _repr_html_(self) -> str:
        left = "text-align:left;vertical-align:top"
        rows = []
        for c in self.checks:
            colour = {True: "#1a7f37", False: "#cf222e", None: "#6e7781"}[c.passed]
            tol = "exact" if c.tolerance == 0 else f"{c.tolerance:.2g}"
            texts = [
                html.escape(c.name),
                html.escape(c.method),
                "" if c.passed is None else f"{c.value:.3g}",
                "" if c.passed is None else tol,
                "&lt;0.01 s" if c.seconds < 0.01 else f"{c.seconds:.2f} s",
                html.escape(c.detail),
                f"<small>{html.escape(c.reference)}</small>",
            ]
            cells = [f'<td style="{left};color:{colour};font-weight:bold">{c.status}</td>']
            cells.extend(
                f'<td style="{left}{";white-space:nowrap" if k in (2, 3, 4) else ""}">{t}</td>'
                for k, t in enumerate(texts)
            )
            rows.append("<tr>" + "".join(cells) + "</tr>")
        names = ("result", "check", "method", "value", "tolerance", "time", "detail", "reference")
        head = "".join(f'<th style="{left}">{h}</th>' for h in names)
        verdict = "all checks passed" if self.ok else f"{len(self.failed)} failed"
        notes = "".join(f"<p><small>{html.escape(n)}</small></p>" for n in self.notes)
        return (
            f"<p><b>Verification</b> of <code>{html.escape(self.model_text)}</code>: {verdict}</p>"
            f"<table><thead><tr>{head}</tr></thead><tbody>{''.join(rows)}</tbody></table>{notes}"
        )


def _timed(fn: Any, *args: Any) -> Check:
    """Run one check, timing it; a ValueError (the check cannot apply) becomes "not run"."""
    start = time.perf_counter()
    try:
        check = fn(*args)
    except ValueError as err:
        name = (fn.__doc__ or fn.__name__).strip().splitlines()[0]
        check = Check(name, fn.__name__, 0.0, float("nan"), None, f"could not run: {err}")
    return Check(**{**check.__dict__, "seconds": time.perf_counter() - start})


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
def hamiltonian_check(h: StringSum, charges: Sequence[StringSum]) -> Check:
    """``[H, Q^(s)] = 0`` for every s, pair by pair in the string algebra.

    Parameters
    ----------
    h : StringSum
        The Hamiltonian.
    charges : sequence of StringSum
        ``Q^(1), Q^(2), ...``.

    Returns
    -------
    Check
    """
    start = time.perf_counter()
    method, tol = _method([h, *charges])
    worst, bad = 0.0, []
    for s, q in enumerate(charges, start=1):
        zero, val = _residual(h.commutator(q))
        worst = max(worst, val) if val == val else worst
        if not zero:
            bad.append(s)
    detail = f"orders 1..{len(charges)}, {sum(len(q) for q in charges)} strings in all"
    if bad:
        detail += f"; non-zero for s = {bad}"
    return Check(
        "[H, Q(s)] = 0", method, tol, worst, not bad, detail, _ECF, time.perf_counter() - start
    )


_PAIRS = "[Q(r), Q(s)] = 0"
_SWEEP = "exact sweep over the terms (word automaton, rational arithmetic; no matrices)"


def charge_pairs_check(
    m: Model, charges: Sequence[StringSum] | None, max_pairs: int = MAX_PAIRS
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

    Returns
    -------
    Check
    """
    decided, reason = _try_sweep(m, commutator_sweep, _PAIRS, "pairs (r, s)", _ECF)
    if decided is not None:
        return decided
    if charges is None:
        return Check(_PAIRS, _SWEEP, 0.0, float("nan"), None, reason, _ECF)
    check = _pairwise_check(charges, max_pairs)
    return replace(check, detail=f"{check.detail} (sweep: {reason})")


def _hamiltonian_from_pairs(pairs: Check, why: str) -> Check:
    """``[H, Q(s)] = 0`` read off a sweep of all pairs (H is ``Q^(1)`` plus a constant)."""
    name = "[H, Q(s)] = 0"
    if pairs.method != _SWEEP or pairs.passed is not True:
        return Check(name, "string algebra", 0.0, float("nan"), None, why, _ECF)
    detail = f"the sweep of [Q(r), Q(s)] covers r = 1 (the charges cannot be listed: {why})"
    return replace(pairs, name=name, detail=detail, seconds=0.0)


def _pairwise_check(charges: Sequence[StringSum], max_pairs: int) -> Check:
    method, tol = _method(charges)
    worst, done = 0.0, 0
    bad_pairs: list[tuple[int, int]] = []
    skipped: list[tuple[int, int]] = []
    for r in range(2, len(charges) + 1):
        for s in range(r + 1, len(charges) + 1):
            qr, qs = charges[r - 1], charges[s - 1]
            if len(qr) * len(qs) > max_pairs:
                skipped.append((r, s))
                continue
            zero, val = _residual(qr.commutator(qs))
            done += 1
            worst = max(worst, val) if val == val else worst
            if not zero:
                bad_pairs.append((r, s))
    detail = f"{done} pairs of orders checked pair by pair"
    if skipped:
        detail += (
            f"; {len(skipped)} pairs skipped (more than {max_pairs} string pairs): "
            + ", ".join(f"({r},{s})" for r, s in skipped[:8])
            + (" ..." if len(skipped) > 8 else "")
        )
    if bad_pairs:
        detail += f"; non-zero for (r, s) = {bad_pairs[:8]}"
    # a check with skipped pairs is incomplete: it can fail, but not pass
    passed: bool | None = False if bad_pairs else (None if skipped or not done else True)
    if done == 0 and not skipped:
        detail = "fewer than two orders beyond H: nothing to check"
    return Check(_PAIRS, method, tol, worst, passed, detail, _ECF)


def _try_sweep(
    m: Model, sweep: Callable[[Model], SweepResult], name: str, keys: str, ref: str
) -> tuple[Check | None, str]:
    """The sweep's Check when it decides; otherwise None and the reason it did not."""
    if m.is_symbolic:
        return None, "symbolic couplings"
    try:
        res = sweep(m)
    except ValueError as err:
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
    shown = ", ".join(f"{k}: {_num(c)}" for k, c in sorted(w.coefficients.items())[:6])
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
    m: Model, charges: Sequence[StringSum] | None, max_pairs: int = MAX_PAIRS
) -> Check:
    """``prod_{k < N} T(omega^k u) = P(u^N) * 1`` for every u.

    Numeric couplings: decided exactly for all u by :func:`freeladder.sweep.inversion_sweep`.
    Otherwise (or when the sweep cannot decide) the product is formed in the string algebra at
    u = 3/7 (exact couplings) or a random float u, within ``max_pairs`` pairs of strings.
    """
    n = m.states
    name = _inversion_name(n)
    ref = _ECF if n == 2 else _AP
    decided, reason = _try_sweep(m, inversion_sweep, name, "powers of u", ref)
    if decided is not None:
        return decided
    if charges is None:
        return Check(name, _SWEEP, 0.0, float("nan"), None, reason, ref)
    exact = all(q.is_exact for q in charges)
    u: Any = Fraction(3, 7) if exact else float(np.random.default_rng(7).uniform(0.2, 0.8))
    size = 1 + sum(len(q) for q in charges)
    if size**2 > max_pairs:
        detail = f"T(u) has up to {size} strings: the product is beyond {max_pairs} pairs"
        return Check(name, "string algebra", 0.0, float("nan"), None, f"{detail} ({reason})", ref)
    factors = [transfer_from_charges(charges, u, k) for k in range(n)]
    prod = factors[0]
    for f in factors[1:]:
        if len(prod) * len(f) > max_pairs:
            detail = f"partial product of {len(prod)} strings times {len(f)}: beyond {max_pairs}"
            return Check(name, "string algebra", 0.0, float("nan"), None, detail, ref)
        prod = prod @ f
    p_val = exclusion_polynomial(m)(u**n)
    target = StringSum.identity(n, m.sites, p_val)
    method, tol = _method([prod])
    zero, val = _residual(prod - target)
    detail = f"u = {u}; product has {len(prod)} strings; P(u^N) = {p_val} (sweep: {reason})"
    return Check(name, method, tol, val, zero, detail, ref)


# -- ladder relations ---------------------------------------------------------------------------
def ladder_check(m: Model) -> Check:
    """``[H, Psi_{+-k}] = +-2 eta_k Psi_{+-k}`` with sparse matrices (N = 2, small systems)."""

    name = "[H, Psi(+-k)] = +-2 eta_k Psi(+-k)"
    if m.states != 2:
        return Check(name, "sparse matrices", 0.0, float("nan"), None, "N = 2 only", _FENDLEY)
    if m.dimension > LADDER_DIMENSION:
        return Check(
            name,
            "sparse matrices",
            0.0,
            float("nan"),
            None,
            f"dimension {m.dimension} > {LADDER_DIMENSION}",
            _FENDLEY,
        )
    try:
        lad = ladder_operators(m)
    except ValueError as err:
        return Check(name, "sparse matrices", 0.0, float("nan"), None, str(err), _FENDLEY)
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
    detail = (
        f"{len(lad.quasi_energies)} modes from edge mode {lad.edge.string} "
        f"(term {lad.edge.term}); residual 1-norm relative to ||Psi|| ||H||"
    )
    if vanished:
        detail += f"; {vanished} operator(s) vanished identically"
    passed = worst <= tol and vanished == 0
    return Check(name, "sparse matrices, floating point", tol, worst, passed, detail, _FENDLEY)


# -- sum rules ----------------------------------------------------------------------------------
def sum_rule_check(m: Model) -> Check:
    """``sum eta^N = C_1`` and ``sum eta^{2N} = C_1^2 - 2 C_2`` (from the coefficients of P)."""

    name = "sum rules for eta^N and eta^2N"
    poly = exclusion_polynomial(m)
    n = m.states
    sums = [complex(c) for c in poly.weight_sums]
    c1 = sums[1] if len(sums) > 1 else 0.0
    c2 = sums[2] if len(sums) > 2 else 0.0
    sp = free_spectrum(m, unproven=True)
    eta = np.asarray(sp.quasi_energies, dtype=complex)
    lhs1, lhs2 = np.sum(eta**n), np.sum(eta ** (2 * n))
    rhs1, rhs2 = c1, c1 * c1 - 2 * c2
    scale1 = max(float(np.sum(np.abs(eta) ** n)), abs(rhs1), 1e-300)
    scale2 = max(float(np.sum(np.abs(eta) ** (2 * n))), abs(rhs2), 1e-300)
    dev = max(abs(lhs1 - rhs1) / scale1, abs(lhs2 - rhs2) / scale2)
    tol = FLOAT_RTOL
    detail = (
        f"{len(eta)} quasi-energies; sum eta^N = {_num(lhs1)} vs {_num(rhs1)}, "
        f"sum eta^2N = {_num(lhs2)} vs {_num(rhs2)} (relative deviation)"
    )
    ref = "coefficients of P: Newton's identities (common practice)"
    return Check(name, "floating point vs exact coefficients", tol, dev, dev <= tol, detail, ref)


def _num(v: complex) -> str:
    v = complex(v)
    if abs(v.imag) <= 1e-12 * max(1.0, abs(v)):
        return f"{v.real:.10g}"
    if abs(v.real) <= 1e-12 * abs(v):
        return f"{v.imag:.10g}i"
    return f"{v.real:.10g}{v.imag:+.10g}i"


# -- exact diagonalization ----------------------------------------------------------------------
def exact_diagonalization_check(m: Model) -> Check:
    """Every eigenvalue, with multiplicity, against ``constant + sum_k omega^{s_k} eta_k``."""

    name = "spectrum = exact diagonalization"
    ed = exact_spectrum(m)
    sp = free_spectrum(m, unproven=True)
    table = sp.levels(None)

    def mismatch(detail: str) -> Check:
        return Check(name, "exact diagonalization", 0.0, float("nan"), False, detail, "")

    free = np.asarray(table.energies)
    deg = table.multiplicity
    if deg is None:
        if ed.dimension % max(len(free), 1):
            return mismatch(f"{len(free)} free levels do not divide the dimension {ed.dimension}")
        deg = ed.dimension // len(free)
    free_all = np.repeat(free, deg)
    exact_all = np.asarray(ed.eigenvalues)
    if len(free_all) != len(exact_all):
        return mismatch(
            f"{len(free_all)} free eigenvalues (with multiplicity) vs {len(exact_all)} exact"
        )
    dev = _multiset_distance(free_all, exact_all)
    scale = max(1.0, float(np.max(np.abs(exact_all))))
    bounds = float(np.sum(np.asarray(sp.error_bounds, dtype=float))) if len(free) else 0.0
    tol = max(FLOAT_RTOL * scale, float(ed.error_estimate) + bounds)
    detail = (
        f"dimension {ed.dimension} ({ed.method}); {len(free)} free choices x multiplicity {deg}; "
        f"largest eigenvalue distance after optimal matching"
    )
    ref = "numpy/scipy exact diagonalization (common practice)"
    return Check(name, "exact diagonalization", tol, dev, dev <= tol, detail, ref)


def _multiset_distance(a: np.ndarray, b: np.ndarray) -> float:
    """Largest distance between two equal-size multisets of numbers under the best matching."""
    if (
        np.isrealobj(a)
        and np.isrealobj(b)
        or (np.allclose(np.imag(a), 0) and np.allclose(np.imag(b), 0))
    ):
        return float(np.max(np.abs(np.sort(np.real(a)) - np.sort(np.real(b))))) if len(a) else 0.0
    from scipy.optimize import linear_sum_assignment

    cost = np.abs(a[:, None] - b[None, :])
    rows, cols = linear_sum_assignment(cost)
    return float(cost[rows, cols].max())


# -- the whole report ---------------------------------------------------------------------------
def verify(
    m: Model,
    exact_diagonalization: bool | str = "auto",
    max_pairs: int = MAX_PAIRS,
) -> Report:
    """Run every check that applies to ``m`` and report each with its method and tolerance.

    Parameters
    ----------
    m : Model
    exact_diagonalization : "auto", True or False
        "auto" compares with exact diagonalization when the dimension is at most
        :data:`ED_AUTO_DIMENSION`; True forces it (bounded by :func:`freeladder.exact_spectrum`).
    max_pairs : int
        Work limit of the pairwise string-algebra products (see :func:`charge_pairs_check`),
        used where the sweep cannot decide.

    Returns
    -------
    Report
        ``report.ok`` is True when at least one check ran and none failed; checks that could
        not run are listed as "not run", with the reason, and do not count.  For a model with
        a claw (no theorem applies) the commutation check is expected to fail.

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

    if not isinstance(m, Model):
        raise TypeError(f"verify needs a Model, got {type(m).__name__}")
    if exact_diagonalization not in ("auto", True, False):
        raise ValueError(
            f"exact_diagonalization must be 'auto', True or False, not {exact_diagonalization!r}"
        )
    checks: list[Check] = []
    notes: list[str] = []
    degree = exclusion_polynomial(m).degree
    charges: list[StringSum] | None
    try:
        charges = [charge(m, s) for s in range(1, degree + 1)]
    except ValueError as err:  # too many independent sets to list
        charges = None
        pairs = _timed(charge_pairs_check, m, charges, max_pairs)
        checks.append(_hamiltonian_from_pairs(pairs, str(err)))
    else:
        checks.append(_timed(hamiltonian_check, StringSum.from_model(m), charges))
        pairs = _timed(charge_pairs_check, m, charges, max_pairs)
    checks.append(pairs)
    checks.append(_timed(inversion_check, m, charges, max_pairs))
    numeric = not m.is_symbolic
    if not numeric:
        notes.append("symbolic couplings: spectral checks need numbers (use m.subs first)")
    else:
        if m.states == 2:
            checks.append(_timed(ladder_check, m))
        checks.append(_timed(sum_rule_check, m))
        run_ed = exact_diagonalization is True or (
            exact_diagonalization == "auto" and m.dimension <= ED_AUTO_DIMENSION
        )
        if run_ed:
            checks.append(_timed(exact_diagonalization_check, m))
        elif exact_diagonalization == "auto":
            notes.append(
                f"exact diagonalization skipped: dimension {m.dimension} > {ED_AUTO_DIMENSION}"
            )
    return Report(tuple(checks), _short(m), tuple(notes))


def _short(m: Model) -> str:
    text = str(m)
    return text if len(text) <= 120 else text[:117] + "..."
