"""Design files: a choke or transformer described once, in TOML, for every command.

Schema (every table and key optional in the file; what a command needs and the command line
does not give is an error naming the key)::

    material = "nizn-800"          # built-in name, or a material CSV (relative to this file)
    band = "1.8-30MHz"             # band text, as on the command line
    topology = "guanella-4:1"      # transformers: built-in name or topology TOML (relative)

    [core]                         # a ring: od, id, height; or core_factor (+ window);
    od = "61mm"                    #   or a two-hole core: width, thickness, length, hole,
    id = "35.6mm"                  #   hole_spacing
    height = "12.7mm"
    cores = 2                      # whole number of identical stacked pieces

    [winding]
    turns = 8                      # whole number
    cable_od = "5mm"               # or wire = "18awg" / "1mm" (+ insulation = "0.03mm")
    cp = "2.8pF"                   # optional measured stray capacitance

    [target]                       # limits: any of
    resistance_ohm = "1k"          # R ≥ this over the band
    impedance_ohm = 1500           # |Z| ≥ this over the band
    swr = 1.5                      # transformers: SWR ≤ this over the band

    [load]                         # transformers
    resistance_ohm = 200

Values with a unit are either text with the unit, exactly as on the command line
(``"61mm"``, ``"2.4in"``, ``"18awg"``, ``"2.8pF"``, ``"1k"``), or plain numbers in SI units
(m, F, Ω; ``od = 0.061``). Counts (``cores``, ``turns``) are TOML integers; ``core_factor``
is a number in 1/m; ``swr`` a number ≥ 1. Unknown tables or keys, values of the wrong kind
and unparsable units are errors naming the file and the key (``design.toml: core.od: …``).
Files are read through :func:`cmcheck.inputs.read_capped` (at most 1 MiB).
"""

from __future__ import annotations

import math
import os
import tomllib
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any, Callable, Mapping

from .errors import CmcheckError, UnitError
from .inputs import read_capped
from .units import Band, parse_band, parse_capacitance, parse_length, parse_resistance, parse_wire_diameter

__all__ = ["DesignFile", "DesignFileError", "KEYS", "Key", "format_design", "load_design", "parse_design"]

#: Largest design file read [bytes]; a design is a few hundred bytes.
MAX_BYTES = 1 << 20


class DesignFileError(CmcheckError, ValueError):
    """A design file is unreadable, not TOML, or has an unknown, missing or malformed key."""


@dataclass(frozen=True)
class Key:
    """One key of the design file: where it lives, what it holds and its SI unit."""

    name: str  # "core.od" (table.key) or "material" (top level)
    kind: str  # "length", "wire", "capacitance", "resistance", "count", "number", "ratio", "band", "text", "path"
    unit: str = ""
    parameter: str = ""  # the library parameter it sets (names table)


_KINDS: dict[str, tuple[str, Callable[[str], float] | None]] = {
    "length": ("m", parse_length),
    "wire": ("m", parse_wire_diameter),
    "capacitance": ("F", parse_capacitance),
    "resistance": ("Ω", parse_resistance),
}

#: Every key a design file may hold.
KEYS: tuple[Key, ...] = (
    Key("material", "path", "", "material"),
    Key("band", "band", "Hz", "band"),
    Key("topology", "path", "", "topology"),
    Key("core.od", "length", "m", "od"),
    Key("core.id", "length", "m", "id"),
    Key("core.height", "length", "m", "height"),
    Key("core.cores", "count", "", "cores"),
    Key("core.core_factor", "number", "1/m", "core_factor"),
    Key("core.window", "length", "m", "window"),
    Key("core.width", "length", "m", "width"),
    Key("core.thickness", "length", "m", "thickness"),
    Key("core.length", "length", "m", "length"),
    Key("core.hole", "length", "m", "hole"),
    Key("core.hole_spacing", "length", "m", "spacing"),
    Key("winding.turns", "count", "", "turns"),
    Key("winding.wire", "wire", "m", "wire"),
    Key("winding.insulation", "length", "m", "insulation"),
    Key("winding.cable_od", "length", "m", "cable_od"),
    Key("winding.cp", "capacitance", "F", "cp"),
    Key("target.resistance_ohm", "resistance", "Ω", "target_r"),
    Key("target.impedance_ohm", "resistance", "Ω", "target_z"),
    Key("target.swr", "ratio", "", "max_swr"),
    Key("load.resistance_ohm", "resistance", "Ω", "load"),
)
_BY_NAME = {k.name: k for k in KEYS}
_TABLES = sorted({k.name.split(".")[0] for k in KEYS if "." in k.name})


