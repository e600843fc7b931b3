"""An invented scenario worked through the library, for ``cmcheck demo`` and the README.

A hilltop radio club station on 1.8–30 MHz at 100 W (INVENTED: every name, file and number
of it is made up for this demo):

a. ``feedline-choke``: size a feedline choke for its 5 mm coax (:func:`cmcheck.design.search.size`);
b. ``supply-lead``: compare materials on a noisy power-supply lead (:func:`cmcheck.design.compare.compare_designs`);
c. ``balun-4to1``: a Guanella 4:1 balun into a 200 Ω balanced feed (:func:`cmcheck.transformer.analysis.analyse`);
d. ``member-chokes``: a batch of member-wound chokes against a 1 kΩ limit
   (:func:`cmcheck.measurement.qa.evaluate_files` on the demo sweeps);
e. ``drawer-core``: an unmarked core from the club drawer identified from one sweep
   (:func:`cmcheck.identify.identification.identify`).

The sweeps (``data/unit-0N.s2p``, ``data/drawer-core.s1p``) are made by
``examples/make_demo_data.py`` from the invented parameters stated there, with a fixed seed.
Each part gives a :class:`~cmcheck.reporting.results.Report`; the console, JSON, CSV, plots and
HTML page all render those same reports.
"""

from __future__ import annotations

import warnings
from dataclasses import dataclass, field, replace
from pathlib import Path
from typing import Callable

from ..reporting.demo_report import invented
from ..reporting.results import Report

__all__ = ["INVENTED", "Part", "data_dir", "data_files", "demo_reports"]

INVENTED = ("INVENTED EXAMPLE: a made-up hilltop club station on 1.8-30 MHz at 100 W; every name, file and "
            "number in this demo is invented. Measure what you build.")


@dataclass(frozen=True, eq=False)
class Part:
    """One part of the demo: a short name (file stem), what it asks, and its report."""

    name: str
    question: str
    report: Report
    #: Further files of the part: file name → a writer called with the target path, which
    #: writes through :mod:`cmcheck.reporting.files` (atomically, staged with the rest).
    files: dict[str, Callable[[Path], None]] = field(default_factory=dict)


def data_dir() -> Path:
    """The folder of the invented demo sweeps shipped with the package."""
    return Path(__file__).resolve().parent / "data"


def data_files() -> list[Path]:
    """The invented demo sweeps, sorted by name."""
    return sorted(p for p in data_dir().iterdir() if p.suffix in (".s1p", ".s2p"))


def _feedline_choke() -> Part:
    from ..design.catalogue import builtin_ring_sizes
    from ..design.heat import Drive
    from ..design.search import SizeSpec, size
    from ..model.conductors import Cable
    from ..model.materials import builtin_materials
    from ..reporting.size_report import size_report
    from ..units import Band

    from ..designfile import format_design
    from ..reporting.files import atomic_write

    spec = SizeSpec(band=Band.single(1.8e6, 30e6), conductor=Cable(5e-3), materials=list(builtin_materials().values()),
                    sizes=builtin_ring_sizes(), target_ohm=1000.0, top=3,
                    drive=Drive(100.0, feed_impedance_ohm=50.0))
    result = size(spec)
    files = {}
    if result.designs:
        # The first design as a design file, for predict and extract --vs-model.
        d = result.designs[0]
        dims = d.design.core.dimensions()
        values = {"material": d.design.material.name, "band": "1.8-30MHz",
                  **{f"core.{k[:-2]}": f"{v * 1e3:.4g}mm" for k, v in dims.items() if k in ("od_m", "id_m", "height_m")},
                  "core.cores": d.core.stack, "winding.turns": d.design.winding.turns,
                  "winding.cable_od": "5mm", "target.resistance_ohm": "1k"}
        text = format_design(values, (INVENTED, "Design #1 of the demo's feedline-choke sizing."))
        files["feedline-choke.toml"] = lambda p: atomic_write(p, lambda t: Path(t).write_text(text, encoding="utf-8"))
    return Part("feedline-choke", "Which choke on the 5 mm coax gives R ≥ 1 kΩ over 1.8-30 MHz at 100 W?",
                size_report(result, safety=True), files)


