"""``cmcheck size`` (find chokes that meet a target) and ``cmcheck compare`` (rank materials)."""

from __future__ import annotations

import math
import time
import warnings
from pathlib import Path
from typing import Annotated, Optional

import numpy as np
import typer

from ..design.compare import DEFAULT_LINE_R_MAX, DEFAULT_LINE_X_MAX, compare_designs
from ..errors import CmcheckWarning, DesignError, UnitError
from ..model.materials import builtin_materials, check_band, get_material, search_materials
from ..reporting.files import check_outputs
from ..reporting.outputs import write_report
from ..reporting.compare_report import comparison_report
from ..reporting.size_report import size_report
from ..design.catalogue import builtin_ring_sizes, load_ring_sizes
from ..design.search import DEFAULT_BEND_RATIO, DEFAULT_MAX_CORES, DEFAULT_TARGET_OHM, SizeSpec, size as run_size
from ..design.heat import DEFAULT_MAX_RISE_K, Drive
from ..units import parse_current, parse_length, parse_power, parse_resistance, parse_voltage, parse_wire_diameter
from ..model.winding import Cable, Wire
from . import options as o
from .app import EXIT_LIMIT_FAILED, app
from .flags import option_phrase
from .render import err_console, show

SEARCH_PANEL = "Design space"
HEAT_PANEL = "Power and heat"

MaterialsOpt = Annotated[
    Optional[str],
    typer.Option(
        "--materials",
        help="Comma-separated materials: family names (nizn, mnzn, iron-powder: the family on the ISO 3 R10 grid), "
        "members (nizn-650) and/or CSV files (frequency_hz,mu_prime,mu_double_prime); "
        "size default: the NiZn and MnZn families; compare default: every built-in listed material.",
        rich_help_panel=SEARCH_PANEL,
    ),
]


def _material_names(text: str | None) -> list[str]:
    if text is None:
        return list(builtin_materials())
    names = [t.strip() for t in text.split(",") if t.strip()]
    if not names:
        raise DesignError("--materials: name at least one material")
    return names


def _materials(text: str | None):
    return [get_material(n) for n in _material_names(text)]


def _material_files(text: str | None) -> list[str]:
    return [t.strip() for t in (text or "").split(",") if t.strip() and Path(t.strip()).is_file()]


def _conductor(wire: str | None, insulation: str, cable_od: str | None):
    if wire is not None and cable_od is not None:
        raise DesignError("give either --wire or --cable-od, not both")
    if cable_od is not None:
        return Cable(o.parse_option("--cable-od", parse_length, cable_od))
    return Wire(o.parse_option("--wire", parse_wire_diameter, wire or "1mm"), o.parse_option("--insulation", parse_length, insulation))


def _bend(text: str | None, conductor) -> float | None:
    if text is None:
        return None
    t = text.strip().lower()
    if t.endswith("x"):
        try:
            ratio = float(t[:-1])
        except ValueError:
            raise UnitError(f"--min-bend-radius: {text!r} is neither a length (8mm) nor a multiple of the OD (1.5x)") from None
        return ratio * conductor.outer_diameter
    return o.parse_option("--min-bend-radius", parse_length, text)


def _predict_command(d, band, cond) -> str:
    c = d.design.core
    w = d.design.winding
    conductor = (f"--cable-od {cond.od * 1e3:.4g}mm" if isinstance(cond, Cable)
                 else f"--wire {cond.diameter * 1e3:.4g}mm" + (f" --insulation {cond.insulation * 1e3:.4g}mm" if cond.insulation else ""))
    cp = f" --cp {d.design.cp * 1e12:.3g}pF" if d.design.cp_source == "given" else ""
    if d.design.winding_angle is not None:
        cp += f" --winding-angle {math.degrees(d.design.winding_angle):.4g}"
    return (f"cmcheck predict -m {d.design.material.name} {o.core_options(c)} --turns {w.turns} {conductor}{cp} "
            f"--band {band}")


class _LazyProgress:
    """A progress bar that appears only once the search has run for about a second."""

    def __init__(self) -> None:
        self.t0 = time.perf_counter()
        self.bar = None
        self.task = None

    def __call__(self, done: int, total: int) -> None:
        if self.bar is None:
            if time.perf_counter() - self.t0 < 1.0 or done >= total:
                return
            from rich.progress import Progress

            self.bar = Progress(console=err_console, transient=True)
            self.bar.start()
            self.task = self.bar.add_task("searching", total=total)
        self.bar.update(self.task, completed=done)

    def close(self) -> None:
        if self.bar is not None:
            self.bar.stop()


