"""The plan: a whole task flown on paper, leg by leg, into a :class:`Plan`.

:func:`plan` applies the what-ifs to a :class:`~glidetask.engine.scenario.Scenario`,
chooses the planned path (the optimized path of a racing task; for an area task the
target points that bring the planned time to the minimum time or just above it), flies
it with the vectorised flight core (:func:`glidetask.engine.flight.fly`, one flight) and
gathers what a pilot reads before take-off: per leg the climb and MacCready setting,
airspeed, heading, ground speeds, time, the height required at its start and the height
planned on reaching its end; the totals, where the final glide starts, and cautions.
The rules of the flight are the contract's section 3 (see :mod:`glidetask.engine.flight`).

The core's inputs for a scenario and a path are :func:`glidetask.engine.flight.flights_for`
and :func:`glidetask.engine.flight.course_for`, shared with the ballast sweep and the
Monte-Carlo days, which vary them per flight.

Safety over the ground: when the task names an elevation model (``[terrain] file``) the
plan samples it along every path it flies (:func:`glidetask.engine.clearance_hook.path_terrain`),
lets it raise the final-glide requirement wherever the terrain ahead demands more height
than the arrival margin, and reports the final glide over the terrain from the same
samples (:attr:`Plan.terrain`). Whenever the turnpoint collection has landable fields it
reports the coverage along the planned path from the band bottom
(:func:`glidetask.engine.reach_coverage.coverage`, :attr:`Plan.landables`).

References
----------
.. [1] FAI Sporting Code Section 3 (Gliding), Annex A: assigned-area tasks are scored
   on the marking distance over the greater of the task time and the minimum task time
   (from memory).
"""

from __future__ import annotations

import dataclasses
import math

import numpy as np

from glidetask.engine import flight
from glidetask.engine import task as task_geometry
from glidetask.engine import task_search
from glidetask.engine.atmosphere import density_ratio
from glidetask.engine.flight import Flown, course_for, flights_for, fly
from glidetask.engine.landing_fields import landing_fields
from glidetask.engine.plan_airspace import airspace_check, corridor
from glidetask.engine.plan_ground import ground_facts
from glidetask.engine.plan_notices import ground_notices, plan_notices
from glidetask.engine.plan_result import AreaPlan, LegPlan, Notice, Plan
from glidetask.engine.plan_safety import check_model_covers, load_terrain_for, terrain_requirement, with_safety
from glidetask.engine.scenario import Scenario, Wind, with_what_ifs

#: The plan's types live in :mod:`glidetask.engine.plan_result`; they are importable from here too.
__all__ = ["AREA_TIME_SLACK", "CARD_MC_MS", "AreaPlan", "LegPlan", "Notice", "Plan", "final_glide_card", "plan"]

AREA_TIME_SLACK = 0.05  # planned area-task time within [min time, (1 + this) x min time]
CARD_MC_MS = (0.0, 1.0, 2.0, 3.0)  # MacCready settings of the briefing's final-glide card


# ---------------------------------------------------------------- the plan


