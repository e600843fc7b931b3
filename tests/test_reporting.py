"""The result model: one Report renders to console text, JSON and CSV with the same numbers,
and ``compare`` shows each material's own design.

Consistency rules are the project's own (contributor guide; no published source).
"""

from __future__ import annotations

import csv
import io
import json

import numpy as np
import pytest
from rich.console import Console

from cmcheck.model.choke import ChokeDesign, predict
from cmcheck.model.cores import RingCore
from cmcheck.model.materials import get_material
from cmcheck.model.winding import Cable, Winding
from cmcheck.reporting.choke_report import prediction_report
from cmcheck.reporting.files import write_table_csv
from cmcheck.reporting.outputs import write_report
from cmcheck.reporting.results import Column, Report, Table, Text
from cmcheck.reporting.text import format_cell, render
from cmcheck.units import parse_band


@pytest.fixture(scope="module")
def report() -> Report:
    design = ChokeDesign(RingCore(61e-3, 35.6e-3, 12.7e-3), get_material("nizn-800"), Winding(8, Cable(5e-3)))
    return prediction_report(predict(design, parse_band("1.8-30MHz"), 41), rows=8)


def _console_rows(report: Report) -> list[list[str]]:
    buf = io.StringIO()
    render(report, Console(file=buf, width=200, highlight=False, color_system=None))
    text = buf.getvalue()
    table = report.tables[0]
    header = [ln for ln in text.splitlines() if ln.lstrip().startswith("frequency")][0]
    lines = text.splitlines()
    start = lines.index(header) + 2
    return [ln.split() for ln in lines[start:start + len(table.rows)]], text


def _shows(text: str, value: float) -> bool:
    """The console text is ``value`` rounded to the decimals it shows (the column's choice)."""
    digits = text.replace(",", "")
    decimals = len(digits.split(".")[1]) if "." in digits else 0
    return abs(float(digits) - value) <= 0.5 * 10 ** -decimals + 1e-9


def test_console_json_and_csv_show_the_same_numbers(report, tmp_path):
    rows, text = _console_rows(report)
    table = report.tables[0]
    assert report.title in text and "note: " in text
    j = tmp_path / "r.json"
    c = tmp_path / "r.csv"
    write_report(report, json=j, csv={"curve": c})
    data = json.loads(j.read_text())
    with c.open() as fh:
        body = [r for r in csv.reader(ln for ln in fh if not ln.startswith("#"))]
    header, csv_rows = body[0], body[1:]
    assert header == list(report.data["curve"].keys)
    f_json = np.array(data["frequency_hz"])
    for shown, row in zip(rows, table.rows):
        f, r, x = row[0], row[1], row[2]
        i = int(np.argmin(np.abs(f_json - f)))
        assert f_json[i] == f
        # JSON (R and X separately) equals the table's numbers, and the console shows them.
        assert data["resistance_ohm"][i] == r and data["reactance_ohm"][i] == x
        assert _shows(shown[2], r) and _shows(shown[3], x)
        assert float(csv_rows[i][1]) == pytest.approx(r, rel=1e-8) and float(csv_rows[i][2]) == pytest.approx(x, rel=1e-8)
    assert len(csv_rows) == len(data["frequency_hz"])


def test_table_rows_must_match_columns():
    with pytest.raises(ValueError, match="2 cells for 1 columns"):
        Table((Column("a", "a"),), ((1, 2),))


def test_missing_values_and_words():
    c = Column("r", "R [Ω]", "Ω", "num", ".6g")
    assert format_cell(None, c) == "–" and format_cell(float("nan"), c) == "–"
    assert format_cell("–", c) == "–"
    assert format_cell(12345.6, c) == "12,346" and format_cell(1.23456, c) == "1.235"


def test_csv_writes_missing_values_empty(tmp_path):
    t = Table((Column("f", "f", "Hz", "hz", ".9g"), Column("r", "R", "Ω", "num", ".6g")), ((1e6, None), (2e6, 3.5)),
              comments=("made by a test",))
    p = tmp_path / "t.csv"
    write_table_csv(p, t)
    assert p.read_text() == "# made by a test\nf,r\n1000000,\n2000000,3.5\n"


def test_text_blocks_print_in_order():
    r = Report("t", (Text("first", bold=True), Table((Column("k", "k"),), (("v",),)), Text("last")), json={},
               notes=("careful",))
    buf = io.StringIO()
    render(r, Console(file=buf, width=80, color_system=None))
    out = buf.getvalue()
    assert out.index("first") < out.index("v") < out.index("last") < out.index("note: careful")


def test_compare_shows_each_materials_own_design(run_cli, tmp_path):
    j = tmp_path / "c.json"
    names = ["nizn-800", "mnzn-1500", "nizn-250"]
    code, out, err = run_cli("compare", "--materials", ",".join(names), "--od", "61mm", "--id", "35.55mm",
                             "--height", "12.7mm", "--turns", "8", "--cable-od", "5mm", "--band", "3.5-30MHz",
                             "--json", j)
    assert code == 0, err
    data = json.loads(j.read_text())
    by_name = {m["name"]: m for m in data["materials"]}
    assert sorted(by_name) == sorted(names)
    shown = out.split("each material's design")[1]
    for name, m in by_name.items():
        assert m["design"]["material"] == name and m["design"]["description"].endswith(name)
        # The console lists each material with its own L(low f).
        line = next(ln for ln in shown.splitlines() if ln.startswith(name + " "))
        assert f"{m['low_frequency_inductance_h'] * 1e6:.4g} µH" in line
    # Each design is its own: L(low f) = µi·L0 differs by material (µ' at low f; IEC 60205 L0).
    inductances = {m["design"]["low_frequency_inductance_h"] for m in by_name.values()}
    assert len(inductances) == 3
    l0 = by_name["nizn-800"]["design"]["l0_h"]
    for name, m in by_name.items():
        mu = get_material(name).permeability(np.array([1e3]))[0].real
        assert m["low_frequency_inductance_h"] == pytest.approx(mu * l0, rel=0.05)
