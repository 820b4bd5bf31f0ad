"""Where the Workbench gets its numbers: the one module between the widgets and ``freeladder``.

Every number the Workbench shows comes through here from the kernel library.  The panels never
call ``freeladder`` themselves; they read an :class:`Analysis` and the few helpers below.

:class:`Analysis` is a stand-in with the interface of the library's ``fl.analyze(model)`` (the
coupling-independent parts -- graph, verdict, charge counts -- are computed once and shared by
:meth:`Analysis.with_couplings`).  When the library's own ``Analysis`` is available, replacing
:func:`analyze` by it is the whole switch.

References
----------
S. J. Elman, A. Chapman and S. T. Flammia, Commun. Math. Phys. 388, 969 (2021) (charges and
transfer matrix); M. Chudnovsky and P. Seymour, J. Combin. Theory Ser. B 97, 350 (2007) (real
roots of claw-free independence polynomials).
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import cached_property
from typing import Any

import networkx as nx
import numpy as np

import freeladder as fl
from freeladder.errors import NoTheoremError
from freeladder.operators import StringSum
from freeladder.printing import format_terms
from freeladder.references import CHUDNOVSKY_SEYMOUR_2007
from freeladder.verify import Check, hamiltonian_check

__all__ = [
    "CLAW_FREE_KINDS",
    "COMMUTATOR_WORK_LIMIT",
    "ED_OVERLAY_DIMENSION",
    "PARTIAL_DEGREE_LIMIT",
    "Analysis",
    "Refusal",
    "analyze",
    "order_commutes",
    "partial_coefficients",
    "partial_roots",
    "real_roots_reason",
    "spectrum_or_refusal",
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


class Analysis:
    """Every part of one model's derivation, computed lazily and once.

    Parameters
    ----------
    model : freeladder.Model
        A model with numeric couplings.
    """

    def __init__(self, model: fl.Model, _shared: Analysis | None = None) -> None:
        self.model = model
        if _shared is not None:
            # coupling-independent parts: the strings are the same
            for name in ("graph", "verdict", "chain", "charge_counts"):
                if name in _shared.__dict__:
                    self.__dict__[name] = _shared.__dict__[name]

    @cached_property
    def graph(self) -> nx.Graph:
        """The frustration graph (networkx)."""
        return fl.frustration_graph(self.model)

    @cached_property
    def verdict(self) -> fl.Verdict:
        """Which theorem applies, why, and the witness when one is blocked."""
        return fl.classify(self.model)

    @cached_property
    def chain(self) -> fl.ChainStructure | None:
        """The exclusion-chain order of the terms, when they form one."""
        return fl.chain_structure(self.model)

    @cached_property
    def charge_counts(self) -> tuple[int, ...]:
        """Number of products of each order s = 0 .. alpha(G) (counted, never listed)."""
        return tuple(step.count for step in fl.charge_series(self.model))

    @cached_property
    def polynomial(self) -> fl.ExclusionPolynomial:
        """The exclusion polynomial P(y)."""
        return fl.exclusion_polynomial(self.model)

    def charge_series(self) -> list[fl.ChargeStep]:
        """The charge series, one :class:`freeladder.ChargeStep` per order."""
        return list(fl.charge_series(self.model))

    def spectrum(self, unproven: bool = False) -> fl.FreeSpectrum:
        """The free spectrum; raises :class:`NoTheoremError` unless a theorem guarantees it.

        With ``unproven=True`` the numbers come back even without a theorem (marked).
        """
        return _spectrum(self.model, unproven)

    @cached_property
    def exact(self) -> fl.ExactSpectrum | None:
        """Exact diagonalization for small dimensions, None above the overlay limit."""
        if self.model.dimension > ED_OVERLAY_DIMENSION or self.model.is_symbolic:
            return None
        return fl.exact_spectrum(self.model)

    def report(self, **verify_kwargs: Any) -> fl.Report:
        """The ``verify`` report."""
        return fl.verify(self.model, **verify_kwargs)

    def with_couplings(self, couplings: Any) -> Analysis:
        """The same strings with new couplings, reusing graph, verdict and counts."""
        return Analysis(self.model.with_couplings(couplings), _shared=self)


def analyze(model: fl.Model) -> Analysis:
    """Start the derivation of ``model`` (nothing is computed until asked for)."""
    return Analysis(model)


def _spectrum(model: fl.Model, unproven: bool) -> fl.FreeSpectrum:
    try:
        sp = fl.free_spectrum(model)
    except NoTheoremError:
        if not unproven:
            raise
        return fl.free_spectrum(model, unproven=True)  # type: ignore[call-arg]
    if not sp.provenance.get("guaranteed", True) and not unproven:
        # the library of today returns these numbers marked; the Workbench refuses them
        raise NoTheoremError(str(sp.provenance.get("guarantee", "no theorem applies")))
    return sp


@dataclass(frozen=True)
class Refusal:
    """The library's refusal to give a spectrum, with its reason."""

    reason: str


def spectrum_or_refusal(a: Analysis, unproven: bool) -> fl.FreeSpectrum | Refusal:
    """The spectrum, or the library's stated reason for refusing it."""
    try:
        return a.spectrum(unproven=unproven)
    except NoTheoremError as exc:
        return Refusal(str(exc))


def term_labels(model: fl.Model) -> list[str]:
    """Each term's operator string in text syntax (no coupling), for vertex labels."""
    return [format_terms([(1, t.string)]) for t in model.terms]


def partial_coefficients(a: Analysis, s: int) -> tuple[Any, ...] | None:
    """Coefficients of ``P_s(y) = sum_{r <= s} (-y)^r C_r`` (constant first), or None.

    ``P_s`` is P truncated after order s: the charges up to order s contribute ``C_r``.  None
    when P's degree exceeds :data:`PARTIAL_DEGREE_LIMIT` (its coefficients are then not
    expanded: they can exceed the floating-point range).
    """
    if a.polynomial.degree > PARTIAL_DEGREE_LIMIT:
        return None
    return tuple(a.polynomial.coefficients[: s + 1])


def partial_roots(a: Analysis, s: int) -> np.ndarray | None:
    """Roots of ``P_s`` by numpy's companion-matrix eigenvalues (a numerical estimate).

    Returns an empty array for s = 0 (no roots) and None when the coefficients are not
    expanded (see :func:`partial_coefficients`).
    """
    coeffs = partial_coefficients(a, s)
    if coeffs is None:
        return None
    values = np.array([complex(c) for c in coeffs])
    nonzero = np.nonzero(values)[0]
    if len(nonzero) == 0 or nonzero[-1] == 0:
        return np.zeros(0, complex)
    return np.asarray(np.roots(values[: nonzero[-1] + 1][::-1]), dtype=complex)


def order_commutes(a: Analysis, s: int) -> Check | None:
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


def real_roots_reason(a: Analysis) -> str | None:
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
