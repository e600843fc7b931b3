"""Hostile and absurd input across every command: exit 2 (1 where a limit fails), one line naming
the problem, no traceback, and every output file left as it was.

Run in-process (the ``run_cli`` fixture); one subprocess test per command proves the exit path
of the installed entry point. The ranges are those of :mod:`cmcheck.limits`.

Sources of the check values (none is a measured or published physical value):

- exit statuses: 2 = bad input, 1 = a limit fails (``EXIT_BAD_INPUT`` / ``EXIT_LIMIT_FAILED``),
  the project's convention in cmcheck/cli/app.py; the single ``error: …`` line is the project's
  one error handler, cmcheck/cli/main.py.
- ranges in the expected words (``1 mm – 1 m``, ``1 – 64``, ``1 nF``, ``AWG 0000 – 46``,
  ``10 mm``, ``100 mm``, ``1 kHz – 3 GHz``, ``100000``): cmcheck/limits.py, the project's own
  table (CORE_DIMENSION, STACK, CP, GAUGE / WIRE_DIAMETER, INSULATION, CABLE_OD, ANALYTIC_BAND,
  INITIAL_PERMEABILITY / MAX_PERMEABILITY); the gauge range is the one limits.py attributes to
  ASTM B258.
- the other expected words (``positive``, ``≥ 0``, ``needs a unit``, ``low edge``,
  ``inconclusive``, …): the project's own error and warning texts (cmcheck/limits.py,
  cmcheck/units.py, cmcheck/model/materials.py, cmcheck/measurement/qa.py, evidence.py).
- the absurd inputs themselves (1e300 m, 1000 cores, 3 µF, 99 AWG, µ' = −800, …): invented test
  values, chosen to lie outside those ranges.
"""

from __future__ import annotations

import subprocess
import sys

import numpy as np
import pytest

# Invented test inputs: a 20 × 10 × 5 mm ring, 3 turns, of nizn-650 (a member of the project's
# built-in NiZn family, cmcheck/model/families.py); plausible, not taken from any data sheet.
D = ("--material", "nizn-650", "--od", "20mm", "--id", "10mm", "--height", "5mm", "--turns", "3")
RING = ("--od", "20mm", "--id", "10mm", "--height", "5mm", "--turns", "3")


def _s2p(path, z):
    """A series-through two-port of impedance z (one value per point) between 50 Ω ports."""
    f = np.geomspace(1e6, 100e6, 21)  # invented test sweep: 21 points, 1–100 MHz
    z = np.broadcast_to(np.asarray(z, complex), f.shape)
    s21, s11 = 100.0 / (z + 100.0), z / (z + 100.0)  # Pozar 4th ed. Table 4.2 (series impedance)
    rows = [f"{fi:.6g} {a.real:.9g} {a.imag:.9g} {b.real:.9g} {b.imag:.9g} {b.real:.9g} {b.imag:.9g} "
            f"{a.real:.9g} {a.imag:.9g}" for fi, a, b in zip(f, s11, s21)]
    path.write_text("# Hz S RI R 50\n" + "\n".join(rows) + "\n")
    return path


