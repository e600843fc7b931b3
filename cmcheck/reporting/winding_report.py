"""Closed-form winding figures (L, Cp, R, self-resonance) of every measured impedance, for
``extract``'s console report and JSON (``winding_estimate``), so a prediction can take the measured Cp.

Closed forms only (no fit), so a batch of many files stays as fast as the extraction itself.
"""

from __future__ import annotations

from typing import Sequence

from ..errors import CmcheckError
from ..units import format_quantity
from .results import Column, Table, Text

__all__ = ["estimate_dict", "estimate_text", "estimates_table", "spice_writer", "winding_estimate"]


def winding_estimate(extraction):
    """:func:`~cmcheck.identify.circuit.quick_estimates` of an extraction's impedance, or None
    (no impedance, or no inductive point to take L from)."""
    from ..identify.circuit import quick_estimates

    curve = getattr(extraction, "curve", None)
    if curve is None:
        return None
    try:
        # L and R from the valid points; the resonance from every finite point (near it a
        # reflection marks |Z| doubtful, but the sign of X is sound).
        return quick_estimates(curve.frequency_hz, curve.z, curve.valid)
    except CmcheckError:
        return None


def estimate_dict(est) -> dict | None:
    """The JSON ``winding_estimate`` object (SI units; null where the sweep shows no resonance)."""
    if est is None:
        return None
    return {"inductance_h": est.inductance_h, "cp_f": est.cp_f, "r_low_ohm": est.r_low_ohm,
            "self_resonance_hz": est.self_resonance_hz, "r_peak_ohm": est.r_peak_ohm,
            "method": "closed form: L = X/ω over the lowest decade, Cp = 1/(ω0²L) (Thomson), R = Re Z at the lowest valid point"}


def estimate_text(est) -> Text | None:
    """One console line for a single file."""
    if est is None:
        return None
    head = f"  winding (closed form): L = {format_quantity(est.inductance_h, 'H', 3)}, R = {est.r_low_ohm:.3g} Ω at the lowest valid point"
    if est.self_resonance_hz is None:
        return Text(head + ", no self-resonance in the sweep (Cp not found)")
    return Text(head + f", self-resonance {format_quantity(est.self_resonance_hz, 'Hz')}, "
                f"Cp = 1/(ω0²L) = {format_quantity(est.cp_f, 'F', 3)}")


def estimates_table(paths: Sequence[str], estimates: Sequence) -> list:
    """A heading and one row per file with an impedance (batch console report); [] when there is none."""
    rows = [(p, e.inductance_h, e.cp_f, e.r_low_ohm, e.self_resonance_hz)
            for p, e in zip(paths, estimates) if e is not None]
    if not rows:
        return []
    cols = (Column("file", "file"), Column("inductance_h", "L", "H", "henry", ".6g"),
            Column("cp_f", "Cp", "F", "farad", ".6g"), Column("r_low_ohm", "R low [Ω]", "Ω", "num", ".6g"),
            Column("self_resonance_hz", "self-resonance", "Hz", "hz", ".6g"))
    return [Text("Winding estimates (closed form: L from the inductive slope, Cp = 1/(ω0²L)):"),
            Table(cols, rows, title="Winding estimates (closed form)", fold_first=True)]


def spice_writer(path, extraction):
    """A writer of the fitted equivalent circuit of ``extraction``'s impedance as a SPICE
    subcircuit (fitted now, written when called; for staged writing with a report's files)."""
    from ..errors import MeasurementError
    from ..identify.circuit import fit_circuit, write_spice

    curve = getattr(extraction, "curve", None)
    if curve is None:
        raise MeasurementError(f"{extraction.source}: an equivalent circuit needs an impedance (series, shunt or reflect)")
    circuit = fit_circuit(curve.frequency_hz, curve.z, curve.valid)
    comments = [f"fitted to {extraction.source} ({extraction.method}), valid points only"]
    return lambda: write_spice(path, circuit, "winding", comments)
