"""Core materials as physical families parametrised by initial permeability µi.

A family (NiZn ferrite, MnZn ferrite, iron powder) is one dispersion shape whose frequencies
scale with µi by Snoek's law, (µi − 1)·f = constant, so any µi within the family's range is
a material: ``nizn-650`` is NiZn ferrite with µi = 650. The constants live in
``data/materials.json``; they are representative (from memory) unless a provenance note says
what they were adjusted toward. Grids of members use the ISO 3 preferred numbers, so no list
of grades is implied.
"""

from __future__ import annotations

import json
import re
from dataclasses import dataclass
from functools import lru_cache
from importlib import resources

import numpy as np

from ..errors import MaterialError
from .dispersion import Debye, TwoComponent

__all__ = [
    "ELECTRICAL_CLASSES",
    "Family",
    "builtin_families",
    "parse_member_name",
    "preferred_numbers",
    "snoek_two_component_permeability",
]

#: What a core is to the winding's electric field: a dielectric (NiZn, εr ≈ 10–15) or a
#: floating conductor (MnZn, metal powder); "unknown" for a user curve that does not say.
ELECTRICAL_CLASSES = ("dielectric", "conductive", "unknown")

# ISO 3:1973, Table 1: the rounded values of the basic series R10, R20 and R40 in one decade.
_BASIC_SERIES = {
    "R10": (1.00, 1.25, 1.60, 2.00, 2.50, 3.15, 4.00, 5.00, 6.30, 8.00),
    "R20": (1.00, 1.12, 1.25, 1.40, 1.60, 1.80, 2.00, 2.24, 2.50, 2.80,
            3.15, 3.55, 4.00, 4.50, 5.00, 5.60, 6.30, 7.10, 8.00, 9.00),
    "R40": (1.00, 1.06, 1.12, 1.18, 1.25, 1.32, 1.40, 1.50, 1.60, 1.70, 1.80, 1.90, 2.00, 2.12,
            2.24, 2.36, 2.50, 2.65, 2.80, 3.00, 3.15, 3.35, 3.55, 3.75, 4.00, 4.25, 4.50, 4.75,
            5.00, 5.30, 5.60, 6.00, 6.30, 6.70, 7.10, 7.50, 8.00, 8.50, 9.00, 9.50),
}
# Derived series "R10/3": every third term of R10, taken from 1.00 (ISO 3:1973, clause 3.2);
# about a doubling per step, used for the short listing grid.
_DERIVED = {"R10/3": ("R10", 3)}


def preferred_numbers(low, high, series: str = "R10") -> np.ndarray:
    """ISO 3 preferred numbers from ``low`` to ``high`` inclusive.

    Parameters
    ----------
    low, high : float
        Range ends [any unit]; both positive, low ≤ high.
    series : str
        ``"R10"``, ``"R20"``, ``"R40"`` or the derived ``"R10/3"``.

    Returns
    -------
    numpy.ndarray
        The rounded preferred numbers within the range, ascending.

    References
    ----------
    ISO 3:1973, "Preferred numbers — Series of preferred numbers", Table 1 (basic series,
    rounded values) and clause 3.2 (derived series).
    """
    key = str(series).upper()
    if key not in _BASIC_SERIES and key not in _DERIVED:
        raise MaterialError(f"series must be one of R10, R20, R40, R10/3, got {series!r}")
    if not (np.isfinite(low) and np.isfinite(high) and 0 < low <= high):
        raise MaterialError(f"preferred-number range must be 0 < low ≤ high, got {low}–{high}")
    base, step = _DERIVED.get(key, (key, 1))
    mant = np.asarray(_BASIC_SERIES[base])
    decades = np.arange(int(np.floor(np.log10(low))) - 1, int(np.ceil(np.log10(high))) + 1)
    values = (mant[None, :] * 10.0 ** decades[:, None]).reshape(-1)
    if step > 1:
        # every step-th term counted from a decade's 1.00, the terms derived series keep
        n0 = np.round(np.log10(values) * len(mant)).astype(int)
        values = values[n0 % step == 0]
    values = np.round(values, 6)
    tol = 1e-9 * high
    return values[(values >= low - tol) & (values <= high + tol)]


def snoek_two_component_permeability(frequency_hz, mu_i, domain_wall_fraction, snoek_domain_wall_hz,
                                     damping_ratio, snoek_spin_hz):
    """Two-component permeability of a family member, frequencies scaled by Snoek's law.

    µ = 1 + K_dw·f_dw²/(f_dw² − f² + j f β) + K_s/(1 + j f/f_s), with
    K_dw = a·(µi − 1), K_s = (1 − a)·(µi − 1), f_dw = S_dw/(µi − 1), β = d·f_dw,
    f_s = S_s/(µi − 1).

    Parameters
    ----------
    frequency_hz : array_like
        Frequency [Hz].
    mu_i : float or array_like
        Initial relative permeability [dimensionless], > 1.
    domain_wall_fraction : float
        a, share of the static susceptibility carried by domain walls [dimensionless], 0–1.
    snoek_domain_wall_hz : float
        S_dw = (µi − 1)·f_dw [Hz]; ignored when a = 0.
    damping_ratio : float
        d = β/f_dw [dimensionless]; d > 2 is over-damped (relaxation-like).
    snoek_spin_hz : float
        S_s = (µi − 1)·f_s [Hz].

    Returns
    -------
    numpy.ndarray of complex
        µ' − jµ'' [dimensionless]; → µi as f → 0.

    References
    ----------
    J. L. Snoek, "Dispersion and absorption in magnetic ferrites at frequencies above one Mc/s",
    Physica 14, 207 (1948) (the product law); T. Tsutaoka, J. Appl. Phys. 93(5), 2789 (2003),
    eqs. (1)–(3) (the two-component form). The split and damping held constant across a family
    is a modelling choice, from memory.
    """
    f = np.asarray(frequency_hz, dtype=float)
    chi = np.asarray(mu_i, dtype=float) - 1.0
    a = float(domain_wall_fraction)
    f_s = snoek_spin_hz / chi
    spin = (1.0 - a) * chi / (1.0 + 1j * f / f_s)
    if a == 0.0:
        return 1.0 + spin
    f_dw = snoek_domain_wall_hz / chi
    dw = a * chi * f_dw**2 / (f_dw**2 - f**2 + 1j * f * damping_ratio * f_dw)
    return 1.0 + dw + spin


