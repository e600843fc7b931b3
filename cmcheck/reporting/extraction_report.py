"""Reports of impedance and balance extraction (:func:`cmcheck.measurement.qa.evaluate_files`):
one file in detail, or a batch one row per file."""

from __future__ import annotations

from typing import Mapping, Sequence

import numpy as np

from ..curve import ImpedanceCurve
from ..measurement.methods import Accuracy
from ..measurement.qa import FileResult, Limits, result_to_dict
from ..units import format_quantity
from .choke_report import table_indices
from .files import SAFETY_NOTES
from .numbers import format_number
from .results import Column, Figure, Report, Series, Table, Text
from .winding_report import estimate_dict, estimate_text, estimates_table, winding_estimate

__all__ = ["extraction_report", "MAX_REASONS", "MAX_PLOTTED"]

#: Failed units whose reasons the batch summary lists; the rest are counted.
MAX_REASONS = 10
#: Units drawn in one batch plot.
MAX_PLOTTED = 20

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

_METHOD_NAMES = {"series": "series-through", "shunt": "shunt-through", "reflect": "reflection", "mixed": "mixed mode"}


def _num(v) -> str:
    return format_number(v)


def _hz(v) -> str:
    return "–" if v is None else format_quantity(v, "Hz")


def _excluded_text(excluded: dict, method: str) -> str:
    parts = []
    for key, n in excluded.items():
        why = _REASONS[key]
        why = why[method] if isinstance(why, dict) else why
        parts.append(f"{n} {why}")
    return "; ".join(parts)


def _verdict(s) -> str:
    return "" if s.passed is None else ("pass" if s.passed else "FAIL")


def extraction_report(
    results: Sequence[FileResult],
    limits: Limits,
    accuracy: Accuracy,
    *,
    rows: int = 12,
    models: Mapping[str, dict] | None = None,
    design=None,
    more_option: str = "the summary file",
    table_rows: int | None = None,
    estimates: Mapping[str, object] | None = None,
) -> Report:
    """The report of an extraction: one file in detail, or a batch.

    Parameters
    ----------
    results : sequence of FileResult
    limits, accuracy
        As used for the extraction.
    rows : int
        Rows of the single-file table.
    models : mapping of path to dict, optional
        :func:`cmcheck.measurement.qa.model_error` of each file against ``design``.
    design : ChokeDesign, optional
        The modelled design (JSON ``model``, plot overlay).
    more_option : str
        Where the full list of failures is, named in the batch summary.
    table_rows : int, optional
        Longest batch table on screen (failed and unreadable files first), for batches whose
        rows all go to a summary file; None lists every file.
    estimates : mapping of path to winding estimate, optional
        Closed-form L, Cp, R of each impedance made before its curve was dropped
        (:func:`cmcheck.measurement.batch.slim`); by default made here from each result.
    """
    models = dict(models or {})
    good = [r for r in results if r.error is None]
    estimates = {r.path: (estimates[r.path] if estimates is not None else winding_estimate(r.extraction))
                 for r in good}
    if len(results) == 1 and good:
        body = _one(good[0], accuracy, rows, models.get(good[0].path))
        line = estimate_text(estimates[good[0].path])
        if line is not None:
            body.insert(len(body) - (good[0].summary.passed is not None), line)
    elif good:
        body = _batch(results, limits, models, more_option, table_rows)
        body += estimates_table(list(estimates), list(estimates.values()))
    else:
        body = []
    json = None
    if good:
        json = {"results": [_with_model(result_to_dict(r), models.get(r.path)) for r in results]}
        for d in json["results"]:
            if "error" not in d:
                d["winding_estimate"] = estimate_dict(estimates.get(d["file"]))
        if design is not None:
            json["model"] = {"description": design.describe(), **design.to_dict()}
    data = {"summary": _summary_table(results)}
    if good:
        data["long"] = _long_table(good, models)
    figure = _figure(good, limits, design) if good else None
    return Report(
        title=good[0].path if len(results) == 1 and good else f"{len(results)} files",
        inputs={"files": [r.path for r in results], "band": None if limits.band is None else str(limits.band)},
        body=tuple(body),
        json=json,
        data=data,
        figures=(figure,) if figure is not None else (),
        notes=(f"A small-signal sweep does not show the core at power. {SAFETY_NOTES[2]}",) if good else (),
    )


