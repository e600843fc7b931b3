"""The core contract: every shape provides the same members; the two-hole core's approximation;
a factor-only core's stray capacitance; no shape tests in the modules that use cores."""

import json
import math
import re
import warnings
from pathlib import Path

import numpy as np
import pytest

import cmcheck
from cmcheck.errors import CmcheckWarning, DimensionError
from cmcheck.model.choke import ChokeDesign, predict
from cmcheck.model.conductors import Cable, Conductor, Wire
from cmcheck.model.cores import Core, FactorCore, RingCore, sleeve
from cmcheck.model.materials import builtin_materials, get_material
from cmcheck.model.two_hole import TwoHoleCore
from cmcheck.model.winding import Winding
from cmcheck.units import Band

NIZN = get_material("nizn-800")
# An invented two-hole block for the tests: 14 wide, 8 thick, 12 long, 3.5 mm holes 6 mm apart.
W, T, L, D, S = 14e-3, 8e-3, 12e-3, 3.5e-3, 6e-3

SHAPES = [
    RingCore(61e-3, 35.6e-3, 12.7e-3),
    sleeve(17.5e-3, 9.5e-3, 28.5e-3),
    FactorCore(649.0, window_diameter=3.5e-3, ae=20e-6, le=25e-3, turn_path=30e-3),
    FactorCore(649.0),
    TwoHoleCore(W, T, L, D, S),
]


@pytest.mark.parametrize("core", SHAPES, ids=lambda c: c.describe())
def test_every_shape_keeps_the_contract(core):
    assert isinstance(core, Core)
    assert core.c1 > 0 and core.stack == 1
    for name in ("le", "ae", "ve", "window_diameter", "surface_area", "volume"):
        v = getattr(core, name)
        assert v is None or (isinstance(v, float) and v > 0), name
    for fn in (core.turn_length, core.bend_radius):
        v = fn(1e-3)
        assert v is None or (isinstance(v, float) and v > 0)
    g = core.turn_geometry(1e-3)
    assert (g is None) == bool(core.missing)
    if g is not None:
        assert g.segments and all(s.length >= 0 and s.spread_start > 0 for s in g.segments)
        assert g.section.id < g.section.od and g.rings >= 1
    # Stacking k identical pieces divides Σl/A by k (IEC 60205: the areas add along one path).
    two = core.stacked(2)
    assert two.stack == 2 and two.c1 == pytest.approx(core.c1 / 2)
    assert two.stacked(3).c1 == pytest.approx(core.c1 / 3)
    assert isinstance(core.describe(), str) and core.describe()
    d = core.to_dict()
    json.dumps(d)
    assert d["core_shape"] and d["cores"] == 1 and d["core_factor_per_m"] == pytest.approx(core.c1)
    # SI keys carry their unit.
    assert all(re.search(r"_(m|m2|m3|per_m)$", k) for k in d if k not in ("core_shape", "cores"))
    assert all(re.search(r"_(m|m2|m3|per_m)$", k) for k in core.dimensions())


@pytest.mark.parametrize("conductor", [Wire(1e-3, 0.03e-3), Cable(5e-3)], ids=lambda c: c.describe())
def test_every_conductor_keeps_the_contract(conductor):
    assert isinstance(conductor, Conductor)
    assert conductor.outer_diameter >= conductor.conducting_diameter > 0
    assert conductor.effective_eps_r >= 1 and isinstance(conductor.stiff, bool)
    assert conductor.resistance(np.array([1e6]), 1.0)[0] > 0
    json.dumps(conductor.to_dict())


@pytest.mark.parametrize("w, t, s, od_eq", [
    (W, T, S, 6e-3),              # the spacing limits the circle round a hole
    (20e-3, 5e-3, 9e-3, 5e-3),    # the thickness does
    (10e-3, 8e-3, 6e-3, 4e-3),    # the outer wall (width − spacing) does
])
def test_two_hole_equals_a_stack_of_two_equivalent_rings(w, t, s, od_eq):
    # The stated approximation, rebuilt here: each hole acts as a ring of ID = hole and OD = the
    # largest circle round the hole inside its half of the block (read off each sketch above);
    # a turn links both, so the core is a stack of two such rings (common practice, no
    # published source).
    rings = RingCore(od_eq, D, L, stack=2)
    core = TwoHoleCore(w, t, L, D, s)
    assert core.c1 == pytest.approx(rings.c1, rel=1e-12)
    assert core.ae == pytest.approx(rings.ae, rel=1e-12)
    assert core.le == pytest.approx(rings.le, rel=1e-12)
    assert core.ve == pytest.approx(rings.ve, rel=1e-12)
    # Two pieces end to end: four ring-lengths of path area, Σl/A halves again.
    assert core.stacked(2).c1 == pytest.approx(RingCore(od_eq, D, L, stack=4).c1, rel=1e-12)


