"""Drawing report figures in the project's one plot style: PNG, SVG or PDF, written whole or not at all.

Every command's plot is drawn from a :class:`~cmcheck.reporting.results.Figure` here, so they
all look alike: log-frequency axes labelled in Hz, kHz or MHz (chosen from the span shown),
the band shaded with a legend entry, the target as a dash-dot line, the self-resonance
marked, points that are not valid drawn thin with hollow markers in their curve's own colour,
file names shortened to the part that tells them apart, and the legend beside the axes when
it has many entries. The style is the project's own (no published source).

matplotlib is imported only when a plot is drawn (the library and the command line start
without it), and figures are drawn without pyplot's global state.
"""

from __future__ import annotations

import io
import os
import textwrap
from pathlib import Path
from typing import Sequence

import numpy as np

from ..curve import true_runs
from ..errors import CmcheckError
from ..units import format_quantity
from .files import atomic_write
from .results import Figure

__all__ = ["PLOT_FORMATS", "figure_bytes", "plot_curves", "plot_figure", "plot_format", "short_labels"]

#: File extension → format written.
PLOT_FORMATS = {".png": "png", ".svg": "svg", ".pdf": "pdf"}

#: The project's colours: distinct in hue and lightness, readable on white and in grey print.
PALETTE = ("#1f5fa8", "#d1603d", "#2e8b57", "#8e44ad", "#b8860b", "#17a2b8", "#c0392b", "#5d6d7e",
           "#e67e22", "#27ae60", "#34495e", "#d35400")
_BAND = "#e8eef6"
_QUANTITY_STYLE = {"R": "-", "X": "--", "|X|": "--", "|Z|": ":"}
_STYLE = {
    "font.size": 9, "axes.titlesize": 10, "axes.labelsize": 9, "legend.fontsize": 8,
    "axes.spines.top": False, "axes.spines.right": False, "axes.edgecolor": "#555555",
    "axes.grid": True, "grid.color": "#dddddd", "grid.linewidth": 0.6, "axes.axisbelow": True,
    "lines.linewidth": 1.5, "legend.frameon": False, "svg.fonttype": "path", "svg.hashsalt": "cmcheck", "savefig.dpi": 120,
    "figure.facecolor": "white", "axes.facecolor": "white", "pdf.fonttype": 42,
}
#: Legend entries beyond which the legend moves beside the axes.
_INSIDE_MAX = 6
#: Invalid points marked per run at most (markers thin out on long runs).
_MARKS_PER_RUN = 40


def plot_format(path) -> str:
    """The format of a plot file from its extension: png, svg or pdf; anything else is an error."""
    ext = Path(path).suffix.lower()
    if ext not in PLOT_FORMATS:
        raise CmcheckError(f"{path}: unknown plot format {ext or '(no extension)'!r}; use .png, .svg or .pdf")
    return PLOT_FORMATS[ext]


def short_labels(labels: Sequence[str]) -> tuple[list[str], str]:
    """Labels without what they all share: (shortened labels, the shared part as ``prefix…suffix``).

    The common prefix and suffix are cut back to a separator (``/ _ - . space``) so that a
    number is not split (``unit_09``, ``unit_10`` → ``09``, ``10``). One label, or labels that
    would become empty, are returned whole.
    """
    labels = [str(x) for x in labels]
    if len(labels) < 2 or len(set(labels)) < len(labels):
        return labels, ""
    seps = "/\\_-. "
    pre = os.path.commonprefix(labels)
    cut = max(pre.rfind(c) for c in seps) + 1
    pre = pre[:cut]
    rev = os.path.commonprefix([x[len(pre):][::-1] for x in labels])[::-1]
    idx = [i for i, c in enumerate(rev) if c in seps]
    suf = rev[idx[0]:] if idx else ""
    short = [x[len(pre):len(x) - len(suf)] for x in labels]
    if any(not s for s in short):
        return labels, ""
    # The shared part is context (a legend's title): its folder path adds nothing but width.
    shown = pre[max(pre.rfind("/"), pre.rfind("\\")) + 1:]
    return short, (f"{shown}…{suf}" if pre or suf else "")


def _matplotlib():
    import matplotlib

    matplotlib.use("Agg")
    from matplotlib.figure import Figure as MplFigure

    return matplotlib, MplFigure


