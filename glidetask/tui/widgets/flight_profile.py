"""The planned height of the whole flight as a drawing that fills its panel
(:mod:`glidetask.tui.profile_drawing`), drawn again when the panel changes size."""

from __future__ import annotations

from textual.widgets import Static

from glidetask.tui.profile_drawing import profile_text


class FlightProfile(Static):
    """Height against distance along the task: terrain, band, climbs and glides, floors, airspace."""

    def __init__(self, **kwargs):
        super().__init__("", **kwargs)
        self._what = None  # (plan, units, codes)

    def show(self, plan, units, codes: dict[str, str] | None = None) -> None:
        self._what = (plan, units, codes or {})
        self._draw()

    def on_resize(self, _event) -> None:
        self._draw()

    def _draw(self) -> None:
        if self._what is None:
            return
        plan, units, codes = self._what
        width, height = self.content_region.width, self.content_region.height
        if width < 20 or height < 6:
            return
        self.update(profile_text(plan, units, width, height, codes))
