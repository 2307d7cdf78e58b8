"""The cautions every output a pilot may act on carries.

One source of truth: the command line, the briefing, the JSON, the terminal UI and the
plan itself (:attr:`glidetask.engine.plan.Plan.cautions`) all take their wording from
here. The general cautions are constants; a plan's own cautions (its notices: facts with
numbers, :class:`glidetask.engine.plan.Notice`), and the terrain and landable cautions of
one plan or one glide, are worded by the functions below from the engine's results (read
by their attributes, so this module imports nothing of the engine) in the unit system the
reader chose (:func:`plan_cautions`). The notes of a ballast sweep, of the odds and of the
what-ifs are notices too (:func:`notes_text`); JSON takes them in metric.
"""

from __future__ import annotations

import math
from typing import TYPE_CHECKING, Iterable

from glidetask.units import format_clock, format_duration

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

    ``point`` is a :class:`glidetask.engine.clearance.TerrainPoint`.
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


def need_text(required_m: float, band_top_m: float, units: "UnitSystem") -> str | None:
    """A height needed to final-glide home as the pilot reads it: the number where it lies
    within the working band (at most its top), None above it (a final glide from there
    means nothing to fly; see :func:`final_glide_from_top`)."""
    if not math.isfinite(required_m) or required_m > band_top_m + 1e-6:
        return None
    return f"{units.height(required_m):.0f}"


def final_glide_from_top(to_go_m: float, band_top_m: float, units: "UnitSystem") -> str:
    """Where a final glide from the band top gets home, in words: "final glide from 44.3 km
    at band top (2200 m)"."""
    return f"final glide from {units.fmt_distance(to_go_m)} at band top ({units.fmt_height(band_top_m)})"


def terrain_cautions(t, units: "UnitSystem") -> list[str]:
    """The terrain cautions, general and for this glide, for a
    :class:`glidetask.engine.clearance.FinalGlideTerrain` (text, JSON and briefing)."""
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
    :class:`glidetask.engine.terrain_profile.PathProfile`.
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


# ---------------------------------------------------------------- a plan's cautions


def _signed_vertical(value_ms: float, units: "UnitSystem") -> str:
    return f"{units.vertical(value_ms):+.{units.vertical_decimals}f} {units.vertical_label}"


def _height_range(low_m: float, high_m: float, units: "UnitSystem") -> str:
    return f"{units.height(low_m):.0f}-{units.height(high_m):.0f} {units.height_label}"


def _ends_short(f: dict, units: "UnitSystem") -> str:
    why = {
        "lift_ended": f"lift ends at {format_clock(f['lift_ends_s'])} before the final glide can start",
        "no_climb": f"the climb profile gives no climb at {format_clock(f['stop_time_s'])}, before the final "
                    f"glide can start",
        "wind_too_strong": f"the wind ({f['wind_from_deg']:03.0f}/{units.fmt_speed(f['wind_speed_ms'])}) is too "
                           f"strong for this glider to make progress with climbs",
        "below_floor": "the plan reaches the finish below the arrival margin",
        "terrain_above_band": "the terrain plus the clearance reaches the band top, so the glides cannot clear it",
    }.get(f["why"], "the plan cannot be completed")
    where = (f"Task not completed: {why}; the plan ends {units.fmt_distance(f['at_m'])} along the task, on the leg "
             f"{f['leg_from']} -> {f['leg_to']}")
    if f.get("place") is not None:
        where += f", at {place(f['place'], units)}"
    if f["why"] == "terrain_above_band":
        return where + ": the task cannot be flown as set; set it around the high ground or wait for a higher band."
    if f.get("field"):
        return (where + f", gliding on at MacCready 0 while it keeps the terrain clearance; it lands in "
                f"{f['field']} ({units.fmt_height(f['field_elevation_m'])}), in reach from where the climbs stop.")
    if f.get("terrain"):
        return (where + ", gliding on at MacCready 0 while it keeps the terrain clearance; no landable field is in "
                "reach from where the climbs stop: plan where to land before you go.")
    return (where + f", gliding on at MacCready 0 down to {units.fmt_height(f['floor_m'])} "
            f"(finish elevation plus the arrival margin, taken as the ground).")


