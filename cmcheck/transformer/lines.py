"""Windings as transmission lines: characteristic impedance, velocity, length and loss.

A bifilar (or trifilar) winding on a core is, for its differential mode, a two-wire line whose
length is the turns times the path of one turn plus the leads. The functions here are pure and
broadcast over frequency; :class:`PairLine` bundles one such line.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from ..errors import TransformerError
from ..model.cores import ring_turn_length as turn_length
from ..model.winding import EPS0, MU0, Wire, round_wire_resistance

__all__ = [
    "ETA0",
    "C0",
    "PairLine",
    "coax_z0",
    "default_pair_spacing",
    "line_constants",
    "sheathed_pair_eps_eff",
    "two_wire_z0",
    "winding_line_length",
]

#: Impedance of free space √(µ0/ε0) [Ω].
ETA0 = math.sqrt(MU0 / EPS0)
#: Speed of light in vacuum 1/√(µ0 ε0) [m/s].
C0 = 1.0 / math.sqrt(MU0 * EPS0)

#: Loss tangent of magnet-wire enamel at HF [dimensionless] (polyurethane/polyester
#: enamels lie near 0.005–0.02; from memory).
ENAMEL_TAN_DELTA = 0.01


def two_wire_z0(spacing, diameter, eps_eff=1.0):
    """Characteristic impedance of two parallel round conductors.

    Z0 = (η0/π)·acosh(D/d)/√εeff.

    Parameters
    ----------
    spacing : array_like
        Centre-to-centre spacing D [m], D > d.
    diameter : array_like
        Conductor diameter d [m].
    eps_eff : array_like
        Effective relative permittivity around the pair [dimensionless].

    Returns
    -------
    numpy.ndarray or float
        Z0 [Ω].

    References
    ----------
    D. M. Pozar, *Microwave Engineering*, 4th ed., Wiley 2012, Table 2.1 (two-wire line:
    L' = (µ/π)·acosh(D/2a), C' = πε/acosh(D/2a), Z0 = √(L'/C')); also Ramo, Whinnery & Van
    Duzer, *Fields and Waves in Communication Electronics*, 3rd ed., 1994, Table 5.11a.
    """
    ratio = np.asarray(spacing, float) / np.asarray(diameter, float)
    if np.any(ratio <= 1.0):
        raise TransformerError(f"spacing must exceed the conductor diameter, got D/d = {np.min(ratio):g}")
    z = ETA0 / np.pi * np.arccosh(ratio) / np.sqrt(np.asarray(eps_eff, float))
    return float(z) if np.ndim(z) == 0 else z


def coax_z0(outer_diameter, inner_diameter, eps_r=1.0):
    """Characteristic impedance of a coaxial line, Z0 = η0·ln(b/a)/(2π√εr).

    Parameters
    ----------
    outer_diameter : array_like
        Inside diameter of the outer conductor (shield) [m].
    inner_diameter : array_like
        Diameter of the inner conductor [m].
    eps_r : array_like
        Relative permittivity of the dielectric [dimensionless].

    Returns
    -------
    numpy.ndarray or float
        Z0 [Ω].

    References
    ----------
    D. M. Pozar, *Microwave Engineering*, 4th ed., Wiley 2012, eq. (2.32) and Table 2.1.
    """
    ratio = np.asarray(outer_diameter, float) / np.asarray(inner_diameter, float)
    if np.any(ratio <= 1.0):
        raise TransformerError(f"outer_diameter must exceed inner_diameter, got ratio {np.min(ratio):g}")
    z = ETA0 * np.log(ratio) / (2.0 * np.pi * np.sqrt(np.asarray(eps_r, float)))
    return float(z) if np.ndim(z) == 0 else z


def sheathed_pair_eps_eff(spacing, diameter, insulation, eps_r):
    """Effective permittivity of a pair of insulated round wires in air.

    Each wire's coating is treated as a thin coaxial sheath in series with the air between
    the wires: acosh(D/d)/εeff = 2·ln(do/d)/εr + (acosh(D/d) − 2·ln(do/d)), do = d + 2t.

    Parameters
    ----------
    spacing : array_like
        Centre-to-centre spacing D [m].
    diameter : array_like
        Bare conductor diameter d [m].
    insulation : array_like
        Radial coating thickness t [m].
    eps_r : array_like
        Relative permittivity of the coating [dimensionless].

    Returns
    -------
    numpy.ndarray or float
        εeff [dimensionless], between 1 and εr.

    Notes
    -----
    A stated approximation: the sheath's potential drop is taken as that of a coaxial
    sheath. For touching wires the field crowds into the contact and this under-states
    εeff (≈ 1.35 here against ≈ 2 usually quoted), so Z0 of a touching pair comes out about
    10 % high.

    References
    ----------
    Series connection of a coaxial sheath (Pozar, *Microwave Engineering*, 4th ed., Table 2.1,
    coaxial C' = 2πε/ln(b/a)) and the two-wire air line (same table); the combination is a
    common engineering approximation, no published source.
    """
    d = np.asarray(diameter, float)
    do = d + 2.0 * np.asarray(insulation, float)
    x = np.arccosh(np.asarray(spacing, float) / d)
    xs = np.minimum(2.0 * np.log(do / d), x)
    e = x / (xs / np.asarray(eps_r, float) + (x - xs))
    return float(e) if np.ndim(e) == 0 else e


def default_pair_spacing(wire: Wire) -> float:
    """Default centre spacing of a pair wound on a core [m]: touching plus one coating thickness.

    A pair laid on a ring rarely touches all along: it twists, spreads over the faces and
    lies over the core's corners. A mean air gap of one coating thickness between the
    insulations gives Z0 ≈ 48 Ω for enamelled 18–20 AWG, in the 40–50 Ω that enamelled
    bifilar windings usually measure, where touching wires would give ≈ 35–38 Ω.

    Parameters
    ----------
    wire : cmcheck.model.winding.Wire
        The wire (bare diameter, coating thickness and permittivity).

    Returns
    -------
    float
        D [m].

    References
    ----------
    From memory (measured Z0 of enamelled bifilar windings on cores, 40–50 Ω); no published
    source for the gap itself.
    """
    gap = wire.insulation if wire.insulation > 0 else 0.05 * wire.diameter
    return wire.outer_diameter + gap


def winding_line_length(turns, core_od, core_id, height, conductor_od, leads=0.0):
    """Length of the line formed by a winding: turns × turn path + leads [m].

    Parameters
    ----------
    turns : array_like
        Turns of the pair (or bundle) around the core [dimensionless].
    core_od, core_id, height : array_like
        Ring (or stack) outside diameter, inside diameter, total height [m].
    conductor_od : array_like
        Outside diameter of the bundle across the turn [m] (for a pair laid flat, about
        one wire's outside diameter).
    leads : array_like
        Total length of both leads [m].

    Returns
    -------
    numpy.ndarray or float
        Line length [m].

    References
    ----------
    Common practice, no published source (turn path: :func:`cmcheck.model.cores.ring_turn_length`).
    """
    out = np.asarray(turns, float) * turn_length(core_od, core_id, height, conductor_od) + np.asarray(leads, float)
    return float(out) if np.ndim(out) == 0 else out


def line_constants(frequency_hz, z0, eps_eff, r_per_m, tan_delta_eff):
    """Complex characteristic impedance and propagation constant of a lossy line.

    From the lossless Z0 and εeff: L' = Z0·√εeff/c0, C' = √εeff/(Z0·c0); with series loss R'
    and shunt loss G' = ωC'·tanδ: Zc = √((R' + jωL')/(G' + jωC')), γ = √((R' + jωL')(G' + jωC')).

    Parameters
    ----------
    frequency_hz : array_like
        Frequency [Hz], shape (F,).
    z0 : float
        Lossless characteristic impedance [Ω].
    eps_eff : float
        Effective relative permittivity [dimensionless].
    r_per_m : array_like
        Series (loop) resistance per metre R' [Ω/m], shape (F,) or scalar.
    tan_delta_eff : float
        Effective loss tangent of the line's dielectric [dimensionless].

    Returns
    -------
    (numpy.ndarray, numpy.ndarray)
        Zc [Ω] and γ = α + jβ [1/m], each shape (F,).

    References
    ----------
    D. M. Pozar, *Microwave Engineering*, 4th ed., Wiley 2012, eqs. (2.5) and (2.7)
    (telegrapher's line constants).
    """
    w = 2.0 * np.pi * np.asarray(frequency_hz, float)
    lp = z0 * math.sqrt(eps_eff) / C0
    cp = math.sqrt(eps_eff) / (z0 * C0)
    zs = np.asarray(r_per_m, float) + 1j * w * lp
    ysh = w * cp * tan_delta_eff + 1j * w * cp
    return np.sqrt(zs / ysh), np.sqrt(zs * ysh)


@dataclass(frozen=True)
class PairLine:
    """A line of two (or more, symmetric bundle) insulated wires, as wound on a core.

    Parameters
    ----------
    wire : Wire
        The wire; every conductor of the bundle is this wire.
    length : float
        Physical length of the line [m].
    spacing : float or None
        Centre-to-centre spacing [m]; None takes :func:`default_pair_spacing`.
    tan_delta : float
        Loss tangent of the coating [dimensionless].
    """

    wire: Wire
    length: float
    spacing: float | None = None
    tan_delta: float = ENAMEL_TAN_DELTA

    def __post_init__(self) -> None:
        if not (math.isfinite(self.length) and self.length > 0):
            raise TransformerError(f"line length must be positive, got {self.length!r} m")
        if self.spacing is not None and not (math.isfinite(self.spacing) and self.spacing > self.wire.diameter):
            raise TransformerError(
                f"spacing must exceed the wire diameter ({self.wire.diameter:g} m), got {self.spacing!r} m"
            )
        if not (math.isfinite(self.tan_delta) and self.tan_delta >= 0):
            raise TransformerError(f"tan_delta must be ≥ 0, got {self.tan_delta!r}")

    @property
    def centre_spacing(self) -> float:
        """Centre-to-centre spacing used [m]."""
        return default_pair_spacing(self.wire) if self.spacing is None else float(self.spacing)

    @property
    def eps_eff(self) -> float:
        """Effective relative permittivity [dimensionless]."""
        if self.wire.insulation == 0:
            return 1.0
        return sheathed_pair_eps_eff(self.centre_spacing, self.wire.diameter, self.wire.insulation, self.wire.eps_r)

    @property
    def z0(self) -> float:
        """Lossless characteristic impedance of a pair [Ω]."""
        return two_wire_z0(self.centre_spacing, self.wire.diameter, self.eps_eff)

    @property
    def velocity_factor(self) -> float:
        """v/c0 = 1/√εeff [dimensionless]."""
        return 1.0 / math.sqrt(self.eps_eff)

    def electrical_length(self, frequency_hz) -> np.ndarray:
        """θ = 2π f l √εeff / c0 [rad] of the lossless line."""
        return 2.0 * np.pi * np.asarray(frequency_hz, float) * self.length * math.sqrt(self.eps_eff) / C0

    @property
    def dielectric_fill(self) -> float:
        """Filling factor q = (εeff − 1)/(εr − 1) [dimensionless]: the share of the field in the coating."""
        if self.wire.insulation == 0 or self.wire.eps_r <= 1.0:
            return 0.0
        return (self.eps_eff - 1.0) / (self.wire.eps_r - 1.0)

    def resistance_per_m(self, frequency_hz) -> np.ndarray:
        """Loop resistance R' of both conductors with skin effect [Ω/m] (proximity effect ignored)."""
        return 2.0 * round_wire_resistance(frequency_hz, self.wire.diameter, 1.0)

    def constants(self, frequency_hz):
        """(Zc, γ) of the lossy line at ``frequency_hz`` [Hz]; see :func:`line_constants`."""
        return line_constants(
            frequency_hz, self.z0, self.eps_eff, self.resistance_per_m(frequency_hz), self.tan_delta * self.dielectric_fill
        )
