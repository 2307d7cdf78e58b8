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
        self._accept(updated)
        return True

    def edit(self, change: Callable[[Scenario], Scenario]) -> bool:
        """Apply a structural edit (task points, zones, profile); False if refused."""
        try:
            updated = change(self.scenario)
        except InputError as error:
            self.structural_problems = list(error.problems)
            return False
        except ValueError as error:
            self.structural_problems = [Problem(edits.SOURCE, "edit", str(error))]
            return False
        self.structural_problems = []
        self._accept(updated)
        return True

    def _accept(self, updated: Scenario) -> None:
        self.scenario = updated
        self.dirty = True
        for field_id, (text, _) in list(self.pending.items()):
            try:
                self.scenario = edits.apply_field(self.scenario, field_id, text, self.units)
            except InputError as error:
                self.pending[field_id] = (text, error.problems)
            else:
                del self.pending[field_id]

    def replace_all(self, scenario: Scenario, path: Path | None) -> None:
        """A newly opened task: nothing pending, nothing unsaved."""
        self.scenario, self.path = scenario, path
        self.dirty = False
        self.pending.clear()
        self.structural_problems = []

    def saved(self, path: Path) -> None:
        self.path, self.dirty = path, False
