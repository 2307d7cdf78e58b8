"""The task as one line: where a landable is within reach, and the gaps where none is."""

from __future__ import annotations

from rich.text import Text
from textual.reactive import reactive
from textual.widget import Widget


class CoverageStrip(Widget):
    """``████░░░██`` along the task distance: full = a landable in reach, light = a gap."""

    DEFAULT_CSS = "CoverageStrip { height: 2; }"

    # set by the view: the engine's SI Plan (None, no landables or none marked: nothing drawn)
    plan = reactive(None, always_update=True)

    def __init__(self, **kwargs):
        super().__init__(**kwargs)
        self.total_m: float | None = None
        self.gaps: list[tuple[float, float]] = []  # (from_m, to_m) along the task
        self.legs_m: list[float] = []

    def watch_plan(self, plan) -> None:
        """The legs' lengths and the gaps from the plan's own SI figures; drawn in ``render``."""
        coverage = None if plan is None else plan.landables
        if coverage is None or coverage.landable_count == 0:
            self.total_m = None
            return
        self.legs_m = [float(leg.distance_m) for leg in plan.legs]
        self.total_m = sum(self.legs_m)
        self.gaps = [(float(a), float(b)) for a, b in coverage.gaps]

    def render(self) -> Text:
        width = self.content_size.width
        if not self.total_m or width < 4:
            return Text("")
        cells = []
        for column in range(width):
            middle = (column + 0.5) / width * self.total_m
            gap = any(a <= middle <= b for a, b in self.gaps)
            cells.append(("░", "bold #e06c5a") if gap else ("█", "#8cc66d"))
        strip = Text(no_wrap=True)
        for char, style in cells:
            strip.append(char, style)
        marks = [" "] * width
        position = 0.0
        for index, length in enumerate(self.legs_m[:-1], start=1):
            position += length
            column = min(int(position / self.total_m * width), width - 1)
            marks[column] = str(index % 10)
        marks[0], marks[-1] = "S", "F"
        return strip + Text("\n" + "".join(marks), style="dim")
