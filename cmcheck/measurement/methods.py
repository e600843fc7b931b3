"""Impedance from a network-analyser sweep: the three S→Z methods, fixture compensation, validity.

Three ways of measuring an impedance Z with a two-port analyser of reference impedance Z0:

* **series-through** (Z between the two port centre conductors): Z = 2·Z0·(1 − S21)/S21,
  best for 0.5–20 kΩ, which is where chokes live;
* **shunt-through** (Z from the through line to ground): Z = Z0·S21/(2·(1 − S21)), for
  milliohms;
* **reflection** (Z across port 1): Z = Z0·(1 + S11)/(1 − S11), best near Z0.

Each point carries an estimate of its relative error and a validity mask
(:mod:`cmcheck.measurement.validity`); open/short fixture residuals can be removed first. Everything here
is a vectorised function of numpy arrays.
"""

from __future__ import annotations

import warnings
from dataclasses import dataclass

import numpy as np

from .balance import Balance, common_mode_series_z, four_port_balance, legs_balance, three_port_balance
from ..curve import ImpedanceCurve
from ..errors import CmcheckWarning, MeasurementError, TouchstoneError
from .evidence import method_doubts
from .touchstone import SParameters
from .validity import Accuracy, Validity, balance_validity, impedance_validity, reflection_error, through_error

__all__ = [
    "METHODS",
    "Accuracy",
    "Extraction",
    "Fixture",
    "Validity",
    "extract",
    "extract_legs",
    "open_short_compensation",
    "reflection_z",
    "resolve_method",
    "series_through_z",
    "shunt_through_z",
]

#: Methods by name; ``auto`` picks by port count (1 → reflect, 2 → series, 3/4 → mixed).
METHODS = ("auto", "series", "shunt", "reflect", "mixed")


def series_through_z(s21, z0):
    """Impedance in series between port 1 and port 2 from S21.

    Parameters
    ----------
    s21 : array_like of complex
        Transmission coefficient [dimensionless].
    z0 : float
        Reference impedance of both ports [Ω].

    Returns
    -------
    numpy.ndarray of complex
        Z = 2·Z0·(1 − S21)/S21 [Ω]; infinite where S21 = 0.

    References
    ----------
    D. M. Pozar, *Microwave Engineering*, 4th ed., Wiley 2012, Table 4.2: a series impedance
    has A = 1, B = Z, C = 0, D = 1, and the ABCD→S conversion gives S21 = 2·Z0/(2·Z0 + Z).
    """
    s21 = np.asarray(s21, dtype=complex)
    with np.errstate(divide="ignore", invalid="ignore"):
        return 2.0 * z0 * (1.0 - s21) / s21


def shunt_through_z(s21, z0):
    """Impedance from the through line to ground (shunt-through) from S21.

    Parameters
    ----------
    s21 : array_like of complex
        Transmission coefficient [dimensionless].
    z0 : float
        Reference impedance of both ports [Ω].

    Returns
    -------
    numpy.ndarray of complex
        Z = Z0·S21/(2·(1 − S21)) [Ω]; infinite where S21 = 1.

    References
    ----------
    D. M. Pozar, *Microwave Engineering*, 4th ed., Wiley 2012, Table 4.2: a shunt admittance
    Y has A = 1, B = 0, C = Y, D = 1, so S21 = 2/(2 + Y·Z0).
    """
    s21 = np.asarray(s21, dtype=complex)
    with np.errstate(divide="ignore", invalid="ignore"):
        return z0 * s21 / (2.0 * (1.0 - s21))


def reflection_z(s11, z0):
    """Impedance terminating port 1 from its reflection coefficient.

    Parameters
    ----------
    s11 : array_like of complex
        Reflection coefficient [dimensionless].
    z0 : float
        Reference impedance [Ω].

    Returns
    -------
    numpy.ndarray of complex
        Z = Z0·(1 + S11)/(1 − S11) [Ω]; infinite where S11 = 1.

    References
    ----------
    D. M. Pozar, *Microwave Engineering*, 4th ed., Wiley 2012, eq. (2.35) inverted:
    Γ = (Z − Z0)/(Z + Z0).
    """
    s11 = np.asarray(s11, dtype=complex)
    with np.errstate(divide="ignore", invalid="ignore"):
        return z0 * (1.0 + s11) / (1.0 - s11)


