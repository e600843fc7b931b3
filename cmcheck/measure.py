"""Impedance from a network-analyser sweep: the three S→Z methods, fixture compensation, validity.

Three ways of measuring an impedance Z with a two-port analyser of reference impedance Z0:

* **series-through** (Z between the two port centre conductors): Z = 2·Z0·(1 − S21)/S21,
  best for 0.5–20 kΩ, which is where chokes live;
* **shunt-through** (Z from the through line to ground): Z = Z0·S21/(2·(1 − S21)), for
  milliohms;
* **reflection** (Z across port 1): Z = Z0·(1 + S11)/(1 − S11), best near Z0.

Each point carries an estimate of its relative error from two instrument figures, the noise
floor and the residual calibration error, and is *valid* when that estimate is within a
tolerance and the point is passive. Everything here is a vectorised function of numpy arrays.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from .balance import Balance, common_mode_series_z, four_port_balance, legs_balance, three_port_balance
from .curve import ImpedanceCurve
from .errors import CmcheckWarning, MeasurementError, TouchstoneError
from .touchstone import SParameters

__all__ = [
    "METHODS",
    "Accuracy",
    "Extraction",
    "Fixture",
    "Validity",
    "extract",
    "extract_legs",
    "open_short_compensation",
    "reflection_error",
    "reflection_z",
    "resolve_method",
    "series_through_z",
    "shunt_through_z",
    "through_error",
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


def through_error(s21, cal_error, noise):
    """Estimated relative error |δZ/Z| of a series- or shunt-through point, and its noise share.

    Parameters
    ----------
    s21 : array_like of complex
        Measured transmission [dimensionless].
    cal_error : float
        Residual relative error of S21 after calibration (tracking) [dimensionless].
    noise : float
        Noise floor as a linear magnitude, 10^(floor_dB/20) [dimensionless].

    Returns
    -------
    total, from_noise : numpy.ndarray
        Relative errors [dimensionless]: ε/|1 − S21| + n/(|S21|·|1 − S21|), and the noise term.

    Notes
    -----
    For both through methods |dZ/Z| = |dS21|/(|S21|·|1 − S21|). A tracking error is relative
    (dS21 = ε·S21) and an additive noise floor is absolute (dS21 = n). So series-through loses
    accuracy at low Z (|1 − S21| → 0, "too small to resolve") and at high Z near the noise
    floor (Zmax ≈ 2·Z0/n); shunt-through the other way round. With ε = 0.01 and a −80 dB floor
    this gives 1.5 % at 5 kΩ series-through.

    References
    ----------
    First-order error propagation through Z = 2·Z0·(1 − S21)/S21 (Pozar, Table 4.2); the
    error-model split into tracking and noise terms follows Keysight, *Impedance Measurement
    Handbook*, 6th ed., 2016, §2.4 (measurement-range charts of the through methods).
    """
    s21 = np.asarray(s21, dtype=complex)
    a = np.abs(s21)
    d = np.abs(1.0 - s21)
    with np.errstate(divide="ignore", invalid="ignore"):
        from_noise = noise / (a * d)
        total = cal_error / d + from_noise
    return np.nan_to_num(total, nan=np.inf), np.nan_to_num(from_noise, nan=np.inf)


def reflection_error(s11, cal_error, noise):
    """Estimated relative error |δZ/Z| of a reflection point, and its noise share.

    Parameters
    ----------
    s11 : array_like of complex
        Measured reflection coefficient [dimensionless].
    cal_error : float
        Residual additive error of S11 after calibration (directivity, source match) [dimensionless].
    noise : float
        Noise floor as a linear magnitude [dimensionless].

    Returns
    -------
    total, from_noise : numpy.ndarray
        2·(ε + n)/|1 − S11²| and 2·n/|1 − S11²| [dimensionless].

    Notes
    -----
    dZ/Z = 2·dΓ/((1 + Γ)(1 − Γ)): smallest at Z = Z0 (2·ε) and growing without bound as Z
    goes to 0 or ∞ ("too far from Z0"). With ε = 0.01 and a 10 % tolerance the useful range is
    about Z0/18 … 18·Z0 for a resistor.

    References
    ----------
    First-order error propagation through Pozar eq. (2.35); Keysight, *Impedance Measurement
    Handbook*, 6th ed., 2016, §2.4: reflection accuracy is best near Z0 and degrades far from it.
    """
    s11 = np.asarray(s11, dtype=complex)
    d = np.abs(1.0 - s11 * s11)
    with np.errstate(divide="ignore"):
        return 2.0 * (cal_error + noise) / d, 2.0 * noise / d


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


@dataclass(frozen=True)
class Accuracy:
    """What the instrument can resolve, and how much error a valid point may carry.

    Parameters
    ----------
    floor_db : float
        Noise floor of transmission and reflection [dB]; −80 dB suits a low-cost analyser
        at a moderate IF bandwidth (common practice, no published source).
    cal_error : float
        Residual error after the user's calibration [dimensionless]: relative for S21,
        additive for S11. 0.01 (−40 dB, ≈0.09 dB / 0.6°) is typical of a low-cost analyser
        (from memory).
    max_error : float
        Largest estimated relative error of Z for a valid point [dimensionless].
    cmrr_error_db : float
        Largest estimated error of a valid CMRR point [dB].
    """

    floor_db: float = -80.0
    cal_error: float = 0.01
    max_error: float = 0.10
    cmrr_error_db: float = 3.0

    def __post_init__(self) -> None:
        if not (np.isfinite(self.floor_db) and self.floor_db < 0):
            raise MeasurementError(f"--floor-db {self.floor_db:g}: the noise floor must be below 0 dB")
        if not (0 <= self.cal_error < 1):
            raise MeasurementError(f"calibration error {self.cal_error:g} must be between 0 and 1")
        if not (0 < self.max_error <= 10):
            raise MeasurementError(f"--max-error {100 * self.max_error:g} % must be above 0")

    @property
    def noise(self) -> float:
        """Noise floor as a linear magnitude [dimensionless]."""
        return 10.0 ** (self.floor_db / 20.0)


@dataclass(frozen=True, eq=False)
class Validity:
    """Why each point can or cannot be trusted.

    Attributes
    ----------
    relative_error : numpy.ndarray
        Estimated relative error of Z (or of |Scs21| for a balun) [dimensionless].
    noise_floor : numpy.ndarray of bool
        Beyond tolerance, mostly because the signal is near the noise floor.
    resolution : numpy.ndarray of bool
        Beyond tolerance, mostly because of the calibration residual: for the through methods
        the change from a plain through is too small to resolve, for reflection Z is too far
        from Z0.
    not_passive : numpy.ndarray of bool
        |S| > 1, or R < 0 by more than the error estimate.
    no_fixture_data : numpy.ndarray of bool
        Outside the frequency range of the open/short fixture measurements.
    """

    relative_error: np.ndarray
    noise_floor: np.ndarray
    resolution: np.ndarray
    not_passive: np.ndarray
    no_fixture_data: np.ndarray = field(default=None)  # type: ignore[assignment]

    def __post_init__(self) -> None:
        if self.no_fixture_data is None:
            object.__setattr__(self, "no_fixture_data", np.zeros(self.noise_floor.shape, bool))

    @property
    def valid(self) -> np.ndarray:
        """Points with none of the problems [bool]."""
        return ~(self.noise_floor | self.resolution | self.not_passive | self.no_fixture_data)

    def excluded(self) -> dict[str, int]:
        """Count of excluded points per reason (a point counts once, under its first reason)."""
        out: dict[str, int] = {}
        taken = np.zeros(self.noise_floor.shape, bool)
        for key, mask in (("not_passive", self.not_passive), ("no_fixture_data", self.no_fixture_data),
                          ("noise_floor", self.noise_floor), ("resolution", self.resolution)):
            n = int(np.count_nonzero(mask & ~taken))
            taken |= mask
            if n:
                out[key] = n
        return out

    def subset(self, mask) -> "Validity":
        """The same record at the points where ``mask`` is True."""
        return Validity(self.relative_error[mask], self.noise_floor[mask], self.resolution[mask],
                        self.not_passive[mask], self.no_fixture_data[mask])

    def __and__(self, other: "Validity") -> "Validity":
        return Validity(np.maximum(self.relative_error, other.relative_error), self.noise_floor | other.noise_floor,
                        self.resolution | other.resolution, self.not_passive | other.not_passive,
                        self.no_fixture_data | other.no_fixture_data)


def _validity(z, err, err_noise, active, tol, no_fixture=None) -> Validity:
    beyond = ~(err <= tol)  # NaN/inf count as beyond
    noisy = beyond & (err_noise >= err - err_noise)
    with np.errstate(invalid="ignore"):
        # A slightly negative R inside the error estimate is noise, not a fault.
        negative_r = np.asarray(z).real < -err * np.abs(z)
    return Validity(err, noisy, beyond & ~noisy, active | negative_r, no_fixture)


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
            raise MeasurementError(f"{open_sweep.source}: --open/--short apply to the series, shunt and reflect methods")
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
        raise MeasurementError(f"--method {method!r}: choose one of {', '.join(METHODS)}")
    if method == "auto":
        return {1: "reflect", 2: "series"}.get(n_ports, "mixed")
    need = {"series": (2,), "shunt": (2,), "reflect": (1, 2), "mixed": (3, 4)}[method]
    if n_ports not in need:
        what = {"series": "a 2-port file", "shunt": "a 2-port file", "reflect": "a 1- or 2-port file",
                "mixed": "a 3- or 4-port file (or --legs with two 2-port files)"}[method]
        raise TouchstoneError(f"{source}: --method {method} needs {what}; this is a {n_ports}-port file")
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
        raise TouchstoneError(f"{sweep.source}: S21 is zero at every point (not measured); use --method reflect")


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
        From :func:`cmcheck.touchstone.read_touchstone`.
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
            raise MeasurementError(f"{sweep.source}: --open/--short apply to the series, shunt and reflect methods")
        return _extract_mixed(sweep, z0, accuracy, balanced_ports)
    if balanced_ports is not None:
        raise MeasurementError(f"{sweep.source}: --balanced-ports applies to 3- and 4-port files only")
    n, eps, tol = accuracy.noise, accuracy.cal_error, accuracy.max_error
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
            import warnings

            warnings.warn(f"{sweep.source}: {int(outside.sum())} points lie outside the fixture sweeps and are "
                          "marked not valid", CmcheckWarning, stacklevel=2)
    validity = _validity(z, err, err_n, active, tol, outside)
    curve = ImpedanceCurve(f, np.where(np.isfinite(z), z, np.nan), validity.valid, label=sweep.source)
    return Extraction(sweep.source, m, z0, f, validity, curve=curve, compensated=fixture is not None)


def _ports(balanced_ports, n_ports: int, source: str) -> tuple[int, ...]:
    default = (2, 3) if n_ports == 3 else (1, 2, 3, 4)
    ports = tuple(default if balanced_ports is None else balanced_ports)
    want = 2 if n_ports == 3 else 4
    if len(ports) != want or len(set(ports)) != want or not all(1 <= p <= n_ports for p in ports):
        example = "2,3" if n_ports == 3 else "1,2,3,4"
        raise MeasurementError(f"{source}: --balanced-ports needs {want} different ports of 1..{n_ports}, e.g. {example}")
    return ports


def _extract_mixed(sweep: SParameters, z0: float, accuracy: Accuracy, balanced_ports) -> Extraction:
    f, s = sweep.frequency_hz, sweep.s
    ports = _ports(balanced_ports, sweep.n_ports, sweep.source)
    if sweep.n_ports == 3:
        p, q = ports[0] - 1, ports[1] - 1
        u = ({0, 1, 2} - {p, q}).pop()
        bal = three_port_balance(f, s, u, p, q)
        used = np.stack([s[:, p, u], s[:, q, u]])
        validity = _balance_validity(bal, used, accuracy)
        return Extraction(sweep.source, "mixed", z0, f, validity, balance=bal)
    p1, n1, p2, n2 = (k - 1 for k in ports)
    bal, mm = four_port_balance(f, s, (p1, n1), (p2, n2))
    used = np.stack([s[:, i, j] for i in (p2, n2) for j in (p1, n1)])
    validity = _balance_validity(bal, used, accuracy)
    # The common-mode two-port is a series-through measurement referred to Z0/2.
    scc21 = mm[:, 3, 2]
    zcm = common_mode_series_z(scc21, z0)
    err, err_n = through_error(scc21, accuracy.cal_error, accuracy.noise)
    validity = validity & _validity(zcm, err, err_n, np.abs(scc21) > 1.0, accuracy.max_error)
    curve = ImpedanceCurve(f, np.where(np.isfinite(zcm), zcm, np.nan), validity.valid, label=sweep.source)
    return Extraction(sweep.source, "mixed", z0, f, validity, curve=curve, balance=bal)


def _balance_validity(bal: Balance, used: np.ndarray, accuracy: Accuracy) -> Validity:
    """Validity of CMRR: the common-mode term must stand out of the legs' residual error and noise.

    A residual relative error ε on each leg leaves up to ε·(|b_p| + |b_n|)/√2 in
    Scs21 = (b_p + b_n)/√2, and noise adds n; the CMRR of a point is trusted while that is
    small against |Scs21| (``Accuracy.cmrr_error_db``).
    """
    n, eps = accuracy.noise, accuracy.cal_error
    c = np.abs(bal.common)
    legs = (np.abs(bal.leg_p) + np.abs(bal.leg_n)) / np.sqrt(2.0)
    with np.errstate(divide="ignore", invalid="ignore"):
        err_n = n / c
        err = eps * legs / c + err_n
    err, err_n = np.nan_to_num(err, nan=np.inf), np.nan_to_num(err_n, nan=np.inf)
    tol = 10.0 ** (accuracy.cmrr_error_db / 20.0) - 1.0
    beyond = ~(err <= tol)
    # Legs near the floor make imbalance and CMRR meaningless whatever Scs21 is.
    with np.errstate(divide="ignore"):
        weak = (n / np.minimum(np.abs(bal.leg_p), np.abs(bal.leg_n))) > accuracy.max_error
    noisy = (beyond & (err_n >= err - err_n)) | weak
    active = np.any(np.abs(used) > 1.0, axis=0)
    return Validity(err, noisy, beyond & ~noisy, active)


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
        Method ``mixed`` with a ``legs`` :class:`~cmcheck.balance.Balance`, on leg_p's
        frequencies (leg_n interpolated where the grids differ, with a warning).

    References
    ----------
    Bockelman & Eisenstadt, IEEE T-MTT 43(7), 1995 (see :func:`cmcheck.balance.legs_balance`).
    """
    for sw in (leg_p, leg_n):
        if sw.n_ports != 2:
            raise TouchstoneError(f"{sw.source}: --legs needs two 2-port files; this is a {sw.n_ports}-port file")
        _check_s21(sw)
    if not np.isclose(leg_p.z0, leg_n.z0) and z0 is None:
        raise MeasurementError(f"{leg_n.source}: reference impedance differs from {leg_p.source}")
    f = leg_p.frequency_hz
    sp = leg_p.param(2, 1)
    if leg_n.frequency_hz.shape == f.shape and np.allclose(leg_n.frequency_hz, f, rtol=1e-9, atol=0):
        sn = leg_n.param(2, 1)
    else:
        import warnings

        sn = _interp_complex(f, leg_n.frequency_hz, leg_n.param(2, 1))
        inside = np.isfinite(sn)
        if inside.sum() < 2:
            raise MeasurementError(f"{leg_n.source}: its frequencies do not overlap those of {leg_p.source}")
        warnings.warn(f"{leg_n.source}: frequencies differ from {leg_p.source}; interpolated onto them "
                      f"({int(inside.sum())} common points)", CmcheckWarning, stacklevel=2)
        f, sp, sn = f[inside], sp[inside], sn[inside]
    bal = legs_balance(f, sp, sn)
    validity = _balance_validity(bal, np.stack([sp, sn]), accuracy)
    return Extraction(f"{leg_p.source} + {leg_n.source}", "mixed", float(leg_p.z0 if z0 is None else z0),
                      f, validity, balance=bal)
