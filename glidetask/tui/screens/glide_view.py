"""The Final glide view: a calculator from any turnpoint (or a distance and course) to a
goal, with the verdict, MacCready to arrive, L/D required against achievable, and the
terrain under the glide when the task has an elevation model."""

from __future__ import annotations

from textual import on, work
from textual.app import ComposeResult
from textual.containers import Horizontal, Vertical, VerticalScroll
from textual.widgets import Select
from textual.worker import get_current_worker

from glidetask.errors import InputError
from glidetask.tui import derived, display, edits, messages
from glidetask.tui.screens.base import ViewScreen
from glidetask.tui.widgets.form_field import FormField
from glidetask.tui.widgets.glide_verdict import GlideVerdict
from glidetask.tui.widgets.terrain_profile import TerrainProfile

MANUAL = "manual"
# field id -> (label, unit kind)
GLIDE_FIELDS = {
    "glide-distance": ("Distance", "distance"),
    "glide-course": ("Course", "degrees"),
    "glide-height": ("Height now (MSL)", "height"),
    "glide-mc": ("MacCready", "vertical"),
    "glide-wind": ("Wind from/speed", "speed"),
    "glide-elevation": ("Goal elevation", "height"),
    "glide-margin": ("Arrival margin", "height"),
}


def unit_label(kind: str, units) -> str:
    return {"distance": units.distance_label, "height": units.height_label, "vertical": units.vertical_label,
            "speed": units.speed_label, "degrees": "° true"}.get(kind, "")


