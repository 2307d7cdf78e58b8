"""The cautions every output a pilot may act on carries.

One source of truth: the command line, the briefing, the JSON, the terminal UI and the
plan itself (:attr:`glidetask.engine.planner.Plan.cautions`) all take their wording from
here. The general cautions are constants; the terrain and landable cautions of one plan
or one glide are worded by the functions below from the engine's results (read by their
attributes, so this module imports nothing) in the unit system the reader chose.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Iterable

if TYPE_CHECKING:
    from glidetask.units import UnitSystem

GENERAL = (
    "glidetask is a planning aid, not a navigation or collision-avoidance instrument.",
    "The pilot in command decides; re-check every figure before and during the flight.",
    "Performance figures must come from the aircraft's flight manual; the bundled polars "
    "are illustrative examples, not data for any real aircraft.",
    "Airspace, weather minima and competition rules follow local regulations and the organisers.",
    "Margins are estimates: keep more in sinking air, rain, or over unfamiliar terrain.",
)

TERRAIN = (
    "Terrain data has errors and gaps; obstacles (masts, trees, cables) are not in it.",
)

LANDABLES = (
    "Fields change with crops and seasons: check landables in person or with the local club.",
)

COMPACT = (
    "Planning aid only - not a navigation instrument. The pilot in command decides; "
    "use the flight manual's figures; follow local rules and the organisers."
)

NO_FINAL_GLIDE_TO_CHECK = "The final glide was not checked over the terrain: the plan has no final glide."
NO_LANDABLES = "No turnpoint is marked landable: field coverage along the task was not checked."
UNKNOWN_GLIDES_TO_FIELDS = ("The terrain model does not cover some glides to fields: those fields were not "
                            "counted as in reach.")

#: A height missing below this rounds to nothing on screen [m]: no caution for it.
SHOWN_SHORTFALL_M = 0.5
#: Beyond this distance from the nearest named place a point is described by distance and
#: compass point from it; within it, as at the place [m].
AT_PLACE_M = 500.0

_COMPASS = ("N", "NNE", "NE", "ENE", "E", "ESE", "SE", "SSE", "S", "SSW", "SW", "WSW", "W", "WNW", "NW", "NNW")


def general() -> list[str]:
    """The general cautions as a fresh list (callers may append their own)."""
    return list(GENERAL)


def compass(bearing_deg: float) -> str:
    """The 16-point compass name of a bearing [deg true]."""
    return _COMPASS[int(((bearing_deg % 360.0) + 11.25) // 22.5) % 16]


def place(point, units: "UnitSystem") -> str:
    """A terrain point in words: ``"terrain of 1180 m at 287.3 km (4.1 km NNE of Orsby)"``.

    ``point`` is a :class:`glidetask.engine.terrain.TerrainPoint`.
    """
    text = f"terrain of {units.fmt_height(point.elevation_m)} at {units.fmt_distance(point.at_m)}"
    if point.near is not None:
        if point.near_distance_m < AT_PLACE_M:
            text += f" (at {point.near})"
        else:
            text += (f" ({units.fmt_distance(point.near_distance_m)} {compass(point.near_bearing_deg)}"
                     f" of {point.near})")
    return text


def _stretches(ranges: Iterable[tuple[float, float]], units: "UnitSystem") -> str:
    return ", ".join(f"{units.fmt_distance(a)} to {units.fmt_distance(b)}" for a, b in ranges)


def terrain_cautions(t, units: "UnitSystem") -> list[str]:
    """The terrain cautions, general and for this glide, for a
    :class:`glidetask.engine.terrain.FinalGlideTerrain` (text, JSON and briefing)."""
    out = list(TERRAIN)
    if t.covered_share < 1.0:
        model = f"The terrain model {t.source}" if t.source else "The terrain model"
        out.append(f"{model} does not cover {100.0 * (1.0 - t.covered_share):.0f}% of the "
                   f"final glide ({_stretches(t.uncovered, units)}): clearance there is unknown, not checked.")
    if t.shortfall_m >= SHOWN_SHORTFALL_M:
        out.append(f"The glide does not clear the terrain by {units.fmt_height(t.clearance_m)}: it needs "
                   f"{units.fmt_height(t.shortfall_m)} more height ({units.fmt_height(t.required_start_m)}).")
    elif t.raised_by_m > 0.0 and t.obstacle is not None:
        out.append(f"Terrain raises the final-glide height by {units.fmt_height(t.raised_by_m)}: "
                   f"{place(t.obstacle, units)} needs {units.fmt_height(t.obstacle.needed_height_m)}.")
    return out


def path_not_covered(source: str | None, covered_share: float, uncovered, units: "UnitSystem") -> str:
    """The caution for a planned path the elevation model covers only in part.

    ``covered_share`` [0-1] and ``uncovered`` (``(from_m, to_m)`` stretches) are those of
    :class:`glidetask.engine.terrain.PathProfile`.
    """
    model = f"The terrain model {source}" if source else "The terrain model"
    return (f"{model} does not cover {100.0 * (1.0 - covered_share):.0f}% of the planned path "
            f"({_stretches(uncovered, units)}): the heights needed there do not allow for the terrain.")


def landables_cautions(c, units: "UnitSystem") -> list[str]:
    """The landable-field cautions, general and for a :class:`glidetask.engine.reach.Coverage`."""
    out = list(LANDABLES)
    if c.landable_count == 0:
        out.append(NO_LANDABLES)
    elif c.gaps:
        length = sum(b - a for a, b in c.gaps)
        out.append(f"No landable field is in reach from the band bottom ({units.fmt_height(c.band_bottom_m)}) on "
                   f"{len(c.gaps)} stretch{'es' if len(c.gaps) != 1 else ''} of the task "
                   f"({units.fmt_distance(length)} in all): stay higher there or plan where to land.")
    if any(parts["unknown"] > 0.0 for parts in c.gap_breakdown()):
        out.append(UNKNOWN_GLIDES_TO_FIELDS)
    return out


# ---------------------------------------------------------------- airspace

AIRSPACE = (
    "Airspace from a file may be out of date or incomplete: check the current charts and notices "
    "(temporary restrictions, active danger areas) before flight.",
)
FLIGHT_LEVELS = ("Flight levels are placed for a standard sea-level pressure (1013.25 hPa) and the day's "
                 "ISA deviation: on a low-pressure day they are lower, by about 8 m per hPa.")


def _volume_name(name: str, airspace_class: str | None) -> str:
    if airspace_class is None:
        return name
    kind = f"class {airspace_class}" if len(airspace_class) == 1 else airspace_class
    return f"{name} ({kind})"


def airspace_conflict(c, units: "UnitSystem", what: str = "Leg") -> str:
    """One conflict in words: a :class:`glidetask.engine.airspace.Conflict`.

    ``what`` names the stretch's part of the flight: ``"Leg"`` (followed by the leg's
    number) for a plan, or a phrase such as ``"The glide"`` for a single glide.
    """
    who = f"{what} {c.leg}" if what == "Leg" else what
    floor = "the ground" if c.from_ground else units.fmt_height(c.floor_m)
    span = (f"planned at {units.fmt_height(c.planned_min_m)}" if round(c.planned_min_m) == round(c.planned_max_m)
            else f"planned {units.fmt_height(c.planned_min_m)} to {units.fmt_height(c.planned_max_m)}")
    why = " (no room to climb and glide under its floor there)" if c.no_room and not c.from_ground else ""
    return (f"{who} enters {_volume_name(c.name, c.airspace_class)}, {floor} to {units.fmt_height(c.ceiling_m)}, "
            f"from {units.fmt_distance(c.from_m)} to {units.fmt_distance(c.to_m)}, {span}{why}: "
            "a clearance or another route is needed, following local rules.")


def airspace_cap(cap, units: "UnitSystem") -> str:
    """A lowered band top in words: a :class:`glidetask.engine.airspace.Cap`."""
    return (f"{cap.name} caps the band top at {units.fmt_height(cap.top_m)} from {units.fmt_distance(cap.from_m)} "
            f"to {units.fmt_distance(cap.to_m)}: climb no higher there.")


def airspace_cautions(check, units: "UnitSystem", what: str = "Leg", flight_levels: bool = False,
                      ground_point: str = "the nearest turnpoint") -> list[str]:
    """The airspace cautions of one plan or glide: a :class:`glidetask.engine.airspace.AirspaceCheck`.

    ``flight_levels``: some volume met is limited by a flight level (add the pressure caution).
    ``ground_point`` names what stood in for the terrain under AGL limits.
    """
    out = list(AIRSPACE)
    out += [airspace_conflict(c, units, what) for c in check.conflicts]
    out += [airspace_cap(cap, units) for cap in check.caps]
    if check.agl_from_points:
        out.append(f"Without a terrain model, heights above the ground of airspace limits are taken over the "
                   f"elevation of {ground_point}: the real limits may differ.")
    if flight_levels:
        out.append(FLIGHT_LEVELS)
    return out
