"""Wind on a course: components, the heading that holds the course, ground speed.

Wind is given as the direction it blows FROM [deg true] and its speed [m/s]
(shared/CONTRACT.md section 1). All functions broadcast over numpy arrays.
"""

from __future__ import annotations

import numpy as np

from glidetask.engine.arrays import scalar_or_array


def wind_components(course_deg, wind_from_deg, wind_speed_ms):
    """Split a wind into parts along and across a course.

    Parameters
    ----------
    course_deg : float or array_like
        Course over the ground [deg true].
    wind_from_deg : float or array_like
        Direction the wind blows from [deg true].
    wind_speed_ms : float or array_like
        Wind speed [m/s].

    Returns
    -------
    along_ms : float or ndarray
        Component along the course [m/s]; positive is a tailwind.
    across_ms : float or ndarray
        Component across the course [m/s]; positive when the wind blows from the
        left of the course (it pushes the glider to the right).

    Notes
    -----
    The wind blows toward ``from + 180``; with ``delta = from - course``,
    ``along = -W cos(delta)``, ``across = -W sin(delta)``.
    """
    delta = np.radians(np.asarray(wind_from_deg, dtype=float) - np.asarray(course_deg, dtype=float))
    speed = np.asarray(wind_speed_ms, dtype=float)
    return scalar_or_array(-speed * np.cos(delta)), scalar_or_array(-speed * np.sin(delta))


def heading_for_course(course_deg, airspeed_ms, wind_from_deg, wind_speed_ms):
    """Heading that holds a course in a wind, and the ground speed along it.

    Parameters
    ----------
    course_deg : float or array_like
        Course to hold over the ground [deg true].
    airspeed_ms : float or array_like
        True airspeed [m/s].
    wind_from_deg, wind_speed_ms : float or array_like
        The wind [deg true, from], [m/s].

    Returns
    -------
    heading_deg : float or ndarray
        Heading [deg true, 0-360); NaN where the crosswind is at least the airspeed.
    ground_speed_ms : float or ndarray
        Speed over the ground along the course [m/s]; NaN where the crosswind is at
        least the airspeed. Zero or negative where a headwind is as strong as the
        airspeed's along-course part (no progress).

    Notes
    -----
    The wind triangle: the glider turns into the wind by the wind-correction angle
    ``asin(Wn / v)`` so that its crosswind drift cancels; the ground speed is
    ``sqrt(v^2 - Wn^2) + We`` (standard air navigation).
    """
    along, across = wind_components(course_deg, wind_from_deg, wind_speed_ms)
    along, across = np.asarray(along), np.asarray(across)
    v = np.asarray(airspeed_ms, dtype=float)
    ground = np.where(np.abs(across) < v, ground_speed(v, along, across), np.nan)
    heading = np.mod(np.asarray(course_deg, dtype=float) - np.asarray(correction_angle_deg(v, across)), 360.0)
    return scalar_or_array(heading), scalar_or_array(ground)


def ground_speed(airspeed_ms, along_ms, across_ms):
    """Speed over the ground along a course, heading so that the crosswind does not drift
    the glider off it: ``sqrt(v^2 - Wn^2) + We`` [m/s] (the wind triangle; standard air
    navigation). The one place this rule is written.

    Parameters
    ----------
    airspeed_ms : float or array_like
        True airspeed [m/s] (or, for a climb-and-glide cycle, the air velocity that must
        cancel the cycle's drift).
    along_ms, across_ms : float or array_like
        Wind components along (tailwind positive) and across the course [m/s]
        (:func:`wind_components`).

    Returns
    -------
    float or ndarray
        NaN where the crosswind is stronger than the airspeed; zero or negative where a
        headwind is as strong as the airspeed's part along the course.
    """
    v = np.asarray(airspeed_ms, dtype=float)
    across = np.asarray(across_ms, dtype=float)
    with np.errstate(invalid="ignore"):
        return scalar_or_array(np.sqrt(v * v - across * across) + np.asarray(along_ms, dtype=float))


def correction_angle_deg(airspeed_ms, across_ms):
    """Wind-correction angle ``asin(Wn / v)`` [deg]: turn this far into the wind.

    Positive for a wind from the left (heading = course - angle); NaN where the crosswind
    ``across_ms`` [m/s] is at least the true airspeed ``airspeed_ms`` [m/s].
    """
    v = np.asarray(airspeed_ms, dtype=float)
    across = np.asarray(across_ms, dtype=float)
    with np.errstate(invalid="ignore", divide="ignore"):
        angle = np.degrees(np.arcsin(np.where(np.abs(across) < v, across / v, np.nan)))
    return scalar_or_array(angle)
