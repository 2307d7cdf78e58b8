"""The inputs of a plan: glider set-up, the forecast day, safety margins.

These are immutable engine objects built by :mod:`glidetask.formats.task_file` (or by
tests directly). A what-if is a new object made with :func:`dataclasses.replace`.
Times are local clock seconds after midnight; heights metres MSL; speeds m/s.
"""

from __future__ import annotations

import dataclasses
import math
from dataclasses import dataclass, field
from typing import TYPE_CHECKING

import numpy as np

from glidetask.engine.arrays import scalar_or_array
from glidetask.engine.atmosphere import density_ratio
from glidetask.engine.polar import Polar, PolarSpec, scaled_polar
from glidetask.errors import InputError, Problem
from glidetask.units import KMH, format_clock

if TYPE_CHECKING:  # imported for type names only; keeps this module cheap
    from glidetask.engine.task import Task, Turnpoint


CMDLINE = "command line"
#: The command-line option of each what-if, by the task-file key it replaces.
WHAT_IF_OPTIONS = {"[glider] ballast_kg": "--ballast-kg", "[glider] bugs_percent": "--bugs-percent",
                   "[day] mc_ms": "--mc-ms", "[day] wind": "--wind", "[day] start_time": "--start"}
#: Kept below every airspace floor and above every ceiling unless the task says otherwise [m]
#: (common practice).
DEFAULT_AIRSPACE_MARGIN_M = 100.0
#: The strongest wind any input may give [km/h] (the task file's limit, one for every input).
MAX_WIND_SPEED_KMH = 200.0


def scenario_problems(scenario: "Scenario") -> list[tuple[str, str]]:
    """What makes a scenario inconsistent, as ``(task-file key, message)`` pairs.

    The one check of a whole scenario: the task-file reader, the command line's what-ifs
    (:func:`with_what_ifs`) and the UI each name the key in their
    own terms. Empty when the scenario can be planned.
    """
    glider, day = scenario.glider, scenario.day
    spec = glider.spec
    out: list[tuple[str, str]] = []
    if spec.max_ballast_kg <= 0.0 and glider.ballast_kg != 0.0:
        out.append(("[glider] ballast_kg", f"this glider carries no water ballast (the polar's maximum is 0 kg), "
                                           f"got {glider.ballast_kg:g} kg"))
    elif not 0.0 <= glider.ballast_kg <= spec.max_ballast_kg:
        out.append(("[glider] ballast_kg", f"ballast {glider.ballast_kg:g} kg is outside 0-{spec.max_ballast_kg:g} kg, "
                                           f"the polar's maximum water ballast"))
    elif spec.max_mass_kg is not None and glider.mass_kg > spec.max_mass_kg + 1e-9:
        out.append(("[glider] ballast_kg", f"the flying mass {glider.mass_kg:g} kg (empty {spec.empty_mass_kg:g} + "
                                           f"pilot {glider.pilot_kg:g} + ballast {glider.ballast_kg:g}) is above the "
                                           f"maximum {spec.max_mass_kg:g} kg"))
    if not glider.bugs_percent >= 0.0 or not math.isfinite(glider.bugs_percent):
        out.append(("[glider] bugs_percent", "bugs must be 0 % or more"))
    if day.mc_ms is not None and not 0.0 <= day.mc_ms <= 10.0:
        out.append(("[day] mc_ms", f"the MacCready setting must be 0-10 m/s, got {day.mc_ms:g}"))
    wind_kmh = day.wind.speed_ms / KMH
    if not 0.0 <= wind_kmh <= MAX_WIND_SPEED_KMH + 1e-9:
        out.append(("[day] wind", f"the wind speed must be 0-{MAX_WIND_SPEED_KMH:g} km/h, got {wind_kmh:g}"))
    if not day.start_time_s < day.lift_ends_s:
        out.append(("[day] start_time", f"the start ({format_clock(day.start_time_s)}) must be before lift ends "
                                        f"({format_clock(day.lift_ends_s)})"))
    lowest_top = day.band_top_m if day.band_top_profile is None else min(day.band_top_profile.values)
    if not lowest_top > day.band_bottom_m:
        out.append(("[day] band_top_m", "the band top must be above band_bottom_m"))
    if day.start_height_m is not None and day.start_height_m > day.band_top_at(day.start_time_s):
        out.append(("[day] start_height_m", "the start height is above band_top_m"))
    return out