def _supply_lead() -> Part:
    from ..design.compare import compare_designs
    from ..model.choke import ChokeDesign
    from ..model.conductors import Cable
    from ..model.cores import RingCore
    from ..model.materials import get_material
    from ..model.winding import Winding
    from ..reporting.compare_report import comparison_report
    from ..units import Band

    core, winding = RingCore(31.5e-3, 19e-3, 12.5e-3), Winding(10, Cable(4e-3))
    designs = [ChokeDesign(core, get_material(m), winding) for m in ("nizn-250", "nizn-800", "mnzn-1500", "mnzn-5000")]
    result = compare_designs(designs, Band.single(1e6, 10e6), points=201)
    return Part("supply-lead", "Which material kills the power-supply noise heard on 160 and 80 m (1-10 MHz)?",
                comparison_report(result, generic=designs[0].describe().rsplit(",", 1)[0]))


def _balun() -> Part:
    from ..model.choke import ChokeDesign
    from ..model.conductors import Wire
    from ..model.cores import RingCore
    from ..model.materials import get_material
    from ..model.winding import Winding
    from ..reporting.transformer_report import transformer_report
    from ..transformer import TOPOLOGIES, LineWinding, Load, analyse
    from ..units import Band

    # What `cmcheck transformer --topology guanella-4:1 --material nizn-250 --od 36mm --id 23mm
    # --height 12.5mm --turns 8 --wire 1.6mm --insulation 0.25mm --load 200 --leg-to-ground 1k,1.5k
    # --power 100W --points 61` computes, through the same library calls and report.
    band = Band.single(1.8e6, 30e6)
    topology = TOPOLOGIES["guanella-4:1"]
    design = ChokeDesign(RingCore(36e-3, 23e-3, 12.5e-3), get_material("nizn-250"), Winding(8, Wire(1.6e-3, 0.25e-3)))
    spec = LineWinding(design.core, design.material, design.winding.turns, design.winding.conductor, topology.conductors)
    # The feed line's legs see the antenna's unequal capacitance to ground: an unbalanced load.
    load = Load.resistor(200.0, leg_p=1000.0, leg_n=1500.0)
    result = analyse(topology, band.grid(61), spec, load, source_impedance=50.0, power_w=100.0)
    description = f"{topology.name}: {design.describe()} ({len(topology.lines)} cores)"
    report = transformer_report(result, topology=topology, transformer=spec, load=load, band=band, z0=50.0,
                                max_swr=2.0, description=description, surface_area_m2=design.core.surface_area,
                                power_given=True, rows=8)
    return Part("balun-4to1", "Will a 4:1 balun match the 200 Ω balanced feed from 50 Ω?", report)


def _member_chokes(files: list[Path]) -> Part:
    from ..measurement.qa import Limits, evaluate_files
    from ..measurement.validity import Accuracy
    from ..reporting.extraction_report import extraction_report
    from ..units import Band

    limits = Limits(band=Band.single(1.8e6, 30e6), target_r=1000.0)
    accuracy = Accuracy()
    results = evaluate_files([str(p) for p in files], limits=limits, accuracy=accuracy)
    return Part("member-chokes", "Do the members' chokes reach R ≥ 1 kΩ over 1.8-30 MHz?",
                extraction_report(results, limits, accuracy))


def _drawer_core(path: Path) -> Part:
    from ..errors import CmcheckWarning
    from ..identify import identify
    from ..measurement.methods import extract
    from ..measurement.touchstone import read_touchstone
    from ..model.cores import RingCore
    from ..reporting.identify_report import identify_report

    # What `cmcheck identify drawer-core.s1p --od 23mm --id 14mm --height 7.5mm --turns 10`
    # computes: the built-in families and candidate materials.
    ring = RingCore(23e-3, 14e-3, 7.5e-3)
    with warnings.catch_warnings():
        # The fit's own doubts are in the report (trusted points, uncertainties).
        warnings.simplefilter("ignore", CmcheckWarning)
        ex = extract(read_touchstone(path))
        ident = identify(ex, c1=ring.c1, turns=10)

    def material(p: Path) -> None:
        from ..model.materials import save_material_csv

        save_material_csv(p, ident.frequency_hz, ident.material_permeability(), [INVENTED, *ident.material_comments()])

    return Part("drawer-core", "What is this unmarked core made of?",
                identify_report(ident, core_text=ring.describe(), method=ex.method, rows=8),
                {"drawer-core-material.csv": material})


def demo_reports(sweeps: Path | str | None = None) -> list[Part]:
    """Run the five parts of the demo; ``sweeps`` is the folder holding the demo sweeps
    (default: the packaged copies; reports name the files as found there)."""
    folder = Path(sweeps) if sweeps is not None else data_dir()
    units = sorted(folder.glob("unit-*.s2p"))
    parts = [_feedline_choke(), _supply_lead(), _balun(), _member_chokes(units), _drawer_core(folder / "drawer-core.s1p")]
    return [replace(p, report=invented(p.report, INVENTED)) for p in parts]
