"""The command line's consoles, and printing reports on them (see :mod:`cmcheck.reporting.text`)."""

from __future__ import annotations

import os
import sys
from typing import Iterable

from rich.console import Console, ConsoleDimensions

from ..reporting.results import Report
from ..reporting.text import render, render_notes, rich_table

#: Width of tables when the output is piped or redirected: fixed, whatever COLUMNS says, so a
#: log or a README transcript reads the same everywhere (rich would take 80 or COLUMNS).
PIPED_WIDTH = 110


class _Console(Console):
    def print(self, *objects, **kwargs) -> None:
        # Lines of prose (results, notes, a command to copy) are never wrapped by us: a
        # wrapped command line cannot be pasted, and piped output must not depend on a width.
        # Tables keep their layout.
        if objects and all(isinstance(o, str) for o in objects):
            kwargs.setdefault("soft_wrap", True)
        super().print(*objects, **kwargs)

    @property
    def size(self):
        # Asked at every print: standard output may be redirected after start-up.
        size = Console.size.fget(self)
        return size if self.is_terminal else ConsoleDimensions(PIPED_WIDTH, size.height)

    @size.setter
    def size(self, value) -> None:
        Console.size.fset(self, value)

    def on_broken_pipe(self) -> None:
        # rich would exit with status 1, which here means "a limit failed"; let the one
        # place that maps errors to exit codes decide instead.
        devnull = os.open(os.devnull, os.O_WRONLY)
        os.dup2(devnull, sys.stdout.fileno())
        raise BrokenPipeError("output pipe closed")


#: Standard output; rich drops colour by itself when the output is not a terminal.
console = _Console(highlight=False)
#: Standard error, for warnings and notes that must not mix with piped tables.
err_console = Console(stderr=True, highlight=False)


def table(*columns: str):
    """A compact rich table (see :func:`cmcheck.reporting.text.rich_table`)."""
    return rich_table(*columns)


def print_notes(notes: Iterable[str]) -> None:
    """Print cautions and notes after the results, one per line, marked ``note:``."""
    render_notes(notes, console)


def show(report: Report, *, notes: bool = True) -> None:
    """Print a report on standard output."""
    render(report, console, notes=notes)
