"""The planned height of the whole flight drawn in character cells (the Profile view).

Height against distance along the task from the plan's own SI figures
(:attr:`glidetask.engine.plan.Plan.profile`, ``floors``, ``airspace``, ``landout``), in the
units on screen. Each cell shows the most important thing in it: the flight line over the
least-clearance mark over raised floors and capped tops over the band over the terrain
over airspace shading. Plain Python and numpy (no Textual), so tests draw it directly.

Glyphs (our own): ``█`` terrain, ``·`` the working band's top and bottom, ``═`` a floor
raised by the ground, ``≈`` the band top capped under airspace, ``░`` inside an airspace
volume (between its floor and ceiling), ``▒`` a volume the flight crosses (a conflict),
``•`` glide, ``┃`` climb, ``◦`` final glide, ``✕`` least clearance, ``▼`` land-out,
``╵`` a turnpoint on the distance axis.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
from rich.text import Text

from glidetask.units import UnitSystem

# layer -> (glyph, style); later layers are drawn over earlier ones
STYLES = {
    "airspace": ("░", "#8a6fb0"),
    "conflict": ("▒", "bold #e06c9a"),
    "terrain": ("█", "#8a6a45"),
    "band": ("·", "#6f8fa8"),
    "floor": ("═", "bold #e0b15a"),
    "glide": ("•", "#5ac8e0"),
    "final": ("◦", "bold #e0d45a"),
    "cap": ("≈", "bold #b48ee0"),
    "climb": ("┃", "#8cc66d"),
    "least": ("✕", "bold #e06c5a"),
    "landout": ("▼", "bold #e06c5a"),
}
ORDER = list(STYLES)
LEGEND = (("terrain", "terrain"), ("band", "band"), ("glide", "glide"), ("climb", "climb"),
          ("final", "final glide"), ("floor", "floor raised"), ("least", "least clearance"),
          ("airspace", "airspace"), ("cap", "top capped"), ("conflict", "airspace crossed"),
          ("landout", "land-out"))


@dataclass(frozen=True)
class Scale:
    """Where heights and distances fall in the drawing: rows from the top, columns from the left."""

    low_m: float
    high_m: float
    total_m: float
    rows: int
    columns: int

    def row(self, height_m: float) -> int:
        share = (height_m - self.low_m) / (self.high_m - self.low_m)
        return int(np.clip(round((1.0 - share) * (self.rows - 1)), 0, self.rows - 1))

    def column(self, distance_m: float) -> int:
        return int(np.clip(distance_m / self.total_m * self.columns, 0, self.columns - 1))

    def middles_m(self) -> np.ndarray:
        edges = np.linspace(0.0, self.total_m, self.columns + 1)
        return 0.5 * (edges[:-1] + edges[1:])


def volume_limits(plan) -> list[tuple[object, float, float, float, float, bool]]:
    """Each stretch of the path inside an airspace volume: ``(volume, from_m, to_m, floor_m,
    ceiling_m, crossed)`` [m MSL]; an AGL limit placed over the planned profile's terrain
    (NaN where unknown), a flight-level limit at the day's ISA deviation."""
    from glidetask.engine.airspace import limit_msl_m

    check, p = plan.airspace, plan.profile
    if check is None or p is None:
        return []
    volumes = plan.scenario.airspace.volumes
    crossed = {c.volume for c in check.conflicts}
    deviation = plan.scenario.day.isa_deviation_c
    out = []
    for stretch in check.stretches:
        volume = volumes[stretch.volume]
        ground = np.interp(0.5 * (stretch.from_m + stretch.to_m), p.distance_m, p.terrain_m)
        floor = limit_msl_m(volume.floor, ground, deviation)
        ceiling = limit_msl_m(volume.ceiling, ground, deviation)
        out.append((volume, stretch.from_m, stretch.to_m, float(floor), float(ceiling), stretch.volume in crossed))
    return out


def scale_for(plan, rows: int, columns: int) -> Scale | None:
    """The heights and distances the drawing spans: the flight, the band, the terrain and
    the capped tops, with the ground at the bottom when it is known; None without a profile."""
    p = plan.profile
    if p is None or p.distance_m.size < 2 or rows < 3 or columns < 4:
        return None
    day = plan.scenario.day
    values = [p.height_m, np.array([day.band_top_m, day.band_bottom_m])]
    known = np.isfinite(p.terrain_m)
    if known.any():
        values.append(p.terrain_m[known])
    values.append(np.array([f.floor_m for f in plan.floors], dtype=float))
    if plan.airspace is not None:
        values.append(np.array([c.top_m for c in plan.airspace.caps], dtype=float))
    joined = np.concatenate([np.ravel(v) for v in values])
    joined = joined[np.isfinite(joined)]
    low, high = float(joined.min()), float(joined.max())
    low = min(low, 0.0) if known.any() else low - 0.1 * (high - low)
    high += 0.04 * (high - low) + 1.0
    total = max(float(p.distance_m[-1]), float(plan.path.total_m), 1.0)
    return Scale(low, high, total, rows, columns)


