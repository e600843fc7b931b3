"""Worst-case common-mode current reduction and `cmcheck compare`."""

import json
import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from cmcheck.model.choke import ChokeDesign, predict
from cmcheck.design.compare import compare_materials, current_ratio, worst_case_reduction
from cmcheck.model.cores import RingCore
from cmcheck.errors import DesignError
from cmcheck.model.materials import get_material, Material, Tabulated, builtin_materials
from cmcheck.units import Band
from cmcheck.model.winding import MU0, Cable, Winding


def test_resistive_5k_choke_gives_14_15_db():
    # Series circuit, |Zl/(Zl + Zc)| (Kirchhoff): a 5 kΩ resistive choke gives ≥ 14.15 dB for any line with R ≤ 100 Ω,
    # |X| ≤ 1 kΩ: the closed form √(1 + Rc²/Xmax²) at Zline = ±j·Xmax, i.e. 10·log10(26).
    db, zl = worst_case_reduction(5000.0, 100.0, 1000.0, return_line=True)
    assert db == pytest.approx(14.15, abs=0.005)
    assert db == pytest.approx(10 * math.log10(26.0), rel=1e-12)
    assert zl.real == pytest.approx(0.0, abs=1e-9) and abs(zl.imag) == pytest.approx(1000.0)


def test_inductive_choke_on_capacitive_line_raises_the_current():
    # |Zl/(Zl + Zc)| (Kirchhoff): a +j500 Ω choke on a 50 − j500 Ω line makes the current ten times worse.
    assert 20 * math.log10(current_ratio(50 - 500j, 500j)) == pytest.approx(-20.0, abs=0.05)
    # So the worst case over R ≤ 100 Ω, |X| ≤ 1 kΩ is negative for a mostly inductive choke;
    # with a little loss it is bounded by |Rc|/|Xc| at Zline = −jXc (series resonance, Kirchhoff).
    db, zl = worst_case_reduction(10 + 500j, 100.0, 1000.0, return_line=True)
    assert db < 0
    assert db <= 20 * math.log10(10 / 500) + 1e-9
    assert 0 <= zl.real <= 100 and abs(zl.imag) <= 1000
    # A lossless choke inside the region cancels the line exactly: no guarantee at all.
    assert worst_case_reduction(500j, 100.0, 1000.0) == -math.inf
    # No choke, no change.
    assert worst_case_reduction(0j, 100.0, 1000.0) == pytest.approx(0.0, abs=1e-12)


passive = st.builds(complex, st.floats(0.0, 2e4), st.floats(-2e4, 2e4))


@given(zc=passive, r_max=st.floats(0.0, 500.0), x_max=st.floats(1.0, 3000.0))
@settings(max_examples=60, deadline=None)
def test_worst_case_is_the_exact_minimum(zc, r_max, x_max):
    # Exactness (minimum principle, see worst_case_reduction): the returned line impedance lies
    # in the region and reproduces the value, and no point of a dense brute-force grid is lower.
    db, zl = worst_case_reduction(zc, r_max, x_max, return_line=True)
    assert -1e-9 <= zl.real <= r_max + 1e-9 and abs(zl.imag) <= x_max + 1e-9
    if math.isfinite(db):
        assert 20 * math.log10(current_ratio(zl, zc)) == pytest.approx(db, abs=1e-7)
    r, x = np.meshgrid(np.linspace(0.0, r_max, 41), np.linspace(-x_max, x_max, 401))
    grid = (r + 1j * x).ravel()
    grid = grid[grid != 0]
    with np.errstate(divide="ignore"):
        brute = 20 * np.log10(np.min(current_ratio(grid, zc)))
    assert db <= brute + 1e-7


@given(rc=st.floats(1.0, 1e5), r_max=st.floats(0.0, 1000.0), x_max=st.floats(1.0, 5000.0))
@settings(max_examples=60, deadline=None)
def test_resistive_choke_closed_form(rc, r_max, x_max):
    # For Zc = Rc > 0 the ratio is smallest at a corner with |X| = Xmax: at R = 0,
    # √(1 + Rc²/Xmax²), or at R = Rmax, √(((Rc+Rmax)² + Xmax²)/(Rmax² + Xmax²))
    # (elementary calculus on |Zl + Rc|²/|Zl|² along each side).
    a = 1 + rc**2 / x_max**2
    b = ((rc + r_max) ** 2 + x_max**2) / (r_max**2 + x_max**2)
    assert worst_case_reduction(rc, r_max, x_max) == pytest.approx(10 * math.log10(min(a, b)), abs=1e-9)


def test_region_must_not_be_empty():
    with pytest.raises(DesignError, match="^line_r_max must be ≥ 0 Ω, got -1 Ω") as err:
        worst_case_reduction(100.0, -1.0, 10.0)
    assert err.value.parameter == "line_r_max"
    with pytest.raises(DesignError, match="both be 0"):
        worst_case_reduction(100.0, 0.0, 0.0)


def _flat(mu_p, mu_pp, name):
    f = np.array([1e5, 1e9])
    return Material(name, Tabulated(f, [mu_p, mu_p], [mu_pp, mu_pp], source=name), family="user table")


