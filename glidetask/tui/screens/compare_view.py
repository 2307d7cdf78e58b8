"""The Compare view: ballast against thermal strength (engine/compare.py).

Until that engine module exists this view says what it needs; the view is its own
file so that it can be filled in without touching the rest of the UI.
"""

from __future__ import annotations

import importlib.util

from glidetask.tui.screens.base import ViewScreen
from glidetask.tui.widgets.needs_engine import NeedsNotice


def engine_ready() -> bool:
    return importlib.util.find_spec("glidetask.engine.compare") is not None


class CompareView(ViewScreen):
    VIEW = "compare"

    def compose_body(self):
        if engine_ready():
            yield NeedsNotice("Compare: glidetask.engine.compare is installed; this view is waiting "
                              "to be connected to it.", id="compare-needs")
        else:
            yield NeedsNotice("Compare needs ballast against thermal strength (engine/compare.py), which is not part of this build yet. "
                              "The other views work without it.", id="compare-needs")
