"""The pre-flight briefing in Markdown: the plan as a pilot takes it to the glider.

Page one: the task and the verdict (with the terrain and landable verdicts in a line
each), the legs table, the heights needed at each turnpoint to get home (at the plan's
final-glide setting and at MacCready 0, 1, 2 and 3), the day the plan assumes, and how
the task time answers to the day (sensitivity). Page two, when the task has an elevation
model or landable fields: the final glide over the terrain (verdict, what decided the
height, an ASCII profile), the landable fields along the task (coverage, gaps,
alternates per leg); then the cautions. Each page prints on one sheet (a page break
between them for printing from HTML).
"""

from __future__ import annotations

import math

from glidetask import cautions, units
from glidetask.engine.plan import CARD_MC_MS, final_glide_card
from glidetask.formats.safety_report import landables_markdown, terrain_markdown
from glidetask.formats.strategy_report import sensitivity_markdown
from glidetask.formats.wind_text import wind_text
from glidetask.units import KNOT, format_clock, format_duration

CARD_MC_KT = tuple(k * KNOT for k in (0.0, 2.0, 4.0, 6.0))  # the aviation card's settings [m/s]
PAGE_BREAK = '<div style="page-break-before: always"></div>'


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
                 f"MacCready {unit.fmt_vertical(plan.final_glide_mc_ms)}.")
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


def _legs(plan, unit) -> list[str]:
    head = ["#", "Leg", f"Dist {unit.distance_label}", "Crs", f"Climb {unit.vertical_label}", "MC",
            f"Air {unit.speed_label}", "Hdg", f"Glide {unit.speed_label}", f"Avg {unit.speed_label}", "Time", "At",
            f"Need {unit.height_label}", f"Arrive {unit.height_label}"]
    rows = []
    for i, leg in enumerate(plan.legs, start=1):
        rows.append([
            str(i), f"{leg.from_name} > {leg.to_name}", f"{unit.distance(leg.distance_m):.1f}",
            f"{leg.course_deg:03.0f}", _num(unit.vertical(leg.climb_ms), "{:.1f}"),
            _num(unit.vertical(leg.mc_ms), "{:.1f}") + (" FG" if leg.final_glide else ""),
            _num(unit.speed(leg.airspeed_ms)), _num(leg.heading_deg, "{:03.0f}"),
            _num(unit.speed(leg.glide_ground_speed_ms)), _num(unit.speed(leg.cruise_speed_ms)),
            format_duration(leg.time_s) if math.isfinite(leg.time_s) else "-",
            format_clock(leg.start_time_s) if math.isfinite(leg.start_time_s) else "-",
            _num(unit.height(leg.required_height_m)), _num(unit.height(leg.arrival_height_m))])
    notes = ("Climb and MC: the leg's first thermal (FG: flown in final glide, at its setting). Air, Hdg, Glide: "
             "in the glides, heading set so the climbs' drift is made good. Avg: with climbs. At: clock time at the "
             "leg's start. Need: height to final-glide home from there. Arrive: planned height at the leg's end.")
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
        rows.append([name, unit.fmt_distance(to_go[i]), _num(unit.height(planned[i]))]
                    + [_num(unit.height(card[j, i])) for j in range(len(settings))])
    margin = unit.fmt_height(plan.scenario.safety.arrival_margin_m)
    return ["## Heights needed to get home", "",
            f"Final glide from each turnpoint over the rest of the task in the day's wind, arriving {margin} over the "
            f"finish; {unit.height_label} MSL. *Plan*: at the plan's final-glide setting there; MC columns: at that "
            f"MacCready setting ({unit.vertical_label}).", ""] + _table(head, rows)


def _day(plan, unit) -> list[str]:
    day, safety = plan.scenario.day, plan.scenario.safety
    profile = day.climb if day.climb is not None else day.thermal_strength
    kind = "Achieved climb" if day.climb is not None else "Thermal strength (circling model gives the climb)"
    lift = ", ".join(f"{format_clock(t)} {unit.fmt_vertical(v)}" for t, v in zip(profile.times_s, profile.values))
    wind = wind_text(day.wind, unit, words=True)
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
    ]


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
    safety = _safety_pages(plan, unit)
    if safety:
        lines += ["", PAGE_BREAK, ""] + safety
    lines += ["", "## Cautions", ""] + [f"- {text}" for text in cautions.plan_cautions(plan, unit)]
    return "\n".join(lines) + "\n"
