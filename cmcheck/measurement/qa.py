"""Limits, summaries and batch evaluation of measured units (quality checks of a production run).

A summary uses the *valid* points inside the band only and says how many were excluded and
why. A unit passes when every valid in-band point meets the limits, every in-band point the
method cannot resolve meets them even at the low end of its error bound, and the sweep covers
the band. A unit that is neither proven nor disproven fails as "inconclusive". In a batch, a file that cannot be read is reported and the others are still evaluated;
:func:`exit_status` gives 2 if any file was unreadable, else 1 if any failed, else 0.
"""

from __future__ import annotations

import math
import os
import warnings
from dataclasses import dataclass, field
from typing import Callable, Iterable, Sequence

import numpy as np

from ..errors import CmcheckError, CmcheckWarning, MeasurementError
from .methods import Accuracy, Extraction, Fixture, extract, extract_legs
from .touchstone import read_touchstone
from ..units import Band, format_quantity

__all__ = [
    "FileResult",
    "Limits",
    "Summary",
    "evaluate_files",
    "exit_status",
    "model_error",
    "result_to_dict",
    "summarize",
]


@dataclass(frozen=True)
class Limits:
    """Pass/fail limits over a band.

    Parameters
    ----------
    band : Band, optional
        Frequencies the limits apply to [Hz]; the whole sweep when None.
    target_r : float, optional
        Least resistance R over the band [Ω] (a feedline choke's figure of merit).
    target_z : float, optional
        Least impedance magnitude |Z| over the band [Ω].
    target_cmrr_db : float, optional
        Least common-mode rejection over the band [dB] (mixed-mode results).
    """

    band: Band | None = None
    target_r: float | None = None
    target_z: float | None = None
    target_cmrr_db: float | None = None

    def __post_init__(self) -> None:
        for name, v in (("target_r", self.target_r), ("target_z", self.target_z)):
            if v is not None and not (math.isfinite(v) and v > 0):
                raise MeasurementError(f"{name} must be a positive impedance, got {v:g} Ω", parameter=name)
        if self.target_cmrr_db is not None and not math.isfinite(self.target_cmrr_db):
            raise MeasurementError(f"target_cmrr_db must be a finite number of dB, got {self.target_cmrr_db}",
                                   parameter="target_cmrr_db")

    @property
    def any(self) -> bool:
        """Whether any limit is set."""
        return any(v is not None for v in (self.target_r, self.target_z, self.target_cmrr_db))


@dataclass(frozen=True)
class Summary:
    """Figures of one measurement over the band (valid points only).

    ``passed`` is None when no limit was given; ``verdict`` says why a unit failed.
    Frequencies in Hz, impedances in Ω, CMRR and imbalance in dB, phase in degrees;
    a figure is None when there is nothing to compute it from.
    """

    band_hz: tuple[tuple[float, float], ...]
    points_total: int
    points_in_band: int
    points_valid: int
    excluded: dict = field(default_factory=dict)
    min_resistance_ohm: float | None = None
    min_resistance_hz: float | None = None
    min_impedance_ohm: float | None = None
    min_impedance_hz: float | None = None
    min_cmrr_db: float | None = None
    min_cmrr_hz: float | None = None
    max_amplitude_imbalance_db: float | None = None
    max_phase_imbalance_deg: float | None = None
    passed: bool | None = None
    verdict: str = ""

    def to_dict(self) -> dict:
        """JSON-ready, with the key ``pass``."""
        d = {
            "min_resistance_ohm": self.min_resistance_ohm,
            "min_resistance_hz": self.min_resistance_hz,
            "min_impedance_ohm": self.min_impedance_ohm,
            "min_impedance_hz": self.min_impedance_hz,
            "points_valid": self.points_valid,
            "points_in_band": self.points_in_band,
            "points_total": self.points_total,
            "points_excluded": self.excluded,
            "band_hz": [list(s) for s in self.band_hz],
            "pass": self.passed,
        }
        if self.min_cmrr_db is not None or self.max_amplitude_imbalance_db is not None:
            d.update(min_cmrr_db=self.min_cmrr_db, min_cmrr_hz=self.min_cmrr_hz,
                     max_amplitude_imbalance_db=self.max_amplitude_imbalance_db,
                     max_phase_imbalance_deg=self.max_phase_imbalance_deg)
        if self.verdict:
            d["verdict"] = self.verdict
        return d


