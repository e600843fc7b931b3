"""Safe reading of Touchstone files from a network analyser, and validation of what they hold.

The file is read through :func:`cmcheck.inputs.read_capped` (regular files only, at most
:data:`MAX_FILE_BYTES`), as bytes. Plain version-1 files (S-parameters, RI/MA/DB, one point a
line for 1 and 2 ports, the specification's row wrapping for 3 and 4) are parsed by the
vectorised reader :mod:`cmcheck.measurement.touchstone_fast`, which returns bit for bit what
scikit-rf returns for them; everything else, and anything that reader is unsure of, is handed
to scikit-rf's Touchstone parser as a string, so a crafted file can never be unpickled
(``skrf.Network(path)`` tries ``pickle.load`` first; the :class:`skrf.io.touchstone.Touchstone`
class only parses text, and we never give it a path). scikit-rf accepts several kinds of
damaged input without a word — a truncated last line, a line missing numbers, NaN, a 1-port
body in a ``.s2p``, frequencies that go backwards (which in a 2-port file it silently turns
into "noise data") — so on that path the line structure is checked before parsing and the
numbers after it. Every problem is a one-line :class:`~cmcheck.errors.TouchstoneError` that
names the file; doubtful but usable data gives a :class:`~cmcheck.errors.CmcheckWarning`.
"""

from __future__ import annotations

import io
import os
import warnings
from dataclasses import dataclass
from pathlib import Path

import numpy as np

from ..errors import CmcheckWarning, TouchstoneError
from ..inputs import read_capped
from .touchstone_fast import _ODD_TEXT, parse_v1

__all__ = ["SParameters", "read_touchstone", "parse_touchstone_text", "MAX_FILE_BYTES"]

#: Larger files are refused (at most this many bytes plus one are read): a 30 000-point 4-port
#: sweep is about 20 MB.
MAX_FILE_BYTES = 256 * 1024 * 1024

_EXTENSIONS = {".s1p": 1, ".s2p": 2, ".s3p": 3, ".s4p": 4}


@dataclass(frozen=True, eq=False)
class SParameters:
    """Validated S-parameters of one file: strictly increasing, finite, 1 to 4 ports.

    Attributes
    ----------
    source : str
        The file name as the user gave it, used in every message.
    frequency_hz : numpy.ndarray
        Strictly increasing frequencies [Hz], shape (F,).
    s : numpy.ndarray
        Complex S-parameters [dimensionless], shape (F, P, P); ``s[:, 1, 0]`` is S21.
    z0 : float
        Reference impedance of every port [Ω].
    dropped_overlap : int
        Points removed because the sweep went back over frequencies already measured.
    dropped_nonfinite : int
        Points removed because a frequency or S-parameter was NaN or infinite.
    """

    source: str
    frequency_hz: np.ndarray
    s: np.ndarray
    z0: float
    dropped_overlap: int = 0
    dropped_nonfinite: int = 0

    def __post_init__(self) -> None:
        for arr in (self.frequency_hz, self.s):
            arr.setflags(write=False)

    @property
    def n_ports(self) -> int:
        """Number of ports P."""
        return int(self.s.shape[1])

    def param(self, i: int, j: int) -> np.ndarray:
        """S_ij with 1-based port numbers, e.g. ``param(2, 1)`` is S21 [dimensionless]."""
        return self.s[:, i - 1, j - 1]

    def is_placeholder(self, i: int, j: int) -> bool:
        """True when S_ij is exactly zero at every point (a column the instrument did not measure)."""
        return bool(np.all(self.param(i, j) == 0))


def read_touchstone(path: str | os.PathLike, *, z0: float | None = None) -> SParameters:
    """Read and validate a Touchstone 1- to 4-port file without ever unpickling it.

    Parameters
    ----------
    path : str or path-like
        A ``.s1p`` … ``.s4p`` (version 1) or ``.ts`` (version 2) file.
    z0 : float, optional
        Reference impedance [Ω] to use instead of the file's (e.g. when the instrument wrote
        the wrong one). Without it the file's must be real, positive and equal on all ports.

    Returns
    -------
    SParameters

    Raises
    ------
    TouchstoneError
        Missing, not a regular file (folder, FIFO, device), larger than
        :data:`MAX_FILE_BYTES`, unreadable, binary (e.g. a pickle), empty, truncated or
        malformed file, no finite point, fewer than two points, frequencies out of order.

    Warns
    -----
    CmcheckWarning
        NaN/inf points were excluded, or overlapping sweep segments were trimmed.

    References
    ----------
    Touchstone File Format Specification, Version 2.1, IBIS Open Forum, 2009 (the version 1
    layout is its Section "Version 1.0 files"): option line ``# <unit> <parameter> <format>
    R <n>``, one frequency per data block, at most four complex pairs per line and each matrix
    row on a new line for three or more ports.
    """
    name = str(path)
    data = read_capped(path, name, TouchstoneError, cap=MAX_FILE_BYTES)
    return parse_touchstone_bytes(data, name, z0=z0)


