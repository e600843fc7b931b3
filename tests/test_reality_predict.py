"""Reality checks of the built-in generic classes against independent real measurements.

The files live in ../shared/real-measurements (licences beside them) and are read in place;
these tests skip when that folder is absent.
"""

import numpy as np
import pytest

from cmcheck.model.choke import ChokeDesign
from cmcheck.model.cores import FactorCore, RingCore
from cmcheck.model.materials import get_material, builtin_materials
from cmcheck.model.winding import Winding, Wire


def _reflection_z(path):
    # Reflection method Z = Z0(1 + S11)/(1 − S11) (Keysight Impedance Measurement Handbook,
    # reflection coefficient method); read with scikit-rf's Touchstone text parser.
    from skrf.io.touchstone import Touchstone

    t = Touchstone(str(path))
    s11 = t.s[:, 0, 0]
    return t.f, 50.0 * (1 + s11) / (1 - s11)


def test_nizn800_two_turns_on_small_ring(real_dir):
    # 2 turns on a 9.55 × 4.75 × 3.2 mm ring sold as NiZn µi ≈ 800 (SOURCES.md): within 30 % of
    # |Z| from 1 to 30 MHz (issue 2). The class's dispersion shape was adjusted toward this very
    # file (see its provenance note), so this guards that fit against regressions; the tests
    # below hold the class against measurements it was not adjusted to.
    f, z = _reflection_z(real_dir / "ring-windings" / "ring-9.55x4.75x3.2mm-2turns.s1p")
    band = (f >= 1e6) & (f <= 30e6)
    design = ChokeDesign(RingCore(9.55e-3, 4.75e-3, 3.2e-3), get_material("nizn-800"), Winding(2, Wire(0.5e-3)))
    zp = design.impedance(f[band])
    err = np.abs(np.abs(zp) / np.abs(z[band]) - 1)
    assert err.max() < 0.30


def test_nizn800_low_frequency_inductance(real_dir):
    # The measurer's LCR reading for that ring: 1.31 µH at 10 kHz (SOURCES.md). The generic
    # class's µi ≈ 800 is representative, not exact (from memory): within 25 %.
    design = ChokeDesign(RingCore(9.55e-3, 4.75e-3, 3.2e-3), get_material("nizn-800"), Winding(2, Wire(0.5e-3)))
    assert design.low_frequency_inductance() == pytest.approx(1.31e-6, rel=0.25)


def test_two_hole_core_by_factor(real_dir):
    # One turn through a two-hole NiZn µi ≈ 800 core, core factor Σl/A ≈ 649 1/m given by the
    # measurer (SOURCES.md), which the class was not adjusted to. The generic class follows |Z|
    # within 35 % from 3 to 30 MHz (looser than for rings: a two-hole core's factor is a
    # datasheet-style figure, not a geometry we compute).
    f, z = _reflection_z(real_dir / "two-hole-windings" / "two-hole-1turn.s1p")
    keep = (f >= 3e6) & (f <= 30e6)
    f, z = f[keep], z[keep]
    order = np.argsort(f)  # this file has overlapping sweep segments
    design = ChokeDesign(FactorCore(1 / 0.00154), get_material("nizn-800"), Winding(1, Wire(0.5e-3), cp=0.0))
    ratio = np.abs(design.impedance(f[order])) / np.abs(z[order])
    assert (ratio > 0.65).all() and (ratio < 1.35).all()


@pytest.mark.parametrize(
    "name, core, turns, f_lo, f_hi, tol",
    [
        # Two stacked 25.4 × 15.5 × 6.35 mm rings, 4-turn primary, secondary open (SOURCES.md).
        ("stack2-4t28t-primary-secondary-open.s1p", RingCore(25.4e-3, 15.5e-3, 6.35e-3, 2), 4, 0.3e6, 2.5e6, 0.20),
        # One 16.25 × 7.9 × 14.3 mm ring, 3-turn primary, secondary open.
        ("single-3t21t-primary-secondary-open.s1p", RingCore(16.25e-3, 7.9e-3, 14.3e-3), 3, 0.2e6, 2.5e6, 0.25),
    ],
)
def test_nizn800_against_independent_transformers(real_dir, name, core, turns, f_lo, f_hi, tol):
    # Independent measurements of NiZn µi ≈ 800 class cores (SOURCES.md) that the class was not
    # adjusted to: the primary's magnetising impedance with the secondary open is the winding
    # model jωL0µ (IEV 221-03-06) well below the self-resonance the secondary brings (~8 MHz).
    f, z = _reflection_z(real_dir / "efhw-transformers" / name)
    keep = (f >= f_lo) & (f <= f_hi)
    design = ChokeDesign(core, get_material("nizn-800"), Winding(turns, Wire(0.3e-3, 0.02e-3), cp=0.0))
    err = np.abs(np.abs(design.impedance(f[keep])) / np.abs(z[keep]) - 1)
    assert err.max() < tol


def test_cp_estimate_is_a_low_first_estimate(real_dir):
    # 25 turns on a 10 × 4 × 4 mm ring (SOURCES.md): LCR 55 µH and self-resonance near 9.4 MHz
    # give Cp ≈ 1/((2π·9.4 MHz)²·55 µH) ≈ 5.2 pF (Thomson's formula; µ' falls little below
    # 10 MHz for this µi ≈ 120 material, from memory). The single-layer turn-to-turn estimate
    # ignores the ferrite's permittivity and the leads, so it under-states this: the test pins
    # how far (a factor between 2 and 15), which the documentation states.
    measured_cp = 1 / ((2 * np.pi * 9.4e6) ** 2 * 55e-6)
    design = ChokeDesign(RingCore(10e-3, 4e-3, 4e-3), get_material("nizn-125"), Winding(25, Wire(0.3e-3, 0.02e-3)))
    assert measured_cp / 15 < design.cp < measured_cp / 2
