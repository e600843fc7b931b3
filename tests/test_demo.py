"""``cmcheck demo``: every part's outputs written, every output stated as invented, and the
files carry the same numbers as the console (one Report rendered both ways). The demo's data
are invented; these tests check the wiring, not physics (the library's own tests do that).

Sources: every number and sweep of the demo is an invented demo value — the sweeps and units
from examples/make_demo_data.py, the parts, their questions, targets and command settings from
cmcheck/demo/__init__.py; the INVENTED wording, file names and headers are the project's own
(cmcheck/demo/, examples/make_demo_data.py ``HEADER``); exit 2 = bad input, the project's
convention in cmcheck/cli/app.py.
"""

from __future__ import annotations

import csv
import json
import subprocess
import sys

import pytest

from cmcheck.demo import INVENTED, data_dir, data_files

pytestmark = pytest.mark.endtoend

# the demo's own parts (cmcheck/demo/__init__.py)
PARTS = ("feedline-choke", "supply-lead", "balun-4to1", "member-chokes", "drawer-core")


@pytest.fixture(scope="module")
def demo_run(tmp_path_factory):
    import contextlib
    import io
    import os

    from cmcheck.cli import main

    folder = tmp_path_factory.mktemp("demo")
    out, err = io.StringIO(), io.StringIO()
    here = os.getcwd()
    os.chdir(folder)
    try:
        with contextlib.redirect_stdout(out), contextlib.redirect_stderr(err):
            code = main(["demo", "--out", "club"])
    finally:
        os.chdir(here)
    return code, out.getvalue(), err.getvalue(), folder / "club"


def test_demo_writes_json_csv_and_plots_for_every_part(demo_run):
    code, out, err, folder = demo_run
    assert code == 0 and err == ""
    names = {p.name for p in folder.iterdir()}
    for part in PARTS:
        assert f"{part}.json" in names and f"{part}.png" in names
        assert any(n.startswith(part + "-") and n.endswith(".csv") for n in names), part
    assert len([n for n in names if n.endswith(".png")]) >= 5  # one plot per part, the project's own demo layout
    assert "report.html" in names or "index.html" in names
    assert {p.name for p in data_files()} <= names
    assert f"wrote into club/: " in out  # the project's own text (cmcheck/cli/demo.py); "club" is this test's folder


def test_every_output_says_invented(demo_run):
    _, out, _, folder = demo_run
    # INVENTED: the project's own label (cmcheck/demo/__init__.py); "! INVENTED" heads each sweep
    # (HEADER in examples/make_demo_data.py)
    assert out.count(INVENTED) == len(PARTS)
    for p in folder.iterdir():
        if p.suffix == ".json":
            assert json.loads(p.read_text(encoding="utf-8"))["invented"] == INVENTED, p.name
        elif p.suffix in (".csv", ".toml"):
            assert p.read_text(encoding="utf-8").startswith(f"# {INVENTED}"), p.name
        elif p.suffix in (".s1p", ".s2p"):
            assert p.read_text(encoding="utf-8").startswith("! INVENTED"), p.name
        elif p.suffix == ".html":
            assert "INVENTED" in p.read_text(encoding="utf-8")


def test_files_carry_the_console_numbers(demo_run):
    _, out, _, folder = demo_run
    # Batch QA: the summary CSV's minimum R of each unit is the number the console shows.
    with open(folder / "member-chokes-summary.csv", encoding="utf-8") as fh:
        rows = list(csv.DictReader(line for line in fh if not line.startswith("#")))
    # invented demo values (examples/make_demo_data.py UNITS): 8 units, unit 3 two turns short and
    # unit 5 with bunched turns, so these two miss the demo's invented R ≥ 1 kΩ target over
    # 1.8–30 MHz (cmcheck/demo/__init__.py). Column names: the project's own summary format.
    assert len(rows) == 8 and [r["file"] for r in rows if r["pass"] == "fail"] == ["club/unit-03.s2p", "club/unit-05.s2p"]
    for r in rows:
        line = next(x for x in out.splitlines() if x.startswith(r["file"] + " "))
        shown = float(line.split()[3].replace(",", ""))
        assert shown == pytest.approx(float(r["min_resistance_ohm"]), abs=0.5)  # the column shows four significant figures of its largest value
    # Sizing: design #1 of the JSON is the first row on the console and in the design file.
    size = json.loads((folder / "feedline-choke.json").read_text(encoding="utf-8"))
    first = size["designs"][0]  # JSON keys: the project's own (cmcheck/design/sized.py)
    assert f"1  {first['material']}" in out
    toml = (folder / "feedline-choke.toml").read_text(encoding="utf-8")
    assert f'material = "{first["material"]}"' in toml


