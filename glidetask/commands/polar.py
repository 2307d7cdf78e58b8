"""``glidetask polar FILE``: a polar's figures and a speed-to-fly card (contract 4 and 5.1).

The card is for still air at the chosen altitude, mass and bugs. Speeds are true
airspeeds (the contract's JSON); the text card also shows the indicated airspeed a pilot
reads on the instrument.
"""

from __future__ import annotations

import argparse

import numpy as np

from glidetask import cautions, units
from glidetask.cli import CMDLINE, check_number
from glidetask.commands._output import caution_block, print_json
from glidetask.engine.atmosphere import density_ratio, ias_from_tas_at
from glidetask.engine.polar import Polar, PolarSpec
from glidetask.engine.scenario import GliderSetup
from glidetask.engine.speedtofly import cruise_in_wind, speed_to_fly_still_air
from glidetask.errors import InputError, Problem
from glidetask.formats.polar_file import loading_problems, read_polar_spec
from glidetask.units import KMH

CARD_SETTINGS_MS = tuple(0.5 * i for i in range(11))  # MacCready 0.0 ... 5.0 m/s (contract 5.1)
CARD_SETTINGS_KT = tuple(float(i) for i in range(11))  # the aviation card: 0 ... 10 kt


def glider_problems(args: argparse.Namespace, polar_file: str) -> tuple[PolarSpec | None, list[Problem]]:
    """Read the polar file and check the loading options against it (shared by ``glide``).

    Every problem is returned together: the options', the file's and the loading's.
    """
    loading = check_number(args, "pilot-kg", strictly_positive=True) + check_number(args, "ballast-kg", minimum=0.0)
    problems = loading + (check_number(args, "bugs-percent", minimum=0.0, maximum=100.0)
                          + check_number(args, "isa-deviation-c", minimum=-60.0, maximum=60.0))
    spec, file_problems = read_polar_spec(polar_file)
    problems += file_problems
    if spec is not None and not loading:
        # The limits are the file's: say so, as the options may be defaults the user never typed.
        problems += [Problem(p.file, p.where, f"{p.what} (limits from {polar_file})")
                     for p in loading_problems(spec, args.pilot_kg, args.ballast_kg, file=CMDLINE,
                                               pilot_where="--pilot-kg", ballast_where="--ballast-kg")]
    return spec, problems


def speed_card(polar: Polar, sigma: float, settings_ms) -> list[dict]:
    """Still-air speed to fly and cruise speed for each MacCready setting (SI and km/h)."""
    settings = np.asarray(settings_ms, dtype=float)
    speeds = np.asarray(speed_to_fly_still_air(polar, settings))
    cruise = np.asarray(cruise_in_wind(polar, settings, 0.0, 0.0).cruise_speed_ms)
    return [{"mc_ms": float(m), "speed_kmh": float(v / KMH), "cruise_speed_kmh": float(c / KMH),
             "speed_ias_kmh": float(ias_from_tas_at(v, sigma) / KMH)}
            for m, v, c in zip(settings, speeds, cruise)]


def polar_payload(args: argparse.Namespace, spec: PolarSpec, polar: Polar, sigma: float) -> dict:
    """The contract 5.1 JSON (plus context keys) for one scaled polar."""
    return {
        "polar_file": args.file,
        "label": spec.label,
        "mass_kg": polar.mass_kg,
        "pilot_kg": args.pilot_kg,
        "ballast_kg": args.ballast_kg,
        "bugs_percent": args.bugs_percent,
        "altitude_m": args.altitude_m,
        "isa_deviation_c": args.isa_deviation_c,
        "density_ratio": sigma,
        "wing_loading_kgm2": polar.wing_loading_kgm2,
        "coefficients": {"a": polar.a, "b": polar.b, "c": polar.c},
        "fit_rms_ms": polar.fit_rms_ms,
        "min_sink_ms": polar.min_sink_ms,
        "min_sink_speed_kmh": polar.min_sink_speed_ms / KMH,
        "best_ld": polar.best_ld,
        "best_ld_speed_kmh": polar.best_ld_speed_ms / KMH,
        "min_speed_kmh": polar.min_speed_ms / KMH,
        "vne_kmh": polar.vne_ms / KMH,
        "speed_to_fly": speed_card(polar, sigma, CARD_SETTINGS_MS),
        "cautions": cautions.general(),
    }


