"""The Glider view (being built)."""

from __future__ import annotations

from glidetask.tui.screens.base import ViewScreen
from glidetask.tui.widgets.needs_engine import NeedsNotice


class GliderView(ViewScreen):
    VIEW = "glider"

    def compose_body(self):
        yield NeedsNotice("Glider: coming soon")
