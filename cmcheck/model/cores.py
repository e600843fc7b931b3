"""Core shapes behind one contract (:class:`Core`): ring cores, stacks, sleeves and factor-only cores.

Everything the rest of cmcheck needs from a core — its factor C1 = Σl/A, effective parameters,
the hole the winding passes through, its surface and volume, the length and bend of one turn
and the turn geometry the stray-capacitance estimate works on — comes through the protocol, so
the choke model, the sizing search and the heat check never ask which shape they hold. The
two-hole core lives in :mod:`cmcheck.model.two_hole`. Everything in metres.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace
from functools import cached_property
from typing import Protocol, runtime_checkable

import numpy as np

from .. import limits
from ..errors import DimensionError
from .capacitance import RingSection, TurnGeometry, TurnSegment

__all__ = [
    "Core",
    "FactorCore",
    "RingCore",
    "RingSection",
    "TurnGeometry",
    "TurnSegment",
    "effective_parameters",
    "ring_bend_radius",
    "ring_core_factors",
    "ring_surface_area",
    "ring_turn_length",
    "sleeve",
]


# ---------------------------------------------------------------------------------------------
# The contract
# ---------------------------------------------------------------------------------------------


@runtime_checkable
class Core(Protocol):
    """What every core shape provides. Lengths [m], areas [m²], volumes [m³]; ``None`` where a
    shape given only partly (:class:`FactorCore`) does not know the quantity.

    To add a shape: implement these members in a frozen dataclass, state its effective-parameter
    approximation with a source, and add it to tests/test_core_protocol.py (see DEVELOPERS.md).
    """

    #: Core factor Σl/A [1/m]; effective length [m], area [m²] and volume [m³] (IEC 60205).
    c1: float
    le: float | None
    ae: float | None
    ve: float | None
    #: Number of identical pieces.
    stack: int
    #: Diameter of the hole the winding passes through [m] (fit check).
    window_diameter: float | None
    #: Outside surface of the core as one body [m²] (heat).
    surface_area: float | None
    #: Geometric volume of material [m³] (cost ranking).
    volume: float | None
    #: Names of the parameters not given that the turn length and Cp estimate need.
    missing: tuple[str, ...]

    def turn_length(self, conductor_od: float) -> float | None:
        """Length of one turn along the centre of a conductor of this outside diameter [m]."""

    def turn_geometry(self, conductor_od: float) -> TurnGeometry | None:
        """Turn geometry for the stray-capacitance estimate."""

    def bend_radius(self, conductor_od: float) -> float | None:
        """Tightest bend radius of the conductor's centre line wound round the core [m]."""

    def stacked(self, count: int) -> "Core":
        """``count`` of the same piece stacked."""

    def dimensions(self) -> dict:
        """The defining dimensions of one piece, SI with unit-suffixed keys (``od_m``...)."""

    def describe(self) -> str:
        """A short human description."""

    def to_dict(self) -> dict:
        """JSON-ready: ``core_shape``, dimensions, ``cores`` and effective parameters (SI)."""


# ---------------------------------------------------------------------------------------------
# Ring geometry (vectorised)
# ---------------------------------------------------------------------------------------------


def ring_core_factors(od, id, height):
    """Core factors C1 = Σl/A and C2 = Σl/A² of a ring core of rectangular section.

    Parameters
    ----------
    od : array_like
        Outside diameter [m].
    id : array_like
        Inside diameter [m], below ``od``.
    height : array_like
        Axial height [m].

    Returns
    -------
    c1 : numpy.ndarray or float
        Σl/A [1/m].
    c2 : numpy.ndarray or float
        Σl/A² [1/m³].

    References
    ----------
    IEC 60205:2016, Calculation of the effective parameters of magnetic piece parts,
    clause for ring cores of rectangular cross-section: with r1 = ID/2 and r2 = OD/2,
    C1 = 2π/(h·ln(r2/r1)), C2 = 2π(1/r1 − 1/r2)/(h²·ln³(r2/r1)).
    """
    r2 = np.asarray(od, dtype=float) / 2.0
    r1 = np.asarray(id, dtype=float) / 2.0
    h = np.asarray(height, dtype=float)
    ln = np.log(r2 / r1)
    c1 = 2.0 * np.pi / (h * ln)
    c2 = 2.0 * np.pi * (1.0 / r1 - 1.0 / r2) / (h**2 * ln**3)
    return _scalar(c1), _scalar(c2)


