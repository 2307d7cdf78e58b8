"""The planned height profile of a whole flight as text art (text plan and briefing).

Height against distance along the task, in the reader's units: ``#`` terrain, ``.`` the
working band's top and bottom, ``=`` a floor raised by the ground, ``~`` the band top capped
under airspace, ``*`` glides, ``|`` climbs, ``o`` the final glide, ``X`` the least clearance
over the terrain, ``?`` a column without terrain data. Legible in monospace when printed.
"""

from __future__ import annotations

import numpy as np

LEGEND = ("# terrain   . band top and bottom   = floor raised by the ground   ~ top capped by airspace\n"
          "* glide   | climb   o final glide   X least clearance   ? no terrain data")


def profile_ascii(plan, units, width: int = 72, height: int = 14) -> str:
    """The plan's profile (:attr:`glidetask.engine.plan.Plan.profile`) as text; "" without one."""
    p = plan.profile
    if p is None or p.distance_m.size < 2:
        return ""
    total = max(float(p.distance_m[-1]), float(plan.path.total_m), 1.0)
    edges = np.linspace(0.0, total, width + 1)
    middle = 0.5 * (edges[:-1] + edges[1:])
    known = np.isfinite(p.terrain_m)
    ground = np.interp(middle, p.distance_m, np.where(known, p.terrain_m, np.nan)) if known.any() else None
    canvas = _Canvas(width, height, *_height_range(plan, known))
    _draw_band_and_ground(canvas, plan, ground)
    if plan.airspace is not None:
        for cap in plan.airspace.caps:
            for col in np.flatnonzero((middle >= cap.from_m) & (middle <= cap.to_m)):
                canvas.put(int(col), cap.top_m, "~")
    _draw_flight(canvas, p, edges, middle)
    least = p.least_clearance
    if least is not None:
        col = int(np.clip(least[1] / total * width, 0, width - 1))
        canvas.put(col, float(np.interp(least[1], p.distance_m, p.height_m)), "X")
    lines = _framed(canvas, units, total) + LEGEND.splitlines()
    if least is not None:
        lines.append(f"Least clearance over the terrain: {units.fmt_height(least[0])} at "
                     f"{units.fmt_distance(least[1])}.")
    for floor in plan.floors:
        lines.append(f"Floor raised to {units.fmt_height(floor.floor_m)} from {units.fmt_distance(floor.from_m)} "
                     f"to {units.fmt_distance(floor.to_m)}.")
    return "\n".join(lines)


class _Canvas:
    """A picture of ``height`` rows (row 0 at the bottom) by ``width`` columns, heights
    ``low`` to ``high`` [m] spread over the rows."""

    def __init__(self, width: int, height: int, low: float, high: float):
        self.width, self.height, self.low, self.high = width, height, low, high
        self.picture = [[" "] * width for _ in range(height)]

    def row_of(self, value) -> int:
        return int(np.clip(round((value - self.low) / (self.high - self.low) * (self.height - 1)), 0, self.height - 1))

    def put(self, col, value, char) -> None:
        if np.isfinite(value):
            self.picture[self.row_of(value)][col] = char


def _height_range(plan, known) -> tuple[float, float]:
    """The heights the picture spans [m]: the flight, the band and the terrain, from sea
    level up when there is terrain, with a little room above (and below without terrain)."""
    p, day = plan.profile, plan.scenario.day
    values = [p.height_m, [day.band_top_m, day.band_bottom_m]]
    has_terrain = bool(known.any())
    if has_terrain:
        values.append(p.terrain_m[known])
    low = min(float(np.nanmin(np.concatenate([np.ravel(v) for v in values]))), day.band_bottom_m)
    high = max(float(np.nanmax(np.concatenate([np.ravel(v) for v in values]))), day.band_top_m)
    low = min(low, 0.0) if has_terrain else low - 0.1 * (high - low)
    return low, high + 0.02 * (high - low)


def _draw_band_and_ground(canvas: _Canvas, plan, ground) -> None:
    """The band's top and bottom, the terrain under each column (``?`` where unknown) and the
    floor raised by it where that is above the band bottom."""
    day, safety = plan.scenario.day, plan.scenario.safety
    for col in range(canvas.width):
        canvas.put(col, day.band_top_m, ".")
        canvas.put(col, day.band_bottom_m, ".")
        if ground is None:
            continue
        if np.isfinite(ground[col]):
            for r in range(canvas.row_of(ground[col]) + 1):
                canvas.picture[r][col] = "#"
            floor = ground[col] + safety.terrain_clearance_m
            if floor > day.band_bottom_m:
                canvas.put(col, floor, "=")
        else:
            canvas.picture[0][col] = "?"


def _draw_flight(canvas: _Canvas, p, edges, middle) -> None:
    """The planned flight: a climb in a column fills it from its lowest to its highest
    height, else the height at the column's middle, ``o`` in the final glide."""
    phase = np.asarray(p.phase)
    for col in range(canvas.width):
        inside = (p.distance_m >= edges[col]) & (p.distance_m <= edges[col + 1])
        here = np.interp(middle[col], p.distance_m, p.height_m)
        if middle[col] > p.distance_m[-1]:
            continue
        if np.any(inside & (phase == "climb")):
            heights = p.height_m[inside]
            for r in range(canvas.row_of(heights.min()), canvas.row_of(heights.max()) + 1):
                canvas.picture[r][col] = "|"
        else:
            final = np.any(inside & (phase == "final")) or (
                not inside.any() and phase[min(np.searchsorted(p.distance_m, middle[col]), phase.size - 1)] == "final")
            canvas.put(col, here, "o" if final else "*")


def _framed(canvas: _Canvas, units, total: float) -> list[str]:
    """The picture's rows from the top, with heights at the top, middle and bottom, and the
    distance axis under it."""
    low, high, height, width = canvas.low, canvas.high, canvas.height, canvas.width
    label = max(len(units.fmt_height(high)), len(units.fmt_height(low)))
    lines = []
    for r in range(height - 1, -1, -1):
        text = units.fmt_height(low + (high - low) * r / (height - 1)) if r in (0, height - 1, (height - 1) // 2) else ""
        lines.append(f"{text:>{label}} |" + "".join(canvas.picture[r]))
    lines.append(" " * label + " +" + "-" * width)
    left, right = units.fmt_distance(0.0), units.fmt_distance(total)
    lines.append(" " * (label + 2) + left + " " * max(width - len(left) - len(right), 1) + right)
    return lines
