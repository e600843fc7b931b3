"""Reality checks of the NiZn family member at µi 800 against independent real measurements.

The files live in ../shared/real-measurements (licences beside them) and are read in place;
these tests skip when that folder is absent. Resistance and reactance are checked separately,
each as a fraction of the measured |Z| (a relative error of R alone means nothing where R ≪ X),
and R relative to itself wherever R carries at least a quarter of |Z|.

Which file tuned what: the NiZn family's dispersion shape (damping ratio, domain-wall share,
Snoek products in cmcheck/model/data/materials.json) was adjusted toward
ring-windings/ring-9.55x4.75x3.2mm-2turns.s1p only. Every other file here was not used to set
any constant: those are the acceptance checks. On them the family disperses at too high a
frequency (a frequency scale of 0.4–0.75 would fit them better), so their tolerances are wider
and say so.
"""

import numpy as np
import pytest

from cmcheck.model.choke import ChokeDesign
from cmcheck.model.cores import FactorCore, RingCore
from cmcheck.model.dispersion import Debye
from cmcheck.model.materials import Material, get_material
from cmcheck.model.winding import Winding, Wire


def _reflection_z(path):
    # Reflection method Z = Z0(1 + S11)/(1 − S11) (Keysight Impedance Measurement Handbook,
    # reflection coefficient method); read with scikit-rf's Touchstone text parser. Sorted,
    # because some files have overlapping sweep segments.
    from skrf.io.touchstone import Touchstone

    t = Touchstone(str(path))
    s11 = t.s[:, 0, 0]
    order = np.argsort(t.f)
    return t.f[order], (50.0 * (1 + s11) / (1 - s11))[order]


def _errors(z_model, z_meas):
    """(ΔR/|Zm|, ΔX/|Zm|, R relative error where Rm ≥ |Zm|/4)."""
    mag = np.abs(z_meas)
    dr = (z_model.real - z_meas.real) / mag
    dx = (z_model.imag - z_meas.imag) / mag
    lossy = z_meas.real >= 0.25 * mag
    return dr, dx, (z_model.real[lossy] / z_meas.real[lossy] - 1)


def _lossless(mu_i=800.0):
    # The naive model a practitioner might try: a constant real µ = µi (no dispersion, no loss).
    return Material("lossless", Debye(mu_i, 1e15))


NIZN_800 = "nizn-800"  # the NiZn family member at µi 800; alias of the old class name


def test_tuned_ring_r_and_x(real_dir):
    # TUNED ON THIS FILE: 2 turns on a 9.55 × 4.75 × 3.2 mm ring bought as NiZn µi ≈ 800
    # (SOURCES.md). Guards the fit against regressions: R and X each within 10 % of |Z|, and R
    # within 15 % of itself, 1–30 MHz.
    f, z = _reflection_z(real_dir / "ring-windings" / "ring-9.55x4.75x3.2mm-2turns.s1p")
    band = (f >= 1e6) & (f <= 30e6)
    core, winding = RingCore(9.55e-3, 4.75e-3, 3.2e-3), Winding(2, Wire(0.5e-3))
    dr, dx, rr = _errors(ChokeDesign(core, get_material(NIZN_800), winding).impedance(f[band]), z[band])
    assert np.abs(dr).max() < 0.10 and np.abs(dx).max() < 0.10
    assert rr.size > 100 and np.abs(rr).max() < 0.15
    # The naive lossless core misses R by most of |Z| here.
    ndr, _, _ = _errors(ChokeDesign(core, _lossless(), winding).impedance(f[band]), z[band])
    assert np.abs(ndr).max() > 0.5


def test_low_frequency_inductance(real_dir):
    # NOT TUNED: the measurer's LCR reading for that ring, 1.31 µH at 10 kHz (SOURCES.md). The
    # family member is named by its nominal µi (800), which a bought core meets only roughly
    # (from memory, ±20–25 % is usual for ferrite µi): within 25 %.
    design = ChokeDesign(RingCore(9.55e-3, 4.75e-3, 3.2e-3), get_material(NIZN_800), Winding(2, Wire(0.5e-3)))
    assert design.low_frequency_inductance() == pytest.approx(1.31e-6, rel=0.25)