def until_lift_ends(value, time_s, lift_ends_s):
    """A lift profile's ``value`` at ``time_s`` with the end of lift applied: zero after
    ``lift_ends_s``, the profile's own value up to and at it (shared/CONTRACT.md, ``[day]``).
    Scalars or arrays; the one place the end of lift cuts the lift."""
    return np.where(np.asarray(time_s) > lift_ends_s, 0.0, value)


def band_middle_m(band_top_m, band_bottom_m):
    """The middle of the working band [m MSL] (scalars or arrays): the height whose air
    density the cruise's polar takes (contract section 3)."""
    return 0.5 * (band_top_m + band_bottom_m)


@dataclass(frozen=True)
class Wind:
    """A steady wind: the direction it blows FROM [deg true] and its speed [m/s]."""

    from_deg: float = 0.0
    speed_ms: float = 0.0


def _wind_vector(from_deg, speed_ms):
    """The (east, north) components [m/s] of the air's motion for a wind blowing FROM ``from_deg``."""
    to = np.radians(np.asarray(from_deg, dtype=float) + 180.0)
    return speed_ms * np.sin(to), speed_ms * np.cos(to)


def _wind_from_vector(east_ms: float, north_ms: float) -> Wind:
    speed = math.hypot(east_ms, north_ms)
    if speed < 1e-9:
        return Wind(0.0, 0.0)
    return Wind(math.degrees(math.atan2(-east_ms, -north_ms)) % 360.0, speed)


@dataclass(frozen=True)
class WindLevel:
    """One level of a wind profile: the direction the wind blows FROM [deg true] and its
    speed [m/s] at ``height_m`` [m MSL]."""

    height_m: float
    from_deg: float
    speed_ms: float


@dataclass(frozen=True)
class WindProfile:
    """The wind by height: levels from the ground up, the wind vector linear in height
    between them and held beyond the lowest and the highest.

    Interpolating the vector (not direction and speed apart) is what a mixed layer's
    winds do between two levels; through a veer it gives a lighter wind in between.
    """

    levels: tuple[WindLevel, ...]

    def __post_init__(self):
        heights = [level.height_m for level in self.levels]
        if not heights or any(b <= a for a, b in zip(heights, heights[1:])):
            raise ValueError("a wind profile needs levels with increasing heights")

    def _vectors(self):
        heights = np.array([level.height_m for level in self.levels])
        east, north = _wind_vector([level.from_deg for level in self.levels],
                                   np.array([level.speed_ms for level in self.levels]))
        return heights, east, north

    def at(self, height_m: float) -> Wind:
        """The wind at ``height_m`` [m MSL]."""
        heights, east, north = self._vectors()
        return _wind_from_vector(float(np.interp(height_m, heights, east)), float(np.interp(height_m, heights, north)))

    def mean_between(self, low_m: float, high_m: float) -> Wind:
        """The height-weighted mean wind vector from ``low_m`` to ``high_m`` [m MSL] (the
        wind at ``low_m`` when they are equal)."""
        if not high_m > low_m:
            return self.at(low_m)
        heights, east, north = self._vectors()
        z = np.union1d(heights[(heights > low_m) & (heights < high_m)], [low_m, high_m])
        depth = high_m - low_m
        return _wind_from_vector(float(np.trapezoid(np.interp(z, heights, east), z)) / depth,
                                 float(np.trapezoid(np.interp(z, heights, north), z)) / depth)


