"""cmcheck — predict, measure and size RF common-mode chokes and baluns on ferrite cores.

SI units everywhere inside (Hz, m, H, F, Ω, W); :mod:`cmcheck.units` parses what people type.
"""

from .choke import ChokeDesign, Prediction, air_core_inductance, choke_impedance, predict, winding_impedance
from .cores import FactorCore, RingCore, effective_parameters, ring_core_factors, sleeve
from .curve import ImpedanceCurve
from .errors import CmcheckError, CmcheckWarning
from .materials import Material, builtin_materials, get_material, load_material_csv
from .units import Band, parse_band, parse_frequency, parse_length
from .winding import Cable, Winding, Wire

__version__ = "0.1.0"

__all__ = [
    "Band",
    "Cable",
    "ChokeDesign",
    "CmcheckError",
    "CmcheckWarning",
    "FactorCore",
    "ImpedanceCurve",
    "Material",
    "Prediction",
    "RingCore",
    "Winding",
    "Wire",
    "air_core_inductance",
    "builtin_materials",
    "choke_impedance",
    "effective_parameters",
    "get_material",
    "load_material_csv",
    "parse_band",
    "parse_frequency",
    "parse_length",
    "predict",
    "ring_core_factors",
    "sleeve",
    "winding_impedance",
]

# Sizing and comparing (the search itself is cmcheck.size.size(SizeSpec(...))).
from .compare import compare_materials, worst_case_reduction  # noqa: E402
from .ringsizes import RingSizes, builtin_ring_sizes, load_ring_sizes  # noqa: E402
from .size import SizeResult, SizeSpec  # noqa: E402
from .thermal import Drive  # noqa: E402

__all__ += [
    "Drive",
    "RingSizes",
    "SizeResult",
    "SizeSpec",
    "builtin_ring_sizes",
    "compare_materials",
    "load_ring_sizes",
    "worst_case_reduction",
]

# Measurements: safe Touchstone reading, S→Z, validity, mixed mode, batch limits.
from .balance import Balance  # noqa: E402
from .batch import FileResult, Limits, Summary, evaluate_files, exit_status, summarize  # noqa: E402
from .measure import Extraction, Fixture, extract, extract_legs, reflection_z, series_through_z, shunt_through_z  # noqa: E402
from .touchstone import SParameters, read_touchstone  # noqa: E402
from .validity import Accuracy, Validity  # noqa: E402

__all__ += [
    "Accuracy",
    "Balance",
    "Extraction",
    "FileResult",
    "Fixture",
    "Limits",
    "SParameters",
    "Summary",
    "Validity",
    "evaluate_files",
    "exit_status",
    "extract",
    "extract_legs",
    "read_touchstone",
    "reflection_z",
    "series_through_z",
    "shunt_through_z",
    "summarize",
]
