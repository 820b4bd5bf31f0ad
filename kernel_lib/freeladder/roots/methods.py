"""The table of root methods, and the routes that :func:`freeladder.free_spectrum` takes.

``ROOT_METHODS`` maps a method name to a :class:`RootMethod` (what it applies to, whether its
bounds are proofs, the function).  Every method returns a
:class:`~freeladder.RootTable`.

=================== ============== ========= ==================================================
name                applies to     rigorous  how
=================== ============== ========= ==================================================
``chain-count``     real chain     no        count bisection + Laguerre on the ratio recurrence
``chain-certified`` real chain     yes       ``chain-count``, then interval sign tests at both
                                             ends of each root's interval (fixed precision)
``chain-aberth``    complex chain  no        Aberth-Ehrlich on the recurrence, inclusion discs
``exact-certified`` any graph      yes       exact polynomial, certified isolating balls
=================== ============== ========= ==================================================

Scale invariance: before a chain method runs, the couplings are divided by the power of two
just above their largest magnitude (an exact operation), so relative accuracy does not depend
on their overall scale.  The result is scaled back (exactly) when float64 holds the true
roots; otherwise it stays scaled and records the scale in ``weight_log2``.

References
----------
F. C. Alcaraz and R. A. Pimenta, Phys. Rev. B 102, 121101(R) (2020), arXiv:2005.14622 (the
chain recurrence); M. Chudnovsky and P. Seymour, J. Combin. Theory Ser. B 97, 350 (2007)
(real roots for claw-free graphs); O. Aberth, Math. Comp. 27, 339 (1973);
F. Johansson, IEEE Trans. Comput. 66, 1281 (2017) (arb).
"""

from __future__ import annotations

import dataclasses
from collections.abc import Callable, Mapping
from dataclasses import dataclass
from fractions import Fraction
from types import MappingProxyType
from typing import TYPE_CHECKING, Any, Literal

import numpy as np

from ..algebra.model import Model
from .certify import certified_roots, certify_chain_roots
from .complex import aberth_chain_roots
from .polynomial import MAX_ROOT_DEGREE, exclusion_polynomial
from .real import chain_back, chain_real_roots, chain_root_count, fixed_reach
from .result import RootTable

if TYPE_CHECKING:
    import flint
else:
    from ..base.lazy import flint

__all__ = [
    "ROOT_METHODS",
    "RootMethod",
    "choose_method",
    "exact_polynomial_roots",
    "scaled_weights",
    "solve_chain",
    "solve_general",
]

_TINY = float(np.finfo(np.float64).tiny)
_EPS = float(np.finfo(np.float64).eps)


@dataclass(frozen=True)
class RootMethod:
    """One entry of :data:`ROOT_METHODS`.

    Attributes
    ----------
    name : str
    applies_to : "real chain", "complex chain" or "any graph"
    rigorous : bool
        The method's error bounds are proofs (when it reports success).
    description : str
    solve : callable
        Chain methods: ``solve(weights, reach, states, lowest, couplings)`` (reach an int or
        a back-reach array, :func:`freeladder.roots.real.chain_back`) with the scaled
        couplings whose N-th powers the weights are (for the certificate);
        ``exact-certified``: ``solve(model)``.
    """

    name: str
    applies_to: Literal["real chain", "complex chain", "any graph"]
    rigorous: bool
    description: str
    solve: Callable[..., RootTable]


def _count(w: np.ndarray, reach: Any, states: int, lowest: int | None, c: Any) -> RootTable:
    return chain_real_roots(w, reach, lowest=lowest)


