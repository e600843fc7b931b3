"""`cmcheck size` explores material families on a preferred-number grid and names what to buy.

Sources: the grid is ISO 3:1973 series R10; the families searched and their µi ranges (NiZn
40–2000, MnZn 500–5000, iron powder 4–100 only when asked) are the project's own choice,
SEARCH_FAMILIES / _SEARCH_RANGES in cmcheck/model/materials.py (marked there "common practice,
no published source"). Output texts and JSON keys are the project's own (cmcheck/reporting/size_report.py,
cmcheck/design/sized.py, purchase_label in cmcheck/model/materials.py);
the command inputs (3.5–30 MHz, 1 kΩ, 5 mm cable) are invented test values.
"""

import json

import pytest

from cmcheck.model.materials import search_materials


def test_default_grid_is_nizn_and_mnzn_on_iso3_r10():
    names = [m.name for m in search_materials()]
    # ISO 3:1973 Table 1, R10: 1.00 1.25 1.60 2.00 2.50 3.15 4.00 5.00 6.30 8.00 per decade.
    for name in ("nizn-40", "nizn-630", "nizn-800", "nizn-1000", "nizn-2000", "mnzn-500", "mnzn-3150", "mnzn-5000"):
        assert name in names
    assert not any(n.startswith("iron-powder") for n in names)  # only when asked
    # 650 is not an R10 number (ISO 3); 6300 lies above MnZn's 5000 (cmcheck/model/materials.py)
    assert "nizn-650" not in names and "mnzn-6300" not in names  # not R10 / beyond the choke range
    # R10 members in 40–2000 (18) and 500–5000 (11): ISO 3 R10 over the project's ranges
    assert len(names) == len(set(names)) == 18 + 11


def test_named_families_members_and_files_mix():
    names = [m.name for m in search_materials(["iron-powder", "nizn-650"])]
    # iron powder 4–100: the project's own range (_SEARCH_RANGES, cmcheck/model/materials.py)
    assert names[0] == "iron-powder-4" and names[-1] == "nizn-650" and "iron-powder-100" in names
    # A name given twice stays twice so the search can refuse it.
    assert [m.name for m in search_materials(["nizn-800", "nizn-800"])] == ["nizn-800", "nizn-800"]


def test_cli_size_names_what_to_buy_and_the_size_series(run_cli, tmp_path):
    j = tmp_path / "s.json"
    code, out, err = run_cli("size", "--band", "3.5-30MHz", "--target-r", "1k", "--cable-od", "5mm", "--max-cores", "1",
                             "--json", j)
    assert code == 0, err  # exit 0 = success, cmcheck/cli/app.py
    assert "29 materials" in out  # 18 + 11, the default grid above
    # the project's own texts for its built-in size series and buy hint
    # (cmcheck/reporting/size_report.py, purchase_label in cmcheck/model/materials.py)
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
    assert code in (0, 1) and "2 materials" in out  # exit 0/1 (a limit may fail): cmcheck/cli/app.py
