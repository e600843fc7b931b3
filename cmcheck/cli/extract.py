"""``cmcheck extract``: impedance, validity and balance from Touchstone files, one unit or a batch."""

from __future__ import annotations

import sys
from pathlib import Path
from typing import Annotated, Optional

import numpy as np
import typer
from rich.markup import escape

from ..measurement.qa import FileResult, Limits, evaluate_files, exit_status, model_error, result_to_dict
from ..curve import ImpedanceCurve
from ..errors import CmcheckError, MeasurementError, UnitError
from ..measurement.methods import METHODS, Accuracy, Fixture
from ..reporting.files import SAFETY_NOTES, atomic_write, check_outputs, staged_outputs, write_csv, write_json
from ..reporting.plots import plot_curves
from ..measurement.touchstone import read_touchstone
from ..units import format_quantity, parse_resistance
from . import options as o
from .app import app
from .render import console, print_notes, table

MEASURE_PANEL = "Measurement"
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

_REASONS = {
    "noise_floor": "near the noise floor",
    "resolution": {
        "series": "too close to a plain through to resolve",
        "shunt": "too close to a plain through to resolve",
        "reflect": "too far from Z0 for reflection",
        "mixed": "common mode below the calibration residual",
    },
    "not_passive": "not passive (|S| > 1 or R < 0)",
    "no_fixture_data": "outside the fixture sweeps",
}

_MAX_REASONS = 10

_METHOD_NAMES = {"series": "series-through", "shunt": "shunt-through", "reflect": "reflection", "mixed": "mixed mode"}


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


def _resistance(option: str, text: str | None) -> float | None:
    if text is None:
        return None
    try:
        return parse_resistance(text)
    except UnitError as exc:
        raise UnitError(f"{option}: {exc}") from None


@app.command(epilog=EPILOG)
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
    vs_model: Annotated[bool, typer.Option("--vs-model", help="Compare with the model of the design given by the design options.", rich_help_panel=o.DESIGN_PANEL)] = False,
    material: o.Material = None,
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
) -> None:
    """Extract impedance (or balun balance) from network-analyser Touchstone files.

    Example: cmcheck extract choke.s2p --band 1.8-30MHz --target-r 1k

    Batch: cmcheck extract units/*.s2p --band 3.5-30MHz --target-r 1k --summary qa.csv

    Files are read as text only and validated (a pickle or damaged file is refused with a
    one-line error). Summaries use valid points only and say how many were excluded.
    """
    paths = list(files or [])
    if not paths and legs is None:
        raise CmcheckError("give one or more Touchstone files (or --legs A.s2p B.s2p)")
    if (open_file is None) != (short_file is None):
        raise CmcheckError("--open and --short go together: compensation needs both fixture sweeps")
    design = None
    design_given = any(v is not None for v in (material, od, id, height, core_factor, turns, cable_od, wire, cp))
    if vs_model:
        design = o.design_from_options(
            material=material, od=od, id=id, height=height, cores=cores, core_factor=core_factor,
            window=window, turns=turns, wire=wire, insulation=insulation, cable_od=cable_od, cp=cp,
        )
    elif design_given:
        raise CmcheckError("design options (--material, --turns, …) are used only with --vs-model")
    z0_value = _resistance("--z0", z0)
    accuracy = Accuracy(floor_db=floor_db, max_error=_parse_percent(max_error, "--max-error"),
                        cal_error=_parse_percent(cal_error, "--cal-error", allow_zero=True))
    limits = Limits(
        band=o.band_from_option(band) if band else None,
        target_r=_resistance("--target-r", target_r),
        target_z=_resistance("--target-z", target_z),
        target_cmrr_db=target_cmrr,
    )
    ports = _parse_ports(balanced_ports)
    inputs = paths + [p for p in (open_file, short_file) if p] + (list(legs) if legs else [])
    if material and Path(material).is_file():
        inputs.append(material)
    check_outputs([json_out, csv_out, plot_out, summary_out], inputs)

    fixture = None
    if open_file is not None:
        fixture = Fixture.from_sweeps(read_touchstone(open_file, z0=z0_value), read_touchstone(short_file, z0=z0_value),
                                      method, z0_value)

    results = _run(paths, legs, method, z0_value, accuracy, fixture, ports, limits)
    good = [r for r in results if r.error is None]
    models = {}
    if design is not None:
        for r in good:
            if r.extraction.curve is None:
                raise MeasurementError(f"{r.path}: --vs-model needs an impedance (series, shunt, reflect or a 4-port file)")
            models[r.path] = model_error(r.extraction, design.impedance(r.extraction.frequency_hz), limits.band)

    # Files first, all or none: a closed pipe (| head) must not cost the user the results.
    with staged_outputs():
        if json_out and good:
            data: dict = {"results": [_with_model(result_to_dict(r), models.get(r.path)) for r in results]}
            if design is not None:
                data["model"] = {"description": design.describe(), **design.to_dict()}
            write_json(json_out, data)
        if csv_out and good:
            _write_long_csv(csv_out, good, models)
        if summary_out:
            _write_summary(summary_out, results)
        if plot_out and good:
            _plot(plot_out, good, limits, design)

    if len(results) == 1 and good:
        _show_one(good[0], limits, accuracy, rows, models.get(good[0].path))
    elif good:
        _show_batch(results, limits, models)
    if good:
        print_notes([f"A small-signal sweep does not show the core at power. {SAFETY_NOTES[2]}"])
    raise typer.Exit(exit_status(results))