@pytest.fixture
def files(tmp_path):
    """Input files of the table, by name."""
    w = 2 * np.pi * np.geomspace(1e6, 100e6, 21)
    # Every value in these files is an invented test input: a plausible 300 Ω + 20 µH choke, a
    # 0.01 Ω near-short, a pickle header (b"\x80\x04\x95", Python's pickle protocol 4 opcodes),
    # and tables/size rows made absurd on purpose (µ' = −800, 1e300, µ'' < 0, OD 2 km, NaN).
    # The CSV headers are the project's own formats (cmcheck/model/materials.py,
    # cmcheck/design size tables).
    out = {
        "ok": _s2p(tmp_path / "ok.s2p", 300 + 1j * w * 20e-6),
        "tiny": _s2p(tmp_path / "tiny.s2p", 0.01),  # S21 ≈ 1: no point resolvable series-through
        "pickle": tmp_path / "evil.s2p",
        "neg_mu": tmp_path / "neg.csv",
        "huge_mu": tmp_path / "huge.csv",
        "lossy_gain": tmp_path / "gain.csv",
        "bad_sizes": tmp_path / "sizes.csv",
        "nan_sizes": tmp_path / "nan_sizes.csv",
    }
    out["pickle"].write_bytes(b"\x80\x04\x95\x00\x00\x00\x00\x00\x00\x00\x00.")
    head = "frequency_hz,mu_prime,mu_double_prime\n"
    out["neg_mu"].write_text(head + "1e6,-800,10\n1e7,100,100\n")
    out["huge_mu"].write_text(head + "1e6,1e300,10\n1e7,100,100\n")
    out["lossy_gain"].write_text(head + "1e6,800,-10\n1e7,100,100\n")
    out["bad_sizes"].write_text("kind,od_mm,id_mm,height_mm\nring,2e6,10,5\n")
    out["nan_sizes"].write_text("kind,od_mm,id_mm,height_mm\nring,nan,10,5\n")
    return out


