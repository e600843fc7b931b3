"""Writing a report's files together: JSON, CSV tables, the plot, an HTML page and a Touchstone file."""

from __future__ import annotations

import os
from typing import Callable, Mapping, Sequence

from .files import staged_outputs, write_json, write_table_csv, write_touchstone
from .plots import plot_figure, plot_format
from .results import Report

__all__ = ["write_report"]

PathLike = str | os.PathLike


def write_report(
    report: Report,
    *,
    json: PathLike | None = None,
    csv: Mapping[str, PathLike | None] | None = None,
    plot: PathLike | None = None,
    touchstone: PathLike | None = None,
    extra: Sequence[Callable[[], None]] = (),
    html: PathLike | None = None,
) -> None:
    """Write the asked outputs of ``report`` all together or none (see :func:`staged_outputs`).

    Parameters
    ----------
    json : path, optional
        The report's JSON document (skipped when the report has none).
    csv : mapping of table name to path, optional
        Tables of ``report.data`` to write as CSV (a name the report lacks is skipped).
    plot : path, optional
        The report's first figure, as PNG, SVG or PDF by the file's extension (skipped when
        it has none; any other extension is refused before anything is written).
    touchstone : path, optional
        The first figure's first impedance curve as a series two-port ``.s2p`` file.
    extra : sequence of callables
        Further writers (each writes one file through :func:`~cmcheck.reporting.files.atomic_write`),
        staged with the rest.
    html : path, optional
        The whole report as one self-contained offline HTML page (:mod:`cmcheck.reporting.html`).
    """
    if plot:
        plot_format(plot)
    with staged_outputs():
        if json and report.json is not None:
            write_json(json, report.json)
        for name, path in (csv or {}).items():
            if path and name in report.data:
                write_table_csv(path, report.data[name])
        if plot and report.figures:
            plot_figure(plot, report.figures[0])
        if html:
            from .html import write_html

            write_html(html, report)
        if touchstone:
            fig = report.figures[0]
            write_touchstone(touchstone, fig.curves[0], comments=report.data["curve"].comments)
        for write in extra:
            write()