@pytest.mark.parametrize("dims", [(W, T, L, D, S), (20e-3, 6e-3, 10e-3, 2e-3, 9e-3), (9e-3, 9e-3, 30e-3, 2.5e-3, 4e-3)])
def test_two_hole_effective_parameters_within_physical_bounds(dims):
    w, t, length, d, s = dims
    core = TwoHoleCore(*dims)
    # Material volume by counting grid points in the block outside both holes (independent of
    # the closed form).
    x, y = np.meshgrid(np.linspace(-w / 2, w / 2, 1401), np.linspace(-t / 2, t / 2, 801), indexing="ij")
    solid = ((x - s / 2) ** 2 + y**2 > (d / 2) ** 2) & ((x + s / 2) ** 2 + y**2 > (d / 2) ** 2)
    assert core.volume == pytest.approx(solid.mean() * w * t * length, rel=5e-3)
    # Ve = C1³/C2² never exceeds the material volume Σ l·A (Hölder's inequality on the IEC 60205
    # sums, from memory).
    assert core.ve <= core.volume
    # The flux circling each hole crosses the material beside it, (t − d)/2 × length on each
    # side; a turn links both holes' flux, so Ae cannot exceed (t − d)·length (elementary
    # magnetic-circuit reasoning, common practice, no published source).
    assert core.ae <= (t - d) * length
    # Surface: outside of the block and the hole walls, less the hole openings; at least the
    # block's own outside (the walls add more than the openings take away when length > d/2).
    assert core.surface_area >= 2 * (w * t + w * length + t * length) - 1e-12


def test_two_hole_sanity_against_a_measured_core():
    # A measured two-hole NiZn core has A/l = 0.00154 m, Σl/A ≈ 649 1/m (SOURCES.md; dimensions
    # not published). Small two-hole blocks of plausible size give the same order of magnitude —
    # a sanity check, not a validation (common practice, no published source).
    assert 200 < TwoHoleCore(W, T, L, D, S).c1 < 2000


@pytest.mark.parametrize("bad", [
    dict(hole=7e-3),            # holes overlap
    dict(width=9e-3),           # no outer wall beyond the second hole
    dict(thickness=3e-3),       # the hole breaks through the faces
    dict(length=-1e-3),
])
def test_two_hole_rejects_impossible_blocks(bad):
    args = dict(width=W, thickness=T, length=L, hole=D, spacing=S) | bad
    with pytest.raises(DimensionError):
        TwoHoleCore(**args)


def test_factor_core_with_window_and_turn_path_gets_cp_and_self_resonance():
    # Stated approximation (FactorCore notes): an equivalent ring of ID = window and a square
    # section whose perimeter is the turn path (common practice, no published source).
    window, path = 6e-3, 24e-3
    wire = Wire(0.4e-3, 0.03e-3)
    core = FactorCore(400.0, window_diameter=window, turn_path=path)
    design = ChokeDesign(core, NIZN, Winding(8, wire))
    ring = ChokeDesign(RingCore(window + path / 2, window, path / 4), NIZN, Winding(8, wire))
    assert design.cp_source.startswith("estimated (energy method")
    assert design.cp == pytest.approx(ring.cp, rel=1e-12, abs=0) and design.cp > 0
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        p = predict(design, Band.single(1e6, 30e6))
    assert p.summary["self_resonance_hz"] is not None
    # Ideal LC at the resonance (Thomson): within a factor 2 of 1/(2π√(L·Cp)) with the
    # low-frequency inductance, since µ' falls towards it.
    f0 = 1 / (2 * math.pi * math.sqrt(design.low_frequency_inductance() * design.cp))
    assert 0.3 * f0 < p.summary["self_resonance_hz"] < 3 * f0