def notice_text(notice, units: "UnitSystem") -> str:
    """One fact about a plan, a ballast sweep, the odds or the what-ifs (a
    :class:`glidetask.engine.plan.Notice`) in words and ``units``."""
    f, code = notice.facts, notice.code
    if code == "ends_short":
        return _ends_short(f, units)
    if code == "raised_floor":
        return (f"High ground from {units.fmt_distance(f['from_m'])} to {units.fmt_distance(f['to_m'])}: terrain plus "
                f"the clearance reaches {units.fmt_height(f['floor_m'])}, above the band bottom "
                f"({units.fmt_height(f['band_bottom_m'])}); the plan climbs before it and glides no lower there.")
    if code == "lift_ends_before_final_glide":
        return (f"Lift ends ({format_clock(f['stop_time_s'])}) before the planned final glide: the plan glides home "
                f"at MacCready 0 from {units.fmt_distance(f['final_glide_from_m'])}, arriving "
                f"{units.fmt_height(f['above_margin_m'])} above the arrival margin. Any sink on the way and it "
                f"lands out.")
    if code == "tight_day":
        return (f"The last climb ends at {format_clock(f['last_climb_end_s'])}, only {f['spare_s'] / 60:.0f} min "
                f"before lift ends ({format_clock(f['lift_ends_s'])}): little time in hand if the day dies early.")
    if code == "under_min_time":
        return (f"The planned time {format_duration(f['time_s'])} is under the minimum time "
                f"{format_duration(f['min_time_s'])}: the speed is scored over the minimum time.")
    if code == "thin_margin":
        return (f"The arrival margin of {units.fmt_height(f['margin_m'])} is thin: most pilots plan "
                f"{_height_range(150.0, 300.0, units)} over the finish.")
    if code == "final_glide_at_mc0":
        return "The final glide is planned at MacCready 0 (best glide): it has no speed in hand for sinking air."
    if code == "rising_air_counted":
        return (f"The plan counts on rising air while gliding ({_signed_vertical(f['airmass_ms'], units)}): "
                f"if it is not there, every glide loses more height.")
    if code == "areas_too_long":
        return (f"Even the shortest path through the areas ({units.fmt_distance(f['distance_m'])}) takes "
                f"{format_duration(f['time_s'])}, more than the minimum time {format_duration(f['min_time_s'])}.")
    if code == "areas_too_short":
        return (f"Even the longest path through the areas ({units.fmt_distance(f['distance_m'])}) takes only "
                f"{format_duration(f['time_s'])}, under the minimum time {format_duration(f['min_time_s'])}: "
                f"the speed is scored over the minimum time.")
    return _strategy_note_text(code, f, units)


# ---------------------------------------------------------------- the sweep's, the odds' and the what-ifs' notes

STRATEGY_NOTES = {
    "no_water_ballast": "This glider carries no water ballast: only the empty glider is shown.",
    "sweep_area_targets": "Area task: the times are for the targets the plan chose; the minimum time still applies.",
    "dump_water": "Dump water before landing out, and whenever the climbs turn weak.",
    "odds_area_targets": "Area task: every day flies the forecast plan's targets.",
    "what_ifs_area_targets": ("Area task: the what-ifs fly the forecast plan's targets; on the day, move the "
                              "targets to keep the minimum time."),
}


def _setting(value_ms: float, units: "UnitSystem") -> str:
    """A setting as typed (``1.5 m/s``, ``2 m/s``): no more decimals than it needs."""
    return f"{round(units.vertical(value_ms), units.vertical_decimals + 1):g} {units.vertical_label}"


def bad_day_words(spread) -> str:
    """The bad-day mode of a :class:`glidetask.engine.day_spread.DaySpread` in words,
    e.g. "1 day in 10 the lift ends 1-2 h early"."""
    p = spread.bad_day_probability
    if p <= 0.0 or spread.bad_day_early_s[1] <= 0.0:
        return "no bad days"
    shortest, longest = (t / 3600.0 for t in spread.bad_day_early_s)
    share = f"1 day in {1.0 / p:.0f}" if abs(1.0 / p - round(1.0 / p)) < 1e-9 else f"{100 * p:g} % of days"
    return f"{share} the lift ends {shortest:g}-{longest:g} h early"


