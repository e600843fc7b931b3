"""``cmcheck transformer``: match, loss, balance and (at power) voltages and heat of a
transmission-line or flux-coupled transformer built from core, material and winding."""

from __future__ import annotations

import math
import re
from pathlib import Path
from typing import Annotated, Optional

import typer

from ..errors import CmcheckError, TransformerError, UnitError
from ..reporting.files import check_outputs
from ..reporting.transformer_report import transformer_report, write_transformer_outputs
from ..transformer import FluxCoupled, IdealLine, LineWinding, Load, analyse, design_network, get_topology
from ..transformer.characterise import characterise_from_files
from ..transformer.topologies import TOPOLOGIES, Topology
from ..units import parse_capacitance, parse_length, parse_power, parse_resistance
from ..model.winding import Wire, check_fit, Winding
from . import options as o
from .app import app
from .render import show

PANEL = "Transformer"
C0 = 299_792_458.0
DEFAULT_MAX_SWR = 2.0

_FLUX = re.compile(r"^flux-1:(\d+(?:\.\d+)?)$")


def topology_from_option(text: str) -> Topology:
    """A built-in name, ``guanella-4:1`` on ``one`` core, ``flux-1:49``, or a TOML file."""
    m = _FLUX.match(text.strip())
    if m:
        ratio = float(m.group(1))
        if not ratio > 0:
            raise TransformerError(f"--topology {text!r}: the ratio must be positive")
        base = TOPOLOGIES["flux-1:N"]
        return Topology(f"flux-1:{m.group(1)}", ratio, "flux", description=f"flux-coupled 1:{m.group(1)} impedance ratio "
                        f"(turns 1:{math.sqrt(ratio):.3g}) on one core", outputs=base.outputs)
    if text == "flux-1:N":
        raise TransformerError("--topology flux-1:N needs the ratio, e.g. flux-1:49")
    try:
        return get_topology(text)
    except TransformerError as exc:
        raise TransformerError(f"--topology: {exc}") from None


def parse_impedance(text: str, option: str) -> complex:
    """``200``, ``150+j40``, ``150-j40``, ``1k`` → complex Ω."""
    t = text.replace(" ", "").replace("Ω", "").replace("ohm", "")
    m = re.match(r"^([^+\-j]+(?:[eE][+-]?\d+)?)([+-])j(.+)$", t)
    try:
        if m:
            x = parse_resistance(m.group(3))
            return complex(parse_resistance(m.group(1)), x if m.group(2) == "+" else -x)
        return complex(parse_resistance(t))
    except UnitError:
        raise UnitError(f"{option} {text!r}: expected an impedance such as 200, 150+j40 or 1k") from None


def _load(text: str | None, default: float, load_l, load_c, legs) -> Load:
    leg_p = leg_n = None
    if legs is not None:
        parts = legs.split(",")
        if len(parts) != 2:
            raise UnitError(f"--leg-to-ground {legs!r}: give two impedances, ZP,ZN")
        leg_p, leg_n = (parse_impedance(p, "--leg-to-ground") for p in parts)
        for v in (leg_p, leg_n):
            if v.real < 0 or v == 0:
                raise UnitError(f"--leg-to-ground {legs!r}: each leg must be non-zero with R ≥ 0")
    lead_l = o.parse_option("--load-l", lambda s: parse_quantity_h(s), load_l) or 0.0
    shunt_c = o.parse_option("--load-c", parse_capacitance, load_c) or 0.0
    if text is not None and text.lower().endswith((".s1p", ".s2p", ".s3p", ".s4p", ".snp")) or (text and Path(text).is_file()):
        if lead_l or shunt_c:
            raise CmcheckError("--load-l and --load-c describe a resistor, not a measured --load file")
        try:
            return Load.touchstone(text, leg_p, leg_n)
        except TransformerError as exc:
            raise TransformerError(f"--load {exc}") from None
    z = complex(default) if text is None else parse_impedance(text, "--load")
    if not (z.real > 0):
        raise UnitError(f"--load {text!r}: the load's resistance must be positive")
    if z.imag == 0:
        return Load.resistor(z.real, lead_l, shunt_c, leg_p, leg_n)
    if lead_l or shunt_c:
        raise CmcheckError("--load-l and --load-c describe a resistor: give --load as a resistance")
    return Load.complex(z, leg_p, leg_n)


_PREFIX = {"p": 1e-12, "n": 1e-9, "u": 1e-6, "µ": 1e-6, "m": 1e-3, "": 1.0}


def parse_quantity_h(text: str) -> float:
    """Inductance text (``10nH``, ``0.1uH``, ``1e-8``) → H."""
    m = re.fullmatch(r"\s*([0-9.eE+-]+)\s*([pnuµm]?)H?\s*", text)
    try:
        v = float(m.group(1)) * _PREFIX[m.group(2)]
    except (AttributeError, ValueError):
        raise UnitError(f"{text!r} is not an inductance such as 10nH") from None
    if not (math.isfinite(v) and v >= 0):
        raise UnitError(f"{text!r}: the inductance must be ≥ 0")
    return v


