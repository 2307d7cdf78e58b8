"""Elevation models: reading, bilinear sampling, paths, and the terrain-aware final glide.

Rasters are written to tmp_path by the tests themselves from analytic surfaces (a plane,
a cone, a ridge), so every expected value is computed by hand or by an independent
library (geographiclib for geodesics, pyproj for map projections).
"""

from __future__ import annotations

import math
import os
import time
from unittest import mock

import numpy as np
import pytest
import rasterio
from geographiclib.geodesic import Geodesic
from hypothesis import given, settings
from hypothesis import strategies as st
from pyproj import Transformer
from affine import Affine

from glidetask.engine.clearance import final_glide_clearance, final_glide_over_terrain, required_height_line
from glidetask.engine.terrain import Terrain, TerrainError, clear_cache, load_terrain
from glidetask.engine.terrain_profile import sample_path

WGS84 = Geodesic.WGS84
UTM25 = "EPSG:32625"  # UTM zone 25 north: 36 W to 30 W, where the demo region lies


def from_origin(west, north, x_size, y_size):
    """The north-up affine transform of a grid whose top-left corner is (west, north)."""
    return Affine(x_size, 0.0, west, 0.0, -y_size, north)


def write_raster(path, grid, transform, crs="EPSG:4326", nodata=None, units=None):
    profile = dict(driver="GTiff", height=grid.shape[0], width=grid.shape[1], count=1,
                   dtype=str(grid.dtype), transform=transform)
    if crs is not None:
        profile["crs"] = crs
    if nodata is not None:
        profile["nodata"] = nodata
    with rasterio.open(path, "w", **profile) as dst:
        dst.write(grid, 1)
        if units:
            dst.units = (units,)
    return str(path)


# A geographic grid over part of the invented demo region: 0.01 deg cells.
WEST, NORTH, STEP = -34.0, 46.6, 0.01
ROWS, COLS = 60, 80


def geographic_centres():
    lats = NORTH - STEP * (np.arange(ROWS) + 0.5)
    lons = WEST + STEP * (np.arange(COLS) + 0.5)
    return np.meshgrid(lats, lons, indexing="ij")


def plane_lonlat(lat, lon):
    return 420.0 + 900.0 * (lon - WEST) - 1300.0 * (lat - NORTH)


@pytest.fixture
def geographic_plane(tmp_path):
    lat, lon = geographic_centres()
    path = write_raster(tmp_path / "plane4326.tif", plane_lonlat(lat, lon).astype(np.float64),
                        from_origin(WEST, NORTH, STEP, STEP))
    return load_terrain(path)


# A UTM grid: 200 m cells, origin (E0, N0) at the top-left corner.
E0, N0, CELL = 380_000.0, 5_160_000.0, 200.0
U_ROWS, U_COLS = 100, 120


def utm_centres():
    northing = N0 - CELL * (np.arange(U_ROWS) + 0.5)
    easting = E0 + CELL * (np.arange(U_COLS) + 0.5)
    return np.meshgrid(northing, easting, indexing="ij")


def plane_utm(northing, easting):
    return 250.0 + 0.031 * (easting - E0) + 0.017 * (N0 - northing)


APEX_E, APEX_N, APEX_H, CONE_SLOPE = E0 + 12_000.0, N0 - 10_000.0, 1400.0, 0.08


def cone_utm(northing, easting):
    return APEX_H - CONE_SLOPE * np.hypot(easting - APEX_E, northing - APEX_N)


def utm_to_lonlat(easting, northing):
    return Transformer.from_crs(UTM25, "EPSG:4326", always_xy=True).transform(easting, northing)


# ---------------------------------------------------------------- sampling


@settings(max_examples=100, deadline=None)
@given(st.floats(0.0, 1.0), st.floats(0.0, 1.0))
def test_bilinear_is_exact_on_a_plane_in_geographic_coordinates(tmp_path_factory, fx, fy):
    # Source: bilinear interpolation reproduces any function p + q x + r y (+ s x y) of the
    # grid coordinates exactly (Press et al., Numerical Recipes, 3rd ed., section 3.6,
    # from memory); tolerance: float64 round-off on values near 1000 m.
    path = tmp_path_factory.mktemp("plane") / "p.tif"
    lat, lon = geographic_centres()
    terrain = load_terrain(write_raster(path, plane_lonlat(lat, lon), from_origin(WEST, NORTH, STEP, STEP)))
    q_lat = NORTH - fy * ROWS * STEP * 0.999 - 1e-6
    q_lon = WEST + fx * COLS * STEP * 0.999 + 1e-6
    assert terrain.sample(q_lat, q_lon) == pytest.approx(plane_lonlat(q_lat, q_lon), abs=1e-8)


