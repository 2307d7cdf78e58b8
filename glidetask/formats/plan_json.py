"""A plan as the contract's JSON (shared/CONTRACT.md 5.3).

Every key carries its unit as a suffix (``_km``, ``_m``, ``_s``, ``_kmh``, ``_ms``,
``_kg``, ``_deg``, ``_kgm2``); numbers that are undefined (a leg not reached, the
finish time of a plan that ends short) are ``null``. Keys beyond the contract's are
additions, never changes of meaning: ``planned_distance_km``, ``start_time``,
``reason``, ``day`` (with ``circling``), per leg ``final_glide`` and ``start_time``, ``sensitivity`` (the task
time under what-ifs), and the extras inside ``terrain`` and ``landables``.
"""

from __future__ import annotations

import math
from typing import Any

from glidetask.engine.scenario import WindProfile
from glidetask.units import KMH, format_clock


def jsonable(value: Any) -> Any:
    """Plain JSON types: numpy scalars to Python, NaN/inf to None, tuples to lists."""
    if isinstance(value, dict):
        return {str(k): jsonable(v) for k, v in value.items()}
    if isinstance(value, (list, tuple)):
        return [jsonable(v) for v in value]
    if hasattr(value, "tolist"):  # numpy scalar or array
        return jsonable(value.tolist())
    if isinstance(value, float) and not math.isfinite(value):
        return None
    return value


def _number(value, scale: float = 1.0, digits: int = 3):
    """``value / scale`` rounded, or None where undefined."""
    if value is None:
        return None
    value = float(value)
    if not math.isfinite(value):
        return None
    return round(value / scale, digits)


def _leg(leg) -> dict[str, Any]:
    return {
        "from": leg.from_name,
        "to": leg.to_name,
        "distance_km": _number(leg.distance_m, 1000.0),
        "course_deg": _number(leg.course_deg, digits=1),
        "climb_ms": _number(leg.climb_ms, digits=2),
        "mc_ms": _number(leg.mc_ms, digits=2),
        "airspeed_kmh": _number(leg.airspeed_ms, KMH, 1),
        "indicated_airspeed_kmh": _number(leg.indicated_airspeed_ms, KMH, 1),
        "heading_deg": _number(leg.heading_deg, digits=1),
        "glide_ground_speed_kmh": _number(leg.glide_ground_speed_ms, KMH, 1),
        "cruise_speed_kmh": _number(leg.cruise_speed_ms, KMH, 1),
        "time_s": _number(leg.time_s, digits=0),
        "average_speed_kmh": _number(leg.average_speed_ms, KMH, 1),
        "required_height_m": _number(leg.required_height_m, digits=0),
        "arrival_height_m": _number(leg.arrival_height_m, digits=0),
        "final_glide": leg.final_glide,
        "start_time": format_clock(leg.start_time_s) if math.isfinite(leg.start_time_s) else None,
    }


def _task(plan) -> dict[str, Any]:
    task = plan.scenario.task
    out = {
        "name": task.name,
        "kind": task.kind,
        "nominal_distance_km": _number(plan.nominal_distance_m, 1000.0),
        "optimized_distance_km": _number(plan.optimized_distance_m, 1000.0),
    }
    if plan.area is not None:
        out.update({
            "min_distance_km": _number(plan.area.min_distance_m, 1000.0),
            "max_distance_km": _number(plan.area.max_distance_m, 1000.0),
            "target_distance_km": _number(plan.area.target_distance_m, 1000.0),
            "min_time_s": _number(plan.area.min_time_s, digits=0),
        })
    return out


def _wind(wind):
    """``{from_deg, speed_kmh}``, or a profile's levels as the task file gives them (contract 2.3)."""
    if isinstance(wind, WindProfile):
        return [{"height_m": _number(level.height_m, digits=0), "from_deg": _number(level.from_deg, digits=0),
                 "speed_kmh": _number(level.speed_ms, KMH, 1)} for level in wind.levels]
    return {"from_deg": _number(wind.from_deg, digits=0), "speed_kmh": _number(wind.speed_ms, KMH, 1)}


