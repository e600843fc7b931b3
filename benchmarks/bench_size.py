"""Benchmark of the sizing search on its default design space.

Run: python benchmarks/bench_size.py [--sample N] [--repeat N]

Prints, all measured in this one run on this machine:
- wall time of ``cmcheck.design.search.size`` on the default design space (the NiZn and MnZn families on ISO 3 R10 and every built-in
  ring size, 1–4 stacked cores, every turn count that fits, 1 mm wire as the CLI's default,
  1.8–30 MHz at 201 points) — best of ``--repeat`` runs after one warm-up;
- candidate-frequency evaluations per second;
- speedup over evaluating the same candidates one at a time through the public
  ``cmcheck.model.choke.predict`` (a random sample of ``--sample`` candidates is timed one by one
  and the time extrapolated to all of them), and over the bare model ``ChokeDesign.impedance``
  one at a time (no self-resonance search), for a fairer view;
- ratio of a bare numpy complex kernel on the same (candidates × frequencies) shape to the
  search (1.0 would mean the search costs no more than the arithmetic itself).
"""

from __future__ import annotations

import argparse
import time
import timeit

import numpy as np

from cmcheck.model.choke import ChokeDesign, predict
from cmcheck.model.materials import search_materials
from cmcheck.design.catalogue import builtin_ring_sizes
from cmcheck.design.search import SizeSpec, _geometry, size
from cmcheck.units import parse_band
from cmcheck.model.winding import Wire, Winding


def best_of(fn, repeat: int) -> float:
    """Shortest of ``repeat`` single runs [s] (the least disturbed by other load)."""
    return min(timeit.repeat(fn, number=1, repeat=repeat))


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--sample", type=int, default=150, help="candidates timed one by one through predict")
    ap.add_argument("--repeat", type=int, default=3)
    args = ap.parse_args()

    band = parse_band("1.8-30MHz")
    mats = search_materials()  # the default of `cmcheck size`: NiZn and MnZn on ISO 3 R10
    spec = SizeSpec(band, Wire(1e-3), mats, builtin_ring_sizes())
    size(spec)  # warm-up: first calls import lazily and fill caches
    result = {}

    def run():
        result["r"] = size(spec)

    t_search = best_of(run, args.repeat)
    res = result["r"]
    f_grid = band.grid(spec.points)
    f = f_grid[band.contains(f_grid)]
    n_cand, n_f = res.candidates_searched, f.size
    evals = n_cand * n_f

    # One at a time through the public API, on a random sample of the same candidates.
    geo, _ = _geometry(spec)
    rng = np.random.default_rng(1)
    sample = rng.integers(0, n_cand, size=min(args.sample, n_cand))
    designs = []
    for c in sample:
        m, g = divmod(int(c), geo.turns.size)
        core = spec.sizes.cores[int(geo.size_idx[g])].stacked(int(geo.stack[g]))
        designs.append(ChokeDesign(core, mats[m], Winding(int(geo.turns[g]), spec.conductor)))
    t0 = time.perf_counter()
    for d in designs:
        predict(d, band, spec.points)
    t_predict = (time.perf_counter() - t0) / len(designs) * n_cand
    t0 = time.perf_counter()
    for d in designs:
        d.impedance(f).real.min()
    t_model = (time.perf_counter() - t0) / len(designs) * n_cand

    # The bare arithmetic on the same shape: Z = (jωL0µ + R)/(1 + jωCp(jωL0µ + R)), min Re Z
    # per row, with every input precomputed; timed whole and in the search's chunks, the
    # faster taken, so the ratio does not flatter the search.
    l0 = np.tile(geo.l0, len(mats))[:, None]
    r = (np.tile(geo.length, len(mats))[:, None]) * np.asarray(spec.conductor.resistance(f, 1.0))
    cp = geo.cp.reshape(-1)[:, None]
    mu = np.repeat(np.stack([m.permeability(f) for m in mats]), geo.turns.size, axis=0)
    jw = 2j * np.pi * f

    def kernel(a, b):
        zs = jw * l0[a:b] * mu[a:b] + r[a:b]
        return (zs / (1.0 + jw * cp[a:b] * zs)).real.min(axis=1)

    rows = max(64, 400_000 // n_f)
    t_bare = min(
        best_of(lambda: kernel(0, n_cand), args.repeat),
        best_of(lambda: [kernel(a, a + rows) for a in range(0, n_cand, rows)], args.repeat),
    )

    print(f"default design space: {len(mats)} materials × {len(spec.sizes)} sizes × 1–{spec.max_cores} cores × turns "
          f"that fit (1 mm wire, up to {res.space['max_turns']} turns)")
    print(f"candidates x frequencies      : {n_cand:,} x {n_f} = {evals:,} evaluations")
    print(f"size() wall time              : {t_search:.3f} s (best of {args.repeat}; includes the short list's "
          f"predict calls; {res.meeting_target:,} candidates meet 1 kΩ)")
    print(f"evaluations per second        : {evals / t_search:,.0f}")
    print(f"one at a time through predict : {t_predict:.1f} s extrapolated from {len(designs)} random candidates "
          f"-> speedup {t_predict / t_search:,.0f}x (goal >= 50x)")
    print(f"one at a time, model only     : {t_model:.1f} s (ChokeDesign.impedance, no self-resonance search) "
          f"-> speedup {t_model / t_search:,.0f}x")
    print(f"bare numpy complex kernel     : {t_bare:.3f} s on the same shape -> ratio kernel/search "
          f"{t_bare / t_search:.2f} (goal >= 0.3)")


if __name__ == "__main__":
    main()
