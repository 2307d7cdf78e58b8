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
import re
import sys
import warnings
from functools import lru_cache

from glidetask import __version__
from glidetask.errors import InputError, Problem, one_line
from glidetask.formats.files import file_problem

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


#: The command-line option of each what-if, by the task-file key it replaces (the engine's
#: check, :func:`glidetask.engine.scenario.scenario_problems`, names keys only).
WHAT_IF_OPTIONS = {"[glider] ballast_kg": "--ballast-kg", "[glider] bugs_percent": "--bugs-percent",
                   "[day] mc_ms": "--mc-ms", "[day] wind": "--wind", "[day] start_time": "--start"}


def what_if_problems(error) -> list[Problem]:
    """A :class:`glidetask.engine.scenario.WhatIfError` as the command line words it: a
    problem a what-if made is named by its option, one of the task file by file and key."""
    return [Problem(CMDLINE, WHAT_IF_OPTIONS[key], message) if key in error.what_ifs else problem
            for (key, message), problem in zip(error.pairs, error.problems)]


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


def _task_argument(parser: argparse.ArgumentParser) -> None:
    parser.add_argument("task", metavar="TASK.toml")


def _plan_options(parser: argparse.ArgumentParser) -> None:
    _task_argument(parser)
    _what_if_options(parser)


def _glide_options(parser: argparse.ArgumentParser) -> None:
    p = parser
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


def _polar_options(parser: argparse.ArgumentParser) -> None:
    parser.add_argument("file", metavar="FILE")
    parser.add_argument("--altitude-m", type=float, default=0.0, metavar="H", help="altitude [m MSL] (default 0)")
    parser.add_argument("--isa-deviation-c", type=float, default=0.0, metavar="T", help="ISA temperature deviation [C]")
    _glider_options(parser)


def _check_options(parser: argparse.ArgumentParser) -> None:
    parser.add_argument("files", nargs="+", metavar="FILE")


def _export_options(parser: argparse.ArgumentParser) -> None:
    _task_argument(parser)
    parser.add_argument("--to", dest="to", required=True, metavar="FILE", help="output file: .gpx, .md or .json")
    parser.add_argument("--force", action="store_true", help="replace FILE if it exists (never a file the task reads)")
    _what_if_options(parser)


def _odds_options(parser: argparse.ArgumentParser) -> None:
    _task_argument(parser)
    parser.add_argument("--runs", type=int, default=2000, metavar="N", help="simulated flights per ballast (default 2000)")
    parser.add_argument("--seed", type=int, default=1, metavar="S", help="random seed (default 1)")
    parser.add_argument("--ballast-kg", type=float, action="append", default=None, metavar="KG",
                        help="a ballast to compare (repeat for several; default: empty, half, full)")
    parser.add_argument("--spread", type=int, choices=(0, 1), default=1,
                        help="1: days spread around the forecast (default); 0: the forecast day exactly, as plan "
                             "flies it")


#: Each command's one-line help and the function adding its own arguments, in COMMANDS order.
_COMMAND_OPTIONS = {
    "plan": ("fly a task on paper: legs, times, heights, final glide", _plan_options),
    "glide": ("final-glide check from one point", _glide_options),
    "polar": ("polar figures and a speed-to-fly card", _polar_options),
    "sweep": ("ballast against thermal strength for a task", _task_argument),
    "check": ("validate polar, turnpoint, airspace and task files", _check_options),
    "export": ("write the plan as GPX route, Markdown briefing or JSON", _export_options),
    "odds": ("odds of getting home: the task over a spread of days (Monte Carlo)", _odds_options),
    "day": ("the day derived from the task's forecast sounding", _task_argument),
}


@lru_cache(maxsize=1)
def build_parser() -> argparse.ArgumentParser:
    parser = argparse.ArgumentParser(
        prog="glidetask",
        description="Pre-flight planner for cross-country glider pilots and task setters. "
        "A planning aid, not a navigation instrument: the pilot in command decides.",
        epilog="Run 'glidetask' with no command (or with a task file) to open the terminal UI.",
    )
    parser.add_argument("--version", action="version", version=f"glidetask {__version__}")
    sub = parser.add_subparsers(dest="command", metavar="COMMAND")
    for command in COMMANDS:
        help_text, add_options = _COMMAND_OPTIONS[command]
        p = sub.add_parser(command, help=help_text)
        add_options(p)
        _common(p)
    return parser


