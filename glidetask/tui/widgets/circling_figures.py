"""How the glider circles in the day's best thermals (``engine.circling_card``): the core
on the thermal's axis, the bank and the airspeed, the circle, the air's rise on it (what a
netto variometer reads in the turn), the glider's sink in the turn and the climb.

The words are those of ``glidetask plan`` (``commands.plan.circling_lines``) and the
briefing; the figures are rounded by :mod:`glidetask.units` as the CLI rounds them.
"""

from __future__ import annotations

from rich.console import Group
from rich.table import Table
from rich.text import Text
from textual.reactive import var
from textual.widgets import Static

from glidetask.units import METRIC, UnitSystem, format_clock

ALARM = "italic #e0b15a"


def circling_title(card) -> str:
    """The panel's title: when the day's lift peaks (the CLI's "circling at 15:30")."""
    return "Circling" if card is None else f"Circling at {format_clock(card.time_s)}"


def circling_rows(card, units: UnitSystem) -> list[tuple[str, str]]:
    """(words, figure) rows of the card, in the CLI's order and words."""
    best = card.solution
    return [
        ("core on the thermal's axis", units.fmt_vertical(card.strength_ms)),
        ("bank", f"{best.bank_deg:.0f} deg"),
        ("airspeed", f"{units.fmt_speed(card.indicated_airspeed_ms)} IAS"),
        ("circle radius", units.fmt_height(best.turn_radius_m)),
        ("the netto reading", units.fmt_vertical(best.updraft_ms)),  # the air rising on the circle
        ("the glider sinks", units.fmt_vertical(best.sink_ms)),
        ("climb", units.fmt_vertical(best.climb_ms)),
    ]


def circling_note(card, units: UnitSystem, mass_kg: float) -> str:
    """What the figures are for: the thermal's size, the height, the mass."""
    return (f"in the day's strongest thermals, {units.fmt_height(card.thermal_radius_m)} in radius; "
            f"at {units.fmt_height(card.height_m)} (mid band), {mass_kg:.0f} kg")


class CirclingFigures(Static):
    """The circling card of the glider as loaded on the day shown.

    The view sets ``units``, ``mass_kg`` and ``stale`` before ``card`` (None: a day with no
    lift); each watcher draws the card again."""

    DEFAULT_CSS = """
    CirclingFigures { height: auto; }
    """

    card = var(None, always_update=True, init=False)  # an engine.circling_card.CirclingCard
    units: var[UnitSystem] = var(METRIC, init=False)
    mass_kg = var(float("nan"), init=False)  # the flying mass the card is for [kg]
    stale = var(False, init=False)  # an input on screen is refused: the card is for the last valid one

    def watch_card(self) -> None:
        self._draw()

    def watch_units(self) -> None:
        self._draw()

    def watch_mass_kg(self) -> None:
        self._draw()

    def watch_stale(self) -> None:
        self._draw()

    def _draw(self) -> None:
        card, units = self.card, self.units
        self.border_title = circling_title(card)
        if card is None:
            self.update(Text("no lift in the day: nothing to circle in", style="dim"))
            return
        table = Table.grid(padding=(0, 1), expand=True)
        table.add_column(style="dim", ratio=1, overflow="fold")
        table.add_column(justify="right", no_wrap=True)
        for words, figure in circling_rows(card, units):
            table.add_row(words, Text(figure, style="bold") if words == "climb" else figure)
        parts = [table, Text(circling_note(card, units, self.mass_kg), style="dim")]
        if self.stale:
            parts.insert(0, Text("the figures below are for the last valid input", style=ALARM))
        self.update(Group(*parts))
