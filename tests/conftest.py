"""Shared fixtures. Real measurements are read from ../shared/real-measurements (never copied
into the repository); tests using them skip when that folder is absent."""

from __future__ import annotations

import os
from pathlib import Path

import pytest

REAL_DIR = Path(os.environ.get("CMCHECK_REAL_MEASUREMENTS", Path(__file__).resolve().parents[2] / "shared" / "real-measurements"))


@pytest.fixture
def real_dir() -> Path:
    """The folder of independent real VNA measurements; skips the test when absent."""
    if not REAL_DIR.is_dir():
        pytest.skip(f"real measurements not present at {REAL_DIR}")
    return REAL_DIR


@pytest.fixture
def run_cli(capsys):
    """Run ``cmcheck`` in-process; returns (exit status, stdout, stderr)."""
    from cmcheck.cli import main

    def run(*args: str):
        code = main([str(a) for a in args])
        out = capsys.readouterr()
        return code, out.out, out.err

    return run
