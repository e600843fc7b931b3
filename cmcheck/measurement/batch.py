"""Batches of thousands of files: results one at a time, optionally from several processes.

:func:`iter_results` yields each file's :class:`~cmcheck.measurement.qa.FileResult` in the order
given, as soon as it (and every file before it) is finished, so a caller can write it out and
let it go: memory then does not grow with the number of files. :func:`slim` keeps a result's
summary and drops its per-point arrays for callers that only need the summary.

With ``jobs`` > 1 the files are evaluated in a standard-library process pool; a worker's
warnings come back with its result and are raised again in the caller, in file order.
"""

from __future__ import annotations

import os
import warnings
from concurrent.futures import ProcessPoolExecutor
from dataclasses import replace
from functools import partial
from typing import Iterator, Sequence

import numpy as np

from ..curve import ImpedanceCurve
from ..errors import CmcheckWarning, MeasurementError
from .qa import FileResult, evaluate_files

__all__ = ["iter_results", "slim"]


def _one(path, kwargs: dict) -> tuple[FileResult, list[tuple[str, object]]]:
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always", CmcheckWarning)
        r = evaluate_files([path], **kwargs)[0]
    kept = [(str(w.message), getattr(w.message, "parameter", None)) for w in caught
            if issubclass(w.category, CmcheckWarning)]
    return r, kept


def iter_results(paths: Sequence[str | os.PathLike], *, jobs: int = 1,
                 legs: tuple | None = None, **kwargs) -> Iterator[FileResult]:
    """Evaluate ``paths`` one by one (or ``jobs`` at a time) and yield each result in order.

    Parameters
    ----------
    paths : sequence of path-like
        Touchstone files, one unit each.
    jobs : int
        Worker processes; 1 evaluates in this process.
    legs : (path, path), optional
        Two leg sweeps of one balun, yielded last (see :func:`cmcheck.measurement.qa.evaluate_files`).
    **kwargs
        ``method``, ``z0``, ``accuracy``, ``fixture``, ``balanced_ports``, ``limits`` as for
        :func:`~cmcheck.measurement.qa.evaluate_files`.

    Yields
    ------
    FileResult
    """
    if isinstance(jobs, bool) or not isinstance(jobs, (int, np.integer)) or jobs < 1:
        raise MeasurementError(f"jobs must be a whole number ≥ 1, got {jobs!r}", parameter="jobs")
    if jobs == 1 or len(paths) < 2:
        for p in paths:
            yield evaluate_files([p], **kwargs)[0]
    else:
        with ProcessPoolExecutor(max_workers=int(jobs)) as pool:
            # map keeps the order; a chunk per task amortises the hand-over of small files.
            chunk = max(1, min(32, len(paths) // (4 * int(jobs))))
            for r, caught in pool.map(partial(_one, kwargs=kwargs), paths, chunksize=chunk):
                for message, parameter in caught:
                    warnings.warn(CmcheckWarning(message, parameter=parameter), stacklevel=2)
                yield r
    if legs is not None:
        yield evaluate_files([], legs=legs, **kwargs)[0]


def slim(r: FileResult) -> FileResult:
    """``r`` with its per-point arrays cut to the first point: method, kind and summary stay.

    For batch callers that keep every result for a closing table but not its curves.
    """
    ex = r.extraction
    if ex is None:
        return r
    keep = np.zeros(ex.frequency_hz.shape, bool)
    keep[:1] = True
    curve = None
    if ex.curve is not None:
        c = ex.curve
        curve = ImpedanceCurve(c.frequency_hz[keep], c.z[keep], c.valid[keep], label=c.label)
    balance = ex.balance.subset(keep[: ex.balance.frequency_hz.size]) if ex.balance is not None else None
    small = replace(ex, frequency_hz=ex.frequency_hz[keep], validity=ex.validity.subset(keep), curve=curve,
                    balance=balance)
    return replace(r, extraction=small)
