"""Circling in a thermal: turn physics, a thermal updraft profile, the climb achieved.

In a coordinated turn at bank ``phi`` the wing carries ``n = 1/cos(phi)`` times the
weight, so the glider flies ``sqrt(n)`` faster and sinks ``n^1.5`` times faster than
wings level at the same lift coefficient, on a circle of radius ``V^2/(g tan(phi))``;
the stall speed grows by ``sqrt(n)`` too [5]_. The glider circles at a margin (default
1.15) above the stall speed at its bank and mass, never slower; within that limit it
chooses bank and speed for the best climb. The thermal is a Gaussian core; the achieved
climb is the updraft at the circle's radius minus the circling sink
(shared/CONTRACT.md section 3). :func:`strength_for_climb` inverts it: the thermal
strength in which a glider achieves a given climb.

References
----------
.. [1] F. Thomas, Fundamentals of Sailplane Design, College Park Press, 1999: the
   circling polar and the climb in model thermals (from memory).
.. [2] H. Reichmann, Cross-Country Soaring, Thomson Publications, 1978: circling
   flight, bank angle and thermal core width (from memory).
.. [3] K. H. Horstmann, "Neue Modellaufwindverteilungen und ihr Einfluss auf die
   Auslegung von Segelflugzeugen", OSTIV Publication XIV, 1976: radial updraft
   profiles that fall off smoothly from the core (from memory).
.. [4] M. J. Allen, "Updraft Model for Development of Autonomous Soaring Uninhabited
   Air Vehicles", AIAA 2006-1510, NASA Dryden, 2006: a bell-shaped radial profile
   (from memory; that model itself is not implemented here).
.. [5] J. D. Anderson Jr., Introduction to Flight, McGraw-Hill, ch. on performance:
   the level turn, ``n = 1/cos(phi)``, ``R = V^2/(g sqrt(n^2 - 1))`` and the stall speed
   in a turn ``V_s sqrt(n)`` (from memory).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from glidetask.engine.arrays import scalar_or_array
from glidetask.engine.polar import Polar

G0_MS2 = 9.80665  # standard gravity [m/s^2]
BANK_RANGE_DEG = (15.0, 60.0)  # banks searched for the best climb [deg]
DEFAULT_STALL_MARGIN = 1.15  # circling speed over the banked stall speed (common practice)
CIRCLING_SPEED_SPAN = 1.6  # wings-level speeds searched: the stall-margin speed to this multiple of it


def load_factor(bank_deg):
    """Load factor of a coordinated level turn ``n = 1/cos(phi)`` [-]."""
    return scalar_or_array(1.0 / np.cos(np.radians(np.asarray(bank_deg, dtype=float))))


def circling_speed(speed_ms, bank_deg):
    """Airspeed in the turn for a wings-level airspeed at the same lift coefficient [m/s].

    ``V_turn = v sqrt(n)``: the lift must grow by ``n`` at the same lift coefficient.
    """
    return scalar_or_array(np.asarray(speed_ms, dtype=float) * np.sqrt(load_factor(bank_deg)))


def circling_sink(polar: Polar, speed_ms, bank_deg):
    """Sink rate in a coordinated turn [m/s].

    Parameters
    ----------
    polar : Polar
        The wings-level polar.
    speed_ms : float or array_like
        Wings-level airspeed whose lift coefficient the turn keeps [m/s TAS].
    bank_deg : float or array_like
        Bank angle [deg].

    Notes
    -----
    At the same lift coefficient, speed grows by ``sqrt(n)`` and the power needed by
    ``n^1.5``: ``sink_turn = sink(v) n^1.5`` [1]_ (module references).
    """
    n = np.asarray(load_factor(bank_deg))
    return scalar_or_array(np.asarray(polar.sink(speed_ms)) * n**1.5)


def banked_stall_speed(stall_speed_ms, bank_deg):
    """Stall speed in a coordinated level turn ``V_s sqrt(n)`` [m/s].

    Parameters
    ----------
    stall_speed_ms : float or array_like
        Wings-level stall speed at this mass and density [m/s TAS].
    bank_deg : float or array_like
        Bank angle [deg].

    Notes
    -----
    The wing stalls at the same lift coefficient whatever the load, and carries ``n``
    times the weight in the turn, so the stall speed grows by ``sqrt(n)`` [5]_.
    """
    return scalar_or_array(np.asarray(stall_speed_ms, dtype=float) * np.sqrt(load_factor(bank_deg)))


def slowest_circling_speed(polar: Polar, bank_deg, stall_margin=DEFAULT_STALL_MARGIN):
    """The slowest airspeed the circling model flies at a bank [m/s TAS].

    ``stall_margin`` times the banked stall speed of the polar's mass and density
    (:attr:`Polar.wings_level_stall_ms`); the polar file's lowest valid speed plays no part.
    """
    return scalar_or_array(stall_margin * np.asarray(banked_stall_speed(polar.wings_level_stall_ms, bank_deg)))


def turn_radius(speed_ms, bank_deg):
    """Radius of a coordinated level turn ``r = V^2 / (g tan(phi))`` [m].

    Parameters
    ----------
    speed_ms : float or array_like
        Airspeed in the turn [m/s TAS].
    bank_deg : float or array_like
        Bank angle [deg]; ``r`` is inf at 0.
    """
    v = np.asarray(speed_ms, dtype=float)
    with np.errstate(divide="ignore"):
        return scalar_or_array(v * v / (G0_MS2 * np.tan(np.radians(np.asarray(bank_deg, dtype=float)))))


def updraft(r_m, core_ms, radius_m=150.0):
    """Updraft at a distance from the thermal's centre [m/s], Gaussian core.

    Parameters
    ----------
    r_m : float or array_like
        Distance from the centre [m].
    core_ms : float or array_like
        Updraft at the centre [m/s].
    radius_m : float or array_like, default 150
        e-folding radius: the updraft is ``core/e`` (37 %) there [m].

    Returns
    -------
    float or ndarray
        ``w(r) = W0 exp(-(r/R)^2)`` [m/s].

    Notes
    -----
    An idealised, axially symmetric thermal with no downdraft ring and no change with
    height. The bell shape follows the smooth radial fall-off of the soaring
    literature's model thermals ([3]_, [4]_ in the module references); the Gaussian
    form itself is our idealisation, not a fit to either model.
    """
    r = np.asarray(r_m, dtype=float) / np.asarray(radius_m, dtype=float)
    return scalar_or_array(np.asarray(core_ms, dtype=float) * np.exp(-r * r))


@dataclass(frozen=True)
class ClimbSolution:
    """The best circling climb in a thermal.

    Attributes
    ----------
    climb_ms : float or ndarray
        Achieved climb rate [m/s]; negative where the thermal is too weak to climb in.
    bank_deg : float or ndarray
        Bank angle giving it [deg].
    airspeed_ms : float or ndarray
        Airspeed in the turn [m/s TAS].
    turn_radius_m : float or ndarray
        Radius of the circle [m].
    wings_level_speed_ms : float or ndarray
        The wings-level airspeed at the same lift coefficient [m/s TAS].
    updraft_ms : float or ndarray
        The air's rise on that circle [m/s]: what a netto variometer reads in the turn.
    sink_ms : float or ndarray
        The glider's sink in the turn [m/s], ``sink(v) n^1.5``; ``climb = updraft - sink``.
    """

    climb_ms: float
    bank_deg: float
    airspeed_ms: float
    turn_radius_m: float
    wings_level_speed_ms: float
    updraft_ms: float
    sink_ms: float


def _climb_grid(a, b, c, core, radius, bank, speed):
    """Climb rate on grids of bank [deg] and wings-level speed [m/s] (trailing axes)."""
    cos_bank = np.cos(np.radians(bank))
    n = 1.0 / cos_bank
    sink = ((a * speed + b) * speed + c) * n * np.sqrt(n)
    # r = V^2/(g tan) with V^2 = v^2 n, and n / tan = 1 / sin.
    r = speed * speed / (G0_MS2 * np.sin(np.radians(bank)))
    return core * np.exp(-(r / radius) ** 2) - sink


def achieved_climb(polar: Polar, core_ms, radius_m=150.0, *, stall_margin=DEFAULT_STALL_MARGIN,
                   rounds: int = 3) -> ClimbSolution:
    """Best climb rate in a Gaussian thermal over bank angle and airspeed.

    Parameters
    ----------
    polar : Polar
        The polar at this mass, bugs and density (fields may be arrays), with its
        wings-level stall speed (:attr:`Polar.wings_level_stall_ms`).
    core_ms : float or array_like
        Thermal core updraft [m/s].
    radius_m : float or array_like, default 150
        Thermal e-folding radius [m] (see :func:`updraft`).
    stall_margin : float or array_like, default 1.15
        The slowest circling speed as a multiple of the stall speed at that bank [-], > 1.
    rounds : int, default 3
        Refinements after the coarse grid, each narrowing the search three-fold.

    Returns
    -------
    ClimbSolution
        Broadcast over the polar's fields, ``core_ms``, ``radius_m`` and ``stall_margin``.

    Raises
    ------
    ValueError
        A stall margin not above 1.

    Notes
    -----
    The climb ``w(r) - sink(v) n^1.5`` with ``r = v^2 n/(g tan(phi))`` is maximised over
    banks of 15-60 degrees and wings-level speeds ``v`` (the turn flies ``v sqrt(n)``)
    from ``stall_margin`` times the wings-level stall speed, which keeps that margin over
    the banked stall speed in the turn [5]_, to 1.6 times that (within vne): first on a
    coarse grid, then on finer grids around the best point. The polar's quadratic is
    used down to that speed, below the file's lowest valid speed where the margin allows
    (an assumption: real polars sink faster near the stall than a quadratic says). The
    circle is assumed centred on the thermal.
    """
    margin = np.asarray(stall_margin, dtype=float)
    if np.any(~(margin > 1.0)):
        raise ValueError("stall_margin must be greater than 1")
    shape = np.broadcast_shapes(polar.shape, np.shape(core_ms), np.shape(radius_m), margin.shape)
    expand = [np.broadcast_to(np.asarray(x, dtype=float), shape)[..., None, None] for x in (
        polar.a, polar.b, polar.c, core_ms, radius_m, margin * np.asarray(polar.wings_level_stall_ms), polar.vne_ms)]
    a, b, c, core, radius, v_min, v_max = expand
    v_max = np.minimum(v_max, CIRCLING_SPEED_SPAN * v_min)
    bank_lo, bank_hi = np.full_like(v_min, BANK_RANGE_DEG[0]), np.full_like(v_min, BANK_RANGE_DEG[1])
    speed_lo, speed_hi = v_min, v_max
    bank_steps, speed_steps = 13, 11
    for _ in range(rounds + 1):
        bank = bank_lo + (bank_hi - bank_lo) * np.linspace(0.0, 1.0, bank_steps)[:, None]
        speed = speed_lo + (speed_hi - speed_lo) * np.linspace(0.0, 1.0, speed_steps)[None, :]
        climb = _climb_grid(a, b, c, core, radius, bank, speed)
        flat = climb.reshape(*shape, -1).argmax(axis=-1)
        i, j = np.unravel_index(flat, (bank_steps, speed_steps))
        best_bank = np.take_along_axis(bank[..., :, 0], i[..., None], axis=-1)[..., None]
        best_speed = np.take_along_axis(speed[..., 0, :], j[..., None], axis=-1)[..., None]
        bank_step = (bank_hi - bank_lo) / (bank_steps - 1)
        speed_step = (speed_hi - speed_lo) / (speed_steps - 1)
        bank_lo = np.maximum(best_bank - bank_step, BANK_RANGE_DEG[0])
        bank_hi = np.minimum(best_bank + bank_step, BANK_RANGE_DEG[1])
        speed_lo, speed_hi = np.maximum(best_speed - speed_step, v_min), np.minimum(best_speed + speed_step, v_max)
        bank_steps = speed_steps = 7
    best = _climb_grid(a, b, c, core, radius, best_bank, best_speed)[..., 0, 0]
    bank_deg, wings_level = best_bank[..., 0, 0], best_speed[..., 0, 0]
    in_turn = np.asarray(circling_speed(wings_level, bank_deg))
    circle = np.asarray(turn_radius(in_turn, bank_deg))
    rise = np.asarray(updraft(circle, core[..., 0, 0], radius[..., 0, 0]))
    level_sink = (a[..., 0, 0] * wings_level + b[..., 0, 0]) * wings_level + c[..., 0, 0]
    sink = level_sink * np.asarray(load_factor(bank_deg)) ** 1.5
    return ClimbSolution(
        climb_ms=scalar_or_array(best),
        bank_deg=scalar_or_array(bank_deg),
        airspeed_ms=scalar_or_array(in_turn),
        turn_radius_m=scalar_or_array(circle),
        wings_level_speed_ms=scalar_or_array(wings_level),
        updraft_ms=scalar_or_array(rise),
        sink_ms=scalar_or_array(sink),
    )


def climb_for_strength(polar: Polar, strength_ms, radius_m=150.0, *, stall_margin=DEFAULT_STALL_MARGIN):
    """The climb a glider achieves in thermals of a core strength [m/s].

    The ``climb_ms`` of :func:`achieved_climb`; the inverse of :func:`strength_for_climb`.
    """
    return achieved_climb(polar, strength_ms, radius_m, stall_margin=stall_margin).climb_ms


def _climb_residual(strength, a, b, c, stall, vne, radius, margin, target):
    """``climb(strength) - target`` and its slope: the updraft fraction at the best circle
    (envelope theorem: the climb is a maximum of functions linear in the strength)."""
    polar = Polar(a=a, b=b, c=c, min_speed_ms=stall, vne_ms=vne, stall_speed_ms=stall)
    best = achieved_climb(polar, strength, radius, stall_margin=margin)
    fraction = np.exp(-(np.asarray(best.turn_radius_m) / radius) ** 2)
    return np.asarray(best.climb_ms) - target, fraction


def strength_for_climb(polar: Polar, climb_ms, radius_m=150.0, *, stall_margin=DEFAULT_STALL_MARGIN):
    """The thermal core strength in which a glider achieves a climb [m/s].

    Turns climbs achieved at one loading (a task file's ``climb_ms``) into thermal
    strengths once, so that every other mass climbs as the circling model says
    (shared/CONTRACT.md section 3): ``climb_for_strength(other, strength_for_climb(own, c))``.

    Parameters
    ----------
    polar : Polar
        The polar of the loading that achieved the climbs (fields may be arrays).
    climb_ms : float or array_like
        Achieved climb rates [m/s].
    radius_m : float or array_like, default 150
        Thermal e-folding radius [m].
    stall_margin : float or array_like, default 1.15
        As in :func:`achieved_climb`.

    Returns
    -------
    float or ndarray
        The core strength ``W >= 0`` with ``achieved_climb(polar, W).climb_ms == climb``,
        to about 1e-6 m/s; NaN where the climb is below the one in still air (``W = 0``,
        minus the least circling sink) or not finite.

    Notes
    -----
    The climb increases strictly with the strength (at any fixed circle it rises by the
    updraft fraction ``exp(-(r/R)^2) > 0`` per m/s of strength), so the inverse is unique.
    It is found by a safeguarded Newton iteration whose slope is that fraction at the best
    circle. The bracket is ``[max(0, climb), (climb + s)/f]`` with ``s`` the sink and
    ``f`` the updraft fraction of one feasible circle (45 deg bank at the slowest
    circling speed): that circle alone already climbs ``climb`` there.
    """
    from glidetask.engine.speedtofly import solve_increasing  # one solver for every 1-D root

    shape = np.broadcast_shapes(polar.shape, np.shape(climb_ms), np.shape(radius_m), np.shape(stall_margin))
    a, b, c, stall, vne, radius, margin, target = (np.broadcast_to(np.asarray(x, dtype=float), shape) for x in (
        polar.a, polar.b, polar.c, polar.wings_level_stall_ms, polar.vne_ms, radius_m, stall_margin, climb_ms))
    own = Polar(a=a, b=b, c=c, min_speed_ms=stall, vne_ms=vne, stall_speed_ms=stall)
    still = np.asarray(achieved_climb(own, np.zeros(shape), radius, stall_margin=margin).climb_ms)
    level = margin * stall  # wings-level speed of a 45 deg circle at the slowest circling speed
    sink = ((a * level + b) * level + c) * 2.0**0.75
    fraction = np.exp(-(level * level * np.sqrt(2.0) / G0_MS2 / radius) ** 2)
    valid = np.isfinite(target) & (target >= still)
    lo = np.where(valid, np.maximum(target, 0.0), np.nan)
    hi = np.where(valid, np.maximum((target + sink) / fraction, lo), np.nan)
    strength = solve_increasing(_climb_residual, lo, hi, args=(a, b, c, stall, vne, radius, margin, target),
                                iterations=40, rtol=1e-9)
    strength = np.where(valid & (target <= still), 0.0, strength)
    return scalar_or_array(strength)
