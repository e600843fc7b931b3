"""Report of a transformer analysis (:func:`cmcheck.transformer.analysis.analyse`), and writing
its files together with the design's N-port Touchstone network."""

from __future__ import annotations

import os
import tempfile
from pathlib import Path

import numpy as np

from ..design.heat import DEFAULT_MAX_RISE_K, temperature_rise
from ..errors import CmcheckError
from ..transformer.bandwidth import limit_facts, swr_band
from ..units import format_quantity, span_digits
from .choke_report import table_indices
from .files import SAFETY_NOTES, atomic_write, staged_outputs, write_json, write_table_csv
from .plots import plot_figure
from .results import Column, Figure, Report, Series, Table, Text

__all__ = ["SCHEMA_VERSION", "transformer_report", "write_transformer_outputs"]

SCHEMA_VERSION = 1
#: RMS voltage above which a terminal is called dangerous to touch or to arc [V] (common practice, no published source).
HIGH_VOLTAGE_V = 500.0
#: Peak flux density above which a NiZn/MnZn core is called near saturation [T] (common practice, no published source).
HIGH_FLUX_T = 0.2


def _cols(balanced: bool, digits: int, power: bool) -> tuple[Column, ...]:
    cols = [
        Column("frequency_hz", "frequency", "Hz", f"hz:{digits}", ".9g"),
        Column("input_resistance_ohm", "Rin [Ω]", "Ω", ",.1f", ".9g"),
        Column("input_reactance_ohm", "Xin [Ω]", "Ω", ",.1f", ".9g"),
        Column("swr", "SWR", "", ".3f", ".6g"),
        Column("return_loss_db", "RL [dB]", "dB", ".1f", ".6g"),
        Column("mismatch_loss_db", "mismatch [dB]", "dB", ".3f", ".6g"),
        Column("insertion_loss_db", "IL [dB]", "dB", ".3f", ".6g"),
    ]
    if balanced:
        cols += [Column("cmrr_db", "CMRR model [dB]", "dB", ".1f", ".6g"),
                 Column("mixed_mode_cmrr_db", "CMRR 3-port [dB]", "dB", ".1f", ".6g")]
    if power:
        cols += [Column("load_voltage_v", "V load [V]", "V", ",.0f", ".6g"),
                 Column("winding_voltage_v", "V winding [V]", "V", ",.0f", ".6g"),
                 Column("peak_flux_mt", "B peak [mT]", "mT", ".3g", ".6g"),
                 Column("core_loss_w", "P core [W]", "W", ".3g", ".6g")]
    return tuple(cols)


def _rows(r, balanced: bool, power: bool, idx) -> tuple:
    out = []
    for i in idx:
        row = [float(r.frequency_hz[i]), float(r.zin[i].real), float(r.zin[i].imag), float(r.swr[i]),
               float(r.return_loss_db[i]), float(r.mismatch_loss_db[i]), float(r.insertion_loss_db[i])]
        if balanced:
            row += [float(r.cmrr_db[i]), None if r.mixed_mode_cmrr_db is None else float(r.mixed_mode_cmrr_db[i])]
        if power:
            row += [float(r.load_voltage[i]), float(np.max(r.winding_voltage[i])),
                    None if r.peak_flux_t is None else float(np.max(r.peak_flux_t[i]) * 1e3),
                    None if r.core_loss_w is None else float(np.max(r.core_loss_w[i]))]
        out.append(tuple(row))
    return tuple(out)


def _limit_text(edge: str, f: float, facts: dict) -> str:
    fq = format_quantity(f, "Hz")
    if facts["kind"] == "flux":
        if edge == "low":
            return (f"low end ({fq}): the magnetising impedance |Zm| = {facts['shunt_ohm']:,.0f} Ω across the "
                    f"load referred to the primary ({facts['load_referred_ohm']:,.1f} Ω): more turns or more µ' "
                    "extend it downwards")
        cs = facts["capacitance_reactance_ohm"]
        cs_text = f", and the secondary capacitance's 1/(ωCs) = {cs:,.0f} Ω across the load" if cs else ""
        return (f"high end ({fq}): the leakage reactance ωLℓ = {facts['leakage_reactance_ohm']:,.1f} Ω in series"
                f"{cs_text}: tighter coupling (interleaved or twisted windings, fewer turns) extends it upwards")
    if edge == "low":
        zw = facts["shunt_ohm"]
        return (f"low end ({fq}): the windings' choking impedance |Zw| = {zw:,.0f} Ω no longer dwarfs the load: "
                "more turns or more µ' extend it downwards" if zw is not None else
                f"low end ({fq}): set by the line alone (ideal choking given)")
    return (f"high end ({fq}): the line is {facts['electrical_length_deg']:.0f}° long with Z0 ≈ "
            f"{facts['line_z0_ohm']:,.0f} Ω against the optimum ≈ √(Zs·ZL) = {facts['optimum_z0_ohm']:,.0f} Ω: a "
            "shorter line or a Z0 nearer the optimum extends it upwards")


