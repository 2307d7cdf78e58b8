"""Landable reach and coverage: glide range in wind, gaps between fields, terrain in the way.

Expected values are worked by hand from the glide ratio (distance = height x L/D, common
practice), by brute force over the polar, and with GeographicLib for positions.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
import rasterio
from affine import Affine
from geographiclib.geodesic import Geodesic
from hypothesis import given, settings
from hypothesis import strategies as st

from glidetask.engine.polar import PolarSpec, scaled_polar
from glidetask.engine.reach import (
    OUT_OF_RANGE, REACHABLE, TERRAIN_BLOCKED, TERRAIN_UNKNOWN, landable_index, reach_distance,
)
from glidetask.engine.reach_coverage import coverage
from glidetask.engine.scenario import Wind
from glidetask.engine.speedtofly import glide_in_wind
from glidetask.engine.task import Turnpoint
from glidetask.engine.terrain import load_terrain
from glidetask.engine.wind import wind_components

WGS84 = Geodesic.WGS84
KMH = 1 / 3.6
# An invented polar, not any real aircraft.
SPEC = PolarSpec(
    label="test 15 m", wing_area_m2=10.5, reference_mass_kg=350.0, empty_mass_kg=260.0,
    max_ballast_kg=170.0, max_mass_kg=525.0, vne_ias_ms=270 * KMH, min_speed_ias_ms=70 * KMH,
    points=((80 * KMH, 0.62), (100 * KMH, 0.64), (120 * KMH, 0.80), (150 * KMH, 1.20), (180 * KMH, 1.85)),
)
POLAR = scaled_polar(SPEC, 350.0)
LD = POLAR.best_ld
BAND_BOTTOM, MARGIN = 1000.0, 200.0
CALM = Wind()


def field(name, lat, lon, elevation=0.0, landable=True):
    return Turnpoint(name=name, code=None, lat=lat, lon=lon, elevation_m=elevation, landable=landable,
                     kind="field" if landable else "waypoint")


def meridian_path(length_km, lat0=46.0, lon=-33.0, step_m=1000.0):
    """Samples every ``step_m`` northward along a meridian (a geodesic), by GeographicLib."""
    line = WGS84.Line(lat0, lon, 0.0)
    s = np.arange(0.0, length_km * 1000.0 + step_m / 2, step_m)
    points = [line.Position(x) for x in s]
    return np.array([p["lat2"] for p in points]), np.array([p["lon2"] for p in points]), s


def on_meridian(distance_m, lat0=46.0, lon=-33.0):
    p = WGS84.Direct(lat0, lon, 0.0, distance_m)
    return p["lat2"], p["lon2"]


# ---------------------------------------------------------------- reach


def test_with_no_wind_reach_is_height_above_the_field_less_margin_times_best_glide_ratio():
    # Source: distance = (height above the field - margin) x L/D in still air (common practice).
    height_above = BAND_BOTTOM - 250.0  # a field at 250 m
    expected = (height_above - MARGIN) * LD
    assert reach_distance(POLAR, height_above - MARGIN) == pytest.approx(expected, rel=1e-9)
    np.testing.assert_allclose(reach_distance(POLAR, height_above - MARGIN, course_deg=[0.0, 90.0, 271.0]),
                               expected, rtol=1e-9)
    assert reach_distance(POLAR, -10.0) == 0.0


def test_downwind_reaches_farther_than_upwind():
    # Source: a tailwind adds to the ground speed, a headwind takes from it (common practice).
    wind = Wind(from_deg=0.0, speed_ms=25 * KMH)  # from the north
    downwind = reach_distance(POLAR, 800.0, course_deg=180.0, wind=wind)
    upwind = reach_distance(POLAR, 800.0, course_deg=0.0, wind=wind)
    calm = reach_distance(POLAR, 800.0)
    assert downwind > calm > upwind


def test_reach_in_wind_matches_a_brute_force_search_over_the_polar():
    # Source: the best glide over the ground in wind maximises (v + W) / sink(v) (tangent
    # from (-W, 0) to the polar, common practice); brute force over 0.5 mm/s of airspeed,
    # which fixes L/D to about 1e-8 relative.
    for tail in (-20 * KMH, 15 * KMH):
        speeds = np.arange(POLAR.min_speed_ms, POLAR.vne_ms, 0.0005)
        best_ld = np.max((speeds + tail) / POLAR.sink(speeds))
        course, wind = (180.0, Wind(0.0, tail)) if tail > 0 else (0.0, Wind(0.0, -tail))
        assert reach_distance(POLAR, 500.0, course_deg=course, wind=wind) == pytest.approx(500.0 * best_ld, rel=1e-7)


def landables_around(point_lat, point_lon, distance_m):
    north = WGS84.Direct(point_lat, point_lon, 0.0, distance_m)
    south = WGS84.Direct(point_lat, point_lon, 180.0, distance_m)
    return field("Upwind Farm", north["lat2"], north["lon2"]), field("Downwind Farm", south["lat2"], south["lon2"])


def test_a_field_straight_downwind_is_in_reach_from_farther_than_one_straight_upwind():
    wind = Wind(from_deg=0.0, speed_ms=25 * KMH)
    available = BAND_BOTTOM - MARGIN  # fields at sea level
    downwind = reach_distance(POLAR, available, course_deg=180.0, wind=wind)
    upwind = reach_distance(POLAR, available, course_deg=0.0, wind=wind)
    distance = 0.5 * (downwind + upwind)  # beyond the upwind reach, inside the downwind one
    up, down = landables_around(46.0, -33.0, distance)
    path = ([46.0], [-33.0], [0.0], [0])
    both = coverage(*path, [up, down], POLAR, wind, BAND_BOTTOM, MARGIN)
    assert both.status[0] == REACHABLE and both.best_name(0) == "Downwind Farm"
    only_up = coverage(*path, [up], POLAR, wind, BAND_BOTTOM, MARGIN)
    assert only_up.status[0] == OUT_OF_RANGE and only_up.coverage_percent == 0.0
    # The height to spare at the downwind field: (H - E - S) - D / (L/D over the ground).
    glide = glide_in_wind(POLAR, 0.0, *wind_components(180.0, 0.0, wind.speed_ms))
    assert both.spare_height_m[0] == pytest.approx(available - distance * glide.height_per_metre, abs=1e-3)
    # Calm: the same fields at the same distance are both out of reach or both in.
    calm = coverage(*path, [up, down], POLAR, CALM, BAND_BOTTOM, MARGIN)
    assert calm.status[0] == (REACHABLE if distance <= available * LD else OUT_OF_RANGE)


# ---------------------------------------------------------------- coverage and gaps


def test_fields_spaced_wider_than_twice_the_range_leave_the_gaps_computed_by_hand():
    # By hand: fields at sea level at 0, 80 and 160 km along the path, band bottom 1000 m,
    # margin 200 m, calm: each is in reach within R = 800 x L/D of it (about 34 km here),
    # so the gaps are (R, 80 - R) and (80 + R, 160 - R) km.
    reach = (BAND_BOTTOM - MARGIN) * LD
    assert 2 * reach < 80_000.0
    lats, lons, s = meridian_path(160)
    fields = [field(name, *on_meridian(at)) for name, at in (("Ashfield", 0.0), ("Bramble", 80_000.0),
                                                               ("Cobham", 160_000.0))]
    legs = (s >= 80_000.0).astype(int)
    result = coverage(lats, lons, s, legs, fields, POLAR, CALM, BAND_BOTTOM, MARGIN)
    # Tolerance: the edges are interpolated between 1 km samples along a straight line
    # through the fields, where the height to spare is linear: exact to round-off.
    expected = [(reach, 80_000.0 - reach), (80_000.0 + reach, 160_000.0 - reach)]
    assert len(result.gaps) == 2
    for (start, end), (e_start, e_end) in zip(result.gaps, expected):
        assert start == pytest.approx(e_start, abs=0.01) and end == pytest.approx(e_end, abs=0.01)
    assert result.coverage_percent == pytest.approx(100.0 * (1.0 - 2 * (80_000.0 - 2 * reach) / 160_000.0), abs=1e-5)
    # Per sample: the best field and the height to spare, H - E - S - d / (L/D).
    k = 10  # 10 km out
    assert result.best_name(k) == "Ashfield"
    assert result.spare_height_m[k] == pytest.approx(800.0 - 10_000.0 / LD, abs=1e-3)
    assert result.best_distance_m[k] == pytest.approx(10_000.0, abs=1e-3)
    assert result.status[40] == OUT_OF_RANGE and result.best_landable[40] == -1
    # By leg: each leg passes over a field (distance 0).
    first, second = result.by_leg
    assert (first.leg, first.nearest, first.distance_m) == (0, "Ashfield", pytest.approx(0.0, abs=1e-6))
    assert [name for name, _ in first.alternates] == ["Ashfield", "Bramble"]
    assert first.alternates[1][1] == pytest.approx(1000.0, abs=1e-6)  # from the 79 km sample
    assert second.nearest in ("Bramble", "Cobham") and second.distance_m == pytest.approx(0.0, abs=1e-6)
    assert {name for name, _ in second.alternates} == {"Bramble", "Cobham"}


def test_a_gap_at_the_start_and_at_the_end_of_the_path():
    # By hand: one field at 50 km on a 100 km path: gaps (0, 50 - R) and (50 + R, 100).
    reach = (BAND_BOTTOM - MARGIN) * LD
    lats, lons, s = meridian_path(100)
    result = coverage(lats, lons, s, np.zeros(s.size, int), [field("Middle Lea", *on_meridian(50_000.0))],
                      POLAR, CALM, BAND_BOTTOM, MARGIN)
    (a0, a1), (b0, b1) = result.gaps
    assert a0 == 0.0 and a1 == pytest.approx(50_000.0 - reach, abs=0.01)
    assert b0 == pytest.approx(50_000.0 + reach, abs=0.01) and b1 == pytest.approx(100_000.0, abs=1e-6)
    assert result.coverage_percent == pytest.approx(100.0 * 2 * reach / 100_000.0, abs=1e-5)


def test_only_turnpoints_marked_landable_count_and_field_elevation_matters():
    lats, lons, s = meridian_path(20)
    here = on_meridian(10_000.0)
    not_landable = coverage(lats, lons, s, 0, [field("Mast", *here, landable=False)], POLAR, CALM,
                            BAND_BOTTOM, MARGIN)
    assert not_landable.coverage_percent == 0.0 and not_landable.landable_count == 0
    # A field 850 m up leaves 1000 - 850 - 200 < 0: not even overhead is it in reach.
    high = coverage(lats, lons, s, 0, [field("High Moor", *here, elevation=850.0)], POLAR, CALM,
                    BAND_BOTTOM, MARGIN)
    assert high.coverage_percent == 0.0
    # At 700 m: 100 m to lose, R = 100 x L/D either side of the field.
    low = coverage(lats, lons, s, 0, [field("Low Moor", *here, elevation=700.0)], POLAR, CALM,
                   BAND_BOTTOM, MARGIN)
    assert low.coverage_percent == pytest.approx(100.0 * 2 * 100.0 * LD / 20_000.0, abs=1e-4)


# ---------------------------------------------------------------- terrain


def write_raster(path, grid, west, north, step):
    with rasterio.open(path, "w", driver="GTiff", height=grid.shape[0], width=grid.shape[1], count=1,
                       dtype="float64", crs="EPSG:4326", transform=Affine(step, 0.0, west, 0.0, -step, north),
                       nodata=-9999.0) as dst:
        dst.write(grid, 1)
    return load_terrain(path)


STEP = 0.01  # about 1.1 km north-south


def wall_terrain(tmp_path, wall_m, name="wall.tif", rows=(3, 6)):
    """Sea-level ground north of 46 N with an east-west wall three rows deep, 3-6 rows north of 46 N."""
    grid = np.zeros((40, 40))
    grid[40 - rows[1]:40 - rows[0], :] = wall_m  # rows counted from the south edge at 46.0 N
    return write_raster(tmp_path / name, grid, -33.2, 46.0 + 40 * STEP, STEP)


def test_a_wall_in_the_way_blocks_a_glide_that_clears_the_ground_otherwise(tmp_path):
    # By hand: the glider leaves 1000 m at 46.0 N for a sea-level field 12 km north; the wall
    # (3.3-6.7 km north at its cell edges) is crossed by about 7 km, where the glide line is
    # at 1000 - 7000 / L/D, about 830 m. A 600 m wall leaves about 230 m (> 150 m): clear.
    # An 800 m wall leaves about 30 m: blocked.
    path = ([46.0], [-33.0], [0.0], [0])
    farm = [field("North Farm", *on_meridian(12_000.0))]
    assert 1000.0 - 7000.0 / LD - 600.0 > 150.0 + 50.0 and 1000.0 - 7000.0 / LD - 800.0 < 150.0 - 50.0
    clear = coverage(*path, farm, POLAR, CALM, BAND_BOTTOM, MARGIN, terrain=wall_terrain(tmp_path, 600.0, "a.tif"),
                     clearance_m=150.0)
    assert clear.status[0] == REACHABLE and clear.terrain_checked
    blocked = coverage(*path, farm, POLAR, CALM, BAND_BOTTOM, MARGIN, terrain=wall_terrain(tmp_path, 800.0, "b.tif"),
                       clearance_m=150.0)
    assert blocked.status[0] == TERRAIN_BLOCKED and blocked.coverage_percent == 0.0
    assert blocked.by_leg[0].nearest is None
    without = coverage(*path, farm, POLAR, CALM, BAND_BOTTOM, MARGIN)
    assert without.status[0] == REACHABLE and not without.terrain_checked


def test_the_band_bottom_too_close_to_the_ground_is_a_gap(tmp_path):
    # By hand: over ground at 900 m the band bottom (1000 m) is 100 m up, less than the
    # 150 m clearance: nothing counts as in reach from there, whatever the fields.
    terrain = wall_terrain(tmp_path, 900.0, rows=(0, 40))
    result = coverage([46.2], [-33.0], [0.0], [0], [field("Next Door", 46.201, -33.0, elevation=0.0)],
                      POLAR, CALM, BAND_BOTTOM, MARGIN, terrain=terrain)
    assert result.status[0] == TERRAIN_BLOCKED


def test_terrain_the_model_does_not_cover_is_unknown_never_clear(tmp_path):
    # The model spans 46.0-46.4 N; a field 60 km north is beyond it. Calm air, low field.
    terrain = wall_terrain(tmp_path, 0.0, "flat.tif")
    far = [field("Beyond", *on_meridian(50_000.0), elevation=0.0)]
    result = coverage([46.0], [-33.0], [0.0], [0], far, POLAR, CALM, 2000.0, MARGIN, terrain=terrain)
    assert result.status[0] == TERRAIN_UNKNOWN and result.coverage_percent == 0.0
    assert coverage([46.0], [-33.0], [0.0], [0], far, POLAR, CALM, 2000.0, MARGIN).status[0] == REACHABLE


# ---------------------------------------------------------------- the spatial index prunes nothing it should keep


@settings(max_examples=25, deadline=None)
@given(st.integers(0, 10_000), st.floats(0.0, 360.0), st.floats(0.0, 40.0))
def test_pruning_agrees_with_a_brute_force_over_every_pair(seed, wind_from, wind_kmh):
    # Source: brute force: every (sample, field) pair, GeographicLib distance and course,
    # the height used per metre from glide_in_wind on that exact course. Tolerance: the
    # coverage interpolates the height per metre between 0.25 deg courses (about 1e-8 m/m).
    rng = np.random.default_rng(seed)
    lats, lons, s = meridian_path(60, step_m=2000.0)
    f_lats, f_lons = rng.uniform(45.7, 46.9, 60), rng.uniform(-33.6, -32.4, 60)
    elevations = rng.uniform(0.0, 600.0, 60)
    fields = [field(f"F{i}", *ll, e) for i, (*ll, e) in enumerate(zip(f_lats, f_lons, elevations))]
    wind = Wind(wind_from, wind_kmh * KMH)
    result = coverage(lats, lons, s, 0, fields, POLAR, wind, BAND_BOTTOM, MARGIN)
    lines = [[WGS84.Inverse(lat, lon, f.lat, f.lon) for f in fields] for lat, lon in zip(lats, lons)]
    distance = np.array([[line["s12"] for line in row] for row in lines])
    course = np.array([[line["azi1"] % 360.0 for line in row] for row in lines])
    per_metre = glide_in_wind(POLAR, 0.0, *wind_components(course, wind.from_deg, wind.speed_ms)).height_per_metre
    per_metre = np.where(np.isfinite(per_metre), per_metre, np.inf)
    spares = BAND_BOTTOM - elevations[None, :] - MARGIN - distance * per_metre
    best = np.max(spares, axis=1)
    clearly_in, clearly_out = best >= 0.01, best < -0.01
    assert np.all(result.status[clearly_in] == REACHABLE)
    np.testing.assert_allclose(result.spare_height_m[clearly_in], best[clearly_in], atol=0.01)
    assert np.all(result.status[clearly_out] == OUT_OF_RANGE)


def test_an_index_can_be_reused_and_ignores_waypoints():
    fields = [field("A", 46.0, -33.0), field("B", 46.1, -33.0, landable=False)]
    index = landable_index(fields)
    assert index.names == ("A",) and len(index) == 1
    result = coverage([46.0], [-33.0], [0.0], [0], index, POLAR, CALM, BAND_BOTTOM, MARGIN)
    assert result.best_name(0) == "A"


def test_no_landables_at_all_is_a_result_not_a_crash():
    lats, lons, s = meridian_path(10)
    result = coverage(lats, lons, s, 0, [], POLAR, CALM, BAND_BOTTOM, MARGIN)
    assert result.coverage_percent == 0.0 and result.gaps == ((0.0, 10_000.0),)
    assert result.by_leg[0].nearest is None and math.isnan(result.by_leg[0].distance_m)


def test_a_gap_says_how_much_of_it_is_terrain_and_how_much_is_range(tmp_path):
    # By hand: one field at the start, 600 m up: 1000 - 600 - 200 = 200 m to lose, so it is
    # in reach for 200 x L/D (about 8.5 km). Ground at 900 m from 46.1 to 46.2 N (about
    # 11.1 km of the path, GeographicLib) puts the band bottom within 150 m of it there.
    grid = np.zeros((40, 40))
    grid[20:30, :] = 900.0  # rows 20-29 from the top at 46.4 N: 46.2 down to 46.1 N
    terrain = write_raster(tmp_path / "plateau.tif", grid, -33.2, 46.4, STEP)
    lats, lons, s = meridian_path(40)
    result = coverage(lats, lons, s, 0, [field("Start Field", 46.0, -33.0, elevation=600.0)], POLAR, CALM,
                      BAND_BOTTOM, MARGIN, terrain=terrain)
    ((start, end),) = result.gaps
    assert start == pytest.approx(200.0 * LD, abs=1.0) and end == pytest.approx(40_000.0)
    (parts,) = result.gap_breakdown()
    plateau = WGS84.Inverse(46.1, -33.0, 46.2, -33.0)["s12"]
    # Tolerance: samples every 1 km, and bilinear ramps half a cell (0.55 km) at each edge.
    assert parts["terrain"] == pytest.approx(plateau, abs=1600.0)
    assert parts["range"] + parts["terrain"] == pytest.approx(end - start, abs=1000.0)
    assert parts["unknown"] == 0.0
    assert result.gap_reasons() == ("range",)


def test_the_tree_and_the_direct_pair_search_find_the_same_landables(monkeypatch):
    import glidetask.engine.reach_coverage as reach_coverage

    rng = np.random.default_rng(11)
    lats, lons, s = meridian_path(80, step_m=1000.0)
    fields = [field(f"F{i}", a, b, e) for i, (a, b, e) in
              enumerate(zip(rng.uniform(45.6, 47.0, 400), rng.uniform(-33.8, -32.2, 400), rng.uniform(0, 700, 400)))]
    wind = Wind(300.0, 30 * KMH)
    direct = coverage(lats, lons, s, 0, fields, POLAR, wind, BAND_BOTTOM, MARGIN)
    monkeypatch.setattr(reach_coverage, "_DIRECT_PAIRS", 0)
    tree = coverage(lats, lons, s, 0, fields, POLAR, wind, BAND_BOTTOM, MARGIN)
    np.testing.assert_array_equal(direct.status, tree.status)
    np.testing.assert_array_equal(direct.best_landable, tree.best_landable)
    np.testing.assert_allclose(direct.spare_height_m, tree.spare_height_m, atol=1e-9)
    assert direct.gaps == tree.gaps and direct.by_leg == tree.by_leg
