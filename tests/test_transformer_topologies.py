"""Transmission-line transformer topologies against closed forms and scikit-rf."""

from __future__ import annotations

import numpy as np
import pytest
import skrf
import skrf.media

from cmcheck.errors import TransformerError
from cmcheck.measurement.balance import three_port_balance
from cmcheck.measurement.touchstone import read_touchstone
from cmcheck.model.cores import RingCore
from cmcheck.model.materials import get_material
from cmcheck.model.winding import Wire
from cmcheck.transformer.analysis import analyse, design_network
from cmcheck.transformer.loads import Load
from cmcheck.transformer.topologies import TOPOLOGIES, load_topology, parse_topology
from cmcheck.transformer.windings import IdealLine, LineWinding
from cmcheck.units import awg_diameter

F0 = 10e6


def ideal(z0, theta_deg=None, delay=None, zw=None, conductors=2):
    """A lossless line of electrical length θ at F0 (so θ(f) = θ·f/F0)."""
    if delay is None:
        delay = np.deg2rad(theta_deg) / (2 * np.pi * F0)
    return IdealLine(z0, delay, zw, conductors)


def ruthroff_zin(z0, rl, theta):
    # C. L. Ruthroff, "Some broad-band transformers", Proc. IRE 47(8), 1959, eq. for the 4:1 unun.
    return z0 * (rl * np.cos(theta) + 1j * z0 * np.sin(theta)) / (2 * z0 * (1 + np.cos(theta)) + 1j * rl * np.sin(theta))


def test_ruthroff_unun_equals_ruthroff_1959():
    theta = np.deg2rad(np.array([1.0, 17.0, 30.0, 60.0, 90.0, 120.0]))
    f = F0 * theta / np.deg2rad(30.0)
    r = analyse(TOPOLOGIES["ruthroff-4:1-unun"], f, ideal(100.0, 30.0), Load.resistor(200.0))
    ref = ruthroff_zin(100.0, 200.0, theta)
    np.testing.assert_allclose(r.zin.real, ref.real, rtol=0, atol=1e-6)
    np.testing.assert_allclose(r.zin.imag, ref.imag, rtol=0, atol=1e-6)
    # Worked values (rounded to 3 decimals): θ = 30° → 46.651 + j0.897 Ω, θ = 90° → 25 + j25 Ω.
    assert round(r.zin[2].real, 3) == 46.651 and round(r.zin[2].imag, 3) == 0.897
    assert round(r.zin[4].real, 3) == 25.0 and round(r.zin[4].imag, 3) == 25.0


def test_ruthroff_balun_has_the_unun_input_impedance():
    # Ruthroff 1959: the balun form of the bootstrap connection transforms like the unun
    # (same line, load lifted from ground); with open legs the load floats.
    theta = np.deg2rad(np.array([20.0, 45.0]))
    f = F0 * theta / np.deg2rad(30.0)
    r = analyse(TOPOLOGIES["ruthroff-4:1-balun"], f, ideal(100.0, 30.0), Load.resistor(200.0))
    ref = ruthroff_zin(100.0, 200.0, theta)
    np.testing.assert_allclose(r.zin.real, ref.real, atol=1e-6)
    np.testing.assert_allclose(r.zin.imag, ref.imag, atol=1e-6)


def test_guanella_4to1_with_matched_lines_is_flat():
    # G. Guanella, Brown Boveri Review 31, 1944: Z0 = RL/2 gives RL/4 at every θ.
    f = np.linspace(1e6, 80e6, 9)
    r = analyse(TOPOLOGIES["guanella-4:1"], f, ideal(100.0, 40.0), Load.resistor(200.0))
    np.testing.assert_allclose(r.zin.real, 50.0, atol=1e-6)
    np.testing.assert_allclose(r.zin.imag, 0.0, atol=1e-6)


def test_guanella_1to1_equals_scikit_rf_line_transformation():
    # scikit-rf media: a line of Z0, θ terminated in the load, as an independent check.
    f = np.array([3e6, 10e6, 25e6])
    zl = 30 - 45j
    line = ideal(75.0, delay=4e-9)
    r = analyse(TOPOLOGIES["guanella-1:1"], f, line, Load.complex(zl))
    freq = skrf.Frequency.from_f(f, unit="Hz")
    med = skrf.media.DefinedGammaZ0(freq, z0=75.0, gamma=2j * np.pi * f * 4e-9)
    ref = (med.line(1.0, unit="m") ** med.load((zl - 50) / (zl + 50), z0=50)).z[:, 0, 0]
    np.testing.assert_allclose(r.zin.real, ref.real, rtol=1e-7)
    np.testing.assert_allclose(r.zin.imag, ref.imag, rtol=1e-7)


