"""The stray (parallel) capacitance of a single-layer winding: a first estimate.

The estimate works on a :class:`TurnGeometry` that each core shape supplies
(:meth:`cmcheck.model.cores.Core.turn_geometry`): the stretches of one turn and how widely the N
turns spread along each. Users override it with a measured value, or fit it from a measured
self-resonance.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Sequence

import numpy as np

__all__ = [
    "EPS0",
    "RingSection",
    "TurnGeometry",
    "TurnSegment",
    "segment_arrays",
    "stray_capacitance",
    "stray_capacitance_segments",
    "turn_to_turn_capacitance",
    "turn_to_turn_capacitance_segments",
]

EPS0 = 8.8541878128e-12  # [F/m], CODATA 2018


@dataclass(frozen=True)
class TurnSegment:
    """A stretch of one turn along which neighbouring turns run side by side.

    Attributes
    ----------
    length : float
        Length of the stretch along the conductor [m]; stretches with the same spread profile
        (a ring's two faces) may be given as one segment of their total length.
    spread_start, spread_end : float
        Length [m] of the line, across the turns and through the conductor centres, over which
        all N turns spread at either end of the stretch (π(ID − d) on a ring's inside wall):
        the centre spacing of adjacent turns is spread/N there, varying linearly between.
    """

    length: float
    spread_start: float
    spread_end: float


@dataclass(frozen=True)
class RingSection:
    """An equivalent ring section: a ring core of rectangular section [m].

    For a ring this is the ring itself; other shapes state their equivalent. A dielectric
    model of the winding (ε0·εr·h·ln(OD/ID) terms) reads it together with :meth:`winding_angle`.
    """

    od: float
    id: float
    height: float

    def winding_angle(self, turns, conductor_od):
        """Angle [rad] that N touching turns of outside diameter ``conductor_od`` [m] occupy
        round the inside wall, at most 2π.

        References
        ----------
        Elementary geometry: each turn takes 2·asin(d/(ID − d)) of the circle through the
        conductor centres (as :func:`cmcheck.model.winding.max_turns_single_layer`).
        """
        d = np.asarray(conductor_od, float)
        s = np.clip(d / np.maximum(self.id - d, 1e-300), 0.0, 1.0)
        a = np.minimum(np.asarray(turns, float) * 2.0 * np.arcsin(s), 2.0 * np.pi)
        return float(a) if np.ndim(a) == 0 else a


@dataclass(frozen=True)
class TurnGeometry:
    """The geometry of one turn that the stray-capacitance estimate works on.

    Attributes
    ----------
    segments : tuple of TurnSegment
        The stretches of one turn, each with the spread of the N turns along it.
    section : RingSection
        Equivalent ring section the winding sits on.
    rings : int
        How many such sections one turn passes through (1 for a ring, 2 for a two-hole core).
    """

    segments: tuple[TurnSegment, ...]
    section: RingSection
    rings: int = 1




def segment_arrays(geometries: Sequence[TurnGeometry]) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Lengths and spreads of the segments of several turn geometries as arrays (G, S) [m].

    Shorter lists are padded with zero-length segments, which contribute nothing.
    """
    s = max((len(g.segments) for g in geometries), default=0)
    out = np.zeros((3, len(geometries), s))
    for i, g in enumerate(geometries):
        for j, seg in enumerate(g.segments):
            out[:, i, j] = seg.length, seg.spread_start, seg.spread_end
    return out[0], out[1], out[2]


def _two_wire_capacitance_per_length(spacing, diameter, eps_r):
    """π ε / acosh(s/d) [F/m] between two parallel round conductors (Ramo et al. Table 5.11)."""
    ratio = np.maximum(np.asarray(spacing, float) / np.asarray(diameter, float), 1.0 + 1e-6)
    return np.pi * EPS0 * eps_r / np.arccosh(ratio)


def turn_to_turn_capacitance_segments(length, spread_start, spread_end, conductor_od, conductor_diameter, turns,
                                      eps_r=1.0):
    """Capacitance between two adjacent turns, Ctt [F], from segment arrays.

    Along each segment adjacent turns are two parallel round conductors whose centre spacing
    is spread/N (never below the outside diameter d, where they touch), varying linearly from
    the segment's start to its end; the two-wire capacitance per length is integrated along it.

    Parameters
    ----------
    length, spread_start, spread_end : array_like
        Segment lengths and spreads [m], the segment axis last, shape (..., S)
        (:func:`segment_arrays`).
    conductor_od : array_like
        Outside diameter of the insulated conductor or cable [m], shape (...).
    conductor_diameter : array_like
        Diameter of the metal carrying the current (bare wire, cable shield) [m], shape (...).
    turns : array_like
        N [dimensionless], shape (...), ≥ 2 for this to mean anything.
    eps_r : float or array_like
        Effective relative permittivity between the turns [dimensionless], shape (...).

    Returns
    -------
    numpy.ndarray or float
        Ctt [F], shape (...).

    References
    ----------
    Two-wire line capacitance C' = π ε / acosh(s/d): Ramo, Whinnery & Van Duzer, *Fields and
    Waves in Communication Electronics*, 3rd ed., 1994, Table 5.11a. The use for adjacent
    turns follows A. Massarini & M. K. Kazimierczuk, IEEE Trans. Power Electron. 12(4), 1997,
    Sec. III (turn-to-turn capacitance as the elementary capacitance of a winding).
    """
    d_out = np.asarray(conductor_od, float)[..., None]
    d = np.asarray(conductor_diameter, float)[..., None]
    n = np.maximum(np.asarray(turns, float), 1.0)[..., None]
    eps = np.asarray(eps_r, float)[..., None]
    s0 = np.maximum(np.asarray(spread_start, float) / n, d_out)
    s1 = np.maximum(np.asarray(spread_end, float) / n, d_out)
    s0, s1 = np.broadcast_arrays(s0, s1)
    c_per_len = _two_wire_capacitance_per_length(s0, d, eps)
    # Where the spacing varies along a segment, average C' over it: 8-point Gauss–Legendre,
    # only for the segment columns that need it (the sizing search evaluates thousands).
    vary = np.flatnonzero(np.any((s1 != s0).reshape(-1, s0.shape[-1]), axis=0)) if s0.size else []
    if len(vary):
        x, wt = np.polynomial.legendre.leggauss(8)
        t = (x + 1.0) / 2.0
        a, b = s0[..., vary], s1[..., vary]
        sv = a[..., None] + (b - a)[..., None] * t
        c_per_len[..., vary] = np.sum(_two_wire_capacitance_per_length(sv, d[..., None], eps[..., None]) * wt / 2.0,
                                      axis=-1)
    c = np.sum(c_per_len * np.asarray(length, float), axis=-1)
    return float(c) if np.ndim(c) == 0 else c


def stray_capacitance_segments(length, spread_start, spread_end, conductor_od, conductor_diameter, turns, eps_r=1.0):
    """First estimate of a single-layer winding's stray (parallel) capacitance Cp [F].

    Cp = 0 for one turn, Ctt for two, and (1 + √3)/2 · Ctt ≈ 1.366 Ctt for three or more,
    with Ctt from :func:`turn_to_turn_capacitance_segments` (same parameters).

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
    ctt = turn_to_turn_capacitance_segments(length, spread_start, spread_end, conductor_od, conductor_diameter,
                                            turns, eps_r)
    factor = np.where(n <= 1, 0.0, np.where(n == 2, 1.0, (1.0 + math.sqrt(3.0)) / 2.0))
    c = factor * ctt
    return float(c) if np.ndim(c) == 0 else c


def turn_to_turn_capacitance(geometry: TurnGeometry, conductor_od, conductor_diameter, turns, eps_r=1.0):
    """Ctt [F] of adjacent turns on a core of turn geometry ``geometry``.

    Parameters
    ----------
    geometry : TurnGeometry
        From the core, for this conductor's outside diameter.
    conductor_od, conductor_diameter, turns, eps_r : array_like
        As for :func:`turn_to_turn_capacitance_segments`; ``turns`` may be an array.

    References
    ----------
    As :func:`turn_to_turn_capacitance_segments` (Ramo et al. 1994 Table 5.11a; Massarini &
    Kazimierczuk 1997 Sec. III).
    """
    ln, p0, p1 = (a[0] for a in segment_arrays([geometry]))
    return turn_to_turn_capacitance_segments(ln, p0, p1, conductor_od, conductor_diameter, turns, eps_r)


def stray_capacitance(geometry: TurnGeometry, conductor_od, conductor_diameter, turns, eps_r=1.0):
    """First estimate of the stray capacitance Cp [F] of a single-layer winding on a core.

    Parameters
    ----------
    geometry : TurnGeometry
        From the core (:meth:`cmcheck.model.cores.Core.turn_geometry`).
    conductor_od, conductor_diameter, turns, eps_r : array_like
        As for :func:`turn_to_turn_capacitance_segments`; ``turns`` may be an array.

    References
    ----------
    A. Massarini & M. K. Kazimierczuk, IEEE Trans. Power Electron. 12(4), 671–676, 1997 (see
    :func:`stray_capacitance_segments`).
    """
    ln, p0, p1 = (a[0] for a in segment_arrays([geometry]))
    return stray_capacitance_segments(ln, p0, p1, conductor_od, conductor_diameter, turns, eps_r)
