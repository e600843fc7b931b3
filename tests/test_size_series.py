"""The built-in size series (cmcheck/design/data/ring_sizes.csv) is our own: ISO 3 numbers."""

import numpy as np
import pytest

from cmcheck.design.catalogue import builtin_ring_sizes, load_ring_sizes
from cmcheck.model.families import preferred_numbers

INCH_MM = 25.4  # exact by definition (international yard and pound agreement, 1959)
# Steps in which inch-dimensioned parts are commonly specified (from memory): 0.05 in and 1/16 in.
INCH_STEPS_MM = (0.05 * INCH_MM, INCH_MM / 16)
R40_MM = preferred_numbers(1.0, 1000.0, "R40")  # ISO 3:1973, Table 1


def _is_preferred(x_mm, table=R40_MM):
    return bool(np.any(np.abs(table - x_mm) <= 1e-3 * x_mm))


def _looks_converted_from_inches(x_mm):
    """Within 0.5 % of a multiple of 0.05 in or 1/16 in, and not itself an ISO 3 R40 number."""
    near = any(abs(x_mm - round(x_mm / s) * s) <= 0.005 * x_mm for s in INCH_STEPS_MM)
    return near and not _is_preferred(x_mm)


def test_the_imitation_check_catches_inch_sizes():
    # The check must flag typical inch dimensions converted to mm (so it is not hollow) and pass
    # ISO 3 numbers that happen to lie near one (19 mm is R40 although within 0.3 % of 3/4 in;
    # 25 mm is 1.6 % from 1 in).
    for inches in (0.375, 0.5, 1.0, 1.25, 1.4, 2.0, 2.4):
        assert _looks_converted_from_inches(inches * INCH_MM), inches
    assert not _looks_converted_from_inches(19.0)
    assert not _looks_converted_from_inches(25.0)


def test_no_row_is_an_inch_size():
    t = builtin_ring_sizes()
    for i in range(len(t)):
        for x in (t.cores[i].od, t.cores[i].id, t.cores[i].height):
            assert not _looks_converted_from_inches(x * 1e3), t.label(i)


def test_outside_diameters_are_iso3_r10_and_ratios_are_the_stated_ones():
    # ISO 3:1973 R10 for OD; the ID/OD and height/OD ratios stated in the file's header
    # (common practice, no published source), within the rounding to 0.1 mm or to an R40 number.
    t = builtin_ring_sizes()
    r10 = preferred_numbers(1.0, 1000.0, "R10")
    assert all(_is_preferred(od * 1e3, r10) for od in (c.od for c in t.cores))
    profiles = {"ring": [(0.6, 0.25), (0.5, 0.4)], "sleeve": [(0.5, 1.6)]}
    for i in range(len(t)):
        c = t.cores[i]
        ratios = (c.id / c.od, c.height / c.od)
        assert any(np.allclose(ratios, p, rtol=0.04) for p in profiles[t.kind[i]]), t.label(i)
    assert set(t.kind) == {"ring", "sleeve"}
    assert len(set((k, c.od, c.id, c.height) for k, c in zip(t.kind, t.cores))) == len(t)  # no duplicate rows


def test_size_tables_name_their_series(tmp_path):
    t = builtin_ring_sizes()
    assert "ISO 3" in t.series and "R10" in t.series
    p = tmp_path / "drawer.csv"
    p.write_text("kind,od_mm,id_mm,height_mm\nring,50,30,20\n")
    mine = load_ring_sizes(p)
    assert "drawer.csv" in mine.series
    p.write_text("# series: my drawer\nkind,od_mm,id_mm,height_mm\nring,50,30,20\n")
    assert load_ring_sizes(p).series == "my drawer"
    both = t + load_ring_sizes(p)
    assert both.series == f"{t.series} + my drawer" and len(both) == len(t) + 1


@pytest.mark.parametrize("inches", [0.5, 1.4])
def test_an_inch_row_would_fail(tmp_path, inches):
    # Mutation guard: a table with an inch-converted row is caught by the same check.
    od = inches * INCH_MM
    p = tmp_path / "inch.csv"
    p.write_text(f"kind,od_mm,id_mm,height_mm\nring,{od:.2f},{0.6 * od:.2f},{0.25 * od:.2f}\n")
    t = load_ring_sizes(p)
    assert _looks_converted_from_inches(t.cores[0].od * 1e3)