def _independent_guanella_cmrr(f, z0, tau, zw, rl, zp, zn):
    """Nodal solve written out for the Guanella 1:1: nodes (in, p, n), source 50 Ω."""
    out = []
    for fi, zwi in zip(f, zw):
        x = 2j * np.pi * fi * tau
        a = np.cosh(x) / (z0 * np.sinh(x))
        b = -1 / (z0 * np.sinh(x))
        yl = np.array([[a, b], [b, a]])
        md = np.array([[1, -1, 0, 0], [0, 0, 1, -1]])
        mc = 0.5 * np.array([[1, 1, 0, 0], [0, 0, 1, 1]])
        y4 = md.T @ yl @ md + mc.T @ (np.array([[1, -1], [-1, 1]]) / zwi) @ mc
        keep = [0, 2, 3]  # terminal b1 is ground
        y = y4[np.ix_(keep, keep)].astype(complex)
        y[0, 0] += 1 / 50
        y[1, 1] += 1 / rl + 1 / zp
        y[2, 2] += 1 / rl + 1 / zn
        y[1, 2] -= 1 / rl
        y[2, 1] -= 1 / rl
        v = np.linalg.solve(y, np.array([1 / 50, 0, 0]))
        ip = (v[1] - v[2]) / rl + v[1] / zp
        i_n = (v[2] - v[1]) / rl + v[2] / zn
        out.append((20 * np.log10(abs(ip - i_n) / abs(ip + i_n)), abs(ip + i_n)))
    return np.array(out)


def test_asymmetric_load_common_mode_falls_as_choking_rises():
    # Common practice, no published source: more choking impedance, less common-mode
    # current; the CMRR is checked against the nodal solve written out above.
    f = np.array([7e6, 14e6])
    rl, zp, zn = 50.0, 20.0 + 10j, 300.0 - 50j
    previous = None
    for zw_ohm in (100.0, 1000.0, 10000.0):
        zw = np.full(f.shape, zw_ohm * (1 + 0.5j))
        line = IdealLine(50.0, 3e-9, lambda ff, zw=zw: zw)
        r = analyse(TOPOLOGIES["guanella-1:1"], f, line, Load.resistor(rl, leg_p=zp, leg_n=zn))
        ref = _independent_guanella_cmrr(f, 50.0, 3e-9, zw, rl, zp, zn)
        np.testing.assert_allclose(r.cmrr_db, ref[:, 0].real, atol=1e-6)
        icm = np.abs(r.output_current.sum(axis=1)) / np.sqrt(r.power_w * 200.0)  # per source volt
        np.testing.assert_allclose(icm, ref[:, 1].real, rtol=1e-6)
        if previous is not None:
            assert np.all(icm < previous)
        previous = icm


def test_9to1_and_voltage_balun_ratios_at_short_lines():
    # Ruthroff 1959: the trifilar voltage-adding unun steps voltage 3× (impedance 9×), and the
    # trifilar voltage balun puts ±V/2 on the outputs, for electrically short lines.
    f = np.array([1e5])
    r9 = analyse(TOPOLOGIES["9:1-unun"], f, ideal(100.0, delay=1e-12, conductors=3), Load.resistor(450.0))
    assert r9.zin[0].real == pytest.approx(50.0, rel=1e-4)
    assert abs(r9.zin[0].imag) < 1e-2
    rv = analyse(TOPOLOGIES["voltage-1:1"], f, ideal(100.0, delay=1e-12, conductors=3), Load.resistor(50.0))
    assert rv.zin[0].real == pytest.approx(50.0, rel=1e-4)
    ip, i_n = rv.output_current[0]
    assert abs(ip + i_n) / abs(ip) < 1e-4  # balanced: no net output current


def test_conductor_count_must_match_topology():
    with pytest.raises(TransformerError, match="conductors"):
        analyse(TOPOLOGIES["9:1-unun"], [1e6], ideal(100.0, 10.0), Load.resistor(450.0))