# (name, args with {file} placeholders, expected status, words the one error line must contain)
# Statuses: 2 = bad input, 1 = a limit fails, the project's convention in cmcheck/cli/app.py.
# Ranges in the words: cmcheck/limits.py, the project's own table (see the module docstring);
# the other words are the project's own message texts. Inputs are invented, absurd on purpose.
CASES = [
    # predict: absurd dimensions, stacks, capacitance, wire, bands
    ("od 1e300 m", ("predict", *D[:2], "--od", "1e300m", "--id", "10mm", "--height", "5mm", "--turns", "3", "--band", "1-30MHz"), 2, ["--od", "1e+300 m", "1 mm – 1 m"]),
    ("od below 1 mm", ("predict", *D[:2], "--od", "0.5mm", "--id", "0.2mm", "--height", "5mm", "--turns", "1", "--band", "1-30MHz"), 2, ["--od", "1 mm – 1 m"]),
    ("id negative", ("predict", *D[:2], "--od", "20mm", "--id", "-10mm", "--height", "5mm", "--turns", "3", "--band", "1-30MHz"), 2, ["ID", "positive"]),
    ("id above od", ("predict", *D[:2], "--od", "20mm", "--id", "30mm", "--height", "5mm", "--turns", "3", "--band", "1-30MHz"), 2, ["smaller than OD"]),
    ("height 2 m", ("predict", *D[:2], "--od", "20mm", "--id", "10mm", "--height", "2m", "--turns", "3", "--band", "1-30MHz"), 2, ["--height", "1 mm – 1 m"]),
    ("length without unit", ("predict", *D[:2], "--od", "20", "--id", "10mm", "--height", "5mm", "--turns", "3", "--band", "1-30MHz"), 2, ["--od", "needs a unit"]),
    ("1000 cores", ("predict", *D, "--cores", "1000", "--band", "1-30MHz"), 2, ["--cores", "1 – 64"]),
    ("0 cores", ("predict", *D, "--cores", "0", "--band", "1-30MHz"), 2, ["--cores"]),
    ("cp 3 µF", ("predict", *D, "--cp", "3µF", "--band", "1-30MHz"), 2, ["--cp", "3 µF", "1 nF"]),
    ("cp negative", ("predict", *D, "--cp", "-2pF", "--band", "1-30MHz"), 2, ["--cp", "≥ 0"]),
    ("cp nonsense unit", ("predict", *D, "--cp", "2.8pH", "--band", "1-30MHz"), 2, ["--cp"]),
    ("wire 99 awg", ("predict", *D, "--wire", "99awg", "--band", "1-30MHz"), 2, ["--wire", "99awg", "AWG 0000 – 46"]),
    ("wire 1 µm", ("predict", *D, "--wire", "0.001mm", "--band", "1-30MHz"), 2, ["--wire", "AWG 46"]),
    ("insulation negative", ("predict", *D, "--insulation", "-1mm", "--band", "1-30MHz"), 2, ["--insulation", "≥ 0"]),
    ("insulation 5 m", ("predict", *D, "--insulation", "5m", "--band", "1-30MHz"), 2, ["--insulation", "10 mm"]),
    ("cable 2 m", ("predict", *RING, "--material", "nizn-650", "--cable-od", "2m", "--band", "1-30MHz"), 2, ["--cable-od", "100 mm"]),
    ("turns 0", ("predict", *D[:8], "--turns", "0", "--band", "1-30MHz"), 2, ["--turns", "≥ 1"]),
    ("band 39 decades", ("predict", *D, "--band", "1e-9-1e30Hz"), 2, ["--band", "1 kHz – 3 GHz"]),
    ("band reversed", ("predict", *D, "--band", "30-1MHz"), 2, ["--band", "low edge"]),
    ("band garbage", ("predict", *D, "--band", "lots"), 2, ["--band"]),
    ("band without unit", ("predict", *D, "--band", "7-7.3"), 2, ["--band", "MHz"]),
    ("material unknown", ("predict", *RING, "--material", "unobtainium", "--band", "1-30MHz"), 2, ["unobtainium"]),
    ("family member µi 1e8", ("predict", *RING, "--material", "nizn-99999999", "--band", "1-30MHz"), 2, ["initial permeability"]),
    ("table µ' −800", ("predict", *RING, "--material", "{neg_mu}", "--band", "1-10MHz"), 2, ["mu_prime = -800", "lowest frequency"]),
    ("table µ 1e300", ("predict", *RING, "--material", "{huge_mu}", "--band", "1-10MHz"), 2, ["1e+300", "100000"]),
    ("table µ'' < 0", ("predict", *RING, "--material", "{lossy_gain}", "--band", "1-10MHz"), 2, ["mu_double_prime", "≥ 0"]),
    ("band beyond table", ("predict", *RING, "--material", "{neg_mu}".replace("neg_mu", "ok_mu"), "--band", "1-30MHz"), 2, ["--band"]),
    ("two-hole length 14 km", ("predict", "--material", "nizn-650", "--width", "14mm", "--thickness", "8mm", "--length", "14m", "--hole", "3.5mm", "--hole-spacing", "6mm", "--turns", "2", "--band", "1-30MHz"), 2, ["--length", "1 mm – 1 m"]),
    ("core factor negative", ("predict", "--material", "nizn-650", "--core-factor", "-5", "--turns", "3", "--band", "1-30MHz"), 2, ["--core-factor", "positive"]),
    ("window 5 m", ("predict", "--material", "nizn-650", "--core-factor", "1000", "--window", "5m", "--turns", "3", "--band", "1-30MHz"), 2, ["--window", "1 mm – 1 m"]),
    # materials
    ("materials band 1 Hz", ("materials", "nizn-650", "--band", "1Hz-1MHz"), 2, ["--band", "1 kHz – 3 GHz"]),
    ("materials band 300 GHz", ("materials", "nizn-650", "--band", "1-300GHz"), 2, ["--band", "3 GHz"]),
    ("materials table µ' −800", ("materials", "{neg_mu}", "--band", "1-10MHz"), 2, ["mu_prime"]),
    ("materials unknown", ("materials", "nope-12"), 2, ["nope-12"]),
    # extract
    ("extract pickle", ("extract", "{pickle}"), 2, ["evil.s2p"]),
    ("extract missing file", ("extract", "{ok}x"), 2, ["not found"]),
    ("extract z0 negative", ("extract", "{ok}", "--z0", "-50"), 2, ["--z0", "positive"]),
    ("extract z0 infinite", ("extract", "{ok}", "--z0", "1e400"), 2, ["--z0", "finite"]),
    ("extract floor above 0 dB", ("extract", "{ok}", "--floor-db", "5"), 2, ["--floor-db"]),
    ("extract cal error 200 %", ("extract", "{ok}", "--cal-error", "200"), 2, ["--cal-error"]),
    ("extract target negative", ("extract", "{ok}", "--target-r", "-5"), 2, ["--target-r", "positive"]),
    ("extract target cmrr nan", ("extract", "{ok}", "--target-cmrr", "nan"), 2, ["--target-cmrr"]),
    ("extract unknown method", ("extract", "{ok}", "--method", "foo"), 2, ["--method"]),
    ("extract band 39 decades", ("extract", "{ok}", "--band", "1e-9-1e30Hz", "--target-r", "10"), 1, ["does not cover the band"]),
    ("extract no valid point under a limit", ("extract", "{tiny}", "--method", "series", "--target-r", "1"), 1, ["inconclusive"]),
    # size
    ("size band 39 decades", ("size", "--band", "1e-9-1e30Hz"), 2, ["--band", "1 kHz – 3 GHz"]),
    ("size cable 1e9 m", ("size", "--band", "1-30MHz", "--cable-od", "1e9m"), 2, ["--cable-od", "100 mm"]),
    ("size wire 99 awg", ("size", "--band", "1-30MHz", "--wire", "99awg"), 2, ["--wire", "AWG"]),
    ("size target 0", ("size", "--band", "1-30MHz", "--target-r", "0"), 2, ["--target-r", "positive"]),
    ("size bend negative", ("size", "--band", "1-30MHz", "--min-bend-radius", "-1mm"), 2, ["--min-bend-radius"]),
    ("size power negative", ("size", "--band", "1-30MHz", "--power", "-5W", "--cm-voltage", "10V"), 2, ["--power"]),
    ("size table ring 2 km", ("size", "--band", "1-30MHz", "--sizes", "{bad_sizes}", "--no-builtin-sizes"), 2, ["sizes.csv"]),
    ("size table nan", ("size", "--band", "1-30MHz", "--sizes", "{nan_sizes}", "--no-builtin-sizes"), 2, ["nan_sizes.csv"]),
    ("size table µ' −800", ("size", "--band", "1-10MHz", "--materials", "{neg_mu}"), 2, ["mu_prime"]),
    # 10.3 mm cable: an invented input whose bend limit lets no built-in size reach the default
    # 1 kΩ target; exit 1 = a limit fails (cmcheck/cli/app.py).
    ("size nothing meets the target", ("size", "--band", "1-30MHz", "--cable-od", "10.3mm"), 1, []),
    # compare
    ("compare od 1e300 m", ("compare", "--materials", "nizn-650", "--od", "1e300m", "--id", "10mm", "--height", "5mm", "--turns", "3", "--band", "1-30MHz"), 2, ["--od", "1 mm – 1 m"]),
    ("compare band 30 GHz", ("compare", "--materials", "nizn-650", *RING, "--band", "1-30GHz"), 2, ["--band", "3 GHz"]),
    ("compare cp 3 µF", ("compare", "--materials", "nizn-650", *RING, "--cp", "3uF", "--band", "1-30MHz"), 2, ["--cp", "1 nF"]),
    ("compare line r negative", ("compare", "--materials", "nizn-650,mnzn-1000", *RING, "--band", "1-30MHz", "--line-r-max", "-1"), 2, ["--line-r-max"]),
]

