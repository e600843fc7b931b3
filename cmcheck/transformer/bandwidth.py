"""Where a transformer's SWR stays under a limit, and what sets each end of that band.

The low end of a transformer's band is set by the reactance shunting the load: the choking
(common-mode) impedance of a transmission-line transformer's windings, or the magnetising
impedance of a flux-coupled one, falling towards the load impedance it sits across. The high
end is set by the line's electrical length and its characteristic impedance differing from
the optimum √(Zs·ZL) (line transformers), or by the leakage inductance in series and the
winding capacitance across (flux-coupled). This module returns those quantities as numbers;
the report words them.
"""

from __future__ import annotations

import math

import numpy as np

from ..errors import TransformerError
from .flux import FluxCoupled

__all__ = ["limit_facts", "swr_band"]


def swr_band(frequency_hz, swr, max_swr: float):
    """The contiguous span around the best match where SWR ≤ ``max_swr``.

    Parameters
    ----------
    frequency_hz : array_like
        Increasing frequencies [Hz], shape (F,).
    swr : array_like
        SWR at each frequency [dimensionless].
    max_swr : float
        Limit [dimensionless], > 1.

    Returns
    -------
    tuple of float or None
        (low, high) [Hz] of the run of points under the limit that contains the lowest SWR;
        None when no point is under it.

    References
    ----------
    Common practice, no published source.
    """
    if not (math.isfinite(max_swr) and max_swr > 1.0):
        raise TransformerError(f"max_swr must be above 1, got {max_swr!r}", parameter="max_swr")
    f = np.asarray(frequency_hz, float)
    s = np.asarray(swr, float)
    ok = s <= max_swr
    if not ok.any():
        return None
    best = int(np.argmin(np.where(ok, s, np.inf)))
    lo = best
    while lo > 0 and ok[lo - 1]:
        lo -= 1
    hi = best
    while hi < f.size - 1 and ok[hi + 1]:
        hi += 1
    return float(f[lo]), float(f[hi])


def limit_facts(topology, frequency_hz: float, transformer, load_impedance: complex, z_source: float) -> dict:
    """The quantities that limit the band at one frequency (one band edge).

    Parameters
    ----------
    topology : Topology
    frequency_hz : float
        The band edge [Hz].
    transformer : IdealLine, LineWinding or FluxCoupled
    load_impedance : complex
        Load at that frequency [Ω].
    z_source : float
        Source (reference) impedance [Ω].

    Returns
    -------
    dict
        Line transformers: ``shunt_ohm`` (|common-mode winding impedance|, None for ideal
        choking), ``line_z0_ohm`` (|Zc|), ``optimum_z0_ohm`` √(Zs·|ZL|), ``electrical_length_deg``.
        Flux-coupled: ``shunt_ohm`` (|magnetising impedance| referred to the primary),
        ``load_referred_ohm`` (|ZL|/ratio), ``leakage_reactance_ohm`` ωLℓ,
        ``capacitance_reactance_ohm`` 1/(ωCs) at the secondary (None without Cs).

    References
    ----------
    J. Sevick, *Transmission Line Transformers*, 4th ed., Noble 2001, ch. 2–3 (low-frequency
    limit by the winding reactance, high-frequency limit by line length and Z0, optimum
    Z0 = √(Zs·ZL)); flux-coupled limits: MIT EE Staff, *Magnetic Circuits and Transformers*,
    Wiley 1943, ch. XVII (magnetising and leakage reactances).
    """
    f = np.array([float(frequency_hz)])
    w = 2 * math.pi * f[0]
    zl = abs(complex(load_impedance))
    if isinstance(transformer, FluxCoupled):
        cs = transformer.secondary_capacitance
        return {
            "kind": "flux",
            "shunt_ohm": float(abs(transformer.magnetising_impedance(f)[0])),
            "load_referred_ohm": zl / transformer.impedance_ratio,
            "leakage_reactance_ohm": w * transformer.leakage_h,
            "capacitance_reactance_ohm": (1.0 / (w * cs)) if cs > 0 else None,
        }
    zc, gl = transformer.constants(f)
    zw = transformer.z_winding(f)
    return {
        "kind": "line",
        "shunt_ohm": None if zw is None else float(abs(zw[0])),
        "line_z0_ohm": float(abs(zc[0])),
        "optimum_z0_ohm": math.sqrt(z_source * zl),
        "electrical_length_deg": float(np.degrees(gl[0].imag)),
    }
