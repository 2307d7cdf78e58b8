"""The Glider view: loading, derived figures, the polar drawn, the speed-to-fly card."""

from __future__ import annotations

from textual import on
from textual.app import ComposeResult
from textual.containers import Vertical, VerticalScroll
from textual.widgets import Static

from glidetask.tui import derived, display, edits, messages
from glidetask.tui.screens.base import ViewScreen
from glidetask.tui.widgets.form_field import FormField
from glidetask.tui.widgets.glider_figures import GliderFigures
from glidetask.tui.widgets.polar_plot import PolarPlot
from glidetask.tui.widgets.stf_card import SpeedToFlyCard

LOADING_FIELDS = tuple((field_id, edits.FIELDS[field_id].label, unit) for field_id, unit in
                       (("glider-pilot_kg", "kg"), ("glider-ballast_kg", "kg"), ("glider-bugs_percent", "%")))
ALTITUDE_FIELD = "view-altitude"


class GliderView(ViewScreen):
    """Change the loading and see the polar, the figures and the card follow."""

    VIEW = "glider"

    def __init__(self):
        super().__init__()
        self.altitude_m: float | None = None  # None: the middle of the working band

    def compose_body(self) -> ComposeResult:
        with VerticalScroll(id="glider-left"):
            with Vertical(id="glider-loading", classes="panel"):
                yield Static(id="glider-label", markup=False)  # the polar's own name, wrapped (never cut)
                for field_id, label, unit in LOADING_FIELDS:
                    yield FormField(field_id, label, unit)
                yield FormField(ALTITUDE_FIELD, "Figures at height", "m", placeholder="mid band",
                                tooltip="Empty: the middle of the working band, where the plan takes its density")
            yield GliderFigures(id="glider-figures", classes="panel")
        with Vertical(id="glider-right"):
            yield PolarPlot(id="polar-plot", classes="panel")
            yield SpeedToFlyCard(id="stf-card", classes="panel")

    def on_mount(self) -> None:
        self.query_one("#glider-loading").border_title = "Loading"
        self.query_one("#glider-figures").border_title = "Figures"
        self.query_one("#polar-plot").border_title = "Polar: reference and this flight"
        self.query_one("#stf-card").border_title = "Speed to fly, still air"

    def show_scenario(self, scenario, *, force: bool = False) -> None:
        units = self.app.units
        for field_id, _, _ in LOADING_FIELDS:
            self.query_one(f"#{field_id}").parent.show(edits.field_text(scenario, field_id, units), force=force)
        spec = scenario.glider.spec
        self.query_one("#glider-label", Static).update(spec.label)
        self.query_one("#glider-loading").border_subtitle = f"ballast up to {spec.max_ballast_kg:g} kg"
        altitude_text = "" if self.altitude_m is None else display.number(units.height(self.altitude_m), 0)
        self.query_one(f"#{ALTITUDE_FIELD}").parent.show(altitude_text, units.height_label, force=force)
        self._draw(scenario)

    def show_units(self) -> None:
        if self.app.scenario is not None:
            self.show_scenario(self.app.scenario, force=True)

    def _draw(self, scenario) -> None:
        units = self.app.units
        altitude = derived.mid_band_m(scenario) if self.altitude_m is None else self.altitude_m
        try:
            card = derived.glider_card(scenario.glider, altitude, scenario.day.isa_deviation_c, units)
        except ValueError as error:
            self.post_message(messages.Notice(f"glider: {error}"))
            return
        for widget in (self.query_one(GliderFigures), self.query_one(PolarPlot), self.query_one(SpeedToFlyCard)):
            widget.units = units
            widget.card = card

    @on(messages.FieldEdited)
    def _altitude_typed(self, message: messages.FieldEdited) -> None:
        if message.field_id != ALTITUDE_FIELD:
            return  # loading fields go up to the app
        message.stop()
        field = self.query_one(f"#{ALTITUDE_FIELD}")
        text = message.text.strip()
        try:
            value = None if not text else float(text) * self.app.units.height_m
            if value is not None and not 0.0 <= value <= 9000.0:
                raise ValueError
        except ValueError:
            field.add_class("-invalid")
            self.post_message(messages.Notice(f"height for the figures: expected 0-{self.app.units.height(9000):.0f} {self.app.units.height_label}"))
            return
        field.remove_class("-invalid")
        self.altitude_m = value
        if self.app.scenario is not None:
            self._draw(self.app.scenario)
