"""The flight core's event loop: N flights moved on from event to event.

:class:`Simulation` holds the state of N flights over one course (shape (N,) per flight,
(N, L) per flight and leg) and the handlers of the events of contract section 3: glides
to the next turnpoint, the band bottom, the end of a search or the final-glide height;
climbs to the band top, the final-glide height, a turnpoint reached by drift or the end
of lift; and the ways a flight ends. The final-glide requirement comes from
:class:`glidetask.engine.flight_requirement.FinalGlideRequirement`, the achieved climb
from :class:`glidetask.engine.flight_lift.LiftClock`. :func:`glidetask.engine.flight.fly`
runs it; the model is described there.
"""

from __future__ import annotations

import numpy as np

from glidetask.engine.atmosphere import density_ratio
from glidetask.engine.finalglide import density_height_m
from glidetask.engine.flight_ground import GroundFloor, glide_allowance
from glidetask.engine.flight_lift import LiftClock
from glidetask.engine.flight_requirement import FinalGlideRequirement, polar_rows
from glidetask.engine.flight_wind import WindAloft
from glidetask.engine.landing_fields import LandingFields, field_floor
from glidetask.engine.polar import scaled_polar
from glidetask.engine.scenario import band_middle_m
from glidetask.engine.speedtofly import cruise_in_wind, glide_in_wind
from glidetask.engine.wind import correction_angle_deg, ground_speed

# Why a flight ended (``Flown.reason``). A finished flight has FINAL_GLIDE, or the reason
# its climbs stopped if it then glided home at MacCready 0.
FINAL_GLIDE, LIFT_ENDED, NO_CLIMB, UNREACHABLE, NO_THERMAL_FOUND, BELOW_FLOOR, UNRESOLVED, TERRAIN_ABOVE_BAND = range(8)
REASONS = ("final glide", "lift ended", "no climb in the profile", "wind too strong for the glider",
           "no thermal found", "reached the finish below the arrival floor", "unresolved",
           "terrain plus clearance above the working band")

_GLIDE, _CLIMB_START, _CLIMB, _DONE = range(4)  # what each flight is doing


