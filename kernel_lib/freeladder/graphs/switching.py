"""Dipath orientations of the frustration graph: when the independent-set charges commute with H.

For clock strings, ``g_a g_b = omega^{m_ab} g_b g_a`` gives each edge of the frustration graph an
exponent (``m_ba = -m_ab`` mod N).  An orientation of a graph is a *dipath orientation* when
every induced path is a directed path; it suffices that every induced path on three vertices
``a - v - b`` (a, b non-adjacent) is directed.  For clock strings "directed" means that the
exponent along the path does not change: ``m_av = m_vb`` (mod N).  *Switching* a vertex (graph
theory: reverse every arc at it) is, for strings, replacing ``g_v`` by ``g_v^{-1}``: it negates
every exponent at v.

R. L. Mann, S. J. Elman, D. R. Wood and A. Chapman, arXiv:2408.09684 (2024), state (abstract)
that a model whose frustration graph can be dipath oriented via switching is integrable, with
a family of commuting independent-set charges, and that this can be decided efficiently.  The
body of that paper could not be read while this module was written; what follows is derived
and proven here, and checked against exact sweeps and dense matrices in the tests.

Theorem (proven below).  Let ``H = sum_v c_v g_v`` and ``Q^(s) = sum_{|S| = s} prod_{v in S}
c_v g_v`` over the independent sets S of the frustration graph.  Then ``[H, Q^(s)] = 0`` for
every s as a polynomial identity in the couplings if and only if (i) the frustration graph is
claw-free and (ii) every induced path ``a - v - b`` has ``m_av = m_vb`` (mod N), that is, the
exponents as written form a dipath orientation.  For N = 2 condition (ii) always holds and
the statement is the claw-free criterion of Elman, Chapman and Flammia (2021).

Proof.  ``[H, Q^(s)] = sum_{v, S} c_v c_S [g_v, g_S]`` and ``g_S g_v = omega^{-mu} g_v g_S``
with ``mu = sum_{u in S} m_vu``, so ``[g_v, g_S] = (1 - omega^{-mu}) g_v g_S``.  The coupling
monomial ``c_v c_S`` determines the set ``U = {v} | S``; collect the pairs ``(w, T)`` with
``{w} | T = U``.  If v has no neighbour in S, mu = 0.  If v has exactly one neighbour u in S,
the only pairs are ``(v, S)`` and ``(u, S - u + v)`` (any other choice leaves u and v in T),
and with ``R = S - u`` their sum is ``g_v g_u g_R [(1 - omega^{m_uv}) + omega^{m_uv}
(1 - omega^{-m_uv})] = 0``.  If v has a set I of two or more neighbours in S, the pair
``(v, S)`` is the only one (any other T holds v and a member of I), and the unitary
``g_v g_S`` carries the factor ``1 - omega^{-sum_{u in I} m_vu}``: all charges commute with H
if and only if ``sum_{u in I} m_vu = 0`` (mod N) for every vertex v and every independent set
I of two or more of its neighbours.  For ``|I| = 2`` this is (ii).  Three pairwise
non-adjacent neighbours a, b, c of v (a claw) satisfying (ii) pairwise force ``2 m_va = 0``,
so ``m_va = m_vb = m_vc = N / 2`` and the triple sum is ``N / 2 != 0``: a claw always fails,
and in a claw-free graph every such I has exactly two members.  QED.

Switching changes the model (``g_v -> g_v^{-1}``), so it does *not* make the charges of the
model as written commute: ``Z0 + X0 + Z0 Z1`` (N = 3) has ``[H, Q^(2)] != 0``, while
``Z0 + X0 + Z0^2 Z1``, the same graph with the last term switched, has commuting charges.
:func:`dipath_switching` therefore reports both: whether the model as written satisfies the
theorem (``as_written``, what the verdict uses), and, as a graph-theoretic statement, a set of
terms whose switching would give a dipath orientation (``switchable``, ``switched``).

Deciding switchability (algorithm of this module; the paper's own algorithm was not read).
With ``x_v = 1`` for switched terms, the switched exponent is ``(-1)^{x_a + x_v} m_av``.  For an
induced path ``a - v - b`` condition (ii) after switching reads ``(-1)^{x_a} m_va +
(-1)^{x_b} m_vb = 0``: the middle vertex drops out.  So each induced path either forbids every
switching (``m_vb != +-m_va``), imposes nothing (``m_va = m_vb = N / 2``), or imposes
``x_a + x_b = 0`` or ``1`` (mod 2).  A claw forbids every switching (the proof above applies to
the switched exponents).  What is left is a system of parity constraints on pairs, solved by a
breadth-first two-colouring; a constraint that closes an odd cycle of parities is an
obstruction, and the cycle (with the middle vertex of each constraint) is its witness.  Work:
``O(sum_v deg(v)^2)`` for the induced paths plus the claw search of
:func:`freeladder.graphs.clawfree.find_claw`.

References
----------
R. L. Mann, S. J. Elman, D. R. Wood and A. Chapman, arXiv:2408.09684 (2024) (abstract: dipath
orientations via switching and commuting independent-set charges);
S. J. Elman, A. Chapman and S. T. Flammia, Commun. Math. Phys. 388, 969 (2021) (N = 2, claws);
J. A. Bondy and F. Mercier, J. Graph Theory 67, 332 (2011) (switching a vertex of a digraph).
"""

