"""Safety over the ground in the plan: the terrain-raised final glide and landable coverage.

The elevation models are GeoTIFFs written to tmp_path by the tests from piecewise-linear
surfaces whose kinks sit on cell centres, so bilinear sampling reproduces them exactly;
every expected value is worked by hand from the contract's formulas (shared/CONTRACT.md
section 3), ISO 2533 and an independent geodesic library (geographiclib).
"""

from __future__ import annotations

import dataclasses
import json
import math

import numpy as np
import pytest
import rasterio
from affine import Affine
from geographiclib.geodesic import Geodesic

from glidetask import cautions
from glidetask.engine import geodesy
from glidetask.engine.plan import final_glide_card, plan
from glidetask.engine.polar import PolarSpec
from glidetask.engine.scenario import Day, GliderSetup, Profile, Safety, Scenario, Wind
from glidetask.engine.task import Task, TaskPoint, Turnpoint
from glidetask.engine.zones import Zone
from glidetask.errors import InputError
from glidetask.formats.plan_json import plan_to_dict

KMH = 1000.0 / 3600.0
HOUR = 3600.0
WGS84 = Geodesic.WGS84
# An invented 15 m class example polar (not any real aircraft); at its reference mass.
SPEC = PolarSpec(label="test example", wing_area_m2=10.5, reference_mass_kg=350.0, empty_mass_kg=260.0,
                 max_ballast_kg=150.0, max_mass_kg=525.0, vne_ias_ms=270 * KMH, min_speed_ias_ms=70 * KMH,
                 points=((80 * KMH, 0.62), (120 * KMH, 0.80), (180 * KMH, 1.85)))
HOME = (46.0, -33.0)
GROUND = 200.0  # every turnpoint's elevation and the flat ground [m]
MARGIN = 200.0
CLEARANCE = 150.0
FINAL_MC = 1.0


def turnpoint(name, lat, lon, landable=False):
    return Turnpoint(name, None, float(lat), float(lon), GROUND, landable=landable)


def north_and_back_task(out_m: float, back_m: float) -> Task:
    """Start at HOME, a turn ``out_m`` due north (500 m cylinder), finish ``back_m`` due
    south of the turn (100 m cylinder): the path runs along one meridian."""
    lat_t, lon_t = geodesy.destination(*HOME, 0.0, out_m)
    lat_f, lon_f = geodesy.destination(lat_t, lon_t, 180.0, back_m)
    points = (TaskPoint(turnpoint("Home", *HOME), Zone.line(1000.0)),
              TaskPoint(turnpoint("North Turn", lat_t, lon_t), Zone.cylinder(500.0)),
              TaskPoint(turnpoint("Finish", lat_f, lon_f), Zone.cylinder(100.0)))
    return Task(name="ridge test", kind="racing", points=points)


def scenario(task: Task, terrain_file=None, turnpoints=(), band_top=2500.0) -> Scenario:
    day = Day(start_time_s=11 * HOUR, band_top_m=band_top, band_bottom_m=800.0, lift_ends_s=19 * HOUR,
              wind=Wind(), climb=Profile.constant(2.0))
    return Scenario(task=task, glider=GliderSetup(SPEC, pilot_kg=90.0), day=day,
                    safety=Safety(arrival_margin_m=MARGIN, terrain_clearance_m=CLEARANCE,
                                  final_glide_mc_ms=FINAL_MC),
                    turnpoints=tuple(turnpoints), terrain_file=terrain_file, source="ridge-test.toml")


def write_latitude_profile(path, lats_deg, heights_m, anchor=None, west=-33.05, east=-32.95, step=0.001):
    """A GeoTIFF (EPSG:4326) whose elevation depends on latitude only: piecewise linear
    through (lats_deg, heights_m), with a row of cell centres at ``anchor`` [deg] (default
    the first latitude) and every whole step from it."""
    anchor = lats_deg[0] if anchor is None else anchor
    north = anchor + step * (math.ceil((max(lats_deg) + 0.05 - anchor) / step) + 0.5)
    south = min(lats_deg) - 0.05
    rows = int(math.ceil((north - south) / step))
    cols = int(round((east - west) / step))
    centres = north - step * (np.arange(rows) + 0.5)
    order = np.argsort(lats_deg)
    column = np.interp(centres, np.asarray(lats_deg)[order], np.asarray(heights_m)[order])
    grid = np.repeat(column[:, None], cols, axis=1).astype(np.float64)
    profile = dict(driver="GTiff", height=rows, width=cols, count=1, dtype="float64", crs="EPSG:4326",
                   transform=Affine(step, 0.0, west, 0.0, -step, north))
    with rasterio.open(path, "w", **profile) as dst:
        dst.write(grid, 1)
    return str(path), centres


