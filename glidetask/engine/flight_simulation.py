"""The flight core's event loop: N flights moved on from event to event.

:class:`Simulation` holds the state of N flights over one course (shape (N,) per flight,
(N, L) per flight and leg) and the handlers of the events of contract section 3: glides
to the next turnpoint, the band bottom, the end of a search or the final-glide height;
climbs to the band top, the final-glide height, a turnpoint reached by drift or the end
of lift. How flights end is :class:`glidetask.engine.flight_endings.FlightEndings`,
what they record per leg :class:`glidetask.engine.flight_records.LegRecords`; the final-glide requirement comes from
:class:`glidetask.engine.flight_requirement.FinalGlideRequirement`, the achieved climb
from :class:`glidetask.engine.flight_lift.LiftClock`. :func:`glidetask.engine.flight.fly`
runs it; the model is described there.
"""

from __future__ import annotations

import numpy as np

from glidetask.engine.atmosphere import density_ratio
from glidetask.engine.flight_endings import (  # the reasons a flight ends and what each flight is doing
    BELOW_FLOOR, CLIMBING, DONE, GLIDING, LIFT_ENDED, NO_CLIMB, NO_THERMAL_FOUND, STARTING_CLIMB, TERRAIN_ABOVE_BAND,
    UNREACHABLE, UNRESOLVED, FlightEndings,
)
from glidetask.engine.flight_ground import GroundFloor
from glidetask.engine.flight_lift import LiftClock
from glidetask.engine.flight_records import LegRecords
from glidetask.engine.flight_requirement import FinalGlideRequirement, polar_rows
from glidetask.engine.flight_wind import WindAloft
from glidetask.engine.landing_fields import LandingFields
from glidetask.engine.polar import scaled_polar
from glidetask.engine.scenario import band_middle_m
from glidetask.engine.speedtofly import cruise_in_wind, glide_in_wind
from glidetask.engine.wind import ground_speed

