"""Ready-made models: exclusion chains, Ising chains, 2D lattices, and coupling patterns."""

from __future__ import annotations

import math
import numbers
from collections.abc import Sequence
from typing import TYPE_CHECKING, Any

import numpy as np
import scipy.sparse as sps

from ..base.scalars import check_scalar
from .model import Coupling, Model
from .strings import StringArray, WeylString, check_states, make_string, pauli

if TYPE_CHECKING:
    import sympy
else:
    from ..base.lazy import sympy

__all__ = [
    "honeycomb_hexagons",
    "kitaev_torus",
    "MAX_BUILD_TERMS",
    "clock_chain",
    "complex_couplings",
    "exclusion_chain",
    "ising_chain",
    "ising_lattice",
    "kitaev_honeycomb",
    "random_couplings",
    "staggered",
]

MAX_BUILD_TERMS = 2_000_000
"""Largest number of terms (or sites) a builder makes; larger requests are refused at once."""


def _check_count(value: Any, name: str, low: int = 1, high: int = MAX_BUILD_TERMS) -> int:
    """An integer size argument in ``[low, high]``.

    Raises
    ------
    TypeError
        For a value that is not an integer (text, floats, booleans ...).
    ValueError
        For a value outside ``[low, high]``.
    """
    if isinstance(value, (bool, np.bool_)) or not isinstance(value, (int, np.integer)):
        raise TypeError(f"{name} must be an integer, got {value!r:.60}")
    n = int(value)
    if not low <= n <= high:
        raise ValueError(f"{name} must be between {low} and {high}, got {n}")
    return n


def _check_real(value: Any, name: str) -> float:
    """A finite real number (for ranges of random couplings)."""
    if isinstance(value, (bool, np.bool_)) or not isinstance(value, numbers.Real):
        raise TypeError(f"{name} must be a real number, got {value!r:.60}")
    try:
        x = float(value)
    except OverflowError:
        raise ValueError(f"{name} must be finite, got a number beyond the float range") from None
    if not math.isfinite(x):
        raise ValueError(f"{name} must be finite, got {value!r}")
    return x


def _check_seed(seed: Any) -> int | None:
    if seed is None:
        return None
    return _check_count(seed, "seed", 0, 2**63 - 1)


def _coupling_list(couplings: Any, count: int, what: str, symbol: str = "c") -> list[Coupling]:
    """Expand ``"uniform"``, ``"symbols"``, a scalar or a sequence into ``count`` couplings."""
    if isinstance(couplings, bytes):
        raise TypeError(f"{what}: couplings given as bytes; pass numbers or 'uniform'")
    if isinstance(couplings, str):
        if couplings == "uniform":
            return [1] * count
        if couplings == "symbols":
            return list(sympy.symbols(f"{symbol}_0:{count}")) if count else []
        raise ValueError(
            f"{what}: use 'uniform', 'symbols', a number or a sequence, not {couplings!r}"
        )
    if isinstance(couplings, np.ndarray) and couplings.ndim == 0:
        couplings = couplings.item()
    if isinstance(couplings, np.ndarray) and couplings.ndim != 1:
        raise ValueError(f"{what}: couplings must be one-dimensional, got shape {couplings.shape}")
    if not isinstance(couplings, (list, tuple, range, np.ndarray)):
        return [check_scalar(couplings, what)] * count
    if isinstance(couplings, np.ndarray) and couplings.dtype.kind in "fc":
        if not np.all(np.isfinite(couplings)):
            bad = int(np.nonzero(~np.isfinite(couplings))[0][0])
            raise ValueError(f"{what}: coupling {bad} is {couplings[bad]!r}, not finite")
        values = couplings.tolist()
    else:
        values = [check_scalar(c, f"{what}: term {j}") for j, c in enumerate(couplings)]
    if len(values) != count:
        raise ValueError(f"{what}: {len(values)} couplings given, {count} needed")
    return values


