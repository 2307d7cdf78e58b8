"""Whole-process time of ``glidetask polar --json`` and ``glidetask glide --json``.

Each is compared with the bare ``python -c "import numpy, scipy.optimize, pyproj"`` measured
in the same run; the ratio goes into the benchmark's ``extra_info`` (no assertion on time:
machines differ). In the normal run (benchmarks disabled) each command runs once and its
JSON is checked.
"""

from __future__ import annotations

import json
import os
import statistics
import subprocess
import sys
import time
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[2]
ROUNDS = 7
BASELINE = ["-c", "import numpy, scipy.optimize, pyproj"]
COMMANDS = {
    "polar": ["-m", "glidetask", "polar", str(ROOT / "polars" / "racing-15m.toml"), "--ballast-kg", "100", "--json"],
    "glide": ["-m", "glidetask", "glide", "--polar", str(ROOT / "polars" / "club.toml"), "--distance-km", "40",
              "--height-m", "1500", "--wind", "270/20", "--course-deg", "90", "--mc-ms", "1", "--json"],
}


def _run(argv: list[str]) -> str:
    env = {**os.environ, "PYTHONPATH": str(ROOT)}
    result = subprocess.run([sys.executable, *argv], cwd=ROOT, env=env, capture_output=True, text=True,
                            timeout=120, check=True)
    return result.stdout


def _median_seconds(argv: list[str], rounds: int) -> float:
    times = []
    for _ in range(rounds):
        start = time.perf_counter()
        _run(argv)
        times.append(time.perf_counter() - start)
    return statistics.median(times)


@pytest.mark.parametrize("command", sorted(COMMANDS))
def test_bench_cli_startup(benchmark, command):
    argv = COMMANDS[command]
    if benchmark.disabled:
        output = benchmark(_run, argv)
    else:
        _run(BASELINE)  # warm the file cache for both
        baseline = _median_seconds(BASELINE, ROUNDS)
        output = benchmark.pedantic(_run, args=(argv,), rounds=ROUNDS, iterations=1, warmup_rounds=1)
        median = benchmark.stats.stats.median
        benchmark.extra_info.update(baseline_s=baseline, command_s=median, ratio_to_baseline=median / baseline)
    data = json.loads(output)
    assert data["cautions"]
