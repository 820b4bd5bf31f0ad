"""Exact identities between products of transfer matrices, by one sweep over the terms.

A product ``T(t_1) T(t_2) ... T(t_K)`` of transfer matrices ``T(t) = sum_S (-t)^{|S|} c_S g_S``
is a sum over K-tuples of independent sets.  Each operator product ``g_{S_1} ... g_{S_K}`` equals
a root of unity times the *word* ``g_{v_1}^{n_1} g_{v_2}^{n_2} ... g_{v_M}^{n_M}``: the terms in
one fixed order, ``n_j`` the number of sets that hold ``v_j`` (mod N, as ``g^N = 1``).  The root
of unity comes from sorting the factors with ``g_a g_b = omega^{m_ab} g_b g_a``, one pair at a
time, so it is a product of local factors.

Reading the terms in order, the coefficient of a word is therefore a product of one small
matrix per term, indexed by *states*: which of the terms already read that still have an unread
neighbour (the frontier) lie in which of the K sets.  The coefficient is the function computed
by a weighted automaton, and such a function vanishes on every word exactly when the space
spanned by all forward vectors is orthogonal to the final read-out; that space never has more
dimensions than there are states (Schutzenberger 1961; Tzeng 1992).  The test is polynomial in
M for a bounded frontier, where listing the products is exponential: 6 x 10^9 pairs of sets
for the charges of a reach-2 chain of 30 terms, against 18 states here.

Arithmetic is exact: rationals (``flint.fmpq_mat``), with the phases and complex couplings in a
cyclotomic field expanded into rational coordinates.  Float couplings enter as the exact binary
fractions they are.  The spectral parameters are handled by evaluation: a word coefficient is a
polynomial of bounded degree in each parameter, so vanishing on a large enough grid of
integers proves it is zero.

A zero coefficient for every word proves that the operator is zero.  A word with a non-zero
coefficient is a non-zero operator when the terms' strings are independent (no product of
powers of them is a multiple of the identity); that is checked modulo each prime factor of N.

References
----------
M.-P. Schutzenberger, Inform. Control 4, 245 (1961) (weighted automata and their zero test);
W.-G. Tzeng, SIAM J. Comput. 21, 216 (1992) (polynomial-time equivalence by forward spaces);
both cited from memory.  The identities tested: S. J. Elman, A. Chapman and S. T. Flammia,
Commun. Math. Phys. 388, 969 (2021), arXiv:2012.07857; P. Fendley, J. Phys. A 52, 335002
(2019); F. C. Alcaraz and R. A. Pimenta, Phys. Rev. B 102, 121101(R) (2020).
"""

from __future__ import annotations

import math
from collections.abc import Callable, Mapping, Sequence
from dataclasses import dataclass, replace
from itertools import combinations
from typing import TYPE_CHECKING, Any

import numpy as np
import scipy.sparse as sps

from ..algebra.cyclotomic import CyclotomicField, Element
from ..algebra.model import Model
from ..algebra.strings import WeylString, make_string, unit_phase
from ..base import display
from ..base.frozen import readonly_mapping
from ..base.jsonready import json_ready
from ..base.scalars import to_fmpq
from ..graphs.graph import ADJACENCY, EXPONENTS, chain_structure
from ..roots.polynomial import exclusion_polynomial
from ..spectra.charges import charge_series

if TYPE_CHECKING:
    import flint
    import scipy.sparse.csgraph as csgraph
    import sympy
else:
    from ..base.lazy import csgraph, flint, sympy

__all__ = [
    "MAX_COORDINATES",
    "MAX_WORK",
    "Monomial",
    "Product",
    "SweepResult",
    "Witness",
    "commutator_sweep",
    "field_of",
    "inversion_sweep",
    "run",
]

MAX_COORDINATES = 600
"""Largest number of rational coordinates (states times field degree) in one step."""

MAX_WORK = 40_000
"""Largest number of (evaluation point, term) steps one identity may take."""

Monomial = tuple[int, ...]
"""Exponents of the spectral parameters ``x_0, x_1, ...`` in one monomial."""


