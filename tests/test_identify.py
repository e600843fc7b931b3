"""Identification library on synthetic sweeps: a winding built from a known material, geometry
and Cp, written as Touchstone by scikit-rf with trace noise, read back and identified."""

from __future__ import annotations

import math
import warnings

import numpy as np
import pytest

from cmcheck.errors import CmcheckWarning, IdentificationError
from cmcheck.identify import FamilyConstants, find_self_resonance, identify, measured_permeability
from cmcheck.identify.circuit import fit_circuit, foster_impedance, quick_estimates
from cmcheck.measurement.methods import extract
from cmcheck.measurement.touchstone import read_touchstone
from cmcheck.measurement.validity import Accuracy
from cmcheck.model.materials import builtin_materials, family_grid, get_material, load_material_csv

MU0 = 4e-7 * math.pi  # close enough to the 2019 SI value for a 5 % test
# 9.55 × 4.75 × 3.2 mm ring, IEC 60205 C1 = 2π/(h·ln(OD/ID)), computed here, not by cmcheck.
C1 = 2 * math.pi / (3.2e-3 * math.log(9.55 / 4.75))
TURNS, CP, RC = 12, 3.0e-12, 0.05
NOISE = 10 ** (-70 / 20)  # trace noise of a bench analyser at a moderate IF bandwidth (common practice)


def true_mu(f):
    # Two-component dispersion (Tsutaoka, J. Appl. Phys. 93, 2003, eqs. 1-3), written out here.
    return 1 + 560 * 25e6**2 / (25e6**2 - f**2 + 1j * f * 85e6) + 210 / (1 + 1j * f / 75e6)


def true_z(f):
    w = 2 * np.pi * f
    zw = 1j * w * MU0 * TURNS**2 / C1 * true_mu(f) + RC
    return 1 / (1 / zw + 1j * w * CP)


def true_srf():
    from scipy.optimize import brentq

    return brentq(lambda f: true_z(f).imag, 5e6, 50e6)


@pytest.fixture(scope="module")
def synthetic(tmp_path_factory):
    import skrf

    f = np.linspace(0.1e6, 60e6, 1200)
    z = true_z(f)
    s = (z - 50) / (z + 50)
    rng = np.random.default_rng(7)
    s = s + NOISE * (rng.standard_normal(f.size) + 1j * rng.standard_normal(f.size)) / np.sqrt(2)
    d = tmp_path_factory.mktemp("syn")
    skrf.Network(frequency=skrf.Frequency.from_f(f, unit="hz"), s=s, z0=50).write_touchstone("winding", dir=str(d))
    # The extraction is told the synthetic instrument's noise and that it has no calibration error.
    return extract(read_touchstone(d / "winding.s1p"), accuracy=Accuracy(floor_db=-70, cal_error=0.0))


@pytest.fixture(scope="module")
def identified(synthetic):
    return _identify(synthetic)


def _identify(ex, **kw):
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", CmcheckWarning)
        return identify(ex, c1=C1, turns=TURNS, **kw)


def test_round_trip_recovers_mu_and_cp(identified):
    r = identified
    f0 = true_srf()
    assert r.self_resonance_hz == pytest.approx(f0, rel=0.02)
    # Issue acceptance: µ', µ'' within 5 % from 1 MHz to half the self-resonance, Cp within 10 %.
    sel = (r.frequency_hz >= 1e6) & (r.frequency_hz <= f0 / 2)
    mu = true_mu(r.frequency_hz[sel])
    assert np.max(np.abs(r.data.mu_prime[sel] / mu.real - 1)) < 0.05
    assert np.max(np.abs(r.data.mu_double_prime[sel] / -mu.imag - 1)) < 0.05
    assert r.cp_f == pytest.approx(CP, rel=0.10)
    assert 0 < r.cp_uncertainty_f < 0.5 * CP
    d = r.to_dict()
    for key in ("frequency_hz", "mu_prime", "mu_double_prime", "valid", "cp_f", "self_resonance_hz", "model",
                "nearest_material"):
        assert key in d
    assert set(d["model"]) == {"form", "parameters", "uncertainties", "rms_relative_error"}


