"""Complex permeability µ(f) = µ' − jµ'' of core materials.

Three sources: a user's datasheet curve (CSV), the published dispersion forms, and the
built-in table of *generic* material classes in ``data/materials.json`` (representative
values from memory, not any maker's data). Convention: e^{jωt}, so a passive material has
µ'' ≥ 0 and the returned complex number is µ' − jµ''.
"""

from __future__ import annotations

import json
from dataclasses import dataclass, field
from functools import lru_cache
from importlib import resources
from pathlib import Path
from typing import Protocol

import numpy as np

from ..errors import MaterialError
from ..tables import read_table

__all__ = [
    "Debye",
    "DampedResonance",
    "Material",
    "Tabulated",
    "TwoComponent",
    "builtin_materials",
    "damped_resonance_permeability",
    "debye_permeability",
    "get_material",
    "load_material_csv",
    "save_material_csv",
    "two_component_permeability",
]

#: How far beyond a table's ends (as a frequency ratio) a tabulated material is still used,
#: holding the end value; further out is refused rather than guessed.
EXTRAPOLATION_RATIO = 1.1


def debye_permeability(frequency_hz, mu_i, f_r):
    """Debye relaxation: µ = 1 + (µi − 1)/(1 + j f/fr).

    Parameters
    ----------
    frequency_hz : array_like
        Frequency [Hz].
    mu_i : float or array_like
        Initial (low-frequency) relative permeability [dimensionless].
    f_r : float or array_like
        Relaxation frequency, where µ'' peaks [Hz].

    Returns
    -------
    numpy.ndarray of complex
        µ' − jµ'' [dimensionless].

    References
    ----------
    P. Debye, *Polar Molecules*, 1929, relaxation form; applied to ferrite spin relaxation in
    e.g. T. Tsutaoka, J. Appl. Phys. 93(5), 2789 (2003), eq. (2) (spin-rotation term).
    """
    f = np.asarray(frequency_hz, dtype=float)
    mu_i = np.asarray(mu_i, dtype=float)
    f_r = np.asarray(f_r, dtype=float)
    return 1.0 + (mu_i - 1.0) / (1.0 + 1j * f / f_r)


def damped_resonance_permeability(frequency_hz, mu_i, f_r, damping_hz):
    """Damped (Lorentzian) resonance: µ = 1 + (µi − 1)fr²/(fr² − f² + j f Δf).

    Parameters
    ----------
    frequency_hz : array_like
        Frequency [Hz].
    mu_i : float or array_like
        Initial relative permeability [dimensionless].
    f_r : float or array_like
        Resonance frequency [Hz].
    damping_hz : float or array_like
        Damping Δf [Hz]; Δf > 2·fr is over-damped (relaxation-like).

    Returns
    -------
    numpy.ndarray of complex
        µ' − jµ'' [dimensionless].

    References
    ----------
    T. Tsutaoka, "Frequency dispersion of complex permeability in Mn–Zn and Ni–Zn spinel
    ferrites and their composite materials", J. Appl. Phys. 93(5), 2789 (2003), eq. (1)
    (domain-wall resonance term).
    """
    f = np.asarray(frequency_hz, dtype=float)
    f_r = np.asarray(f_r, dtype=float)
    return 1.0 + (np.asarray(mu_i, dtype=float) - 1.0) * f_r**2 / (f_r**2 - f**2 + 1j * f * np.asarray(damping_hz, dtype=float))


def two_component_permeability(frequency_hz, k_dw, f_dw, beta_hz, k_s, f_s):
    """Domain-wall resonance plus spin-rotation relaxation.

    µ = 1 + K_dw·f_dw²/(f_dw² − f² + j f β) + K_s/(1 + j f/f_s)

    Parameters
    ----------
    frequency_hz : array_like
        Frequency [Hz].
    k_dw : float or array_like
        Domain-wall static susceptibility [dimensionless].
    f_dw : float or array_like
        Domain-wall resonance frequency [Hz].
    beta_hz : float or array_like
        Domain-wall damping [Hz].
    k_s : float or array_like
        Spin static susceptibility [dimensionless].
    f_s : float or array_like
        Spin relaxation frequency [Hz].

    Returns
    -------
    numpy.ndarray of complex
        µ' − jµ'' [dimensionless]; the initial permeability is 1 + K_dw + K_s.

    References
    ----------
    T. Tsutaoka, J. Appl. Phys. 93(5), 2789 (2003), eqs. (1)–(3).
    """
    f = np.asarray(frequency_hz, dtype=float)
    f_dw = np.asarray(f_dw, dtype=float)
    dw = np.asarray(k_dw, dtype=float) * f_dw**2 / (f_dw**2 - f**2 + 1j * f * np.asarray(beta_hz, dtype=float))
    spin = np.asarray(k_s, dtype=float) / (1.0 + 1j * f / np.asarray(f_s, dtype=float))
    return 1.0 + dw + spin


