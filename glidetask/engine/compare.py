"""Ballast against thermal strength: the ballast sweep, and helpers for many flights.

A question asked on the launch grid, answered with the plan's own flight core
(:func:`glidetask.engine.flight.fly`), never a second model of the flight (how the task
time answers to the day is :mod:`glidetask.engine.sensitivity`):

* :func:`ballast_sweep`: the task with its wind flown for every ballast from empty to
  the most the glider may carry, in thermals of constant strength from weak to strong
  (shared/CONTRACT.md 5.4). Each strength becomes an achieved climb through the circling
  model (:func:`glidetask.engine.circling.achieved_climb`) for each ballast: the heavier
  glider circles faster, wider and sinks faster, so it climbs less in the same thermal,
  and gains speed only in the glides. The best ballast per strength and where ballast
  starts (and stops) paying follow.
* :func:`sweep_by_thermal_size`: the same sweep in narrow, typical and broad thermals
  (:data:`glidetask.engine.thermals.RADIUS_SPREAD` apart), so the pilot sees how much the
  best ballast rests on the thermal size.

References
----------
.. [1] H. Reichmann, Cross-Country Soaring, Thomson Publications, 1978: water ballast
   raises the speed in the glides but costs climb, most in narrow and weak thermals;
   carry it when the climbs are good (from memory).
.. [2] P. B. MacCready Jr., "Optimum airspeed selector", Soaring, Jan.-Feb. 1958: the
   time value of height is 1/m_c at the setting m_c (from memory).
.. [3] F. Thomas, Fundamentals of Sailplane Design, College Park Press, 1999: the
   circling polar and the climb of gliders of different wing loading in model
   thermals (from memory).
"""

from __future__ import annotations

import dataclasses
import math
from dataclasses import dataclass
from typing import Sequence

import numpy as np

from glidetask.engine import plan as planning
from glidetask.engine.circling import achieved_climb
from glidetask.engine.flight import Flights, climb_strengths, course_for, flights_for, fly
from glidetask.engine.landing_fields import landing_fields
from glidetask.engine.plan_airspace import corridor
from glidetask.engine.plan_safety import load_terrain_for, terrain_requirement
from glidetask.engine.scenario import Profile, Scenario
from glidetask.engine.speedtofly import cruise_in_wind
from glidetask.engine.thermals import RADIUS_SPREAD

SWEEP_STRENGTHS_MS = tuple(0.5 * i for i in range(1, 11))  # 0.5, 1.0, ... 5.0 m/s
SWEEP_BALLAST_STEPS = 19  # ballast values from empty to full
SWEEP_PHASES = 16  # positions of the climbs along the route averaged over (see ballast_sweep)
#: Water is "best" only if it saves more than this share of the fastest time: a smaller
#: gain is within what the model resolves (see :func:`ballast_sweep`) and not worth the water.
BALLAST_GAIN_TOLERANCE = 0.002



# ---------------------------------------------------------------- shared helpers


def usable_ballast_kg(scenario: Scenario) -> float:
    """The most water the glider may carry with this pilot [kg]: the polar's maximum
    ballast, or less if the maximum mass is reached first (never below 0)."""
    glider = scenario.glider
    spec = glider.spec
    limit = spec.max_ballast_kg
    if spec.max_mass_kg is not None:
        limit = min(limit, spec.max_mass_kg - spec.empty_mass_kg - glider.pilot_kg)
    return max(float(limit), 0.0)


