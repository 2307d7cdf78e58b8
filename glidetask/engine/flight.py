"""The flight core: a task flown on paper, leg by leg, for many flights at once.

:func:`fly` simulates N flights over one shared course (the planned path's legs) by the
rules of shared/CONTRACT.md section 3: a glide from the start height, climb-and-glide
cycles in the working band with the climb following the clock and the drift of each
climb compensated in the glides, the last climb only as high as the final glide needs,
and the final glide over all remaining legs. Every per-flight quantity (polar, climb,
wind, start, band, end of lift, MacCready settings, margins) is an array of shape
``(N,)``; the loop runs over events (glide segments, climbs, turnpoints: a few dozen),
never over flights. The planner calls it with ``N = 1``; the ballast sweep and the
Monte-Carlo days call it with many flights, and the same inputs give the same numbers
in any batch.

The model
---------
* Glides and climbs use the polar at the density of the middle of the working band;
  a final glide uses the density at the middle of its start height and its arrival
  height (the arrival floor). The start height of a final glide is itself what the
  requirement computes, so it is estimated from the previous cycle's requirement at
  the same place (at the first cycle from the MacCready-0 requirement); the error this
  leaves in the density is a few metres of height, under 0.1 m in the requirement.
* Each climb uses the achieved climb ``m_c`` at the moment it starts; the cycle's
  MacCready setting is the fixed one or ``m_c``; the speed to fly between climbs is the
  still-air MacCready speed (the drift-aware optimum, see
  :func:`glidetask.engine.speedtofly.cruise_in_wind`). A share
  ``f = m_c / (m_c + sink(v) - u)`` of the cycle is gliding. While climbing the glider
  drifts with the wind (``We`` along the course); in the glides the heading cancels the
  cycle's crosswind drift, so the air velocity across the course is ``-Wn/f`` and the
  glide's ground speed along the course is ``sqrt(v^2 - (Wn/f)^2) + We``. Over a whole
  cycle this gives the contract's ``Vc = sqrt((f v)^2 - Wn^2) + We``.
* The required height at a point is the arrival floor (finish elevation + margin)
  plus the pure-glide height used over the remaining legs at the final-glide setting,
  each leg with its own wind (:meth:`_Simulation.required`, the one place it is
  computed, with a hook for terrain). The final glide starts as soon as the height
  reaches it, in a glide or in a climb (the climb's drift moves the requirement too).
* When a climb is not possible (lift ended, or the profile is zero) or a leg cannot be
  flown against the wind, the flight glides on at MacCready 0 down to the arrival floor
  (the ground estimate): it finishes if that reaches the finish, otherwise it lands out
  there.

References
----------
.. [1] P. B. MacCready Jr., "Optimum airspeed selector", Soaring, Jan.-Feb. 1958 (from memory).
.. [2] H. Reichmann, Cross-Country Soaring, Thomson Publications, 1978: cruise in
   climb-and-glide cycles, drift in thermals, final glide (from memory).
"""

from __future__ import annotations

from dataclasses import dataclass, fields
from typing import Callable

import numpy as np

from glidetask.engine.atmosphere import density_ratio
from glidetask.engine.finalglide import density_height_m
from glidetask.engine.polar import Polar, PolarSpec, scaled_polar
from glidetask.engine.scenario import Scenario, band_middle_m, until_lift_ends
from glidetask.engine.speedtofly import cruise_in_wind, glide_in_wind, speed_to_fly_still_air
from glidetask.engine.wind import correction_angle_deg, ground_speed, heading_for_course, wind_components


# Why a flight ended (``Flown.reason``). A finished flight has FINAL_GLIDE, or the reason
# its climbs stopped if it then glided home at MacCready 0.
FINAL_GLIDE, LIFT_ENDED, NO_CLIMB, UNREACHABLE, NO_THERMAL_FOUND, BELOW_FLOOR, UNRESOLVED = range(7)
REASONS = ("final glide", "lift ended", "no climb in the profile", "wind too strong for the glider",
           "no thermal found", "reached the finish below the arrival floor", "unresolved")

STRENGTH_STEP_MS = 0.05  # grid step of the achieved-climb tables against thermal strength [m/s]
_GLIDE, _CLIMB_START, _CLIMB, _DONE = range(4)


@dataclass(frozen=True)
class Course:
    """The legs every flight flies (the planned path).

    Attributes
    ----------
    distance_m : ndarray, shape (L,)
        Leg lengths along the planned path [m].
    course_deg : ndarray, shape (L,)
        Geodesic azimuth at each leg's start [deg true].
    """

    distance_m: np.ndarray
    course_deg: np.ndarray

    def __post_init__(self):
        distance = np.atleast_1d(np.asarray(self.distance_m, dtype=float))
        course = np.atleast_1d(np.asarray(self.course_deg, dtype=float))
        if distance.ndim != 1 or distance.shape != course.shape or distance.size == 0:
            raise ValueError("a course needs one distance and one course per leg (at least one leg)")
        if np.any(~(distance >= 0.0)):
            raise ValueError("leg distances must be finite and not negative")
        object.__setattr__(self, "distance_m", distance)
        object.__setattr__(self, "course_deg", course)

    @property
    def legs(self) -> int:
        return self.distance_m.size

    @property
    def leg_start_m(self) -> np.ndarray:
        """Distance along the course at each leg's start, and at the finish, shape (L+1,) [m]."""
        return np.concatenate([[0.0], np.cumsum(self.distance_m)])


