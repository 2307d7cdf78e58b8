"""Export the plan exactly as ``glidetask export`` does (:func:`glidetask.formats.export.render`): a GPX route,
a Markdown briefing in the units on screen, or the plan's JSON, written atomically.

As with the command line, a file the task reads is never replaced, and any other existing
file only when the pilot says so (``--force`` there, a confirmation in the UI)."""

from __future__ import annotations

import os
from pathlib import Path

FORMATS = {".gpx": "GPX 1.1 route", ".md": "pre-flight briefing (Markdown)", ".json": "plan (JSON, contract 5.3)"}


def files_the_task_reads(scenario, *, task_file: bool = True) -> list[str]:
    """Every file the scenario reads: :func:`glidetask.formats.export.input_files` (the task
    file with ``task_file``, the polar, turnpoints, terrain, airspace, the sounding)."""
    from glidetask.formats.export import input_files

    files = input_files(scenario)
    if not task_file and scenario.source:
        files = [f for f in files if f != os.fspath(scenario.source)]
    return files


def read_by_task_problem(path: str | Path, scenario, *, task_file: bool = True) -> str | None:
    """Why ``path`` must never be written for this task (it is a file the task reads), or None."""
    from glidetask.formats.export import same_file_as

    source = same_file_as(path, files_the_task_reads(scenario, task_file=task_file))
    if source is None:
        return None
    return f"{os.fspath(path)!r} is {os.fspath(source)!r}, a file the task reads; choose another name"


def export_problem(path: str | Path, scenario) -> str | None:
    """Why ``path`` cannot take an export at all (an unknown suffix, a folder, a file the task
    reads), or None."""
    target = Path(path).expanduser()
    suffix = target.suffix.lower()
    if suffix not in FORMATS:
        return f"unknown export format {suffix or '(none)'}: use .gpx, .md or .json"
    if target.is_dir():
        return f"{os.fspath(target)!r} is a folder; give a file name"
    return read_by_task_problem(target, scenario)


def export_plan(path: str | Path, plan, unit_name: str = "metric", *, replace: bool = False) -> Path:
    """Write ``plan`` to ``path``; the suffix picks the format.

    ``replace``: the pilot confirmed replacing the existing file (a read-only one included,
    as ``glidetask export --force`` does).

    Raises ValueError for an unknown suffix, a folder or a file the task reads (never
    replaced), FileExistsError for an existing file without ``replace``, and OSError when
    the file cannot be written.
    """
    from glidetask.formats.atomic import write_atomic
    from glidetask.formats.export import render

    target = Path(path).expanduser()
    problem = export_problem(target, plan.scenario)
    if problem:
        raise ValueError(problem)
    if os.path.lexists(target) and not replace:
        raise FileExistsError(f"{os.fspath(target)!r} exists")
    write_atomic(target, render(plan, target.suffix.lower(), unit_name), replace_read_only=replace)
    return target
