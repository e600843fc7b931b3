"""``cmcheck size`` (find chokes that meet a target) and ``cmcheck compare`` (rank materials)."""

from __future__ import annotations

import time
import warnings
from pathlib import Path
from typing import Annotated, Optional

import numpy as np
import typer

from ..design.compare import DEFAULT_LINE_R_MAX, DEFAULT_LINE_X_MAX, compare_materials, comparison_curves
from ..errors import CmcheckWarning, DesignError, UnitError
from ..model.materials import builtin_materials, get_material
from ..reporting.files import SAFETY_NOTES, check_outputs, staged_outputs, write_json
from ..reporting.plots import plot_curves
from ..design.catalogue import builtin_ring_sizes, load_ring_sizes
from ..design.search import DEFAULT_BEND_RATIO, DEFAULT_MAX_CORES, DEFAULT_TARGET_OHM, SizeResult, SizeSpec, format_rise, size as run_size
from ..design.heat import DEFAULT_MAX_RISE_K, Drive
from ..units import format_quantity, parse_current, parse_length, parse_power, parse_resistance, parse_voltage, parse_wire_diameter
from ..model.winding import Cable, Wire
from . import options as o
from .app import EXIT_LIMIT_FAILED, app
from .render import console, err_console, print_notes, table

SEARCH_PANEL = "Design space"
HEAT_PANEL = "Power and heat"

MaterialsOpt = Annotated[
    Optional[str],
    typer.Option(
        "--materials",
        help="Comma-separated built-in material names and/or CSV files (frequency_hz,mu_prime,mu_double_prime); "
        "default: every built-in generic material.",
        rich_help_panel=SEARCH_PANEL,
    ),
]


def _parse(option: str, parser, text):
    if text is None:
        return None
    try:
        return parser(text)
    except UnitError as exc:
        raise UnitError(f"{option}: {exc}") from None


def _materials(text: str | None):
    if text is None:
        return list(builtin_materials().values())
    names = [t.strip() for t in text.split(",") if t.strip()]
    if not names:
        raise DesignError("--materials: name at least one material")
    return [get_material(n) for n in names]


def _material_files(text: str | None) -> list[str]:
    return [t.strip() for t in (text or "").split(",") if t.strip() and Path(t.strip()).is_file()]


def _conductor(wire: str | None, insulation: str, cable_od: str | None):
    if wire is not None and cable_od is not None:
        raise DesignError("give either --wire or --cable-od, not both")
    if cable_od is not None:
        return Cable(_parse("--cable-od", parse_length, cable_od))
    return Wire(_parse("--wire", parse_wire_diameter, wire or "1mm"), _parse("--insulation", parse_length, insulation))


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
    return _parse("--min-bend-radius", parse_length, text)


def _pct(margin: float) -> str:
    return f"+{(margin - 1) * 100:.0f} %" if margin >= 1 else f"{(margin - 1) * 100:.0f} %"


def _dt(k: float) -> str:
    # Past a few hundred kelvin the number only means "destroyed"; keep the table readable.
    return f"{k:.0f}" if k < 300 else ">300"


def _w(p: float) -> str:
    return f"{p:.3g}"


def _core_text(design) -> str:
    c = design.core
    return f"{c.od * 1e3:.4g}×{c.id * 1e3:.4g}×{c.height * 1e3:.4g}"


def _predict_command(d, band, cond) -> str:
    c = d.design.core
    w = d.design.winding
    conductor = (f"--cable-od {cond.od * 1e3:.4g}mm" if isinstance(cond, Cable)
                 else f"--wire {cond.diameter * 1e3:.4g}mm" + (f" --insulation {cond.insulation * 1e3:.4g}mm" if cond.insulation else ""))
    cp = f" --cp {d.design.cp * 1e12:.3g}pF" if d.design.cp_source == "given" else ""
    return (f"cmcheck predict -m {d.design.material.name} --od {c.od * 1e3:.4g}mm --id {c.id * 1e3:.4g}mm "
            f"--height {c.height * 1e3:.4g}mm --cores {c.stack} --turns {w.turns} {conductor}{cp} --band {band}")


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


