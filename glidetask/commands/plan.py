"""``glidetask plan TASK.toml``: the task flown on paper (contract 4 and 5.3).

The what-if options (``--mc-ms``, ``--ballast-kg``, ``--bugs-percent``, ``--wind``,
``--start``) replace the task file's values for this plan only. Text output shows the
legs table, the totals, where the final glide starts, the heights needed at each
turnpoint, the final glide over the terrain (with a ``[terrain]`` model), the landable
fields in reach along the task, how the task time answers to the day (sensitivity), the
verdict and the cautions; ``--json`` prints the contract's object with ``terrain``,
``landables`` and ``sensitivity``.
"""

from __future__ import annotations

import argparse
import math

from glidetask import cautions, units
from glidetask.cli import CMDLINE, check_number, parse_wind, what_if_problems
from glidetask.commands._output import caution_block, print_json
from glidetask.errors import InputError, Problem
from glidetask.formats.wind_text import wind_text


def option_problems(args: argparse.Namespace) -> list[Problem]:
    """Range checks of the what-if options (shared with ``export``); parsed values go on ``args``."""
    problems = (check_number(args, "mc-ms", minimum=0.0, maximum=10.0)
                + check_number(args, "ballast-kg", minimum=0.0)
                + check_number(args, "bugs-percent", minimum=0.0, maximum=100.0))
    args.wind_value = args.start_s = None
    if args.wind is not None:
        try:
            args.wind_value = parse_wind(args.wind)
        except InputError as error:
            problems += error.problems
    if args.start is not None:
        try:
            args.start_s = units.parse_clock(args.start)
        except ValueError as error:
            problems.append(Problem(CMDLINE, "--start", str(error)))
    return problems


def plan_from_args(args: argparse.Namespace, problems: list[Problem] | None = None):
    """Read the task file, check the options against it, and plan (shared with ``export``).

    Every problem is reported together: ``problems`` found by the caller, the options',
    the task file's, and the what-ifs' against the task (e.g. ballast above the polar's
    maximum).
    """
    from glidetask.engine.plan import plan
    from glidetask.engine.scenario import WhatIfError, Wind, with_what_ifs
    from glidetask.formats.task_file import load_scenario

    problems = list(problems or []) + option_problems(args)
    scenario = None
    try:
        scenario = load_scenario(args.task)
    except InputError as error:
        problems += error.problems
    wind = None
    if args.wind_value is not None:
        wind = Wind(from_deg=args.wind_value[0], speed_ms=args.wind_value[1] * units.KMH)
    what_ifs = dict(mc_ms=args.mc_ms, ballast_kg=args.ballast_kg, bugs_percent=args.bugs_percent, wind=wind,
                    start_time_s=args.start_s)
    if scenario is not None:
        try:
            with_what_ifs(scenario, **what_ifs)
        except WhatIfError as error:  # what the options' own checks have not said already
            said = {(p.file, p.where) for p in problems}
            problems += [p for p in what_if_problems(error) if (p.file, p.where) not in said]
    if problems:
        raise InputError(problems)
    return plan(scenario, **what_ifs)


# ---------------------------------------------------------------- text


def _fmt(value: float, fmt: str = "{:.0f}") -> str:
    return "-" if value is None or not math.isfinite(value) else fmt.format(value)


