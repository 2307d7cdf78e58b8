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


# Widgets that draw engine figures: each takes them through reactive attributes. The form
# field stays imperative by design (its docstring says why).
IMPERATIVE = {"form_field.py"}


def test_no_widget_is_drawn_through_a_show_method():
    offenders = []
    for path in sorted((TUI / "widgets").glob("*.py")):
        if path.name in IMPERATIVE:
            continue
        for node in ast.walk(ast.parse(path.read_text())):
            if isinstance(node, ast.ClassDef):
                offenders += [f"{path.name}: {node.name}.{item.name}" for item in node.body
                              if isinstance(item, ast.FunctionDef) and (item.name == "show" or item.name.startswith("show_"))]
    assert not offenders, offenders


def test_the_drawing_widgets_declare_their_inputs_as_reactives():
    from glidetask.tui.widgets.coverage_strip import CoverageStrip
    from glidetask.tui.widgets.day_plot import DayPlot
    from glidetask.tui.widgets.flight_profile import FlightProfile, ProfileFacts
    from glidetask.tui.widgets.glide_verdict import GlideVerdict
    from glidetask.tui.widgets.glider_figures import GliderFigures
    from glidetask.tui.widgets.points_table import PointsTable
    from glidetask.tui.widgets.polar_plot import PolarPlot
    from glidetask.tui.widgets.profile_editor import ProfileEditor
    from glidetask.tui.widgets.safety_panels import (AirspacePanel, AlternatesTable, CoverageSummary, GapsTable,
                                                     TerrainSummary)
    from glidetask.tui.widgets.stf_card import SpeedToFlyCard
    from glidetask.tui.widgets.strategy_odds import FinishPlot, LandoutsTable, OddsTable, ProbabilityBars
    from glidetask.tui.widgets.strategy_sweep import SweepPlot, SweepTable
    from glidetask.tui.widgets.task_sketch import TaskSketch
    from glidetask.tui.widgets.terrain_profile import TerrainProfile

    inputs = {
        LegsTable: ("plan", "units", "codes", "compact", "full_names"), PlanTotals: ("plan", "units", "stale"),
        PointsTable: ("shown_task", "units", "compact"), TaskSketch: ("sketch", "units"), CoverageStrip: ("plan",),
        GlideVerdict: ("answer", "units", "plan_note", "problems"), TerrainProfile: ("check", "units", "note"),
        GliderFigures: ("card", "units"), PolarPlot: ("card", "units"), SpeedToFlyCard: ("card", "units"),
        FlightProfile: ("plan", "units", "codes"), DayPlot: ("day", "units", "finish_s"),
        ProfileEditor: ("day", "units"), ProfileFacts: ("plan", "units"), AirspacePanel: ("plan", "units"),
        CoverageSummary: ("plan", "units"), GapsTable: ("plan", "units"), TerrainSummary: ("plan", "units"),
        AlternatesTable: ("plan", "units", "codes", "narrow"),
        SweepTable: ("sweep", "units", "width_available", "radii_m", "sizes"), SweepPlot: ("sweep", "units"),
        ProbabilityBars: ("odds", "pending"), OddsTable: ("odds", "pending"), LandoutsTable: ("odds", "codes"),
        FinishPlot: ("odds",),
    }
    for widget, names in inputs.items():
        for name in names:
            assert isinstance(widget._reactives.get(name), Reactive), f"{widget.__name__}.{name}"
            # a render()-drawn widget repaints on its own; the others draw in a watcher
            assert hasattr(widget, f"watch_{name}") or widget in (TaskSketch, CoverageStrip), f"{widget.__name__}.{name}"


async def test_a_units_change_alone_redraws_the_widget(acknowledged):
    """Each input is watched: setting only ``units`` redraws the same figures in the new units."""
    from glidetask import paths
    from glidetask.tui.widgets.coverage_strip import CoverageStrip
    from glidetask.tui.widgets.glider_figures import GliderFigures
    from glidetask.tui.widgets.terrain_profile import TerrainProfile
    from glidetask.units import AVIATION, METRIC

    app = make_app(paths.demo_task())
    async with app.run_test(size=(120, 40)) as pilot:
        await settle(pilot)
        totals = app.screen.query_one(PlanTotals)
        assert " km" in text_of(totals) and " NM" not in text_of(totals)
        totals.units = AVIATION
        await pilot.pause()
        assert " NM" in text_of(totals) and " km" not in text_of(totals)
        await pilot.press("2")  # Glider
        await settle(pilot)
        figures = app.screen.query_one(GliderFigures)
        assert "m/s" in text_of(figures) and "kt" not in text_of(figures)
        figures.units = AVIATION
        await pilot.pause()
        assert "kt" in text_of(figures) and "m/s" not in text_of(figures)
        await pilot.press("5")  # Safety: the strip is drawn from the plan's own coverage
        await settle(pilot)
        plan = app.plan.plan
        strip = app.screen.query_one(CoverageStrip)
        assert strip.plan is plan and plan.landables.landable_count > 0
        assert strip.total_m == sum(leg.distance_m for leg in plan.legs)
        assert strip.gaps == [(float(a), float(b)) for a, b in plan.landables.gaps]
        from glidetask.tui.widgets.safety_panels import CoverageSummary

        summary = app.screen.query_one(CoverageSummary)
        assert " m above the field" in text_of(summary) and " ft " not in text_of(summary)
        summary.units = AVIATION
        await pilot.pause()
        assert " ft above the field" in text_of(summary)
        profile = app.screen.query_one(TerrainProfile)
        assert profile.check is plan.terrain and profile.units == METRIC
        profile.note, profile.check = "nothing to draw here", None  # the watcher draws the note instead
        await pilot.pause()
        assert "nothing to draw here" in str(profile.render())
