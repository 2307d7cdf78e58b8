"""A sketch of the task: zones, the planned path, landables, drawn in braille dots."""

from __future__ import annotations

import math

from rich.text import Text
from textual.reactive import reactive
from textual.widget import Widget

from glidetask.tui.braille import BrailleCanvas
from glidetask.units import UnitSystem

LAYER_STYLES = {
    "airspace-near": "#5d5470",
    "airspace-crossed": "#b48ee0",
    "airspace-conflict": "bold #e06c9a",
    "landable": "#8cc66d",
    "zone": "#7f8ea3",
    "path": "bold #7a9cc6",
    "final": "bold #e0b15a",
}
LAYER_ORDER = ["airspace-near", "airspace-crossed", "airspace-conflict", "landable", "zone", "path", "final"]


def _nice_step(length: float) -> float:
    """A round scale-bar length (1, 2 or 5 times a power of ten) not above ``length``."""
    if length <= 0:
        return 0.0
    power = 10 ** math.floor(math.log10(length))
    return max(step * power for step in (1, 2, 5) if step * power <= length)


def scale_bar(units: UnitSystem, longest_m: float) -> tuple[float, str]:
    """A scale bar of a round length in the units on screen (``50 km``, ``20 NM``), not
    longer than ``longest_m``: its length [m] and its label."""
    step = _nice_step(units.distance(longest_m))
    return step * units.distance_m, f"{step:g} {units.distance_label}"


MIN_WIDTH_WITH_LANDABLES, MIN_HEIGHT_WITH_LANDABLES = 30, 10


class TaskSketch(Widget):
    """Draws a :class:`~glidetask.tui.sketch_geometry.Sketch` to fit the widget, north up."""

    DEFAULT_CSS = "TaskSketch { width: 1fr; height: 1fr; }"

    # set by the view; either repaints the widget (drawn in ``render``, to the size it has then)
    sketch = reactive(None, always_update=True)  # a Sketch, None: nothing drawn
    units: reactive[UnitSystem | None] = reactive(None)  # of the scale bar

    def render(self) -> Text:
        width, height = self.content_size.width, self.content_size.height
        if self.sketch is None or width < 8 or height < 4:
            return Text("")
        canvas = BrailleCanvas(width, height)
        xmin, xmax, ymin, ymax = self.sketch.extent()
        span_x, span_y = max(xmax - xmin, 1.0), max(ymax - ymin, 1.0)
        # square dots: one scale for both axes, a small margin all round
        scale = max(span_x / (canvas.dot_width - 4), span_y / (canvas.dot_height - 6))
        x_off = (canvas.dot_width - span_x / scale) / 2.0
        y_off = (canvas.dot_height - span_y / scale) / 2.0

        def to_dots(x, y):
            return x_off + (x - xmin) / scale, y_off + (ymax - y) / scale

        # a small sketch shows the task only: a field every few cells would drown the legs
        landables = self.sketch.landables if width >= MIN_WIDTH_WITH_LANDABLES and height >= MIN_HEIGHT_WITH_LANDABLES else ()
        for x, y in landables:
            dx, dy = to_dots(x, y)
            for ox, oy in ((0, 0), (1, 0), (0, 1), (1, 1)):
                canvas.dot(int(dx) + ox, int(dy) + oy, "landable")
        for xs, ys, kind in self.sketch.airspace:  # outside the task's frame: clipped at the edge
            dots = [to_dots(x, y) for x, y in zip(xs, ys)]
            canvas.polyline([d[0] for d in dots], [d[1] for d in dots], f"airspace-{kind}")
        for xs, ys in self.sketch.zones:
            dots = [to_dots(x, y) for x, y in zip(xs, ys)]
            canvas.polyline([d[0] for d in dots], [d[1] for d in dots], "zone")
        if self.sketch.path is not None:
            dots = [to_dots(x, y) for x, y in zip(*self.sketch.path)]
            canvas.polyline([d[0] for d in dots], [d[1] for d in dots], "path")
        if self.sketch.final_glide is not None:
            fx, fy = to_dots(*self.sketch.final_glide)
            canvas.label(fx, fy, "◆", LAYER_STYLES["final"])
        for x, y, label in self.sketch.points:
            dx, dy = to_dots(x, y)
            canvas.label(dx, dy, label, "bold reverse #5fb3a1")
        canvas.label(0, 0, "N↑", "bold")
        if self.units is not None:
            bar_m, bar_text = scale_bar(self.units, scale * canvas.dot_width / 2.0)
            cells = max(1, int(round(bar_m / scale / 2)))
            text = f"├{'─' * max(cells - 2, 0)}┤ {bar_text}"
            canvas.label(0, canvas.dot_height - 1, text, "dim")
        return canvas.render(LAYER_STYLES, LAYER_ORDER)
