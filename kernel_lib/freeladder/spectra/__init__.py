"""Charges, free spectra, Jordan-Wigner sectors, exact diagonalization, thermodynamics,
edge modes, edge dynamics.
"""

from .answer import (
    SectorRow,
    SpectrumAnswer,
)
from .charges import (
    DEFAULT_LIMIT,
    ChargeStep,
    ChargeTerm,
    charge,
    charge_series,
    transfer_matrix,
)
from .circuits import (
    CircuitAutocorrelation,
    circuit_autocorrelation,
)
from .dynamics import (
    Autocorrelation,
    EdgeExpansion,
    TwoPoint,
    autocorrelation,
    certified_edge_weights,
    edge_expansion,
    two_point,
)
from .ed import (
    DENSE_LIMIT,
    SPARSE_LIMIT,
    ExactSpectrum,
    exact_spectrum,
    sector_dimension,
    sector_exact_spectrum,
    sparse_memory,
)
from .edge import (
    EdgeMode,
    LadderOperators,
    component_model,
    components,
    edge_mode,
    ladder_operators,
    simplicial_cliques,
)
from .majorana import (
    FluxSector,
    SectorSpectrum,
    SectorStructure,
    flux_sector,
    flux_theorem_values,
    jordan_wigner_spectrum,
    sectors,
)
from .matching import (
    LevelMatch,
    match_levels,
)
from .sector_dynamics import (
    SectorCorrelation,
    sector_autocorrelation,
    sector_two_point,
)
from .spectrum import (
    LEVEL_LIMIT,
    DensityOfStates,
    FreeSpectrum,
    Level,
    LevelTable,
    SpectrumProvenance,
    free_spectrum,
)
from .thermo import (
    Thermodynamics,
    log_partition_function,
    thermodynamics,
)
from .weight_balls import WeightBalls

__all__ = [
    "CircuitAutocorrelation",
    "circuit_autocorrelation",
    "Autocorrelation",
    "EdgeExpansion",
    "TwoPoint",
    "WeightBalls",
    "autocorrelation",
    "certified_edge_weights",
    "edge_expansion",
    "two_point",
    "SectorRow",
    "SpectrumAnswer",
    "ChargeStep",
    "ChargeTerm",
    "DEFAULT_LIMIT",
    "DENSE_LIMIT",
    "DensityOfStates",
    "EdgeMode",
    "ExactSpectrum",
    "FluxSector",
    "FreeSpectrum",
    "LEVEL_LIMIT",
    "LadderOperators",
    "Level",
    "LevelMatch",
    "LevelTable",
    "SPARSE_LIMIT",
    "SectorCorrelation",
    "SectorSpectrum",
    "SectorStructure",
    "SpectrumProvenance",
    "Thermodynamics",
    "charge",
    "charge_series",
    "component_model",
    "components",
    "edge_mode",
    "exact_spectrum",
    "sector_dimension",
    "sector_exact_spectrum",
    "sparse_memory",
    "flux_sector",
    "flux_theorem_values",
    "free_spectrum",
    "jordan_wigner_spectrum",
    "ladder_operators",
    "log_partition_function",
    "match_levels",
    "sector_autocorrelation",
    "sector_two_point",
    "sectors",
    "simplicial_cliques",
    "thermodynamics",
    "transfer_matrix",
]