def test_naive_inversion_and_magnitude_peak_fail_where_identification_holds(synthetic):
    # No hollow pass: the plain Z/(jωL0) without Cp removal, and the argmax of |Z| as the
    # resonance, miss the same acceptance limits on the same file.
    f, z = synthetic.frequency_hz, synthetic.curve.z
    f0 = true_srf()
    sel = (f >= 1e6) & (f <= f0 / 2)
    naive = z[sel] / (2j * np.pi * f[sel] * MU0 * TURNS**2 / C1)
    assert np.max(np.abs(naive.real / true_mu(f[sel]).real - 1)) > 0.10
    assert abs(f[np.argmax(np.abs(z))] / f0 - 1) > 0.05
    # and the closed-form Cp (low-frequency inductance) misses by more than 10 %, which is why
    # identify refines it with the fitted µ at the resonance:
    from cmcheck.identify import estimate_cp

    assert abs(estimate_cp(f, z, synthetic.valid).cp_f / CP - 1) > 0.10


def test_family_fit_and_nearest_material(synthetic):
    # Candidates: each family on the ISO 3 R10 grid (cmcheck.model.materials.family_grid).
    # identify's defaults: the built-in families (µi free within each range), the nearest named
    # on the family's ISO 3 R10 grid (cmcheck.model.materials.family_grid).
    r = _identify(synthetic)
    # The synthetic material is the NiZn family member of µi = 1 + 560 + 210 = 771.
    assert r.model.form == "family:NiZn ferrite"
    assert r.model.parameters["mu_i"] == pytest.approx(771, rel=0.03)
    assert r.model.uncertainties["mu_i"] < 20
    assert r.nearest[0].name == "nizn-800" and "NiZn" in r.nearest_description()
    assert r.to_dict()["nearest_material"]["name"] == "nizn-800"
    # ISO 3:1973 R10 neighbours of 771 are 630 and 1000.
    assert r.family_label() == "NiZn ferrite, µi ≈ 630–1000"
    # Against every grid member of every family (explicit candidates), nizn-800 is still nearest.
    mats = [m for k in ("nizn", "mnzn", "iron-powder") for m in family_grid(k, "R10")]
    assert _identify(synthetic, candidates=mats).nearest[0].name == "nizn-800"
    # The family member as an analytic material for the choke model: the same µ(f) as the fit,
    # and the synthetic material's within 3 % (µi 771 of the same family).
    f = r.frequency_hz
    assert np.allclose(r.fitted_material().permeability(f), r.model.permeability(f), rtol=1e-9)
    assert np.max(np.abs(r.fitted_material().permeability(f) / true_mu(f) - 1)) < 0.03


def test_free_form_fit_with_uncertainties(synthetic):
    r = _identify(synthetic, families=(), forms=("debye",))
    assert r.model.form == "debye"
    p, u = r.model.parameters, r.model.uncertainties
    # A single relaxation cannot follow a two-component material exactly; its µi still is the
    # low-frequency µ' (771) and the rms error reports the misfit honestly.
    assert p["mu_i"] == pytest.approx(771, rel=0.05)
    assert 0 < u["mu_i"] < 0.1 * p["mu_i"] and 0 < u["f_r"] < p["f_r"]
    assert 0 < r.model.rms_relative_error < 0.2


def test_saved_material_covers_the_whole_band(identified, tmp_path):
    r = identified
    path = tmp_path / "identified.csv"
    r.save_material_csv(path)
    text = path.read_text(encoding="utf-8")
    assert "fitted model" in text and "above_resonance" not in text
    mat = load_material_csv(path)
    f = r.frequency_hz
    mu = mat.permeability(f)
    t = r.valid
    assert (~t).any() and t.any()
    assert np.allclose(mu.real[t], r.data.mu_prime[t], rtol=1e-6)
    model = r.model.permeability(f[~t])
    assert np.allclose(mu.real[~t], model.real, rtol=1e-6)
    # The table is usable by the choke model over the whole measured band.
    assert np.all(np.isfinite(mat.permeability(np.array([f[0], f[-1]]))))