@dataclass(frozen=True)
class Flights:
    """What differs between flights: every numeric field broadcasts to shape (N,).

    Attributes
    ----------
    spec : PolarSpec
        The glider's polar as measured (shared by all flights).
    mass_kg, bugs_percent : array_like
        Flying mass [kg] and bugs [% sink increase].
    wind_from_deg, wind_speed_ms : array_like
        Steady wind [deg true, from], [m/s].
    start_time_s, start_height_m : array_like
        Start [s after midnight], [m MSL].
    band_top_m, band_bottom_m : array_like
        Working band [m MSL]; top above bottom.
    lift_ends_s : array_like
        No climbs from this time on [s after midnight].
    lift_times_s : array_like, shape (P,)
        Times of the lift profile's pairs (shared), strictly increasing [s].
    lift_values : array_like, shape (P,) or (N, P)
        The profile's values: achieved climb [m/s], or thermal core strength [m/s] when
        ``lift_is_strength``; linear between the times, held beyond them.
    lift_scale : array_like
        Factor on the profile's values per flight [-] (1 for the forecast).
    lift_is_strength : bool
        The profile is thermal strength, turned into achieved climb by the circling
        model (:func:`glidetask.engine.circling.achieved_climb`) for each flight's polar.
    thermal_radius_m : array_like
        e-folding radius of the thermal core, with ``lift_is_strength`` [m].
    mc_ms : array_like
        Fixed MacCready setting [m/s]; NaN: the achieved climb of each cycle.
    final_glide_mc_ms : array_like
        Final-glide setting [m/s]; NaN: the cruise setting at that moment.
    finish_elevation_m, arrival_margin_m : array_like
        The arrival floor is their sum [m MSL], [m].
    glide_airmass_ms : array_like
        Average vertical air motion while gliding, up positive [m/s].
    isa_deviation_c : array_like
        ISA temperature deviation [degC].
    """

    spec: PolarSpec
    mass_kg: object
    start_time_s: object
    start_height_m: object
    band_top_m: object
    band_bottom_m: object
    lift_ends_s: object
    lift_times_s: object
    lift_values: object
    finish_elevation_m: object
    bugs_percent: object = 0.0
    wind_from_deg: object = 0.0
    wind_speed_ms: object = 0.0
    lift_scale: object = 1.0
    lift_is_strength: bool = False
    thermal_radius_m: object = 150.0
    mc_ms: object = np.nan
    final_glide_mc_ms: object = np.nan
    arrival_margin_m: object = 200.0
    glide_airmass_ms: object = 0.0
    isa_deviation_c: object = 0.0

    _PER_FLIGHT = ("mass_kg", "start_time_s", "start_height_m", "band_top_m", "band_bottom_m", "lift_ends_s",
                   "finish_elevation_m", "bugs_percent", "wind_from_deg", "wind_speed_ms", "lift_scale",
                   "thermal_radius_m", "mc_ms", "final_glide_mc_ms", "arrival_margin_m", "glide_airmass_ms",
                   "isa_deviation_c")

    def columns(self) -> dict[str, np.ndarray]:
        """The per-flight fields as float arrays of one shape (N,) (read-only views)."""
        values = [np.atleast_1d(np.asarray(getattr(self, name), dtype=float)) for name in self._PER_FLIGHT]
        rows = np.atleast_2d(np.asarray(self.lift_values, dtype=float))
        size = np.broadcast_shapes(*(v.shape for v in values), (rows.shape[0] if rows.shape[0] > 1 else 1,))
        if len(size) != 1:
            raise ValueError("per-flight inputs must be scalars or 1-D arrays of one length")
        columns = {name: np.broadcast_to(v, size) for name, v in zip(self._PER_FLIGHT, values)}
        if np.any(~(columns["band_top_m"] > columns["band_bottom_m"])):
            raise ValueError("the working band's top must be above its bottom")
        if np.any(np.isnan(columns["mass_kg"])) or np.any(~np.isfinite(columns["start_time_s"])):
            raise ValueError("mass and start time must be finite")
        return columns

    @property
    def size(self) -> int:
        return self.columns()["mass_kg"].size


@dataclass(frozen=True)
class Flown:
    """What :func:`fly` returns: arrays of shape (N,), or (N, L) for per-leg values.

    Times are clock times [s after midnight] unless named a duration. Undefined
    values are NaN (integers: -1).

    Attributes
    ----------
    finished : ndarray of bool
        The flight reached the finish at or above the arrival floor.
    reason : ndarray of int
        :data:`FINAL_GLIDE`, or why the climbs stopped (:data:`LIFT_ENDED`,
        :data:`NO_CLIMB`, :data:`UNREACHABLE`, :data:`NO_THERMAL_FOUND`,
        :data:`BELOW_FLOOR`, :data:`UNRESOLVED`); names in :data:`REASONS`.
    total_time_s : ndarray
        Duration from the start to the finish, or to the landing [s].
    finish_time_s : ndarray
        Clock time at the finish; NaN if not finished.
    end_time_s : ndarray
        Clock time at the finish or the landing.
    stop_time_s : ndarray
        Clock time the climbs stopped (NaN for a planned final glide).
    landout_m : ndarray
        Distance along the course where the flight lands; NaN if finished.
    landout_leg : ndarray of int
        Leg index of the landing; -1 if finished.
    final_glide_from_m, final_glide_height_m, final_glide_mc_ms : ndarray
        Where the final glide starts [m along the course], its start height [m MSL],
        its MacCready setting [m/s]; NaN without a final glide. After the climbs stop,
        a glide home at MacCready 0 counts as the final glide.
    final_glide_sigma : ndarray
        Density ratio of the final glide's polar [-].
    final_glide_leg : ndarray of int
        Leg in which the final glide starts; -1 without one.
    climbs : ndarray of int
        Number of climbs.
    last_climb_end_s : ndarray
        Clock time the last climb ended; NaN with no climb.
    leg_time_s : ndarray, (N, L)
        Time on each leg [s]; NaN for legs not reached; partial for the landing leg.
    leg_entry_time_s : ndarray, (N, L)
        Clock time at each leg's start.
    leg_arrival_height_m : ndarray, (N, L)
        Height on reaching each leg's end [m MSL]; NaN if not reached.
    leg_required_height_m : ndarray, (N, L)
        Required height at each leg's start, at the final-glide setting in force then [m MSL].
    leg_climb_ms, leg_mc_ms : ndarray, (N, L)
        The achieved climb and MacCready setting of the leg's first climb, or of the
        cycle in force on entering the leg if it has none [m/s]. On legs flown entirely
        in final glide ``leg_mc_ms`` is the final glide's setting.
    leg_final : ndarray of bool, (N, L)
        The leg is flown entirely in final glide.
    leg_airspeed_ms : ndarray, (N, L)
        Speed to fly in the leg's glides [m/s TAS] at the leg's settings: the final glide's
        on legs flown in final glide, best glide before any climb, else the cruise's.
    leg_heading_deg : ndarray, (N, L)
        Heading in the leg's glides [deg true]: in cruise it cancels the drift of a whole
        climb-and-glide cycle; in a pure glide it holds the course.
    leg_ground_speed_ms : ndarray, (N, L)
        Speed over the ground along the course while gliding [m/s].
    leg_cruise_speed_ms : ndarray, (N, L)
        Drift-aware average speed along the course with climbs at the leg's settings [m/s].
        The four ``leg_*speed``/heading arrays are NaN when ``fly`` ran with ``detail=False``.
    """

    finished: np.ndarray
    reason: np.ndarray
    total_time_s: np.ndarray
    finish_time_s: np.ndarray
    end_time_s: np.ndarray
    stop_time_s: np.ndarray
    landout_m: np.ndarray
    landout_leg: np.ndarray
    final_glide_from_m: np.ndarray
    final_glide_height_m: np.ndarray
    final_glide_mc_ms: np.ndarray
    final_glide_sigma: np.ndarray
    final_glide_leg: np.ndarray
    climbs: np.ndarray
    last_climb_end_s: np.ndarray
    leg_time_s: np.ndarray
    leg_entry_time_s: np.ndarray
    leg_arrival_height_m: np.ndarray
    leg_required_height_m: np.ndarray
    leg_climb_ms: np.ndarray
    leg_mc_ms: np.ndarray
    leg_final: np.ndarray
    leg_airspeed_ms: np.ndarray
    leg_heading_deg: np.ndarray
    leg_ground_speed_ms: np.ndarray
    leg_cruise_speed_ms: np.ndarray

    def flight(self, i: int) -> "Flown":
        """The results of flight ``i`` alone (arrays of length 1)."""
        return Flown(**{f.name: getattr(self, f.name)[i:i + 1] for f in fields(self)})