def isa_density_ratio(height_m: float) -> float:
    # Source: ISO 2533 (ICAO standard atmosphere) troposphere: T = 288.15 K - 0.0065 K/m h,
    # rho/rho0 = (T/T0)^(g0/(R L) - 1), g0/(R L) = 9.80665/(287.05287 x 0.0065) = 5.25588.
    return (1.0 - 0.0065 * height_m / 288.15) ** 4.25588


def hand_height_per_metre(start_m: float, floor_m: float, mc: float) -> float:
    """Height used per metre of a still-air final glide at MacCready ``mc``, worked by hand.

    Source: contract section 3 (polar scaled by k = 1/sqrt(sigma) for density at the
    middle of the start and arrival heights; speed to fly sqrt((c + m)/a) for a quadratic
    polar in still air, MacCready theory) with the polar's points fitted by numpy.polyfit.
    """
    speeds = np.array([p[0] for p in SPEC.points])
    sinks = np.array([p[1] for p in SPEC.points])
    a, b, c = np.polyfit(speeds, sinks, 2)
    k = 1.0 / math.sqrt(isa_density_ratio(0.5 * (start_m + floor_m)))  # mass = reference mass
    a, c = a / k, c * k
    v = math.sqrt((c + mc) / a)
    assert SPEC.min_speed_ias_ms * k < v < SPEC.vne_ias_ms * k  # no clamping in play
    return (a * v * v + b * v + c) / v


# ---------------------------------------------------------------- the ridge decides


@pytest.fixture(scope="module")
def ridge(tmp_path_factory):
    """A knife-edge ridge (crest 1400 m) across the path exactly at the turn, where the
    final glide turns for home: 60 km out, 30 km back."""
    task = north_and_back_task(60e3, 30e3)
    from glidetask.engine.task_search import optimized_path

    path = optimized_path(task)
    crest_lat = float(path.lats[1])  # the path's turn: a vertex, so a terrain sample
    crest, foot = 1400.0, 0.02  # the slopes reach the ground 0.02 deg (2.2 km) either side
    lats = [HOME[0] - 0.1, crest_lat - foot, crest_lat, crest_lat + foot, crest_lat + 0.1]
    tif, centres = write_latitude_profile(tmp_path_factory.mktemp("ridge") / "ridge.tif", lats,
                                          [GROUND, GROUND, crest, GROUND, GROUND], anchor=crest_lat)
    # The kinks must sit on cell centres for bilinear sampling to reproduce the profile.
    for kink in lats[1:4]:
        assert np.min(np.abs(centres - kink)) < 1e-9
    p = plan(scenario(task, tif))
    return p, crest, path