def exclusion_chain(
    n_terms: int,
    reach: int | Sequence[int] = 1,
    states: int = 2,
    couplings: Any = "uniform",
) -> Model:
    """The spin realisation of the exclusion algebra of reach ``p`` on ``M + p`` sites.

    ``H = sum_{j=0}^{M-1} c_j g_j`` with ``g_j = X_j Z_{j+1} ... Z_{j+p}``, so that
    ``g_j g_k = omega g_k g_j`` for ``j < k <= j + p`` and the strings commute otherwise.

    Parameters
    ----------
    n_terms : int
        M >= 1, the number of terms.
    reach : int or sequence of int
        p >= 1.  p = 1, N = 2 is the transverse-field Ising chain up to a basis change.  A
        sequence gives each term its own reach ``p_j`` (a variable-range chain); when the ends
        ``j + p_j`` never decrease, the frustration graph is an oriented indifference graph and
        the spectrum is free (Mann-Elman-Wood-Chapman 2024; Alcaraz 2025).
    states : int
        N >= 2.
    couplings : "uniform", "symbols", number or sequence
        "uniform" gives every c_j = 1; "symbols" gives sympy symbols ``c_0 ... c_{M-1}``.

    Returns
    -------
    Model

    References
    ----------
    P. Fendley, J. Phys. A 52, 335002 (2019), arXiv:1901.08078 (N = 2, p = 2);
    F. C. Alcaraz and R. A. Pimenta, Phys. Rev. B 102, 121101(R) (2020), arXiv:2005.14622
    (general p and N); F. C. Alcaraz, arXiv:2512.08011 (2025) (variable range);
    R. L. Mann, S. J. Elman, D. R. Wood and A. Chapman, arXiv:2408.09684 (2024).

    Examples
    --------
    >>> m = exclusion_chain(4, reach=2)
    >>> print(m)
    X0 Z1 Z2 + X1 Z2 Z3 + X2 Z3 Z4 + X3 Z4 Z5
    >>> print(exclusion_chain(3, reach=[1, 2, 1], states=3))
    X0 Z1 + X1 Z2 Z3 + X2 Z3
    """
    m_terms = _check_count(n_terms, "exclusion_chain: n_terms")
    if isinstance(reach, (int, np.integer)) and not isinstance(reach, bool):
        p = _check_count(reach, "exclusion_chain: reach", 1, max(1, MAX_BUILD_TERMS // m_terms))
        reaches = np.full(m_terms, p, dtype=np.int64)
    else:
        if isinstance(reach, (str, bytes)) or not isinstance(reach, (Sequence, np.ndarray)):
            raise TypeError(
                f"exclusion_chain: reach must be an integer or a sequence of integers, "
                f"got {reach!r:.60}"
            )
        if len(reach) != m_terms:
            raise ValueError(f"exclusion_chain: {len(reach)} reaches for {m_terms} terms")
        reaches = np.array(
            [_check_count(r, f"exclusion_chain: reach[{j}]", 1) for j, r in enumerate(reach)],
            dtype=np.int64,
        )
        if int(reaches.sum()) > MAX_BUILD_TERMS:
            raise ValueError(
                f"exclusion_chain: {int(reaches.sum())} operator factors exceed the limit "
                f"{MAX_BUILD_TERMS}"
            )
    n = check_states(states, "exclusion_chain")
    values = _coupling_list(couplings, m_terms, "exclusion_chain")
    rows = np.arange(m_terms)
    n_sites = int((rows + reaches).max()) + 1
    x = sps.csr_array((np.ones(m_terms, np.int64), (rows, rows)), shape=(m_terms, n_sites))
    zr = np.repeat(rows, reaches)
    offsets = np.arange(len(zr)) - np.repeat(np.cumsum(reaches) - reaches, reaches) + 1
    zc = zr + offsets
    z = sps.csr_array((np.ones(len(zr), np.int64), (zr, zc)), shape=(m_terms, n_sites))
    arr = StringArray(x, z, np.zeros(m_terms, np.int64), n, range(n_sites))
    return Model(arr, values)


def ising_chain(
    n_sites: int,
    field: Any = 1.0,
    bond: Any = 1.0,
    boundary: str = "open",
) -> Model:
    """Transverse-field Ising chain ``H = - sum_i h_i X_i - sum_i J_i Z_i Z_{i+1}``.

    Terms are interleaved ``X_0, Z_0 Z_1, X_1, Z_1 Z_2, ...`` so that, with open boundaries, the
    frustration graph is a path in term order.

    Parameters
    ----------
    n_sites : int
        L >= 1.
    field, bond : number, symbol or sequence
        ``h_i`` (L values) and ``J_i`` (L - 1 values, or L for periodic boundaries).
    boundary : "open" or "periodic"

    References
    ----------
    P. Pfeuty, Ann. Phys. 57, 79 (1970).
    """
    size = _check_count(n_sites, "ising_chain: n_sites")
    if boundary not in ("open", "periodic"):
        raise ValueError(f"boundary must be 'open' or 'periodic', not {boundary!r}")
    n_bonds = size - 1 if boundary == "open" else size
    h = _coupling_list(field, size, "ising_chain field", "h")
    jj = _coupling_list(bond, n_bonds, "ising_chain bond", "J")
    terms = []
    for i in range(size):
        terms.append((-h[i], pauli("X", [i])))
        if i < size - 1:
            terms.append((-jj[i], pauli("ZZ", [i, i + 1])))
    if boundary == "periodic" and size > 1:
        terms.append((-jj[size - 1], pauli("ZZ", [size - 1, 0])))
    return Model.from_terms(terms, states=2, sites=range(size))


def ising_lattice(rows: int, cols: int, field: Coupling = 1.0, bond: Coupling = 1.0) -> Model:
    """Transverse-field Ising model on an open ``rows x cols`` square lattice (sites ``(r, c)``).

    ``H = -h sum X_{r,c} - J sum_<ij> Z_i Z_j``.  In 2D its frustration graph has claws, so no
    free-fermion theorem applies (a standard negative example).
    """
    rows = _check_count(rows, "ising_lattice: rows")
    cols = _check_count(cols, "ising_lattice: cols", 1, MAX_BUILD_TERMS // rows)
    h = check_scalar(field, "ising_lattice: field")
    jb = check_scalar(bond, "ising_lattice: bond")
    terms = []
    for r in range(rows):
        for c in range(cols):
            terms.append((-h, pauli("X", [(r, c)])))
            if c + 1 < cols:
                terms.append((-jb, pauli("ZZ", [(r, c), (r, c + 1)])))
            if r + 1 < rows:
                terms.append((-jb, pauli("ZZ", [(r, c), (r + 1, c)])))
    return Model.from_terms(
        terms, states=2, sites=[(r, c) for r in range(rows) for c in range(cols)]
    )


def kitaev_honeycomb(
    rows: int,
    cols: int,
    jx: Coupling = 1.0,
    jy: Coupling = 1.0,
    jz: Coupling = 1.0,
) -> Model:
    """Kitaev's honeycomb model on an open brick-wall patch of ``rows x cols`` sites.

    Horizontal bonds ``(r, c)-(r, c+1)`` alternate between x links (c even) and y links (c odd);
    vertical z links join ``(r, c)-(r+1, c)`` when ``r + c`` is even, so every site has at most
    one bond of each kind.  ``H = sum J_x X X + J_y Y Y + J_z Z Z`` over the links.

    References
    ----------
    A. Kitaev, Ann. Phys. 321, 2 (2006), arXiv:cond-mat/0506438.
    """
    rows = _check_count(rows, "kitaev_honeycomb: rows")
    cols = _check_count(cols, "kitaev_honeycomb: cols (a patch needs 2 or more)", 2)
    _check_count(rows * cols, "kitaev_honeycomb: rows * cols")
    cx, cy, cz = (
        check_scalar(v, f"kitaev_honeycomb: {name}")
        for v, name in ((jx, "jx"), (jy, "jy"), (jz, "jz"))
    )
    terms = []
    for r in range(rows):
        for c in range(cols - 1):
            if c % 2 == 0:
                terms.append((cx, pauli("XX", [(r, c), (r, c + 1)])))
            else:
                terms.append((cy, pauli("YY", [(r, c), (r, c + 1)])))
    for r in range(rows - 1):
        for c in range(cols):
            if (r + c) % 2 == 0:
                terms.append((cz, pauli("ZZ", [(r, c), (r + 1, c)])))
    return Model.from_terms(
        terms, states=2, sites=[(r, c) for r in range(rows) for c in range(cols)]
    )


def kitaev_torus(
    cells_x: int, cells_y: int, jx: Coupling = 1.0, jy: Coupling = 1.0, jz: Coupling = 1.0
) -> Model:
    """Kitaev's honeycomb model on a torus of ``cells_x x cells_y`` unit cells (2 sites each).

    Sites are ``(s, x, y)``: ``s = 0`` (sublattice A) or 1 (B) in cell ``(x, y)``, periodic in
    both directions.  Each B site has one bond of each kind: ``Z Z`` to A in its own cell,
    ``X X`` to A in cell ``(x + 1, y)`` and ``Y Y`` to A in cell ``(x, y + 1)``;
    ``H = sum J_x X X + J_y Y Y + J_z Z Z`` over the ``3 cells_x cells_y`` bonds.  Its hexagons'
    conserved strings are :func:`honeycomb_hexagons`.

    References
    ----------
    A. Kitaev, Ann. Phys. 321, 2 (2006), arXiv:cond-mat/0506438.

    Examples
    --------
    >>> m = kitaev_torus(2, 2)
    >>> len(m), len(m.sites)
    (12, 8)
    """
    nx_ = _check_count(cells_x, "kitaev_torus: cells_x", 1)
    ny_ = _check_count(cells_y, "kitaev_torus: cells_y", 1)
    cx, cy, cz = (check_scalar(v, name) for v, name in ((jx, "jx"), (jy, "jy"), (jz, "jz")))
    terms = []
    for x in range(nx_):
        for y in range(ny_):
            b = (1, x, y)
            terms.append((cz, pauli("ZZ", [(0, x, y), b])))
            terms.append((cx, pauli("XX", [b, (0, (x + 1) % nx_, y)])))
            terms.append((cy, pauli("YY", [b, (0, x, (y + 1) % ny_)])))
    sites = [(s, x, y) for s in (0, 1) for x in range(nx_) for y in range(ny_)]
    return Model.from_terms(terms, states=2, sites=sites)


def honeycomb_hexagons(cells_x: int, cells_y: int) -> tuple[WeylString, ...]:
    """The conserved string of each hexagon of :func:`kitaev_torus` (the product of its six
    bond terms, normalised), one per unit cell.

    Examples
    --------
    >>> len(honeycomb_hexagons(3, 3))
    9
    """
    nx_ = _check_count(cells_x, "honeycomb_hexagons: cells_x", 1)
    ny_ = _check_count(cells_y, "honeycomb_hexagons: cells_y", 1)
    out = []
    for x in range(nx_):
        for y in range(ny_):
            xp, ym = (x + 1) % nx_, (y - 1) % ny_
            ring = [(0, x, y), (1, x, y), (0, xp, y), (1, xp, ym), (0, xp, ym), (1, x, ym)]
            product = make_string(2, [])
            for k, letter in enumerate("ZXYZXY"):  # the bond kinds around the hexagon
                product = product * pauli(letter * 2, [ring[k], ring[(k + 1) % 6]])
            out.append(product.normalized()[0])
    return tuple(out)


def clock_chain(n_sites: int, field: Any = 1.0, bond: Any = 1.0, states: int = 3) -> Model:
    """Open Z_N clock chain ``H = - sum_i f_i X_i - sum_i J_i Z_i Z_{i+1}^dagger`` (non-Hermitian).

    Terms interleave as in :func:`ising_chain`; the frustration structure is that of the
    reach-1 exclusion algebra (Baxter's free-parafermion chain).

    References
    ----------
    R. J. Baxter, Phys. Lett. A 140, 155 (1989); P. Fendley, J. Phys. A 47, 075001 (2014).
    """
    n = check_states(states, "clock_chain")
    n_sites = _check_count(n_sites, "clock_chain: n_sites")
    f = _coupling_list(field, n_sites, "clock_chain field", "f")
    jj = _coupling_list(bond, n_sites - 1, "clock_chain bond", "J")
    terms = []
    for i in range(n_sites):
        terms.append((-f[i], make_string(n, [(i, 1, 0)])))
        if i < n_sites - 1:
            terms.append((-jj[i], make_string(n, [(i, 0, 1), (i + 1, 0, n - 1)])))
    return Model.from_terms(terms, states=n, sites=range(n_sites))


def staggered(n: int, a: Coupling, b: Coupling) -> list[Coupling]:
    """``[a, b, a, b, ...]`` of length ``n`` (dimerised couplings)."""
    n = _check_count(n, "staggered: n", 0)
    a, b = check_scalar(a, "staggered: a"), check_scalar(b, "staggered: b")
    return [a if j % 2 == 0 else b for j in range(n)]


def random_couplings(
    n: int, low: float = 0.5, high: float = 1.5, seed: int | None = None
) -> np.ndarray:
    """``n`` couplings drawn uniformly from ``[low, high)`` with a reproducible seed."""
    n = _check_count(n, "random_couplings: n", 0)
    lo, hi = _check_real(low, "random_couplings: low"), _check_real(high, "random_couplings: high")
    if hi < lo:
        raise ValueError(f"random_couplings: need low <= high, got {low}, {high}")
    return np.random.default_rng(_check_seed(seed)).uniform(lo, hi, n)


def complex_couplings(
    n: int, modulus: tuple[float, float] = (0.5, 1.5), seed: int | None = None
) -> np.ndarray:
    """``n`` complex couplings with moduli uniform in ``modulus`` and uniform random phases."""
    n = _check_count(n, "complex_couplings: n", 0)
    if isinstance(modulus, (str, bytes)) or np.ndim(modulus) != 1 or len(modulus) != 2:
        raise TypeError(
            f"complex_couplings: modulus must be a pair (low, high), got {modulus!r:.60}"
        )
    lo = _check_real(modulus[0], "complex_couplings: modulus[0]")
    hi = _check_real(modulus[1], "complex_couplings: modulus[1]")
    if not 0 <= lo <= hi:
        raise ValueError(f"complex_couplings: need 0 <= low <= high, got {lo}, {hi}")
    rng = np.random.default_rng(_check_seed(seed))
    r = rng.uniform(lo, hi, n)
    return r * np.exp(2j * np.pi * rng.uniform(0, 1, n))
