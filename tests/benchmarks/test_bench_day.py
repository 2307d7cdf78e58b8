"""Whole-process time of ``glidetask day --json`` on the demo forecast day.

Budget (issue 16): at most 3x the bare ``python -c "import numpy, scipy.optimize, pyproj"``
measured in the same run; the ratio goes into the benchmark's ``extra_info`` (no assertion on
time). With benchmarks disabled the command runs once and its JSON is checked.
"""

from __future__ import annotations

import json

from wholeprocess import ROOT, bench_against_baseline


def test_bench_day(benchmark):
    argv = ["-m", "glidetask", "day", str(ROOT / "demo_tasks" / "vardmoor-forecast-day.toml"), "--json"]
    data = json.loads(bench_against_baseline(benchmark, argv, budget_ratio=3.0))
    assert len(data["hours"]) == 12 and data["cautions"]
