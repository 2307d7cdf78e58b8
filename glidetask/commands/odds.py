"""``glidetask odds TASK.toml``: the odds of getting home over a spread of days.

``--runs N`` simulated days (the same days for each ballast choice), ``--seed S`` for
the random numbers (the same seed, the same answer), ``--ballast-kg KG`` once per choice
(default: empty, half and full), ``--spread 0|1`` (0: every simulated day is the forecast,
flown exactly as ``plan`` flies it; 1, the default: days spread around it). See :mod:`glidetask.engine.simulate` for the spread of
days assumed. Text output shows the finishing odds with their standard error, the task
time percentiles among the finishers, the finishing odds against thermal spacing (0.5, 1, 2 and
4 times the day's) and the land-outs by leg; ``--json`` the same as data.
"""

from __future__ import annotations

import argparse
import math

from glidetask.cli import CMDLINE, what_if_problems
from glidetask.commands._output import print_json
from glidetask.engine.scenario import WhatIfError, with_what_ifs
from glidetask.commands.sweep import day_cautions
from glidetask.engine.day_spread import DaySpread
from glidetask.engine.simulate import simulate_days, spacing_odds
from glidetask.errors import InputError, Problem
from glidetask.formats import strategy_report
from glidetask.formats.task_file import load_scenario

MAX_RUNS = 100_000  # per ballast choice: memory for the drawn days stays near 50 MB


def option_problems(args: argparse.Namespace) -> list[Problem]:
    """Problems with ``--runs``, ``--seed`` and each ``--ballast-kg`` on their own."""
    problems = []
    if args.runs < 1:
        problems.append(Problem(CMDLINE, "--runs", f"must be at least 1, got {args.runs}"))
    elif args.runs > MAX_RUNS:
        problems.append(Problem(CMDLINE, "--runs", f"must be at most {MAX_RUNS}, got {args.runs}"))
    if args.seed < 0:
        problems.append(Problem(CMDLINE, "--seed", f"must be 0 or more, got {args.seed}"))
    for value in args.ballast_kg or ():
        if not math.isfinite(value) or value < 0.0:
            problems.append(Problem(CMDLINE, "--ballast-kg", f"must be a finite number of 0 kg or more, got {value:g}"))
    return problems


def ballast_problems(scenario, ballasts) -> list[Problem]:
    """Each ballast against the glider (the planner's check: polar maximum, maximum mass)."""
    problems: list[Problem] = []
    for value in ballasts:
        try:
            with_what_ifs(scenario, ballast_kg=value)
        except WhatIfError as error:
            problems += [p for p in what_if_problems(error) if p.where == "--ballast-kg" and p not in problems]
    return problems


def run(args: argparse.Namespace) -> int:
    problems = option_problems(args)
    scenario = None
    try:
        scenario = load_scenario(args.task)
    except InputError as error:
        problems += error.problems
    if scenario is not None and not problems and args.ballast_kg:
        problems += ballast_problems(scenario, args.ballast_kg)
    if problems:
        raise InputError(problems)
    ballasts = None if not args.ballast_kg else list(dict.fromkeys(args.ballast_kg))
    spread = DaySpread.none() if getattr(args, "spread", 1) == 0 else None  # 0: the forecast day, as plan flies it
    odds = simulate_days(scenario, runs=args.runs, seed=args.seed, ballasts_kg=ballasts, spread=spread)
    odds = spacing_odds(scenario, odds)  # what the odds rest on (none with --spread 0)
    if args.json:
        print_json(strategy_report.odds_to_dict(odds, day_cautions(scenario, "metric")))
    else:
        print(strategy_report.odds_text(odds, args.units, day_cautions(scenario, args.units)))
    return 0