def test_wound_4to1_holds_its_match():
    # Common practice, no published source: 8 bifilar turns of 18 AWG enamelled wire on a
    # 35.6 × 23 × 12.7 mm NiZn µi ≈ 800 ring, into 200 Ω: SWR below about 1.2 at 6.5 MHz
    # and about 1.1–1.4 at 30 MHz with a real winding's line impedance.
    w = LineWinding(RingCore(35.6e-3, 23e-3, 12.7e-3), get_material("nizn-800"), 8, Wire(awg_diameter(18), 0.035e-3, 3.5))
    r = analyse(TOPOLOGIES["ruthroff-4:1-unun"], np.array([6.5e6, 30e6]), w, Load.resistor(200.0), power_w=100.0)
    assert r.swr[0] < 1.2
    assert 1.1 <= r.swr[1] <= 1.4
    # Ruthroff 1959: the bootstrap winding carries the input voltage; at a good match that is √(P·50).
    assert r.winding_voltage[0, 0] == pytest.approx(np.sqrt(100.0 * 50.0), rel=0.05)
    assert np.all(r.insertion_loss_db > r.mismatch_loss_db)  # core and copper loss on top of mismatch


def test_design_network_balance_and_touchstone_round_trip(tmp_path):
    # Bockelman & Eisenstadt, IEEE T-MTT 43(7), 1995: a 1:1 balun with finite choking has a
    # finite mixed-mode CMRR that improves with choking; the exported Touchstone reads back.
    f = np.array([5e6, 10e6, 20e6])
    cmrr = []
    for zw in (200.0, 5000.0):
        line = IdealLine(50.0, 2e-9, lambda ff, zw=zw: np.full(ff.shape, zw + 0j))
        net = design_network(TOPOLOGIES["guanella-1:1"], f, line)
        cmrr.append(three_port_balance(f, net.s).cmrr_db)
    assert np.all(cmrr[1] > cmrr[0] + 20)
    path = tmp_path / "balun.s3p"
    net.write_touchstone(str(path.with_suffix("")))
    back = read_touchstone(path)
    np.testing.assert_allclose(back.s.real, net.s.real, atol=1e-6)
    np.testing.assert_allclose(back.s.imag, net.s.imag, atol=1e-6)


def test_toml_topology_equals_builtin():
    text = """
name = "my-unun"
ratio = 4
outputs = ["out"]
[[line]]
end1 = ["in", "gnd"]
end2 = ["out", "in"]
"""
    t = parse_topology(text, "my.toml")
    f = np.array([5e6, 30e6])
    a = analyse(t, f, ideal(60.0, 20.0), Load.resistor(200.0))
    b = analyse(TOPOLOGIES["ruthroff-4:1-unun"], f, ideal(60.0, 20.0), Load.resistor(200.0))
    np.testing.assert_array_equal(a.zin, b.zin)


@pytest.mark.parametrize(
    "text, word",
    [
        ("name = 'x'\nratio = 4\n", "line"),
        ("name = 'x'\nratio = 4\ncolour = 1\n[[line]]\nend1=['in','gnd']\nend2=['out','in']\n", "colour"),
        ("name = 'x'\nratio = 4\n[[line]]\nend1=['in']\nend2=['out']\n", "line 1"),
        ("name = 'x'\nratio = 4\n[[line]]\nend1=['a','gnd']\nend2=['out','a']\n", "'in'"),
        ("name = 'x'\nratio = 'four'\n[[line]]\nend1=['in','gnd']\nend2=['out','in']\n", "ratio"),
        ("name = ", "TOML"),
    ],
)
def test_bad_toml_names_file_and_key(text, word):
    with pytest.raises(TransformerError, match=word) as e:
        parse_topology(text, "bad.toml")
    assert "bad.toml" in str(e.value)


def test_test_resistor_and_touchstone_loads(tmp_path):
    # Keysight Impedance Measurement Handbook 6th ed. §1.3: R with series lead L, shunt C.
    f = np.array([1e6, 30e6])
    w = 2 * np.pi * f
    z = Load.resistor(200.0, 20e-9, 1e-12).impedance(f)
    ref = 1 / (1 / (200 + 1j * w * 20e-9) + 1j * w * 1e-12)
    np.testing.assert_allclose(z.real, ref.real, rtol=1e-12)
    np.testing.assert_allclose(z.imag, ref.imag, rtol=1e-12)
    # An invented one-port (demo values), read through read_touchstone and interpolated.
    path = tmp_path / "load.s1p"
    path.write_text("# MHz S RI R 50\n1 0.6 0.0\n10 0.6 0.2\n")
    ld = Load.touchstone(path)
    mid = ld.impedance([5.5e6])
    ref_mid = 50 * (1 + 0.6) / (1 - 0.6) * 0.5 + 0.5 * 50 * (1 + (0.6 + 0.2j)) / (1 - (0.6 + 0.2j))
    assert mid[0].real == pytest.approx(ref_mid.real) and mid[0].imag == pytest.approx(ref_mid.imag)
    with pytest.raises(TransformerError, match="covers"):
        ld.impedance([20e6])


