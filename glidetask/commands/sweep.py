"""``glidetask sweep TASK.toml``: ballast against thermal strength (contract 4 and 5.4).

The task with its wind, flown for 19 ballasts from empty to full against thermal
strengths of 0.5 to 5 m/s (:func:`glidetask.engine.compare.ballast_sweep`). Text output
is a table of task times (strengths as rows, ballast as columns, the fastest marked),
the achieved climb and cruise speed, the best ballast in narrow, typical and broad thermals
side by side, and where ballast starts paying; ``--json`` prints the contract's keys and
more (``by_thermal_size``).
"""

from __future__ import annotations

import argparse

from glidetask.commands._output import print_json
from glidetask.engine.compare import sweep_by_thermal_size
from glidetask.formats import strategy_report
from glidetask.formats.task_file import load_scenario


def run(args: argparse.Namespace) -> int:
    scenario = load_scenario(args.task)
    sweep = sweep_by_thermal_size(scenario)  # the day's thermals, and narrow and broad ones beside
    if args.json:
        print_json(strategy_report.sweep_to_dict(sweep, day_cautions(scenario, "metric")))
    else:
        print(strategy_report.sweep_text(sweep, args.units, day_cautions(scenario, args.units)))
    return 0


def day_cautions(scenario, unit_name: str) -> list[str]:
    """The cautions of a day derived from a sounding (the keys typed over it, the
    sounding's own) in ``unit_name``, for a sweep or the odds; none for a typed day."""
    from glidetask import cautions, units

    return cautions.day_source_cautions(scenario.day_source, units.by_name(unit_name), scenario.day.start_time_s)
