"""The Odds view: the Monte-Carlo simulation of the day (engine/simulate.py).

Until that engine module exists this view says what it needs; the view is its own
file so that it can be filled in without touching the rest of the UI.
"""

from __future__ import annotations

import importlib.util

from glidetask.tui.screens.base import ViewScreen
from glidetask.tui.widgets.needs_engine import NeedsNotice


def engine_ready() -> bool:
    return importlib.util.find_spec("glidetask.engine.simulate") is not None


class OddsView(ViewScreen):
    VIEW = "odds"

    def compose_body(self):
        if engine_ready():
            yield NeedsNotice("Odds: glidetask.engine.simulate is installed; this view is waiting "
                              "to be connected to it.", id="odds-needs")
        else:
            yield NeedsNotice("Odds needs the Monte-Carlo simulation of the day (engine/simulate.py), which is not part of this build yet. "
                              "The other views work without it.", id="odds-needs")