def parse_touchstone_bytes(data: bytes, name: str, *, z0: float | None = None) -> SParameters:
    """Validate and parse the bytes of a Touchstone file named ``name`` (see :func:`read_touchstone`)."""
    if not data or data.isspace():
        raise TouchstoneError(f"{name}: empty file")
    if data[:1] == b"\x80":
        # Protocol 2+ pickles start with the PROTO opcode; say so, and never load it.
        raise TouchstoneError(f"{name}: binary data that looks like a Python pickle, not a Touchstone text file; refused")
    if b"\x00" in data:
        raise TouchstoneError(f"{name}: binary data, not a Touchstone text file")
    rank = _EXTENSIONS.get(Path(name).suffix.lower())
    if rank is not None and data.isascii():
        parsed = parse_v1(data, rank)
        if parsed is not None:
            return _finish(parsed, name, z0)
    try:
        text = data.decode("utf-8-sig")
    except UnicodeDecodeError:
        # Old instruments write Latin-1 comments (e.g. a degree sign); the numbers are ASCII.
        text = data.decode("latin-1")
    return parse_touchstone_text(text, name, z0=z0)


def parse_touchstone_text(text: str, name: str, *, z0: float | None = None) -> SParameters:
    """Validate and parse Touchstone text; ``name`` gives the extension and names the file in messages.

    Plain version-1 files take the vectorised reader (:mod:`.touchstone_fast`), which returns
    what scikit-rf returns for them; everything else, and every file that reader is unsure
    of, goes through the line-by-line checks and scikit-rf's parser.
    """
    ext = Path(name).suffix.lower()
    plain = ext in _EXTENSIONS and not any(c in text for c in _ODD_TEXT)
    parsed = parse_v1(text.encode("utf-8"), _EXTENSIONS[ext]) if plain else None
    if parsed is None:
        parsed = _parse_reference(text, name)
    return _finish(parsed, name, z0)


def _parse_reference(text: str, name: str):
    """Parse with scikit-rf after checking the line structure it does not (the reference path)."""
    ext = Path(name).suffix.lower()
    lines = text.splitlines()
    layout = _scan(lines, name, ext)
    return _parse_with_skrf(lines, layout, name, ext)


def _finish(parsed, name: str, z0: float | None) -> SParameters:
    f, s, file_z0 = parsed
    z0_used = _reference_impedance(file_z0, name) if z0 is None else _check_z0(z0, name)
    f, s, n_nonfinite, n_overlap = _clean_sweep(f, s, name)
    return SParameters(name, f, s, z0_used, n_overlap, n_nonfinite)


@dataclass
class _Layout:
    version2: bool
    rank: int | None
    header_end: int  # index of the first data line
    data_lines: list[int]  # indices of network-data lines (noise lines excluded)


