"""Analysing a transformer design: build its circuit, drive it, and report match, loss, balance,
and (at a given power) voltages, flux and core dissipation. All frequencies at once.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from ..design.heat import dissipation_from_voltage, peak_flux_density
from ..errors import TransformerError
from ..measurement.balance import three_port_balance
from .circuit import GROUND, Circuit
from .elements import line_on_core_y, two_pairs_one_core_y
from .flux import FluxCoupled
from .loads import Load
from .topologies import Topology

__all__ = ["TransformerResult", "analyse", "build_circuit", "design_network", "match_figures"]


def match_figures(zin, z_source=50.0):
    """Reflection, SWR, return loss and mismatch loss of an input impedance.

    Parameters
    ----------
    zin : array_like of complex
        Input impedance [Ω].
    z_source : float
        Real reference (source) impedance [Ω].

    Returns
    -------
    dict of numpy.ndarray
        ``gamma`` (complex), ``swr``, ``return_loss_db`` = −20·log10|Γ|,
        ``mismatch_loss_db`` = −10·log10(1 − |Γ|²).

    References
    ----------
    D. M. Pozar, *Microwave Engineering*, 4th ed., eqs. (2.35), (2.41), (2.49)/(2.50).
    """
    zin = np.asarray(zin, complex)
    g = (zin - z_source) / (zin + z_source)
    m = np.minimum(np.abs(g), 1.0 - 1e-15)
    with np.errstate(divide="ignore"):
        rl = -20.0 * np.log10(m)
    return {
        "gamma": g,
        "swr": (1.0 + m) / (1.0 - m),
        "return_loss_db": rl,
        "mismatch_loss_db": -10.0 * np.log10(1.0 - m**2) + 0.0,  # + 0.0: no "-0" for a perfect match
    }


def build_circuit(topology: Topology, frequency_hz, transformer) -> Circuit:
    """The transformer alone (no source, no load) as a :class:`Circuit`.

    ``transformer`` is an :class:`~cmcheck.transformer.windings.IdealLine` or
    :class:`~cmcheck.transformer.windings.LineWinding` for line topologies (every line uses it,
    each on its own core), or a :class:`~cmcheck.transformer.flux.FluxCoupled` for ``"flux"``.
    """
    c = Circuit(frequency_hz)
    f = c.frequency_hz
    if topology.kind == "flux":
        if not isinstance(transformer, FluxCoupled):
            raise TransformerError(f"topology {topology.name!r} needs a FluxCoupled transformer")
        transformer.stamp(c, (topology.input, GROUND), (topology.outputs[0], GROUND))
        return c
    if isinstance(transformer, FluxCoupled):
        raise TransformerError(f"topology {topology.name!r} needs a line winding, not a FluxCoupled transformer")
    have = getattr(transformer, "conductors", 2)
    if have != topology.conductors:
        raise TransformerError(f"topology {topology.name!r} needs {topology.conductors} conductors, the winding has {have}")
    zc, gl = transformer.constants(f)
    zw = transformer.z_winding(f)
    y = line_on_core_y(topology.conductors, zc, gl, zw)
    l0 = getattr(transformer, "l0", None)
    z_air = None if (zw is None or l0 is None) else 2j * np.pi * f * l0
    for line in topology.lines:
        if line.one_core:
            c.stamp(line.nodes, two_pairs_one_core_y(zc, gl, zw, z_air, line.one_core))
        else:
            c.stamp(line.nodes, y)
    return c


def _attach_load(c: Circuit, topology: Topology, zl: np.ndarray, load: Load) -> None:
    if topology.balanced:
        p, n = topology.outputs
        c.impedance(p, n, zl)
        if load.leg_p is not None:
            c.impedance(p, GROUND, load.leg_p)
        if load.leg_n is not None:
            c.impedance(n, GROUND, load.leg_n)
    else:
        c.impedance(topology.outputs[0], GROUND, zl)


@dataclass(frozen=True, eq=False)
class TransformerResult:
    """Everything :func:`analyse` computes; arrays have shape (F,) unless stated.

    Attributes
    ----------
    frequency_hz, zin, swr, return_loss_db, mismatch_loss_db, insertion_loss_db
        Input impedance [Ω] and match figures against the source impedance; insertion loss
        −10·log10(P_load/P_available) [dB] includes mismatch, core and copper loss.
    cmrr_db : numpy.ndarray or None
        Model CMRR 20·log10(|Ip − In|/|Ip + In|) from the currents out of the two output
        terminals into the actual load and leg-to-ground impedances [dB]; None for an unun.
    mixed_mode_cmrr_db : numpy.ndarray or None
        |Sds21/Scs21| [dB] of the transformer alone as a three-port with 50 Ω legs, the figure
        a VNA measurement gives (Bockelman & Eisenstadt, IEEE T-MTT 43(7), 1995); None for an
        unun or when an output is the input node.
    output_current : numpy.ndarray
        (F, outputs) currents out of each output terminal [A] at the analysed drive.
    power_w : float
        Available power of the source [W] the voltages below refer to.
    load_voltage : numpy.ndarray
        RMS voltage across the load [V].
    winding_voltage : numpy.ndarray
        (F, cores) RMS voltage driving each core's flux [V]: the common-mode drop along each
        line, or the magnetising voltage of a flux-coupled transformer.
    peak_flux_t, core_loss_w : numpy.ndarray or None
        (F, cores) peak flux density [T] and core (plus winding copper) dissipation [W]; None
        when the transformer carries no core data.
    """

    frequency_hz: np.ndarray
    zin: np.ndarray
    swr: np.ndarray
    return_loss_db: np.ndarray
    mismatch_loss_db: np.ndarray
    insertion_loss_db: np.ndarray
    cmrr_db: np.ndarray | None
    output_current: np.ndarray
    power_w: float
    load_voltage: np.ndarray
    winding_voltage: np.ndarray
    peak_flux_t: np.ndarray | None
    core_loss_w: np.ndarray | None
    mixed_mode_cmrr_db: np.ndarray | None = None


def analyse(topology: Topology, frequency_hz, transformer, load: Load, *, source_impedance: float = 50.0,
            power_w: float = 1.0) -> TransformerResult:
    """Drive a transformer from a source of ``power_w`` available power into ``load``.

    Parameters
    ----------
    topology : Topology
    frequency_hz : array_like
        Frequencies [Hz], shape (F,).
    transformer : IdealLine, LineWinding or FluxCoupled
        See :func:`build_circuit`.
    load : Load
        The load and, for baluns, its leg-to-ground impedances.
    source_impedance : float
        Real source impedance [Ω].
    power_w : float
        Available source power [W].

    Returns
    -------
    TransformerResult

    References
    ----------
    Nodal analysis (Alexander & Sadiku, *Fundamentals of Electric Circuits*, ch. 3); available
    power |Vs|²/(4Rs) and transducer gain (Pozar, *Microwave Engineering*, 4th ed., §12.1);
    peak flux and dissipation: :mod:`cmcheck.design.heat`.
    """
    if not (math.isfinite(source_impedance) and source_impedance > 0):
        raise TransformerError(f"source_impedance must be positive, got {source_impedance!r} Ω",
                               parameter="source_impedance")
    if not (math.isfinite(power_w) and power_w > 0):
        raise TransformerError(f"power_w must be positive, got {power_w!r} W", parameter="power_w")
    c = build_circuit(topology, frequency_hz, transformer)
    f = c.frequency_hz
    zl = load.impedance(f)
    _attach_load(c, topology, zl, load)
    rs = float(source_impedance)
    vs = 2.0 * math.sqrt(power_w * rs)  # RMS open-circuit voltage giving power_w available
    c.admittance(topology.input, GROUND, 1.0 / rs)
    sol = c.solve({topology.input: vs / rs})
    vin = sol.v(topology.input)
    iin = (vs - vin) / rs
    zin = vin / iin
    mf = match_figures(zin, rs)

    vo = [sol.v(o) for o in topology.outputs]
    if topology.balanced:
        vload = vo[0] - vo[1]
        ip = vload / zl + (vo[0] / load.leg_p if load.leg_p is not None else 0.0)
        i_n = -vload / zl + (vo[1] / load.leg_n if load.leg_n is not None else 0.0)
        out_i = np.stack([ip, i_n], -1)
        with np.errstate(divide="ignore"):
            cmrr = 20.0 * np.log10(np.abs(ip - i_n) / np.abs(ip + i_n))
    else:
        vload = vo[0]
        out_i = (vload / zl)[:, None]
        cmrr = None
    p_load = np.abs(vload) ** 2 * np.real(1.0 / zl)
    il = -10.0 * np.log10(p_load / power_w)

    if topology.kind == "flux":
        t: FluxCoupled = transformer
        z1 = 2j * np.pi * f * t.leakage_h * t.primary_leakage_share + t.r_primary_1mhz * np.sqrt(f / 1e6)
        vw = (vin - z1 * iin)[:, None]
        zcore = t.magnetising_impedance(f)[:, None]
        turns, ae = t.primary_turns, t.ae
    else:
        n = topology.conductors
        # The voltage along each winding driving its core: the common-mode drop of the line; for
        # two pairs on one core the first pair's drop, which is the core's voltage per N turns
        # (the other pair's is the same up to sign when the core-linked mode dominates).
        groups = [(ln.end1[:n], ln.end2[:n]) for ln in topology.lines]
        vw = np.stack([sum(sol.v(x) for x in e1) / n - sum(sol.v(x) for x in e2) / n for e1, e2 in groups], -1)
        zw = transformer.z_winding(f)
        zcore = None if zw is None else zw[:, None]
        core = getattr(transformer, "core", None)
        turns, ae = getattr(transformer, "turns", None), getattr(core, "ae", None)
    flux = loss = None
    if zcore is not None:
        loss = dissipation_from_voltage(np.abs(vw), zcore)
        if turns and ae:
            flux = peak_flux_density(np.abs(vw), f[:, None], turns, ae)
    mixed = None
    if topology.balanced and topology.input not in topology.outputs:
        ports = [topology.input, *topology.outputs]
        s3 = build_circuit(topology, f, transformer).s_parameters(ports, 50.0)
        mixed = three_port_balance(f, s3).cmrr_db
    return TransformerResult(f, zin, mf["swr"], mf["return_loss_db"], mf["mismatch_loss_db"], il, cmrr, out_i,
                             float(power_w), np.abs(vload), np.abs(vw), flux, loss, mixed)


def design_network(topology: Topology, frequency_hz, transformer, z0: float = 50.0, name: str | None = None):
    """The transformer as an N-port scikit-rf ``Network``: input, then each distinct output, to ground.

    For a balun the ports are (input, P, N), so
    :func:`cmcheck.measurement.balance.three_port_balance` gives the same mixed-mode CMRR as
    for a measurement (50 Ω legs); write it with ``Network.write_touchstone``.
    """
    c = build_circuit(topology, frequency_hz, transformer)
    ports = [topology.input] + [o for o in topology.outputs if o != topology.input]
    return c.network(ports, z0, name or topology.name.replace(":", "-"))