def _argmin(values: np.ndarray, f: np.ndarray) -> tuple[float | None, float | None]:
    # −inf is a real minimum (a CMRR with no differential transmission at all); NaN is not.
    ok = ~np.isnan(values)
    if not ok.any():
        return None, None
    i = int(np.argmin(np.where(ok, values, np.inf)))
    return float(values[i]), float(f[i])


def summarize(ex: Extraction, limits: Limits = Limits()) -> Summary:
    """Summary of an extraction over ``limits.band`` and the pass/fail verdict.

    Parameters
    ----------
    ex : Extraction
    limits : Limits

    Returns
    -------
    Summary
    """
    f = ex.frequency_hz
    band = limits.band
    in_band = band.contains(f) if band is not None else np.ones(f.shape, bool)
    segments = band.segments if band is not None else ((float(f[0]), float(f[-1])),)
    ok = in_band & ex.valid
    fv = f[ok]
    out: dict = {}
    if ex.curve is not None:
        z = ex.curve.z[ok]
        out["min_resistance_ohm"], out["min_resistance_hz"] = _argmin(z.real, fv)
        out["min_impedance_ohm"], out["min_impedance_hz"] = _argmin(np.abs(z), fv)
    if ex.balance is not None:
        b = ex.balance.subset(ok)
        out["min_cmrr_db"], out["min_cmrr_hz"] = _argmin(b.cmrr_db, fv)
        amp, ph = np.abs(b.amplitude_imbalance_db), np.abs(b.phase_imbalance_deg)
        out["max_amplitude_imbalance_db"] = float(np.max(amp)) if amp.size else None
        out["max_phase_imbalance_deg"] = float(np.max(ph)) if ph.size else None
    passed, verdict = None, ""
    n_in = int(in_band.sum())
    if n_in and not ok.any() and not limits.any:
        # Figures from no trusted point would be read as a result; without a limit no verdict says
        # so (with one, the verdict judges such points by their error bounds).
        reasons = ", ".join(f"{k.replace('_', ' ')} {n}" for k, n in ex.validity.subset(in_band).excluded().items())
        warnings.warn(CmcheckWarning(f"{ex.source}: no valid point in the band: all {n_in} in-band point(s) excluded "
                                     f"({reasons}); none of its figures can be trusted"), stacklevel=2)
    if limits.any:
        passed, verdict = _verdict(ex, limits, out, int(ok.sum()), f, in_band & ~ex.valid)
    return Summary(
        band_hz=tuple(segments), points_total=int(f.size), points_in_band=int(in_band.sum()),
        points_valid=int(ok.sum()), excluded=ex.validity.subset(in_band).excluded(),
        passed=passed, verdict=verdict, **out,
    )


def _verdict(ex: Extraction, limits: Limits, out: dict, n_valid: int, f: np.ndarray,
             unresolved: np.ndarray) -> tuple[bool, str]:
    fails = []
    band = limits.band
    # An edge within one sweep step of the band edge covers it (sweeps rarely hit round numbers).
    if band is not None and (f[0] > band.low + (f[1] - f[0]) or f[-1] < band.high - (f[-1] - f[-2])):
        fails.append(f"the sweep ({format_quantity(f[0], 'Hz')}–{format_quantity(f[-1], 'Hz')}) does not cover the band")
    if n_valid == 0 and not unresolved.any():
        fails.append("no point in the band")
    wants_z = limits.target_r is not None or limits.target_z is not None
    if wants_z and ex.curve is None:
        fails.append("no impedance from this measurement for an R or |Z| target")
    if limits.target_cmrr_db is not None and ex.balance is None:
        fails.append("no CMRR from this measurement for a CMRR target")
    checks = (("target_r", "min_resistance_ohm", "R", "Ω"), ("target_z", "min_impedance_ohm", "|Z|", "Ω"),
              ("target_cmrr_db", "min_cmrr_db", "CMRR", "dB"))
    for attr, key, what, unit in checks:
        target = getattr(limits, attr)
        value = out.get(key)
        if target is not None and value is not None and value < target:
            fails.append(f"{what} {value:.4g} {unit} < {target:.4g} {unit}")
    if unresolved.any():
        fails += _unresolved_verdicts(ex, limits, f, unresolved)
    return (not fails), "; ".join(fails)