@dataclass(frozen=True)
class Product:
    """``sign * T(t_1) ... T(t_K)`` with ``t_a = omega^{phases[a]} x[variables[a]]``."""

    sign: int
    variables: tuple[int, ...]
    phases: tuple[int, ...]


@dataclass(frozen=True)
class Witness:
    """A word whose coefficient is not zero (frozen).

    Attributes
    ----------
    word : tuple of int
        The exponent of every term, in the model's term order.
    string : WeylString
        The word as a normalised operator string (``g^N = 1``).
    coefficients : mapping (read-only)
        Key -> coefficient of :attr:`string` (rounded to complex); the keys are monomial
        exponents of the spectral parameters, or what the caller maps them to.
    independent : bool
        True when the terms' strings are independent, so that distinct words are distinct
        strings and the operator is certainly not zero.
    """

    word: tuple[int, ...]
    string: WeylString
    coefficients: Mapping[tuple[int, ...], complex]
    independent: bool

    def __post_init__(self) -> None:
        object.__setattr__(self, "word", tuple(int(v) for v in self.word))
        object.__setattr__(self, "coefficients", readonly_mapping(self.coefficients))

    def to_dict(self) -> dict[str, Any]:
        """JSON-ready fields; coefficient keys become their text (``"(1, 0)"``)."""
        return json_ready(  # type: ignore[no-any-return]
            {
                "word": self.word,
                "string": str(self.string),
                "coefficients": {str(k): v for k, v in self.coefficients.items()},
                "independent": self.independent,
            }
        )

    def __repr__(self) -> str:
        shown = ", ".join(
            f"{k}: {display.number_text(c)}" for k, c in sorted(self.coefficients.items())[:4]
        )
        more = " ..." if len(self.coefficients) > 4 else ""
        kind = "independent" if self.independent else "dependent"
        return f"Witness({self.string}, {{{shown}{more}}}, {kind} strings)"


@dataclass(frozen=True)
class SweepResult:
    """What a sweep established (frozen).

    Attributes
    ----------
    vanishes : bool or None
        True: the identity holds exactly.  False: it fails (a witness word, independent
        strings).  None: a word has a non-zero coefficient but the strings are dependent, so
        words may cancel as operators and the sweep cannot decide.
    points : int
        Evaluation points of the spectral parameters that were run.
    coordinates : int
        Largest number of rational coordinates in one step.
    rank : int
        Largest dimension of a forward space.
    order : tuple of int
        The term order of the words.
    witness : Witness or None
    """

    vanishes: bool | None
    points: int
    coordinates: int
    rank: int
    order: tuple[int, ...]
    witness: Witness | None = None

    def __post_init__(self) -> None:
        object.__setattr__(self, "order", tuple(int(v) for v in self.order))

    def to_dict(self) -> dict[str, Any]:
        """JSON-ready fields (the witness as a nested dict, or None)."""
        return json_ready(  # type: ignore[no-any-return]
            {
                "vanishes": self.vanishes,
                "points": self.points,
                "coordinates": self.coordinates,
                "rank": self.rank,
                "order": self.order,
                "witness": self.witness,
            }
        )

    def __repr__(self) -> str:
        size = f"{self.points} points, {self.coordinates} coordinates, rank <= {self.rank}"
        found = "" if self.witness is None else f", witness={self.witness!r}"
        return f"SweepResult(vanishes={self.vanishes}, {size}{found})"


def field_of(m: Model) -> CyclotomicField:
    """The exact field a sweep over ``m`` works in (omega, and i for complex couplings)."""
    real = all(_is_real(c) for c in m.couplings)
    return CyclotomicField(m.states if real else math.lcm(m.states, 4))


def _is_real(c: Any) -> bool:
    if isinstance(c, sympy.Basic):
        return bool(c.is_real)
    return not isinstance(c, complex) or c.imag == 0


