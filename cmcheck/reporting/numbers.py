"""The one number formatter for people: a format chosen once per column from all its values.

Every console table and HTML table formats its numbers here (through
:mod:`cmcheck.reporting.text`), so one column never mixes ``1e+04``, ``11,180`` and ``1000``,
and the same quantity reads the same in every command. Rules (the project's own; common
practice, no published source):

- A column whose magnitudes stay within 0.01 … 10⁶ and within four decades of each other is
  written in grouped digits (``11,180``, ``0.52``) with one number of decimals for the whole
  column: enough for four significant figures of its largest value and three of its smaller
  ones.
- Otherwise (very large, very small or widely spread values) every value is written in
  engineering notation with an SI prefix and four significant figures (``1.523 M``, ``470.0 m``);
  the unit stays in the column header.
- Frequencies carry their unit and prefix (``7.15 MHz``) with the fewest significant figures
  (at least the column's own) that keep every distinct frequency of the column distinct.
- Never ``-0.0``: a value that rounds to zero is written without a sign.

Files are not formatted here: CSV keeps each column's machine format (9 significant digits for
curves) and JSON keeps full double precision.
"""

from __future__ import annotations

import math
import re
from typing import Callable, Sequence

from ..units import format_quantity

__all__ = ["column_formatter", "format_frequency", "format_number", "frequency_formatter", "unsigned_zero"]

_PREFIXES = {-12: "p", -9: "n", -6: "µ", -3: "m", 0: "", 3: "k", 6: "M", 9: "G", 12: "T"}
_ZERO = re.compile(r"^([-+−]?)0(?:[.,]0*)?(\s.*)?$")


def unsigned_zero(text: str) -> str:
    """``-0.0`` → ``0.0`` (and ``+0.0`` stays ``+0.0`` for signed columns): a rounded zero has no sign."""
    t = text.strip()
    m = _ZERO.match(t)
    if m and m.group(1) in ("-", "−"):
        return text.replace(m.group(1), "", 1)
    return text


def _finite(values: Sequence) -> list[float]:
    out = []
    for v in values:
        if isinstance(v, bool) or v is None or isinstance(v, str):
            continue
        try:
            f = float(v)
        except (TypeError, ValueError):
            continue
        if math.isfinite(f):
            out.append(f)
    return out


def _decimals(magnitude: float, significant: int) -> int:
    return max(0, significant - 1 - math.floor(math.log10(magnitude)))


def _engineering(v: float, significant: int = 4) -> str:
    if v == 0:
        return "0"
    exp = int(math.floor(math.log10(abs(v)) / 3) * 3)
    exp = max(-12, min(12, exp))
    # Round first: 999.97 k must read 1.000 M, not 1000.0 k.
    mantissa = float(f"{v / 10 ** exp:.{significant}g}")
    if abs(mantissa) >= 1000 and exp < 12:
        exp += 3
        mantissa = float(f"{v / 10 ** exp:.{significant}g}")
    decimals = max(0, significant - 1 - math.floor(math.log10(abs(mantissa))))
    prefix = _PREFIXES[exp]
    return unsigned_zero(f"{mantissa:.{decimals}f}" + (f" {prefix}" if prefix else ""))


def column_formatter(values: Sequence) -> Callable[[float], str]:
    """The formatter of a numeric column, chosen from all its ``values`` (None/NaN/words ignored)."""
    finite = _finite(values)
    if finite and all(isinstance(v, int) or (hasattr(v, "is_integer") and type(v).__name__.startswith("int"))
                      for v in values if v is not None and not isinstance(v, (str, bool))):
        return lambda v: f"{int(v):,}"
    mags = sorted(abs(v) for v in finite if v != 0)
    if not mags:
        return lambda v: unsigned_zero(f"{v:.0f}")
    top = mags[-1]
    # A few stray near-zero values (a reactance crossing zero) must not turn the whole column
    # into prefixes: judge the spread from the tenth-smallest fraction of the magnitudes.
    low = mags[len(mags) // 10]
    if top >= 1e6 or top < 1e-2 or top / low > 1e4:
        return _engineering
    decimals = min(6, max(_decimals(top, 4), _decimals(max(low, top * 1e-3), 3)))
    return lambda v: unsigned_zero(f"{v:,.{decimals}f}")


def format_number(value: float) -> str:
    """One number in running text, by the same rule as a column of one value (``1,722``, ``1.523 M``)."""
    if value is None or not math.isfinite(value):
        return "–"
    return column_formatter([value])(value)


def frequency_formatter(values: Sequence, least: int = 4) -> Callable[[float], str]:
    """Frequencies with their prefix and unit, with enough digits to keep distinct values apart."""
    distinct = sorted(set(_finite(values)))
    digits = least
    while digits < 9:
        shown = [format_quantity(v, "Hz", digits) for v in distinct]
        if len(set(shown)) == len(shown):
            break
        digits += 1
    return lambda v: format_quantity(v, "Hz", digits)


def format_frequency(value: float, digits: int = 4) -> str:
    """One frequency in running text (``7.15 MHz``)."""
    return format_quantity(value, "Hz", digits)
