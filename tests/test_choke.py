"""The choke model against closed forms and scikit-rf."""

import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from cmcheck.model.choke import (
    ChokeDesign,
    air_core_inductance,
    choke_impedance,
    lossless_self_resonance,
    predict,
    winding_impedance,
)
from cmcheck.model.cores import RingCore
from cmcheck.model.materials import get_material, Debye, Material, builtin_materials, load_material_csv
from cmcheck.reporting.files import write_touchstone
from cmcheck.units import Band
from cmcheck.model.winding import Cable, Winding, Wire

MU0 = 4e-7 * math.pi


def flat_csv(tmp_path, mu_p, mu_pp):
    p = tmp_path / "flat.csv"
    p.write_text(f"# invented flat material\nfrequency_hz,mu_prime,mu_double_prime\n1e5,{mu_p},{mu_pp}\n1e9,{mu_p},{mu_pp}\n")
    return load_material_csv(p)


def test_worked_winding_impedance(tmp_path):
    # Z = jωL0·µ with L0 = µ0N²/C1 (IEV 221-03-06, IEC 60205:2016), evaluated for N = 10 on
    # 60/35/12.5 mm, µ = 300 − j200 at 10 MHz → Z = 1693.31 + j2539.96 Ω (rounded).
    mat = flat_csv(tmp_path, 300, 200)
    design = ChokeDesign(RingCore(60e-3, 35e-3, 12.5e-3), mat, Winding(10, Wire(0.5e-3), cp=0.0))
    z = winding_impedance(10e6, design.l0, mat.permeability(10e6))
    assert z.real == pytest.approx(1693.31, abs=0.01)
    assert z.imag == pytest.approx(2539.96, abs=0.01)


def test_ring_inductance_closed_form():
    # L = µ0·µr·N²·h·ln(OD/ID)/(2π) for a ring of rectangular section (IEC 60205, C1 for rings).
    od, idd, h, n, mur = 61e-3, 35.6e-3, 12.7e-3, 7, 850.0
    core = RingCore(od, idd, h)
    expected = MU0 * mur * n**2 * h * math.log(od / idd) / (2 * math.pi)
    assert air_core_inductance(core.c1, n) * mur == pytest.approx(expected, rel=1e-12)


def test_flat_csv_material_gives_jwL0mu(tmp_path):
    # IEV 221-03-06: Z = ωL0µ'' + jωL0µ' (conductor loss and Cp switched off).
    mat = flat_csv(tmp_path, 120.0, 35.0)
    design = ChokeDesign(RingCore(25e-3, 15e-3, 10e-3), mat, Winding(4, Wire(0.8e-3), cp=0.0))
    f = np.geomspace(1e6, 1e8, 9)
    w = 2 * np.pi * f
    z = choke_impedance(f, design.l0, mat.permeability(f))
    # L0 = µ0·N²·h·ln(OD/ID)/(2π) (IEC 60205 ring-core C1), evaluated here, not taken from the design.
    l0 = MU0 * 4**2 * 10e-3 * math.log(25 / 15) / (2 * math.pi)
    assert np.allclose(z.real, w * l0 * 35.0, rtol=1e-12)
    assert np.allclose(z.imag, w * l0 * 120.0, rtol=1e-12)


@given(k=st.integers(1, 6))
@settings(max_examples=10)
def test_stacking_multiplies_l0(k):
    # IEC 60205: stacking k identical rings divides C1 by k, so L0 = µ0N²/C1 scales by k.
    mat = get_material("nizn-800")
    one = ChokeDesign(RingCore(25.4e-3, 15.5e-3, 6.35e-3), mat, Winding(5, Wire(0.5e-3)))
    many = ChokeDesign(RingCore(25.4e-3, 15.5e-3, 6.35e-3, k), mat, Winding(5, Wire(0.5e-3)))
    assert many.l0 == pytest.approx(k * one.l0, rel=1e-12)


def test_lossless_self_resonance(tmp_path):
    # Thomson's formula f = 1/(2π√(L·Cp)) for a lossless winding (µ'' = 0, no wire loss).
    mat = Material("lossless", Debye(200.0, 1e30))
    cp = 3.3e-12
    design = ChokeDesign(RingCore(25e-3, 15e-3, 10e-3), mat, Winding(6, Wire(0.5e-3), cp=cp))
    l0 = MU0 * 6**2 * 10e-3 * math.log(25 / 15) / (2 * math.pi)  # IEC 60205 ring-core C1
    expected = 1 / (2 * math.pi * math.sqrt(l0 * 200.0 * cp))
    assert float(lossless_self_resonance(l0 * 200.0, cp)) == pytest.approx(expected, rel=1e-12)
    # Wire loss shifts the zero crossing by far less than 1e-6 relative here.
    got = predict(design, Band.single(expected / 5, expected * 5)).summary["self_resonance_hz"]
    assert got == pytest.approx(expected, rel=1e-6)


