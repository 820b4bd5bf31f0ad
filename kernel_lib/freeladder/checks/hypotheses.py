"""The hypotheses of the free-spectrum theorems, re-derived from the strings for an ordering.

Given an ordering of the terms with per-position back-reach ``b_k`` (exclusion chains and
indifference orders), :func:`ordering_hypotheses` recomputes every commutation exponent from
the strings' exponent matrices and checks, exactly (integers):

* **interval neighbourhoods** -- the earlier neighbours of position k are exactly positions
  ``k - b_k .. k - 1`` (what the recurrence ``P_k = P_{k-1} - y w_k P_{k-b_k-1}`` needs);
* **monotone first neighbours** -- ``k - b_k`` never decreases.  With the previous point the
  ordering is an indifference (proper interval) ordering, so the frustration graph is
  claw-free, chordal (hence even-hole-free) and its first vertex is simplicial;
* **orientation** (N > 2) -- every earlier neighbour q of k has ``g_q g_k = omega^e g_k g_q``
  with one common ``e = +-1``;
* **independent strings** -- no product of terms is a multiple of the identity: each term has
  an exponent coordinate, a unit modulo N, that no earlier term uses (or, reading the order
  backwards, no later term): a triangular system, so the exponent vectors are independent.

Cost O(nnz) with sparse products: bounded for chains of any length.

References
----------
S. J. Elman, A. Chapman and S. T. Flammia, Commun. Math. Phys. 388, 969 (2021) (claw-free,
even-hole-free, simplicial clique); F. C. Alcaraz and R. A. Pimenta, Phys. Rev. B 102,
121101(R) (2020) (oriented chains, any N); F. S. Roberts, in Proof Techniques in Graph Theory
(Academic Press, 1969) (indifference graphs are the claw-free interval graphs; from memory).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import scipy.sparse as sps

from ..algebra.model import Model
from ..graphs.relations import find_relations

__all__ = ["HypothesesResult", "independent_along", "ordering_hypotheses"]


@dataclass(frozen=True)
class HypothesesResult:
    """What :func:`ordering_hypotheses` found.

    Attributes
    ----------
    holds : bool
        Every hypothesis holds.
    violations : int
        Number of positions (or terms) that break one.
    detail : str
        What was checked, and the first violation.
    """

    holds: bool
    violations: int
    detail: str


def _exponents(m: Model) -> sps.csr_array:
    """``e_ab`` (mod N, non-zero entries only) with ``g_a g_b = omega^e_ab g_b g_a``."""
    n = m.states
    x = sps.csr_array(m.strings.x, dtype=np.int64)
    z = sps.csr_array(m.strings.z, dtype=np.int64)
    e = sps.csr_array(z @ x.T - x @ z.T).tocoo()
    vals = np.mod(e.data, n)
    keep = vals != 0
    return sps.csr_array((vals[keep], (e.row[keep], e.col[keep])), shape=e.shape)


def _triangular(x: sps.csr_array, z: sps.csr_array, order: np.ndarray, n: int) -> bool:
    """Each string has a coordinate (unit mod N) unused by the strings before it in ``order``."""
    mat = sps.hstack([x, z]).tocsr().astype(np.int64)[order].tocoo()
    units = np.gcd(np.mod(mat.data, n), n) == 1
    rows, cols = mat.row, mat.col
    first = np.full(mat.shape[1], mat.shape[0], dtype=np.int64)
    np.minimum.at(first, cols, rows)  # the first row using each coordinate (any value)
    private = units & (first[cols] == rows)
    has = np.zeros(mat.shape[0], dtype=bool)
    has[rows[private]] = True
    return bool(has.all())


def independent_along(m: Model, order: np.ndarray) -> bool:
    """True when the strings' exponent vectors are triangular along ``order`` or its reverse
    (then no product of terms is a multiple of the identity); False when not established."""
    x = sps.csr_array(m.strings.x, dtype=np.int64)
    z = sps.csr_array(m.strings.z, dtype=np.int64)
    order = np.asarray(order, dtype=np.int64)
    n = m.states
    return _triangular(x, z, order, n) or _triangular(x, z, order[::-1].copy(), n)


def ordering_hypotheses(m: Model, order: np.ndarray, back: np.ndarray) -> HypothesesResult:
    """Check that ``order`` with back-reach ``back`` satisfies the theorems' hypotheses.

    Parameters
    ----------
    m : Model
    order : numpy.ndarray of int
        Every term index once.
    back : numpy.ndarray of int
        Per-position back-reach (``back[k] <= k``).

    Returns
    -------
    HypothesesResult
    """
    n_terms, n = len(m), m.states
    order = np.asarray(order, dtype=np.int64)
    back = np.asarray(back, dtype=np.int64)
    if sorted(order.tolist()) != list(range(n_terms)) or back.shape != order.shape:
        return HypothesesResult(False, n_terms, "the ordering does not list every term once")
    pos = np.empty(n_terms, dtype=np.int64)
    pos[order] = np.arange(n_terms)
    first = np.arange(n_terms) - back
    e = _exponents(m).tocoo()
    p, q = pos[e.row], pos[e.col]  # the pair (row, col) at positions (p, q)
    earlier = q < p
    pe, qe, ve = p[earlier], q[earlier], e.data[earlier]
    problems: list[str] = []
    outside = pe[qe < first[pe]]
    counts = np.bincount(pe, minlength=n_terms)
    wrong_count = np.nonzero(counts != back)[0]
    bad_pos = np.union1d(outside, wrong_count)
    if bad_pos.size:
        k = int(bad_pos[0])
        problems.append(
            f"{bad_pos.size} position(s) whose earlier neighbours are not the block "
            f"k - b_k .. k - 1, first at position {k} (term {int(order[k])})"
        )
    dips = np.nonzero(np.diff(first) < 0)[0] + 1 if n_terms > 1 else np.zeros(0, dtype=np.int64)
    if dips.size:
        problems.append(
            f"the first neighbour decreases at {dips.size} position(s), first at {int(dips[0])}"
        )
    if back.size and (np.any(back < 0) or np.any(first < 0)):
        problems.append("a back-reach is negative or reaches before the start")
    orient = ""
    if n > 2 and ve.size:
        # g_q g_k = omega^e g_k g_q for q earlier: e is the entry at (order[q], order[k])
        exps = np.mod(-ve, n)
        values = set(np.unique(exps).tolist())
        if len(values) != 1 or values.pop() not in (1, n - 1):
            problems.append(f"the exponents of earlier neighbours are {sorted(set(exps))}")
        else:
            orient = f"; one orientation, omega^{int(exps[0])}"
    how = "triangular exponent vectors"
    if not independent_along(m, order):
        # the triangular order is a quick sufficient test; without it, exact elimination decides
        how = "exact elimination over GF(N): no product of terms is a multiple of the identity"
        if len(find_relations(m)):
            problems.append("the strings are not independent (a product of terms is a phase)")
    checked = (
        f"{n_terms} terms, {int(earlier.sum())} non-commuting pairs recomputed from the "
        f"strings: interval neighbourhoods, monotone first neighbours{orient}, independent "
        f"strings ({how})"
    )
    if problems:
        violations = int(bad_pos.size + dips.size) or 1
        return HypothesesResult(False, violations, checked + "; " + "; ".join(problems))
    theorem = (
        "so the frustration graph is an indifference graph: claw-free, even-hole-free, "
        "simplicial first clique"
        if n == 2
        else "an oriented exclusion order"
    )
    return HypothesesResult(True, 0, f"{checked}; {theorem}")
