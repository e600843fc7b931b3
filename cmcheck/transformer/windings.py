"""What a line element needs at each frequency: (Zc, γl) of its differential modes and the
common-mode winding impedance. :class:`IdealLine` takes them as given (for closed-form checks);
:class:`LineWinding` derives them from wire, core and material.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Callable

import numpy as np

from ..errors import TransformerError
from ..model.choke import air_core_inductance, choke_impedance
from ..model.winding import Wire, round_wire_resistance
from .lines import PairLine, winding_line_length

__all__ = ["IdealLine", "LineWinding"]


@dataclass(frozen=True)
class IdealLine:
    """A lossless line of given Z0 and delay, with an optional common-mode impedance.

    Parameters
    ----------
    z0 : float
        Pair characteristic impedance [Ω].
    delay_s : float
        One-way delay τ [s]; θ = 2π f τ.
    z_winding_fn : callable or None
        f [Hz] → common-mode impedance [Ω], shape (F,); None for ideal choking.
    conductors : int
        Conductors in the bundle (2 bifilar, 3 trifilar).
    """

    z0: float
    delay_s: float
    z_winding_fn: Callable | None = None
    conductors: int = 2

    def __post_init__(self) -> None:
        if not (math.isfinite(self.z0) and self.z0 > 0):
            raise TransformerError(f"z0 must be positive, got {self.z0!r} Ω")
        if not (math.isfinite(self.delay_s) and self.delay_s > 0):
            raise TransformerError(f"delay_s must be positive, got {self.delay_s!r} s")

    def constants(self, frequency_hz):
        """(Zc [Ω], γl [dimensionless]) at ``frequency_hz`` [Hz]."""
        f = np.asarray(frequency_hz, float)
        return np.full(f.shape, self.z0, dtype=complex), 2j * np.pi * f * self.delay_s

    def z_winding(self, frequency_hz):
        """Common-mode impedance [Ω] or None (ideal choking)."""
        return None if self.z_winding_fn is None else np.asarray(self.z_winding_fn(frequency_hz), complex)

    turns = None
    core = None


@dataclass(frozen=True)
class LineWinding:
    """A bifilar/trifilar winding on a core, seen as a line (differential) and a choke (common).

    Parameters
    ----------
    core : RingCore or FactorCore
        Any core of the :class:`cmcheck.model.cores.Core` contract (``c1`` [1/m], ``turn_length`` for the line length) and
        ``ae`` [m²].
    material : Material or callable
        Has ``permeability(f)`` (µ' − jµ''), or is a callable f → µ.
    turns : int
        Turns of the bundle around the core.
    wire : Wire
        Wire of every conductor.
    conductors : int
        2 (bifilar) or 3 (trifilar).
    spacing : float or None
        Pair centre spacing [m]; None: :func:`cmcheck.transformer.lines.default_pair_spacing`.
    leads : float
        Total lead length added to the line [m].
    cp : float
        Stray capacitance across the winding for the common mode [F].
    """

    core: object
    material: object
    turns: int
    wire: Wire
    conductors: int = 2
    spacing: float | None = None
    leads: float = 0.0
    cp: float = 0.0

    def __post_init__(self) -> None:
        if not isinstance(self.turns, (int, np.integer)) or self.turns < 1:
            raise TransformerError(f"turns must be a whole number ≥ 1, got {self.turns!r}")
        if not isinstance(self.conductors, (int, np.integer)) or self.conductors < 2:
            raise TransformerError(f"conductors must be a whole number ≥ 2, got {self.conductors!r}")
        if not (math.isfinite(self.leads) and self.leads >= 0):
            raise TransformerError(f"leads must be ≥ 0, got {self.leads!r} m")
        if not (math.isfinite(self.cp) and self.cp >= 0):
            raise TransformerError(f"cp must be ≥ 0, got {self.cp!r} F")

    @property
    def length(self) -> float:
        """Line length: turns × turn path (bundle width ≈ one wire) + leads [m]."""
        path = self.core.turn_length(self.wire.outer_diameter)
        if path is None:
            raise TransformerError("core: its turn path is unknown (give the core's window and turn path) "
                                   "so the line length cannot be derived")
        return self.turns * path + self.leads

    @property
    def line(self) -> PairLine:
        """The differential-mode line."""
        return PairLine(self.wire, self.length, self.spacing)

    @property
    def l0(self) -> float:
        """Air-core inductance of the bundle's turns over the core [H]."""
        return air_core_inductance(self.core.c1, self.turns)

    def permeability(self, frequency_hz) -> np.ndarray:
        """µ' − jµ'' of the core material at ``frequency_hz``."""
        m = self.material
        return np.asarray(m.permeability(frequency_hz) if hasattr(m, "permeability") else m(frequency_hz), complex)

    def constants(self, frequency_hz):
        """(Zc [Ω], γl [dimensionless]) of the differential modes."""
        zc, gamma = self.line.constants(frequency_hz)
        return zc, gamma * self.length

    def z_winding(self, frequency_hz) -> np.ndarray:
        """Common-mode impedance [Ω]: choke model with the conductors in parallel."""
        r = round_wire_resistance(frequency_hz, self.wire.diameter, self.length) / self.conductors
        return choke_impedance(frequency_hz, self.l0, self.permeability(frequency_hz), r, self.cp)
