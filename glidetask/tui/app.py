"""The glidetask terminal UI: the app, its bindings and the factory the console script
and the tests share.

The app holds the session (the scenario under edit, what is unsaved, what the pilot
typed that does not make sense yet) and mirrors it into reactives the views watch. Views
post :mod:`glidetask.tui.messages` up; the app applies them and plans again in a worker
thread, keeping the last good plan when an input is refused.
"""

from __future__ import annotations

import importlib
from pathlib import Path

from textual import on, work
from textual.app import App, SystemCommand
from textual.binding import Binding
from textual.reactive import var
from textual.worker import get_current_worker

from glidetask import units as unit_systems
from glidetask.errors import InputError, Problem
from glidetask.tui import messages
from glidetask.tui.session import EditSession
from glidetask.tui.theme import GLIDETASK_THEME

from glidetask.tui.views import VIEWS  # the views, named once for the app and the view bar


def _view_factory(name: str):
    module_name, class_name, _ = VIEWS[name]

    def build():  # imported on first visit: the first screen only pays for its own view
        module = importlib.import_module(f"glidetask.tui.screens.{module_name}")
        screen = getattr(module, class_name)()
        # Textual styles each widget as it mounts, and reads any new widget's styles then.
        # Left as new, the screen would also make it re-read the whole style sheet and restyle
        # every other view, twice, before its first frame (50-100 ms on a first visit).
        screen._css_update_count = screen.app._css_update_count
        return screen

    return build


