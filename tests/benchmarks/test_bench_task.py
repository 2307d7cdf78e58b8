"""Speed budgets of the task geometry.

* The optimized distance of a 10-point task with mixed zones: budget 20 ms.
* ``glidetask check`` on a 50,000-point GeoJSON file, whole process, against the bare
  ``python -c "import numpy, scipy.optimize, pyproj"`` measured in the same run: budget
  2.5x; the ratio goes into ``extra_info`` (no assertion on time: machines differ).

In the normal run (benchmarks disabled) each runs once, untimed, and its result is checked.
"""

from __future__ import annotations

import json
import math
from pathlib import Path

import pytest
from wholeprocess import ROOT, bench_against_baseline

from glidetask.engine import task_search
from glidetask.engine.task import Task, TaskPoint, Turnpoint, nominal_distance_m
from glidetask.engine.task_search import optimized_path
from glidetask.engine.zones import Zone

BIG_FILE_POINTS = 50_000


def _ten_point_task() -> Task:
    """A start line, eight turns round a loop of about 650 km (cylinders, sectors, keyholes)
    and a finish cylinder: invented points in the open North Atlantic."""
    points = [TaskPoint(Turnpoint("Start", None, 46.0, -33.0, 300.0), Zone.line(10_000.0))]
    zones = (Zone.cylinder(500.0), Zone.sector(10_000.0), Zone.keyhole())
    for i in range(8):
        angle = 2.0 * math.pi * i / 8
        point = Turnpoint(f"T{i + 1}", None, 46.5 + 0.8 * math.sin(angle), -33.0 + 1.2 * math.cos(angle), 300.0)
        points.append(TaskPoint(point, zones[i % 3]))
    points.append(TaskPoint(Turnpoint("Finish", None, 46.0, -33.0, 300.0), Zone.cylinder(3_000.0)))
    return Task("ten points", "racing", tuple(points))


def _fresh_optimized(task: Task) -> float:
    task_search.optimized_path.cache_clear()  # time the search, not the cache
    return optimized_path(task).total_m


def test_bench_optimized_ten_points(benchmark):
    task = _ten_point_task()
    total = benchmark(_fresh_optimized, task)
    assert 0.0 < total < nominal_distance_m(task)
    if not benchmark.disabled:
        benchmark.extra_info.update(budget_s=0.020, median_s=benchmark.stats.stats.median,
                                    share_of_budget=benchmark.stats.stats.median / 0.020)


def _big_geojson(path: Path) -> None:
    features = []
    for i in range(BIG_FILE_POINTS):
        lat = -70.0 + 140.0 * ((i * 0.618034) % 1.0)
        lon = -180.0 + 360.0 * ((i * 0.414214) % 1.0)
        features.append({"type": "Feature", "geometry": {"type": "Point", "coordinates": [round(lon, 6), round(lat, 6)]},
                         "properties": {"name": f"Point {i}", "code": f"P{i}", "elevation_m": float(i % 3000),
                                        "landable": i % 4 == 0, "kind": ("field", "waypoint")[i % 4 != 0]}})
    path.write_text(json.dumps({"type": "FeatureCollection", "features": features}))


def test_bench_check_big_turnpoint_file(benchmark, tmp_path):
    path = tmp_path / "big.geojson"
    _big_geojson(path)
    argv = ["-m", "glidetask", "check", str(path), "--json"]
    output = bench_against_baseline(benchmark, argv, budget_ratio=2.5)
    (result,) = json.loads(output)
    assert result["ok"] and result["count"] == BIG_FILE_POINTS
    assert result["landable"] == BIG_FILE_POINTS // 4
