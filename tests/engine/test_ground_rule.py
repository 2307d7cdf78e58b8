"""The clearance rule over the whole flight: an analytic ridge written to a GeoTIFF.

A ridge running east-west across a task leg flown due north: the terrain is a function of
latitude only, with straight flanks (a triangle in latitude), so bilinear interpolation of
the raster reproduces it exactly between the grid rows and the crest and the place where
terrain + clearance passes the band bottom can be computed by hand.
"""

from __future__ import annotations

import numpy as np
import pytest
from affine import Affine
from geographiclib.geodesic import Geodesic
from hypothesis import HealthCheck, given, settings, strategies as st

rasterio = pytest.importorskip("rasterio")

from glidetask.engine import terrain as terrain_module  # noqa: E402
from glidetask.engine.clearance_hook import path_terrain  # noqa: E402
from glidetask.engine.flight import TERRAIN_ABOVE_BAND, Course, Flights, fly  # noqa: E402
from glidetask.engine.flight_profile import profile_samples, raised_floors  # noqa: E402
from glidetask.engine.polar import PolarSpec  # noqa: E402

KMH = 1000.0 / 3600.0
HOUR = 3600.0
# An invented 15 m class example polar (not any real aircraft).
SPEC = PolarSpec(label="test example", wing_area_m2=10.5, reference_mass_kg=350.0, empty_mass_kg=260.0,
                 max_ballast_kg=150.0, max_mass_kg=525.0, vne_ias_ms=270 * KMH, min_speed_ias_ms=70 * KMH,
                 points=((80 * KMH, 0.62), (120 * KMH, 0.80), (180 * KMH, 1.85)))
START_LAT, END_LAT, CREST_LAT = 45.0, 45.9, 45.5
BASE_M, CLEARANCE_M, BOTTOM_M, TOP_M = 300.0, 150.0, 900.0, 2300.0
STEP_DEG = 0.001


def ridge(lat, crest_m, half_width_deg):
    return BASE_M + (crest_m - BASE_M) * np.maximum(0.0, 1.0 - np.abs(lat - CREST_LAT) / half_width_deg)


def ridge_path(tmp_path, crest_m, half_width_deg, name="ridge.tif"):
    north, west = 46.0, -0.01
    rows, cols = int(round(1.1 / STEP_DEG)), 20
    lats = north - (np.arange(rows) + 0.5) * STEP_DEG  # cell centres
    grid = np.repeat(ridge(lats, crest_m, half_width_deg)[:, None], cols, axis=1).astype("float64")
    path = tmp_path / name
    with rasterio.open(path, "w", driver="GTiff", height=rows, width=cols, count=1, dtype="float64",
                       crs="EPSG:4326", transform=Affine(STEP_DEG, 0.0, west, 0.0, -STEP_DEG, north)) as dst:
        dst.write(grid, 1)
    model = terrain_module.load_terrain(str(path))
    return path_terrain(model, [START_LAT, END_LAT], [0.0, 0.0], CLEARANCE_M)


def along(lat):
    # Source: geographiclib (C. F. F. Karney, J. Geodesy 87, 2013), an independent geodesic library.
    return Geodesic.WGS84.Inverse(START_LAT, 0.0, lat, 0.0)["s12"]


def flights(wind_from_deg=0.0, wind_speed_ms=0.0, climb=2.0):
    return Flights(spec=SPEC, mass_kg=380.0, start_time_s=12 * HOUR, start_height_m=TOP_M, band_top_m=TOP_M,
                   band_bottom_m=BOTTOM_M, lift_ends_s=19 * HOUR, lift_times_s=[0.0], lift_values=[climb],
                   finish_elevation_m=BASE_M, arrival_margin_m=200.0, wind_from_deg=wind_from_deg,
                   wind_speed_ms=wind_speed_ms)


def flown_profile(hook, day):
    course = Course([hook.profile.vertex_distance_m[-1]], [0.0])
    flown = fly(course, day, requirement=hook, record=True)
    distance, height, phase = profile_samples(flown.trace)
    ground = np.interp(distance, hook.profile.distance_m, hook.profile.elevation_m)
    return flown, distance, height, ground, phase