def layer_depth(depth_m: float, units: "UnitSystem") -> str:
    """The depth of a convective layer: in km (one decimal) in metric, as heights elsewhere."""
    return units.fmt_distance(depth_m) if units.distance_label == "km" else units.fmt_height(depth_m)


def search_source(odds, units: "UnitSystem") -> str:
    """Where the odds' thermal search distance comes from (:class:`glidetask.engine.simulate.Odds`),
    in words; "" where the spread gave it."""
    depth = getattr(odds, "search_layer_m", math.nan)
    return "" if not math.isfinite(depth) else f"Allen (2006) for a {layer_depth(depth, units)} convective layer"


def _strategy_note_text(code: str, f: dict, units: "UnitSystem") -> str:
    if code in STRATEGY_NOTES:
        return STRATEGY_NOTES[code]
    if code == "sweep_one_thermal":
        return (f"Thermals are taken as constant in strength all day and of one size "
                f"({units.fmt_height(f['thermal_radius_m'])} radius, {f['source']}): real days vary, and a narrower "
                f"thermal punishes ballast more.")
    if code == "sweep_ignores_fixed_mc":
        return (f"The sweep flies at a MacCready setting equal to the achieved climb, not the day's fixed setting "
                f"of {_setting(f['mc_ms'], units)}.")
    if code == "odds_landout_meaning":
        if f.get("terrain"):
            return ("A land-out here is where the glide after the climbs comes down to the terrain clearance (or "
                    "after a failed search for a climb, the finish elevation plus the arrival margin if that comes "
                    "first), away from the finish: choose a field well before that.")
        return ("A land-out here means reaching the elevation of the field in reach plus the arrival margin (the "
                "finish elevation plus the margin with none in reach, or after a failed search for a climb), away "
                "from the finish: choose a field well before that.")
    if code == "odds_spread_assumed":
        s = f["spread"]
        return (f"The spread of days is a planning assumption of glidetask, not a forecast: strength "
                f"x exp(N(0, {s.climb_log_sd:g})), wind speed +/- {units.fmt_speed(s.wind_speed_sd_ms)} "
                f"and direction +/- {s.wind_direction_sd_deg:.0f} deg (1 sd), end of lift +/- "
                f"{s.lift_end_sd_s / 60:.0f} min, {bad_day_words(s)}, next climb on average "
                f"{units.fmt_distance(s.thermal_search_mean_m)} beyond the band bottom.")
    raise ValueError(f"unknown notice {code!r}")


def notes_text(notes, units: "UnitSystem") -> list[str]:
    """The notes of a sweep, the odds or the what-ifs (their ``notes``: facts) in ``units``."""
    return [notice_text(note, units) for note in notes]


def safety_cautions(plan, units: "UnitSystem") -> list[str]:
    """The terrain and landable cautions of a :class:`glidetask.engine.plan.Plan`."""
    out: list[str] = []
    if plan.terrain_source is not None:
        if plan.terrain is not None:
            out += terrain_cautions(plan.terrain, units)
        else:
            out += [*TERRAIN, NO_FINAL_GLIDE_TO_CHECK]
        path = plan.terrain_path
        if path is not None and path.profile.covered_share < 1.0:
            out.append(path_not_covered(plan.terrain_source, path.profile.covered_share,
                                        path.profile.uncovered_ranges(), units))
    if plan.landables is not None:
        out += landables_cautions(plan.landables, units)
    elif plan.scenario.turnpoints:
        out.append(NO_LANDABLES)
    if plan.airspace is not None:
        volumes = plan.scenario.airspace.volumes
        levels = any(volumes[s.volume].floor.unit == "FL" or volumes[s.volume].ceiling.unit == "FL"
                     for s in plan.airspace.stretches)
        out += airspace_cautions(plan.airspace, units, "Leg", levels)
    return out


