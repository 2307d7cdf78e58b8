"""Generate the demo elevation model ``terrain.tif`` for the invented Vardmoor region.

Vardmoor is a made-up upland placed in the open North Atlantic so that no real place
can be mistaken for it. Its terrain is an analytic surface: a gently rising plain, the
east-west Skarren Ridge north of Vardmoor Aerodrome, the Tolland Heights in the
south-east and a few rounded hills. The demo turnpoint elevations are taken from
:func:`elevation` so the two agree.

Run from the project root:  python demo_tasks/make_terrain.py
"""

from __future__ import annotations

from pathlib import Path

import numpy as np

# Region covered by the model [deg].
SOUTH, NORTH = 45.0, 47.5
WEST, EAST = -35.5, -31.5
STEP_DEG = 0.005  # grid spacing: about 550 m north-south, 385 m east-west
REF_LAT = 46.2  # latitude of the local flat frame used for distances

KM_PER_DEG_LAT = 111.2
KM_PER_DEG_LON = 111.3 * np.cos(np.radians(REF_LAT))

# The Skarren Ridge: crest line (lat, lon) pairs, crest height [m], half-width [km].
RIDGE = (((46.32, -34.60), (46.38, -33.55), (46.46, -32.35)), 1180.0, 3.5)
# Rounded hills: (lat, lon, height above the plain [m], radius [km]).
HILLS = (
    (45.42, -32.30, 760.0, 14.0),  # Tolland Heights
    (45.55, -32.55, 420.0, 8.0),
    (46.95, -34.20, 380.0, 10.0),
    (45.70, -34.70, 300.0, 9.0),
    (47.10, -32.60, 450.0, 12.0),
)


def _plain(lat, lon):
    """A plain at 150-450 m rising gently to the north and west."""
    return 150.0 + 90.0 * (lat - SOUTH) + 45.0 * (EAST - lon)


def _distance_to_polyline_km(lat, lon, line):
    x = (lon - line[0][1]) * KM_PER_DEG_LON
    y = (lat - line[0][0]) * KM_PER_DEG_LAT
    best = np.full(np.broadcast(lat, lon).shape, np.inf)
    for (lat0, lon0), (lat1, lon1) in zip(line[:-1], line[1:]):
        ax, ay = (lon0 - line[0][1]) * KM_PER_DEG_LON, (lat0 - line[0][0]) * KM_PER_DEG_LAT
        bx, by = (lon1 - line[0][1]) * KM_PER_DEG_LON, (lat1 - line[0][0]) * KM_PER_DEG_LAT
        dx, dy = bx - ax, by - ay
        t = np.clip(((x - ax) * dx + (y - ay) * dy) / (dx * dx + dy * dy), 0.0, 1.0)
        best = np.minimum(best, np.hypot(x - (ax + t * dx), y - (ay + t * dy)))
    return best


def elevation(lat, lon):
    """Terrain elevation [m MSL] of the invented region at ``lat``, ``lon`` [deg] (arrays broadcast)."""
    lat = np.asarray(lat, dtype=float)
    lon = np.asarray(lon, dtype=float)
    plain = _plain(lat, lon)
    line, crest, half_width = RIDGE
    ridge_d = _distance_to_polyline_km(lat, lon, line)
    ridge = (crest - 350.0) * np.exp(-((ridge_d / half_width) ** 2))
    hills = np.zeros_like(plain)
    for hlat, hlon, height, radius in HILLS:
        d = np.hypot((lat - hlat) * KM_PER_DEG_LAT, (lon - hlon) * KM_PER_DEG_LON)
        hills = hills + height * np.exp(-((d / radius) ** 2))
    return plain + ridge + hills


def write(path: Path) -> None:
    """Write the model as a compressed GeoTIFF in geographic WGS84 coordinates (EPSG:4326)."""
    import rasterio
    from rasterio.transform import from_origin

    lats = np.arange(NORTH - STEP_DEG / 2, SOUTH, -STEP_DEG)
    lons = np.arange(WEST + STEP_DEG / 2, EAST, STEP_DEG)
    grid = elevation(lats[:, None], lons[None, :]).astype(np.float32)
    profile = dict(
        driver="GTiff", height=grid.shape[0], width=grid.shape[1], count=1, dtype="float32",
        crs="EPSG:4326", transform=from_origin(WEST, NORTH, STEP_DEG, STEP_DEG),
        nodata=-32768.0, compress="deflate", predictor=3, tiled=True, blockxsize=256, blockysize=256,
    )
    with rasterio.open(path, "w", **profile) as dst:
        dst.write(grid, 1)


if __name__ == "__main__":
    out = Path(__file__).resolve().parent / "terrain.tif"
    write(out)
    print(f"wrote {out} ({out.stat().st_size / 1e6:.2f} MB)")
