"""The Glider view against the engine: change the loading, read the figures and the card."""

from __future__ import annotations

from dataclasses import replace

import numpy as np
from conftest import settle

from glidetask.engine.speedtofly import speed_to_fly_still_air
from glidetask.tui.app import make_app
from glidetask.units import AVIATION, KNOT, METRIC


def figures_text(app) -> str:
    from rich.console import Console

    console = Console(width=60, record=True, color_system=None)
    console.print(app.screen.query_one("#glider-figures").renderable if hasattr(
        app.screen.query_one("#glider-figures"), "renderable") else app.screen.query_one("#glider-figures").content)
    return console.export_text()


async def type_into(pilot, field_id: str, text: str) -> None:
    await pilot.click(f"#{field_id}")
    await pilot.press("home", "ctrl+k", *text)
    await settle(pilot)


async def test_ballast_changes_wing_loading_and_speeds_as_the_engine_says(synthetic, acknowledged):
    app = make_app(scenario=synthetic, compute_on_start=False)
    async with app.run_test(size=(120, 40)) as pilot:
        await pilot.press("2")
        await settle(pilot)
        await type_into(pilot, "glider-ballast_kg", "120")
        assert app.scenario.glider.ballast_kg == 120.0
        setup = replace(synthetic.glider, ballast_kg=120.0)
        mid_band = 0.5 * (synthetic.day.band_top_m + synthetic.day.band_bottom_m)
        polar = setup.polar_at(mid_band, synthetic.day.isa_deviation_c)
        text = figures_text(app)
        # Source: the engine's own figures for the same inputs, formatted through glidetask.units
        assert f"{setup.mass_kg:.0f} kg" in text
        assert f"{polar.wing_loading_kgm2:.1f} kg/m²" in text
        assert METRIC.fmt_speed(polar.best_ld_speed_ms) in text
        assert METRIC.fmt_vertical(polar.min_sink_ms) in text
        card = app.screen.query_one("#stf-card")
        speeds = speed_to_fly_still_air(polar, np.arange(0.0, 5.01, 0.5))
        for row, speed in enumerate(speeds):
            assert str(card.get_cell_at((row, 1))) == METRIC.fmt_speed(speed).split()[0]


async def test_heavier_glider_flies_faster_at_the_same_setting(synthetic, acknowledged):
    # Source: polar scaling with sqrt(m/m0) (contract section 3): speeds rise with mass
    app = make_app(scenario=synthetic, compute_on_start=False)
    async with app.run_test(size=(120, 40)) as pilot:
        await pilot.press("2")
        await settle(pilot)
        card = app.screen.query_one("#stf-card")
        light = float(str(card.get_cell_at((4, 1))))
        await type_into(pilot, "glider-ballast_kg", "170")
        heavy = float(str(card.get_cell_at((4, 1))))
        assert heavy > light


async def test_card_in_aviation_units_uses_whole_knots(synthetic, acknowledged):
    app = make_app(scenario=synthetic, units="aviation", compute_on_start=False)
    async with app.run_test(size=(120, 40)) as pilot:
        await pilot.press("2")
        await settle(pilot)
        card = app.screen.query_one("#stf-card")
        mid_band = 0.5 * (synthetic.day.band_top_m + synthetic.day.band_bottom_m)
        polar = synthetic.glider.polar_at(mid_band)
        assert str(card.get_cell_at((3, 0))) == "3.0"
        # Source: 1 kt = 1852 m / 3600 s (contract section 6)
        expected = speed_to_fly_still_air(polar, 3.0 * KNOT)
        assert str(card.get_cell_at((3, 1))) == AVIATION.fmt_speed(expected).split()[0]


async def test_bad_ballast_is_refused_and_highlighted(synthetic, acknowledged):
    app = make_app(scenario=synthetic, compute_on_start=False)
    async with app.run_test(size=(120, 40)) as pilot:
        await pilot.press("2")
        await settle(pilot)
        await type_into(pilot, "glider-ballast_kg", "-5")
        assert app.scenario.glider.ballast_kg == 0.0  # the last good value is kept
        assert app.screen.query_one("#glider-ballast_kg").has_class("-invalid")
        assert any("ballast" in p.where for p in app.problems)
        status = str(app.screen.query_one("#status-line").render())
        assert "ballast" in status
        await type_into(pilot, "glider-ballast_kg", "100")
        assert app.scenario.glider.ballast_kg == 100.0
        assert not app.screen.query_one("#glider-ballast_kg").has_class("-invalid")
        assert not any("ballast" in p.where for p in app.problems)
