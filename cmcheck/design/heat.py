"""Heat and flux in a choke's core: dissipation from the common-mode drive, temperature rise
from the core's surface, and peak flux density.

A feedline choke is driven either by a common-mode *voltage* across it (the worst case being
the whole feed-point voltage √(P·Z)) or by a common-mode *current* through it. All functions
are pure and broadcast, so the sizing search applies them to arrays shaped
(candidates, frequencies). SI units inside (W, V, A, Ω, m², T, K).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from ..errors import DesignError

__all__ = [
    "DEFAULT_MAX_RISE_K",
    "Drive",
    "HeatCheck",
    "dissipation_from_current",
    "dissipation_from_voltage",
    "feed_point_voltage",
    "heat_check",
    "peak_flux_density",
    "temperature_rise",
]

#: Default limit on the core's temperature rise above ambient [K]. Suppression ferrites lose
#: permeability well below their Curie point (often 130–200 °C), and a choke outdoors sits in
#: sunshine: 40 K above ambient keeps a wide margin. Common practice, no published source.
DEFAULT_MAX_RISE_K = 40.0  # common practice, no published source


def feed_point_voltage(power_w, feed_impedance_ohm):
    """RMS voltage at a feed point of resistance R driven with power P: V = √(P·R).

    Used as the worst-case common-mode voltage across a choke at the feed point: the choke
    cannot see more than the whole voltage between the feed-point terminals.

    Parameters
    ----------
    power_w : array_like
        Transmitter power delivered to the feed point [W].
    feed_impedance_ohm : array_like
        Magnitude of the feed-point impedance [Ω].

    Returns
    -------
    numpy.ndarray or float
        V_rms [V].

    References
    ----------
    Joule's law P = V²/R for a resistive load (any circuit-theory text, e.g. C. K. Alexander &
    M. N. O. Sadiku, *Fundamentals of Electric Circuits*, §2.5).
    """
    v = np.sqrt(np.asarray(power_w, float) * np.asarray(feed_impedance_ohm, float))
    return float(v) if v.ndim == 0 else v


def dissipation_from_voltage(v_rms, z):
    """Power dissipated in an impedance with an RMS voltage across it: P = V²·Re(1/Z).

    A lossless stray capacitance in parallel adds only to Im(1/Z), so the whole of P is the
    loss of the core and the conductor.

    Parameters
    ----------
    v_rms : array_like
        RMS voltage across the choke [V], broadcastable against ``z``.
    z : array_like of complex
        Choke impedance [Ω], e.g. shape (candidates, frequencies).

    Returns
    -------
    numpy.ndarray
        P [W].

    References
    ----------
    Complex power S = V·I* = |V|²·Y* (Alexander & Sadiku, *Fundamentals of Electric Circuits*,
    §11.6), whose real part is |V|²·Re(Y).
    """
    y = 1.0 / np.asarray(z, dtype=complex)
    return np.asarray(v_rms, float) ** 2 * y.real


def dissipation_from_current(i_rms, z):
    """Power dissipated in an impedance carrying an RMS current: P = I²·Re(Z).

    Parameters
    ----------
    i_rms : array_like
        RMS common-mode current through the choke [A].
    z : array_like of complex
        Choke impedance [Ω].

    Returns
    -------
    numpy.ndarray
        P [W].

    References
    ----------
    Complex power S = |I|²·Z (Alexander & Sadiku, *Fundamentals of Electric Circuits*, §11.6).
    """
    return np.asarray(i_rms, float) ** 2 * np.asarray(z, dtype=complex).real


def temperature_rise(power_w, surface_area_m2):
    """Temperature rise of a magnetic component cooled by natural convection and radiation.

    ΔT ≈ 450·ψ^0.826 [K], with ψ = P/A the dissipation per unit surface in W/cm².

    Parameters
    ----------
    power_w : array_like
        Total dissipation [W].
    surface_area_m2 : array_like
        Outside surface of the core or stack [m²].

    Returns
    -------
    numpy.ndarray or float
        ΔT above ambient [K].

    References
    ----------
    C. W. T. McLyman, *Transformer and Inductor Design Handbook*, 3rd ed., Marcel Dekker 2004,
    ch. 6 (temperature rise against surface dissipation), quoted from memory in the project's
    DESIGN.md §4; a radiation + convection heat balance agrees within a few kelvin at 5 W on a
    60 mm ring. An empirical fit for still air: a fan or an enclosure changes it.
    """
    psi = np.maximum(np.asarray(power_w, float), 0.0) / (np.asarray(surface_area_m2, float) * 1e4)
    dt = 450.0 * psi**0.826
    return float(dt) if np.ndim(dt) == 0 else dt


def peak_flux_density(v_rms, frequency_hz, turns, ae_m2):
    """Peak flux density in the core for a sinusoidal RMS voltage across the winding.

    B_peak = V_rms/(4.44·f·N·Ae)  (4.44 = 2π/√2).

    Parameters
    ----------
    v_rms : array_like
        RMS voltage across the winding [V].
    frequency_hz : array_like
        Frequency [Hz].
    turns : array_like
        Number of turns N [dimensionless].
    ae_m2 : array_like
        Effective core area Ae [m²] (IEC 60205).

    Returns
    -------
    numpy.ndarray or float
        B_peak [T].

    References
    ----------
    Faraday's law for a sinusoid, the "transformer equation" V_rms = 4.44·f·N·Ae·B_peak:
    McLyman, *Transformer and Inductor Design Handbook*, 3rd ed., 2004, ch. 1.
    """
    b = np.asarray(v_rms, float) / (
        4.44 * np.asarray(frequency_hz, float) * np.asarray(turns, float) * np.asarray(ae_m2, float)
    )
    return float(b) if np.ndim(b) == 0 else b


@dataclass(frozen=True)
class Drive:
    """How the choke is driven at the stated power; exactly one of the three is given.

    Parameters
    ----------
    power_w : float
        Transmitter power [W].
    cm_voltage_v : float, optional
        Common-mode RMS voltage across the choke [V] at that power.
    cm_current_a : float, optional
        Common-mode RMS current through the choke [A] at that power.
    feed_impedance_ohm : float, optional
        Feed-point impedance magnitude [Ω]: the worst case puts the whole feed-point voltage
        √(P·Z) across the choke.
    """

    power_w: float
    cm_voltage_v: float | None = None
    cm_current_a: float | None = None
    feed_impedance_ohm: float | None = None

    def __post_init__(self) -> None:
        if not (math.isfinite(self.power_w) and self.power_w > 0):
            raise DesignError(f"power_w must be above 0 W, got {self.power_w:g} W", parameter="power_w")
        given = [n for n in ("cm_voltage_v", "cm_current_a", "feed_impedance_ohm") if getattr(self, n) is not None]
        if len(given) != 1:
            raise DesignError(
                "give exactly one of cm_voltage_v, cm_current_a or feed_impedance_ohm with power_w"
                if given else "power_w needs cm_voltage_v, cm_current_a or feed_impedance_ohm to estimate heat",
                parameter=("cm_voltage_v", "cm_current_a", "feed_impedance_ohm", "power_w"),
            )
        value = getattr(self, given[0])
        if not (math.isfinite(value) and value > 0):
            unit = {"cm_voltage_v": "V", "cm_current_a": "A", "feed_impedance_ohm": "Ω"}[given[0]]
            raise DesignError(f"{given[0]} must be above 0 {unit}, got {value:g} {unit}", parameter=given[0])

    @property
    def mode(self) -> str:
        """``"voltage"`` (a voltage is across the choke) or ``"current"``."""
        return "current" if self.cm_current_a is not None else "voltage"

    @property
    def voltage_v(self) -> float | None:
        """The RMS voltage across the choke [V] in voltage mode, else None."""
        if self.cm_voltage_v is not None:
            return self.cm_voltage_v
        if self.feed_impedance_ohm is not None:
            return feed_point_voltage(self.power_w, self.feed_impedance_ohm)
        return None

    def describe(self) -> str:
        """One line for reports."""
        if self.cm_current_a is not None:
            return f"{self.power_w:g} W with {self.cm_current_a:g} A common-mode current through the choke"
        if self.cm_voltage_v is not None:
            return f"{self.power_w:g} W with {self.cm_voltage_v:g} V common-mode across the choke"
        return (
            f"{self.power_w:g} W into a {self.feed_impedance_ohm:g} Ω feed point: worst case "
            f"{self.voltage_v:.0f} V (√(P·Z)) across the choke"
        )

    def to_dict(self) -> dict:
        return {
            "power_w": self.power_w,
            "mode": self.mode,
            "cm_voltage_v": self.cm_voltage_v,
            "cm_current_a": self.cm_current_a,
            "feed_impedance_ohm": self.feed_impedance_ohm,
            "voltage_across_choke_v": self.voltage_v,
        }


@dataclass(frozen=True, eq=False)
class HeatCheck:
    """Worst case over the band of the heat and flux checks, one entry per candidate.

    Attributes
    ----------
    dissipation_w : numpy.ndarray
        Largest dissipation over the band [W].
    dissipation_hz : numpy.ndarray
        Where it occurs [Hz].
    temperature_rise_k : numpy.ndarray
        ΔT for that dissipation [K].
    peak_flux_t : numpy.ndarray
        Largest peak flux density over the band [T].
    peak_flux_hz : numpy.ndarray
        Where it occurs [Hz].
    """

    dissipation_w: np.ndarray
    dissipation_hz: np.ndarray
    temperature_rise_k: np.ndarray
    peak_flux_t: np.ndarray
    peak_flux_hz: np.ndarray


def heat_check(drive: Drive, frequency_hz, z, turns, ae_m2, surface_area_m2) -> HeatCheck:
    """Worst-frequency dissipation, temperature rise and flux of candidates over a band.

    Parameters
    ----------
    drive : Drive
        The common-mode voltage or current at the stated power.
    frequency_hz : array_like
        In-band frequencies [Hz], shape (F,).
    z : array_like of complex
        Choke impedance [Ω], shape (C, F).
    turns : array_like
        Turns of each candidate [dimensionless], shape (C,).
    ae_m2 : array_like
        Effective core area of each candidate (whole stack) [m²], shape (C,).
    surface_area_m2 : array_like
        Outside surface of each candidate's core or stack [m²], shape (C,).

    Returns
    -------
    HeatCheck

    References
    ----------
    Dissipation from complex power (Alexander & Sadiku, §11.6); temperature rise after
    McLyman, 3rd ed., ch. 6 (see :func:`temperature_rise`); flux from the transformer equation
    (McLyman ch. 1, see :func:`peak_flux_density`).
    """
    f = np.asarray(frequency_hz, float)
    z = np.atleast_2d(np.asarray(z, dtype=complex))
    if drive.mode == "current":
        p = dissipation_from_current(drive.cm_current_a, z)
        # The winding's voltage is the current times the whole impedance (Cp sits across it).
        v = drive.cm_current_a * np.abs(z)
    else:
        v_across = drive.voltage_v
        p = dissipation_from_voltage(v_across, z)
        v = np.broadcast_to(np.float64(v_across), z.shape)
    i_p = np.argmax(p, axis=1)
    rows = np.arange(z.shape[0])
    p_max = p[rows, i_p]
    b = peak_flux_density(v, f[None, :], np.asarray(turns, float)[:, None], np.asarray(ae_m2, float)[:, None])
    i_b = np.argmax(b, axis=1)
    return HeatCheck(
        dissipation_w=p_max,
        dissipation_hz=f[i_p],
        temperature_rise_k=np.asarray(temperature_rise(p_max, surface_area_m2), float),
        peak_flux_t=b[rows, i_b],
        peak_flux_hz=f[i_b],
    )
