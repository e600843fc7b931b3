"""`cmcheck predict` and `cmcheck materials` end to end.

These check the command line's contract (outputs, errors, agreement with the library it
calls); the physical values it prints are checked, each against its published source, in
test_choke.py, test_cores.py, test_winding.py and test_reference_data.py.
"""

import json
import subprocess
import sys

import numpy as np
import pytest

from cmcheck.model.choke import ChokeDesign, predict
from cmcheck.model.cores import RingCore
from cmcheck.model.materials import get_material, builtin_materials
from cmcheck.units import Band
from cmcheck.model.winding import Cable

DESIGN = ["--material", "nizn-800", "--od", "61mm", "--id", "35.6mm", "--height", "12.7mm", "--turns", "8", "--cable-od", "5mm"]


def test_predict_table_and_outputs(run_cli, tmp_path):
    out = {k: tmp_path / f"p.{k}" for k in ("json", "csv", "png", "s2p")}
    code, stdout, err = run_cli("predict", *DESIGN, "--band", "1.8-30MHz", "--json", out["json"], "--csv", out["csv"],
                                "--plot", out["png"], "--touchstone", out["s2p"])
    assert code == 0, err
    assert "self-resonance" in stdout and "min R" in stdout
    data = json.loads(out["json"].read_text())
    for key in ("frequency_hz", "resistance_ohm", "reactance_ohm", "impedance_ohm", "design", "summary"):
        assert key in data
    assert {"min_resistance_ohm", "self_resonance_hz"} <= set(data["summary"])
    # The JSON agrees with the library called directly (the CLI only renders).
    from cmcheck.model.winding import Winding

    d = ChokeDesign(RingCore(61e-3, 35.6e-3, 12.7e-3), get_material("nizn-800"), Winding(8, Cable(5e-3)))
    p = predict(d, Band.single(1.8e6, 30e6))
    assert np.allclose(data["resistance_ohm"], p.curve.resistance)
    assert data["summary"]["min_resistance_ohm"] == pytest.approx(p.summary["min_resistance_ohm"])
    assert out["csv"].read_text().splitlines()[2].startswith("frequency_hz,resistance_ohm")
    assert out["png"].read_bytes()[:4] == b"\x89PNG"
    assert out["s2p"].read_text().count("\n") > 100


def test_predict_cp_zero_and_given(run_cli, tmp_path):
    j0, j1 = tmp_path / "a.json", tmp_path / "b.json"
    assert run_cli("predict", *DESIGN, "--cp", "0", "--json", j0)[0] == 0
    assert run_cli("predict", *DESIGN, "--cp", "2.8pF", "--json", j1)[0] == 0
    assert json.loads(j0.read_text())["design"]["cp_f"] == 0.0
    assert json.loads(j1.read_text())["design"]["cp_f"] == pytest.approx(2.8e-12)
    # Without Cp there is no self-resonance in the model's range.
    assert json.loads(j0.read_text())["summary"]["self_resonance_hz"] is None


@pytest.mark.parametrize(
    "change, message",
    [
        (["--od", "30mm", "--id", "35mm"], "smaller than OD"),
        (["--height", "-3mm"], "height"),
        (["--band", "30-1MHz"], "--band"),
        (["--band", "one-to-thirty"], "--band"),
        (["--material", "no-such-file.csv"], "no-such-file.csv"),
        (["--od", "61"], "--od"),
        (["--cp", "lots"], "--cp"),
        (["--turns", "0"], "turns"),
    ],
)
def test_predict_bad_input(run_cli, change, message):
    code, stdout, err = run_cli("predict", *DESIGN, *change)
    assert code == 2
    lines = err.strip().splitlines()
    assert len(lines) == 1 and lines[0].startswith("error: ") and message in lines[0]


def test_bad_input_subprocess_no_traceback(tmp_path):
    # The real console script path: one line, exit 2, no traceback, no output file.
    target = tmp_path / "never.json"
    r = subprocess.run([sys.executable, "-m", "cmcheck", "predict", *DESIGN, "--id", "70mm", "--json", str(target)],
                       capture_output=True, text=True)
    assert r.returncode == 2
    assert r.stderr.strip().startswith("error: ") and len(r.stderr.strip().splitlines()) == 1
    assert "Traceback" not in r.stderr and not target.exists()


def test_output_never_overwrites_material_input(run_cli, tmp_path):
    mat = tmp_path / "m.csv"
    mat.write_text("frequency_hz,mu_prime,mu_double_prime\n1e5,100,1\n1e9,100,1\n")
    before = mat.read_text()
    code, _, err = run_cli("predict", *DESIGN, "--material", mat, "--csv", mat)
    assert code == 2 and "overwrite" in err
    assert mat.read_text() == before


def test_help_lists_commands_and_units():
    r = subprocess.run([sys.executable, "-m", "cmcheck", "--help"], capture_output=True, text=True)
    assert r.returncode == 0
    for cmd in ("predict", "materials"):
        assert cmd in r.stdout
    r = subprocess.run([sys.executable, "-m", "cmcheck", "predict", "--help"], capture_output=True, text=True,
                       env={"COLUMNS": "200", "PATH": ""})
    assert "--od" in r.stdout and "mm" in r.stdout and "pF" in r.stdout and "MHz" in r.stdout


def test_materials_listing(run_cli, tmp_path):
    j = tmp_path / "m.json"
    code, stdout, _ = run_cli("materials", "--json", j)
    # The listing shows the families with their µi ranges, electrical class and sources.
    from cmcheck.model.families import builtin_families

    nizn_range = "{:g}–{:g}".format(*builtin_families()["nizn"].mu_range)
    assert code == 0 and "nizn-<µi>" in stdout and nizn_range in stdout and "dielectric" in stdout
    assert "conductive" in stdout and "Snoek" in stdout and "Tsutaoka" in stdout
    data = json.loads(j.read_text())
    assert {f["key"] for f in data["families"]} == {"nizn", "mnzn", "iron-powder"}
    for f in data["families"]:
        assert {"mu_i_range", "electrical_class", "sources", "provenance"} <= set(f)
    assert len(data["materials"]) >= 6
    for m in data["materials"]:
        assert {"name", "description", "initial_permeability", "provenance", "electrical_class"} <= set(m)
    code, stdout, _ = run_cli("materials", "nizn-650", "--band", "1-100MHz")
    assert code == 0 and "µ''" in stdout and "nizn-650" in stdout
    code, _, err = run_cli("materials", "nizn-5")
    assert code == 2 and nizn_range in err and err.count("\n") == 1


def test_window_only_with_core_factor(run_cli):
    code, _, err = run_cli("predict", *DESIGN, "--window", "3mm")
    assert code == 2 and "--window" in err


def test_material_folder_named(run_cli, tmp_path):
    d = tmp_path / "curves.csv"
    d.mkdir()
    code, _, err = run_cli("predict", *DESIGN, "--material", d)
    assert code == 2 and "folder" in err
