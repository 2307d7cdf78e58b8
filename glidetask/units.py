"""The unit systems shown to people (shared/CONTRACT.md section 6).

The engine works in SI. Conversion happens here, at the edges only: the command
line's text output and the terminal UI format through a :class:`UnitSystem`.
"""

from __future__ import annotations

from dataclasses import dataclass

KMH = 1000.0 / 3600.0  # m/s per km/h
KNOT = 1852.0 / 3600.0  # m/s per knot (0.514444...)
NAUTICAL_MILE = 1852.0  # m
FOOT = 0.3048  # m


@dataclass(frozen=True)
class UnitSystem:
    """Names and factors for one way of showing numbers.

    Every factor is "SI units per shown unit", so ``shown = si / factor``.
    """

    name: str
    distance_label: str
    distance_m: float
    height_label: str
    height_m: float
    speed_label: str
    speed_ms: float
    vertical_label: str
    vertical_ms: float
    distance_decimals: int = 1
    vertical_decimals: int = 1

    def distance(self, metres: float) -> float:
        return metres / self.distance_m

    def height(self, metres: float) -> float:
        return metres / self.height_m

    def speed(self, metres_per_second: float) -> float:
        return metres_per_second / self.speed_ms

    def vertical(self, metres_per_second: float) -> float:
        return metres_per_second / self.vertical_ms

    def fmt_distance(self, metres: float) -> str:
        return f"{self.distance(metres):.{self.distance_decimals}f} {self.distance_label}"

    def fmt_height(self, metres: float) -> str:
        return f"{self.height(metres):.0f} {self.height_label}"

    def fmt_speed(self, metres_per_second: float) -> str:
        return f"{self.speed(metres_per_second):.0f} {self.speed_label}"

    def fmt_vertical(self, metres_per_second: float) -> str:
        return f"{self.vertical(metres_per_second):.{self.vertical_decimals}f} {self.vertical_label}"


METRIC = UnitSystem("metric", "km", 1000.0, "m", 1.0, "km/h", KMH, "m/s", 1.0)
AVIATION = UnitSystem("aviation", "NM", NAUTICAL_MILE, "ft", FOOT, "kt", KNOT, "kt", KNOT)

SYSTEMS = {"metric": METRIC, "aviation": AVIATION}


def by_name(name: str) -> UnitSystem:
    """The unit system called ``name`` ("metric" or "aviation")."""
    try:
        return SYSTEMS[name]
    except KeyError:
        raise ValueError(f"unknown unit system {name!r}; choose metric or aviation") from None


def format_duration(seconds: float) -> str:
    """``H:MM`` for a duration in seconds (rounded to the minute)."""
    minutes = int(round(seconds / 60.0))
    return f"{minutes // 60}:{minutes % 60:02d}"


def format_clock(seconds_after_midnight: float) -> str:
    """``HH:MM`` for a local clock time given in seconds after midnight."""
    minutes = int(round(seconds_after_midnight / 60.0))
    return f"{(minutes // 60) % 24:02d}:{minutes % 60:02d}"


def parse_clock(text: str) -> float:
    """Seconds after midnight for ``"HH:MM"``; ValueError if malformed."""
    parts = text.strip().split(":")
    if len(parts) != 2 or not all(p.isdigit() for p in parts):
        raise ValueError(f"expected a time as HH:MM, got {text!r}")
    hours, minutes = int(parts[0]), int(parts[1])
    if not (0 <= hours <= 23 and 0 <= minutes <= 59):
        raise ValueError(f"expected a time as HH:MM, got {text!r}")
    return hours * 3600.0 + minutes * 60.0