def test_factor_core_without_geometry_warns_naming_the_missing_parameters():
    design = ChokeDesign(FactorCore(649.0, window_diameter=3.5e-3), NIZN, Winding(2, Wire(0.5e-3)))
    assert design.cp == 0.0 and design.cp_source == "none"
    with pytest.warns(CmcheckWarning, match="turn_path") as rec:
        predict(design, Band.single(1e6, 30e6))
    assert "window_diameter" not in str(rec[0].message)
    with pytest.warns(CmcheckWarning, match="window_diameter and turn_path"):
        predict(ChokeDesign(FactorCore(649.0), NIZN, Winding(2, Wire(0.5e-3))), Band.single(1e6, 30e6))


def test_two_hole_design_through_the_model():
    core = TwoHoleCore(W, T, L, D, S)
    design = ChokeDesign(core, NIZN, Winding(4, Wire(0.4e-3, 0.03e-3)))
    assert design.cp_source.startswith("estimated (energy method") and design.cp > 0
    # L0 = µ0·N²/C1 (IEC 60205).
    assert design.l0 == pytest.approx(4e-7 * math.pi * 16 / core.c1)
    assert design.to_dict()["core_shape"] == "two-hole"
    assert cmcheck.TwoHoleCore is TwoHoleCore


TWO_HOLE_OPTS = ["--width", "14mm", "--thickness", "8mm", "--length", "12mm", "--hole", "3.5mm", "--hole-spacing", "6mm"]


def test_cli_predict_two_hole(run_cli, tmp_path):
    j = tmp_path / "p.json"
    code, out, err = run_cli("predict", "-m", "nizn-800", *TWO_HOLE_OPTS, "--turns", "4", "--wire", "0.4mm",
                             "--band", "1-30MHz", "--json", j)
    assert code == 0, err
    design = json.loads(j.read_text())["design"]
    assert design["core_shape"] == "two-hole"
    assert design["core_factor_per_m"] == pytest.approx(TwoHoleCore(W, T, L, D, S).c1)
    assert "two-hole" in out and "le =" in out
    code, _, err = run_cli("predict", "-m", "nizn-800", *TWO_HOLE_OPTS[:-2], "--turns", "4", "--band", "1-30MHz")
    assert code == 2 and "--hole-spacing" in err
    code, _, err = run_cli("predict", "-m", "nizn-800", *TWO_HOLE_OPTS, "--od", "10mm", "--turns", "4")
    assert code == 2 and "not both" in err


def _two_hole_csv(tmp_path) -> Path:
    p = tmp_path / "two-hole.csv"
    p.write_text("# invented blocks\nkind,width_mm,thickness_mm,length_mm,hole_mm,hole_spacing_mm\n"
                 "two-hole,14,8,12,3.5,6\ntwo-hole,28,16,24,7,12\n")
    return p


def test_cli_size_with_two_hole_sizes_and_heat(run_cli, tmp_path):
    j = tmp_path / "s.json"
    code, out, err = run_cli("size", "--sizes", _two_hole_csv(tmp_path), "--no-builtin-sizes", "--band", "3.5-30MHz",
                             "--wire", "0.5mm", "--target-r", "300", "--power", "5W", "--cm-voltage", "5V",
                             "--json", j)
    assert code == 0, err
    data = json.loads(j.read_text())
    assert data["designs"]
    for d in data["designs"]:
        assert d["core_shape"] == "two-hole" and d["kind"] == "two-hole"
        assert d["temperature_rise_k"] > 0 and d["core_surface_m2"] > 0
    assert "--hole-spacing" in out or "two-hole" in out


def test_mixed_size_table_and_errors(tmp_path):
    from cmcheck.design.catalogue import load_ring_sizes

    p = tmp_path / "mixed.csv"
    p.write_text("kind,od_mm,id_mm,height_mm,width_mm,thickness_mm,length_mm,hole_mm,hole_spacing_mm\n"
                 "ring,61,35.6,12.7,,,,,\ntwo-hole,,,,14,8,12,3.5,6\n")
    t = load_ring_sizes(p)
    assert t.kind == ("ring", "two-hole")
    assert isinstance(t.cores[1], TwoHoleCore) and t.window_diameters[1] == pytest.approx(3.5e-3)
    bad = tmp_path / "bad.csv"
    bad.write_text("kind,od_mm,id_mm,height_mm\ntwo-hole,61,35.6,12.7\n")
    with pytest.raises(DimensionError, match="line 2.*width_mm"):
        load_ring_sizes(bad)
    bad.write_text("kind,width_mm,thickness_mm,length_mm,hole_mm,hole_spacing_mm\ntwo-hole,14,8,12,7,6\n")
    with pytest.raises(DimensionError, match="line 2.*hole"):
        load_ring_sizes(bad)


