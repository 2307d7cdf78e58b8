"""Speed budgets of the airspace check (issue: airspace in the plan).

* The whole airspace check (crossings, band cap, conflicts) of the demo triangle's planned
  path, sampled every 250 m, with 500 volumes spread over the region: within 10 ms. Timed
  against ``plan()`` of the same task in the same run (its recompute, as the UI does after
  an edit); both medians and their ratio go into ``extra_info``.
* Whole-process ``glidetask check`` of a 5,000-volume airspace file: at most 2 x the bare
  ``python -c "import numpy, scipy.optimize, pyproj"`` measured in the same run.

No timed assertion (machines differ). In the normal run (benchmarks disabled) each runs
once and its result is checked.
"""

from __future__ import annotations

import json
import statistics
import time

import numpy as np
from wholeprocess import ROOT, bench_against_baseline

from glidetask.engine.airspace import Airspace
from glidetask.engine.airspace_conflicts import check_path
from glidetask.engine.plan import plan
from glidetask.formats.airspace_file import read_airspace
from glidetask.formats.task_file import load_scenario

TRIANGLE = ROOT / "demo_tasks" / "vardmoor-triangle-300.toml"
DEMO_AIRSPACE = ROOT / "demo_tasks" / "vardmoor-airspace.geojson"


def _circle(lat: float, lon: float, radius_deg: float, points: int = 36) -> list[list[float]]:
    angles = np.linspace(0.0, 2.0 * np.pi, points, endpoint=False)
    ring = [[round(lon + radius_deg * np.cos(a) / np.cos(np.radians(lat)), 5),
             round(lat + radius_deg * np.sin(a), 5)] for a in angles]
    return ring + [ring[0]]


def _features(count: int, seed: int = 11) -> list[dict]:
    """Invented volumes: circles of 36 positions, 3-25 km across, over and around the demo region."""
    rng = np.random.default_rng(seed)
    out = []
    for k in range(count):
        lat, lon = rng.uniform(44.5, 48.0), rng.uniform(-36.0, -31.0)
        floor = [{"value": 0, "unit": "m", "ref": "AGL"}, {"value": 1500, "unit": "m", "ref": "MSL"},
                 {"value": 65, "unit": "FL"}][k % 3]
        out.append({"type": "Feature", "geometry": {"type": "Polygon",
                                                    "coordinates": [_circle(lat, lon, rng.uniform(0.015, 0.12))]},
                    "properties": {"name": f"Invented {k}", "class": "D", "floor": floor,
                                   "ceiling": {"value": 95, "unit": "FL"}}})
    return out


def _median_s(function, rounds: int = 15) -> float:
    times = []
    for _ in range(rounds):
        start = time.perf_counter()
        function()
        times.append(time.perf_counter() - start)
    return statistics.median(times)


def test_bench_airspace_check_of_a_demo_path_with_500_volumes(benchmark, tmp_path):
    scenario = load_scenario(TRIANGLE)
    planned = plan(scenario)
    path = tmp_path / "many.geojson"
    path.write_text(json.dumps({"type": "FeatureCollection", "features": _features(500)}))
    airspace = read_airspace(path)
    demo = read_airspace(DEMO_AIRSPACE)
    airspace = Airspace(airspace.volumes + demo.volumes, "many")
    lats, lons, along = planned.path.sample(250.0)
    heights = np.full(along.shape, 1300.0)
    day = scenario.day

    def run():
        return check_path(airspace, lats, lons, along, along, heights, band_top_m=day.band_top_m,
                          band_bottom_m=day.band_bottom_m, leg_starts_m=planned.path.cumulative_m[:-1],
                          ground=lambda la, lo: np.full(np.shape(la), 300.0),
                          isa_deviation_c=day.isa_deviation_c)

    found = benchmark(run)
    assert any(c.name == "Brennick Area Step 1" and c.top_m == 1400.0 for c in found.caps)
    assert len(found.stretches) > 5  # the invented volumes are met too
    if not benchmark.disabled:
        plan_s = _median_s(lambda: plan(scenario), rounds=5)
        check_s = benchmark.stats.stats.median
        benchmark.extra_info.update(plan_s=plan_s, check_s=check_s, ratio_to_plan=check_s / plan_s,
                                    budget_s=0.010)


def test_bench_check_of_a_5000_volume_file(benchmark, tmp_path):
    path = tmp_path / "five-thousand.geojson"
    path.write_text(json.dumps({"type": "FeatureCollection", "features": _features(5000, seed=5)}))
    output = bench_against_baseline(benchmark, ["-m", "glidetask", "check", str(path), "--json"], budget_ratio=2.0)
    [result] = json.loads(output)
    assert result["kind"] == "airspace" and result["ok"] and result["count"] == 5000
