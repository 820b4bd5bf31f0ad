"""The Hamiltonian as data: an immutable list of (coupling, operator string) terms.

``H = constant + sum_j c_j g_j`` with every ``g_j`` normalised so that ``g_j^N = 1`` (any
leftover phase of a string is moved into its coupling, exactly).  Couplings may be ``int``,
``float``, ``complex``, :class:`fractions.Fraction` (a finite ``Decimal`` becomes one), numpy
scalars or sympy expressions; they are checked where they enter (:mod:`freeladder.base.scalars`),
and text is never read as a value.  Exact integers may be arbitrarily large; the
floating-point numerics (:meth:`Model.coupling_array`, matrices) refuse, by term, a value that
does not fit a float.
"""

from __future__ import annotations

import functools
from collections.abc import Iterable, Mapping, Sequence
from typing import TYPE_CHECKING, Any, NamedTuple

import numpy as np

from ..base import display
from ..base.interrupt import polled
from ..base.jsonready import json_ready
from ..base.scalars import (
    MAX_EXPANDED_TERMS,
    as_complex,
    check_scalar,
    expand_exact,
    is_exact_scalar,
    substitute,
    substitution_map,
    to_python_number,
    to_sympy,
)
from .printing import coefficient_text, format_terms, format_terms_latex
from .strings import StringArray, WeylString, check_states, unit_phase

if TYPE_CHECKING:
    import sympy
else:
    from ..base.lazy import sympy

__all__ = ["Coupling", "Model", "Term", "coupling_fields", "times_phase"]

Coupling = Any
"""int, float, complex, Fraction or a sympy expression."""


class Term(NamedTuple):
    """One term ``coupling * string`` of a model."""

    coupling: Coupling
    string: WeylString


def times_phase(c: Coupling, exponent: int, states: int) -> Coupling:
    """Exactly multiply a coupling by ``w**exponent``, ``w = exp(i pi / states)``."""
    k = exponent % (2 * states)
    if k == 0:
        return c
    if k == states:
        return -c
    if isinstance(c, sympy.Basic):
        return sympy.nsimplify(c * sympy.exp(sympy.I * sympy.pi * k / states))
    return as_complex(c, "coupling") * unit_phase(k, states)