def plan(scenario: Scenario, *, mc_ms=None, ballast_kg=None, bugs_percent=None, wind: Wind | None = None,
         start_time_s=None, requirement_for=None, memo=None) -> Plan:
    """Fly the scenario's task on paper.

    Parameters
    ----------
    scenario : Scenario
        Task, glider, day and margins (from :func:`glidetask.formats.task_file.load_scenario`).
    mc_ms : float, optional
        Fixed MacCready setting [m/s] instead of the day's.
    ballast_kg, bugs_percent : float, optional
        Water ballast [kg] and bugs [%] instead of the task file's.
    wind : Wind, optional
        The wind instead of the day's.
    start_time_s : float, optional
        Start time [s after midnight] instead of the day's.
    requirement_for : callable, optional
        ``requirement_for(scenario, path) -> RequirementHook or None``: extra final-glide
        height along a candidate path (see :data:`glidetask.engine.flight.RequirementHook`),
        asked once per path flown. Default: the task's elevation model, if it has one
        (:func:`glidetask.engine.plan_safety.terrain_requirement`).
    memo : callable, optional
        ``memo(kind, key, compute)``: keeps the terrain sampled along a path and the
        landable coverage by the values they depend on (``plan_safety.Memo``); the
        terminal UI's recompute passes one, as it replans on every edit. None: computed.

    Returns
    -------
    Plan
        A plan that ends short (wind too strong, no lift) is a result: ``finished``
        false, ``landout_m`` and a caution that says why. With an elevation model the
        plan carries the final glide checked over the terrain (``terrain``); with landable
        turnpoints, the coverage along the planned path (``landables``).

    Raises
    ------
    InputError
        What-ifs that make the inputs inconsistent (see :func:`with_what_ifs`); an
        elevation model that cannot be read or does not cover the task at all (named
        ``[terrain] file`` of the task file).
    """
    scenario = with_what_ifs(scenario, mc_ms=mc_ms, ballast_kg=ballast_kg, bugs_percent=bugs_percent, wind=wind,
                             start_time_s=start_time_s)
    model = load_terrain_for(scenario)
    if requirement_for is None and model is not None:
        requirement_for = terrain_requirement(model, memo)
    elif requirement_for is None:  # no terrain: a land-out ends in the field it reaches
        requirement_for = landing_fields
    if scenario.airspace is not None:  # the band top capped under the task's airspace (plan_airspace)
        requirement_for = _under_airspace(requirement_for, model)
    task = scenario.task
    flights = flights_for(scenario)
    optimized = task_search.optimized_path(task)
    area = None
    notes: list[str] = []
    hooks: list[tuple[object, object]] = []  # (path, hook) of every path flown

    def fly_path(path):
        hook = None if requirement_for is None else requirement_for(scenario, path)
        hooks.append((path, hook))
        return fly(course_for(path, scenario.day.detour_percent), flights, requirement=hook, record=True)

    if task.kind == "area":
        path, flown, area, notes = _area_path(scenario, fly_path)
    else:
        path, flown = optimized, fly_path(optimized)
    hook = next(h for p, h in hooks if p is path)
    if model is not None:
        check_model_covers(scenario, model, hook)
    result = _assemble(scenario, path, flown, task_geometry.nominal_distance_m(task), optimized.total_m, area, notes)
    profile, floors, uncovered, landout = ground_facts(scenario, path, flown, hook)
    result = dataclasses.replace(result, profile=profile, floors=floors, uncovered=uncovered, landout=landout)
    result = with_safety(result, hook, model, memo)
    result = dataclasses.replace(result, notices=ground_notices(result))
    return dataclasses.replace(result, airspace=airspace_check(result))


def _under_airspace(requirement_for, model):
    """``requirement_for`` wrapped in the airspace corridor of each path flown."""
    def corridor_for(scenario, path):
        inner = None if requirement_for is None else requirement_for(scenario, path)
        return corridor(scenario, path, inner, model)
    return corridor_for


def _area_path(scenario: Scenario, fly_path):
    """Targets of an area task: the depth whose planned time is in [T, 1.05 T] (T the minimum
    time) when the areas allow; else the longest path (too short) or the shortest (too long).

    The time grows with the depth (the path with it), so a bracketing secant search on
    ``time(depth) - 1.025 T`` finds it in a few flights.
    """
    task = scenario.task
    minimum = float(task.min_time_s)
    shortest, longest = task_search.area_distance_range(task)

    def attempt(depth):
        lats, lons = task_search.area_targets(task, float(depth))
        path = task_geometry.path_through(task, lats, lons)
        flown = fly_path(path)
        time = float(flown.total_time_s[0]) if flown.finished[0] else math.inf
        return depth, path, flown, time

    def good(time):
        return minimum <= time <= (1.0 + AREA_TIME_SLACK) * minimum

    low = attempt(0.0)
    notes: list[Notice] = []
    if low[3] >= minimum:
        chosen = low
        if low[3] > (1.0 + AREA_TIME_SLACK) * minimum and math.isfinite(low[3]):
            notes.append(Notice("areas_too_long", dict(distance_m=shortest, time_s=low[3], min_time_s=minimum)))
    else:
        high = attempt(1.0)
        chosen = high
        if high[3] < minimum:
            notes.append(Notice("areas_too_short", dict(distance_m=longest, time_s=high[3], min_time_s=minimum)))
        elif not good(high[3]):
            chosen = _bisect_depth(attempt, low, high, minimum)
    depth, path, flown, _ = chosen
    area = AreaPlan(shortest, longest, path.total_m, minimum, float(depth))
    return path, flown, area, notes


