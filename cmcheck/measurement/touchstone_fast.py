"""A vectorised reader for the plain Touchstone version-1 files instruments write.

scikit-rf's parser (:class:`skrf.io.touchstone.Touchstone`) reads a file line by line in
Python; for batches of thousands of sweeps that loop is most of the cost of an extraction. This
module reads the common case — S-parameters, RI/MA/DB, Hz…GHz, 1 to 4 ports, one option line,
``!`` comments anywhere — on the bytes with numpy, and returns exactly what
:mod:`cmcheck.measurement.touchstone` gets from scikit-rf for the same file: the same
frequencies, S array and reference impedances, bit for bit: numpy's text readers
(``loadtxt``, ``fromstring``) convert decimals to the nearest double, as Python's ``float``
does for scikit-rf, and the format conversions are scikit-rf's expressions, in its order.
The decimal conversion itself (about a third of a microsecond a number) is now most of the
cost.

Anything else — version 2 keywords, noise data, other parameters than S, NaN or unusual
tokens, a second option line, a simulator's port comments, a line layout scikit-rf would read
differently, anything at all in doubt — returns ``None`` so that the caller uses scikit-rf,
which is the reference and explains errors.
"""

from __future__ import annotations

import io
import re
import warnings

import numpy as np

__all__ = ["parse_v1"]

# Frequency multipliers of scikit-rf (skrf.constants.FREQ_UNITS), exact powers of ten.
_UNITS = {"hz": 1.0, "khz": 1e3, "mhz": 1e6, "ghz": 1e9}
_DEFAULTS = ["ghz", "s", "ma", "r", "50"]  # scikit-rf fills a short option line with these

# Line breaks other than \n and \r\n: str.splitlines (the reference path's line checks) breaks
# at them, scikit-rf does not. A comment stops at them, so that they stay in the text examined.
_ODD_BREAKS = b"\v\f\x1c\x1d\x1e"
_ODD_TEXT = ("\x85", "\u2028", "\u2029")
# Simulator comments scikit-rf gives a meaning ("! gamma", "! port impedance", "! port[n]").
_SIMULATOR = re.compile(rb"!\s*(?:gamma|port)", re.IGNORECASE)
_COMMENT = re.compile(rb"![^\n\v\f\x1c-\x1e]*")
_OPTION_LINE = re.compile(rb"(?m)^#[^\n]*")
# Everything a data body may hold; other bytes (letters of nan/inf, brackets…) are left to scikit-rf.
_NUMERIC = b"0123456789.+-eE \t\r\n"


def parse_v1(data: bytes, rank: int):
    """Parse the bytes of a plain version-1 ``.s<rank>p`` file, or return None when unsure.

    Parameters
    ----------
    data : bytes
        The file's bytes, ASCII or UTF-8 (non-ASCII only in comments).
    rank : int
        Number of ports from the file name, 1 to 4.

    Returns
    -------
    tuple or None
        ``(f, s, z0)`` as scikit-rf gives them: frequencies [Hz] shape (F,), complex
        S-parameters shape (F, P, P), complex reference impedances [Ω] shape (F, P); or None.

    References
    ----------
    Touchstone File Format Specification, Version 2.1, IBIS Open Forum, 2009, section
    "Version 1.0 files": option line ``# <unit> <parameter> <format> R <n>``, comments from
    ``!`` to the end of the line, one frequency per data block, at most four complex pairs a
    line, each matrix row of a 3- or 4-port on a new line.
    """
    if b"\r" in data and data.count(b"\r") != data.count(b"\r\n"):
        return None  # bare carriage returns
    # The option line must start its line: scikit-rf before 2.0 reads an indented one as data.
    hash_at = data.find(b"#")
    line_start = data.rfind(b"\n", 0, hash_at) + 1
    commented = False  # whether the option line has a comment
    if hash_at < 0 or hash_at != line_start:
        # No option line, or a '#' in a comment first: remove every comment, then look again.
        if _SIMULATOR.search(data):
            return None
        m = _OPTION_LINE.search(data)
        commented = m is not None and b"!" in m.group()
        data = _COMMENT.sub(b"", data)
        hash_at = data.find(b"#")
        line_start = data.rfind(b"\n", 0, hash_at) + 1
        if hash_at >= 0 and hash_at != line_start:
            return None  # an indented option line, or '#' inside a data line
    if hash_at < 0:
        header, option, body = b"", b"#", data
    else:
        line_end = data.find(b"\n", hash_at)
        line_end = len(data) if line_end < 0 else line_end
        header, option, body = data[:line_start], data[hash_at:line_end], data[line_end:]
    # Before the option line only comments and blank lines.
    if b"!" in header:
        if _SIMULATOR.search(header):
            return None
        header = _COMMENT.sub(b"", header)
    if header.strip(b" \t\r\n") or any(c in option for c in _ODD_BREAKS):
        return None
    if b"!" in body:
        if _SIMULATOR.search(body):
            return None
        body = _COMMENT.sub(b"", body)
    if body.translate(None, _NUMERIC):
        return None  # letters (nan, inf), a second option line, keywords...
    option, bang, _ = option.partition(b"!")
    try:
        toks = option.decode("ascii").strip().lower()[1:].split()
    except UnicodeDecodeError:
        return None
    if (bang or commented) and len(toks) != 5:
        return None  # scikit-rf before 2.0 reads a comment's words as missing options
    opts = toks + _DEFAULTS[len(toks) :]
    unit, param, form = opts[0], opts[1], opts[2]
    if unit not in _UNITS or param != "s" or form not in ("ri", "ma", "db") or len(opts) != 5:
        return None
    try:
        resistance = complex(opts[4])
    except ValueError:
        return None

    per_point = 1 + 2 * rank * rank
    table = _read_one_point_a_line(body, per_point) if rank <= 2 else _read_wrapped(body, per_point)
    if table is None:
        return None
    f = table[:, 0].copy()
    if rank == 2 and np.any(f[1:] < f[:-1]):
        return None  # scikit-rf would take what follows for noise data
    with np.errstate(all="ignore"):  # as scikit-rf under our filter: overflow to inf is judged later
        s = _to_s(np.ascontiguousarray(table[:, 1:]), form, rank)
    return f * _UNITS[unit], s, _z0(resistance, f.size, rank)


