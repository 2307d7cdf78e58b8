"""MacCready speed to fly: still air, pure glide in wind, and drift-aware cruise.

Three cases (shared/CONTRACT.md section 3):

* still air, quadratic polar: the closed form ``v = sqrt((c + m - u)/a)``;
* a pure glide in wind (final glide, or no climbs ahead): the heading cancels the
  crosswind and the airspeed minimises ``(m + sink(v) - u) / Vg`` (time spent per metre
  over the ground, counting the climb at ``m`` that would win the height back);
* cruise with climbs, drift-aware: the glider drifts with the wind while it climbs,
  so the whole cycle moves with the air mass and the speed to fly is the still-air one;
  the wind only changes the average speed over the ground.

Everything broadcasts over numpy arrays (many cases, or polars with array fields) with no
Python loop per case: the 1-D optimisations are solved as roots of their stationarity
condition by a vectorised, bracketed Newton iteration.

References
----------
.. [1] P. B. MacCready Jr., "Optimum airspeed selector", Soaring, Jan.-Feb. 1958, pp. 10-11
   (from memory).
.. [2] H. Reichmann, Cross-Country Soaring, Thomson Publications, 1978, ch. on speed
   to fly (from memory).
.. [3] F. Thomas, Fundamentals of Sailplane Design, College Park Press, 1999 (from memory).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from glidetask.engine.arrays import scalar_or_array
from glidetask.engine.polar import Polar
from glidetask.engine.wind import ground_speed


def solve_increasing(func, lo, hi, guess=None, args=(), *, iterations=60, rtol=1e-9):
    """Roots of increasing functions on brackets, elementwise (safeguarded Newton).

    Parameters
    ----------
    func : callable
        ``func(x, *args) -> (f, dfdx)`` on 1-D arrays; ``f`` increasing in ``x``.
        Where ``f`` keeps one sign over the bracket, the answer is the end it points to
        (``hi`` where ``f < 0`` throughout, ``lo`` where ``f > 0``).
    lo, hi : array_like
        Brackets; elements where they are equal or NaN come back as they are.
    guess : array_like, optional
        Starting points; the bracket midpoints where absent or outside the bracket.
    args : tuple of array_like
        Per-element parameters of ``func``, broadcastable to the brackets' shape.

    Returns
    -------
    ndarray
        The roots (shape of the broadcast brackets), to a relative tolerance ``rtol``.

    Notes
    -----
    Each step is Newton's when it lands inside the shrinking bracket and a bisection
    otherwise, so it converges for any continuous increasing ``f``. Only the elements
    not yet settled are evaluated in later steps.
    """
    shape = np.broadcast_shapes(np.shape(lo), np.shape(hi), *(np.shape(x) for x in args))
    flat = [np.broadcast_to(np.asarray(x, dtype=float), shape).ravel() for x in (lo, hi, *args)]
    lo, hi, params = flat[0].copy(), flat[1].copy(), flat[2:]
    mid = 0.5 * (lo + hi)
    x = mid if guess is None else np.broadcast_to(np.asarray(guess, dtype=float), shape).ravel()
    x = np.where((x > lo) & (x < hi), x, mid)
    # The working set: elements not yet settled, compacted when it has shrunk by half.
    index = np.flatnonzero(lo < hi)
    xa, la, ha = x[index], lo[index], hi[index]
    pa = [p[index] for p in params]
    done = np.zeros(index.size, dtype=bool)  # settled elements stay put: results do not depend on the batch
    for _ in range(iterations):
        if index.size == 0:
            break
        f, dfdx = func(xa, *pa)
        la = np.where(f <= 0.0, xa, la)
        ha = np.where(f >= 0.0, xa, ha)
        with np.errstate(divide="ignore", invalid="ignore"):
            newton = xa - f / dfdx
        x_new = np.where((newton >= la) & (newton <= ha), newton, 0.5 * (la + ha))
        x_new = np.where(done, xa, x_new)
        settled = done | (np.abs(x_new - xa) <= rtol * (1.0 + np.abs(xa))) | np.isnan(x_new)
        xa, done = x_new, settled
        if settled.all():
            break
        if 2 * np.count_nonzero(~settled) < index.size:
            x[index] = xa
            keep = ~settled
            index, xa, la, ha, done = index[keep], xa[keep], la[keep], ha[keep], done[keep]
            pa = [p[keep] for p in pa]
    x[index] = xa
    return x.reshape(shape)


def speed_to_fly_still_air(polar: Polar, mc_ms, airmass_ms=0.0):
    """MacCready speed to fly in still air for a quadratic polar [m/s TAS].

    Parameters
    ----------
    polar : Polar
        The polar at this mass, bugs and density.
    mc_ms : float or array_like
        MacCready setting: the climb rate expected in the next thermal [m/s].
    airmass_ms : float or array_like, default 0
        Vertical motion of the air being flown through, up positive [m/s].

    Returns
    -------
    float or ndarray
        ``sqrt((c + m - u) / a)`` clamped to ``[min_speed, vne]``.

    Notes
    -----
    The tangent to the polar from the point ``(0, -(m - u))`` touches it where
    ``a v^2 = c + m - u`` [1]_ [2]_. Where ``c + m - u <= 0`` (lift stronger than the
    setting plus the polar's intercept) the answer is the lowest valid speed.
    """
    numerator = np.asarray(polar.c) + np.asarray(mc_ms, dtype=float) - np.asarray(airmass_ms, dtype=float)
    tangent = np.sqrt(np.maximum(numerator, 0.0) / polar.a)
    return polar.clamp(tangent)


def _ground_speed(v, along, across_sq):
    """``q = sqrt(v^2 - Wn^2)`` and ``Vg = q + We`` (q = 0 where the crosswind wins): the
    solvers' form of :func:`glidetask.engine.wind.ground_speed`, clamped so that Newton steps
    stay finite, with the squared crosswind ``Wn^2`` computed once."""
    q = np.sqrt(np.maximum(v * v - across_sq, 0.0))
    return q, q + along


def _glide_terms(a, b, c, v, along, across_sq, airmass):
    """Sink, ground speed, and ``M(v)`` (the setting for which ``v`` is optimal) with ``dM/dv``.

    ``across_sq`` is the squared crosswind ``Wn^2`` [m^2/s^2].
    """
    sink = (a * v + b) * v + c
    slope = 2.0 * a * v + b
    q, ground = _ground_speed(v, along, across_sq)
    with np.errstate(invalid="ignore", divide="ignore"):
        q_over_v = q / v
        setting = slope * ground * q_over_v - sink + airmass
        d_setting = ground * (2.0 * a * q_over_v + slope * across_sq / (q * v * v))
    return sink, ground, setting, d_setting


def _stationarity(v, a, b, c, along, across_sq, airmass, mc):
    *_, setting, d_setting = _glide_terms(a, b, c, v, along, across_sq, airmass)
    return setting - mc, d_setting


def macready_for_speed(polar: Polar, airspeed_ms, along_ms, across_ms, airmass_ms=0.0):
    """The MacCready setting for which an airspeed is the pure-glide speed to fly [m/s].

    Notes
    -----
    The stationarity condition of ``(m + sink(v) - u)/Vg(v)`` with
    ``Vg = sqrt(v^2 - Wn^2) + We`` solved for ``m``:
    ``m = sink'(v) Vg q / v - sink(v) + u`` with ``q = sqrt(v^2 - Wn^2)``.
    In still air this is ``a v^2 - c + u``, the inverse of the closed form.
    """
    *_, setting, _ = _glide_terms(np.asarray(polar.a), np.asarray(polar.b), np.asarray(polar.c),
                                  np.asarray(airspeed_ms, dtype=float), np.asarray(along_ms, dtype=float),
                                  np.asarray(across_ms, dtype=float) ** 2, np.asarray(airmass_ms, dtype=float))
    return scalar_or_array(setting)


def _snap_to_ends(v, lo, hi, rtol=1e-8):
    """Solutions within round-off of an end of the speed range, put exactly on it."""
    v = np.where(v - lo <= rtol * (1.0 + lo), lo, v)
    return np.where(hi - v <= rtol * (1.0 + hi), hi, v)


@dataclass(frozen=True)
class GlideSolution:
    """The speed to fly on a pure glide in wind and what it gives.

    Attributes
    ----------
    airspeed_ms : float or ndarray
        Speed to fly [m/s TAS].
    ground_speed_ms : float or ndarray
        Speed over the ground along the course [m/s].
    sink_ms : float or ndarray
        Sink rate at that airspeed (polar only, air motion excluded) [m/s].
    height_per_metre : float or ndarray
        Height used per metre over the ground ``(sink - u)/Vg`` [m/m].
    ld : float or ndarray
        Glide ratio over the ground ``Vg / (sink - u)`` [-]; inf where the air rises
        at least as fast as the glider sinks.
    """

    airspeed_ms: float
    ground_speed_ms: float
    sink_ms: float
    height_per_metre: float
    ld: float


def glide_in_wind(polar: Polar, mc_ms, along_ms, across_ms, airmass_ms=0.0) -> GlideSolution:
    """MacCready speed to fly on a pure glide holding a course in wind.

    Parameters
    ----------
    polar : Polar
        The polar at this mass, bugs and density (fields may be arrays).
    mc_ms : float or array_like
        MacCready setting [m/s], >= 0.
    along_ms, across_ms : float or array_like
        Wind along the course (tailwind positive) and across it [m/s]
        (see :func:`glidetask.engine.wind.wind_components`).
    airmass_ms : float or array_like, default 0
        Average vertical air motion on the glide, up positive [m/s].

    Returns
    -------
    GlideSolution
        NaN in every field where no airspeed in ``[min_speed, vne]`` makes progress
        along the course (crosswind or headwind at least as strong as the glider's best).

    Notes
    -----
    The heading cancels the crosswind, so ``Vg = sqrt(v^2 - Wn^2) + We``; ``v`` in
    ``[min_speed, vne]`` minimises ``J(v) = (m + sink(v) - u)/Vg(v)``: for ``m > 0``
    this maximises ``m Vg/(m + sink - u)`` and for ``m = 0`` it minimises the height
    used per metre (shared/CONTRACT.md section 3). ``dJ/dv`` has the sign of
    ``M(v) - m`` (:func:`macready_for_speed`), which increases with ``v`` for
    quadratic polars, so the optimum is the root of ``M(v) = m`` or an end of the range.
    """
    fields = np.broadcast_arrays(*(np.asarray(x, dtype=float) for x in (
        polar.a, polar.b, polar.c, polar.min_speed_ms, polar.vne_ms, mc_ms, along_ms, across_ms, airmass_ms)))
    a, b, c, v_min, v_max, m, along, across, airmass = fields

    across_sq = across * across
    # Slowest airspeed that still holds the course with Vg >= 0.
    v_hold = np.sqrt(across_sq + np.minimum(along, 0.0) ** 2)
    lo = np.maximum(v_min, v_hold)
    reachable = lo < v_max
    with np.errstate(invalid="ignore", divide="ignore"):
        # First guess: the closed form for a pure head/tailwind, where a crosswind counts
        # as a headwind of Wn^2/(2v) (from sqrt(v^2 - Wn^2) ~ v - Wn^2/(2v)).
        guess = -along + np.sqrt(along * along + (c + m - airmass - b * along) / a)
        effective = along - across_sq / (2.0 * guess)
        guess = -effective + np.sqrt(effective * effective + (c + m - airmass - b * effective) / a)
    # Where M(v) - m keeps one sign over the range the bracketed solver walks to that end.
    v = solve_increasing(_stationarity, np.where(reachable, lo, np.nan), np.where(reachable, v_max, np.nan),
                         guess, args=(a, b, c, along, across_sq, airmass, m))
    v = _snap_to_ends(v, lo, v_max)

    sink = (a * v + b) * v + c
    _, ground = _ground_speed(v, along, across_sq)
    valid = ground > 0.0
    net_sink = sink - airmass
    with np.errstate(divide="ignore", invalid="ignore"):
        ld = np.where(net_sink > 0.0, ground / net_sink, np.inf)
        per_metre = net_sink / ground
    nan = np.nan
    return GlideSolution(
        airspeed_ms=scalar_or_array(np.where(valid, v, nan)),
        ground_speed_ms=scalar_or_array(np.where(valid, ground, nan)),
        sink_ms=scalar_or_array(np.where(valid, sink, nan)),
        height_per_metre=scalar_or_array(np.where(valid, per_metre, nan)),
        ld=scalar_or_array(np.where(valid, ld, nan)),
    )


@dataclass(frozen=True)
class CruiseSolution:
    """Cruise with climbs along a course, drift-aware (shared/CONTRACT.md section 3).

    Attributes
    ----------
    airspeed_ms : float or ndarray
        Speed to fly between climbs [m/s TAS].
    cruise_speed_ms : float or ndarray
        Average speed along the course, climbs included [m/s]; NaN where unreachable.
    glide_ground_speed_ms : float or ndarray
        Ground speed while gliding along the course with the crosswind cancelled
        ``sqrt(v^2 - Wn^2) + We`` [m/s]; NaN where the crosswind is at least ``v``.
    glide_fraction : float or ndarray
        Share of the time spent gliding ``f = m_c/(m_c + sink - u)`` [-]; 1 where the
        air rises at least as fast as the glider sinks.
    """

    airspeed_ms: float
    cruise_speed_ms: float
    glide_ground_speed_ms: float
    glide_fraction: float


def cruise_in_wind(polar: Polar, climb_ms, along_ms, across_ms, airmass_ms=0.0, mc_ms=None,
                   climb_along_ms=None, climb_across_ms=None) -> CruiseSolution:
    """Speed to fly and average cross-country speed on a course with climbs, in wind.

    Parameters
    ----------
    polar : Polar
        The polar at this mass, bugs and density (fields may be arrays).
    climb_ms : float or array_like
        Achieved average climb in thermals ``m_c`` [m/s].
    along_ms, across_ms : float or array_like
        Wind along the course (tailwind positive) and across it [m/s].
    airmass_ms : float or array_like, default 0
        Average vertical air motion while gliding, up positive [m/s].
    mc_ms : float or array_like, optional
        A fixed MacCready setting [m/s]; default the achieved climb.
    climb_along_ms, climb_across_ms : float or array_like, optional
        The wind the climbs drift with, where it differs from the glides' (wind with
        height) [m/s]; default the glides' wind.

    Returns
    -------
    CruiseSolution
        ``cruise_speed_ms`` is NaN where no airspeed gives progress (``m_c <= 0`` with
        the glider losing height, or wind too strong): a result, not an error.

    Notes
    -----
    A share ``f = m_c/(m_c + sink(v) - u)`` of the time is spent gliding at airspeed
    ``v``; climbing, the glider drifts with the air. The mean air-relative velocity is
    ``f v`` along the heading, so ``Vc = sqrt((f v)^2 - Wn^2) + We``. Choosing ``v`` to
    maximise ``Vc`` with the setting ``m`` in place of ``m_c`` is maximising
    ``m v/(m + sink - u)``: the still-air speed to fly, whatever the wind [1]_.
    ``Vc`` is then evaluated with the real ``m_c``.

    With a climb wind ``C`` other than the glide wind ``G`` the cycle's mean wind is
    ``f G + (1 - f) C`` and ``Vc = sqrt((f v)^2 - (f Gn + (1-f) Cn)^2) + f Ge + (1-f) Ce``
    (the same vector sum); the speed to fly stays the still-air one (the shear's effect
    on the optimum is neglected: it is second order in the shear).

    References
    ----------
    .. [1] H. Reichmann, Cross-Country Soaring, Thomson Publications, 1978: in a
       drifting thermal cycle the wind does not change the speed to fly (from memory).
    """
    climb = np.asarray(climb_ms, dtype=float)
    setting = climb if mc_ms is None else np.asarray(mc_ms, dtype=float)
    airmass = np.asarray(airmass_ms, dtype=float)
    along = np.asarray(along_ms, dtype=float)
    across = np.asarray(across_ms, dtype=float)
    v = np.asarray(speed_to_fly_still_air(polar, np.maximum(setting, 0.0), airmass))
    net_sink = np.asarray(polar.sink(v)) - airmass
    with np.errstate(divide="ignore", invalid="ignore"):
        fraction = np.where(net_sink <= 0.0, 1.0, climb / (climb + net_sink))
        fraction = np.where((net_sink > 0.0) & (climb <= 0.0), np.nan, fraction)
        if climb_along_ms is None:
            cruise = np.asarray(ground_speed(fraction * v, along, across))
        else:  # the cycle's mean wind: glides in (along, across), climbs in the climb wind
            climbing = 1.0 - fraction
            cruise = np.asarray(ground_speed(fraction * v, fraction * along + climbing * np.asarray(climb_along_ms),
                                             fraction * across + climbing * np.asarray(climb_across_ms)))
        glide_ground = np.asarray(ground_speed(v, along, across))
    cruise = np.where(cruise > 0.0, cruise, np.nan)
    shape = np.broadcast_shapes(v.shape, cruise.shape, glide_ground.shape, fraction.shape)
    return CruiseSolution(
        airspeed_ms=scalar_or_array(np.broadcast_to(v, shape)),
        cruise_speed_ms=scalar_or_array(np.broadcast_to(cruise, shape)),
        glide_ground_speed_ms=scalar_or_array(np.broadcast_to(glide_ground, shape)),
        glide_fraction=scalar_or_array(np.broadcast_to(fraction, shape)),
    )
