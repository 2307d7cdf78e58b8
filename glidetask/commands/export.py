"""``glidetask export TASK.toml --to FILE``: the plan as a file (contract 4).

The file's suffix chooses the format: ``.gpx`` (a GPX 1.1 route of the planned path),
``.md`` (the pre-flight briefing, in the ``--units`` chosen) or ``.json`` (the
plan as ``plan --json`` prints it). The what-if options work as for ``plan``. The file
is written atomically: an interrupted export never leaves half a file behind.

An export never replaces a file the task reads (the task itself, its polar, turnpoints,
terrain, or any other file it names), with or without ``--force``; any other existing file
(a read-only one included) only with ``--force``. A symbolic link is written through.
"""

from __future__ import annotations

import argparse
import os
from pathlib import Path

from glidetask import cautions
from glidetask.cli import CMDLINE
from glidetask.commands._output import print_json
from glidetask.commands.plan import plan_from_args
from glidetask.errors import InputError, Problem
from glidetask.formats.atomic import write_atomic
from glidetask.formats.export import protected_target_problem, render, same_file_as
from glidetask.formats.task_file import files_named_by

FORMATS = {".gpx": "GPX 1.1 route", ".md": "pre-flight briefing (Markdown)", ".json": "plan JSON"}


def target_problems(target: str, force: bool = False, task: str | None = None) -> list[Problem]:
    """What is wrong with ``--to``: an unknown suffix, a folder that does not exist, a folder
    given as the file, a file the task ``task`` reads (never replaced), or (without ``force``)
    a file that exists already."""
    path = Path(target)
    problems = []
    if task is not None and os.path.lexists(path):
        reads = same_file_as(path, files_named_by(task))
        if reads is not None:
            return [Problem(CMDLINE, "--to", f"{target!r} is {str(reads)!r}, a file the task reads; "
                                             "choose another name")]
    if path.suffix.lower() not in FORMATS:
        problems.append(Problem(CMDLINE, "--to", f"unknown file type {path.suffix or '(none)'!r} in {target!r}; "
                                                 f"use .gpx, .md or .json"))
    if not os.path.isdir(path.parent):
        problems.append(Problem(CMDLINE, "--to", f"no such folder: {str(path.parent)!r}"))
    elif os.path.isdir(path):
        problems.append(Problem(CMDLINE, "--to", f"{target!r} is a folder; give a file name"))
    elif os.path.lexists(path) and not force:
        problems.append(Problem(CMDLINE, "--to", f"{target!r} exists; add --force to replace it"))
    return problems


def run(args: argparse.Namespace) -> int:
    force = getattr(args, "force", False)
    plan = plan_from_args(args, target_problems(args.to, force, args.task))
    protected = protected_target_problem(args.to, plan.scenario)
    if protected:
        raise InputError.one(CMDLINE, "--to", protected)
    suffix = Path(args.to).suffix.lower()
    try:
        write_atomic(args.to, render(plan, suffix, args.units), replace_read_only=force)
    except OSError as error:
        raise InputError.one(CMDLINE, "--to", f"cannot write {args.to!r}: {error.strerror or error}") from None
    if args.json:
        print_json({"file": args.to, "format": FORMATS[suffix], "finished": plan.finished,
                    "cautions": list(plan.cautions)})
    else:
        print(f"Wrote {args.to}: {FORMATS[suffix]} of {plan.scenario.task.name}.")
        print(f"CAUTION: {cautions.COMPACT}")
    return 0
