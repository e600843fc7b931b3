"""The choke model: common-mode impedance of a winding on a ferrite core.

Z(f) = (jωL0·µ(f) + R_conductor) ∥ jωCp, with L0 = µ0·N²/C1 the winding's inductance over
the core's magnetic path if the core were air. The pure functions broadcast, so the sizing
search evaluates thousands of candidates as one array of shape (candidates, frequencies).
"""

from __future__ import annotations

import math
import warnings
from dataclasses import dataclass

import numpy as np

from .cores import Core
from ..curve import ImpedanceCurve, resistive_ranges, self_resonance
from ..errors import CmcheckWarning, WindingError
from .materials import Material
from ..units import Band
from .conductors import MU0
from .winding import Winding, check_fit
from .winding_cp import cp_material, design_self_capacitance, unknown_class_message


__all__ = [
    "ChokeDesign",
    "Prediction",
    "air_core_inductance",
    "choke_impedance",
    "lossless_self_resonance",
    "predict",
    "winding_impedance",
]


def air_core_inductance(c1, turns):
    """L0 = µ0·N²/C1, the inductance of N turns over the core's path with µr = 1.

    Parameters
    ----------
    c1 : array_like
        Core factor Σl/A [1/m].
    turns : array_like
        N [dimensionless].

    Returns
    -------
    numpy.ndarray or float
        L0 [H]. Times µr it is the winding's inductance; A_L = µ0·µr/C1.

    References
    ----------
    IEC 60205:2016, clause 4 (inductance factor from C1); for a ring this is
    L = µ0·µr·N²·h·ln(OD/ID)/(2π).
    """
    out = MU0 * np.asarray(turns, dtype=float) ** 2 / np.asarray(c1, dtype=float)
    return float(out) if np.ndim(out) == 0 else out


def winding_impedance(frequency_hz, l0, mu):
    """Z = jωL0·µ = ωL0µ'' + jωL0µ' of a winding on a core of complex permeability µ.

    Parameters
    ----------
    frequency_hz : array_like
        Frequency [Hz].
    l0 : array_like
        Air-core inductance L0 [H].
    mu : array_like of complex
        µ' − jµ'' at those frequencies [dimensionless].

    Returns
    -------
    numpy.ndarray of complex
        Z [Ω].

    References
    ----------
    IEC 60050-221, IEV 221-03-06 (complex permeability, µ = µ' − jµ''), which gives the
    series impedance of a winding as jωL0µ.
    """
    w = 2.0 * np.pi * np.asarray(frequency_hz, dtype=float)
    return 1j * w * np.asarray(l0, dtype=float) * np.asarray(mu, dtype=complex)


def choke_impedance(frequency_hz, l0, mu, r_conductor=0.0, cp=0.0):
    """Impedance of the choke: (jωL0µ + Rc) in parallel with jωCp.

    Parameters
    ----------
    frequency_hz : array_like
        Frequency [Hz], shape (..., F).
    l0 : array_like
        Air-core inductance [H], broadcastable, e.g. shape (C, 1).
    mu : array_like of complex
        Complex permeability µ' − jµ'' [dimensionless], broadcastable.
    r_conductor : array_like
        Conductor AC resistance [Ω], broadcastable.
    cp : array_like
        Stray parallel capacitance [F], broadcastable; 0 leaves it out.

    Returns
    -------
    numpy.ndarray of complex
        Z [Ω].

    References
    ----------
    Lumped model of a wound component with its self-capacitance: A. Massarini &
    M. K. Kazimierczuk, IEEE Trans. Power Electron. 12(4), 1997, Fig. 1; winding term from
    IEC 60050-221, IEV 221-03-06.
    """
    w = 2.0 * np.pi * np.asarray(frequency_hz, dtype=float)
    zs = 1j * w * np.asarray(l0, dtype=float) * np.asarray(mu, dtype=complex) + np.asarray(r_conductor, dtype=float)
    ycp = 1j * w * np.asarray(cp, dtype=float)
    # Z/(1 + jωCp·Z) equals 1/(1/Z + jωCp) but stays finite where Z → 0.
    return zs / (1.0 + ycp * zs)


