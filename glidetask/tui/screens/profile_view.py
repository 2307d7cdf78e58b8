"""The Profile view: the planned height of the whole flight over the ground and under the
airspace, from the plan's own results (``Plan.profile``, ``floors``, ``airspace``,
``landout``), with what it shows in words below, in the units on screen."""

from __future__ import annotations

from textual.app import ComposeResult

from glidetask.tui.screens.base import ViewScreen
from glidetask.tui.widgets.flight_profile import FlightProfile, ProfileFacts


class ProfileView(ViewScreen):
    """Height against distance along the task."""

    VIEW = "profile"

    def compose_body(self) -> ComposeResult:
        yield FlightProfile(id="flight-profile", classes="panel")
        yield ProfileFacts(id="profile-facts", classes="panel", markup=False)

    def on_mount(self) -> None:
        self.query_one("#flight-profile").border_title = "Planned height along the task"
        self.query_one("#profile-facts").border_title = "What the drawing shows"

    def show_plan(self, outcome) -> None:
        plan = outcome.plan if outcome is not None else None
        units = self.app.units
        scenario = self.app.scenario
        codes = {t.name: t.code for t in scenario.turnpoints if t.code} if scenario is not None else {}
        drawing = self.query_one(FlightProfile)
        drawing.units, drawing.codes = units, codes
        drawing.plan = plan
        facts = self.query_one(ProfileFacts)
        facts.units = units
        facts.plan = plan
