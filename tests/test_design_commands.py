"""``--design FILE`` on transformer, identify, size and compare, and ``--html`` on transformer
and identify. Wiring tests: a design file must give the same output as the same values typed
as options (the commands' own tests check the numbers); no physics is asserted here.

Sources: the design values are invented test inputs (the ring is the invented demo drawer core,
examples/make_demo_data.py); the TOML keys and the expected messages and titles are the
project's own (cmcheck/designfile.py, cmcheck/reporting/files.py, the commands' report texts);
exit 2 = bad input, the project's convention in cmcheck/cli/app.py.
"""

from __future__ import annotations

import html
import json
import re
import shutil

import pytest

from cmcheck.demo import data_dir

# Invented test design (a 4:1 Guanella balun on a 36 × 23 × 12.5 mm ring); keys: cmcheck/designfile.py.
TRANSFORMER = """
material = "nizn-250"
band = "1.8-30MHz"
topology = "guanella-4:1"
[core]
od = "36mm"
id = "23mm"
height = "12.5mm"
[winding]
turns = 8
wire = "1.6mm"
insulation = "0.25mm"
[target]
swr = 1.5
[load]
resistance_ohm = 300
"""
TRANSFORMER_OPTIONS = ["--material", "nizn-250", "--band", "1.8-30MHz", "--topology", "guanella-4:1", "--od", "36mm",
                       "--id", "23mm", "--height", "12.5mm", "--turns", "8", "--wire", "1.6mm", "--insulation", "0.25mm",
                       "--max-swr", "1.5", "--load", "300"]
# Invented test design: the demo drawer core's 23 × 14 × 7.5 mm ring and 10 turns
# (examples/make_demo_data.py DRAWER_RING, DRAWER_WINDING); 800 Ω is an invented target.
RING = """
band = "1.8-30MHz"
[core]
od = "23mm"
id = "14mm"
height = "7.5mm"
[winding]
turns = 10
wire = "0.5mm"
[target]
resistance_ohm = "800"
"""
RING_OPTIONS = ["--od", "23mm", "--id", "14mm", "--height", "7.5mm", "--turns", "10"]


@pytest.fixture
def files(tmp_path, monkeypatch):
    monkeypatch.chdir(tmp_path)
    (tmp_path / "balun.toml").write_text(TRANSFORMER, encoding="utf-8")
    (tmp_path / "ring.toml").write_text(RING, encoding="utf-8")
    # The packaged demo sweep (invented, see examples/make_demo_data.py), under a name to escape.
    shutil.copy(data_dir() / "drawer-core.s1p", tmp_path / "a&b.s1p")
    return tmp_path


def test_transformer_reads_the_file_like_the_options(run_cli, files):
    by_file = run_cli("transformer", "--design", "balun.toml", "--rows", "4")
    assert by_file == run_cli("transformer", *TRANSFORMER_OPTIONS, "--rows", "4")
    code, out, _ = by_file
    # target.swr and load.resistance_ohm reach --max-swr and --load (the file's invented values;
    # wording is the project's own report text)
    assert code == 0 and "SWR ≤ 1.5 from" in out and "load 300 Ω" in out


def test_transformer_options_override_the_file(run_cli, files):
    # 200 Ω, SWR 1.2: invented override values
    code, out, _ = run_cli("transformer", "--design", "balun.toml", "--load", "200", "--max-swr", "1.2", "--rows", "4")
    assert code == 0 and "load 200 Ω" in out and ("SWR ≤ 1.2 from" in out or "SWR exceeds 1.2" in out)


def test_identify_reads_the_file_like_the_options(run_cli, files):
    by_file = run_cli("identify", "a&b.s1p", "--design", "ring.toml", "--rows", "3")
    assert by_file[0] == 0
    assert by_file == run_cli("identify", "a&b.s1p", *RING_OPTIONS, "--rows", "3")


def test_size_and_compare_read_the_file_like_the_options(run_cli, files):
    size_opts = ["--band", "1.8-30MHz", "--wire", "0.5mm", "--target-r", "800", "--top", "2"]
    def untimed(result):  # the search's own run time differs between runs
        return result[0], re.sub(r" in [0-9.]+ s:", " in … s:", result[1]), result[2]

    # exit 0 or 1 (a limit may fail): cmcheck/cli/app.py; the heading is the project's own text
    by_file = untimed(run_cli("size", "--design", "ring.toml", "--top", "2"))
    assert by_file[0] in (0, 1) and "Sizing R ≥ 800 Ω over 1.8 MHz–30 MHz with" in by_file[1]
    assert by_file == untimed(run_cli("size", *size_opts))
    mats = ["--materials", "nizn-250,nizn-800"]
    by_file = run_cli("compare", "--design", "ring.toml", *mats)
    assert by_file[0] == 0
    assert by_file == run_cli("compare", *mats, *RING_OPTIONS, "--wire", "0.5mm", "--band", "1.8-30MHz")