def lossless_self_resonance(inductance, capacitance):
    """f = 1/(2π√(L·C)) [Hz] for inductance [H] and capacitance [F].

    References
    ----------
    Thomson's formula for the resonance of an ideal LC circuit (any circuit-theory text,
    e.g. C. K. Alexander & M. N. O. Sadiku, *Fundamentals of Electric Circuits*, §14.5).
    """
    return 1.0 / (2.0 * np.pi * np.sqrt(np.asarray(inductance, float) * np.asarray(capacitance, float)))


@dataclass(frozen=True)
class ChokeDesign:
    """A winding on a core of some material: everything the model needs.

    Parameters
    ----------
    core : Core
        Any core shape (:class:`~cmcheck.model.cores.Core`): ring, factor-only, two-hole...
    material : Material
    winding : Winding
    turn_length : float, optional
        Length of one turn [m], overriding the core's own (needed for the conductor resistance
        of a :class:`~cmcheck.model.cores.FactorCore` without ``turn_path``).
    winding_angle : float, optional
        Angle the winding spans round the core, first to last turn [rad], for the Cp estimate;
        None: spread over 300° (or close-wound where the turns fill more).
    """

    core: Core
    material: Material
    winding: Winding
    turn_length: float | None = None
    winding_angle: float | None = None

    def __post_init__(self) -> None:
        a = self.winding_angle
        if a is not None and not (isinstance(a, (int, float)) and 0 < a < 2 * math.pi):
            raise WindingError(f"winding_angle must lie between 0 and 2π rad, got {a!r}", parameter="winding_angle")

    @property
    def l0(self) -> float:
        """Air-core inductance L0 = µ0·N²/C1 [H]."""
        return air_core_inductance(self.core.c1, self.winding.turns)

    @property
    def mean_turn_length(self) -> float | None:
        """Length of one turn [m]."""
        if self.turn_length is not None:
            return self.turn_length
        return self.core.turn_length(self.winding.conductor.outer_diameter)

    @property
    def conductor_length(self) -> float | None:
        """Conductor needed for the turns and the leads [m]."""
        mlt = self.mean_turn_length
        return None if mlt is None else self.winding.turns * mlt + self.winding.lead_length

    @property
    def max_turns(self) -> int | None:
        """Most turns that fit in one layer, when the window is known."""
        d = self.core.window_diameter
        return None if d is None else check_fit(d, self.winding)

    @property
    def cp_parts(self):
        """The estimated Cp's parts (:class:`~cmcheck.model.selfcapacitance.SelfCapacitance`), or None
        without a turn geometry (:func:`cmcheck.model.winding_cp.design_self_capacitance`)."""
        return design_self_capacitance(self.core, self.winding.conductor, self.winding.turns, self.material,
                                       self.winding_angle)

    @property
    def cp(self) -> float:
        """Stray capacitance used [F]: the given one, else the energy-method estimate."""
        if self.winding.cp is not None:
            return self.winding.cp
        parts = self.cp_parts
        # No geometry to estimate from: 0, and predict() warns naming what is missing.
        return 0.0 if parts is None else float(parts.total)

    @property
    def cp_assumed_class(self) -> bool:
        """True when Cp is estimated for a material that does not declare its electrical class."""
        return self.cp_source.startswith("estimated") and cp_material(self.material).assumed

    @property
    def cp_source(self) -> str:
        """How Cp was obtained: ``given``, ``estimated (energy method, …)`` or ``none``."""
        if self.winding.cp is not None:
            return "given"
        parts = self.cp_parts
        if parts is None:
            return "none"
        spread = "as given" if self.winding_angle is not None else "the default spread"
        return (f"estimated (energy method, {cp_material(self.material).describe()}, "
                f"winding over {math.degrees(float(parts.winding_angle)):.0f}°, {spread})")

    def conductor_resistance(self, frequency_hz) -> np.ndarray:
        """AC resistance of the conductor [Ω]; zero when its length is unknown."""
        length = self.conductor_length
        if length is None or length == 0:
            return np.zeros(np.shape(frequency_hz))
        return self.winding.conductor.resistance(frequency_hz, length)

    def impedance(self, frequency_hz) -> np.ndarray:
        """Z(f) [Ω] of the choke at ``frequency_hz`` [Hz]."""
        f = np.asarray(frequency_hz, dtype=float)
        mu = self.material.permeability(f)
        return choke_impedance(f, self.l0, mu, self.conductor_resistance(f), self.cp)

    def curve(self, frequency_hz, label: str | None = None) -> ImpedanceCurve:
        """Z(f) as an :class:`~cmcheck.curve.ImpedanceCurve`."""
        f = np.asarray(frequency_hz, dtype=float)
        return ImpedanceCurve(f, self.impedance(f), label=label or self.describe())

    def low_frequency_inductance(self) -> float:
        """L = L0·µi [H], what an LCR meter shows at low frequency."""
        return self.l0 * self.material.initial_permeability

    def describe(self) -> str:
        """One line, e.g. ``8 turns of cable 5 mm OD on ring 61 × 35.6 × 12.7 mm, nizn-800``."""
        return (
            f"{self.winding.turns} turn{'s' if self.winding.turns != 1 else ''} of "
            f"{self.winding.conductor.describe()} on {self.core.describe()}, {self.material.name}"
        )

    def cp_breakdown(self) -> dict | None:
        """The estimated Cp's parts [F] and winding angle [rad] as a dict; None when Cp is given or unknown."""
        parts = None if self.winding.cp is not None else self.cp_parts
        if parts is None:
            return None
        d = {k: float(getattr(parts, k)) for k in ("gap", "air", "chain", "core", "leads")}
        d["winding_angle_rad"] = float(parts.winding_angle)
        return d

    def to_dict(self) -> dict:
        """JSON-ready description of the design (SI units)."""
        d: dict = {"material": self.material.name, "turns": self.winding.turns}
        d.update(self.core.to_dict())
        d.update(self.winding.conductor.to_dict())
        d.update(
            cp_f=self.cp,
            cp_source=self.cp_source,
            cp_parts_f=self.cp_breakdown(),
            l0_h=self.l0,
            low_frequency_inductance_h=self.low_frequency_inductance(),
            turn_length_m=self.mean_turn_length,
            conductor_length_m=self.conductor_length,
        )
        return d


