"""The strategy results for people and programs: text, Markdown and JSON dicts.

* the ballast sweep (:class:`glidetask.engine.compare.BallastSweep`): the contract's
  section 5.4 keys (``ballast_kg``, ``thermal_strength_ms``, ``task_time_s`` one row per
  strength, ``best_ballast_kg``) plus the achieved climb, the cruise speed, where ballast
  starts paying, and the cautions;
* the sensitivity of the task time (:class:`glidetask.engine.sensitivity.Sensitivity`): a
  small table for the plan output and the briefing;
* the odds of getting home (:class:`glidetask.engine.simulate.Odds`).

Text follows the unit system shown to people (shared/CONTRACT.md section 6); JSON keys
carry their unit as a suffix and undefined numbers are ``null``. Task times are shown as
H:MM.
"""

from __future__ import annotations

import math

from glidetask import cautions
from glidetask import units as unit_systems
from glidetask.units import UnitSystem, format_clock, format_duration

DASH = "-"
BAR_WIDTH = 30  # characters of a full probability bar


def _units(units: UnitSystem | str) -> UnitSystem:
    return unit_systems.by_name(units) if isinstance(units, str) else units


def _finite(value) -> bool:
    return value is not None and math.isfinite(float(value))


def _number(value, digits: int = 3):
    """A JSON number rounded to ``digits``, or None where undefined."""
    return round(float(value), digits) if _finite(value) else None


def _duration(seconds) -> str:
    return format_duration(float(seconds)) if _finite(seconds) else DASH


def _signed_minutes(seconds) -> str:
    if not _finite(seconds):
        return DASH
    minutes = round(float(seconds) / 60.0)
    return "no change" if minutes == 0 else f"{minutes:+d} min"


def _vertical(units: UnitSystem, value_ms: float) -> str:
    return f"{units.vertical(value_ms):.1f} {units.vertical_label}"


def _table(head: list[str], rows: list[list[str]], *, left: int = 1, indent: str = "  ") -> list[str]:
    """Plain-text columns: the first ``left`` left-aligned, the rest right-aligned."""
    widths = [max(len(str(r[c])) for r in [head, *rows]) for c in range(len(head))]

    def line(cells):
        parts = [str(c).ljust(w) if i < left else str(c).rjust(w) for i, (c, w) in enumerate(zip(cells, widths))]
        return (indent + "  ".join(parts)).rstrip()

    return [line(head)] + [line(r) for r in rows]


def _markdown_table(head: list[str], rows: list[list[str]], *, left: int = 1) -> list[str]:
    align = [":--" if i < left else "--:" for i in range(len(head))]
    return ["| " + " | ".join(head) + " |", "| " + " | ".join(align) + " |"] + [
        "| " + " | ".join(str(c) for c in row) + " |" for row in rows]


def _caution_lines(extra) -> list[str]:
    return ["CAUTION"] + [f"  * {text}" for text in (*cautions.GENERAL, *extra)]


# ---------------------------------------------------------------- ballast sweep


