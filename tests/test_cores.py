"""Core effective parameters."""

import math

import numpy as np
import pytest
from hypothesis import given
from hypothesis import strategies as st

from cmcheck.model.cores import FactorCore, RingCore, effective_parameters, ring_core_factors, sleeve
from cmcheck.errors import DimensionError


def test_iec60205_worked_ring():
    # IEC 60205:2016 ring-core formulas; worked 60/35/12.5 mm values from ../shared/DESIGN.md §4:
    # C1 = 0.93258 mm^-1, le = 142.24 mm, Ae = 152.52 mm², Ve = 21 694 mm³.
    core = RingCore(60e-3, 35e-3, 12.5e-3)
    assert core.c1 == pytest.approx(0.93258e3, rel=2e-5)
    assert core.le == pytest.approx(142.24e-3, rel=5e-5)
    assert core.ae == pytest.approx(152.52e-6, rel=5e-5)
    assert core.ve == pytest.approx(21694e-9, rel=5e-5)


def test_effective_definitions_consistent():
    # IEV 221-04-31 / IEC 60205 clause 4: le = C1²/C2, Ae = C1/C2, Ve = le·Ae.
    c1, c2 = ring_core_factors(61e-3, 35.6e-3, 12.7e-3)
    le, ae, ve = effective_parameters(c1, c2)
    assert le / ae == pytest.approx(c1)
    assert ve == pytest.approx(le * ae)


@pytest.mark.parametrize("ratio, understatement", [(1.5, 0.0135), (2.0, 0.0382)])
def test_mean_path_approximation_understates(ratio, understatement):
    # ../shared/DESIGN.md §4: the mean-path approximation (le = π(OD+ID)/2, A = h(OD−ID)/2)
    # under-states L by 1.35 % at OD/ID = 1.5 and 3.82 % at 2.0.
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
    s = sleeve(17.5e-3, 9.5e-3, 28.5e-3)
    assert s.c1 == pytest.approx(RingCore(17.5e-3, 9.5e-3, 28.5e-3).c1)


def test_vectorised_factors():
    od = np.array([10e-3, 25e-3, 61e-3])
    c1, c2 = ring_core_factors(od, od * 0.6, od * 0.3)
    assert c1.shape == (3,)
    assert c1[0] == pytest.approx(RingCore(10e-3, 6e-3, 3e-3).c1)


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
    core = FactorCore(1 / 0.00154)
    assert core.c1 == pytest.approx(649.35, rel=1e-4)
    with pytest.raises(DimensionError):
        FactorCore(-1.0)