@app.command("size")
@o.with_design_file
def size_command(
    band: Annotated[Optional[str], typer.Option("--band", "-b", help="Frequency band(s): 1-100MHz, 3.5MHz-30MHz, or 1.8-2MHz,3.5-4MHz (required here or in --design).")] = None,
    target_r: Annotated[Optional[str], typer.Option("--target-r", help=f"Minimum resistance R over the band, e.g. 1k (default {DEFAULT_TARGET_OHM:g} Ω).")] = None,
    target_z: Annotated[Optional[str], typer.Option("--target-z", help="Instead of --target-r: minimum |Z| over the band.")] = None,
    cable_od: o.CableOD = None,
    wire: o.WireOpt = None,
    insulation: o.Insulation = "0",
    materials: MaterialsOpt = None,
    sizes: Annotated[Optional[Path], typer.Option("--sizes", help="Extra core sizes: CSV kind,od_mm,id_mm,height_mm (kind ring or sleeve) and/or width_mm,thickness_mm,length_mm,hole_mm,hole_spacing_mm (kind two-hole).", rich_help_panel=SEARCH_PANEL)] = None,
    builtin_sizes: Annotated[bool, typer.Option("--builtin-sizes/--no-builtin-sizes", help="Include the built-in generic ring and sleeve sizes.", rich_help_panel=SEARCH_PANEL)] = True,
    max_cores: Annotated[int, typer.Option("--max-cores", help="Stack 1 to this many identical cores.", min=1, max=50, rich_help_panel=SEARCH_PANEL)] = DEFAULT_MAX_CORES,
    max_turns: Annotated[Optional[int], typer.Option("--max-turns", help="Cap on turns (besides one layer through the hole).", min=1, rich_help_panel=SEARCH_PANEL)] = None,
    min_bend_radius: Annotated[
        Optional[str],
        typer.Option("--min-bend-radius", help=f"Smallest bend of a cable round the core for 2+ turns: a length (8mm) or a multiple of its OD (2x); default {DEFAULT_BEND_RATIO:g}x for cable, none for wire.", rich_help_panel=SEARCH_PANEL),
    ] = None,
    cp_factor: Annotated[float, typer.Option("--cp-factor", help="Scale the single-layer Cp estimate (e.g. 2 for a pessimistic self-resonance).", min=0.0, rich_help_panel=SEARCH_PANEL)] = 1.0,
    points: o.Points = 201,
    top: Annotated[int, typer.Option("--top", help="How many distinct designs to show.", min=1, max=100)] = 5,
    power: Annotated[Optional[str], typer.Option("--power", help="Transmitter power, e.g. 100W: enables the heat check.", rich_help_panel=HEAT_PANEL)] = None,
    cm_voltage: Annotated[Optional[str], typer.Option("--cm-voltage", help="Common-mode RMS voltage across the choke at --power, e.g. 150V.", rich_help_panel=HEAT_PANEL)] = None,
    cm_current: Annotated[Optional[str], typer.Option("--cm-current", help="Common-mode RMS current through the choke at --power, e.g. 0.3A.", rich_help_panel=HEAT_PANEL)] = None,
    feed_impedance: Annotated[Optional[str], typer.Option("--feed-impedance", help="Feed-point impedance: worst case puts all of √(P·Z) across the choke, e.g. 300.", rich_help_panel=HEAT_PANEL)] = None,
    max_rise: Annotated[float, typer.Option("--max-rise", help=f"Drop designs whose core warms more than this, K (default {DEFAULT_MAX_RISE_K:g}, common practice).", rich_help_panel=HEAT_PANEL)] = DEFAULT_MAX_RISE_K,
    winding_angle: o.WindingAngle = None,
    keep_hot: Annotated[bool, typer.Option("--keep-hot", help="List designs above --max-rise too, flagged, instead of dropping them.", rich_help_panel=HEAT_PANEL)] = False,
    json_out: o.JsonOut = None,
    plot_out: o.PlotOut = None,
    html_out: o.HtmlOut = None,
) -> None:
    """Find the chokes worth winding: material × core size × stacked cores × turns that meet a target.

    Example: cmcheck size --band 1.8-30MHz --target-r 1k --cable-od 5mm --power 100W --feed-impedance 300

    Every candidate is evaluated with the same model as `cmcheck predict`; the minimum R (or
    |Z|) over the band must reach the target. Designs are ranked by total core volume, then
    turns, then margin. Exit status 1 when no design meets the target (the closest one, the
    reason and what to relax are shown).
    """
    if band is None:
        raise o.missing("--band")
    b = o.band_from_option(band)
    if target_r is not None and target_z is not None:
        raise DesignError("give either --target-r or --target-z, not both")
    criterion = "impedance" if target_z is not None else "resistance"
    target = o.parse_option("--target-z", parse_resistance, target_z) if target_z is not None else (
        o.parse_option("--target-r", parse_resistance, target_r) if target_r is not None else DEFAULT_TARGET_OHM)
    if not target > 0:
        raise DesignError(f"{'--target-z' if target_z is not None else '--target-r'} must be positive, got {target:g} Ω")
    conductor = _conductor(wire, insulation, cable_od)
    mats = search_materials(None if materials is None else _material_names(materials))
    for m in mats:
        check_band(m, b)
    table_ = builtin_ring_sizes() if builtin_sizes else None
    if sizes is not None:
        user = load_ring_sizes(sizes)
        table_ = user if table_ is None else table_ + user
    if table_ is None:
        raise DesignError("--no-builtin-sizes needs --sizes FILE")
    drive_opts = {"cm_voltage_v": o.parse_option("--cm-voltage", parse_voltage, cm_voltage),
                  "cm_current_a": o.parse_option("--cm-current", parse_current, cm_current),
                  "feed_impedance_ohm": o.parse_option("--feed-impedance", parse_resistance, feed_impedance)}
    p = o.parse_option("--power", parse_power, power)
    drive = None
    if p is not None and not any(v is not None for v in drive_opts.values()):
        warnings.warn("--power alone gives no heat estimate: add --cm-voltage, --cm-current or --feed-impedance", CmcheckWarning)
    elif p is None and any(v is not None for v in drive_opts.values()):
        raise DesignError("--cm-voltage, --cm-current and --feed-impedance need --power (the power they apply at)")
    elif p is not None:
        drive = Drive(p, **drive_opts)
    spec = SizeSpec(
        band=b, conductor=conductor, materials=mats, sizes=table_, target_ohm=target, criterion=criterion,
        max_cores=max_cores, max_turns=max_turns, min_bend_radius=_bend(min_bend_radius, conductor),
        cp_factor=cp_factor, points=points, top=top, drive=drive, max_rise_k=max_rise, keep_hot=keep_hot,
        winding_angle=None if winding_angle is None else math.radians(winding_angle),
    )
    check_outputs([json_out, plot_out, html_out], _material_files(materials) + ([sizes] if sizes else []))
    bar = _LazyProgress()
    try:
        result = run_size(spec, progress=bar)
    finally:
        bar.close()
    report = size_report(result, name=option_phrase, cp_hint="`cmcheck predict --cp`", safety=p is not None,
                         sizes_hint="add your own with --sizes FILE, or search only them with --no-builtin-sizes",
                         check=_predict_command(result.designs[0], band, conductor) if result.designs else None)
    # Files first: a closed pipe (| head) must not cost the user the JSON or the plot.
    write_report(report, json=json_out, plot=plot_out, html=html_out)
    show(report)
    if not result.ok:
        raise typer.Exit(EXIT_LIMIT_FAILED)


