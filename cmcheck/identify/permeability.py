"""Complex permeability from a measured winding: µ = (Zw − Rc)/(jωL0), with trust per point.

Zw is the measured impedance with the stray capacitance removed (:func:`remove_cp`), and
L0 = µ0N²/C1 the winding's inductance over the core's path if the core were air. The inversion is
exact for the lumped model, but its error grows as the measurement nears the self-resonance:
there the Cp correction 1/(1 − jωCpZ) amplifies both the measurement error and the uncertainty
of Cp. Each point is therefore marked trusted or not, with a reason.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..errors import IdentificationError
from ..model.choke import air_core_inductance
from .resonance import remove_cp

__all__ = ["REASONS", "PermeabilityData", "invert_permeability", "measured_permeability"]

#: Why a point's µ cannot be trusted, in the order they are checked (first reason wins).
REASONS = {
    "measurement": "the extraction method marked the impedance not valid",
    "above_resonance": "at or above the self-resonance, the winding's own impedance is masked by Cp",
    "near_resonance": "too close to the self-resonance (above the stated fraction of it)",
    "cp_uncertainty": "the uncertainty of Cp moves µ there by more than the tolerance",
    "error_amplified": "removing Cp amplifies the measurement error beyond the tolerance",
}


def invert_permeability(frequency_hz, z, l0, cp_f=0.0, r_conductor=0.0):
    """µ' − jµ'' of the core from the measured impedance of its winding.

    Parameters
    ----------
    frequency_hz : array_like
        Frequencies [Hz].
    z : array_like of complex
        Measured impedance of the winding [Ω].
    l0 : float
        Air-core inductance µ0N²/C1 [H].
    cp_f : float
        Stray parallel capacitance to remove [F]; 0 gives the plain Z/(jωL0).
    r_conductor : float or array_like
        Conductor resistance to remove [Ω].

    Returns
    -------
    numpy.ndarray of complex
        µ = (Zw − Rc)/(jωL0) [dimensionless], µ'' = −Im µ ≥ 0 for a passive core.

    References
    ----------
    IEC 60050-221, IEV 221-03-06 (Z = jωL0µ of a winding); IEC 60205:2016, clause 4
    (L0 from the core factor C1); Cp removal after A. Massarini & M. K. Kazimierczuk,
    IEEE Trans. Power Electron. 12(4), 1997, Fig. 1.
    """
    w = 2.0 * np.pi * np.asarray(frequency_hz, dtype=float)
    zw = remove_cp(frequency_hz, z, cp_f)
    with np.errstate(divide="ignore", invalid="ignore"):
        return (zw - np.asarray(r_conductor, dtype=float)) / (1j * w * float(l0))


@dataclass(frozen=True, eq=False)
class PermeabilityData:
    """Measured µ(f) with a trust mask and a reason per untrusted point.

    Attributes
    ----------
    frequency_hz : numpy.ndarray
        Frequencies [Hz].
    mu : numpy.ndarray of complex
        µ' − jµ'' [dimensionless] (NaN where the impedance was not finite).
    trusted : numpy.ndarray of bool
        Points the inversion can be trusted at.
    reason : numpy.ndarray of str
        A key of :data:`REASONS`, or "" for trusted points.
    relative_error : numpy.ndarray
        Estimated relative error of µ [dimensionless] (measurement error amplified by the Cp
        correction, plus the effect of Cp's uncertainty).
    l0_h, cp_f, r_conductor_ohm : float
        The L0 [H], Cp [F] and Rc [Ω] used.
    """

    frequency_hz: np.ndarray
    mu: np.ndarray
    trusted: np.ndarray
    reason: np.ndarray
    relative_error: np.ndarray
    l0_h: float
    cp_f: float
    r_conductor_ohm: float = 0.0

    @property
    def mu_prime(self) -> np.ndarray:
        """µ' [dimensionless]."""
        return self.mu.real

    @property
    def mu_double_prime(self) -> np.ndarray:
        """µ'' [dimensionless]."""
        return -self.mu.imag

    def excluded(self) -> dict[str, int]:
        """Untrusted points counted per reason."""
        keys, counts = np.unique(self.reason[~self.trusted], return_counts=True)
        return {str(k): int(n) for k, n in zip(keys, counts)}


def measured_permeability(frequency_hz, z, *, c1, turns, cp_f=0.0, cp_uncertainty_f=0.0,
                          resonance_hz=None, measurement_valid=None, measurement_error=None,
                          r_conductor=0.0, resonance_fraction=0.7, tolerance=0.10) -> PermeabilityData:
    """Invert a measured winding for µ(f) and mark where the inversion can be trusted.

    Parameters
    ----------
    frequency_hz : array_like
        Frequencies [Hz].
    z : array_like of complex
        Measured impedance [Ω].
    c1 : float
        Core factor Σl/A [1/m] (IEC 60205).
    turns : float
        Number of turns N [dimensionless].
    cp_f : float
        Stray capacitance to remove [F].
    cp_uncertainty_f : float
        Its standard uncertainty [F].
    resonance_hz : float, optional
        Self-resonance [Hz]; points above ``resonance_fraction`` of it are not trusted.
    measurement_valid : array_like of bool, optional
        The extraction's validity mask.
    measurement_error : array_like, optional
        The extraction's estimated relative error of Z [dimensionless].
    r_conductor : float
        Conductor resistance [Ω].
    resonance_fraction : float
        Highest trusted frequency as a fraction of the self-resonance [dimensionless].
    tolerance : float
        Largest estimated relative error of a trusted µ [dimensionless].

    Returns
    -------
    PermeabilityData

    References
    ----------
    As :func:`invert_permeability`; error propagation through Zw = Z/(1 − jωCpZ):
    dZw/Zw = (dZ/Z)/(1 − jωCpZ) and dZw/Zw = jωZw·dCp (first-order, common practice).
    """
    f = np.asarray(frequency_hz, dtype=float)
    z = np.asarray(z, dtype=complex)
    for name, value in (("c1", c1), ("turns", turns)):
        if not (np.ndim(value) == 0 and np.isfinite(value) and value > 0):
            raise IdentificationError(f"{name} must be a positive number, got {value!r}")
    if not (np.isfinite(cp_f) and cp_f >= 0):
        raise IdentificationError(f"cp_f must be a capacitance ≥ 0 in F, got {cp_f!r}")
    if not (0 < resonance_fraction <= 1):
        raise IdentificationError(f"resonance_fraction must be in (0, 1], got {resonance_fraction!r}")
    if not (tolerance > 0):
        raise IdentificationError(f"tolerance must be above 0, got {tolerance!r}")
    if f.shape != z.shape or f.ndim != 1:
        raise IdentificationError(f"frequency_hz and z must be 1-D of the same length, got {f.shape} and {z.shape}")
    l0 = float(air_core_inductance(c1, turns))
    mu = invert_permeability(f, z, l0, cp_f, r_conductor)
    w = 2.0 * np.pi * f
    with np.errstate(divide="ignore", invalid="ignore"):
        amplify = np.abs(1.0 / (1.0 - 1j * w * cp_f * z))
        zw = z / (1.0 - 1j * w * cp_f * z)
        from_cp = w * np.abs(zw) * cp_uncertainty_f
    meas_err = np.zeros(f.shape) if measurement_error is None else np.asarray(measurement_error, float)
    err = np.hypot(meas_err * amplify, from_cp)
    n = f.size
    reason = np.full(n, "", dtype=object)
    checks = [
        ("measurement", ~np.isfinite(mu) | (np.zeros(n, bool) if measurement_valid is None else ~np.asarray(measurement_valid, bool))),
        ("above_resonance", np.zeros(n, bool) if resonance_hz is None else f >= resonance_hz),
        ("near_resonance", np.zeros(n, bool) if resonance_hz is None else f > resonance_fraction * resonance_hz),
        ("cp_uncertainty", ~(from_cp <= tolerance)),
        ("error_amplified", ~(meas_err * amplify <= tolerance)),
    ]
    for key, mask in checks:
        reason[(reason == "") & mask] = key
    trusted = reason == ""
    mu = np.where(np.isfinite(mu), mu, np.nan)
    return PermeabilityData(f, mu, trusted, reason.astype(str), err, l0, float(cp_f), float(np.mean(r_conductor)))
