"""Real-time correlations of the edge operator through the hidden modes.

The edge operator ``chi`` of a free model (:func:`freeladder.edge_mode`: a string that fails to
commute with one term ``g_a`` only, ``chi g_a = omega^m g_a chi``) evolves as
``chi(t) = exp(iHt) chi exp(-iHt)``.  Its infinite-temperature autocorrelation is a finite sum
over the hidden modes,

    C(t) = Tr[chi^dagger chi(t)] / dim
         = w_0 + sum_k (W_k / N) sum_{s=0}^{N-1} exp(i t (1 - omega^m) omega^s eta_k),

with weights read off the polynomial alone.  With ``P = P_G`` the exclusion polynomial and
``P_a = P_{G - a}`` the polynomial of the model without the term ``g_a``,

    sum_n Tr[chi^dagger L^n chi] / dim * z^(-n-1) = (1/z) P_a(y) / P(y),
    y = (1 - omega^m)^N / z^N,

(``L = [H, .]``), so that

    W_k = -P_a(y_k) / (y_k P'(y_k)),     w_0 = lim_{y -> oo} P_a(y) / P(y),     w_0 + sum W_k = 1.

For N = 2 and real couplings this is ``C(t) = w_0 + sum_k W_k cos(2 eta_k t)``; for reach 1 the
``W_k`` are the squared first components of the eigenvectors of the zero-diagonal tridiagonal
matrix with off-diagonals ``c_j`` (the Majorana chain), counted once for ``+eta`` and once for
``-eta``, and ``P_a / P`` is the diagonal resolvent entry of that matrix (common practice).

Where the formula comes from.  The modes ``Psi_{+-k} = N_k^{-1} T(-+u_k) chi T(+-u_k)``
(P. Fendley, J. Phys. A 52, 335002 (2019)) raise and lower the energy by ``2 eta_k``, so
``chi(t)`` is a sum of terms ``exp(+-2 i eta_k t)``; their weights follow from the moments
``Tr[chi^dagger L^n chi] / dim``: a word in the terms has non-zero trace only when it is a
multiple of the identity, which for independent strings (no relations, :func:`find_relations`)
means every term an N-multiple of times, and the sum over such walks started at ``g_a`` is the
ratio of independence polynomials above.  Its first two coefficients, ``c_a^N`` and
``c_a^N (c_a^N + sum_{b ~ a} c_b^N)``, follow from counting the walks by hand; they and the
total weight are the sum rules every result reports (``EdgeExpansion.sum_rules``).  The whole
identity is derived here, not quoted, and was checked against exact evolution for reach 1, 2,
variable reach and N = 2, 3 with real and complex couplings (``tests/test_dynamics.py``): for
N > 2 it is TESTED, not proved.

Evaluation (no operators are built).  The chain is oriented so that ``g_a`` comes last
(position M - 1); the roots come from :func:`freeladder.roots.real.chain_real_roots` (real
weights, any exponent range) or :func:`freeladder.roots.methods.solve_chain` (complex), and

    W_k = P_{M-2}(y_k) / (y_k S(y_k)),     S(y) = -P'(y) = sum_j w_j P_{L(j)}(y) P_{R(j)}(y),

where ``L(j)`` are the terms before j's first neighbour and ``R(j)`` those after its last one
(every independent set that holds j splits so; ``y d/dy`` counts the weights).  The prefixes
``P_{L(j)}`` run from the far end, the suffixes ``P_{R(j)}`` from the edge end, as mantissas
with powers of two, O(M) per root.  The simpler ``1 / (1 + Lt_{M-b-2} - Lt_{M-2})`` (``Lt =
y P'/P`` of prefixes) gives O(1) nonsense for modes localised far from the edge (the prefix has
a root closer to y_k than y_k's rounding), while here such a weight comes out at the size of its
error.  Error estimate per weight: the change of ``W`` when ``y_k`` moves by its relative error
(at least ``sqrt(M) eps``) plus ``sqrt(M) eps |W|``.

References
----------
P. Fendley, J. Phys. A 52, 335002 (2019), arXiv:1901.08078 (edge operator and the modes);
P. Fendley, J. Phys. A 47, 075001 (2014), arXiv:1310.6049 (free parafermions, N > 2);
J. Kemp, N. Y. Yao, C. R. Laumann and P. Fendley, J. Stat. Mech. (2017) 063105 (edge-spin
autocorrelation and its plateau); I. Vona, M. Mestyan and B. Pozsgay, arXiv:2405.20832 (2024)
(real-time dynamics through the hidden fermions).
"""

from __future__ import annotations

import dataclasses
import html
import math
from collections.abc import Mapping, Sequence
from dataclasses import dataclass, field
from typing import Any

import numpy as np

from ..algebra.model import Model
from ..algebra.strings import WeylString
from ..algebra.syntax import parse_model
from ..base.errors import NotExpandableError
from ..base.frozen import ArrayRecord
from ..base.interrupt import poll
from ..base.jsonready import json_ready
from ..base.lazy import njit, prange
from ..graphs.graph import chain_structure
from ..graphs.indifference import indifference_order
from ..graphs.relations import find_relations
from ..roots import real as real_roots
from ..roots.methods import scaled_weights, solve_chain
from . import weight_balls as _balls
from .edge import component_model, components, edge_mode
from .weight_balls import WeightBalls

__all__ = [
    "Autocorrelation",
    "EdgeExpansion",
    "TwoPoint",
    "autocorrelation",
    "certified_edge_weights",
    "edge_expansion",
    "two_point",
]

_EPS = float(np.finfo(np.float64).eps)
_CHUNK = 2_000_000  # modes x times per block of the time series
_TINY = 2.0**-256  # a zero ratio becomes -_TINY (as in roots.real)
_S_MAX = 2.0**900  # the float64 ratio loop gives up beyond this
_P_HI = 2.0**64  # prefix mantissas are renormalised outside [_P_LO, _P_HI]
_P_LO = 2.0**-64
_LANES = 16  # points evaluated side by side along the chain
_STEPS_PER_CALL = 1e8  # points x terms per compiled call of the weights (Ctrl-C stays prompt)


