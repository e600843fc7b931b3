"""Project rules that a test can hold: no product designations, no copied real measurements.

The rules are the project's own (contributor guide; no published source).
"""

import hashlib
import re
import subprocess
import sys
from pathlib import Path

import pytest

from conftest import REAL_DIR

ROOT = Path(__file__).resolve().parents[1]
TOUCHSTONE = {".s1p", ".s2p", ".s3p", ".s4p", ".snp", ".ts"}
#: The only Touchstone files the repository may hold: the invented demo sweeps.
DEMO_DATA = ROOT / "cmcheck" / "demo" / "data"

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


def _digest(path: Path) -> str:
    # Line endings and trailing blanks normalised: a copy re-saved on another system is still a copy.
    text = b"\n".join(line.rstrip() for line in path.read_bytes().splitlines())
    return hashlib.sha256(text).hexdigest()


def test_real_measurements_not_copied():
    # Independent measurements are read from ../shared at test time, never kept in the repo
    # (compared by content, so a renamed copy is caught too).
    if not REAL_DIR.is_dir():
        pytest.skip(f"real measurements not present at {REAL_DIR}")
    real = {_digest(p): p for p in REAL_DIR.rglob("*") if p.is_file()}
    copied = [f"{p.relative_to(ROOT)} = {real[_digest(p)]}" for p in _tracked_files() if p.is_file() and _digest(p) in real]
    assert not copied, copied


def test_only_the_invented_demo_sweeps_are_tracked_touchstone_files():
    tracked = [p for p in _tracked_files() if p.suffix.lower() in TOUCHSTONE]
    assert all(p.parent == DEMO_DATA for p in tracked), [str(p.relative_to(ROOT)) for p in tracked if p.parent != DEMO_DATA]
    for p in tracked:
        assert p.read_text(encoding="ascii").startswith("! INVENTED demo data"), p.name


def test_demo_sweeps_are_what_the_example_script_makes(tmp_path):
    # The shipped files are reproducible from the stated invented parameters and seed.
    sys.path.insert(0, str(ROOT / "examples"))
    try:
        import make_demo_data
    finally:
        sys.path.remove(str(ROOT / "examples"))
    made = {p.name: p.read_bytes() for p in make_demo_data.make(tmp_path)}
    shipped = {p.name: p.read_bytes() for p in DEMO_DATA.iterdir() if p.suffix in (".s1p", ".s2p")}
    assert made == shipped
