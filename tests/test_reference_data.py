"""Every row of reference_data/published_values.csv, each with its published source on the row."""

import csv
from pathlib import Path

import pytest

from cmcheck.model.choke import air_core_inductance, winding_impedance
from cmcheck.model.cores import RingCore
from cmcheck.units import awg_diameter
from cmcheck.model.winding import skin_depth

TABLE = Path(__file__).resolve().parents[1] / "reference_data" / "published_values.csv"


def _rows():
    with TABLE.open(encoding="utf-8") as fh:
        for row in csv.DictReader(fh):
            inputs = {k: float(v) for k, v in (kv.split("=") for kv in row["inputs"].split(";"))}
            yield pytest.param(row["check"], inputs, float(row["expected"]), float(row["rel_tol"]), row["source"],
                               id=f"{row['check']}-{row['inputs']}")


def _winding(i):
    core = RingCore(i["od"], i["id"], i["height"])
    mu = i["mu_prime"] - 1j * i["mu_double_prime"]
    return winding_impedance(i["frequency"], air_core_inductance(core.c1, i["turns"]), mu)


CHECKS = {
    "ring_c1": lambda i: RingCore(i["od"], i["id"], i["height"]).c1,
    "ring_le": lambda i: RingCore(i["od"], i["id"], i["height"]).le,
    "ring_ae": lambda i: RingCore(i["od"], i["id"], i["height"]).ae,
    "ring_ve": lambda i: RingCore(i["od"], i["id"], i["height"]).ve,
    "awg_diameter": lambda i: awg_diameter(i["gauge"]),
    "skin_depth": lambda i: skin_depth(i["frequency"]),
    "winding_resistance": lambda i: _winding(i).real,
    "winding_reactance": lambda i: _winding(i).imag,
}


@pytest.mark.parametrize("check, inputs, expected, rel_tol, source", list(_rows()))
def test_published_value(check, inputs, expected, rel_tol, source):
    assert source  # every row names its published source
    assert CHECKS[check](inputs) == pytest.approx(expected, rel=rel_tol)
