"""Material families parametrised by initial permeability (cmcheck.model.families)."""

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from cmcheck.errors import MaterialError
from cmcheck.model.families import builtin_families, parse_member_name, preferred_numbers
from cmcheck.model.materials import (
    LISTING_SERIES,
    builtin_materials,
    family_grid,
    family_material,
    get_material,
    load_material_csv,
    purchase_label,
)

FAMILIES = builtin_families()


def _peak_frequency(family, mu_i):
    # Where µ'' peaks, found numerically on a fine log grid (no closed form used).
    f = np.geomspace(1e3, 1e12, 20001)
    return f[np.argmax(-family.permeability(f, mu_i).imag)]


@pytest.mark.parametrize("key", sorted(FAMILIES))
def test_snoek_product_is_constant_across_a_family(key):
    # Snoek, Physica 14, 207 (1948): within a ferrite family (µi − 1)·fr ≈ constant, of the
    # order of the gyromagnetic limit (2/3)(γ/2π)µ0Ms — about 1–20 GHz for ferrites and iron
    # powders (from memory). fr is taken as the frequency where µ'' peaks.
    fam = FAMILIES[key]
    lo, hi = fam.mu_range
    products = [(mu - 1) * _peak_frequency(fam, mu) for mu in np.geomspace(max(lo, 2.0), hi, 6)]
    assert np.ptp(products) / np.mean(products) < 0.01  # the grid step is 0.1 %
    assert 1e9 < np.mean(products) < 2e10


@settings(max_examples=60, deadline=None)
@given(key=st.sampled_from(sorted(FAMILIES)), x=st.floats(0, 1), f=st.floats(1e2, 1e11))
def test_members_are_passive(key, x, f):
    # IEC 60050 IEV 221-03-06 with e^{jωt}: a passive material has µ'' ≥ 0.
    fam = FAMILIES[key]
    lo, hi = fam.mu_range
    mu_i = lo * (hi / lo) ** x
    assert -fam.permeability(f, mu_i).imag >= 0


@pytest.mark.parametrize("key", sorted(FAMILIES))
def test_low_frequency_limit_is_mu_i(key):
    # Every dispersion form tends to its static permeability as f → 0 (Tsutaoka, J. Appl. Phys.
    # 93, 2789 (2003), eqs. 1–3: µ(0) = 1 + K_dw + K_s); at 1 Hz the member is at µi.
    fam = FAMILIES[key]
    for mu_i in fam.grid("R10"):
        mu = fam.permeability(1.0, mu_i)
        assert mu.real == pytest.approx(mu_i, rel=1e-5)
        assert -mu.imag < 1e-4 * mu_i


def test_two_component_member_matches_published_form():
    # Tsutaoka, J. Appl. Phys. 93, 2789 (2003), eqs. (1)–(3), evaluated here from the family's
    # constants with the Snoek scaling f = S/(µi − 1) (Snoek 1948); µi = 650 is on no grid.
    fam = FAMILIES["nizn"]
    mu_i, f = 650.0, np.geomspace(1e4, 1e9, 50)
    chi = mu_i - 1
    a = fam.domain_wall_fraction
    f_dw, f_s = fam.snoek_domain_wall_hz / chi, fam.snoek_spin_hz / chi
    beta = fam.damping_ratio * f_dw
    want = 1 + a * chi * f_dw**2 / (f_dw**2 - f**2 + 1j * f * beta) + (1 - a) * chi / (1 + 1j * f / f_s)
    got = get_material("nizn-650").permeability(f)
    assert np.allclose(got.real, want.real, rtol=1e-12) and np.allclose(got.imag, want.imag, rtol=1e-12)


def test_relaxation_member_matches_debye_form():
    # Debye relaxation µ = 1 + (µi − 1)/(1 + j f/fr) (Tsutaoka 2003, eq. 2), fr from Snoek's
    # product; at f = fr: µ' − 1 = µ'' = (µi − 1)/2.
    fam = FAMILIES["iron-powder"]
    assert fam.form == "debye"
    mu_i = 22.0
    fr = fam.snoek_spin_hz / (mu_i - 1)
    mu = fam.permeability(fr, mu_i)
    assert mu.real - 1 == pytest.approx((mu_i - 1) / 2)
    assert -mu.imag == pytest.approx((mu_i - 1) / 2)


def test_any_member_in_range_is_a_material():
    m = get_material("nizn-650")
    assert m.name == "nizn-650" and m.family == FAMILIES["nizn"].name
    assert m.initial_permeability == pytest.approx(650, rel=0.01)
    assert get_material("MnZn-2300").initial_permeability == pytest.approx(2300, rel=0.01)
    # Old class names stay valid as family members (aliases).
    f = np.geomspace(1e5, 1e8, 7)
    assert np.array_equal(get_material("nizn-800").permeability(f), FAMILIES["nizn"].permeability(f, 800))
    assert get_material("iron-powder-10").family == FAMILIES["iron-powder"].name