def sweep_to_dict(sweep, day_cautions=()) -> dict:
    """The sweep as JSON (contract 5.4 plus extras), keys with units; cautions in metric,
    ``day_cautions`` (those of a day from a sounding, :func:`day_cautions`) before its own.

    ``task_time_s[i][j]`` is the task time at ``thermal_strength_ms[i]`` and
    ``ballast_kg[j]`` (null where the task cannot be finished); ``best_ballast_kg[i]``
    the fastest ballast at that strength (null where none finishes).
    """
    def grid(array, scale=1.0, digits=3):
        return [[_number(v / scale, digits) for v in row] for row in array]

    return {
        "task": {"name": sweep.task_name, "planned_distance_km": _number(sweep.planned_distance_m / 1000.0)},
        "ballast_kg": [_number(b, 2) for b in sweep.ballast_kg],
        "thermal_strength_ms": [_number(s, 3) for s in sweep.thermal_strength_ms],
        "task_time_s": grid(sweep.task_time_s, digits=0),
        "best_ballast_kg": [_number(b, 2) for b in sweep.best_ballast_kg],
        "mass_kg": [_number(m, 2) for m in sweep.mass_kg],
        "achieved_climb_ms": grid(sweep.achieved_climb_ms),
        "cruise_speed_kmh": grid(sweep.cruise_speed_ms, unit_systems.KMH, 1),
        "ballast_pays_from_ms": _number(sweep.ballast_pays_from_ms),
        "full_ballast_from_ms": _number(sweep.full_ballast_from_ms),
        "scenario_ballast_kg": _number(sweep.scenario_ballast_kg, 2),
        "forecast_strength_ms": _number(sweep.forecast_strength_ms),
        "thermal_radius_m": _number(sweep.thermal_radius_m, 1),
        "thermal_radius_source": sweep.thermal_radius_source,
        "phases": sweep.phases,
        "by_thermal_size": [{
            "name": size.name, "thermal_radius_m": _number(size.thermal_radius_m, 1),
            "best_ballast_kg": [_number(b, 2) for b in size.best_ballast_kg],
            "ballast_pays_from_ms": _number(size.ballast_pays_from_ms),
            "full_ballast_from_ms": _number(size.full_ballast_from_ms),
            "achieved_climb_ms": grid(size.achieved_climb_ms),
        } for size in getattr(sweep, "by_thermal_size", ())],
        "cautions": cautions.general() + list(day_cautions) + cautions.notes_text(sweep.notes, unit_systems.METRIC),
    }


def sweep_verdict(sweep, units: UnitSystem | str = "metric") -> str:
    """Where ballast starts and stops paying, in one or two sentences."""
    units = _units(units)
    if sweep.ballast_kg.max() <= 0.0:
        return "This glider carries no water ballast."
    if not any(_finite(b) for b in sweep.best_ballast_kg):
        return "The task cannot be finished in any of these thermals."
    pays, full = sweep.ballast_pays_from_ms, sweep.full_ballast_from_ms
    if not _finite(pays):
        text = "Ballast never pays in this range: fly without water."
    else:
        text = f"Ballast pays from {_vertical(units, pays)} thermals; in weaker ones fly without water."
    if _finite(full):
        text += f" Full ballast is fastest from {_vertical(units, full)}."
    elif _finite(pays):
        text += " Full ballast is never the fastest here."
    return text


def forecast_line(sweep, units: UnitSystem | str = "metric") -> str:
    """Where the forecast day sits in the sweep: its peak thermal strength."""
    units = _units(units)
    if not _finite(sweep.forecast_strength_ms):
        return "The forecast's peak climb is beyond the circling model's range."
    return (f"The forecast's peak means thermals of about {_vertical(units, sweep.forecast_strength_ms)} "
            f"(this glider with {sweep.scenario_ballast_kg:g} kg of water).")


def _strength_label(units: UnitSystem, strength: float) -> str:
    return f"{units.vertical(strength):.1f} {units.vertical_label}"


def _source(sweep) -> str:
    return f" ({sweep.thermal_radius_source})" if getattr(sweep, "thermal_radius_source", "") else ""


def sweep_text(sweep, units: UnitSystem | str = "metric", day_cautions=()) -> str:
    """The readable sweep: strengths as rows, ballast as columns, task times H:MM, the best marked;
    the cautions end it (``day_cautions`` first)."""
    units = _units(units)
    lines = [f"Ballast against thermal strength: {sweep.task_name}",
             f"  path {units.fmt_distance(sweep.planned_distance_m)} as planned; thermals "
             f"{units.fmt_height(sweep.thermal_radius_m)} in radius{_source(sweep)}, the same strength all day "
             "until lift ends;"
             f" ballast in the task file {sweep.scenario_ballast_kg:g} kg", "",
             "Task time (H:MM) by thermal strength (rows) and water ballast (columns, kg);"
             " * the fastest, - not finished"]
    head = ["thermal"] + [f"{b:.0f}" for b in sweep.ballast_kg]
    rows = []
    for i, strength in enumerate(sweep.thermal_strength_ms):
        cells = [_strength_label(units, strength)]
        for j, ballast in enumerate(sweep.ballast_kg):
            mark = "*" if ballast == sweep.best_ballast_kg[i] else ""
            cells.append(mark + _duration(sweep.task_time_s[i, j]))
        rows.append(cells)
    lines += _table(head, rows)
    last = len(sweep.ballast_kg) - 1
    lines += ["", f"Per strength: achieved climb ({units.vertical_label}) and still-air cruise speed "
                  f"({units.speed_label}) empty and with {sweep.ballast_kg[last]:.0f} kg; the best ballast"]
    head = ["thermal", "climb empty", "full", "cruise empty", "full", "best ballast"]
    rows = []
    for i, strength in enumerate(sweep.thermal_strength_ms):
        climb, cruise = sweep.achieved_climb_ms[i], sweep.cruise_speed_ms[i]
        best = sweep.best_ballast_kg[i]
        rows.append([_strength_label(units, strength), f"{units.vertical(climb[0]):.1f}",
                     f"{units.vertical(climb[last]):.1f}", _speed(units, cruise[0]), _speed(units, cruise[last]),
                     f"{best:.0f} kg" if _finite(best) else DASH])
    lines += _table(head, rows)
    lines += thermal_size_lines(sweep, units)
    lines += ["", sweep_verdict(sweep, units), forecast_line(sweep, units), ""]
    lines += _caution_lines([*day_cautions, *cautions.notes_text(sweep.notes, units)])
    return "\n".join(lines)