def _positive(option: str, text: str | None, parser):
    v = o.parse_option(option, parser, text)
    if v is not None and not (math.isfinite(v) and v > 0):
        raise UnitError(f"{option} {text!r}: must be positive")
    return v


def build_transformer(topology: Topology, design, line_z0=None, line_length=None, velocity_factor=None,
                      open_file=None, short_file=None):
    """The winding spec the topology needs, and the characterisation (or None)."""
    core, material, winding = design.core, design.material, design.winding
    wire = winding.conductor
    if not isinstance(wire, Wire):
        raise CmcheckError("a transformer is wound with --wire (and --insulation), not --cable-od")
    if topology.kind == "flux":
        if any(v is not None for v in (line_z0, line_length, velocity_factor)):
            raise CmcheckError("--line-z0, --line-length and --velocity-factor describe line transformers, not flux-1:N")
        ns = int(round(math.sqrt(topology.ratio) * winding.turns))
        if core.window_diameter is not None:
            check_fit(core.window_diameter, Winding(winding.turns + ns, wire))
        if open_file is not None:
            ch = characterise_from_files(open_file, short_file, winding.turns, topology.ratio, core)
            return ch.transformer, ch.to_dict()
        if not hasattr(core, "od"):
            raise CmcheckError("a flux-coupled design from geometry needs a ring core (--od/--id/--height)")
        return FluxCoupled.from_geometry(core, material, winding.turns, topology.ratio, wire), None
    if open_file is not None:
        raise CmcheckError("--open/--short characterise flux-coupled (flux-1:N) designs")
    if core.window_diameter is not None:
        # every conductor of a line passes through the hole on each turn
        check_fit(core.window_diameter, Winding(winding.turns * len(topology.lines[0].end1), wire))
    lw = LineWinding(core, material, winding.turns, wire, topology.conductors, cp=winding.cp or 0.0)
    if all(v is None for v in (line_z0, line_length, velocity_factor)):
        return lw, None
    import numpy as np

    f_mid = np.array([1e7])
    zc, gl = lw.constants(f_mid)
    length = line_length if line_length is not None else lw.length
    vf = velocity_factor if velocity_factor is not None else float(2 * np.pi * f_mid[0] * lw.length / C0 / gl[0].imag)
    if not 0 < vf <= 1:
        raise UnitError(f"--velocity-factor {vf:g}: must be above 0 and at most 1")
    return IdealLine(line_z0 if line_z0 is not None else float(abs(zc[0])), length / (vf * C0), lw.z_winding,
                     topology.conductors), None


