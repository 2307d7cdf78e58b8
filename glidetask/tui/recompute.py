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
    """A plan, its contract form (shared/CONTRACT.md 5.3: the names and units every view
    reads) and how long the engine took to make both [s]."""

    scenario: Scenario
    plan: Any
    summary: dict
    elapsed_s: float


def load_task(path: str | Path) -> Scenario:
    """The scenario of a task file (InputError with every problem if it is bad)."""
    from glidetask.formats.task_file import load_scenario

    return load_scenario(Path(path))


def compute_plan(scenario: Scenario) -> Outcome:
    """Plan the task of ``scenario`` (engine.planner.plan) and put it in the contract's terms, timed."""
    from glidetask.engine.planner import plan
    from glidetask.formats.plan_json import plan_to_dict

    started = time.perf_counter()
    result = plan(scenario)
    summary = plan_to_dict(result)
    return Outcome(scenario, result, summary, time.perf_counter() - started)


def save_task(path: str | Path, scenario: Scenario) -> None:
    """Write the task file atomically (formats.task_file.save_task)."""
    from glidetask.formats.task_file import save_task as write

    write(Path(path), scenario)


def heights_card(plan, settings_ms) -> Any:
    """Heights needed to final-glide home from each turnpoint at each MacCready setting
    [m MSL], rows by setting (engine.planner.final_glide_card)."""
    from glidetask.engine.planner import final_glide_card

    return final_glide_card(plan, tuple(settings_ms))


def what_ifs(outcome: Outcome):
    """The task time under the briefing's what-ifs (engine.compare.sensitivity)."""
    from glidetask.engine.compare import sensitivity

    plan = outcome.plan
    return sensitivity(outcome.scenario, path=plan.path, requirement=getattr(plan, "requirement", None))
