"""Ask for a file path, with completion of names in the folder typed so far."""

from __future__ import annotations

from pathlib import Path

from textual.app import ComposeResult
from textual.containers import Vertical
from textual.screen import ModalScreen
from textual.suggester import Suggester
from textual.widgets import Input, Label, Static


class PathSuggester(Suggester):
    """Completes the last part of a path from the entries of its folder."""

    def __init__(self):
        super().__init__(use_cache=False, case_sensitive=True)

    async def get_suggestion(self, value: str) -> str | None:
        if not value:
            return None
        typed = Path(value).expanduser()
        folder, stem = (typed, "") if value.endswith("/") else (typed.parent, typed.name)
        try:
            names = sorted(entry.name + ("/" if entry.is_dir() else "") for entry in folder.iterdir())
        except OSError:
            return None
        for name in names:
            if name.startswith(stem) and name != stem and not name.startswith("."):
                return value + name[len(stem):]
        return None


class PathModal(ModalScreen[str | None]):
    """A title, a path input (tab completes), enter to accept, escape to cancel."""

    BINDINGS = [("escape", "cancel", "Cancel")]

    def __init__(self, title: str, start: str = "", *, action: str = "OK", hint: str = ""):
        super().__init__(classes="path-modal")
        self.title_text, self.start, self.action_name, self.hint = title, start, action, hint

    def compose(self) -> ComposeResult:
        with Vertical(classes="path-panel"):
            yield Label(self.title_text, classes="path-title", markup=False)
            # the cursor after the folder given, nothing selected: typing adds to it
            yield Input(self.start, id="path-input", suggester=PathSuggester(), select_on_focus=False)
            yield Static(self.hint or f"enter: {self.action_name.lower()}   →: complete   esc: cancel",
                         classes="path-hint", markup=False)

    def on_input_submitted(self, event: Input.Submitted) -> None:
        event.stop()
        self.dismiss(event.value.strip() or None)

    def action_cancel(self) -> None:
        self.dismiss(None)
