"""Options shared by several commands, and turning their text into library objects.

Commands declare parameters with these ``Annotated`` types so that the same option reads
the same way everywhere (``predict``, ``extract --vs-model``, ``compare``...).
"""

from __future__ import annotations

import contextvars
import functools
import inspect
import math
from pathlib import Path
from typing import Annotated, Any, Callable, Optional

import typer

from ..model.choke import ChokeDesign
from ..model.cores import Core, FactorCore, RingCore
from ..model.two_hole import TwoHoleCore
from ..designfile import DesignFile, load_design
from ..errors import CmcheckError, UnitError
from ..model.materials import get_material
from ..reporting.files import check_outputs
from ..units import Band, parse_band, parse_capacitance, parse_length, parse_wire_diameter
from ..model.winding import Cable, Winding, Wire

DESIGN_PANEL = "Design (core, winding)"
OUTPUT_PANEL = "Outputs"

Material = Annotated[
    Optional[str],
    typer.Option(
        "--material", "-m",
        help="Built-in material name (see `cmcheck materials`) or a CSV file "
        "frequency_hz,mu_prime,mu_double_prime.",
        rich_help_panel=DESIGN_PANEL,
    ),
]
OD = Annotated[Optional[str], typer.Option("--od", help="Ring outside diameter with unit, e.g. 61mm, 2.4in.", rich_help_panel=DESIGN_PANEL)]
ID = Annotated[Optional[str], typer.Option("--id", help="Ring inside diameter with unit, e.g. 35.6mm.", rich_help_panel=DESIGN_PANEL)]
Height = Annotated[
    Optional[str],
    typer.Option("--height", help="Height of one ring (or length of a sleeve) with unit, e.g. 12.7mm.", rich_help_panel=DESIGN_PANEL),
]
Cores = Annotated[int, typer.Option("--cores", help="Number of identical rings stacked (heights add).", rich_help_panel=DESIGN_PANEL)]
CoreFactor = Annotated[
    Optional[str],
    typer.Option(
        "--core-factor",
        help="Core factor Σl/A in 1/m, for shapes given only by it (two-hole cores); "
        "replaces --od/--id/--height. Use --window for the hole diameter.",
        rich_help_panel=DESIGN_PANEL,
    ),
]
Window = Annotated[
    Optional[str],
    typer.Option("--window", help="Hole diameter of a --core-factor core, with unit, for the fit check.", rich_help_panel=DESIGN_PANEL),
]
Width = Annotated[Optional[str], typer.Option("--width", help="Two-hole core: width across both holes, with unit.", rich_help_panel=DESIGN_PANEL)]
Thickness = Annotated[Optional[str], typer.Option("--thickness", help="Two-hole core: thickness, with unit.", rich_help_panel=DESIGN_PANEL)]
Length = Annotated[Optional[str], typer.Option("--length", help="Two-hole core: length along the holes, with unit.", rich_help_panel=DESIGN_PANEL)]
Hole = Annotated[Optional[str], typer.Option("--hole", help="Two-hole core: hole diameter, with unit.", rich_help_panel=DESIGN_PANEL)]
HoleSpacing = Annotated[Optional[str], typer.Option("--hole-spacing", help="Two-hole core: centre distance of the holes, with unit.", rich_help_panel=DESIGN_PANEL)]
Turns = Annotated[Optional[int], typer.Option("--turns", "-n", help="Number of turns (passes through the hole).", rich_help_panel=DESIGN_PANEL)]
WireOpt = Annotated[
    Optional[str],
    typer.Option("--wire", help="Wire: a gauge (18awg) or bare diameter (1.0mm); 1mm when neither --wire nor --cable-od is given.", rich_help_panel=DESIGN_PANEL),
]
Insulation = Annotated[
    str,
    typer.Option("--insulation", help="Radial insulation thickness of --wire, with unit (0 = bare; enamel ≈ 0.03mm).", rich_help_panel=DESIGN_PANEL),
]
CableOD = Annotated[
    Optional[str],
    typer.Option("--cable-od", help="Wind a cable of this outside diameter (feedline choke), e.g. 5mm.", rich_help_panel=DESIGN_PANEL),
]
Cp = Annotated[
    Optional[str],
    typer.Option(
        "--cp",
        help="Stray capacitance across the winding, e.g. 2.8pF; default: estimated from the geometry, the conductor and the material's electrical class (energy method; measure it where you can); 0 turns it off.",
        rich_help_panel=DESIGN_PANEL,
    ),
]
WindingAngle = Annotated[
    Optional[float],
    typer.Option(
        "--winding-angle",
        help="Angle the turns span round the core, first to last, in degrees, for the Cp estimate (default 300, or close-wound where the turns fill more).",
        min=1.0, max=359.0, rich_help_panel=DESIGN_PANEL,
    ),
]
BandOpt = Annotated[
    str,
    typer.Option("--band", "-b", help="Frequency band(s): 1-100MHz, 3.5MHz-30MHz, or 1.8-2MHz,3.5-4MHz."),
]
Points = Annotated[int, typer.Option("--points", help="Log-spaced frequency points across the band.", min=2, max=100000)]
JsonOut = Annotated[Optional[Path], typer.Option("--json", help="Write the results as JSON to this file.", rich_help_panel=OUTPUT_PANEL)]
CsvOut = Annotated[Optional[Path], typer.Option("--csv", help="Write the curve as CSV to this file.", rich_help_panel=OUTPUT_PANEL)]
PlotOut = Annotated[Optional[Path], typer.Option("--plot", help="Plot to this file; .png, .svg or .pdf by its extension.", rich_help_panel=OUTPUT_PANEL)]
#: One self-contained offline HTML report (tables, plots, inputs, cautions). A command offers it
#: with a parameter ``html_out: o.HtmlOut = None``, lists it in ``check_outputs`` and passes
#: ``html=html_out`` to ``write_report``.
HtmlOut = Annotated[Optional[Path], typer.Option("--html", help="Write a self-contained offline HTML report (tables, plots, inputs) to this file.", rich_help_panel=OUTPUT_PANEL)]


