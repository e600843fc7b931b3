"""``cmcheck identify``: µ(f), Cp and a model of an unknown core from one sweep of a winding on it."""

from __future__ import annotations

from pathlib import Path
from typing import Annotated, Optional

import typer

from ..errors import CmcheckError
from ..measurement.methods import Accuracy, Fixture, extract
from ..measurement.touchstone import read_touchstone
from ..reporting.files import check_outputs
from ..reporting.identify_report import identify_report, write_identify_outputs
from ..units import parse_resistance
from . import options as o
from .app import app
from .extract import MEASURE_PANEL, _parse_percent
from .render import show

EPILOG = """\b
Wind a few turns on the unknown core, sweep it (reflection across port 1 suits a few
turns; series-through a winding of kilohms), and give the core's size and the turns.
The sweep should reach past the self-resonance so that Cp can be found; µ is trusted
up to 0.7 of the self-resonance. --save-material writes a CSV the other commands read
with --material (-m); --spice writes the winding's fitted equivalent circuit.
"""


@app.command(epilog=EPILOG)
@o.with_design_file
def identify(
    file: Annotated[Path, typer.Argument(help="Touchstone sweep of a winding on the unknown core.", show_default=False)],
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
    method: Annotated[str, typer.Option("--method", help="How the sweep was made: reflect|series|shunt (auto: 1 port → reflect, 2 → series).", rich_help_panel=MEASURE_PANEL)] = "auto",
    z0: Annotated[Optional[str], typer.Option("--z0", help="Reference impedance instead of the file's, e.g. 50.", rich_help_panel=MEASURE_PANEL)] = None,
    open_file: Annotated[Optional[Path], typer.Option("--open", help="Sweep of the empty (open) fixture, same method.", rich_help_panel=MEASURE_PANEL)] = None,
    short_file: Annotated[Optional[Path], typer.Option("--short", help="Sweep of the shorted fixture, same method.", rich_help_panel=MEASURE_PANEL)] = None,
    floor_db: Annotated[float, typer.Option("--floor-db", help="Instrument noise floor in dB.", rich_help_panel=MEASURE_PANEL)] = -80.0,
    max_error: Annotated[str, typer.Option("--max-error", help="Largest estimated error of a valid point, in %.", rich_help_panel=MEASURE_PANEL)] = "10",
    cal_error: Annotated[str, typer.Option("--cal-error", help="Residual error of the calibration, in % of S.", rich_help_panel=MEASURE_PANEL)] = "1",
    rows: Annotated[int, typer.Option("--rows", help="Rows in the printed µ table.", min=2)] = 12,
    save_material: Annotated[Optional[Path], typer.Option("--save-material", help="Write the identified material as CSV (frequency_hz,mu_prime,mu_double_prime) for --material.", rich_help_panel=o.OUTPUT_PANEL)] = None,
    spice: Annotated[Optional[Path], typer.Option("--spice", help="Write the winding's fitted equivalent circuit as a SPICE subcircuit.", rich_help_panel=o.OUTPUT_PANEL)] = None,
    json_out: o.JsonOut = None,
    plot_out: Annotated[Optional[Path], typer.Option("--plot", help="Plot measured and fitted µ', µ'' to this PNG file.", rich_help_panel=o.OUTPUT_PANEL)] = None,
    html_out: o.HtmlOut = None,
) -> None:
    """Identify an unknown core: µ(f), the winding's Cp and self-resonance, a fitted model.

    Example: cmcheck identify ring.s1p --od 9.55mm --id 4.75mm --height 3.2mm --turns 2
    """
    from ..identify import fit_circuit
    from ..identify import identify as run_identify

    if turns is None:
        raise o.missing("--turns")
    if turns < 1:
        raise CmcheckError(f"--turns must be a whole number ≥ 1, got {turns}")
    if method not in ("auto", "reflect", "series", "shunt"):
        raise CmcheckError(f"--method {method!r}: identify needs an impedance: reflect, series or shunt")
    if (open_file is None) != (short_file is None):
        raise CmcheckError("--open and --short go together: compensation needs both fixture sweeps")
    core = o.core_from_options(od=od, id=id, height=height, cores=cores, core_factor=core_factor,
                               window=window, width=width, thickness=thickness, length=length, hole=hole, hole_spacing=hole_spacing)
    z0_value = o.parse_option("--z0", parse_resistance, z0)
    accuracy = Accuracy(floor_db=floor_db, max_error=_parse_percent(max_error, "--max-error"),
                        cal_error=_parse_percent(cal_error, "--cal-error", allow_zero=True))
    check_outputs([json_out, plot_out, save_material, spice, html_out], [file] + [p for p in (open_file, short_file) if p])
    fixture = None
    if open_file is not None:
        fixture = Fixture.from_sweeps(read_touchstone(open_file, z0=z0_value), read_touchstone(short_file, z0=z0_value),
                                      method, z0_value)
    ex = extract(read_touchstone(file, z0=z0_value), method, z0=z0_value, accuracy=accuracy, fixture=fixture)
    if ex.curve is None:
        raise CmcheckError(f"{file}: identify needs an impedance; use --method reflect, series or shunt")
    ident = run_identify(ex, c1=core.c1, turns=turns)
    circuit = None
    if spice is not None:
        c = ex.curve
        circuit = fit_circuit(c.frequency_hz, c.z, c.valid)
    report = identify_report(ident, core_text=core.describe(), method=ex.method, rows=rows, circuit=circuit)
    write_identify_outputs(report, ident, json=json_out, plot=plot_out, material=save_material, spice=spice,
                           circuit=circuit, html=html_out)
    show(report)
