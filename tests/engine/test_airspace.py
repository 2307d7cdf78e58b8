"""Airspace volumes along a path: crossings, limits, band caps and conflicts.

Crossings are checked against independent computations: shapely (a separate geometry
library) on a local azimuthal equidistant projection from pyproj, with distances along the
path from geographiclib; and a hand computation along a meridian. Flight levels are checked
against ISO 2533 and a numerical integration of the hypsometric equation; AGL limits over an
analytic terrain.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from geographiclib.geodesic import Geodesic
from pyproj import Geod, Transformer
from scipy.integrate import quad
from shapely.geometry import LineString, Point, Polygon

from glidetask.engine import geodesy
from glidetask.engine.airspace import (Airspace, Limit, Volume, flight_level_msl_m, limit_msl_m, limits_along,
                                       nearest_point_ground)
from glidetask.engine.airspace_conflicts import band_top_cap, check_path, conflicts
from glidetask.engine.airspace_crossings import path_stretches
from glidetask.engine.atmosphere import isa_pressure

WGS84 = Geodesic.WGS84
GROUND = Limit(0.0, "m", "AGL")
#: The brief's promise for where a crossing starts and ends along a leg [m].
CROSSING_TOLERANCE_M = 50.0


def _ring(points):
    ring = np.array(points, dtype=float)
    return ring if np.array_equal(ring[0], ring[-1]) else np.vstack([ring, ring[:1]])


def _volume(rings, name="V", floor=GROUND, ceiling=Limit(1500.0, "m", "MSL"), cls="D"):
    return Volume(name, cls, floor, ceiling, (tuple(_ring(r) for r in rings),))


# Polygons around the invented region (46 N, 33 W): irregular, concave, with a hole.
IRREGULAR = [[[-33.6, 45.8], [-33.1, 45.75], [-32.9, 46.1], [-33.3, 46.3], [-33.7, 46.15]]]
CONCAVE = [[[-33.6, 45.8], [-32.9, 45.8], [-32.9, 46.3], [-33.1, 46.3], [-33.1, 45.95],
            [-33.4, 45.95], [-33.4, 46.3], [-33.6, 46.3]]]
WITH_HOLE = [[[-33.7, 45.7], [-32.8, 45.7], [-32.8, 46.35], [-33.7, 46.35]],
             [[-33.45, 45.9], [-33.05, 45.9], [-33.05, 46.15], [-33.45, 46.15]]]
LEGS = [((45.6, -33.9), (46.4, -32.6)), ((46.02, -34.0), (45.98, -32.5)), ((45.65, -33.25), (46.45, -33.2))]


def _shapely_stretches(rings, start, end):
    """Stretches [m] of the geodesic start->end inside the polygon, by shapely on a local
    azimuthal equidistant projection; polygon edges straight in lon/lat (RFC 7946 3.1.1),
    densified before projecting; distances along the leg from geographiclib."""
    every = np.vstack([_ring(r) for r in rings])
    lon0, lat0 = every[:, 0].mean(), every[:, 1].mean()
    to_xy = Transformer.from_crs("EPSG:4326", f"+proj=aeqd +lat_0={lat0} +lon_0={lon0} +ellps=WGS84",
                                 always_xy=True)
    to_ll = Transformer.from_crs(f"+proj=aeqd +lat_0={lat0} +lon_0={lon0} +ellps=WGS84", "EPSG:4326",
                                 always_xy=True)

    def dense(ring):
        ring = _ring(ring)
        out = [np.linspace(a, b, 200, endpoint=False) for a, b in zip(ring[:-1], ring[1:])]
        points = np.vstack(out + [ring[:1]])
        return list(zip(*to_xy.transform(points[:, 0], points[:, 1])))

    polygon = Polygon(dense(rings[0]), [dense(r) for r in rings[1:]])
    line = Geod(ellps="WGS84").npts(start[1], start[0], end[1], end[0], 2000)
    lons = [start[1]] + [p[0] for p in line] + [end[1]]
    lats = [start[0]] + [p[1] for p in line] + [end[0]]
    path = LineString(list(zip(*to_xy.transform(lons, lats))))
    pieces = polygon.intersection(path)
    pieces = [pieces] if pieces.geom_type == "LineString" else list(getattr(pieces, "geoms", []))
    out = []
    for piece in pieces:
        ends = []
        for x, y in (piece.coords[0], piece.coords[-1]):
            lon, lat = to_ll.transform(x, y)
            ends.append(WGS84.Inverse(start[0], start[1], lat, lon)["s12"])
        out.append(tuple(sorted(ends)))
    return sorted(out)


@pytest.mark.parametrize("rings", [IRREGULAR, CONCAVE, WITH_HOLE], ids=["irregular", "concave", "hole"])
@pytest.mark.parametrize("leg", LEGS, ids=["diagonal", "east", "north"])
def test_crossing_stretches_match_shapely_on_a_local_projection(rings, leg):
    # Source: shapely 2 (GEOS) intersection on a pyproj azimuthal equidistant projection;
    # distances along the geodesic by geographiclib (Karney 2013). Tolerance: the brief's 50 m.
    airspace = Airspace((_volume(rings),))
    lats, lons, along = geodesy.path_points([leg[0][0], leg[1][0]], [leg[0][1], leg[1][1]], 250.0)
    found = [(s.from_m, s.to_m) for s in path_stretches(airspace, lats, lons, along)]
    expected = _shapely_stretches(rings, *leg)
    assert len(found) == len(expected) and expected
    np.testing.assert_allclose(np.array(found), np.array(expected), atol=CROSSING_TOLERANCE_M)


def test_point_in_polygon_matches_shapely_with_a_hole():
    # Source: shapely 2 point-in-polygon in lon/lat, where GeoJSON edges are straight (RFC 7946 3.1.1).
    rng = np.random.default_rng(7)
    lons = rng.uniform(-33.8, -32.7, 4000)
    lats = rng.uniform(45.65, 46.4, 4000)
    for rings in (IRREGULAR, CONCAVE, WITH_HOLE):
        polygon = Polygon(_ring(rings[0]), [_ring(r) for r in rings[1:]])
        expected = np.array([polygon.contains(Point(x, y)) for x, y in zip(lons, lats)])
        assert np.array_equal(_volume(rings).contains(lats, lons), expected)
        assert 0 < expected.sum() < expected.size


def test_crossings_along_a_meridian_by_hand():
    # Source (hand computation): along the meridian 0.5 E from 0.5 S the square [0,1]x[0,1]
    # with the hole [0.4,0.6]x[0.4,0.6] is entered at 0 and 0.6 N and left at 0.4 and 1 N.
    # A degree of latitude near the equator is 110 574 m on WGS84 (from memory; it changes by
    # under 2 m between 0.5 S and 1.5 N), so the crossings lie at 0.5, 0.9, 1.1 and 1.5 degrees.
    square = [[0, 0], [1, 0], [1, 1], [0, 1]]
    hole = [[0.4, 0.4], [0.6, 0.4], [0.6, 0.6], [0.4, 0.6]]
    airspace = Airspace((_volume([square, hole]),))
    lats, lons, along = geodesy.path_points([-0.5, 1.5], [0.5, 0.5], 250.0)
    found = [(s.from_m, s.to_m) for s in path_stretches(airspace, lats, lons, along)]
    degree = 110574.0
    np.testing.assert_allclose(found, [(0.5 * degree, 0.9 * degree), (1.1 * degree, 1.5 * degree)], atol=5.0)


def test_a_path_across_the_antimeridian_meets_a_volume_split_there():
    # Source (hand computation): RFC 7946 3.1.9 splits such a polygon in two at 180; along
    # the equator 1 degree is 111 319.5 m (from memory: a = 6 378 137 m, 2 pi a / 360).
    east = _ring([[179.5, -0.5], [180, -0.5], [180, 0.5], [179.5, 0.5]])
    west = _ring([[-180, -0.5], [-179.5, -0.5], [-179.5, 0.5], [-180, 0.5]])
    airspace = Airspace((Volume("Dateline", None, GROUND, Limit(1000, "m", "MSL"), ((east,), (west,))),))
    lats, lons, along = geodesy.path_points([0.0, 0.0], [179.0, -179.0], 250.0)
    found = [(s.from_m, s.to_m) for s in path_stretches(airspace, lats, lons, along)]
    np.testing.assert_allclose(found, [(0.5 * 111319.5, 1.5 * 111319.5)], atol=5.0)


def test_the_index_finds_exactly_the_volumes_whose_boxes_meet_the_path():
    # Source (hand computation): a box test done one volume at a time.
    rng = np.random.default_rng(3)
    volumes = []
    for k in range(500):
        lon, lat, size = rng.uniform(-35.5, -31.5), rng.uniform(45.0, 47.5), rng.uniform(0.02, 0.3)
        volumes.append(_volume([[[lon, lat], [lon + size, lat], [lon + size, lat + size], [lon, lat + size]]],
                               name=f"V{k}"))
    airspace = Airspace(tuple(volumes))
    lats, lons = np.array([45.6, 46.2]), np.array([-34.0, -33.0])
    expected = [k for k, v in enumerate(volumes) if v.bbox[0] <= lons.max() and v.bbox[2] >= lons.min()
                and v.bbox[1] <= lats.max() and v.bbox[3] >= lats.min()]
    assert airspace.near(lats, lons).tolist() == expected
    assert 0 < len(expected) < 500


# ---------------------------------------------------------------- limits


def test_fl65_at_isa_is_its_pressure_altitude():
    # Source: ISO 2533:1975 troposphere, p = p0 (1 - L H / T0)^(g0/(R L)); FL65 is the
    # pressure altitude 6500 ft = 1981.2 m (geopotential), 1981.8 m geometric (r = 6 356 766 m).
    height = flight_level_msl_m(65.0)
    assert height == pytest.approx(1981.2 * 6356766.0 / (6356766.0 - 1981.2), abs=0.01)
    expected_pa = 101325.0 * (1.0 - 0.0065 * 1981.2 / 288.15) ** 5.255877
    assert isa_pressure(height) == pytest.approx(expected_pa, rel=1e-5)
    # Source (from memory): ISO 2533 tabulates 795.0 hPa at 2000 m; FL65 lies 18.8 m lower,
    # where pressure is higher by 18.8 m x 0.0894 hPa/m = 1.7 hPa.
    assert expected_pa / 100.0 == pytest.approx(796.7, abs=0.2)


def test_fl65_at_isa_plus_15_by_the_hypsometric_equation():
    # Source: the hypsometric equation dz = -(R T / g0) dp / p (ISO 2533's own basis),
    # integrated numerically from 1013.25 hPa to the pressure of FL65, with T = T_isa(p) + 15 K.
    r_air, g0, t0, lapse = 287.05287, 9.80665, 288.15, 0.0065
    p_fl = 101325.0 * (1.0 - lapse * 1981.2 / t0) ** (g0 / (r_air * lapse))

    def t_isa(p):
        return t0 * (p / 101325.0) ** (r_air * lapse / g0)

    thickness, _ = quad(lambda p: r_air * (t_isa(p) + 15.0) / (g0 * p), p_fl, 101325.0)
    geometric = thickness * 6356766.0 / (6356766.0 - thickness)
    assert flight_level_msl_m(65.0, 15.0) == pytest.approx(geometric, abs=0.05)
    # Source (common practice): a warm day raises a pressure level by about 4 % per 10 K.
    assert flight_level_msl_m(65.0, 15.0) - flight_level_msl_m(65.0) == pytest.approx(0.06 * 1981.2, rel=0.2)


def test_feet_and_agl_limits():
    # Source: the international foot is 0.3048 m exactly (1959 agreement).
    assert limit_msl_m(Limit(4500.0, "ft", "MSL")) == pytest.approx(1371.6)
    assert limit_msl_m(Limit(1000.0, "ft", "AGL"), np.array([250.0, 400.0])) == pytest.approx([554.8, 704.8])
    assert math.isnan(limit_msl_m(Limit(300.0, "m", "AGL"), None))


def _analytic_ground(lats, lons):
    """An inclined plane: 300 m at 45.5 N rising 2 m per km northward (111.2 km per degree)."""
    return 300.0 + 2.0 * 111.2 * (np.asarray(lats) - 45.5)


def test_agl_floor_follows_an_analytic_terrain_and_caps_the_band():
    # Source (hand computation): a floor 500 m above an inclined plane is 800 m + 222.4 m per
    # degree north of 45.5 N; under it, with a 100 m margin, the band top is 100 m lower.
    volume = _volume([[[-33.5, 45.5], [-33.0, 45.5], [-33.0, 46.5], [-33.5, 46.5]]],
                     floor=Limit(500.0, "m", "AGL"), ceiling=Limit(3000.0, "m", "MSL"))
    airspace = Airspace((volume,))
    lats, lons, along = geodesy.path_points([45.4, 46.6], [-33.25, -33.25], 250.0)
    limits = limits_along(airspace, lats, lons, _analytic_ground)
    np.testing.assert_allclose(limits.floor_m[0], 800.0 + 222.4 * (lats - 45.5))
    cap = band_top_cap(airspace, lats, lons, along, 2000.0, 600.0, 100.0, ground=_analytic_ground)
    inside = (lats > 45.5) & (lats < 46.5)
    np.testing.assert_allclose(cap.top_m[inside], 700.0 + 222.4 * (lats[inside] - 45.5))
    assert np.all(cap.top_m[~inside & ((lats < 45.49) | (lats > 46.51))] == 2000.0)
    assert len(cap.caps) == 1 and cap.caps[0].name == "V"
    # Entry and exit where the meridian crosses 45.5 and 46.5 N (geographiclib).
    entry = WGS84.Inverse(45.4, -33.25, 45.5, -33.25)["s12"]
    leave = WGS84.Inverse(45.4, -33.25, 46.5, -33.25)["s12"]
    assert (cap.caps[0].from_m, cap.caps[0].to_m) == pytest.approx((entry, leave), abs=CROSSING_TOLERANCE_M)


def test_agl_without_terrain_uses_the_nearest_point_and_says_so():
    # Source (hand computation): the nearest of two points by distance.
    ground = nearest_point_ground([45.0, 46.4], [-33.0, -33.0], [200.0, 500.0])
    assert ground(np.array([45.2, 45.9]), np.array([-33.0, -33.1])).tolist() == [200.0, 500.0]
    volume = _volume([[[-33.5, 45.5], [-33.0, 45.5], [-33.0, 46.5], [-33.5, 46.5]]],
                     floor=Limit(300.0, "m", "AGL"), ceiling=Limit(3000.0, "m", "MSL"))
    lats, lons, along = geodesy.path_points([45.4, 46.6], [-33.25, -33.25], 250.0)
    cap = band_top_cap(Airspace((volume,)), lats, lons, along, 2000.0, 600.0, 100.0, ground=ground,
                       ground_is_estimate=True)
    assert cap.agl_from_points
    assert set(np.unique(cap.top_m[cap.volume == 0])) == {400.0, 700.0}


# ---------------------------------------------------------------- caps and conflicts


def _east_leg():
    return geodesy.path_points([46.0, 46.0], [-34.0, -32.5], 250.0)


def test_the_lowest_floor_in_the_band_sets_the_cap_and_a_volume_below_the_band_does_not():
    # Source (hand computation): floors 1800 m (33.8-33.2 W) and 1500 m (33.5-33.0 W) overlap;
    # 100 m margin; band 1000-2200 m; a zone up to 800 m lies wholly below the band.
    low = _volume([[[-33.5, 45.9], [-33.0, 45.9], [-33.0, 46.1], [-33.5, 46.1]]], name="Low",
                  floor=Limit(1500.0, "m", "MSL"), ceiling=Limit(95.0, "FL"))
    high = _volume([[[-33.8, 45.9], [-33.2, 45.9], [-33.2, 46.1], [-33.8, 46.1]]], name="High",
                   floor=Limit(1800.0, "m", "MSL"), ceiling=Limit(95.0, "FL"))
    under = _volume([[[-34.0, 45.9], [-32.5, 45.9], [-32.5, 46.1], [-34.0, 46.1]]], name="Under",
                    floor=GROUND, ceiling=Limit(800.0, "m", "MSL"))
    airspace = Airspace((low, high, under))
    lats, lons, along = _east_leg()
    cap = band_top_cap(airspace, lats, lons, along, 2200.0, 1000.0, 100.0)
    assert [(c.name, c.top_m) for c in cap.caps] == [("High", 1700.0), ("Low", 1400.0)]
    for lon, name in ((-33.8, "High"), (-33.5, "Low")):
        at = WGS84.Inverse(46.0, -34.0, 46.0, lon)["s12"]
        assert min(abs(c.from_m - at) for c in cap.caps if c.name == name) < CROSSING_TOLERANCE_M


def test_a_ground_zone_crossed_is_one_conflict_on_the_right_leg_and_stretch():
    # Source (hand computation): a zone from the ground to 1500 m spans 33.2-33.0 W; the flight
    # keeps 1200 m; legs change at 33.5 W. Ends from geographiclib along the path.
    zone = _volume([[[-33.2, 45.9], [-33.0, 45.9], [-33.0, 46.1], [-33.2, 46.1]]], name="Zone")
    lats, lons, along = _east_leg()
    leg_two = along[np.argmin(np.abs(lons + 33.5))]
    found = conflicts(Airspace((zone,)), lats, lons, along, along, np.full(along.shape, 1200.0), [0.0, leg_two])
    assert len(found) == 1
    c = found[0]
    expected = [geodesy.path_points([46.0, 46.0], [-34.0, lon], 250.0)[2][-1] for lon in (-33.2, -33.0)]
    assert (c.name, c.airspace_class, c.leg, c.from_ground) == ("Zone", "D", 2, True)
    assert (c.from_m, c.to_m) == pytest.approx(expected, abs=CROSSING_TOLERANCE_M)
    assert (c.planned_min_m, c.planned_max_m, c.ceiling_m) == (1200.0, 1200.0, 1500.0)


def test_a_glide_entering_under_a_floor_conflicts_from_where_it_reaches_the_floor_minus_margin():
    # Source (hand computation): a glide from 2000 m falling 1 m per 100 m; a volume with its
    # floor at 1500 m over the whole leg; with 100 m margin the conflict ends where the glide
    # reaches 1400 m: 60 km along.
    volume = _volume([[[-34.5, 45.5], [-32.0, 45.5], [-32.0, 46.5], [-34.5, 46.5]]],
                     floor=Limit(1500.0, "m", "MSL"), ceiling=Limit(3000.0, "m", "MSL"))
    lats, lons, along = _east_leg()
    heights = 2000.0 - along / 100.0
    found = conflicts(Airspace((volume,)), lats, lons, along, along, heights)
    assert len(found) == 1
    assert (found[0].from_m, found[0].to_m) == pytest.approx((0.0, 60000.0), abs=1.0)
    assert found[0].planned_max_m == 2000.0 and found[0].planned_min_m == pytest.approx(1400.0)


def test_no_room_under_a_floor_below_the_band_bottom_is_a_conflict():
    # Source (hand computation): floor 1000 m, margin 100 m, band bottom 1000 m: the capped top
    # (900 m) is below the bottom, whatever the profile shows there.
    volume = _volume([[[-33.2, 45.9], [-33.0, 45.9], [-33.0, 46.1], [-33.2, 46.1]]],
                     floor=Limit(1000.0, "m", "MSL"), ceiling=Limit(95.0, "FL"))
    lats, lons, along = _east_leg()
    check = check_path(Airspace((volume,)), lats, lons, along, along, np.full(along.shape, 800.0),
                       band_top_m=2000.0, band_bottom_m=1000.0)
    assert len(check.conflicts) == 1 and check.conflicts[0].no_room
    assert check.caps == () and not check.ok
    cap = band_top_cap(Airspace((volume,)), lats, lons, along, 2000.0, 1000.0)
    assert set(cap.top_m[cap.volume == 0]) == {900.0}
