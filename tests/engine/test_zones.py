"""Observation zones against the FAI Sporting Code's definitions.

Source for the shapes: FAI Sporting Code Section 3 (Gliding), Annex A, observation zones and
start/finish procedures (wording recalled from memory, editions 2019-2023):
* a start line is "perpendicular to the course to the first turnpoint", a finish line to the
  course from the last turnpoint, both centred on the point, of total length L;
* a cylinder is the volume within radius R of the point;
* the FAI sector is a 90 degree sector with its apex at the turnpoint, "symmetrical about and
  oriented away from" the bisector of the inbound and outbound legs;
* a keyhole is a 90 degree sector of radius 10 km combined with a cylinder of 0.5 km;
* an assigned-area sector lies between two radials and an inner and outer radius.

Positions are built with geographiclib (an independent geodesic implementation); points are
placed 1 m inside or outside a boundary, well beyond the 1 mm round-off of the geodesics.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from geographiclib.geodesic import Geodesic

from glidetask.engine.zones import (Zone, boundary, boundary_loops, contains, polar_coordinates,
                                    zone_axes)

REF = Geodesic.WGS84
CENTRE = (46.2, -33.4)
TIGHT_M = 0.01  # containment tolerance used here, far below the 1 m placements


def _at(azimuth_deg, distance_m, centre=CENTRE):
    out = REF.Direct(centre[0], centre[1], azimuth_deg, distance_m)
    return out["lat2"], out["lon2"]


def _inside(zone, azimuth_deg, distance_m, axis_deg=0.0):
    lat, lon = _at(azimuth_deg, distance_m)
    return contains(zone, *CENTRE, lat, lon, axis_deg, tolerance_m=TIGHT_M)


# ---------------------------------------------------------------- orientation (zone_axes)


def test_start_line_axis_is_the_first_leg_course_and_finish_line_the_last():
    start, turn, finish = CENTRE, _at(40.0, 80_000.0), _at(200.0, 60_000.0)
    lats, lons = [start[0], turn[0], finish[0]], [start[1], turn[1], finish[1]]
    axes = zone_axes(lats, lons, [Zone.line(10_000.0), Zone.cylinder(500.0), Zone.line(2_000.0)])
    first_leg = REF.Inverse(*start, *turn)
    last_leg = REF.Inverse(*turn, *finish)
    assert axes[0] == pytest.approx(first_leg["azi1"] % 360.0, abs=1e-7)
    assert axes[2] == pytest.approx(last_leg["azi2"] % 360.0, abs=1e-7)  # the course on arrival
    assert axes[1] == 0.0  # a cylinder has no axis


def test_sector_axis_is_the_outward_bisector():
    # Legs arriving from the south-west and leaving to the south-east, mirror images about
    # the turnpoint's meridian: the outward bisector points due north.
    before, after = (CENTRE[0] - 0.8, CENTRE[1] - 1.0), (CENTRE[0] - 0.8, CENTRE[1] + 1.0)
    axes = zone_axes([before[0], CENTRE[0], after[0]], [before[1], CENTRE[1], after[1]],
                     [Zone.cylinder(500.0), Zone.sector(10_000.0), Zone.cylinder(500.0)])
    assert (axes[1] + 180.0) % 360.0 - 180.0 == pytest.approx(0.0, abs=1e-9)


def test_sector_axis_for_a_general_turn_bisects_the_directions_to_the_neighbours():
    before, after = _at(170.0, 90_000.0), _at(75.0, 120_000.0)
    axes = zone_axes([before[0], CENTRE[0], after[0]], [before[1], CENTRE[1], after[1]],
                     [Zone.line(10_000.0), Zone.keyhole(), Zone.cylinder(1_000.0)])
    to_before = REF.Inverse(*CENTRE, *before)["azi1"]
    to_after = REF.Inverse(*CENTRE, *after)["azi1"]
    # Outward: opposite to the mean of the two unit directions; the two legs make equal
    # angles with it.
    off_before = abs((to_before - axes[1] + 180.0) % 360.0 - 180.0)
    off_after = abs((to_after - axes[1] + 180.0) % 360.0 - 180.0)
    assert off_before == pytest.approx(off_after, abs=1e-9)
    assert off_before > 90.0  # it points away from the task


def test_out_and_return_sector_points_straight_away():
    home = _at(250.0, 110_000.0)
    axes = zone_axes([home[0], CENTRE[0], home[0]], [home[1], CENTRE[1], home[1]],
                     [Zone.line(10_000.0), Zone.sector(10_000.0), Zone.line(1_000.0)])
    back = REF.Inverse(*CENTRE, *home)["azi1"]
    assert abs((axes[1] - (back + 180.0) + 180.0) % 360.0 - 180.0) < 1e-9


def test_coincident_neighbours_are_skipped():
    ahead = _at(30.0, 50_000.0)
    lats = [CENTRE[0], CENTRE[0], ahead[0]]
    lons = [CENTRE[1], CENTRE[1], ahead[1]]
    axes = zone_axes(lats, lons, [Zone.line(10_000.0), Zone.cylinder(500.0), Zone.cylinder(500.0)])
    assert axes[0] == pytest.approx(REF.Inverse(*CENTRE, *ahead)["azi1"] % 360.0, abs=1e-7)


# ---------------------------------------------------------------- shapes (contains)


def test_line_is_perpendicular_to_its_axis_centred_and_of_length_l():
    line, axis = Zone.line(10_000.0), 63.0
    for side in (axis - 90.0, axis + 90.0):
        assert _inside(line, side, 4_999.0, axis)  # on the line, 1 m short of its end
        assert not _inside(line, side, 5_001.0, axis)  # 1 m beyond its end
    assert _inside(line, 0.0, 0.0, axis)  # its centre is the point
    assert not _inside(line, axis, 1.0, axis)  # a line has no depth along the course
    assert not _inside(line, axis + 180.0, 1.0, axis)


def test_cylinder_radius():
    cylinder = Zone.cylinder(500.0)
    for azimuth in (0.0, 97.0, 181.0, 333.0):
        assert _inside(cylinder, azimuth, 499.0)
        assert not _inside(cylinder, azimuth, 501.0)


def test_sector_is_symmetric_about_its_axis_with_the_apex_at_the_point():
    sector, axis = Zone.sector(10_000.0), 315.0
    assert _inside(sector, axis - 44.9, 9_999.0, axis) and _inside(sector, axis + 44.9, 9_999.0, axis)
    assert not _inside(sector, axis - 45.1, 5_000.0, axis) and not _inside(sector, axis + 45.1, 5_000.0, axis)
    assert not _inside(sector, axis, 10_001.0, axis)
    assert _inside(sector, axis + 180.0, 0.0, axis)  # the apex itself
    assert not _inside(sector, axis + 180.0, 2.0, axis)  # but nothing behind it


def test_sector_angle_can_be_set():
    sector, axis = Zone.sector(5_000.0, angle_deg=180.0), 90.0
    assert _inside(sector, 0.5, 4_000.0, axis) and _inside(sector, 179.5, 4_000.0, axis)
    assert not _inside(sector, 359.5, 4_000.0, axis) and not _inside(sector, 180.5, 4_000.0, axis)


def test_keyhole_is_a_sector_and_a_small_cylinder():
    keyhole, axis = Zone.keyhole(), 200.0
    assert (keyhole.radius_m, keyhole.angle_deg, keyhole.cylinder_radius_m) == (10_000.0, 90.0, 500.0)
    assert _inside(keyhole, axis, 9_999.0, axis)  # far out in the sector
    assert not _inside(keyhole, axis, 10_001.0, axis)
    assert _inside(keyhole, axis + 180.0, 499.0, axis)  # behind the point, in the cylinder
    assert not _inside(keyhole, axis + 180.0, 501.0, axis)
    assert _inside(keyhole, axis + 90.0, 499.0, axis) and not _inside(keyhole, axis + 90.0, 501.0, axis)


def test_area_sector_runs_clockwise_from_the_first_radial_to_the_second():
    south = Zone.area_sector(30_000.0, radial_from_deg=120.0, radial_to_deg=240.0, inner_radius_m=5_000.0)
    assert _inside(south, 180.0, 20_000.0) and _inside(south, 121.0, 29_999.0) and _inside(south, 239.0, 5_001.0)
    assert not _inside(south, 0.0, 20_000.0) and not _inside(south, 119.0, 20_000.0)
    assert not _inside(south, 180.0, 4_999.0)  # inside the inner radius
    assert not _inside(south, 180.0, 30_001.0)
    north = Zone.area_sector(30_000.0, radial_from_deg=240.0, radial_to_deg=120.0)  # through north
    assert _inside(north, 0.0, 20_000.0) and _inside(north, 300.0, 10_000.0) and _inside(north, 60.0, 10_000.0)
    assert not _inside(north, 180.0, 20_000.0)
    assert north.span_deg == 240.0 and south.span_deg == 120.0


def test_area_sector_with_equal_radials_is_a_ring():
    ring = Zone.area_sector(20_000.0, 90.0, 90.0, inner_radius_m=10_000.0)
    assert ring.span_deg == 360.0
    assert _inside(ring, 270.0, 15_000.0) and not _inside(ring, 270.0, 9_000.0)


def test_contains_is_vectorised_and_tolerance_counts():
    lats, lons = zip(*(_at(a, 500.5) for a in (0.0, 90.0, 180.0)))
    cylinder = Zone.cylinder(500.0)
    assert contains(cylinder, *CENTRE, np.array(lats), np.array(lons), tolerance_m=TIGHT_M).tolist() == [False] * 3
    assert contains(cylinder, *CENTRE, np.array(lats), np.array(lons), tolerance_m=1.0).tolist() == [True] * 3
    assert isinstance(contains(cylinder, *CENTRE, lats[0], lons[0]), bool)


# ---------------------------------------------------------------- outlines


@pytest.mark.parametrize("zone, axis", [
    (Zone.line(10_000.0), 30.0),
    (Zone.cylinder(3_000.0), 0.0),
    (Zone.sector(10_000.0), 123.0),
    (Zone.keyhole(), 300.0),
    (Zone.area_cylinder(25_000.0), 0.0),
    (Zone.area_sector(30_000.0, 300.0, 60.0, inner_radius_m=5_000.0), 0.0),
])
def test_boundary_points_lie_on_the_zone_boundary(zone, axis):
    outlines = boundary(zone, *CENTRE, axis)
    assert len(outlines) == (2 if zone.kind == "keyhole" else 1)
    for lats, lons in outlines:
        assert np.all(contains(zone, *CENTRE, lats, lons, axis, tolerance_m=0.01))
        azimuth, r = polar_coordinates(*CENTRE, lats, lons)
        # every outline point is on one of the defining circles or radials / the line
        on_circle = np.isin(np.round(r, 3), np.round([zone.radius_m, zone.cylinder_radius_m, zone.inner_radius_m,
                                                       zone.length_m / 2], 3))
        radials = [axis - zone.angle_deg / 2, axis + zone.angle_deg / 2, zone.radial_from_deg, zone.radial_to_deg,
                   axis - 90.0, axis + 90.0]
        on_radial = np.any([np.abs((azimuth - a + 180.0) % 360.0 - 180.0) < 1e-6 for a in radials], axis=0)
        assert np.all(on_circle | on_radial | (r < 1e-6))
        if zone.kind != "line":
            assert lats[0] == lats[-1] and lons[0] == lons[-1]  # closed


def test_boundary_loop_lengths():
    # Source: circumference 2 pi R; sector perimeter 2R + R pi/2 (plane geometry; on the
    # ellipsoid the arc of a 10 km circle differs by ~1e-6 relative, Karney 2013).
    (circle,) = boundary_loops(Zone.cylinder(500.0))
    assert circle.length_m == pytest.approx(2 * math.pi * 500.0)
    (sector,) = boundary_loops(Zone.sector(10_000.0), 45.0)
    assert sector.length_m == pytest.approx(20_000.0 + 10_000.0 * math.pi / 2)
    (line,) = boundary_loops(Zone.line(2_000.0), 10.0)
    assert line.length_m == pytest.approx(2_000.0) and not line.closed


# ---------------------------------------------------------------- validation


@pytest.mark.parametrize("make", [
    lambda: Zone.line(0.0),
    lambda: Zone.cylinder(-1.0),
    lambda: Zone.sector(10_000.0, angle_deg=0.0),
    lambda: Zone.sector(10_000.0, angle_deg=400.0),
    lambda: Zone.keyhole(cylinder_radius_m=0.0),
    lambda: Zone.area_sector(10_000.0, 0.0, 90.0, inner_radius_m=10_000.0),
    lambda: Zone.cylinder(float("nan")),
    lambda: Zone("triangle", radius_m=1.0),
])
def test_bad_zones_raise(make):
    with pytest.raises(ValueError):
        make()