def effective_parameters(c1, c2):
    """Effective length, area and volume from the core factors.

    Parameters
    ----------
    c1 : array_like
        Σl/A [1/m].
    c2 : array_like
        Σl/A² [1/m³].

    Returns
    -------
    le : Effective magnetic path length [m], C1²/C2.
    ae : Effective area [m²], C1/C2.
    ve : Effective volume [m³], C1³/C2².

    References
    ----------
    IEC 60050-221:1990, IEV 221-04-31 (effective dimensions of a magnetic circuit) and
    IEC 60205:2016, clause 4 (definitions of le, Ae, Ve from C1 and C2).
    """
    c1 = np.asarray(c1, dtype=float)
    c2 = np.asarray(c2, dtype=float)
    return _scalar(c1**2 / c2), _scalar(c1 / c2), _scalar(c1**3 / c2**2)


def ring_surface_area(od, id, height):
    """Outside surface of a ring (two faces, outer and inner walls) [m²].

    Parameters
    ----------
    od, id, height : array_like
        Outside diameter, inside diameter and height [m].

    References
    ----------
    Elementary geometry of a hollow cylinder; used as the cooling surface in
    C. W. T. McLyman, *Transformer and Inductor Design Handbook*, 3rd ed., Marcel Dekker 2004,
    ch. 6 (temperature rise from surface dissipation).
    """
    od = np.asarray(od, dtype=float)
    id = np.asarray(id, dtype=float)
    h = np.asarray(height, dtype=float)
    return _scalar(0.5 * np.pi * (od**2 - id**2) + np.pi * (od + id) * h)


def ring_turn_length(core_od, core_id, height, conductor_od):
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
    return _scalar(2.0 * (w + np.asarray(height, float)) + np.pi * np.asarray(conductor_od, float))


def ring_bend_radius(core_od, core_id, height, conductor_od):
    """Bend radius of a conductor wound round a ring's section, at its tightest [m].

    A stiff cable does not follow the section's corners: it wraps 180° round the narrower side
    of the section (radial width (OD − ID)/2 or axial height), so its centre line bends with
    radius ≈ (narrower side + conductor OD)/2.

    Parameters
    ----------
    core_od, core_id, height : array_like
        Ring or stack outside diameter, inside diameter and total height [m].
    conductor_od : array_like
        Cable outside diameter [m].

    Returns
    -------
    numpy.ndarray or float
        Bend radius of the cable's centre line [m].

    References
    ----------
    Elementary geometry of a conductor wrapped round a rectangle; the simplification (a half
    circle round the narrow side) is common practice, no published source.
    """
    w = (np.asarray(core_od, float) - np.asarray(core_id, float)) / 2.0
    return _scalar((np.minimum(w, np.asarray(height, float)) + np.asarray(conductor_od, float)) / 2.0)


def ring_turn_geometry(od: float, id: float, height: float, conductor_od: float, rings: int = 1) -> TurnGeometry:
    """Turn geometry of a single-layer winding on a ring section [m].

    Adjacent turns spread over π(ID − d) on the inside wall and π(OD + d) on the outside wall
    (lines through the conductor centres); across each face the spread grows linearly from one
    to the other.

    References
    ----------
    Elementary geometry of a ring winding, as used for the turn-to-turn capacitance in
    A. Massarini & M. K. Kazimierczuk, IEEE Trans. Power Electron. 12(4), 1997, Sec. III.
    """
    p_in = math.pi * (id - conductor_od)
    p_out = math.pi * (od + conductor_od)
    w = (od - id) / 2.0
    # The two faces have the same spread profile, so one segment of twice the width covers both.
    segments = (TurnSegment(height, p_in, p_in), TurnSegment(2.0 * w, p_in, p_out), TurnSegment(height, p_out, p_out))
    return TurnGeometry(segments, RingSection(od, id, height), rings)


def _scalar(a):
    a = np.asarray(a)
    return float(a) if a.ndim == 0 else a


def _positive(name: str, value: float, parameter: str | None = None) -> float:
    if not (isinstance(value, (int, float)) and math.isfinite(value) and value > 0):
        raise DimensionError(f"core {name} must be a positive length, got {value * 1e3:g} mm" if isinstance(value, (int, float)) else f"core {name} must be a positive length, got {value!r}", parameter=parameter or name.lower())
    return limits.check(parameter or name.lower(), value, limits.CORE_DIMENSION, DimensionError, what=f"{value:g} m")


def _check_stack(stack) -> None:
    if isinstance(stack, bool) or not isinstance(stack, (int, np.integer)) or stack < 1:
        raise DimensionError(f"number of stacked cores must be a whole number ≥ 1, got {stack!r}", parameter="cores")
    limits.check("cores", int(stack), limits.STACK, DimensionError)


