"""freeladder: free-fermion and free-parafermion spectra from exclusion-rule charges.

Write a Hamiltonian as a sum of operator strings, find which theorem (if any) guarantees a
free spectrum, build the conserved charges and the exclusion polynomial, find its roots with
stated error bounds, and compare with exact diagonalization.
"""

from .algebra.builders import (
    clock_chain,
    complex_couplings,
    exclusion_chain,
    honeycomb_hexagons,
    ising_chain,
    ising_lattice,
    kitaev_honeycomb,
    kitaev_torus,
    random_couplings,
    staggered,
)
from .algebra.model import Model, Term
from .algebra.operators import StringSum
from .algebra.strings import StringArray, WeylString, make_string, pauli
from .algebra.syntax import ModelSyntaxError, parse_model
from .analysis import Analysis, analyze
from .base.errors import NotExpandableError, NoTheoremError
from .base.interrupt import Interrupted, stop_when
from .checks.charge_sweep import SweepResult, Witness, commutator_sweep, inversion_sweep
from .checks.edge_dynamics import DynamicsCheck, check_autocorrelation
from .checks.verification import Check, Report, same_sector_check, verify
from .graphs.directed import DirectedFrustrationGraph, directed_frustration_graph
from .graphs.graph import (
    ChainStructure,
    chain_structure,
    commutation_exponents,
    frustration_adjacency,
    frustration_graph,
)
from .graphs.indifference import IndifferenceOrder, indifference_order
from .graphs.relations import Relation, Relations, find_relations
from .graphs.switching import DipathSwitching, dipath_switching
from .graphs.verdict import ComponentVerdict, Guarantee, Verdict, classify, guarantee
from .output.worked import Cell, WorkedCalculation, worked_calculation
from .roots.certify import certified_roots, certify_chain_roots
from .roots.methods import ROOT_METHODS, RootMethod
from .roots.polynomial import ChainData, ExclusionPolynomial, exclusion_polynomial
from .roots.real import (
    chain_count_below,
    chain_inverse_power_sums,
    chain_real_roots,
    chain_root_count,
)
from .roots.result import RootTable
from .spectra.answer import SectorRow, SpectrumAnswer
from .spectra.charges import (
    ChargeStep,
    ChargeTerm,
    charge,
    charge_counts,
    charge_series,
    transfer_matrix,
)
from .spectra.circuits import CircuitAutocorrelation, circuit_autocorrelation
from .spectra.dynamics import (
    Autocorrelation,
    EdgeExpansion,
    TwoPoint,
    autocorrelation,
    certified_edge_weights,
    edge_expansion,
    two_point,
)
from .spectra.ed import (
    ExactSpectrum,
    exact_spectrum,
    sector_dimension,
    sector_exact_spectrum,
    sparse_memory,
)
from .spectra.edge import EdgeMode, LadderOperators, edge_mode, ladder_operators
from .spectra.majorana import (
    FluxSector,
    SectorSpectrum,
    SectorStructure,
    flux_sector,
    flux_theorem_values,
    jordan_wigner_spectrum,
    sectors,
)
from .spectra.matching import LevelMatch, match_levels
from .spectra.sector_dynamics import (
    SectorCorrelation,
    sector_autocorrelation,
    sector_two_point,
)
from .spectra.spectrum import FreeSpectrum, Level, LevelTable, SpectrumProvenance, free_spectrum
from .spectra.thermo import Thermodynamics, log_partition_function, thermodynamics
from .spectra.weight_balls import WeightBalls
from .studies.census import census
from .studies.disorder import (
    LogGapStatistics,
    disorder_couplings,
    disordered_chain_gap,
    interleave,
    log_gap_statistics,
    periodic_couplings,
)
from .studies.grid import sweep
from .studies.scaling import (
    EnergyDensity,
    GapScaling,
    MixedResidueWarning,
    PowerLawFit,
    chain_log_quasi_energy,
    chain_quasi_energy,
    energy_density,
    gap_scaling,
    power_law_fit,
    smallest_quasi_energy,
)

