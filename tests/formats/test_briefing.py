"""The one-page pre-flight briefing (glidetask.formats.briefing)."""

from __future__ import annotations

import re
from pathlib import Path

import pytest

from glidetask import cautions
from glidetask.engine.sensitivity import plan_sensitivity
from glidetask.engine.plan import CARD_MC_MS, final_glide_card, plan
from glidetask.engine.scenario import Wind
from glidetask.formats.briefing import PAGE_BREAK, plan_to_markdown
from glidetask.formats.task_file import load_scenario

ROOT = Path(__file__).resolve().parents[2]


@pytest.fixture(scope="module")
def triangle():
    p = plan(load_scenario(ROOT / "demo_tasks" / "vardmoor-triangle-300.toml"))
    return p, plan_to_markdown(p, sensitivity=plan_sensitivity(p))


def _table_after(text: str, heading: str) -> list[list[str]]:
    """The rows of the first table under ``heading`` (its header first, no separator row)."""
    section = text.split(heading, 1)[1].split("\n## ", 1)[0]
    rows = [line for line in section.splitlines() if line.startswith("|")]
    cells = [[c.strip() for c in row.strip("|").split("|")] for row in rows]
    return [c for c in cells if not set("".join(c)) <= set(":-")]


def test_briefing_has_every_section_and_each_page_fits_a_sheet(triangle):
    _, text = triangle
    for heading in ("# Pre-flight briefing", "## Legs", "## Heights needed to get home", "## Day assumed",
                    "## How the task time answers to the day", "## Final glide over the terrain",
                    "## Landable fields along the task", "## Cautions"):
        assert heading in text
    pages = text.split(PAGE_BREAK)
    assert len(pages) == 3  # the plan, the whole flight's profile and airspace, then safety over the ground
    assert "## Legs" in pages[0] and "## Planned profile" in pages[1] and "## Airspace" in pages[1]
    assert "## Final glide over the terrain" in pages[2]
    # A printed page holds about 60 lines (common practice for A4/letter at 10-11 pt).
    assert all(len(page.strip().splitlines()) <= 60 for page in pages)


def test_legs_table_has_one_row_per_leg_with_the_plan_figures(triangle):
    p, text = triangle
    rows = _table_after(text, "## Legs")
    assert len(rows) == 1 + len(p.legs)  # the header and one row per leg
    for row, leg in zip(rows[1:], p.legs):
        assert leg.from_name in row[1] and leg.to_name in row[1]
        assert row[2] == f"{leg.distance_m / 1000:.1f}"
        assert row[-1] == f"{leg.arrival_height_m:.0f}"
        top = p.scenario.day.band_top_m  # Need only within the band (issue 12 item 7)
        assert row[-2] == (f"{leg.required_height_m:.0f}" if leg.required_height_m <= top else "above")


def test_final_glide_card_shows_the_engine_requirements(triangle):
    p, text = triangle
    rows = _table_after(text, "## Heights needed to get home")
    assert rows[0][3:] == [f"MC {m:.0f}" for m in CARD_MC_MS]
    card = final_glide_card(p)
    top = p.scenario.day.band_top_m
    heights, speeds = rows[1:-1], rows[-1]
    assert speeds[0].startswith("Fly on the last leg")  # the speeds row: tests/formats/test_circling_and_final_speed_text.py
    for i, row in enumerate(heights):
        assert row[3:] == [f"{card[j, i]:.0f}" if card[j, i] <= top else "above" for j in range(len(CARD_MC_MS))]
    assert heights[-1][3:] == [f"{p.arrival_floor_m:.0f}"] * len(CARD_MC_MS)  # at the finish: the arrival floor


def test_above_the_band_top_the_briefing_says_where_a_final_glide_from_it_starts(triangle):
    # Source: a pure glide at one setting in one wind uses height in proportion to distance
    # (contract 3), so between the last turnpoint (3528 m needed, 102.6 km to go) and the
    # finish (525 m) the band top of 2200 m is enough from 102.6 x (2200 - 525)/(3528 - 525) km.
    p, text = triangle
    last = p.legs[-1]
    to_go = p.planned_distance_m - p.path.cumulative_m[-2]
    expected = to_go * (2200.0 - p.arrival_floor_m) / (last.required_height_m - p.arrival_floor_m)
    assert p.scenario.day.band_top_m == 2200.0 and last.required_height_m > 2200.0
    assert f"final glide from {expected / 1000:.1f} km at band top (2200 m)" in text
    assert expected / 1000 == pytest.approx(57.2, abs=0.05)


