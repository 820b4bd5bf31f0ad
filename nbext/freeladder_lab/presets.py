"""Model families the Workbench offers, each built by a ``freeladder`` builder (through the
adapter)."""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass
from typing import Any

from .adapter import Model, build_family, family_couplings, rescaled

__all__ = ["FAMILIES", "CouplingPattern", "Family", "build", "pattern_values", "scaled"]


@dataclass(frozen=True)
class Family:
    """One preset family: its label, what the size control counts, and its controls."""

    label: str
    size_label: str
    size_range: tuple[int, int, int]  # min, max, default
    has_reach: bool
    has_states: bool


FAMILIES: dict[str, Family] = {
    "exclusion chain (reach p, N states)": Family("chain", "terms M", (1, 2000, 12), True, True),
    "transverse-field Ising chain": Family("ising", "sites L", (1, 1000, 6), False, False),
    "clock chain (Z_N)": Family("clock", "sites L", (1, 1000, 4), False, True),
    "2D: Ising on a square patch (no theorem)": Family(
        "lattice", "rows = cols", (2, 6, 3), False, False
    ),
    "2D: honeycomb strip, two columns (Jordan-Wigner)": Family(
        "honeycomb", "rows", (2, 12, 4), False, False
    ),
}


@dataclass(frozen=True)
class CouplingPattern:
    """How the per-term couplings are chosen.

    ``kind`` is "uniform" (every term times ``a``), "staggered" (``a, b, a, b, ...``), "random"
    (uniform in ``[low, high)`` with ``seed``; complex with random phases when ``complex_phase``),
    "table" (the explicit ``values``) or "symbols" (the symbols ``a, b, a, b, ...``, set by
    sliders).
    """

    kind: str = "uniform"
    a: float = 1.0
    b: float = 0.5
    low: float = 0.5
    high: float = 1.5
    seed: int = 0
    complex_phase: bool = False
    values: tuple[complex, ...] = ()


def build(name: str, size: int, reach: int, states: int) -> Model:
    """The family's model with the builder's own (uniform) couplings."""
    return build_family(FAMILIES[name].label, size, reach, states)


def pattern_values(pattern: CouplingPattern, count: int) -> Sequence[Any]:
    """The factors that multiply the builder's couplings (symbols ``a, b, a, ...`` for the
    symbols pattern, set by sliders)."""
    if pattern.kind == "table":
        if len(pattern.values) != count:
            raise ValueError(f"the table has {len(pattern.values)} values, {count} needed")
        return list(pattern.values)
    return family_couplings(
        pattern.kind,
        count,
        pattern.a,
        pattern.b,
        pattern.low,
        pattern.high,
        pattern.seed,
        pattern.complex_phase,
    )


def scaled(model: Model, factors: Sequence[Any]) -> Model:
    """The model with coupling j multiplied by ``factors[j]`` (the builder's signs kept)."""
    return rescaled(model, factors)


def factors_of(model: Model, base: Model) -> list[complex] | None:
    """The factors that turn ``base``'s couplings into ``model``'s, when both are numeric and
    have the same strings; else None."""
    if model.is_symbolic or base.is_symbolic or len(model) != len(base):
        return None
    if [t.string for t in model.terms] != [t.string for t in base.terms]:
        return None
    out = []
    for c, b in zip(model.couplings, base.couplings, strict=True):
        if complex(b) == 0:
            return None
        out.append(complex(c) / complex(b))
    return out
