"""The worked calculation: every step of a model's solution as cells that check themselves.

:func:`worked_calculation` runs the whole chain once (frustration graph and verdict, charges,
exclusion polynomial, roots, quasi-energies, levels, checks) and writes it out as an ordered
list of markdown and code cells.  The markdown states each step with its formula and its
paper; the code rebuilds the model with its couplings written literally, recomputes every step
with freeladder and asserts the recomputed values against the exported ones within stated
tolerances, so that a changed coupling makes the cells fail.  The same cells become a notebook
(:meth:`WorkedCalculation.to_notebook`), a script (:meth:`WorkedCalculation.to_script`) or a
LaTeX section for a supplement (:meth:`WorkedCalculation.to_latex`).
"""

from __future__ import annotations

import hashlib
import json
import math
import numbers
import textwrap
from collections.abc import Iterable, Iterator, Sequence
from dataclasses import dataclass
from fractions import Fraction
from pathlib import Path
from typing import Any, NamedTuple, overload

import numpy as np

from ..algebra.model import Model
from ..algebra.printing import format_terms, format_terms_latex
from ..algebra.strings import WeylString
from ..algebra.syntax import parse_model
from ..analysis import Analysis, analyze
from ..base import display
from ..base import references as refs
from ..base.jsonready import json_ready
from ..checks.verification import Report
from ..graphs.graph import ADJACENCY
from ..spectra.answer import SpectrumAnswer
from ..spectra.charges import transfer_matrix
from ..spectra.ed import ExactSpectrum
from ..spectra.majorana import sectors
from ..spectra.spectrum import FreeSpectrum

__all__ = ["STEPS", "Cell", "WorkedCalculation", "worked_calculation"]

STEPS = ("model", "verdict", "charges", "polynomial", "spectrum", "levels", "dynamics", "checks")
"""The steps a worked calculation can hold, in order ("model" is always included)."""

SHOWN_ORDERS = 12
"""Orders of the charge series listed one by one; longer series are summarised."""

SHOWN_LEVELS = 10
"""How many of the lowest levels are exported."""

EDGE_LIST_LIMIT = 80
"""Frustration graphs with more edges are asserted by their edge count only."""

DENSE_LIMIT = 2**10
"""Largest dimension for which the inversion relation is also checked with dense matrices."""

DENSE_SETS = 4096
"""... and largest number of independent sets (products in the transfer matrix) for it."""

COEFFICIENT_RTOL = 1e-12
"""Relative tolerance for float coefficients (exact sums rounded once to double precision)."""

ULPS = 4
"""Units in the last place added to every floating-point tolerance (printing round trips)."""


class Cell(NamedTuple):
    """One cell: ``kind`` is "markdown" or "code"; ``source`` its text."""

    kind: str
    source: str


@dataclass(frozen=True)
class WorkedCalculation(Sequence[Cell]):
    """A frozen sequence of cells: one model's solution, step by step, checking itself.

    Attributes
    ----------
    cells : tuple of Cell
        Markdown and code cells in order.
    model_text : str
        The model in freeladder's text syntax.
    guaranteed : bool
        True when a theorem guarantees the free spectrum and the cells assert it; False when
        the cells state the verdict and the probes only.
    latex : str
        The standalone LaTeX section returned by :meth:`to_latex`.
    """

    cells: tuple[Cell, ...]
    model_text: str
    guaranteed: bool
    latex: str

    @overload
    def __getitem__(self, i: int) -> Cell: ...

    @overload
    def __getitem__(self, i: slice) -> tuple[Cell, ...]: ...

    def __getitem__(self, i: int | slice) -> Cell | tuple[Cell, ...]:
        return self.cells[i]

    def __len__(self) -> int:
        return len(self.cells)

    def __iter__(self) -> Iterator[Cell]:
        return iter(self.cells)

    def __repr__(self) -> str:
        kinds = [c.kind for c in self.cells]
        return (
            f"WorkedCalculation({len(self.cells)} cells: {kinds.count('markdown')} markdown, "
            f"{kinds.count('code')} code; guaranteed={self.guaranteed})"
        )

    def to_dicts(self) -> list[dict[str, str]]:
        """The cells as ``{"kind": ..., "source": ...}`` dictionaries (JSON-ready)."""
        return [{"kind": c.kind, "source": c.source} for c in self.cells]

    def to_dict(self) -> dict[str, Any]:
        """JSON-ready fields: ``cells`` (as :meth:`to_dicts`), ``model_text``, ``guaranteed``."""
        return json_ready(
            {"cells": self.to_dicts(), "model_text": self.model_text, "guaranteed": self.guaranteed}
        )

    def to_notebook(self, path: str | Path, overwrite: bool = False) -> Path:
        """Write the cells as a Jupyter notebook (nbformat 4) with a python3 kernelspec.

        Parameters
        ----------
        path : str or Path
            The file to create.
        overwrite : bool
            Replace an existing file.  Off by default: an existing file is never touched.

        Returns
        -------
        Path
            The path written.

        Raises
        ------
        FileExistsError
            If ``path`` exists and ``overwrite`` is False.
        """
        import nbformat

        target = Path(path)
        if (target.exists() or target.is_symlink()) and not overwrite:  # a dangling link too
            raise FileExistsError(
                f"{target} already exists; the worked calculation was not written (choose "
                "another name, or pass overwrite=True to replace the file)"
            )
        nb = nbformat.v4.new_notebook()
        nb.metadata["kernelspec"] = {
            "name": "python3",
            "display_name": "Python 3",
            "language": "python",
        }
        nb.metadata["language_info"] = {"name": "python"}
        for cell in self.cells:
            if cell.kind == "code":
                nb.cells.append(nbformat.v4.new_code_cell(cell.source))
            else:
                nb.cells.append(nbformat.v4.new_markdown_cell(cell.source))
        nbformat.validate(nb)
        target.write_text(nbformat.writes(nb) + "\n", encoding="utf-8")
        return target

    def to_script(self) -> str:
        """The cells as one Python script: markdown becomes comments, code stays code."""
        parts = []
        for cell in self.cells:
            if cell.kind == "code":
                parts.append(cell.source.rstrip() + "\n")
            else:
                lines = []
                for line in cell.source.rstrip().splitlines():
                    wrapped = textwrap.wrap(
                        line, width=97, break_long_words=False, break_on_hyphens=False
                    )
                    lines += [("# " + w).rstrip() for w in wrapped] or ["#"]
                parts.append("\n".join(lines) + "\n")
        return "\n".join(parts) + '\nprint("every step of the worked calculation checked out")\n'

    def to_latex(self, standalone: bool = False) -> str:
        """A LaTeX section for a supplement (needs the packages ``amsmath``, ``longtable``
        and ``array``), or with ``standalone=True`` a whole document that compiles as it is.

        It holds the model (broken over lines), the theorem that applies (or the statement
        that none does), the exclusion polynomial, a table of quasi-energies with their bounds
        and the checks (tables that break across pages, cells that wrap).
        """
        if standalone:
            return _LATEX_PREAMBLE + self.latex + "\\end{document}\n"
        return self.latex


# -- literals and formatting ---------------------------------------------------------------------
def _literal(value: Any) -> str:
    """Python source that evaluates to exactly ``value`` (int, Fraction, float, complex)."""
    if isinstance(value, np.generic):
        value = value.item()
    if isinstance(value, bool) or not isinstance(value, numbers.Number):
        raise TypeError(f"cannot write {value!r} as a literal number")
    if isinstance(value, int):
        return str(value)
    if isinstance(value, Fraction):
        return f"Fraction({value.numerator}, {value.denominator})"
    if isinstance(value, float):
        return _float_literal(value)
    if isinstance(value, complex):
        return f"complex({_float_literal(value.real)}, {_float_literal(value.imag)})"
    raise TypeError(f"cannot write {value!r} ({type(value).__name__}) as a literal number")