class GlideTaskApp(App[int]):
    """Plan a cross-country task: legs, glider, day, final glide, safety."""

    CSS_PATH = Path(__file__).with_name("app.tcss")  # absolute: subclasses elsewhere keep it
    TITLE = "glidetask"
    MODES = {name: _view_factory(name) for name in VIEWS}
    DEFAULT_MODE = "task"
    BINDINGS = [
        *(Binding(str(index), f"view('{name}')", title, show=False)
          for index, (name, (_, _, title)) in enumerate(VIEWS.items(), start=1)),
        Binding("u", "toggle_units", "Units"),
        Binding("h", "heights", "Heights", show=False),
        Binding("ctrl+z", "undo", "Undo", priority=True),
        Binding("ctrl+y", "redo", "Redo", priority=True),
        Binding("ctrl+o", "open", "Open"),
        Binding("ctrl+s", "save", "Save"),
        Binding("ctrl+e", "export", "Export"),
        Binding("f1", "show_cautions", "Cautions"),
        Binding("ctrl+q", "quit", "Quit", priority=True),
    ]

    scenario = var(None, always_update=True)
    plan = var(None, always_update=True)
    units = var(unit_systems.METRIC, always_update=True)
    problems: var[tuple[Problem, ...]] = var((), always_update=True)
    invalid_fields: var[frozenset[str]] = var(frozenset(), always_update=True)
    dirty = var(False)
    busy = var(False)
    notice = var("")
    task_path: var[Path | None] = var(None)

    def __init__(self, task_path: str | Path | None = None, units: str = "metric", *,
                 show_cautions: bool | None = None, compute_on_start: bool = True, scenario=None):
        super().__init__()
        self._initial_scenario = scenario
        self.register_theme(GLIDETASK_THEME)
        self.theme = GLIDETASK_THEME.name
        self._initial_path = Path(task_path) if task_path else None
        self._show_cautions = show_cautions
        self._compute_on_start = compute_on_start
        self.session: EditSession | None = None
        self.units = unit_systems.by_name(units)
        self._generation = 0
        self._warmed = False
        self.last_compute_s: float | None = None

    # ------------------------------------------------------------ start and views

    def on_mount(self) -> None:
        from glidetask.tui import config

        show = self._show_cautions
        if show is None:
            show = not config.cautions_acknowledged()
        if show:
            self.action_show_cautions(first_start=True)
        if self._initial_scenario is not None:
            self._opened(self._initial_path, self._initial_scenario)
            if self._compute_on_start:
                self.call_after_refresh(self.request_plan)
        elif self._compute_on_start and self._initial_path is not None:
            self.notice = f"opening {self._initial_path.name} …"
            # after the first paint: the worker's imports (file readers, planner) compete for the GIL
            self.call_after_refresh(self._open_path, self._initial_path)

    def action_view(self, view: str) -> None:
        if view in VIEWS and self.current_mode != view:
            self.switch_mode(view)

    @on(messages.Notice)
    def _notice_posted(self, message: messages.Notice) -> None:
        self._publish_problems()  # a file that failed to open is old news: only the inputs' problems stay
        self.notice = message.text

    @on(messages.ViewRequested)
    def _view_requested(self, message: messages.ViewRequested) -> None:
        self.action_view(message.view)

    def get_system_commands(self, screen):
        yield from super().get_system_commands(screen)
        for index, (name, (_, _, title)) in enumerate(VIEWS.items(), start=1):
            yield SystemCommand(f"View: {title}", f"Show the {title.lower()} view (key {index})",
                                lambda name=name: self.action_view(name))
        yield SystemCommand("Units: switch metric / aviation", "km, m, km/h  or  NM, ft, kt (key u)",
                            self.action_toggle_units)
        yield SystemCommand("Task: open a task file", "Open a task (ctrl+o)", self.action_open)
        yield SystemCommand("Task: save", "Save the task file (ctrl+s)", self.action_save)
        yield SystemCommand("Task: save as…", "Save the task under a new name", self.action_save_as)
        yield SystemCommand("Export: GPX route, briefing or plan JSON", "ctrl+e", self.action_export)
        yield SystemCommand("Cautions: read them in full", "f1", self.action_show_cautions)
        yield SystemCommand("Heights needed and what-ifs", "from each turnpoint at MacCready 0-3 (key h)",
                            self.action_heights)

    def action_show_cautions(self, first_start: bool = False) -> None:
        from glidetask.tui.screens.cautions_modal import CautionsModal

        self.push_screen(CautionsModal(first_start=first_start))

    def action_heights(self) -> None:
        from glidetask.tui.screens.heights_modal import HeightsModal

        if self.plan is None or self.plan.plan is None:
            self.notice = "heights needed: the plan is not ready"
            return
        self.push_screen(HeightsModal(self.plan, self.units))

    def action_toggle_units(self) -> None:
        other = "aviation" if self.units.name == "metric" else "metric"
        self.units = unit_systems.by_name(other)
        if self.session is not None:
            self.session.units = self.units
        self.notice = f"units: {other}"

    # ------------------------------------------------------------ edits

    @on(messages.FieldEdited)
    def _field_edited(self, message: messages.FieldEdited) -> None:
        if self.session is None:
            return
        from glidetask.tui.edits import FIELDS

        accepted = self.session.edit_field(message.field_id, message.text)
        spec = FIELDS.get(message.field_id)
        self._after_edit(accepted, f"{spec.label if spec else message.field_id} changed")

    @on(messages.ScenarioEdit)
    def _scenario_edit(self, message: messages.ScenarioEdit) -> None:
        if self.session is None:
            return
        accepted = self.session.edit(message.change, message.what)
        self._after_edit(accepted, message.what, message.field_id)

    def _after_edit(self, accepted: bool, what: str, field_id: str | None = None) -> None:
        session = self.session
        self._publish_problems(extra_field=None if accepted else field_id)
        self.dirty = session.dirty
        if accepted:
            self.scenario = session.scenario
            self.notice = f"{what}: planning … (ctrl+z undoes)"
            self.request_plan()

    def action_undo(self) -> None:
        self._travel(self.session.undo if self.session else None, "undone", "nothing to undo")

    def action_redo(self) -> None:
        self._travel(self.session.redo if self.session else None, "redone", "nothing to redo")

    def _travel(self, step, done: str, nothing: str) -> None:
        what = step() if step is not None else None
        if what is None:
            self.notice = nothing
            return
        self.screen.set_focus(None)  # the fields show the restored values, not what was being typed
        self._publish_problems()
        self.dirty = self.session.dirty
        self.scenario = self.session.scenario
        self.notice = f"{done}: {what} · ctrl+z undo · ctrl+y redo"
        self.request_plan()

    def _publish_problems(self, extra_field: str | None = None) -> None:
        from glidetask.tui.edits import field_for_where

        problems = tuple(self.session.problems) if self.session else ()
        fields = set(self.session.invalid_fields) if self.session else set()
        fields.update(f for f in (field_for_where(p.where) for p in problems) if f)
        if extra_field:
            fields.add(extra_field)
        if problems != self.problems:  # unchanged: the status line need not redraw
            self.problems = problems
        # always set: the views mark the fields again (an Input's own check clears the mark as it is typed in)
        self.invalid_fields = frozenset(fields)

    def request_plan(self) -> None:
        if self.session is None:
            return
        self._generation += 1
        self.busy = True
        self.plan_in_background(self.session.scenario, self._generation)

    # ------------------------------------------------------------ workers

    @work(thread=True, exclusive=True, group="plan")
    def open_and_plan(self, path: Path, generation: int) -> None:
        from glidetask.tui import recompute

        worker = get_current_worker()
        try:
            scenario = recompute.load_task(path)
        except InputError as error:
            self.call_from_thread(self._open_failed, path, list(error.problems))
            return
        except Exception as error:  # an unreadable file is a message, never a crash
            self.call_from_thread(self._open_failed, path,
                                  [Problem(str(path), "file", f"{type(error).__name__}: {error}")])
            return
        if worker.is_cancelled:
            return
        self.call_from_thread(self._opened, path, scenario)
        self._plan_now(scenario, generation, worker)

    @work(thread=True, exclusive=True, group="warm")
    def warm_views(self) -> None:
        """Once the first plan is on screen: import the other views and their engine parts,
        so a first visit paints at once (its progress line within 100 ms)."""
        for name in VIEWS:
            module = importlib.import_module(f"glidetask.tui.screens.{VIEWS[name][0]}")
            del module
        for name in ("glidetask.engine.compare", "glidetask.engine.simulate", "glidetask.formats.strategy_report"):
            importlib.import_module(name)
        self.call_from_thread(self._warm_styles)

    def _warm_styles(self) -> None:
        """Parse the styles of every view's widgets now, while the pilot reads the first view:
        a first visit then does not re-read the whole style sheet before its first frame."""
        from textual.widgets import DataTable, Input, Label, ProgressBar

        from glidetask.tui.screens.compare_view import CompareView
        from glidetask.tui.screens.odds_view import OddsView
        from glidetask.tui.widgets.progress_notice import ProgressNotice
        from glidetask.tui.widgets.strategy_odds import FinishPlot, LandoutsTable, OddsTable, ProbabilityBars
        from glidetask.tui.widgets.strategy_sweep import SweepPlot, SweepTable

        added = False
        try:  # a head start only: whatever fails here is done again on the first visit
            nodes = (CompareView(), OddsView(), ProgressNotice(""), ProgressBar(), SweepTable(), SweepPlot(),
                     ProbabilityBars(), OddsTable(), LandoutsTable(), FinishPlot(), DataTable(), Input(), Label())
            for node in nodes:
                for read_from, css, tie_breaker, scope in node._get_default_css():
                    self.stylesheet.add_source(css, read_from=read_from, is_default_css=True,
                                               tie_breaker=tie_breaker, scope=scope)
                    added = True
        except Exception:  # noqa: BLE001 - never let a warm-up take the app down
            return
        if added:
            try:
                self.stylesheet.reparse()
            except Exception:  # noqa: BLE001
                pass

    @work(thread=True, exclusive=True, group="plan")
    def plan_in_background(self, scenario, generation: int) -> None:
        self._plan_now(scenario, generation, get_current_worker())

    def _plan_now(self, scenario, generation: int, worker) -> None:
        from glidetask.tui import recompute

        try:
            outcome = recompute.compute_plan(scenario)
        except InputError as error:
            problems = list(error.problems)
        except Exception as error:  # the engine failing is shown, the last good plan kept
            problems = [Problem("plan", "engine", f"{type(error).__name__}: {error}")]
        else:
            if not worker.is_cancelled:
                self.call_from_thread(self._planned, generation, outcome)
            return
        if not worker.is_cancelled:
            self.call_from_thread(self._plan_failed, generation, problems)

    def _opened(self, path: Path | None, scenario) -> None:
        first = self.session is None
        if first:
            self.session = EditSession(scenario, self.units, path)
        else:
            self.session.replace_all(scenario, path)
        self.task_path = path
        self.dirty = False
        if path is not None and not is_bundled(path):
            from glidetask.tui import config

            config.remember_task(path)
        self._publish_problems()
        self.scenario = scenario
        if not first:
            self.plan = None  # after the scenario: the views name the task they wait for
        self.notice = f"opened {path.name if path else scenario.task.name}: planning …"

    def _open_failed(self, path: Path, problems: list[Problem]) -> None:
        self.busy = False
        self.problems = tuple(problems)
        self.notice = f"could not open {path}"

    def _planned(self, generation: int, outcome) -> None:
        if generation != self._generation:
            return  # a newer edit is being planned
        self.busy = False
        self.last_compute_s = outcome.elapsed_s
        first = self.plan is None and not self._warmed
        self.plan = outcome
        if first:
            self._warmed = True
            self.warm_views()
        self._publish_problems()
        history = self.session.undo_stack if self.session is not None else []
        self.notice = f"plan updated · ctrl+z undoes: {history[-1][1]}" if history else "plan updated"

    def _plan_failed(self, generation: int, problems: list[Problem]) -> None:
        if generation != self._generation:
            return
        self.busy = False
        self.problems = tuple(self.session.problems if self.session else ()) + tuple(problems)
        from glidetask.tui.edits import field_for_where

        self.invalid_fields = frozenset(self.invalid_fields | {f for f in (field_for_where(p.where) for p in problems) if f})
        self.notice = "the plan could not be updated: showing the last good plan"

    # ------------------------------------------------------------ files

    def action_open(self) -> None:
        from glidetask.tui import config
        from glidetask.tui.screens.open_modal import OpenModal

        folder = self.task_path.parent if self.task_path else Path.cwd()
        self.push_screen(OpenModal(folder, config.recent_tasks()), self._open_chosen)

    def _open_chosen(self, path: str | None) -> None:
        if not path:
            return
        if self.dirty:
            from glidetask.tui.screens.confirm_modal import ConfirmModal

            self.push_screen(ConfirmModal("The task has unsaved changes. Open another and lose them?",
                                          yes="Open and discard", no="Keep editing"),
                             lambda yes: yes and self._open_path(Path(path)))
        else:
            self._open_path(Path(path))

    def _open_path(self, path: Path) -> None:
        self.busy = True
        self.notice = f"opening {path.name} …"
        self._generation += 1
        self.open_and_plan(path.expanduser().absolute(), self._generation)

    def _refuse_save(self) -> bool:
        """True (and says why) while a field holds a refused value: it is never saved."""
        from glidetask.tui.edits import FIELDS

        pending = self.session.pending if self.session is not None else {}
        if not pending:
            return False
        names = ", ".join(FIELDS[f].label if f in FIELDS else f for f in pending)
        self.problems = tuple(self.session.problems) + (
            Problem("input", "Save", f"not saved: correct {names} first (it holds a refused value)"),)
        self.notice = f"not saved: {names} holds a refused value"
        return True

    def action_save(self) -> None:
        if self.session is None or self._refuse_save():
            return
        if self.session.path is None or is_bundled(self.session.path):
            self.action_save_as()
        else:
            self._save_to(self.session.path)

    def action_save_as(self, then_quit: bool = False) -> None:
        from glidetask.tui.screens.path_modal import PathModal

        if self.session is None or self._refuse_save():
            return
        path = self.session.path
        title, hint = "Save the task as", ""
        if path is None:
            start = str(Path.cwd() / "task.toml")
        elif is_bundled(path):  # the bundled demo stays as shipped: the pilot saves a copy
            start = str(Path.cwd() / path.name)
            title, hint = "Save your copy of the demo task as", "the bundled demo stays as it is · enter: save · esc: cancel"
        else:
            start = str(path)

        def saved(target: Path) -> None:
            if self._save_to(target) and then_quit:
                self.exit(0)

        def chosen(answer: str | None) -> None:
            if answer:
                self._save_as_checked(Path(answer).expanduser().absolute(), saved)

        self.push_screen(PathModal(title, start, action="Save", hint=hint), chosen)

    def _save_as_checked(self, target: Path, save) -> None:
        """Save As to ``target`` through ``save(target)``: at once to the task's own file or a new
        name; after a confirmation naming it for any other existing file; never over a file the
        task reads (its polar, turnpoints, terrain, airspace, sounding) or the bundled demo."""
        import os

        from glidetask.formats.export import same_file_as
        from glidetask.tui.exporting import read_by_task_problem

        own = self.session.path
        if own is not None and not is_bundled(own) and same_file_as(target, [own]) is not None:
            save(target)  # the task's own file: what Save does
            return
        if is_bundled(target):
            problem = "the bundled demo stays as shipped; choose another name"
        else:  # the task file it was read from is not among them: once saved as, the task is elsewhere
            problem = read_by_task_problem(target, self.session.scenario, task_file=False)
        if problem is None and target.is_dir():
            problem = f"{str(target)!r} is a folder; give a file name"
        if problem:
            self.problems = tuple(self.session.problems) + (Problem(str(target), "Save as", f"not saved: {problem}"),)
            self.notice = f"not saved: {problem}"
            return
        if not os.path.lexists(target):
            save(target)
            return
        from glidetask.tui.screens.confirm_modal import ConfirmModal

        def answered(yes: bool | None) -> None:
            if yes:
                save(target)
            else:
                self.notice = f"not saved: {target} kept as it is"

        self.push_screen(ConfirmModal(f"{target} exists. Replace it with this task?", yes="Replace",
                                      no="Keep it"), answered)

    def _save_to(self, path: Path) -> bool:
        from glidetask.tui import recompute

        if self._refuse_save():
            return False
        try:
            recompute.save_task(path, self.session.scenario)
        except (InputError, OSError, ValueError) as error:
            problems = getattr(error, "problems", None) or [Problem(str(path), "save", str(error))]
            self.problems = tuple(problems)
            self.notice = f"not saved: {problems[0].what}"
            return False
        self.session.saved(path)
        from glidetask.tui import config

        config.remember_task(path)
        self._publish_problems()
        self.task_path = path
        self.dirty = False
        self.notice = f"saved {path}"
        return True

    def action_export(self) -> None:
        from glidetask.tui.screens.export_modal import ExportModal

        if self.session is None or self.plan is None:
            self.notice = "nothing to export yet: the plan is not ready"
            return
        self.push_screen(ExportModal(export_base(self.session.path)))

    # ------------------------------------------------------------ quitting

    async def action_quit(self) -> None:
        if not self.dirty:
            self.exit(0)
            return
        from glidetask.tui.screens.confirm_modal import QuitModal

        self.push_screen(QuitModal(), self._quit_chosen)

    def _quit_chosen(self, choice: str | None) -> None:
        if choice == "discard":
            self.exit(0)
        elif choice == "save" and self.session.path is not None and not is_bundled(self.session.path):
            if self._save_to(self.session.path):
                self.exit(0)
        elif choice == "save":
            self.action_save_as(then_quit=True)


