"""Checking a built transformer from a sweep: SWR and return loss of its input with the load
resistor on its output (one-port), or the loss of two identical units back to back (two-port).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from ..errors import MeasurementError
from ..transformer.analysis import match_figures
from ..transformer.bandwidth import swr_band
from ..transformer.characterise import reflection_to_impedance

__all__ = ["TransformerCheck", "check_transformer"]


@dataclass(frozen=True, eq=False)
class TransformerCheck:
    """SWR of a measured transformer over a band, and whether it stays under a limit.

    Attributes
    ----------
    path : str
    kind : str
        ``"loaded"`` (one-port into the load resistor) or ``"pair"`` (two units back to back).
    frequency_hz, zin, swr, return_loss_db : numpy.ndarray
        The whole sweep; ``zin`` [Ω] is the input impedance against the reference ``z0``.
    loss_per_unit_db : numpy.ndarray or None
        Pair only: half the pair's insertion loss −20·log10|S21| [dB].
    in_band : numpy.ndarray of bool
    max_swr : float
    band_under_max_swr_hz : tuple or None
    passed : bool
        SWR ≤ ``max_swr`` at every in-band point.
    """

    path: str
    kind: str
    z0: float
    frequency_hz: np.ndarray
    zin: np.ndarray
    swr: np.ndarray
    return_loss_db: np.ndarray
    loss_per_unit_db: np.ndarray | None
    in_band: np.ndarray
    max_swr: float
    band_under_max_swr_hz: tuple | None
    passed: bool

    def to_dict(self) -> dict:
        b = self.in_band
        s = self.swr[b]
        d = {
            "file": self.path, "kind": self.kind, "z0_ohm": self.z0,
            "frequency_hz": self.frequency_hz, "input_resistance_ohm": self.zin.real,
            "input_reactance_ohm": self.zin.imag, "swr": self.swr, "return_loss_db": self.return_loss_db,
            "summary": {"max_swr": self.max_swr, "worst_swr": float(np.max(s)),
                        "worst_swr_hz": float(self.frequency_hz[b][np.argmax(s)]),
                        "min_return_loss_db": float(np.min(self.return_loss_db[b])),
                        "band_under_max_swr_hz": None if self.band_under_max_swr_hz is None else list(self.band_under_max_swr_hz),
                        "pass": self.passed},
        }
        if self.loss_per_unit_db is not None:
            d["loss_per_unit_db"] = self.loss_per_unit_db
            d["summary"]["max_loss_per_unit_db"] = float(np.max(self.loss_per_unit_db[b]))
        return d


def check_transformer(sparams, path: str, max_swr: float, band=None, z0: float | None = None) -> TransformerCheck:
    """SWR, return loss (and, for a back-to-back pair, loss per unit) of one sweep.

    Parameters
    ----------
    sparams : SParameters
        A one-port (input of the transformer, its load resistor on the output) or a two-port
        (two identical units joined output to output, port 1 and port 2 on the inputs).
    path : str
        Name of the file, for messages.
    max_swr : float
        SWR limit [dimensionless], > 1.
    band : Band or None
        Band of the verdict; None: the whole sweep.
    z0 : float or None
        Reference impedance [Ω] instead of the file's.

    Returns
    -------
    TransformerCheck

    References
    ----------
    Match figures: Pozar, *Microwave Engineering*, 4th ed., eqs. (2.35), (2.41), (2.49).
    Loss per unit as half the back-to-back pair's insertion loss: common practice, no
    published source (it assumes identical units and neglects the mismatch between them).
    """
    if not (math.isfinite(max_swr) and max_swr > 1.0):
        raise MeasurementError(f"max_swr must be above 1, got {max_swr!r}", parameter="max_swr")
    if sparams.n_ports not in (1, 2):
        raise MeasurementError(f"{path}: a transformer check reads a one-port (into the load) or a two-port "
                               f"(two units back to back), got {sparams.n_ports} ports")
    ref = float(z0 if z0 is not None else sparams.z0)
    f = np.asarray(sparams.frequency_hz, float)
    zin = reflection_to_impedance(sparams.s[:, 0, 0], sparams.z0)
    mf = match_figures(zin, ref)
    loss = None
    if sparams.n_ports == 2:
        with np.errstate(divide="ignore"):
            loss = -20.0 * np.log10(np.abs(sparams.s[:, 1, 0])) / 2.0
    in_band = np.ones(f.shape, bool) if band is None else band.contains(f)
    if not in_band.any():
        raise MeasurementError(f"{path}: no point of the sweep lies in the band {band}", parameter="band")
    span = swr_band(f[in_band], mf["swr"][in_band], max_swr)
    passed = bool(np.all(mf["swr"][in_band] <= max_swr))
    return TransformerCheck(str(path), "pair" if loss is not None else "loaded", ref, f, zin, mf["swr"],
                            mf["return_loss_db"], loss, in_band, float(max_swr), span, passed)
