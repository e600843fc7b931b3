"""Exception types of cmcheck.

Every error a user can cause carries a one-line message that names the file or option
and the problem. The command line turns them into ``error: …`` on stderr and exit
status 2 in one place (:mod:`cmcheck.cli.app`); library callers catch
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
    """Base of every error cmcheck raises on purpose; the message is one line."""

    def __init__(self, message: str) -> None:
        # One line, always: the CLI prints it after "error: ".
        super().__init__(" ".join(str(message).split()))


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
    """Doubtful but usable input or result; the CLI prints it as one ``warning: …`` line."""


__all__.append("CmcheckWarning")


class TransformerError(CmcheckError, ValueError):
    """A transformer, its lines, circuit or topology file is impossible or inconsistent."""


__all__.append("TransformerError")
