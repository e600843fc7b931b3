"""What a sizing search returns: each short-listed design with its figures of merit
(:class:`SizedDesign`) and the search's result (:class:`SizeResult`), with their JSON form."""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import TYPE_CHECKING

from ..model.choke import ChokeDesign, Prediction
from ..model.cores import Core
from .diagnosis import Diagnosis

if TYPE_CHECKING:  # annotations only: the search imports this module
    from .search import SizeSpec

__all__ = ["SizeResult", "SizedDesign"]


@dataclass(frozen=True, eq=False)
class SizedDesign:
    """One design from the search, with its figures of merit.

    ``min_resistance_ohm`` (and ``min_impedance_ohm``) come from the vectorised search; the
    self-resonance and resistive fraction from :func:`cmcheck.model.choke.predict` on the same design
    (``prediction``), which reproduces the minimum.
    """

    design: ChokeDesign
    kind: str
    min_resistance_ohm: float
    min_resistance_hz: float
    min_impedance_ohm: float
    min_impedance_hz: float
    margin: float
    max_turns_fit: int
    bend_radius_m: float
    prediction: Prediction
    heat: dict | None = None
    cp_source: str | None = None
    buy: str = ""

    @property
    def core(self) -> Core:
        return self.design.core

    @property
    def self_resonance_hz(self) -> float | None:
        return self.prediction.summary["self_resonance_hz"]

    @property
    def core_volume_m3(self) -> float:
        return self.core.volume

    def to_dict(self) -> dict:
        d = self.design.to_dict()
        d.update(
            kind=self.kind,
            min_resistance_ohm=self.min_resistance_ohm,
            min_resistance_hz=self.min_resistance_hz,
            min_impedance_ohm=self.min_impedance_ohm,
            min_impedance_hz=self.min_impedance_hz,
            margin=self.margin,
            self_resonance_hz=self.self_resonance_hz,
            resistive_fraction=self.prediction.summary["resistive_fraction"],
            core_volume_m3=self.core_volume_m3,
            core_surface_m2=self.core.surface_area,
            max_turns_one_layer=self.max_turns_fit,
            bend_radius_m=self.bend_radius_m,
            buy=self.buy or self.design.material.name,
        )
        if self.cp_source is not None:
            d["cp_source"] = self.cp_source
        if self.heat is not None:
            d.update(self.heat)
        return d


@dataclass(frozen=True, eq=False)
class SizeResult:
    """Result of :func:`size`.

    Attributes
    ----------
    spec : SizeSpec
    designs : tuple of SizedDesign
        The short list, cheapest first (empty when nothing passes).
    candidates_searched : int
    meeting_target : int
        Candidates whose minimum over the band reaches the target.
    too_hot : int
        Of those, how many were dropped for exceeding ``max_rise_k``.
    closest : SizedDesign or None
        When nothing passes: the design nearest to passing.
    diagnosis : Diagnosis or None
    elapsed_s : float
    space : dict
        Counts describing the design space (materials, sizes, stacks, turns range).
    """

    spec: SizeSpec
    designs: tuple[SizedDesign, ...]
    candidates_searched: int
    meeting_target: int
    too_hot: int
    closest: SizedDesign | None
    diagnosis: Diagnosis | None
    elapsed_s: float
    space: dict = field(default_factory=dict)

    @property
    def passing(self) -> int:
        return self.meeting_target - self.too_hot

    @property
    def ok(self) -> bool:
        return bool(self.designs)

    def to_dict(self) -> dict:
        s = self.spec
        d = {
            "designs": [x.to_dict() for x in self.designs],
            "candidates_searched": self.candidates_searched,
            "meeting_target": self.meeting_target,
            "too_hot": self.too_hot,
            "passing": self.passing,
            "band_hz": [list(seg) for seg in s.band.segments],
            "criterion": s.criterion,
            "target_ohm": s.target_ohm,
            "ranking": "total core volume, then turns, then larger margin; cheapest per material and core size, at most two per material and per size",
            "design_space": self.space,
            "min_bend_radius_m": s.bend_limit,
            "cp_factor": s.cp_factor,
            "size_series": s.sizes.series,
            "material_series": s.material_series,
            "max_rise_k": s.max_rise_k if s.drive else None,
            "drive": s.drive.to_dict() if s.drive else None,
        }
        if self.closest is not None:
            d["closest"] = self.closest.to_dict()
        if self.diagnosis is not None:
            d.update(self.diagnosis.to_dict())
        return d
