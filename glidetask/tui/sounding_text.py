"""A day derived from a sounding, drawn in character cells for the Day view: the sounding
(temperature, dew point, the surface parcel's dry adiabat) and the working band through the
day, from :func:`glidetask.engine.sounding.sounding_drawing` (SI arrays), in the units on
screen. Plain Python and numpy (no Textual), so tests draw it directly.

Glyphs (our own): ``●`` temperature, ``○`` dew point, ``╱`` the surface parcel's adiabat
(at the warmest hour), ``▲`` thermal top, ``☁`` cloud base, ``━`` band top and bottom.
"""

from __future__ import annotations

import math

import numpy as np
from rich.text import Text

from glidetask.units import UnitSystem, format_clock

SOUNDING = {"parcel": ("╱", "#e0b15a"), "dewpoint": ("○", "#5ac8e0"), "temperature": ("●", "bold #e06c5a")}
DAY = {"band": ("━", "#8cc66d"), "cloud": ("☁", "#d0d0d0"), "top": ("▲", "#e0b15a")}


def _grid(rows: int, columns: int) -> list[list[str]]:
    return [[""] * columns for _ in range(rows)]


def _row(value: float, low: float, high: float, rows: int) -> int:
    return int(np.clip(round((1.0 - (value - low) / (high - low)) * (rows - 1)), 0, rows - 1))


def _column(value: float, low: float, high: float, columns: int) -> int:
    return int(np.clip(round((value - low) / (high - low) * (columns - 1)), 0, columns - 1))


def _render(grid, styles, labels: dict[int, str], label_width: int) -> Text:
    text = Text(no_wrap=True, overflow="crop")
    for index, row in enumerate(grid):
        text.append(f"{labels.get(index, ''):>{label_width}}", style="dim")
        text.append("┤" if index in labels else "│", style="dim")
        for layer in row:
            glyph, style = styles[layer] if layer else (" ", "")
            text.append(glyph, style=style)
        text.append("\n")
    return text


def sounding_text(drawing, units: UnitSystem, width: int, rows: int) -> Text:
    """Height against temperature: the sounding and the surface parcel's adiabat."""
    top = float(np.nanmax(drawing.parcel_height_m)) if drawing.parcel_height_m.size else float(drawing.height_m[-1])
    high = max(top * 1.25, float(drawing.height_m[0]) + 500.0)
    low = float(drawing.height_m[0])
    keep = drawing.height_m <= high
    temperatures = np.concatenate([drawing.temperature_k[keep], drawing.dewpoint_k[keep], drawing.parcel_temperature_k])
    t_low, t_high = float(np.nanmin(temperatures)) - 1.0, float(np.nanmax(temperatures)) + 1.0
    label_width = max(len(units.fmt_height(high)), len(units.fmt_height(low)))
    columns = max(width - label_width - 1, 10)
    grid = _grid(rows, columns)

    def curve(heights, kelvins, layer):
        z = np.linspace(low, min(high, float(np.nanmax(heights))), rows * 3)
        t = np.interp(z, heights, kelvins)
        for zi, ti in zip(z, t):
            grid[_row(zi, low, high, rows)][_column(ti, t_low, t_high, columns)] = layer

    curve(drawing.parcel_height_m, drawing.parcel_temperature_k, "parcel")
    curve(drawing.height_m, drawing.dewpoint_k, "dewpoint")
    curve(drawing.height_m, drawing.temperature_k, "temperature")
    labels = {0: units.fmt_height(high), rows - 1: units.fmt_height(low)}
    text = _render(grid, SOUNDING, labels, label_width)
    left, right = f"{t_low - 273.15:.0f} °C", f"{t_high - 273.15:.0f} °C"
    text.append(" " * (label_width + 1) + left + " " * max(columns - len(left) - len(right), 1) + right + "\n",
                style="dim")
    for layer, name in (("temperature", "temperature"), ("dewpoint", "dew point"),
                        ("parcel", f"rising {format_clock(drawing.parcel_time_s)}")):
        glyph, style = SOUNDING[layer]
        text.append(glyph, style=style)
        text.append(f" {name} ", style="dim")
    return text


def band_text(drawing, units: UnitSystem, width: int, rows: int) -> Text:
    """Height against the hour: thermal top, cloud base and the working band."""
    times = np.asarray(drawing.times_s, dtype=float)
    values = np.concatenate([drawing.thermal_top_m, drawing.cloud_base_m, drawing.band_top_m, drawing.band_bottom_m])
    values = values[np.isfinite(values)]
    if times.size < 2 or not values.size:
        return Text("no working band on this day: the surface forecast never triggers useful thermals", style="dim")
    low, high = min(float(values.min()), float(drawing.height_m[0])), float(values.max()) * 1.05
    label_width = max(len(units.fmt_height(high)), len(units.fmt_height(low)))
    columns = max(width - label_width - 1, 10)
    grid = _grid(rows, columns)
    for column in range(columns):
        at = times[0] + (times[-1] - times[0]) * column / max(columns - 1, 1)
        for series, layer in ((drawing.band_bottom_m, "band"), (drawing.band_top_m, "band"),
                              (drawing.cloud_base_m, "cloud"), (drawing.thermal_top_m, "top")):
            series = np.asarray(series, dtype=float)
            ok = np.isfinite(series)
            if ok.sum() < 1 or at < times[ok][0] or at > times[ok][-1]:
                continue
            value = float(np.interp(at, times[ok], series[ok]))
            if math.isfinite(value):
                grid[_row(value, low, high, rows)][column] = layer
    labels = {0: units.fmt_height(high), rows - 1: units.fmt_height(low)}
    text = _render(grid, DAY, labels, label_width)
    left, right = format_clock(times[0]), format_clock(times[-1])
    text.append(" " * (label_width + 1) + left + " " * max(columns - len(left) - len(right), 1) + right + "\n",
                style="dim")
    for layer, name in (("band", "band"), ("cloud", "cloud base"), ("top", "thermal top")):
        glyph, style = DAY[layer]
        text.append(glyph, style=style)
        text.append(f" {name} ", style="dim")
    return text


def source_line(source) -> str:
    """Which sounding the day comes from and which keys were typed over it."""
    from pathlib import Path

    typed = ", ".join(source.overridden) if source.overridden else "none"
    derived = ", ".join(source.derived_keys) if source.derived_keys else "none (no working band: the typed day is used)"
    return f"From {Path(source.sounding_file).name}. Derived: {derived}. Typed over it: {typed}."
