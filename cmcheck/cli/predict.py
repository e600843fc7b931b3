"""``cmcheck predict`` and ``cmcheck materials``."""

from __future__ import annotations

from pathlib import Path
from typing import Annotated, Optional

import numpy as np
import typer

from ..model.choke import predict as predict_choke
from ..model.materials import builtin_materials, get_material
from ..reporting.files import (
    SAFETY_NOTES,
    check_outputs,
    curve_rows,
    plot_curves,
    staged_outputs,
    write_csv,
    write_json,
    write_touchstone,
)
from ..units import format_quantity, span_digits
from . import options as o
from .app import app
from .render import console, print_notes, table


@app.command()
def predict(
    material: o.Material = None,
    od: o.OD = None,
    id: o.ID = None,
    height: o.Height = None,
    cores: o.Cores = 1,
    core_factor: o.CoreFactor = None,
    window: o.Window = None,
    width: o.Width = None,
    thickness: o.Thickness = None,
    length: o.Length = None,
    hole: o.Hole = None,
    hole_spacing: o.HoleSpacing = None,
    turns: o.Turns = None,
    wire: o.WireOpt = None,
    insulation: o.Insulation = "0",
    cable_od: o.CableOD = None,
    cp: o.Cp = None,
    band: o.BandOpt = "1-100MHz",
    points: o.Points = 201,
    rows: Annotated[int, typer.Option("--rows", help="Rows in the printed table (the files get every point).", min=2)] = 16,
    json_out: o.JsonOut = None,
    csv_out: o.CsvOut = None,
    plot_out: o.PlotOut = None,
    touchstone_out: Annotated[
        Optional[Path],
        typer.Option("--touchstone", help="Write the choke as a series two-port .s2p (50 Ω) file.", rich_help_panel=o.OUTPUT_PANEL),
    ] = None,
) -> None:
    """Predict a choke's common-mode impedance R + jX from core, material and winding.

    Example: cmcheck predict --material nizn-800 --od 61mm --id 35.6mm --height 12.7mm
    --turns 8 --cable-od 5mm --band 1.8-30MHz

    The model is Z = (jωL0·µ(f) + R_wire) in parallel with jωCp, with L0 = µ0·N²/C1 from the
    IEC 60205 core factor. Cp is a single-layer first estimate unless --cp is given.
    """
    design = o.design_from_options(
        material=material, od=od, id=id, height=height, cores=cores, core_factor=core_factor,
        window=window, turns=turns, wire=wire, insulation=insulation, cable_od=cable_od, cp=cp,
        width=width, thickness=thickness, length=length, hole=hole, hole_spacing=hole_spacing,
    )
    b = o.band_from_option(band)
    inputs = [material] if material and Path(material).is_file() else []
    check_outputs([json_out, csv_out, plot_out, touchstone_out], inputs)
    result = predict_choke(design, b, points)
    s = result.summary
    curve = result.curve

    # Files first, all or none: a closed pipe (| head) must not cost the user the results.
    comments = [design.describe(), "predicted by cmcheck (model estimate, not a measurement)"]
    with staged_outputs():
        if json_out:
            write_json(json_out, result.to_dict())
        if csv_out:
            write_csv(csv_out, *curve_rows(curve), comments=comments)
        if plot_out:
            plot_curves(plot_out, [curve], band=b, title=design.describe())
        if touchstone_out:
            write_touchstone(touchstone_out, curve, comments=comments)

    console.print(f"[bold]{design.describe()}[/bold]")
    core = design.core
    core_info = [f"C1 = Σl/A = {core.c1:.5g} 1/m"]
    if None not in (core.le, core.ae, core.ve):
        core_info.append(f"le = {core.le * 1e3:.4g} mm, Ae = {core.ae * 1e6:.4g} mm², Ve = {core.ve * 1e9:.4g} mm³")
    wind_info = [f"L0 = {format_quantity(design.l0, 'H')}",
                 f"L(low f) = {format_quantity(s['low_frequency_inductance_h'], 'H')}",
                 f"Cp = {format_quantity(s['cp_f'], 'F')} ({s['cp_source']})"]
    if s["conductor_length_m"] is not None:
        wind_info.append(f"conductor {s['conductor_length_m'] * 1e3:.0f} mm + leads")
    console.print("  core: " + ", ".join(core_info))
    console.print("  winding: " + ", ".join(wind_info))

    idx = _table_rows(curve.frequency_hz, b, rows, s["min_resistance_hz"])
    digits = span_digits(b.low, b.high)
    t = table("frequency", "R [Ω]", "X [Ω]", "|Z| [Ω]", "R>|X|")
    for i in idx:
        z = curve.z[i]
        t.add_row(format_quantity(curve.frequency_hz[i], "Hz", digits), f"{z.real:,.1f}", f"{z.imag:,.1f}",
                  f"{abs(z):,.1f}", "yes" if z.real > abs(z.imag) else "")
    console.print(t)

    srf = s["self_resonance_hz"]
    lo, hi = s["self_resonance_searched_hz"]
    srf_text = (format_quantity(srf, "Hz") if srf else
                f"none between {format_quantity(lo, 'Hz')} and {format_quantity(hi, 'Hz')}")
    console.print(f"band {b}: min R = {s['min_resistance_ohm']:,.1f} Ω at {format_quantity(s['min_resistance_hz'], 'Hz', digits)}, "
                  f"max R = {s['max_resistance_ohm']:,.1f} Ω at {format_quantity(s['max_resistance_hz'], 'Hz', digits)}")
    console.print(f"self-resonance: {srf_text}; mostly resistive (R > |X|) over "
                  f"{100 * s['resistive_fraction']:.0f} % of the band")
    if s["max_turns_one_layer"] is not None:
        console.print(f"one layer holds up to {s['max_turns_one_layer']} turns of this conductor")

    print_notes(SAFETY_NOTES[:1])


