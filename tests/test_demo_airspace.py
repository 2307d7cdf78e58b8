"""The invented Vardmoor airspace does what the demo needs, along the tasks' planned paths.

The triangle's band is capped on its second leg only (by the Brennick area's lower step,
with room left above the band bottom); the carelessly set task crosses the Brennick Zone on
its second leg, where no band is left: a conflict; the other demo tasks meet no volume.
The ground under AGL limits is the demo's analytic terrain (``demo_tasks/make_terrain.py``).
"""

from __future__ import annotations

import importlib.util
from pathlib import Path

import numpy as np
import pytest

from glidetask.engine.airspace_conflicts import check_path
from glidetask.engine.plan import plan
from glidetask.formats.airspace_file import read_airspace
from glidetask.formats.task_file import load_scenario

ROOT = Path(__file__).resolve().parent.parent
DEMO = ROOT / "demo_tasks"
MARGIN_M = 100.0  # the contract's default airspace margin (common practice)


def _terrain():
    spec = importlib.util.spec_from_file_location("vardmoor_terrain_for_airspace", DEMO / "make_terrain.py")
    module = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(module)
    return module


TERRAIN = _terrain()


@pytest.fixture(scope="module")
def airspace():
    return read_airspace(DEMO / "vardmoor-airspace.geojson")


def _check(airspace, task: str):
    scenario = load_scenario(DEMO / task)
    day = scenario.day
    planned = plan(scenario)
    lats, lons, along = planned.path.sample(250.0)
    # The planned height is somewhere in the band; the band bottom is the lowest it plans.
    heights = np.full(along.shape, day.band_bottom_m)
    legs = planned.path.cumulative_m
    found = check_path(airspace, lats, lons, along, along, heights, band_top_m=day.band_top_m,
                       band_bottom_m=day.band_bottom_m, leg_starts_m=legs[:-1], margin_m=MARGIN_M,
                       ground=TERRAIN.elevation, isa_deviation_c=day.isa_deviation_c)
    return found, legs


def _leg(legs, at_m: float) -> int:
    return int(np.searchsorted(legs, at_m, side="right"))


def test_the_triangle_is_capped_on_its_second_leg_only(airspace):
    found, legs = _check(airspace, "vardmoor-triangle-300.toml")
    assert found.ok
    assert [(c.name, c.top_m) for c in found.caps] == [("Brennick Area Step 1", 1500.0 - MARGIN_M)]
    cap = found.caps[0]
    assert _leg(legs, cap.from_m) == _leg(legs, cap.to_m) == 2
    assert cap.to_m - cap.from_m > 10000.0  # a stretch a pilot notices
    # The upper step's floor, FL75 on a day 2 K above standard, lies above the band top (2200 m).
    assert {airspace.volumes[s.volume].name for s in found.stretches} == {"Brennick Area Step 1",
                                                                           "Brennick Area Step 2"}


def test_the_careless_task_crosses_the_zone_on_its_second_leg(airspace):
    found, legs = _check(airspace, "vardmoor-careless-setter.toml")
    assert not found.ok
    [conflict] = found.conflicts
    assert (conflict.name, conflict.leg, conflict.from_ground, conflict.no_room) == ("Brennick Zone", 2, True, True)
    zone = next(s for s in found.stretches if airspace.volumes[s.volume].name == "Brennick Zone")
    assert (conflict.from_m, conflict.to_m) == (zone.from_m, zone.to_m)
    # The zone is 16 km across and the leg passes within 2 km of its centre.
    assert 15000.0 < conflict.to_m - conflict.from_m < 16100.0


@pytest.mark.parametrize("task", ["vardmoor-area-3h.toml", "vardmoor-out-and-return.toml",
                                  "vardmoor-ridge-final-glide.toml"])
def test_the_other_demo_tasks_meet_no_volume(airspace, task):
    found, _ = _check(airspace, task)
    assert found.stretches == () and found.ok