#: A batch reports an unreadable file in its outputs and goes on (exit 2 at the end): these
#: cases leave the outputs out (tests/test_extract_cli.py checks what a batch writes).
PER_FILE = {"extract pickle", "extract missing file"}

#: Output options each command writes, pre-created and checked unchanged after a failing run.
OUTPUTS = {"predict": ("--json", "--csv"), "materials": ("--json",), "extract": ("--json", "--csv", "--summary"),
           "size": ("--json",), "compare": ("--json",)}


def _fill(args, files, tmp_path):
    ok_mu = tmp_path / "ok_mu.csv"
    ok_mu.write_text("frequency_hz,mu_prime,mu_double_prime\n1e6,800,10\n1e7,100,100\n")
    paths = {**{k: str(v) for k, v in files.items()}, "ok_mu": str(ok_mu)}
    return [a.format(**paths) if "{" in a else a for a in args]


def test_the_table_has_40_cases_over_every_command():
    # 40: the project's own minimum for this table, no published source; every command of OUTPUTS.
    assert len(CASES) >= 40
    assert {c[1][0] for c in CASES} == set(OUTPUTS)


@pytest.mark.parametrize("name, args, status, words", CASES, ids=[c[0] for c in CASES])
def test_bad_input(run_cli, files, tmp_path, name, args, status, words):
    argv = _fill(args, files, tmp_path)
    outs = {}
    for opt in OUTPUTS[argv[0]]:
        p = tmp_path / f"out{opt.replace('-', '_')}"
        p.write_text("before\n")
        outs[opt] = p
    if status == 2 and name not in PER_FILE:
        argv += [x for opt, p in outs.items() for x in (opt, str(p))]
    code, out, err = run_cli(*argv)
    # status and words come from CASES (sources above); "before\n" is this test's own marker,
    # and unchanged outputs are the project's rule "outputs are atomic" (DEVELOPERS.md).
    assert code == status, err
    assert "Traceback" not in err + out
    if status == 2:
        lines = [ln for ln in err.splitlines() if ln.startswith("error:")]
        assert len(lines) == 1, err
        for w in words:
            assert w in lines[0], lines[0]
        for p in outs.values():
            assert p.read_text() == "before\n"  # no half-written output
    else:
        for w in words:
            assert w in out + err


