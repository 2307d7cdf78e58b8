"""``glidetask glide``: a final-glide check from one point (contract 4 and 5.2).

The distance and course come from ``--distance-km``/``--course-deg`` or from the WGS84
geodesic between ``--from`` and ``--to``. The polar is scaled to the density at the middle
of the glide: halfway between the present height and the planned arrival height (goal
elevation plus margin). With ``--terrain`` the glide is also checked over an elevation
model by :mod:`glidetask.commands.glide_terrain`; without ``--arrival-elevation-m`` the
goal's elevation then comes from that model at ``--to`` (the output says so), so the
verdict and the terrain check use the same goal height.
"""

from __future__ import annotations

import argparse
import math

from glidetask import cautions, units
from glidetask.cli import CMDLINE, check_number, parse_position, parse_wind
from glidetask.commands._output import caution_block, print_json
from glidetask.commands.polar import glider_problems
from glidetask.engine.atmosphere import density_ratio, ias_from_tas_at
from glidetask.engine.finalglide import MC_TO_ARRIVE_CAP_MS, FinalGlide, density_height_m, final_glide
from glidetask.engine.polar import Polar
from glidetask.engine.scenario import GliderSetup, Wind
from glidetask.errors import InputError, Problem
from glidetask.units import KMH

BELOW_GLIDE = "Below final glide: climb before setting off for the goal, or choose a nearer landing place."
OUT_OF_REACH = "The goal cannot be reached against this wind at any speed up to VNE."
RISING_AIR = "The glide counts on rising air along the way (--airmass-ms > 0): if it is not there, the margin goes."


def _option_problems(args: argparse.Namespace) -> list[Problem]:
    """Range checks of the numeric options, and the wind."""
    problems = (check_number(args, "distance-km", minimum=0.0, maximum=2000.0)
                + check_number(args, "height-m", minimum=-500.0, maximum=15000.0)
                + check_number(args, "course-deg", minimum=0.0, maximum=360.0)
                + check_number(args, "mc-ms", minimum=0.0, maximum=10.0)
                + check_number(args, "arrival-elevation-m", minimum=-500.0, maximum=9000.0)
                + check_number(args, "margin-m", minimum=0.0, maximum=5000.0)
                + check_number(args, "airmass-ms", minimum=-5.0, maximum=5.0)
                + check_number(args, "clearance-m", minimum=0.0, maximum=5000.0)
                + check_number(args, "airspace-margin-m", minimum=0.0, maximum=1000.0))
    if args.wind is not None:
        try:
            parse_wind(args.wind)
        except InputError as error:
            problems += error.problems
    return problems


def _route_problems(args: argparse.Namespace) -> list[Problem]:
    """Where to: a distance (and course), or two positions; parsed positions go on ``args``."""
    problems: list[Problem] = []
    args.from_latlon = args.to_latlon = None
    for name, option in (("from_pos", "--from"), ("to_pos", "--to")):
        text = getattr(args, name)
        if text is not None:
            try:
                setattr(args, "from_latlon" if name == "from_pos" else "to_latlon", parse_position(text, option))
            except InputError as error:
                problems += error.problems
    positions = (args.from_pos is not None, args.to_pos is not None)
    if positions == (True, False):
        problems.append(Problem(CMDLINE, "--to", "needed with --from (the goal's position)"))
    elif positions == (False, True):
        problems.append(Problem(CMDLINE, "--from", "needed with --to (the start position)"))
    elif all(positions):
        for option, value in (("--distance-km", args.distance_km), ("--course-deg", args.course_deg)):
            if value is not None:
                problems.append(Problem(CMDLINE, option, "not used with --from/--to: the geodesic between "
                                                         "them gives it; leave one or the other out"))
    elif args.distance_km is None:
        problems.append(Problem(CMDLINE, "--distance-km", "missing: give --distance-km, or --from and --to"))
    if args.terrain is not None and not all(positions):
        problems.append(Problem(CMDLINE, "--terrain", "needs --from and --to (the path to check)"))
    if getattr(args, "airspace", None) is not None and not all(positions):
        problems.append(Problem(CMDLINE, "--airspace", "needs --from and --to (the path to check)"))
    return problems


def _resolve_route(args: argparse.Namespace) -> tuple[float, float]:
    """Distance [m] and course [deg]; from the WGS84 geodesic if positions were given."""
    if args.from_latlon is not None and args.to_latlon is not None:
        from glidetask.engine.geodesy import inverse  # lazy: pyproj, only with --from and --to

        distance_m, course_deg, _ = inverse(*args.from_latlon, *args.to_latlon)
        return distance_m, course_deg
    return args.distance_km * 1000.0, 0.0 if args.course_deg is None else args.course_deg % 360.0


