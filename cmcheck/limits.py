"""The ranges each physical input is meaningful in, in one place.

A value outside its range is not a design the models can speak about (a ring of a kilometre,
a stray capacitance of microfarads across one winding): the dataclasses refuse it with a
one-line error naming the parameter, the value, the range and why. Every check reads its
range from here, so the numbers and their reasons are stated once.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

__all__ = [
    "ANALYTIC_BAND",
    "CABLE_OD",
    "CORE_DIMENSION",
    "CP",
    "GAUGE",
    "INITIAL_PERMEABILITY",
    "INSULATION",
    "MAX_PERMEABILITY",
    "Range",
    "STACK",
    "WIRE_DIAMETER",
    "check",
]


@dataclass(frozen=True)
class Range:
    """A closed range [low, high] in SI units, with the unit to print in and the reason."""

    low: float
    high: float
    unit: str
    why: str
    scale: float = 1.0  # SI value per printed unit, e.g. 1e-3 for lengths printed in mm

    def contains(self, value: float) -> bool:
        """True when ``value`` is finite and inside (edges included, 1e-9 relative slack)."""
        return (
            isinstance(value, (int, float))
            and math.isfinite(value)
            and self.low * (1 - 1e-9) <= value <= self.high * (1 + 1e-9)
        )

    def text(self) -> str:
        """The range as people read it, e.g. ``1 mm – 1 m``."""
        return f"{_fmt(self.low, self)} – {_fmt(self.high, self)}"


def _fmt(value: float, rng: Range) -> str:
    if rng.unit == "m":
        if value == 0:
            return "0 m"
        if abs(value) >= 1:
            return f"{value:g} m"
        return f"{value * 1e3:.4g} mm"
    if rng.unit == "F":
        from .units import format_quantity

        return format_quantity(value, "F", 3) if value else "0 F"
    if rng.unit == "Hz":
        from .units import format_quantity

        return format_quantity(value, "Hz", 3)
    return f"{value:g}" + (f" {rng.unit}" if rng.unit else "")


def check(parameter: str, value, rng: Range, error, *, what: str | None = None) -> float:
    """``value`` as a float, or ``error`` naming ``parameter``, the value, ``rng`` and why.

    Parameters
    ----------
    parameter : str
        Library parameter name (the CLI rewrites it as its option).
    value : float
        The value in SI units.
    rng : Range
    error : type
        The :class:`~cmcheck.errors.CmcheckError` subclass to raise.
    what : str, optional
        Wording of the value when it is not the plain number (e.g. ``"AWG 99"``).
    """
    if not rng.contains(value):
        shown = what if what is not None else (f"{value:g} {rng.unit}".strip() if isinstance(value, (int, float)) else repr(value))
        raise error(f"{parameter} = {shown} is outside {rng.text()} ({rng.why})", parameter=parameter)
    return float(value)


#: Ring, sleeve and two-hole core dimensions.
CORE_DIMENSION = Range(1e-3, 1.0, "m", "ferrite parts for RF chokes are made in this range")

#: Identical cores in one stack.
STACK = Range(1, 64, "", "beyond 64 the stack is a tube the model of one magnetic path no longer describes")

#: Stray capacitance across one winding.
CP = Range(0.0, 1e-9, "F", "a winding's own capacitance is picofarads; a nanofarad and more is a capacitor, not a stray")

#: Bare wire diameter: AWG 46 (ASTM B258, 0.0399 mm) to AWG 0000 (11.68 mm).
WIRE_DIAMETER = Range(0.127e-3 * 92.0 ** (-10 / 39), 0.127e-3 * 92.0 ** (39 / 39), "m",
                      "AWG 46 to AWG 0000, the gauges of ASTM B258")

#: AWG gauge numbers (0000 is −3).
GAUGE = Range(-3, 46, "", "ASTM B258 tabulates AWG 0000 to 46")

#: Radial insulation of a wire.
INSULATION = Range(0.0, 0.01, "m", "a covering thicker than 10 mm makes a cable: give the cable's outside diameter instead")

#: Outside diameter of a cable wound as a choke.
CABLE_OD = Range(1e-3, 0.1, "m", "feed lines wound through a core lie in this range")

#: Initial permeability of a material.
INITIAL_PERMEABILITY = Range(1.0, 1e5, "", "no magnetic core material lies outside 1 – 1e5")

#: Largest |µ| anywhere in a material table.
MAX_PERMEABILITY = 1e5

#: Frequencies the analytic (family) permeability models may be evaluated at: below 1 kHz
#: the domain-wall term's low-frequency plateau is an assumption no data backs; above 3 GHz
#: a core's dimensional resonance and the winding's transmission-line behaviour dominate and
#: a lumped µ(f) means nothing.
ANALYTIC_BAND = Range(1e3, 3e9, "Hz", "the family models are lumped dispersion fits stated over 1 kHz – 3 GHz")
