"""The Safety view (being built)."""

from __future__ import annotations

from glidetask.tui.screens.base import ViewScreen
from glidetask.tui.widgets.needs_engine import NeedsNotice


class SafetyView(ViewScreen):
    VIEW = "safety"

    def compose_body(self):
        yield NeedsNotice("Safety: coming soon")
