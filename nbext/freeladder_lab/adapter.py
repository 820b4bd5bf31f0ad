"""Where the Workbench gets its numbers: the one module between the widgets and ``freeladder``.

Every number the Workbench shows comes through here from the kernel library.  The Workbench
holds a :class:`freeladder.Analysis` (``fl.analyze(model)``: each part computed once, the
coupling-independent ones shared by every model with the same strings); the panels read it and
the few helpers below.

The partial polynomial ``P_s`` (P truncated after order s) and its certified roots come from
:meth:`freeladder.ExclusionPolynomial.truncated`, drawn to show the roots settling on those of
P as orders are added.

References
----------
S. J. Elman, A. Chapman and S. T. Flammia, Commun. Math. Phys. 388, 969 (2021) (charges and
transfer matrix); M. Chudnovsky and P. Seymour, J. Combin. Theory Ser. B 97, 350 (2007) (real
roots of claw-free independence polynomials).
"""

from __future__ import annotations

from itertools import islice
from typing import Any

import numpy as np

import freeladder as fl
from freeladder.algebra.operators import StringSum
from freeladder.algebra.printing import format_terms
from freeladder.base.errors import TooLargeError
from freeladder.base.references import CHUDNOVSKY_SEYMOUR_2007
from freeladder.checks.verification import Check, hamiltonian_check

__all__ = [
    "CLAW_FREE_KINDS",
    "COMMUTATOR_WORK_LIMIT",
    "ED_OVERLAY_DIMENSION",
    "PARTIAL_DEGREE_LIMIT",
    "SECTOR_CHOICE_LIMIT",
    "analyze",
    "charge_step",
    "exact_overlay",
    "order_commutes",
    "partial_coefficients",
    "partial_roots",
    "real_roots_reason",
    "sector_choices",
    "spectrum_outcome",
    "star_points",
    "term_labels",
]

#: Largest Hilbert-space dimension for which the ladder shows exact diagonalization beside it.
ED_OVERLAY_DIMENSION = 1024
#: Largest degree of P for which the partial polynomials P_s are expanded and their roots drawn.
PARTIAL_DEGREE_LIMIT = 60
#: Largest (products of order s) x (terms) for which [H, Q^(s)] is checked in the series view
#: (the string-algebra commutator forms about that many products).
COMMUTATOR_WORK_LIMIT = 50_000
#: Verdicts the library gives only to claw-free frustration graphs (N = 2).
CLAW_FREE_KINDS = ("jordan-wigner", "hidden-free", "integrable")
#: Largest number of sets of cycle values offered one by one in the sector chooser (and the
#: largest number of sectors listed by "all sectors").
SECTOR_CHOICE_LIMIT = 16


def analyze(model: fl.Model) -> fl.Analysis:
    """The library's analysis of ``model`` (parts computed lazily, once; structure shared)."""
    return fl.analyze(model)


def exact_overlay(a: fl.Analysis) -> fl.ExactSpectrum | None:
    """Exact diagonalization for the ladder's overlay, None above :data:`ED_OVERLAY_DIMENSION`."""
    if a.model.dimension > ED_OVERLAY_DIMENSION or a.model.is_symbolic:
        return None
    return a.exact


def charge_step(a: fl.Analysis, s: int) -> fl.ChargeStep:
    """The charge series' step of order ``s``."""
    return next(islice(a.charge_series(), s, None))


def spectrum_outcome(
    a: fl.Analysis, choice: Any = None, unproven: bool = False
) -> fl.SpectrumAnswer:
    """The one spectrum function of the widgets: the library's answer for the sector chooser's
    value (:meth:`freeladder.Analysis.answer`).

    None: the best the theorems allow (the single polynomial when guaranteed, else the ground
    sector of a Jordan-Wigner model with cycles).  "polynomial": the single polynomial only,
    with ``unproven`` the numbers no theorem covers (marked).  "ground", "all" (every sector
    in a table, the ground sector drawn) or a tuple of cycle values: that sector.  Either the
    numbers or the refusal with its reason and what to do instead.
    """
    return a.answer(sector=choice, unproven=unproven)


