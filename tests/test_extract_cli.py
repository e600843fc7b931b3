"""``cmcheck extract`` end to end: outputs, exit codes, refusals, and the real measurements."""

from __future__ import annotations

import csv
import json
import pickle
import subprocess
import sys

import numpy as np
import pytest

from cmcheck.curve import series_s21

F = np.geomspace(1e6, 100e6, 61)
Z0 = 50.0


def _choke_z(f=F, r=900.0, l=25e-6, c=2e-12):
    """A lossy winding with stray capacitance: (R + jωL) ∥ C [Ω]."""
    w = 2 * np.pi * f
    zs = r + 1j * w * l
    return zs / (1 + 1j * w * c * zs)


def _s2p(path, z, f=F, s21=None):
    s21 = series_s21(z, Z0) if s21 is None else s21
    lines = ["! series-through test file", "# Hz S RI R 50"]
    lines += [f"{fi:.10g} {1 - a.real:.12g} {-a.imag:.12g} {a.real:.12g} {a.imag:.12g} 0 0 0 0" for fi, a in zip(f, s21)]
    path.write_text("\n".join(lines) + "\n")
    return path


def _snp(path, s, f=F):
    """Version-1 file of any port count: each matrix row on its own line (Touchstone 2.1 spec)."""
    n = s.shape[1]
    out = ["# Hz S RI R 50"]
    for fi, m in zip(f, s):
        for i in range(n):
            pairs = " ".join(f"{v.real:.12g} {v.imag:.12g}" for v in m[i])
            out.append((f"{fi:.10g} " if i == 0 else "") + pairs)
    path.write_text("\n".join(out) + "\n")
    return path


def test_single_file_table_and_summary(run_cli, tmp_path):
    # Pozar Table 4.2 (series-through) on a synthetic choke: printed R at the minimum is the model's.
    p = _s2p(tmp_path / "choke.s2p", _choke_z())
    code, out, err = run_cli("extract", p, "--band", "1-30MHz")
    assert code == 0, err
    assert "series-through" in out and "min R" in out and "valid" in out
    assert "note:" in out  # the one safety caution
    assert err == ""


def test_pass_and_fail_exit_codes(run_cli, tmp_path):
    # Issue 3: exit 0 when all pass, 1 when a unit fails a limit. min R of the test choke over
    # 1–30 MHz is about 900 Ω (closed form (R + jωL) ∥ C at the low edge).
    p = _s2p(tmp_path / "choke.s2p", _choke_z())
    assert run_cli("extract", p, "--band", "1-30MHz", "--target-r", "800")[0] == 0
    code, out, _ = run_cli("extract", p, "--band", "1-30MHz", "--target-r", "1k")
    assert code == 1 and "FAIL" in out
    assert run_cli("extract", p, "--band", "1-30MHz", "--target-z", "850")[0] == 0


def test_batch_reports_unreadable_and_continues(run_cli, tmp_path):
    # Issue 3: an unreadable file is one error line, the others are still processed; exit 2.
    good = [_s2p(tmp_path / f"u{i}.s2p", _choke_z(r=700.0 + 200 * i)) for i in range(3)]
    bad = tmp_path / "bad.s2p"
    bad.write_text("# Hz S RI R 50\n1e6 1 0 0 0 0 0 1 0\n2e6 1 0 0\n")
    summary = tmp_path / "qa.csv"
    code, out, err = run_cli("extract", *good, bad, "--band", "1-30MHz", "--target-r", "800", "--summary", summary)
    assert code == 2
    lines = err.strip().splitlines()
    assert len(lines) == 1 and lines[0].startswith(f"error: {bad}: ")
    for g in good:
        assert g.name in out
    rows = list(csv.DictReader(summary.open()))
    assert [r["file"] for r in rows] == [str(p) for p in good + [bad]]
    assert [r["pass"] for r in rows] == ["fail", "pass", "pass", "error"]
    in_band = F <= 30e6
    assert float(rows[1]["min_resistance_ohm"]) == pytest.approx(np.min(_choke_z(r=900.0).real[in_band]), rel=1e-5)