def _certified(w: np.ndarray, reach: Any, states: int, lowest: int | None, c: Any) -> RootTable:
    """All roots (the proof needs all S intervals), certified; then the ``lowest`` kept.

    With the couplings ``c`` given, the proof covers the exact weights ``c**N`` (one rounding
    away from ``w``: the float stage takes one ulp around each, the arb stage the exact power).
    Fixed reach only, and roots inside float64's range only (the sign test runs on float64
    end points); anything else raises ``ValueError`` naming the exact route.
    """
    if np.ndim(reach) != 0:
        p = fixed_reach(chain_back(reach, w.size))
        if p is None:
            raise ValueError(
                "the certified chain method handles fixed reach only; a chain of variable "
                "reach (an indifference ordering) is certified through the exact polynomial "
                "(solve_general(model), method 'exact-certified')"
            )
        reach = p
    found = chain_real_roots(w, reach)
    if np.any(found.exponents != 0):
        raise ValueError(
            "some roots lie beyond float64's range, where the float64 / arb sign test of the "
            "certificate does not run; use method 'fast' (error estimates) for this chain"
        )
    bounds = None if c is None else (np.nextafter(w, 0.0), np.nextafter(w, np.inf))
    enc = certify_chain_roots(
        w,
        reach,
        found.values,
        found.error_bounds,
        indices=found.indices,
        weight_bounds=bounds,
        power_of=None if c is None else (c, states),
    )
    keep = slice(None) if lowest is None else slice(max(0, enc.count - int(lowest)), None)
    details = {k: (v[keep] if isinstance(v, np.ndarray) else v) for k, v in enc.details.items()}
    details["finder"] = found.summary()
    return dataclasses.replace(
        enc,
        values=enc.values[keep],
        error_bounds=enc.error_bounds[keep],
        indices=enc.indices[keep],
        evaluations=enc.evaluations + found.evaluations,
        sweeps=found.sweeps,
        details=details,
    )


def _aberth(w: np.ndarray, reach: Any, states: int, lowest: int | None, c: Any) -> RootTable:
    return aberth_chain_roots(w, reach, order=states, lowest=lowest)


def exact_polynomial_roots(m: Model) -> RootTable:
    """Certified roots of the model's exact exclusion polynomial (any frustration graph).

    Raises ``ValueError`` when the roots cannot be isolated at bounded precision, or when the
    polynomial has a root at ``y = 0`` or lost degree.
    """
    poly = exclusion_polynomial(m)
    re_parts, im_parts = poly.exact_parts()
    top = max((s for s in range(len(re_parts)) if re_parts[s] or im_parts[s]), default=0)
    if top < poly.degree:
        raise ValueError(
            f"the exclusion polynomial's coefficients of degree {top + 1}..{poly.degree} cancel "
            f"exactly, so {poly.degree - top} quasi-energies are exactly 0; the certified route "
            "isolates the roots of P only (none at infinity): method='auto' returns all of them"
        )
    found = certified_roots(re_parts, im_parts).repeated()
    if np.any(found.values == 0) or found.count != poly.degree:
        raise ValueError(
            "the exclusion polynomial has a root at y = 0 or lost degree; P(0) must be 1"
        )
    return dataclasses.replace(
        found, details=dict(found.details, polynomial=f"exact exclusion polynomial ({poly.kind})")
    )


ROOT_METHODS: Mapping[str, RootMethod] = MappingProxyType(
    {
        "chain-count": RootMethod(
            "chain-count",
            "real chain",
            False,
            "count bisection + Laguerre steps on the ratio recurrence (error estimates)",
            _count,
        ),
        "chain-certified": RootMethod(
            "chain-certified",
            "real chain",
            True,
            "chain-count, then outward-rounded interval sign tests of P at both ends of each "
            "root's interval plus the root count (proved enclosures)",
            _certified,
        ),
        "chain-aberth": RootMethod(
            "chain-aberth",
            "complex chain",
            False,
            "Aberth-Ehrlich iteration on the recurrence, inclusion discs (error estimates)",
            _aberth,
        ),
        "exact-certified": RootMethod(
            "exact-certified",
            "any graph",
            True,
            "certified isolating balls of the exact polynomial (python-flint)",
            exact_polynomial_roots,
        ),
    }
)


