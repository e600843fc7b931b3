"""Heat and flux of a choke the user already has, added to its prediction report."""

from __future__ import annotations

from dataclasses import replace

import numpy as np

from ..design.heat import DEFAULT_MAX_RISE_K, Drive, heat_check
from ..units import format_quantity
from .files import SAFETY_NOTES
from .results import Report, Text

__all__ = ["with_heat"]

#: Peak flux density above which a ferrite core is called near saturation [T] (common practice, no published source).
HIGH_FLUX_T = 0.2
#: RMS voltage above which the choke's terminals are called dangerous [V] (common practice, no published source).
HIGH_VOLTAGE_V = 500.0


def with_heat(report: Report, prediction, drive: Drive) -> Report:
    """``report`` (of ``prediction``) with the worst in-band dissipation, temperature rise and flux at ``drive``."""
    design, band, curve = prediction.design, prediction.band, prediction.curve
    core = design.core
    inb = band.contains(curve.frequency_hz)
    f, z = curve.frequency_hz[inb], curve.z[inb]
    area = core.surface_area
    hc = heat_check(drive, f, z[None, :], [design.winding.turns], [core.ae if core.ae else np.nan],
                    [area if area else np.nan])
    p, p_hz = float(hc.dissipation_w[0]), float(hc.dissipation_hz[0])
    rise = float(hc.temperature_rise_k[0]) if area else None
    b = float(hc.peak_flux_t[0]) if core.ae else None
    v = drive.voltage_v if drive.mode == "voltage" else float(drive.cm_current_a * np.max(np.abs(z)))
    rise_text = "" if rise is None else (f", temperature rise ≈ {rise:.0f} K above ambient (still air)" if rise < 300
                                         else ", temperature rise far beyond 300 K: the core would be destroyed")
    body = [Text(f"at {drive.describe()}:", bold=True),
            Text(f"  core dissipation up to {p:.3g} W at {format_quantity(p_hz, 'Hz')}"
                 + rise_text),
            Text("  peak flux density " + ("unknown (the core's Ae is not given)" if b is None else
                                           f"up to {b * 1e3:.3g} mT at {format_quantity(float(hc.peak_flux_hz[0]), 'Hz')}"))]
    notes = list(report.notes)
    if p > drive.power_w:
        notes.append("The worst-case voltage would dissipate more than the transmitter power: the choke cannot hold "
                     "it off; expect far more common-mode current and a burnt core.")
    if rise is not None and rise > DEFAULT_MAX_RISE_K:
        notes.append(f"Caution: the core may run {min(rise, 300):.0f}{'+' if rise >= 300 else ''} K above ambient (limit {DEFAULT_MAX_RISE_K:g} K): hot ferrite "
                     "loses permeability and can crack; use more turns, a larger core, or less power.")
    if b is not None and b > HIGH_FLUX_T:
        notes.append(f"Caution: peak flux {b * 1e3:.0f} mT approaches ferrite saturation.")
    if v > HIGH_VOLTAGE_V:
        notes.append(f"Caution: about {v:,.0f} V RMS across the choke: kilovolt peaks; insulate and keep clear.")
    notes += [n for n in SAFETY_NOTES[1:] if n not in notes]
    js = dict(report.json or {})
    js["heat"] = {"drive": drive.to_dict(), "max_dissipation_w": p, "max_dissipation_hz": p_hz,
                  "temperature_rise_k": rise, "max_peak_flux_t": b,
                  "max_peak_flux_hz": float(hc.peak_flux_hz[0]) if b is not None else None,
                  "max_rise_k": DEFAULT_MAX_RISE_K}
    return replace(report, body=report.body + tuple(body), notes=tuple(notes), json=js)
