"""The answer to a final-glide question: above or below the glide, and the figures."""

from __future__ import annotations

from rich.console import Group
from rich.table import Table
from rich.text import Text
from textual.reactive import var
from textual.widgets import Static

from glidetask.tui import display
from glidetask.units import METRIC, UnitSystem


def verdict_text(margin_m: float, units: UnitSystem) -> Text:
    if margin_m != margin_m:  # NaN
        return Text(" OUT OF REACH against this wind ", style="bold reverse #e06c5a")
    if margin_m >= 0:
        return Text(f" ABOVE final glide by {units.fmt_height(margin_m)} ", style="bold reverse #8cc66d")
    return Text(f" BELOW final glide by {units.fmt_height(-margin_m)} ", style="bold reverse #e06c5a")


class GlideVerdict(Static):
    """Verdict line, then the final-glide figures (contract 5.2 meanings).

    The view sets ``units``, ``plan_note`` and ``problems`` before ``answer``; each
    watcher draws the block again."""

    answer = var(None, always_update=True, init=False)  # a derived.GlideAnswer (None: nothing yet)
    units: var[UnitSystem] = var(METRIC, init=False)
    plan_note = var("", init=False)  # where the plan itself starts its final glide, for comparison
    # what makes the question unusable (Problems), shown above the last answer; () when it makes sense
    problems: var[tuple] = var((), init=False)

    def watch_answer(self) -> None:
        self._draw()

    def watch_units(self) -> None:
        self._draw()

    def watch_plan_note(self) -> None:
        self._draw()

    def watch_problems(self) -> None:
        self._draw()

    def _draw(self) -> None:
        parts = answer_parts(self.answer, self.units, self.plan_note) if self.answer is not None else []
        if not self.problems:
            if parts:
                self.update(Group(*parts))
            return
        # one line per field, above the last answer (marked as the answer to the last valid question)
        text = Text()
        for problem in self.problems:
            text.append(f"✗ {problem.where[:1].upper()}{problem.where[1:]}: {problem.what}\n", style="#e06c5a")
        if parts:
            text.append("the figures below are for the last valid input", style="italic #e0b15a")
            self.update(Group(text, *parts))
        else:
            self.update(text)


def answer_parts(answer, units: UnitSystem, plan_note: str = "") -> list:
    """The verdict and the figures of ``answer``; ``plan_note``: the plan's own final glide."""
    glide = answer.glide
    u = units
    grid = Table.grid(padding=(0, 2))
    grid.add_column(style="dim")
    grid.add_column(justify="right")
    rows = (  # what decides the glide first: on a small screen the rest scrolls
        ("Required height", display.with_unit(display.height(u, glide.required_height_m), f"{u.height_label} MSL")),
        ("Margin", display.with_unit(display.height(u, glide.margin_m), u.height_label)),
        ("MacCready to arrive", display.with_unit(display.vertical(u, glide.mc_to_arrive_ms), u.vertical_label)
         if glide.mc_to_arrive_ms == glide.mc_to_arrive_ms else "not even at 0"),
        ("L/D required", display.ratio(glide.ld_required, 1)),
        ("L/D achievable", display.ratio(glide.ld_achievable, 1)),
        ("Speed to fly (TAS)", display.with_unit(display.speed(u, glide.speed_to_fly_ms), u.speed_label)),
        ("Speed to fly (IAS)", display.with_unit(display.speed(u, answer.speed_to_fly_ias_ms), u.speed_label)),
        ("Ground speed", display.with_unit(display.ground_speed(u, glide.ground_speed_ms), u.speed_label)
         if display.ground_speed(u, glide.ground_speed_ms) != "none" else "none: no headway"),
        ("Heading", display.degrees(glide.heading_deg) + "°"),
        ("Time", display.duration(glide.time_s)),
        ("Polar density at", display.with_unit(display.height(u, answer.altitude_m), u.height_label)),
    )
    for label, value in rows:
        grid.add_row(label, value)
    parts = [verdict_text(float(glide.margin_m), units), grid]
    terrain = answer.terrain
    if terrain is not None:
        parts.append(Text(""))
        style = "bold #8cc66d" if terrain.ok else "bold #e06c5a"
        parts.append(Text(f"Terrain: least clearance {display.with_unit(display.height(u, terrain.min_clearance_m), u.height_label)}"
                          f" at {display.with_unit(display.distance(u, terrain.at_m), u.distance_label)}", style=style))
        if terrain.raised_by_m > 0 and terrain.obstacle is not None:
            near = f" near {terrain.obstacle.near}" if terrain.obstacle.near else ""
            parts.append(Text(f"Terrain raises the required height by {u.fmt_height(terrain.raised_by_m)}"
                              f" (obstacle at {u.fmt_distance(terrain.obstacle.at_m)}{near})", style="#e0b15a"))
        if terrain.covered_share < 1.0:
            parts.append(Text(f"Terrain model covers {terrain.covered_share:.0%} of the glide", style="#e0b15a"))
    elif answer.terrain_note:
        parts.append(Text(""))
        parts.append(Text(answer.terrain_note, style="dim"))
    if plan_note:
        parts.append(Text(""))
        parts.append(Text(f"The plan's own final glide: {plan_note}", style="dim"))
    return parts