def test_bilinear_is_exact_on_a_plane_in_a_projected_crs(tmp_path):
    # Source: as above; the query's UTM coordinates come from pyproj (an independent
    # implementation of the projection), the plane is analytic in easting/northing.
    northing, easting = utm_centres()
    terrain = load_terrain(write_raster(tmp_path / "plane_utm.tif", plane_utm(northing, easting),
                                        from_origin(E0, N0, CELL, CELL), crs=UTM25))
    assert terrain.crs == UTM25 and not terrain.geographic
    rng = np.random.default_rng(7)
    q_e = rng.uniform(E0 + 1.0, E0 + U_COLS * CELL - 1.0, 500)
    q_n = rng.uniform(N0 - U_ROWS * CELL + 1.0, N0 - 1.0, 500)
    q_lon, q_lat = utm_to_lonlat(q_e, q_n)
    # Tolerance: the lat/lon round trip through pyproj is good to about 1e-6 m; times the
    # plane's largest slope (0.031) that is well under 1e-6 m of elevation.
    np.testing.assert_allclose(terrain.sample(q_lat, q_lon), plane_utm(q_n, q_e), atol=1e-6)


def test_cone_is_exact_at_cell_centres_and_within_the_interpolation_error_bound(tmp_path):
    northing, easting = utm_centres()
    terrain = load_terrain(write_raster(tmp_path / "cone.tif", cone_utm(northing, easting),
                                        from_origin(E0, N0, CELL, CELL), crs=UTM25))
    # At the cell centres the model returns its own values.
    lon, lat = utm_to_lonlat(easting[::7, ::9], northing[::7, ::9])
    np.testing.assert_allclose(terrain.sample(lat, lon), cone_utm(northing[::7, ::9], easting[::7, ::9]), atol=1e-6)
    # Between centres: the error of tensor-product linear interpolation is at most
    # (hx^2/8) max|f_xx| + (hy^2/8) max|f_yy| (Source: standard interpolation error
    # bound, e.g. Burden & Faires, Numerical Analysis, ch. 3, from memory). For the cone
    # f = H - k r, |f_xx| and |f_yy| are at most k / r, so the bound is h^2 k / (4 r_min).
    rng = np.random.default_rng(3)
    q_e = rng.uniform(E0 + CELL, E0 + (U_COLS - 1) * CELL, 2000)
    q_n = rng.uniform(N0 - (U_ROWS - 1) * CELL, N0 - CELL, 2000)
    r = np.hypot(q_e - APEX_E, q_n - APEX_N)
    far = r > 4 * CELL
    q_lon, q_lat = utm_to_lonlat(q_e[far], q_n[far])
    r_min = r[far] - CELL * math.sqrt(2.0)  # nearest any of the four surrounding centres can be
    bound = CELL**2 * CONE_SLOPE / (4.0 * r_min)
    error = np.abs(terrain.sample(q_lat, q_lon) - cone_utm(q_n[far], q_e[far]))
    assert np.all(error <= bound + 1e-6)
    assert error.max() > 0.01 * bound.max()  # the check is not vacuous: the cone is curved


def test_no_data_cells_are_unknown_not_sea_level(tmp_path):
    lat, lon = geographic_centres()
    grid = plane_lonlat(lat, lon).astype(np.float32)
    grid[20, 30] = -9999.0
    grid[40, 50] = np.nan
    terrain = load_terrain(write_raster(tmp_path / "holes.tif", grid, from_origin(WEST, NORTH, STEP, STEP),
                                        nodata=-9999.0))
    for row, col in ((20, 30), (40, 50)):
        c_lat, c_lon = lat[row, col], lon[row, col]
        # At the hole and anywhere its cell has weight: NaN.
        assert math.isnan(terrain.sample(c_lat, c_lon))
        assert math.isnan(terrain.sample(c_lat + 0.4 * STEP, c_lon - 0.7 * STEP))
        # At a neighbouring centre the hole has no weight: a value, the plane's own.
        assert terrain.sample(c_lat, c_lon + STEP) == pytest.approx(plane_lonlat(c_lat, c_lon + STEP), abs=1e-3)
    assert not np.any(terrain.elevation_m == -9999.0)


def test_outside_the_raster_is_unknown(geographic_plane):
    inside = geographic_plane.sample(NORTH - 0.2, WEST + 0.2)
    assert math.isfinite(inside)
    outside = geographic_plane.sample([NORTH + 0.001, NORTH - 0.2, 10.0], [WEST + 0.2, WEST - 0.001, WEST + 0.2])
    assert np.all(np.isnan(outside))


