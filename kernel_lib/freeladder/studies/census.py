"""A census of translation-invariant chains built from a few short-range term types.

A *term type* is one Weyl string ``X^a Z^b`` per site on at most ``support`` consecutive sites,
written with its first site at 0 (``"X0 Z1 Z2"``).  A chain of ``L`` sites built from a set of
types has one term of every type at every position where it fits, each with its own coupling:

    H = sum_t sum_{j=0}^{L - width(t)} c_{t,j} t(j)

:func:`census` lists every such chain with up to ``types`` types, one row per symmetry orbit,
and says which theorem (if any) makes it free, whether it is only integrable, or neither.  The
verdicts come from :func:`freeladder.classify` (graph theory of the frustration graph and the
relations among the strings); they do not depend on the couplings.

Symmetries used to reduce the list (each maps a model to one with the same verdict):

* translation of a type (the first site is 0 by construction);
* reflection ``j -> L - 1 - j`` of the whole chain: commutation exponents are sums over sites,
  so they are unchanged;
* one invertible linear map of the exponent pairs ``(a, b)`` applied at every site, with
  determinant ``+-1`` modulo N: it multiplies every commutation exponent by the determinant, so
  it keeps the frustration graph and at most reverses its orientation.  For N = 2 these are
  the six permutations of X, Y and Z (single-site Clifford basis changes).

How far a verdict is known: each verdict is decided at two lengths; the table says so
(``every_length``), and when the two lengths disagree it says that too.  It is not a proof for
every length.

References
----------
A. Chapman and S. T. Flammia, Quantum 4, 278 (2020), arXiv:2001.05498 (Jordan-Wigner solvable
models from their frustration graphs); S. J. Elman, A. Chapman and S. T. Flammia, Commun. Math.
Phys. 388, 969 (2021), arXiv:2012.07857 (line graphs and their cycles); A. Chapman, S. J. Elman
and R. L. Mann, arXiv:2305.15625 (2023) (claw-free, even-hole-free graphs: free fermions in
disguise); R. L. Mann, S. J. Elman, D. R. Wood and A. Chapman, arXiv:2408.09684 (2024) (free
parafermions); F. C. Alcaraz and R. A. Pimenta, Phys. Rev. B 102, 121101(R) (2020),
arXiv:2005.14622; P. Fendley, J. Phys. A 52, 335002 (2019), arXiv:1901.08078.
"""

from __future__ import annotations

import functools
import itertools
import math
from collections.abc import Iterable, Sequence
from pathlib import Path
from typing import TYPE_CHECKING, Any

from ..algebra.model import Model
from ..algebra.strings import WeylString, check_states, make_string
from ..graphs.verdict import KINDS, classify

if TYPE_CHECKING:
    import pandas as pd

__all__ = ["census"]

TermType = tuple[tuple[int, int], ...]
"""One term type: the exponents ``(a, b)`` of ``X^a Z^b`` on sites ``0 .. width - 1``; the first
and last pairs are not ``(0, 0)``."""

ENUMERATION_LIMIT = 2_000_000
"""Most type sets :func:`census_orbits` will look at before it refuses (a cost guard)."""

_LETTERS = {(1, 0): "X", (0, 1): "Z", (1, 1): "Y"}


def term_types(states: int, support: int) -> list[TermType]:
    """Every term type on at most ``support`` sites, first site 0, in a fixed order.

    Parameters
    ----------
    states : int
        N >= 2.
    support : int
        Largest number of consecutive sites a type may cover (>= 1).

    Returns
    -------
    list of TermType
        ``(N^2 - 1) * N^(2 (support - 1))`` types minus those whose last site is the identity
        for a shorter width, i.e. each type listed once by its true width.

    Examples
    --------
    >>> len(term_types(2, 1)), len(term_types(2, 2))
    (3, 12)
    """
    n = check_states(states)
    support = _positive(support, "support")
    pairs = [(a, b) for a in range(n) for b in range(n)]
    ops = [p for p in pairs if p != (0, 0)]
    out: list[TermType] = []
    for width in range(1, support + 1):
        if width == 1:
            out.extend((p,) for p in ops)
            continue
        for middle in itertools.product(pairs, repeat=width - 2):
            for first in ops:
                for last in ops:
                    out.append((first, *middle, last))
    return out


