"""The work the app hands to its worker thread: opening a task and planning it.

Plain functions (no Textual) so that tests and the benchmark call exactly what the UI runs.
"""

from __future__ import annotations

import time
from dataclasses import dataclass
from pathlib import Path
from typing import Any

from glidetask.engine.scenario import Scenario


@dataclass(frozen=True)
class Outcome:
    """A plan (the engine's SI ``Plan``: the only form of it the views read) and how long
    the engine took [s]."""

    scenario: Scenario
    plan: Any
    elapsed_s: float


def load_task(path: str | Path) -> Scenario:
    """The scenario of a task file (InputError with every problem if it is bad)."""
    from glidetask.formats.task_file import load_scenario

    return load_scenario(Path(path))


def compute_plan(scenario: Scenario) -> Outcome:
    """Plan the task of ``scenario`` (engine.plan.plan), timed.

    This module is the UI's one door to the planner: its imports of the engine's plan
    module are here and nowhere else in the UI."""
    from glidetask.engine.plan import plan

    started = time.perf_counter()
    result = plan(scenario)
    return Outcome(scenario, result, time.perf_counter() - started)


def save_task(path: str | Path, scenario: Scenario) -> None:
    """Write the task file atomically (formats.task_file.save_task)."""
    from glidetask.formats.task_file import save_task as write

    write(Path(path), scenario)


def heights_card(plan, settings_ms) -> Any:
    """Heights needed to final-glide home from each turnpoint at each MacCready setting
    [m MSL], rows by setting (engine.plan.final_glide_card)."""
    from glidetask.engine.plan import final_glide_card

    return final_glide_card(plan, tuple(settings_ms))


def what_ifs(outcome: Outcome):
    """The task time under the briefing's what-ifs (engine.sensitivity.plan_sensitivity)."""
    from glidetask.engine.sensitivity import plan_sensitivity

    return plan_sensitivity(outcome.plan)
