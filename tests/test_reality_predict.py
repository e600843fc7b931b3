"""Reality checks of the built-in generic classes against independent real measurements.

The files live in ../shared/real-measurements (licences beside them) and are read in place;
these tests skip when that folder is absent.
"""

import numpy as np
import pytest

from cmcheck.choke import ChokeDesign
from cmcheck.cores import FactorCore, RingCore
from cmcheck.materials import builtin_materials
from cmcheck.winding import Winding, Wire


def _reflection_z(path):
    # Reflection method Z = Z0(1 + S11)/(1 − S11) (Keysight Impedance Measurement Handbook,
    # reflection coefficient method); read with scikit-rf's Touchstone text parser.
    from skrf.io.touchstone import Touchstone

    t = Touchstone(str(path))
    s11 = t.s[:, 0, 0]
    return t.f, 50.0 * (1 + s11) / (1 - s11)


def test_nizn800_two_turns_on_small_ring(real_dir):
    # Independent measurement: 2 turns on a 9.55 × 4.75 × 3.2 mm ring sold as NiZn µi ≈ 800
    # (SOURCES.md). The generic class must lie within 30 % of |Z| from 1 to 30 MHz (issue 2).
    f, z = _reflection_z(real_dir / "ring-windings" / "ring-9.55x4.75x3.2mm-2turns.s1p")
    band = (f >= 1e6) & (f <= 30e6)
    design = ChokeDesign(RingCore(9.55e-3, 4.75e-3, 3.2e-3), builtin_materials()["nizn-800"], Winding(2, Wire(0.5e-3)))
    zp = design.impedance(f[band])
    err = np.abs(np.abs(zp) / np.abs(z[band]) - 1)
    assert err.max() < 0.30


def test_nizn800_low_frequency_inductance(real_dir):
    # The measurer's LCR reading for that ring: 1.31 µH at 10 kHz (SOURCES.md). The generic
    # class's µi ≈ 800 is representative, not exact (from memory): within 25 %.
    design = ChokeDesign(RingCore(9.55e-3, 4.75e-3, 3.2e-3), builtin_materials()["nizn-800"], Winding(2, Wire(0.5e-3)))
    assert design.low_frequency_inductance() == pytest.approx(1.31e-6, rel=0.25)


def test_two_hole_core_by_factor(real_dir):
    # One turn through a two-hole NiZn µi ≈ 800 core, core factor Σl/A ≈ 649 1/m given by the
    # measurer (SOURCES.md). The generic class follows |Z| within a factor of two from 3 to
    # 30 MHz (a looser bound: two-hole cores sit further from the ring assumptions).
    f, z = _reflection_z(real_dir / "two-hole-windings" / "two-hole-1turn.s1p")
    keep = (f >= 3e6) & (f <= 30e6)
    f, z = f[keep], z[keep]
    order = np.argsort(f)  # this file has overlapping sweep segments
    design = ChokeDesign(FactorCore(1 / 0.00154), builtin_materials()["nizn-800"], Winding(1, Wire(0.5e-3), cp=0.0))
    ratio = np.abs(design.impedance(f[order])) / np.abs(z[order])
    assert (ratio > 0.5).all() and (ratio < 2.0).all()
