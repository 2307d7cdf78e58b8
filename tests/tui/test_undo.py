"""Issue 15 item 6: every edit can be undone and redone (ctrl+z / ctrl+y), a removed point
comes back, and a zero-length leg is refused (Pilot tests)."""

from __future__ import annotations

from conftest import settle, text_of

from glidetask.tui.app import make_app


def status(app) -> str:
    return text_of(app.screen.query_one("#status-line"))


def codes(app) -> list[str]:
    return [p.turnpoint.code for p in app.scenario.task.points]


async def test_removing_a_point_is_undone_and_redone(synthetic, acknowledged):
    app = make_app(scenario=synthetic)
    async with app.run_test(size=(120, 40)) as pilot:
        await settle(pilot)
        assert codes(app) == ["VAR", "SKG", "TOL", "VAR"]
        table = app.screen.query_one("#points-table")
        table.focus()
        table.move_cursor(row=1)
        await pilot.press("x")  # one key removes a point at once ...
        await settle(pilot)
        assert codes(app) == ["VAR", "TOL", "VAR"]
        assert "ctrl+z" in status(app)
        await pilot.press("ctrl+z")  # ... and one key brings it back
        await settle(pilot)
        assert codes(app) == ["VAR", "SKG", "TOL", "VAR"]
        assert app.scenario == synthetic
        assert app.plan.scenario == synthetic  # the figures are the restored task's
        assert app.screen.query_one("#points-table").row_count == 4
        await pilot.press("ctrl+y")
        await settle(pilot)
        assert codes(app) == ["VAR", "TOL", "VAR"]


async def test_typing_in_a_field_is_one_undo_step(synthetic, acknowledged):
    app = make_app(scenario=synthetic)
    async with app.run_test(size=(120, 40)) as pilot:
        await settle(pilot)
        await pilot.press("2")
        await settle(pilot)
        await pilot.click("#glider-ballast_kg")
        await pilot.press("home", "ctrl+k", "1", "2", "0", "enter")
        await settle(pilot)
        assert app.scenario.glider.ballast_kg == 120.0
        await pilot.click("#glider-bugs_percent")
        await pilot.press("home", "ctrl+k", "5", "enter")
        await settle(pilot)
        assert app.scenario.glider.bugs_percent == 5.0
        await pilot.press("ctrl+z")
        await settle(pilot)
        assert app.scenario.glider.bugs_percent == synthetic.glider.bugs_percent
        assert app.scenario.glider.ballast_kg == 120.0
        await pilot.press("ctrl+z")  # the three keystrokes of "120" are one step
        await settle(pilot)
        assert app.scenario == synthetic
        assert app.screen.query_one("#glider-ballast_kg").value == "0"  # the field shows the restored value
        assert app.plan.scenario == synthetic
        await pilot.press("ctrl+z")
        await settle(pilot)
        assert "nothing to undo" in status(app)
        await pilot.press("ctrl+y", "ctrl+y")
        await settle(pilot)
        assert app.scenario.glider.ballast_kg == 120.0 and app.scenario.glider.bugs_percent == 5.0


async def test_undo_drops_a_refused_value(synthetic, acknowledged):
    app = make_app(scenario=synthetic)
    async with app.run_test(size=(120, 40)) as pilot:
        await settle(pilot)
        await pilot.press("3")
        await settle(pilot)
        await pilot.click("#day-isa_deviation_c")
        await pilot.press("home", "ctrl+k", "1", "2", ":")
        await settle(pilot)
        assert app.session.pending
        await pilot.press("ctrl+z")
        await settle(pilot)
        assert not app.session.pending and app.scenario == synthetic
        assert "✗" not in status(app)


async def test_a_zero_length_leg_is_refused(synthetic, acknowledged):
    from glidetask.tui import task_edits
    from scenarios import HOME

    app = make_app(scenario=synthetic)
    async with app.run_test(size=(120, 40)) as pilot:
        await settle(pilot)
        # a stray "add" of the home field right after the start: VAR -> VAR
        app.screen._post(lambda s: task_edits.insert_point(s, 1, HOME), "Vardmoor Aerodrome added")
        await settle(pilot)
        assert codes(app) == ["VAR", "SKG", "TOL", "VAR"]
        assert "zero length" in status(app) and "VAR→VAR" in status(app)
