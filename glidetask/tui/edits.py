"""What the pilot types, turned into a new :class:`~glidetask.engine.scenario.Scenario`.

Each editable figure is a :class:`FieldSpec` keyed by an id that is also the widget id
of its input (``day-band_top_m``). :func:`apply_field` parses the text in the units on
screen, converts to SI, checks the range and the consistency of the day, and returns a
new scenario (``dataclasses.replace``); anything wrong raises
:class:`~glidetask.errors.InputError` whose ``where`` names the field in the task file's
terms (``[day] band_top_m``), so the UI can highlight it.
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass, replace

from glidetask.engine.scenario import MAX_WIND_SPEED_KMH, Profile, Scenario, Wind, scenario_problems
from glidetask.errors import InputError, Problem
from glidetask.units import KMH, UnitSystem, parse_clock

SOURCE = "input"  # Problem.file for things typed in the UI
# The strongest wind any input may give: the engine's one limit (the task file's too).
WIND_MAX_MS = MAX_WIND_SPEED_KMH * KMH


@dataclass(frozen=True)
class FieldSpec:
    """One editable figure: where it lives in the scenario and what it accepts."""

    section: str  # "glider", "day" or "safety"
    key: str  # the task-file key (contract 2.3)
    kind: str  # mass | percent | height | vertical | clock | wind | celsius | seconds | ratio
    minimum: float | None = None  # SI
    maximum: float | None = None  # SI
    optional: bool = False  # empty text means "not set" (None)
    label: str = ""  # the field's name on screen

    @property
    def id(self) -> str:
        return f"{self.section}-{self.key}"

    @property
    def where(self) -> str:
        return f"[{self.section}] {self.key}"


FIELDS: dict[str, FieldSpec] = {
    spec.id: spec
    for spec in (
        FieldSpec("glider", "pilot_kg", "mass", 40.0, 250.0, label="Pilot + parachute"),
        FieldSpec("glider", "ballast_kg", "mass", 0.0, None, label="Water ballast"),
        FieldSpec("glider", "bugs_percent", "percent", 0.0, 100.0, label="Bugs (sink +)"),
        FieldSpec("day", "wind", "wind", label="Wind from/speed"),
        FieldSpec("day", "start_time", "clock", label="Start"),
        FieldSpec("day", "start_height_m", "height", 0.0, 9000.0, optional=True, label="Start height"),
        FieldSpec("day", "band_top_m", "height", 0.0, 9000.0, label="Band top"),
        FieldSpec("day", "band_bottom_m", "height", 0.0, 9000.0, label="Band bottom"),
        FieldSpec("day", "lift_ends", "clock", label="Lift ends"),
        FieldSpec("day", "glide_airmass_ms", "vertical", -5.0, 5.0, label="Air in glides (+up)"),
        FieldSpec("day", "isa_deviation_c", "celsius", -40.0, 40.0, label="ISA deviation"),
        FieldSpec("day", "mc_ms", "vertical", 0.0, 10.0, optional=True, label="MacCready (fixed)"),
        # the practical assumptions and the thermals (bounds as the task file's reader)
        FieldSpec("day", "thermal_radius_m", "height", 10.0, 5000.0, optional=True, label="Thermal radius"),
        FieldSpec("day", "centring_s", "seconds", 0.0, 600.0, label="Centring a climb"),
        FieldSpec("day", "detour_percent", "percent", 0.0, 50.0, label="Detour"),
        FieldSpec("day", "stall_margin", "ratio", 1.05, 1.5, label="Circling x stall"),
        FieldSpec("safety", "arrival_margin_m", "height", 0.0, 2000.0, label="Arrival margin"),
        FieldSpec("safety", "terrain_clearance_m", "height", 0.0, 2000.0, label="Terrain clearance"),
        FieldSpec("safety", "final_glide_mc_ms", "vertical", 0.0, 10.0, optional=True, label="Final-glide MC"),
    )
}
# what the pilot sees for a part of the scenario that is not a single field
PLACES = {"[day] climb_ms": "Lift through the day", "[day] thermal_strength_ms": "Lift through the day",
          "[task]": "Task points"}

_WHERE = re.compile(r"\[(\w+)\]\s*([\w.]+)")


def field_for_where(where: str) -> str | None:
    """The field id a problem's ``where`` names (``"[day] band_top_m"`` -> ``"day-band_top_m"``)."""
    match = _WHERE.search(where or "")
    if not match:
        return None
    section, key = match.group(1), match.group(2).split(".")[0]
    aliases = {"start_time": "start_time", "lift_ends": "lift_ends", "wind": "wind"}
    candidate = f"{section}-{aliases.get(key, key)}"
    return candidate if candidate in FIELDS else None