def _with_model(d: dict, model: dict | None) -> dict:
    if model is not None:
        d["vs_model"] = model
    return d


def _one(r: FileResult, accuracy: Accuracy, rows: int, model: dict | None) -> list:
    ex, s = r.extraction, r.summary
    f = ex.frequency_hz
    what = _METHOD_NAMES[ex.method] + (f" ({ex.balance.kind})" if ex.balance is not None else "")
    comp = ", open/short compensated" if ex.compensated else ""
    body: list = [Text(f"{r.path}: {what}, Z0 = {ex.z0:g} Ω{comp}, {f.size} points "
                       f"{format_quantity(f[0], 'Hz')}–{format_quantity(f[-1], 'Hz')}", bold=True)]
    idx = table_indices(f, rows, [e for seg in s.band_hz for e in seg] + [s.min_resistance_hz, s.min_cmrr_hz])
    bal = ex.balance
    cols = [Column("frequency_hz", "frequency", "Hz", "hz", ".9g")]
    if ex.curve is not None:
        cols += [Column("resistance_ohm", "R [Ω]", "Ω", "num", ".9g"), Column("reactance_ohm", "X [Ω]", "Ω", "num", ".9g"),
                 Column("impedance_ohm", "|Z| [Ω]", "Ω", "num", ".9g")]
        if model is not None:
            cols += [Column("model_resistance_ohm", "model R [Ω]", "Ω", "num", ".9g"),
                     Column("model_reactance_ohm", "model X [Ω]", "Ω", "num", ".9g")]
    if bal is not None:
        cols += [Column("cmrr_db", "CMRR [dB]", "dB", ".1f", ".6g"),
                 Column("amplitude_imbalance_db", "imbalance [dB]", "dB", "+.2f", ".6g"),
                 Column("phase_imbalance_deg", "phase [°]", "°", "+.1f", ".6g")]
    cols.append(Column("valid", "valid", "", "yesno", "int"))
    table_rows = []
    for i in idx:
        row: list = [float(f[i])]
        if ex.curve is not None:
            z = complex(ex.curve.z[i])
            row += [z.real, z.imag, abs(z)]
            if model is not None:
                row += [float(model["resistance_ohm"][i]), float(model["reactance_ohm"][i])]
        if bal is not None:
            row += [float(bal.cmrr_db[i]), float(bal.amplitude_imbalance_db[i]), float(bal.phase_imbalance_deg[i])]
        row.append(bool(ex.valid[i]))
        table_rows.append(tuple(row))
    body.append(Table(tuple(cols), tuple(table_rows)))
    band_text = ",".join(f"{format_quantity(lo, 'Hz')}–{format_quantity(hi, 'Hz')}" for lo, hi in s.band_hz)
    excl = _excluded_text(s.excluded, ex.method)
    body.append(Text(f"band {band_text}: {s.points_valid} of {s.points_in_band} points valid"
                     + (f" (excluded: {excl})" if excl else "")))
    if ex.curve is not None and s.min_resistance_ohm is not None:
        body.append(Text(f"  min R = {_num(s.min_resistance_ohm)} Ω at {_hz(s.min_resistance_hz)}, "
                         f"min |Z| = {_num(s.min_impedance_ohm)} Ω at {_hz(s.min_impedance_hz)}"))
    if bal is not None and s.min_cmrr_db is not None:
        body.append(Text(f"  min CMRR = {s.min_cmrr_db:.1f} dB at {_hz(s.min_cmrr_hz)}, worst imbalance "
                         f"{s.max_amplitude_imbalance_db:.2f} dB and {s.max_phase_imbalance_deg:.1f}°"))
    if ex.method == "series":
        zmax = 2 * ex.z0 / accuracy.noise
        body.append(Text(f"  series-through ceiling 2·Z0/|S21|min ≈ {format_quantity(zmax, 'Ω', 3)} at a "
                         f"{accuracy.floor_db:g} dB floor"))
    if model is not None and model.get("points_compared"):
        body.append(Text(f"  vs model: |Z| differs by {model['impedance_error_median_pct']:+.1f} % (median), "
                         f"worst {model['impedance_error_worst_pct']:+.1f} % at {_hz(model['impedance_error_worst_hz'])}; "
                         f"complex error median {model['complex_error_median_pct']:.1f} %"))
    if s.passed is not None:
        body.append(Text(f"result: {_verdict(s)}" + (f" ({s.verdict})" if s.verdict else "")))
    return body


