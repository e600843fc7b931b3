"""`cmcheck size` explores material families on a preferred-number grid and names what to buy."""

import json

import pytest

from cmcheck.model.materials import search_materials


def test_default_grid_is_nizn_and_mnzn_on_iso3_r10():
    names = [m.name for m in search_materials()]
    # ISO 3:1973 Table 1, R10: 1.00 1.25 1.60 2.00 2.50 3.15 4.00 5.00 6.30 8.00 per decade.
    for name in ("nizn-40", "nizn-630", "nizn-800", "nizn-1000", "nizn-2000", "mnzn-500", "mnzn-3150", "mnzn-5000"):
        assert name in names
    assert not any(n.startswith("iron-powder") for n in names)  # only when asked
    assert "nizn-650" not in names and "mnzn-6300" not in names  # not R10 / beyond the choke range
    assert len(names) == len(set(names)) == 18 + 11


def test_named_families_members_and_files_mix():
    names = [m.name for m in search_materials(["iron-powder", "nizn-650"])]
    assert names[0] == "iron-powder-4" and names[-1] == "nizn-650" and "iron-powder-100" in names
    # A name given twice stays twice so the search can refuse it.
    assert [m.name for m in search_materials(["nizn-800", "nizn-800"])] == ["nizn-800", "nizn-800"]


def test_cli_size_names_what_to_buy_and_the_size_series(run_cli, tmp_path):
    j = tmp_path / "s.json"
    code, out, err = run_cli("size", "--band", "3.5-30MHz", "--target-r", "1k", "--cable-od", "5mm", "--max-cores", "1",
                             "--json", j)
    assert code == 0, err
    assert "29 materials" in out
    assert "core sizes: cmcheck ISO 3 R10" in out and "--sizes FILE" in out and "--no-builtin-sizes" in out
    assert "buy: #1 " in out and "ferrite, µi ≈" in out
    data = json.loads(j.read_text())
    d = data["designs"][0]
    lo, hi = (float(v) for v in d["buy"].split("≈")[1].split("–"))
    mu = float(d["material"].split("-")[-1])
    assert lo <= mu <= hi and lo < hi  # the span round the chosen member on the R10 grid
    assert data["size_series"].startswith("cmcheck ISO 3 R10") and data["material_series"] == "R10"
    # Explicit lists still work.
    code, out, err = run_cli("size", "--band", "3.5-30MHz", "--target-r", "1k", "--cable-od", "5mm", "--max-cores", "1",
                             "--materials", "nizn-800,mnzn-1000")
    assert code in (0, 1) and "2 materials" in out
