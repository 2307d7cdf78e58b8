"""The plan under the task's airspace: the band top capped, conflicts named by leg and stretch.

The demo data is invented (the Vardmoor region and its airspace). The crossings the plan
reports are compared with the airspace engine's own path crossings of the same path, and
the heights with the volume's floor minus the margin from the airspace file.
"""

from __future__ import annotations

import dataclasses
from pathlib import Path

import numpy as np
import pytest

from glidetask.engine.airspace_crossings import path_stretches
from glidetask.engine.plan import plan
from glidetask.formats.task_file import load_scenario

DEMO = Path(__file__).resolve().parents[2] / "demo_tasks"


@pytest.fixture(scope="module")
def triangle():
    return plan(load_scenario(DEMO / "vardmoor-triangle-300.toml"))


def test_the_band_is_capped_under_the_area_step_and_the_profile_stays_under_it(triangle):
    # Source: the invented airspace file: Brennick Area Step 1, floor 1500 m MSL; margin
    # 100 m (common practice): the flight may use at most 1400 m under it.
    check = triangle.airspace
    assert check.ok
    [cap] = check.caps
    assert (cap.name, cap.top_m) == ("Brennick Area Step 1", 1400.0)
    legs = triangle.path.cumulative_m
    assert legs[1] <= cap.from_m < cap.to_m <= legs[2]  # on leg 2
    p = triangle.profile
    under = (p.distance_m >= cap.from_m) & (p.distance_m <= cap.to_m)
    assert under.sum() > 50
    assert np.all(p.height_m[under] <= 1500.0 - 100.0 + 1e-6)
    # Without the airspace the same flight climbs above it there.
    free = plan(dataclasses.replace(triangle.scenario, airspace=None))
    free_under = (free.profile.distance_m >= cap.from_m) & (free.profile.distance_m <= cap.to_m)
    assert free.profile.height_m[free_under].max() > 1400.0 + 100.0


def test_a_task_through_a_zone_from_the_ground_has_one_conflict_on_the_right_leg_and_stretch():
    planned = plan(load_scenario(DEMO / "vardmoor-careless-setter.toml"))
    zone = [c for c in planned.airspace.conflicts if c.name == "Brennick Zone"]
    assert len(zone) == 1
    [conflict] = zone
    legs = planned.path.cumulative_m
    assert conflict.leg == 2 and legs[1] <= conflict.from_m < conflict.to_m <= legs[2]
    # The stretch is where the path is inside the zone's outline (the engine's crossing of the
    # same path, itself tested against shapely), within 50 m.
    lats, lons, along = planned.path.sample(250.0)
    airspace = planned.scenario.airspace
    [inside] = [s for s in path_stretches(airspace, lats, lons, along)
                if airspace.volumes[s.volume].name == "Brennick Zone"]
    assert conflict.from_m == pytest.approx(inside.from_m, abs=50.0)
    assert conflict.to_m == pytest.approx(inside.to_m, abs=50.0)
    assert planned.finished and np.isfinite(planned.total_time_s)  # the plan still computes its times
    words = [c for c in planned.cautions if "Brennick Zone" in c]
    assert words and "Leg 2" in words[0] and "clearance or another route" in words[0]


