"""Speed budget: landable coverage of a 300 km task against 50,000 fields, terrain loaded (< 1 s).

The fields are spread at random (seeded) over the invented demo region, their elevations
from its generator; the path is a triangle of about 300 km sampled every 1 km; the demo
elevation model is loaded (and cached) beforehand, as a plan finds it. The figure is
compared with one vectorised geodesic inverse from a point to all 50,000 fields, measured
in the same run (``extra_info``; no assertion on time: machines differ). In the normal run
(benchmarks disabled) each runs once and the result is checked for sense.
"""

from __future__ import annotations

import importlib.util
import statistics
import time
from pathlib import Path

import numpy as np
import pytest

from glidetask.engine import geodesy
from glidetask.engine.polar import PolarSpec, scaled_polar
from glidetask.engine.reach import REACHABLE
from glidetask.engine.reach_coverage import coverage
from glidetask.engine.scenario import Wind
from glidetask.engine.task import Turnpoint
from glidetask.engine.terrain import load_terrain

ROOT = Path(__file__).resolve().parents[2]
FIELDS = 50_000
KMH = 1 / 3.6
SPEC = PolarSpec(  # invented, not any real aircraft
    label="bench 15 m", wing_area_m2=10.5, reference_mass_kg=350.0, empty_mass_kg=260.0,
    max_ballast_kg=170.0, max_mass_kg=525.0, vne_ias_ms=270 * KMH, min_speed_ias_ms=70 * KMH,
    points=((80 * KMH, 0.62), (100 * KMH, 0.64), (120 * KMH, 0.80), (150 * KMH, 1.20), (180 * KMH, 1.85)),
)
TRIANGLE = ([46.05, 45.50, 46.25, 46.05], [-33.30, -34.35, -34.75, -33.30])


def _generator():
    spec = importlib.util.spec_from_file_location("make_terrain", ROOT / "demo_tasks" / "make_terrain.py")
    module = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(module)
    return module


@pytest.fixture(scope="module")
def case():
    rng = np.random.default_rng(2024)
    lats = rng.uniform(45.05, 47.45, FIELDS)
    lons = rng.uniform(-35.45, -31.55, FIELDS)
    elevation = _generator().elevation(lats, lons)
    fields = [Turnpoint(f"Field {i}", None, float(a), float(b), float(e), True, "field")
              for i, (a, b, e) in enumerate(zip(lats, lons, elevation))]
    path_lats, path_lons, along = geodesy.path_points(*TRIANGLE, 1000.0)
    corners = np.concatenate(([0.0], np.cumsum(geodesy.distance(TRIANGLE[0][:-1], TRIANGLE[1][:-1],
                                                                TRIANGLE[0][1:], TRIANGLE[1][1:]))))
    legs = np.clip(np.searchsorted(corners, along, side="right") - 1, 0, 2)
    terrain = load_terrain(ROOT / "demo_tasks" / "terrain.tif")
    return dict(fields=fields, lats=lats, lons=lons, path=(path_lats, path_lons, along, legs), terrain=terrain)


def _coverage(case):
    return coverage(*case["path"], case["fields"], scaled_polar(SPEC, 420.0, sigma=0.9), Wind(250.0, 20 * KMH),
                    1000.0, 200.0, terrain=case["terrain"], clearance_m=150.0)


def _baseline(case):
    return geodesy.inverse(46.0, -33.5, case["lats"], case["lons"])


def test_bench_coverage_50000_fields_300_km_with_terrain(benchmark, case):
    assert 290_000.0 < case["path"][2][-1] < 320_000.0
    if benchmark.disabled:
        result = benchmark(_coverage, case)
    else:
        _baseline(case)
        times = []
        for _ in range(7):
            start = time.perf_counter()
            _baseline(case)
            times.append(time.perf_counter() - start)
        baseline = statistics.median(times)
        result = benchmark.pedantic(_coverage, args=(case,), rounds=5, iterations=1, warmup_rounds=1)
        median = benchmark.stats.stats.median
        benchmark.extra_info.update(baseline_geodesics_50000_s=baseline, coverage_s=median,
                                    ratio_to_baseline=median / baseline)
    assert 0.0 <= result.coverage_percent <= 100.0
    assert result.terrain_checked and len(result.by_leg) == 3
    # With a field every 0.2 km^2 on average, almost everywhere has one in reach.
    assert np.mean(result.status == REACHABLE) > 0.5
