"""What every view shares: the view bar, the status line, the compact caution, the keys.

A view subclasses :class:`ViewScreen`, names itself in ``VIEW`` and yields its own
widgets from :meth:`compose_body`. It reacts to the app's state through
:meth:`show_scenario`, :meth:`show_plan` and :meth:`show_units` (called once at mount
and whenever the app's reactives change) and highlights the fields the app reports as
invalid.

Textual calls the ``on_mount`` and ``on_resize`` of every class along the MRO, the base's
after the subclass's: a view's own handlers do not call ``super()``.
"""

from __future__ import annotations

from textual.app import ComposeResult
from textual.containers import Container
from textual.screen import Screen
from textual.widgets import Footer, Input

from glidetask.tui.widgets.caution_bar import CautionBar
from glidetask.tui.widgets.status_line import StatusLine
from glidetask.tui.widgets.view_bar import ViewBar


VIEW_LOCAL = ("view-", "odds-", "glide-")  # ids of inputs a view checks itself, not the app


class ViewScreen(Screen):
    """A view of the plan; subclasses fill the body."""

    VIEW = "task"
    BINDINGS = [("escape", "leave_field", "Leave field")]

    def compose(self) -> ComposeResult:
        yield ViewBar(self.VIEW, id="view-bar")
        with Container(id="view-body"):
            yield from self.compose_body()
        yield StatusLine(id="status-line")
        yield CautionBar(id="caution-bar")
        yield Footer()

    def compose_body(self) -> ComposeResult:
        yield from ()

    def on_mount(self) -> None:
        self.watch(self.app, "scenario", self._scenario_changed)
        self.watch(self.app, "plan", self._plan_changed)
        self.watch(self.app, "units", self._units_changed, init=False)
        self.watch(self.app, "invalid_fields", self._highlight_fields)

    def on_resize(self, event) -> None:
        # small terminals: panels keep only a title rule, so the figures keep their rows
        self.set_class(event.size.height < 32, "-short")
        self.set_class(event.size.width < 100, "-narrow")

    # A view put aside (another view is shown) catches up when it is shown again: a hidden
    # view never competes with the plan for the processor (the ballast sweep, the simulated
    # days). A view under a dialog is still on screen and keeps up.
    _pending: frozenset[str] = frozenset()

    def _on_screen(self) -> bool:
        return self in self.app.screen_stack

    def _scenario_changed(self, scenario) -> None:
        if scenario is None:
            return
        if self._on_screen():
            self.show_scenario(scenario)
        else:
            self._pending = self._pending | {"scenario"}

    def _plan_changed(self, plan) -> None:
        if self._on_screen():
            self.show_plan(plan)
        else:
            self._pending = self._pending | {"plan"}

    def _units_changed(self, _units) -> None:
        if self._on_screen():
            self.show_units()
        else:
            self._pending = self._pending | {"units"}

    def on_screen_resume(self) -> None:
        # every kind of news is applied: a units switch never hides a newer task or plan
        pending, self._pending = self._pending, frozenset()
        if "scenario" in pending and self.app.scenario is not None:
            self.show_scenario(self.app.scenario)
        if "plan" in pending:
            self.show_plan(self.app.plan)
        if "units" in pending:
            self.show_units()

    def _highlight_fields(self, invalid: frozenset[str]) -> None:
        for widget in self.query(".-invalid"):
            # a view's own inputs (the calculator, the simulation, the figures' height) mark themselves
            if widget.id not in invalid and not (widget.id or "").startswith(VIEW_LOCAL):
                widget.remove_class("-invalid")
        for field_id in invalid:
            for widget in self.query(f"#{field_id}"):
                widget.add_class("-invalid")

    # hooks for the views
    def show_scenario(self, scenario) -> None:
        """The scenario changed (opened or edited)."""

    def show_plan(self, plan) -> None:
        """A new plan arrived (None while the first one is computed)."""

    def show_units(self) -> None:
        """The unit system changed: redraw figures and the inputs' texts."""
        if self.app.scenario is not None:
            self.show_scenario(self.app.scenario)
        self.show_plan(self.app.plan)

    def check_action(self, action: str, parameters) -> bool | None:
        if action == "leave_field":  # the key hint only while a field has the keys
            return isinstance(self.focused, Input)
        return True

    def on_descendant_focus(self, _event) -> None:
        self.refresh_bindings()

    def on_descendant_blur(self, _event) -> None:
        self.refresh_bindings()
        session = getattr(self.app, "session", None)
        if session is not None:
            session.end_step()  # typing in a field again is a new undo step

    def action_leave_field(self) -> None:
        if isinstance(self.focused, Input):
            self.set_focus(None)
