"""``cmcheck transformer``, ``extract --transformer`` and ``predict --power`` from the command line."""

from __future__ import annotations

import json
import math
import subprocess
import sys

import numpy as np
import pytest

from cmcheck.measurement.touchstone import read_touchstone

RING = ["--material", "nizn-250", "--od", "36mm", "--id", "23mm", "--height", "15mm", "--turns", "8",
        "--wire", "1mm", "--insulation", "0.03mm"]
STACK2 = ["--material", "nizn-800", "--od", "25.4mm", "--id", "15.5mm", "--height", "6.35mm", "--cores", "2",
          "--turns", "4", "--wire", "0.3mm", "--insulation", "0.02mm"]
BALUNS = ["guanella-1:1", "guanella-4:1", "guanella-4:1-one-core", "ruthroff-4:1-balun", "voltage-1:1"]
UNUNS = ["ruthroff-4:1-unun", "9:1-unun"]
KEYS = {"schema_version", "frequency_hz", "input_resistance_ohm", "input_reactance_ohm", "swr", "return_loss_db",
        "insertion_loss_db", "summary"}


def _write_s1p(path, f, z, z0=50.0):
    g = (np.asarray(z, complex) - z0) / (np.asarray(z, complex) + z0)
    lines = ["# Hz S RI R 50"] + [f"{fi:.9g} {gi.real:.12g} {gi.imag:.12g}" for fi, gi in zip(f, np.broadcast_to(g, f.shape))]
    path.write_text("\n".join(lines) + "\n")
    return path


def _run_json(run_cli, tmp_path, *args):
    out = tmp_path / "t.json"
    code, stdout, err = run_cli("transformer", *args, "--json", out)
    assert code == 0, err
    return json.loads(out.read_text()), stdout


@pytest.mark.parametrize("topology", BALUNS + UNUNS)
def test_each_topology_runs_with_the_json_keys(run_cli, tmp_path, topology):
    d, stdout = _run_json(run_cli, tmp_path, "--topology", topology, *RING, "--band", "3-30MHz", "--points", "31")
    assert KEYS <= d.keys()
    assert ("cmrr_db" in d) == (topology in BALUNS)
    assert d["summary"]["max_swr"] == 2.0
    n = len(d["frequency_hz"])
    assert all(len(d[k]) == n for k in ("swr", "return_loss_db", "insertion_loss_db", "input_resistance_ohm"))
    # Pozar, Microwave Engineering 4th ed., eqs. (2.35), (2.41), (2.49): SWR and return loss of Zin
    zin = np.array(d["input_resistance_ohm"]) + 1j * np.array(d["input_reactance_ohm"])
    g = np.abs((zin - 50) / (zin + 50))
    assert np.allclose(d["swr"], (1 + g) / (1 - g), rtol=1e-9)
    assert np.allclose(d["return_loss_db"], -20 * np.log10(g), rtol=1e-9)
    # Insertion loss includes mismatch: never below the mismatch loss (conservation of energy).
    assert np.all(np.array(d["insertion_loss_db"]) >= -10 * np.log10(1 - g**2) - 1e-9)
    assert "SWR" in stdout


def test_ruthroff_unun_divides_a_complex_load_by_four(run_cli, tmp_path):
    # Ruthroff, Proc. IRE 47 (1959): with a short line and high choking reactance the bootstrap
    # unun presents ZL/4 at its input; checked on R and X separately.
    ring = ["--material", "nizn-800", "--od", "36mm", "--id", "23mm", "--height", "15mm", "--turns", "14",
            "--wire", "1mm", "--insulation", "0.03mm"]
    d, _ = _run_json(run_cli, tmp_path, "--topology", "ruthroff-4:1-unun", *ring, "--load", "150+j40",
                     "--line-z0", "100", "--line-length", "1mm", "--band", "5-5.1MHz", "--points", "3")
    assert np.allclose(d["input_resistance_ohm"], 37.5, rtol=0.02)
    assert np.allclose(d["input_reactance_ohm"], 10.0, rtol=0.05)


def test_load_file_equals_the_resistor_it_holds(run_cli, tmp_path):
    # The same 200 Ω given as a number and as a one-port file (interpolated) gives the same input.
    f = np.geomspace(1e6, 50e6, 40)
    s1p = _write_s1p(tmp_path / "r200.s1p", f, 200.0)
    a, _ = _run_json(run_cli, tmp_path, "--topology", "ruthroff-4:1-unun", *RING, "--load", "200", "--points", "21")
    b, _ = _run_json(run_cli, tmp_path, "--topology", "ruthroff-4:1-unun", *RING, "--load", s1p, "--points", "21")
    assert np.allclose(a["input_resistance_ohm"], b["input_resistance_ohm"], rtol=1e-6)
    assert np.allclose(a["input_reactance_ohm"], b["input_reactance_ohm"], rtol=1e-6, atol=1e-6)