#: The design options, declared once: (parameter, annotated type, default), in help order.
#: Commands take them through :func:`with_design_options`.
DESIGN_OPTIONS: tuple[tuple[str, Any, Any], ...] = (
    ("material", Material, None),
    ("od", OD, None),
    ("id", ID, None),
    ("height", Height, None),
    ("cores", Cores, 1),
    ("core_factor", CoreFactor, None),
    ("window", Window, None),
    ("width", Width, None),
    ("thickness", Thickness, None),
    ("length", Length, None),
    ("hole", Hole, None),
    ("hole_spacing", HoleSpacing, None),
    ("turns", Turns, None),
    ("wire", WireOpt, None),
    ("insulation", Insulation, "0"),
    ("cable_od", CableOD, None),
    ("cp", Cp, None),
    ("winding_angle", WindingAngle, None),
)


def with_design_options(*, material: bool = True) -> Callable:
    """Give a command the design options in place of its ``design_options`` parameter.

    The command receives them as one dict, ``design_options`` (parameter → text), ready for
    :func:`design_from_options`. ``material=False`` leaves ``--material`` out (``compare``
    takes ``--materials`` instead).
    """
    declared = [d for d in DESIGN_OPTIONS if material or d[0] != "material"]
    names = [name for name, _, _ in declared]

    def decorate(func: Callable) -> Callable:
        sig = inspect.signature(func, eval_str=True)
        params = []
        for p in sig.parameters.values():
            if p.name == "design_options":
                params += [inspect.Parameter(n, inspect.Parameter.POSITIONAL_OR_KEYWORD, default=d, annotation=t)
                           for n, t, d in declared]
            else:
                params.append(p)

        @functools.wraps(func)
        def command(**kwargs):
            design = {n: kwargs.pop(n) for n in names}
            return func(**kwargs, design_options=design)

        del command.__wrapped__  # typer must read the signature below, not the original's
        command.__signature__ = sig.replace(parameters=params)
        command.__annotations__ = {p.name: p.annotation for p in params}
        return command

    return decorate


def parse_option(option: str, parser: Callable[[str], Any], text: str | None):
    """``parser(text)`` (None stays None); a unit error names the option it came from."""
    if text is None:
        return None
    try:
        return parser(text)
    except UnitError as exc:
        raise UnitError(f"{option}: {exc}") from None


def band_from_option(text: str, option: str = "--band") -> Band:
    """Parse a ``--band`` value, naming the option in the error."""
    return parse_option(option, parse_band, text)


def _length(option: str, text: str, *, awg: bool = False) -> float:
    return parse_option(option, parse_wire_diameter if awg else parse_length, text)


