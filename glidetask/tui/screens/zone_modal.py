"""Change a task point's observation zone: its kind and sizes, in the units on screen."""

from __future__ import annotations

from textual.app import ComposeResult
from textual.containers import Horizontal, Vertical
from textual.screen import ModalScreen
from textual.widgets import Button, Input, Label, Select, Static

from glidetask.tui import display
from glidetask.units import UnitSystem

KIND_NAMES = {
    "line": "line", "cylinder": "cylinder", "sector": "sector", "keyhole": "keyhole",
    "area_cylinder": "area circle", "area_sector": "area sector",
}
# which inputs each kind uses
KIND_INPUTS = {
    "line": ("length",),
    "cylinder": ("radius",),
    "sector": ("radius", "angle"),
    "keyhole": ("radius", "angle", "cylinder"),
    "area_cylinder": ("radius",),
    "area_sector": ("radius", "inner", "radial_from", "radial_to"),
}


def allowed_kinds(task_kind: str, index: int, count: int) -> tuple[str, ...]:
    """The zone kinds this point may have (contract 2.3)."""
    if index in (0, count - 1):
        return ("line", "cylinder")
    return ("area_cylinder", "area_sector") if task_kind == "area" else ("cylinder", "sector", "keyhole")


def build_zone(kind: str, values: dict[str, str], units: UnitSystem):
    """A Zone from the texts typed (distances in ``units``); ValueError with a plain message."""
    from glidetask.engine.zones import Zone

    def number(name: str, label: str) -> float:
        text = values.get(name, "").strip().replace(",", ".")
        try:
            return float(text)
        except ValueError:
            raise ValueError(f"{label}: expected a number, got {text!r}") from None

    def distance(name: str, label: str) -> float:
        return number(name, label) * units.distance_m

    if kind == "line":
        return Zone.line(distance("length", "length"))
    if kind == "cylinder":
        return Zone.cylinder(distance("radius", "radius"))
    if kind == "sector":
        return Zone.sector(distance("radius", "radius"), number("angle", "angle"))
    if kind == "keyhole":
        return Zone.keyhole(distance("radius", "radius"), number("angle", "angle"), distance("cylinder", "cylinder radius"))
    if kind == "area_cylinder":
        return Zone.area_cylinder(distance("radius", "radius"))
    return Zone.area_sector(distance("radius", "radius"), number("radial_from", "first radial"),
                            number("radial_to", "second radial"), distance("inner", "inner radius"))


class ZoneModal(ModalScreen):
    """Kind, sizes, apply or cancel; a refused zone says why and stays open."""

    BINDINGS = [("escape", "cancel", "Cancel")]

    def __init__(self, zone, kinds: tuple[str, ...], units: UnitSystem, title: str):
        super().__init__(classes="zone-modal")
        self.zone, self.kinds, self.units, self.title_text = zone, kinds, units, title

    def compose(self) -> ComposeResult:
        zone, units = self.zone, self.units
        d = units.distance_label

        def dist(metres):
            return display.number(units.distance(metres), 2)

        rows = (("length", f"Line length ({d})", dist(zone.length_m or 10_000.0)),
                ("radius", f"Radius ({d})", dist(zone.radius_m or 500.0)),
                ("angle", "Opening angle (°)", display.number(zone.angle_deg, 1)),
                ("cylinder", f"Cylinder radius ({d})", dist(zone.cylinder_radius_m)),
                ("inner", f"Inner radius ({d})", dist(zone.inner_radius_m)),
                ("radial_from", "First radial (°)", display.number(zone.radial_from_deg, 1)),
                ("radial_to", "Second radial (°), clockwise", display.number(zone.radial_to_deg, 1)))
        start = zone.kind if zone.kind in self.kinds else self.kinds[0]
        with Vertical(classes="zone-panel"):
            yield Label(self.title_text, classes="path-title", markup=False)
            yield Select([(KIND_NAMES[k], k) for k in self.kinds], value=start, allow_blank=False, id="zone-kind")
            for name, label, value in rows:
                with Horizontal(classes="zone-row", id=f"zone-row-{name}"):
                    yield Label(label, classes="zone-label", markup=False)
                    yield Input(value, id=f"zone-{name}", compact=True)
            yield Static("", id="zone-error", markup=False)
            with Horizontal(classes="question-buttons"):
                yield Button("Apply", id="zone-apply", variant="primary")
                yield Button("Cancel", id="zone-cancel")

    def on_mount(self) -> None:
        self._show_rows(self.query_one("#zone-kind", Select).value)

    def _show_rows(self, kind) -> None:
        used = KIND_INPUTS.get(kind, ())
        for row in self.query(".zone-row"):
            row.display = row.id.removeprefix("zone-row-") in used

    def on_select_changed(self, event: Select.Changed) -> None:
        event.stop()
        self._show_rows(event.value)

    def on_input_submitted(self, event: Input.Submitted) -> None:
        event.stop()
        self._apply()

    def on_button_pressed(self, event: Button.Pressed) -> None:
        event.stop()
        if event.button.id == "zone-apply":
            self._apply()
        else:
            self.dismiss(None)

    def _apply(self) -> None:
        kind = self.query_one("#zone-kind", Select).value
        values = {i.id.removeprefix("zone-"): i.value for i in self.query(Input)}
        try:
            zone = build_zone(kind, values, self.units)
        except ValueError as error:
            self.query_one("#zone-error", Static).update(f"✗ {error}")
            return
        self.dismiss(zone)

    def action_cancel(self) -> None:
        self.dismiss(None)
