"""The command line: argument parsing, dispatch and error reporting.

Each command lives in :mod:`glidetask.commands` as a ``run(args) -> int`` function and is
imported only when it is called, so that ``glidetask polar`` never pays for Textual,
rasterio or the planner. Bad input becomes ``glidetask: error: FILE: WHERE: WHAT``
lines and exit status 2; an internal fault exit status 1 (shared/CONTRACT.md section 7).
"""

from __future__ import annotations

import argparse
import importlib
import math
import sys

from glidetask.errors import InputError, Problem

COMMANDS = ("plan", "glide", "polar", "sweep", "check", "export", "odds", "day")
CMDLINE = "command line"


# ---------------------------------------------------------------- option values


def parse_wind(text: str, option: str = "--wind") -> tuple[float, float]:
    """``"270/20"`` -> (from_deg, speed_kmh); InputError naming the option otherwise."""
    parts = text.split("/")
    try:
        if len(parts) != 2:
            raise ValueError
        direction, speed = float(parts[0]), float(parts[1])
    except ValueError:
        raise InputError.one(CMDLINE, option, f"expected FROM_DEG/SPEED_KMH like 270/20, got {text!r}") from None
    if not (math.isfinite(direction) and math.isfinite(speed)):
        raise InputError.one(CMDLINE, option, f"wind must be finite numbers, got {text!r}")
    if not 0.0 <= direction <= 360.0:
        raise InputError.one(CMDLINE, option, f"wind direction must be 0-360 degrees, got {direction:g}")
    if speed < 0.0:
        raise InputError.one(CMDLINE, option, f"wind speed must not be negative, got {speed:g}")
    return direction % 360.0, speed


def parse_position(text: str, option: str) -> tuple[float, float]:
    """``"46.1,-33.2"`` -> (lat, lon) in degrees."""
    parts = text.split(",")
    try:
        if len(parts) != 2:
            raise ValueError
        lat, lon = float(parts[0]), float(parts[1])
    except ValueError:
        raise InputError.one(CMDLINE, option, f"expected LAT,LON in decimal degrees, got {text!r}") from None
    if not (math.isfinite(lat) and math.isfinite(lon)) or not -90.0 <= lat <= 90.0:
        raise InputError.one(CMDLINE, option, f"latitude must be in [-90, 90] and both finite, got {text!r}")
    return lat, ((lon + 180.0) % 360.0) - 180.0


def check_number(args: argparse.Namespace, name: str, *, minimum: float | None = None,
                 maximum: float | None = None, strictly_positive: bool = False) -> list[Problem]:
    """Problems with the numeric option ``name`` (finite, within range); empty if fine or unset."""
    value = getattr(args, name.replace("-", "_"), None)
    option = "--" + name
    if value is None:
        return []
    if not math.isfinite(value):
        return [Problem(CMDLINE, option, f"must be a finite number, got {value!r}")]
    if strictly_positive and value <= 0.0:
        return [Problem(CMDLINE, option, f"must be greater than 0, got {value:g}")]
    if minimum is not None and value < minimum:
        return [Problem(CMDLINE, option, f"must be at least {minimum:g}, got {value:g}")]
    if maximum is not None and value > maximum:
        return [Problem(CMDLINE, option, f"must be at most {maximum:g}, got {value:g}")]
    return []


# ---------------------------------------------------------------- the parser


def _common(parser: argparse.ArgumentParser) -> None:
    parser.add_argument("--json", action="store_true", help="print machine-readable JSON (contract section 5)")
    parser.add_argument("--units", choices=("metric", "aviation"), default="metric",
                        help="units for text output (default metric)")
    parser.add_argument("--debug", action="store_true", help="show the traceback of an internal error")


def _glider_options(parser: argparse.ArgumentParser, *, pilot_default: float | None = 90.0) -> None:
    parser.add_argument("--pilot-kg", type=float, default=pilot_default, metavar="KG",
                        help="pilot and parachute [kg]" + (" (default 90)" if pilot_default else ""))
    parser.add_argument("--ballast-kg", type=float, default=None if pilot_default is None else 0.0,
                        metavar="KG", help="water ballast [kg]")
    parser.add_argument("--bugs-percent", type=float, default=None if pilot_default is None else 0.0,
                        metavar="P", help="sink rate increase from bugs and dirt [%%]")


def _what_if_options(parser: argparse.ArgumentParser) -> None:
    parser.add_argument("--mc-ms", type=float, default=None, metavar="M", help="fixed MacCready setting [m/s]")
    parser.add_argument("--ballast-kg", type=float, default=None, metavar="KG", help="water ballast [kg]")
    parser.add_argument("--bugs-percent", type=float, default=None, metavar="P", help="bugs [%% sink increase]")
    parser.add_argument("--wind", default=None, metavar="FROM/KMH", help="wind, e.g. 270/20 (from the west, 20 km/h)")
    parser.add_argument("--start", default=None, metavar="HH:MM", help="start time (local clock)")