def test_batch_exit_one_when_only_a_limit_fails(run_cli, tmp_path):
    # Issue 3: 1 = ran fine but a unit failed its limit.
    files = [_s2p(tmp_path / f"u{i}.s2p", _choke_z(r=700.0 + 200 * i)) for i in range(2)]
    code, out, err = run_cli("extract", *files, "--band", "1-30MHz", "--target-r", "800")
    assert code == 1 and "1 pass, 1 fail" in out and err == ""


BAD = {
    "empty": ("empty.s2p", ""),
    "truncated": ("trunc.s2p", "# Hz S RI R 50\n1e6 1 0 0 0 0 0 1 0\n2e6 1 0 0 0 0 0 1"),
    "garbage": ("garbage.s2p", "this is\nnot a touchstone file at all\n"),
    "no finite point": ("nan.s1p", "# Hz S RI R 50\n1e6 nan nan\n2e6 nan 0\n"),
    "one point": ("one.s2p", "# Hz S RI R 50\n1e6 1 0 0 0 0 0 1 0\n"),
}


@pytest.mark.parametrize("case", sorted(BAD))
def test_bad_file_one_error_line_exit_2(run_cli, tmp_path, case):
    # Issue 3 acceptance: one "error: FILE: …" line and exit 2.
    name, text = BAD[case]
    p = tmp_path / name
    p.write_text(text)
    code, out, err = run_cli("extract", p)
    assert code == 2
    assert err.startswith(f"error: {p}: ") and len(err.strip().splitlines()) == 1
    assert "Traceback" not in err


def test_wrong_port_count_for_the_method(run_cli, tmp_path):
    # Issue 3 acceptance: a 1-port file asked for series-through is refused naming the file.
    p = tmp_path / "r.s1p"
    p.write_text("# Hz S RI R 50\n1e6 0.1 0\n2e6 0.2 0\n")
    code, _, err = run_cli("extract", p, "--method", "series")
    assert code == 2 and err.startswith(f"error: {p}: --method series needs a 2-port file")


def _payload_pickle(tmp_path, protocol):
    target = tmp_path / "created-by-pickle.txt"

    class Payload:
        def __reduce__(self):
            return (open, (str(target), "w"))

    p = tmp_path / "x.s2p"
    p.write_bytes(pickle.dumps(Payload(), protocol=protocol))
    return p, target


@pytest.mark.parametrize("protocol", [0, 4])
def test_pickle_refused_in_process(run_cli, tmp_path, protocol):
    # Issue 3: a pickle named x.s2p is refused with exit 2 and its payload never runs.
    p, target = _payload_pickle(tmp_path, protocol)
    code, _, err = run_cli("extract", p)
    assert code == 2 and err.startswith(f"error: {p}: ")
    assert not target.exists()


def test_pickle_refused_subprocess_no_traceback(tmp_path):
    # The console entry point: one line, exit 2, no traceback, payload never ran.
    p, target = _payload_pickle(tmp_path, 4)
    r = subprocess.run([sys.executable, "-m", "cmcheck", "extract", str(p)], capture_output=True, text=True)
    assert r.returncode == 2
    assert r.stderr.startswith(f"error: {p}: ") and len(r.stderr.strip().splitlines()) == 1
    assert "Traceback" not in r.stderr and not target.exists()


def test_a_few_nan_points_warn_with_count(run_cli, tmp_path):
    # Issue 3: a file with a few NaN/inf points is read; a warning says how many were excluded.
    p = _s2p(tmp_path / "n.s2p", _choke_z())
    lines = p.read_text().splitlines()
    lines[5] = lines[5].split()[0] + " nan 0 0.5 0 0 0 0 0"
    lines[9] = lines[9].split()[0] + " 0 0 inf 0 0 0 0 0"
    p.write_text("\n".join(lines) + "\n")
    code, out, err = run_cli("extract", p)
    assert code == 0
    assert "warning:" in err and f"2 of {F.size} points" in err


