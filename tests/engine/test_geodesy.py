"""WGS84 geodesics: against published examples and an independent implementation.

geographiclib (pure Python, C. F. F. Karney, "Algorithms for geodesics", J. Geodesy 87,
2013) is the reference; our layer goes through pyproj's compiled code. Both solve the
geodesic problems to about 15 nanometres (Karney 2013, section 9), so agreement to 1 mm
in distance and 1e-7 degrees in azimuth leaves room only for round-off in our conversions.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from geographiclib.geodesic import Geodesic
from hypothesis import given, settings
from hypothesis import strategies as st

from glidetask.engine import geodesy

REF = Geodesic.WGS84
DISTANCE_TOL_M = 1e-3  # see the module docstring
AZIMUTH_TOL_DEG = 1e-7


def _dms(degrees, minutes, seconds):
    return degrees + minutes / 60.0 + seconds / 3600.0


def _angle_diff(a, b):
    return abs((a - b + 180.0) % 360.0 - 180.0)


# ---------------------------------------------------------------- published examples


def test_wellington_to_salamanca():
    # Source: geographiclib documentation, "Solve the inverse geodesic problem" example
    # (Wellington, NZ to Salamanca, Spain): s12 = 19959679.267 m, azi1 = 161.067669986,
    # azi2 = 18.825195123 (from memory; printed there to 1 mm and 1e-9 deg).
    distance, azimuth, end_azimuth = geodesy.inverse(-41.32, 174.81, 40.96, -5.50)
    assert distance == pytest.approx(19959679.267, abs=1e-3)
    assert azimuth == pytest.approx(161.067669986, abs=1e-9)
    assert end_azimuth == pytest.approx(18.825195123, abs=1e-9)


def test_flinders_peak_to_buninyong():
    # Source: T. Vincenty (1975) inverse worked example as published by Geoscience Australia
    # (Flinders Peak to Buninyong, GRS80): 54 972.271 m, azimuth 306 52 05.37, reverse
    # azimuth 127 10 25.07 (from memory). GRS80 and WGS84 differ by ~0.1 mm over 55 km;
    # the published figures are rounded to 1 mm and 0.01 arc-second (3e-6 deg).
    distance, azimuth, end_azimuth = geodesy.inverse(
        -_dms(37, 57, 3.72030), _dms(144, 25, 29.52440), -_dms(37, 39, 10.15610), _dms(143, 55, 35.38390))
    assert distance == pytest.approx(54972.271, abs=1e-3)
    assert azimuth == pytest.approx(_dms(306, 52, 5.37), abs=3e-6)
    reverse = (end_azimuth + 180.0) % 360.0  # the azimuth from Buninyong back to Flinders Peak
    assert reverse == pytest.approx(_dms(127, 10, 25.07), abs=3e-6)


def test_twenty_thousand_km_south_west_of_perth():
    # Source: geographiclib documentation, "Solve the direct geodesic problem" example:
    # 20 000 km SW (azimuth 225) from Perth (32.06 S, 115.74 E) reaches 32.11195529 N,
    # 63.95925278 W with azimuth -45.03243531 there (from memory; printed to 1e-8 deg).
    lat, lon, end_azimuth = geodesy.direct(-32.06, 115.74, 225.0, 20_000_000.0)
    assert lat == pytest.approx(32.11195529, abs=1e-8)
    assert lon == pytest.approx(-63.95925278, abs=1e-8)
    assert end_azimuth == pytest.approx(360.0 - 45.03243531, abs=1e-8)


def test_one_degree_of_latitude_at_the_equator_and_the_pole():
    # Source: the meridian arc of WGS84 (NIMA TR8350.2): 1 deg of latitude is 110 574 m at
    # the equator and 111 694 m at the pole (values rounded to the metre, from memory).
    assert geodesy.distance(0.0, 10.0, 1.0, 10.0) == pytest.approx(110_574.0, abs=1.0)
    assert geodesy.distance(89.0, 10.0, 90.0, 10.0) == pytest.approx(111_694.0, abs=1.0)


# ---------------------------------------------------------------- against geographiclib

latitudes = st.floats(-80.0, 80.0)
longitudes = st.floats(-180.0, 180.0, exclude_max=True)


@settings(max_examples=150, deadline=None)
@given(latitudes, longitudes, latitudes, longitudes)
def test_inverse_matches_geographiclib(lat1, lon1, lat2, lon2):
    ref = REF.Inverse(lat1, lon1, lat2, lon2)
    distance, azimuth, end_azimuth = geodesy.inverse(lat1, lon1, lat2, lon2)
    assert distance == pytest.approx(ref["s12"], abs=DISTANCE_TOL_M)
    # Azimuths are ill-conditioned for coincident and for nearly antipodal points.
    if 1.0 < ref["s12"] < 19_000_000.0:
        assert _angle_diff(azimuth, ref["azi1"]) < AZIMUTH_TOL_DEG
        assert _angle_diff(end_azimuth, ref["azi2"]) < AZIMUTH_TOL_DEG
    assert 0.0 <= azimuth < 360.0 and 0.0 <= end_azimuth < 360.0


@settings(max_examples=100, deadline=None)
@given(latitudes, longitudes, st.floats(0.0, 360.0), st.floats(0.0, 2_000_000.0))
def test_direct_matches_geographiclib(lat, lon, azimuth, distance):
    ref = REF.Direct(lat, lon, azimuth, distance)
    lat2, lon2, end_azimuth = geodesy.direct(lat, lon, azimuth, distance)
    # 1e-9 deg is 0.1 mm on the ground.
    assert lat2 == pytest.approx(ref["lat2"], abs=1e-9)
    assert _angle_diff(lon2, ref["lon2"]) < 1e-9
    assert -180.0 <= lon2 < 180.0
    assert _angle_diff(end_azimuth, ref["azi2"]) < AZIMUTH_TOL_DEG


@pytest.mark.parametrize("lat1, lon1, lat2, lon2", [
    (0.0, 179.5, 0.0, -179.5),  # across the antimeridian on the equator
    (-16.5, 178.0, -17.5, -178.5),  # across it in the tropics
    (64.0, -170.0, 66.0, 172.0),  # across it in the north
    (80.0, 0.0, 80.0, 180.0),  # over the pole region at 80 N
    (-80.0, -45.0, -79.0, 135.0),  # and at 80 S
    (45.0, -35.0, 52.0, -20.0),  # a leg over 1,000 km
])
def test_antimeridian_and_high_latitude_legs(lat1, lon1, lat2, lon2):
    ref = REF.Inverse(lat1, lon1, lat2, lon2)
    distance, azimuth, end_azimuth = geodesy.inverse(lat1, lon1, lat2, lon2)
    assert distance == pytest.approx(ref["s12"], abs=DISTANCE_TOL_M)
    assert _angle_diff(azimuth, ref["azi1"]) < AZIMUTH_TOL_DEG
    assert _angle_diff(end_azimuth, ref["azi2"]) < AZIMUTH_TOL_DEG


def test_antimeridian_leg_is_short():
    # Source: 1 deg of longitude on the equator is 111 319.49 m (WGS84 semi-major axis
    # 6 378 137 m times pi/180); crossing 180 E/W must not go the long way round.
    assert geodesy.distance(0.0, 179.5, 0.0, -179.5) == pytest.approx(6378137.0 * math.pi / 180.0, abs=1e-3)
    assert geodesy.inverse(0.0, 179.5, 0.0, -179.5)[1] == pytest.approx(90.0)


# ---------------------------------------------------------------- conventions and shapes


def test_scalars_give_floats_and_arrays_broadcast():
    distance, azimuth, end_azimuth = geodesy.inverse(46.0, -33.0, 47.0, -33.0)
    assert all(isinstance(v, float) for v in (distance, azimuth, end_azimuth))
    lats = np.array([[46.5], [47.0]])
    lons = np.array([-33.0, -32.0, -31.0])
    distance, azimuth, _ = geodesy.inverse(46.0, -33.0, lats, lons)
    assert distance.shape == (2, 3)
    for i in range(2):
        for j in range(3):
            assert distance[i, j] == pytest.approx(REF.Inverse(46.0, -33.0, lats[i, 0], lons[j])["s12"], abs=1e-3)


def test_normalize_lon_and_azimuth():
    assert geodesy.normalize_lon(180.0) == -180.0
    assert geodesy.normalize_lon(-180.0) == -180.0
    assert geodesy.normalize_lon(190.0) == pytest.approx(-170.0)
    assert geodesy.normalize_lon(-540.0) == -180.0
    assert list(geodesy.normalize_lon(np.array([359.0, -181.0]))) == pytest.approx([-1.0, 179.0])
    assert geodesy.normalize_azimuth(-90.0) == 270.0
    assert geodesy.normalize_azimuth(-1e-17) == 0.0


def test_coincident_points_and_nan():
    distance, azimuth, end_azimuth = geodesy.inverse(46.0, -33.0, 46.0, -33.0)
    assert distance == 0.0 and math.isfinite(azimuth) and math.isfinite(end_azimuth)
    distance, _, _ = geodesy.inverse(np.array([46.0, np.nan]), -33.0, 47.0, -33.0)
    assert math.isfinite(distance[0]) and math.isnan(distance[1])


def test_geodesic_points_are_on_the_geodesic_and_evenly_spaced():
    lats, lons, along = geodesy.geodesic_points(64.0, 178.0, 66.0, -172.0, 25_000.0)
    total = REF.Inverse(64.0, 178.0, 66.0, -172.0)["s12"]
    assert (lats[0], lons[0]) == (64.0, 178.0) and (lats[-1], lons[-1]) == (66.0, -172.0)
    assert np.all((lons >= -180.0) & (lons < 180.0))
    assert along[-1] == pytest.approx(total, abs=1e-3)
    steps = np.diff(along)
    assert steps.max() <= 25_000.0 and steps.max() - steps.min() < 1e-6
    start_azimuth = REF.Inverse(64.0, 178.0, 66.0, -172.0)["azi1"]
    for lat, lon, s in zip(lats[1:-1], lons[1:-1], along[1:-1]):
        ref = REF.Inverse(64.0, 178.0, lat, lon)
        assert ref["s12"] == pytest.approx(s, abs=1e-3)
        assert _angle_diff(ref["azi1"], start_azimuth) < 1e-7


def test_path_points_accumulate_leg_lengths():
    vertices = ([46.0, 47.0, 46.5, 46.0], [-33.0, -33.0, -32.0, -33.0])
    lats, lons, along = geodesy.path_points(*vertices, 10_000.0)
    legs = [REF.Inverse(vertices[0][i], vertices[1][i], vertices[0][i + 1], vertices[1][i + 1])["s12"] for i in range(3)]
    assert along[-1] == pytest.approx(sum(legs), abs=1e-3)
    assert np.all(np.diff(along) <= 10_000.0 + 1e-6) and np.all(np.diff(along) > 0)
    for lat, lon in zip(*vertices):  # every vertex is among the points
        assert np.min(np.hypot(lats - lat, lons - lon)) < 1e-12


def test_bad_spacing_raises():
    with pytest.raises(ValueError):
        geodesy.geodesic_points(0.0, 0.0, 1.0, 1.0, 0.0)
