"""Design files (TOML): schema, errors naming the key, command-line overrides, and a fuzz
property that the reader never fails with anything but a CmcheckError.

The schema and the override rule are the project's own (contributor guide; no published
source); the lengths below are checked against hand conversion (1 in = 25.4 mm exactly,
NIST SP 811, appendix B.8).
"""

from __future__ import annotations

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from cmcheck.designfile import KEYS, DesignFile, DesignFileError, format_design, load_design, parse_design
from cmcheck.errors import CmcheckError

GOOD = """
material = "nizn-800"
band = "3.5-30MHz"
[core]
od = "2.4in"
id = 0.0356
height = "12.7mm"
cores = 2
[winding]
turns = 6
cable_od = "5mm"
cp = "2.8pF"
[target]
resistance_ohm = "1k"
impedance_ohm = 1500
swr = 1.5
[load]
resistance_ohm = 200
"""


def test_values_in_si_from_text_with_units_or_plain_numbers():
    d = parse_design(GOOD, "d.toml")
    assert d.get("core.od") == pytest.approx(2.4 * 25.4e-3, rel=1e-12)  # NIST SP 811 B.8
    assert d.get("core.id") == 0.0356 and d.get("core.height") == pytest.approx(12.7e-3, rel=1e-12)
    assert d.get("core.cores") == 2 and d.get("winding.turns") == 6
    assert d.get("winding.cp") == pytest.approx(2.8e-12, rel=1e-12)
    assert d.get("target.resistance_ohm") == 1000.0 and d.get("target.impedance_ohm") == 1500.0
    assert d.get("target.swr") == 1.5 and d.get("load.resistance_ohm") == 200.0
    assert d.get("band").segments == ((3.5e6, 30e6),)
    assert d.get("winding.wire") is None
    # As command-line text: what was written, or the SI number with its unit.
    assert d.option_text("core.od") == "2.4in" and d.option_text("core.id") == "0.0356m"
    assert d.option_text("winding.turns") == 6


def test_unknown_key_in_get_is_a_programming_error():
    with pytest.raises(KeyError):
        DesignFile("x").get("core.odd")


@pytest.mark.parametrize(
    "text, message",
    [
        ("[core]\nodd = 1", "d.toml: unknown key core.odd (known:"),
        ("colour = 'red'", "d.toml: unknown key colour"),
        ("[shape]\nx = 1", "d.toml: unknown key shape"),
        ("core = 3", "d.toml: core must be a table ([core]), got a whole number"),
        ("[core]\nod = '61 furlong'", "d.toml: core.od: cannot read length"),
        ("[core]\nod = true", "d.toml: core.od must be text with a unit"),
        ("[core]\nod = -0.061", "d.toml: core.od must be a positive number in m"),
        ("[core]\ncores = 1.5", "d.toml: core.cores must be a whole number ≥ 1, got 1.5"),
        ("[winding]\nturns = 0", "d.toml: winding.turns must be a whole number ≥ 1, got 0"),
        ("[winding]\nturns = '8'", "d.toml: winding.turns must be a whole number ≥ 1, got '8'"),
        ("[winding]\ncp = '3pH'", "d.toml: winding.cp:"),
        ("[target]\nswr = 0.5", "d.toml: target.swr must be a number ≥ 1"),
        ("[target]\nresistance_ohm = '1kV'", "d.toml: target.resistance_ohm:"),
        ("band = 30", "d.toml: band must be text"),
        ("band = '30-3MHz'", "d.toml: band:"),
        ("material = ['a']", "d.toml: material must be text"),
        ("[core\nod = 1", "d.toml: not valid TOML"),
    ],
)
def test_bad_files_name_the_key(text, message):
    with pytest.raises(DesignFileError) as err:
        parse_design(text, "d.toml")
    assert str(err.value).startswith(message), str(err.value)
    assert "\n" not in str(err.value)


