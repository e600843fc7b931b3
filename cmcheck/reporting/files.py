"""Writing results: JSON, CSV and Touchstone files, each written whole or not at all (plots: :mod:`.plots`).

Every writer renders into a temporary file beside the target and renames it into place,
so an error never leaves a half-written output, and a target that is also one of the inputs
is refused before anything is written.
"""

from __future__ import annotations

import csv
import io
import json
import math
import os
import tempfile
from contextlib import contextmanager
from contextvars import ContextVar
from pathlib import Path
from typing import Callable, Iterable, Sequence

import numpy as np

from ..curve import ImpedanceCurve
from ..errors import CmcheckError
from .results import Cell, Table

__all__ = [
    "SAFETY_NOTES",
    "atomic_write",
    "staged_outputs",
    "check_outputs",
    "table_rows",
    "write_table_csv",
    "to_jsonable",
    "write_csv",
    "write_json",
    "write_touchstone",
]

SAFETY_NOTES = (
    "Estimates only: verify by measurement before relying on a choke or balun.",
    "At legal power the RF voltage across a high-impedance feed point or choke reaches "
    "kilovolts (V = sqrt(P*R)): keep hands and insulation clear when transmitting.",
    "Ferrite heats with loss, can crack, and loses permeability near its Curie temperature; "
    "check the core temperature after a long transmission.",
    "RF exposure limits, station grounding and lightning protection follow local regulations "
    "and codes; defer to them and to licensed practice.",
)


def check_outputs(outputs: Iterable[str | os.PathLike | None], inputs: Iterable[str | os.PathLike]) -> None:
    """Refuse outputs that would overwrite an input, or that repeat each other."""
    ins = {Path(p).resolve() for p in inputs if p is not None}
    seen: set[Path] = set()
    for out in outputs:
        if out is None:
            continue
        p = Path(out).resolve()
        if p in ins:
            raise CmcheckError(f"{out}: output would overwrite an input file; choose another name")
        if p in seen:
            raise CmcheckError(f"{out}: the same file is given for two outputs")
        if p.is_dir():
            raise CmcheckError(f"{out}: is a directory, expected a file name")
        if not p.parent.is_dir():
            raise CmcheckError(f"{out}: folder {p.parent} does not exist")
        seen.add(p)


_staged: ContextVar[list | None] = ContextVar("cmcheck_staged_outputs", default=None)


@contextmanager
def staged_outputs():
    """Write several outputs all together or not at all.

    Inside the block, :func:`atomic_write` renders each output into a temporary file beside
    its target; only when the block ends without an error are they all moved into place.
    On an error every temporary file is removed and no target is touched.
    """
    pending: list[tuple[Path, Path]] = []
    token = _staged.set(pending)
    try:
        yield
    except BaseException:
        for tmp, _ in pending:
            tmp.unlink(missing_ok=True)
        raise
    finally:
        _staged.reset(token)
    for tmp, target in pending:
        os.replace(tmp, target)


def atomic_write(path: str | os.PathLike, render: Callable[[Path], None]) -> None:
    """Call ``render(tmp_path)`` and move the result to ``path`` only if it succeeded.

    Inside :func:`staged_outputs` the move waits until every output has rendered.
    """
    target = Path(path)
    if not target.parent.is_dir():
        raise CmcheckError(f"{path}: folder {target.parent} does not exist")
    try:
        fd, tmp = tempfile.mkstemp(prefix=f".{target.name}.", suffix=target.suffix, dir=target.parent)
    except OSError as exc:
        raise CmcheckError(f"{path}: cannot write here ({exc.strerror or exc})") from None
    os.close(fd)
    tmp_path = Path(tmp)
    pending = _staged.get()
    try:
        try:
            render(tmp_path)
        except OSError as exc:
            raise CmcheckError(f"{path}: cannot be written ({exc.strerror or exc})") from None
        # mkstemp creates 0600; give the file the permissions a plain open() would.
        umask = os.umask(0)
        os.umask(umask)
        os.chmod(tmp_path, 0o666 & ~umask)
        if pending is not None:
            pending.append((tmp_path, target))
            return
        os.replace(tmp_path, target)
    finally:
        if (pending is None or not pending or pending[-1][0] != tmp_path) and tmp_path.exists():
            tmp_path.unlink()


