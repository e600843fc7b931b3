"""Generic ring and sleeve sizes for the sizing search, and the bend a cable takes round them.

The built-in table (``data/ring_sizes.csv``) lists sizes by dimensions only, no makers or part
numbers; users add their own with a file of the same columns. A sleeve (tubular bead) is a ring
whose height is its length along the cable.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from functools import lru_cache
from importlib import resources

import numpy as np

from ..errors import DimensionError
from ..tables import Table, parse_table, read_table

__all__ = ["RingSizes", "bend_radius", "builtin_ring_sizes", "load_ring_sizes"]




@dataclass(frozen=True, eq=False)
class RingSizes:
    """A table of ring and sleeve sizes, by dimensions only.

    Attributes
    ----------
    kind : tuple of str
        ``"ring"`` or ``"sleeve"`` per row.
    od, id, height : numpy.ndarray
        Outside and inside diameter and the height (length, for a sleeve) of one piece [m].
    source : tuple of str
        Where each row came from (``built-in`` or the file name), for messages.
    """

    kind: tuple[str, ...]
    od: np.ndarray
    id: np.ndarray
    height: np.ndarray
    source: tuple[str, ...]

    def __post_init__(self) -> None:
        for name in ("od", "id", "height"):
            a = np.asarray(getattr(self, name), float).reshape(-1)
            a.setflags(write=False)
            object.__setattr__(self, name, a)
        n = len(self.kind)
        if not (self.od.size == self.id.size == self.height.size == len(self.source) == n):
            raise DimensionError("ring size table: columns of different lengths")

    def __len__(self) -> int:
        return len(self.kind)

    def label(self, i: int) -> str:
        """E.g. ``ring 61 × 35.55 × 12.7 mm``."""
        return f"{self.kind[i]} {self.od[i] * 1e3:.4g} × {self.id[i] * 1e3:.4g} × {self.height[i] * 1e3:.4g} mm"

    def __add__(self, other: "RingSizes") -> "RingSizes":
        return RingSizes(
            self.kind + other.kind,
            np.concatenate([self.od, other.od]),
            np.concatenate([self.id, other.id]),
            np.concatenate([self.height, other.height]),
            self.source + other.source,
        )


def _parse_ring_sizes(text: str, where: str, source: str | None = None) -> RingSizes:
    return _ring_sizes(parse_table(text, where, DimensionError), where, source)


def _ring_sizes(table: Table, where: str, source: str | None = None) -> RingSizes:
    header = table.header
    units = {"od_mm": 1e-3, "id_mm": 1e-3, "height_mm": 1e-3, "od_m": 1.0, "id_m": 1.0, "height_m": 1.0}
    cols = {}
    for key in ("od", "id", "height"):
        found = [h for h in header if h in (f"{key}_mm", f"{key}_m")]
        if not found:
            raise DimensionError(
                f"{where}: header must name kind,od_mm,id_mm,height_mm (or *_m for metres), got {table.header_text}"
            )
        cols[key] = (header.index(found[0]), units[found[0]])
    k_kind = header.index("kind") if "kind" in header else None
    kinds, od, idd, h = [], [], [], []
    for lineno, row in table.rows:
        try:
            vals = {k: float(row[i]) * s for k, (i, s) in cols.items()}
        except (ValueError, IndexError):
            raise DimensionError(f"{where} line {lineno}: expected numbers for od, id and height: {','.join(row)}") from None
        kind = (row[k_kind].lower() if k_kind is not None and k_kind < len(row) and row[k_kind] else "ring")
        if kind not in ("ring", "sleeve"):
            raise DimensionError(f"{where} line {lineno}: kind must be ring or sleeve, got {kind!r}")
        if not all(math.isfinite(v) and v > 0 for v in vals.values()):
            raise DimensionError(f"{where} line {lineno}: dimensions must be positive")
        if vals["id"] >= vals["od"]:
            raise DimensionError(f"{where} line {lineno}: ID must be smaller than OD")
        kinds.append(kind)
        od.append(vals["od"])
        idd.append(vals["id"])
        h.append(vals["height"])
    if not kinds:
        raise DimensionError(f"{where}: the header is there but no sizes follow")
    return RingSizes(tuple(kinds), np.array(od), np.array(idd), np.array(h), (source or where,) * len(kinds))


@lru_cache(maxsize=1)
def builtin_ring_sizes() -> RingSizes:
    """The built-in generic ring and sleeve sizes (``cmcheck/design/data/ring_sizes.csv``)."""
    text = resources.files("cmcheck").joinpath("design/data/ring_sizes.csv").read_text(encoding="utf-8")
    return _parse_ring_sizes(text, "built-in ring sizes", source="built-in")


def load_ring_sizes(path) -> RingSizes:
    """Read a user table of sizes: header ``kind,od_mm,id_mm,height_mm`` (or ``*_m``), ``#`` comments.

    Parameters
    ----------
    path : str or os.PathLike
        The CSV file; ``kind`` (ring or sleeve) may be left out, meaning ring.

    Raises
    ------
    DimensionError
        Naming the file and line when the table is missing, unreadable or impossible.
    """
    where = f"sizes {path}"
    try:
        return _ring_sizes(read_table(path, where, DimensionError), where, source=str(path))
    except DimensionError as exc:
        raise DimensionError(str(exc), parameter="sizes") from None


def bend_radius(core_od, core_id, height, conductor_od):
    """Bend radius of a conductor wound round a ring's section, at its tightest [m].

    A stiff cable does not follow the section's corners: it wraps 180° round the narrower side
    of the section (radial width (OD − ID)/2 or axial height), so its centre line bends with
    radius ≈ (narrower side + conductor OD)/2.

    Parameters
    ----------
    core_od, core_id, height : array_like
        Ring or stack outside diameter, inside diameter and total height [m].
    conductor_od : array_like
        Cable outside diameter [m].

    Returns
    -------
    numpy.ndarray or float
        Bend radius of the cable's centre line [m].

    References
    ----------
    Elementary geometry of a conductor wrapped round a rectangle; the simplification (a half
    circle round the narrow side) is common practice, no published source.
    """
    w = (np.asarray(core_od, float) - np.asarray(core_id, float)) / 2.0
    r = (np.minimum(w, np.asarray(height, float)) + np.asarray(conductor_od, float)) / 2.0
    return float(r) if np.ndim(r) == 0 else r