def test_half_cell_at_the_edge_is_extrapolated_exactly_on_a_plane(geographic_plane):
    # Source: linear extrapolation from the outermost cell centres keeps a plane exact.
    lat, lon = NORTH - 0.2 * STEP, WEST + 0.1 * STEP
    assert geographic_plane.sample(lat, lon) == pytest.approx(plane_lonlat(lat, lon), abs=1e-8)


def test_scalar_in_scalar_out_and_shapes_kept(geographic_plane):
    assert isinstance(geographic_plane.sample(46.3, -33.7), float)
    grid = geographic_plane.sample(np.full((3, 4), 46.3), np.full((3, 4), -33.7))
    assert grid.shape == (3, 4)


def test_longitudes_numbered_0_to_360_are_found(tmp_path):
    lat, lon = geographic_centres()
    path = write_raster(tmp_path / "east.tif", plane_lonlat(lat, lon),
                        from_origin(WEST + 360.0, NORTH, STEP, STEP))
    terrain = load_terrain(path)
    assert terrain.sample(46.3, -33.7) == pytest.approx(plane_lonlat(46.3, -33.7), abs=1e-8)


def test_elevations_in_feet_are_converted_to_metres(tmp_path):
    # Source: 1 ft = 0.3048 m exactly (international foot, 1959).
    lat, lon = geographic_centres()
    grid = np.full((ROWS, COLS), 1000.0)
    terrain = load_terrain(write_raster(tmp_path / "feet.tif", grid, from_origin(WEST, NORTH, STEP, STEP),
                                        units="ft"))
    assert terrain.sample(46.3, -33.7) == pytest.approx(304.8, abs=1e-9)


# ---------------------------------------------------------------- loading and its errors


def test_missing_file_is_a_clear_error_naming_it(tmp_path):
    missing = tmp_path / "nowhere.tif"
    with pytest.raises(TerrainError) as caught:
        load_terrain(missing)
    assert isinstance(caught.value, ValueError)
    assert caught.value.path == str(missing) and "no such file" in caught.value.what
    assert str(missing) in str(caught.value)


def test_a_file_that_is_not_a_raster_is_a_clear_error(tmp_path):
    text = tmp_path / "notes.tif"
    text.write_text("this is not an elevation model\n")
    with pytest.raises(TerrainError) as caught:
        load_terrain(text)
    assert "not a raster" in caught.value.what
    assert "\n" not in str(caught.value)


def test_a_raster_without_crs_is_a_clear_error(tmp_path):
    lat, lon = geographic_centres()
    path = write_raster(tmp_path / "nocrs.tif", plane_lonlat(lat, lon), from_origin(WEST, NORTH, STEP, STEP),
                        crs=None)
    with pytest.raises(TerrainError) as caught:
        load_terrain(path)
    assert "coordinate reference system" in caught.value.what


def test_a_directory_is_not_an_elevation_model(tmp_path):
    with pytest.raises(TerrainError):
        load_terrain(tmp_path)


def test_repeated_loads_come_from_the_cache_until_the_file_changes(tmp_path):
    clear_cache()
    lat, lon = geographic_centres()
    path = write_raster(tmp_path / "c.tif", plane_lonlat(lat, lon), from_origin(WEST, NORTH, STEP, STEP))
    first = load_terrain(path)
    assert load_terrain(path) is first
    write_raster(path, plane_lonlat(lat, lon) + 10.0, from_origin(WEST, NORTH, STEP, STEP))
    later = time.time() + 5.0
    os.utime(path, (later, later))
    again = load_terrain(path)
    assert again is not first
    assert again.sample(46.3, -33.7) == pytest.approx(first.sample(46.3, -33.7) + 10.0, abs=1e-9)


def test_the_demo_model_agrees_with_its_generator(demo_dir):
    # Source: demo_tasks/make_terrain.py's elevation() is what terrain.tif was gridded
    # from; at grid-cell centres the file holds that function in float32 (about 1e-4 m).
    import importlib.util

    spec = importlib.util.spec_from_file_location("make_terrain", demo_dir / "make_terrain.py")
    generator = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(generator)
    terrain = load_terrain(demo_dir / "terrain.tif")
    lats = generator.NORTH - generator.STEP_DEG * (np.array([10, 150, 230, 400]) + 0.5)
    lons = generator.WEST + generator.STEP_DEG * (np.array([20, 333, 500, 790]) + 0.5)
    np.testing.assert_allclose(terrain.sample(lats, lons), generator.elevation(lats, lons), atol=1e-3)


# ---------------------------------------------------------------- paths


