"""Heat and flux checks of cmcheck.design.heat."""

import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from cmcheck.model.cores import RingCore, ring_surface_area
from cmcheck.errors import DesignError
from cmcheck.design.heat import (
    Drive,
    dissipation_from_current,
    dissipation_from_voltage,
    feed_point_voltage,
    heat_check,
    peak_flux_density,
    temperature_rise,
)


def test_feed_point_voltage_is_joule():
    # Joule's law P = V²/R: 100 W into 50 Ω is 70.71 V rms; 1.5 kW into 3 kΩ is 2.12 kV.
    assert feed_point_voltage(100.0, 50.0) == pytest.approx(math.sqrt(5000.0))
    assert feed_point_voltage(1500.0, 3000.0) == pytest.approx(2121.32, rel=1e-5)


@given(r=st.floats(1.0, 1e5), c=st.floats(0.0, 1e-9), f=st.floats(1e5, 1e8), v=st.floats(0.1, 1e3))
@settings(max_examples=60, deadline=None)
def test_parallel_capacitance_dissipates_nothing(r, c, f, v):
    # Complex power (Alexander & Sadiku §11.6): a lossless C across R leaves P = V²/R.
    z = 1.0 / (1.0 / r + 2j * math.pi * f * c)
    assert dissipation_from_voltage(v, z) == pytest.approx(v * v / r, rel=1e-9)


def test_current_dissipation_is_i_squared_r():
    # P = |I|²·Re Z (complex power); the reactance carries no loss.
    z = np.array([1000.0 + 2000j, 500.0 - 800j])
    assert np.allclose(dissipation_from_current(0.3, z), [90.0, 45.0])


def test_mclyman_formula_and_heat_balance():
    # McLyman, Transformer and Inductor Design Handbook, 3rd ed., ch. 6 (from memory):
    # ΔT = 450·ψ^0.826 with ψ in W/cm². 0.1 W/cm² → 450·0.1^0.826.
    assert temperature_rise(1.0, 10e-4) == pytest.approx(450.0 * 0.1**0.826)
    # Independent check (DESIGN.md §4 claims agreement within a few kelvin at 5 W on a 60 mm
    # ring): radiation (Stefan–Boltzmann, emissivity 0.9) plus natural convection with the
    # simplified laminar coefficient for air h = 1.32·(ΔT/D)^¼ W/(m²K) (Holman, Heat Transfer,
    # Table 7-2; from memory), solved for ΔT by bisection.
    area = ring_surface_area(60e-3, 35e-3, 12.5e-3)
    sigma, eps, t0, d = 5.670374419e-8, 0.9, 298.15, 0.06

    def shed(dt):
        return eps * sigma * area * ((t0 + dt) ** 4 - t0**4) + 1.32 * (dt / d) ** 0.25 * area * dt

    lo, hi = 0.0, 500.0
    for _ in range(80):
        mid = (lo + hi) / 2
        lo, hi = (mid, hi) if shed(mid) < 5.0 else (lo, mid)
    assert temperature_rise(5.0, area) == pytest.approx(lo, abs=5.0)


def test_peak_flux_matches_faraday():
    # Faraday's law: v = N·Ae·dB/dt; for v = √2·V·sin ωt the peak is B = √2·V/(ω·N·Ae).
    # The transformer equation's 4.44 is 2π/√2 = 4.4429 to 0.07 %.
    v, f, n, ae = 100.0, 1e6, 10, 152.52e-6
    exact = math.sqrt(2) * v / (2 * math.pi * f * n * ae)
    assert peak_flux_density(v, f, n, ae) == pytest.approx(exact, rel=1e-3)


def test_heat_check_worst_frequency_and_shapes():
    # Two candidates, three frequencies; a voltage across a resistance dissipates V²/R
    # (Joule), most where R is least; flux is largest at the lowest frequency (B ∝ 1/f).
    f = np.array([1e6, 3e6, 10e6])
    z = np.array([[1000.0, 500.0, 2000.0], [4000.0, 4000.0, 4000.0]], dtype=complex)
    core = RingCore(61e-3, 35.6e-3, 12.7e-3)
    drive = Drive(100.0, feed_impedance_ohm=400.0)  # √(100·400) = 200 V
    hc = heat_check(drive, f, z, [8, 8], [core.ae, core.ae], [core.surface_area] * 2)
    assert np.allclose(hc.dissipation_w, [200.0**2 / 500.0, 200.0**2 / 4000.0])
    assert np.allclose(hc.dissipation_hz, [3e6, 1e6])
    # McLyman ΔT = 450·ψ^0.826, ψ in W/cm² (as above), evaluated here.
    assert np.allclose(hc.temperature_rise_k, 450.0 * (hc.dissipation_w / (core.surface_area * 1e4)) ** 0.826)
    assert np.allclose(hc.peak_flux_hz, 1e6)
    assert np.allclose(hc.peak_flux_t, 200.0 / (4.44 * 1e6 * 8 * core.ae))
    cur = heat_check(Drive(100.0, cm_current_a=0.1), f, z, [8, 8], [core.ae] * 2, [core.surface_area] * 2)
    # I²R, most where R is largest; the winding voltage is I·|Z|.
    assert np.allclose(cur.dissipation_w, [0.01 * 2000.0, 0.01 * 4000.0])
    assert cur.peak_flux_t[1] == pytest.approx(0.1 * 4000.0 / (4.44 * 1e6 * 8 * core.ae))


@pytest.mark.parametrize(
    "kwargs, message",
    [
        (dict(power_w=0.0, cm_voltage_v=10.0), "^power_w must be above 0 W, got 0 W"),
        (dict(power_w=100.0), "power_w needs cm_voltage_v"),
        (dict(power_w=100.0, cm_voltage_v=10.0, cm_current_a=1.0), "exactly one"),
        (dict(power_w=100.0, feed_impedance_ohm=-50.0), "^feed_impedance_ohm must be above 0 Ω, got -50 Ω"),
    ],
)
def test_drive_refuses_impossible_input(kwargs, message):
    with pytest.raises(DesignError, match=message):
        Drive(**kwargs)
