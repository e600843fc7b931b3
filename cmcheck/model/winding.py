"""The winding: turns of wire or cable through a core, whether they fit, their length,
resistance and stray capacitance.

All lengths in metres. The stray-capacitance estimate is a first estimate only (see
:func:`stray_capacitance`): users override it with a measured value, or fit it from a
measured self-resonance.
"""

from __future__ import annotations

import math
import warnings
from dataclasses import dataclass

import numpy as np

from ..errors import CmcheckWarning, DimensionError, WindingError

__all__ = [
    "COPPER_RESISTIVITY",
    "Cable",
    "Winding",
    "Wire",
    "check_fit",
    "max_turns_single_layer",
    "round_wire_resistance",
    "skin_depth",
    "stray_capacitance",
    "tube_resistance",
    "turn_length",
    "turn_to_turn_capacitance",
]

MU0 = 4e-7 * math.pi  # [H/m]; the 2019 SI value differs by < 1e-9 relative
EPS0 = 8.8541878128e-12  # [F/m], CODATA 2018

#: Resistivity of annealed copper at 20 °C [Ω·m] (IEC 60028: 1/58 Ω·mm²/m).
COPPER_RESISTIVITY = 0.017241e-6


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


def turn_length(core_od, core_id, height, conductor_od):
    """Length of one turn around a ring's cross-section, along the conductor centre [m].

    Parameters
    ----------
    core_od, core_id, height : array_like
        Ring (or stack) outside diameter, inside diameter and total height [m].
    conductor_od : array_like
        Conductor outside diameter [m].

    References
    ----------
    Elementary geometry: a rectangle of sides (OD − ID)/2 and height, with its corners
    rounded by the conductor radius: 2·(w + h) + π·d.
    """
    w = (np.asarray(core_od, float) - np.asarray(core_id, float)) / 2.0
    out = 2.0 * (w + np.asarray(height, float)) + np.pi * np.asarray(conductor_od, float)
    return float(out) if np.ndim(out) == 0 else out


def _two_wire_capacitance_per_length(spacing, diameter, eps_r):
    """π ε / acosh(s/d) [F/m] between two parallel round conductors (Ramo et al. Table 5.11)."""
    ratio = np.maximum(np.asarray(spacing, float) / np.asarray(diameter, float), 1.0 + 1e-6)
    return np.pi * EPS0 * eps_r / np.arccosh(ratio)


def turn_to_turn_capacitance(core_od, core_id, height, conductor_od, conductor_diameter, turns, eps_r=1.0):
    """Capacitance between two adjacent turns on a ring core, Ctt [F].

    Adjacent turns are treated as two parallel round conductors whose centre spacing grows
    from the pitch on the inside wall, π(ID − d)/N, to that on the outside wall, π(OD + d)/N
    (never below the outside diameter d, where they touch). The turn is split into the inside
    wall, the two faces (spacing rising linearly) and the outside wall.

    Parameters
    ----------
    core_od, core_id, height : array_like
        Ring (or stack) dimensions [m].
    conductor_od : array_like
        Outside diameter of the insulated conductor or cable [m].
    conductor_diameter : array_like
        Diameter of the metal carrying the current (bare wire, cable shield) [m].
    turns : array_like
        N [dimensionless], ≥ 2 for this to mean anything.
    eps_r : float or array_like
        Effective relative permittivity between the turns [dimensionless].

    Returns
    -------
    numpy.ndarray or float
        Ctt [F].

    References
    ----------
    Two-wire line capacitance C' = π ε / acosh(s/d): Ramo, Whinnery & Van Duzer, *Fields and
    Waves in Communication Electronics*, 3rd ed., 1994, Table 5.11a. The use for adjacent
    turns follows A. Massarini & M. K. Kazimierczuk, IEEE Trans. Power Electron. 12(4), 1997,
    Sec. III (turn-to-turn capacitance as the elementary capacitance of a winding).
    """
    od = np.asarray(core_od, float)
    idd = np.asarray(core_id, float)
    h = np.asarray(height, float)
    d_out = np.asarray(conductor_od, float)
    d = np.asarray(conductor_diameter, float)
    n = np.maximum(np.asarray(turns, float), 1.0)
    w = (od - idd) / 2.0
    s_in = np.maximum(np.pi * (idd - d_out) / n, d_out)
    s_out = np.maximum(np.pi * (od + d_out) / n, d_out)
    c_in = _two_wire_capacitance_per_length(s_in, d, eps_r) * h
    c_out = _two_wire_capacitance_per_length(s_out, d, eps_r) * h
    # Faces: spacing rises linearly; 8-point Gauss–Legendre over the face width.
    x, wt = np.polynomial.legendre.leggauss(8)
    t = (x + 1.0) / 2.0
    s_face = s_in[..., None] + (s_out - s_in)[..., None] * t
    c_face = _two_wire_capacitance_per_length(s_face, d[..., None], np.asarray(eps_r, float)[..., None])
    c_face_per_len = np.sum(c_face * wt / 2.0, axis=-1)
    c = c_in + c_out + 2.0 * c_face_per_len * w
    return float(c) if np.ndim(c) == 0 else c