def stack_flights(flights: Sequence[Flights]) -> Flights:
    """One :class:`Flights` of N flights from N single flights (same polar and profile times).

    Raises
    ------
    ValueError
        Flights of different polars, wind profiles or profile times.
    """
    first = flights[0]
    for other in flights[1:]:
        if (other.spec != first.spec or other.wind_profile != first.wind_profile
                or tuple(np.atleast_1d(other.lift_times_s)) != tuple(np.atleast_1d(first.lift_times_s))
                or tuple(other.band_top_times_s) != tuple(first.band_top_times_s)
                or tuple(other.band_top_values) != tuple(first.band_top_values)):
            raise ValueError("stacked flights must share the polar, the wind profile, the lift profile's times "
                             "and the band top through the day")
    columns = {name: np.array([np.asarray(getattr(f, name), dtype=float) for f in flights])
               for name in Flights._PER_FLIGHT}
    values = np.array([np.atleast_1d(np.asarray(f.lift_values, dtype=float)) for f in flights])
    kinds = np.array([np.asarray(f.lift_is_strength, dtype=bool) for f in flights])
    strength = bool(kinds[0]) if np.all(kinds == kinds[0]) else kinds  # one kind, or one per flight
    return dataclasses.replace(first, lift_values=values, lift_is_strength=strength, **columns)


def fly_stacked(course, flights: Sequence[Flights], detour_factors=None, **options) -> list:
    """Fly single flights in as few core calls as they allow (one per wind profile and
    detour factor: the core shares those between its flights) and return each one's
    :class:`~glidetask.engine.flight.Flown` in the given order. ``detour_factors`` (one
    per flight) replace the course's own."""
    detours = [course.detour_factor] * len(flights) if detour_factors is None else list(detour_factors)
    groups: dict[int, list[int]] = {}
    for i, f in enumerate(flights):
        key = next((k for k in groups if flights[k].wind_profile == f.wind_profile and detours[k] == detours[i]), i)
        groups.setdefault(key, []).append(i)
    out = [None] * len(flights)
    for key, members in groups.items():
        flown = fly(dataclasses.replace(course, detour_factor=detours[key]),
                    stack_flights([flights[i] for i in members]), **options)
        for j, i in enumerate(members):
            out[i] = flown.flight(j)
    return out


TASK_TERRAIN = "task"  # requirement=: the task's elevation model, as plan() flies by default


def planned_route(scenario: Scenario, path=None, requirement=TASK_TERRAIN):
    """The path the plan flies and the final-glide requirement hook it flies it with.

    Parameters
    ----------
    scenario : Scenario
    path : TaskPath, optional
        The planned path; default the one :func:`glidetask.engine.plan.plan` chooses
        (racing: optimized; area: the chosen targets), and then its hook as well.
    requirement : RequirementHook, None or "task"
        Extra final-glide height along the path; ``"task"`` (default): the hook ``plan()``
        flies ``path`` with: the task's elevation model sampled along it, or without one the
        landable fields along it (a land-out ends in the field it reaches), under the task's
        airspace corridor when it has airspace.

    Returns
    -------
    (TaskPath, RequirementHook or None)
    """
    if path is None:
        planned = planning.plan(scenario)
        return planned.path, planned.requirement
    if isinstance(requirement, str):
        if requirement != TASK_TERRAIN:
            raise ValueError(f"requirement must be a hook, None or {TASK_TERRAIN!r}")
        model = load_terrain_for(scenario)
        requirement = (landing_fields if model is None else terrain_requirement(model))(scenario, path)
        if scenario.airspace is not None:
            requirement = corridor(scenario, path, requirement, model)
    return path, requirement


def _band_polar(scenario: Scenario, ballast_kg):
    """The polar at each ballast at the density of the middle of the working band (as the
    flight core flies it)."""
    day = scenario.day
    return scenario.glider.polar_at(day.band_middle_m, day.isa_deviation_c,
                                    ballast_kg=np.asarray(ballast_kg, dtype=float))


def forecast_strength_ms(scenario: Scenario) -> float:
    """The thermal strength of the forecast's peak [m/s] (see :class:`BallastSweep`)."""
    day = scenario.day
    if day.thermal_strength is not None:
        return float(max(day.thermal_strength.values))
    peak = dataclasses.replace(scenario, day=dataclasses.replace(day, climb=Profile.constant(max(day.climb.values))))
    return float(climb_strengths(peak)[0])


# ---------------------------------------------------------------- ballast sweep


