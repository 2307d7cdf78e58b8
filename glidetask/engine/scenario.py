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
from glidetask.engine.circling import DEFAULT_STALL_MARGIN
from glidetask.engine.polar import Polar, PolarSpec, scaled_polar
from glidetask.engine.thermals import thermal_radii
from glidetask.errors import InputError, Problem
from glidetask.units import KMH, format_clock

if TYPE_CHECKING:  # imported for type names only; keeps this module cheap
    from glidetask.engine.task import Task, Turnpoint


#: The "file" of a problem a what-if made (its place is the task-file key the what-if replaced);
#: the command line and the UI name it in their own terms (:class:`WhatIfError`).
WHAT_IF = "what-if"
#: Kept below every airspace floor and above every ceiling unless the task says otherwise [m]
#: (common practice).
DEFAULT_AIRSPACE_MARGIN_M = 100.0
#: The shallowest convective layer the thermal size is taken for [m] (a band top at or below the
#: ground is an input the reader refuses; this only keeps the formula defined).
SHALLOWEST_LAYER_M = 100.0
#: The strongest wind any input may give [km/h] (the task file's limit, one for every input).
MAX_WIND_SPEED_KMH = 200.0


def scenario_problems(scenario: "Scenario") -> list[tuple[str, str]]:
    """What makes a scenario inconsistent, as ``(task-file key, message)`` pairs.

    The one check of a whole scenario: the task-file reader, the command line's what-ifs
    (:func:`with_what_ifs`, :class:`WhatIfError`) and the UI each name the key in their
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
    wind_kmh = day.wind.strongest_ms / KMH
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

    def at(self, height_m=None) -> "Wind":
        """The wind at any height: itself (the same at all heights)."""
        return self

    def mean_between(self, low_m=None, high_m=None) -> "Wind":
        """The mean wind over any height range: itself."""
        return self

    @property
    def strongest_ms(self) -> float:
        """The strongest wind at any height [m/s]: its speed."""
        return self.speed_ms

    def stronger(self, extra_ms: float) -> "Wind":
        """The same wind ``extra_ms`` [m/s] stronger (a what-if)."""
        return Wind(self.from_deg, self.speed_ms + extra_ms)


def wind_vector(from_deg, speed_ms):
    """A wind as the components of the vector pointing where it blows FROM, (east, north) [m/s]
    (scalars or arrays). Interpolating these and turning them back (:func:`wind_from_vector`)
    interpolates the wind as a vector."""
    angle = np.radians(np.asarray(from_deg, dtype=float))
    speed = np.asarray(speed_ms, dtype=float)
    return speed * np.sin(angle), speed * np.cos(angle)


def wind_from_vector(east, north):
    """The (from_deg, speed_ms) of a vector from :func:`wind_vector` (from_deg in [0, 360))."""
    east, north = np.asarray(east, dtype=float), np.asarray(north, dtype=float)
    return np.mod(np.degrees(np.arctan2(east, north)), 360.0), np.hypot(east, north)


@dataclass(frozen=True)
class WindLevel:
    """One level of a wind profile: height [m MSL], direction it blows FROM [deg true], speed [m/s]."""

    height_m: float
    from_deg: float
    speed_ms: float


@dataclass(frozen=True)
class WindProfile:
    """Wind changing with height (shared/CONTRACT.md 2.3 and 3, "wind with height").

    The wind vector's components are linear in height between the levels and held
    beyond the lowest and the highest (a veer between two levels turns through the
    smaller angle, and the speed dips where the direction changes much: the vector mean).

    Attributes
    ----------
    levels : tuple of WindLevel
        At least one level, heights strictly increasing [m MSL].
    """

    levels: tuple[WindLevel, ...]

    def __post_init__(self):
        heights = [level.height_m for level in self.levels]
        if not heights or any(b <= a for a, b in zip(heights, heights[1:])):
            raise ValueError("a wind profile needs at least one level and strictly increasing heights")

    @property
    def heights_m(self) -> np.ndarray:
        return np.array([level.height_m for level in self.levels], dtype=float)

    def vectors(self) -> tuple[np.ndarray, np.ndarray]:
        """The levels' (east, north) components of :func:`wind_vector` [m/s], shape (H,) each."""
        return wind_vector([level.from_deg for level in self.levels], [level.speed_ms for level in self.levels])

    def vector_at(self, height_m):
        """(east, north) components at ``height_m`` (scalar or array) [m/s]."""
        heights, (east, north) = self.heights_m, self.vectors()
        return np.interp(height_m, heights, east), np.interp(height_m, heights, north)

    def vector_mean(self, low_m, high_m):
        """(east, north) components averaged over height from ``low_m`` to ``high_m`` (scalars or
        arrays, either order); the wind at the height where they are equal [m/s].

        The integral of the piecewise-linear components (held beyond the ends) divided by
        the height range: exact, by the trapezoid rule on the levels inside the range.
        """
        low, high = np.broadcast_arrays(np.asarray(low_m, dtype=float), np.asarray(high_m, dtype=float))
        low, high = np.minimum(low, high), np.maximum(low, high)
        heights, (east, north) = self.heights_m, self.vectors()

        def integral(z, values):  # from the lowest level to z (negative below it), held ends
            below = np.clip(z, heights[0], heights[-1])
            inside = np.interp(below, heights, values)
            segment = np.concatenate([[0.0], np.cumsum(0.5 * (values[1:] + values[:-1]) * np.diff(heights))])
            j = np.clip(np.searchsorted(heights, below, side="right") - 1, 0, heights.size - 1)
            partial = segment[j] + 0.5 * (values[j] + inside) * (below - heights[j])
            return partial + values[0] * np.minimum(z - heights[0], 0.0) + values[-1] * np.maximum(z - heights[-1], 0.0)

        span = high - low
        out = []
        for values in (east, north):
            with np.errstate(invalid="ignore", divide="ignore"):
                mean = (integral(high, values) - integral(low, values)) / span
            out.append(np.where(span > 0.0, mean, np.interp(low, heights, values)))
        return out[0], out[1]

    def at(self, height_m) -> Wind:
        """The wind at ``height_m`` [m MSL] (a scalar)."""
        from_deg, speed = wind_from_vector(*self.vector_at(float(height_m)))
        return Wind(float(from_deg), float(speed))

    def mean_between(self, low_m, high_m) -> Wind:
        """The mean wind (the vector mean) over the heights from ``low_m`` to ``high_m`` [m MSL]:
        the drift of a climb through them at a steady rate."""
        from_deg, speed = wind_from_vector(*self.vector_mean(float(low_m), float(high_m)))
        return Wind(float(from_deg), float(speed))

    @property
    def strongest_ms(self) -> float:
        """The strongest wind at any height [m/s] (the strongest level: linear vector
        interpolation never exceeds its ends)."""
        return max(level.speed_ms for level in self.levels)

    def stronger(self, extra_ms: float) -> "WindProfile":
        """Every level ``extra_ms`` [m/s] stronger, directions kept (a what-if)."""
        return WindProfile(tuple(WindLevel(level.height_m, level.from_deg, level.speed_ms + extra_ms)
                                 for level in self.levels))


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
    wind: "Wind | WindProfile" = field(default_factory=Wind)
    climb: Profile | None = None
    thermal_strength: Profile | None = None
    start_height_m: float | None = None  # None: the band top
    glide_airmass_ms: float = 0.0
    isa_deviation_c: float = 0.0
    mc_ms: float | None = None  # None: the achieved climb at that moment
    thermal_radius_m: float | None = None  # e-folding radius of the thermal core; None: from the day's layer
    ground_m: float = 0.0  # the ground under the convective layer [m MSL] (task_file: how it is chosen)
    climb_ballast_kg: float | None = None  # the ballast ``climb`` was given for; None: the glider's own
    centring_s: float = 0.0  # time lost centring each thermal [s] (the task file's default: 30, common practice)
    detour_percent: float = 0.0  # the planned path flown this much longer [%] (task file default: 5, common practice)
    #: Circling speed over the banked stall speed [-] (the circling model's margin, contract
    #: section 3; common practice 1.15).
    stall_margin: float = DEFAULT_STALL_MARGIN
    #: The band top through the day [m MSL] (None: ``band_top_m`` all day). When set,
    #: ``band_top_m`` is its highest value (the density of the cruise, the checks).
    band_top_profile: Profile | None = None

    def band_top_at(self, time_s):
        """The band top [m MSL] at ``time_s``: the profile's value (held beyond its ends),
        never above ``band_top_m``; ``band_top_m`` without a profile."""
        if self.band_top_profile is None:
            return self.band_top_m
        return scalar_or_array(np.minimum(np.asarray(self.band_top_profile.at(time_s), dtype=float), self.band_top_m))


    @property
    def band_middle_m(self) -> float:
        """The middle of the working band [m MSL] (:func:`band_middle_m`)."""
        return band_middle_m(self.band_top_m, self.band_bottom_m)

    @property
    def layer_depth_m(self) -> float:
        """Depth of the convective layer [m]: the band top above the ground under it
        (:attr:`ground_m`), at least :data:`SHALLOWEST_LAYER_M`."""
        return max(self.band_top_m - self.ground_m, SHALLOWEST_LAYER_M)

    @property
    def effective_thermal_radius_m(self) -> float:
        """The thermal core radius the circling model uses [m]: ``thermal_radius_m`` where
        given, else the typical radius for the day's convective layer
        (:func:`glidetask.engine.thermals.thermal_radii`, Allen 2006)."""
        if self.thermal_radius_m is not None:
            return float(self.thermal_radius_m)
        return float(thermal_radii(self.layer_depth_m).typical_m)

    @property
    def thermal_radius_source(self) -> str:
        """Where :attr:`effective_thermal_radius_m` comes from, in words."""
        if self.thermal_radius_m is not None:
            return "given in the task"
        return "Allen (2006) for the day's convective layer"

    def wind_at(self, height_m) -> Wind:
        """The wind at ``height_m`` [m MSL]: the single wind, or the profile's there."""
        return self.wind.at(height_m)

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
    #: (:class:`glidetask.engine.sounding_inputs.DaySource`); None for a typed day. The plan
    #: flies ``day`` only; this is for showing and saving the source.
    day_source: object = None
    airspace: object | None = field(default=None, compare=False)  # read from airspace_file (compared)
    airspace_file: str | None = None


