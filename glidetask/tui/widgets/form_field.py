"""A labelled input for one figure of the scenario, in the units on screen."""

from __future__ import annotations

from textual import on
from textual.app import ComposeResult
from textual.containers import Horizontal
from textual.widgets import Input, Label

from glidetask.tui import messages


class FormField(Horizontal):
    """``label [input] unit``; typing posts :class:`~glidetask.tui.messages.FieldEdited`,
    enter leaves the field.

    The input's id is the field id of :mod:`glidetask.tui.edits`, so the screen can mark it
    ``-invalid`` when the app refuses what was typed.

    Imperative (:meth:`show`), not reactive: while the pilot types, the text is theirs and a new one is declined.
    """

    DEFAULT_CSS = """
    FormField { height: 1; }
    """

    def __init__(self, field_id: str, label: str, unit: str = "", *, placeholder: str = "",
                 tooltip: str | None = None, **kwargs):
        super().__init__(classes="form-field", **kwargs)
        self.field_id = field_id
        self._label, self._unit, self._placeholder = label, unit, placeholder
        if tooltip:
            self.tooltip = tooltip

    def compose(self) -> ComposeResult:
        yield Label(self._label, classes="field-label", markup=False)
        yield Input(id=self.field_id, classes="field-input", placeholder=self._placeholder,
                    compact=True, select_on_focus=True)
        yield Label(self._unit, classes="field-unit", markup=False)

    @property
    def input(self) -> Input:
        return self.query_one(Input)

    def show(self, text: str, unit: str | None = None, *, force: bool = False) -> None:
        """Show ``text`` unless the pilot is typing here (``force``: units changed, file opened)."""
        if unit is not None:
            self.query_one(".field-unit", Label).update(unit)
        field = self.input
        if field.has_focus and not force:
            return
        if field.value != text:
            with field.prevent(Input.Changed):
                field.value = text

    @on(Input.Submitted)
    def _done(self, event: Input.Submitted) -> None:
        event.stop()
        self.screen.set_focus(None)  # enter leaves the field: the view keys work again

    @on(Input.Changed)
    def _typed(self, event: Input.Changed) -> None:
        event.stop()
        self.post_message(messages.FieldEdited(self.field_id, event.value))
