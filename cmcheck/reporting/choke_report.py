"""Report of a choke prediction (:func:`cmcheck.model.choke.predict`)."""

from __future__ import annotations

import numpy as np

from ..curve import ImpedanceCurve
from ..model.choke import Prediction
from ..units import format_quantity, span_digits
from .files import SAFETY_NOTES
from .numbers import format_number
from .results import Column, Figure, Report, Table, Text

__all__ = ["curve_table", "prediction_report", "table_indices"]

#: Columns of an impedance curve in files (the project's standard keys).
CURVE_COLUMNS = (
    Column("frequency_hz", "frequency", "Hz", "hz", ".9g"),
    Column("resistance_ohm", "R [Ω]", "Ω", "num", ".9g"),
    Column("reactance_ohm", "X [Ω]", "Ω", "num", ".9g"),
    Column("impedance_ohm", "|Z| [Ω]", "Ω", "num", ".9g"),
    Column("valid", "valid", "", "yesno", "int"),
)


def table_indices(f: np.ndarray, rows: int, marks=()) -> np.ndarray:
    """About ``rows`` log-spaced indices over the grid ``f``, plus the points nearest each mark
    (band edges, minima) that lies within it."""
    wanted = np.geomspace(f[0], f[-1], rows)
    extra = [e for e in marks if e is not None and f[0] <= e <= f[-1]]
    idx = {int(np.argmin(np.abs(np.log(f / w)))) for w in np.concatenate([wanted, extra])}
    return np.array(sorted(idx))


def curve_table(curve: ImpedanceCurve, comments=()) -> Table:
    """Every point of a curve, as a table (the CSV file of ``predict``)."""
    z = curve.z
    rows = zip(curve.frequency_hz.tolist(), z.real.tolist(), z.imag.tolist(), np.abs(z).tolist(), curve.valid.tolist())
    return Table(CURVE_COLUMNS, tuple(rows), title="impedance", comments=comments)


def _source_text(source: str) -> str:
    # "estimated (energy method, …)" reads once in brackets: "estimated: energy method, …".
    if source.startswith("estimated (") and source.endswith(")"):
        return "estimated: " + source[len("estimated ("):-1]
    return source


def prediction_report(result: Prediction, rows: int = 16) -> Report:
    """Console lines, the table of ``rows`` points, the full curve, the plot and the JSON of a prediction."""
    design, band, curve, s = result.design, result.band, result.curve, result.summary
    title = design.describe()
    core = design.core
    core_info = [f"C1 = Σl/A = {core.c1:.5g} 1/m"]
    if None not in (core.le, core.ae, core.ve):
        core_info.append(f"le = {core.le * 1e3:.4g} mm, Ae = {core.ae * 1e6:.4g} mm², Ve = {format_number(core.ve * 1e9)} mm³")
    wind_info = [f"L0 = {format_quantity(design.l0, 'H')}",
                 f"L(low f) = {format_quantity(s['low_frequency_inductance_h'], 'H')}",
                 f"Cp = {format_quantity(s['cp_f'], 'F')} ({_source_text(s['cp_source'])})"]
    if s["conductor_length_m"] is not None:
        wind_info.append(f"conductor {s['conductor_length_m'] * 1e3:.0f} mm + leads")

    f = curve.frequency_hz
    digits = span_digits(band.low, band.high)
    idx = table_indices(f, rows, [e for seg in band.segments for e in seg] + [s["min_resistance_hz"]])
    z = curve.z
    shown = Table(
        (Column("frequency_hz", "frequency", "Hz", f"hz:{digits}", ".9g"),) + CURVE_COLUMNS[1:4]
        + (Column("resistive", "R>|X|", "", "flag", "int"),),
        tuple((float(f[i]), float(z[i].real), float(z[i].imag), float(abs(z[i])), bool(z[i].real > abs(z[i].imag)))
              for i in idx),
    )
    srf = s["self_resonance_hz"]
    lo, hi = s["self_resonance_searched_hz"]
    srf_text = (format_quantity(srf, "Hz") if srf else
                f"none between {format_quantity(lo, 'Hz')} and {format_quantity(hi, 'Hz')}")
    body = [
        Text(title, bold=True),
        Text("  core: " + ", ".join(core_info)),
        Text("  winding: " + ", ".join(wind_info)),
    ]
    parts = s.get("cp_parts_f")
    if parts:
        body.append(Text("  Cp parts: " + ", ".join(f"{k} {format_quantity(parts[k], 'F')}" for k in
                                                     ("gap", "air", "chain", "core", "leads"))))
    body += [
        shown,
        Text(f"band {band}: min R = {format_number(s['min_resistance_ohm'])} Ω at "
             f"{format_quantity(s['min_resistance_hz'], 'Hz', digits)}, max R = {format_number(s['max_resistance_ohm'])} Ω at "
             f"{format_quantity(s['max_resistance_hz'], 'Hz', digits)}"),
        Text(f"self-resonance: {srf_text}; mostly resistive (R > |X|) over "
             f"{100 * s['resistive_fraction']:.0f} % of the band"),
    ]
    if s["max_turns_one_layer"] is not None:
        body.append(Text(f"one layer holds up to {s['max_turns_one_layer']} turns of this conductor"))
    return Report(
        title=title,
        inputs={"design": title, "band": str(band), "points": int(f.size)},
        body=tuple(body),
        json=result.to_dict(),
        data={"curve": curve_table(curve, (title, "predicted by cmcheck (model estimate, not a measurement)"))},
        figures=(Figure("impedance", title=title, curves=(curve,), band=band,
                        markers=((srf, f"self-resonance {format_quantity(srf, 'Hz')}"),) if srf else ()),),
        notes=SAFETY_NOTES[:1],
    )