def test_passive_everywhere():
    # With µ'' ≥ 0, Rc ≥ 0 and Cp ≥ 0 the parallel network is passive: R ≥ 0 (circuit theory).
    mats = builtin_materials()
    f = np.geomspace(1e4, 1e9, 300)
    for m in mats.values():
        d = ChokeDesign(RingCore(61e-3, 35.6e-3, 12.7e-3), m, Winding(12, Cable(5e-3)))
        assert (d.impedance(f).real >= 0).all()


def test_vectorised_candidates_match_single():
    # Broadcasting over (candidates, frequencies) gives the same as one design at a time.
    mat = get_material("nizn-800")
    f = np.geomspace(1e6, 3e7, 50)
    turns = np.array([2, 5, 9])
    cores = [RingCore(61e-3, 35.6e-3, 12.7e-3)] * 3
    l0 = air_core_inductance(np.array([c.c1 for c in cores]), turns)[:, None]
    z = choke_impedance(f[None, :], l0, mat.permeability(f)[None, :], 0.0, 2e-12)
    for i, n in enumerate(turns):
        d = ChokeDesign(cores[i], mat, Winding(int(n), Cable(5e-3), cp=2e-12))
        zi = choke_impedance(f, d.l0, mat.permeability(f), 0.0, 2e-12)
        assert np.allclose(z[i], zi, rtol=1e-13)


def test_touchstone_export_roundtrip(tmp_path):
    # scikit-rf reads our .s2p back; the series-through relation Z = 2·Z0·(1 − S21)/S21
    # (Pozar, Microwave Engineering, 4th ed., Table 4.2) returns the prediction.
    from skrf.io.touchstone import Touchstone

    mat = get_material("nizn-800")
    design = ChokeDesign(RingCore(61e-3, 35.6e-3, 12.7e-3), mat, Winding(8, Cable(5e-3)))
    pred = predict(design, Band.single(1.8e6, 30e6), 101)
    path = tmp_path / "choke.s2p"
    write_touchstone(path, pred.curve)
    t = Touchstone(str(path))
    s21 = t.s[:, 1, 0]
    z0 = 50.0
    z = 2 * z0 * (1 - s21) / s21
    assert np.allclose(t.f, pred.curve.frequency_hz, rtol=1e-9)
    assert np.allclose(z, pred.curve.z, rtol=1e-6)
    # The file is symmetric and reciprocal, as a series element must be (scikit-rf checks).
    assert np.allclose(t.s[:, 0, 1], s21) and np.allclose(t.s[:, 0, 0], t.s[:, 1, 1])


def test_to_network_matches_skrf_circuit():
    # scikit-rf's own media: a lumped series impedance built by skrf.media.DefinedGammaZ0.
    import skrf
    import skrf.media

    mat = get_material("nizn-800")
    design = ChokeDesign(RingCore(25e-3, 15e-3, 10e-3), mat, Winding(4, Wire(0.5e-3)))
    f = np.geomspace(1e6, 1e8, 21)
    curve = design.curve(f)
    freq = skrf.Frequency.from_f(f, unit="hz")
    media = skrf.media.DefinedGammaZ0(freq, z0=50)
    ref = media.resistor(curve.z, name="z")  # a series element of complex impedance
    assert np.allclose(curve.to_network().s, ref.s, rtol=1e-9, atol=1e-12)


def test_predict_summary_fields():
    mat = get_material("nizn-800")
    design = ChokeDesign(RingCore(61e-3, 35.6e-3, 12.7e-3), mat, Winding(8, Cable(5e-3)))
    band = Band(((1.8e6, 2e6), (28e6, 29.7e6)))
    p = predict(design, band, 201)
    s = p.summary
    r_in = p.curve.resistance[band.contains(p.curve.frequency_hz)]
    assert s["min_resistance_ohm"] == pytest.approx(r_in.min())
    assert band.contains([s["min_resistance_hz"]]).all()
    assert 0.0 <= s["resistive_fraction"] <= 1.0
    d = p.to_dict()
    for key in ("frequency_hz", "resistance_ohm", "reactance_ohm", "impedance_ohm", "design", "summary"):
        assert key in d