def test_ridge_profile_clears_and_the_floor_rises_where_computed_by_hand(tmp_path):
    crest, half_width = 1700.0, 0.1
    hook = ridge_path(tmp_path, crest, half_width)
    flown, distance, height, ground, phase = flown_profile(hook, flights())
    assert flown.finished[0]
    # The rule: no planned glide closer to the terrain than the clearance (contract section 3).
    assert np.all(height - ground >= CLEARANCE_M - 1e-6)
    # By hand: the crest (lat 45.5) must be crossed at least crest + clearance high.
    crest_m = along(CREST_LAT)
    assert np.interp(crest_m, distance, height) >= crest + CLEARANCE_M - 1e-6
    # By hand: terrain + clearance reaches the band bottom where the south flank
    # BASE + (crest - BASE)(1 - (45.5 - lat)/w) = BOTTOM - C, i.e. lat = 45.5 - w (1 - 450/1400).
    begin_lat = CREST_LAT - half_width * (1.0 - (BOTTOM_M - CLEARANCE_M - BASE_M) / (crest - BASE_M))
    end_lat = 2 * CREST_LAT - begin_lat
    floors = raised_floors(hook.profile.distance_m, hook.profile.elevation_m, CLEARANCE_M, BOTTOM_M)
    assert len(floors) == 1
    assert floors[0][0] == pytest.approx(along(begin_lat), abs=5.0)  # samples every 250 m, flanks exact
    assert floors[0][1] == pytest.approx(along(end_lat), abs=5.0)
    # The highest sampled floor: the crest may fall between samples 250 m apart, so it is at most
    # the flank's slope times half a spacing below crest + clearance.
    slope = (crest - BASE_M) / (along(CREST_LAT) - along(CREST_LAT - half_width))
    assert crest + CLEARANCE_M - slope * 125.0 - 1.0 <= floors[0][2] <= crest + CLEARANCE_M + 1e-6
    # Each climb's bottom and top are samples; glides are sampled at least every 250 m.
    gaps = np.diff(distance)[np.array(phase[1:]) != "climb"]
    assert np.all(gaps <= 250.0 + 1e-6)


def test_ridge_above_the_band_top_cannot_be_flown(tmp_path):
    hook = ridge_path(tmp_path, 2400.0, 0.1, "high.tif")
    course = Course([hook.profile.vertex_distance_m[-1]], [0.0])
    flown = fly(course, flights(), requirement=hook, record=True)
    assert not flown.finished[0]
    assert flown.reason[0] == TERRAIN_ABOVE_BAND
    # It stops where terrain + clearance meets the band top, on the south flank (by hand).
    lat = CREST_LAT - 0.1 * (1.0 - (TOP_M - CLEARANCE_M - BASE_M) / (2400.0 - BASE_M))
    assert flown.landout_m[0] <= along(lat) + 5.0


@settings(max_examples=25, deadline=None, suppress_health_check=[HealthCheck.function_scoped_fixture])
@given(crest=st.floats(400.0, 2100.0), half_width=st.floats(0.01, 0.3),
       wind_from=st.floats(0.0, 360.0), wind_speed=st.floats(0.0, 15.0))
def test_whenever_finished_every_sample_keeps_the_clearance(tmp_path, crest, half_width, wind_from, wind_speed):
    hook = ridge_path(tmp_path, crest, half_width, f"r{crest:.3f}_{half_width:.4f}.tif")
    flown, distance, height, ground, _ = flown_profile(hook, flights(wind_from, wind_speed))
    if flown.finished[0]:
        assert np.all(height - ground >= CLEARANCE_M - 1e-6)