def design_from_options(
    *,
    material: str | None,
    od: str | None,
    id: str | None,
    height: str | None,
    cores: int = 1,
    core_factor: str | None = None,
    window: str | None = None,
    turns: int | None,
    wire: str | None = None,
    insulation: str = "0",
    cable_od: str | None = None,
    cp: str | None = None,
    width: str | None = None,
    thickness: str | None = None,
    length: str | None = None,
    hole: str | None = None,
    hole_spacing: str | None = None,
    winding_angle: float | None = None,
) -> ChokeDesign:
    """Build a :class:`~cmcheck.model.choke.ChokeDesign` from option text; errors name the option."""
    if not material:
        raise missing("--material", alternative="a built-in name or a CSV file")
    if turns is None:
        raise missing("--turns")
    core = core_from_options(od=od, id=id, height=height, cores=cores, core_factor=core_factor, window=window,
                             width=width, thickness=thickness, length=length, hole=hole, hole_spacing=hole_spacing)
    if wire is not None and cable_od is not None:
        raise CmcheckError("give either --wire or --cable-od, not both")
    if cable_od is not None:
        conductor = Cable(_length("--cable-od", cable_od))
    else:
        conductor = Wire(_length("--wire", wire or "1mm", awg=True), _length("--insulation", insulation))
    cap = None
    if cp is not None:
        try:
            cap = parse_capacitance(cp)
        except UnitError as exc:
            raise UnitError(f"--cp: {exc}") from None
    winding = Winding(turns, conductor, cap)
    angle = None if winding_angle is None else math.radians(winding_angle)
    return ChokeDesign(core, get_material(material), winding, winding_angle=angle)


def core_from_options(*, od=None, id=None, height=None, cores: int = 1, core_factor=None, window=None,
                      width=None, thickness=None, length=None, hole=None, hole_spacing=None) -> Core:
    """The core from option text (ring, two-hole or core factor); errors name the option."""
    two_hole = (("--width", width), ("--thickness", thickness), ("--length", length), ("--hole", hole),
                ("--hole-spacing", hole_spacing))
    if any(v is not None for _, v in two_hole):
        if any(v is not None for v in (od, id, height, core_factor, window)):
            raise CmcheckError("give either the two-hole core (--width/--thickness/--length/--hole/--hole-spacing) "
                               "or --od/--id/--height or --core-factor, not both")
        absent = [n for n, v in two_hole if v is None]
        if absent:
            raise missing(absent, "the two-hole core")
        core: Core = TwoHoleCore(*(_length(n, v) for n, v in two_hole), cores)
    elif core_factor is not None:
        if any(v is not None for v in (od, id, height)):
            raise CmcheckError("give either --core-factor or --od/--id/--height, not both")
        try:
            c1 = float(core_factor)
        except ValueError:
            raise UnitError(f"--core-factor: {core_factor!r} is not a number in 1/m") from None
        core = FactorCore(c1, _length("--window", window) if window else None).stacked(cores)
    else:
        if window is not None:
            raise CmcheckError("--window describes a --core-factor core; a ring's hole is its --id")
        absent = [n for n, v in (("--od", od), ("--id", id), ("--height", height)) if v is None]
        if absent:
            raise missing(absent, "the core", "or --core-factor")
        core = RingCore(_length("--od", od), _length("--id", id), _length("--height", height), cores)
    return core


#: The option that sets each defining dimension of a core (:meth:`~cmcheck.model.cores.Core.dimensions`).
CORE_OPTIONS = {
    "od_m": "--od", "id_m": "--id", "height_m": "--height",
    "width_m": "--width", "thickness_m": "--thickness", "length_m": "--length", "hole_diameter_m": "--hole",
    "hole_spacing_m": "--hole-spacing", "core_factor_per_m": "--core-factor", "window_diameter_m": "--window",
}


def core_options(core: Core) -> str:
    """The options that describe ``core`` to ``predict``, e.g. ``--od 61mm --id 35.6mm --height 12.7mm --cores 2``."""
    parts = []
    for key, value in core.dimensions().items():
        if value is None or key not in CORE_OPTIONS:
            continue
        parts.append(f"{CORE_OPTIONS[key]} {value:.5g}" if key.endswith("_per_m") else f"{CORE_OPTIONS[key]} {value * 1e3:.4g}mm")
    return " ".join(parts + [f"--cores {core.stack}"])


# --- Design files (cmcheck.designfile): file values under command-line options -------------

#: Command parameter → design-file key. A command that takes ``--design`` fills each of its
#: parameters listed here from the file unless the option was given on the command line.
DESIGN_FILE_KEYS: dict[str, str] = {
    "material": "material", "band": "band", "topology": "topology",
    **{n: f"core.{n}" for n in ("od", "id", "height", "cores", "core_factor", "window", "width", "thickness",
                                "length", "hole", "hole_spacing")},
    **{n: f"winding.{n}" for n in ("turns", "wire", "insulation", "cable_od", "cp")},
    "target_r": "target.resistance_ohm", "target_z": "target.impedance_ohm", "max_swr": "target.swr",
    "load": "load.resistance_ohm",
}
_CORE = (("od", "id", "height"), ("core_factor", "window"), ("width", "thickness", "length", "hole", "hole_spacing"))
_CONDUCTOR = (("wire", "insulation"), ("cable_od",))
_TARGET = (("target_r",), ("target_z",))
#: Each group of parameters → the groups it excludes.
_ALTERNATIVES = {g: tuple(o for o in family if o != g) for family in (_CORE, _CONDUCTOR, _TARGET) for g in family}
#: The option of each design-file key's parameter, for "missing" messages.
_OPTION_OF_KEY = {key: "--" + name.replace("_", "-") for name, key in DESIGN_FILE_KEYS.items()}

