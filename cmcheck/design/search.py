"""Sizing: search material × core size × stacked cores × turns for chokes that meet a target.

Every candidate is evaluated with the model of :func:`cmcheck.model.choke.predict` — the same L0,
µ(f), conductor resistance and stray-capacitance estimate, through
:func:`cmcheck.model.choke.choke_impedance` — but all at once, as arrays shaped
(candidates, frequencies), one chunk at a time to bound memory. µ(f) is evaluated once per
material and broadcast; geometry (core factor, turn length, Cp) once per core-and-turns
combination and shared by all materials. Cores of any shape come from the catalogue as objects
of the :class:`cmcheck.model.cores.Core` contract: their scalar quantities are read once per
stack, the rest is arrays.

The criterion is the minimum resistance (or |Z|) over the band's grid, edges included. Passing
designs are ranked by a stated cost — total core volume, then turns, then (larger) margin —
and a short list keeps only the cheapest design of each material-and-core-size pair, at most
two per material and two per core size while enough other designs pass. When nothing passes, the
closest design is diagnosed: why it falls short and what to relax.
"""

from __future__ import annotations

import math
import time
import warnings
from dataclasses import dataclass, field
from typing import Callable, Sequence

import numpy as np

from ..model.choke import ChokeDesign, air_core_inductance, choke_impedance, predict
from ..model.winding_cp import candidates_cp, cp_material, unknown_class_message
from ..model.conductors import Conductor
from ..model.cores import Core
from .. import limits
from ..errors import CmcheckWarning, DesignError
from ..model.materials import Material, purchase_label
from .catalogue import CoreSizes, RingSizes, bend_radius, builtin_ring_sizes, load_ring_sizes
from .diagnosis import Diagnosis, SearchContext, diagnose, diagnose_heat, diagnose_nothing_fits, format_rise
from .heat import DEFAULT_MAX_RISE_K, Drive, heat_check
from .sized import SizedDesign, SizeResult
from ..units import Band
from ..model.winding import Winding, max_turns_single_layer

__all__ = [
    "CoreSizes", "DEFAULT_BEND_RATIO", "DEFAULT_MAX_CORES", "DEFAULT_TARGET_OHM", "Diagnosis", "RingSizes",
    "SizeResult", "SizeSpec", "SizedDesign", "bend_radius", "builtin_ring_sizes", "candidate_geometry",
    "format_rise", "load_ring_sizes", "scan_candidates", "size",
]

#: Smallest bend radius of a cable wound through a core, as a multiple of its outside
#: diameter. Cable makers quote 5–10 × OD for installed runs, yet 5 mm coax is routinely
#: wound on 61 mm rings (bend ≈ 1.8 × OD) without harm; 1.5 × keeps that and excludes tighter
#: bends that kink coax. Common practice, no published source.
DEFAULT_BEND_RATIO = 1.5  # common practice, no published source

#: Default target: at least 1 kΩ resistive across the band. Common practice, no published
#: source (see DESIGN.md §4 "Why resistance matters").
DEFAULT_TARGET_OHM = 1000.0  # common practice, no published source

#: Most identical cores stacked by default: beyond four, a longer choke or a second choke in
#: series is usually easier to build. Common practice, no published source.
DEFAULT_MAX_CORES = 4  # common practice, no published source

# About 400 k complex points per chunk: large enough that numpy's per-call overhead is small,
# small enough (≈ 6 MB per temporary) to stay in cache-friendly territory on small machines.
_CHUNK_POINTS = 400_000


# The specification; the results, SizedDesign and SizeResult, are in .sized.


