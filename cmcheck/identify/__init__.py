"""Identification of an unknown core and winding from one measured sweep.

``identify(extraction, c1=..., turns=...)`` → :class:`Identification` (µ(f), Cp, a fitted
dispersion model, the nearest candidate material, a whole-band material CSV);
``fit_circuit`` → a compact equivalent circuit written as a SPICE subcircuit.
"""

from .circuit import EquivalentCircuit, WindingEstimate, fit_circuit, foster_impedance, quick_estimates, write_spice
from .fit import DispersionFit, FamilyConstants, family_permeability, fit_dispersion, nearest_material
from .identification import Identification, identify
from .permeability import PermeabilityData, invert_permeability, measured_permeability
from .resonance import CpEstimate, SelfResonance, cp_from_resonance, estimate_cp, find_self_resonance, remove_cp

__all__ = [
    "EquivalentCircuit",
    "WindingEstimate",
    "fit_circuit",
    "foster_impedance",
    "quick_estimates",
    "write_spice",
    "CpEstimate",
    "DispersionFit",
    "FamilyConstants",
    "Identification",
    "PermeabilityData",
    "SelfResonance",
    "cp_from_resonance",
    "estimate_cp",
    "family_permeability",
    "find_self_resonance",
    "fit_dispersion",
    "identify",
    "invert_permeability",
    "measured_permeability",
    "nearest_material",
    "remove_cp",
]
