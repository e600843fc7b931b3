"""Independent real measurements (../shared/real-measurements, read in place; skipped when absent)."""

from __future__ import annotations

import warnings

import numpy as np
import pytest

from cmcheck.measurement.qa import Limits, evaluate_files, exit_status
from cmcheck.errors import CmcheckWarning
from cmcheck.measurement.methods import extract
from cmcheck.measurement.touchstone import read_touchstone
from cmcheck.units import parse_band


def _all(real_dir):
    files = sorted(p for p in real_dir.rglob("*") if p.suffix.lower() in {".s1p", ".s2p", ".s3p", ".s4p"})
    assert files
    return files


def test_every_real_file_is_read_by_every_method_that_fits(real_dir):
    # SOURCES.md: messy real files (|S11| > 1, overlaps, placeholder columns, 30 000 points).
    files = _all(real_dir)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", CmcheckWarning)
        for method in ("auto", "reflect", "series", "shunt"):
            fitting = [p for p in files if method in ("auto", "reflect") or p.suffix == ".s2p"]
            results = evaluate_files(fitting, method=method, limits=Limits(parse_band("1-30MHz"), target_r=10))
            assert all(r.error is None for r in results), [r.error for r in results if r.error]
            assert exit_status(results) in (0, 1)
            for r in results:
                assert r.summary.points_valid <= r.summary.points_in_band


def test_sleeve_series_through_agrees_with_reflection(real_dir):
    # SOURCES.md (snap-on sleeve): the two methods agree within about 15 % in |Z| from 1 to
    # 50 MHz; the issue asks for 20 % from 1 to 30 MHz. The reflection sweep is split at 30 MHz.
    d = real_dir / "snap-on-sleeve"
    series = extract(read_touchstone(d / "sleeve-1turn-series-through.s2p"), "series")
    low = extract(read_touchstone(d / "sleeve-1turn-reflection-0.05-30MHz.s1p"))
    high = extract(read_touchstone(d / "sleeve-1turn-reflection-30-1000MHz.s1p"))
    assert low.method == high.method == "reflect"
    fr = np.concatenate([low.frequency_hz, high.frequency_hz])
    zr = np.concatenate([low.curve.z, high.curve.z])
    assert np.all(np.diff(fr) > 0)
    sel = (series.frequency_hz >= 1e6) & (series.frequency_hz <= 30.5e6)
    f = series.frequency_hz[sel]
    z_refl = np.interp(f, fr, zr.real) + 1j * np.interp(f, fr, zr.imag)
    ratio = np.abs(series.curve.z[sel]) / np.abs(z_refl)
    assert sel.sum() >= 25
    assert np.all(np.abs(ratio - 1) < 0.20), ratio
    # SOURCES.md example: about 6.3 + j24 Ω series-through near 10 MHz.
    i = int(np.argmin(np.abs(series.frequency_hz - 10e6)))
    assert series.curve.z[i].real == pytest.approx(6.3, abs=0.5)
    assert series.curve.z[i].imag == pytest.approx(24, abs=1.5)


def test_overlapping_sweeps_warn(real_dir):
    # SOURCES.md: two files have overlapping sweep segments (frequency goes back).
    for p in real_dir.rglob("*overlapping-sweep*.s1p"):
        with pytest.warns(CmcheckWarning, match="overlapping sweep segments"):
            sp = read_touchstone(p)
        assert np.all(np.diff(sp.frequency_hz) > 0) and sp.dropped_overlap >= 1


def test_reflection_above_one_is_read_and_marked(real_dir):
    # SOURCES.md: calibration slightly off so |S11| > 1 at low frequency; issue 3: read, mark not valid.
    sp = read_touchstone(real_dir / "snap-on-sleeve" / "sleeve-1turn-reflection-0.05-30MHz.s1p")
    over = np.abs(sp.param(1, 1)) > 1
    assert over.any()
    ex = extract(sp)
    assert not ex.valid[over].any() and ex.validity.not_passive[over].all()


def test_series_through_of_the_2400_ohm_resistor(real_dir):
    # SOURCES.md (efhw-transformers, "-cal-" files): a 2400 Ω resistor measured series-through with
    # placeholder S12/S22; at low frequency its |Z| must be close to the nominal value.
    for name, f_max in (("stack2-cal-2400ohm-series-through.s2p", 1e6), ("single-cal-2400ohm-series-through.s2p", 4e6)):
        sp = read_touchstone(real_dir / "efhw-transformers" / name)
        assert sp.is_placeholder(1, 2) and sp.is_placeholder(2, 2)
        ex = extract(sp)
        sel = ex.valid & (ex.frequency_hz <= f_max)
        assert sel.sum() >= 3
        assert np.median(np.abs(ex.curve.z[sel])) == pytest.approx(2400, rel=0.05)