def _header(plan, unit: units.UnitSystem) -> list[str]:
    scenario = plan.scenario
    task, day, safety, glider = scenario.task, scenario.day, scenario.safety, scenario.glider
    dist = unit.fmt_distance
    lines = [f"{task.name}  ({task.kind} task, {len(plan.legs)} legs)"]
    distances = f"optimized {dist(plan.optimized_distance_m)}, nominal {dist(plan.nominal_distance_m)}"
    if plan.area is not None:
        area = plan.area
        distances = (f"planned {dist(area.target_distance_m)} (areas allow {dist(area.min_distance_m)}"
                     f" to {dist(area.max_distance_m)}), minimum time {units.format_duration(area.min_time_s)}")
    lines.append(f"  Distance  {distances}")
    lines.append(f"  Glider    {glider.spec.label}")
    lines.append(f"            {plan.mass_kg:.0f} kg ({glider.ballast_kg:g} kg water, bugs {glider.bugs_percent:g} %), "
                 f"{plan.wing_loading_kgm2:.1f} kg/m2, best L/D {plan.best_ld:.0f} at "
                 f"{unit.fmt_speed(plan.best_ld_speed_ms)} TAS")
    profile = day.climb if day.climb is not None else day.thermal_strength
    kind = "climb" if day.climb is not None else "thermal strength"
    lift = ", ".join(f"{units.format_clock(t)} {unit.vertical(v):.1f}" for t, v in zip(profile.times_s, profile.values))
    wind = wind_text(day.wind, unit, band=(day.band_bottom_m, day.band_top_m))
    top = unit.fmt_height(day.band_top_m)
    if day.band_top_profile is not None:
        top = f"{unit.fmt_height(day.band_top_at(day.start_time_s))} at the start (highest {top})"
    lines.append(f"  Day       start {units.format_clock(day.start_time_s)} at "
                 f"{unit.fmt_height(day.effective_start_height_m)}, band {unit.fmt_height(day.band_bottom_m)}"
                 f" - {top}, wind {wind}")
    lines.append(f"            {kind} [{unit.vertical_label}] {lift}; lift ends {units.format_clock(day.lift_ends_s)}")
    lines += _source_lines(scenario.day_source)
    mc = "the climb of each thermal" if day.mc_ms is None else unit.fmt_vertical(day.mc_ms)
    fg = "the cruise setting" if safety.final_glide_mc_ms is None else unit.fmt_vertical(safety.final_glide_mc_ms)
    lines.append(f"            MacCready {mc}; final glide at {fg}; arrival "
                 f"{unit.fmt_height(safety.arrival_margin_m)} over the finish "
                 f"({unit.fmt_height(plan.arrival_floor_m)})")
    lines.append(f"            centring {day.centring_s:g} s a climb, detour {day.detour_percent:g} %, circling at "
                 f"{day.stall_margin:g} x the banked stall speed (common practice)")
    lines.append(f"            thermals {unit.fmt_height(day.effective_thermal_radius_m)} in radius "
                 f"({day.thermal_radius_source})")
    lines += circling_lines(scenario, unit)
    return lines


def circling_lines(scenario, unit: units.UnitSystem) -> list[str]:
    """The best circle in the day's strongest thermals: the core, what the variometer reads on
    the circle, the sink in the turn and the climb (empty on a day with no lift)."""
    from glidetask.formats.briefing import circling_words  # lazily: the plan's text only

    words = circling_words(scenario, unit)
    return [] if words is None else [f"            {half}" for half in words]


def _source_lines(source) -> list[str]:
    from glidetask.formats.sounding_file import source_summary

    text = source_summary(source)
    return [] if text is None else [f"            day {text}"]


def _legs_table(plan, unit: units.UnitSystem) -> list[str]:
    head = ("Leg", "Dist", "Crs", "Climb", "MC", "IAS", "TAS", "Hdg", "Glide", "Avg", "Time", "Need", "Arrive", "")
    sub = ("", unit.distance_label, "deg", unit.vertical_label, unit.vertical_label, unit.speed_label,
           unit.speed_label, "deg", unit.speed_label, unit.speed_label, "h:mm", unit.height_label, unit.height_label, "")
    from glidetask.formats.briefing import need_cell, need_note  # lazily: the plan's text only
    rows = []
    number = len(str(len(plan.legs)))
    for i, leg in enumerate(plan.legs, start=1):
        name = f"{i:>{number}} {leg.from_name} > {leg.to_name}"
        rows.append((
            name[:40], f"{unit.distance(leg.distance_m):.1f}", f"{leg.course_deg:03.0f}",
            _fmt(unit.vertical(leg.climb_ms), "{:.1f}"), _fmt(unit.vertical(leg.mc_ms), "{:.1f}"),
            _fmt(unit.speed(leg.indicated_airspeed_ms)), _fmt(unit.speed(leg.airspeed_ms)),
            _fmt(leg.heading_deg, "{:03.0f}"),
            _fmt(unit.speed(leg.glide_ground_speed_ms)), _fmt(unit.speed(leg.average_speed_ms)),
            units.format_duration(leg.time_s) if math.isfinite(leg.time_s) else "-",
            # a final glide only from within the band: above its top the height means nothing to fly
            need_cell(plan, leg.required_height_m, unit),
            _fmt(unit.height(leg.arrival_height_m)),
            "FG" if leg.final_glide else ""))
    widths = [max(len(r[c]) for r in (head, sub, *rows)) for c in range(len(head))]

    def line(cells):
        first = cells[0].ljust(widths[0])
        return ("  " + "  ".join([first] + [cell.rjust(w) for cell, w in zip(cells[1:], widths[1:])])).rstrip()

    out = [line(head), line(sub)] + [line(r) for r in rows]
    out.append("  Climb, MC: the leg's first thermal (FG: leg flown in final glide, MC its setting). IAS (to fly),")
    out.append("  TAS, Hdg, Glide: in the glides, heading set to make good the climbs' drift. Avg: the leg's")
    out.append("  distance over its time. Need: height to final-glide home from the leg's start, within the band")
    out.append(f"  (above: more than the band top; {need_note(plan, unit)}).")
    out.append("  Arrive: planned height at its end.")
    return out


