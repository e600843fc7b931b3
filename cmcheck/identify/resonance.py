"""Self-resonance of a measured winding and its stray (parallel) capacitance.

A winding on a core behaves as Zw = jωL0µ + Rc in parallel with its stray capacitance Cp
(A. Massarini & M. K. Kazimierczuk, IEEE Trans. Power Electron. 12(4), 1997, Fig. 1). Its
admittance Y = 1/Zw + jωCp is smooth through the parallel resonance, so the resonance is found
where the susceptance B = Im Y crosses zero from − to + (X crosses from + to −), refined by a
straight-line fit of B against f around the crossing. The magnitude peak is *not* used: with a
lossy core the peak of |Z| lies away from X = 0 and, on a sweep that ends below resonance, at
the band edge.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..errors import IdentificationError

__all__ = [
    "CpEstimate",
    "SelfResonance",
    "cp_from_resonance",
    "estimate_cp",
    "find_self_resonance",
    "low_frequency_inductance",
    "remove_cp",
]

#: Points either side of a crossing that must agree in sign, so noise near X = 0 is not a resonance.
_PERSIST = 3


@dataclass(frozen=True)
class SelfResonance:
    """The first parallel self-resonance of a winding.

    Attributes
    ----------
    frequency_hz : float
        Where X crosses from + to − [Hz].
    uncertainty_hz : float
        Standard uncertainty of ``frequency_hz`` [Hz] (line-fit root error and half the local
        grid step, combined in quadrature).
    peak_ohm : float
        |Z| at the grid point nearest the resonance [Ω] (≈ the parallel loss resistance).
    """

    frequency_hz: float
    uncertainty_hz: float
    peak_ohm: float


@dataclass(frozen=True)
class CpEstimate:
    """A stray-capacitance estimate with its standard uncertainty.

    Attributes
    ----------
    cp_f : float
        Cp [F].
    uncertainty_f : float
        Standard uncertainty [F].
    method : str
        How it was obtained (one line).
    capacitive_side_f : float or None
        The cross-check from the capacitive side (intercept of B/ω against 1/ω² over
        1.2–2 f0) [F]; only meaningful for a low-loss winding without lead inductance.
    """

    cp_f: float
    uncertainty_f: float
    method: str
    capacitive_side_f: float | None = None


def find_self_resonance(frequency_hz, z, usable=None) -> SelfResonance | None:
    """The first + to − crossing of X (− to + of B = Im 1/Z), refined; None when there is none.

    Parameters
    ----------
    frequency_hz : array_like
        Strictly increasing frequencies [Hz].
    z : array_like of complex
        Measured impedance [Ω]; non-finite points are skipped.
    usable : array_like of bool, optional
        Points that may be used (default: every finite point). Do not pass a measurement
        validity mask here: near resonance |Z| is high and a reflection measurement marks its
        magnitude doubtful, but the sign of X, which locates the resonance, is still sound.

    Returns
    -------
    SelfResonance or None

    References
    ----------
    A. Massarini and M. K. Kazimierczuk, "Self-capacitance of inductors", IEEE Trans. Power
    Electron. 12(4), 1997, Sec. II (the self-resonance is where X of the winding passes through
    zero); refining the root by a least-squares line through the neighbouring points is common
    practice, no published source.
    """
    f = np.asarray(frequency_hz, dtype=float)
    z = np.asarray(z, dtype=complex)
    keep = np.isfinite(z) & (z != 0) & np.isfinite(f)
    if usable is not None:
        keep &= np.asarray(usable, bool)
    f, z = f[keep], z[keep]
    if f.size < 2 * _PERSIST:
        return None
    b = (1.0 / z).imag
    # Noise makes X dither about zero on a broad, lossy resonance: look for the crossing of a
    # running mean of B, which must hold its sign for m points either side.
    m = max(_PERSIST, f.size // 500)
    if f.size < 2 * m + 2:
        return None
    bs = np.convolve(b, np.ones(m) / m, "same")
    neg = bs < 0
    win = np.ones(m)
    below = np.convolve(neg.astype(float), win, "valid")[:-m] == m
    above = np.convolve((~neg).astype(float), win, "valid")[m:] == m
    idx = np.nonzero(below & above)[0] + m - 1
    if idx.size == 0:
        return None
    i = int(idx[0])
    lo, hi = max(i - m + 1, 0), min(i + m + 1, f.size)
    ff, bb = f[lo:hi], b[lo:hi]
    # B is close to linear in f through a parallel resonance (B = ωC − 1/(ωL)).
    (slope, icept), cov = np.polyfit(ff, bb, 1, cov=True)
    f_lin = f[i] - bs[i] * (f[i + 1] - f[i]) / (bs[i + 1] - bs[i])
    if slope <= 0:
        f0, sd_fit = f_lin, 0.5 * (f[i + 1] - f[i])
    else:
        f0 = -icept / slope
        g = np.array([icept / slope**2, -1.0 / slope])
        sd_fit = float(np.sqrt(max(g @ cov @ g, 0.0)))
        if not (ff[0] <= f0 <= ff[-1]):
            f0, sd_fit = f_lin, abs(f_lin - f0)
    step = f[i + 1] - f[i]
    u = float(np.hypot(sd_fit, step / np.sqrt(12.0)))
    k = int(np.argmin(np.abs(f - f0)))
    return SelfResonance(float(f0), u, float(np.abs(z[k])))


def low_frequency_inductance(frequency_hz, z, usable=None, *, upper_hz=None, cp_f=0.0):
    """Inductance from the inductive slope at low frequency, L = X/ω with Cp removed.

    Parameters
    ----------
    frequency_hz : array_like
        Frequencies [Hz].
    z : array_like of complex
        Measured impedance [Ω].
    usable : array_like of bool, optional
        Points to use (e.g. the measurement's validity mask).
    upper_hz : float, optional
        Highest frequency to use [Hz]; by default the lowest decade of usable points.
    cp_f : float
        Stray capacitance removed first [F].

    Returns
    -------
    (float, float)
        Median L [H] and the spread of the points used (half the 16–84 % range) [H].

    References
    ----------
    IEC 60050-221, IEV 221-03-06 (X = ωL0µ' of a winding); Cp removed as Zw = 1/(1/Z − jωCp).
    """
    f = np.asarray(frequency_hz, dtype=float)
    zw = remove_cp(f, z, cp_f)
    ok = np.isfinite(zw) & (zw.imag > 0)
    if usable is not None:
        ok &= np.asarray(usable, bool)
    if not ok.any():
        raise IdentificationError("z: no usable inductive point (X > 0) to take an inductance from")
    top = f[ok][0] * 10.0 if upper_hz is None else upper_hz
    sel = ok & (f <= top)
    if sel.sum() < 3:
        sel = ok & (f <= f[ok][min(4, ok.sum() - 1)])
    lval = zw[sel].imag / (2.0 * np.pi * f[sel])
    p16, p50, p84 = np.percentile(lval, [16, 50, 84])
    return float(p50), float(0.5 * (p84 - p16))


def cp_from_resonance(resonance_hz, zw_at_resonance):
    """Cp that puts the parallel resonance at ``resonance_hz``: Cp = −Im(1/Zw)/ω0.

    Parameters
    ----------
    resonance_hz : array_like
        Self-resonance frequency [Hz].
    zw_at_resonance : array_like of complex
        Winding impedance without Cp at that frequency, jω0L + R [Ω].

    Returns
    -------
    numpy.ndarray or float
        Cp [F]; for a lossless winding this is Thomson's 1/(ω0²L).

    References
    ----------
    Im(1/Zw + jω0Cp) = 0 at the parallel resonance of the lumped winding model of
    A. Massarini & M. K. Kazimierczuk, IEEE Trans. Power Electron. 12(4), 1997, Fig. 1.
    """
    w0 = 2.0 * np.pi * np.asarray(resonance_hz, dtype=float)
    out = -np.imag(1.0 / np.asarray(zw_at_resonance, dtype=complex)) / w0
    return float(out) if np.ndim(out) == 0 else out


def estimate_cp(frequency_hz, z, usable=None, *, resonance: SelfResonance | None = None,
                inductance_h: float | None = None) -> CpEstimate:
    """Closed-form Cp from the self-resonance and the low-frequency inductance.

    Cp = 1/(ω0²L), with L from the inductive slope (Cp-corrected by two fixed-point steps).
    The uncertainty combines the resonance's and the spread of L. A cross-check from the
    capacitive side is returned beside it: just above resonance B/ω = Cp − 1/(ω²L) for a
    low-loss winding, so a line of B/ω against 1/ω² over 1.2–2 f0 has Cp as its intercept. A dispersive core (µ' already falling at f0) makes
    the closed form low; :func:`cmcheck.identify.identify` refines it by fitting Cp jointly with
    the dispersion model through the resonance.

    Parameters
    ----------
    frequency_hz : array_like
        Frequencies [Hz].
    z : array_like of complex
        Measured impedance [Ω].
    usable : array_like of bool, optional
        Points trusted for the inductance (the measurement's validity mask).
    resonance : SelfResonance, optional
        Found with :func:`find_self_resonance` when not given.
    inductance_h : float, optional
        Low-frequency inductance [H], e.g. from a bridge reading; measured when not given.

    Returns
    -------
    CpEstimate

    Raises
    ------
    IdentificationError
        When the sweep shows no self-resonance.

    References
    ----------
    Thomson's formula for a parallel LC (any circuit text, e.g. C. K. Alexander &
    M. N. O. Sadiku, *Fundamentals of Electric Circuits*, §14.5); winding model of
    A. Massarini & M. K. Kazimierczuk, IEEE Trans. Power Electron. 12(4), 1997.
    """
    f = np.asarray(frequency_hz, dtype=float)
    z = np.asarray(z, dtype=complex)
    res = resonance or find_self_resonance(f, z)
    if res is None:
        raise IdentificationError("z: the sweep shows no self-resonance (X never turns from + to −), so Cp cannot be estimated from it")
    w0 = 2.0 * np.pi * res.frequency_hz
    cp, l_sd = 0.0, 0.0
    if inductance_h is None:
        for _ in range(3):
            ind, l_sd = low_frequency_inductance(f, z, usable, upper_hz=0.3 * res.frequency_hz, cp_f=cp)
            cp = 1.0 / (w0**2 * ind)
    else:
        ind = float(inductance_h)
        if not (np.isfinite(ind) and ind > 0):
            raise IdentificationError(f"inductance_h must be a positive inductance in H, got {inductance_h!r}")
        cp = 1.0 / (w0**2 * ind)
    rel = np.hypot(2.0 * res.uncertainty_hz / res.frequency_hz, l_sd / ind)
    cap = _capacitive_side(f, z, res.frequency_hz)
    return CpEstimate(float(cp), float(abs(rel) * cp), "Thomson's formula with the low-frequency inductance", cap)


def _capacitive_side(f, z, f0):
    sel = (f > 1.2 * f0) & (f < 2.0 * f0) & np.isfinite(z)
    if sel.sum() < 4:
        return None
    w = 2.0 * np.pi * f[sel]
    b = (1.0 / z[sel]).imag
    slope, icept = np.polyfit(1.0 / w**2, b / w, 1)
    return float(icept)


def remove_cp(frequency_hz, z, cp_f):
    """The winding's own impedance with the stray capacitance taken off: Zw = 1/(1/Z − jωCp).

    Parameters
    ----------
    frequency_hz : array_like
        Frequencies [Hz].
    z : array_like of complex
        Measured impedance [Ω].
    cp_f : float or array_like
        Stray capacitance [F].

    Returns
    -------
    numpy.ndarray of complex
        Zw [Ω], written Z/(1 − jωCp·Z) so it stays finite where Z → 0; infinite at the
        resonance of the lossless case.

    References
    ----------
    Inverse of the parallel connection in the lumped winding model of A. Massarini &
    M. K. Kazimierczuk, IEEE Trans. Power Electron. 12(4), 1997, Fig. 1.
    """
    z = np.asarray(z, dtype=complex)
    w = 2.0 * np.pi * np.asarray(frequency_hz, dtype=float)
    with np.errstate(divide="ignore", invalid="ignore"):
        return z / (1.0 - 1j * w * np.asarray(cp_f, dtype=float) * z)