def test_json_keys(run_cli, tmp_path):
    # Issue 3: JSON keys exactly as listed, plus the mixed-mode ones for a balun.
    p = _s2p(tmp_path / "c.s2p", _choke_z())
    out_json = tmp_path / "r.json"
    assert run_cli("extract", p, "--json", out_json, "--band", "1-30MHz", "--target-r", "100")[0] == 0
    res = json.loads(out_json.read_text())["results"][0]
    for key in ("file", "method", "frequency_hz", "resistance_ohm", "reactance_ohm", "impedance_ohm", "valid", "summary"):
        assert key in res
    for key in ("min_resistance_ohm", "points_valid", "pass"):
        assert key in res["summary"]
    assert res["method"] == "series" and res["summary"]["pass"] is True
    assert np.allclose(res["resistance_ohm"], _choke_z().real, rtol=1e-8)


def test_mixed_mode_three_port_json_csv_plot(run_cli, tmp_path):
    # Bockelman & Eisenstadt 1995 / DESIGN.md: CMRR = |Sds21/Scs21|; a balun with S31 = −0.9·S21
    # has CMRR = 20·log10(1.9/0.1) = 25.58 dB at every frequency.
    s = np.zeros((F.size, 3, 3), complex)
    s21 = 0.7 * np.exp(-1j * 2 * np.pi * F * 1e-9)
    s[:, 1, 0] = s[:, 0, 1] = s21
    s[:, 2, 0] = s[:, 0, 2] = -0.9 * s21
    p = _snp(tmp_path / "balun.s3p", s)
    j, c, png = tmp_path / "b.json", tmp_path / "b.csv", tmp_path / "b.png"
    code, out, err = run_cli("extract", p, "--json", j, "--csv", c, "--plot", png, "--target-cmrr", "25")
    assert code == 0, err
    res = json.loads(j.read_text())["results"][0]
    assert res["method"] == "mixed" and res["resistance_ohm"] is None
    assert np.allclose(res["cmrr_db"], 20 * np.log10(1.9 / 0.1))
    assert np.allclose(res["amplitude_imbalance_db"], 20 * np.log10(1 / 0.9))
    assert np.allclose(res["phase_imbalance_deg"], 0.0, atol=1e-9)
    assert "CMRR" in out
    assert png.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"
    rows = list(csv.DictReader(line for line in c.open() if not line.startswith("#")))
    assert len(rows) == F.size and "cmrr_db" in rows[0]
    assert run_cli("extract", p, "--target-cmrr", "26")[0] == 1


def test_legs_give_the_three_port_figures(run_cli, tmp_path):
    # Issue 3: two 2-port sweeps (S21 and S31 of the three-port) give the same CMRR.
    s21 = 0.7 * np.exp(-1j * 2 * np.pi * F * 1e-9)
    a = _s2p(tmp_path / "a.s2p", None, s21=s21)
    b = _s2p(tmp_path / "b.s2p", None, s21=-0.9 * s21)
    j = tmp_path / "l.json"
    code, out, err = run_cli("extract", "--legs", a, b, "--json", j)
    assert code == 0, err
    res = json.loads(j.read_text())["results"][0]
    assert np.allclose(res["cmrr_db"], 20 * np.log10(1.9 / 0.1))


def test_open_short_compensation_cli(run_cli, tmp_path):
    # Keysight Handbook §4.3 model: Zxm = Zs + 1/(Yo + 1/Zdut); compensation recovers Zdut.
    w = 2 * np.pi * F
    zs, yo = 0.5 + 1j * w * 40e-9, 1j * w * 0.6e-12
    zdut = _choke_z()
    meas = _s2p(tmp_path / "dut.s2p", zs + 1 / (yo + 1 / zdut))
    opn = _s2p(tmp_path / "open.s2p", zs + 1 / yo)
    sht = _s2p(tmp_path / "short.s2p", zs)
    j = tmp_path / "c.json"
    code, out, err = run_cli("extract", meas, "--open", opn, "--short", sht, "--json", j)
    assert code == 0, err
    res = json.loads(j.read_text())["results"][0]
    assert np.allclose(res["resistance_ohm"], zdut.real, rtol=1e-7)
    assert np.allclose(res["reactance_ohm"], zdut.imag, rtol=1e-7, atol=1e-6)
    assert "compensated" in out
    assert run_cli("extract", meas, "--open", opn)[0] == 2


