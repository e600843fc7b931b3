"""How far a measured point can be trusted: error estimates and validity masks.

Each point of a sweep gets an estimate of its relative error from two instrument figures —
the noise floor (an absolute error of the S-parameter) and the residual error after the
user's calibration — propagated to first order through the method's S→Z relation. A point is
*valid* when that estimate is within a tolerance and the point is passive. Everything here
is a vectorised function of numpy arrays.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from .balance import Balance
from ..errors import MeasurementError

__all__ = ["Accuracy", "Validity", "balance_validity", "check_standard_residual", "impedance_validity",
           "reflection_error", "through_error"]


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
            raise MeasurementError(f"floor_db must be below 0 dB (the noise floor), got {self.floor_db:g} dB", parameter="floor_db")
        if not (0 <= self.cal_error < 1):
            raise MeasurementError(f"cal_error must be from 0 to below 1 (a fraction of S), got {self.cal_error:g}", parameter="cal_error")
        if not (0 < self.max_error <= 10):
            raise MeasurementError(f"max_error must be above 0 and at most 10 (a fraction), got {self.max_error:g}", parameter="max_error")

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


def impedance_validity(z, err, err_noise, active, tol, no_fixture=None) -> Validity:
    """Validity of impedance points from their error estimates.

    Parameters
    ----------
    z : array_like of complex
        Extracted impedance [Ω].
    err, err_noise : array_like
        Estimated relative error of Z and its noise share [dimensionless]
        (from :func:`through_error` or :func:`reflection_error`).
    active : array_like of bool
        Points whose S-parameter magnitude exceeds 1.
    tol : float
        Largest relative error of a valid point [dimensionless].
    no_fixture : array_like of bool, optional
        Points the fixture compensation could not reach.

    Returns
    -------
    Validity
        Beyond tolerance is put down to the noise floor when the noise share is the larger
        half, else to resolution; R < −err·|Z| (negative beyond the error) is not passive.

    References
    ----------
    Passivity of a one-port, Re Z ≥ 0 ⇔ |Γ| ≤ 1: D. M. Pozar, *Microwave Engineering*,
    4th ed., 2012, §2.3 and §4.3.
    """
    beyond = ~(err <= tol)  # NaN/inf count as beyond
    noisy = beyond & (err_noise >= err - err_noise)
    with np.errstate(invalid="ignore"):
        # A slightly negative R inside the error estimate is noise, not a fault.
        negative_r = np.asarray(z).real < -err * np.abs(z)
    return Validity(err, noisy, beyond & ~noisy, active | negative_r, no_fixture)


def balance_validity(bal: Balance, used: np.ndarray, accuracy: Accuracy) -> Validity:
    """Validity of CMRR: the common-mode term must stand out of the legs' residual error and noise.

    Parameters
    ----------
    bal : Balance
        Mixed-mode figures.
    used : numpy.ndarray of complex
        The single-ended S-parameters they came from, shape (K, F) [dimensionless].
    accuracy : Accuracy

    Returns
    -------
    Validity
        ``relative_error`` is that of |Scs21|.

    Notes
    -----
    A residual relative error ε on each leg leaves up to ε·(|b_p| + |b_n|)/√2 in
    Scs21 = (b_p + b_n)/√2 and noise adds n; a point is trusted while that moves the CMRR by
    less than ``Accuracy.cmrr_error_db``: for equal legs the error is ε·|Sds21/Scs21|, so with
    ε = 0.01 and 3 dB a CMRR above about 32 dB is not told apart from the calibration residual.

    References
    ----------
    First-order error propagation through Scs21 = (S21 + S31)/√2 of Bockelman & Eisenstadt,
    IEEE T-MTT 43(7), 1995.
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


#: The share of a check standard's points the residual must cover (the worst 5 % are taken as
#: outliers: a glitch or a connector touched mid-sweep).
CHECK_STANDARD_QUANTILE = 0.95


def check_standard_residual(sweep) -> tuple[float, str]:
    """Residual calibration error seen on a check standard measured after calibration.

    Parameters
    ----------
    sweep : cmcheck.measurement.touchstone.SParameters
        A two-port *through* (ideal S21 = 1, S11 = S22 = 0) or a one-port *matched load* of the
        reference impedance (ideal S11 = 0), measured right after calibrating.

    Returns
    -------
    (float, str)
        The residual [dimensionless]: the 95th percentile over the sweep of the worst deviation
        from the ideal per point (|S21 − 1| and |S11|, |S22| where measured); and a one-line
        account of what was found.

    Raises
    ------
    MeasurementError
        When the file is not such a standard (more than two ports, no S21 in a two-port) or its
        residual is 50 % or more (not a through or a load at all).

    References
    ----------
    Keysight, *Impedance Measurement Handbook*, 6th ed., 2016, §4.2 (verifying a calibration
    on a known standard). The 95th percentile is common practice, no published source.
    """
    src = sweep.source
    if sweep.n_ports == 1:
        dev = np.abs(sweep.param(1, 1))
        what = "matched load: |S11|"
    elif sweep.n_ports == 2:
        if sweep.is_placeholder(2, 1):
            raise MeasurementError(f"{src}: a check standard of two ports must be a through with S21 measured",
                                   parameter="check_standard")
        parts = [np.abs(sweep.param(2, 1) - 1.0)]
        names = ["|S21 − 1|"]
        for i in (1, 2):
            if not sweep.is_placeholder(i, i):
                parts.append(np.abs(sweep.param(i, i)))
                names.append(f"|S{i}{i}|")
        dev = np.max(np.vstack(parts), axis=0)
        what = "through: " + ", ".join(names)
    else:
        raise MeasurementError(f"{src}: a check standard is a one-port load or a two-port through, "
                               f"not a {sweep.n_ports}-port file", parameter="check_standard")
    residual = float(np.quantile(dev, CHECK_STANDARD_QUANTILE))
    if not residual < 0.5:
        raise MeasurementError(f"{src}: deviates from an ideal {what.split(':')[0]} by {residual:.2g} "
                               f"(95 % of points); that is no calibrated standard", parameter="check_standard")
    worst = int(np.argmax(dev))
    text = (f"calibration residual from the check standard {src} ({what}): {residual * 100:.2g} % "
            f"(95 % of {dev.size} points; worst {dev[worst] * 100:.2g} % at {sweep.frequency_hz[worst]:.4g} Hz)")
    return residual, text