def thermal_size_cells(sweep, units: UnitSystem | str = "metric") -> tuple[list[str], list[list[str]]]:
    """(head, rows) of the best ballast by thermal strength (rows) in narrow, typical and broad
    thermals (columns), from :func:`glidetask.engine.compare.sweep_by_thermal_size`; empty
    without them. For a table in any view."""
    units = _units(units)
    sizes = getattr(sweep, "by_thermal_size", ())
    if not sizes:
        return [], []
    head = ["thermal"] + [f"{size.name} {units.fmt_height(size.thermal_radius_m)}" for size in sizes]
    rows = [[_strength_label(units, strength)]
            + [f"{size.best_ballast_kg[i]:.0f} kg" if _finite(size.best_ballast_kg[i]) else DASH for size in sizes]
            for i, strength in enumerate(sweep.thermal_strength_ms)]
    return head, rows


def thermal_size_verdicts(sweep, units: UnitSystem | str = "metric") -> list[str]:
    """Per thermal size where ballast starts paying, one line each (empty without sizes)."""
    units = _units(units)
    lines = []
    for size in getattr(sweep, "by_thermal_size", ()):
        pays, full = size.ballast_pays_from_ms, size.full_ballast_from_ms
        text = f"{size.name.capitalize()} ({units.fmt_height(size.thermal_radius_m)}): "
        text += "ballast never pays" if not _finite(pays) else f"ballast pays from {_vertical(units, pays)}"
        text += f", full from {_vertical(units, full)}." if _finite(full) else "."
        lines.append(text)
    return lines


def thermal_size_lines(sweep, units: UnitSystem | str = "metric") -> list[str]:
    """The best ballast in narrow, typical and broad thermals side by side, as text lines."""
    head, rows = thermal_size_cells(sweep, units)
    if not rows:
        return []
    return (["", f"Best ballast by thermal size (radius of each; narrow and broad: the typical divided and "
             f"multiplied by {_radius_spread():g}, our choice); - not finished"]
            + _table(head, rows) + [f"  {line}" for line in thermal_size_verdicts(sweep, units)])


def _radius_spread() -> float:
    from glidetask.engine.thermals import RADIUS_SPREAD  # lazily: the UI imports this module at start-up

    return RADIUS_SPREAD


def _speed(units: UnitSystem, value_ms) -> str:
    return f"{units.speed(value_ms):.0f}" if _finite(value_ms) else DASH


def sweep_markdown(sweep, units: UnitSystem | str = "metric") -> str:
    """The sweep as a Markdown section (task times H:MM, the fastest in bold)."""
    units = _units(units)
    head = ["Thermal"] + [f"{b:.0f} kg" for b in sweep.ballast_kg]
    rows = []
    for i, strength in enumerate(sweep.thermal_strength_ms):
        cells = [_strength_label(units, strength)]
        for j, ballast in enumerate(sweep.ballast_kg):
            text = _duration(sweep.task_time_s[i, j])
            cells.append(f"**{text}**" if ballast == sweep.best_ballast_kg[i] else text)
        rows.append(cells)
    lines = ["## Ballast against thermal strength", "",
             f"Task time by thermal strength (constant all day, {units.fmt_height(sweep.thermal_radius_m)} radius) "
             "and water ballast; the fastest in bold, - not finished.", ""]
    lines += _markdown_table(head, rows) + ["", sweep_verdict(sweep, units) + " " + forecast_line(sweep, units), ""]
    lines += [f"- {note}" for note in cautions.notes_text(sweep.notes, units)]
    return "\n".join(lines) + "\n"


