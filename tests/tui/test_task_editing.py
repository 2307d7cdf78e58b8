"""Editing the task in the Task view: add, remove, move points, change zones."""

from __future__ import annotations

from conftest import settle

from glidetask.tui.app import make_app
from glidetask.units import AVIATION


async def open_points(pilot):
    await settle(pilot)
    pilot.app.screen.query_one("#points-table").focus()
    await pilot.pause()


async def test_add_a_turn_point_picked_by_search(synthetic, acknowledged):
    app = make_app(scenario=synthetic, compute_on_start=False)
    async with app.run_test(size=(120, 40)) as pilot:
        await open_points(pilot)
        await pilot.press("down")  # Turn 1
        await pilot.press("a")
        await pilot.pause()
        await pilot.press(*"brenna")
        await pilot.pause()
        assert len(app.screen.shown) == 1
        await pilot.press("enter")
        await settle(pilot)
        assert app.scenario.task.names == ("Vardmoor Aerodrome", "Skarren Gap", "Brenna Field",
                                           "Tolland Cross", "Vardmoor Aerodrome")
        assert app.dirty
        table = app.screen.query_one("#points-table")
        assert str(table.get_cell_at((2, 1))) == "Brenna Field (BRF)"
        assert str(table.get_cell_at((2, 2))) == "cylinder 0.5 km"  # the default new turn zone


async def test_remove_and_move_points(synthetic, acknowledged):
    app = make_app(scenario=synthetic, compute_on_start=False)
    async with app.run_test(size=(120, 40)) as pilot:
        await open_points(pilot)
        await pilot.press("down", "shift+down")  # Turn 1 after Turn 2
        await settle(pilot)
        assert app.scenario.task.names[1:3] == ("Tolland Cross", "Skarren Gap")
        await pilot.press("x")
        await settle(pilot)
        assert app.scenario.task.names == ("Vardmoor Aerodrome", "Tolland Cross", "Vardmoor Aerodrome")


async def test_a_refused_edit_keeps_the_task_and_says_why(synthetic, acknowledged):
    # Source: a sector is a turn-point zone only; the start is a line or a cylinder
    # (contract 2.3; FAI Sporting Code Section 3 start and finish zones)
    app = make_app(scenario=synthetic, compute_on_start=False)
    async with app.run_test(size=(120, 40)) as pilot:
        await open_points(pilot)
        before = app.scenario.task
        await pilot.press("down", "down", "shift+down")  # the sector (Turn 2) would become the finish
        await settle(pilot)
        assert app.scenario.task is before
        assert any("finish" in p.what for p in app.problems)
        assert app.screen.query_one("#points-table").has_class("-invalid")


async def test_change_a_zone_in_aviation_units(synthetic, acknowledged):
    app = make_app(scenario=synthetic, units="aviation", compute_on_start=False)
    async with app.run_test(size=(120, 40)) as pilot:
        await open_points(pilot)
        await pilot.press("down", "z")
        await pilot.pause()
        modal = app.screen
        modal.query_one("#zone-kind").value = "keyhole"
        await pilot.pause()
        modal.query_one("#zone-radius").value = "5"
        modal.query_one("#zone-angle").value = "90"
        modal.query_one("#zone-cylinder").value = "0.3"
        await pilot.click("#zone-apply")
        await settle(pilot)
        zone = app.scenario.task.points[1].zone
        assert zone.kind == "keyhole"
        # Source: 1 NM = 1852 m exactly (contract section 6)
        assert abs(zone.radius_m - 5 * 1852.0) < 1e-6
        assert abs(zone.cylinder_radius_m - 0.3 * 1852.0) < 1e-6
        assert str(app.screen.query_one("#points-table").get_cell_at((1, 2))) == (
            f"keyhole {AVIATION.fmt_distance(5 * 1852.0)} 90° + {AVIATION.fmt_distance(0.3 * 1852.0)}")


async def test_a_zone_that_makes_no_sense_stays_in_the_dialog(synthetic, acknowledged):
    app = make_app(scenario=synthetic, compute_on_start=False)
    async with app.run_test(size=(120, 40)) as pilot:
        await open_points(pilot)
        await pilot.press("down", "z")
        await pilot.pause()
        app.screen.query_one("#zone-radius").value = "-1"
        await pilot.click("#zone-apply")
        await pilot.pause()
        assert "positive radius" in str(app.screen.query_one("#zone-error").render())
        await pilot.press("escape")
        await settle(pilot)
        assert app.scenario.task.points[1].zone.radius_m == 500.0


async def test_the_points_table_has_the_keys_when_the_task_view_opens(synthetic, acknowledged):
    app = make_app(scenario=synthetic, compute_on_start=False)
    async with app.run_test(size=(120, 40)) as pilot:
        await settle(pilot)
        assert app.focused is app.screen.query_one("#points-table")
        await pilot.press("down", "z")  # the zone of the first turn, with no click first
        await pilot.pause()
        assert app.screen.__class__.__name__ == "ZoneModal"