def test_vs_model_reports_small_error_for_its_own_prediction(run_cli, tmp_path):
    # Self-consistency: a sweep made from the model itself (ChokeDesign.impedance through the
    # Pozar series relation) must agree with the model to rounding.
    from cmcheck.cli.options import design_from_options

    opts = dict(material="nizn-800", od="61mm", id="35.6mm", height="12.7mm", turns=8, cable_od="5mm")
    design = design_from_options(**opts, cores=1, core_factor=None, window=None, wire=None, insulation="0", cp=None)
    p = _s2p(tmp_path / "m.s2p", design.impedance(F))
    j = tmp_path / "m.json"
    args = ["--material", "nizn-800", "--od", "61mm", "--id", "35.6mm", "--height", "12.7mm", "--turns", "8",
            "--cable-od", "5mm"]
    code, out, err = run_cli("extract", p, "--vs-model", *args, "--band", "1-30MHz", "--json", j, "--plot",
                             tmp_path / "m.png")
    assert code == 0, err
    vs = json.loads(j.read_text())["results"][0]["vs_model"]
    assert abs(vs["impedance_error_worst_pct"]) < 1e-6 and vs["points_compared"] > 10
    assert "vs model" in out
    assert run_cli("extract", p, "--material", "nizn-800")[0] == 2  # design options need --vs-model


def test_outputs_never_overwrite_an_input(run_cli, tmp_path):
    # report.check_outputs: an output naming an input is refused before anything is written.
    p = _s2p(tmp_path / "c.s2p", _choke_z())
    before = p.read_bytes()
    code, _, err = run_cli("extract", p, "--json", p)
    assert code == 2 and "overwrite an input" in err and p.read_bytes() == before


def test_help_documents_common_mode_series_through(run_cli):
    # Issue 3: document how to measure a balun's common-mode impedance series-through.
    code, out, _ = run_cli("extract", "--help")
    assert code == 0
    assert "short the two" in out and "--legs" in out and "--floor-db" in out


# --- the real measurements, every variant --------------------------------------------------

def _real_files(real_dir):
    return sorted(str(p) for p in real_dir.rglob("*") if p.suffix.lower() in {".s1p", ".s2p"})


def test_real_files_every_variant(run_cli, real_dir, tmp_path):
    # SOURCES.md: every real file reads without a crash, with every method that fits it.
    files = _real_files(real_dir)
    two = [f for f in files if f.endswith(".s2p")]
    runs = [
        (files, ["--band", "1-30MHz", "--target-r", "10", "--json", tmp_path / "a.json", "--csv", tmp_path / "a.csv",
                 "--summary", tmp_path / "a_sum.csv"]),
        (files, ["--method", "reflect", "--floor-db", "-70", "--max-error", "20"]),
        (two, ["--method", "series", "--target-z", "1k"]),
        (two, ["--method", "shunt", "--z0", "50"]),
    ]
    for paths, args in runs:
        code, out, err = run_cli("extract", *paths, *args)
        assert code in (0, 1), err
        assert "error:" not in err and "Traceback" not in err
    code, out, err = run_cli("extract", *[f for f in files if "overlapping" in f])
    assert err.count("warning:") == 2 and "overlapping sweep segments" in err
    rows = list(csv.DictReader((tmp_path / "a_sum.csv").open()))
    assert len(rows) == len(files) and all(r["pass"] in ("pass", "fail") for r in rows)


