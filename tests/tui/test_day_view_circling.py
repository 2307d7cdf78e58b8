"""The Day view's circling card: the engine's circling card (engine.circling_card.day_circling)
in the units on screen, with the words of `glidetask plan`, following every edit."""

from __future__ import annotations

import pytest
from conftest import settle, text_of
from test_fit import screen_lines
from test_glider_view import type_into

from glidetask import paths
from glidetask.commands.plan import circling_lines
from glidetask.engine.circling_card import day_circling
from glidetask.tui.app import make_app
from glidetask.tui.widgets.circling_figures import CirclingFigures
from glidetask.units import by_name

# Source: the international nautical mile is 1852 m (BIPM, The International System of Units,
# table 8) and the international foot 0.3048 m (international yard and pound agreement, 1959).
KNOT_MS = 1852.0 / 3600.0
FOOT_M = 0.3048


def expected_rows(card, units: str) -> dict[str, str]:
    """The card's figures worked out here from the engine's SI card, not through glidetask.units."""
    best = card.solution
    if units == "metric":
        vertical = lambda v: f"{v:.1f} m/s"  # noqa: E731
        speed, height = f"{card.indicated_airspeed_ms * 3.6:.0f} km/h", f"{best.turn_radius_m:.0f} m"
    else:
        vertical = lambda v: f"{v / KNOT_MS:.1f} kt"  # noqa: E731
        speed, height = f"{card.indicated_airspeed_ms / KNOT_MS:.0f} kt", f"{best.turn_radius_m / FOOT_M:.0f} ft"
    return {
        "core on the thermal's axis": vertical(card.strength_ms),
        "bank": f"{best.bank_deg:.0f} deg",
        "airspeed": f"{speed} IAS",
        "circle radius": height,
        "the netto reading": vertical(best.updraft_ms),
        "the glider sinks": vertical(best.sink_ms),
        "climb": vertical(best.climb_ms),
    }


def assert_card_shows(app, units: str) -> None:
    card = day_circling(app.scenario)
    widget = app.screen.query_one(CirclingFigures)
    lines = text_of(widget, 44).splitlines()
    for words, figure in expected_rows(card, units).items():
        assert any(line.strip().startswith(words) and line.rstrip().endswith(figure) for line in lines), (
            words, figure, lines)
    assert f"{app.scenario.glider.mass_kg:.0f} kg" in text_of(widget, 44)


@pytest.mark.parametrize("units", ["metric", "aviation"])
async def test_the_circling_card_is_the_engines_in_the_units_and_words_of_the_cli(acknowledged, units):
    app = make_app(paths.demo_task(), units=units)
    async with app.run_test(size=(120, 40)) as pilot:
        await settle(pilot)
        await pilot.press("3")
        await settle(pilot)
        assert_card_shows(app, units)
        card = day_circling(app.scenario)
        widget = app.screen.query_one(CirclingFigures)
        # Source: `glidetask plan` words the same card (commands.plan.circling_lines)
        cli = " ".join(line.strip() for line in circling_lines(app.scenario, by_name(units)))
        rows = expected_rows(card, units)
        assert widget.border_title == f"Circling at {cli.split('circling at ')[1][:5]}"
        core = rows["core on the thermal's axis"]
        assert f"core {core} on the thermal's axis" in cli
        assert f"{rows['bank']} bank at {rows['airspeed']}" in cli
        assert f"circle {rows['circle radius']} in radius" in cli
        assert f"climb {rows['climb']}" in cli
        for words in ("the netto reading", "the glider sinks", "core", "IAS"):
            assert words in cli and words in text_of(widget, 44)


async def test_the_circling_card_follows_the_ballast_and_the_day(acknowledged):
    app = make_app(paths.demo_task())
    async with app.run_test(size=(120, 40)) as pilot:
        await settle(pilot)
        await pilot.press("3")
        await settle(pilot)
        before = day_circling(app.scenario)
        assert_card_shows(app, "metric")
        await pilot.press("2")  # empty the tanks on the Glider view
        await settle(pilot)
        await type_into(pilot, "glider-ballast_kg", "0")
        assert app.scenario.glider.ballast_kg == 0.0
        await pilot.press("escape", "3")  # leave the field, then the Day view
        await settle(pilot)
        lighter = day_circling(app.scenario)
        # the lighter glider circles slower and tighter, and climbs better (common practice)
        assert lighter.solution.climb_ms > before.solution.climb_ms
        assert lighter.indicated_airspeed_ms < before.indicated_airspeed_ms
        assert_card_shows(app, "metric")
        await type_into(pilot, "day-band_top_m", "3000")  # a deeper band: the figures at a new height
        assert app.scenario.day.band_top_m == 3000.0
        higher = day_circling(app.scenario)
        assert higher.height_m != lighter.height_m
        assert_card_shows(app, "metric")
        widget = app.screen.query_one(CirclingFigures)
        assert f"at {higher.height_m:.0f} m (mid band)" in text_of(widget, 120)
        assert "last valid input" not in text_of(widget, 120)
        await type_into(pilot, "day-band_top_m", "abc")  # refused: the card says it is the last valid one
        assert "last valid input" in text_of(widget, 120)
        assert_card_shows(app, "metric")
        await type_into(pilot, "day-band_top_m", "3000")
        assert "last valid input" not in text_of(widget, 120)


@pytest.mark.parametrize(("size", "units"), [((80, 24), "metric"), ((80, 24), "aviation"), ((120, 40), "metric")])
async def test_the_circling_card_reads_whole_on_screen(acknowledged, size, units):
    app = make_app(paths.demo_task(), units=units)
    async with app.run_test(size=size) as pilot:
        await settle(pilot)
        await pilot.press("3")
        await settle(pilot)
        widget = app.screen.query_one(CirclingFigures)
        widget.scroll_visible(animate=False)  # 80x24: the left column scrolls to the card
        await settle(pilot)
        lines = screen_lines(app)
        card = day_circling(app.scenario)
        for words, figure in expected_rows(card, units).items():
            # each row on one line, its words and its figure whole
            assert any(words in line and f" {figure}" in line for line in lines), (words, figure, "\n".join(lines))
        assert any("Circling at " in line for line in lines)
        assert "…" not in "\n".join(lines)