# ---------------------------------------------------------------- sensitivity


#: Why a what-if could not be flown, by the task-file key it made inconsistent.
REFUSED = {"[day] start_time": "at or after the end of lift", "[day] wind": "above the strongest wind allowed"}


def what_if_words(row, units: UnitSystem | str = "metric") -> tuple[str, str]:
    """(label, change) of a :class:`glidetask.engine.sensitivity.SensitivityRow` in ``units``:
    ``("Wind 10 km/h stronger", "wind 250/25 km/h")``. The text, the briefing, the UI and
    (in metric) the JSON all word the what-ifs here."""
    units, f = _units(units), row.facts
    if row.key == "forecast":
        label, change = "Forecast", "the plan as given"
    elif row.key == "weaker_climbs":
        by = _vertical(units, f["by_ms"])
        label = f"{'Thermals' if f['strength'] else 'Climbs'} {by} weaker"
        change = f"{'thermal strength' if f['strength'] else 'achieved climb'} -{by} all day"
    elif row.key == "more_wind":
        label = f"Wind {units.fmt_speed(f['by_ms'])} stronger"
        change = f"wind {f['from_deg']:03.0f}/{units.fmt_speed(f['speed_ms'])}"
    elif row.key == "later_start":
        label, change = f"Start {f['by_s'] / 60:.0f} min later", f"start {format_clock(f['start_time_s'])}"
    elif row.key == "more_bugs":
        label, change = f"{f['by_percent']:g} % more bugs", f"bugs {f['bugs_percent']:g} % (sink rate)"
    elif row.key == "pure_model":
        label = "No centring, no detour"
        change = f"centring 0 s, detour 0 % (planned: {f['centring_s']:g} s a climb, {f['detour_percent']:g} %)"
    else:
        raise ValueError(f"unknown what-if {row.key!r}")
    if "refused" in f:
        change += f": {REFUSED.get(f['refused'], 'not a valid input')}"
    return label, change


def _sensitivity_cells(s, units: UnitSystem) -> list[list[str]]:
    rows = []
    for row in s.rows:
        label, change = what_if_words(row, units)
        if row.finished:
            time, delta = _duration(row.total_time_s), "" if row.key == "forecast" else _signed_minutes(row.delta_s)
        elif _finite(row.total_time_s):
            time, delta = "lands out", f"at {units.fmt_distance(row.landout_m)}"
        else:
            time, delta = DASH, "cannot start"
        rows.append([label, change, time, delta])
    return rows


def sensitivity_to_dict(s) -> dict:
    """The sensitivity as JSON: one entry per what-if (its words in metric)."""
    metric = unit_systems.METRIC
    words = [what_if_words(row, metric) for row in s.rows]
    return {"rows": [{
        "what_if": row.key, "label": label, "change": change, "finished": row.finished,
        "total_time_s": _number(row.total_time_s, 0), "change_s": _number(row.delta_s, 0),
        "finish_time": format_clock(row.finish_time_s) if _finite(row.finish_time_s) else None,
        "landout_km": _number(row.landout_m / 1000.0) if _finite(row.landout_m) else None,
        "task_speed_kmh": _number(row.task_speed_ms / unit_systems.KMH, 1) if _finite(row.task_speed_ms) else None,
    } for row, (label, change) in zip(s.rows, words)], "notes": cautions.notes_text(s.notes, metric)}


def sensitivity_text(s, units: UnitSystem | str = "metric", *, heading: bool = True) -> str:
    """A small table: task time for each what-if and its change from the forecast."""
    units = _units(units)
    lines = ["How the task time answers to the day"] if heading else []
    lines += _table(["what if", "change", "task time", "vs forecast"], _sensitivity_cells(s, units), left=2)
    lines += [f"  {note}" for note in cautions.notes_text(s.notes, units)]
    return "\n".join(lines)