def _day(plan) -> dict[str, Any]:
    day, safety = plan.scenario.day, plan.scenario.safety
    profile = day.climb if day.climb is not None else day.thermal_strength
    return {
        "start_time": format_clock(day.start_time_s),
        "start_height_m": _number(day.effective_start_height_m, digits=0),
        "band_top_m": _number(day.band_top_m, digits=0),
        "band_bottom_m": _number(day.band_bottom_m, digits=0),
        "wind": _wind(day.wind),
        "lift_profile": "climb_ms" if day.climb is not None else "thermal_strength_ms",
        "lift": [[format_clock(t), v] for t, v in zip(profile.times_s, profile.values)],
        "lift_ends": format_clock(day.lift_ends_s),
        "mc_ms": _number(day.mc_ms, digits=2),
        "final_glide_mc_ms": _number(safety.final_glide_mc_ms, digits=2),
        "arrival_margin_m": _number(safety.arrival_margin_m, digits=0),
        "glide_airmass_ms": _number(day.glide_airmass_ms, digits=2),
        "isa_deviation_c": _number(day.isa_deviation_c, digits=1),
        **_band_top_and_source(plan.scenario),
        "circling": circling_dict(plan.scenario),
    }


def circling_dict(scenario) -> dict[str, Any] | None:
    """``day.circling``: the best circle in the day's strongest thermals for the glider as
    loaded (:func:`glidetask.engine.circling_card.day_circling`), or None with no lift."""
    from glidetask.engine.circling_card import day_circling

    card = day_circling(scenario)
    if card is None:
        return None
    best = card.solution
    return {
        "time": format_clock(card.time_s),
        "core_strength_ms": _number(card.strength_ms, digits=2),
        "thermal_radius_m": _number(card.thermal_radius_m, digits=0),
        "height_m": _number(card.height_m, digits=0),
        "bank_deg": _number(best.bank_deg, digits=0),
        "airspeed_kmh": _number(best.airspeed_ms, KMH, 1),
        "indicated_airspeed_kmh": _number(card.indicated_airspeed_ms, KMH, 1),
        "circle_radius_m": _number(best.turn_radius_m, digits=0),
        "updraft_at_circle_ms": _number(best.updraft_ms, digits=2),
        "circling_sink_ms": _number(best.sink_ms, digits=2),
        "climb_ms": _number(best.climb_ms, digits=2),
    }


def _band_top_and_source(scenario) -> dict[str, Any]:
    """``band_top`` (the band top through the day, ``[["HH:MM", m], ...]``, when there is
    one; ``band_top_m`` is then its highest value) and ``source`` (for a day from a
    sounding: ``sounding`` file, the keys ``derived`` from it and those ``typed`` over it)."""
    day, source, out = scenario.day, scenario.day_source, {}
    if day.band_top_profile is not None:
        out["band_top"] = [[format_clock(t), _number(v, digits=0)]
                           for t, v in zip(day.band_top_profile.times_s, day.band_top_profile.values)]
    if source is not None:
        out["source"] = {"sounding": source.sounding_file, "derived": list(source.derived_keys),
                         "typed": list(source.overridden)}
    return out


_DIGITS = (("_km", 3), ("_m", 1), ("_percent", 2), ("_deg", 1), ("lat", 6), ("lon", 6))


def _rounded(value, key: str = ""):
    """Numbers rounded as the rest of the plan rounds them, by the unit of their key
    (``_km`` to metres, ``_m`` to decimetres, ``_percent`` to 0.01, degrees of course or
    bearing to 0.1, positions to 6 decimals of a degree, about 0.1 m)."""
    if isinstance(value, dict):
        return {k: _rounded(v, k) for k, v in value.items()}
    if isinstance(value, (list, tuple)):
        return [_rounded(v, key) for v in value]
    if isinstance(value, float):
        digits = next((d for suffix, d in _DIGITS if key.endswith(suffix)), None)
        return _number(value, digits=digits) if digits is not None else _number(value, digits=6)
    return value