def _table_rows(f: np.ndarray, band, rows: int, f_min: float) -> np.ndarray:
    """About ``rows`` log-spaced indices over the grid, plus the band edges and the R minimum."""
    wanted = np.geomspace(f[0], f[-1], rows)
    extra = [e for seg in band.segments for e in seg] + [f_min]
    idx = {int(np.argmin(np.abs(np.log(f / w)))) for w in np.concatenate([wanted, extra])}
    return np.array(sorted(idx))


@app.command()
def materials(
    name: Annotated[Optional[str], typer.Argument(help="Show µ' and µ'' of this material (built-in name or CSV file).")] = None,
    band: o.BandOpt = "100kHz-300MHz",
    points: Annotated[int, typer.Option("--points", help="Rows of the µ table when a material is named.", min=2)] = 13,
    json_out: o.JsonOut = None,
) -> None:
    """List the built-in material families, or show one material's µ' and µ''.

    Built-in materials are families (NiZn, MnZn, iron powder) parametrised by initial
    permeability: any member in a family's range is a material, e.g. nizn-650. Their constants
    are representative, from memory, not any maker's data: load your datasheet curve (CSV
    frequency_hz,mu_prime,mu_double_prime) for design work.
    """
    from ..model.families import builtin_families
    from ..model.materials import LISTING_SERIES

    check_outputs([json_out], [name] if name and Path(name).is_file() else [])
    if name is None:
        fams = list(builtin_families().values())
        mats = list(builtin_materials().values())
        t = table("family", "name", "µi range", "electrical", "suits")
        for fam in fams:
            lo, hi = fam.mu_range
            elec = fam.electrical_class + (f", εr ≈ {fam.relative_permittivity:g}" if fam.relative_permittivity else "")
            t.add_row(fam.name, f"{fam.key}-<µi>", f"{lo:g}–{hi:g}", elec, fam.description)
        console.print(t)
        console.print(f"Listed members (ISO 3 series {LISTING_SERIES}): " + ", ".join(m.name for m in mats))
        for fam in fams:
            console.print(f"{fam.name}: {fam.provenance}")
            for src in fam.sources:
                console.print(f"  source: {src}")
        print_notes([
            "Any µi within a family's range is a material (e.g. nizn-650); frequencies follow Snoek's law.",
            "Representative values from memory; load your datasheet curve for design work.",
        ])
        if json_out:
            fam_rows = [
                {"key": f.key, "family": f.name, "mu_i_range": list(f.mu_range), "electrical_class": f.electrical_class,
                 "relative_permittivity": f.relative_permittivity, "form": f.form, "description": f.description,
                 "provenance": f.provenance, "sources": list(f.sources)}
                for f in fams
            ]
            write_json(json_out, {"families": fam_rows, "listing_series": LISTING_SERIES,
                                  "materials": [m.to_dict() for m in mats]})
        return
    m = get_material(name)
    b = o.band_from_option(band)
    f = np.geomspace(b.low, b.high, points)
    mu = m.permeability(f)
    console.print(f"[bold]{m.name}[/bold] ({m.family}, {m.electrical_class}): {m.description}")
    console.print(f"  {m.provenance}")
    t = table("frequency", "µ'", "µ''", "µ''/µ'")
    for fi, mi in zip(f, mu):
        t.add_row(format_quantity(fi, "Hz"), f"{mi.real:.1f}", f"{-mi.imag:.1f}",
                  f"{-mi.imag / mi.real:.3g}" if mi.real else "")
    console.print(t)
    if json_out:
        d = m.to_dict()
        d.update(frequency_hz=f, mu_prime=mu.real, mu_double_prime=-mu.imag)
        write_json(json_out, {"materials": [d]})
