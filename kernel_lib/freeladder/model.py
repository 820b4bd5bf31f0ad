"""The Hamiltonian as data: an immutable list of (coupling, operator string) terms.

``H = constant + sum_j c_j g_j`` with every ``g_j`` normalised so that ``g_j^N = 1`` (any
leftover phase of a string is moved into its coupling, exactly).  Couplings may be ``int``,
``float``, ``complex``, :class:`fractions.Fraction` or sympy expressions.
"""

from __future__ import annotations

import functools
import numbers
from collections.abc import Iterable, Mapping, Sequence
from fractions import Fraction
from typing import Any, NamedTuple

import numpy as np
import sympy

from .printing import format_terms, format_terms_latex
from .strings import StringArray, WeylString, unit_phase

__all__ = [
    "Coupling",
    "Model",
    "Term",
    "check_coupling",
    "is_symbolic",
    "times_phase",
    "to_python_number",
]

Coupling = Any
"""int, float, complex, Fraction or a sympy expression."""


class Term(NamedTuple):
    """One term ``coupling * string`` of a model."""

    coupling: Coupling
    string: WeylString


def is_symbolic(c: Coupling) -> bool:
    """True for a sympy expression that still has free symbols."""
    return isinstance(c, sympy.Basic) and bool(c.free_symbols)


def to_python_number(c: Coupling) -> Coupling:
    """Turn a symbol-free sympy value into int, Fraction, float or complex; leave others alone."""
    if not isinstance(c, sympy.Basic) or c.free_symbols:
        return c
    if c.is_Integer:
        return int(c)
    if c.is_Rational:
        return Fraction(int(c.p), int(c.q))  # type: ignore[attr-defined]
    value = complex(c.evalf(30))
    return value.real if value.imag == 0 else value


def check_coupling(c: Coupling, where: str) -> Coupling:
    """Validate one coupling: a finite number or a sympy expression.

    Raises
    ------
    TypeError
        For values of another type (strings, lists, None ...).
    ValueError
        For NaN or infinite values.
    """
    if isinstance(c, bool) or not isinstance(c, (numbers.Number, sympy.Basic)):
        raise TypeError(f"{where}: coupling {c!r} is not a number or a sympy expression")
    if isinstance(c, sympy.Basic):
        if c.has(sympy.nan, sympy.zoo, sympy.oo, -sympy.oo):
            raise ValueError(f"{where}: coupling {c} is not finite")
        return to_python_number(c)
    if isinstance(c, np.generic):
        c = c.item()
    if isinstance(c, (float, complex)) and not np.isfinite(c):
        raise ValueError(f"{where}: coupling {c!r} is not finite")
    return c


def times_phase(c: Coupling, exponent: int, states: int) -> Coupling:
    """Exactly multiply a coupling by ``w**exponent``, ``w = exp(i pi / states)``."""
    k = exponent % (2 * states)
    if k == 0:
        return c
    if k == states:
        return -c
    if isinstance(c, sympy.Basic):
        return sympy.nsimplify(c * sympy.exp(sympy.I * sympy.pi * k / states))
    return complex(c) * unit_phase(k, states)