def sector_choices(a: fl.Analysis) -> list[tuple[str, Any]] | None:
    """The sector chooser's options for a Jordan-Wigner model with cycles, else None.

    Options are (text, value) with value "ground", "all" (offered for at most
    :data:`SECTOR_CHOICE_LIMIT` sectors), "polynomial" (the single polynomial, which the
    library refuses here) or a tuple of cycle-operator eigenvalues (listed when at most
    :data:`SECTOR_CHOICE_LIMIT` sets of them are consistent).
    """
    m = a.model
    if m.states != 2 or m.is_symbolic or len(m) == 0:
        return None
    if a.verdict.kind != "jordan-wigner" or a.verdict.guarantee.proven:
        return None
    structure = fl.sectors(m)
    if not structure.cycle_operators:
        return None
    options: list[tuple[str, Any]] = [
        ("ground sector (exhaustive search / flux theorem)", "ground")
    ]
    if structure.count <= SECTOR_CHOICE_LIMIT:
        options.append(("all sectors (table)", "all"))
    options.append(("single polynomial (no theorem: refused)", "polynomial"))
    n_cycles = len(structure.cycle_operators)
    if structure.rank <= 10:  # at most 1024 labels to look through
        patterns = sorted({label[:n_cycles] for label in structure.sectors}, reverse=True)
        if len(patterns) <= SECTOR_CHOICE_LIMIT:
            for values in patterns:
                signs = ", ".join("+1" if v > 0 else "-1" for v in values)
                options.append((f"cycle strings W = ({signs})", values))
    return options


def term_labels(model: fl.Model) -> list[str]:
    """Each term's operator string in text syntax (no coupling), for vertex labels."""
    return [format_terms([(1, t.string)]) for t in model.terms]


def partial_coefficients(a: fl.Analysis, s: int) -> tuple[Any, ...] | None:
    """Coefficients of ``P_s(y) = sum_{r <= s} (-y)^r C_r`` (constant first), or None.

    ``P_s`` is P truncated after order s: the charges up to order s contribute ``C_r``.  None
    when P's degree exceeds :data:`PARTIAL_DEGREE_LIMIT` (its coefficients are then not
    expanded: they can exceed the floating-point range).
    """
    if a.polynomial.degree > PARTIAL_DEGREE_LIMIT:
        return None
    return tuple(a.polynomial.coefficients[: s + 1])


def partial_roots(a: fl.Analysis, s: int) -> np.ndarray | None:
    """Roots of ``P_s``, certified (:meth:`ExclusionPolynomial.truncated` then ``roots()``:
    python-flint balls), repeated by multiplicity.

    Returns an empty array for s = 0 (no roots) and None when the library refuses (degree above
    its limit, symbolic coefficients).
    """
    if s == 0:
        return np.zeros(0, complex)
    try:
        found = a.polynomial.truncated(s).roots()
    except (TooLargeError, TypeError, ValueError):
        return None
    values = np.repeat(np.asarray(found.values, dtype=complex), found.multiplicities)
    return np.asarray(values, dtype=complex)


def order_commutes(a: fl.Analysis, s: int) -> Check | None:
    """``[H, Q^(s)] = 0`` for the one order s, in the library's exact string algebra.

    None when the products of order s times the number of terms exceed
    :data:`COMMUTATOR_WORK_LIMIT` (the checks panel's sweep decides all orders at once without
    listing them).
    """
    counts = a.charge_counts
    if s < 1 or s >= len(counts) or counts[s] * len(a.model) > COMMUTATOR_WORK_LIMIT:
        return None
    h = StringSum.from_model(a.model)
    return hamiltonian_check(h, [fl.charge(a.model, s, limit=counts[s])])


def real_roots_reason(a: fl.Analysis) -> str | None:
    """Why every root of P is real and positive, or None when no theorem says so.

    For N = 2 and real couplings the weights ``c_j^2`` are positive, and the independence
    polynomial of a claw-free graph with positive weights has only real roots (Chudnovsky and
    Seymour 2007); with the signs of P that makes them positive.
    """
    m = a.model
    if m.states != 2 or m.is_symbolic or a.verdict.kind not in CLAW_FREE_KINDS:
        return None
    if np.any(np.imag(m.coupling_array()) != 0):
        return None
    return f"claw-free graph, N = 2, real couplings ({CHUDNOVSKY_SEYMOUR_2007})"


def star_points(sp: fl.FreeSpectrum) -> np.ndarray:
    """``omega^s eta_k`` for s = 1 .. N-1 and every k (the other N-th roots of ``1 / y_k``).

    Every level is ``sum_k omega^{s_k} eta_k``; the star shows the N choices of each mode.
    """
    n = sp.states
    eta = np.asarray(sp.quasi_energies, complex)
    omega = np.exp(2j * np.pi * np.arange(1, n) / n)
    return np.asarray((omega[:, None] * eta[None, :]).ravel())
