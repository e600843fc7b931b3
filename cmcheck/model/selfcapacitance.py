"""Self-capacitance of a single-layer winding on a ring core, by the energy method, as parts.

The turns of a ring winding are taken to carry a linear voltage ramp from 0 (first turn) to V
(last turn) over the winding angle Φw; every part below is then Ci = 2·Wi/V², Wi the energy
that part stores, and the parts add (the terminal capacitance Cp is their sum):

- ``gap``: the field through a dielectric core (NiZn ferrite, εr ≈ 10–15), along the ferrite
  under the winding and back across the unwound gap;
- ``air``: the air field between the winding's two ends (first to last turn);
- ``chain``: adjacent turn to adjacent turn (the elementary cell of Massarini & Kazimierczuk);
  with a linear ramp the whole chain stores only Ctt/(N − 1), which is why adjacent-turn
  models under-state ring windings;
- ``core``: a conductive core (MnZn ferrite, metal powder) is a floating electrode under every
  turn: turn to core to turn, ≈ N·Ctc/12, the dominant part for such cores;
- ``leads``: the two leads to the terminals as a two-wire line.

Everything is SI (metres, farads, radians). Pure functions, vectorised over arrays of equal or
broadcastable shape; :func:`self_capacitance` returns all parts in one frozen record so a
report can show the breakdown. The choke model and the sizing search use it through
:mod:`cmcheck.model.winding_cp`.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from ..errors import WindingError

__all__ = [
    "CORE_CLASSES",
    "GAP_CONSTANT",
    "SPREAD_ANGLE",
    "SelfCapacitance",
    "air_end_capacitance",
    "close_wound_angle",
    "contact_capacitance_per_length",
    "core_bridge_capacitance",
    "ferrite_gap_capacitance",
    "lead_capacitance",
    "self_capacitance",
    "turn_length",
    "turn_to_turn_chain_capacitance",
    "two_wire_capacitance_per_length",
]

EPS0 = 8.8541878128e-12  # [F/m], CODATA 2018

#: Gap constant k of :func:`ferrite_gap_capacitance` [dimensionless], calibrated against our
#: own 2-D finite-volume field solve of the ring section (examples/ring_gap_field_solve.py).
GAP_CONSTANT = 0.42

#: Winding angle of a winding "spread over the ring" [rad]: 300°, the ends a sixth of the ring
#: apart (common practice, no published source).
SPREAD_ANGLE = 5.0 * math.pi / 3.0

#: Electrical classes of a core for this model.
CORE_CLASSES = ("dielectric", "conductive")


def _arr(x) -> np.ndarray:
    return np.asarray(x, dtype=float)


def _out(x):
    x = np.asarray(x, dtype=float)
    return float(x) if x.ndim == 0 else x


def two_wire_capacitance_per_length(spacing, diameter, eps_r=1.0):
    """Capacitance per length between two parallel round conductors, C' = π ε / acosh(s/d).

    Parameters
    ----------
    spacing : array_like
        Centre-to-centre spacing s [m] (clipped to ≥ diameter: the conductors touch).
    diameter : array_like
        Conductor (metal) diameter d [m].
    eps_r : array_like
        Relative permittivity of the surrounding medium [dimensionless].

    Returns
    -------
    numpy.ndarray or float
        C' [F/m].

    References
    ----------
    S. Ramo, J. R. Whinnery, T. Van Duzer, *Fields and Waves in Communication Electronics*,
    3rd ed., Wiley 1994, Table 5.11a (parallel-wire line).
    """
    s = np.maximum(_arr(spacing), _arr(diameter) * (1.0 + 1e-9))
    return _out(math.pi * EPS0 * _arr(eps_r) / np.arccosh(s / _arr(diameter)))


def turn_length(core_od, core_id, height, conductor_od):
    """Length of one turn hugging a ring of rectangular section [m]: 2·(OD − ID)/2 + 2·H + 4·d.

    Parameters
    ----------
    core_od, core_id, height : array_like
        Ring outer and inner diameter and height [m].
    conductor_od : array_like
        Conductor outside diameter, insulation included [m] (the corners add about 4·d).

    References
    ----------
    Elementary geometry (perimeter of the section grown by the conductor radius, corners
    taken as square).
    """
    return _out((_arr(core_od) - _arr(core_id)) + 2.0 * _arr(height) + 4.0 * _arr(conductor_od))


def close_wound_angle(core_id, conductor_od, turns):
    """Winding angle Φw of a close-wound winding, first to last turn centre [rad].

    Turns touching on the inner wall: each takes the pitch angle 2·asin(d/(ID − d)) of the
    circle of conductor centres, radius (ID − d)/2; Φw = (N − 1)·pitch, at most 2π − pitch
    (a full ring: the last turn touches the first).

    Parameters
    ----------
    core_id : array_like
        Ring inner diameter [m].
    conductor_od : array_like
        Conductor outside diameter, insulation included [m].
    turns : array_like
        N [dimensionless].
    Returns
    -------
    numpy.ndarray or float
        Φw [rad]; 0 for one turn.

    References
    ----------
    Elementary geometry of equal circles along the rim of a circle.
    """
    d = _arr(conductor_od)
    ratio = d / (_arr(core_id) - d)
    if np.any(~(ratio > 0)) or np.any(ratio >= 1.0):
        raise WindingError("conductor_od must be positive and smaller than half of core_id")
    pitch = 2.0 * np.arcsin(ratio)
    return _out(np.minimum((np.maximum(_arr(turns), 1.0) - 1.0) * pitch, 2.0 * math.pi - pitch))


def ferrite_gap_capacitance(core_od, core_id, height, winding_angle, core_eps_r, gap_constant=GAP_CONSTANT):
    """Capacitance through a dielectric ring core, Cg = ε0(εr − 1)·H·ln(OD/ID)·[1/Φw + k/(2π − Φw)].

    With the ferrite under the winding held at the turn-voltage ramp, the azimuthal field
    E = V/(Φw·r) stores ½ε0εr·H·ln(OD/ID)·V²/Φw (the first term); the ferrite of the unwound
    gap carries the full V back over 2π − Φw, weakened by the imperfect grip of discrete turns
    at the winding's ends (k < 1; the second term). Only the part above air (εr − 1) is
    counted here: the εr = 1 share is the air field of :func:`air_end_capacitance`.

    Parameters
    ----------
    core_od, core_id, height : array_like
        Ring (or stack) dimensions [m].
    winding_angle : array_like
        Φw [rad], 0 < Φw < 2π.
    core_eps_r : array_like
        Relative permittivity of the core material [dimensionless] (NiZn ≈ 10–15).
    gap_constant : array_like
        k [dimensionless]; :data:`GAP_CONSTANT` from our 2-D field solve (see Notes).

    Returns
    -------
    numpy.ndarray or float
        Cg [F].

    Notes
    -----
    k was fitted to a 2-D finite-volume solve of the ring's mid-height section (our own,
    examples/ring_gap_field_solve.py; tests/test_selfcapacitance.py reruns a coarse case):
    over Φw = 0.5·2π … 0.9·2π, εr = 10–15 and three rings (25.4 × 15.5, 16.25 × 7.9 and
    10 × 4 mm, 0.25–0.3 mm wire) it gives k = 0.31–0.51, mean 0.42 (:data:`GAP_CONSTANT`).
    A close winding over a quarter ring gives k ≈ −0.4: there the discrete turns hold the
    ferrite under the winding below the ideal ramp and this form over-states Cg by about
    30 %; for a few close-wound turns far more (the same solve on the 16.25 × 7.9 mm ring,
    0.6 mm wire: 0.2× this form for 3 turns, Φw = 0.37 rad; 0.47× for 6 turns, Φw = 0.91 rad).
    Use it for windings spread over half the ring or more. A 2-D section omits the top and
    bottom faces and the fringing above and below the ring; treat k as ±0.2.

    References
    ----------
    Energy method for winding capacitance with a linear voltage distribution: A. Massarini &
    M. K. Kazimierczuk, "Self-capacitance of inductors", IEEE Trans. Power Electron. 12(4),
    671–676, 1997, Sec. II (C = 2W/V² over the winding's elementary capacitances). The field in
    an annular sector, E = V/(Φ·r): D. K. Cheng, *Field and Wave Electromagnetics*, 2nd ed.,
    Addison-Wesley 1989, §4-3 (Laplace in cylindrical coordinates, φ-dependent solution).
    """
    phi = _arr(winding_angle)
    if np.any(~((phi > 0) & (phi < 2.0 * math.pi))):
        raise WindingError("winding_angle must lie between 0 and 2π rad")
    geo = EPS0 * (_arr(core_eps_r) - 1.0) * _arr(height) * np.log(_arr(core_od) / _arr(core_id))
    return _out(geo * (1.0 / phi + _arr(gap_constant) / (2.0 * math.pi - phi)))


def air_end_capacitance(core_od, core_id, height, conductor_diameter, conductor_od, winding_angle):
    """Air capacitance between the first and the last turn across the winding's gap [F].

    The two end turns as parallel wires of one turn length: on the inner wall at the chord
    of the circle of radius (ID − d)/2, on the outer wall at that of (OD + d)/2, and on the two
    faces at the mean of the two; the end turns see the full terminal voltage.

    Parameters
    ----------
    core_od, core_id, height : array_like
        Ring dimensions [m].
    conductor_diameter : array_like
        Metal diameter [m].
    conductor_od : array_like
        Outside diameter with insulation [m].
    winding_angle : array_like
        Φw [rad].

    Returns
    -------
    numpy.ndarray or float
        Ca [F]. A lower estimate: the turns next to the ends, at nearly the same voltage,
        add a field of their own that this pair leaves out.

    References
    ----------
    Ramo, Whinnery & Van Duzer, 3rd ed., 1994, Table 5.11a (two-wire capacitance), applied
    to the end pair as in the energy method of Massarini & Kazimierczuk, IEEE T-PEL 12(4), 1997.
    """
    d, do = _arr(conductor_diameter), _arr(conductor_od)
    half = np.abs(np.sin(_arr(winding_angle) / 2.0))
    r_in = (_arr(core_id) - do) / 2.0
    r_out = (_arr(core_od) + do) / 2.0
    h, w = _arr(height), (_arr(core_od) - _arr(core_id)) / 2.0
    c = (two_wire_capacitance_per_length(2 * r_in * half, d) * h
         + two_wire_capacitance_per_length(2 * r_out * half, d) * h
         + two_wire_capacitance_per_length((r_in + r_out) * half, d) * 2.0 * w)
    return _out(c)


def turn_to_turn_chain_capacitance(core_od, core_id, height, conductor_diameter, conductor_od, turns, winding_angle):
    """The adjacent-turn chain under a linear ramp, Cc = Ctt/(N − 1) [F] (0 for one turn).

    N − 1 adjacent pairs each see V/(N − 1): W = ½(N − 1)·Ctt·(V/(N − 1))². Ctt is the
    two-wire capacitance at the pitch on the inner wall, outer wall and (mean) faces.

    Parameters
    ----------
    core_od, core_id, height : array_like
        Ring dimensions [m].
    conductor_diameter, conductor_od : array_like
        Metal and outside diameters [m].
    turns : array_like
        N [dimensionless].
    winding_angle : array_like
        Φw [rad].

    Returns
    -------
    numpy.ndarray or float
        Cc [F].

    References
    ----------
    Massarini & Kazimierczuk, IEEE T-PEL 12(4), 1997, Sec. II (energy of the chain of
    elementary cells); Ramo, Whinnery & Van Duzer, 3rd ed., Table 5.11a (two-wire C').
    The contrast with their solenoid limit 1.366·Ctt: D. W. Knight, "The self-capacitance of
    toroidal inductors" (web article, g3ynh.info), whose measurements show ring-winding
    self-capacitance independent of wire size and nearly of N.
    """
    n = np.maximum(_arr(turns), 1.0)
    d, do = _arr(conductor_diameter), _arr(conductor_od)
    gaps = np.maximum(n - 1.0, 1.0)
    step = _arr(winding_angle) / gaps
    s_in = step * (_arr(core_id) - do) / 2.0
    s_out = step * (_arr(core_od) + do) / 2.0
    h, w = _arr(height), (_arr(core_od) - _arr(core_id)) / 2.0
    ctt = (two_wire_capacitance_per_length(s_in, d) * h + two_wire_capacitance_per_length(s_out, d) * h
           + two_wire_capacitance_per_length((s_in + s_out) / 2.0, d) * 2.0 * w)
    return _out(np.where(n > 1.0, ctt / gaps, 0.0))


def contact_capacitance_per_length(conductor_diameter, insulation, insulation_eps_r, coating=0.0, coating_eps_r=3.5):
    """Capacitance per length from an insulated round wire lying on a conducting surface [F/m].

    Massarini & Kazimierczuk's cell for two touching coated wires,
    C' = ε0·[εr·θ*/ln(Do/D) + cot(θ*/2) − cot(π/12)], θ* = arccos(1 − ln(Do/D)/εr),
    doubled by the image in the conducting plane (Ctc = 2·Ctt). A coating of thickness tc and
    permittivity εc on the core adds to the wire's insulation as tc·εr/εc (the same series
    field, rescaled to the insulation's permittivity).

    Parameters
    ----------
    conductor_diameter : array_like
        Metal diameter D [m].
    insulation : array_like
        Radial insulation thickness [m] (> 0: bare wire on a bare conductive core is a short).
    insulation_eps_r : array_like
        εr of the insulation [dimensionless] (enamel ≈ 3–4).
    coating : array_like
        Thickness of the core's coating [m] (0 for an uncoated core).
    coating_eps_r : array_like
        εc of the coating [dimensionless].

    Returns
    -------
    numpy.ndarray or float
        C'tc [F/m].

    References
    ----------
    A. Massarini & M. K. Kazimierczuk, "Self-capacitance of inductors", IEEE Trans. Power
    Electron. 12(4), 671–676, 1997, Sec. III (turn-to-turn cell, θ*; turn-to-core as twice
    the turn-to-turn cell). The coating rescaling: series dielectric layers, common practice.
    """
    er = _arr(insulation_eps_r)
    t = _arr(insulation) + _arr(coating) * er / _arr(coating_eps_r)
    if np.any(~(t > 0)):
        raise WindingError("insulation plus coating must be > 0 m for a wire on a conductive core")
    d = _arr(conductor_diameter)
    lnr = np.log((d + 2.0 * t) / d)
    theta = np.arccos(np.clip(1.0 - lnr / er, -1.0, 1.0))
    cell = er * theta / lnr + 1.0 / np.tan(theta / 2.0) - 1.0 / math.tan(math.pi / 12.0)
    return _out(2.0 * EPS0 * np.maximum(cell, 0.0))


def core_bridge_capacitance(turn_to_core, turns):
    """Turn to floating conductive core to turn, Cb = Ctc·N(N + 1)/(12(N − 1)) [F] (0 for N = 1).

    The core floats at the mean turn voltage V/2; turn i (of N, at V·i/(N − 1)) stores
    ½Ctc(Vi − V/2)²; the sum is ½Ctc·V²·N(N + 1)/(12(N − 1)) → N·Ctc/12 for many turns.

    Parameters
    ----------
    turn_to_core : array_like
        Ctc, one turn to the core [F].
    turns : array_like
        N [dimensionless].

    References
    ----------
    Energy method of Massarini & Kazimierczuk, IEEE T-PEL 12(4), 1997, Sec. II, with the core
    as a floating node (their core-to-turn capacitance Ctc); the variance of N equally spaced
    values, (N + 1)/(12(N − 1))·V², is elementary.
    """
    n = np.maximum(_arr(turns), 1.0)
    return _out(np.where(n > 1.0, _arr(turn_to_core) * n * (n + 1.0) / (12.0 * np.maximum(n - 1.0, 1.0)), 0.0))


def lead_capacitance(lead_length, lead_spacing, conductor_diameter):
    """The two leads as a two-wire line of length ℓ, Cl = ℓ·π ε0 / acosh(s/d) [F].

    Parameters
    ----------
    lead_length : array_like
        ℓ [m] (0 for none).
    lead_spacing : array_like
        Centre spacing of the leads [m].
    conductor_diameter : array_like
        Metal diameter [m].

    References
    ----------
    Ramo, Whinnery & Van Duzer, 3rd ed., 1994, Table 5.11a.
    """
    return _out(_arr(lead_length) * two_wire_capacitance_per_length(lead_spacing, conductor_diameter))


@dataclass(frozen=True)
class SelfCapacitance:
    """The parts of a ring winding's self-capacitance [F] and the winding angle used [rad]."""

    gap: float | np.ndarray
    air: float | np.ndarray
    chain: float | np.ndarray
    core: float | np.ndarray
    leads: float | np.ndarray
    winding_angle: float | np.ndarray

    @property
    def total(self):
        """Cp = gap + air + chain + core + leads [F]."""
        return _out(_arr(self.gap) + _arr(self.air) + _arr(self.chain) + _arr(self.core) + _arr(self.leads))


def self_capacitance(core_od, core_id, height, turns, conductor_diameter, insulation=0.02e-3,
                     insulation_eps_r=3.5, *, winding_angle=None, core_eps_r=12.0,
                     core_class="dielectric", coating=0.0, coating_eps_r=3.5,
                     lead_length=0.015, lead_spacing=0.003, gap_constant=GAP_CONSTANT) -> SelfCapacitance:
    """Self-capacitance Cp of a single-layer winding on a ring core, with its parts.

    Parameters
    ----------
    core_od, core_id, height : array_like
        Ring-equivalent dimensions [m] (stacked rings: heights add).
    turns : array_like
        N [dimensionless], ≥ 1.
    conductor_diameter : array_like
        Metal (bare) diameter [m].
    insulation : array_like
        Radial insulation thickness [m] (default 0.02 mm, single-build enamel).
    insulation_eps_r : array_like
        εr of the insulation [dimensionless] (default 3.5, enamel).
    winding_angle : array_like or None
        Φw, first to last turn [rad]. None (default): spread over the ring as practitioners
        wind a choke, :data:`SPREAD_ANGLE` (300°), or close-wound (:func:`close_wound_angle`)
        where the turns fill more than that. Pass ``close_wound_angle(...)`` for a bunched
        winding (the ferrite part is then over-stated for few turns; see
        :func:`ferrite_gap_capacitance`). Cp changes by up to about 2.4× between the two.
    core_eps_r : array_like
        εr of a dielectric core [dimensionless] (default 12, NiZn ferrite).
    core_class : {"dielectric", "conductive"}
        "conductive" (MnZn ferrite, metal powder): the core is a floating electrode; the gap
        part is replaced by the turn-to-core-to-turn part.
    coating, coating_eps_r : array_like
        Core coating thickness [m] (default 0) and εr [dimensionless] (conductive cores).
    lead_length, lead_spacing : array_like
        Leads to the terminals [m] (defaults 15 mm at 3 mm spacing: a short fixture;
        common practice, no published source).
    gap_constant : array_like
        k of :func:`ferrite_gap_capacitance` [dimensionless].

    Returns
    -------
    SelfCapacitance
        Parts in farads; ``.total`` is Cp. One turn: only the leads.

    References
    ----------
    A. Massarini & M. K. Kazimierczuk, IEEE Trans. Power Electron. 12(4), 671–676, 1997
    (energy method, turn-to-turn and turn-to-core cells); G. Grandi, M. K. Kazimierczuk,
    A. Massarini, U. Reggiani, "Stray capacitances of single-layer solenoid air-core
    inductors", IEEE Trans. Ind. Appl. 35(5), 1162–1168, 1999 (the chain of cells for a single
    layer, and its limits); D. W. Knight, "The self-capacitance of toroidal inductors" (web
    article, g3ynh.info): ring-winding self-capacitance is set by the field across the
    winding's ends and through the core, not by adjacent turns.
    """
    if core_class not in CORE_CLASSES:
        raise WindingError(f"core_class must be one of {', '.join(CORE_CLASSES)}, got {core_class!r}")
    n = _arr(turns)
    if np.any(~(n >= 1)) or np.any(n != np.round(n)):
        raise WindingError("turns must be a whole number ≥ 1")
    od, idd, h = _arr(core_od), _arr(core_id), _arr(height)
    if np.any(~(h > 0)) or np.any(~(od > idd)) or np.any(~(idd > 0)):
        raise WindingError("core dimensions need core_od > core_id > 0 and height > 0")
    d = _arr(conductor_diameter)
    if np.any(~(d > 0)) or np.any(_arr(insulation) < 0):
        raise WindingError("conductor_diameter must be > 0 m and insulation ≥ 0 m")
    do = d + 2.0 * _arr(insulation)
    if winding_angle is None:
        phi = np.maximum(SPREAD_ANGLE, close_wound_angle(idd, do, n))
    else:
        phi = _arr(winding_angle)
        if np.any(~((phi > 0) & (phi < 2.0 * math.pi))):
            raise WindingError("winding_angle must lie between 0 and 2π rad")
    many = n > 1
    # One turn has no ramp across the ring: keep Φw inside (0, 2π) for the formulas, zero after.
    phi_ok = np.clip(np.where(many, phi, math.pi), 1e-6, 2.0 * math.pi - 1e-6)
    zero = np.zeros(np.broadcast(n, od, d, phi_ok).shape)
    air = np.where(many, air_end_capacitance(od, idd, h, d, do, phi_ok), 0.0) + zero
    chain = turn_to_turn_chain_capacitance(od, idd, h, d, do, n, phi_ok) + zero
    if core_class == "dielectric":
        gap = np.where(many, ferrite_gap_capacitance(od, idd, h, phi_ok, core_eps_r, gap_constant), 0.0) + zero
        core = zero
    else:
        gap = zero
        per_length = contact_capacitance_per_length(d, insulation, insulation_eps_r, coating, coating_eps_r)
        ctc = per_length * turn_length(od, idd, h, do)
        core = core_bridge_capacitance(ctc, n) + zero
    leads = lead_capacitance(lead_length, lead_spacing, d) + zero
    return SelfCapacitance(_out(gap), _out(air), _out(chain), _out(core), _out(leads), _out(phi + zero))
