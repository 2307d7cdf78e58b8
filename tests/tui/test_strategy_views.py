"""The Compare and Odds views against the engine (Pilot tests); their snapshots are taken
with every other view's in test_snapshots.py."""

from __future__ import annotations

import dataclasses

import numpy as np
import pytest
from conftest import settle

from glidetask import cautions
from glidetask.engine.compare import ballast_sweep
from glidetask.engine.scenario import Wind
from glidetask.engine.simulate import simulate_days
from glidetask.formats.strategy_report import sweep_verdict
from glidetask.tui import display, messages
from glidetask.tui.app import make_app
from glidetask.units import AVIATION, KMH, METRIC


def cell(table, row: int, column: int) -> str:
    return str(table.get_cell_at((row, column))).strip()


def summary_text(app) -> str:
    from rich.console import Console

    console = Console(width=46, record=True, color_system=None)
    console.print(app.screen.query_one("#sweep-summary").content)
    return " ".join(console.export_text().split())


async def open_view(pilot, key: str) -> None:
    await settle(pilot)
    await pilot.press(key)
    await settle(pilot)
    await settle(pilot)


# ---------------------------------------------------------------- Compare


def by_key(table, row: int, key: str) -> str:
    value = table.get_cell(f"s{row}", key)
    return (value.plain if hasattr(value, "plain") else str(value)).strip()


def ballast_keys(table) -> list[int]:
    """Indexes of the ballasts whose time columns are shown."""
    return [int(str(c.key.value)[1:]) for c in table.ordered_columns if str(c.key.value).startswith("b")]


async def test_compare_table_is_the_engines_sweep(synthetic, acknowledged):
    app = make_app(scenario=synthetic)
    async with app.run_test(size=(120, 40)) as pilot:
        await open_view(pilot, "6")
        sweep = ballast_sweep(synthetic)
        table = app.screen.query_one("#sweep-table")
        shown = ballast_keys(table)
        assert table.row_count == 10 and table.ordered_columns[1].label.plain.strip() == "0"
        # strength, the ballasts that fit (every one if they all do), the best in three thermal sizes
        assert len(table.columns) == 1 + len(shown) + 3 and shown[0] == 0 and shown[-1] == len(sweep.ballast_kg) - 1
        for i, strength in enumerate(sweep.thermal_strength_ms):
            assert cell(table, i, 0) == f"{strength:.1f} m/s"
            for j in shown:
                time = sweep.task_time_s[i, j]
                expected = display.duration(time) if np.isfinite(time) else display.DASH
                if sweep.ballast_kg[j] == sweep.best_ballast_kg[i]:
                    expected = "*" + expected  # the best ballast per strength is marked
                assert by_key(table, i, f"b{j}") == expected
            best = sweep.best_ballast_kg[i]  # the day's own thermals: the typical column
            assert by_key(table, i, "size-typical") == (f"{best:.0f} kg" if np.isfinite(best) else display.DASH)
        assert sweep_verdict(sweep, METRIC) in summary_text(app)
        assert cautions.COMPACT in str(app.screen.query_one("#caution-bar").render())


async def test_compare_table_fits_80_columns_and_keeps_full_tanks_and_the_best(synthetic, acknowledged):
    app = make_app(scenario=synthetic)
    async with app.run_test(size=(80, 24)) as pilot:
        await open_view(pilot, "6")
        sweep = ballast_sweep(synthetic)
        table = app.screen.query_one("#sweep-table")
        assert table.virtual_size.width <= table.size.width  # no sideways scrolling
        shown = ballast_keys(table)
        assert 2 < len(shown) < len(sweep.ballast_kg)
        assert shown[0] == 0 and shown[-1] == len(sweep.ballast_kg) - 1  # empty and full tanks
        for i, best in enumerate(sweep.best_ballast_kg):
            assert by_key(table, i, "size-typical") == (f"{best:.0f} kg" if np.isfinite(best) else display.DASH)