@app.command("compare")
@o.with_design_file
@o.with_design_options(material=False)
def compare_command(
    materials: MaterialsOpt = None,
    design_options: dict = None,
    band: o.BandOpt = "1-100MHz",
    points: o.Points = 201,
    line_r_max: Annotated[str, typer.Option("--line-r-max", help="Largest resistance of the line's unknown common-mode impedance (common practice default).")] = f"{DEFAULT_LINE_R_MAX:g}",
    line_x_max: Annotated[str, typer.Option("--line-x-max", help="Largest |reactance| of the line's unknown common-mode impedance (common practice default).")] = f"{DEFAULT_LINE_X_MAX:g}",
    json_out: o.JsonOut = None,
    plot_out: o.PlotOut = None,
    html_out: o.HtmlOut = None,
) -> None:
    """Rank materials on one core and winding over a band.

    Example: cmcheck compare --materials nizn-800,mnzn-1500,nizn-250 --od 61mm --id 35.55mm
    --height 12.7mm --turns 8 --cable-od 5mm --band 3.5-30MHz

    Per material: min and mean R in the band, where R peaks, the fraction of the band where
    R > |X|, and the worst-case common-mode current reduction when the line's own impedance
    is only known to lie within R ≤ --line-r-max, |X| ≤ --line-x-max (negative: the choke can
    make the current larger). Ranked by that worst case.
    """
    names = _material_names(materials)
    designs = [o.design_from_options(material=name, **design_options) for name in names]
    b = o.band_from_option(band)
    for d in designs:
        check_band(d.material, b)
    r_max = o.parse_option("--line-r-max", parse_resistance, line_r_max)
    x_max = o.parse_option("--line-x-max", parse_resistance, line_x_max)
    check_outputs([json_out, plot_out, html_out], _material_files(materials))
    result = compare_designs(designs, b, points=points, line_r_max=r_max, line_x_max=x_max)
    report = comparison_report(result, generic=designs[0].describe().rsplit(",", 1)[0])
    # Files first: a closed pipe (| head) must not cost the user the JSON or the plot.
    write_report(report, json=json_out, plot=plot_out, html=html_out)
    show(report)