@dataclass(frozen=True)
class BallastSweep:
    """Task time by ballast and thermal strength (contract 5.4), SI units.

    Arrays are indexed ``[strength, ballast]``; undefined values are NaN.

    Attributes
    ----------
    task_name : str
    planned_distance_m : float
        Length of the path flown (racing: optimized; area: the plan's targets) [m].
    ballast_kg, mass_kg : ndarray, (B,)
        Water ballast and flying mass of each column [kg].
    thermal_strength_ms : ndarray, (S,)
        Thermal core updraft of each row, constant through the day [m/s].
    thermal_radius_m : float
        e-folding radius of the thermals [m].
    thermal_radius_source : str
        Where that radius comes from, in words (:attr:`glidetask.engine.scenario.Day.thermal_radius_source`).
    achieved_climb_ms : ndarray, (S, B)
        Climb achieved circling in the thermal (circling model) [m/s]; negative where
        the glider cannot climb in it.
    cruise_speed_ms : ndarray, (S, B)
        Still-air MacCready cruise speed at that climb (setting = climb) [m/s]; NaN where
        the glider cannot climb.
    task_time_s : ndarray, (S, B)
        Start to finish, averaged over where the climbs fall along the route; NaN where
        the task cannot be finished before lift ends.
    best_ballast_kg : ndarray, (S,)
        Per strength the lightest ballast whose time is within
        :data:`BALLAST_GAIN_TOLERANCE` of the fastest; NaN where no ballast finishes.
    fastest_ballast_kg : ndarray, (S,)
        Per strength the ballast of the shortest time, however small its gain.
    ballast_pays_from_ms : float
        The weakest strength at which some ballast beats the empty glider (below it no
        ballast is best); NaN if never in the range.
    full_ballast_from_ms : float
        The weakest strength at which full ballast is best; NaN if never.
    scenario_ballast_kg : float
        The ballast in the task file [kg].
    forecast_strength_ms : float
        The thermal strength of the forecast's peak: the peak of a thermal-strength
        profile, or the strength in which the glider as loaded achieves the peak of an
        achieved-climb profile [m/s].
    phases : int
        Number of positions of the climbs along the route averaged over.
    notes : tuple of Notice
        What the pilot should know about this sweep, as facts
        (:class:`glidetask.engine.plan.Notice`; :mod:`glidetask.cautions` words them).
    """

    task_name: str
    planned_distance_m: float
    ballast_kg: np.ndarray
    mass_kg: np.ndarray
    thermal_strength_ms: np.ndarray
    thermal_radius_m: float
    achieved_climb_ms: np.ndarray
    cruise_speed_ms: np.ndarray
    task_time_s: np.ndarray
    best_ballast_kg: np.ndarray
    fastest_ballast_kg: np.ndarray
    ballast_pays_from_ms: float
    full_ballast_from_ms: float
    scenario_ballast_kg: float
    forecast_strength_ms: float
    phases: int
    notes: tuple[planning.Notice, ...]
    thermal_radius_source: str = ""
    #: The best ballast in narrow, typical and broad thermals (:func:`sweep_by_thermal_size`);
    #: empty if not asked.
    by_thermal_size: tuple["ThermalSizeBallast", ...] = ()


@dataclass(frozen=True)
class ThermalSizeBallast:
    """The best ballast per strength in thermals of one size.

    Attributes
    ----------
    name : str
        "narrow", "typical" or "broad".
    thermal_radius_m : float
        The e-folding radius of the thermals [m].
    best_ballast_kg : ndarray, (S,)
        Per strength of the sweep (:attr:`BallastSweep.thermal_strength_ms`) the best
        ballast (:attr:`BallastSweep.best_ballast_kg`) [kg]; NaN where nothing finishes.
    ballast_pays_from_ms, full_ballast_from_ms : float
        As in :class:`BallastSweep`, for thermals of this size [m/s].
    achieved_climb_ms : ndarray, (S, B)
        The circling model's climb per strength and ballast in thermals of this size [m/s].
    """

    name: str
    thermal_radius_m: float
    best_ballast_kg: np.ndarray
    ballast_pays_from_ms: float
    full_ballast_from_ms: float
    achieved_climb_ms: np.ndarray


