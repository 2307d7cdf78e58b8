"""The pre-flight briefing in Markdown: the plan as a pilot takes it to the glider.

Page one: the task and the verdict (with the terrain and landable verdicts in a line
each), the legs table, the heights needed at each turnpoint to get home (at the plan's
final-glide setting and at MacCready 0, 1, 2 and 3), the day the plan assumes, and how
the task time answers to the day (sensitivity). Then, each on a page of its own when there
is something to show: the whole flight's planned profile over the terrain and its airspace
(band caps, conflicts); the final glide over the terrain (verdict, what decided the height)
and the landable fields along the task (coverage, gaps, alternates per leg); for a day from
a sounding, the derived day (hourly table, band, strength, cloud base or blue, wind
profile). Then the cautions. Each page prints on one sheet (a page break between them for
printing from HTML).
"""

from __future__ import annotations

import math

import numpy as np

from glidetask import cautions, units
from glidetask.engine.circling_card import day_circling
from glidetask.engine.final_glide_speeds import final_glide_speeds, heights_card_speeds
from glidetask.engine.plan import CARD_MC_MS, final_glide_card
from glidetask.formats.safety_report import landables_markdown, terrain_markdown
from glidetask.formats.strategy_report import sensitivity_markdown
from glidetask.formats.wind_text import wind_text
from glidetask.units import KNOT, format_clock, format_duration

CARD_MC_KT = tuple(k * KNOT for k in (0.0, 2.0, 4.0, 6.0))  # the aviation card's settings [m/s]
PAGE_BREAK = '<div style="page-break-before: always"></div>'


from glidetask.formats.profile_art import profile_ascii  # noqa: E402  (rendered on every briefing)


def _num(value: float, fmt: str = "{:.0f}") -> str:
    return "-" if value is None or not math.isfinite(value) else fmt.format(value)


def _table(head: list[str], rows: list[list[str]], right: int = 1) -> list[str]:
    """A Markdown table; columns from ``right`` on are right-aligned."""
    align = [":--" if i < right else "--:" for i in range(len(head))]
    return ["| " + " | ".join(head) + " |", "|" + "|".join(align) + "|"] + ["| " + " | ".join(r) + " |" for r in rows]


def _summary(plan, unit) -> list[str]:
    task, glider = plan.scenario.task, plan.scenario.glider
    if plan.area is not None:
        distance = (f"{unit.fmt_distance(plan.planned_distance_m)} planned in the areas "
                    f"({unit.fmt_distance(plan.area.min_distance_m)} to {unit.fmt_distance(plan.area.max_distance_m)}), "
                    f"minimum time {format_duration(plan.area.min_time_s)}")
    else:
        distance = (f"{unit.fmt_distance(plan.optimized_distance_m)} optimized "
                    f"({unit.fmt_distance(plan.nominal_distance_m)} centre to centre)")
    if plan.finished:
        verdict = (f"**Finishes {format_clock(plan.finish_time_s)}** after {format_duration(plan.total_time_s)}, "
                   f"task speed {unit.fmt_speed(plan.task_speed_ms)}.")
    else:
        verdict = (f"**Ends short {unit.fmt_distance(plan.landout_m)} along the task** "
                   f"({plan.reason}) after {format_duration(plan.total_time_s)}.")
    final = ""
    if math.isfinite(plan.final_glide_from_m):
        out = plan.planned_distance_m - plan.final_glide_from_m
        final = (f" Final glide from {unit.fmt_distance(out)} out at {unit.fmt_height(plan.final_glide_height_m)}, "
                 f"MacCready {unit.fmt_vertical(plan.final_glide_mc_ms)}{final_glide_speed_text(plan, unit)}.")
    return [
        f"# Pre-flight briefing: {task.name}",
        "",
        f"*{cautions.GENERAL[0]} The pilot in command decides.*",
        "",
        f"- **Task**: {task.kind}, {' - '.join(p.name for p in task.points)}; {distance}.",
        f"- **Glider**: {glider.spec.label}; {plan.mass_kg:.0f} kg with {glider.ballast_kg:g} kg water, "
        f"bugs {glider.bugs_percent:g} %; {plan.wing_loading_kgm2:.1f} kg/m2; best L/D {plan.best_ld:.0f}.",
        f"- **Plan**: {verdict}{final}",
    ] + _safety_summary(plan, unit)


