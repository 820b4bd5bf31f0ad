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

import html
import os
from dataclasses import dataclass

import numpy as np
import scipy.sparse as sps
import scipy.sparse.linalg as spla

from .model import Model

__all__ = ["DENSE_LIMIT", "ExactSpectrum", "exact_spectrum"]

DENSE_LIMIT = 4096
"""Largest dimension diagonalised densely."""

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

    def __repr__(self) -> str:
        shown = ", ".join(
            f"{_num(v)} (x{int(d)})"
            for v, d in zip(self.levels[:8], self.multiplicities[:8], strict=True)
        )
        more = f", ... {len(self.levels) - 8} more" if len(self.levels) > 8 else ""
        part = "all" if self.complete else f"lowest {len(self.eigenvalues)}"
        return (
            f"ExactSpectrum(dimension={self.dimension}, {part} eigenvalues, {self.method}, "
            f"levels: {shown}{more}; clustering tolerance {self.tolerance:.2g}, "
            f"error estimate {self.error_estimate:.2g})"
        )

    def _repr_html_(self) -> str:
        rows = "".join(
            f"<tr><td>{html.escape(_num(v))}</td><td>{int(d)}</td></tr>"
            for v, d in zip(self.levels[:30], self.multiplicities[:30], strict=True)
        )
        more = (
            f"<tr><td colspan='2'>... {len(self.levels) - 30} more levels</td></tr>"
            if len(self.levels) > 30
            else ""
        )
        part = "all" if self.complete else f"the lowest {len(self.eigenvalues)}"
        return (
            f"<div><b>Exact spectrum</b>: {part} of {self.dimension} eigenvalues "
            f"({html.escape(self.method)}); levels clustered within {self.tolerance:.2g}; "
            f"error estimate {self.error_estimate:.2g}"
            f"<table><tr><th>level</th><th>multiplicity</th></tr>{rows}{more}</table></div>"
        )


def _num(v: complex | float) -> str:
    v = complex(v)
    if v.imag == 0:
        return f"{v.real:.10g}"
    return f"{v.real:.10g}{v.imag:+.10g}j"


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
        If the couplings are symbolic (substitute values with ``m.subs`` first); if ``k`` is
        None and the dimension exceeds :data:`DENSE_LIMIT`; if ``k`` is not in ``1..dim``
        (``1..dim - 2`` for the sparse solvers); or if the estimated memory exceeds what is
        available.

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
    dense = solver == "dense" or (solver == "auto" and dim <= DENSE_LIMIT)
    per_row = _row_count(m)
    sparse_bytes = 64.0 * dim * per_row  # build temporaries (rows, cols, complex data) and CSR
    if solver == "auto" and not dense and k is None:
        raise ValueError(
            f"dimension {dim} is too large for a full dense solve (limit {DENSE_LIMIT}; it would "
            f"need about {_gib(3 * 16.0 * dim**2)}); pass k=... to get the k lowest eigenvalues "
            "from the sparse solver"
        )
    if not dense and k is not None and k > dim - 2:
        raise ValueError(f"the sparse solvers return at most dim - 2 = {dim - 2} eigenvalues")
    lanczos_bytes = 16.0 * dim * (2 * (k or 1) + 40)
    need = 3 * 16.0 * dim**2 + sparse_bytes if dense else sparse_bytes + lanczos_bytes
    have = available_memory()
    if need > have or dim > 2**31:
        raise ValueError(
            f"dimension {dim} with about {per_row} non-zeros per row needs about {_gib(need)}, "
            f"but only {_gib(have)} is available: the model is too large for exact "
            "diagonalization"
        )
    mat = m.to_sparse()
    scale_h = float(abs(mat).max()) if mat.nnz else 0.0
    diff = mat - mat.conj().T
    hermitian = (float(abs(diff).max()) if diff.nnz else 0.0) <= 1e-12 * max(scale_h, 1e-300)
    if dense:
        h = mat.toarray()
        if hermitian:
            h = (h + h.conj().T) / 2
            vals = np.linalg.eigvalsh(h)
            method = "dense-hermitian"
        else:
            vals = np.linalg.eigvals(h)
            method = "dense-general"
        norm1 = float(np.abs(h).sum(axis=0).max()) if dim else 0.0
        error = dim * _EPS * norm1
        vals = _sorted(vals, hermitian)
        if k is not None:
            vals = vals[:k]
    else:
        assert k is not None
        vals, error, method = _sparse_lowest(mat, k, hermitian)
    scale = max(1.0, float(np.abs(vals).max())) if len(vals) else 1.0
    levels, mult = _cluster(vals, tol * scale)
    for arr in (levels, mult, vals):
        arr.setflags(write=False)  # the result is immutable, like every freeladder object
    return ExactSpectrum(
        levels=levels,
        multiplicities=mult,
        eigenvalues=vals,
        method=method,
        tolerance=tol * scale,
        dimension=dim,
        complete=len(vals) == dim,
        hermitian=hermitian,
        error_estimate=float(error),
    )


def _sparse_lowest(mat: sps.sparray, k: int, hermitian: bool) -> tuple[np.ndarray, float, str]:
    rng = np.random.default_rng(12345)  # fixed start vector: reproducible results
    v0 = rng.standard_normal(mat.shape[0])
    if hermitian:
        herm = (mat + mat.conj().T) / 2
        vals, vecs = spla.eigsh(herm, k=k, which="SA", v0=v0)
        method = "sparse-eigsh"
        res = herm @ vecs - vecs * vals[None, :]
    else:
        vals, vecs = spla.eigs(mat.astype(complex), k=k, which="SR", v0=v0.astype(complex))
        method = "sparse-eigs"
        res = mat @ vecs - vecs * vals[None, :]
    error = float(np.linalg.norm(res, axis=0).max())
    return _sorted(vals, hermitian), error, method


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
