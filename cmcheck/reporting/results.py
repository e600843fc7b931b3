"""The common result object every command renders: tables, figures, notes and JSON.

A library result (a choke prediction, an extraction batch, a sizing search, a material
comparison) is turned into a :class:`Report` by the ``*_report`` modules beside this one.
A report holds numbers and descriptions only; the renderers decide how they look:
:mod:`cmcheck.reporting.text` (console), :mod:`cmcheck.reporting.files` (JSON, CSV),
:mod:`cmcheck.reporting.plots` (PNG, SVG, PDF), :mod:`cmcheck.reporting.html` (one offline page).
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any, Mapping, Sequence, Union

import numpy as np

__all__ = ["Cell", "Column", "Figure", "Report", "Series", "Table", "Text"]


@dataclass(frozen=True)
class Column:
    """One column of a :class:`Table`.

    Attributes
    ----------
    key : str
        Machine name, used as the CSV header and to match JSON keys (``resistance_ohm``).
    header : str
        Human header with the unit in brackets (``R [Ω]``).
    unit : str
        SI unit of the numbers in the column ("" for text and counts).
    format : str
        How the console shows a number: a Python format spec (``,.1f``) or one of the
        named styles of :mod:`cmcheck.reporting.text` (``hz``, ``hz3``, ``num``, ``flag``...).
    csv_format : str
        How a CSV file writes it: a Python format spec, ``int`` or ``text``.
    """

    key: str
    header: str
    unit: str = ""
    format: str = "text"
    csv_format: str = "text"


@dataclass(frozen=True)
class Cell:
    """A number with a word appended on screen (``25 too hot``, ``40 MHz (out)``); files get the number."""

    value: Any
    suffix: str = ""


CellValue = Union[float, int, str, bool, None, Cell]


@dataclass(frozen=True)
class Table:
    """Columns and rows of numbers (or short words); ``None`` is a missing value."""

    columns: tuple[Column, ...]
    rows: tuple[tuple[CellValue, ...], ...]
    title: str = ""
    #: The console lets the first column fold (long file names) instead of cutting it.
    fold_first: bool = False
    #: Columns that must not wrap on narrow terminals (dimension and frequency text).
    no_wrap: tuple[int, ...] = ()
    #: One space between columns (tables that must fit 80 columns).
    tight: bool = False
    #: ``#`` lines written above the table in a CSV file (provenance).
    comments: tuple[str, ...] = ()

    def __post_init__(self) -> None:
        object.__setattr__(self, "columns", tuple(self.columns))
        object.__setattr__(self, "rows", tuple(tuple(r) for r in self.rows))
        object.__setattr__(self, "comments", tuple(self.comments))
        for r in self.rows:
            if len(r) != len(self.columns):
                raise ValueError(f"table row has {len(r)} cells for {len(self.columns)} columns")

    @property
    def keys(self) -> tuple[str, ...]:
        return tuple(c.key for c in self.columns)

    def column(self, key: str) -> list:
        """The raw values of one column (a :class:`Cell` gives its value)."""
        i = self.keys.index(key)
        return [r[i].value if isinstance(r[i], Cell) else r[i] for r in self.rows]


@dataclass(frozen=True, eq=False)
class Series:
    """One curve of a :class:`Figure`: values against frequency, with a validity mask."""

    label: str
    frequency_hz: np.ndarray
    values: np.ndarray
    valid: np.ndarray | None = None


@dataclass(frozen=True, eq=False)
class Figure:
    """What to plot, not how.

    ``kind`` "impedance": ``curves`` are :class:`~cmcheck.curve.ImpedanceCurve` objects and
    ``quantities`` picks from R, X, |X| and |Z|. ``kind`` "series": ``series`` of one quantity
    (``y_label``), e.g. CMRR in dB, and optional further ``panels`` ((y label, series), ...)
    drawn below it on the same frequency axis (amplitude and phase imbalance). ``band`` is
    shaded; ``target`` draws a horizontal line on the first panel; ``markers`` are
    (frequency [Hz], label) pairs marked on the frequency axis (self-resonance of one curve);
    ``resonances`` gives each curve's own self-resonance [Hz] (None: none), marked on it.
    """

    kind: str
    title: str = ""
    curves: tuple = ()
    quantities: tuple[str, ...] = ("R", "X", "|Z|")
    series: tuple[Series, ...] = ()
    y_label: str = ""
    band: Any = None
    target: float | None = None
    target_label: str = ""
    panels: tuple[tuple[str, tuple[Series, ...]], ...] = ()
    markers: tuple[tuple[float, str], ...] = ()
    resonances: tuple[float | None, ...] = ()

    def __post_init__(self) -> None:
        if self.kind not in ("impedance", "series"):
            raise ValueError(f"figure kind must be 'impedance' or 'series', got {self.kind!r}")
        object.__setattr__(self, "curves", tuple(self.curves))
        object.__setattr__(self, "series", tuple(self.series))
        object.__setattr__(self, "panels", tuple((label, tuple(s)) for label, s in self.panels))
        object.__setattr__(self, "markers", tuple(self.markers))
        object.__setattr__(self, "resonances", tuple(self.resonances))


@dataclass(frozen=True)
class Text:
    """A line of prose between tables; ``bold`` for headings."""

    text: str
    bold: bool = False


Block = Union[Text, Table]


@dataclass(frozen=True, eq=False)
class Report:
    """Everything one command shows or writes about one result.

    Attributes
    ----------
    title : str
    inputs : mapping
        What the result was computed from (design description, band, files...).
    body : sequence of Text and Table
        What the console shows, in order (an HTML page shows the same).
    data : mapping of str to Table
        Full-resolution tables for files (``curve``, ``summary``...); the console tables
        may show a subset of their rows.
    figures : tuple of Figure
    notes : tuple of str
        Cautions and safety notes, shown after the results.
    json : dict or None
        The JSON document of the result (the library's ``to_dict``); None when there is
        nothing to write (every file of a batch unreadable).
    """

    title: str
    body: tuple[Block, ...]
    json: dict | None
    inputs: Mapping[str, Any] = field(default_factory=dict)
    data: Mapping[str, Table] = field(default_factory=dict)
    figures: tuple[Figure, ...] = ()
    notes: tuple[str, ...] = ()

    def __post_init__(self) -> None:
        object.__setattr__(self, "body", tuple(self.body))
        object.__setattr__(self, "figures", tuple(self.figures))
        object.__setattr__(self, "notes", tuple(self.notes))

    @property
    def tables(self) -> tuple[Table, ...]:
        """The tables of the body, in order."""
        return tuple(b for b in self.body if isinstance(b, Table))


def lines(texts: Sequence[str], bold_first: bool = False) -> list[Text]:
    """Wrap plain strings as :class:`Text` blocks."""
    return [Text(t, bold=bold_first and i == 0) for i, t in enumerate(texts)]