@dataclass(frozen=True)
class EdgeExpansion(ArrayRecord):
    """The edge operator in the hidden modes (result of :func:`edge_expansion`).

    ``Tr[chi^dagger chi(t)] / dim = zero_weight + sum_k (weights[k] / N) sum_s
    exp(i t frequencies[k, s])``.

    Attributes
    ----------
    operator : str
        ``chi`` as model text.
    term : int
        The term ``g_a`` that ``chi`` fails to commute with (index into the model).
    exponent : int
        m with ``chi g_a = omega^m g_a chi``.
    coupling : complex or float
        ``c_a``.
    states : int
        N.
    quasi_energies : numpy.ndarray
        ``eta_k`` of the component of ``g_a`` (``eta^N = 1 / y_k``), ascending in ``|eta|``;
        a quasi-energy below float64's range is stored as 0.0 (its value is in
        ``log_quasi_energies``).
    log_quasi_energies : numpy.ndarray
        ``ln |eta_k|``, exact to rounding anywhere in range.
    weights : numpy.ndarray
        ``W_k`` (float for N = 2 with real couplings, complex otherwise).
    weight_errors : numpy.ndarray
        Estimated absolute error of each weight (root error propagated through the
        recurrence plus rounding along it; an estimate, not a proof).
    log_errors : numpy.ndarray
        Error of ``ln |eta_k|`` (of the kind the root method gives, see ``method``).
    zero_weight : float or complex
        ``w_0``: the weight at frequency 0 (an exact zero mode; 0 when ``P_a`` has lower degree).
    frequencies : numpy.ndarray, shape (S, N)
        ``(1 - omega^m) omega^s eta_k``; for N = 2 these are ``2 eta_k`` and ``-2 eta_k``.
    sum_rules : mapping
        Residuals of three exact identities (coefficients of ``P_a / P``):
        ``w_0 + sum W_k = 1``, ``sum W_k eta_k^N = c_a^N`` and
        ``sum W_k eta_k^(2N) = c_a^N (c_a^N + sum_{b ~ a} c_b^N)``, each relative to the
        size of its terms.
    method : str
        How the roots and weights were computed.
    weight_balls : WeightBalls or None
        For exact couplings and a polynomial of degree up to 24: the weights in proved balls,
        the exact ``w_0`` and the check of the float weights against them
        (:func:`certified_edge_weights`); None otherwise.
    """

    operator: str
    term: int
    exponent: int
    coupling: complex | float
    states: int
    quasi_energies: np.ndarray
    log_quasi_energies: np.ndarray
    weights: np.ndarray
    weight_errors: np.ndarray
    log_errors: np.ndarray
    zero_weight: complex | float
    frequencies: np.ndarray
    sum_rules: Mapping[str, float]
    method: str
    weight_balls: WeightBalls | None = None

    ARRAYS = (
        "quasi_energies",
        "log_quasi_energies",
        "weights",
        "weight_errors",
        "log_errors",
        "frequencies",
    )
    MAPPINGS = ("sum_rules",)

    @property
    def hermitian(self) -> bool:
        """True for N = 2 with real couplings (real weights, real autocorrelation)."""
        return self.states == 2 and not np.iscomplexobj(self.weights)

    @property
    def spectral_weights(self) -> np.ndarray:
        """Weight of each frequency: ``weights[k] / N`` in the shape of ``frequencies``."""
        return np.repeat(self.weights[:, None] / self.states, self.states, axis=1)

    def weight_below(self, frequency: float) -> complex | float:
        """``w_0`` plus the weights of the modes with ``|2 eta_k|`` (N = 2) or
        ``|(1 - omega^m) eta_k|`` below ``frequency``: the plateau seen for times
        ``1 / (bulk frequencies) << t << 1 / frequency``."""
        scale = float(np.log(abs(1 - np.exp(2j * np.pi * self.exponent / self.states))))
        slow = self.log_quasi_energies + scale < np.log(float(frequency))
        total = self.zero_weight + self.weights[slow].sum()
        return float(total.real) if self.hermitian else complex(total)

    def __repr__(self) -> str:
        return (
            f"EdgeExpansion(chi = {self.operator}, {len(self.weights)} modes, zero weight "
            f"{_short(self.zero_weight)}, largest weight error {_worst(self.weight_errors)}"
            f"{_balls_note(self.weight_balls)})"
        )


@dataclass(frozen=True)
class Autocorrelation(ArrayRecord):
    """Infinite-temperature autocorrelation of the edge operator (result of
    :func:`autocorrelation`).

    Attributes
    ----------
    operator : str
        ``chi`` as model text.
    times : numpy.ndarray
    values : numpy.ndarray
        ``Tr[chi^dagger chi(t)] / dim`` (real for N = 2 with real couplings; there it equals
        ``Tr[chi(t)^dagger chi(0)] / dim``).
    errors : numpy.ndarray
        Estimated absolute error of each value, from the weight and quasi-energy errors.
    plateau : float or complex
        The long-time mean: the zero-mode weight ``w_0``.  For a finite ordered chain with an
        exponentially slow edge mode but no exact zero mode, see
        ``expansion.weight_below`` and :attr:`slowest`.
    expansion : EdgeExpansion
        The modes, weights and frequencies (the spectral function).
    growth_rates : numpy.ndarray, shape (S, N)
        ``-Im(frequency)``: positive entries are terms that grow like ``exp(rate t)`` (non-Hermitian
        models), negative ones decay.  All zero for Hermitian models.
    """

    operator: str
    times: np.ndarray
    values: np.ndarray
    errors: np.ndarray
    plateau: complex | float
    expansion: EdgeExpansion
    growth_rates: np.ndarray = field(default_factory=lambda: np.zeros((0, 0)))

    ARRAYS = ("times", "values", "errors", "growth_rates")

    @property
    def frequencies(self) -> np.ndarray:
        """The mode frequencies, flat (``expansion.frequencies``)."""
        return self.expansion.frequencies.ravel()

    @property
    def spectral_weights(self) -> np.ndarray:
        """The weight at each of :attr:`frequencies` (flat)."""
        return self.expansion.spectral_weights.ravel()

    @property
    def slowest(self) -> tuple[float, complex | float]:
        """``(ln |eta|, W)`` of the mode with the smallest ``|eta|`` (the edge mode of an ordered
        chain, whose weight is the plateau until ``t ~ 1 / eta``)."""
        e = self.expansion
        if not len(e.weights):
            return float("-inf"), 0.0
        w = e.weights[0]
        return float(e.log_quasi_energies[0]), float(w.real) if e.hermitian else complex(w)

    @property
    def max_growth_rate(self) -> float:
        """The largest ``-Im(frequency)``: > 0 means the trace grows exponentially."""
        return float(self.growth_rates.max()) if self.growth_rates.size else 0.0

    def to_dict(self) -> dict[str, Any]:
        """JSON-ready fields (complex numbers as ``[re, im]``)."""
        return json_ready(  # type: ignore[no-any-return]
            {
                "operator": self.operator,
                "times": self.times,
                "values": self.values,
                "errors": self.errors,
                "plateau": self.plateau,
                "max_growth_rate": self.max_growth_rate,
                "expansion": self.expansion,
            }
        )

    def __repr__(self) -> str:
        grow = ""
        if self.max_growth_rate > 0:
            grow = f", GROWING terms up to exp({self.max_growth_rate:.3g} t)"
        lg, w = self.slowest
        return (
            f"Autocorrelation(chi = {self.operator}, {self.times.size} times, plateau "
            f"{_short(self.plateau)}, slowest mode eta = exp({lg:.4g}) weight {_short(w)}, "
            f"largest error {_worst(self.errors)}{grow})"
        )

    def _repr_html_(self) -> str:
        return f"<pre>{html.escape(repr(self))}</pre>"


