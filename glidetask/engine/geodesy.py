"""Geodesics on the WGS84 ellipsoid: distances, azimuths, destinations, points along a path.

A thin vectorised layer over :class:`pyproj.Geod` (GeographicLib, Karney 2013). All task
geometry in glidetask is measured here, as the FAI Sporting Code asks for gliding: geodesic
distances and azimuths on WGS84 (shared/CONTRACT.md section 1).

Conventions: latitudes and longitudes in decimal degrees; longitudes returned in
[-180, 180); azimuths in degrees true, clockwise from north, in [0, 360); distances in metres.
Scalars in give Python floats out; arrays in (any broadcastable shapes) give arrays out.

References
----------
.. [1] C. F. F. Karney, "Algorithms for geodesics", Journal of Geodesy 87, 43-55 (2013).
.. [2] FAI Sporting Code Section 3 (Gliding), Annex A: distances are measured on WGS84.
"""

from __future__ import annotations

import math

import numpy as np
import pyproj

from glidetask.engine.arrays import scalar_or_array

#: The one ellipsoid of the project (semi-major axis 6378137 m, flattening 1/298.257223563).
WGS84 = pyproj.Geod(ellps="WGS84")


def normalize_lon(lon):
    """Longitude [deg] folded into [-180, 180) (scalar or array)."""
    lon = np.asarray(lon, dtype=float)
    folded = np.where((lon >= -180.0) & (lon < 180.0), lon, (lon + 180.0) % 360.0 - 180.0)  # exact if in range
    return scalar_or_array(folded)


def normalize_azimuth(azimuth_deg):
    """Azimuth [deg] folded into [0, 360) (scalar or array)."""
    folded = np.asarray(azimuth_deg, dtype=float) % 360.0
    folded = np.where(folded >= 360.0, 0.0, folded)  # -1e-15 % 360 rounds to 360.0
    return scalar_or_array(folded)


def _flat_broadcast(*values):
    """Broadcast the inputs, flatten them to contiguous float64, and remember the shape."""
    arrays = np.broadcast_arrays(*(np.asarray(v, dtype=float) for v in values))
    shape = arrays[0].shape
    return shape, [np.ascontiguousarray(a, dtype=float).ravel() for a in arrays]


def _shaped(shape, *arrays):
    out = tuple(np.asarray(a, dtype=float).reshape(shape) for a in arrays)
    if shape == ():
        return tuple(float(a) for a in out)
    return out


def inverse(lat1, lon1, lat2, lon2):
    """Geodesic distance and azimuths from point 1 to point 2 (the inverse problem).

    Parameters
    ----------
    lat1, lon1 : float or array_like
        First point [deg].
    lat2, lon2 : float or array_like
        Second point [deg].

    Returns
    -------
    distance_m : float or ndarray
        Length of the shortest geodesic [m].
    azimuth_deg : float or ndarray
        Forward azimuth at point 1 (the course on leaving it) [deg true, 0-360).
    end_azimuth_deg : float or ndarray
        Forward azimuth at point 2 (the course on arriving there) [deg true, 0-360).

    Notes
    -----
    Coincident points give distance 0 with an arbitrary (but finite) azimuth; NaN inputs
    give NaN outputs. Solved by GeographicLib through pyproj to round-off [1]_.
    """
    shape, (a1, o1, a2, o2) = _flat_broadcast(lat1, lon1, lat2, lon2)
    az12, az21, dist = WGS84.inv(o1, a1, o2, a2, return_back_azimuth=True)
    azimuth = normalize_azimuth(np.asarray(az12))
    end_azimuth = normalize_azimuth(np.asarray(az21) + 180.0)
    return _shaped(shape, dist, azimuth, end_azimuth)


def distance(lat1, lon1, lat2, lon2):
    """Geodesic distance [m] between two points (see :func:`inverse`)."""
    return inverse(lat1, lon1, lat2, lon2)[0]


def direct(lat, lon, azimuth_deg, distance_m):
    """Destination of a geodesic from a point along an azimuth for a distance (the direct problem).

    Parameters
    ----------
    lat, lon : float or array_like
        Starting point [deg].
    azimuth_deg : float or array_like
        Azimuth at the start [deg true].
    distance_m : float or array_like
        Length of the geodesic [m] (negative goes backwards).

    Returns
    -------
    lat2, lon2 : float or ndarray
        Destination [deg], longitude in [-180, 180).
    end_azimuth_deg : float or ndarray
        Forward azimuth at the destination [deg true, 0-360).
    """
    shape, (a, o, az, s) = _flat_broadcast(lat, lon, azimuth_deg, distance_m)
    lon2, lat2, az21 = WGS84.fwd(o, a, az, s, return_back_azimuth=True)
    return _shaped(shape, lat2, normalize_lon(np.asarray(lon2)), normalize_azimuth(np.asarray(az21) + 180.0))


def destination(lat, lon, azimuth_deg, distance_m):
    """``(lat, lon)`` [deg] reached from a point along an azimuth for a distance."""
    lat2, lon2, _ = direct(lat, lon, azimuth_deg, distance_m)
    return lat2, lon2


def geodesic_points(lat1, lon1, lat2, lon2, spacing_m):
    """Points along the geodesic from point 1 to point 2, both ends included.

    Parameters
    ----------
    lat1, lon1, lat2, lon2 : float
        End points [deg].
    spacing_m : float
        Largest distance between consecutive points [m] (> 0); the geodesic is cut into
        ``ceil(length / spacing_m)`` equal pieces.

    Returns
    -------
    lats, lons : ndarray
        Latitudes and longitudes [deg] (longitudes in [-180, 180)).
    along_m : ndarray
        Distance of each point from point 1 along the geodesic [m].
    """
    if not spacing_m > 0.0:
        raise ValueError(f"spacing_m must be positive, got {spacing_m!r}")
    length, azimuth, _ = inverse(lat1, lon1, lat2, lon2)
    pieces = max(1, int(math.ceil(length / spacing_m)))
    along = np.linspace(0.0, length, pieces + 1)
    lats, lons, _ = direct(np.full(along.shape, lat1), lon1, azimuth, along)
    lats[-1], lons[-1] = lat2, normalize_lon(lon2)  # exact end, free of round-off
    return lats, lons, along


def path_points(lats, lons, spacing_m):
    """Densify a path of geodesic legs through the given vertices.

    Parameters
    ----------
    lats, lons : array_like
        Vertices [deg] (at least one).
    spacing_m : float
        Largest distance between consecutive output points [m] (> 0).

    Returns
    -------
    lats, lons : ndarray
        Points along the path [deg], every vertex included once, in order.
    along_m : ndarray
        Distance of each point from the first vertex along the path [m].
    """
    lats = np.atleast_1d(np.asarray(lats, dtype=float))
    lons = np.atleast_1d(np.asarray(lons, dtype=float))
    out_lat, out_lon, out_along = [lats[:1]], [normalize_lon(lons[:1])], [np.zeros(1)]
    start = 0.0
    for i in range(len(lats) - 1):
        la, lo, along = geodesic_points(lats[i], lons[i], lats[i + 1], lons[i + 1], spacing_m)
        out_lat.append(la[1:])
        out_lon.append(lo[1:])
        out_along.append(start + along[1:])
        start += along[-1]
    return np.concatenate(out_lat), np.concatenate(out_lon), np.concatenate(out_along)
