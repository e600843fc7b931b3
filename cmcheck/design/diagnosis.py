"""Why a sizing search found nothing, and what to relax.

Each explanation is checked, not guessed: the search is re-run with the space widened one way
at a time — tighter cable bends, more stacked cores, up to twice the turns that fit, no stray
capacitance — and the widening that lets a design pass names the limit, with an example.
Suggested remedies (two chokes for two halves of the band, copies of the closest design in
series) are likewise only offered when they are shown to work.
"""

from __future__ import annotations

import math
from dataclasses import replace

import numpy as np

from ..model.materials import Material
from .search import Diagnosis, SizedDesign, SizeSpec, _geometry, _scan, format_rise
from ..units import format_quantity
from ..model.winding import Cable

__all__ = ["diagnose", "diagnose_heat", "diagnose_nothing_fits", "half_permeability_hz"]


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


def _would_pass(spec: SizeSpec, f, mus, r_per_m, *, turns_factor: float = 1.0, no_cp: bool = False,
                heat: bool = False, **change) -> str | None:
    """A design that passes when the space is widened (a counterfactual search), described in
    a few words, or None when none does."""
    s = replace(spec, **change) if heat else replace(spec, drive=None, **change)
    geo, _ = _geometry(s, turns_factor=turns_factor, limits=turns_factor == 1.0)
    if no_cp:
        geo = replace(geo, cp=np.zeros_like(geo.cp))
    # The heat check needs the full pass; otherwise the first design to pass ends it.
    scan = _scan(s, geo, f, mus, r_per_m, collect=heat)
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


def _split_band(spec: SizeSpec, f, mus, r_per_m) -> str | None:
    """Whether two chokes, one for each half of the band (split at its geometric middle), would do.

    In series their resistances add and neither is negative, so if each half has a design whose
    R meets the target there, the pair meets it over the whole band. Not claimed for |Z|, whose
    reactances may cancel.
    """
    if spec.criterion != "resistance" or spec.band.high / spec.band.low < 1.5:
        return None
    mid = math.sqrt(spec.band.low * spec.band.high)
    s = replace(spec, drive=None)
    geo, _ = _geometry(s)
    for part in (f <= mid, f >= mid):
        if not _scan(s, geo, f[part], [mu[part] for mu in mus], r_per_m[part], collect=False).best_score >= 1.0:
            return None
    return (f"split the band at {_hz(mid)}: a choke for each part in series (resistances add, so the pair meets "
            f"the target across the band); run size on each part")


def _series_copies(spec: SizeSpec, closest: SizedDesign) -> str | None:
    """Chokes in series add their impedances: k copies of the closest design reach k × its minimum."""
    k = math.ceil(1.0 / closest.margin) if closest.margin > 0 else 0
    if not 2 <= k <= 3:
        return None
    return (f"{k} of the closest design in series on the line: ≈ {k * closest.margin * spec.target_ohm:,.0f} Ω "
            f"(impedances add when the chokes sit a short distance apart; common practice)")


