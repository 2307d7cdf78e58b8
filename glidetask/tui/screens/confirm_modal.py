"""Small questions: discard unsaved changes? replace an existing file? quit?"""

from __future__ import annotations

from textual.app import ComposeResult
from textual.containers import Horizontal, Vertical
from textual.screen import ModalScreen
from textual.widgets import Button, Static


class ConfirmModal(ModalScreen[bool]):
    """A yes/no question; escape answers no, and so does enter at first (the focus starts on
    the "no" button: a stray key never confirms)."""

    BINDINGS = [("escape", "answer(False)", "Cancel")]

    def __init__(self, question: str, *, yes: str = "Yes", no: str = "No", id: str | None = "confirm-modal"):
        super().__init__(classes="question-modal", id=id)
        self.question, self.yes, self.no = question, yes, no

    def compose(self) -> ComposeResult:
        with Vertical(classes="question-panel"):
            yield Static(self.question, classes="question-text", markup=False)
            with Horizontal(classes="question-buttons"):
                yield Button(self.yes, id="answer-yes", variant="error")
                yield Button(self.no, id="answer-no", variant="primary")

    def on_mount(self) -> None:
        self.query_one("#answer-no", Button).focus()

    def on_button_pressed(self, event: Button.Pressed) -> None:
        event.stop()
        self.dismiss(event.button.id == "answer-yes")

    def action_answer(self, answer: bool) -> None:
        self.dismiss(answer)


class QuitModal(ModalScreen[str]):
    """Unsaved changes on quit: save and quit, quit without saving, or keep planning."""

    BINDINGS = [("escape", "choose('stay')", "Keep planning"), ("s", "choose('save')", "Save and quit"),
                ("d", "choose('discard')", "Quit without saving")]

    def __init__(self):
        super().__init__(classes="question-modal", id="quit-modal")

    def compose(self) -> ComposeResult:
        with Vertical(classes="question-panel"):
            yield Static("The task has unsaved changes.", classes="question-text", markup=False)
            with Horizontal(classes="question-buttons"):
                yield Button("Save and quit (s)", id="choose-save", variant="primary")
                yield Button("Quit without saving (d)", id="choose-discard", variant="error")
                yield Button("Keep planning (esc)", id="choose-stay")

    def on_mount(self) -> None:
        self.query_one("#choose-stay", Button).focus()

    def on_button_pressed(self, event: Button.Pressed) -> None:
        event.stop()
        self.dismiss(event.button.id.removeprefix("choose-"))

    def action_choose(self, choice: str) -> None:
        self.dismiss(choice)
