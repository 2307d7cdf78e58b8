"""The safety report: the terrain-checked final glide and landable coverage, for people and scripts.

JSON objects (shared/CONTRACT.md 5.3 ``terrain`` and ``landables``, with extra keys),
readable sections for the text plan and the ``glide`` command, Markdown sections for the
pre-flight briefing, and the cautions that go with them (worded in :mod:`glidetask.cautions`,
the one source the plan's own cautions come from too). Everything here formats results of
:mod:`glidetask.engine.clearance` and :mod:`glidetask.engine.reach`; nothing is computed again.
"""

from __future__ import annotations

import math
from typing import Sequence

import numpy as np

from glidetask.cautions import SHOWN_SHORTFALL_M, compass, landables_cautions, place, terrain_cautions
from glidetask.units import UnitSystem

__all__ = ["compass", "landables_cautions", "landables_markdown", "landables_text", "landables_to_dict",
           "terrain_cautions", "terrain_markdown", "terrain_profile_ascii", "terrain_text", "terrain_to_dict"]

_GAP_REASONS = {"range": "no field within a glide", "terrain": "terrain in the way",
                "unknown": "terrain model does not cover the glides"}


def _num(value):
    """A finite float, or None (JSON null) for NaN and infinities."""
    if value is None:
        return None
    value = float(value)
    return value if math.isfinite(value) else None


def _km(metres):
    value = _num(metres)
    return None if value is None else value / 1000.0


def _leg_label(leg: int, leg_names: Sequence | None) -> str:
    number = f"leg {leg + 1}"
    if leg_names is not None and 0 <= leg < len(leg_names):
        start, end = leg_names[leg]
        return f"{number} {start} > {end}"
    return number


# ---------------------------------------------------------------- JSON


def _point_dict(point) -> dict | None:
    if point is None:
        return None
    return {
        "at_km": _km(point.at_m), "lat": _num(point.lat), "lon": _num(point.lon),
        "elevation_m": _num(point.elevation_m), "clearance_m": _num(point.clearance_m),
        "needed_height_m": _num(point.needed_height_m), "near": point.near,
        "near_distance_km": _km(point.near_distance_m), "near_bearing_deg": _num(point.near_bearing_deg),
    }


def terrain_to_dict(t, source: str | None = None) -> dict:
    """The contract's ``terrain`` object for a :class:`~glidetask.engine.clearance.FinalGlideTerrain`.

    Keys of the contract: ``source``, ``ok``, ``final_glide_min_clearance_m`` (least height
    of the final glide as planned above the terrain), ``at_km`` (where, along the task).
    Extra keys: ``clearance_m`` (demanded), ``raised_by_m`` (how much the terrain raised the
    final-glide start height), ``required_start_height_m``, ``start_height_m``,
    ``shortfall_m``, ``covered_percent``, ``uncovered`` [{``from_km``, ``to_km``}],
    ``lowest`` and ``obstacle`` (places: ``at_km``, ``lat``, ``lon``, ``elevation_m``,
    ``clearance_m``, ``needed_height_m``, ``near``, ``near_distance_km``, ``near_bearing_deg``).
    ``source`` overrides the model's file name (e.g. as the task file gives it).
    """
    return {
        "source": t.source if source is None else source,
        "ok": bool(t.ok),
        "final_glide_min_clearance_m": _num(t.min_clearance_m),
        "at_km": _km(t.at_m),
        "clearance_m": _num(t.clearance_m),
        "raised_by_m": _num(t.raised_by_m),
        "required_start_height_m": _num(t.required_start_m),
        "start_height_m": _num(t.start_height_m),
        "shortfall_m": _num(t.shortfall_m),
        "covered_percent": _num(100.0 * t.covered_share),
        "uncovered": [{"from_km": _km(a), "to_km": _km(b)} for a, b in t.uncovered],
        "lowest": _point_dict(t.lowest),
        "obstacle": _point_dict(t.obstacle),
    }