#: ``search(flights, climb_number) -> distance_m``: called when flights (indices, shape (n,))
#: reach the band bottom before their climb number ``climb_number`` (0 = the first climb);
#: returns how far they must glide on before that climb starts [m], >= 0.
SearchHook = Callable[[np.ndarray, np.ndarray], np.ndarray]

#: ``extra(position_m, height_per_metre, floor_m) -> extra_m``: height to add to the pure
#: final-glide requirement at ``position_m`` (n,) [m along the course], >= 0. Row ``i`` of
#: ``height_per_metre`` (n, L) is the final glide's height used per metre on each leg for that
#: position, ``floor_m`` (n,) its arrival floor, so the pure requirement at any point ``x``
#: ahead is the floor plus the table integrated from ``x`` to the finish. For a terrain check:
#: the largest (terrain + clearance - pure requirement) over the path ahead, or 0. That
#: never grows along the path, so using its value at a segment's start is conservative.
#: The core asks only for positions whose pure requirement is defined (a flight still too
#: far out for a final-glide table is not asked).
RequirementHook = Callable[[np.ndarray, np.ndarray, np.ndarray], np.ndarray]


def fly(course: Course, flights: Flights, *, search: SearchHook | None = None,
        requirement: RequirementHook | None = None, detail: bool = True, max_events: int = 5000) -> Flown:
    """Fly N flights over one course, vectorised over the flights.

    Parameters
    ----------
    course : Course
        The L legs (distances [m], courses [deg true]) shared by all flights.
    flights : Flights
        The per-flight inputs, each broadcasting to shape (N,).
    search : SearchHook, optional
        How far beyond the band bottom each flight must glide to find its next climb
        (Monte-Carlo days); a flight that reaches the arrival floor first lands out
        there (:data:`NO_THERMAL_FOUND`). Default: every climb is found at the bottom.
    requirement : RequirementHook, optional
        Extra final-glide height along the path (terrain); default none.
    detail : bool, default True
        Compute ``leg_required_height_m`` (one more final-glide solve over every leg
        reached); NaN when False, which saves that work for large batches.
    max_events : int
        Safety cap on the event loop; flights still flying are marked :data:`UNRESOLVED`.

    Returns
    -------
    Flown
        Per-flight arrays (see :class:`Flown`).

    Notes
    -----
    Each pass of the loop moves every flight that is gliding to its next event (a
    turnpoint, the band bottom, the end of a search, or the final-glide height) and
    every flight that is climbing to its next event (the band top, the final-glide
    height, a turnpoint reached by drift, the end of lift); the events are solved in
    closed form, because heights and requirements are linear in distance on a leg.
    Only the final-glide speed to fly needs a solver: one vectorised call per cycle for
    the flights starting a climb. See the module docstring for the model.
    """
    simulation = _Simulation(course, flights, search, requirement)
    for _ in range(max_events):
        if not simulation.step():
            break
    else:
        simulation.give_up()
    return simulation.result(detail)


# ---------------------------------------------------------------- the core's inputs from a scenario


def course_for(path) -> Course:
    """The flight core's legs for a planned path (a :class:`~glidetask.engine.task.TaskPath`)."""
    return Course([leg.distance_m for leg in path.legs], [leg.course_deg for leg in path.legs])


def flights_for(scenario: Scenario) -> Flights:
    """The flight core's inputs for one flight of ``scenario`` (scalars; vary them with
    :func:`dataclasses.replace` to fly many).

    The lift profile is the day's achieved climb, or its thermal strength
    (``lift_is_strength``) for the circling model. Fixed settings absent from the
    scenario are NaN (the core then follows the climb of each cycle).
    """
    day, glider, safety = scenario.day, scenario.glider, scenario.safety
    profile = day.climb if day.climb is not None else day.thermal_strength
    nan = float("nan")
    return Flights(
        spec=glider.spec, mass_kg=glider.mass_kg, bugs_percent=glider.bugs_percent,
        wind_from_deg=day.wind.from_deg, wind_speed_ms=day.wind.speed_ms,
        start_time_s=day.start_time_s, start_height_m=day.effective_start_height_m,
        band_top_m=day.band_top_m, band_bottom_m=day.band_bottom_m, lift_ends_s=day.lift_ends_s,
        lift_times_s=tuple(profile.times_s), lift_values=tuple(profile.values),
        lift_is_strength=day.climb is None, thermal_radius_m=day.thermal_radius_m,
        mc_ms=nan if day.mc_ms is None else day.mc_ms,
        final_glide_mc_ms=nan if safety.final_glide_mc_ms is None else safety.final_glide_mc_ms,
        finish_elevation_m=scenario.task.points[-1].turnpoint.elevation_m,
        arrival_margin_m=safety.arrival_margin_m, glide_airmass_ms=day.glide_airmass_ms,
        isa_deviation_c=day.isa_deviation_c)


# ---------------------------------------------------------------- internals


def _take(polar: Polar, rows) -> Polar:
    """The polars of some flights, as a column (n, 1) for broadcasting against legs."""
    def pick(value):
        value = np.asarray(value, dtype=float)
        return value[rows][:, None] if value.ndim else value
    return Polar(a=pick(polar.a), b=pick(polar.b), c=pick(polar.c), min_speed_ms=pick(polar.min_speed_ms),
                 vne_ms=pick(polar.vne_ms), mass_kg=pick(polar.mass_kg), wing_area_m2=polar.wing_area_m2)


