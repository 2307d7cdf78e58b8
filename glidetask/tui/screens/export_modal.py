"""Export the plan: pick a format, a file name, and write it."""

from __future__ import annotations

from pathlib import Path

from textual.app import ComposeResult
from textual.containers import Vertical
from textual.screen import ModalScreen
from textual.widgets import Input, Label, RadioButton, RadioSet, Static

from glidetask.tui import messages
from glidetask.tui.exporting import FORMATS
from glidetask.tui.screens.path_modal import PathSuggester


class ExportModal(ModalScreen):
    """Format (GPX, briefing, JSON), a path; enter writes the file and closes."""

    BINDINGS = [("escape", "cancel", "Cancel")]

    def __init__(self, base: Path):
        """``base``: the path of the files to write, without suffix (``…/vardmoor`` gives
        ``…/vardmoor-briefing.md``)."""
        super().__init__(classes="path-modal", id="export-modal")
        self.base = str(base)

    def compose(self) -> ComposeResult:
        with Vertical(classes="path-panel"):
            yield Label("Export the plan", classes="path-title")
            with RadioSet(id="export-format"):
                for index, (suffix, name) in enumerate(FORMATS.items()):
                    yield RadioButton(f"{name}  ({suffix})", value=index == 1, id=f"export-{suffix[1:]}")
            yield Input(self.base + "-briefing.md", id="export-path", suggester=PathSuggester(), select_on_focus=False)
            yield Static("enter: write   shift+tab: choose the format   esc: cancel\n(files are written whole or not at all)",
                         classes="path-hint", markup=False)
            yield Static("", id="export-error", markup=False)

    def on_mount(self) -> None:
        self.query_one("#export-path", Input).focus()

    def on_radio_set_changed(self, event: RadioSet.Changed) -> None:
        event.stop()
        suffix = "." + event.pressed.id.removeprefix("export-")
        name = {".md": "-briefing.md", ".gpx": "-route.gpx", ".json": "-plan.json"}[suffix]
        self.query_one("#export-path", Input).value = self.base + name

    def on_input_submitted(self, event: Input.Submitted) -> None:
        event.stop()
        from glidetask.tui.exporting import export_plan

        app = self.app
        try:
            target = export_plan(event.value.strip(), app.plan.plan, app.units.name)
        except Exception as error:  # a failed export is a message in the dialog, never a crash
            self.query_one("#export-error", Static).update(f"✗ not written: {error}")
            return
        self.post_message(messages.Notice(f"exported {target}"))
        self.dismiss(str(target))

    def action_cancel(self) -> None:
        self.dismiss(None)
