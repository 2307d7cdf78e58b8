"""The lift through the day as an editable table of ``time, value`` rows.

Selecting a row copies it into the two inputs below; ``enter`` in them sets that time's
value (adding the row if the time is new); ``x`` removes the selected row. The kind
switch says whether the values are achieved climb or thermal strength (core updraft,
which the planner turns into achieved climb through the circling model).
"""

from __future__ import annotations

from rich.text import Text
from textual import on
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal, Vertical
from textual.reactive import var
from textual.widgets import DataTable, Input, Label, Select

from glidetask.tui import display, edits, messages
from glidetask.units import UnitSystem, parse_clock

KINDS = (("achieved climb", "climb"), ("thermal strength", "thermal"))


class ProfileTable(DataTable):
    BINDINGS = [Binding("x,delete", "remove_row", "Remove row")]

    def action_remove_row(self) -> None:
        self.parent.remove_selected()


class ProfileEditor(Vertical):
    """Rows of the day's lift profile and a two-field editor for them.

    The view sets ``units`` before ``day``; each watcher fills the rows again."""

    day = var(None, always_update=True, init=False)  # the engine's Day
    units: var[UnitSystem | None] = var(None, init=False)  # None: not shown yet (edits wait)

    def __init__(self, **kwargs):
        super().__init__(**kwargs)
        self.rows: list[tuple[float, float]] = []  # (time_s, value_ms) as shown
        self.kind = "climb"

    def compose(self) -> ComposeResult:
        yield Select(KINDS, value="climb", allow_blank=False, id="profile-kind", compact=True)
        yield ProfileTable(id="profile-table", cursor_type="row", zebra_stripes=True)
        with Horizontal(id="profile-entry"):
            yield Label("at", classes="figure-label")
            yield Input(placeholder="HH:MM", id="profile-time", compact=True)
            yield Label("value", classes="figure-label")
            yield Input(placeholder="m/s", id="profile-value", compact=True)
        yield Label("enter: set row · x: remove row", classes="figure-label")

    def watch_day(self) -> None:
        self._draw()

    def watch_units(self) -> None:
        self._draw()

    def _draw(self) -> None:
        day, units = self.day, self.units
        if day is None or units is None:
            return
        profile = day.climb if day.climb is not None else day.thermal_strength
        self.kind = "climb" if day.climb is not None else "thermal"
        with self.prevent(Select.Changed):
            self.query_one("#profile-kind", Select).value = self.kind
        self.rows = list(zip(profile.times_s, profile.values)) if profile is not None else []
        table = self.query_one(ProfileTable)
        cursor = table.cursor_row
        table.clear(columns=True)
        table.add_column("Time", key="time")
        table.add_column(f"{'Climb' if self.kind == 'climb' else 'Thermal'} {units.vertical_label}", key="value")
        for index, (time_s, value) in enumerate(self.rows):
            table.add_row(display.clock(time_s), Text(display.vertical(units, value), justify="right"), key=f"row-{index}")
        if self.rows:
            table.move_cursor(row=min(max(cursor, 0), len(self.rows) - 1), animate=False)
        self.query_one("#profile-value", Input).placeholder = units.vertical_label

    @on(DataTable.RowHighlighted)
    def _row_chosen(self, event: DataTable.RowHighlighted) -> None:
        event.stop()
        if self.units is None or not 0 <= event.cursor_row < len(self.rows):
            return
        time_s, value = self.rows[event.cursor_row]
        self.query_one("#profile-time", Input).value = display.clock(time_s)
        self.query_one("#profile-value", Input).value = display.number(self.units.vertical(value), 2)

    @on(Input.Changed)
    def _typing(self, event: Input.Changed) -> None:
        event.stop()  # rows are set on enter, not on every key

    @on(Input.Submitted)
    def _set_row(self, event: Input.Submitted) -> None:
        event.stop()
        time_text = self.query_one("#profile-time", Input).value
        value_text = self.query_one("#profile-value", Input).value
        texts = [(display.clock(t), display.number(self.units.vertical(v), 4)) for t, v in self.rows]
        try:
            new_time = parse_clock(time_text)
        except ValueError:
            texts.append((time_text, value_text))  # let the parser report it with its row
        else:
            texts = [row for row, (t, _) in zip(texts, self.rows) if abs(t - new_time) > 30.0]
            texts.append((time_text, value_text))
            texts.sort(key=lambda row: parse_clock(row[0]) if ":" in row[0] else 0.0)
        self._post(texts, "lift profile")
        self.query_one(ProfileTable).focus()  # back to the rows: the view keys work again

    def remove_selected(self) -> None:
        table = self.query_one(ProfileTable)
        if not self.rows or len(self.rows) == 1:
            self.post_message(messages.Notice("the profile needs at least one row"))
            return
        texts = [(display.clock(t), display.number(self.units.vertical(v), 4))
                 for i, (t, v) in enumerate(self.rows) if i != table.cursor_row]
        self._post(texts, "lift profile")

    @on(Select.Changed, "#profile-kind")
    def _kind_changed(self, event: Select.Changed) -> None:
        event.stop()
        if event.value == self.kind or self.units is None:
            return
        texts = [(display.clock(t), display.number(self.units.vertical(v), 4)) for t, v in self.rows]
        self.kind = event.value
        self._post(texts, "kind of lift profile")

    def _post(self, texts: list[tuple[str, str]], what: str) -> None:
        units, thermal = self.units, self.kind == "thermal"
        key = "thermal_strength_ms" if thermal else "climb_ms"

        def change(scenario):
            profile = edits.profile_from_rows(texts, units, key)
            return edits.set_profile(scenario, profile, thermal_strength=thermal)

        self.post_message(messages.ScenarioEdit(change, what, field_id="profile-table"))