def test_odds_and_plan_land_out_in_the_same_place(tmp_path):
    # The lift ends before the ridge can be crossed: the glide at MacCready 0 ends where it meets
    # terrain + clearance, for one flight alone and inside a batch of many (the odds' call).
    hook = ridge_path(tmp_path, 1700.0, 0.1, "late.tif")
    day = flights()
    early = Flights(**{**{f: getattr(day, f) for f in day.__dataclass_fields__}, "lift_ends_s": 12.2 * HOUR})
    course = Course([hook.profile.vertex_distance_m[-1]], [0.0])
    one = fly(course, early, requirement=hook, record=True)
    assert not one.finished[0]
    many = fly(course, Flights(**{**{f: getattr(early, f) for f in early.__dataclass_fields__},
                                  "mass_kg": np.full(50, 380.0)}), requirement=hook, detail=False)
    np.testing.assert_allclose(many.landout_m, one.landout_m[0], rtol=0, atol=1e-6)
    distance, height, _ = profile_samples(one.trace)
    ground = np.interp(distance, hook.profile.distance_m, hook.profile.elevation_m)
    assert np.all(height - ground >= CLEARANCE_M - 1e-6)
    assert one.landout_m[0] < along(CREST_LAT)  # on the south flank, not through the ridge


def test_a_capped_band_costs_nothing_in_the_pure_macready_model_and_is_kept_under():
    # Source: MacCready theory (P. B. MacCready 1958; H. Reichmann, Cross-Country Soaring,
    # 1978, from memory): with one constant climb rate and no time lost centring, the average
    # speed of climb-and-glide cycles m v / (m + sink(v)) does not depend on how high the
    # climbs go, so a leg under a lowered band top is exactly as fast: it costs only more,
    # shorter cycles. The plan must keep the whole profile under the cap there.
    from types import SimpleNamespace

    from glidetask.engine.flight_ground import Ceiling

    course = Course([150e3, 150e3], [0.0, 90.0])
    day = Flights(spec=SPEC, mass_kg=380.0, start_time_s=11 * HOUR, start_height_m=TOP_M, band_top_m=TOP_M,
                  band_bottom_m=BOTTOM_M, lift_ends_s=20 * HOUR, lift_times_s=[0.0], lift_values=[2.0],
                  finish_elevation_m=BASE_M, arrival_margin_m=200.0)
    cap_from, cap_to, cap_top = 60e3, 120e3, 1500.0  # a floor of 1600 m with a 100 m margin
    along = np.arange(cap_from, cap_to + 1.0, 250.0)
    hook = SimpleNamespace(ceiling=Ceiling(along, np.full(along.size, cap_top)), terrain=None)
    free = fly(course, day, record=True)
    capped = fly(course, day, requirement=hook, record=True)
    assert free.finished[0] and capped.finished[0]
    distance, height, _ = profile_samples(capped.trace)
    under = (distance >= cap_from) & (distance <= cap_to)
    assert under.sum() > 100 and np.all(height[under] <= cap_top + 1e-6)
    free_distance, free_height, _ = profile_samples(free.trace)
    assert free_height[(free_distance >= cap_from) & (free_distance <= cap_to)].max() > cap_top + 500.0
    assert capped.climbs[0] > free.climbs[0]  # more, shorter cycles
    # The whole task takes the same time (leg times differ by where the cycles fall: height
    # carried over a leg's end is time moved between legs).
    assert capped.total_time_s[0] == pytest.approx(free.total_time_s[0], abs=1.0)


def test_with_a_detour_the_profile_and_the_ground_stay_on_the_planned_path():
    # Source: the definitions (contract 3): a detour makes the flight longer, not the task; the
    # profile is drawn along the planned path, and the clearance holds under every glide there.
    from pathlib import Path

    from glidetask.engine.plan import plan
    from glidetask.formats.task_file import load_scenario

    root = Path(__file__).resolve().parents[2]
    scenario = load_scenario(root / "demo_tasks" / "vardmoor-ridge-final-glide.toml")
    assert scenario.day.detour_percent > 0.0
    result = plan(scenario)
    profile = result.profile
    assert profile.distance_m[-1] == pytest.approx(result.path.total_m, abs=1.0)
    glides = np.array([phase != "climb" for phase in profile.phase]) & np.isfinite(profile.terrain_m)
    clearance = scenario.safety.terrain_clearance_m
    assert np.all(profile.height_m[glides] >= profile.terrain_m[glides] + clearance - 1.0)
