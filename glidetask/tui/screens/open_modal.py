"""Open a task: the recent task files and those of a folder in a list to pick from, or a
path typed (with completion)."""

from __future__ import annotations

from pathlib import Path

from textual.app import ComposeResult
from textual.containers import Vertical
from textual.screen import ModalScreen
from textual.widgets import Input, Label, OptionList, Static
from textual.widgets.option_list import Option

from glidetask.tui.screens.path_modal import PathSuggester


def task_files(folder: Path) -> list[Path]:
    """The task files (``*.toml``) of ``folder``, by name."""
    try:
        return sorted(p for p in folder.iterdir() if p.suffix == ".toml" and p.is_file())
    except OSError:
        return []


class OpenModal(ModalScreen[str | None]):
    """Recent files first, then the task files of the folder; enter on one opens it, or
    type a path below (→ completes) and press enter."""

    BINDINGS = [("escape", "cancel", "Cancel")]

    def __init__(self, folder: Path, recent: list[Path]):
        super().__init__(classes="path-modal", id="open-modal")
        self.folder, self.recent = folder, recent

    def choices(self) -> list[Path]:
        seen, ordered = set(), []
        for path in (*self.recent, *task_files(self.folder)):
            if path not in seen:
                seen.add(path)
                ordered.append(path)
        return ordered

    def compose(self) -> ComposeResult:
        recent = set(self.recent)
        options = [Option(("recent  " if p in recent else "folder  ") + (p.name if p.parent == self.folder else str(p)),
                          id=str(p)) for p in self.choices()]
        with Vertical(classes="path-panel"):
            yield Label("Open a task file", classes="path-title", markup=False)
            yield OptionList(*options, id="open-list")
            yield Input(str(self.folder) + "/", id="path-input", suggester=PathSuggester(), select_on_focus=False)
            yield Static("↑↓ enter: open the file · tab: type a path (→ completes) · esc: cancel",
                         classes="path-hint", markup=False)

    def on_mount(self) -> None:
        target = self.query_one("#open-list", OptionList) if self.choices() else self.query_one("#path-input")
        target.focus()

    def on_option_list_option_selected(self, event: OptionList.OptionSelected) -> None:
        event.stop()
        self.dismiss(event.option.id)

    def on_input_submitted(self, event: Input.Submitted) -> None:
        event.stop()
        self.dismiss(event.value.strip() or None)

    def action_cancel(self) -> None:
        self.dismiss(None)
