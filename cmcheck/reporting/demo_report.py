"""Reports the demo needs beyond the commands' own: a transformer analysis, a core
identification, and marking any report as an invented example (console, JSON, CSV, plots).

The transformer and identification reports are short summaries; when those commands get
their own reports, the demo can use them instead.
"""

from __future__ import annotations

from dataclasses import replace

import numpy as np

from ..units import format_quantity
from .choke_report import table_indices
from .files import SAFETY_NOTES
from .results import Column, Figure, Report, Series, Table, Text

__all__ = ["identification_report", "invented", "transformer_report"]


def invented(report: Report, statement: str) -> Report:
    """``report`` stated as invented at the top of every output: first console line, first JSON
    key, first CSV comment, plot titles."""
    data = {k: replace(t, comments=(statement, *t.comments)) for k, t in report.data.items()}
    body = tuple(replace(b, comments=(statement, *b.comments)) if isinstance(b, Table) else b for b in report.body)
    figures = tuple(replace(f, title=f"INVENTED EXAMPLE: {f.title}") for f in report.figures)
    json = None if report.json is None else {"invented": statement, **report.json}
    return replace(report, body=(Text(statement, bold=True), *body), json=json, data=data, figures=figures)


_T_COLUMNS = (
    Column("frequency_hz", "frequency", "Hz", "hz3", ".9g"),
    Column("zin_r_ohm", "Rin [Ω]", "Ω", ".1f", ".6g"),
    Column("zin_x_ohm", "Xin [Ω]", "Ω", "+.1f", ".6g"),
    Column("swr", "SWR", "", ".2f", ".5g"),
    Column("insertion_loss_db", "loss [dB]", "dB", ".2f", ".4g"),
    Column("cmrr_db", "CMRR [dB]", "dB", ".1f", ".4g"),
    Column("core_loss_w", "core [W]", "W", ".2f", ".4g"),
    Column("peak_flux_t", "B peak [mT]", "T", "milli", ".4g"),
)


def transformer_report(result, *, description: str, band, rows: int = 8) -> Report:
    """The report of :func:`cmcheck.transformer.analysis.analyse` over ``band``.

    Parameters
    ----------
    result : TransformerResult
    description : str
        What was analysed (topology, winding, core, load).
    band : Band
        The band the result covers (summaries, shading).
    rows : int
        Rows of the console table (files get every point).
    """
    f = result.frequency_hz
    zin = result.zin
    cmrr = result.cmrr_db if result.cmrr_db is not None else np.full(f.shape, np.nan)
    core = np.full(f.shape, np.nan) if result.core_loss_w is None else result.core_loss_w.max(axis=-1)
    flux = np.full(f.shape, np.nan) if result.peak_flux_t is None else result.peak_flux_t.max(axis=-1)
    full = tuple(zip(f.tolist(), zin.real.tolist(), zin.imag.tolist(), result.swr.tolist(),
                     result.insertion_loss_db.tolist(), cmrr.tolist(), core.tolist(), flux.tolist()))
    idx = table_indices(f, rows)
    shown = Table(_T_COLUMNS, tuple(full[i] for i in idx), title="transformer", no_wrap=(0,))
    worst = int(np.argmax(result.swr))
    lines = [Text(description, bold=True),
             Text(f"driven at {result.power_w:g} W from 50 Ω over {band}"),
             shown,
             Text(f"worst SWR {result.swr[worst]:.2f} at {format_quantity(f[worst], 'Hz', 3)}; "
                  f"insertion loss at most {result.insertion_loss_db.max():.2f} dB")]
    if result.cmrr_db is not None:
        text = f"model CMRR (currents into the load and its legs to ground) at least {np.nanmin(cmrr):.1f} dB"
        if result.mixed_mode_cmrr_db is not None:
            text += f"; mixed-mode |Sds21/Scs21| with 50 Ω legs (what a VNA shows) at least {result.mixed_mode_cmrr_db.min():.1f} dB"
        lines.append(Text(text))
    if result.core_loss_w is not None:
        lines.append(Text(f"hottest core: {np.nanmax(core):.2f} W at {format_quantity(f[int(np.nanargmax(core))], 'Hz', 3)}, "
                          f"peak flux {np.nanmax(flux) * 1e3:.2g} mT"))
    figures = [Figure("series", title=f"SWR: {description}",
                      series=(Series("SWR", f, result.swr),), y_label="SWR", band=band)]
    if result.cmrr_db is not None:
        s = [Series("model CMRR", f, cmrr)]
        if result.mixed_mode_cmrr_db is not None:
            s.append(Series("mixed-mode CMRR (50 Ω legs)", f, result.mixed_mode_cmrr_db))
        figures.append(Figure("series", title=f"CMRR: {description}", series=tuple(s), y_label="CMRR [dB]", band=band))
    json = {"schema_version": 1, "description": description, "band_hz": band.segments, "power_w": result.power_w,
            "frequency_hz": f, "zin_r_ohm": zin.real, "zin_x_ohm": zin.imag, "swr": result.swr,
            "insertion_loss_db": result.insertion_loss_db, "cmrr_db": result.cmrr_db,
            "mixed_mode_cmrr_db": result.mixed_mode_cmrr_db, "core_loss_w": result.core_loss_w,
            "peak_flux_t": result.peak_flux_t}
    return Report(title=description, body=tuple(lines), json=json, inputs={"band": str(band)},
                  data={"curve": Table(_T_COLUMNS, full, title="transformer")}, figures=tuple(figures),
                  notes=(SAFETY_NOTES[0], SAFETY_NOTES[1]))