def _bisect_depth(attempt, low, high, minimum, tries: int = 14):
    """Regula falsi (Illinois) on the depth between a too-short ``low`` and a too-long ``high``."""
    target = (1.0 + AREA_TIME_SLACK / 2.0) * minimum
    f_low, f_high = low[3] - target, min(high[3], 10.0 * minimum) - target
    side = 0
    best = high
    for _ in range(tries):
        depth = (low[0] * f_high - high[0] * f_low) / (f_high - f_low)
        if not low[0] < depth < high[0]:
            depth = 0.5 * (low[0] + high[0])
        trial = attempt(depth)
        if minimum <= trial[3] <= (1.0 + AREA_TIME_SLACK) * minimum:
            return trial
        f_trial = min(trial[3], 10.0 * minimum) - target
        if f_trial < 0.0:
            low, f_low = trial, f_trial
            f_high = f_high / 2.0 if side == -1 else f_high
            side = -1
        else:
            high, f_high, best = trial, f_trial, trial
            f_low = f_low / 2.0 if side == 1 else f_low
            side = 1
    return best


def _assemble(scenario, path, flown: Flown, nominal_m, optimized_m, area, notes) -> Plan:
    day = scenario.day
    polar = scenario.glider.polar_at(day.band_middle_m, day.isa_deviation_c)
    legs = _legs(path, flown, float(density_ratio(day.band_middle_m, day.isa_deviation_c)))
    finished = bool(flown.finished[0])
    total = float(flown.total_time_s[0])
    planned = path.total_m
    if not finished:
        speed = math.nan
    elif area is not None:
        speed = planned / max(total, area.min_time_s)
    else:
        speed = optimized_m / total
    plan = Plan(
        scenario=scenario, path=path, legs=legs, nominal_distance_m=nominal_m, optimized_distance_m=optimized_m,
        planned_distance_m=planned, area=area, mass_kg=float(scenario.glider.mass_kg),
        wing_loading_kgm2=float(polar.wing_loading_kgm2), best_ld=float(polar.best_ld),
        best_ld_speed_ms=float(polar.best_ld_speed_ms), total_time_s=total, task_speed_ms=speed,
        finished=finished, finish_time_s=float(flown.finish_time_s[0]), landout_m=float(flown.landout_m[0]),
        final_glide_from_m=float(flown.final_glide_from_m[0]), final_glide_height_m=float(flown.final_glide_height_m[0]),
        final_glide_mc_ms=float(flown.final_glide_mc_ms[0]), reason=flight.REASONS[int(flown.reason[0])],
        notices=(), flown=flown)
    return dataclasses.replace(plan, notices=tuple(notes) + plan_notices(plan))


def _legs(path, flown: Flown, band_sigma: float) -> tuple[LegPlan, ...]:
    """The plan's legs from the flight core's records (one flight); NaN where not reached.
    ``band_sigma``: the density ratio at the band middle (the cruise's)."""
    reached = np.isfinite(flown.leg_entry_time_s[0])
    out = []
    for i, leg in enumerate(path.legs):
        def value(name):
            return float(getattr(flown, name)[0, i]) if reached[i] else math.nan
        out.append(LegPlan(
            from_name=leg.from_name, to_name=leg.to_name, distance_m=float(leg.distance_m),
            course_deg=float(leg.course_deg), climb_ms=value("leg_climb_ms"), mc_ms=value("leg_mc_ms"),
            airspeed_ms=value("leg_airspeed_ms"), heading_deg=value("leg_heading_deg"),
            glide_ground_speed_ms=value("leg_ground_speed_ms"), cruise_speed_ms=value("leg_cruise_speed_ms"),
            time_s=value("leg_time_s"), required_height_m=value("leg_required_height_m"),
            arrival_height_m=float(flown.leg_arrival_height_m[0, i]), final_glide=bool(flown.leg_final[0, i]),
            start_time_s=float(flown.leg_entry_time_s[0, i]),
            indicated_airspeed_ms=value("leg_airspeed_ms") * math.sqrt(
                float(flown.final_glide_sigma[0]) if flown.leg_final[0, i] else band_sigma),
            average_speed_ms=float(leg.distance_m) / value("leg_time_s") if value("leg_time_s") > 0.0 else math.nan))
    return tuple(out)


# ---------------------------------------------------------------- cards


def final_glide_card(plan: Plan, mc_values=CARD_MC_MS) -> np.ndarray:
    """Required height [m MSL] at each turnpoint of the planned path (each leg's start and
    the finish) for a final glide home at each MacCready setting, shape (len(mc_values), L+1).

    Each final glide is computed as in the plan: the day's wind per leg, the arrival
    margin, the density at the middle of its start and arrival heights, and the terrain
    ahead when the plan has an elevation model.
    """
    return flight.requirement_card(course_for(plan.path, plan.scenario.day.detour_percent), flights_for(plan.scenario), mc_values,
                                   requirement=plan.requirement)[0]
