"""Wind components and the wind triangle."""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from glidetask.engine.wind import heading_for_course, wind_components

angles = st.floats(0.0, 360.0)


def _vector(direction_deg, speed):
    """(east, north) components of a velocity pointing toward ``direction_deg``."""
    rad = math.radians(direction_deg)
    return np.array([speed * math.sin(rad), speed * math.cos(rad)])


def test_components_of_simple_winds():
    # Source: definitions (contract section 1): wind FROM a direction; tailwind positive.
    assert wind_components(90.0, 90.0, 10.0) == pytest.approx((-10.0, 0.0), abs=1e-12)  # on the nose
    assert wind_components(90.0, 270.0, 10.0) == pytest.approx((10.0, 0.0), abs=1e-12)  # from behind
    assert wind_components(0.0, 270.0, 10.0) == pytest.approx((0.0, 10.0), abs=1e-12)  # from the left
    assert wind_components(0.0, 90.0, 10.0) == pytest.approx((0.0, -10.0), abs=1e-12)  # from the right


def test_worked_wind_triangle():
    # Source: the wind triangle of air navigation (e.g. FAA Pilot's Handbook of Aeronautical
    # Knowledge, navigation chapter; from memory): TAS 100, course 360, wind 270/20 ->
    # correction asin(20/100) = 11.54 deg into the wind, heading 348.46, ground speed
    # sqrt(100^2 - 20^2) = 97.98.
    heading, ground = heading_for_course(360.0, 100.0, 270.0, 20.0)
    assert heading == pytest.approx(348.46, abs=0.005)
    assert ground == pytest.approx(97.98, abs=0.005)


@settings(max_examples=150, deadline=None)
@given(angles, st.floats(15.0, 80.0), angles, st.floats(0.0, 14.9))
def test_heading_and_ground_speed_close_the_vector_triangle(course, airspeed, wind_from, wind_speed):
    # Source: vector addition (ground velocity = air velocity + wind velocity), computed
    # independently here: the result must point along the course with the stated speed.
    heading, ground = heading_for_course(course, airspeed, wind_from, wind_speed)
    ground_vector = _vector(heading, airspeed) + _vector(wind_from + 180.0, wind_speed)
    assert ground_vector == pytest.approx(_vector(course, ground), abs=1e-9)
    along, across = wind_components(course, wind_from, wind_speed)
    assert along**2 + across**2 == pytest.approx(wind_speed**2, rel=1e-9, abs=1e-12)


def test_course_cannot_be_held_when_the_crosswind_beats_the_airspeed():
    heading, ground = heading_for_course(0.0, 10.0, 270.0, 12.0)
    assert math.isnan(heading) and math.isnan(ground)
    heading, ground = heading_for_course(np.array([0.0, 270.0]), 10.0, 270.0, 12.0)
    assert math.isnan(heading[0]) and heading[1] == pytest.approx(270.0)
    assert ground[1] == pytest.approx(-2.0)  # straight into the wind: going backwards