def _totals(plan, unit: units.UnitSystem) -> list[str]:
    from glidetask.formats.briefing import final_glide_speed_text  # lazily: the plan's text only

    lines = []
    if plan.finished:
        lines.append(f"Total     {units.format_duration(plan.total_time_s)} for {unit.fmt_distance(plan.planned_distance_m)}"
                     f" at {unit.fmt_speed(plan.task_speed_ms)} task speed; finish "
                     f"{units.format_clock(plan.finish_time_s)}")
    else:
        lines.append(f"Total     ends short after {units.format_duration(plan.total_time_s)}, "
                     f"{unit.fmt_distance(plan.landout_m)} along the task")
    if math.isfinite(plan.final_glide_from_m):
        to_go = plan.planned_distance_m - plan.final_glide_from_m
        lines.append(f"Final     glide from {unit.fmt_distance(plan.final_glide_from_m)} ({unit.fmt_distance(to_go)}"
                     f" out) at {unit.fmt_height(plan.final_glide_height_m)}, MacCready "
                     f"{unit.fmt_vertical(plan.final_glide_mc_ms)}{final_glide_speed_text(plan, unit)}")
    return lines


def _required_card(plan, unit: units.UnitSystem) -> list[str]:
    names = [leg.from_name for leg in plan.legs] + [plan.legs[-1].to_name]
    heights = [leg.required_height_m for leg in plan.legs] + [plan.arrival_floor_m]
    terrain = ""
    if plan.terrain_source is not None:
        terrain = f", clearing the terrain by {unit.fmt_height(plan.scenario.safety.terrain_clearance_m)}"
    out = [f"Heights needed to final-glide home (arrival {unit.fmt_height(plan.scenario.safety.arrival_margin_m)}"
           f" over the finish{terrain}, each at the plan's final-glide setting there):"]
    width = max(len(n) for n in names)
    from glidetask.formats.briefing import need_cell, need_note  # lazily: the plan's text only
    for name, height in zip(names, heights):
        cell = need_cell(plan, height, unit)
        out.append(f"  {name.ljust(width)}  {cell.rjust(6)}" + (f" {unit.height_label}" if cell[0].isdigit() else ""))
    if any(not cautions.need_text(h, plan.scenario.day.band_top_m, unit) for h in heights):
        out.append(f"  above: more than the band top ({unit.fmt_height(plan.scenario.day.band_top_m)}); "
                   f"{need_note(plan, unit)}")
    return out


def verdict(plan, unit: units.UnitSystem) -> str:
    """One line: finished (when, how fast) or where and why the plan ends short."""
    if plan.finished:
        return (f"FINISHED at {units.format_clock(plan.finish_time_s)} in {units.format_duration(plan.total_time_s)}"
                f", {unit.fmt_speed(plan.task_speed_ms)}.")
    return f"ENDS SHORT {unit.fmt_distance(plan.landout_m)} along the task: {plan.reason}."


