"""Why a sizing search found nothing, and what to relax.

Each explanation is checked, not guessed: the search is re-run with the space widened one way
at a time — tighter cable bends, more stacked cores, up to twice the turns that fit, no stray
capacitance — and the widening that lets a design pass names the limit, with an example.
Suggested remedies (two chokes for two halves of the band, copies of the closest design in
series) are likewise only offered when they are shown to work.

Remedies are structured (:class:`Remedy`: a kind, the parameter to change, a suggested value
and facts), so that each caller words them in its own terms: a Python caller sees parameter
names, the command line its options. This module needs nothing private from the search: the
search hands it a :class:`SearchContext` (its grid and two public entry points).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field, replace
from typing import TYPE_CHECKING, Any, Callable, Mapping, Sequence

import numpy as np

from ..model.materials import Material
from .bend import ring_for_bend, ring_profiles
from ..units import format_quantity

if TYPE_CHECKING:  # annotations only: the search imports this module, not the reverse
    from .search import SizedDesign, SizeSpec

__all__ = [
    "Diagnosis",
    "Remedy",
    "SearchContext",
    "diagnose",
    "diagnose_heat",
    "diagnose_nothing_fits",
    "format_rise",
    "half_permeability_hz",
    "parameter_phrase",
]


def parameter_phrase(remedy: Remedy) -> str:
    """How a Python caller reads the parameter a remedy changes: its name (``max_cores``)."""
    return str(remedy.parameter)


@dataclass(frozen=True)
class Remedy:
    """One way to relax a sizing request that found nothing.

    Attributes
    ----------
    kind : str
        What the remedy does (``more_cores``, ``lower_target``, ``series_copies``...).
    parameter : str or None
        The :class:`~cmcheck.design.search.SizeSpec` parameter to change (``max_cores``,
        ``target_ohm``, ``sizes``...), or None when the remedy is outside the search
        (another cable, a second choke).
    value : object, optional
        The suggested value, in SI units (None: only the direction is known).
    facts : mapping
        Numbers behind the remedy, SI units, keys with units (``split_hz``, ``impedance_ohm``).
    template : str
        The sentence, with ``{set}`` where the parameter is named.
    """

    kind: str
    parameter: str | None = None
    value: Any = None
    facts: Mapping[str, Any] = field(default_factory=dict)
    template: str = ""

    def describe(self, name: Callable[[Remedy], str] | None = None) -> str:
        """The remedy as one sentence; ``name(remedy)`` words its parameter (default: the name)."""
        if self.parameter is None:
            return self.template
        return self.template.format(set=(name or parameter_phrase)(self))

    def to_dict(self) -> dict:
        return {"kind": self.kind, "parameter": self.parameter, "value": self.value, "facts": dict(self.facts)}


@dataclass(frozen=True)
class Diagnosis:
    """Why no design met the target (``reason``, ``facts``) and what to relax (``relax``)."""

    reason: str
    relax: tuple[Remedy, ...]
    limits: tuple[str, ...] = ()
    facts: tuple[str, ...] = ()

    def sentences(self, name: Callable[[Remedy], str] | None = None) -> list[str]:
        """The remedies worded with ``name`` (see :meth:`Remedy.describe`)."""
        return [r.describe(name) for r in self.relax]

    def to_dict(self, name: Callable[[Remedy], str] | None = None) -> dict:
        return {"reason": self.reason, "relax": self.sentences(name), "remedies": [r.to_dict() for r in self.relax],
                "limits": list(self.limits), "facts": list(self.facts)}


@dataclass(frozen=True, eq=False)
class SearchContext:
    """What a counterfactual re-run of the search needs.

    Attributes
    ----------
    f : ndarray
        Frequency grid inside the band [Hz].
    mus : sequence of ndarray
        Complex relative permeability of each material on ``f``.
    r_per_m : ndarray
        Conductor resistance per metre on ``f`` [Ω/m].
    geometry : callable
        :func:`cmcheck.design.search.candidate_geometry`.
    scan : callable
        :func:`cmcheck.design.search.scan_candidates`.
    """

    f: np.ndarray
    mus: Sequence[np.ndarray]
    r_per_m: np.ndarray
    geometry: Callable
    scan: Callable


def format_rise(k: float) -> str:
    """A temperature rise for people: past a few hundred kelvin the number only means "destroyed"."""
    return f"≈ {k:.0f} K" if k < 300 else "> 300 K"


def _hz(f: float | None) -> str:
    return "none found" if f is None else format_quantity(f, "Hz", 3)


def half_permeability_hz(material: Material, low_hz: float = 1e4, high_hz: float = 1e10) -> float | None:
    """Lowest frequency [Hz] where |µ| has fallen to half its low-frequency value, or None.

    Parameters
    ----------
    material : Material
    low_hz, high_hz : float
        Range searched [Hz], clipped to a tabulated material's range.

    References
    ----------
    Dispersion of complex permeability (Snoek's law, DESIGN.md §4): above its relaxation
    frequency a ferrite's |µ| falls roughly as 1/f.
    """
    rng = material.range_hz
    if rng is not None:
        low_hz, high_hz = max(low_hz, rng[0]), min(high_hz, rng[1])
    f = np.geomspace(low_hz, high_hz, 600)
    mag = np.abs(material.permeability(f))
    below = np.flatnonzero(mag <= 0.5 * mag[0])
    return float(f[below[0]]) if below.size else None


def _would_pass(spec: SizeSpec, ctx: SearchContext, *, turns_factor: float = 1.0, no_cp: bool = False,
                heat: bool = False, **change) -> str | None:
    """A design that passes when the space is widened (a counterfactual search), described in
    a few words, or None when none does."""
    s = replace(spec, **change) if heat else replace(spec, drive=None, **change)
    geo, _ = ctx.geometry(s, turns_factor=turns_factor, limits=turns_factor == 1.0)
    if no_cp:
        geo = replace(geo, cp=np.zeros_like(geo.cp))
    # The heat check needs the full pass; otherwise the first design to pass ends it.
    scan = ctx.scan(s, geo, ctx.f, ctx.mus, ctx.r_per_m, collect=heat)
    if heat:
        if not scan.passing:
            return None
        m, g = int(scan.passing[0][0][0]), int(scan.passing[0][1][0])
    else:
        if scan.best_score < 1.0:
            return None
        m, g = scan.best_at
    i = int(geo.size_idx[g])
    return (f"{geo.turns[g]} turns on {geo.stack[g]} × {s.sizes.label(i)} ({s.materials[m].name}; "
            f"one layer holds {geo.n_fit[g]})")


def _split_band(spec: SizeSpec, ctx: SearchContext) -> Remedy | None:
    """Whether two chokes, one for each half of the band (split at its geometric middle), would do.

    In series their resistances add and neither is negative, so if each half has a design whose
    R meets the target there, the pair meets it over the whole band. Not claimed for |Z|, whose
    reactances may cancel.
    """
    if spec.criterion != "resistance" or spec.band.high / spec.band.low < 1.5:
        return None
    mid = math.sqrt(spec.band.low * spec.band.high)
    s = replace(spec, drive=None)
    geo, _ = ctx.geometry(s)
    f = ctx.f
    for part in (f <= mid, f >= mid):
        if not ctx.scan(s, geo, f[part], [mu[part] for mu in ctx.mus], ctx.r_per_m[part], collect=False).best_score >= 1.0:
            return None
    return Remedy("split_band", facts={"split_hz": mid}, template=(
        f"split the band at {_hz(mid)}: a choke for each part in series (resistances add, so the pair meets "
        f"the target across the band); run size on each part"))


def _series_copies(spec: SizeSpec, closest: SizedDesign) -> Remedy | None:
    """Chokes in series add their impedances: k copies of the closest design reach k × its minimum."""
    k = math.ceil(1.0 / closest.margin) if closest.margin > 0 else 0
    if not 2 <= k <= 3:
        return None
    z = k * closest.margin * spec.target_ohm
    return Remedy("series_copies", facts={"copies": k, "impedance_ohm": z}, template=(
        f"{k} of the closest design in series on the line: ≈ {z:,.0f} Ω "
        f"(impedances add when the chokes sit a short distance apart; common practice)"))


def diagnose(spec: SizeSpec, closest: SizedDesign, ctx: SearchContext) -> Diagnosis:
    """Explain the shortfall by widening the space one way at a time — more cores, twice the
    turns that fit, no stray capacitance — and naming the widening that lets a design pass."""
    band = spec.band
    d = closest.design
    n = d.winding.turns
    srf = closest.self_resonance_hz
    f_min = closest.min_resistance_hz if spec.criterion == "resistance" else closest.min_impedance_hz
    cond = spec.conductor
    what = f"{cond.outer_diameter * 1e3:.3g} mm {'cable' if cond.stiff else 'wire'}"
    more_cores = spec.max_cores * 2
    bend_matters = cond.stiff and spec.bend_limit > 0
    by_bend = bend_matters and _would_pass(spec, ctx, min_bend_radius=0.0)
    by_cores = not by_bend and _would_pass(spec, ctx, max_cores=more_cores)
    by_turns = not (by_bend or by_cores) and _would_pass(spec, ctx, turns_factor=2.0)
    by_cp = not (by_bend or by_cores or by_turns) and _would_pass(spec, ctx, no_cp=True)
    by_both = not (by_bend or by_cores or by_turns or by_cp) and _would_pass(spec, ctx, turns_factor=2.0, no_cp=True)
    at_low = f_min <= math.sqrt(band.low * band.high)
    where = f"{spec.metric_name} is lowest at {_hz(f_min)} ({'the low end' if at_low else 'the top'} of the band)"
    facts = [f"closest: {d.describe()}: {where}, {closest.margin * 100:.0f} % of the target"]
    if srf is not None and d.cp > 0:
        facts.append(f"its self-resonance is at {_hz(srf)} (Cp ≈ {d.cp * 1e12:.2g} pF)")
    elif srf is not None:
        facts.append(f"its reactance turns capacitive at {_hz(srf)}: the material's own resonance (one pass, no Cp)")
    if not at_low:
        f_half = half_permeability_hz(d.material)
        if f_half is not None and f_half < band.high:
            facts.append(f"{d.material.name}'s permeability collapses above {_hz(f_half)} (|µ| below half its initial value)")
    limits: list[str] = []
    relax: list[Remedy] = []
    if by_bend:
        reason = (f"the bend limit: a {what} may not bend tighter than {spec.bend_limit * 1e3:.3g} mm "
                  f"(the minimum bend radius), which allows only one pass through "
                  f"{_bend_limited_text(spec, ctx)}; with tighter bends a design would meet the target, e.g. {by_bend}")
        limits.append("bend")
        relax += [Remedy("tighter_bend", "min_bend_radius", cond.outer_diameter,
                         template="a tighter bend ({set} down to one cable diameter) if the cable allows it"),
                  Remedy("flexible_cable", template="a thinner, more flexible cable for the choke section"),
                  Remedy("wider_rings", "sizes", template="rings with a wider section (add them with {set})")]
    elif bend_matters and _bend_binds(spec, ctx):
        need = ring_for_bend(ring_profiles(spec.sizes), spec.bend_limit, cond.outer_diameter, spec.max_cores)
        size = (f"; a ring with a section of at least {need.section * 1e3:.3g} mm would, e.g. "
                f"{need.stack} × {need.label()} (the searched series' proportions, OD on ISO 3 R10)") if need else ""
        reason = (f"the bend limit: a {what} may not bend tighter than {spec.bend_limit * 1e3:.3g} mm (the minimum "
                  f"bend radius), and no searched core ({spec.sizes.series or 'the size table'}) has a section wide "
                  f"enough for a second pass{size}")
        limits.append("bend")
        relax += [Remedy("wider_rings", "sizes", need.to_dict() if need else None,
                         {"section_m": need.section} if need else {},
                         template=(f"rings with a wider section, e.g. {need.stack} × {need.label()} (add them with {{set}})"
                                   if need else "rings with a wider section (add them with {set})")),
                  Remedy("tighter_bend", "min_bend_radius", cond.outer_diameter,
                         template="a tighter bend ({set} down to one cable diameter) if the cable allows it"),
                  Remedy("flexible_cable", template="a thinner, more flexible cable for the choke section")]
        if by_both:
            facts.append("even with bends allowed, the band is too wide for one choke: its low end needs more turns "
                         "than fit and its top less stray capacitance than those turns bring")
    elif by_cores:
        reason = f"not enough core: stacks of up to {more_cores} cores would meet the target, e.g. {by_cores}"
        limits.append("cores")
        relax.append(Remedy("more_cores", "max_cores", more_cores, template=f"allow more stacked cores ({{set}} {more_cores})"))
    elif by_turns:
        if spec.max_turns is not None:
            why = f"the cap of {spec.max_turns} turns and one layer of {what} through the hole limit the turns"
        else:
            why = f"one layer of {what} through the hole limits the turns"
        reason = (f"not enough turns fit: {why}; with up to twice the turns that fit a design would meet the "
                  f"target, e.g. {by_turns}")
        limits.append("turns")
        relax += [Remedy("thinner_conductor", template="a thinner cable or wire"),
                  Remedy("larger_hole", "sizes", template="rings with a larger hole (add them with {set})")]
        if spec.max_turns is not None:
            relax.append(Remedy("more_turns", "max_turns", template="raise {set}"))
    elif by_cp:
        reason = ("self-resonance: the winding's stray capacitance shunts it in the band; without that capacitance "
                  "a design would meet the target")
        limits.append("self-resonance")
        relax.append(Remedy("less_capacitance", "cp", template="less capacitance: spaced turns or a thinner jacket, "
                            "then measure Cp and check with {set}"))
    elif by_both:
        reason = ("the band is too wide for one choke: its low end needs more turns than fit and its top less stray "
                  "capacitance than those turns bring")
        limits += ["turns", "self-resonance"]
    else:
        reason = ("the target is far out of reach: even twice the turns that fit, with no stray capacitance, "
                  "would not meet it")
        limits.append("target")
    split = _split_band(spec, ctx)
    if split:
        relax.insert(0, split)
    copies = _series_copies(spec, closest)
    if copies:
        relax.insert(0, copies)
    if not at_low:
        relax.append(Remedy("other_material", template="a material that stays lossy higher up (see the material comparison)"))
    reach = closest.margin * spec.target_ohm
    relax.append(Remedy("lower_target", "target_ohm", reach, {"criterion": spec.criterion},
                        template=f"lower {{set}} to {reach:,.0f} Ω (what the closest design reaches)"))
    return Diagnosis(reason, tuple(relax), tuple(limits), tuple(facts))


def _bend_binds(spec: SizeSpec, ctx: SearchContext) -> bool:
    """Whether the bend limit keeps every searched core at one pass while some hole holds more."""
    _, space = ctx.geometry(spec)
    return space["max_turns"] <= 1 and space["stacks_bend_limited"] > 0


def _bend_limited_text(spec: SizeSpec, ctx: SearchContext) -> str:
    """How many of the searched core stacks the bend limit reduces to a single pass."""
    geo, space = ctx.geometry(spec)
    return f"{space['stacks_bend_limited']} of the {space['stacks_that_fit']} core stacks the cable passes through"


def diagnose_heat(spec: SizeSpec, closest: SizedDesign, meeting: int, ctx: SearchContext) -> Diagnosis:
    """Explain why every design that meets the target is too hot, and what would cool one."""
    h = closest.heat or {}
    reason = (
        f"{meeting} designs reach the target, but all would warm more than the {spec.max_rise_k:g} K limit at "
        f"{spec.drive.power_w:g} W; the coolest rises {format_rise(h.get('temperature_rise_k', math.nan))} "
        f"({h.get('dissipation_w', math.nan):.3g} W at {_hz(h.get('dissipation_hz'))})"
    )
    relax = []
    more_cores = spec.max_cores * 2
    if _would_pass(spec, ctx, heat=True, max_cores=more_cores):
        relax.append(Remedy("more_cores", "max_cores", more_cores,
                            template=f"more stacked cores spread the heat: {{set}} {more_cores} finds cool designs"))
    else:
        relax.append(Remedy("larger_rings", "sizes", template="larger rings ({set}): more surface to shed the heat"))
    if spec.drive.mode == "voltage":
        relax.append(Remedy("higher_target", template="a higher target: with a voltage across it, a choke of higher "
                            "impedance dissipates less"))
    else:
        relax.append(Remedy("check_current", "cm_current_a", template="check {set}: it is the current *with* the "
                            "choke in place, usually far below the current without one; a feed-point impedance "
                            "gives a voltage bound instead"))
    relax += [
        Remedy("raise_max_rise", "max_rise_k", template=f"raise {{set}} above {spec.max_rise_k:g} K only if the "
               "material's datasheet allows the temperature"),
        Remedy("less_power", template="less power or a lower duty cycle (the estimate is for continuous carrier)"),
        Remedy("keep_hot", "keep_hot", True, template="{set} lists them anyway, flagged"),
    ]
    facts = (f"closest: {closest.design.describe()}",)
    return Diagnosis(reason, tuple(relax), ("heat",), facts)


def diagnose_nothing_fits(spec: SizeSpec) -> Diagnosis:
    """The conductor passes through none of the core sizes."""
    d = spec.conductor.outer_diameter
    largest = float(np.nanmax(spec.sizes.window_diameters))
    return Diagnosis(
        f"the {d * 1e3:.3g} mm conductor passes through none of the {len(spec.sizes)} core sizes "
        f"(largest hole {largest * 1e3:.3g} mm)",
        (Remedy("larger_hole", "sizes", template="add sizes with a larger hole ({set})"),
         Remedy("thinner_conductor", template="a thinner cable or wire")),
        ("fit",),
    )