def _leg_names(plan) -> list[tuple[str, str]]:
    return [(leg.from_name, leg.to_name) for leg in plan.legs]


def terrain_dict(plan) -> dict[str, Any] | None:
    """The contract's ``terrain`` object (5.3), or None when the task has no elevation model.

    ``source``, ``ok``, ``final_glide_min_clearance_m``, ``at_km`` (distance along the task)
    and the extras of :func:`glidetask.formats.safety_report.terrain_to_dict` (``raised_by_m``,
    ``obstacle``, ...). ``ok`` is true only when the final glide clears the terrain by the
    clearance and the model covers the whole planned path (``task_covered_percent``,
    ``task_uncovered``); a plan with no final glide has ``ok`` false and a ``reason``.
    """
    from glidetask.formats.safety_report import terrain_to_dict  # lazily: jsonable's users need none of it

    if plan.terrain_source is None:
        return None
    if plan.terrain is not None:
        out = terrain_to_dict(plan.terrain, source=plan.terrain_source)
        out["final_glide_from_km"] = _number(plan.final_glide_from_m, 1000.0)
    else:
        out = {"source": plan.terrain_source, "ok": False, "final_glide_min_clearance_m": None, "at_km": None,
               "reason": "the plan has no final glide to check"}
    out["ok"] = bool(plan.terrain_ok)
    path = plan.terrain_path
    if path is not None:
        out["task_covered_percent"] = _number(100.0 * path.profile.covered_share, digits=1)
        out["task_uncovered"] = [{"from_km": _number(a, 1000.0), "to_km": _number(b, 1000.0)}
                                 for a, b in path.profile.uncovered_ranges()]
    out["floors"] = [{"from_km": _number(f.from_m, 1000.0), "to_km": _number(f.to_m, 1000.0),
                      "floor_m": _number(f.floor_m, digits=0)} for f in plan.floors]
    out["uncovered"] = [{"from_km": _number(a, 1000.0), "to_km": _number(b, 1000.0)} for a, b in plan.uncovered]
    return _rounded(out)


def profile_dict(plan) -> dict[str, Any] | None:
    """The contract's ``profile`` (5.3 addition): the planned height of the whole flight, lists
    of equal length (``terrain_m`` null where unknown)."""
    p = plan.profile
    if p is None:
        return None
    return {"distance_km": [_number(d, 1000.0) for d in p.distance_m.tolist()],
            "height_m": [_number(h, digits=0) for h in p.height_m.tolist()],
            "terrain_m": [_number(t, digits=0) for t in p.terrain_m.tolist()],
            "phase": list(p.phase)}


def airspace_dict(plan) -> dict[str, Any] | None:
    """The contract's ``airspace`` (5.3 addition): ``source``, ``ok``, ``conflicts`` (legs from 1,
    heights MSL; a floor at the ground is null) and ``capped``; None without airspace."""
    check = plan.airspace
    if check is None:
        return None

    def height(value):
        return None if value is None or not math.isfinite(value) else _number(value, digits=0)

    conflicts = [{"name": c.name, "class": c.airspace_class, "leg": c.leg, "from_km": _number(c.from_m, 1000.0),
                  "to_km": _number(c.to_m, 1000.0), "floor_m": height(c.floor_m), "ceiling_m": height(c.ceiling_m),
                  "planned_min_m": height(c.planned_min_m), "planned_max_m": height(c.planned_max_m)}
                 for c in check.conflicts]
    capped = [{"from_km": _number(c.from_m, 1000.0), "to_km": _number(c.to_m, 1000.0), "top_m": height(c.top_m),
               "name": c.name} for c in check.caps]
    return {"source": check.source, "ok": bool(check.ok), "margin_m": plan.scenario.safety.airspace_margin_m,
            "conflicts": conflicts, "capped": capped}


