"""How simulated days spread around the forecast (:class:`DaySpread`), the days drawn from
it (:func:`draw_days`), and the day's profile stretched to each day's end of lift
(:func:`stretched_profiles`). :mod:`glidetask.engine.simulate` flies the task on them.

Each simulated day differs from the forecast in five ways (planning assumptions of our
own, not a forecast model; every spread can be set, and zero reproduces the plan):

* **Strength of the day**: every climb (or thermal strength) of the profile times a
  factor ``exp(s Z)``, ``Z`` standard normal; default ``s = 0.2`` (the forecast is the
  median day; one day in six is 18 % weaker or more).
* **Wind**: speed plus a normal error (default sd 8 km/h, not below calm), direction
  plus a normal error (default sd 20 degrees).
* **End of lift**: shifted by a normal error (default sd 30 min); the afternoon decay of
  the profile (from its last peak, or the start if later, to the end of lift) is
  stretched or squeezed to match, so an early end also weakens the late climbs.
* **Bad days**: on a share of the days (default one in ten) the lift ends early as well,
  by a time drawn evenly between 1 and 2 hours (spread-out or overdevelopment cutting
  the afternoon short; the share and the hours are our planning assumption, common
  practice, not a forecast statistic).
* **Thermal spacing along the route**: the forecast plan finds every climb at the band
  bottom. In a simulated day a pilot reaching the band bottom must glide on a distance
  ``d ~ Exponential(mean)`` before the next usable climb: usable thermals placed at
  random along the track (a Poisson process, so the distance still to go is memoryless).
  The mean on the forecast day defaults to the mean distance a straight track flies
  between thermals in the day's convective layer,
  :func:`glidetask.engine.thermals.thermal_search_distance` (``zi / 1.2`` from Allen's
  thermal density [1]_; 1.6 km for a 1.9 km layer); it grows as the day's strength
  factor falls (``mean / factor``: weak days have fewer usable thermals). The odds rest
  much on this number: :func:`spacing_odds` gives them at other spacings. A pilot who
  comes down to the arrival floor (the finish elevation plus the margin) before finding
  one lands out there; with an elevation model, where the glide first comes down to the
  terrain clearance above the terrain, if that is sooner.

References
----------
.. [1] M. J. Allen, "Updraft Model for Development of Autonomous Soaring Uninhabited Air
   Vehicles", AIAA 2006-1510, NASA Dryden Flight Research Center, 2006 (from memory):
   ``N = 0.6 X Y / (zi r2)`` thermals over an area ``X`` by ``Y``.
"""

from __future__ import annotations

import dataclasses
import math
from dataclasses import dataclass

import numpy as np

from glidetask.engine.scenario import Scenario
from glidetask.engine.thermals import thermal_search_distance
from glidetask.units import KMH

SEARCH_DRAWS = 64  # exponential draws kept per day; climb n uses draw n mod this
WARP_STEP_S = 300.0  # time grid of a stretched afternoon profile [s]
SHORTEST_DECAY_S = 600.0  # an early end of lift never squeezes the decay below this [s]


@dataclass(frozen=True)
class DaySpread:
    """How simulated days spread around the forecast (planning assumptions, see module notes).

    Attributes
    ----------
    climb_log_sd : float
        Standard deviation of the log of the day's climb factor [-].
    wind_speed_sd_ms : float
        Standard deviation of the wind speed error [m/s].
    wind_direction_sd_deg : float
        Standard deviation of the wind direction error [deg].
    lift_end_sd_s : float
        Standard deviation of the shift of the end of lift [s].
    thermal_search_mean_m : float or None
        Mean distance beyond the band bottom to the next usable climb on the forecast
        day [m]; 0: every climb is found at the band bottom, as the plan assumes; None
        (the default): the day's own, :func:`thermal_search_distance` of its convective
        layer (:meth:`for_day`).
    bad_day_probability : float
        Share of the days on which the lift also ends early [-], in [0, 1].
    bad_day_early_s : tuple of float
        How much earlier the lift ends on a bad day: drawn evenly between these [s].
    """

    climb_log_sd: float = 0.2
    wind_speed_sd_ms: float = 8.0 * KMH
    wind_direction_sd_deg: float = 20.0
    lift_end_sd_s: float = 1800.0
    thermal_search_mean_m: float | None = None
    bad_day_probability: float = 0.1
    bad_day_early_s: tuple[float, float] = (3600.0, 7200.0)

    def __post_init__(self):
        for item in dataclasses.fields(self):
            value = getattr(self, item.name)
            values = value if isinstance(value, tuple) else (value,)
            if item.name == "thermal_search_mean_m" and value is None:
                continue
            if not all(math.isfinite(v) and v >= 0.0 for v in values):
                raise ValueError(f"{item.name} must be finite and not negative, got {value!r}")
        if self.bad_day_probability > 1.0:
            raise ValueError(f"bad_day_probability must be at most 1, got {self.bad_day_probability!r}")
        if len(self.bad_day_early_s) != 2 or self.bad_day_early_s[0] > self.bad_day_early_s[1]:
            raise ValueError(f"bad_day_early_s must be (shortest, longest), got {self.bad_day_early_s!r}")

    @classmethod
    def none(cls) -> "DaySpread":
        """No spread: every simulated day is the forecast."""
        return cls(0.0, 0.0, 0.0, 0.0, 0.0, 0.0)

    def for_day(self, scenario: Scenario) -> "DaySpread":
        """This spread with the thermal search distance settled: the given one, or the
        day's own (:func:`day_search_mean_m`)."""
        if self.thermal_search_mean_m is not None:
            return self
        return dataclasses.replace(self, thermal_search_mean_m=day_search_mean_m(scenario))

    @property
    def lift_end_varies(self) -> bool:
        """Whether the end of lift differs between days."""
        return self.lift_end_sd_s > 0.0 or (self.bad_day_probability > 0.0 and self.bad_day_early_s[1] > 0.0)


