"""Console rendering of a :class:`~cmcheck.reporting.results.Report` with rich tables.

Numbers are formatted here, by each column's ``format``: a Python format spec, or one of
the named styles in :data:`FORMATS`. Missing values (None, NaN) show as "–".
"""

from __future__ import annotations

import math
from typing import Callable, Iterable

from rich import box
from rich.console import Console
from rich.markup import escape
from rich.table import Table as RichTable

from ..units import format_quantity
from .numbers import column_formatter, frequency_formatter, unsigned_zero
from .results import Cell, Column, Report, Table, Text

__all__ = ["FORMATS", "format_cell", "format_column", "format_table", "render", "render_notes", "render_table",
           "rich_table"]

_DASH = "–"


def _missing(v) -> bool:
    return v is None or (isinstance(v, float) and not math.isfinite(v))


def _num(v) -> str:
    """A lone number by the column rule of :mod:`cmcheck.reporting.numbers`."""
    return column_formatter([v])(v)


def _margin(m: float) -> str:
    return f"+{(m - 1) * 100:.0f} %" if m >= 1 else f"{(m - 1) * 100:.0f} %"


def _rise(k: float) -> str:
    # Past a few hundred kelvin the number only means "destroyed"; keep the table readable.
    return f"{k:.0f}" if k < 300 else ">300"


#: Named console formats; anything else in a column's ``format`` is a Python format spec.
FORMATS: dict[str, Callable] = {
    "text": str,
    "int": lambda v: str(int(v)),
    "hz": lambda v: format_quantity(v, "Hz"),
    "hz3": lambda v: format_quantity(v, "Hz", 3),
    "num": _num,
    "flag": lambda v: "yes" if v else "",
    "yesno": lambda v: "yes" if v else "no",
    "margin": _margin,
    "rise": _rise,
    "milli": lambda v: f"{v * 1e3:.2g}",
    "percent": lambda v: f"{100 * v:.0f}",
    "henry": lambda v: format_quantity(v, "H"),
    "farad": lambda v: format_quantity(v, "F"),
}


def _column_aware(column: Column, values) -> Callable | None:
    """The formatter chosen once for a whole column, for the column-aware formats."""
    fmt = column.format
    if fmt == "num":
        return column_formatter(values)
    if fmt in ("hz", "hz3") or fmt.startswith("hz:"):
        return frequency_formatter(values, 3 if fmt == "hz3" else int(fmt[3:]) if fmt.startswith("hz:") else 4)
    return None


def format_column(values, column: Column) -> list[str]:
    """The console (and HTML) text of every cell of one column, its format chosen from all of them."""
    raw = [v.value if isinstance(v, Cell) else v for v in values]
    chosen = _column_aware(column, raw)
    return [format_cell(v, column, chosen) for v in values]


def format_table(table: Table) -> list[list[str]]:
    """The text of every cell of a table, row by row."""
    cols = [format_column([r[i] for r in table.rows], c) for i, c in enumerate(table.columns)]
    return [list(row) for row in zip(*cols)] if table.rows else []


def format_cell(value, column: Column, chosen: Callable | None = None) -> str:
    """The console text of one cell (``chosen``: the column's formatter from :func:`format_column`)."""
    suffix = ""
    if isinstance(value, Cell):
        value, suffix = value.value, value.suffix
    if isinstance(value, str) and column.format != "text":
        return value + suffix  # a word where a number would be ("–", "n/a")
    if column.format in ("flag", "yesno"):
        return FORMATS[column.format](value) + suffix
    if _missing(value):
        return _DASH + suffix if value is None or column.format != "text" else str(value)
    fmt = column.format
    if chosen is not None:
        return chosen(value) + suffix
    if fmt.startswith("hz:"):
        return format_quantity(value, "Hz", int(fmt[3:])) + suffix
    if fmt in FORMATS:
        return unsigned_zero(FORMATS[fmt](value)) + suffix
    return unsigned_zero(format(value, fmt)) + suffix


def rich_table(*headers: str) -> RichTable:
    """A compact table; numeric-looking columns (with a unit in brackets) align right.

    Headers are escaped: rich would take a unit such as "[mm]" for a style tag and drop it.
    """
    t = RichTable(box=box.SIMPLE_HEAD, pad_edge=False, show_edge=False)
    for c in headers:
        t.add_column(escape(c), justify="right" if "[" in c or c in {"frequency", "µi", "µ'", "µ''", "µ''/µ'"} else "left")
    return t


def _to_rich(table: Table) -> tuple[RichTable, list[list[str]]]:
    t = rich_table(*(c.header for c in table.columns))
    for i, c in enumerate(table.columns):
        if c.format == "text" and "[" in c.header:
            t.columns[i].justify = "left"
    if table.fold_first:
        t.columns[0].overflow = "fold"
    for i in table.no_wrap:
        t.columns[i].no_wrap = True
    if table.tight:
        t.padding = (0, 1, 0, 0)
    cells = format_table(table)
    for row in cells:
        t.add_row(*(escape(x) for x in row))
    return t, cells


def render_table(table: Table, console: Console) -> None:
    """Print one table; a folding table gets the width it needs when the output is piped."""
    t, cells = _to_rich(table)
    if table.fold_first and not console.is_terminal and cells:
        # Piped output (a QA log) gets whole file names; a terminal keeps its width and folds.
        need = max(len(r[0]) for r in cells) + 12 * (len(table.columns) - 1)
        Console(highlight=False, width=max(console.width, need)).print(t)
        return
    console.print(t)


def render_notes(notes: Iterable[str], console: Console) -> None:
    """Cautions and notes after the results, one per line, marked ``note:``."""
    for n in notes:
        console.print(f"note: {n}", style="dim", markup=False)


def render(report: Report, console: Console, *, notes: bool = True) -> None:
    """Print a report: its body (lines and tables) in order, then its notes."""
    for block in report.body:
        if isinstance(block, Text):
            console.print(block.text, style="bold" if block.bold else None, markup=False)
        else:
            render_table(block, console)
    if notes:
        render_notes(report.notes, console)
