"""Exclusion polynomials and their roots: real, complex and certified."""

from .certify import (
    certified_roots,
    certify_chain_roots,
)
from .complex import (
    ChainValues,
    aberth_chain_roots,
    certified_complex_roots,
    evaluate_chain,
    inclusion_radii,
)
from .methods import (
    ROOT_METHODS,
    RootMethod,
    choose_method,
    exact_polynomial_roots,
    scaled_weights,
    solve_chain,
    solve_general,
)
from .polynomial import (
    MAX_ROOT_DEGREE,
    ChainData,
    ExclusionPolynomial,
    SumRules,
    exclusion_polynomial,
    independence_graph,
    independent_set_counts,
    power_sum_targets,
    sum_rules,
)
from .real import (
    chain_back,
    chain_count_below,
    chain_inverse_power_sums,
    chain_real_roots,
    chain_root_count,
    check_chain_weights,
    fixed_reach,
)
from .result import (
    BeyondFloatError,
    RootTable,
)

__all__ = [
    "BeyondFloatError",
    "ChainData",
    "ChainValues",
    "ExclusionPolynomial",
    "MAX_ROOT_DEGREE",
    "ROOT_METHODS",
    "RootMethod",
    "RootTable",
    "SumRules",
    "aberth_chain_roots",
    "certified_complex_roots",
    "certified_roots",
    "certify_chain_roots",
    "chain_back",
    "chain_count_below",
    "chain_inverse_power_sums",
    "chain_real_roots",
    "chain_root_count",
    "check_chain_weights",
    "choose_method",
    "evaluate_chain",
    "exact_polynomial_roots",
    "exclusion_polynomial",
    "fixed_reach",
    "inclusion_radii",
    "independence_graph",
    "independent_set_counts",
    "power_sum_targets",
    "scaled_weights",
    "solve_chain",
    "solve_general",
    "sum_rules",
]


def __getattr__(name: str) -> object:
    """Deprecated aliases (one release): ``RootResult``, ``PolynomialRoots``."""
    import warnings

    if name in ("RootResult", "PolynomialRoots"):
        warnings.warn(
            f"{name} is deprecated: the root result type is now called RootTable",
            DeprecationWarning,
            stacklevel=2,
        )
        return RootTable
    raise AttributeError(f"module {__name__!r} has no attribute {name!r}")
