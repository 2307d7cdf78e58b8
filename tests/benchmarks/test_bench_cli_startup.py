"""Whole-process time of ``glidetask polar --json`` and ``glidetask glide --json``.

Each is compared with the bare ``python -c "import numpy, scipy.optimize, pyproj"`` measured
in the same run; the ratio goes into the benchmark's ``extra_info`` (no assertion on time:
machines differ). In the normal run (benchmarks disabled) each command runs once and its
JSON is checked.
"""

from __future__ import annotations

import json

import pytest
from wholeprocess import ROOT, bench_against_baseline

COMMANDS = {
    "polar": ["-m", "glidetask", "polar", str(ROOT / "polars" / "racing-15m.toml"), "--ballast-kg", "100", "--json"],
    "glide": ["-m", "glidetask", "glide", "--polar", str(ROOT / "polars" / "club.toml"), "--distance-km", "40",
              "--height-m", "1500", "--wind", "270/20", "--course-deg", "90", "--mc-ms", "1", "--json"],
}


@pytest.mark.parametrize("command", sorted(COMMANDS))
def test_bench_cli_startup(benchmark, command):
    argv = COMMANDS[command]
    output = bench_against_baseline(benchmark, argv, budget_ratio=1.5)
    data = json.loads(output)
    assert data["cautions"]
