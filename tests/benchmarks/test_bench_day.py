"""Whole-process time of ``glidetask day --json`` and ``glidetask plan --json`` on the demo
forecast day (its day derived from a sounding, so MetPy is imported).

Budget (issue 16): ``day`` at most 3x the bare ``python -c "import numpy, scipy.optimize,
pyproj"`` measured in the same run. ``plan`` of the forecast-day task has no budget of its
own: its ratio to the bare baseline, and the ratio of the same day typed by hand (no
sounding, no MetPy: ``typed_plan_ratio``), go into ``extra_info`` to show what deriving the
day costs. No assertion on time. With benchmarks disabled each command runs once and its
JSON is checked.
"""

from __future__ import annotations

import json
import re

from wholeprocess import ROOT, bench_against_baseline

DEMO = ROOT / "demo_tasks"
FORECAST = DEMO / "vardmoor-forecast-day.toml"


def test_bench_day(benchmark):
    argv = ["-m", "glidetask", "day", str(FORECAST), "--json"]
    data = json.loads(bench_against_baseline(benchmark, argv, budget_ratio=3.0))
    assert len(data["hours"]) == 12 and data["cautions"]


def _typed_copy(folder) -> str:
    """The forecast-day task with the derived day typed by hand (rounded), no sounding."""
    text = FORECAST.read_text(encoding="utf-8")
    for key, value in (("turnpoints", "vardmoor.geojson"), ("polar", "../polars/club.toml"), ("file", "terrain.tif")):
        text = text.replace(f'{key} = "{value}"', f'{key} = "{(DEMO / value).resolve().as_posix()}"')
    text = re.sub(r'sounding = .*?\nsurface = \[\[.*?\]\]\n', "", text, flags=re.S)
    text = text.replace("[day]\n", '[day]\nband_top_m = 1940.0\nband_bottom_m = 1025.0\nlift_ends = "18:25"\n'
                                   'wind = { from_deg = 266.0, speed_kmh = 19.5 }\n'
                                   'thermal_strength_ms = [["09:00", 0.0], ["10:00", 2.6], ["13:00", 2.7], '
                                   '["16:00", 2.0], ["18:00", 1.0], ["19:00", 0.0]]\n', 1)
    path = folder / "typed.toml"
    path.write_text(text, encoding="utf-8")
    return str(path)


def test_bench_plan_forecast_day(benchmark, tmp_path):
    argv = ["-m", "glidetask", "plan", str(FORECAST), "--json"]
    typed = ["-m", "glidetask", "plan", _typed_copy(tmp_path), "--json"]
    data = json.loads(bench_against_baseline(benchmark, argv, budget_ratio=float("nan"),
                                             other_baselines={"typed_plan": typed}))
    assert data["finished"] and data["day"]["source"]["derived"]
