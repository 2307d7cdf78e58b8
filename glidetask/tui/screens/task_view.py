"""The Task view (being built)."""

from __future__ import annotations

from glidetask.tui.screens.base import ViewScreen
from glidetask.tui.widgets.needs_engine import NeedsNotice


class TaskView(ViewScreen):
    VIEW = "task"

    def compose_body(self):
        yield NeedsNotice("Task: coming soon")