def choose_method(kind: Literal["real chain", "complex chain", "any graph"], method: str) -> str:
    """The table key for a problem kind and a user method ``"auto"``, ``"fast"``,
    ``"certified"`` or a table key.

    Raises ``ValueError`` for an unknown method or one that does not apply to ``kind``.
    """
    named = {
        "real chain": {
            "auto": "chain-count",
            "fast": "chain-count",
            "certified": "chain-certified",
        },
        "complex chain": {
            "auto": "chain-aberth",
            "fast": "chain-aberth",
            "certified": "exact-certified",
        },
        "any graph": {"auto": "exact-certified", "certified": "exact-certified"},
    }[kind]
    key = named.get(method, method)
    entry = ROOT_METHODS.get(key)
    if entry is None or (entry.applies_to != kind and entry.applies_to != "any graph"):
        allowed = sorted(
            set(named) | {k for k, v in ROOT_METHODS.items() if v.applies_to in (kind, "any graph")}
        )
        raise ValueError(f"method {method!r} does not apply to a {kind}; choose one of {allowed}")
    return key


def scaled_weights(couplings: Any, states: int) -> tuple[np.ndarray, np.ndarray, int]:
    """Scaled couplings ``c / 2**e`` (exact), weights ``(c / 2**e)**N`` and ``N e``.

    ``2**e`` is the power of two just above ``max |c|``.

    The division by a power of two is exact; the weights' largest magnitude lies in
    ``[2**-N, 1)``.  Raises ``ValueError`` when a non-zero coupling's weight falls below the
    float64 range relative to the largest (couplings spanning more than about ``2**(1022/N)``).
    """
    c = np.asarray(couplings)
    if c.ndim != 1 or c.size == 0:
        raise ValueError("couplings must be a non-empty 1-d array")
    if not np.all(np.isfinite(c)):
        bad = int(np.nonzero(~np.isfinite(c))[0][0])
        raise ValueError(f"coupling {bad} is {c[bad]!r}, not finite")
    top = float(np.max(np.abs(c)))
    if top == 0:
        raise ValueError("every coupling is zero: no quasi-energies")
    e = int(np.frexp(top)[1])
    if np.iscomplexobj(c):
        cs = np.ldexp(c.real, -e) + 1j * np.ldexp(c.imag, -e)
    else:
        cs = np.ldexp(np.asarray(c, dtype=np.float64), -e)
    w = cs ** int(states)
    lost = np.nonzero((np.abs(w) < _TINY) & (c != 0))[0]
    if lost.size:
        j = int(lost[0])
        raise ValueError(
            f"coupling {j} ({c[j]!r}) is smaller than the largest ({top:.3g}) by more than "
            f"float64 can hold in its weight c^{states} relative to the others; its effect on "
            "the quasi-energies is below float precision -- remove the term or rescale it"
        )
    return cs, w, int(states) * e


