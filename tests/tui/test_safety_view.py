"""The Safety view against ``glidetask plan``: the same coverage, gaps, fields in reach per
leg and terrain verdict, in the same words and rounding, in both unit systems."""

from __future__ import annotations

import dataclasses
import os
import re
import subprocess
import sys
from pathlib import Path

import pytest
from conftest import settle, text_of

from glidetask import paths
from glidetask.tui.app import make_app

ROOT = Path(__file__).resolve().parents[2]


def printed_plan(task: Path, units: str) -> str:
    return subprocess.run([sys.executable, "-m", "glidetask", "plan", str(task), "--units", units],
                          capture_output=True, text=True, check=True, cwd=ROOT,
                          env={**os.environ, "PYTHONPATH": str(ROOT)}).stdout


def cells(table, row: int) -> list[str]:
    return [str(getattr(value, "plain", value)).strip() for value in table.get_row_at(row)]


@pytest.mark.parametrize("units", ["metric", "aviation"])
async def test_safety_view_says_what_glidetask_plan_says(units, acknowledged):
    printed = printed_plan(paths.demo_task(), units)
    app = make_app(paths.demo_task(), units)
    # wide enough for the fields by name (narrower, the table names them by their codes: test_screen_sizes)
    async with app.run_test(size=(200, 60)) as pilot:
        await settle(pilot)
        await pilot.press("5")
        await settle(pilot)
        screen = app.screen
        summary = text_of(screen.query_one("#coverage-summary"))
        coverage = re.search(r"coverage\s+(\d+)% of the task", printed).group(1)
        assert f"{coverage}% of the task has a field in reach" in summary
        # "  gap        108.7 km to 122.6 km (13.9 km): no field within a glide"
        gaps = re.findall(r"gap\s+([\d.]+) \S+ to ([\d.]+) \S+ \(([\d.]+) \S+\): (.+)", printed)
        table = screen.query_one("#gaps-table")
        assert gaps and table.row_count == len(gaps)
        for row, gap in enumerate(gaps):
            assert cells(table, row) == list(gap)
        # "  leg 1 A > B: Nearest 0.0 km off track (also C 3.0 km, D 13.1 km)"
        legs = re.findall(r"leg (\d+) .+?: (.+?) ([\d.]+) \S+ off track(?: \(also (.+)\))?", printed)
        alternates = screen.query_one("#alternates-table")
        assert legs and alternates.row_count == len(legs)
        for row, (number, nearest, off_track, also) in enumerate(legs):
            got = cells(alternates, row)
            assert got[0].startswith(number + " ")
            assert got[1:3] == [nearest, off_track]
            assert got[3] == re.sub(r" (km|NM)(,|$)", r"\2", also)  # the unit sits in the header
        terrain = " ".join(text_of(screen.query_one("#terrain-summary")).split())
        for label in ("verdict", "least clearance", "terrain demands", "model covers"):
            line = re.search(rf"^  {label}\s+(.+)$", printed, re.M).group(1)
            assert line in terrain, (label, line, terrain)
        assert "model terrain.tif" in terrain  # named as the task names it, not by an absolute path


async def test_a_task_without_landables_or_terrain_says_what_safety_needs(synthetic, acknowledged):
    bare = dataclasses.replace(synthetic, turnpoints=tuple(dataclasses.replace(t, landable=False)
                                                          for t in synthetic.turnpoints))
    app = make_app(scenario=bare)
    async with app.run_test(size=(120, 40)) as pilot:
        await settle(pilot)
        await pilot.press("5")
        await settle(pilot)
        needs = app.screen.query_one("#safety-needs")
        assert needs.display and not app.screen.query_one("#coverage-panel").display
        assert "landable = true" in str(needs.render())


async def test_safety_view_without_a_terrain_model_still_shows_the_fields(synthetic, acknowledged):
    app = make_app(scenario=synthetic)
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        await pilot.press("5")
        await settle(pilot)
        plan = app.plan.plan
        assert plan.landables is not None and plan.terrain_source is None
        assert f"{plan.landables.coverage_percent:.0f}% of the task" in text_of(app.screen.query_one("#coverage-summary"))
        assert "no elevation model" in text_of(app.screen.query_one("#terrain-summary"))
        cautions_shown = app.screen.query_one("#safety-cautions")
        assert cautions_shown.region.bottom <= app.screen.query_one("#status-line").region.y  # whole, on screen
