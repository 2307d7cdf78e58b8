"""Whole-process timing of a glidetask command against the bare imports it may not outgrow.

Every whole-process budget is a ratio to ``python -c "import numpy, scipy.optimize, pyproj"``
measured in the same run, because the machines are shared and noisy. The ratio goes into the
benchmark's ``extra_info``; there is no assertion on time. With benchmarks disabled (the normal
test run) the command runs once, so its output can still be checked.
"""

from __future__ import annotations

import os
import statistics
import subprocess
import sys
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]
ROUNDS = 7
BASELINE = ["-c", "import numpy, scipy.optimize, pyproj"]


def run_python(argv: list[str]) -> str:
    """Run ``python ARGV`` from the project root with the project importable; its stdout."""
    env = {**os.environ, "PYTHONPATH": str(ROOT)}
    result = subprocess.run([sys.executable, *argv], cwd=ROOT, env=env, capture_output=True, text=True,
                            timeout=120, check=True)
    return result.stdout


def median_seconds(argv: list[str], rounds: int = ROUNDS) -> float:
    times = []
    for _ in range(rounds):
        start = time.perf_counter()
        run_python(argv)
        times.append(time.perf_counter() - start)
    return statistics.median(times)


def bench_against_baseline(benchmark, argv: list[str], *, budget_ratio: float,
                           other_baselines: dict[str, list[str]] | None = None) -> str:
    """Time ``python ARGV`` and the bare-import baseline in the same run; the command's stdout.

    ``other_baselines`` (name -> argv) are timed too and reported as ``NAME_ratio``.
    """
    if benchmark.disabled:
        return benchmark(run_python, argv)
    run_python(BASELINE)  # warm the file cache for all
    baseline = median_seconds(BASELINE)
    extra = {f"{name}_ratio": median_seconds(other) / baseline for name, other in (other_baselines or {}).items()}
    output = benchmark.pedantic(run_python, args=(argv,), rounds=ROUNDS, iterations=1, warmup_rounds=1)
    median = benchmark.stats.stats.median
    benchmark.extra_info.update(baseline_s=baseline, command_s=median, ratio_to_baseline=median / baseline,
                                budget_ratio=budget_ratio, **extra)
    return output
