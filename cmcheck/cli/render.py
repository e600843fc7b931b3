"""Shared rendering for the command line: one console, plain tables, notes."""

from __future__ import annotations

import os
import sys
from typing import Iterable

from rich import box
from rich.console import Console
from rich.markup import escape
from rich.table import Table

class _Console(Console):
    def on_broken_pipe(self) -> None:
        # rich would exit with status 1, which here means "a limit failed"; let the one
        # place that maps errors to exit codes decide instead.
        devnull = os.open(os.devnull, os.O_WRONLY)
        os.dup2(devnull, sys.stdout.fileno())
        raise BrokenPipeError("output pipe closed")


#: Standard output; rich drops colour by itself when the output is not a terminal.
console = _Console(highlight=False)
if not console.is_terminal and "COLUMNS" not in os.environ:
    # Piped or redirected output: rich would wrap at 80 columns; tables read better wider.
    console.width = 110
#: Standard error, for warnings and notes that must not mix with piped tables.
err_console = Console(stderr=True, highlight=False)


def table(*columns: str) -> Table:
    """A compact table; numeric-looking columns (with a unit in brackets) align right.

    Headers are escaped: rich would take a unit such as "[mm]" for a style tag and drop it.
    """
    t = Table(box=box.SIMPLE_HEAD, pad_edge=False, show_edge=False)
    for c in columns:
        t.add_column(escape(c), justify="right" if "[" in c or c in {"frequency", "µi", "µ'", "µ''", "µ''/µ'"} else "left")
    return t


def print_notes(notes: Iterable[str]) -> None:
    """Print cautions and notes after the results, one per line, marked ``note:``."""
    for n in notes:
        console.print(f"note: {n}", style="dim")
