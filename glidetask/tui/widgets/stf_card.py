"""The speed-to-fly card: MacCready setting, speed to fly (true and indicated), average
speed with climbs at the setting, glide ratio (the words of glidetask.tui.glossary)."""

from __future__ import annotations

from textual.reactive import var
from textual.widgets import DataTable

from glidetask.tui import display
from glidetask.units import METRIC, UnitSystem


class SpeedToFlyCard(DataTable):
    """One row per MacCready setting, still air (a ``derived.GliderCard``).

    The view sets ``units`` before ``card``; each watcher fills the table again."""

    card = var(None, always_update=True, init=False)  # a derived.GliderCard
    units: var[UnitSystem] = var(METRIC, init=False)

    def __init__(self, **kwargs):
        super().__init__(cursor_type="row", zebra_stripes=True, header_height=2, **kwargs)

    def watch_card(self) -> None:
        self._draw()

    def watch_units(self) -> None:
        self._draw()

    def _draw(self) -> None:
        card, units = self.card, self.units
        if card is None:
            return
        self.clear(columns=True)
        # two-line headers: the name over its unit, so the card fits its panel at 80 columns
        self.add_column(f"MC\n{units.vertical_label}", key="mc")
        self.add_column(f"STF\n{units.speed_label}", key="speed")
        self.add_column(f"IAS\n{units.speed_label}", key="ias")
        self.add_column(f"Avg\n{units.speed_label}", key="cruise")  # distance / time, climbs at the setting
        self.add_column("L/D\n", key="ld")
        ias = card.speed_to_fly_ias_ms if card.speed_to_fly_ias_ms is not None else [float("nan")] * len(card.mc_ms)
        for mc, speed, ias_ms, cruise, ratio in zip(card.mc_ms, card.speed_to_fly_ms, ias, card.cruise_speed_ms,
                                                    card.glide_ratio):
            self.add_row(display.vertical(units, mc), display.speed(units, speed), display.speed(units, ias_ms),
                         display.speed(units, cruise), display.ratio(ratio), key=f"{mc:.3f}")
