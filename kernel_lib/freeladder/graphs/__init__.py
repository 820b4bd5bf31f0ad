"""Frustration graphs and the graph theory that decides which theorem applies (verdicts)."""

from .clawfree import (
    EXACT_HOLE_BUDGET,
    EXACT_HOLE_LIMIT,
    HOLE_SEARCH_BUDGET,
    HoleSearch,
    OrderCheck,
    check_order,
    find_claw,
    find_even_hole,
    find_simplicial_clique,
    is_chordal,
    is_clique,
)
from .directed import (
    DirectedFrustrationGraph,
    directed_frustration_graph,
    omega_power_text,
)
from .graph import (
    ChainStructure,
    chain_from_exponents,
    chain_structure,
    commutation_exponents,
    frustration_adjacency,
    frustration_graph,
)
from .independent import (
    Algebra,
    IndependenceGraph,
)
from .indifference import (
    IndifferenceOrder,
    indifference_order,
    level_order,
    order_from_exponents,
    umbrella_order,
)
from .linegraph import (
    LineGraphRoot,
    NotALineGraph,
    component_root,
    line_graph_root,
)
from .relations import (
    Relation,
    Relations,
    find_relations,
)
from .switching import (
    DipathSwitching,
    ObstructionKind,
    dipath_from_exponents,
    dipath_switching,
)
from .verdict import (
    KINDS,
    ComponentVerdict,
    Guarantee,
    Verdict,
    VerdictKind,
    classify,
    guarantee,
)

__all__ = [
    "Algebra",
    "ChainStructure",
    "ComponentVerdict",
    "DipathSwitching",
    "DirectedFrustrationGraph",
    "EXACT_HOLE_BUDGET",
    "EXACT_HOLE_LIMIT",
    "Guarantee",
    "HOLE_SEARCH_BUDGET",
    "HoleSearch",
    "IndependenceGraph",
    "IndifferenceOrder",
    "KINDS",
    "LineGraphRoot",
    "NotALineGraph",
    "ObstructionKind",
    "Relation",
    "Relations",
    "OrderCheck",
    "Verdict",
    "VerdictKind",
    "chain_from_exponents",
    "chain_structure",
    "check_order",
    "classify",
    "commutation_exponents",
    "dipath_from_exponents",
    "dipath_switching",
    "directed_frustration_graph",
    "find_claw",
    "find_even_hole",
    "find_relations",
    "find_simplicial_clique",
    "frustration_adjacency",
    "frustration_graph",
    "guarantee",
    "indifference_order",
    "is_chordal",
    "is_clique",
    "component_root",
    "level_order",
    "line_graph_root",
    "omega_power_text",
    "order_from_exponents",
    "umbrella_order",
]