def _render_size(result: SizeResult, band_text: str) -> None:
    s = result.spec
    cond = s.conductor
    what = f"{cond.od * 1e3:.3g} mm cable" if isinstance(cond, Cable) else cond.describe()
    bend = f" (bend radius ≥ {s.bend_limit * 1e3:.3g} mm for 2+ turns)" if s.bend_limit > 0 else ""
    console.print(f"[bold]Sizing {s.metric_name} ≥ {format_quantity(s.target_ohm, 'Ω')} over {s.band} with {what}{bend}[/bold]")
    sp = result.space
    console.print(
        f"searched {result.candidates_searched:,} candidates ({sp['materials']} materials × {sp['sizes']} sizes × "
        f"1–{sp['max_cores']} cores × turns that fit, up to {sp['max_turns']}) in {result.elapsed_s:.2f} s: "
        f"{result.meeting_target:,} meet the target"
        + ((f", {result.too_hot:,} of them warmer than {s.max_rise_k:g} K" if result.too_hot
            else f", none warmer than {s.max_rise_k:g} K") if s.drive and result.meeting_target else "")
    )
    if s.drive is not None:
        console.print(f"heat: {s.drive.describe()}")
    designs = result.designs
    if designs:
        console.print("cost: total core volume, then turns, then margin; cheapest distinct designs:")
        length = "cable [m]" if isinstance(cond, Cable) else "wire [m]"
        cols = ["#", "material", "n × OD×ID×H [mm]", "turns", f"min {s.metric_name} [Ω]", "at", "margin", "SRF", length]
        t = table(*cols)
        t.columns[2].justify = "left"
        # Dimensions and frequencies must not be cut; let headers wrap on narrow terminals instead.
        for i in (1, 2, 5, 7):
            t.columns[i].no_wrap = True
        # One space between columns keeps the table within 80 columns.
        t.padding = (0, 1, 0, 0)
        for i, d in enumerate(designs, 1):
            v = d.min_resistance_ohm if s.criterion == "resistance" else d.min_impedance_ohm
            hz = d.min_resistance_hz if s.criterion == "resistance" else d.min_impedance_hz
            core = f"{d.core.stack} × {_core_text(d.design)}" + (" sleeve" if d.kind == "sleeve" else "")
            row = [str(i), d.design.material.name, core, str(d.design.winding.turns), f"{v:,.0f}",
                   format_quantity(hz, "Hz", 3), _pct(d.margin),
                   format_quantity(d.self_resonance_hz, "Hz", 3) if d.self_resonance_hz else "–",
                   f"{d.design.conductor_length:.2f}"]
            t.add_row(*row)
        console.print(t)
        if s.drive is not None:
            console.print(f"heat at the worst frequency in the band (limit ΔT ≤ {s.max_rise_k:g} K):")
            h_t = table(*("#", "P [W]", "at", "ΔT [K]", "B peak [mT]", "at "))
            for i, d in enumerate(designs, 1):
                h = d.heat
                h_t.add_row(str(i), _w(h["dissipation_w"]), format_quantity(h["dissipation_hz"], "Hz", 3),
                            _dt(h["temperature_rise_k"]) + (" too hot" if h["too_hot"] else ""),
                            f"{h['peak_flux_density_t'] * 1e3:.2g}", format_quantity(h["peak_flux_hz"], "Hz", 3))
            console.print(h_t)
        console.print(f"check #1 in full: {_predict_command(designs[0], band_text, cond)}")
        notes = [
            "SRF uses the single-layer Cp estimate; real windings and leads often add more: measure, then "
            "`cmcheck predict --cp`. Conductor length is for the turns only: add the leads.",
        ]
        if s.drive is not None:
            notes.append("ΔT from McLyman's still-air surface formula (empirical; a fan or an enclosure changes it).")
        print_notes(notes)
        return
    diag = result.diagnosis
    console.print(f"[bold]no design meets {s.metric_name} ≥ {format_quantity(s.target_ohm, 'Ω')} over {s.band}[/bold]")
    c = result.closest
    if c is not None:
        v = c.min_resistance_ohm if s.criterion == "resistance" else c.min_impedance_ohm
        hz = c.min_resistance_hz if s.criterion == "resistance" else c.min_impedance_hz
        line = (f"closest: {c.design.describe()}: min {s.metric_name} {v:,.0f} Ω at {format_quantity(hz, 'Hz', 3)} "
                f"({c.margin * 100:.0f} % of target), SRF {format_quantity(c.self_resonance_hz, 'Hz', 3) if c.self_resonance_hz else 'none found'}")
        if c.heat is not None:
            line += (f", {_w(c.heat['dissipation_w'])} W → ΔT {format_rise(c.heat['temperature_rise_k'])}, "
                     f"B {c.heat['peak_flux_density_t'] * 1e3:.2g} mT")
        console.print(line)
    if diag is not None:
        console.print(f"reason: {diag.reason}")
        for fact in diag.facts[1:]:
            console.print(f"  {fact}")
        console.print("to relax:")
        for r in diag.relax:
            console.print(f"  - {r}")


