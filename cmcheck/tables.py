"""Reading the small CSV tables users give: material curves and ring sizes.

Both are plain CSV with ``#`` comment lines and a header; every problem is raised as the
caller's error type with a one-line message starting with ``where`` (the file or option).
"""

from __future__ import annotations

import csv
from dataclasses import dataclass

from .errors import CmcheckError
from .inputs import read_capped

__all__ = ["Table", "parse_table", "read_table", "MAX_TABLE_BYTES"]

#: Larger tables are refused: a material curve or a size list is a few kilobytes.
MAX_TABLE_BYTES = 16 * 1024 * 1024


@dataclass(frozen=True)
class Table:
    """A parsed table: lower-cased header, data rows with their 1-based line numbers, comments."""

    header: list[str]
    header_text: str
    rows: list[tuple[int, list[str]]]
    comments: list[str]


def parse_table(text: str, where: str, error: type[CmcheckError]) -> Table:
    """Split ``text`` into comments, header and stripped data cells; ``error`` if there is no header."""
    lines = [(i, ln) for i, ln in enumerate(text.splitlines(), start=1) if ln.strip() and not ln.lstrip().startswith("#")]
    if not lines:
        raise error(f"{where}: empty")
    comments = [ln.lstrip()[1:].strip() for ln in text.splitlines() if ln.lstrip().startswith("#")]
    header_text = lines[0][1]
    header = [h.strip().lower() for h in next(csv.reader([header_text]))]
    rows = [(i, [c.strip() for c in next(csv.reader([ln]))]) for i, ln in lines[1:]]
    return Table(header, header_text.strip(), rows, comments)


def read_table(path, where: str, error: type[CmcheckError]) -> Table:
    """Read and parse a table file (a regular file of at most :data:`MAX_TABLE_BYTES`), naming ``where`` in every error."""
    data = read_capped(path, where, error, cap=MAX_TABLE_BYTES)
    try:
        text = data.decode("utf-8-sig")
    except UnicodeDecodeError:
        raise error(f"{where}: cannot be read (not UTF-8 text)") from None
    return parse_table(text, where, error)
