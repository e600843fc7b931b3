"""Loads on a transformer's output: a resistor (with the lead inductance and shunt capacitance
of a real test resistor), a complex impedance, or a measured Touchstone one-port, plus the
impedances from each output leg to ground.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from ..errors import TransformerError

__all__ = ["Load"]

_PARAM = {"load impedance": "load", "leg_p": "leg_p", "leg_n": "leg_n"}


def _finite_nonzero(name: str, z) -> None:
    if z is not None and not (np.all(np.isfinite(z)) and np.all(np.asarray(z) != 0)):
        raise TransformerError(f"{name} must be finite and non-zero", parameter=_PARAM.get(name))


@dataclass(frozen=True, eq=False)
class Load:
    """What the output terminals see.

    Parameters
    ----------
    z : complex, or array, or None
        Load impedance [Ω] (scalar, or one value per analysed frequency); use the constructors.
    frequency_hz, z_table : numpy.ndarray or None
        A tabulated load (Touchstone one-port), interpolated linearly in R and X.
    leg_p, leg_n : complex or None
        Impedance from the positive / negative output terminal to ground [Ω]; None: open
        (only the circuit's reference leak). Unused for ununs.
    """

    z: complex | np.ndarray | None = None
    frequency_hz: np.ndarray | None = None
    z_table: np.ndarray | None = None
    leg_p: complex | None = None
    leg_n: complex | None = None
    label: str = "load"

    def __post_init__(self) -> None:
        if (self.z is None) == (self.z_table is None):
            raise TransformerError("a load needs exactly one of z or a table (frequency_hz, z_table)")
        _finite_nonzero("load impedance", self.z if self.z is not None else self.z_table)
        _finite_nonzero("leg_p", self.leg_p)
        _finite_nonzero("leg_n", self.leg_n)

    @classmethod
    def resistor(cls, resistance: float, lead_inductance: float = 0.0, shunt_capacitance: float = 0.0,
                 leg_p=None, leg_n=None) -> "Load":
        """A test resistor R with its lead inductance in series and its shunt capacitance across.

        Parameters
        ----------
        resistance : float
            R [Ω], > 0.
        lead_inductance : float
            Series lead inductance [H], ≥ 0.
        shunt_capacitance : float
            Capacitance across the resistor and leads [F], ≥ 0.

        References
        ----------
        Lumped model of a resistor: Keysight, *Impedance Measurement Handbook*, 6th ed., 2016,
        §1.3 (real-world components: R with series L and parallel C).
        """
        for name, v, lo in (("resistance", resistance, 0.0), ("lead_inductance", lead_inductance, -1),
                            ("shunt_capacitance", shunt_capacitance, -1)):
            if not (math.isfinite(v) and (v > lo if lo == 0.0 else v >= 0)):
                raise TransformerError(f"{name} must be {'positive' if lo == 0.0 else '≥ 0'}, got {v!r}", parameter=name)
        return _ResistorLoad(z=complex(resistance), leg_p=leg_p, leg_n=leg_n, label=f"{resistance:g} Ω",
                             lead_l=lead_inductance, shunt_c=shunt_capacitance)

    @classmethod
    def complex(cls, z, leg_p=None, leg_n=None) -> "Load":
        """A fixed complex impedance z [Ω]."""
        return cls(z=complex(z), leg_p=leg_p, leg_n=leg_n, label=f"{complex(z):g} Ω")

    @classmethod
    def touchstone(cls, path, leg_p=None, leg_n=None) -> "Load":
        """A measured one-port, read with :func:`cmcheck.measurement.touchstone.read_touchstone`."""
        from ..measurement.methods import reflection_z
        from ..measurement.touchstone import read_touchstone

        s = read_touchstone(path)
        if s.n_ports != 1:
            raise TransformerError(f"{path}: a load file must be a one-port, got {s.n_ports} ports", parameter="load")
        g = s.s[:, 0, 0]
        if np.any(g == 1):
            raise TransformerError(f"{path}: the load is an open circuit at some frequency")
        z = reflection_z(g, s.z0)
        return cls(frequency_hz=np.asarray(s.frequency_hz), z_table=z, leg_p=leg_p, leg_n=leg_n, label=str(path))

    def impedance(self, frequency_hz) -> np.ndarray:
        """Load impedance [Ω] at ``frequency_hz``, shape (F,)."""
        f = np.asarray(frequency_hz, float)
        if self.z_table is not None:
            lo, hi = self.frequency_hz[0], self.frequency_hz[-1]
            if f.min() < lo * (1 - 1e-9) or f.max() > hi * (1 + 1e-9):
                raise TransformerError(
                    f"load {self.label} covers {lo:g}–{hi:g} Hz; analysis asks {f.min():g}–{f.max():g} Hz"
                )
            return np.interp(f, self.frequency_hz, self.z_table.real) + 1j * np.interp(f, self.frequency_hz, self.z_table.imag)
        return np.broadcast_to(np.asarray(self.z, complex), f.shape).copy()


@dataclass(frozen=True, eq=False)
class _ResistorLoad(Load):
    lead_l: float = 0.0
    shunt_c: float = 0.0

    def impedance(self, frequency_hz) -> np.ndarray:
        w = 2 * np.pi * np.asarray(frequency_hz, float)
        zs = self.z.real + 1j * w * self.lead_l
        return zs / (1.0 + 1j * w * self.shunt_c * zs)