@dataclass(frozen=True, eq=False)
class SizeSpec:
    """What to size for, and the design space to search.

    Parameters
    ----------
    band : Band
        Frequencies [Hz]; with several ranges the criterion holds in all of them.
    conductor : Conductor
        What is wound (Wire, Cable...).
    materials : sequence of Material
    sizes : CoreSizes
        One core object per row (:mod:`cmcheck.design.catalogue`).
    target_ohm : float
        Required minimum over the band [Ω] of R (``criterion="resistance"``) or |Z|.
    criterion : {"resistance", "impedance"}
    max_cores : int
        Stacks of 1..max_cores identical pieces are searched.
    max_turns : int, optional
        Cap on turns besides what fits in one layer.
    min_bend_radius : float, optional
        Smallest allowed bend radius of a cable for two or more turns [m]; default
        ``DEFAULT_BEND_RATIO`` × OD for a stiff conductor (cable); wire is not limited unless given.
    cp_factor : float
        Multiplies the energy-method Cp estimate (≥ 1 for a pessimistic self-resonance).
    points : int
        Grid points over the band, as ``predict``'s ``points`` (edges added).
    top : int
        Length of the short list.
    drive : Drive, optional
        Power and common-mode drive, for the heat check.
    max_rise_k : float
        Designs whose estimated temperature rise exceeds this are dropped [K].
    keep_hot : bool
        List designs above ``max_rise_k`` anyway, flagged ``too_hot``, instead of dropping them.
    winding_angle : float, optional
        Angle every winding spans round its core [rad] for the Cp estimate; None: spread over
        300° (close-wound where the turns fill more), as :class:`ChokeDesign`.
    cp : float, optional
        One stray capacitance for every candidate [F] (a measured value; tests pin it so a
        better Cp model moves no search test); None: the energy-method estimate per design.
        ``cp_factor`` scales either.
    material_series : str
        The ISO 3 series the family members among ``materials`` were taken from, for naming
        what to buy (:func:`cmcheck.model.materials.purchase_label`).
    """

    band: Band
    conductor: Conductor
    materials: Sequence[Material]
    sizes: CoreSizes
    target_ohm: float = DEFAULT_TARGET_OHM
    criterion: str = "resistance"
    max_cores: int = DEFAULT_MAX_CORES
    max_turns: int | None = None
    min_bend_radius: float | None = None
    cp_factor: float = 1.0
    points: int = 201
    top: int = 5
    drive: Drive | None = None
    max_rise_k: float = DEFAULT_MAX_RISE_K
    keep_hot: bool = False
    winding_angle: float | None = None
    cp: float | None = None
    material_series: str = "R10"

    def __post_init__(self) -> None:
        object.__setattr__(self, "materials", tuple(self.materials))
        if not (math.isfinite(self.target_ohm) and self.target_ohm > 0):
            raise DesignError(f"target_ohm must be a positive resistance, got {self.target_ohm:g} Ω", parameter="target_ohm")
        if self.criterion not in ("resistance", "impedance"):
            raise DesignError(f"criterion must be 'resistance' or 'impedance', got {self.criterion!r}", parameter="criterion")
        if not self.materials:
            raise DesignError("materials: name at least one material", parameter="materials")
        names = [m.name for m in self.materials]
        dup = sorted({n for n in names if names.count(n) > 1})
        if dup:
            raise DesignError(f"materials: {', '.join(dup)} given more than once", parameter="materials")
        if len(self.sizes) == 0:
            raise DesignError("sizes: the table of core sizes is empty", parameter="sizes")
        if not (isinstance(self.max_cores, (int, np.integer)) and self.max_cores >= 1):
            raise DesignError(f"max_cores must be a whole number ≥ 1, got {self.max_cores!r}", parameter="max_cores")
        limits.check("max_cores", int(self.max_cores), limits.STACK, DesignError)
        if self.max_turns is not None and not (isinstance(self.max_turns, (int, np.integer)) and self.max_turns >= 1):
            raise DesignError(f"max_turns must be a whole number ≥ 1, got {self.max_turns!r}", parameter="max_turns")
        if self.min_bend_radius is not None and not (math.isfinite(self.min_bend_radius) and self.min_bend_radius >= 0):
            raise DesignError(f"min_bend_radius must be ≥ 0 m, got {self.min_bend_radius!r} m", parameter="min_bend_radius")
        if not (math.isfinite(self.cp_factor) and self.cp_factor >= 0):
            raise DesignError(f"cp_factor must be ≥ 0, got {self.cp_factor:g}", parameter="cp_factor")
        if not (isinstance(self.points, (int, np.integer)) and self.points >= 2):
            raise DesignError(f"points must be at least 2, got {self.points!r}", parameter="points")
        if not (isinstance(self.top, (int, np.integer)) and self.top >= 1):
            raise DesignError(f"top must be a whole number ≥ 1, got {self.top!r}", parameter="top")
        if self.cp is not None and not (math.isfinite(self.cp) and self.cp >= 0):
            raise DesignError(f"cp must be ≥ 0 F, got {self.cp!r}", parameter="cp")
        if self.winding_angle is not None and not (0 < self.winding_angle < 2 * math.pi):
            raise DesignError(f"winding_angle must lie between 0 and 2π rad, got {self.winding_angle!r}",
                              parameter="winding_angle")
        if not (math.isfinite(self.max_rise_k) and self.max_rise_k > 0):
            raise DesignError(f"max_rise_k must be above 0 K, got {self.max_rise_k:g} K", parameter="max_rise_k")

    @property
    def bend_limit(self) -> float:
        """The bend radius limit in force [m] (0: none)."""
        if self.min_bend_radius is not None:
            return self.min_bend_radius
        return DEFAULT_BEND_RATIO * self.conductor.outer_diameter if self.conductor.stiff else 0.0

    @property
    def metric_name(self) -> str:
        return "R" if self.criterion == "resistance" else "|Z|"


