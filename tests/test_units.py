"""Unit and band parsing at the edges."""

import math

import pytest
from hypothesis import given
from hypothesis import strategies as st

from cmcheck.errors import UnitError
from cmcheck.units import (
    Band,
    awg_diameter,
    parse_band,
    parse_capacitance,
    parse_frequency,
    parse_length,
    parse_power,
    parse_resistance,
    parse_wire_diameter,
)


@pytest.mark.parametrize(
    "text, expected",
    [("7MHz", 7e6), ("7e6", 7e6), ("7M", 7e6), ("7 mhz", 7e6), ("14.2k", 14.2e3), ("1.2GHz", 1.2e9), ("500kHz", 5e5)],
)
def test_frequency(text, expected):
    # SI prefixes: BIPM SI Brochure, 9th ed. (2019), Table 7.
    assert parse_frequency(text) == pytest.approx(expected)


@pytest.mark.parametrize(
    "text, expected",
    [("35.6mm", 35.6e-3), ("0.3m", 0.3), ("1.4in", 1.4 * 0.0254), ("2cm", 0.02), ("250um", 250e-6), ("10mil", 254e-6)],
)
def test_length(text, expected):
    # 1 in = 25.4 mm exactly (international yard and pound agreement, 1959).
    assert parse_length(text) == pytest.approx(expected)


def test_awg():
    # ASTM B258: d = 0.127 mm · 92^((36 − n)/39); 18 AWG = 1.0237 mm, 20 AWG = 0.8118 mm.
    assert awg_diameter(18) == pytest.approx(1.0237e-3, abs=0.00005e-3)
    assert awg_diameter(20) == pytest.approx(0.8118e-3, abs=0.00005e-3)
    assert awg_diameter(36) == pytest.approx(0.127e-3)
    assert parse_wire_diameter("18awg") == pytest.approx(1.0237e-3, abs=0.00005e-3)
    assert parse_wire_diameter("AWG 20") == pytest.approx(0.8118e-3, abs=0.00005e-3)
    assert parse_wire_diameter("1.0mm") == pytest.approx(1e-3)


def test_other_quantities():
    # SI prefixes: BIPM SI Brochure, 9th ed. (2019), Table 7.
    assert parse_capacitance("2.8pF") == pytest.approx(2.8e-12)
    assert parse_capacitance("2.8p") == pytest.approx(2.8e-12)
    assert parse_capacitance("0") == 0.0
    assert parse_resistance("1k") == pytest.approx(1e3)
    assert parse_resistance("4.7kohm") == pytest.approx(4.7e3)
    assert parse_resistance("50Ω") == pytest.approx(50)
    assert parse_power("1.5kW") == pytest.approx(1500)


@pytest.mark.parametrize("bad", ["", "abc", "35.6", "12 furlongs", "7 parsecs", "1e400mm", "awg"])
def test_bad_lengths(bad):
    with pytest.raises(UnitError):
        parse_length(bad)


@pytest.mark.parametrize("bad", ["abc", "7 MHzz", "7Q", "nan", "inf Hz"])
def test_bad_frequencies(bad):
    with pytest.raises(UnitError):
        parse_frequency(bad)


def test_awg_only_for_wire():
    with pytest.raises(UnitError, match="gauge"):
        parse_length("18awg")


@pytest.mark.parametrize(
    "text, segments",
    [
        ("3.5-30MHz", [(3.5e6, 30e6)]),
        ("3.5MHz-30MHz", [(3.5e6, 30e6)]),
        ("1.8-2MHz,3.5-4MHz", [(1.8e6, 2e6), (3.5e6, 4e6)]),
        ("7e6-30e6", [(7e6, 30e6)]),
        ("500kHz-2MHz", [(5e5, 2e6)]),
        ("1 - 30 MHz", [(1e6, 30e6)]),
    ],
)
def test_band(text, segments):
    b = parse_band(text)
    assert [tuple(s) for s in b.segments] == [pytest.approx(s) for s in segments]


@pytest.mark.parametrize("bad", ["30-3.5MHz", "abc", "1-", "-5-3MHz", "1MHz", "", "3-3MHz", "1-2MHz,,3-4MHz"])
def test_bad_band(bad):
    with pytest.raises(UnitError):
        parse_band(bad)


@given(lo=st.floats(1e3, 1e9), ratio=st.floats(1.001, 1e3))
def test_band_grid_contains_edges(lo, ratio):
    # Property: the grid reaches both edges, so extremes at the edges are seen.
    b = Band.single(lo, lo * ratio)
    g = b.grid(20)
    assert b.contains(g).all()
    assert g[0] == pytest.approx(lo) and g[-1] == pytest.approx(lo * ratio)
    assert (g[1:] > g[:-1]).all()


@given(st.floats(1e-3, 1e4))
def test_length_roundtrip_mm(v):
    assert parse_length(f"{v!r}mm") == pytest.approx(v * 1e-3)
    assert math.isfinite(parse_length(f"{v!r}in"))


@pytest.mark.parametrize("text, gauge", [("0000awg", -3), ("4/0awg", -3), ("000awg", -2), ("2/0awg", -1), ("00awg", -1), ("0awg", 0)])
def test_aught_gauges(text, gauge):
    # ASTM B258: 4/0 (0000) AWG is 0.4600 in = 11.684 mm; each aught step is n − 1 in the formula.
    assert parse_wire_diameter(text) == pytest.approx(awg_diameter(gauge))
    if gauge == -3:
        assert parse_wire_diameter(text) == pytest.approx(11.684e-3, rel=1e-4)


def test_unitless_band_refused():
    # A unit-less "7-7.3" would be hertz; plain numbers in hertz stay accepted (7e6-30e6).
    with pytest.raises(UnitError, match="no unit"):
        parse_band("7-7.3")
    assert parse_band("7e6-7.3e6").low == pytest.approx(7e6)


def test_case_forgiving_where_unambiguous():
    # SI prefixes (BIPM SI Brochure, Table 7): "ghz" and "PF" can only mean GHz and pF here.
    assert parse_frequency("1ghz") == pytest.approx(1e9)
    assert parse_capacitance("2.8PF") == pytest.approx(2.8e-12)
    with pytest.raises(UnitError):
        parse_length("1M")