def is_bundled(path: Path) -> bool:
    """True for a file of the bundled demo data (never overwritten: it may not even be writable)."""
    from glidetask import paths

    try:
        return Path(path).resolve().is_relative_to(paths.demo_tasks_dir().resolve())
    except OSError:
        return False


def export_base(task_path: Path | None) -> Path:
    """Where exports go by default, without suffix: beside the task file, or in the current
    folder for the bundled demo and a task never saved."""
    if task_path is None:
        return Path.cwd() / "plan"
    if is_bundled(task_path):
        return Path.cwd() / task_path.stem
    return task_path.with_suffix("")


def make_app(task_path: str | Path | None = None, units: str = "metric", *,
             show_cautions: bool | None = None, compute_on_start: bool = True, scenario=None) -> GlideTaskApp:
    """The app for a task file (the bundled demo if None), in ``units`` ("metric" or "aviation").

    ``show_cautions`` forces the full caution notice on (True) or off (False); by default it
    shows until the user has acknowledged the current wording once. ``scenario`` starts
    from a scenario already built (tests), with ``task_path`` as its file if given.
    """
    from glidetask import paths

    if scenario is None and task_path is None:
        task_path = paths.demo_task()
    return GlideTaskApp(task_path, units, show_cautions=show_cautions,
                        compute_on_start=compute_on_start, scenario=scenario)


def run_app(task_path: str | Path | None = None, units: str = "metric") -> int:
    """Run the UI; the exit status: 0 after ctrl+q, non-zero after an internal fault."""
    app = make_app(task_path, units)
    app.run()
    return app.return_code or 0
