"""Windings as lines, the line-on-core element and coupled windings."""

from __future__ import annotations

import numpy as np
import pytest
import skrf
import skrf.media

from cmcheck.errors import CmcheckError, TransformerError
from cmcheck.model.winding import Wire
from cmcheck.transformer.circuit import Circuit
from cmcheck.transformer.elements import coupled_windings_y, line_on_core_y, line_two_port_y, pair_on_core_y
from cmcheck.transformer.lines import PairLine, coax_z0, default_pair_spacing, two_wire_z0
from cmcheck.units import awg_diameter


def test_two_wire_z0_large_spacing_limit():
    # Pozar, Microwave Engineering 4th ed., Table 2.1: acosh(x) → ln(2x) for D ≫ d,
    # so Z0 → (η0/π)·ln(2D/d) ≈ 119.92·ln(2D/d) in air.
    z = two_wire_z0(0.02, 0.001)
    assert z == pytest.approx(119.9169832 * np.log(40.0), rel=2e-4)


def test_two_wire_z0_touching_enamelled_pair_is_about_35_ohm():
    # from memory: a touching enamelled 20 AWG pair with εeff ≈ 2 is about 35 Ω.
    d = awg_diameter(20)
    assert 32.0 < two_wire_z0(d + 2 * 0.03e-3, d, 2.0) < 38.0


def test_coax_z0_agrees_with_scikit_rf():
    # scikit-rf media.Coaxial (independent implementation of the coaxial line).
    freq = skrf.Frequency(1, 1, 1, unit="MHz")
    from skrf.media.coaxial import Coaxial

    ref = Coaxial(freq, Dint=1e-3, Dout=3.5e-3, epsilon_r=2.25, sigma=1e99).z0
    assert coax_z0(3.5e-3, 1e-3, 2.25) == pytest.approx(float(np.real(ref[0])), rel=1e-6)


def test_default_spacing_gives_a_real_winding_impedance():
    # from memory: enamelled bifilar windings on cores measure about 40–50 Ω; touching ≈ 35 Ω.
    wire = Wire(awg_diameter(18), 0.035e-3, 3.5)
    line = PairLine(wire, 0.3)
    assert line.centre_spacing == default_pair_spacing(wire)
    assert 40.0 <= line.z0 <= 50.0
    touching = PairLine(wire, 0.3, spacing=wire.outer_diameter)
    assert touching.z0 < 40.0
    # Velocity factor of enamelled pairs: 0.8–0.95 (from memory).
    assert 0.8 < line.velocity_factor < 0.95


def test_line_loss_grows_with_frequency_and_stays_small():
    # Skin effect: R' ∝ √f at HF (Ramo, Whinnery & Van Duzer 3rd ed., eq. 3.16(6)), so the
    # attenuation αl grows; a 0.3 m enamelled pair loses well under 0.05 dB at 30 MHz
    # (common practice, no published source).
    line = PairLine(Wire(awg_diameter(18), 0.035e-3, 3.5), 0.3)
    _, g = line.constants(np.array([1e6, 30e6]))
    att_db = 8.686 * g.real * 0.3
    assert att_db[1] > att_db[0] > 0
    assert att_db[1] < 0.05


def test_line_two_port_agrees_with_scikit_rf_lossy_line():
    # scikit-rf DefinedGammaZ0.line(...).y — an independent line model.
    f = np.array([1e6, 10e6, 30e6])
    zc = np.array([48 - 2j, 47.9 - 0.6j, 47.8 - 0.3j])
    gamma = np.array([0.002 + 0.02j, 0.006 + 0.2j, 0.01 + 0.6j])
    length = 0.7
    med = skrf.media.DefinedGammaZ0(skrf.Frequency.from_f(f, unit="Hz"), z0=zc, gamma=gamma)
    ref = med.line(length, unit="m").y
    got = line_two_port_y(zc, gamma * length)
    np.testing.assert_allclose(got.real, ref.real, rtol=1e-9, atol=1e-12)
    np.testing.assert_allclose(got.imag, ref.imag, rtol=1e-9, atol=1e-12)


def test_line_two_port_stays_accurate_at_tiny_theta():
    # Series expansion of coth x = 1/x + x/3 − …, csch x = 1/x − x/6 + … (Abramowitz & Stegun 4.5.67/4.5.65).
    x = 1e-7j
    y = line_two_port_y([50.0], [x])[0]
    assert y[0, 0] == pytest.approx((1 / x + x / 3) / 50.0, rel=1e-12)
    assert y[0, 1] == pytest.approx(-(1 / x - x / 6) / 50.0, rel=1e-12)
    with pytest.raises(TransformerError, match="non-zero"):
        line_two_port_y(50.0, 0j)


