"""From one measured sweep of a winding of known core factor and turns: µ(f), Cp, a model.

The loop: find the self-resonance; estimate Cp in closed form (Thomson's formula with the
low-frequency inductance); invert µ with Cp removed and mark trust; fit a dispersion model on
the trusted points; then refine Cp so that the fitted winding impedance resonates with it at the
measured self-resonance (a dispersive core has a lower µ' at resonance than at low frequency,
which the closed form misses); repeat until Cp settles.
"""

from __future__ import annotations

import warnings
from dataclasses import dataclass, field

import numpy as np

from ..curve import ImpedanceCurve
from ..errors import CmcheckWarning, IdentificationError
from ..model.materials import Material, Tabulated, TwoComponent, Debye
from .fit import DispersionFit, fit_dispersion, nearest_material
from .permeability import REASONS, PermeabilityData, measured_permeability
from .resonance import SelfResonance, estimate_cp, find_self_resonance

__all__ = ["Identification", "identify"]

SCHEMA_VERSION = 1


@dataclass(frozen=True, eq=False)
class Identification:
    """What one sweep tells about a core and its winding.

    Attributes
    ----------
    data : PermeabilityData
        Measured µ(f) with Cp removed, trust mask and reasons.
    cp_f, cp_uncertainty_f : float
        Stray capacitance and its standard uncertainty [F].
    cp_method : str
        How Cp was obtained.
    resonance : SelfResonance or None
        The first self-resonance, None when the sweep shows none.
    model : DispersionFit
        The dispersion model fitted to the trusted points.
    nearest : tuple of (Material, float) or None
        The nearest candidate material and its distance (rms relative complex difference of µ
        over the trusted points).
    c1, turns : float
        Core factor [1/m] and turns used.
    source : str
        Where the sweep came from.
    """

    data: PermeabilityData
    cp_f: float
    cp_uncertainty_f: float
    cp_method: str
    resonance: SelfResonance | None
    model: DispersionFit
    nearest: tuple | None
    c1: float
    turns: float
    source: str = ""
    notes: tuple = field(default_factory=tuple)

    @property
    def frequency_hz(self) -> np.ndarray:
        return self.data.frequency_hz

    @property
    def valid(self) -> np.ndarray:
        """Points where the measured µ is trusted [bool]."""
        return self.data.trusted

    @property
    def self_resonance_hz(self) -> float | None:
        return None if self.resonance is None else self.resonance.frequency_hz

    def nearest_description(self) -> str | None:
        """E.g. ``"nizn-800 (NiZn ferrite, µi ≈ 771)"``."""
        if self.nearest is None:
            return None
        mat = self.nearest[0]
        fam = mat.family or "material"
        return f"{mat.name} ({fam}, µi ≈ {mat.initial_permeability:.3g})"

    def family_label(self) -> str | None:
        """The nearest family and µi in words, e.g. ``"NiZn ferrite, µi ≈ 630–1000"``: the purchase
        label of the nearest family member (the span of its ISO 3 R10 grid neighbours,
        :func:`~cmcheck.model.materials.purchase_label`); None without a nearest material."""
        from ..model.materials import purchase_label

        return None if self.nearest is None else purchase_label(self.nearest[0])

    def material_permeability(self) -> np.ndarray:
        """µ over the whole measured band: measured where trusted, the fitted model elsewhere.

        Trusted points whose measured µ'' dips below 0 (noise on a nearly lossless core) take
        µ'' = 0 so the table stays passive.
        """
        mu = np.where(self.valid, self.data.mu, self.model.permeability(self.frequency_hz))
        return mu.real - 1j * np.clip(-mu.imag, 0.0, None)

    def to_material(self, name: str = "identified") -> Material:
        """The table of :meth:`material_permeability` as a :class:`Material` for the choke model."""
        mu = self.material_permeability()
        table = Tabulated(self.frequency_hz, mu.real, -mu.imag, source=f"identified from {self.source or 'a sweep'}")
        return Material(name, table, family="identified", description=self.summary(),
                        provenance=f"identified from {self.source or 'a measured sweep'}")

    def fitted_material(self, name: str = "identified-model") -> Material:
        """The fitted dispersion model as an analytic :class:`Material` (usable beyond the band)."""
        p = self.model.parameters
        if getattr(self.model.family, "source", None) is not None:
            from ..model.materials import family_material

            member = family_material(self.model.family.source, p["mu_i"])
            return Material(name, member.model, family=member.family, description=self.summary(),
                            provenance=f"{member.name} fitted to {self.source or 'a measured sweep'}",
                            extra=dict(member.extra), electrical_class=member.electrical_class)
        if self.model.family is not None:
            fam = self.model.family
            chi = p["mu_i"] - 1.0
            f_s = fam.snoek_hz / chi
            model = TwoComponent((1 - fam.spin_fraction) * chi, fam.dw_to_spin * f_s,
                                 fam.damping_to_dw * fam.dw_to_spin * f_s, fam.spin_fraction * chi, f_s)
        elif self.model.form == "debye":
            model = Debye(p["mu_i"], p["f_r"])
        else:
            model = TwoComponent(**p)
        return Material(name, model, family=self.model.form, description=self.summary(),
                        provenance=f"dispersion model fitted to {self.source or 'a measured sweep'}")

    def summary(self) -> str:
        """One line: model, Cp, resonance."""
        srf = "no self-resonance in the sweep" if self.resonance is None else \
            f"self-resonance {self.resonance.frequency_hz / 1e6:.4g} MHz"
        return (f"{self.model.form} fit (rms {100 * self.model.rms_relative_error:.2g} %), "
                f"Cp {self.cp_f * 1e12:.3g} ± {self.cp_uncertainty_f * 1e12:.2g} pF, {srf}")

    def material_comments(self) -> list[str]:
        """The ``#`` comment lines of the saved material CSV (which rows are the fitted model)."""
        from ..curve import true_runs

        f = self.frequency_hz
        lines = [f"identified from {self.source or 'a measured sweep'}: C1 = {self.c1:.6g} 1/m, N = {self.turns:g}",
                 self.summary()]
        lines.append("rows in the ranges below come from the fitted model, not from the measurement:")
        runs = true_runs(~self.valid)
        for a, b in runs:
            reason = self.data.reason[a]
            lines.append(f"  model {f[a]:.6g}-{f[b - 1]:.6g} Hz ({REASONS.get(reason, reason)})")
        if not runs:
            lines.append("  none")
        return lines

    def save_material_csv(self, path) -> None:
        """Write the whole-band material table (frequency_hz,mu_prime,mu_double_prime), atomically."""
        from ..model.materials import save_material_csv

        save_material_csv(path, self.frequency_hz, self.material_permeability(), self.material_comments())

    def to_dict(self) -> dict:
        """JSON-ready result with the agreed keys."""
        near = None
        if self.nearest is not None:
            near = {"name": self.nearest[0].name, "distance": self.nearest[1], "description": self.nearest_description(),
                    "family_label": self.family_label(),
                    "distance_measure": "rms over trusted points, equal weight per decade, of |µ_candidate − µ_measured|/|µ_measured|"}
        return {
            "schema_version": SCHEMA_VERSION,
            "source": self.source,
            "c1_per_m": self.c1,
            "turns": self.turns,
            "l0_h": self.data.l0_h,
            "frequency_hz": self.frequency_hz.tolist(),
            "mu_prime": self.data.mu_prime.tolist(),
            "mu_double_prime": self.data.mu_double_prime.tolist(),
            "valid": self.valid.tolist(),
            "reason": self.data.reason.tolist(),
            "cp_f": self.cp_f,
            "cp_uncertainty_f": self.cp_uncertainty_f,
            "cp_method": self.cp_method,
            "self_resonance_hz": self.self_resonance_hz,
            "self_resonance_uncertainty_hz": None if self.resonance is None else self.resonance.uncertainty_hz,
            "model": self.model.to_dict(),
            "nearest_material": near,
            "notes": list(self.notes),
        }