def _speed(unit: units.UnitSystem, speed_ms: float, sigma: float) -> str:
    """``"128 km/h (120 IAS)"``: true airspeed with the indicated one beside it."""
    return f"{unit.speed(speed_ms):.0f} {unit.speed_label} ({unit.speed(ias_from_tas_at(speed_ms, sigma)):.0f} IAS)"


def polar_text(args: argparse.Namespace, spec: PolarSpec, polar: Polar, sigma: float) -> str:
    """The readable figures and speed-to-fly card."""
    unit = units.by_name(args.units)
    vertical = f"{{:.2f}} {unit.vertical_label}"
    lines = [
        f"Polar: {spec.label}",
        f"  file             {args.file}",
        f"  mass             {polar.mass_kg:.0f} kg (empty {spec.empty_mass_kg:g} + pilot {args.pilot_kg:g}"
        f" + ballast {args.ballast_kg:g})",
        f"  wing loading     {polar.wing_loading_kgm2:.1f} kg/m2",
        f"  air              {unit.fmt_height(args.altitude_m)} MSL, ISA {args.isa_deviation_c:+g} C,"
        f" density ratio {sigma:.3f}",
        f"  bugs             {args.bugs_percent:g} % more sink",
        f"  minimum sink     {vertical.format(unit.vertical(polar.min_sink_ms))} at "
        f"{_speed(unit, polar.min_sink_speed_ms, sigma)}",
        f"  best glide       1:{polar.best_ld:.1f} at {_speed(unit, polar.best_ld_speed_ms, sigma)}",
        f"  valid speeds     {_speed(unit, polar.min_speed_ms, sigma)} to {_speed(unit, polar.vne_ms, sigma)}",
        f"  fit              sink = a v^2 + b v + c (TAS m/s): a = {polar.a:.5f}, b = {polar.b:.4f},"
        f" c = {polar.c:.3f}; RMS residual {polar.fit_rms_ms:.3f} m/s",
        "",
        "Speed to fly in still air (true airspeed, indicated in brackets)",
        f"  {'MacCready':<12}{'speed to fly':<22}{'cruise speed (climbs at MacCready)'}",
    ]
    aviation = unit.name == "aviation"
    settings = np.asarray(CARD_SETTINGS_KT) * unit.vertical_ms if aviation else CARD_SETTINGS_MS
    for row in speed_card(polar, sigma, settings):
        setting = f"{unit.vertical(row['mc_ms']):.0f} {unit.vertical_label}" if aviation else \
            f"{row['mc_ms']:.1f} {unit.vertical_label}"
        cruise = row["cruise_speed_kmh"]
        cruise_text = "-" if not np.isfinite(cruise) else unit.fmt_speed(cruise * KMH)
        lines.append(f"  {setting:<12}{_speed(unit, row['speed_kmh'] * KMH, sigma):<22}{cruise_text}")
    lines += ["", caution_block()]
    return "\n".join(lines)


def run(args: argparse.Namespace) -> int:
    spec, problems = glider_problems(args, args.file)
    problems += check_number(args, "altitude-m", minimum=-1000.0, maximum=15000.0)
    if problems:
        raise InputError(problems)
    sigma = density_ratio(args.altitude_m, args.isa_deviation_c)
    polar = GliderSetup(spec, args.pilot_kg, args.ballast_kg, args.bugs_percent).polar_at(args.altitude_m,
                                                                                          args.isa_deviation_c)
    if args.json:
        print_json(polar_payload(args, spec, polar, sigma))
    else:
        print(polar_text(args, spec, polar, sigma))
    return 0