def test_pair_on_core_is_modal_admittance():
    # DESIGN of the element (Ruthroff 1959): Mᵀ·diag(Y_line, Y_cm)·M with Vd = V1 − V2 and
    # Vc = (V1 + V2)/2; built here explicitly with matrices, not through the module's Kronecker form.
    zc, gl, zw = 50.0, 0.3j + 0.01, 300 + 400j
    yl = line_two_port_y([zc], [gl])[0]
    md = np.array([[1, -1, 0, 0], [0, 0, 1, -1]], float)
    mc = np.array([[0.5, 0.5, 0, 0], [0, 0, 0.5, 0.5]])
    ycm = np.array([[1, -1], [-1, 1]]) / zw
    ref = md.T @ yl @ md + mc.T @ ycm @ mc
    got = pair_on_core_y([zc], [gl], [zw])[0]
    np.testing.assert_allclose(got.real, ref.real, atol=1e-15)
    np.testing.assert_allclose(got.imag, ref.imag, atol=1e-15)


def test_common_mode_sees_the_winding_impedance():
    # Both conductors tied at each end carry only net current: the element is then the
    # winding impedance between its ends (Guanella 1944: the choking winding).
    f = np.array([5e6])
    zw = np.array([700 + 900j])
    c = Circuit(f)
    c.stamp(("a", "a", "b", "b"), pair_on_core_y([50.0], [0.2j], zw))
    c.impedance("b", "gnd", 1e-3)
    z = c.port_impedance(["a"])[0, 0, 0]
    assert z.real == pytest.approx(700 + 1e-3, rel=1e-6)
    assert z.imag == pytest.approx(900, rel=1e-6)


def test_trifilar_with_ideal_choking_drops_the_same_voltage_on_every_conductor():
    # Ruthroff (Proc. IRE 47, 1959): with no net current and a short line, every conductor
    # of the bundle drops the same voltage; here one conductor is driven end to end.
    f = np.array([1e6])
    c = Circuit(f)
    c.stamp(("d", "gnd", "gnd", "gnd", "q", "r"), line_on_core_y(3, [75.0], [1e-6j], None))
    c.impedance("d", "gnd", 50.0)
    c.impedance("q", "gnd", 1e6)
    c.impedance("r", "gnd", 1e6)
    sol = c.solve({"d": 1.0})
    vd = sol.v("d")[0]
    assert sol.v("q")[0] == pytest.approx(-vd, rel=1e-3)
    assert sol.v("r")[0] == pytest.approx(-vd, rel=1e-3)


def test_coupled_windings_match_the_t_equivalent():
    # T-equivalent of a two-winding transformer (MIT EE Staff, Magnetic Circuits and
    # Transformers, ch. XVIII), written out by hand: Zin = Z1 + Zm ∥ (Z2' + RL/n²).
    f = np.array([2e6, 20e6])
    w = 2 * np.pi * f
    zm = 1j * w * 20e-6 * (300 - 100j)
    n = 7.0
    z1 = 1j * w * 50e-9 + 0.1
    z2 = 1j * w * 120e-9 * n**2
    c = Circuit(f)
    c.stamp(("in", "gnd", "out", "gnd"), coupled_windings_y(zm, [1.0, n], [z1, z2]))
    c.impedance("out", "gnd", 2450.0)
    got = c.port_impedance(["in"])[:, 0, 0]
    ref = z1 + 1 / (1 / zm + 1 / (z2 / n**2 + 2450.0 / n**2))
    np.testing.assert_allclose(got.real, ref.real, rtol=1e-7)
    np.testing.assert_allclose(got.imag, ref.imag, rtol=1e-7)


@pytest.mark.parametrize(
    "call, word",
    [
        (lambda: two_wire_z0(0.5e-3, 1e-3), "spacing"),
        (lambda: coax_z0(1e-3, 2e-3), "outer_diameter"),
        (lambda: PairLine(Wire(1e-3), 0.0), "length"),
        (lambda: line_on_core_y(1, [50.0], [0.1j]), "conductors"),
        (lambda: pair_on_core_y([50.0], [0.1j], [0.0]), "z_winding"),
        (lambda: coupled_windings_y([1j], [2.0, 1.0], [1j, 1j]), "ratios"),
        (lambda: Circuit([0.0, 1e6]), "frequency_hz"),
    ],
)
def test_bad_input_names_the_parameter(call, word):
    with pytest.raises(CmcheckError, match=word):
        call()