def _nearest(fit: DispersionFit, f, mu, candidates):
    """(Material, distance) of the nearest candidate; see :func:`identify`'s ``candidates``."""
    from ..model.families import builtin_families
    from ..model.materials import family_grid, family_material

    fam = getattr(fit.family, "source", None)
    if candidates is None and fam is not None:
        grid = fam.grid("R10")
        mu_i = grid[int(np.argmin(np.abs(np.log(grid / fit.parameters["mu_i"]))))]
        candidates = [family_material(fam, mu_i)]
    elif candidates is None:
        candidates = [m for fam in builtin_families().values() for m in family_grid(fam, "R10")]
    return nearest_material(f, mu, candidates) if len(candidates) else None


def _joint_cp(f, z, error, f0, l0, r_conductor, fit: DispersionFit, cp0):
    """Cp from the joint fit (:func:`_joint_cp_one`) that fits Z best, starting from the chosen
    dispersion fit and from each other form fitted beside it."""
    best = None
    for start in (fit, *fit.others):
        out = _joint_cp_one(f, z, error, f0, l0, r_conductor, start, cp0)
        if out is not None and (best is None or out[2] < best[2]):
            best = out
    return None if best is None else best[:2]


def _joint_cp_one(f, z, error, f0, l0, r_conductor, fit: DispersionFit, cp0):
    """Cp from one least-squares fit of Z = 1/(1/(jωL0µ(f; p) + Rc) + jωCp) over the sweep up to
    1.3 f0, the dispersion parameters p free alongside Cp (weights 1/max(error, 1 %)).

    Near resonance Z is most sensitive to Cp, so the points the µ inversion cannot trust are the
    ones that fix Cp. Returns (Cp [F], its relative standard uncertainty, cost) or None.
    """
    from scipy.optimize import least_squares  # kept off the CLI start-up path

    from .fit import FORMS

    sel = np.isfinite(z) & (f <= 1.3 * f0) & (z != 0)
    if sel.sum() < 8:
        return None
    ff, zz = f[sel], z[sel]
    err = np.full(ff.size, 0.01) if error is None else np.maximum(np.asarray(error, float)[sel], 0.01)
    if ff.size > 400:
        pick = np.unique(np.searchsorted(ff, np.geomspace(ff[0], ff[-1], 400)).clip(0, ff.size - 1))
        ff, zz, err = ff[pick], zz[pick], err[pick]
    err = np.where(np.isfinite(err), err, 1e3)
    w = 2.0 * np.pi * ff
    p0 = np.array(list(fit.parameters.values()), float)
    if fit.family is not None:
        def mu_of(q):
            return fit.family.permeability(ff, 1.0 + q[0])
        p0 = np.array([p0[0] - 1.0])
    else:
        model = FORMS[fit.form][1]

        def mu_of(q):
            return model(ff, q)

    def resid(x):
        q, cp = np.exp(x[:-1]), np.exp(x[-1])
        zm = 1.0 / (1.0 / (1j * w * l0 * mu_of(q) + r_conductor) + 1j * w * cp)
        d = np.log(zm / zz) / err
        return np.concatenate([d.real, d.imag])

    x0 = np.log(np.append(np.maximum(p0, 1e-9), cp0))
    with np.errstate(all="ignore"):
        sol = least_squares(resid, x0, method="trf", max_nfev=2000)
    if not sol.success or not np.all(np.isfinite(sol.x)):
        return None
    m, n = sol.fun.size, sol.x.size
    s2 = float(sol.fun @ sol.fun) / max(m - n, 1)
    try:
        var = s2 * np.linalg.inv(sol.jac.T @ sol.jac)[-1, -1]
    except np.linalg.LinAlgError:
        return None
    rel = float(np.sqrt(var)) if var >= 0 and np.isfinite(var) else np.inf
    return float(np.exp(sol.x[-1])), rel, float(sol.cost)


