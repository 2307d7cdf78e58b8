"""Speed budgets of the plan with terrain, landable coverage and sensitivity.

* Whole-process ``glidetask plan --json`` on the demo triangle with its elevation model: at
  most 2.5 x the bare ``python -c "import numpy, scipy.optimize, pyproj"`` measured in the
  same run; the same task without the model: at most 1.6 x. The ratios, and what importing
  rasterio alone costs on top of the baseline, go into ``extra_info`` (no timed assertion:
  machines differ).
* ``plan()`` recomputed on the demo triangle with terrain, as the terminal UI does after an
  edit: within 50 ms (the model cached by file, the path's terrain and the coverage kept by
  the UI's memo, ``tui.recompute.PLAN_MEMO``). A what-if that moves the coverage's inputs
  (the wind) is timed too.

In the normal run (benchmarks disabled) each runs once and its result is checked.
"""

from __future__ import annotations

import json
import re
from pathlib import Path

import pytest
from wholeprocess import ROOT, bench_against_baseline

from glidetask.engine.plan import plan
from glidetask.engine.scenario import Wind
from glidetask.formats.task_file import load_scenario
from glidetask.tui.recompute import PLAN_MEMO

DEMO = ROOT / "demo_tasks"
TRIANGLE = DEMO / "vardmoor-triangle-300.toml"
WITH_RASTERIO = ["-c", "import numpy, scipy.optimize, pyproj, rasterio"]


def _without_terrain(folder: Path) -> Path:
    """The demo triangle with absolute paths and no [terrain] table."""
    text = TRIANGLE.read_text(encoding="utf-8")
    text = re.sub(r"\[terrain\]\s*\nfile = \"[^\"]*\"\n", "", text)
    text = text.replace('turnpoints = "vardmoor.geojson"', f'turnpoints = "{DEMO / "vardmoor.geojson"}"')
    text = text.replace('file = "vardmoor-airspace.geojson"', f'file = "{DEMO / "vardmoor-airspace.geojson"}"')
    text = re.sub(r'polar = "\.\./polars/([^"]+)"', lambda m: f'polar = "{ROOT / "polars" / m.group(1)}"', text)
    assert "[terrain]" not in text
    path = folder / "triangle-no-terrain.toml"
    path.write_text(text, encoding="utf-8")
    return path


@pytest.mark.parametrize("terrain, budget", [(True, 2.5), (False, 1.6)], ids=["with-terrain", "without-terrain"])
def test_bench_plan_command(benchmark, tmp_path, terrain, budget):
    task = TRIANGLE if terrain else _without_terrain(tmp_path)
    argv = ["-m", "glidetask", "plan", str(task), "--json"]
    output = bench_against_baseline(benchmark, argv, budget_ratio=budget, other_baselines={"rasterio_import": WITH_RASTERIO})
    data = json.loads(output)
    assert data["finished"] and data["landables"]["by_leg"] and data["sensitivity"]["rows"]
    assert ("terrain" in data) is terrain


@pytest.fixture(scope="module")
def triangle():
    scenario = load_scenario(TRIANGLE)
    plan(scenario, memo=PLAN_MEMO)  # the model, the path's terrain and the coverage kept, as in the UI
    return scenario


def test_bench_plan_recompute_with_terrain(benchmark, triangle):
    result = benchmark(lambda: plan(triangle, memo=PLAN_MEMO))
    assert result.terrain is not None and result.landables is not None
    if not benchmark.disabled:
        benchmark.extra_info.update(budget_s=0.050, median_s=benchmark.stats.stats.median)


def test_bench_plan_recompute_with_terrain_new_wind(benchmark, triangle):
    # A wind edit changes the coverage's inputs: the coverage is computed again each round.
    winds = iter(Wind(250.0, (15.0 + 0.001 * i) / 3.6) for i in range(100_000))
    result = benchmark(lambda: plan(triangle, wind=next(winds), memo=PLAN_MEMO))
    assert result.terrain is not None and result.landables is not None
    if not benchmark.disabled:
        benchmark.extra_info.update(budget_s=0.050, median_s=benchmark.stats.stats.median)
