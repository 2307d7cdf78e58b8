"""Issue 15 item 10: the heights needed at MacCready 0-3 from each turnpoint, with the clock
time there, and the what-if table, on screen as in the briefing (Pilot tests)."""

from __future__ import annotations

from conftest import settle, text_of

from glidetask import paths
from glidetask.formats.strategy_report import sensitivity_text
from glidetask.tui import display
from glidetask.tui.app import make_app
from glidetask.units import METRIC


async def test_heights_card_and_what_ifs_match_the_briefing(acknowledged):
    from glidetask.formats.export import render

    app = make_app(paths.demo_task())
    async with app.run_test(size=(120, 40)) as pilot:
        await settle(pilot)
        await pilot.press("h")
        await settle(pilot, 5)
        card = text_of(app.screen.query_one("#heights-card"), width=110)
        briefing = render(app.plan.plan, ".md", "metric")
        section = briefing.split("## Heights needed to get home")[1].split("##")[0]
        rows = [line for line in section.splitlines() if line.startswith("|") and ":--" not in line][1:]
        assert rows
        lines = [line.strip() for line in card.splitlines()]
        for row, line in zip(rows, lines[1:]):  # every figure of the briefing's card, row by row
            cells = [c.strip() for c in row.strip().strip("|").split("|")]
            name, figures = cells[0], cells[2:]
            if name.startswith("Fly on the last leg"):  # the speeds row: the same figures under a short label
                assert line.startswith("Fly (km/h IAS)"), (name, line)
            else:
                assert line.startswith(name[:18]), (name, line)
            assert line.split()[-len(figures):] == figures, (name, line, figures)
        plan = app.plan.plan
        assert display.clock(plan.legs[1].start_time_s) in card  # the clock time at turn 1
        assert display.clock(plan.finish_time_s) in card
        what_ifs = text_of(app.screen.query_one("#what-ifs"), width=110)
        from glidetask.tui.recompute import what_ifs as compute

        expected = sensitivity_text(compute(app.plan), METRIC)  # the CLI's table, line by line
        for line in expected.splitlines():
            assert " ".join(line.split()) in " ".join(what_ifs.split()), line
        await pilot.press("escape")
        await pilot.pause()
        assert app.screen.id != "heights-modal"


async def test_heights_read_whole_at_80x24(acknowledged):
    app = make_app(paths.demo_task())
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        await pilot.press("h")
        await settle(pilot, 5)
        text = "\n".join("".join(s.text for s in strip) for strip in app.screen._compositor.render_strips())
        assert "…" not in text, text
        assert "MC 3" in text and "VAR" in text  # codes for names, every column whole


async def test_what_ifs_in_aviation_units_are_the_clis_words(acknowledged):
    # The what-if labels come from the engine's facts, worded once (strategy_report.what_if_words):
    # the screen in aviation units reads as `glidetask plan --units aviation` does.
    from glidetask.tui.recompute import what_ifs as compute
    from glidetask.units import AVIATION

    app = make_app(paths.demo_task(), units="aviation")
    async with app.run_test(size=(120, 40)) as pilot:
        await settle(pilot)
        await pilot.press("h")
        await settle(pilot, 5)
        what_ifs = " ".join(text_of(app.screen.query_one("#what-ifs"), width=110).split())
        expected = sensitivity_text(compute(app.plan), AVIATION)
        for line in expected.splitlines()[1:]:
            assert " ".join(line.split()) in what_ifs, line
        assert " kt " in what_ifs and "km/h" not in what_ifs and "m/s" not in what_ifs