def sweep_ballasts_kg(scenario: Scenario, steps: int = SWEEP_BALLAST_STEPS) -> np.ndarray:
    """``steps`` ballasts evenly from 0 to :func:`usable_ballast_kg` [kg]; ``[0]`` if the
    glider carries no water."""
    full = usable_ballast_kg(scenario)
    return np.linspace(0.0, full, steps) if full > 0.0 else np.zeros(1)


def climb_table(scenario: Scenario, ballast_kg, strengths_ms):
    """Achieved climb and still-air cruise speed for each strength x ballast.

    Returns
    -------
    climb_ms, cruise_ms : ndarray, (S, B)
        The circling model's climb in a Gaussian thermal of the day's radius, at the
        density of the middle of the working band (as the flight core uses it), and the
        MacCready cruise speed at that climb in still air [m/s].
    """
    day = scenario.day
    polar = _band_polar(scenario, np.asarray(ballast_kg, dtype=float)[None, :])
    strengths = np.asarray(strengths_ms, dtype=float)[:, None]
    climb = np.asarray(achieved_climb(polar, strengths, day.effective_thermal_radius_m,
                                      stall_margin=day.stall_margin).climb_ms, dtype=float)
    with np.errstate(invalid="ignore"):
        cruise = np.asarray(cruise_in_wind(polar, np.maximum(climb, 0.0), 0.0, 0.0).cruise_speed_ms, dtype=float)
    cruise = np.where(climb > 0.0, cruise, np.nan)
    return climb, np.broadcast_to(cruise, climb.shape).copy()


def _phase_start_heights(day, phases: int) -> np.ndarray:
    """Start heights ``h0 - k D / K`` (k = 0..K-1, D the band's depth), lifted by D where
    they fall below the band bottom: K evenly spaced phases of the climb-and-glide cycle."""
    depth = day.band_top_m - day.band_bottom_m
    start = day.effective_start_height_m
    heights = start - np.arange(phases) * depth / phases
    return np.where(heights < day.band_bottom_m, heights + depth, heights)