def open_short_compensation(zxm, zs, yo):
    """Remove a fixture's residual impedance and stray admittance from a measured impedance.

    Parameters
    ----------
    zxm : array_like of complex
        Impedance measured with the device in the fixture [Ω].
    zs : array_like of complex
        Residual series impedance, i.e. the impedance measured with the fixture shorted [Ω].
    yo : array_like of complex
        Stray admittance of the open fixture [S]; 1/(Zom − Zsm) from the open and short
        measurements (the handbook's 1/Zom is its limit for Zs ≪ Zom).

    Returns
    -------
    numpy.ndarray of complex
        Zdut = (Zxm − Zs)/(1 − (Zxm − Zs)·Yo) [Ω]. Exact for the handbook's fixture model
        Zxm = Zs + 1/(Yo + 1/Zdut).

    References
    ----------
    Keysight (Agilent), *Impedance Measurement Handbook*, 6th ed., 2016, §4.3.2
    "Open/short compensation", eq. 4-3.
    """
    d = np.asarray(zxm, dtype=complex) - np.asarray(zs, dtype=complex)
    with np.errstate(divide="ignore", invalid="ignore"):
        return d / (1.0 - d * np.asarray(yo, dtype=complex))


@dataclass(frozen=True, eq=False)
class Fixture:
    """Open/short fixture residuals, measured by the same method as the device.

    Attributes
    ----------
    frequency_hz : numpy.ndarray
        Frequencies of the fixture sweeps [Hz] (the short sweep's, the open one interpolated).
    zs : numpy.ndarray of complex
        Residual series impedance (short) [Ω].
    yo : numpy.ndarray of complex
        Stray admittance (open) [S].
    """

    frequency_hz: np.ndarray
    zs: np.ndarray
    yo: np.ndarray
    method: str = "series"
    sources: tuple[str, str] = ("", "")

    @classmethod
    def from_sweeps(cls, open_sweep: SParameters, short_sweep: SParameters, method: str = "auto",
                    z0: float | None = None) -> "Fixture":
        """Fixture residuals from the open and shorted fixture sweeps.

        ``method`` is the one the device is measured with (``auto`` picks it from the port
        count as :func:`extract` does); ``z0`` overrides the sweeps' reference impedance [Ω].
        """
        method = resolve_method(method, open_sweep.n_ports, open_sweep.source)
        if method == "mixed":
            raise MeasurementError(f"{open_sweep.source}: fixture (open/short) compensation applies to the series, shunt and reflect methods", parameter="fixture")
        resolve_method(method, short_sweep.n_ports, short_sweep.source)
        zo = _impedance_only(open_sweep, method, open_sweep.z0 if z0 is None else z0)
        zsh = _impedance_only(short_sweep, method, short_sweep.z0 if z0 is None else z0)
        f = short_sweep.frequency_hz
        zo_i = _interp_complex(f, open_sweep.frequency_hz, zo)
        inside = np.isfinite(zo_i)
        if not inside.any():
            raise MeasurementError(f"{open_sweep.source}: the open and short sweeps do not overlap in frequency")
        f, zsh, zo_i = f[inside], zsh[inside], zo_i[inside]
        with np.errstate(divide="ignore", invalid="ignore"):
            yo = 1.0 / (zo_i - zsh)
        if not np.all(np.isfinite(yo)) or not np.all(np.isfinite(zsh)):
            raise MeasurementError(f"{open_sweep.source}: open and short give the same impedance; check the files")
        return cls(f, zsh, yo, method, (open_sweep.source, short_sweep.source))

    def apply(self, frequency_hz, zxm):
        """Compensated impedance, where the fixture data cover it, and |dZdut/dZxm|.

        Returns
        -------
        zdut : numpy.ndarray of complex
            Compensated impedance [Ω] (NaN outside the fixture's range).
        outside : numpy.ndarray of bool
            Points outside the fixture sweeps' range.
        gain : numpy.ndarray
            |dZdut/dZxm| = 1/|1 − (Zxm − Zs)·Yo|², for propagating the error estimate.
        """
        zs = _interp_complex(frequency_hz, self.frequency_hz, self.zs)
        yo = _interp_complex(frequency_hz, self.frequency_hz, self.yo)
        outside = ~(np.isfinite(zs) & np.isfinite(yo))
        zdut = open_short_compensation(zxm, zs, yo)
        with np.errstate(invalid="ignore", divide="ignore"):
            gain = 1.0 / np.abs(1.0 - (zxm - zs) * yo) ** 2
        return zdut, outside, gain