def _batch(results: Sequence[FileResult], limits: Limits, models: dict, more_option: str,
           table_rows: int | None = None) -> list:
    any_z = any(r.extraction is not None and r.extraction.curve is not None for r in results)
    any_b = any(r.extraction is not None and r.extraction.balance is not None for r in results)
    cols = [Column("file", "file"), Column("method", "method"), Column("valid", "valid")]
    if any_z:
        cols += [Column("min_resistance_ohm", "min R [Ω]", "Ω", "num", ".6g"),
                 Column("min_resistance_hz", "at", "Hz", "hz", ".6g"),
                 Column("min_impedance_ohm", "min |Z| [Ω]", "Ω", "num", ".6g")]
    if any_b:
        cols += [Column("min_cmrr_db", "min CMRR [dB]", "dB", ".1f", ".6g")]
    if models:
        cols += [Column("vs_model_pct", "vs model [%]", "%", "+.1f", ".6g")]
    cols.append(Column("result", "result"))
    rows = []
    for r in results:
        if r.error:
            rows.append((r.path, "–", "–", *["–"] * (len(cols) - 4), "unreadable"))
            continue
        ex, s = r.extraction, r.summary
        row: list = [r.path, ex.method, f"{s.points_valid}/{s.points_in_band}"]
        if any_z:
            row += [s.min_resistance_ohm, s.min_resistance_hz, s.min_impedance_ohm]
        if any_b:
            row += [s.min_cmrr_db]
        if models:
            row += [(models.get(r.path) or {}).get("impedance_error_median_pct")]
        row.append(_verdict(s) or "–")
        rows.append(tuple(row))
    listed = ""
    if table_rows is not None and len(rows) > table_rows:
        # A long batch's rows are all in the summary file; the screen shows the ones that need a look.
        bad = [i for i, r in enumerate(results) if r.error or (r.summary is not None and r.summary.passed is False)]
        flagged = set(bad)
        keep = sorted((bad + [i for i in range(len(rows)) if i not in flagged])[:table_rows])
        rows = [rows[i] for i in keep]
        listed = f" ({len(rows)} of them listed, failed and unreadable first; all in {more_option})"
    body: list = [Table(tuple(cols), tuple(rows), fold_first=True)]
    n_err = sum(1 for r in results if r.error)
    n_fail = sum(1 for r in results if r.summary is not None and r.summary.passed is False)
    n_pass = sum(1 for r in results if r.summary is not None and r.summary.passed)
    band = "the whole sweep" if limits.band is None else str(limits.band)
    line = f"{len(results)} files{listed}, summaries over {band} from valid points only"
    if limits.any:
        line += f": {n_pass} pass, {n_fail} fail"
    if n_err:
        line += f", {n_err} unreadable"
    body.append(Text(line))
    failed = [r for r in results if r.summary is not None and r.summary.passed is False and r.summary.verdict]
    for r in failed[:MAX_REASONS]:
        body.append(Text(f"  {r.path}: {r.summary.verdict}"))
    if len(failed) > MAX_REASONS:
        body.append(Text(f"  … and {len(failed) - MAX_REASONS} more (see {more_option})"))
    return body


_SUMMARY_COLUMNS = (
    Column("file", "file"), Column("method", "method"), Column("points_valid", "points valid", "", "int", "int"),
    Column("points_in_band", "points in band", "", "int", "int"),
    Column("min_resistance_ohm", "min R [Ω]", "Ω", "num", ".6g"), Column("min_resistance_hz", "at", "Hz", "hz", ".6g"),
    Column("min_impedance_ohm", "min |Z| [Ω]", "Ω", "num", ".6g"), Column("min_cmrr_db", "min CMRR [dB]", "dB", ".1f", ".6g"),
    Column("pass", "pass"), Column("note", "note"),
)


def _summary_table(results: Sequence[FileResult]) -> Table:
    """One row per file (the ``summary`` CSV)."""
    rows = []
    for r in results:
        if r.error:
            rows.append((r.path, "", None, None, None, None, None, None, "error", r.error))
            continue
        s = r.summary
        verdict = "" if s.passed is None else ("pass" if s.passed else "fail")
        rows.append((r.path, r.extraction.method, s.points_valid, s.points_in_band, s.min_resistance_ohm,
                     s.min_resistance_hz, s.min_impedance_ohm, s.min_cmrr_db, verdict, s.verdict))
    return Table(_SUMMARY_COLUMNS, tuple(rows), title="summary per file")