def test_files_are_read_capped_and_as_utf8(tmp_path):
    (tmp_path / "big.toml").write_bytes(b"#" * (2 << 20))
    with pytest.raises(DesignFileError, match="larger than 1 MiB"):
        load_design(tmp_path / "big.toml")
    (tmp_path / "latin.toml").write_bytes('material = "n\xe9"'.encode("latin-1"))
    with pytest.raises(DesignFileError, match="not UTF-8"):
        load_design(tmp_path / "latin.toml")
    with pytest.raises(DesignFileError, match="is a folder"):
        load_design(tmp_path)


def test_material_file_is_found_beside_the_design(tmp_path):
    (tmp_path / "mine.csv").write_text("frequency_hz,mu_prime,mu_double_prime\n1e6,800,10\n1e8,100,300\n")
    (tmp_path / "d.toml").write_text('material = "mine.csv"\n')
    assert load_design(tmp_path / "d.toml").get("material") == str(tmp_path / "mine.csv")
    (tmp_path / "e.toml").write_text('material = "nizn-800"\n')
    assert load_design(tmp_path / "e.toml").get("material") == "nizn-800"


def test_every_key_is_in_the_names_table():
    from cmcheck.cli.flags import names_table

    table = names_table()
    assert all(f"`{k.name}`" in table for k in KEYS)


# --- Fuzz: any bytes, any TOML document → a DesignFile or a CmcheckError, never a traceback.

_SCALARS = st.one_of(st.integers(-10**20, 10**20), st.floats(allow_nan=True), st.booleans(),
                     st.text(max_size=12), st.sampled_from(["61mm", "2.4in", "18awg", "2.8pF", "1k", "1-30MHz", "", "0", "-1mm"]))
_NAMES = st.sampled_from(sorted({k.name.split(".")[-1] for k in KEYS} | {"x", "core", "target"}))


def _toml_value(v) -> str:
    import json
    import math

    if isinstance(v, bool):
        return "true" if v else "false"
    if isinstance(v, float):
        return "nan" if math.isnan(v) else ("inf" if v > 0 else "-inf") if math.isinf(v) else repr(v)
    if isinstance(v, int):
        return str(v)
    return json.dumps(v)  # a JSON string is a TOML basic string


@st.composite
def _documents(draw):
    lines = []
    for _ in range(draw(st.integers(0, 3))):
        lines.append(f"{draw(_NAMES)} = {_toml_value(draw(_SCALARS))}")
    for table in draw(st.lists(st.sampled_from(["core", "winding", "target", "load", "extra"]), max_size=3, unique=True)):
        lines.append(f"[{table}]")
        for _ in range(draw(st.integers(0, 4))):
            lines.append(f"{draw(_NAMES)} = {_toml_value(draw(_SCALARS))}")
    return "\n".join(lines)


def _parse_or_error(data):
    try:
        return parse_design(data, "fuzz.toml")
    except CmcheckError as exc:
        assert "\n" not in str(exc) and str(exc).startswith("fuzz.toml: ")
        return None