@app.command("size")
def size_command(
    band: o.BandOpt,
    target_r: Annotated[Optional[str], typer.Option("--target-r", help=f"Minimum resistance R over the band, e.g. 1k (default {DEFAULT_TARGET_OHM:g} Ω).")] = None,
    target_z: Annotated[Optional[str], typer.Option("--target-z", help="Instead of --target-r: minimum |Z| over the band.")] = None,
    cable_od: o.CableOD = None,
    wire: o.WireOpt = None,
    insulation: o.Insulation = "0",
    materials: MaterialsOpt = None,
    sizes: Annotated[Optional[Path], typer.Option("--sizes", help="Extra core sizes: CSV kind,od_mm,id_mm,height_mm (kind ring or sleeve).", rich_help_panel=SEARCH_PANEL)] = None,
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
    keep_hot: Annotated[bool, typer.Option("--keep-hot", help="List designs above --max-rise too, flagged, instead of dropping them.", rich_help_panel=HEAT_PANEL)] = False,
    json_out: o.JsonOut = None,
    plot_out: o.PlotOut = None,
) -> None:
    """Find the chokes worth winding: material × core size × stacked cores × turns that meet a target.

    Example: cmcheck size --band 1.8-30MHz --target-r 1k --cable-od 5mm --power 100W --feed-impedance 300

    Every candidate is evaluated with the same model as `cmcheck predict`; the minimum R (or
    |Z|) over the band must reach the target. Designs are ranked by total core volume, then
    turns, then margin. Exit status 1 when no design meets the target (the closest one, the
    reason and what to relax are shown).
    """
    b = o.band_from_option(band)
    if target_r is not None and target_z is not None:
        raise DesignError("give either --target-r or --target-z, not both")
    criterion = "impedance" if target_z is not None else "resistance"
    target = _parse("--target-z", parse_resistance, target_z) if target_z is not None else (
        _parse("--target-r", parse_resistance, target_r) if target_r is not None else DEFAULT_TARGET_OHM)
    if not target > 0:
        raise DesignError(f"{'--target-z' if target_z is not None else '--target-r'} must be positive, got {target:g} Ω")
    conductor = _conductor(wire, insulation, cable_od)
    mats = _materials(materials)
    table_ = builtin_ring_sizes() if builtin_sizes else None
    if sizes is not None:
        user = load_ring_sizes(sizes)
        table_ = user if table_ is None else table_ + user
    if table_ is None:
        raise DesignError("--no-builtin-sizes needs --sizes FILE")
    drive_opts = {"cm_voltage_v": _parse("--cm-voltage", parse_voltage, cm_voltage),
                  "cm_current_a": _parse("--cm-current", parse_current, cm_current),
                  "feed_impedance_ohm": _parse("--feed-impedance", parse_resistance, feed_impedance)}
    p = _parse("--power", parse_power, power)
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
    )
    check_outputs([json_out, plot_out], _material_files(materials) + ([sizes] if sizes else []))
    bar = _LazyProgress()
    try:
        result = run_size(spec, progress=bar)
    finally:
        bar.close()
    # Files first: a closed pipe (| head) must not cost the user the JSON or the plot.
    with staged_outputs():
        if json_out:
            write_json(json_out, result.to_dict())
        if plot_out:
            shown = result.designs or ((result.closest,) if result.closest else ())
            curves = [_context_curve(d.design, b, f"#{i} {d.design.material.name} {d.core.stack}×({_core_text(d.design)}) N={d.design.winding.turns}")
                      for i, d in enumerate(shown, 1)]
            if curves:
                plot_curves(plot_out, curves, band=b, quantities=("R",), target_ohm=target,
                            title=f"{'designs' if result.designs else 'closest design'} for {spec.metric_name} ≥ {target:g} Ω, {b}")
    _render_size(result, band)
    if p is not None:
        print_notes(SAFETY_NOTES)
    if not result.ok:
        raise typer.Exit(EXIT_LIMIT_FAILED)


def _context_curve(design, band, label: str):
    lo, hi = band.low / 2.0, band.high * 2.0
    rng = design.material.range_hz
    if rng is not None:
        lo, hi = max(lo, rng[0]), min(hi, rng[1])
    f = np.unique(np.concatenate([np.geomspace(lo, hi, 301), [e for seg in band.segments for e in seg]]))
    return design.curve(f, label=label)


