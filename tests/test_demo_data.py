"""The invented Vardmoor demo: turnpoints, tasks and terrain agree, and the tasks are sound.

The checks here are facts of the trade and of the brief for the demo: enough landables of
each kind, landables kept off the ridge and the heights (so coverage has gaps to show),
plausible soaring days, and task distances confirmed by an independent brute force.
"""

from __future__ import annotations

import importlib.util
from pathlib import Path

import numpy as np
import pytest

from glidetask import paths
from glidetask.engine import geodesy
from glidetask.engine.task import area_distance_range, optimized_path
from glidetask.formats.task_file import load_scenario
from glidetask.formats.turnpoints import read_turnpoints
from glidetask.units import KMH

ROOT = Path(__file__).resolve().parent.parent
DEMO = ROOT / "demo_tasks"
TASKS = sorted(DEMO.glob("*.toml"))
MATCH_M = 0.5  # engine vs brute force (see tests/engine/test_task.py)


def _module(path: Path, name: str):
    spec = importlib.util.spec_from_file_location(name, path)
    module = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(module)
    return module


TERRAIN = _module(DEMO / "make_terrain.py", "vardmoor_terrain_for_tests")
BRUTE = _module(ROOT / "tests" / "engine" / "_brute_force.py", "brute_force_for_tests")


@pytest.fixture(scope="module")
def points():
    return read_turnpoints(DEMO / "vardmoor.geojson")


# ---------------------------------------------------------------- turnpoints


def test_both_turnpoint_files_hold_the_same_invented_points(points):
    assert read_turnpoints(DEMO / "vardmoor.csv") == points
    for name in ("vardmoor.geojson", "vardmoor.csv"):
        assert "Invented demo data" in (DEMO / name).read_text()
    generated = _module(DEMO / "make_turnpoints.py", "vardmoor_points_for_tests").turnpoints()
    assert tuple(generated) == points  # the files are what the generator makes


def test_enough_points_of_every_kind(points):
    kinds = [p.kind for p in points if p.landable]
    assert len(points) >= 45
    assert kinds.count("airfield") >= 7 and kinds.count("field") >= 12
    assert sum(p.kind == "waypoint" for p in points) >= 20
    assert any(p.runway_heading_deg is not None and p.runway_length_m for p in points if p.kind == "field")
    home = next(p for p in points if p.code == "VAR")
    assert home.name == "Vardmoor Aerodrome" and home.landable and home.kind == "airfield"
    assert (home.lat, home.lon) == pytest.approx((46.05, -33.30), abs=0.01)


def test_points_lie_in_the_region_at_the_terrain_elevation(points):
    lats = np.array([p.lat for p in points])
    lons = np.array([p.lon for p in points])
    assert np.all((lats > TERRAIN.SOUTH) & (lats < TERRAIN.NORTH) & (lons > TERRAIN.WEST) & (lons < TERRAIN.EAST))
    elevations = np.array([p.elevation_m for p in points])
    assert np.all(np.abs(elevations - TERRAIN.elevation(lats, lons)) <= 0.5 + 1e-6)  # rounded to 1 m


def test_no_landables_on_the_ridge_or_the_heights(points):
    line, _, half_width = TERRAIN.RIDGE
    tolland = TERRAIN.HILLS[0]
    for p in points:
        if not p.landable:
            continue
        ridge_km = float(TERRAIN._distance_to_polyline_km(p.lat, p.lon, line))
        assert ridge_km > 3 * half_width, p.name
        heights_km = geodesy.distance(p.lat, p.lon, tolland[0], tolland[1]) / 1000.0
        assert heights_km > 2 * tolland[3], p.name
    # the mast and the summits are there, as waypoints
    crest = [p for p in points if not p.landable and TERRAIN._distance_to_polyline_km(p.lat, p.lon, line) < 1.0]
    assert any("Mast" in p.name for p in crest) and any("Top" in p.name for p in crest)


# ---------------------------------------------------------------- tasks


