"""The Odds view (being built)."""

from __future__ import annotations

from glidetask.tui.screens.base import ViewScreen
from glidetask.tui.widgets.needs_engine import NeedsNotice


class OddsView(ViewScreen):
    VIEW = "odds"

    def compose_body(self):
        yield NeedsNotice("Odds: coming soon")
