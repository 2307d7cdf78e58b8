"""Issue 15 item 1: a view that shows figures shows the current task's, or says it is
recomputing; never another task's figures unmarked (Pilot tests)."""

from __future__ import annotations

from conftest import settle

from glidetask import paths
from glidetask.tui.app import make_app

RIDGE = paths.demo_tasks_dir() / "vardmoor-ridge-final-glide.toml"
TRIANGLE = paths.demo_tasks_dir() / "vardmoor-triangle-300.toml"


def sweep_subtitle(app) -> str:
    return str(app.screen.query_one("#sweep-panel").border_subtitle or "")


async def test_compare_and_odds_follow_a_newly_opened_task_after_units_switched_twice(acknowledged):
    # the steps of the report: ridge, Compare, Odds, Task, u u, open the triangle
    app = make_app(RIDGE)
    async with app.run_test(size=(120, 40)) as pilot:
        await settle(pilot)
        await pilot.press("6")
        await settle(pilot, 5)
        assert app.screen.sweep.task_name == "Skarren Ridge from Quillowby"
        await pilot.press("7")
        await settle(pilot, 5)
        await pilot.press("1")
        await pilot.press("u", "u")
        await settle(pilot)
        app._open_path(TRIANGLE)
        await settle(pilot, 5)
        assert app.scenario.task.name == "Vardmoor 300 km triangle"
        await pilot.press("6")
        # on arrival: either the triangle's sweep or a plain "recomputing" with the old table hidden
        compare = app.screen
        if compare.sweep is None or compare.sweep.task_name != "Vardmoor 300 km triangle":
            assert not compare.query_one("#sweep-panel").display
            assert "Vardmoor 300 km triangle" in compare.query_one("#compare-waiting").text
        await settle(pilot, 5)
        assert compare.sweep.task_name == "Vardmoor 300 km triangle"
        assert compare.query_one("#sweep-panel").display
        assert "Vardmoor 300 km triangle" in sweep_subtitle(app)
        await pilot.press("7")
        odds_view = app.screen
        if odds_view.odds is None or odds_view.odds.task_name != "Vardmoor 300 km triangle":
            assert not odds_view.query_one("#odds-right").display
        await settle(pilot, 5)
        assert odds_view.odds.task_name == "Vardmoor 300 km triangle"
        assert odds_view.query_one("#odds-right").display


async def test_compare_hides_its_figures_while_a_new_task_opens(acknowledged):
    app = make_app(RIDGE)
    async with app.run_test(size=(120, 40)) as pilot:
        await settle(pilot)
        await pilot.press("6")
        await settle(pilot, 5)
        compare = app.screen
        assert compare.query_one("#sweep-panel").display
        app._opened(TRIANGLE, __import__("glidetask.tui.recompute", fromlist=["x"]).load_task(TRIANGLE))
        await pilot.pause()
        # no plan yet for the triangle: the ridge's sweep must not stay on screen unmarked
        assert not compare.query_one("#sweep-panel").display
        assert "Vardmoor 300 km triangle" in compare.query_one("#compare-waiting").text
