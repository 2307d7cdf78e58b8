"""Edits of the task itself: add, remove, move and replace points, change zones.

Each function takes a scenario and returns a new one; the engine's :class:`Task`
constructor checks the result (a sector cannot be a finish, an area task needs three
points) and its ValueError becomes the message the pilot sees.
"""

from __future__ import annotations

from dataclasses import replace

from glidetask.engine.scenario import Scenario
from glidetask.errors import InputError, Problem

SOURCE = "input"


def _with_points(scenario: Scenario, points) -> Scenario:
    from glidetask.engine.task import Task

    task = scenario.task
    try:
        new_task = Task(task.name, task.kind, tuple(points), task.min_time_s)
    except ValueError as error:
        raise InputError([Problem(SOURCE, "[task] points", str(error))]) from None
    return replace(scenario, task=new_task)


def default_turn_zone(kind: str):
    """The zone a newly added turn point gets: a 0.5 km cylinder (racing), a 20 km area cylinder (area)."""
    from glidetask.engine.zones import Zone

    return Zone.area_cylinder(20_000.0) if kind == "area" else Zone.cylinder(500.0)


def insert_point(scenario: Scenario, index: int, turnpoint, zone=None) -> Scenario:
    """A new point at ``index`` (clamped between the start and the finish)."""
    from glidetask.engine.task import TaskPoint

    points = list(scenario.task.points)
    index = min(max(index, 1), len(points) - 1) if len(points) >= 2 else len(points)
    points.insert(index, TaskPoint(turnpoint, zone or default_turn_zone(scenario.task.kind)))
    return _with_points(scenario, points)


def remove_point(scenario: Scenario, index: int) -> Scenario:
    points = list(scenario.task.points)
    if not 0 <= index < len(points):
        raise InputError([Problem(SOURCE, "[task] points", f"there is no point {index + 1}")])
    del points[index]
    return _with_points(scenario, points)


def move_point(scenario: Scenario, index: int, step: int) -> Scenario:
    """The point at ``index`` swapped with its neighbour ``step`` (-1 up, +1 down) away."""
    points = list(scenario.task.points)
    other = index + step
    if not (0 <= index < len(points) and 0 <= other < len(points)):
        raise InputError([Problem(SOURCE, "[task] points", "cannot move the point further")])
    points[index], points[other] = points[other], points[index]
    return _with_points(scenario, points)


def replace_turnpoint(scenario: Scenario, index: int, turnpoint) -> Scenario:
    """The point at ``index`` moved to another turnpoint, keeping its zone."""
    points = list(scenario.task.points)
    points[index] = replace(points[index], turnpoint=turnpoint)
    return _with_points(scenario, points)


def set_zone(scenario: Scenario, index: int, zone) -> Scenario:
    points = list(scenario.task.points)
    points[index] = replace(points[index], zone=zone)
    return _with_points(scenario, points)


def zero_length_legs(task) -> list[tuple[int, str]]:
    """Legs whose two points sit on the same place: (leg index, ``"VAR→VAR"``)."""
    points = task.points
    found = []
    for i, (a, b) in enumerate(zip(points, points[1:])):
        if (a.turnpoint.lat, a.turnpoint.lon) == (b.turnpoint.lat, b.turnpoint.lon):
            names = [p.turnpoint.code or p.name for p in (a, b)]
            found.append((i, "→".join(names)))
    return found


def new_zero_length_legs(before, after) -> None:
    """InputError if ``after`` has more zero-length legs than ``before`` (a stray key never
    adds a leg that goes nowhere; a file that already has one can still be edited)."""
    old, new = zero_length_legs(before), zero_length_legs(after)
    if len(new) > len(old):
        legs = ", ".join(name for _, name in new)
        raise InputError([Problem(SOURCE, "[task] points",
                                  f"refused: that would make a leg of zero length ({legs})")])