def _bounds(ex: Extraction, attr: str) -> tuple[np.ndarray, np.ndarray, np.ndarray, str, str] | None:
    """Measured value and its error bounds per point for one kind of limit, or None."""
    e = ex.validity.relative_error
    if attr in ("target_r", "target_z") and ex.curve is not None:
        z = ex.curve.z
        value = z.real if attr == "target_r" else np.abs(z)
        spread = e * np.abs(z)  # |δZ| ≤ e·|Z| bounds both R and |Z|
        return value, value - spread, value + spread, ("R" if attr == "target_r" else "|Z|"), "Ω"
    if attr == "target_cmrr_db" and ex.balance is not None:
        value = ex.balance.cmrr_db
        # CMRR = 20·log10|Sds21/Scs21|; a relative error e of |Scs21| moves it by −20·log10(1 ± e).
        with np.errstate(divide="ignore", invalid="ignore"):
            lo = value - 20.0 * np.log10(1.0 + e)
            hi = np.where(e < 1.0, value - 20.0 * np.log10(np.clip(1.0 - e, 1e-300, None)), np.inf)
        return value, lo, hi, "CMRR", "dB"
    return None


def _unresolved_verdicts(ex: Extraction, limits: Limits, f: np.ndarray, unresolved: np.ndarray) -> list[str]:
    """Judge points the method cannot resolve by their error bounds, not by their reading.

    Such a point proves the target when even its lower bound meets it, disproves it when even
    its upper bound misses it, and otherwise leaves the unit unproven: QA passes on evidence.
    Points that break passivity or lie outside the fixture data have no usable bound.
    """
    v = ex.validity
    no_bound = v.not_passive | v.no_fixture_data
    fails = []
    for attr in ("target_r", "target_z", "target_cmrr_db"):
        target = getattr(limits, attr)
        b = _bounds(ex, attr) if target is not None else None
        if b is None:
            continue
        value, lo, hi, what, unit = b
        with np.errstate(invalid="ignore"):
            below = unresolved & ~no_bound & (hi < target)
            unproven = unresolved & ~below & ~(~no_bound & (lo >= target))
        if below.any():
            i = int(np.flatnonzero(below)[np.argmin(value[below])])
            fails.append(f"{what} below the target at {int(below.sum())} in-band point(s) even allowing for their "
                         f"error (e.g. {value[i]:.4g} {unit} at {format_quantity(f[i], 'Hz')})")
        if unproven.any():
            i = int(np.flatnonzero(unproven)[0])
            fails.append(f"inconclusive: {int(unproven.sum())} in-band point(s) cannot be resolved well enough to "
                         f"prove {what} ≥ {target:.4g} {unit} (e.g. {value[i]:.4g} {unit} at "
                         f"{format_quantity(f[i], 'Hz')}); remeasure them with a method or instrument setting that can")
    return fails


def model_error(ex: Extraction, model_z, band: Band | None = None) -> dict:
    """How far the measurement is from a model over the band (valid points only).

    Parameters
    ----------
    ex : Extraction
        A measurement with an impedance curve.
    model_z : array_like of complex
        Model impedance at ``ex.frequency_hz`` [Ω].
    band : Band, optional
        Where to compare; the whole sweep when None.

    Returns
    -------
    dict
        ``points_compared``; ``impedance_error_pct`` summary (median and worst of
        100·(|Zmeas| − |Zmodel|)/|Zmodel|, with the worst point's frequency); the median and
        worst complex error 100·|Zmeas − Zmodel|/|Zmodel|; the model's ``resistance_ohm``,
        ``reactance_ohm`` and ``impedance_ohm`` at every measured frequency.
    """
    if ex.curve is None:
        raise MeasurementError(f"{ex.source}: a comparison with a model needs an impedance (series, shunt, reflect or a 4-port)")
    zm = np.asarray(model_z, dtype=complex)
    f = ex.frequency_hz
    sel = ex.valid & (band.contains(f) if band is not None else True) & np.isfinite(zm)
    z = ex.curve.z
    with np.errstate(divide="ignore", invalid="ignore"):
        mag_err = 100.0 * (np.abs(z) - np.abs(zm)) / np.abs(zm)
        cplx_err = 100.0 * np.abs(z - zm) / np.abs(zm)
    out = {"points_compared": int(sel.sum()), "resistance_ohm": zm.real, "reactance_ohm": zm.imag,
           "impedance_ohm": np.abs(zm)}
    if sel.any():
        e = mag_err[sel]
        i = int(np.argmax(np.abs(e)))
        out.update(
            impedance_error_median_pct=float(np.median(e)),
            impedance_error_worst_pct=float(e[i]),
            impedance_error_worst_hz=float(f[sel][i]),
            complex_error_median_pct=float(np.median(cplx_err[sel])),
            complex_error_worst_pct=float(np.max(cplx_err[sel])),
        )
    return out