def test_reach_from_a_height_between_the_points():
    # Source: linear interpolation (numpy.interp semantics), the requirement never falling
    # with the distance to go; hand values.
    from glidetask.engine.finalglide import reach_from_height_m

    to_go, need = [0.0, 50e3, 150e3], [500.0, 1500.0, 4500.0]
    assert reach_from_height_m(to_go, need, 1000.0) == pytest.approx(25e3)
    assert reach_from_height_m(to_go, need, 3000.0) == pytest.approx(100e3)
    assert reach_from_height_m(to_go[::-1], need[::-1], 3000.0) == pytest.approx(100e3)  # any order
    assert reach_from_height_m(to_go, need, 400.0) == 0.0  # not even the finish
    assert reach_from_height_m(to_go, need, 9000.0) == pytest.approx(150e3)  # the whole task


def test_every_caution_is_in_the_briefing(triangle):
    p, text = triangle
    for caution in (*cautions.GENERAL, *p.cautions):
        assert caution in text


def test_briefing_in_aviation_units_and_for_a_plan_that_ends_short():
    p = plan(load_scenario(ROOT / "demo_tasks" / "vardmoor-triangle-300.toml"), wind=Wind(250.0, 200 / 3.6))
    text = plan_to_markdown(p, "aviation")
    assert "Ends short" in text and "not completed" in text
    assert re.search(r"Dist NM", text) and "Need ft" in text
    assert "MC 0 | MC 2 | MC 4 | MC 6" in text  # the aviation card in knots


@pytest.mark.parametrize("unit_name", ["metric", "aviation"])
def test_a_day_from_a_sounding_gets_its_own_page_with_the_derived_day(unit_name):
    # The section shows the derived day itself (glidetask day's figures) in the chosen units.
    from glidetask import units
    from glidetask.commands.day import day_to_dict

    p = plan(load_scenario(ROOT / "demo_tasks" / "vardmoor-forecast-day.toml"))
    text = plan_to_markdown(p, unit_name)
    unit = units.by_name(unit_name)
    pages = text.split(PAGE_BREAK)
    # The plan, the whole flight's profile, safety over the ground, then the derived day.
    assert len(pages) == 4 and "## Day from the sounding" in pages[3]
    assert all(len(page.strip().splitlines()) <= 60 for page in pages)
    assert "from sounding vardmoor-sounding.csv" in pages[3]
    day = day_to_dict(p.scenario.day_source.derived)
    tables = _table_after(text, "## Day from the sounding")  # the hourly table, then the wind's
    rows, wind = tables[:1 + len(day["hours"])], tables[1 + len(day["hours"]):]
    assert rows[0][2] == f"Thermal top {unit.height_label}"
    assert wind[0] == [f"Height {unit.height_label}", "From deg", f"Speed {unit.speed_label}"]
    shown = [w for w in day["wind"] if w["height_m"] <= max(h["thermal_top_m"] for h in day["hours"]) + 1000.0]
    assert wind[1:] == [[f"{unit.height(w['height_m']):.0f}", f"{w['from_deg']:03.0f}",
                         f"{unit.speed(w['speed_kmh'] * units.KMH):.0f}"] for w in shown]
    for row, hour in zip(rows[1:], day["hours"]):
        assert row[0] == hour["time"]
        assert row[2] == f"{unit.height(hour['thermal_top_m']):.0f}"
        assert row[3] == ("blue" if not hour["cumulus"] else f"{unit.height(hour['cloud_base_m']):.0f}")
        if hour["band_top_m"] is not None:
            assert row[4] == f"{unit.height(hour['band_bottom_m']):.0f}-{unit.height(hour['band_top_m']):.0f}"
        assert row[6] == f"{unit.vertical(hour['thermal_strength_ms']):.1f}"
    for caution in cautions.day_source_cautions(p.scenario.day_source, unit):
        assert f"> - {caution}" in pages[3] and f"- {caution}" in text.split("## Cautions")[1]


def test_a_typed_day_has_no_sounding_page(triangle):
    assert "## Day from the sounding" not in triangle[1]


def test_day_assumed_states_the_practical_speeds(triangle):
    # Source: issue 12 item 5 and contract 3 ("Time lost in practice"): centring_s and
    # detour_percent (both common practice) are shown wherever the day is stated.
    p, text = triangle
    day = p.scenario.day
    section = text.split("## Day assumed", 1)[1].split("\n## ", 1)[0]
    assert f"{day.centring_s:g} s centring each climb" in section
    assert f"{day.detour_percent:g} % longer" in section
    assert f"{day.effective_thermal_radius_m:.0f} m in radius" in section
    assert f"circling at {day.stall_margin:g} times the banked stall speed" in section  # 1.15, common practice