def _float_literal(x: float) -> str:
    if not math.isfinite(x):
        return f"float({str(x)!r})"
    return repr(float(x))


def _array_literal(values: Iterable[Any]) -> str:
    return "[" + ", ".join(_literal(v) for v in values) + "]"


def _num(v: Any) -> str:
    """A number for reading (markdown): the display's text form."""
    return display.number_text(v)


def _sentence(text: str) -> str:
    """``text`` ending in exactly one full stop."""
    text = text.rstrip()
    return text if text.endswith((".", "!", "?")) else text + "."


def _wrapped(head: str, items: Sequence[str], tail: str) -> str:
    """``head + ", ".join(items) + tail``, reflowed by :func:`_fit` when too long."""
    return _fit(head + ", ".join(items) + tail)


def _fit(code: str, width: int = 100) -> str:
    """Code lines longer than ``width`` with their longest bracketed list broken over lines,
    as many items per line as fit (lint-clean exports: no line past the project's limit)."""
    out = []
    for line in code.split("\n"):
        out.append(_fit_line(line, width) if len(line) > width else line)
    return "\n".join(out)


def _fit_line(line: str, width: int) -> str:
    spans = [(a, b) for a, b in _bracket_spans(line) if len(_top_level_items(line[a + 1 : b])) > 1]
    if not spans:
        return line
    start, end = max(spans, key=lambda se: se[1] - se[0])
    items = _top_level_items(line[start + 1 : end])
    indent = " " * (len(line) - len(line.lstrip()))
    inner = indent + "    "
    rows: list[str] = []
    current = ""
    for item in items:
        piece = f"{current} {item}," if current else f"{inner}{item},"
        if current and len(piece) > width:
            rows.append(current)
            current = f"{inner}{item},"
        else:
            current = piece
    rows.append(current)
    return "\n".join([line[: start + 1], *rows, indent + line[end:]])


def _bracket_spans(line: str) -> list[tuple[int, int]]:
    """``(open, close)`` index pairs of the brackets of ``line`` outside string literals."""
    spans, stack = [], []
    quote = ""
    for k, ch in enumerate(line):
        if quote:
            if ch == quote and line[k - 1] != "\\":
                quote = ""
        elif ch in "\"'":
            quote = ch
        elif ch in "([{":
            stack.append(k)
        elif ch in ")]}" and stack:
            spans.append((stack.pop(), k))
    return spans


def _top_level_items(text: str) -> list[str]:
    """The comma-separated items of ``text`` at bracket depth 0, outside string literals."""
    items, depth, quote, current = [], 0, "", ""
    for k, ch in enumerate(text):
        if quote:
            if ch == quote and text[k - 1] != "\\":
                quote = ""
        elif ch in "\"'":
            quote = ch
        elif ch in "([{":
            depth += 1
        elif ch in ")]}":
            depth -= 1
        elif ch == "," and depth == 0:
            items.append(current.strip())
            current = ""
            continue
        current += ch
    if current.strip():
        items.append(current.strip())
    return items


def _text_literal(text: str, indent: str = "    ", width: int = 92) -> list[str]:
    """A long ASCII string as adjacent double-quoted literals, split before ``+`` and ``-``."""
    pieces: list[str] = []
    current = ""
    for token in text.split(" "):
        candidate = f"{current} {token}" if current else token
        if current and token in ("+", "-") and len(candidate) > width - 20:
            pieces.append(current + " ")
            current = token
        elif len(candidate) > width and current:
            pieces.append(current + " ")
            current = token
        else:
            current = candidate
    pieces.append(current)
    return [indent + json.dumps(p) for p in pieces]


def _model_text(m: Model) -> str | None:
    """The model's text, when parsing it gives the same model back (strings, coupling values
    and kinds, constant, sites); None otherwise."""
    text = format_terms(m.terms, m.constant, keep_types=True)
    try:
        again = parse_model(text, states=m.states, sites=list(m.sites))
    except (ValueError, TypeError):
        return None
    same = (
        [(_kind(c), c, g) for c, g in again.terms] == [(_kind(c), c, g) for c, g in m.terms]
        and _kind(again.constant) == _kind(m.constant)
        and again.constant == m.constant
        and again.sites == m.sites
    )
    return text if same else None


def _kind(c: Any) -> str:
    """ "exact" for int and Fraction (the same arithmetic), else the type's name."""
    return "exact" if isinstance(c, (int, Fraction)) else type(c).__name__


def _rebuilt(m: Model) -> Model:
    """The model as the exported cells build it (from its text where that reads back)."""
    text = _model_text(m)
    return m if text is None else parse_model(text, states=m.states, sites=list(m.sites))


def _fingerprint(m: Model) -> str:
    """SHA-256 (16 hex digits) of the model's strings, exact couplings, constant and sites.

    The exported cells compute the same expression (:data:`_FINGERPRINT_SOURCE`).
    """
    parts = [(t.string.factors, t.string.phase, t.coupling) for t in m.terms]
    exact = repr(parts + [m.constant, m.sites])
    return hashlib.sha256(exact.encode()).hexdigest()[:16]


_FINGERPRINT_SOURCE = (
    "parts = [(t.string.factors, t.string.phase, t.coupling) for t in m.terms]\n"
    "exact = repr(parts + [m.constant, m.sites])\n"
    "fingerprint = hashlib.sha256(exact.encode()).hexdigest()[:16]"
)


def _model_source(m: Model) -> str:
    """The model rebuilt from its text, or (when the text does not read back exactly) from
    its strings with every coupling written literally."""
    text = _model_text(m)
    if text is not None:
        options = [] if m.states == 2 else [f"states={m.states}"]
        if parse_model(text, states=m.states).sites != m.sites:
            options.append(f"sites={list(m.sites)!r}")
        call = f"m = fl.parse_model({', '.join([json.dumps(text), *options])})"
        if len(call) <= 100:
            return call
        literal = _text_literal(text)
        literal[-1] += ","
        return "\n".join(
            ["m = fl.parse_model(", *literal]
            + ([f"    {', '.join(options)},"] if options else [])
            + [")"]
        )
    lines = [
        "# The model, every coupling written literally (floats round-trip through repr).",
        "terms = [",
    ]
    for term in m.terms:
        g = term.string
        factors = ", ".join(f"({site!r}, {a}, {b})" for site, a, b in g.factors)
        phase = f", phase={g.phase}" if g.phase else ""
        lines.append(
            f"    ({_literal(term.coupling)}, fl.make_string({g.states}, [{factors}]{phase})),"
        )
    lines.append("]")
    const = f", constant={_literal(m.constant)}" if m.constant != 0 else ""
    lines.append(
        f"m = fl.Model.from_terms(terms, states={m.states}, sites={list(m.sites)!r}{const})"
    )
    return "\n".join(lines)


def _model_latex(m: Model) -> str:
    """``H = ...`` in LaTeX, broken over lines where it is long."""
    pieces = [format_terms_latex([], m.constant)] if m.constant != 0 else []
    pieces += [format_terms_latex([term]) for term in m.terms]
    return display.aligned_sum(pieces, "H")


def _display_block(formula: str) -> list[str]:
    """A display formula for the LaTeX export: an ``aligned`` block becomes ``align*`` (it
    may break across pages with ``\\allowdisplaybreaks``), anything else ``equation*``."""
    head, tail = r"\begin{aligned} ", r" \end{aligned}"
    if formula.startswith(head) and formula.endswith(tail):
        rows = formula[len(head) : -len(tail)].split(r" \\ ")
        return ["\\begin{align*}", *[r + " \\\\" for r in rows[:-1]], rows[-1], "\\end{align*}"]
    return ["\\begin{equation*}", formula, "\\end{equation*}"]


