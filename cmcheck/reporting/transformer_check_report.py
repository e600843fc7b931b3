"""Report of measured transformer checks (:func:`cmcheck.measurement.transformer_check.check_transformer`),
optionally against the model's prediction."""

from __future__ import annotations

import numpy as np

from ..units import format_quantity
from .choke_report import table_indices
from .results import Column, Figure, Report, Series, Table, Text
from .transformer_report import SCHEMA_VERSION

__all__ = ["transformer_check_report"]

_COLS = (
    Column("frequency_hz", "frequency", "Hz", "hz", ".9g"),
    Column("input_resistance_ohm", "Rin [Ω]", "Ω", ",.1f", ".9g"),
    Column("input_reactance_ohm", "Xin [Ω]", "Ω", ",.1f", ".9g"),
    Column("swr", "SWR", "", ".3f", ".6g"),
    Column("return_loss_db", "RL [dB]", "dB", ".1f", ".6g"),
)
_LOSS = Column("loss_per_unit_db", "loss/unit [dB]", "dB", ".3f", ".6g")
_MODEL = (Column("model_swr", "SWR model", "", ".3f", ".6g"),
          Column("model_z_error", "|Z| diff [%]", "%", ".1f", ".4g"))


def model_difference(check, model_zin, model_swr) -> dict:
    """In-band differences between a measured check and a model's input impedance and SWR."""
    b = check.in_band
    zm, zp = check.zin[b], np.asarray(model_zin)[b]
    rel = np.abs(np.abs(zp) - np.abs(zm)) / np.abs(zm)
    return {"median_abs_z_error": float(np.median(rel)), "max_abs_z_error": float(np.max(rel)),
            "max_resistance_error_ohm": float(np.max(np.abs(zp.real - zm.real))),
            "max_reactance_error_ohm": float(np.max(np.abs(zp.imag - zm.imag))),
            "max_swr_difference": float(np.max(np.abs(np.asarray(model_swr)[b] - check.swr[b])))}


def transformer_check_report(checks, band, rows: int = 12, model=None, model_label: str = "") -> Report:
    """Console tables, curves, plot and JSON of transformer checks; ``model`` maps a path to (zin, swr)."""
    body, figs, data, docs = [], [], {}, []
    model = model or {}
    for c in checks:
        pair = c.loss_per_unit_db is not None
        m = model.get(c.path)
        cols = _COLS + ((_LOSS,) if pair else ()) + (_MODEL if m is not None else ())

        def row(i):
            r = [float(c.frequency_hz[i]), float(c.zin[i].real), float(c.zin[i].imag), float(c.swr[i]),
                 float(c.return_loss_db[i])]
            if pair:
                r.append(float(c.loss_per_unit_db[i]))
            if m is not None:
                r += [float(m[1][i]), float(100 * abs(abs(m[0][i]) - abs(c.zin[i])) / abs(c.zin[i]))]
            return tuple(r)

        f = c.frequency_hz
        marks = [e for seg in band.segments for e in seg] if band is not None else []
        where = np.flatnonzero(c.in_band)
        idx = where[table_indices(f[where], rows, marks)]
        verdict = "PASS" if c.passed else "FAIL"
        s = c.to_dict()
        summ = s["summary"]
        body += [Text(f"{c.path} ({'two units back to back' if pair else 'one-port into the load'}, Z0 {c.z0:g} Ω)",
                      bold=True),
                 Table(cols, tuple(row(i) for i in idx), tight=True)]
        span = c.band_under_max_swr_hz
        span_text = ("nowhere" if span is None else
                     f"{format_quantity(span[0], 'Hz')} to {format_quantity(span[1], 'Hz')}")
        body.append(Text(f"{verdict}: worst SWR {summ['worst_swr']:.2f} at {format_quantity(summ['worst_swr_hz'], 'Hz')} "
                         f"(limit {c.max_swr:g}), return loss ≥ {summ['min_return_loss_db']:.1f} dB; "
                         f"SWR ≤ {c.max_swr:g} from {span_text}"))
        if pair:
            body.append(Text(f"loss per unit ≤ {summ['max_loss_per_unit_db']:.2f} dB (half the pair's insertion loss; "
                             "assumes identical units)"))
        if m is not None:
            diff = model_difference(c, *m)
            s["model"] = {"label": model_label, "input_resistance_ohm": np.real(m[0]),
                          "input_reactance_ohm": np.imag(m[0]), "swr": m[1], "difference": diff}
            body.append(Text(f"vs model ({model_label}): |Z| differs by {100 * diff['median_abs_z_error']:.1f} % "
                             f"(median), {100 * diff['max_abs_z_error']:.1f} % (worst); SWR by up to "
                             f"{diff['max_swr_difference']:.3f}"))
        data.setdefault("long", Table(cols, tuple(row(i) for i in range(f.size)), comments=(c.path,)))
        series = [Series(f"{c.path} measured", f, c.swr)] + ([Series("model", f, m[1])] if m is not None else [])
        figs.append(Figure("series", title=c.path, series=tuple(series), y_label="SWR", band=band, target=c.max_swr,
                           target_label=f"SWR {c.max_swr:g}"))
        docs.append(s)
    return Report(title="transformer check", body=tuple(body), json={"schema_version": SCHEMA_VERSION, "results": docs},
                  data=data, figures=tuple(figs),
                  notes=("Loss per unit from a back-to-back pair is half the pair's loss: common practice, "
                         "exact only for identical units.",) if any(c.kind == "pair" for c in checks) else ())
