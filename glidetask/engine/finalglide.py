"""Final glide: the height needed to reach a goal, and what a given height allows.

A final glide is a pure glide in wind (no more climbs) at a MacCready setting, ending
``margin_m`` above the goal (shared/CONTRACT.md sections 3 and 5.2). Every function
broadcasts over numpy arrays: many distances, heights, winds or polars in one call.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from glidetask.engine.arrays import scalar_or_array
from glidetask.engine.polar import Polar
from glidetask.engine.scenario import Wind
from glidetask.engine.speedtofly import _ground_speed, _glide_terms, glide_in_wind, solve_increasing
from glidetask.engine.wind import correction_angle_deg, wind_components

MC_TO_ARRIVE_CAP_MS = 10.0  # the largest MacCready setting reported [m/s]
LOWEST_DENSITY_HEIGHT_M, HIGHEST_DENSITY_HEIGHT_M = -1000.0, 19000.0  # the atmosphere model's range [m]


def density_height_m(start_height_m, arrival_height_m):
    """The height whose air density a final glide's polar takes [m MSL]: the middle of its
    start height and its arrival height (goal elevation plus margin), within the atmosphere
    model's range (shared/CONTRACT.md section 3). Scalars or arrays; the one place this
    choice is made, for the plan's final glide, ``glidetask glide`` and the UI alike.
    """
    middle = 0.5 * (np.asarray(start_height_m, dtype=float) + np.asarray(arrival_height_m, dtype=float))
    return scalar_or_array(np.clip(middle, LOWEST_DENSITY_HEIGHT_M, HIGHEST_DENSITY_HEIGHT_M))


def _check_distance(distance_m) -> np.ndarray:
    distance = np.asarray(distance_m, dtype=float)
    if np.any(distance < 0.0):
        raise ValueError("distance must not be negative")
    return distance


def height_used(polar: Polar, distance_m, along_ms, across_ms, mc_ms, airmass_ms=0.0):
    """Height a pure glide uses over a distance at the MacCready speed to fly [m].

    Parameters
    ----------
    polar : Polar
        The polar at this mass, bugs and density.
    distance_m : float or array_like
        Distance over the ground [m], >= 0.
    along_ms, across_ms : float or array_like
        Wind along (tailwind positive) and across the course [m/s].
    mc_ms : float or array_like
        MacCready setting [m/s].
    airmass_ms : float or array_like, default 0
        Average vertical air motion on the glide, up positive [m/s].

    Returns
    -------
    float or ndarray
        ``D (sink(v) - u) / Vg`` [m]; NaN where the goal cannot be reached against the wind.

    Notes
    -----
    In still air at ``m = 0`` this is the distance divided by the best glide ratio,
    the pilot's rule "distance = height x L/D".
    """
    distance = _check_distance(distance_m)
    per_metre = np.asarray(glide_in_wind(polar, mc_ms, along_ms, across_ms, airmass_ms).height_per_metre)
    return scalar_or_array(np.where(distance == 0.0, 0.0, distance * per_metre))


def _height_rate(v, a, b, c, along, across_sq, airmass, target):
    """Height per metre at airspeed ``v`` minus ``target``, and its derivative in ``v``."""
    sink = (a * v + b) * v + c
    q, ground = _ground_speed(v, along, across_sq)
    with np.errstate(divide="ignore", invalid="ignore"):
        rate = (sink - airmass) / ground
        d_rate = ((2.0 * a * v + b) * ground - (sink - airmass) * v / q) / (ground * ground)
    return rate - target, d_rate


def mc_to_arrive(polar: Polar, distance_m, available_m, along_ms, across_ms, airmass_ms=0.0,
                 cap_ms=MC_TO_ARRIVE_CAP_MS):
    """The MacCready setting whose final glide uses exactly the available height [m/s].

    Parameters
    ----------
    polar : Polar
        The polar at this mass, bugs and density.
    distance_m : float or array_like
        Distance to the goal [m], >= 0.
    available_m : float or array_like
        Height that may be used: present height minus goal elevation minus margin [m].
    along_ms, across_ms, airmass_ms : float or array_like
        Wind components and vertical air motion [m/s], as in :func:`height_used`.
    cap_ms : float, default 10
        The largest setting reported.

    Returns
    -------
    float or ndarray
        The setting [m/s]; NaN where even ``m = 0`` uses more than the available
        height (or the goal is out of reach); ``cap_ms`` where the glide arrives with
        height to spare at every setting up to the cap (even at ``vne``).

    Notes
    -----
    The height used grows with the airspeed above the ``m = 0`` speed to fly, and each
    airspeed is the speed to fly of exactly one setting
    (:func:`glidetask.engine.speedtofly.macready_for_speed`). So instead of a bisection
    over settings (each needing its own speed-to-fly solve) the airspeed that uses the
    available height is found directly, and its setting follows in closed form.
    """
    distance = _check_distance(distance_m)
    zero = glide_in_wind(polar, 0.0, along_ms, across_ms, airmass_ms)
    arrays = np.broadcast_arrays(*(np.asarray(x, dtype=float) for x in (
        polar.a, polar.b, polar.c, polar.vne_ms, along_ms, across_ms, airmass_ms,
        distance, available_m, zero.airspeed_ms, zero.height_per_metre)))
    a, b, c, vne, along, across, airmass, distance, available, v_zero, rate_zero = arrays
    with np.errstate(divide="ignore", invalid="ignore"):
        target = np.where(distance > 0.0, available / distance, np.where(available >= 0.0, np.inf, -np.inf))
    enough = rate_zero <= target  # NaN (out of reach) compares False
    across_sq = across * across
    rate_vne, _ = _height_rate(vne, a, b, c, along, across_sq, airmass, 0.0)
    spare_at_vne = enough & ~(rate_vne > target)
    interior = enough & ~spare_at_vne
    target = np.where(interior, target, 0.0)
    with np.errstate(invalid="ignore"):  # first guess: the no-crosswind root of sink - u = target (v + We)
        slope = b - target
        guess = (-slope + np.sqrt(slope * slope - 4.0 * a * (c - airmass - target * along))) / (2.0 * a)
    v = solve_increasing(_height_rate, np.where(interior, v_zero, np.nan), np.where(interior, vne, np.nan),
                         guess, args=(a, b, c, along, across_sq, airmass, target))
    *_, setting, _ = _glide_terms(a, b, c, v, along, across_sq, airmass)
    setting = np.clip(setting, 0.0, cap_ms)
    result = np.where(spare_at_vne, cap_ms, np.where(interior, setting, np.nan))
    return scalar_or_array(result)


@dataclass(frozen=True)
class FinalGlide:
    """A final-glide check (shared/CONTRACT.md 5.2), in SI units.

    Attributes
    ----------
    required_height_m : float or ndarray
        Goal elevation + margin + height used [m MSL].
    margin_m : float or ndarray
        Present height minus the required height [m]; negative = below the glide.
    height_used_m : float or ndarray
        Height the glide itself uses [m].
    height_per_metre : float or ndarray
        Height used per metre over the ground at the speed to fly [m/m].
    speed_to_fly_ms : float or ndarray
        Speed to fly [m/s TAS].
    ground_speed_ms : float or ndarray
        Speed over the ground along the course [m/s].
    heading_deg : float or ndarray
        Heading that holds the course [deg true].
    time_s : float or ndarray
        Time to the goal [s].
    sink_ms : float or ndarray
        Polar sink rate at the speed to fly [m/s].
    ld_required : float or ndarray
        Distance over the usable height (height - goal - margin) [-]; NaN if that
        height is not positive.
    ld_achievable : float or ndarray
        Glide ratio over the ground at the speed to fly [-].
    mc_to_arrive_ms : float or ndarray
        Setting whose required height equals the present height [m/s]
        (see :func:`mc_to_arrive`).
    """

    required_height_m: float
    margin_m: float
    height_used_m: float
    height_per_metre: float
    speed_to_fly_ms: float
    ground_speed_ms: float
    heading_deg: float
    time_s: float
    sink_ms: float
    ld_required: float
    ld_achievable: float
    mc_to_arrive_ms: float


def final_glide(polar: Polar, distance_m, height_m, *, course_deg=0.0, wind: Wind = Wind(), mc_ms=0.0,
                arrival_elevation_m=0.0, margin_m=200.0, airmass_ms=0.0) -> FinalGlide:
    """Check a final glide from one point to a goal.

    Parameters
    ----------
    polar : Polar
        The polar at this mass, bugs and the density at mid-glide height.
    distance_m : float or array_like
        Distance to the goal [m], >= 0.
    height_m : float or array_like
        Present height [m MSL].
    course_deg : float or array_like, default 0
        Course to the goal [deg true].
    wind : Wind, default calm
        The wind (fields may be arrays).
    mc_ms : float or array_like, default 0
        MacCready setting for the glide [m/s].
    arrival_elevation_m : float or array_like, default 0
        Goal elevation [m MSL].
    margin_m : float or array_like, default 200
        Planned arrival height above the goal [m].
    airmass_ms : float or array_like, default 0
        Average vertical air motion on the glide, up positive [m/s].

    Returns
    -------
    FinalGlide
        NaN where the goal is out of reach against the wind.

    Raises
    ------
    ValueError
        A negative distance.

    Notes
    -----
    ``required = E + S + D (sink(v) - u)/Vg`` with ``v`` the pure-glide speed to fly in
    wind (:func:`glidetask.engine.speedtofly.glide_in_wind`), ``time = D/Vg``.
    """
    distance = _check_distance(distance_m)
    along, across = wind_components(course_deg, wind.from_deg, wind.speed_ms)
    glide = glide_in_wind(polar, mc_ms, along, across, airmass_ms)
    used = np.where(distance == 0.0, 0.0, distance * np.asarray(glide.height_per_metre))
    height = np.asarray(height_m, dtype=float)
    required = np.asarray(arrival_elevation_m, dtype=float) + margin_m + used
    usable = height - arrival_elevation_m - np.asarray(margin_m, dtype=float)
    with np.errstate(divide="ignore", invalid="ignore"):
        ld_required = np.where(usable > 0.0, distance / usable, np.nan)
        time = np.where(distance == 0.0, 0.0, distance / np.asarray(glide.ground_speed_ms))
    heading = np.mod(np.asarray(course_deg, dtype=float) - correction_angle_deg(glide.airspeed_ms, across), 360.0)
    to_arrive = mc_to_arrive(polar, distance, usable, along, across, airmass_ms)
    shape = np.broadcast_shapes(np.shape(required), np.shape(height), np.shape(to_arrive), np.shape(heading))

    def out(value):
        return scalar_or_array(np.broadcast_to(np.asarray(value, dtype=float), shape))

    return FinalGlide(
        required_height_m=out(required),
        margin_m=out(height - required),
        height_used_m=out(used),
        height_per_metre=out(glide.height_per_metre),
        speed_to_fly_ms=out(glide.airspeed_ms),
        ground_speed_ms=out(glide.ground_speed_ms),
        heading_deg=out(heading),
        time_s=out(time),
        sink_ms=out(glide.sink_ms),
        ld_required=out(ld_required),
        ld_achievable=out(glide.ld),
        mc_to_arrive_ms=out(to_arrive),
    )


def reach_from_height_m(to_go_m, required_m, height_m) -> float:
    """How far out a final glide from ``height_m`` gets home [m of task still to go].

    Parameters
    ----------
    to_go_m : array_like, (P,)
        Distance still to go at points along the task (e.g. each turnpoint and the finish,
        0) [m].
    required_m : array_like, (P,)
        The height needed there to final-glide home [m MSL]; it never falls as the distance
        to go grows (each metre more to go needs height of its own).
    height_m : float
        The height the glide starts from (e.g. the band top) [m MSL].

    Returns
    -------
    float
        The distance to go at which ``required_m`` reaches ``height_m``, linear between the
        points (exact for a pure glide at one setting in one wind per leg, which uses height
        in proportion to distance); the whole task if even its start needs less; 0 if even
        the finish needs more; NaN without points.
    """
    to_go = np.asarray(to_go_m, dtype=float)
    required = np.asarray(required_m, dtype=float)
    order = np.argsort(to_go)
    to_go, required = to_go[order], np.maximum.accumulate(required[order])
    if to_go.size == 0:
        return float("nan")
    if height_m < required[0]:
        return 0.0
    return float(np.interp(height_m, required, to_go))