@pytest.mark.parametrize("command", [
    ("transformer",), ("identify", "a&b.s1p"), ("size",), ("compare", "--materials", "nizn-250")])
def test_bad_design_files_are_one_line_exit_2_naming_the_key(run_cli, files, command):
    # invented bad files ("legs", "23 furlongs", "low"); messages: the project's own, cmcheck/designfile.py
    cases = {"unknown.toml": ('[winding]\nturns = 3\nlegs = 2\n', "unknown key winding.legs"),
             "unit.toml": ('[core]\nod = "23 furlongs"\n', "core.od: "),
             "kind.toml": ('[target]\nswr = "low"\n', "target.swr must be a number")}
    for name, (text, message) in cases.items():
        (files / name).write_text(text, encoding="utf-8")
        code, out, err = run_cli(*command, "--design", name)
        assert (code, out) == (2, ""), (name, err)  # exit 2 = bad input, cmcheck/cli/app.py
        assert err.startswith(f"error: {name}: ") and message in err and err.count("\n") == 1, err


def test_missing_values_name_the_key(run_cli, files):
    (files / "bare.toml").write_text('material = "nizn-250"\n', encoding="utf-8")
    # exit 2 = bad input (cmcheck/cli/app.py); the "missing: add it …" texts are the project's own
    # (cmcheck/cli/options.py)
    code, _, err = run_cli("size", "--design", "bare.toml", "--cable-od", "5mm")
    assert code == 2 and err == "error: bare.toml: band missing: add it to the file or give --band\n"
    code, _, err = run_cli("identify", "a&b.s1p", "--design", "bare.toml", "--od", "23mm", "--id", "14mm", "--height", "7.5mm")
    assert code == 2 and err == "error: bare.toml: winding.turns missing: add it to the file or give --turns\n"
    code, _, err = run_cli("transformer", "--design", "bare.toml", "--od", "36mm", "--id", "23mm", "--height", "12.5mm",
                           "--wire", "1mm")
    assert code == 2 and err == "error: bare.toml: winding.turns missing: add it to the file or give --turns\n"


@pytest.mark.parametrize("command", [
    ("transformer", "--json"), ("identify", "a&b.s1p", "--save-material"), ("size", "--plot"),
    ("compare", "--materials", "nizn-250", "--html"), ("predict", "--csv")])
def test_no_output_overwrites_the_design_file(run_cli, files, command):
    target = "balun.toml"
    before = (files / target).read_bytes()
    code, out, err = run_cli(*command, target, "--design", target)
    assert (code, out) == (2, "")
    # exit 2 and the message: the project's own (cmcheck/cli/app.py, cmcheck/reporting/files.py)
    assert err == f"error: {target}: output would overwrite an input file; choose another name\n"
    assert (files / target).read_bytes() == before


def test_transformer_html_page_carries_the_report(run_cli, files):
    code, _, err = run_cli("transformer", "--design", "balun.toml", "--json", "t.json", "--html", "t.html")
    assert code == 0, err
    title = json.loads((files / "t.json").read_text(encoding="utf-8"))["design"]
    page = (files / "t.html").read_text(encoding="utf-8")
    # HTML5 doctype (WHATWG HTML Living Standard §13.1.1); JSON key "design": the project's own
    assert page.startswith("<!DOCTYPE html>") and f"<title>{html.escape(title)}" in page


def test_identify_html_page_carries_the_report_escaped(run_cli, files):
    code, _, err = run_cli("identify", "a&b.s1p", "--design", "ring.toml", "--html", "i.html", "--plot", "i.png")
    assert code == 0, err
    page = (files / "i.html").read_text(encoding="utf-8")
    # title: the project's own wording with ring.toml's invented values; "&amp;" is HTML's
    # escape of "&" (html.escape, Python standard library)
    assert "<title>Identification of a&amp;b.s1p: 10 turns on ring 23 × 14 × 7.5 mm" in page
    assert "a&b.s1p" not in page  # every place the file is named is escaped
    assert "<img" in page


def test_html_may_not_overwrite_the_sweep(run_cli, files):
    before = (files / "a&b.s1p").read_bytes()
    code, _, err = run_cli("identify", "a&b.s1p", "--design", "ring.toml", "--html", "a&b.s1p")
    assert code == 2 and "output would overwrite an input file" in err  # cmcheck/cli/app.py, cmcheck/reporting/files.py
    assert (files / "a&b.s1p").read_bytes() == before