def test_identified_material_feeds_back_into_the_choke_model(identified):
    # Closing the loop: the saved table (measured where trusted, fitted model elsewhere) and the
    # fitted analytic model, put back into the winding model with the identified Cp, reproduce
    # the true winding (the formula at the top of this file) across the whole sweep, above the
    # self-resonance too, where the table holds only the fitted model.
    from cmcheck.model.choke import choke_impedance

    r = identified
    f = r.frequency_hz
    zt = true_z(f)
    for mat in (r.to_material(), r.fitted_material()):
        zc = choke_impedance(f, r.data.l0_h, mat.permeability(f), 0.0, r.cp_f)
        assert np.max(np.abs(zc.real - zt.real) / np.abs(zt)) < 0.05
        assert np.max(np.abs(zc.imag - zt.imag) / np.abs(zt)) < 0.05


def test_given_cp_is_used_and_bad_parameters_are_named(synthetic):
    r = _identify(synthetic, cp_f=CP)
    assert r.cp_f == CP and r.cp_method == "given"
    with pytest.raises(IdentificationError, match="c1"):
        identify(synthetic, c1=0.0, turns=TURNS)
    with pytest.raises(IdentificationError, match="turns"):
        identify(synthetic, c1=C1, turns=-2)
    with pytest.raises(IdentificationError, match="cp_f"):
        identify(synthetic, c1=C1, turns=TURNS, cp_f=-1e-12)
    with pytest.raises(IdentificationError, match="resonance_fraction"):
        measured_permeability([1e6, 2e6], [1j, 2j], c1=C1, turns=2, resonance_fraction=0)


def test_trust_reasons_near_and_above_resonance(identified):
    r = identified
    f0 = r.self_resonance_hz
    assert not r.valid[r.frequency_hz >= f0].any()
    assert set(r.data.reason[r.frequency_hz >= f0]) == {"above_resonance"}
    assert set(r.data.reason[(r.frequency_hz > 0.7 * f0) & (r.frequency_hz < f0)]) == {"near_resonance"}


def test_no_resonance_on_an_inductor():
    f = np.geomspace(1e5, 1e8, 300)
    assert find_self_resonance(f, 0.1 + 2j * np.pi * f * 1e-6) is None
    # A lossless parallel LC: X turns + to − at 1/(2π√(LC)) (Thomson's formula).
    w = 2 * np.pi * f
    z = 1 / (1 / (1j * w * 10e-6) + 1j * w * 10e-12)
    res = find_self_resonance(f, z)
    assert res.frequency_hz == pytest.approx(1 / (2 * np.pi * math.sqrt(10e-6 * 10e-12)), rel=2e-3)


def test_circuit_fit_of_a_single_tank_recovers_its_elements():
    # Rs + (R ∥ L ∥ C) evaluated here; the fit must find the elements (Foster form, one tank).
    f = np.geomspace(1e5, 1e8, 300)
    w = 2 * np.pi * f
    z = 0.5 + 1 / (1 / 4000 + 1 / (1j * w * 50e-6) + 1j * w * 5e-12)
    est = quick_estimates(f, z)
    assert est.inductance_h == pytest.approx(50e-6, rel=0.02)
    assert est.cp_f == pytest.approx(5e-12, rel=0.03)
    ck = fit_circuit(f, z, series_inductance=False)
    assert len(ck.branches) == 1 and ck.rms_relative_error < 1e-3
    r, ind, c = ck.branches[0]
    assert (r, ind, c) == (pytest.approx(4000, rel=1e-3), pytest.approx(50e-6, rel=1e-3), pytest.approx(5e-12, rel=1e-3))
    assert np.allclose(foster_impedance(f, ck.r_series_ohm, 0.0, ck.branches), z, rtol=1e-3)
    with pytest.raises(IdentificationError, match="max_branches"):
        fit_circuit(f, z, max_branches=0)
    with pytest.raises(IdentificationError, match="name"):
        ck.to_spice("bad name")