def landables_to_dict(c, leg_names: Sequence | None = None) -> dict:
    """The contract's ``landables`` object for a :class:`~glidetask.engine.reach.Coverage`.

    Keys of the contract: ``coverage_percent``, ``gaps`` [{``from_km``, ``to_km``}] (plus
    ``reason``, the main cause: ``range``, ``terrain`` or ``unknown``, and ``by_reason_km``,
    the length of the gap for each cause), ``by_leg`` [{``leg``, ``nearest``,
    ``distance_km``}] with ``leg`` numbered from 1 like the legs a pilot flies (plus
    ``alternates`` [{``name``, ``distance_km``}] and, given ``leg_names`` as (from, to)
    pairs, ``from`` and ``to``). Extra keys: ``band_bottom_m``, ``arrival_margin_m``,
    ``terrain_checked``, ``terrain_clearance_m``, ``landable_count``.
    """
    by_leg = []
    for entry in c.by_leg:
        item = {"leg": entry.leg + 1, "nearest": entry.nearest, "distance_km": _km(entry.distance_m),
                "alternates": [{"name": name, "distance_km": _km(d)} for name, d in entry.alternates]}
        if leg_names is not None and 0 <= entry.leg < len(leg_names):
            item["from"], item["to"] = leg_names[entry.leg]
        by_leg.append(item)
    return {
        "coverage_percent": _num(c.coverage_percent),
        "gaps": [{"from_km": _km(a), "to_km": _km(b), "reason": reason,
                  "by_reason_km": {name: _km(length) for name, length in parts.items()}}
                 for (a, b), reason, parts in zip(c.gaps, c.gap_reasons(), c.gap_breakdown())],
        "by_leg": by_leg,
        "band_bottom_m": _num(c.band_bottom_m),
        "arrival_margin_m": _num(c.margin_m),
        "terrain_checked": bool(c.terrain_checked),
        "terrain_clearance_m": _num(c.clearance_m),
        "landable_count": int(c.landable_count),
    }


# ---------------------------------------------------------------- text


def terrain_facts(t, units: UnitSystem) -> list[tuple[str, str]]:
    """(label, text) pairs describing the checked final glide; shared by text and Markdown."""
    if t.lowest is None:
        return [("verdict", "NOT CHECKED: the terrain model covers none of the final glide")]
    if t.ok:
        verdict = f"clears the terrain by at least {units.fmt_height(t.clearance_m)}"
    elif t.shortfall_m > 0.0:  # ok is false: say so even when the height missing rounds to 0 m
        verdict = f"NOT CLEARED: the glide passes less than {units.fmt_height(t.clearance_m)} over the terrain"
    else:
        verdict = "NOT CHECKED EVERYWHERE: the terrain model does not cover all of the glide"
    facts = [("verdict", verdict),
             ("least clearance", f"{units.fmt_height(t.min_clearance_m)} over {place(t.lowest, units)}")]
    if t.raised_by_m > 0.0 and t.obstacle is not None:
        facts.append(("terrain demands", f"{units.fmt_height(t.required_start_m)} at the start, "
                                         f"{units.fmt_height(t.raised_by_m)} more than the arrival alone: "
                                         f"decided by {place(t.obstacle, units)}"))
    else:
        facts.append(("terrain demands", f"nothing beyond the arrival margin "
                                         f"({units.fmt_height(t.required_start_m)} at the start)"))
    if t.shortfall_m >= SHOWN_SHORTFALL_M:
        facts.append(("height missing", f"{units.fmt_height(t.shortfall_m)} "
                                        f"(starting at {units.fmt_height(t.start_height_m)})"))
    missing = ", ".join(f"{units.fmt_distance(a)} to {units.fmt_distance(b)}" for a, b in t.uncovered)
    facts.append(("model covers", f"{100.0 * t.covered_share:.0f}% of the glide"
                                  + (f"; no data from {missing}" if missing else "")))
    return facts


def terrain_text(t, units: UnitSystem) -> str:
    """A readable section on the final glide over the terrain (text plan, ``glide`` command)."""
    title = "Final glide over the terrain" + (f" (model {t.source})" if t.source else "")
    return "\n".join([title] + [f"  {label:<17} {text}" for label, text in terrain_facts(t, units)])


def gap_explanations(c, units: UnitSystem) -> list[str]:
    """Each gap's main cause, and the others with their lengths."""
    whys = []
    for reason, parts in zip(c.gap_reasons(), c.gap_breakdown()):
        others = [f"{_GAP_REASONS[name]} over {units.fmt_distance(length)}"
                  for name, length in parts.items() if name != reason and length > 0.0]
        whys.append(_GAP_REASONS[reason] + (f" ({'; '.join(others)})" if others else ""))
    return whys