async def test_compare_shows_the_best_ballast_in_narrow_typical_and_broad_thermals(acknowledged):
    """Issue 12 item 2: the best ballast by thermal size side by side, as the engine finds it
    for the demo triangle, with the three radii and where they come from, at 80x24 and 120x40."""
    from glidetask import paths
    from glidetask.engine.compare import sweep_by_thermal_size
    from glidetask.engine.thermals import RADIUS_SPREAD
    from glidetask.formats.strategy_report import thermal_size_cells
    from glidetask.tui import recompute

    scenario = recompute.load_task(paths.demo_task())
    expected = sweep_by_thermal_size(scenario)
    sizes = expected.by_thermal_size
    assert [size.name for size in sizes] == ["narrow", "typical", "broad"]
    for size_of_screen, units in (((80, 24), METRIC), ((120, 40), METRIC), ((120, 40), AVIATION)):
        app = make_app(paths.demo_task(), units.name)
        async with app.run_test(size=size_of_screen) as pilot:
            await open_view(pilot, "6")
            await settle(pilot)
            view = app.screen
            assert view.sized is not None
            table = view.query_one("#sweep-table")
            assert table.virtual_size.width <= table.size.width  # nothing off to the right
            cells = table.size_cells()
            for i in range(len(expected.thermal_strength_ms)):
                for k, size in enumerate(sizes):
                    best = size.best_ballast_kg[i]
                    # the engine's answer, rounded to the kilogram as the CLI's sweep prints it
                    assert cells[i][k] == (f"{best:.0f} kg" if np.isfinite(best) else display.DASH)
            head, rows = thermal_size_cells(expected, units)
            assert [[c if c != "-" else display.DASH for c in row[1:]] for row in rows] == cells
            for k, size in enumerate(sizes):  # the radii in the chosen units under the names
                label = table.ordered_columns[-3 + k].label.plain.split()
                assert label == [size.name, *units.fmt_height(size.thermal_radius_m).split()]
            source = str(view.query_one("#sweep-sizes-source").render())
            assert "given in the task" in source and f"÷{RADIUS_SPREAD:g}" in source and "our choice" in source
            assert f"typical {units.fmt_height(sizes[1].thermal_radius_m)}" in source
    # Source: the thermal model's spread of sizes (engine/thermals.py, RADIUS_SPREAD = 1.5, our choice)
    assert sizes[0].thermal_radius_m * RADIUS_SPREAD == pytest.approx(sizes[1].thermal_radius_m)
    assert sizes[2].thermal_radius_m == pytest.approx(sizes[1].thermal_radius_m * RADIUS_SPREAD)


async def test_compare_follows_the_units_switch(synthetic, acknowledged):
    app = make_app(scenario=synthetic)
    async with app.run_test(size=(120, 40)) as pilot:
        await open_view(pilot, "6")
        await pilot.press("u")
        await settle(pilot)
        table = app.screen.query_one("#sweep-table")
        # Source: 1 kt = 0.514444 m/s (contract section 6): 0.5 m/s = 0.97 kt, 5.0 m/s = 9.7 kt
        assert cell(table, 0, 0) == "1.0 kt" and cell(table, 9, 0) == "9.7 kt"
        assert AVIATION.vertical_label in summary_text(app)


async def test_compare_is_computed_again_for_a_new_plan(synthetic, acknowledged):
    app = make_app(scenario=synthetic)
    async with app.run_test(size=(120, 40)) as pilot:
        await open_view(pilot, "6")
        before = app.screen.sweep
        stronger_wind = Wind(270.0, 35 * KMH)
        app.post_message(messages.ScenarioEdit(
            lambda s: dataclasses.replace(s, day=dataclasses.replace(s.day, wind=stronger_wind)), "wind"))
        await settle(pilot)
        await settle(pilot)
        after = app.screen.sweep
        assert after is not before
        edited = app.scenario
        expected = ballast_sweep(edited)
        assert np.array_equal(np.isnan(after.task_time_s), np.isnan(expected.task_time_s))
        finite = np.isfinite(expected.task_time_s)
        assert np.array_equal(after.task_time_s[finite], expected.task_time_s[finite])


async def test_a_hidden_compare_view_waits_and_catches_up_when_shown(synthetic, acknowledged):
    app = make_app(scenario=synthetic)
    async with app.run_test(size=(120, 40)) as pilot:
        await open_view(pilot, "6")
        compare, before = app.screen, app.screen.sweep
        await pilot.press("1")
        await settle(pilot)
        stronger_wind = Wind(270.0, 35 * KMH)
        app.post_message(messages.ScenarioEdit(
            lambda s: dataclasses.replace(s, day=dataclasses.replace(s.day, wind=stronger_wind)), "wind"))
        await settle(pilot)
        await settle(pilot)
        assert compare.sweep is before  # no sweep while the Task view is shown
        await open_view(pilot, "6")
        assert app.screen is compare and compare.sweep is not before
        expected = ballast_sweep(app.scenario)
        finite = np.isfinite(expected.task_time_s)
        assert np.array_equal(compare.sweep.task_time_s[finite], expected.task_time_s[finite])


