"""Hostile paths given as user files: devices, FIFOs, folders, links, huge files.

common practice, no published source: a reader of user-named files must not read an endless
stream (``/dev/zero``), block on a FIFO without a writer, or trust a size reported before
reading; each is refused with one line naming the file and what it is.
"""

from __future__ import annotations

import os
import signal
import subprocess
import sys
from pathlib import Path

import pytest

from cmcheck import tables
from cmcheck.errors import MaterialError, TouchstoneError
from cmcheck.measurement import touchstone
from cmcheck.measurement.touchstone import read_touchstone

posix_only = pytest.mark.skipif(not hasattr(os, "mkfifo") or not Path("/dev/zero").exists(), reason="needs POSIX devices")


def _read_ts(path):
    return read_touchstone(path)


def _read_table(path):
    return tables.read_table(path, f"material file {path}", MaterialError)


READERS = {"touchstone": (_read_ts, TouchstoneError, "{p}"), "table": (_read_table, MaterialError, "material file {p}")}


@pytest.fixture
def alarm():
    """Fail instead of hanging for ever if opening a FIFO blocks."""

    def on_alarm(*_):
        raise TimeoutError("reading blocked")

    old = signal.signal(signal.SIGALRM, on_alarm)
    signal.alarm(10)
    yield
    signal.alarm(0)
    signal.signal(signal.SIGALRM, old)


def _hostile(kind: str, tmp_path: Path) -> tuple[Path, str]:
    if kind == "zero":
        return Path("/dev/zero"), "is a device, expected a regular file"
    if kind == "urandom":
        return Path("/dev/urandom"), "is a device, expected a regular file"
    if kind == "fifo":
        p = tmp_path / "pipe.s2p"
        os.mkfifo(p)
        return p, "is a FIFO (named pipe), expected a regular file"
    if kind == "folder":
        p = tmp_path / "folder.s2p"
        p.mkdir()
        return p, "is a folder, expected a regular file"
    if kind == "link":
        p = tmp_path / "link.s2p"
        p.symlink_to("/dev/zero")
        return p, "is a device, expected a regular file"
    raise AssertionError(kind)


@posix_only
@pytest.mark.parametrize("reader", sorted(READERS))
@pytest.mark.parametrize("kind", ["zero", "urandom", "fifo", "folder", "link"])
def test_non_regular_files_are_refused_by_name(tmp_path, alarm, reader, kind):
    read, error, where = READERS[reader]
    path, what = _hostile(kind, tmp_path)
    with pytest.raises(error) as info:
        read(path)
    msg = str(info.value)
    assert msg == f"{where.format(p=path)}: {what}"


@pytest.mark.parametrize("reader", sorted(READERS))
def test_oversized_regular_file_reads_at_most_the_cap_plus_one(tmp_path, monkeypatch, reader):
    read, error, where = READERS[reader]
    cap = 1000
    monkeypatch.setattr(touchstone, "MAX_FILE_BYTES", cap)
    monkeypatch.setattr(tables, "MAX_TABLE_BYTES", cap)
    p = tmp_path / "big.s1p"
    p.write_bytes(b"! padding\n" * 10_000)
    got = []
    real_read = os.read

    def counting_read(fd, n):
        chunk = real_read(fd, n)
        got.append(len(chunk))
        return chunk

    monkeypatch.setattr(os, "read", counting_read)
    with pytest.raises(error) as info:
        read(p)
    assert str(info.value) == f"{where.format(p=p)}: larger than 1000 bytes, more than any file cmcheck reads; refused"
    assert sum(got) == cap + 1


@pytest.mark.parametrize("reader", sorted(READERS))
def test_file_of_exactly_the_cap_is_read(tmp_path, monkeypatch, reader):
    read, error, where = READERS[reader]
    body = b"frequency_hz,mu_prime,mu_double_prime\n1e6,100,1\n" if reader == "table" else b"# Hz S RI R 50\n1 0.1 0\n2 0.1 0\n"
    monkeypatch.setattr(touchstone, "MAX_FILE_BYTES", len(body))
    monkeypatch.setattr(tables, "MAX_TABLE_BYTES", len(body))
    p = tmp_path / ("ok.csv" if reader == "table" else "ok.s1p")
    p.write_bytes(body)
    read(p)  # no error at exactly the cap


@pytest.mark.parametrize("reader", sorted(READERS))
def test_missing_file(tmp_path, reader):
    read, error, where = READERS[reader]
    p = tmp_path / "absent.s1p"
    with pytest.raises(error, match=r"^" + __import__("re").escape(where.format(p=p)) + ": not found$"):
        read(p)


@posix_only
@pytest.mark.parametrize("args", [["extract", "/dev/zero"], ["predict", "-m", "/dev/zero", "--turns", "5", "--od", "25mm", "--id", "15mm", "--height", "10mm"]])
def test_cli_refuses_dev_zero_in_one_line(args):
    # Acceptance of the "hostile input" issue: exit 2, one line on stderr, no traceback.
    proc = subprocess.run([sys.executable, "-m", "cmcheck", *args], capture_output=True, text=True, timeout=120)
    assert proc.returncode == 2
    lines = proc.stderr.strip().splitlines()
    assert len(lines) == 1 and "Traceback" not in proc.stderr
    assert "/dev/zero: is a device, expected a regular file" in lines[0]