def test_compare_on_flat_materials_matches_closed_form():
    # IEV 221-03-06: Z = jωL0µ, so with Cp = 0 a frequency-flat µ = µ' − jµ'' gives
    # R = ωL0µ'' (+ the milliohms of the shield), lowest at the band's low edge.
    core = RingCore(61e-3, 35.6e-3, 12.7e-3)
    winding = Winding(6, Cable(5e-3), cp=0.0)
    band = Band.single(3e6, 30e6)
    mats = [_flat(100.0, 50.0, "weak"), _flat(100.0, 400.0, "lossy")]
    res = compare_materials(mats, core, winding, band)
    assert [s.name for s in res.scores] == ["lossy", "weak"]  # ranked by worst case
    l0 = MU0 * 36 / core.c1
    for s, mupp in zip(res.scores, (400.0, 50.0)):
        assert s.min_resistance_hz == pytest.approx(3e6)
        assert s.min_resistance_ohm == pytest.approx(2 * math.pi * 3e6 * l0 * mupp, rel=1e-3)
        # R ∝ f here, so its log-frequency mean is the mean of ωL0µ'' over log f:
        # (R(30 MHz) − R(3 MHz))/ln 10.
        r_hi = 2 * math.pi * 30e6 * l0 * mupp
        assert s.mean_resistance_ohm == pytest.approx((r_hi - s.min_resistance_ohm) / math.log(10), rel=2e-3)
        # µ''/µ' = 4 makes R > |X| everywhere; 0.5 nowhere (IEV 221-03-06 again).
        assert s.resistive_fraction == pytest.approx(1.0 if mupp > 100 else 0.0)
        # The worst case over the band is the closed form evaluated on predict's curve.
        z = predict(ChokeDesign(core, mats[0] if s.name == "weak" else mats[1], winding), band).curve
        expected = np.min(worst_case_reduction(z.in_band(band).z, 100.0, 1000.0))
        assert s.worst_case_reduction_db == pytest.approx(expected)


def test_compare_refuses_duplicates():
    m = get_material("nizn-800")
    with pytest.raises(DesignError, match="more than once"):
        compare_materials([m, m], RingCore(61e-3, 35.6e-3, 12.7e-3), Winding(8, Cable(5e-3)), Band.single(3e6, 30e6))


DESIGN = ["--od", "61mm", "--id", "35.6mm", "--height", "12.7mm", "--turns", "8", "--cable-od", "5mm"]


def test_compare_cli_json_plot_and_ranking(run_cli, tmp_path):
    j, png = tmp_path / "c.json", tmp_path / "c.png"
    code, out, err = run_cli("compare", "--materials", "nizn-800,mnzn-1500,nizn-250", *DESIGN, "--band", "3.5-30MHz",
                             "--json", j, "--plot", png)
    assert code == 0, err
    data = json.loads(j.read_text())
    assert [m["name"] for m in data["materials"]] and len(data["materials"]) == 3
    keys = {"name", "min_resistance_ohm", "mean_resistance_ohm", "peak_resistance_hz", "resistive_fraction",
            "worst_case_reduction_db"}
    for m in data["materials"]:
        assert keys <= set(m)
    wc = [m["worst_case_reduction_db"] for m in data["materials"]]
    assert wc == sorted(wc, reverse=True)
    # The CLI only renders: its numbers are the library's predict on the same design.
    d = ChokeDesign(RingCore(61e-3, 35.6e-3, 12.7e-3), get_material("nizn-250"), Winding(8, Cable(5e-3)))
    p = predict(d, Band.single(3.5e6, 30e6))
    row = next(m for m in data["materials"] if m["name"] == "nizn-250")
    assert row["min_resistance_ohm"] == pytest.approx(p.summary["min_resistance_ohm"])
    assert png.read_bytes()[:4] == b"\x89PNG"
    assert "nizn-250" in out and "worst" in out


def test_compare_cli_shows_negative_reduction(run_cli, tmp_path):
    # nizn-250 at 3.5 MHz is mostly inductive (µ'' ≪ µ'): on a capacitive line the current
    # rises (DESIGN.md §4), and the table says so with a negative number.
    j = tmp_path / "c.json"
    code, out, err = run_cli("compare", "--materials", "nizn-250", *DESIGN, "--band", "3.5-7MHz", "--cp", "0", "--json", j)
    assert code == 0, err
    db = json.loads(j.read_text())["materials"][0]["worst_case_reduction_db"]
    assert db < 0
    assert f"{db:+.1f}" in out


@pytest.mark.parametrize(
    "args, message",
    [
        (["--materials", "nizn-800,nizn-800"], "more than once"),
        (["--materials", "nizn-800", "--line-r-max", "-5"], "--line-r-max"),
        (["--materials", "nizn-800", "--band", "30-3MHz"], "--band"),
        (["--materials", "unobtainium"], "unobtainium"),
    ],
)
def test_compare_cli_bad_input_exits_2(run_cli, args, message):
    code, out, err = run_cli("compare", *DESIGN, *args)
    assert code == 2
    assert err.startswith("error:") and message in err
