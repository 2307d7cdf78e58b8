"""The facts about a plan that a pilot must be told (:class:`~glidetask.engine.plan_result.Notice`:
a code and SI numbers, no words): why it ends short, a tight day, a thin margin, a final
glide at MacCready 0, the land-out's field and place, each raised floor.
:func:`glidetask.cautions.plan_cautions` words them.
"""

from __future__ import annotations

import math

import numpy as np

from glidetask.engine import flight
from glidetask.engine.clearance import TerrainPoint, nearest_landmark
from glidetask.engine.plan_ground import point_at
from glidetask.engine.plan_result import LegPlan, Notice, Plan

TIGHT_DAY_S = 1800.0  # caution when the last climb ends this close to the end of lift [s]
THIN_MARGIN_M = 150.0  # caution for an arrival margin below this [m] (common practice)


def _leg_at(plan: Plan, distance_m: float) -> LegPlan:
    """The leg of the planned path at a distance along it."""
    bounds = plan.path.cumulative_m
    return plan.legs[int(np.clip(np.searchsorted(bounds, distance_m, side="right") - 1, 0, len(plan.legs) - 1))]


_WHY_SHORT = {flight.LIFT_ENDED: "lift_ended", flight.NO_CLIMB: "no_climb", flight.UNREACHABLE: "wind_too_strong",
              flight.BELOW_FLOOR: "below_floor", flight.TERRAIN_ABOVE_BAND: "terrain_above_band"}


def plan_notices(plan: Plan) -> tuple[Notice, ...]:
    """The facts about this plan a pilot must be told (worded by
    :func:`glidetask.cautions.plan_cautions`), in the order they are shown."""
    day, flown = plan.scenario.day, plan.flown
    reason = int(flown.reason[0])
    stop = float(flown.stop_time_s[0])
    floor = plan.arrival_floor_m
    out: list[Notice] = []
    if not plan.finished:
        leg = _leg_at(plan, plan.landout_m)
        out.append(Notice("ends_short", dict(
            why=_WHY_SHORT.get(reason, "other"), stop_time_s=stop, lift_ends_s=day.lift_ends_s,
            wind_from_deg=day.wind_at(day.band_middle_m).from_deg, wind_speed_ms=day.wind_at(day.band_middle_m).speed_ms,
            at_m=plan.landout_m,
            leg_from=leg.from_name, leg_to=leg.to_name, floor_m=floor)))
    elif reason != flight.FINAL_GLIDE:
        out.append(Notice("lift_ends_before_final_glide", dict(
            stop_time_s=stop, final_glide_from_m=plan.final_glide_from_m,
            above_margin_m=plan.legs[-1].arrival_height_m - floor)))
    last_climb = plan.last_climb_end_s
    if plan.finished and reason == flight.FINAL_GLIDE and math.isfinite(last_climb):
        spare = day.lift_ends_s - last_climb
        if spare < TIGHT_DAY_S:
            out.append(Notice("tight_day", dict(last_climb_end_s=last_climb, spare_s=spare,
                                                lift_ends_s=day.lift_ends_s)))
    if plan.area is not None and plan.finished and plan.total_time_s < plan.area.min_time_s:
        out.append(Notice("under_min_time", dict(time_s=plan.total_time_s, min_time_s=plan.area.min_time_s)))
    margin = plan.scenario.safety.arrival_margin_m
    if margin < THIN_MARGIN_M:
        out.append(Notice("thin_margin", dict(margin_m=margin)))
    if plan.finished and math.isfinite(plan.final_glide_mc_ms) and plan.final_glide_mc_ms == 0.0:
        out.append(Notice("final_glide_at_mc0"))
    if day.glide_airmass_ms > 0.0:
        out.append(Notice("rising_air_counted", dict(airmass_ms=day.glide_airmass_ms)))
    return tuple(out)


def ground_notices(plan: Plan) -> tuple[Notice, ...]:
    """The facts of the whole flight over the ground: the land-out's field, each raised floor.

    The ``ends_short`` notice (first when the plan ends short) gets the land-out and, when
    terrain above the band stopped the flight, the place (nearest turnpoint, bearing, terrain).
    """
    out: list[Notice] = []
    notices = list(plan.notices)
    if plan.landout is not None and notices and notices[0].code == "ends_short":
        facts = dict(notices[0].facts)
        landout = plan.landout
        facts.update(field=landout.field, field_elevation_m=landout.elevation_m,
                     terrain=plan.terrain_source is not None)
        if facts["why"] == "terrain_above_band" or plan.terrain_source is not None:
            lat, lon = point_at(plan.path, landout.at_m)
            landmarks = plan.scenario.turnpoints or tuple(p.turnpoint for p in plan.scenario.task.points)
            near, near_m, near_deg = nearest_landmark(lat, lon, landmarks)
            ground = math.nan
            if plan.profile is not None and np.any(np.isfinite(plan.profile.terrain_m)):
                ground = float(np.interp(landout.at_m, plan.profile.distance_m, plan.profile.terrain_m))
            facts["place"] = TerrainPoint(landout.at_m, lat, lon, ground, plan.scenario.safety.terrain_clearance_m,
                                          ground + plan.scenario.safety.terrain_clearance_m, near, near_m, near_deg)
        notices[0] = Notice("ends_short", facts)
    for floor in plan.floors:
        out.append(Notice("raised_floor", dict(from_m=floor.from_m, to_m=floor.to_m, floor_m=floor.floor_m,
                                               band_bottom_m=plan.scenario.day.band_bottom_m,
                                               band_top_m=plan.scenario.day.band_top_m)))
    # plan.notices is replaced whole: the amended ends_short first, then the rest, then the floors
    return tuple(notices[:1]) + tuple(out) + tuple(notices[1:]) if notices else tuple(out)