def _safety_summary(plan, unit) -> list[str]:
    """One line each for the terrain check and the landable coverage (details on page two)."""
    out = []
    clearance = unit.fmt_height(plan.scenario.safety.terrain_clearance_m)
    t = plan.terrain
    if plan.terrain_source is not None:
        if t is None or t.lowest is None:
            text = "final glide **not checked** over the terrain"
        else:
            if plan.terrain_ok:
                text = f"final glide clears the terrain by {clearance} or more"
            else:
                text = f"final glide **not cleared or not checked everywhere** (clearance {clearance})"
            text += (f"; least {unit.fmt_height(t.min_clearance_m)} at {unit.fmt_distance(t.at_m)}")
            if t.raised_by_m > 0.0 and t.obstacle is not None:
                text += f"; the terrain raises its start by {unit.fmt_height(t.raised_by_m)}"
        out.append(f"- **Terrain**: {text}.")
    c = plan.landables
    if c is not None:
        gaps = len(c.gaps)
        out.append(f"- **Fields**: a landable in reach from the band bottom on {c.coverage_percent:.0f}% of the task"
                   + (f"; {gaps} gap{'s' if gaps != 1 else ''}, "
                      f"{unit.fmt_distance(sum(b - a for a, b in c.gaps))} in all." if gaps else "; no gaps."))
    return out


def band_top_reach_m(plan) -> float:
    """How far out (distance still to go [m]) a final glide from the band top gets home on
    this plan: the heights needed at each turnpoint and the finish, linear between them
    (:func:`glidetask.engine.finalglide.reach_from_height_m`)."""
    from glidetask.engine.finalglide import reach_from_height_m

    to_go = plan.planned_distance_m - np.asarray(plan.path.cumulative_m, dtype=float)
    required = [leg.required_height_m for leg in plan.legs] + [plan.arrival_floor_m]
    return reach_from_height_m(to_go[:len(required)], required, plan.scenario.day.band_top_m)


def need_cell(plan, required_m: float, unit) -> str:
    """A "Need" cell: the height where it is a final glide within the band, else "above"."""
    text = cautions.need_text(required_m, plan.scenario.day.band_top_m, unit)
    return "above" if text is None else text


def need_note(plan, unit) -> str:
    """What "above" means on this plan: where a final glide from the band top starts."""
    return cautions.final_glide_from_top(band_top_reach_m(plan), plan.scenario.day.band_top_m, unit)


def _legs(plan, unit) -> list[str]:
    head = ["#", "Leg", f"Dist {unit.distance_label}", "Crs", f"Climb {unit.vertical_label}", "MC",
            f"IAS {unit.speed_label}", f"TAS {unit.speed_label}", "Hdg", f"Glide {unit.speed_label}",
            f"Avg {unit.speed_label}", "Time", "At", f"Need {unit.height_label}", f"Arrive {unit.height_label}"]
    rows = []
    for i, leg in enumerate(plan.legs, start=1):
        rows.append([
            str(i), f"{leg.from_name} > {leg.to_name}", f"{unit.distance(leg.distance_m):.1f}",
            f"{leg.course_deg:03.0f}", _num(unit.vertical(leg.climb_ms), "{:.1f}"),
            _num(unit.vertical(leg.mc_ms), "{:.1f}") + (" FG" if leg.final_glide else ""),
            _num(unit.speed(leg.indicated_airspeed_ms)), _num(unit.speed(leg.airspeed_ms)),
            _num(leg.heading_deg, "{:03.0f}"),
            _num(unit.speed(leg.glide_ground_speed_ms)), _num(unit.speed(leg.average_speed_ms)),
            format_duration(leg.time_s) if math.isfinite(leg.time_s) else "-",
            format_clock(leg.start_time_s) if math.isfinite(leg.start_time_s) else "-",
            need_cell(plan, leg.required_height_m, unit), _num(unit.height(leg.arrival_height_m))])
    notes = ("Climb and MC: the leg's first thermal (FG: flown in final glide, at its setting). IAS (to fly), TAS, "
             "Hdg, Glide: in the glides, heading set so the climbs' drift is made good. Avg: the leg's distance over "
             "its time. At: clock time at the leg's start. Need: height to final-glide home from there, within the "
             f"band (above: more than the band top; {need_note(plan, unit)}). Arrive: planned height at the leg's end.")
    return ["## Legs", ""] + _table(head, rows, right=2) + ["", f"<small>{notes}</small>"]


