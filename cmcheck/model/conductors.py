"""Conductors wound through a core: solid wire and cable, their resistance with skin effect.

Every conductor provides the small :class:`Conductor` contract (diameters, permittivity between
touching turns, resistance, description), so the choke model and the sizing search never ask
which kind they hold. All lengths in metres.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Protocol, runtime_checkable

import numpy as np

from .. import limits
from ..errors import DimensionError

__all__ = [
    "COPPER_RESISTIVITY",
    "MU0",
    "Cable",
    "Conductor",
    "Wire",
    "round_wire_resistance",
    "skin_depth",
    "tube_resistance",
]

MU0 = 4e-7 * math.pi  # [H/m]; the 2019 SI value differs by < 1e-9 relative

#: Resistivity of annealed copper at 20 °C [Ω·m] (IEC 60028: 1/58 Ω·mm²/m).
COPPER_RESISTIVITY = 0.017241e-6


@runtime_checkable
class Conductor(Protocol):
    """What every conductor provides. Diameters [m]."""

    #: Diameter over insulation or jacket [m].
    outer_diameter: float
    #: Diameter of the metal carrying the current (bare wire, cable shield) [m].
    conducting_diameter: float
    #: Relative permittivity seen between touching turns [dimensionless].
    effective_eps_r: float
    #: True when the conductor resists tight bends (a cable), so the search limits its bend.
    stiff: bool

    def resistance(self, frequency_hz, length):
        """AC resistance [Ω] of ``length`` [m] of this conductor."""

    def describe(self) -> str:
        """A short human description."""

    def to_dict(self) -> dict:
        """JSON-ready dimensions (SI, unit-suffixed keys)."""


def skin_depth(frequency_hz, resistivity=COPPER_RESISTIVITY, mu_r=1.0):
    """Skin depth δ = √(ρ/(π f µ0 µr)).

    Parameters
    ----------
    frequency_hz : array_like
        Frequency [Hz].
    resistivity : float
        Conductor resistivity [Ω·m].
    mu_r : float
        Relative permeability of the conductor [dimensionless].

    Returns
    -------
    numpy.ndarray or float
        δ [m].

    References
    ----------
    S. Ramo, J. R. Whinnery, T. Van Duzer, *Fields and Waves in Communication Electronics*,
    3rd ed., Wiley 1994, eq. 3.16(6).
    """
    f = np.asarray(frequency_hz, dtype=float)
    d = np.sqrt(resistivity / (np.pi * f * MU0 * mu_r))
    return float(d) if d.ndim == 0 else d


def round_wire_resistance(frequency_hz, diameter, length, resistivity=COPPER_RESISTIVITY):
    """AC resistance of an isolated straight round wire, with skin effect (exact Bessel form).

    Parameters
    ----------
    frequency_hz : array_like
        Frequency [Hz] (> 0).
    diameter : float or array_like
        Bare conductor diameter [m].
    length : float or array_like
        Conductor length [m].
    resistivity : float
        [Ω·m].

    Returns
    -------
    numpy.ndarray
        R [Ω]. Proximity effect between turns is not included (it raises R by a small
        factor in close windings; the conductor loss of a ferrite choke is tiny anyway).

    References
    ----------
    Ramo, Whinnery & Van Duzer, *Fields and Waves in Communication Electronics*, 3rd ed.,
    1994, §5.6, eq. (11): Z_i = (k ρ / 2π a) · J0(ka)/J1(ka), k = (1 − j)/δ per unit length.
    """
    from scipy import special  # kept off the CLI start-up path

    f = np.asarray(frequency_hz, dtype=float)
    a = np.asarray(diameter, dtype=float) / 2.0
    delta = skin_depth(f, resistivity)
    k = (1.0 - 1j) / delta
    # Exponentially scaled Bessel functions: the ratio survives ka of several thousand.
    ratio = special.jve(0, k * a) / special.jve(1, k * a)
    z_per_m = k * resistivity / (2.0 * np.pi * a) * ratio
    r_dc = resistivity / (np.pi * a**2)
    return np.maximum(z_per_m.real, r_dc) * np.asarray(length, dtype=float)


def tube_resistance(frequency_hz, diameter, length, resistivity=COPPER_RESISTIVITY):
    """Resistance to a current on the outside of a cable shield, as a thick tube [Ω].

    Parameters
    ----------
    frequency_hz : array_like
        Frequency [Hz].
    diameter : float
        Shield outer diameter [m].
    length : float
        Length [m].
    resistivity : float
        [Ω·m].

    References
    ----------
    Ramo, Whinnery & Van Duzer, 3rd ed., 1994, §3.16: surface resistivity Rs = ρ/δ over
    the circumference π·D, valid when δ ≪ the shield thickness. A braid's weave raises
    this by a factor of order 2 (from memory); the term is milliohms beside kilohms.
    """
    delta = skin_depth(frequency_hz, resistivity)
    return resistivity / (np.pi * np.asarray(diameter, float) * delta) * np.asarray(length, float)


@dataclass(frozen=True)
class Wire:
    """Solid round wire.

    Parameters
    ----------
    diameter : float
        Bare copper diameter [m].
    insulation : float
        Radial insulation thickness [m] (enamel ≈ 0.02–0.04 mm; PTFE or PVC more).
    eps_r : float
        Relative permittivity of the insulation [dimensionless].
    """

    diameter: float
    insulation: float = 0.0
    eps_r: float = 3.0

    def __post_init__(self) -> None:
        if not (math.isfinite(self.diameter) and self.diameter > 0):
            raise DimensionError(f"wire diameter must be positive, got {self.diameter!r} m", parameter="wire")
        if not (math.isfinite(self.insulation) and self.insulation >= 0):
            raise DimensionError(f"insulation thickness must be ≥ 0, got {self.insulation!r} m", parameter="insulation")
        limits.check("wire", self.diameter, limits.WIRE_DIAMETER, DimensionError)
        limits.check("insulation", self.insulation, limits.INSULATION, DimensionError)

    @property
    def outer_diameter(self) -> float:
        """Diameter over the insulation [m]."""
        return self.diameter + 2.0 * self.insulation

    @property
    def conducting_diameter(self) -> float:
        """Diameter of the metal [m]."""
        return self.diameter

    @property
    def effective_eps_r(self) -> float:
        """Permittivity seen between touching turns: the mean of air and insulation
        (common practice, no published source); 1 for bare wire."""
        return 1.0 if self.insulation == 0 else (1.0 + self.eps_r) / 2.0

    def resistance(self, frequency_hz, length):
        """AC resistance [Ω] of ``length`` [m] of this wire."""
        return round_wire_resistance(frequency_hz, self.diameter, length)

    #: Solid wire follows a tight bend (the sizing search does not limit it by default).
    stiff = False

    def describe(self) -> str:
        ins = f" + {self.insulation * 1e3:.3g} mm insulation" if self.insulation else ""
        return f"wire {self.diameter * 1e3:.4g} mm{ins}"

    def to_dict(self) -> dict:
        return {"wire_diameter_m": self.diameter, "insulation_m": self.insulation}


@dataclass(frozen=True)
class Cable:
    """A cable (usually coax) wound as a feedline choke; the common-mode current flows on
    the outside of its shield.

    Parameters
    ----------
    od : float
        Outside diameter over the jacket [m].
    jacket : float, optional
        Jacket thickness [m]; default 12 % of the OD (typical of small coax; from memory).
    eps_r : float
        Jacket permittivity [dimensionless] (PVC ≈ 3, PE ≈ 2.3).
    """

    od: float
    jacket: float | None = None
    eps_r: float = 3.0

    def __post_init__(self) -> None:
        if not (math.isfinite(self.od) and self.od > 0):
            raise DimensionError(f"cable OD must be positive, got {self.od!r} m", parameter="cable_od")
        limits.check("cable_od", self.od, limits.CABLE_OD, DimensionError)
        j = 0.12 * self.od if self.jacket is None else self.jacket
        if not (math.isfinite(j) and 0 <= j < self.od / 2):
            raise DimensionError(f"cable jacket must be between 0 and half the OD, got {j!r} m")
        object.__setattr__(self, "jacket", float(j))

    @property
    def outer_diameter(self) -> float:
        """Diameter over the jacket [m]."""
        return self.od

    @property
    def conducting_diameter(self) -> float:
        """Shield diameter [m]."""
        return self.od - 2.0 * self.jacket

    @property
    def effective_eps_r(self) -> float:
        """Mean of air and jacket between touching turns (common practice, no published source)."""
        return (1.0 + self.eps_r) / 2.0

    def resistance(self, frequency_hz, length):
        """Resistance [Ω] of the outside of the shield over ``length`` [m]."""
        return tube_resistance(frequency_hz, self.conducting_diameter, length)

    #: A cable kinks in tight bends (the sizing search limits its bend radius by default).
    stiff = True

    def describe(self) -> str:
        return f"cable {self.od * 1e3:.3g} mm OD"

    def to_dict(self) -> dict:
        return {"cable_od_m": self.od}
