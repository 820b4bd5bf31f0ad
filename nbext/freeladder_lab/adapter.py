"""Where the Workbench gets its numbers: the one module between the widgets and ``freeladder``.

Every number the Workbench shows, every model it parses or builds and every export comes
through here from the kernel library; no other module of ``freeladder_lab`` calls it (a test
reads their imports).  :func:`derive` gathers, in the worker, one :class:`View` per model: the
:class:`freeladder.Analysis` (each part computed once, the coupling-independent ones shared by
every model with the same strings), the spectrum or the refusal (:func:`outcome`, the one
function that reads the spectrum), and what the panels draw beside it.  It calls
:func:`checkpoint` (the library's poll of the stop hook the worker installs) between the
parts, and the library polls it inside long calls, so a superseded model stops promptly.

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

import dataclasses
from collections.abc import Mapping, Sequence
from dataclasses import dataclass
from itertools import islice
from typing import Any

import numpy as np
import sympy

import freeladder as fl
from freeladder.algebra.operators import StringSum
from freeladder.algebra.printing import format_terms, format_terms_latex
from freeladder.base.errors import TooLargeError
from freeladder.base.interrupt import poll as checkpoint
from freeladder.base.references import CHUDNOVSKY_SEYMOUR_2007
from freeladder.checks.verification import (
    Check,
    CheckNotApplicable,
    exact_diagonalization_check,
    hamiltonian_check,
)

__all__ = [
    "CLAW_FREE_KINDS",
    "COMMUTATOR_WORK_LIMIT",
    "ED_OVERLAY_DIMENSION",
    "PARTIAL_DEGREE_LIMIT",
    "SECTOR_CHOICE_LIMIT",
    "WHOLE_SPACE_DIMENSION",
    "Analysis",
    "Check",
    "ExactSpectrum",
    "ExactOverlay",
    "Interrupted",
    "Model",
    "ModelSyntaxError",
    "Outcome",
    "SectorRow",
    "View",
    "analyze",
    "build_family",
    "chain_reach",
    "charge_step",
    "checkpoint",
    "derive",
    "exact_overlay",
    "export_calculation",
    "family_couplings",
    "multiplicity_text",
    "order_commutes",
    "outcome",
    "parse_text",
    "partial_coefficients",
    "partial_roots",
    "charge_latex",
    "product_latex",
    "product_text",
    "numeric_model",
    "real_roots_reason",
    "rescaled",
    "sector_choices",
    "spectrum_outcome",
    "star_points",
    "stop_when",
    "term_labels",
    "term_text",
]

#: The library's types the panels name in their signatures.
Analysis = fl.Analysis
Model = fl.Model
ExactSpectrum = fl.ExactSpectrum
Report = fl.Report
FreeSpectrum = fl.FreeSpectrum
ModelSyntaxError = fl.ModelSyntaxError
#: The stop hook the worker installs for its threads, and what a stopped library call raises.
stop_when = fl.stop_when
Interrupted = fl.Interrupted

#: Largest dimension of the drawn sector (the whole space for a model without sectors) that
#: the ladder diagonalises exactly beside the free levels.  Measured on the shared 2-core
#: machine under a load average of 11-16 (``fl.sector_exact_spectrum``, 12 levels): an open XY
#: chain's whole space took 1.2 s at 2^14 and 39 s at 2^16 (3.7 s with one BLAS thread); the
#: ground sector of a 20-site two-leg Kitaev-type ladder (dimension 2^11) took 1.7 s with its
#: answer.  2^16 kept a coupling change waiting too long, so the bound is 2^14.
ED_OVERLAY_DIMENSION = 2**14
#: Largest dimension of a complex spectrum (N > 2, complex couplings) drawn beside the whole
#: space's exact levels: every eigenvalue, densely.
WHOLE_SPACE_DIMENSION = 1024
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


@dataclass(frozen=True)
class ExactOverlay:
    """The ladder's exact column: the levels of the sector drawn, and how they agree.

    Attributes
    ----------
    exact : ExactSpectrum or None
        The lowest exact levels of the same sector as the free levels (None when not run).
    check : Check or None
        The comparison (:func:`freeladder.same_sector_check`, or for complex levels
        :func:`~freeladder.checks.verification.exact_diagonalization_check`); None when not run.
    where : str
        Which sector, in words ("the whole space", "the sector W = +1, ...").
    note : str
        Why the exact check did not run (empty when it ran).
    """

    exact: fl.ExactSpectrum | None
    check: Check | None
    where: str
    note: str = ""


def exact_overlay(a: fl.Analysis, choice: Any = None, unproven: bool = False) -> ExactOverlay:
    """Exact levels of the same sector as the free levels drawn for ``choice``, with the
    comparison, up to sector dimension :data:`ED_OVERLAY_DIMENSION`; beyond it (or without a
    spectrum) the reason the check did not run, never a pass."""
    m = a.model
    answer = spectrum_outcome(a, choice, unproven)
    values = answer.cycle_values if answer.route == "sector" else ()
    where = (
        "the sector "
        + ", ".join(f"{g} = {v:+d}" for g, v in zip(answer.cycle_strings, values, strict=True))
        if values
        else "the whole space"
    )
    sp = answer.spectrum
    if sp is None or m.is_symbolic:
        return ExactOverlay(None, None, where, "exact check not run: no free levels to compare")
    if m.states != 2 or np.iscomplexobj(sp.quasi_energies):
        if m.dimension > WHOLE_SPACE_DIMENSION:
            return ExactOverlay(
                None,
                None,
                where,
                f"exact check not run: dimension {m.states}^{len(m.sites)} above "
                f"{WHOLE_SPACE_DIMENSION}, the largest diagonalised whole for complex levels",
            )
        exact = a.exact
        why = "" if answer.guaranteed else answer.reason
        return ExactOverlay(exact, exact_diagonalization_check(m, (sp, why), exact), where)
    try:
        exact, check = fl.same_sector_check(
            a, choice, unproven, k=_LADDER_LEVELS, limit=ED_OVERLAY_DIMENSION
        )
    except CheckNotApplicable as err:
        return ExactOverlay(None, None, where, f"exact check not run: {err}")
    return ExactOverlay(exact, check, where)


#: How many lowest levels the exact column compares (the ladder draws as many).
_LADDER_LEVELS = 12


def charge_step(a: fl.Analysis, s: int) -> fl.ChargeStep:
    """The charge series' step of order ``s``."""
    return next(islice(a.charge_series(), s, None))


