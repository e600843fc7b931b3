"""Published dispersion forms of complex permeability µ(f) = µ' − jµ''.

Pure vectorised functions and the small frozen models that wrap them. Convention: e^{jωt},
so a passive material has µ'' ≥ 0 and the returned complex number is µ' − jµ''.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Protocol

import numpy as np

__all__ = [
    "Debye",
    "DampedResonance",
    "PermeabilityModel",
    "TwoComponent",
    "damped_resonance_permeability",
    "debye_permeability",
    "two_component_permeability",
]


def debye_permeability(frequency_hz, mu_i, f_r):
    """Debye relaxation: µ = 1 + (µi − 1)/(1 + j f/fr).

    Parameters
    ----------
    frequency_hz : array_like
        Frequency [Hz].
    mu_i : float or array_like
        Initial (low-frequency) relative permeability [dimensionless].
    f_r : float or array_like
        Relaxation frequency, where µ'' peaks [Hz].

    Returns
    -------
    numpy.ndarray of complex
        µ' − jµ'' [dimensionless].

    References
    ----------
    P. Debye, *Polar Molecules*, 1929, relaxation form; applied to ferrite spin relaxation in
    e.g. T. Tsutaoka, J. Appl. Phys. 93(5), 2789 (2003), eq. (2) (spin-rotation term).
    """
    f = np.asarray(frequency_hz, dtype=float)
    mu_i = np.asarray(mu_i, dtype=float)
    f_r = np.asarray(f_r, dtype=float)
    return 1.0 + (mu_i - 1.0) / (1.0 + 1j * f / f_r)


def damped_resonance_permeability(frequency_hz, mu_i, f_r, damping_hz):
    """Damped (Lorentzian) resonance: µ = 1 + (µi − 1)fr²/(fr² − f² + j f Δf).

    Parameters
    ----------
    frequency_hz : array_like
        Frequency [Hz].
    mu_i : float or array_like
        Initial relative permeability [dimensionless].
    f_r : float or array_like
        Resonance frequency [Hz].
    damping_hz : float or array_like
        Damping Δf [Hz]; Δf > 2·fr is over-damped (relaxation-like).

    Returns
    -------
    numpy.ndarray of complex
        µ' − jµ'' [dimensionless].

    References
    ----------
    T. Tsutaoka, "Frequency dispersion of complex permeability in Mn–Zn and Ni–Zn spinel
    ferrites and their composite materials", J. Appl. Phys. 93(5), 2789 (2003), eq. (1)
    (domain-wall resonance term).
    """
    f = np.asarray(frequency_hz, dtype=float)
    f_r = np.asarray(f_r, dtype=float)
    return 1.0 + (np.asarray(mu_i, dtype=float) - 1.0) * f_r**2 / (f_r**2 - f**2 + 1j * f * np.asarray(damping_hz, dtype=float))


def two_component_permeability(frequency_hz, k_dw, f_dw, beta_hz, k_s, f_s):
    """Domain-wall resonance plus spin-rotation relaxation.

    µ = 1 + K_dw·f_dw²/(f_dw² − f² + j f β) + K_s/(1 + j f/f_s)

    Parameters
    ----------
    frequency_hz : array_like
        Frequency [Hz].
    k_dw : float or array_like
        Domain-wall static susceptibility [dimensionless].
    f_dw : float or array_like
        Domain-wall resonance frequency [Hz].
    beta_hz : float or array_like
        Domain-wall damping [Hz].
    k_s : float or array_like
        Spin static susceptibility [dimensionless].
    f_s : float or array_like
        Spin relaxation frequency [Hz].

    Returns
    -------
    numpy.ndarray of complex
        µ' − jµ'' [dimensionless]; the initial permeability is 1 + K_dw + K_s.

    References
    ----------
    T. Tsutaoka, J. Appl. Phys. 93(5), 2789 (2003), eqs. (1)–(3).
    """
    f = np.asarray(frequency_hz, dtype=float)
    f_dw = np.asarray(f_dw, dtype=float)
    dw = np.asarray(k_dw, dtype=float) * f_dw**2 / (f_dw**2 - f**2 + 1j * f * np.asarray(beta_hz, dtype=float))
    spin = np.asarray(k_s, dtype=float) / (1.0 + 1j * f / np.asarray(f_s, dtype=float))
    return 1.0 + dw + spin


class PermeabilityModel(Protocol):
    """Anything that gives µ' − jµ'' at frequencies [Hz]."""

    def permeability(self, frequency_hz) -> np.ndarray: ...


@dataclass(frozen=True)
class Debye:
    """Debye relaxation model; see :func:`debye_permeability`."""

    mu_i: float
    f_r: float

    def permeability(self, frequency_hz):
        return debye_permeability(frequency_hz, self.mu_i, self.f_r)


@dataclass(frozen=True)
class DampedResonance:
    """Damped resonance model; see :func:`damped_resonance_permeability`."""

    mu_i: float
    f_r: float
    damping_hz: float

    def permeability(self, frequency_hz):
        return damped_resonance_permeability(frequency_hz, self.mu_i, self.f_r, self.damping_hz)


@dataclass(frozen=True)
class TwoComponent:
    """Domain-wall + spin-rotation model; see :func:`two_component_permeability`."""

    k_dw: float
    f_dw: float
    beta_hz: float
    k_s: float
    f_s: float

    def permeability(self, frequency_hz):
        return two_component_permeability(frequency_hz, self.k_dw, self.f_dw, self.beta_hz, self.k_s, self.f_s)