class _Plan:
    """Term order, frontier states and transitions of a sweep with K sets per word.

    ``steps[j]`` lists the transitions of the j-th term read: ``(state in, state out, letter,
    chosen, phase)`` with ``chosen`` the bit mask of the sets that take the term and ``phase``
    the exponent of omega picked up by sorting it past the earlier terms.
    """

    def __init__(self, m: Model, products: Sequence[Product], scalar: bool) -> None:
        copies = {len(p.variables) for p in products}
        if len(copies) != 1:
            raise ValueError("every product needs the same number of factors")
        self.model = m
        self.copies = copies.pop()
        self.field = field_of(m)
        self.couplings = [self.field.from_number(c) for c in m.couplings]
        self.products = tuple(products)
        self.scalar = scalar
        self.omega = self.field.order // m.states
        self.order = _term_order(m)
        self.steps: list[list[tuple[int, int, int, int, int]]] = []
        self.sizes = [1]
        self._build()

    def _build(self) -> None:
        m, k = self.model, self.copies
        ex = EXPONENTS(m)
        pos = np.empty(len(m), dtype=np.int64)
        pos[self.order] = np.arange(len(m))
        last = _last_neighbour(ex, pos)
        frontier: list[int] = []
        states: list[tuple[int, ...]] = [()]
        for j, v in enumerate(self.order.tolist()):
            row = dict(
                zip(
                    ex.indices[ex.indptr[v] : ex.indptr[v + 1]].tolist(),
                    ex.data[ex.indptr[v] : ex.indptr[v + 1]].tolist(),
                    strict=True,
                )
            )
            nbrs = [(i, row[w] % m.states) for i, w in enumerate(frontier) if w in row]
            keep = [i for i, w in enumerate(frontier) if last[w] > j]
            stays = bool(last[v] > j)
            index: dict[tuple[int, ...], int] = {}
            transitions = []
            for si, state in enumerate(states):
                blocked = 0
                for i, _ in nbrs:
                    blocked |= state[i]
                for b in range(1 << k):
                    if b & blocked:
                        continue
                    # g_v in set a moves left past g_w (w read earlier) in every later set
                    phase = sum(
                        e * (state[i] >> (a + 1)).bit_count()
                        for i, e in nbrs
                        for a in range(k)
                        if b >> a & 1
                    )
                    new = tuple(state[i] for i in keep) + ((b,) if stays else ())
                    out = index.setdefault(new, len(index))
                    transitions.append((si, out, b.bit_count() % m.states, b, phase % m.states))
            self.steps.append(transitions)
            frontier = [frontier[i] for i in keep] + ([v] if stays else [])
            states = list(index)
            self.sizes.append(len(states))
            if self.coordinates(len(states)) > MAX_COORDINATES:
                raise ValueError(
                    f"the frontier is too wide: {self.coordinates(len(states))} rational "
                    f"coordinates after term {v} (at most {MAX_COORDINATES})"
                )

    def coordinates(self, product_states: int) -> int:
        return (len(self.products) * product_states + int(self.scalar)) * self.field.d

    def weight(self, prod: Product, j: int, chosen: int, phase: int) -> tuple[Monomial, Element]:
        """Monomial and field weight of one transition of term ``order[j]`` in ``prod``."""
        field, c = self.field, self.couplings[int(self.order[j])]
        mono = [0] * (max(prod.variables) + 1)
        turn = phase
        weight = field.one
        for a in range(self.copies):
            if chosen >> a & 1:
                mono[prod.variables[a]] += 1
                turn += prod.phases[a]
                weight = field.scale(field.mul(weight, c), -1)
        return tuple(mono), field.mul(weight, field.root(turn * self.omega))

    def matrices(self, j: int, n_vars: int) -> dict[int, dict[Monomial, flint.fmpq_mat]]:
        """Transfer matrices of step j over the rationals: letter -> monomial -> matrix."""
        d = self.field.d
        n_in, n_out = self.sizes[j], self.sizes[j + 1]
        rows, cols = self.coordinates(n_in), self.coordinates(n_out)
        blocks: dict[tuple[int, Monomial], dict[tuple[int, int], Any]] = {}

        def put(letter: int, mono: Monomial, r0: int, c0: int, weight: Element) -> None:
            mono = mono + (0,) * (n_vars - len(mono))
            entries = blocks.setdefault((letter, mono), {})
            for a, coords in enumerate(self.field.matrix(weight)):
                for b, val in enumerate(coords):
                    if val:
                        key = (r0 + a, c0 + b)
                        entries[key] = entries.get(key, 0) + val

        for p, prod in enumerate(self.products):
            for si, out, letter, chosen, phase in self.steps[j]:
                mono, weight = self.weight(prod, j, chosen, phase)
                put(letter, mono, (p * n_in + si) * d, (p * n_out + out) * d, weight)
        if self.scalar:  # the multiple of the identity rides along on the empty word
            put(
                0, (), len(self.products) * n_in * d, len(self.products) * n_out * d, self.field.one
            )
        out_mats: dict[int, dict[Monomial, flint.fmpq_mat]] = {}
        for (letter, mono), entries in blocks.items():
            mat = flint.fmpq_mat(rows, cols)
            for (r, c), val in entries.items():
                mat[r, c] = to_fmpq(val)
            out_mats.setdefault(letter, {})[mono] = mat
        return out_mats

    def initial(self, scalar_value: Element | None) -> flint.fmpq_mat:
        entries: list[Any] = []
        for prod in self.products:
            entries.extend(self.field.rational(prod.sign))
        if scalar_value is not None:
            entries.extend(scalar_value)
        return flint.fmpq_mat(1, len(entries), [to_fmpq(x) for x in entries])

    def readout(self) -> flint.fmpq_mat:
        """Sum of the blocks' final values, coordinate by coordinate."""
        d = self.field.d
        blocks = len(self.products) + int(self.scalar)
        return flint.fmpq_mat(
            blocks * d, d, [int(r % d == c) for r in range(blocks * d) for c in range(d)]
        )


