"""Export the plan: pick a format, a file name, and write it."""

from __future__ import annotations

from pathlib import Path

from textual.app import ComposeResult
from textual.containers import Vertical
from textual.screen import ModalScreen
from textual.widgets import Input, Label, OptionList, Static
from textual.widgets.option_list import Option

from glidetask.tui import messages
from glidetask.tui.exporting import FORMATS
from glidetask.tui.screens.path_modal import PathSuggester


class ExportModal(ModalScreen):
    """Format (GPX, briefing, JSON), a path; enter writes the file (asking first before it
    replaces an existing one) and closes."""

    BINDINGS = [("escape", "cancel", "Cancel")]

    def __init__(self, base: Path):
        """``base``: the path of the files to write, without suffix (``…/vardmoor`` gives
        ``…/vardmoor-briefing.md``)."""
        super().__init__(classes="path-modal", id="export-modal")
        self.base = str(base)

    def compose(self) -> ComposeResult:
        with Vertical(classes="path-panel"):
            yield Label("Export the plan", classes="path-title")
            # a plain list: ↑↓ (or a click) picks the format, enter writes
            yield OptionList(*(Option(f"{name}  ({suffix})", id=suffix) for suffix, name in FORMATS.items()),
                             id="export-format")
            yield Input(self.base + "-briefing.md", id="export-path", suggester=PathSuggester(), select_on_focus=False)
            yield Static("↑↓: format · enter: write · tab: edit the file name · esc: cancel\n"
                         "(files are written whole or not at all)", classes="path-hint", markup=False)
            yield Static("", id="export-error", markup=False)

    def on_mount(self) -> None:
        formats = self.query_one("#export-format", OptionList)
        formats.highlighted = list(FORMATS).index(".md")
        formats.focus()

    def on_option_list_option_highlighted(self, event: OptionList.OptionHighlighted) -> None:
        event.stop()
        name = {".md": "-briefing.md", ".gpx": "-route.gpx", ".json": "-plan.json"}[event.option.id]
        self.query_one("#export-path", Input).value = self.base + name

    def on_option_list_option_selected(self, event: OptionList.OptionSelected) -> None:
        event.stop()
        self._write(self.query_one("#export-path", Input).value.strip())

    def on_input_submitted(self, event: Input.Submitted) -> None:
        event.stop()
        self._write(event.value.strip())

    def _write(self, path_text: str, replace: bool = False) -> None:
        import os

        from glidetask.tui.exporting import export_plan

        app = self.app
        error_line = self.query_one("#export-error", Static)
        try:
            target = export_plan(path_text, app.plan.plan, app.units.name, replace=replace)
        except FileExistsError:
            # as ``glidetask export`` without --force: an existing file is replaced only when the pilot says so
            from glidetask.tui.screens.confirm_modal import ConfirmModal

            target = Path(path_text).expanduser()
            read_only = " It is read-only." if not os.access(target, os.W_OK) else ""
            error_line.update("")
            self.app.push_screen(
                ConfirmModal(f"{target} exists.{read_only} Replace it with the {target.suffix} export?",
                             yes="Replace", no="Keep it"),
                lambda yes: self._replace_answered(path_text, yes))
            return
        except Exception as error:  # a failed export is a message in the dialog, never a crash
            error_line.update(f"✗ not written: {error}")
            return
        self.post_message(messages.Notice(f"exported {target}"))
        self.dismiss(str(target))

    def _replace_answered(self, path_text: str, yes: bool | None) -> None:
        if yes:
            self._write(path_text, replace=True)
        else:
            self.query_one("#export-error", Static).update(f"not written: {path_text} kept as it is; choose another name")
            self.query_one("#export-path", Input).focus()

    def action_cancel(self) -> None:
        self.dismiss(None)