def test_real_sleeve_single_file(run_cli, real_dir, tmp_path):
    # SOURCES.md: near 10 MHz the sleeve measures about 6.3 + j24 Ω series-through.
    p = real_dir / "snap-on-sleeve" / "sleeve-1turn-series-through.s2p"
    j = tmp_path / "s.json"
    code, out, err = run_cli("extract", p, "--band", "1-30MHz", "--json", j, "--plot", tmp_path / "s.png")
    assert code == 0, err
    res = json.loads(j.read_text())["results"][0]
    f = np.array(res["frequency_hz"])
    i = int(np.argmin(np.abs(f - 10e6)))
    assert res["resistance_ohm"][i] == pytest.approx(6.3, abs=0.5)
    assert res["summary"]["points_valid"] < res["summary"]["points_in_band"]  # 1–3 MHz too close to a through


def test_real_batch_subprocess(real_dir):
    # The console entry point on the real files: no traceback, exit 1 (some fail 10 Ω), warnings once each.
    files = _real_files(real_dir)
    r = subprocess.run([sys.executable, "-m", "cmcheck", "extract", *files, "--band", "1-30MHz", "--target-r", "10"],
                       capture_output=True, text=True)
    assert r.returncode == 1, r.stderr
    # 2 reader warnings; each transformer through (2 files) is not one series element: its S11
    # contradicts S21 (Pozar, Microwave Engineering 4th ed. §4.4: one element gives |S11| = |1 − S21|).
    assert "Traceback" not in r.stderr and r.stderr.count("warning:") == 4
    assert r.stderr.count("S11 does not follow S21") == 2


def test_four_port_common_mode_impedance_and_cmrr(run_cli, tmp_path):
    # Two uncoupled conductors each of series Z (circuit theory): the common mode sees Z/2
    # (Bockelman & Eisenstadt common mode referred to Z0/2, series-through relation of Pozar).
    z = _choke_z()
    s21 = series_s21(z, Z0)
    s = np.zeros((F.size, 4, 4), complex)
    for a, b in ((0, 2), (1, 3)):
        s[:, a, a] = s[:, b, b] = 1 - s21
        s[:, a, b] = s[:, b, a] = s21
    p = _snp(tmp_path / "pair.s4p", s)
    j = tmp_path / "p.json"
    code, out, err = run_cli("extract", p, "--json", j, "--band", "1-10MHz", "--target-r", "400")
    assert code == 0, err
    res = json.loads(j.read_text())["results"][0]
    assert res["method"] == "mixed" and res["balance"] == "four-port"
    assert np.allclose(res["resistance_ohm"], (z / 2).real, rtol=1e-8)
    # No mode conversion and identical conductors: no imbalance.
    assert np.allclose(res["amplitude_imbalance_db"], 0, atol=1e-9)


def test_no_differential_transmission_fails_a_cmrr_limit(run_cli, tmp_path):
    # Bockelman & Eisenstadt: S31 = S21 gives Sds21 = 0, CMRR = −∞ dB; that must fail a limit.
    s21 = np.full(F.size, 0.5 + 0j)
    a = _s2p(tmp_path / "a.s2p", None, s21=s21)
    code, out, err = run_cli("extract", "--legs", a, a, "--target-cmrr", "10")
    assert code == 1 and "FAIL" in out


def test_cal_error_widens_or_narrows_validity(run_cli, tmp_path):
    # First-order error model (cmcheck.measurement.validity): a smaller calibration residual resolves lower Z
    # series-through; a 5 Ω point is invalid at 1 % and valid at 0.1 %.
    f = np.array([1e6, 2e6, 3e6])
    p = _s2p(tmp_path / "low.s2p", np.array([5.0, 50.0, 500.0]) + 0j, f=f)
    for cal, expected in (("1", "2 of 3 points valid"), ("0.1", "3 of 3 points valid")):
        code, out, err = run_cli("extract", p, "--cal-error", cal)
        assert code == 0 and expected in out, out
    assert run_cli("extract", p, "--max-error", "abc")[0] == 2


