"""Benchmark: what ``extract``'s closed-form winding estimates add to a production batch.

Generates N series-through files (``bench_extract.make_files``), extracts them once
(``evaluate_files``), then times on the same results, in this one run, best of ``--repeat``:

* the extraction itself (read, Z, validity, summary), and
* the winding estimates of every file (``reporting.winding_report.winding_estimate``:
  resonance, L from the inductive slope, Cp by Thomson's formula; closed forms, no fit).

It prints the estimates' time as a share of the extraction's (goal: under 20 %, so batch speed
holds; 0.11–0.12 measured when written). Run from the repository root:

    PYTHONPATH=. python benchmarks/bench_winding_estimates.py [--files 200] [--points 1601] [--repeat 3]
"""

from __future__ import annotations

import argparse
import sys
import tempfile
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent))

from bench_extract import best_of, make_files  # noqa: E402


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--files", type=int, default=200)
    ap.add_argument("--points", type=int, default=1601)
    ap.add_argument("--repeat", type=int, default=3)
    a = ap.parse_args()
    from cmcheck.measurement.qa import Limits, evaluate_files
    from cmcheck.reporting.winding_report import winding_estimate

    with tempfile.TemporaryDirectory() as tmp:
        paths = make_files(Path(tmp), a.files, a.points)
        results = []

        def extract_all():
            results[:] = evaluate_files(paths, method="series", limits=Limits())

        t_ex = best_of(extract_all, a.repeat)
        t_est = best_of(lambda: [winding_estimate(r.extraction) for r in results], a.repeat)
    print(f"{a.files} files × {a.points} points: extraction {t_ex[0]:.3f} s wall, estimates {t_est[0]:.3f} s wall")
    print(f"estimates / extraction = {t_est[0] / t_ex[0]:.3f} wall, {t_est[1] / max(t_ex[1], 1e-9):.3f} CPU (goal < 0.20)")


if __name__ == "__main__":
    main()