# -- the spectrum, or why there is none -----------------------------------------------------------
@dataclass(frozen=True)
class SectorRow:
    """One sector of a Jordan-Wigner model in the "all sectors" table."""

    label: str  # the cycle and parity values, e.g. "+1, -1, +1"
    lowest: complex
    modes: int
    multiplicity: int


@dataclass(frozen=True)
class Outcome:
    """What the Workbench shows for the spectrum: the numbers, or the library's refusal.

    Exactly one of ``spectrum`` and ``refusal`` is set.  ``sectors`` holds the "all sectors"
    table (empty otherwise); ``spectrum`` is then the ground sector's, drawn in the plots.
    ``label`` says in words which spectrum is drawn (for plot titles and the ladder).
    """

    spectrum: fl.FreeSpectrum | None = None
    refusal: str = ""
    sectors: tuple[SectorRow, ...] = ()
    label: str = "free spectrum"

    @property
    def guaranteed(self) -> bool:
        """True when a theorem guarantees the numbers drawn."""
        return self.spectrum is not None and bool(self.spectrum.provenance.guaranteed)

    @property
    def sector(self) -> Mapping[str, Any] | None:
        """The library's description of the sector drawn, or None for the whole model."""
        if self.spectrum is None:
            return None
        return self.spectrum.provenance.sector


def _sector_label(sp: fl.FreeSpectrum) -> str:
    sector = sp.provenance.sector
    if sector is None:
        return "free spectrum"
    ops = sector.get("cycle_operators", ())
    values = sector.get("cycle_values", ())
    pairs = ", ".join(f"{op} = {v:+d}" for op, v in zip(ops, values, strict=False))
    return f"one sector ({pairs})" if pairs else "one sector"


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


