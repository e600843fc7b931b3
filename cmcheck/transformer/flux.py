"""Flux-coupled transformers (1:9, 1:49 style): windings sharing one core's µ(f).

Equivalent circuit referred to the primary: copper resistance and a share a of the leakage
inductance in series at the primary; the magnetising impedance jωL0·Np²·µ(f) across; the rest
(1 − a) of the leakage in series towards the secondary, where the secondary's self-capacitance
Cs sits across the secondary terminals; an optional compensating capacitor across the primary.
The turns ratio is √(impedance ratio): a 1:49 has 7× the primary turns.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from ..errors import TransformerError
from ..model.choke import air_core_inductance
from ..model.capacitance import stray_capacitance
from ..model.cores import ring_turn_length as turn_length
from ..model.winding import MU0, Wire, round_wire_resistance
from .circuit import GROUND, Circuit
from .elements import coupled_windings_y

__all__ = ["FluxCoupled", "leakage_estimate", "loop_inductance"]


def loop_inductance(perimeter, wire_diameter):
    """Self-inductance of a single round loop of wire in air, L = µ0·r·(ln(8r/a) − 2).

    Parameters
    ----------
    perimeter : array_like
        Loop perimeter [m]; the loop is taken as a circle of the same perimeter.
    wire_diameter : array_like
        Wire diameter 2a [m].

    Returns
    -------
    numpy.ndarray or float
        L [H].

    References
    ----------
    F. W. Grover, *Inductance Calculations*, Van Nostrand 1946 (Dover 2004), ch. 13,
    circular ring of round wire, low-frequency limit (ln(8r/a) − 1.75 for uniform current,
    − 2 at high frequency where the current flows on the surface).
    """
    r = np.asarray(perimeter, float) / (2.0 * np.pi)
    a = np.asarray(wire_diameter, float) / 2.0
    out = MU0 * r * (np.log(8.0 * r / a) - 2.0)
    return float(out) if np.ndim(out) == 0 else out


def leakage_estimate(primary_turns, core_od, core_id, height, wire_diameter, lead_length=0.02):
    """Rough primary-referred leakage inductance of a few primary turns spread over a ring [H].

    Each spread primary turn is counted with its own air loop inductance (mutual coupling
    between widely spaced turns neglected), plus the leads as a two-wire line of 2 mm spacing:
    L ≈ Np·L_loop + µ0/π·acosh(s/d)·l_lead/2.

    Parameters
    ----------
    primary_turns : int
        Np [dimensionless].
    core_od, core_id, height : float
        Ring (stack) dimensions [m].
    wire_diameter : float
        Primary wire diameter [m].
    lead_length : float
        Length of the primary's lead pair [m].

    Returns
    -------
    float
        Leakage inductance [H]; an order-of-magnitude estimate (±50 %).

    References
    ----------
    Common practice, no published source (loop term: Grover, *Inductance Calculations*,
    ch. 13; lead term: Pozar, *Microwave Engineering*, 4th ed., Table 2.1, two-wire L').
    """
    perim = turn_length(core_od, core_id, height, wire_diameter)
    lead = MU0 / math.pi * math.acosh(2e-3 / wire_diameter if 2e-3 > wire_diameter else 1.01) * lead_length / 2.0
    return float(primary_turns * loop_inductance(perim, wire_diameter) + lead)


@dataclass(frozen=True)
class FluxCoupled:
    """A two-winding flux-coupled transformer referred to its primary.

    Parameters
    ----------
    primary_turns : int
        Np.
    impedance_ratio : float
        The trade's ratio, e.g. 49 for a 1:49 (Ns = 7·Np).
    l0_per_turn2 : float
        µ0/C1 of the core: L0 = l0_per_turn2·N² [H].
    permeability : object
        Has ``permeability(f)`` (a :class:`cmcheck.model.materials.Material` or model such as
        ``Debye``) or is a callable f → µ' − jµ''.
    leakage_h : float
        Total leakage inductance referred to the primary [H].
    primary_leakage_share : float
        Share a of the leakage on the primary side of the magnetising branch, 0–1.
    secondary_capacitance : float
        Self-capacitance across the secondary Cs [F] (appears as n²·Cs at the primary).
    r_primary_1mhz : float
        Primary-referred copper resistance at 1 MHz [Ω], scaled as √f (skin effect).
    compensation_capacitance : float
        Capacitor across the primary [F]; 0 for none.
    ae : float or None
        Effective core area [m²] (for peak flux); None leaves flux out.
    """

    primary_turns: int
    impedance_ratio: float
    l0_per_turn2: float
    permeability: object
    leakage_h: float
    primary_leakage_share: float = 0.5
    secondary_capacitance: float = 0.0
    r_primary_1mhz: float = 0.0
    compensation_capacitance: float = 0.0
    ae: float | None = None

    def __post_init__(self) -> None:
        if not isinstance(self.primary_turns, (int, np.integer)) or self.primary_turns < 1:
            raise TransformerError(f"primary_turns must be a whole number ≥ 1, got {self.primary_turns!r}",
                                   parameter="primary_turns")
        for name in ("impedance_ratio", "l0_per_turn2", "leakage_h"):
            v = getattr(self, name)
            if not (math.isfinite(v) and v > 0):
                raise TransformerError(f"{name} must be positive, got {v!r}")
        if not (0.0 <= self.primary_leakage_share <= 1.0):
            raise TransformerError(f"primary_leakage_share must lie in 0–1, got {self.primary_leakage_share!r}")
        for name in ("secondary_capacitance", "r_primary_1mhz", "compensation_capacitance"):
            v = getattr(self, name)
            if not (math.isfinite(v) and v >= 0):
                raise TransformerError(f"{name} must be ≥ 0, got {v!r}")

    @property
    def turns_ratio(self) -> float:
        """n = Ns/Np = √(impedance ratio)."""
        return math.sqrt(self.impedance_ratio)

    @property
    def secondary_turns(self) -> float:
        """Ns = n·Np (a whole number for real windings)."""
        return self.turns_ratio * self.primary_turns

    @property
    def l0(self) -> float:
        """Air-core inductance of the primary [H]."""
        return self.l0_per_turn2 * self.primary_turns**2

    def mu(self, frequency_hz) -> np.ndarray:
        """µ' − jµ'' of the core at ``frequency_hz`` [Hz]."""
        p = self.permeability
        return np.asarray(p.permeability(frequency_hz) if hasattr(p, "permeability") else p(frequency_hz), complex)

    def magnetising_impedance(self, frequency_hz) -> np.ndarray:
        """jωL0·Np²·µ(f) across the primary [Ω] (IEC 60050-221, IEV 221-03-06)."""
        return 2j * np.pi * np.asarray(frequency_hz, float) * self.l0 * self.mu(frequency_hz)

    def stamp(self, circuit: Circuit, primary=("in", GROUND), secondary=("out", GROUND)) -> None:
        """Add the transformer to ``circuit`` between primary and secondary node pairs."""
        f = circuit.frequency_hz
        w = 2.0 * np.pi * f
        n = self.turns_ratio
        a = self.primary_leakage_share
        # A tiny floor keeps the port impedance matrix invertible when a share is 0 or 1.
        z1 = 1j * w * self.leakage_h * max(a, 1e-9) + self.r_primary_1mhz * np.sqrt(f / 1e6)
        z2 = 1j * w * self.leakage_h * max(1.0 - a, 1e-9) * n * n
        y = coupled_windings_y(self.magnetising_impedance(f), [1.0, n], [z1, z2])
        circuit.stamp((primary[0], primary[1], secondary[0], secondary[1]), y)
        if self.secondary_capacitance > 0:
            circuit.admittance(secondary[0], secondary[1], 1j * w * self.secondary_capacitance)
        if self.compensation_capacitance > 0:
            circuit.admittance(primary[0], primary[1], 1j * w * self.compensation_capacitance)

    @classmethod
    def from_geometry(cls, core, material, primary_turns: int, impedance_ratio: float, wire: Wire,
                      lead_length: float = 0.02, compensation_capacitance: float = 0.0) -> "FluxCoupled":
        """Estimate every parameter from the winding geometry and a material model.

        Leakage from :func:`leakage_estimate` (split evenly), Cs of the secondary from
        :func:`cmcheck.model.capacitance.stray_capacitance` with the enamel's permittivity, copper
        resistance of both windings at 1 MHz referred to the primary.

        References
        ----------
        Common practice, no published source; the parts' own sources are in their functions.
        """
        ns = int(round(math.sqrt(impedance_ratio) * primary_turns))
        h = core.total_height
        cs = stray_capacitance(core.turn_geometry(wire.outer_diameter), wire.outer_diameter, wire.diameter, ns,
                               wire.effective_eps_r)
        lt = core.turn_length(wire.outer_diameter)
        r = round_wire_resistance(1e6, wire.diameter, primary_turns * lt) + round_wire_resistance(
            1e6, wire.diameter, ns * lt
        ) / impedance_ratio
        return cls(
            primary_turns=primary_turns,
            impedance_ratio=impedance_ratio,
            l0_per_turn2=air_core_inductance(core.c1, 1),
            permeability=material,
            leakage_h=leakage_estimate(primary_turns, core.od, core.id, h, wire.diameter, lead_length),
            primary_leakage_share=0.5,
            secondary_capacitance=float(cs),
            r_primary_1mhz=float(r),
            compensation_capacitance=compensation_capacitance,
            ae=core.ae,
        )
