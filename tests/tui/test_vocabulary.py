"""Issue 15 items 7 and 10: one vocabulary across the UI, the CLI and the briefing, listed on
f1; average leg speed is distance / time; IAS beside TAS; the clock time at each turnpoint."""

from __future__ import annotations

import math

import pytest
from conftest import settle, text_of

from glidetask import paths
from glidetask.tui import display
from glidetask.tui.app import make_app
from glidetask.tui.glossary import GLOSSARY
from glidetask.tui.widgets.legs_table import COLUMNS
from glidetask.units import METRIC, format_clock


def isa_density(altitude_m: float, deviation_c: float) -> float:
    """Source: ISO 2533 standard atmosphere, troposphere: p = 101325 (1 - 2.25577e-5 h)^5.25588 Pa,
    T = 288.15 - 0.0065 h K (+ the deviation), rho = p / (287.05287 T)."""
    pressure = 101325.0 * (1.0 - 2.25577e-5 * altitude_m) ** 5.25588
    return pressure / (287.05287 * (288.15 - 0.0065 * altitude_m + deviation_c))


def cli_leg_header() -> list[str]:
    from glidetask.commands.plan import plan_text
    from glidetask.tui.recompute import compute_plan, load_task

    text = plan_text(compute_plan(load_task(paths.demo_task())).plan, "metric")
    return next(line.split() for line in text.splitlines() if line.split()[:2] == ["Leg", "Dist"])


def test_the_legs_table_speaks_the_clis_words():
    ui = [label for _, _, label, _ in COLUMNS]
    cli = cli_leg_header()
    # every word of the CLI's table is the UI's, in the same order (the UI adds At)
    assert [w for w in ui if w in cli] == cli
    assert set(ui) - set(cli) == {"At"}
    # and each is in the glossary on f1
    terms = " ".join(term for term, _ in GLOSSARY)
    for word in ui[1:] + ["STF", "L/D", "Cruise"]:
        assert word in terms, word


async def test_avg_is_distance_over_time_ias_beside_tas_and_clock_times(acknowledged):
    app = make_app(paths.demo_task())
    async with app.run_test(size=(120, 40)) as pilot:
        await settle(pilot)
        table = app.screen.query_one("#legs-table")
        plan = app.plan.plan
        scenario = plan.scenario
        altitude = 0.5 * (scenario.day.band_top_m + scenario.day.band_bottom_m)
        ratio = math.sqrt(isa_density(altitude, scenario.day.isa_deviation_c) / isa_density(0.0, 0.0))
        for row, leg in enumerate(plan.legs):
            # Source: average speed = distance / time (definition); 1 km/h = 1/3.6 m/s
            assert float(table.cell(row, "average_speed_kmh")) == pytest.approx(
                leg.distance_m / leg.time_s * 3.6, abs=0.5)
            # IAS = TAS sqrt(rho / rho0) (equivalent airspeed, incompressible: common practice for gliders)
            assert float(table.cell(row, "indicated_airspeed_kmh")) == pytest.approx(leg.airspeed_ms * ratio * 3.6, abs=0.6)
            assert float(table.cell(row, "indicated_airspeed_kmh")) < float(table.cell(row, "airspeed_kmh"))
            start = leg.start_time_s
            # Source: HH:MM of the leg's start, rounded to the minute as the text plan rounds it
            assert table.cell(row, "start_clock") == format_clock(start)
        assert table.cell(0, "start_clock") == display.clock(scenario.day.start_time_s)
        header = [c.label.plain.split("\n") for c in table.ordered_columns]
        assert ["Need", "m MSL"] in header and ["Arrive", "m MSL"] in header


async def test_the_glide_verdict_words_are_the_clis(synthetic, acknowledged):
    from glidetask.commands import glide

    app = make_app(scenario=synthetic)
    async with app.run_test(size=(120, 40)) as pilot:
        await settle(pilot)
        await pilot.press("4")
        await settle(pilot)
        verdict = text_of(app.screen.query_one("#glide-verdict"))
        assert "ABOVE final glide by" in verdict or "BELOW final glide by" in verdict
        source = open(glide.__file__).read()
        assert "ABOVE final glide by" in source and "BELOW final glide by" in source
        assert "ON GLIDE" not in verdict


async def test_f1_shows_the_glossary_beside_the_cautions(synthetic, acknowledged):
    from glidetask import cautions

    app = make_app(scenario=synthetic, compute_on_start=False)
    async with app.run_test(size=(120, 40)) as pilot:
        await pilot.pause()
        await pilot.press("f1")
        await pilot.pause()
        shown = text_of(app.screen.query_one("#glossary"))
        for term, meaning in GLOSSARY:
            assert term in shown and meaning[:30] in " ".join(shown.split())
        assert cautions.GENERAL[0][:30] in " ".join(text_of(app.screen.query_one("#cautions-text").query_one("Static")).split())


def test_counts_agree_with_their_nouns():
    assert display.count(1, "ballast") == "1 ballast" and display.count(19, "ballast") == "19 ballasts"