class Model:
    """An immutable Hamiltonian ``H = constant + sum_j c_j g_j``.

    Parameters
    ----------
    strings : StringArray
        The normalised strings ``g_j`` (``g_j^N = 1``, canonical phase).
    couplings : sequence
        One coupling per string.
    constant : coupling, optional
        Multiple of the identity.

    Notes
    -----
    Build models with :meth:`from_terms`, :func:`freeladder.parse_model` or a builder such as
    :func:`freeladder.exclusion_chain`; they normalise the strings and merge repeated strings.
    The direct constructor trusts its input (used by builders that create large chains).
    """

    __slots__ = ("strings", "couplings", "constant", "__dict__")
    strings: StringArray
    couplings: tuple[Coupling, ...]
    constant: Coupling

    def __init__(self, strings: StringArray, couplings: Sequence[Coupling], constant: Coupling = 0):
        if len(couplings) != len(strings):
            raise ValueError(f"{len(couplings)} couplings for {len(strings)} strings")
        object.__setattr__(self, "strings", strings)
        object.__setattr__(self, "couplings", tuple(couplings))
        object.__setattr__(self, "constant", constant)

    def __setattr__(self, name: str, value: Any) -> None:
        raise AttributeError("Model is immutable; use with_couplings() or subs()")

    # -- construction -----------------------------------------------------------------------------
    @classmethod
    def from_terms(
        cls,
        terms: Iterable[tuple[Coupling, WeylString]],
        states: int | None = None,
        sites: Sequence[Any] | None = None,
        constant: Coupling = 0,
    ) -> Model:
        """Build a model from ``(coupling, string)`` pairs.

        Each string is normalised to ``g^N = 1`` with its leftover phase moved exactly into the
        coupling; identity strings add to ``constant``; a string that occurs again adds its
        coupling to the first occurrence (terms keep the order of first occurrence).

        Raises
        ------
        ValueError
            For mixed N, non-finite couplings, or an empty model with no ``states``.
        """
        merged: dict[tuple, list] = {}
        order: list[tuple] = []
        const = check_coupling(constant, "constant")
        for idx, (c, g) in enumerate(terms):
            c = check_coupling(c, f"term {idx}")
            if states is None:
                states = g.states
            if g.states != states:
                raise ValueError(f"term {idx}: N = {g.states} but the model has N = {states}")
            g, e = g.normalized()
            c = times_phase(c, e, states)
            if not g.factors:
                const = const + c
                continue
            key = g.factors
            if key in merged:
                merged[key][0] = merged[key][0] + c
            else:
                merged[key] = [c, g]
                order.append(key)
        if states is None:
            raise ValueError("a model without terms needs states=N")
        strings = [merged[k][1] for k in order]
        couplings = [
            to_python_number(sympy.expand(c)) if isinstance(c, sympy.Basic) else c
            for c in (merged[k][0] for k in order)
        ]
        if sites is None:
            sites = sorted({s for g in strings for s in g.support})
        else:
            sites = list(sites)
            if len(set(sites)) != len(sites):
                raise ValueError("the site list has repeated labels")
        arr = StringArray.from_strings(strings, sites, states)
        return cls(arr, couplings, to_python_number(const))

    # -- basic structure --------------------------------------------------------------------------
    @property
    def states(self) -> int:
        """N, the number of states per site."""
        return self.strings.states

    @property
    def sites(self) -> tuple[Any, ...]:
        """Site labels, in the order of the tensor product (first = most significant)."""
        return self.strings.sites

    @property
    def dimension(self) -> int:
        """Hilbert-space dimension ``N ** len(sites)``."""
        return self.states ** len(self.sites)

    def __len__(self) -> int:
        return len(self.couplings)

    @property
    def terms(self) -> tuple[Term, ...]:
        """The terms as ``(coupling, WeylString)`` pairs."""
        return tuple(Term(c, self.strings[j]) for j, c in enumerate(self.couplings))

    def term(self, j: int) -> Term:
        """Term ``j``."""
        return Term(self.couplings[j], self.strings[j])

    @functools.cached_property
    def symbols(self) -> frozenset[sympy.Symbol]:
        """Free sympy symbols among the couplings and the constant."""
        out: set[sympy.Symbol] = set()
        for c in (*self.couplings, self.constant):
            if isinstance(c, sympy.Basic):
                out |= c.free_symbols  # type: ignore[arg-type]
        return frozenset(out)

    @property
    def is_symbolic(self) -> bool:
        """True when some coupling has free symbols."""
        return bool(self.symbols)

    def coupling_array(self) -> np.ndarray:
        """Couplings as a numpy array (float when all real, else complex).

        Raises
        ------
        ValueError
            If a coupling is symbolic; call :meth:`subs` first.
        """
        if self.is_symbolic:
            names = ", ".join(sorted(str(s) for s in self.symbols))
            raise ValueError(
                f"the model has symbolic couplings ({names}); use m.subs({{...}}) first"
            )
        vals = np.array([complex(c) for c in self.couplings], dtype=np.complex128)
        if np.all(vals.imag == 0):
            return vals.real.copy()
        return vals

    # -- new models ------------------------------------------------------------------------------
    def with_couplings(
        self, couplings: Sequence[Coupling], constant: Coupling | None = None
    ) -> Model:
        """The same strings with new couplings (one per term)."""
        couplings = list(couplings)
        if len(couplings) != len(self):
            raise ValueError(f"{len(couplings)} couplings given for a model of {len(self)} terms")
        checked = [check_coupling(c, f"term {j}") for j, c in enumerate(couplings)]
        const = self.constant if constant is None else check_coupling(constant, "constant")
        return Model(self.strings, checked, const)

    def subs(self, values: Mapping[Any, Any]) -> Model:
        """Substitute values for symbols (keys may be sympy symbols or their names)."""
        mapping = {}
        by_name = {str(s): s for s in self.symbols}
        for k, v in values.items():
            key = by_name.get(k, k) if isinstance(k, str) else k
            if isinstance(k, str) and k not in by_name:
                raise KeyError(f"the model has no symbol named {k!r}; it has {sorted(by_name)}")
            mapping[key] = v

        def sub(c: Coupling) -> Coupling:
            if isinstance(c, sympy.Basic):
                return c.subs(mapping)
            return c

        return self.with_couplings([sub(c) for c in self.couplings], sub(self.constant))

    # -- matrices and printing ---------------------------------------------------------------------
    def to_sparse(self) -> Any:
        """The Hamiltonian as a scipy.sparse matrix on :attr:`sites` (numeric couplings only)."""
        mat = self.strings.to_sparse(self.coupling_array())
        c = complex(to_python_number(self.constant)) if self.constant != 0 else 0
        if c != 0:
            import scipy.sparse as sps

            mat = mat + c * sps.identity(mat.shape[0], format="csr")
        return mat

    def __repr__(self) -> str:
        text = format_terms(self.terms, self.constant)
        if len(text) > 400:
            text = text[:400] + " ..."
        return f"Model(N={self.states}, terms={len(self)}, sites={len(self.sites)}: {text})"

    def __str__(self) -> str:
        return format_terms(self.terms, self.constant)

    def _repr_latex_(self) -> str:
        return "$" + format_terms_latex(self.terms, self.constant) + "$"
