"""The wind by height (engine.scenario.WindProfile): interpolation and the layer mean."""

import math

import pytest

from glidetask.engine.scenario import Day, Profile, Wind, WindLevel, WindProfile


def _profile():
    return WindProfile((WindLevel(300.0, 270.0, 4.0), WindLevel(1300.0, 270.0, 8.0), WindLevel(2300.0, 0.0, 8.0)))


def test_at_interpolates_the_vector_and_holds_the_ends():
    # Source: hand calculation; a west wind of 4 m/s at 300 m and 8 m/s at 1300 m is 6 m/s
    # halfway (same direction: the vector mean is the speed mean).
    profile = _profile()
    assert profile.at(800.0).from_deg == pytest.approx(270.0)
    assert profile.at(800.0).speed_ms == pytest.approx(6.0)
    assert profile.at(0.0) == Wind(270.0, 4.0)
    above = profile.at(9000.0)
    assert math.cos(math.radians(above.from_deg)) == pytest.approx(1.0)  # from the north
    assert above.speed_ms == pytest.approx(8.0)


def test_at_through_a_veer_is_the_vector_mean():
    # Source: hand calculation; halfway between 8 m/s from 270 and 8 m/s from 360 the vector
    # mean is (4, 4) m/s blowing toward 135: from 315 at 8 / sqrt(2) m/s.
    wind = _profile().at(1800.0)
    assert wind.from_deg == pytest.approx(315.0)
    assert wind.speed_ms == pytest.approx(8.0 / math.sqrt(2.0))


def test_mean_between_is_the_height_weighted_vector_mean():
    # Source: hand calculation. From 300 to 1300 m the speed rises linearly from 4 to 8 m/s
    # in one direction: the mean is 6 m/s. The air's motion (east, north): the lower half
    # averages (6, 0), the upper half (from 270 at 8 to from 360 at 8) averages (4, -4), so
    # the whole layer (5, -2): the wind blows from the direction of (-5, 2).
    profile = _profile()
    assert profile.mean_between(300.0, 1300.0).speed_ms == pytest.approx(6.0)
    whole = profile.mean_between(300.0, 2300.0)
    assert whole.speed_ms == pytest.approx(math.hypot(5.0, 2.0))
    assert whole.from_deg == pytest.approx(math.degrees(math.atan2(-5.0, 2.0)) % 360.0)
    assert profile.mean_between(800.0, 800.0) == profile.at(800.0)


def test_levels_must_rise():
    with pytest.raises(ValueError):
        WindProfile((WindLevel(500.0, 0.0, 1.0), WindLevel(500.0, 0.0, 1.0)))


def test_day_wind_at_takes_a_wind_or_a_profile():
    base = dict(start_time_s=36000.0, band_top_m=1500.0, band_bottom_m=800.0, lift_ends_s=64800.0,
                thermal_strength=Profile.constant(2.0))
    assert Day(wind=Wind(90.0, 3.0), **base).wind_at(1000.0) == Wind(90.0, 3.0)
    assert Day(wind=_profile(), **base).wind_at(800.0).speed_ms == pytest.approx(6.0)