def landables_text(c, units: UnitSystem, leg_names: Sequence | None = None) -> str:
    """A readable section on landable coverage along the task (text plan)."""
    terrain = (f", clearing terrain by {units.fmt_height(c.clearance_m)}" if c.terrain_checked else "")
    lines = [f"Landable fields in reach from the band bottom ({units.fmt_height(c.band_bottom_m)}, "
             f"MacCready 0, arrival margin {units.fmt_height(c.margin_m)}{terrain})"]
    if c.landable_count == 0:
        lines.append("  no turnpoint is marked landable: coverage not checked")
        return "\n".join(lines)
    lines.append(f"  coverage   {c.coverage_percent:.0f}% of the task")
    if not c.gaps:
        lines.append("  gaps       none")
    for (start, end), why in zip(c.gaps, gap_explanations(c, units)):
        lines.append(f"  gap        {units.fmt_distance(start)} to {units.fmt_distance(end)}"
                     f" ({units.fmt_distance(end - start)}): {why}")
    for entry in c.by_leg:
        label = _leg_label(entry.leg, leg_names)
        if entry.nearest is None:
            lines.append(f"  {label}: no field in reach")
            continue
        others = ", ".join(f"{name} {units.fmt_distance(d)}" for name, d in entry.alternates[1:])
        lines.append(f"  {label}: {entry.nearest} {units.fmt_distance(entry.distance_m)} off track"
                     + (f" (also {others})" if others else ""))
    return "\n".join(lines)


# ---------------------------------------------------------------- Markdown