def ballast_sweep(scenario: Scenario, *, strengths_ms=SWEEP_STRENGTHS_MS, ballasts_kg=None, path=None,
                  requirement=TASK_TERRAIN, phases: int = SWEEP_PHASES) -> BallastSweep:
    """Task time for every ballast against thermal strength, one vectorised flight call.

    Parameters
    ----------
    scenario : Scenario
        Task, glider (polar, pilot, bugs), day (start, band, wind, end of lift, thermal
        radius) and margins.
    strengths_ms : sequence of float
        Thermal core strengths [m/s], constant through the day until lift ends.
    ballasts_kg : sequence of float, optional
        Ballasts [kg] (sorted, repeats dropped); default :func:`sweep_ballasts_kg` (19
        from empty to full).
    path, requirement : optional
        The planned path and its final-glide requirement (see :func:`planned_route`;
        default: as :func:`glidetask.engine.plan.plan` flies the task).
    phases : int
        Positions of the climbs along the route to average over (>= 1).

    Returns
    -------
    BallastSweep

    Notes
    -----
    Every flight is the planner's (:func:`glidetask.engine.flight.flights_for`) with the
    mass of its ballast and a thermal-strength profile held at the row's strength; the
    MacCready setting follows the achieved climb (a fixed setting in the day would not
    suit every strength), the final-glide setting and margins are the scenario's.

    In the flight core every climb is taken where the glider reaches the band bottom, so
    the places of the climbs, and with them whether a climb drifts on a tailwind or a
    headwind leg, shift with the ballast: a step of 1-2 % in the task time between
    neighbouring ballasts that no pilot could count on. Real thermals are not placed by
    the glider's sink rate, so the time is averaged over ``K`` phases of the cycle: the
    task is flown from start heights ``h0 - k D/K`` (band depth ``D``, wrapped into the
    band) and each time is referred back to the real start height ``h0`` by the time the
    height difference is worth, ``(h_k - h0)/m_c`` at the achieved climb ``m_c`` [2]_.
    A cell counts as finished only if every phase finishes. What remains (a few tenths of
    a minute where the time hardly changes with ballast) is why the best ballast is the
    lightest within :data:`BALLAST_GAIN_TOLERANCE` (0.2 %, 20 seconds in three hours)
    of the fastest: water that buys less is not worth carrying, and the model
    cannot tell such gains apart.
    """

    if phases < 1:
        raise ValueError("phases must be at least 1")
    path, requirement = planned_route(scenario, path, requirement)
    day, glider = scenario.day, scenario.glider
    ballast = sweep_ballasts_kg(scenario) if ballasts_kg is None else np.unique(np.asarray(ballasts_kg, dtype=float))
    strengths = np.asarray(strengths_ms, dtype=float)
    if ballast.ndim != 1 or strengths.ndim != 1 or np.any(ballast < 0.0) or np.any(~(strengths > 0.0)):
        raise ValueError("ballasts must be >= 0 and strengths > 0, each a 1-D sequence")
    climb, cruise = climb_table(scenario, ballast, strengths)
    starts = _phase_start_heights(day, phases)
    s_grid, b_grid, h_grid = np.meshgrid(strengths, ballast, starts, indexing="ij")
    base = flights_for(scenario)
    flights = dataclasses.replace(
        base, mass_kg=glider.mass_with_ballast_kg(b_grid).ravel(),
        start_height_m=h_grid.ravel(), lift_scale=s_grid.ravel(), lift_times_s=(day.start_time_s,),
        lift_values=(1.0,), lift_is_strength=True, mc_ms=math.nan)
    flown = fly(course_for(path, scenario.day.detour_percent), flights, requirement=requirement, detail=False)
    with np.errstate(invalid="ignore", divide="ignore"):
        worth = (h_grid - day.effective_start_height_m) / climb[..., None]
    worth = np.where(h_grid == day.effective_start_height_m, 0.0, worth)
    times = np.where(flown.finished, flown.total_time_s, np.nan).reshape(h_grid.shape) + worth
    task_time = np.where(np.all(np.isfinite(times), axis=-1), times.mean(axis=-1), np.nan)
    task_time = np.where(climb > 0.0, task_time, times[..., 0])  # no climbs: only the real start counts
    best = _best_ballast(task_time, ballast)
    return BallastSweep(
        task_name=scenario.task.name, planned_distance_m=float(path.total_m), ballast_kg=ballast,
        mass_kg=glider.mass_with_ballast_kg(ballast), thermal_strength_ms=strengths,
        thermal_radius_m=float(day.effective_thermal_radius_m), achieved_climb_ms=climb, cruise_speed_ms=cruise,
        task_time_s=task_time, best_ballast_kg=best, fastest_ballast_kg=_fastest_ballast(task_time, ballast),
        ballast_pays_from_ms=_first_strength(strengths, best > 0.0),
        full_ballast_from_ms=_first_strength(strengths, (best == ballast.max()) & (ballast.max() > 0.0)),
        scenario_ballast_kg=float(glider.ballast_kg), forecast_strength_ms=forecast_strength_ms(scenario),
        phases=phases, notes=tuple(_sweep_notes(scenario, ballast)), thermal_radius_source=day.thermal_radius_source)


THERMAL_SIZES = ("narrow", "typical", "broad")


def thermal_size_radii_m(scenario: Scenario) -> dict[str, float]:
    """Narrow, typical and broad thermal radii [m]: the day's radius (given, or Allen's for
    its layer) divided and multiplied by :data:`glidetask.engine.thermals.RADIUS_SPREAD`
    (the typical radius as in :func:`glidetask.engine.thermals.thermal_radii`)."""
    typical = float(scenario.day.effective_thermal_radius_m)
    return {"narrow": typical / RADIUS_SPREAD, "typical": typical, "broad": typical * RADIUS_SPREAD}


