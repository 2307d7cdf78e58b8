"""The work the app hands to its worker thread: opening a task and planning it.

Plain functions (no Textual) so that tests and the benchmark call exactly what the UI runs.

The UI replans on every edit, so this module keeps what a replan can reuse: the terrain
sampled along each path flown and the landable coverage, keyed on the values the engine
says they depend on (never on object identities); the engine itself keeps nothing.
"""

from __future__ import annotations

import threading
import time
from collections import OrderedDict
from dataclasses import dataclass
from pathlib import Path
from typing import Any, Callable

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


class ValueMemo:
    """Results kept by value keys, the most recent few of each kind (thread-safe: the plan
    runs in a worker thread); the ``memo`` of :func:`glidetask.engine.plan.plan`."""

    def __init__(self, sizes: dict[str, int]):
        self.sizes = dict(sizes)
        self._kept: dict[str, OrderedDict] = {kind: OrderedDict() for kind in sizes}
        self._lock = threading.Lock()

    def __call__(self, kind: str, key: tuple, compute: Callable[[], Any]) -> Any:
        kept = self._kept[kind]
        with self._lock:
            if key in kept:
                kept.move_to_end(key)
                return kept[key]
        result = compute()  # outside the lock: another kind (or key) need not wait
        with self._lock:
            kept[key] = result
            while len(kept) > self.sizes[kind]:
                kept.popitem(last=False)
        return result

    def __len__(self) -> int:
        return sum(len(kept) for kept in self._kept.values())

    def clear(self) -> None:
        with self._lock:
            for kept in self._kept.values():
                kept.clear()


# an area task flies up to about 16 paths per plan; a few coverages cover undo and redo
PLAN_MEMO = ValueMemo({"path_terrain": 32, "coverage": 16})


def compute_plan(scenario: Scenario) -> Outcome:
    """Plan the task of ``scenario`` (engine.plan.plan) with :data:`PLAN_MEMO`, timed.

    This module is the UI's one door to the planner: its imports of the engine's plan
    module are here and nowhere else in the UI."""
    from glidetask.engine.plan import plan

    started = time.perf_counter()
    result = plan(scenario, memo=PLAN_MEMO)
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
