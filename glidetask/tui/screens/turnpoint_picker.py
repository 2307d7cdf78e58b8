"""Pick a turnpoint from the task's turnpoint file, with a search."""

from __future__ import annotations

from textual.app import ComposeResult
from textual.containers import Vertical
from textual.screen import ModalScreen
from textual.widgets import Input, Label, OptionList
from textual.widgets.option_list import Option

from glidetask.units import UnitSystem


def matches(turnpoint, query: str) -> bool:
    """Case-insensitive match on the name, the code or the note."""
    query = query.strip().lower()
    if not query:
        return True
    return any(query in (text or "").lower() for text in (turnpoint.name, turnpoint.code, turnpoint.note))


class TurnpointPicker(ModalScreen):
    """Type to narrow the list; enter (or a click) picks; escape cancels."""

    BINDINGS = [("escape", "cancel", "Cancel"), ("down", "focus_list", "List")]

    def __init__(self, turnpoints, units: UnitSystem, title: str = "Pick a turnpoint"):
        super().__init__(classes="picker-modal")
        self.turnpoints = list(turnpoints)
        self.units = units
        self.title_text = title
        self.shown: list = []

    def compose(self) -> ComposeResult:
        with Vertical(classes="picker-panel"):
            yield Label(self.title_text, classes="path-title", markup=False)
            yield Input(placeholder="search name or code", id="picker-search")
            yield OptionList(id="picker-list")

    def on_mount(self) -> None:
        self._fill("")
        self.query_one("#picker-search", Input).focus()

    def _fill(self, query: str) -> None:
        options = self.query_one("#picker-list", OptionList)
        options.clear_options()
        self.shown = [t for t in self.turnpoints if matches(t, query)]
        for turnpoint in self.shown[:500]:
            mark = "▲ land" if turnpoint.landable else "      "
            code = (turnpoint.code or "")[:6]
            elevation = self.units.fmt_height(turnpoint.elevation_m)
            options.add_option(Option(f"{code:<6} {turnpoint.name[:30]:<30} {elevation:>8} {mark}"))
        if self.shown:
            options.highlighted = 0

    def on_input_changed(self, event: Input.Changed) -> None:
        event.stop()
        self._fill(event.value)

    def on_input_submitted(self, event: Input.Submitted) -> None:
        event.stop()
        options = self.query_one("#picker-list", OptionList)
        if self.shown and options.highlighted is not None:
            self.dismiss(self.shown[options.highlighted])

    def on_option_list_option_selected(self, event: OptionList.OptionSelected) -> None:
        event.stop()
        self.dismiss(self.shown[event.option_index])

    def action_focus_list(self) -> None:
        self.query_one("#picker-list", OptionList).focus()

    def action_cancel(self) -> None:
        self.dismiss(None)