def _run(paths, legs, method, z0, accuracy, fixture, ports, limits) -> list[FileResult]:
    def report(r: FileResult) -> None:
        if r.error:
            print(f"error: {r.error}", file=sys.stderr)

    n = len(paths) + (1 if legs else 0)
    kwargs = dict(method=method, z0=z0, accuracy=accuracy, fixture=fixture, balanced_ports=ports,
                  limits=limits, legs=legs)
    from .render import err_console

    if n <= 20 or not err_console.is_terminal:
        return evaluate_files(paths, on_done=report, **kwargs)
    from rich.progress import Progress

    with Progress(console=err_console, transient=True) as progress:
        task = progress.add_task("extracting", total=n)

        def tick(r: FileResult) -> None:
            progress.advance(task)
            if r.error:
                progress.console.print(f"error: {r.error}", markup=False, highlight=False)

        return evaluate_files(paths, on_done=tick, **kwargs)


def _num(v, digits: int = 4) -> str:
    if v is None or not np.isfinite(v):
        return "–"
    a = abs(v)
    if a >= 10 ** digits:
        return f"{v:,.0f}"
    return f"{v:.{digits}g}"


def _hz(v) -> str:
    return "–" if v is None else format_quantity(v, "Hz")


def _excluded_text(excluded: dict, method: str) -> str:
    parts = []
    for key, n in excluded.items():
        why = _REASONS[key]
        why = why[method] if isinstance(why, dict) else why
        parts.append(f"{n} {why}")
    return "; ".join(parts)


def _verdict_text(s) -> str:
    if s.passed is None:
        return ""
    return "pass" if s.passed else "FAIL"


def _table_rows(f: np.ndarray, rows: int, extra) -> np.ndarray:
    wanted = np.geomspace(f[0], f[-1], rows)
    marks = [e for e in extra if e is not None and f[0] <= e <= f[-1]]
    idx = {int(np.argmin(np.abs(np.log(f / w)))) for w in np.concatenate([wanted, marks])}
    return np.array(sorted(idx))


def _show_one(r: FileResult, limits: Limits, accuracy: Accuracy, rows: int, model: dict | None) -> None:
    ex, s = r.extraction, r.summary
    f = ex.frequency_hz
    what = _METHOD_NAMES[ex.method] + (f" ({ex.balance.kind})" if ex.balance is not None else "")
    comp = ", open/short compensated" if ex.compensated else ""
    console.print(f"[bold]{escape(r.path)}[/bold]: {what}, Z0 = {ex.z0:g} Ω{comp}, {f.size} points "
                  f"{format_quantity(f[0], 'Hz')}–{format_quantity(f[-1], 'Hz')}", markup=True)
    marks = [e for seg in s.band_hz for e in seg] + [s.min_resistance_hz, s.min_cmrr_hz]
    idx = _table_rows(f, rows, marks)
    valid = ex.valid
    bal = ex.balance
    cols = ["frequency"]
    if ex.curve is not None:
        cols += ["R [Ω]", "X [Ω]", "|Z| [Ω]"]
        if model is not None:
            cols += ["model R [Ω]", "model X [Ω]"]
    if bal is not None:
        cols += ["CMRR [dB]", "imbalance [dB]", "phase [°]"]
    cols.append("valid")
    t = table(*cols)
    for i in idx:
        row = [format_quantity(f[i], "Hz")]
        if ex.curve is not None:
            z = ex.curve.z[i]
            row += [_num(z.real), _num(z.imag), _num(abs(z))]
            if model is not None:
                row += [_num(model["resistance_ohm"][i]), _num(model["reactance_ohm"][i])]
        if bal is not None:
            row += [f"{bal.cmrr_db[i]:.1f}", f"{bal.amplitude_imbalance_db[i]:+.2f}", f"{bal.phase_imbalance_deg[i]:+.1f}"]
        row.append("yes" if valid[i] else "no")
        t.add_row(*row)
    console.print(t)
    band_text = ",".join(f"{format_quantity(lo, 'Hz')}–{format_quantity(hi, 'Hz')}" for lo, hi in s.band_hz)
    excl = _excluded_text(s.excluded, ex.method)
    console.print(f"band {band_text}: {s.points_valid} of {s.points_in_band} points valid"
                  + (f" (excluded: {excl})" if excl else ""))
    if ex.curve is not None and s.min_resistance_ohm is not None:
        console.print(f"  min R = {_num(s.min_resistance_ohm)} Ω at {_hz(s.min_resistance_hz)}, "
                      f"min |Z| = {_num(s.min_impedance_ohm)} Ω at {_hz(s.min_impedance_hz)}")
    if bal is not None and s.min_cmrr_db is not None:
        console.print(f"  min CMRR = {s.min_cmrr_db:.1f} dB at {_hz(s.min_cmrr_hz)}, worst imbalance "
                      f"{s.max_amplitude_imbalance_db:.2f} dB and {s.max_phase_imbalance_deg:.1f}°")
    if ex.method == "series":
        zmax = 2 * ex.z0 / accuracy.noise
        console.print(f"  series-through ceiling 2·Z0/|S21|min ≈ {format_quantity(zmax, 'Ω', 3)} at a "
                      f"{accuracy.floor_db:g} dB floor")
    if model is not None and model.get("points_compared"):
        console.print(f"  vs model: |Z| differs by {model['impedance_error_median_pct']:+.1f} % (median), "
                      f"worst {model['impedance_error_worst_pct']:+.1f} % at {_hz(model['impedance_error_worst_hz'])}; "
                      f"complex error median {model['complex_error_median_pct']:.1f} %")
    if s.passed is not None:
        console.print(f"result: {_verdict_text(s)}" + (f" ({s.verdict})" if s.verdict else ""))