def test_users_of_cores_do_not_ask_for_the_shape():
    # The model, search, heat check and catalogue work through the contract only.
    root = Path(cmcheck.__file__).parent
    shape_names = r"(RingCore|FactorCore|TwoHoleCore|Wire|Cable|Core|Conductor)"
    for rel in ("model/choke.py", "design/search.py", "design/heat.py", "design/catalogue.py"):
        text = (root / rel).read_text()
        assert not re.search(r"isinstance\([^)]*" + shape_names, text), rel
        assert not re.search(r"isinstance\(\s*[\w.]*(core|conductor|cond)\b", text), rel
        assert not re.search(r"type\(\s*[\w.]*(core|conductor|cond)\b", text), rel
        assert not re.search(r"kind\s*[!=]=", text), rel


def test_search_with_two_hole_cores_matches_predict_and_the_heat_formula():
    # The vectorised search reads two-hole cores through the contract only; each listed design
    # must reproduce predict's minimum R, and its heat figures the surface-dissipation rule
    # ΔT = 450·(P/A[cm²])^0.826 (McLyman, 3rd ed., ch. 6, from memory) with P = V²·Re(1/Z)
    # (Joule) at the worst grid frequency and A = the block's outside plus hole walls less the
    # openings (elementary geometry).
    from cmcheck.design.catalogue import CoreSizes
    from cmcheck.design.heat import Drive
    from cmcheck.design.search import SizeSpec, size

    blocks = [TwoHoleCore(W, T, L, D, S), TwoHoleCore(2 * W, 2 * T, 2 * L, 2 * D, 2 * S)]
    sizes = CoreSizes(("two-hole",) * 2, tuple(blocks), ("small", "large"), ("test",) * 2)
    band = Band.single(3.5e6, 30e6)
    v = 5.0
    spec = SizeSpec(band, Wire(0.5e-3), [NIZN], sizes, target_ohm=300.0, max_cores=2,
                    drive=Drive(5.0, cm_voltage_v=v), keep_hot=True)
    res = size(spec)
    assert res.designs
    f = band.grid(spec.points)
    f = f[band.contains(f)]
    for d in res.designs:
        assert d.min_resistance_ohm == pytest.approx(d.prediction.summary["min_resistance_ohm"], rel=1e-9)
        c = d.design.core
        k = c.stack
        area = 2 * (W * T - 2 * math.pi * D**2 / 4) + 2 * (W + T) * L * k + 2 * math.pi * D * L * k
        area *= (c.width / W) ** 2
        p = np.max(v**2 * (1 / d.design.impedance(f)).real)
        assert d.heat["dissipation_w"] == pytest.approx(p, rel=1e-9)
        assert d.heat["temperature_rise_k"] == pytest.approx(450 * (p / (area * 1e4)) ** 0.826, rel=1e-9)


@pytest.mark.parametrize("d", [0.3e-3, 1e-3])
def test_two_hole_turn_follows_the_web(d):
    # A turn lies on the web between the holes: a rectangle (spacing − hole) across and the
    # length along. Its conductor's centre line is the outer parallel curve at d/2, whose length
    # is measured here as the perimeter of the convex hull of circles round the rectangle's
    # corners (scipy.spatial.ConvexHull; Steiner's formula P + 2πr says the same).
    from scipy.spatial import ConvexHull

    core = TwoHoleCore(W, T, L, D, S)
    a = S - D
    phi = np.linspace(0, 2 * np.pi, 2000, endpoint=False)
    pts = np.concatenate([np.c_[x + d / 2 * np.cos(phi), z + d / 2 * np.sin(phi)]
                          for x in (-a / 2, a / 2) for z in (0.0, L)])
    assert core.turn_length(d) == pytest.approx(ConvexHull(pts).area, rel=1e-5)
    # The stiff conductor wraps the web as it would a ring's section of the same two sides
    # (radial width = spacing − hole, height = length): the ring's bend rule applies.
    assert core.bend_radius(d) == pytest.approx(RingCore(D + 2 * a, D, L).bend_radius(d))
    assert core.stacked(2).bend_radius(d) == pytest.approx(RingCore(D + 2 * a, D, 2 * L).bend_radius(d))


