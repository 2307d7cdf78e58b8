"""The Final glide view (being built)."""

from __future__ import annotations

from glidetask.tui.screens.base import ViewScreen
from glidetask.tui.widgets.needs_engine import NeedsNotice


class GlideView(ViewScreen):
    VIEW = "glide"

    def compose_body(self):
        yield NeedsNotice("Final glide: coming soon")
