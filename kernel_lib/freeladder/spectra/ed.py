"""Exact diagonalization: the reference spectrum every free-spectrum answer is compared with.

Small models are diagonalised densely (LAPACK through numpy); larger ones give their ``k``
lowest eigenvalues (by real part) through ARPACK (scipy.sparse.linalg).  Before building
anything the memory the solve needs is estimated and compared with the memory available, so
that a model too large for exact diagonalization is refused with a message instead of
exhausting the machine.

References
----------
E. Anderson et al., LAPACK Users' Guide, 3rd ed. (SIAM, 1999): dense Hermitian (``heevd``) and
general (``geev``) eigenvalue drivers and their error bounds.
R. B. Lehoucq, D. C. Sorensen and C. Yang, ARPACK Users' Guide (SIAM, 1998): implicitly
restarted Lanczos / Arnoldi iterations.
"""

from __future__ import annotations

import os
from collections.abc import Sequence
from dataclasses import dataclass
from typing import Any

import numpy as np
import scipy.sparse as sps

from ..algebra.model import Model
from ..algebra.strings import WeylString
from ..base import display
from ..base.errors import TooLargeError
from ..base.frozen import readonly_array
from ..base.jsonready import json_ready

__all__ = [
    "DENSE_LIMIT",
    "SPARSE_CHECK_LIMIT",
    "SECTOR_DENSE_LIMIT",
    "SPARSE_LIMIT",
    "ExactSpectrum",
    "exact_spectrum",
    "sector_dimension",
    "sector_exact_spectrum",
    "sparse_memory",
]

DENSE_LIMIT = 4096
"""Largest dimension diagonalised densely."""

SPARSE_LIMIT = 2**31
"""Largest dimension the sparse solver handles (32-bit sparse indices)."""

SPARSE_CHECK_LIMIT = 2**22
"""Largest dimension the checks diagonalise sparsely (:func:`sector_exact_spectrum`)."""

SECTOR_DENSE_LIMIT = 1024
"""Largest dimension :func:`sector_exact_spectrum` diagonalises densely (above it, Lanczos).

Measured on the shared 2-core machine under a load average of 14: LAPACK's ``heevd`` on a
complex Hermitian matrix of dimension 1024 took 1.2 s with one BLAS thread (21 s with the
default threads), of dimension 2048 8.6 s (122 s)."""

_EPS = float(np.finfo(float).eps)


@dataclass(frozen=True)
class ExactSpectrum:
    """Eigenvalues of a model's Hamiltonian from exact diagonalization.

    Attributes
    ----------
    levels : numpy.ndarray
        Distinct eigenvalues (cluster means), sorted by real part, then imaginary part.  Real
        dtype for Hermitian Hamiltonians, complex otherwise.
    multiplicities : numpy.ndarray of int
        How many eigenvalues each level holds.  With ``complete=False`` the multiplicity of the
        highest level returned may be cut short by ``k``.
    eigenvalues : numpy.ndarray
        Every eigenvalue found, with repetition, in the same order.
    method : str
        ``"dense-hermitian"``, ``"dense-general"``, ``"sparse-eigsh"`` or ``"sparse-eigs"``.
    tolerance : float
        Absolute clustering tolerance used: ``tol`` times the spectral scale
        (``max(1, max |eigenvalue|)``).
    dimension : int
        Hilbert-space dimension.
    complete : bool
        True when all ``dimension`` eigenvalues were computed.
    hermitian : bool
        True when the matrix was Hermitian within rounding.
    error_estimate : float
        Estimated absolute accuracy of the eigenvalues: ``dimension * eps * ||H||_1`` for dense
        Hermitian solves (backward stability of LAPACK and Weyl's inequality), the largest
        residual ``||H v - lambda v||`` for sparse solves (a rigorous bound when Hermitian).
        For non-Hermitian dense solves it is the backward error only: eigenvalues of a
        non-normal matrix can be less accurate.
    """

    levels: np.ndarray
    multiplicities: np.ndarray
    eigenvalues: np.ndarray
    method: str
    tolerance: float
    dimension: int
    complete: bool
    hermitian: bool
    error_estimate: float

    def __post_init__(self) -> None:
        for name in ("levels", "multiplicities", "eigenvalues"):
            object.__setattr__(self, name, readonly_array(getattr(self, name)))

    def to_dict(self) -> dict[str, Any]:
        """JSON-ready fields: levels (complex as ``[re, im]``), multiplicities, method, error
        estimate, clustering tolerance, dimension, how many eigenvalues were found, complete,
        hermitian."""
        return json_ready(
            {
                "levels": self.levels,
                "multiplicities": self.multiplicities,
                "method": self.method,
                "error_estimate": self.error_estimate,
                "tolerance": self.tolerance,
                "dimension": self.dimension,
                "eigenvalue_count": int(self.eigenvalues.shape[0]),
                "complete": self.complete,
                "hermitian": self.hermitian,
            }
        )

    def __repr__(self) -> str:
        return display.exact_spectrum_repr(self)

    def _repr_html_(self) -> str:
        return display.exact_spectrum_html(self)


