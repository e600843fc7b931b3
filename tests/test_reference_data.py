"""Every row of reference_data/published_values.csv, each with its publication on the row.

Each row is checked twice: the published formula, written out here independently of cmcheck,
must give the row's value (the row is what its source says), and cmcheck must give it too.

References
----------
[1] IEC 60205:2016, Calculation of the effective parameters of magnetic piece parts (ring cores
    of rectangular section; L = µ0·µe·N²/C1).
[2] IEC 60050-221, IEV 221-04-31 (le = C1²/C2, Ae = C1/C2, Ve = C1³/C2²) and IEV 221-03-06
    (µ = µ' − jµ'').
[3] ASTM B258, Standard Nominal Diameters ... of AWG Sizes of Solid Round Wires:
    d = 0.005 in · 92^((36 − n)/39).
[4] S. Ramo, J. R. Whinnery, T. Van Duzer, Fields and Waves in Communication Electronics, 3rd ed.,
    Wiley, 1994, eq. 3.16(6); copper ρ20 = 1/58 Ω·mm²/m from IEC 60028:1925.
[5] W. Thomson, "On transient electric currents", Philosophical Magazine 5(34), 1853.
"""

import csv
import math
from pathlib import Path

import pytest

from cmcheck.model.choke import air_core_inductance, lossless_self_resonance, winding_impedance
from cmcheck.model.cores import RingCore
from cmcheck.units import awg_diameter
from cmcheck.model.winding import skin_depth

TABLE = Path(__file__).resolve().parents[1] / "reference_data" / "published_values.csv"
MU0 = 4e-7 * math.pi  # the pre-2019 SI value; the 2019 value differs by 1e-10 relative


def _rows():
    with TABLE.open(encoding="utf-8") as fh:
        for row in csv.DictReader(fh):
            inputs = {k: float(v) for k, v in (kv.split("=") for kv in row["inputs"].split(";"))}
            yield pytest.param(row["check"], inputs, float(row["expected"]), float(row["rel_tol"]), row["source"],
                               id=f"{row['check']}-{row['inputs']}")


def _ring_factors(i):
    # [1]: r1 = ID/2, r2 = OD/2.
    r1, r2, h = i["id"] / 2, i["od"] / 2, i["height"]
    k = math.log(r2 / r1)
    return 2 * math.pi / (h * k), 2 * math.pi * (1 / r1 - 1 / r2) / (h**2 * k**3)


def _winding_formula(i):
    # [1] L0 = µ0·N²/C1 = µ0·N²·h·ln(OD/ID)/(2π); [2] Z = jωL0·(µ' − jµ'').
    l0 = MU0 * i["turns"] ** 2 * i["height"] * math.log(i["od"] / i["id"]) / (2 * math.pi)
    return 2j * math.pi * i["frequency"] * l0 * complex(i["mu_prime"], -i["mu_double_prime"])


def _skin_formula(i):
    return math.sqrt((1e-6 / 58) / (math.pi * i["frequency"] * MU0))  # [4]


PUBLISHED = {
    "ring_c1": lambda i: _ring_factors(i)[0],
    "ring_le": lambda i: _ring_factors(i)[0] ** 2 / _ring_factors(i)[1],
    "ring_ae": lambda i: _ring_factors(i)[0] / _ring_factors(i)[1],
    "ring_ve": lambda i: _ring_factors(i)[0] ** 3 / _ring_factors(i)[1] ** 2,
    "awg_diameter": lambda i: 0.005 * 25.4e-3 * 92 ** ((36 - i["gauge"]) / 39),  # [3]
    "skin_depth": _skin_formula,
    "winding_resistance": lambda i: _winding_formula(i).real,
    "winding_reactance": lambda i: _winding_formula(i).imag,
    "lc_resonance": lambda i: 1 / (2 * math.pi * math.sqrt(i["inductance"] * i["capacitance"])),  # [5]
}


def _winding(i):
    core = RingCore(i["od"], i["id"], i["height"])
    mu = i["mu_prime"] - 1j * i["mu_double_prime"]
    return winding_impedance(i["frequency"], air_core_inductance(core.c1, i["turns"]), mu)


CMCHECK = {
    "ring_c1": lambda i: RingCore(i["od"], i["id"], i["height"]).c1,
    "ring_le": lambda i: RingCore(i["od"], i["id"], i["height"]).le,
    "ring_ae": lambda i: RingCore(i["od"], i["id"], i["height"]).ae,
    "ring_ve": lambda i: RingCore(i["od"], i["id"], i["height"]).ve,
    "awg_diameter": lambda i: awg_diameter(i["gauge"]),
    "skin_depth": lambda i: skin_depth(i["frequency"]),
    "winding_resistance": lambda i: _winding(i).real,
    "winding_reactance": lambda i: _winding(i).imag,
    "lc_resonance": lambda i: lossless_self_resonance(i["inductance"], i["capacitance"]),
}


def test_every_row_names_a_publication_and_has_both_checks():
    rows = list(_rows())
    assert rows
    for p in rows:
        check, _, _, _, source = p.values
        assert check in PUBLISHED and check in CMCHECK, check
        # A publication, not project notes: no pointer to design notes outside the repository.
        assert source.strip() and "design" not in source.lower(), source


@pytest.mark.parametrize("check, inputs, expected, rel_tol, source", list(_rows()))
def test_row_is_its_published_formula(check, inputs, expected, rel_tol, source):
    assert PUBLISHED[check](inputs) == pytest.approx(expected, rel=rel_tol)


@pytest.mark.parametrize("check, inputs, expected, rel_tol, source", list(_rows()))
def test_cmcheck_gives_the_published_value(check, inputs, expected, rel_tol, source):
    assert float(CMCHECK[check](inputs)) == pytest.approx(expected, rel=rel_tol)
