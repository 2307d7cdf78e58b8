"""Issue 10 item 1: the caches of a replan belong to the UI's recompute, keyed on values.

The engine keeps nothing between plans; ``recompute.PLAN_MEMO`` keeps the terrain sampled
along each path and the landable coverage, so a replan after an edit that leaves their
inputs alone reuses them, and the figures are those of a plan computed from scratch.
"""

from __future__ import annotations

import dataclasses
import json

import pytest

from glidetask import paths
from glidetask.engine.plan import plan
from glidetask.engine.scenario import Wind
from glidetask.formats.plan_json import plan_to_dict
from glidetask.tui import recompute
from glidetask.tui.session import EditSession
from glidetask.units import METRIC


@pytest.fixture
def triangle():
    recompute.PLAN_MEMO.clear()
    yield recompute.load_task(paths.demo_task())  # the demo triangle: terrain and landables
    recompute.PLAN_MEMO.clear()


def _figures(result) -> str:
    return json.dumps(plan_to_dict(result), sort_keys=True)


def test_the_engine_keeps_nothing_between_plans(triangle):
    first, second = plan(triangle), plan(triangle)
    assert first.landables is not None and first.requirement.terrain is not None  # under airspace: a corridor
    # computed again each time: no module-level cache in the engine
    assert second.landables is not first.landables and second.requirement.terrain is not first.requirement.terrain
    assert len(recompute.PLAN_MEMO) == 0


def test_a_replan_reuses_what_the_edit_left_alone(triangle):
    first = recompute.compute_plan(triangle).plan
    assert len(recompute.PLAN_MEMO) == 2  # one path (a racing task) and its coverage
    session = EditSession(triangle, METRIC)
    assert session.edit_field("day-start_time", "11:30")  # moves neither the path nor the coverage's inputs
    later = recompute.compute_plan(session.scenario).plan
    assert later.requirement.terrain is first.requirement.terrain and later.landables is first.landables
    assert later.finish_time_s != first.finish_time_s  # the plan itself is new
    # the same figures as a plan from scratch, without any memo
    assert _figures(later) == _figures(plan(session.scenario))


def test_the_keys_are_values_not_objects(triangle):
    first = recompute.compute_plan(triangle).plan
    # an equal scenario built anew (other objects, same values) finds what was kept
    again = dataclasses.replace(recompute.load_task(paths.demo_task()))
    assert again is not triangle
    assert recompute.compute_plan(again).plan.landables is first.landables
    # a new wind moves the coverage's inputs: searched again, and the figures follow
    windy = dataclasses.replace(triangle, day=dataclasses.replace(triangle.day, wind=Wind(250.0, 25.0 / 3.6)))
    moved = recompute.compute_plan(windy).plan
    assert moved.landables is not first.landables
    assert _figures(moved) == _figures(plan(windy))


def test_the_memo_keeps_the_latest_few_of_each_kind():
    memo = recompute.ValueMemo({"a": 2, "b": 1})
    calls = []

    def compute(value):
        def run():
            calls.append(value)
            return value * 10
        return run

    assert [memo("a", (k,), compute(k)) for k in (1, 2, 1, 3, 1)] == [10, 20, 10, 30, 10]
    assert calls == [1, 2, 3]  # 1 kept (used again before 3 came), 2 dropped as the oldest
    assert memo("a", (2,), compute(2)) == 20 and calls == [1, 2, 3, 2]
    memo("b", (1,), compute(1))
    assert len(memo) == 3
