"""Fitting a dispersion model to measured µ(f), with parameter uncertainties.

Two kinds of model are fitted with :func:`scipy.optimize.least_squares`:

* a **family** model with one parameter, the initial permeability µi. Within a ferrite family
  the product (µi − 1)·fr is roughly constant (Snoek's law, J. L. Snoek, Physica 14, 207, 1948),
  so a family is a two-component form (domain-wall resonance + spin relaxation, Tsutaoka,
  J. Appl. Phys. 93, 2789, 2003) whose spin-relaxation frequency is f_s = S/(µi − 1) and whose
  other frequencies and split are fixed ratios. The constants (S and the ratios) are passed in
  as :class:`FamilyConstants`; this module holds none of its own.
* **free** forms: Debye relaxation (µi, fr) and the two-component form (k_dw, f_dw, β, k_s, f_s),
  used when no family fits within the acceptance.

Parameters are fitted as logarithms (all are positive) on relative complex residuals weighted
for equal weight per decade of frequency. Uncertainties: covariance s²(JᵀJ)⁻¹ with
s² = Σr²/(m − n) (e.g. W. H. Press et al., *Numerical Recipes*, 3rd ed., 2007, §15.5), mapped
from log-parameters to parameters by σ_p = p·σ_ln p.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from ..errors import IdentificationError
from ..model.families import Family, snoek_two_component_permeability
from ..model.materials import Debye, Material, Tabulated, TwoComponent, debye_permeability, two_component_permeability

__all__ = [
    "FORMS",
    "DispersionFit",
    "FamilyConstants",
    "family_permeability",
    "fit_dispersion",
    "fit_form",
    "nearest_material",
]


def family_permeability(frequency_hz, mu_i, snoek_hz, spin_fraction, dw_to_spin, damping_to_dw):
    """µ of a family member of initial permeability µi (two-component form under Snoek's law).

    With χ = µi − 1: f_s = snoek_hz/χ, K_s = spin_fraction·χ, K_dw = (1 − spin_fraction)·χ,
    f_dw = dw_to_spin·f_s, β = damping_to_dw·f_dw.

    Parameters
    ----------
    frequency_hz : array_like
        Frequency [Hz].
    mu_i : float or array_like
        Initial relative permeability [dimensionless], > 1.
    snoek_hz : float
        Snoek product (µi − 1)·f_s of the family [Hz].
    spin_fraction : float
        Share of the static susceptibility carried by spin rotation [dimensionless], 0–1.
    dw_to_spin : float
        f_dw/f_s [dimensionless].
    damping_to_dw : float
        β/f_dw [dimensionless].

    Returns
    -------
    numpy.ndarray of complex
        µ' − jµ'' [dimensionless].

    References
    ----------
    J. L. Snoek, "Dispersion and absorption in magnetic ferrites at frequencies above one Mc/s",
    Physica 14(4), 207–217 (1948) (µi·fr ≈ const within a family); T. Tsutaoka, J. Appl. Phys.
    93(5), 2789 (2003), eqs. (1)–(3) (the two-component form).
    """
    # The families' own form (cmcheck.model.families), in the fit's parameters.
    return snoek_two_component_permeability(frequency_hz, mu_i, 1.0 - spin_fraction, dw_to_spin * snoek_hz,
                                            damping_to_dw, snoek_hz)


@dataclass(frozen=True)
class FamilyConstants:
    """The constants that make a one-parameter (µi) family; see :func:`family_permeability`.

    Attributes
    ----------
    name : str
        Family name as it should be read, e.g. ``"NiZn ferrite"``.
    snoek_hz : float
        (µi − 1)·f_s [Hz].
    spin_fraction, dw_to_spin, damping_to_dw : float
        Ratios [dimensionless].
    """

    name: str
    snoek_hz: float
    spin_fraction: float = 1.0
    dw_to_spin: float = 1.0
    damping_to_dw: float = 1.0
    #: The built-in family these constants come from (None for constants given by hand).
    source: Family | None = None

    def __post_init__(self) -> None:
        if not (np.isfinite(self.snoek_hz) and self.snoek_hz > 0):
            raise IdentificationError(f"family {self.name!r}: snoek_hz must be a positive frequency, got {self.snoek_hz!r}")
        if not (0 <= self.spin_fraction <= 1):
            raise IdentificationError(f"family {self.name!r}: spin_fraction must be within 0–1, got {self.spin_fraction!r}")
        if not (self.dw_to_spin > 0 and self.damping_to_dw > 0):
            raise IdentificationError(f"family {self.name!r}: dw_to_spin and damping_to_dw must be above 0")

    def permeability(self, frequency_hz, mu_i):
        """µ' − jµ'' [dimensionless] of the member of initial permeability ``mu_i`` at
        ``frequency_hz`` [Hz]; see :func:`family_permeability` (Snoek 1948, Tsutaoka 2003)."""
        return family_permeability(frequency_hz, mu_i, self.snoek_hz, self.spin_fraction, self.dw_to_spin,
                                   self.damping_to_dw)

    def bounded(self, mu_i):
        """``mu_i`` held within the source family's µi range (unchanged without a source family)."""
        if self.source is None:
            return mu_i
        return np.clip(mu_i, *self.source.mu_range)

    @classmethod
    def from_family(cls, family: Family) -> "FamilyConstants":
        """The constants of a built-in :class:`~cmcheck.model.families.Family` (same µ(f; µi)).

        A family's domain-wall share a is the complement of the spin fraction; a Debye family
        is a spin-only member (its relaxation frequency is the Snoek product over µi − 1).
        """
        if family.form == "debye" or family.domain_wall_fraction == 0.0:
            return cls(family.name, family.snoek_spin_hz, source=family)
        return cls(family.name, family.snoek_spin_hz, 1.0 - family.domain_wall_fraction,
                   family.snoek_domain_wall_hz / family.snoek_spin_hz, family.damping_ratio, source=family)

    @classmethod
    def from_material(cls, material: Material, name: str | None = None) -> "FamilyConstants":
        """The family a two-component or Debye material belongs to (its ratios, its Snoek product)."""
        m = material.model
        if isinstance(m, TwoComponent):
            chi = m.k_dw + m.k_s
            return cls(name or material.family or material.name, chi * m.f_s, m.k_s / chi, m.f_dw / m.f_s,
                       m.beta_hz / m.f_dw)
        if isinstance(m, Debye):
            return cls(name or material.family or material.name, (m.mu_i - 1.0) * m.f_r)
        raise IdentificationError(f"material {material.name!r}: only two-component and Debye models define a family")


def _debye(f, p):
    return debye_permeability(f, p[0], p[1])


def _two(f, p):
    return two_component_permeability(f, *p)


#: Free forms: (parameter names, µ(f, p)).
FORMS = {
    "debye": (("mu_i", "f_r"), _debye),
    "two_component": (("k_dw", "f_dw", "beta_hz", "k_s", "f_s"), _two),
}


@dataclass(frozen=True, eq=False)
class DispersionFit:
    """A fitted dispersion model.

    Attributes
    ----------
    form : str
        ``family:<name>``, ``debye`` or ``two_component``.
    parameters, uncertainties : dict
        Values and standard uncertainties (SI: Hz for frequencies).
    rms_relative_error : float
        sqrt(mean |µ_model − µ|²/|µ|²) over the fitted points [dimensionless].
    alternatives : dict
        rms relative error of every form tried.
    others : tuple of DispersionFit
        The other fitted forms (not chosen), e.g. for a joint Cp fit to start from.
    """

    form: str
    parameters: dict
    uncertainties: dict
    rms_relative_error: float
    family: FamilyConstants | None = None
    alternatives: dict = field(default_factory=dict)
    others: tuple = ()

    def permeability(self, frequency_hz):
        """µ' − jµ'' of the fitted model at ``frequency_hz`` [Hz]."""
        p = np.array(list(self.parameters.values()))
        if self.family is not None:
            return self.family.permeability(frequency_hz, p[0])
        return FORMS[self.form][1](frequency_hz, p)

    def to_dict(self) -> dict:
        return {"form": self.form, "parameters": dict(self.parameters), "uncertainties": dict(self.uncertainties),
                "rms_relative_error": self.rms_relative_error}


#: Largest number of points a dispersion fit uses (a log-spaced subset beyond it).
_MAX_FIT_POINTS = 400


def _decade_weights(f):
    lf = np.log(f)
    if f.size < 2:
        return np.ones_like(f)
    step = np.gradient(lf)
    return np.sqrt(step / np.mean(step))


def fit_form(frequency_hz, mu, model, x0, names, weights=None):
    """Least-squares fit of µ(f, p) to measured µ; returns (p, σ_p, rms relative error).

    Parameters
    ----------
    frequency_hz : array_like
        Frequencies of the trusted points [Hz].
    mu : array_like of complex
        Measured µ' − jµ'' there [dimensionless].
    model : callable
        model(frequency_hz, p) → µ.
    x0 : sequence of float
        Positive starting parameters.
    names : sequence of str
        Parameter names (for messages).
    weights : array_like, optional
        Per-point weights; equal weight per decade by default.

    References
    ----------
    scipy.optimize.least_squares (trust-region reflective); covariance s²(JᵀJ)⁻¹:
    W. H. Press et al., *Numerical Recipes*, 3rd ed., 2007, §15.5.
    """
    from scipy.optimize import least_squares  # kept off the CLI start-up path

    f = np.asarray(frequency_hz, float)
    mu = np.asarray(mu, complex)
    scale = np.abs(mu)
    w = _decade_weights(f) if weights is None else np.asarray(weights, float)

    def resid(x):
        d = (model(f, np.exp(x)) - mu) / scale * w
        return np.concatenate([d.real, d.imag])

    x0 = np.log(np.asarray(x0, float))
    with np.errstate(all="ignore"):
        sol = least_squares(resid, x0, method="trf", x_scale=1.0, max_nfev=2000)
    p = np.exp(sol.x)
    m, n = sol.fun.size, sol.x.size
    s2 = float(sol.fun @ sol.fun) / max(m - n, 1)
    jtj = sol.jac.T @ sol.jac
    try:
        cov = s2 * np.linalg.inv(jtj)
        sd = p * np.sqrt(np.clip(np.diag(cov), 0, None))
    except np.linalg.LinAlgError:
        sd = np.full(n, np.inf)
    if not np.all(np.isfinite(sd)) or np.linalg.cond(jtj) > 1e14:
        sd = np.where(np.isfinite(sd), sd, np.inf)
    rel = np.abs(model(f, p) - mu) / scale
    return p, sd, float(np.sqrt(np.mean(rel**2))), float(sol.cost)


def _debye_start(f, mu):
    mu_i = float(np.median(mu.real[: max(3, f.size // 20)]))
    chi = max(mu_i - 1.0, 1e-3)
    with np.errstate(all="ignore"):
        # Debye: µ''/(µ' − 1) = f/fr.
        fr = f * (mu.real - 1.0) / (-mu.imag)
    fr = fr[np.isfinite(fr) & (fr > 0)]
    fr_0 = float(np.median(fr)) if fr.size else float(f[-1]) * 10.0
    return [chi + 1.0, fr_0]


def fit_dispersion(frequency_hz, mu, *, families=(), accept=0.10, forms=("debye", "two_component")) -> DispersionFit:
    """Fit the families first (one parameter each), then the free forms; keep the best.

    The free forms are fitted too. A family is kept when its rms relative error is at most
    ``accept`` and at most twice that of the best free form plus 1 % (a family that a free
    form beats by more than that does not describe the core), or when it beats the free forms
    outright. Among the free forms, Debye is kept unless the two-component form halves its error (and
    gains more than 0.1 %).

    Parameters
    ----------
    frequency_hz : array_like
        Frequencies of trusted points [Hz] (at least 6).
    mu : array_like of complex
        µ' − jµ'' there [dimensionless].
    families : sequence of Family or FamilyConstants
        Candidate families (a built-in :class:`~cmcheck.model.families.Family` is fitted with µi
        held within its range).
    accept : float
        Largest rms relative error for a family to be kept [dimensionless].
    forms : sequence of str
        Free forms to try, keys of :data:`FORMS`.

    Returns
    -------
    DispersionFit

    References
    ----------
    Snoek, Physica 14, 207 (1948); Tsutaoka, J. Appl. Phys. 93, 2789 (2003); Press et al.,
    *Numerical Recipes*, 3rd ed., 2007, §15.5.
    """
    f = np.asarray(frequency_hz, float)
    mu = np.asarray(mu, complex)
    ok = np.isfinite(mu) & np.isfinite(f) & (f > 0)
    f, mu = f[ok], mu[ok]
    if f.size < 6:
        raise IdentificationError(f"mu: only {f.size} trusted points; a dispersion fit needs at least 6")
    for name in forms:
        if name not in FORMS:
            raise IdentificationError(f"forms: unknown form {name!r}; choose from {', '.join(FORMS)}")
    f_all, mu_all = f, mu
    if f.size > _MAX_FIT_POINTS:
        # Long linear sweeps crowd the top decade; a log-spaced subset fits as well, far faster.
        pick = np.unique(np.searchsorted(f, np.geomspace(f[0], f[-1], _MAX_FIT_POINTS)).clip(0, f.size - 1))
        f, mu = f[pick], mu[pick]
    tried: dict[str, float] = {}
    start = _debye_start(f, mu)
    best_family = None
    for fam in families:
        fam = fam if isinstance(fam, FamilyConstants) else FamilyConstants.from_family(fam)
        x0 = float(fam.bounded(max(start[0], 1.0 + 1e-3))) - 1.0
        # µi free within the family's range: outside it the family model is not claimed to hold.
        p, sd, rms, _ = fit_form(f, mu, lambda ff, q, fam=fam: fam.permeability(ff, fam.bounded(1.0 + q[0])),
                                 [max(x0, 1e-3)], ["mu_i"])
        mu_fit = float(fam.bounded(1.0 + p[0]))
        sd_mu = float(sd[0]) if mu_fit == 1.0 + p[0] else float("inf")
        key = f"family:{fam.name}"
        tried[key] = rms
        fit = DispersionFit(key, {"mu_i": mu_fit}, {"mu_i": sd_mu}, rms, fam)
        if best_family is None or rms < best_family.rms_relative_error:
            best_family = fit
    free: dict[str, DispersionFit] = {}
    if "debye" in forms or "two_component" in forms:
        names, model = FORMS["debye"]
        p, sd, rms, _ = fit_form(f, mu, model, start, names)
        start = [float(max(p[0], 1.0 + 1e-3)), float(p[1])]
        if "debye" in forms:
            tried["debye"] = rms
            free["debye"] = DispersionFit("debye", dict(zip(names, map(float, p))), dict(zip(names, map(float, sd))), rms)
    if "two_component" in forms:
        names, model = FORMS["two_component"]
        chi, fr = start[0] - 1.0, start[1]
        best = None
        for share in (0.7, 0.3):
            for a in (0.3, 1.0):
                for d in (3.0,):
                    x0 = [share * chi, a * fr, d * a * fr, (1 - share) * chi, fr * 1.5]
                    p, sd, rms, cost = fit_form(f, mu, model, x0, names)
                    if best is None or cost < best[3]:
                        best = (p, sd, rms, cost)
        p, sd, rms, _ = best
        tried["two_component"] = rms
        free["two_component"] = DispersionFit("two_component", dict(zip(names, map(float, p))),
                                              dict(zip(names, map(float, sd))), rms)
    if not free:
        return _with_rms(best_family, f_all, mu_all, tried)
    pick = free.get("debye") or free["two_component"]
    if "two_component" in free and (pick.form != "two_component") and \
            free["two_component"].rms_relative_error < 0.5 * pick.rms_relative_error - 0.001:
        pick = free["two_component"]
    if best_family is not None and (best_family.rms_relative_error <= pick.rms_relative_error or (
            best_family.rms_relative_error <= accept and best_family.rms_relative_error <= 2.0 * pick.rms_relative_error + 0.01)):
        pick = best_family
    others = list(free.values()) + ([best_family] if best_family is not None else [])
    return _with_rms(pick, f_all, mu_all, tried, others)


def _with_rms(fit: DispersionFit, f, mu, tried, others=()) -> DispersionFit:
    rms = float(np.sqrt(np.mean(np.abs(fit.permeability(f) - mu) ** 2 / np.abs(mu) ** 2)))
    return DispersionFit(fit.form, fit.parameters, fit.uncertainties, rms, fit.family, tried,
                         tuple(o for o in others if o is not fit))


def nearest_material(frequency_hz, mu, candidates) -> tuple[Material, float] | None:
    """The candidate material whose µ(f) lies nearest the measured one.

    Distance: the rms of |µ_candidate − µ_measured|/|µ_measured| (complex, so it weighs µ'
    and µ'' together) [dimensionless], with equal weight per decade of frequency (each point
    weighted by its share of ln f, so a linear sweep's crowded top decade does not dominate);
    a tabulated candidate is compared only where its table reaches, and skipped when it
    reaches no point.

    Parameters
    ----------
    frequency_hz : array_like
        Trusted frequencies [Hz].
    mu : array_like of complex
        Measured µ' − jµ'' [dimensionless].
    candidates : iterable of Material

    Returns
    -------
    (Material, float) or None
        The nearest material and its distance; None when no candidate could be compared.

    References
    ----------
    Common practice, no published source (a relative rms distance).
    """
    f = np.asarray(frequency_hz, float)
    mu = np.asarray(mu, complex)
    best = None
    for mat in candidates:
        sel = np.ones(f.shape, bool)
        if isinstance(mat.model, Tabulated):
            lo, hi = mat.model.range_hz
            sel = (f >= lo) & (f <= hi)
        if not sel.any():
            continue
        w = _decade_weights(f[sel]) ** 2
        e2 = np.abs(mat.permeability(f[sel]) - mu[sel]) ** 2 / np.abs(mu[sel]) ** 2
        d = float(np.sqrt(np.sum(w * e2) / np.sum(w)))
        if best is None or d < best[1]:
            best = (mat, d)
    return best