@dataclass(frozen=True, eq=False)
class _Geometry:
    """Per core-and-turns combination (shared by all materials), arrays of length G."""

    size_idx: np.ndarray
    stack: np.ndarray
    turns: np.ndarray
    n_fit: np.ndarray
    l0: np.ndarray
    cp: np.ndarray  # (materials, G): Cp depends on the material's electrical class and εr
    length: np.ndarray
    ae: np.ndarray
    area: np.ndarray
    volume: np.ndarray
    bend: np.ndarray


def _geometry(spec: SizeSpec, *, turns_factor: float = 1.0, limits: bool = True) -> tuple[_Geometry, dict]:
    """Enumerate (size, stack, turns) and their material-independent quantities.

    ``turns_factor`` and ``limits=False`` widen the space for the no-solution diagnosis
    (more turns than fit, no bend or ``max_turns`` limit).
    """
    sizes = spec.sizes
    cond = spec.conductor
    d_out = cond.outer_diameter
    pieces = [(i, k) for i in range(len(sizes)) for k in range(1, spec.max_cores + 1)]
    s_idx = np.array([i for i, _ in pieces], int)
    stack = np.array([k for _, k in pieces], int)
    cores = [sizes.cores[i].stacked(k) for i, k in pieces]
    # The few scalar quantities of each stack through the core contract (a few hundred stacks);
    # None (a quantity a shape does not know) becomes NaN.
    scalars = np.array([[c.window_diameter, c.bend_radius(d_out), c.c1, c.ae, c.surface_area, c.volume,
                         c.turn_length(d_out)] for c in cores], dtype=float).reshape(len(cores), 7)
    window, bend, c1, ae, area, volume, mlt = scalars.T
    known = np.isfinite(window)
    n_fit = np.where(known, np.atleast_1d(max_turns_single_layer(np.where(known, window, 1.0), d_out)), 0)
    limit = spec.bend_limit
    bent_too_far = bend + 1e-12 < limit
    n_max = np.floor(n_fit * turns_factor).astype(int)
    if limits:
        # One pass straight through needs no bend round the core; more turns do.
        n_max = np.where(bent_too_far, np.minimum(n_max, 1), n_max)
        if spec.max_turns is not None:
            n_max = np.minimum(n_max, spec.max_turns)
    keep = n_max >= 1
    space = {
        "materials": len(spec.materials),
        "sizes": len(sizes),
        "max_cores": spec.max_cores,
        "stacks_that_fit": int(np.count_nonzero(keep)),
        "stacks_bend_limited": int(np.count_nonzero(keep & (n_max == 1) & (n_fit > 1) & bent_too_far)),
        "max_turns": int(n_max.max()) if n_max.size else 0,
        "windings_per_material": int(n_max[keep].sum()),
    }
    counts = n_max[keep]
    base = np.repeat(np.flatnonzero(keep), counts)
    starts = np.repeat(np.cumsum(counts) - counts, counts)
    turns = (np.arange(base.size) - starts + 1).astype(int)
    # Energy-method Cp of every winding at once, per material (its electrical class and εr).
    geoms = [cores[i].turn_geometry(d_out) for i in np.flatnonzero(keep)]
    cp = candidates_cp(geoms, np.repeat(np.arange(len(geoms)), counts), turns, cond, spec.materials,
                       spec.winding_angle)
    if spec.cp is not None:
        cp[:] = spec.cp
    s_idx, stack, n_fit, bend = s_idx[base], stack[base], n_fit[base], bend[base]
    geo = _Geometry(
        size_idx=s_idx, stack=stack, turns=turns, n_fit=n_fit,
        l0=np.atleast_1d(air_core_inductance(c1[base], turns)),
        cp=cp * spec.cp_factor,
        length=turns * np.nan_to_num(mlt[base]),
        ae=ae[base], area=area[base], volume=volume[base], bend=bend,
    )
    return geo, space