def where_on_screen(where: str) -> str:
    """A problem's ``where`` in the words on screen: ``"[glider] ballast_kg"`` -> ``"Water
    ballast"``, ``"[day] climb_ms row 2"`` -> ``"Lift through the day row 2"``."""
    field = field_for_where(where)
    if field is not None:
        return FIELDS[field].label or where
    for prefix, label in PLACES.items():
        if (where or "").startswith(prefix):
            return label + where[len(prefix):]
    return where


def _fail(spec: FieldSpec, what: str) -> InputError:
    return InputError([Problem(SOURCE, spec.where, what)])


def _number(spec: FieldSpec, text: str) -> float:
    try:
        value = float(text.replace(",", "."))
    except ValueError:
        raise _fail(spec, f"expected a number, got {text!r}") from None
    if not math.isfinite(value):
        raise _fail(spec, f"expected a finite number, got {text!r}")
    return value


def _shown(spec: FieldSpec, si: float, units: UnitSystem) -> str:
    if spec.kind == "height":
        return units.fmt_height(si)
    if spec.kind == "vertical":
        return units.fmt_vertical(si)
    if spec.kind == "percent":
        return f"{si:g} %"
    if spec.kind == "celsius":
        return f"{si:g} °C"
    if spec.kind == "seconds":
        return f"{si:g} s"
    if spec.kind == "ratio":
        return f"{si:g} x"
    return f"{si:g} kg"


def parse_value(spec: FieldSpec, text: str, units: UnitSystem):
    """The SI value of ``text`` typed in ``units`` (None for an empty optional field)."""
    text = text.strip()
    if not text:
        if spec.optional:
            return None
        raise _fail(spec, "a value is needed")
    if spec.kind == "clock":
        try:
            return parse_clock(text)
        except ValueError as error:
            raise _fail(spec, str(error)) from None
    if spec.kind == "wind":
        return parse_wind(spec, text, units)
    value = _number(spec, text)
    factor = {"height": units.height_m, "vertical": units.vertical_ms}.get(spec.kind, 1.0)
    si = value * factor + 0.0  # no "-0"
    if spec.minimum is not None and si < spec.minimum - 1e-9:
        raise _fail(spec, f"must be at least {_shown(spec, spec.minimum, units)}")
    if spec.maximum is not None and si > spec.maximum + 1e-9:
        raise _fail(spec, f"must be at most {_shown(spec, spec.maximum, units)}")
    return si


def parse_wind(spec: FieldSpec, text: str, units: UnitSystem) -> Wind:
    """``"270/20"``: from 270 deg at 20 (speed in the units on screen); ``"0"`` or ``"calm"``: calm."""
    if text.lower() in ("calm", "0"):
        return Wind(0.0, 0.0)
    parts = text.split("/")
    if len(parts) != 2:
        raise _fail(spec, f"expected FROM/SPEED like 270/20 ({units.speed_label}), got {text!r}")
    direction, speed = _number(spec, parts[0]), _number(spec, parts[1])
    # the task file's limits and wording ("[day] wind: speed_kmh must be in [0, 200], got 250"),
    # in the units on screen
    if not 0.0 <= direction <= 360.0:
        raise _fail(spec, f"direction must be in [0, 360] degrees, got {direction:g}")
    if not 0.0 <= speed * units.speed_ms <= WIND_MAX_MS + 1e-9:
        raise _fail(spec, f"speed must be in [0, {wind_limit_text(units)}] {units.speed_label}, got {speed:g}")
    return Wind(direction % 360.0, speed * units.speed_ms)


def wind_limit_text(units: UnitSystem) -> str:
    """The wind limit in the units on screen, never rounded up past it (200 km/h = 107.9 kt)."""
    limit = units.speed(WIND_MAX_MS)
    return f"{limit:.0f}" if abs(limit - round(limit)) < 1e-9 else f"{math.floor(limit * 10) / 10:.1f}"