def test_path_samples_are_at_most_250_m_apart_and_follow_the_geodesics(geographic_plane):
    v_lats, v_lons = [46.55, 46.2, 46.45], [-33.95, -33.5, -33.3]
    profile = sample_path(geographic_plane, v_lats, v_lons)
    # Source: GeographicLib (Karney 2013) geodesic lengths, independent of pyproj's copy.
    legs = [WGS84.Inverse(v_lats[i], v_lons[i], v_lats[i + 1], v_lons[i + 1])["s12"] for i in range(2)]
    assert profile.total_m == pytest.approx(sum(legs), abs=1e-6)
    np.testing.assert_allclose(profile.vertex_distance_m, [0.0, legs[0], legs[0] + legs[1]], atol=1e-6)
    assert np.max(np.diff(profile.distance_m)) <= 250.0 + 1e-9
    # Each sample lies on its leg's geodesic at its distance.
    k = 17
    expected = WGS84.Direct(v_lats[0], v_lons[0], WGS84.Inverse(v_lats[0], v_lons[0], v_lats[1], v_lons[1])["azi1"],
                            profile.distance_m[k])
    assert profile.lats[k] == pytest.approx(expected["lat2"], abs=1e-9)
    assert profile.lons[k] == pytest.approx(expected["lon2"], abs=1e-9)
    assert profile.segment[k] == 0 and profile.segment[-1] == 1
    np.testing.assert_allclose(profile.elevation_m, plane_lonlat(profile.lats, profile.lons), atol=1e-8)
    assert profile.covered_share == 1.0 and profile.uncovered_ranges() == ()


def test_a_path_leaving_the_model_reports_the_uncovered_share(geographic_plane):
    # Along the meridian 33.5 W from 46.3 N north to 46.7 N: the model ends at 46.6 N.
    profile = sample_path(geographic_plane, [46.3, 46.7], [-33.5, -33.5], spacing_m=100.0)
    # Source: GeographicLib meridian arcs for the expected lengths.
    total = WGS84.Inverse(46.3, -33.5, 46.7, -33.5)["s12"]
    inside = WGS84.Inverse(46.3, -33.5, NORTH, -33.5)["s12"]
    # Tolerance: the covered stretch ends within one sample spacing (100 m) of the edge.
    assert profile.covered_share == pytest.approx(inside / total, abs=100.0 / total)
    (start, end), = profile.uncovered_ranges()
    assert start == pytest.approx(inside, abs=100.0) and end == pytest.approx(total, abs=1e-6)


# ---------------------------------------------------------------- the terrain-aware final glide

# A final glide 50 km long on a line of samples every 250 m: arrival at the goal
# (elevation 100 m) with a 200 m margin, glide ratio 40, so R(s) = 300 + (50000 - s)/40.
GLIDE_KM = 50.0
S = np.linspace(0.0, GLIDE_KM * 1000.0, 201)
REQUIRED = 300.0 + (GLIDE_KM * 1000.0 - S) / 40.0
CLEARANCE = 150.0


def ridge(crest_m, at_m, half_width_m=1000.0, base_m=100.0):
    """A triangular ridge on flat ground: crest at ``at_m``."""
    return base_m + np.maximum(0.0, (crest_m - base_m) * (1.0 - np.abs(S - at_m) / half_width_m))


def test_a_ridge_raises_the_required_height_by_exactly_what_it_demands():
    # By hand: the crest at 20 km is 1000 m; the glide must pass it at 1000 + 150 = 1150 m.
    # There R = 300 + 30000/40 = 1050 m, so the requirement rises by 1150 - 1050 = 100 m.
    # On the ridge's flanks the terrain falls 0.9 m per metre, much faster than the glide
    # line (1/40), so the crest decides.
    terrain = ridge(1000.0, 20000.0)
    result = final_glide_clearance(S, REQUIRED, terrain, CLEARANCE, source="ridge")
    assert result.raised_by_m == pytest.approx(100.0, abs=1e-9)
    assert result.required_start_m == pytest.approx(300.0 + 50000.0 / 40.0 + 100.0, abs=1e-9)
    assert result.obstacle.at_m == pytest.approx(20000.0) and result.obstacle.elevation_m == pytest.approx(1000.0)
    assert result.obstacle.needed_height_m == pytest.approx(1150.0)
    # Flown from the raised start, the least clearance is exactly the demanded one, at the crest.
    assert result.min_clearance_m == pytest.approx(CLEARANCE, abs=1e-9)
    assert result.at_m == pytest.approx(20000.0)
    assert result.ok
    # Beyond the crest nothing is raised; before it, everything by 100 m.
    np.testing.assert_allclose(result.adjusted_m[S > 20000.0], REQUIRED[S > 20000.0])
    np.testing.assert_allclose(result.adjusted_m[S <= 20000.0], REQUIRED[S <= 20000.0] + 100.0)


