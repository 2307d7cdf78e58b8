"""The odds of getting home: the task flown over many simulated days around the forecast.

The forecast is one day; the real one will differ. :func:`simulate_days` draws many
days from a spread around the forecast (:class:`DaySpread`), flies the task on each
with the planner's own flight core (:func:`glidetask.engine.flight.fly`), vectorised over
all days and ballast choices at once, and counts how often the task is finished, how
long it takes, and where the land-outs happen.

Each simulated day differs from the forecast in its strength, its wind, its end of lift,
a share of bad days and the thermal spacing along the route (:mod:`glidetask.engine.day_spread`,
planning assumptions of our own; zero spread reproduces the plan). The spacing makes a
pilot reaching the band bottom glide on to the next usable climb; one who comes down to
the arrival floor before finding one lands out there, or, with an elevation model, where
the glide first comes down to the terrain clearance above the terrain, if that is sooner.

Where the climbs end (the end of lift, no climb) before the final glide can start, the
flight glides on at MacCready 0 and lands out by the plan's own rule, so a simulated
land-out is where the plan's would be on the same day: with an elevation model, where that
glide comes down to the terrain clearance above the terrain under it (the contact rule of
every glide, :mod:`glidetask.engine.flight_ground`); without one, at the elevation of the
landable field it reaches plus the arrival margin (:mod:`glidetask.engine.landing_fields`),
or at the finish elevation plus the margin when no field is in reach.

The days are drawn once per run and shared by every ballast choice (common random
numbers), so the choices are compared on the same days.

References
----------
.. [1] D. H. Lenschow and P. L. Stephens, "The role of thermals in the convective boundary
   layer", Boundary-Layer Meteorology 19, 1980: thermals spaced about one to two
   boundary-layer depths apart (from memory).
.. [2] H. Reichmann, Cross-Country Soaring, Thomson Publications, 1978: the risk of
   landing out when flying low, and the choice of water ballast (from memory).
"""

from __future__ import annotations

import dataclasses
import math
from dataclasses import dataclass

import numpy as np

from glidetask.engine import flight
from glidetask.engine import plan as planning
from glidetask.engine.compare import planned_route, stack_flights, usable_ballast_kg
from glidetask.engine.day_spread import SEARCH_DRAWS, Days, DaySpread, draw_days, stretched_profiles
from glidetask.engine.flight import Flights, course_for, flights_for, fly
from glidetask.engine.scenario import Scenario, with_what_ifs

DEFAULT_RUNS = 2000
PERCENTILES = (10.0, 50.0, 90.0)
#: Why a simulated flight ended short, by the core's reason code: (key, words).
LANDOUT_REASONS = {
    flight.LIFT_ENDED: ("lift_ended", "lift ended"),
    flight.NO_CLIMB: ("too_weak", "thermals too weak to climb in"),
    flight.UNREACHABLE: ("wind_too_strong", "wind too strong to make progress"),
    flight.NO_THERMAL_FOUND: ("no_thermal_found", "no climb found low down"),
    flight.BELOW_FLOOR: ("below_floor", "reached the finish below the margin"),
    flight.UNRESOLVED: ("unresolved", "unresolved"),
    flight.TERRAIN_ABOVE_BAND: ("terrain_above_band", "terrain above the working band"),
}
#: Thermal spacings of the spacing table, as multiples of the day's own (:func:`spacing_odds`).
SPACING_FACTORS = (0.5, 1.0, 2.0, 4.0)


# ---------------------------------------------------------------- results


@dataclass(frozen=True)
class ChoiceOdds:
    """One ballast choice over all simulated days.

    Attributes
    ----------
    ballast_kg, mass_kg : float
    runs : int
    finished : int
        Days on which the task was finished (reaching the finish at or above the floor).
    finish_probability, finish_probability_se : float
        ``finished / runs`` and its binomial standard error ``sqrt(p(1-p)/runs)``.
    task_time_s : tuple of float
        10th, 50th and 90th percentile of the task time among the finishers [s]; NaN
        with no finisher.
    landouts_by_leg : tuple of int
        Land-outs on each leg.
    landouts_by_reason : tuple of (str, int)
        Land-outs by why the flight ended (keys of :data:`LANDOUT_REASONS`), only those
        that happened.
    forecast_time_s : float
        The task on the forecast day (no spread) [s], as the plan flies it.
    forecast_finished : bool
    finish_times_s : ndarray
        The finishers' task times [s] (for plots; not in the JSON).
    """

    ballast_kg: float
    mass_kg: float
    runs: int
    finished: int
    finish_probability: float
    finish_probability_se: float
    task_time_s: tuple[float, float, float]
    landouts_by_leg: tuple[int, ...]
    landouts_by_reason: tuple[tuple[str, int], ...]
    forecast_time_s: float
    forecast_finished: bool
    finish_times_s: np.ndarray