def sensitivity_markdown(s, units: UnitSystem | str = "metric", *, heading: bool = True) -> str:
    """The sensitivity table as a Markdown section."""
    units = _units(units)
    lines = ["## How the task time answers to the day", ""] if heading else []
    lines += _markdown_table(["What if", "Change", "Task time", "vs forecast"], _sensitivity_cells(s, units), left=2)
    lines += [""] + [f"- {note}" for note in cautions.notes_text(s.notes, units)]
    return "\n".join(lines).rstrip() + "\n"


# ---------------------------------------------------------------- odds


def reason_words(key: str) -> str:
    from glidetask.engine.simulate import LANDOUT_REASONS  # lazily: the UI imports this module at start-up

    return {k: words for k, words in LANDOUT_REASONS.values()}.get(key, key)


def odds_to_dict(odds, day_cautions=()) -> dict:
    """The simulation as JSON: assumptions, and per ballast choice the odds, times and land-outs;
    cautions in metric, ``day_cautions`` before its own."""
    spread = odds.spread
    legs = [{"leg": i + 1, "from": a, "to": b} for i, (a, b) in enumerate(odds.legs)]
    choices = []
    for c in odds.choices:
        p10, p50, p90 = (_number(t, 0) for t in c.task_time_s)
        choices.append({
            "ballast_kg": _number(c.ballast_kg, 2), "mass_kg": _number(c.mass_kg, 2), "runs": c.runs,
            "finished_runs": c.finished, "finish_probability": _number(c.finish_probability, 4),
            "finish_probability_se": _number(c.finish_probability_se, 4),
            "task_time_s": {"p10": p10, "p50": p50, "p90": p90},
            "landouts_by_leg": [{**leg, "count": n} for leg, n in zip(legs, c.landouts_by_leg)],
            "landouts_by_reason": dict(c.landouts_by_reason),
            "forecast_task_time_s": _number(c.forecast_time_s, 0), "forecast_finished": c.forecast_finished,
        })
    return {
        "task": {"name": odds.task_name, "legs": legs},
        "runs": odds.runs, "seed": odds.seed,
        "assumptions": {
            "climb_log_sd": spread.climb_log_sd,
            "wind_speed_sd_kmh": _number(spread.wind_speed_sd_ms / unit_systems.KMH, 2),
            "wind_direction_sd_deg": spread.wind_direction_sd_deg,
            "lift_end_sd_s": spread.lift_end_sd_s,
            "thermal_search_mean_km": _number(spread.thermal_search_mean_m / 1000.0),
            "thermal_search_source": cautions.search_source(odds, unit_systems.METRIC) or "given",
            "bad_day_probability": spread.bad_day_probability,
            "bad_day_early_s": list(spread.bad_day_early_s),
        },
        "choices": choices,
        "thermal_spacing": [{
            "factor": row.factor, "thermal_search_mean_km": _number(row.search_mean_m / 1000.0),
            "choices": [{"ballast_kg": _number(c.ballast_kg, 2), "finish_probability": _number(p, 4),
                         "finish_probability_se": _number(se, 4)}
                        for c, p, se in zip(odds.choices, row.finish_probability, row.finish_probability_se)],
        } for row in getattr(odds, "spacing", ())],
        "cautions": cautions.general() + list(day_cautions) + cautions.notes_text(odds.notes, unit_systems.METRIC),
    }


def probability_bar(p: float, width: int = BAR_WIDTH) -> str:
    """``█████░░░`` filled in proportion to ``p`` (eighths of a cell)."""
    if not _finite(p):
        return " " * width
    eighths = int(round(max(0.0, min(1.0, p)) * width * 8))
    full, part = divmod(eighths, 8)
    partial = " ▏▎▍▌▋▊▉"[part] if part else ""
    return ("█" * full + partial).ljust(width, "░")[:width]


def assumption_text(odds, units: UnitSystem) -> str:
    """The spread of days assumed, in one line."""
    s = odds.spread
    source = cautions.search_source(odds, units)
    return (f"strength x exp(N(0, {s.climb_log_sd:g})); wind +/- {units.fmt_speed(s.wind_speed_sd_ms)}, "
            f"+/- {s.wind_direction_sd_deg:.0f} deg; end of lift +/- {s.lift_end_sd_s / 60:.0f} min; "
            f"{cautions.bad_day_words(s)}; next climb on average {units.fmt_distance(s.thermal_search_mean_m)} beyond "
            f"the band bottom" + (f" ({source})" if source else ""))


