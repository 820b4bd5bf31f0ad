"""freeladder: free-fermion and free-parafermion spectra from exclusion-rule charges.

Write a Hamiltonian as a sum of operator strings, find which theorem (if any) guarantees a
free spectrum, build the conserved charges and the exclusion polynomial, find its roots with
stated error bounds, and compare with exact diagonalization.
"""

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
from .model import Model, Term
from .strings import OpString, StringArray, make_string, pauli

__all__ = [
    "Model",
    "OpString",
    "StringArray",
    "Term",
    "clock_chain",
    "complex_couplings",
    "exclusion_chain",
    "ising_chain",
    "ising_lattice",
    "kitaev_honeycomb",
    "make_string",
    "pauli",
    "random_couplings",
    "staggered",
]
__version__ = "0.1.0"