def _scan(lines: list[str], name: str, ext: str) -> _Layout:
    """Check the data-line structure scikit-rf does not: numbers per line and line count."""
    if ext in _EXTENSIONS:
        rank = _EXTENSIONS[ext]
    elif ext == ".ts":
        rank = None
    elif len(ext) >= 4 and ext[1] == "s" and ext[-1] == "p" and ext[2:-1].isdigit():
        raise TouchstoneError(f"{name}: {ext[2:-1]}-port files are not supported (1 to 4 ports)")
    else:
        raise TouchstoneError(f"{name}: not a Touchstone file name; expected .s1p, .s2p, .s3p, .s4p or .ts")

    version2 = False
    idx: list[int] = []
    counts: list[int] = []
    for i, raw in enumerate(lines):
        line = raw.lstrip()
        if not line:
            continue
        c = line[0]
        if c == "!" or c == "#":
            continue
        if c == "[":
            version2 = True
            continue
        n = len(line.partition("!")[0].split())
        if n:
            idx.append(i)
            counts.append(n)
    if not idx:
        raise TouchstoneError(f"{name}: no data points (only a header or comments)")
    if version2:
        if rank is None:
            rank = _v2_ports(lines, name)
        return _Layout(True, rank, idx[0], idx)
    if rank is None:
        raise TouchstoneError(f"{name}: a .ts file must be Touchstone version 2 ([Version] 2.0)")

    per_point = 1 + 2 * rank * rank
    cnt = np.asarray(counts)
    if rank <= 2:
        bad = cnt != per_point
        if rank == 2:
            # Version-1 two-port files may end with a noise-parameter block of 5 numbers a line.
            noise = cnt == 5
            if noise.any():
                first = int(np.argmax(noise))
                if first > 0 and noise[first:].all():
                    bad = bad[:first]
                    idx, cnt = idx[:first], cnt[:first]
        if bad.any():
            k = int(np.argmax(bad))
            _check_numbers(lines[idx[k]], idx[k], name)
            if bad.all() and np.all(cnt == cnt[0]):
                other = {3: 1, 9: 2}.get(int(cnt[0]))
                hint = f" (a {other}-port sweep saved as {ext}?)" if other else ""
                raise TouchstoneError(
                    f"{name}: data lines hold {cnt[0]} numbers but a {rank}-port file needs {per_point}{hint}"
                )
            if cnt[k] > per_point:
                where = "too many numbers"
            else:
                where = "last line truncated" if k == len(cnt) - 1 else "damaged or truncated line"
            raise TouchstoneError(
                f"{name}: line {idx[k] + 1} holds {cnt[k]} numbers, expected {per_point} ({where})"
            )
    else:
        # Three and four ports wrap each matrix row; only the total is certain.
        total = int(cnt.sum())
        if total % per_point:
            raise TouchstoneError(
                f"{name}: {total} numbers do not make whole {rank}-port points of {per_point} "
                f"(truncated or damaged near line {idx[-1] + 1})"
            )
    return _Layout(False, rank, idx[0], list(idx))


def _check_numbers(line: str, i: int, name: str) -> None:
    """Name the first token that is not a number: garbage deserves a clearer word than a count."""
    for tok in line.partition("!")[0].split():
        try:
            float(tok)
        except ValueError:
            shown = tok if len(tok) <= 20 else tok[:20] + "…"
            raise TouchstoneError(f"{name}: line {i + 1}: {shown!r} is not a number (not a Touchstone file?)") from None


def _v2_ports(lines: list[str], name: str) -> int:
    for raw in lines:
        low = raw.strip().lower()
        if low.startswith("[number of ports]"):
            try:
                n = int(low.split()[3])
            except (IndexError, ValueError):
                break
            if 1 <= n <= 4:
                return n
            raise TouchstoneError(f"{name}: {n}-port files are not supported (1 to 4 ports)")
    raise TouchstoneError(f"{name}: version 2 file without a readable [Number of Ports]")


def _skrf_parse(text: str, name: str):
    from skrf.io.touchstone import Touchstone  # heavy import kept off the CLI start-up path

    fid = io.StringIO(text)
    fid.name = name  # the parser reads the port count from the extension
    try:
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")
            return Touchstone(fid)
    except Exception as exc:  # noqa: BLE001 - any parser failure on untrusted text is the file's fault
        raise _explain(text, name, exc) from None


def _explain(text: str, name: str, exc: Exception) -> TouchstoneError:
    """Turn a parser exception into a message that points at the offending line."""
    for i, raw in enumerate(text.splitlines()):
        line = raw.strip()
        if not line or line[0] == "!":
            continue
        if line[0] == "#":
            toks = line[1:].partition("!")[0].lower().split()
            if toks[:1] and toks[0] not in ("hz", "khz", "mhz", "ghz"):
                return TouchstoneError(f"{name}: line {i + 1}: option line has an unknown frequency unit {toks[0]!r}")
            if len(toks) > 2 and toks[2] not in ("ri", "ma", "db"):
                return TouchstoneError(f"{name}: line {i + 1}: option line has an unknown data format {toks[2]!r}")
            if len(toks) > 1 and toks[1] not in ("s", "y", "z", "g", "h"):
                return TouchstoneError(f"{name}: line {i + 1}: option line has an unknown parameter {toks[1]!r}")
            continue
        if line[0] == "[":
            continue
        try:
            _check_numbers(line, i, name)
        except TouchstoneError as err:
            return err
    detail = " ".join(str(exc).split())[:120] or type(exc).__name__
    return TouchstoneError(f"{name}: not a readable Touchstone file ({detail})")


