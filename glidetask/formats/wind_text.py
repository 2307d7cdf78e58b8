"""The day's wind in words and in JSON, one wording for the text plan, the briefing and
``glidetask check``: ``calm``, ``270/20 km/h``, or a profile level by level
(``250/10 km/h at 500 m, 270/25 km/h at 2500 m``), for a plan only through its working band."""

from __future__ import annotations

from glidetask.engine.scenario import Wind, WindProfile
from glidetask.units import KMH, UnitSystem


def _one(wind: Wind, units: UnitSystem, prefix: str) -> str:
    return f"{prefix}{wind.from_deg:03.0f}{' at ' if prefix else '/'}{units.fmt_speed(wind.speed_ms)}"


def wind_text(wind: Wind | WindProfile, units: UnitSystem, *, words: bool = False,
              band: tuple[float, float] | None = None) -> str:
    """``calm``, ``270/20 km/h`` (``words``: ``from 270 at 20 km/h``), or a profile level by
    level with its height.

    ``band`` (bottom, top) [m MSL]: of a profile only the levels within the working band,
    and the wind interpolated at its bottom and top where no level falls there (marked
    ``(band bottom)``, ``(band top)``), the heights a plan flies.
    """
    prefix = "from " if words else ""
    if not isinstance(wind, WindProfile):
        return "calm" if wind.speed_ms == 0.0 else _one(wind, units, prefix)
    levels = [(level.height_m, Wind(level.from_deg, level.speed_ms), "") for level in wind.levels]
    if band is not None:
        bottom, top = band
        levels = ([(bottom, wind.at(bottom), " (band bottom)")]
                  + [item for item in levels if bottom < item[0] < top]
                  + [(top, wind.at(top), " (band top)")])
    return ", ".join(f"{_one(level, units, prefix)} at {units.fmt_height(height)}{mark}"
                     for height, level, mark in levels)


def wind_json(wind: Wind | WindProfile, number=lambda value, scale=1.0: value / scale):
    """The wind as the task file writes it: ``{from_deg, speed_kmh}`` or a list of
    ``{height_m, from_deg, speed_kmh}`` (contract 2.3); ``number(value_si, per_unit)`` rounds."""
    if isinstance(wind, WindProfile):
        return [{"height_m": number(level.height_m, 1.0), "from_deg": number(level.from_deg, 1.0),
                 "speed_kmh": number(level.speed_ms, KMH)} for level in wind.levels]
    return {"from_deg": number(wind.from_deg, 1.0), "speed_kmh": number(wind.speed_ms, KMH)}