def sweep_by_thermal_size(scenario: Scenario, *, typical: BallastSweep | None = None, **options) -> BallastSweep:
    """The ballast sweep for the day's thermals, with the best ballast in narrow, typical and
    broad thermals side by side (:attr:`BallastSweep.by_thermal_size`).

    Parameters
    ----------
    scenario : Scenario
    typical : BallastSweep, optional
        The sweep of the day's own thermals if already made (``ballast_sweep(scenario,
        **options)``); made here otherwise.
    **options
        As :func:`ballast_sweep` (strengths, ballasts, path, requirement, phases), the
        same for every size.

    Returns
    -------
    BallastSweep
        ``typical`` with ``by_thermal_size`` set, narrow first.

    Notes
    -----
    Only the thermal radius differs between the three sweeps (:func:`thermal_size_radii_m`);
    a day given as achieved climbs keeps its strengths (the sweep's rows are thermal
    strengths), so a narrow thermal of the same strength gives every mass less climb.
    """
    if options.get("path") is None:
        options["path"], options["requirement"] = planned_route(scenario, None, options.get("requirement", TASK_TERRAIN))
    typical = ballast_sweep(scenario, **options) if typical is None else typical
    sizes = []
    for name, radius in thermal_size_radii_m(scenario).items():
        if name == "typical":
            sweep = typical
        else:
            day = dataclasses.replace(scenario.day, thermal_radius_m=radius)
            sweep = ballast_sweep(dataclasses.replace(scenario, day=day), **options)
        sizes.append(ThermalSizeBallast(name, float(radius), sweep.best_ballast_kg, sweep.ballast_pays_from_ms,
                                        sweep.full_ballast_from_ms, sweep.achieved_climb_ms))
    return dataclasses.replace(typical, by_thermal_size=tuple(sizes))


def _fastest_ballast(task_time: np.ndarray, ballast: np.ndarray) -> np.ndarray:
    """Ballast of the shortest time per row (the lighter one on a tie); NaN for rows with none."""
    finite = np.isfinite(task_time)
    index = np.argmin(np.where(finite, task_time, np.inf), axis=1)
    return np.where(finite.any(axis=1), ballast[index], np.nan)


def _best_ballast(task_time: np.ndarray, ballast: np.ndarray,
                  tolerance: float = BALLAST_GAIN_TOLERANCE) -> np.ndarray:
    """Per row the lightest ballast within ``tolerance`` (a share) of the fastest time; NaN
    for rows where nothing finishes. ``ballast`` must be increasing."""
    times = np.where(np.isfinite(task_time), task_time, np.inf)
    fastest = times.min(axis=1, keepdims=True)
    index = np.argmax(times <= fastest * (1.0 + tolerance), axis=1)
    return np.where(np.isfinite(fastest[:, 0]), ballast[index], np.nan)


def _first_strength(strengths: np.ndarray, mask: np.ndarray) -> float:
    """The weakest strength where ``mask`` holds; NaN if nowhere."""
    order = np.argsort(strengths)
    hits = order[mask[order]]
    return float(strengths[hits[0]]) if hits.size else math.nan


def _sweep_notes(scenario: Scenario, ballast: np.ndarray) -> list[planning.Notice]:
    """What the pilot must know about a sweep, as facts (:func:`glidetask.cautions.notice_text` words them)."""
    day = scenario.day
    notes = [planning.Notice("sweep_one_thermal", {"thermal_radius_m": day.effective_thermal_radius_m,
                                                   "source": day.thermal_radius_source})]
    if ballast.max() <= 0.0:
        notes.append(planning.Notice("no_water_ballast"))
    if scenario.task.kind == "area":
        notes.append(planning.Notice("sweep_area_targets"))
    if day.mc_ms is not None:
        notes.append(planning.Notice("sweep_ignores_fixed_mc", {"mc_ms": day.mc_ms}))
    notes.append(planning.Notice("dump_water"))
    return notes
