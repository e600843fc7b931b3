"""The winding's stray capacitance Cp from the energy-method model, for any core, conductor and material.

:mod:`cmcheck.model.selfcapacitance` works on a ring section; this module feeds it from the
contracts: the core's :class:`~cmcheck.model.capacitance.TurnGeometry` (equivalent ring section
and how many sections a turn passes through), the conductor (metal diameter, insulation or
jacket thickness and permittivity) and the material's electrical class and permittivity. The
choke model (:class:`cmcheck.model.choke.ChokeDesign`) and the sizing search
(:mod:`cmcheck.design.search`) both call :func:`winding_self_capacitance`, so they give the
same Cp. Everything SI.

Stated approximations (common practice, no published source):

- a shape other than a ring acts through its equivalent ring (:class:`FactorCore` with a window
  and turn path: a square section; a two-hole core: the two ring sections round its holes that
  every turn passes through, taken side by side as one ring of twice the height, as its core
  factor does);
- a material that does not declare its electrical class is taken as a dielectric of
  εr = :data:`ASSUMED_EPS_R` (NiZn-like, the usual choke material) and a warning says so; a
  conductive core (MnZn, metal powder) would give several times more Cp;
- insulation thinner than :data:`MIN_INSULATION_RATIO` × the metal diameter is taken as that
  (touching bare turns, or bare wire on a conductive core, would be a short);
- the leads are :data:`~cmcheck.model.selfcapacitance` defaults (15 mm), at least two conductor
  diameters apart.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from .selfcapacitance import SPREAD_ANGLE, SelfCapacitance, self_capacitance

__all__ = [
    "ASSUMED_EPS_R",
    "candidates_cp",
    "CpMaterial",
    "DEFAULT_LEAD_LENGTH",
    "MIN_INSULATION_RATIO",
    "conductor_insulation",
    "cp_material",
    "default_winding_angle",
    "design_self_capacitance",
    "unknown_class_message",
    "winding_self_capacitance",
]

#: εr taken for a dielectric core whose material gives none, and for a material of unknown
#: class (NiZn ferrite is about 10–15; from memory).
ASSUMED_EPS_R = 12.0

#: Insulation thinner than this fraction of the metal diameter is taken as this fraction.
MIN_INSULATION_RATIO = 0.01

#: εr of a conductor's insulation when the conductor does not give one (enamel; from memory).
DEFAULT_INSULATION_EPS_R = 3.5

#: Leads to the terminals, both together as a two-wire line [m], and their smallest spacing [m]
#: (a short fixture; common practice, no published source).
DEFAULT_LEAD_LENGTH = 0.015
DEFAULT_LEAD_SPACING = 0.003


@dataclass(frozen=True)
class CpMaterial:
    """What the Cp model reads from a material: class, εr and the assumption made, if any."""

    core_class: str
    eps_r: float
    assumed: bool

    def describe(self) -> str:
        """E.g. ``dielectric core, εr 12`` or ``conductive (floating) core``."""
        if self.core_class == "conductive":
            return "conductive (floating) core"
        return f"dielectric core, εr {self.eps_r:g}" + (" assumed: class not declared" if self.assumed else "")


def cp_material(material) -> CpMaterial:
    """The electrical class and permittivity of ``material`` (a :class:`~cmcheck.model.materials.Material`).

    A family member takes its family's representative εr; a declared dielectric without one
    takes :data:`ASSUMED_EPS_R`; ``"unknown"`` is taken as a dielectric of that εr
    (``assumed=True``; the callers warn).
    """
    from .families import builtin_families  # local: families is heavy only on first use

    cls = getattr(material, "electrical_class", "unknown")
    if cls == "conductive":
        return CpMaterial("conductive", 1.0, False)
    fam = builtin_families().get(material.extra.get("family_key", "")) if hasattr(material, "extra") else None
    eps = fam.relative_permittivity if fam is not None and fam.relative_permittivity else ASSUMED_EPS_R
    return CpMaterial("dielectric", float(eps), cls != "dielectric")


def conductor_insulation(conductor) -> tuple[float, float, float]:
    """(metal diameter [m], insulation or jacket thickness [m], its εr) of any conductor.

    The thickness is half the difference of the outside and conducting diameters (wire
    insulation, cable jacket); εr is the conductor's ``eps_r`` when it has one.
    """
    d = float(conductor.conducting_diameter)
    t = max((float(conductor.outer_diameter) - d) / 2.0, 0.0)
    return d, t, float(getattr(conductor, "eps_r", DEFAULT_INSULATION_EPS_R))


def default_winding_angle(core_id, conductor_od, turns, spread=SPREAD_ANGLE):
    """Φw [rad]: spread over ``spread`` (default 300°) of the ring, or close-wound where the turns fill more.

    As :func:`cmcheck.model.selfcapacitance.self_capacitance`'s default, but safe for every
    candidate of a search (a conductor nearly as wide as half the window is clipped to a
    half-turn pitch rather than refused).

    Parameters
    ----------
    core_id : array_like
        Equivalent ring inner diameter [m].
    conductor_od : array_like
        Conductor outside diameter [m].
    turns : array_like
        N [dimensionless].
    spread : array_like
        The angle asked for [rad]; turns cannot lie closer than touching, so the result is
        never below the close-wound angle.

    References
    ----------
    Elementary geometry of equal circles along the rim of a circle (as
    :func:`cmcheck.model.selfcapacitance.close_wound_angle`); the 300° spread is common
    practice, no published source.
    """
    d = np.asarray(conductor_od, float)
    ratio = np.clip(d / np.maximum(np.asarray(core_id, float) - d, 1e-300), 0.0, 1.0)
    pitch = 2.0 * np.arcsin(ratio)
    close = np.minimum((np.maximum(np.asarray(turns, float), 1.0) - 1.0) * pitch, 2.0 * math.pi - pitch)
    phi = np.clip(np.maximum(spread, close), 1e-6, 2.0 * math.pi - 1e-6)
    return float(phi) if phi.ndim == 0 else phi


def winding_self_capacitance(section_od, section_id, height, turns, conductor_diameter, insulation, insulation_eps_r,
                             core_class, core_eps_r, winding_angle=None) -> SelfCapacitance:
    """Cp of a single-layer winding on an equivalent ring section, with its parts [F].

    Parameters
    ----------
    section_od, section_id, height : array_like
        Equivalent ring section [m]; ``height`` already multiplied by the sections a turn passes
        through.
    turns : array_like
        N [dimensionless], ≥ 1.
    conductor_diameter : array_like
        Metal diameter (bare wire, cable shield) [m].
    insulation : array_like
        Insulation or jacket thickness [m] (raised to :data:`MIN_INSULATION_RATIO` × diameter).
    insulation_eps_r : array_like
        Its εr [dimensionless].
    core_class : {"dielectric", "conductive"}
    core_eps_r : float
        εr of a dielectric core [dimensionless].
    winding_angle : array_like or None
        Φw [rad], raised to the close-wound angle where the turns cannot fit in it; None: 300°
        (:func:`default_winding_angle`).

    Returns
    -------
    SelfCapacitance
        Parts and ``total`` [F]; arrays when the inputs are.

    References
    ----------
    A. Massarini & M. K. Kazimierczuk, "Self-capacitance of inductors", IEEE Trans. Power
    Electron. 12(4), 671–676, 1997 (energy method, turn-to-turn and turn-to-core cells), as
    applied to a ring in :func:`cmcheck.model.selfcapacitance.self_capacitance` (D. W. Knight,
    "The self-capacitance of toroidal inductors", web article: the field across the ends and
    through the core, not adjacent turns, sets it). The equivalent-ring and insulation-floor
    approximations: common practice, no published source (module notes).
    """
    d = np.asarray(conductor_diameter, float)
    t = np.maximum(np.asarray(insulation, float), MIN_INSULATION_RATIO * d)
    do = d + 2.0 * t
    phi = default_winding_angle(section_id, do, turns, SPREAD_ANGLE if winding_angle is None else winding_angle)
    return self_capacitance(section_od, section_id, height, turns, d, t, insulation_eps_r, winding_angle=phi,
                            core_eps_r=core_eps_r, core_class=core_class, lead_length=DEFAULT_LEAD_LENGTH,
                            lead_spacing=np.maximum(DEFAULT_LEAD_SPACING, 2.0 * do))


def design_self_capacitance(core, conductor, turns, material, winding_angle=None) -> SelfCapacitance | None:
    """Cp parts of ``turns`` of ``conductor`` on ``core`` of ``material``; None without a turn geometry.

    Reads the core's :meth:`~cmcheck.model.cores.Core.turn_geometry` (its equivalent ring
    section, times the sections a turn passes through), :func:`conductor_insulation` and
    :func:`cp_material`.

    References
    ----------
    As :func:`winding_self_capacitance`.
    """
    geometry = core.turn_geometry(conductor.outer_diameter)
    if geometry is None:
        return None
    s = geometry.section
    d, t, eps = conductor_insulation(conductor)
    m = cp_material(material)
    return winding_self_capacitance(s.od, s.id, s.height * geometry.rings, turns, d, t, eps, m.core_class, m.eps_r,
                                    winding_angle)


def unknown_class_message(name: str) -> str:
    """The one-line warning for a material of unknown electrical class."""
    return (f"material {name} does not declare its electrical class ('# class: dielectric' or 'conductive' in its "
            f"CSV file): its Cp assumes a dielectric core (εr {ASSUMED_EPS_R:g}, NiZn-like); a conductive core "
            "(MnZn, metal powder) gives several times more")


def candidates_cp(geometries, row, turns, conductor, materials, winding_angle=None) -> np.ndarray:
    """Cp [F] of many windings for several materials at once, shape (materials, windings).

    Parameters
    ----------
    geometries : sequence of TurnGeometry or None
        One per core (None: no geometry, Cp 0, as :func:`design_self_capacitance` gives None).
    row : array_like of int
        For each winding, the index of its core in ``geometries``.
    turns : array_like of int
        N of each winding [dimensionless].
    conductor : Conductor
    materials : sequence of Material
    winding_angle : float, optional
        Φw [rad] for every winding; None: :func:`default_winding_angle`.

    Notes
    -----
    Evaluated once per distinct (electrical class, εr) among the materials; the numbers are
    those of :func:`design_self_capacitance` for each winding (the sizing search's tests check it).

    References
    ----------
    As :func:`winding_self_capacitance`.
    """
    has = np.array([g is not None for g in geometries], bool)
    sec = np.array([(g.section.od, g.section.id, g.section.height * g.rings) if g is not None else (2.0, 1.0, 1.0)
                    for g in geometries], float).reshape(len(geometries), 3)
    row = np.asarray(row, int)
    turns = np.asarray(turns)
    d, t, eps = conductor_insulation(conductor)
    out = np.zeros((len(materials), turns.size))
    done: dict = {}
    for m, mat in enumerate(materials):
        cm = cp_material(mat)
        key = (cm.core_class, cm.eps_r)
        if key not in done:
            parts = winding_self_capacitance(sec[row, 0], sec[row, 1], sec[row, 2], turns, d, t, eps, cm.core_class,
                                             cm.eps_r, winding_angle)
            done[key] = np.where(has[row], np.atleast_1d(parts.total), 0.0) if row.size else np.zeros(0)
        out[m] = done[key]
    return out
