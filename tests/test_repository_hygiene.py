"""Project rules that a test can hold: no product designations, no copied real measurements.

The rules are the project's own (contributor guide; no published source).
"""

import re
import subprocess
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[1]

# Shapes of maker part numbers and mix designations (letters-size-mix codes, the word "mix"
# or "type" followed by a number); generic descriptions such as "NiZn, µi ≈ 800" are what we use.
PATTERNS = re.compile(
    r"\b(FT|BN|T)-?[0-9]{2,3}-[0-9]{1,2}[A-Z]?\b|\bmix(es)? ?#?[0-9]{1,2}\b|\btype ?#?[0-9]{2} (material|ferrite)\b",
    re.IGNORECASE,
)


def _tracked_files():
    try:
        out = subprocess.run(["git", "ls-files"], cwd=ROOT, capture_output=True, text=True, check=True).stdout
    except (OSError, subprocess.CalledProcessError):
        pytest.skip("not a git checkout")
    return [ROOT / p for p in out.splitlines() if p]


def test_no_product_designations():
    # Project rule (DEVELOPERS.md, originality): generic material classes only.
    hits = []
    for p in _tracked_files():
        if p.suffix in {".png", ".s1p", ".s2p", ".s3p", ".s4p"} or not p.is_file():
            continue
        for n, line in enumerate(p.read_text(encoding="utf-8", errors="ignore").splitlines(), 1):
            if PATTERNS.search(line) and "PATTERNS" not in line and "re.compile" not in line:
                hits.append(f"{p.relative_to(ROOT)}:{n}")
    assert not hits, hits


def test_real_measurements_not_copied():
    # Independent measurements are read from ../shared at test time, never kept in the repo.
    assert not [p for p in _tracked_files() if p.suffix.lower() in {".s1p", ".s2p", ".s3p", ".s4p"}]
