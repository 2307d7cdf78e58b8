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


# ---------------------------------------------------------------- the day from a sounding

SOUNDING = (
    "The day is derived from a forecast sounding and surface forecast: forecasts err, most of all "
    "in cloud base, overdevelopment and the end of the day; compare with the actual sky before you go.",
)


def _clock(seconds: float) -> str:
    minutes = int(round(seconds / 60.0))
    return f"{(minutes // 60) % 24:02d}:{minutes % 60:02d}"


def sounding_cautions(facts, units: "UnitSystem") -> list[str]:
    """The cautions of a day derived from a sounding, general and for its
    :class:`glidetask.engine.sounding.SoundingFact` s, in the reader's units."""
    out = list(SOUNDING)
    for fact in facts:
        if fact.kind == "no_lift":
            out.append(f"No usable thermals: the surface never reaches the trigger temperature of "
                       f"{fact.value:.1f} C (warmest forecast {fact.other:.1f} C). Plan no cross-country flight "
                       f"on this forecast.")
        elif fact.kind == "overdevelopment":
            out.append(f"Cumulus may overdevelop into showers or thunderstorms: the surface air at "
                       f"{_clock(fact.time_s)} has a CAPE of {fact.value:.0f} J/kg. Watch for spreading "
                       f"cloud, showers and gust fronts; have landing options ready.")
        elif fact.kind == "shallow_layer":
            out.append(f"Very shallow convection: thermals reach at most {units.fmt_height(fact.value)} above "
                       f"the ground ({_clock(fact.time_s)}); fields must be in reach all the time.")
        elif fact.kind == "deep_layer":
            out.append(f"Very deep convection: thermals reach {units.fmt_height(fact.value)} above the ground "
                       f"({_clock(fact.time_s)}): strong, rough thermals; check airspace ceilings and oxygen "
                       f"rules before climbing to the top.")
        elif fact.kind == "lift_until_forecast_ends":
            out.append(f"The surface forecast ends at {_clock(fact.time_s)} with thermals still going: "
                       f"the end of lift is not known from it.")
        elif fact.kind == "lift_before_forecast":
            out.append(f"The surface forecast starts at {_clock(fact.time_s)} with thermals already going: "
                       f"lift may start earlier.")
        elif fact.kind == "flux_capped":
            out.append(f"The surface forecast warms faster at {_clock(fact.time_s)} than the sun can heat the "
                       f"convective layer: the thermal strength there is limited to what a strong sun gives.")
        elif fact.kind == "weakening_assumed":
            out.append(f"From {_clock(fact.time_s)} the surface no longer warms the layer: the thermal "
                       f"strength there is assumed to fade to nothing at the end of lift.")
    return out