@dataclass(frozen=True)
class Family:
    """A material family: dispersion constants, µi range, electrical class and sources.

    Attributes
    ----------
    key : str
        Name prefix on the command line, e.g. ``"nizn"`` (``nizn-650``).
    name : str
        E.g. ``"NiZn ferrite"``.
    mu_range : tuple of float
        Initial permeabilities the family model covers [dimensionless].
    electrical_class : str
        ``"dielectric"`` or ``"conductive"`` (see :data:`ELECTRICAL_CLASSES`).
    relative_permittivity : float or None
        Representative εr for a dielectric family [dimensionless]; None for conductive ones.
    form : str
        ``"two_component"`` or ``"debye"``.
    domain_wall_fraction, snoek_domain_wall_hz, damping_ratio, snoek_spin_hz
        See :func:`snoek_two_component_permeability` (a Debye family uses only snoek_spin_hz).
    description, provenance : str
        What the family suits; where its constants come from.
    sources : tuple of str
        Publications behind the model form and scaling.
    """

    key: str
    name: str
    mu_range: tuple[float, float]
    electrical_class: str
    relative_permittivity: float | None
    form: str
    domain_wall_fraction: float
    snoek_domain_wall_hz: float
    damping_ratio: float
    snoek_spin_hz: float
    description: str
    provenance: str
    sources: tuple[str, ...]

    def check(self, mu_i: float) -> float:
        """``mu_i`` as a float, or a one-line MaterialError naming the family's range."""
        lo, hi = self.mu_range
        try:
            mu = float(mu_i)
        except (TypeError, ValueError):
            raise MaterialError(f"{self.name}: initial permeability must be a number, got {mu_i!r}") from None
        if not (np.isfinite(mu) and lo <= mu <= hi):
            raise MaterialError(f"{self.name}: initial permeability must be within {lo:g}–{hi:g}, got {mu:g}")
        return mu

    def model(self, mu_i: float):
        """The permeability model (:class:`TwoComponent` or :class:`Debye`) of the member at ``mu_i``."""
        mu = self.check(mu_i)
        chi = mu - 1.0
        if self.form == "debye":
            return Debye(mu_i=mu, f_r=self.snoek_spin_hz / chi)
        f_dw = self.snoek_domain_wall_hz / chi
        a = self.domain_wall_fraction
        return TwoComponent(k_dw=a * chi, f_dw=f_dw, beta_hz=self.damping_ratio * f_dw,
                            k_s=(1.0 - a) * chi, f_s=self.snoek_spin_hz / chi)

    def permeability(self, frequency_hz, mu_i: float) -> np.ndarray:
        """µ' − jµ'' of the member at ``mu_i``, at ``frequency_hz`` [Hz]."""
        return self.model(mu_i).permeability(frequency_hz)

    def member_name(self, mu_i: float) -> str:
        """E.g. ``nizn-650``."""
        return f"{self.key}-{self.check(mu_i):g}"

    def grid(self, series: str = "R10") -> np.ndarray:
        """Initial permeabilities on an ISO 3 series within the family's range."""
        return preferred_numbers(*self.mu_range, series=series)

    def span(self, mu_i: float, series: str = "R10") -> tuple[float, float]:
        """The grid neighbours either side of ``mu_i``: the µi range a search on that grid resolves."""
        mu = self.check(mu_i)
        g = self.grid(series)
        below, above = g[g < mu * (1 - 1e-9)], g[g > mu * (1 + 1e-9)]
        return (float(below[-1]) if below.size else mu, float(above[0]) if above.size else mu)

    def purchase_label(self, mu_i: float, series: str = "R10") -> str:
        """What to buy, e.g. ``NiZn ferrite, µi ≈ 630–1000``."""
        lo, hi = self.span(mu_i, series)
        return f"{self.name}, µi ≈ {lo:g}–{hi:g}"


@lru_cache(maxsize=1)
def _load() -> tuple[Family, ...]:
    text = resources.files("cmcheck").joinpath("model/data/materials.json").read_text(encoding="utf-8")
    out = []
    for e in json.loads(text)["families"]:
        e = dict(e)
        e["mu_range"] = tuple(float(v) for v in e["mu_range"])
        e["sources"] = tuple(e["sources"])
        out.append(Family(**e))
    return tuple(out)


def builtin_families() -> dict[str, Family]:
    """The built-in families by key (``nizn``, ``mnzn``, ``iron-powder``)."""
    return {f.key: f for f in _load()}


_MEMBER = re.compile(r"^([a-z][a-z-]*?)-(\d+(?:\.\d+)?)$")


def parse_member_name(name: str) -> tuple[Family, float] | None:
    """``"nizn-650"`` → (NiZn family, 650.0); None if ``name`` names no family.

    Raises
    ------
    MaterialError
        If the family is known but µi lies outside its range.
    """
    m = _MEMBER.match(str(name).strip().lower())
    if not m:
        return None
    fam = builtin_families().get(m.group(1))
    if fam is None:
        return None
    try:
        return fam, fam.check(float(m.group(2)))
    except MaterialError as exc:
        raise MaterialError(f"material {name!r}: {exc}") from None