# -- the steps -----------------------------------------------------------------------------------
@dataclass(frozen=True)
class _Facts:
    """Everything computed once for the export."""

    model: Model
    verdict: Any
    edges: list[tuple[int, int]]
    counts: list[int]
    coefficients: tuple[Any, ...]
    exact_coefficients: bool
    polynomial_latex: str
    spectrum: FreeSpectrum | None
    no_theorem: str
    report: Report
    inversion_holds: bool | None
    answer: SpectrumAnswer
    exact: ExactSpectrum | None


def _collect(a: Analysis) -> _Facts:
    """The facts, every one read from the analysis (each part computed once, there)."""
    m = a.model
    adjacency = ADJACENCY(m)
    rows, cols = adjacency.nonzero()
    edges = sorted((int(r), int(c)) for r, c in zip(rows, cols, strict=True) if r < c)
    counts = list(a.charge_counts)
    poly = a.polynomial
    coefficients = poly.coefficients
    exact = all(isinstance(c, (int, Fraction)) for c in coefficients)
    answer = a.answer()
    spectrum = answer.spectrum if answer.guaranteed else None
    inversion: bool | None = None
    if m.dimension <= DENSE_LIMIT and sum(counts) <= DENSE_SETS:
        inversion = _dense_inversion(m, poly)
    dense = a.exact if m.dimension <= DENSE_LIMIT else None
    return _Facts(
        m,
        a.verdict,
        edges,
        counts,
        coefficients,
        exact,
        poly._repr_latex_().strip("$"),
        spectrum,
        "" if answer.guaranteed else answer.message,
        a.report(),
        inversion,
        answer,
        dense,
    )


def _dense_inversion(m: Model, poly: Any) -> bool:
    """Whether ``prod_r T(omega^r u) = P(u^N)`` holds with dense matrices at u = 1/3."""
    n, u = m.states, 1 / 3
    omega = np.exp(2j * np.pi / n)
    product = np.eye(m.dimension, dtype=complex)
    for r in range(n):
        product = product @ transfer_matrix(m, u * omega**r).to_sparse().toarray()
    target = complex(poly(u**n)) * np.eye(m.dimension)
    residual = np.abs(product - target).max()
    return bool(residual <= 1e-9 * max(1.0, float(np.abs(target).max())))


def _intro(f: _Facts) -> list[Cell]:
    m = f.model
    status = (
        "A theorem guarantees the free spectrum of this model's ground sector (the sector of "
        "its conserved cycle strings that holds the lowest level); every number below is "
        "recomputed and asserted by the code cells."
        if f.spectrum is not None and f.answer.route == "sector"
        else "A theorem guarantees this model's free spectrum; every number below is recomputed "
        "and asserted by the code cells."
        if f.spectrum is not None
        else "**No theorem guarantees a free spectrum for this model.** The cells state the "
        "verdict and the probes; no spectrum is asserted."
    )
    md = (
        "# Worked calculation\n\n"
        f"The model has {len(m)} terms on {len(m.sites)} sites with N = {m.states} states per "
        f"site (Hilbert-space dimension {m.states}^{len(m.sites)}):\n\n"
        f"$$\n{_model_latex(m)}\n$$\n\n"
        "written as $H = \\sum_j c_j g_j$ with operator strings normalised to $g_j^N = 1$.\n\n"
        f"{status} Each code cell rebuilds what it needs with `freeladder` and fails with an "
        "`AssertionError` when a recomputed value leaves its stated tolerance: change a coupling "
        "below and the cells say so."
    )
    # the imports are filled in by worked_calculation once every cell is known
    code = f"{_model_source(m)}\nprint(m)"
    return [Cell("markdown", md), Cell("code", code)]


def _imports(cells: Sequence[Cell]) -> str:
    """The imports the code cells use, and only those (lint-clean exports)."""
    code = "\n".join(c.source for c in cells if c.kind == "code")
    lines = ["import functools"] if "functools." in code else []
    if "hashlib." in code:
        lines.append("import hashlib")
    if "Fraction(" in code:
        lines.append("from fractions import Fraction")
    third = ["import numpy as np"] if "np." in code else []
    if "sps." in code:
        third.append("import scipy.sparse as sps")
    if "eigsh(" in code:
        third.append("from scipy.sparse.linalg import LinearOperator, eigsh")
    if third:
        lines += ["", *third]
    lines += ["", "import freeladder as fl"]
    if "NoTheoremError" in code:
        lines.append("from freeladder.base.errors import NoTheoremError")
    return "\n".join(lines).lstrip("\n") + "\n\n"


def _model_check_cells(f: _Facts) -> list[Cell]:
    m = _rebuilt(f.model)
    text = str(m)
    md = (
        "## The model itself\n\n"
        "The cells below check this model and no other: its text, its size and a fingerprint "
        "(SHA-256 of its strings, exact couplings, constant and sites) must be as exported. "
        "Change a coupling above and this cell fails first; the steps after it say which "
        "numbers moved."
    )
    if len(f"assert str(m) == {json.dumps(text)}, str(m)") <= 100:
        text_check = f"assert str(m) == {json.dumps(text)}, str(m)"
    else:
        text_check = "\n".join(
            [
                "expected_text = (",
                *_text_literal(text),
                ")",
                "assert str(m) == expected_text, str(m)",
            ]
        )
    code = (
        f"{text_check}\n"
        f"assert (len(m), m.states, len(m.sites)) == ({len(m)}, {m.states}, {len(m.sites)})\n"
        f"{_FINGERPRINT_SOURCE}\n"
        f"assert fingerprint == {_fingerprint(m)!r}, fingerprint"
    )
    return [Cell("markdown", md), Cell("code", code)]


def _verdict_cells(f: _Facts) -> list[Cell]:
    v = f.verdict
    reasons = "\n".join(f"* {r}" for r in v.reasons)
    witness = f"\n\nWitness (term indices): {list(v.witness)}." if v.witness else ""
    md = (
        "## Frustration graph and verdict\n\n"
        "One vertex per term; an edge joins $j$ and $k$ when $g_j g_k \\neq g_k g_j$. "
        "Which theorem applies is read off this graph: line graphs are Jordan-Wigner free "
        f"({refs.CHAPMAN_FLAMMIA_2020}); claw-free, even-hole-free graphs are free "
        f"({refs.ELMAN_CHAPMAN_FLAMMIA_2021}; {refs.CHAPMAN_ELMAN_MANN_2023}); the exclusion "
        f"algebra of reach p is free for any N ({refs.ALCARAZ_PIMENTA_2020}).\n\n"
        f"The graph has {len(f.edges)} edges. **Verdict: {v.kind}.**\n\n{reasons}{witness}"
    )
    if len(f.edges) <= EDGE_LIST_LIMIT:
        edge_check = f"assert edges == {f.edges!r}, edges"
    else:
        edge_check = f"assert len(edges) == {len(f.edges)}, len(edges)"
    code = (
        "G = fl.frustration_graph(m)\n"
        "edges = sorted({tuple(sorted(e[:2])) for e in G.edges()})\n"
        f"{edge_check}\n"
        "verdict = fl.classify(m)\n"
        "print(verdict)\n"
        f"assert verdict.kind == {v.kind!r}, verdict.kind\n"
        f"assert tuple(verdict.witness) == {tuple(v.witness)!r}, verdict.witness"
    )
    return [Cell("markdown", md), Cell("code", code)]