def _y_to_s(y, z0=50.0):
    eye = np.eye(y.shape[1])[None]
    return np.linalg.solve(eye + z0 * y, eye - z0 * y)


def test_wound_ruthroff_equals_scikit_rf_circuit():
    # scikit-rf's Circuit connects the element (as the 4-port of its terminals to ground) to a
    # port, ground and the load: an independent connection algebra for a lossy wound line
    # with finite choking.
    import skrf.circuit
    import skrf.network

    from cmcheck.transformer.elements import pair_on_core_y

    w = LineWinding(RingCore(35.6e-3, 23e-3, 12.7e-3), get_material("nizn-800"), 8, Wire(awg_diameter(18), 0.035e-3, 3.5))
    f = np.linspace(1e6, 30e6, 7)
    freq = skrf.Frequency.from_f(f, unit="Hz")
    zc, gl = w.constants(f)
    el = skrf.network.Network(frequency=freq, s=_y_to_s(pair_on_core_y(zc, gl, w.z_winding(f))), z0=50, name="line")
    rl = skrf.network.Network(frequency=freq, s=np.full((f.size, 1, 1), 150 / 250 + 0j), z0=50, name="rl")
    port = skrf.circuit.Circuit.Port(freq, "p1", z0=50)
    gnd = skrf.circuit.Circuit.Ground(freq, "gnd", z0=50)
    cnx = [[(port, 0), (el, 0), (el, 3)], [(el, 1), (gnd, 0)], [(el, 2), (rl, 0)]]
    ref = skrf.circuit.Circuit(cnx).network.z[:, 0, 0]
    got = analyse(TOPOLOGIES["ruthroff-4:1-unun"], f, w, Load.resistor(200.0)).zin
    np.testing.assert_allclose(got.real, ref.real, rtol=1e-7)
    np.testing.assert_allclose(got.imag, ref.imag, rtol=1e-7)


def test_model_reports_both_cmrr_figures():
    # Bockelman & Eisenstadt 1995: the mixed-mode CMRR of the transformer alone (50 Ω legs)
    # equals the terminal-current CMRR when the actual legs are 50 Ω to ground and the load
    # floats open (the currents then are the port currents of the three-port).
    f = np.array([5e6, 15e6])
    line = IdealLine(50.0, 2e-9, lambda ff: np.full(ff.shape, 400 + 300j))
    r = analyse(TOPOLOGIES["guanella-1:1"], f, line, Load.resistor(1e12, leg_p=50.0, leg_n=50.0))
    np.testing.assert_allclose(r.cmrr_db, r.mixed_mode_cmrr_db, atol=1e-6)
    unun = analyse(TOPOLOGIES["ruthroff-4:1-unun"], f, line, Load.resistor(200.0))
    assert unun.cmrr_db is None and unun.mixed_mode_cmrr_db is None


@pytest.mark.parametrize(
    "kwargs, word",
    [({"power_w": 0.0}, "power_w"), ({"source_impedance": -50.0}, "source_impedance")],
)
def test_analyse_bad_drive_names_parameter(kwargs, word):
    with pytest.raises(TransformerError, match=word):
        analyse(TOPOLOGIES["guanella-1:1"], [1e6], ideal(50.0, 10.0), Load.resistor(50.0), **kwargs)


@pytest.mark.parametrize(
    "call, word",
    [
        (lambda: Load.resistor(0.0), "resistance"),
        (lambda: Load.resistor(50.0, lead_inductance=-1e-9), "lead_inductance"),
        (lambda: Load.complex(50.0, leg_p=0.0), "leg_p"),
        (lambda: LineWinding(RingCore(0.03, 0.02, 0.01), get_material("nizn-800"), 0, Wire(1e-3)), "turns"),
        (lambda: IdealLine(-50.0, 1e-9), "z0"),
    ],
)
def test_bad_specs_name_parameter(call, word):
    with pytest.raises(TransformerError, match=word):
        call()


@pytest.mark.parametrize("x_over_r, loss_db", [(2.0, 0.263), (4.0, 0.067)])
def test_low_frequency_choking_reactance_costs_mismatch(x_over_r, loss_db):
    # Ruthroff 1959: at low frequency the bootstrap winding's reactance X sits across the
    # 50 Ω input; mismatch loss −10·log10(1 − |Γ|²) (Pozar, Microwave Engineering 4th ed.,
    # §2.3): X = 2R → 0.26 dB, X = 4R → 0.067 dB (worked by hand: Zin = 40 + j20 Ω for X = 2R).
    line = IdealLine(100.0, 1e-12, lambda ff: np.full(ff.shape, 1j * x_over_r * 50.0))
    r = analyse(TOPOLOGIES["ruthroff-4:1-unun"], np.array([1e5]), line, Load.resistor(200.0))
    assert round(float(r.mismatch_loss_db[0]), 3) == loss_db
    if x_over_r == 2.0:
        assert r.zin[0].real == pytest.approx(40.0, rel=1e-5) and r.zin[0].imag == pytest.approx(20.0, rel=1e-5)