_MU_COLUMNS = (
    Column("frequency_hz", "frequency", "Hz", "hz3", ".9g"),
    Column("mu_prime", "µ'", "", ".1f", ".6g"),
    Column("mu_double_prime", "µ''", "", ".1f", ".6g"),
    Column("trusted", "measured", "", "yesno", "int"),
)


def identification_report(ident, *, description: str, rows: int = 8) -> Report:
    """The report of :func:`cmcheck.identify.identification.identify`: µ(f) over the whole
    sweep (measured where trusted, the fitted model elsewhere), Cp, resonance, nearest material."""
    f = ident.frequency_hz
    mu = ident.material_permeability()
    full = tuple(zip(f.tolist(), mu.real.tolist(), (-mu.imag).tolist(), ident.valid.tolist()))
    idx = table_indices(f, rows)
    lines = [Text(description, bold=True),
             Text(f"C1 = {ident.c1:.5g} 1/m, N = {ident.turns:g}, L0 = {format_quantity(ident.data.l0_h, 'H')}")]
    srf = ident.self_resonance_hz
    lines.append(Text(f"self-resonance {format_quantity(srf, 'Hz')}" if srf else "no self-resonance in the sweep"))
    lines.append(Text(f"Cp = {format_quantity(ident.cp_f, 'F')} ± {format_quantity(ident.cp_uncertainty_f, 'F', 2)} "
                      f"({ident.cp_method})"))
    lines.append(Text(f"model: {ident.model.form} fit, rms error {100 * ident.model.rms_relative_error:.2g} % "
                      f"on {int(ident.valid.sum())} trusted points of {f.size}"))
    if ident.nearest is not None:
        lines.append(Text(f"nearest built-in material: {ident.nearest_description()}, "
                          f"rms difference {100 * ident.nearest[1]:.0f} % of µ"))
    lines.append(Table(_MU_COLUMNS, tuple(full[i] for i in idx), title="permeability", no_wrap=(0,)))
    trusted = ident.valid
    figure = Figure("series", title=f"µ(f): {description}", y_label="relative permeability",
                    series=(Series("µ'", f, mu.real, trusted), Series("µ''", f, -mu.imag, trusted)))
    return Report(title=description, body=tuple(lines), json=ident.to_dict(), inputs={"source": ident.source},
                  data={"permeability": Table(_MU_COLUMNS, full, title="permeability")}, figures=(figure,),
                  notes=("Identification fits one sweep; leads and fixture are not in Cp's uncertainty.",))
