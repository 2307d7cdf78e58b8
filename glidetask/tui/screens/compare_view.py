"""The Compare view (being built)."""

from __future__ import annotations

from glidetask.tui.screens.base import ViewScreen
from glidetask.tui.widgets.needs_engine import NeedsNotice


class CompareView(ViewScreen):
    VIEW = "compare"

    def compose_body(self):
        yield NeedsNotice("Compare: coming soon")