def test_the_ridge_raises_the_final_glide_by_exactly_what_it_demands(ridge):
    p, crest, path = ridge
    assert p.finished and p.terrain is not None
    # Along the path (geographiclib): the crest is at the turn; the glide home is the rest.
    out = WGS84.Inverse(path.lats[0], path.lons[0], path.lats[1], path.lons[1])["s12"]
    back = WGS84.Inverse(path.lats[1], path.lons[1], path.lats[2], path.lons[2])["s12"]
    start_at, start_height = p.final_glide_from_m, p.final_glide_height_m
    assert start_at < out  # the final glide starts before the ridge, so the ridge is in it
    floor = GROUND + MARGIN
    h = hand_height_per_metre(start_height, floor, FINAL_MC)
    # By hand: over the crest the glider needs crest + clearance; it loses h per metre on
    # the way there. The arrival alone would need floor + h x (distance to go).
    needed_over_crest = crest + CLEARANCE
    # Tolerance: the flight core's density fixed point is within a few centimetres (its
    # docstring); 0.1 m.
    assert start_height == pytest.approx(needed_over_crest + h * (out - start_at), abs=0.1)
    arrival_alone = floor + h * (out + back - start_at)
    assert p.terrain.raised_by_m == pytest.approx(needed_over_crest - (floor + h * back), abs=0.1)
    assert start_height - arrival_alone == pytest.approx(p.terrain.raised_by_m, abs=0.1)
    assert p.terrain.raised_by_m > 100.0  # the ridge, not the arrival margin, decides
    # The obstacle is the crest, at the turn; the glide clears it by exactly the clearance.
    assert p.terrain.obstacle.at_m == pytest.approx(out, abs=0.01)
    assert p.terrain.obstacle.elevation_m == pytest.approx(crest, abs=1e-6)
    assert p.terrain.obstacle.near == "North Turn"
    assert p.terrain.min_clearance_m == pytest.approx(CLEARANCE, abs=0.1)
    assert p.terrain.ok and p.terrain_ok


def test_required_heights_per_leg_include_the_ridge(ridge):
    p, crest, _ = ridge
    # At the turn, on the crest: crest + clearance (more than the arrival alone needs).
    assert p.legs[1].required_height_m == pytest.approx(crest + CLEARANCE, abs=0.1)
    # The briefing's card at the plan's own setting agrees (MacCready 1 is the final glide's).
    card = final_glide_card(p, (FINAL_MC,))
    assert card[0, 1] == pytest.approx(crest + CLEARANCE, abs=0.1)
    assert card[0, 2] == pytest.approx(GROUND + MARGIN, abs=1e-9)


def test_the_ridge_is_in_the_json_and_the_cautions(ridge):
    p, crest, path = ridge
    data = plan_to_dict(p)
    terrain = data["terrain"]
    assert terrain["ok"] is True and terrain["source"] == p.terrain_source
    # Contract 5.3: least clearance of the final glide and where, along the task.
    assert terrain["final_glide_min_clearance_m"] == pytest.approx(CLEARANCE, abs=0.1)
    assert terrain["final_glide_from_km"] <= terrain["at_km"] <= p.planned_distance_m / 1000.0
    assert terrain["raised_by_m"] == pytest.approx(p.terrain.raised_by_m, abs=0.05)  # JSON: decimetres
    assert any("Terrain raises the final-glide height" in c for c in data["cautions"])
    assert cautions.TERRAIN[0] in data["cautions"]


def test_the_model_is_named_as_the_task_names_it_not_by_its_whole_path(tmp_path):
    # A task in tasks/ naming ../terrain/dem.tif: plan, JSON, text and briefing all say
    # "../terrain/dem.tif" (relative to the task file, as task files name their files:
    # shared/CONTRACT.md section 2), never the absolute path of this machine.
    from glidetask.formats.briefing import plan_to_markdown
    from glidetask.formats.safety_report import terrain_text
    from glidetask.units import METRIC

    (tmp_path / "tasks").mkdir()
    (tmp_path / "terrain").mkdir()
    task = north_and_back_task(60e3, 30e3)
    tif, _ = write_latitude_profile(tmp_path / "terrain" / "dem.tif", [HOME[0] - 0.1, HOME[0] + 1.0],
                                    [GROUND, GROUND])
    source = str(tmp_path / "tasks" / "north-and-back.toml")
    p = plan(dataclasses.replace(scenario(task, tif), source=source))
    assert p.terrain_source == "../terrain/dem.tif" and p.terrain.source == p.terrain_source
    assert p.scenario.terrain_file == tif  # the engine still reads the file by its whole path
    data = plan_to_dict(p)
    assert data["terrain"]["source"] == "../terrain/dem.tif"
    assert "(model ../terrain/dem.tif)" in terrain_text(p.terrain, METRIC)
    briefing = plan_to_markdown(p)
    assert "`../terrain/dem.tif`" in briefing
    for shown in (json.dumps(data), briefing, terrain_text(p.terrain, METRIC), *p.cautions):
        assert str(tmp_path) not in shown


