"""A method chosen against a two-port file's own evidence warns (cmcheck.measurement.evidence).

Circuits are built with scikit-rf (an independent network library): one series impedance or one
shunt admittance between the ports gives |S11| = |1 − S21| (Pozar, *Microwave Engineering*,
4th ed., §4.4), a series element with a path to ground does not.
"""

from __future__ import annotations

import warnings

import numpy as np
import pytest
import skrf
import skrf.media

from cmcheck.errors import CmcheckWarning
from cmcheck.measurement.evidence import method_doubts
from cmcheck.measurement.methods import extract
from cmcheck.measurement.touchstone import SParameters

F = np.geomspace(1e6, 100e6, 41)


def _m():
    return skrf.media.DefinedGammaZ0(skrf.Frequency.from_f(F, unit="hz"), z0=50.0)


def _sweep(ntwk, name="x.s2p"):
    return SParameters(name, F.copy(), ntwk.s.astype(complex).copy(), 50.0)


def _choke(m):
    return m.resistor(300.0) ** m.inductor(20e-6)  # a series R-L, kilohms in the band


def test_series_element_read_as_series_raises_no_doubt():
    assert method_doubts(_sweep(_choke(_m())), "series", 0.01) == []


def test_a_reference_plane_offset_does_not_raise_a_doubt():
    # 30 cm of 50 Ω line before the part turns S11's phase a lot at 100 MHz, not its magnitude.
    m = _m()
    ntwk = m.line(0.3, unit="m") ** _choke(m) ** m.line(0.3, unit="m")
    s = ntwk.s.copy()
    # Put the line back out of S21 only (as a through calibration would), leaving S11 offset.
    s[:, 1, 0] = _choke(m).s[:, 1, 0]
    sw = SParameters("x.s2p", F.copy(), s, 50.0)
    assert method_doubts(sw, "series", 0.01) == []


def test_shunt_element_read_as_shunt_raises_no_doubt():
    m = _m()
    assert method_doubts(_sweep(m.shunt_resistor(2.0) ** m.shunt_inductor(1e-9)), "shunt", 0.01) == []


def test_series_element_with_a_path_to_ground_is_doubted():
    # 50 Ω to ground at port 1, then the choke: port 1 looks matched (S11 ≈ 0) while the
    # through is small, which no single element between the ports gives.
    m = _m()
    doubts = method_doubts(_sweep(m.shunt_resistor(50.0) ** _choke(m)), "series", 0.01)
    assert len(doubts) == 1 and "S11 does not follow S21" in doubts[0]


def test_reflection_of_a_through_is_doubted_and_extract_warns():
    sw = _sweep(_m().resistor(50.0))  # |S21| = 0.8: plainly a through
    doubts = method_doubts(sw, "reflect", 0.01)
    assert len(doubts) == 1 and "S21 shows a through" in doubts[0] and "50 Ω" in doubts[0]
    with warnings.catch_warnings(record=True) as w:
        warnings.simplefilter("always")
        ex = extract(sw, "reflect")
    assert any(issubclass(x.category, CmcheckWarning) and "S21 shows a through" in str(x.message) for x in w)
    # What the warning is about: the reflection reads Z + 50 Ω (port 2's termination), not Z.
    assert np.allclose(ex.curve.z.real, 100.0, rtol=1e-6) and np.allclose(ex.curve.z.imag, 0.0, atol=1e-6)


def test_reflection_of_a_two_port_without_through_raises_no_doubt():
    s = np.zeros((F.size, 2, 2), complex)
    s[:, 0, 0] = 0.3 + 0.1j  # S21 never measured (zeros)
    assert method_doubts(SParameters("x.s2p", F.copy(), s, 50.0), "reflect", 0.01) == []


@pytest.mark.parametrize("name, method, doubted", [
    ("efhw-transformers/single-cal-2400ohm-series-through.s2p", "series", False),  # a resistor in series
    ("snap-on-sleeve/sleeve-1turn-series-through.s2p", "series", False),  # a sleeve on a wire
    ("efhw-transformers/single-3t21t-through-2400ohm-series.s2p", "series", True),  # a transformer
    ("snap-on-sleeve/sleeve-1turn-series-through.s2p", "reflect", True),
])
def test_real_files(real_dir, name, method, doubted):
    from cmcheck.measurement.touchstone import read_touchstone

    assert bool(method_doubts(read_touchstone(real_dir / name), method, 0.01)) is doubted
