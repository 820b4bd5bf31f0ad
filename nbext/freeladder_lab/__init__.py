"""freeladder_lab: the notebook side of freeladder (widgets, plots, cell export)."""

from .workbench import Workbench

__all__ = ["Workbench"]