def diagnose(spec: SizeSpec, closest: SizedDesign, f, mus, r_per_m) -> Diagnosis:
    """Explain the shortfall by widening the space one way at a time — more cores, twice the
    turns that fit, no stray capacitance — and naming the widening that lets a design pass."""
    band = spec.band
    d = closest.design
    n = d.winding.turns
    srf = closest.self_resonance_hz
    f_min = closest.min_resistance_hz if spec.criterion == "resistance" else closest.min_impedance_hz
    cond = spec.conductor
    what = f"{cond.outer_diameter * 1e3:.3g} mm {'cable' if isinstance(cond, Cable) else 'wire'}"
    more_cores = spec.max_cores * 2
    bend_matters = isinstance(cond, Cable) and spec.bend_limit > 0
    by_bend = bend_matters and _would_pass(spec, f, mus, r_per_m, min_bend_radius=0.0)
    by_cores = not by_bend and _would_pass(spec, f, mus, r_per_m, max_cores=more_cores)
    by_turns = not (by_bend or by_cores) and _would_pass(spec, f, mus, r_per_m, turns_factor=2.0)
    by_cp = not (by_bend or by_cores or by_turns) and _would_pass(spec, f, mus, r_per_m, no_cp=True)
    by_both = not (by_bend or by_cores or by_turns or by_cp) and _would_pass(spec, f, mus, r_per_m, turns_factor=2.0, no_cp=True)
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
    relax: list[str] = []
    if by_bend:
        reason = (f"the bend limit: a {what} may not bend tighter than {spec.bend_limit * 1e3:.3g} mm "
                  f"(--min-bend-radius), which allows only one pass through "
                  f"{_bend_limited_text(spec)}; with tighter bends a design would meet the target, e.g. {by_bend}")
        limits.append("bend")
        relax += [f"a tighter bend (--min-bend-radius, e.g. 1x) if the cable allows it",
                  "a thinner, more flexible cable for the choke section",
                  "rings with a wider section (add them with --sizes)"]
    elif by_cores:
        reason = f"not enough core: stacks of up to {more_cores} cores would meet the target, e.g. {by_cores}"
        limits.append("cores")
        relax.append(f"allow more stacked cores (--max-cores {more_cores})")
    elif by_turns:
        if spec.max_turns is not None:
            why = f"--max-turns {spec.max_turns} and one layer of {what} through the hole limit the turns"
        else:
            why = f"one layer of {what} through the hole limits the turns"
        reason = (f"not enough turns fit: {why}; with up to twice the turns that fit a design would meet the "
                  f"target, e.g. {by_turns}")
        limits.append("turns")
        relax += ["a thinner cable or wire", "rings with a larger hole (add them with --sizes)"]
        if spec.max_turns is not None:
            relax.append("raise --max-turns")
    elif by_cp:
        reason = ("self-resonance: the winding's stray capacitance shunts it in the band; without that capacitance "
                  "a design would meet the target")
        limits.append("self-resonance")
        relax.append("less capacitance: spaced turns or a thinner jacket, then measure Cp and check with "
                     "`cmcheck predict --cp`")
    elif by_both:
        reason = ("the band is too wide for one choke: its low end needs more turns than fit and its top less stray "
                  "capacitance than those turns bring")
        limits += ["turns", "self-resonance"]
    else:
        reason = ("the target is far out of reach: even twice the turns that fit, with no stray capacitance, "
                  "would not meet it")
        limits.append("target")
    split = _split_band(spec, f, mus, r_per_m)
    if split:
        relax.insert(0, split)
    copies = _series_copies(spec, closest)
    if copies:
        relax.insert(0, copies)
    if not at_low:
        relax.append("a material that stays lossy higher up (see `cmcheck compare`)")
    opt = "--target-r" if spec.criterion == "resistance" else "--target-z"
    relax.append(f"lower {opt} to {closest.margin * spec.target_ohm:,.0f} Ω (what the closest design reaches)")
    return Diagnosis(reason, tuple(relax), tuple(limits), tuple(facts))


def _bend_limited_text(spec: SizeSpec) -> str:
    """How many of the searched core stacks the bend limit reduces to a single pass."""
    geo, space = _geometry(spec)
    return f"{space['stacks_bend_limited']} of the {space['stacks_that_fit']} core stacks the cable passes through"


def diagnose_heat(spec: SizeSpec, closest: SizedDesign, meeting: int, f, mus, r_per_m) -> Diagnosis:
    h = closest.heat or {}
    reason = (
        f"{meeting} designs reach the target, but all would warm more than --max-rise {spec.max_rise_k:g} K at "
        f"{spec.drive.power_w:g} W; the coolest rises {format_rise(h.get('temperature_rise_k', math.nan))} "
        f"({h.get('dissipation_w', math.nan):.3g} W at {_hz(h.get('dissipation_hz'))})"
    )
    relax = []
    more_cores = spec.max_cores * 2
    if _would_pass(spec, f, mus, r_per_m, heat=True, max_cores=more_cores):
        relax.append(f"more stacked cores spread the heat: --max-cores {more_cores} finds cool designs")
    else:
        relax.append("larger rings (--sizes): more surface to shed the heat")
    if spec.drive.mode == "voltage":
        relax.append("a higher target: with a voltage across it, a choke of higher impedance dissipates less")
    else:
        relax.append("check --cm-current: it is the current *with* the choke in place, usually far below the "
                     "current without one; --feed-impedance gives a voltage bound instead")
    relax += [
        f"raise --max-rise above {spec.max_rise_k:g} K only if the material's datasheet allows the temperature",
        "less power or a lower duty cycle (the estimate is for continuous carrier)",
        "--keep-hot lists them anyway, flagged",
    ]
    facts = (f"closest: {closest.design.describe()}",)
    return Diagnosis(reason, tuple(relax), ("heat",), facts)


def diagnose_nothing_fits(spec: SizeSpec) -> Diagnosis:
    d = spec.conductor.outer_diameter
    largest = float(np.nanmax(spec.sizes.window_diameters))
    return Diagnosis(
        f"the {d * 1e3:.3g} mm conductor passes through none of the {len(spec.sizes)} core sizes "
        f"(largest hole {largest * 1e3:.3g} mm)",
        ("add sizes with a larger hole (--sizes)", "a thinner cable or wire"),
        ("fit",),
    )
