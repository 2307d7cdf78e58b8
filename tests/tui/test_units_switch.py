"""Issue 15 item 5: a unit switch changes the display only. Toggling twice keeps what the
pilot typed and every figure in SI; the labels follow the units (Pilot tests)."""

from __future__ import annotations

import dataclasses

import numpy as np
from conftest import settle, text_of

from glidetask.tui.app import make_app
from glidetask.units import AVIATION


async def type_into(pilot, field_id: str, text: str) -> None:
    await pilot.click(f"#{field_id}")
    await pilot.press("home", "ctrl+k", *text, "enter")
    await settle(pilot)


def si_figures(answer) -> dict:
    """Every figure of a final-glide answer, in SI, with the question asked."""
    glide = {f.name: getattr(answer.glide, f.name) for f in dataclasses.fields(answer.glide)}
    return {"question": answer.question, "altitude_m": answer.altitude_m, **glide}


def same(a: dict, b: dict) -> bool:
    """Equal to the last bit (NaN equal to NaN)."""
    def equal(x, y):
        if isinstance(x, (float, np.floating, np.ndarray)):
            return np.array_equal(np.asarray(x), np.asarray(y), equal_nan=True)
        return x == y
    return a.keys() == b.keys() and all(equal(a[k], b[k]) for k in a)


async def test_toggling_units_twice_keeps_typed_text_and_every_figure_in_si(synthetic, acknowledged):
    app = make_app(scenario=synthetic)
    async with app.run_test(size=(120, 40)) as pilot:
        await settle(pilot)
        plan = app.plan
        await pilot.press("4")
        await settle(pilot)
        await type_into(pilot, "glide-height", "3600")
        await type_into(pilot, "glide-mc", "2")
        glide_view = app.screen
        first = si_figures(glide_view.answer)
        assert first["question"].height_m == 3600.0 and first["question"].mc_ms == 2.0
        await pilot.press("escape", "2")
        await settle(pilot)
        await type_into(pilot, "view-altitude", "1000")
        card = app.screen.query_one("#stf-card")
        glider_before = (app.screen.altitude_m, text_of(app.screen.query_one("#glider-figures")))

        await pilot.press("escape", "u")  # aviation
        await settle(pilot)
        assert app.units is AVIATION
        assert app.plan is plan  # no recompute: the plan is the same, in SI
        assert app.screen.query_one("#view-altitude").value == "3281"
        assert app.screen.altitude_m == 1000.0
        assert "ft" in text_of(app.screen.query_one("#glider-figures")) or "kt" in text_of(card)
        await pilot.press("4")
        await settle(pilot)
        assert app.screen.query_one("#glide-height").value == "11811"  # 3600 m in ft
        assert app.screen.query_one("#glide-mc").value == "3.9"  # 2 m/s in kt
        assert same(si_figures(app.screen.answer), first)  # not 3.9 kt read back: the same 2 m/s

        await pilot.press("u")  # metric again
        await settle(pilot)
        assert app.plan is plan
        assert app.screen.query_one("#glide-height").value == "3600"  # what the pilot typed
        assert app.screen.query_one("#glide-mc").value == "2"
        assert same(si_figures(app.screen.answer), first)
        await pilot.press("2")
        await settle(pilot)
        assert (app.screen.altitude_m, text_of(app.screen.query_one("#glider-figures"))) == glider_before
        assert app.scenario == synthetic  # nothing in the task changed


async def test_the_day_fields_keep_their_si_values_through_a_units_switch(synthetic, acknowledged):
    app = make_app(scenario=synthetic)
    async with app.run_test(size=(120, 40)) as pilot:
        await settle(pilot)
        await pilot.press("3")
        await settle(pilot)
        await type_into(pilot, "day-band_top_m", "1750")
        scenario = app.scenario
        await pilot.press("escape", "u")
        await settle(pilot)
        assert app.screen.query_one("#day-band_top_m").value == "5741"
        await pilot.press("u")
        await settle(pilot)
        assert app.screen.query_one("#day-band_top_m").value == "1750"
        assert app.scenario is scenario and app.scenario.day.band_top_m == 1750.0


async def test_compare_notes_in_aviation_units(synthetic, acknowledged):
    app = make_app(scenario=synthetic, units="aviation")
    async with app.run_test(size=(120, 40)) as pilot:
        await settle(pilot)
        await pilot.press("6")
        await settle(pilot, 6)
        shown = text_of(app.screen.query_one("#sweep-summary"), width=46)
        assert " ft " in shown
        import re
        assert not re.search(r"\d (m|km|km/h|m/s)\b", shown), shown
