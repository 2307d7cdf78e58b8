"""Final glide: required height, margin, L/D, MacCready to arrive, wind effects."""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from glidetask.engine.finalglide import final_glide, height_used, mc_to_arrive
from glidetask.engine.scenario import Wind
from glidetask.engine.wind import wind_components
from invented_polar import KMH, POLAR, SPEC


distances = st.floats(1000.0, 150000.0)
directions = st.floats(0.0, 360.0)
settings_ = st.floats(0.0, 4.0)


def test_distance_from_height_is_height_times_glide_ratio_in_still_air():
    # Source: "distance = height x L/D" in still air at best-glide speed (common practice).
    used = height_used(POLAR, 40000.0, 0.0, 0.0, 0.0)
    assert used == pytest.approx(40000.0 / POLAR.best_ld, rel=1e-9)
    glide = final_glide(POLAR, 40000.0, 2000.0, arrival_elevation_m=150.0, margin_m=200.0)
    assert glide.required_height_m == pytest.approx(150.0 + 200.0 + 40000.0 / POLAR.best_ld, rel=1e-9)
    assert glide.ld_achievable == pytest.approx(POLAR.best_ld, rel=1e-9)


def test_contract_meanings_of_the_fields():
    # Source: shared/CONTRACT.md 5.2 (definitions).
    wind = Wind(from_deg=250.0, speed_ms=20 * KMH)
    glide = final_glide(POLAR, 52000.0, 1900.0, course_deg=80.0, wind=wind, mc_ms=1.5,
                        arrival_elevation_m=120.0, margin_m=250.0)
    assert glide.margin_m == pytest.approx(1900.0 - glide.required_height_m, abs=1e-9)
    assert glide.required_height_m == pytest.approx(120.0 + 250.0 + glide.height_used_m, abs=1e-9)
    assert glide.ld_required == pytest.approx(52000.0 / (1900.0 - 120.0 - 250.0))
    assert glide.time_s == pytest.approx(52000.0 / glide.ground_speed_ms)
    assert glide.ld_achievable == pytest.approx(52000.0 / glide.height_used_m, rel=1e-9)
    along, _ = wind_components(80.0, 250.0, 20 * KMH)
    assert along > 0.0 and glide.ground_speed_ms > glide.speed_to_fly_ms  # mostly a tailwind
    # Heading: the wind triangle closes on the course (vector addition, worked here).
    heading, v = math.radians(glide.heading_deg), glide.speed_to_fly_ms
    to = math.radians(250.0 + 180.0)
    east = v * math.sin(heading) + wind.speed_ms * math.sin(to)
    north = v * math.cos(heading) + wind.speed_ms * math.cos(to)
    assert math.degrees(math.atan2(east, north)) % 360.0 == pytest.approx(80.0, abs=1e-9)
    assert math.hypot(east, north) == pytest.approx(glide.ground_speed_ms, rel=1e-12)


def test_required_height_at_mc_to_arrive_equals_the_present_height():
    # Source: shared/CONTRACT.md 5.2: mc_to_arrive is the setting whose required height equals
    # height_m (tolerance 1 m as the contract's tests ask).
    wind = Wind(from_deg=300.0, speed_ms=6.0)
    for height in (1600.0, 2000.0, 2600.0):
        glide = final_glide(POLAR, 50000.0, height, course_deg=30.0, wind=wind, arrival_elevation_m=100.0)
        assert 0.0 < glide.mc_to_arrive_ms < 10.0
        again = final_glide(POLAR, 50000.0, height, course_deg=30.0, wind=wind, arrival_elevation_m=100.0,
                            mc_ms=glide.mc_to_arrive_ms)
        assert again.required_height_m == pytest.approx(height, abs=1.0)


def test_mc_to_arrive_is_null_below_glide_and_capped_far_above():
    low = final_glide(POLAR, 60000.0, 900.0)
    assert math.isnan(low.mc_to_arrive_ms) and low.margin_m < 0.0
    assert math.isnan(final_glide(POLAR, 10000.0, 150.0).ld_required)  # below the margin
    high = final_glide(POLAR, 5000.0, 3000.0)
    assert high.mc_to_arrive_ms == 10.0


