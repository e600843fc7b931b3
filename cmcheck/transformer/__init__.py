"""Transmission-line and flux-coupled transformers (baluns, ununs) as batched nodal circuits.

Public API: lines (:class:`PairLine`, Z0 formulas), elements (admittance stamps), the
:class:`Circuit` solver, winding specs (:class:`IdealLine`, :class:`LineWinding`,
:class:`FluxCoupled`), topologies (:data:`TOPOLOGIES`, TOML files), :class:`Load`,
:func:`analyse` / :func:`design_network`, and open/short characterisation.
"""

from .analysis import TransformerResult, analyse, build_circuit, design_network, match_figures
from .characterise import Characterisation, characterise_flux_coupled, characterise_from_files, reflection_to_impedance
from .circuit import GROUND, REFERENCE_LEAK_S, Circuit, NodalSolution
from .elements import coupled_windings_y, line_on_core_y, line_two_port_y, pair_on_core_y, two_pairs_one_core_y
from .flux import FluxCoupled, leakage_estimate, loop_inductance
from .lines import PairLine, coax_z0, default_pair_spacing, line_constants, sheathed_pair_eps_eff, two_wire_z0, winding_line_length
from .loads import Load
from .topologies import TOPOLOGIES, LineElement, Topology, get_topology, load_topology, parse_topology
from .windings import IdealLine, LineWinding

__all__ = [
    "GROUND", "REFERENCE_LEAK_S", "TOPOLOGIES", "Characterisation", "Circuit", "FluxCoupled", "IdealLine",
    "LineElement", "LineWinding", "Load", "NodalSolution", "PairLine", "Topology", "TransformerResult", "analyse",
    "build_circuit", "characterise_flux_coupled", "characterise_from_files", "coax_z0", "coupled_windings_y",
    "default_pair_spacing", "design_network", "get_topology", "leakage_estimate", "line_constants",
    "line_on_core_y", "line_two_port_y", "load_topology", "loop_inductance", "match_figures", "pair_on_core_y",
    "parse_topology", "reflection_to_impedance", "sheathed_pair_eps_eff", "two_pairs_one_core_y", "two_wire_z0",
    "winding_line_length",
]