def _last_neighbour(ex: sps.csr_array, pos: np.ndarray) -> np.ndarray:
    """For every term, the last position (in the order ``pos``) of a neighbour; -1 if none."""
    coo = sps.coo_array(ex)
    last = np.full(ex.shape[0], -1, dtype=np.int64)
    np.maximum.at(last, coo.row, pos[coo.col])
    return last


def _term_order(m: Model) -> np.ndarray:
    """The narrowest-frontier order among: chain order, term order, reverse Cuthill-McKee."""
    candidates = [np.arange(len(m), dtype=np.int64)]
    chain = chain_structure(m) if len(m) else None
    if chain is not None:
        candidates.insert(0, np.asarray(chain.order, dtype=np.int64))
    adj = ADJACENCY(m)
    if len(m):
        rcm = csgraph.reverse_cuthill_mckee(sps.csr_matrix(adj.astype(np.int8)), True)
        candidates.append(np.asarray(rcm, dtype=np.int64))
    return min(candidates, key=lambda order: _width(adj, order))


def _width(adj: sps.csr_array, order: np.ndarray) -> int:
    """Largest frontier of an order: terms read that still have an unread neighbour."""
    n = len(order)
    if n == 0:
        return 0
    pos = np.empty(n, dtype=np.int64)
    pos[order] = np.arange(n)
    last = _last_neighbour(adj, pos)
    # term w is in the frontier after steps pos[w] .. last[w] - 1
    live = np.zeros(n + 1, dtype=np.int64)
    open_ = last > pos
    np.add.at(live, pos[open_], 1)
    np.add.at(live, last[open_], -1)
    return int(np.cumsum(live).max())


def _rref(mat: flint.fmpq_mat) -> tuple[flint.fmpq_mat, int]:
    reduced, rank = mat.rref()
    cols = mat.ncols()
    return flint.fmpq_mat(rank, cols, reduced.entries()[: rank * cols]), rank