@pytest.mark.parametrize("lift_hours", [1.0, 1.5, 2.0, 2.5])
def test_a_land_out_over_the_ground_ends_in_a_field_in_reach_or_says_none_is(triangle, lift_hours):
    scenario = triangle.scenario
    day = dataclasses.replace(scenario.day, lift_ends_s=scenario.day.start_time_s + lift_hours * 3600.0)
    short = plan(dataclasses.replace(scenario, day=day))
    assert not short.finished
    landout = short.landout
    assert landout.at_m == pytest.approx(short.landout_m)
    p = short.profile
    known = np.isfinite(p.terrain_m)
    # No glide closer to the terrain than the clearance, down to the landing (contract section 3).
    assert np.all(p.height_m[known] - p.terrain_m[known] >= scenario.safety.terrain_clearance_m - 1e-6)
    text = " ".join(short.cautions)
    if landout.field is not None:
        field = next(t for t in scenario.turnpoints if t.name == landout.field)
        assert field.landable and (landout.lat, landout.lon) == (field.lat, field.lon)
        assert f"lands in {landout.field}" in text
        # In reach from where the climbs stopped: a glide at best L/D in still air from there,
        # with the arrival margin, is a generous upper bound (Source: reach = height x L/D,
        # the pilot's rule of thumb, common practice).
        from glidetask.engine.geodesy import inverse
        from glidetask.engine.plan_ground import point_at
        stop_m, stop_h, _ = [v for v in short.flown.trace if v[2] == "stop"][-1]
        lat, lon = point_at(short.path, stop_m)
        distance = inverse(lat, lon, field.lat, field.lon)[0]
        polar = scenario.glider.polar_at(0.5 * (stop_h + field.elevation_m), day.isa_deviation_c)
        wind = day.wind.speed_ms
        bound = (stop_h - field.elevation_m - scenario.safety.arrival_margin_m) * float(polar.best_ld) * (
            1.0 + wind / float(polar.best_ld_speed_ms))
        assert distance <= bound
    else:
        assert "no landable field is in reach" in text


def test_the_odds_of_one_forecast_day_land_out_where_the_plan_does(triangle):
    # The odds fly the plan's own route and hook (terrain and airspace) with the same core:
    # with no spread every simulated day is the forecast, so every one lands out where the plan does.
    from glidetask.engine.compare import planned_route, stack_flights
    from glidetask.engine.flight import course_for, flights_for, fly
    from glidetask.engine.day_spread import DaySpread
    from glidetask.engine.simulate import simulate_days

    scenario = triangle.scenario
    day = dataclasses.replace(scenario.day, lift_ends_s=scenario.day.start_time_s + 2.0 * 3600.0)
    short = dataclasses.replace(scenario, day=day)
    planned = plan(short)
    assert not planned.finished
    path, requirement = planned_route(short)
    flown = fly(course_for(path, short.day.detour_percent), stack_flights([flights_for(short)] * 4),
                requirement=requirement, detail=False)
    np.testing.assert_allclose(flown.landout_m, planned.landout_m, rtol=0.0, atol=1e-6)
    odds = simulate_days(short, runs=40, spread=DaySpread.none(),
                         ballasts_kg=[short.glider.ballast_kg])
    leg = int(np.searchsorted(planned.path.cumulative_m, planned.landout_m, side="right")) - 1
    [choice] = [c for c in odds.choices if c.ballast_kg == short.glider.ballast_kg]
    assert choice.finished == 0 and choice.landouts_by_leg[leg] == choice.runs


def test_under_airspace_a_flight_flies_the_same_alone_and_in_a_batch(triangle):
    # The core's promise (same inputs, same numbers in any batch) holds with a capped band.
    from glidetask.engine.compare import stack_flights
    from glidetask.engine.flight import course_for, flights_for, fly
    from glidetask.engine.scenario import Wind

    scenario = triangle.scenario
    setups = []
    for ballast, wind in ((0.0, Wind(200.0, 3.0)), (100.0, Wind(250.0, 6.0)), (170.0, Wind(320.0, 9.0))):
        glider = dataclasses.replace(scenario.glider, ballast_kg=ballast)
        day = dataclasses.replace(scenario.day, wind=wind)
        setups.append(flights_for(dataclasses.replace(scenario, glider=glider, day=day)))
    course, hook = course_for(triangle.path), triangle.requirement
    batch = fly(course, stack_flights(setups), requirement=hook, detail=False)
    for i, setup in enumerate(setups):
        alone = fly(course, setup, requirement=hook, detail=False)
        assert batch.total_time_s[i] == alone.total_time_s[0]
        assert batch.climbs[i] == alone.climbs[0]
