"""How the glider circles in the day's best thermals: the figures a pilot can compare with
the variometer.

The circling model (:mod:`glidetask.engine.circling`) takes a thermal's core strength, the
updraft on its axis, which no glider flies; the variometer in a centred turn reads the air's
rise on the circle flown, and the glider climbs by that less its sink in the turn. The card
shows all three, with the bank, the speed and the circle, for the glider as loaded.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from glidetask.engine.atmosphere import ias_from_tas
from glidetask.engine.circling import ClimbSolution, achieved_climb, strength_for_climb
from glidetask.engine.scenario import Scenario


@dataclass(frozen=True)
class CirclingCard:
    """The best circle in the day's strongest thermals.

    Attributes
    ----------
    time_s : float
        When the day's lift profile peaks [s after midnight] (the first such time).
    strength_ms : float
        The thermal core strength then [m/s] (converted from the day's achieved climb at
        the task file's loading when the day is given as climbs).
    thermal_radius_m : float
        The thermal's e-folding radius the model uses [m].
    height_m : float
        The height the figures are for: the middle of the working band [m MSL].
    solution : ClimbSolution
        Bank, airspeed (TAS), circle radius, the air's rise on the circle, the sink in the
        turn and the climb.
    indicated_airspeed_ms : float
        The circling airspeed as indicated at ``height_m`` [m/s IAS].
    """

    time_s: float
    strength_ms: float
    thermal_radius_m: float
    height_m: float
    solution: ClimbSolution
    indicated_airspeed_ms: float


def day_circling(scenario: Scenario) -> CirclingCard | None:
    """The circling card for the glider as loaded, or None on a day with no lift.

    The strength follows the flight core's rule (:func:`glidetask.engine.flight.day_lift`):
    a day of thermal strengths is used as typed; a day of achieved climbs is turned into
    strengths through the loading it was given for, and this mass then climbs as the model
    says. Figures at the band middle's density, in the day's thermal radius, at the
    circling stall margin the plan uses.
    """
    from glidetask.engine.flight import day_lift  # the flight core's one rule for the day's lift

    day, glider = scenario.day, scenario.glider
    profile, is_strength = day_lift(scenario)
    values = np.asarray(profile.values, dtype=float)
    times = np.asarray(profile.times_s, dtype=float)
    if values.size == 0 or not np.nanmax(values) > 0.0:
        return None
    best = int(np.nanargmax(values))
    height = day.band_middle_m
    radius = day.effective_thermal_radius_m
    polar = glider.polar_at(height, day.isa_deviation_c)
    margin = day.stall_margin
    strength = float(values[best]) if is_strength else float(
        strength_for_climb(polar, values[best], radius, stall_margin=margin))
    solution = achieved_climb(polar, strength, radius, stall_margin=margin)
    return CirclingCard(
        time_s=float(times[best]),
        strength_ms=strength,
        thermal_radius_m=float(radius),
        height_m=float(height),
        solution=solution,
        indicated_airspeed_ms=float(ias_from_tas(solution.airspeed_ms, height, day.isa_deviation_c)),
    )