def available_memory() -> int:
    """Bytes of memory available now (``MemAvailable`` of /proc/meminfo, else sysconf)."""
    try:
        with open("/proc/meminfo") as fh:
            for line in fh:
                if line.startswith("MemAvailable:"):
                    return int(line.split()[1]) * 1024
    except OSError:
        pass
    try:
        return int(os.sysconf("SC_AVPHYS_PAGES")) * int(os.sysconf("SC_PAGE_SIZE"))
    except (ValueError, OSError, AttributeError):
        return 2**34  # unknown platform: assume 16 GiB


def _row_count(m: Model) -> int:
    """Non-zeros per row of the Hamiltonian: the number of distinct X patterns."""
    x = m.strings.x.tocsr()
    patterns = set()
    for r in range(x.shape[0]):
        lo, hi = x.indptr[r], x.indptr[r + 1]
        patterns.add((tuple(x.indices[lo:hi]), tuple(x.data[lo:hi])))
    diagonal = ((), ())
    if m.constant != 0 or not patterns:
        patterns.add(diagonal)
    return len(patterns)


def _gib(n_bytes: float) -> str:
    return f"{n_bytes / 2**30:.3g} GiB"


def exact_spectrum(
    m: Model, k: int | None = None, tol: float = 1e-9, solver: str = "auto"
) -> ExactSpectrum:
    """Eigenvalues of ``H = constant + sum_j c_j g_j`` by exact diagonalization.

    Parameters
    ----------
    m : Model
        A model with numeric couplings.
    k : int, optional
        Number of lowest eigenvalues (by real part) wanted.  ``None`` asks for all of them,
        which is allowed up to dimension :data:`DENSE_LIMIT`.
    tol : float
        Relative tolerance for grouping eigenvalues into levels; the absolute tolerance is
        ``tol * max(1, max |eigenvalue|)``.
    solver : "auto", "dense" or "sparse"
        "auto" is dense up to dimension :data:`DENSE_LIMIT` and sparse above; "dense" forces a
        dense solve (still refused when memory is short); "sparse" forces ARPACK (needs ``k``).

    Returns
    -------
    ExactSpectrum

    Raises
    ------
    ValueError
        If the couplings are symbolic (substitute values with ``m.subs`` first) or ``k`` is not
        in ``1..dim`` (``1..dim - 2`` for the sparse solvers).
    TooLargeError
        (a ValueError) If ``k`` is None and the dimension exceeds :data:`DENSE_LIMIT`, the
        dimension exceeds :data:`SPARSE_LIMIT`, or the estimated memory exceeds what is
        available.  The message suggests a ``k`` only when that request would succeed.

    Notes
    -----
    Dense solves use ``numpy.linalg.eigvalsh`` when ``H`` is Hermitian within rounding
    (``max |H - H^dagger| <= 1e-12 * max |H|``) and ``numpy.linalg.eigvals`` otherwise.  Larger
    models use ``scipy.sparse.linalg.eigsh`` (``which="SA"``) or ``eigs`` (``which="SR"``).
    Levels are formed by chaining eigenvalues whose real parts, and then imaginary parts,
    differ by at most the clustering tolerance.  Eigenvalues of defective (non-diagonalisable)
    matrices split by about ``eps ** (1 / block size)``; raise ``tol`` for those.

    References
    ----------
    LAPACK Users' Guide (1999); ARPACK Users' Guide (1998).

    Examples
    --------
    >>> from freeladder import ising_chain
    >>> ed = exact_spectrum(ising_chain(3))
    >>> ed.dimension, ed.method, int(ed.multiplicities.sum())
    (8, 'dense-hermitian', 8)
    """
    k = _validate(m, k, tol, solver)
    dense = solver == "dense" or (solver == "auto" and m.dimension <= DENSE_LIMIT)
    _check_size(m, k, dense, solver)
    mat = m.to_sparse()
    hermitian = _is_hermitian(mat)
    if dense:
        vals, error, method = _dense_solve(mat, hermitian)
        if k is not None:
            vals = vals[:k]
    else:
        assert k is not None
        vals, error, method = _sparse_lowest(mat, k, hermitian)
    return _exact_result(vals, error, method, tol, m.dimension, hermitian)


