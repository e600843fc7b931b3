"""Reports of a sizing search (:func:`cmcheck.design.search.size`) and of a material
comparison (:func:`cmcheck.design.compare.compare_materials`)."""

from __future__ import annotations

from typing import Callable

from ..design.compare import Comparison, comparison_curves
from ..design.diagnosis import Remedy, format_rise
from ..design.search import SizeResult
from ..model.winding import Cable
from ..units import format_quantity
from .files import SAFETY_NOTES
from .results import Cell, Column, Figure, Report, Table, Text

__all__ = ["comparison_report", "context_curve", "size_report"]


def _core_text(design) -> str:
    c = design.core
    return f"{c.od * 1e3:.4g}×{c.id * 1e3:.4g}×{c.height * 1e3:.4g}"


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
    """
    s = result.spec
    cond = s.conductor
    what = f"{cond.od * 1e3:.3g} mm cable" if isinstance(cond, Cable) else cond.describe()
    bend = f" (bend radius ≥ {s.bend_limit * 1e3:.3g} mm for 2+ turns)" if s.bend_limit > 0 else ""
    title = f"Sizing {s.metric_name} ≥ {format_quantity(s.target_ohm, 'Ω')} over {s.band} with {what}{bend}"
    sp = result.space
    body: list = [Text(title, bold=True), Text(
        f"searched {result.candidates_searched:,} candidates ({sp['materials']} materials × {sp['sizes']} sizes × "
        f"1–{sp['max_cores']} cores × turns that fit, up to {sp['max_turns']}) in {result.elapsed_s:.2f} s: "
        f"{result.meeting_target:,} meet the target"
        + ((f", {result.too_hot:,} of them warmer than {s.max_rise_k:g} K" if result.too_hot
            else f", none warmer than {s.max_rise_k:g} K") if s.drive and result.meeting_target else ""))]
    if s.drive is not None:
        body.append(Text(f"heat: {s.drive.describe()}"))
    json = result.to_dict()
    notes: list[str] = []
    designs = result.designs
    by_r = s.criterion == "resistance"
    if designs:
        body.append(Text("cost: total core volume, then turns, then margin; cheapest distinct designs:"))
        length = "cable [m]" if isinstance(cond, Cable) else "wire [m]"
        key = "min_resistance_ohm" if by_r else "min_impedance_ohm"
        cols = (Column("rank", "#", "", "int", "int"), Column("material", "material"),
                Column("core", "n × OD×ID×H [mm]"), Column("turns", "turns", "", "int", "int"),
                Column(key, f"min {s.metric_name} [Ω]", "Ω", ",.0f", ".6g"),
                Column(key.replace("_ohm", "_hz"), "at", "Hz", "hz3", ".6g"),
                Column("margin", "margin", "", "margin", ".4g"),
                Column("self_resonance_hz", "SRF", "Hz", "hz3", ".6g"),
                Column("conductor_length_m", length, "m", ".2f", ".4g"))
        rows = []
        for i, d in enumerate(designs, 1):
            rows.append((i, d.design.material.name,
                         f"{d.core.stack} × {_core_text(d.design)}" + (" sleeve" if d.kind == "sleeve" else ""),
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
        if check:
            body.append(Text(f"check #1 in full: {check}"))
        notes.append("SRF uses the single-layer Cp estimate; real windings and leads often add more: measure, then "
                     f"{cp_hint}. Conductor length is for the turns only: add the leads.")
        if s.drive is not None:
            notes.append("ΔT from McLyman's still-air surface formula (empirical; a fan or an enclosure changes it).")
    else:
        body.append(Text(f"no design meets {s.metric_name} ≥ {format_quantity(s.target_ohm, 'Ω')} over {s.band}", bold=True))
        c = result.closest
        if c is not None:
            v = c.min_resistance_ohm if by_r else c.min_impedance_ohm
            hz = c.min_resistance_hz if by_r else c.min_impedance_hz
            srf = format_quantity(c.self_resonance_hz, "Hz", 3) if c.self_resonance_hz else "none found"
            line = (f"closest: {c.design.describe()}: min {s.metric_name} {v:,.0f} Ω at {format_quantity(hz, 'Hz', 3)} "
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
                      title=f"{'designs' if designs else 'closest design'} for {s.metric_name} ≥ {s.target_ohm:g} Ω, "
                            f"{s.band}"),) if curves else ()
    return Report(title=title, inputs={"band": str(s.band), "target_ohm": s.target_ohm, "criterion": s.criterion},
                  body=tuple(body), json=json, figures=figures, notes=tuple(notes))


def comparison_report(result: Comparison, *, generic: str) -> Report:
    """The report of a material comparison; ``generic`` describes the core and winding without the material."""
    b = result.band
    title = f"{generic}, over {b}"
    cols = (Column("rank", "#", "", "int", "int"), Column("material", "material"),
            Column("min_resistance_ohm", "min R [Ω]", "Ω", ",.0f", ".6g"), Column("min_resistance_hz", "at", "Hz", "hz3", ".6g"),
            Column("mean_resistance_ohm", "mean R [Ω]", "Ω", ",.0f", ".6g"),
            Column("peak_resistance_hz", "peak R at", "Hz", "hz3", ".6g"),
            Column("resistive_fraction", "R>|X| [%]", "", "percent", ".4g"),
            Column("worst_case_reduction_db", "worst cut [dB]", "dB", "+.1f", ".4g"),
            Column("worst_case_hz", "at ", "Hz", "hz3", ".6g"))
    rows = [(i, s.name, s.min_resistance_ohm, s.min_resistance_hz, s.mean_resistance_ohm,
             Cell(s.peak_resistance_hz, "" if b.contains(s.peak_resistance_hz) else " (out)"),
             s.resistive_fraction, s.worst_case_reduction_db, s.worst_case_hz) for i, s in enumerate(result.scores, 1)]
    # Each material's own design: the same core and winding, its own inductance and self-resonance.
    designs = Table((Column("material", "material"),
                     Column("low_frequency_inductance_h", "L(low f)", "H", "henry", ".6g"),
                     Column("cp_f", "Cp", "F", "farad", ".6g"),
                     Column("self_resonance_hz", "SRF", "Hz", "hz3", ".6g")),
                    tuple((s.name, s.prediction.summary["low_frequency_inductance_h"], s.prediction.summary["cp_f"],
                           s.prediction.summary["self_resonance_hz"]) for s in result.scores), title="designs")
    body = [Text(title, bold=True),
            Text(f"line's own common-mode impedance: 0 ≤ R ≤ {result.line_r_max:g} Ω, |X| ≤ {result.line_x_max:g} Ω; "
                 "ranked by the worst case"),
            Table(cols, tuple(rows), title="ranking"),
            Text("each material's design (the core and winding above):"),
            designs]
    worst = result.scores[-1]
    notes = ["worst cut: the least the common-mode current falls, min of 20·log10|Zline + Zchoke|/|Zline| over the "
             "line region; negative means the choke can resonate with a capacitive line and raise the current"]
    if worst.worst_case_reduction_db < 0:
        zl = worst.worst_case_line_ohm
        notes.append(f"e.g. {worst.name} at {format_quantity(worst.worst_case_hz, 'Hz', 3)} with Zline = "
                     f"{abs(zl.real) if abs(zl.real) < 0.5 else zl.real:.0f} {'+' if zl.imag >= 0 else '−'} "
                     f"j{abs(zl.imag):.0f} Ω: {worst.worst_case_reduction_db:+.1f} dB")
    notes.append(SAFETY_NOTES[0])
    return Report(title=title, inputs={"band": str(b), "materials": [s.name for s in result.scores]},
                  body=tuple(body), json=result.to_dict(), data={"designs": designs},
                  figures=(Figure("impedance", curves=tuple(comparison_curves(result)), band=b, quantities=("R",),
                                  title=f"R(f): {generic}"),),
                  notes=tuple(notes))
