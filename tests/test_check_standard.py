"""The calibration residual estimated from the user's own check standard (--check-standard).

Sources: the standards are synthetic, with invented deviations (0.1 %, 0.4 %, 2 %, 80 %) built
in so the expected residual is known by construction. The 95th percentile, the refusal of a
"standard" deviating by 0.5 or more and the 1 % default calibration error are the project's own
choices in cmcheck/measurement/validity.py (which marks the percentile "common practice, no
published source" and the 1 % default "from memory"). Messages and JSON keys are the project's
own (validity.py, cmcheck/measurement/qa.py); exit 2 = bad input, cmcheck/cli/app.py.
"""

from __future__ import annotations

import json

import numpy as np
import pytest

from cmcheck.errors import MeasurementError
from cmcheck.measurement.touchstone import SParameters
from cmcheck.measurement.validity import check_standard_residual

F = np.geomspace(1e6, 100e6, 101)  # invented test sweep: 101 points, 1–100 MHz


def _through(dev):
    s = np.zeros((F.size, 2, 2), complex)
    s[:, 1, 0] = s[:, 0, 1] = 1.0 + dev * np.exp(1j * np.linspace(0, 6, F.size))
    s[:, 0, 0] = s[:, 1, 1] = 0.3 * dev  # invented: reflection below the S21 deviation, so S21 sets the residual
    return SParameters("thru.s2p", F.copy(), s, 50.0)


def _write(path, sw):
    rows = []
    for fi, m in zip(sw.frequency_hz, sw.s):
        vals = [m[0, 0], m[1, 0], m[0, 1], m[1, 1]]
        rows.append(f"{fi:.9g} " + " ".join(f"{v.real:.9g} {v.imag:.9g}" for v in vals))
    path.write_text("# Hz S RI R 50\n" + "\n".join(rows) + "\n")
    return path


def test_a_through_with_a_known_deviation_gives_that_residual():
    # |S21 − 1| = dev at every point by construction of the standard; the estimate must find it.
    r, text = check_standard_residual(_through(0.004))
    assert r == pytest.approx(0.004, rel=1e-9)
    assert "0.4 %" in text and "thru.s2p" in text  # 0.004 as the project's own message prints it (validity.py)


def test_a_matched_load_gives_its_reflection():
    # invented load: |S11| = 0.02 everywhere but the last 3 points; the 95th percentile is the
    # project's choice (validity.py, "common practice, no published source")
    s = np.full((F.size, 1, 1), 0.02 + 0.0j)
    s[-3:, 0, 0] = 0.3  # 3 % of the points glitched: left out by the 95th percentile
    r, _ = check_standard_residual(SParameters("load.s1p", F.copy(), s, 50.0))
    assert r == pytest.approx(0.02)


def test_not_a_standard_is_refused():
    with pytest.raises(MeasurementError) as e:
        check_standard_residual(_through(0.8))  # invented: beyond the project's 0.5 refusal (validity.py)
    assert e.value.parameter == "check_standard"  # the parameter name of the project's table, cmcheck/cli/flags.py


def test_the_residual_replaces_the_default_in_validity(run_cli, tmp_path):
    # A 200 kΩ series-through point with the noise far below: its estimated error is about the
    # calibration residual (S21's relative error carries into Z one to one at high |Z|, first
    # order of Pozar Table 4.2's Z = 2·Z0·(1 − S21)/S21): beyond a 1 % tolerance at the 1 %
    # default, within it at the 0.1 % the check standard shows.
    # 200 kΩ, 1 % tolerance (--max-error 1), −110 dB floor and the 0.1 % standard: invented test
    # values; the 1 % default residual is the project's (validity.py, "from memory").
    z = 200e3
    s = np.zeros((F.size, 2, 2), complex)
    s[:, 1, 0] = s[:, 0, 1] = 100.0 / (z + 100.0)  # series-through: Pozar 4th ed. Table 4.2 (Z0 = 50 Ω)
    s[:, 0, 0] = s[:, 1, 1] = z / (z + 100.0)
    dut = _write(tmp_path / "dut.s2p", SParameters("dut.s2p", F.copy(), s, 50.0))
    good = _write(tmp_path / "thru.s2p", _through(0.001))
    j1, j2 = tmp_path / "a.json", tmp_path / "b.json"
    assert run_cli("extract", dut, "--json", j1, "--floor-db", "-110", "--max-error", "1")[0] == 0
    code, _, err = run_cli("extract", dut, "--json", j2, "--floor-db", "-110", "--max-error", "1", "--check-standard", good)
    # the note is the project's own text (validity.py); exit 0 = success (cmcheck/cli/app.py)
    assert code == 0 and "note: calibration residual from the check standard" in err and "0.1 %" in err
    # JSON keys results/summary/points_valid: the project's own names (DEVELOPERS.md, "Names" table)
    v1 = json.loads(j1.read_text())["results"][0]["summary"]["points_valid"]
    v2 = json.loads(j2.read_text())["results"][0]["summary"]["points_valid"]
    assert v1 == 0 and v2 == F.size


def test_check_standard_and_cal_error_together_are_refused(run_cli, tmp_path):
    good = _write(tmp_path / "thru.s2p", _through(0.001))
    code, _, err = run_cli("extract", good, "--check-standard", good, "--cal-error", "2")
    # exit 2 = bad input, the project's convention in cmcheck/cli/app.py; one "error:" line (cli/main.py)
    assert code == 2 and err.count("error:") == 1 and "--check-standard" in err
