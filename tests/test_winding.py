"""Conductors, fit, resistance and stray capacitance."""

import math
import warnings

import numpy as np
import pytest
from hypothesis import given
from hypothesis import strategies as st

from cmcheck.errors import CmcheckWarning, DimensionError, WindingError
from cmcheck.model.winding import (
    Cable,
    Winding,
    Wire,
    check_fit,
    max_turns_single_layer,
    round_wire_resistance,
    skin_depth,
    stray_capacitance,
    turn_to_turn_capacitance,
)
from cmcheck.model.cores import RingCore


def test_skin_depth_copper():
    # δ = √(ρ/(π f µ0)) (Ramo, Whinnery & Van Duzer, 3rd ed., eq. 3.16(6)) with IEC 60028
    # ρ20 = 0.017241 Ω·mm²/m, evaluated: 66.08 µm at 1 MHz, 20.90 µm at 10 MHz.
    assert skin_depth(1e6) == pytest.approx(66.08e-6, abs=0.01e-6)
    assert skin_depth(10e6) == pytest.approx(20.90e-6, abs=0.01e-6)


def test_wire_resistance_limits():
    # DC limit: R = ρ·l/(π a²) (IEC 60028 resistivity); high-frequency limit R → ρ·l/(2π a δ)
    # for a ≫ δ (Ramo, Whinnery & Van Duzer, 3rd ed., §5.6, large-ka asymptote; at 100 MHz
    # on 18 AWG, δ/a ≈ 0.013, so the next term is well inside 1 %).
    d = 1.0237e-3
    a = d / 2
    r_dc = 0.017241e-6 / (math.pi * a**2)
    assert round_wire_resistance(10.0, d, 1.0) == pytest.approx(r_dc, rel=1e-6)
    f = 100e6
    r_hf = 0.017241e-6 / (2 * math.pi * a * skin_depth(f))
    assert round_wire_resistance(f, d, 1.0) == pytest.approx(r_hf, rel=0.01)


def test_max_turns_geometry():
    # Equal circles round the inside of a circle: N = floor(π / asin(d/(D − d))) (geometry).
    assert max_turns_single_layer(35.6e-3, 5e-3) == math.floor(math.pi / math.asin(5 / 30.6))
    assert max_turns_single_layer(4e-3, 5e-3) == 0
    assert max_turns_single_layer(6e-3, 3.5e-3) == 1  # only one pass fits
    # Vectorised over candidates.
    assert list(max_turns_single_layer(np.array([35.6e-3, 4e-3]), 5e-3)) == [19, 0]


def test_turn_length_rectangle():
    # Geometry: centre line around a w × h rectangle with corners rounded by d/2: 2(w+h) + πd.
    assert RingCore(61e-3, 35.6e-3, 12.7e-3).turn_length(5e-3) == pytest.approx(2 * (12.7e-3 + 12.7e-3) + math.pi * 5e-3)


def test_fit_errors_and_warnings():
    with pytest.raises(WindingError, match="does not pass"):
        check_fit(4e-3, Winding(1, Cable(5e-3)))
    with pytest.warns(CmcheckWarning, match="more than one layer"):
        check_fit(35.6e-3, Winding(30, Cable(5e-3)))
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        assert check_fit(35.6e-3, Winding(10, Cable(5e-3))) == 19


@pytest.mark.parametrize("bad", [lambda: Wire(-1e-3), lambda: Wire(1e-3, -1e-5), lambda: Cable(0.0), lambda: Cable(5e-3, 3e-3)])
def test_bad_conductors(bad):
    with pytest.raises(DimensionError):
        bad()


@pytest.mark.parametrize("turns", [0, -3, 2.5, True])
def test_bad_turns(turns):
    with pytest.raises(WindingError):
        Winding(turns, Wire(1e-3))


def test_two_wire_capacitance_reference():
    # Two-wire line C' = π ε0 / acosh(s/d) (Ramo, Whinnery & Van Duzer, Table 5.11a). A core
    # whose faces have zero width (OD = ID + tiny) and pitch fixed by N reduces to that formula
    # over the two walls: C = 2·h·π ε0/acosh(s/d) when inner and outer spacings are equal.
    eps0 = 8.8541878128e-12
    d = 1e-3
    idd = 40e-3
    n = 20
    s = math.pi * (idd - d) / n
    c = turn_to_turn_capacitance(RingCore(idd + 1e-9, idd, 10e-3).turn_geometry(d), d, d, n, 1.0)
    s_out = math.pi * (idd + 1e-9 + d) / n
    expected = 10e-3 * math.pi * eps0 * (1 / math.acosh(s / d) + 1 / math.acosh(s_out / d))
    assert c == pytest.approx(expected, rel=1e-6, abs=0)  # pF values: no absolute slack


def test_stray_capacitance_limits():
    # Massarini & Kazimierczuk, IEEE TPEL 12(4) 1997: Cs → (1+√3)/2 · Ctt for many turns;
    # one turn has no turn-to-turn capacitance; two turns are one Ctt.
    args = (RingCore(61e-3, 35.6e-3, 12.7e-3).turn_geometry(5e-3), 5e-3, 3.8e-3)
    ctt = turn_to_turn_capacitance(*args, 12, 2.0)
    assert stray_capacitance(*args, 12, 2.0) == pytest.approx((1 + math.sqrt(3)) / 2 * ctt, abs=0)
    assert stray_capacitance(*args, 1, 2.0) == 0.0
    assert stray_capacitance(*args, 2, 2.0) == pytest.approx(turn_to_turn_capacitance(*args, 2, 2.0), abs=0)


@given(n=st.integers(2, 40))
def test_capacitance_grows_as_turns_crowd(n):
    # Closer turns (more of them) can only raise the per-pair capacitance (two-wire formula is
    # monotonic in spacing; Ramo et al. Table 5.11a).
    args = (RingCore(61e-3, 35.6e-3, 12.7e-3).turn_geometry(2e-3), 2e-3, 1.6e-3)
    assert turn_to_turn_capacitance(*args, n + 1, 2.0) >= turn_to_turn_capacitance(*args, n, 2.0)


def test_cable_shield_diameter():
    c = Cable(5e-3)
    # Default jacket 12 % of the OD (typical small coax, from memory).
    assert c.conducting_diameter == pytest.approx(5e-3 * 0.76)


def test_two_conductors_at_half_the_hole():
    # Geometry: two circles of diameter D/2 fit side by side across a hole of diameter D.
    assert max_turns_single_layer(10e-3, 5e-3) == 2


def test_impossible_turn_count_is_an_error():
    # Densest packing of circles in the plane covers π/(2√3) of it (Thue's theorem): 200 turns
    # of 5 mm (d²·N = 5000 mm²) cannot pass a 35.6 mm hole (0.907·35.6² ≈ 1149 mm²) in any layers.
    with pytest.raises(WindingError, match="any number of layers"):
        check_fit(35.6e-3, Winding(200, Cable(5e-3)))
