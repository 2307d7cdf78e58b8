"""Speed budgets of the planner (issue: planner).

* ``plan()`` on a 10-leg task: under 20 ms.
* Whole-process ``glidetask plan --json`` on a 6-leg task: at most 1.6 x the bare
  ``python -c "import numpy, scipy.optimize, pyproj"`` measured in the same run (the ratio
  goes into ``extra_info``; no timed assertion, machines differ).
* The flight core: 10,000 flights of a 300 km task well under 2 s.

In the normal run (benchmarks disabled) each runs once and its result is checked.
"""

from __future__ import annotations

import dataclasses
import json
from pathlib import Path

import numpy as np
import pytest
from wholeprocess import ROOT, bench_against_baseline

from glidetask.engine.flight import Course, fly
from glidetask.engine.flight import course_for, flights_for
from glidetask.engine.plan import plan
from glidetask.engine.scenario import Profile, Wind
from glidetask.engine.task import Task, TaskPoint
from glidetask.engine.task_search import optimized_path
from glidetask.engine.zones import Zone
from glidetask.formats.task_file import load_scenario

DEMO = ROOT / "demo_tasks"
SIX_LEGS = ("VAR", "Skarren Mast", "Tarnley Field", "Dunhallow Lea", "Greyholt Field", "Vard Cross", "VAR")
TEN_LEGS = ("VAR", "Yarnsby", "Skarren Mast", "Tarnley Field", "Crowsend Field", "Dunhallow Lea", "Glimmer Lake",
            "Greyholt Field", "Vard Cross", "Skarren Top", "VAR")


def _task_file(folder: Path, names, legs_label: str) -> Path:
    """A racing task over the demo turnpoints (absolute paths to the demo files)."""
    points = [f'[[task.points]]\nat = "{names[0]}"\nzone = "line"\nlength_km = 10.0\n']
    points += [f'[[task.points]]\nat = "{n}"\nzone = "cylinder"\nradius_km = 0.5\n' for n in names[1:-1]]
    points.append(f'[[task.points]]\nat = "{names[-1]}"\nzone = "cylinder"\nradius_km = 3.0\n')
    text = (f'[task]\nname = "{legs_label} benchmark"\nkind = "racing"\nturnpoints = "{DEMO / "vardmoor.geojson"}"\n\n'
            + "\n".join(points)
            + f'\n[glider]\npolar = "{ROOT / "polars" / "racing-15m.toml"}"\npilot_kg = 85.0\nballast_kg = 100.0\n'
            '\n[day]\nstart_time = "11:30"\nband_top_m = 2000.0\nband_bottom_m = 1000.0\n'
            'wind = { from_deg = 250.0, speed_kmh = 15.0 }\n'
            'climb_ms = [["11:00", 1.6], ["12:30", 2.4], ["16:30", 2.4], ["18:30", 1.0]]\nlift_ends = "19:00"\n'
            '\n[safety]\narrival_margin_m = 200.0\n')
    path = folder / f"{legs_label}.toml"
    path.write_text(text, encoding="utf-8")
    return path


def test_bench_plan_ten_legs(benchmark, tmp_path):
    scenario = load_scenario(_task_file(tmp_path, TEN_LEGS, "ten-legs"))
    assert len(scenario.task.points) == 11
    optimized_path(scenario.task)  # the geometry is cached per task, as in the terminal UI
    result = benchmark(plan, scenario)
    assert result.finished and len(result.legs) == 10
    if not benchmark.disabled:
        benchmark.extra_info.update(budget_s=0.020, median_s=benchmark.stats.stats.median,
                                    distance_km=result.planned_distance_m / 1000.0)


def test_bench_plan_command_six_legs(benchmark, tmp_path):
    task = _task_file(tmp_path, SIX_LEGS, "six-legs")
    argv = ["-m", "glidetask", "plan", str(task), "--json"]
    output = bench_against_baseline(benchmark, argv, budget_ratio=1.6)
    data = json.loads(output)
    assert len(data["legs"]) == 6 and data["finished"]


def test_bench_core_ten_thousand_flights(benchmark):
    scenario = load_scenario(DEMO / "vardmoor-triangle-300.toml")
    course = course_for(optimized_path(scenario.task))
    rng = np.random.default_rng(7)
    count = 10_000
    flights = dataclasses.replace(
        flights_for(scenario), lift_scale=rng.lognormal(0.0, 0.25, count),
        wind_speed_ms=np.abs(rng.normal(15 / 3.6, 2.0, count)), wind_from_deg=rng.normal(250.0, 20.0, count) % 360,
        band_top_m=rng.normal(2000.0, 150.0, count), lift_ends_s=rng.normal(18.25 * 3600, 1800.0, count))
    flown = benchmark(fly, course, flights, detail=False)
    assert flown.finished.shape == (count,)
    assert 0.5 < flown.finished.mean() <= 1.0  # most days around this forecast get home
    if not benchmark.disabled:
        benchmark.extra_info.update(budget_s=2.0, median_s=benchmark.stats.stats.median, flights=count,
                                    course_km=float(np.sum(course.distance_m)) / 1000.0)
