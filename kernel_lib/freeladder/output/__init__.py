"""The worked calculation (export) and the command line."""

from .cli import (
    main,
    report_data,
)
from .worked import (
    STEPS,
    Cell,
    WorkedCalculation,
    worked_calculation,
)

__all__ = [
    "Cell",
    "STEPS",
    "WorkedCalculation",
    "main",
    "report_data",
    "worked_calculation",
]
