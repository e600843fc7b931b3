"""The energy-method Cp wired into the choke model, `predict` and the sizing search.

The acceptance check reads a real measurement (skips when absent): 25 turns on a 10 × 4 × 4 mm
ring (ring-windings/ring-10x4x4mm-25turns.s1p, SOURCES.md), whose self-resonance `predict`
must place within 30 % from geometry alone. No constant of the Cp model was tuned on that file:
its gap constant comes from our own 2-D field solve (examples/ring_gap_field_solve.py) and
matters only for dielectric cores; the conductive part has no fitted constant.
"""

import json
import math
import warnings

import numpy as np
import pytest

from cmcheck.design.catalogue import load_ring_sizes
from cmcheck.design.search import SizeSpec, _geometry
from cmcheck.errors import CmcheckWarning
from cmcheck.model.capacitance import stray_capacitance
from cmcheck.model.choke import ChokeDesign, air_core_inductance, predict
from cmcheck.model.cores import FactorCore, RingCore, ring_core_factors
from cmcheck.model.materials import Material, Tabulated, get_material
from cmcheck.model.selfcapacitance import self_capacitance
from cmcheck.model.winding import Cable, Winding, Wire
from cmcheck.units import parse_band

RING = (10e-3, 4e-3, 4e-3)
TURNS = 25
L_MEASURED = 55e-6  # the measurer's LCR reading (SOURCES.md)


def _measured_resonance(path):
    # First X crossing + → − of the reflection impedance Z = Z0(1 + S11)/(1 − S11) (Keysight
    # Impedance Measurement Handbook, reflection method), read with scikit-rf (independent).
    from skrf.io.touchstone import Touchstone

    t = Touchstone(str(path))
    order = np.argsort(t.f)
    f, s11 = t.f[order], t.s[order, 0, 0]
    x = (50.0 * (1 + s11) / (1 - s11)).imag
    i = np.flatnonzero((x[:-1] > 0) & (x[1:] <= 0) & (f[:-1] > 1e6))[0]
    return f[i] - x[i] * (f[i + 1] - f[i]) / (x[i + 1] - x[i])


def _flat_mu():
    # A flat µ' that gives the measured 55 µH on this ring: L = µ0·N²·µ'/C1 (IEC 60205, C1 of
    # a ring), no loss: the resonance then depends on L and Cp only.
    c1, _ = ring_core_factors(*RING)
    return L_MEASURED / air_core_inductance(c1, TURNS)


def test_ring_10x4x4_self_resonance_predicted_from_geometry(real_dir, tmp_path, run_cli):
    f_meas = _measured_resonance(real_dir / "ring-windings" / "ring-10x4x4mm-25turns.s1p")
    assert f_meas == pytest.approx(9.37e6, rel=0.01)  # the measurer's figure (SOURCES.md)
    # The core is declared conductive: its loss at 1 MHz (R/X ≈ 0.09 with µ ≈ 120) is about
    # three times what a NiZn ferrite of µi 120 shows there (it relaxes near 30 MHz by Snoek's
    # law, tan δ ≈ f/fr ≈ 0.03; from memory): a metal-powder-like core, which is a floating
    # conductor to the winding (tests/test_selfcapacitance.py asserts the loss from the file).
    mu = _flat_mu()
    csv = tmp_path / "flat55uH.csv"
    csv.write_text(f"# class: conductive\nfrequency_hz,mu_prime,mu_double_prime\n1e4,{mu:.6g},0\n1e9,{mu:.6g},0\n")
    out = tmp_path / "p.json"
    code, _, err = run_cli("predict", "-m", csv, "--od", "10mm", "--id", "4mm", "--height", "4mm", "--turns", "25",
                           "--wire", "0.3mm", "--insulation", "0.02mm", "--band", "1-30MHz", "--json", out)
    assert code == 0, err
    data = json.loads(out.read_text())
    f_pred = data["summary"]["self_resonance_hz"]
    assert f_pred == pytest.approx(f_meas, rel=0.30)
    assert data["summary"]["cp_source"].startswith("estimated (energy method, conductive")
    parts = data["summary"]["cp_parts_f"]
    assert parts["core"] > 0.9 * data["summary"]["cp_f"]  # the floating core carries it
    # No hollow pass: the same design with the former adjacent-turn estimate resonates far too high.
    material = Material("flat", Tabulated(np.array([1e4, 1e9]), np.array([mu, mu]), np.zeros(2)))
    wire = Wire(0.3e-3, 0.02e-3)
    old_cp = stray_capacitance(RingCore(*RING).turn_geometry(wire.outer_diameter), wire.outer_diameter, 0.3e-3, TURNS,
                               wire.effective_eps_r)
    old = predict(ChokeDesign(RingCore(*RING), material, Winding(TURNS, wire, old_cp)), parse_band("1-30MHz"))
    assert old.summary["self_resonance_hz"] > 1.3 * f_meas * 2  # more than twice beyond the 30 % window


