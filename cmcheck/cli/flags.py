"""The one table from library parameters to command-line options.

The library names parameters in its errors and remedies (``max_cores must be …``,
``CmcheckError.parameter == "max_cores"``); the command line says ``--max-cores`` instead.
:func:`option_message` rewrites an error with this table, :func:`option_phrase` words a
sizing remedy. DEVELOPERS.md's names table is generated from :data:`FLAGS`
(:func:`names_table`; a test keeps the two equal).
"""

from __future__ import annotations

import re
from typing import NamedTuple

from ..design.diagnosis import Remedy
from ..designfile import KEYS as DESIGN_KEYS

__all__ = ["FLAGS", "Flag", "names_table", "option_for", "option_message", "option_phrase"]


class Flag(NamedTuple):
    """A library parameter and the option, JSON key and unit that stand for it."""

    parameter: str
    option: str
    json_key: str = ""
    unit: str = ""


_TABLE = (
    # Design of one choke (predict, extract --vs-model, compare)
    Flag("material", "--material", "design.material", ""),
    Flag("od", "--od", "design.od_m", "m"),
    Flag("id", "--id", "design.id_m", "m"),
    Flag("height", "--height", "design.height_m", "m"),
    Flag("cores", "--cores", "design.cores", ""),
    Flag("core_factor", "--core-factor", "design.core_factor_per_m", "1/m"),
    Flag("window", "--window", "design.window_diameter_m", "m"),
    Flag("width", "--width", "design.width_m", "m"),
    Flag("thickness", "--thickness", "design.thickness_m", "m"),
    Flag("length", "--length", "design.length_m", "m"),
    Flag("hole", "--hole", "design.hole_diameter_m", "m"),
    Flag("hole_spacing", "--hole-spacing", "design.hole_spacing_m", "m"),
    Flag("turns", "--turns", "design.turns", ""),
    Flag("wire", "--wire", "design.wire_diameter_m", "m"),
    Flag("insulation", "--insulation", "design.insulation_m", "m"),
    Flag("cable_od", "--cable-od", "design.cable_od_m", "m"),
    Flag("cp", "--cp", "design.cp_f", "F"),
    Flag("winding_angle", "--winding-angle", "design.cp_parts_f.winding_angle_rad", "rad (option: degrees)"),
    Flag("band", "--band", "band_hz", "Hz"),
    Flag("points", "--points", "", ""),
    # Sizing (size)
    Flag("materials", "--materials", "materials", ""),
    Flag("sizes", "--sizes", "", ""),
    Flag("target_ohm", "--target-r/--target-z", "target_ohm", "Ω"),
    Flag("criterion", "--target-r/--target-z", "criterion", ""),
    Flag("max_cores", "--max-cores", "design_space.max_cores", ""),
    Flag("max_turns", "--max-turns", "design_space.max_turns", ""),
    Flag("min_bend_radius", "--min-bend-radius", "min_bend_radius_m", "m"),
    Flag("cp_factor", "--cp-factor", "cp_factor", ""),
    Flag("top", "--top", "", ""),
    Flag("power_w", "--power", "drive.power_w", "W"),
    Flag("cm_voltage_v", "--cm-voltage", "drive.cm_voltage_v", "V"),
    Flag("cm_current_a", "--cm-current", "drive.cm_current_a", "A"),
    Flag("feed_impedance_ohm", "--feed-impedance", "drive.feed_impedance_ohm", "Ω"),
    Flag("max_rise_k", "--max-rise", "max_rise_k", "K"),
    Flag("keep_hot", "--keep-hot", "", ""),
    # Comparison (compare)
    Flag("line_r_max", "--line-r-max", "line_r_max_ohm", "Ω"),
    Flag("line_x_max", "--line-x-max", "line_x_max_ohm", "Ω"),
    # Measurement (extract)
    Flag("method", "--method", "results[].method", ""),
    Flag("z0", "--z0", "results[].z0_ohm", "Ω"),
    Flag("fixture", "--open/--short", "results[].compensated", ""),
    Flag("legs", "--legs", "", ""),
    Flag("balanced_ports", "--balanced-ports", "", ""),
    Flag("floor_db", "--floor-db", "", "dB"),
    Flag("max_error", "--max-error", "", "1 (option: %)"),
    Flag("cal_error", "--cal-error", "", "1 (option: %)"),
    Flag("jobs", "--jobs", "", ""),
    Flag("check_standard", "--check-standard", "", ""),
    Flag("target_r", "--target-r", "results[].summary", "Ω"),
    Flag("target_z", "--target-z", "results[].summary", "Ω"),
    Flag("target_cmrr_db", "--target-cmrr", "results[].summary", "dB"),
    # Identification (identify, extract --spice)
    Flag("c1", "--od/--id/--height or --core-factor", "c1_per_m", "1/m"),
    Flag("save_material", "--save-material", "", ""),
    Flag("spice", "--spice", "equivalent_circuit", ""),
    # Transformers (transformer, extract --transformer)
    Flag("topology", "--topology", "topology", ""),
    Flag("primary_turns", "--turns", "", ""),
    Flag("impedance_ratio", "--topology", "", ""),
    Flag("source_impedance", "--z0", "z0_ohm", "Ω"),
    Flag("load", "--load", "load", "Ω"),
    Flag("resistance", "--load", "load", "Ω"),
    Flag("lead_inductance", "--load-l", "", "H"),
    Flag("shunt_capacitance", "--load-c", "", "F"),
    Flag("leg_p", "--leg-to-ground", "", "Ω"),
    Flag("leg_n", "--leg-to-ground", "", "Ω"),
    Flag("line_z0", "--line-z0", "", "Ω"),
    Flag("line_length", "--line-length", "", "m"),
    Flag("velocity_factor", "--velocity-factor", "", ""),
    Flag("max_swr", "--max-swr", "summary.max_swr", ""),
)

