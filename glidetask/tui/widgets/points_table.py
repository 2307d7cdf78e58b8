"""The task's points, in order, with their zones: the place to edit the task."""

from __future__ import annotations

from rich.text import Text
from textual.binding import Binding
from textual.message import Message
from textual.reactive import var
from textual.widgets import DataTable

from glidetask.formats.zone_text import zone_text
from glidetask.tui import display
from glidetask.units import METRIC, UnitSystem


def role(index: int, count: int) -> str:
    return "Start" if index == 0 else "Finish" if index == count - 1 else f"Turn {index}"


class PointsTable(DataTable):
    """Task points; keys ask the view to add, replace, remove, move points or edit a zone."""

    # named on the panel's border, so the footer keeps room for the app's keys (save, export, cautions)
    BINDINGS = [
        Binding("a", "ask('add')", "Add point", show=False),
        Binding("r", "ask('replace')", "Replace", show=False),
        Binding("x,delete", "ask('remove')", "Remove", show=False),
        Binding("shift+up", "ask('up')", "Move up", show=False),
        Binding("shift+down", "ask('down')", "Move down", show=False),
        Binding("z", "ask('zone')", "Zone", show=False),
    ]

    class EditRequested(Message):
        """The pilot asked for ``action`` on the point at ``index``."""

        def __init__(self, action: str, index: int):
            super().__init__()
            self.action, self.index = action, index

    def __init__(self, **kwargs):
        super().__init__(cursor_type="row", zebra_stripes=True, **kwargs)

    # what the table shows, set by the view (``shown_task`` last); each watcher fills the table
    shown_task = var(None, always_update=True, init=False)  # the engine's Task (``task`` is taken: the message loop's)
    units: var[UnitSystem] = var(METRIC, init=False)
    compact = var(False, init=False)  # a narrow screen: no codes and no elevations

    def watch_shown_task(self) -> None:
        self._draw()

    def watch_units(self) -> None:
        self._draw()

    def watch_compact(self) -> None:
        self._draw()

    def _draw(self) -> None:
        task, units, compact = self.shown_task, self.units, self.compact
        if task is None:
            return
        row = self.cursor_row
        self.clear(columns=True)
        columns = [("role", "Point"), ("name", "Turnpoint"), ("zone", "Zone")]
        if not compact:
            columns.append(("elevation", f"Elev {units.height_label}"))
        for key, label in columns:
            self.add_column(label, key=key)
        count = len(task.points)
        for index, point in enumerate(task.points):
            turnpoint = point.turnpoint
            name = turnpoint.name + (f" ({turnpoint.code})" if turnpoint.code and not compact else "")
            cells = [role(index, count), name, zone_text(point.zone, units)]
            if not compact:
                cells.append(Text(display.height(units, turnpoint.elevation_m), justify="right"))
            self.add_row(*cells, key=f"point-{index}")
        if count:
            self.move_cursor(row=min(max(row, 0), count - 1), animate=False)

    def action_ask(self, action: str) -> None:
        self.post_message(self.EditRequested(action, self.cursor_row))
