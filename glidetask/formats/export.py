"""A plan rendered as a file: GPX route, Markdown briefing, or the plan's JSON.

The one place the export formats are chosen and rendered; ``glidetask export``
(:mod:`glidetask.commands.export`) and the terminal UI's export
(:mod:`glidetask.tui.exporting`) both call :func:`render`, so they write the same file.
"""

from __future__ import annotations

import json
import os

from glidetask.engine.sensitivity import plan_sensitivity
from glidetask.formats.atomic import write_target
from glidetask.formats.briefing import plan_to_markdown
from glidetask.formats.gpx import plan_to_gpx
from glidetask.formats.plan_json import jsonable, plan_to_dict

#: The file suffixes :func:`render` knows (lower case).
SUFFIXES = (".gpx", ".md", ".json")


def render(plan, suffix: str, unit_name: str = "metric") -> str:
    """The file's text for a plan in the format of ``suffix`` (one of :data:`SUFFIXES`).

    The briefing and the JSON carry the sensitivity of the task time (computed here, so
    every caller gets the same file).
    """
    if suffix == ".gpx":
        return plan_to_gpx(plan)
    sensitivity = plan_sensitivity(plan)
    if suffix == ".md":
        return plan_to_markdown(plan, unit_name, sensitivity)
    return json.dumps(jsonable(plan_to_dict(plan, sensitivity)), indent=2, allow_nan=False) + "\n"


def same_file_as(target: str | os.PathLike, files) -> str | os.PathLike | None:
    """The one of ``files`` that ``target`` would write (through links), or None."""
    try:
        real = os.path.normcase(str(write_target(target)))
    except OSError:
        return None  # writing will fail and say why
    for source in files:
        same = os.path.normcase(os.path.realpath(source)) == real
        if not same:
            try:
                same = os.path.samefile(source, real)
            except OSError:
                same = False
        if same:
            return source
    return None


def input_files(scenario) -> list[str]:
    """Every file a task reads: the task file and each file it names (polar, turnpoints,
    terrain, and any other ``*_file`` the scenario carries, such as airspace), and the
    sounding the day is derived from (``scenario.day_source.sounding_file``)."""
    files = [scenario.source, getattr(scenario.glider, "polar_file", None)]
    files += [value for name, value in vars(scenario).items() if name.endswith("_file")]
    files.append(getattr(getattr(scenario, "day_source", None), "sounding_file", None))
    return [os.fspath(f) for f in files if isinstance(f, (str, os.PathLike)) and f]


def protected_target_problem(target: str | os.PathLike, scenario) -> str | None:
    """Why ``target`` must never be written for this task (it is a file the task reads), or None.
    The terminal UI's export and save use this too."""
    source = same_file_as(target, input_files(scenario))
    if source is None:
        return None
    return f"{os.fspath(target)!r} is {os.fspath(source)!r}, a file the task reads; choose another name"