def _coefficient_assert(name: str, f: _Facts, values: Sequence[Any]) -> str:
    if f.exact_coefficients:
        return (
            "# Exact couplings give exact coefficients: equality, no tolerance.\n"
            f"assert list({name}) == {_array_literal(values)}, {name}"
        )
    return (
        f"# Exact sums rounded once to double precision: relative tolerance {COEFFICIENT_RTOL}.\n"
        f"expected = np.array({_array_literal(values)})\n"
        f"got = np.array([complex(c) for c in {name}])\n"
        "assert got.shape == expected.shape, (got, expected)\n"
        f"assert np.all(np.abs(got - expected) <= {COEFFICIENT_RTOL} * np.maximum(1.0, "
        "np.abs(expected))), got - expected"
    )


def _charge_cells(f: _Facts) -> list[Cell]:
    sums = [c if s % 2 == 0 else -c for s, c in enumerate(f.coefficients)]
    rows = list(range(len(f.counts)))
    if len(rows) > SHOWN_ORDERS:
        rows = rows[:8] + [-1] + rows[-3:]
    table = ["| order $s$ | independent sets | $C_s$ |", "| --- | --- | --- |"]
    for s in rows:
        if s < 0:
            table.append(f"| ... | ({len(f.counts) - 11} orders not shown) | ... |")
        else:
            c_s = sums[s] if s < len(sums) else 0  # orders only a zero coupling reaches
            table.append(f"| {s} | {f.counts[s]} | {_num(c_s)} |")
    md = (
        "## Conserved charges, order by order\n\n"
        "$$Q^{(s)} = \\sum_{S \\text{ independent},\\ |S| = s}\\ \\prod_{j \\in S} c_j g_j, "
        "\\qquad C_s = \\sum_{S \\text{ independent},\\ |S| = s}\\ \\prod_{j \\in S} c_j^N$$\n\n"
        "over the independent sets $S$ of the frustration graph "
        f"({refs.FENDLEY_2019}; {refs.ELMAN_CHAPMAN_FLAMMIA_2021}). "
        f"The series has {len(f.counts)} orders, $s = 0, \\dots, {len(f.counts) - 1}$:\n\n"
        + "\n".join(table)
    )
    code = (
        "steps = list(fl.charge_series(m))\n"
        "counts = [step.count for step in steps]\n"
        f"assert counts == {f.counts!r}, counts\n"
        "weight_sums = [step.coefficient for step in steps]\n"
        f"{_coefficient_assert('weight_sums', f, sums)}\n"
        "print(counts)"
    )
    return [Cell("markdown", md), Cell("code", code)]


def _polynomial_cells(f: _Facts) -> list[Cell]:
    m = f.model
    n = m.states
    product = "T(u)\\,T(-u)" if n == 2 else "\\prod_{r=0}^{N-1} T(\\omega^r u)"
    md = (
        "## Transfer matrix and exclusion polynomial\n\n"
        "$$T(u) = \\sum_s (-u)^s Q^{(s)}, \\qquad "
        f"{product} = P(u^N), \\qquad P(y) = \\sum_s (-1)^s C_s\\, y^s$$\n\n"
        f"with $\\omega = e^{{2\\pi i/N}}$ ({refs.FENDLEY_2019}; {refs.ALCARAZ_PIMENTA_2020}). "
        "For this model\n\n"
        f"$${f.polynomial_latex.replace('P(y) =', 'P(y) =', 1)}$$"
    )
    lines = [
        "P = fl.exclusion_polynomial(m)",
        _coefficient_assert("P.coefficients", f, f.coefficients),
    ]
    if f.inversion_holds is not None:
        expectation = "holds" if f.inversion_holds else "fails (as at export)"
        lines += [
            "",
            f"# The inversion relation with dense matrices at u = 1/3: it {expectation}.",
            "# Tolerance: rounding only, 1e-9 relative to the largest entry of P(u^N) 1.",
            "u = 1 / 3",
            f"omega = np.exp(2j * np.pi / {n})",
            "product = np.eye(m.dimension, dtype=complex)",
            f"for r in range({n}):",
            "    T = fl.transfer_matrix(m, u * omega**r).to_sparse()",
            "    product = product @ T.toarray()",
            f"target = complex(P(u**{n})) * np.eye(m.dimension)",
            "residual = np.abs(product - target).max()",
            "print('inversion relation residual:', residual)",
            "holds = residual <= 1e-9 * max(1.0, float(np.abs(target).max()))",
            f"assert {'' if f.inversion_holds else 'not '}holds, residual",
        ]
    lines.append("print(P)")
    return [Cell("markdown", md), Cell("code", "\n".join(lines))]


def _tolerances(sp: FreeSpectrum) -> np.ndarray:
    eta = np.abs(sp.quasi_energies)
    return np.asarray(sp.error_bounds, dtype=float) + ULPS * np.spacing(np.maximum(eta, 1.0))


def _spectrum_cells(f: _Facts) -> list[Cell]:
    m, sp = f.model, f.spectrum
    if sp is None:
        md = (
            "## Spectrum: no theorem\n\n"
            "No theorem guarantees that the roots of $P$ give this model's spectrum: "
            f"{f.no_theorem}\n\n"
            "So no quasi-energies are exported. The probes below (charges, inversion relation, "
            "exact diagonalization where the size allows) show how far the free-fermion "
            "structure survives."
        )
        code = (
            "try:\n"
            "    sp = fl.free_spectrum(m)\n"
            "except NoTheoremError as err:\n"
            '    print("free_spectrum refuses:", err)\n'
            "else:\n"
            '    assert not sp.provenance.guaranteed, "a theorem now applies: export again"\n'
            '    print("not guaranteed:", sp.provenance.guarantee)'
        )
        return [Cell("markdown", md), Cell("code", code)]
    n = m.states
    prov = sp.provenance
    ans = f.answer
    sector = ans.route == "sector"
    rows = ["| $k$ | root $y_k$ | $\\eta_k$ | bound on $\\eta_k$ |", "| --- | --- | --- | --- |"]
    for k, (y, eta, b) in enumerate(
        zip(sp.roots, sp.quasi_energies, sp.error_bounds, strict=True), start=1
    ):
        digits = display.digits_for(eta, float(b))
        shown = (display.number_text(v, digits) for v in (y, eta))
        rows.append(f"| {k} | {' | '.join(shown)} | {display.bound_text(float(b))} |")
    where = ""
    if sector:
        values = ", ".join(
            f"{g} = {v:+d}" for g, v in zip(ans.cycle_strings, ans.cycle_values, strict=True)
        )
        where = (
            "The single polynomial is not guaranteed here; the model is free sector by sector "
            f"of its conserved cycle strings. Sector: {ans.selection}, with {values}; "
            "$y_k = 1 / \\eta_k^2$ stands for the Majorana energies of that sector.\n\n"
        )
    md = (
        "## Roots and quasi-energies\n\n"
        "$$P(y_k) = 0, \\qquad \\eta_k^N = 1 / y_k$$\n\n"
        f"{where}Theorem: {_sentence(str(prov.guarantee))} Root finder: {prov.path}; "
        f"bounds: {_sentence(str(prov.bounds))}\n\n"
        + "\n".join(rows)
        + "\n\nTolerance of the check below: the exported bound plus the recomputed bound "
        f"plus {ULPS} units in the last place, so both values lie within their bounds of the "
        "same exact quasi-energy. Roots use the same bound through "
        "$|\\delta y| \\approx N |y|\\, |\\delta\\eta| / |\\eta|$ (with a factor 2 for second "
        "order)."
    )
    tol_exported = _tolerances(sp)
    call = "fl.free_spectrum(m" + (', sector="ground")' if sector else ")")
    label = (
        'assert tuple(sp.provenance.sector["cycle_operators"]) == '
        f"{tuple(ans.cycle_strings)!r}\n"
        'assert tuple(sp.provenance.sector["cycle_values"]) == '
        f"{tuple(ans.cycle_values)!r}\n"
    )
    roots = (
        f"expected_y = np.array({_array_literal(complex(y) for y in sp.roots)})\n"
        f"y_tol = 2 * {n} * np.abs(expected_y) * tol / np.abs(expected_eta)\n"
        "y_error = np.abs(np.asarray(sp.roots, dtype=complex) - expected_y)\n"
        'assert np.all(y_error <= y_tol), ("roots moved", y_error, y_tol)\n'
    )
    code = (
        f"sp = {call}\n"
        "assert sp.provenance.guaranteed, sp.provenance.guarantee\n"
        + (label if sector else "")
        + f"expected_eta = np.array({_array_literal(sp.quasi_energies)})\n"
        f"exported_tol = np.array({_array_literal(float(t) for t in tol_exported)})\n"
        "assert len(sp.quasi_energies) == len(expected_eta), len(sp.quasi_energies)\n"
        "tol = exported_tol + np.asarray(sp.error_bounds, dtype=float)\n"
        "eta_error = np.abs(sp.quasi_energies - expected_eta)\n"
        'assert np.all(eta_error <= tol), ("quasi-energies moved", eta_error, tol)\n'
        + ("" if sector else roots)  # on a sector, y_k = 1 / eta_k^2 adds nothing
        + "print(sp)"
    )
    return [Cell("markdown", md), Cell("code", code)]


