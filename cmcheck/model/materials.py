"""Complex permeability µ(f) = µ' − jµ'' of core materials.

Two sources: a user's datasheet curve (CSV), and the built-in material *families* (NiZn,
MnZn, iron powder; see :mod:`cmcheck.model.families`) of which any member ``nizn-650`` is a
material. Convention: e^{jωt}, so a passive material has µ'' ≥ 0 and the returned complex
number is µ' − jµ''.
"""

from __future__ import annotations

import re
from dataclasses import dataclass, field
from pathlib import Path

import numpy as np

from .. import limits
from ..errors import CmcheckWarning, MaterialError, UnitError
from ..tables import read_table
from .dispersion import (
    DampedResonance,
    Debye,
    PermeabilityModel,
    TwoComponent,
    damped_resonance_permeability,
    debye_permeability,
    two_component_permeability,
)
from .families import ELECTRICAL_CLASSES, Family, builtin_families, parse_member_name

__all__ = [
    "LISTING_SERIES",
    "Debye",
    "DampedResonance",
    "Material",
    "Tabulated",
    "TwoComponent",
    "builtin_families",
    "builtin_materials",
    "damped_resonance_permeability",
    "debye_permeability",
    "family_grid",
    "family_material",
    "get_material",
    "load_material_csv",
    "purchase_label",
    "check_band",
    "save_material_csv",
    "search_materials",
    "two_component_permeability",
]

