"""Messages the views post up to the app ("attributes down, messages up").

Widgets never change the scenario themselves: they say what the pilot asked for, and the
app applies it, recomputes the plan in a worker and sets the results back down.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import TYPE_CHECKING, Callable

from textual.message import Message

if TYPE_CHECKING:
    from glidetask.engine.scenario import Scenario


@dataclass
class FieldEdited(Message):
    """The pilot typed ``text`` into the input for field ``field_id`` (see :mod:`glidetask.tui.edits`)."""

    field_id: str
    text: str


@dataclass
class ScenarioEdit(Message):
    """A structural edit: ``change(scenario) -> scenario`` (it may raise InputError).

    ``what`` says in a few words what changed, for the status line; ``field_id`` names the
    part of the screen to highlight if the edit is refused.
    """

    change: Callable[["Scenario"], "Scenario"]
    what: str
    field_id: str | None = None


@dataclass
class ViewRequested(Message):
    """Show the view called ``view`` (a mode name of the app)."""

    view: str


@dataclass
class Notice(Message):
    """News for the status line (``text`` in the units on screen); the app shows the latest."""

    text: str
