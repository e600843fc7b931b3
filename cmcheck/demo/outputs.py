"""Writing the demo's files: the invented sweeps, and each part's JSON, CSV tables and plots,
plus one HTML page of all the reports (or, without the HTML renderer, an index of the files)."""

from __future__ import annotations

import html as html_text
import re
from pathlib import Path
from typing import Sequence

from ..errors import CmcheckError
from ..reporting.files import atomic_write, staged_outputs, write_json, write_table_csv
from ..reporting.plots import plot_figure
from . import INVENTED, Part, data_files

__all__ = ["copy_sweeps", "write_outputs"]


def _folder(out: Path) -> Path:
    if out.exists() and not out.is_dir():
        raise CmcheckError(f"{out}: exists and is not a folder")
    out.mkdir(parents=True, exist_ok=True)
    return out


def copy_sweeps(out: str | Path) -> list[Path]:
    """Copy the invented demo sweeps into ``out`` (created if needed); returns the copies."""
    out = _folder(Path(out))
    copies = []
    with staged_outputs():
        for src in data_files():
            data = src.read_bytes()
            atomic_write(out / src.name, lambda p, d=data: Path(p).write_bytes(d))
            copies.append(out / src.name)
    return copies


def write_outputs(parts: Sequence[Part], out: str | Path) -> list[Path]:
    """Write every part's JSON, CSV tables and figures into ``out``, then ``report.html`` (or
    ``index.html`` listing the files when the HTML renderer is not installed); all or none."""
    out = _folder(Path(out))
    written: list[Path] = []
    with staged_outputs():
        for part in parts:
            r = part.report
            if r.json is not None:
                write_json(out / f"{part.name}.json", r.json)
                written.append(out / f"{part.name}.json")
            # Each part's full tables; a report without any gives its console tables.
            tables = dict(r.data) or {_slug(t.title) or f"table{i}": t for i, t in enumerate(r.tables, 1)}
            for key, table in tables.items():
                path = out / f"{part.name}-{key}.csv"
                write_table_csv(path, table)
                written.append(path)
            for i, figure in enumerate(r.figures, 1):
                path = out / (f"{part.name}.png" if i == 1 else f"{part.name}-{i}.png")
                plot_figure(path, figure)
                written.append(path)
            for name, writer in part.files.items():
                writer(out / name)
                written.append(out / name)
        try:
            from ..reporting import html
        except ImportError:
            html = None
        if html is not None:
            page = out / "report.html"
            html.write_html(page, [p.report for p in parts], title=INVENTED)
        else:
            page = out / "index.html"
            atomic_write(page, lambda p: Path(p).write_text(_index(parts, written, out), encoding="utf-8"))
        written.append(page)
    return written


def _slug(title: str | None) -> str:
    """A table title as a file-name part: ``"Fitted parameters"`` → ``fitted-parameters``."""
    words = re.findall(r"[a-z0-9]+", (title or "").split("(")[0].lower())
    return "-".join(words)


def _index(parts: Sequence[Part], written: Sequence[Path], out: Path) -> str:
    """A plain page linking the files (used only when the HTML report renderer is missing)."""
    esc = html_text.escape
    items = []
    for part in parts:
        files = [p for p in written if p.name.startswith(part.name + ".") or p.name.startswith(part.name + "-")]
        links = " ".join(f'<a href="{esc(p.name)}">{esc(p.name)}</a>' for p in files)
        imgs = "".join(f'<img src="{esc(p.name)}" alt="{esc(p.name)}" width="640">' for p in files if p.suffix == ".png")
        items.append(f"<h2>{esc(part.question)}</h2><p>{esc(part.report.title)}</p><p>{links}</p>{imgs}")
    return ("<!DOCTYPE html><html lang=\"en\"><meta charset=\"utf-8\"><title>cmcheck demo</title>"
            f"<h1>cmcheck demo</h1><p><strong>{esc(INVENTED)}</strong></p>{''.join(items)}</html>\n")
