"""Exception types of cmcheck.

Every error a user can cause carries a one-line message that names the file or parameter
and the problem. An error about one parameter also carries its name in ``parameter``, so
that the command line can say which option it was: it turns errors into ``error: …`` on
stderr and exit status 2 in one place (:mod:`cmcheck.cli.main`), rewording parameters as
options with one table (:mod:`cmcheck.cli.flags`). Library callers catch
:class:`CmcheckError`.
"""

from __future__ import annotations

__all__ = [
    "CmcheckError",
    "UnitError",
    "DimensionError",
    "MaterialError",
    "WindingError",
    "TouchstoneError",
    "MeasurementError",
    "DesignError",
    "IdentificationError",
]


class CmcheckError(Exception):
    """Base of every error cmcheck raises on purpose; the message is one line.

    Parameters
    ----------
    message : str
        Names the parameter (or file) and the problem, with values and units.
    parameter : str, optional
        The library parameter the error is about (``max_cores``), when it is about one;
        the message then names it as written here.
    """

    def __init__(self, message: str, *, parameter: str | None = None) -> None:
        # One line, always: the CLI prints it after "error: ".
        super().__init__(" ".join(str(message).split()))
        self.parameter = parameter


class UnitError(CmcheckError, ValueError):
    """A quantity, unit or band could not be parsed or is out of range."""


class DimensionError(CmcheckError, ValueError):
    """Core or conductor dimensions are impossible (negative, ID ≥ OD, ...)."""


class MaterialError(CmcheckError, ValueError):
    """A material is unknown, its file is unreadable, or it is asked outside its data."""


class WindingError(CmcheckError, ValueError):
    """A winding is impossible: no turns, or the conductor does not fit the core."""


class TouchstoneError(CmcheckError, ValueError):
    """A Touchstone file is unreadable or unusable for the requested method."""


class MeasurementError(CmcheckError, ValueError):
    """Measured data cannot give the requested result (no valid point, bad fixture...)."""


class DesignError(CmcheckError, ValueError):
    """A sizing or comparison request is impossible (empty band, target ≤ 0, ...)."""


class IdentificationError(CmcheckError, ValueError):
    """A measured winding cannot be identified as asked (no resonance, too few trusted points, ...)."""


class CmcheckWarning(UserWarning):
    """Doubtful but usable input or result; the CLI prints it as one ``warning: …`` line.

    Like :class:`CmcheckError`, a warning about one parameter may name it in ``parameter``
    (warn with an instance: ``warnings.warn(CmcheckWarning(msg, parameter="cp"))``).
    """

    def __init__(self, message: str = "", *, parameter: str | None = None) -> None:
        super().__init__(message)
        self.parameter = parameter


__all__.append("CmcheckWarning")


class TransformerError(CmcheckError, ValueError):
    """A transformer, its lines, circuit or topology file is impossible or inconsistent."""


__all__.append("TransformerError")