@dataclass(frozen=True)
class TwoPoint(ArrayRecord):
    """``Tr[a^dagger b(t)] / dim`` through the modes (result of :func:`two_point`).

    Attributes
    ----------
    left, right : str
        ``a`` and ``b`` as model text.
    times, values, errors : numpy.ndarray
    formula : str
        Which moments of the edge expansion give the values.
    expansion : EdgeExpansion
    """

    left: str
    right: str
    times: np.ndarray
    values: np.ndarray
    errors: np.ndarray
    formula: str
    expansion: EdgeExpansion

    ARRAYS = ("times", "values", "errors")

    def __repr__(self) -> str:
        return (
            f"TwoPoint(Tr[({self.left})^dagger ({self.right})(t)] / dim, {self.times.size} "
            f"times, largest error {_worst(self.errors)})"
        )


def _short(v: Any) -> str:
    if isinstance(v, complex) or np.iscomplexobj(v):
        return f"{complex(v):.6g}"
    return f"{float(v):.6g}"


def _balls_note(b: WeightBalls | None) -> str:
    if b is None:
        return ""
    if not b.verified:
        return "; CERTIFIED WEIGHTS DISAGREE (see weight_balls)"
    return f"; certified in balls of radius <= {_worst(b.radii)}"


def _worst(errors: np.ndarray) -> str:
    return f"{float(np.max(errors)):.2g}" if errors.size else "0"


# -- the edge and the ordering ------------------------------------------------------------------
def _as_string(m: Model, op: str | WeylString, what: str) -> tuple[WeylString, complex]:
    """A string operator and its coefficient (model text or a WeylString)."""
    if isinstance(op, WeylString):
        if op.states != m.states:
            raise ValueError(f"{what}: a string of N = {op.states} for a model of N = {m.states}")
        g, e = op.normalized()
        return g, complex(np.exp(1j * np.pi * e / m.states))
    if not isinstance(op, str):
        raise TypeError(f"{what} must be model text or a WeylString, got {type(op).__name__}")
    parsed = parse_model(op, states=m.states, sites=m.sites)
    if len(parsed) != 1 or parsed.constant != 0:
        raise NotExpandableError(
            f"{what} {op!r}: one string (with a coefficient) is expandable, got "
            f"{len(parsed)} terms" + (" and a constant" if parsed.constant != 0 else "")
        )
    return parsed.strings[0], complex(parsed.coupling_array()[0])


def _hits(m: Model, chi: WeylString) -> list[tuple[int, int]]:
    """``(j, e)`` for every term ``g_j`` with ``chi g_j = omega^e g_j chi``, e != 0."""
    col = {site: j for j, site in enumerate(m.sites)}
    xc = np.zeros(len(col), dtype=np.int64)
    zc = np.zeros(len(col), dtype=np.int64)
    for site, (a, b) in chi.exponents().items():
        if site in col:  # a site no term acts on commutes with every term
            xc[col[site]], zc[col[site]] = a, b
    g = m.strings
    e = np.asarray(g.x @ zc - g.z @ xc) % m.states
    return [(int(j), int(e[j])) for j in np.nonzero(e)[0]]


def _reverse_back(back: np.ndarray) -> np.ndarray:
    """The back-reach array of the reversed ordering of an indifference ordering."""
    m = back.size
    first = np.arange(m) - back
    last = np.searchsorted(first, np.arange(m), side="right") - 1
    return np.ascontiguousarray((last - np.arange(m))[::-1], dtype=np.int64)


class _Edge:
    """chi, its term, the component model and the ordering with the term last."""

    def __init__(self, m: Model, operator: str | WeylString | None) -> None:
        if not isinstance(m, Model):
            raise TypeError(f"expected a freeladder Model, got {type(m).__name__}")
        if len(m) == 0:
            raise NotExpandableError("the model has no terms")
        couplings = np.asarray(m.coupling_array())  # a clear error for symbolic couplings
        if operator is None:
            found = edge_mode(m)
            if not found.found or found.string is None:
                raise NotExpandableError(f"no edge operator: {found.reason}")
            chi = found.string
        else:
            chi, _ = _as_string(m, operator, "operator")
        hits = _hits(m, chi)
        if len(hits) != 1:
            raise NotExpandableError(
                f"{chi} fails to commute with {len(hits)} terms {[j for j, _ in hits][:6]}; the "
                "expansion needs an edge operator that fails to commute with exactly one term"
            )
        self.chi, (self.term, self.exponent) = chi, hits[0]
        comp = next(c for c in components(m) if self.term in c)
        sub = component_model(m, comp)
        relations = find_relations(sub)
        if relations.relations:
            raise NotExpandableError(
                "a product of terms is a multiple of the identity (fl.find_relations): traces "
                "of words in the terms are then not those of independent strings, and the "
                "weights of the polynomial do not apply"
            )
        order, back = self._ordering(sub)
        local = int(np.nonzero(np.asarray(comp)[order] == self.term)[0][0])
        if local == 0:
            order, back = order[::-1].copy(), _reverse_back(back)
        elif local != order.size - 1:
            raise NotExpandableError(
                f"term {self.term} is not at an end of the chain order of its component; the "
                "expansion is derived for an edge operator next to an end term"
            )
        self.model = m
        self.terms = np.asarray(comp, dtype=np.int64)[order]
        self.back = back
        self.couplings = couplings[self.terms]

    @staticmethod
    def _ordering(sub: Model) -> tuple[np.ndarray, np.ndarray]:
        chain = chain_structure(sub)
        if chain is not None:
            order = np.asarray(chain.order, dtype=np.int64)
            return order, real_roots.chain_back(int(chain.reach), order.size)
        found = indifference_order(sub)
        if found is None:
            raise NotExpandableError(
                "the component of the edge term is neither an exclusion chain nor an "
                "(oriented) indifference order; the weights are derived for those only"
            )
        order = np.asarray(found.order, dtype=np.int64)
        back = np.arange(order.size) - np.asarray(found.first_neighbour, dtype=np.int64)
        return order, np.ascontiguousarray(back)


# -- weights ------------------------------------------------------------------------------------
@njit(cache=True, boundscheck=False, error_model="numpy")
def _norm(v):  # type: ignore[no-untyped-def]  # pragma: no cover - compiled
    """``v = m 2**e`` with ``|m|`` in [1/2, 1) (``m = 0, e = 0`` for zero)."""
    a = abs(v)
    if a == 0.0:
        return v, 0
    e = math.frexp(a)[1]
    return v * math.ldexp(1.0, -e), e


