"""Numbers as the UI shows them: through :mod:`glidetask.units`, a dash where undefined.

Table cells carry the bare number (the unit sits in the column header); the number is the
one :class:`glidetask.units.UnitSystem` formats, so the UI, the CLI and the briefing round alike.
"""

from __future__ import annotations

import math

from glidetask import units as units_module
from glidetask.units import UnitSystem

DASH = "–"


def _defined(value) -> bool:
    try:
        return value is not None and math.isfinite(float(value))
    except (TypeError, ValueError):
        return False


def _bare(text: str) -> str:
    return text.rsplit(" ", 1)[0]


def distance(units: UnitSystem, metres) -> str:
    return _bare(units.fmt_distance(float(metres))) if _defined(metres) else DASH


def height(units: UnitSystem, metres) -> str:
    return _bare(units.fmt_height(float(metres))) if _defined(metres) else DASH


def speed(units: UnitSystem, metres_per_second) -> str:
    return _bare(units.fmt_speed(float(metres_per_second))) if _defined(metres_per_second) else DASH


def ground_speed(units: UnitSystem, metres_per_second) -> str:
    """A ground speed; none at all (never a negative figure) when the wind stops all headway."""
    if _defined(metres_per_second) and float(metres_per_second) <= 0.0:
        return "none"
    return speed(units, metres_per_second)


def vertical(units: UnitSystem, metres_per_second) -> str:
    return _bare(units.fmt_vertical(float(metres_per_second))) if _defined(metres_per_second) else DASH


def count(n: int, noun: str) -> str:
    """``1 ballast``, ``19 ballasts``."""
    return f"{n} {noun}" if n == 1 else f"{n} {noun}s"


def with_unit(text: str, label: str) -> str:
    return text if text == DASH else f"{text} {label}"


def degrees(value) -> str:
    """A course or heading as three digits (``005``), 360 shown as 000."""
    return f"{int(round(float(value))) % 360:03d}" if _defined(value) else DASH


def ratio(value, decimals: int = 0) -> str:
    """A glide ratio such as ``42``."""
    return f"{float(value):.{decimals}f}" if _defined(value) else DASH


def duration(seconds) -> str:
    return units_module.format_duration(float(seconds)) if _defined(seconds) else DASH


def clock(seconds_after_midnight) -> str:
    return units_module.format_clock(float(seconds_after_midnight)) if _defined(seconds_after_midnight) else DASH


def kilograms(value) -> str:
    return f"{float(value):.0f}" if _defined(value) else DASH


def number(value, decimals: int = 1) -> str:
    """A plain number for an input field (no trailing zeros beyond ``decimals``)."""
    if not _defined(value):
        return ""
    text = f"{float(value):.{decimals}f}"
    return text.rstrip("0").rstrip(".") if "." in text else text
