"""Heights needed to get home at MacCready 0-3 from each turnpoint, with the clock time
there, and the what-if table: the briefing's tables on screen (key h)."""

from __future__ import annotations

import math

from rich.table import Table
from rich.text import Text
from textual import work
from textual.app import ComposeResult
from textual.containers import Vertical, VerticalScroll
from textual.screen import ModalScreen
from textual.widgets import Label, Static

from glidetask import cautions
from glidetask.engine.final_glide_speeds import heights_card_speeds
from glidetask.formats.strategy_report import what_if_words
from glidetask.tui import display
from glidetask.units import KNOT

# the settings of the briefing's card: 0-3 m/s, or 0-6 kt by 2 (the same as formats/briefing.py)
CARD_MC_MS = (0.0, 1.0, 2.0, 3.0)
CARD_MC_KT_MS = tuple(k * KNOT for k in (0.0, 2.0, 4.0, 6.0))


def card_settings(units) -> tuple[float, ...]:
    return CARD_MC_MS if units.name == "metric" else CARD_MC_KT_MS


def heights_table(outcome, units, codes: dict[str, str] | None = None) -> Table:
    """Turnpoint, clock time there, distance to go, the plan's height, and at each setting [MSL]."""
    from glidetask.tui.recompute import heights_card

    plan = outcome.plan
    settings = card_settings(units)
    card = heights_card(plan, settings)
    names = [leg.from_name for leg in plan.legs] + [plan.legs[-1].to_name]
    if codes:  # a narrow screen: the turnpoints' codes, so every column keeps its figures whole
        names = [codes.get(name) or name for name in names]
    clocks = [leg.start_time_s for leg in plan.legs] + [plan.finish_time_s if plan.finished else float("nan")]
    planned = [leg.required_height_m for leg in plan.legs] + [plan.arrival_floor_m]
    to_go = plan.planned_distance_m - plan.path.cumulative_m
    table = Table(box=None, padding=(0, 1), show_edge=False, header_style="bold")
    table.add_column("Turnpoint", no_wrap=True)
    for head in ("At", f"To go {units.distance_label}", "Plan",
                 *(f"MC {units.vertical(m):.0f}" for m in settings)):
        table.add_column(head, justify="right", no_wrap=True)
    top = plan.scenario.day.band_top_m

    def need(value) -> str:  # as the briefing reads it: a figure within the band, else "above"
        return cautions.need_text(value, top, units) or "above"

    for i, name in enumerate(names):
        table.add_row(name, display.clock(clocks[i]), display.distance(units, to_go[i]), need(planned[i]),
                      *(need(card[j, i]) for j in range(len(settings))))
    table.add_row(*speeds_row(plan, settings, units))
    return table


def speeds_row(plan, settings, units) -> list[str]:
    """The speed to fly on the last leg as indicated: the plan's own final glide, then each
    setting from the band top (the briefing's last row, ``glidetask.engine.final_glide_speeds``)."""
    speeds = heights_card_speeds(plan, settings)
    return [f"Fly ({units.speed_label} IAS)", "", "",
            *(f"{units.speed(v):.0f}" if math.isfinite(v) else display.DASH for v in speeds)]


def what_if_table(sensitivity, units) -> Table:
    """What if, what changes, the task time and its change from the forecast (the CLI's
    table); the change column wraps at words on a narrow screen."""
    table = Table(box=None, padding=(0, 1), show_edge=False, header_style="bold")
    table.add_column("what if", no_wrap=True)
    table.add_column("change", overflow="fold", ratio=1)
    table.add_column("task time", justify="right", no_wrap=True)
    table.add_column("vs forecast", justify="right", no_wrap=True)
    for row in sensitivity.rows:
        if row.finished:
            time = display.duration(row.total_time_s)
            delta = "" if row.key == "forecast" else f"{row.delta_s / 60:+.0f} min"
        elif row.total_time_s == row.total_time_s:
            time, delta = "lands out", f"at {units.fmt_distance(row.landout_m)}"
        else:
            time, delta = display.DASH, "cannot start"
        table.add_row(*what_if_words(row, units), time, delta)
    for note in cautions.notes_text(sensitivity.notes, units):
        table.add_row(Text(note, style="dim"), "", "", "")
    return table


class HeightsModal(ModalScreen[None]):
    """The heights-needed card and the what-ifs; esc closes."""

    BINDINGS = [("escape", "close", "Close"), ("h", "close", "Close")]

    def __init__(self, outcome, units):
        super().__init__(id="heights-modal", classes="path-modal")
        # the panel: as wide as the screen allows (the tables need the room)
        self.outcome, self.units = outcome, units

    def compose(self) -> ComposeResult:
        with Vertical(classes="path-panel", id="heights-panel"):
            yield Label(f"Heights needed to get home · {self.outcome.scenario.task.name}", classes="path-title",
                        markup=False)
            with VerticalScroll(id="heights-scroll"):
                yield Static(id="heights-card")
                yield Static(id="what-ifs")
            yield Static("esc: close · ↑↓: scroll", classes="path-hint", markup=False)

    def on_mount(self) -> None:
        units = self.units
        margin = units.fmt_height(self.outcome.scenario.safety.arrival_margin_m)
        note = Text(f"Final glide from each turnpoint over the rest of the task in the day's wind, arriving {margin} "
                    f"over the finish; {units.height_label} MSL. Plan: at the plan's final-glide setting there; "
                    f"MC columns: at that MacCready setting ({units.vertical_label}). At: clock time there. Fly: the "
                    f"speed to fly on the last leg, Plan as the plan's final glide flies it, the MC columns from "
                    f"the band top.",
                    style="dim")
        from rich.console import Group

        scenario = self.outcome.scenario
        codes = {t.name: t.code for t in scenario.turnpoints if t.code} if self.app.size.width < 100 else None
        self.query_one("#heights-card", Static).update(Group(heights_table(self.outcome, units, codes), note))
        self.query_one("#what-ifs", Static).update(Text("\nWhat if …  computing", style="dim"))
        self.compute_what_ifs()

    @work(thread=True, exclusive=True, group="what-ifs")
    def compute_what_ifs(self) -> None:
        from glidetask.tui.recompute import what_ifs

        try:
            result = what_ifs(self.outcome)
        except Exception as error:  # shown, never a crash
            self.app.call_from_thread(self._show_what_ifs, Text(f"What-ifs not computed: {type(error).__name__}: {error}"))
            return
        self.app.call_from_thread(self._show_what_ifs, what_if_table(result, self.units))

    def _show_what_ifs(self, table) -> None:
        from rich.console import Group

        self.query_one("#what-ifs", Static).update(Group(Text("\nHow the task time answers to the day", style="bold"),
                                                         table))

    def action_close(self) -> None:
        self.dismiss(None)