def _heights(plan, unit) -> list[str]:
    settings = CARD_MC_MS if unit.name == "metric" else CARD_MC_KT
    card = final_glide_card(plan, settings)
    names = [leg.from_name for leg in plan.legs] + [plan.legs[-1].to_name]
    planned = [leg.required_height_m for leg in plan.legs] + [plan.arrival_floor_m]
    head = ["Turnpoint", "To go", "Plan"] + [f"MC {unit.vertical(m):.0f}" for m in settings]
    to_go = plan.planned_distance_m - plan.path.cumulative_m
    rows = []
    for i, name in enumerate(names):
        rows.append([name, unit.fmt_distance(to_go[i]), need_cell(plan, planned[i], unit)]
                    + [need_cell(plan, card[j, i], unit) for j in range(len(settings))])
    speeds = heights_card_speeds(plan, settings)
    rows.append([f"Fly on the last leg ({unit.speed_label} IAS)", "", *(_num(unit.speed(v)) if math.isfinite(v)
                                                                         else "-" for v in speeds)])
    margin = unit.fmt_height(plan.scenario.safety.arrival_margin_m)
    return ["## Heights needed to get home", "",
            f"Final glide from each turnpoint over the rest of the task in the day's wind, arriving {margin} over the "
            f"finish; {unit.height_label} MSL. *Plan*: at the plan's final-glide setting there; MC columns: at that "
            f"MacCready setting ({unit.vertical_label}). Above the band top ({unit.fmt_height(plan.scenario.day.band_top_m)}) "
            f"a final glide is no plan: {need_note(plan, unit)}. The last row: the speed to fly on the last leg, "
            f"*Plan* as the plan's final glide flies it, the MC columns from the band top.", ""] + _table(head, rows)


def final_glide_speed_text(plan, unit) -> str:
    """``, fly 169 km/h IAS (178 TAS)`` for a final glide on one leg; per leg when it spans
    several (``, fly leg 2 150, leg 3 169 km/h IAS``); empty without a final glide."""
    legs = [leg for leg in final_glide_speeds(plan) if math.isfinite(leg.indicated_airspeed_ms)]
    if not legs:
        return ""
    if len(legs) == 1:
        return (f", fly {unit.fmt_speed(legs[0].indicated_airspeed_ms)} IAS "
                f"({unit.speed(legs[0].airspeed_ms):.0f} TAS)")
    each = ", ".join(f"leg {leg.leg + 1} {unit.speed(leg.indicated_airspeed_ms):.0f}" for leg in legs)
    return f", fly {each} {unit.speed_label} IAS"


def circling_words(scenario, unit) -> tuple[str, str] | None:
    """The best circle in the day's strongest thermals in two halves (the circle; what the
    air and the glider do on it), the text plan's two lines and the briefing's sentence; None
    on a day with no lift."""
    card = day_circling(scenario)
    if card is None:
        return None
    best, v = card.solution, unit.vertical
    return (f"circling at {format_clock(card.time_s)}: core {unit.fmt_vertical(card.strength_ms)} on the thermal's "
            f"axis; {best.bank_deg:.0f} deg bank at {unit.fmt_speed(card.indicated_airspeed_ms)} IAS, circle "
            f"{unit.fmt_height(best.turn_radius_m)} in radius,",
            f"where the air rises {v(best.updraft_ms):.1f} (the netto reading) and the glider sinks "
            f"{v(best.sink_ms):.1f}: climb {unit.fmt_vertical(best.climb_ms)}")


def circling_text(scenario, unit) -> str:
    """One sentence: the best circle in the day's strongest thermals, or empty with no lift."""
    words = circling_words(scenario, unit)
    if words is None:
        return ""
    sentence = " ".join(words)
    return sentence[0].upper() + sentence[1:] + "."


def _day(plan, unit) -> list[str]:
    day, safety = plan.scenario.day, plan.scenario.safety
    profile = day.climb if day.climb is not None else day.thermal_strength
    kind = "Achieved climb" if day.climb is not None else "Thermal strength (circling model gives the climb)"
    lift = ", ".join(f"{format_clock(t)} {unit.fmt_vertical(v)}" for t, v in zip(profile.times_s, profile.values))
    wind = wind_text(day.wind, unit, words=True, band=(day.band_bottom_m, day.band_top_m))
    mc = "the climb of each thermal" if day.mc_ms is None else unit.fmt_vertical(day.mc_ms)
    fg = "the cruise setting at that moment" if safety.final_glide_mc_ms is None else \
        unit.fmt_vertical(safety.final_glide_mc_ms)
    return [
        "## Day assumed", "",
        f"- Start {format_clock(day.start_time_s)} at {unit.fmt_height(day.effective_start_height_m)}; working band "
        f"{unit.fmt_height(day.band_bottom_m)} to {unit.fmt_height(day.band_top_m)}; wind {wind}.",
        f"- {kind}: {lift}; lift ends {format_clock(day.lift_ends_s)}.",
        f"- Air in the glides {unit.fmt_vertical(day.glide_airmass_ms)} (negative: sinking); ISA "
        f"{day.isa_deviation_c:+g} C.",
        f"- MacCready: {mc}; final glide at {fg}; arrival margin {unit.fmt_height(safety.arrival_margin_m)} over "
        f"the finish ({unit.fmt_height(plan.arrival_floor_m)}).",
        f"- Practical speeds: {day.centring_s:g} s centring each climb, the path flown {day.detour_percent:g} % "
        f"longer, circling at {day.stall_margin:g} times the banked stall speed (all common practice); thermals "
        f"{unit.fmt_height(day.effective_thermal_radius_m)} in radius ({day.thermal_radius_source}).",
    ] + ([f"- {text}"] if (text := circling_text(plan.scenario, unit)) else [])