def to_jsonable(obj):
    """numpy arrays and scalars to lists and floats; NaN/inf to None (JSON has neither)."""
    if isinstance(obj, dict):
        return {str(k): to_jsonable(v) for k, v in obj.items()}
    if isinstance(obj, (list, tuple)):
        return [to_jsonable(v) for v in obj]
    if isinstance(obj, np.ndarray):
        return to_jsonable(obj.tolist())
    if isinstance(obj, (np.bool_,)):
        return bool(obj)
    if isinstance(obj, (np.integer,)):
        return int(obj)
    if isinstance(obj, (float, np.floating)):
        v = float(obj) + 0.0  # + 0.0 turns −0.0 into 0.0
        return v if math.isfinite(v) else None
    if isinstance(obj, complex):
        return {"re": to_jsonable(obj.real), "im": to_jsonable(obj.imag)}
    return obj


def write_json(path, data: dict) -> None:
    """Write ``data`` as indented JSON, atomically."""
    text = json.dumps(to_jsonable(data), indent=2, ensure_ascii=False, allow_nan=False)
    atomic_write(path, lambda p: p.write_text(text + "\n", encoding="utf-8"))


def write_csv(path, header: Sequence[str], rows: Iterable[Sequence], comments: Sequence[str] = ()) -> None:
    """Write a CSV file (``#`` comment lines first), atomically."""
    buf = io.StringIO()
    for c in comments:
        buf.write(f"# {c}\n")
    w = csv.writer(buf, lineterminator="\n")
    w.writerow(header)
    w.writerows(rows)
    text = buf.getvalue()
    atomic_write(path, lambda p: p.write_text(text, encoding="utf-8"))


def _csv_cell(value, fmt: str):
    if isinstance(value, Cell):
        value = value.value
    if value is None:
        return ""
    if fmt == "text":
        return value
    if fmt == "int":
        return int(value)
    return format(value, fmt)


def table_rows(table: Table) -> tuple[list[str], list[list]]:
    """CSV header (column keys) and rows of a report table, each number in its column's ``csv_format``."""
    fmts = [c.csv_format for c in table.columns]
    return list(table.keys), [[_csv_cell(v, f) for v, f in zip(row, fmts)] for row in table.rows]


def write_table_csv(path, table: Table) -> None:
    """Write a report table as CSV (its comments, then column keys as header), atomically."""
    write_csv(path, *table_rows(table), comments=table.comments)


def write_touchstone(path, curve: ImpedanceCurve, z0: float = 50.0, comments: Sequence[str] = ()) -> None:
    """Write the curve as a series two-port Touchstone ``.s2p`` file with scikit-rf."""
    if Path(path).suffix.lower() != ".s2p":
        raise CmcheckError(f"{path}: a series two-port is written as a .s2p file")
    ntwk = curve.to_network(z0=z0)
    if comments:
        # Touchstone files are ASCII; keep comments readable by every instrument's parser.
        text = "\n".join(comments)
        for a, b in (("×", "x"), ("µ", "u"), ("Ω", "ohm"), ("–", "-"), ("Σ", "sum ")):
            text = text.replace(a, b)
        ntwk.comments = text.encode("ascii", "replace").decode("ascii")

    def render(tmp: Path) -> None:
        # scikit-rf appends the extension to the name it is given: write into a folder.
        with tempfile.TemporaryDirectory(dir=tmp.parent) as d:
            out = ntwk.write_touchstone(filename="out", dir=d, form="ri", return_string=False)
            produced = Path(d) / "out.s2p"
            os.replace(produced if produced.exists() else Path(out), tmp)

    atomic_write(path, render)