class Simulation(FinalGlideRequirement):
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
        self.mode = np.full(n, _GLIDE)
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
        gliding = np.flatnonzero(self.mode == _GLIDE)
        if gliding.size:
            self._glide(gliding)
        starting = np.flatnonzero(self.mode == _CLIMB_START)
        if starting.size:
            self._start_climb(starting)
        climbing = np.flatnonzero(self.mode == _CLIMB)
        if climbing.size:
            self._climb(climbing)
        return bool(np.any(self.mode != _DONE))

    def _glide(self, rows) -> None:
        gap = self.height[rows] - self.required(rows)
        now = gap >= 0.0
        if now.any():
            self._final(rows[now])
            rows, gap = rows[~now], gap[~now]
        k, s, h = self.leg[rows], self.position[rows], self.height[rows]
        along, across = self.wind_along[rows, k], self.wind_across[rows, k]
        with np.errstate(invalid="ignore", divide="ignore"):
            drift_fix = self._cycle_drift_fix(across, self.glide_fraction[rows], self.climb_across[rows, k])
            cruise_gs = np.asarray(ground_speed(self.cruise_airspeed[rows], along, drift_fix))
            pure = self.no_climb[rows]
            gs = np.where(pure, self.best_ground_speed[rows, k], cruise_gs)
            hpm = np.where(pure, self.best_per_metre[rows, k], self.cruise_net_sink[rows] / cruise_gs)
        blocked = ~(gs > 0.0)
        if blocked.any():
            self._glide_on(rows[blocked], UNREACHABLE)
            keep = ~blocked
            rows, gap, k, s, h, gs, hpm = rows[keep], gap[keep], k[keep], s[keep], h[keep], gs[keep], hpm[keep]
        if not rows.size:
            return
        closing = self.final_per_metre[rows, k] - hpm  # the gap grows by this per metre
        with np.errstate(invalid="ignore", divide="ignore"):
            to_final = np.where(closing > 0.0, -gap / closing, np.inf)
            to_stop = np.where(hpm > 0.0, np.maximum(h - self.stop_height[rows], 0.0) / hpm, np.inf)
        to_leg_end = self.leg_length[k] - s
        to_ground = np.full(rows.size, np.inf)
        if self.ground is not None:  # the glide stops where it would come closer to the ground than the clearance
            limit = np.minimum(np.minimum(to_leg_end, to_stop), np.minimum(self.search_left_m[rows], to_final))
            to_ground = self.ground.contact(self.leg_start[k] + s, h, hpm, limit, self.stop_height[rows])
        candidates = np.stack([to_final, to_leg_end, to_stop, self.search_left_m[rows], to_ground])
        event = np.argmin(candidates, axis=0)
        d = candidates[event, np.arange(rows.size)]
        dt = d / gs
        self.position[rows] = s + d
        self.height[rows] = h - hpm * d
        self.time[rows] += dt
        self.leg_time[rows, k] += dt
        self.search_left_m[rows] -= d
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
        self.mode[rows] = _CLIMB_START

    def _searched(self, rows) -> None:
        if not rows.size:
            return
        self.searching[rows] = False
        self.search_left_m[rows] = np.inf
        self.stop_height[rows] = self.inputs["band_bottom_m"][rows]
        self.mode[rows] = _CLIMB_START

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
        k = self.leg[rows]
        blocked = ~(self.cruise_speed[rows, k] > 0.0)
        self._glide_on(rows[blocked], UNREACHABLE)
        rows, k = rows[~blocked], k[~blocked]
        first = ~self.leg_has_climb[rows, k]
        self.leg_climb[rows[first], k[first]] = self.climb_rate[rows[first]]
        self.leg_mc[rows[first], k[first]] = self.cycle_mc[rows[first]]
        self.leg_has_climb[rows, k] = True
        self.climbs[rows] += 1
        self._centre(rows, k)
        self.mode[rows] = _CLIMB

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

    def _centre(self, rows, k) -> None:
        """Time lost centring the thermal before the climb begins (``centring_s``), at the
        climb's bottom (its drift in that time is neglected: 30 s at 20 km/h is 170 m)."""
        centring = self.inputs["centring_s"][rows]
        self.time[rows] += centring
        self.leg_time[rows, k] += centring

    def _climb(self, rows) -> None:
        k, s, h, t, rate = self.leg[rows], self.position[rows], self.height[rows], self.time[rows], self.climb_rate[rows]
        band_top = self._climb_top(rows)
        drift = self.drift_along[rows, k]
        gap = h - self.required(rows)
        closing = rate + self.final_per_metre[rows, k] * drift  # the gap grows by this per second
        with np.errstate(invalid="ignore", divide="ignore", over="ignore"):  # huge or inf: that event never comes
            to_final = np.where(gap >= 0.0, 0.0, np.where(closing > 0.0, -gap / closing, np.inf))
            to_leg_end = np.where(drift > 0.0, (self.leg_length[k] - s) / drift, np.inf)
        to_top = np.maximum(band_top - h, 0.0) / rate
        to_lift_end = np.maximum(self.inputs["lift_ends_s"][rows] - t, 0.0)
        candidates = np.stack([to_final, to_top, to_leg_end, to_lift_end])
        event = np.argmin(candidates, axis=0)
        tau = candidates[event, np.arange(rows.size)]
        self.height[rows] = h + rate * tau
        self.position[rows] = s + drift * tau
        self.time[rows] = t + tau
        self.leg_time[rows, k] += tau
        self._mark(rows, "climb")
        ended = rows[event != 2]
        self.last_climb_end[ended] = self.time[ended]
        self._reached_requirement(rows[event == 0])
        top = event == 1
        self.height[rows[top]] = np.maximum(band_top[top], h[top])
        top = rows[top]
        self.mode[top] = _GLIDE
        self._leg_end(rows[event == 2])
        self._glide_on(rows[event == 3], LIFT_ENDED)

    def _leg_end(self, rows) -> None:
        """Flights at the end of their leg (gliding or drifting in a climb) enter the next."""
        if not rows.size:
            return
        k = self.leg[rows]
        self.position[rows] = self.leg_length[k]
        self.leg_arrival[rows, k] = self.height[rows]
        last = k == self.legs - 1
        self._glide_on(rows[last], BELOW_FLOOR)  # at the finish, still below the requirement
        rows, k = rows[~last], k[~last] + 1
        self.leg[rows], self.position[rows] = k, 0.0
        self.leg_entry[rows, k] = self.time[rows]
        self.leg_time[rows, k] = 0.0
        self.leg_final_mc[rows, k] = self.final_mc[rows]
        self.leg_climb[rows, k], self.leg_mc[rows, k] = np.maximum(self.climb_rate[rows], 0.0), self.cycle_mc[rows]

    # ------------------------------------------------------------ how flights end

    def _remaining(self, rows):
        """Distance left on every leg from the present position, shape (n, L)."""
        k, s = self.leg[rows], self.position[rows]
        j = np.arange(self.legs)[None, :]
        remaining = np.where(j > k[:, None], self.leg_length[None, :], 0.0)
        remaining[np.arange(rows.size), k] = self.leg_length[k] - s
        return remaining

    def _final(self, rows, reason: int = FINAL_GLIDE, hpm=None, gs=None, mc=None) -> None:
        """The final glide from the present point over all remaining legs, then done.

        The planned final glide uses the cycle's table; a glide home after the climbs
        stopped passes the MacCready-0 table (``hpm``, ``gs``) and ``mc`` = 0.
        """
        if not rows.size:
            return
        planned = hpm is None
        hpm = self.final_per_metre[rows] if planned else hpm
        gs = self.final_ground_speed[rows] if planned else gs
        remaining = self._remaining(rows)
        flown = remaining != 0.0
        used = np.where(flown, remaining * hpm, 0.0)
        time = np.where(flown, remaining / gs, 0.0)
        k, t, h = self.leg[rows], self.time[rows], self.height[rows]
        j = np.arange(self.legs)[None, :]
        ahead, later = j >= k[:, None], j > k[:, None]
        cumulative_time = np.cumsum(time, axis=1)
        self.leg_time[rows] = np.where(ahead, np.nan_to_num(self.leg_time[rows]) + time, self.leg_time[rows])
        self.leg_arrival[rows] = np.where(ahead, h[:, None] - np.cumsum(used, axis=1), self.leg_arrival[rows])
        entry = t[:, None] + cumulative_time - time
        self.leg_entry[rows] = np.where(later, entry, self.leg_entry[rows])
        setting = self.final_mc[rows] if planned else mc
        self.leg_final_mc[rows] = np.where(later, self.final_mc[rows][:, None], self.leg_final_mc[rows])
        whole = later | ((j == k[:, None]) & (self.position[rows] <= 0.0)[:, None] & ~self.leg_has_climb[rows])
        self.leg_final[rows] = whole
        self.leg_mc[rows] = np.where(whole, setting[:, None], self.leg_mc[rows])
        self.leg_climb[rows] = np.where(later, np.maximum(self.climb_rate[rows], 0.0)[:, None], self.leg_climb[rows])
        self.flown_final_from[rows] = self.leg_start[k] + self.position[rows]
        self.flown_final_height[rows], self.flown_final_mc[rows], self.flown_final_leg[rows] = h, setting, k
        self.flown_final_sigma[rows] = self.final_sigma[rows] if planned else self.band_sigma[rows]
        if not planned:  # the glide home's own table, for the requirements on its legs
            self.final_per_metre[rows], self.final_height_after[rows] = hpm, self._tail(hpm)
        self.end_time[rows] = t + cumulative_time[:, -1]
        self.finished[rows], self.reason[rows], self.mode[rows] = True, reason, _DONE
        if self.trace is not None and rows[0] == 0:
            self._mark_legs(k[0], h[0] - np.cumsum(used[0]), self.legs - 1, None, "final")

    def _glide_on(self, rows, reason: int) -> None:
        """No more climbs: glide on at MacCready 0 to the arrival floor; home if it reaches."""
        if not rows.size:
            return
        self.stop_time[rows] = self.time[rows]
        self._mark(rows, "stop")  # where the climbs stopped: the land-out's field is chosen in reach of it
        remaining = self._remaining(rows)
        hpm, gs = self.best_per_metre[rows], self.best_ground_speed[rows]
        with np.errstate(invalid="ignore"):
            used = np.where(remaining != 0.0, np.where(np.isfinite(hpm), remaining * hpm, np.inf), 0.0)
        cumulative = np.cumsum(used, axis=1)
        available = self.height[rows] - self.floor[rows]
        if self.ground is not None:  # it glides on only while it keeps the clearance
            available = np.minimum(available, glide_allowance(
                self.ground, self.leg_start, self.leg[rows], self.position[rows], self.height[rows], remaining, hpm,
                cumulative, self.floor[rows]))
        home = cumulative[:, -1] <= available
        if home.any():
            self._final(rows[home], reason, hpm[home], gs[home], np.zeros(int(home.sum())))
        out = ~home
        if self.fields is not None and out.any():  # no terrain: down to the field it reaches
            landing = rows[out]
            x0 = (self.leg_start[self.leg[landing]] + self.position[landing]) / self.detour
            floor, field = field_floor(
                self.fields, x0, self.course_deg[self.leg[landing]], self.height[landing], remaining[out], hpm[out],
                cumulative[out], polar_rows(self.band_polar, landing), self.inputs["wind_from_deg"][landing],
                self.inputs["wind_speed_ms"][landing], self.airmass[landing], self.inputs["arrival_margin_m"][landing],
                self.detour)
            found = field >= 0
            # never past the finish: a field below the finish's floor still ends the glide short of it
            lower = np.minimum(self.height[landing] - floor, np.nextafter(cumulative[out][:, -1], -np.inf))
            available[out] = np.where(found, lower, available[out])
            self.landout_field[landing] = field
        self._land_between(rows[out], reason, remaining[out], hpm[out], gs[out], cumulative[out], available[out])

    def _land_between(self, rows, reason, remaining, hpm, gs, cumulative, available) -> None:
        """Flights gliding at MacCready 0 that reach the floor before the finish land there."""
        if not rows.size:
            return
        k = self.leg[rows]
        j = np.arange(self.legs)[None, :]
        beyond = (cumulative > available[:, None]) & (j >= k[:, None])
        land_leg = np.argmax(beyond, axis=1)
        line = np.arange(rows.size)
        before = np.where(land_leg > 0, cumulative[line, np.maximum(land_leg - 1, 0)], 0.0)
        with np.errstate(invalid="ignore", divide="ignore"):
            into = (available - before) / hpm[line, land_leg]
        into = np.clip(np.nan_to_num(into, nan=0.0), 0.0, remaining[line, land_leg])
        flown = np.where(j < land_leg[:, None], remaining, 0.0)
        flown[line, land_leg] = into
        with np.errstate(invalid="ignore"):
            time = np.where(flown != 0.0, flown / gs, 0.0)
        ahead = (j >= k[:, None]) & (j <= land_leg[:, None])
        self.leg_time[rows] = np.where(ahead, np.nan_to_num(self.leg_time[rows]) + time, self.leg_time[rows])
        done = (j >= k[:, None]) & (j < land_leg[:, None])
        self.leg_arrival[rows] = np.where(done, self.height[rows][:, None] - cumulative, self.leg_arrival[rows])
        entered = (j > k[:, None]) & (j <= land_leg[:, None])
        entry = self.time[rows][:, None] + np.cumsum(time, axis=1) - time
        self.leg_entry[rows] = np.where(entered, entry, self.leg_entry[rows])
        self.leg_final_mc[rows] = np.where(entered, self.final_mc[rows][:, None], self.leg_final_mc[rows])
        self.landout_at[rows] = self.leg_start[land_leg] + np.where(land_leg == k, self.position[rows], 0.0) + into
        self.landout_leg[rows] = land_leg
        if self.trace is not None and rows[0] == 0:
            self._mark_legs(k[0], self.height[0] - cumulative[0], land_leg[0], float(self.landout_at[0]), "glide",
                            float(self.height[0] - (before[0] + into[0] * hpm[0, land_leg[0]])))
        self.end_time[rows] = self.time[rows] + time.sum(axis=1)
        self.reason[rows], self.mode[rows] = reason, _DONE

    def _mark_legs(self, k, height_after, last, end_m, phase, end_height=None) -> None:
        """Record the first flight's vertices at the leg ends it glides past, from leg ``k`` to
        ``last`` (the finish), or to ``end_m`` [m along the course] on leg ``last``."""
        for j in range(int(k), int(last) + 1):
            if end_m is not None and j == last:
                self.trace.append((end_m / self.detour, end_height, phase))
            else:
                self.trace.append((float(self.leg_start[j + 1]) / self.detour, float(height_after[j]), phase))

    def _landed(self, rows, reason: int) -> None:
        """Flights that land where they are: a search for a climb down to its floor, terrain above the
        band top, or a flight the core could not resolve."""
        if not rows.size:
            return
        self.stop_time[rows] = self.time[rows]
        self.landout_at[rows] = self.leg_start[self.leg[rows]] + self.position[rows]
        self.landout_leg[rows] = self.leg[rows]
        self.end_time[rows] = self.time[rows]
        self.reason[rows], self.mode[rows] = reason, _DONE

    def give_up(self) -> None:
        rows = np.flatnonzero(self.mode != _DONE)
        self._landed(rows, UNRESOLVED)

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
            hpm, _, tail, _ = self.final_table(rows, legs, zero, self.leg_final_mc[rows, legs])
            required[rows, legs] = self.required(rows, legs, zero, hpm, tail)
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


class _InFlownMetres:
    """A ground floor or airspace ceiling (:mod:`glidetask.engine.flight_ground`), which works in
    metres of the planned path, seen from the core, which works in metres flown (the detour)."""

    def __init__(self, hook, detour: float):
        self.hook, self.detour = hook, detour

    def contact(self, start_m, height_m, per_metre, limit_m, above_m):
        d = self.hook.contact(start_m / self.detour, height_m, per_metre * self.detour, limit_m / self.detour, above_m)
        return d * self.detour

    def top(self, position_m, band_top_m, per_metre):
        return self.hook.top(position_m / self.detour, band_top_m, per_metre * self.detour)
