"""Parsing of quantities and frequency bands at the edges (CLI options, files).

Everything inside cmcheck is SI (Hz, m, H, F, Ω, W, V, A); these parsers turn what people
type — ``7MHz``, ``35.6mm``, ``1.4in``, ``2.8pF``, ``1k``, ``18awg``, ``3.5-30MHz`` —
into those units, and refuse anything else with a one-line :class:`~cmcheck.errors.UnitError`.
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass

import numpy as np

from .errors import UnitError

__all__ = [
    "Band",
    "awg_diameter",
    "format_quantity",
    "parse_band",
    "parse_capacitance",
    "parse_current",
    "parse_frequency",
    "parse_length",
    "parse_power",
    "parse_quantity",
    "parse_resistance",
    "parse_voltage",
    "parse_wire_diameter",
    "span_digits",
]

_PREFIX = {
    "p": 1e-12,
    "n": 1e-9,
    "u": 1e-6,
    "µ": 1e-6,
    "μ": 1e-6,
    "m": 1e-3,
    "": 1.0,
    "k": 1e3,
    "K": 1e3,
    "M": 1e6,
    "G": 1e9,
    "T": 1e12,
}

_NUMBER = re.compile(r"^\s*([+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?)\s*(.*?)\s*$")

# Units per kind, lower-cased; a bare number is accepted where the unit is unambiguous.
_UNITS = {
    "frequency": ("hz",),
    "capacitance": ("f",),
    "resistance": ("ohm", "ohms", "ω", "Ω".lower(), "r"),
    "power": ("w",),
    "voltage": ("v",),
    "current": ("a",),
}

_LENGTH_UNITS = {
    "m": 1.0,
    "cm": 1e-2,
    "mm": 1e-3,
    "um": 1e-6,
    "µm": 1e-6,
    "μm": 1e-6,
    "in": 0.0254,
    "inch": 0.0254,
    '"': 0.0254,
    "mil": 25.4e-6,
}


def awg_diameter(gauge):
    """Bare-conductor diameter of an American Wire Gauge number.

    Parameters
    ----------
    gauge : array_like
        Gauge number [dimensionless]; 0000 is -3, 000 is -2, 00 is -1.

    Returns
    -------
    numpy.ndarray or float
        Diameter [m].

    References
    ----------
    ASTM B258, Standard Specification for Standard Nominal Diameters and Cross-Sectional
    Areas of AWG Sizes of Solid Round Wires: d = 0.127 mm · 92^((36 − n)/39).
    """
    n = np.asarray(gauge, dtype=float)
    d = 0.127e-3 * 92.0 ** ((36.0 - n) / 39.0)
    return float(d) if d.ndim == 0 else d


def _split(text: str, what: str) -> tuple[float, str]:
    if not isinstance(text, str):
        return float(text), ""
    m = _NUMBER.match(text)
    if not m:
        raise UnitError(f"cannot read {what} {text!r}: expected a number with an optional unit")
    return float(m.group(1)), m.group(2)


def parse_quantity(text, kind: str) -> float:
    """Parse ``text`` as a quantity of ``kind`` and return it in SI units.

    Parameters
    ----------
    text : str or float
        What the user typed, e.g. ``"7MHz"``, ``"7e6"``, ``"2.8pF"``, ``"1k"``.
        Numbers are returned unchanged.
    kind : {"frequency", "capacitance", "resistance", "power", "voltage", "current", "length"}
        The expected physical quantity.

    Returns
    -------
    float
        The value in Hz, F, Ω, W, V, A or m.

    Raises
    ------
    UnitError
        When the text is not a number with an SI prefix and a unit of that kind.
    """
    if kind == "length":
        return parse_length(text)
    if kind not in _UNITS:
        raise ValueError(f"unknown quantity kind {kind!r}")
    value, suffix = _split(text, kind)
    if not math.isfinite(value):
        raise UnitError(f"{kind} {text!r} is not a finite number")
    if suffix == "":
        return value
    low = suffix.lower()
    for unit in _UNITS[kind]:
        if low.endswith(unit):
            prefix = suffix[: len(suffix) - len(unit)]
            break
    else:
        prefix = suffix  # a bare prefix, as in "1k" or "2.8p"
    if kind == "frequency" and prefix in ("m", "g", "t"):
        # Nobody sweeps a choke in millihertz: "mhz" is megahertz typed in lower case.
        prefix = prefix.upper()
    if kind == "capacitance" and prefix in ("P", "N", "U"):
        prefix = prefix.lower()  # "2.8PF": capitals typed for picofarads
    if kind == "capacitance" and prefix == "M":
        raise UnitError(f"capacitance {text!r}: 'M' is ambiguous; use p, n, u or m")
    if prefix not in _PREFIX:
        raise UnitError(f"cannot read {kind} {text!r}: unknown unit or prefix {suffix!r}")
    if not math.isfinite(value * _PREFIX[prefix]):
        raise UnitError(f"{kind} {text!r} is not a finite number")
    return value * _PREFIX[prefix]


def parse_frequency(text) -> float:
    """Parse a frequency such as ``7MHz``, ``7M`` or ``7e6`` [Hz]."""
    return parse_quantity(text, "frequency")


def parse_capacitance(text) -> float:
    """Parse a capacitance such as ``2.8pF``, ``2.8p`` or ``0`` [F]."""
    return parse_quantity(text, "capacitance")


def parse_resistance(text) -> float:
    """Parse a resistance such as ``1k``, ``1kohm``, ``1000`` [Ω]."""
    return parse_quantity(text, "resistance")


def parse_power(text) -> float:
    """Parse a power such as ``100W`` or ``1.5kW`` [W]."""
    return parse_quantity(text, "power")


def parse_voltage(text) -> float:
    """Parse a voltage such as ``250V`` or ``1.2kV`` [V]."""
    return parse_quantity(text, "voltage")


def parse_current(text) -> float:
    """Parse a current such as ``0.5A`` or ``300mA`` [A]."""
    return parse_quantity(text, "current")


def parse_length(text, *, allow_awg: bool = False) -> float:
    """Parse a length such as ``35.6mm``, ``0.3m``, ``1.4in`` [m].

    A unit is required: a bare ``35.6`` could mean millimetres or metres, and guessing a
    core a thousand times too large helps nobody. With ``allow_awg``, ``18awg`` gives the
    ASTM B258 diameter.
    """
    if not isinstance(text, str):
        return float(text)
    stripped = text.strip()
    m = re.fullmatch(r"(?i)\s*(\d+(?:/0)?)\s*awg\s*|\s*awg\s*(\d+(?:/0)?)\s*", stripped)
    if m:
        if not allow_awg:
            raise UnitError(f"length {text!r}: a wire gauge is only accepted for a wire diameter")
        n = _gauge_number(m.group(1) or m.group(2))
        if not -3 <= n <= 46:
            # ASTM B258 tabulates 0000 (n = −3) to 46 (0.04 mm); beyond, the formula gives no wire anyone winds.
            raise UnitError(f"wire gauge {text.strip()!r} is outside AWG 0000 – 46 (the gauges ASTM B258 tabulates)")
        return awg_diameter(n)
    value, suffix = _split(stripped, "length")
    if not math.isfinite(value):
        raise UnitError(f"length {text!r} is not a finite number")
    if suffix == "":
        if value == 0:
            return 0.0
        raise UnitError(f"length {text!r} needs a unit, e.g. {text}mm, {text}m or {text}in")
    if suffix == "M":
        raise UnitError(f"length {text!r}: 'M' is ambiguous; use m (metres) or mm")
    key = suffix if suffix in _LENGTH_UNITS else suffix.lower()
    if key not in _LENGTH_UNITS:
        raise UnitError(f"cannot read length {text!r}: unknown unit {suffix!r} (use mm, m, cm or in)")
    if not math.isfinite(value * _LENGTH_UNITS[key]):
        raise UnitError(f"length {text!r} is not a finite number")
    return value * _LENGTH_UNITS[key]


def _gauge_number(text: str) -> int:
    """AWG as written to the gauge number n of ASTM B258: "00" or "2/0" is −1, "0000" or "4/0" is −3."""
    if text.endswith("/0"):
        return 1 - int(text[:-2])
    if len(text) > 1 and set(text) == {"0"}:
        return 1 - len(text)
    return int(text)


def parse_wire_diameter(text) -> float:
    """Parse a wire size: a gauge such as ``18awg`` or a diameter such as ``1.0mm`` [m]."""
    return parse_length(text, allow_awg=True)


@dataclass(frozen=True)
class Band:
    """One or more frequency ranges, each (low, high) in Hz, low < high.

    Several ranges describe e.g. amateur bands; the whole span is ``low``..``high``.
    """

    segments: tuple[tuple[float, float], ...]

    def __post_init__(self) -> None:
        if not self.segments:
            raise UnitError("a band needs at least one frequency range")
        segs = tuple(sorted((float(lo), float(hi)) for lo, hi in self.segments))
        for lo, hi in segs:
            if not (math.isfinite(lo) and math.isfinite(hi)) or lo <= 0:
                raise UnitError(f"band {_fmt_seg(lo, hi)}: frequencies must be positive and finite")
            if lo >= hi:
                raise UnitError(f"band {_fmt_seg(lo, hi)}: the low edge must be below the high edge")
        object.__setattr__(self, "segments", segs)

    @classmethod
    def single(cls, low_hz: float, high_hz: float) -> "Band":
        """A band of one range ``low_hz``..``high_hz`` [Hz]."""
        return cls(((low_hz, high_hz),))

    @property
    def low(self) -> float:
        """Lowest edge [Hz]."""
        return self.segments[0][0]

    @property
    def high(self) -> float:
        """Highest edge [Hz]."""
        return max(hi for _, hi in self.segments)

    def contains(self, frequency_hz) -> np.ndarray:
        """Boolean mask of the frequencies [Hz] that lie inside any range (edges included)."""
        f = np.asarray(frequency_hz, dtype=float)
        mask = np.zeros(f.shape, dtype=bool)
        for lo, hi in self.segments:
            # A relative tolerance keeps grid points computed at the band edges inside.
            mask |= (f >= lo * (1 - 1e-12)) & (f <= hi * (1 + 1e-12))
        return mask

    def grid(self, points: int = 201, pad: float = 1.0, within: tuple[float, float] | None = None) -> np.ndarray:
        """Log-spaced frequencies [Hz] covering the span, widened by factor ``pad`` each side.

        ``within`` (low, high) [Hz] clips the widened span, e.g. to a tabulated material's range.
        The band edges themselves are always on the grid so that in-band extremes are seen.
        """
        if points < 2:
            raise UnitError(f"points must be at least 2, got {points}", parameter="points")
        lo, hi = self.low / pad, self.high * pad
        if within is not None:
            lo, hi = max(lo, within[0]), min(hi, within[1])
        f = np.geomspace(lo, hi, points)
        edges = np.array([e for seg in self.segments for e in seg])
        return np.unique(np.concatenate([f, edges]))

    def __str__(self) -> str:
        return ",".join(_fmt_seg(lo, hi) for lo, hi in self.segments)


def _fmt_seg(lo: float, hi: float) -> str:
    d = span_digits(lo, hi)
    return f"{format_quantity(lo, 'Hz', d)}–{format_quantity(hi, 'Hz', d)}"


def span_digits(lo: float, hi: float, least: int = 4) -> int:
    """Significant digits that keep ``lo`` and ``hi`` apart when printed (a narrow band needs more)."""
    if not (math.isfinite(hi) and hi > lo > 0):
        return least
    return max(least, min(12, math.ceil(math.log10(hi / (hi - lo))) + 2))


_RANGE = re.compile(r"^\s*(.*?[^eE\s-])\s*(?:-|–|\.\.|to)\s*([0-9.].*)$")


def parse_band(text: str) -> Band:
    """Parse a band: ``3.5-30MHz``, ``3.5MHz-30MHz``, ``1.8-2MHz,3.5-4MHz``.

    A unit written only after the high edge applies to the low edge too.

    Raises
    ------
    UnitError
        For anything else, or when a low edge is not below its high edge.
    """
    if not isinstance(text, str) or not text.strip():
        raise UnitError("band is empty: expected e.g. 3.5-30MHz")
    segments = []
    for part in text.split(","):
        m = _RANGE.match(part)
        if not m:
            raise UnitError(f"cannot read band {part.strip()!r}: expected LOW-HIGH, e.g. 3.5-30MHz")
        lo_text, hi_text = m.group(1), m.group(2)
        hi_value, hi_suffix = _split(hi_text, "band edge")
        lo_value, lo_suffix = _split(lo_text, "band edge")
        if lo_suffix == "" and hi_suffix != "":
            lo_text = f"{lo_value!r}{hi_suffix}"
        try:
            segments.append((parse_frequency(lo_text), parse_frequency(hi_text)))
        except UnitError as exc:
            raise UnitError(f"cannot read band {part.strip()!r}: {exc}") from None
        if hi_suffix == "" and lo_suffix == "" and segments[-1][1] < 1e3:
            # A unit-less "7-7.3" is hertz by the rules, but surely meant megahertz.
            raise UnitError(f"band {part.strip()!r} has no unit and would mean hertz; write e.g. {part.strip()}MHz")
    return Band(tuple(segments))


def format_quantity(value: float, unit: str, digits: int = 4) -> str:
    """Format ``value`` [SI] with an engineering prefix, e.g. ``7.1 MHz``, ``2.8 pF``."""
    if value == 0 or not math.isfinite(value):
        return f"{value:g} {unit}"
    exp = int(math.floor(math.log10(abs(value)) / 3) * 3)
    exp = max(-12, min(12, exp))
    prefix = {-12: "p", -9: "n", -6: "µ", -3: "m", 0: "", 3: "k", 6: "M", 9: "G", 12: "T"}[exp]
    return f"{value / 10**exp:.{digits}g} {prefix}{unit}"