@dataclass(frozen=True)
class Odds:
    """The simulation's answer for each ballast choice."""

    task_name: str
    legs: tuple[tuple[str, str], ...]
    runs: int
    seed: int
    spread: DaySpread
    choices: tuple[ChoiceOdds, ...]
    #: What the pilot must know, as facts (:class:`glidetask.engine.plan.Notice`).
    notes: tuple["planning.Notice", ...]
    #: The convective layer whose typical thermal spacing (Allen 2006) gave the search
    #: distance [m]; NaN when the spread gave the distance itself.
    search_layer_m: float = math.nan
    #: The finishing odds at other thermal spacings (:func:`spacing_odds`); empty if not asked.
    spacing: tuple["SpacingOdds", ...] = ()


@dataclass(frozen=True)
class SpacingOdds:
    """The finishing odds with the thermals ``factor`` times as far apart as the day's.

    Attributes
    ----------
    factor : float
        The spacing over the day's own [-].
    search_mean_m : float
        The mean distance to the next thermal on the forecast day [m].
    finish_probability, finish_probability_se : tuple of float
        One per ballast choice, in the order of :attr:`Odds.choices`.
    """

    factor: float
    search_mean_m: float
    finish_probability: tuple[float, ...]
    finish_probability_se: tuple[float, ...]


def default_ballasts_kg(scenario: Scenario) -> tuple[float, ...]:
    """Empty, half and full (the most the glider may carry with this pilot); just empty
    for a glider that carries no water."""
    full = usable_ballast_kg(scenario)
    return (0.0, 0.5 * full, full) if full > 0.0 else (0.0,)


# ---------------------------------------------------------------- the simulation


def simulate_days(scenario: Scenario, *, runs: int = DEFAULT_RUNS, seed: int = 1, ballasts_kg=None,
                  spread: DaySpread | None = None, path=None, requirement="task") -> Odds:
    """Fly the task over ``runs`` simulated days for each ballast choice.

    Parameters
    ----------
    scenario : Scenario
        The forecast: task, glider, day, margins.
    runs : int
        Simulated days (>= 1), the same days for every ballast choice.
    seed : int
        Seed of ``numpy.random.default_rng``: the same seed gives the same days.
    ballasts_kg : sequence of float, optional
        Ballast choices [kg] (default :func:`default_ballasts_kg`).
    spread : DaySpread, optional
        How the days spread (default :class:`DaySpread`: the day's own search distance);
        :meth:`DaySpread.none` reproduces the plan.
    path, requirement : optional
        The planned path and its final-glide requirement (the terrain, if the task has
        a model): see :func:`glidetask.engine.compare.planned_route`; default: as
        :func:`glidetask.engine.plan.plan` flies the task.

    Returns
    -------
    Odds

    Raises
    ------
    InputError
        A ballast the glider cannot carry (the scenario's ``with_what_ifs`` check).

    Notes
    -----
    Every flight starts from the planner's inputs for its ballast
    (:func:`glidetask.engine.flight.flights_for` of ``with_what_ifs(scenario,
    ballast_kg=...)``); a day changes only the lift scale, the wind, the end of lift (and
    the profile's decay with it) and adds the thermal search. With no spread these are
    the forecast's own values, untouched, and no search hook is passed: each run is
    then the plan, to the last bit. The path is the plan's (for an area task the
    targets the plan chose at the scenario's ballast).
    """
    spread = DaySpread() if spread is None else spread
    given = spread.thermal_search_mean_m is not None
    spread = spread.for_day(scenario)
    choices = tuple(float(b) for b in (default_ballasts_kg(scenario) if ballasts_kg is None else ballasts_kg))
    if not choices:
        raise ValueError("give at least one ballast choice")
    # Each ballast as the planner flies it (climbs of the file's loading: other ballasts climb
    # in the same thermals, flight.day_lift).
    setups = [flights_for(with_what_ifs(scenario, ballast_kg=b)) for b in choices]
    path, requirement = planned_route(scenario, path, requirement)
    course = course_for(path, scenario.day.detour_percent)
    days = draw_days(scenario, spread, runs, seed)
    flights, search = _day_flights(scenario, setups, days, spread)
    flown = fly(course, flights, search=search, requirement=requirement, detail=False)
    forecast = fly(course, stack_flights(setups), requirement=requirement, detail=False)
    legs = tuple((leg.from_name, leg.to_name) for leg in path.legs)
    results = tuple(_choice(choices[c], setups[c], flown, slice(c * runs, (c + 1) * runs), forecast.flight(c),
                            len(legs)) for c in range(len(choices)))
    return Odds(scenario.task.name, legs, runs, int(seed), spread, results, tuple(_notes(scenario, spread)),
                search_layer_m=math.nan if given else scenario.day.layer_depth_m)


