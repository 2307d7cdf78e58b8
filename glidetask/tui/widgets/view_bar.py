"""The bar at the top: the views with their keys, the task's name, unsaved mark and units."""

from __future__ import annotations

from textual.app import ComposeResult
from textual.containers import Horizontal
from textual.widgets import Label

from glidetask.tui import messages


NARROW = 100  # columns below which the bar drops the task's name and the tabs' padding
TINY = 76  # columns below which the other views show only their keys (the eight names need 75)


class ViewTab(Label):
    """One view's name with its key; a click shows the view."""

    def __init__(self, view: str, text: str, active: bool):
        super().__init__(f" {text} ", classes="view-tab -active" if active else "view-tab", markup=False)
        self.view, self.text, self.active = view, text, active

    def fit(self, narrow: bool, tiny: bool = False) -> None:
        # narrow: eight views fit 80 columns with "Final glide" as "Final"; tiny: the other
        # views by their keys alone (whole names or none, never a name cut short)
        text = self.text.replace("Final glide", "Final") if narrow else self.text
        if tiny and not self.active:
            text = text.split()[0]
        self.update(f"{text} " if narrow else f" {self.text} ")

    def on_click(self) -> None:
        self.post_message(messages.ViewRequested(self.view))


class ViewBar(Horizontal):
    """Views, task name, unsaved mark, units and whether a plan is being computed."""

    def __init__(self, active_view: str, **kwargs):
        super().__init__(**kwargs)
        self.active_view = active_view

    def compose(self) -> ComposeResult:
        from glidetask.tui.views import VIEWS

        for index, (name, (_, _, title)) in enumerate(VIEWS.items(), start=1):
            yield ViewTab(name, f"{index} {title}", name == self.active_view)
        yield Label("", id="view-bar-task", markup=False)  # the task's name gives way first
        yield Label("", id="view-bar-state", markup=False)  # unsaved, planning, units: always shown

    def on_mount(self) -> None:
        for name in ("scenario", "dirty", "units", "busy", "task_path"):
            self.watch(self.app, name, self._refresh_label, init=False)
        self._refresh_label()

    def on_resize(self, event) -> None:
        narrow = event.size.width < NARROW
        for tab in self.query(ViewTab):
            tab.fit(narrow, event.size.width < TINY)
        self._refresh_label()

    def _refresh_label(self, _value=None) -> None:
        """Task name (wide screens only), unsaved mark ●, planning mark ⟳, units."""
        app = self.app
        scenario = getattr(app, "scenario", None)
        name = scenario.task.name if scenario is not None else "no task"
        narrow = bool(self.size.width and self.size.width < NARROW)
        # narrow: the Task view's points panel names the task, and the eight tabs need the width
        self.query_one("#view-bar-task", Label).display = not narrow
        if narrow:
            name = ""
        mark = " ●" if getattr(app, "dirty", False) else ""
        busy = " ⟳" if getattr(app, "busy", False) else ""
        self.query_one("#view-bar-task", Label).update(name)
        self.query_one("#view-bar-state", Label).update(f"{mark}{busy}  {app.units.name} ")
