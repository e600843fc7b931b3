"""Plots of report figures into PNG files, written whole or not at all.

matplotlib (Agg backend) is imported only when a plot is drawn: the library and the
command line start without it.
"""

from __future__ import annotations

from typing import Sequence

import numpy as np

from ..curve import ImpedanceCurve, true_runs
from .files import atomic_write
from .results import Figure

__all__ = ["plot_curves", "plot_figure", "plot_series"]


def _pyplot():
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt

    return plt


def plot_figure(path, figure: Figure) -> None:
    """Draw a report :class:`~cmcheck.reporting.results.Figure` into a PNG, atomically."""
    if figure.kind == "impedance":
        plot_curves(path, figure.curves, band=figure.band, title=figure.title, quantities=figure.quantities,
                    target_ohm=figure.target)
    else:
        plot_series(path, figure)


def plot_series(path, figure: Figure) -> None:
    """One quantity (e.g. CMRR in dB) of several series against log-frequency; invalid points grey."""
    plt = _pyplot()
    fig, ax = plt.subplots(figsize=(8, 4.8), dpi=110)
    for i, s in enumerate(figure.series):
        v = np.ones(s.frequency_hz.shape, bool) if s.valid is None else s.valid
        ax.plot(s.frequency_hz, np.where(v, s.values, np.nan), "-", color=f"C{i % 10}", label=s.label)
        ax.plot(s.frequency_hz, np.where(~v, s.values, np.nan), "-", color="0.6", lw=1)
    _band(ax, figure.band)
    if figure.target is not None:
        ax.axhline(figure.target, color="k", lw=0.8, ls="-.", label=figure.target_label or f"target {figure.target:g}")
    ax.set_xscale("log")
    ax.set_xlabel("frequency [Hz]")
    ax.set_ylabel(figure.y_label)
    ax.grid(True, which="both", alpha=0.3)
    ax.legend(fontsize=8)
    if figure.title:
        ax.set_title(figure.title, fontsize=10)
    fig.tight_layout()
    atomic_write(path, lambda p: fig.savefig(p, format="png"))
    plt.close(fig)


def _band(ax, band) -> None:
    if band is not None:
        for lo, hi in band.segments:
            ax.axvspan(lo, hi, color="C2", alpha=0.08, lw=0)


def plot_curves(
    path,
    curves: Sequence[ImpedanceCurve],
    *,
    band=None,
    title: str = "",
    quantities: Sequence[str] = ("R", "X", "|Z|"),
    target_ohm: float | None = None,
) -> None:
    """Plot R, X and |Z| of one or more curves against log-frequency into a PNG, atomically.

    Invalid points (``curve.valid`` False) are drawn over a grey background span;
    the band, if given, is shaded.
    """
    plt = _pyplot()
    fig, ax = plt.subplots(figsize=(8, 4.8), dpi=110)
    styles = {"R": "-", "X": "--", "|Z|": ":"}
    for i, c in enumerate(curves):
        color = f"C{i}"
        prefix = f"{c.label}: " if (c.label and len(curves) > 1) else ""
        data = {"R": c.resistance, "X": c.reactance, "|Z|": c.magnitude}
        for q in quantities:
            y = np.where(c.valid, data[q], np.nan)
            ax.plot(c.frequency_hz, y, styles[q], color=color if len(curves) > 1 else {"R": "C0", "X": "C1", "|Z|": "C2"}[q],
                    label=f"{prefix}{q}")
        if not c.valid.all():
            inv = ~c.valid
            ax.plot(c.frequency_hz, np.where(inv, c.resistance, np.nan), "-", color="0.6", lw=1)
            _grey_spans(ax, c.frequency_hz, inv)
    _band(ax, band)
    if target_ohm is not None:
        ax.axhline(target_ohm, color="k", lw=0.8, ls="-.", label=f"target {target_ohm:g} Ω")
    ax.set_xscale("log")
    _frequency_axis(ax)
    ax.set_ylabel("impedance [Ω]")
    ax.axhline(0, color="k", lw=0.5)
    ax.grid(True, which="both", alpha=0.3)
    ax.legend(fontsize=8, ncol=2 if len(curves) > 1 else 1)
    if title:
        ax.set_title(title, fontsize=10)
    fig.tight_layout()
    atomic_write(path, lambda p: fig.savefig(p, format="png"))
    plt.close(fig)


def _frequency_axis(ax) -> None:
    """Label a log-frequency axis in kHz/MHz/GHz with plain numbers, not powers of ten."""
    from matplotlib.ticker import FuncFormatter, LogLocator

    lo, hi = ax.get_xlim()
    scale, unit = next(((s, u) for s, u in ((1e9, "GHz"), (1e6, "MHz"), (1e3, "kHz")) if hi >= 10 * s), (1.0, "Hz"))
    ax.xaxis.set_major_locator(LogLocator(base=10, subs=(1.0, 2.0, 5.0)))
    ax.xaxis.set_minor_formatter(FuncFormatter(lambda v, _: ""))
    ax.xaxis.set_major_formatter(FuncFormatter(lambda v, _: f"{v / scale:g}"))
    ax.set_xlabel(f"frequency [{unit}]")


def _grey_spans(ax, f: np.ndarray, mask: np.ndarray) -> None:
    for a, b in true_runs(mask):
        ax.axvspan(f[a], f[max(a, b - 1)], color="0.85", alpha=0.6, lw=0)