def test_without_an_obstacle_nothing_rises_and_the_least_clearance_is_the_arrival_margin():
    # By hand: flat ground at the goal's elevation; the glide arrives 200 m above it and is
    # higher everywhere before, so the least clearance is 200 m, at the goal.
    result = final_glide_clearance(S, REQUIRED, np.full(S.shape, 100.0), CLEARANCE)
    assert result.raised_by_m == 0.0 and result.obstacle is None
    assert result.min_clearance_m == pytest.approx(200.0) and result.at_m == pytest.approx(50000.0)
    assert result.ok


def test_the_suffix_maximum_keeps_each_obstacle_for_the_stretch_before_it():
    # By hand: ridge A at 10 km, crest 1000 m: R(10 km) = 300 + 40000/40 = 1300, demand 1150:
    # no shortfall. Ridge B at 35 km, crest 700 m: R = 300 + 15000/40 = 675, demand 850:
    # 175 m short. Ridge C at 45 km, crest 400 m: R = 425, demand 550: 125 m short.
    # C's lee flank still counts: at 45.25 km the ground is 100 + 300 x 0.75 = 325 m and
    # R = 300 + 4750/40 = 418.75 m, so 325 + 150 - 418.75 = 56.25 m short; at 45.5 km
    # 250 + 150 - 412.5 < 0. (B's lee flank at 35.25 km: 550 + 150 - 668.75 = 31.25 < 125.)
    # So R' = R + 175 up to 35 km, R + 125 to 45 km, R + 56.25 at 45.25 km, R after.
    terrain = np.maximum.reduce([ridge(1000.0, 10000.0), ridge(700.0, 35000.0), ridge(400.0, 45000.0)])
    result = final_glide_clearance(S, REQUIRED, terrain, CLEARANCE)
    assert result.raised_by_m == pytest.approx(175.0)
    assert result.obstacle.at_m == pytest.approx(35000.0)
    rise = result.adjusted_m - REQUIRED
    np.testing.assert_allclose(rise[S <= 35000.0], 175.0)
    np.testing.assert_allclose(rise[(S > 35000.0) & (S <= 45000.0)], 125.0)
    np.testing.assert_allclose(rise[S == 45250.0], 56.25)
    np.testing.assert_allclose(rise[S > 45250.0], 0.0)
    np.testing.assert_allclose(result.raise_at([0.0, 35000.0, 35100.0, 44900.0, 45000.0, 45001.0, 45251.0, 60000.0]),
                               [175.0, 175.0, 125.0, 125.0, 125.0, 56.25, 0.0, 0.0])
    assert np.all(result.adjusted_m - terrain >= CLEARANCE - 1e-9)


def test_a_glider_starting_too_low_is_told_the_height_it_lacks():
    # By hand: R(0) = 300 + 50000/40 = 1550 m and the ridge of the first test raises it to
    # 1650 m. Starting at 1600 m the glide stays 50 m above R, so it passes the crest at
    # 1050 + 50 = 1100 m, 100 m over it: 50 m short of the 150 m clearance.
    terrain = ridge(1000.0, 20000.0)
    result = final_glide_clearance(S, REQUIRED, terrain, CLEARANCE, start_height_m=1600.0)
    assert result.start_height_m == 1600.0
    assert result.min_clearance_m == pytest.approx(100.0) and result.at_m == pytest.approx(20000.0)
    assert result.shortfall_m == pytest.approx(50.0)
    assert not result.ok


def test_unknown_terrain_is_never_a_pass():
    terrain = np.full(S.shape, 100.0)
    terrain[80:100] = np.nan  # samples 80-99: from 19.875 km to 24.875 km by their cells
    result = final_glide_clearance(S, REQUIRED, terrain, CLEARANCE)
    assert not result.ok
    (start, end), = result.uncovered
    assert start == pytest.approx(19875.0) and end == pytest.approx(24875.0)
    assert result.covered_share == pytest.approx(1.0 - 5000.0 / 50000.0)
    assert result.raised_by_m == 0.0
    nothing = final_glide_clearance(S, REQUIRED, np.full(S.shape, np.nan), CLEARANCE)
    assert not nothing.ok and math.isnan(nothing.min_clearance_m) and nothing.lowest is None


def test_the_obstacle_is_named_after_the_nearest_landmark():
    lats = 46.0 + S / 111_000.0
    lons = np.full(S.shape, -33.0)
    landmarks = [("Far Hill", 47.5, -33.0), ("Near Gap", 46.2, -33.05)]
    result = final_glide_clearance(S, REQUIRED, ridge(1000.0, 20000.0), CLEARANCE, lats=lats, lons=lons,
                                   landmarks=landmarks)
    assert result.obstacle.near == "Near Gap"
    # Source: GeographicLib for the distance and bearing from the landmark to the crest.
    line = WGS84.Inverse(46.2, -33.05, result.obstacle.lat, result.obstacle.lon)
    assert result.obstacle.near_distance_m == pytest.approx(line["s12"], abs=1e-6)
    assert result.obstacle.near_bearing_deg == pytest.approx(line["azi1"] % 360.0, abs=1e-9)