#: Wind levels shown: up to this far above the highest thermal top [m].
WIND_ABOVE_TOP_M = 1000.0


def derived_day_markdown(source, unit) -> list[str]:
    """The "Day from the sounding" section for a plan whose day comes from a sounding
    (:class:`glidetask.engine.sounding_inputs.DaySource`): where it comes from, the hourly table
    (surface temperature and dew point, thermal top, cloud base or blue, the band, w* and
    thermal strength), the lift, the wind profile through the band and the sounding's
    cautions, in ``unit``. Empty for a typed day."""
    if source is None:
        return []
    from glidetask.formats.sounding_file import source_summary

    derived = source.derived
    h, v = unit.height_label, unit.vertical_label
    lines = ["## Day from the sounding", "",
             f"The day {source_summary(source)}. Ground {unit.fmt_height(derived.surface_elevation_m)}; band top "
             f"{unit.fmt_height(derived.band_top_margin_m)} below cloud base or thermal top, band bottom "
             f"{unit.fmt_height(derived.band_bottom_agl_m)} above the ground; heights MSL.", ""]
    head = ["Time", "Surface C", f"Thermal top {h}", f"Cloud base {h}", f"Band {h}", f"w* {v}", f"Strength {v}"]
    rows = []
    for i, time_s in enumerate(derived.times_s):
        base = _num(unit.height(derived.cloud_base_m[i])) if derived.cumulus[i] else "blue"
        band = "-" if not math.isfinite(derived.band_top_m[i]) else \
            f"{unit.height(derived.band_bottom_m[i]):.0f}-{unit.height(derived.band_top_m[i]):.0f}"
        rows.append([format_clock(time_s), f"{derived.surface_temperature_c[i]:.1f}/{derived.surface_dewpoint_c[i]:.1f}",
                     _num(unit.height(derived.thermal_top_m[i])), base, band,
                     f"{unit.vertical(derived.wstar_ms[i]):.1f}", f"{unit.vertical(derived.thermal_strength_ms[i]):.1f}"])
    lines += _table(head, rows)
    if derived.lift_start_s is None:
        lift = f"none: the surface never reaches the trigger temperature of {derived.trigger_temperature_c:.1f} C"
    else:
        lift = (f"{format_clock(derived.lift_start_s)} to {format_clock(derived.lift_end_s)} (trigger temperature "
                f"{derived.trigger_temperature_c:.1f} C)")
    lines += ["", f"Lift {lift}. Surface temperature/dew point in C; w*: the convective velocity scale; strength: "
                  f"the thermal core strength the circling model turns into this glider's climb."]
    tops = derived.thermal_top_m[np.isfinite(derived.thermal_top_m)]
    ceiling = (float(tops.max()) if tops.size else derived.surface_elevation_m) + WIND_ABOVE_TOP_M
    wind_rows = [[_num(unit.height(w.height_m)), f"{w.from_deg:03.0f}", _num(unit.speed(w.speed_ms))]
                 for w in derived.wind if w.height_m <= ceiling]
    lines += ["", f"Wind from the sounding (up to {unit.fmt_height(WIND_ABOVE_TOP_M)} above the highest thermal top):",
              ""] + _table([f"Height {h}", "From deg", f"Speed {unit.speed_label}"], wind_rows, right=0)
    if source.inputs is not None and "wind" in source.derived_keys:
        wind = source.inputs.wind
        lines += ["", f"The plan flies the mean wind of the highest band, from {wind.from_deg:03.0f} at "
                      f"{unit.fmt_speed(wind.speed_ms)}."]
    lines += ["", "Cautions of the derived day:", ""]
    lines += [f"> - {text}" for text in cautions.day_source_cautions(source, unit)]
    return lines