def test_member_outside_range_is_a_one_line_error_naming_the_range():
    lo, hi = FAMILIES["nizn"].mu_range
    with pytest.raises(MaterialError) as exc:
        get_material("nizn-5")
    msg = str(exc.value)
    assert f"{lo:g}–{hi:g}" in msg and "5" in msg and "\n" not in msg
    with pytest.raises(MaterialError, match="range|within"):
        family_material("mnzn", 1e6)
    with pytest.raises(MaterialError, match="unknown material"):
        get_material("unobtainium-800")
    assert parse_member_name("not-a-family-3") is None


def test_iso3_preferred_numbers():
    # ISO 3:1973 Table 1, rounded values, and the derived series R10/3 (every third term).
    assert list(preferred_numbers(1, 10, "R10")) == [1, 1.25, 1.6, 2, 2.5, 3.15, 4, 5, 6.3, 8, 10]
    r20 = preferred_numbers(100, 1000, "R20")
    assert len(r20) == 21 and 112 in r20 and 355 in r20 and 710 in r20
    assert list(preferred_numbers(1, 100, "R10/3")) == [1, 2, 4, 8, 16, 31.5, 63]
    with pytest.raises(MaterialError, match="series"):
        preferred_numbers(1, 10, "E12")


def test_listing_is_a_family_grid():
    # The built-in list is each family sampled on an ISO 3 series within its range — a grid,
    # not a line-up of grades: names are key-µi and the µi values are exactly the series.
    mats = builtin_materials()
    for key, fam in FAMILIES.items():
        members = [m for m in mats.values() if m.extra["family_key"] == key]
        mus = sorted(m.extra["mu_i"] for m in members)
        assert mus == list(preferred_numbers(*fam.mu_range, series=LISTING_SERIES))
        assert {m.name for m in members} == {f"{key}-{mu:g}" for mu in mus}
    assert {m.extra["family_key"] for m in mats.values()} == set(FAMILIES)


def test_family_grid_for_sizing_and_purchase_span():
    fam = FAMILIES["nizn"]
    grid = family_grid("nizn", "R20")
    mus = [m.extra["mu_i"] for m in grid]
    lo, hi = fam.mu_range
    assert mus == sorted(mus) and lo <= mus[0] and mus[-1] <= hi
    assert all(np.any(np.isclose(mu, preferred_numbers(lo, hi, "R20"))) for mu in mus)
    # What to buy: the neighbours on the searched grid (ISO 3 R10: 630, 800, 1000).
    assert fam.span(800, "R10") == (630, 1000)
    assert fam.span(650, "R10") == (630, 800)
    assert fam.purchase_label(800) == f"{fam.name}, µi ≈ 630–1000"
    assert fam.span(hi, "R10")[1] == hi  # the top of the range has no neighbour above
    assert purchase_label(get_material("nizn-800")) == f"{fam.name}, µi ≈ 630–1000"
    assert purchase_label(get_material("nizn-800"), "R20") == f"{fam.name}, µi ≈ 710–900"


def test_electrical_class():
    # NiZn is a dielectric (εr of order 10–15), MnZn and metal powder conduct (from memory;
    # high vs low volume resistivity). The stray-capacitance model needs this.
    assert FAMILIES["nizn"].electrical_class == "dielectric"
    assert 10 <= FAMILIES["nizn"].relative_permittivity <= 15
    assert FAMILIES["mnzn"].electrical_class == "conductive"
    assert FAMILIES["iron-powder"].electrical_class == "conductive"
    assert get_material("nizn-650").electrical_class == "dielectric"
    assert get_material("mnzn-2300").electrical_class == "conductive"
    for fam in FAMILIES.values():
        assert fam.sources and all("(" in s for s in fam.sources)  # each names a publication


def test_user_csv_declares_its_class(tmp_path):
    body = "frequency_hz,mu_prime,mu_double_prime\n1e6,100,10\n1e8,50,30\n"
    p = tmp_path / "m.csv"
    p.write_text("# invented demo curve\n# class: conductive\n" + body)
    m = load_material_csv(p)
    assert m.electrical_class == "conductive" and m.description == "invented demo curve"
    assert purchase_label(m) == "m"  # a user curve is bought by its own name
    p.write_text(body)
    assert load_material_csv(p).electrical_class == "unknown"
    p.write_text("# class: metallic\n" + body)
    with pytest.raises(MaterialError, match="m.csv.*class"):
        load_material_csv(p)
