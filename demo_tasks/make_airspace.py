"""Generate the demo airspace file ``vardmoor-airspace.geojson``.

Every volume here is invented for the Vardmoor demo region (see ``make_turnpoints.py``);
no real airspace was used or imitated. Around Brennick Airfield, in the south-west of the
plain, lie a control zone from the ground and a control area in two steps over it; over the
Tolland Heights in the south-east, a danger area (an invented firing range).

Placed so that:
- the 300 km triangle's second leg (Kellow Hill to Quellby Field) passes under the control
  area's lower step, whose floor (1500 m) minus the 100 m margin caps the band top of 2200 m
  at 1400 m, still above the band bottom of 1200 m: a capped band, no conflict;
- a task set carelessly from Vardmoor round Trennick and Fallowden
  (``vardmoor-careless-setter.toml``, whose second leg runs over Brennick Airfield) crosses
  the control zone from the ground: a conflict;
- the other demo tasks stay clear.

Outlines are circles and rings drawn with WGS84 geodesics every 5 degrees of azimuth.

Run from the project root:  python demo_tasks/make_airspace.py
"""

from __future__ import annotations

import json
from pathlib import Path

from pyproj import Geod

HERE = Path(__file__).resolve().parent
NOTE = ("Invented demo airspace for glidetask: every volume and name here is made up for the invented "
        "Vardmoor region (placed in the open North Atlantic). Not for navigation.")
BRENNICK = (45.48, -34.15)  # lat, lon of Brennick Airfield (make_turnpoints.py)
TOLLAND_RANGE = (45.36, -32.30)  # the invented range's centre, south of Tolland Beacon
GEOD = Geod(ellps="WGS84")


def _ring(centre, radius_km: float, reverse: bool = False) -> list[list[float]]:
    lat, lon = centre
    azimuths = list(range(0, 360, 5))
    if reverse:
        azimuths = azimuths[::-1]
    lons, lats, _ = GEOD.fwd([lon] * len(azimuths), [lat] * len(azimuths), azimuths,
                             [radius_km * 1000.0] * len(azimuths))
    ring = [[round(x, 5), round(y, 5)] for x, y in zip(lons, lats)]
    return ring + [ring[0]]


def _limit(value: float, unit: str, ref: str | None = None) -> dict:
    return {"value": value, "unit": unit, **({"ref": ref} if ref else {})}


def _feature(name: str, kind: str, floor: dict, ceiling: dict, rings: list, note: str) -> dict:
    return {"type": "Feature", "geometry": {"type": "Polygon", "coordinates": rings},
            "properties": {"name": name, "class": kind, "floor": floor, "ceiling": ceiling, "note": note}}


def airspace() -> dict:
    return {
        "type": "FeatureCollection",
        "note": NOTE,
        "features": [
            _feature("Brennick Zone", "D", _limit(0, "m", "AGL"), _limit(1500, "m", "MSL"),
                     [_ring(BRENNICK, 8.0)], "invented control zone of Brennick Airfield, from the ground"),
            _feature("Brennick Area Step 1", "D", _limit(1500, "m", "MSL"), _limit(95, "FL"),
                     [_ring(BRENNICK, 16.0)], "invented control area, lower step, over the zone"),
            _feature("Brennick Area Step 2", "D", _limit(75, "FL"), _limit(95, "FL"),
                     [_ring(BRENNICK, 28.0), _ring(BRENNICK, 16.0, reverse=True)],
                     "invented control area, upper step: a ring round the lower step"),
            _feature("Tolland Range", "danger", _limit(0, "m", "AGL"), _limit(3000, "m", "MSL"),
                     [_ring(TOLLAND_RANGE, 6.0)], "invented firing range over the Tolland Heights"),
        ],
    }


def main() -> None:
    path = HERE / "vardmoor-airspace.geojson"
    document = airspace()
    lines = ['{"type": "FeatureCollection",', f' "note": {json.dumps(NOTE)},', ' "features": [']
    lines.append(",\n".join("  " + json.dumps(f) for f in document["features"]))
    lines.append(" ]}")
    path.write_text("\n".join(lines) + "\n", encoding="utf-8")
    print(f"wrote {path}")


if __name__ == "__main__":
    main()
