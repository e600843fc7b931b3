"""A batch summary written row by row: ``PATH.partial`` while the batch runs, ``PATH`` at the end.

Every other output is written atomically (:mod:`cmcheck.reporting.files`); a batch summary of
thousands of files is the one exception, so that the rows of finished files are on disk as the
batch goes and none is lost when it is interrupted: :meth:`SummaryStream.close` renames the
partial file to its final name, also after an interruption.
"""

from __future__ import annotations

import csv
import os
from pathlib import Path

from ..errors import CmcheckError
from .extraction_report import _summary_table
from .files import table_rows
from .results import Table

__all__ = ["SummaryStream", "summary_row_table"]


def summary_row_table(result) -> Table:
    """The summary CSV's row of one :class:`~cmcheck.measurement.qa.FileResult` (same columns as
    the batch report's ``summary`` table)."""
    return _summary_table([result])


class SummaryStream:
    """CSV rows appended and flushed one table at a time to ``path + ".partial"``.

    Parameters
    ----------
    path : path-like
        The final file; it is untouched until :meth:`close`.
    """

    def __init__(self, path: str | os.PathLike) -> None:
        self.path = Path(path)
        self.partial = self.path.with_name(self.path.name + ".partial")
        if not self.path.parent.is_dir():
            raise CmcheckError(f"{path}: folder {self.path.parent} does not exist")
        try:
            self._fh = open(self.partial, "w", encoding="utf-8", newline="")
        except OSError as exc:
            raise CmcheckError(f"{path}: cannot write here ({exc.strerror or exc})") from None
        self._writer = csv.writer(self._fh, lineterminator="\n")
        self._header = False
        self.rows = 0

    def write(self, table: Table) -> None:
        """Append ``table``'s rows (the header once, from the first table)."""
        header, rows = table_rows(table)
        if not self._header:
            self._writer.writerow(header)
            self._header = True
        self._writer.writerows(rows)
        self._fh.flush()
        self.rows += len(rows)

    def close(self) -> None:
        """Finish: the partial file becomes ``path``."""
        if self._fh.closed:
            return
        self._fh.close()
        os.replace(self.partial, self.path)

    def discard(self) -> None:
        """Give up without a summary (nothing was evaluated): remove the partial file."""
        if not self._fh.closed:
            self._fh.close()
        self.partial.unlink(missing_ok=True)
