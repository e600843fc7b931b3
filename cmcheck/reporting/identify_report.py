"""The report of ``identify``: self-resonance, Cp, the fitted µ(f) model, the nearest family and
a µ table with a trust column; and writing its files (JSON, plot, material CSV, SPICE) together."""

from __future__ import annotations

import numpy as np

from ..units import format_quantity
from .results import Column, Figure, Report, Series, Table, Text

__all__ = ["identify_report", "write_identify_outputs"]

#: Units of the fitted parameters (frequencies in Hz, everything else a ratio).
_PARAMETER_UNITS = {"f_r": "Hz", "f_dw": "Hz", "beta_hz": "Hz", "f_s": "Hz"}

#: Short words for the trust column (the full reasons are in the notes).
_SHORT = {
    "measurement": "Z not valid",
    "above_resonance": "above resonance",
    "near_resonance": "near resonance",
    "cp_uncertainty": "Cp uncertain",
    "error_amplified": "error amplified",
}


def _rows(f: np.ndarray, rows: int) -> np.ndarray:
    """Indices of about ``rows`` points log-spaced over the sweep."""
    pick = np.searchsorted(f, np.geomspace(f[0], f[-1], max(rows, 2)))
    return np.unique(pick.clip(0, f.size - 1))


def _value(v: float, unit: str) -> str:
    return format_quantity(v, unit) if unit else f"{v:.4g}"


def identify_report(ident, *, core_text: str, method: str, rows: int = 12, circuit=None) -> Report:
    """Build the :class:`Report` of an :class:`~cmcheck.identify.Identification`.

    ``core_text`` describes the core; ``method`` is the extraction method used; ``circuit``
    (an :class:`~cmcheck.identify.EquivalentCircuit`) is added to the JSON when given.
    """
    from ..identify.permeability import REASONS

    f = ident.frequency_hz
    res = ident.resonance
    body: list = [Text(f"{ident.source}: {method}, {ident.turns:g} turns on {core_text} "
                       f"(C1 = {ident.c1:.5g} 1/m)", bold=True)]
    if res is None:
        body.append(Text("Self-resonance: none in the sweep (X stays on one side); Cp is not removed"))
    else:
        body.append(Text(f"Self-resonance: {format_quantity(res.frequency_hz, 'Hz')} "
                         f"± {format_quantity(res.uncertainty_hz, 'Hz', 2)} (|Z| there {res.peak_ohm:,.0f} Ω)"))
        body.append(Text(f"Cp: {format_quantity(ident.cp_f, 'F', 3)} ± {format_quantity(ident.cp_uncertainty_f, 'F', 2)} "
                         f"({ident.cp_method})"))
    m = ident.model
    body.append(Text(f"Model: {m.form}, rms error {100 * m.rms_relative_error:.2g} % over the "
                     f"{int(ident.valid.sum())} trusted points"))
    body.append(Text("Fitted parameters:"))
    params = Table(
        (Column("parameter", "parameter"), Column("value", "value"), Column("uncertainty", "± (1σ)")),
        [(k, _value(v, _PARAMETER_UNITS.get(k, "")),
          _value(m.uncertainties[k], _PARAMETER_UNITS.get(k, "")) if np.isfinite(m.uncertainties[k]) else "undetermined")
         for k, v in m.parameters.items()],
        title="Fitted parameters",
    )
    body.append(params)
    if ident.nearest is not None:
        mat, dist = ident.nearest
        body.append(Text(f"Nearest family: {ident.family_label()} ({mat.name}, rms distance {100 * dist:.2g} %)"))
    fitted = ident.model.permeability(f)
    idx = _rows(f, rows)
    body.append(Text("Permeability (measured with Cp removed; model = the fitted form):"))
    mu_table = Table(
        (Column("frequency_hz", "frequency", "Hz", "hz", ".9g"),
         Column("mu_prime", "µ'", "", "num", ".6g"),
         Column("mu_double_prime", "µ''", "", "num", ".6g"),
         Column("model_mu_prime", "model µ'", "", "num", ".6g"),
         Column("model_mu_double_prime", "model µ''", "", "num", ".6g"),
         Column("trusted", "trusted", "", "text", "text")),
        [(float(f[i]), float(ident.data.mu_prime[i]), float(ident.data.mu_double_prime[i]),
          float(fitted[i].real), float(-fitted[i].imag),
          "yes" if ident.valid[i] else f"no: {_SHORT.get(ident.data.reason[i], ident.data.reason[i])}")
         for i in idx],
        title="Permeability (measured with Cp removed; model = the fitted form)",
        no_wrap=(0,),
    )
    body.append(mu_table)
    seen = [r for r in dict.fromkeys(ident.data.reason[~ident.valid]) if r]
    notes = [f"{_SHORT.get(r, r)}: {REASONS.get(r, r)}" for r in seen]
    notes += list(ident.notes)
    notes.append("µ'' includes the winding's conductor loss (no conductor resistance removed); "
                 "Cp's uncertainty is statistical: lead and fixture effects are not in it")
    v = ident.valid
    figure = Figure(
        "series", title=f"{ident.source}: measured µ (grey: not trusted) and the {m.form} model",
        series=(Series("µ' measured", f, ident.data.mu_prime, v), Series("µ'' measured", f, ident.data.mu_double_prime, v),
                Series("µ' model", f, fitted.real), Series("µ'' model", f, -fitted.imag)),
        y_label="relative permeability",
    )
    doc = ident.to_dict()
    if circuit is not None:
        doc["equivalent_circuit"] = circuit.to_dict()
    title = f"Identification of {ident.source}: {ident.turns:g} turns on {core_text}"
    return Report(title, body, doc, inputs={"file": ident.source, "core": core_text, "turns": ident.turns},
                  figures=(figure,), notes=tuple(notes))


def write_identify_outputs(report: Report, ident, *, json=None, plot=None, material=None, spice=None,
                           circuit=None, spice_name: str = "winding", html=None) -> None:
    """Write the asked files of an identification all together or none.

    ``material``: the whole-band material CSV (:meth:`Identification.save_material_csv`);
    ``spice``: ``circuit`` as a SPICE subcircuit; ``html``: the offline HTML page of the report.
    """
    from ..identify.circuit import write_spice
    from .files import staged_outputs, write_json
    from .plots import plot_figure

    with staged_outputs():
        if json:
            write_json(json, report.json)
        if plot:
            plot_figure(plot, report.figures[0])
        if html:
            from .html import write_html

            write_html(html, report)
        if material:
            ident.save_material_csv(material)
        if spice:
            write_spice(spice, circuit, spice_name, comments=[f"fitted to {ident.source}",
                                                                   f"{ident.turns:g} turns, C1 = {ident.c1:.6g} 1/m"])