def _verdict(glide: FinalGlide, unit: units.UnitSystem, mc_ms: float) -> str:
    at = f"at MacCready {unit.vertical(mc_ms):.1f} {unit.vertical_label}"
    if math.isnan(glide.margin_m):
        return "OUT OF REACH: " + OUT_OF_REACH
    if glide.margin_m >= 0.0:
        return f"ABOVE final glide by {unit.height(glide.margin_m):,.0f} {unit.height_label} {at}"
    return (f"BELOW final glide by {unit.height(-glide.margin_m):,.0f} {unit.height_label} {at}: "
            f"need {unit.height(glide.required_height_m):,.0f} {unit.height_label}")


def glide_text(args: argparse.Namespace, spec_label: str, polar: Polar, sigma: float, glide: FinalGlide,
               distance_m: float, course_deg: float, wind: Wind, extra_text: str, extra_cautions: list[str]) -> str:
    """The readable final-glide check."""
    unit = units.by_name(args.units)
    elevation = args.arrival_elevation_m
    wind_text = "calm" if wind.speed_ms == 0.0 else \
        f"from {wind.from_deg:03.0f} deg at {unit.fmt_speed(wind.speed_ms)}"

    def height(value: float) -> str:
        return "-" if math.isnan(value) else f"{unit.height(value):,.0f} {unit.height_label}"

    def speed(value: float) -> str:
        return "-" if math.isnan(value) else unit.fmt_speed(value)

    def ratio(value: float) -> str:
        return "-" if not math.isfinite(value) else f"1:{value:.1f}"

    to_arrive = glide.mc_to_arrive_ms
    if math.isnan(to_arrive):
        to_arrive_text = "none: even MacCready 0 does not get there with the margin"
    elif to_arrive >= MC_TO_ARRIVE_CAP_MS:
        to_arrive_text = f"{unit.vertical(MC_TO_ARRIVE_CAP_MS):.1f} {unit.vertical_label} or more"
    else:
        to_arrive_text = f"{unit.vertical(to_arrive):.1f} {unit.vertical_label}"
    ias = "" if math.isnan(glide.speed_to_fly_ms) else \
        f" ({unit.speed(ias_from_tas_at(glide.speed_to_fly_ms, sigma)):.0f} IAS)"
    heading = "-" if math.isnan(glide.heading_deg) else f"{glide.heading_deg:03.0f} deg"
    time = "-" if math.isnan(glide.time_s) else units.format_duration(glide.time_s)
    lines = [
        f"Final glide: {unit.fmt_distance(distance_m)} on course {course_deg:03.0f} deg, wind {wind_text}",
        f"  {_verdict(glide, unit, args.mc_ms)}",
        "",
        f"  height now           {height(args.height_m)}",
        f"  required height      {height(glide.required_height_m)} (goal {height(elevation)}"
        f" + margin {height(args.margin_m)} + glide {height(glide.height_used_m)})",
        *([f"  goal elevation       {height(elevation)}, from the terrain model at --to"]
          if getattr(args, "arrival_elevation_source", "") == "terrain" else []),
        f"  speed to fly         {speed(glide.speed_to_fly_ms)}{ias}",
        f"  ground speed         {speed(glide.ground_speed_ms)}",
        f"  heading              {heading}",
        f"  time to goal         {time}",
        f"  glide ratio          required {ratio(glide.ld_required)}, achievable {ratio(glide.ld_achievable)}"
        " over the ground",
        f"  MacCready to arrive  {to_arrive_text}",
        "",
        f"Glider: {spec_label}, {polar.mass_kg:.0f} kg, {polar.wing_loading_kgm2:.1f} kg/m2,"
        f" bugs {args.bugs_percent:g} %; polar at {height(_mid_height_m(args))} (density ratio {sigma:.3f})",
    ]
    if extra_text:
        lines += ["", extra_text.rstrip("\n")]
    lines += ["", caution_block(extra_cautions)]
    return "\n".join(lines)


def _mid_height_m(args: argparse.Namespace) -> float:
    """The final glide's density height (:func:`glidetask.engine.finalglide.density_height_m`)."""
    return density_height_m(args.height_m, args.arrival_elevation_m + args.margin_m)


def _cautions_for(glide: FinalGlide, args: argparse.Namespace) -> list[str]:
    extra = []
    if math.isnan(glide.margin_m):
        extra.append(OUT_OF_REACH)
    elif glide.margin_m < 0.0:
        extra.append(BELOW_GLIDE)
    if args.airmass_ms > 0.0:
        extra.append(RISING_AIR)
    return extra