# ---------------------------------------------------------------- Odds


async def test_odds_show_the_engines_simulation(synthetic, acknowledged):
    app = make_app(scenario=synthetic)
    async with app.run_test(size=(120, 40)) as pilot:
        await open_view(pilot, "7")
        odds = simulate_days(synthetic, runs=2000, seed=1)
        table = app.screen.query_one("#odds-table")
        assert table.row_count == len(odds.choices) == 3  # empty, half, full
        for row, choice in enumerate(odds.choices):
            assert cell(table, row, 0) == f"{choice.ballast_kg:.0f}"
            assert cell(table, row, 1) == f"{100 * choice.finish_probability:.1f}"
            assert cell(table, row, 2) == f"{100 * choice.finish_probability_se:.1f}"
            assert [cell(table, row, k) for k in (3, 4, 5)] == [display.duration(t) for t in choice.task_time_s]
        bars = str(app.screen.query_one("#odds-bars").content)
        for choice in odds.choices:
            assert f"{100 * choice.finish_probability:5.1f} %" in bars
        landouts = app.screen.query_one("#landouts-table")
        for leg in range(len(odds.legs)):
            assert [cell(landouts, leg, c + 1) for c in range(3)] == [str(c.landouts_by_leg[leg]) for c in odds.choices]
        assert "not a forecast" in str(app.screen.query_one("#odds-assumptions").content)
        assert cautions.COMPACT in str(app.screen.query_one("#caution-bar").render())


async def type_into(pilot, field_id: str, text: str) -> None:
    await pilot.click(f"#{field_id}")
    await pilot.press("home", "ctrl+k", *text)
    await settle(pilot)
    await settle(pilot)


async def test_odds_follow_runs_seed_and_ballast_choices(synthetic, acknowledged):
    app = make_app(scenario=synthetic)
    async with app.run_test(size=(120, 40)) as pilot:
        await open_view(pilot, "7")
        await type_into(pilot, "odds-runs", "300")
        await type_into(pilot, "odds-seed", "5")
        await type_into(pilot, "odds-ballasts", "40 120")
        odds = simulate_days(synthetic, runs=300, seed=5, ballasts_kg=[40.0, 120.0])
        shown = app.screen.odds
        assert (shown.runs, shown.seed) == (300, 5)
        assert [c.ballast_kg for c in shown.choices] == [40.0, 120.0]
        for got, expected in zip(shown.choices, odds.choices):
            assert got.finished == expected.finished
            assert np.array_equal(got.finish_times_s, expected.finish_times_s)
        assert app.screen.query_one("#odds-bars").border_subtitle == "300 days · seed 5"


async def test_odds_refuse_bad_input_and_keep_the_last_result(synthetic, acknowledged):
    app = make_app(scenario=synthetic)
    async with app.run_test(size=(120, 40)) as pilot:
        await open_view(pilot, "7")
        before = app.screen.odds
        await type_into(pilot, "odds-runs", "0")
        assert app.screen.query_one("#odds-runs").has_class("-invalid")
        assert "simulated days" in app.notice
        assert app.screen.odds is before  # nothing valid was typed: the last result stays
        await type_into(pilot, "odds-ballasts", "full")
        assert app.screen.query_one("#odds-ballasts").has_class("-invalid")
        await type_into(pilot, "odds-ballasts", "0, 500")  # above the glider's 170 kg
        assert app.screen.query_one("#odds-ballasts").has_class("-invalid")
        assert "0-170 kg" in app.notice
        await type_into(pilot, "odds-runs", "200")
        assert not app.screen.query_one("#odds-runs").has_class("-invalid")
        assert app.screen.odds.runs == 200


async def test_odds_follow_the_units_switch(synthetic, acknowledged):
    app = make_app(scenario=synthetic)
    async with app.run_test(size=(120, 40)) as pilot:
        await open_view(pilot, "7")
        assert "8 km/h" in str(app.screen.query_one("#odds-assumptions").content)
        await pilot.press("u")
        await settle(pilot)
        # Source: 8 km/h / 1.852 = 4.3 kt; the next climb 1800 m / 1.2 = 1.5 km (Allen 2006, from
        # memory, for the day's 1.8 km layer), 1500 m / 1852 m = 0.8 NM (contract section 6)
        text = str(app.screen.query_one("#odds-assumptions").content)
        assert "4 kt" in text and "0.8 NM" in text
