"""The speeds to fly on a plan's final glide, leg by leg: what the pilot sets on the final glide.

The flight core flies the final glide at the plan's final-glide MacCready setting, with the
polar at the final glide's density (:func:`glidetask.engine.finalglide.density_height_m`) and
each leg's wind at that height. This module gives the same speeds as figures to fly: the
indicated airspeed beside the true one, the heading's ground speed, per leg of the glide.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from glidetask.engine.atmosphere import ias_from_tas, ias_from_tas_at
from glidetask.engine.finalglide import density_height_m
from glidetask.engine.polar import scaled_polar
from glidetask.engine.speedtofly import glide_in_wind
from glidetask.engine.wind import wind_components


@dataclass(frozen=True)
class FinalGlideLeg:
    """The final glide on one leg.

    Attributes
    ----------
    leg : int
        The leg's index in the plan (0 = first leg).
    from_m, to_m : float
        Where on the planned path the final glide flies this leg [m along the task].
    indicated_airspeed_ms, airspeed_ms : float
        The speed to fly [m/s IAS] and [m/s TAS]; NaN where no speed makes progress.
    ground_speed_ms : float
        Along the course [m/s].
    """

    leg: int
    from_m: float
    to_m: float
    indicated_airspeed_ms: float
    airspeed_ms: float
    ground_speed_ms: float


def flown_final_glide(scenario, path, flown):
    """The final glide on every leg as the flight core flew it: ``(GlideSolution over the
    legs, sigma)``, or None without a final glide.

    The final glide's own polar (at its density, ``flown.final_glide_sigma``) and setting
    (``flown.final_glide_mc_ms``), the day's air-mass motion in the glides, and each leg's
    course in the wind at the middle of the final glide's start height and its arrival floor,
    as the core takes them. The one place this glide is solved again after the flight
    (:func:`glidetask.engine.plan_safety.final_glide_per_metre` reads its height per metre).
    """
    sigma, mc = float(flown.final_glide_sigma[0]), float(flown.final_glide_mc_ms[0])
    if not (math.isfinite(sigma) and math.isfinite(mc)):
        return None
    day, glider = scenario.day, scenario.glider
    floor = scenario.task.points[-1].turnpoint.elevation_m + scenario.safety.arrival_margin_m
    wind = day.wind_at(density_height_m(float(flown.final_glide_height_m[0]), floor))
    along, across = wind_components(np.array([leg.course_deg for leg in path.legs]), wind.from_deg, wind.speed_ms)
    polar = scaled_polar(glider.spec, glider.mass_kg, glider.bugs_percent, sigma)
    return glide_in_wind(polar, mc, along, across, day.glide_airmass_ms), sigma


def final_glide_speeds(plan) -> tuple[FinalGlideLeg, ...]:
    """The speed to fly on each leg of the plan's final glide; empty when it has none.

    Parameters
    ----------
    plan : glidetask.engine.plan.Plan

    Notes
    -----
    MacCready speed to fly for a pure glide holding the leg's course
    (:func:`glidetask.engine.speedtofly.glide_in_wind`), as :func:`flown_final_glide` solves it.
    """
    start = plan.final_glide_from_m
    flown = flown_final_glide(plan.scenario, plan.path, plan.flown)
    if flown is None or not math.isfinite(start):
        return ()
    glide, sigma = flown
    count = len(plan.path.legs)
    airspeed = np.broadcast_to(np.asarray(glide.airspeed_ms, dtype=float), (count,))
    ground = np.broadcast_to(np.asarray(glide.ground_speed_ms, dtype=float), (count,))
    cumulative = plan.path.cumulative_m
    out = []
    for i in range(count):
        begin, end = max(float(cumulative[i]), start), float(cumulative[i + 1])
        if end <= begin:
            continue
        out.append(FinalGlideLeg(
            leg=i, from_m=begin, to_m=end, indicated_airspeed_ms=float(ias_from_tas_at(airspeed[i], sigma)),
            airspeed_ms=float(airspeed[i]), ground_speed_ms=float(ground[i])))
    return tuple(out)


def heights_card_speeds(plan, mc_values) -> list[float]:
    """The heights card's last row [m/s IAS]: the speed to fly on the last leg as the plan's
    own final glide flies it (NaN where that glide does not reach the last leg), then at each
    setting of ``mc_values`` from the band top (:func:`last_leg_speeds_to_fly`)."""
    own = [leg for leg in final_glide_speeds(plan) if leg.leg == len(plan.legs) - 1]
    return [own[0].indicated_airspeed_ms if own else math.nan, *last_leg_speeds_to_fly(plan, mc_values)]


def last_leg_speeds_to_fly(plan, mc_values) -> np.ndarray:
    """The speed to fly [m/s IAS] on the task's last leg at each MacCready setting, for the
    heights card's columns: a final glide from the band top, the polar and the wind at the
    middle of the band top and the arrival floor (NaN where no speed makes progress)."""
    scenario = plan.scenario
    day = scenario.day
    height = float(density_height_m(day.band_top_m, plan.arrival_floor_m))
    polar = scenario.glider.polar_at(height, day.isa_deviation_c)
    wind = day.wind_at(height)
    along, across = wind_components(plan.path.legs[-1].course_deg, wind.from_deg, wind.speed_ms)
    glide = glide_in_wind(polar, np.asarray(mc_values, dtype=float), along, across, day.glide_airmass_ms)
    return np.asarray(ias_from_tas(glide.airspeed_ms, height, day.isa_deviation_c), dtype=float)