# ---------------------------------------------------------------------------------------------
# Shapes
# ---------------------------------------------------------------------------------------------


@dataclass(frozen=True)
class RingCore:
    """A ring (toroid) core, or a stack of ``stack`` identical rings side by side.

    Parameters
    ----------
    od : float
        Outside diameter [m].
    id : float
        Inside diameter [m].
    height : float
        Height of one ring [m].
    stack : int
        Number of identical rings stacked; heights add, so C1 divides by ``stack``.
    """

    od: float
    id: float
    height: float
    stack: int = 1

    def __post_init__(self) -> None:
        _positive("OD", self.od)
        _positive("ID", self.id)
        _positive("height", self.height)
        if self.id >= self.od:
            raise DimensionError(
                f"core ID ({self.id * 1e3:g} mm) must be smaller than OD ({self.od * 1e3:g} mm)"
            )
        _check_stack(self.stack)

    @property
    def total_height(self) -> float:
        """Height of the whole stack [m]."""
        return self.height * self.stack

    @cached_property
    def _factors(self) -> tuple[float, float]:  # once per object: the search reads several per stack
        return ring_core_factors(self.od, self.id, self.total_height)

    @cached_property
    def _effective(self) -> tuple[float, float, float]:
        return effective_parameters(*self._factors)

    @property
    def c1(self) -> float:
        """Core factor Σl/A [1/m] (IEC 60205)."""
        return self._factors[0]

    @property
    def c2(self) -> float:
        """Core factor Σl/A² [1/m³] (IEC 60205)."""
        return self._factors[1]

    @property
    def le(self) -> float:
        """Effective path length [m]."""
        return self._effective[0]

    @property
    def ae(self) -> float:
        """Effective area [m²]."""
        return self._effective[1]

    @property
    def ve(self) -> float:
        """Effective volume [m³]."""
        return self._effective[2]

    @property
    def window_diameter(self) -> float:
        """Diameter of the hole the winding passes through [m]."""
        return self.id

    @property
    def surface_area(self) -> float:
        """Outside surface of the stack as one body [m²]."""
        return ring_surface_area(self.od, self.id, self.total_height)

    @property
    def volume(self) -> float:
        """Geometric volume of the stack [m³]."""
        return math.pi / 4 * (self.od**2 - self.id**2) * self.total_height

    @property
    def missing(self) -> tuple[str, ...]:
        return ()

    def turn_length(self, conductor_od: float) -> float:
        """Length of one turn round the stack's section [m] (:func:`ring_turn_length`)."""
        return ring_turn_length(self.od, self.id, self.total_height, conductor_od)

    def turn_geometry(self, conductor_od: float) -> TurnGeometry:
        """Single-layer turn geometry on the stack (:func:`ring_turn_geometry`)."""
        return ring_turn_geometry(self.od, self.id, self.total_height, conductor_od)

    def bend_radius(self, conductor_od: float) -> float:
        """Tightest bend round the stack's section [m] (:func:`ring_bend_radius`)."""
        return ring_bend_radius(self.od, self.id, self.total_height, conductor_od)

    def stacked(self, count: int) -> "RingCore":
        """The same ring, ``count`` of them stacked."""
        return RingCore(self.od, self.id, self.height, count)

    def dimensions(self) -> dict:
        return {"od_m": self.od, "id_m": self.id, "height_m": self.height}

    def describe(self) -> str:
        """A short human description, e.g. ``2 × ring 61 × 35.6 × 12.7 mm``."""
        base = f"ring {self.od * 1e3:.4g} × {self.id * 1e3:.4g} × {self.height * 1e3:.4g} mm"
        return f"{self.stack} × {base}" if self.stack > 1 else base

    def to_dict(self) -> dict:
        return {"core_shape": "ring", **self.dimensions(), "cores": self.stack, "core_factor_per_m": self.c1,
                "le_m": self.le, "ae_m2": self.ae, "ve_m3": self.ve, "window_diameter_m": self.window_diameter}


def sleeve(od: float, id: float, length: float, stack: int = 1) -> RingCore:
    """A cable sleeve (tubular bead): a ring whose height is its length [m]."""
    return RingCore(od, id, length, stack)


