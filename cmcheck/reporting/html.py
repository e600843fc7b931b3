"""One self-contained, offline HTML page of a :class:`~cmcheck.reporting.results.Report`.

The page is rendered from the same report as the console: the same lines and tables (every
number formatted by :func:`cmcheck.reporting.text.format_table`, so the page and the terminal
show the same text), the report's figures drawn by :mod:`cmcheck.reporting.plots` and embedded
as PNG data URIs, the inputs, the cautions and the cmcheck version.

Offline and inert by construction: no scripts, no external fonts, styles or links; a
Content-Security-Policy meta tag (:data:`CSP`) forbids the browser any request beyond the
page's own inline style and ``data:`` images; every string that can come from a user (file and
material names, titles, inputs, notes, table cells) is escaped with :func:`html.escape`.
"""

from __future__ import annotations

import base64
import html
from typing import Any, Mapping, Sequence

from .files import atomic_write
from .results import Figure, Report, Table, Text
from .text import format_table

__all__ = ["CSP", "render_html", "write_html"]

#: The page may load nothing: images only from data: URIs, styles only from its own <style>.
CSP = "default-src 'none'; img-src data:; style-src 'unsafe-inline'; base-uri 'none'; form-action 'none'"

_STYLE = """
body { font-family: system-ui, sans-serif; color: #1d2733; margin: 2em auto; max-width: 62em;
       padding: 0 1.2em; line-height: 1.45; background: #ffffff; }
h1 { font-size: 1.35em; margin-bottom: 0.2em; }
h3 { font-size: 1.0em; margin-top: 1.4em; }
h2 { font-size: 1.1em; margin-top: 1.8em; border-bottom: 1px solid #d5dde6; padding-bottom: 0.2em; }
p.meta { color: #5d6d7e; margin-top: 0; font-size: 0.9em; }
p.strong { font-weight: 600; }
table { border-collapse: collapse; margin: 0.8em 0 1.2em; font-size: 0.9em; }
caption { text-align: left; font-weight: 600; padding-bottom: 0.3em; }
th, td { padding: 0.2em 0.7em; border-bottom: 1px solid #e4e9ef; vertical-align: top; }
th { text-align: left; background: #f2f5f8; font-weight: 600; }
td.num, th.num { text-align: right; font-variant-numeric: tabular-nums; white-space: nowrap; }
td.word { overflow-wrap: anywhere; }
dl { display: grid; grid-template-columns: max-content auto; gap: 0.2em 1em; }
dt { font-weight: 600; } dd { margin: 0; overflow-wrap: anywhere; }
figure { margin: 1em 0; } figure img { max-width: 100%; height: auto; border: 1px solid #e4e9ef; }
figcaption { color: #5d6d7e; font-size: 0.85em; }
ul.notes li { margin-bottom: 0.3em; }
footer { margin-top: 2.5em; color: #5d6d7e; font-size: 0.85em; }
"""


def _e(value: Any) -> str:
    return html.escape(str(value), quote=True)


def _numeric(table: Table, i: int) -> bool:
    c = table.columns[i]
    return c.format != "text" or (bool(c.unit) and "[" in c.header)


def _table(table: Table) -> str:
    cells = format_table(table)
    num = [_numeric(table, i) for i in range(len(table.columns))]
    out = ["<table>"]
    if table.title:
        out.append(f"<caption>{_e(table.title)}</caption>")
    out.append("<thead><tr>" + "".join(f'<th class="{"num" if n else "word"}">{_e(c.header)}</th>'
                                       for c, n in zip(table.columns, num)) + "</tr></thead><tbody>")
    for row in cells:
        out.append("<tr>" + "".join(f'<td class="{"num" if n else "word"}">{_e(v)}</td>' for v, n in zip(row, num))
                   + "</tr>")
    out.append("</tbody></table>")
    return "\n".join(out)


def _value(value: Any) -> str:
    if isinstance(value, (list, tuple)):
        return "<br>".join(_e(v) for v in value) if value else "–"
    return "–" if value is None else _e(value)


def _inputs(inputs: Mapping[str, Any]) -> str:
    rows = "".join(f"<dt>{_e(k)}</dt><dd>{_value(v)}</dd>" for k, v in inputs.items())
    return f"<dl>{rows}</dl>" if rows else "<p>–</p>"


def _figure(figure: Figure, index: int) -> str:
    from .plots import figure_bytes

    data = base64.b64encode(figure_bytes(figure, "png")).decode("ascii")
    caption = figure.title or f"Figure {index}"
    return (f'<figure><img src="data:image/png;base64,{data}" alt="{_e(caption)}">'
            f"<figcaption>Figure {index}: {_e(caption)}</figcaption></figure>")


def _sections(report: Report, heading: str) -> list[str]:
    """Inputs, results, plots and cautions of one report, under ``<heading>`` titles."""
    h = heading
    parts = [f"<section><{h}>Inputs</{h}>", _inputs(report.inputs), "</section>", f"<section><{h}>Results</{h}>"]
    for block in report.body:
        if isinstance(block, Text):
            parts.append(f'<p class="{"strong" if block.bold else "line"}">{_e(block.text)}</p>')
        else:
            parts.append(_table(block))
    parts.append("</section>")
    if report.figures:
        parts.append(f"<section><{h}>Plots</{h}>")
        parts += [_figure(f, i) for i, f in enumerate(report.figures, 1)]
        parts.append("</section>")
    if report.notes:
        parts.append(f'<section><{h}>Cautions</{h}><ul class="notes">')
        parts += [f"<li>{_e(n)}</li>" for n in report.notes]
        parts.append("</ul></section>")
    return parts


def render_html(report: Report | Sequence[Report], *, version: str | None = None, title: str | None = None) -> str:
    """The report — or several, one section each — as one HTML document (a string).

    ``version`` defaults to this cmcheck's; ``title`` to the (first) report's title.
    """
    if version is None:
        from .. import __version__ as version
    reports = [report] if isinstance(report, Report) else list(report)
    title = title if title is not None else reports[0].title
    parts = ["<!DOCTYPE html>", '<html lang="en"><head><meta charset="utf-8">',
             f'<meta http-equiv="Content-Security-Policy" content="{CSP}">',  # our constant: no double quote
             '<meta name="referrer" content="no-referrer">',
             '<meta name="viewport" content="width=device-width, initial-scale=1">',
             f"<title>{_e(title)} (cmcheck)</title>", f"<style>{_STYLE}</style></head><body>",
             f"<header><h1>{_e(title)}</h1><p class=\"meta\">cmcheck {_e(version)}</p></header>"]
    if len(reports) == 1:
        parts += _sections(reports[0], "h2")
    else:
        for r in reports:
            parts += [f"<article><h2>{_e(r.title)}</h2>"] + _sections(r, "h3") + ["</article>"]
    parts.append(f"<footer>Written by cmcheck {_e(version)}. Engineering estimates and measurements: "
                 "check them before relying on them.</footer></body></html>")
    return "\n".join(parts) + "\n"


def write_html(path, report: Report | Sequence[Report], *, title: str | None = None) -> None:
    """Write the HTML page of one report or several, atomically (see :func:`render_html`)."""
    text = render_html(report, title=title)
    atomic_write(path, lambda p: p.write_text(text, encoding="utf-8"))
