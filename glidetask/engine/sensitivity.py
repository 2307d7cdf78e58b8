"""How the task time answers to the day: the plan flown again under a few what-ifs.

:func:`sensitivity` gives the planned task time for weaker climbs, more wind, a later
start and more bugs, each flown exactly as :func:`glidetask.engine.plan.plan` flies it
(the plan's own flight core, :func:`glidetask.engine.flight.fly`), all in one vectorised
call over the planned path; :func:`plan_sensitivity` does it for a plan.
"""

from __future__ import annotations

import dataclasses
import math
from dataclasses import dataclass

from glidetask.engine.compare import TASK_TERRAIN, fly_stacked, planned_route
from glidetask.engine.flight import Flown, course_for, flights_for
from glidetask.engine.plan import Notice, Plan
from glidetask.engine.scenario import Profile, Scenario, apply_what_ifs, scenario_problems
from glidetask.units import KMH

WEAKER_CLIMB_MS = 0.5  # what-if: climbs (or thermals) this much weaker [m/s]
MORE_WIND_MS = 10.0 * KMH  # what-if: this much more wind [m/s] (10 km/h)
LATER_START_S = 1800.0  # what-if: the start this much later [s]
MORE_BUGS_PERCENT = 5.0  # what-if: this much more sink from bugs [%]


@dataclass(frozen=True)
class SensitivityRow:
    """The task flown with one what-if.

    Attributes
    ----------
    key : str
        Which what-if: one of :data:`WHAT_IFS`.
    facts : dict
        What was changed, with the new value, for wording it in any units
        (:func:`glidetask.formats.strategy_report.what_if_words`): ``weaker_climbs`` ``by_ms`` and
        ``strength`` (bool: the day gives thermal strength, not achieved climb);
        ``more_wind`` ``by_ms``, ``from_deg`` and ``speed_ms`` (the what-if's wind at the
        band middle, the cruise's); ``later_start`` ``by_s`` and ``start_time_s``;
        ``more_bugs`` ``by_percent`` and ``bugs_percent``; ``pure_model`` the planned
        ``centring_s`` and ``detour_percent``. ``refused`` (the task-file key the what-if
        makes inconsistent, e.g. ``"[day] start_time"``) where it cannot be flown.
    total_time_s : float
        Start to finish, or to where the flight ends short [s]; NaN if it cannot start.
    delta_s : float
        ``total_time_s`` minus the forecast's [s]; NaN unless both finish.
    finished : bool
    finish_time_s : float
        Clock time at the finish [s after midnight]; NaN if not finished.
    landout_m : float
        Where the flight ends short along the path [m]; NaN if finished.
    task_speed_ms : float
        As the plan scores it (racing: optimized distance over the time; area: the
        planned distance over the greater of the time and the minimum time) [m/s].
    """

    key: str
    facts: dict
    total_time_s: float
    delta_s: float
    finished: bool
    finish_time_s: float
    landout_m: float
    task_speed_ms: float


@dataclass(frozen=True)
class Sensitivity:
    """The forecast plan and its what-ifs (first row: the forecast)."""

    task_name: str
    kind: str
    rows: tuple[SensitivityRow, ...]
    notes: tuple[Notice, ...]  # facts; :func:`glidetask.cautions.notice_text` words them

    @property
    def forecast(self) -> SensitivityRow:
        return self.rows[0]


def _weaker(profile: Profile, by: float) -> Profile:
    return Profile(profile.times_s, tuple(max(v - by, 0.0) for v in profile.values))


WHAT_IFS = ("forecast", "weaker_climbs", "more_wind", "later_start", "more_bugs", "pure_model")