#: Library parameter name → its row.
FLAGS: dict[str, Flag] = {f.parameter: f for f in _TABLE}


def option_for(parameter: str) -> str:
    """The option that sets ``parameter`` (the parameter itself when the CLI has none)."""
    f = FLAGS.get(parameter)
    return f.option if f is not None else parameter


def option_message(message: str, parameter: str | tuple[str, ...] | None) -> str:
    """Reword a library error about ``parameter`` (one name or several) in option language.

    Each parameter name standing as a word in the message becomes its option; a message that
    does not name it gets the option in front.
    """
    if not parameter:
        return message
    names = (parameter,) if isinstance(parameter, str) else tuple(parameter)
    found = False
    for name in names:
        pattern = re.compile(rf"(?<![\w-]){re.escape(name)}(?![\w-])")
        if pattern.search(message):
            message = pattern.sub(lambda _m, n=name: option_for(n), message)
            found = True
    return message if found else f"{' / '.join(option_for(n) for n in names)}: {message}"


def option_phrase(remedy: Remedy) -> str:
    """The option a sizing remedy changes (``--max-cores``); the target's option follows its criterion."""
    if remedy.parameter == "target_ohm":
        return "--target-r" if remedy.facts.get("criterion") == "resistance" else "--target-z"
    if remedy.parameter == "cp":
        return "`cmcheck predict --cp`"  # a measured Cp is checked on one design, not searched
    return option_for(remedy.parameter)


#: Options of design-file keys whose library parameter has no row above (no error names them).
_FILE_ONLY_OPTIONS = {"width": "--width", "thickness": "--thickness", "length": "--length", "hole": "--hole",
                      "spacing": "--hole-spacing"}


def names_table() -> str:
    """The Markdown table of DEVELOPERS.md: parameter ↔ option ↔ design TOML key ↔ JSON key ↔ unit.

    Design-file keys come from :data:`cmcheck.designfile.KEYS` (matched by library parameter);
    keys whose parameter has no row here follow at the end.
    """
    toml = {k.parameter: k for k in DESIGN_KEYS}
    out = ["| library parameter | CLI option | design TOML key | JSON key | unit |", "| --- | --- | --- | --- | --- |"]
    for f in _TABLE:
        key = f"`{toml[f.parameter].name}`" if f.parameter in toml else "–"
        out.append(f"| `{f.parameter}` | `{f.option}` | {key} | {f'`{f.json_key}`' if f.json_key else '–'} | {f.unit or '–'} |")
    for k in DESIGN_KEYS:
        if k.parameter not in FLAGS:
            option = _FILE_ONLY_OPTIONS.get(k.parameter)
            out.append(f"| `{k.parameter}` | {f'`{option}`' if option else '–'} | `{k.name}` | – | {k.unit or '–'} |")
    return "\n".join(out)