@dataclass(frozen=True, eq=False)
class Prediction:
    """Result of :func:`predict`: the curve over the band and a summary.

    Attributes
    ----------
    design : ChokeDesign
    band : Band
    curve : ImpedanceCurve
        Z over the band (the grid includes the band edges).
    summary : dict
        ``min_resistance_ohm`` and ``min_resistance_hz`` over the band,
        ``max_resistance_ohm``, ``self_resonance_hz`` (None if none found in the model's
        range), ``resistive_ranges_hz`` (where R > |X|), ``resistive_fraction`` of the band,
        ``low_frequency_inductance_h``, ``cp_f``, ``max_turns_one_layer``.
    """

    design: ChokeDesign
    band: Band
    curve: ImpedanceCurve
    summary: dict

    def to_dict(self) -> dict:
        """JSON-ready: curve columns plus ``design`` and ``summary`` objects."""
        d = self.curve.to_dict()
        design = self.design.to_dict()
        design["max_turns_one_layer"] = self.summary.get("max_turns_one_layer")
        d["band_hz"] = [list(s) for s in self.band.segments]
        d["design"] = design
        d["summary"] = self.summary
        return d


def _search_range(material: Material, band: Band) -> tuple[float, float]:
    lo, hi = band.low / 100.0, band.high * 100.0
    rng = material.range_hz
    if rng is not None:
        lo, hi = max(lo, rng[0]), min(hi, rng[1])
    return lo, hi


