"""A data table that draws its lines again once its column widths have settled.

Textual 8's DataTable widens its columns for new rows when idle, without invalidating lines
it already drew: a line drawn in between keeps the old widths (a header seen under load; the
Safety view's "Why" cut to "no" after a wide screen turned narrow). Once the widths are
settled, every line is drawn afresh.
"""

from __future__ import annotations

from textual.widgets import DataTable


class SettledTable(DataTable):
    """A DataTable whose lines are redrawn when its column widths settle."""

    def on_idle(self) -> None:
        if self._require_update_dimensions:
            self.call_later(self._redraw_with_settled_widths)

    def _redraw_with_settled_widths(self) -> None:
        self._clear_caches()
        self.refresh()
