"""``cmcheck extract``: impedance, validity and balance from Touchstone files, one unit or a batch."""

from __future__ import annotations

import sys
import time
from dataclasses import replace
from pathlib import Path
from typing import Annotated, Optional

import typer

from ..errors import CmcheckError, MeasurementError, UnitError
from ..measurement.methods import METHODS, Accuracy, Fixture
from ..measurement.validity import check_standard_residual
from ..measurement.batch import iter_results, slim
from ..measurement.qa import FileResult, Limits, exit_status, model_error
from ..measurement.touchstone import read_touchstone
from ..reporting.extraction_report import extraction_report
from ..reporting.files import check_outputs
from ..reporting.outputs import write_report
from ..reporting.stream import SummaryStream, summary_row_table
from ..reporting.winding_report import winding_estimate
from ..units import parse_resistance
from . import options as o
from .flags import option_message
from .app import app
from .render import show

MEASURE_PANEL = "Measurement"
#: Rows of a batch table on screen when every row also goes to --summary.
BATCH_TABLE_ROWS = 50
#: Seconds a batch runs before a progress bar appears on stderr (a terminal only).
PROGRESS_AFTER_S = 1.0
LIMIT_PANEL = "Limits (pass/fail)"

EPILOG = """\b
Methods: series  Z = 2·Z0·(1−S21)/S21   (choke between the two port centre pins; 0.5–20 kΩ)
         shunt   Z = Z0·S21/(2·(1−S21))  (from the through line to ground; milliohms)
         reflect Z = Z0·(1+S11)/(1−S11)  (across port 1; best near Z0)
         mixed   3-port balun (1 unbalanced, 2/3 balanced) or 4-port (pairs 1,2 → 3,4):
                 Sds21, Scs21, CMRR = |Sds21/Scs21|, amplitude and phase imbalance.
\b
Common-mode impedance of a balun or feedline choke, series-through: short the two
terminals at each end together (coax: centre to braid; bifilar: both wires), connect
one shorted end to the port 1 centre pin and the other to the port 2 centre pin, join
the two port grounds (a ground plate under the device), keep the leads short, and
sweep S21 with --method series. The result is the impedance the common-mode current
sees. Measure the empty and the shorted fixture too and add --open/--short.
\b
Balun balance with a two-port analyser (--legs A.s2p B.s2p): port 1 on the unbalanced
input, port 2 on one output terminal, a Z0 load on the other; then swap the output
terminals. A gives S21, B gives S31 of the three-port.
\b
A point is valid when its estimated error (from --floor-db and --cal-error) is within
--max-error and it is passive (|S| ≤ 1, R ≥ 0 within that error). With the defaults,
series-through is valid from about 11 Ω to 90 kΩ, reflection from about 2.8 Ω to 890 Ω
(resistive Z, Z0 = 50 Ω), and a CMRR up to about 32 dB.
Exit status: 0 all pass, 1 a unit failed a limit, 2 a file could not be read.
"""

def _parse_ports(text: str | None) -> tuple[int, ...] | None:
    if text is None:
        return None
    try:
        ports = tuple(int(t) for t in text.replace(" ", "").split(","))
    except ValueError:
        raise UnitError(f"--balanced-ports {text!r}: expected port numbers like 2,3 or 1,2,3,4") from None
    if len(ports) not in (2, 4):
        raise UnitError(f"--balanced-ports {text!r}: give 2 ports (3-port file) or 4 (4-port file)")
    return ports


def _parse_percent(text: str, option: str, allow_zero: bool = False) -> float:
    t = text.strip().rstrip("%").strip()
    try:
        v = float(t)
    except ValueError:
        raise UnitError(f"{option} {text!r}: expected a percentage such as 10") from None
    if not (0 <= v if allow_zero else 0 < v) or not v < 100:
        raise UnitError(f"{option} {text!r}: must be a percentage {'from' if allow_zero else 'above'} 0 and below 100")
    return v / 100.0