def test_band_at_a_tables_edge_warns_with_the_stretched_range(run_cli, tmp_path):
    m = tmp_path / "m.csv"
    # Invented table over 1–10 MHz; a band 5 % beyond each end is inside the project's own
    # stretch allowance (EXTRAPOLATION_RATIO = 1.1, cmcheck/model/materials.py), so it warns
    # (exit 0) naming the stretched ranges in the project's own format.
    m.write_text("frequency_hz,mu_prime,mu_double_prime\n1e6,800,10\n1e7,100,100\n")
    code, _, err = run_cli("predict", *RING, "--material", m, "--band", "0.95-10.5MHz")
    assert code == 0
    assert "warning:" in err and "950 kHz – 1 MHz" in err and "10 MHz – 10.5 MHz" in err


def test_no_valid_point_without_a_limit_warns(run_cli, files):
    # exit 0 without a limit (cmcheck/cli/app.py); the warning text is the project's own
    # (cmcheck/measurement/qa.py).
    code, _, err = run_cli("extract", files["tiny"], "--method", "series")
    assert code == 0
    assert "warning:" in err and "no valid point in the band" in err


def test_reflection_of_a_through_warns_on_the_command_line(run_cli, files):
    # the warning text is the project's own (cmcheck/measurement/evidence.py)
    code, _, err = run_cli("extract", files["tiny"], "--method", "reflect")
    assert code == 0 and "S21 shows a through" in err and "--method series" in err


@pytest.mark.parametrize("argv", [
    ("predict", *D, "--od", "1e300m", "--band", "1-30MHz"),
    ("materials", "nizn-650", "--band", "1Hz-1MHz"),
    ("extract", "/nonexistent/x.s2p"),
    ("size", "--band", "1e-9-1e30Hz"),
    ("compare", "--materials", "nizn-650", *RING, "--cp", "3uF", "--band", "1-30MHz"),
], ids=["predict", "materials", "extract", "size", "compare"])
def test_exit_path_of_the_entry_point(argv):
    # exit 2 = bad input, the project's convention in cmcheck/cli/app.py; one "error:" line and
    # nothing on stdout, the project's one error handler (cmcheck/cli/main.py).
    r = subprocess.run([sys.executable, "-m", "cmcheck", *argv], capture_output=True, text=True)
    assert r.returncode == 2
    assert "Traceback" not in r.stderr and r.stderr.count("error:") == 1 and r.stdout == ""