from __future__ import annotations

from collections import deque
from collections.abc import Sequence
from dataclasses import dataclass
from typing import Any, Literal

import scipy.sparse as sps

from ..algebra.model import Model
from ..base.cache import part
from ..base.jsonready import json_ready
from .clawfree import find_claw
from .graph import EXPONENTS

__all__ = ["DipathSwitching", "ObstructionKind", "dipath_from_exponents", "dipath_switching"]

ObstructionKind = Literal["", "claw", "exponents", "odd cycle", "as written"]
"""What blocks: nothing; a claw; an induced path whose exponents differ beyond a sign; an odd
cycle of switching parities; or (switchable, but not as written) an induced path that is not
directed in the model as written."""


@dataclass(frozen=True)
class DipathSwitching:
    """Whether the frustration graph is (or can be switched to) a dipath orientation.

    Attributes
    ----------
    states : int
        N.
    as_written : bool
        The exponents of the model as written form a dipath orientation of a claw-free graph:
        every charge ``Q^(s)`` commutes with H (theorem in :mod:`freeladder.graphs.switching`).
    switchable : bool
        Some set of switched terms gives a dipath orientation (True whenever ``as_written``).
    switched : tuple of int
        Such a set, as small as the algorithm finds it (each parity class keeps its smaller
        side); empty when ``as_written``, and when not ``switchable``.
    obstruction : tuple of int
        Terms of a small subgraph that blocks: a claw ``(centre, leaf, leaf, leaf)``; an induced
        path ``(centre, a, b)``; an odd parity cycle (each constraint's two ends with its
        middle term between them).  For ``"as written"``, the induced path ``(centre, a, b)``
        that is not directed.  Empty when ``as_written``.
    kind : str
        One of :data:`ObstructionKind`.
    arcs : tuple of (int, int, int)
        The orientation after switching ``switched`` (when ``switchable``; else as written):
        ``(a, b, m)`` with ``g'_a g'_b = omega^m g'_b g'_a`` for the switched strings ``g'``,
        oriented ``a -> b`` when ``0 < 2 m < N``; an edge with ``2 m = N`` (N even) has no
        direction and is listed with ``a < b``.
    """

    states: int
    as_written: bool
    switchable: bool
    switched: tuple[int, ...]
    obstruction: tuple[int, ...]
    kind: ObstructionKind
    arcs: tuple[tuple[int, int, int], ...]

    def __str__(self) -> str:
        if self.as_written:
            head = "dipath orientation as written: every Q^(s) commutes with H"
        elif self.switchable:
            head = (
                f"not a dipath orientation as written (induced path {_path(self.obstruction)}); "
                f"switching terms {list(self.switched)} would give one"
            )
        else:
            blocks = f"{self.kind}: {list(self.obstruction)}"
            head = f"no switching gives a dipath orientation ({blocks})"
        return f"DipathSwitching(N={self.states}: {head})"

    def to_dict(self) -> dict[str, Any]:
        """JSON-ready fields."""
        return json_ready(
            {
                "states": self.states,
                "as_written": self.as_written,
                "switchable": self.switchable,
                "switched": self.switched,
                "obstruction": self.obstruction,
                "kind": self.kind,
                "arcs": self.arcs,
            }
        )


def _path(terms: Sequence[int]) -> str:
    if len(terms) != 3:
        return str(list(terms))
    centre, a, b = terms
    return f"{a} - {centre} - {b}"


def dipath_switching(m: Model) -> DipathSwitching:
    """Decide whether ``m``'s frustration graph is, or can be switched to, a dipath orientation.

    Parameters
    ----------
    m : Model

    Returns
    -------
    DipathSwitching
        ``as_written`` is the exact criterion for ``[H, Q^(s)] = 0`` (every s, any couplings);
        ``switchable`` and ``switched`` answer the graph question with switching allowed.  The
        result depends on the strings only and is kept with them.

    References
    ----------
    R. L. Mann, S. J. Elman, D. R. Wood and A. Chapman, arXiv:2408.09684 (2024);
    S. J. Elman, A. Chapman and S. T. Flammia, Commun. Math. Phys. 388, 969 (2021).

    Examples
    --------
    >>> import freeladder as fl
    >>> d = dipath_switching(fl.parse_model("Z0 + X0 + Z0 Z1", states=3))
    >>> d.as_written, d.switchable, d.switched
    (False, True, (2,))
    """
    if not isinstance(m, Model):
        raise TypeError(f"expected a freeladder Model, got {type(m).__name__}")
    return DIPATH(m)


@part("dipath switching", "strings")
def DIPATH(m: Model) -> DipathSwitching:
    """The part behind :func:`dipath_switching`."""
    return dipath_from_exponents(EXPONENTS(m), m.states)