def spacing_odds(scenario: Scenario, odds: Odds, factors=SPACING_FACTORS, *, path=None,
                 requirement="task") -> Odds:
    """The odds with a table of the finishing odds at other thermal spacings.

    Each row flies the same days (the same seed and runs, every other spread as in
    ``odds``) with the thermal search distance ``factor`` times the one ``odds`` used,
    so the pilot sees how much the finishing odds rest on the spacing assumed. The row
    of factor 1 is ``odds`` itself. With no search (the forecast day alone) there is no
    table.

    Returns
    -------
    Odds
        ``odds`` with :attr:`Odds.spacing` set, in the order of ``factors``.
    """
    base = odds.spread.thermal_search_mean_m
    if not base:
        return odds
    ballasts = [c.ballast_kg for c in odds.choices]
    rows = []
    for factor in factors:
        spread = dataclasses.replace(odds.spread, thermal_search_mean_m=base * float(factor))
        other = odds if factor == 1.0 else simulate_days(scenario, runs=odds.runs, seed=odds.seed,
                                                         ballasts_kg=ballasts, spread=spread, path=path,
                                                         requirement=requirement)
        rows.append(SpacingOdds(float(factor), base * float(factor),
                                tuple(c.finish_probability for c in other.choices),
                                tuple(c.finish_probability_se for c in other.choices)))
    return dataclasses.replace(odds, spacing=tuple(rows))


def _day_flights(scenario: Scenario, setups: list[Flights], days: Days, spread: DaySpread):
    """The core's inputs for every (choice, day), choice-major, and the search hook (or None)."""
    runs, count = days.climb_factor.size, len(setups)
    stacked = stack_flights(setups)
    per_choice = {name: np.repeat(np.asarray(getattr(stacked, name)), runs) for name in Flights._PER_FLIGHT}
    if np.ndim(stacked.lift_is_strength):  # one kind of profile per choice (flight.day_lift)
        per_choice["lift_is_strength"] = np.repeat(np.asarray(stacked.lift_is_strength), runs)

    def tile(array):
        return np.tile(array, count)

    per_choice.update(lift_scale=tile(days.climb_factor), wind_from_deg=tile(days.wind_from_deg),
                      wind_speed_ms=tile(days.wind_speed_ms))
    values = np.repeat(np.asarray(stacked.lift_values), runs, axis=0)
    times = stacked.lift_times_s
    if spread.lift_end_varies:
        times, values, ends = stretched_profiles(scenario, days.lift_ends_s, stacked.lift_values)
        per_choice["lift_ends_s"] = tile(ends)
    flights = dataclasses.replace(stacked, lift_times_s=times, lift_values=values, **per_choice)
    if spread.thermal_search_mean_m <= 0.0:
        return flights, None
    day_of = tile(np.arange(runs))
    mean = tile(days.search_mean_m)
    unit = days.search_unit

    def search(rows, climb_number):
        return unit[day_of[rows], np.asarray(climb_number) % SEARCH_DRAWS] * mean[rows]

    return flights, search


def _choice(ballast: float, setup: Flights, flown, rows: slice, forecast, legs: int) -> ChoiceOdds:
    finished = flown.finished[rows]
    runs = finished.size
    count = int(finished.sum())
    p = count / runs
    times = flown.total_time_s[rows][finished]
    pct = tuple(float(x) for x in np.percentile(times, PERCENTILES)) if count else (math.nan,) * 3
    landed = ~finished
    by_leg = np.bincount(flown.landout_leg[rows][landed], minlength=legs)[:legs]
    reasons = np.bincount(flown.reason[rows][landed], minlength=len(flight.REASONS))
    return ChoiceOdds(
        ballast_kg=ballast, mass_kg=float(setup.mass_kg), runs=runs, finished=count, finish_probability=p,
        finish_probability_se=math.sqrt(p * (1.0 - p) / runs), task_time_s=pct,
        landouts_by_leg=tuple(int(n) for n in by_leg),
        landouts_by_reason=tuple((LANDOUT_REASONS[i][0], int(n)) for i, n in enumerate(reasons)
                                 if n and i in LANDOUT_REASONS),
        forecast_time_s=float(forecast.total_time_s[0]), forecast_finished=bool(forecast.finished[0]),
        finish_times_s=np.sort(times))


def _notes(scenario: Scenario, spread: DaySpread) -> list[planning.Notice]:
    """What the pilot must know about the odds, as facts (:func:`glidetask.cautions.notice_text` words them)."""
    notes = [planning.Notice("odds_spread_assumed", {"spread": spread})]
    notes.append(planning.Notice("odds_landout_meaning", {"terrain": bool(scenario.terrain_file)}))
    if scenario.task.kind == "area":
        notes.append(planning.Notice("odds_area_targets"))
    return notes
