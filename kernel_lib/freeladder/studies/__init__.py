"""Studies over many models: scaling, disorder, parameter sweeps."""

from .census import (
    census,
)
from .disorder import (
    LogGapStatistics,
    disorder_couplings,
    disordered_chain_gap,
    interleave,
    log_gap_statistics,
    periodic_couplings,
)
from .grid import (
    sweep,
)
from .scaling import (
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
    "census",
    "EnergyDensity",
    "GapScaling",
    "LogGapStatistics",
    "MixedResidueWarning",
    "PowerLawFit",
    "chain_log_quasi_energy",
    "chain_quasi_energy",
    "disorder_couplings",
    "disordered_chain_gap",
    "energy_density",
    "gap_scaling",
    "interleave",
    "log_gap_statistics",
    "periodic_couplings",
    "power_law_fit",
    "smallest_quasi_energy",
    "sweep",
]
