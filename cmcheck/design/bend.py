"""The ring a stiff cable needs: the smallest size, in a table's own proportions, that lets it
bend round the core's section for two turns.

When the bend limit leaves every searched core at one pass, the useful answer is not "the band
is too wide" but how big a core would have to be. Rings of a size series share a few profiles
(ID/OD and height/OD); scaling each profile up until the section is wide enough and the hole
holds two passes, and rounding the outside diameter up to the series' preferred numbers, gives
sizes a user can look for.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from ..model.families import preferred_numbers
from ..model.winding import max_turns_single_layer

__all__ = ["RingNeed", "ring_for_bend", "section_for_bend"]


def section_for_bend(min_bend_radius: float, conductor_od: float) -> float:
    """Narrower side of a ring's section [m] a cable needs to bend no tighter than ``min_bend_radius``.

    Parameters
    ----------
    min_bend_radius : float
        Smallest allowed bend radius of the cable's centre line [m].
    conductor_od : float
        Cable outside diameter [m].

    Returns
    -------
    float
        The section side s [m] with (s + d)/2 = the bend radius (0 when any section will do).

    References
    ----------
    Inverse of :func:`cmcheck.model.cores.ring_bend_radius`: a cable wrapped 180° round the
    narrower side of the section bends with radius (side + d)/2; elementary geometry, the
    simplification is common practice, no published source.
    """
    return max(0.0, 2.0 * float(min_bend_radius) - float(conductor_od))


@dataclass(frozen=True)
class RingNeed:
    """The smallest ring, in one profile of a size table, that admits two bent passes.

    Attributes
    ----------
    od, id, height : float
        Outside and inside diameter and height of one ring [m] (OD on ISO 3 R10).
    stack : int
        Rings stacked for the height the bend needs.
    section : float
        The section side the bend needs [m].
    """

    od: float
    id: float
    height: float
    stack: int
    section: float

    def label(self) -> str:
        """E.g. ``ring 100 × 50 × 40 mm``."""
        return f"ring {self.od * 1e3:.4g} × {self.id * 1e3:.4g} × {self.height * 1e3:.4g} mm"

    def to_dict(self) -> dict:
        return {"od_m": self.od, "id_m": self.id, "height_m": self.height, "stack": self.stack,
                "section_m": self.section}


def ring_for_bend(profiles, min_bend_radius: float, conductor_od: float, max_cores: int) -> RingNeed | None:
    """Smallest ring among ``profiles`` scaled up so the cable makes two passes within the bend limit.

    Parameters
    ----------
    profiles : iterable of (float, float)
        (ID/OD, height/OD) of the table's rings [dimensionless].
    min_bend_radius : float
        Bend limit of the cable [m].
    conductor_od : float
        Cable outside diameter [m].
    max_cores : int
        Stack height allowed (the radial width cannot be stacked, the height can).

    Returns
    -------
    RingNeed or None
        None when no profile is given.

    References
    ----------
    ISO 3:1973, Table 1 (R10) for the rounding; bend geometry as :func:`section_for_bend`;
    two passes through the hole as :func:`cmcheck.model.winding.max_turns_single_layer`.
    """
    s = section_for_bend(min_bend_radius, conductor_od)
    best: RingNeed | None = None
    for r_id, r_h in profiles:
        if not (0 < r_id < 1 and r_h > 0):
            continue
        od = s / ((1.0 - r_id) / 2.0)  # the radial width cannot be stacked: it sets the OD
        for cand in preferred_numbers(max(od, 1e-3), max(od, 1e-3) * 100, "R10"):
            if cand * (1 - 1e-9) < od:
                continue
            if max_turns_single_layer(r_id * cand, conductor_od) < 2:
                continue
            stack = max(1, math.ceil(s / (r_h * cand) - 1e-9))
            if stack > max_cores:
                continue
            need = RingNeed(float(cand), float(r_id * cand), float(r_h * cand), stack, s)
            if best is None or need.od < best.od:
                best = need
            break
    return best


def ring_profiles(sizes) -> list[tuple[float, float]]:
    """(ID/OD, height/OD) of the ring-like rows of a size table, each once (rounded to 1 %)."""
    seen: dict[tuple[float, float], None] = {}
    for core in sizes.cores:
        dims = core.dimensions()
        if {"od_m", "id_m", "height_m"} <= dims.keys() and dims["od_m"]:
            key = (round(dims["id_m"] / dims["od_m"], 2), round(dims["height_m"] / dims["od_m"], 2))
            seen.setdefault(key, None)
    return list(seen)


__all__.append("ring_profiles")
