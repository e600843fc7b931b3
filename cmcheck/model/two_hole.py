"""Two-hole (binocular) cores: a rectangular block with two parallel holes, wound through both.

Implements the :class:`cmcheck.model.cores.Core` contract. Everything in metres.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from functools import cached_property

from ..errors import DimensionError
from .capacitance import RingSection, TurnGeometry, TurnSegment
from .cores import _check_stack, _positive, effective_parameters, ring_core_factors

__all__ = ["TwoHoleCore", "two_hole_equivalent_od"]


def two_hole_equivalent_od(width, thickness, spacing):
    """Outside diameter [m] of the ring each hole of a two-hole core is taken to act as.

    The largest circle round a hole's centre that stays inside the block and does not cross
    into the other hole's half: min(hole spacing, thickness, width − hole spacing).

    Parameters
    ----------
    width : float
        Block width across both holes [m].
    thickness : float
        Block thickness [m].
    spacing : float
        Centre distance of the holes [m].

    References
    ----------
    Common practice, no published source (elementary geometry of the block).
    """
    return min(spacing, thickness, width - spacing)


@dataclass(frozen=True)
class TwoHoleCore:
    """A two-hole (binocular) core, or ``stack`` of them end to end along the holes.

    Parameters
    ----------
    width : float
        Block width, across both holes [m].
    thickness : float
        Block thickness, across one hole [m].
    length : float
        Length along the holes of one piece [m].
    hole : float
        Hole diameter [m].
    spacing : float
        Centre distance of the two holes [m].
    stack : int
        Identical pieces end to end along the holes; lengths add.

    Notes
    -----
    Effective parameters (common practice, no published source). A turn goes through one hole
    and back through the other, so it encircles the web between them. The flux of the current
    in each hole circles that hole; each hole with the material round it is taken as a ring of
    rectangular section: ID = hole diameter, OD = the largest circle round the hole inside its
    half of the block, min(spacing, thickness, width − spacing)
    (:func:`two_hole_equivalent_od`), height = length. One turn links both rings, so their
    inductances add: the core acts as a stack of two such rings, C1 = C1_ring/2,
    Ae = 2·Ae_ring, le = le_ring (IEC 60205 ring formulas). The rings leave out the material
    outside the inscribed circles, which also carries flux, so L is underestimated (C1
    overestimated), more so for blocks much wider than the circles.

    Turn path: a rectangle round the web, (spacing − hole) across and length along, corners
    rounded by the conductor radius: 2·(length + spacing − hole) + π·d (as on a ring). Bend:
    round the narrower side of the web. Cp (energy method, :mod:`cmcheck.model.winding_cp`): the
    two equivalent rings every turn passes through, side by side as one ring of twice the
    height, as for C1. The turn geometry's segments (turns spread round each hole's wall,
    π(hole − d), keeping that spread across the end faces) serve the former adjacent-turn
    estimate.
    """

    width: float
    thickness: float
    length: float
    hole: float
    spacing: float
    stack: int = 1

    def __post_init__(self) -> None:
        for name in ("width", "thickness", "length", "hole", "spacing"):
            _positive(name, getattr(self, name), "hole_spacing" if name == "spacing" else name)
        if self.hole >= self.spacing:
            raise DimensionError(
                f"two-hole core: hole diameter ({self.hole * 1e3:g} mm) must be smaller than the hole spacing "
                f"({self.spacing * 1e3:g} mm), or the holes merge"
            )
        if self.spacing + self.hole >= self.width:
            raise DimensionError(
                f"two-hole core: hole spacing + hole diameter ({(self.spacing + self.hole) * 1e3:g} mm) must be "
                f"smaller than the width ({self.width * 1e3:g} mm)"
            )
        if self.hole >= self.thickness:
            raise DimensionError(
                f"two-hole core: hole diameter ({self.hole * 1e3:g} mm) must be smaller than the thickness "
                f"({self.thickness * 1e3:g} mm)"
            )
        _check_stack(self.stack)

    @property
    def total_length(self) -> float:
        """Length of the whole stack along the holes [m]."""
        return self.length * self.stack

    @property
    def equivalent_ring(self) -> RingSection:
        """The ring each hole acts as (class notes), over the whole stack's length."""
        return RingSection(two_hole_equivalent_od(self.width, self.thickness, self.spacing), self.hole,
                           self.total_length)

    @cached_property
    def _factors(self) -> tuple[float, float]:
        r = self.equivalent_ring
        # Two rings linked by every turn: the same as one ring of twice the height.
        return ring_core_factors(r.od, r.id, 2.0 * r.height)

    @property
    def c1(self) -> float:
        """Core factor Σl/A [1/m] (class notes)."""
        return self._factors[0]

    @property
    def le(self) -> float:
        """Effective path length [m]."""
        return effective_parameters(*self._factors)[0]

    @property
    def ae(self) -> float:
        """Effective area [m²]."""
        return effective_parameters(*self._factors)[1]

    @property
    def ve(self) -> float:
        """Effective volume [m³]."""
        return effective_parameters(*self._factors)[2]

    @property
    def window_diameter(self) -> float:
        """Hole diameter [m]: every turn passes through each hole once."""
        return self.hole

    @property
    def surface_area(self) -> float:
        """Outside of the block plus the hole walls, less the hole openings [m²].

        References
        ----------
        Elementary geometry; the cooling surface of McLyman, *Transformer and Inductor Design
        Handbook*, 3rd ed., 2004, ch. 6.
        """
        w, t, L, d = self.width, self.thickness, self.total_length, self.hole
        return 2.0 * (w * t - 2.0 * math.pi * d**2 / 4.0) + 2.0 * (w + t) * L + 2.0 * math.pi * d * L

    @property
    def volume(self) -> float:
        """Material volume [m³]: the block less the two holes."""
        return (self.width * self.thickness - 2.0 * math.pi * self.hole**2 / 4.0) * self.total_length

    @property
    def missing(self) -> tuple[str, ...]:
        return ()

    def turn_length(self, conductor_od: float) -> float:
        """2·(length + spacing − hole) + π·d [m] (class notes)."""
        return 2.0 * (self.total_length + self.spacing - self.hole) + math.pi * conductor_od

    def turn_geometry(self, conductor_od: float) -> TurnGeometry:
        """Two passes through a hole and two crossings of an end face (class notes)."""
        p = math.pi * (self.hole - conductor_od)
        web = self.spacing - self.hole
        # Both passes through a hole as one segment, both end-face crossings as another.
        through = TurnSegment(2.0 * self.total_length, p, p)
        across = TurnSegment(2.0 * web, p, p)
        return TurnGeometry((through, across), self.equivalent_ring, rings=2)

    def bend_radius(self, conductor_od: float) -> float:
        """(narrower side of the web + d)/2 [m]: the conductor wraps the web, (spacing − hole)
        across and the length along (common practice, no published source)."""
        return (min(self.spacing - self.hole, self.total_length) + conductor_od) / 2.0

    def stacked(self, count: int) -> "TwoHoleCore":
        """The same piece, ``count`` of them end to end."""
        return TwoHoleCore(self.width, self.thickness, self.length, self.hole, self.spacing, count)

    def dimensions(self) -> dict:
        return {"width_m": self.width, "thickness_m": self.thickness, "length_m": self.length,
                "hole_diameter_m": self.hole, "hole_spacing_m": self.spacing}

    def describe(self) -> str:
        """E.g. ``two-hole 14 × 8 × 14 mm, holes 3.5 mm at 6 mm``."""
        base = (f"two-hole {self.width * 1e3:.4g} × {self.thickness * 1e3:.4g} × {self.length * 1e3:.4g} mm, "
                f"holes {self.hole * 1e3:.4g} mm at {self.spacing * 1e3:.4g} mm")
        return f"{self.stack} × {base}" if self.stack > 1 else base

    def to_dict(self) -> dict:
        return {"core_shape": "two-hole", **self.dimensions(), "cores": self.stack, "core_factor_per_m": self.c1,
                "le_m": self.le, "ae_m2": self.ae, "ve_m3": self.ve, "window_diameter_m": self.window_diameter}