@dataclass(frozen=True)
class FactorCore:
    """A core known only by its core factor, for shapes not modelled otherwise.

    Parameters
    ----------
    c1 : float
        Core factor Σl/A of the whole core as given [1/m] (a datasheet gives it, or A/l in m,
        its inverse).
    window_diameter : float, optional
        Diameter of the hole the winding passes through [m], for the fit check.
    ae, le : float, optional
        Effective area [m²] and length [m], for the flux and heat checks.
    turn_path : float, optional
        Perimeter of the core's section that one turn wraps, measured on the core [m].
    stack : int
        How many identical pieces the values above describe together (see :meth:`stacked`).

    Notes
    -----
    With ``window_diameter`` and ``turn_path`` given, the turn length and the stray-capacitance
    estimate use an *equivalent ring*: inside diameter = the window, a square section whose
    perimeter is the turn path (side p/4). Common practice, no published source: the square is
    the middle ground between flat and tall sections; the Cp estimate (energy method) reads it
    like a ring.
    """

    c1: float
    window_diameter: float | None = None
    ae: float | None = None
    le: float | None = None
    turn_path: float | None = None
    stack: int = 1

    def __post_init__(self) -> None:
        if not (isinstance(self.c1, (int, float)) and math.isfinite(self.c1) and self.c1 > 0):
            raise DimensionError(f"core factor Σl/A must be positive, got {self.c1!r} 1/m", parameter="core_factor")
        for name in ("window_diameter", "ae", "le", "turn_path"):
            v = getattr(self, name)
            if v is not None and not (math.isfinite(v) and v > 0):
                raise DimensionError(f"core {name} must be positive, got {v!r}", parameter="window" if name == "window_diameter" else None)
        if self.window_diameter is not None:
            limits.check("window", self.window_diameter, limits.CORE_DIMENSION, DimensionError)
        _check_stack(self.stack)

    @property
    def ve(self) -> float | None:
        """Effective volume [m³] when area and length are known."""
        return self.ae * self.le if (self.ae and self.le) else None

    @property
    def surface_area(self) -> float | None:
        """Outside surface of the equivalent ring [m²] when window and turn path are known."""
        s = self._section()
        return None if s is None else ring_surface_area(s.od, s.id, s.height)

    @property
    def volume(self) -> float | None:
        """Volume [m³]: the effective volume when known, else the equivalent ring's."""
        if self.ve is not None:
            return self.ve
        s = self._section()
        return None if s is None else math.pi / 4 * (s.od**2 - s.id**2) * s.height

    @property
    def missing(self) -> tuple[str, ...]:
        return tuple(n for n in ("window_diameter", "turn_path") if getattr(self, n) is None)

    def _section(self) -> RingSection | None:
        if self.missing:
            return None
        side = self.turn_path / 4.0
        return RingSection(self.window_diameter + 2.0 * side, self.window_diameter, side)

    def turn_length(self, conductor_od: float) -> float | None:
        """Turn path plus π·d for the conductor's thickness (as a rounded rectangle) [m]."""
        return None if self.turn_path is None else self.turn_path + math.pi * conductor_od

    def turn_geometry(self, conductor_od: float) -> TurnGeometry | None:
        """Turn geometry of the equivalent ring (class notes), or None without window and turn path."""
        s = self._section()
        return None if s is None else ring_turn_geometry(s.od, s.id, s.height, conductor_od)

    def bend_radius(self, conductor_od: float) -> float | None:
        s = self._section()
        return None if s is None else ring_bend_radius(s.od, s.id, s.height, conductor_od)

    def stacked(self, count: int) -> "FactorCore":
        """``count`` of the piece these values describe (``c1·stack`` for one), side by side.

        Σl/A divides and Ae multiplies by the count; the equivalent ring's height grows, so
        the turn path of one piece p1 becomes p1·(1 + count)/2 (square section, class notes).
        """
        _check_stack(count)
        k = self.stack
        path = None if self.turn_path is None else self.turn_path * 2.0 / (1 + k) * (1 + count) / 2.0
        return replace(self, c1=self.c1 * k / count, ae=None if self.ae is None else self.ae / k * count,
                       turn_path=path, stack=count)

    def dimensions(self) -> dict:
        one = self.stacked(1)
        return {"core_factor_per_m": one.c1, "window_diameter_m": one.window_diameter, "ae_m2": one.ae,
                "le_m": one.le, "turn_path_m": one.turn_path}

    def describe(self) -> str:
        """A short human description."""
        base = f"core with Σl/A = {self.c1:.4g} 1/m"
        return f"{self.stack} stacked, {base}" if self.stack > 1 else base

    def to_dict(self) -> dict:
        return {"core_shape": "factor", "cores": self.stack, "core_factor_per_m": self.c1,
                "window_diameter_m": self.window_diameter, "turn_path_m": self.turn_path,
                "le_m": self.le, "ae_m2": self.ae, "ve_m3": self.ve}