def run(args: argparse.Namespace) -> int:
    spec, problems = glider_problems(args, args.polar)
    problems = _option_problems(args) + _route_problems(args) + problems
    if problems:
        raise InputError(problems)
    goal_cautions: list[str] = []
    args.goal_model_m = math.nan
    if args.terrain is not None:
        from glidetask.commands import glide_terrain  # lazy: the terrain modules, only with --terrain

        args.arrival_elevation_source = "option" if args.arrival_elevation_m is not None else "terrain"
        args.arrival_elevation_m, args.goal_model_m, goal_cautions = glide_terrain.goal_elevation(args)
    else:
        args.arrival_elevation_source = "option" if args.arrival_elevation_m is not None else "default"
        args.arrival_elevation_m = 0.0 if args.arrival_elevation_m is None else args.arrival_elevation_m
    distance_m, course_deg = _resolve_route(args)
    from_deg, speed_kmh = parse_wind(args.wind) if args.wind is not None else (0.0, 0.0)
    wind = Wind(from_deg=from_deg, speed_ms=speed_kmh * KMH)
    sigma = density_ratio(_mid_height_m(args), args.isa_deviation_c)
    polar = GliderSetup(spec, args.pilot_kg, args.ballast_kg, args.bugs_percent).polar_at(_mid_height_m(args),
                                                                                          args.isa_deviation_c)
    glide = final_glide(polar, distance_m, args.height_m, course_deg=course_deg, wind=wind, mc_ms=args.mc_ms,
                        arrival_elevation_m=args.arrival_elevation_m, margin_m=args.margin_m,
                        airmass_ms=args.airmass_ms)
    extra_cautions = _cautions_for(glide, args) + goal_cautions
    extra_json: dict = {}
    extra_text = ""
    if args.terrain is not None:
        from glidetask.commands import glide_terrain  # lazy: as above (imported there already)

        extra_json, extra_text = glide_terrain.check(args, polar, glide)
        extra_json = dict(extra_json)
        extra_cautions += [c for c in extra_json.pop("cautions", []) if c not in extra_cautions]
        extra_cautions += [c for c in cautions.TERRAIN if c not in extra_cautions]
    if getattr(args, "airspace", None) is not None:
        from glidetask.commands import glide_airspace  # lazy: the airspace modules, only with --airspace

        airspace_json, airspace_text = glide_airspace.check(args, glide)
        extra_json.update({k: v for k, v in airspace_json.items() if k != "cautions"})
        extra_text = "\n\n".join(t for t in (extra_text, airspace_text) if t)
        extra_cautions += [c for c in airspace_json["cautions"] if c not in extra_cautions]
    if args.json:
        payload = glide_payload(args, spec.label, polar, sigma, glide, distance_m, course_deg, wind)
        payload.update(extra_json)
        payload["cautions"] = cautions.general() + extra_cautions
        print_json(payload)
    else:
        print(glide_text(args, spec.label, polar, sigma, glide, distance_m, course_deg, wind, extra_text,
                         extra_cautions))
    return 0


def glide_payload(args: argparse.Namespace, label: str, polar: Polar, sigma: float, glide: FinalGlide,
                  distance_m: float, course_deg: float, wind: Wind) -> dict:
    """The contract 5.2 JSON, plus the inputs and context a script may want."""
    return {
        "required_height_m": glide.required_height_m,
        "margin_m": glide.margin_m,
        "speed_to_fly_kmh": glide.speed_to_fly_ms / KMH,
        "ground_speed_kmh": glide.ground_speed_ms / KMH,
        "heading_deg": glide.heading_deg,
        "time_s": glide.time_s,
        "ld_required": glide.ld_required,
        "ld_achievable": glide.ld_achievable,
        "mc_to_arrive_ms": glide.mc_to_arrive_ms,
        "above_glide": bool(glide.margin_m >= 0.0),
        "reachable": bool(not math.isnan(glide.margin_m)),
        "height_used_m": glide.height_used_m,
        "speed_to_fly_ias_kmh": ias_from_tas_at(glide.speed_to_fly_ms, sigma) / KMH,
        "sink_ms": glide.sink_ms,
        "distance_km": distance_m / 1000.0,
        "course_deg": course_deg,
        "height_m": args.height_m,
        "arrival_elevation_m": args.arrival_elevation_m,
        "arrival_elevation_source": getattr(args, "arrival_elevation_source", "option"),
        "goal_terrain_elevation_m": getattr(args, "goal_model_m", math.nan),
        "arrival_margin_m": args.margin_m,
        "mc_ms": args.mc_ms,
        "airmass_ms": args.airmass_ms,
        "wind": {"from_deg": wind.from_deg, "speed_kmh": wind.speed_ms / KMH},
        "polar_file": args.polar,
        "label": label,
        "mass_kg": polar.mass_kg,
        "wing_loading_kgm2": polar.wing_loading_kgm2,
        "density_ratio": sigma,
        "density_height_m": _mid_height_m(args),
    }