def _parse_with_skrf(lines: list[str], layout: _Layout, name: str, ext: str):
    text = "\n".join(lines)
    ts = _skrf_parse(text, name)
    rank = int(ts.rank) if ts.rank else layout.rank
    if layout.rank is not None and rank != layout.rank:
        raise TouchstoneError(f"{name}: header says {rank} ports but the name says {layout.rank}")
    f = np.asarray(ts.f, dtype=float)
    s = np.asarray(ts.s, dtype=complex)
    z0 = np.asarray(ts.z0)
    if layout.version2:
        expected = ts.frequency_nb
        if expected is not None and int(expected) != f.size:
            raise TouchstoneError(f"{name}: [Number of Frequencies] is {expected} but {f.size} points were read")
        return f, s, z0
    if rank <= 2 and f.size < len(layout.data_lines):
        # scikit-rf turns everything after a backwards frequency step of a version-1 2-port file
        # into noise data; those are more sweep points when they have the network layout.
        noise = getattr(ts, "noise", None)
        if noise is None or np.ndim(noise) != 2 or noise.shape[1] != 1 + 2 * rank * rank:
            raise TouchstoneError(f"{name}: {len(layout.data_lines)} data lines but {f.size} points were read")
        header = lines[: layout.header_end]
        rest = [lines[i] for i in layout.data_lines[f.size :]]
        sub = _Layout(False, rank, len(header), list(range(len(header), len(header) + len(rest))))
        f2, s2, z02 = _parse_with_skrf(header + rest, sub, name, ext)
        return np.concatenate([f, f2]), np.concatenate([s, s2]), np.concatenate([z0, z02])
    if rank <= 2 and f.size != len(layout.data_lines):
        raise TouchstoneError(f"{name}: {len(layout.data_lines)} data lines but {f.size} points were read")
    return f, s, z0


def _check_z0(z0: float, name: str) -> float:
    if not (np.isfinite(z0) and z0 > 0):
        raise TouchstoneError(f"{name}: reference impedance {z0!r} Ω must be positive")
    return float(z0)


def _reference_impedance(z0: np.ndarray, name: str) -> float:
    z = np.asarray(z0, dtype=complex).reshape(-1)
    if z.size == 0:
        return 50.0
    if np.all(z == z[0]):
        z = z[:1]  # one value per point and port, usually all the same: judge it once
    if np.any(z.imag != 0) or np.any(~np.isfinite(z)) or np.any(z.real <= 0):
        raise TouchstoneError(f"{name}: reference impedance must be real and positive; give z0 to override", parameter="z0")
    if np.ptp(z.real) > 1e-9 * z.real[0]:
        raise TouchstoneError(f"{name}: ports have different reference impedances; give z0 if they are all equal", parameter="z0")
    return float(z.real[0])


def _clean_sweep(f: np.ndarray, s: np.ndarray, name: str):
    """Drop non-finite points and overlapping segments; refuse what is not a sweep."""
    n_read = f.size
    finite = np.isfinite(f) & np.isfinite(s.reshape(n_read, -1)).all(axis=1) & (f > 0)
    n_bad = int(n_read - finite.sum())
    if n_bad == n_read:
        raise TouchstoneError(f"{name}: no finite data point (all {n_read} are NaN, infinite or at f ≤ 0)")
    if n_bad:
        warnings.warn(
            f"{name}: {n_bad} of {n_read} points have NaN/infinite values or f ≤ 0 and were excluded",
            CmcheckWarning,
            stacklevel=3,
        )
        f, s = f[finite], s[finite]
    # Keep a point only if it lies above every frequency before it: an instrument that
    # sweeps in segments repeats the end of one at the start of the next.
    prev_max = np.maximum.accumulate(np.concatenate(([-np.inf], f[:-1])))
    keep = f > prev_max
    n_drop = int(f.size - keep.sum())
    if n_drop:
        steps = int(np.count_nonzero(np.diff(f) <= 0))
        if n_drop * 2 > f.size:
            raise TouchstoneError(
                f"{name}: frequencies are out of order ({n_drop} of {f.size} points lie below an earlier one); "
                "not a sweep"
            )
        warnings.warn(
            f"{name}: frequency goes back {steps} time{'s' if steps != 1 else ''} (overlapping sweep "
            f"segments); dropped {n_drop} repeated point{'s' if n_drop != 1 else ''}, keeping a strictly "
            "increasing sweep",
            CmcheckWarning,
            stacklevel=3,
        )
        f, s = f[keep], s[keep]
    if f.size < 2:
        raise TouchstoneError(f"{name}: only {f.size} usable point; at least 2 are needed")
    return np.ascontiguousarray(f), np.ascontiguousarray(s), n_bad, n_drop