def _level_cells(f: _Facts) -> list[Cell]:
    sp = f.spectrum
    if sp is None:
        return []
    levels = sp.levels(SHOWN_LEVELS)
    energies = [lv.energy for lv in levels]
    mult = (
        f"each with multiplicity {sp.degeneracy} ({sp.degeneracy_reason})" if sp.degeneracy else ""
    )
    lines = ", ".join(_num(e) for e in energies)
    md = (
        "## Levels\n\n"
        "$$E = E_0 + \\sum_k \\omega^{s_k} \\eta_k, \\qquad s_k \\in \\{0, \\dots, N-1\\}$$\n\n"
        f"one level per choice of the $s_k$ ({refs.FENDLEY_2019}; {refs.ALCARAZ_PIMENTA_2020}; "
        f"{refs.BAXTER_1989} for N > 2), $E_0$ the constant term. The {len(energies)} lowest "
        f"(by real part){', ' + mult if mult else ''}: {lines}.\n\n"
        "A level is a sum of quasi-energies with unit-modulus weights, so its tolerance is the "
        "sum of theirs."
    )
    tol = float(np.sum(_tolerances(sp)))
    code = (
        f"levels = sp.levels({SHOWN_LEVELS})\n"
        "energies = np.array([level.energy for level in levels], dtype=complex)\n"
        f"expected_levels = np.array({_array_literal(complex(e) for e in energies)})\n"
        f"level_tol = {_float_literal(tol)} + float(np.sum(sp.error_bounds))\n"
        "assert len(energies) == len(expected_levels), len(energies)\n"
        "distance = np.abs(energies[:, None] - expected_levels[None, :])\n"
        "worst = max(distance.min(axis=0).max(), distance.min(axis=1).max())\n"
        'assert worst <= level_tol, ("levels moved", worst, level_tol)\n'
        "print(levels)"
    )
    return [Cell("markdown", md), Cell("code", code)]


SHOWN_EXACT = 4
"""How many of the lowest exact levels are exported."""


SPARSE_EXPORT_DIMENSION = 2**16
"""Largest dimension for which the exported cells diagonalise the Hamiltonian themselves
(scipy's Lanczos on a matrix of the whole space built in the cell from Kronecker products)."""

SPARSE_EXPORT_LEVELS = 10
"""How many lowest eigenvalues that cell asks Lanczos for (4 distinct levels and one more
when each is twofold)."""


def _exact_cells(f: _Facts) -> list[Cell]:
    """The lowest levels of exact diagonalization, asserted: they move with any coupling,
    also where the charges and the polynomial see only the couplings' N-th powers.  Above
    dimension :data:`DENSE_LIMIT`, a cell that builds H and the sector itself, without
    freeladder, and compares its lowest levels with the free ones."""
    ed = f.exact
    if ed is None:
        return _sparse_exact_cells(f)
    shown = min(SHOWN_EXACT, len(ed.levels))
    levels = [complex(v) for v in ed.levels[:shown]]
    mults = [int(d) for d in ed.multiplicities[:shown]]
    listed = ", ".join(f"{_num(v)} (x{d})" for v, d in zip(levels, mults, strict=True))
    md = (
        "## Exact diagonalization\n\n"
        f"The Hamiltonian as a dense {ed.dimension} x {ed.dimension} matrix ({ed.method}): "
        f"its {shown} lowest levels, with multiplicities, are {listed}. They depend on every "
        "coupling, signs included, so they pin the model where the charges and $P$ see only "
        "the $c_j^N$. Tolerance: twice the clustering tolerance of the diagonalization "
        f"({display.bound_text(ed.tolerance)}; rounding of a dense eigensolver, common practice)."
    )
    code = (
        "ed = fl.exact_spectrum(m)\n"
        "exact_levels = np.asarray(ed.levels, dtype=complex)\n"
        f"expected_exact = np.array({_array_literal(levels)})\n"
        f"exact_tol = 2 * max(ed.tolerance, {_float_literal(float(ed.tolerance))})\n"
        "# each exported level beside its nearest exact level (order-free: conjugate pairs)\n"
        "nearest = np.abs(expected_exact[:, None] - exact_levels[None, :]).argmin(axis=1)\n"
        "exact_error = np.abs(exact_levels[nearest] - expected_exact)\n"
        'assert np.all(exact_error <= exact_tol), ("exact levels moved", exact_error, exact_tol)\n'
        f"assert [int(ed.multiplicities[k]) for k in nearest] == {mults!r}, ed.multiplicities\n"
        "lowest = exact_levels.real.min() - expected_exact.real.min()\n"
        'assert abs(lowest) <= exact_tol, ("exact levels moved", lowest, exact_tol)\n'
        "print(ed)"
    )
    return [Cell("markdown", md), Cell("code", code)]


def _pauli_word(g: WeylString, sites: Sequence[Any]) -> tuple[str, complex]:
    """The string as one Pauli letter per site, and the phase left over (``Y = i X Z``)."""
    exps = g.exponents()
    letters = []
    for site in sites:
        a, b = exps.get(site, (0, 0))
        letters.append("IZXY"[2 * (a % 2) + (b % 2)])
    phase = (g.phase - letters.count("Y")) % 4
    return "".join(letters), (1, 1j, -1, -1j)[phase]


def _distinct(values: Sequence[float], tol: float) -> list[float]:
    out: list[float] = []
    for v in sorted(values):
        if not out or v - out[-1] > tol:
            out.append(float(v))
    return out


