"""``glidetask export TASK.toml --to FILE``: the plan as a file (contract 4).

The file's suffix chooses the format: ``.gpx`` (a GPX 1.1 route of the planned path),
``.md`` (the pre-flight briefing, in the ``--units`` chosen) or ``.json`` (the
plan as ``plan --json`` prints it). The what-if options work as for ``plan``. The file
is written atomically: an interrupted export never leaves half a file behind.
"""

from __future__ import annotations

import argparse
from pathlib import Path

from glidetask import cautions
from glidetask.cli import CMDLINE
from glidetask.commands._output import print_json
from glidetask.errors import InputError, Problem
from glidetask.formats.export import render

FORMATS = {".gpx": "GPX 1.1 route", ".md": "pre-flight briefing (Markdown)", ".json": "plan JSON"}


def target_problems(target: str) -> list[Problem]:
    """What is wrong with ``--to``: an unknown suffix, or a folder that does not exist."""
    path = Path(target)
    problems = []
    if path.suffix.lower() not in FORMATS:
        problems.append(Problem(CMDLINE, "--to", f"unknown file type {path.suffix or '(none)'!r} in {target!r}; "
                                                 f"use .gpx, .md or .json"))
    if not path.parent.is_dir():
        problems.append(Problem(CMDLINE, "--to", f"no such folder: {str(path.parent)!r}"))
    elif path.is_dir():
        problems.append(Problem(CMDLINE, "--to", f"{target!r} is a folder; give a file name"))
    return problems


def run(args: argparse.Namespace) -> int:
    from glidetask.commands.plan import plan_from_args

    plan = plan_from_args(args, target_problems(args.to))
    suffix = Path(args.to).suffix.lower()
    from glidetask.formats.atomic import write_atomic

    try:
        write_atomic(args.to, render(plan, suffix, args.units))
    except OSError as error:
        raise InputError.one(CMDLINE, "--to", f"cannot write {args.to!r}: {error.strerror or error}") from None
    if args.json:
        print_json({"file": args.to, "format": FORMATS[suffix], "finished": plan.finished,
                    "cautions": list(plan.cautions)})
    else:
        print(f"Wrote {args.to}: {FORMATS[suffix]} of {plan.scenario.task.name}.")
        print(f"CAUTION: {cautions.COMPACT}")
    return 0