@dataclass(frozen=True)
class Profile:
    """A quantity through the day: ``[time, value]`` pairs, linear in between,
    held constant before the first and after the last pair (shared/CONTRACT.md 2.3).

    Attributes
    ----------
    times_s : tuple of float
        Strictly increasing clock times [s after midnight].
    values : tuple of float
        The value at each time [unit of the quantity, e.g. m/s].
    """

    times_s: tuple[float, ...]
    values: tuple[float, ...]

    def at(self, time_s):
        """Value at ``time_s`` (scalar or array) by linear interpolation with held ends."""
        return np.interp(time_s, self.times_s, self.values)

    @classmethod
    def constant(cls, value: float) -> "Profile":
        return cls((0.0,), (float(value),))


@dataclass(frozen=True)
class GliderSetup:
    """A polar as given in its file, plus this flight's loading.

    ``mass_kg`` = empty mass + pilot (with parachute) + water ballast (contract section 3).
    """

    spec: PolarSpec
    pilot_kg: float = 90.0
    ballast_kg: float = 0.0
    bugs_percent: float = 0.0
    polar_file: str = ""

    @property
    def mass_kg(self) -> float:
        """The flying mass [kg]: empty mass + pilot + water ballast."""
        return self.mass_with_ballast_kg(self.ballast_kg)

    def mass_with_ballast_kg(self, ballast_kg):
        """The flying mass with another water ballast [kg] (scalar or array), the one
        place the flying mass is summed (contract section 3)."""
        return self.spec.empty_mass_kg + self.pilot_kg + (ballast_kg if np.isscalar(ballast_kg)
                                                          else np.asarray(ballast_kg, dtype=float))

    def polar_at(self, altitude_m=0.0, isa_deviation_c=0.0, *, ballast_kg=None) -> Polar:
        """The polar as loaded (mass, bugs) at an altitude [m MSL] and ISA deviation [degC];
        ``ballast_kg`` (scalar or array) instead of the set-up's own gives one polar per value."""
        mass = self.mass_kg if ballast_kg is None else self.mass_with_ballast_kg(ballast_kg)
        return scaled_polar(self.spec, mass, self.bugs_percent, density_ratio(altitude_m, isa_deviation_c))


@dataclass(frozen=True)
class Day:
    """The forecast day as the plan assumes it (shared/CONTRACT.md 2.3, ``[day]``).

    Exactly one of ``climb`` (achieved climb [m/s]) and ``thermal_strength`` (thermal
    core updraft [m/s], turned into achieved climb by the circling model for this glider)
    is set. Both are zero after ``lift_ends_s``.
    """

    start_time_s: float
    band_top_m: float
    band_bottom_m: float
    lift_ends_s: float
    wind: Wind = field(default_factory=Wind)  # a Wind, or a WindProfile (read with wind_at)
    climb: Profile | None = None
    thermal_strength: Profile | None = None
    start_height_m: float | None = None  # None: the band top
    glide_airmass_ms: float = 0.0
    isa_deviation_c: float = 0.0
    mc_ms: float | None = None  # None: the achieved climb at that moment
    thermal_radius_m: float = 150.0  # e-folding radius of the Gaussian thermal core
    #: The band top through the day [m MSL] (None: ``band_top_m`` all day). When set,
    #: ``band_top_m`` is its highest value (the density of the cruise, the checks).
    band_top_profile: Profile | None = None

    def band_top_at(self, time_s):
        """The band top [m MSL] at ``time_s``: the profile's value (held beyond its ends),
        never above ``band_top_m``; ``band_top_m`` without a profile."""
        if self.band_top_profile is None:
            return self.band_top_m
        return scalar_or_array(np.minimum(np.asarray(self.band_top_profile.at(time_s), dtype=float), self.band_top_m))

    def wind_at(self, height_m: float) -> Wind:
        """The wind at ``height_m`` [m MSL]: the steady wind, or the profile's there."""
        return self.wind.at(height_m) if isinstance(self.wind, WindProfile) else self.wind

    @property
    def band_middle_m(self) -> float:
        """The middle of the working band [m MSL] (:func:`band_middle_m`)."""
        return band_middle_m(self.band_top_m, self.band_bottom_m)

    @property
    def effective_start_height_m(self) -> float:
        """The start height: given, or the band top at the start time."""
        return float(self.band_top_at(self.start_time_s)) if self.start_height_m is None else self.start_height_m

    def lift_profile_at(self, time_s):
        """The profile value (achieved climb or thermal strength) at ``time_s``; 0 after lift ends."""
        profile = self.climb if self.climb is not None else self.thermal_strength
        value = np.asarray(profile.at(time_s), dtype=float)
        value = until_lift_ends(value, time_s, self.lift_ends_s)
        return scalar_or_array(value)


