"""Core effective parameters.

References
----------
[1] IEC 60205:2016, Calculation of the effective parameters of magnetic piece parts — ring cores
    of rectangular section: C1 = 2π/(h·ln(r2/r1)), C2 = 2π(1/r1 − 1/r2)/(h²·ln³(r2/r1)).
[2] S. Ramo, J. R. Whinnery, T. Van Duzer, Fields and Waves in Communication Electronics, 3rd ed.,
    Wiley, 1994, Table 5.11a (coaxial line, inductance per unit length µ/(2π)·ln(b/a)).
[3] IEC 60050-221, IEV 221-04-31 (effective length, area, volume: le = C1²/C2, Ae = C1/C2).
"""

import math

import numpy as np
import pytest
from hypothesis import given
from hypothesis import strategies as st

from cmcheck.model.cores import FactorCore, RingCore, effective_parameters, ring_core_factors, sleeve
from cmcheck.errors import DimensionError


def test_iec60205_worked_ring():
    # [1] ring-core formulas with [3]; 60/35/12.5 mm evaluated from them (rounded):
    # C1 = 0.93258 mm^-1, le = 142.24 mm, Ae = 152.52 mm², Ve = 21 694 mm³.
    core = RingCore(60e-3, 35e-3, 12.5e-3)
    assert core.c1 == pytest.approx(0.93258e3, rel=2e-5)
    assert core.le == pytest.approx(142.24e-3, rel=5e-5)
    assert core.ae == pytest.approx(152.52e-6, rel=5e-5)
    assert core.ve == pytest.approx(21694e-9, rel=5e-5)


def test_effective_definitions_consistent():
    # C1, C2 from [1] evaluated here; le = C1²/C2, Ae = C1/C2, Ve = C1³/C2² [3].
    r2, r1, h = 61e-3 / 2, 35.6e-3 / 2, 12.7e-3
    k = math.log(r2 / r1)
    c1_ref, c2_ref = 2 * math.pi / (h * k), 2 * math.pi * (1 / r1 - 1 / r2) / (h**2 * k**3)
    c1, c2 = ring_core_factors(61e-3, 35.6e-3, 12.7e-3)
    assert (c1, c2) == pytest.approx((c1_ref, c2_ref), rel=1e-12)
    le, ae, ve = effective_parameters(c1_ref, c2_ref)
    assert (le, ae, ve) == pytest.approx((c1_ref**2 / c2_ref, c1_ref / c2_ref, c1_ref**3 / c2_ref**2), rel=1e-12)


@pytest.mark.parametrize("ratio, understatement", [(1.5, 0.0135), (2.0, 0.0382)])
def test_mean_path_approximation_understates(ratio, understatement):
    # The mean-path approximation (le = π(OD+ID)/2, A = h(OD−ID)/2) against [1]:
    # 1 − 2(r − 1)/((r + 1)·ln r) = 1.35 % at r = OD/ID = 1.5 and 3.82 % at 2.0.
    od, id_, h = ratio * 20e-3, 20e-3, 10e-3
    c1_exact = RingCore(od, id_, h).c1
    c1_mean = (math.pi * (od + id_) / 2) / (h * (od - id_) / 2)
    assert 1 - c1_exact / c1_mean == pytest.approx(understatement, abs=5e-5)


@given(k=st.integers(1, 8))
def test_stacking_divides_c1(k):
    # IEC 60205: C1 = Σ l/A; stacking k identical rings multiplies A by k.
    one = RingCore(25.4e-3, 15.5e-3, 6.35e-3)
    assert one.stacked(k).c1 == pytest.approx(one.c1 / k)
    assert one.stacked(k).le == pytest.approx(one.le)


def test_sleeve_is_long_ring():
    # A long sleeve is a coaxial magnetic path: per metre of length L' = µ/(2π)·ln(b/a) [2],
    # so one pass through it has L0 = µ0·h·ln(OD/ID)/(2π), i.e. C1 = µ0/L0 = 2π/(h·ln(OD/ID)) [1];
    # values from the closed form, not from RingCore.
    od, id_, length = 17.5e-3, 9.5e-3, 28.5e-3
    s = sleeve(od, id_, length)
    assert s.c1 == pytest.approx(2 * math.pi / (length * math.log(od / id_)), rel=1e-12)
    # Two sleeves end to end: the path is twice as long (heights add [1]).
    assert sleeve(od, id_, length, 2).c1 == pytest.approx(math.pi / (length * math.log(od / id_)), rel=1e-12)


def test_vectorised_factors():
    od = np.array([10e-3, 25e-3, 61e-3])
    c1, c2 = ring_core_factors(od, od * 0.6, od * 0.3)
    assert c1.shape == (3,)
    # C1 = 2π/(h·ln(OD/ID)) [1], evaluated here for each ring of the array.
    assert np.allclose(c1, 2 * np.pi / (od * 0.3 * np.log(1 / 0.6)), rtol=1e-12)


@pytest.mark.parametrize(
    "od, id_, h, match",
    [(30e-3, 35e-3, 10e-3, "smaller than OD"), (30e-3, 30e-3, 10e-3, "smaller than OD"),
     (30e-3, 20e-3, -1e-3, "height"), (0.0, 20e-3, 1e-3, "OD"), (30e-3, float("nan"), 1e-3, "ID")],
)
def test_impossible_rings(od, id_, h, match):
    with pytest.raises(DimensionError, match=match):
        RingCore(od, id_, h)


def test_factor_core():
    # A two-hole core given by its core factor: A/l = 0.00154 m → Σl/A ≈ 649 1/m
    # (measurer's figure, ../shared/real-measurements/SOURCES.md).
    # Two turns through it have L0 = µ0·N²/C1 = µ0·4·0.00154 m = 7.74 nH per unit permeability [1].
    from cmcheck.model.choke import ChokeDesign
    from cmcheck.model.materials import get_material
    from cmcheck.model.winding import Winding, Wire

    core = FactorCore(1 / 0.00154)
    design = ChokeDesign(core, get_material("nizn-800"), Winding(2, Wire(0.5e-3)))
    assert design.l0 == pytest.approx(4e-7 * math.pi * 4 * 0.00154, rel=1e-12)
    with pytest.raises(DimensionError):
        FactorCore(-1.0)
