"""Heights needed to get home at MacCready 0-3 from each turnpoint, with the clock time
there, and the what-if table: the briefing's tables on screen (key h)."""

from __future__ import annotations

from rich.table import Table
from rich.text import Text
from textual import work
from textual.app import ComposeResult
from textual.containers import Vertical, VerticalScroll
from textual.screen import ModalScreen
from textual.widgets import Label, Static

from glidetask.tui import display
from glidetask.units import KNOT

# the settings of the briefing's card: 0-3 m/s, or 0-6 kt by 2 (the same as formats/briefing.py)
CARD_MC_MS = (0.0, 1.0, 2.0, 3.0)
CARD_MC_KT_MS = tuple(k * KNOT for k in (0.0, 2.0, 4.0, 6.0))


def card_settings(units) -> tuple[float, ...]:
    return CARD_MC_MS if units.name == "metric" else CARD_MC_KT_MS


def heights_table(outcome, units) -> Table:
    """Turnpoint, clock time there, distance to go, the plan's height, and at each setting [MSL]."""
    from glidetask.tui.recompute import heights_card

    plan = outcome.plan
    settings = card_settings(units)
    card = heights_card(plan, settings)
    names = [leg.from_name for leg in plan.legs] + [plan.legs[-1].to_name]
    clocks = [leg.start_time_s for leg in plan.legs] + [plan.finish_time_s if plan.finished else float("nan")]
    planned = [leg.required_height_m for leg in plan.legs] + [plan.arrival_floor_m]
    to_go = plan.planned_distance_m - plan.path.cumulative_m
    table = Table(box=None, padding=(0, 1), show_edge=False, header_style="bold")
    table.add_column("Turnpoint", no_wrap=True, max_width=22, overflow="ellipsis")
    for head in ("At", f"To go {units.distance_label}", "Plan",
                 *(f"MC {units.vertical(m):.0f}" for m in settings)):
        table.add_column(head, justify="right", no_wrap=True)
    for i, name in enumerate(names):
        table.add_row(name, display.clock(clocks[i]), display.distance(units, to_go[i]), display.height(units, planned[i]),
                      *(display.height(units, card[j, i]) for j in range(len(settings))))
    return table


class HeightsModal(ModalScreen[None]):
    """The heights-needed card and the what-ifs; esc closes."""

    BINDINGS = [("escape", "close", "Close"), ("h", "close", "Close")]

    def __init__(self, outcome, units):
        super().__init__(id="heights-modal", classes="path-modal")
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
                    f"MC columns: at that MacCready setting ({units.vertical_label}). At: clock time there.",
                    style="dim")
        from rich.console import Group

        self.query_one("#heights-card", Static).update(Group(heights_table(self.outcome, units), note))
        self.query_one("#what-ifs", Static).update(Text("\nWhat if …  computing", style="dim"))
        self.compute_what_ifs()

    @work(thread=True, exclusive=True, group="what-ifs")
    def compute_what_ifs(self) -> None:
        from glidetask.formats.strategy_report import sensitivity_text
        from glidetask.tui.recompute import what_ifs

        try:
            text = sensitivity_text(what_ifs(self.outcome), self.units)
        except Exception as error:  # shown, never a crash
            text = f"What-ifs not computed: {type(error).__name__}: {error}"
        self.app.call_from_thread(self._show_what_ifs, text)

    def _show_what_ifs(self, text: str) -> None:
        self.query_one("#what-ifs", Static).update(Text("\n" + display.in_units(text, self.units)))

    def action_close(self) -> None:
        self.dismiss(None)
