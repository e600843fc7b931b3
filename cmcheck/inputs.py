"""Reading a file the user names: regular files only, never more than a cap.

Every reader of user files (Touchstone sweeps, the CSV tables) goes through :func:`read_capped`,
so that ``/dev/zero``, ``/dev/urandom``, a FIFO, a terminal or a folder is refused by name
instead of being read until memory runs out, and a huge regular file costs at most ``cap + 1``
bytes of reading. The file is opened without blocking (opening a FIFO that has no writer
would otherwise wait for ever), the OPEN descriptor is examined (so a symlink or a file
swapped between a check and the open cannot slip through), and the size limit is applied
while reading, not taken from a size the file reports beforehand (devices report 0 and a
growing file may lie).
"""

from __future__ import annotations

import os
import stat

from .errors import CmcheckError

__all__ = ["read_capped"]

_CHUNK = 1 << 20


def _kind(mode: int) -> str:
    if stat.S_ISDIR(mode):
        return "a folder"
    if stat.S_ISFIFO(mode):
        return "a FIFO (named pipe)"
    if stat.S_ISCHR(mode) or stat.S_ISBLK(mode):
        return "a device"
    if stat.S_ISSOCK(mode):
        return "a socket"
    return "not a regular file"


def read_capped(path: str | os.PathLike, where: str, error: type[CmcheckError], *, cap: int) -> bytes:
    """Return the bytes of the regular file ``path``, refusing anything else or anything larger than ``cap``.

    Parameters
    ----------
    path : str or path-like
        The file to read; symbolic links are followed and judged by what they point to.
    where : str
        How messages name the file (e.g. the path, or ``"material file x.csv"``).
    error : type of CmcheckError
        The exception raised, with a one-line message starting with ``where``.
    cap : int
        Largest accepted size [bytes]; at most ``cap + 1`` bytes are ever read.

    Returns
    -------
    bytes

    Raises
    ------
    error
        Missing file, no permission, a folder, FIFO, device or socket, larger than ``cap``,
        or a read error.
    """
    flags = os.O_RDONLY | getattr(os, "O_NONBLOCK", 0) | getattr(os, "O_NOCTTY", 0) | getattr(os, "O_BINARY", 0)
    try:
        fd = os.open(path, flags)
    except FileNotFoundError:
        raise error(f"{where}: not found") from None
    except IsADirectoryError:  # Windows cannot open a folder at all
        raise error(f"{where}: is a folder, expected a regular file") from None
    except OSError as exc:
        raise error(f"{where}: cannot be opened ({exc.strerror or exc.__class__.__name__})") from None
    try:
        mode = os.fstat(fd).st_mode
        if not stat.S_ISREG(mode):
            raise error(f"{where}: is {_kind(mode)}, expected a regular file")
        chunks = []
        got = 0
        while got <= cap:
            chunk = os.read(fd, min(_CHUNK, cap + 1 - got))
            if not chunk:
                break
            chunks.append(chunk)
            got += len(chunk)
        if got > cap:
            raise error(f"{where}: larger than {_size(cap)}, more than any file cmcheck reads; refused")
        return b"".join(chunks)
    except OSError as exc:
        raise error(f"{where}: cannot be read ({exc.strerror or exc.__class__.__name__})") from None
    finally:
        os.close(fd)


def _size(n: int) -> str:
    if n >= 1 << 20:
        return f"{n / (1 << 20):.0f} MiB"
    if n >= 1 << 10:
        return f"{n / (1 << 10):.0f} KiB"
    return f"{n} bytes"