def identify(measured, *, c1: float, turns: float, cp_f: float | None = None, cp_uncertainty_f: float = 0.0,
             r_conductor: float = 0.0, families=None, candidates=None, forms=("debye", "two_component"),
             accept: float = 0.10, resonance_fraction: float = 0.7, tolerance: float = 0.10) -> Identification:
    """Identify the core material µ(f) and the winding's Cp from one measured sweep.

    Parameters
    ----------
    measured : Extraction or ImpedanceCurve
        From :func:`cmcheck.measurement.methods.extract` (its per-point error estimate is then
        used) or any impedance curve with a validity mask.
    c1 : float
        Core factor Σl/A [1/m] (IEC 60205; for a ring see ``ring_core_factors``).
    turns : float
        Turns N [dimensionless].
    cp_f : float, optional
        Known stray capacitance [F]; estimated from the self-resonance when omitted.
    cp_uncertainty_f : float
        Its standard uncertainty [F] when given.
    r_conductor : float
        Conductor resistance [Ω] to remove (default 0: included in µ'').
    families : sequence of Family or FamilyConstants, optional
        Family models to try first (µi free within each family's range); the built-in families
        (:func:`~cmcheck.model.families.builtin_families`) by default, ``()`` for none.
    candidates : sequence of Material, optional
        Materials to name the nearest of. By default the members of the built-in families on
        the ISO 3 R10 grid; when a built-in family's fit is kept, the nearest is its member at
        the grid value nearest the fitted µi (in ratio).
    forms : sequence of str
        Free dispersion forms.
    accept : float
        Largest rms relative error for a family model to be kept [dimensionless].
    resonance_fraction : float
        Highest trusted frequency as a fraction of the self-resonance [dimensionless].
    tolerance : float
        Largest estimated relative error of a trusted µ point [dimensionless].

    Returns
    -------
    Identification

    Raises
    ------
    IdentificationError
        Too few trusted points for a fit, or bad parameters.

    References
    ----------
    Winding model: A. Massarini & M. K. Kazimierczuk, IEEE Trans. Power Electron. 12(4), 1997;
    µ inversion: IEC 60050-221, IEV 221-03-06; dispersion: Snoek, Physica 14 (1948), Tsutaoka,
    J. Appl. Phys. 93 (2003).
    """
    curve = getattr(measured, "curve", measured)
    if not isinstance(curve, ImpedanceCurve):
        raise IdentificationError("measured must be an Extraction with an impedance curve or an ImpedanceCurve")
    error = getattr(getattr(measured, "validity", None), "relative_error", None)
    source = getattr(measured, "source", "") or curve.label
    f, z, valid = curve.frequency_hz, curve.z, curve.valid
    notes: list[str] = []
    if families is None:
        from ..model.families import builtin_families

        families = tuple(builtin_families().values())
    res = find_self_resonance(f, z)
    if cp_f is not None:
        if not (isinstance(cp_f, (int, float, np.floating)) and np.isfinite(cp_f) and cp_f >= 0):
            raise IdentificationError(f"cp_f must be a capacitance ≥ 0 in F, got {cp_f!r}")
        cp, u_cp, method = float(cp_f), float(cp_uncertainty_f), "given"
    elif res is not None:
        est = estimate_cp(f, z, valid, resonance=res)
        cp, u_cp, method = est.cp_f, est.uncertainty_f, est.method
    else:
        cp, u_cp, method = 0.0, 0.0, "none: the sweep shows no self-resonance"
        notes.append("no self-resonance in the sweep: Cp is not removed, µ near the top of the band may read high")

    def run(cp_now, u_now):
        data = measured_permeability(f, z, c1=c1, turns=turns, cp_f=cp_now, cp_uncertainty_f=u_now,
                                     resonance_hz=None if res is None else res.frequency_hz, measurement_valid=valid,
                                     measurement_error=error, r_conductor=r_conductor,
                                     resonance_fraction=resonance_fraction, tolerance=tolerance)
        t = data.trusted
        if t.sum() < 6:
            raise IdentificationError(f"{source or 'measured'}: only {int(t.sum())} trusted points "
                                      f"({data.excluded()}); a dispersion fit needs at least 6")
        return data, fit_dispersion(f[t], data.mu[t], families=families, accept=accept, forms=forms)

    # Cp's uncertainty is only known once the model is fitted: the first passes leave it out.
    data, fit = run(cp, 0.0 if cp_f is None else u_cp)
    if res is not None and cp_f is None:
        closed = cp
        joint = _joint_cp(f, z, error, res.frequency_hz, data.l0_h, r_conductor, fit, cp)
        if joint is None or not np.isfinite(joint[1]):
            notes.append("the joint fit of Cp and µ(f) through the resonance failed; Cp kept from the closed form")
        else:
            cp, rel_fit = joint
            u_cp = float(cp * np.hypot(2.0 * res.uncertainty_hz / res.frequency_hz, rel_fit))
            method = "joint fit of Cp and the dispersion model to Z through the self-resonance"
            if abs(cp - closed) > 3 * max(u_cp, 1e-18):
                notes.append(f"Cp from the joint fit ({cp * 1e12:.3g} pF) differs from the closed form "
                             f"({closed * 1e12:.3g} pF): the core disperses below the resonance")
        data, fit = run(cp, u_cp)
    n_model = int((~data.trusted).sum())
    if n_model:
        warnings.warn(f"{source or 'measured'}: {n_model} of {f.size} points are not trusted for µ "
                      f"({', '.join(f'{k}: {v}' for k, v in data.excluded().items())}); the saved material uses the "
                      "fitted model there", CmcheckWarning, stacklevel=2)
    near = _nearest(fit, f[data.trusted], data.mu[data.trusted], candidates)
    return Identification(data, cp, u_cp, method, res, fit, near, float(c1), float(turns), source, tuple(notes))