def stray_capacitance(core_od, core_id, height, conductor_od, conductor_diameter, turns, eps_r=1.0):
    """First estimate of a single-layer ring winding's stray (parallel) capacitance Cp [F].

    Cp = 0 for one turn, Ctt for two, and (1 + √3)/2 · Ctt ≈ 1.366 Ctt for three or more,
    with Ctt from :func:`turn_to_turn_capacitance`.

    Parameters
    ----------
    core_od, core_id, height, conductor_od, conductor_diameter, turns, eps_r
        As for :func:`turn_to_turn_capacitance`.

    Returns
    -------
    numpy.ndarray or float
        Cp [F].

    Notes
    -----
    This ignores the ferrite's own permittivity and the capacitance through the core, which
    measurements of small rings with many thin turns show can be several times larger; leads
    add more. Treat it as a first estimate: give ``cp`` from a measurement where you can.

    References
    ----------
    A. Massarini & M. K. Kazimierczuk, "Self-capacitance of inductors", IEEE Trans. Power
    Electron. 12(4), 671–676, 1997: the many-turn limit Cs → (1 + √3)/2 · Ctt for a
    single-layer winding (used here from three turns on); two turns are one Ctt.
    """
    n = np.asarray(turns)
    ctt = turn_to_turn_capacitance(core_od, core_id, height, conductor_od, conductor_diameter, turns, eps_r)
    factor = np.where(n <= 1, 0.0, np.where(n == 2, 1.0, (1.0 + math.sqrt(3.0)) / 2.0))
    c = factor * ctt
    return float(c) if np.ndim(c) == 0 else c


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
            raise DimensionError(f"wire diameter must be positive, got {self.diameter!r} m")
        if not (math.isfinite(self.insulation) and self.insulation >= 0):
            raise DimensionError(f"insulation thickness must be ≥ 0, got {self.insulation!r} m")

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

    def describe(self) -> str:
        ins = f" + {self.insulation * 1e3:.3g} mm insulation" if self.insulation else ""
        return f"wire {self.diameter * 1e3:.4g} mm{ins}"


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
            raise DimensionError(f"cable OD must be positive, got {self.od!r} m")
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

    def describe(self) -> str:
        return f"cable {self.od * 1e3:.3g} mm OD"


@dataclass(frozen=True)
class Winding:
    """N turns of a conductor, with an optional known stray capacitance.

    Parameters
    ----------
    turns : int
        Number of passes through the core window (N ≥ 1).
    conductor : Wire or Cable
    cp : float, optional
        Stray capacitance across the winding [F]; None to estimate it, 0 to leave it out.
    lead_length : float
        Extra conductor beyond the turns (both leads together) [m], for the length and R.
    """

    turns: int
    conductor: Wire | Cable
    cp: float | None = None
    lead_length: float = 0.0

    def __post_init__(self) -> None:
        if isinstance(self.turns, bool) or not isinstance(self.turns, (int, np.integer)) or self.turns < 1:
            raise WindingError(f"turns must be a whole number ≥ 1, got {self.turns!r}")
        if self.cp is not None and not (math.isfinite(self.cp) and self.cp >= 0):
            raise WindingError(f"stray capacitance must be ≥ 0, got {self.cp!r} F")
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