_SPARSE_SOURCE = """\
pauli = {
    "I": sps.identity(2, format="csr"),
    "X": sps.csr_array(np.array([[0, 1], [1, 0]], dtype=complex)),
    "Y": sps.csr_array(np.array([[0, -1j], [1j, 0]])),
    "Z": sps.csr_array(np.array([[1, 0], [0, -1]], dtype=complex)),
}


def word_matrix(word):
    factors = [pauli[letter] for letter in word]
    return functools.reduce(lambda a, b: sps.kron(a, b, format="csr"), factors)


H = constant * sps.identity(2**len(terms[0][1]), format="csr", dtype=complex)
for coupling, word in terms:
    H = H + coupling * word_matrix(word)
cycle_matrices = [(value, word_matrix(word)) for value, word in cycles]
if not np.any(H.data.imag) and not any(np.any(w.data.imag) for _, w in cycle_matrices):
    H = H.real  # real arithmetic: half the work
    cycle_matrices = [(value, w.real) for value, w in cycle_matrices]


def project(v):
    for value, w in cycle_matrices:
        v = (v + value * (w @ v)) / 2
    return v


# P (H - shift) P: the sector's levels minus shift (negative), every other vector at 0
shift = abs(constant) + sum(abs(coupling) for coupling, _ in terms)


def apply(v):
    pv = project(v)
    return project(H @ pv) - shift * pv


operator = LinearOperator(H.shape, matvec=apply, dtype=H.dtype)
start = project(np.random.default_rng(1).standard_normal(H.shape[0]).astype(H.dtype))
ritz = np.sort(eigsh(operator, k=LANCZOS_K, which="SA", v0=start, return_eigenvectors=False).real)
ritz = ritz + shift
distinct = [ritz[0]]
for value in ritz[1:]:
    if value - distinct[-1] > cluster_tol:
        distinct.append(value)
compared = min(len(expected_free), len(distinct) - 1)
sparse_error = np.abs(np.array(distinct[:compared]) - np.array(expected_free[:compared]))
print("Lanczos levels:", distinct[:compared], "largest difference:", sparse_error.max())
assert compared >= 1 and np.all(sparse_error <= sparse_tol), (sparse_error, sparse_tol)"""


def _sparse_exact_cells(f: _Facts) -> list[Cell]:
    """Above :data:`DENSE_LIMIT`: the lowest distinct levels of the same sector as the free
    ones, from a matrix the cell builds with scipy alone (independent of freeladder), or a
    markdown cell saying why this check is not run."""
    m, sp, ans = f.model, f.spectrum, f.answer
    head = "## Exact diagonalization of the same sector\n\n"
    if sp is None:
        return []
    n_sites = len(m.sites)
    why = ""
    if m.states != 2 or np.iscomplexobj(sp.quasi_energies):
        why = "complex levels: the lowest are not ordered on a line"
    elif m.dimension > SPARSE_EXPORT_DIMENSION:
        why = (
            f"dimension 2^{n_sites} above 2^{SPARSE_EXPORT_DIMENSION.bit_length() - 1}, the "
            "largest a cell diagonalises itself"
        )
    elif (sp.degeneracy or 1) > 2 and ans.route != "sector":
        why = (
            f"every level {sp.degeneracy} times degenerate (Lanczos finds one vector per "
            "level: slow and partial there)"
        )
    if why:
        return [Cell("markdown", f"{head}Exact check not run: {why}.")]
    values = ans.cycle_values if ans.route == "sector" else ()
    gens = sectors(m).cycle_operators if values else ()
    cycles = [
        (int(v), _pauli_word(g, m.sites)) for g, v in zip(gens, values, strict=True) if g.support
    ]
    terms = []
    for c, g in m.terms:
        word, phase = _pauli_word(g, m.sites)
        terms.append((complex(c) * phase, word))
    for _, (word, phase) in cycles:
        if phase not in (1, -1):
            return [Cell("markdown", f"{head}Exact check not run: {word} is not Hermitian.")]
    energies = [float(np.real(e)) for e in sp.levels(4 * SPARSE_EXPORT_LEVELS).energies]
    scale = max(1.0, max(abs(e) for e in energies))
    level_tol = float(np.sum(_tolerances(sp)))
    cluster = 1e-9 * scale
    free = _distinct(energies, cluster)[:SHOWN_EXACT]
    where = (
        "the sector "
        + ", ".join(f"${g} = {v:+d}$" for g, v in zip(ans.cycle_strings, values, strict=True))
        + f" ({ans.selection})"
        if values
        else "the whole space"
    )
    md = (
        f"{head}The free levels above belong to {where}. This cell checks the lowest "
        f"{len(free)} distinct ones without freeladder: it builds $H$ "
        f"({m.dimension} x {m.dimension}) from Kronecker products of 2 x 2 Pauli matrices "
        "with scipy.sparse, projects onto the sector with $P = \\prod_i (1 + v_i W_i)/2$ "
        "over its cycle strings $W_i$ (built the same way), and finds the lowest eigenvalues "
        "of $P (H - s) P$ with scipy's Lanczos (`eigsh`; every vector outside the sector "
        "sits at 0, above the sector's levels, for $s = \\sum |c_j| \\ge \\|H\\|$). "
        "Lanczos resolves distinct levels, not multiplicities. Tolerance: the levels' "
        f"bounds plus $10^{{-8}}$ of the spectral scale (Lanczos converges to rounding; "
        "common practice)."
    )
    cycle_rows = [f"({value}, {json.dumps(word)})" for value, (word, _) in cycles]
    term_rows = [f"({_literal(_real_if(c))}, {json.dumps(w)})" for c, w in terms]
    code = (
        "# H and the sector built from Pauli letters, one per site (no freeladder here)\n"
        + _wrapped("terms = [", term_rows, "]")
        + "\n"
        + _wrapped("cycles = [", cycle_rows, "]")
        + "\n"
        + f"constant = {_literal(_real_if(complex(m.constant)))}\n"
        + f"expected_free = {_array_literal(free)}\n"
        + f"cluster_tol = {_float_literal(cluster)}\n"
        + f"sparse_tol = {_float_literal(level_tol)} + 1e-8 * {_float_literal(scale)}\n"
        + f"LANCZOS_K = {SPARSE_EXPORT_LEVELS}\n"
        + _SPARSE_SOURCE
    )
    return [Cell("markdown", md), Cell("code", code)]


def _real_if(c: complex) -> complex | float:
    return c.real if c.imag == 0 else c


def _check_cells(f: _Facts) -> list[Cell]:
    r = f.report
    rows = ["| check | method | tolerance | value | result |", "| --- | --- | --- | --- | --- |"]
    for c in r.checks:
        name, method, tol, value, status = (
            t.replace("|", "\\|") for t in display.check_cells(c)[:5]
        )
        rows.append(f"| {name} | {method} | {tol} | {value} | {status} |")
    sources = sorted({c.reference for c in r.checks if c.reference})
    notes = "\n".join(f"* {n}" for n in r.notes)
    md = (
        "## Checks\n\n"
        "`fl.verify` checks the charges against $H$ and each other, the inversion relation "
        "and, where the size allows, the spectrum against exact diagonalization. A check that "
        "could not run is reported as not run and never counts as passed. A value is the "
        "check's residual: the cell asserts each check's result, that is, that the residual "
        "stays within its tolerance.\n\n"
        + "\n".join(rows)
        + ("\n\nSources: " + "; ".join(sources) if sources else "")
        + ("\n\n" + notes if notes else "")
    )
    statuses = {c.name: c.status for c in r.checks}
    code = (
        "report = fl.verify(m)\n"
        "print(report)\n"
        "statuses = {check.name: check.status for check in report.checks}\n"
        + _wrapped(
            "assert statuses == {",
            [f"{json.dumps(k)}: {json.dumps(v)}" for k, v in statuses.items()],
            "}, statuses",
        )
        + "\n"
        + (
            'assert report.ok, report.problems\nprint("all checks passed")'
            if r.ok
            else "assert not report.ok"
        )
    )
    return [Cell("markdown", md), Cell("code", code)]


SHOWN_MODES = 6
"""How many edge modes (those of largest weight) the dynamics section exports."""

_KEMP_2017 = "J. Kemp, N. Y. Yao, C. R. Laumann and P. Fendley, J. Stat. Mech. (2017) 063105"


def _dynamics_of(f: _Facts) -> tuple[Any, str]:
    """The checked edge autocorrelation (a part of the analysis), or why there is none."""
    try:
        return analyze(f.model).dynamics(), ""
    except (ValueError, ArithmeticError) as err:
        return None, str(err)