def test_load_lead_inductance_and_shunt_capacitance_change_the_load(run_cli, tmp_path):
    # Keysight Impedance Measurement Handbook §1.3: R with series L and parallel C. A 1 pF across
    # 2450 Ω at 30 MHz (1/ωC ≈ 5.3 kΩ) lowers the load and so the transformed input resistance.
    base = ["--topology", "flux-1:49", *STACK2, "--load", "2450", "--band", "30-30.1MHz", "--points", "2"]
    a, _ = _run_json(run_cli, tmp_path, *base)
    b, _ = _run_json(run_cli, tmp_path, *base, "--load-c", "1pF", "--load-l", "10nH")
    assert b["input_resistance_ohm"][0] < 0.9 * a["input_resistance_ohm"][0]


def test_leg_to_ground_lowers_the_model_cmrr(run_cli, tmp_path):
    # An asymmetric antenna (legs 100 Ω and 1 kΩ to ground) draws more common-mode current
    # through the balun than balanced legs do (Guanella 1944: the current balun forces equal
    # and opposite currents only as far as its choking impedance allows); on balanced legs the
    # output's mean voltage (V/2 above ground) still drives some.
    base = ["--topology", "guanella-1:1", *RING, "--band", "3-30MHz", "--points", "11"]
    a, _ = _run_json(run_cli, tmp_path, *base, "--leg-to-ground", "1k,1k")
    b, _ = _run_json(run_cli, tmp_path, *base, "--leg-to-ground", "100,1k")
    a_db, b_db = np.array(a["cmrr_db"], float), np.array(b["cmrr_db"], float)
    assert np.all(a_db > b_db + 5)


def test_touchstone_is_the_model_network(run_cli, tmp_path):
    # scikit-rf's network maths (an independent library): terminating port 2 of the written
    # two-port with the load gives the input impedance the report computed.
    import skrf

    s2p = tmp_path / "unun.s2p"
    d, _ = _run_json(run_cli, tmp_path, "--topology", "ruthroff-4:1-unun", *RING, "--load", "200",
                     "--points", "21", "--touchstone", s2p)
    sp = read_touchstone(s2p)
    assert sp.n_ports == 2
    freq = skrf.Frequency.from_f(sp.frequency_hz, unit="hz")
    ntw = skrf.Network(frequency=freq, s=sp.s, z0=50)
    gl = (200 - 50) / (200 + 50)
    load = skrf.Network(frequency=freq, s=np.full((freq.npoints, 1, 1), gl, complex), z0=50)
    zin = skrf.network.connect(ntw, 1, load, 0).z[:, 0, 0]
    assert np.allclose(sp.frequency_hz, d["frequency_hz"], rtol=1e-9)
    assert np.allclose(zin.real, d["input_resistance_ohm"], rtol=1e-6)
    assert np.allclose(zin.imag, d["input_reactance_ohm"], rtol=1e-5, atol=1e-6)


def test_balun_touchstone_is_a_three_port(run_cli, tmp_path):
    out = tmp_path / "balun.s3p"
    code, _, err = run_cli("transformer", "--topology", "guanella-1:1", *RING, "--points", "5", "--touchstone", out)
    assert code == 0, err
    assert read_touchstone(out).n_ports == 3


def test_power_gives_voltages_flux_and_heat(run_cli, tmp_path):
    # At 100 W available into a matched 50 Ω input, V ≈ √(P·R) ≈ 70.7 V (Joule); a 1:49 load
    # sees ≈ 7 × that, and the report's cautions name kilovolts only above its threshold.
    d, stdout = _run_json(run_cli, tmp_path, "--topology", "flux-1:49", *STACK2, "--load", "2450",
                          "--band", "3-30MHz", "--points", "11", "--power", "1000W")
    p = d["power"]
    assert p["max_load_voltage_v"] == pytest.approx(math.sqrt(1000 * 2450), rel=0.1)
    assert p["max_peak_flux_t"] > 0 and p["temperature_rise_k"][0] > 0
    assert "kilovolt" in stdout