def dipath_from_exponents(
    ex: Any, states: int, labels: Sequence[int] | None = None
) -> DipathSwitching:
    """:func:`dipath_switching` from the sparse matrix of commutation exponents.

    Parameters
    ----------
    ex : scipy.sparse array, shape (M, M)
        ``ex[a, b] = m_ab`` in ``[1, N)`` for every pair that fails to commute.
    states : int
        N.
    labels : sequence of int, optional
        Term index of each row (default: the row number); the result uses these labels.
    """
    mat = sps.csr_array(ex)
    mat.sort_indices()
    n = int(mat.shape[0])
    lab = list(range(n)) if labels is None else [int(v) for v in labels]
    nbrs: list[dict[int, int]] = []
    for v in range(n):
        lo, hi = int(mat.indptr[v]), int(mat.indptr[v + 1])
        nbrs.append(
            {
                int(u): int(e) % states
                for u, e in zip(mat.indices[lo:hi], mat.data[lo:hi], strict=True)
                if int(e) % states
            }
        )
    adjacency = [set(d) for d in nbrs]

    def result(
        switchable: bool, switched: Sequence[int], obstruction: Sequence[int], kind: ObstructionKind
    ) -> DipathSwitching:
        flip = set(switched) if switchable else set()
        arcs = []
        for a in range(n):
            for b, e in nbrs[a].items():
                if a < b:
                    e2 = e if (a in flip) == (b in flip) else (-e) % states
                    if 2 * e2 > states:
                        arcs.append((lab[b], lab[a], (-e2) % states))
                    else:
                        arcs.append((lab[a], lab[b], e2))
        return DipathSwitching(
            states,
            kind == "",
            switchable,
            tuple(sorted(lab[v] for v in switched)) if switchable else (),
            tuple(lab[v] for v in obstruction),
            kind,
            tuple(sorted(arcs)),
        )

    claw = find_claw(adjacency, range(n))
    if claw is not None:
        return result(False, (), claw, "claw")
    # parity constraints x_a + x_b = p from the induced paths a - v - b
    constraints: list[dict[int, tuple[int, int]]] = [{} for _ in range(n)]
    first_bent: tuple[int, int, int] | None = None
    for v in range(n):
        around = sorted(nbrs[v])
        for i, a in enumerate(around):
            for b in around[i + 1 :]:
                if b in adjacency[a]:
                    continue
                ma, mb = nbrs[v][a], nbrs[v][b]
                same = (ma + mb) % states == 0  # x_a = x_b keeps the path directed
                other = (ma - mb) % states == 0  # x_a != x_b does
                if not same and not other:
                    return result(False, (), (v, a, b), "exponents")
                if same and other:
                    continue
                parity = 0 if same else 1
                if parity and first_bent is None:
                    first_bent = (v, a, b)
                known = constraints[a].get(b)
                if known is not None and known[0] != parity:
                    return result(False, (), (a, known[1], b, v), "odd cycle")
                constraints[a][b] = (parity, v)
                constraints[b][a] = (parity, v)
    colour: list[int | None] = [None] * n
    parent: list[tuple[int, int] | None] = [None] * n  # (previous vertex, middle term)
    switched: list[int] = []
    for root in range(n):
        if colour[root] is not None:
            continue
        colour[root] = 0
        members = [root]
        queue = deque([root])
        while queue:
            a = queue.popleft()
            for b, (parity, mid) in constraints[a].items():
                want = (colour[a] or 0) ^ parity
                if colour[b] is None:
                    colour[b] = want
                    parent[b] = (a, mid)
                    members.append(b)
                    queue.append(b)
                elif colour[b] != want:
                    return result(False, (), _odd_cycle(parent, a, b, mid), "odd cycle")
        ones = [v for v in members if colour[v]]
        switched.extend(ones if 2 * len(ones) <= len(members) else sorted(set(members) - set(ones)))
    if first_bent is not None:
        return result(True, switched, first_bent, "as written")
    return result(True, (), (), "")


def _odd_cycle(parent: Sequence[tuple[int, int] | None], a: int, b: int, mid: int) -> list[int]:
    """The cycle closed by the constraint ``a - b`` (middle term ``mid``) in the BFS forest."""

    def to_root(v: int) -> list[tuple[int, int]]:
        out = []
        while parent[v] is not None:
            up, middle = parent[v]  # type: ignore[misc]
            out.append((v, middle))
            v = up
        out.append((v, -1))
        return out

    pa, pb = to_root(a), to_root(b)
    on_b = {v for v, _ in pb}
    cycle: list[int] = []
    meet = a
    for v, middle in pa:
        if v in on_b:
            meet = v
            break
        cycle += [v, middle]
    cycle.append(meet)
    back: list[int] = []
    for v, middle in pb:
        if v == meet:
            break
        back += [v, middle]
    cycle += back[::-1]
    cycle.append(mid)
    out: list[int] = []
    for v in cycle:
        if v >= 0 and v not in out:
            out.append(v)
    return out
