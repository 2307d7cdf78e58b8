"""``glidetask sweep TASK.toml``: ballast against thermal strength (contract 4 and 5.4).

The task with its wind, flown for 19 ballasts from empty to full against thermal
strengths of 0.5 to 5 m/s (:func:`glidetask.engine.compare.ballast_sweep`). Text output
is a table of task times (strengths as rows, ballast as columns, the fastest marked),
the achieved climb and cruise speed, and where ballast starts paying; ``--json`` prints
the contract's keys and more.
"""

from __future__ import annotations

import argparse

from glidetask.commands._output import print_json
from glidetask.engine.compare import ballast_sweep
from glidetask.formats import strategy_report
from glidetask.formats.task_file import load_scenario


def run(args: argparse.Namespace) -> int:
    sweep = ballast_sweep(load_scenario(args.task))
    if args.json:
        print_json(strategy_report.sweep_to_dict(sweep))
    else:
        print(strategy_report.sweep_text(sweep, args.units))
    return 0