@dataclass(frozen=True)
class DesignFile:
    """A parsed design file.

    Attributes
    ----------
    path : str
        The file it came from.
    values : mapping of str to object
        Key name (``"core.od"``) → value in SI units: float [m, F, Ω], int (counts),
        :class:`~cmcheck.units.Band` (``band``), str (``material``, ``topology``: a path
        relative to the file is resolved against the file's folder).
    texts : mapping of str to str
        Key name → the value as written, for messages and as command-line text.
    """

    path: str
    values: Mapping[str, Any] = field(default_factory=dict)
    texts: Mapping[str, str] = field(default_factory=dict)

    def get(self, key: str, default: Any = None) -> Any:
        """The SI value of ``key`` (``"winding.turns"``), or ``default`` when the file lacks it."""
        if key not in _BY_NAME:
            raise KeyError(key)
        return self.values.get(key, default)

    def __contains__(self, key: str) -> bool:
        return key in self.values

    def option_text(self, key: str) -> str | int:
        """The value as the command line would take it: counts as int, the rest as text with a unit."""
        v = self.values[key]
        k = _BY_NAME[key]
        if k.kind == "count" or k.kind == "ratio":
            return v  # whole numbers and plain ratios (swr) are typed options, not text
        if k.kind in _KINDS and key not in self.texts:
            return f"{v!r}{_KINDS[k.kind][0].replace('Ω', '')}"
        return self.texts.get(key, str(v))


def load_design(path: str | os.PathLike) -> DesignFile:
    """Read and check a design file (see the module docstring for the schema).

    Parameters
    ----------
    path : path-like
        The TOML file; read through :func:`cmcheck.inputs.read_capped`.

    Returns
    -------
    DesignFile

    Raises
    ------
    DesignFileError
        Unreadable, larger than 1 MiB, not UTF-8, not TOML, or an unknown key, a value of the
        wrong kind or unit (the message names the file and the key).
    """
    data = read_capped(path, str(path), DesignFileError, cap=MAX_BYTES)
    return parse_design(data, str(path), base=Path(path).parent)


def parse_design(data: bytes | str, source: str = "design", *, base: str | os.PathLike | None = None) -> DesignFile:
    """Parse design-file text (see :func:`load_design`); ``base`` resolves relative paths."""
    if isinstance(data, bytes):
        try:
            data = data.decode("utf-8")
        except UnicodeDecodeError as exc:
            raise DesignFileError(f"{source}: not UTF-8 text (byte {exc.start})") from None
    try:
        doc = tomllib.loads(data)
    except tomllib.TOMLDecodeError as exc:
        raise DesignFileError(f"{source}: not valid TOML ({exc})") from None
    except (RecursionError, MemoryError):
        raise DesignFileError(f"{source}: not valid TOML (nested too deeply)") from None
    values: dict[str, Any] = {}
    texts: dict[str, str] = {}
    for top, item in doc.items():
        if top in _TABLES:
            if not isinstance(item, dict):
                raise DesignFileError(f"{source}: {top} must be a table ([{top}]), got {_kind_of(item)}")
            for key, value in item.items():
                _one(source, f"{top}.{key}", value, values, texts, base)
        else:
            _one(source, top, value=item, values=values, texts=texts, base=base)
    return DesignFile(source, values, texts)


def _kind_of(value: Any) -> str:
    return {dict: "a table", list: "a list", str: "text", bool: "true/false", int: "a whole number",
            float: "a number"}.get(type(value), type(value).__name__)