def _sensitivity(sensitivity, unit) -> list[str]:
    if sensitivity is None:
        return []
    return ["", *sensitivity_markdown(sensitivity, unit).rstrip("\n").splitlines()]


def _without_cautions(section: str) -> list[str]:
    """A safety section's lines without its quoted cautions (they are in the Cautions list)."""
    lines = [line for line in section.rstrip("\n").splitlines() if not line.startswith("> - ")]
    while lines and not lines[-1].strip():
        lines.pop()
    return lines


def _safety_pages(plan, unit) -> list[str]:
    """Page two: the final glide over the terrain and the landable fields; empty without either."""
    lines: list[str] = []
    if plan.terrain_source is not None:
        if plan.terrain is not None:
            lines += _without_cautions(terrain_markdown(plan.terrain, unit, table=False))
        else:
            lines += ["## Final glide over the terrain", "", f"Elevation model: `{plan.terrain_source}`.", "",
                      "Not checked: the plan has no final glide."]
        path = plan.terrain_path
        if path is not None and path.profile.covered_share < 1.0:
            missing = ", ".join(f"{unit.fmt_distance(a)} to {unit.fmt_distance(b)}"
                                for a, b in path.profile.uncovered_ranges())
            lines += ["", f"The model covers {100.0 * path.profile.covered_share:.0f}% of the planned path; "
                          f"no data from {missing}: the heights needed there do not allow for the terrain."]
    if plan.landables is not None:
        names = [(leg.from_name, leg.to_name) for leg in plan.legs]
        lines += ([""] if lines else []) + _without_cautions(landables_markdown(plan.landables, unit, names))
    return lines


def _profile_page(plan, unit) -> list[str]:
    """The planned height of the whole flight as text art, in a code block (legible printed)."""
    art = profile_ascii(plan, unit)
    return ["## Planned profile", "", "```", *art.splitlines(), "```", ""] if art else []


def _airspace_page(plan, unit) -> list[str]:
    """The airspace section: band caps and conflicts; empty without airspace."""
    check = plan.airspace
    if check is None:
        return []
    lines = ["## Airspace", "", f"Airspace file: `{check.source}`; margin "
             f"{unit.fmt_height(plan.scenario.safety.airspace_margin_m)} below floors and above ceilings.", ""]
    rows = [["capped", c.name, "", f"{unit.fmt_distance(c.from_m)} to {unit.fmt_distance(c.to_m)}",
             f"top {unit.fmt_height(c.top_m)}"] for c in check.caps]
    rows += [["**conflict**", c.name, str(c.leg), f"{unit.fmt_distance(c.from_m)} to {unit.fmt_distance(c.to_m)}",
              f"planned {unit.fmt_height(c.planned_min_m)} to {unit.fmt_height(c.planned_max_m)}"]
             for c in check.conflicts]
    if not rows:
        return lines + ["The planned flight meets no volume in the file."]
    return lines + _table(["", "volume", "leg", "stretch", "heights"], rows, right=5)


def plan_to_markdown(plan, unit_name: str = "metric", sensitivity=None) -> str:
    """The briefing for ``plan`` as Markdown text, in metric or aviation units.

    Parameters
    ----------
    plan : glidetask.engine.plan.Plan
    unit_name : str
        ``"metric"`` or ``"aviation"``.
    sensitivity : glidetask.engine.sensitivity.Sensitivity, optional
        The task time under what-ifs (:func:`glidetask.engine.sensitivity.plan_sensitivity`);
        a table on page one when given.
    """
    unit = units.by_name(unit_name)
    lines = _summary(plan, unit) + [""] + _legs(plan, unit) + [""] + _heights(plan, unit) + [""] + _day(plan, unit)
    lines += _sensitivity(sensitivity, unit)
    flight = _profile_page(plan, unit) + _airspace_page(plan, unit)
    if flight:  # a page of its own: the whole flight's profile and its airspace
        lines += ["", PAGE_BREAK, ""] + flight
    safety = _safety_pages(plan, unit)
    day = derived_day_markdown(plan.scenario.day_source, unit)
    for page in (safety, day):
        if page:
            lines += ["", PAGE_BREAK, ""] + page
    lines += ["", "## Cautions", ""] + [f"- {text}" for text in cautions.plan_cautions(plan, unit)]
    return "\n".join(lines) + "\n"