@dataclass
class _Scan:
    """What one pass over the candidates found."""

    best_score: float = -np.inf
    best_at: tuple[int, int] | None = None
    meeting: int = 0
    hot: int = 0
    coolest_hot: tuple[float, int, int] | None = None
    passing: list = field(default_factory=list)


def _scan(spec: SizeSpec, geo: _Geometry, f: np.ndarray, mus: Sequence[np.ndarray], r_per_m: np.ndarray, *,
          collect: bool = True, progress: Callable[[int, int], None] | None = None) -> _Scan:
    """Evaluate every (material, geometry) candidate, chunk by chunk.

    With ``collect=False`` only the best score is wanted (diagnosis): the pass stops at the
    first candidate that meets the target.
    """
    out = _Scan()
    G = geo.turns.size
    total = G * len(mus)
    rows = max(64, _CHUNK_POINTS // max(f.size, 1))
    use_r = spec.criterion == "resistance"
    done = 0
    for m, mu in enumerate(mus):
        for a in range(0, G, rows):
            b = min(a + rows, G)
            z = choke_impedance(f, geo.l0[a:b, None], mu, geo.length[a:b, None] * r_per_m, geo.cp[m, a:b, None])
            metric = z.real if use_r else np.abs(z)
            v_min = metric.min(axis=1)
            k = int(np.argmax(v_min))
            if v_min[k] / spec.target_ohm > out.best_score:
                out.best_score, out.best_at = float(v_min[k] / spec.target_ohm), (m, a + k)
            ok = np.flatnonzero(v_min >= spec.target_ohm)
            done += b - a
            if progress is not None:
                progress(done, total)
            if not ok.size:
                continue
            if not collect:
                return out
            out.meeting += ok.size
            zk, gi = z[ok], a + ok
            r_min, r_hz = _minimum(zk.real, f)
            x_min, x_hz = _minimum(np.abs(zk), f)
            heat = np.full((ok.size, 5), np.nan)
            cool = np.ones(ok.size, bool)
            if spec.drive is not None:
                hc = heat_check(spec.drive, f, zk, geo.turns[gi], geo.ae[gi], geo.area[gi])
                heat = np.stack([hc.dissipation_w, hc.dissipation_hz, hc.temperature_rise_k, hc.peak_flux_t,
                                 hc.peak_flux_hz], axis=1)
                cool = hc.temperature_rise_k <= spec.max_rise_k
                if not cool.all():
                    out.hot += int(np.count_nonzero(~cool))
                    j = int(np.argmin(np.where(cool, np.inf, hc.temperature_rise_k)))
                    if out.coolest_hot is None or hc.temperature_rise_k[j] < out.coolest_hot[0]:
                        out.coolest_hot = (float(hc.temperature_rise_k[j]), m, int(gi[j]))
                if spec.keep_hot:
                    cool = np.ones(ok.size, bool)
            if cool.any():
                out.passing.append((np.full(int(cool.sum()), m), gi[cool], r_min[cool], r_hz[cool], x_min[cool],
                                    x_hz[cool], v_min[ok][cool] / spec.target_ohm, heat[cool]))
    return out


def size(spec: SizeSpec, progress: Callable[[int, int], None] | None = None) -> SizeResult:
    """Search the design space of ``spec`` for chokes meeting the target.

    Parameters
    ----------
    spec : SizeSpec
    progress : callable, optional
        Called as ``progress(done, total)`` after each chunk of candidates.

    Returns
    -------
    SizeResult

    Raises
    ------
    MaterialError
        When a tabulated material does not cover the band.

    References
    ----------
    Model and sources as :func:`cmcheck.model.choke.predict` (IEC 60205 core factor, IEV 221-03-06
    winding impedance, Massarini & Kazimierczuk 1997 stray capacitance); heat per
    :mod:`cmcheck.design.heat` (McLyman, 3rd ed., ch. 6).
    """
    t0 = time.perf_counter()
    for mat in spec.materials:
        if spec.cp is None and cp_material(mat).assumed:
            warnings.warn(CmcheckWarning(unknown_class_message(mat.name), parameter="materials"), stacklevel=2)
    band = spec.band
    f_grid = band.grid(spec.points)
    f = f_grid[band.contains(f_grid)]
    mus = [np.asarray(mat.permeability(f), complex) for mat in spec.materials]
    # Rc is proportional to conductor length in both conductor models: evaluate one metre once.
    r_per_m = np.asarray(spec.conductor.resistance(f, 1.0), float)
    geo, space = _geometry(spec)
    scan = _scan(spec, geo, f, mus, r_per_m, progress=progress)
    total = geo.turns.size * len(mus)
    closest = diagnosis = None
    # Only a failed search needs the diagnosis, which re-runs the search through this context.
    ctx = SearchContext(f, mus, r_per_m, candidate_geometry, scan_candidates)
    if scan.passing:
        cols = [np.concatenate([p[i] for p in scan.passing]) for i in range(8)]
        designs = _short_list(spec, geo, *cols)
    else:
        designs = ()
        if scan.meeting and scan.coolest_hot is not None:
            _, m, g = scan.coolest_hot
            closest = _single(spec, geo, m, g, f)
            diagnosis = diagnose_heat(spec, closest, scan.meeting, ctx)
        elif scan.best_at is not None:
            closest = _single(spec, geo, *scan.best_at, f)
            diagnosis = diagnose(spec, closest, ctx)
        else:
            diagnosis = diagnose_nothing_fits(spec)
    return SizeResult(
        spec=spec, designs=designs, candidates_searched=total, meeting_target=scan.meeting, too_hot=scan.hot,
        closest=closest, diagnosis=diagnosis, elapsed_s=time.perf_counter() - t0, space=space,
    )


def candidate_geometry(spec: SizeSpec, *, turns_factor: float = 1.0, limits: bool = True):
    """The material-independent candidates of a search: (geometry, counts of the design space).

    Public entry for counterfactual re-runs (:mod:`cmcheck.design.diagnosis`):
    ``turns_factor`` > 1 allows that many times the turns that fit one layer, and
    ``limits=False`` drops the bend and ``max_turns`` limits.
    """
    return _geometry(spec, turns_factor=turns_factor, limits=limits)


def scan_candidates(spec: SizeSpec, geometry, f: np.ndarray, mus: Sequence[np.ndarray], r_per_m: np.ndarray, *,
                    collect: bool = True):
    """Evaluate every (material, geometry) candidate on the grid ``f`` [Hz].

    Returns the scan's findings: ``best_score`` (min over the band / target of the best
    candidate), ``best_at`` (material and geometry index), ``meeting``, ``passing``. With
    ``collect=False`` the pass stops at the first candidate that meets the target.
    """
    return _scan(spec, geometry, f, mus, r_per_m, collect=collect)


def _minimum(values: np.ndarray, f: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    i = np.argmin(values, axis=1)
    return values[np.arange(values.shape[0]), i], f[i]


def _heat_dict(spec: SizeSpec, row) -> dict | None:
    if spec.drive is None:
        return None
    p, p_hz, dt, bpk, b_hz = (float(v) for v in row)
    return {
        "dissipation_w": p, "dissipation_hz": p_hz, "temperature_rise_k": dt,
        "peak_flux_density_t": bpk, "peak_flux_hz": b_hz, "too_hot": bool(dt > spec.max_rise_k),
    }


def _short_list(spec, geo, mat, g, r_min, r_hz, x_min, x_hz, margin, heat) -> tuple[SizedDesign, ...]:
    """Rank by cost and keep a diverse few: the cheapest per (material, size) pair, at most two per
    material and two per core size while enough others pass."""
    order = np.lexsort((-margin, geo.turns[g], geo.volume[g]))
    chosen: list[int] = []
    leftovers: list[int] = []
    seen_pair: set[tuple[int, int]] = set()
    per_mat: dict[int, int] = {}
    per_size: dict[int, int] = {}
    for i in order:
        m, s = int(mat[i]), int(geo.size_idx[g[i]])
        if (m, s) in seen_pair:
            continue
        seen_pair.add((m, s))
        if per_mat.get(m, 0) >= 2 or per_size.get(s, 0) >= 2:
            leftovers.append(int(i))
            continue
        per_mat[m] = per_mat.get(m, 0) + 1
        per_size[s] = per_size.get(s, 0) + 1
        chosen.append(int(i))
        if len(chosen) >= spec.top:
            break
    # Few materials pass: let them fill the list rather than show fewer designs.
    chosen += leftovers[: max(0, spec.top - len(chosen))]
    chosen.sort(key=lambda i: (geo.volume[g[i]], geo.turns[g[i]], -margin[i]))
    return tuple(
        _make(spec, geo, int(mat[i]), int(g[i]), float(r_min[i]), float(r_hz[i]), float(x_min[i]), float(x_hz[i]),
              float(margin[i]), _heat_dict(spec, heat[i]))
        for i in chosen
    )


def _design(spec: SizeSpec, geo: _Geometry, m: int, g: int) -> ChokeDesign:
    core = spec.sizes.cores[int(geo.size_idx[g])].stacked(int(geo.stack[g]))
    # With the plain estimate, leave Cp to the model (as predict would); a scaled one is given.
    cp = None if spec.cp_factor == 1.0 and spec.cp is None else float(geo.cp[m, g])
    return ChokeDesign(core, spec.materials[m], Winding(int(geo.turns[g]), spec.conductor, cp),
                       winding_angle=spec.winding_angle)


def _make(spec, geo, m, g, r_min, r_hz, x_min, x_hz, margin, heat) -> SizedDesign:
    design = _design(spec, geo, m, g)
    return SizedDesign(
        design=design, kind=spec.sizes.kind[int(geo.size_idx[g])], min_resistance_ohm=r_min, min_resistance_hz=r_hz,
        min_impedance_ohm=x_min, min_impedance_hz=x_hz, margin=margin, max_turns_fit=int(geo.n_fit[g]),
        bend_radius_m=float(geo.bend[g]), prediction=_predict_quietly(design, spec), heat=heat,
        cp_source=_cp_source(spec), buy=purchase_label(spec.materials[m], spec.material_series),
    )


def _predict_quietly(design: ChokeDesign, spec: SizeSpec):
    with warnings.catch_warnings():  # size() has warned once per material of unknown class
        warnings.filterwarnings("ignore", message=".*does not declare its electrical class", category=CmcheckWarning)
        return predict(design, spec.band, spec.points)


def _cp_source(spec: SizeSpec) -> str | None:
    """How the search's Cp differs from ChokeDesign's own estimate, or None when it does not."""
    if spec.cp is not None:
        return "given" if spec.cp_factor == 1.0 else "given, scaled by cp_factor"
    return None if spec.cp_factor == 1.0 else "estimated (energy method), scaled by cp_factor"


def _single(spec: SizeSpec, geo: _Geometry, m: int, g: int, f: np.ndarray) -> SizedDesign:
    """One candidate evaluated in full (the closest design), heat included."""
    one = _Geometry(**{k: (v[:, [g]] if v.ndim == 2 else v[[g]]) for k, v in geo.__dict__.items()})
    mu = np.asarray(spec.materials[m].permeability(f), complex)
    z = choke_impedance(f, one.l0[:, None], mu, one.length[:, None] * spec.conductor.resistance(f, 1.0), one.cp[m][:, None])
    r_min, r_hz = _minimum(z.real, f)
    x_min, x_hz = _minimum(np.abs(z), f)
    v = r_min[0] if spec.criterion == "resistance" else x_min[0]
    heat = None
    if spec.drive is not None:
        hc = heat_check(spec.drive, f, z, one.turns, one.ae, one.area)
        heat = _heat_dict(spec, [hc.dissipation_w[0], hc.dissipation_hz[0], hc.temperature_rise_k[0],
                                 hc.peak_flux_t[0], hc.peak_flux_hz[0]])
    return _make(spec, geo, m, g, float(r_min[0]), float(r_hz[0]), float(x_min[0]), float(x_hz[0]),
                 float(v / spec.target_ohm), heat)
