"""What the flight core records per flight and per leg once the flights are done
(:class:`glidetask.engine.flight_simulation.Simulation`): the height required at each
leg's start, the airspeed, heading and ground speed of each leg's glides and its cruise
speed, and the fields of :class:`glidetask.engine.flight.Flown`.

:class:`LegRecords` is a part of :class:`~glidetask.engine.flight_simulation.Simulation`
(its state is there); it is kept in its own module by concern.
"""

from __future__ import annotations

import numpy as np

from glidetask.engine.atmosphere import density_ratio
from glidetask.engine.finalglide import density_height_m
from glidetask.engine.flight_requirement import polar_rows
from glidetask.engine.polar import scaled_polar
from glidetask.engine.speedtofly import cruise_in_wind, glide_in_wind
from glidetask.engine.wind import correction_angle_deg, ground_speed


class LegRecords:
    """The records of the flights, read off their state once they are done.

    Methods of :class:`glidetask.engine.flight_simulation.Simulation` (see its docstring).
    """

    def leg_requirements(self):
        """Required height at each leg's start reached [m MSL], shape (N, L).

        Legs entered in the final glide take it from the final glide's own table, so the
        requirement there is what that glide plans to pass with. The others are what a final
        glide from the leg's start would need at the setting in force then, with the density
        of its own start and arrival heights (one solve for all of them).
        """
        reached = np.isfinite(self.leg_entry) & np.isfinite(self.leg_final_mc)
        gliding_home = np.arange(self.legs)[None, :] > self.flown_final_leg[:, None]
        gliding_home &= (self.flown_final_leg >= 0)[:, None] & reached
        required = np.full((self.n, self.legs), np.nan)
        pairs = np.argwhere(gliding_home)
        if pairs.size:
            rows, legs = pairs[:, 0], pairs[:, 1]
            required[rows, legs] = self.required(rows, legs, np.zeros(rows.size))
        pairs = np.argwhere(reached & ~gliding_home)
        if pairs.size:
            rows, legs = pairs[:, 0], pairs[:, 1]
            zero = np.zeros(rows.size)
            per_metre, _, tail, _ = self.final_table(rows, legs, zero, self.leg_final_mc[rows, legs])
            required[rows, legs] = self.required(rows, legs, zero, per_metre, tail)
        return required

    def leg_speeds(self):
        """Airspeed, heading and ground speed in each leg's glides, and its cruise speed, at
        the settings the leg was flown with, shape (N, L) each (see :class:`Flown`)."""
        inputs, every = self.inputs, np.arange(self.n)
        climb, mc, final = self.leg_climb, self.leg_mc, self.leg_final
        airmass = self.airmass[:, None]
        band = polar_rows(self.band_polar, every)
        cruise = cruise_in_wind(band, climb, self.wind_along, self.wind_across, airmass, np.maximum(np.nan_to_num(mc), 0.0),
                                *self._climb_wind())
        v, fraction = np.asarray(cruise.airspeed_ms), np.asarray(cruise.glide_fraction)
        with np.errstate(invalid="ignore", divide="ignore"):
            # air velocity across the course in the glides (contract 3)
            drift_fix = self._cycle_drift_fix(self.wind_across, fraction, self.climb_across)
            cruise_ground = np.asarray(ground_speed(v, self.wind_along, drift_fix))
        cruise_heading = np.mod(self.course_deg[None, :] - np.asarray(correction_angle_deg(v, drift_fix)), 360.0)
        sigma = np.where(np.isfinite(self.flown_final_sigma), self.flown_final_sigma, density_ratio(0.0))
        final_polar = polar_rows(scaled_polar(self.spec, inputs["mass_kg"], inputs["bugs_percent"], sigma), every)
        final_along, final_across = self.wind_along, self.wind_across
        if self.aloft.varies:  # the final glide's wind at its middle height, where one was flown
            flown = self.flown_final_leg >= 0
            mid = density_height_m(np.where(flown, self.flown_final_height, inputs["band_top_m"]), self.floor)
            final_along, final_across = (np.where(flown[:, None], x, y) for x, y in zip(
                self.aloft.at(every, mid), (self.wind_along, self.wind_across)))
        pure = glide_in_wind(final_polar, np.where(final, np.nan_to_num(mc), 0.0), final_along, final_across, airmass)
        best = glide_in_wind(band, 0.0, self.wind_along, self.wind_across, airmass)
        pure_heading = _heading(self.course_deg, pure.airspeed_ms, final_across)
        best_heading = _heading(self.course_deg, best.airspeed_ms, self.wind_across)
        no_climb = ~(climb > 0.0)  # a glide with no climb ahead (before the lift starts): best glide

        def pick(final_value, best_value, cruise_value):
            return np.where(final, final_value, np.where(no_climb, best_value, cruise_value))

        shape = (self.n, self.legs)
        return (np.broadcast_to(pick(pure.airspeed_ms, best.airspeed_ms, v), shape).copy(),
                np.broadcast_to(pick(pure_heading, best_heading, cruise_heading), shape).copy(),
                np.broadcast_to(pick(pure.ground_speed_ms, best.ground_speed_ms, cruise_ground), shape).copy(),
                np.broadcast_to(np.asarray(cruise.cruise_speed_ms, dtype=float), shape).copy())

    def result(self, detail: bool = True) -> dict:
        """The fields of :class:`glidetask.engine.flight.Flown` (``detail``: see :func:`~glidetask.engine.flight.fly`)."""
        start = self.inputs["start_time_s"]
        finish = np.where(self.finished, self.end_time, np.nan)
        required = self.leg_requirements() if detail else np.full((self.n, self.legs), np.nan)
        speeds = self.leg_speeds() if detail else tuple(np.full((self.n, self.legs), np.nan) for _ in range(4))
        return dict(
            finished=self.finished.copy(), reason=self.reason.copy(), total_time_s=self.end_time - start,
            finish_time_s=finish, end_time_s=self.end_time.copy(), stop_time_s=self.stop_time.copy(),
            landout_m=np.where(self.finished, np.nan, self.landout_at / self.detour),
            landout_leg=np.where(self.finished, -1, self.landout_leg),
            landout_field=np.where(self.finished, -1, self.landout_field),
            final_glide_from_m=self.flown_final_from / self.detour, final_glide_height_m=self.flown_final_height.copy(),
            final_glide_mc_ms=self.flown_final_mc.copy(), final_glide_sigma=self.flown_final_sigma.copy(),
            final_glide_leg=self.flown_final_leg.copy(), climbs=self.climbs.copy(),
            last_climb_end_s=self.last_climb_end.copy(), leg_time_s=self.leg_time.copy(),
            leg_entry_time_s=self.leg_entry.copy(), leg_arrival_height_m=self.leg_arrival.copy(),
            leg_required_height_m=required, leg_climb_ms=self.leg_climb.copy(),
            leg_mc_ms=self.leg_mc.copy(), leg_final=self.leg_final.copy(), leg_airspeed_ms=speeds[0],
            leg_heading_deg=speeds[1], leg_ground_speed_ms=speeds[2], leg_cruise_speed_ms=speeds[3],
        )


def _heading(course_deg, airspeed_ms, across_ms):
    """The heading that holds each leg's course with this crosswind [deg true] (the wind
    triangle, :func:`glidetask.engine.wind.heading_for_course`); NaN where it cannot."""
    v = np.asarray(airspeed_ms, dtype=float)
    across = np.asarray(across_ms, dtype=float)
    angle = correction_angle_deg(v, across)
    return np.mod(np.asarray(course_deg, dtype=float)[None, :] - np.asarray(angle), 360.0)
