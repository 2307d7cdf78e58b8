"""The task as one line: where a landable is within reach, and the gaps where none is."""

from __future__ import annotations

from rich.text import Text
from textual.widget import Widget



class CoverageStrip(Widget):
    """``████░░░██`` along the task distance: full = a landable in reach, light = a gap."""

    DEFAULT_CSS = "CoverageStrip { height: 2; }"

    def __init__(self, **kwargs):
        super().__init__(**kwargs)
        self.total_m: float | None = None
        self.gaps: list[tuple[float, float]] = []
        self.legs_m: list[float] = []

    def show(self, plan) -> None:
        """From the plan's own SI figures (None, or no landables: nothing to draw)."""
        if plan is None or plan.landables is None:
            self.show_coverage(None, ())
        else:
            self.show_coverage([leg.distance_m for leg in plan.legs], plan.landables.gaps)

    def show_coverage(self, legs_m, gaps) -> None:
        """Legs' lengths [m] (None: nothing to draw) and the gaps as ``(from_m, to_m)`` along the task."""
        if legs_m is None:
            self.total_m = None
        else:
            self.legs_m = [float(length) for length in legs_m]
            self.total_m = sum(self.legs_m)
            self.gaps = [(float(a), float(b)) for a, b in gaps]
        self.refresh()

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
