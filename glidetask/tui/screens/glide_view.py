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


def si_factor(kind: str, units) -> float:
    """SI per unit on screen for a field of this kind."""
    return {"distance": units.distance_m, "height": units.height_m, "vertical": units.vertical_ms}.get(kind, 1.0)


def shown_text(kind: str, si, units) -> str:
    """The text a field shows for an SI value (the value itself stays exact: a unit switch is display only)."""
    if kind == "speed":  # the wind
        speed = units.speed(si.speed_ms)
        return "calm" if speed == 0 else f"{si.from_deg:03.0f}/{display.number(speed, 0)}"
    if kind == "degrees":
        return display.degrees(si)
    decimals = {"distance": 1, "height": 0, "vertical": 1}[kind]
    return display.number(si / si_factor(kind, units), decimals)


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
        # field id -> the exact SI value its text displays (defaults, and every field after a
        # unit switch); a field the pilot types in again is read from its text
        self.exact: dict[str, object] = {}
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
        """Display only: every field keeps its value exactly (what the pilot typed too),
        shown again in the new units; the answer is the same in SI."""
        previous = getattr(self, "_units_shown", None) or self.app.units
        units = self.app.units
        for field_id, (_, kind) in GLIDE_FIELDS.items():
            if field_id not in self.exact and field_id in self.texts:
                value = self._parse(field_id, kind, previous)
                if value is None:
                    continue  # text that makes no sense stays as typed
                self.exact[field_id] = value
            if field_id in self.exact:
                self.texts[field_id] = shown_text(kind, self.exact[field_id], units)
                self.query_one(f"#{field_id}").parent.show(self.texts[field_id], unit_label(kind, units), force=True)
            else:
                self.query_one(f"#{field_id}").parent.show(self.texts.get(field_id, ""), unit_label(kind, units),
                                                           force=True)
        self._units_shown = units
        self.recompute()

    def _parse(self, field_id: str, kind: str, units):
        """The SI value of a field's text in ``units`` (None if it makes no sense)."""
        text = self.texts.get(field_id, "")
        try:
            if kind == "speed":
                return edits.parse_wind(edits.FIELDS["day-wind"], text, units)
            return float(text.replace(",", ".")) * si_factor(kind, units)
        except (ValueError, InputError):
            return None

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
        plan_mc = None
        if outcome is not None and outcome.plan.final_glide_mc_ms == outcome.plan.final_glide_mc_ms:  # not NaN
            plan_mc = float(outcome.plan.final_glide_mc_ms)
        mc = plan_mc if plan_mc is not None else scenario.safety.final_glide_mc_ms or 0.0
        defaults = {
            "glide-height": scenario.day.band_top_m,
            "glide-mc": mc,
            "glide-wind": scenario.day.wind,
            "glide-margin": scenario.safety.arrival_margin_m,
        }
        if goal is not None:
            defaults["glide-elevation"] = goal.elevation_m
        if origin is not None and goal is not None:
            length, azimuth, _ = geodesy.inverse(origin.lat, origin.lon, goal.lat, goal.lon)
            defaults["glide-distance"] = float(length)
            defaults["glide-course"] = float(azimuth)
        defaults.setdefault("glide-distance", 30.0 * units.distance_m)
        defaults.setdefault("glide-course", 0.0)
        defaults.setdefault("glide-elevation", 0.0)
        manual = origin is None
        for field_id, (_, kind) in GLIDE_FIELDS.items():
            field = self.query_one(f"#{field_id}").parent
            locked = field_id in ("glide-distance", "glide-course") and not manual
            field.input.disabled = locked
            if force or field_id not in self.touched or locked:
                self.exact[field_id] = defaults[field_id]
                self.texts[field_id] = shown_text(kind, defaults[field_id], units)
                field.show(self.texts[field_id], unit_label(kind, units), force=True)
        self._units_shown = units

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
        self.exact.pop(message.field_id, None)  # typed: read from the text from now on
        self.recompute()

    # ------------------------------------------------------------ the answer

    def question(self) -> derived.GlideQuestion:
        """The question as typed; InputError naming the first field that makes no sense."""
        from glidetask.engine.scenario import Wind

        units, texts = self.app.units, self.texts
        problems = []

        def number(field_id, factor=1.0, low=None, high=None):
            try:
                exact = self.exact.get(field_id)
                value = float(exact) if exact is not None else float(texts.get(field_id, "").replace(",", ".")) * factor
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
            wind = self.exact.get("glide-wind") or edits.parse_wind(edits.FIELDS["day-wind"], texts.get("glide-wind", ""),
                                                                    units)
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
            self.query_one(GlideVerdict).problems = tuple(error.problems)
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
        units = self.app.units
        note = final_glide_text(outcome.plan, units) if outcome is not None else ""
        verdict = self.query_one(GlideVerdict)
        verdict.units, verdict.plan_note, verdict.problems = units, note, ()
        verdict.answer = answer
        profile = self.query_one(TerrainProfile)
        profile.units = units
        profile.note = answer.terrain_note or "needs a terrain model and a glide between two turnpoints"
        profile.check = answer.terrain