def _wound_4to1():
    return LineWinding(RingCore(35.6e-3, 23e-3, 12.7e-3), get_material("nizn-800"), 8, Wire(awg_diameter(18), 0.035e-3, 3.5))


def test_one_core_guanella_4to1():
    import dataclasses

    from cmcheck.transformer.topologies import LineElement

    one = TOPOLOGIES["guanella-4:1-one-core"]
    # Guanella 1944: with ideal choking and Z0 = RL/2 the one-core form is also RL/4 at every θ.
    f = np.linspace(1e6, 80e6, 5)
    r = analyse(one, f, ideal(100.0, 40.0), Load.resistor(200.0))
    np.testing.assert_allclose(r.zin.real, 50.0, atol=1e-6)
    np.testing.assert_allclose(r.zin.imag, 0.0, atol=1e-6)
    # Coupled windings on one core (MIT EE Staff, Magnetic Circuits and Transformers, ch. XVIII):
    # wound in opposite senses the pairs' opposed net currents add their flux, so at low
    # frequency the one-core form chokes better than two separate cores (floating load) ...
    w = _wound_4to1()
    lo = np.array([0.5e6])
    two_cores = analyse(TOPOLOGIES["guanella-4:1"], lo, w, Load.resistor(200.0))
    one_core = analyse(one, lo, w, Load.resistor(200.0))
    assert one_core.swr[0] < two_cores.swr[0]
    # ... while wound in the same sense those fluxes cancel and the load is shorted.
    same = dataclasses.replace(one, lines=(LineElement(one.lines[0].end1, one.lines[0].end2, "same"),))
    assert abs(analyse(same, lo, w, Load.resistor(200.0)).zin[0]) < 5.0


# --- the topology reader never fails with a traceback (a fuzz corpus of our own) ----------------

from hypothesis import given, settings  # noqa: E402
from hypothesis import strategies as st  # noqa: E402

from cmcheck.errors import CmcheckError  # noqa: E402

_NODES = st.sampled_from(["in", "out", "gnd", "a", "b", "", "in ", 1, None])
_LINE = st.fixed_dictionaries({}, optional={"end1": st.lists(_NODES, max_size=3), "end2": st.lists(_NODES, max_size=3),
                                            "conductors": st.integers(-2, 5), "core": st.integers(-1, 3)})


def _toml_value(v) -> str:
    if isinstance(v, str):
        return '"' + v.replace("\\", "\\\\").replace('"', '\\"') + '"'
    if isinstance(v, bool):
        return "true" if v else "false"
    if isinstance(v, list):
        return "[" + ", ".join(_toml_value(x) for x in v if x is not None) + "]"
    return repr(v)


@settings(max_examples=150, deadline=None)
@given(name=st.one_of(st.text(max_size=8), st.integers()), ratio=st.one_of(st.integers(-3, 50), st.floats(allow_nan=True),
       st.text(max_size=3)), outputs=st.lists(_NODES, max_size=3), lines=st.lists(_LINE, max_size=3),
       extra=st.sampled_from(["", "colour = 1\n", "input = 'in'\n", "[[line]]\n"]))
def test_topology_reader_returns_a_topology_or_one_error(name, ratio, outputs, lines, extra):
    # Structured TOML near the schema (DEVELOPERS.md, "adding a transformer topology").
    text = f"name = {_toml_value(name)}\nratio = {_toml_value(ratio) if ratio == ratio else 'nan'}\n"
    text += f"outputs = {_toml_value(outputs)}\n{extra}"
    for line in lines:
        text += "[[line]]\n" + "".join(f"{k} = {_toml_value(v)}\n" for k, v in line.items())
    try:
        parse_topology(text, "fuzz.toml")
    except CmcheckError as exc:
        assert "\n" not in str(exc) and "fuzz.toml" in str(exc)


@settings(max_examples=150, deadline=None)
@given(st.text(max_size=200))
def test_topology_reader_survives_any_text(text):
    try:
        parse_topology(text, "fuzz.toml")
    except CmcheckError as exc:
        assert "\n" not in str(exc)


def test_topology_file_must_be_a_regular_file(tmp_path):
    with pytest.raises(CmcheckError, match="regular file"):
        load_topology(tmp_path)
