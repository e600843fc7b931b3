"""``cmcheck predict`` and ``cmcheck materials``."""

from __future__ import annotations

from pathlib import Path
from typing import Annotated, Optional

import numpy as np
import typer

from ..model.choke import predict as predict_choke
from ..model.materials import builtin_materials, check_band, get_material
from ..design.heat import Drive
from ..errors import DesignError
from ..reporting.choke_report import prediction_report
from ..reporting.heat_report import with_heat
from ..units import parse_current, parse_power, parse_resistance, parse_voltage
from ..reporting.files import check_outputs, write_json
from ..reporting.outputs import write_report
from ..units import format_quantity
from . import options as o
from .app import app
from .render import console, print_notes, show, table


HEAT_PANEL = "Heat at power"


def _drive(power, cm_voltage, cm_current, feed_impedance) -> Drive | None:
    opts = {"cm_voltage_v": o.parse_option("--cm-voltage", parse_voltage, cm_voltage),
            "cm_current_a": o.parse_option("--cm-current", parse_current, cm_current),
            "feed_impedance_ohm": o.parse_option("--feed-impedance", parse_resistance, feed_impedance)}
    p = o.parse_option("--power", parse_power, power)
    if p is None:
        if any(v is not None for v in opts.values()):
            raise DesignError("--cm-voltage, --cm-current and --feed-impedance need --power (the power they apply at)")
        return None
    return Drive(p, **opts)


@app.command()
@o.with_design_file
@o.with_design_options()
def predict(
    design_options: dict = None,
    band: o.BandOpt = "1-100MHz",
    points: o.Points = 201,
    rows: Annotated[int, typer.Option("--rows", help="Rows in the printed table (the files get every point).", min=2)] = 16,
    json_out: o.JsonOut = None,
    csv_out: o.CsvOut = None,
    plot_out: o.PlotOut = None,
    html_out: o.HtmlOut = None,
    touchstone_out: Annotated[
        Optional[Path],
        typer.Option("--touchstone", help="Write the choke as a series two-port .s2p (50 Ω) file.", rich_help_panel=o.OUTPUT_PANEL),
    ] = None,
    power: Annotated[Optional[str], typer.Option("--power", help="Transmitter power, e.g. 100W: heat and flux of this choke.", rich_help_panel=HEAT_PANEL)] = None,
    cm_voltage: Annotated[Optional[str], typer.Option("--cm-voltage", help="Common-mode RMS voltage across the choke at --power, e.g. 150V.", rich_help_panel=HEAT_PANEL)] = None,
    cm_current: Annotated[Optional[str], typer.Option("--cm-current", help="Common-mode RMS current through the choke at --power, e.g. 0.3A.", rich_help_panel=HEAT_PANEL)] = None,
    feed_impedance: Annotated[Optional[str], typer.Option("--feed-impedance", help="Feed-point impedance: worst case puts all of √(P·Z) across the choke, e.g. 300.", rich_help_panel=HEAT_PANEL)] = None,
) -> None:
    """Predict a choke's common-mode impedance R + jX from core, material and winding.

    Example: cmcheck predict --material nizn-800 --od 61mm --id 35.6mm --height 12.7mm
    --turns 8 --cable-od 5mm --band 1.8-30MHz

    The model is Z = (jωL0·µ(f) + R_wire) in parallel with jωCp, with L0 = µ0·N²/C1 from the
    IEC 60205 core factor. Cp is a single-layer first estimate unless --cp is given.
    """
    design = o.design_from_options(**design_options)
    b = o.band_from_option(band)
    check_band(design.material, b)
    material = design_options["material"]
    inputs = [material] if material and Path(material).is_file() else []
    check_outputs([json_out, csv_out, plot_out, touchstone_out, html_out], inputs)
    drive = _drive(power, cm_voltage, cm_current, feed_impedance)
    result = predict_choke(design, b, points)
    report = prediction_report(result, rows)
    if drive is not None:
        report = with_heat(report, result, drive)
    # Files first, all or none: a closed pipe (| head) must not cost the user the results.
    write_report(report, json=json_out, csv={"curve": csv_out}, plot=plot_out, touchstone=touchstone_out,
                 html=html_out)
    show(report)


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
    check_band(m, b)
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
