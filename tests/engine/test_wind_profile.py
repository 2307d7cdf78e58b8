"""The day's wind with height: vector interpolation, held ends, the mean over a climb."""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import given, strategies as st

from glidetask.engine.scenario import Day, Profile, Wind, WindLevel, WindProfile

KMH = 1.0 / 3.6
PROFILE = WindProfile((WindLevel(500.0, 250.0, 10.0 * KMH), WindLevel(2500.0, 270.0, 30.0 * KMH)))


def _vector(wind: Wind):
    angle = math.radians(wind.from_deg)
    return wind.speed_ms * math.sin(angle), wind.speed_ms * math.cos(angle)


def test_levels_exactly_and_held_beyond_the_ends():
    # Source: linear interpolation with held ends, as the contract says for every profile (contract 2.3).
    for height, level in ((500.0, PROFILE.levels[0]), (2500.0, PROFILE.levels[1]), (-100.0, PROFILE.levels[0]),
                          (9000.0, PROFILE.levels[1])):
        wind = PROFILE.at(height)
        assert wind.from_deg == pytest.approx(level.from_deg) and wind.speed_ms == pytest.approx(level.speed_ms)


def test_halfway_is_the_vector_mean():
    # Source: the mean of two vectors by their east and north components (vector algebra);
    # 250 deg at 10 and 270 deg at 30 km/h, worked by hand in components.
    e = (10.0 * math.sin(math.radians(250.0)) + 30.0 * math.sin(math.radians(270.0))) / 2.0
    n = (10.0 * math.cos(math.radians(250.0)) + 30.0 * math.cos(math.radians(270.0))) / 2.0
    wind = PROFILE.at(1500.0)
    assert wind.speed_ms / KMH == pytest.approx(math.hypot(e, n), rel=1e-12)
    assert wind.from_deg == pytest.approx(math.degrees(math.atan2(e, n)) % 360.0, abs=1e-9)


def test_opposite_winds_cancel_halfway():
    # Source: vector interpolation (a reversal through calm, not a turn at full speed).
    reversal = WindProfile((WindLevel(0.0, 90.0, 5.0), WindLevel(1000.0, 270.0, 5.0)))
    assert reversal.at(500.0).speed_ms == pytest.approx(0.0, abs=1e-12)


def test_mean_between_against_numerical_quadrature():
    # Source: the mean of a function over an interval is its integral over the length
    # (checked by the composite trapezoid rule on a fine grid, numpy).
    profile = WindProfile((WindLevel(400.0, 200.0, 3.0), WindLevel(1200.0, 260.0, 8.0), WindLevel(2000.0, 300.0, 12.0)))
    for low, high in ((300.0, 2600.0), (800.0, 1500.0), (1300.0, 1900.0), (100.0, 350.0)):
        z = np.linspace(low, high, 200_001)
        east, north = profile.vector_at(z)
        expected = np.trapezoid(east, z) / (high - low), np.trapezoid(north, z) / (high - low)
        mean = _vector(profile.mean_between(low, high))
        assert mean == pytest.approx(expected, rel=1e-8, abs=1e-9)
        assert _vector(profile.mean_between(high, low)) == pytest.approx(mean)  # either order


def test_mean_over_no_height_is_the_wind_there():
    wind = PROFILE.mean_between(1200.0, 1200.0)
    assert _vector(wind) == pytest.approx(_vector(PROFILE.at(1200.0)))


@given(st.floats(-1000.0, 6000.0), st.floats(0.0, 360.0), st.floats(0.0, 50.0))
def test_one_level_is_a_steady_wind(height, from_deg, speed):
    # Invariant: a one-level profile is the same wind at every height.
    wind = WindProfile((WindLevel(1000.0, from_deg, speed),)).at(height)
    assert wind.speed_ms == pytest.approx(speed, abs=1e-9)
    if speed > 1e-6:
        assert math.cos(math.radians(wind.from_deg - from_deg)) == pytest.approx(1.0, abs=1e-9)


def test_day_wind_at_works_for_either_form():
    common = dict(start_time_s=0.0, band_top_m=2000.0, band_bottom_m=800.0, lift_ends_s=10.0, climb=Profile.constant(1.0))
    steady = Wind(270.0, 5.0)
    assert Day(wind=steady, **common).wind_at(1234.0) is steady
    assert Day(wind=PROFILE, **common).wind_at(2500.0).speed_ms == pytest.approx(30.0 * KMH)


def test_profile_needs_increasing_heights():
    with pytest.raises(ValueError):
        WindProfile((WindLevel(1000.0, 0.0, 1.0), WindLevel(1000.0, 0.0, 2.0)))
    with pytest.raises(ValueError):
        WindProfile(())