#: How far beyond a table's ends (as a frequency ratio) a tabulated material is still used,
#: holding the end value; further out is refused rather than guessed.
EXTRAPOLATION_RATIO = 1.1


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
        big = np.flatnonzero(np.hypot(mp, mpp) > limits.MAX_PERMEABILITY)
        if big.size:
            i = int(big[0])
            raise MaterialError(
                f"{self.source}: |µ| = {np.hypot(mp[i], mpp[i]):.4g} at {f[i]:.4g} Hz is above {limits.MAX_PERMEABILITY:g} "
                f"(no magnetic core material reaches it; a unit or column mix-up?)"
            )
        if not limits.INITIAL_PERMEABILITY.contains(float(mp[0])):
            # µ' may turn negative above a resonance, but not where the table starts: that is µi.
            raise MaterialError(
                f"{self.source}: mu_prime = {mp[0]:.4g} at the lowest frequency {f[0]:.4g} Hz is outside "
                f"{limits.INITIAL_PERMEABILITY.text()} ({limits.INITIAL_PERMEABILITY.why}; µ' may be negative "
                f"only above a resonance)"
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
    electrical_class : str
        ``"dielectric"`` (NiZn), ``"conductive"`` (MnZn, metal powder) or ``"unknown"``: what
        the core is to the winding's electric field, for the stray-capacitance model.
    extra : dict
        Anything else; family members carry ``family_key`` and ``mu_i``.
    """

    name: str
    model: PermeabilityModel
    family: str = ""
    description: str = ""
    provenance: str = ""
    extra: dict = field(default_factory=dict)
    electrical_class: str = "unknown"

    def __post_init__(self) -> None:
        if self.electrical_class not in ELECTRICAL_CLASSES:
            raise MaterialError(
                f"{self.name}: electrical_class must be one of {', '.join(ELECTRICAL_CLASSES)}, got {self.electrical_class!r}"
            )

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
            "electrical_class": self.electrical_class,
            "model": type(self.model).__name__,
        }
        if "family_key" in self.extra:
            d.update(family_key=self.extra["family_key"], mu_i=self.extra["mu_i"])
        if not isinstance(self.model, Tabulated):
            d["parameters"] = {k: getattr(self.model, k) for k in self.model.__dataclass_fields__}
        return d


#: The ISO 3 series of the short listing grid that ``builtin_materials`` returns.
LISTING_SERIES = "R10/3"


def family_material(family: Family | str, mu_i: float) -> Material:
    """The member of ``family`` (a :class:`Family` or its key, e.g. ``"nizn"``) at µi = ``mu_i``.

    Raises
    ------
    MaterialError
        Unknown family, or ``mu_i`` outside the family's range (the message names the range).
    """
    if isinstance(family, str):
        fams = builtin_families()
        if family.strip().lower() not in fams:
            raise MaterialError(f"unknown material family {family!r}: use one of {', '.join(fams)}")
        family = fams[family.strip().lower()]
    mu = family.check(mu_i)
    lo, hi = family.mu_range
    return Material(
        name=family.member_name(mu),
        model=family.model(mu),
        family=family.name,
        description=f"{family.name} with µi = {mu:g} ({lo:g}–{hi:g} in the family): {family.description}",
        provenance=family.provenance,
        extra={"family_key": family.key, "mu_i": mu},
        electrical_class=family.electrical_class,
    )


def family_grid(family: Family | str, series: str = "R10") -> list[Material]:
    """Members of a family at the ISO 3 preferred numbers (``"R10"``, ``"R20"``, ``"R10/3"``) in its range.

    For the sizing search: search the grid, then name what to buy with
    :meth:`Family.purchase_label` (the span between the chosen member's grid neighbours).
    """
    fam = builtin_families()[family] if isinstance(family, str) else family
    return [family_material(fam, mu) for mu in fam.grid(series)]


def purchase_label(material: Material, series: str = "R10") -> str:
    """What to buy for a design using ``material``, e.g. ``NiZn ferrite, µi ≈ 630–1000``.

    For a family member: the family and the span between its neighbours on the ISO 3 grid
    the search used (``series``), since a search on that grid cannot tell µi apart more finely.
    For any other material (a user curve): its name.
    """
    key = material.extra.get("family_key")
    fam = builtin_families().get(key) if key else None
    return fam.purchase_label(material.extra["mu_i"], series) if fam else material.name


def builtin_materials() -> dict[str, Material]:
    """A short representative grid of every built-in family (ISO 3 series R10/3), by name.

    The families themselves are :func:`builtin_families`; :func:`get_material` accepts any
    member within a family's range (``nizn-650``), not only these.
    """
    return {m.name: m for fam in builtin_families().values() for m in family_grid(fam, LISTING_SERIES)}


#: The series, families and µi ranges the sizing search explores by default. R10 (about 25 %
#: steps) is finer than the spread of a bought core's µi (±20–25 %, from memory), so a finer
#: grid would not change what to buy. NiZn (µi 40–2000) is the usual choke ferrite from HF to
#: VHF; MnZn (µi 500–5000) suits the low HF bands (above µi ≈ 5000 it relaxes below 1 MHz by
#: Snoek's law); iron powder (µi ≤ 100) is a low-loss inductor material whose resistive part is
#: small, so it is searched only when asked for. Common practice, no published source.
SEARCH_SERIES = "R10"
SEARCH_FAMILIES = {"nizn": (40.0, 2000.0), "mnzn": (500.0, 5000.0)}
#: Ranges for the families a user names (``--materials iron-powder``) without a default range.
_SEARCH_RANGES = {**SEARCH_FAMILIES, "iron-powder": (4.0, 100.0)}


def search_materials(names=None, series: str = SEARCH_SERIES) -> list[Material]:
    """Materials for the sizing search: family grids and/or named materials.

    Parameters
    ----------
    names : sequence of str, optional
        Each a family key (``"nizn"``, ``"mnzn"``, ``"iron-powder"``: its grid on ``series``
        within its choke range), a member (``"nizn-650"``) or a CSV file. None: the grids of
        :data:`SEARCH_FAMILIES`.
    series : str
        ISO 3 series of the grids (:func:`cmcheck.model.families.preferred_numbers`).

    Returns
    -------
    list of Material
        In the order given; a member a family grid already holds is not repeated, but a name
        given twice stays twice (the search refuses it).
    """
    from .families import preferred_numbers

    fams = builtin_families()
    out: list[Material] = []
    for name in (list(SEARCH_FAMILIES) if names is None else names):
        key = str(name).strip().lower()
        if key in fams:
            fam = fams[key]
            lo, hi = _SEARCH_RANGES.get(key, fam.mu_range)
            for mu in preferred_numbers(max(lo, fam.mu_range[0]), min(hi, fam.mu_range[1]), series):
                m = family_material(fam, mu)
                if all(m.name != o.name for o in out):
                    out.append(m)
        else:
            out.append(get_material(name))
    return out


_CLASS_COMMENT = re.compile(r"^class\s*[:=]\s*(\S+)\s*$", re.IGNORECASE)


def load_material_csv(path) -> Material:
    """Read a material curve: header ``frequency_hz,mu_prime,mu_double_prime``, ``#`` comments.

    A comment line ``# class: conductive`` (or ``dielectric``) declares the core's electrical
    class for the stray-capacitance model; without it the class is ``"unknown"``.

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
    electrical_class, comments = "unknown", []
    for c in table.comments:
        m = _CLASS_COMMENT.match(c)
        if m is None:
            comments.append(c)
        elif m.group(1).lower() in ("dielectric", "conductive"):
            electrical_class = m.group(1).lower()
        else:
            raise MaterialError(f"{where}: '# class:' must be dielectric or conductive, got {m.group(1)!r}")
    model = Tabulated(arr[:, 0], arr[:, 1], arr[:, 2], source=f"material file {path}")
    return Material(
        name=p.stem,
        model=model,
        family="user table",
        description=comments[0] if comments else f"curve from {p.name}",
        provenance=f"user file {p}",
        electrical_class=electrical_class,
    )


def save_material_csv(path, frequency_hz, mu, comments=()) -> None:
    """Write µ' − jµ'' against frequency [Hz] in the material CSV format (atomically)."""
    from ..reporting.files import write_csv  # local: report imports plotting helpers

    mu = np.asarray(mu, dtype=complex)
    rows = [[f"{f:.9g}", f"{m.real:.9g}", f"{-m.imag:.9g}"] for f, m in zip(np.asarray(frequency_hz, float), mu)]
    write_csv(path, ["frequency_hz", "mu_prime", "mu_double_prime"], rows, comments)


def get_material(name_or_path: str) -> Material:
    """A family member by name (``nizn-650``, ``mnzn-2300``, ``iron-powder-10``), or a user CSV by path.

    Raises
    ------
    MaterialError
        Naming the unknown material and the families with their µi ranges, a µi outside its
        family's range, or the missing file.
    """
    key = str(name_or_path).strip()
    member = parse_member_name(key)
    if member is not None:
        return family_material(*member)
    if key.lower().endswith(".csv") or Path(key).exists():
        return load_material_csv(key)
    fams = ", ".join(f"{f.key}-<µi> ({f.mu_range[0]:g}–{f.mu_range[1]:g})" for f in builtin_families().values())
    raise MaterialError(f"unknown material {key!r}: use a family member {fams}, or a CSV file (frequency_hz,mu_prime,mu_double_prime)")


def check_band(material: Material, band) -> None:
    """Refuse a band the material cannot speak for; warn when a table is stretched at its ends.

    A tabulated material is used up to :data:`EXTRAPOLATION_RATIO` beyond its ends (holding the
    end value), with a warning naming the stretched range; further out is refused. An analytic
    (family) model is refused outside :data:`cmcheck.limits.ANALYTIC_BAND`.

    Parameters
    ----------
    material : Material
    band : cmcheck.units.Band
        Frequencies asked for [Hz].

    Raises
    ------
    UnitError
        With ``parameter="band"``, naming the band, the usable range and why.
    """
    import warnings

    from ..units import format_quantity

    lo, hi = band.low, band.high
    if not isinstance(material.model, Tabulated):
        rng = limits.ANALYTIC_BAND
        if not (rng.contains(lo) and rng.contains(hi)):
            raise UnitError(f"band {band} is outside {rng.text()} for {material.name} ({rng.why})", parameter="band")
        return
    f0, f1 = material.model.frequency_hz[0], material.model.frequency_hz[-1]
    r0, r1 = material.model.range_hz
    if lo < r0 * (1 - 1e-12) or hi > r1 * (1 + 1e-12):
        raise UnitError(
            f"band {band} reaches beyond {material.name}'s data ({format_quantity(f0, 'Hz')} – "
            f"{format_quantity(f1, 'Hz')}, used up to ×{EXTRAPOLATION_RATIO:g} beyond its ends)",
            parameter="band",
        )
    stretched = [f"{format_quantity(lo, 'Hz')} – {format_quantity(f0, 'Hz')}"] if lo < f0 * (1 - 1e-12) else []
    if hi > f1 * (1 + 1e-12):
        stretched.append(f"{format_quantity(f1, 'Hz')} – {format_quantity(hi, 'Hz')}")
    if stretched:
        warnings.warn(CmcheckWarning(
            f"{material.name}: µ is extrapolated (held at the table's end value) over {' and '.join(stretched)}, "
            f"beyond the data {format_quantity(f0, 'Hz')} – {format_quantity(f1, 'Hz')}", parameter="band"), stacklevel=2)