@app.command("compare")
def compare_command(
    materials: MaterialsOpt = None,
    od: o.OD = None,
    id: o.ID = None,
    height: o.Height = None,
    cores: o.Cores = 1,
    core_factor: o.CoreFactor = None,
    window: o.Window = None,
    turns: o.Turns = None,
    wire: o.WireOpt = None,
    insulation: o.Insulation = "0",
    cable_od: o.CableOD = None,
    cp: o.Cp = None,
    band: o.BandOpt = "1-100MHz",
    points: o.Points = 201,
    line_r_max: Annotated[str, typer.Option("--line-r-max", help="Largest resistance of the line's unknown common-mode impedance (common practice default).")] = f"{DEFAULT_LINE_R_MAX:g}",
    line_x_max: Annotated[str, typer.Option("--line-x-max", help="Largest |reactance| of the line's unknown common-mode impedance (common practice default).")] = f"{DEFAULT_LINE_X_MAX:g}",
    json_out: o.JsonOut = None,
    plot_out: o.PlotOut = None,
) -> None:
    """Rank materials on one core and winding over a band.

    Example: cmcheck compare --materials nizn-800,mnzn-1500,nizn-250 --od 61mm --id 35.55mm
    --height 12.7mm --turns 8 --cable-od 5mm --band 3.5-30MHz

    Per material: min and mean R in the band, where R peaks, the fraction of the band where
    R > |X|, and the worst-case common-mode current reduction when the line's own impedance
    is only known to lie within R ≤ --line-r-max, |X| ≤ --line-x-max (negative: the choke can
    make the current larger). Ranked by that worst case.
    """
    mats = _materials(materials)
    first = materials.split(",")[0].strip() if materials else mats[0].name
    design = o.design_from_options(
        material=first,
        od=od, id=id, height=height, cores=cores, core_factor=core_factor, window=window, turns=turns,
        wire=wire, insulation=insulation, cable_od=cable_od, cp=cp,
    )
    b = o.band_from_option(band)
    r_max = _parse("--line-r-max", parse_resistance, line_r_max)
    x_max = _parse("--line-x-max", parse_resistance, line_x_max)
    check_outputs([json_out, plot_out], _material_files(materials))
    result = compare_materials(mats, design.core, design.winding, b, points=points, line_r_max=r_max, line_x_max=x_max)
    generic = design.describe().rsplit(",", 1)[0]
    # Files first: a closed pipe (| head) must not cost the user the JSON or the plot.
    with staged_outputs():
        if json_out:
            write_json(json_out, result.to_dict())
        if plot_out:
            plot_curves(plot_out, comparison_curves(result), band=b, quantities=("R",),
                        title=f"R(f): {generic}")
    console.print(f"[bold]{generic}, over {b}[/bold]")
    console.print(f"line's own common-mode impedance: 0 ≤ R ≤ {r_max:g} Ω, |X| ≤ {x_max:g} Ω; ranked by the worst case")
    t = table(*("#", "material", "min R [Ω]", "at", "mean R [Ω]", "peak R at", "R>|X| [%]",
                                     "worst cut [dB]", "at "))
    for i, s in enumerate(result.scores, 1):
        t.add_row(str(i), s.name, f"{s.min_resistance_ohm:,.0f}", format_quantity(s.min_resistance_hz, "Hz", 3),
                  f"{s.mean_resistance_ohm:,.0f}", format_quantity(s.peak_resistance_hz, "Hz", 3)
                  + ("" if b.contains(s.peak_resistance_hz) else " (out)"),
                  f"{100 * s.resistive_fraction:.0f}", f"{s.worst_case_reduction_db:+.1f}",
                  format_quantity(s.worst_case_hz, "Hz", 3))
    console.print(t)
    worst = result.scores[-1]
    notes = ["worst cut: the least the common-mode current falls, min of 20·log10|Zline + Zchoke|/|Zline| over the line region; "
             "negative means the choke can resonate with a capacitive line and raise the current"]
    if worst.worst_case_reduction_db < 0:
        zl = worst.worst_case_line_ohm
        notes.append(f"e.g. {worst.name} at {format_quantity(worst.worst_case_hz, 'Hz', 3)} with Zline = "
                     f"{abs(zl.real) if abs(zl.real) < 0.5 else zl.real:.0f} {'+' if zl.imag >= 0 else '−'} j{abs(zl.imag):.0f} Ω: "
                     f"{worst.worst_case_reduction_db:+.1f} dB")
    notes.append(SAFETY_NOTES[0])
    print_notes(notes)