def _show_batch(results: list[FileResult], limits: Limits, models: dict) -> None:
    any_z = any(r.extraction is not None and r.extraction.curve is not None for r in results)
    any_b = any(r.extraction is not None and r.extraction.balance is not None for r in results)
    cols = ["file", "method", "valid"]
    if any_z:
        cols += ["min R [Ω]", "at", "min |Z| [Ω]"]
    if any_b:
        cols += ["min CMRR [dB]"]
    if models:
        cols += ["vs model [%]"]
    cols.append("result")
    t = table(*cols)
    t.columns[0].overflow = "fold"  # a QA table must show whole file names
    for r in results:
        if r.error:
            t.add_row(escape(r.path), "–", "–", *["–"] * (len(cols) - 4), "unreadable")
            continue
        ex, s = r.extraction, r.summary
        row = [escape(r.path), ex.method, f"{s.points_valid}/{s.points_in_band}"]
        if any_z:
            row += [_num(s.min_resistance_ohm), _hz(s.min_resistance_hz), _num(s.min_impedance_ohm)]
        if any_b:
            row += ["–" if s.min_cmrr_db is None else f"{s.min_cmrr_db:.1f}"]
        if models:
            m = models.get(r.path) or {}
            row += ["–" if "impedance_error_median_pct" not in m else f"{m['impedance_error_median_pct']:+.1f}"]
        row.append(_verdict_text(s) or "–")
        t.add_row(*row)
    # Piped output (a QA log) gets the width it needs; a terminal keeps its own and folds names.
    if console.is_terminal:
        console.print(t)
    else:
        from rich.console import Console

        need = max(len(r.path) for r in results) + 12 * (len(cols) - 1)
        Console(highlight=False, width=max(console.width, need)).print(t)
    n_err = sum(1 for r in results if r.error)
    n_fail = sum(1 for r in results if r.summary is not None and r.summary.passed is False)
    n_pass = sum(1 for r in results if r.summary is not None and r.summary.passed)
    band = "the whole sweep" if limits.band is None else str(limits.band)
    line = f"{len(results)} files, summaries over {band} from valid points only"
    if limits.any:
        line += f": {n_pass} pass, {n_fail} fail"
    if n_err:
        line += f", {n_err} unreadable"
    console.print(line)
    failed = [r for r in results if r.summary is not None and r.summary.passed is False and r.summary.verdict]
    for r in failed[:_MAX_REASONS]:
        console.print(f"  {r.path}: {r.summary.verdict}", markup=False)
    if len(failed) > _MAX_REASONS:
        console.print(f"  … and {len(failed) - _MAX_REASONS} more (see --summary)")


def _with_model(d: dict, model: dict | None) -> dict:
    if model is not None:
        d["vs_model"] = model
    return d


