"""Batches at scale: the summary streams row by row, survives an interrupt, and parallel workers
give the same rows as one process (cmcheck.measurement.batch, cmcheck.reporting.stream).

Sources: the units are invented pure resistors (200–700 Ω, test inputs), whose S-parameters
follow Pozar 4th ed. Table 4.2; the summary columns and the ``.partial`` file are the project's
own formats (cmcheck/reporting/extraction_report.py ``_SUMMARY_COLUMNS``,
cmcheck/reporting/stream.py); exit statuses 0 / 1 are the project's convention in
cmcheck/cli/app.py, 130 is the shell's for an interrupt (cmcheck/cli/main.py).
"""

from __future__ import annotations

import csv

import numpy as np
import pytest

import cmcheck.measurement.batch as batch
from cmcheck.measurement.batch import iter_results, slim
from cmcheck.measurement.qa import evaluate_files


def _s2p(path, r_ohm):
    """A series-through two-port of a resistor r_ohm (S21 = 2·Z0/(Z + 2·Z0), Pozar 4th ed. Table 4.2)."""
    f = np.geomspace(1e6, 30e6, 11)  # invented test sweep: 11 points, 1–30 MHz
    s21, s11 = 100.0 / (r_ohm + 100.0), r_ohm / (r_ohm + 100.0)
    rows = [f"{fi:.6g} {s11:.9g} 0 {s21:.9g} 0 {s21:.9g} 0 {s11:.9g} 0" for fi in f]
    path.write_text("# Hz S RI R 50\n" + "\n".join(rows) + "\n")
    return path


@pytest.fixture
def units(tmp_path):
    # invented test units: six resistors 200, 300, …, 700 Ω
    return [_s2p(tmp_path / f"u{i:02d}.s2p", 200.0 + 100.0 * i) for i in range(6)]


def _rows(path):
    with open(path, newline="", encoding="utf-8") as fh:
        return list(csv.reader(fh))


def test_summary_rows_match_the_files(run_cli, units, tmp_path):
    out = tmp_path / "qa.csv"
    code, _, _ = run_cli("extract", *units, "--band", "1-30MHz", "--target-r", "450", "--summary", out)
    # 450 Ω: an invented target between the units' values; exit 1 = a limit fails, the
    # project's convention in cmcheck/cli/app.py.
    assert code == 1  # units below 450 Ω fail
    rows = _rows(out)
    # header + one row per file; columns: _SUMMARY_COLUMNS in cmcheck/reporting/extraction_report.py
    # (r[4] = min_resistance_ohm, r[8] = pass), the project's own format.
    assert rows[0][0] == "file" and len(rows) == 1 + len(units)
    # min R of a pure resistor is the resistor (series-through, Pozar Table 4.2), within the 9-digit file.
    assert [float(r[4]) for r in rows[1:]] == pytest.approx([200.0 + 100.0 * i for i in range(6)], rel=1e-6)
    assert [r[8] for r in rows[1:]] == ["fail", "fail", "fail", "pass", "pass", "pass"]  # 200–400 Ω < 450 Ω
    # ".partial": the project's streamed-summary convention (cmcheck/reporting/stream.py)
    assert not (tmp_path / "qa.csv.partial").exists()


def test_interrupted_batch_keeps_every_completed_row(run_cli, units, tmp_path, monkeypatch):
    real = batch.evaluate_files

    def stop_at_fourth(paths, **kw):
        if paths and str(paths[0]).endswith("u03.s2p"):
            raise KeyboardInterrupt
        return real(paths, **kw)

    monkeypatch.setattr(batch, "evaluate_files", stop_at_fourth)
    out = tmp_path / "qa.csv"
    code, _, err = run_cli("extract", *units, "--band", "1-30MHz", "--summary", out)
    # the shell status of an interrupt: 128 + SIGINT (2), Bash Reference Manual §3.7.5 "Exit
    # Status"; returned by cmcheck/cli/main.py
    assert code == 130  # the shell status of an interrupt
    rows = _rows(out)
    assert [r[0] for r in rows[1:]] == [str(u) for u in units[:3]]
    assert not (tmp_path / "qa.csv.partial").exists()


