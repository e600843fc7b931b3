"""Ranges of physical inputs (cmcheck.limits), the bend-limit diagnosis, and property tests of the
parsers and table readers: any text gives a value or a CmcheckError, never another exception."""

from __future__ import annotations

import warnings

import numpy as np
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from cmcheck.design.bend import ring_for_bend, ring_profiles, section_for_bend
from cmcheck.design.catalogue import builtin_ring_sizes, load_ring_sizes
from cmcheck.design.search import SizeSpec, size
from cmcheck.errors import CmcheckError, CmcheckWarning, DimensionError, MaterialError, UnitError, WindingError
from cmcheck.model.conductors import Cable, Wire
from cmcheck.model.cores import ring_bend_radius, RingCore
from cmcheck.model.materials import Tabulated, check_band, get_material, load_material_csv
from cmcheck.model.winding import Winding, max_turns_single_layer
from cmcheck.units import Band, awg_diameter, parse_band, parse_length, parse_wire_diameter


# --- ranges name the parameter, the value and the range ---------------------------------------

@pytest.mark.parametrize("build, parameter, words", [
    (lambda: RingCore(1e300, 10e-3, 5e-3), "od", ["od = 1e+300 m", "1 mm – 1 m"]),
    (lambda: RingCore(20e-3, 0.5e-3, 5e-3), "id", ["id = 0.0005 m"]),
    (lambda: RingCore(20e-3, 10e-3, 5e-3, 65), "cores", ["cores = 65", "1 – 64"]),
    (lambda: Wire(awg_diameter(47)), "wire", ["AWG 46"]),
    (lambda: Wire(1e-3, 0.02), "insulation", ["10 mm"]),
    (lambda: Cable(0.2), "cable_od", ["100 mm"]),
    (lambda: Winding(3, Wire(1e-3), 3e-6), "cp", ["3 µF", "1 nF"]),
])
def test_out_of_range_names_parameter_value_and_range(build, parameter, words):
    with pytest.raises(CmcheckError) as e:
        build()
    assert e.value.parameter == parameter
    for w in words:
        assert w in str(e.value)


def test_edges_of_the_ranges_are_accepted():
    # AWG 0000 and 46 are the ends of ASTM B258's table; 1 mm and 1 m the stated core range.
    Wire(awg_diameter(-3)), Wire(awg_diameter(46))
    RingCore(1.0, 0.5, 1e-3, 64)
    Winding(1, Wire(1e-3), 1e-9)
    assert parse_wire_diameter("0000awg") == pytest.approx(11.684e-3, rel=1e-4)  # ASTM B258 Table 1
    with pytest.raises(UnitError):
        parse_wire_diameter("47awg")


def test_table_refuses_negative_initial_permeability_but_not_above_resonance():
    f = np.array([1e6, 1e7, 1e8])
    Tabulated(f, np.array([800.0, 100.0, -20.0]), np.array([10.0, 300.0, 50.0]))  # µ' < 0 above resonance: physical
    with pytest.raises(MaterialError, match="lowest frequency"):
        Tabulated(f, np.array([-800.0, 100.0, 20.0]), np.array([10.0, 300.0, 50.0]))
    with pytest.raises(MaterialError, match="above 100000"):
        Tabulated(f, np.array([800.0, 100.0, 20.0]), np.array([10.0, 2e5, 50.0]))


def test_band_checks_for_analytic_and_tabulated_materials():
    with pytest.raises(UnitError) as e:
        check_band(get_material("nizn-650"), Band.single(1e-9, 1e30))
    assert e.value.parameter == "band"
    check_band(get_material("nizn-650"), Band.single(1e3, 3e9))  # the stated limits themselves
    m = get_material("nizn-650")
    tab = type(m)("t", Tabulated(np.array([1e6, 1e7]), np.array([800.0, 100.0]), np.array([10.0, 100.0]), "t.csv"))
    with warnings.catch_warnings(record=True) as w:
        warnings.simplefilter("always")
        check_band(tab, Band.single(1e6, 1e7))
    assert not w  # inside the data: nothing to say
    with pytest.warns(CmcheckWarning, match="10 MHz – 10.5 MHz"):
        check_band(tab, Band.single(1e6, 10.5e6))
    with pytest.raises(UnitError):
        check_band(tab, Band.single(1e6, 30e6))


# --- the ring a stiff cable needs -------------------------------------------------------------

def test_section_for_bend_inverts_the_bend_radius():
    # ring_bend_radius: (narrow side + d)/2 (elementary geometry); its inverse gives the side back.
    s = section_for_bend(15.45e-3, 10.3e-3)
    assert s == pytest.approx(20.6e-3)
    assert ring_bend_radius(0.2, 0.2 - 2 * s, 0.1, 10.3e-3) == pytest.approx(15.45e-3)