def _stack(mats: Sequence[flint.fmpq_mat]) -> flint.fmpq_mat:
    cols = mats[0].ncols()
    entries: list[Any] = []
    for mat in mats:
        entries.extend(mat.entries())
    return flint.fmpq_mat(len(entries) // cols if cols else 0, cols, entries)


def _power(point: Sequence[int], mono: Monomial) -> int:
    return math.prod(x**e for x, e in zip(point, mono, strict=True))


@dataclass
class _Run:
    """The forward spaces of one evaluation point."""

    vanishes: bool
    rank: int
    bases: list[flint.fmpq_mat]
    steps: list[dict[int, flint.fmpq_mat]]


def _forward(
    plan: _Plan,
    mats: list[dict[int, dict[Monomial, flint.fmpq_mat]]],
    point: Sequence[int],
    scalar: dict[Monomial, Element] | None,
) -> _Run:
    field = plan.field
    value = None
    if scalar is not None:
        value = field.zero
        for mono, coef in scalar.items():
            value = field.add(value, field.scale(coef, _power(point, mono)))
    basis, rank = _rref(plan.initial(value))
    run = _Run(True, rank, [basis], [])
    for step in mats:
        evaluated = {}
        for letter, by_mono in step.items():
            terms = [mat * flint.fmpq(_power(point, mono)) for mono, mat in by_mono.items()]
            total = terms[0]
            for t in terms[1:]:
                total = total + t
            evaluated[letter] = total
        run.steps.append(evaluated)
        if rank == 0:  # every word is zero from here on
            return run
        basis, rank = _rref(_stack([basis * w for w in evaluated.values()]))
        run.bases.append(basis)
        run.rank = max(run.rank, rank)
    run.vanishes = not any((basis * plan.readout()).entries())
    return run


def run(
    m: Model,
    products: Sequence[Product],
    n_vars: int,
    points: Sequence[Sequence[int]],
    scalar: dict[Monomial, Element] | None = None,
    max_work: int = MAX_WORK,
    progress: Callable[[int, int], Any] | None = None,
) -> SweepResult:
    """Decide whether ``sum(products) + scalar * 1`` vanishes at every point.

    Parameters
    ----------
    m : Model
        The terms, couplings and commutation exponents.
    products : sequence of Product
        All with the same number of factors.
    n_vars : int
        Number of spectral parameters.
    points : sequence of integer tuples
        The values of the parameters to test.
    scalar : dict, optional
        A multiple of the identity: monomial -> coefficient in the field of the model
        (:func:`field_of`).
    max_work : int
        Largest ``len(points) * M``.
    progress : callable, optional
        Called after every point as ``progress(points_done, points_total)`` (for a progress
        bar; the run can be interrupted between points).

    Returns
    -------
    SweepResult
        The first failing point ends the run, with a witness word.

    Raises
    ------
    ValueError
        If a coupling is not an exact or float number, the frontier is too wide
        (:data:`MAX_COORDINATES`), or the work exceeds ``max_work``.
    """
    work = len(points) * max(len(m), 1)
    if work > max_work:
        raise ValueError(
            f"{len(points)} evaluation points x {len(m)} terms = {work} steps, more than "
            f"max_work={max_work}"
        )
    plan = _Plan(m, products, scalar is not None)
    mats = [plan.matrices(j, n_vars) for j in range(len(m))]
    width = max(plan.coordinates(s) for s in plan.sizes)
    order = tuple(int(v) for v in plan.order)
    top = 0
    for done, point in enumerate(points, start=1):
        fwd = _forward(plan, mats, point, scalar)
        top = max(top, fwd.rank)
        if progress is not None:
            progress(done, len(points))
        if not fwd.vanishes:
            witness = _witness(plan, fwd, scalar, n_vars)
            verdict = False if witness.independent else None
            return SweepResult(verdict, done, width, top, order, witness)
    return SweepResult(True, len(points), width, top, order)


# -- witnesses ----------------------------------------------------------------------------------
def _witness(
    plan: _Plan, fwd: _Run, scalar: dict[Monomial, Element] | None, n_vars: int
) -> Witness:
    """A word with a non-zero coefficient, by walking the forward spaces backwards."""
    readout = plan.readout()
    final = fwd.bases[-1] * readout
    col = next(c for c in range(final.ncols()) if any(final[r, c] for r in range(final.nrows())))
    r = flint.fmpq_mat(readout.nrows(), 1, [readout[i, col] for i in range(readout.nrows())])
    letters = [0] * len(fwd.steps)
    for j in range(len(fwd.steps) - 1, -1, -1):
        for letter, w in sorted(fwd.steps[j].items()):
            back = w * r
            if any((fwd.bases[j] * back).entries()):
                letters[j], r = letter, back
                break
        else:  # pragma: no cover - the forward spaces guarantee a letter
            raise AssertionError("no letter continues the witness word")
    word = [0] * len(plan.order)
    for j, v in enumerate(plan.order.tolist()):
        word[v] = letters[j]
    string, shift = _word_string(plan, letters)
    field = plan.field
    phase = unit_phase(shift, plan.model.states)
    shown = {
        mono: field.to_complex(c) * phase
        for mono, c in _word_polynomial(plan, letters, scalar, n_vars).items()
    }
    return Witness(tuple(word), string, shown, _independent(plan.model))


def _word_polynomial(
    plan: _Plan, letters: Sequence[int], scalar: dict[Monomial, Element] | None, n_vars: int
) -> dict[Monomial, Element]:
    """The exact coefficient of one word, as a polynomial in the spectral parameters."""
    field = plan.field
    total: dict[Monomial, Element] = {}
    for prod in plan.products:
        vec: dict[tuple[int, Monomial], Element] = {(0, (0,) * n_vars): field.rational(prod.sign)}
        for j, letter in enumerate(letters):
            new: dict[tuple[int, Monomial], Element] = {}
            for si, out, lt, chosen, phase in plan.steps[j]:
                if lt != letter:
                    continue
                mono, weight = plan.weight(prod, j, chosen, phase)
                mono = mono + (0,) * (n_vars - len(mono))
                for (s, have), val in vec.items():
                    if s == si:
                        key = (out, tuple(x + y for x, y in zip(have, mono, strict=True)))
                        new[key] = field.add(new.get(key, field.zero), field.mul(val, weight))
            vec = new
        for (_, mono), val in vec.items():
            total[mono] = field.add(total.get(mono, field.zero), val)
    if scalar is not None and not any(letters):
        for mono, val in scalar.items():
            total[mono] = field.add(total.get(mono, field.zero), val)
    return {k: v for k, v in total.items() if not field.is_zero(v)}


def _word_string(plan: _Plan, letters: Sequence[int]) -> tuple[WeylString, int]:
    """The word ``prod_j g_{v_j}^{n_j}`` (sweep order), normalised, and its phase exponent."""
    m = plan.model
    out = make_string(m.states, [])
    for j, letter in enumerate(letters):
        out = out * m.strings[int(plan.order[j])] ** letter
    return out.normalized()


def _independent(m: Model) -> bool:
    """True when no non-trivial product of powers of the terms' strings is a phase."""
    mat = sps.hstack([m.strings.x, m.strings.z]).toarray().astype(np.int64)
    return all(_rank_mod(mat % q, int(q)) == len(m) for q in sympy.primefactors(m.states))


def _rank_mod(mat: np.ndarray, q: int) -> int:
    """Rank of an integer matrix over the field with q elements (q prime)."""
    a = mat.copy()
    rank = 0
    for c in range(a.shape[1]):
        pivot = next((r for r in range(rank, a.shape[0]) if a[r, c] % q), None)
        if pivot is None:
            continue
        a[[rank, pivot]] = a[[pivot, rank]]
        a[rank] = (a[rank] * pow(int(a[rank, c]), -1, q)) % q
        col = a[:, c].copy()
        col[rank] = 0
        a = (a - np.outer(col, a[rank])) % q
        rank += 1
        if rank == a.shape[0]:
            break
    return rank


# -- the two identities -------------------------------------------------------------------------
def _orders(m: Model) -> int:
    """The independence number alpha: the highest order of a charge."""
    return sum(1 for _ in charge_series(m)) - 1


_COMMUTATOR = (Product(1, (0, 1), (0, 0)), Product(-1, (1, 0), (0, 0)))
"""``T(u) T(v) - T(v) T(u)``: the products of :func:`commutator_sweep`."""


def _commutator_work(m: Model) -> float:
    """The cost model of :func:`commutator_sweep`: evaluation points times the sum over the
    terms of the squared number of rational coordinates of each step (the forward-space
    reductions dominate, and their size follows the frontier, not the number of terms);
    ``inf`` when the frontier is too wide to run.  Cheap: the plan's states only."""
    alpha = _orders(m)
    return _work(m, _COMMUTATOR, False, alpha * (alpha - 1) / 2)


def _inversion_work(m: Model) -> float:
    """The cost model of :func:`inversion_sweep`, as :func:`_commutator_work`."""
    n = m.states
    return _work(m, [Product(1, (0,) * n, tuple(range(n)))], True, n * _orders(m))


def _work(m: Model, products: Sequence[Product], scalar: bool, points: float) -> float:
    try:
        plan = _Plan(m, products, scalar)
    except ValueError:
        return math.inf
    return points * sum(plan.coordinates(s) ** 2 for s in plan.sizes[1:])


def commutator_sweep(
    m: Model, max_work: int = MAX_WORK, progress: Callable[[int, int], Any] | None = None
) -> SweepResult:
    """Decide ``[T(u), T(v)] = 0`` exactly, that is ``[Q^(r), Q^(s)] = 0`` for all r and s.

    The coefficient of every word is a polynomial of degree at most alpha (the highest order)
    in u and in v, antisymmetric under ``u <-> v`` and zero at u = 0 or v = 0 (``T(0) = 1``).
    Zero at ``(u, v) = (a, b)`` for the integers ``1 <= a < b <= alpha`` therefore means zero on
    the grid ``{0 .. alpha}^2``, hence zero as a polynomial.

    Parameters
    ----------
    m : Model
        Numeric couplings (exact or float).
    max_work, progress
        See :func:`run`.

    Returns
    -------
    SweepResult
        Witness coefficients are keyed by ``(r, s)``, r < s: the coefficient of the witness
        string in ``[Q^(r), Q^(s)]``.

    Raises
    ------
    ValueError
        See :func:`run`.

    References
    ----------
    S. J. Elman, A. Chapman and S. T. Flammia, Commun. Math. Phys. 388, 969 (2021).
    """
    alpha = _orders(m)
    points = list(combinations(range(1, alpha + 1), 2))
    result = run(m, _COMMUTATOR, 2, points, max_work=max_work, progress=progress)
    w = result.witness
    if w is None:
        return result
    # the coefficient of u^r v^s in [T(u), T(v)] is (-1)^(r+s) times that in [Q(r), Q(s)]
    pairs: dict[tuple[int, ...], complex] = {
        (r, s): (-1) ** (r + s) * c for (r, s), c in w.coefficients.items() if r < s
    }
    return replace(result, witness=replace(w, coefficients=pairs))


def inversion_sweep(
    m: Model, max_work: int = MAX_WORK, progress: Callable[[int, int], Any] | None = None
) -> SweepResult:
    """Decide ``T(u) T(omega u) ... T(omega^{N-1} u) = P(u^N) 1`` exactly, for every u.

    Both sides are polynomials of degree at most ``N alpha`` in u and agree at u = 0, so
    agreement at ``u = 1 .. N alpha`` proves the identity.  P is the library's
    :func:`~freeladder.exclusion_polynomial`, with its exact coefficients.

    Parameters
    ----------
    m : Model
        Numeric couplings (exact or float).
    max_work, progress
        See :func:`run`.

    Returns
    -------
    SweepResult
        Witness coefficients are keyed by ``(k,)``: the coefficient of ``u^k``.

    Raises
    ------
    ValueError
        For symbolic couplings, and see :func:`run`.

    References
    ----------
    S. J. Elman, A. Chapman and S. T. Flammia, Commun. Math. Phys. 388, 969 (2021) (N = 2);
    F. C. Alcaraz and R. A. Pimenta, Phys. Rev. B 102, 121101(R) (2020) (clock chains).
    """
    n = m.states
    poly = exclusion_polynomial(m)
    if poly.kind == "symbolic":
        raise ValueError("symbolic couplings: substitute values first")
    field = field_of(m)
    scalar: dict[Monomial, Element] = {}
    for s, (a, b) in enumerate(zip(*poly.exact_parts(), strict=True)):
        value = field.rational(-a)
        if b:
            value = field.add(value, field.scale(field.root(field.order // 4), -b))
        if not field.is_zero(value):
            scalar[(n * s,)] = value
    products = [Product(1, (0,) * n, tuple(range(n)))]
    points = [(u,) for u in range(1, n * _orders(m) + 1)]
    return run(m, products, 1, points, scalar=scalar, max_work=max_work, progress=progress)
