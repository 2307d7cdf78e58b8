"""A small canvas of Unicode braille dots (2 x 4 per character cell) for line drawings.

Each stroke is drawn on a named layer; when the canvas is turned into text, each cell
takes the style of the most important layer that has a dot in it, so the planned path
stays visible over zone outlines. Plain Python on purpose: it is small and fast enough
for a few thousand segments.
"""

from __future__ import annotations

from rich.text import Text

_DOT_BITS = ((0x01, 0x08), (0x02, 0x10), (0x04, 0x20), (0x40, 0x80))  # [row][column] within a cell


class BrailleCanvas:
    """``width`` x ``height`` character cells; dot coordinates run x right, y down."""

    def __init__(self, width: int, height: int):
        self.width, self.height = max(1, width), max(1, height)
        self.dot_width, self.dot_height = 2 * self.width, 4 * self.height
        self._bits: dict[str, list[int]] = {}
        self._labels: list[tuple[int, int, str, str]] = []

    def _layer(self, layer: str) -> list[int]:
        if layer not in self._bits:
            self._bits[layer] = [0] * (self.width * self.height)
        return self._bits[layer]

    def dot(self, x: int, y: int, layer: str) -> None:
        if 0 <= x < self.dot_width and 0 <= y < self.dot_height:
            cell = (y // 4) * self.width + (x // 2)
            self._layer(layer)[cell] |= _DOT_BITS[y % 4][x % 2]

    def line(self, x0: float, y0: float, x1: float, y1: float, layer: str) -> None:
        """A straight stroke between two dot positions (Bresenham), clipped to the canvas."""
        x0, y0, x1, y1 = int(round(x0)), int(round(y0)), int(round(x1)), int(round(y1))
        big = 4 * (self.dot_width + self.dot_height)
        if max(abs(x0), abs(y0), abs(x1), abs(y1)) > big:  # far off-canvas: skip, never loop forever
            return
        dx, dy = abs(x1 - x0), -abs(y1 - y0)
        sx, sy = (1 if x0 < x1 else -1), (1 if y0 < y1 else -1)
        error = dx + dy
        while True:
            self.dot(x0, y0, layer)
            if x0 == x1 and y0 == y1:
                return
            twice = 2 * error
            if twice >= dy:
                error += dy
                x0 += sx
            if twice <= dx:
                error += dx
                y0 += sy

    def polyline(self, xs, ys, layer: str) -> None:
        for i in range(len(xs) - 1):
            self.line(xs[i], ys[i], xs[i + 1], ys[i + 1], layer)

    def label(self, x: float, y: float, text: str, style: str) -> None:
        """Text starting at the cell holding dot ``(x, y)`` (kept inside the canvas)."""
        column = min(max(int(x) // 2, 0), max(self.width - len(text), 0))
        row = min(max(int(y) // 4, 0), self.height - 1)
        self._labels.append((row, column, text[: self.width], style))

    def render(self, styles: dict[str, str], order: list[str]) -> Text:
        """Rich text of the canvas; ``order`` lists layers from least to most important."""
        cells: list[tuple[str, str]] = [(" ", "")] * (self.width * self.height)
        merged = [0] * (self.width * self.height)
        owner = [""] * (self.width * self.height)
        for layer in order:
            bits = self._bits.get(layer)
            if bits is None:
                continue
            for index, value in enumerate(bits):
                if value:
                    merged[index] |= value
                    owner[index] = layer
        cells = [(chr(0x2800 + value), styles.get(owner[i], "")) if value else (" ", "")
                 for i, value in enumerate(merged)]
        for row, column, text, style in self._labels:
            for offset, char in enumerate(text):
                if column + offset < self.width:
                    cells[row * self.width + column + offset] = (char, style)
        out = Text(no_wrap=True, overflow="crop")
        for row in range(self.height):
            for column in range(self.width):
                char, style = cells[row * self.width + column]
                out.append(char, style or None)
            if row < self.height - 1:
                out.append("\n")
        return out