_active_design: contextvars.ContextVar[DesignFile | None] = contextvars.ContextVar("cmcheck_design_file", default=None)
_from_file: contextvars.ContextVar[frozenset] = contextvars.ContextVar("cmcheck_from_file", default=frozenset())

DesignOpt = Annotated[
    Optional[Path],
    typer.Option("--design", help="Design file (TOML: [core], [winding], material, band, [target]...); "
                 "options given on the command line override it.", rich_help_panel=DESIGN_PANEL),
]


def missing(options, what: str = "", alternative: str = "") -> CmcheckError:
    """The error for a required value given neither on the command line nor in a ``--design`` file.

    ``options`` is one option or a list; with a design file the message names its keys too.
    """
    opts = [options] if isinstance(options, str) else list(options)
    design = _active_design.get()
    if design is not None:
        keys = [k for o in opts for k, opt in _OPTION_OF_KEY.items() if opt == o]
        alt = f" ({alternative})" if alternative else ""
        return CmcheckError(f"{design.path}: {', '.join(keys)} missing{' for ' + what if what else ''}: "
                            f"add it to the file or give {', '.join(opts)}{alt}")
    if what:
        return CmcheckError(f"{what} needs {', '.join(opts)}{f' ({alternative})' if alternative else ''}")
    return CmcheckError(f"{opts[0]} is required{f' ({alternative})' if alternative else ''}")


def from_design_file(name: str) -> bool:
    """Whether the current command took parameter ``name`` from its ``--design`` file."""
    return name in _from_file.get()


def merge_design(design: DesignFile, values: dict[str, Any], given: Callable[[str], bool]) -> tuple[dict, set]:
    """``values`` (parameter → option value) with the file's values filled in where
    ``given(parameter)`` is False; returns the merged dict and the names taken from the file."""
    merged, taken = dict(values), set()
    # Alternatives: an option typed for one (--wire) sets aside the file's others (cable_od).
    shadowed = {other for group in _ALTERNATIVES for n in group if n in values and given(n)
                for other_group in _ALTERNATIVES.get(group, ()) for other in other_group}
    for name in values:
        key = DESIGN_FILE_KEYS.get(name)
        if key is not None and key in design and name not in shadowed and not given(name):
            merged[name] = design.option_text(key)
            taken.add(name)
    return merged, taken


def _given_on_command_line(name: str) -> bool:
    import importlib

    # typer runs on click or on its own vendored copy of it: ask the one typer uses.
    base = next(c for c in typer.Context.__mro__[1:] if c.__name__ == "Context")
    ctx = importlib.import_module(base.__module__.rsplit(".", 1)[0] + ".globals").get_current_context(silent=True)
    if ctx is None:
        return False
    source = ctx.get_parameter_source(name)
    return source is not None and source.name not in ("DEFAULT", "DEFAULT_MAP")


#: Output parameters whose names do not end in ``_out``.
_OUTPUT_PARAMETERS = frozenset({"save_material", "spice"})


def with_design_file(func: Callable) -> Callable:
    """Give a command ``--design FILE``: its values fill the command's parameters listed in
    :data:`DESIGN_FILE_KEYS` unless given on the command line (decorate below ``@app.command()``
    and above ``with_design_options``)."""
    sig = inspect.signature(func, eval_str=True)
    param = inspect.Parameter("design_file", inspect.Parameter.KEYWORD_ONLY, default=None, annotation=DesignOpt)
    params = [p for p in sig.parameters.values()]
    params.append(param.replace(kind=inspect.Parameter.POSITIONAL_OR_KEYWORD))

    @functools.wraps(func)
    def command(**kwargs):
        path = kwargs.pop("design_file", None)
        if path is None:
            return func(**kwargs)
        design = load_design(path)
        # The design file is an input: no output of the command may overwrite it.
        check_outputs([v for k, v in kwargs.items() if k in _OUTPUT_PARAMETERS or k.endswith("_out")], [path])
        kwargs, taken = merge_design(design, kwargs, _given_on_command_line)
        tokens = (_active_design.set(design), _from_file.set(frozenset(taken)))
        try:
            return func(**kwargs)
        finally:
            _from_file.reset(tokens[1])
            _active_design.reset(tokens[0])

    if hasattr(command, "__wrapped__"):
        del command.__wrapped__
    command.__signature__ = sig.replace(parameters=params)
    command.__annotations__ = {p.name: p.annotation for p in params}
    return command