__all__ = [
    "DynamicsCheck",
    "check_autocorrelation",
    "census",
    "honeycomb_hexagons",
    "kitaev_torus",
    "IndifferenceOrder",
    "indifference_order",
    "DipathSwitching",
    "DirectedFrustrationGraph",
    "dipath_switching",
    "directed_frustration_graph",
    "FluxSector",
    "SectorRow",
    "SectorSpectrum",
    "SpectrumAnswer",
    "SectorStructure",
    "flux_sector",
    "flux_theorem_values",
    "jordan_wigner_spectrum",
    "sectors",
    "Analysis",
    "analyze",
    "charge_counts",
    "ChainData",
    "ChainStructure",
    "ROOT_METHODS",
    "RootMethod",
    "RootTable",
    "certified_roots",
    "certify_chain_roots",
    "chain_count_below",
    "chain_inverse_power_sums",
    "chain_real_roots",
    "chain_root_count",
    "ChargeStep",
    "ChargeTerm",
    "ExclusionPolynomial",
    "charge",
    "charge_series",
    "exclusion_polynomial",
    "transfer_matrix",
    "ComponentVerdict",
    "Guarantee",
    "Interrupted",
    "NoTheoremError",
    "NotExpandableError",
    "Relation",
    "Relations",
    "SpectrumProvenance",
    "Verdict",
    "classify",
    "find_relations",
    "guarantee",
    "chain_structure",
    "commutation_exponents",
    "frustration_adjacency",
    "frustration_graph",
    "ExactSpectrum",
    "FreeSpectrum",
    "Level",
    "LevelTable",
    "Thermodynamics",
    "free_spectrum",
    "log_partition_function",
    "thermodynamics",
    "exact_spectrum",
    "sector_dimension",
    "sector_exact_spectrum",
    "sparse_memory",
    "Model",
    "ModelSyntaxError",
    "WeylString",
    "StringSum",
    "Check",
    "EdgeMode",
    "EdgeExpansion",
    "Autocorrelation",
    "TwoPoint",
    "WeightBalls",
    "LadderOperators",
    "Report",
    "edge_mode",
    "edge_expansion",
    "autocorrelation",
    "certified_edge_weights",
    "two_point",
    "SectorCorrelation",
    "CircuitAutocorrelation",
    "circuit_autocorrelation",
    "sector_autocorrelation",
    "sector_two_point",
    "ladder_operators",
    "same_sector_check",
    "stop_when",
    "verify",
    "LevelMatch",
    "match_levels",
    "StringArray",
    "SweepResult",
    "Witness",
    "commutator_sweep",
    "inversion_sweep",
    "Term",
    "clock_chain",
    "complex_couplings",
    "exclusion_chain",
    "ising_chain",
    "ising_lattice",
    "kitaev_honeycomb",
    "make_string",
    "pauli",
    "parse_model",
    "random_couplings",
    "staggered",
    "EnergyDensity",
    "GapScaling",
    "LogGapStatistics",
    "MixedResidueWarning",
    "PowerLawFit",
    "disorder_couplings",
    "disordered_chain_gap",
    "energy_density",
    "gap_scaling",
    "interleave",
    "log_gap_statistics",
    "periodic_couplings",
    "power_law_fit",
    "smallest_quasi_energy",
    "chain_log_quasi_energy",
    "chain_quasi_energy",
    "sweep",
    "Cell",
    "WorkedCalculation",
    "worked_calculation",
]
__version__ = "0.1.0"


def __getattr__(name: str) -> object:
    """``RootResult``: deprecated alias of :class:`RootTable` (one release)."""
    if name == "RootResult":
        import warnings

        warnings.warn(
            "freeladder.RootResult is deprecated: the root result type is now called RootTable",
            DeprecationWarning,
            stacklevel=2,
        )
        return RootTable
    raise AttributeError(f"module {__name__!r} has no attribute {name!r}")
