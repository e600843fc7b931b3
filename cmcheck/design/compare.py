"""Comparing materials on one core and winding, and the worst-case common-mode current
reduction a choke guarantees when the line's own common-mode impedance is unknown.

A choke sits in series with the line's common-mode impedance Zline, so the current falls by
|Zline + Zchoke|/|Zline|. Zline depends on the antenna, the feedline length and its routing
and is rarely known; what can be stated is a region it lies in (R ≤ Rmax, |X| ≤ Xmax). The
guaranteed reduction is the minimum of that ratio over the region, found here exactly.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from ..model.choke import ChokeDesign, Prediction, predict
from ..model.cores import FactorCore, RingCore
from ..curve import ImpedanceCurve
from ..errors import DesignError
from ..units import Band
from ..model.winding import Winding


__all__ = [
    "DEFAULT_LINE_R_MAX",
    "DEFAULT_LINE_X_MAX",
    "Comparison",
    "MaterialScore",
    "compare_designs",
    "compare_materials",
    "current_ratio",
    "worst_case_reduction",
]

#: Default bounds of the line's unknown common-mode impedance [Ω]. A feedline's outside,
#: seen from the feed point, is a lossy line of unknown length: its resistance is usually
#: tens of ohms and its reactance anywhere within about ±1 kΩ away from its own resonances.
#: Common practice, no published source.
DEFAULT_LINE_R_MAX = 100.0  # common practice, no published source
DEFAULT_LINE_X_MAX = 1000.0  # common practice, no published source


def current_ratio(z_line, z_choke):
    """Factor by which a choke divides the common-mode current: |Zline + Zchoke|/|Zline|.

    Parameters
    ----------
    z_line : array_like of complex
        The line's own common-mode impedance [Ω].
    z_choke : array_like of complex
        The choke's impedance [Ω], broadcastable against ``z_line``.

    Returns
    -------
    numpy.ndarray
        The ratio [dimensionless]; below 1 the choke *raises* the current.

    References
    ----------
    Series circuit driven by a fixed common-mode source: I = V/(Zline + Zchoke) against
    V/Zline (Kirchhoff's voltage law); stated for feedline chokes in the project's DESIGN.md §4.
    """
    zl = np.asarray(z_line, dtype=complex)
    with np.errstate(all="ignore"):
        return np.abs(zl + np.asarray(z_choke, dtype=complex)) / np.abs(zl)


def _edge_minimum(p0, u, length, zc):
    """Minimum of |Zl + Zc|²/|Zl|² on the segment Zl = p0 + t·u, 0 ≤ t ≤ length (|u| = 1).

    Measured along the line from the foot of the perpendicular from Zl = 0 (s = t − t0), the
    denominator is s² + g² and the numerator (s − δ)² + h², with g and h the signed distances
    of 0 and −Zc from the line and δ the offset of −Zc's foot. The ratio is stationary where
    δ·s² + (g² − h² − δ²)·s − δ·g² = 0 (the cubic terms cancel). Working with δ and h taken
    directly from Zc keeps this well conditioned even when |Zc| is many orders below the
    region. The minimum is at a real root inside the segment or at an end; evaluating clipped
    roots as well is harmless, since a clipped point still lies on the segment.
    """
    ub = np.conj(u)
    t0 = -(p0 * ub).real
    g = (p0 * ub).imag
    w = zc * ub
    delta = -w.real
    h = g + w.imag
    qa = delta
    qb = g * g - h * h - delta * delta
    qc = -delta * g * g
    with np.errstate(all="ignore"):
        # Numerically stable roots: q = −(b + sign(b)·√disc)/2, roots q/a and c/q.
        sq = np.sqrt(np.maximum(qb * qb - 4.0 * qa * qc, 0.0))
        q = -0.5 * (qb + np.where(qb >= 0, sq, -sq))
        roots = (q / qa, qc / q)
    lo, hi = -t0, length - t0
    candidates = [np.full(np.shape(w), lo), np.full(np.shape(w), hi)]
    for r in roots:
        candidates.append(np.clip(np.nan_to_num(r, nan=lo, posinf=hi, neginf=lo), lo, hi))
    best = np.full(np.shape(w), np.inf)
    best_s = np.full(np.shape(w), lo)
    for sv in candidates:
        num = (sv - delta) ** 2 + h * h
        den = sv * sv + g * g
        with np.errstate(all="ignore"):
            val = np.where(den > 0, num / den, np.inf)
        better = val < best
        best = np.where(better, val, best)
        best_s = np.where(better, sv, best_s)
    # The foot of the perpendicular is j·g·u exactly; adding s there keeps tiny Zl accurate.
    return best, (1j * g + best_s) * u


def worst_case_reduction(z_choke, r_max=DEFAULT_LINE_R_MAX, x_max=DEFAULT_LINE_X_MAX, *, return_line=False):
    """Guaranteed common-mode current reduction over an unknown line impedance, in dB.

    min over 0 ≤ R ≤ Rmax, |X| ≤ Xmax of 20·log10(|Zline + Zchoke|/|Zline|), Zline = R + jX.

    The minimum is exact. log|Zl + Zc| − log|Zl| is harmonic in Zl except at Zl = 0 (where the
    ratio is infinite, a maximum) and Zl = −Zc (where it is 0); by the minimum principle it
    has no interior minimum elsewhere, so the minimum lies on the rectangle's boundary (or is
    0 when −Zc is inside the region). On each side the squared ratio is a quotient of two
    quadratics whose stationary points solve a quadratic equation; the sides' ends and those
    roots are all evaluated.

    Parameters
    ----------
    z_choke : array_like of complex
        Choke impedance [Ω], any shape (e.g. frequencies, or materials × frequencies).
    r_max : float
        Largest line resistance [Ω], ≥ 0.
    x_max : float
        Largest line reactance magnitude [Ω], ≥ 0.
    return_line : bool
        Also return the worst line impedance [Ω] for each entry.

    Returns
    -------
    numpy.ndarray or float
        Reduction [dB]; negative when the choke can make the current larger; −inf when it
        can cancel the line's impedance exactly.
    numpy.ndarray of complex, optional
        The worst Zline [Ω] (with ``return_line``).

    Raises
    ------
    DesignError
        When a bound is negative or both are zero.

    References
    ----------
    Minimum principle for harmonic functions (e.g. L. V. Ahlfors, *Complex Analysis*, 3rd ed.,
    McGraw-Hill 1979, ch. 4 §6.2) applied to log|1 + Zc/Zl|; the closed form for a purely
    resistive choke, √(1 + Rc²/Xmax²) at Zline = ±jXmax (14.15 dB for 5 kΩ and Xmax = 1 kΩ), is
    worked in the project's DESIGN.md §4.
    """
    if not (math.isfinite(r_max) and r_max >= 0):
        raise DesignError(f"line_r_max must be ≥ 0 Ω, got {r_max:g} Ω", parameter="line_r_max")
    if not (math.isfinite(x_max) and x_max >= 0):
        raise DesignError(f"line_x_max must be ≥ 0 Ω, got {x_max:g} Ω", parameter="line_x_max")
    if r_max == 0 and x_max == 0:
        raise DesignError("line_r_max and line_x_max cannot both be 0 Ω: the line impedance region is empty",
                          parameter=("line_r_max", "line_x_max"))
    zc = np.asarray(z_choke, dtype=complex)
    edges = (
        (complex(0.0, -x_max), 1j, 2.0 * x_max),  # R = 0
        (complex(r_max, -x_max), 1j, 2.0 * x_max),  # R = Rmax
        (complex(0.0, -x_max), 1.0 + 0j, r_max),  # X = −Xmax
        (complex(0.0, x_max), 1.0 + 0j, r_max),  # X = +Xmax
    )
    best = np.full(zc.shape, np.inf)
    worst_line = np.zeros(zc.shape, complex)
    for p0, u, length in edges:
        val, zl = _edge_minimum(p0, u, length, zc)
        better = val < best
        best = np.where(better, val, best)
        worst_line = np.where(better, zl, worst_line)
    # −Zc inside the closed region (a lossless or non-passive choke) cancels the line; Zc = 0
    # changes nothing (ratio 1), which the edges already give.
    inside = (-zc.real >= 0) & (-zc.real <= r_max) & (np.abs(zc.imag) <= x_max) & (zc != 0)
    best = np.where(inside, 0.0, best)
    worst_line = np.where(inside, -zc, worst_line)
    with np.errstate(divide="ignore"):
        db = 10.0 * np.log10(best)
    db = float(db) if db.ndim == 0 else db
    if return_line:
        return db, (complex(worst_line) if np.ndim(worst_line) == 0 else worst_line)
    return db


@dataclass(frozen=True, eq=False)
class MaterialScore:
    """How one material performs on the compared core and winding.

    Attributes
    ----------
    name : str
    prediction : Prediction
        The full prediction over the band (same model as ``cmcheck predict``).
    min_resistance_ohm, min_resistance_hz : float
        Lowest R in the band [Ω] and where [Hz].
    mean_resistance_ohm : float
        Mean R over the band, weighted evenly in log-frequency [Ω].
    peak_resistance_ohm, peak_resistance_hz : float
        Highest R and where [Hz], searched from a tenth of the band's low edge to ten times
        its high edge (within a tabulated material's range).
    resistive_fraction : float
        Fraction of the band (log-frequency) where R > |X|.
    worst_case_reduction_db : float
        Guaranteed current reduction over the band and the line-impedance region [dB].
    worst_case_hz : float
        Frequency of that worst case [Hz].
    worst_case_line_ohm : complex
        The line impedance that gives it [Ω].
    """

    name: str
    prediction: Prediction
    min_resistance_ohm: float
    min_resistance_hz: float
    mean_resistance_ohm: float
    peak_resistance_ohm: float
    peak_resistance_hz: float
    resistive_fraction: float
    worst_case_reduction_db: float
    worst_case_hz: float
    worst_case_line_ohm: complex

    def to_dict(self) -> dict:
        return {
            "name": self.name,
            "min_resistance_ohm": self.min_resistance_ohm,
            "min_resistance_hz": self.min_resistance_hz,
            "mean_resistance_ohm": self.mean_resistance_ohm,
            "peak_resistance_ohm": self.peak_resistance_ohm,
            "peak_resistance_hz": self.peak_resistance_hz,
            "peak_in_band": bool(self.prediction.band.contains(self.peak_resistance_hz)),
            "resistive_fraction": self.resistive_fraction,
            "worst_case_reduction_db": self.worst_case_reduction_db,
            "worst_case_hz": self.worst_case_hz,
            "worst_case_line_ohm": {"re": self.worst_case_line_ohm.real, "im": self.worst_case_line_ohm.imag},
            "self_resonance_hz": self.prediction.summary["self_resonance_hz"],
            "low_frequency_inductance_h": self.prediction.summary["low_frequency_inductance_h"],
            "design": {"description": self.prediction.design.describe(), **self.prediction.design.to_dict()},
        }


@dataclass(frozen=True, eq=False)
class Comparison:
    """Result of :func:`compare_materials`: scores ranked best first, and the settings."""

    scores: tuple[MaterialScore, ...]
    band: Band
    line_r_max: float
    line_x_max: float
    ranking: str = "worst-case current reduction, then minimum R"

    def to_dict(self) -> dict:
        design = self.scores[0].prediction.design.to_dict() if self.scores else {}
        for k in ("material", "l0_h", "low_frequency_inductance_h"):
            design.pop(k, None)
        return {
            "materials": [s.to_dict() for s in self.scores],
            "band_hz": [list(s) for s in self.band.segments],
            "line_r_max_ohm": self.line_r_max,
            "line_x_max_ohm": self.line_x_max,
            "ranking": self.ranking,
            "design": design,
        }


def _log_mean(f, values, band: Band) -> float:
    """Mean of ``values`` over the band's segments, evenly weighted in log-frequency."""
    from scipy.integrate import trapezoid as _trapezoid  # kept off the CLI start-up path

    lf = np.log(f)
    area = total = 0.0
    for lo, hi in band.segments:
        m = Band.single(lo, hi).contains(f)
        if m.sum() < 2:
            continue
        area += _trapezoid(values[m], lf[m])
        total += lf[m][-1] - lf[m][0]
    return float(area / total) if total > 0 else float(np.mean(values[band.contains(f)]))


def compare_materials(
    materials, core: RingCore | FactorCore, winding: Winding, band: Band, *,
    points: int = 201, line_r_max: float = DEFAULT_LINE_R_MAX, line_x_max: float = DEFAULT_LINE_X_MAX,
) -> Comparison:
    """Score several materials on the same core and winding over a band.

    Parameters
    ----------
    materials : sequence of Material
        At least one; names must differ.
    core : RingCore or FactorCore
    winding : Winding
    band : Band
        Frequencies of interest [Hz].
    points : int
        Log-spaced grid points over the band (edges included), as in :func:`cmcheck.model.choke.predict`.
    line_r_max, line_x_max : float
        Bounds of the line's unknown common-mode impedance [Ω].

    Returns
    -------
    Comparison
        Ranked by worst-case reduction, then by minimum R.

    References
    ----------
    Choke model as :func:`cmcheck.model.choke.predict`; worst case per :func:`worst_case_reduction`.
    """
    return compare_designs([ChokeDesign(core, m, winding) for m in materials], band, points=points,
                           line_r_max=line_r_max, line_x_max=line_x_max)


def compare_designs(
    designs, band: Band, *,
    points: int = 201, line_r_max: float = DEFAULT_LINE_R_MAX, line_x_max: float = DEFAULT_LINE_X_MAX,
) -> Comparison:
    """Score several designs, one per material, over a band (see :func:`compare_materials`).

    Parameters
    ----------
    designs : sequence of ChokeDesign
        At least one; their material names must differ (a score is named by its material).
    band, points, line_r_max, line_x_max
        As for :func:`compare_materials`.

    References
    ----------
    Choke model as :func:`cmcheck.model.choke.predict`; worst case per :func:`worst_case_reduction`.
    """
    designs = list(designs)
    if not designs:
        raise DesignError("materials: name at least one material", parameter="materials")
    names = [d.material.name for d in designs]
    dup = sorted({n for n in names if names.count(n) > 1})
    if dup:
        raise DesignError(f"materials: {', '.join(dup)} given more than once", parameter="materials")
    # Validate the region before any work.
    worst_case_reduction(0j + 1.0, line_r_max, line_x_max)
    scores = []
    for design in designs:
        mat = design.material
        pred = predict(design, band, points)
        f = pred.curve.frequency_hz
        inside = band.contains(f)
        z_in = pred.curve.z[inside]
        db, zl = worst_case_reduction(z_in, line_r_max, line_x_max, return_line=True)
        i_w = int(np.argmin(db))
        lo, hi = pred.summary["self_resonance_searched_hz"]
        fw = np.unique(np.concatenate([np.geomspace(lo, hi, 1000), f[inside]]))
        rw = design.impedance(fw).real
        i_pk = int(np.argmax(rw))
        scores.append(
            MaterialScore(
                name=mat.name,
                prediction=pred,
                min_resistance_ohm=pred.summary["min_resistance_ohm"],
                min_resistance_hz=pred.summary["min_resistance_hz"],
                mean_resistance_ohm=_log_mean(f, pred.curve.resistance, band),
                peak_resistance_ohm=float(rw[i_pk]),
                peak_resistance_hz=float(fw[i_pk]),
                resistive_fraction=pred.summary["resistive_fraction"],
                worst_case_reduction_db=float(db[i_w]),
                worst_case_hz=float(f[inside][i_w]),
                worst_case_line_ohm=complex(zl[i_w]),
            )
        )
    scores.sort(key=lambda s: (-s.worst_case_reduction_db, -s.min_resistance_ohm))
    return Comparison(tuple(scores), band, float(line_r_max), float(line_x_max))


def comparison_curves(comparison: Comparison, pad: float = 3.0, points: int = 401) -> list[ImpedanceCurve]:
    """R(f) curves of the compared materials on a grid widened by ``pad`` around the band,
    clipped to what tabulated materials cover (for the overlay plot)."""
    out = []
    band = comparison.band
    for s in comparison.scores:
        d = s.prediction.design
        out.append(d.curve(band.grid(points, pad, within=d.material.range_hz), label=s.name))
    return out