@settings(max_examples=60, deadline=None)
@given(st.lists(st.floats(0.0, 2500.0), min_size=201, max_size=201), st.floats(0.0, 400.0))
def test_the_adjusted_requirement_is_the_least_that_clears_everything_ahead(heights, clearance):
    # Property: R' clears the terrain ahead by C everywhere, is at least R, and is the
    # least such line: at the obstacle it is exactly T + C.
    terrain = np.array(heights)
    result = final_glide_clearance(S, REQUIRED, terrain, clearance)
    assert np.all(result.adjusted_m >= REQUIRED - 1e-9)
    assert np.all(result.glide_m - terrain >= clearance - 1e-6)
    if result.obstacle is not None:
        assert result.adjusted_m[0] == pytest.approx(REQUIRED[0] + result.obstacle.needed_height_m
                                                     - REQUIRED[S == result.obstacle.at_m][0])


def test_over_a_raster_ridge_the_obstacle_sample_decides(tmp_path):
    # A flat model at 200 m with a plateau at 1400 m five rows deep; the glide flies south
    # down a column of cell centres. A path vertex sits on the plateau's southernmost row
    # centre, so that sample has the plateau's height and the least height ahead of it.
    lat, lon = geographic_centres()
    grid = np.full((ROWS, COLS), 200.0)
    grid[20:25, :] = 1400.0
    terrain = load_terrain(write_raster(tmp_path / "wall.tif", grid, from_origin(WEST, NORTH, STEP, STEP)))
    column = lon[0, 40]
    start, crest, goal = lat[5, 40], lat[24, 40], lat[55, 40]
    per_metre, arrival = 1.0 / 38.0, 200.0 + 200.0
    result = final_glide_over_terrain(terrain, [start, crest, goal], [column] * 3, per_metre, arrival,
                                      CLEARANCE, start_distance_m=12_000.0, landmarks=[("Crest Mast", crest, column)])
    # By hand, with GeographicLib meridian arcs: R(crest) = 400 + d(crest, goal)/38; the
    # requirement rises by 1400 + 150 - R(crest) at the crest.
    to_goal = WGS84.Inverse(crest, column, goal, column)["s12"]
    from_start = WGS84.Inverse(start, column, crest, column)["s12"]
    expected_rise = 1400.0 + CLEARANCE - (arrival + to_goal * per_metre)
    assert expected_rise > 0.0
    assert result.raised_by_m == pytest.approx(expected_rise, abs=1e-6)
    assert result.obstacle.at_m == pytest.approx(12_000.0 + from_start, abs=1e-6)
    assert result.obstacle.near == "Crest Mast" and result.obstacle.near_distance_m == pytest.approx(0.0, abs=1e-6)
    assert result.ok and result.source == terrain.source


def test_required_height_line_adds_each_legs_own_height_per_metre(geographic_plane):
    # By hand: two legs with 1/30 and 1/50 m per metre; at the start R = A + L1/30 + L2/50.
    v_lats, v_lons = [46.5, 46.3, 46.1], [-33.8, -33.6, -33.7]
    profile = sample_path(geographic_plane, v_lats, v_lons)
    line = required_height_line(profile, [1 / 30, 1 / 50], 500.0)
    l1 = WGS84.Inverse(v_lats[0], v_lons[0], v_lats[1], v_lons[1])["s12"]
    l2 = WGS84.Inverse(v_lats[1], v_lons[1], v_lats[2], v_lons[2])["s12"]
    assert line[0] == pytest.approx(500.0 + l1 / 30 + l2 / 50, abs=1e-6)
    turn = np.argmin(np.abs(profile.distance_m - l1))
    assert line[turn] == pytest.approx(500.0 + l2 / 50, abs=1e-6)
    assert line[-1] == pytest.approx(500.0)


def test_terrain_is_a_frozen_dataclass_with_read_only_elevations(geographic_plane):
    assert isinstance(geographic_plane, Terrain)
    with pytest.raises(ValueError):
        geographic_plane.elevation_m[0, 0] = 1.0


# ---------------------------------------------------------------- terrain along the whole task path


@pytest.fixture
def wall_path(tmp_path):
    """The plateau model of the raster-ridge test, and a two-leg path down a column of centres."""
    lat, lon = geographic_centres()
    grid = np.full((ROWS, COLS), 200.0)
    grid[20:25, :] = 1400.0
    terrain = load_terrain(write_raster(tmp_path / "wall2.tif", grid, from_origin(WEST, NORTH, STEP, STEP)))
    column = lon[0, 40]
    vertices = [lat[5, 40], lat[24, 40], lat[55, 40]]  # start, the plateau's southern row centre, finish
    return terrain, vertices, column