def _positive(value: Any, name: str) -> int:
    if isinstance(value, bool) or not isinstance(value, int) or value < 1:
        raise ValueError(f"{name} must be a positive integer, got {value!r}")
    return value


@functools.lru_cache(maxsize=16)
def _maps(states: int) -> tuple[tuple[int, int, int, int], ...]:
    """Linear maps ``(a, b) -> (p a + q b, r a + s b)`` mod N with determinant +-1."""
    n = states
    dets = {1 % n, (-1) % n}
    return tuple(
        (p, q, r, s)
        for p, q, r, s in itertools.product(range(n), repeat=4)
        if (p * s - q * r) % n in dets
    )


def _images(types: tuple[TermType, ...], states: int) -> Iterable[tuple[TermType, ...]]:
    n = states
    for p, q, r, s in _maps(states):
        mapped = [tuple(((p * a + q * b) % n, (r * a + s * b) % n) for a, b in t) for t in types]
        yield tuple(sorted(mapped, key=functools.partial(_key, n)))
        yield tuple(sorted((t[::-1] for t in mapped), key=functools.partial(_key, n)))


def _key(n: int, t: TermType) -> tuple[tuple[int, int], ...]:
    # Orders X^1 first and the identity last on each site, so representatives read X0 X1, Y0 Y1.
    return tuple(((a - 1) % n, b) for a, b in t)


def _canonical(types: tuple[TermType, ...], states: int) -> tuple[TermType, ...]:
    return min(_images(types, states), key=lambda image: tuple(_key(states, t) for t in image))


def census_orbits(
    states: int = 2, support: int = 2, types: int = 2
) -> list[tuple[tuple[TermType, ...], int]]:
    """The symmetry orbits of sets of up to ``types`` distinct term types.

    Parameters
    ----------
    states, support, types : int
        As in :func:`census`.

    Returns
    -------
    list of (representative, size)
        One entry per orbit, in a fixed order (by number of types, then the representative);
        the representative is the orbit's smallest sorted tuple of types, and ``size`` is the
        number of distinct type sets in the orbit.

    Raises
    ------
    ValueError
        For bad arguments, or more than :data:`ENUMERATION_LIMIT` type sets to look at.
    """
    n = check_states(states)
    most = _positive(types, "types")
    catalogue = term_types(n, support)
    total = sum(math.comb(len(catalogue), k) for k in range(1, most + 1))
    if total > ENUMERATION_LIMIT:
        raise ValueError(
            f"{total} sets of up to {most} types of {len(catalogue)} (N = {n}, support "
            f"{support}) is more than the limit {ENUMERATION_LIMIT}; lower types or support"
        )
    sizes: dict[tuple[TermType, ...], int] = {}
    for k in range(1, most + 1):
        for combo in itertools.combinations(catalogue, k):
            key = _canonical(combo, n)
            sizes[key] = sizes.get(key, 0) + 1
    return sorted(sizes.items(), key=lambda item: (len(item[0]), [_key(n, t) for t in item[0]]))


def _string(t: TermType, offset: int, states: int) -> WeylString:
    factors = [(offset + i, a, b) for i, (a, b) in enumerate(t) if (a, b) != (0, 0)]
    return make_string(states, factors).normalized()[0]


def chain_of_types(
    types: Sequence[TermType], length: int, states: int = 2, couplings: Any = None
) -> Model:
    """The open chain of ``length`` sites with one term of every type at every position.

    Parameters
    ----------
    types : sequence of TermType
    length : int
        Number of sites.
    states : int
    couplings : None, sequence or numpy.random.Generator
        None gives every term coupling 1; a sequence gives the couplings in term order (types
        in the order given, positions left to right within each type); a Generator draws each
        uniformly from [0.3, 1.7].

    Returns
    -------
    Model
    """
    n = check_states(states)
    length = _positive(length, "length")
    strings = [
        _string(t, j, n) for t in types for j in range(length - len(t) + 1) if len(t) <= length
    ]
    if not strings:
        raise ValueError(f"no type fits on {length} sites")
    if couplings is None:
        values: list[Any] = [1] * len(strings)
    elif hasattr(couplings, "uniform"):
        values = list(couplings.uniform(0.3, 1.7, len(strings)))
    else:
        values = list(couplings)
        if len(values) != len(strings):
            raise ValueError(f"{len(values)} couplings given for {len(strings)} terms")
    return Model.from_terms(list(zip(values, strings, strict=True)), states=n)