def _dynamics_cells(f: _Facts) -> list[Cell]:
    """The edge autocorrelation: weights, plateau and a few values, asserted, and checked
    against dense exact evolution (small models) or the sum rule and C(0) = 1."""
    dyn, why = _dynamics_of(f)
    if dyn is None:
        return [Cell("markdown", f"## Edge dynamics\n\nNot computed: {_sentence(why)}")]
    a = dyn.autocorrelation
    e = a.expansion
    n = f.model.states
    shown = sorted(int(k) for k in np.argsort(-np.abs(e.weights), kind="stable")[:SHOWN_MODES])
    rows = ["| k | $\\eta_k$ | $W_k$ | error |", "| --- | --- | --- | --- |"]
    for k in shown:
        rows.append(
            f"| {k + 1} | {_num(e.quasi_energies[k])} | {_num(e.weights[k])} | "
            f"{display.bound_text(float(e.weight_errors[k]))} |"
        )
    values = ", ".join(f"C({_num(t)}) = {_num(v)}" for t, v in zip(a.times, a.values, strict=True))
    series = (
        "w_0 + \\sum_k W_k \\cos(2 \\eta_k t)"
        if e.hermitian
        else f"w_0 + \\sum_k \\frac{{W_k}}{{{n}}} \\sum_{{s=0}}^{{{n - 1}}} e^{{i t f_{{k,s}}}}"
    )
    balls = e.weight_balls
    exact_note = (
        f" The couplings are exact: every $W_k$ lies in a proved ball (radius at most "
        f"{display.bound_text(float(np.max(balls.radii)))}), $w_0 = {balls.zero_weight}$ "
        "exactly, and the ball of $w_0 + \\sum_k W_k$ holds 1."
        if balls is not None
        else ""
    )
    md = (
        "## Edge dynamics\n\n"
        f"The edge operator $\\chi$ = `{a.operator}` fails to commute with one term only, "
        f"term {e.term}. Its infinite-temperature autocorrelation is a sum over the modes "
        f"({refs.FENDLEY_2019}):\n\n"
        f"$$C(t) = \\mathrm{{Tr}}[\\chi^\\dagger \\chi(t)] / \\dim = {series},$$\n\n"
        "with $W_k = -P_a(y_k) / (y_k P'(y_k))$ ($P_a$ the polynomial without the edge term) "
        f"and the plateau $w_0 = {_num(a.plateau)}$, the weight of an exact zero mode (0 "
        f"without one; {_KEMP_2017}). The {len(shown)} largest of the {e.weights.size} weights:\n\n"
        + "\n".join(rows)
        + f"\n\nValues: {values}. Checked: {dyn.method}.{exact_note}"
    )
    times = [float(t) for t in a.times]
    code = (
        f"times = {_array_literal(times)}\n"
        f"shown = {shown!r}\n"
        f"expected_weights = np.array({_array_literal(e.weights[shown])})\n"
        f"expected_weight_errors = np.array({_array_literal(e.weight_errors[shown])})\n"
        f"expected_plateau = {_literal(a.plateau)}\n"
        f"expected_values = np.array({_array_literal(a.values)})\n"
        f"expected_value_errors = np.array({_array_literal(a.errors)})\n"
        "dyn = fl.autocorrelation(m, times)\n"
        "e = dyn.expansion\n"
        f"assert dyn.operator == {json.dumps(a.operator)}, dyn.operator\n"
        f"assert len(e.weights) == {e.weights.size}, len(e.weights)\n"
        f"ulps = {ULPS} * np.spacing(1.0)\n"
        "weight_tol = expected_weight_errors + e.weight_errors[shown] + ulps\n"
        "moved = np.abs(e.weights[shown] - expected_weights)\n"
        'assert np.all(moved <= weight_tol), ("weights moved", moved, weight_tol)\n'
        "plateau_tol = expected_weight_errors.sum() + ulps\n"
        'assert abs(dyn.plateau - expected_plateau) <= plateau_tol, ("plateau", dyn.plateau)\n'
        "value_tol = expected_value_errors + dyn.errors + ulps\n"
        "moved = np.abs(dyn.values - expected_values)\n"
        'assert np.all(moved <= value_tol), ("values moved", moved, value_tol)\n'
        + (
            "balls = e.weight_balls  # proved balls from the exact polynomial\n"
            f"assert balls.zero_weight == {_literal(balls.zero_weight)}, balls.zero_weight\n"
            'assert balls.sum_is_one and balls.agreement <= 1, ("certified weights", balls)\n'
            if balls is not None and not isinstance(balls.zero_weight, tuple)
            else ""
        )
        + "print(dyn)"
    )
    return [Cell("markdown", md), Cell("code", code), Cell("code", _dynamics_check_code(dyn))]


def _dynamics_check_code(dyn: Any) -> str:
    """The independent recomputation: dense exact evolution with numpy, or the identities."""
    a = dyn.autocorrelation
    if not dyn.method.startswith("dense"):
        return (
            "# the identities of the expansion (the model is too large for dense evolution)\n"
            "e = dyn.expansion\n"
            "residual = abs(e.zero_weight + e.weights.sum() - 1)\n"
            'assert residual <= 1e-9 + e.weight_errors.sum(), ("sum rule", residual)\n'
            'assert abs(dyn.values[0] - 1) <= 1e-9, ("C(0)", dyn.values[0])\n'
            'print("sum rule and C(0) = 1 hold")'
        )
    times = [float(t) for t in a.times]
    dense_times = [t for t, c in zip(times, dyn.compared, strict=True) if c]
    tols = [v for v, c in zip(dyn.tolerances, dyn.compared, strict=True) if c]
    head = (
        "# independent: exact evolution of the dense Hamiltonian (numpy, full trace)\n"
        "h = m.to_sparse().toarray()\n"
        "chi = fl.parse_model(dyn.operator, states=m.states, sites=m.sites)\n"
        "chi = chi.to_sparse().toarray()\n"
        f"dense_times = {_array_literal(dense_times)}\n"
        f"dense_tol = np.array({_array_literal(tols)})\n"
    )
    if dyn.hermitian:
        body = (
            "energies, vectors = np.linalg.eigh(h)\n"
            "overlap = np.abs(vectors.conj().T @ chi @ vectors) ** 2\n"
            "gaps = energies[:, None] - energies[None, :]\n"
            "dense = [np.sum(overlap * np.exp(1j * gaps * t)) for t in dense_times]\n"
        )
    else:
        body = (
            "d, v = np.linalg.eig(h)  # H is not Hermitian: e^{-iHt} = V e^{-iDt} V^-1\n"
            "vinv = np.linalg.inv(v)\n"
            "dense = [\n"
            "    np.trace(chi.conj().T @ (v * np.exp(1j * d * t)) @ vinv @ chi\n"
            "             @ (v * np.exp(-1j * d * t)) @ vinv)\n"
            "    for t in dense_times\n"
            "]\n"
        )
    return (
        head + body + "dense = np.array(dense) / len(h)\n"
        "compared = expected_values[[times.index(t) for t in dense_times]]\n"
        "moved = np.abs(dense - compared)\n"
        'assert np.all(moved <= dense_tol), ("dense evolution differs", moved, dense_tol)\n'
        'print("dense exact evolution agrees at t =", dense_times)'
    )


def _dynamics_latex(f: _Facts) -> list[str]:
    """The edge autocorrelation in a paragraph: operator, plateau, values, how checked."""
    dyn, _ = _dynamics_of(f)
    if dyn is None:
        return []
    a, tex = dyn.autocorrelation, display.tex_escape
    values = ", ".join(
        f"$C({display.number_latex(t)}) = {display.number_latex(v)}$"
        for t, v in zip(a.times, a.values, strict=True)
    )
    return [
        "\\begin{sloppypar}",
        f"\\paragraph{{Edge dynamics.}} The edge operator \\texttt{{{tex(a.operator)}}} has the "
        "infinite-temperature autocorrelation "
        "$C(t) = \\mathrm{Tr}[\\chi^\\dagger \\chi(t)]/\\dim$, "
        f"a sum over {a.expansion.weights.size} modes with plateau "
        f"$w_0 = {display.number_latex(a.plateau)}$ ({tex(refs.FENDLEY_2019)}; "
        f"{tex(_KEMP_2017)}): {values}. Checked: {tex(dyn.method)}.",
        "\\end{sloppypar}",
        "",
    ]


