"""The planned height of the whole flight as a drawing that fills its panel
(:mod:`glidetask.tui.profile_drawing`), drawn again when the panel changes size, and what
the drawing shows in words."""

from __future__ import annotations

from rich.text import Text
from textual.reactive import var
from textual.widgets import Static

from glidetask.tui.profile_drawing import profile_facts, profile_text
from glidetask.units import METRIC, UnitSystem

WARN, CALM = "#e0b15a", "dim"


class FlightProfile(Static):
    """Height against distance along the task: terrain, band, climbs and glides, floors, airspace.

    The view sets ``units`` and ``codes`` before ``plan``; each watcher draws again."""

    plan = var(None, always_update=True, init=False)  # the engine's SI Plan (None: being computed)
    units: var[UnitSystem] = var(METRIC, init=False)
    codes: var[dict] = var(dict, init=False)  # turnpoint names -> short codes on the distance axis

    def __init__(self, **kwargs):
        super().__init__("", **kwargs)
        self._told = False  # nothing is drawn before the view has set the plan once

    def watch_plan(self) -> None:
        self._told = True
        self._draw()

    def watch_units(self) -> None:
        self._draw()

    def watch_codes(self) -> None:
        self._draw()

    def on_resize(self, _event) -> None:
        self._draw()

    def _draw(self) -> None:
        if not self._told:
            return
        plan, units, codes = self.plan, self.units, self.codes
        width, height = self.content_region.width, self.content_region.height
        if width < 20 or height < 6:
            return
        self.update(profile_text(plan, units, width, height, codes))


class ProfileFacts(Static):
    """What the drawing shows, one line each: the cautions marked ⚠, the calm facts dim.

    The view sets ``units`` before ``plan``; each watcher draws again."""

    plan = var(None, always_update=True, init=False)  # the engine's SI Plan (None: being computed)
    units: var[UnitSystem] = var(METRIC, init=False)

    def watch_plan(self) -> None:
        self._draw()

    def watch_units(self) -> None:
        self._draw()

    def _draw(self) -> None:
        if self.plan is None:
            self.update(Text("planning …", style=CALM))
            return
        text = Text()
        for index, line in enumerate(profile_facts(self.plan, self.units)):
            calm = line.startswith(("Least clearance", "No terrain"))
            text.append(("" if index == 0 else "\n") + ("" if calm else "⚠ ") + line, style=CALM if calm else WARN)
        self.update(text)