def _read_one_point_a_line(body: bytes, per_point: int):
    """The numbers of a 1- or 2-port body as a table, or None unless every line holds one point."""
    with warnings.catch_warnings():
        warnings.simplefilter("error")  # "no data" is a warning
        try:
            # numpy's reader refuses a line whose count of numbers differs from the others.
            table = np.loadtxt(io.BytesIO(body), dtype=float, comments=None, ndmin=2)
        except (ValueError, UserWarning):
            return None
    return table if table.shape[1] == per_point else None


def _read_wrapped(body: bytes, per_point: int):
    """The numbers of a 3- or 4-port body as a table, or None when scikit-rf would split it otherwise."""
    counts = np.fromiter(map(len, map(bytes.split, body.split(b"\n"))), np.int64)
    counts = counts[counts > 0]
    if counts.size == 0:
        return None
    first = np.cumsum(counts) - counts  # index of each data line's first number
    n_numbers = int(first[-1] + counts[-1])
    # scikit-rf takes a line's first number as a frequency when the numbers read so far fill
    # whole points, which holds at a point's start and just after a lone frequency: every
    # point must start a line, and no line may start right after its frequency.
    starts = np.arange(0, n_numbers, per_point)
    if n_numbers % per_point or np.any(first % per_point == 1) or np.setdiff1d(starts, first).size:
        return None
    with warnings.catch_warnings():
        warnings.simplefilter("error")  # numpy warns (and stops) at text it cannot read
        try:
            values = np.fromstring(body, dtype=float, sep=" ")
        except (ValueError, DeprecationWarning):
            return None
    if values.size != n_numbers:
        return None  # a token such as "1-2" read as two numbers
    return values.reshape(-1, per_point)


def _to_s(raw: np.ndarray, form: str, rank: int) -> np.ndarray:
    # scikit-rf's own expressions (skrf.io.touchstone.Touchstone.load_file), in its order, so
    # that the results agree to the last bit.
    if form == "db":
        raw[:, 0::2] = 10 ** (raw[:, 0::2] / 20.0)
    if form in ("ma", "db"):
        s_flat = raw[:, 0::2] * np.exp(1j * raw[:, 1::2] * np.pi / 180)
    else:
        s_flat = raw.view(np.complex128)
    s = np.empty((raw.shape[0], rank * rank), dtype=complex)
    s[:] = s_flat
    if rank == 2:
        # Version-1 two-port order is S11 S21 S12 S22.
        return np.transpose(s.reshape((-1, 2, 2)), axes=(0, 2, 1))
    return s.reshape((-1, rank, rank))


def _z0(resistance: complex, n: int, rank: int) -> np.ndarray:
    return np.broadcast_to(resistance, (n, rank)).copy()