def test_cable_bend_is_limited_by_default_and_wire_is_not():
    # Default bend limit for a stiff conductor: DEFAULT_BEND_RATIO × OD (common practice, no
    # published source, see cmcheck.design.search); solid wire follows any bend.
    from cmcheck.design.catalogue import builtin_ring_sizes
    from cmcheck.design.search import DEFAULT_BEND_RATIO, SizeSpec

    band = Band.single(3.5e6, 30e6)
    assert SizeSpec(band, Cable(5e-3), [NIZN], builtin_ring_sizes()).bend_limit == pytest.approx(DEFAULT_BEND_RATIO * 5e-3)
    assert SizeSpec(band, Wire(1e-3), [NIZN], builtin_ring_sizes()).bend_limit == 0.0


@pytest.mark.parametrize("n", [2, 6, 30])
def test_two_hole_stray_capacitance_from_the_two_wire_formula(n):
    # Stated geometry (TwoHoleCore notes): the N turns spread round each hole's wall, π(hole − d),
    # along both passes and both end crossings, 2·(length + spacing − hole) of each turn; adjacent
    # turns are a two-wire line C' = π ε0 εr / acosh(s/dc) (Ramo, Whinnery & Van Duzer, 3rd ed.,
    # Table 5.11a), s never below the outside diameter; Cp = Ctt for two turns, (1 + √3)/2 · Ctt
    # from three (Massarini & Kazimierczuk 1997). The turn geometry is what the former
    # adjacent-turn estimate (capacitance.stray_capacitance) reads; ChokeDesign now uses the
    # energy method on the core's equivalent ring (tests/test_cp_in_model.py).
    from cmcheck.model.capacitance import stray_capacitance

    wire = Wire(0.4e-3, 0.03e-3)
    d, dc, eps = wire.outer_diameter, wire.conducting_diameter, wire.effective_eps_r
    s = max(math.pi * (D - d) / n, d)
    ctt = 2 * (L + S - D) * math.pi * 8.8541878128e-12 * eps / math.acosh(max(s / dc, 1 + 1e-6))
    cp = ctt if n == 2 else (1 + math.sqrt(3)) / 2 * ctt
    got = stray_capacitance(TwoHoleCore(W, T, L, D, S).turn_geometry(d), d, dc, n, eps)
    assert got == pytest.approx(cp, rel=1e-9, abs=0)  # pF values: no absolute slack


@pytest.mark.parametrize("n", [3, 12, 40])
def test_ring_turn_to_turn_capacitance_integrates_the_two_wire_line(n):
    # On a ring, adjacent turns are a two-wire line (C' = π ε0 εr / acosh(s/dc), Ramo, Whinnery &
    # Van Duzer, 3rd ed., Table 5.11a) whose spacing is π(ID − d)/N on the inside wall,
    # π(OD + d)/N on the outside wall and rises linearly across each face (never below d).
    # Integrated here with scipy.integrate.quad, independently of the Gauss–Legendre rule.
    from scipy.integrate import quad

    from cmcheck.model.capacitance import turn_to_turn_capacitance

    od, idd, h, d, dc, eps = 61e-3, 35.6e-3, 12.7e-3, 2e-3, 1.6e-3, 2.0
    cprime = lambda s: math.pi * 8.8541878128e-12 * eps / math.acosh(max(s / dc, 1 + 1e-6))  # noqa: E731
    s_in, s_out = max(math.pi * (idd - d) / n, d), max(math.pi * (od + d) / n, d)
    w = (od - idd) / 2
    face, _ = quad(lambda x: cprime(s_in + (s_out - s_in) * x / w), 0.0, w, epsabs=0, epsrel=1e-10)
    expected = h * (cprime(s_in) + cprime(s_out)) + 2 * face
    got = turn_to_turn_capacitance(RingCore(od, idd, h).turn_geometry(d), d, dc, n, eps)
    assert got == pytest.approx(expected, rel=1e-6, abs=0)
