"""Speed of the strategy tools: the ballast sweep and the odds as whole processes, and 10,000
simulated flights of a 300 km task.

The sweep's and the odds' whole-process times are compared with the bare ``python -c "import
numpy, scipy.optimize, pyproj"`` measured in the same run (the sweep's budget: 2.5 times that;
the odds have no budget of their own: recorded to follow them); the simulation's time with its
2 s budget. The figures go into ``extra_info``; there is no
assertion on time (machines differ). In the normal run (benchmarks disabled) each runs
once and its output is checked.
"""

from __future__ import annotations

import json

import pytest
from wholeprocess import ROOT, bench_against_baseline

TRIANGLE = ROOT / "demo_tasks" / "vardmoor-triangle-300.toml"
SWEEP = ["-m", "glidetask", "sweep", str(TRIANGLE), "--json"]
ODDS = ["-m", "glidetask", "odds", str(TRIANGLE), "--json"]
SWEEP_BUDGET_RATIO = 2.5
SIMULATION_RUNS = 10_000
SIMULATION_BUDGET_S = 2.0


def test_bench_sweep_whole_process(benchmark):
    output = bench_against_baseline(benchmark, SWEEP, budget_ratio=SWEEP_BUDGET_RATIO)
    data = json.loads(output)
    assert len(data["ballast_kg"]) >= 19 and len(data["thermal_strength_ms"]) == 10


def test_bench_odds_whole_process(benchmark):
    """The CLI's odds: the default simulated days for each ballast choice, and the spacing table."""
    output = bench_against_baseline(benchmark, ODDS, budget_ratio=None)
    data = json.loads(output)
    assert data["runs"] >= 1 and len(data["choices"]) >= 1


@pytest.mark.parametrize("terrain", [False, True], ids=["no-terrain", "task-terrain"])
def test_bench_ten_thousand_simulated_flights(benchmark, terrain):
    """Without terrain: the flight core alone. With the task's elevation model: the final
    glide's terrain requirement asked by the core at every event, as the plan flies it."""
    from glidetask.engine.plan import plan
    from glidetask.engine.simulate import simulate_days
    from glidetask.formats.task_file import load_scenario

    scenario = load_scenario(TRIANGLE)
    planned = plan(scenario)  # the plan itself is not part of the simulation's budget
    assert planned.path.total_m > 300e3
    requirement = planned.requirement if terrain else None
    assert (requirement is not None) == terrain

    def simulate():
        return simulate_days(scenario, runs=SIMULATION_RUNS, seed=1, ballasts_kg=[scenario.glider.ballast_kg],
                             path=planned.path, requirement=requirement)

    if benchmark.disabled:
        odds = benchmark(simulate)
    else:
        odds = benchmark.pedantic(simulate, rounds=5, iterations=1, warmup_rounds=1)
        median = benchmark.stats.stats.median
        benchmark.extra_info.update(flights=SIMULATION_RUNS, seconds=median, budget_s=SIMULATION_BUDGET_S,
                                    ratio_to_budget=median / SIMULATION_BUDGET_S,
                                    flights_per_second=SIMULATION_RUNS / median)
    assert odds.choices[0].runs == SIMULATION_RUNS