def plan_cautions(plan, units: "UnitSystem") -> list[str]:
    """Every caution of a :class:`glidetask.engine.plan.Plan` in ``units``: the general ones,
    then the plan's own (its notices), then its terrain and landable cautions, each once.
    The text output, the JSON (metric), the briefing and the UI all call this."""
    own = general() + day_source_cautions(plan.scenario.day_source, units, plan.scenario.day.start_time_s)
    own += [notice_text(notice, units) for notice in plan.notices]
    return own + [text for text in dict.fromkeys(safety_cautions(plan, units)) if text not in own]


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
    """One conflict in words: a :class:`glidetask.engine.airspace_conflicts.Conflict`.

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
    """A lowered band top in words: a :class:`glidetask.engine.airspace_conflicts.Cap`."""
    return (f"{cap.name} caps the band top at {units.fmt_height(cap.top_m)} from {units.fmt_distance(cap.from_m)} "
            f"to {units.fmt_distance(cap.to_m)}: climb no higher there.")


def airspace_cautions(check, units: "UnitSystem", what: str = "Leg", flight_levels: bool = False,
                      ground_point: str = "the nearest turnpoint") -> list[str]:
    """The airspace cautions of one plan or glide: a :class:`glidetask.engine.airspace_conflicts.AirspaceCheck`.

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


# ---------------------------------------------------------------- the day from a sounding

SOUNDING = (
    "The day is derived from a forecast sounding and surface forecast: forecasts err, most of all "
    "in cloud base, overdevelopment and the end of the day; compare with the actual sky before you go.",
)


NO_LIFT_DAY = ("The day derived from the sounding has no working band: a plan flies it with no lift, from the "
               "start height, and lands out.")


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
                       f"{format_clock(fact.time_s)} has a CAPE of {fact.value:.0f} J/kg. Watch for spreading "
                       f"cloud, showers and gust fronts; have landing options ready.")
        elif fact.kind == "shallow_layer":
            out.append(f"Very shallow convection: thermals reach at most {units.fmt_height(fact.value)} above "
                       f"the ground ({format_clock(fact.time_s)}); fields must be in reach all the time.")
        elif fact.kind == "deep_layer":
            out.append(f"Very deep convection: thermals reach {units.fmt_height(fact.value)} above the ground "
                       f"({format_clock(fact.time_s)}): strong, rough thermals; check airspace ceilings and oxygen "
                       f"rules before climbing to the top.")
        elif fact.kind == "lift_until_forecast_ends":
            out.append(f"The surface forecast ends at {format_clock(fact.time_s)} with thermals still going: "
                       f"the end of lift is not known from it.")
        elif fact.kind == "lift_before_forecast":
            out.append(f"The surface forecast starts at {format_clock(fact.time_s)} with thermals already going: "
                       f"lift may start earlier.")
        elif fact.kind == "flux_capped":
            out.append(f"The surface forecast warms faster at {format_clock(fact.time_s)} than the sun can heat the "
                       f"convective layer: the thermal strength there is limited to what a strong sun gives.")
        elif fact.kind == "weakening_assumed":
            out.append(f"From {format_clock(fact.time_s)} the surface no longer warms the layer: the thermal "
                       f"strength there is assumed to fade to nothing at the end of lift.")
    return out


def overridden_text(overridden) -> str | None:
    """The note naming the task file's keys typed over a derived day, or None."""
    if not overridden:
        return None
    keys = ", ".join(f"[day] {key}" for key in overridden)
    return (f"Typed in the task file, overriding the day derived from the sounding: {keys}. The plan flies "
            f"the typed value{'s' if len(overridden) > 1 else ''}.")


def day_source_cautions(source, units: "UnitSystem", start_time_s: float | None = None) -> list[str]:
    """The cautions of a plan whose day comes from a sounding
    (:class:`glidetask.engine.sounding_inputs.DaySource`): the keys typed over it, a start before
    the derived lift starts, then the sounding's own cautions; none for a typed day."""
    if source is None:
        return []
    out = [text for text in (overridden_text(source.overridden),) if text]
    if source.inputs is None:
        out.append("The day derived from the sounding has no working band: the plan flies the typed day only.")
    elif source.inputs.no_lift:
        out.append(NO_LIFT_DAY)
    elif start_time_s is not None and start_time_s < source.inputs.lift_start_s:
        out.append(f"The task starts at {format_clock(start_time_s)}, before thermals start "
                   f"({format_clock(source.inputs.lift_start_s)}) on the derived day.")
    return out + sounding_cautions(source.derived.facts, units)