def test_the_default_demo_task_is_here():
    assert paths.demo_task() == DEMO / "vardmoor-triangle-300.toml"
    assert {p.name for p in TASKS} >= {"vardmoor-triangle-300.toml", "vardmoor-out-and-return.toml",
                                       "vardmoor-area-3h.toml", "vardmoor-ridge-final-glide.toml"}


@pytest.mark.parametrize("path", TASKS, ids=lambda p: p.name)
def test_each_task_is_invented_and_plausible(path):
    assert "Invented demo data" in path.read_text()
    scenario = load_scenario(path)
    assert Path(scenario.glider.polar_file).parent == (ROOT / "polars").resolve()
    assert scenario.terrain_file == str((DEMO / "terrain.tif").resolve())
    day = scenario.day
    # Source (common practice): a good soaring day in a temperate upland.
    assert 11.5 * 3600 <= day.start_time_s <= 13 * 3600
    assert 1600.0 <= day.band_top_m <= 2200.0 and 700.0 <= day.band_bottom_m <= 1000.0
    assert 10.0 <= day.wind.speed_ms / KMH <= 25.0
    assert 17.5 * 3600 <= day.lift_ends_s <= 18.5 * 3600
    if day.climb is not None:
        assert 1.2 <= max(day.climb.values) <= 2.5
    # the working band clears the ground under the route except over the Skarren Ridge
    lats, lons, _ = optimized_path(scenario.task).sample(500.0)
    off_ridge = TERRAIN._distance_to_polyline_km(lats, lons, TERRAIN.RIDGE[0]) > 12.0
    assert np.max(TERRAIN.elevation(lats, lons)[off_ridge]) < day.band_bottom_m - 150.0


def test_the_four_tasks_have_their_shapes():
    triangle = load_scenario(DEMO / "vardmoor-triangle-300.toml").task
    assert triangle.kind == "racing" and len(triangle.points) == 4
    assert {p.zone.kind for p in triangle.points} >= {"line", "sector", "keyhole", "cylinder"}
    assert 280_000 <= optimized_path(triangle).total_m <= 320_000
    out_and_return = load_scenario(DEMO / "vardmoor-out-and-return.toml").task
    assert out_and_return.points[0].turnpoint == out_and_return.points[-1].turnpoint
    assert 200_000 <= optimized_path(out_and_return).total_m <= 250_000
    area = load_scenario(DEMO / "vardmoor-area-3h.toml")
    assert area.task.kind == "area" and area.task.min_time_s == 180 * 60.0
    kinds = [p.zone.kind for p in area.task.points[1:-1]]
    assert kinds.count("area_sector") == 1 and kinds.count("area_cylinder") >= 2
    assert area.day.thermal_strength is not None and area.day.climb is None


def test_the_ridge_task_ends_with_a_final_glide_over_the_ridge():
    task = load_scenario(DEMO / "vardmoor-ridge-final-glide.toml").task
    path = optimized_path(task)
    last_turn = task.points[-2].turnpoint
    crest_lat = 46.38 + (46.46 - 46.38) * (last_turn.lon + 33.55) / 1.2  # on the crest polyline's east part
    assert last_turn.lat > crest_lat + 0.3  # well north of the ridge
    assert task.points[-1].turnpoint.code == "VAR"
    lats, lons, _ = geodesy.geodesic_points(path.lats[-2], path.lons[-2], path.lats[-1], path.lons[-1], 200.0)
    assert np.max(TERRAIN.elevation(lats, lons)) > 1100.0  # the ridge crest is under the final glide


@pytest.mark.parametrize("path", TASKS, ids=lambda p: p.name)
def test_optimized_distance_matches_brute_force(path):
    task = load_scenario(path).task
    assert optimized_path(task).total_m == pytest.approx(BRUTE.brute_force(task)[0], abs=MATCH_M)
    if task.kind == "area":
        low, high = area_distance_range(task)
        assert high == pytest.approx(BRUTE.brute_force(task, maximize=True)[0], abs=MATCH_M)