@njit(cache=True, boundscheck=False, error_model="numpy")
def _prefix_values(wm, we, back, ym, ye, pm, pe):  # type: ignore[no-untyped-def]  # pragma: no cover - compiled
    """``P_k(y)`` for k = -1 .. M-1 (stored at k + 1) as mantissas ``pm`` and powers of two
    ``pe``, through the ratios ``r_k = 1 - s_k``, ``s_k = y w_k / (r_{k-1} ... r_{k-b})``, each
    a mantissa and an integer exponent: nothing over- or underflows and no precision is lost
    to large exponents.  A ratio of modulus below ``2**-256`` becomes ``-2**-256`` (the
    device of :mod:`freeladder.roots.real`).
    """
    m = wm.size
    ring = 1
    for k in range(m):
        ring = max(ring, back[k])
    rm = np.ones(ring, dtype=wm.dtype)
    re = np.zeros(ring, dtype=np.int64)
    pm[0] = rm[0]
    pe[0] = 0
    for k in range(m):
        sm = ym * wm[k]
        se = ye + we[k]
        for i in range(1, back[k] + 1):
            slot = (k - i) % ring
            sm = sm / rm[slot]
            se -= re[slot]
        sm, de = _norm(sm)
        se += de
        if se > 60:
            t = 1.0 - math.ldexp(1.0, -se) / sm
            r, er = _norm(-sm * t)
            er += se
        elif se < -60:
            r, er = _norm(1.0 - sm * math.ldexp(1.0, se))
        else:
            v = 1.0 - sm * math.ldexp(1.0, se)
            if abs(v) < _TINY:
                v = v * 0.0 - _TINY
            r, er = _norm(v)
        rm[k % ring] = r
        re[k % ring] = er
        val, dv = _norm(pm[k] * r)
        pm[k + 1] = val
        pe[k + 1] = pe[k] + er + dv


@njit(cache=True, boundscheck=False, error_model="numpy")
def _prefix_lanes(w, back, ring, y, pm, pe, ok):  # type: ignore[no-untyped-def]  # pragma: no cover - compiled
    """:func:`_prefix_values` with plain float64 ratios at several points ``y`` at once.

    ``P_k(y_l)`` is stored at ``pm[k + 1, l] * 2**pe[k + 1, l]``, the mantissa renormalised
    only when it leaves ``[2**-64, 2**64]``.  The points (lanes) run side by side in the inner
    loop, so the division chains of different points overlap.  ``ok[l]`` is False when some
    ``|s_k|`` left ``[0, 2**900]`` or was not finite (the caller then uses
    :func:`_prefix_values` for that point).
    """
    m = w.size
    lanes = y.size
    inv = np.ones((ring, lanes), dtype=pm.dtype)
    cur = np.ones(lanes, dtype=pm.dtype)
    ce = np.zeros(lanes, dtype=np.int64)
    s = np.empty(lanes, dtype=pm.dtype)
    for j in range(lanes):
        pm[0, j] = cur[j]
        pe[0, j] = 0
        ok[j] = True
    for k in range(m):
        wk = w[k]
        for j in range(lanes):
            s[j] = y[j] * wk
        for i in range(1, back[k] + 1):
            slot = (k - i) % ring
            for j in range(lanes):
                s[j] = s[j] * inv[slot, j]
        here = k % ring
        for j in range(lanes):
            sk = s[j]
            if not abs(sk) <= _S_MAX:
                ok[j] = False
                sk = wk * 0.0
            r = 1.0 - sk
            if abs(r) < _TINY:
                r = r * 0.0 - _TINY
            inv[here, j] = 1.0 / r
            c = cur[j] * r
            a = abs(c)
            if a > _P_HI or a < _P_LO:
                c, d = _norm(c)
                ce[j] += d
            cur[j] = c
            pm[k + 1, j] = c
            pe[k + 1, j] = ce[j]


@njit(cache=True, boundscheck=False, error_model="numpy")
def _weights_lanes(w, wm, we, back, w_rev, wm_rev, we_rev, back_rev, last, ym, ye, out):  # type: ignore[no-untyped-def]  # pragma: no cover - compiled
    """``W = P_{M-2}(y) / (y sum_j w_j P_{L(j)}(y) P_{R(j)}(y))`` (the edge term last) at the
    points ``y = ym 2**ye`` of one block.

    ``L(j)`` are the terms before j's first neighbour (a prefix, evaluated from the far end)
    and ``R(j)`` those after its last neighbour (a suffix, evaluated from the edge end); the
    sum is ``-P_M'(y)``.
    """
    m = wm.size
    lanes = ym.size
    ring = 1
    for k in range(m):
        ring = max(ring, back[k], back_rev[k])
    pm = np.empty((m + 1, lanes), dtype=wm.dtype)
    pe = np.empty((m + 1, lanes), dtype=np.int64)
    qm = np.empty((m + 1, lanes), dtype=wm.dtype)
    qe = np.empty((m + 1, lanes), dtype=np.int64)
    ok = np.empty(lanes, dtype=np.bool_)
    ok_rev = np.empty(lanes, dtype=np.bool_)
    y = np.empty(lanes, dtype=wm.dtype)
    for j in range(lanes):
        y[j] = ym[j] * math.ldexp(1.0, ye[j]) if abs(ye[j]) < 900 else ym[j] * 0.0
    _prefix_lanes(w, back, ring, y, pm, pe, ok)
    _prefix_lanes(w_rev, back_rev, ring, y, qm, qe, ok_rev)
    one_m = np.empty(m + 1, dtype=wm.dtype)
    one_e = np.empty(m + 1, dtype=np.int64)
    for j in range(lanes):
        if abs(ye[j]) >= 900 or not ok[j]:
            _prefix_values(wm, we, back, ym[j], ye[j], one_m, one_e)
            pm[:, j] = one_m
            pe[:, j] = one_e
        if abs(ye[j]) >= 900 or not ok_rev[j]:
            _prefix_values(wm_rev, we_rev, back_rev, ym[j], ye[j], one_m, one_e)
            qm[:, j] = one_m
            qe[:, j] = one_e
    top = np.full(lanes, -(2**62), dtype=np.int64)
    for k in range(m):
        a, b = k - back[k], m - 1 - last[k]
        for j in range(lanes):
            top[j] = max(top[j], we[k] + pe[a, j] + qe[b, j])
    total = np.zeros(lanes, dtype=wm.dtype)
    for k in range(m):
        a, b = k - back[k], m - 1 - last[k]
        for j in range(lanes):
            e = we[k] + pe[a, j] + qe[b, j] - top[j]
            if e > -1100:
                total[j] += wm[k] * pm[a, j] * qm[b, j] * math.ldexp(1.0, e)
    for j in range(lanes):
        tm, te = _norm(total[j])
        if tm == 0.0:
            out[j] = tm + np.inf
            continue
        ratio, dr = _norm(pm[m - 1, j] / (ym[j] * tm))
        e = pe[m - 1, j] + dr - ye[j] - top[j] - te
        out[j] = ratio * math.ldexp(1.0, max(min(e, 1100), -1100))


@njit(cache=True, parallel=True)
def _weights(w, wm, we, back, w_rev, wm_rev, we_rev, back_rev, last, ym, ye, out, lanes):  # type: ignore[no-untyped-def]  # pragma: no cover - compiled
    blocks = (ym.size + lanes - 1) // lanes
    for i in prange(blocks):
        a = i * lanes
        b = min(a + lanes, ym.size)
        _weights_lanes(
            w, wm, we, back, w_rev, wm_rev, we_rev, back_rev, last, ym[a:b], ye[a:b], out[a:b]
        )


