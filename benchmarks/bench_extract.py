"""Benchmark of ``extract`` on a production batch: our whole extraction against parsing alone.

Generates N two-port series-through files (default 1,000 × 1,601 points, S12/S22 written as
zeros the way low-cost analysers do) in a temporary folder, then times, on the same files:

* scikit-rf's Touchstone parser alone (``skrf.io.touchstone.Touchstone(path)``), and
* cmcheck's extraction: safe reading and validation, series-through Z, validity mask and the
  band summary with a pass/fail limit (``cmcheck.measurement.qa.evaluate_files``).

It prints how many times faster the whole extraction is than scikit-rf's parsing alone (goal:
at least 2×), then checks that every result is identical to the one cmcheck gets when it
parses with scikit-rf instead of its vectorised reader. A second part does the same for one
file of 100,001 points (goal: extraction faster than scikit-rf's parse of it alone; the
interpreter's start-up is not part of either). Each timing is the best of ``--repeat`` rounds,
the two sides alternated, all measured in this one run; wall-clock and CPU time are both
printed, as the machine may be shared (the 1-minute load average is printed too).

Run it from the repository root so that it times this checkout:

    PYTHONPATH=. python benchmarks/bench_extract.py [--files 1000] [--points 1601] [--repeat 3]
"""

from __future__ import annotations

import argparse
import os
import tempfile
import time
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


def best_of(fn, repeat: int) -> tuple[float, float]:
    """Shortest wall-clock and CPU time of ``repeat`` single runs [s] (the least disturbed)."""
    wall = cpu = float("inf")
    for _ in range(repeat):
        w0, c0 = time.perf_counter(), time.process_time()
        fn()
        wall, cpu = min(wall, time.perf_counter() - w0), min(cpu, time.process_time() - c0)
    return wall, cpu


def race(parse_only, ours, repeat: int):
    """Best times of both, alternating rounds so that a busy machine slows both alike."""
    t_skrf = t_ours = (float("inf"), float("inf"))
    for _ in range(repeat):
        t_skrf = tuple(map(min, t_skrf, best_of(parse_only, 1)))
        t_ours = tuple(map(min, t_ours, best_of(ours, 1)))
    return t_skrf, t_ours


def same(a, b) -> bool:
    """Exact equality of two results as dictionaries (arrays bit for bit, NaN equal to NaN)."""
    if isinstance(a, dict):
        return isinstance(b, dict) and a.keys() == b.keys() and all(same(a[k], b[k]) for k in a)
    if isinstance(a, np.ndarray) or isinstance(b, np.ndarray):
        a, b = np.asarray(a), np.asarray(b)
        return a.shape == b.shape and a.dtype == b.dtype and np.array_equal(a, b, equal_nan=a.dtype.kind in "fc")
    if isinstance(a, float) and isinstance(b, float) and a != a and b != b:
        return True
    return a == b


def evaluate(paths, limits, *, reference: bool):
    """Results of ``evaluate_files``; with ``reference`` the vectorised reader is switched off."""
    from cmcheck.measurement import touchstone
    from cmcheck.measurement.qa import evaluate_files

    saved = touchstone.parse_v1
    if reference:
        touchstone.parse_v1 = lambda data, rank: None
    try:
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")
            return evaluate_files(paths, limits=limits)
    finally:
        touchstone.parse_v1 = saved


def report(label: str, n: int, t_skrf, t_ours) -> None:
    print(f"{label}")
    print(f"  scikit-rf Touchstone parsing alone: {t_skrf[0]:.3f} s wall, {t_skrf[1]:.3f} s CPU ({n / t_skrf[0]:.0f} files/s)")
    print(f"  cmcheck extraction (read, validate, Z, validity, summary, limit): {t_ours[0]:.3f} s wall, "
          f"{t_ours[1]:.3f} s CPU ({n / t_ours[0]:.0f} files/s)")
    print(f"  speed-up over scikit-rf parsing alone: {t_skrf[0] / t_ours[0]:.2f}× wall, {t_skrf[1] / t_ours[1]:.2f}× CPU")


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    ap.add_argument("--files", type=int, default=1000)
    ap.add_argument("--points", type=int, default=1601)
    ap.add_argument("--large-points", type=int, default=100_001)
    ap.add_argument("--repeat", type=int, default=3)
    args = ap.parse_args()

    from skrf.io.touchstone import Touchstone

    import cmcheck
    from cmcheck.measurement.qa import Limits, result_to_dict
    from cmcheck.units import parse_band

    print(f"cmcheck from {Path(cmcheck.__file__).parent}; load average {os.getloadavg()[0]:.1f} on {os.cpu_count()} CPUs")
    limits = Limits(parse_band("1.8-30MHz"), target_r=1000.0)
    with tempfile.TemporaryDirectory() as d:
        t0 = time.perf_counter()
        paths = make_files(Path(d), args.files, args.points)
        (Path(d) / "big").mkdir()
        big = make_files(Path(d) / "big", 1, args.large_points, seed=2)
        t_gen = time.perf_counter() - t0

        def parse_only(files):
            return lambda: [Touchstone(str(p)) for p in files]

        def ours(files):
            def run():
                res = evaluate(files, limits, reference=False)
                assert all(r.error is None for r in res), [r.error for r in res if r.error][:3]
            return run

        ours(paths)()  # warm up imports and caches for both
        parse_only(paths[:5])()
        batch = race(parse_only(paths), ours(paths), args.repeat)
        large = race(parse_only(big), ours(big), args.repeat)

        # The same results as with scikit-rf's parser, file by file, bit for bit.
        mine = evaluate(paths + big, limits, reference=False)
        ref = evaluate(paths + big, limits, reference=True)
        n_same = sum(same(result_to_dict(a), result_to_dict(b)) for a, b in zip(mine, ref))

    print(f"generated {args.files} files × {args.points} points and 1 × {args.large_points} points "
          f"(2-port) in {t_gen:.1f} s; load average now {os.getloadavg()[0]:.1f}")
    report(f"batch of {args.files} files × {args.points} points:", args.files, *batch)
    report(f"one file of {args.large_points} points:", 1, *large)
    print(f"results identical to the scikit-rf path: {n_same} of {len(mine)}")
    ok = batch[0][0] / batch[1][0] >= 2 and large[1][0] < large[0][0] and n_same == len(mine)
    print("goals met (≥ 2× on the batch, large file faster than parsing it, identical results):", "yes" if ok else "NO")


if __name__ == "__main__":
    main()