@app.command(epilog=EPILOG)
@o.with_design_file
@o.with_design_options()
def extract(
    files: Annotated[Optional[list[str]], typer.Argument(help="Touchstone files (.s1p … .s4p), one unit each.", show_default=False)] = None,
    method: Annotated[str, typer.Option("--method", help=f"How the sweep was made: {'|'.join(METHODS)} (auto: 1 port → reflect, 2 → series, 3/4 → mixed).", rich_help_panel=MEASURE_PANEL)] = "auto",
    z0: Annotated[Optional[str], typer.Option("--z0", help="Reference impedance instead of the file's, e.g. 50.", rich_help_panel=MEASURE_PANEL)] = None,
    open_file: Annotated[Optional[Path], typer.Option("--open", help="Sweep of the empty (open) fixture, same method, for open/short compensation.", rich_help_panel=MEASURE_PANEL)] = None,
    short_file: Annotated[Optional[Path], typer.Option("--short", help="Sweep of the shorted fixture, same method.", rich_help_panel=MEASURE_PANEL)] = None,
    legs: Annotated[Optional[tuple[Path, Path]], typer.Option("--legs", help="Two 2-port sweeps of a balun, S21 to each output leg (the other leg on a Z0 load).", rich_help_panel=MEASURE_PANEL, show_default=False)] = None,
    balanced_ports: Annotated[Optional[str], typer.Option("--balanced-ports", help="Balanced pair of a 3-port (default 2,3), or both pairs of a 4-port (default 1,2,3,4).", rich_help_panel=MEASURE_PANEL)] = None,
    floor_db: Annotated[float, typer.Option("--floor-db", help="Instrument noise floor in dB (−80 suits a low-cost analyser).", rich_help_panel=MEASURE_PANEL)] = -80.0,
    max_error: Annotated[str, typer.Option("--max-error", help="Largest estimated error of a valid point, in %.", rich_help_panel=MEASURE_PANEL)] = "10",
    cal_error: Annotated[str, typer.Option("--cal-error", help="Residual error of the calibration, in % of S (1 suits a low-cost analyser).", rich_help_panel=MEASURE_PANEL)] = "1",
    band: Annotated[Optional[str], typer.Option("--band", "-b", help="Band for the summary and limits, e.g. 1.8-30MHz (default: the whole sweep).", rich_help_panel=LIMIT_PANEL)] = None,
    target_r: Annotated[Optional[str], typer.Option("--target-r", help="Pass when R ≥ this over the band, e.g. 1k.", rich_help_panel=LIMIT_PANEL)] = None,
    target_z: Annotated[Optional[str], typer.Option("--target-z", help="Pass when |Z| ≥ this over the band.", rich_help_panel=LIMIT_PANEL)] = None,
    target_cmrr: Annotated[Optional[float], typer.Option("--target-cmrr", help="Pass when CMRR ≥ this many dB over the band (mixed mode).", rich_help_panel=LIMIT_PANEL)] = None,
    rows: Annotated[int, typer.Option("--rows", help="Rows in the printed table of a single file.", min=2)] = 12,
    summary_out: Annotated[Optional[Path], typer.Option("--summary", help="Write one CSV row per file (file, method, points valid, min R, where, pass).", rich_help_panel=o.OUTPUT_PANEL)] = None,
    json_out: o.JsonOut = None,
    csv_out: o.CsvOut = None,
    plot_out: o.PlotOut = None,
    spice_out: Annotated[Optional[Path], typer.Option("--spice", help="Single file: write the winding's fitted equivalent circuit as a SPICE subcircuit.", rich_help_panel=o.OUTPUT_PANEL)] = None,
    transformer: Annotated[Optional[str], typer.Option("--transformer", help="Check a built transformer of this topology (e.g. flux-1:49): a one-port into its load resistor, or two units back to back as a two-port; SWR against --max-swr.", rich_help_panel=LIMIT_PANEL)] = None,
    max_swr: Annotated[Optional[float], typer.Option("--max-swr", help="With --transformer: pass when SWR ≤ this over the band (default 2).", rich_help_panel=LIMIT_PANEL)] = None,
    html_out: o.HtmlOut = None,
    check_standard: Annotated[Optional[Path], typer.Option("--check-standard", help="A through (2-port) or matched load (1-port) measured after calibration: its residual replaces --cal-error.", rich_help_panel=MEASURE_PANEL)] = None,
    jobs: Annotated[int, typer.Option("--jobs", "-j", help="Files evaluated in parallel (worker processes).", min=1, max=256, rich_help_panel=MEASURE_PANEL)] = 1,
    vs_model: Annotated[bool, typer.Option("--vs-model", help="Compare with the model of the design given by the design options.", rich_help_panel=o.DESIGN_PANEL)] = False,
    design_options: dict = None,
) -> None:
    """Extract impedance (or balun balance) from network-analyser Touchstone files.

    Example: cmcheck extract choke.s2p --band 1.8-30MHz --target-r 1k

    Batch: cmcheck extract units/*.s2p --band 3.5-30MHz --target-r 1k --summary qa.csv

    Files are read as text only and validated (a pickle or damaged file is refused with a
    one-line error). Summaries use valid points only and say how many were excluded.
    """
    paths = list(files or [])
    if transformer is not None:
        from .transformer import run_transformer_check

        raise typer.Exit(run_transformer_check(paths, transformer, max_swr, band, z0, vs_model, design_options, rows,
                                               json_out, csv_out, plot_out))
    if max_swr is not None:
        raise CmcheckError("--max-swr is the limit of a --transformer check")
    if not paths and legs is None:
        raise CmcheckError("give one or more Touchstone files (or --legs A.s2p B.s2p)")
    if (open_file is None) != (short_file is None):
        raise CmcheckError("--open and --short go together: compensation needs both fixture sweeps")
    design = None
    # A design file may describe the choke for band and limits alone; only options typed
    # on the command line must come with --vs-model.
    design_given = any(design_options[k] is not None and not o.from_design_file(k)
                       for k in ("material", "od", "id", "height", "core_factor", "turns", "cable_od", "wire", "cp"))
    if vs_model:
        design = o.design_from_options(**design_options)
    elif design_given:
        raise CmcheckError("design options (--material, --turns, …) are used only with --vs-model")
    z0_value = o.parse_option("--z0", parse_resistance, z0)
    # Checked before any file is read: a bad option is no file's fault and writes no summary.
    if method not in METHODS:
        raise MeasurementError(f"method {method!r}: choose one of {', '.join(METHODS)}", parameter="method")
    if z0_value is not None and not z0_value > 0:
        raise MeasurementError(f"z0 must be a positive impedance, got {z0_value:g} Ω", parameter="z0")
    accuracy = Accuracy(floor_db=floor_db, max_error=_parse_percent(max_error, "--max-error"),
                        cal_error=_parse_percent(cal_error, "--cal-error", allow_zero=True))
    if check_standard is not None:
        if cal_error != "1":
            raise CmcheckError("give either --cal-error or --check-standard, not both")
        residual, found = check_standard_residual(read_touchstone(check_standard, z0=z0_value))
        accuracy = replace(accuracy, cal_error=residual)
        print(f"note: {found}; used instead of the 1 % default", file=sys.stderr)
    limits = Limits(
        band=o.band_from_option(band) if band else None,
        target_r=o.parse_option("--target-r", parse_resistance, target_r),
        target_z=o.parse_option("--target-z", parse_resistance, target_z),
        target_cmrr_db=target_cmrr,
    )
    ports = _parse_ports(balanced_ports)
    inputs = paths + [p for p in (open_file, short_file, check_standard) if p] + (list(legs) if legs else [])
    material = design_options["material"]
    if material and Path(material).is_file():
        inputs.append(material)
    check_outputs([json_out, csv_out, plot_out, summary_out, spice_out, html_out], inputs)
    if spice_out is not None and (len(paths) != 1 or legs is not None):
        raise CmcheckError("--spice fits one winding: give a single Touchstone file")

    fixture = None
    if open_file is not None:
        fixture = Fixture.from_sweeps(read_touchstone(open_file, z0=z0_value), read_touchstone(short_file, z0=z0_value),
                                      method, z0_value)

    # The summary streams to PATH.partial as files finish and becomes PATH at the end, also on an
    # interrupt; results the other outputs do not need are kept without their curves.
    stream = SummaryStream(summary_out) if summary_out is not None else None
    light = len(paths) > 1 and not (json_out or csv_out or plot_out or html_out or design is not None)
    estimates: dict = {}  # closed-form winding estimates, made before a light result drops its curve
    try:
        results = _run(paths, legs, method, z0_value, accuracy, fixture, ports, limits, jobs=jobs,
                       sink=(lambda r: stream.write(summary_row_table(r))) if stream else None, light=light,
                       estimates=estimates)
    finally:
        if stream is not None:
            stream.close()
    good = [r for r in results if r.error is None]
    models = {}
    if design is not None:
        for r in good:
            if r.extraction.curve is None:
                raise MeasurementError(f"{r.path}: --vs-model needs an impedance (series, shunt, reflect or a 4-port file)")
            models[r.path] = model_error(r.extraction, design.impedance(r.extraction.frequency_hz), limits.band)

    report = extraction_report(results, limits, accuracy, rows=rows, models=models, design=design,
                               more_option="--summary", table_rows=BATCH_TABLE_ROWS if light and stream else None,
                               estimates=estimates if light else None)
    extra = ()
    if spice_out is not None and good:
        from ..reporting.winding_report import spice_writer

        extra = (spice_writer(spice_out, good[0].extraction),)
    # Files first, all or none: a closed pipe (| head) must not cost the user the results.
    write_report(report, json=json_out, csv={"long": csv_out}, plot=plot_out, extra=extra, html=html_out)
    show(report)
    raise typer.Exit(exit_status(results))


