"""The small per-user file that remembers the pilot has read the cautions.

It lives in ``$XDG_CONFIG_HOME/glidetask`` (``~/.config/glidetask`` when the variable is
unset) and holds a fingerprint of the caution wording: when the wording changes, the
full cautions are shown again on the next start.
"""

from __future__ import annotations

import hashlib
import os
from pathlib import Path

from glidetask import cautions
from glidetask.formats.atomic import write_atomic

ACKNOWLEDGEMENT_FILE = "cautions-read"


def config_dir() -> Path:
    """``$XDG_CONFIG_HOME/glidetask``, or ``~/.config/glidetask``."""
    base = os.environ.get("XDG_CONFIG_HOME") or str(Path.home() / ".config")
    return Path(base) / "glidetask"


def cautions_fingerprint() -> str:
    """A short hash of every caution the full notice shows."""
    text = "\n".join((*cautions.GENERAL, *cautions.TERRAIN, *cautions.LANDABLES))
    return hashlib.sha256(text.encode("utf-8")).hexdigest()[:16]


def cautions_acknowledged() -> bool:
    """True when this user has acknowledged the current caution wording."""
    try:
        stored = (config_dir() / ACKNOWLEDGEMENT_FILE).read_text(encoding="utf-8").strip()
    except OSError:
        return False
    return stored == cautions_fingerprint()


def acknowledge_cautions() -> bool:
    """Remember the acknowledgement; False (and no crash) if the folder is not writable."""
    folder = config_dir()
    try:
        folder.mkdir(parents=True, exist_ok=True)
        write_atomic(folder / ACKNOWLEDGEMENT_FILE, cautions_fingerprint() + "\n")
    except OSError:
        return False
    return True


RECENT_FILE = "recent-tasks"
RECENT_COUNT = 8


def recent_tasks() -> list[Path]:
    """The task files opened or saved lately, newest first (those that still exist)."""
    try:
        lines = (config_dir() / RECENT_FILE).read_text(encoding="utf-8").splitlines()
    except OSError:
        return []
    return [Path(line) for line in lines if line.strip() and Path(line).is_file()][:RECENT_COUNT]


def remember_task(path: Path) -> bool:
    """Put ``path`` first among the recent task files; False (no crash) if not writable."""
    path = Path(path).expanduser().absolute()
    kept = [path] + [p for p in recent_tasks() if p != path]
    folder = config_dir()
    try:
        folder.mkdir(parents=True, exist_ok=True)
        write_atomic(folder / RECENT_FILE, "".join(f"{p}\n" for p in kept[:RECENT_COUNT]))
    except OSError:
        return False
    return True