def terrain_section(plan, unit: units.UnitSystem) -> list[str]:
    """The final glide over the terrain: verdict, least clearance, what decided the height,
    and a small profile; empty without an elevation model."""
    from glidetask.formats import safety_report

    if plan.terrain_source is None:
        return []
    if plan.terrain is None:
        return [f"Final glide over the terrain (model {plan.terrain_source})",
                "  not checked: the plan has no final glide"]
    lines = safety_report.terrain_text(plan.terrain, unit).splitlines()
    path = plan.terrain_path
    if path is not None and path.profile.covered_share < 1.0:
        missing = ", ".join(f"{unit.fmt_distance(a)} to {unit.fmt_distance(b)}"
                            for a, b in path.profile.uncovered_ranges())
        lines.append(f"  {'planned path':<17} the model covers {100.0 * path.profile.covered_share:.0f}%; "
                     f"no data from {missing}")
    if plan.terrain.lowest is not None:
        lines += [""] + ["  " + row for row in
                         safety_report.terrain_profile_ascii(plan.terrain, unit, width=60, height=10).splitlines()]
    return lines


def profile_section(plan, unit: units.UnitSystem) -> list[str]:
    """The planned height of the whole flight as text art (formats/profile_art.py)."""
    from glidetask.formats.profile_art import profile_ascii

    art = profile_ascii(plan, unit)
    return ["Planned profile (height along the task)"] + ["  " + row for row in art.splitlines()] if art else []


def airspace_section(plan, unit: units.UnitSystem) -> list[str]:
    """The band caps and conflicts of the plan under its airspace; empty without airspace."""
    check = plan.airspace
    if check is None:
        return []
    lines = [f"Airspace ({check.source}, margin {unit.fmt_height(plan.scenario.safety.airspace_margin_m)})"]
    lines += [f"  capped     {c.name}: top {unit.fmt_height(c.top_m)} from {unit.fmt_distance(c.from_m)} "
              f"to {unit.fmt_distance(c.to_m)}" for c in check.caps]
    lines += [f"  CONFLICT   leg {c.leg}, {c.name}: {unit.fmt_distance(c.from_m)} to {unit.fmt_distance(c.to_m)}, "
              f"planned {unit.fmt_height(c.planned_min_m)} to {unit.fmt_height(c.planned_max_m)}"
              for c in check.conflicts]
    if len(lines) == 1:
        lines.append("  the planned flight meets no volume in the file")
    return lines


def landables_section(plan, unit: units.UnitSystem) -> list[str]:
    """Landable coverage from the band bottom: coverage, gaps, alternates per leg."""
    from glidetask.formats import safety_report

    if plan.landables is None:
        return []
    names = [(leg.from_name, leg.to_name) for leg in plan.legs]
    return safety_report.landables_text(plan.landables, unit, leg_names=names).splitlines()


def sensitivity_section(sensitivity, unit: units.UnitSystem) -> list[str]:
    from glidetask.formats.strategy_report import sensitivity_text

    return [] if sensitivity is None else sensitivity_text(sensitivity, unit).splitlines()


def plan_text(plan, unit_name: str = "metric", sensitivity=None) -> str:
    """The readable plan: header, legs, totals, heights card, terrain and landable sections,
    the sensitivity table (when given), verdict, cautions."""
    unit = units.by_name(unit_name)
    lines = _header(plan, unit) + [""] + _legs_table(plan, unit) + [""] + _totals(plan, unit)
    lines += [""] + _required_card(plan, unit)
    for section in (profile_section(plan, unit), terrain_section(plan, unit), airspace_section(plan, unit),
                    landables_section(plan, unit),
                    sensitivity_section(sensitivity, unit)):
        if section:
            lines += [""] + section
    lines += ["", verdict(plan, unit), ""]
    lines.append(caution_block(cautions.plan_cautions(plan, unit)[len(cautions.GENERAL):]))
    return "\n".join(lines)


def run(args: argparse.Namespace) -> int:
    from glidetask.engine.sensitivity import plan_sensitivity

    plan = plan_from_args(args)
    sensitivity = plan_sensitivity(plan)
    if args.json:
        from glidetask.formats.plan_json import plan_to_dict

        print_json(plan_to_dict(plan, sensitivity))
    else:
        print(plan_text(plan, args.units, sensitivity))
    return 0