def solve_chain(
    couplings: Any,
    reach: Any,
    states: int,
    method: str = "auto",
    lowest: int | None = None,
    *,
    allow_unconverged: bool = False,
) -> RootTable:
    """Roots of an exclusion chain's polynomial from its couplings in chain order.

    ``reach`` is an int p >= 1 or a back-reach array (position k's earlier neighbours are
    positions ``k - back[k] .. k - 1``: an indifference ordering, any number of components
    one after another; :func:`freeladder.roots.real.chain_back`).  Real positive weights (N = 2,
    real couplings) take a real-chain method, anything else the complex-chain one;
    ``method`` is ``"auto"``, ``"fast"``, ``"certified"`` or a key of :data:`ROOT_METHODS`.
    The couplings are scaled first (see :func:`scaled_weights`); the result is in true units
    unless they over- or underflow (then ``weight_log2`` and ``exponents`` say how it is
    scaled).  Raises ``ValueError`` when a rigorous method cannot prove its bounds (never a
    silent pass), and ``ArithmeticError`` when the roots did not converge unless
    ``allow_unconverged`` (a non-converged quasi-energy is hard to miss).
    ``exact-certified`` needs the model: use :func:`solve_general` for it.
    """
    c = np.asarray(couplings)
    cs, w, weight_log2 = scaled_weights(c, states)
    parts = _components(w, reach)
    real = int(states) == 2 and not np.iscomplexobj(c) and bool(np.all(w[w != 0] > 0))
    key = choose_method("real chain" if real else "complex chain", method)
    if key == "exact-certified":
        raise ValueError(
            "these couplings have complex or negative weights, whose roots the chain methods "
            "do not certify; the certified route is the exact polynomial of the model "
            "(free_spectrum(model, method='certified'))"
        )
    dtype = float if real else complex
    pieces = []
    for idx, back in parts:
        piece = ROOT_METHODS[key].solve(
            np.asarray(w[idx], dtype=dtype), back, states, lowest, cs[idx] if real else None
        )
        if not piece.converged and not real:
            piece = _exact_chain_roots(cs[idx], back, states, lowest, piece)
        pieces.append(piece)
    found = pieces[0] if len(pieces) == 1 else _merged(pieces, lowest)
    if ROOT_METHODS[key].rigorous and not found.rigorous:
        raise ValueError(f"the chain roots could not be certified ({key}): {found.message}")
    if not found.converged and not allow_unconverged:
        raise ArithmeticError(
            f"the chain roots did not converge ({key}): {found.message}; no quasi-energy is "
            "returned rather than one with an unbounded error (allow_unconverged=True returns "
            "the result, marked converged=False). Repeated roots (an exceptional point of "
            "complex couplings) stall the iteration; a component of degree up to "
            f"{MAX_ROOT_DEGREE} is then solved exactly, larger ones are not"
        )
    found = dataclasses.replace(found, weight_log2=found.weight_log2 + weight_log2)
    return _unscaled(found)


def _exact_chain_roots(
    cs: np.ndarray, back: Any, states: int, lowest: int | None, failed: RootTable
) -> RootTable:
    """The roots of one component's exact polynomial, as reciprocal roots ``x`` (proved).

    ``cs`` are the scaled couplings (exact binary fractions); the weights ``cs**states`` and
    the recurrence ``P_k = P_{k-1} - y w_k P_{k-back[k]-1}`` run in Gaussian rationals
    (pairs of python-flint ``fmpq_poly``).  ``failed`` is the iteration's result, returned
    unchanged when the degree is above :data:`MAX_ROOT_DEGREE` or the isolation fails.
    """
    b = chain_back(back, cs.size)
    degree = chain_root_count(cs.size, b)
    if degree > MAX_ROOT_DEGREE:
        return failed
    zero = flint.fmpq_poly([0])
    one = flint.fmpq_poly([1])
    y = flint.fmpq_poly([0, 1])
    history: list[tuple[Any, Any]] = []
    for k, c in enumerate(complex(v) for v in cs):
        u, v = flint.fmpq(1), flint.fmpq(0)
        a, bb = Fraction(c.real), Fraction(c.imag)
        cr = flint.fmpq(a.numerator, a.denominator)
        ci = flint.fmpq(bb.numerator, bb.denominator)
        for _ in range(int(states)):
            u, v = u * cr - v * ci, u * ci + v * cr
        prev = history[k - 1] if k >= 1 else (one, zero)
        far = history[k - int(b[k]) - 1] if k - int(b[k]) - 1 >= 0 else (one, zero)
        history.append(
            (
                prev[0] - y * (u * far[0] - v * far[1]),
                prev[1] - y * (u * far[1] + v * far[0]),
            )
        )
    re_p, im_p = history[-1]
    size = max(re_p.degree(), im_p.degree()) + 1
    re_c = [re_p[j] for j in range(size)]
    im_c = [im_p[j] for j in range(size)]
    try:
        exact = certified_roots(re_c, im_c).repeated()
    except ValueError:
        return failed
    if exact.count != degree or np.any(exact.values == 0):
        return failed
    yv = exact.values
    r = exact.error_bounds
    ay = np.abs(yv)
    with np.errstate(divide="ignore", invalid="ignore"):
        x = 1.0 / yv
        # |1/y - 1/y0| <= r / (|y0| (|y0| - r)), plus the rounding of 1/y0 (4 ulp)
        bound = np.where(r < ay, r / (ay * (ay - r)), np.inf) + 4 * _EPS * np.abs(x)
    order = np.lexsort((np.angle(x), np.abs(x)))
    if lowest is not None:
        order = order[: int(lowest)]
    mult = exact.details["multiplicity"]
    repeated = int(np.sum(mult > 1))
    return RootTable(
        values=x[order],
        error_bounds=bound[order],
        variable="x",
        rigorous=True,
        converged=True,
        message=(
            f"the iteration did not converge ({failed.message}); the exact polynomial of "
            f"the couplings was solved instead: {exact.message}"
            + (f", {repeated} listed values belong to repeated roots" if repeated else "")
        ),
        method="exact-certified",
        evaluations=failed.evaluations,
        count=degree,
        sweeps=failed.sweeps,
        indices=np.arange(order.size),
        details={
            "multiplicity": mult[order],
            "precision": exact.details["precision"],
            "polynomial": "exact chain polynomial of the couplings (Gaussian rationals; "
            "the Aberth iteration did not converge)",
            "iteration": failed.summary(),
        },
    )


