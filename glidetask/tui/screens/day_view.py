"""The Day view: wind, working band, times, margins, and the lift through the day."""

from __future__ import annotations

from textual.app import ComposeResult
from textual.containers import Vertical, VerticalScroll
from textual.widgets import Static

from glidetask.tui import edits, messages
from glidetask.tui.screens.base import ViewScreen
from glidetask.tui.widgets.circling_figures import CirclingFigures
from glidetask.tui.widgets.day_plot import DayPlot
from glidetask.tui.widgets.form_field import FormField
from glidetask.tui.widgets.profile_editor import ProfileEditor

# (panel id, title, ((field id, unit kind, placeholder), ...)); labels from edits.FIELDS
PANELS = (
    ("day-air", "Air", (
        ("day-wind", "speed", "270/20"),
        ("day-band_top_m", "height", ""),
        ("day-band_bottom_m", "height", ""),
        ("day-start_height_m", "height", "band top"),
        ("day-glide_airmass_ms", "vertical", "0"),
        ("day-isa_deviation_c", "celsius", "0"),
    )),
    ("day-times", "Times", (
        ("day-start_time", "clock", "HH:MM"),
        ("day-lift_ends", "clock", "HH:MM"),
    )),
    ("day-practice", "Thermals and practice", (
        ("day-thermal_radius_m", "height", "from the day"),
        ("day-centring_s", "seconds", "30"),
        ("day-detour_percent", "percent", "5"),
        ("day-stall_margin", "ratio", "1.15"),
    )),
    ("day-margins", "MacCready and margins", (
        ("day-mc_ms", "vertical", "= climb"),
        ("safety-arrival_margin_m", "height", ""),
        ("safety-terrain_clearance_m", "height", ""),
        ("safety-final_glide_mc_ms", "vertical", "= cruise"),
    )),
)


def unit_label(kind: str, units) -> str:
    return {"speed": units.speed_label, "height": units.height_label, "vertical": units.vertical_label,
            "celsius": "°C", "clock": "local", "seconds": "s", "percent": "%", "ratio": "x"}.get(kind, "")


def practice_note(day, units) -> str:
    """Where the thermal radius comes from and that the practical figures are common practice,
    for the panel's foot: every free assumption named with its source."""
    radius = units.fmt_height(day.effective_thermal_radius_m)
    return f"Radius {radius}: {day.thermal_radius_source}. Empty: from the day. The rest: common practice."


class DayView(ViewScreen):
    """Edit the forecast day; the legs and the final glide follow."""

    VIEW = "day"

    def compose_body(self) -> ComposeResult:
        with VerticalScroll(id="day-left"):
            for panel_id, _, fields in PANELS:
                with Vertical(id=panel_id, classes="panel day-panel"):
                    for field_id, kind, placeholder in fields:
                        yield FormField(field_id, edits.FIELDS[field_id].label, unit_label(kind, self.app.units),
                                        placeholder=placeholder)
                    if panel_id == "day-practice":
                        yield Static(id="day-practice-note", classes="dim", markup=False)
                if panel_id == "day-air":  # a day from a sounding: where the air's figures come from
                    yield Static(id="day-sounding", classes="panel day-panel", markup=False)
            yield CirclingFigures(id="day-circling", classes="panel day-panel")
        with Vertical(id="day-right"):
            yield ProfileEditor(id="profile-editor", classes="panel")
            yield DayPlot(id="day-plot", classes="panel")

    def on_mount(self) -> None:
        for panel_id, title, _ in PANELS:
            self.query_one(f"#{panel_id}").border_title = title
        self.query_one("#profile-editor").border_title = "Lift through the day"
        self.query_one("#day-plot").border_title = "The day"
        self.query_one("#day-sounding").border_title = "The day from the sounding"
        # a refused input: the circling card says it is for the last valid one
        self.watch(self.app, "invalid_fields", self._invalid_changed)

    def show_scenario(self, scenario, *, force: bool = False) -> None:
        units = self.app.units
        for _, _, fields in PANELS:
            for field_id, kind, _ in fields:
                self.query_one(f"#{field_id}").parent.show(edits.field_text(scenario, field_id, units),
                                                           unit_label(kind, units), force=force)
        self.query_one("#day-practice-note", Static).update(practice_note(scenario.day, units))
        editor = self.query_one(ProfileEditor)
        editor.units = units
        editor.day = scenario.day
        self._show_sounding(scenario)
        self._show_circling(scenario)
        self._draw_plot()

    def _show_circling(self, scenario) -> None:
        """The best circle in the day's strongest thermals for the glider as loaded."""
        from glidetask.engine.circling_card import day_circling

        widget = self.query_one(CirclingFigures)
        try:
            card = day_circling(scenario)
        except ValueError as error:
            self.post_message(messages.Notice(f"circling: {error}"))
            return
        widget.units, widget.mass_kg = self.app.units, float(scenario.glider.mass_kg)
        widget.card = card

    def _invalid_changed(self, invalid) -> None:
        self.query_one(CirclingFigures).stale = bool(invalid)

    def _show_sounding(self, scenario) -> None:
        """The sounding and the band through the day when the day comes from a sounding
        (``scenario.day_source``), and which keys were typed over it."""
        from glidetask.tui import sounding_text

        panel = self.query_one("#day-sounding", Static)
        air = self.query_one("#day-air")
        source = getattr(scenario, "day_source", None)
        panel.display = source is not None and source.sounding is not None
        if not panel.display:
            air.border_subtitle = ""
            return
        from rich.console import Group
        from rich.text import Text

        from glidetask.engine.sounding import sounding_drawing

        typed = ", ".join(source.overridden)
        air.border_subtitle = f"sounding · typed: {typed}" if typed else "from the sounding"
        drawing = sounding_drawing(source.sounding, source.derived)
        units, width = self.app.units, 40  # the left column's panel: 46 less borders and padding
        panel.update(Group(Text(sounding_text.source_line(source), style="dim"),
                           sounding_text.sounding_text(drawing, units, width, 9),
                           sounding_text.band_text(drawing, units, width, 6)))

    def show_plan(self, outcome) -> None:
        self._draw_plot()

    def show_units(self) -> None:
        if self.app.scenario is not None:
            self.show_scenario(self.app.scenario, force=True)

    def _draw_plot(self) -> None:
        scenario, outcome = self.app.scenario, self.app.plan
        if scenario is None:
            return
        finish_s = None
        if outcome is not None and outcome.plan.finished:
            finish_s = float(outcome.plan.finish_time_s)
        plot = self.query_one(DayPlot)
        plot.units, plot.finish_s = self.app.units, finish_s
        plot.day = scenario.day