def test_arrays_of_cases_match_one_by_one():
    distances_m = np.array([10e3, 35e3, 80e3])
    heights = np.array([[900.0], [1800.0]])
    together = final_glide(POLAR, distances_m, heights, course_deg=120.0, wind=Wind(200.0, 7.0), mc_ms=1.0)
    assert together.mc_to_arrive_ms.shape == (2, 3)
    for i in range(2):
        for j in range(3):
            alone = final_glide(POLAR, distances_m[j], heights[i, 0], course_deg=120.0, wind=Wind(200.0, 7.0),
                                mc_ms=1.0)
            assert together.required_height_m[i, j] == pytest.approx(alone.required_height_m, rel=1e-12)
            assert np.isclose(together.mc_to_arrive_ms[i, j], alone.mc_to_arrive_ms, equal_nan=True)


def test_negative_distance_is_refused():
    with pytest.raises(ValueError):
        final_glide(POLAR, -1.0, 1000.0)


def test_goal_out_of_reach_is_nan():
    storm = Wind(from_deg=0.0, speed_ms=POLAR.vne_ms + 5.0)
    glide = final_glide(POLAR, 20000.0, 2000.0, course_deg=0.0, wind=storm)
    assert math.isnan(glide.required_height_m) and math.isnan(glide.mc_to_arrive_ms)


@settings(max_examples=100, deadline=None)
@given(distances, directions, settings_, st.floats(0.5, 15.0))
def test_a_tailwind_never_raises_the_height_needed(distance, course, mc, tailwind):
    # Source: final-glide practice (common practice): a tailwind component shortens the glide.
    calm = final_glide(POLAR, distance, 2000.0, course_deg=course, mc_ms=mc)
    behind = final_glide(POLAR, distance, 2000.0, course_deg=course, mc_ms=mc,
                         wind=Wind(from_deg=(course + 180.0) % 360.0, speed_ms=tailwind))
    assert behind.required_height_m <= calm.required_height_m + 1e-9


@settings(max_examples=100, deadline=None)
@given(distances, directions, settings_, st.floats(0.5, 15.0), st.booleans())
def test_a_crosswind_never_lowers_the_height_needed(distance, course, mc, crosswind, from_left):
    # Source: wind triangle (common practice): correcting for drift costs along-course speed.
    calm = final_glide(POLAR, distance, 2000.0, course_deg=course, mc_ms=mc)
    side = (course + (270.0 if from_left else 90.0)) % 360.0
    across = final_glide(POLAR, distance, 2000.0, course_deg=course, mc_ms=mc,
                         wind=Wind(from_deg=side, speed_ms=crosswind))
    assert across.required_height_m >= calm.required_height_m - 1e-9


@settings(max_examples=100, deadline=None)
@given(distances, settings_, settings_)
def test_a_higher_setting_needs_more_height(distance, m1, m2):
    # Source: MacCready theory: flying faster costs height per kilometre.
    low, high = sorted((m1, m2))
    assert height_used(POLAR, distance, -3.0, 2.0, low) <= height_used(POLAR, distance, -3.0, 2.0, high) + 1e-9


def test_mc_to_arrive_standalone_matches_final_glide():
    glide = final_glide(POLAR, 30000.0, 1500.0, arrival_elevation_m=200.0, margin_m=150.0)
    alone = mc_to_arrive(POLAR, 30000.0, 1500.0 - 200.0 - 150.0, 0.0, 0.0)
    assert alone == pytest.approx(glide.mc_to_arrive_ms, rel=1e-12)


def test_the_final_glide_takes_the_density_halfway_between_start_and_arrival():
    # Source: shared/CONTRACT.md section 3: a final glide uses the density at the middle of
    # its start height and its arrival height; the ISA model's range (-1 km to 19 km here)
    # bounds it. One function for the plan, the glide command and the UI.
    from glidetask.engine.finalglide import density_height_m

    assert density_height_m(2000.0, 400.0) == 1200.0
    np.testing.assert_array_equal(density_height_m(np.array([2000.0, 50000.0, -9000.0]), 400.0),
                                  [1200.0, 19000.0, -1000.0])