def _in_options(r: FileResult) -> FileResult:
    """A file's error reworded in option language (the library names parameters)."""
    if r.error is None:
        return r
    return replace(r, error=option_message(r.error, r.error_parameter))


def _run(paths, legs, method, z0, accuracy, fixture, ports, limits, *, jobs=1, sink=None,
         light=False, estimates=None) -> list[FileResult]:
    """Evaluate the files in order, streaming each result to ``sink``; ``light`` keeps summaries only."""
    n = len(paths) + (1 if legs else 0)
    kwargs = dict(method=method, z0=z0, accuracy=accuracy, fixture=fixture, balanced_ports=ports, limits=limits)
    from .render import err_console

    out: list[FileResult] = []
    progress = task = None
    started = time.monotonic()
    try:
        for done, r in enumerate(iter_results(paths, jobs=jobs, legs=legs, **kwargs), start=1):
            r = _in_options(r)
            if r.error:
                if progress is not None:
                    progress.console.print(f"error: {r.error}", markup=False, highlight=False)
                else:
                    print(f"error: {r.error}", file=sys.stderr)
            if sink is not None:
                sink(r)
            if light and estimates is not None and r.error is None:
                estimates[r.path] = winding_estimate(r.extraction)
            out.append(slim(r) if light else r)
            if progress is not None:
                progress.advance(task)
            elif done < n and err_console.is_terminal and time.monotonic() - started > PROGRESS_AFTER_S:
                # A bar only for batches that take a while: a quick run stays quiet.
                from rich.progress import Progress

                progress = Progress(console=err_console, transient=True)
                task = progress.add_task("extracting", total=n, completed=done)
                progress.start()
    finally:
        if progress is not None:
            progress.stop()
    return out
