"""Benchmark of ``extract`` on a production batch: our whole extraction against parsing alone.

Generates N two-port series-through files (default 1,000 × 1,601 points, S12/S22 written as
zeros the way low-cost analysers do) in a temporary folder, then times, on the same files:

* scikit-rf's Touchstone parser alone (``skrf.io.touchstone.Touchstone(path)``), and
* cmcheck's extraction: safe reading and validation, series-through Z, validity mask and the
  band summary with a pass/fail limit (``cmcheck.measurement.qa.evaluate_files``).

It prints the ratio of the two (goal: at most 1.25, i.e. ≤ 25 % overhead over parsing) and
files per second. Each timing is the best of ``--repeat`` rounds, measured in this one run.

    python benchmarks/bench_extract.py [--files 1000] [--points 1601] [--repeat 3]
"""

from __future__ import annotations

import argparse
import tempfile
import time
import timeit
import warnings
from pathlib import Path

import numpy as np


def make_files(folder: Path, n_files: int, n_points: int, seed: int = 1) -> list[Path]:
    """Write ``n_files`` series-through sweeps of slightly different chokes."""
    rng = np.random.default_rng(seed)
    f = np.linspace(1e6, 60e6, n_points)
    w = 2 * np.pi * f
    paths = []
    for k in range(n_files):
        r, l, c = 800 + 400 * rng.random(), 20e-6 * (1 + 0.1 * rng.random()), 2e-12
        zs = r + 1j * w * l
        z = zs / (1 + 1j * w * c * zs)
        s21 = 100.0 / (100.0 + z) + 1e-4 * (rng.normal(size=n_points) + 1j * rng.normal(size=n_points))
        s11 = 1 - s21
        cols = np.column_stack([f, s11.real, s11.imag, s21.real, s21.imag, np.zeros((n_points, 4))])
        body = "\n".join(" ".join(f"{v:.10g}" for v in row) for row in cols.tolist())
        p = folder / f"unit{k:04d}.s2p"
        p.write_text("! benchmark unit\n# Hz S RI R 50\n" + body + "\n")
        paths.append(p)
    return paths


def best_of(fn, repeat: int) -> float:
    """Shortest of ``repeat`` single runs [s] (the least disturbed by other load)."""
    return min(timeit.repeat(fn, number=1, repeat=repeat))


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    ap.add_argument("--files", type=int, default=1000)
    ap.add_argument("--points", type=int, default=1601)
    ap.add_argument("--repeat", type=int, default=3)
    args = ap.parse_args()

    from skrf.io.touchstone import Touchstone

    from cmcheck.measurement.qa import Limits, evaluate_files
    from cmcheck.units import parse_band

    with tempfile.TemporaryDirectory() as d:
        t0 = time.perf_counter()
        paths = make_files(Path(d), args.files, args.points)
        t_gen = time.perf_counter() - t0
        limits = Limits(parse_band("1.8-30MHz"), target_r=1000.0)

        def parse_only():
            for p in paths:
                Touchstone(str(p))

        def ours():
            with warnings.catch_warnings():
                warnings.simplefilter("ignore")
                res = evaluate_files(paths, limits=limits)
            assert all(r.error is None for r in res)

        ours()  # warm up imports and caches for both
        # Alternate the two so that a busy machine slows both alike; keep each one's best round.
        t_skrf = t_ours = float("inf")
        for _ in range(args.repeat):
            t_skrf = min(t_skrf, best_of(parse_only, 1))
            t_ours = min(t_ours, best_of(ours, 1))

    ratio = t_ours / t_skrf
    print(f"files: {args.files} × {args.points} points (2-port, generated in {t_gen:.1f} s)")
    print(f"scikit-rf Touchstone parsing alone: {t_skrf:.2f} s ({args.files / t_skrf:.0f} files/s)")
    print(f"cmcheck extraction (read, validate, Z, validity, summary, limit): {t_ours:.2f} s "
          f"({args.files / t_ours:.0f} files/s)")
    print(f"ratio cmcheck/parsing: {ratio:.3f} (overhead {100 * (ratio - 1):+.1f} %; goal ≤ +25 %)")


if __name__ == "__main__":
    main()