def type_text(t: TermType, states: int) -> str:
    """A term type as model text with its first site at 0 (``"X0 Z1 Z2"``; ``"X0^2 Z1"``)."""
    parts = []
    for site, (a, b) in enumerate(t):
        if (a, b) == (0, 0):
            continue
        if states == 2:
            parts.append(f"{_LETTERS[(a, b)]}{site}")
            continue
        if a:
            parts.append(f"X{site}" + (f"^{a}" if a != 1 else ""))
        if b:
            parts.append(f"Z{site}" + (f"^{b}" if b != 1 else ""))
    return " ".join(parts)


def _letters(text: str) -> TermType:
    """Exponent pairs of a Pauli type written as letters, one per site (``"XIZ"``)."""
    code = {"I": (0, 0), "X": (1, 0), "Z": (0, 1), "Y": (1, 1)}
    return tuple(code[c] for c in text)


# Families the trade names, as sets of types (each is matched by its orbit).
_KNOWN: tuple[tuple[int, tuple[TermType, ...], str], ...] = (
    (2, (_letters("ZZ"), _letters("X")), "transverse-field Ising chain (Pfeuty 1970)"),
    (2, (_letters("XZ"),), "reach-1 exclusion chain (Ising chain in disguise)"),
    (2, (_letters("XX"), _letters("YY")), "XY chain (Lieb, Schultz and Mattis 1961)"),
    (
        2,
        (_letters("XX"), _letters("YY"), _letters("Z")),
        "XY chain in a transverse field (Kitaev chain under Jordan-Wigner)",
    ),
    (2, (_letters("XX"), _letters("YY"), _letters("ZZ")), "XYZ chain (Heisenberg type)"),
    (2, (_letters("XZZ"),), "reach-2 exclusion chain (Fendley 2019)"),
    (3, (((1, 0),), ((0, 2), (0, 1))), "free parafermion chain (Fendley 2014)"),
)


@functools.lru_cache(maxsize=16)
def _names(states: int) -> dict[tuple[TermType, ...], tuple[tuple[TermType, ...], str]]:
    """Orbit representative -> (the family's usual types, its name)."""
    return {_canonical(ts, states): (ts, name) for n, ts, name in _KNOWN if n == states}


def _row(orbit: tuple[TermType, ...], states: int, lengths: tuple[int, int]) -> dict[str, Any]:
    """Everything the census says about one orbit (module level, so processes can run it).

    A named family is shown in its usual form (``Z0 Z1, X0`` for the Ising chain), any other
    orbit by its representative.
    """
    orbit, name = _names(states).get(orbit, (orbit, ""))
    verdicts = []
    models = []
    for length in lengths:
        m = chain_of_types(orbit, length, states)
        models.append(m)
        verdicts.append(classify(m))
    kinds = [v.kind for v in verdicts]
    weakest = min(kinds, key=KINDS.index)
    v = verdicts[kinds.index(weakest)]
    m = models[kinds.index(weakest)]
    if len(set(kinds)) > 1:
        how = f"DIFFERS between lengths {lengths[0]} and {lengths[1]} ({kinds[0]}, {kinds[1]})"
    else:
        how = f"checked at lengths {lengths[0]} and {lengths[1]}; not proved for every length"
    sectors: int | None = None
    if v.guarantee.proven:
        spectrum = "single polynomial"
        theorem = v.guarantee.theorem
    elif weakest == "jordan-wigner":
        spectrum = "sectors"
        theorem = "Jordan-Wigner, one free spectrum per sector of the cycle strings"
        from ..spectra.majorana import sectors as sector_structure

        try:
            sectors = len(sector_structure(m).sectors)
        except ValueError:
            sectors = None
    else:
        spectrum = "none"
        theorem = ""
    return {
        "types": tuple(type_text(t, states) for t in orbit),
        "verdict": weakest,
        "theorem": theorem,
        "reason": v.reasons[0] if v.reasons else "",
        "witness": v.witness_text(),
        "spectrum": spectrum,
        "sectors": sectors,
        "model": str(m),
        "name": name,
        "lengths": tuple(lengths),
        "every_length": how,
    }