class _Lift:
    """Achieved climb against the clock for each flight (profile x scale; circling model)."""

    def __init__(self, flights: Flights, columns: dict, polar: Polar):
        self.times = np.atleast_1d(np.asarray(flights.lift_times_s, dtype=float))
        self.values = np.atleast_2d(np.asarray(flights.lift_values, dtype=float))
        if self.values.shape[-1] != self.times.size or np.any(np.diff(self.times) <= 0.0):
            raise ValueError("the lift profile needs one value per time and increasing times")
        self.scale = columns["lift_scale"]
        self.ends = columns["lift_ends_s"]
        self.table = None
        if flights.lift_is_strength:
            self._tabulate(polar, columns["thermal_radius_m"])

    def _tabulate(self, polar: Polar, radius) -> None:
        """Achieved climb on a fixed strength grid, one row per distinct polar and radius.

        The grid does not depend on the batch, so a flight gets the same table in any batch.
        """
        from glidetask.engine.circling import achieved_climb

        strongest = float(np.nanmax(np.abs(self.values)) * np.nanmax(self.scale))
        steps = int(np.ceil(strongest / STRENGTH_STEP_MS)) + 2
        grid = np.arange(steps) * STRENGTH_STEP_MS
        keys = np.column_stack([np.broadcast_to(np.asarray(x, dtype=float), radius.shape) for x in (
            polar.a, polar.b, polar.c, polar.min_speed_ms, polar.vne_ms, radius)])
        unique, self.table_row = np.unique(keys, axis=0, return_inverse=True)
        self.table_row = self.table_row.ravel()
        rows = Polar(a=unique[:, :1], b=unique[:, 1:2], c=unique[:, 2:3], min_speed_ms=unique[:, 3:4],
                     vne_ms=unique[:, 4:5])
        self.table = np.asarray(achieved_climb(rows, grid[None, :], unique[:, 5:6]).climb_ms)

    def profile(self, rows, time_s):
        """The profile's value (x scale) for flights ``rows`` at their times ``time_s``."""
        values = self.values[rows] if self.values.shape[0] > 1 else self.values[np.zeros_like(rows)]
        if self.times.size == 1:
            return values[:, 0] * self.scale[rows]
        clipped = np.clip(time_s, self.times[0], self.times[-1])
        j = np.clip(np.searchsorted(self.times, clipped, side="right") - 1, 0, self.times.size - 2)
        weight = (clipped - self.times[j]) / (self.times[j + 1] - self.times[j])
        line = np.arange(rows.size)
        value = values[line, j] * (1.0 - weight) + values[line, j + 1] * weight
        return value * self.scale[rows]

    def climb(self, rows, time_s):
        """Achieved climb [m/s] for flights ``rows`` at ``time_s``; 0 after the end of lift."""
        value = self.profile(rows, time_s)
        if self.table is not None:
            x = np.maximum(value, 0.0) / STRENGTH_STEP_MS
            j = np.minimum(np.floor(x).astype(int), self.table.shape[1] - 2)
            weight = x - j
            table = self.table[self.table_row[rows]]
            line = np.arange(rows.size)
            value = np.where(value > 0.0, table[line, j] * (1.0 - weight) + table[line, j + 1] * weight, 0.0)
        return until_lift_ends(value, time_s, self.ends[rows])


