"""Report of a material comparison (:func:`cmcheck.design.compare.compare_designs`)."""

from __future__ import annotations

from ..design.compare import Comparison, comparison_curves
from ..units import format_quantity
from .files import SAFETY_NOTES
from .results import Cell, Column, Figure, Report, Table, Text

__all__ = ["comparison_report"]


def comparison_report(result: Comparison, *, generic: str) -> Report:
    """The report of a material comparison; ``generic`` describes the core and winding without the material."""
    b = result.band
    title = f"{generic}, over {b}"
    cols = (Column("rank", "#", "", "int", "int"), Column("material", "material"),
            Column("min_resistance_ohm", "min R [Ω]", "Ω", "num", ".6g"), Column("min_resistance_hz", "at", "Hz", "hz3", ".6g"),
            Column("mean_resistance_ohm", "mean R [Ω]", "Ω", "num", ".6g"),
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
                  figures=(Figure("impedance", curves=tuple(comparison_curves(result)), band=b, quantities=("R", "|X|"),
                                  resonances=tuple(s.prediction.summary["self_resonance_hz"] for s in result.scores),
                                  title=f"R and |X| per material: {generic}"),),
                  notes=tuple(notes))
