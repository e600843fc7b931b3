"""The winding: N turns of a conductor through a core, and whether they fit.

Conductors live in :mod:`cmcheck.model.conductors`, the stray-capacitance estimate in
:mod:`cmcheck.model.capacitance`, the turn's geometry in the core (:mod:`cmcheck.model.cores`);
their public names stay importable from here. All lengths in metres.
"""

from __future__ import annotations

import math
import warnings
from dataclasses import dataclass

import numpy as np

from .. import limits
from ..errors import CmcheckWarning, WindingError
from ..units import format_quantity
from .capacitance import EPS0, stray_capacitance, turn_to_turn_capacitance
from .conductors import (
    COPPER_RESISTIVITY,
    MU0,
    Cable,
    Conductor,
    Wire,
    round_wire_resistance,
    skin_depth,
    tube_resistance,
)

__all__ = [
    "COPPER_RESISTIVITY",
    "EPS0",
    "MU0",
    "Cable",
    "Conductor",
    "Winding",
    "Wire",
    "check_fit",
    "max_turns_single_layer",
    "round_wire_resistance",
    "skin_depth",
    "stray_capacitance",
    "tube_resistance",
    "turn_to_turn_capacitance",
]


def max_turns_single_layer(window_diameter, conductor_od):
    """Most turns that lie side by side in one layer around the inside of a round hole.

    The conductor centres sit on a circle of radius (ID − d)/2; each turn takes the angle
    2·asin(d/(ID − d)).

    Parameters
    ----------
    window_diameter : array_like
        Hole diameter (ring ID) [m].
    conductor_od : array_like
        Outside diameter of the conductor with its insulation or jacket [m].

    Returns
    -------
    numpy.ndarray or int
        Whole turns; 0 when the conductor does not pass through, 1 when only one fits.

    References
    ----------
    Elementary geometry of equal circles packed inside a circle along its rim.
    """
    D = np.asarray(window_diameter, dtype=float)
    d = np.asarray(conductor_od, dtype=float)
    with np.errstate(divide="ignore", invalid="ignore"):
        s = d / (D - d)
        n = np.where(s > 1.0, 1, np.floor(np.pi / np.arcsin(np.clip(s, 1e-12, 1.0)) + 1e-9))
    n = np.where(d >= D, 0, n).astype(int)
    return int(n) if n.ndim == 0 else n


@dataclass(frozen=True)
class Winding:
    """N turns of a conductor, with an optional known stray capacitance.

    Parameters
    ----------
    turns : int
        Number of passes through the core window (N ≥ 1).
    conductor : Conductor
        Wire, Cable or anything providing :class:`~cmcheck.model.conductors.Conductor`.
    cp : float, optional
        Stray capacitance across the winding [F]; None to estimate it, 0 to leave it out.
    lead_length : float
        Extra conductor beyond the turns (both leads together) [m], for the length and R.
    """

    turns: int
    conductor: Conductor
    cp: float | None = None
    lead_length: float = 0.0

    def __post_init__(self) -> None:
        if isinstance(self.turns, bool) or not isinstance(self.turns, (int, np.integer)) or self.turns < 1:
            raise WindingError(f"turns must be a whole number ≥ 1, got {self.turns!r}", parameter="turns")
        if self.cp is not None and not (math.isfinite(self.cp) and self.cp >= 0):
            raise WindingError(f"stray capacitance must be ≥ 0, got {self.cp!r} F", parameter="cp")
        if self.cp is not None:
            limits.check("cp", self.cp, limits.CP, WindingError, what=format_quantity(self.cp, "F", 4))
        if not (math.isfinite(self.lead_length) and self.lead_length >= 0):
            raise WindingError(f"lead length must be ≥ 0, got {self.lead_length!r} m")


def check_fit(window_diameter: float, winding: Winding) -> int:
    """Check that ``winding`` passes through a hole of ``window_diameter`` [m].

    Returns the most turns that fit in one layer. Raises :class:`WindingError` when the
    conductor does not pass through at all, or when N conductors would fill more of the hole
    than the densest packing of circles allows; warns (:class:`CmcheckWarning`) when N needs more
    than one layer, since the capacitance estimate then no longer holds.
    """
    d = winding.conductor.outer_diameter
    n_max = max_turns_single_layer(window_diameter, d)
    if n_max == 0:
        raise WindingError(
            f"the conductor ({d * 1e3:.3g} mm) does not pass through the core's "
            f"{window_diameter * 1e3:.3g} mm hole"
        )
    # No number of layers holds more conductor than hexagonal packing fills the hole with:
    # density π/(2√3) (Thue's theorem on circle packing in the plane).
    if winding.turns * d**2 > math.pi / (2 * math.sqrt(3)) * window_diameter**2:
        raise WindingError(
            f"{winding.turns} turns of {d * 1e3:.3g} mm cannot pass through a {window_diameter * 1e3:.3g} mm hole "
            f"in any number of layers (one layer holds {n_max})"
        )
    if winding.turns > n_max:
        warnings.warn(
            f"{winding.turns} turns of {d * 1e3:.3g} mm need more than one layer in a "
            f"{window_diameter * 1e3:.3g} mm hole (one layer holds {n_max}); the stray "
            "capacitance estimate assumes one layer",
            CmcheckWarning,
            stacklevel=2,
        )
    return n_max