def _write_long_csv(path, results: list[FileResult], models: dict) -> None:
    any_b = any(r.extraction.balance is not None for r in results)
    header = ["file", "frequency_hz", "resistance_ohm", "reactance_ohm", "impedance_ohm", "valid"]
    if any_b:
        header += ["cmrr_db", "amplitude_imbalance_db", "phase_imbalance_deg"]
    if models:
        header += ["model_resistance_ohm", "model_reactance_ohm"]
    rows = []
    for r in results:
        ex = r.extraction
        n = ex.frequency_hz.size
        blank = [""] * n
        cols = [[r.path] * n, [f"{v:.9g}" for v in ex.frequency_hz]]
        if ex.curve is not None:
            z = ex.curve.z
            cols += [[f"{v:.9g}" for v in z.real], [f"{v:.9g}" for v in z.imag], [f"{v:.9g}" for v in np.abs(z)]]
        else:
            cols += [blank, blank, blank]
        cols.append([str(int(v)) for v in ex.valid])
        if any_b:
            b = ex.balance
            if b is not None:
                cols += [[f"{v:.6g}" for v in b.cmrr_db], [f"{v:.6g}" for v in b.amplitude_imbalance_db],
                         [f"{v:.6g}" for v in b.phase_imbalance_deg]]
            else:
                cols += [blank, blank, blank]
        if models:
            m = models.get(r.path)
            if m is not None:
                cols += [[f"{v:.9g}" for v in m["resistance_ohm"]], [f"{v:.9g}" for v in m["reactance_ohm"]]]
            else:
                cols += [blank, blank]
        rows.extend(zip(*cols))
    write_csv(path, header, rows, comments=["measured by network analyser; extracted by cmcheck"])


def _write_summary(path, results: list[FileResult]) -> None:
    header = ["file", "method", "points_valid", "points_in_band", "min_resistance_ohm", "min_resistance_hz",
              "min_impedance_ohm", "min_cmrr_db", "pass", "note"]
    rows = []
    for r in results:
        if r.error:
            rows.append([r.path, "", "", "", "", "", "", "", "error", r.error])
            continue
        s = r.summary

        def g(v):
            return "" if v is None else f"{v:.6g}"

        verdict = "" if s.passed is None else ("pass" if s.passed else "fail")
        rows.append([r.path, r.extraction.method, s.points_valid, s.points_in_band, g(s.min_resistance_ohm),
                     g(s.min_resistance_hz), g(s.min_impedance_ohm), g(s.min_cmrr_db), verdict, s.verdict])
    write_csv(path, header, rows)


def _plot(path, results: list[FileResult], limits: Limits, design) -> None:
    curves = [r.extraction.curve for r in results if r.extraction.curve is not None]
    if curves:
        target = limits.target_r
        if len(curves) == 1:
            shown = list(curves)
            if design is not None:
                f = curves[0].frequency_hz
                shown.append(ImpedanceCurve(f, design.impedance(f), label="model"))
                shown[0] = ImpedanceCurve(f, curves[0].z, curves[0].valid, label="measured")
            plot_curves(path, shown, band=limits.band, title=results[0].path, target_ohm=target)
        else:
            plot_curves(path, curves[:20], band=limits.band, quantities=("R",), target_ohm=target,
                        title=f"R of {len(curves)} units" + (" (first 20)" if len(curves) > 20 else ""))
        return
    _plot_cmrr(path, [r.extraction for r in results if r.extraction.balance is not None], limits)


def _plot_cmrr(path, extractions, limits: Limits) -> None:
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt

    fig, ax = plt.subplots(figsize=(8, 4.8), dpi=110)
    for i, ex in enumerate(extractions[:20]):
        b, v = ex.balance, ex.valid
        ax.plot(b.frequency_hz, np.where(v, b.cmrr_db, np.nan), "-", color=f"C{i % 10}", label=ex.source)
        ax.plot(b.frequency_hz, np.where(~v, b.cmrr_db, np.nan), "-", color="0.6", lw=1)
    if limits.band is not None:
        for lo, hi in limits.band.segments:
            ax.axvspan(lo, hi, color="C2", alpha=0.08, lw=0)
    if limits.target_cmrr_db is not None:
        ax.axhline(limits.target_cmrr_db, color="k", lw=0.8, ls="-.", label=f"target {limits.target_cmrr_db:g} dB")
    ax.set_xscale("log")
    ax.set_xlabel("frequency [Hz]")
    ax.set_ylabel("CMRR [dB] (grey: not valid)")
    ax.grid(True, which="both", alpha=0.3)
    ax.legend(fontsize=8)
    ax.set_title("common-mode rejection |S_d21/S_c21|", fontsize=10)
    fig.tight_layout()
    atomic_write(path, lambda p: fig.savefig(p, format="png"))
    plt.close(fig)