def _interp_complex(f_new, f, z):
    """Linear interpolation of real and imaginary parts; NaN outside the data's range."""
    f_new = np.asarray(f_new, dtype=float)
    re = np.interp(f_new, f, z.real, left=np.nan, right=np.nan)
    im = np.interp(f_new, f, z.imag, left=np.nan, right=np.nan)
    return re + 1j * im


def resolve_method(method: str, n_ports: int, source: str) -> str:
    """The method to use for a file of ``n_ports`` ports; refuses impossible combinations."""
    if method not in METHODS:
        raise MeasurementError(f"method {method!r}: choose one of {', '.join(METHODS)}", parameter="method")
    if method == "auto":
        return {1: "reflect", 2: "series"}.get(n_ports, "mixed")
    need = {"series": (2,), "shunt": (2,), "reflect": (1, 2), "mixed": (3, 4)}[method]
    if n_ports not in need:
        what = {"series": "a 2-port file", "shunt": "a 2-port file", "reflect": "a 1- or 2-port file",
                "mixed": "a 3- or 4-port file (or legs: two 2-port files)"}[method]
        raise TouchstoneError(f"{source}: method {method} needs {what}; this is a {n_ports}-port file",
                              parameter=("method", "legs") if method == "mixed" else "method")
    return method


def _impedance_only(sweep: SParameters, method: str, z0: float) -> np.ndarray:
    method = resolve_method(method, sweep.n_ports, sweep.source)
    if method == "reflect":
        return reflection_z(sweep.param(1, 1), z0)
    _check_s21(sweep)
    fn = series_through_z if method == "series" else shunt_through_z
    return fn(sweep.param(2, 1), z0)


def _check_s21(sweep: SParameters) -> None:
    if sweep.is_placeholder(2, 1):
        raise TouchstoneError(f"{sweep.source}: S21 is zero at every point (not measured); use method reflect", parameter="method")


@dataclass(frozen=True, eq=False)
class Extraction:
    """What one measurement gives: an impedance curve, mixed-mode figures, or both.

    Attributes
    ----------
    source : str
        The file (or files) it came from.
    method : str
        ``series``, ``shunt``, ``reflect`` or ``mixed``.
    z0 : float
        Reference impedance used [Ω].
    frequency_hz : numpy.ndarray
        Frequencies [Hz].
    validity : Validity
        Per-point validity with reasons.
    curve : ImpedanceCurve or None
        Impedance with ``valid`` set (None for a three-port balun or legs, which give no
        impedance: measure the common-mode impedance series-through instead).
    balance : Balance or None
        Mixed-mode figures (methods ``mixed`` and legs).
    compensated : bool
        Whether open/short fixture compensation was applied.
    """

    source: str
    method: str
    z0: float
    frequency_hz: np.ndarray
    validity: Validity
    curve: ImpedanceCurve | None = None
    balance: Balance | None = None
    compensated: bool = False

    @property
    def valid(self) -> np.ndarray:
        """Validity mask [bool]."""
        return self.validity.valid


