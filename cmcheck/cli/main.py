"""Running the command line: the one place where errors become messages and exit codes.

Exit status: 0 ran fine; 1 ran fine but a pass/fail limit failed (or no design met the
target); 2 bad input (``error: …`` on stderr, one line, no traceback).
"""

from __future__ import annotations

import os
import sys
import warnings

from ..errors import CmcheckError, CmcheckWarning
from . import demo, extract, identify, predict, size, transformer  # noqa: F401  (each command registers itself on ``app``)
from .app import EXIT_BAD_INPUT, app
from .flags import option_message

__all__ = ["main"]


def _show_warning(message, category, filename, lineno, file=None, line=None):
    if issubclass(category, CmcheckWarning):
        text = option_message(" ".join(str(message).split()), getattr(message, "parameter", None))
        print(f"warning: {text}", file=sys.stderr)
    else:  # pragma: no cover - library warnings from numpy etc. stay quiet unless asked
        pass


def main(argv: list[str] | None = None) -> int:
    """Run the command line; returns the exit status (and exits with it when ``argv`` is None)."""
    warnings.showwarning = _show_warning
    warnings.simplefilter("always", CmcheckWarning)
    code = _run(argv)
    if argv is None:
        sys.exit(code)
    return code


def _error(message: str) -> int:
    print(f"error: {' '.join(str(message).split())}", file=sys.stderr)
    return EXIT_BAD_INPUT


def _run(argv: list[str] | None) -> int:
    # standalone_mode=False: click hands usage errors to us, so every bad input reads the same.
    try:
        rv = app(args=argv, prog_name="cmcheck", standalone_mode=False)
        return rv if isinstance(rv, int) else 0
    except CmcheckError as exc:
        # The library names parameters; say which option the user gave instead.
        return _error(option_message(str(exc), getattr(exc, "parameter", None)))
    except BrokenPipeError:
        # The reader went away (e.g. `| head`); files were written before the tables.
        try:
            sys.stdout = open(os.devnull, "w")
        except OSError:  # pragma: no cover
            pass
        return 128 + 13  # the shell's status for a process ended by SIGPIPE
    except OSError as exc:
        where = f"{exc.filename}: " if getattr(exc, "filename", None) else ""
        return _error(f"{where}{exc.strerror or exc}")
    except KeyboardInterrupt:
        print("error: interrupted", file=sys.stderr)
        return 130
    except SystemExit as exc:
        # The option parser ends the process itself when the reader of a pipe goes away.
        if type(sys.stdout).__name__ == "PacifyFlushWrapper":
            return 128 + 13
        return exc.code if isinstance(exc.code, int) else (0 if exc.code is None else EXIT_BAD_INPUT)
    except Exception as exc:
        # Usage errors from the option parser (click's, or the copy newer typer vendors):
        # recognised by their interface rather than a class that moves between versions.
        name = type(exc).__name__
        if name == "NoArgsIsHelpError":
            print(exc.format_message())
            return 0
        if name == "Abort":
            print("error: interrupted", file=sys.stderr)
            return 130
        if hasattr(exc, "format_message") and hasattr(exc, "exit_code"):
            ctx = getattr(exc, "ctx", None)
            where = f"{ctx.command_path}: " if ctx is not None else ""
            return _error(f"{where}{exc.format_message()} (see --help)")
        raise