class PermeabilityModel(Protocol):
    """Anything that gives µ' − jµ'' at frequencies [Hz]."""

    def permeability(self, frequency_hz) -> np.ndarray: ...


@dataclass(frozen=True)
class Debye:
    """Debye relaxation model; see :func:`debye_permeability`."""

    mu_i: float
    f_r: float

    def permeability(self, frequency_hz):
        return debye_permeability(frequency_hz, self.mu_i, self.f_r)


@dataclass(frozen=True)
class DampedResonance:
    """Damped resonance model; see :func:`damped_resonance_permeability`."""

    mu_i: float
    f_r: float
    damping_hz: float

    def permeability(self, frequency_hz):
        return damped_resonance_permeability(frequency_hz, self.mu_i, self.f_r, self.damping_hz)


@dataclass(frozen=True)
class TwoComponent:
    """Domain-wall + spin-rotation model; see :func:`two_component_permeability`."""

    k_dw: float
    f_dw: float
    beta_hz: float
    k_s: float
    f_s: float

    def permeability(self, frequency_hz):
        return two_component_permeability(frequency_hz, self.k_dw, self.f_dw, self.beta_hz, self.k_s, self.f_s)


@dataclass(frozen=True, eq=False)
class Tabulated:
    """A measured or datasheet curve, interpolated linearly in log-frequency.

    Parameters
    ----------
    frequency_hz : array_like
        Strictly increasing frequencies [Hz].
    mu_prime, mu_double_prime : array_like
        µ' and µ'' (µ'' ≥ 0) [dimensionless].
    source : str
        Where the table came from (file name), for error messages.
    """

    frequency_hz: np.ndarray
    mu_prime: np.ndarray
    mu_double_prime: np.ndarray
    source: str = "table"

    def __post_init__(self) -> None:
        f = np.asarray(self.frequency_hz, dtype=float)
        mp = np.asarray(self.mu_prime, dtype=float)
        mpp = np.asarray(self.mu_double_prime, dtype=float)
        if f.ndim != 1 or f.size < 2 or f.shape != mp.shape or f.shape != mpp.shape:
            raise MaterialError(f"{self.source}: a material table needs at least 2 rows of 3 numbers")
        if not (np.all(np.isfinite(f)) and np.all(np.isfinite(mp)) and np.all(np.isfinite(mpp))):
            raise MaterialError(f"{self.source}: the material table holds non-finite values")
        if np.any(f <= 0) or np.any(np.diff(f) <= 0):
            raise MaterialError(f"{self.source}: frequencies must be positive and strictly increasing")
        if np.any(mpp < 0):
            raise MaterialError(
                f"{self.source}: mu_double_prime must be ≥ 0 (µ = µ' − jµ'' for a passive material)"
            )
        for name, arr in (("frequency_hz", f), ("mu_prime", mp), ("mu_double_prime", mpp)):
            arr.setflags(write=False)
            object.__setattr__(self, name, arr)

    @property
    def range_hz(self) -> tuple[float, float]:
        """Frequencies the table can be used over [Hz], including the small allowance."""
        return self.frequency_hz[0] / EXTRAPOLATION_RATIO, self.frequency_hz[-1] * EXTRAPOLATION_RATIO

    def permeability(self, frequency_hz):
        f = np.asarray(frequency_hz, dtype=float)
        lo, hi = self.range_hz
        if f.size and (np.min(f) < lo * (1 - 1e-12) or np.max(f) > hi * (1 + 1e-12)):
            raise MaterialError(
                f"{self.source}: asked for µ at {np.min(f):.4g}–{np.max(f):.4g} Hz but the table covers "
                f"only {self.frequency_hz[0]:.4g}–{self.frequency_hz[-1]:.4g} Hz; narrow the band or extend the table"
            )
        lf = np.log(self.frequency_hz)
        x = np.log(np.clip(f, self.frequency_hz[0], self.frequency_hz[-1]))
        return np.interp(x, lf, self.mu_prime) - 1j * np.interp(x, lf, self.mu_double_prime)