def day_search_mean_m(scenario: Scenario) -> float:
    """The day's mean distance to the next thermal [m]: :func:`thermal_search_distance`
    of its convective layer (Allen 2006, from memory)."""
    return float(thermal_search_distance(scenario.day.layer_depth_m))


@dataclass(frozen=True)
class Days:
    """The drawn days, one entry per run (arrays of shape (runs,))."""

    climb_factor: np.ndarray
    wind_from_deg: np.ndarray
    wind_speed_ms: np.ndarray
    lift_ends_s: np.ndarray
    search_mean_m: np.ndarray
    search_unit: np.ndarray  # (runs, SEARCH_DRAWS) standard exponential draws
    bad_day: np.ndarray  # bool: the lift ends early as well


def draw_days(scenario: Scenario, spread: DaySpread, runs: int, seed: int) -> Days:
    """Draw ``runs`` days around the scenario's forecast (seeded: the same seed, the same days).

    Draws come from ``numpy.random.default_rng(seed)`` in a fixed order (climb factor,
    wind speed, wind direction, end of lift, search distances, bad day, how early), whatever
    the spread, so a change of one spread leaves the other errors of each day as they were.
    A spread without a search distance takes the day's own (:meth:`DaySpread.for_day`).
    """
    if runs < 1:
        raise ValueError("runs must be at least 1")
    rng = np.random.default_rng(seed)
    day = scenario.day
    z_climb, z_speed, z_direction, z_end = rng.standard_normal((4, runs))
    search_unit = rng.standard_exponential((runs, SEARCH_DRAWS))
    u_bad, u_early = rng.random((2, runs))
    spread = spread.for_day(scenario)
    bad = u_bad < spread.bad_day_probability
    shortest, longest = spread.bad_day_early_s
    early = np.where(bad, shortest + (longest - shortest) * u_early, 0.0)
    factor = np.exp(spread.climb_log_sd * z_climb)
    wind = day.wind_at(day.band_middle_m)  # the cruise's wind; a profile keeps its shape (flight_wind)
    return Days(
        climb_factor=factor,
        wind_from_deg=np.mod(wind.from_deg + spread.wind_direction_sd_deg * z_direction, 360.0),
        wind_speed_ms=np.maximum(wind.speed_ms + spread.wind_speed_sd_ms * z_speed, 0.0),
        lift_ends_s=day.lift_ends_s + spread.lift_end_sd_s * z_end - early,
        search_mean_m=spread.thermal_search_mean_m / factor,
        search_unit=search_unit,
        bad_day=bad,
    )


def _decay_anchor(scenario: Scenario) -> float:
    """Where the afternoon decay starts: the profile's last peak (or the start, if later),
    at least :data:`SHORTEST_DECAY_S` before the end of lift [s]."""
    day = scenario.day
    profile = day.climb if day.climb is not None else day.thermal_strength
    values = np.asarray(profile.values)
    peak = float(np.asarray(profile.times_s)[np.flatnonzero(values == values.max())[-1]])
    return min(max(peak, day.start_time_s), day.lift_ends_s - SHORTEST_DECAY_S)


def stretched_profiles(scenario: Scenario, lift_ends_s: np.ndarray, values=None):
    """The day's profile with its afternoon decay moved to end at each ``lift_ends_s``.

    Parameters
    ----------
    scenario : Scenario
        The forecast day (its profile's times, its end of lift ``L``).
    lift_ends_s : ndarray, (N,)
        The simulated ends of lift [s].
    values : array_like, (C, P), optional
        Rows of profile values at the profile's times (default: the day's own, C = 1).

    Returns
    -------
    times_s : ndarray, (G,)
        A shared time grid: the profile's own times, the anchor ``A``, and every
        :data:`WARP_STEP_S` from ``A`` to the latest end of lift.
    values : ndarray, (C * N, G)
        Row ``c N + i``: profile row ``c`` at source time ``A + (t - A)(L - A)/(L_i - A)``
        for ``t > A``, the profile itself before.
    lift_ends_s : ndarray, (N,)
        The ends of lift, none closer than :data:`SHORTEST_DECAY_S` to the anchor.

    Notes
    -----
    The stretched profile's kinks fall between grid times; linear interpolation on the
    grid is off there by at most the change of slope times the step over four (a few
    hundredths of a m/s for a decay of 1 m/s per hour).
    """
    day = scenario.day
    profile = day.climb if day.climb is not None else day.thermal_strength
    rows = np.atleast_2d(np.asarray(profile.values if values is None else values, dtype=float))
    anchor = _decay_anchor(scenario)
    ends = np.maximum(np.asarray(lift_ends_s, dtype=float), anchor + SHORTEST_DECAY_S)
    knots = np.asarray(profile.times_s, dtype=float)
    grid = np.arange(anchor, ends.max() + WARP_STEP_S, WARP_STEP_S)
    times = np.unique(np.concatenate([knots, [anchor], grid]))
    stretch = (day.lift_ends_s - anchor) / (ends - anchor)
    source = np.where(times[None, :] > anchor, anchor + (times[None, :] - anchor) * stretch[:, None], times[None, :])
    return times, np.concatenate([np.interp(source, knots, row) for row in rows]), ends