def transformer_report(result, *, topology, transformer, load, band, z0: float, max_swr: float, description: str,
                       surface_area_m2=None, power_given: bool = False, rows: int = 16,
                       characterisation: dict | None = None) -> Report:
    """Console lines, table, full-resolution curve, SWR plot, notes and JSON of a transformer analysis."""
    r = result
    f = r.frequency_hz
    balanced = r.cmrr_db is not None
    digits = span_digits(band.low, band.high)
    inb = band.contains(f)
    fb = f[inb]
    swr_b = r.swr[inb]
    span = swr_band(fb, swr_b, max_swr)
    idx = table_indices(f, rows, [e for seg in band.segments for e in seg])
    cols = _cols(balanced, digits, power_given)
    # The console shows match and balance in one table and the power figures in another;
    # the files get every column at every point.
    keys = [c.key for c in cols]
    full_rows = _rows(r, balanced, power_given, idx)
    split = keys.index("load_voltage_v") if power_given else len(keys)
    main_i = [i for i, k in enumerate(keys[:split]) if k != "mismatch_loss_db"]
    shown = Table([cols[i] for i in main_i], [[row[i] for i in main_i] for row in full_rows], tight=True)
    power_table = (Table([cols[0]] + list(cols[split:]), [[row[0]] + list(row[split:]) for row in full_rows], tight=True)
                   if power_given else None)
    full = Table((Column("frequency_hz", "frequency", "Hz", "hz", ".9g"),) + cols[1:],
                 _rows(r, balanced, power_given, range(f.size)), title="transformer",
                 comments=(description, "predicted by cmcheck (model estimate, not a measurement)"))
    i_worst = int(np.argmax(swr_b))
    il_b = r.insertion_loss_db[inb]
    body = [Text(description, bold=True),
            Text(f"  topology {topology.name}: {topology.description}"),
            Text(f"  load {load.label}, source {z0:g} Ω"), shown]
    body.append(Text(f"band {band}: worst SWR {swr_b[i_worst]:.2f} at {format_quantity(fb[i_worst], 'Hz', digits)}, "
                     f"insertion loss {np.min(il_b):.2f}–{np.max(il_b):.2f} dB"))
    limits = {}
    if span is None:
        body.append(Text(f"SWR exceeds {max_swr:g} everywhere in the band"))
    else:
        body.append(Text(f"SWR ≤ {max_swr:g} from {format_quantity(span[0], 'Hz', digits)} to "
                         f"{format_quantity(span[1], 'Hz', digits)}"))
    zl = load.impedance(fb)
    if span is None or span[0] > fb[0]:
        e = 0 if span is None else int(np.searchsorted(fb, span[0]))
        limits["low"] = limit_facts(topology, fb[e], transformer, zl[e], z0)
        limits["low"]["frequency_hz"] = float(fb[e])
    if span is None or span[1] < fb[-1]:
        e = fb.size - 1 if span is None else int(np.searchsorted(fb, span[1]))
        limits["high"] = limit_facts(topology, fb[e], transformer, zl[e], z0)
        limits["high"]["frequency_hz"] = float(fb[e])
    for edge, facts in limits.items():
        body.append(Text("  limited at the " + _limit_text(edge, facts["frequency_hz"], facts)))
    if balanced:
        body.append(Text("CMRR model: 20·log10|Ip − In|/|Ip + In| of the output currents into this load and its "
                         "legs to ground; CMRR 3-port: |Sds21/Scs21| of the transformer alone with 50 Ω legs, "
                         "the figure a VNA measurement gives"))
        if load.leg_p is None and load.leg_n is None:
            body.append(Text("  no leg-to-ground impedances given: the load floats, so the model CMRR is limited only by the "
                             "circuit's reference leak (shown as – when unbounded)"))
    notes = list(SAFETY_NOTES[:1])
    summary = {"max_swr": max_swr, "worst_swr": float(swr_b[i_worst]), "worst_swr_hz": float(fb[i_worst]),
               "band_under_max_swr_hz": None if span is None else list(span),
               "min_insertion_loss_db": float(np.min(il_b)), "max_insertion_loss_db": float(np.max(il_b)),
               "limits": limits}
    power = None
    if power_given:
        v_load, v_w = float(np.max(r.load_voltage[inb])), float(np.max(r.winding_voltage[inb]))
        power = {"power_w": r.power_w, "max_load_voltage_v": v_load, "max_winding_voltage_v": v_w}
        body += [Text(f"at {r.power_w:g} W available from the source:", bold=True), power_table]
        body.append(Text(f"at {r.power_w:g} W: up to {v_load:,.0f} V RMS at the load, {v_w:,.0f} V RMS across a winding"))
        if r.core_loss_w is not None:
            p_core = np.max(r.core_loss_w[inb], axis=0)  # worst frequency, per core
            rise = temperature_rise(p_core, surface_area_m2) if surface_area_m2 else None
            power.update(max_core_loss_w=p_core.tolist(),
                         temperature_rise_k=None if rise is None else np.atleast_1d(rise).tolist())
            rise_text = "" if rise is None else f", temperature rise ≈ {np.max(rise):.0f} K (still air)"
            body.append(Text(f"  core dissipation up to {np.max(p_core):.3g} W per core{rise_text}"))
            if rise is not None and np.max(rise) > DEFAULT_MAX_RISE_K:
                notes.append(f"Caution: the core may run {np.max(rise):.0f} K above ambient: hot ferrite loses "
                             "permeability and can crack; reduce power or use a larger core.")
        if r.peak_flux_t is not None:
            b = float(np.max(r.peak_flux_t[inb]))
            power["max_peak_flux_t"] = b
            body.append(Text(f"  peak flux density up to {b * 1e3:.3g} mT"))
            if b > HIGH_FLUX_T:
                notes.append(f"Caution: peak flux {b * 1e3:.0f} mT approaches ferrite saturation at the low end of "
                             "the band: the core heats and distorts.")
        if max(v_load, v_w) > HIGH_VOLTAGE_V:
            notes.append(f"Caution: {max(v_load, v_w):,.0f} V RMS at high-impedance terminals: kilovolt peaks arc "
                         "over and burn; insulate and keep clear when transmitting.")
        notes += list(SAFETY_NOTES[1:])
    js = {
        "schema_version": SCHEMA_VERSION,
        "design": description,
        "topology": topology.name,
        "load": load.label,
        "z0_ohm": z0,
        "band_hz": [band.low, band.high],
        "frequency_hz": f,
        "input_resistance_ohm": r.zin.real,
        "input_reactance_ohm": r.zin.imag,
        "swr": r.swr,
        "return_loss_db": r.return_loss_db,
        "mismatch_loss_db": r.mismatch_loss_db,
        "insertion_loss_db": r.insertion_loss_db,
        "summary": summary,
    }
    if balanced:
        js["cmrr_db"] = r.cmrr_db
        js["mixed_mode_cmrr_db"] = r.mixed_mode_cmrr_db
    if power is not None:
        js["power"] = power
        js["load_voltage_v"] = r.load_voltage
        js["winding_voltage_v"] = r.winding_voltage
    if characterisation is not None:
        js["characterisation"] = characterisation
        c = characterisation
        body.insert(3, Text(
            f"  characterised from open/short tests: leakage {format_quantity(c['leakage_h'], 'H')} "
            f"({100 * c['primary_leakage_share']:.0f} % at the primary), Cs {format_quantity(c['secondary_capacitance_f'], 'F')}, "
            f"µi {c['initial_permeability']:.0f} relaxing at {format_quantity(c['relaxation_frequency_hz'], 'Hz')}, "
            f"copper {c['r_primary_1mhz_ohm']:.3g} Ω at 1 MHz; fit RMS {100 * c['rms_log_error']:.1f} % in ln Z"))
    fig = Figure("series", title=description, series=(Series("SWR", f, r.swr),), y_label="SWR", band=band,
                 target=max_swr, target_label=f"SWR {max_swr:g}")
    return Report(title=description, inputs={"design": description, "topology": topology.name, "band": str(band)},
                  body=tuple(body), json=js, data={"curve": full}, figures=(fig,), notes=tuple(notes))


def write_transformer_outputs(report: Report, network=None, *, json=None, csv=None, plot=None, touchstone=None,
                              html=None) -> None:
    """Write the asked files all together or none; ``network`` is the design's scikit-rf N-port,
    ``html`` the offline HTML page of the report."""
    with staged_outputs():
        if html:
            from .html import write_html

            write_html(html, report)
        if json:
            write_json(json, report.json)
        if csv:
            write_table_csv(csv, report.data["curve"])
        if plot:
            plot_figure(plot, report.figures[0])
        if touchstone:
            want = f".s{network.nports}p"
            if Path(touchstone).suffix.lower() != want:
                raise CmcheckError(f"{touchstone}: this design is a {network.nports}-port, written as a {want} file")

            def render(tmp: Path) -> None:
                with tempfile.TemporaryDirectory(dir=tmp.parent) as d:
                    out = network.write_touchstone(filename="out", dir=d, form="ri", return_string=False)
                    produced = Path(d) / f"out{want}"
                    os.replace(produced if produced.exists() else Path(out), tmp)

            atomic_write(touchstone, render)