def terrain_profile_ascii(t, units: UnitSystem, width: int = 64, height: int = 12) -> str:
    """The final glide over the terrain as a small ASCII picture.

    ``#`` terrain, ``*`` the glide as planned, ``X`` where the glide is closest to the
    ground, ``?`` a column without terrain data. Heights on the left, distances below.
    """
    distance = np.asarray(t.distance_m, dtype=float)
    terrain = np.asarray(t.terrain_m, dtype=float)
    glide = np.asarray(t.glide_m, dtype=float)
    start, end = float(distance[0]), float(distance[-1])
    columns = np.linspace(start, end, width) if end > start else np.full(width, start)
    covered = np.isfinite(terrain)
    ground = np.interp(columns, distance, np.where(covered, terrain, 0.0))
    unknown = np.interp(columns, distance, covered.astype(float)) < 1.0  # a neighbour has no data
    line = np.interp(columns, distance, glide)
    known = ground[~unknown]
    low = float(np.min(known)) if known.size else float(np.nanmin(line))
    # The picture reaches up to the glide or to the ground above it, where the glide runs into it.
    high = max(float(np.nanmax(line)), float(np.max(known)) if known.size else -np.inf)
    low, high = min(low, high), max(high, low + 1.0)
    rows = height

    def row_of(value):
        return int(round((value - low) / (high - low) * (rows - 1)))

    picture = [[" "] * width for _ in range(rows)]
    for col in range(width):
        if unknown[col]:
            picture[0][col] = "?"
            continue
        for r in range(min(row_of(ground[col]), rows - 1) + 1):
            picture[r][col] = "#"
    for col in range(width):
        if np.isfinite(line[col]):
            r = min(max(row_of(line[col]), 0), rows - 1)
            picture[r][col] = "*"
    if t.lowest is not None and end > start:
        col = int(round((t.lowest.at_m - start) / (end - start) * (width - 1)))
        r = min(max(row_of(t.lowest.elevation_m), 0), rows - 1)
        picture[r][col] = "X"
    label_width = 7
    out = []
    for r in range(rows - 1, -1, -1):
        value = low + (high - low) * r / (rows - 1)
        label = f"{units.height(value):>{label_width - 1}.0f} " if r in (0, rows - 1, (rows - 1) // 2) else " " * label_width
        out.append(label + "|" + "".join(picture[r]))
    out.append(" " * label_width + "+" + "-" * width)
    left = f"{units.distance(start):.0f}"
    right = f"{units.distance(end):.0f} {units.distance_label}"
    out.append(" " * (label_width + 1) + left + " " * max(1, width - len(left) - len(right)) + right)
    out.append(f"(heights in {units.height_label}; # terrain, * glide, X least clearance, ? no data)")
    return "\n".join(out)


def _profile_rows(t, count: int = 10) -> list[int]:
    """Indices of evenly spread samples, plus the least clearance and the obstacle."""
    n = len(t.distance_m)
    picks = set(np.linspace(0, n - 1, min(count, n)).round().astype(int).tolist())
    for point in (t.lowest, t.obstacle):
        if point is not None:
            picks.add(int(np.argmin(np.abs(np.asarray(t.distance_m) - point.at_m))))
    return sorted(picks)


def terrain_markdown(t, units: UnitSystem, *, table: bool = True) -> str:
    """The briefing section: verdict, the profile as ASCII and (``table``) as a short table."""
    h, d = units.height_label, units.distance_label
    lines = ["## Final glide over the terrain", ""]
    if t.source:
        lines += [f"Elevation model: `{t.source}`.", ""]
    lines += [f"- **{label.capitalize()}:** {text}" for label, text in terrain_facts(t, units)]
    if t.lowest is None:
        return "\n".join(lines + ["", *(f"> - {text}" for text in terrain_cautions(t, units))]) + "\n"
    lines += ["", "```", terrain_profile_ascii(t, units), "```"]
    if table:
        lines += ["", f"| Along ({d}) | Terrain ({h}) | Glide ({h}) | Clearance ({h}) | |",
                  "|---:|---:|---:|---:|---|"]
    for i in _profile_rows(t) if table else ():
        ground, glide = float(t.terrain_m[i]), float(t.glide_m[i])
        note = []
        if t.lowest is not None and i == int(np.argmin(np.abs(t.distance_m - t.lowest.at_m))):
            note.append("least clearance")
        if t.obstacle is not None and i == int(np.argmin(np.abs(t.distance_m - t.obstacle.at_m))):
            note.append("decides the height")
        if math.isfinite(ground):
            cells = (f"{units.height(ground):.0f}", f"{units.height(glide):.0f}", f"{units.height(glide - ground):.0f}")
        else:
            cells = ("no data", f"{units.height(glide):.0f}", "?")
        lines.append(f"| {units.distance(float(t.distance_m[i])):.1f} | " + " | ".join(cells)
                     + f" | {', '.join(note)} |")
    lines += ["", *(f"> - {text}" for text in terrain_cautions(t, units))]
    return "\n".join(lines) + "\n"


def landables_markdown(c, units: UnitSystem, leg_names: Sequence | None = None) -> str:
    """The briefing section: coverage, the gaps, the alternates per leg."""
    d = units.distance_label
    terrain = f", terrain clearance {units.fmt_height(c.clearance_m)}" if c.terrain_checked else ""
    lines = ["## Landable fields along the task", "",
             f"In reach from the band bottom ({units.fmt_height(c.band_bottom_m)}) at MacCready 0 in the "
             f"day's wind, arriving {units.fmt_height(c.margin_m)} above the field{terrain}.", ""]
    if c.landable_count == 0:
        lines += ["No turnpoint is marked landable: coverage not checked.", ""]
        return "\n".join(lines)
    lines += [f"**Coverage: {c.coverage_percent:.0f}% of the task.**", ""]
    if c.gaps:
        lines += [f"| Gap from ({d}) | to ({d}) | length ({d}) | why |", "|---:|---:|---:|---|"]
        for (start, end), why in zip(c.gaps, gap_explanations(c, units)):
            lines.append(f"| {units.distance(start):.1f} | {units.distance(end):.1f} | "
                         f"{units.distance(end - start):.1f} | {why} |")
    else:
        lines.append("No gaps: a landable field is in reach from every point of the task.")
    lines += ["", f"| Leg | Nearest field in reach | off track ({d}) | other alternates |", "|---|---|---:|---|"]
    for entry in c.by_leg:
        others = ", ".join(f"{name} ({units.distance(dist):.1f})" for name, dist in entry.alternates[1:])
        nearest = entry.nearest or "none in reach"
        distance = "" if entry.nearest is None else f"{units.distance(entry.distance_m):.1f}"
        lines.append(f"| {_leg_label(entry.leg, leg_names)} | {nearest} | {distance} | {others} |")
    lines += ["", *(f"> - {text}" for text in landables_cautions(c, units))]
    return "\n".join(lines) + "\n"