def test_choke_cp_follows_the_material_class():
    # Energy method (Massarini & Kazimierczuk, IEEE T-PEL 12(4) 1997): a floating conductive core
    # under every turn stores far more than a dielectric NiZn one (≈ 10×; D. W. Knight's ring
    # measurements, web article, show the same order on such cores).
    w = Winding(25, Wire(0.3e-3, 0.02e-3))
    nizn = ChokeDesign(RingCore(*RING), get_material("nizn-125"), w)
    mnzn = ChokeDesign(RingCore(*RING), get_material("mnzn-1000"), w)
    assert mnzn.cp > 5 * nizn.cp
    assert nizn.cp_breakdown()["core"] == 0 and nizn.cp_breakdown()["gap"] > 0
    assert mnzn.cp_breakdown()["gap"] == 0 and mnzn.cp_breakdown()["core"] > 0
    # εr of the family enters: the dielectric gap part scales with (εr − 1) (Cheng, Field and
    # Wave Electromagnetics, §4-3, energy in the annular sector).
    ref = self_capacitance(*RING, 25, 0.3e-3, 0.02e-3, 3.0, core_eps_r=12.0)
    assert nizn.cp_breakdown()["gap"] == pytest.approx(ref.gap, rel=1e-12, abs=0)
    # A given Cp still wins.
    assert ChokeDesign(RingCore(*RING), get_material("mnzn-1000"), Winding(25, Wire(0.3e-3), 1e-12)).cp == 1e-12


def test_unknown_class_warns_and_assumes_a_dielectric():
    flat = Material("user-curve", Tabulated(np.array([1e4, 1e9]), np.array([100.0, 100.0]), np.zeros(2)))
    d = ChokeDesign(RingCore(*RING), flat, Winding(10, Wire(0.3e-3, 0.02e-3)))
    with pytest.warns(CmcheckWarning, match="does not declare its electrical class"):
        p = predict(d, parse_band("1-30MHz"))
    assert "assumed" in p.summary["cp_source"]
    declared = ChokeDesign(RingCore(*RING), Material("x", flat.model, electrical_class="dielectric"), d.winding)
    assert d.cp == pytest.approx(declared.cp, rel=1e-12, abs=0)
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        predict(declared, parse_band("1-30MHz"))  # a declared class does not warn


def test_predict_reports_the_parts_and_they_add_up():
    d = ChokeDesign(RingCore(61e-3, 35.55e-3, 12.7e-3), get_material("nizn-800"), Winding(8, Cable(5e-3)))
    s = predict(d, parse_band("1-30MHz")).summary
    parts = s["cp_parts_f"]
    assert sum(parts[k] for k in ("gap", "air", "chain", "core", "leads")) == pytest.approx(s["cp_f"], rel=1e-12, abs=0)
    assert math.degrees(parts["winding_angle_rad"]) == pytest.approx(300.0)
    # Spreading the turns less (up to close-wound) changes Cp (Knight: the end gap sets it).
    tight = ChokeDesign(d.core, d.material, d.winding, winding_angle=math.radians(150.0))
    assert abs(tight.cp / d.cp - 1) > 0.05
    assert "as given" in tight.cp_source


