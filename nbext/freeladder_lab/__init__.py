"""freeladder_lab: the notebook side of freeladder (widgets, plots, cell export)."""