@dataclass(frozen=True, eq=False)
class Material:
    """A named core material: a permeability model plus what it is for and where it came from.

    Parameters
    ----------
    name : str
        Short name used on the command line.
    model : PermeabilityModel
        Gives µ' − jµ'' against frequency [Hz].
    family : str
        E.g. ``"NiZn ferrite"``.
    description : str
        One line: where this material suits.
    provenance : str
        Where the numbers come from and what they were checked against.
    """

    name: str
    model: PermeabilityModel
    family: str = ""
    description: str = ""
    provenance: str = ""
    extra: dict = field(default_factory=dict)

    def permeability(self, frequency_hz) -> np.ndarray:
        """µ' − jµ'' at ``frequency_hz`` [Hz]."""
        return self.model.permeability(frequency_hz)

    @property
    def initial_permeability(self) -> float:
        """µ' at the lowest frequency the model covers (10 kHz for analytic models)."""
        f = self.model.frequency_hz[0] if isinstance(self.model, Tabulated) else 1e4
        return float(np.real(self.permeability(f)))

    @property
    def range_hz(self) -> tuple[float, float] | None:
        """Usable frequency range [Hz] for tabulated materials; None for analytic models."""
        return self.model.range_hz if isinstance(self.model, Tabulated) else None

    def to_dict(self) -> dict:
        """JSON-ready summary: name, family, description, provenance and initial permeability."""
        d = {
            "name": self.name,
            "family": self.family,
            "description": self.description,
            "provenance": self.provenance,
            "initial_permeability": round(self.initial_permeability, 3),
            "model": type(self.model).__name__,
        }
        if not isinstance(self.model, Tabulated):
            d["parameters"] = {k: getattr(self.model, k) for k in self.model.__dataclass_fields__}
        return d


_MODELS = {"debye": Debye, "damped_resonance": DampedResonance, "two_component": TwoComponent}


@lru_cache(maxsize=1)
def _builtin_table() -> tuple[Material, ...]:
    text = resources.files("cmcheck").joinpath("model/data/materials.json").read_text(encoding="utf-8")
    out = []
    for entry in json.loads(text)["materials"]:
        model = _MODELS[entry["model"]](**entry["parameters"])
        out.append(
            Material(
                name=entry["name"],
                model=model,
                family=entry["family"],
                description=entry["description"],
                provenance=entry["provenance"],
            )
        )
    return tuple(out)


def builtin_materials() -> dict[str, Material]:
    """The built-in generic material classes, by name."""
    return {m.name: m for m in _builtin_table()}


def load_material_csv(path) -> Material:
    """Read a material curve: header ``frequency_hz,mu_prime,mu_double_prime``, ``#`` comments.

    Parameters
    ----------
    path : str or os.PathLike
        The CSV file. Rows are sorted by frequency; duplicates are refused.

    Raises
    ------
    MaterialError
        If the file is missing, unreadable, or not such a table.
    """
    p = Path(path)
    where = f"material file {path}"
    table = read_table(p, where, MaterialError)
    want = ["frequency_hz", "mu_prime", "mu_double_prime"]
    if table.header[:3] != want:
        raise MaterialError(f"{where}: header must be {','.join(want)}, got {table.header_text}")
    data = []
    for n, (_, row) in enumerate(table.rows, start=1):
        try:
            data.append([float(row[0]), float(row[1]), float(row[2])])
        except (ValueError, IndexError):
            raise MaterialError(f"{where}: data row {n} is not three numbers: {','.join(row)}") from None
    arr = np.array(data, dtype=float).reshape(-1, 3)
    arr = arr[np.argsort(arr[:, 0], kind="stable")]
    if arr.shape[0] and np.any(np.diff(arr[:, 0]) == 0):
        raise MaterialError(f"{where}: the same frequency appears twice")
    comments = table.comments
    model = Tabulated(arr[:, 0], arr[:, 1], arr[:, 2], source=f"material file {path}")
    return Material(
        name=p.stem,
        model=model,
        family="user table",
        description=comments[0] if comments else f"curve from {p.name}",
        provenance=f"user file {p}",
    )


def save_material_csv(path, frequency_hz, mu, comments=()) -> None:
    """Write µ' − jµ'' against frequency [Hz] in the material CSV format (atomically)."""
    from ..reporting.files import write_csv  # local: report imports plotting helpers

    mu = np.asarray(mu, dtype=complex)
    rows = [[f"{f:.9g}", f"{m.real:.9g}", f"{-m.imag:.9g}"] for f, m in zip(np.asarray(frequency_hz, float), mu)]
    write_csv(path, ["frequency_hz", "mu_prime", "mu_double_prime"], rows, comments)


def get_material(name_or_path: str) -> Material:
    """A built-in material by name, or a user CSV file by path.

    Raises
    ------
    MaterialError
        Naming the unknown material and the built-in choices, or the missing file.
    """
    table = builtin_materials()
    key = str(name_or_path).strip()
    if key.lower() in table:
        return table[key.lower()]
    if key.lower().endswith(".csv") or Path(key).exists():
        return load_material_csv(key)
    raise MaterialError(
        f"unknown material {key!r}: use one of {', '.join(table)} or a CSV file "
        "(frequency_hz,mu_prime,mu_double_prime)"
    )