def extract(
    sweep: SParameters,
    method: str = "auto",
    *,
    z0: float | None = None,
    accuracy: Accuracy = Accuracy(),
    fixture: Fixture | None = None,
    balanced_ports: tuple[int, ...] | None = None,
) -> Extraction:
    """Extract impedance (or mixed-mode figures) from a validated sweep.

    Parameters
    ----------
    sweep : SParameters
        From :func:`cmcheck.measurement.touchstone.read_touchstone`.
    method : {"auto", "series", "shunt", "reflect", "mixed"}
        ``auto``: 1 port → reflect, 2 → series, 3 or 4 → mixed.
    z0 : float, optional
        Reference impedance [Ω]; the sweep's by default.
    accuracy : Accuracy
        Noise floor, calibration residual and tolerance for the validity mask.
    fixture : Fixture, optional
        Open/short residuals to remove (series, shunt and reflect only).
    balanced_ports : tuple of int, optional
        1-based ports: (p, n) of the balanced pair of a 3-port (default 2, 3), or
        (p1, n1, p2, n2) of a 4-port (default 1, 2, 3, 4: pair 1,2 in, pair 3,4 out).

    Returns
    -------
    Extraction

    References
    ----------
    Methods: D. M. Pozar, *Microwave Engineering*, 4th ed., 2012, Table 4.2 and eq. (2.35);
    fixture: Keysight, *Impedance Measurement Handbook*, 6th ed., 2016, §4.3; mixed mode:
    Bockelman & Eisenstadt, IEEE T-MTT 43(7), 1995.
    """
    z0 = float(sweep.z0 if z0 is None else z0)
    m = resolve_method(method, sweep.n_ports, sweep.source)
    f = sweep.frequency_hz
    if m == "mixed":
        if fixture is not None:
            raise MeasurementError(f"{sweep.source}: fixture (open/short) compensation applies to the series, shunt and reflect methods", parameter="fixture")
        return _extract_mixed(sweep, z0, accuracy, balanced_ports)
    if balanced_ports is not None:
        raise MeasurementError(f"{sweep.source}: balanced_ports applies to 3- and 4-port files only", parameter="balanced_ports")
    n, eps, tol = accuracy.noise, accuracy.cal_error, accuracy.max_error
    for doubt in method_doubts(sweep, m, eps):
        warnings.warn(CmcheckWarning(doubt, parameter="method"), stacklevel=2)
    if m == "reflect":
        s = sweep.param(1, 1)
        z = reflection_z(s, z0)
        err, err_n = reflection_error(s, eps, n)
    else:
        _check_s21(sweep)
        s = sweep.param(2, 1)
        z = series_through_z(s, z0) if m == "series" else shunt_through_z(s, z0)
        err, err_n = through_error(s, eps, n)
    active = np.abs(s) > 1.0
    outside = None
    if fixture is not None:
        if fixture.method != m:
            raise MeasurementError(f"{sweep.source}: measured by {m} but the open/short sweeps by {fixture.method}")
        z_dut, outside, gain = fixture.apply(f, z)
        with np.errstate(invalid="ignore", divide="ignore"):
            scale = np.where(outside, 1.0, gain * np.abs(z) / np.abs(z_dut))
        err, err_n = err * scale, err_n * scale
        z = np.where(outside, z, z_dut)
        if outside.all():
            raise MeasurementError(f"{sweep.source}: no point lies inside the open/short fixture sweeps")
        if outside.any():
            warnings.warn(f"{sweep.source}: {int(outside.sum())} points lie outside the fixture sweeps and are "
                          "marked not valid", CmcheckWarning, stacklevel=2)
    validity = impedance_validity(z, err, err_n, active, tol, outside)
    curve = ImpedanceCurve(f, np.where(np.isfinite(z), z, np.nan), validity.valid, label=sweep.source)
    return Extraction(sweep.source, m, z0, f, validity, curve=curve, compensated=fixture is not None)


def _ports(balanced_ports, n_ports: int, source: str) -> tuple[int, ...]:
    default = (2, 3) if n_ports == 3 else (1, 2, 3, 4)
    ports = tuple(default if balanced_ports is None else balanced_ports)
    want = 2 if n_ports == 3 else 4
    if len(ports) != want or len(set(ports)) != want or not all(1 <= p <= n_ports for p in ports):
        example = "2,3" if n_ports == 3 else "1,2,3,4"
        raise MeasurementError(f"{source}: balanced_ports needs {want} different ports of 1..{n_ports}, e.g. {example}",
                               parameter="balanced_ports")
    return ports