class Simulation(FlightEndings, LegRecords, FinalGlideRequirement):
    """The state of N flights and the event handlers that move them on.

    State per flight (N,): ``mode`` (gliding, starting a climb, climbing, done), ``leg``,
    ``position`` along it [m], ``height`` [m MSL], ``time`` [s after midnight],
    ``stop_height`` (the band bottom, or the arrival floor while searching), the cycle's
    ``climb_rate``, ``cycle_mc``, ``cruise_airspeed``, ``glide_fraction`` and
    ``cruise_net_sink``; ``no_climb`` (gliding at best glide with no climb ahead).
    Per flight and leg (N, L): the wind components ``wind_along``/``wind_across``, the
    best glide's ``best_per_metre``/``best_ground_speed``, the cruise's ``cruise_speed``,
    the present final-glide table ``final_per_metre``/``final_ground_speed`` at
    ``final_mc`` and ``final_sigma`` with ``final_height_after`` (N, L+1): height used from
    each leg's start to the finish), and the ``leg_*`` records that become
    :class:`glidetask.engine.flight.Flown`. The ``flown_final_*`` arrays describe the final
    glide a flight actually flew.
    """

    def __init__(self, course, flights, search, requirement, record=False):
        inputs = flights.columns()
        # The ground under every glide and the band top under airspace (flight_ground), and the
        # first flight's path (flight_profile). A corridor hook carries its terrain and its ceiling.
        self.ceiling = getattr(requirement, "ceiling", None)
        if self.ceiling is not None:
            requirement = requirement.terrain
        # Without terrain a land-out ends in the field it reaches (landing_fields): no extra height.
        self.fields = requirement if isinstance(requirement, LandingFields) else None
        if self.fields is not None:
            requirement = None
        self.ground = GroundFloor.from_hook(requirement)
        self.trace = [] if record else None
        n, legs = inputs["mass_kg"].size, course.legs
        self.n, self.legs, self.spec = n, legs, flights.spec
        self.inputs, self.search_hook, self.requirement_hook = inputs, search, requirement
        # Inside the core distances are metres flown: the planned path's times the detour
        # factor; results and the requirement hook are in metres of the planned path.
        self.detour = course.detour_factor
        if self.detour != 1.0:  # the ground and airspace hooks work in metres of the planned path
            self.ground = None if self.ground is None else _InFlownMetres(self.ground, self.detour)
            self.ceiling = None if self.ceiling is None else _InFlownMetres(self.ceiling, self.detour)
        self.leg_length = course.distance_m * self.detour
        self.course_deg = course.course_deg
        self.leg_start = course.leg_start_m * self.detour
        self.aloft = WindAloft(inputs, self.course_deg, flights.wind_profile)
        self.wind_along, self.wind_across = self.aloft.cruise()  # the cruise's glides: at the band middle
        self.climb_along, self.climb_across = self.wind_along, self.wind_across  # the cycle's climbs
        if self.aloft.varies:  # the cycle climbs through the band; each climb drifts as it climbs
            self.climb_along, self.climb_across = self.aloft.mean(np.arange(n), inputs["band_bottom_m"],
                                                                  inputs["band_top_m"])
        self.drift_along = self.climb_along.copy()
        self.airmass = inputs["glide_airmass_ms"]
        self.floor = inputs["finish_elevation_m"] + inputs["arrival_margin_m"]
        self.band_sigma = np.asarray(density_ratio(band_middle_m(inputs["band_top_m"], inputs["band_bottom_m"]),
                                                   inputs["isa_deviation_c"]), dtype=float)
        self.band_polar = scaled_polar(flights.spec, inputs["mass_kg"], inputs["bugs_percent"], self.band_sigma)
        everyone = np.arange(n)
        best = glide_in_wind(polar_rows(self.band_polar, everyone), 0.0, self.wind_along, self.wind_across, self.airmass[:, None])
        self.best_per_metre = np.broadcast_to(best.height_per_metre, (n, legs))
        self.best_ground_speed = np.broadcast_to(best.ground_speed_ms, (n, legs))
        self.final_per_metre_bound = self._final_glide_bound()
        self.lift = LiftClock(flights, inputs, self.band_polar)
        self.band_top_times = np.atleast_1d(np.asarray(flights.band_top_times_s, dtype=float))
        self.band_top_values = np.atleast_1d(np.asarray(flights.band_top_values, dtype=float))
        if self.band_top_values.size != self.band_top_times.size or np.any(np.diff(self.band_top_times) <= 0.0):
            raise ValueError("the band top through the day needs one top per time and increasing times")
        self.flattest = np.min(np.where(self.best_per_metre > 0.0, self.best_per_metre, np.inf), axis=1)
        self._allocate(n, legs)
        self.time[:] = inputs["start_time_s"]
        self.height[:] = inputs["start_height_m"]
        self.stop_height[:] = inputs["band_bottom_m"]
        self.leg_entry[:, 0] = self.time
        self._set_cycle(everyone, self.lift.climb(everyone, self.time))
        self.leg_climb[:, 0], self.leg_mc[:, 0] = np.maximum(self.climb_rate, 0.0), self.cycle_mc
        self.leg_final_mc[:, 0] = self.final_mc
        self._mark(everyone, "glide")

    def _mark(self, rows, phase: str) -> None:
        """Record the first flight's position and height (a vertex of its planned profile)."""
        if self.trace is not None and rows.size and np.any(rows == 0):
            self.trace.append((float(self.leg_start[self.leg[0]] + self.position[0]) / self.detour, float(self.height[0]),
                               phase))

    def _allocate(self, n: int, legs: int) -> None:
        nan_n, nan_nl = (lambda: np.full(n, np.nan)), (lambda: np.full((n, legs), np.nan))
        self.mode = np.full(n, GLIDING)
        self.leg = np.zeros(n, dtype=int)
        self.position, self.time, self.height, self.stop_height = np.zeros(n), np.zeros(n), np.zeros(n), np.zeros(n)
        self.search_left_m = np.full(n, np.inf)
        self.searching = np.zeros(n, dtype=bool)
        self.climb_rate, self.cycle_mc, self.cruise_airspeed, self.glide_fraction, self.cruise_net_sink = (nan_n() for _ in range(5))
        self.no_climb = np.zeros(n, dtype=bool)
        self.final_mc, self.final_sigma = nan_n(), nan_n()
        self.final_per_metre, self.final_ground_speed, self.cruise_speed = nan_nl(), nan_nl(), nan_nl()
        self.final_height_after = np.full((n, legs + 1), np.nan)
        self.finished = np.zeros(n, dtype=bool)
        self.reason = np.full(n, UNRESOLVED)
        self.end_time, self.stop_time, self.landout_at, self.last_climb_end = nan_n(), nan_n(), nan_n(), nan_n()
        self.landout_leg, self.flown_final_leg = np.full(n, -1), np.full(n, -1)
        self.landout_field = np.full(n, -1)
        self.flown_final_from, self.flown_final_height, self.flown_final_mc, self.flown_final_sigma = nan_n(), nan_n(), nan_n(), nan_n()
        self.climbs = np.zeros(n, dtype=int)
        self.leg_time = np.where(np.arange(legs) == 0, 0.0, np.nan)[None, :].repeat(n, axis=0)
        self.leg_entry, self.leg_arrival, self.leg_final_mc = nan_nl(), nan_nl(), nan_nl()
        self.leg_climb, self.leg_mc = nan_nl(), nan_nl()
        self.leg_has_climb = np.zeros((n, legs), dtype=bool)
        self.leg_final = np.zeros((n, legs), dtype=bool)

    def _set_cycle(self, rows, rate) -> None:
        """Start a climb-and-glide cycle: its setting, cruise speeds and final-glide table."""
        inputs = self.inputs
        fixed = inputs["mc_ms"][rows]
        climbing = rate > 0.0
        mc = np.where(climbing, np.where(np.isnan(fixed), rate, fixed), 0.0)
        polar = polar_rows(self.band_polar, rows)
        cruise = cruise_in_wind(polar, rate[:, None], self.wind_along[rows], self.wind_across[rows],
                                self.airmass[rows, None], mc[:, None], *self._climb_wind(rows))
        v = np.asarray(cruise.airspeed_ms)[:, 0]
        self.climb_rate[rows], self.cycle_mc[rows], self.cruise_airspeed[rows], self.no_climb[rows] = rate, mc, v, ~climbing
        self.glide_fraction[rows] = np.asarray(cruise.glide_fraction)[:, 0]
        self.cruise_net_sink[rows] = np.asarray(polar.sink(v[:, None]))[:, 0] - self.airmass[rows]
        self.cruise_speed[rows] = cruise.cruise_speed_ms
        fixed_fg = inputs["final_glide_mc_ms"][rows]
        self.final_mc[rows] = np.where(np.isnan(fixed_fg), mc, fixed_fg)
        far = self._far_from_final(rows)
        self.final_per_metre[rows[far]], self.final_height_after[rows[far]] = np.nan, np.nan
        self._solve_final(rows[~far])

    def _climb_wind(self, rows=None):
        """The cycle's climb wind for :func:`cruise_in_wind` (along, across), or () when the
        wind is the same at every height (the glides' wind then)."""
        if not self.aloft.varies:
            return ()
        rows = slice(None) if rows is None else rows
        return self.climb_along[rows], self.climb_across[rows]

    def _cycle_drift_fix(self, across, fraction, climb_across):
        """Air velocity across the course in a cycle's glides that cancels the cycle's drift:
        ``Wn/f`` in one wind (contract 3), ``Gn + (1-f)/f Cn`` with the climbs in another."""
        if not self.aloft.varies:
            return across / fraction
        return across + (1.0 - fraction) / fraction * climb_across

    # ------------------------------------------------------------ the loop

    def step(self) -> bool:
        """One pass: every flight moves to its next event. False when all are done."""
        gliding = np.flatnonzero(self.mode == GLIDING)
        if gliding.size:
            self._glide(gliding)
        starting = np.flatnonzero(self.mode == STARTING_CLIMB)
        if starting.size:
            self._start_climb(starting)
        climbing = np.flatnonzero(self.mode == CLIMBING)
        if climbing.size:
            self._climb(climbing)
        return bool(np.any(self.mode != DONE))

    def _glide(self, rows) -> None:
        gap = self.height[rows] - self.required(rows)
        now = gap >= 0.0
        if now.any():
            self._final(rows[now])
            rows, gap = rows[~now], gap[~now]
        leg, position, height = self.leg[rows], self.position[rows], self.height[rows]
        along, across = self.wind_along[rows, leg], self.wind_across[rows, leg]
        with np.errstate(invalid="ignore", divide="ignore"):
            drift_fix = self._cycle_drift_fix(across, self.glide_fraction[rows], self.climb_across[rows, leg])
            cruise_ground_ms = np.asarray(ground_speed(self.cruise_airspeed[rows], along, drift_fix))
            pure = self.no_climb[rows]
            ground_speed_ms = np.where(pure, self.best_ground_speed[rows, leg], cruise_ground_ms)
            per_metre = np.where(pure, self.best_per_metre[rows, leg], self.cruise_net_sink[rows] / cruise_ground_ms)
        blocked = ~(ground_speed_ms > 0.0)
        if blocked.any():
            self._glide_on(rows[blocked], UNREACHABLE)
            keep = ~blocked
            rows, gap, leg, position, height = rows[keep], gap[keep], leg[keep], position[keep], height[keep]
            ground_speed_ms, per_metre = ground_speed_ms[keep], per_metre[keep]
        if not rows.size:
            return
        closing = self.final_per_metre[rows, leg] - per_metre  # the gap grows by this per metre
        with np.errstate(invalid="ignore", divide="ignore"):
            to_final = np.where(closing > 0.0, -gap / closing, np.inf)
            to_stop = np.where(per_metre > 0.0, np.maximum(height - self.stop_height[rows], 0.0) / per_metre, np.inf)
        to_leg_end = self.leg_length[leg] - position
        to_ground = np.full(rows.size, np.inf)
        if self.ground is not None:  # the glide stops where it would come closer to the ground than the clearance
            limit = np.minimum(np.minimum(to_leg_end, to_stop), np.minimum(self.search_left_m[rows], to_final))
            to_ground = self.ground.contact(self.leg_start[leg] + position, height, per_metre, limit, self.stop_height[rows])
        candidates = np.stack([to_final, to_leg_end, to_stop, self.search_left_m[rows], to_ground])
        event = np.argmin(candidates, axis=0)
        distance = candidates[event, np.arange(rows.size)]
        duration = distance / ground_speed_ms
        self.position[rows] = position + distance
        self.height[rows] = height - per_metre * distance
        self.time[rows] += duration
        self.leg_time[rows, leg] += duration
        self.search_left_m[rows] -= distance
        self._reached_requirement(rows[event == 0])
        self._leg_end(rows[event == 1])
        at_stop = rows[event == 2]
        self.height[at_stop] = self.stop_height[at_stop]
        self._mark(rows, "glide")
        self._reached_stop(at_stop)
        self._searched(rows[event == 3])
        self._reached_ground(rows[event == 4])

    def _reached_ground(self, rows) -> None:
        """A glide has come down to terrain + clearance: climb there, unless the band top is no higher."""
        if not rows.size:
            return
        blocked = self.height[rows] >= self._climb_top(rows) - 1e-6
        self._landed(rows[blocked], TERRAIN_ABOVE_BAND)
        self._reached_stop(rows[~blocked])

    def _reached_requirement(self, rows) -> None:
        """The height has come up to (or down onto) the requirement: the final glide starts."""
        if not rows.size:
            return
        self.height[rows] = np.maximum(self.height[rows], self.required(rows))
        self._final(rows)

    def _reached_stop(self, rows) -> None:
        """At the band bottom (or, while searching, at the arrival floor)."""
        if not rows.size:
            return
        failed = self.searching[rows]
        self._landed(rows[failed], NO_THERMAL_FOUND)
        rows = rows[~failed]
        if self.search_hook is not None and rows.size:
            distance = np.asarray(self.search_hook(rows, self.climbs[rows].copy()), dtype=float)
            distance = np.broadcast_to(distance, rows.shape)
            go = distance > 0.0
            on = rows[go]
            self.searching[on], self.search_left_m[on], self.stop_height[on] = True, distance[go], self.floor[on]
            self._solve_final(on[np.isnan(self.final_height_after[on, -1])])  # a search may reach the final glide
            rows = rows[~go]
        self.mode[rows] = STARTING_CLIMB

    def _searched(self, rows) -> None:
        if not rows.size:
            return
        self.searching[rows] = False
        self.search_left_m[rows] = np.inf
        self.stop_height[rows] = self.inputs["band_bottom_m"][rows]
        self.mode[rows] = STARTING_CLIMB

    def _start_climb(self, rows) -> None:
        t = self.time[rows]
        rate = self.lift.climb(rows, t)
        none = ~(rate > 0.0) | (t >= self.inputs["lift_ends_s"][rows])  # no time left to climb at the end of lift
        if none.any():
            ended = t[none] >= self.inputs["lift_ends_s"][rows[none]]
            self._glide_on(rows[none][ended], LIFT_ENDED)
            self._glide_on(rows[none][~ended], NO_CLIMB)
            rows, rate = rows[~none], rate[~none]
        if not rows.size:
            return
        self._set_cycle(rows, rate)
        if self.aloft.varies:  # this climb drifts with the mean wind from here to the band top
            self.drift_along[rows] = self.aloft.mean(rows, self.height[rows], self.inputs["band_top_m"][rows])[0]
        leg = self.leg[rows]
        blocked = ~(self.cruise_speed[rows, leg] > 0.0)
        self._glide_on(rows[blocked], UNREACHABLE)
        rows, leg = rows[~blocked], leg[~blocked]
        first = ~self.leg_has_climb[rows, leg]
        self.leg_climb[rows[first], leg[first]] = self.climb_rate[rows[first]]
        self.leg_mc[rows[first], leg[first]] = self.cycle_mc[rows[first]]
        self.leg_has_climb[rows, leg] = True
        self.climbs[rows] += 1
        self._centre(rows, leg)
        self.mode[rows] = CLIMBING

    def band_top(self, rows, time_s):
        """The band top [m MSL] for flights ``rows`` at ``time_s``: the day's band top then
        (``Flights.band_top_times_s``), never above the flight's ``band_top_m``."""
        top = self.inputs["band_top_m"][rows]
        if not self.band_top_times.size:
            return top
        return np.minimum(np.interp(time_s, self.band_top_times, self.band_top_values), top)

    def _climb_top(self, rows):
        """How high a climb of flights ``rows`` may go where and when they are: the band top
        at that time (:meth:`band_top`), lowered under airspace ahead (flight_ground.Ceiling)."""
        top = self.band_top(rows, self.time[rows])
        if self.ceiling is None:
            return top
        here = self.leg_start[self.leg[rows]] + self.position[rows]
        capped = self.ceiling.top(here, top, self.flattest[rows])
        # Where the climb's drift would carry it (the top is no higher further on): safe for the glide after.
        with np.errstate(invalid="ignore", divide="ignore"):
            drift = np.where(self.climb_rate[rows] > 0.0, np.maximum(capped - self.height[rows], 0.0)
                             / self.climb_rate[rows] * np.maximum(self.drift_along[rows, self.leg[rows]], 0.0), 0.0)
        return self.ceiling.top(here + np.nan_to_num(drift), top, self.flattest[rows])

    def _centre(self, rows, leg) -> None:
        """Time lost centring the thermal before the climb begins (``centring_s``), at the
        climb's bottom (its drift in that time is neglected: 30 s at 20 km/h is 170 m)."""
        centring = self.inputs["centring_s"][rows]
        self.time[rows] += centring
        self.leg_time[rows, leg] += centring

    def _climb(self, rows) -> None:
        leg, position, height = self.leg[rows], self.position[rows], self.height[rows]
        t, rate = self.time[rows], self.climb_rate[rows]
        band_top = self._climb_top(rows)
        drift = self.drift_along[rows, leg]
        gap = height - self.required(rows)
        closing = rate + self.final_per_metre[rows, leg] * drift  # the gap grows by this per second
        with np.errstate(invalid="ignore", divide="ignore", over="ignore"):  # huge or inf: that event never comes
            to_final = np.where(gap >= 0.0, 0.0, np.where(closing > 0.0, -gap / closing, np.inf))
            to_leg_end = np.where(drift > 0.0, (self.leg_length[leg] - position) / drift, np.inf)
        to_top = np.maximum(band_top - height, 0.0) / rate
        to_lift_end = np.maximum(self.inputs["lift_ends_s"][rows] - t, 0.0)
        candidates = np.stack([to_final, to_top, to_leg_end, to_lift_end])
        event = np.argmin(candidates, axis=0)
        duration = candidates[event, np.arange(rows.size)]
        self.height[rows] = height + rate * duration
        self.position[rows] = position + drift * duration
        self.time[rows] = t + duration
        self.leg_time[rows, leg] += duration
        self._mark(rows, "climb")
        ended = rows[event != 2]
        self.last_climb_end[ended] = self.time[ended]
        self._reached_requirement(rows[event == 0])
        top = event == 1
        self.height[rows[top]] = np.maximum(band_top[top], height[top])
        top = rows[top]
        self.mode[top] = GLIDING
        self._leg_end(rows[event == 2])
        self._glide_on(rows[event == 3], LIFT_ENDED)

    def _leg_end(self, rows) -> None:
        """Flights at the end of their leg (gliding or drifting in a climb) enter the next."""
        if not rows.size:
            return
        leg = self.leg[rows]
        self.position[rows] = self.leg_length[leg]
        self.leg_arrival[rows, leg] = self.height[rows]
        last = leg == self.legs - 1
        self._glide_on(rows[last], BELOW_FLOOR)  # at the finish, still below the requirement
        rows, leg = rows[~last], leg[~last] + 1
        self.leg[rows], self.position[rows] = leg, 0.0
        self.leg_entry[rows, leg] = self.time[rows]
        self.leg_time[rows, leg] = 0.0
        self.leg_final_mc[rows, leg] = self.final_mc[rows]
        self.leg_climb[rows, leg], self.leg_mc[rows, leg] = np.maximum(self.climb_rate[rows], 0.0), self.cycle_mc[rows]


class _InFlownMetres:
    """A ground floor or airspace ceiling (:mod:`glidetask.engine.flight_ground`), which works in
    metres of the planned path, seen from the core, which works in metres flown (the detour)."""

    def __init__(self, hook, detour: float):
        self.hook, self.detour = hook, detour

    def contact(self, start_m, height_m, per_metre, limit_m, above_m):
        distance = self.hook.contact(start_m / self.detour, height_m, per_metre * self.detour, limit_m / self.detour,
                                     above_m)
        return distance * self.detour

    def top(self, position_m, band_top_m, per_metre):
        return self.hook.top(position_m / self.detour, band_top_m, per_metre * self.detour)
