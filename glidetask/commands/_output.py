"""Shared output helpers for the commands: JSON with nulls for undefined numbers,
and the caution block of the text output."""

from __future__ import annotations

import json
import math
import sys
from typing import Any

from glidetask import cautions


def jsonable(value: Any) -> Any:
    """Plain JSON types: numpy scalars to Python, NaN/inf to None, tuples to lists."""
    if isinstance(value, dict):
        return {str(k): jsonable(v) for k, v in value.items()}
    if isinstance(value, (list, tuple)):
        return [jsonable(v) for v in value]
    if hasattr(value, "tolist"):  # numpy scalar or array
        return jsonable(value.tolist())
    if isinstance(value, float) and not math.isfinite(value):
        return None
    return value


def print_json(payload: dict) -> None:
    json.dump(jsonable(payload), sys.stdout, indent=2, allow_nan=False)
    sys.stdout.write("\n")


def caution_block(extra: list[str] | tuple[str, ...] = ()) -> str:
    """The cautions as a text block for the end of a command's output."""
    lines = ["CAUTION"] + [f"  * {text}" for text in (*cautions.GENERAL, *extra)]
    return "\n".join(lines)