def what_if_scenarios(scenario: Scenario) -> list[tuple[str, dict, Scenario | None]]:
    """``(key, facts, scenario)`` for the forecast and each what-if of :data:`WHAT_IFS`
    (facts as :class:`SensitivityRow` has them); the scenario is None where the what-if
    cannot be flown (a start at or after the end of lift)."""
    day, glider = scenario.day, scenario.glider
    if day.climb is not None:
        weaker_day = dataclasses.replace(day, climb=_weaker(day.climb, WEAKER_CLIMB_MS))
    else:
        weaker_day = dataclasses.replace(day, thermal_strength=_weaker(day.thermal_strength, WEAKER_CLIMB_MS))
    wind = day.wind.stronger(MORE_WIND_MS)
    shown = wind.at(day.band_middle_m)  # a profile: the cruise's wind, at the band middle
    start = day.start_time_s + LATER_START_S
    bugs = glider.bugs_percent + MORE_BUGS_PERCENT
    out = [("forecast", {}, scenario),
           ("weaker_climbs", {"by_ms": WEAKER_CLIMB_MS, "strength": day.climb is None},
            dataclasses.replace(scenario, day=weaker_day))]
    for key, facts, what_if in (
            ("more_wind", {"by_ms": MORE_WIND_MS, "from_deg": shown.from_deg, "speed_ms": shown.speed_ms},
             {"wind": wind}),
            ("later_start", {"by_s": LATER_START_S, "start_time_s": start}, {"start_time_s": start}),
            ("more_bugs", {"by_percent": MORE_BUGS_PERCENT, "bugs_percent": bugs}, {"bugs_percent": bugs})):
        what_if_scenario = apply_what_ifs(scenario, **what_if)
        refused = scenario_problems(what_if_scenario)
        if refused:
            facts = {**facts, "refused": refused[0][0]}
        out.append((key, facts, None if refused else what_if_scenario))
    if day.centring_s > 0.0 or day.detour_percent > 0.0:  # what the practical allowances cost
        pure = dataclasses.replace(day, centring_s=0.0, detour_percent=0.0)
        out.append(("pure_model", {"centring_s": day.centring_s, "detour_percent": day.detour_percent},
                    dataclasses.replace(scenario, day=pure)))
    return out


def sensitivity(scenario: Scenario, *, path=None, requirement=TASK_TERRAIN) -> Sensitivity:
    """How much the task time changes for climbs 0.5 m/s weaker, 10 km/h more wind, a
    30-minute later start and 5 % more bugs.

    Parameters
    ----------
    scenario : Scenario
        The forecast (its task, glider, day and margins).
    path, requirement : optional
        The planned path and its final-glide requirement (see :func:`planned_route`;
        default: as :func:`glidetask.engine.plan.plan` flies the task).

    Returns
    -------
    Sensitivity
        The forecast row first, then one row per what-if.

    Notes
    -----
    Each what-if is a scenario built as :func:`glidetask.engine.plan.plan` builds it
    (its ``with_what_ifs`` for wind, start and bugs; the day's climb or thermal-strength
    profile lowered by 0.5 m/s, not below 0, for weaker climbs) and turned into the core's
    inputs by the planner's ``flights_for``; all are flown in one call over the planned
    path, with the plan's final-glide requirement (the terrain, if the task has a model). For a racing task that path is the optimized one, whatever the day, so every
    row is the plan the planner would make for that what-if. For an area task the
    targets stay where the forecast plan put them (the planner would move them to keep
    the minimum time), so the change shows as time rather than distance.
    """

    path, requirement = planned_route(scenario, path, requirement)
    variants = what_if_scenarios(scenario)
    flyable = [v for v in variants if v[2] is not None]
    flown = fly_stacked(course_for(path, scenario.day.detour_percent), [flights_for(v[2]) for v in flyable],
                        [course_for(path, v[2].day.detour_percent).detour_factor for v in flyable],
                        requirement=requirement, detail=False)
    by_key = {key: flown[i] for i, (key, _, _) in enumerate(flyable)}
    rows = [_sensitivity_row(key, facts, by_key.get(key), scenario, path) for key, facts, _ in variants]
    forecast = rows[0]
    rows = [dataclasses.replace(row, delta_s=row.total_time_s - forecast.total_time_s
                                if row.finished and forecast.finished else math.nan) for row in rows]
    notes = [Notice("what_ifs_area_targets")] if scenario.task.kind == "area" else []
    return Sensitivity(scenario.task.name, scenario.task.kind, tuple(rows), tuple(notes))


def _sensitivity_row(key: str, facts: dict, flown: Flown | None, scenario: Scenario, path) -> SensitivityRow:
    if flown is None:
        return SensitivityRow(key, facts, math.nan, math.nan, False, math.nan, math.nan, math.nan)
    finished = bool(flown.finished[0])
    total = float(flown.total_time_s[0])
    task = scenario.task
    if not finished:
        speed = math.nan
    elif task.kind == "area":
        speed = path.total_m / max(total, float(task.min_time_s))
    else:
        speed = path.total_m / total
    return SensitivityRow(key, facts, total, math.nan, finished, float(flown.finish_time_s[0]),
                          float(flown.landout_m[0]), speed)


def plan_sensitivity(plan: Plan):
    """How the task time answers to the day: the plan flown again with climbs 0.5 m/s weaker,
    10 km/h more wind, a 30-minute later start and 5 % more bugs, over the planned path with
    the plan's own final-glide requirement (the terrain), so the forecast row is the plan
    (:func:`glidetask.engine.compare.sensitivity`, one vectorised flight of five)."""
    return sensitivity(plan.scenario, path=plan.path, requirement=plan.requirement)