def _validate(m: Model, k: int | None, tol: float, solver: str) -> int | None:
    """Check the arguments of :func:`exact_spectrum`; ``k`` as an int (or None)."""
    if not isinstance(m, Model):
        raise TypeError(f"exact_spectrum needs a Model, got {type(m).__name__}")
    if m.is_symbolic:
        names = ", ".join(sorted(str(s) for s in m.symbols))
        raise ValueError(
            f"the model has symbolic couplings ({names}); give them values first, "
            "e.g. exact_spectrum(m.subs({...}))"
        )
    if not (np.isfinite(tol) and tol >= 0):
        raise ValueError(f"tol must be a finite number >= 0, got {tol!r}")
    dim = m.dimension
    if k is not None:
        if isinstance(k, bool) or int(k) != k or not 1 <= k <= dim:
            raise ValueError(f"k must be an integer in 1..{dim} (the dimension), got {k!r}")
        k = int(k)
    if solver not in ("auto", "dense", "sparse"):
        raise ValueError(f"solver must be 'auto', 'dense' or 'sparse', not {solver!r}")
    if solver == "sparse" and k is None:
        raise ValueError("the sparse solver needs k, the number of lowest eigenvalues wanted")
    return k


def _dense_bytes(dim: int, per_row: int) -> float:
    return 3 * 16.0 * dim**2 + _sparse_matrix_bytes(dim, per_row)


def _sparse_matrix_bytes(dim: int, per_row: int) -> float:
    return 64.0 * dim * per_row  # build temporaries (rows, cols, complex data) and CSR


def _sparse_bytes(dim: int, per_row: int, k: int) -> float:
    return _sparse_matrix_bytes(dim, per_row) + 16.0 * dim * (2 * k + 40)  # Lanczos basis