def profile_cells(plan, rows: int, columns: int) -> tuple[list[list[str]], Scale] | None:
    """The drawing as a grid of layer names (``""`` for an empty cell), top row first."""
    scale = scale_for(plan, rows, columns)
    if scale is None:
        return None
    p, day = plan.profile, plan.scenario.day
    grid = [[""] * columns for _ in range(rows)]

    def put(row: int, column: int, layer: str) -> None:
        here = grid[row][column]
        if not here or ORDER.index(layer) >= ORDER.index(here):
            grid[row][column] = layer

    middles = scale.middles_m()
    for volume, start, end, floor, ceiling, crossed in volume_limits(plan):
        bottom = scale.row(floor if math.isfinite(floor) else scale.low_m)
        top = scale.row(min(ceiling, scale.high_m) if math.isfinite(ceiling) else scale.high_m)
        for column in np.flatnonzero((middles >= start) & (middles <= end)):
            for row in range(top, bottom + 1):
                put(row, int(column), "conflict" if crossed else "airspace")
    known = np.isfinite(p.terrain_m)
    ground = np.interp(middles, p.distance_m[known], p.terrain_m[known]) if known.sum() >= 2 else None
    tops = band_top_along(plan, middles)
    for column in range(columns):
        if ground is not None:
            for row in range(scale.row(ground[column]), rows):
                put(row, column, "terrain")
        put(scale.row(float(tops[column])), column, "band")
        put(scale.row(day.band_bottom_m), column, "band")
    for floor in plan.floors:
        for column in np.flatnonzero((middles >= floor.from_m) & (middles <= floor.to_m)):
            put(scale.row(floor.floor_m), int(column), "floor")
    if plan.airspace is not None:
        for cap in plan.airspace.caps:
            for column in np.flatnonzero((middles >= cap.from_m) & (middles <= cap.to_m)):
                put(scale.row(cap.top_m), int(column), "cap")
    _flight(grid, plan, scale, put)
    least = p.least_clearance
    if least is not None:
        put(scale.row(float(np.interp(least[1], p.distance_m, p.height_m))), scale.column(least[1]), "least")
    if plan.landout is not None and math.isfinite(plan.landout_m):
        put(scale.row(float(np.interp(plan.landout_m, p.distance_m, p.height_m))), scale.column(plan.landout_m),
            "landout")
    return grid, scale


def band_top_along(plan, distance_m) -> np.ndarray:
    """The band top [m MSL] where the plan is at each distance: the day's band top at the
    planned clock time there (a band top through the day moves with the flight)."""
    day = plan.scenario.day
    distance_m = np.asarray(distance_m, dtype=float)
    if day.band_top_profile is None or not plan.legs:
        return np.full(distance_m.shape, day.band_top_m)
    places = np.cumsum([0.0] + [float(leg.distance_m) for leg in plan.legs])
    times = np.array([float(leg.start_time_s) for leg in plan.legs]
                     + [float(plan.start_time_s + plan.total_time_s)])
    ok = np.isfinite(times)
    at = np.interp(distance_m, places[ok], times[ok]) if ok.sum() >= 2 else np.full(distance_m.shape, day.start_time_s)
    return np.asarray(day.band_top_at(at), dtype=float)


def _flight(grid, plan, scale: Scale, put) -> None:
    """The planned flight: climbs as vertical strokes, glides (cruise and final) as dots."""
    p = plan.profile
    phase = np.asarray(p.phase)
    edges = np.linspace(0.0, scale.total_m, scale.columns + 1)
    end = float(p.distance_m[-1])
    for column in range(scale.columns):
        low_edge, high_edge = edges[column], edges[column + 1]
        if low_edge > end:
            break
        inside = (p.distance_m >= low_edge) & (p.distance_m <= high_edge)
        climbing = inside & (phase == "climb")
        if climbing.any():
            # a climb's bottom is the sample before its first climb sample
            first = int(np.flatnonzero(climbing)[0])
            heights = np.concatenate([p.height_m[climbing], p.height_m[max(first - 1, 0):first]])
            for row in range(scale.row(heights.max()), scale.row(heights.min()) + 1):
                put(row, column, "climb")
            continue
        middle = min(0.5 * (low_edge + high_edge), end)
        here = float(np.interp(middle, p.distance_m, p.height_m))
        index = min(int(np.searchsorted(p.distance_m, middle)), phase.size - 1)
        put(scale.row(here), column, "final" if phase[index] == "final" else "glide")


def axis_width(plan, units: UnitSystem, rows: int) -> int:
    """Columns the height labels take (the widest label and a space)."""
    scale = scale_for(plan, max(rows, 3), 10)
    if scale is None:
        return 0
    return max(len(_height_label(units, scale.low_m)), len(_height_label(units, scale.high_m))) + 1