def _components(w: np.ndarray, reach: Any) -> list[tuple[np.ndarray, Any]]:
    """The chain without its zero-weight terms, cut into connected pieces.

    A term with coupling 0 drops out of the polynomial (its weight multiplies every monomial
    holding it), and what remains may fall apart: a zero in a chain of reach 1 splits it.
    Each piece is ``(term positions, reach)``: the original reach when the piece is the whole
    chain, else its back-reach array (each kept term's earlier kept neighbours, re-counted).
    Solving the pieces apart keeps equal pieces from handing the root finder the double roots
    of their product.
    """
    back = chain_back(reach, w.size)
    keep = w != 0
    if np.all(keep):
        starts = np.nonzero(back[1:] == 0)[0] + 1
        if starts.size == 0:
            return [(np.arange(w.size), reach)]
        positions = np.arange(w.size)
    else:
        kept_before = np.concatenate([[0], np.cumsum(keep)])
        k = np.arange(w.size)
        back = (kept_before[k] - kept_before[k - back])[keep]
        positions = np.nonzero(keep)[0]
        starts = np.nonzero(back[1:] == 0)[0] + 1
    bounds = np.concatenate([[0], starts, [positions.size]])
    return [
        (positions[a:b], back[a:b])
        for a, b in zip(bounds[:-1].tolist(), bounds[1:].tolist(), strict=True)
        if b > a
    ]