def outcome(a: fl.Analysis, choice: Any = None, unproven: bool = False) -> Outcome:
    """The answer of :func:`spectrum_outcome`, in the form the panels draw."""
    answer = spectrum_outcome(a, choice, unproven)
    if answer.spectrum is None:
        return Outcome(refusal=answer.message, label="refused")
    rows = tuple(
        SectorRow(_signs(r.label), complex(r.lowest), int(r.modes), int(r.multiplicity))
        for r in (answer.sectors or ())
    )
    return Outcome(spectrum=answer.spectrum, sectors=rows, label=_sector_label(answer.spectrum))


def _signs(values: Sequence[int]) -> str:
    return ", ".join("+1" if v > 0 else "-1" for v in values)


def sector_choices(a: fl.Analysis) -> list[tuple[str, Any]] | None:
    """The sector chooser's options for a Jordan-Wigner model with cycles, else None.

    Options are (text, value) with value "ground", "all" (offered for at most
    :data:`SECTOR_CHOICE_LIMIT` sectors), "polynomial" (the single polynomial, which the
    library refuses here) or a tuple of cycle-string eigenvalues
    (listed when at most :data:`SECTOR_CHOICE_LIMIT` sets of them are consistent); each such
    option names the cycle string each value belongs to.
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
    names = [format_terms([(1, w)]) for w in structure.cycle_operators]
    n_cycles = len(names)
    if structure.rank <= 10:  # at most 1024 labels to look through
        patterns = sorted({label[:n_cycles] for label in structure.sectors}, reverse=True)
        if len(patterns) <= SECTOR_CHOICE_LIMIT:
            for values in patterns:
                pairs = ", ".join(
                    f"{name} = {'+1' if v > 0 else '-1'}"
                    for name, v in zip(names, values, strict=True)
                )
                options.append((f"cycle strings: {pairs}", tuple(values)))
    return options


# -- one model's view ------------------------------------------------------------------------------
@dataclass(frozen=True)
class View:
    """Everything the panels draw for one model, gathered in the worker by :func:`derive`.

    Attributes
    ----------
    model : Model
        The model as given (its couplings may be symbols).
    analysis : Analysis
        The analysis of the numeric model on screen.
    outcome : Outcome
        The spectrum drawn, or the refusal.
    exact : ExactOverlay
        The exact levels of the sector drawn, for the ladder, and their agreement.
    real_reason : str or None
        Why every root is real and positive (:func:`real_roots_reason`).
    choices : list of (text, value) or None
        The sector chooser's options (:func:`sector_choices`).
    choice : Any
        The sector chosen.
    """

    model: fl.Model
    analysis: fl.Analysis
    outcome: Outcome
    exact: ExactOverlay
    real_reason: str | None
    choices: list[tuple[str, Any]] | None
    choice: Any


def derive(model: fl.Model, numeric: fl.Model, unproven: bool, choice: Any) -> View:
    """Compute every part the panels draw, one part at a time.

    Between parts it calls :func:`checkpoint`, and the library polls the same stop hook inside
    long calls: a newer edit stops this one promptly.
    """
    a = analyze(numeric)
    # (the graph panel asks for the graph itself, only when the strings change)
    for part in ("verdict", "chain", "charge_counts"):
        checkpoint()
        getattr(a, part)
    checkpoint()
    choices = sector_choices(a)
    if choices is None:
        choice = None
    elif choice not in [value for _, value in choices]:
        choice = "ground"  # a Jordan-Wigner model with cycles: its ground sector first
    checkpoint()
    shown = outcome(a, choice, unproven)
    checkpoint()
    exact = exact_overlay(a, choice, unproven)
    return View(model, a, shown, exact, real_roots_reason(a), choices, choice)


# -- text of the model ----------------------------------------------------------------------------
def parse_text(text: str, states: int) -> fl.Model:
    """The model the text describes (raises :class:`ModelSyntaxError` or ValueError)."""
    return fl.parse_model(text, states=states)


def term_text(string: Any) -> str:
    """One operator string in the text syntax (no coupling)."""
    return format_terms([(1, string)])


def chain_reach(model: fl.Model) -> int | None:
    """The reach of ``model`` when its terms form an exclusion chain, else None."""
    chain = fl.chain_structure(model)
    return None if chain is None else int(chain.reach)


def build_family(kind: str, size: int, reach: int, states: int) -> fl.Model:
    """A preset family's model with the builder's own (uniform) couplings."""
    if kind == "chain":
        return fl.exclusion_chain(size, reach=reach, states=states)
    if kind == "ising":
        return fl.ising_chain(size)
    if kind == "clock":
        return fl.clock_chain(size, states=states)
    if kind == "lattice":
        return fl.ising_lattice(size, size)
    if kind == "honeycomb":
        return fl.kitaev_honeycomb(size, 2)
    raise ValueError(f"unknown family {kind!r}")


def family_couplings(
    kind: str, count: int, a: Any, b: Any, low: float, high: float, seed: int, phases: bool
) -> list[Any]:
    """Coupling factors of a pattern: "uniform", "staggered", "random" (complex with random
    ``phases``) or "symbols" (the symbols a, b, a, b, ...)."""
    if kind == "uniform":
        return [a] * count
    if kind == "staggered":
        return list(fl.staggered(count, a, b))
    if kind == "random":
        if phases:
            return list(np.asarray(fl.complex_couplings(count, (low, high), seed=seed)))
        return list(np.asarray(fl.random_couplings(count, low, high, seed=seed)))
    if kind == "symbols":
        return list(fl.staggered(count, sympy.Symbol("a"), sympy.Symbol("b")))
    raise ValueError(f"unknown coupling pattern {kind!r}")


def rescaled(model: fl.Model, factors: Sequence[Any]) -> fl.Model:
    """The model with coupling j multiplied by ``factors[j]``."""
    return model.with_couplings([c * f for c, f in zip(model.couplings, factors, strict=True)])


def numeric_model(model: fl.Model, values: dict[str, float]) -> fl.Model:
    """``model`` with each symbol set to ``values[name]`` (1 when not given)."""
    if not model.is_symbolic:
        return model
    return model.subs({sym: values.get(str(sym), 1.0) for sym in model.symbols})


# -- export ---------------------------------------------------------------------------------------
def export_calculation(model: fl.Model, numeric: fl.Model) -> fl.WorkedCalculation:
    """The worked calculation of the numeric model the views show.

    When ``model`` has symbols, the cells are those of ``numeric`` (the slider values), and a
    comment in the first code cell names each symbol's value.
    """
    if not isinstance(numeric, fl.Model):
        raise ValueError("no model to export yet: the model text has not parsed")
    wc = fl.worked_calculation(numeric)
    if not model.is_symbolic:
        return wc
    values = _symbol_values(model, numeric)
    note = "# The Workbench's model " + repr(str(model)) + " with its symbols set by the sliders:\n"
    note += "".join(f"# {name} = {value}\n" for name, value in values)
    cells = list(wc.cells)
    for i, cell in enumerate(cells):
        if cell.kind == "code":
            cells[i] = fl.Cell("code", note + cell.source)
            break
    return dataclasses.replace(wc, cells=tuple(cells))


def _symbol_values(model: fl.Model, numeric: fl.Model) -> list[tuple[str, str]]:
    """(name, value) of each symbol of ``model``, read from where ``numeric`` put it."""
    out = []
    for sym in sorted(model.symbols, key=str):
        for c, n in zip(model.couplings, numeric.couplings, strict=True):
            if isinstance(c, sympy.Expr) and c == sym:
                out.append((str(sym), _plain(n)))
                break
        else:
            out.append((str(sym), "(set by a slider)"))
    return out


def _plain(v: Any) -> str:
    z = complex(v)
    return f"{z.real:.12g}" if z.imag == 0 else f"{z.real:.12g}{z.imag:+.12g}j"


# -- numbers as text ------------------------------------------------------------------------------
def multiplicity_text(n: int | None, states: int) -> str:
    """A multiplicity as the panels write it: ``x4``, ``x 2^1000``, ``x 3^20``.

    Powers of N (or of 2) above a thousand are written as powers; other large numbers in
    scientific notation (``x 7.5e301``), so that a 400-digit integer never fills a panel.
    """
    if n is None:
        return "x?"
    if n < 1000:
        return f"x{n}"
    for base in sorted({states, 2}):
        k = n.bit_length() if base == 2 else 0
        if base == 2 and n == 1 << (k - 1):
            return f"x {base}^{k - 1}"
        if base != 2:
            power, k = 1, 0
            while power < n:
                power *= base
                k += 1
            if power == n:
                return f"x {base}^{k}"
    digits = len(str(n)) - 1
    return f"x {int(str(n)[:2]) / 10:.1f}e{digits}"


def _tidy(c: Any) -> Any:
    """A product of couplings without floating-point noise: 12 significant digits."""
    if isinstance(c, (int, sympy.Expr)) and not isinstance(c, bool):
        return c
    z = complex(c)
    re, im = float(f"{z.real:.12g}"), float(f"{z.imag:.12g}")
    return re if im == 0 else complex(re, im)


def product_text(term: Any) -> str:
    """One product of a charge in the text syntax, its coupling without float noise."""
    return format_terms([(_tidy(term.coupling), term.string)])


def product_latex(term: Any) -> str:
    """One product of a charge in LaTeX, its coupling without float noise."""
    return format_terms_latex([(_tidy(term.coupling), term.string)])


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


def _visible(latex: str) -> int:
    """About how many characters a LaTeX snippet shows (markup left out)."""
    for markup in ("_{", "^{", "}", "{", "\\,", "\\"):
        latex = latex.replace(markup, "")
    return len(latex.replace(" ", ""))


def charge_latex(step: fl.ChargeStep, max_terms: int, width: int) -> str:
    """``Q^(s) = ...`` in LaTeX (no dollars), its first ``max_terms`` products, broken into
    lines of at most about ``width`` visible characters (MathJax does not break formulas)."""
    shown = step.head(max_terms)
    more = step.count - len(shown)
    tail = rf" + \dots \; (\text{{{more} more products}})" if more > 0 else ""
    lines: list[str] = []
    used = width  # start a first line
    for t in shown:
        text = product_latex(t)
        size = _visible(text) + 3
        if used + size > width and lines and lines[-1]:
            lines.append("")
            used = 0
        elif not lines:
            lines.append("")
            used = 0
        line = lines[-1]
        if line:
            line += rf" - {text[1:]}" if text.startswith("-") else f" + {text}"
        else:
            line = text
        lines[-1] = line
        used += size
    if not lines:
        lines = ["0"]
    if len(lines) == 1:
        return f"Q^{{({step.order})}} = {lines[0]}{tail}"
    body = lines[0] + "".join(
        rf" \\ & - {t[1:]}" if t.startswith("-") else rf" \\ & + {t}" for t in lines[1:]
    )
    return rf"\begin{{aligned}} Q^{{({step.order})}} = {{}} & {body}{tail} \end{{aligned}}"


#: Time points of the Workbench's edge autocorrelation (log-spaced, after t = 0).
DYNAMICS_POINTS = 300


def edge_dynamics(a: fl.Analysis) -> fl.Autocorrelation | str:
    """The edge operator's infinite-temperature autocorrelation, or why there is none.

    The times run from ``t = 0`` over log-spaced points from a twentieth of the fastest
    period to twenty times the slowest one (capped at 10^8 fastest periods), so that both
    the fast decay and the plateau of a slow edge mode show.

    Returns
    -------
    Autocorrelation or str
        The library's result, or the library's reason in words when the edge operator has no
        expansion in the modes (or the model no free spectrum).
    """
    try:
        expansion = fl.edge_expansion(a.model)
    except (fl.NotExpandableError, fl.NoTheoremError, ValueError) as err:
        return str(err)
    eta = np.abs(np.asarray(expansion.quasi_energies, complex))
    eta = eta[np.isfinite(eta) & (eta > 0)]
    if not len(eta):
        return "the modes have no nonzero quasi-energy: the edge operator does not move"
    fast, slow = float(eta.max()), float(eta.min())
    lo = 0.05 / fast
    hi = max(min(20.0 / slow, 1e8 / fast), 10 * lo)
    times = np.concatenate([[0.0], np.geomspace(lo, hi, DYNAMICS_POINTS)])
    checkpoint()
    return fl.autocorrelation(a.model, times)