def field_text(scenario: Scenario, field_id: str, units: UnitSystem) -> str:
    """What the input for ``field_id`` shows for ``scenario`` in ``units``."""
    from glidetask.tui import display

    spec = FIELDS[field_id]
    value = _current(scenario, spec)
    if value is None:
        return ""
    if spec.kind == "wind":
        value = value.at(scenario.day.band_middle_m)  # a profile: the cruise's wind (band middle)
        speed = units.speed(value.speed_ms)
        return "calm" if speed == 0 else f"{value.from_deg:03.0f}/{display.number(speed, 0)}"
    if spec.kind == "clock":
        return display.clock(value)
    if spec.kind == "height":
        return display.number(units.height(value), 0)
    if spec.kind == "vertical":
        return display.number(units.vertical(value), 1)
    if spec.kind == "ratio":
        return display.number(value, 2)
    return display.number(value, 1)


def unit_of(spec: FieldSpec, units: UnitSystem) -> str:
    """The unit a field is typed in (empty for clock times)."""
    return {"mass": "kg", "percent": "%", "celsius": "°C", "height": units.height_label,
            "vertical": units.vertical_label, "wind": units.speed_label, "seconds": "s",
            "ratio": "x"}.get(spec.kind, "")


def field_shown(scenario: Scenario, field_id: str, units: UnitSystem) -> str:
    """A field's accepted value with its name and unit: ``"Water ballast 20 kg"``."""
    spec = FIELDS[field_id]
    text = field_text(scenario, field_id, units) or "not set"
    unit = unit_of(spec, units) if text not in ("not set", "calm") else ""
    return f"{spec.label} {text}" + (f" {unit}" if unit else "")


def _attribute(spec: FieldSpec) -> str:
    return {"start_time": "start_time_s", "lift_ends": "lift_ends_s"}.get(spec.key, spec.key)


def _current(scenario: Scenario, spec: FieldSpec):
    return getattr(getattr(scenario, spec.section), _attribute(spec))


def apply_field(scenario: Scenario, field_id: str, text: str, units: UnitSystem) -> Scenario:
    """A new scenario with the field set from ``text``; InputError if it does not make sense."""
    spec = FIELDS[field_id]
    value = parse_value(spec, text, units)
    changes = {_attribute(spec): value}
    if changes.keys() == {"band_top_m"}:
        changes["band_top_profile"] = None  # one band top typed: it replaces a band top through the day
    part = replace(getattr(scenario, spec.section), **changes)
    updated = replace(scenario, **{spec.section: part})
    check_consistency(updated, units, spec)
    return updated


def check_consistency(scenario: Scenario, units: UnitSystem, spec: FieldSpec | None = None) -> None:
    """Problems between fields (band, start height, times, loading) in the engine's words
    (:func:`glidetask.engine.scenario.scenario_problems`, the task file's check too),
    blamed on ``spec`` if given, else on the key the engine names."""
    problems = [Problem(SOURCE, spec.where if spec is not None else key, message)
                for key, message in scenario_problems(scenario)]
    if problems:
        raise InputError(problems)


def profile_from_rows(rows: list[tuple[str, str]], units: UnitSystem, key: str) -> Profile:
    """A profile from ``(HH:MM, value)`` text rows, value in the vertical unit on screen."""
    where = f"[day] {key}"
    if not rows:
        raise InputError([Problem(SOURCE, where, "the profile needs at least one [time, value] pair")])
    times, values, problems = [], [], []
    for index, (time_text, value_text) in enumerate(rows, start=1):
        try:
            times.append(parse_clock(time_text))
        except ValueError as error:
            problems.append(Problem(SOURCE, f"{where} row {index}", str(error)))
            continue
        try:
            value = float(value_text.replace(",", ".")) * units.vertical_ms
            if not (math.isfinite(value) and 0.0 <= value <= 15.0):
                raise ValueError
        except ValueError:
            problems.append(Problem(SOURCE, f"{where} row {index}",
                                    f"expected a value from 0 to {units.vertical(15.0):.0f} {units.vertical_label}, got {value_text!r}"))
            times.pop()
            continue
        values.append(value)
    if not problems and any(b <= a for a, b in zip(times, times[1:])):
        problems.append(Problem(SOURCE, where, "times must increase from row to row"))
    if problems:
        raise InputError(problems)
    return Profile(tuple(times), tuple(values))


def set_profile(scenario: Scenario, profile: Profile, *, thermal_strength: bool) -> Scenario:
    """The day with this climb (or thermal-strength) profile; the other kind is cleared."""
    if thermal_strength:
        day = replace(scenario.day, climb=None, thermal_strength=profile)
    else:
        day = replace(scenario.day, climb=profile, thermal_strength=None)
    return replace(scenario, day=day)