def build_parser() -> argparse.ArgumentParser:
    parser = argparse.ArgumentParser(
        prog="glidetask",
        description="Pre-flight planner for cross-country glider pilots and task setters. "
        "A planning aid, not a navigation instrument: the pilot in command decides.",
        epilog="Run 'glidetask' with no command (or with a task file) to open the terminal UI.",
    )
    sub = parser.add_subparsers(dest="command", metavar="COMMAND")

    p = sub.add_parser("plan", help="fly a task on paper: legs, times, heights, final glide")
    p.add_argument("task", metavar="TASK.toml")
    _what_if_options(p)
    _common(p)

    p = sub.add_parser("glide", help="final-glide check from one point")
    p.add_argument("--polar", required=True, metavar="FILE", help="polar file (TOML)")
    p.add_argument("--distance-km", type=float, default=None, metavar="D", help="distance to go [km]")
    p.add_argument("--height-m", type=float, required=True, metavar="H", help="present height [m MSL]")
    p.add_argument("--course-deg", type=float, default=None, metavar="C", help="course to the goal [deg true] (default 0)")
    p.add_argument("--wind", default=None, metavar="FROM/KMH", help="wind, e.g. 270/20 (default calm)")
    p.add_argument("--mc-ms", type=float, default=0.0, metavar="M", help="MacCready setting [m/s] (default 0)")
    p.add_argument("--arrival-elevation-m", type=float, default=None, metavar="E",
                   help="elevation of the goal [m MSL] (default 0; with --terrain, the model's at --to)")
    p.add_argument("--margin-m", type=float, default=200.0, metavar="S", help="arrival margin [m] (default 200)")
    p.add_argument("--isa-deviation-c", type=float, default=0.0, metavar="T", help="ISA temperature deviation [C]")
    p.add_argument("--airmass-ms", type=float, default=0.0, metavar="U",
                   help="average vertical air motion on the glide [m/s] (negative = sink)")
    p.add_argument("--terrain", default=None, metavar="FILE", help="GeoTIFF elevation model for a terrain check")
    p.add_argument("--from", dest="from_pos", default=None, metavar="LAT,LON", help="start position (with --terrain or --airspace)")
    p.add_argument("--to", dest="to_pos", default=None, metavar="LAT,LON", help="goal position (with --terrain or --airspace)")
    p.add_argument("--clearance-m", type=float, default=150.0, metavar="C",
                   help="least terrain clearance [m] (default 150)")
    p.add_argument("--airspace", default=None, metavar="FILE", help="airspace GeoJSON: the volumes the glide crosses")
    p.add_argument("--airspace-margin-m", type=float, default=100.0, metavar="M",
                   help="kept below airspace floors and above ceilings [m] (default 100)")
    _glider_options(p)
    _common(p)

    p = sub.add_parser("polar", help="polar figures and a speed-to-fly card")
    p.add_argument("file", metavar="FILE")
    p.add_argument("--altitude-m", type=float, default=0.0, metavar="H", help="altitude [m MSL] (default 0)")
    p.add_argument("--isa-deviation-c", type=float, default=0.0, metavar="T", help="ISA temperature deviation [C]")
    _glider_options(p)
    _common(p)

    p = sub.add_parser("sweep", help="ballast against thermal strength for a task")
    p.add_argument("task", metavar="TASK.toml")
    _common(p)

    p = sub.add_parser("check", help="validate polar, turnpoint, airspace and task files")
    p.add_argument("files", nargs="+", metavar="FILE")
    _common(p)

    p = sub.add_parser("export", help="write the plan as GPX route, Markdown briefing or JSON")
    p.add_argument("task", metavar="TASK.toml")
    p.add_argument("--to", dest="to", required=True, metavar="FILE", help="output file: .gpx, .md or .json")
    _what_if_options(p)
    _common(p)

    p = sub.add_parser("odds", help="odds of getting home: the task over a spread of days (Monte Carlo)")
    p.add_argument("task", metavar="TASK.toml")
    p.add_argument("--runs", type=int, default=2000, metavar="N", help="simulated flights per ballast (default 2000)")
    p.add_argument("--seed", type=int, default=1, metavar="S", help="random seed (default 1)")
    p.add_argument("--ballast-kg", type=float, action="append", default=None, metavar="KG",
                   help="a ballast to compare (repeat for several; default: empty, half, full)")
    p.add_argument("--spread", type=int, choices=(0, 1), default=1,
                   help="1: days spread around the forecast (default); 0: the forecast day exactly, as plan flies it")
    _common(p)

    p = sub.add_parser("day", help="the day derived from the task's forecast sounding")
    p.add_argument("task", metavar="TASK.toml")
    _common(p)
    return parser


def build_ui_parser() -> argparse.ArgumentParser:
    parser = argparse.ArgumentParser(prog="glidetask", description="Open the terminal UI.")
    parser.add_argument("task", nargs="?", default=None, metavar="TASK.toml",
                        help="task to open (default: the bundled demo)")
    parser.add_argument("--units", choices=("metric", "aviation"), default="metric")
    parser.add_argument("--debug", action="store_true")
    return parser


# ---------------------------------------------------------------- entry point


def _run_ui(args: argparse.Namespace) -> int:
    from glidetask.tui.app import run_app

    return run_app(args.task, units=args.units)


def main(argv: list[str] | None = None) -> int:
    argv = list(sys.argv[1:] if argv is None else argv)
    ui_mode = not argv or (argv[0] not in COMMANDS and argv[0] not in ("-h", "--help"))
    parser = build_ui_parser() if ui_mode else build_parser()
    try:
        args = parser.parse_args(argv)
    except SystemExit as stop:  # argparse prints the usage line itself
        return int(stop.code or 0)
    try:
        if ui_mode:
            return _run_ui(args)
        module = importlib.import_module(f"glidetask.commands.{args.command}")
        return int(module.run(args))
    except InputError as error:
        for problem in error.problems:
            print(problem, file=sys.stderr)
        return 2
    except KeyboardInterrupt:
        return 130
    except BrokenPipeError:
        return 0
    except Exception as error:  # an internal fault: short message, traceback on request
        if getattr(args, "debug", False):
            import traceback

            traceback.print_exc()
        print(f"glidetask: internal error: {type(error).__name__}: {error} (run with --debug for details)",
              file=sys.stderr)
        return 1


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
