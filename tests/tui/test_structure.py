"""Issue 10 item 6: the UI reads only the engine's SI Plan, widgets take it through reactive
attributes and draw in their watchers, and views post notices up as messages."""

from __future__ import annotations

import ast
from pathlib import Path

from conftest import settle, text_of
from textual.reactive import Reactive

from glidetask.tui.app import make_app
from glidetask.tui.recompute import Outcome
from glidetask.tui.widgets.legs_table import LegsTable
from glidetask.tui.widgets.plan_totals import PlanTotals

TUI = Path(__file__).resolve().parents[2] / "glidetask" / "tui"


def test_views_never_set_the_apps_notice_themselves():
    offenders = []
    for path in TUI.rglob("*.py"):
        if path.name == "app.py":
            continue
        for node in ast.walk(ast.parse(path.read_text())):
            if isinstance(node, ast.Assign):
                for target in node.targets:
                    if isinstance(target, ast.Attribute) and target.attr == "notice":
                        offenders.append(f"{path.name}:{node.lineno}")
    assert not offenders, offenders


def test_the_ui_reads_the_plan_in_si_only():
    assert [f for f in Outcome.__dataclass_fields__] == ["scenario", "plan", "elapsed_s"]
    for path in TUI.rglob("*.py"):
        source = path.read_text()
        assert "plan_to_dict" not in source and "tui.contract" not in source, path.name
    # the planner is reached through one module of the UI (an engine rename is a one-line merge)
    users = [p.name for p in TUI.rglob("*.py") if "glidetask.engine.plan import" in p.read_text()]
    assert users == ["recompute.py"], users


async def test_widgets_take_the_plan_through_reactives(acknowledged):
    assert isinstance(LegsTable.__dict__["plan"], Reactive) and isinstance(PlanTotals.__dict__["plan"], Reactive)
    from glidetask import paths

    app = make_app(paths.demo_task())
    async with app.run_test(size=(120, 40)) as pilot:
        await settle(pilot)
        totals = app.screen.query_one(PlanTotals)
        assert totals.plan is app.plan.plan
        assert "last good plan" not in text_of(totals)
        totals.stale = True  # the watcher draws the mark
        await pilot.pause()
        assert "last good plan" in text_of(totals)
        legs = app.screen.query_one(LegsTable)
        assert legs.plan is app.plan.plan and legs.row_count == len(app.plan.plan.legs)
        legs.plan = None
        await pilot.pause()
        assert legs.row_count == 0