@lru_cache(maxsize=1)
def build_ui_parser() -> argparse.ArgumentParser:
    parser = argparse.ArgumentParser(prog="glidetask", description="Open the terminal UI.")
    parser.add_argument("task", nargs="?", default=None, metavar="TASK.toml",
                        help="task to open (default: the bundled demo)")
    parser.add_argument("--units", choices=("metric", "aviation"), default="metric")
    parser.add_argument("--debug", action="store_true")
    parser.add_argument("--version", action="version", version=f"glidetask {__version__}")
    return parser


# ---------------------------------------------------------------- argument checks before parsing

_NEGATIVE_VALUE = re.compile(r"^-\.?[0-9]")


def _value_options(parser: argparse.ArgumentParser, command: str) -> set[str]:
    """The option strings of ``command`` that take a value."""
    for action in parser._actions:  # noqa: SLF001 - argparse keeps its subparsers here
        if isinstance(action, argparse._SubParsersAction) and command in action.choices:  # noqa: SLF001
            return {option for sub in action.choices[command]._actions  # noqa: SLF001
                    for option in sub.option_strings if sub.nargs != 0}
    return set()


def join_negative_values(parser: argparse.ArgumentParser, argv: list[str]) -> list[str]:
    """``--from -31.2,145.8`` -> ``--from=-31.2,145.8``: argparse would take a value that starts
    with a minus sign for an option, so southern and western positions given the natural
    way would fail."""
    if not argv or argv[0] not in COMMANDS:
        return argv
    options = _value_options(parser, argv[0])
    joined = [argv[0]]
    for token in argv[1:]:
        if joined[-1] in options and _NEGATIVE_VALUE.match(token) and len(joined) > 1:
            joined[-1] = f"{joined[-1]}={token}"
        else:
            joined.append(token)
    return joined


def not_a_command(word: str) -> list[str]:
    """Error lines for an argument that is neither a command nor an existing task file."""
    import difflib  # lazy: only a mistyped command needs it, and cli is on every start-up path

    if word in ("help", "-help"):
        hint = " (did you mean --help?)"
    else:
        close = difflib.get_close_matches(word, COMMANDS, n=1, cutoff=0.5)
        hint = f" (did you mean '{close[0]}'?)" if close else ""
    if word.endswith(".toml") or "/" in word or "." in word:  # meant as a file
        first = Problem(word, "file", f"{file_problem(word) or 'not a task file'}; not a command either{hint}")
    else:
        first = Problem(CMDLINE, repr(word), f"no such command or task file{hint}")
    return [str(first),
            str(Problem(CMDLINE, "usage", "glidetask COMMAND ... with COMMAND one of "
                                          f"{', '.join(COMMANDS)}; or glidetask [TASK.toml] for the "
                                          "terminal UI; glidetask --help for more"))]


# ---------------------------------------------------------------- entry point


def _run_ui(args: argparse.Namespace) -> int:
    from glidetask.tui.app import run_app  # lazy: Textual is slow to import and no command needs it

    return run_app(args.task, units=args.units)


def _run_command(args: argparse.Namespace) -> int:
    """Run a command. Library warnings (numpy's RuntimeWarning and the like) mean nothing to a
    pilot and must never come before an error line: they are shown only with --debug."""
    module = importlib.import_module(f"glidetask.commands.{args.command}")
    if getattr(args, "debug", False):
        return int(module.run(args))
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        return int(module.run(args))


def main(argv: list[str] | None = None) -> int:
    argv = list(sys.argv[1:] if argv is None else argv)
    ui_mode = not argv or (argv[0] not in COMMANDS and argv[0] not in ("-h", "--help", "--version"))
    # Neither a command nor an existing task file: never the UI. Checked before parsing too,
    # as "chek a.toml" would otherwise be an argparse error about the extra argument.
    if ui_mode and argv and not argv[0].startswith("-") and file_problem(argv[0]) is not None:
        print("\n".join(not_a_command(argv[0])), file=sys.stderr)
        return 2
    parser = build_ui_parser() if ui_mode else build_parser()
    try:
        args = parser.parse_args(argv if ui_mode else join_negative_values(parser, argv))
    except SystemExit as stop:  # argparse prints the usage line itself
        return int(stop.code or 0)
    if ui_mode and args.task is not None and file_problem(args.task) is not None:
        print("\n".join(not_a_command(args.task)), file=sys.stderr)
        return 2
    try:
        if ui_mode:
            return _run_ui(args)
        return _run_command(args)
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
            import traceback  # lazy: only --debug shows a traceback

            traceback.print_exc()
        print(f"glidetask: internal error: {type(error).__name__}: {one_line(str(error))[:300]} "
              "(run with --debug for details)", file=sys.stderr)
        return 1


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