def coupling_fields(values: Sequence[Coupling], states: int | None = None) -> dict[str, list]:
    """Couplings (or coefficients) for ``to_dict``: as numbers and, when exact, as text.

    Returns ``{"values": [...], "exact": [...]}``: each value JSON-ready (complex as
    ``[re, im]``; a symbolic value as its text), and the text of each exact value (int,
    Fraction, sympy) in the model syntax, None for a float or complex one.

    Examples
    --------
    >>> from fractions import Fraction
    >>> coupling_fields([Fraction(1, 3), 0.5, 1j])
    {'values': [0.3333333333333333, 0.5, [0.0, 1.0]], 'exact': ['1/3', None, None]}
    """
    return {
        "values": [json_ready(c) for c in values],
        "exact": [coefficient_text(c, states) if is_exact_scalar(c) else None for c in values],
    }


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
    The direct constructor takes the strings as given (normalised, distinct: used by builders
    that create large chains) and checks only the couplings (see
    :func:`freeladder.base.scalars.check_scalar`).

    A model is frozen: setting or deleting an attribute raises AttributeError, and its
    :class:`~freeladder.StringArray` is frozen too.

    Raises
    ------
    TypeError
        For strings that are not a StringArray, or a coupling that is not a number or a sympy
        expression (text is never parsed).
    ValueError
        For a coupling that is not finite, or as many couplings as strings not given.
    """

    __slots__ = ("strings", "couplings", "constant", "__dict__")
    strings: StringArray
    couplings: tuple[Coupling, ...]
    constant: Coupling

    def __init__(self, strings: StringArray, couplings: Sequence[Coupling], constant: Coupling = 0):
        if not isinstance(strings, StringArray):
            raise TypeError(f"Model needs a StringArray of strings, got {type(strings).__name__}")
        checked = tuple(check_scalar(c, f"term {j}") for j, c in enumerate(couplings))
        if len(checked) != len(strings):
            raise ValueError(f"{len(checked)} couplings for {len(strings)} strings")
        object.__setattr__(self, "strings", strings)
        object.__setattr__(self, "couplings", checked)
        object.__setattr__(self, "constant", check_scalar(constant, "constant"))

    def __setattr__(self, name: str, value: Any) -> None:
        raise AttributeError(
            f"Model is immutable (cannot set {name!r}); build a new one with with_couplings() "
            "or subs()"
        )

    def __delattr__(self, name: str) -> None:
        raise AttributeError(f"Model is immutable (cannot delete {name!r})")

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
        # the couplings of each string are summed once at the end (a sympy sum built one term
        # at a time re-sorts all its terms at every step: quadratic in the number of names)
        merged: dict[tuple, list] = {(): [[], [], None]}
        order: list[tuple] = []
        const = check_scalar(constant, "constant")
        if states is not None:
            states = check_states(states)
        if isinstance(terms, (str, bytes)) or not isinstance(terms, Iterable):
            raise TypeError(
                "from_terms needs an iterable of (coupling, WeylString) pairs, "
                f"got {type(terms).__name__} (use parse_model for text)"
            )
        for idx, term in enumerate(terms):
            c, g = _unpack_term(term, idx)
            if states is None:
                states = g.states
            if g.states != states:
                raise ValueError(f"term {idx}: N = {g.states} but the model has N = {states}")
            g, e = g.normalized()
            try:
                c = times_phase(c, e, states)
            except ValueError as err:
                raise ValueError(f"term {idx}: {err}") from None
            key = g.factors
            if key not in merged:
                merged[key] = [[], [], g]
                order.append(key)
            values, where, _ = merged[key]
            values.append(c)
            where.append(idx)
            if isinstance(c, sympy.Basic) and len(values) > MAX_EXPANDED_TERMS:
                raise ValueError(
                    f"term {idx}: more than {MAX_EXPANDED_TERMS} terms add to the coupling of "
                    f"{'the constant' if not key else str(g)}; a coupling may have at most "
                    f"{MAX_EXPANDED_TERMS} terms"
                )
        if states is None:
            raise ValueError("a model without terms needs states=N")
        const = _total([const, *merged[()][0]], [-1, *merged[()][1]])
        strings = [merged[k][2] for k in order]
        couplings = [expand_exact(_total(merged[k][0], merged[k][1])) for k in order]
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
        return tuple(Term(c, self.strings[j]) for j, c in polled(enumerate(self.couplings)))

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
        if all(type(c) is float for c in self.couplings):  # fast path: plain floats
            plain = np.array(self.couplings, dtype=float)
            if np.all(np.isfinite(plain)):
                return plain
        vals = np.array(
            [as_complex(c, f"term {j}") for j, c in polled(enumerate(self.couplings))],
            dtype=np.complex128,
        )
        if np.all(vals.imag == 0):
            return vals.real.copy()
        return vals

    # -- new models ------------------------------------------------------------------------------
    def with_couplings(
        self, couplings: Sequence[Coupling], constant: Coupling | None = None
    ) -> Model:
        """The same strings with new couplings (one per term).

        Raises
        ------
        TypeError
            For a value that is not a number or a sympy expression (text included).
        ValueError
            For the wrong number of couplings or a value that is not finite.
        """
        if isinstance(couplings, (str, bytes)) or np.ndim(couplings) != 1:
            raise TypeError(
                f"with_couplings needs a sequence of {len(self)} couplings, "
                f"got {type(couplings).__name__}"
            )
        couplings = couplings.tolist() if isinstance(couplings, np.ndarray) else list(couplings)
        if len(couplings) != len(self):
            raise ValueError(f"{len(couplings)} couplings given for a model of {len(self)} terms")
        const = self.constant if constant is None else constant
        return Model(self.strings, couplings, const)

    def subs(self, values: Mapping[Any, Any]) -> Model:
        """Substitute numbers or sympy expressions for symbols.

        Keys are sympy symbols or their names; values are numbers or sympy expressions (text is
        rejected: it is never parsed).

        Raises
        ------
        TypeError
            For a value that is not a number or a sympy expression.
        ValueError
            For a name that is not one of the model's symbols, or a value (or a resulting
            coupling) that is not finite.

        Examples
        --------
        >>> import freeladder as fl
        >>> print(fl.parse_model("g X0 + 2*g Z0 Z1").subs({"g": 0.5}))
        0.5 X0 + Z0 Z1
        """
        mapping = substitution_map(values, self.symbols)

        def sub(j: int, c: Coupling) -> Coupling:
            try:
                return substitute(c, mapping)
            except ValueError as err:
                where = "constant" if j < 0 else f"term {j}"
                raise ValueError(f"{where}: {err}") from None

        new = [sub(j, c) for j, c in enumerate(self.couplings)]
        return self.with_couplings(new, sub(-1, self.constant))

    # -- matrices and printing ---------------------------------------------------------------------
    def to_sparse(self) -> Any:
        """The Hamiltonian as a scipy.sparse matrix on :attr:`sites` (numeric couplings only)."""
        mat = self.strings.to_sparse(self.coupling_array())
        c = as_complex(self.constant, "constant") if self.constant != 0 else 0
        if c != 0:
            import scipy.sparse as sps

            mat = mat + c * sps.identity(mat.shape[0], format="csr")
        return mat

    def to_dict(self) -> dict[str, Any]:
        """JSON-ready fields: the model as ``text`` in the model syntax, ``states``, ``sites``,
        the normalised ``strings`` as text, the ``couplings`` and the ``constant`` as numbers
        (complex as ``[re, im]``, symbolic as text) and ``exact_couplings`` /
        ``exact_constant``, the text of each exact value (None for floats)."""
        couplings = coupling_fields(self.couplings, self.states)
        constant = coupling_fields([self.constant], self.states)
        return json_ready(
            {
                "text": str(self),
                "states": self.states,
                "sites": self.sites,
                "strings": [str(g) for g in self.strings],
                "couplings": couplings["values"],
                "exact_couplings": couplings["exact"],
                "constant": constant["values"][0],
                "exact_constant": constant["exact"][0],
            }
        )

    def __repr__(self) -> str:
        text = format_terms(self.terms, self.constant)
        if len(text) > 400:
            text = text[:400] + " ..."
        return f"Model(N={self.states}, terms={len(self)}, sites={len(self.sites)}: {text})"

    def __str__(self) -> str:
        return format_terms(self.terms, self.constant)

    def _repr_latex_(self) -> str:
        pieces = [format_terms_latex([], self.constant)] if self.constant != 0 else []
        pieces += [format_terms_latex([term]) for term in self.terms]
        return "$" + display.aligned_sum(pieces) + "$"


def _unpack_term(term: Any, idx: int) -> tuple[Coupling, WeylString]:
    """One ``(coupling, WeylString)`` pair, checked."""
    if not isinstance(term, (tuple, list)) or len(term) != 2:
        raise TypeError(f"term {idx}: expected a (coupling, WeylString) pair, got {term!r:.80}")
    c, g = term
    if not isinstance(g, WeylString):
        raise TypeError(
            f"term {idx}: the string must be a WeylString (see make_string, pauli), "
            f"got {type(g).__name__}"
        )
    return check_scalar(c, f"term {idx}"), g


def _total(values: Sequence[Coupling], where: Sequence[int]) -> Coupling:
    """The sum of the couplings of one string: numbers in order, symbolic ones in one sum."""
    if any(isinstance(v, sympy.Basic) for v in values):
        return sympy.Add(*(to_sympy(v) for v in values))
    total: Coupling = values[0]
    for v, idx in zip(values[1:], where[1:], strict=True):
        total = _merge(total, v, idx)
    return total


def _merge(a: Coupling, b: Coupling, idx: int) -> Coupling:
    """``a + b`` for two couplings of one string; an overflow becomes a ValueError."""
    try:
        return a + b
    except OverflowError:
        raise ValueError(
            f"term {idx}: its coupling and that of an earlier term with the same string cannot "
            "be added (an exact integer too large for a float meets a float); give them as "
            "exact numbers"
        ) from None