def test_help_ranges_follow_the_error_model(run_cli):
    # The ranges printed in the help come from cmcheck.measurement.validity with the default settings.
    from cmcheck.measurement.validity import Accuracy, reflection_error, through_error

    a = Accuracy()
    z = np.geomspace(0.1, 1e7, 20001)
    e_s, _ = through_error(2 * Z0 / (2 * Z0 + z), a.cal_error, a.noise)
    e_r, _ = reflection_error((z - Z0) / (z + Z0), a.cal_error, a.noise)
    ok_s, ok_r = z[e_s <= a.max_error], z[e_r <= a.max_error]
    assert ok_s.min() == pytest.approx(11, rel=0.05) and ok_s.max() == pytest.approx(90e3, rel=0.05)
    assert ok_r.min() == pytest.approx(2.8, rel=0.05) and ok_r.max() == pytest.approx(890, rel=0.05)
    out = run_cli("extract", "--help")[1]
    assert "11 Ω to 90 kΩ" in out and "2.8 Ω to 890 Ω" in out


def test_unresolvable_points_reading_below_target_fail(run_cli, tmp_path):
    # A unit passes QA only on evidence: series-through cannot resolve a near-short
    # (Z = 2·Z0·(1 − S21)/S21 with S21 → 1, Pozar Table 4.2), so a choke that collapses to
    # 0.05 Ω at the low end must not pass on its other, valid points.
    z = np.where(F < 3e6, 0.05 + 0j, 3000.0 + 0j)
    p = _s2p(tmp_path / "collapsing.s2p", z)
    code, out, err = run_cli("extract", p, "--band", "1-30MHz", "--target-r", "1k")
    assert code == 1, out + err
    assert "even allowing for their error" in out


def _balun3(path, s31_over_s21):
    """A 3-port balun: port 1 unbalanced, S21 = 0.7 to port 2, S31 to port 3, matched ports."""
    s = np.zeros((F.size, 3, 3), complex)
    s[:, 1, 0] = s[:, 0, 1] = 0.7
    s[:, 2, 0] = s[:, 0, 2] = 0.7 * s31_over_s21
    return _snp(path, s)


def test_well_balanced_balun_passes_on_its_error_bound(run_cli, tmp_path):
    # CMRR = 20·log10|(S21 − S31)/(S21 + S31)| (Bockelman & Eisenstadt 1995): S31 = −0.993·S21
    # gives ≈ 49 dB, beyond what a 1 % calibration residual resolves, but its lower bound
    # (≈ 37 dB) still proves a 20 dB limit; S31 = −0.886·S21 (≈ 24 dB) is resolvable and passes.
    good = _balun3(tmp_path / "good.s3p", -0.993)
    fair = _balun3(tmp_path / "fair.s3p", -0.886)
    code, out, err = run_cli("extract", good, fair, "--band", "1-30MHz", "--target-cmrr", "20")
    assert code == 0, out + err
    # A 45 dB limit cannot be proven from the 49 dB reading: inconclusive, not a pass.
    code, out, err = run_cli("extract", good, "--band", "1-30MHz", "--target-cmrr", "45")
    assert code == 1 and "inconclusive" in out


def test_high_impedance_reflection_judged_by_bounds(run_cli, tmp_path):
    # Reflection Z = Z0(1 + S11)/(1 − S11) (Pozar eq. 2.35): 5 kΩ is far from Z0 (first-order
    # error ≈ 2ε/|1 − S11²| ≈ 50 % with ε = 1 %), so it is not a valid point; its lower bound
    # (≈ 2.5 kΩ) still proves a 1 kΩ |Z| limit.
    z = np.full(F.size, 5000.0 + 0j)
    s11 = (z - Z0) / (z + Z0)
    p = tmp_path / "high.s1p"
    p.write_text("# Hz S RI R 50\n" + "\n".join(f"{a:.10g} {b.real:.12g} {b.imag:.12g}" for a, b in zip(F, s11)) + "\n")
    code, out, err = run_cli("extract", p, "--band", "1-30MHz", "--target-z", "1k")
    assert code == 0, out + err
    code, out, err = run_cli("extract", p, "--band", "1-30MHz", "--target-z", "4k")
    assert code == 1 and "inconclusive" in out