def landout_dict(plan) -> dict[str, Any] | None:
    """The contract's ``landout`` (5.3 addition), null when the plan finishes."""
    landout = plan.landout
    if landout is None:
        return None
    return {"at_km": _number(landout.at_m, 1000.0), "field": landout.field, "lat": _number(landout.lat, digits=5),
            "lon": _number(landout.lon, digits=5), "elevation_m": _number(landout.elevation_m, digits=0)}


def landables_dict(plan) -> dict[str, Any] | None:
    """The contract's ``landables`` object (5.3), or None when no turnpoint is landable.

    ``coverage_percent``, ``gaps`` [{``from_km``, ``to_km``}], ``by_leg`` [{``leg`` (from 1),
    ``nearest``, ``distance_km``}] and the extras of
    :func:`glidetask.formats.safety_report.landables_to_dict` (``reason`` of each gap,
    ``alternates``, the leg's ``from`` and ``to``, the heights and margins used).
    """
    from glidetask.formats.safety_report import landables_to_dict  # lazily: jsonable's users need none of it

    if plan.landables is None:
        return None
    return _rounded(landables_to_dict(plan.landables, leg_names=_leg_names(plan)))


def plan_to_dict(plan, sensitivity=None) -> dict[str, Any]:
    """The plan as the contract's ``plan --json`` object (5.3), JSON-ready (no NaN).

    Parameters
    ----------
    plan : glidetask.engine.plan.Plan
    sensitivity : glidetask.engine.sensitivity.Sensitivity, optional
        The task time under what-ifs (:func:`glidetask.engine.sensitivity.plan_sensitivity`),
        added as ``sensitivity`` when given.

    Returns
    -------
    dict
        ``task``, ``glider``, ``legs``, ``total_time_s``, ``task_speed_kmh``, ``finished``,
        ``finish_time``, ``landout_km``, ``final_glide``, ``cautions``, and the additions
        named in the module docstring; ``terrain`` (with an elevation model), ``landables``
        (with landable turnpoints) and ``sensitivity`` when given.
    """
    final = None
    if math.isfinite(plan.final_glide_from_m):
        final = {"from_km": _number(plan.final_glide_from_m, 1000.0),
                 "start_height_m": _number(plan.final_glide_height_m, digits=0),
                 "mc_ms": _number(plan.final_glide_mc_ms, digits=2)}
    out: dict[str, Any] = {
        "task": _task(plan),
        "glider": {
            "label": plan.scenario.glider.spec.label,
            "mass_kg": _number(plan.mass_kg, digits=1),
            "wing_loading_kgm2": _number(plan.wing_loading_kgm2, digits=2),
            "best_ld": _number(plan.best_ld, digits=1),
            "best_ld_speed_kmh": _number(plan.best_ld_speed_ms, KMH, 1),
        },
        "planned_distance_km": _number(plan.planned_distance_m, 1000.0),
        "start_time": format_clock(plan.start_time_s),
        "legs": [_leg(leg) for leg in plan.legs],
        "total_time_s": _number(plan.total_time_s, digits=0),
        "task_speed_kmh": _number(plan.task_speed_ms, KMH, 2),
        "finished": bool(plan.finished),
        "finish_time": format_clock(plan.finish_time_s) if plan.finished else None,
        "landout_km": None if plan.finished else _number(plan.landout_m, 1000.0),
        "final_glide": final if final is not None else {"from_km": None, "start_height_m": None, "mc_ms": None},
        "reason": plan.reason,
        "day": _day(plan),
        "cautions": list(plan.cautions),
    }
    out["profile"] = profile_dict(plan)
    out["landout"] = landout_dict(plan)
    if plan.airspace is not None:
        out["airspace"] = airspace_dict(plan)
    terrain, landables = terrain_dict(plan), landables_dict(plan)
    if terrain is not None:
        out["terrain"] = terrain
    if landables is not None:
        out["landables"] = landables
    if sensitivity is not None:
        from glidetask.formats.strategy_report import sensitivity_to_dict  # lazily: jsonable's users need none of it

        out["sensitivity"] = sensitivity_to_dict(sensitivity)
    return out