def test_rows_are_on_disk_while_the_batch_runs(units, tmp_path, monkeypatch):
    from cmcheck.reporting.stream import SummaryStream, summary_row_table

    s = SummaryStream(tmp_path / "qa.csv")
    seen = []
    for r in iter_results(units[:3]):
        s.write(summary_row_table(r))
        seen.append(len(_rows(tmp_path / "qa.csv.partial")))
    # header + 1, 2, 3 rows in PATH.partial until close (the project's own rule, cmcheck/reporting/stream.py)
    assert seen == [2, 3, 4] and not (tmp_path / "qa.csv").exists()
    s.close()
    assert len(_rows(tmp_path / "qa.csv")) == 4


def test_parallel_workers_give_the_same_rows_in_order(run_cli, units, tmp_path):
    a, b = tmp_path / "a.csv", tmp_path / "b.csv"
    # exit 0: no limit given, so nothing fails (cmcheck/cli/app.py)
    assert run_cli("extract", *units, "--summary", a)[0] == 0
    assert run_cli("extract", *units, "--summary", b, "--jobs", "2")[0] == 0
    assert _rows(a) == _rows(b)


def test_parallel_workers_pass_their_warnings_on(units, tmp_path):
    tiny = _s2p(tmp_path / "tiny.s2p", 0.01)  # S21 ≈ 1: no point resolvable series-through
    with pytest.warns(Warning, match="no valid point"):  # the project's own text, cmcheck/measurement/qa.py
        list(iter_results([units[0], tiny], jobs=2))


def test_slim_keeps_the_summary_and_drops_the_curves(units):
    r = evaluate_files([units[0]])[0]
    s = slim(r)
    assert s.summary == r.summary and s.extraction.method == r.extraction.method
    # slim keeps one point of the curve: the project's own rule (cmcheck/measurement/batch.py)
    assert s.extraction.curve.z.size == 1 < r.extraction.curve.z.size


def test_jobs_must_be_a_whole_number(units):
    from cmcheck.errors import MeasurementError

    # jobs ≥ 1: the project's own rule and message (cmcheck/measurement/batch.py)
    with pytest.raises(MeasurementError, match="jobs"):
        list(iter_results(units, jobs=0))


def test_long_batch_with_a_summary_lists_the_failures_on_screen(run_cli, units, tmp_path, monkeypatch):
    import cmcheck.cli.extract as cli_extract

    # 2 rows: a test value below the project's own BATCH_TABLE_ROWS = 50 (cmcheck/cli/extract.py)
    monkeypatch.setattr(cli_extract, "BATCH_TABLE_ROWS", 2)
    code, out, _ = run_cli("extract", *units, "--band", "1-30MHz", "--target-r", "450", "--summary", tmp_path / "qa.csv")
    assert code == 1
    assert "u00.s2p" in out and "u01.s2p" in out and "u05.s2p" not in out  # failures first (200, 300 Ω < 450 Ω)
    assert "2 of them listed" in " ".join(out.split())  # the project's own text, cmcheck/reporting/extraction_report.py
    assert len(_rows(tmp_path / "qa.csv")) == 1 + len(units)


def test_progress_bar_appears_only_when_a_batch_takes_a_while(run_cli, units, tmp_path, monkeypatch):
    import io

    from rich.console import Console

    import cmcheck.cli.extract as cli_extract
    import cmcheck.cli.render as render

    buf = io.StringIO()
    monkeypatch.setattr(render, "err_console", Console(file=buf, force_terminal=True, width=100))
    run_cli("extract", *units)
    assert "extracting" not in buf.getvalue()  # a quick batch stays quiet
    # 0 s: a test value instead of the project's own PROGRESS_AFTER_S = 1.0 s (cmcheck/cli/extract.py);
    # "extracting" is the project's own progress label there.
    monkeypatch.setattr(cli_extract, "PROGRESS_AFTER_S", 0.0)
    run_cli("extract", *units)
    assert "extracting" in buf.getvalue()