def census(
    states: int = 2,
    support: int = 3,
    types: int = 3,
    lengths: tuple[int, int] | None = None,
    executor: Any = None,
    progress: bool = True,
    path: str | Path | None = None,
) -> pd.DataFrame:
    """Every translation-invariant open chain of up to ``types`` short-range term types, classified.

    Parameters
    ----------
    states : int
        N (2 for Pauli strings).
    support : int
        Largest number of consecutive sites a term type covers.
    types : int
        Largest number of distinct term types in one chain.
    lengths : (int, int) or None
        The two chain lengths (sites) at which each verdict is decided; default
        ``(3 support + 1, 3 support + 2)``.
    executor : None, "processes", Executor, distributed.Client or address
        Where the rows are computed, as in :func:`freeladder.sweep` (None: this process).
    progress : bool
        Show a progress bar.
    path : str, Path or None
        Also write the table to this file: ``.csv``, or ``.parquet`` (needs pyarrow).

    Returns
    -------
    pandas.DataFrame
        One row per symmetry orbit, with columns ``types`` (the types as model text, sites
        from 0), ``verdict`` (a kind of :data:`freeladder.KINDS`; the weaker one when the two
        lengths disagree), ``theorem`` (what proves the spectrum free, empty when nothing
        does), ``reason``, ``witness`` (terms that block a theorem, as text), ``spectrum``
        (``"single polynomial"``, ``"sectors"`` or ``"none"``), ``sectors`` (how many, at the
        length shown, for ``"sectors"``), ``model`` (a representative model text, every
        coupling 1; give the terms your own couplings), ``name`` (where the trade has one),
        ``lengths``, ``every_length`` (how far the verdict is known) and ``orbit_size``.
        ``df.attrs`` holds the arguments and the sweep's timing.

    Raises
    ------
    ValueError
        For bad arguments or a census too large to enumerate.

    Notes
    -----
    Cost: the orbits are enumerated in this process (about ``C(T, types)`` type sets for T
    types on ``support`` sites, times the size of the symmetry group); each orbit then costs
    two :func:`freeladder.classify` calls on chains of about ``types * length`` terms.

    Examples
    --------
    >>> df = census(states=2, support=2, types=2, progress=False)
    >>> row = df[df.name.str.startswith("XY chain (")].iloc[0]
    >>> row.types, row.verdict, row.spectrum
    (('X0 X1', 'Y0 Y1'), 'jordan-wigner', 'single polynomial')
    """
    from .grid import sweep

    n = check_states(states)
    support = _positive(support, "support")
    if lengths is None:
        lengths = (3 * support + 1, 3 * support + 2)
    if (
        not isinstance(lengths, (tuple, list))
        or len(lengths) != 2
        or not all(isinstance(x, int) and not isinstance(x, bool) for x in lengths)
        or min(lengths) < support
    ):
        raise ValueError(f"lengths must be two integers >= support ({support}), got {lengths!r}")
    orbits = census_orbits(n, support, types)
    reps = [rep for rep, _ in orbits]
    row = functools.partial(_row, states=n, lengths=(int(lengths[0]), int(lengths[1])))
    table = sweep(row, {"orbit": reps}, executor=executor, progress=progress)
    table = table.drop(columns=["orbit", "stream"])
    table["orbit_size"] = [size for _, size in orbits][: len(table)]
    table["sectors"] = table["sectors"].astype("Int64")
    table.attrs.update({"states": n, "support": support, "types": types, "lengths": tuple(lengths)})
    if path is not None:
        _write(table, Path(path))
    return table


def _write(table: pd.DataFrame, path: Path) -> None:
    suffix = path.suffix.lower()
    flat = table.copy()
    flat["types"] = ["; ".join(t) for t in flat["types"]]
    flat["lengths"] = [" ".join(str(x) for x in t) for t in flat["lengths"]]
    if suffix == ".csv":
        flat.to_csv(path, index=False)
    elif suffix == ".parquet":
        try:
            flat.to_parquet(path, index=False)
        except ImportError as err:
            raise ImportError(f"writing {path.name} needs pyarrow ({err}); use .csv") from err
    else:
        raise ValueError(f"census files end in .csv or .parquet, got {path.name!r}")