@dataclass(frozen=True, eq=False)
class FileResult:
    """One file of a batch: its extraction and summary, or the error that stopped it."""

    path: str
    extraction: Extraction | None = None
    summary: Summary | None = None
    error: str | None = None
    #: The parameter the error is about (:attr:`cmcheck.errors.CmcheckError.parameter`).
    error_parameter: str | tuple[str, ...] | None = None


def evaluate_files(
    paths: Sequence[str | os.PathLike],
    *,
    method: str = "auto",
    z0: float | None = None,
    accuracy: Accuracy = Accuracy(),
    fixture: Fixture | None = None,
    balanced_ports: tuple[int, ...] | None = None,
    limits: Limits = Limits(),
    legs: tuple[str | os.PathLike, str | os.PathLike] | None = None,
    on_done: Callable[[FileResult], None] | None = None,
) -> list[FileResult]:
    """Read, extract and summarise each file; an unreadable file does not stop the others.

    Parameters
    ----------
    paths : sequence of path-like
        Touchstone files, one unit each.
    method, z0, accuracy, fixture, balanced_ports
        As for :func:`cmcheck.measurement.methods.extract`.
    limits : Limits
    legs : (path, path), optional
        Two two-port sweeps of one balun (see :func:`cmcheck.measurement.methods.extract_legs`),
        evaluated as one more result.
    on_done : callable, optional
        Called with each :class:`FileResult` as it is finished (progress display).

    Returns
    -------
    list of FileResult
        In the order given, the legs result last.
    """
    results = []
    for p in paths:
        try:
            sweep = read_touchstone(p, z0=z0)
            ex = extract(sweep, method, z0=z0, accuracy=accuracy, fixture=fixture, balanced_ports=balanced_ports)
            r = FileResult(str(p), ex, summarize(ex, limits))
        except CmcheckError as exc:
            r = FileResult(str(p), error=str(exc), error_parameter=exc.parameter)
        results.append(r)
        if on_done is not None:
            on_done(r)
    if legs is not None:
        name = f"{legs[0]} + {legs[1]}"
        try:
            a, b = (read_touchstone(x, z0=z0) for x in legs)
            ex = extract_legs(a, b, z0=z0, accuracy=accuracy)
            r = FileResult(name, ex, summarize(ex, limits))
        except CmcheckError as exc:
            r = FileResult(name, error=str(exc), error_parameter=exc.parameter)
        results.append(r)
        if on_done is not None:
            on_done(r)
    return results


def exit_status(results: Iterable[FileResult]) -> int:
    """2 if any file was unreadable, else 1 if any failed a limit, else 0."""
    results = list(results)
    if any(r.error for r in results):
        return 2
    if any(r.summary is not None and r.summary.passed is False for r in results):
        return 1
    return 0


def result_to_dict(r: FileResult) -> dict:
    """One entry of a JSON document's ``results`` list, with the project's standard keys."""
    if r.error is not None:
        return {"file": r.path, "error": r.error}
    ex = r.extraction
    d: dict = {"file": r.path, "method": ex.method, "z0_ohm": ex.z0, "frequency_hz": ex.frequency_hz}
    if ex.curve is not None:
        d.update(resistance_ohm=ex.curve.resistance, reactance_ohm=ex.curve.reactance,
                 impedance_ohm=ex.curve.magnitude)
    else:
        # A three-port balun or two legs give no impedance: keys kept, values null.
        d.update(resistance_ohm=None, reactance_ohm=None, impedance_ohm=None)
    d["valid"] = ex.valid
    if ex.balance is not None:
        b = ex.balance
        d.update(balance=b.kind, cmrr_db=b.cmrr_db, amplitude_imbalance_db=b.amplitude_imbalance_db,
                 phase_imbalance_deg=b.phase_imbalance_deg)
    if ex.compensated:
        d["compensated"] = True
    d["summary"] = r.summary.to_dict()
    return d
