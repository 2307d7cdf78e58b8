"""``glidetask day TASK.toml``: the day derived from the task's sounding (contract 2.7).

Reads the task file's ``[day] sounding`` (a CSV sounding) and ``surface`` forecast and
derives, for each whole hour, the thermal top, cloud base, cumulus or blue, the working
band and the thermal strength, the lift start and end, and the wind profile from the
sounding (:func:`glidetask.engine.sounding.derive_day`). Text output: an hourly table,
the wind profile and the cautions; ``--json``: per hour ``time``, ``thermal_top_m``,
``cloud_base_m`` (null without cumulus), ``cumulus``, ``band_top_m``, ``band_bottom_m``
(null without a working band), ``thermal_strength_ms``, plus ``lcl_m``, ``wstar_ms``,
``surface_temperature_c``; ``lift_start``, ``lift_end``, ``trigger_temperature_c``,
``cape_jkg``, ``wind`` (``height_m``, ``from_deg``, ``speed_kmh``) and ``cautions``.
"""

from __future__ import annotations

import argparse
import math
from pathlib import Path

from glidetask import cautions, units
from glidetask.commands._output import caution_block, print_json
from glidetask.formats.sounding_file import load_derived_day


def _number(value: float):
    return None if value is None or not math.isfinite(value) else float(value)


def day_to_dict(derived, unit: units.UnitSystem = units.METRIC) -> dict:
    """The contract's JSON object for a :class:`glidetask.engine.sounding.DerivedDay`."""
    hours = []
    for i, time_s in enumerate(derived.times_s):
        hours.append({
            "time": units.format_clock(time_s),
            "surface_temperature_c": round(float(derived.surface_temperature_c[i]), 2),
            "surface_dewpoint_c": round(float(derived.surface_dewpoint_c[i]), 2),
            "thermal_top_m": _number(derived.thermal_top_m[i]),
            "lcl_m": _number(derived.lcl_m[i]),
            "cloud_base_m": _number(derived.cloud_base_m[i]),
            "cumulus": bool(derived.cumulus[i]),
            "band_top_m": _number(derived.band_top_m[i]),
            "band_bottom_m": _number(derived.band_bottom_m[i]),
            "heat_flux_kms": _number(derived.heat_flux_kms[i]),
            "wstar_ms": _number(derived.wstar_ms[i]),
            "thermal_strength_ms": _number(derived.thermal_strength_ms[i]),
        })
    clock = lambda t: None if t is None else units.format_clock(t)  # noqa: E731
    return {
        "hours": hours,
        "lift_start": clock(derived.lift_start_s),
        "lift_end": clock(derived.lift_end_s),
        "trigger_temperature_c": derived.trigger_temperature_c,
        "cape_jkg": derived.cape_jkg,
        "surface_elevation_m": derived.surface_elevation_m,
        "band_top_margin_m": derived.band_top_margin_m,
        "band_bottom_agl_m": derived.band_bottom_agl_m,
        "wind": [{"height_m": w.height_m, "from_deg": w.from_deg, "speed_kmh": w.speed_ms / units.KMH}
                 for w in derived.wind],
        "cautions": cautions.general() + cautions.sounding_cautions(derived.facts, unit),
    }


def day_text(derived, unit: units.UnitSystem, title: str) -> str:
    """The hourly table, lift times, wind profile and cautions as text."""
    h = unit.height_label
    height = lambda v: "-" if not math.isfinite(v) else f"{unit.height(v):.0f}"  # noqa: E731
    lines = [f"{title}: the day from its sounding",
             f"  ground {unit.fmt_height(derived.surface_elevation_m)}; band top {unit.fmt_height(derived.band_top_margin_m)}"
             f" below cloud base or thermal top, band bottom {unit.fmt_height(derived.band_bottom_agl_m)} above the ground",
             "",
             f"  Time  Surface    Thermal    Cloud  Sky      Band     Band     w*  Thermal",
             f"        temp/dew C   top {h:>3}  base {h:>3}         bottom {h:>2}  top {h:>3}  {unit.vertical_label:>4}"
             f"  {unit.vertical_label:>7}"]
    for i, time_s in enumerate(derived.times_s):
        sky = "cumulus" if derived.cumulus[i] else "blue"
        lines.append(f"  {units.format_clock(time_s)}  {derived.surface_temperature_c[i]:5.1f}/{derived.surface_dewpoint_c[i]:4.1f}"
                     f"  {height(derived.thermal_top_m[i]):>9}  {height(derived.cloud_base_m[i]):>7}  {sky:<7}"
                     f"  {height(derived.band_bottom_m[i]):>7}  {height(derived.band_top_m[i]):>7}"
                     f"  {unit.vertical(derived.wstar_ms[i]):5.1f}  {unit.vertical(derived.thermal_strength_ms[i]):7.1f}")
    lines.append("")
    if derived.lift_start_s is None:
        lines.append(f"Lift      none: the trigger temperature is {derived.trigger_temperature_c:.1f} C")
    else:
        lines.append(f"Lift      {units.format_clock(derived.lift_start_s)} to {units.format_clock(derived.lift_end_s)}"
                     f" (trigger temperature {derived.trigger_temperature_c:.1f} C)")
    if derived.cumulus.any():
        lines.append(f"CAPE      {derived.cape_jkg:.0f} J/kg (surface air, warmest hour with cumulus)")
    else:
        lines.append("CAPE      not judged: no cumulus forms, the thermals stay below the cloud base")
    lines += ["", f"Wind from the sounding ({h} MSL, from, {unit.speed_label})"]
    lines += [f"  {unit.height(w.height_m):7.0f}  {w.from_deg:03.0f}  {unit.speed(w.speed_ms):4.0f}" for w in derived.wind]
    lines += ["", caution_block(cautions.sounding_cautions(derived.facts, unit))]
    return "\n".join(lines)


def run(args: argparse.Namespace) -> int:
    _, derived = load_derived_day(args.task)
    unit = units.by_name(args.units)
    if args.json:
        print_json(day_to_dict(derived, unit))
    else:
        print(day_text(derived, unit, Path(args.task).name))
    return 0
