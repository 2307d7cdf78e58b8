"""The Day view (being built)."""

from __future__ import annotations

from glidetask.tui.screens.base import ViewScreen
from glidetask.tui.widgets.needs_engine import NeedsNotice


class DayView(ViewScreen):
    VIEW = "day"

    def compose_body(self):
        yield NeedsNotice("Day: coming soon")
