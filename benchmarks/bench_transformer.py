"""Benchmark of the batched transformer solve against a per-frequency loop of the same solve.

Run: python benchmarks/bench_transformer.py [--points N] [--sample N] [--repeat N]

Prints, all measured in this one run on this machine, for a wound Ruthroff 4:1 unun (8 bifilar
turns of 18 AWG on a 35.6 × 23 × 12.7 mm NiZn 800-class ring, 200 Ω load) and a 1:49
flux-coupled transformer (4:28 turns on two stacked 25.4 × 15.5 × 6.35 mm rings, 2450 Ω):
- wall time of ``cmcheck.transformer.analysis.analyse`` over ``--points`` frequencies
  (1–30 MHz), best of ``--repeat`` runs after a warm-up;
- the same analysis called once per frequency in a Python loop (a random sample of
  ``--sample`` frequencies is timed and the time extrapolated to all points);
- the speedup (goal ≥ 20×).
"""

from __future__ import annotations

import argparse
import timeit

import numpy as np

from cmcheck.model.choke import air_core_inductance
from cmcheck.model.cores import RingCore
from cmcheck.model.materials import get_material
from cmcheck.model.winding import Wire
from cmcheck.transformer.analysis import analyse
from cmcheck.transformer.flux import FluxCoupled
from cmcheck.transformer.loads import Load
from cmcheck.transformer.topologies import TOPOLOGIES
from cmcheck.transformer.windings import LineWinding
from cmcheck.units import awg_diameter


def best_of(fn, repeat: int) -> float:
    """Shortest of ``repeat`` single runs [s]."""
    return min(timeit.repeat(fn, number=1, repeat=repeat))


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--points", type=int, default=10_001)
    ap.add_argument("--sample", type=int, default=300)
    ap.add_argument("--repeat", type=int, default=3)
    args = ap.parse_args()

    f = np.linspace(1e6, 30e6, args.points)
    nizn = get_material("nizn-800")
    four = LineWinding(RingCore(35.6e-3, 23e-3, 12.7e-3), nizn, 8, Wire(awg_diameter(18), 0.035e-3, 3.5))
    stack = RingCore(25.4e-3, 15.5e-3, 6.35e-3, 2)
    flux = FluxCoupled.from_geometry(stack, nizn, 4, 49, Wire(0.3e-3, 0.02e-3, 3.5))
    cases = [
        ("ruthroff 4:1", TOPOLOGIES["ruthroff-4:1-unun"], four, Load.resistor(200.0)),
        ("flux 1:49", TOPOLOGIES["flux-1:N"], flux, Load.resistor(2450.0)),
    ]
    rng = np.random.default_rng(1)
    sample = np.sort(rng.choice(f, size=min(args.sample, f.size), replace=False))
    print(f"{args.points} frequencies, 1–30 MHz; loop time extrapolated from {sample.size} frequencies")
    for name, topo, tr, load in cases:
        analyse(topo, f[:10], tr, load)  # warm-up
        t_batch = best_of(lambda: analyse(topo, f, tr, load, power_w=100.0), args.repeat)

        def loop():
            for fi in sample:
                analyse(topo, np.array([fi]), tr, load, power_w=100.0)

        t_loop = best_of(loop, 1) * f.size / sample.size
        print(f"{name:14s} batched {t_batch * 1e3:8.1f} ms   per-frequency loop {t_loop:7.2f} s   "
              f"speedup {t_loop / t_batch:6.1f}×")


if __name__ == "__main__":
    main()