def _long_table(results: Sequence[FileResult], models: dict) -> Table:
    """Every point of every readable file (the long CSV)."""
    any_b = any(r.extraction.balance is not None for r in results)
    cols = [Column("file", "file"), Column("frequency_hz", "frequency", "Hz", "hz", ".9g"),
            Column("resistance_ohm", "R [Ω]", "Ω", "num", ".9g"), Column("reactance_ohm", "X [Ω]", "Ω", "num", ".9g"),
            Column("impedance_ohm", "|Z| [Ω]", "Ω", "num", ".9g"), Column("valid", "valid", "", "yesno", "int")]
    if any_b:
        cols += [Column("cmrr_db", "CMRR [dB]", "dB", ".1f", ".6g"),
                 Column("amplitude_imbalance_db", "imbalance [dB]", "dB", "+.2f", ".6g"),
                 Column("phase_imbalance_deg", "phase [°]", "°", "+.1f", ".6g")]
    if models:
        cols += [Column("model_resistance_ohm", "model R [Ω]", "Ω", "num", ".9g"),
                 Column("model_reactance_ohm", "model X [Ω]", "Ω", "num", ".9g")]
    rows = []
    for r in results:
        ex = r.extraction
        n = ex.frequency_hz.size
        blank = [None] * n
        parts = [[r.path] * n, ex.frequency_hz.tolist()]
        if ex.curve is not None:
            z = ex.curve.z
            parts += [z.real.tolist(), z.imag.tolist(), np.abs(z).tolist()]
        else:
            parts += [blank, blank, blank]
        parts.append([bool(v) for v in ex.valid])
        if any_b:
            b = ex.balance
            parts += ([b.cmrr_db.tolist(), b.amplitude_imbalance_db.tolist(), b.phase_imbalance_deg.tolist()]
                      if b is not None else [blank, blank, blank])
        if models:
            m = models.get(r.path)
            parts += ([list(map(float, m["resistance_ohm"])), list(map(float, m["reactance_ohm"]))]
                      if m is not None else [blank, blank])
        rows.extend(zip(*parts))
    return Table(tuple(cols), tuple(rows), title="every point",
                 comments=("measured by network analyser; extracted by cmcheck",))


def _figure(results: Sequence[FileResult], limits: Limits, design) -> Figure | None:
    curves = [r.extraction.curve for r in results if r.extraction.curve is not None]
    if curves:
        if len(curves) == 1:
            shown = list(curves)
            if design is not None:
                f = curves[0].frequency_hz
                shown = [ImpedanceCurve(f, curves[0].z, curves[0].valid, label="measured"),
                         ImpedanceCurve(f, design.impedance(f), label="model")]
            return Figure("impedance", title=results[0].path, curves=tuple(shown), band=limits.band,
                          target=limits.target_r)
        return Figure("impedance", curves=tuple(curves[:MAX_PLOTTED]), band=limits.band, quantities=("R",),
                      target=limits.target_r,
                      title=f"R of {len(curves)} units" + (f" (first {MAX_PLOTTED})" if len(curves) > MAX_PLOTTED else ""))
    balanced = [r.extraction for r in results if r.extraction.balance is not None]
    if not balanced:
        return None
    t = limits.target_cmrr_db
    shown = balanced[:MAX_PLOTTED]
    more = f" (first {MAX_PLOTTED} of {len(balanced)})" if len(balanced) > MAX_PLOTTED else ""

    def series(attr: str) -> tuple:
        return tuple(Series(ex.source, ex.balance.frequency_hz, getattr(ex.balance, attr), ex.valid) for ex in shown)

    return Figure(
        "series", title=("Balance: " + (shown[0].source if len(shown) == 1 else f"{len(shown)} units")) + more,
        y_label="CMRR [dB]", series=series("cmrr_db"),
        panels=(("amplitude imbalance [dB]", series("amplitude_imbalance_db")),
                ("phase imbalance [°]", series("phase_imbalance_deg"))),
        band=limits.band, target=t, target_label="" if t is None else f"target {t:g} dB",
    )
