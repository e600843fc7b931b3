"""The typer application object and the exit statuses; commands register themselves on it.

Exit status: 0 ran fine; 1 ran fine but a pass/fail limit failed (or no design met the
target); 2 bad input (``error: …`` on stderr, one line, no traceback). The one place where
errors become messages is :mod:`cmcheck.cli.main`.
"""

from __future__ import annotations

import typer

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


def _print_version(value: bool) -> None:
    if value:
        from .. import __version__

        print(f"cmcheck {__version__}")
        raise typer.Exit(0)


@app.callback()
def _root(
    version: bool = typer.Option(False, "--version", help="Print the version and exit.", is_eager=True,
                                 callback=_print_version),
) -> None:
    """Predict, measure and size RF common-mode chokes and baluns on ferrite cores."""