def _merged(pieces: list[RootTable], lowest: int | None) -> RootTable:
    """One result from the roots of independent pieces (their polynomial is the product)."""
    first = pieces[0]
    values = np.concatenate([p.values for p in pieces])
    mult = np.concatenate([_listed_multiplicity(p) for p in pieces])
    bounds = np.concatenate([p.error_bounds for p in pieces])
    exponents = np.concatenate([p.exponents for p in pieces])
    with np.errstate(divide="ignore"):
        size = np.log2(np.abs(values).astype(float)) + exponents
    # ascending y for real chains, by modulus of x otherwise; the lowest quasi-energies are
    # the largest y, the smallest |x|
    order = np.argsort(size, kind="stable")
    count = sum(p.count for p in pieces)
    if lowest is not None and int(lowest) < order.size:
        order = order[-int(lowest) :] if first.variable == "y" else order[: int(lowest)]
    start = count - order.size if first.variable == "y" else 0
    return RootTable(
        values=values[order],
        error_bounds=bounds[order],
        variable=first.variable,
        rigorous=all(p.rigorous for p in pieces),
        converged=all(p.converged for p in pieces),
        message=f"{len(pieces)} independent pieces (zero couplings or separate components): "
        + "; ".join(p.message for p in pieces if p.message),
        method=next((p.method for p in pieces if not p.rigorous), first.method),
        evaluations=sum(p.evaluations for p in pieces),
        count=count,
        sweeps=sum(p.sweeps for p in pieces),
        indices=np.arange(start, start + order.size, dtype=np.int64),
        details={"pieces": len(pieces), "multiplicity": mult[order]},
        exponents=exponents[order],
    )


def _listed_multiplicity(found: RootTable) -> np.ndarray:
    """Per listed value, the multiplicity of its root (``details["multiplicity"]``, else 1)."""
    mult = found.details.get("multiplicity")
    return np.ones(found.values.size, dtype=np.int64) if mult is None else np.asarray(mult)


def _unscaled(found: RootTable) -> RootTable:
    """The result in true units (``weight_log2 = 0``) when float64 holds it without loss."""
    if found.weight_log2 == 0 and not np.any(found.exponents != 0):
        return found
    values, bounds = found.true_values()
    tiny = np.finfo(np.float64).tiny
    lossless = (
        np.all(np.isfinite(values))
        and np.all(np.isfinite(bounds))
        and np.all(np.abs(values) >= tiny)
        and np.all((bounds >= tiny) | (found.error_bounds == 0))
    )
    if not lossless:
        return found
    return dataclasses.replace(
        found,
        values=values,
        error_bounds=bounds,
        weight_log2=0,
        exponents=np.zeros(values.size, dtype=np.int64),
    )


def solve_general(m: Model, method: str = "auto") -> RootTable:
    """Roots for any frustration graph through the exact polynomial (``exact-certified``)."""
    key = choose_method("any graph", method)
    return ROOT_METHODS[key].solve(m)


def provenance(found: RootTable) -> dict[str, Any]:
    """The provenance entries :func:`freeladder.free_spectrum` records for a root result."""
    paths = {
        "chain-count": "real roots of the chain recurrence (count bisection + Laguerre steps)",
        "chain-certified": "real roots of the chain recurrence (count bisection + Laguerre "
        "steps); certified by interval sign changes at fixed precision",
        "chain-aberth": "Aberth-Ehrlich iteration on the chain recurrence (complex plane)",
        "exact-certified": f"{found.details.get('polynomial', 'exact exclusion polynomial')}, "
        "certified roots (python-flint)",
    }
    # What each root's error bound is, said once (the method itself is in ``path``).
    proved = {
        "chain-certified": "outward-rounded interval sign tests of P at both ends of each "
        "root's interval, with the root count",
        "exact-certified": "radii of python-flint's certified isolating balls",
    }
    estimated = {
        "chain-count": "the last Laguerre step or half the final bisection bracket, at least "
        "sqrt(M) eps relative",
        "chain-aberth": "Weierstrass inclusion-disc radii plus an estimate of the rounding error",
    }
    if found.rigorous:
        bounds = f"proved enclosures: {proved[found.method]}"
    else:
        how = estimated.get(found.method, f"the certificate did not hold ({found.message})")
        bounds = f"error estimates, not proofs: {how}"
    return {
        "method": "certified" if found.rigorous else "fast",
        "root_method": found.method,
        "path": paths[found.method],
        "sweeps": found.sweeps,
        "evaluations": found.evaluations,
        "converged": found.converged,
        "rigorous": found.rigorous,
        "message": found.message,
        "count": found.count,
        "bounds": bounds,
        "roots": found,
    }