def _largest_sparse_k(dim: int, per_row: int, have: float) -> int:
    """Largest k whose sparse solve fits in ``have`` bytes (0 when even k = 1 does not)."""
    if dim > SPARSE_LIMIT or dim < 3:
        return 0
    spare = have - _sparse_bytes(dim, per_row, 0)
    return int(max(0, min(dim - 2, spare // (32.0 * dim))))


def _check_size(m: Model, k: int | None, dense: bool, solver: str) -> None:
    """Refuse, with :class:`TooLargeError`, a solve beyond the limits or the memory available.

    The message suggests only a request that would pass these same limits.
    """
    dim, per_row, have = m.dimension, _row_count(m), float(available_memory())
    top_k = _largest_sparse_k(dim, per_row, have)
    if not dense and k is not None and k > dim - 2:
        raise ValueError(f"the sparse solvers return at most dim - 2 = {dim - 2} eigenvalues")
    if k is None and not dense:
        why = (
            f"dimension {dim} is too large for a full dense solve (limit {DENSE_LIMIT}; it would "
            f"need about {_gib(_dense_bytes(dim, per_row))})"
        )
    elif dense:
        need = _dense_bytes(dim, per_row)
        if need <= have:
            return
        why = (
            f"dimension {dim} needs about {_gib(need)} for a dense solve, but only "
            f"{_gib(have)} is available"
        )
    else:
        assert k is not None
        need = _sparse_bytes(dim, per_row, k)
        if dim <= SPARSE_LIMIT and need <= have:
            return
        why = (
            f"dimension {dim} with about {per_row} non-zeros per row needs about {_gib(need)} "
            f"for the {k} lowest eigenvalues, but only {_gib(have)} is available"
            if dim <= SPARSE_LIMIT
            else f"dimension {dim} is above {SPARSE_LIMIT}, the largest the sparse solver indexes"
        )
    if top_k >= 1:
        hint = f"; pass k=1..{top_k} for the lowest eigenvalues from the sparse solver"
    else:
        hint = (
            "; even the lowest eigenvalue is beyond exact diagonalization here (sparse limit "
            f"dimension {SPARSE_LIMIT}, {_gib(have)} of memory available): the model is too "
            "large for exact diagonalization"
        )
    raise TooLargeError(why + hint)


def _dense_solve(mat: sps.sparray, hermitian: bool) -> tuple[np.ndarray, float, str]:
    """All eigenvalues by LAPACK, with the backward-error estimate ``dim eps ||H||_1``."""
    h = mat.toarray()
    if hermitian:
        vals = np.linalg.eigvalsh((h + h.conj().T) / 2)
        method = "dense-hermitian"
    else:
        vals = np.linalg.eigvals(h)
        method = "dense-general"
    norm1 = float(np.abs(h).sum(axis=0).max()) if h.size else 0.0
    return _sorted(vals, hermitian), h.shape[0] * _EPS * norm1, method


def _sparse_lowest(mat: sps.sparray, k: int, hermitian: bool) -> tuple[np.ndarray, float, str]:
    import scipy.sparse.linalg as spla  # on use: slow to import

    rng = np.random.default_rng(12345)  # fixed start vector: reproducible results
    v0 = rng.standard_normal(mat.shape[0])
    ncv = min(mat.shape[0] - 1, max(2 * k + 1, 24))  # a wider Krylov space: fewer restarts
    if hermitian:
        herm = sps.csr_array((mat + mat.conj().T) / 2)
        if herm.nnz and not np.any(herm.data.imag):
            herm = sps.csr_array(herm.real)  # real arithmetic: half the work
        vals, vecs = spla.eigsh(herm, k=k, which="SA", v0=v0, ncv=ncv)
        method = "sparse-eigsh"
        res = herm @ vecs - vecs * vals[None, :]
    else:
        vals, vecs = spla.eigs(mat.astype(complex), k=k, which="SR", v0=v0.astype(complex))
        method = "sparse-eigs"
        res = mat @ vecs - vecs * vals[None, :]
    error = float(np.linalg.norm(res, axis=0).max())
    return _sorted(vals, hermitian), error, method


def sparse_memory(m: Model, k: int) -> float:
    """Estimated bytes of a sparse solve for the ``k`` lowest levels of ``m`` (matrix and
    Lanczos basis), the estimate :func:`exact_spectrum` compares with the memory available."""
    return _sparse_bytes(m.dimension, _row_count(m), k)


_I_POWERS = np.array([1, 1j, -1, -1j])


def _popcount(a: np.ndarray) -> np.ndarray:
    return np.bitwise_count(a).astype(np.int64)


@dataclass(frozen=True)
class _Pauli:
    """``i^phase X^x Z^z`` on bit-masks of the sites (bit j = site j), with a sector value."""

    x: int
    z: int
    phase: int
    value: int

    def times(self, other: _Pauli) -> _Pauli:
        """The product (``Z^z1 X^x2 = (-1)^{z1.x2} X^x2 Z^z1``), values multiplied."""
        phase = self.phase + other.phase + 2 * (self.z & other.x).bit_count()
        return _Pauli(self.x ^ other.x, self.z ^ other.z, phase % 4, self.value * other.value)


def _masks(g: WeylString, index: dict[Any, int]) -> _Pauli:
    x = z = 0
    for site, a, b in g.factors:
        x |= (a % 2) << index[site]
        z |= (b % 2) << index[site]
    return _Pauli(x, z, g.phase % 4, 1)


def _is_hermitian(mat: Any) -> bool:
    """``mat`` equals its conjugate transpose to 1e-12 of its largest entry."""
    scale = float(abs(mat).max()) if mat.nnz else 0.0
    diff = mat - mat.conj().T
    return (float(abs(diff).max()) if diff.nnz else 0.0) <= 1e-12 * max(scale, 1e-300)


def _exact_result(
    vals: np.ndarray, error: float, method: str, tol: float, dimension: int, hermitian: bool
) -> ExactSpectrum:
    """The eigenvalues found, clustered into levels within ``tol`` (relative), as an immutable
    result (its arrays sit on immutable buffers, like every freeladder result)."""
    scale = max(1.0, float(np.abs(vals).max())) if len(vals) else 1.0
    levels, mult = _cluster(vals, tol * scale)
    return ExactSpectrum(
        levels=readonly_array(levels),
        multiplicities=readonly_array(mult),
        eigenvalues=readonly_array(vals),
        method=method,
        tolerance=tol * scale,
        dimension=dimension,
        complete=len(vals) == dimension,
        hermitian=hermitian,
        error_estimate=float(error),
    )


def _fixed_paulis(m: Model, fixed: Sequence[tuple[WeylString, int]]) -> list[_Pauli]:
    """The fixed strings as bit masks over ``m.sites``, each with its value."""
    index = {site: j for j, site in enumerate(m.sites)}
    out = []
    for g, v in fixed:
        p = _masks(g, index)
        out.append(_Pauli(p.x, p.z, p.phase, int(v)))
    return out


def _split(fixed: list[_Pauli]) -> tuple[list[tuple[int, _Pauli]], list[_Pauli]]:
    """Products of the fixed strings in reduced row-echelon form of their X parts: ``(pivot
    bit, string)`` pairs (each pivot set in its own X part only) and the diagonal ones left."""
    basis: list[tuple[int, _Pauli]] = []
    diagonal: list[_Pauli] = []
    for g in fixed:
        for pivot, e in basis:
            if g.x >> pivot & 1:
                g = g.times(e)
        if g.x == 0:
            diagonal.append(g)
            continue
        pivot = (g.x & -g.x).bit_length() - 1
        basis = [(q, e.times(g) if e.x >> pivot & 1 else e) for q, e in basis]
        basis.append((pivot, g))
    return basis, diagonal


def sector_dimension(m: Model, fixed: Sequence[tuple[WeylString, int]] = ()) -> int:
    """The dimension of the joint eigenspace of commuting Pauli strings with values +-1 (the
    whole dimension for none): ``2^(sites - independent strings)``, 0 when the values
    contradict a relation among the strings.  No matrix is built."""
    if not fixed:
        return m.dimension
    basis, diagonal = _split(_fixed_paulis(m, fixed))
    # representatives have every pivot bit 0: a diagonal string acts through its other bits
    free = (1 << len(m.sites)) - 1
    for q, _ in basis:
        free &= ~(1 << q)
    pivots: dict[int, tuple[int, int]] = {}  # Z parts eliminated over GF(2), with their signs
    for d in diagonal:
        z, sign = d.z & free, (1 - d.phase) * d.value  # sign: (-1)^{z.r} must equal it
        for q, (w, s) in pivots.items():
            if z >> q & 1:
                z, sign = z ^ w, sign * s
        if z == 0:
            if sign != 1:
                return 0
            continue
        pivots[(z & -z).bit_length() - 1] = (z, sign)
    return 2 ** (len(m.sites) - len(basis) - len(pivots))


def _sector_matrix(m: Model, fixed: Sequence[tuple[WeylString, int]]) -> sps.csr_array:
    """H in the symmetry-adapted basis of the joint eigenspace of commuting Pauli strings.

    With the strings' products in row-echelon form of their X parts (``e_j``, pivot bits
    ``q_j``) and the diagonal ones ``d``, a basis state ``|r>`` with every pivot bit 0 and
    ``d |r> = v_d |r>`` stands for ``psi_r ~ prod_j (1 + v_j e_j) |r>`` (the projector onto
    the sector applied to it; never zero, its terms are distinct basis states).  A term maps
    ``|r>`` to ``a |b>``; ``b = h |s>`` up to a phase for the representative ``s`` of ``b``
    and the product ``h`` of the ``e_j`` whose pivots ``b`` holds, and ``P h = v_h P``, so
    the element ``<psi_s| H |psi_r>`` gains ``a v_h / phase``.  The dimension is
    ``2^(sites - independent strings)``, without a matrix of the whole space.
    """
    n = len(m.sites)
    if n > 62:
        raise TooLargeError(f"{n} sites: the sector basis is indexed by 62-bit integers")
    basis, diagonal = _split(_fixed_paulis(m, fixed))
    free_bits = [j for j in range(n) if j not in {q for q, _ in basis}]
    need = 8.0 * 4 * 2 ** len(free_bits)
    if len(free_bits) > 31 or need > available_memory():
        raise TooLargeError(
            f"the sector's basis has 2^{len(free_bits)} candidate states (about {_gib(need)}), "
            f"more than the memory available ({_gib(available_memory())}) allows"
        )
    counter = np.arange(2 ** len(free_bits), dtype=np.int64)
    reps = np.zeros_like(counter)
    for k, bit in enumerate(free_bits):
        reps |= ((counter >> k) & 1) << bit
    del counter
    for d in diagonal:
        if d.phase % 2:
            raise ValueError("the fixed strings multiply to an anti-Hermitian string")
        sign = 1 - d.phase  # i^0 = 1, i^2 = -1
        reps = reps[sign * (1 - 2 * (_popcount(reps & d.z) & 1)) == d.value]
    if len(reps) == 0:
        raise ValueError("no state has these values of the fixed strings: the sector is empty")
    rows, cols, vals = [], [], []
    coup = np.asarray(m.coupling_array(), dtype=complex)
    sa = m.strings
    x_rows, z_rows = sa.x.tocsr(), sa.z.tocsr()
    for t in range(len(coup)):
        x_t = _row_mask(x_rows, t)
        z_t = _row_mask(z_rows, t)
        amp = coup[t] * _I_POWERS[int(sa.phase[t]) % 4] * (1 - 2 * (_popcount(reps & z_t) & 1))
        b = reps ^ x_t
        s = b.copy()
        hz = np.zeros_like(b)
        hx = np.zeros_like(b)
        hp = np.zeros(len(b), dtype=np.int64)
        hv = np.ones(len(b), dtype=np.int64)
        for q, e in basis:  # h = product of the e_j selected, in this order
            sel = (s >> q) & 1 == 1
            hp[sel] += e.phase + 2 * (_popcount(hz[sel] & e.x) & 1)
            hz[sel] ^= e.z
            hx[sel] ^= e.x
            hv[sel] *= e.value
            s[sel] ^= e.x
        # h |s> = i^hp (-1)^{hz . s} |s ^ hx> = phase |b>
        phase = _I_POWERS[hp % 4] * (1 - 2 * (_popcount(hz & s) & 1))
        target = np.searchsorted(reps, s)
        target = np.minimum(target, len(reps) - 1)
        if np.any(reps[target] != s):
            raise ValueError(f"term {t} leaves the sector: the fixed strings are not conserved")
        rows.append(target)
        cols.append(np.arange(len(reps)))
        vals.append(amp * hv / phase)
    dim = len(reps)
    mat = sps.csr_array(
        (np.concatenate(vals), (np.concatenate(rows), np.concatenate(cols))), shape=(dim, dim)
    )
    if m.constant != 0:
        mat = sps.csr_array(mat + complex(m.constant) * sps.identity(dim, format="csr"))
    mat.sum_duplicates()
    mat.eliminate_zeros()
    if mat.nnz and not np.any(mat.data.imag):
        mat = sps.csr_array(mat.real)  # real arithmetic: half the work
    return mat


def _row_mask(mat: sps.csr_array, row: int) -> int:
    lo, hi = mat.indptr[row], mat.indptr[row + 1]
    pairs = zip(mat.indices[lo:hi], mat.data[lo:hi], strict=True)
    return sum((int(v) % 2) << int(j) for j, v in pairs)


def sector_exact_spectrum(
    m: Model,
    k: int,
    fixed: Sequence[tuple[WeylString, int]] = (),
    tol: float = 1e-9,
) -> ExactSpectrum:
    """The ``k`` lowest eigenvalues of H where each conserved string ``g`` has the value ``v``.

    H is written in a basis of the sector itself (symmetry-adapted states: each basis state
    with the projector onto the sector applied), so the matrix has the sector's dimension,
    ``2^(sites - independent strings)``, and no matrix of the whole space is built.  Sectors
    up to dimension :data:`SECTOR_DENSE_LIMIT` are diagonalised densely (every multiplicity exact);
    larger ones by Lanczos (ARPACK), which resolves distinct levels, not multiplicities.

    Parameters
    ----------
    m : Model
        Numeric couplings, N = 2 when ``fixed`` is not empty.
    k : int
        How many lowest eigenvalues.
    fixed : sequence of (WeylString, +1 or -1)
        Hermitian strings that commute with every term and with each other, and their values.
    tol : float
        Clustering tolerance, as in :func:`exact_spectrum`.

    Returns
    -------
    ExactSpectrum
        ``dimension`` is the sector's; ``complete`` when all its eigenvalues were found.

    Raises
    ------
    TooLargeError
        When the estimated memory (:func:`sparse_memory` of the sector) exceeds what is
        available.
    ValueError
        For a string that does not commute with H or with another fixed string, a value other
        than +-1, an empty sector, or ``k`` beyond the sector's dimension.

    References
    ----------
    ARPACK Users' Guide (1998); LAPACK Users' Guide (1999).  Symmetry-adapted bases: common
    practice (A. W. Sandvik, AIP Conf. Proc. 1297, 135 (2010); reference from memory).
    """
    _validate(m, None, tol, "auto")
    for g, v in fixed:
        if v not in (1, -1):
            raise ValueError(f"the value of {g} must be +1 or -1, not {v!r}")
        if any(not g.commutes_with(t) for t in m.strings):
            raise ValueError(f"{g} does not commute with every term: it labels no sector")
        if g.states != 2:
            raise ValueError("sectors of fixed strings are built for N = 2 (Pauli strings)")
        if any(not g.commutes_with(h) for h, _ in fixed):
            raise ValueError(f"{g} does not commute with every other fixed string")
    if fixed:
        mat = _sector_matrix(m, fixed)
        dim = mat.shape[0]
        if not 1 <= k <= dim:
            raise ValueError(f"k must be in 1..{dim} (the sector's dimension), got {k!r}")
        need = _sparse_bytes(dim, max(1, mat.nnz // max(dim, 1)), int(k))
        if dim > DENSE_LIMIT and need > available_memory():
            raise TooLargeError(
                f"the sector of dimension {dim} needs about {_gib(need)} for its {k} lowest "
                f"eigenvalues, but only {_gib(available_memory())} is available"
            )
    else:
        _check_size(m, int(k), m.dimension <= DENSE_LIMIT, "auto")
        mat = sps.csr_array(m.to_sparse())
        dim = mat.shape[0]
        if not 1 <= k <= dim:
            raise ValueError(f"k must be in 1..{dim} (the dimension), got {k!r}")
    hermitian = _is_hermitian(mat)
    if dim <= SECTOR_DENSE_LIMIT or k > dim - 2:
        vals, error, method = _dense_solve(mat, hermitian)
        vals = vals[:k]
    else:
        vals, error, method = _sparse_lowest(mat, int(k), hermitian)
    return _exact_result(vals, error, method, tol, dim, hermitian)


def _sorted(vals: np.ndarray, hermitian: bool) -> np.ndarray:
    if hermitian:
        return np.sort(np.real(vals)).astype(float)
    vals = np.asarray(vals, dtype=complex)
    return vals[np.lexsort((vals.imag, vals.real))]


def _cluster(vals: np.ndarray, tol: float) -> tuple[np.ndarray, np.ndarray]:
    """Group sorted eigenvalues: chains with real-part gaps <= tol, then imaginary-part gaps."""
    if len(vals) == 0:
        return vals.copy(), np.zeros(0, dtype=np.int64)
    levels: list[complex] = []
    counts: list[int] = []
    real_breaks = np.nonzero(np.diff(vals.real) > tol)[0] + 1
    for block in np.split(vals, real_breaks):
        if np.iscomplexobj(block):
            block = block[np.argsort(block.imag, kind="stable")]
            imag_breaks = np.nonzero(np.diff(block.imag) > tol)[0] + 1
            parts = np.split(block, imag_breaks)
        else:
            parts = [block]
        for part in parts:
            levels.append(part.mean())
            counts.append(len(part))
    out = np.array(levels, dtype=vals.dtype)
    mult = np.array(counts, dtype=np.int64)
    if np.iscomplexobj(out):
        order = np.lexsort((out.imag, out.real))
        out, mult = out[order], mult[order]
    return out, mult