def _frequency_axis(ax, lo: float, hi: float) -> None:
    """Log axis labelled in Hz, kHz, MHz or GHz, the unit chosen from the middle of the span."""
    from matplotlib.ticker import FuncFormatter, LogLocator, NullFormatter

    mid = np.sqrt(lo * hi)
    scale, unit = next(((s, u) for s, u in ((1e9, "GHz"), (1e6, "MHz"), (1e3, "kHz")) if mid >= s), (1.0, "Hz"))
    ax.set_xscale("log")
    ax.set_xlim(lo, hi)
    decades = np.log10(hi / lo)
    subs = (1.0, 2.0, 5.0) if decades <= 3.5 else (1.0,)
    label = FuncFormatter(lambda v, _: f"{v / scale:g}")
    ax.xaxis.set_major_locator(LogLocator(base=10, subs=subs))
    ax.xaxis.set_major_formatter(label)
    # A narrow span has too few major ticks: label the minor ones as well.
    ax.xaxis.set_minor_formatter(label if decades < 0.5 else NullFormatter())
    ax.set_xlabel(f"frequency [{unit}]")


def _draw_line(ax, f, y, valid, color, style, label, width=1.5) -> bool:
    """A curve solid where valid, thin with hollow markers where not; True if any point was invalid."""
    valid = np.ones(f.shape, bool) if valid is None else np.asarray(valid, bool)
    ax.plot(f, np.where(valid, y, np.nan), style, color=color, lw=width, label=label)
    inv = ~valid & np.isfinite(y)
    if not inv.any():
        return False
    ax.plot(f, np.where(inv | np.r_[inv[1:], False] | np.r_[False, inv[:-1]], y, np.nan), style, color=color,
            lw=0.7, alpha=0.6)
    pts = np.concatenate([np.arange(a, b)[::max(1, (b - a) // _MARKS_PER_RUN)] for a, b in true_runs(inv)])
    ax.plot(f[pts], y[pts], "o", ms=3.2, mfc="white", mec=color, mew=0.9, ls="none")
    return True


def _decorate(ax, figure: Figure, first: bool, invalid: bool) -> None:
    from matplotlib.lines import Line2D

    if figure.band is not None:
        for i, (lo, hi) in enumerate(figure.band.segments):
            ax.axvspan(lo, hi, color=_BAND, lw=0, zorder=0, label=f"band {figure.band}" if first and i == 0 else None)
    for k, (f0, text) in enumerate(figure.markers):
        ax.axvline(f0, color="#444444", lw=0.9, ls=(0, (1, 2)), label=text if first else None)
    if first and figure.target is not None:
        text = format_quantity(figure.target, "Ω") if figure.kind == "impedance" else f"{figure.target:g}"
        ax.axhline(figure.target, color="#222222", lw=1.0, ls="-.", label=figure.target_label or f"target {text}")
    if first and invalid:
        ax.add_line(Line2D([], [], ls="none", marker="o", ms=3.2, mfc="white", mec="#555555",
                           label="hollow: not valid"))


def _legend(fig, ax, title: str = "") -> None:
    handles, labels = ax.get_legend_handles_labels()
    if not handles:
        return
    longest = max(len(x) for x in labels)
    if len(handles) > _INSIDE_MAX or longest > 28:
        ax.legend(handles, labels, loc="upper left", bbox_to_anchor=(1.01, 1.0), borderaxespad=0.0,
                  title="\n".join(textwrap.wrap(title, 36)) or None, title_fontsize=8)
    else:
        ax.legend(handles, labels, loc="best", title=title or None, title_fontsize=8,
                  frameon=True, framealpha=0.85, edgecolor="none")


def _span(figure: Figure) -> tuple[float, float]:
    fs = [c.frequency_hz for c in figure.curves] + [s.frequency_hz for s in figure.series]
    fs += [s.frequency_hz for _, group in figure.panels for s in group]
    f = np.concatenate([np.asarray(x, float) for x in fs]) if fs else np.array([1.0, 10.0])
    f = f[np.isfinite(f) & (f > 0)]
    lo, hi = (float(f.min()), float(f.max())) if f.size else (1.0, 10.0)
    return (lo, hi) if hi > lo else (lo / 1.1, hi * 1.1)


def _impedance(fig, figure: Figure) -> None:
    from matplotlib.ticker import EngFormatter

    ax = fig.add_subplot(1, 1, 1)
    curves = figure.curves
    many = len(curves) > 1
    names, common = short_labels([c.label or f"curve {i + 1}" for i, c in enumerate(curves)]) if many else ([], "")
    invalid = False
    for i, c in enumerate(curves):
        data = {"R": c.resistance, "X": c.reactance, "|X|": np.abs(c.reactance), "|Z|": c.magnitude}
        for j, q in enumerate(figure.quantities):
            color = PALETTE[i % len(PALETTE)] if many else PALETTE[j % len(PALETTE)]
            label = (f"{names[i]} {q}" if len(figure.quantities) > 1 else names[i]) if many else q
            invalid |= _draw_line(ax, c.frequency_hz, np.asarray(data[q], float), c.valid, color,
                                  _QUANTITY_STYLE[q], label)
    _resonances(ax, figure, many)
    _decorate(ax, figure, True, invalid)
    _frequency_axis(ax, *_span(figure))
    qs = figure.quantities
    ax.set_ylabel(f"{', '.join(qs)} [Ω]" if len(qs) < 4 else "impedance [Ω]")
    ax.yaxis.set_major_formatter(EngFormatter(sep=""))
    if any(q == "X" for q in qs):
        ax.axhline(0, color="#888888", lw=0.6)
    _title(ax, figure.title)
    _legend(fig, ax, common)


def _resonances(ax, figure: Figure, many: bool) -> None:
    """Each curve's self-resonance as a downward triangle on its first quantity, in its colour."""
    from matplotlib.lines import Line2D

    marked = False
    q = figure.quantities[0]
    for i, (c, f0) in enumerate(zip(figure.curves, figure.resonances)):
        if not f0 or not (c.frequency_hz[0] <= f0 <= c.frequency_hz[-1]):
            continue
        values = {"R": c.resistance, "X": c.reactance, "|X|": np.abs(c.reactance), "|Z|": c.magnitude}[q]
        y = np.interp(np.log(f0), np.log(c.frequency_hz), np.asarray(values, float))
        color = PALETTE[i % len(PALETTE)] if many else PALETTE[0]
        ax.plot([f0], [y], "v", ms=7, color=color, mec="white", mew=0.8, zorder=5)
        marked = True
    if marked:
        ax.add_line(Line2D([], [], ls="none", marker="v", ms=7, color="#555555", label="self-resonance"))


def _series(fig, figure: Figure) -> None:
    panels = [(figure.y_label, figure.series)] + list(figure.panels)
    names, common = short_labels([s.label for s in figure.series])
    if len(names) == 1:
        names = [os.path.basename(names[0]) or names[0]]  # the title says where it came from
    axes = []
    for k, (ylabel, group) in enumerate(panels):
        ax = fig.add_subplot(len(panels), 1, k + 1, sharex=axes[0] if axes else None)
        axes.append(ax)
        invalid = False
        for i, s in enumerate(group):
            label = names[i] if k == 0 and i < len(names) else None
            invalid |= _draw_line(ax, np.asarray(s.frequency_hz, float), np.asarray(s.values, float), s.valid,
                                  PALETTE[i % len(PALETTE)], "-", label)
        _decorate(ax, figure, k == 0, invalid)
        ax.set_ylabel(ylabel)
        if k > 0:
            ax.axhline(0, color="#888888", lw=0.6)
    _frequency_axis(axes[-1], *_span(figure))
    for ax in axes[:-1]:
        ax.tick_params(labelbottom=False)
        ax.set_xlabel("")
    _title(axes[0], figure.title)
    _legend(fig, axes[0], common)


def _title(ax, title: str) -> None:
    if title:
        ax.set_title("\n".join(textwrap.wrap(title, 90)), loc="left")


def _render(figure: Figure):
    matplotlib, MplFigure = _matplotlib()
    with matplotlib.rc_context(_STYLE):
        rows = 1 + (len(figure.panels) if figure.kind == "series" else 0)
        fig = MplFigure(figsize=(8.5, 4.6 if rows == 1 else 2.6 + 1.9 * rows), layout="constrained")
        if figure.kind == "impedance":
            _impedance(fig, figure)
        else:
            _series(fig, figure)
        return fig, dict(_STYLE)


def figure_bytes(figure: Figure, fmt: str = "png") -> bytes:
    """One figure rendered in memory (PNG, SVG or PDF bytes), e.g. for an HTML page."""
    matplotlib, _ = _matplotlib()
    fig, style = _render(figure)
    buf = io.BytesIO()
    with matplotlib.rc_context(style):
        # No creation date or software stamp: the same report gives the same bytes.
        meta = {"Date": None} if fmt in ("svg", "pdf") else {"Software": None}
        fig.savefig(buf, format=fmt, metadata=meta, bbox_inches="tight", pad_inches=0.08)
    return buf.getvalue()


def plot_figure(path, figure: Figure) -> None:
    """Draw a report figure into ``path``, its format from the extension (.png, .svg, .pdf), atomically."""
    data = figure_bytes(figure, plot_format(path))
    atomic_write(path, lambda p: p.write_bytes(data))


def plot_curves(path, curves, *, band=None, title: str = "", quantities=("R", "X", "|Z|"), target_ohm=None) -> None:
    """Plot impedance curves into ``path`` (kept for callers of the earlier interface)."""
    plot_figure(path, Figure("impedance", title=title, curves=tuple(curves), quantities=tuple(quantities),
                             band=band, target=target_ohm))