def test_nearest_material_distance_is_the_stated_measure():
    # Distance = rms |µ_cand − µ|/|µ| (stated in nearest_material): a measurement 10 % above a
    # candidate in complex µ is at 0.1/1.1 from it (arithmetic).
    from cmcheck.identify import nearest_material
    from cmcheck.model.materials import Debye, Material

    f = np.geomspace(1e5, 1e8, 50)
    low = Material("low", Debye(100.0, 20e6))
    high = Material("high", Debye(300.0, 20e6))
    mu = 1.1 * low.permeability(f)
    mat, d = nearest_material(f, mu, [high, low])
    assert mat.name == "low" and d == pytest.approx(0.1 / 1.1, rel=1e-9)


def test_family_follows_snoeks_law():
    # Snoek (Physica 14, 1948): (µi − 1)·fr is constant within a family. A pure-spin family
    # (spin_fraction 1) is a Debye relaxation (Tsutaoka 2003, eq. 2) with fr = S/(µi − 1),
    # written out here for µi = 201 and S = 8 GHz, and the family fit must recover µi.
    from cmcheck.identify import family_permeability, fit_dispersion

    f = np.geomspace(1e5, 3e8, 80)
    mu = 1 + 200 / (1 + 1j * f / (8e9 / 200))
    assert np.allclose(family_permeability(f, 201.0, 8e9, 1.0, 1.0, 1.0), mu, rtol=1e-12)
    fam = FamilyConstants("test family", 8e9)
    fit = fit_dispersion(f, mu, families=[fam])
    assert fit.form == "family:test family"
    assert fit.parameters["mu_i"] == pytest.approx(201, rel=1e-6) and fit.rms_relative_error < 1e-6


def test_a_family_beaten_by_a_free_form_is_not_kept():
    # Data from a Debye relaxation (µi 201, fr 40 MHz, Tsutaoka 2003 eq. 2, written out); a family
    # whose Snoek product puts its member's fr at 50 MHz fits within a loose acceptance, but the
    # free Debye form fits far better, so the family does not describe this core.
    from cmcheck.identify import fit_dispersion

    f = np.geomspace(1e5, 3e8, 80)
    mu = 1 + 200 / (1 + 1j * f / 40e6)
    fit = fit_dispersion(f, mu, families=[FamilyConstants("other", 10e9)], accept=0.5)
    assert fit.alternatives["family:other"] < 0.5
    assert fit.form == "debye" and fit.parameters["f_r"] == pytest.approx(40e6, rel=1e-6)


def test_cp_from_resonance_is_thomson_for_a_lossless_winding():
    # Thomson's formula: a lossless L resonates with C = 1/(ω0²L); with loss R the admittance
    # condition Im(1/(R + jω0L)) + ω0C = 0 gives C = L/(R² + ω0²L²) (algebra).
    from cmcheck.identify import cp_from_resonance

    f0, ind, r = 10e6, 50e-6, 800.0
    w0 = 2 * np.pi * f0
    assert cp_from_resonance(f0, 1j * w0 * ind) == pytest.approx(1 / (w0**2 * ind), rel=1e-12)
    assert cp_from_resonance(f0, r + 1j * w0 * ind) == pytest.approx(ind / (r**2 + (w0 * ind) ** 2), rel=1e-12)


def test_family_fit_holds_mu_i_within_the_family_range():
    # A relaxation (Debye, µi = 300, fr = S/(µi − 1) with the iron-powder family's Snoek product,
    # written out here) is the iron-powder shape beyond its µi range (4–100): the family fit stops
    # at 100 and a free form, which follows it, is kept instead.
    from cmcheck.identify import fit_dispersion
    from cmcheck.model.families import builtin_families

    fam = builtin_families()["iron-powder"]
    f = np.geomspace(1e5, 1e8, 60)
    mu = 1 + 299 / (1 + 1j * f / (fam.snoek_spin_hz / 299))
    fit = fit_dispersion(f, mu, families=[fam])
    assert fit.alternatives["family:iron powder"] > 0.3
    assert fit.form == "debye" and fit.parameters["mu_i"] == pytest.approx(300, rel=1e-3)
    held = [o for o in fit.others if o.form == "family:iron powder"][0]
    assert held.parameters["mu_i"] == pytest.approx(100)