def _split(v: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Mantissas (modulus in [1/2, 1)) and int64 powers of two of non-zero numbers."""
    e = np.frexp(np.abs(v))[1].astype(np.int64)
    return np.ascontiguousarray(v * np.ldexp(1.0, -e)), np.ascontiguousarray(e)


def _mode_weights(
    w: np.ndarray, back: np.ndarray, ym: np.ndarray, ye: np.ndarray, rel: np.ndarray
) -> tuple[np.ndarray, np.ndarray]:
    """Weights at the roots ``y = ym 2**ye`` (edge term last) and an error estimate.

    The estimate is the change of W when y moves by its relative error (at least
    ``sqrt(M) eps``: the evaluation is backward stable, so rounding acts like such a move),
    plus ``sqrt(M) eps |W|``.  A mode localised far from the edge has a weight below that
    change: it comes out as a number of that size, with that error.
    """
    m = w.size
    wm, we = _split(w)
    first = np.arange(m) - back
    last = np.searchsorted(first, np.arange(m), side="right") - 1
    wr = np.ascontiguousarray(w[::-1])
    wm_rev, we_rev = _split(wr)
    args = (
        np.ascontiguousarray(w),
        wm,
        we,
        np.ascontiguousarray(back, dtype=np.int64),
        wr,
        wm_rev,
        we_rev,
        _reverse_back(back),
        np.ascontiguousarray(last, dtype=np.int64),
    )
    step = np.maximum(rel, np.sqrt(m) * _EPS)
    ym = ym.astype(wm.dtype)
    # the roots and the roots moved by their error, evaluated together
    pm = np.ascontiguousarray(np.concatenate([ym, ym * (1.0 + step)]))
    pe = np.ascontiguousarray(np.concatenate([ye, ye]), dtype=np.int64)
    both = np.empty(pm.size, dtype=wm.dtype)
    chunk = max(_LANES, int(_STEPS_PER_CALL / m) // _LANES * _LANES)
    for a in range(0, pm.size, chunk):
        poll()  # a stop hook (fl.stop_when) is seen between compiled chunks
        _weights(*args, pm[a : a + chunk], pe[a : a + chunk], both[a : a + chunk], _LANES)
    out, moved = both[: ym.size], both[ym.size :]
    errors = np.abs(moved - out) + np.sqrt(m) * _EPS * np.abs(out)
    return out, errors


def _common_phase(c: np.ndarray, n: int) -> float | None:
    """The angle theta when every weight ``c_j^N`` is ``|c_j|^N exp(i theta)``, else None."""
    angles = np.angle(np.asarray(c, dtype=complex) ** n)
    turn = np.angle(np.exp(1j * (angles - angles[0])))
    return float(angles[0]) if np.all(np.abs(turn) < 1e-13) else None


def _by_frequency(
    eta: np.ndarray,
    log_eta: np.ndarray,
    log_err: np.ndarray,
    weights: np.ndarray,
    errors: np.ndarray,
    zero: Any,
    text: str,
) -> tuple[Any, ...]:
    """The modes' arrays ordered by ``ln |eta|`` (slowest first), then the zero weight and the
    method text."""
    order = np.argsort(log_eta, kind="stable")
    arrays = (eta, log_eta, log_err, weights, errors)
    return (*(a[order] for a in arrays), zero, text)


def _weights_real(e: _Edge) -> tuple[Any, ...]:
    """The real-root path: weights ``|c_j|^N`` (all of one phase theta; then
    ``P(y) = P_|w|(exp(i theta) y)`` and the weights ``W_k`` are those of the moduli)."""
    n = e.model.states
    _, w, wl2 = scaled_weights(np.abs(np.asarray(e.couplings, dtype=complex)), n)
    w = np.ascontiguousarray(np.asarray(w, dtype=float))
    back = e.back
    found = real_roots.chain_real_roots(w, back)
    if not found.converged:
        raise ArithmeticError(f"the chain roots did not converge: {found.message}")
    values, exps = np.asarray(found.values), np.asarray(found.exponents)
    rel = np.asarray(found.error_bounds) / values
    ym, ye = _split(values)
    weights, errors = _mode_weights(w, back, ym, ye + exps, rel)
    true = dataclasses.replace(found, weight_log2=wl2)
    log_eta, log_err = true.log_quasi_energies(n)
    eta, _ = true.quasi_energies(n, beyond_float="round")
    zero = _zero_weight(w, back).real
    text = f"real chain roots ({found.method}; {found.bound_kind}), weights from the recurrence"
    return _by_frequency(eta, log_eta, log_err, weights, errors, zero, text)


@njit(cache=True, boundscheck=False, error_model="numpy")
def _top_coefficients(w, back):  # type: ignore[no-untyped-def]  # pragma: no cover - compiled
    """Degree d and top coefficient ``(-1)^d a_d`` (``mantissa * 2**exponent``) of every
    prefix ``P_k`` (index k + 1; index 0 holds ``P_{-1} = 1``).

    ``a_d`` sums the weight products of the maximum independent sets; along the recurrence
    ``P_k = P_{k-1} - y w_k P_{k-b-1}`` the top coefficient is that of ``P_{k-1}``, of
    ``w_k P_{k-b-1}``, or their sum, whichever has the larger degree (both when equal).
    """
    n = w.size
    deg = np.zeros(n + 1, dtype=np.int64)
    man = np.ones(n + 1, dtype=np.complex128)
    ex = np.zeros(n + 1, dtype=np.int64)
    for k in range(n):
        i_prev, i_old = k, k - back[k]
        d = max(deg[i_prev], deg[i_old] + 1)
        top = max(
            ex[i_prev] if deg[i_prev] == d else -(2**62),
            ex[i_old] if deg[i_old] + 1 == d else -(2**62),
        )
        total = 0j
        if deg[i_prev] == d:
            total += man[i_prev] * math.ldexp(1.0, max(ex[i_prev] - top, -1100))
        if deg[i_old] + 1 == d:
            total += w[k] * man[i_old] * math.ldexp(1.0, max(ex[i_old] - top, -1100))
        mag = abs(total)
        shift = math.frexp(mag)[1] if mag > 0 else 0
        deg[k + 1] = d
        man[k + 1] = total * math.ldexp(1.0, -shift)
        ex[k + 1] = top + shift
    return deg, man, ex


def _zero_weight(w: np.ndarray, back: np.ndarray) -> complex:
    """``w_0 = lim_{y -> oo} P_{M-1}(y) / P_M(y)``: the ratio of the top coefficients when the
    degrees agree, else 0 (computed from the weights, independently of the roots)."""
    m = w.size
    deg, man, ex = _top_coefficients(
        np.ascontiguousarray(w, dtype=np.complex128), np.ascontiguousarray(back, dtype=np.int64)
    )
    if man[m] == 0:  # e.g. couplings (1, 1j): the top coefficient cancels, a quasi-energy is 0
        raise ValueError(
            "the exclusion polynomial's top coefficient cancels (a quasi-energy is exactly 0): "
            "the edge expansion divides by it and does not apply"
        )
    if deg[m - 1] != deg[m]:
        return 0.0
    return complex(man[m - 1] / man[m] * 2.0 ** max(int(ex[m - 1] - ex[m]), -1100))


def _weights_complex(e: _Edge) -> tuple[Any, ...]:
    n = e.model.states
    c = np.asarray(e.couplings, dtype=complex)
    w = c**n
    back = e.back
    found = solve_chain(c, back, n)
    values, bounds = found.true_values()
    x = np.asarray(values, dtype=complex) if found.variable == "x" else 1.0 / values
    rel = np.asarray(bounds) / np.abs(values)
    ym, ye = _split(1.0 / x)
    weights, errors = _mode_weights(w, back, ym, ye, rel)
    eta = np.power(x, 1.0 / n)
    log_eta = np.log(np.abs(x)) / n
    log_err = rel / n
    zero = _zero_weight(w, back)
    text = f"complex chain roots ({found.method}; {found.bound_kind}), weights from the recurrence"
    return _by_frequency(eta, log_eta, log_err, weights, errors, zero, text)


def edge_expansion(m: Model, operator: str | WeylString | None = None) -> EdgeExpansion:
    """The edge operator in the hidden modes: weights ``W_k`` and frequencies, from P alone.

    Parameters
    ----------
    m : Model
        Numeric couplings; the component of the edge term must be an exclusion chain or an
        (oriented) indifference order with independent strings (no relations).
    operator : str or WeylString, optional
        ``chi``; by default :func:`freeladder.edge_mode`.  It must fail to commute with exactly
        one term, an end of its component's order.

    Returns
    -------
    EdgeExpansion

    Raises
    ------
    NotExpandableError
        When the operator or the model is outside what the formula covers (the message says
        why).
    ArithmeticError
        When the roots did not converge.

    Notes
    -----
    ``W_k = -P_a(y_k) / (y_k P'(y_k))`` with ``P_a`` the polynomial without the edge term
    (module docstring).  The zero weight is ``1 - sum W_k`` when ``P_a`` and ``P`` have the same
    degree (an exact zero mode; Majorana chains with an odd number of Majoranas), else 0.

    References
    ----------
    P. Fendley, J. Phys. A 52, 335002 (2019); P. Fendley, J. Phys. A 47, 075001 (2014).

    Examples
    --------
    >>> import freeladder as fl
    >>> e = fl.edge_expansion(fl.parse_model("0.5 X0 + Z0 Z1"))   # chi = Z0, exact zero mode
    >>> round(float(e.zero_weight), 12), [round(float(w), 12) for w in e.weights]
    (0.8, [0.2])
    """
    e = _Edge(m, operator)
    n = m.states
    real = n == 2 and not np.iscomplexobj(e.couplings)
    theta = 0.0 if real else _common_phase(e.couplings, n)
    eta, log_eta, log_err, weights, errors, zero, method = (
        _weights_complex(e) if theta is None else _weights_real(e)
    )
    if not real and theta is not None:  # one phase: eta^N = exp(i theta) / y of the moduli
        eta = np.asarray(eta, dtype=float) * np.exp(1j * theta / n)
        weights = np.asarray(weights, dtype=complex)
        method += f"; every weight c^N has the phase {theta:.6g} rad, taken out exactly"
    zero = float(np.real(zero)) if real else complex(zero)
    omega = np.exp(2j * np.pi * np.arange(n) / n)
    lead = 1 - np.exp(2j * np.pi * e.exponent / n)
    if real:
        freqs = 2.0 * np.asarray(eta, dtype=float)[:, None] * np.array([1.0, -1.0])[None, :]
    else:
        freqs = lead * omega[None, :] * np.asarray(eta, dtype=complex)[:, None]
    rules = _sum_rules_simple(e, weights, eta, log_eta, zero, n, real)
    coupling = complex(e.couplings[-1])
    balls = _auto_balls(e, eta, weights, errors)
    return EdgeExpansion(
        operator=str(e.chi),
        term=int(e.term),
        exponent=int(e.exponent),
        coupling=coupling.real if real else coupling,
        states=n,
        quasi_energies=eta,
        log_quasi_energies=log_eta,
        weights=weights,
        weight_errors=errors,
        log_errors=log_err,
        zero_weight=zero,
        frequencies=freqs,
        sum_rules=rules,
        method=method,
        weight_balls=balls,
    )


def _float_roots(eta: np.ndarray, n: int) -> np.ndarray:
    """``y_k = eta_k^-N`` of the float expansion."""
    z = np.asarray(eta, dtype=complex)
    with np.errstate(over="ignore", divide="ignore"):
        return np.exp(-n * (np.log(np.abs(z)) + 1j * np.angle(z)))


def _auto_balls(
    e: _Edge, eta: np.ndarray, weights: np.ndarray, errors: np.ndarray
) -> WeightBalls | None:
    """The certified weights when the couplings are exact and the polynomial small, compared
    with the float weights; None otherwise."""
    if e.terms.size > 4 * _balls.AUTO_DEGREE:
        return None
    exact = _balls.exact_chain_weights([e.model.couplings[j] for j in e.terms], e.model.states)
    if exact is None:
        return None
    try:
        b = _balls.weight_balls(exact, e.back, max_degree=_balls.AUTO_DEGREE)
    except ValueError:
        return None  # too large, or a repeated root: the float weights stand alone
    agree = _balls.compare_weights(b, _float_roots(eta, e.model.states), weights, errors)
    return dataclasses.replace(b, agreement=agree)


def certified_edge_weights(
    m: Model,
    operator: str | WeylString | None = None,
    *,
    max_degree: int = 160,
    floats: bool = False,
) -> WeightBalls:
    """The edge weights ``W_k`` in proved balls, for exact couplings (int, Fraction, sympy
    rationals or Gaussian rationals).

    Parameters
    ----------
    m : Model
        As for :func:`edge_expansion`, with exact couplings on the edge term's component.
    operator : str or WeylString, optional
        ``chi``; by default :func:`freeladder.edge_mode`.
    max_degree : int
        Largest degree of the exclusion polynomial (the root isolation grows like the cube
        of the degree: about a second at degree 60 with small rationals).
    floats : bool
        Take float and complex couplings as the binary fractions they are (the model's
        couplings exactly as stored; a model keeps complex couplings as floats).  The balls
        then hold the weights of those binary fractions, not of the decimals typed.

    Returns
    -------
    WeightBalls
        Balls proved to hold ``W_k = -P_a(y_k) / (y_k P'(y_k))``, the exact ``w_0``, and
        whether the ball of ``w_0 + sum W_k`` holds 1; ``agreement`` compares the float
        weights of :func:`edge_expansion` with the balls.

    Raises
    ------
    NotExpandableError
        As :func:`edge_expansion`.
    ValueError
        A coupling that is not exact, a polynomial above ``max_degree``, or a repeated root.

    References
    ----------
    P. Fendley, J. Phys. A 52, 335002 (2019); F. Johansson, IEEE Trans. Comput. 66, 1281
    (2017).

    Examples
    --------
    >>> import freeladder as fl
    >>> from fractions import Fraction
    >>> b = fl.certified_edge_weights(fl.parse_model("1/2 X0 + Z0 Z1"))  # chi = Z0
    >>> b.zero_weight, b.sum_is_one
    (Fraction(4, 5), True)
    """
    e = _Edge(m, operator)
    exact = _balls.exact_chain_weights([m.couplings[j] for j in e.terms], m.states, floats)
    if exact is None:
        raise ValueError(
            "certified weights need exact couplings (int, Fraction, sympy rationals or "
            "Gaussian rationals) on the edge term's component, or floats=True to take float "
            "couplings as the binary fractions they are; this model has a float or an "
            "algebraic one"
        )
    b = _balls.weight_balls(exact, e.back, max_degree=max_degree)
    x = edge_expansion(m, e.chi)
    agree = _balls.compare_weights(
        b, _float_roots(x.quasi_energies, m.states), x.weights, x.weight_errors
    )
    return dataclasses.replace(b, agreement=agree)


def _sum_rules_simple(
    e: _Edge,
    weights: np.ndarray,
    eta: np.ndarray,
    log_eta: np.ndarray,
    zero: Any,
    n: int,
    real: bool,
) -> dict[str, float]:
    """Residuals of the three identities, relative to the size of their terms."""
    ca = complex(e.couplings[-1]) ** n
    near = np.asarray(e.couplings[-1 - int(e.back[-1]) : -1], dtype=complex)
    cb = complex(np.sum(near**n))
    with np.errstate(under="ignore", over="ignore"):
        if real:
            xk = np.exp(n * np.asarray(log_eta, dtype=float))
        else:
            xk = np.asarray(eta, dtype=complex) ** n
    w = np.asarray(weights)
    checks = [
        ("sum W + w0 - 1", complex(zero) + w.sum(), 1.0, abs(complex(zero)) + np.abs(w).sum()),
        ("sum W eta^N - c_a^N", (w * xk).sum(), ca, np.abs(w * xk).sum() + abs(ca)),
        (
            "sum W eta^2N - c_a^N (c_a^N + sum_b c_b^N)",
            (w * xk * xk).sum(),
            ca * (ca + cb),
            np.abs(w * xk * xk).sum() + abs(ca * (ca + cb)),
        ),
    ]
    return {
        name: float(abs(complex(got) - target) / max(float(scale), 1e-300))
        for name, got, target, scale in checks
    }


# -- time series --------------------------------------------------------------------------------
def _check_times(times: Any) -> np.ndarray:
    t = np.asarray(times, dtype=float) if not np.iscomplexobj(times) else None
    if t is None or t.ndim != 1:
        raise ValueError("times must be a 1-d array of real numbers")
    bad = np.nonzero(~np.isfinite(t))[0]
    if bad.size:
        raise ValueError(f"times[{int(bad[0])}] is {t[bad[0]]!r}: times must be finite")
    return t


def _series(
    e: EdgeExpansion, t: np.ndarray, power: int = 0, scale: complex = 1.0
) -> tuple[np.ndarray, np.ndarray]:
    """``sum_f p_f (f / scale)^power exp(i f t)`` (plus ``w_0`` for power 0) and its error.

    The error adds the weight errors and ``|t| |p_f f| dlog|eta|`` (the phase error), each
    times ``|exp(i f t)|``.  Hermitian models: ``+-f`` carry equal weights, so the sum is real
    (cosines) for even powers and imaginary (sines) for odd ones.
    """
    n = e.states
    f = e.frequencies
    p = e.spectral_weights
    dp = np.repeat(e.weight_errors[:, None] / n, n, axis=1)
    df = np.abs(f) * np.repeat(e.log_errors[:, None], n, axis=1)
    factor = (f / scale) ** power if power else np.ones(f.shape)
    coef, dcoef = (p * factor).ravel(), (dp * np.abs(factor)).ravel()
    ff, phase_err = f.ravel(), (np.abs(p * factor) * df).ravel()
    herm = e.hermitian
    if herm:  # +-f carry equal weights (odd powers: and odd factors): one term per mode, twice
        coef, dcoef = 2.0 * coef[0::2], 2.0 * dcoef[0::2]
        ff, phase_err = ff[0::2], 2.0 * phase_err[0::2]
    values = np.zeros(t.size, dtype=float if herm and power % 2 == 0 else complex)
    errors = np.zeros(t.size)
    rows = max(1, _CHUNK // max(ff.size, 1))
    with np.errstate(over="ignore", invalid="ignore"):
        for a in range(0, t.size, rows):
            tt = t[a : a + rows]
            if herm:
                arg = np.outer(tt, ff.real)
                if power % 2 == 0:
                    values[a : a + rows] = np.cos(arg) @ coef.real
                else:
                    values[a : a + rows] = 1j * (np.sin(arg) @ coef.real)
                errors[a : a + rows] = dcoef.sum() + np.abs(tt) * phase_err.sum()
            else:
                ph = np.exp(1j * np.outer(tt, ff))
                mag = np.abs(ph)
                values[a : a + rows] = ph @ coef
                errors[a : a + rows] = mag @ dcoef + np.abs(tt) * (mag @ phase_err)
    if power == 0:
        values = values + (float(np.real(e.zero_weight)) if herm else e.zero_weight)
    return values, errors


def autocorrelation(
    m: Model, times: Sequence[float] | np.ndarray, operator: str | WeylString | None = None
) -> Autocorrelation:
    """Infinite-temperature autocorrelation ``Tr[chi^dagger chi(t)] / dim`` as a sum over modes.

    Parameters
    ----------
    m : Model
        A free model whose edge term's component is a chain or an indifference order (see
        :func:`edge_expansion`).
    times : array_like of float
    operator : str or WeylString, optional
        ``chi``; by default the model's edge mode (:func:`freeladder.edge_mode`).

    Returns
    -------
    Autocorrelation
        ``.values`` at ``.times``, ``.plateau`` (the zero-mode weight), the spectral weights at
        the mode frequencies, and ``growth_rates``: for non-Hermitian models (N > 2, complex
        couplings) the frequencies are complex and terms grow or decay exponentially; they are
        summed as they are, never dropped.

    Raises
    ------
    NotExpandableError
        See :func:`edge_expansion`.

    References
    ----------
    P. Fendley, J. Phys. A 52, 335002 (2019); J. Kemp, N. Y. Yao, C. R. Laumann and
    P. Fendley, J. Stat. Mech. (2017) 063105.

    Examples
    --------
    >>> import freeladder as fl
    >>> a = fl.autocorrelation(fl.ising_chain(6, field=0.5), [0.0, 10.0])
    >>> a.operator, round(float(a.values[0]), 12)
    ('Z0', 1.0)
    """
    t = _check_times(times)
    e = edge_expansion(m, operator)
    values, errors = _series(e, t)
    rates = -np.imag(e.frequencies) if not e.hermitian else np.zeros(e.frequencies.shape)
    return Autocorrelation(
        operator=e.operator,
        times=t,
        values=values,
        errors=errors,
        plateau=e.zero_weight,
        expansion=e,
        growth_rates=rates,
    )


def two_point(
    m: Model,
    a: str | WeylString,
    b: str | WeylString,
    times: Sequence[float] | np.ndarray,
) -> TwoPoint:
    """``Tr[a^dagger b(t)] / dim`` for operators in the edge family, through the modes.

    The expandable operators are (multiples of) the edge operator ``chi`` and its partner
    ``g_a chi`` (for the Ising chain with the field first: ``Z0`` and ``Y0``), where
    ``L chi = c_a (1 - omega^m) g_a chi`` (``L = [H, .]``):

    * ``Tr[chi^dagger b(t)]`` with ``b = g_a chi``: the first derivative of the autocorrelation,
      ``sum p_f f / (c_a (1 - omega^m)) exp(i f t)`` (any N);
    * ``Tr[(g_a chi)^dagger chi(t)]`` and ``Tr[(g_a chi)^dagger (g_a chi)(t)]``: for Hermitian
      models (N = 2, real couplings) ``L`` is self-adjoint for the trace inner product, so they
      are the first and second moments ``sum p_f f^k / (2 c_a)^k exp(i f t)``;
    * ``Tr[g_a^dagger g_a(t)]``, the boundary term itself, on reach-1 chains (N = 2, real
      couplings): ``g_a = i gamma_0 gamma_1`` with the Majoranas ``gamma_0 = chi`` and
      ``gamma_1 = i g_a chi``, so Wick's theorem at infinite temperature gives
      ``C_00 C_11 - C_01 C_10`` from the three above (common practice for free Majoranas).

    Parameters
    ----------
    m : Model
    a, b : str or WeylString
        Single strings with coefficients (model text such as ``"Z0"`` or ``"2 Y0"``).
    times : array_like of float

    Returns
    -------
    TwoPoint

    Raises
    ------
    NotExpandableError
        For any other operator (the message names it and what is expandable), for
        ``(g_a chi)^dagger`` or ``g_a`` on a non-Hermitian model, ``g_a`` on reach p >= 2 or
        paired with another operator, and whenever :func:`edge_expansion` refuses.

    References
    ----------
    P. Fendley, J. Phys. A 52, 335002 (2019); I. Vona, M. Mestyan and B. Pozsgay,
    arXiv:2405.20832 (2024).
    """
    t = _check_times(times)
    edge = _Edge(m, None)
    sa, ca = _as_string(m, a, "a")
    sb, cb = _as_string(m, b, "b")
    chi = edge.chi
    partner = m.strings[edge.term] * chi
    family = {0: chi, 1: partner, 2: m.strings[edge.term]}

    def locate(s: WeylString, coef: complex, name: str) -> tuple[int, complex]:
        for k, base in family.items():
            q = s * base.adjoint()
            if q.is_identity_up_to_phase:
                return k, coef * complex(np.exp(1j * np.pi * q.phase / m.states))
        raise NotExpandableError(
            f"{name} = {s} is not expandable here: two_point covers the edge operator {chi}, "
            f"its partner g_a chi = {partner.normalized()[0]} (term {edge.term} times chi) and, "
            f"on reach-1 chains, the edge term g_a = {family[2]} itself"
        )

    ka, alpha = locate(sa, ca, "a")
    kb, beta = locate(sb, cb, "b")
    e = edge_expansion(m, chi)
    cpl = complex(m.coupling_array()[edge.term])
    lead = cpl * (1 - np.exp(2j * np.pi * edge.exponent / m.states))
    if (ka == 1 or ka == 2 or kb == 2) and not e.hermitian:
        raise NotExpandableError(
            f"a = {sa}, b = {sb}: the partner g_a chi on the left, and the edge term, need a "
            "Hermitian model (N = 2, real couplings), where [H, .] is self-adjoint for the "
            "trace; this model is not"
        )
    if 2 in (ka, kb):
        if ka != kb:
            raise NotExpandableError(
                f"Tr[a^dagger b(t)] of the edge term with {sa if kb == 2 else sb} vanishes by "
                "fermion parity and is not computed; pair the edge term with itself"
            )
        if int(np.max(edge.back)) > 1:
            raise NotExpandableError(
                f"the edge term {family[2]} is a bilinear of Majoranas on reach-1 chains only "
                "(Wick's theorem at infinite temperature); on reach p >= 2 its expansion in the "
                "hidden modes is not built"
            )
        # g_a = i gamma_0 gamma_1 with gamma_0 = chi and gamma_1 = i g_a chi; Wick's theorem at
        # infinite temperature: Tr[g_a^dagger g_a(t)] / dim = C_00 C_11 - C_10 C_01
        c00, d00 = _series(e, t, 0, 1.0)
        c11, d11 = _series(e, t, 2, lead)
        c01, d01 = _series(e, t, 1, lead)  # Tr[chi^dagger B(t)] = Tr[B^dagger chi(t)] here
        values = c00 * c11 - c01 * c01
        errors = d00 * np.abs(c11) + d11 * np.abs(c00) + 2 * d01 * np.abs(c01)
        factor = complex(np.conj(alpha) * beta)
        values = values.real * factor.real if factor.imag == 0 else values * factor
        formula = (
            "C_00 C_11 - C_01 C_10 (Wick's theorem for g_a = i gamma_0 gamma_1, gamma_0 = chi, "
            "gamma_1 = i g_a chi; reach 1)"
        )
        return TwoPoint(
            left=str(sa),
            right=str(sb),
            times=t,
            values=values,
            errors=errors * abs(factor),
            formula=formula,
            expansion=e,
        )
    power = ka + kb
    # ka = 1 needs a Hermitian model, where lead = 2 c_a is real and [H, .] self-adjoint:
    # Tr[(L chi)^dagger X] = Tr[chi^dagger L X], so every case is the moment sum of order ka + kb
    values, errors = _series(e, t, power, lead if power else 1.0)
    factor = complex(np.conj(alpha) * beta)
    if np.isrealobj(values) and factor.imag == 0:
        values = values * factor.real
    else:
        values = values * factor
    formula = {
        0: "sum_f p_f exp(i f t) (the autocorrelation)",
        1: "sum_f p_f f / (c_a (1 - omega^m)) exp(i f t) (its derivative)",
        2: "sum_f p_f |f / (2 c_a)|^2 exp(i f t) (second moment, self-adjoint [H, .])",
    }[power]
    return TwoPoint(
        left=str(sa),
        right=str(sb),
        times=t,
        values=values,
        errors=errors * abs(factor),
        formula=formula,
        expansion=e,
    )
