"""Report of a sizing search (:func:`cmcheck.design.search.size`)."""

from __future__ import annotations

from typing import Callable

from ..design.diagnosis import Remedy, format_rise
from ..design.search import SizeResult
from ..units import format_quantity
from .files import SAFETY_NOTES
from .numbers import format_number
from .results import Cell, Column, Figure, Report, Table, Text

__all__ = ["context_curve", "size_report"]


def _core_text(design) -> str:
    return "×".join(f"{v * 1e3:.4g}" for v in design.core.dimensions().values())


def context_curve(design, band, label: str):
    """Z of ``design`` from half the band's low edge to twice its high edge (within a
    tabulated material's range), band edges on the grid: a plot shows the band in context."""
    return design.curve(band.grid(301, pad=2.0, within=design.material.range_hz), label=label)


def size_report(
    result: SizeResult,
    *,
    name: Callable[[Remedy], str] | None = None,
    check: str | None = None,
    cp_hint: str = "give it as the winding's cp",
    safety: bool | None = None,
    sizes_hint: str = "a table of your own cores (a CSV file) can extend or replace it",
) -> Report:
    """The report of a sizing search.

    Parameters
    ----------
    result : SizeResult
    name : callable
        Words the parameter a remedy changes (default: its name,
        :func:`cmcheck.design.diagnosis.parameter_phrase`); the command line names its option.
    check : str, optional
        How to check the first design in full (a line shown after the table).
    cp_hint : str
        How to give a measured Cp (in the note on self-resonance).
    safety : bool, optional
        Add the safety notes on power (default: when the search had a drive).
    sizes_hint : str
        How to give one's own core sizes (after the line naming the size series searched).
    """
    s = result.spec
    cond = s.conductor
    what = f"{cond.outer_diameter * 1e3:.3g} mm cable" if cond.stiff else cond.describe()
    bend = f" (bend radius ≥ {s.bend_limit * 1e3:.3g} mm for 2+ turns)" if s.bend_limit > 0 else ""
    title = f"Sizing {s.metric_name} ≥ {format_quantity(s.target_ohm, 'Ω')} over {s.band} with {what}{bend}"
    sp = result.space
    body: list = [Text(title, bold=True), Text(
        f"searched {result.candidates_searched:,} candidates ({sp['materials']} materials × {sp['sizes']} sizes × "
        f"1–{sp['max_cores']} cores × turns that fit, up to {sp['max_turns']}) in {result.elapsed_s:.2f} s: "
        f"{result.meeting_target:,} meet the target"
        + ((f", {result.too_hot:,} of them warmer than {s.max_rise_k:g} K" if result.too_hot
            else f", none warmer than {s.max_rise_k:g} K") if s.drive and result.meeting_target else ""))]
    body.append(Text(f"core sizes: {s.sizes.series or 'unnamed table'}; {sizes_hint}"))
    if s.drive is not None:
        body.append(Text(f"heat: {s.drive.describe()}"))
    json = result.to_dict()
    notes: list[str] = []
    designs = result.designs
    by_r = s.criterion == "resistance"
    if designs:
        body.append(Text("cost: total core volume, then turns, then margin; cheapest distinct designs:"))
        length = "cable [m]" if cond.stiff else "wire [m]"
        key = "min_resistance_ohm" if by_r else "min_impedance_ohm"
        cols = (Column("rank", "#", "", "int", "int"), Column("material", "material"),
                Column("core", "n × OD×ID×H [mm]"), Column("turns", "turns", "", "int", "int"),
                Column(key, f"min {s.metric_name} [Ω]", "Ω", "num", ".6g"),
                Column(key.replace("_ohm", "_hz"), "at", "Hz", "hz3", ".6g"),
                Column("margin", "margin", "", "margin", ".4g"),
                Column("self_resonance_hz", "SRF", "Hz", "hz3", ".6g"),
                Column("conductor_length_m", length, "m", ".2f", ".4g"))
        rows = []
        for i, d in enumerate(designs, 1):
            rows.append((i, d.design.material.name,
                         f"{d.core.stack} × {_core_text(d.design)}" + ("" if d.kind == "ring" else f" {d.kind}"),
                         d.design.winding.turns, d.min_resistance_ohm if by_r else d.min_impedance_ohm,
                         d.min_resistance_hz if by_r else d.min_impedance_hz, d.margin,
                         d.self_resonance_hz or None, d.design.conductor_length))
        # Dimensions and frequencies must not be cut; one space between columns keeps 80 columns.
        body.append(Table(cols, tuple(rows), title="designs", no_wrap=(1, 2, 5, 7), tight=True))
        if s.drive is not None:
            body.append(Text(f"heat at the worst frequency in the band (limit ΔT ≤ {s.max_rise_k:g} K):"))
            h_cols = (Column("rank", "#", "", "int", "int"), Column("dissipation_w", "P [W]", "W", ".3g", ".6g"),
                      Column("dissipation_hz", "at", "Hz", "hz3", ".6g"),
                      Column("temperature_rise_k", "ΔT [K]", "K", "rise", ".4g"),
                      Column("peak_flux_density_t", "B peak [mT]", "T", "milli", ".4g"),
                      Column("peak_flux_hz", "at ", "Hz", "hz3", ".6g"))
            h_rows = [(i, d.heat["dissipation_w"], d.heat["dissipation_hz"],
                       Cell(d.heat["temperature_rise_k"], " too hot" if d.heat["too_hot"] else ""),
                       d.heat["peak_flux_density_t"], d.heat["peak_flux_hz"]) for i, d in enumerate(designs, 1)]
            body.append(Table(h_cols, tuple(h_rows), title="heat"))
        body.append(Text("buy: " + "; ".join(f"#{i} {d.buy or d.design.material.name}" for i, d in enumerate(designs, 1))))
        if check:
            body.append(Text(f"check #1 in full: {check}"))
        notes.append("SRF uses Cp estimated by the energy method from the geometry and the material's electrical class "
                     f"(turns spread over 300° unless given); measure it where you can, then {cp_hint}. "
                     "Conductor length is for the turns only: add the leads.")
        if s.drive is not None:
            notes.append("ΔT from McLyman's still-air surface formula (empirical; a fan or an enclosure changes it).")
    else:
        body.append(Text(f"no design meets {s.metric_name} ≥ {format_quantity(s.target_ohm, 'Ω')} over {s.band}", bold=True))
        c = result.closest
        if c is not None:
            v = c.min_resistance_ohm if by_r else c.min_impedance_ohm
            hz = c.min_resistance_hz if by_r else c.min_impedance_hz
            srf = format_quantity(c.self_resonance_hz, "Hz", 3) if c.self_resonance_hz else "none found"
            line = (f"closest: {c.design.describe()}: min {s.metric_name} {format_number(v)} Ω at {format_quantity(hz, 'Hz', 3)} "
                    f"({c.margin * 100:.0f} % of target), SRF {srf}")
            if c.heat is not None:
                line += (f", {c.heat['dissipation_w']:.3g} W → ΔT {format_rise(c.heat['temperature_rise_k'])}, "
                         f"B {c.heat['peak_flux_density_t'] * 1e3:.2g} mT")
            body.append(Text(line))
        diag = result.diagnosis
        if diag is not None:
            body.append(Text(f"reason: {diag.reason}"))
            body += [Text(f"  {fact}") for fact in diag.facts[1:]]
            body.append(Text("to relax:"))
            body += [Text(f"  - {r}") for r in diag.sentences(name)]
            json.update(diag.to_dict(name))
    if s.drive is not None if safety is None else safety:
        notes += SAFETY_NOTES
    shown = designs or ((result.closest,) if result.closest else ())
    curves = tuple(context_curve(d.design, s.band, f"#{i} {d.design.material.name} {d.core.stack}×({_core_text(d.design)}) "
                                 f"N={d.design.winding.turns}") for i, d in enumerate(shown, 1))
    figures = (Figure("impedance", curves=curves, band=s.band, quantities=("R",), target=s.target_ohm,
                      resonances=tuple(d.self_resonance_hz or None for d in shown),
                      title=f"{'designs' if designs else 'closest design'} for {s.metric_name} ≥ {format_quantity(s.target_ohm, 'Ω')}, "
                            f"{s.band}"),) if curves else ()
    return Report(title=title, inputs={"band": str(s.band), "target_ohm": s.target_ohm, "criterion": s.criterion},
                  body=tuple(body), json=json, figures=figures, notes=tuple(notes))