class _Simulation:
    """The state of N flights and the event handlers that move them on."""

    def __init__(self, course: Course, flights: Flights, search, requirement):
        col = flights.columns()
        n, legs = col["mass_kg"].size, course.legs
        self.n, self.legs, self.spec = n, legs, flights.spec
        self.col, self.search_hook, self.requirement_hook = col, search, requirement
        self.distance = course.distance_m
        self.course_deg = course.course_deg
        self.leg_start = course.leg_start_m
        self.along, self.across = (np.asarray(x, dtype=float) for x in wind_components(
            course.course_deg[None, :], col["wind_from_deg"][:, None], col["wind_speed_ms"][:, None]))
        self.airmass = col["glide_airmass_ms"]
        self.floor = col["finish_elevation_m"] + col["arrival_margin_m"]
        self.sigma_band = np.asarray(density_ratio(band_middle_m(col["band_top_m"], col["band_bottom_m"]),
                                                   col["isa_deviation_c"]), dtype=float)
        self.polar = scaled_polar(flights.spec, col["mass_kg"], col["bugs_percent"], self.sigma_band)
        everyone = np.arange(n)
        best = glide_in_wind(_take(self.polar, everyone), 0.0, self.along, self.across, self.airmass[:, None])
        self.hpm0 = np.broadcast_to(best.height_per_metre, (n, legs))
        self.gs0 = np.broadcast_to(best.ground_speed_ms, (n, legs))
        self.hpm_bound = self._final_glide_bound()
        self.lift = _Lift(flights, col, self.polar)
        self._allocate(n, legs)
        self.t[:] = col["start_time_s"]
        self.h[:] = col["start_height_m"]
        self.stop_h[:] = col["band_bottom_m"]
        self.leg_entry[:, 0] = self.t
        self._set_cycle(everyone, self.lift.climb(everyone, self.t))
        self.leg_climb[:, 0], self.leg_mc[:, 0] = np.maximum(self.rate, 0.0), self.mc
        self.leg_fg_mc[:, 0] = self.mc_fg

    def _allocate(self, n: int, legs: int) -> None:
        nan_n, nan_nl = (lambda: np.full(n, np.nan)), (lambda: np.full((n, legs), np.nan))
        self.mode = np.full(n, _GLIDE)
        self.leg = np.zeros(n, dtype=int)
        self.pos, self.t, self.h, self.stop_h = np.zeros(n), np.zeros(n), np.zeros(n), np.zeros(n)
        self.search_left = np.full(n, np.inf)
        self.searching = np.zeros(n, dtype=bool)
        self.rate, self.mc, self.v, self.fraction, self.net_sink = (nan_n() for _ in range(5))
        self.pure = np.zeros(n, dtype=bool)
        self.mc_fg, self.sigma_fg = nan_n(), nan_n()
        self.hpm_fg, self.gs_fg, self.vc = nan_nl(), nan_nl(), nan_nl()
        self.tail = np.full((n, legs + 1), np.nan)
        self.finished = np.zeros(n, dtype=bool)
        self.reason = np.full(n, UNRESOLVED)
        self.end_t, self.stop_t, self.landout, self.last_climb_end = nan_n(), nan_n(), nan_n(), nan_n()
        self.landout_leg, self.fg_leg = np.full(n, -1), np.full(n, -1)
        self.fg_from, self.fg_height, self.fg_mc, self.fg_sigma = nan_n(), nan_n(), nan_n(), nan_n()
        self.climbs = np.zeros(n, dtype=int)
        self.leg_time = np.where(np.arange(legs) == 0, 0.0, np.nan)[None, :].repeat(n, axis=0)
        self.leg_entry, self.leg_arrival, self.leg_fg_mc = nan_nl(), nan_nl(), nan_nl()
        self.leg_climb, self.leg_mc = nan_nl(), nan_nl()
        self.leg_has_climb = np.zeros((n, legs), dtype=bool)
        self.leg_final = np.zeros((n, legs), dtype=bool)

    # ------------------------------------------------------------ the requirement

    def _tail(self, hpm):
        """Height used from each leg's start to the finish, shape (n, L+1) (0 at the finish)."""
        used = np.where(self.distance == 0.0, 0.0, hpm * self.distance)
        return np.concatenate([np.cumsum(used[..., ::-1], axis=-1)[..., ::-1],
                               np.zeros(used.shape[:-1] + (1,))], axis=-1)

    def required(self, rows, leg=None, pos=None, hpm=None, tail=None):
        """Required height [m MSL] of flights ``rows`` (n,) at (leg, position in leg): the one
        place where the final-glide requirement along the remaining path is computed.

        ``hpm`` (n, L) and ``tail`` (n, L+1) default to each flight's present final-glide table.
        """
        leg = self.leg[rows] if leg is None else leg
        pos = self.pos[rows] if pos is None else pos
        if hpm is None:
            hpm, tail = self.hpm_fg[rows], self.tail[rows]
        line = np.arange(rows.size)
        required = self.floor[rows] + hpm[line, leg] * (self.distance[leg] - pos) + tail[line, leg + 1]
        if self.requirement_hook is not None:
            required = required + self._extra(required, self.leg_start[leg] + pos, hpm, self.floor[rows])
        return required

    def _extra(self, required, position, hpm, floor):
        """The hook's extra height, asked only where the pure requirement is defined: a flight
        still too far out for a final-glide table (NaN) needs nothing from it."""
        asked = np.isfinite(required)
        if asked.all():
            return np.asarray(self.requirement_hook(position, hpm, floor), dtype=float)
        extra = np.zeros(required.shape)
        if asked.any():
            extra[asked] = self.requirement_hook(position[asked], hpm[asked], floor[asked])
        return extra

    def _final_glide_bound(self):
        """A lower bound [m/m] of the final glide's height used per metre, any leg, setting and density.

        Over the ground a glider makes at most ``v + W``; a final glide's density is at most
        the arrival floor's, and a denser polar glides no flatter in wind. So the height per
        metre is at least ``min over v of (sink_floor(v) - max(u, 0)) / (v + W)``: the tangent
        from ``(-W, 0)`` to the polar at the floor's density. NaN where rising air could
        carry the glider (no bound).
        """
        col = self.col
        # The densest air any final glide here flies in: a glide that starts at the floor itself.
        sigma = density_ratio(density_height_m(self.floor, self.floor), col["isa_deviation_c"])
        polar = scaled_polar(self.spec, col["mass_kg"], col["bugs_percent"], sigma)
        a, b = np.asarray(polar.a), np.asarray(polar.b)
        c = np.asarray(polar.c) - np.maximum(self.airmass, 0.0)
        wind = col["wind_speed_ms"]
        with np.errstate(invalid="ignore"):
            v = np.maximum(-wind + np.sqrt(wind * wind + (c - b * wind) / a), 0.0)
            bound = ((a * v + b) * v + c) / (v + wind)
        return np.where(bound > 0.0, bound * (1.0 - 1e-9), np.nan)

    def _far_from_final(self, rows):
        """Flights whose final glide cannot start before their next climb: no table needed.

        The furthest a cycle can carry a flight is its climb's drift plus a glide from the
        band top to the bottom at ground speed ``v + W``; if the lowest possible requirement
        there is still above the band top, no final glide can start in this cycle.
        """
        col = self.col
        top, bottom, wind = col["band_top_m"][rows], col["band_bottom_m"][rows], col["wind_speed_ms"][rows]
        rate, sink = self.rate[rows], self.net_sink[rows]
        remaining = self.leg_start[-1] - self.leg_start[self.leg[rows]] - self.pos[rows]
        with np.errstate(invalid="ignore", divide="ignore"):
            drift = np.where(rate > 0.0, np.maximum(top - self.h[rows], 0.0) / rate * wind, np.inf)
            glide = np.where(sink > 0.0, (top - bottom) * (self.v[rows] + wind) / sink, np.inf)
            lowest = self.floor[rows] + self.hpm_bound[rows] * np.maximum(remaining - drift - glide, 0.0)
        return (lowest > top + 1.0) & ~self.pure[rows]

    def _first_estimate(self, rows, leg, pos, mc_fg):
        """A cheap requirement [m MSL] to start the density iteration from: the band's polar
        at the still-air speed to fly, heading into the crosswind (no solver)."""
        line = np.arange(rows.size)
        polar = _take(self.polar, rows)
        airmass = self.airmass[rows, None]
        v = speed_to_fly_still_air(polar, mc_fg[:, None], airmass)
        with np.errstate(invalid="ignore", divide="ignore"):
            ground = np.asarray(ground_speed(v, self.along[rows], self.across[rows]))
            hpm = np.where(ground > 0.0, (polar.sink(v) - airmass) / ground, self.hpm0[rows])
        tail = self._tail(hpm)
        return self.floor[rows] + hpm[line, leg] * (self.distance[leg] - pos) + tail[line, leg + 1]

    def _final_table(self, rows, leg, pos, mc_fg, estimate=None):
        """Final-glide speeds per leg for flights ``rows`` starting at (leg, pos) at setting ``mc_fg``.

        The density is that of the middle of the start height (the requirement itself) and
        the arrival floor, found by two fixed-point passes from ``estimate`` (default a
        cheap first guess). Each pass shrinks the height error about twenty-fold, so the
        density matches the requirement to a few centimetres (a few decimetres from a
        poor first guess on long glides).
        """
        col = self.col
        line = np.arange(rows.size)
        first = self._first_estimate(rows, leg, pos, mc_fg)
        estimate = first if estimate is None else np.where(np.isfinite(estimate), estimate, first)
        for attempt in range(2):
            estimate = np.where(np.isfinite(estimate), estimate, col["band_top_m"][rows])
            mid = np.asarray(density_height_m(estimate, self.floor[rows]))
            sigma = np.asarray(density_ratio(mid, col["isa_deviation_c"][rows]), dtype=float)
            polar = scaled_polar(self.spec, col["mass_kg"][rows], col["bugs_percent"][rows], sigma)
            glide = glide_in_wind(_take(polar, line), mc_fg[:, None], self.along[rows], self.across[rows],
                                  self.airmass[rows, None])
            hpm = np.broadcast_to(glide.height_per_metre, (rows.size, self.legs))
            tail = self._tail(hpm)
            if attempt == 0:  # the next pass's start height, with the terrain's extra: the real start
                estimate = self.required(rows, leg, pos, hpm, tail)
        return hpm, np.broadcast_to(glide.ground_speed_ms, hpm.shape), tail, sigma

    def _solve_final(self, rows) -> None:
        """Give flights ``rows`` their cycle's final-glide table (where they are now)."""
        if not rows.size:
            return
        previous = self.required(rows)  # the last cycle's requirement here; NaN without a table
        hpm, gs, tail, sigma = self._final_table(rows, self.leg[rows], self.pos[rows], self.mc_fg[rows],
                                                 previous)
        self.hpm_fg[rows], self.gs_fg[rows], self.tail[rows], self.sigma_fg[rows] = hpm, gs, tail, sigma

    def _set_cycle(self, rows, rate) -> None:
        """Start a climb-and-glide cycle: its setting, cruise speeds and final-glide table."""
        col = self.col
        fixed = col["mc_ms"][rows]
        climbing = rate > 0.0
        mc = np.where(climbing, np.where(np.isnan(fixed), rate, fixed), 0.0)
        polar = _take(self.polar, rows)
        cruise = cruise_in_wind(polar, rate[:, None], self.along[rows], self.across[rows],
                                self.airmass[rows, None], mc[:, None])
        v = np.asarray(cruise.airspeed_ms)[:, 0]
        self.rate[rows], self.mc[rows], self.v[rows], self.pure[rows] = rate, mc, v, ~climbing
        self.fraction[rows] = np.asarray(cruise.glide_fraction)[:, 0]
        self.net_sink[rows] = np.asarray(polar.sink(v[:, None]))[:, 0] - self.airmass[rows]
        self.vc[rows] = cruise.cruise_speed_ms
        fixed_fg = col["final_glide_mc_ms"][rows]
        self.mc_fg[rows] = np.where(np.isnan(fixed_fg), mc, fixed_fg)
        far = self._far_from_final(rows)
        self.hpm_fg[rows[far]], self.tail[rows[far]] = np.nan, np.nan
        self._solve_final(rows[~far])

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
        gap = self.h[rows] - self.required(rows)
        now = gap >= 0.0
        if now.any():
            self._final(rows[now])
            rows, gap = rows[~now], gap[~now]
        k, s, h = self.leg[rows], self.pos[rows], self.h[rows]
        along, across = self.along[rows, k], self.across[rows, k]
        with np.errstate(invalid="ignore", divide="ignore"):
            cruise_gs = np.asarray(ground_speed(self.v[rows], along, across / self.fraction[rows]))
            pure = self.pure[rows]
            gs = np.where(pure, self.gs0[rows, k], cruise_gs)
            hpm = np.where(pure, self.hpm0[rows, k], self.net_sink[rows] / cruise_gs)
        blocked = ~(gs > 0.0)
        if blocked.any():
            self._glide_on(rows[blocked], UNREACHABLE)
            keep = ~blocked
            rows, gap, k, s, h, gs, hpm = rows[keep], gap[keep], k[keep], s[keep], h[keep], gs[keep], hpm[keep]
        if not rows.size:
            return
        closing = self.hpm_fg[rows, k] - hpm  # the gap grows by this per metre
        with np.errstate(invalid="ignore", divide="ignore"):
            to_final = np.where(closing > 0.0, -gap / closing, np.inf)
            to_stop = np.where(hpm > 0.0, np.maximum(h - self.stop_h[rows], 0.0) / hpm, np.inf)
        to_leg_end = self.distance[k] - s
        candidates = np.stack([to_final, to_leg_end, to_stop, self.search_left[rows]])
        event = np.argmin(candidates, axis=0)
        d = candidates[event, np.arange(rows.size)]
        dt = d / gs
        self.pos[rows] = s + d
        self.h[rows] = h - hpm * d
        self.t[rows] += dt
        self.leg_time[rows, k] += dt
        self.search_left[rows] -= d
        self._reached_requirement(rows[event == 0])
        self._leg_end(rows[event == 1])
        at_stop = rows[event == 2]
        self.h[at_stop] = self.stop_h[at_stop]
        self._reached_stop(at_stop)
        self._searched(rows[event == 3])

    def _reached_requirement(self, rows) -> None:
        """The height has come up to (or down onto) the requirement: the final glide starts."""
        if not rows.size:
            return
        self.h[rows] = np.maximum(self.h[rows], self.required(rows))
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
            self.searching[on], self.search_left[on], self.stop_h[on] = True, distance[go], self.floor[on]
            self._solve_final(on[np.isnan(self.tail[on, -1])])  # a search may reach the final glide
            rows = rows[~go]
        self.mode[rows] = _CLIMB_START

    def _searched(self, rows) -> None:
        if not rows.size:
            return
        self.searching[rows] = False
        self.search_left[rows] = np.inf
        self.stop_h[rows] = self.col["band_bottom_m"][rows]
        self.mode[rows] = _CLIMB_START

    def _start_climb(self, rows) -> None:
        t = self.t[rows]
        rate = self.lift.climb(rows, t)
        none = ~(rate > 0.0) | (t >= self.col["lift_ends_s"][rows])  # no time left to climb at the end of lift
        if none.any():
            ended = t[none] >= self.col["lift_ends_s"][rows[none]]
            self._glide_on(rows[none][ended], LIFT_ENDED)
            self._glide_on(rows[none][~ended], NO_CLIMB)
            rows, rate = rows[~none], rate[~none]
        if not rows.size:
            return
        self._set_cycle(rows, rate)
        k = self.leg[rows]
        blocked = ~(self.vc[rows, k] > 0.0)
        self._glide_on(rows[blocked], UNREACHABLE)
        rows, k = rows[~blocked], k[~blocked]
        first = ~self.leg_has_climb[rows, k]
        self.leg_climb[rows[first], k[first]] = self.rate[rows[first]]
        self.leg_mc[rows[first], k[first]] = self.mc[rows[first]]
        self.leg_has_climb[rows, k] = True
        self.climbs[rows] += 1
        self.mode[rows] = _CLIMB

    def _climb(self, rows) -> None:
        k, s, h, t, rate = self.leg[rows], self.pos[rows], self.h[rows], self.t[rows], self.rate[rows]
        drift = self.along[rows, k]
        gap = h - self.required(rows)
        closing = rate + self.hpm_fg[rows, k] * drift  # the gap grows by this per second
        with np.errstate(invalid="ignore", divide="ignore", over="ignore"):  # huge or inf: that event never comes
            to_final = np.where(gap >= 0.0, 0.0, np.where(closing > 0.0, -gap / closing, np.inf))
            to_leg_end = np.where(drift > 0.0, (self.distance[k] - s) / drift, np.inf)
        to_top = np.maximum(self.col["band_top_m"][rows] - h, 0.0) / rate
        to_lift_end = np.maximum(self.col["lift_ends_s"][rows] - t, 0.0)
        candidates = np.stack([to_final, to_top, to_leg_end, to_lift_end])
        event = np.argmin(candidates, axis=0)
        tau = candidates[event, np.arange(rows.size)]
        self.h[rows] = h + rate * tau
        self.pos[rows] = s + drift * tau
        self.t[rows] = t + tau
        self.leg_time[rows, k] += tau
        ended = rows[event != 2]
        self.last_climb_end[ended] = self.t[ended]
        self._reached_requirement(rows[event == 0])
        top = rows[event == 1]
        self.h[top] = self.col["band_top_m"][top]
        self.mode[top] = _GLIDE
        self._leg_end(rows[event == 2])
        self._glide_on(rows[event == 3], LIFT_ENDED)

    def _leg_end(self, rows) -> None:
        """Flights at the end of their leg (gliding or drifting in a climb) enter the next."""
        if not rows.size:
            return
        k = self.leg[rows]
        self.pos[rows] = self.distance[k]
        self.leg_arrival[rows, k] = self.h[rows]
        last = k == self.legs - 1
        self._glide_on(rows[last], BELOW_FLOOR)  # at the finish, still below the requirement
        rows, k = rows[~last], k[~last] + 1
        self.leg[rows], self.pos[rows] = k, 0.0
        self.leg_entry[rows, k] = self.t[rows]
        self.leg_time[rows, k] = 0.0
        self.leg_fg_mc[rows, k] = self.mc_fg[rows]
        self.leg_climb[rows, k], self.leg_mc[rows, k] = np.maximum(self.rate[rows], 0.0), self.mc[rows]

    # ------------------------------------------------------------ how flights end

    def _remaining(self, rows):
        """Distance left on every leg from the present position, shape (n, L)."""
        k, s = self.leg[rows], self.pos[rows]
        j = np.arange(self.legs)[None, :]
        remaining = np.where(j > k[:, None], self.distance[None, :], 0.0)
        remaining[np.arange(rows.size), k] = self.distance[k] - s
        return remaining

    def _final(self, rows, reason: int = FINAL_GLIDE, hpm=None, gs=None, mc=None) -> None:
        """The final glide from the present point over all remaining legs, then done.

        The planned final glide uses the cycle's table; a glide home after the climbs
        stopped passes the MacCready-0 table (``hpm``, ``gs``) and ``mc`` = 0.
        """
        if not rows.size:
            return
        planned = hpm is None
        hpm = self.hpm_fg[rows] if planned else hpm
        gs = self.gs_fg[rows] if planned else gs
        remaining = self._remaining(rows)
        flown = remaining != 0.0
        used = np.where(flown, remaining * hpm, 0.0)
        time = np.where(flown, remaining / gs, 0.0)
        k, t, h = self.leg[rows], self.t[rows], self.h[rows]
        j = np.arange(self.legs)[None, :]
        ahead, later = j >= k[:, None], j > k[:, None]
        cumulative_time = np.cumsum(time, axis=1)
        self.leg_time[rows] = np.where(ahead, np.nan_to_num(self.leg_time[rows]) + time, self.leg_time[rows])
        self.leg_arrival[rows] = np.where(ahead, h[:, None] - np.cumsum(used, axis=1), self.leg_arrival[rows])
        entry = t[:, None] + cumulative_time - time
        self.leg_entry[rows] = np.where(later, entry, self.leg_entry[rows])
        setting = self.mc_fg[rows] if planned else mc
        self.leg_fg_mc[rows] = np.where(later, self.mc_fg[rows][:, None], self.leg_fg_mc[rows])
        whole = later | ((j == k[:, None]) & (self.pos[rows] <= 0.0)[:, None] & ~self.leg_has_climb[rows])
        self.leg_final[rows] = whole
        self.leg_mc[rows] = np.where(whole, setting[:, None], self.leg_mc[rows])
        self.leg_climb[rows] = np.where(later, np.maximum(self.rate[rows], 0.0)[:, None], self.leg_climb[rows])
        self.fg_from[rows] = self.leg_start[k] + self.pos[rows]
        self.fg_height[rows], self.fg_mc[rows], self.fg_leg[rows] = h, setting, k
        self.fg_sigma[rows] = self.sigma_fg[rows] if planned else self.sigma_band[rows]
        if not planned:  # the glide home's own table, for the requirements on its legs
            self.hpm_fg[rows], self.tail[rows] = hpm, self._tail(hpm)
        self.end_t[rows] = t + cumulative_time[:, -1]
        self.finished[rows], self.reason[rows], self.mode[rows] = True, reason, _DONE

    def _glide_on(self, rows, reason: int) -> None:
        """No more climbs: glide on at MacCready 0 to the arrival floor; home if it reaches."""
        if not rows.size:
            return
        self.stop_t[rows] = self.t[rows]
        remaining = self._remaining(rows)
        hpm, gs = self.hpm0[rows], self.gs0[rows]
        with np.errstate(invalid="ignore"):
            used = np.where(remaining != 0.0, np.where(np.isfinite(hpm), remaining * hpm, np.inf), 0.0)
        cumulative = np.cumsum(used, axis=1)
        available = self.h[rows] - self.floor[rows]
        home = cumulative[:, -1] <= available
        if home.any():
            self._final(rows[home], reason, hpm[home], gs[home], np.zeros(int(home.sum())))
        out = ~home
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
        self.leg_arrival[rows] = np.where(done, self.h[rows][:, None] - cumulative, self.leg_arrival[rows])
        entered = (j > k[:, None]) & (j <= land_leg[:, None])
        entry = self.t[rows][:, None] + np.cumsum(time, axis=1) - time
        self.leg_entry[rows] = np.where(entered, entry, self.leg_entry[rows])
        self.leg_fg_mc[rows] = np.where(entered, self.mc_fg[rows][:, None], self.leg_fg_mc[rows])
        self.landout[rows] = self.leg_start[land_leg] + np.where(land_leg == k, self.pos[rows], 0.0) + into
        self.landout_leg[rows] = land_leg
        self.end_t[rows] = self.t[rows] + time.sum(axis=1)
        self.reason[rows], self.mode[rows] = reason, _DONE

    def _landed(self, rows, reason: int) -> None:
        """Flights that reached the arrival floor where they are (searching for a climb)."""
        if not rows.size:
            return
        self.stop_t[rows] = self.t[rows]
        self.landout[rows] = self.leg_start[self.leg[rows]] + self.pos[rows]
        self.landout_leg[rows] = self.leg[rows]
        self.end_t[rows] = self.t[rows]
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
        reached = np.isfinite(self.leg_entry) & np.isfinite(self.leg_fg_mc)
        gliding_home = np.arange(self.legs)[None, :] > self.fg_leg[:, None]
        gliding_home &= (self.fg_leg >= 0)[:, None] & reached
        required = np.full((self.n, self.legs), np.nan)
        pairs = np.argwhere(gliding_home)
        if pairs.size:
            rows, legs = pairs[:, 0], pairs[:, 1]
            required[rows, legs] = self.required(rows, legs, np.zeros(rows.size))
        pairs = np.argwhere(reached & ~gliding_home)
        if pairs.size:
            rows, legs = pairs[:, 0], pairs[:, 1]
            zero = np.zeros(rows.size)
            hpm, _, tail, _ = self._final_table(rows, legs, zero, self.leg_fg_mc[rows, legs])
            required[rows, legs] = self.required(rows, legs, zero, hpm, tail)
        return required

    def leg_speeds(self):
        """Airspeed, heading and ground speed in each leg's glides, and its cruise speed, at
        the settings the leg was flown with, shape (N, L) each (see :class:`Flown`)."""
        col, every = self.col, np.arange(self.n)
        climb, mc, final = self.leg_climb, self.leg_mc, self.leg_final
        airmass = self.airmass[:, None]
        band = _take(self.polar, every)
        cruise = cruise_in_wind(band, climb, self.along, self.across, airmass, np.maximum(np.nan_to_num(mc), 0.0))
        v, fraction = np.asarray(cruise.airspeed_ms), np.asarray(cruise.glide_fraction)
        with np.errstate(invalid="ignore", divide="ignore"):
            drift_fix = self.across / fraction  # air velocity across the course in the glides (contract 3)
            cruise_ground = np.asarray(ground_speed(v, self.along, drift_fix))
        cruise_heading = np.mod(self.course_deg[None, :] - np.asarray(correction_angle_deg(v, drift_fix)), 360.0)
        sigma = np.where(np.isfinite(self.fg_sigma), self.fg_sigma, density_ratio(0.0))
        final_polar = _take(scaled_polar(self.spec, col["mass_kg"], col["bugs_percent"], sigma), every)
        pure = glide_in_wind(final_polar, np.where(final, np.nan_to_num(mc), 0.0), self.along, self.across, airmass)
        best = glide_in_wind(band, 0.0, self.along, self.across, airmass)
        wind = (col["wind_from_deg"][:, None], col["wind_speed_ms"][:, None])
        pure_heading, _ = heading_for_course(self.course_deg[None, :], pure.airspeed_ms, *wind)
        best_heading, _ = heading_for_course(self.course_deg[None, :], best.airspeed_ms, *wind)
        no_climb = ~(climb > 0.0)  # a glide with no climb ahead (before the lift starts): best glide

        def pick(final_value, best_value, cruise_value):
            return np.where(final, final_value, np.where(no_climb, best_value, cruise_value))

        shape = (self.n, self.legs)
        return (np.broadcast_to(pick(pure.airspeed_ms, best.airspeed_ms, v), shape).copy(),
                np.broadcast_to(pick(pure_heading, best_heading, cruise_heading), shape).copy(),
                np.broadcast_to(pick(pure.ground_speed_ms, best.ground_speed_ms, cruise_ground), shape).copy(),
                np.broadcast_to(np.asarray(cruise.cruise_speed_ms, dtype=float), shape).copy())

    def result(self, detail: bool = True) -> Flown:
        start = self.col["start_time_s"]
        finish = np.where(self.finished, self.end_t, np.nan)
        required = self.leg_requirements() if detail else np.full((self.n, self.legs), np.nan)
        speeds = self.leg_speeds() if detail else tuple(np.full((self.n, self.legs), np.nan) for _ in range(4))
        return Flown(
            finished=self.finished.copy(), reason=self.reason.copy(), total_time_s=self.end_t - start,
            finish_time_s=finish, end_time_s=self.end_t.copy(), stop_time_s=self.stop_t.copy(),
            landout_m=np.where(self.finished, np.nan, self.landout),
            landout_leg=np.where(self.finished, -1, self.landout_leg),
            final_glide_from_m=self.fg_from.copy(), final_glide_height_m=self.fg_height.copy(),
            final_glide_mc_ms=self.fg_mc.copy(), final_glide_sigma=self.fg_sigma.copy(),
            final_glide_leg=self.fg_leg.copy(), climbs=self.climbs.copy(),
            last_climb_end_s=self.last_climb_end.copy(), leg_time_s=self.leg_time.copy(),
            leg_entry_time_s=self.leg_entry.copy(), leg_arrival_height_m=self.leg_arrival.copy(),
            leg_required_height_m=required, leg_climb_ms=self.leg_climb.copy(),
            leg_mc_ms=self.leg_mc.copy(), leg_final=self.leg_final.copy(), leg_airspeed_ms=speeds[0],
            leg_heading_deg=speeds[1], leg_ground_speed_ms=speeds[2], leg_cruise_speed_ms=speeds[3],
        )


def requirement_card(course: Course, flights: Flights, mc_values,
                     requirement: RequirementHook | None = None) -> np.ndarray:
    """Required height [m MSL] at each leg's start and at the finish for final glides home
    at several MacCready settings, shape (N, M, L+1), M = ``len(mc_values)``.

    Each requirement is computed as in :func:`fly`: the arrival floor plus the pure-glide
    height used over the remaining legs in their own wind, the density at the middle of
    its start and arrival heights, plus the ``requirement`` hook's extra (terrain). The
    last column is the floor itself.
    """
    simulation = _Simulation(course, flights, None, requirement)
    settings = np.atleast_1d(np.asarray(mc_values, dtype=float))
    n, count, legs = simulation.n, settings.size, course.legs
    rows = np.repeat(np.arange(n), count * legs)
    leg = np.tile(np.arange(legs), n * count)
    mc = np.tile(np.repeat(settings, legs), n)
    zero = np.zeros(rows.size)
    hpm, _, tail, _ = simulation._final_table(rows, leg, zero, mc)
    required = simulation.required(rows, leg, zero, hpm, tail).reshape(n, count, legs)
    floor = np.broadcast_to(simulation.floor[:, None, None], (n, count, 1))
    return np.concatenate([required, floor], axis=2)