def test_the_requirement_hook_and_the_final_glide_report_agree(wall_path):
    from glidetask.engine.clearance_hook import path_terrain

    terrain, v_lats, column = wall_path
    along = path_terrain(terrain, v_lats, [column] * 3, CLEARANCE)
    per_metre, floor = np.array([1 / 30.0, 1 / 42.0]), 400.0
    # By hand (GeographicLib meridian arcs): at the plateau's southern centre (a vertex, so
    # a sample) R = 400 + d(crest, finish)/42, and the terrain demands 1400 + 150 there.
    to_goal = WGS84.Inverse(v_lats[1], column, v_lats[2], column)["s12"]
    first_leg = WGS84.Inverse(v_lats[0], column, v_lats[1], column)["s12"]
    expected = 1400.0 + CLEARANCE - (floor + to_goal / 42.0)
    positions = np.array([0.0, 5000.0, first_leg, first_leg + 2000.0, first_leg + 10_000.0])
    extra = along(positions, np.tile(per_metre, (positions.size, 1)), np.full(positions.size, floor))
    np.testing.assert_allclose(extra[:3], expected, atol=1e-6)
    # One cell (1.1 km) past the plateau's last row centre the ground is back at 200 m.
    np.testing.assert_allclose(extra[3:], 0.0)
    for start in (0.0, 5000.0, first_leg + 10_000.0):
        report = along.final_glide(start, per_metre, floor)
        assert report.raised_by_m == pytest.approx(float(along([start], per_metre[None, :], [floor])[0]), abs=1e-9)
        assert report.distance_m[0] == start and report.distance_m[-1] == pytest.approx(along.profile.total_m)
    report = along.final_glide(0.0, per_metre, floor)
    # The pure requirement at the start: floor + L1/30 + L2/42.
    assert report.required_m[0] == pytest.approx(floor + first_leg / 30.0 + to_goal / 42.0, abs=1e-6)
    assert report.obstacle.at_m == pytest.approx(first_leg, abs=1e-6)


def test_the_requirement_hook_takes_many_flights_at_once(wall_path):
    from glidetask.engine.clearance_hook import path_terrain

    terrain, v_lats, column = wall_path
    along = path_terrain(terrain, v_lats, [column] * 3, CLEARANCE)
    rng = np.random.default_rng(5)
    positions = rng.uniform(0.0, along.profile.total_m, 50)
    per_metre = rng.uniform(1 / 60.0, 1 / 20.0, (50, 2))
    floors = rng.uniform(300.0, 600.0, 50)
    together = along(positions, per_metre, floors)
    one_by_one = [float(along([p], h[None, :], [f])[0]) for p, h, f in zip(positions, per_metre, floors)]
    np.testing.assert_allclose(together, one_by_one, atol=1e-9)
    assert np.all(together >= 0.0)


# ---------------------------------------------------------------- the requirement hook, fast and direct


def direct_extra_required(profile, clearance_m, position_m, height_per_metre, floor_m):
    """The requirement hook's definition, evaluated sample by sample (O(n J), for checking).

    At a point ``x`` on leg ``k``: ``max(0, T(x) + C - R(x), max over samples s_j >= x of
    T_j + C - R_j)``, with ``R(s) = F + h_l (E_l - s) + sum over later legs of h_m L_m`` on
    leg ``l`` (contract section 3, "required height at a point", with each leg's own table)
    and unknown terrain left out.
    """
    vertex = profile.vertex_distance_m
    lengths = np.diff(vertex)
    last_leg = lengths.size - 1

    def leg_of(s):
        return int(np.clip(np.searchsorted(vertex, s, side="right") - 1, 0, last_leg))

    def required(s, h, floor):
        leg = leg_of(s)
        later = sum(h[m] * lengths[m] for m in range(leg + 1, lengths.size) if lengths[m] != 0.0)
        return floor + h[leg] * (vertex[leg + 1] - s) + later

    out = []
    for x, h, floor in zip(position_m, height_per_metre, floor_m):
        candidates = [0.0, np.interp(x, profile.distance_m, profile.elevation_m) + clearance_m - required(x, h, floor)]
        candidates += [t + clearance_m - required(s, h, floor)
                       for s, t in zip(profile.distance_m, profile.elevation_m) if s >= x]
        finite = [c for c in candidates if np.isfinite(c)]
        out.append(max(finite))
    return np.array(out)


def _profile(distance, elevation, vertex):
    from glidetask.engine.terrain_profile import PathProfile

    distance = np.asarray(distance, dtype=float)
    segment = np.clip(np.searchsorted(vertex, distance, side="right") - 1, 0, max(len(vertex) - 2, 0))
    return PathProfile(distance_m=distance, lats=np.zeros(distance.size), lons=np.zeros(distance.size),
                       elevation_m=np.asarray(elevation, dtype=float), segment=segment,
                       vertex_distance_m=np.asarray(vertex, dtype=float))


