"""The state of one planning session, free of widgets: the scenario being edited, the
figures the pilot has typed that do not make sense yet, and whether there is anything
unsaved. The app holds one :class:`EditSession` and mirrors it into its reactives.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from pathlib import Path
from typing import Callable

from glidetask.engine.scenario import Scenario
from glidetask.errors import InputError, Problem
from glidetask.tui import edits
from glidetask.units import UnitSystem


@dataclass
class EditSession:
    """The scenario under edit and the inputs still waiting to make sense.

    ``pending`` maps a field id to the text the pilot left in it and the problems that
    text has; after every accepted edit the pending texts are tried again (fixing the
    band bottom can make a refused band top acceptable).
    """

    scenario: Scenario
    units: UnitSystem
    path: Path | None = None
    dirty: bool = False
    pending: dict[str, tuple[str, list[Problem]]] = field(default_factory=dict)
    structural_problems: list[Problem] = field(default_factory=list)
    # undo history: (scenario before, what changed); keystrokes in one field make one step
    undo_stack: list[tuple[Scenario, str]] = field(default_factory=list)
    redo_stack: list[tuple[Scenario, str]] = field(default_factory=list)
    _last_step: str | None = None  # the field the latest undo step is typing into

    @property
    def problems(self) -> list[Problem]:
        found = [problem for _, problems in self.pending.values() for problem in problems]
        return found + self.structural_problems

    @property
    def invalid_fields(self) -> set[str]:
        return set(self.pending)

    def edit_field(self, field_id: str, text: str) -> bool:
        """Apply typed text; False (and the field pending) if it is refused."""
        try:
            updated = edits.apply_field(self.scenario, field_id, text, self.units)
        except InputError as error:
            self.pending[field_id] = (text, error.problems)
            return False
        self.pending.pop(field_id, None)
        label = edits.FIELDS[field_id].label if field_id in edits.FIELDS else field_id
        self._accept(updated, label, step=field_id)
        return True

    def edit(self, change: Callable[[Scenario], Scenario], what: str = "edit") -> bool:
        """Apply a structural edit (task points, zones, profile); False if refused
        (a change that would make a zero-length leg is refused too)."""
        from glidetask.tui.task_edits import new_zero_length_legs

        try:
            updated = change(self.scenario)
            new_zero_length_legs(self.scenario.task, updated.task)
        except InputError as error:
            self.structural_problems = list(error.problems)
            return False
        except ValueError as error:
            self.structural_problems = [Problem(edits.SOURCE, "edit", str(error))]
            return False
        self.structural_problems = []
        self._accept(updated, what)
        return True

    def _accept(self, updated: Scenario, what: str, step: str | None = None) -> None:
        if step is None or step != self._last_step:
            self.undo_stack.append((self.scenario, what))
        self._last_step = step
        self.redo_stack.clear()
        self.scenario = updated
        self.dirty = True
        for field_id, (text, _) in list(self.pending.items()):
            try:
                self.scenario = edits.apply_field(self.scenario, field_id, text, self.units)
            except InputError as error:
                self.pending[field_id] = (text, error.problems)
            else:
                del self.pending[field_id]

    def end_step(self) -> None:
        """The pilot left a field: the next keystrokes make a new undo step."""
        self._last_step = None

    def undo(self) -> str | None:
        """Back to the scenario before the latest step; what it undid (None: nothing to undo).
        Refused texts are dropped: the scenario restored is a valid one."""
        return self._travel(self.undo_stack, self.redo_stack)

    def redo(self) -> str | None:
        return self._travel(self.redo_stack, self.undo_stack)

    def _travel(self, source: list, target: list) -> str | None:
        if not source:
            return None
        scenario, what = source.pop()
        target.append((self.scenario, what))
        self.scenario = scenario
        self.pending.clear()
        self.structural_problems = []
        self._last_step = None
        self.dirty = True
        return what

    def replace_all(self, scenario: Scenario, path: Path | None) -> None:
        """A newly opened task: nothing pending, nothing unsaved, no history."""
        self.scenario, self.path = scenario, path
        self.dirty = False
        self.pending.clear()
        self.structural_problems = []
        self.undo_stack.clear()
        self.redo_stack.clear()
        self._last_step = None

    def saved(self, path: Path) -> None:
        self.path, self.dirty = path, False
