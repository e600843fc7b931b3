"""Characterising a built flux-coupled transformer from its open- and short-circuit tests.

The primary's input impedance is measured twice: with the secondary open (magnetising
impedance, resonating with the secondary's capacitance) and shorted (leakage). The
parameters of :class:`cmcheck.transformer.flux.FluxCoupled` — leakage and its split, copper
resistance, a Debye permeability µ(f) through the known L0, and Cs — are fitted to both curves
at once, so predictions go through those parameters, never through the measured curves.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from ..errors import MeasurementError, TransformerError
from ..model.materials import Debye
from .circuit import GROUND, Circuit
from .flux import FluxCoupled

__all__ = ["Characterisation", "characterise_flux_coupled", "characterise_from_files", "reflection_to_impedance"]

#: Conductance standing in for the shorted secondary [S] (a 1 µΩ short).
_SHORT_S = 1e6


def reflection_to_impedance(s11, z0=50.0):
    """Z = Z0·(1 + S11)/(1 − S11) [Ω] of a one-port reflection.

    References
    ----------
    D. M. Pozar, *Microwave Engineering*, 4th ed., eq. (2.35).
    """
    g = np.asarray(s11, complex)
    return z0 * (1.0 + g) / (1.0 - g)


@dataclass(frozen=True, eq=False)
class Characterisation:
    """Result of :func:`characterise_flux_coupled`.

    Attributes
    ----------
    transformer : FluxCoupled
        The fitted model (its ``permeability`` is a :class:`~cmcheck.model.materials.Debye`).
    rms_log_error : float
        RMS of the fit's residuals in ln(Z) over both tests [dimensionless] (≈ relative error).
    points : int
        Number of measured points used.
    """

    transformer: FluxCoupled
    rms_log_error: float
    points: int

    def to_dict(self) -> dict:
        """JSON-ready parameters in SI units."""
        t = self.transformer
        return {
            "primary_turns": t.primary_turns,
            "impedance_ratio": t.impedance_ratio,
            "leakage_h": t.leakage_h,
            "primary_leakage_share": t.primary_leakage_share,
            "secondary_capacitance_f": t.secondary_capacitance,
            "r_primary_1mhz_ohm": t.r_primary_1mhz,
            "initial_permeability": t.permeability.mu_i,
            "relaxation_frequency_hz": t.permeability.f_r,
            "rms_log_error": self.rms_log_error,
        }


def _primary_impedance(t: FluxCoupled, f: np.ndarray, secondary_y: float) -> np.ndarray:
    c = Circuit(f)
    t.stamp(c, ("in", GROUND), ("out", GROUND))
    if secondary_y:
        c.admittance("out", GROUND, secondary_y)
    return c.port_impedance(["in"])[:, 0, 0]


def characterise_flux_coupled(open_f, open_z, short_f, short_z, primary_turns: int, impedance_ratio: float,
                              l0_per_turn2: float, f_min: float = 300e3, ae: float | None = None) -> Characterisation:
    """Fit a flux-coupled transformer model to open- and short-circuit primary impedances.

    Parameters
    ----------
    open_f, open_z : array_like
        Frequencies [Hz] and primary impedance [Ω] with the secondary open.
    short_f, short_z : array_like
        The same with the secondary shorted.
    primary_turns : int
        Np.
    impedance_ratio : float
        Nominal impedance ratio (49 for a 1:49).
    l0_per_turn2 : float
        µ0/C1 of the core [H] (from its geometry), so µ(f) comes out as a material property.
    f_min : float
        Lowest frequency fitted [Hz] (below a few hundred kHz the open test sits far below
        the reference impedance and the VNA's reflection accuracy is poor).
    ae : float or None
        Effective core area [m²], carried into the model for flux estimates.

    Returns
    -------
    Characterisation

    Notes
    -----
    Leakage measured by the short test behaves as a constant inductance; the magnetising
    branch is fitted with a Debye relaxation, the simplest published dispersion form for
    NiZn ferrite below its resonance.

    References
    ----------
    Open- and short-circuit tests of a transformer: MIT EE Staff, *Magnetic Circuits and
    Transformers*, Wiley 1943, ch. XVII; Debye form: cmcheck.model.materials.debye_permeability.
    """
    of, oz = np.asarray(open_f, float), np.asarray(open_z, complex)
    sf, sz = np.asarray(short_f, float), np.asarray(short_z, complex)
    mo, ms = of >= f_min, sf >= f_min
    if mo.sum() < 10 or ms.sum() < 10:
        raise MeasurementError(f"open and short tests need ≥ 10 points above f_min = {f_min:g} Hz")
    if not (np.all(np.isfinite(oz[mo])) and np.all(np.isfinite(sz[ms]))):
        raise MeasurementError("open and short impedances must be finite")
    of, oz, sf, sz = of[mo], oz[mo], sf[ms], sz[ms]
    if not (math.isfinite(l0_per_turn2) and l0_per_turn2 > 0):
        raise TransformerError(f"l0_per_turn2 must be positive, got {l0_per_turn2!r} H")

    w_s = 2 * np.pi * sf
    l_leak0 = float(np.median(sz.imag / w_s))
    r0 = float(max(np.median(sz.real / np.sqrt(sf / 1e6)), 1e-4))
    l_low = float(oz.imag[0] / (2 * np.pi * of[0]))
    mu0_guess = max(l_low / (l0_per_turn2 * primary_turns**2), 2.0)
    if l_leak0 <= 0:
        raise MeasurementError("the short-circuit test shows no inductive leakage; check the files")

    def build(q):
        e = np.exp(q[:5])
        return FluxCoupled(
            primary_turns=primary_turns,
            impedance_ratio=impedance_ratio,
            l0_per_turn2=l0_per_turn2,
            permeability=Debye(mu_i=1.0 + e[0], f_r=e[1]),
            leakage_h=e[2],
            primary_leakage_share=1.0 / (1.0 + math.exp(-q[5])),
            secondary_capacitance=e[3],
            r_primary_1mhz=e[4],
            ae=ae,
        )

    def residual(q):
        t = build(q)
        ro = np.log(_primary_impedance(t, of, 0.0) / oz)
        rs = np.log(_primary_impedance(t, sf, _SHORT_S) / sz)
        return np.concatenate([ro.real, ro.imag, rs.real, rs.imag])

    q0 = np.array([math.log(mu0_guess), math.log(5e6), math.log(l_leak0), math.log(1e-12), math.log(r0), 0.0])
    from scipy.optimize import least_squares  # kept off the CLI start-up path

    sol = least_squares(residual, q0, method="trf", x_scale="jac")
    rms = float(np.sqrt(np.mean(sol.fun**2)))
    return Characterisation(build(sol.x), rms, int(of.size + sf.size))


def characterise_from_files(open_path, short_path, primary_turns: int, impedance_ratio: float, core,
                            f_min: float = 300e3) -> Characterisation:
    """:func:`characterise_flux_coupled` from two one-port Touchstone files of the primary.

    Parameters
    ----------
    open_path, short_path : str or path
        Primary reflection with the secondary open, and with it shorted (``.s1p``).
    primary_turns, impedance_ratio, f_min
        As for :func:`characterise_flux_coupled`.
    core : RingCore or FactorCore
        The core (its ``c1`` gives L0; its ``ae``, when present, is kept for flux).

    References
    ----------
    As for :func:`characterise_flux_coupled`; reflection to impedance: Pozar, *Microwave
    Engineering*, 4th ed., eq. (2.35).
    """
    from ..measurement.touchstone import read_touchstone
    from ..model.choke import air_core_inductance

    curves = []
    for path in (open_path, short_path):
        s = read_touchstone(path)
        if s.n_ports != 1:
            raise MeasurementError(f"{path}: the open/short test needs a one-port reflection file, got {s.n_ports} ports")
        curves += [s.frequency_hz, reflection_to_impedance(s.s[:, 0, 0], s.z0)]
    return characterise_flux_coupled(*curves, primary_turns, impedance_ratio, air_core_inductance(core.c1, 1),
                                     f_min=f_min, ae=getattr(core, "ae", None))