def test_band_limit_is_explained(run_cli, tmp_path):
    d, stdout = _run_json(run_cli, tmp_path, "--topology", "9:1-unun", *RING, "--band", "1-60MHz", "--points", "41",
                          "--max-swr", "1.5")
    lo, hi = d["summary"]["band_under_max_swr_hz"]
    assert d["summary"]["max_swr"] == 1.5
    assert hi < 60e6 and "high" in d["summary"]["limits"]
    assert "limited at the high end" in stdout


@pytest.mark.parametrize("args, word", [
    (["--topology", "nope"], "--topology"),
    (["--topology", "flux-1:49", "--turns", "300"], "turns"),
    (["--load", "-5"], "--load"),
    (["--load", "0"], "--load"),
    (["--max-swr", "0.9"], "--max-swr"),
    (["--topology", "ruthroff-4:1-unun", "--leg-to-ground", "1,2"], "--leg-to-ground"),
])
def test_bad_input_is_one_line_exit_2(run_cli, args, word):
    design = [a for a in STACK2 if a]
    if "--turns" in args:
        i = design.index("--turns")
        design = design[:i] + design[i + 2:]
    code, out, err = run_cli("transformer", *design, *args)
    assert code == 2
    assert err.count("\n") == 1 and err.startswith("error:") and word in err


def test_load_file_with_two_ports_is_refused(run_cli, tmp_path):
    s2p = tmp_path / "two.s2p"
    s2p.write_text("# Hz S RI R 50\n1e6 0 0 1 0 1 0 0 0\n1e8 0 0 1 0 1 0 0 0\n")
    code, _, err = run_cli("transformer", *RING, "--load", s2p)
    assert code == 2 and "--load" in err and "one-port" in err and err.count("\n") == 1


def test_bad_input_in_a_subprocess_has_no_traceback():
    r = subprocess.run([sys.executable, "-m", "cmcheck", "transformer", "--topology", "nope", *RING],
                       capture_output=True, text=True, timeout=120)
    assert r.returncode == 2
    assert "Traceback" not in r.stderr and r.stderr.startswith("error: --topology")


# --- extract --transformer -------------------------------------------------------------------

def test_extract_transformer_check_pass_and_fail(run_cli, tmp_path):
    # A 55 Ω input on 50 Ω: |Γ| = 5/105, SWR = 1.1 (Pozar eq. 2.41).
    f = np.geomspace(1e6, 40e6, 30)
    s1p = _write_s1p(tmp_path / "unit.s1p", f, 55.0)
    out = tmp_path / "c.json"
    code, stdout, _ = run_cli("extract", s1p, "--transformer", "flux-1:49", "--max-swr", "1.2", "--band", "3-30MHz",
                              "--json", out)
    assert code == 0 and "PASS" in stdout
    d = json.loads(out.read_text())["results"][0]
    assert d["summary"]["worst_swr"] == pytest.approx(1.1, rel=1e-6)
    assert d["summary"]["min_return_loss_db"] == pytest.approx(-20 * math.log10(5 / 105), rel=1e-6)
    code, stdout, _ = run_cli("extract", s1p, "--transformer", "flux-1:49", "--max-swr", "1.05")
    assert code == 1 and "FAIL" in stdout


def test_extract_back_to_back_pair_loss_per_unit(run_cli, tmp_path):
    # Two identical units back to back: each is taken to lose half the pair's −20·log10|S21|
    # (common practice, no published source).
    s2p = tmp_path / "pair.s2p"
    s2p.write_text("# Hz S RI R 50\n" + "".join(f"{f:g} 0.05 0 0.9 0 0.9 0 0.05 0\n" for f in (1e6, 1e7, 3e7)))
    out = tmp_path / "p.json"
    code, _, err = run_cli("extract", s2p, "--transformer", "guanella-1:1", "--json", out)
    assert code == 0, err
    d = json.loads(out.read_text())["results"][0]
    assert d["kind"] == "pair"
    assert d["loss_per_unit_db"][0] == pytest.approx(-20 * math.log10(0.9) / 2, rel=1e-9)


def test_extract_max_swr_needs_transformer(run_cli, tmp_path):
    s1p = _write_s1p(tmp_path / "u.s1p", np.geomspace(1e6, 4e7, 5), 55.0)
    code, _, err = run_cli("extract", s1p, "--max-swr", "1.5")
    assert code == 2 and "--max-swr" in err


# --- predict --power -----------------------------------------------------------------------------