def _height_label(units: UnitSystem, metres: float) -> str:
    return units.fmt_height(metres)


def profile_text(plan, units: UnitSystem, width: int, height: int, codes: dict[str, str] | None = None) -> Text:
    """The whole drawing (height labels, the picture, the distance axis with turnpoints and
    a legend line) in ``width`` x ``height`` cells; a note when the plan has no profile."""
    if plan is None or plan.profile is None:
        return Text("no planned profile: the plan is being computed", style="dim")
    label = 0
    for legend_lines in (1, 2):  # the legend takes a second line only when it needs one
        rows = max(height - 1 - legend_lines, 3)
        label = axis_width(plan, units, rows)
        columns = max(width - label - 1, 4)
        drawn = profile_cells(plan, rows, columns)
        if drawn is None:
            return Text("no planned profile for this task", style="dim")
        if legend_text(columns + label + 1, drawn[0]).plain.count("\n") + 1 <= legend_lines:
            break
    grid, scale = drawn
    text = Text(no_wrap=True, overflow="crop")
    label_rows = {0: scale.high_m, rows - 1: scale.low_m, (rows - 1) // 2: 0.5 * (scale.low_m + scale.high_m)}
    for row in range(rows):
        mark = _height_label(units, label_rows[row]) if row in label_rows else ""
        text.append(f"{mark:>{label - 1}} ", style="dim")
        text.append("┤" if row in label_rows else "│", style="dim")
        for layer in grid[row]:
            if layer:
                glyph, style = STYLES[layer]
                text.append(glyph, style=style)
            else:
                text.append(" ")
        text.append("\n")
    text.append(_distance_axis(plan, units, scale, label, codes or {}))
    text.append("\n")
    text.append(legend_text(columns + label + 1, grid))
    return text


def _distance_axis(plan, units: UnitSystem, scale: Scale, label: int, codes: dict[str, str]) -> Text:
    """Turnpoints marked under the picture with their codes, and the total distance."""
    line = [" "] * scale.columns
    along = 0.0
    names = [plan.legs[0].from_name] + [leg.to_name for leg in plan.legs] if plan.legs else []
    places = [0.0]
    for leg in plan.legs:
        along += float(leg.distance_m)
        places.append(along)
    for name, at in zip(names, places):
        column = scale.column(at)
        code = codes.get(name) or name[:3]
        start = min(max(column - len(code) // 2, 0), scale.columns - len(code))
        if all(c == " " for c in line[max(start - 1, 0):start + len(code) + 1]):
            line[start:start + len(code)] = list(code)
    total = units.fmt_distance(scale.total_m)
    tail = "".join(line).rstrip()
    if len(tail) + len(total) + 2 <= scale.columns:
        tail = tail + " " * (scale.columns - len(tail) - len(total)) + total
    return Text(" " * (label - 1) + " └" + tail, style="dim", no_wrap=True, overflow="crop")


def legend_text(width: int, grid=None) -> Text:
    """The glyphs that appear in the drawing, each with its name, on at most two lines of
    ``width`` (the band always, the rest only when drawn)."""
    shown = {layer for row in grid for layer in row} if grid is not None else set(STYLES)
    text = Text(no_wrap=True, overflow="crop")
    used, lines = 0, 1
    for layer, name in LEGEND:
        if layer not in shown and layer != "band":
            continue
        glyph, style = STYLES[layer]
        piece = f"{glyph} {name}"
        if used and used + len(piece) > width:
            if lines == 2:
                break
            text.append("\n")
            used, lines = 0, 2
        text.append(glyph, style=style)
        text.append(f" {name}  ", style="dim")
        used += len(piece) + 2
    return text


def profile_facts(plan, units: UnitSystem) -> list[str]:
    """What the drawing shows, in words and units: least clearance, raised floors, capped
    tops, crossed volumes, where a short plan lands."""
    from glidetask import cautions

    out = []
    p = plan.profile
    least = p.least_clearance if p is not None else None
    if least is not None:
        out.append(f"Least clearance over the terrain {units.fmt_height(least[0])} at {units.fmt_distance(least[1])}")
    elif plan.terrain_source is None:
        out.append("No terrain model in this task: the ground is not drawn ([terrain] file)")
    for floor in plan.floors:
        out.append(f"Floor raised to {units.fmt_height(floor.floor_m)} from {units.fmt_distance(floor.from_m)} "
                   f"to {units.fmt_distance(floor.to_m)}")
    if plan.airspace is not None:
        # conflicts first: each needs a clearance or another route
        out += [cautions.airspace_conflict(c, units) for c in plan.airspace.conflicts]
        out += [cautions.airspace_cap(cap, units) for cap in plan.airspace.caps]
    if plan.landout is not None and math.isfinite(plan.landout_m):
        field = plan.landout.field or "no field in reach"
        out.append(f"Lands out at {units.fmt_distance(plan.landout_m)}: {field}")
    return out
