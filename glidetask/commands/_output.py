"""Shared output helpers for the commands: JSON with nulls for undefined numbers,
and the caution block of the text output."""

from __future__ import annotations

import json
import sys

from glidetask import cautions
from glidetask.formats.plan_json import jsonable


def print_json(payload: dict) -> None:
    json.dump(jsonable(payload), sys.stdout, indent=2, allow_nan=False)
    sys.stdout.write("\n")


def caution_block(extra: list[str] | tuple[str, ...] = ()) -> str:
    """The cautions as a text block for the end of a command's output."""
    lines = ["CAUTION"] + [f"  * {text}" for text in (*cautions.GENERAL, *extra)]
    return "\n".join(lines)