def test_a_model_beside_the_task_is_its_file_name_and_without_a_task_file_too(tmp_path, demo_dir):
    from glidetask.engine.plan_safety import shown_terrain_source
    from glidetask.formats.task_file import load_scenario

    demo = load_scenario(demo_dir / "vardmoor-triangle-300.toml")  # [terrain] file = "terrain.tif"
    assert shown_terrain_source(demo) == "terrain.tif"
    assert shown_terrain_source(dataclasses.replace(demo, source=None)) == "terrain.tif"
    assert shown_terrain_source(dataclasses.replace(demo, terrain_file=None)) is None
    uncovered = scenario(north_and_back_task(60e3, 30e3), None)
    tif, _ = write_latitude_profile(tmp_path / "partial.tif", [HOME[0] - 0.1, HOME[0] + 0.3], [GROUND, GROUND])
    p = plan(dataclasses.replace(uncovered, terrain_file=tif, source=str(tmp_path / "task.toml")))
    caution = next(c for c in p.cautions if "of the planned path" in c)
    assert caution.startswith("The terrain model partial.tif does not cover")


def test_flat_ground_below_the_glide_changes_nothing(tmp_path):
    task = north_and_back_task(60e3, 30e3)
    tif, _ = write_latitude_profile(tmp_path / "flat.tif", [HOME[0] - 0.1, HOME[0] + 0.7], [GROUND, GROUND])
    with_model = plan(scenario(task, tif))
    without = plan(scenario(task))
    assert with_model.terrain.raised_by_m == 0.0 and with_model.terrain_ok
    # The terrain only adds height where it demands more than the arrival margin.
    assert with_model.total_time_s == without.total_time_s
    assert with_model.final_glide_height_m == without.final_glide_height_m
    assert without.terrain is None and without.terrain_source is None and "terrain" not in plan_to_dict(without)


# ---------------------------------------------------------------- models that do not fit


def test_a_model_covering_part_of_the_task_is_a_caution_and_not_ok(tmp_path):
    task = north_and_back_task(60e3, 30e3)
    # Covers from south of home to 46.3 N only: the turn (about 46.54 N) is outside.
    tif, _ = write_latitude_profile(tmp_path / "part.tif", [HOME[0] - 0.06, 46.25], [GROUND, GROUND])
    p = plan(scenario(task, tif))
    assert p.terrain_ok is False
    assert p.terrain_path.profile.covered_share < 1.0
    data = plan_to_dict(p)
    assert data["terrain"]["ok"] is False
    assert data["terrain"]["task_covered_percent"] < 100.0 and data["terrain"]["task_uncovered"]
    assert any("does not cover" in c for c in data["cautions"])  # never a silent pass


def test_a_model_covering_none_of_the_task_is_an_input_error(tmp_path):
    task = north_and_back_task(60e3, 30e3)
    tif, _ = write_latitude_profile(tmp_path / "elsewhere.tif", [40.0, 40.2], [GROUND, GROUND])
    with pytest.raises(InputError) as caught:
        plan(scenario(task, tif))
    problem = caught.value.problems[0]
    assert (problem.file, problem.where) == ("ridge-test.toml", "[terrain] file")
    assert "covers none" in problem.what and tif in problem.what


def test_a_file_that_is_not_a_raster_is_an_input_error_naming_the_task_key(tmp_path):
    fake = tmp_path / "dem.tif"
    fake.write_text("not an elevation model\n", encoding="utf-8")
    with pytest.raises(InputError) as caught:
        plan(scenario(north_and_back_task(60e3, 30e3), str(fake)))
    problem = caught.value.problems[0]
    assert (problem.file, problem.where) == ("ridge-test.toml", "[terrain] file")
    assert str(fake) in problem.what and "not a raster" in problem.what


# ---------------------------------------------------------------- landable coverage


