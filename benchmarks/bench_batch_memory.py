"""Benchmark of a batch's memory: peak memory of ``cmcheck extract`` with ``--summary`` on 2,000
files against 200 files (goal: within 20 %), each batch in its own fresh process.

The files are the ones of ``bench_extract.py`` (two-port series-through sweeps, S12/S22 zeros).
Each batch runs ``python -m cmcheck extract FILES --band … --target-r … --summary PATH`` in a
subprocess; the peak resident set size of that process (``resource.getrusage(RUSAGE_CHILDREN)
.ru_maxrss``, read in a wrapper subprocess so that each figure belongs to one batch only) is
printed with the ratio, all measured in this one run.

Run it from the repository root so that it measures this checkout:

    PYTHONPATH=. python benchmarks/bench_batch_memory.py [--small 200] [--large 2000] [--points 401] [--jobs 1]
"""

from __future__ import annotations

import argparse
import subprocess
import sys
import tempfile
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent))
from bench_extract import make_files  # noqa: E402

_WRAPPER = """
import resource, subprocess, sys
r = subprocess.run(sys.argv[1:], stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL)
print(resource.getrusage(resource.RUSAGE_CHILDREN).ru_maxrss, r.returncode)
"""


def peak_kib(files: list[Path], summary: Path, jobs: int) -> tuple[int, int]:
    """Peak RSS [KiB] of one ``extract`` batch (with ``jobs`` > 1: of its largest process) and its exit status."""
    cmd = [sys.executable, "-m", "cmcheck", "extract", *map(str, files), "--band", "2-50MHz", "--target-r", "1k",
           "--summary", str(summary), "--jobs", str(jobs)]
    out = subprocess.run([sys.executable, "-c", _WRAPPER, *cmd], capture_output=True, text=True, check=True)
    kib, status = out.stdout.split()
    return int(kib), int(status)


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--small", type=int, default=200)
    ap.add_argument("--large", type=int, default=2000)
    ap.add_argument("--points", type=int, default=401)
    ap.add_argument("--jobs", type=int, default=1)
    a = ap.parse_args()
    with tempfile.TemporaryDirectory() as tmp:
        folder = Path(tmp)
        files = make_files(folder, a.large, a.points)
        small, small_status = peak_kib(files[: a.small], folder / "small.csv", a.jobs)
        large, large_status = peak_kib(files, folder / "large.csv", a.jobs)
        rows = sum(1 for _ in open(folder / "large.csv", encoding="utf-8")) - 1
    print(f"peak memory, {a.small} files: {small / 1024:.1f} MiB (exit {small_status})")
    print(f"peak memory, {a.large} files: {large / 1024:.1f} MiB (exit {large_status}, {rows} summary rows)")
    ratio = large / small
    print(f"ratio {a.large}/{a.small} files: {ratio:.3f} (goal ≤ 1.20) {'OK' if ratio <= 1.2 else 'ABOVE GOAL'}")


if __name__ == "__main__":
    main()
