"""Transformer topologies as data: which conductor end goes to which node.

A line element lists its nodes as end 1 of every conductor, then end 2 of every conductor.
``"gnd"`` is the reference; ``input`` is driven against ground; ``outputs`` are the load's
terminals (one for an unun, two for a balun). Built-in topologies are in :data:`TOPOLOGIES`;
others are read from a TOML file (:func:`load_topology`, schema in DEVELOPERS.md).
"""

from __future__ import annotations

import tomllib
from dataclasses import dataclass
from pathlib import Path

from ..errors import TransformerError
from .circuit import GROUND

__all__ = ["LineElement", "TOPOLOGIES", "Topology", "get_topology", "load_topology", "parse_topology"]


@dataclass(frozen=True)
class LineElement:
    """One line on its own core.

    Parameters
    ----------
    end1, end2 : tuple of str
        Node of each conductor at end 1 and at end 2 (same order, 2 or 3 conductors; 4 for
        two pairs on one core).
    one_core : str or None
        For two pairs (a, b), (c, d) sharing one core: ``"opposite"`` or ``"same"``, the
        second pair's winding sense (see :func:`cmcheck.transformer.elements.two_pairs_one_core_y`).
    """

    end1: tuple
    end2: tuple
    one_core: str | None = None

    def __post_init__(self) -> None:
        if len(self.end1) != len(self.end2) or len(self.end1) < 2:
            raise TransformerError(
                f"a line needs the same number (≥ 2) of end-1 and end-2 nodes, got {len(self.end1)} and {len(self.end2)}"
            )
        if self.one_core is not None and (self.one_core not in ("opposite", "same") or len(self.end1) != 4):
            raise TransformerError(f"one_core needs 4 conductors and 'opposite' or 'same', got {self.one_core!r}")

    @property
    def winding_conductors(self) -> int:
        """Conductors of the winding spec this line uses (2 for two pairs on one core)."""
        return 2 if self.one_core else len(self.end1)

    @property
    def conductors(self) -> int:
        """Number of conductors."""
        return len(self.end1)

    @property
    def nodes(self) -> tuple:
        """All terminals in element order (end 1 of each conductor, then end 2)."""
        return tuple(self.end1) + tuple(self.end2)


@dataclass(frozen=True)
class Topology:
    """A transformer topology.

    Parameters
    ----------
    name : str
        Short name, e.g. ``"ruthroff-4:1-unun"``.
    ratio : float
        Nominal impedance ratio (output over input), e.g. 4.
    kind : str
        ``"line"`` (transmission-line transformer) or ``"flux"`` (flux-coupled).
    lines : tuple of LineElement
        The line elements (empty for ``"flux"``); each on its own core of the same design.
    input : str
        Input node (driven against ground).
    outputs : tuple of str
        Output terminals: one (unun, load to ground) or two (balun, load between them).
    description : str
        One line.
    """

    name: str
    ratio: float
    kind: str = "line"
    lines: tuple = ()
    input: str = "in"
    outputs: tuple = ("out",)
    description: str = ""

    def __post_init__(self) -> None:
        if self.kind not in ("line", "flux"):
            raise TransformerError(f"topology kind must be 'line' or 'flux', got {self.kind!r}")
        if not (isinstance(self.ratio, (int, float)) and self.ratio > 0):
            raise TransformerError(f"topology ratio must be positive, got {self.ratio!r}")
        if len(self.outputs) not in (1, 2):
            raise TransformerError(f"topology outputs must list 1 or 2 nodes, got {len(self.outputs)}")
        if self.kind == "line":
            if not self.lines:
                raise TransformerError(f"topology {self.name!r} has no line")
            counts = {ln.winding_conductors for ln in self.lines}
            if len(counts) != 1:
                raise TransformerError(f"topology {self.name!r} mixes line conductor counts {sorted(counts)}")
            used = {n for ln in self.lines for n in ln.nodes}
            for node in (self.input, *self.outputs):
                if node not in used:
                    raise TransformerError(f"topology {self.name!r}: node {node!r} is not on any line")
        if GROUND in (self.input, *self.outputs):
            raise TransformerError("input and outputs cannot be the ground node")

    @property
    def conductors(self) -> int:
        """Conductors per line (0 for flux-coupled)."""
        return self.lines[0].winding_conductors if self.lines else 0

    @property
    def balanced(self) -> bool:
        """True when the load floats between two output terminals."""
        return len(self.outputs) == 2


def _line(end1, end2, one_core=None) -> LineElement:
    return LineElement(tuple(end1), tuple(end2), one_core)