def test_two_hole_core_r_and_x(real_dir):
    # NOT TUNED: one turn through a two-hole NiZn µi ≈ 800 core, core factor Σl/A ≈ 649 1/m
    # from the measurer's A/l (SOURCES.md). 3–30 MHz: R within 20 % of |Z| (and within 40 % of
    # itself), X too high by up to 30 % of |Z| — the family disperses at too high a frequency
    # for this core (at 30 MHz: measured ≈ 66 + j39 Ω, model ≈ 76 + j61 Ω).
    f, z = _reflection_z(real_dir / "two-hole-windings" / "two-hole-1turn.s1p")
    keep = (f >= 3e6) & (f <= 30e6)
    f, z = f[keep], z[keep]
    core, winding = FactorCore(1 / 0.00154), Winding(1, Wire(0.5e-3), cp=0.0)
    dr, dx, rr = _errors(ChokeDesign(core, get_material(NIZN_800), winding).impedance(f), z)
    assert np.abs(dr).max() < 0.20
    assert -0.05 < dx.min() and dx.max() < 0.32
    assert rr.size == f.size and np.abs(rr).max() < 0.40
    # Naive lossless core: R = 0 against a mostly resistive measurement.
    ndr, _, _ = _errors(ChokeDesign(core, _lossless(), winding).impedance(f), z)
    assert np.abs(ndr).max() > 0.8


@pytest.mark.parametrize(
    "name, core, turns, f_lo, f_hi",
    [
        # Two stacked 25.4 × 15.5 × 6.35 mm rings, 4-turn primary, secondary open (SOURCES.md).
        ("stack2-4t28t-primary-secondary-open.s1p", RingCore(25.4e-3, 15.5e-3, 6.35e-3, 2), 4, 0.3e6, 2.5e6),
        # One 16.25 × 7.9 × 14.3 mm ring, 3-turn primary, secondary open.
        ("single-3t21t-primary-secondary-open.s1p", RingCore(16.25e-3, 7.9e-3, 14.3e-3), 3, 0.2e6, 2.5e6),
    ],
)
def test_transformer_primaries_r_and_x(real_dir, name, core, turns, f_lo, f_hi):
    # NOT TUNED: NiZn µi ≈ 800 class cores (SOURCES.md); the primary's magnetising impedance
    # with the secondary open is the winding model jωL0µ (IEV 221-03-06) well below the
    # self-resonance the secondary brings (~8 MHz). X within 27 % of |Z|; R within 25 % of |Z|
    # but, where R matters (≥ |Z|/4, near 2.5 MHz), the model gives only about half the
    # measured R: the loss sets in at a lower frequency on these cores than in the family.
    f, z = _reflection_z(real_dir / "efhw-transformers" / name)
    keep = (f >= f_lo) & (f <= f_hi)
    winding = Winding(turns, Wire(0.3e-3, 0.02e-3), cp=0.0)
    dr, dx, rr = _errors(ChokeDesign(core, get_material(NIZN_800), winding).impedance(f[keep]), z[keep])
    assert np.abs(dr).max() < 0.25 and np.abs(dx).max() < 0.27
    assert rr.size and -0.55 < rr.min() and rr.max() < 0.0


def test_cp_as_a_dielectric_core_under_states_this_ring(real_dir):
    # 25 turns on a 10 × 4 × 4 mm ring (SOURCES.md): LCR 55 µH and self-resonance near 9.4 MHz
    # give Cp ≈ 1/((2π·9.4 MHz)²·55 µH) ≈ 5.2 pF (Thomson's formula; µ' falls little below
    # 10 MHz for a µi ≈ 120 material, from memory). Read as a NiZn (dielectric) core the energy
    # method gives far less (0.4–1.3 pF, the ferrite gap and the air across the ends): this core
    # behaves as a conductive one (tests/test_cp_in_model.py predicts its resonance as such).
    measured_cp = 1 / ((2 * np.pi * 9.4e6) ** 2 * 55e-6)
    design = ChokeDesign(RingCore(10e-3, 4e-3, 4e-3), get_material("nizn-125"), Winding(25, Wire(0.3e-3, 0.02e-3)))
    assert measured_cp / 15 < design.cp < measured_cp / 2
