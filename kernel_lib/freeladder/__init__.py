"""freeladder: free-fermion and free-parafermion spectra from exclusion-rule charges.

Write a Hamiltonian as a sum of operator strings, find which theorem (if any) guarantees a
free spectrum, build the conserved charges and the exclusion polynomial, find its roots with
stated error bounds, and compare with exact diagonalization.
"""

from .analysis import Analysis, analyze
from .builders import (
    clock_chain,
    complex_couplings,
    exclusion_chain,
    ising_chain,
    ising_lattice,
    kitaev_honeycomb,
    random_couplings,
    staggered,
)
from .certify import CertifiedRoots, ChainEnclosures, certified_roots, certify_chain_roots
from .charges import (
    ChargeStep,
    ChargeTerm,
    charge,
    charge_counts,
    charge_series,
    transfer_matrix,
)
from .ed import ExactSpectrum, exact_spectrum
from .edge import EdgeMode, LadderOperators, edge_mode, ladder_operators
from .errors import NoTheoremError
from .graph import (
    ChainStructure,
    chain_structure,
    commutation_exponents,
    frustration_adjacency,
    frustration_graph,
)
from .indifference import IndifferenceOrder, indifference_order
from .majorana import SectorSpectrum, SectorStructure, jordan_wigner_spectrum, sectors
from .model import Model, Term
from .operators import StringSum
from .polynomial import ChainData, ExclusionPolynomial, exclusion_polynomial
from .relations import Relation, Relations, find_relations
from .roots import (
    RealRoots,
    chain_count_below,
    chain_inverse_power_sums,
    chain_real_roots,
    chain_root_count,
)
from .spectrum import FreeSpectrum, Level, LevelTable, SpectrumProvenance, free_spectrum
from .strings import StringArray, WeylString, make_string, pauli
from .sweep import SweepResult, Witness, commutator_sweep, inversion_sweep
from .syntax import ModelSyntaxError, parse_model
from .thermo import Thermodynamics, log_partition_function, thermodynamics
from .verdict import ComponentVerdict, Guarantee, Verdict, classify, guarantee
from .verify import Check, Report, verify

__all__ = [
    "IndifferenceOrder",
    "indifference_order",
    "SectorSpectrum",
    "SectorStructure",
    "jordan_wigner_spectrum",
    "sectors",
    "Analysis",
    "analyze",
    "charge_counts",
    "ChainData",
    "ChainStructure",
    "CertifiedRoots",
    "ChainEnclosures",
    "RealRoots",
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
    "NoTheoremError",
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
    "Model",
    "ModelSyntaxError",
    "WeylString",
    "StringSum",
    "Check",
    "EdgeMode",
    "LadderOperators",
    "Report",
    "edge_mode",
    "ladder_operators",
    "verify",
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
]
__version__ = "0.1.0"