def test_predict_power_matches_the_heat_formulas(run_cli, tmp_path):
    od, id_, h, n, v = 61e-3, 35.6e-3, 12.7e-3, 8, 150.0
    out = tmp_path / "p.json"
    code, stdout, err = run_cli("predict", "--material", "nizn-800", "--od", "61mm", "--id", "35.6mm", "--height",
                                "12.7mm", "--turns", "8", "--cable-od", "5mm", "--band", "3.5-30MHz", "--points", "41",
                                "--power", "100W", "--cm-voltage", "150V", "--json", out)
    assert code == 0, err
    d = json.loads(out.read_text())
    f = np.array(d["frequency_hz"])
    z = np.array(d["resistance_ohm"]) + 1j * np.array(d["reactance_ohm"])
    inb = (f >= 3.5e6 * (1 - 1e-9)) & (f <= 30e6 * (1 + 1e-9))
    # Dissipation P = V²·Re(1/Z) (Alexander & Sadiku §11.6), worst in band.
    p = np.max(v**2 * (1 / z[inb]).real)
    # Ring surface: two annuli and two cylinders (geometry).
    area = 2 * math.pi / 4 * (od**2 - id_**2) + math.pi * (od + id_) * h
    # McLyman, Transformer and Inductor Design Handbook 3rd ed., ch. 6: ΔT ≈ 450·ψ^0.826, ψ in W/cm².
    rise = 450 * (p / (area * 1e4)) ** 0.826
    # IEC 60205 ring factors: C1 = 2π/(h·ln(OD/ID)), C2 = 4π(1/ID − 1/OD)/(h²·ln³(OD/ID)), Ae = C1/C2.
    ln = math.log(od / id_)
    c1 = 2 * math.pi / (h * ln)
    c2 = 4 * math.pi * (1 / id_ - 1 / od) / (h**2 * ln**3)
    ae = c1 / c2
    # McLyman ch. 1: B = V/(4.44 f N Ae), largest at the lowest in-band frequency.
    b = v / (4.44 * f[inb][0] * n * ae)
    heat = d["heat"]
    assert heat["max_dissipation_w"] == pytest.approx(p, rel=1e-9)
    assert heat["temperature_rise_k"] == pytest.approx(rise, rel=0.02)
    assert heat["max_peak_flux_t"] == pytest.approx(b, rel=0.02)
    assert "temperature rise" in stdout


def test_predict_drive_options_need_power(run_cli):
    code, _, err = run_cli("predict", "--material", "nizn-800", "--od", "61mm", "--id", "35.6mm", "--height", "12.7mm",
                           "--turns", "8", "--cm-voltage", "150V")
    assert code == 2 and "--power" in err


def test_toml_topology_file_equals_the_built_in(run_cli, tmp_path):
    # The same connections given as a TOML file (schema in DEVELOPERS.md) give the same input.
    toml = tmp_path / "r4.toml"
    toml.write_text('name = "my-4:1"\nratio = 4\n[[line]]\nend1 = ["in", "gnd"]\nend2 = ["out", "in"]\n')
    a, _ = _run_json(run_cli, tmp_path, "--topology", "ruthroff-4:1-unun", *RING, "--points", "11")
    b, _ = _run_json(run_cli, tmp_path, "--topology", toml, *RING, "--points", "11")
    assert np.allclose(a["input_resistance_ohm"], b["input_resistance_ohm"], rtol=1e-12)
    assert np.allclose(a["input_reactance_ohm"], b["input_reactance_ohm"], rtol=1e-12, atol=1e-12)


def test_velocity_factor_sets_the_line_delay(run_cli, tmp_path):
    # A 1:1 Guanella balun into a load ≠ Z0 of its line: the input transforms as a line section,
    # Zin = Z0·(ZL + jZ0·tanβl)/(Z0 + jZL·tanβl) (Pozar eq. 2.44), with βl = 2πf·l/(vf·c); checked
    # where the winding's choking impedance is high, on R and X separately.
    ring = ["--material", "nizn-800", "--od", "36mm", "--id", "23mm", "--height", "15mm", "--turns", "14",
            "--wire", "1mm", "--insulation", "0.03mm"]
    d, _ = _run_json(run_cli, tmp_path, "--topology", "guanella-1:1", *ring, "--load", "100", "--line-z0", "50",
                     "--line-length", "2m", "--velocity-factor", "0.7", "--band", "5-5.1MHz", "--points", "2")
    f = np.array(d["frequency_hz"])
    t = np.tan(2 * np.pi * f * 2.0 / (0.7 * 299_792_458.0))
    zin = 50 * (100 + 1j * 50 * t) / (50 + 1j * 100 * t)
    assert np.allclose(d["input_resistance_ohm"], zin.real, rtol=0.03)
    assert np.allclose(d["input_reactance_ohm"], zin.imag, rtol=0.05)