@dataclass(frozen=True)
class Safety:
    """Safety margins (shared/CONTRACT.md 2.3, ``[safety]``)."""

    arrival_margin_m: float = 200.0
    terrain_clearance_m: float = 150.0
    final_glide_mc_ms: float | None = None  # None: the cruise MacCready setting at that moment
    airspace_margin_m: float = DEFAULT_AIRSPACE_MARGIN_M


@dataclass(frozen=True)
class Scenario:
    """Everything a plan needs: the task, the glider, the day, the margins, and where from.

    ``turnpoints`` is the whole turnpoint collection the task file referenced (the
    landables among them feed the coverage check); ``terrain_file`` is an absolute
    path or None; ``source`` the task file's path (for messages), if any;
    ``turnpoints_file`` the turnpoint file's absolute path (a saved task refers to it);
    ``airspace`` the task's airspace (a :class:`glidetask.engine.airspace.Airspace`, read by
    the task file reader from ``[airspace] file``, whose absolute path is ``airspace_file``).
    """

    task: "Task"
    glider: GliderSetup
    day: Day
    safety: Safety = field(default_factory=Safety)
    turnpoints: tuple["Turnpoint", ...] = ()
    terrain_file: str | None = None
    source: str | None = None
    turnpoints_file: str | None = None
    #: Where the day came from when the task file names a sounding
    #: (:class:`glidetask.engine.sounding.DaySource`); None for a typed day. The plan
    #: flies ``day`` only; this is for showing and saving the source.
    day_source: object = None
    airspace: object | None = field(default=None, compare=False)  # read from airspace_file (compared)
    airspace_file: str | None = None


# ---------------------------------------------------------------- what-ifs


def with_what_ifs(scenario: Scenario, *, mc_ms=None, ballast_kg=None, bugs_percent=None, wind: Wind | None = None,
                  start_time_s=None) -> Scenario:
    """The scenario with the given what-ifs (None keeps the scenario's value).

    Raises
    ------
    InputError
        A what-if that makes the inputs inconsistent (ballast above the polar's
        maximum, a mass above the maximum mass, a start at or after the end of lift, a
        negative setting), named by its command-line option; problems of the scenario
        itself are named by the task file and key.
    """
    glider, day = scenario.glider, scenario.day
    if ballast_kg is not None:
        glider = dataclasses.replace(glider, ballast_kg=float(ballast_kg))
    if bugs_percent is not None:
        glider = dataclasses.replace(glider, bugs_percent=float(bugs_percent))
    if mc_ms is not None:
        day = dataclasses.replace(day, mc_ms=float(mc_ms))
    if wind is not None:
        day = dataclasses.replace(day, wind=wind)
    if start_time_s is not None:
        day = dataclasses.replace(day, start_time_s=float(start_time_s))
    result = dataclasses.replace(scenario, glider=glider, day=day)
    given = {"[glider] ballast_kg": ballast_kg, "[glider] bugs_percent": bugs_percent, "[day] mc_ms": mc_ms,
             "[day] wind": wind, "[day] start_time": start_time_s}
    file = scenario.source or "task"
    problems = [Problem(CMDLINE, WHAT_IF_OPTIONS[key], message) if given.get(key) is not None
                else Problem(file, key, message) for key, message in scenario_problems(result)]
    if problems:
        raise InputError(problems)
    return result