# ---------------------------------------------------------------- what-ifs


#: The task-file key each what-if of :func:`with_what_ifs` replaces, by its argument.
WHAT_IF_KEYS = {"ballast_kg": "[glider] ballast_kg", "bugs_percent": "[glider] bugs_percent",
                "mc_ms": "[day] mc_ms", "wind": "[day] wind", "start_time_s": "[day] start_time"}


class WhatIfError(InputError):
    """What-ifs that make a scenario inconsistent.

    ``pairs`` are :func:`scenario_problems`' ``(task-file key, message)`` pairs;
    ``what_ifs`` the keys a what-if replaced (:data:`WHAT_IF_KEYS`). As an
    :class:`~glidetask.errors.InputError` each problem is named by the task file and key,
    or by :data:`WHAT_IF` and the key where a what-if gave the value; the command line
    and the UI map the keys to their own option and field names.
    """

    def __init__(self, pairs: list[tuple[str, str]], what_ifs: frozenset[str], file: str):
        self.pairs, self.what_ifs = list(pairs), frozenset(what_ifs)
        super().__init__([Problem(WHAT_IF if key in self.what_ifs else file, key, message)
                          for key, message in self.pairs])


def apply_what_ifs(scenario: Scenario, *, mc_ms=None, ballast_kg=None, bugs_percent=None,
                   wind: "Wind | WindProfile | None" = None, start_time_s=None) -> Scenario:
    """The scenario with the given what-ifs (None keeps the scenario's value), unchecked:
    :func:`scenario_problems` says whether it can be planned."""
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
    return dataclasses.replace(scenario, glider=glider, day=day)


def with_what_ifs(scenario: Scenario, **what_ifs) -> Scenario:
    """The scenario with the given what-ifs (:func:`apply_what_ifs`' arguments), checked.

    Raises
    ------
    WhatIfError
        A what-if that makes the inputs inconsistent (ballast above the polar's
        maximum, a mass above the maximum mass, a start at or after the end of lift, a
        negative setting), or a problem of the scenario itself, as ``(key, message)``
        pairs.
    """
    result = apply_what_ifs(scenario, **what_ifs)
    pairs = scenario_problems(result)
    if pairs:
        given = frozenset(WHAT_IF_KEYS[name] for name, value in what_ifs.items() if value is not None)
        raise WhatIfError(pairs, given, scenario.source or "task")
    return result
