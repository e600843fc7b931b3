"""Core sizes for the sizing search: the built-in generic rings and sleeves, and users' tables.

The built-in table (``data/ring_sizes.csv``) lists sizes by dimensions only, no makers or part
numbers. Users add their own with a CSV file whose rows each have a kind; the catalogue turns
every row into a core object (:class:`cmcheck.model.cores.Core`), and the search works on those.

Kinds and their columns (millimetres ``*_mm`` or metres ``*_m``):

- ``ring``: ``od``, ``id``, ``height`` (height of one ring);
- ``sleeve``: the same, height = length along the cable (a ring by another name);
- ``two-hole``: ``width`` (across both holes), ``thickness``, ``length`` (along the holes),
  ``hole`` (diameter), ``hole_spacing`` (centre distance).

One file may mix kinds: the header names every column any of its rows needs, and a row leaves
the other kinds' cells empty. ``kind`` may be left out, meaning ring.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace
from functools import lru_cache
from importlib import resources
from typing import Callable, Sequence

import numpy as np

from ..errors import DimensionError
from ..model.cores import Core, RingCore, sleeve
from ..model.cores import ring_bend_radius as bend_radius  # former home of the ring's bend radius
from ..model.two_hole import TwoHoleCore
from ..tables import Table, parse_table, read_table

__all__ = ["CoreSizes", "KINDS", "RingSizes", "bend_radius", "builtin_ring_sizes", "load_ring_sizes"]


def _mm(v: float) -> str:
    return f"{v * 1e3:.4g}"


@dataclass(frozen=True)
class _Kind:
    columns: tuple[str, ...]
    build: Callable[..., Core]
    label: Callable[..., str]


#: How a row of each kind becomes a core: its columns (without unit suffix), in the order the
#: builder takes them, and a short label of its dimensions.
KINDS: dict[str, _Kind] = {
    "ring": _Kind(("od", "id", "height"), lambda od, id, h: RingCore(od, id, h),
                  lambda od, id, h: f"ring {_mm(od)} × {_mm(id)} × {_mm(h)} mm"),
    "sleeve": _Kind(("od", "id", "height"), lambda od, id, h: sleeve(od, id, h),
                    lambda od, id, h: f"sleeve {_mm(od)} × {_mm(id)} × {_mm(h)} mm"),
    "two-hole": _Kind(("width", "thickness", "length", "hole", "hole_spacing"), TwoHoleCore,
                      lambda w, t, L, d, s: f"two-hole {_mm(w)} × {_mm(t)} × {_mm(L)} mm, holes {_mm(d)} at {_mm(s)} mm"),
}


@dataclass(frozen=True, eq=False)
class CoreSizes:
    """A table of core sizes: one core object (a single piece) per row.

    Attributes
    ----------
    kind : tuple of str
        The row's kind (``ring``, ``sleeve``, ``two-hole``), for display.
    cores : tuple of Core
        One piece per row; the search stacks them with ``core.stacked(k)``.
    labels : tuple of str
        Short dimension text per row, e.g. ``ring 61 × 35.55 × 12.7 mm``.
    source : tuple of str
        Where each row came from (``built-in`` or the file name), for messages.
    series : str
        Which size series the table is: its ``# series:`` comment line, else the file name;
        joined with `` + `` when tables are added. Lets a search say what it searched.
    """

    kind: tuple[str, ...]
    cores: tuple[Core, ...]
    labels: tuple[str, ...]
    source: tuple[str, ...]
    series: str = ""

    def __post_init__(self) -> None:
        for name in ("kind", "cores", "labels", "source"):
            object.__setattr__(self, name, tuple(getattr(self, name)))
        if not (len(self.cores) == len(self.labels) == len(self.source) == len(self.kind)):
            raise DimensionError("core size table: columns of different lengths")

    def __len__(self) -> int:
        return len(self.kind)

    def label(self, i: int) -> str:
        """E.g. ``ring 61 × 35.55 × 12.7 mm``."""
        return self.labels[i]

    @property
    def window_diameters(self) -> np.ndarray:
        """Hole diameter of each row's core [m]."""
        return np.array([c.window_diameter for c in self.cores], float)

    def subset(self, rows: Sequence[int]) -> "CoreSizes":
        """The rows ``rows``, in that order."""
        return CoreSizes(*(tuple(getattr(self, n)[i] for i in rows) for n in ("kind", "cores", "labels", "source")),
                         series=self.series)

    def __add__(self, other: "CoreSizes") -> "CoreSizes":
        return CoreSizes(self.kind + other.kind, self.cores + other.cores, self.labels + other.labels,
                         self.source + other.source, " + ".join(s for s in (self.series, other.series) if s))


