"""Numbers as the UI shows them: through :mod:`glidetask.units`, a dash where undefined.

Table cells carry the bare number (the unit sits in the column header); the number is the
one :class:`glidetask.units.UnitSystem` formats, so the UI, the CLI and the briefing round alike.
"""

from __future__ import annotations

import math
import re

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


_QUANTITY = re.compile(r"(?<![\w.])(-?\d+(?:\.\d+)?) (km/h|m/s|km|m)(?![\w/])")


def in_units(text: str, units: UnitSystem) -> str:
    """Engine wording with metric figures (``"(250 m radius)"``) in the units on screen.

    The engine words some notes in metric; until it hands over facts to be worded
    (glidetask.cautions), the UI converts the figures it finds, so a panel never mixes units.
    """
    if units.name == "metric":
        return text

    def convert(match: re.Match) -> str:
        value, unit = float(match.group(1)), match.group(2)
        si = value * {"km/h": units_module.KMH, "m/s": 1.0, "km": 1000.0, "m": 1.0}[unit]
        return {"km/h": units.fmt_speed, "m/s": units.fmt_vertical, "km": units.fmt_distance,
                "m": units.fmt_height}[unit](si)

    return _QUANTITY.sub(convert, text)


def zone_text(zone, units: UnitSystem) -> str:
    """A zone in words: ``line 10.0 km``, ``sector 10.0 km 90°``, ``area 20.0 km 045-135°``."""
    kind = zone.kind
    if kind == "line":
        return f"line {units.fmt_distance(zone.length_m)}"
    if kind == "cylinder":
        return f"cylinder {units.fmt_distance(zone.radius_m)}"
    if kind == "sector":
        return f"sector {units.fmt_distance(zone.radius_m)} {zone.angle_deg:g}°"
    if kind == "keyhole":
        return (f"keyhole {units.fmt_distance(zone.radius_m)} {zone.angle_deg:g}° "
                f"+ {units.fmt_distance(zone.cylinder_radius_m)}")
    if kind == "area_cylinder":
        return f"area circle {units.fmt_distance(zone.radius_m)}"
    if kind == "area_sector":
        inner = f"{units.distance(zone.inner_radius_m):g}-" if zone.inner_radius_m else ""
        return (f"area sector {inner}{units.fmt_distance(zone.radius_m)} "
                f"{degrees(zone.radial_from_deg)}-{degrees(zone.radial_to_deg)}°")
    return kind
