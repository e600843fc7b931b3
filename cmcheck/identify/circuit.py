"""A compact equivalent circuit for a measured or predicted impedance, and its SPICE text.

Form (Foster's first canonical form with a series resistance and inductance):

    Z(f) = Rs + jωLs + Σ_k (R_k ∥ L_k ∥ C_k)

one parallel R‖L‖C tank per branch, all in series. One tank is a winding with its stray
capacitance and core loss near its self-resonance; a lossy ferrite's spread-out dispersion,
lead inductance and higher resonances need more tanks, which are added one at a time while the
fit's rms relative error of |Z| stays above the target. Every element is positive, so the
circuit is passive and any SPICE simulator accepts it.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..errors import IdentificationError
from .resonance import find_self_resonance, low_frequency_inductance

__all__ = ["EquivalentCircuit", "WindingEstimate", "fit_circuit", "foster_impedance", "quick_estimates", "write_spice"]

_MAX_POINTS = 400


def foster_impedance(frequency_hz, r_series, l_series, branches):
    """Z = Rs + jωLs + Σ (R_k ∥ L_k ∥ C_k).

    Parameters
    ----------
    frequency_hz : array_like
        Frequency [Hz].
    r_series : float
        Series resistance [Ω].
    l_series : float
        Series inductance [H].
    branches : array_like, shape (K, 3)
        Rows (R_k [Ω], L_k [H], C_k [F]).

    Returns
    -------
    numpy.ndarray of complex
        Z [Ω].

    References
    ----------
    R. M. Foster, "A reactance theorem", Bell Syst. Tech. J. 3, 259–267 (1924) (series of
    parallel resonators); each tank's admittance 1/R + 1/(jωL) + jωC.
    """
    w = 2.0 * np.pi * np.asarray(frequency_hz, dtype=float)
    z = r_series + 1j * w * l_series
    for r, ind, c in np.asarray(branches, dtype=float).reshape(-1, 3):
        z = z + 1.0 / (1.0 / r + 1.0 / (1j * w * ind) + 1j * w * c)
    return z


@dataclass(frozen=True)
class WindingEstimate:
    """Closed-form figures of a winding from its sweep (no fit; for batch use).

    Attributes
    ----------
    inductance_h : float
        From the inductive slope, X/ω over the lowest decade of usable points [H].
    r_low_ohm : float
        Re Z at the lowest usable frequency [Ω].
    self_resonance_hz : float or None
        First + to − crossing of X [Hz].
    cp_f : float or None
        1/(ω0²L) [F] (None without a resonance).
    r_peak_ohm : float or None
        |Z| at the self-resonance, the parallel loss resistance [Ω].
    """

    inductance_h: float
    r_low_ohm: float
    self_resonance_hz: float | None
    cp_f: float | None
    r_peak_ohm: float | None


def quick_estimates(frequency_hz, z, usable=None) -> WindingEstimate:
    """L, R and (with a self-resonance in the sweep) Cp of a winding in closed form.

    Parameters
    ----------
    frequency_hz : array_like
        Frequencies [Hz].
    z : array_like of complex
        Impedance [Ω].
    usable : array_like of bool, optional
        Points trusted for L and R (the measurement's validity mask).

    Returns
    -------
    WindingEstimate

    References
    ----------
    Thomson's formula Cp = 1/(ω0²L) (any circuit text, e.g. Alexander & Sadiku, *Fundamentals
    of Electric Circuits*, §14.5); the winding model of Massarini & Kazimierczuk, IEEE Trans.
    Power Electron. 12(4), 1997.
    """
    f = np.asarray(frequency_hz, dtype=float)
    z = np.asarray(z, dtype=complex)
    ok = np.isfinite(z) if usable is None else np.isfinite(z) & np.asarray(usable, bool)
    if not ok.any():
        raise IdentificationError("z: no usable point for a winding estimate")
    res = find_self_resonance(f, z)
    upper = None if res is None else 0.3 * res.frequency_hz
    ind, _ = low_frequency_inductance(f, z, ok, upper_hz=upper)
    r_low = float(z[ok][0].real)
    if res is None:
        return WindingEstimate(ind, r_low, None, None, None)
    cp = 1.0 / ((2.0 * np.pi * res.frequency_hz) ** 2 * ind)
    return WindingEstimate(ind, r_low, res.frequency_hz, float(cp), res.peak_ohm)


@dataclass(frozen=True)
class EquivalentCircuit:
    """A fitted Rs + jωLs + Σ(R‖L‖C) circuit.

    Attributes
    ----------
    r_series_ohm, l_series_h : float
        Series R [Ω] and L [H].
    branches : tuple of (float, float, float)
        (R [Ω], L [H], C [F]) of each parallel tank.
    rms_relative_error : float
        rms of |Z_fit − Z|/|Z| over the fitted points [dimensionless].
    band_hz : tuple of float
        Frequencies fitted [Hz].
    """

    r_series_ohm: float
    l_series_h: float
    branches: tuple
    rms_relative_error: float
    band_hz: tuple

    form = "Rs + jωLs + Σ(R_k ∥ L_k ∥ C_k) (Foster's first form)"

    def impedance(self, frequency_hz) -> np.ndarray:
        """Z of the circuit [Ω] at ``frequency_hz`` [Hz]."""
        return foster_impedance(frequency_hz, self.r_series_ohm, self.l_series_h, self.branches)

    def to_spice(self, name: str = "winding", comments=()) -> str:
        """The circuit as a SPICE ``.SUBCKT name 1 2`` with R, L and C elements (text)."""
        if not name or not all(ch.isalnum() or ch in "_-" for ch in name):
            raise IdentificationError(f"name must be letters, digits, '_' or '-', got {name!r}")
        lines = [f"* {c}" for c in comments]
        lines += [f"* equivalent circuit: {self.form}",
                  f"* fitted {self.band_hz[0]:.6g}-{self.band_hz[1]:.6g} Hz, rms |Z| error {100 * self.rms_relative_error:.3g} %",
                  f".SUBCKT {name} 1 2"]
        n = len(self.branches)
        taps = [f"t{k}" for k in range(n)] + ["2"]
        lines.append(f"RS 1 a {self.r_series_ohm:.9e}")
        if self.l_series_h > 0:
            lines.append(f"LS a {taps[0]} {self.l_series_h:.9e}")
        else:
            taps[0] = "a"
        for k, (r, ind, c) in enumerate(self.branches, start=1):
            p, q = taps[k - 1], taps[k]
            lines += [f"R{k} {p} {q} {r:.9e}", f"L{k} {p} {q} {ind:.9e}", f"C{k} {p} {q} {c:.9e}"]
        lines.append(f".ENDS {name}")
        return "\n".join(lines) + "\n"

    def to_dict(self) -> dict:
        return {"form": self.form, "r_series_ohm": self.r_series_ohm, "l_series_h": self.l_series_h,
                "branches": [{"r_ohm": r, "l_h": ind, "c_f": c} for r, ind, c in self.branches],
                "rms_relative_error": self.rms_relative_error, "band_hz": list(self.band_hz)}


def write_spice(path, circuit: EquivalentCircuit, name: str = "winding", comments=()) -> None:
    """Write :meth:`EquivalentCircuit.to_spice` to ``path`` atomically."""
    from ..reporting.files import atomic_write

    text = circuit.to_spice(name, comments)
    atomic_write(path, lambda p: p.write_text(text, encoding="ascii", errors="replace"))


def _unpack(x):
    p = np.exp(x)
    return p[0], p[1], p[2:].reshape(-1, 3)


#: Element ranges the fit may use (Rs, Ls, then R, L, C per tank) [Ω, H, F]: wide enough for any
#: winding, narrow enough that a tank cannot vanish into a 1e-300 value SPICE would choke on.
_LIMITS = {"rs": (1e-6, 1e6), "ls": (1e-13, 1e-3), "r": (1e-3, 1e8), "l": (1e-12, 1e-1), "c": (1e-17, 1e-6)}


def _bounds(n_branches):
    keys = ["rs", "ls"] + ["r", "l", "c"] * n_branches
    lo = np.log([_LIMITS[k][0] for k in keys])
    hi = np.log([_LIMITS[k][1] for k in keys])
    return lo, hi


def _fit(f, z, w, x0):
    from scipy.optimize import least_squares  # kept off the CLI start-up path

    lo, hi = _bounds((x0.size - 2) // 3)
    x0 = np.clip(x0, lo + 1e-9, hi - 1e-9)

    def resid(x):
        zm = foster_impedance(f, *_unpack(x))
        d = np.log(zm / z)  # log|Zm/Z| + j(phase difference)
        return np.concatenate([d.real * w, d.imag * w])

    with np.errstate(all="ignore"):
        sol = least_squares(resid, x0, bounds=(lo, hi), method="trf", max_nfev=600)
    return sol


def fit_circuit(frequency_hz, z, usable=None, *, max_branches: int = 4, target: float = 0.03,
                series_inductance: bool = True) -> EquivalentCircuit:
    """Fit Rs + jωLs + Σ(R‖L‖C) to an impedance, adding tanks while the data need them.

    Residuals are ln(Z_fit/Z) split into ln|Z| and phase [rad], with equal weight per decade;
    least squares in the logarithms of the element values (all positive). Tanks are added,
    each seeded at the frequency of the worst residual, until the rms relative |Z| error is at
    most ``target`` or ``max_branches`` is reached.

    Parameters
    ----------
    frequency_hz : array_like
        Frequencies [Hz].
    z : array_like of complex
        Measured or predicted impedance [Ω].
    usable : array_like of bool, optional
        Points to fit (e.g. the measurement's validity mask); all finite points by default.
    max_branches : int
        Largest number of R‖L‖C tanks (1–8).
    target : float
        rms relative |Z| error at which no tank is added [dimensionless].
    series_inductance : bool
        Fit the series inductance Ls (leads); otherwise it is held near zero.

    Returns
    -------
    EquivalentCircuit

    References
    ----------
    R. M. Foster, Bell Syst. Tech. J. 3, 259 (1924) (the form); scipy.optimize.least_squares.
    """
    if not (isinstance(max_branches, (int, np.integer)) and 1 <= max_branches <= 8):
        raise IdentificationError(f"max_branches must be a whole number 1–8, got {max_branches!r}")
    if not (target > 0):
        raise IdentificationError(f"target must be above 0, got {target!r}")
    f = np.asarray(frequency_hz, dtype=float)
    z = np.asarray(z, dtype=complex)
    ok = np.isfinite(z) & (z != 0) & (f > 0)
    if usable is not None:
        ok &= np.asarray(usable, bool)
    if ok.sum() < 8:
        raise IdentificationError(f"z: only {int(ok.sum())} usable points; a circuit fit needs at least 8")
    fa, za = f[ok], z[ok]
    if fa.size > _MAX_POINTS:
        pick = np.unique(np.searchsorted(fa, np.geomspace(fa[0], fa[-1], _MAX_POINTS)).clip(0, fa.size - 1))
        fa, za = fa[pick], za[pick]
    w = np.sqrt(np.gradient(np.log(fa)) / np.mean(np.gradient(np.log(fa))))
    est = quick_estimates(fa, za)
    ind = max(est.inductance_h, 1e-15)
    f0 = est.self_resonance_hz or 3.0 * fa[-1]
    c = 1.0 / ((2 * np.pi * f0) ** 2 * ind)
    r_peak = est.r_peak_ohm or 10.0 * float(np.max(np.abs(za)))
    x = np.log([max(abs(est.r_low_ohm), 1e-6 * np.abs(za).min()), 1e-3 * ind if series_inductance else _LIMITS["ls"][0],
                r_peak, ind, c])
    best = None
    for n in range(1, max_branches + 1):
        sol = _fit(fa, za, w, x)
        if not series_inductance:
            sol.x[1] = np.log(_LIMITS["ls"][0])
        zm = foster_impedance(fa, *_unpack(sol.x))
        rel = np.abs(zm - za) / np.abs(za)
        rms = float(np.sqrt(np.mean(rel**2)))
        if best is None or rms < best[1]:
            best = (sol.x, rms)
        if rms <= target or n == max_branches:
            break
        k = int(np.argmax(rel * w))
        fk, zk = fa[k], abs(za[k])
        wk = 2 * np.pi * fk
        lk = zk / wk
        x = np.concatenate([sol.x, np.log([3.0 * zk, lk, 1.0 / (wk**2 * lk)])])
    rs, ls, br = _unpack(best[0])
    wa = 2 * np.pi * fa
    # A tank whose impedance stays below 0.1 % of |Z| everywhere adds nothing: leave it out.
    keep = [row for row in br if np.max(np.abs(1.0 / (1 / row[0] + 1 / (1j * wa * row[1]) + 1j * wa * row[2])) / np.abs(za)) > 1e-3]
    if not series_inductance or np.max(wa * ls / np.abs(za)) < 1e-3:
        ls = 0.0
    return EquivalentCircuit(float(rs), float(ls), tuple(tuple(map(float, row)) for row in keep), best[1],
                             (float(fa[0]), float(fa[-1])))