def RingSizes(kind, od, id, height, source) -> CoreSizes:  # noqa: N802 - the former class name, kept
    """A :class:`CoreSizes` of rings and sleeves from columns of dimensions [m]."""
    rows = [(k, (float(a), float(b), float(c))) for k, a, b, c in zip(kind, od, id, height)]
    return CoreSizes(tuple(kind), tuple(KINDS[k].build(*v) for k, v in rows),
                     tuple(KINDS[k].label(*v) for k, v in rows), tuple(source))


def _parse_ring_sizes(text: str, where: str, source: str | None = None) -> CoreSizes:
    return _core_sizes(parse_table(text, where, DimensionError), where, source)


def _header_help() -> str:
    return " or ".join("kind," + ",".join(f"{c}_mm" for c in k.columns) for n, k in KINDS.items() if n != "sleeve")


def _core_sizes(table: Table, where: str, source: str | None = None) -> CoreSizes:
    header = table.header
    cols: dict[str, tuple[int, float]] = {}
    for i, h in enumerate(header):
        for suffix, scale in (("_mm", 1e-3), ("_m", 1.0)):
            if h.endswith(suffix) and h[: -len(suffix)] not in cols:
                cols[h[: -len(suffix)]] = (i, scale)
                break
    if not any(all(c in cols for c in k.columns) for k in KINDS.values()):
        raise DimensionError(f"{where}: header must name {_header_help()} (or *_m for metres), got {table.header_text}")
    k_kind = header.index("kind") if "kind" in header else None
    kinds, cores, labels = [], [], []
    for lineno, row in table.rows:
        kind = (row[k_kind].lower() if k_kind is not None and k_kind < len(row) and row[k_kind] else "ring")
        if kind not in KINDS:
            raise DimensionError(f"{where} line {lineno}: kind must be {', '.join(KINDS)}, got {kind!r}")
        spec = KINDS[kind]
        absent = [c for c in spec.columns if c not in cols]
        if absent:
            raise DimensionError(f"{where} line {lineno}: a {kind} row needs the column(s) "
                                 f"{', '.join(c + '_mm' for c in absent)} in the header")
        try:
            vals = [float(row[cols[c][0]]) * cols[c][1] for c in spec.columns]
        except (ValueError, IndexError):
            raise DimensionError(f"{where} line {lineno}: expected numbers for {', '.join(spec.columns)}: {','.join(row)}") from None
        if not all(math.isfinite(v) and v > 0 for v in vals):
            raise DimensionError(f"{where} line {lineno}: dimensions must be positive")
        try:
            core = spec.build(*vals)
        except DimensionError as exc:
            raise DimensionError(f"{where} line {lineno}: {exc}") from None
        kinds.append(kind)
        cores.append(core)
        labels.append(spec.label(*vals))
    if not kinds:
        raise DimensionError(f"{where}: the header is there but no sizes follow")
    return CoreSizes(tuple(kinds), tuple(cores), tuple(labels), (source or where,) * len(kinds))


def _series(comments: list[str], default: str) -> str:
    # A table names its series in a "# series: ..." comment line.
    for c in comments:
        if c.lower().startswith("series:"):
            return c.split(":", 1)[1].strip() or default
    return default


@lru_cache(maxsize=1)
def builtin_ring_sizes() -> CoreSizes:
    """The built-in size series of our own (``cmcheck/design/data/ring_sizes.csv``).

    Outside diameters on the ISO 3 R10 series, ID and height at fixed ratios to OD; the file's
    header comments say which and why. ``.series`` names it.
    """
    text = resources.files("cmcheck").joinpath("design/data/ring_sizes.csv").read_text(encoding="utf-8")
    table = parse_table(text, "built-in ring sizes", DimensionError)
    return replace(_core_sizes(table, "built-in ring sizes", "built-in"), series=_series(table.comments, "built-in"))


def load_ring_sizes(path) -> CoreSizes:
    """Read a user table of sizes, ``#`` comments allowed; kinds and columns as the module says.

    Header ``kind,od_mm,id_mm,height_mm`` for rings and sleeves,
    ``kind,width_mm,thickness_mm,length_mm,hole_mm,hole_spacing_mm`` for two-hole cores (both
    sets for a mixed file; ``*_m`` for metres).

    Parameters
    ----------
    path : str or os.PathLike
        The CSV file; ``kind`` (ring, sleeve or two-hole) may be left out, meaning ring.

    Raises
    ------
    DimensionError
        Naming the file and line when the table is missing, unreadable or impossible.
    """
    where = f"sizes {path}"
    try:
        table = read_table(path, where, DimensionError)
        return replace(_core_sizes(table, where, source=str(path)), series=_series(table.comments, f"user sizes {path}"))
    except DimensionError as exc:
        raise DimensionError(str(exc), parameter="sizes") from None