@settings(max_examples=200, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(_documents())
def test_fuzz_structured_documents(doc):
    _parse_or_error(doc)


@settings(max_examples=200, deadline=None)
@given(st.binary(max_size=200))
def test_fuzz_arbitrary_bytes(data):
    _parse_or_error(data)


# A small fixed corpus of awkward inputs (run every time, whatever hypothesis draws).
CORPUS = [b"", b"\xff\xfe", b"\x00", b"[core]\n[core]", b"a.b.c = 1", b"core.od = '61mm'", b"[[core]]\nod=1",
          b"[core]\nod = {x = 1}", b"[winding]\nturns = 9999999999999999999999", b"band = '1.8-2MHz,3.5-4MHz'",
          b"[target]\nswr = inf", b"[target]\nswr = 'nan'", b"[core]\ncore_factor = '1e999'", b"x = [" * 2000,
          "material = 'ünïcode'".encode()]


@pytest.mark.parametrize("data", CORPUS)
def test_fuzz_corpus(data):
    _parse_or_error(data)


# --- The command line: file values under the options.

DESIGN = """
material = "nizn-800"
band = "3.5-30MHz"
[core]
od = "61mm"
id = "35.6mm"
height = "12.7mm"
cores = 2
[winding]
turns = 6
cable_od = "5mm"
[target]
resistance_ohm = "1k"
"""


@pytest.fixture
def design(tmp_path):
    p = tmp_path / "choke.toml"
    p.write_text(DESIGN)
    return p


def test_predict_reads_the_file_like_the_options(run_cli, design):
    opts = ["--material", "nizn-800", "--od", "61mm", "--id", "35.6mm", "--height", "12.7mm", "--cores", "2",
            "--turns", "6", "--cable-od", "5mm", "--band", "3.5-30MHz"]
    assert run_cli("predict", "--design", design) == run_cli("predict", *opts)


def test_options_override_the_file(run_cli, design):
    code, out, _ = run_cli("predict", "--design", design, "--turns", "7", "--cores", "1", "--band", "1-2MHz", "--wire", "1mm")
    assert code == 0
    assert out.startswith("7 turns of wire 1 mm on ring 61 × 35.6 × 12.7 mm, nizn-800")
    assert "band 1 MHz–2 MHz" in out


def test_missing_after_overrides_names_the_key(run_cli, tmp_path):
    p = tmp_path / "part.toml"
    p.write_text('[core]\nod = "61mm"\n')
    code, _, err = run_cli("predict", "--design", p, "--material", "nizn-800")
    assert code == 2
    assert err == f"error: {p}: winding.turns missing: add it to the file or give --turns\n"
    code, _, err = run_cli("predict", "--design", p, "--material", "nizn-800", "--turns", "3")
    assert err.startswith(f"error: {p}: core.id, core.height missing for the core") and err.count("\n") == 1


def test_bad_file_is_one_line_exit_2(run_cli, tmp_path):
    p = tmp_path / "bad.toml"
    p.write_text('[core]\nod = "61 parsecs"\n')
    code, out, err = run_cli("predict", "--design", p)
    assert (code, out) == (2, "") and err.startswith(f"error: {p}: core.od: ") and err.count("\n") == 1


def test_extract_takes_band_target_and_the_model_from_the_file(run_cli, design, tmp_path):
    import numpy as np
    import skrf

    # A series-through sweep of a 2 kΩ resistor: Z = 2·Z0·(1−S21)/S21 (Agilent, Impedance
    # Measurement Handbook, 6th ed., 2016, §2.7), so S21 = 2·Z0/(2·Z0 + Z).
    f = np.geomspace(1e6, 50e6, 41)
    s21 = 100 / (100 + 2000.0) * np.ones_like(f)
    s = np.zeros((f.size, 2, 2), complex)
    s[:, 0, 0] = s[:, 1, 1] = 1 - s21
    s[:, 0, 1] = s[:, 1, 0] = s21
    skrf.Network(frequency=skrf.Frequency.from_f(f, unit="hz"), s=s, z0=50).write_touchstone("r2k", dir=str(tmp_path))
    code, out, _ = run_cli("extract", tmp_path / "r2k.s2p", "--design", design)
    assert code == 0 and "band 3.5 MHz–30 MHz" in out and "result: pass" in out
    code, out, _ = run_cli("extract", tmp_path / "r2k.s2p", "--design", design, "--target-r", "3k")
    assert code == 1
    code, out, _ = run_cli("extract", tmp_path / "r2k.s2p", "--design", design, "--vs-model")
    assert code == 0 and "vs model" in out


def test_format_design_round_trips():
    values = {"material": 'odd "name"\\x.csv', "band": "1.8-30MHz", "core.od": "50mm", "core.cores": 2,
              "winding.turns": 10, "winding.cp": 2.5e-12, "target.swr": 1.5}
    d = parse_design(format_design(values, ("a comment",)), "r.toml")
    assert d.texts["material"] == values["material"] and d.get("core.od") == pytest.approx(0.05, rel=1e-12)
    assert (d.get("core.cores"), d.get("winding.turns"), d.get("winding.cp"), d.get("target.swr")) == (2, 10, 2.5e-12, 1.5)
    with pytest.raises(DesignFileError, match="unknown key core.odd"):
        format_design({"core.odd": 1})