@app.command()
@o.with_design_file
@o.with_design_options()
def transformer(
    design_options: dict = None,
    topology: Annotated[str, typer.Option("--topology", "-t", help=f"{', '.join(t for t in TOPOLOGIES if t != 'flux-1:N')}, flux-1:N with the ratio (flux-1:49), or a TOML file. --turns is the primary's for flux-1:N.", rich_help_panel=PANEL)] = "guanella-1:1",
    band: o.BandOpt = "1.8-30MHz",
    points: o.Points = 201,
    z0: Annotated[str, typer.Option("--z0", help="Source (reference) impedance in Ω.", rich_help_panel=PANEL)] = "50",
    load: Annotated[Optional[str], typer.Option("--load", help="Load: 200, 150+j40, or a one-port FILE.s1p (interpolated); default z0 × ratio.", rich_help_panel=PANEL)] = None,
    load_l: Annotated[Optional[str], typer.Option("--load-l", help="Lead inductance of the load resistor, e.g. 10nH.", rich_help_panel=PANEL)] = None,
    load_c: Annotated[Optional[str], typer.Option("--load-c", help="Shunt capacitance across the load resistor, e.g. 0.5pF.", rich_help_panel=PANEL)] = None,
    leg_to_ground: Annotated[Optional[str], typer.Option("--leg-to-ground", help="Impedances from each output terminal to ground, ZP,ZN (asymmetric antenna), e.g. 1k,2k.", rich_help_panel=PANEL)] = None,
    line_z0: Annotated[Optional[str], typer.Option("--line-z0", help="Line impedance of the winding in Ω instead of the default wire spacing's.", rich_help_panel=PANEL)] = None,
    line_length: Annotated[Optional[str], typer.Option("--line-length", help="Line length with unit instead of turns × turn path.", rich_help_panel=PANEL)] = None,
    velocity_factor: Annotated[Optional[float], typer.Option("--velocity-factor", help="Velocity factor of the line (0–1] instead of the enamel estimate.", rich_help_panel=PANEL)] = None,
    power: Annotated[Optional[str], typer.Option("--power", help="Available source power, e.g. 100W: voltages, flux and heat.", rich_help_panel=PANEL)] = None,
    max_swr: Annotated[float, typer.Option("--max-swr", help="SWR limit of the usable band.", rich_help_panel=PANEL)] = DEFAULT_MAX_SWR,
    open_file: Annotated[Optional[Path], typer.Option("--open", help="flux-1:N: primary sweep (.s1p) with the secondary open, to characterise the built unit.", rich_help_panel=PANEL)] = None,
    short_file: Annotated[Optional[Path], typer.Option("--short", help="flux-1:N: primary sweep with the secondary shorted.", rich_help_panel=PANEL)] = None,
    rows: Annotated[int, typer.Option("--rows", help="Rows in the printed table (the files get every point).", min=2)] = 16,
    json_out: o.JsonOut = None,
    csv_out: o.CsvOut = None,
    plot_out: o.PlotOut = None,
    touchstone_out: Annotated[Optional[Path], typer.Option("--touchstone", help="Write the transformer as an N-port (.s2p unun, .s3p balun) for a circuit simulator.", rich_help_panel=o.OUTPUT_PANEL)] = None,
    html_out: o.HtmlOut = None,
) -> None:
    """Analyse a transformer or balun: input impedance, SWR, losses, balance; heat at power.

    Example: cmcheck transformer --topology guanella-1:1 --material nizn-250 --od 36mm
    --id 23mm --height 15mm --turns 10 --wire 1mm --insulation 0.03mm --band 1.8-30MHz

    The low end of the band is set by the choking (or magnetising) reactance against the load,
    the high end by the line's length and Z0 (or the leakage inductance). Estimates only:
    verify by measurement.
    """
    topo = topology_from_option(topology)
    if (open_file is None) != (short_file is None):
        raise CmcheckError("--open and --short go together: the characterisation needs both sweeps")
    design = o.design_from_options(**design_options)
    b = o.band_from_option(band)
    zs = _positive("--z0", z0, parse_resistance)
    lz0 = _positive("--line-z0", line_z0, parse_resistance)
    llen = _positive("--line-length", line_length, parse_length)
    p = _positive("--power", power, parse_power)
    if not (math.isfinite(max_swr) and max_swr > 1):
        raise UnitError(f"--max-swr {max_swr:g}: must be above 1")
    ld = _load(load, zs * topo.ratio, load_l, load_c, leg_to_ground)
    if leg_to_ground is not None and not topo.balanced:
        raise CmcheckError(f"--leg-to-ground applies to baluns; {topo.name} has one output to ground")
    spec, ch = build_transformer(topo, design, lz0, llen, velocity_factor, open_file, short_file)
    inputs = [x for x in (load, open_file, short_file, design_options["material"], topology) if x and Path(x).is_file()]
    check_outputs([json_out, csv_out, plot_out, touchstone_out, html_out], inputs)
    f = b.grid(points)
    result = analyse(topo, f, spec, ld, source_impedance=zs, power_w=p or 1.0)
    cores = 1 if topo.kind == "flux" else len(topo.lines)
    desc = f"{topo.name}: {design.describe()}" + (f" ({cores} cores)" if cores > 1 else "")
    report = transformer_report(result, topology=topo, transformer=spec, load=ld, band=b, z0=zs, max_swr=max_swr,
                                description=desc, surface_area_m2=getattr(design.core, "surface_area", None),
                                power_given=p is not None, rows=rows, characterisation=ch)
    network = design_network(topo, f, spec, zs) if touchstone_out else None
    write_transformer_outputs(report, network, json=json_out, csv=csv_out, plot=plot_out, touchstone=touchstone_out,
                              html=html_out)
    show(report)


def run_transformer_check(paths, topology: str, max_swr: float | None, band: str | None, z0: str | None,
                          vs_model: bool, design_options: dict, rows: int, json_out, csv_out, plot_out) -> int:
    """``extract FILE --transformer TOPOLOGY``: SWR of built units against ``max_swr``; exit 1 on a failure."""
    from ..measurement.touchstone import read_touchstone
    from ..measurement.transformer_check import check_transformer
    from ..reporting.outputs import write_report
    from ..reporting.transformer_check_report import transformer_check_report

    if not paths:
        raise CmcheckError("--transformer checks one or more Touchstone files")
    topo = topology_from_option(topology)
    limit = DEFAULT_MAX_SWR if max_swr is None else max_swr
    if not (math.isfinite(limit) and limit > 1):
        raise UnitError(f"--max-swr {limit:g}: must be above 1")
    b = o.band_from_option(band) if band else None
    z0_value = o.parse_option("--z0", parse_resistance, z0)
    design = o.design_from_options(**design_options) if vs_model else None
    inputs = list(paths) + [m for m in [design_options.get("material")] if m and Path(m).is_file()]
    check_outputs([json_out, csv_out, plot_out], inputs)
    checks = [check_transformer(read_touchstone(p, z0=z0_value), p, limit, b) for p in paths]
    model, label = {}, ""
    if design is not None:
        spec, _ = build_transformer(topo, design)
        for c in checks:
            if c.kind != "loaded":
                raise CmcheckError(f"{c.path}: --vs-model compares a one-port into the load resistor")
            ld = Load.resistor(c.z0 * topo.ratio)
            r = analyse(topo, c.frequency_hz, spec, ld, source_impedance=c.z0)
            model[c.path] = (r.zin, r.swr)
            label = f"{topo.name}, {design.describe()}, load {ld.label}"
    report = transformer_check_report(checks, b, rows, model, label)
    write_report(report, json=json_out, csv={"long": csv_out}, plot=plot_out)
    show(report)
    return 0 if all(c.passed for c in checks) else 1
