"""Core geometry: effective parameters of ring cores, stacks, sleeves and factor-only cores.

The winding model needs only the core factor C1 = Σl/A; the heat and flux checks also need
the effective area, volume and the outside surface. Everything in metres.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from ..errors import DimensionError

__all__ = [
    "FactorCore",
    "RingCore",
    "effective_parameters",
    "ring_core_factors",
    "ring_surface_area",
    "sleeve",
]


def ring_core_factors(od, id, height):
    """Core factors C1 = Σl/A and C2 = Σl/A² of a ring core of rectangular section.

    Parameters
    ----------
    od : array_like
        Outside diameter [m].
    id : array_like
        Inside diameter [m], below ``od``.
    height : array_like
        Axial height [m].

    Returns
    -------
    c1 : numpy.ndarray or float
        Σl/A [1/m].
    c2 : numpy.ndarray or float
        Σl/A² [1/m³].

    References
    ----------
    IEC 60205:2016, Calculation of the effective parameters of magnetic piece parts,
    clause for ring cores of rectangular cross-section: with r1 = ID/2 and r2 = OD/2,
    C1 = 2π/(h·ln(r2/r1)), C2 = 2π(1/r1 − 1/r2)/(h²·ln³(r2/r1)).
    """
    r2 = np.asarray(od, dtype=float) / 2.0
    r1 = np.asarray(id, dtype=float) / 2.0
    h = np.asarray(height, dtype=float)
    ln = np.log(r2 / r1)
    c1 = 2.0 * np.pi / (h * ln)
    c2 = 2.0 * np.pi * (1.0 / r1 - 1.0 / r2) / (h**2 * ln**3)
    return _scalar(c1), _scalar(c2)


def effective_parameters(c1, c2):
    """Effective length, area and volume from the core factors.

    Parameters
    ----------
    c1 : array_like
        Σl/A [1/m].
    c2 : array_like
        Σl/A² [1/m³].

    Returns
    -------
    le : Effective magnetic path length [m], C1²/C2.
    ae : Effective area [m²], C1/C2.
    ve : Effective volume [m³], C1³/C2².

    References
    ----------
    IEC 60050-221:1990, IEV 221-04-31 (effective dimensions of a magnetic circuit) and
    IEC 60205:2016, clause 4 (definitions of le, Ae, Ve from C1 and C2).
    """
    c1 = np.asarray(c1, dtype=float)
    c2 = np.asarray(c2, dtype=float)
    return _scalar(c1**2 / c2), _scalar(c1 / c2), _scalar(c1**3 / c2**2)


def ring_surface_area(od, id, height):
    """Outside surface of a ring (two faces, outer and inner walls) [m²].

    Parameters
    ----------
    od, id, height : array_like
        Outside diameter, inside diameter and height [m].

    References
    ----------
    Elementary geometry of a hollow cylinder; used as the cooling surface in
    C. W. T. McLyman, *Transformer and Inductor Design Handbook*, 3rd ed., Marcel Dekker 2004,
    ch. 6 (temperature rise from surface dissipation).
    """
    od = np.asarray(od, dtype=float)
    id = np.asarray(id, dtype=float)
    h = np.asarray(height, dtype=float)
    return _scalar(0.5 * np.pi * (od**2 - id**2) + np.pi * (od + id) * h)


def _scalar(a):
    a = np.asarray(a)
    return float(a) if a.ndim == 0 else a


def _positive(name: str, value: float) -> float:
    if not (isinstance(value, (int, float)) and math.isfinite(value) and value > 0):
        raise DimensionError(f"core {name} must be a positive length, got {value * 1e3:g} mm" if isinstance(value, (int, float)) else f"core {name} must be a positive length, got {value!r}")
    return float(value)


@dataclass(frozen=True)
class RingCore:
    """A ring (toroid) core, or a stack of ``stack`` identical rings side by side.

    Parameters
    ----------
    od : float
        Outside diameter [m].
    id : float
        Inside diameter [m].
    height : float
        Height of one ring [m].
    stack : int
        Number of identical rings stacked; heights add, so C1 divides by ``stack``.
    """

    od: float
    id: float
    height: float
    stack: int = 1

    def __post_init__(self) -> None:
        _positive("OD", self.od)
        _positive("ID", self.id)
        _positive("height", self.height)
        if self.id >= self.od:
            raise DimensionError(
                f"core ID ({self.id * 1e3:g} mm) must be smaller than OD ({self.od * 1e3:g} mm)"
            )
        if not isinstance(self.stack, (int, np.integer)) or self.stack < 1:
            raise DimensionError(f"number of stacked cores must be a whole number ≥ 1, got {self.stack!r}")

    @property
    def total_height(self) -> float:
        """Height of the whole stack [m]."""
        return self.height * self.stack

    @property
    def c1(self) -> float:
        """Core factor Σl/A [1/m] (IEC 60205)."""
        return ring_core_factors(self.od, self.id, self.total_height)[0]

    @property
    def c2(self) -> float:
        """Core factor Σl/A² [1/m³] (IEC 60205)."""
        return ring_core_factors(self.od, self.id, self.total_height)[1]

    @property
    def le(self) -> float:
        """Effective path length [m]."""
        return effective_parameters(self.c1, self.c2)[0]

    @property
    def ae(self) -> float:
        """Effective area [m²]."""
        return effective_parameters(self.c1, self.c2)[1]

    @property
    def ve(self) -> float:
        """Effective volume [m³]."""
        return effective_parameters(self.c1, self.c2)[2]

    @property
    def window_diameter(self) -> float:
        """Diameter of the hole the winding passes through [m]."""
        return self.id

    @property
    def surface_area(self) -> float:
        """Outside surface of the stack as one body [m²]."""
        return ring_surface_area(self.od, self.id, self.total_height)

    @property
    def volume(self) -> float:
        """Geometric volume of the stack [m³]."""
        return math.pi / 4 * (self.od**2 - self.id**2) * self.total_height

    def stacked(self, count: int) -> "RingCore":
        """The same ring, ``count`` of them stacked."""
        return RingCore(self.od, self.id, self.height, count)

    def describe(self) -> str:
        """A short human description, e.g. ``2 × ring 61 × 35.6 × 12.7 mm``."""
        base = f"ring {self.od * 1e3:.4g} × {self.id * 1e3:.4g} × {self.height * 1e3:.4g} mm"
        return f"{self.stack} × {base}" if self.stack > 1 else base


def sleeve(od: float, id: float, length: float, stack: int = 1) -> RingCore:
    """A cable sleeve (tubular bead): a ring whose height is its length [m]."""
    return RingCore(od, id, length, stack)


@dataclass(frozen=True)
class FactorCore:
    """A core known only by its core factor, for shapes not modelled (two-hole cores...).

    Parameters
    ----------
    c1 : float
        Core factor Σl/A [1/m] (a datasheet gives it, or A/l in m, its inverse).
    window_diameter : float, optional
        Diameter of the hole the winding passes through [m], for the fit check.
    ae, le : float, optional
        Effective area [m²] and length [m], for the flux and heat checks.
    """

    c1: float
    window_diameter: float | None = None
    ae: float | None = None
    le: float | None = None

    def __post_init__(self) -> None:
        if not (math.isfinite(self.c1) and self.c1 > 0):
            raise DimensionError(f"core factor Σl/A must be positive, got {self.c1!r} 1/m")
        for name in ("window_diameter", "ae", "le"):
            v = getattr(self, name)
            if v is not None and not (math.isfinite(v) and v > 0):
                raise DimensionError(f"core {name} must be positive, got {v!r}")

    @property
    def ve(self) -> float | None:
        """Effective volume [m³] when area and length are known."""
        return self.ae * self.le if (self.ae and self.le) else None

    def describe(self) -> str:
        """A short human description."""
        return f"core with Σl/A = {self.c1:.4g} 1/m"
