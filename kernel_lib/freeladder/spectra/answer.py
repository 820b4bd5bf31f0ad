"""The spectrum, or the refusal with its reason and what to do instead: one type for both.

:class:`SpectrumAnswer` is what :meth:`freeladder.Analysis.answer` decides once per model and
choice of sector; the Workbench, the worked calculation, the command line and
:meth:`Analysis.to_dict` all read it, so they cannot disagree about whether a model has a
spectrum.  Three states:

* ``"proven"`` -- a theorem guarantees the numbers: the single exclusion polynomial
  (Alcaraz-Pimenta 2020; Elman-Chapman-Flammia 2021) or, for a Jordan-Wigner model whose
  single polynomial is not guaranteed, one sector of its conserved cycle strings
  (Chapman-Flammia 2020; ``route == "sector"``, with the sector's label);
* ``"unproven"`` -- numbers asked for although no theorem covers them, marked, with the
  reason;
* ``"refused"`` -- no numbers: the reason, the witness terms and what to do instead.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any, Literal

from ..base.errors import NoTheoremError
from ..base.jsonready import json_ready
from .spectrum import FreeSpectrum

__all__ = ["SectorRow", "SpectrumAnswer"]

AnswerStatus = Literal["proven", "unproven", "refused"]


@dataclass(frozen=True)
class SectorRow:
    """One sector of a Jordan-Wigner model in a table of every sector.

    Attributes
    ----------
    label : tuple of int
        Eigenvalues (+-1) of the cycle strings, then of the parity strings.
    lowest : complex or float
        The sector's lowest level, constant included.
    modes : int
        Number of quasi-energies of the sector.
    multiplicity : int
        How often each of its levels occurs.
    """

    label: tuple[int, ...]
    lowest: complex | float
    modes: int
    multiplicity: int

    def to_dict(self) -> dict[str, Any]:
        """JSON-ready fields."""
        ready: dict[str, Any] = json_ready(
            {
                "label": list(self.label),
                "lowest": self.lowest,
                "modes": self.modes,
                "multiplicity": self.multiplicity,
            }
        )
        return ready


@dataclass(frozen=True)
class SpectrumAnswer:
    """The spectrum of a model, or why there is none and what to do instead (immutable).

    Build it with :meth:`freeladder.Analysis.answer`.

    Attributes
    ----------
    status : "proven", "unproven" or "refused"
    spectrum : FreeSpectrum or None
        The numbers (None when refused).  On the sector route, the quasi-energies of the
        chosen sector.
    route : "polynomial", "sector" or ""
        Where the numbers come from: the single exclusion polynomial, or one sector of a
        Jordan-Wigner model; empty when refused.
    reason : str
        What guarantees the numbers (proven) or why no theorem does (unproven, refused).
    witness : tuple of int
        Terms that block the theorem (empty when proven).
    instead : str
        What to do instead (empty when proven).
    selection : str
        On the sector route: which sector and how it was chosen (for example "the ground
        sector, by exhaustive search over 8 sectors").
    cycle_strings : tuple of str
        On the sector route: the conserved cycle strings the label refers to.
    cycle_values : tuple of int
        On the sector route: their eigenvalues (+-1) in the chosen sector.
    sectors : tuple of SectorRow or None
        Every sector's lowest level, when the table of all sectors was asked for.
    """

    status: AnswerStatus
    spectrum: FreeSpectrum | None
    route: Literal["polynomial", "sector", ""]
    reason: str
    witness: tuple[int, ...] = ()
    instead: str = ""
    selection: str = ""
    cycle_strings: tuple[str, ...] = ()
    cycle_values: tuple[int, ...] = ()
    sectors: tuple[SectorRow, ...] | None = None

    @property
    def refused(self) -> bool:
        """True when there are no numbers."""
        return self.spectrum is None

    @property
    def guaranteed(self) -> bool:
        """True when a theorem guarantees the numbers."""
        return self.status == "proven"

    def require(self) -> FreeSpectrum:
        """The guaranteed spectrum, or :class:`~freeladder.base.errors.NoTheoremError` with
        the reason and what to do instead."""
        if self.spectrum is None or self.status != "proven":
            raise NoTheoremError(self.message)
        return self.spectrum

    @property
    def message(self) -> str:
        """The reason, then what to do instead, in one text."""
        return f"{self.reason} Instead: {self.instead}" if self.instead else self.reason

    def to_dict(self) -> dict[str, Any]:
        """The one JSON form of "the spectrum, or why not" (complex numbers as [re, im]).

        Keys: ``status``, ``route``, ``quasi_energies``, ``error_bounds``, ``ground_energy``,
        ``gap`` (None when refused, or when a complex spectrum has no ordered gap),
        ``theorem`` (what guarantees the numbers), ``sector`` (``selection``,
        ``cycle_strings``, ``cycle_values``; None off the sector route), ``refusal``
        (``reason``, ``witness``, ``instead``; None when proven) and ``sectors`` (the table of
        every sector, when asked for).
        """
        sp = self.spectrum
        out: dict[str, Any] = {
            "status": self.status,
            "route": self.route or None,
            "quasi_energies": None if sp is None else sp.quasi_energies,
            "error_bounds": None if sp is None else sp.error_bounds,
            "ground_energy": None if sp is None else sp.ground_energy,
            "gap": None if sp is None else _gap(sp),
            "theorem": self.reason if self.status == "proven" else None,
            "sector": None,
            "refusal": None,
            "sectors": None if self.sectors is None else [r.to_dict() for r in self.sectors],
        }
        if self.route == "sector":
            out["sector"] = {
                "selection": self.selection,
                "cycle_strings": list(self.cycle_strings),
                "cycle_values": list(self.cycle_values),
            }
        if self.status != "proven":
            out["refusal"] = {
                "reason": self.reason,
                "witness": list(self.witness),
                "instead": self.instead,
            }
        ready: dict[str, Any] = json_ready(out)
        return ready


def _gap(sp: FreeSpectrum) -> float | None:
    try:
        return float(sp.gap)
    except ValueError:  # complex spectra have no ordered gap; rounded quasi-energies refuse
        return None