def _one(source: str, name: str, value: Any, values: dict, texts: dict, base) -> None:
    key = _BY_NAME.get(name)
    if key is None:
        table = name.split(".")[0] if "." in name else None
        known = sorted(k.name.split(".", 1)[1] for k in KEYS if k.name.startswith(f"{table}.")) if table else \
            [k.name for k in KEYS if "." not in k.name] + [f"[{t}]" for t in _TABLES]
        raise DesignFileError(f"{source}: unknown key {name} (known: {', '.join(known)})")
    where = f"{source}: {name}"
    if key.kind == "count":
        if not isinstance(value, int) or isinstance(value, bool) or value < 1:
            raise DesignFileError(f"{where} must be a whole number ≥ 1, got {_show(value)}")
        values[name] = value
        return
    if key.kind in ("number", "ratio"):
        v = _number(where, value)
        low_ok = v >= 1 if key.kind == "ratio" else v > 0
        if not (math.isfinite(v) and low_ok):
            raise DesignFileError(f"{where} must be a number {'≥ 1' if key.kind == 'ratio' else '> 0'}"
                                  f"{' in ' + key.unit if key.unit else ''}, got {_show(value)}")
        values[name] = v
        return
    if key.kind in ("band", "path"):
        if not isinstance(value, str) or not value.strip():
            raise DesignFileError(f"{where} must be text, e.g. {_EXAMPLES[key.kind]}, got {_show(value)}")
        texts[name] = value
        if key.kind == "band":
            try:
                values[name] = parse_band(value)
            except UnitError as exc:
                raise DesignFileError(f"{where}: {exc}") from None
        else:
            local = Path(base) / value if base is not None else None
            values[name] = str(local) if local is not None and not Path(value).is_absolute() and local.is_file() else value
            if values[name] != value:
                texts[name] = values[name]
        return
    unit, parser = _KINDS[key.kind]
    if isinstance(value, bool) or not isinstance(value, (int, float, str)):
        raise DesignFileError(f"{where} must be text with a unit (e.g. {_EXAMPLES[key.kind]}) or a number in {unit}, "
                              f"got {_show(value)}")
    if isinstance(value, str):
        try:
            v = parser(value)
        except UnitError as exc:
            raise DesignFileError(f"{where}: {exc}") from None
        texts[name] = value
    else:
        v = float(value)
        if not math.isfinite(v) or v < 0 or (v == 0 and key.kind in ("length", "wire", "resistance") and
                                            name != "winding.insulation"):
            raise DesignFileError(f"{where} must be a positive number in {unit}, got {_show(value)}")
    values[name] = v


_EXAMPLES = {"length": '"61mm"', "wire": '"18awg"', "capacitance": '"2.8pF"', "resistance": '"1k"',
             "band": '"1.8-30MHz"', "path": '"nizn-800"'}


def _number(where: str, value: Any) -> float:
    if isinstance(value, bool):
        raise DesignFileError(f"{where} must be a number, got {_show(value)}")
    if isinstance(value, (int, float)):
        return float(value)
    if isinstance(value, str):
        try:
            return float(value)
        except ValueError:
            pass
    raise DesignFileError(f"{where} must be a number, got {_show(value)}")


def _show(value: Any) -> str:
    text = repr(value)
    return text if len(text) <= 40 else text[:37] + "..."


def format_design(values: Mapping[str, Any], comments: tuple[str, ...] = ()) -> str:
    """TOML text of a design: ``values`` maps key names (``"core.od"``) to text with units
    (``"61mm"``), whole numbers or SI numbers; ``comments`` go first as ``#`` lines."""
    for name in values:
        if name not in _BY_NAME:
            raise DesignFileError(f"unknown key {name}")

    def toml(v: Any) -> str:
        if isinstance(v, str):
            return '"' + v.replace("\\", "\\\\").replace('"', '\\"') + '"'
        return repr(v)

    out = [f"# {c}" for c in comments]
    out += [f"{k} = {toml(v)}" for k, v in values.items() if "." not in k]
    for table in _TABLES:
        items = [(k.split(".", 1)[1], v) for k, v in values.items() if k.startswith(table + ".")]
        if items:
            out += ["", f"[{table}]"] + [f"{k} = {toml(v)}" for k, v in items]
    return "\n".join(out) + "\n"
