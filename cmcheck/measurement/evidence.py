"""Whether a two-port file's own data support the extraction method chosen for it.

A method is a claim about how the part sat between the ports. The data can contradict it:
a reflection reading of a two-port whose S21 shows a through measures Z plus port 2's
termination, not Z; a "through" whose S11 is not what one lumped element between the ports
gives is not a series (or shunt) element at all. These checks only warn: the file is still
extracted as asked, but the user is told why the numbers may not be the part's.
"""

from __future__ import annotations

import numpy as np

from .touchstone import SParameters
from ..units import format_quantity

__all__ = ["THROUGH_LEVEL", "ONE_ELEMENT_LIMIT", "method_doubts"]

#: Median |S21| above which a two-port plainly passes signal through (−20 dB).
THROUGH_LEVEL = 0.1

#: Median of ||S11| − |1 − S21|| above which the two-port is not one lumped element, before
#: the calibration allowance is added (see :func:`method_doubts`).
ONE_ELEMENT_LIMIT = 0.4


def method_doubts(sweep: SParameters, method: str, cal_error: float) -> list[str]:
    """Reasons, one line each, why ``sweep``'s data contradict ``method``; empty when they agree.

    Parameters
    ----------
    sweep : SParameters
        A two-port sweep (other port counts give no doubts).
    method : {"series", "shunt", "reflect"}
        The resolved method.
    cal_error : float
        Residual calibration error [dimensionless] (additive on S11, relative on S21).

    Returns
    -------
    list of str

    Notes
    -----
    One impedance Z in series between two Z0 ports gives S11 = Z/(Z + 2·Z0) = 1 − S21; one
    admittance in shunt gives S11 = S21 − 1. Either way |S11| = |1 − S21|. Magnitudes are
    compared because a reference plane a few centimetres off the part turns S11's phase
    (by 2βl) without changing its magnitude, and such offsets are common in home fixtures.
    The limit, 0.4 + 10·cal_error on the median over the sweep, is far beyond calibration
    error (≈ 0.01) and leaves room for a fixture's stray capacitance to ground at the top of
    a sweep (a lumped series sleeve measured to 1 GHz reaches a median of 0.2), while a
    transformer's through (a median of 0.8 in our test files) is caught.

    References
    ----------
    D. M. Pozar, *Microwave Engineering*, 4th ed., Wiley, 2012, §4.4: the ABCD matrices of a
    series impedance and a shunt admittance and their conversion to S (Tables 4.1 and 4.2;
    table numbers from memory). The thresholds are common practice, no published source.
    """
    if sweep.n_ports != 2 or sweep.is_placeholder(2, 1):
        return []
    s11, s21 = sweep.param(1, 1), sweep.param(2, 1)
    doubts = []
    through = float(np.median(np.abs(s21)))
    if method == "reflect" and through > THROUGH_LEVEL:
        doubts.append(
            f"{sweep.source}: read as a reflection, but S21 shows a through (median |S21| = "
            f"{20 * np.log10(through):.1f} dB): port 1 then sees Z in series with port 2's "
            f"{format_quantity(sweep.z0, 'Ω', 3)} termination, not Z; use method series (or shunt)"
        )
    if method in ("series", "shunt") and not sweep.is_placeholder(1, 1):
        miss = float(np.median(np.abs(np.abs(s11) - np.abs(1.0 - s21))))
        limit = ONE_ELEMENT_LIMIT + 10.0 * cal_error
        if miss > limit:
            doubts.append(
                f"{sweep.source}: read with method {method}, but S11 does not follow S21 as one element "
                f"between the ports would (median ||S11| − |1 − S21|| = {miss:.2f}, beyond {limit:.2f} "
                f"allowing for calibration error): a path to ground or a transformer; the impedance "
                f"shown is not the part's alone"
            )
    return doubts
