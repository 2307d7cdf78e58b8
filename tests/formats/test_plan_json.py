"""The plan as contract JSON (glidetask.formats.plan_json): every 5.3 key, its meaning and unit."""

from __future__ import annotations

import json
import math
from pathlib import Path

import pytest
from geographiclib.geodesic import Geodesic

from glidetask import cautions
from glidetask.engine.plan import plan
from glidetask.engine.scenario import Wind
from glidetask.formats.plan_json import plan_to_dict
from glidetask.formats.task_file import load_scenario

ROOT = Path(__file__).resolve().parents[2]
TRIANGLE = ROOT / "demo_tasks" / "vardmoor-triangle-300.toml"
AREA = ROOT / "demo_tasks" / "vardmoor-area-3h.toml"

# shared/CONTRACT.md 5.3
TOP_KEYS = {"task", "glider", "legs", "total_time_s", "task_speed_kmh", "finished", "finish_time", "landout_km",
            "final_glide", "cautions"}
TASK_KEYS = {"name", "kind", "nominal_distance_km", "optimized_distance_km"}
AREA_KEYS = {"min_distance_km", "max_distance_km", "target_distance_km", "min_time_s"}
GLIDER_KEYS = {"mass_kg", "wing_loading_kgm2", "best_ld", "best_ld_speed_kmh"}
LEG_KEYS = {"from", "to", "distance_km", "course_deg", "climb_ms", "mc_ms", "airspeed_kmh", "heading_deg",
            "glide_ground_speed_kmh", "cruise_speed_kmh", "time_s", "required_height_m", "arrival_height_m"}
FINAL_KEYS = {"from_km", "start_height_m", "mc_ms"}


@pytest.fixture(scope="module")
def triangle():
    p = plan(load_scenario(TRIANGLE))
    return p, json.loads(json.dumps(plan_to_dict(p), allow_nan=False))


def test_every_contract_key_is_present(triangle):
    _, data = triangle
    assert TOP_KEYS <= set(data)
    assert TASK_KEYS <= set(data["task"])
    assert GLIDER_KEYS <= set(data["glider"])
    assert FINAL_KEYS == set(data["final_glide"])
    assert all(LEG_KEYS <= set(leg) for leg in data["legs"])


def test_legs_are_the_planned_path_on_wgs84(triangle):
    # Source: geographiclib (C. F. F. Karney), an independent WGS84 geodesic library;
    # distance_km along the planned path and course_deg the azimuth at each leg's start.
    p, data = triangle
    for i, leg in enumerate(data["legs"]):
        g = Geodesic.WGS84.Inverse(p.path.lats[i], p.path.lons[i], p.path.lats[i + 1], p.path.lons[i + 1])
        # Tolerance: the JSON rounds km to 3 decimals and degrees to 1.
        assert leg["distance_km"] == pytest.approx(g["s12"] / 1000.0, abs=6e-4)
        assert leg["course_deg"] == pytest.approx(g["azi1"] % 360.0, abs=0.06)
    total = sum(leg["distance_km"] for leg in data["legs"])
    assert total == pytest.approx(data["task"]["optimized_distance_km"], abs=0.002)


def test_times_speeds_and_heights_agree_in_their_units(triangle):
    p, data = triangle
    # Seconds: the legs' times add up to the total; the finish clock is start + total.
    assert sum(leg["time_s"] for leg in data["legs"]) == pytest.approx(data["total_time_s"], abs=2.0)
    start_h, start_m = map(int, data["start_time"].split(":"))
    finish = start_h * 60 + start_m + data["total_time_s"] / 60.0
    assert data["finish_time"] == f"{int(round(finish)) // 60:02d}:{int(round(finish)) % 60:02d}"
    # km/h: racing task speed = optimized distance over the time (contract 5.3).
    assert data["task_speed_kmh"] == pytest.approx(
        data["task"]["optimized_distance_km"] / (data["total_time_s"] / 3600.0), rel=2e-4)
    # m: arrival at the finish = finish elevation + margin (contract section 3).
    finish_elevation = p.scenario.task.points[-1].turnpoint.elevation_m
    assert data["legs"][-1]["arrival_height_m"] == pytest.approx(finish_elevation + 200.0, abs=0.5)
    # km/h vs m/s: the JSON speeds are the plan's SI speeds times 3.6.
    for leg, source in zip(data["legs"], p.legs):
        assert leg["cruise_speed_kmh"] == pytest.approx(source.cruise_speed_ms * 3.6, abs=0.05)
        assert leg["airspeed_kmh"] == pytest.approx(source.airspeed_ms * 3.6, abs=0.05)
        assert leg["glide_ground_speed_kmh"] == pytest.approx(source.glide_ground_speed_ms * 3.6, abs=0.05)
    assert data["glider"]["best_ld_speed_kmh"] == pytest.approx(p.best_ld_speed_ms * 3.6, abs=0.05)
    assert data["final_glide"]["from_km"] == pytest.approx(p.final_glide_from_m / 1000.0, abs=6e-4)
    assert data["finished"] is True and data["landout_km"] is None


def test_cautions_lead_with_the_general_ones(triangle):
    _, data = triangle
    assert data["cautions"][:len(cautions.GENERAL)] == list(cautions.GENERAL)


def test_a_plan_that_ends_short_has_nulls_where_numbers_are_undefined():
    p = plan(load_scenario(TRIANGLE), wind=Wind(250.0, 200 / 3.6))
    data = json.loads(json.dumps(plan_to_dict(p), allow_nan=False))  # no NaN anywhere
    assert data["finished"] is False
    assert data["finish_time"] is None and data["task_speed_kmh"] is None
    assert data["landout_km"] == pytest.approx(p.landout_m / 1000.0, abs=6e-4)
    ends_on = next(i for i, leg in enumerate(data["legs"]) if leg["arrival_height_m"] is None)
    assert data["legs"][ends_on]["time_s"] is not None  # flown until the plan ends short ...
    for leg in data["legs"][ends_on + 1:]:  # ... and the legs after it are not flown at all
        assert leg["time_s"] is None and leg["required_height_m"] is None and leg["cruise_speed_kmh"] is None
    assert any("not completed" in c for c in data["cautions"])


def test_area_task_has_its_distances_and_minimum_time():
    p = plan(load_scenario(AREA))
    data = plan_to_dict(p)
    assert AREA_KEYS <= set(data["task"])
    task = data["task"]
    assert task["min_distance_km"] <= task["target_distance_km"] <= task["max_distance_km"]
    assert task["min_time_s"] == 3 * 3600
    assert task["target_distance_km"] == pytest.approx(sum(leg["distance_km"] for leg in data["legs"]), abs=0.002)
    # Sporting Code marking (from memory): distance over the greater of time and minimum time.
    marking = max(data["total_time_s"], task["min_time_s"]) / 3600.0
    assert data["task_speed_kmh"] == pytest.approx(task["target_distance_km"] / marking, rel=2e-4)
    assert math.isfinite(data["total_time_s"])
