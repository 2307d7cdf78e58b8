"""Whole-process time of ``glidetask check`` on a 200,000-point turnpoint file (GeoJSON and CSV).

Budget (issue: nothing a user feeds it crashes it, hangs it or costs them a file): under 2.5x
the bare ``python -c "import numpy, scipy.optimize, pyproj"`` measured in the same run. The
ratio goes into the benchmark's ``extra_info``; there is no timed assertion. In the normal run
(benchmarks disabled) the command runs once and its JSON is checked. The points are invented
(random positions in an empty patch of ocean), not any real turnpoint list.
"""

from __future__ import annotations

import json
import random

import pytest
from wholeprocess import bench_against_baseline

POINTS = 200_000


def _features(count: int) -> list[dict]:
    rng = random.Random(14)
    return [{"type": "Feature",
             "geometry": {"type": "Point", "coordinates": [round(rng.uniform(-40.0, -30.0), 6),
                                                           round(rng.uniform(40.0, 50.0), 6)]},
             "properties": {"name": f"Invented {i}", "code": f"I{i}", "elevation_m": rng.randint(0, 2000),
                            "landable": i % 7 == 0, "kind": "field" if i % 7 == 0 else "waypoint"}}
            for i in range(count)]


@pytest.fixture(scope="module")
def big_files(tmp_path_factory):
    folder = tmp_path_factory.mktemp("large")
    features = _features(POINTS)
    geojson = folder / "invented.geojson"
    geojson.write_text(json.dumps({"type": "FeatureCollection", "features": features}), encoding="utf-8")
    rows = ["name,code,lat,lon,elevation_m,landable,kind,note"]
    for feature in features:
        p, (lon, lat) = feature["properties"], feature["geometry"]["coordinates"]
        rows.append(f"{p['name']},{p['code']},{lat},{lon},{p['elevation_m']},{str(p['landable']).lower()},{p['kind']},")
    csv = folder / "invented.csv"
    csv.write_text("\n".join(rows) + "\n", encoding="utf-8")
    return {"geojson": geojson, "csv": csv}


@pytest.mark.parametrize("kind", ["geojson", "csv"])
def test_bench_check_200000_points(benchmark, big_files, kind):
    output = bench_against_baseline(benchmark, ["-m", "glidetask", "check", str(big_files[kind]), "--json"],
                                    budget_ratio=2.5)
    (result,) = json.loads(output)
    assert result["ok"] and result["count"] == POINTS
    assert result["landable"] == len(range(0, POINTS, 7))