_LATEX_PREAMBLE = (
    "\\documentclass{article}\n"
    "\\usepackage[margin=2.5cm]{geometry}\n"
    "\\usepackage{amsmath}\n"
    "\\usepackage{longtable}\n"
    "\\usepackage{array}\n"
    "\\allowdisplaybreaks\n"
    "\\begin{document}\n"
)


def _latex_section(f: _Facts) -> str:
    m, sp, r = f.model, f.spectrum, f.report
    tex = display.tex_escape
    out = [
        "% Worked calculation exported by freeladder; needs the packages amsmath, longtable and",
        "% array (to_latex(standalone=True) gives a whole document).",
        "\\section{Worked calculation}",
        f"The model has {len(m)} terms on {len(m.sites)} sites with $N = {m.states}$:",
        *_display_block(_model_latex(m)),
        f"Verdict: \\emph{{{tex(f.verdict.kind)}}}.",
        "\\begin{itemize}",
        *[f"\\item {tex(reason)}" for reason in f.verdict.reasons],
        "\\end{itemize}",
    ]
    if sp is not None:
        out.append(f"\\paragraph{{Theorem.}} {tex(_sentence(str(sp.provenance.guarantee)))}")
    else:
        out.append(
            f"\\paragraph{{No theorem.}} {tex(_sentence(f.no_theorem))} No spectrum is claimed."
        )
    out += [
        "The exclusion polynomial, $P(y) = \\sum_s (-1)^s C_s y^s$ with "
        "$C_s = \\sum_{|S| = s} \\prod_{j \\in S} c_j^N$ over independent sets "
        f"({tex(refs.FENDLEY_2019)}; {tex(refs.ALCARAZ_PIMENTA_2020)}):",
        "\\begin{equation*}",
        f.polynomial_latex,
        "\\end{equation*}",
    ]
    if sp is not None:
        out += [
            "\\begin{longtable}{r>{$}l<{$}>{$}l<{$}}",
            f"\\caption{{Quasi-energies $\\eta_k$, $\\eta_k^N = 1/y_k$, with their bounds "
            f"({tex(str(sp.provenance.bounds))}).}} \\\\",
            "$k$ & \\eta_k & \\text{bound} \\\\",
            "\\hline",
            "\\endhead",
        ]
        for k, (eta, b) in enumerate(zip(sp.quasi_energies, sp.error_bounds, strict=True), 1):
            shown = display.number_latex(eta, display.digits_for(eta, float(b)))
            out.append(f"{k} & {shown} & {display.bound_text(float(b))} \\\\")
        out += ["\\end{longtable}"]
    out += _dynamics_latex(f)
    out += [
        "\\begin{longtable}{p{0.22\\linewidth}p{0.36\\linewidth}p{0.2\\linewidth}"
        "p{0.1\\linewidth}}",
        "\\caption{Checks run by freeladder's \\texttt{verify}.} \\\\",
        "check & method & value (tolerance) & result \\\\",
        "\\hline",
        "\\endhead",
    ]
    for c in r.checks:
        name, method, tol, value, status = display.check_cells(c)[:5]
        shown = f"{value} ({tol})" if value else tol
        out.append(f"{tex(name)} & {tex(method)} & {tex(shown)} & {tex(status)} \\\\")
    out += ["\\end{longtable}", ""]
    return "\n".join(out)


def worked_calculation(
    m: Model | Analysis, steps: str | Iterable[str] = "all"
) -> WorkedCalculation:
    """Every step of a model's solution as cells whose code recomputes and asserts it.

    Parameters
    ----------
    m : Model or Analysis
        Numeric couplings (substitute symbols first with ``m.subs``).  A Model is analysed
        first (:func:`freeladder.analyze`); every number comes from the analysis, so after
        ``a.report()`` no check runs again, and the spectrum is the one
        :meth:`Analysis.answer` decided (for a Jordan-Wigner model with cycles, its ground
        sector).
    steps : "all" or iterable of str
        Which steps to include, from :data:`STEPS`; "model" is always included.

    Returns
    -------
    WorkedCalculation
        The cells, with ``to_notebook``, ``to_script`` and ``to_latex``.

    Raises
    ------
    ValueError
        For symbolic couplings, a model with no terms, or an unknown step name.
    TypeError
        If ``m`` is not a Model.

    Notes
    -----
    Tolerances come from the stated error bounds: a recomputed quasi-energy must lie within
    the exported bound plus the recomputed bound (plus a few units in the last place) of the
    exported value; levels add the bounds of their quasi-energies; exact coefficients must be
    equal.  When :meth:`Analysis.answer` refuses, the cells state the verdict, the reason and
    the probes and assert no spectrum.

    References
    ----------
    P. Fendley, J. Phys. A 52, 335002 (2019), arXiv:1901.08078;
    F. C. Alcaraz and R. A. Pimenta, Phys. Rev. B 102, 121101(R) (2020), arXiv:2005.14622;
    S. J. Elman, A. Chapman and S. T. Flammia, Commun. Math. Phys. 388, 969 (2021).

    Examples
    --------
    >>> import freeladder as fl
    >>> wc = fl.worked_calculation(fl.ising_chain(3))
    >>> wc[0].kind, wc[1].kind
    ('markdown', 'code')
    """
    if not isinstance(m, (Model, Analysis)):
        raise TypeError(f"worked_calculation needs a Model or an Analysis, got {type(m).__name__}")
    if isinstance(steps, str):
        return analyze(m).worked(steps)
    return analyze(m).worked(tuple(steps))


def build_worked(a: Analysis, steps: str | Sequence[str] = "all") -> WorkedCalculation:
    """The part behind :func:`worked_calculation` (:meth:`Analysis.worked` keeps it)."""
    m = a.model
    if len(m) == 0:
        raise ValueError("the model has no terms: there is nothing to work out")
    if m.is_symbolic:
        raise ValueError(
            "the model has symbolic couplings "
            f"({', '.join(sorted(str(s) for s in m.symbols))}); substitute numbers first with "
            "m.subs({...})"
        )
    if isinstance(steps, str):
        if steps != "all":
            raise ValueError(f"steps must be 'all' or a list of step names from {STEPS}")
        chosen = set(STEPS)
    else:
        chosen = set(steps) | {"model"}
        unknown = chosen - set(STEPS)
        if unknown:
            raise ValueError(f"unknown step(s) {sorted(unknown)}; choose from {STEPS}")
    facts = _collect(a)
    cells = _intro(facts) + _model_check_cells(facts)
    builders = {
        "verdict": _verdict_cells,
        "charges": _charge_cells,
        "polynomial": _polynomial_cells,
        "spectrum": _spectrum_cells,
        "levels": _level_cells,
        "dynamics": _dynamics_cells,
        "checks": lambda facts: _exact_cells(facts) + _check_cells(facts),
    }
    for name in STEPS[1:]:
        if name in chosen:
            if name == "levels" and "spectrum" not in chosen:
                raise ValueError("the 'levels' step needs the 'spectrum' step")
            cells += builders[name](facts)
    cells[1] = Cell("code", _imports(cells) + cells[1].source)
    cells = [Cell(c.kind, _fit(c.source)) if c.kind == "code" else c for c in cells]
    return WorkedCalculation(
        tuple(cells), str(m), facts.spectrum is not None, _latex_section(facts)
    )
