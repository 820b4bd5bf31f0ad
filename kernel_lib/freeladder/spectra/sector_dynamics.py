"""Real-time correlations of Majorana bilinears in the sectors of a Jordan-Wigner model.

In a sector of a Jordan-Wigner model (:mod:`freeladder.spectra.majorana`: fixed values of the
cycle and parity strings) every term is a Majorana bilinear, ``g_j = u_j i gamma_a gamma_b``,
and ``H = (i/2) sum_ab h_ab gamma_a gamma_b`` with ``h_ab = c_j u_j = -h_ba``.  From
``[gamma_a gamma_b, gamma_c] = 2 delta_bc gamma_a - 2 delta_ac gamma_b`` the Heisenberg
equation ``d gamma_c / dt = i [H, gamma_c] = 2 sum_d h_cd gamma_d`` is linear, so

    gamma(t) = exp(iHt) gamma exp(-iHt) = R(t) gamma,     R(t) = exp(2 h t)

(real orthogonal for real couplings; complex orthogonal, ``R R^T = 1``, for complex ones, where
the same equation holds for the non-unitary ``exp(iHt)``).  A string ``O`` that equals
``zeta i gamma_p gamma_q`` in the sector (a term, or any product of terms along a path of the
root graph, times conserved strings) therefore evolves into a bilinear again, and

    Tr_S[a^dagger b(t)] / dim_S
        = -conj(zeta_a) zeta_b sum_cd R_rc(t) R_sd(t) tau(gamma_p gamma_q gamma_c gamma_d)

for ``a = zeta_a i gamma_p gamma_q`` and ``b = zeta_b i gamma_r gamma_s``.  Here ``tau`` is the
normalised trace over the sector.  The terms restricted to a sector generate a tensor product
of simple algebras, one per component of the root graph (the even Clifford algebra, with the
Majorana parity ``Gamma`` a fixed scalar when the component has an even number V of modes),
so ``tau`` is that algebra's unique normalised trace: it factorises over components, and on a
component it is 1 on the empty monomial, the fixed value of ``Gamma`` on the monomial of all V
modes, and 0 on every other monomial.  For V > 4 only Wick's pairings survive and

    Tr_S[a^dagger b(t)] / dim_S = conj(zeta_a) zeta_b (R_rp R_sq - R_rq R_sp);

components with V = 2 or 4 add the terms in which the four modes fill the component (the
fixed parity; there Wick's theorem alone would be wrong).  The full trace of an operator made
of terms is the average over every consistent sector (all have the same dimension).

Where it stops.  A string that is not a bilinear in the sector -- a single Majorana, a product
of four or more, a bilinear across two components, or a bilinear times a string that commutes
with every term but is not a product of the cycle and parity strings (so its value is not
fixed by the sector) -- is refused with that reason: its evolution is not a linear map of the
modes, or its trace is not fixed by the label.

Evaluation.  For real couplings ``i h`` is Hermitian; one ``eigh`` per sector's component
gives ``R(t) = U exp(-2 i Lambda t) U^dagger`` at every time.  For complex couplings
``scipy.linalg.expm(2 h t)`` is evaluated at each time.  Error estimate per value:
``2 |zeta_a zeta_b| sum |tau| delta(t) max|R|^2`` with
``delta(t) = 4 V eps (1 + 2 |t| sum_j |c_j|)`` (backward stability of the eigensolver, the
phase error growing linearly in t); an estimate, not a proof.

References
----------
E. Lieb, T. Schultz and D. Mattis, Ann. Phys. 16, 407 (1961) (free fermions from spins, the
linear evolution of the Majorana modes); A. Kitaev, Ann. Phys. 321, 2 (2006) (Majorana modes
and conserved plaquettes); A. Chapman and S. T. Flammia, Quantum 4, 278 (2020),
arXiv:2003.05465 (every term a Majorana bilinear when the frustration graph is a line graph).
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from dataclasses import dataclass
from typing import TYPE_CHECKING, Any

import numpy as np

from ..algebra.model import Model
from ..algebra.strings import WeylString
from ..base.errors import NotExpandableError
from ..base.frozen import ArrayRecord
from . import majorana as mj
from .dynamics import _as_string, _check_times

if TYPE_CHECKING:
    import networkx as nx
else:
    from ..base.lazy import networkx as nx

__all__ = ["SectorCorrelation", "sector_autocorrelation", "sector_two_point"]

_EPS = float(np.finfo(np.float64).eps)


@dataclass(frozen=True)
class SectorCorrelation(ArrayRecord):
    """``Tr_S[a^dagger b(t)] / dim_S`` over Jordan-Wigner sectors (result of
    :func:`sector_two_point` and :func:`sector_autocorrelation`).

    Attributes
    ----------
    left, right : str
        ``a`` and ``b`` as model text.
    times, values, errors : numpy.ndarray
        ``values`` are real for real couplings and Hermitian ``a``, ``b``; ``errors`` are
        estimates of the absolute error (module docstring), not proofs.
    labels : tuple of tuple of int
        The sector labels traced over (cycle values, then parity values); the values are the
        average over them, which is the normalised trace over their direct sum.
    dimension : int
        Dimension of the space traced over (``len(labels) * 2^(L - rank)``).
    majoranas : tuple of tuple of int
        The Majorana pairs ``(p, q)`` of ``a`` and ``(r, s)`` of ``b`` (global mode numbers of
        :attr:`SectorStructure.pairs`).
    formula : str
        How the values were obtained.
    """

    left: str
    right: str
    times: np.ndarray
    values: np.ndarray
    errors: np.ndarray
    labels: tuple[tuple[int, ...], ...]
    dimension: int
    majoranas: tuple[tuple[int, int], tuple[int, int]]
    formula: str

    ARRAYS = ("times", "values", "errors")

    def __repr__(self) -> str:
        worst = f"{float(np.max(self.errors)):.2g}" if self.errors.size else "0"
        return (
            f"SectorCorrelation(Tr_S[({self.left})^dagger ({self.right})(t)] / dim_S over "
            f"{len(self.labels)} sector(s) of dimension {self.dimension}, {self.times.size} "
            f"times, largest error {worst})"
        )


# -- the operator as a bilinear -----------------------------------------------------------------
@dataclass(frozen=True)
class _Bilinear:
    """``O = coef i^e C G`` with ``G = lam^-1 prod(path terms)`` and ``C`` conserved."""

    text: str
    modes: tuple[int, int]  # (lo, hi): G = (prod u) mu / lam * gamma_lo gamma_hi in a sector
    path_terms: tuple[int, ...]
    base: complex  # coef * i^e * mu / (lam * i): times prod u and the value of C gives zeta
    members: tuple[int, ...]  # generators whose product is zeta_c * C
    zeta_c: int


def _structure(m: Model) -> mj.SectorStructure:
    if not isinstance(m, Model):
        raise TypeError(f"expected a freeladder Model, got {type(m).__name__}")
    try:
        return mj.sectors(m)
    except ValueError as err:
        raise NotExpandableError(
            f"sector dynamics needs the Jordan-Wigner route: {err}; for chains with a hidden "
            "free spectrum use fl.autocorrelation / fl.two_point"
        ) from None


def _bilinear(m: Model, struct: mj.SectorStructure, op: str | WeylString, what: str) -> _Bilinear:
    s, coef = _as_string(m, op, what)
    text = f"{_coef_text(coef)}{s}"
    hits = [j for j, g in enumerate(m.strings) if s.commutation_exponent(g)]
    root = nx.Graph()
    incident: dict[int, set[int]] = {}
    for t, (a, b) in struct.pairs.items():
        root.add_edge(a, b, term=t)
        incident.setdefault(a, set()).add(t)
        incident.setdefault(b, set()).add(t)
    hit = set(hits)
    cands = sorted(v for v, inc in incident.items() if len(inc - hit) <= 1)
    pairs = [
        (p, q)
        for i, p in enumerate(cands)
        for q in cands[i + 1 :]
        if incident[p] ^ incident[q] == hit
    ]
    gens = struct.generators
    col = {site: j for j, site in enumerate(struct.site_labels)}
    basis = mj._gf2_basis(gens, col)
    why = ""
    for p, q in pairs:
        if not nx.has_path(root, p, q):
            why = (
                f"its modes {p} and {q} lie in different components of the root graph, so it "
                "is no product of terms"
            )
            continue
        path = nx.shortest_path(root, p, q)
        terms = tuple(root.edges[x, y]["term"] for x, y in zip(path, path[1:], strict=False))
        g, lam = mj._ordered_product([m.strings[t] for t in terms])
        mu, modes = mj._majorana_phase([struct.pairs[t] for t in terms])
        if modes != sorted((p, q)):
            raise AssertionError("a path of terms did not multiply to its end modes")
        c, e = (s * g).normalized()
        try:
            members, zeta_c = mj._express(c, gens, col, basis)
        except ValueError:
            why = (
                f"it is {c} times the bilinear i gamma_{p} gamma_{q}, and {c} commutes with "
                "every term but is not a product of the cycle and parity strings, so the "
                "sector does not fix its value"
            )
            continue
        base = coef * 1j**e * mu / (lam * 1j)
        return _Bilinear(text, (p, q), terms, complex(base), members, zeta_c)
    if not why and not hits:
        why = (
            "it commutes with every term (it is conserved, constant in time) and is not the "
            "term of a component with two modes"
        )
    if not why:
        why = (
            f"it fails to commute with the terms {hits}, which is not the pattern of any "
            "Majorana bilinear i gamma_p gamma_q (a single Majorana, or a product of four or "
            "more, evolves non-linearly in the bilinears and is not covered)"
        )
    raise NotExpandableError(f"{what} = {text} is not a Majorana bilinear in the sectors: {why}")


def _coef_text(coef: complex) -> str:
    if coef == 1:
        return ""
    if coef.imag == 0:
        return f"{coef.real:g} "
    return f"({coef.real:g}{coef.imag:+g}j) "


def _zeta(op: _Bilinear, signs: np.ndarray, label: tuple[int, ...]) -> complex:
    """``zeta`` with ``O = zeta i gamma_lo gamma_hi`` in the sector ``label``."""
    value = op.zeta_c
    for k in op.members:
        value *= label[k]
    return op.base * float(np.prod(signs[list(op.path_terms)])) * value


# -- the trace of a monomial in a sector --------------------------------------------------------
def _tau(
    struct: mj.SectorStructure,
    comp_of: dict[int, int],
    label: tuple[int, ...],
    word: Sequence[int],
) -> complex:
    """Normalised trace over the sector of ``gamma_word[0] gamma_word[1] ...`` (one component)."""
    phase, modes = mj._monomial_product((1 + 0j, []), word)
    if not modes:
        return phase
    comp = struct._components[comp_of[modes[0]]]
    if comp.parity is None or tuple(modes) != comp.modes:
        return 0j
    n_cycles = len(struct.cycle_operators)
    kappa = label[n_cycles + comp.parity] * struct._parity_phase[comp.parity]
    return complex(phase * kappa)


def _pairing(
    struct: mj.SectorStructure,
    comp_of: dict[int, int],
    label: tuple[int, ...],
    left: tuple[int, int],
    right_comp: int,
) -> dict[tuple[int, int], complex]:
    """``K_cd = tau(gamma_p gamma_q gamma_c gamma_d)`` for c != d in the right operator's
    component (the only modes ``R_r.`` reaches); only non-zero entries."""
    p, q = left
    modes = struct._components[right_comp].modes
    same = comp_of[p] == right_comp
    if same and len(modes) > 4:  # only Wick's pairings: tau(g_p g_q g_p g_q) = -1, ... = +1
        return {(p, q): -1 + 0j, (q, p): 1 + 0j}
    if not same and (len(modes) > 2 or len(struct._components[comp_of[p]].modes) > 2):
        return {}
    out = {}
    for c in modes:
        for d in modes:
            if c == d:
                continue  # sum_c R_rc R_sc = (R R^T)_rs = 0 for r != s
            if same:
                value = _tau(struct, comp_of, label, (p, q, c, d))
            else:
                value = _tau(struct, comp_of, label, (p, q)) * _tau(struct, comp_of, label, (c, d))
            if value != 0:
                out[(c, d)] = value
    return out


# -- evolution of the modes ---------------------------------------------------------------------
def _block(
    struct: mj.SectorStructure, couplings: np.ndarray, signs: np.ndarray, comp: int
) -> tuple[np.ndarray, tuple[int, ...], float]:
    """``h`` on one component, its modes, and ``sum_j |c_j|`` over its terms."""
    component = struct._components[comp]
    index = {v: i for i, v in enumerate(component.modes)}
    h = np.zeros((len(index), len(index)), dtype=couplings.dtype)
    for t in component.terms:
        a, b = struct.pairs[t]
        h[index[a], index[b]] += couplings[t] * signs[t]
        h[index[b], index[a]] -= couplings[t] * signs[t]
    norm = float(np.abs(couplings[list(component.terms)]).sum()) if component.terms else 0.0
    return h, component.modes, norm


def _rows(
    h: np.ndarray,
    modes: tuple[int, ...],
    rows: Sequence[int],
    cols: Sequence[int],
    t: np.ndarray,
    eig: tuple[np.ndarray, np.ndarray] | None,
) -> np.ndarray:
    """``R_rc(t)`` for r in rows, c in cols: shape (len(rows), len(cols), len(t)).

    ``eig``: ``(Lambda, U)`` with ``i h = U Lambda U^dagger`` (real couplings), else None.
    """
    index = {v: i for i, v in enumerate(modes)}
    ri, ci = [index[r] for r in rows], [index[c] for c in cols]
    if eig is not None:
        lam, u = eig  # h = -i U Lambda U^dagger, R = U exp(-2 i Lambda t) U^dagger
        phases = np.exp(-2j * np.outer(t, lam))  # (T, V)
        out = np.einsum("tk,rk,ck->rct", phases, u[ri, :], np.conj(u[ci, :]))
        return np.real(out)
    import scipy.linalg  # on use: scipy.linalg is slow to import

    out = np.empty((len(ri), len(ci), t.size), dtype=complex)
    for k, tk in enumerate(t):
        r = scipy.linalg.expm(2.0 * tk * h)
        out[:, :, k] = r[np.ix_(ri, ci)]
    return out


def _signs(struct: mj.SectorStructure, n_terms: int, cycle_values: tuple[int, ...]) -> np.ndarray:
    """``u_j``: +1 on the spanning forest, the closing signs the cycle values fix."""
    signs = np.ones(n_terms)
    for (term, ratio), w in zip(struct._closing, cycle_values, strict=True):
        u = w * ratio
        if abs(u.imag) > 1e-12 or abs(abs(u.real) - 1) > 1e-12:
            raise AssertionError("a closing sign came out not +-1")
        signs[term] = 1.0 if u.real > 0 else -1.0
    return signs


def _labels(
    struct: mj.SectorStructure, sector: str | Sequence[int] | Mapping[WeylString, int]
) -> tuple[tuple[int, ...], ...]:
    if isinstance(sector, str):
        if sector != "all":
            raise ValueError(
                f"sector must be 'all' (the full trace), a tuple of +-1 or a mapping of "
                f"conserved strings to +-1, not {sector!r}; {struct._valid_text()}"
            )
        return struct.sectors
    return struct.select(sector)


def sector_two_point(
    m: Model,
    a: str | WeylString,
    b: str | WeylString,
    times: Sequence[float] | np.ndarray,
    sector: str | Sequence[int] | Mapping[WeylString, int] = "all",
) -> SectorCorrelation:
    """``Tr_S[a^dagger b(t)] / dim_S`` for Majorana bilinears of a Jordan-Wigner model.

    Parameters
    ----------
    m : Model
        A Pauli model whose frustration graph is a line graph (verdict "jordan-wigner"), with
        or without cycles; numeric couplings, real or complex.
    a, b : str or WeylString
        Single strings with coefficients that are Majorana bilinears ``i gamma_p gamma_q`` in
        the sectors: a term, or a product of terms along a path of the root graph, possibly
        times cycle or parity strings.
    times : array_like of float
        ``b(t) = exp(iHt) b exp(-iHt)``.
    sector : "all", a sequence of +-1, or a mapping
        "all": the full trace, the average over every consistent sector (all have the same
        dimension).  Otherwise a choice as :func:`freeladder.jordan_wigner_spectrum` takes it
        (:meth:`SectorStructure.select`): the values are the normalised trace over the direct
        sum of the selected sectors.

    Returns
    -------
    SectorCorrelation

    Raises
    ------
    NotExpandableError
        For a model off the Jordan-Wigner route, or an operator that is not a bilinear in the
        sectors (the message says why: commutes with every term, the wrong commutation
        pattern, modes in two components, or a leftover symmetry the sector does not fix).
    ValueError, TypeError
        For a sector choice :meth:`SectorStructure.select` refuses, "all" with more than
        ``2^16`` sectors (give a sector instead), or bad times.

    Notes
    -----
    ``gamma(t) = exp(2 h t) gamma`` with ``H = (i/2) sum h_ab gamma_a gamma_b`` in the sector;
    the trace of four Majoranas is Wick's for components with more than four modes and
    includes the fixed Majorana parity for components of two or four (module docstring).

    References
    ----------
    E. Lieb, T. Schultz and D. Mattis, Ann. Phys. 16, 407 (1961); A. Kitaev, Ann. Phys. 321,
    2 (2006); A. Chapman and S. T. Flammia, Quantum 4, 278 (2020).

    Examples
    --------
    >>> import freeladder as fl
    >>> ring = fl.parse_model("Z0 Z1 + X1 + Z1 Z2 + X2 + Z2 Z0 + X0")   # one cycle
    >>> c = fl.sector_two_point(ring, "X1", "X1", [0.0, 1.0], sector=(1,))
    >>> round(float(c.values[0]), 12), c.majoranas
    (1.0, ((0, 2), (0, 2)))
    """
    t = _check_times(times)
    struct = _structure(m)
    left = _bilinear(m, struct, a, "a")
    right = _bilinear(m, struct, b, "b")
    labels = _labels(struct, sector)
    couplings = m.coupling_array()
    n_cycles = len(struct.cycle_operators)
    comp_of = {v: k for k, comp in enumerate(struct._components) for v in comp.modes}
    r, s = right.modes
    rcomp = comp_of[r]
    total = np.zeros(t.size, dtype=complex)
    err = np.zeros(t.size)
    cache: dict[tuple[int, ...], tuple[np.ndarray, tuple[int, ...], float, Any]] = {}
    wick_only = True
    for label in labels:
        cycles = label[:n_cycles]
        signs = _signs(struct, len(couplings), cycles)
        if cycles not in cache:  # sectors that differ in parity only share h
            h, modes, norm = _block(struct, couplings, signs, rcomp)
            eig = np.linalg.eigh(1j * h) if np.isrealobj(h) else None
            cache[cycles] = (h, modes, norm, eig)
        h, modes, norm, eig = cache[cycles]
        pairing = _pairing(struct, comp_of, label, left.modes, rcomp)
        wick_only = wick_only and len(pairing) <= 2 and comp_of[left.modes[0]] == rcomp
        if not pairing:
            continue
        cols = sorted({c for pair in pairing for c in pair})
        rr = _rows(h, modes, (r, s), cols, t, eig)
        at = {c: i for i, c in enumerate(cols)}
        acc = np.zeros(t.size, dtype=complex)
        for (c, d), k in pairing.items():
            acc += k * rr[0, at[c]] * rr[1, at[d]]
        factor = -np.conj(_zeta(left, signs, label)) * _zeta(right, signs, label)
        total += factor * acc
        delta = 4 * len(modes) * _EPS * (1 + 2 * np.abs(t) * norm)
        big = np.max(np.abs(rr), axis=(0, 1)) if rr.size else np.zeros(t.size)
        size = sum(abs(k) for k in pairing.values())
        err += 2 * abs(factor) * size * delta * np.maximum(big, 1.0) ** 2
    values = total / len(labels)
    errors = err / len(labels)
    if np.isrealobj(couplings) and np.all(np.abs(values.imag) <= errors + 1e-300):
        values = values.real
    per = 2 ** (len(struct.site_labels) - struct.rank)
    formula = (
        "conj(zeta_a) zeta_b (R_rp R_sq - R_rq R_sp), R(t) = exp(2 h t) (Wick's pairings)"
        if wick_only
        else "-conj(zeta_a) zeta_b sum_cd R_rc R_sd tau(g_p g_q g_c g_d), R(t) = exp(2 h t), "
        "tau with the fixed Majorana parity of a component of 2 or 4 modes"
    )
    how = "eigh of i h" if np.isrealobj(couplings) else "scipy.linalg.expm(2 h t) per time"
    return SectorCorrelation(
        left=left.text or "1",
        right=right.text or "1",
        times=t,
        values=values,
        errors=errors,
        labels=tuple(labels),
        dimension=per * len(labels),
        majoranas=(left.modes, right.modes),
        formula=f"{formula}; {how}; averaged over {len(labels)} sector(s)",
    )


def sector_autocorrelation(
    m: Model,
    operator: str | WeylString,
    times: Sequence[float] | np.ndarray,
    sector: str | Sequence[int] | Mapping[WeylString, int] = "all",
) -> SectorCorrelation:
    """``Tr_S[O^dagger O(t)] / dim_S`` of a Majorana bilinear (a boundary term, a term, a
    product of terms along a path) in the sectors of a Jordan-Wigner model.

    Parameters
    ----------
    m : Model
    operator : str or WeylString
        ``O``, a single string with a coefficient (see :func:`sector_two_point`).
    times : array_like of float
    sector : "all", a sequence of +-1, or a mapping
        As in :func:`sector_two_point`; "all" is the full infinite-temperature trace.

    Returns
    -------
    SectorCorrelation

    Raises
    ------
    NotExpandableError
        See :func:`sector_two_point`.

    References
    ----------
    E. Lieb, T. Schultz and D. Mattis, Ann. Phys. 16, 407 (1961); A. Chapman and S. T.
    Flammia, Quantum 4, 278 (2020).

    Examples
    --------
    >>> import freeladder as fl
    >>> ladder = fl.parse_model("Z0 Z1 + Z2 Z3 + X0 X2 + Y1 Y3")   # one plaquette
    >>> c = fl.sector_autocorrelation(ladder, "Z0 Z1", [0.0], sector=(1,))
    >>> float(c.values[0])
    1.0
    """
    return sector_two_point(m, operator, operator, times, sector)