def find_self_resonance(design: ChokeDesign, low_hz: float, high_hz: float, points: int = 2000) -> float | None:
    """First self-resonance (X from + to −) of ``design`` between two frequencies [Hz], or None.

    A dense log grid brackets the crossing; a few bisection steps refine it.
    """
    f = np.geomspace(low_hz, high_hz, points)
    srf = self_resonance(f, design.impedance(f))
    if srf.size == 0:
        return None
    i = int(np.searchsorted(f, srf[0]))
    a, b = f[max(i - 1, 0)], f[min(i, f.size - 1)]
    for _ in range(40):
        m = math.sqrt(a * b)
        if design.impedance(np.array([m]))[0].imag > 0:
            a = m
        else:
            b = m
    return math.sqrt(a * b)


def predict(design: ChokeDesign, band: Band, points: int = 201) -> Prediction:
    """Predict the choke's impedance over a band, with a summary.

    Parameters
    ----------
    design : ChokeDesign
    band : Band
        Frequencies of interest [Hz]; one or several ranges.
    points : int
        Log-spaced points over the band's whole span (the edges are added).

    Returns
    -------
    Prediction

    Raises
    ------
    MaterialError
        When a tabulated material does not cover the band.
    """
    max_turns = design.max_turns
    if design.cp_source == "none":
        warnings.warn(
            CmcheckWarning(f"no stray-capacitance estimate: the core lacks {' and '.join(design.core.missing) or 'a turn geometry'}; "
                           "the model has no self-resonance unless cp is given", parameter="cp"),
            stacklevel=2,
        )
    if design.cp_assumed_class:
        warnings.warn(CmcheckWarning(unknown_class_message(design.material.name), parameter="material"), stacklevel=2)
    f = band.grid(points)
    curve = design.curve(f)
    inside = band.contains(f)
    r_in = curve.resistance[inside]
    i_min = int(np.argmin(r_in))
    lo, hi = _search_range(design.material, band)
    srf = find_self_resonance(design, lo, hi)
    fractions = _resistive_fraction(f, curve.z, band)
    summary = {
        "min_resistance_ohm": float(r_in[i_min]),
        "min_resistance_hz": float(f[inside][i_min]),
        "max_resistance_ohm": float(np.max(r_in)),
        "max_resistance_hz": float(f[inside][int(np.argmax(r_in))]),
        "min_impedance_ohm": float(np.min(curve.magnitude[inside])),
        "self_resonance_hz": srf,
        "self_resonance_searched_hz": [lo, hi],
        "resistive_ranges_hz": [list(r) for r in resistive_ranges(f, curve.z)],
        "resistive_fraction": fractions,
        "low_frequency_inductance_h": design.low_frequency_inductance(),
        "cp_f": design.cp,
        "cp_source": design.cp_source,
        "cp_parts_f": design.cp_breakdown(),
        "max_turns_one_layer": max_turns,
        "conductor_length_m": design.conductor_length,
    }
    return Prediction(design, band, curve, summary)


def _resistive_fraction(f, z, band: Band) -> float:
    """Fraction of the band, measured in log-frequency, where R > |X|."""
    from scipy.integrate import trapezoid as _trapezoid  # kept off the CLI start-up path

    ok = (z.real > np.abs(z.imag)).astype(float)
    lf = np.log(f)
    covered = total = 0.0
    for lo, hi in band.segments:
        m = Band.single(lo, hi).contains(f)
        if m.sum() < 2:
            continue
        # Trapezoid rule in log-frequency so an uneven grid does not bias the fraction.
        covered += _trapezoid(ok[m], lf[m])
        total += lf[m][-1] - lf[m][0]
    return float(covered / total) if total > 0 else 0.0