def test_ring_for_bend_is_the_smallest_r10_ring_that_admits_two_passes():
    need = ring_for_bend([(0.5, 0.4), (0.6, 0.25)], 15.45e-3, 10.3e-3, max_cores=4)
    # Thick profile: width 0.25·OD ≥ 20.6 mm → OD ≥ 82.4 mm → 100 mm on ISO 3 R10 (…, 80, 100).
    assert (need.od, need.id, need.height, need.stack) == pytest.approx((0.1, 0.05, 0.04, 1))
    assert ring_bend_radius(need.od, need.id, need.height * need.stack, 10.3e-3) >= 15.45e-3
    assert max_turns_single_layer(need.id, 10.3e-3) >= 2
    # One R10 step smaller does not bend wide enough (elementary geometry).
    assert ring_bend_radius(0.08, 0.04, 0.032, 10.3e-3) < 15.45e-3


def test_size_with_10mm_cable_names_the_bend_limit_and_the_ring_it_needs():
    spec = SizeSpec(parse_band("1.8-30MHz"), Cable(10.3e-3), [get_material("mnzn-4000"), get_material("nizn-250")],
                    builtin_ring_sizes(), target_ohm=1000.0)
    res = size(spec)
    assert not res.ok
    d = res.diagnosis
    assert d.limits[0] == "bend"
    assert "bend limit" in d.reason and "15.5 mm" in d.reason and "ring 100 × 50 × 40 mm" in d.reason
    wider = [r for r in d.relax if r.kind == "wider_rings"][0]
    assert wider.parameter == "sizes" and wider.value["od_m"] == pytest.approx(0.1)
    assert (0.5, 0.4) in ring_profiles(builtin_ring_sizes())  # the thick profile of the built-in series


def test_cli_words_the_bend_diagnosis(run_cli):
    code, out, _ = run_cli("size", "--band", "1.8-30MHz", "--cable-od", "10.3mm", "--materials", "mnzn-4000")
    assert code == 1
    assert "bend limit" in " ".join(out.split()) and "--sizes" in out


# --- property tests: a value or a CmcheckError, never a traceback --------------------------------

text = st.text(max_size=30)  # hypothesis leaves out surrogates by default: any text a file can hold
numberish = st.from_regex(r"\A[-+]?[0-9.eE+\-]{0,12}\s?(k|M|m|G|u|µ|p|n|)?(Hz|hz|mm|m|in|awg|F|)?\Z")


@settings(max_examples=150, deadline=None)
@given(st.one_of(text, numberish))
def test_length_and_wire_parsers_never_raise_anything_else(s):
    for parse in (parse_length, parse_wire_diameter):
        try:
            v = parse(s)
        except CmcheckError:
            continue
        assert isinstance(v, float) and np.isfinite(v)


bandish = st.builds(lambda a, b, u: f"{a}-{b}{u}", st.floats(allow_nan=True, allow_infinity=True),
                    st.floats(allow_nan=True, allow_infinity=True), st.sampled_from(["", "Hz", "kHz", "MHz", "GHz", "x"]))


@settings(max_examples=150, deadline=None)
@given(st.one_of(text, bandish))
def test_band_parser_gives_a_band_or_a_unit_error(s):
    try:
        b = parse_band(s)
    except UnitError:
        return
    assert 0 < b.low < b.high and np.isfinite(b.high)


cell = st.one_of(st.floats(allow_nan=True, allow_infinity=True).map(repr), text.filter(lambda t: "," not in t and "\n" not in t))


@settings(max_examples=60, deadline=None, suppress_health_check=[HealthCheck.function_scoped_fixture])
@given(st.lists(st.tuples(cell, cell, cell), max_size=6))
def test_material_csv_reader_gives_a_material_or_an_error(tmp_path, rows):
    p = tmp_path / "m.csv"
    p.write_text("frequency_hz,mu_prime,mu_double_prime\n" + "\n".join(",".join(r) for r in rows) + "\n", encoding="utf-8")
    try:
        m = load_material_csv(p)
    except CmcheckError:
        return
    mu = m.permeability(m.model.frequency_hz)
    assert np.all(np.isfinite(mu)) and np.all(-mu.imag >= 0)


@settings(max_examples=60, deadline=None, suppress_health_check=[HealthCheck.function_scoped_fixture])
@given(st.lists(st.tuples(st.sampled_from(["ring", "sleeve", "two-hole", "x"]), cell, cell, cell), max_size=5))
def test_size_table_reader_gives_sizes_or_an_error(tmp_path, rows):
    p = tmp_path / "s.csv"
    p.write_text("kind,od_mm,id_mm,height_mm\n" + "\n".join(",".join(r) for r in rows) + "\n", encoding="utf-8")
    try:
        sizes = load_ring_sizes(p)
    except CmcheckError:
        return
    for c in sizes.cores:
        assert 1e-3 <= c.dimensions()["od_m"] <= 1.0  # the stated core range (cmcheck.limits)