SIZES_CSV = """kind,od_mm,id_mm,height_mm,width_mm,thickness_mm,length_mm,hole_mm,hole_spacing_mm
ring,25,15,10,,,,,
sleeve,14,7,28,,,,,
two-hole,,,,14,8,14,3.5,6
"""


@pytest.mark.parametrize("conductor", [Wire(0.5e-3, 0.03e-3), Wire(0.5e-3), Cable(2.8e-3)])
def test_search_cp_equals_the_choke_model_for_every_shape_and_class(tmp_path, conductor):
    # The vectorised search must give every candidate ChokeDesign's own Cp: rings, sleeves and
    # two-hole cores, dielectric, conductive and undeclared materials.
    p = tmp_path / "s.csv"
    p.write_text(SIZES_CSV)
    flat = Material("flat", Tabulated(np.array([1e4, 1e9]), np.array([50.0, 50.0]), np.zeros(2)))
    mats = [get_material("nizn-800"), get_material("mnzn-1000"), get_material("iron-powder-10"), flat]
    spec = SizeSpec(parse_band("3.5-30MHz"), conductor, mats, load_ring_sizes(p), max_cores=2,
                    min_bend_radius=0.0)
    geo, _ = _geometry(spec)
    assert geo.turns.size > 20
    for m, mat in enumerate(mats):
        for g in range(geo.turns.size):
            core = spec.sizes.cores[int(geo.size_idx[g])].stacked(int(geo.stack[g]))
            want = ChokeDesign(core, mat, Winding(int(geo.turns[g]), conductor)).cp
            assert geo.cp[m, g] == pytest.approx(want, rel=1e-9, abs=1e-18)


def test_factor_core_uses_its_equivalent_ring():
    # Window and turn path: an equivalent ring (FactorCore notes); without them no estimate.
    c = FactorCore(800.0, window_diameter=6e-3, turn_path=24e-3)
    d = ChokeDesign(c, get_material("nizn-800"), Winding(6, Wire(0.4e-3, 0.02e-3)))
    assert d.cp > 0 and d.cp_source.startswith("estimated")
    assert ChokeDesign(FactorCore(800.0), d.material, d.winding).cp_source == "none"


def test_bare_wire_takes_the_stated_insulation_floor():
    # Bare wire on a conductive core would be a short (Massarini & Kazimierczuk's turn-to-core
    # cell diverges as the insulation → 0): the model takes 1 % of the diameter (module notes,
    # common practice, no published source), the same as that insulation given explicitly.
    from cmcheck.model.winding_cp import MIN_INSULATION_RATIO

    mat = get_material("mnzn-1000")
    bare = ChokeDesign(RingCore(*RING), mat, Winding(20, Wire(0.5e-3)))
    floor = ChokeDesign(RingCore(*RING), mat, Winding(20, Wire(0.5e-3, MIN_INSULATION_RATIO * 0.5e-3)))
    assert np.isfinite(bare.cp) and bare.cp == pytest.approx(floor.cp, rel=1e-9, abs=0)
    thicker = ChokeDesign(RingCore(*RING), mat, Winding(20, Wire(0.5e-3, 0.05e-3)))
    assert thicker.cp < bare.cp  # more insulation, less turn-to-core capacitance


def test_search_warns_once_for_a_material_of_unknown_class():
    from cmcheck.design.catalogue import builtin_ring_sizes
    from cmcheck.design.search import size

    flat = Material("flat", Tabulated(np.array([1e4, 1e9]), np.array([800.0, 800.0]), np.array([200.0, 200.0])))
    spec = SizeSpec(parse_band("3.5-30MHz"), Cable(5e-3), [flat], builtin_ring_sizes(), target_ohm=300.0, max_cores=1)
    with warnings.catch_warnings(record=True) as rec:
        warnings.simplefilter("always")
        res = size(spec)
    assert res.designs
    assert sum("does not declare its electrical class" in str(w.message) for w in rec) == 1
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        size(SizeSpec(spec.band, spec.conductor, [flat], spec.sizes, target_ohm=300.0, max_cores=1, cp=1e-12))
