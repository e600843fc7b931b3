"""The value every stage passes on: an impedance against frequency.

A predicted choke, an extracted measurement and a sized design all end up as an
:class:`ImpedanceCurve`; reports and comparisons only ever see this type.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from .errors import MeasurementError

__all__ = [
    "ImpedanceCurve",
    "series_s21",
    "self_resonance",
    "resistive_ranges",
    "true_runs",
]


def series_s21(z, z0=50.0):
    """S21 of an impedance in series between two ports of equal reference impedance.

    Parameters
    ----------
    z : array_like of complex
        Series impedance [Ω].
    z0 : float
        Port reference impedance [Ω].

    Returns
    -------
    numpy.ndarray of complex
        S21 = S12 = 2·Z0/(2·Z0 + Z); S11 = S22 = 1 − S21.

    References
    ----------
    D. M. Pozar, *Microwave Engineering*, 4th ed., Wiley 2012, Table 4.2 (ABCD of a series
    impedance) with the ABCD→S conversion of Table 4.2; inverting it gives the series-through
    relation Z = 2·Z0·(1 − S21)/S21.
    """
    z = np.asarray(z, dtype=complex)
    return 2.0 * z0 / (2.0 * z0 + z)


def self_resonance(frequency_hz, z):
    """Frequencies where the reactance changes sign from inductive to capacitive.

    Parameters
    ----------
    frequency_hz : array_like
        Increasing frequencies [Hz].
    z : array_like of complex
        Impedance at those frequencies [Ω].

    Returns
    -------
    numpy.ndarray
        Each + to − crossing of X, linearly interpolated in log-frequency [Hz]; empty when
        there is none on the grid.

    References
    ----------
    A. Massarini and M. K. Kazimierczuk, "Self-capacitance of inductors", IEEE Trans. Power
    Electron. 12(4), 1997, Sec. II: the self-resonance of a winding is the parallel resonance
    of its inductance with its stray capacitance, where X passes through zero.
    """
    f = np.asarray(frequency_hz, dtype=float)
    x = np.asarray(z, dtype=complex).imag
    idx = np.nonzero((x[:-1] > 0) & (x[1:] <= 0))[0]
    if idx.size == 0:
        return np.empty(0)
    lf0, lf1 = np.log(f[idx]), np.log(f[idx + 1])
    x0, x1 = x[idx], x[idx + 1]
    t = x0 / (x0 - x1)
    return np.exp(lf0 + t * (lf1 - lf0))


def resistive_ranges(frequency_hz, z) -> list[tuple[float, float]]:
    """Contiguous frequency ranges [Hz] where the impedance is mostly resistive (R > |X|).

    Each range runs from the first to the last grid point where R > |X| holds.
    """
    f = np.asarray(frequency_hz, dtype=float)
    z = np.asarray(z, dtype=complex)
    return [(float(f[a]), float(f[b - 1])) for a, b in true_runs(z.real > np.abs(z.imag))]


def true_runs(mask) -> list[tuple[int, int]]:
    """Start and end (exclusive) indices of each run of True in a boolean array."""
    m = np.asarray(mask, dtype=np.int8)
    edges = np.flatnonzero(np.diff(np.concatenate([[0], m, [0]])))
    return list(zip(edges[::2].tolist(), edges[1::2].tolist()))


@dataclass(frozen=True, eq=False)
class ImpedanceCurve:
    """An impedance R + jX against frequency, with a validity mask.

    Parameters
    ----------
    frequency_hz : array_like
        Strictly increasing frequencies [Hz].
    z : array_like of complex
        Impedance [Ω], same length.
    valid : array_like of bool, optional
        Which points can be trusted (measurements); all True by default.
    label : str
        A short name for tables and plot legends.
    """

    frequency_hz: np.ndarray
    z: np.ndarray
    valid: np.ndarray | None = None
    label: str = ""
    meta: dict = field(default_factory=dict)

    def __post_init__(self) -> None:
        f = np.asarray(self.frequency_hz, dtype=float).reshape(-1)
        z = np.asarray(self.z, dtype=complex).reshape(-1)
        if f.shape != z.shape:
            raise MeasurementError(
                f"{self.label or 'curve'}: {f.size} frequencies but {z.size} impedance values"
            )
        valid = np.ones(f.shape, bool) if self.valid is None else np.asarray(self.valid, bool)
        if valid.shape != f.shape:
            raise MeasurementError(f"{self.label or 'curve'}: validity mask has the wrong length")
        for name, arr in (("frequency_hz", f), ("z", z), ("valid", valid)):
            arr.setflags(write=False)
            object.__setattr__(self, name, arr)

    @property
    def resistance(self) -> np.ndarray:
        """R = Re Z [Ω]."""
        return self.z.real

    @property
    def reactance(self) -> np.ndarray:
        """X = Im Z [Ω]."""
        return self.z.imag

    @property
    def magnitude(self) -> np.ndarray:
        """|Z| [Ω]."""
        return np.abs(self.z)

    def in_band(self, low_hz: float, high_hz: float | None = None) -> "ImpedanceCurve":
        """The part of the curve inside a band.

        ``low_hz`` may be a :class:`~cmcheck.units.Band` (then ``high_hz`` is omitted),
        or the low edge [Hz] with ``high_hz`` the high edge [Hz].
        """
        if high_hz is None:
            mask = low_hz.contains(self.frequency_hz)
        else:
            mask = (self.frequency_hz >= low_hz) & (self.frequency_hz <= high_hz)
        return ImpedanceCurve(
            self.frequency_hz[mask], self.z[mask], self.valid[mask], self.label, dict(self.meta)
        )

    def interpolate(self, frequency_hz) -> np.ndarray:
        """Z at other frequencies [Hz], linear in log-frequency for R and X; NaN outside."""
        f = np.asarray(frequency_hz, dtype=float)
        lf = np.log(self.frequency_hz)
        out = np.interp(np.log(f), lf, self.z.real, left=np.nan, right=np.nan) + 1j * np.interp(
            np.log(f), lf, self.z.imag, left=np.nan, right=np.nan
        )
        return out

    def self_resonance_hz(self) -> float | None:
        """The first self-resonance on the grid [Hz], or None."""
        srf = self_resonance(self.frequency_hz[self.valid], self.z[self.valid])
        return float(srf[0]) if srf.size else None

    def to_network(self, z0: float = 50.0, name: str | None = None):
        """The impedance as a series two-port, a :class:`skrf.Network` (for Touchstone export).

        Parameters
        ----------
        z0 : float
            Reference impedance of both ports [Ω].
        """
        import skrf  # heavy import kept off the CLI start-up path

        s21 = series_s21(self.z, z0)
        s = np.empty((self.z.size, 2, 2), dtype=complex)
        s[:, 0, 0] = s[:, 1, 1] = 1.0 - s21
        s[:, 0, 1] = s[:, 1, 0] = s21
        freq = skrf.Frequency.from_f(self.frequency_hz, unit="hz")
        return skrf.Network(frequency=freq, s=s, z0=z0, name=name or self.label or "choke")

    def to_dict(self) -> dict:
        """JSON-ready columns with the project's standard keys."""
        return {
            "frequency_hz": self.frequency_hz.tolist(),
            "resistance_ohm": self.resistance.tolist(),
            "reactance_ohm": self.reactance.tolist(),
            "impedance_ohm": self.magnitude.tolist(),
        }