@st.composite
def random_paths(draw):
    """A path of 1-4 legs (some of zero length), samples with repeats, rough or terraced
    terrain with gaps, and flights with any heights per metre (rising air makes them negative)."""
    legs = draw(st.integers(1, 4))
    lengths = draw(st.lists(st.sampled_from([0.0, 800.0, 2500.0, 7000.0]) | st.floats(0.0, 9000.0),
                            min_size=legs, max_size=legs))
    vertex = np.concatenate(([0.0], np.cumsum(lengths)))
    seed = draw(st.integers(0, 2**32 - 1))
    rng = np.random.default_rng(seed)
    inner = rng.uniform(0.0, vertex[-1], rng.integers(0, 60))
    distance = np.sort(np.concatenate((vertex, inner, inner[: rng.integers(0, 3)])))
    elevation = rng.normal(600.0, 300.0, distance.size)
    if draw(st.booleans()):
        elevation = np.round(elevation, -2)  # terraces: many equal heights, collinear samples
    elevation[rng.uniform(size=distance.size) < draw(st.sampled_from([0.0, 0.1, 0.5]))] = np.nan
    flights = 40
    position = rng.uniform(-100.0, vertex[-1] + 100.0, flights)
    position[:10] = distance[rng.integers(0, distance.size, 10)]  # exactly on samples
    per_metre = rng.uniform(-0.02, 0.08, (flights, legs))
    per_metre[rng.uniform(size=per_metre.shape) < 0.05] = np.nan  # a flight without a table
    floor = rng.uniform(0.0, 600.0, flights)
    clearance = draw(st.floats(0.0, 300.0))
    return _profile(distance, elevation, vertex), clearance, position, per_metre, floor


# Each way the hook finds the largest shortfall ahead, forced by its batch-size limit:
# convex hulls (large batches) and every sample (small batches).
SEARCHES = pytest.mark.parametrize("direct_limit", [0, 10**12], ids=["hulls", "every-sample"])


@SEARCHES
@settings(max_examples=100, deadline=None)
@given(case=random_paths())
def test_the_fast_requirement_hook_equals_the_direct_maximum(direct_limit, case):
    # The hook searches convex hulls of the samples ahead instead of every sample: the
    # answer must be the direct maximum's, to round-off (1e-9 m).
    from glidetask.engine import flight_ground
    from glidetask.engine.clearance_hook import PathTerrain

    profile, clearance, position, per_metre, floor = case
    with mock.patch.object(flight_ground, "DIRECT_PAIRS_LIMIT", direct_limit):
        fast = PathTerrain(profile, clearance)(position, per_metre, floor)
    direct = direct_extra_required(profile, clearance, position, per_metre, floor)
    np.testing.assert_allclose(fast, direct, rtol=0.0, atol=1e-9)


@SEARCHES
def test_the_fast_requirement_hook_equals_the_direct_maximum_over_the_demo_terrain(direct_limit, demo_dir):
    # The demo triangle's planned path over the demo model (hills, a ridge, the plain), and
    # final-glide tables across the whole plausible range (glide ratios 15 to 60).
    from glidetask.engine import flight_ground
    from glidetask.engine.clearance_hook import path_terrain
    from glidetask.engine.task_search import optimized_path
    from glidetask.formats.task_file import load_scenario

    scenario = load_scenario(demo_dir / "vardmoor-triangle-300.toml")
    path = optimized_path(scenario.task)
    along = path_terrain(load_terrain(demo_dir / "terrain.tif"), path.lats, path.lons, 150.0)
    rng = np.random.default_rng(11)
    count = 120
    position = rng.uniform(0.0, along.profile.total_m, count)
    per_metre = rng.uniform(1 / 60.0, 1 / 15.0, (count, len(path.legs)))
    floor = rng.uniform(100.0, 800.0, count)
    with mock.patch.object(flight_ground, "DIRECT_PAIRS_LIMIT", direct_limit):
        fast = along(position, per_metre, floor)
    assert np.count_nonzero(fast) > count // 4  # the terrain does decide somewhere
    direct = direct_extra_required(along.profile, 150.0, position, per_metre, floor)
    np.testing.assert_allclose(fast, direct, rtol=0.0, atol=1e-9)
    # And it agrees with the final-glide check's own suffix maximum (another code path).
    for i in range(0, count, 17):
        report = along.final_glide(position[i], per_metre[i], floor[i])
        assert report.raised_by_m == pytest.approx(fast[i], abs=1e-9)