def test_design_file_and_material_from_the_demo_work_in_the_commands(run_cli, demo_run, monkeypatch):
    *_, folder = demo_run
    monkeypatch.chdir(folder)
    code, out, err = run_cli("predict", "--design", "feedline-choke.toml", "--rows", "3")
    # 5 mm cable: invented demo value (cmcheck/demo/__init__.py); wording is the project's own report text
    assert code == 0 and " turns of cable 5 mm OD on " in out.splitlines()[0], err
    # 23 × 14 × 7.5 mm, 10 turns: the invented drawer core (examples/make_demo_data.py DRAWER_RING/_WINDING)
    code, out, err = run_cli("predict", "--material", "drawer-core-material.csv", "--od", "23mm", "--id", "14mm",
                             "--height", "7.5mm", "--turns", "10", "--band", "1-30MHz", "--rows", "3")
    assert code == 0, err


def test_path_prints_the_packaged_sweeps(run_cli):
    code, out, _ = run_cli("demo", "--path")
    assert code == 0 and out.strip() == str(data_dir())


def test_demo_into_a_file_is_one_line_exit_2(tmp_path):
    # One subprocess per command proves the real exit path (project rule).
    (tmp_path / "taken").write_text("x")
    p = subprocess.run([sys.executable, "-m", "cmcheck", "demo", "--out", str(tmp_path / "taken")],
                       capture_output=True, text=True, timeout=120)
    # exit 2 = bad input (cmcheck/cli/app.py); message: the project's own, cmcheck/demo/outputs.py
    assert p.returncode == 2 and p.stdout == ""
    assert p.stderr == f"error: {tmp_path / 'taken'}: exists and is not a folder\n"


def test_index_page_when_the_html_renderer_is_missing(tmp_path, monkeypatch):
    import builtins

    from cmcheck.demo import Part
    from cmcheck.demo.outputs import write_outputs
    from cmcheck.reporting.results import Report, Text

    real_import = builtins.__import__

    def no_html(name, globals=None, locals=None, fromlist=(), level=0):
        if fromlist and "html" in fromlist and name.endswith("reporting"):
            raise ImportError("no html renderer")
        return real_import(name, globals, locals, fromlist, level)

    monkeypatch.setattr(builtins, "__import__", no_html)
    # invented test part; the escaping expected below is HTML's (html.escape, Python standard library)
    part = Part("x", "<b>question</b>?", Report("t", (Text("hello"),), {"a": 1}))
    written = write_outputs([part], tmp_path)
    assert [p.name for p in written] == ["x.json", "index.html"]
    page = (tmp_path / "index.html").read_text(encoding="utf-8")
    assert "&lt;b&gt;question&lt;/b&gt;?" in page and '<a href="x.json">' in page


# The demo's own command settings, invented demo values (cmcheck/demo/__init__.py; the drawer
# core's sweep and size from examples/make_demo_data.py).
BALUN = ["transformer", "--topology", "guanella-4:1", "--material", "nizn-250", "--od", "36mm", "--id", "23mm",
         "--height", "12.5mm", "--turns", "8", "--wire", "1.6mm", "--insulation", "0.25mm", "--load", "200",
         "--leg-to-ground", "1k,1.5k", "--power", "100W", "--points", "61", "--rows", "8"]
DRAWER = ["identify", "club/drawer-core.s1p", "--od", "23mm", "--id", "14mm", "--height", "7.5mm", "--turns", "10",
          "--rows", "8"]


@pytest.mark.parametrize("part, command", [("c", BALUN), ("e", DRAWER)])
def test_balun_and_drawer_core_are_what_the_commands_print(run_cli, demo_run, monkeypatch, part, command):
    # The demo's parts are the commands' own reports: its console section (after the question
    # and the INVENTED line) is the command's output, number for number.
    _, out, _, folder = demo_run
    monkeypatch.chdir(folder.parent)
    section = out.split(f"[{part}] ", 1)[1].split("\n[", 1)[0].split("\nwrote into", 1)[0]
    shown = section.split("\n", 2)[2]
    assert section.split("\n")[1] == INVENTED
    code, printed, _ = run_cli(*command)
    assert code == 0 and shown.rstrip("\n") == printed.rstrip("\n")