#: Built-in topologies (connections after Guanella 1944 and Ruthroff 1959; see each description).
TOPOLOGIES: dict[str, Topology] = {
    t.name: t
    for t in (
        Topology("guanella-1:1", 1, lines=(_line(("in", GROUND), ("outp", "outn")),), outputs=("outp", "outn"),
                 description="current balun: one bifilar line (Guanella, Brown Boveri Review 31, 1944)"),
        Topology("guanella-4:1", 4,
                 lines=(_line(("in", GROUND), ("outp", "mid")), _line(("in", GROUND), ("mid", "outn"))),
                 outputs=("outp", "outn"),
                 description="current balun: two lines, inputs in parallel, outputs in series, each on its own core"),
        Topology("guanella-4:1-one-core", 4,
                 lines=(LineElement(("in", GROUND, "in", GROUND), ("outp", "mid", "mid", "outn"), "opposite"),),
                 outputs=("outp", "outn"),
                 description="current balun: two pairs on one core in opposite senses, inputs parallel, outputs series"),
        Topology("ruthroff-4:1-unun", 4, lines=(_line(("in", GROUND), ("out", "in")),),
                 description="voltage-adding (bootstrap) unun (Ruthroff, Proc. IRE 47, 1959)"),
        Topology("ruthroff-4:1-balun", 4, lines=(_line((GROUND, "in"), ("outn", GROUND)),), outputs=("in", "outn"),
                 description="Ruthroff balun: load from the input terminal to the far end of the other conductor"),
        Topology("voltage-1:1", 1, lines=(_line(("in", GROUND, "outp"), ("outp", "outn", GROUND)),),
                 outputs=("outp", "outn"),
                 description="trifilar voltage balun: outputs ±V/2 about ground (Ruthroff 1959)"),
        Topology("9:1-unun", 9, lines=(_line(("in", GROUND, "x"), ("x", "in", "out")),),
                 description="trifilar voltage-adding unun: V_out = 3·V_in"),
        Topology("flux-1:N", 1, kind="flux",
                 description="flux-coupled windings on one core; the ratio comes from the transformer spec"),
    )
}


def get_topology(name_or_path) -> Topology:
    """A built-in topology by name, or one read from a ``.toml`` file."""
    key = str(name_or_path)
    if key in TOPOLOGIES:
        return TOPOLOGIES[key]
    if key.endswith(".toml"):
        return load_topology(key)
    raise TransformerError(f"unknown topology {key!r}; built in: {', '.join(TOPOLOGIES)}, or a .toml file")


def load_topology(path) -> Topology:
    """Read a topology TOML file (schema: DEVELOPERS.md, "adding a transformer topology")."""
    from ..inputs import read_capped

    p = Path(path)
    # A topology is a few dozen lines: 1 MiB is far more than any real one.
    data = read_capped(p, str(p), TransformerError, cap=1 << 20)
    try:
        text = data.decode("utf-8-sig")
    except UnicodeDecodeError:
        raise TransformerError(f"{p}: cannot be read (not UTF-8 text)", parameter="topology") from None
    return parse_topology(text, str(p))


def parse_topology(text: str, source: str = "topology") -> Topology:
    """Parse topology TOML text; errors name ``source`` and the key."""
    try:
        data = tomllib.loads(text)
    except tomllib.TOMLDecodeError as exc:
        raise TransformerError(f"{source}: not valid TOML ({exc})") from None
    allowed = {"name", "ratio", "description", "input", "outputs", "line"}
    extra = set(data) - allowed
    if extra:
        raise TransformerError(f"{source}: unknown key(s) {', '.join(sorted(extra))}")
    for key in ("name", "ratio", "line"):
        if key not in data:
            raise TransformerError(f"{source}: missing key {key!r}")
    if not isinstance(data["line"], list) or not all(isinstance(x, dict) for x in data["line"]):
        raise TransformerError(f"{source}: 'line' must be an array of tables ([[line]])")
    lines = []
    for i, entry in enumerate(data["line"], 1):
        bad = set(entry) - {"end1", "end2", "one_core"}
        if bad or "end1" not in entry or "end2" not in entry:
            raise TransformerError(f"{source}: line {i} needs the keys end1 and end2 (and optionally one_core)")
        for k in ("end1", "end2"):
            if not isinstance(entry[k], list) or not all(isinstance(n, str) and n for n in entry[k]):
                raise TransformerError(f"{source}: line {i} {k} must be a list of node names")
        try:
            lines.append(_line(entry["end1"], entry["end2"], entry.get("one_core")))
        except TransformerError as exc:
            raise TransformerError(f"{source}: line {i}: {exc}") from None
    outputs = data.get("outputs", ["out"])
    if not isinstance(outputs, list) or not all(isinstance(n, str) for n in outputs):
        raise TransformerError(f"{source}: 'outputs' must be a list of node names")
    ratio = data["ratio"]
    if isinstance(ratio, bool) or not isinstance(ratio, (int, float)):
        raise TransformerError(f"{source}: 'ratio' must be a number, got {ratio!r}")
    try:
        return Topology(str(data["name"]), float(ratio), "line", tuple(lines), str(data.get("input", "in")),
                        tuple(outputs), str(data.get("description", "")))
    except TransformerError as exc:
        raise TransformerError(f"{source}: {exc}") from None