def _extract_mixed(sweep: SParameters, z0: float, accuracy: Accuracy, balanced_ports) -> Extraction:
    f, s = sweep.frequency_hz, sweep.s
    ports = _ports(balanced_ports, sweep.n_ports, sweep.source)
    if sweep.n_ports == 3:
        p, q = ports[0] - 1, ports[1] - 1
        u = ({0, 1, 2} - {p, q}).pop()
        bal = three_port_balance(f, s, u, p, q)
        used = np.stack([s[:, p, u], s[:, q, u]])
        validity = balance_validity(bal, used, accuracy)
        return Extraction(sweep.source, "mixed", z0, f, validity, balance=bal)
    p1, n1, p2, n2 = (k - 1 for k in ports)
    bal, mm = four_port_balance(f, s, (p1, n1), (p2, n2))
    used = np.stack([s[:, i, j] for i in (p2, n2) for j in (p1, n1)])
    validity = balance_validity(bal, used, accuracy)
    # The common-mode two-port is a series-through measurement referred to Z0/2.
    scc21 = mm[:, 3, 2]
    zcm = common_mode_series_z(scc21, z0)
    err, err_n = through_error(scc21, accuracy.cal_error, accuracy.noise)
    validity = validity & impedance_validity(zcm, err, err_n, np.abs(scc21) > 1.0, accuracy.max_error)
    curve = ImpedanceCurve(f, np.where(np.isfinite(zcm), zcm, np.nan), validity.valid, label=sweep.source)
    return Extraction(sweep.source, "mixed", z0, f, validity, curve=curve, balance=bal)


def extract_legs(leg_p: SParameters, leg_n: SParameters, *, z0: float | None = None,
                 accuracy: Accuracy = Accuracy()) -> Extraction:
    """Balun figures from two two-port sweeps (S21 to each balanced output in turn).

    Parameters
    ----------
    leg_p : SParameters
        Port 1 on the unbalanced input, port 2 on the positive output, the negative output
        terminated in Z0.
    leg_n : SParameters
        The same with the outputs swapped.
    z0 : float, optional
        Reference impedance [Ω].
    accuracy : Accuracy

    Returns
    -------
    Extraction
        Method ``mixed`` with a ``legs`` :class:`~cmcheck.measurement.balance.Balance`, on leg_p's
        frequencies (leg_n interpolated where the grids differ, with a warning).

    References
    ----------
    Bockelman & Eisenstadt, IEEE T-MTT 43(7), 1995 (see :func:`cmcheck.measurement.balance.legs_balance`).
    """
    for sw in (leg_p, leg_n):
        if sw.n_ports != 2:
            raise TouchstoneError(f"{sw.source}: legs needs two 2-port files; this is a {sw.n_ports}-port file", parameter="legs")
        _check_s21(sw)
    if not np.isclose(leg_p.z0, leg_n.z0) and z0 is None:
        raise MeasurementError(f"{leg_n.source}: reference impedance differs from {leg_p.source}")
    f = leg_p.frequency_hz
    sp = leg_p.param(2, 1)
    if leg_n.frequency_hz.shape == f.shape and np.allclose(leg_n.frequency_hz, f, rtol=1e-9, atol=0):
        sn = leg_n.param(2, 1)
    else:
        sn = _interp_complex(f, leg_n.frequency_hz, leg_n.param(2, 1))
        inside = np.isfinite(sn)
        if inside.sum() < 2:
            raise MeasurementError(f"{leg_n.source}: its frequencies do not overlap those of {leg_p.source}")
        warnings.warn(f"{leg_n.source}: frequencies differ from {leg_p.source}; interpolated onto them "
                      f"({int(inside.sum())} common points)", CmcheckWarning, stacklevel=2)
        f, sp, sn = f[inside], sp[inside], sn[inside]
    bal = legs_balance(f, sp, sn)
    validity = balance_validity(bal, np.stack([sp, sn]), accuracy)
    return Extraction(f"{leg_p.source} + {leg_n.source}", "mixed", float(leg_p.z0 if z0 is None else z0),
                      f, validity, balance=bal)
