"""Editing the band top of a day whose band top follows the clock (tui.edits.apply_field)."""

from pathlib import Path

from glidetask import units
from glidetask.formats.task_file import load_scenario
from glidetask.tui.edits import apply_field

FORECAST = Path(__file__).resolve().parents[2] / "demo_tasks" / "vardmoor-forecast-day.toml"


def test_typing_one_band_top_replaces_the_band_top_through_the_day():
    scenario = load_scenario(FORECAST)
    assert scenario.day.band_top_profile is not None
    edited = apply_field(scenario, "day-band_top_m", "2100", units.METRIC)
    assert edited.day.band_top_profile is None and edited.day.band_top_m == 2100.0
    assert edited.day.band_top_at(12 * 3600.0) == 2100.0  # not held at the derived noon top
    lower = apply_field(scenario, "day-band_bottom_m", "1100", units.METRIC)
    assert lower.day.band_top_profile == scenario.day.band_top_profile
