"""cmcheck — predict, measure and size RF common-mode chokes and baluns on ferrite cores.

SI units everywhere inside (Hz, m, H, F, Ω, W); :mod:`cmcheck.units` parses what people type.
"""

from .model.choke import ChokeDesign, Prediction, air_core_inductance, choke_impedance, predict, winding_impedance
from .model.cores import Core, FactorCore, RingCore, effective_parameters, ring_core_factors, sleeve
from .model.two_hole import TwoHoleCore
from .curve import ImpedanceCurve
from .errors import CmcheckError, CmcheckWarning
from .model.families import Family, builtin_families
from .model.materials import (
    Material,
    builtin_materials,
    family_grid,
    family_material,
    get_material,
    load_material_csv,
    purchase_label,
)
from .units import Band, parse_band, parse_frequency, parse_length
from .model.conductors import Cable, Conductor, Wire
from .model.winding import Winding

__version__ = "0.1.0"

__all__ = [
    "Band",
    "Cable",
    "ChokeDesign",
    "CmcheckError",
    "CmcheckWarning",
    "Conductor",
    "Core",
    "FactorCore",
    "Family",
    "ImpedanceCurve",
    "Material",
    "Prediction",
    "RingCore",
    "TwoHoleCore",
    "Winding",
    "Wire",
    "air_core_inductance",
    "builtin_families",
    "builtin_materials",
    "choke_impedance",
    "effective_parameters",
    "family_grid",
    "family_material",
    "get_material",
    "load_material_csv",
    "parse_band",
    "parse_frequency",
    "parse_length",
    "predict",
    "purchase_label",
    "ring_core_factors",
    "sleeve",
    "winding_impedance",
]

# Sizing and comparing (the search itself is cmcheck.design.search.size(SizeSpec(...))).
from .design.compare import compare_materials, worst_case_reduction  # noqa: E402
from .design.catalogue import CoreSizes, RingSizes, builtin_ring_sizes, load_ring_sizes  # noqa: E402
from .design.search import SizeResult, SizeSpec  # noqa: E402
from .design.heat import Drive  # noqa: E402

__all__ += [
    "CoreSizes",
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
from .measurement.balance import Balance  # noqa: E402
from .measurement.qa import FileResult, Limits, Summary, evaluate_files, exit_status, summarize  # noqa: E402
from .measurement.methods import Extraction, Fixture, extract, extract_legs, reflection_z, series_through_z, shunt_through_z  # noqa: E402
from .measurement.touchstone import SParameters, read_touchstone  # noqa: E402
from .measurement.validity import Accuracy, Validity  # noqa: E402

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

# Results as reports (tables with units, figures, notes, JSON), rendered by cmcheck.reporting.
from .design.compare import compare_designs  # noqa: E402
from .design.diagnosis import Diagnosis, Remedy  # noqa: E402
from .reporting.choke_report import prediction_report  # noqa: E402
from .reporting.extraction_report import extraction_report  # noqa: E402
from .reporting.results import Figure, Report, Table  # noqa: E402
from .reporting.compare_report import comparison_report  # noqa: E402
from .reporting.size_report import size_report  # noqa: E402

__all__ += [
    "Diagnosis",
    "Figure",
    "Remedy",
    "Report",
    "Table",
    "compare_designs",
    "comparison_report",
    "extraction_report",
    "prediction_report",
    "size_report",
]