class GlideView(ViewScreen):
    """Ask: from here, this high, at this setting, do I get home?"""

    VIEW = "glide"

    def __init__(self):
        super().__init__()
        self.texts: dict[str, str] = {}
        self.touched: set[str] = set()
        self.answer = None

    def compose_body(self) -> ComposeResult:
        with VerticalScroll(id="glide-left"):
            with Vertical(id="glide-inputs", classes="panel"):
                with Horizontal(classes="glide-select-row"):
                    yield Select([], prompt="from", id="glide-from", compact=True, allow_blank=True)
                with Horizontal(classes="glide-select-row"):
                    yield Select([], prompt="to", id="glide-to", compact=True, allow_blank=True)
                for field_id, (label, kind) in GLIDE_FIELDS.items():
                    yield FormField(field_id, label, unit_label(kind, self.app.units))
            yield GlideVerdict(id="glide-verdict", classes="panel")
        yield TerrainProfile(id="terrain-profile", classes="panel")

    def on_mount(self) -> None:
        self.query_one("#glide-inputs").border_title = "Glide from, to, how high"
        self.query_one("#glide-verdict").border_title = "Verdict"
        self.query_one("#terrain-profile").border_title = "Terrain under the glide"

    # ------------------------------------------------------------ defaults and inputs

    def show_scenario(self, scenario, *, force: bool = False) -> None:
        names = [t.name for t in scenario.turnpoints] or list(dict.fromkeys(scenario.task.names))
        origin = self.query_one("#glide-from", Select)
        goal = self.query_one("#glide-to", Select)
        with self.prevent(Select.Changed):
            origin.set_options([("distance and course", MANUAL)] + [(f"from {n}", n) for n in names])
            goal.set_options([(f"to {n}", n) for n in names])
            task_names = scenario.task.names
            origin.value = self.texts.get("from", task_names[-2] if len(task_names) > 1 else MANUAL)
            goal.value = self.texts.get("to", task_names[-1])
        self.texts["from"], self.texts["to"] = origin.value, goal.value
        self._fill_defaults(scenario, force=force)
        self.recompute()

    def show_plan(self, outcome) -> None:
        if self.app.scenario is not None and "glide-mc" not in self.touched:
            self._fill_defaults(self.app.scenario)
            self.recompute()

    def show_units(self) -> None:
        self.texts = {k: v for k, v in self.texts.items() if k in ("from", "to")}
        self.touched.clear()
        if self.app.scenario is not None:
            self.show_scenario(self.app.scenario, force=True)

    def _turnpoint(self, name):
        for turnpoint in self.app.scenario.turnpoints:
            if turnpoint.name == name:
                return turnpoint
        for point in self.app.scenario.task.points:
            if point.name == name:
                return point.turnpoint
        return None

    def _fill_defaults(self, scenario, *, force: bool = False) -> None:
        from glidetask.engine import geodesy

        units = self.app.units
        origin = self._turnpoint(self.query_one("#glide-from", Select).value)
        goal = self._turnpoint(self.query_one("#glide-to", Select).value)
        outcome = self.app.plan
        plan_mc = (outcome.summary.get("final_glide") or {}).get("mc_ms") if outcome is not None else None
        mc = plan_mc if plan_mc is not None else scenario.safety.final_glide_mc_ms or 0.0
        defaults = {
            "glide-height": display.number(units.height(scenario.day.band_top_m), 0),
            "glide-mc": display.number(units.vertical(mc), 1),
            "glide-wind": edits.field_text(scenario, "day-wind", units),
            "glide-margin": display.number(units.height(scenario.safety.arrival_margin_m), 0),
        }
        if goal is not None:
            defaults["glide-elevation"] = display.number(units.height(goal.elevation_m), 0)
        if origin is not None and goal is not None:
            length, azimuth, _ = geodesy.inverse(origin.lat, origin.lon, goal.lat, goal.lon)
            defaults["glide-distance"] = display.number(units.distance(float(length)), 1)
            defaults["glide-course"] = display.degrees(float(azimuth))
        defaults.setdefault("glide-distance", "30")
        defaults.setdefault("glide-course", "0")
        defaults.setdefault("glide-elevation", "0")
        manual = origin is None
        for field_id, (_, kind) in GLIDE_FIELDS.items():
            field = self.query_one(f"#{field_id}").parent
            locked = field_id in ("glide-distance", "glide-course") and not manual
            field.input.disabled = locked
            if force or field_id not in self.touched or locked:
                self.texts[field_id] = defaults[field_id]
                field.show(defaults[field_id], unit_label(kind, units), force=True)

    @on(Select.Changed)
    def _place_chosen(self, event: Select.Changed) -> None:
        event.stop()
        key = "from" if event.select.id == "glide-from" else "to"
        self.texts[key] = event.value
        if key == "to":
            self.touched.discard("glide-elevation")
        if self.app.scenario is not None:
            self._fill_defaults(self.app.scenario)
            self.recompute()

    @on(messages.FieldEdited)
    def _typed(self, message: messages.FieldEdited) -> None:
        if not message.field_id.startswith("glide-"):
            return
        message.stop()
        self.texts[message.field_id] = message.text
        self.touched.add(message.field_id)
        self.recompute()

    # ------------------------------------------------------------ the answer

    def question(self) -> derived.GlideQuestion:
        """The question as typed; InputError naming the first field that makes no sense."""
        from glidetask.engine.scenario import Wind

        units, texts = self.app.units, self.texts
        problems = []

        def number(field_id, factor=1.0, low=None, high=None):
            try:
                value = float(texts.get(field_id, "").replace(",", ".")) * factor
                if (low is not None and value < low) or (high is not None and value > high) or value != value:
                    raise ValueError
                return value
            except ValueError:
                from glidetask.errors import Problem

                problems.append(Problem("input", GLIDE_FIELDS[field_id][0],
                                        f"not a usable value: {texts.get(field_id, '')!r}"))
                self.query_one(f"#{field_id}").add_class("-invalid")
                return 0.0

        for field_id in GLIDE_FIELDS:
            self.query_one(f"#{field_id}").remove_class("-invalid")
        distance = number("glide-distance", units.distance_m, 0.0, 2_000_000.0)
        course = number("glide-course", 1.0, 0.0, 360.0)
        height = number("glide-height", units.height_m, -500.0, 12_000.0)
        mc = number("glide-mc", units.vertical_ms, 0.0, 10.0)
        elevation = number("glide-elevation", units.height_m, -500.0, 9000.0)
        margin = number("glide-margin", units.height_m, 0.0, 3000.0)
        try:
            wind = edits.parse_wind(edits.FIELDS["day-wind"], texts.get("glide-wind", ""), units)
        except InputError as error:
            from glidetask.errors import Problem

            problems.extend(Problem("input", "Wind", p.what) for p in error.problems)
            self.query_one("#glide-wind").add_class("-invalid")
            wind = Wind()
        if problems:
            raise InputError(problems)
        origin = self._turnpoint(self.texts.get("from"))
        goal = self._turnpoint(self.texts.get("to"))
        if origin is not None and goal is not None:  # exact geodesic, not the rounded figures shown
            from glidetask.engine import geodesy

            distance, course, _ = (float(v) for v in geodesy.inverse(origin.lat, origin.lon, goal.lat, goal.lon))
        return derived.GlideQuestion(distance, course, height, mc, wind, elevation, margin,
                                     start=(origin.lat, origin.lon) if origin else None,
                                     goal=(goal.lat, goal.lon) if goal else None)

    def recompute(self) -> None:
        if self.app.scenario is None:
            return
        try:
            question = self.question()
        except InputError as error:
            # shown in the calculator itself, and gone as soon as the question makes sense again
            self.answer = None
            self.query_one(GlideVerdict).show_problems(error.problems)
            return
        self.answer_in_background(self.app.scenario, question)

    @work(thread=True, exclusive=True, group="glide")
    def answer_in_background(self, scenario, question) -> None:
        worker = get_current_worker()
        try:
            answer = derived.answer_glide(scenario, question)
        except Exception as error:  # shown, never a crash
            if not worker.is_cancelled:
                self.app.call_from_thread(self.post_message, messages.Notice(f"final glide: {error}"))
            return
        if not worker.is_cancelled:
            self.app.call_from_thread(self._show_answer, answer)

    def _show_answer(self, answer) -> None:
        from glidetask.tui.widgets.plan_totals import final_glide_text

        self.answer = answer
        outcome = self.app.plan
        note = final_glide_text(outcome.plan, self.app.units) if outcome is not None else ""
        self.query_one(GlideVerdict).show(answer, self.app.units, note)
        self.query_one(TerrainProfile).show(answer.terrain, self.app.units,
                                            answer.terrain_note or "needs a terrain model and a glide between two turnpoints")