def spacing_lines(odds, units: UnitSystem) -> list[str]:
    """The finishing odds against thermal spacing (empty without a spacing table)."""
    rows = getattr(odds, "spacing", ())
    if not rows:
        return []
    lines = ["Finish against thermal spacing (the same days, the thermals closer or further apart)"]
    head = ["spacing", "next climb"] + [f"{c.ballast_kg:.0f} kg" for c in odds.choices]
    cells = [[f"{row.factor:g} x" + (" (day)" if row.factor == 1.0 else ""), units.fmt_distance(row.search_mean_m)]
             + [f"{100 * p:.1f} %" for p in row.finish_probability] for row in rows]
    lines += _table(head, cells, left=1)
    lines += ["  next climb: mean distance beyond the band bottom to the next usable thermal on the forecast day",
              ""]
    return lines


def odds_text(odds, units: UnitSystem | str = "metric", day_cautions=()) -> str:
    """The readable odds: a bar and percentiles per ballast, land-outs by leg and why; the
    cautions end it (``day_cautions`` first)."""
    units = _units(units)
    lines = [f"Odds of getting home: {odds.task_name}",
             f"  {odds.runs} simulated days around the forecast (seed {odds.seed}), the same days for each ballast",
             f"  spread (planning assumptions, not a forecast): {assumption_text(odds, units)}", ""]
    head = ["ballast", "finish", "+/-", "", "10%", "50%", "90%", "forecast day"]
    rows = []
    for c in odds.choices:
        p10, p50, p90 = (_duration(t) for t in c.task_time_s)
        rows.append([f"{c.ballast_kg:.0f} kg", f"{100 * c.finish_probability:.1f} %",
                     f"{100 * c.finish_probability_se:.1f}", probability_bar(c.finish_probability), p10, p50, p90,
                     _duration(c.forecast_time_s) if c.forecast_finished else "lands out"])
    lines += _table(head, rows)
    lines += ["  finish: share of days the task is finished (+/- one standard error); 10/50/90 %: task time"
              " (H:MM) among the finishers", ""]
    lines += spacing_lines(odds, units)
    lines.append("Land-outs by leg (days out of " + str(odds.runs) + ")")
    head = ["leg"] + [f"{c.ballast_kg:.0f} kg" for c in odds.choices]
    rows = [[f"{i + 1} {a} > {b}"] + [str(c.landouts_by_leg[i]) for c in odds.choices]
            for i, (a, b) in enumerate(odds.legs)]
    lines += _table(head, rows)
    reasons = sorted({key for c in odds.choices for key, _ in c.landouts_by_reason})
    if reasons:
        lines += ["", "Why (days)"]
        rows = [[reason_words(key)] + [str(dict(c.landouts_by_reason).get(key, 0)) for c in odds.choices]
                for key in reasons]
        lines += _table(["reason"] + [f"{c.ballast_kg:.0f} kg" for c in odds.choices], rows)
    lines += [""] + _caution_lines([*day_cautions, *cautions.notes_text(odds.notes, units)])
    return "\n".join(lines)


def odds_markdown(odds, units: UnitSystem | str = "metric") -> str:
    """The odds as a Markdown section."""
    units = _units(units)
    rows = [[f"{c.ballast_kg:.0f} kg", f"{100 * c.finish_probability:.1f} % ± {100 * c.finish_probability_se:.1f}",
             *(_duration(t) for t in c.task_time_s), str(c.runs - c.finished)] for c in odds.choices]
    lines = ["## Odds of getting home", "",
             f"{odds.runs} simulated days around the forecast (seed {odds.seed}); spread (our planning "
             f"assumptions, not a forecast): {assumption_text(odds, units)}.", ""]
    lines += _markdown_table(["Ballast", "Finish", "10 %", "50 %", "90 %", "Land-outs"], rows)
    lines += [""] + [f"- {note}" for note in cautions.notes_text(odds.notes, units)]
    return "\n".join(lines) + "\n"
