"""The typer application and the one place where errors become messages and exit codes.

Exit status: 0 ran fine; 1 ran fine but a pass/fail limit failed (or no design met the
target); 2 bad input (``error: …`` on stderr, one line, no traceback).
"""

from __future__ import annotations

import sys
import warnings

import typer

from ..errors import CmcheckError, CmcheckWarning

app = typer.Typer(
    name="cmcheck",
    help=(
        "Predict, measure and size RF common-mode chokes and baluns on ferrite cores. "
        "Units: SI prefixes are accepted everywhere (7MHz, 35.6mm, 2.8pF, 1k, 18awg). "
        "Results are engineering estimates: check them by measurement."
    ),
    no_args_is_help=True,
    add_completion=False,
    pretty_exceptions_enable=False,
    rich_markup_mode=None,
)

EXIT_LIMIT_FAILED = 1
EXIT_BAD_INPUT = 2


def _show_warning(message, category, filename, lineno, file=None, line=None):
    if issubclass(category, CmcheckWarning):
        text = " ".join(str(message).split())
        print(f"warning: {text}", file=sys.stderr)
    else:  # pragma: no cover - library warnings from numpy etc. stay quiet unless asked
        pass


def main(argv: list[str] | None = None) -> int:
    """Run the command line; returns (and exits with) the status code."""
    warnings.showwarning = _show_warning
    warnings.simplefilter("always", CmcheckWarning)
    try:
        app(args=argv, prog_name="cmcheck", standalone_mode=True)
    except SystemExit as exc:
        code = exc.code if isinstance(exc.code, int) else (0 if exc.code is None else 1)
        if argv is not None:
            return code
        raise
    except CmcheckError as exc:
        print(f"error: {exc}", file=sys.stderr)
        if argv is not None:
            return EXIT_BAD_INPUT
        sys.exit(EXIT_BAD_INPUT)
    except OSError as exc:
        where = f"{exc.filename}: " if getattr(exc, "filename", None) else ""
        print(f"error: {where}{exc.strerror or exc}", file=sys.stderr)
        if argv is not None:
            return EXIT_BAD_INPUT
        sys.exit(EXIT_BAD_INPUT)
    return 0


# Register the commands (each module adds itself to ``app``).
from . import predict  # noqa: E402,F401
from . import extract  # noqa: E402,F401
from . import size  # noqa: E402,F401
