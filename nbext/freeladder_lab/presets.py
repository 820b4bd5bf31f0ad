"""Model families the Workbench offers, each built by a ``freeladder`` builder."""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass
from typing import Any

import numpy as np
import sympy

import freeladder as fl

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


def build(name: str, size: int, reach: int, states: int) -> fl.Model:
    """The family's model with the builder's own (uniform) couplings."""
    kind = FAMILIES[name].label
    if kind == "chain":
        return fl.exclusion_chain(size, reach=reach, states=states)
    if kind == "ising":
        return fl.ising_chain(size)
    if kind == "clock":
        return fl.clock_chain(size, states=states)
    if kind == "lattice":
        return fl.ising_lattice(size, size)
    if kind == "honeycomb":
        return fl.kitaev_honeycomb(size, 2)
    raise ValueError(f"unknown family {name!r}")


def pattern_values(pattern: CouplingPattern, count: int) -> Sequence[Any]:
    """The factors that multiply the builder's couplings (symbols ``a, b, a, ...`` for the
    symbols pattern, set by sliders)."""
    if pattern.kind == "uniform":
        return [pattern.a] * count
    if pattern.kind == "staggered":
        return fl.staggered(count, pattern.a, pattern.b)
    if pattern.kind == "random":
        if pattern.complex_phase:
            values = fl.complex_couplings(count, (pattern.low, pattern.high), seed=pattern.seed)
        else:
            values = fl.random_couplings(count, pattern.low, pattern.high, seed=pattern.seed)
        return list(np.asarray(values))
    if pattern.kind == "table":
        if len(pattern.values) != count:
            raise ValueError(f"the table has {len(pattern.values)} values, {count} needed")
        return list(pattern.values)
    if pattern.kind == "symbols":
        return fl.staggered(count, sympy.Symbol("a"), sympy.Symbol("b"))
    raise ValueError(f"unknown coupling pattern {pattern.kind!r}")


def scaled(model: fl.Model, factors: Sequence[Any]) -> fl.Model:
    """The model with coupling j multiplied by ``factors[j]`` (the builder's signs kept)."""
    return model.with_couplings([c * f for c, f in zip(model.couplings, factors, strict=True)])