def test_coverage_along_the_path_matches_a_hand_count(tmp_path):
    # Out 100 km due north and back; fields on the path at home and 40 km out.
    task = north_and_back_task(100e3, 100e3)
    field = geodesy.destination(*HOME, 0.0, 40e3)
    fields = (turnpoint("Home", *HOME, landable=True), turnpoint("Forty Field", *field, landable=True),
              turnpoint("North Turn", *geodesy.destination(*HOME, 0.0, 100e3)))
    p = plan(scenario(task, turnpoints=fields))
    c = p.landables
    assert c is not None and c.landable_count == 2
    # Source: reach in calm air = (height above the field - margin) x best L/D (common
    # practice); for sink = a v^2 + b v + c the best L/D is 1/(b + 2 sqrt(a c)), which
    # mass and density scaling leave unchanged (contract section 3).
    a, b, c0 = np.polyfit([q[0] for q in SPEC.points], [q[1] for q in SPEC.points], 2)
    reach = (800.0 - GROUND - MARGIN) / (b + 2.0 * math.sqrt(a * c0))
    # The path sampled every 20 m with geographiclib; a sample is covered when a field is
    # within reach.
    lats, lons, along = [], [], []
    start = 0.0
    for i in range(len(p.path.legs)):
        line = WGS84.InverseLine(p.path.lats[i], p.path.lons[i], p.path.lats[i + 1], p.path.lons[i + 1])
        s = np.linspace(0.0, line.s13, int(line.s13 // 20.0) + 2)
        for d in s:
            point = line.Position(d)
            lats.append(point["lat2"])
            lons.append(point["lon2"])
        along.append(start + s)
        start += line.s13
    along = np.concatenate(along)
    near = np.min([[WGS84.Inverse(la, lo, f.lat, f.lon)["s12"] for la, lo in zip(lats, lons)]
                   for f in fields[:2]], axis=0)
    covered = near <= reach
    hand_percent = 100.0 * np.mean(covered)
    # Tolerance: the 20 m hand sampling, 0.05 % of 200 km; the engine's gap edges are exact
    # on a path that runs straight at the field (its documented edge interpolation).
    assert c.coverage_percent == pytest.approx(hand_percent, abs=0.05)
    hand_edges = along[np.flatnonzero(np.diff(covered.astype(int)))]
    engine_edges = [edge for gap in c.gaps for edge in gap if 0.0 < edge < p.planned_distance_m - 1.0]
    assert len(engine_edges) == len(hand_edges)
    assert np.allclose(engine_edges, hand_edges, atol=25.0)
    data = plan_to_dict(p)["landables"]
    assert data["coverage_percent"] == pytest.approx(c.coverage_percent, abs=0.005)  # JSON: 2 decimals
    assert all(0.0 <= g["from_km"] < g["to_km"] <= p.planned_distance_m / 1000.0 for g in data["gaps"])
    assert [entry["leg"] for entry in data["by_leg"]] == [1, 2]
    assert data["by_leg"][0]["nearest"] == "Home" and data["by_leg"][0]["distance_km"] == pytest.approx(0.0, abs=1e-3)


def test_no_landables_means_no_coverage_and_a_caution(tmp_path):
    task = north_and_back_task(60e3, 30e3)
    p = plan(scenario(task, turnpoints=tuple(point.turnpoint for point in task.points)))
    assert p.landables is None and "landables" not in plan_to_dict(p)
    assert any("No turnpoint is marked landable" in c for c in p.cautions)


def test_rising_air_in_the_glides_is_not_counted_on_for_reaching_a_field():
    task = north_and_back_task(100e3, 100e3)
    field = geodesy.destination(*HOME, 0.0, 40e3)
    fields = (turnpoint("Home", *HOME, landable=True), turnpoint("Forty Field", *field, landable=True))
    calm = scenario(task, turnpoints=fields)
    rising = dataclasses.replace(calm, day=dataclasses.replace(calm.day, glide_airmass_ms=0.3))
    # Common practice: a pilot low and looking for a field plans in still air at best.
    assert plan(rising).landables.coverage_percent == pytest.approx(plan(calm).landables.coverage_percent)


def test_the_sensitivity_forecast_is_the_plan_over_the_ridge(ridge):
    # The what-ifs fly with the plan's own terrain requirement: the forecast row is the plan.
    from glidetask.engine.sensitivity import plan_sensitivity

    p, _, _ = ridge
    forecast = plan_sensitivity(p).forecast
    assert forecast.total_time_s == pytest.approx(p.total_time_s, abs=1e-6)
