"""Marking any report as an invented example (console, JSON, CSV, plots) for ``cmcheck demo``;
the demo's parts are the commands' own reports."""

from __future__ import annotations

from dataclasses import replace

from .results import Report, Table, Text

__all__ = ["invented"]


def invented(report: Report, statement: str) -> Report:
    """``report`` stated as invented at the top of every output: first console line, first JSON
    key, first CSV comment, plot titles."""
    data = {k: replace(t, comments=(statement, *t.comments)) for k, t in report.data.items()}
    body = tuple(replace(b, comments=(statement, *b.comments)) if isinstance(b, Table) else b for b in report.body)
    figures = tuple(replace(f, title=f"INVENTED EXAMPLE: {f.title}") for f in report.figures)
    json = None if report.json is None else {"invented": statement, **report.json}
    return replace(report, body=(Text(statement, bold=True), *body), json=json, data=data, figures=figures)
